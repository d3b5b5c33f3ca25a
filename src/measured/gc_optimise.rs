//! GC oven-program optimisation from fitted retention–temperature parameters (ln k = A + B/T,
//! [`crate::measured::gc_scout`]): search the initial temperature and the ramp rate (the initial
//! hold fixed, the final temperature at or below the phase limit) for the shortest run whose
//! smallest resolution of adjacent pairs (or of named critical pairs) meets the target, with the
//! first peak retained to a minimum retention factor and every peak out within a maximum run
//! time; and the window diagram (smallest resolution versus ramp rate at the chosen initial
//! temperature).
//!
//! Selection rule: the LC optimiser's ([`crate::measured::optimise`], common practice, no
//! source): conditions that meet the target win, the shortest of them wins, then the larger
//! smallest resolution; when none meets it the largest smallest resolution wins.
//!
//! Predictions: retention from [`programmed_elution`] (the migration integral); baseline widths
//! w = 4 t_M (1 + k_e)/√N with k_e the retention factor at the elution temperature (the usual
//! programmed-temperature width approximation, Harris & Habgood 1966, from memory; the same form
//! as the LC gradient width, band compression ignored); resolution Rs = 2 Δt/(w1 + w2)
//! (SKD 2010 ch. 2). The plate number comes from the scouting runs' own widths (median
//! apparent N under the same width model), from `--plates`, or from the column as N ≈ L/d_c
//! (Golay's minimum plate height of an open tube is about its diameter for retained analytes,
//! from memory; the rule `predict --mode gc` uses).
//!
//! Programs are evaluated as typed into an instrument method: temperatures to 1 °C, ramp rates to
//! 0.1 °C/min. The final temperature is set about 20 °C above the last peak's elution temperature
//! (rounded up to 5 °C, at most the limit) with a 3 min clean-out hold, as
//! [`crate::model::gc::suggest_oven_program`] does (common practice, no source); the peaks elute
//! before the final temperature is reached, so this choice does not move them. Search: a grid of
//! 5 °C × 0.5 °C/min, then a 1 °C × 0.1 °C/min grid around the best point. Ties are broken by
//! grid order, so results are deterministic.

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::measured::gc_scout::{
    GcScoutError, GcScoutFit, OvenPhase, VantHoffParameters, programmed_elution,
};
use crate::measured::optimise::{PredictedPair, Selection};
use crate::measured::parallel::map_in_order;
use crate::measured::search::Score;
use crate::measured::window_plot::{Edge, PlotPoint, WindowPlot, edge_of, render_window_plot};
use crate::model::gc::OvenProgram;

/// Clean-out hold at the final temperature, min (common practice, no source).
pub const CLEANOUT_HOLD_MIN: f64 = 3.0;
/// Margin of the final temperature above the last elution temperature, °C (common practice,
/// no source).
pub const FINAL_MARGIN_C: f64 = 20.0;

/// Errors from the GC optimiser.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum GcOptimiseError {
    /// Fewer than two analytes.
    #[error("need at least 2 analytes to optimise resolution, got {count}")]
    TooFewAnalytes {
        /// Analytes given.
        count: usize,
    },
    /// A search range is invalid.
    #[error("range for {name} is invalid: min {min}, max {max} ({reason})")]
    BadRange {
        /// Range name.
        name: &'static str,
        /// Lower end.
        min: f64,
        /// Upper end.
        max: f64,
        /// Why.
        reason: &'static str,
    },
    /// A single value is invalid.
    #[error("{name} = {value} is invalid ({reason})")]
    BadValue {
        /// Name.
        name: &'static str,
        /// Value.
        value: f64,
        /// Why.
        reason: &'static str,
    },
    /// A critical-pair name is not among the analytes.
    #[error("critical pair names `{name}`, which is not among the analytes ({known})")]
    UnknownAnalyte {
        /// The name.
        name: String,
        /// The analytes.
        known: String,
    },
    /// A critical pair names one analyte twice.
    #[error("critical pair `{name},{name}` names the same analyte twice")]
    CriticalPairSameAnalyte {
        /// The name.
        name: String,
    },
    /// Nothing elutes in time.
    #[error(
        "no oven program in the search ranges elutes every analyte within the maximum run time {max_run_time_min} min"
    )]
    NoFeasibleCondition {
        /// The limit, min.
        max_run_time_min: f64,
    },
    /// A program or elution failed.
    #[error(transparent)]
    Scout(#[from] GcScoutError),
}

