//! The selection rule and the local search shared by the optimisers: [`Score`] orders two
//! conditions the same way for the LC gradient optimiser ([`super::optimise`]) and the GC oven
//! optimiser ([`super::gc_optimise`]), and [`compass_search`] refines a grid optimum by
//! coordinate steps that halve when no move improves (compass search; Kolda, Lewis & Torczon,
//! SIAM Review 45 (2003) 385, from memory).

/// Score for comparison; see the module documentation for the rule.
/// Also used by the GC optimiser ([`crate::measured::gc_optimise`]), so both apply one rule.
#[derive(Clone, Copy, PartialEq)]
pub(crate) struct Score {
    /// Every peak out within the maximum run time and a finite smallest resolution.
    pub(crate) feasible: bool,
    /// First peak at k ≥ the minimum.
    pub(crate) retained: bool,
    /// Smallest resolution meets the target.
    pub(crate) meets: bool,
    pub(crate) min_rs: f64,
    pub(crate) run: f64,
}

/// Run times closer than this count as equal, min (well below the 0.1 min program step).
const RUN_TIE_MIN: f64 = 1e-9;

impl Score {
    pub(crate) fn better_than(&self, o: &Score) -> bool {
        if self.feasible != o.feasible {
            return self.feasible;
        }
        if !self.feasible {
            return self.run < o.run;
        }
        if self.retained != o.retained {
            return self.retained;
        }
        if self.meets != o.meets {
            return self.meets;
        }
        if self.meets {
            // Shortest adequate run, then the larger smallest resolution.
            if (self.run - o.run).abs() > RUN_TIE_MIN {
                return self.run < o.run;
            }
            return self.min_rs > o.min_rs + 1e-9;
        }
        if (self.min_rs - o.min_rs).abs() > 1e-9 {
            return self.min_rs > o.min_rs;
        }
        self.run < o.run - RUN_TIE_MIN
    }

    /// Better by a margin worth a harder-to-run program (two-segment gradient): 0.1 min shorter
    /// when both meet the target, 0.01 higher smallest Rs when neither does (common practice,
    /// no source).
    pub(crate) fn clearly_better_than(&self, o: &Score) -> bool {
        if !self.better_than(o) {
            return false;
        }
        if self.feasible != o.feasible || self.retained != o.retained || self.meets != o.meets {
            return true;
        }
        if self.meets {
            self.run < o.run - 0.1
        } else {
            self.min_rs > o.min_rs + 0.01
        }
    }
}

/// Compass search from `start` (its score and point) in the box `lo`..=`hi`: tries a step up and
/// down along each coordinate in turn, keeps every move that `evaluate` scores better, halves
/// all steps after a round without a move, and stops when `fine_enough(steps)` or after
/// `rounds` rounds. Points `evaluate` cannot score (`None`) are never taken.
pub(crate) fn compass_search<const D: usize>(
    start: (Score, [f64; D]),
    lo: &[f64; D],
    hi: &[f64; D],
    mut step: [f64; D],
    rounds: usize,
    mut evaluate: impl FnMut(&[f64; D]) -> Option<Score>,
    fine_enough: impl Fn(&[f64; D]) -> bool,
) -> (Score, [f64; D]) {
    let (mut s, mut x) = start;
    for _ in 0..rounds {
        let mut moved = false;
        for d in 0..D {
            for sign in [1.0, -1.0] {
                let mut y = x;
                y[d] = (y[d] + sign * step[d]).clamp(lo[d], hi[d]);
                if y == x {
                    continue;
                }
                if let Some(sy) = evaluate(&y)
                    && sy.better_than(&s)
                {
                    s = sy;
                    x = y;
                    moved = true;
                }
            }
        }
        if !moved {
            step.iter_mut().for_each(|v| *v /= 2.0);
            if fine_enough(&step) {
                break;
            }
        }
    }
    (s, x)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn score(min_rs: f64, run: f64) -> Score {
        Score {
            feasible: true,
            retained: true,
            meets: false,
            min_rs,
            run,
        }
    }

    #[test]
    fn compass_search_climbs_to_the_box_optimum() {
        // Smallest Rs peaks at (2, -1) inside the box; the search must find it from (0, 0).
        let f = |x: &[f64; 2]| {
            Some(score(
                10.0 - (x[0] - 2.0).powi(2) - (x[1] + 1.0).powi(2),
                1.0,
            ))
        };
        let start = (f(&[0.0, 0.0]).unwrap(), [0.0, 0.0]);
        let (s, x) = compass_search(
            start,
            &[-5.0, -5.0],
            &[5.0, 5.0],
            [1.0, 1.0],
            200,
            f,
            |st| st[0] < 1e-6,
        );
        assert!(
            (x[0] - 2.0).abs() < 1e-5 && (x[1] + 1.0).abs() < 1e-5,
            "{x:?}"
        );
        assert!((s.min_rs - 10.0).abs() < 1e-9);
        // With the optimum outside the box, the search stops on the box edge.
        let (_, x) = compass_search(
            start,
            &[-5.0, -5.0],
            &[1.0, 5.0],
            [1.0, 1.0],
            200,
            f,
            |st| st[0] < 1e-6,
        );
        assert_eq!(x[0], 1.0);
    }

    #[test]
    fn unscorable_points_are_never_taken() {
        let f = |x: &[f64; 1]| (x[0] <= 0.0).then(|| score(-x[0], 1.0));
        let start = (f(&[0.0]).unwrap(), [0.0]);
        let (_, x) = compass_search(start, &[-3.0], &[3.0], [1.0], 50, f, |st| st[0] < 1e-3);
        assert_eq!(x[0], -3.0);
    }
}
