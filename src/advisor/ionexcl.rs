//! Ion-exclusion candidates for small organic acids: a sulfonated resin in the hydrogen form
//! with a dilute strong-acid eluent. Ionised acids are repelled from the resin's pores (Donnan
//! exclusion) and elute near the exclusion volume; the neutral form enters the pores and is
//! further held by hydrophobic adsorption on the resin, so retention grows with the fraction
//! neutral at the eluent pH (higher pKa) and with logP (longer chain).
//!
//! Retention model (approximate, from memory of typical elution on 300 x 7.8 mm resin columns
//! with 5 mM sulfuric acid at 0.6 mL/min; not a calibration against measurements):
//! t = t_excl + Δt · f_neutral(pH 2.1) · 10^(0.25 · (logP + 0.17)), with t_excl = 7.0 min
//! (4.2 mL) and Δt = 9.0 min (5.4 mL); acetic acid (logP -0.17, fully neutral) then elutes at
//! about 16 min, each CH2 adds about a quarter of a log unit of adsorption. The model's 1σ
//! error is taken as a factor of 1.3 on the adjusted time (assumption).

use super::modes::small_organic_acid;
use super::profile::AnalyteProfile;
use super::{Detector, coelution, unscored_recommendation};
use crate::phase::StationaryPhase;
use crate::report::advice::{Conditions, PredictionRow, ProgramStep, Reason, Recommendation};
use crate::structure::chromophore::ChromophoreClass;

/// Eluent pH of 5 mM sulfuric acid, about 2.1 (from memory).
pub const ELUENT_PH: f64 = 2.1;
/// Elution time of a fully excluded (ionised) species, min.
pub const T_EXCLUSION_MIN: f64 = 7.0;
/// Time span from exclusion to full permeation of a neutral acid with acetic acid's logP, min.
pub const T_PERMEATION_SPAN_MIN: f64 = 9.0;
/// Plate number assumed for a resin column (typical 4000-6000; assumption).
const PLATES: f64 = 5000.0;
/// 1σ of ln(adjusted time) (assumption, see the module docs).
const SIGMA_LN: f64 = 0.26;

/// Predicted retention time of one acid, min, or `None` without logP.
pub fn retention_time_min(p: &AnalyteProfile) -> Option<f64> {
    let (log_p, _) = p.log_p?;
    let neutral = crate::property::ionisation::profile(&p.sites, ELUENT_PH)
        .map(|x| x.fraction_neutral)
        .unwrap_or(1.0);
    Some(T_EXCLUSION_MIN + T_PERMEATION_SPAN_MIN * neutral * 10f64.powf(0.25 * (log_p + 0.17)))
}

/// Standard normal CDF, logistic approximation Φ(x) ≈ 1 / (1 + exp(-1.702 x)) (error below
/// 0.01; Bowling et al. 2009, from memory): ample for a co-elution probability.
fn phi(x: f64) -> f64 {
    1.0 / (1.0 + (-1.702 * x).exp())
}

/// The detector for an ion-exclusion run: the user's when it works with the mode, else UV at
/// 210 nm for carboxylic acids (their carboxyl absorbs there; the sulfuric-acid eluent is
/// transparent), else refractive index (isocratic run). Common practice, no source.
fn detection(profiles: &[AnalyteProfile], detector: Detector) -> (String, Reason) {
    let text = match detector {
        Detector::Conductivity => "suppressed conductivity (ion-exclusion suppressor)".to_string(),
        Detector::RefractiveIndex => "refractive index (isocratic run)".to_string(),
        Detector::Uv(nm) => format!("UV absorbance at {nm:.0} nm"),
        _ => {
            // carboxylic acids absorb at 210 nm; a structure not read is not taken as blind
            if profiles
                .iter()
                .all(|p| p.chromophore != Some(ChromophoreClass::None))
            {
                "UV absorbance at 210 nm (carboxyl group)".to_string()
            } else {
                "refractive index (isocratic run)".to_string()
            }
        }
    };
    let reason = Reason {
        source: "rule:detector-from-structure".into(),
        text: format!(
            "detection: {text}; carboxylic acids absorb at 200-210 nm, where the dilute sulfuric-acid eluent is transparent; refractive index or suppressed conductivity see acids without a chromophore (common practice, no source)"
        ),
        weight: None,
    };
    (text, reason)
}