/// One analyte for the optimiser.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcNamedAnalyte {
    /// Name.
    pub name: String,
    /// Parameters.
    pub parameters: VantHoffParameters,
    /// 1σ of A, of B (K) and their correlation, when known.
    pub uncertainty: Option<[f64; 3]>,
}

/// Closed range.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct TemperatureRange {
    /// Lower end.
    pub min: f64,
    /// Upper end.
    pub max: f64,
}

/// A GC optimisation request.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcOptimiseRequest {
    /// Analytes (two or more).
    pub analytes: Vec<GcNamedAnalyte>,
    /// Hold-up time, min.
    pub holdup_time_min: f64,
    /// Plate number for widths.
    pub plates: f64,
    /// Allowed initial temperature, °C.
    pub initial_c: TemperatureRange,
    /// Allowed ramp rate, °C/min.
    pub ramp_c_per_min: TemperatureRange,
    /// Initial hold, min.
    pub initial_hold_min: f64,
    /// Highest allowed oven temperature (phase limit), °C.
    pub max_temperature_c: f64,
    /// Latest allowed elution of the last peak, min.
    pub max_run_time_min: f64,
    /// Pairs to optimise (empty: all adjacent pairs).
    pub critical_pairs: Vec<[String; 2]>,
    /// Resolution target.
    pub target_resolution: f64,
    /// Minimum retention factor (tR − t_M)/t_M of the first peak.
    pub min_retention_factor: f64,
}

impl GcOptimiseRequest {
    /// The analytes of a fit, with their uncertainties.
    pub fn analytes_from_fit(fit: &GcScoutFit) -> Vec<GcNamedAnalyte> {
        fit.analytes
            .iter()
            .map(|a| GcNamedAnalyte {
                name: a.name.clone(),
                parameters: a.parameters(),
                uncertainty: (a.a_uncertainty.is_finite()
                    && a.b_uncertainty_k.is_finite()
                    && a.correlation.is_finite())
                .then_some([a.a_uncertainty, a.b_uncertainty_k, a.correlation]),
            })
            .collect()
    }
}

/// A predicted GC peak.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcPredictedPeak {
    /// Analyte.
    pub name: String,
    /// Retention time, min.
    pub retention_time_min: f64,
    /// 1σ of the retention time from the parameter uncertainties (linear propagation), min.
    pub retention_time_uncertainty_min: Option<f64>,
    /// Baseline width, min.
    pub width_base_min: f64,
    /// Oven temperature at elution, °C.
    pub elution_temperature_c: f64,
    /// Retention factor at the elution temperature (–).
    pub retention_factor_at_elution: f64,
    /// Part of the program at elution.
    pub phase: OvenPhase,
}

/// Predicted separation under one oven program.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcPrediction {
    /// The program (`--oven` syntax).
    pub program: String,
    /// Initial temperature, °C.
    pub initial_c: f64,
    /// Initial hold, min.
    pub initial_hold_min: f64,
    /// Ramp rate, °C/min.
    pub ramp_c_per_min: f64,
    /// Final temperature, °C.
    pub final_c: f64,
    /// Final hold, min.
    pub final_hold_min: f64,
    /// Peaks in elution order.
    pub peaks: Vec<GcPredictedPeak>,
    /// Adjacent pairs (or the critical pairs) with resolution.
    pub pairs: Vec<PredictedPair>,
    /// Smallest resolution among `pairs`.
    pub min_resolution: f64,
    /// The pair with the smallest resolution.
    pub critical_pair: [String; 2],
    /// Time the last peak leaves the column, min.
    pub run_time_min: f64,
    /// Programmed run time (end of the final hold), min.
    pub program_time_min: f64,
    /// Retention factor (tR − t_M)/t_M of the first peak (–).
    pub first_peak_retention_factor: f64,
}

/// One point of the GC window diagram.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcWindowPoint {
    /// Ramp rate, °C/min.
    pub ramp_c_per_min: f64,
    /// Smallest resolution.
    pub min_resolution: f64,
    /// Critical pair at this point.
    pub critical_pair: [String; 2],
    /// Last peak time, min.
    pub run_time_min: f64,
    /// Within the maximum run time.
    pub within_run_time: bool,
    /// First peak's retention factor (–).
    pub first_peak_retention_factor: f64,
    /// The first peak's retention factor is at least the minimum.
    pub meets_min_retention: bool,
}

