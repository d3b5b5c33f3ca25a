//! Chromatograms of the optimum of a scouting fit (LC gradient or GC oven program).

use super::{ChromatogramData, FWHM_PER_SIGMA, ProgramTrace, render_chromatogram_svg};
use crate::measured::gc_optimise::{GcPredictedPeak, GcPrediction};
use crate::measured::optimise::{PredictedPair, PredictedPeak, Prediction};
use crate::report::advice::{Coelution, PredictionRow};

/// Gaussian half-height width over base width: w½/wb = 2.3548σ/4σ (textbook relation, from
/// memory).
const HALF_PER_BASE_WIDTH: f64 = FWHM_PER_SIGMA / 4.0;

/// Renders the predicted chromatogram of an optimised gradient (`scout`): each analyte at its
/// predicted time with its predicted width (w½ = 0.589 wb, Gaussian), a ±1σ whisker where the
/// fit gave an uncertainty, and pairs below `target_resolution` marked with a risk bracket
/// and shown in a close-up.
pub fn render_optimum_svg(
    prediction: &Prediction,
    dead_time_min: f64,
    target_resolution: f64,
    title: &str,
) -> String {
    let peaks: Vec<OptimumPeak<'_>> = prediction.peaks.iter().map(OptimumPeak::from).collect();
    render_optimum(
        &peaks,
        &prediction.pairs,
        OptimumFrame {
            dead_time_min,
            run_time_min: prediction.run_time_min,
            target_resolution,
            path: "scouting fit (LSS)",
            program: Some(ProgramTrace {
                points: prediction
                    .program
                    .points()
                    .iter()
                    .map(|p| (p.time_min, p.organic_pct))
                    .collect(),
                label: "eluent strength (% organic)".to_string(),
            }),
            id: "scout-optimum",
            subtitle: format!(
                "optimised gradient {} (time min : % organic)",
                prediction.program.to_spec()
            ),
        },
        title,
    )
}

/// As [`render_optimum_svg`] for an optimised oven program (`scout --mode gc`); the dead time
/// is the hold-up time t_M.
pub fn render_gc_optimum_svg(
    prediction: &GcPrediction,
    holdup_time_min: f64,
    target_resolution: f64,
    title: &str,
) -> String {
    let peaks: Vec<OptimumPeak<'_>> = prediction.peaks.iter().map(OptimumPeak::from).collect();
    render_optimum(
        &peaks,
        &prediction.pairs,
        OptimumFrame {
            dead_time_min: holdup_time_min,
            run_time_min: prediction.run_time_min,
            target_resolution,
            path: "scouting fit (ln k = A + B/T)",
            program: Some(oven_trace(prediction)),
            id: "scout-gc-optimum",
            subtitle: format!(
                "optimised oven program {} (initial °C : hold min, ramp °C/min : final °C : hold min)",
                prediction.program
            ),
        },
        title,
    )
}

/// The oven program of a GC optimum as break points (time min, °C): initial hold, one linear
/// ramp, final hold. A ramp that is not a finite positive rate draws the initial hold only.
pub(super) fn oven_trace(p: &GcPrediction) -> ProgramTrace {
    let hold = p.initial_hold_min.max(0.0);
    let mut points = vec![(0.0, p.initial_c), (hold, p.initial_c)];
    if p.ramp_c_per_min.is_finite() && p.ramp_c_per_min > 0.0 && p.final_c > p.initial_c {
        let end_ramp = hold + (p.final_c - p.initial_c) / p.ramp_c_per_min;
        points.push((end_ramp, p.final_c));
        if p.final_hold_min.is_finite() && p.final_hold_min > 0.0 {
            points.push((end_ramp + p.final_hold_min, p.final_c));
        }
    }
    points.dedup_by(|a, b| a.0 == b.0 && a.1 == b.1);
    ProgramTrace {
        points,
        label: "oven temperature (°C)".to_string(),
    }
}

/// One predicted peak of an optimum.
struct OptimumPeak<'a> {
    name: &'a str,
    retention_time_min: f64,
    uncertainty_min: Option<f64>,
    width_base_min: f64,
}

impl<'a> From<&'a PredictedPeak> for OptimumPeak<'a> {
    fn from(p: &'a PredictedPeak) -> Self {
        OptimumPeak {
            name: &p.name,
            retention_time_min: p.retention_time_min,
            uncertainty_min: p.retention_time_uncertainty_min,
            width_base_min: p.width_base_min,
        }
    }
}

impl<'a> From<&'a GcPredictedPeak> for OptimumPeak<'a> {
    fn from(p: &'a GcPredictedPeak) -> Self {
        OptimumPeak {
            name: &p.name,
            retention_time_min: p.retention_time_min,
            uncertainty_min: p.retention_time_uncertainty_min,
            width_base_min: p.width_base_min,
        }
    }
}

/// What frames an optimum's chromatogram.
struct OptimumFrame {
    dead_time_min: f64,
    run_time_min: f64,
    target_resolution: f64,
    path: &'static str,
    id: &'static str,
    subtitle: String,
    program: Option<ProgramTrace>,
}

fn render_optimum(
    peaks: &[OptimumPeak<'_>],
    pairs: &[PredictedPair],
    frame: OptimumFrame,
    title: &str,
) -> String {
    let rows: Vec<PredictionRow> = peaks
        .iter()
        .map(|p| {
            let (lo, hi, coverage) = match p.uncertainty_min {
                // ±1σ of a normal distribution covers 68.27 % (textbook value, from memory).
                Some(u) if u.is_finite() => {
                    (p.retention_time_min - u, p.retention_time_min + u, 0.6827)
                }
                _ => (f64::NAN, f64::NAN, f64::NAN),
            };
            PredictionRow {
                analyte: p.name.to_string(),
                retention_time_min: p.retention_time_min,
                interval_low_min: lo,
                interval_high_min: hi,
                interval_coverage: coverage,
                retention_factor: (p.retention_time_min - frame.dead_time_min)
                    / frame.dead_time_min,
                peak_width_half_min: p.width_base_min * HALF_PER_BASE_WIDTH,
                path: frame.path.to_string(),
                source_systems: Vec::new(),
                path_source: None,
                retention_index: None,
            }
        })
        .collect();
    let target = frame.target_resolution;
    let coelutions: Vec<Coelution> = pairs
        .iter()
        .filter(|q| q.resolution < target)
        .map(|q| Coelution {
            a: q.first.clone(),
            b: q.second.clone(),
            // Not computed by the optimiser; the renderer does not draw it.
            probability: f64::NAN,
            resolution: q.resolution,
            note: Some(format!("below the target Rs {target}")),
        })
        .collect();
    render_chromatogram_svg(
        &ChromatogramData {
            predictions: &rows,
            coelutions: &coelutions,
            run_time_min: frame.run_time_min,
            dead_time_min: frame.dead_time_min,
            id: frame.id.to_string(),
            subtitle: frame.subtitle,
            risk_legend: format!("pair below the target Rs {target}, predicted Rs"),
            program: frame.program,
        },
        title,
    )
}
