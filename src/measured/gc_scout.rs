//! GC scouting-run fitting: from two or more runs of the same sample under oven programs that
//! differ (in ramp rate, initial temperature or, for isothermal runs, temperature), fit each
//! analyte's retention–temperature relation ln k = A + B/T (T in K) so that the retention times
//! predicted by the temperature-programmed migration equation match the measured ones.
//!
//! Retention model: ln k = A + B/T is the van 't Hoff form of the partition equilibrium,
//! A = ΔS/R − ln β and B = −ΔH/R with the (negative) sorption enthalpy ΔH and the phase ratio β,
//! heat capacity neglected: the first two terms of the Clarke & Glew expansion (Trans. Faraday
//! Soc., 1966), as in the thermodynamic retention models of GC (e.g. McGinitie & Harynuk,
//! J. Chromatogr. A, 2012); both from memory, not checked against the papers. B > 0 means
//! retention falls with temperature; B ≤ 0 is non-physical and flagged.
//!
//! Migration: a band moves the fraction dz = dt / (t_M (1 + k(T(t)))) of the column per time
//! step, and elutes when z reaches 1, i.e. ∫₀^tR dt / (t_M (1 + k(T(t)))) = 1 (the classic
//! programmed-temperature retention integral, Harris & Habgood, *Programmed Temperature Gas
//! Chromatography*, 1966, from memory). t_M is treated as constant during the run (the same
//! constant-velocity approximation as [`crate::model::gc::GcColumn::holdup_time_min`]).
//! Numerically: the holds are integrated exactly (constant integrand); the ramp is integrated in
//! temperature, dt = dT / r, by Simpson's rule on panels of at most [`RAMP_STEP_K`] K, and the
//! crossing z = 1 inside the last panel is solved by Newton's method on the same Simpson
//! integral from the panel start (so the predicted time is a smooth function of A and B, which
//! the finite-difference Jacobian needs). The test `ramp_step_is_converged` checks the step
//! against a 20-times finer integration.
//!
//! Fit: ln k is written about a reference temperature T_ref (the mean measured elution
//! temperature), ln k = L + B (1/T − 1/T_ref), which decorrelates the two parameters. Start: for
//! each B on a logarithmic grid, each run's L is solved (bisection: tR rises with L) and the B
//! whose runs agree best is taken. Refinement: Levenberg–Marquardt on the squared retention
//! residuals (with two runs the system is square and this is a damped Newton solve to zero
//! residual). Parameter uncertainties are from (JᵀJ)⁻¹ scaled by an assumed retention-time error
//! of 0.01 min (common practice for run-to-run repeatability, no source) or the fit's own
//! residual scatter if larger, transformed back to (A, B).
//!
//! No published worked example is reproduced here; the tests are self-consistency only
//! (simulate runs from known invented parameters, fit, recover).

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::measured::peaks::PeakTable;
use crate::measured::scouting::{
    RunSetProblem, check_identifiable, check_run_names, levenberg_marquardt, retention_times,
    rms_and_sigma,
};
use crate::model::gc::{GcError, OvenProgram};

/// Largest temperature step of the ramp integration, K (see the module docs).
pub const RAMP_STEP_K: f64 = 0.5;
/// Assumed retention-time measurement error for the uncertainty estimate, min (common
/// practice, no source).
pub const RETENTION_ERROR_MIN: f64 = 0.01;
/// RMS residual above which a fit is flagged, min (common practice, no source).
pub const LARGE_RESIDUAL_MIN: f64 = 0.05;
/// Plausible range of B = −ΔH/R for analytes a GC elutes, K: sorption enthalpies of about
/// 8–200 kJ/mol (from memory of typical values; very volatile gases to heavy analytes).
pub const B_RANGE_K: (f64, f64) = (1000.0, 25_000.0);
/// Relative 1σ uncertainty of B above which a fit is flagged ill-conditioned (common practice,
/// no source).
pub const ILL_CONDITIONED_RELATIVE: f64 = 0.2;