/// Window diagram: smallest resolution versus ramp rate at the chosen initial temperature.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcWindowDiagram {
    /// Initial temperature held fixed, °C.
    pub initial_c: f64,
    /// Initial hold, min.
    pub initial_hold_min: f64,
    /// Resolution target line.
    pub target_resolution: f64,
    /// Minimum retention factor of the first peak.
    pub min_retention_factor: f64,
    /// Chosen ramp rate, °C/min.
    pub optimum_ramp_c_per_min: f64,
    /// Smallest resolution of the chosen condition.
    pub optimum_min_resolution: f64,
    /// The series, by ramp rate.
    pub points: Vec<GcWindowPoint>,
}

/// The GC optimiser's report.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcOptimiseReport {
    /// Plate number used for widths.
    pub plates_used: f64,
    /// Highest oven temperature allowed, °C.
    pub max_temperature_c: f64,
    /// The predicted separation at the optimum (its program is the recommendation).
    pub optimum: GcPrediction,
    /// Whether the optimum reaches the target resolution.
    pub meets_target: bool,
    /// Minimum retention factor of the first peak that was required.
    pub min_retention_factor: f64,
    /// Whether the optimum's first peak reaches it.
    pub meets_min_retention: bool,
    /// Which rule chose the optimum.
    pub selection: Selection,
    /// Window diagram at the chosen initial temperature.
    pub window: GcWindowDiagram,
    /// Programs evaluated.
    pub evaluated_conditions: usize,
    /// Notes (assumptions, warnings).
    pub notes: Vec<String>,
}

/// (index, tR, width, elution temperature °C, k_e, phase)
type El = (usize, f64, f64, f64, f64, OvenPhase);

struct Ctx<'a> {
    req: &'a GcOptimiseRequest,
    pairs: Vec<(usize, usize)>,
}

/// Rounds to a step of 1/n (0.1, 1): multiplies by n, so the result prints as typed (28.6, not
/// 28.600000000000001).
fn round_to(x: f64, step: f64) -> f64 {
    let n = (1.0 / step).round().max(1.0);
    (x * n).round() / n
}

