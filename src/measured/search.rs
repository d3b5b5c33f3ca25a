//! The selection rule and the local search shared by the optimisers: [`Score`] orders two
//! conditions the same way for the LC gradient optimiser ([`super::optimise`]) and the GC oven
//! optimiser ([`super::gc_optimise`]), and [`compass_search`] refines a grid optimum by
//! coordinate steps that halve when no move improves (compass search; Kolda, Lewis & Torczon,
//! SIAM Review 45 (2003) 385, from memory).

/// Score for comparison; see the module documentation for the rule.
/// Also used by the GC optimiser ([`crate::measured::gc_optimise`]), so both apply one rule.
#[derive(Debug, Clone, Copy, PartialEq)]
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

    /// A total order that ranks conditions as [`Score::better_than`] does, but with exact
    /// comparisons (`f64::total_cmp`), for sorting: the tolerances of `better_than` make it
    /// intransitive (a ≈ b and b ≈ c while a ≠ c), and a sort given such a comparison may
    /// panic ("does not correctly implement a total order"); found with a table of 10,001
    /// invented analytes (issue 16). Best first.
    pub(crate) fn rank_cmp(&self, o: &Score) -> std::cmp::Ordering {
        use std::cmp::Ordering;
        o.feasible
            .cmp(&self.feasible)
            .then_with(|| {
                if self.feasible {
                    Ordering::Equal
                } else {
                    self.run.total_cmp(&o.run)
                }
            })
            .then_with(|| o.retained.cmp(&self.retained))
            .then_with(|| o.meets.cmp(&self.meets))
            .then_with(|| {
                if self.meets {
                    self.run
                        .total_cmp(&o.run)
                        .then_with(|| o.min_rs.total_cmp(&self.min_rs))
                } else {
                    o.min_rs
                        .total_cmp(&self.min_rs)
                        .then_with(|| self.run.total_cmp(&o.run))
                }
            })
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
    use proptest::prelude::*;

    /// Scores whose numbers are either on a coarse grid (`fine` false) or 1e-10 apart, inside
    /// the tolerances of `better_than` (`fine` true).
    fn any_score(fine: bool) -> impl Strategy<Value = Score> {
        let v = if fine {
            (0u32..4).prop_map(|i| 1.0 + f64::from(i) * 1e-10).boxed()
        } else {
            (0u32..40).prop_map(|i| f64::from(i) * 0.5).boxed()
        };
        (any::<bool>(), any::<bool>(), any::<bool>(), v.clone(), v).prop_map(
            |(feasible, retained, meets, min_rs, run)| Score {
                feasible,
                retained,
                meets,
                min_rs,
                run,
            },
        )
    }

    proptest! {
        /// `rank_cmp` is a total order (antisymmetric and transitive) even for numbers inside
        /// the tolerances of `better_than`, so a sort with it cannot panic.
        #[test]
        fn rank_cmp_is_a_total_order(
            a in any_score(true), b in any_score(true), c in any_score(true),
            d in any_score(false), e in any_score(false),
        ) {
            use std::cmp::Ordering::*;
            let all = [a, b, c, d, e];
            for x in &all {
                for y in &all {
                    prop_assert_eq!(x.rank_cmp(y), y.rank_cmp(x).reverse());
                    for z in &all {
                        if x.rank_cmp(y) != Greater && y.rank_cmp(z) != Greater {
                            prop_assert_ne!(x.rank_cmp(z), Greater);
                        }
                    }
                }
            }
            let mut v = all.to_vec();
            v.sort_by(Score::rank_cmp);
        }

        /// Outside the tolerances it ranks as `better_than` does: the best comes first.
        #[test]
        fn rank_cmp_agrees_with_better_than(a in any_score(false), b in any_score(false)) {
            if a.better_than(&b) {
                prop_assert_eq!(a.rank_cmp(&b), std::cmp::Ordering::Less);
            }
            if b.better_than(&a) {
                prop_assert_eq!(a.rank_cmp(&b), std::cmp::Ordering::Greater);
            }
        }
    }

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
