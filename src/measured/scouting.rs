//! The steps every two-parameter scouting fit shares, LC (log kw, S; [`super::scout`]) and GC
//! (A, B; [`super::gc_scout`]) alike: the checks a set of runs must pass before a fit (at least
//! two runs, distinct names, programs that differ, the same peaks in every run), gathering each
//! peak's retention times across the runs, the damped Gauss–Newton search
//! (Levenberg–Marquardt; Press et al., "Numerical Recipes", 3rd ed. §15.5, from memory) and the
//! residual scatter that sets the parameters' uncertainty.

use super::peaks::PeakTable;
use super::{all_signatures_equal, first_missing_peak};

/// Why a set of scouting runs cannot be fitted; each fit turns it into its own error type.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum RunSetProblem {
    /// Fewer than two runs.
    TooFewRuns {
        /// Runs given.
        count: usize,
    },
    /// Two runs share a name.
    DuplicateRun {
        /// The repeated name.
        name: String,
    },
    /// The programs do not differ, so the two parameters cannot be separated.
    NotIdentifiable {
        /// Every run's name.
        runs: Vec<String>,
    },
    /// A peak of one run is missing from another.
    MissingPeak {
        /// Peak name.
        peak: String,
        /// Run lacking it.
        run: String,
        /// Run having it.
        present_in: String,
    },
}

/// At least two runs with distinct names; `per_run` adds a check of each run (in order, right
/// after its name is checked), so its error comes where a fit has always reported it.
pub(crate) fn check_run_names<E>(
    names: &[&str],
    mut per_run: impl FnMut(usize) -> Result<(), E>,
    problem: impl Fn(RunSetProblem) -> E,
) -> Result<(), E> {
    if names.len() < 2 {
        return Err(problem(RunSetProblem::TooFewRuns { count: names.len() }));
    }
    for (i, name) in names.iter().enumerate() {
        if names[..i].contains(name) {
            return Err(problem(RunSetProblem::DuplicateRun {
                name: (*name).to_string(),
            }));
        }
        per_run(i)?;
    }
    Ok(())
}

/// The runs can separate the two parameters (their program signatures differ) and every peak
/// of every run is in every other run. `tables` are (run name, peak table) in run order.
pub(crate) fn check_identifiable(
    signatures: &[(f64, f64, f64)],
    tables: &[(&str, &PeakTable)],
) -> Result<(), RunSetProblem> {
    if all_signatures_equal(signatures) {
        return Err(RunSetProblem::NotIdentifiable {
            runs: tables.iter().map(|(n, _)| (*n).to_string()).collect(),
        });
    }
    if let Some((peak, run, present_in)) = first_missing_peak(tables) {
        return Err(RunSetProblem::MissingPeak {
            peak,
            run,
            present_in,
        });
    }
    Ok(())
}

/// For every peak of the first run, in its order: the peak's name and its retention time in
/// each run (run order). `too_early(t)` says a time is at or before the dead (hold-up) time;
/// such a time, or a missing one, is reported through `early(peak, run index, time)`.
pub(crate) fn retention_times<E>(
    tables: &[(&str, &PeakTable)],
    too_early: impl Fn(f64) -> bool,
    early: impl Fn(&str, usize, f64) -> E,
) -> Result<Vec<(String, Vec<f64>)>, E> {
    let Some((_, first)) = tables.first() else {
        return Ok(Vec::new());
    };
    let mut out = Vec::new();
    for peak in first.peaks() {
        let mut times = Vec::with_capacity(tables.len());
        for (i, (_, table)) in tables.iter().enumerate() {
            let tr = table
                .get(&peak.name)
                .map_or(f64::NAN, |p| p.retention_time_min);
            if tr.is_nan() || too_early(tr) {
                return Err(early(&peak.name, i, tr));
            }
            times.push(tr);
        }
        out.push((peak.name.clone(), times));
    }
    Ok(out)
}

/// Root-mean-square residual, and the retention-time error σ behind the parameters'
/// uncertainty: the larger of the assumed error `floor_min` and the residual scatter (n − 2
/// degrees of freedom, only with more than two runs).
pub(crate) fn rms_and_sigma(residuals_min: &[f64], floor_min: f64) -> (f64, f64) {
    let n = residuals_min.len() as f64;
    let rms = (residuals_min.iter().map(|r| r.powi(2)).sum::<f64>() / n).sqrt();
    let sigma = if residuals_min.len() > 2 {
        let ss: f64 = residuals_min.iter().map(|r| r.powi(2)).sum();
        (ss / (n - 2.0)).sqrt().max(floor_min)
    } else {
        floor_min
    };
    (rms, sigma)
}

/// Result of the two-parameter search.
pub(crate) struct LmOutcome {
    /// Parameters at the end.
    pub x: [f64; 2],
    /// Iterations used.
    pub iterations: usize,
    /// Whether the search stopped at a minimum (rather than the iteration limit).
    pub converged: bool,
    /// JᵀJ at the end, upper triangle `[a00, a01, a11]`.
    pub jtj: [f64; 3],
}

/// JᵀJ of a two-column Jacobian, upper triangle `[a00, a01, a11]`.
pub(crate) fn jtj_of(j: &[[f64; 2]]) -> [f64; 3] {
    let mut a = [0.0; 3];
    for r in j {
        a[0] += r[0] * r[0];
        a[1] += r[0] * r[1];
        a[2] += r[1] * r[1];
    }
    a
}