impl Ctx<'_> {
    fn program(&self, initial_c: f64, ramp: f64) -> Result<OvenProgram, GcScoutError> {
        let t_max = self.req.max_temperature_c;
        if initial_c >= t_max {
            return Ok(OvenProgram::new(
                t_max,
                self.req.initial_hold_min.max(0.1),
                ramp,
                t_max,
                0.0,
            )?);
        }
        Ok(OvenProgram::new(
            initial_c,
            self.req.initial_hold_min,
            ramp,
            t_max,
            0.0,
        )?)
    }

    fn elute(&self, program: &OvenProgram) -> Option<Vec<El>> {
        let tm = self.req.holdup_time_min;
        map_in_order(&self.req.analytes, |i, a| {
            let e = programmed_elution(&a.parameters, program, tm).ok()?;
            let w = 4.0 * tm * (1.0 + e.retention_factor_at_elution) / self.req.plates.sqrt();
            w.is_finite().then_some((
                i,
                e.retention_time_min,
                w,
                e.elution_temperature_c,
                e.retention_factor_at_elution,
                e.phase,
            ))
        })
    }

    fn rs(a: &El, b: &El) -> f64 {
        2.0 * (b.1 - a.1).abs() / (a.2 + b.2)
    }

    fn sorted(&self, el: &[El]) -> Vec<El> {
        let mut s = el.to_vec();
        s.sort_by(|x, y| {
            x.1.total_cmp(&y.1).then_with(|| {
                self.req.analytes[x.0]
                    .name
                    .cmp(&self.req.analytes[y.0].name)
            })
        });
        s
    }

    fn pair_list(&self, el: &[El]) -> Vec<(usize, usize, f64)> {
        if self.pairs.is_empty() {
            self.sorted(el)
                .windows(2)
                .map(|w| (w[0].0, w[1].0, Self::rs(&w[0], &w[1])))
                .collect()
        } else {
            self.pairs
                .iter()
                .map(|&(i, j)| {
                    let (a, b) = if el[i].1 <= el[j].1 { (i, j) } else { (j, i) };
                    (a, b, Self::rs(&el[a], &el[b]))
                })
                .collect()
        }
    }

    fn score(&self, el: &[El]) -> Score {
        let tm = self.req.holdup_time_min;
        let run = el.iter().map(|x| x.1).fold(0.0, f64::max);
        let first = el.iter().map(|x| x.1).fold(f64::INFINITY, f64::min);
        let min_rs = if self.pairs.is_empty() {
            // Neighbours at the same time have Rs 0 in either order: no tie-break needed.
            let mut tw: Vec<(f64, f64)> = el.iter().map(|x| (x.1, x.2)).collect();
            tw.sort_unstable_by(|a, b| a.0.total_cmp(&b.0));
            tw.windows(2)
                .map(|w| 2.0 * (w[1].0 - w[0].0).abs() / (w[0].1 + w[1].1))
                .fold(f64::INFINITY, f64::min)
        } else {
            self.pair_list(el)
                .iter()
                .map(|p| p.2)
                .fold(f64::INFINITY, f64::min)
        };
        Score {
            feasible: run <= self.req.max_run_time_min && min_rs.is_finite(),
            retained: (first - tm) / tm >= self.req.min_retention_factor - 1e-12,
            meets: min_rs >= self.req.target_resolution,
            min_rs,
            run,
        }
    }

    fn evaluate(&self, initial_c: f64, ramp: f64) -> Option<(Score, Vec<El>)> {
        let p = self.program(initial_c, ramp).ok()?;
        let el = self.elute(&p)?;
        Some((self.score(&el), el))
    }

    /// The program as it would be written: final temperature FINAL_MARGIN_C above the last
    /// elution (rounded up to 5 °C, at most the limit) and a clean-out hold, long enough for a
    /// peak that elutes at the final temperature.
    fn written_program(&self, initial_c: f64, ramp: f64, el: &[El]) -> Option<OvenProgram> {
        let base = self.program(initial_c, ramp).ok()?;
        let t_max = self.req.max_temperature_c;
        let last_t = el.iter().map(|x| x.3).fold(f64::NEG_INFINITY, f64::max);
        let last_tr = el.iter().map(|x| x.1).fold(0.0, f64::max);
        let final_c = (((last_t + FINAL_MARGIN_C) / 5.0).ceil() * 5.0)
            .min(t_max)
            .max(base.initial_c());
        let ramp_end = base.initial_hold_min()
            + if final_c > base.initial_c() {
                (final_c - base.initial_c()) / ramp
            } else {
                0.0
            };
        let hold = ((last_tr - ramp_end).max(0.0) * 10.0).ceil() / 10.0 + CLEANOUT_HOLD_MIN;
        OvenProgram::new(
            base.initial_c(),
            base.initial_hold_min(),
            ramp,
            final_c,
            hold,
        )
        .ok()
    }

    fn propagate(&self, a: &GcNamedAnalyte, program: &OvenProgram) -> Option<f64> {
        let [sa, sb, rho] = a.uncertainty?;
        let tm = self.req.holdup_time_min;
        let tr = |da: f64, db: f64| {
            programmed_elution(
                &VantHoffParameters {
                    a: a.parameters.a + da,
                    b_k: a.parameters.b_k + db,
                },
                program,
                tm,
            )
            .ok()
            .map(|e| e.retention_time_min)
        };
        let (ha, hb) = (1e-5, 1e-5 * a.parameters.b_k.abs().max(1.0));
        let ja = (tr(ha, 0.0)? - tr(-ha, 0.0)?) / (2.0 * ha);
        let jb = (tr(0.0, hb)? - tr(0.0, -hb)?) / (2.0 * hb);
        let var = ja * ja * sa * sa + jb * jb * sb * sb + 2.0 * rho * ja * jb * sa * sb;
        (var.is_finite() && var >= 0.0).then(|| var.sqrt())
    }

    fn prediction(&self, program: &OvenProgram) -> Option<(Score, GcPrediction)> {
        let el = self.elute(program)?;
        let score = self.score(&el);
        let pairs = self.pair_list(&el);
        let name = |i: usize| self.req.analytes[i].name.clone();
        let crit = pairs
            .iter()
            .min_by(|a, b| a.2.total_cmp(&b.2))
            .map(|p| [name(p.0), name(p.1)])
            .unwrap_or_default();
        let tm = self.req.holdup_time_min;
        let first = el.iter().map(|x| x.1).fold(f64::INFINITY, f64::min);
        let peaks = self
            .sorted(&el)
            .into_iter()
            .map(|x| GcPredictedPeak {
                name: name(x.0),
                retention_time_min: x.1,
                retention_time_uncertainty_min: self.propagate(&self.req.analytes[x.0], program),
                width_base_min: x.2,
                elution_temperature_c: x.3,
                retention_factor_at_elution: x.4,
                phase: x.5,
            })
            .collect();
        Some((
            score,
            GcPrediction {
                program: program.to_spec(),
                initial_c: program.initial_c(),
                initial_hold_min: program.initial_hold_min(),
                ramp_c_per_min: program.ramp_c_per_min(),
                final_c: program.final_c(),
                final_hold_min: program.final_hold_min(),
                peaks,
                pairs: pairs
                    .iter()
                    .map(|p| PredictedPair {
                        first: name(p.0),
                        second: name(p.1),
                        resolution: p.2,
                    })
                    .collect(),
                min_resolution: score.min_rs,
                critical_pair: crit,
                run_time_min: score.run,
                program_time_min: program.total_time_min(),
                first_peak_retention_factor: (first - tm) / tm,
            },
        ))
    }
}

