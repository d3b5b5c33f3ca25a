//! Projection of predicted retention times onto the user's own system from calibrants:
//! compounds the user measured on that column and gradient. The map from predicted to measured
//! time is monotone (non-decreasing): the mean of a least-squares line (slope kept positive)
//! and the isotonic (pool-adjacent-violators) fit of measured on predicted time, interpolated
//! linearly between the pooled calibrant points and continued beyond them with the line's
//! slope. The line carries the system-wide offset and stretch, the isotonic part the local
//! shape of the user's gradient, and their mean is monotone because both are. The interval of a
//! projected time comes from the leave-one-out residuals of the calibrants (split-conformal
//! style: the ⌈0.9 (n + 1)⌉-th smallest absolute residual, the largest when there are too few;
//! Vovk et al., "Algorithmic learning in a random world", 2005, from memory). The choice of the
//! map was made on the open retention data (docs/model.md, "Calibration to the user's system").

/// Fewest usable calibrants a projection accepts.
pub const MIN_CALIBRANTS: usize = 5;

/// Smallest slope of the line (measured min per predicted min); a flatter fit would squash the
/// predictions onto one time (common practice, no source).
const MIN_SLOPE: f64 = 0.05;

/// Why a projection could not be fitted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ProjectionError {
    /// Fewer usable calibrants than `MIN_CALIBRANTS`.
    #[error("{0} usable calibrants; at least {MIN_CALIBRANTS} are needed")]
    TooFew(usize),
    /// A time that is not a finite non-negative number.
    #[error("calibrant time {0} is not a finite number of minutes >= 0")]
    BadTime(f64),
    /// All calibrants predicted at one time: no map can be fitted.
    #[error("all calibrants are predicted at the same time ({0} min); the map needs a spread")]
    NoSpread(f64),
}

/// Which monotone map.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MapKind {
    /// Least-squares line only.
    Line,
    /// Isotonic interpolation only (line slope beyond the calibrants).
    Isotonic,
    /// Mean of the two (the shipped choice).
    Blend,
}

/// A fitted projection.
#[derive(Debug, Clone, PartialEq)]
pub struct Projection {
    kind: MapKind,
    intercept: f64,
    slope: f64,
    /// Pooled calibrant points (predicted, measured), predicted strictly increasing.
    knots: Vec<(f64, f64)>,
    /// Leave-one-out residuals (measured − projected), one per calibrant, in input order.
    loo_residuals: Vec<f64>,
    /// Half-width of the 90 % interval, min.
    half_width_min: f64,
    /// Range of the calibrants' predicted times, min.
    range: (f64, f64),
}

/// A projected time.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Projected {
    /// Projected retention time, min.
    pub rt_min: f64,
    /// 90 % interval, min.
    pub interval_min: (f64, f64),
    /// True when the predicted time lies outside the calibrants' range (extrapolated).
    pub extrapolated: bool,
}

impl Projection {
    /// Fits the shipped map (`MapKind::Blend`) to `(predicted, measured)` pairs in minutes.
    ///
    /// # Errors
    /// `TooFew`, `BadTime`, `NoSpread`.
    pub fn fit(pairs: &[(f64, f64)]) -> Result<Self, ProjectionError> {
        Self::fit_kind(pairs, MapKind::Blend)
    }