/// Errors from GC scouting-run fitting.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum GcScoutError {
    /// Fewer than two runs.
    #[error("need at least 2 GC scouting runs, got {count}")]
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
    /// The runs do not differ in the part of the program that moves the peaks.
    #[error(
        "parameters not identifiable: runs {runs:?} have the same oven program up to the final \
         temperature (same initial temperature, hold and ramp rate); use ramp rates that differ by \
         a factor of 2–3, or different initial temperatures"
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
    /// A peak elutes at or before the hold-up time.
    #[error(
        "peak `{peak}` in run `{run}` at {retention_time_min} min elutes at or before the hold-up time t_M {holdup_time_min} min"
    )]
    PeakBeforeHoldup {
        /// Peak.
        peak: String,
        /// Run.
        run: String,
        /// Retention time, min.
        retention_time_min: f64,
        /// Hold-up time, min.
        holdup_time_min: f64,
    },
    /// A run heats the column above the phase's limit.
    #[error(
        "run `{run}`: oven final temperature {final_c} °C is above the maximum {t_max_c} °C of the phase; check the program (bleed and phase damage above the limit)"
    )]
    AbovePhaseLimit {
        /// Run.
        run: String,
        /// Final temperature of its program, °C.
        final_c: f64,
        /// Phase limit, °C.
        t_max_c: f64,
    },
    /// The hold-up time is not usable.
    #[error("hold-up time t_M = {holdup_time_min} min must be a finite number greater than zero")]
    BadHoldup {
        /// The value.
        holdup_time_min: f64,
    },
    /// The analyte does not elute under the program (retention beyond any run time).
    #[error(
        "the analyte does not elute under oven program {program} (ln k at the final temperature {ln_k_final:.1})"
    )]
    NotEluted {
        /// The program.
        program: String,
        /// ln k at the final temperature.
        ln_k_final: f64,
    },
    /// A GC condition failed validation.
    #[error(transparent)]
    Gc(#[from] GcError),
}

impl From<RunSetProblem> for GcScoutError {
    fn from(p: RunSetProblem) -> Self {
        match p {
            RunSetProblem::TooFewRuns { count } => GcScoutError::TooFewRuns { count },
            RunSetProblem::DuplicateRun { name } => GcScoutError::DuplicateRun { name },
            RunSetProblem::NotIdentifiable { runs } => GcScoutError::NotIdentifiable { runs },
            RunSetProblem::MissingPeak {
                peak,
                run,
                present_in,
            } => GcScoutError::MissingPeak {
                peak,
                run,
                present_in,
            },
        }
    }
}

/// The retention–temperature relation ln k = A + B/T of one analyte on one column.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct VantHoffParameters {
    /// A (dimensionless): ΔS/R − ln β.
    pub a: f64,
    /// B, K: −ΔH/R.
    pub b_k: f64,
}

impl VantHoffParameters {
    /// ln k at `temperature_k`.
    pub fn ln_k(&self, temperature_k: f64) -> f64 {
        self.a + self.b_k / temperature_k
    }
}

/// Which part of the oven program the band elutes in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum OvenPhase {
    /// During the initial hold (or an isothermal run).
    InitialHold,
    /// During the ramp.
    Ramp,
    /// After the ramp, at the final temperature (possibly after the programmed final hold;
    /// the oven is assumed to stay at the final temperature).
    FinalHold,
}

/// A predicted elution under an oven program.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ProgrammedElution {
    /// Retention time, min.
    pub retention_time_min: f64,
    /// Oven temperature at elution, °C.
    pub elution_temperature_c: f64,
    /// Retention factor at the elution temperature (–).
    pub retention_factor_at_elution: f64,
    /// Part of the program.
    pub phase: OvenPhase,
    /// The band leaves after the programmed end of the run (final hold too short).
    pub after_program_end: bool,
}

const KELVIN: f64 = 273.15;
/// Retention times beyond this are treated as "does not elute", min.
const NOT_ELUTED_MIN: f64 = 1e5;

/// Predicts the elution of an analyte with `params` under `program` on a column with hold-up
/// time `holdup_time_min` (see the module docs for the integration).
///
/// # Errors
/// [`GcScoutError::BadHoldup`]; [`GcScoutError::NotEluted`] when the band would need more than
/// 10⁵ min.
pub fn programmed_elution(
    params: &VantHoffParameters,
    program: &OvenProgram,
    holdup_time_min: f64,
) -> Result<ProgrammedElution, GcScoutError> {
    elution_with_step(params, program, holdup_time_min, RAMP_STEP_K)
}

