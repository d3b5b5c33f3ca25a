//! Ion-chromatography candidates: elution order and relative retention from the ion table
//! (charge, hydrated size, eluent), converted to minutes with an assumed reference retention.

use super::profile::AnalyteProfile;
use super::{coelution, resolution, separation_score_counting, unscored_recommendation};
use crate::model::coelution::normal_cdf;
use crate::model::ic::estimate::SIGMA_LN_ESTIMATE;
use crate::model::ic::estimate::{MIN_CHARGE, ion_features};
use crate::model::ic::{EstimatedIon, predict_ion_order_with};
use crate::model::theory;
use crate::phase::{Catalogue, PhaseMode, StationaryPhase};
use crate::report::advice::Coelution;
use crate::report::advice::{Conditions, PredictionRow, ProgramStep, Reason, Recommendation};

/// Retention factor assumed for the reference ion of the ion table (assumption: the tables'
/// reference ion elutes at k ≈ 3 at the reference eluent concentration; from memory).
pub const K_REFERENCE: f64 = 3.0;

/// Retention-factor window an isocratic IC strength aims at: retained clear of the void and
/// eluted within a practical run (common practice, no source).
pub const K_WINDOW: (f64, f64) = (1.0, 20.0);

/// Isocratic strengths tried for gradient-capable eluents, mM (within each eluent's typical
/// range).
const STRENGTHS_MM: [f64; 11] = [
    5.0, 10.0, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0, 60.0, 80.0, 100.0,
];

/// The reference ion's retention factor for the IC recommendation `rec` (the table's
/// reference ion at [`K_REFERENCE`] at the eluent's reference strength, scaled to the
/// recommendation's strength with the ion-exchange slope −1/y); [`K_REFERENCE`] when the
/// recommendation is not an ion-exchange one.
pub fn reference_retention_factor(catalogue: &Catalogue, rec: &Recommendation) -> f64 {
    let eluent = match rec.phase.id.as_str() {
        "ic-anion-carbonate" => return K_REFERENCE,
        id if id.starts_with("ic-anion") => "koh",
        id if id.starts_with("ic-cation") => "msa",
        _ => return K_REFERENCE,
    };
    let (Ok(el), Some(c)) = (
        catalogue.ic_eluent(eluent),
        rec.conditions.program.first().map(|s| s.value),
    ) else {
        return K_REFERENCE;
    };
    let y = f64::from(el.eluent_charge()).max(1.0);
    if c > 0.0 {
        K_REFERENCE * (c / el.reference_conc_mm()).powf(-1.0 / y)
    } else {
        K_REFERENCE
    }
}

