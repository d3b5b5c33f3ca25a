//! Gas-chromatography candidates: retention indices on each phase from the solvation-parameter
//! model (`model::gc::solvation`; boiling-point route as fallback), an oven program from the predicted index range, times
//! through the n-alkane ladder, co-elution from the index uncertainty.

use super::profile::AnalyteProfile;
use super::{AdviseRequest, coelution, unscored_recommendation};
use crate::model::gc::{
    GcAnalyte, GcColumn, OvenSuggestion, alkane_ladder, predict_analyte_index, suggest_oven_program,
};
use crate::phase::{Catalogue, StationaryPhase};
use crate::report::advice::{Conditions, PredictionRow, ProgramStep, Reason, Recommendation};
use crate::structure::volatility::GcVerdict;

/// Two analytes closer than this in retention index are taken as co-eluting (the GC model's
/// resolvable difference).
const DELTA_RI: f64 = 5.0;

/// Factor on the ideal open-tube peak width (N = L/dc at the Golay optimum). No source: the
/// project's own allowance for real columns run away from the optimum, injection band width
/// and extra-column broadening; it is not calibrated against measured widths. It is kept
/// because the GC phase ranking depends on it (without it every GC pair is predicted about 3
/// times better resolved, and the xylene panel's first choice moves from a low-polarity
/// polysiloxane to polyethylene glycol); docs/science.md § 9.4. Check it against the lab's
/// own peak widths.
const PEAK_WIDTH_ALLOWANCE: f64 = 3.0;

fn normal_cdf(x: f64) -> f64 {
    // Abramowitz & Stegun 7.1.26 approximation of erf (error below 1.5e-7)
    let t = 1.0 / (1.0 + 0.327_591_1 * x.abs() / std::f64::consts::SQRT_2);
    let y = 1.0
        - (((((1.061_405_429 * t - 1.453_152_027) * t) + 1.421_413_741) * t - 0.284_496_736) * t
            + 0.254_829_592)
            * t
            * (-(x * x) / 2.0).exp();
    if x >= 0.0 {
        0.5 * (1.0 + y)
    } else {
        0.5 * (1.0 - y)
    }
}

/// Correlation of the index errors of two analytes that are not isomers: similar analytes
/// share the same fragment and phase-constant biases (assumption, documented).
pub const ERROR_CORRELATION: f64 = 0.75;

/// Correlation of the index errors of two isomers (same molecular formula): the solvation
/// model builds both from nearly the same fragments, so almost all of its error is shared and
/// what is left is the isomer-specific part (positional isomers, branching). Without this, two
/// isomers predicted at the same index would get a low co-elution probability only because
/// each index alone is uncertain (assumption, common practice, no source).
pub const ISOMER_ERROR_CORRELATION: f64 = 0.95;

/// Probability that two analytes predicted `delta` index units apart with 1σ errors s1, s2
/// are in truth within `DELTA_RI` (5 index units), with their errors correlated by `rho`
/// ([`ERROR_CORRELATION`], or [`ISOMER_ERROR_CORRELATION`] for isomers). The probability is
/// highest for identical predictions and falls as the predictions move apart.
pub fn coelution_probability_ri(delta: f64, s1: f64, s2: f64) -> f64 {
    coelution_probability_ri_with(delta, s1, s2, ERROR_CORRELATION)
}

/// [`coelution_probability_ri`] with an explicit error correlation `rho` (0-1).
pub fn coelution_probability_ri_with(delta: f64, s1: f64, s2: f64, rho: f64) -> f64 {
    coelution_probability_within(delta, s1, s2, rho, DELTA_RI)
}

/// Resolution below which two peaks are taken as co-eluting: at Rs = 1 two equal Gaussian
/// peaks still overlap by about 2 % (common practice, no source).
pub const RS_COELUTING: f64 = 1.0;

