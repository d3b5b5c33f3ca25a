//! What a retention prediction is (`Prediction`: time, interval, route, the calibration it
//! carries) and how two predictions on one system give a co-elution probability.

use serde::{Deserialize, Serialize};

use super::coelution;
use super::system::ModelError;

/// Which route produced a prediction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum PredictionPath {
    /// From the analyte's measured retention on other systems, projected onto this one.
    Memory {
        /// Source system ids (RepoRT dataset ids) whose measurements were used.
        source_systems: Vec<String>,
    },
    /// From descriptors only.
    Descriptor,
    /// Directly from log kw and S fitted to the user's own scouting runs on this system
    /// (`scout --store`), through the gradient equation.
    ScoutingFit {
        /// The user's source text of the runs (lab notebook, report).
        source: String,
    },
}

impl PredictionPath {
    /// `memory`, `descriptor` or `scouting fit`.
    pub fn label(&self) -> &'static str {
        match self {
            PredictionPath::Memory { .. } => "memory",
            PredictionPath::Descriptor => "descriptor",
            PredictionPath::ScoutingFit { .. } => "scouting fit",
        }
    }
}

/// A retention prediction with its interval and provenance.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Prediction {
    /// Predicted retention time (min).
    pub rt_min: f64,
    /// Central 90 % interval (min), from cross-validation residuals of this path and mode.
    pub interval_min: (f64, f64),
    /// Organic content (% v/v) at the column outlet when the analyte elutes.
    pub organic_at_elution_pct: f64,
    /// Predicted strong-solvent fraction at which k = 1 (the model's target).
    pub psi_k1: f64,
    /// LSS S parameter used (size rule).
    pub lss_s: f64,
    /// True if the analyte elutes after the last point of the program (final hold).
    pub elutes_after_program: bool,
    /// Route used.
    pub path: PredictionPath,
    /// Sd (in psi units) of this prediction's contribution to the error of a retention
    /// difference, per predicted gap upper bound (psi); from cross-validated pairs.
    pub difference_sd_psi: Vec<(f64, f64)>,
    /// d tR / d psi_k1 at the prediction (min per unit psi).
    pub rt_slope_min: f64,
    /// Calibrated co-elution curve (separation ratio |Δt|/σ_Δ → probability, non-increasing)
    /// for pairs of this mode where both predictions are descriptor-path (or mixed), from
    /// pairs within held-out systems.
    pub coelution_map_descriptor: Vec<(f64, f64)>,
    /// The same curve for pairs where both predictions come from the memory path.
    pub coelution_map_memory: Vec<(f64, f64)>,
    /// System fingerprint (co-elution needs both predictions on one system).
    pub system: String,
    /// True when the analyte's descriptors lie outside the range of the training analytes or
    /// the prediction reached a bound of `psi_k1`: the interval was widened and the value is
    /// an extrapolation.
    #[serde(default)]
    pub extrapolated: bool,
}

pub use super::coelution::normal_cdf;

/// Probability that two analytes co-elute on one system: a calibrated, non-increasing function
/// of their separation ratio `|Δt| / σ_Δ` (`coelution`; σ_Δ is the calibrated sd of a predicted
/// retention difference, in which the shared system error cancels), so identical predictions get
/// the highest probability and it never rises as the predictions move apart. The calibration
/// (memory-path curve when both come from memory, else the descriptor-path curve) is for
/// measured peaks within 1 % of the gradient duration of each other. Pairs of the user's own
/// scouting fits, which have no calibrated curve, get the normal-error probability that the true
/// difference is below `peak_width_min`.
///
/// # Errors
/// `ModelError::DifferentSystems` if the predictions are for different systems,
/// `ModelError::BadPeakWidth` for a non-positive width.
pub fn coelution_probability(
    a: &Prediction,
    b: &Prediction,
    peak_width_min: f64,
) -> Result<f64, ModelError> {
    if a.system != b.system {
        return Err(ModelError::DifferentSystems(
            a.system.clone(),
            b.system.clone(),
        ));
    }
    if !(peak_width_min.is_finite() && peak_width_min > 0.0) {
        return Err(ModelError::BadPeakWidth(peak_width_min));
    }
    let delta = a.rt_min - b.rt_min;
    let sigma = coelution::difference_sigma_min(
        &a.difference_sd_psi,
        &b.difference_sd_psi,
        coelution::pair_slope(a.rt_slope_min, b.rt_slope_min),
    );
    let normal = coelution::normal_probability(delta, sigma, peak_width_min);
    let both_fit = a.path.label() == "scouting fit" && b.path.label() == "scouting fit";
    if both_fit {
        return Ok(normal);
    }
    let both_memory = a.path.label() == "memory" && b.path.label() == "memory";
    let curve = if both_memory {
        &a.coelution_map_memory
    } else {
        &a.coelution_map_descriptor
    };
    let z = coelution::separation_ratio(delta, sigma);
    Ok(coelution::curve_probability(curve, z).unwrap_or(normal))
}

/// Piecewise-linear interpolation in a monotone calibration map (identity if empty).
pub fn apply_map(map: &[(f64, f64)], p: f64) -> f64 {
    let Some(&(x0, y0)) = map.first() else {
        return p;
    };
    if p <= x0 {
        return y0;
    }
    for w in map.windows(2) {
        let ((xa, ya), (xb, yb)) = (w[0], w[1]);
        if p <= xb {
            return if xb > xa {
                ya + (yb - ya) * (p - xa) / (xb - xa)
            } else {
                yb
            };
        }
    }
    map[map.len() - 1].1
}