    /// Fits a map of the given kind (for the evaluation of the choice).
    ///
    /// # Errors
    /// `TooFew`, `BadTime`, `NoSpread`.
    pub fn fit_kind(pairs: &[(f64, f64)], kind: MapKind) -> Result<Self, ProjectionError> {
        for &(p, m) in pairs {
            for t in [p, m] {
                if !(t.is_finite() && t >= 0.0) {
                    return Err(ProjectionError::BadTime(t));
                }
            }
        }
        if pairs.len() < MIN_CALIBRANTS {
            return Err(ProjectionError::TooFew(pairs.len()));
        }
        let mut proj = Self::fit_core(pairs, kind)?;
        let loo: Vec<f64> = (0..pairs.len())
            .map(|i| {
                let rest: Vec<(f64, f64)> = pairs
                    .iter()
                    .enumerate()
                    .filter(|&(j, _)| j != i)
                    .map(|(_, &x)| x)
                    .collect();
                // leaving out one of few spread calibrants can leave no spread: then the
                // residual is taken against the full fit (smaller, so said as approximate)
                let map = Self::fit_core(&rest, kind).unwrap_or_else(|_| proj.clone());
                pairs[i].1 - map.map(pairs[i].0)
            })
            .collect();
        let mut abs: Vec<f64> = loo.iter().map(|r| r.abs()).collect();
        abs.sort_by(f64::total_cmp);
        let rank = (0.9 * (abs.len() as f64 + 1.0)).ceil() as usize;
        proj.half_width_min = abs[rank.clamp(1, abs.len()) - 1];
        proj.loo_residuals = loo;
        Ok(proj)
    }

    fn fit_core(pairs: &[(f64, f64)], kind: MapKind) -> Result<Self, ProjectionError> {
        let n = pairs.len() as f64;
        let (mx, my) = pairs
            .iter()
            .fold((0.0, 0.0), |a, p| (a.0 + p.0 / n, a.1 + p.1 / n));
        let sxx: f64 = pairs.iter().map(|p| (p.0 - mx).powi(2)).sum();
        let sxy: f64 = pairs.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
        let lo = pairs.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
        let hi = pairs.iter().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
        if sxx <= 1e-12 * (1.0 + mx * mx) || hi - lo <= 1e-9 {
            return Err(ProjectionError::NoSpread(mx));
        }
        let slope = (sxy / sxx).max(MIN_SLOPE);
        let intercept = my - slope * mx;
        // isotonic fit of measured on predicted (ties of predicted pooled first)
        let mut sorted = pairs.to_vec();
        sorted.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
        let mut blocks: Vec<(f64, f64, f64)> = Vec::new();
        for (x, y) in sorted {
            blocks.push((x, y, 1.0));
            while blocks.len() >= 2 {
                let k = blocks.len();
                let (a, b) = (blocks[k - 2], blocks[k - 1]);
                let same_x = (a.0 / a.2 - b.0 / b.2).abs() < 1e-9;
                if a.1 / a.2 >= b.1 / b.2 || same_x {
                    blocks[k - 2] = (a.0 + b.0, a.1 + b.1, a.2 + b.2);
                    blocks.pop();
                } else {
                    break;
                }
            }
        }
        let knots = blocks.iter().map(|b| (b.0 / b.2, b.1 / b.2)).collect();
        Ok(Projection {
            kind,
            intercept,
            slope,
            knots,
            loo_residuals: Vec::new(),
            half_width_min: 0.0,
            range: (lo, hi),
        })
    }

    fn line(&self, t: f64) -> f64 {
        self.intercept + self.slope * t
    }

    fn isotonic(&self, t: f64) -> f64 {
        let (Some(&(x0, y0)), Some(&(xn, yn))) = (self.knots.first(), self.knots.last()) else {
            return self.line(t);
        };
        if t <= x0 {
            return y0 + self.slope * (t - x0);
        }
        if t >= xn {
            return yn + self.slope * (t - xn);
        }
        for w in self.knots.windows(2) {
            let ((xa, ya), (xb, yb)) = (w[0], w[1]);
            if t <= xb {
                return ya + (yb - ya) * (t - xa) / (xb - xa);
            }
        }
        yn
    }

    /// The map itself: projected time for a predicted time (min). Non-decreasing in `t`.
    pub fn map(&self, t: f64) -> f64 {
        match self.kind {
            MapKind::Line => self.line(t),
            MapKind::Isotonic => self.isotonic(t),
            MapKind::Blend => 0.5 * (self.line(t) + self.isotonic(t)),
        }
    }

    /// Projects a predicted time (min), with the 90 % interval from the leave-one-out
    /// residuals. Projected times are never negative.
    pub fn project(&self, predicted_min: f64) -> Projected {
        let t = self.map(predicted_min).max(0.0);
        Projected {
            rt_min: t,
            interval_min: ((t - self.half_width_min).max(0.0), t + self.half_width_min),
            extrapolated: predicted_min < self.range.0 - 1e-9
                || predicted_min > self.range.1 + 1e-9,
        }
    }