/// Probability that two analytes predicted `delta` index units apart, with 1σ index errors
/// `s1`, `s2` correlated by `rho`, are in truth closer than `resolvable_ri`, the index
/// difference the column resolves at this point of the run (see [`resolvable_delta_ri`]; never
/// below 5 units). The true difference is taken as normal around `delta` with
/// sd = √(s1² + s2² − 2 ρ s1 s2), so the probability is highest at `delta` = 0 and falls
/// monotonically with |`delta`| / sd: two analytes predicted at nearly the same index are the
/// most likely pair to co-elute, whatever their individual uncertainty.
pub fn coelution_probability_within(
    delta: f64,
    s1: f64,
    s2: f64,
    rho: f64,
    resolvable_ri: f64,
) -> f64 {
    let rho = if rho.is_finite() {
        rho.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let sd = (s1 * s1 + s2 * s2 - 2.0 * rho * s1 * s2).max(1.0).sqrt();
    let d = delta.abs();
    let c = if resolvable_ri.is_finite() {
        resolvable_ri.max(DELTA_RI)
    } else {
        DELTA_RI
    };
    (normal_cdf((c - d) / sd) - normal_cdf((-c - d) / sd)).clamp(0.0, 1.0)
}

/// The index difference that gives resolution [`RS_COELUTING`] around index `ri` on `ladder`
/// for two peaks of half-height widths summing to `w_half_sum_min`:
/// ΔI = Rs (w½,1 + w½,2) / 1.18 / (dt/dI), with dt/dI the local slope of the n-alkane ladder
/// (100 index units between neighbouring alkanes). Never below 5 units; 5 when the slope
/// cannot be read (index outside the ladder).
pub fn resolvable_delta_ri(
    ladder: &crate::model::gc::AlkaneLadder,
    ri: f64,
    w_half_sum_min: f64,
) -> f64 {
    let t = |x: f64| ladder.retention_time_min(x).ok();
    let slope = [(ri - 50.0, ri + 50.0), (ri, ri + 50.0), (ri - 50.0, ri)]
        .into_iter()
        .find_map(|(a, b)| Some((t(b)? - t(a)?) / (b - a)))
        .filter(|s| *s > 0.0 && s.is_finite());
    match slope {
        Some(s) if w_half_sum_min.is_finite() && w_half_sum_min > 0.0 => {
            (RS_COELUTING * w_half_sum_min / 1.18 / s).max(DELTA_RI)
        }
        _ => DELTA_RI,
    }
}

/// Whether every analyte boils below 420 K (a volatile panel: thick film, wide bore, headspace).
fn all_volatile(profiles: &[AnalyteProfile]) -> bool {
    profiles
        .iter()
        .all(|p| p.tb_k.is_some_and(|(t, _)| t < 420.0))
}

/// The advisor's column for the analytes on `phase`: 30 m, 0.25 mm with the phase's typical
/// film, or 0.32 mm with a 1.4 µm film when every analyte is volatile (thicker film for
/// volatile analytes; common practice, no source); helium at 35 cm/s.
///
/// # Errors
/// The column model's message (a build defect).
pub fn default_column(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
) -> Result<GcColumn, String> {
    let volatile = all_volatile(profiles);
    let film = if volatile {
        1.4
    } else {
        phase.gc().map_or(0.25, |g| g.typical_film_um())
    };
    GcColumn::new(30.0, if volatile { 0.32 } else { 0.25 }, film, 35.0).map_err(|e| e.to_string())
}

/// Plate number of an open tube: N ≈ L / h with h ≈ the column diameter (Golay optimum, rule of
/// thumb).
pub fn plate_number(column: &GcColumn) -> f64 {
    column.length_m() * 1.0e3 / column.inner_diameter_mm()
}

/// Predicted half-height width, min, of a peak eluting at `t_min` on `column`: the isothermal
/// relation σ = tR / √N (Purnell; Snyder, Kirkland & Dolan 2010 ch. 2), w½ = 2.355 σ, widened
/// by `PEAK_WIDTH_ALLOWANCE` (see there).
pub fn peak_width_half_min(t_min: f64, column: &GcColumn) -> f64 {
    2.355 * t_min.max(0.5) / plate_number(column).sqrt() * PEAK_WIDTH_ALLOWANCE
}

/// Build the candidate for one GC phase.
///
/// # Errors
/// A reason when the phase cannot be evaluated.
pub fn candidate(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    req: &AdviseRequest,
    _catalogue: &Catalogue,
) -> Result<Recommendation, String> {
    let gases = profiles
        .iter()
        .all(|p| p.tb_k.is_some_and(|(t, _)| t < 250.0));
    if phase.id().starts_with("gc-plot") && !gases {
        return Err("porous-layer phases are for permanent gases and very light analytes".into());
    }
    let mut ris = Vec::new();
    let mut not_predicted = Vec::new();
    for p in profiles {
        if p.gc_verdict() == Some(GcVerdict::Unsuitable) || p.permanently_charged() {
            not_predicted.push(format!("{}: not suitable for GC", p.name()));
            continue;
        }
        if matches!(p.gc_verdict(), None | Some(GcVerdict::Unknown)) {
            not_predicted.push(format!(
                "{}: volatility unknown (no structure or boiling point)",
                p.name()
            ));
            continue;
        }
        // solvation-parameter route from the structure, boiling-point route as fallback
        let graph = p.estimate.as_ref().map(|e| &e.graph);
        match predict_analyte_index(graph, p.gc_analyte().as_ref(), phase) {
            Ok(ri) => ris.push((p, ri)),
            Err(e) => not_predicted.push(format!("{}: {e}", p.name())),
        }
    }
    if ris.is_empty() {
        return Err(format!(
            "no analyte could be predicted ({})",
            not_predicted.join("; ")
        ));
    }
    let volatile = all_volatile(profiles);
    let fixed = req.fixed_gc.as_ref();
    let column = match fixed.and_then(|f| f.column) {
        Some(c) => c,
        None => default_column(profiles, phase)?,
    };
    let film = column.film_um();
    let ri_min = ris
        .iter()
        .map(|r| r.1.retention_index)
        .fold(f64::INFINITY, f64::min);
    let ri_max = ris
        .iter()
        .map(|r| r.1.retention_index)
        .fold(f64::NEG_INFINITY, f64::max);
    let oven = match fixed.and_then(|f| f.oven) {
        Some(program) => OvenSuggestion {
            program,
            reasons: vec![format!(
                "oven program {} given by the user",
                program.to_spec()
            )],
        },
        None => suggest_oven_program(ri_min, ri_max, phase, &column).map_err(|e| e.to_string())?,
    };
    let ladder = alkane_ladder(phase, &column, &oven.program).map_err(|e| e.to_string())?;
    let n_plates = plate_number(&column);
    let mut preds = Vec::new();
    let mut sig = Vec::new();
    let mut formulas: Vec<Option<String>> = Vec::new();
    for (p, ri) in &ris {
        let Ok(t) = ladder.predict_time(ri.clone()) else {
            not_predicted.push(format!("{}: outside the alkane ladder", p.name()));
            continue;
        };
        let w_half = peak_width_half_min(t.retention_time_min, &column);
        preds.push(PredictionRow {
            analyte: p.name().to_string(),
            retention_time_min: t.retention_time_min,
            interval_low_min: t.low_95_min,
            interval_high_min: t.high_95_min,
            interval_coverage: 0.95,
            retention_factor: 0.0,
            peak_width_half_min: w_half,
            path: "retention-index".into(),
            retention_index: Some(ri.retention_index),
            source_systems: Vec::new(),
            path_source: None,
        });
        sig.push((p.name().to_string(), ri.retention_index, ri.sigma_ri));
        formulas.push(
            p.estimate
                .as_ref()
                .map(|e| e.descriptors.molecular_formula.clone()),
        );
    }
    if preds.is_empty() {
        return Err(format!(
            "no analyte elutes within the oven program ({})",
            not_predicted.join("; ")
        ));
    }
    // hold-up time t_M = L / u (30 m at 35 cm/s: 1.43 min); an index of 0 lies outside the
    // alkane ladder, so it cannot be read from there
    let t0 = column.holdup_time_min();
    for p in &mut preds {
        p.retention_factor = ((p.retention_time_min - t0) / t0).max(0.0);
    }
    let mut coelutions = Vec::new();
    for i in 0..sig.len() {
        for j in i + 1..sig.len() {
            let isomers = matches!((&formulas[i], &formulas[j]), (Some(a), Some(b)) if a == b);
            let rho = if isomers {
                ISOMER_ERROR_CORRELATION
            } else {
                ERROR_CORRELATION
            };
            let (a, b) = if sig[i].1 <= sig[j].1 { (i, j) } else { (j, i) };
            let pa = preds.iter().find(|p| p.analyte == sig[a].0).cloned();
            let pb = preds.iter().find(|p| p.analyte == sig[b].0).cloned();
            // what this column resolves at this point of the run, from the predicted widths
            let w_sum = pa.as_ref().map_or(0.0, |p| p.peak_width_half_min)
                + pb.as_ref().map_or(0.0, |p| p.peak_width_half_min);
            let resolvable = resolvable_delta_ri(&ladder, 0.5 * (sig[i].1 + sig[j].1), w_sum);
            let prob = coelution_probability_within(
                sig[i].1 - sig[j].1,
                sig[i].2,
                sig[j].2,
                rho,
                resolvable,
            );
            if prob > 0.01
                && let (Some(pa), Some(pb)) = (pa, pb)
            {
                let note = (sig[a].1 - sig[b].1).abs().lt(&DELTA_RI).then(|| {
                    format!(
                        "predicted retention indices {:.0} and {:.0} on this phase",
                        sig[a].1, sig[b].1
                    )
                });
                coelutions.push(coelution(&pa, &pb, prob, note));
            }
        }
    }
    // helium only: the oven-program and alkane-ladder calibration (model::gc) assume helium at
    // 35 cm/s; hydrogen (faster optimum, flammable) and nitrogen (slow optimum) are not modelled
    // (docs/science.md)
    let carrier = "helium";
    let inlet = if volatile {
        "static headspace (volatile analytes in a non-volatile matrix), split 10:1".to_string()
    } else {
        "split 20:1 at 250 °C (splitless for trace levels)".to_string()
    };
    let deriv: Vec<String> = profiles
        .iter()
        .filter(|p| p.gc_verdict() == Some(GcVerdict::SuitableAfterDerivatisation))
        .map(|p| {
            let mut how: Vec<String> = Vec::new();
            if let Some(g) = &p.gc {
                for f in &g.flags {
                    if f.severity == crate::structure::volatility::Severity::Caution {
                        continue;
                    }
                    if let Some(d) = f.derivatisation
                        && !how.iter().any(|h| h == d.describe())
                    {
                        how.push(d.describe().to_string());
                    }
                }
            }
            format!(
                "{}: {}",
                p.name(),
                if how.is_empty() {
                    "derivatise".to_string()
                } else {
                    how.join(", ")
                }
            )
        })
        .collect();
    let prog = &oven.program;
    let ramp_end = prog.initial_hold_min() + prog.ramp_time_min();
    let program = vec![
        ProgramStep {
            time_min: 0.0,
            value: prog.initial_c(),
        },
        ProgramStep {
            time_min: prog.initial_hold_min(),
            value: prog.initial_c(),
        },
        ProgramStep {
            time_min: ramp_end,
            value: prog.final_c(),
        },
        ProgramStep {
            time_min: prog.total_time_min(),
            value: prog.final_c(),
        },
    ];
    let (detection, detector_reason) = super::detection::for_gc(profiles, req.detector);
    let conditions = Conditions {
        column_length_mm: column.length_m() * 1000.0,
        column_id_mm: column.inner_diameter_mm(),
        particle_um: None,
        film_um: Some(film),
        mobile_phase_a: None,
        mobile_phase_b: None,
        modifier: None,
        ph: None,
        buffer: None,
        buffer_preparation: None,
        program,
        program_unit: "°C".into(),
        flow_ml_min: None,
        temperature_c: None,
        carrier_gas: Some(format!("{carrier}, constant flow")),
        linear_velocity_cm_s: Some(column.linear_velocity_cm_s()),
        inlet: Some(inlet),
        derivatisation: (!deriv.is_empty()).then(|| deriv.join("; ")),
        suppression: None,
        injection: "1 µL liquid injection, or the headspace vial's equilibrated gas phase".into(),
        detection,
        dead_time_min: t0,
        plate_number: n_plates,
        run_time_min: prog.total_time_min(),
        pressure_bar: None,
    };
    let (mut rec, _, _) = unscored_recommendation("gc", phase, conditions, preds, coelutions);
    let credible = credible_index_resolution(&rec, &sig, &formulas);
    let (sep, sep_reason) = super::separation_score_counting(&rec, credible);
    let mut reasons = vec![Reason {
        source: "model:gc-retention-index".into(),
        text: "retention indices from the solvation-parameter model (solute descriptors from structure, the phase's system constants; boiling-point route when the structure cannot be read), times through the n-alkane ladder (docs/gc-retention.md)".into(),
        weight: None,
    }];
    reasons.extend(oven.reasons.iter().map(|r| Reason {
        source: "rule:oven-program".into(),
        text: r.clone(),
        weight: None,
    }));
    if !not_predicted.is_empty() {
        reasons.push(Reason {
            source: "model:gc-retention-index".into(),
            text: format!("not predicted: {}", not_predicted.join("; ")),
            weight: None,
        });
    }
    let rules = rules(profiles, phase);
    let rule_sum: f64 = rules.iter().filter_map(|r| r.weight).sum();
    let (sep, uncertainty_reason) = separation_with_index_uncertainty(sep);
    let (sep, shape_reason) = free_acid_peak_shape(profiles, phase, sep);
    reasons.push(detector_reason);
    reasons.push(sep_reason);
    reasons.push(uncertainty_reason);
    reasons.extend(shape_reason);
    reasons.extend(rules);
    rec.reasons = reasons;
    rec.score = (0.6 * sep + 0.4 * (0.5 + rule_sum)).clamp(0.0, 1.0);
    Ok(rec)
}

/// The critical resolution a GC phase is credited with: for every adjacent pair, only the part
/// of the predicted index difference beyond one standard deviation of that difference counts,
/// Rs_credited = Rs · max(|ΔI| − σ_ΔI, 0) / |ΔI|, with σ_ΔI² = σ_a² + σ_b² − 2ρσ_aσ_b
/// ([`ERROR_CORRELATION`], [`ISOMER_ERROR_CORRELATION`] for isomers). A phase is not preferred
/// for a separation the index model only guesses (the same rule as the LC credited
/// separation, `model:predicted-separation`; common practice, no source). `None` for a single
/// analyte.
fn credible_index_resolution(
    rec: &Recommendation,
    sig: &[(String, f64, f64)],
    formulas: &[Option<String>],
) -> Option<(f64, String)> {
    let find = |name: &str| sig.iter().position(|s| s.0 == name);
    let mut best: Option<(f64, f64)> = None;
    for w in rec.predictions.windows(2) {
        let (Some(i), Some(j)) = (find(&w[0].analyte), find(&w[1].analyte)) else {
            continue;
        };
        let isomers = matches!((&formulas[i], &formulas[j]), (Some(a), Some(b)) if a == b);
        let rho = if isomers {
            ISOMER_ERROR_CORRELATION
        } else {
            ERROR_CORRELATION
        };
        let (s1, s2) = (sig[i].2, sig[j].2);
        let sd = (s1 * s1 + s2 * s2 - 2.0 * rho * s1 * s2).max(0.0).sqrt();
        let delta = (sig[j].1 - sig[i].1).abs();
        let width = w[0].peak_width_half_min + w[1].peak_width_half_min;
        if !(width > 0.0 && sd.is_finite() && delta.is_finite()) {
            continue;
        }
        let rs = 1.18 * (w[1].retention_time_min - w[0].retention_time_min).abs() / width;
        let credited = if delta > 0.0 {
            rs * (delta - sd).max(0.0) / delta
        } else {
            0.0
        };
        if best.is_none_or(|b| credited < b.0) {
            best = Some((credited, sd));
        }
    }
    best.map(|(rs, sd)| {
        (
            rs,
            format!(
                "counted as {rs:.2}: only the index difference beyond one standard deviation of the predicted difference of the least separated pair ({sd:.0} index units) is credited (common practice, no source)"
            ),
        )
    })
}

/// The separation part of a GC phase's score, with the index model's uncertainty: the critical
/// resolution rests on predicted indices whose 1σ (about 20 index units) is larger than most
/// differences between phases, so differences in predicted separation count half,
/// s_used = 0.5 + 0.5·s, and the chemistry rules of the phase weigh as much as the prediction.
/// A well-separated prediction keeps full marks, so a GC phase still competes with the other
/// modes on equal terms; a weight on the prediction, not the co-elution probability, so that a
/// less certain phase is never rewarded for its uncertainty (model:gc-index-uncertainty;
/// common practice, no source).
pub fn separation_with_index_uncertainty(sep: f64) -> (f64, Reason) {
    let used = 0.5 + 0.5 * sep;
    (
        used,
        Reason {
            source: "model:gc-index-uncertainty".into(),
            text: format!(
                "predicted separation {sep:.2} counted as {used:.2} (0.5 + half of it): the index model's 1σ of about 20 units is larger than most differences between phases, so those differences count half"
            ),
            weight: Some(used - sep),
        },
    )
}

/// Share of analytes that are free carboxylic acids (GC-suitable as they are).
fn free_acid_share(profiles: &[AnalyteProfile]) -> f64 {
    profiles
        .iter()
        .filter(|p| p.gc_analyte().is_some_and(|a| a.n_carboxylic_acid > 0))
        .count() as f64
        / profiles.len().max(1) as f64
}

/// Free carboxylic acids adsorb on phases not deactivated for acids and give tailing peaks,
/// so a resolution predicted for symmetric peaks overstates the separation there: on every
/// phase but acid-modified polyethylene glycol the separation part is counted × (1 − 0.5 ×
/// the share of free acids) (rule:gc-free-acids-tail; common practice, no source).
pub fn free_acid_peak_shape(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    sep: f64,
) -> (f64, Option<Reason>) {
    let share = free_acid_share(profiles);
    if share == 0.0 || phase.id() == "gc-wax-acid" {
        return (sep, None);
    }
    let factor = 1.0 - 0.5 * share;
    let used = sep * factor;
    (
        used,
        Some(Reason {
            source: "rule:gc-free-acids-tail".into(),
            text: format!(
                "{:.0} % of analytes are free carboxylic acids: they adsorb and tail on phases not deactivated for acids, so the predicted separation {sep:.2} (symmetric peaks) is counted as {used:.2} (x {factor:.2}); acid-modified polyethylene glycol is the phase for them (common practice, no source)",
                share * 100.0
            ),
            weight: Some(used - sep),
        }),
    )
}

/// Share of analytes that are polyhalogenated (three or more halogen atoms): organochlorine
/// pesticides, PCBs, halogenated volatiles.
fn polyhalogenated_share(profiles: &[AnalyteProfile]) -> f64 {
    profiles.iter().filter(|p| p.halogens() >= 3).count() as f64 / profiles.len().max(1) as f64
}

/// The classes a mid-polarity phase is chosen first for, in words (rule:gc-confirmation-phase;
/// the selectivity column of data/phases.tsv, common practice, no source).
fn confirmation_phase_targets(id: &str) -> &'static str {
    match id {
        "gc-35-phenyl" | "gc-50-phenyl" => "analytes with two or more aromatic rings",
        "gc-14-cyanopropylphenyl" => "nitro compounds and nitriles",
        "gc-trifluoropropyl" => "ketones, nitro and halogenated compounds",
        _ => "none",
    }
}