/// Build the candidate for one IC phase.
///
/// # Errors
/// A reason when no analyte is in the ion table.
pub fn candidate(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    mode: PhaseMode,
    catalogue: &Catalogue,
    detector: super::Detector,
) -> Result<Recommendation, String> {
    // (eluent id, eluent text, suppression, program value in mM, program unit, preparation);
    // eluent strengths are common starting points (common practice, no source)
    let (eluent, eluent_text, suppression, conc_mm, unit, preparation) = match (mode, phase.id()) {
        (PhaseMode::IcAnion, "ic-anion-carbonate") => (
            "carbonate-bicarbonate",
            "3.5 mM sodium carbonate / 1.0 mM sodium bicarbonate, isocratic",
            "anion suppressor (electrolytic or chemical)",
            3.5,
            "mM sodium carbonate (with 1.0 mM sodium bicarbonate)",
            "weigh sodium carbonate and sodium bicarbonate into high-purity water (18 MΩ·cm), filter (0.2 µm) and degas",
        ),
        (PhaseMode::IcAnion, _) => (
            "koh",
            "potassium hydroxide",
            "anion suppressor (electrolytic)",
            20.0,
            "mM potassium hydroxide",
            "prepare eluents from high-purity water (18 MΩ·cm) and degas; hydroxide eluents absorb CO2 from air (keep them under inert gas, or generate them electrolytically)",
        ),
        _ => (
            "msa",
            "methanesulfonic acid",
            "cation suppressor, or non-suppressed conductivity",
            20.0,
            "mM methanesulfonic acid",
            "dilute methanesulfonic acid in high-purity water (18 MΩ·cm), filter (0.2 µm) and degas",
        ),
    };
    let queries: Vec<String> = profiles.iter().map(|p| p.analyte.name.clone()).collect();
    let mut names: Vec<&str> = Vec::new();
    let mut owners: Vec<&AnalyteProfile> = Vec::new();
    for (p, q) in profiles.iter().zip(&queries) {
        // an analyte matched to the ion table (by name, salt name or salt structure) is
        // predicted as that ion; only ions of this mode's charge sign
        if let Some(ion) = &p.ion {
            let sign_ok = match mode {
                PhaseMode::IcAnion => ion.charge < 0,
                _ => ion.charge > 0,
            };
            if sign_ok {
                names.push(&ion.id);
                owners.push(p);
            }
        } else if catalogue.ic_ion(q).is_ok() {
            names.push(q);
            owners.push(p);
        } else if catalogue.ic_ion(&p.analyte.query).is_ok() {
            names.push(&p.analyte.query);
            owners.push(p);
        }
    }
    // the other analytes with a structure: placed by the rough structure estimate when they
    // carry the exchanger's charge at the eluent's pH
    let mut estimated: Vec<EstimatedIon> = Vec::new();
    let mut estimated_owners: Vec<&AnalyteProfile> = Vec::new();
    if let Some(exchanger) = phase.ic_exchanger() {
        for p in profiles {
            if owners.iter().any(|o| std::ptr::eq(*o, p)) || p.ion.is_some() {
                continue;
            }
            let Some(e) = &p.estimate else { continue };
            let features = ion_features(&e.graph, &p.sites, exchanger);
            if features.charge >= MIN_CHARGE {
                estimated.push(EstimatedIon {
                    name: p.name().to_string(),
                    features,
                });
                estimated_owners.push(p);
            }
        }
    }
    if names.is_empty() && estimated.is_empty() {
        return Err(
            "no analyte is in the ion table or carries this exchanger's charge at the eluent's pH"
                .into(),
        );
    }
    let el = catalogue.ic_eluent(eluent).map_err(|e| e.to_string())?;
    let (ref_conc, y) = (
        el.reference_conc_mm(),
        f64::from(el.eluent_charge()).max(1.0),
    );
    // the reference ion's own retention factor at concentration c (charge 1, slope -1/y)
    let k_reference = |c: f64| K_REFERENCE * (c / ref_conc).powf(-1.0 / y);
    let predict = |c: Option<f64>| {
        predict_ion_order_with(catalogue, phase.id(), eluent, c, &names, &estimated)
            .map_err(|e| e.to_string())
    };
    // a gradient-capable eluent gets the isocratic strength that keeps most ions at
    // K_WINDOW.0 <= k <= K_WINDOW.1 (ties: nearest the usual starting strength)
    let (conc_mm, eluent_text, strength_reason) = if eluent == "carbonate-bicarbonate" {
        (conc_mm, eluent_text.to_string(), None)
    } else {
        let mut best: Option<(usize, f64, f64)> = None;
        // gradient ends: the strongest eluent that still retains the first ion (k >= 2) and
        // the weakest that elutes the last one by k = 10
        let (mut start, mut end): (Option<f64>, Option<f64>) = (None, None);
        for c in STRENGTHS_MM {
            if c < el.typical_conc_min_mm() || c > el.typical_conc_max_mm() {
                continue;
            }
            let p = predict(Some(c))?;
            let inside = p
                .ions
                .iter()
                .filter(|i| {
                    let k = k_reference(c) * i.relative_retention;
                    (K_WINDOW.0..=K_WINDOW.1).contains(&k)
                })
                .count();
            let ks: Vec<f64> = p
                .ions
                .iter()
                .map(|i| k_reference(c) * i.relative_retention)
                .collect();
            if ks.first().is_some_and(|&k| k >= 2.0) {
                start = Some(c);
            }
            if end.is_none() && ks.last().is_some_and(|&k| k <= 10.0) {
                end = Some(c);
            }
            let distance = (c / conc_mm).ln().abs();
            if best.is_none_or(|b| inside > b.0 || (inside == b.0 && distance < b.2 - 1e-9)) {
                best = Some((inside, c, distance));
            }
        }
        let (inside, c, _) = best.unwrap_or((0, conc_mm, 0.0));
        let total = names.len() + estimated.len();
        let text = if eluent == "koh" {
            format!("potassium hydroxide, {c:.0} mM isocratic")
        } else {
            format!("{c:.0} mM methanesulfonic acid, isocratic")
        };
        let reason = Reason {
            source: "rule:ic-eluent-strength".into(),
            text: if inside >= total {
                format!(
                    "{c:.0} mM {} keeps every predicted ion at retention factor {}-{} (the strengths tried: {}-{} mM; common practice, no source)",
                    el.name(),
                    K_WINDOW.0,
                    K_WINDOW.1,
                    el.typical_conc_min_mm(),
                    el.typical_conc_max_mm()
                )
            } else {
                format!(
                    "no single strength keeps every ion at retention factor {}-{}: {c:.0} mM {} keeps {inside} of {total}; ions of different charge respond differently to the eluent strength, so a concentration gradient (about {:.0} to {:.0} mM: the strongest eluent that still retains the first ion at k = 2, the weakest that elutes the last by k = 10) will usually elute them all in one run; retention under a gradient is not predicted here (common practice, no source)",
                    K_WINDOW.0,
                    K_WINDOW.1,
                    el.name(),
                    start.unwrap_or(el.typical_conc_min_mm()),
                    end.unwrap_or(el.typical_conc_max_mm())
                )
            },
            weight: None,
        };
        (c, text, Some(reason))
    };
    let conc = if eluent == "carbonate-bicarbonate" {
        None
    } else {
        Some(conc_mm)
    };
    let pred = predict(conc)?;
    let k_ref = k_reference(conc.unwrap_or(ref_conc));
    let (l, id, flow) = (250.0, 4.0, 1.0);
    let vm = theory::column_dead_volume_ml(l, id).map_err(|e| e.to_string())?;
    let t0 = vm / flow;
    let n_plates: f64 = 8000.0;
    let mut preds = Vec::new();
    for ion in &pred.ions {
        let owner = owners
            .iter()
            .zip(&names)
            .find(|(_, n)| catalogue.ic_ion(n).is_ok_and(|i| i.id() == ion.ion_id));
        let from_estimate = owner.is_none() && estimated.iter().any(|e| e.name == ion.ion_id);
        let name = owner.map_or(ion.name.clone(), |(p, _)| p.name().to_string());
        let k = k_ref * ion.relative_retention;
        let t = t0 * (1.0 + k);
        preds.push(PredictionRow {
            analyte: name,
            retention_time_min: t,
            interval_low_min: t0 * (1.0 + k_ref * ion.low_95),
            interval_high_min: t0 * (1.0 + k_ref * ion.high_95),
            interval_coverage: 0.95,
            retention_factor: k,
            peak_width_half_min: 2.355 * t / n_plates.sqrt(),
            path: if from_estimate {
                "ion-estimate".into()
            } else {
                "ion-table".into()
            },
            retention_index: None,
            source_systems: Vec::new(),
            path_source: None,
        });
    }
    let mut coelutions = Vec::new();
    for ion in &pred.ions {
        for other in &ion.coelutes_with {
            let a = preds.iter().position(|p| {
                catalogue
                    .ic_ion(&p.analyte)
                    .is_ok_and(|i| i.id() == ion.ion_id)
                    || p.analyte == ion.name
            });
            let b = preds
                .iter()
                .position(|p| catalogue.ic_ion(&p.analyte).is_ok_and(|i| i.id() == *other));
            if let (Some(a), Some(b)) = (a, b)
                && preds[a].retention_time_min <= preds[b].retention_time_min
            {
                coelutions.push(coelution(
                    &preds[a],
                    &preds[b],
                    0.6,
                    Some("selectivity below 1.10 in the ion table".into()),
                ));
            }
        }
    }
    let unmatched: Vec<String> = profiles
        .iter()
        .filter(|p| {
            !owners.iter().any(|o| o.name() == p.name())
                && !estimated_owners.iter().any(|o| o.name() == p.name())
        })
        .map(|p| p.name().to_string())
        .collect();
    // isocratic: the program lasts the run, 3 min past the last predicted peak (at least 13 min)
    let run_time = preds
        .iter()
        .map(|p| p.retention_time_min)
        .fold(10.0, f64::max)
        + 3.0;
    let conditions = Conditions {
        column_length_mm: l,
        column_id_mm: id,
        particle_um: Some(9.0),
        film_um: None,
        mobile_phase_a: Some(eluent_text),
        mobile_phase_b: None,
        modifier: None,
        ph: None,
        buffer: None,
        buffer_preparation: Some(preparation.into()),
        program: vec![
            ProgramStep {
                time_min: 0.0,
                value: conc_mm,
            },
            ProgramStep {
                time_min: run_time,
                value: conc_mm,
            },
        ],
        program_unit: unit.into(),
        flow_ml_min: Some(flow),
        temperature_c: Some(30.0),
        carrier_gas: None,
        linear_velocity_cm_s: None,
        inlet: None,
        derivatisation: None,
        suppression: Some(suppression.to_string()),
        injection: "10-25 µL of the filtered (0.2 µm) aqueous sample".into(),
        detection: super::detection::for_ic(detector),
        dead_time_min: t0,
        plate_number: n_plates,
        run_time_min: run_time,
        pressure_bar: None,
    };
    let (mut rec, mut sep, mut sep_reason) =
        unscored_recommendation(mode.as_str(), phase, conditions, preds, coelutions);
    if !estimated.is_empty() {
        let (extra, credible) = estimate_pairs(&rec);
        for c in extra {
            if !rec.coelutions.iter().any(|o| o.a == c.a && o.b == c.b) {
                rec.coelutions.push(c);
            }
        }
        (sep, sep_reason) = separation_score_counting(&rec, credible);
    }
    let mut reasons = Vec::new();
    if !names.is_empty() {
        reasons.push(Reason {
        source: "model:ic-ion-table".into(),
        text: format!(
            "elution order and relative retention from the ion table (charge, hydrated size, eluent; values from memory, docs/phases.md); times assume the reference ion at k = {K_REFERENCE} at the table's reference strength, scaled with the strength as log k = const - log C / y"
        ),
        weight: None,
    });
    }
    reasons.extend(pred.notes.iter().map(|n| Reason {
        source: if n.contains("structure estimate") {
            "model:ic-structure-estimate".into()
        } else {
            "model:ic-ion-table".into()
        },
        text: n.clone(),
        weight: None,
    }));
    if !unmatched.is_empty() {
        reasons.push(Reason {
            source: "model:ic-ion-table".into(),
            text: format!("not in the ion table: {}", unmatched.join(", ")),
            weight: None,
        });
    }
    reasons.extend(strength_reason);
    reasons.push(sep_reason);
    let coverage = (names.len() + estimated.len()) as f64 / profiles.len().max(1) as f64;
    rec.reasons = reasons;
    rec.score = (0.6 * sep + 0.4 * coverage).clamp(0.0, 1.0);
    Ok(rec)
}

