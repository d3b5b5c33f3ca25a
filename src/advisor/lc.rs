//! Reversed-phase and HILIC candidates: pH and buffer choice, gradient from the column
//! geometry, retention predicted by the LC regression model, chemistry rules per phase.

use std::sync::OnceLock;

use super::profile::AnalyteProfile;
use super::{AdviseRequest, Detector, coelution, retention_window_reason, unscored_recommendation};
use crate::model::features::AnalyteFeatures;
use crate::model::regression::{self, Additive, GradientPoint, LcSystem, Mode, Model, Modifier};
use crate::model::theory;
use crate::phase::{Catalogue, PhaseMode, StationaryPhase};
use crate::report::advice::{Conditions, PredictionRow, ProgramStep, Reason, Recommendation};
use crate::structure::ionisable::SiteKind;

pub(super) fn model() -> Result<&'static Model, String> {
    static M: OnceLock<Result<Model, String>> = OnceLock::new();
    M.get_or_init(|| Model::load_builtin().map_err(|e| e.to_string()))
        .as_ref()
        .map_err(Clone::clone)
}

/// Analyte features are the same on every candidate phase: compute them once per structure.
fn features(smiles: &str, inchikey: Option<&str>) -> Result<AnalyteFeatures, String> {
    use std::collections::HashMap;
    use std::sync::Mutex;
    type Cache = Mutex<HashMap<(String, Option<String>), Result<AnalyteFeatures, String>>>;
    static CACHE: OnceLock<Cache> = OnceLock::new();
    let key = (smiles.to_string(), inchikey.map(str::to_string));
    let cache = CACHE.get_or_init(|| Mutex::new(HashMap::new()));
    if let Ok(c) = cache.lock()
        && let Some(hit) = c.get(&key)
    {
        return hit.clone();
    }
    let made = AnalyteFeatures::from_smiles(smiles, inchikey).map_err(|e| e.to_string());
    if let Ok(mut c) = cache.lock() {
        c.insert(key, made.clone());
    }
    made
}

/// pH values tried, with the buffer (catalogue id) that serves each; common practice.
const PH_CHOICES: &[(f64, &str, &str)] = &[
    (2.7, "formic-acid", "0.1 % (v/v) formic acid"),
    (
        3.8,
        "ammonium-formate-acid",
        "10 mM ammonium formate, adjusted to pH 3.8 with formic acid",
    ),
    (
        4.8,
        "ammonium-acetate-acid",
        "10 mM ammonium acetate, adjusted to pH 4.8 with acetic acid",
    ),
    (
        6.8,
        "ammonium-bicarbonate-1",
        "10 mM ammonium bicarbonate, adjusted to pH 6.8 with formic acid",
    ),
    (
        10.0,
        "ammonium-bicarbonate-2",
        "10 mM ammonium bicarbonate, adjusted to pH 10 with ammonia",
    ),
];

/// UV-only alternative at low pH (phosphate is not volatile).
const PHOSPHATE: (f64, &str, &str) = (
    2.5,
    "phosphate-1",
    "20 mM potassium phosphate, adjusted to pH 2.5 with phosphoric acid",
);

fn additive_for(buffer: &str) -> Additive {
    match buffer {
        "formic-acid" => Additive::FormicAcid,
        b if b.starts_with("ammonium-formate") => Additive::AmmoniumFormate,
        b if b.starts_with("ammonium-acetate") => Additive::AmmoniumAcetate,
        b if b.starts_with("ammonium-bicarbonate") => Additive::AmmoniumCarbonate,
        _ => Additive::Other,
    }
}

/// Number of training systems of a chemistry class at which its predicted separation counts
/// half (see `candidate`): with 5 the rare classes of the open data (2–3 systems) count less
/// than half, C18 (over 150) fully. Common practice, no source.
pub const TRAINING_SUPPORT_HALF: f64 = 5.0;

/// The retention model's chemistry class of a catalogue phase.
pub fn model_class(phase: &StationaryPhase) -> regression::ChemClass {
    use crate::phase::ChemClass as P;
    use regression::ChemClass as R;
    match phase.chem_class() {
        Some(P::C18) => R::C18,
        Some(P::C8) => R::C8,
        Some(P::Cyano) => R::Cyano,
        Some(P::Phenyl) => R::Phenyl,
        Some(P::Pentafluorophenyl) => R::Pentafluorophenyl,
        Some(P::PorousGraphiticCarbon) => R::PorousGraphiticCarbon,
        Some(P::BareSilica) => R::BareSilica,
        Some(P::Amide) => R::Amide,
        Some(P::Zwitterionic) => R::Zwitterionic,
        _ => R::Unknown,
    }
}