/// Share of `profiles` in the classes of [`confirmation_phase_targets`].
fn confirmation_phase_target_share(profiles: &[AnalyteProfile], id: &str) -> f64 {
    let hit = |a: &GcAnalyte| match id {
        "gc-35-phenyl" | "gc-50-phenyl" => a.n_aromatic_rings >= 2,
        "gc-14-cyanopropylphenyl" => a.n_nitro + a.n_nitrile > 0,
        "gc-trifluoropropyl" => a.n_carbonyl + a.n_nitro + a.n_halogen > 0 && a.n_ester == 0,
        _ => false,
    };
    profiles
        .iter()
        .filter(|p| p.gc_analyte().is_some_and(|a| hit(&a)))
        .count() as f64
        / profiles.len().max(1) as f64
}

/// GC phase rules (common practice, no source).
fn rules(profiles: &[AnalyteProfile], phase: &StationaryPhase) -> Vec<Reason> {
    let n = profiles.len().max(1) as f64;
    let polar = profiles
        .iter()
        .filter(|p| {
            p.gc_analyte()
                .is_some_and(|a| a.n_hydroxyl + a.n_carboxylic_acid + a.n_amine > 0)
        })
        .count() as f64
        / n;
    // esters and alcohols (flavour esters, fatty-acid methyl esters, fusel alcohols) are
    // separated by polarity on polyethylene glycol or cyanopropyl phases (common practice, no
    // source)
    let oxygenates = profiles
        .iter()
        .filter(|p| {
            p.gc_analyte()
                .is_some_and(|a| a.n_hydroxyl + a.n_ester > 0 && a.n_carboxylic_acid == 0)
        })
        .count() as f64
        / n;
    let acids = profiles
        .iter()
        .filter(|p| p.gc_analyte().is_some_and(|a| a.n_carboxylic_acid > 0))
        .count();
    let volatile = profiles
        .iter()
        .all(|p| p.tb_k.is_some_and(|(t, _)| t < 420.0));
    let gases = profiles
        .iter()
        .all(|p| p.tb_k.is_some_and(|(t, _)| t < 250.0));
    let halogenated = polyhalogenated_share(profiles);
    let mut out = Vec::new();
    // listed with their weight, 0 included (see `lc::rules`)
    let mut rule = |s: &str, t: String, w: f64| {
        out.push(Reason {
            source: s.into(),
            text: t,
            weight: Some(w),
        })
    };
    match phase.id() {
        // the usual first column of its class weighs as much as the other classes' usual
        // columns (0.15); a volatile list has its own usual column, thick-film 6 %
        // cyanopropylphenyl (common practice, from memory)
        "gc-5-phenyl" => rule("rule:gc-general-purpose", if volatile {
            "5 % phenyl is the usual general-purpose first GC column for semivolatiles; for a list that boils below 420 K the thick-film 6 % cyanopropylphenyl is the usual first column".into()
        } else {
            "5 % phenyl is the usual general-purpose first GC column for semivolatiles".into()
        }, if volatile { 0.0 } else { 0.15 }),
        // boiling-point order is the merit of the non-polar phase for non-polar lists; free
        // alcohols, amines and acids of low molar mass tail on it and are separated better by a
        // phase with some dipolarity (common practice, no source)
        "gc-dimethyl" => {
            let (w, text) = if polar >= 0.5 {
                (-0.05, format!("100 % dimethylpolysiloxane separates mainly by boiling point; {:.0} % of analytes carry OH/NH/acid groups, which tail on it and are better separated on a phase with some polarity", polar * 100.0))
            } else if polar >= 0.25 {
                (0.0, format!("100 % dimethylpolysiloxane separates mainly by boiling point; {:.0} % of analytes carry OH/NH/acid groups, which tail on it", polar * 100.0))
            } else {
                (0.06, "100 % dimethylpolysiloxane separates mainly by boiling point".to_string())
            };
            rule("rule:gc-boiling-point-order", text, w)
        }
        "gc-6-cyanopropylphenyl" => rule("rule:gc-volatile-solvent-screen", "6 % cyanopropylphenyl with a thick film is the usual phase for volatile solvent screens".into(), if volatile { 0.15 } else { 0.0 }),
        "gc-wax" => rule("rule:gc-polar-analytes", format!("{:.0} % of analytes carry OH/NH/acid groups and {:.0} % are esters or alcohols: polyethylene glycol retains and shapes them better, and separates esters by polarity", polar * 100.0, oxygenates * 100.0), if oxygenates >= 0.5 { 0.18 } else if polar > 0.25 { 0.12 } else { 0.0 }),
        "gc-wax-acid" => rule("rule:gc-free-acids", "free carboxylic acids tail less on acid-modified polyethylene glycol".into(), if acids > 0 { 0.15 } else { -0.05 }),
        // mid- and high-polarity polysiloxanes are usually the second (confirmation) column,
        // chosen for a selectivity the general-purpose first column lacks; first for a list
        // only when most analytes are of the classes the phase is made for (common practice,
        // no source)
        "gc-35-phenyl" | "gc-50-phenyl" | "gc-14-cyanopropylphenyl" | "gc-trifluoropropyl" => {
            let targets = confirmation_phase_target_share(profiles, phase.id());
            rule("rule:gc-confirmation-phase", format!("a mid-polarity phase is usually the second (confirmation) column; {:.0} % of analytes are of the classes it is chosen first for ({})", targets * 100.0, confirmation_phase_targets(phase.id())), if targets >= 0.5 { 0.0 } else { -0.05 })
        }
        id if id.starts_with("gc-plot") => rule("rule:gc-porous-layer", "porous-layer phases are for permanent gases and very light analytes".into(), if gases { 0.3 } else { -0.3 }),
        _ => {}
    }
    // a volatile list (solvents, volatile screens) needs a thick film to be retained above
    // ambient oven temperature; thick films for volatiles are made in the low-polarity
    // polysiloxanes, 6 % cyanopropylphenyl and polyethylene glycol, while mid-polarity phenyl
    // and cyanopropyl phases are made as thin films for semivolatiles
    // (rule:gc-thick-film-volatiles; common practice, from memory)
    if volatile && !gases {
        let (w, what) = match phase.id() {
            "gc-dimethyl" | "gc-6-cyanopropylphenyl" => (0.15, "made in thick films for volatiles"),
            "gc-5-phenyl" => (0.1, "made in thick films for volatiles, less often"),
            "gc-wax" => (0.0, "made in thick films for volatiles, less often"),
            id if id.starts_with("gc-plot") => (0.0, "a porous layer"),
            _ => (-0.1, "made mostly in thin films for semivolatiles"),
        };
        rule(
            "rule:gc-thick-film-volatiles",
            format!(
                "every analyte boils below 420 K: a thick film (1-3 µm) retains them; this phase is {what}"
            ),
            w,
        );
    }
    // semivolatile polyhalogenated analytes (organochlorine pesticides, PCBs): standard methods
    // run them on a low-polarity 5 % phenyl (or 100 % dimethyl) column and confirm on a
    // mid-polarity one (35 % phenyl, 14 % cyanopropylphenyl), which is the back-up's role
    // (rule:gc-halogenated-semivolatiles; common practice for the standard methods of
    // organochlorine pesticides and PCBs, from memory)
    if halogenated >= 0.5 && !volatile {
        let (w, role) = match phase.id() {
            "gc-5-phenyl" => (0.4, "the usual first column"),
            "gc-dimethyl" => (0.25, "a usual first column"),
            "gc-35-phenyl" | "gc-14-cyanopropylphenyl" | "gc-50-phenyl" | "gc-trifluoropropyl" => (
                0.0,
                "a confirmation column (the back-up's role), not the first",
            ),
            _ => (-0.1, "not a usual column for them"),
        };
        rule(
            "rule:gc-halogenated-semivolatiles",
            format!(
                "{:.0} % of analytes are polyhalogenated semivolatiles (organochlorine pesticides, PCBs): this phase is {role}; standard methods separate them on 5 % phenyl and confirm on a mid-polarity phase (from memory)",
                halogenated * 100.0
            ),
            w,
        );
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coelution_probability_is_highest_for_identical_indices_and_falls_with_distance() {
        for rho in [ERROR_CORRELATION, ISOMER_ERROR_CORRELATION] {
            let mut last = coelution_probability_ri_with(0.0, 23.0, 23.0, rho);
            for d in 1..60 {
                let p = coelution_probability_ri_with(f64::from(d), 23.0, 23.0, rho);
                assert!(p <= last + 1e-12, "rho {rho}: p({d}) = {p} > {last}");
                assert!((0.0..=1.0).contains(&p));
                last = p;
            }
        }
    }

    proptest::proptest! {
        /// Property: the co-elution probability is bounded, highest for identical predictions,
        /// never rises as the predictions move apart (in units of the difference's sd), and
        /// never falls when the errors are more strongly shared (isomers).
        #[test]
        fn coelution_probability_is_monotone_in_the_index_difference(
            d1 in 0.0f64..200.0,
            step in 0.0f64..50.0,
            s1 in 0.0f64..80.0,
            s2 in 0.0f64..80.0,
            rho in 0.0f64..1.0,
            c in 0.0f64..60.0,
        ) {
            let near = coelution_probability_within(d1, s1, s2, rho, c);
            let far = coelution_probability_within(d1 + step, s1, s2, rho, c);
            let same = coelution_probability_within(0.0, s1, s2, rho, c);
            proptest::prop_assert!((0.0..=1.0).contains(&near));
            proptest::prop_assert!(far <= near + 1e-12, "p({}) = {far} > p({d1}) = {near}", d1 + step);
            proptest::prop_assert!(same + 1e-12 >= near);
            // sign of the difference does not matter
            let neg = coelution_probability_within(-d1, s1, s2, rho, c);
            proptest::prop_assert!((neg - near).abs() < 1e-12);
            // a wider resolvable difference (broader peaks) never lowers the probability
            let wider = coelution_probability_within(d1, s1, s2, rho, c + step);
            proptest::prop_assert!(wider + 1e-12 >= near);
        }
    }

    /// m- and p-xylene on a low-polarity polysiloxane: reference indices 864 and 862 on
    /// dimethylpolysiloxane (from memory, tests/data/gc_ri_reference.tsv), the classic unresolved
    /// pair (common practice). Predicted 3 units apart on a 30 m x 0.25 mm column at 10 C/min,
    /// they must be the most probable co-elution of the xylene panel, well above a pair 9 units
    /// apart (ethylbenzene / p-xylene) and far above a pair 25 units apart (o-xylene / m-xylene).
    #[test]
    fn the_xylene_pair_predicted_nearly_identical_gets_the_highest_probability() {
        use crate::model::gc::OvenProgram;
        let phase = Catalogue::builtin()
            .and_then(|c| c.phase("gc-5-phenyl"))
            .unwrap();
        let column = GcColumn::new(30.0, 0.25, 0.25, 35.0).unwrap();
        let program = OvenProgram::new(40.0, 2.0, 10.0, 250.0, 5.0).unwrap();
        let ladder = alkane_ladder(phase, &column, &program).unwrap();
        let width = |ri: f64| peak_width_half_min(ladder.retention_time_min(ri).unwrap(), &column);
        let prob = |a: f64, b: f64| {
            let c = resolvable_delta_ri(&ladder, 0.5 * (a + b), width(a) + width(b));
            assert!((DELTA_RI..60.0).contains(&c), "resolvable {c}");
            coelution_probability_within(a - b, 25.0, 25.0, ISOMER_ERROR_CORRELATION, c)
        };
        let mp = prob(898.0, 901.0);
        let ep = prob(889.0, 898.0);
        let om = prob(901.0, 926.0);
        assert!(mp >= 0.8, "m/p-xylene {mp}");
        assert!(mp > ep && ep > om, "{mp} {ep} {om}");
        assert!(om < 0.35, "o/m-xylene {om}");
        // two analytes a full alkane apart are no risk
        assert!(prob(800.0, 900.0) < 0.01);
    }

    #[test]
    fn isomers_predicted_at_the_same_index_are_a_flagged_risk() {
        // typical held-out sigma of the solvation model on a 5 % phenyl phase (~23 units)
        let iso = coelution_probability_ri_with(0.0, 23.0, 23.0, ISOMER_ERROR_CORRELATION);
        let other = coelution_probability_ri(0.0, 23.0, 23.0);
        assert!(iso > other);
        assert!(iso >= 0.2, "{iso}");
        // isomers 40 units apart are not a risk
        assert!(coelution_probability_ri_with(40.0, 23.0, 23.0, ISOMER_ERROR_CORRELATION) < 0.01);
    }
}