/// Build the ion-exclusion candidate.
///
/// # Errors
/// A reason when no analyte is a small organic acid with a known logP.
pub fn candidate(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    detector: Detector,
) -> Result<Recommendation, String> {
    let mut preds = Vec::new();
    let mut adjusted = Vec::new();
    let mut not_predicted = Vec::new();
    for p in profiles {
        if !small_organic_acid(p) {
            not_predicted.push(format!("{}: not a small organic acid", p.name()));
            continue;
        }
        let Some(t) = retention_time_min(p) else {
            not_predicted.push(format!("{}: no logP", p.name()));
            continue;
        };
        let adj = t - T_EXCLUSION_MIN;
        let f = (1.96 * SIGMA_LN).exp();
        preds.push(PredictionRow {
            analyte: p.name().to_string(),
            retention_time_min: t,
            interval_low_min: T_EXCLUSION_MIN + adj / f,
            interval_high_min: T_EXCLUSION_MIN + adj * f,
            interval_coverage: 0.95,
            retention_factor: (t - T_EXCLUSION_MIN) / T_EXCLUSION_MIN,
            peak_width_half_min: 2.355 * t / PLATES.sqrt(),
            path: "ion-exclusion".into(),
            retention_index: None,
            source_systems: Vec::new(),
            path_source: None,
        });
        adjusted.push(adj);
    }
    if preds.is_empty() {
        return Err(format!(
            "no analyte could be predicted ({})",
            not_predicted.join("; ")
        ));
    }
    let mut coelutions = Vec::new();
    for i in 0..preds.len() {
        for j in i + 1..preds.len() {
            let (a, b) = if preds[i].retention_time_min <= preds[j].retention_time_min {
                (i, j)
            } else {
                (j, i)
            };
            // resolved (Rs >= 1) when the times differ by more than the summed half widths / 1.18
            let need = (preds[a].peak_width_half_min + preds[b].peak_width_half_min) / 1.18;
            let d = preds[b].retention_time_min - preds[a].retention_time_min;
            // errors of similar acids are partly shared (correlation 0.5, assumption)
            let (s1, s2) = (SIGMA_LN * adjusted[a], SIGMA_LN * adjusted[b]);
            let sd = (s1 * s1 + s2 * s2 - s1 * s2).max(1e-6).sqrt();
            let prob = (phi((need - d) / sd) - phi((-need - d) / sd)).clamp(0.0, 1.0);
            if prob > 0.01 {
                coelutions.push(coelution(&preds[a], &preds[b], prob, None));
            }
        }
    }
    let run_time = preds
        .iter()
        .map(|p| p.interval_high_min)
        .fold(20.0, f64::max)
        .ceil()
        + 2.0;
    let (detection, detector_reason) = detection(profiles, detector);
    let conditions = Conditions {
        column_length_mm: 300.0,
        column_id_mm: 7.8,
        particle_um: Some(9.0),
        film_um: None,
        mobile_phase_a: Some(format!(
            "5 mM sulfuric acid in water (about pH {ELUENT_PH}), isocratic"
        )),
        mobile_phase_b: None,
        modifier: None,
        ph: None,
        buffer: None,
        buffer_preparation: Some(
            "add concentrated sulfuric acid to high-purity water (never water to acid), filter (0.2 µm) and degas".into(),
        ),
        program: vec![
            ProgramStep {
                time_min: 0.0,
                value: 5.0,
            },
            ProgramStep {
                time_min: run_time,
                value: 5.0,
            },
        ],
        program_unit: "mM sulfuric acid".into(),
        flow_ml_min: Some(0.6),
        temperature_c: Some(50.0),
        carrier_gas: None,
        linear_velocity_cm_s: None,
        inlet: None,
        derivatisation: None,
        suppression: matches!(detector, Detector::Conductivity)
            .then(|| "ion-exclusion suppressor".to_string()),
        injection: "10-20 µL of the filtered (0.2 µm) aqueous sample".into(),
        detection,
        dead_time_min: T_EXCLUSION_MIN,
        plate_number: PLATES,
        run_time_min: run_time,
        pressure_bar: None,
    };
    let (mut rec, sep, sep_reason) =
        unscored_recommendation("ion-exclusion", phase, conditions, preds, coelutions);
    let mut reasons = vec![Reason {
        source: "model:ion-exclusion".into(),
        text: format!(
            "retention from the fraction neutral at pH {ELUENT_PH} (Donnan exclusion of the ionised form) and logP (adsorption on the resin): t = {T_EXCLUSION_MIN} + {T_PERMEATION_SPAN_MIN} x fraction neutral x 10^(0.25 (logP + 0.17)) min; approximate, from memory, not calibrated (docs/science.md)"
        ),
        weight: None,
    }];
    if !not_predicted.is_empty() {
        reasons.push(Reason {
            source: "model:ion-exclusion".into(),
            text: format!("not predicted: {}", not_predicted.join("; ")),
            weight: None,
        });
    }
    reasons.push(detector_reason);
    reasons.push(sep_reason);
    rec.reasons = reasons;
    rec.score = (0.6 * sep + 0.4 * 0.5).clamp(0.0, 1.0);
    Ok(rec)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::advisor::profile::test_profile;

    #[test]
    fn ion_exclusion_order_follows_pka_and_chain_length() {
        // typical order on hydrogen-form resins: stronger and more polar acids first, then
        // the homologous fatty acids by chain length (from memory, common practice)
        let t = |n: &str, s: &str| retention_time_min(&test_profile(n, s)).expect("logP");
        let citric = t("citric", "OC(=O)CC(O)(CC(=O)O)C(=O)O");
        let acetic = t("acetic", "CC(=O)O");
        let propionic = t("propionic", "CCC(=O)O");
        let butyric = t("butyric", "CCCC(=O)O");
        assert!(citric < acetic && acetic < propionic && propionic < butyric);
        assert!(
            citric > T_EXCLUSION_MIN,
            "retained beyond the exclusion volume"
        );
        // acetic acid about 16 min under the stated conditions (module docs)
        assert!((acetic - 16.0).abs() < 2.0, "{acetic}");
    }
}
