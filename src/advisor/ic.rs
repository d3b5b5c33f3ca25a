//! Ion-chromatography candidates: elution order and relative retention from the ion table
//! (charge, hydrated size, eluent), converted to minutes with an assumed reference retention.

use super::profile::AnalyteProfile;
use super::{coelution, unscored_recommendation};
use crate::model::ic::predict_ion_order;
use crate::model::theory;
use crate::phase::{Catalogue, PhaseMode, StationaryPhase};
use crate::report::advice::{Conditions, PredictionRow, ProgramStep, Reason, Recommendation};

/// Retention factor assumed for the reference ion of the ion table (assumption: the tables'
/// reference ion elutes at k ≈ 3 at the reference eluent concentration; from memory).
pub const K_REFERENCE: f64 = 3.0;

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
            "potassium hydroxide, 20 mM isocratic (or a 10-40 mM gradient)",
            "anion suppressor (electrolytic)",
            20.0,
            "mM potassium hydroxide",
            "prepare eluents from high-purity water (18 MΩ·cm) and degas; hydroxide eluents absorb CO2 from air (keep them under inert gas, or generate them electrolytically)",
        ),
        _ => (
            "msa",
            "20 mM methanesulfonic acid, isocratic",
            "cation suppressor, or non-suppressed conductivity",
            20.0,
            "mM methanesulfonic acid",
            "dilute methanesulfonic acid in high-purity water (18 MΩ·cm), filter (0.2 µm) and degas",
        ),
    };
    // None: the ion table's reference concentration of this eluent
    let conc: Option<f64> = None;
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
    if names.is_empty() {
        return Err("no analyte is in the ion table".into());
    }
    let pred = predict_ion_order(catalogue, phase.id(), eluent, conc, &names)
        .map_err(|e| e.to_string())?;
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
        let name = owner.map_or(ion.name.clone(), |(p, _)| p.name().to_string());
        let k = K_REFERENCE * ion.relative_retention;
        let t = t0 * (1.0 + k);
        preds.push(PredictionRow {
            analyte: name,
            retention_time_min: t,
            interval_low_min: t0 * (1.0 + K_REFERENCE * ion.low_95),
            interval_high_min: t0 * (1.0 + K_REFERENCE * ion.high_95),
            interval_coverage: 0.95,
            retention_factor: k,
            peak_width_half_min: 2.355 * t / n_plates.sqrt(),
            path: "ion-table".into(),
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
        .filter(|p| !owners.iter().any(|o| o.name() == p.name()))
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
        mobile_phase_a: Some(eluent_text.to_string()),
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
    let (mut rec, sep, sep_reason) =
        unscored_recommendation(mode.as_str(), phase, conditions, preds, coelutions);
    let mut reasons = vec![Reason {
        source: "model:ic-ion-table".into(),
        text: format!(
            "elution order and relative retention from the ion table (charge, hydrated size, eluent; values from memory, docs/phases.md); times assume the reference ion at k = {K_REFERENCE}"
        ),
        weight: None,
    }];
    reasons.extend(pred.notes.iter().map(|n| Reason {
        source: "model:ic-ion-table".into(),
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
    reasons.push(sep_reason);
    let coverage = names.len() as f64 / profiles.len().max(1) as f64;
    rec.reasons = reasons;
    rec.score = (0.6 * sep + 0.4 * coverage).clamp(0.0, 1.0);
    Ok(rec)
}