/// 1 / (1 + k) without overflow for very large ln k.
fn mobile_fraction(ln_k: f64) -> f64 {
    if ln_k > 700.0 {
        0.0
    } else {
        1.0 / (1.0 + ln_k.exp())
    }
}

fn elution_with_step(
    params: &VantHoffParameters,
    program: &OvenProgram,
    tm: f64,
    step_k: f64,
) -> Result<ProgrammedElution, GcScoutError> {
    if !(tm.is_finite() && tm > 0.0) {
        return Err(GcScoutError::BadHoldup {
            holdup_time_min: tm,
        });
    }
    let t0_k = program.initial_c() + KELVIN;
    let tf_k = program.final_c() + KELVIN;
    let total = program.total_time_min();
    let done = |tr: f64, t_k: f64, phase: OvenPhase| {
        let ln_k = params.ln_k(t_k);
        ProgrammedElution {
            retention_time_min: tr,
            elution_temperature_c: t_k - KELVIN,
            retention_factor_at_elution: if ln_k > 700.0 {
                f64::INFINITY
            } else {
                ln_k.exp()
            },
            phase,
            after_program_end: tr > total + 1e-9,
        }
    };
    // Initial hold (whole run when isothermal).
    let hold = program.initial_hold_min();
    let f0 = mobile_fraction(params.ln_k(t0_k));
    let isothermal = program.final_c() <= program.initial_c();
    if isothermal || hold * f0 >= tm {
        if f0 <= 0.0 || tm / f0 > NOT_ELUTED_MIN {
            return Err(not_eluted(params, program));
        }
        return Ok(done(tm / f0, t0_k, OvenPhase::InitialHold));
    }
    let mut z = hold * f0 / tm;
    // Ramp, integrated in temperature: dz = g(T) dT with g = 1/(1 + k) / (r t_M).
    let r = program.ramp_c_per_min();
    let g = |t_k: f64| mobile_fraction(params.ln_k(t_k)) / (r * tm);
    let span = tf_k - t0_k;
    let n = (span / step_k).ceil().max(1.0);
    let h = span / n;
    let panels = n as usize;
    let mut ga = g(t0_k);
    for i in 0..panels {
        let ta = t0_k + h * i as f64;
        let tb = if i + 1 == panels { tf_k } else { ta + h };
        let gm = g(0.5 * (ta + tb));
        let gb = g(tb);
        let inc = (tb - ta) / 6.0 * (ga + 4.0 * gm + gb);
        if z + inc >= 1.0 {
            let t_star = crossing(&g, ta, tb, ga, 1.0 - z, inc);
            let tr = hold + (t_star - t0_k) / r;
            return Ok(done(tr, t_star, OvenPhase::Ramp));
        }
        z += inc;
        ga = gb;
    }
    // Final temperature, held until the band is out.
    let ff = mobile_fraction(params.ln_k(tf_k));
    let rest = if ff > 0.0 {
        (1.0 - z) * tm / ff
    } else {
        f64::INFINITY
    };
    let tr = hold + program.ramp_time_min() + rest;
    if !tr.is_finite() || tr > NOT_ELUTED_MIN {
        return Err(not_eluted(params, program));
    }
    Ok(done(tr, tf_k, OvenPhase::FinalHold))
}

fn not_eluted(params: &VantHoffParameters, program: &OvenProgram) -> GcScoutError {
    GcScoutError::NotEluted {
        program: program.to_spec(),
        ln_k_final: params.ln_k(program.final_c() + KELVIN),
    }
}

