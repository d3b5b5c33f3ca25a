//! The allowed-adjustment check of a method transfer: how far the ratio of column length to
//! particle size (L/dp) moves, and whether the flow follows the pharmacopoeial formula.
//!
//! Limits, **from memory** of the harmonised general chapters on chromatography (USP <621>,
//! Ph. Eur. 2.2.46; wording and figures to be checked against the current text before use in a
//! regulated lab):
//! - L/dp of the new column within −25 % to +50 % of the original (for a change between totally
//!   and superficially porous particles the chapters also accept a plate number within −25 % to
//!   +50 %, which needs a measured plate number and is not checked here);
//! - the flow follows F2 = F1 (dc2² dp1)/(dc1² dp2) when the particle size or diameter changes;
//!   a further ±50 % is allowed for isocratic methods only;
//! - gradient times scale by (F1/F2)(L2 dc2²)/(L1 dc1²) and the injection volume by the column
//!   volume, within the limits of precision, linearity and detection.

use serde::{Deserialize, Serialize};

use super::ColumnGeometry;

/// Lower limit of the L/dp change, fraction of the original (from memory of the chapters).
pub const L_OVER_DP_MIN_CHANGE: f64 = -0.25;
/// Upper limit of the L/dp change, fraction of the original (from memory of the chapters).
pub const L_OVER_DP_MAX_CHANGE: f64 = 0.50;

/// Outcome of one adjustment check.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum LimitVerdict {
    /// Inside the allowed range.
    Within,
    /// Outside the allowed range: a method change, not an adjustment.
    Outside,
}

impl LimitVerdict {
    /// Plain words for tables and reports.
    pub fn label(self) -> &'static str {
        match self {
            LimitVerdict::Within => "within the allowed adjustment",
            LimitVerdict::Outside => "outside the allowed adjustment (a method change)",
        }
    }
}

/// One checked quantity.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LimitCheck {
    /// What was checked, in plain words.
    pub quantity: String,
    /// Value of the original method.
    pub original: f64,
    /// Value of the transferred method.
    pub target: f64,
    /// Relative change, target/original − 1.
    pub change: f64,
    /// Allowed range of the change, as fractions (e.g. −0.25 to 0.5).
    pub allowed_min: f64,
    /// Upper end of the allowed range.
    pub allowed_max: f64,
    /// Verdict.
    pub verdict: LimitVerdict,
    /// Where the limit comes from.
    pub source: String,
}

/// Source note for every check made here.
pub const LIMITS_SOURCE: &str = "harmonised pharmacopoeial chapters on chromatography \
(USP <621>, Ph. Eur. 2.2.46), from memory: check the current text";

/// Checks L/dp (length in mm over particle size in µm) against the allowed −25 % to +50 %.
pub fn check_length_over_particle(o: &ColumnGeometry, t: &ColumnGeometry) -> LimitCheck {
    let before = o.column_length_mm / o.particle_size_um;
    let after = t.column_length_mm / t.particle_size_um;
    let change = after / before - 1.0;
    // a tolerance of 1e-9 keeps exact boundary cases (e.g. 150/5 → 75/1.7 is not one) stable
    let within = (L_OVER_DP_MIN_CHANGE - 1e-9..=L_OVER_DP_MAX_CHANGE + 1e-9).contains(&change);
    LimitCheck {
        quantity: "column length / particle size, L/dp (mm/µm)".into(),
        original: before,
        target: after,
        change,
        allowed_min: L_OVER_DP_MIN_CHANGE,
        allowed_max: L_OVER_DP_MAX_CHANGE,
        verdict: if within {
            LimitVerdict::Within
        } else {
            LimitVerdict::Outside
        },
        source: LIMITS_SOURCE.into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn col(l: f64, d: f64, dp: f64) -> ColumnGeometry {
        ColumnGeometry {
            column_length_mm: l,
            inner_diameter_mm: d,
            particle_size_um: dp,
        }
    }

    #[test]
    fn l_over_dp_limits_at_both_ends() {
        // 150/5 = 30; 112.5/5 = 22.5 is exactly −25 %; 225/5 = 45 exactly +50 % (hand values).
        let o = col(150.0, 4.6, 5.0);
        assert_eq!(
            check_length_over_particle(&o, &col(112.5, 4.6, 5.0)).verdict,
            LimitVerdict::Within
        );
        assert_eq!(
            check_length_over_particle(&o, &col(225.0, 4.6, 5.0)).verdict,
            LimitVerdict::Within
        );
        assert_eq!(
            check_length_over_particle(&o, &col(110.0, 4.6, 5.0)).verdict,
            LimitVerdict::Outside
        );
        assert_eq!(
            check_length_over_particle(&o, &col(230.0, 4.6, 5.0)).verdict,
            LimitVerdict::Outside
        );
        // 100/1.7 = 58.82 against 30: +96 %, outside.
        let c = check_length_over_particle(&o, &col(100.0, 2.1, 1.7));
        assert!((c.change - 0.960_784).abs() < 1e-5, "{}", c.change);
        assert_eq!(c.verdict, LimitVerdict::Outside);
        assert!(c.source.contains("from memory"));
    }
}
