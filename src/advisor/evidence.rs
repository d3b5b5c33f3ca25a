//! Evidence that weighs on the advisor's decisions beyond the structure-only predictions:
//! measured reversed-phase retention from the shipped retention memory, and how much of a
//! predicted separation is credible given the prediction's own error.

use super::profile::AnalyteProfile;
use crate::model::regression::{self, Mode};
use crate::report::advice::Recommendation;

/// The profiles with their measured reversed-phase retention (`measured_rp_psi_k1`) from the
/// shipped retention memory: the median over the RP systems that measured the analyte (at
/// least two). Evidence for the mode fit (rule `rule:rp-measured-retention`); profiles are
/// returned unchanged when the model cannot be loaded.
pub fn with_measured_rp(profiles: &[AnalyteProfile]) -> Vec<AnalyteProfile> {
    let mut out = profiles.to_vec();
    let Some(memory) = super::lc::model().ok().and_then(|m| m.memory.as_ref()) else {
        return out;
    };
    for p in &mut out {
        let Some(key) = p.analyte.inchikey.as_deref() else {
            continue;
        };
        let mut psi: Vec<f64> = memory
            .measurements(key)
            .filter(|(_, sys, psi)| sys.mode == Mode::ReversedPhase && psi.is_finite())
            .map(|(_, _, psi)| psi)
            .collect();
        if psi.len() >= 2 {
            psi.sort_by(f64::total_cmp);
            let n = psi.len();
            let median = if n % 2 == 1 {
                psi[n / 2]
            } else {
                0.5 * (psi[n / 2 - 1] + psi[n / 2])
            };
            p.measured_rp_psi_k1 = Some((median, n));
        }
    }
    out
}

/// The smallest resolution of adjacent predicted peaks that the predictions can vouch for:
/// for each adjacent pair, the predicted retention difference less one standard deviation of
/// its error (`model::coelution::difference_sigma_min`, calibrated on held-out pairs; the
/// error shared by both analytes on one system cancels), as a resolution. Two analytes the
/// model cannot tell apart (isomers from structure alone, say) get no credit for a difference
/// smaller than its own error, so a phase is not preferred for a separation the model only
/// guesses. Pairs where both predictions rest on measurements (memory path, scouting fits)
/// keep their predicted resolution: their errors share the source systems, which the
/// per-analyte difference table does not capture. Common practice (credit a prediction only
/// beyond its error), no source. `None` when no adjacent pair has a structure-only
/// prediction.
pub(super) fn credible_critical_resolution(
    rec: &Recommendation,
    raw_of: &std::collections::HashMap<String, &regression::Prediction>,
) -> Option<(f64, String)> {
    let mut best: Option<(f64, f64)> = None;
    for w in rec.predictions.windows(2) {
        let (Some(a), Some(b)) = (raw_of.get(&w[0].analyte), raw_of.get(&w[1].analyte)) else {
            continue;
        };
        // measured retention (memory) and the lab's own fits carry their separation
        if a.path.label() != "descriptor" && b.path.label() != "descriptor" {
            continue;
        }
        let sigma = crate::model::coelution::difference_sigma_min(
            &a.difference_sd_psi,
            &b.difference_sd_psi,
            crate::model::coelution::pair_slope(a.rt_slope_min, b.rt_slope_min),
        );
        let width = w[0].peak_width_half_min + w[1].peak_width_half_min;
        if !(width > 0.0 && sigma.is_finite()) {
            continue;
        }
        let gap = (w[1].retention_time_min - w[0].retention_time_min).abs();
        let rs = 1.18 * (gap - sigma).max(0.0) / width;
        if best.is_none_or(|b| rs < b.0) {
            best = Some((rs, sigma));
        }
    }
    best.map(|(rs, sigma)| {
        (
            rs,
            format!(
                "counted as {rs:.2}: only the separation beyond one standard deviation of the predicted difference of the least separated pair ({sigma:.2} min) is credited (common practice, no source)"
            ),
        )
    })
}
