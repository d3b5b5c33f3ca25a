//! Scouting-run fitting: from two or more runs of the same sample under gradients that differ
//! (typically in gradient time), fit each analyte's LSS parameters log kw and S so that the
//! predicted retention times ([`gradient_elution`]) match the measured ones.
//!
//! Method: the classic two-run estimate gives the start — at elution the band's retention
//! factor is k_e ≈ 1/(2.3 b) (SD 2007 ch. 2), so with φ_e the composition reaching the band at
//! elution, log kw − S φ_e,i = −log10(2.3 t0 S (dφ/dt)_i) for each run i; two runs give S in
//! closed form. The estimate is then refined by Levenberg–Marquardt on the squared retention
//! residuals (with two runs the system is square and this is a damped Newton solve to zero
//! residual). Parameter uncertainties are from (JᵀJ)⁻¹ scaled by an assumed retention-time
//! error of 0.01 min (common practice for run-to-run repeatability, no source) or the fit's own
//! residual scatter if larger.
//!
//! No published two-run worked example is reproduced here; the tests are self-consistency only
//! (simulate runs from known invented parameters, fit, recover).

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::measured::DeadTimeInput;
use crate::measured::peaks::PeakTable;
use crate::measured::scouting::{
    RunSetProblem, check_identifiable, check_run_names, levenberg_marquardt, retention_times,
    rms_and_sigma,
};
use crate::model::gradient::{
    ElutionPhase, GradientError, GradientProgram, GradientSystem, LssParameters, gradient_elution,
};
use crate::model::theory::{self, TheoryError};

/// Assumed retention-time measurement error for the uncertainty estimate, min (common
/// practice, no source).
pub const RETENTION_ERROR_MIN: f64 = 0.01;
/// RMS residual above which a fit is flagged, min (common practice, no source).
pub const LARGE_RESIDUAL_MIN: f64 = 0.05;
/// Plausible range of S for small molecules to peptides (SD 2007 ch. 1, from memory).
pub const S_RANGE: (f64, f64) = (1.0, 60.0);

/// Errors from scouting-run fitting.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum ScoutError {
    /// Fewer than two runs.
    #[error("need at least 2 scouting runs, got {count}")]
    TooFewRuns {
        /// Runs given.
        count: usize,
    },
    /// Two runs share a name.
    #[error("two scouting runs are both named `{name}`; give each run its own name")]
    DuplicateRun {
        /// The name.
        name: String,
    },
    /// The runs do not differ in gradient steepness or start.
    #[error(
        "parameters not identifiable: runs {runs:?} have the same gradient (same start and slope); \
         use gradient times that differ by a factor of 2–3"
    )]
    NotIdentifiable {
        /// Names of the runs.
        runs: Vec<String>,
    },
    /// A peak is missing from a run.
    #[error(
        "peak `{peak}` is missing from run `{run}` (it is in run `{present_in}`); match names across runs"
    )]
    MissingPeak {
        /// The peak.
        peak: String,
        /// The run lacking it.
        run: String,
        /// A run that has it.
        present_in: String,
    },
    /// A peak elutes before t0.
    #[error(
        "peak `{peak}` in run `{run}` at {retention_time_min} min elutes before the dead time {dead_time_min} min"
    )]
    PeakBeforeDeadTime {
        /// Peak.
        peak: String,
        /// Run.
        run: String,
        /// Retention time, min.
        retention_time_min: f64,
        /// Dead time, min.
        dead_time_min: f64,
    },
    /// Flow given twice with different values.
    #[error(
        "flow {flow_ml_min} mL/min differs from the {column_flow_ml_min} mL/min used for the dead \
         time; give one flow (check units: mL/min)"
    )]
    InconsistentFlow {
        /// `flow_ml_min` field.
        flow_ml_min: f64,
        /// Flow in the dead-time input.
        column_flow_ml_min: f64,
    },
    /// A dwell volume without a flow to convert it.
    #[error(
        "dwell volume {dwell_volume_ml} mL needs a flow rate (mL/min) to become a dwell time; give the flow"
    )]
    FlowNeeded {
        /// Dwell volume, mL.
        dwell_volume_ml: f64,
    },
    /// A quantity failed validation.
    #[error(transparent)]
    Theory(#[from] TheoryError),
    /// A gradient calculation failed.
    #[error(transparent)]
    Gradient(#[from] GradientError),
}

impl From<RunSetProblem> for ScoutError {
    fn from(p: RunSetProblem) -> Self {
        match p {
            RunSetProblem::TooFewRuns { count } => ScoutError::TooFewRuns { count },
            RunSetProblem::DuplicateRun { name } => ScoutError::DuplicateRun { name },
            RunSetProblem::NotIdentifiable { runs } => ScoutError::NotIdentifiable { runs },
            RunSetProblem::MissingPeak {
                peak,
                run,
                present_in,
            } => ScoutError::MissingPeak {
                peak,
                run,
                present_in,
            },
        }
    }
}

/// One scouting run: its gradient program and measured peaks.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ScoutRun {
    /// Run name (unique).
    pub name: String,
    /// Gradient program, `"t:%organic,..."`.
    pub program: GradientProgram,
    /// Measured peaks (only names and retention times are used).
    pub peaks: PeakTable,
}