/// Correlation of two structure estimates' errors (they share one rough model; assumption, no
/// source): the difference of two estimated ions is less uncertain than each alone.
const ESTIMATE_ERROR_CORRELATION: f64 = 0.5;

/// Co-elution risks and the credible critical resolution of neighbouring pairs with at least
/// one ion placed by the structure estimate: the logarithm of their selectivity is uncertain by
/// sd = σ√(2(1 − ρ)) for two estimates (σ alone for an estimate beside a table ion); a pair is at
/// risk with the probability that its true log-selectivity is below the one that gives
/// resolution 1, and only the separation beyond one sd is credited (as for LC).
fn estimate_pairs(rec: &Recommendation) -> (Vec<Coelution>, Option<(f64, String)>) {
    let estimated = |p: &PredictionRow| p.path == "ion-estimate";
    let mut out = Vec::new();
    let mut credible: Option<(f64, String, String)> = None;
    let preds: Vec<&PredictionRow> = rec
        .predictions
        .iter()
        .filter(|p| super::elutes_in_run(rec, p))
        .collect();
    for w in preds.windows(2) {
        let (a, b) = (w[0], w[1]);
        let (ea, eb) = (estimated(a), estimated(b));
        if !(ea || eb) || a.retention_factor <= 0.0 || b.retention_factor <= 0.0 {
            continue;
        }
        let sd = if ea && eb {
            SIGMA_LN_ESTIMATE * (2.0 * (1.0 - ESTIMATE_ERROR_CORRELATION)).sqrt()
        } else {
            SIGMA_LN_ESTIMATE
        };
        let mu = (b.retention_factor / a.retention_factor).ln().abs();
        let rs = resolution(a, b);
        // resolution grows about in proportion to ln(selectivity) for close pairs
        let c = if rs > 0.0 && mu > 0.0 { mu / rs } else { 0.1 };
        let p = (normal_cdf((c - mu) / sd) - normal_cdf((-c - mu) / sd)).clamp(0.0, 1.0);
        if p > 0.2 {
            out.push(coelution(
                a,
                b,
                p,
                Some("ion placed by the rough structure estimate".into()),
            ));
        }
        let rs_credible = if mu > 0.0 {
            rs * ((mu - sd).max(0.0) / mu)
        } else {
            0.0
        };
        if credible.as_ref().is_none_or(|c| rs_credible < c.0) {
            credible = Some((rs_credible, a.analyte.clone(), b.analyte.clone()));
        }
    }
    let credible = credible.map(|(rs, a, b)| {
        (
            rs,
            format!(
                "counted as {rs:.2}: {a} / {b} involve the rough structure estimate of ion retention, and only the separation beyond one standard deviation of their predicted selectivity is credited"
            ),
        )
    });
    (out, credible)
}