/// Solves S(ta, T) = need for T in [ta, tb], with S the one-panel Simpson integral of `g` from
/// `ta` (Newton from the linear interpolation, safeguarded by bisection). `whole` = S(ta, tb).
fn crossing(g: &dyn Fn(f64) -> f64, ta: f64, tb: f64, ga: f64, need: f64, whole: f64) -> f64 {
    let simpson = |t: f64| (t - ta) / 6.0 * (ga + 4.0 * g(0.5 * (ta + t)) + g(t));
    let (mut lo, mut hi) = (ta, tb);
    let mut t = if whole > 0.0 {
        ta + (tb - ta) * (need / whole).clamp(0.0, 1.0)
    } else {
        tb
    };
    for _ in 0..60 {
        let f = simpson(t) - need;
        if f > 0.0 {
            hi = t;
        } else {
            lo = t;
        }
        if f.abs() <= 1e-15 || hi - lo <= 1e-13 * tb {
            break;
        }
        let d = g(t);
        let newton = t - f / d;
        t = if d > 0.0 && newton > lo && newton < hi {
            newton
        } else {
            0.5 * (lo + hi)
        };
    }
    t
}

/// One GC scouting run: its oven program and measured peaks.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GcScoutRun {
    /// Run name (unique).
    pub name: String,
    /// Oven program.
    pub program: OvenProgram,
    /// Measured peaks (names, retention times and widths are used).
    pub peaks: PeakTable,
}

/// A GC scouting-fit request.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GcScoutRequest {
    /// Two or more runs of the same sample on the same column and carrier velocity.
    pub runs: Vec<GcScoutRun>,
    /// Hold-up time t_M, min.
    pub holdup_time_min: f64,
    /// Maximum temperature of the phase, °C, when known (programs above it are refused).
    pub max_temperature_c: Option<f64>,
}

/// One run's residual for one analyte.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcRunResidual {
    /// Run name.
    pub run: String,
    /// Measured retention time, min.
    pub measured_min: f64,
    /// Predicted by the fitted parameters, min.
    pub predicted_min: f64,
    /// predicted − measured, min.
    pub residual_min: f64,
    /// Oven temperature at the measured retention time, °C.
    pub measured_elution_temperature_c: f64,
    /// Part of the program in which the analyte is predicted to elute.
    pub phase: OvenPhase,
}

/// Why a GC fit is poorly determined.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "flag", rename_all = "snake_case")]
pub enum GcFitFlag {
    /// B ≤ 0: retention would rise with temperature.
    NonPhysical {
        /// Fitted B, K.
        b_k: f64,
    },
    /// B outside [`B_RANGE_K`].
    BOutsideRange {
        /// Fitted B, K.
        b_k: f64,
    },
    /// The peak was measured after the programmed end of this run (the oven may have cooled).
    ElutedAfterProgram {
        /// Run.
        run: String,
    },
    /// RMS residual above [`LARGE_RESIDUAL_MIN`].
    LargeResidual {
        /// RMS residual, min.
        rms_min: f64,
    },
    /// A 0.01 min retention error moves B by more than 20 %.
    IllConditioned {
        /// Relative 1σ uncertainty of B.
        b_relative_uncertainty: f64,
    },
    /// The solver stopped without converging.
    NotConverged,
}

/// Fitted retention–temperature parameters for one analyte.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcAnalyteFit {
    /// Analyte name.
    pub name: String,
    /// Fitted A (–).
    pub a: f64,
    /// Fitted B, K.
    pub b_k: f64,
    /// 1σ uncertainty of A.
    pub a_uncertainty: f64,
    /// 1σ uncertainty of B, K.
    pub b_uncertainty_k: f64,
    /// Correlation of the A and B estimates.
    pub correlation: f64,
    /// Reference temperature of the fit (mean measured elution temperature), °C.
    pub reference_temperature_c: f64,
    /// ln k at the reference temperature (the well-determined combination).
    pub ln_k_at_reference: f64,
    /// Sorption enthalpy ΔH = −R B, kJ/mol.
    pub sorption_enthalpy_kj_mol: f64,
    /// Start A (grid start, see the module docs).
    pub start_a: f64,
    /// Start B, K.
    pub start_b_k: f64,
    /// Per-run residuals.
    pub residuals: Vec<GcRunResidual>,
    /// RMS residual, min.
    pub rms_residual_min: f64,
    /// Solver iterations.
    pub iterations: usize,
    /// Flags; empty when the fit looks well determined.
    pub flags: Vec<GcFitFlag>,
}