/// A scouting-fit request.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ScoutRequest {
    /// Two or more runs of the same sample at the same flow.
    pub runs: Vec<ScoutRun>,
    /// Dead time source.
    pub dead_time: DeadTimeInput,
    /// Dwell (gradient delay) volume, mL; default 0.
    #[serde(default)]
    pub dwell_volume_ml: f64,
    /// Flow, mL/min; needed for a non-zero dwell volume when t0 is given directly.
    #[serde(default)]
    pub flow_ml_min: Option<f64>,
}

/// One run's residual for one analyte.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RunResidual {
    /// Run name.
    pub run: String,
    /// Measured retention time, min.
    pub measured_min: f64,
    /// Predicted by the fitted parameters, min.
    pub predicted_min: f64,
    /// predicted − measured, min.
    pub residual_min: f64,
    /// Phase of the run in which the analyte is predicted to elute.
    pub phase: ElutionPhase,
}

/// Why a fit is poorly determined.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "flag", rename_all = "snake_case")]
pub enum FitFlag {
    /// S outside [`S_RANGE`].
    SOutsideRange {
        /// Fitted S.
        s: f64,
    },
    /// Eluted before the gradient reached it in this run: the run carries no information on S.
    ElutedBeforeGradient {
        /// Run.
        run: String,
    },
    /// Eluted after the gradient ended in this run.
    ElutedAfterGradient {
        /// Run.
        run: String,
    },
    /// RMS residual above [`LARGE_RESIDUAL_MIN`].
    LargeResidual {
        /// RMS residual, min.
        rms_min: f64,
    },
    /// A 0.01 min retention error moves S by more than 20 %.
    IllConditioned {
        /// Relative 1σ uncertainty of S.
        s_relative_uncertainty: f64,
    },
    /// The solver stopped without converging.
    NotConverged,
}

/// Fitted LSS parameters for one analyte.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AnalyteFit {
    /// Analyte name.
    pub name: String,
    /// Fitted log10 kw.
    pub log_kw: f64,
    /// Fitted S.
    pub s: f64,
    /// 1σ uncertainty of log kw (see module docs).
    pub log_kw_uncertainty: f64,
    /// 1σ uncertainty of S.
    pub s_uncertainty: f64,
    /// Correlation of log kw and S estimates.
    pub correlation: f64,
    /// Start values from the two-run closed form (log kw, S).
    pub start_log_kw: f64,
    /// Start S.
    pub start_s: f64,
    /// Per-run residuals.
    pub residuals: Vec<RunResidual>,
    /// RMS residual, min.
    pub rms_residual_min: f64,
    /// Solver iterations.
    pub iterations: usize,
    /// Flags; empty when the fit looks well determined.
    pub flags: Vec<FitFlag>,
}