/// Choose the aqueous pH: inside the phase's range, at least 2 units from the analytes' pKa
/// where possible, keeping analytes retained (RP) — common practice, no source. Returns
/// (pH, buffer id, preparation, reasons).
pub fn choose_ph(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    mode: PhaseMode,
    detector: Detector,
    catalogue: &Catalogue,
) -> (f64, &'static str, &'static str, Vec<Reason>) {
    let lo = phase.ph_min().unwrap_or(2.0);
    let hi = phase.ph_max().unwrap_or(8.0);
    let mut options: Vec<(f64, &str, &str)> = PH_CHOICES.to_vec();
    // Phosphate salts precipitate in the 70-95 % acetonitrile of HILIC eluents (common
    // practice, no source): HILIC gets formic acid and ammonium formate or acetate only.
    if !detector.needs_volatile() && mode != PhaseMode::Hilic {
        options.push(PHOSPHATE);
    }
    let limits = super::ph::ph_limits(profiles, mode);
    // the class rules first; when no buffer meets them inside the phase's range, the
    // pKa-distance costs alone decide (and the reason says so)
    let meets = |ph: f64| limits.allows(ph);
    let any_meets = options
        .iter()
        .any(|&(ph, _, _)| ph >= lo && ph <= hi && meets(ph));
    // when no buffer meets the limits, only the nearest ones are considered
    let least = options
        .iter()
        .filter(|&&(ph, _, _)| ph >= lo && ph <= hi)
        .map(|&(ph, _, _)| limits.violation(ph))
        .fold(f64::INFINITY, f64::min);
    type Choice = (f64, &'static str, &'static str);
    let mut best: Option<(f64, Choice, f64, f64)> = None;
    for &(ph, buf, prep) in &options {
        if ph < lo || ph > hi {
            continue;
        }
        if (any_meets && !meets(ph)) || limits.violation(ph) > least + 1e-9 {
            continue;
        }
        if let Ok(b) = catalogue.buffer(buf) {
            if let Detector::Uv(nm) = detector
                && b.uv_cutoff_nm() > nm - 5.0
            {
                continue;
            }
            if detector.needs_volatile() && !b.volatile() {
                continue;
            }
        }
        let mut near = 0.0;
        let mut retention = 0.0;
        for p in profiles {
            for (pka, _) in p.pkas() {
                let d = (ph - pka).abs();
                if d < 2.0 {
                    near += 2.0 - d;
                }
            }
            // retention lost by ionisation, relative to the best pH in 2-8
            if mode == PhaseMode::Rp
                && let (Some(d), Some(best)) = (p.log_d(ph), p.max_log_d(2.0, 8.0))
            {
                retention += 0.3 * (best - d).max(0.0) + if d < 0.0 { -0.3 * d } else { 0.0 };
            }
        }
        // low pH is the usual first try on silica phases (common practice, no source)
        let pref = if ph > 7.0 {
            0.8
        } else if ph > 3.0 {
            0.2
        } else {
            0.0
        };
        let cost = near + retention + pref + if buf == "phosphate-1" { 0.3 } else { 0.0 };
        if best.is_none_or(|b| cost < b.0) {
            best = Some((cost, (ph, buf, prep), near, retention));
        }
    }
    let Some((_, (ph, buf, prep), near, retention)) = best else {
        return (3.0, "formic-acid", "0.1 % (v/v) formic acid", vec![]);
    };
    let mut reasons = limits.reasons(ph, any_meets, lo, hi);
    if detector.needs_volatile() {
        reasons.push(Reason {
            source: "rule:volatile-buffer-for-ms".into(),
            text: format!(
                "{} needs a volatile mobile phase: only formic acid and ammonium formate, acetate or bicarbonate buffers were considered, no phosphate (common practice, no source)",
                detector.describe()
            ),
            weight: None,
        });
    }
    if mode == PhaseMode::Hilic && !detector.needs_volatile() {
        reasons.push(Reason {
            source: "rule:no-phosphate-in-hilic".into(),
            text: "phosphate buffers precipitate in the high-acetonitrile HILIC eluent: only formic acid and ammonium formate or acetate were considered (common practice, no source)".into(),
            weight: None,
        });
    }
    reasons.push(Reason {
        source: "rule:ph-two-units-from-pka".into(),
        text: format!(
            "pH {ph:.1} inside the phase's range {lo:.0}-{hi:.0}; sum of pKa proximity penalties {near:.1} and retention-loss penalty {retention:.1} is the lowest of the buffers tried (keep pH at least 2 units from analyte pKa where possible; common practice, no source)"
        ),
        weight: None,
    });
    (ph, buf, prep, reasons)
}

/// The natural pH of 0.1 % (v/v) formic acid in water, about 2.7 (common practice, from
/// memory): within this distance of it the additive itself is used, without a buffer pair.
const FORMIC_ACID_PH: (f64, f64) = (2.7, 0.15);