    /// Leave-one-out residuals (measured − projected, min), one per calibrant in input order.
    pub fn loo_residuals(&self) -> &[f64] {
        &self.loo_residuals
    }

    /// Half-width of the 90 % interval (min).
    pub fn half_width_min(&self) -> f64 {
        self.half_width_min
    }

    /// Range of the calibrants' predicted times (min).
    pub fn range_min(&self) -> (f64, f64) {
        self.range
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Invented calibrants: predicted times and the times a system 0.8 min late and 10 %
    // stretched would give, with ±0.05 min of noise (invented data, for the test only).
    fn pairs() -> Vec<(f64, f64)> {
        let noise = [
            0.03, -0.05, 0.02, 0.0, -0.04, 0.05, -0.01, 0.04, -0.02, 0.01,
        ];
        (0..10)
            .map(|i| {
                let p = 2.0 + 1.7 * f64::from(i);
                (p, 0.8 + 1.1 * p + noise[i as usize])
            })
            .collect()
    }

    #[test]
    fn map_is_monotone_for_every_kind() {
        // the measured order disagrees with the predicted one in places
        let mut pts = pairs();
        pts[3].1 = pts[5].1 + 0.4;
        pts[7].1 = pts[6].1 - 0.3;
        for kind in [MapKind::Line, MapKind::Isotonic, MapKind::Blend] {
            let p = Projection::fit_kind(&pts, kind);
            assert!(p.is_ok(), "{kind:?}: {p:?}");
            let Ok(p) = p else { return };
            let mut last = f64::NEG_INFINITY;
            for i in 0..=400 {
                let t = -5.0 + f64::from(i) * 0.1;
                let y = p.map(t);
                assert!(y >= last - 1e-12, "{kind:?} falls at {t}: {last} -> {y}");
                last = y;
            }
        }
    }

    #[test]
    fn exact_on_calibrants_within_noise() {
        let pts = pairs();
        let Ok(p) = Projection::fit(&pts) else {
            panic!("fit failed")
        };
        for &(pred, meas) in &pts {
            assert!(
                (p.project(pred).rt_min - meas).abs() < 0.1,
                "{pred}: {meas}"
            );
        }
        // between calibrants the map follows the system's offset and stretch
        let t = 10.0;
        assert!((p.project(t).rt_min - (0.8 + 1.1 * t)).abs() < 0.1);
        // the interval covers the noise and is narrow
        let hw = p.half_width_min();
        assert!((0.04..0.3).contains(&hw), "half width {hw}");
        assert_eq!(p.loo_residuals().len(), pts.len());
        assert!(!p.project(t).extrapolated);
        assert!(p.project(40.0).extrapolated);
    }

    #[test]
    fn bad_inputs_are_refused() {
        let pts = pairs();
        assert_eq!(
            Projection::fit(&pts[..3]).err(),
            Some(ProjectionError::TooFew(3))
        );
        let mut bad = pts.clone();
        bad[2].1 = f64::NAN;
        assert!(matches!(
            Projection::fit(&bad),
            Err(ProjectionError::BadTime(_))
        ));
        let flat: Vec<(f64, f64)> = (0..6).map(|i| (5.0, f64::from(i))).collect();
        assert!(matches!(
            Projection::fit(&flat),
            Err(ProjectionError::NoSpread(_))
        ));
    }

    #[test]
    fn projected_times_are_never_negative() {
        let pts: Vec<(f64, f64)> = (0..6)
            .map(|i| (10.0 + f64::from(i), 0.5 + 3.0 * f64::from(i)))
            .collect();
        let Ok(p) = Projection::fit(&pts) else {
            panic!("fit failed")
        };
        let r = p.project(0.0);
        assert!(r.rt_min >= 0.0 && r.interval_min.0 >= 0.0 && r.extrapolated);
    }
}