fn grid(r: TemperatureRange, step: f64) -> Vec<f64> {
    let lo = (r.min / step - 1e-9).ceil() * step;
    let mut v = Vec::new();
    let mut i = 0.0;
    while lo + i * step <= r.max + 1e-9 {
        v.push(round_to(lo + i * step, 0.1));
        i += 1.0;
    }
    if v.is_empty() {
        v.push(round_to(r.min, 0.1));
    }
    v
}

fn check_range(
    name: &'static str,
    r: TemperatureRange,
    lo: f64,
    hi: f64,
    reason: &'static str,
) -> Result<(), GcOptimiseError> {
    if !(r.min.is_finite() && r.max.is_finite() && r.min <= r.max && r.min >= lo && r.max <= hi) {
        return Err(GcOptimiseError::BadRange {
            name,
            min: r.min,
            max: r.max,
            reason,
        });
    }
    Ok(())
}

/// Optimises the oven program for the analytes of the request.
///
/// # Errors
/// Fewer than 2 analytes, invalid ranges or values, unknown critical-pair names, or no program
/// that elutes every analyte within the maximum run time.
pub fn optimise_gc(req: &GcOptimiseRequest) -> Result<GcOptimiseReport, GcOptimiseError> {
    if req.analytes.len() < 2 {
        return Err(GcOptimiseError::TooFewAnalytes {
            count: req.analytes.len(),
        });
    }
    let value = |name: &'static str, v: f64, ok: bool, reason: &'static str| {
        if ok && v.is_finite() {
            Ok(())
        } else {
            Err(GcOptimiseError::BadValue {
                name,
                value: v,
                reason,
            })
        }
    };
    value(
        "holdup_time_min",
        req.holdup_time_min,
        req.holdup_time_min > 0.0,
        "must be greater than zero",
    )?;
    value(
        "plates",
        req.plates,
        req.plates >= 1.0,
        "must be at least 1",
    )?;
    value(
        "max_run_time_min",
        req.max_run_time_min,
        req.max_run_time_min > 0.0,
        "must be greater than zero",
    )?;
    value(
        "initial_hold_min",
        req.initial_hold_min,
        (0.0..=600.0).contains(&req.initial_hold_min),
        "must be 0 to 600 min",
    )?;
    value(
        "max_temperature_c",
        req.max_temperature_c,
        (-100.0..=450.0).contains(&req.max_temperature_c),
        "must be -100 to 450 °C",
    )?;
    value(
        "target_resolution",
        req.target_resolution,
        req.target_resolution >= 0.0,
        "must be zero or more",
    )?;
    value(
        "min_retention_factor",
        req.min_retention_factor,
        req.min_retention_factor >= 0.0,
        "must be zero or more",
    )?;
    check_range(
        "initial_c",
        req.initial_c,
        -100.0,
        req.max_temperature_c,
        "must lie between -100 °C and the maximum temperature",
    )?;
    check_range(
        "ramp_c_per_min",
        req.ramp_c_per_min,
        0.1,
        100.0,
        "ramp rates must lie in 0.1–100 °C/min",
    )?;
    for a in &req.analytes {
        value(
            "A",
            a.parameters.a,
            a.parameters.a.is_finite(),
            "must be finite",
        )?;
        value(
            "B (K)",
            a.parameters.b_k,
            a.parameters.b_k.is_finite(),
            "must be finite",
        )?;
    }
    let known = || {
        req.analytes
            .iter()
            .map(|a| a.name.as_str())
            .collect::<Vec<_>>()
            .join(", ")
    };
    let by_name: std::collections::HashMap<&str, usize> = req
        .analytes
        .iter()
        .enumerate()
        .map(|(i, a)| (a.name.as_str(), i))
        .rev()
        .collect();
    let index = |n: &str| {
        by_name
            .get(n)
            .copied()
            .ok_or_else(|| GcOptimiseError::UnknownAnalyte {
                name: n.to_string(),
                known: known(),
            })
    };
    let mut pairs = Vec::new();
    for [x, y] in &req.critical_pairs {
        if x == y {
            return Err(GcOptimiseError::CriticalPairSameAnalyte { name: x.clone() });
        }
        pairs.push((index(x)?, index(y)?));
    }
    let ctx = Ctx { req, pairs };
    let mut evaluated = 0usize;
    let mut best: Option<(Score, f64, f64)> = None;
    let mut consider = |t0: f64, r: f64, best: &mut Option<(Score, f64, f64)>| {
        evaluated += 1;
        if let Some((s, _)) = ctx.evaluate(t0, r)
            && best.as_ref().is_none_or(|(b, _, _)| s.better_than(b))
        {
            *best = Some((s, t0, r));
        }
    };
    let t_grid = grid(req.initial_c, 5.0);
    let r_grid = grid(req.ramp_c_per_min, 0.5);
    for &t0 in &t_grid {
        for &r in &r_grid {
            consider(t0, r, &mut best);
        }
    }
    if let Some((_, t0, r)) = best {
        for dt in -4..=4 {
            for dr in -4..=4 {
                let t = round_to(t0 + f64::from(dt), 1.0);
                let q = round_to(r + 0.1 * f64::from(dr), 0.1);
                if (dt, dr) != (0, 0)
                    && t >= req.initial_c.min - 1e-9
                    && t <= req.initial_c.max + 1e-9
                    && q >= req.ramp_c_per_min.min - 1e-9
                    && q <= req.ramp_c_per_min.max + 1e-9
                {
                    consider(t, q, &mut best);
                }
            }
        }
    }
    let Some((score, t0, r)) = best else {
        return Err(GcOptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        });
    };
    if !score.feasible {
        return Err(GcOptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        });
    }
    let Some((_, el)) = ctx.evaluate(t0, r) else {
        return Err(GcOptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        });
    };
    let Some(written) = ctx.written_program(t0, r, &el) else {
        return Err(GcOptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        });
    };
    let Some((score, optimum)) = ctx.prediction(&written) else {
        return Err(GcOptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        });
    };
    // Window diagram: the ramp grid, plus the chosen rate, at the chosen initial temperature.
    let mut rates = r_grid.clone();
    if !rates.iter().any(|q| (q - r).abs() < 1e-9) {
        rates.push(r);
        rates.sort_by(f64::total_cmp);
    }
    let tm = req.holdup_time_min;
    let mut points = Vec::new();
    for q in rates {
        let Some((s, e)) = ctx.evaluate(t0, q) else {
            continue;
        };
        let pl = ctx.pair_list(&e);
        let crit = pl
            .iter()
            .min_by(|a, b| a.2.total_cmp(&b.2))
            .map(|p| {
                [
                    req.analytes[p.0].name.clone(),
                    req.analytes[p.1].name.clone(),
                ]
            })
            .unwrap_or_default();
        let first = e.iter().map(|x| x.1).fold(f64::INFINITY, f64::min);
        points.push(GcWindowPoint {
            ramp_c_per_min: q,
            min_resolution: s.min_rs,
            critical_pair: crit,
            run_time_min: s.run,
            within_run_time: s.feasible,
            first_peak_retention_factor: (first - tm) / tm,
            meets_min_retention: s.retained,
        });
    }
    let mut notes = vec![format!(
        "widths w = 4 t_M (1 + k_e)/√N with N = {:.0}; final temperature {} °C ({} °C above the last elution, at most the limit {} °C) with a {} min clean-out hold",
        req.plates,
        written.final_c(),
        FINAL_MARGIN_C,
        req.max_temperature_c,
        CLEANOUT_HOLD_MIN
    )];
    let selection = if score.meets {
        notes.push("chosen: the shortest run whose smallest resolution meets the target".into());
        Selection::ShortestRunMeetingTarget
    } else {
        notes.push(
            "no program in the search ranges meets the target resolution: the largest smallest resolution is shown; consider another phase, a longer column or a narrower bore"
                .into(),
        );
        Selection::LargestMinResolution
    };
    if !score.retained {
        notes.push(format!(
            "the first peak elutes at k = {:.2}, below the minimum {}: lower the lower end of the initial-temperature range",
            optimum.first_peak_retention_factor, req.min_retention_factor
        ));
    }
    if (t0 - req.initial_c.min).abs() < 1e-9 && req.initial_c.min > -100.0 {
        notes.push(format!(
            "the chosen initial temperature is the lower end of the allowed range ({} °C); a lower start may separate the early peaks better",
            req.initial_c.min
        ));
    }
    if let Some(edge) = edge_of(r, req.ramp_c_per_min.min, req.ramp_c_per_min.max) {
        let (side, bound) = match edge {
            Edge::Lower => ("lower", req.ramp_c_per_min.min),
            Edge::Upper => ("upper", req.ramp_c_per_min.max),
        };
        notes.push(format!(
            "the chosen ramp rate ({r:.1} °C/min) is at the {side} edge of the searched range \
             ({}–{} °C/min): rates beyond {bound} °C/min were not tried; widen the range to \
             see whether they do better",
            req.ramp_c_per_min.min, req.ramp_c_per_min.max
        ));
    }
    if optimum
        .peaks
        .iter()
        .any(|p| p.phase == OvenPhase::FinalHold)
    {
        notes.push(
            "some peaks elute at the final temperature (isothermal tail): a more retentive phase or a higher limit may help"
                .into(),
        );
    }
    Ok(GcOptimiseReport {
        plates_used: req.plates,
        max_temperature_c: req.max_temperature_c,
        meets_target: score.meets,
        min_retention_factor: req.min_retention_factor,
        meets_min_retention: score.retained,
        selection,
        window: GcWindowDiagram {
            initial_c: t0,
            initial_hold_min: written.initial_hold_min(),
            target_resolution: req.target_resolution,
            min_retention_factor: req.min_retention_factor,
            optimum_ramp_c_per_min: r,
            optimum_min_resolution: score.min_rs,
            points,
        },
        optimum,
        evaluated_conditions: evaluated,
        notes,
    })
}