/// Choose the buffer for a pH the user fixed (`predict --ph`): 0.1 % formic acid at its own
/// pH (about 2.7), otherwise a buffer pair whose pKa lies within 1 unit of the pH (useful
/// buffering range pKa ± 1; common practice, no source), volatile ones first and only volatile
/// ones for MS or evaporative detectors, transparent at a UV wavelength, closest pKa first.
/// Returns (buffer id, preparation text).
///
/// # Errors
/// A message naming the pH when no buffer in the catalogue serves it.
pub fn buffer_for_ph(
    ph: f64,
    detector: Detector,
    catalogue: &Catalogue,
) -> Result<(String, String), String> {
    if (ph - FORMIC_ACID_PH.0).abs() <= FORMIC_ACID_PH.1 {
        return Ok(("formic-acid".into(), "0.1 % (v/v) formic acid".into()));
    }
    let usable = |b: &&crate::phase::Buffer| {
        let uv_ok = match detector {
            Detector::Uv(nm) => b.uv_cutoff_nm() <= nm - 5.0,
            _ => true,
        };
        uv_ok && (b.volatile() || !detector.needs_volatile())
    };
    let found: Vec<&crate::phase::Buffer> = catalogue
        .buffers_for_ph(ph)
        .into_iter()
        .filter(usable)
        .collect();
    // volatile first (they also suit a later move to MS), then closest pKa (already sorted)
    let Some(b) = found
        .iter()
        .find(|b| b.volatile())
        .or_else(|| found.first())
    else {
        return Err(format!(
            "no {}buffer in the catalogue has a pKa within 1 unit of pH {ph} (data/buffers.tsv); choose another pH",
            if detector.needs_volatile() {
                "volatile "
            } else {
                ""
            }
        ));
    };
    let salt = b.name().split(" (").next().unwrap_or(b.name());
    let conc = b
        .typical_conc_mm()
        .map_or_else(String::new, |c| format!("{c:.0} mM "));
    Ok((
        b.id().to_string(),
        format!(
            "{conc}{salt}, adjusted to pH {ph} (buffer pair {}, pKa {:.2})",
            b.species(),
            b.pka_25c()
        ),
    ))
}

/// Default LC geometry (common analytical choice): 150 × 4.6 mm, 3.5 µm, 1.0 mL/min. For
/// another inner diameter the default flow keeps the linear velocity of 1.0 mL/min on 4.6 mm
/// (flow ∝ id², the usual geometric scaling; common practice, no source): about 0.21 mL/min for
/// a 2.1 mm column and 0.43 mL/min for 3.0 mm, unless a flow is given.
fn geometry(req: &AdviseRequest) -> (f64, f64, f64, f64) {
    let (l, id) = req.column_mm.unwrap_or((150.0, 4.6));
    let dp = req.particle_um.unwrap_or(3.5);
    let flow = req
        .flow_ml_min
        .unwrap_or(1.0 * (id / 4.6).powi(2))
        .max(0.01);
    (l, id, dp, flow)
}

/// Predict one analyte on the target system. The user's stored scouting fits come first: a
/// fit measured on this system (same phase, modifier, pH within 0.2, temperature within 5 °C
/// when both are known) predicts directly (path `scouting fit`, the most recent such fit);
/// otherwise the analyte's fits on other systems of the same mode join the shipped retention
/// memory as further sources (path `memory`). Without stored fits this is `Model::predict`.
/// Returns the prediction and, for the user's fits, the source text or ids they came from.
/// Path note of a prediction made with `--no-memory`.
pub const STRUCTURE_ONLY: &str = "structure only: measured retention not used";

fn predict_one(
    model: &Model,
    feats: &AnalyteFeatures,
    sys: &LcSystem,
    phase_id: &str,
    req: &AdviseRequest,
    p: &AnalyteProfile,
) -> Result<(regression::Prediction, Option<String>), regression::ModelError> {
    if req.no_memory {
        return Ok((
            model.predict_structure_only(feats, sys)?,
            Some(STRUCTURE_ONLY.to_owned()),
        ));
    }
    let fits: Vec<&crate::model::memory::StoredFit> = match p.analyte.inchikey.as_deref() {
        Some(key) => req
            .stored_fits
            .iter()
            .filter(|f| f.inchikey == key && f.system.mode == sys.mode)
            .collect(),
        None => Vec::new(),
    };
    if fits.is_empty() {
        return Ok((model.predict(feats, sys)?, None));
    }
    let target_temperature = req.fixed.as_ref().and_then(|f| f.temperature_c);
    if let Some(fit) = fits
        .iter()
        .rev()
        .find(|f| f.matches(phase_id, sys, target_temperature))
    {
        let map = |path: &str| {
            model
                .calibration
                .get(&format!("{}/{path}", sys.mode.label()))
                .map(|c| c.coelution_map.clone())
                .unwrap_or_default()
        };
        let pr = fit.predict(sys, map("memory"), map("descriptor"))?;
        return Ok((pr, Some(fit.source.clone())));
    }
    let extra: Vec<(String, LcSystem, f64)> = fits
        .iter()
        .map(|f| (f.system_id(), f.system.clone(), f.psi_k1()))
        .collect();
    let pr = model.predict_with_memory(feats, sys, None, &extra)?;
    let user_sources = match &pr.path {
        regression::PredictionPath::Memory { source_systems } => {
            let used: Vec<&str> = source_systems
                .iter()
                .filter(|id| id.starts_with("user: "))
                .map(String::as_str)
                .collect();
            (!used.is_empty()).then(|| used.join("; "))
        }
        _ => None,
    };
    Ok((pr, user_sources))
}

