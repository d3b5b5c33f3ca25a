//! `predict --mode gc`: every analyte of a panel on one GC phase under the user's column and
//! oven program (or the advisor's, when not given), through `model::gc::panel::predict_panel`.
//! Unlike the advisor's phase candidates, nothing is left out silently: an analyte judged
//! unsuitable for GC is still predicted (the user asked) with the caution beside it, and an
//! analyte the model cannot handle keeps its row with the reason (issue 18).

use super::gc::{
    ERROR_CORRELATION, ISOMER_ERROR_CORRELATION, coelution_probability_within, default_column,
    peak_width_half_min, resolvable_delta_ri,
};
use super::phase_ref;
use super::profile::AnalyteProfile;
use crate::model::gc::panel::{PanelAnalyte, PanelRow, predict_panel};
use crate::model::gc::{GcAnalyte, GcColumn, OvenProgram, alkane_ladder, suggest_oven_program};
use crate::phase::StationaryPhase;
use crate::report::advice::ProgramStep;
use crate::report::predict_gc::{GcPanelConditions, GcPanelPair, GcPanelPrediction, GcPanelReport};
use crate::structure::volatility::{GcVerdict, Severity};

/// Largest index the chosen oven program is asked to reach (the program model's limit).
const MAX_PROGRAM_RI: f64 = 6000.0;

/// What the user fixed for `predict --mode gc`.
#[derive(Debug, Clone, Copy, Default)]
pub struct GcPanelRequest {
    /// Column (helium at the given velocity); the advisor's when `None`.
    pub column: Option<GcColumn>,
    /// Dead time, min: sets the carrier's average linear velocity (L / tM) on the column.
    pub dead_time_min: Option<f64>,
    /// Oven program; the advisor's for the predicted index range when `None`.
    pub oven: Option<OvenProgram>,
    /// List pairs whose co-elution probability is at least this (0-1).
    pub risk: f64,
}

/// The caution a profile carries into the prediction: the GC-suitability verdict in plain
/// words, with the structure's reasons.
fn caution(p: &AnalyteProfile) -> Option<String> {
    if p.permanently_charged() {
        return Some(
            "permanently charged (an ion or salt): it does not elute from a GC column as such; any index is for the neutral structure"
                .into(),
        );
    }
    let g = p.gc.as_ref()?;
    let reasons = |keep: &dyn Fn(Severity) -> bool| -> String {
        let r: Vec<&str> = g
            .flags
            .iter()
            .filter(|f| keep(f.severity))
            .map(|f| f.reason.as_str())
            .collect();
        if r.is_empty() {
            String::new()
        } else {
            format!(" ({})", r.join("; "))
        }
    };
    match g.verdict {
        GcVerdict::Suitable => None,
        GcVerdict::SuitableAfterDerivatisation => {
            let mut how: Vec<&str> = Vec::new();
            for d in g.flags.iter().filter_map(|f| f.derivatisation) {
                if !how.contains(&d.describe()) {
                    how.push(d.describe());
                }
            }
            Some(format!(
                "derivatise before GC{}: {}; the index is for the underivatised compound, the derivative elutes elsewhere",
                reasons(&|s| s != Severity::Caution),
                if how.is_empty() {
                    "derivatise".to_string()
                } else {
                    how.join(", ")
                }
            ))
        }
        GcVerdict::Unsuitable => Some(format!(
            "judged not suitable for GC as is{}; predicted because asked: the index assumes it elutes intact, which it may not",
            reasons(&|s| s != Severity::Caution)
        )),
        GcVerdict::Unknown => Some(
            "volatility unknown (no boiling point): check that it elutes before relying on the time"
                .into(),
        ),
    }
}