/// Renders the GC window diagram (smallest resolution versus ramp rate) as a standalone SVG,
/// drawn like the LC one ([`crate::measured::optimise::render_window_svg`]).
pub fn render_gc_window_svg(d: &GcWindowDiagram) -> String {
    render_window_plot(&WindowPlot {
        title: format!(
            "Window diagram: smallest resolution versus oven ramp rate (initial {} °C, {} min hold)",
            d.initial_c, d.initial_hold_min
        ),
        x_label: "Ramp rate (°C/min)".into(),
        heading: format!(
            "Window diagram, one ramp from {} °C held {} min",
            d.initial_c, d.initial_hold_min
        ),
        x_name: ("ramp rate", "°C/min"),
        chosen_label: format!(
            "chosen ramp = {:.1} °C/min, Rs = {:.2}",
            d.optimum_ramp_c_per_min, d.optimum_min_resolution
        ),
        target_resolution: d.target_resolution,
        min_retention_factor: d.min_retention_factor,
        optimum_x: d.optimum_ramp_c_per_min,
        optimum_min_resolution: d.optimum_min_resolution,
        points: d
            .points
            .iter()
            .map(|p| PlotPoint {
                x: p.ramp_c_per_min,
                min_resolution: p.min_resolution,
                within_run_time: p.within_run_time,
                meets_min_retention: p.meets_min_retention,
            })
            .collect(),
    })
}

#[cfg(test)]
mod tests;