/// Build the candidate for one LC phase.
///
/// # Errors
/// A reason when the phase cannot be evaluated (no analyte could be predicted).
pub fn candidate(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    mode: PhaseMode,
    req: &AdviseRequest,
    catalogue: &Catalogue,
) -> Result<Recommendation, String> {
    let model = model()?;
    let (l, id, dp, mut flow) = geometry(req);
    let vm = theory::column_dead_volume_ml(l, id).map_err(|e| e.to_string())?;
    let fixed = req.fixed.as_ref();
    let t0 = fixed.and_then(|f| f.t0_min).unwrap_or(vm / flow);
    // a dead time given without a flow: the flow that gives it on this column is F = Vm / t0
    // (SKD 2010 ch. 2, definition of t0), so the reported flow and the dwell time agree with t0
    let flow_from_t0 = req.flow_ml_min.is_none() && fixed.and_then(|f| f.t0_min).is_some();
    if flow_from_t0 {
        flow = vm / t0;
    }
    let temperature_c = fixed.and_then(|f| f.temperature_c).unwrap_or(35.0);
    let n_plates = theory::estimated_plate_number(l, dp).map_err(|e| e.to_string())?;
    // the detector first: the buffer depends on it (volatile for MS and aerosol detectors,
    // transparent at the UV wavelength)
    let (detector, detector_reason) = super::detection::for_lc(profiles, req.detector);
    let (mut ph, buffer, prep, mut reasons) = choose_ph(profiles, phase, mode, detector, catalogue);
    let (mut buffer, mut prep) = (buffer.to_string(), prep.to_string());
    if let Some(user_ph) = fixed.and_then(|f| f.ph) {
        let (lo, hi) = (
            phase.ph_min().unwrap_or(0.0),
            phase.ph_max().unwrap_or(14.0),
        );
        if !(lo..=hi).contains(&user_ph) {
            return Err(format!(
                "pH {user_ph} is outside the range {lo}-{hi} of phase {}",
                phase.id()
            ));
        }
        ph = user_ph;
        // the buffer must serve the user's pH, not the one the advisor would have chosen
        (buffer, prep) = buffer_for_ph(ph, detector, catalogue)?;
        reasons = vec![Reason {
            source: "user".into(),
            text: if buffer == "formic-acid" {
                format!(
                    "pH {ph} given by the user; 0.1 % formic acid chosen for it (it gives about pH 2.7 by itself; common practice, from memory)"
                )
            } else {
                format!(
                    "pH {ph} given by the user; buffer chosen for it: {prep} [{buffer}], pKa within 1 unit of the pH (common practice, no source)"
                )
            },
            weight: None,
        }];
    }
    // methanol strengthens pi-pi selectivity on phenyl-type phases (common practice, no source)
    let pi_phase = phase.id().contains("phenyl") || phase.id().contains("pfp");
    let (modifier, modifier_id) = match fixed.and_then(|f| f.modifier.as_deref()) {
        Some("methanol") => (Modifier::Methanol, "methanol"),
        Some(_) => (Modifier::Acetonitrile, "acetonitrile"),
        None if pi_phase && mode == PhaseMode::Rp => (Modifier::Methanol, "methanol"),
        None => (Modifier::Acetonitrile, "acetonitrile"),
    };
    // gradient time for a gradient retention factor k* ≈ 5 (Snyder & Dolan 2007: k* = tG F /
    // (1.15 Vm Δφ S)), with S from the median molar mass (S ≈ 0.25 M^0.5, rule of thumb)
    let mut masses: Vec<f64> = profiles.iter().filter_map(|p| p.molar_mass_g_mol).collect();
    masses.sort_by(f64::total_cmp);
    let m_med = masses.get(masses.len() / 2).copied().unwrap_or(250.0);
    let s = theory::estimated_s_from_molar_mass(m_med).unwrap_or(4.0);
    let (start, end) = if mode == PhaseMode::Rp {
        (5.0, 95.0)
    } else {
        (95.0, 50.0)
    };
    let dphi = f64::abs(end - start) / 100.0;
    let k_star = 5.0;
    let tg = (k_star * 1.15 * vm * dphi * s / flow)
        .clamp(5.0, 60.0)
        .round();
    let program: Vec<GradientPoint> = match fixed {
        Some(f) => f
            .gradient
            .iter()
            .map(|&(t, pct)| GradientPoint {
                time_min: t,
                organic_pct: pct,
            })
            .collect(),
        None => vec![
            GradientPoint {
                time_min: 0.0,
                organic_pct: start,
            },
            GradientPoint {
                time_min: tg,
                organic_pct: end,
            },
            GradientPoint {
                time_min: tg + 3.0,
                organic_pct: end,
            },
        ],
    };
    let dwell_min = req.dwell_ml / flow;
    let sys = LcSystem {
        mode: if mode == PhaseMode::Rp {
            Mode::ReversedPhase
        } else {
            Mode::Hilic
        },
        chem_class: model_class(phase),
        modifier,
        ph: Some(ph),
        additive: additive_for(&buffer),
        gradient: program.clone(),
        t0_min: t0,
        dwell_min,
        flow_ml_min: flow,
        temperature_c: Some(temperature_c),
    };
    // band width in gradient elution: 4σ = 4 t0 (1 + k*) / √N (Snyder & Dolan 2007, k* = gradient
    // retention factor), so w½ = 2.355 σ
    let w_half = 2.355 * t0 * (1.0 + k_star) / n_plates.sqrt();
    let mut preds = Vec::new();
    let mut raw = Vec::new();
    // molecular formula of each predicted analyte (for the isomer note), in `preds` order
    let mut formulas: Vec<Option<&str>> = Vec::new();
    let mut not_predicted = Vec::new();
    for p in profiles {
        let Some(smiles) = p.analyte.smiles.as_deref() else {
            not_predicted.push(format!("{}: no structure", p.name()));
            continue;
        };
        let feats = match features(smiles, p.analyte.inchikey.as_deref()) {
            Ok(f) => f,
            Err(e) => {
                not_predicted.push(format!("{}: {e}", p.name()));
                continue;
            }
        };
        match predict_one(model, &feats, &sys, phase.id(), req, p) {
            Ok((pr, path_source)) => {
                let k = ((pr.rt_min - t0 - dwell_min) / t0).max(0.0);
                preds.push(PredictionRow {
                    analyte: p.name().to_string(),
                    retention_time_min: pr.rt_min,
                    interval_low_min: pr.interval_min.0,
                    interval_high_min: pr.interval_min.1,
                    interval_coverage: 0.9,
                    retention_factor: k,
                    peak_width_half_min: w_half,
                    path: pr.path.label().to_string(),
                    path_source,
                    retention_index: None,
                    source_systems: match &pr.path {
                        regression::PredictionPath::Memory { source_systems } => {
                            source_systems.clone()
                        }
                        regression::PredictionPath::Descriptor
                        | regression::PredictionPath::ScoutingFit { .. } => Vec::new(),
                    },
                });
                raw.push(pr);
                formulas.push(p.analyte.formula.as_deref());
            }
            Err(e) => not_predicted.push(format!("{}: {e}", p.name())),
        }
    }
    if preds.is_empty() {
        return Err(format!(
            "no analyte could be predicted ({})",
            not_predicted.join("; ")
        ));
    }
    // co-elution probabilities of every pair (close pairs matter). Only pairs that something
    // downstream reads are kept: the report lists those at or above the risk threshold, the
    // separation score counts those above 0.2 (``). With hundreds of analytes
    // the others would be most of the work and none of the result.
    let floor = req.risk_threshold.clamp(0.0, 0.2);
    let mut coelutions = Vec::new();
    let wb = w_half * 4.0 / 2.355;
    for i in 0..preds.len() {
        for j in i + 1..preds.len() {
            let (a, b) = if preds[i].retention_time_min <= preds[j].retention_time_min {
                (i, j)
            } else {
                (j, i)
            };
            if (preds[b].retention_time_min - preds[a].retention_time_min)
                > 3.0 * (preds[a].interval_high_min - preds[a].interval_low_min).max(wb)
            {
                continue;
            }
            if let Ok(prob) = regression::coelution_probability(&raw[a], &raw[b], wb)
                && prob >= floor
            {
                coelutions.push(coelution(
                    &preds[a],
                    &preds[b],
                    prob,
                    isomer_note(formulas[a], formulas[b]),
                ));
            }
        }
    }
    let run_time = program.last().map_or(tg + 3.0, |p| p.time_min);
    let pressure = theory::pressure_estimate(&theory::PressureInput {
        flow_ml_min: flow,
        column_length_mm: l,
        inner_diameter_mm: id,
        particle_size_um: dp,
        viscosity_mpa_s: if modifier_id == "methanol" { 1.6 } else { 1.0 },
    })
    .ok()
    .map(|p| p.pressure_bar);
    let solvent_b = catalogue
        .solvent(modifier_id)
        .map(|s| s.name().to_string())
        .unwrap_or_else(|_| modifier_id.to_string());
    // HILIC eluent B carries 5 % of the aqueous buffer (constant ionic strength through the
    // gradient; common practice, no source), so the advisor's program, computed in % organic
    // for the model, is reported in % B: % B = % organic / 0.95. A program the user gave
    // (`predict --gradient`) is in % organic and is reported as given.
    const HILIC_B_ORGANIC: f64 = 0.95;
    let hilic_b = mode == PhaseMode::Hilic && fixed.is_none();
    let (mp_a, mp_b) = if mode == PhaseMode::Rp {
        (
            format!("water with {prep}"),
            format!("{solvent_b} (optionally with the same additive)"),
        )
    } else if hilic_b {
        (
            format!("water with {prep} (in HILIC water is the strong solvent)"),
            format!("{solvent_b} / aqueous buffer A 95:5 (v/v)"),
        )
    } else {
        (
            format!("water with {prep} (in HILIC water is the strong solvent)"),
            solvent_b.clone(),
        )
    };
    let (program_unit, b_per_organic) = if hilic_b {
        (
            format!("% B ({solvent_b} / buffer 95:5)"),
            1.0 / HILIC_B_ORGANIC,
        )
    } else {
        ("% organic".to_string(), 1.0)
    };
    let conditions = Conditions {
        column_length_mm: l,
        column_id_mm: id,
        particle_um: Some(dp),
        film_um: None,
        mobile_phase_a: Some(mp_a),
        mobile_phase_b: Some(mp_b),
        modifier: Some(modifier_id.to_string()),
        ph: Some(ph),
        buffer: Some(buffer.clone()),
        buffer_preparation: Some(format!(
            "{prep}; measure the pH of the aqueous part before adding organic solvent"
        )),
        program: program
            .iter()
            .map(|g| ProgramStep {
                time_min: g.time_min,
                value: g.organic_pct * b_per_organic,
            })
            .collect(),
        program_unit,
        flow_ml_min: Some(flow),
        temperature_c: Some(temperature_c),
        carrier_gas: None,
        linear_velocity_cm_s: None,
        inlet: None,
        derivatisation: None,
        suppression: None,
        injection: format!(
            "about {:.0} µL (≤ 1 % of the column volume {:.2} mL) in a solvent no stronger than the starting mobile phase",
            (vm * 10.0).clamp(1.0, 20.0),
            vm
        ),
        detection: detector.describe(),
        dead_time_min: t0,
        plate_number: n_plates,
        run_time_min: run_time,
        pressure_bar: pressure,
    };
    let all_measured_here = raw
        .iter()
        .all(|pr| matches!(pr.path, regression::PredictionPath::ScoutingFit { .. }));
    let raw_of: std::collections::HashMap<String, &regression::Prediction> = preds
        .iter()
        .map(|p| p.analyte.clone())
        .zip(raw.iter())
        .collect();
    let (mut rec, sep, sep_reason) =
        unscored_recommendation(mode.as_str(), phase, conditions, preds, coelutions);
    let (sep, sep_reason) = match super::evidence::credible_critical_resolution(&rec, &raw_of) {
        Some(c) if rec.critical_resolution.is_some_and(|r| c.0 < r - 0.005) => {
            super::separation_score_counting(&rec, Some(c))
        }
        _ => (sep, sep_reason),
    };
    // How far the predicted separation can be trusted for this chemistry: a class the model has
    // seen on few training systems is predicted close to the C18/mode reference (ridge
    // shrinkage), so its separation score is pulled towards neutral by n/(n + n_half).
    // Predictions from the lab's own scouting fits on this system need no such discount.
    let support = model.training_systems(sys.mode, sys.chem_class);
    let (sep, support_reason) = match support {
        Some(n) if !all_measured_here => {
            let trust = n as f64 / (n as f64 + TRAINING_SUPPORT_HALF);
            // an uncertain prediction never scores better than it predicts: it is pulled
            // towards the lower of itself and neutral 0.5, less 0.1 for the uncertainty
            let anchor = sep.min(0.5) - 0.1;
            let used = anchor + trust * (sep - anchor);
            let reason = (trust < 0.9).then(|| Reason {
                source: "model:training-support".into(),
                text: format!(
                    "the model was trained on {n} {} system(s) of this chemistry ({}): predicted separation {sep:.2} counted as {used:.2} (weight n/(n + {TRAINING_SUPPORT_HALF:.0}) = {trust:.2}, the rest towards the lower of the prediction and neutral 0.5, less 0.1; an uncertain prediction never scores better than it predicts; common practice, no source)",
                    sys.mode.label(),
                    sys.chem_class.name().replace('_', " ")
                ),
                weight: Some(used - sep),
            });
            (used, reason)
        }
        _ => (sep, None),
    };
    let window = retention_window_reason(&rec);
    let rules = rules(profiles, phase, mode, ph);
    let rule_sum: f64 = rules.iter().filter_map(|r| r.weight).sum();
    let score =
        (0.5 * sep + 0.2 * window.weight.unwrap_or(0.0) + 0.3 * (0.5 + rule_sum)).clamp(0.0, 1.0);
    reasons.push(Reason {
        source: "model:lc-regression".into(),
        text: format!(
            "retention predicted by the LC regression model (ridge on structure descriptors and system features, trained on RepoRT; docs/model.md) for {} of {} analytes",
            rec.predictions.len(),
            profiles.len()
        ),
        weight: None,
    });
    if flow_from_t0 {
        reasons.push(Reason {
            source: "user".into(),
            text: format!(
                "dead time {t0} min given without a flow: flow {flow:.3} mL/min = Vm / t0 on the {l:.0} x {id} mm column (Vm {vm:.2} mL); the dwell volume is converted with it{}",
                if req.column_mm.is_none() {
                    "; no column given, so the default 150 x 4.6 mm, 3.5 µm was assumed for the plate number"
                } else {
                    ""
                }
            ),
            weight: None,
        });
    }
    if !not_predicted.is_empty() {
        reasons.push(Reason {
            source: "model:lc-regression".into(),
            text: format!("not predicted: {}", not_predicted.join("; ")),
            weight: None,
        });
    }
    reasons.push(detector_reason);
    reasons.push(sep_reason);
    reasons.extend(support_reason);
    reasons.push(window);
    reasons.extend(rules);
    rec.reasons = reasons;
    rec.score = score;
    Ok(rec)
}