impl AnalyteFit {
    /// The fitted parameters.
    pub fn parameters(&self) -> LssParameters {
        LssParameters {
            log_kw: self.log_kw,
            s: self.s,
        }
    }
}

/// The composition the LSS parameters are written in: log k = log kw − S ψ.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum CompositionBasis {
    /// ψ = organic volume fraction (reversed phase: the organic modifier is the strong solvent).
    #[default]
    Organic,
    /// ψ = water volume fraction, 1 − %organic/100 (HILIC: water is the strong solvent, so S
    /// is positive; the convention of the LC model, docs/model.md §1).
    Water,
}

impl CompositionBasis {
    /// The program in the strong-solvent composition of this basis (the complement for water).
    pub fn strong_program(self, program: &GradientProgram) -> GradientProgram {
        match self {
            CompositionBasis::Organic => program.clone(),
            CompositionBasis::Water => program.complement(),
        }
    }
}

/// Result of a scouting fit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ScoutFit {
    /// The composition log kw and S refer to (`organic` for RP, `water` for HILIC).
    #[serde(default)]
    pub basis: CompositionBasis,
    /// Dead time used, min.
    pub dead_time_min: f64,
    /// Dwell time used, min.
    pub dwell_time_min: f64,
    /// Run names in input order.
    pub runs: Vec<String>,
    /// One fit per analyte, in the order of the first run's table.
    pub analytes: Vec<AnalyteFit>,
}

impl ScoutFit {
    /// The system (t0, tD) the fit applies to.
    pub fn system(&self) -> GradientSystem {
        GradientSystem {
            dead_time_min: self.dead_time_min,
            dwell_time_min: self.dwell_time_min,
        }
    }
}

/// Mean slope dφ/dt of a program's changing part and its start and end composition.
fn signature(p: &GradientProgram) -> (f64, f64, f64) {
    let pts = p.points();
    let first = pts[0].organic_pct;
    let last = pts[pts.len() - 1].organic_pct;
    let slope = match (p.first_change_min(), p.last_change_min()) {
        (Some(a), Some(b)) if b > a => (p.organic_pct_at(b) - p.organic_pct_at(a)) / (b - a),
        _ => 0.0,
    };
    (first, slope, last)
}

/// Resolves t0 and tD from a request.
///
/// # Errors
/// Invalid t0 or geometry, inconsistent flows, dwell volume without flow.
pub fn resolve_system(
    dead_time: &DeadTimeInput,
    dwell_volume_ml: f64,
    flow_ml_min: Option<f64>,
) -> Result<GradientSystem, ScoutError> {
    let t0 = dead_time.dead_time_min()?;
    theory::non_negative("dwell volume (mL)", dwell_volume_ml)?;
    let flow = match (*dead_time, flow_ml_min) {
        (DeadTimeInput::FromColumn { flow_ml_min: f, .. }, Some(g)) => {
            theory::positive("flow rate (mL/min)", g)?;
            if !super::close(f, g) {
                return Err(ScoutError::InconsistentFlow {
                    flow_ml_min: g,
                    column_flow_ml_min: f,
                });
            }
            Some(f)
        }
        (DeadTimeInput::FromColumn { flow_ml_min: f, .. }, None) => Some(f),
        (DeadTimeInput::Given { .. }, g) => g,
    };
    let td = match flow {
        Some(f) => theory::dwell_time_min(dwell_volume_ml, f)?,
        None if dwell_volume_ml == 0.0 => 0.0,
        None => return Err(ScoutError::FlowNeeded { dwell_volume_ml }),
    };
    Ok(GradientSystem {
        dead_time_min: t0,
        dwell_time_min: td,
    })
}