impl GcAnalyteFit {
    /// The fitted parameters.
    pub fn parameters(&self) -> VantHoffParameters {
        VantHoffParameters {
            a: self.a,
            b_k: self.b_k,
        }
    }
}

/// Result of a GC scouting fit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcScoutFit {
    /// Hold-up time used, min.
    pub holdup_time_min: f64,
    /// Run names in input order.
    pub runs: Vec<String>,
    /// The runs' oven programs (`--oven` syntax), in input order.
    pub programs: Vec<String>,
    /// Temperature step of the ramp integration, K.
    pub integration_step_k: f64,
    /// One fit per analyte, in the order of the first run's table.
    pub analytes: Vec<GcAnalyteFit>,
}

/// Molar gas constant, J/(mol K) (CODATA).
const GAS_CONSTANT: f64 = 8.314_462_618;

/// The part of a program that moves peaks: initial temperature, hold and ramp (or the
/// temperature alone for an isothermal run).
fn signature(p: &OvenProgram) -> (f64, f64, f64) {
    if p.final_c() <= p.initial_c() {
        (p.initial_c(), 0.0, 0.0)
    } else {
        (p.initial_c(), p.initial_hold_min(), p.ramp_c_per_min())
    }
}

/// Fitting coordinates: x = [L, B/1000 K] with ln k = L + B (1/T − 1/T_ref).
struct Frame {
    t_ref_k: f64,
}

impl Frame {
    fn params(&self, x: [f64; 2]) -> VantHoffParameters {
        let b_k = 1000.0 * x[1];
        VantHoffParameters {
            a: x[0] - b_k / self.t_ref_k,
            b_k,
        }
    }
}

const L_BOUNDS: (f64, f64) = (-20.0, 30.0);
const B_KK_BOUNDS: (f64, f64) = (-20.0, 60.0);

fn clamp(x: [f64; 2]) -> [f64; 2] {
    [
        x[0].clamp(L_BOUNDS.0, L_BOUNDS.1),
        x[1].clamp(B_KK_BOUNDS.0, B_KK_BOUNDS.1),
    ]
}

type Obs<'a> = [(&'a OvenProgram, f64)];

fn predict(p: &VantHoffParameters, prog: &OvenProgram, tm: f64) -> f64 {
    programmed_elution(p, prog, tm).map_or(1e6, |e| e.retention_time_min)
}

fn residuals(x: [f64; 2], obs: &Obs, tm: f64, fr: &Frame) -> Vec<f64> {
    let p = fr.params(x);
    obs.iter().map(|(g, tr)| predict(&p, g, tm) - tr).collect()
}

/// L such that the run's predicted time equals the measured one, for fixed B (bisection;
/// predicted time rises with L).
fn solve_l(b_kk: f64, prog: &OvenProgram, tr: f64, tm: f64, fr: &Frame) -> f64 {
    let (mut lo, mut hi) = L_BOUNDS;
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if predict(&fr.params([mid, b_kk]), prog, tm) < tr {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-10 {
            break;
        }
    }
    0.5 * (lo + hi)
}

fn start_estimate(obs: &Obs, tm: f64, fr: &Frame) -> [f64; 2] {
    let cost = |x: [f64; 2]| residuals(x, obs, tm, fr).iter().map(|r| r * r).sum::<f64>();
    let mut best = [0.0, 5.0];
    let mut best_cost = f64::INFINITY;
    // B from 0.5 to 40 kK, 32 logarithmic steps.
    for i in 0..32 {
        let b_kk = 0.5 * (80.0_f64).powf(f64::from(i) / 31.0);
        let ls: Vec<f64> = obs
            .iter()
            .map(|(p, tr)| solve_l(b_kk, p, *tr, tm, fr))
            .collect();
        let l = ls.iter().sum::<f64>() / ls.len() as f64;
        let c = cost([l, b_kk]);
        if c < best_cost {
            best_cost = c;
            best = [l, b_kk];
        }
    }
    clamp(best)
}

