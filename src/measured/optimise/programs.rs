//! The candidate programs the gradient optimiser tries, on the 0.1 min / 0.1 % grid that
//! programs are written on: the search ranges (checked and moved inwards onto the grid), the
//! grid points, and the linear and two-segment programs built from a point.

use super::{OptimiseError, Range};
use crate::model::gradient::{GradientPoint, GradientProgram};

/// Rounds to the 0.1 step (min or %) in which programs are written and evaluated.
pub fn round_to_tenth(x: f64) -> f64 {
    (x * 10.0).round() / 10.0
}

pub(super) fn check_range(
    name: &'static str,
    r: Range,
    lo: f64,
    hi: f64,
) -> Result<(), OptimiseError> {
    if !r.min.is_finite() || !r.max.is_finite() {
        return Err(OptimiseError::BadRange {
            name,
            min: r.min,
            max: r.max,
            reason: "not finite",
        });
    }
    if r.min > r.max {
        return Err(OptimiseError::BadRange {
            name,
            min: r.min,
            max: r.max,
            reason: "min is above max",
        });
    }
    if r.min < lo || r.max > hi {
        return Err(OptimiseError::BadRange {
            name,
            min: r.min,
            max: r.max,
            reason: if lo == 0.0 && hi == 100.0 {
                "compositions must lie in 0–100 %"
            } else {
                "must be positive"
            },
        });
    }
    Ok(())
}

/// The range with its ends moved inwards onto the 0.1 grid of programs.
pub(super) fn tenth_range(name: &'static str, r: Range) -> Result<Range, OptimiseError> {
    let min = ((r.min * 10.0 - 1e-9).ceil() / 10.0).max(if name == "gradient_time_min" {
        0.1
    } else {
        0.0
    });
    let max = (r.max * 10.0 + 1e-9).floor() / 10.0;
    if min > max {
        return Err(OptimiseError::BadRange {
            name,
            min: r.min,
            max: r.max,
            reason: "narrower than the 0.1 step in which programs are written",
        });
    }
    Ok(Range { min, max })
}

pub(super) fn linspace(r: Range, n: usize) -> Vec<f64> {
    if n < 2 || r.max == r.min {
        return vec![r.min];
    }
    (0..n)
        .map(|i| r.min + (r.max - r.min) * i as f64 / (n - 1) as f64)
        .collect()
}

pub(super) fn steps(r: Range, step: f64) -> Vec<f64> {
    let mut v = Vec::new();
    let mut x = r.min;
    while x < r.max - 1e-9 {
        v.push(x);
        x += step;
    }
    v.push(r.max);
    v
}

/// Linear program on the 0.1 min / 0.1 % grid, or None when the composition would not rise.
pub(super) fn linear(initial: f64, final_: f64, tg: f64) -> Option<GradientProgram> {
    let (initial, final_, tg) = (
        round_to_tenth(initial),
        round_to_tenth(final_),
        round_to_tenth(tg),
    );
    if final_ <= initial || tg <= 0.0 {
        return None;
    }
    GradientProgram::linear(initial, final_, tg).ok()
}

pub(super) fn two_segment(
    initial: f64,
    knee_frac_t: f64,
    knee_pct: f64,
    final_: f64,
    tg: f64,
) -> Option<GradientProgram> {
    let (initial, knee_pct, final_, tg) = (
        round_to_tenth(initial),
        round_to_tenth(knee_pct),
        round_to_tenth(final_),
        round_to_tenth(tg),
    );
    let tk = round_to_tenth(tg * knee_frac_t);
    if !(initial <= knee_pct && knee_pct <= final_ && final_ > initial && tk > 0.0 && tk < tg) {
        return None;
    }
    GradientProgram::from_points(&[
        GradientPoint {
            time_min: 0.0,
            organic_pct: initial,
        },
        GradientPoint {
            time_min: tk,
            organic_pct: knee_pct,
        },
        GradientPoint {
            time_min: tg,
            organic_pct: final_,
        },
    ])
    .ok()
}

/// A note for each chosen program setting that sits on an edge of its searched range: what
/// lies beyond was not tried, so the optimum may lie there. `settings` are (words, unit, chosen
/// value, searched range).
pub(super) fn edge_notes(settings: &[(&str, &str, f64, Range)]) -> Vec<String> {
    use crate::measured::window_plot::{Edge, edge_of};
    settings
        .iter()
        .filter_map(|&(what, unit, x, r)| {
            let side = match edge_of(x, r.min, r.max)? {
                Edge::Lower => "lower",
                Edge::Upper => "upper",
            };
            Some(format!(
                "the chosen {what} ({x:.1} {unit}) is at the {side} edge of the searched range \
                 ({:.1}–{:.1} {unit}): values beyond it were not tried; widen the range to see \
                 whether they do better",
                r.min, r.max
            ))
        })
        .collect()
}