/// Predicted retention, or a large finite stand-in for analytes that do not elute, so the
/// solver can back away from such parameters.
fn predict(p: &LssParameters, prog: &GradientProgram, sys: &GradientSystem) -> f64 {
    match gradient_elution(p, prog, sys) {
        Ok(e) => e.retention_time_min,
        Err(_) => 1e6,
    }
}

const LOG_KW_BOUNDS: (f64, f64) = (-3.0, 40.0);
const S_BOUNDS: (f64, f64) = (0.05, 300.0);

fn clamp_params(x: [f64; 2]) -> [f64; 2] {
    [
        x[0].clamp(LOG_KW_BOUNDS.0, LOG_KW_BOUNDS.1),
        x[1].clamp(S_BOUNDS.0, S_BOUNDS.1),
    ]
}

/// Two-run closed-form start (see module docs). `obs` is (program, measured tR).
fn start_estimate(obs: &[(&GradientProgram, f64)], sys: &GradientSystem) -> [f64; 2] {
    let t0 = sys.dead_time_min;
    // For each run: composition reaching the band at elution, and local slope (fraction/min).
    let info: Vec<(f64, f64)> = obs
        .iter()
        .map(|(p, tr)| {
            let pt = tr - t0 - sys.dwell_time_min;
            let phi = p.organic_fraction_at(pt);
            let h = 1e-3;
            let slope = (p.organic_fraction_at(pt + h) - p.organic_fraction_at(pt - h)) / (2.0 * h);
            let slope = if slope > 1e-9 {
                slope
            } else {
                signature(p).1 / 100.0
            };
            (phi, slope)
        })
        .collect();
    // Choose the pair with the most different slope (most informative).
    let mut best: Option<(usize, usize)> = None;
    let mut best_gap = 0.0;
    for i in 0..info.len() {
        for j in i + 1..info.len() {
            let gap = (info[i].1.ln() - info[j].1.ln()).abs();
            if info[i].1 > 0.0
                && info[j].1 > 0.0
                && gap > best_gap
                && (info[i].0 - info[j].0).abs() > 1e-6
            {
                best_gap = gap;
                best = Some((i, j));
            }
        }
    }
    let fallback_s = 4.0;
    let (phi1, slope1) = info[0];
    let Some((i, j)) = best else {
        let lk = fallback_s * phi1
            - (std::f64::consts::LN_10 * t0 * fallback_s * slope1.max(1e-6)).log10();
        return clamp_params([lk, fallback_s]);
    };
    let (p1, s1) = info[i];
    let (p2, s2) = info[j];
    let g1 = std::f64::consts::LN_10 * t0 * s1;
    let g2 = std::f64::consts::LN_10 * t0 * s2;
    let mut s = (g2 / g1).log10() / (p2 - p1);
    if !s.is_finite() || s <= S_BOUNDS.0 {
        s = fallback_s;
    }
    let lk = s * p1 - (s * g1).log10();
    clamp_params([lk, s])
}

fn residuals(x: [f64; 2], obs: &[(&GradientProgram, f64)], sys: &GradientSystem) -> Vec<f64> {
    let p = LssParameters {
        log_kw: x[0],
        s: x[1],
    };
    obs.iter()
        .map(|(prog, tr)| predict(&p, prog, sys) - tr)
        .collect()
}

fn jacobian(x: [f64; 2], obs: &[(&GradientProgram, f64)], sys: &GradientSystem) -> Vec<[f64; 2]> {
    let mut cols = [Vec::new(), Vec::new()];
    for (k, col) in cols.iter_mut().enumerate() {
        let h = 1e-6 * x[k].abs().max(1.0);
        let mut xp = x;
        let mut xm = x;
        xp[k] += h;
        xm[k] -= h;
        let rp = residuals(xp, obs, sys);
        let rm = residuals(xm, obs, sys);
        *col = rp
            .iter()
            .zip(&rm)
            .map(|(a, b)| (a - b) / (2.0 * h))
            .collect();
    }
    (0..obs.len()).map(|i| [cols[0][i], cols[1][i]]).collect()
}