/// Predicts every profile on `phase` under `req`.
///
/// # Errors
/// A message when the phase cannot be used (not a GC phase, a porous-layer phase without
/// system constants for any analyte, a program above the phase's limit) or a shipped model
/// table is broken. Problems of single analytes become notes on their rows.
pub fn predict_gc_panel(
    profiles: &[AnalyteProfile],
    phase: &StationaryPhase,
    req: &GcPanelRequest,
) -> Result<GcPanelReport, String> {
    if !(0.0..=1.0).contains(&req.risk) {
        return Err(format!(
            "risk threshold {} must be between 0 and 1",
            req.risk
        ));
    }
    let fallbacks: Vec<Option<GcAnalyte>> = profiles.iter().map(|p| p.gc_analyte()).collect();
    let cautions: Vec<Option<String>> = profiles.iter().map(caution).collect();
    let panel: Vec<PanelAnalyte<'_>> = profiles
        .iter()
        .zip(&fallbacks)
        .zip(&cautions)
        .map(|((p, f), c)| PanelAnalyte {
            name: p.name(),
            graph: p.estimate.as_ref().map(|e| &e.graph),
            fallback: f.as_ref(),
            caution: c.as_deref(),
        })
        .collect();
    let mut origin = Vec::new();
    let mut column = match req.column {
        Some(c) => {
            origin.push("column given by the user".to_string());
            c
        }
        None => {
            origin.push("column chosen for the analytes (not given)".to_string());
            default_column(profiles, phase)?
        }
    };
    if let Some(t0) = req.dead_time_min {
        if !(t0.is_finite() && t0 > 0.0) {
            return Err(format!("dead time {t0} min must be a positive number"));
        }
        let velocity = column.length_m() * 100.0 / (t0 * 60.0);
        column = GcColumn::new(
            column.length_m(),
            column.inner_diameter_mm(),
            column.film_um(),
            velocity,
        )
        .map_err(|e| format!("dead time {t0} min: {e}"))?;
        origin.push(format!(
            "carrier velocity {:.1} cm/s from the dead time {t0} min (L / tM)",
            velocity
        ));
    }
    // indices first (they do not depend on the program), then the program and the ladder
    let indexed = predict_panel(&panel, phase, None).map_err(|e| e.to_string())?;
    let oven = match req.oven {
        Some(p) => {
            origin.push(format!("oven program {} given by the user", p.to_spec()));
            p
        }
        None => {
            let ris: Vec<f64> = indexed
                .iter()
                .filter_map(|r| r.index.as_ref().map(|i| i.retention_index))
                .collect();
            let lo = ris.iter().copied().fold(f64::INFINITY, f64::min);
            let hi = ris.iter().copied().fold(f64::NEG_INFINITY, f64::max);
            // an extrapolated index beyond any program (a sugar on polyethylene glycol) must not
            // stop the others: the range is clamped, and that analyte's row says it is outside
            // the ladder
            let (lo, hi) = if ris.is_empty() {
                (500.0, 1500.0)
            } else {
                let lo = lo.clamp(100.0, MAX_PROGRAM_RI);
                (lo, hi.clamp(lo, MAX_PROGRAM_RI))
            };
            let s = suggest_oven_program(lo, hi, phase, &column).map_err(|e| e.to_string())?;
            origin.push(format!(
                "oven program {} chosen for the predicted index range (not given)",
                s.program.to_spec()
            ));
            s.program
        }
    };
    let ladder = alkane_ladder(phase, &column, &oven).map_err(|e| e.to_string())?;
    let rows = predict_panel(&panel, phase, Some(&ladder)).map_err(|e| e.to_string())?;
    let t0 = column.holdup_time_min();
    let carbons = (
        ladder.points().first().map_or(1, |p| p.carbon_number),
        ladder.points().last().map_or(1, |p| p.carbon_number),
    );
    let ramp_end = oven.initial_hold_min() + oven.ramp_time_min();
    let conditions = GcPanelConditions {
        column_length_m: column.length_m(),
        column_id_mm: column.inner_diameter_mm(),
        film_um: column.film_um(),
        carrier_gas: "helium".into(),
        linear_velocity_cm_s: column.linear_velocity_cm_s(),
        dead_time_min: t0,
        oven: oven.to_spec(),
        program: [
            (0.0, oven.initial_c()),
            (oven.initial_hold_min(), oven.initial_c()),
            (ramp_end, oven.final_c()),
            (oven.total_time_min(), oven.final_c()),
        ]
        .into_iter()
        .map(|(time_min, value)| ProgramStep { time_min, value })
        .collect(),
        program_unit: "°C".into(),
        origin,
        run_time_min: oven.total_time_min(),
        ladder_carbons: carbons,
    };
    let mut report = GcPanelReport::new(phase_ref(phase), conditions);
    report.predictions = rows
        .iter()
        .map(|r| prediction_row(r, &column, t0))
        .collect();
    // by time, then index; rows without an index keep their input order at the end
    report.predictions.sort_by(|a, b| {
        let key = |p: &GcPanelPrediction| {
            (
                p.retention_index.is_none(),
                p.retention_time_min.or(p.retention_index).unwrap_or(0.0),
            )
        };
        let (ka, kb) = (key(a), key(b));
        ka.0.cmp(&kb.0).then_with(|| ka.1.total_cmp(&kb.1))
    });
    report.coelutions = pairs(profiles, &rows, &ladder, &column, req.risk);
    for p in &report.predictions {
        if let Some(t) = p.retention_time_min
            && t > oven.total_time_min()
        {
            report.notes.push(format!(
                "{}: predicted at {:.1} min, after the program ends at {:.1} min: it does not elute in this run; raise the final temperature or lengthen the final hold",
                p.analyte,
                t,
                oven.total_time_min()
            ));
        }
    }
    report.notes.push(
        "indices from the solvation-parameter model (docs/gc-retention.md); times through the modelled n-alkane ladder for helium; the 95 % intervals come from the model's held-out residuals. Check both with an n-alkane ladder run on the lab's own column."
            .into(),
    );
    Ok(report)
}

