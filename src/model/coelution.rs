//! Co-elution probability of two LC predictions on one system, as a calibrated monotone
//! function of the predicted separation relative to the uncertainty of that separation.
//!
//! The separation ratio of a pair is `z = |Δt_pred| / σ_Δ`, where `σ_Δ` (minutes) is the sd of
//! the error of a *difference* of two predictions on one system: the per-prediction shares
//! calibrated on pairs of close predictions (|Δψ| < 0.02) within held-out systems, so the shared
//! system error and the correlated errors of similar analytes cancel (see `calibration`),
//! converted to minutes with the local slope dtR/dψ. The probability is a non-increasing
//! step-wise linear curve `p(z)`, fitted by isotonic regression (pool-adjacent-violators,
//! decreasing) of the observed co-elution (measured |Δt| < 1 % of the gradient duration) on `z`
//! over pairs within held-out systems of the leave-whole-systems-out cross-validation
//! (Zadrozny & Elkan, KDD 2002, isotonic calibration; from memory). Identical predictions
//! (`z = 0`) therefore always get the highest probability the curve gives, and the probability
//! never rises as the predictions move apart. Nothing here depends on another file of `model`.

/// Per-prediction difference sd (ψ) used when a calibration has no table (common practice, no
/// source: the order of the cross-validated figures in docs/model.md).
pub const FALLBACK_SD_PSI: f64 = 0.05;

/// The local slope dtR/dψ (min per unit ψ) a pair's difference error is read at: the steeper
/// of the two. The time error of the pair is dominated by its less certain member, and
/// analytes crowded on a flat part of the program (near the start, where many elute together)
/// would otherwise be credited with a time error far smaller than the real one. Measured
/// against the mean of the two slopes on the leave-whole-systems-out CV (docs/model.md, seeds
/// 42, 7 and 123): RP co-elution AUC 0.884 / 0.883 / 0.883 against 0.874 / 0.875 / 0.876.
pub fn pair_slope(slope_a: f64, slope_b: f64) -> f64 {
    slope_a.abs().max(slope_b.abs())
}

/// Sd (minutes) of the error of the predicted retention difference of two predictions, from
/// their per-prediction difference-sd tables (`(upper gap bound, sd)`, the first row being the
/// closest-gap bin) and the pair's local slope dtR/dψ ([`pair_slope`], min per unit ψ).
/// Always positive.
pub fn difference_sigma_min(sd_a: &[(f64, f64)], sd_b: &[(f64, f64)], slope_min: f64) -> f64 {
    let near = |t: &[(f64, f64)]| {
        t.first()
            .map(|x| x.1)
            .filter(|s| s.is_finite() && *s > 0.0)
            .unwrap_or(FALLBACK_SD_PSI)
    };
    let (sa, sb) = (near(sd_a), near(sd_b));
    let slope = if slope_min.is_finite() {
        slope_min.abs()
    } else {
        0.0
    };
    ((sa * sa + sb * sb).sqrt() * slope).max(1e-6)
}

/// Separation ratio `|Δt| / σ_Δ` (non-negative; a non-finite difference counts as far apart).
pub fn separation_ratio(delta_min: f64, sigma_min: f64) -> f64 {
    let z = delta_min.abs() / sigma_min.max(1e-9);
    if z.is_finite() { z } else { f64::MAX }
}

/// Probability from a calibrated curve (knots `(z, p)`, z ascending; linear between knots,
/// falling as `exp(-(z - z_last))` beyond the last); `None` for an empty curve. Whatever the knots, the result is in [0, 1], maximal at `z = 0` and non-increasing in
/// `z`: the knot values are read through their running minimum.
pub fn curve_probability(curve: &[(f64, f64)], z: f64) -> Option<f64> {
    let (&(x0, y0), _) = curve.split_first()?;
    let clamp = |p: f64| {
        if p.is_finite() {
            p.clamp(0.0, 1.0)
        } else {
            0.0
        }
    };
    let z = if z.is_nan() { f64::MAX } else { z.max(0.0) };
    let mut prev = (x0, clamp(y0));
    if z <= x0 {
        return Some(prev.1);
    }
    for &(x, y) in &curve[1..] {
        let y = clamp(y).min(prev.1);
        if z <= x {
            return Some(if x > prev.0 {
                prev.1 + (y - prev.1) * (z - prev.0) / (x - prev.0)
            } else {
                y
            });
        }
        prev = (x, y);
    }
    // beyond the last knot the rate keeps falling towards 0 (far apart never co-elute)
    Some(prev.1 * (-(z - prev.0)).exp())
}