/// Fits log kw and S for every analyte of the scouting runs.
///
/// # Errors
/// Fewer than 2 runs, duplicate run names, runs with identical gradients, a peak missing from a
/// run, a peak before t0, invalid t0/dwell/flow.
///
/// # Examples
/// See `tests/scout_optimise.rs` (self-consistency with invented analytes).
pub fn fit(req: &ScoutRequest) -> Result<ScoutFit, ScoutError> {
    fit_in(req, CompositionBasis::Organic)
}

/// Fits log kw and S with log k = log kw − S ψ in the composition `basis`: the organic fraction
/// (reversed phase, as [`fit`]) or the water fraction (HILIC, where water is the strong solvent
/// and S comes out positive). The programs stay in % organic; for the water basis the fit runs
/// on their complements ([`GradientProgram::complement`]), and the residuals, flags and
/// phases refer to the programs as run.
///
/// # Errors
/// As [`fit`].
pub fn fit_in(req: &ScoutRequest, basis: CompositionBasis) -> Result<ScoutFit, ScoutError> {
    let names: Vec<&str> = req.runs.iter().map(|r| r.name.as_str()).collect();
    check_run_names(&names, |_| Ok(()), ScoutError::from)?;
    let sys = resolve_system(&req.dead_time, req.dwell_volume_ml, req.flow_ml_min)?;
    let strong: Vec<GradientProgram> = req
        .runs
        .iter()
        .map(|r| basis.strong_program(&r.program))
        .collect();
    let sigs: Vec<(f64, f64, f64)> = strong.iter().map(signature).collect();
    let tables: Vec<(&str, &PeakTable)> = req
        .runs
        .iter()
        .map(|r| (r.name.as_str(), &r.peaks))
        .collect();
    check_identifiable(&sigs, &tables)?;
    let times = retention_times(
        &tables,
        |tr| tr < sys.dead_time_min,
        |peak, run, tr| ScoutError::PeakBeforeDeadTime {
            peak: peak.to_string(),
            run: names[run].to_string(),
            retention_time_min: tr,
            dead_time_min: sys.dead_time_min,
        },
    )?;
    let analytes = times
        .iter()
        .map(|(name, trs)| {
            let obs: Vec<(&GradientProgram, f64)> =
                strong.iter().zip(trs.iter().copied()).collect();
            fit_one(name, &obs, req, &sys)
        })
        .collect();
    Ok(ScoutFit {
        basis,
        dead_time_min: sys.dead_time_min,
        dwell_time_min: sys.dwell_time_min,
        runs: req.runs.iter().map(|r| r.name.clone()).collect(),
        analytes,
    })
}