fn prediction_row(r: &PanelRow, column: &GcColumn, t0: f64) -> GcPanelPrediction {
    let i = r.index.as_ref();
    let t = r.time.as_ref();
    GcPanelPrediction {
        analyte: r.name.clone(),
        retention_index: i.map(|i| i.retention_index),
        retention_index_sigma: i.map(|i| i.sigma_ri),
        retention_index_low: i.map(|i| i.low_95_ri),
        retention_index_high: i.map(|i| i.high_95_ri),
        retention_time_min: t.map(|t| t.retention_time_min),
        interval_low_min: t.map(|t| t.low_95_min),
        interval_high_min: t.map(|t| t.high_95_min),
        retention_factor: t.map(|t| ((t.retention_time_min - t0) / t0).max(0.0)),
        elution_temperature_c: t.map(|t| t.elution_temperature_c),
        peak_width_half_min: t.map(|t| peak_width_half_min(t.retention_time_min, column)),
        path: i.map_or(String::new(), |i| i.route().to_string()),
        path_detail: t
            .map(|t| t.path.clone())
            .or_else(|| i.map(|i| i.path.clone()))
            .unwrap_or_default(),
        caution: r.caution.clone(),
        note: r.note.clone(),
    }
}

/// Pairs of timed analytes with their co-elution probability (at or above `risk`), most
/// probable first.
fn pairs(
    profiles: &[AnalyteProfile],
    rows: &[PanelRow],
    ladder: &crate::model::gc::AlkaneLadder,
    column: &GcColumn,
    risk: f64,
) -> Vec<GcPanelPair> {
    let formula = |k: usize| {
        profiles
            .get(k)
            .and_then(|p| p.estimate.as_ref())
            .map(|e| e.descriptors.molecular_formula.as_str())
    };
    let timed: Vec<(usize, &PanelRow)> = rows
        .iter()
        .enumerate()
        .filter(|(_, r)| r.index.is_some() && r.time.is_some())
        .collect();
    let mut out = Vec::new();
    for (x, &(i, ri)) in timed.iter().enumerate() {
        for &(j, rj) in &timed[x + 1..] {
            let (Some(ii), Some(ij), Some(ti), Some(tj)) =
                (&ri.index, &rj.index, &ri.time, &rj.time)
            else {
                continue;
            };
            let isomers = matches!((formula(i), formula(j)), (Some(a), Some(b)) if a == b);
            let rho = if isomers {
                ISOMER_ERROR_CORRELATION
            } else {
                ERROR_CORRELATION
            };
            let (wi, wj) = (
                peak_width_half_min(ti.retention_time_min, column),
                peak_width_half_min(tj.retention_time_min, column),
            );
            let resolvable = resolvable_delta_ri(
                ladder,
                0.5 * (ii.retention_index + ij.retention_index),
                wi + wj,
            );
            let probability = coelution_probability_within(
                ij.retention_index - ii.retention_index,
                ii.sigma_ri,
                ij.sigma_ri,
                rho,
                resolvable,
            );
            if probability < risk.max(1e-3) {
                continue;
            }
            let (a, b, ia, ib) = if ii.retention_index <= ij.retention_index {
                (ri, rj, ii, ij)
            } else {
                (rj, ri, ij, ii)
            };
            out.push(GcPanelPair {
                a: a.name.clone(),
                b: b.name.clone(),
                delta_retention_index: ib.retention_index - ia.retention_index,
                resolvable_delta_retention_index: resolvable,
                probability,
                resolution: 1.18 * (tj.retention_time_min - ti.retention_time_min).abs()
                    / (wi + wj),
                isomers,
            });
        }
    }
    out.sort_by(|x, y| {
        y.probability
            .total_cmp(&x.probability)
            .then_with(|| x.a.cmp(&y.a))
            .then_with(|| x.b.cmp(&y.b))
    });
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::advisor::profile::test_profile;
    use crate::phase::Catalogue;

    fn phase(id: &str) -> &'static StationaryPhase {
        Catalogue::builtin().and_then(|c| c.phase(id)).unwrap()
    }

    #[test]
    fn every_analyte_keeps_its_row_and_unsuitable_ones_are_predicted_with_a_caution() {
        let profiles = vec![
            test_profile("toluene", "Cc1ccccc1"),
            test_profile("p-xylene", "Cc1ccc(C)cc1"),
            test_profile("m-xylene", "Cc1cccc(C)c1"),
            test_profile(
                "sucrose",
                "OC[C@H]1O[C@@](CO)(O[C@H]2O[C@H](CO)[C@@H](O)[C@H](O)[C@H]2O)[C@@H](O)[C@@H]1O",
            ),
            test_profile("dimethylmercury", "C[Hg]C"),
        ];
        let req = GcPanelRequest {
            oven: Some(OvenProgram::parse("40:2,10:300:10").unwrap()),
            risk: 0.2,
            ..GcPanelRequest::default()
        };
        let r = predict_gc_panel(&profiles, phase("gc-5-phenyl"), &req).unwrap();
        assert_eq!(r.predictions.len(), 5);
        let row = |n: &str| r.predictions.iter().find(|p| p.analyte == n).unwrap();
        // ordinary analytes: index, interval, time and route
        let tol = row("toluene");
        assert!(tol.retention_index.is_some() && tol.retention_time_min.is_some());
        assert!(tol.retention_index_low < tol.retention_index);
        assert!(tol.interval_low_min <= tol.retention_time_min);
        assert_eq!(tol.path, "solvation model");
        assert!(tol.caution.is_none() && tol.note.is_none());
        // a sugar: judged unsuitable (or derivatise first), still predicted, with the caution
        let sug = row("sucrose");
        assert!(sug.retention_index.is_some(), "{sug:?}");
        assert!(sug.caution.is_some(), "{sug:?}");
        // an atom outside the fragment scheme: a note naming it, never a failure
        let hg = row("dimethylmercury");
        assert!(
            hg.retention_index.is_none() && hg.note.as_deref().is_some_and(|n| n.contains("Hg")),
            "{hg:?}"
        );
        assert!(r.partial());
        // rows with an index come first, by time
        let times: Vec<f64> = r
            .predictions
            .iter()
            .filter_map(|p| p.retention_time_min)
            .collect();
        assert!(times.windows(2).all(|w| w[0] <= w[1]));
        assert!(r.predictions.last().unwrap().retention_index.is_none());
        // m-/p-xylene (identical descriptors): the most probable co-elution, flagged
        let top = r.coelutions.first().expect("the xylene pair is flagged");
        let mut pair = [top.a.as_str(), top.b.as_str()];
        pair.sort_unstable();
        assert_eq!(pair, ["m-xylene", "p-xylene"]);
        assert!(top.isomers && top.probability >= 0.8, "{top:?}");
        // every format renders; the table names the missing analyte's reason
        let t = r.render(crate::report::Format::Table).unwrap();
        assert!(t.contains("note: dimethylmercury:"), "{t}");
        assert!(t.contains("caution: sucrose:"), "{t}");
        let csv = r.render(crate::report::Format::Csv).unwrap();
        assert_eq!(csv.lines().count(), 6);
        let j: serde_json::Value =
            serde_json::from_str(&r.render(crate::report::Format::Json).unwrap()).unwrap();
        assert_eq!(j["predictions"].as_array().unwrap().len(), 5);
    }

    #[test]
    fn the_dead_time_sets_the_carrier_velocity_and_a_longer_dead_time_elutes_later() {
        let profiles = vec![test_profile("1-octanol", "CCCCCCCCO")];
        let oven = Some(OvenProgram::parse("40:1,10:250:5").unwrap());
        let at = |t0: f64| {
            let req = GcPanelRequest {
                oven,
                dead_time_min: Some(t0),
                risk: 0.2,
                ..GcPanelRequest::default()
            };
            predict_gc_panel(&profiles, phase("gc-wax"), &req).unwrap()
        };
        let (fast, slow) = (at(1.2), at(2.0));
        assert!((fast.conditions.dead_time_min - 1.2).abs() < 1e-9);
        assert!((slow.conditions.dead_time_min - 2.0).abs() < 1e-9);
        // the index does not depend on the flow; the time does
        assert_eq!(
            fast.predictions[0].retention_index,
            slow.predictions[0].retention_index
        );
        assert!(fast.predictions[0].retention_time_min < slow.predictions[0].retention_time_min);
        // a non-positive dead time is refused, naming the value
        let bad = GcPanelRequest {
            dead_time_min: Some(-1.0),
            risk: 0.2,
            ..GcPanelRequest::default()
        };
        assert!(
            predict_gc_panel(&profiles, phase("gc-wax"), &bad)
                .unwrap_err()
                .contains("-1")
        );
    }

    #[test]
    fn a_non_gc_phase_is_one_error() {
        let profiles = vec![test_profile("toluene", "Cc1ccccc1")];
        let req = GcPanelRequest {
            risk: 0.2,
            ..GcPanelRequest::default()
        };
        assert!(predict_gc_panel(&profiles, phase("rp-c18"), &req).is_err());
    }
}