/// A note for pairs that are isomers (same formula): positional isomers are the classic
/// difficult pairs.
fn isomer_note(a: Option<&str>, b: Option<&str>) -> Option<String> {
    match (a, b) {
        (Some(x), Some(y)) if x == y => Some(format!(
            "isomers ({x}): selectivity comes from shape and polarity, not size"
        )),
        _ => None,
    }
}

/// Chemistry rules for one phase (common practice, no source unless stated). Weights are
/// added to a neutral 0.5.
pub fn rules(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    mode: PhaseMode,
    ph: f64,
) -> Vec<Reason> {
    let id = phase.id();
    let n = profiles.len().max(1) as f64;
    let mut out = Vec::new();
    // every rule evaluated is listed with its weight; a weight of 0 is shown as "noted, not
    // scored" so that it does not read as a supporting reason
    let mut rule = |source: &str, text: String, w: f64| {
        out.push(Reason {
            source: source.into(),
            text,
            weight: Some(w),
        });
    };
    if mode == PhaseMode::Rp {
        let pi_rich = profiles.iter().filter(|p| p.aromatic_rings() >= 2).count() as f64 / n;
        let halo = profiles
            .iter()
            .filter(|p| p.halogens() > 0 && p.aromatic_rings() > 0)
            .count() as f64
            / n;
        let formulas: Vec<Option<String>> =
            profiles.iter().map(|p| p.analyte.formula.clone()).collect();
        let isomer_share = formulas
            .iter()
            .filter(|f| f.is_some() && formulas.iter().filter(|g| g == f).count() > 1)
            .count() as f64
            / n;
        let isomers = isomer_share > 0.0;
        let bases = profiles
            .iter()
            .filter(|p| {
                p.sites.iter().any(|s| {
                    s.kind == SiteKind::Base && s.pka.is_some_and(|k| k > ph + 1.0 && k > 7.0)
                })
            })
            .count();
        // very polar neutrals only: an analyte charged at the chosen pH (fluoroquinolone and
        // tetracycline cations at low pH) is retained by ion pairing with the acid modifier,
        // not by an aqueous-compatible phase
        let polar = profiles
            .iter()
            .filter(|p| {
                p.max_log_d(2.0, 8.0).is_some_and(|d| d < 0.0)
                    && crate::property::ionisation::fraction_neutral(&p.sites, ph)
                        .is_ok_and(|f| f >= 0.5)
            })
            .count() as f64
            / n;
        match id {
            "rp-c18" => rule("rule:general-purpose-first-choice", "C18 is the usual first column for a new reversed-phase method".into(), 0.12),
            "rp-c8" => rule("rule:less-hydrophobic-than-c18", "C8 shortens retention of very hydrophobic analytes".into(), if profiles.iter().any(|p| p.log_p.is_some_and(|l| l.0 > 5.0)) { 0.08 } else { 0.0 }),
            "rp-c4" => rule("rule:wide-pore-for-large-molecules", "C4 suits proteins and very hydrophobic large molecules".into(), -0.1),
            "rp-cyano" => rule("rule:cyano-weak-retention", "cyano phases retain weakly in reversed phase; chosen mainly for selectivity changes".into(), -0.05),
            "rp-mixed-mode-c18-scx" => rule("rule:mixed-mode-for-bases", "mixed-mode C18/cation exchange retains protonated bases".into(), if bases > 0 { 0.05 } else { -0.1 }),
            _ => {}
        }
        // a selectivity rule weighs in proportion to the share of analytes it concerns, and
        // the selectivity rules of one phenyl-type phase together never outweigh C18's
        // general-purpose rule (0.12): C18 is where a new method starts, and a phenyl-type or
        // PFP phase is chosen first only when it is predicted to separate better
        // (rule:selectivity-by-share; common practice, no source)
        let mut phenyl_bonus = 0.0;
        if id.contains("phenyl") || id.contains("pfp") {
            let w = if pi_rich >= 0.3 {
                0.12 * (pi_rich / 0.6).min(1.0)
            } else {
                0.0
            };
            phenyl_bonus += w;
            rule(
                "rule:pi-rich-analytes",
                format!(
                    "{:.0} % of analytes have two or more aromatic rings: phenyl-type phases add pi-pi selectivity (full weight from 60 %)",
                    pi_rich * 100.0
                ),
                w,
            );
        }
        if id == "rp-pfp" && (halo > 0.0 || isomers) {
            let share = halo.max(isomer_share);
            let w = (0.12 * share).min((0.12 - phenyl_bonus).max(0.0));
            rule(
                "rule:halogenated-or-positional-isomers",
                format!(
                    "{:.0} % of analytes are halogenated aromatics or positional isomers: pentafluorophenyl adds dipole and shape selectivity (weight by share; with the pi-pi rule at most that of C18's general-purpose rule)",
                    share * 100.0
                ),
                w,
            );
        }
        if id == "rp-biphenyl" && isomers {
            rule(
                "rule:shape-selectivity",
                "isomers present: biphenyl adds shape selectivity".into(),
                0.05,
            );
        }
        if bases > 0 {
            let w = match id {
                "rp-polar-embedded" | "rp-c18-hybrid" => 0.1,
                "rp-c18" | "rp-c8" => -0.03,
                _ => 0.0,
            };
            rule(
                "rule:bases-on-silanols",
                format!(
                    "{bases} protonated base(s) at pH {ph:.1} can tail on residual silanols; polar-embedded and hybrid phases reduce tailing"
                ),
                w,
            );
        }
        // porous graphitic carbon is a specialist phase (very strong retention, strong
        // eluents, slow equilibration, a redox-active surface): chosen first for very polar
        // lists or positional isomers, not as a general start (common practice, no source)
        if id == "rp-pgc" && polar < 0.3 && !isomers {
            rule(
                "rule:pgc-specialist",
                "porous graphitic carbon is a specialist phase for very polar analytes and positional isomers; neither dominates this list".into(),
                -0.08,
            );
        }
        if polar > 0.0 {
            let w = match id {
                "rp-c18-aq" => 0.12 * polar / 0.3_f64.max(polar),
                // porous graphitic carbon is a specialist phase (strong, sometimes
                // irreversible retention, slow equilibration): half the weight
                "rp-pgc" => 0.06 * polar / 0.3_f64.max(polar),
                "rp-c18" | "rp-c8" => -0.05,
                _ => 0.0,
            };
            rule(
                "rule:very-polar-neutrals",
                format!(
                    "{:.0} % of analytes have logD below 0: aqueous-compatible C18 (near 100 % water) or porous graphitic carbon retain them better",
                    polar * 100.0
                ),
                w,
            );
        }
    } else {
        let sugars = profiles
            .iter()
            .filter(|p| {
                p.estimate
                    .as_ref()
                    .is_some_and(|e| e.descriptors.hbond_donors >= 4)
            })
            .count();
        let charged = profiles
            .iter()
            .filter(|p| p.sites.iter().any(|s| s.pka.is_some()))
            .count();
        match id {
            "hilic-amide" => rule("rule:hilic-amide-general", "amide HILIC phases are robust general choices, good for sugars and neutral polar analytes".into(), if sugars > 0 { 0.15 } else { 0.08 }),
            "hilic-zwitterionic" => rule("rule:hilic-zwitterionic-for-ions", "zwitterionic phases retain charged polar analytes with weak electrostatic effects".into(), if charged > 0 { 0.12 } else { 0.05 }),
            "hilic-silica" => rule("rule:hilic-silica-bases", "bare silica retains bases strongly by cation exchange with silanols".into(), 0.0),
            "hilic-diol" => rule("rule:hilic-diol-neutral", "diol phases are mild, neutral HILIC phases".into(), 0.02),
            _ => {}
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_default_flow_keeps_the_linear_velocity_of_1_ml_min_on_4_6_mm() {
        // F2 = F1 (d2 / d1)² (geometric scaling at constant linear velocity; common practice)
        let flow = |id: f64| {
            geometry(&AdviseRequest {
                column_mm: Some((100.0, id)),
                ..AdviseRequest::default()
            })
            .3
        };
        assert!((flow(4.6) - 1.0).abs() < 1e-12);
        assert!((flow(2.1) - 0.2084).abs() < 1e-3, "{}", flow(2.1));
        assert!((flow(3.0) - 0.4253).abs() < 1e-3, "{}", flow(3.0));
    }

    #[test]
    fn a_fixed_ph_gets_a_buffer_with_a_pka_within_one_unit() {
        let c = Catalogue::builtin().unwrap();
        for ph in [2.7, 3.0, 3.8, 4.5, 5.5, 6.8, 7.5, 9.0, 10.0] {
            for det in [Detector::Uv(220.0), Detector::Ms] {
                let Ok((id, prep)) = buffer_for_ph(ph, det, c) else {
                    continue;
                };
                if id == "formic-acid" {
                    assert!(
                        (ph - 2.7).abs() <= 0.15,
                        "pH {ph}: formic acid only near 2.7"
                    );
                    continue;
                }
                let b = c.buffer(&id).unwrap();
                assert!((b.pka_25c() - ph).abs() <= 1.0, "pH {ph}: {id}");
                assert!(prep.contains(&format!("pH {ph}")), "{prep}");
                if det.needs_volatile() {
                    assert!(b.volatile(), "pH {ph}: {id} is not volatile");
                }
            }
        }
        // the buffers the advisor itself uses at its pH steps are found again
        assert_eq!(
            buffer_for_ph(6.8, Detector::Ms, c).unwrap().0,
            "ammonium-bicarbonate-1"
        );
        assert_eq!(
            buffer_for_ph(3.8, Detector::Ms, c).unwrap().0,
            "ammonium-formate-acid"
        );
        // no volatile buffer has a pKa within 1 unit of pH 1.6: an error naming the pH
        let e = buffer_for_ph(1.6, Detector::Ms, c).unwrap_err();
        assert!(e.contains("1.6"), "{e}");
    }
}