fn fit_one(
    name: &str,
    obs: &[(&GradientProgram, f64)],
    req: &ScoutRequest,
    sys: &GradientSystem,
) -> AnalyteFit {
    let start = start_estimate(obs, sys);
    let out = levenberg_marquardt(
        start,
        1e-26,
        |x| residuals(x, obs, sys),
        |x| jacobian(x, obs, sys),
        clamp_params,
    );
    let p = LssParameters {
        log_kw: out.x[0],
        s: out.x[1],
    };
    let mut flags = Vec::new();
    let mut res = Vec::with_capacity(obs.len());
    for (run, (prog, tr)) in req.runs.iter().zip(obs) {
        let (pred, phase) = match gradient_elution(&p, prog, sys) {
            Ok(e) => (e.retention_time_min, e.phase),
            Err(_) => (f64::INFINITY, ElutionPhase::AfterGradient),
        };
        match phase {
            ElutionPhase::BeforeGradient => flags.push(FitFlag::ElutedBeforeGradient {
                run: run.name.clone(),
            }),
            ElutionPhase::AfterGradient => flags.push(FitFlag::ElutedAfterGradient {
                run: run.name.clone(),
            }),
            _ => {}
        }
        res.push(RunResidual {
            run: run.name.clone(),
            measured_min: *tr,
            predicted_min: pred,
            residual_min: pred - tr,
            phase,
        });
    }
    // Uncertainty: Cov = σ² (JᵀJ)⁻¹; σ the larger of the assumed error and the residual scatter.
    let residual_min: Vec<f64> = res.iter().map(|r| r.residual_min).collect();
    let (rms, sigma) = rms_and_sigma(&residual_min, RETENTION_ERROR_MIN);
    let a = out.jtj;
    let det = a[0] * a[2] - a[1] * a[1];
    let (se_lk, se_s, corr) = if det > 0.0 && det.is_finite() {
        let v00 = a[2] / det;
        let v11 = a[0] / det;
        let v01 = -a[1] / det;
        (
            sigma * v00.sqrt(),
            sigma * v11.sqrt(),
            v01 / (v00 * v11).sqrt(),
        )
    } else {
        (f64::INFINITY, f64::INFINITY, f64::NAN)
    };
    if !(S_RANGE.0..=S_RANGE.1).contains(&p.s) {
        flags.push(FitFlag::SOutsideRange { s: p.s });
    }
    if rms > LARGE_RESIDUAL_MIN || !rms.is_finite() {
        flags.push(FitFlag::LargeResidual { rms_min: rms });
    }
    let rel = se_s / p.s.abs();
    if rel.is_nan() || rel > 0.2 {
        flags.push(FitFlag::IllConditioned {
            s_relative_uncertainty: rel,
        });
    }
    if !out.converged {
        flags.push(FitFlag::NotConverged);
    }
    AnalyteFit {
        name: name.to_string(),
        log_kw: p.log_kw,
        s: p.s,
        log_kw_uncertainty: se_lk,
        s_uncertainty: se_s,
        correlation: corr,
        start_log_kw: start[0],
        start_s: start[1],
        residuals: res,
        rms_residual_min: rms,
        iterations: out.iterations,
        flags,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::measured::peaks::Peak;

    fn table(rows: &[(&str, f64)]) -> PeakTable {
        PeakTable::from_peaks(
            rows.iter()
                .map(|(n, t)| Peak {
                    width_half_min: Some(0.05),
                    ..Peak::at(n, *t)
                })
                .collect(),
        )
        .unwrap()
    }

    fn simulate(
        truth: &[(&str, LssParameters)],
        tgs: &[f64],
        sys: &GradientSystem,
    ) -> Vec<ScoutRun> {
        tgs.iter()
            .map(|tg| {
                let program = GradientProgram::linear(5.0, 95.0, *tg).unwrap();
                let rows: Vec<(&str, f64)> = truth
                    .iter()
                    .map(|(n, p)| {
                        (
                            *n,
                            gradient_elution(p, &program, sys)
                                .unwrap()
                                .retention_time_min,
                        )
                    })
                    .collect();
                ScoutRun {
                    name: format!("tG{tg}"),
                    program,
                    peaks: table(&rows),
                }
            })
            .collect()
    }

    // Invented analytes (not real compounds).
    fn truth() -> Vec<(&'static str, LssParameters)> {
        vec![
            (
                "inv-1",
                LssParameters {
                    log_kw: 2.2,
                    s: 3.5,
                },
            ),
            (
                "inv-2",
                LssParameters {
                    log_kw: 3.4,
                    s: 4.8,
                },
            ),
            (
                "inv-3",
                LssParameters {
                    log_kw: 4.6,
                    s: 6.2,
                },
            ),
        ]
    }

    #[test]
    fn two_runs_recover_parameters_exactly() {
        // Self-consistency: simulate, fit, recover (no published worked example used).
        let sys = GradientSystem {
            dead_time_min: 1.0,
            dwell_time_min: 0.5,
        };
        let runs = simulate(&truth(), &[10.0, 30.0], &sys);
        let fit = fit(&ScoutRequest {
            runs,
            dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
            dwell_volume_ml: 0.5,
            flow_ml_min: Some(1.0),
        })
        .unwrap();
        for ((_, t), f) in truth().iter().zip(&fit.analytes) {
            assert!((f.log_kw - t.log_kw).abs() < 1e-6, "{f:?}");
            assert!((f.s - t.s).abs() < 1e-6, "{f:?}");
            assert!(f.rms_residual_min < 1e-8);
            assert!(f.flags.is_empty(), "{:?}", f.flags);
        }
    }

    #[test]
    fn same_gradient_time_is_not_identifiable() {
        let sys = GradientSystem {
            dead_time_min: 1.0,
            dwell_time_min: 0.0,
        };
        let mut runs = simulate(&truth(), &[20.0, 20.0], &sys);
        runs[1].name = "repeat".into();
        let e = fit(&ScoutRequest {
            runs,
            dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
            dwell_volume_ml: 0.0,
            flow_ml_min: None,
        })
        .unwrap_err();
        let msg = e.to_string();
        assert!(
            msg.contains("not identifiable") && msg.contains("tG20") && msg.contains("repeat"),
            "{msg}"
        );
    }

    #[test]
    fn missing_peak_names_peak_and_run() {
        let sys = GradientSystem {
            dead_time_min: 1.0,
            dwell_time_min: 0.0,
        };
        let mut runs = simulate(&truth(), &[10.0, 30.0], &sys);
        runs[1].peaks = table(&[("inv-1", 3.0), ("inv-2", 5.0)]);
        let e = fit(&ScoutRequest {
            runs,
            dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
            dwell_volume_ml: 0.0,
            flow_ml_min: None,
        })
        .unwrap_err()
        .to_string();
        assert!(e.contains("inv-3") && e.contains("tG30"), "{e}");
    }

    #[test]
    fn inconsistent_flow_and_missing_flow_are_errors() {
        let col = DeadTimeInput::FromColumn {
            column_length_mm: 100.0,
            inner_diameter_mm: 3.0,
            flow_ml_min: 0.5,
        };
        assert!(matches!(
            resolve_system(&col, 0.3, Some(500.0)),
            Err(ScoutError::InconsistentFlow { .. })
        ));
        assert!(matches!(
            resolve_system(&DeadTimeInput::Given { dead_time_min: 1.0 }, 0.3, None),
            Err(ScoutError::FlowNeeded { .. })
        ));
        // 100 × 3 mm: Vm = 0.5 × 10 × 0.09 = 0.45 mL → t0 = 0.9 min; tD = 0.3/0.5 = 0.6 min.
        let s = resolve_system(&col, 0.3, None).unwrap();
        assert!((s.dead_time_min - 0.9).abs() < 1e-12);
        assert!((s.dwell_time_min - 0.6).abs() < 1e-12);
    }

    #[test]
    fn early_eluter_is_flagged() {
        // Invented weakly retained analyte: elutes during the dwell in both runs.
        let sys = GradientSystem {
            dead_time_min: 1.0,
            dwell_time_min: 3.0,
        };
        let t = vec![
            (
                "weak",
                LssParameters {
                    log_kw: 0.3,
                    s: 2.0,
                },
            ),
            (
                "inv-2",
                LssParameters {
                    log_kw: 3.4,
                    s: 4.8,
                },
            ),
        ];
        let runs = simulate(&t, &[10.0, 30.0], &sys);
        let f = fit(&ScoutRequest {
            runs,
            dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
            dwell_volume_ml: 3.0,
            flow_ml_min: Some(1.0),
        })
        .unwrap();
        assert!(
            f.analytes[0]
                .flags
                .iter()
                .any(|x| matches!(x, FitFlag::ElutedBeforeGradient { .. })),
            "{:?}",
            f.analytes[0].flags
        );
        assert!(f.analytes[1].flags.is_empty());
    }
}