fn jacobian(x: [f64; 2], obs: &Obs, tm: f64, fr: &Frame) -> Vec<[f64; 2]> {
    let mut cols = [Vec::new(), Vec::new()];
    for (k, col) in cols.iter_mut().enumerate() {
        let h = 1e-6 * x[k].abs().max(1.0);
        let mut xp = x;
        let mut xm = x;
        xp[k] += h;
        xm[k] -= h;
        let rp = residuals(xp, obs, tm, fr);
        let rm = residuals(xm, obs, tm, fr);
        *col = rp
            .iter()
            .zip(&rm)
            .map(|(a, b)| (a - b) / (2.0 * h))
            .collect();
    }
    (0..obs.len()).map(|i| [cols[0][i], cols[1][i]]).collect()
}

/// Fits A and B for every analyte of the GC scouting runs.
///
/// # Errors
/// Fewer than 2 runs, duplicate run names, runs whose programs do not differ before the final
/// temperature, a program above the phase limit, a peak missing from a run, a peak at or before
/// t_M, an invalid t_M.
pub fn fit_gc(req: &GcScoutRequest) -> Result<GcScoutFit, GcScoutError> {
    let tm = req.holdup_time_min;
    if !(tm.is_finite() && tm > 0.0) {
        return Err(GcScoutError::BadHoldup {
            holdup_time_min: tm,
        });
    }
    let names: Vec<&str> = req.runs.iter().map(|r| r.name.as_str()).collect();
    check_run_names(
        &names,
        |i| {
            let r = &req.runs[i];
            match req.max_temperature_c {
                Some(t_max) if r.program.final_c() > t_max => Err(GcScoutError::AbovePhaseLimit {
                    run: r.name.clone(),
                    final_c: r.program.final_c(),
                    t_max_c: t_max,
                }),
                _ => Ok(()),
            }
        },
        GcScoutError::from,
    )?;
    let sigs: Vec<(f64, f64, f64)> = req.runs.iter().map(|r| signature(&r.program)).collect();
    let tables: Vec<(&str, &PeakTable)> = req
        .runs
        .iter()
        .map(|r| (r.name.as_str(), &r.peaks))
        .collect();
    check_identifiable(&sigs, &tables)?;
    let times = retention_times(
        &tables,
        |tr| tr <= tm,
        |peak, run, tr| GcScoutError::PeakBeforeHoldup {
            peak: peak.to_string(),
            run: names[run].to_string(),
            retention_time_min: tr,
            holdup_time_min: tm,
        },
    )?;
    let analytes = times
        .iter()
        .map(|(name, trs)| {
            let obs: Vec<(&OvenProgram, f64)> = req
                .runs
                .iter()
                .map(|r| &r.program)
                .zip(trs.iter().copied())
                .collect();
            fit_one(name, &obs, req)
        })
        .collect();
    Ok(GcScoutFit {
        holdup_time_min: tm,
        runs: req.runs.iter().map(|r| r.name.clone()).collect(),
        programs: req.runs.iter().map(|r| r.program.to_spec()).collect(),
        integration_step_k: RAMP_STEP_K,
        analytes,
    })
}