/// Levenberg–Marquardt on two parameters: minimises the sum of squared `residuals(x)` from
/// `start`, with `jacobian(x)` and the parameter box `clamp`; stops when the cost falls below
/// `cost_floor`, when a step changes nothing, or after 200 iterations.
pub(crate) fn levenberg_marquardt(
    start: [f64; 2],
    cost_floor: f64,
    residuals: impl Fn([f64; 2]) -> Vec<f64>,
    jacobian: impl Fn([f64; 2]) -> Vec<[f64; 2]>,
    clamp: impl Fn([f64; 2]) -> [f64; 2],
) -> LmOutcome {
    let cost = |r: &[f64]| r.iter().map(|v| v * v).sum::<f64>();
    let mut x = start;
    let mut r = residuals(x);
    let mut c = cost(&r);
    let mut lambda = 1e-3;
    let mut converged = false;
    let mut it = 0;
    while it < 200 {
        it += 1;
        if c < cost_floor {
            converged = true;
            break;
        }
        let j = jacobian(x);
        let a = jtj_of(&j);
        let g = [
            j.iter().zip(&r).map(|(jr, ri)| jr[0] * ri).sum::<f64>(),
            j.iter().zip(&r).map(|(jr, ri)| jr[1] * ri).sum::<f64>(),
        ];
        let mut improved = false;
        for _ in 0..30 {
            let a00 = a[0] * (1.0 + lambda) + 1e-300;
            let a11 = a[2] * (1.0 + lambda) + 1e-300;
            let det = a00 * a11 - a[1] * a[1];
            if det.abs() < 1e-300 || !det.is_finite() {
                lambda *= 10.0;
                continue;
            }
            let dx = [
                -(a11 * g[0] - a[1] * g[1]) / det,
                -(-a[1] * g[0] + a00 * g[1]) / det,
            ];
            let xn = clamp([x[0] + dx[0], x[1] + dx[1]]);
            let rn = residuals(xn);
            let cn = cost(&rn);
            if cn.is_finite() && cn < c {
                let step = ((xn[0] - x[0]).abs() / x[0].abs().max(1.0))
                    .max((xn[1] - x[1]).abs() / x[1].abs().max(1.0));
                let rel_drop = (c - cn) / c.max(1e-300);
                x = xn;
                r = rn;
                c = cn;
                lambda = (lambda / 10.0).max(1e-12);
                improved = true;
                if step < 1e-12 || rel_drop < 1e-14 {
                    converged = true;
                }
                break;
            }
            lambda *= 10.0;
        }
        if !improved {
            // No downhill step at any damping: at a (local) minimum.
            converged = true;
            break;
        }
        if converged {
            break;
        }
    }
    LmOutcome {
        x,
        iterations: it,
        converged,
        jtj: jtj_of(&jacobian(x)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn search_finds_the_minimum_of_a_linear_least_squares_problem() {
        // y = 2 + 3 x at x = 0, 1, 2, 3 (exact): the search must return (2, 3).
        let xs = [0.0, 1.0, 2.0, 3.0];
        let res = |p: [f64; 2]| {
            xs.iter()
                .map(|x| p[0] + p[1] * x - (2.0 + 3.0 * x))
                .collect()
        };
        let jac = |_: [f64; 2]| xs.iter().map(|x| [1.0, *x]).collect();
        let out = levenberg_marquardt([0.0, 0.0], 1e-26, res, jac, |p| p);
        assert!(out.converged);
        assert!((out.x[0] - 2.0).abs() < 1e-8 && (out.x[1] - 3.0).abs() < 1e-8);
        // JᵀJ of [1, x]: n, Σx, Σx²
        assert_eq!(out.jtj, [4.0, 6.0, 14.0]);
    }

    #[test]
    fn sigma_is_the_floor_with_two_runs_and_the_scatter_beyond() {
        let (rms, sigma) = rms_and_sigma(&[0.03, -0.04], 0.01);
        assert!((rms - (0.0025f64 / 2.0).sqrt()).abs() < 1e-12);
        assert_eq!(sigma, 0.01);
        let (_, sigma) = rms_and_sigma(&[0.03, -0.04, 0.0], 0.01);
        assert!((sigma - 0.05).abs() < 1e-12);
        let (_, sigma) = rms_and_sigma(&[0.001, -0.001, 0.0], 0.01);
        assert_eq!(sigma, 0.01);
    }

    #[test]
    fn run_checks_report_in_order() {
        let a = PeakTable::parse("name,rt,wb\nx,2.0,0.1\n").unwrap();
        let err = |p| p;
        assert_eq!(
            check_run_names(&["r1"], |_| Ok(()), err),
            Err(RunSetProblem::TooFewRuns { count: 1 })
        );
        assert_eq!(
            check_run_names(&["r1", "r1"], |_| Ok(()), err),
            Err(RunSetProblem::DuplicateRun { name: "r1".into() })
        );
        // the per-run check of run 0 comes before the duplicate found at run 1
        let first = check_run_names(
            &["r1", "r1"],
            |i| Err(RunSetProblem::TooFewRuns { count: 100 + i }),
            err,
        );
        assert_eq!(first, Err(RunSetProblem::TooFewRuns { count: 100 }));
        assert_eq!(
            check_identifiable(
                &[(1.0, 2.0, 3.0), (1.0, 2.0, 3.0)],
                &[("r1", &a), ("r2", &a)]
            ),
            Err(RunSetProblem::NotIdentifiable {
                runs: vec!["r1".into(), "r2".into()]
            })
        );
        let times = retention_times(&[("r1", &a), ("r2", &a)], |t| t <= 1.0, |_, _, _| ()).unwrap();
        assert_eq!(times, vec![("x".to_string(), vec![2.0, 2.0])]);
        assert_eq!(
            retention_times(&[("r1", &a)], |t| t <= 2.0, |p, i, t| (p.to_string(), i, t)),
            Err(("x".to_string(), 0, 2.0))
        );
    }
}
