//! What a retention prediction is (`Prediction`: time, interval, route, the calibration it
//! carries) and how two predictions on one system give a co-elution probability.

use serde::{Deserialize, Serialize};

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
    /// Isotonic map raw → calibrated co-elution probability for pairs of this mode where both
    /// predictions are descriptor-path (or mixed), from cross-validated pairs.
    pub coelution_map_descriptor: Vec<(f64, f64)>,
    /// The same map for pairs where both predictions come from the memory path.
    pub coelution_map_memory: Vec<(f64, f64)>,
    /// System fingerprint (co-elution needs both predictions on one system).
    pub system: String,
    /// True when the analyte's descriptors lie outside the range of the training analytes or
    /// the prediction reached a bound of `psi_k1`: the interval was widened and the value is
    /// an extrapolation.
    #[serde(default)]
    pub extrapolated: bool,
}

/// Standard normal CDF via the complementary error function (Numerical Recipes erfc
/// Chebyshev fit, fractional error < 1.2e-7; Press et al. 3rd ed. §6.2, from memory).
pub fn normal_cdf(x: f64) -> f64 {
    let z = (x / std::f64::consts::SQRT_2).abs();
    let t = 1.0 / (1.0 + 0.5 * z);
    let r = t
        * (-z * z - 1.265_512_23
            + t * (1.000_023_68
                + t * (0.374_091_96
                    + t * (0.096_784_18
                        + t * (-0.186_288_06
                            + t * (0.278_868_07
                                + t * (-1.135_203_98
                                    + t * (1.488_515_87
                                        + t * (-0.822_152_23 + t * 0.170_872_77)))))))))
            .exp();
    if x >= 0.0 { 1.0 - 0.5 * r } else { 0.5 * r }
}

fn sd_for_gap(table: &[(f64, f64)], gap: f64) -> f64 {
    table
        .iter()
        .find(|(upper, _)| gap < *upper)
        .or(table.last())
        .map_or(0.05, |x| x.1)
}

/// Probability that two analytes co-elute, i.e. that their true retention times differ by less
/// than `peak_width_min`, given the calibrated error of their predicted difference (normal
/// error on the difference; the shared system error cancels because the sd was calibrated on
/// differences within held-out systems).
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
    let raw = pair_probability(
        a.rt_min - b.rt_min,
        (a.psi_k1 - b.psi_k1).abs(),
        &a.difference_sd_psi,
        &b.difference_sd_psi,
        0.5 * (a.rt_slope_min + b.rt_slope_min),
        peak_width_min,
    );
    let both_fit = a.path.label() == "scouting fit" && b.path.label() == "scouting fit";
    if both_fit {
        // no calibration map exists for the user's own fits: the raw normal-error probability
        return Ok(raw);
    }
    let both_memory = a.path.label() == "memory" && b.path.label() == "memory";
    let map = if both_memory {
        &a.coelution_map_memory
    } else {
        &a.coelution_map_descriptor
    };
    Ok(apply_map(map, raw))
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

pub(crate) fn pair_probability(
    delta_min: f64,
    gap_psi: f64,
    sd_a: &[(f64, f64)],
    sd_b: &[(f64, f64)],
    slope_min: f64,
    width_min: f64,
) -> f64 {
    let sa = sd_for_gap(sd_a, gap_psi);
    let sb = sd_for_gap(sd_b, gap_psi);
    let sigma = ((sa * sa + sb * sb).sqrt() * slope_min).max(1e-6);
    let p =
        normal_cdf((width_min - delta_min) / sigma) - normal_cdf((-width_min - delta_min) / sigma);
    p.clamp(0.0, 1.0)
}