fn fit_one(name: &str, obs: &Obs, req: &GcScoutRequest) -> GcAnalyteFit {
    let tm = req.holdup_time_min;
    let measured_t: Vec<f64> = obs
        .iter()
        .map(|(p, tr)| p.temperature_c_at(*tr) + KELVIN)
        .collect();
    let fr = Frame {
        t_ref_k: measured_t.iter().sum::<f64>() / measured_t.len() as f64,
    };
    let start = start_estimate(obs, tm, &fr);
    let out = levenberg_marquardt(
        start,
        1e-24,
        |x| residuals(x, obs, tm, &fr),
        |x| jacobian(x, obs, tm, &fr),
        clamp,
    );
    let p = fr.params(out.x);
    let mut flags = Vec::new();
    let mut res = Vec::with_capacity(obs.len());
    for ((run, (prog, tr)), t_meas) in req.runs.iter().zip(obs).zip(&measured_t) {
        let (pred, phase) = match programmed_elution(&p, prog, tm) {
            Ok(e) => (e.retention_time_min, e.phase),
            Err(_) => (f64::INFINITY, OvenPhase::FinalHold),
        };
        if *tr > prog.total_time_min() + 1e-9 {
            flags.push(GcFitFlag::ElutedAfterProgram {
                run: run.name.clone(),
            });
        }
        res.push(GcRunResidual {
            run: run.name.clone(),
            measured_min: *tr,
            predicted_min: pred,
            residual_min: pred - tr,
            measured_elution_temperature_c: t_meas - KELVIN,
            phase,
        });
    }
    // Cov = σ² (JᵀJ)⁻¹ in (L, B/1000); σ the larger of the assumed error and the residual
    // scatter.
    let residual_min: Vec<f64> = res.iter().map(|r| r.residual_min).collect();
    let (rms, sigma) = rms_and_sigma(&residual_min, RETENTION_ERROR_MIN);
    let a = out.jtj;
    let det = a[0] * a[2] - a[1] * a[1];
    let (se_a, se_b, corr) = if det > 0.0 && det.is_finite() {
        let s2 = sigma * sigma;
        let (v_ll, v_bb, v_lb) = (s2 * a[2] / det, s2 * a[0] / det, -s2 * a[1] / det);
        // A = L − 1000 x₁ / T_ref, B = 1000 x₁.
        let c = 1000.0 / fr.t_ref_k;
        let var_a = v_ll + c * c * v_bb - 2.0 * c * v_lb;
        let var_b = 1e6 * v_bb;
        let cov_ab = 1000.0 * v_lb - 1000.0 * c * v_bb;
        let (sa, sb) = (var_a.max(0.0).sqrt(), var_b.max(0.0).sqrt());
        (sa, sb, cov_ab / (sa * sb))
    } else {
        (f64::INFINITY, f64::INFINITY, f64::NAN)
    };
    if p.b_k <= 0.0 {
        flags.push(GcFitFlag::NonPhysical { b_k: p.b_k });
    } else if !(B_RANGE_K.0..=B_RANGE_K.1).contains(&p.b_k) {
        flags.push(GcFitFlag::BOutsideRange { b_k: p.b_k });
    }
    if rms > LARGE_RESIDUAL_MIN || !rms.is_finite() {
        flags.push(GcFitFlag::LargeResidual { rms_min: rms });
    }
    let rel = se_b / p.b_k.abs();
    if rel.is_nan() || rel > ILL_CONDITIONED_RELATIVE {
        flags.push(GcFitFlag::IllConditioned {
            b_relative_uncertainty: rel,
        });
    }
    if !out.converged {
        flags.push(GcFitFlag::NotConverged);
    }
    let start_p = fr.params(start);
    GcAnalyteFit {
        name: name.to_string(),
        a: p.a,
        b_k: p.b_k,
        a_uncertainty: se_a,
        b_uncertainty_k: se_b,
        correlation: corr,
        reference_temperature_c: fr.t_ref_k - KELVIN,
        ln_k_at_reference: out.x[0],
        sorption_enthalpy_kj_mol: -GAS_CONSTANT * p.b_k / 1000.0,
        start_a: start_p.a,
        start_b_k: start_p.b_k,
        residuals: res,
        rms_residual_min: rms,
        iterations: out.iterations,
        flags,
    }
}

/// Apparent plate number of a measured peak under the model's width: w_base = 4 t_M (1 + k_e)
/// / √N (see [`crate::measured::gc_optimise`]), so N = (4 t_M (1 + k_e) / w_base)², with the
/// baseline width from the half-height width of a Gaussian (w_base = 4σ = 1.699 w½) when the
/// table gives only that. `None` when the peak has no width or the elution cannot be predicted.
pub fn apparent_plates(
    params: &VantHoffParameters,
    program: &OvenProgram,
    holdup_time_min: f64,
    width_base_min: Option<f64>,
    width_half_min: Option<f64>,
) -> Option<f64> {
    let w = width_base_min
        .or(width_half_min.map(|w| w * 4.0 / (8.0 * std::f64::consts::LN_2).sqrt()))?;
    let e = programmed_elution(params, program, holdup_time_min).ok()?;
    let n = (4.0 * holdup_time_min * (1.0 + e.retention_factor_at_elution) / w).powi(2);
    (n.is_finite() && n > 0.0 && w > 0.0).then_some(n)
}

#[cfg(test)]
mod tests;