/// Normal-error probability that the true difference is within `width_min`, for pairs with no
/// calibrated curve (the user's own scouting fits): `P(|Δ| < w)` with `Δ ~ N(Δt_pred, σ_Δ²)`.
/// Non-increasing in `|Δt_pred|` and maximal at 0 for fixed `σ_Δ` and `w`.
pub fn normal_probability(delta_min: f64, sigma_min: f64, width_min: f64) -> f64 {
    let d = delta_min.abs();
    let s = sigma_min.max(1e-9);
    let p = normal_cdf((width_min - d) / s) - normal_cdf((-width_min - d) / s);
    if p.is_finite() {
        p.clamp(0.0, 1.0)
    } else {
        0.0
    }
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

/// Fewest pairs a curve is fitted on.
pub const MIN_CURVE_PAIRS: usize = 100;

/// Decreasing isotonic fit of the observed co-elution (true/false) on the separation ratio.
/// The sorted pairs are first pooled into groups of at least `max(50, n / 400)` pairs, so that
/// no knot rests on a handful of pairs (pairs predicted at exactly one time, such as isomers
/// with identical descriptors, would otherwise pin the curve's start); pool-adjacent-violators
/// then merges groups until their rates fall strictly, and each block becomes a knot (its mean
/// `z`, its rate). Between knots the curve is linear, so it falls strictly there. Empty with
/// fewer than `MIN_CURVE_PAIRS` finite points.
pub fn fit_curve(points: &[(f64, bool)]) -> Vec<(f64, f64)> {
    let mut pts: Vec<(f64, f64)> = points
        .iter()
        .filter(|p| p.0.is_finite() && p.0 >= 0.0)
        .map(|&(z, y)| (z, f64::from(u8::from(y))))
        .collect();
    if pts.len() < MIN_CURVE_PAIRS {
        return Vec::new();
    }
    pts.sort_by(|a, b| a.0.total_cmp(&b.0).then(b.1.total_cmp(&a.1)));
    let group = (pts.len() / 400).max(50);
    // PAV blocks (sum z, sum y, count), block rates strictly falling
    let mut blocks: Vec<(f64, f64, f64)> = Vec::new();
    for chunk in pts.chunks(group) {
        let (sz, sy) = chunk.iter().fold((0.0, 0.0), |a, p| (a.0 + p.0, a.1 + p.1));
        blocks.push((sz, sy, chunk.len() as f64));
        while blocks.len() >= 2 {
            let n = blocks.len();
            let (a, b) = (blocks[n - 2], blocks[n - 1]);
            if a.1 / a.2 <= b.1 / b.2 {
                blocks[n - 2] = (a.0 + b.0, a.1 + b.1, a.2 + b.2);
                blocks.pop();
            } else {
                break;
            }
        }
    }
    let round = |x: f64| (x * 1e5).round() / 1e5;
    let mut knots: Vec<(f64, f64)> = blocks
        .iter()
        .map(|b| (round(b.0 / b.2), round(b.1 / b.2)))
        .collect();
    knots.dedup_by(|b, a| b.0 <= a.0);
    knots
}

#[cfg(test)]
mod tests {
    use super::*;

    fn curve() -> Vec<(f64, f64)> {
        vec![(0.1, 0.6), (0.5, 0.4), (1.0, 0.2), (2.0, 0.05), (4.0, 0.01)]
    }

    #[test]
    fn curve_is_maximal_at_zero_and_non_increasing() {
        let c = curve();
        let p0 = curve_probability(&c, 0.0).unwrap_or(f64::NAN);
        assert!((p0 - 0.6).abs() < 1e-12);
        let mut last = p0;
        for i in 0..=1000 {
            let z = f64::from(i) * 0.01;
            let p = curve_probability(&c, z).unwrap_or(f64::NAN);
            assert!((0.0..=1.0).contains(&p), "p({z}) = {p}");
            assert!(p <= last + 1e-12, "p rises at z = {z}: {last} -> {p}");
            last = p;
        }
        assert_eq!(curve_probability(&[], 0.3), None);
    }

    #[test]
    fn bad_knots_still_give_a_monotone_bounded_curve() {
        // a curve read from a damaged or hand-edited file: rising, out of range, NaN
        let c = vec![
            (0.0, 0.3),
            (1.0, 0.9),
            (2.0, f64::NAN),
            (3.0, -2.0),
            (4.0, 7.0),
        ];
        let mut last = 1.0;
        for i in 0..=60 {
            let p = curve_probability(&c, f64::from(i) * 0.1).unwrap_or(f64::NAN);
            assert!((0.0..=1.0).contains(&p));
            assert!(p <= last + 1e-12);
            last = p;
        }
        assert!(curve_probability(&c, f64::NAN).is_some_and(|p| p == 0.0));
    }

    #[test]
    fn fitted_curve_follows_a_decreasing_rate() {
        // synthetic pairs: co-elution rate exp(-z) on a grid, deterministic
        let mut pts = Vec::new();
        for i in 0..400 {
            let z = f64::from(i) * 0.01;
            let rate = (-z).exp();
            for k in 0..20 {
                pts.push((z, f64::from(k) / 20.0 < rate));
            }
        }
        let c = fit_curve(&pts);
        assert!(c.len() > 5, "{c:?}");
        assert!(c.windows(2).all(|w| w[0].0 < w[1].0 && w[0].1 > w[1].1));
        for z in [0.2, 1.0, 2.5] {
            let p = curve_probability(&c, z).unwrap_or(f64::NAN);
            assert!((p - (-z).exp()).abs() < 0.08, "p({z}) = {p}");
        }
        assert!(fit_curve(&pts[..50]).is_empty());
    }

    #[test]
    fn sigma_and_ratio() {
        let t = [(0.02, 0.03), (10.0, 0.08)];
        let s = difference_sigma_min(&t, &t, 10.0);
        assert!((s - 0.03 * 2f64.sqrt() * 10.0).abs() < 1e-12);
        assert!((separation_ratio(-0.85, s) - 0.85 / s).abs() < 1e-12);
        assert!(difference_sigma_min(&[], &[], f64::NAN) > 0.0);
        assert_eq!(separation_ratio(f64::INFINITY, 1.0), f64::MAX);
    }

    #[test]
    fn normal_probability_is_monotone_in_the_difference() {
        let mut last = normal_probability(0.0, 0.3, 0.2);
        for i in 1..200 {
            let p = normal_probability(f64::from(i) * 0.01, 0.3, 0.2);
            assert!(p <= last + 1e-12 && (0.0..=1.0).contains(&p));
            last = p;
        }
        assert!((normal_cdf(0.0) - 0.5).abs() < 1e-7);
        // Φ(1.96) = 0.9750 (standard normal table, any statistics handbook)
        assert!((normal_cdf(1.96) - 0.9750).abs() < 1e-4);
    }
}
