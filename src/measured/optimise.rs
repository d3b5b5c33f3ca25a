//! Gradient optimisation from fitted LSS parameters: search gradient time, initial and final
//! % organic (optionally a two-segment gradient) for the shortest run whose smallest resolution
//! of all adjacent pairs (or of named critical pairs) meets the target, with the first peak
//! retained to a minimum retention factor and every peak out within a maximum run time; and the
//! window diagram (smallest resolution versus gradient time) with a hand-written SVG renderer.
//!
//! Selection rule (common practice, no source): among conditions with every peak out within the
//! maximum run time and the first peak at k = (tR − t0)/t0 ≥ the minimum, those whose smallest
//! resolution meets the target win, and among them the shortest run (last peak out) wins, then
//! the larger smallest resolution. When no condition meets the target, the largest smallest
//! resolution wins (then the shorter run), and the report says so. Conditions that violate the
//! minimum retention factor lose to every condition that keeps it; when none keeps it the report
//! says so.
//!
//! Every program is evaluated as it would be typed into an instrument method: times rounded to
//! 0.1 min and compositions to 0.1 % before prediction, so the reported program is exactly the
//! one whose retention is reported.
//!
//! Predictions: retention from [`gradient_elution`](crate::model::gradient::gradient_elution) (exact for LSS), baseline widths
//! w = 4 t0 (1 + k_e)/√N (SD 2007 ch. 2, band compression ignored, G = 1), resolution
//! Rs = 2 Δt/(w1 + w2) (SKD 2010 ch. 2). Search: a full grid over (tG, %B start, %B end),
//! then compass (pattern) search with step halving from the best grid points. Remaining ties are
//! broken by grid order, so results are deterministic.
//!
//! Predictions are starting points to verify by a confirming run; the LSS model ignores
//! curvature and peak-shape effects.

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::measured::scout::ScoutFit;
use crate::measured::search::{Score, compass_search};
use crate::measured::window_plot::{PlotPoint, WindowPlot, render_window_plot};
use crate::model::gradient::{
    ElutionPhase, GradientError, GradientPoint, GradientProgram, GradientSystem, LssParameters,
};
use crate::model::theory::{self, TheoryError};
use context::{Ctx, name_ranks};

/// Errors from the optimiser.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum OptimiseError {
    /// Fewer than two analytes.
    #[error("need at least 2 analytes to optimise resolution, got {count}")]
    TooFewAnalytes {
        /// Analytes given.
        count: usize,
    },
    /// A search range is empty or invalid.
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
    /// A grid setting is outside what the search supports.
    #[error("{name} = {value} is outside {min}..={max}; choose a value in that range")]
    BadGridSetting {
        /// Setting name.
        name: &'static str,
        /// Value given.
        value: f64,
        /// Lowest allowed.
        min: f64,
        /// Highest allowed.
        max: f64,
    },
    /// A critical-pair name is unknown.
    #[error("critical pair names `{name}`, which is not among the analytes ({available})")]
    UnknownAnalyte {
        /// The name.
        name: String,
        /// Analytes available.
        available: String,
    },
    /// A critical pair names one analyte twice.
    #[error("critical pair names `{name}` twice; give two different analytes")]
    CriticalPairSameAnalyte {
        /// The name.
        name: String,
    },
    /// Two analytes share a name.
    #[error("analyte `{name}` is listed twice")]
    DuplicateAnalyte {
        /// The name.
        name: String,
    },
    /// No condition in the search space elutes everything within the run time.
    #[error(
        "no gradient in the search space elutes every analyte within {max_run_time_min} min; \
         allow a longer run, a higher final % organic or a shorter gradient"
    )]
    NoFeasibleCondition {
        /// Maximum run time, min.
        max_run_time_min: f64,
    },
    /// A quantity failed validation.
    #[error(transparent)]
    Theory(#[from] TheoryError),
    /// A gradient could not be built or evaluated.
    #[error(transparent)]
    Gradient(#[from] GradientError),
}

/// An analyte with its LSS parameters.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct NamedAnalyte {
    /// Name.
    pub name: String,
    /// log10 kw.
    pub log_kw: f64,
    /// S.
    pub s: f64,
    /// 1σ uncertainty of log kw and S and their correlation (from a scouting fit), used to put
    /// an interval on predicted retention times; None when unknown.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub uncertainty: Option<ParameterUncertainty>,
}

/// 1σ uncertainties of fitted LSS parameters.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ParameterUncertainty {
    /// 1σ of log kw.
    pub log_kw: f64,
    /// 1σ of S.
    pub s: f64,
    /// Correlation of the two estimates (−1..1).
    pub correlation: f64,
}

/// Where the plate number for widths comes from.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(tag = "source", rename_all = "snake_case")]
pub enum PlateSource {
    /// A measured or assumed plate number.
    Given {
        /// Plate number N.
        plates: f64,
    },
    /// N = L/(2.5 dp) ([`theory::estimated_plate_number`]).
    Estimated {
        /// Column length, mm.
        column_length_mm: f64,
        /// Particle size, µm.
        particle_size_um: f64,
    },
}

impl PlateSource {
    /// The plate number.
    ///
    /// # Errors
    /// Non-positive inputs.
    pub fn plates(&self) -> Result<f64, TheoryError> {
        match *self {
            PlateSource::Given { plates } => theory::positive("plate number", plates),
            PlateSource::Estimated {
                column_length_mm,
                particle_size_um,
            } => theory::estimated_plate_number(column_length_mm, particle_size_um),
        }
    }
}

/// A closed range.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Range {
    /// Lower end.
    pub min: f64,
    /// Upper end.
    pub max: f64,
}

/// An optimisation request.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OptimiseRequest {
    /// Analytes with LSS parameters (e.g. from [`ScoutFit`] via [`OptimiseRequest::analytes_from_fit`]).
    pub analytes: Vec<NamedAnalyte>,
    /// Dead time, min.
    pub dead_time_min: f64,
    /// Dwell time, min.
    pub dwell_time_min: f64,
    /// Plate number for peak widths.
    pub plates: PlateSource,
    /// Allowed gradient (ramp) time, min.
    pub gradient_time_min: Range,
    /// Allowed initial composition, % organic.
    pub initial_pct: Range,
    /// Allowed final composition, % organic.
    pub final_pct: Range,
    /// Maximum run time (last peak out), min.
    pub max_run_time_min: f64,
    /// If given, only these pairs' resolution counts.
    #[serde(default)]
    pub critical_pairs: Vec<[String; 2]>,
    /// Also try a two-segment gradient (start → knee → end).
    #[serde(default)]
    pub two_segment: bool,
    /// Resolution target: conditions meeting it are ranked by run time (shortest first); drawn
    /// in the window diagram; default 1.5.
    #[serde(default = "default_target")]
    pub target_resolution: f64,
    /// Smallest acceptable retention factor k = (tR − t0)/t0 of the first peak; default 1
    /// (common practice, no source: peaks closer to the dead time share it with unretained
    /// matrix and injection disturbances).
    #[serde(default = "default_min_k")]
    pub min_retention_factor: f64,
    /// Grid steps for gradient time (≥ 2); default 25.
    #[serde(default = "default_tg_steps")]
    pub gradient_time_steps: usize,
    /// Grid step for compositions, % organic; default 5.
    #[serde(default = "default_pct_step")]
    pub composition_step_pct: f64,
}

fn default_target() -> f64 {
    1.5
}
fn default_min_k() -> f64 {
    1.0
}
fn default_tg_steps() -> usize {
    25
}
fn default_pct_step() -> f64 {
    5.0
}

impl OptimiseRequest {
    /// Analytes from a scouting fit.
    pub fn analytes_from_fit(fit: &ScoutFit) -> Vec<NamedAnalyte> {
        fit.analytes
            .iter()
            .map(|a| NamedAnalyte {
                name: a.name.clone(),
                log_kw: a.log_kw,
                s: a.s,
                uncertainty: (a.log_kw_uncertainty.is_finite()
                    && a.s_uncertainty.is_finite()
                    && a.correlation.is_finite())
                .then_some(ParameterUncertainty {
                    log_kw: a.log_kw_uncertainty,
                    s: a.s_uncertainty,
                    correlation: a.correlation,
                }),
            })
            .collect()
    }
}

/// A predicted peak under given conditions.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PredictedPeak {
    /// Analyte.
    pub name: String,
    /// Retention time, min.
    pub retention_time_min: f64,
    /// Baseline width, min.
    pub width_base_min: f64,
    /// Composition at elution, %.
    pub organic_at_elution_pct: f64,
    /// Phase of the run at elution.
    pub phase: ElutionPhase,
    /// 1σ of the retention time from the parameter uncertainties (linear propagation), min;
    /// None when the analyte has no uncertainty.
    pub retention_time_uncertainty_min: Option<f64>,
}

/// A predicted pair.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PredictedPair {
    /// Earlier analyte.
    pub first: String,
    /// Later analyte.
    pub second: String,
    /// Resolution.
    pub resolution: f64,
}

/// Predicted separation under one gradient program.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Prediction {
    /// The program.
    pub program: GradientProgram,
    /// Peaks in elution order.
    pub peaks: Vec<PredictedPeak>,
    /// Adjacent pairs (or the critical pairs) with resolution.
    pub pairs: Vec<PredictedPair>,
    /// Smallest resolution among `pairs`.
    pub min_resolution: f64,
    /// The pair with the smallest resolution.
    pub critical_pair: [String; 2],
    /// Time the last peak leaves the column, min.
    pub run_time_min: f64,
    /// Retention factor k = (tR − t0)/t0 of the first peak (–).
    pub first_peak_retention_factor: f64,
}

/// One point of the window diagram.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct WindowPoint {
    /// Gradient time, min.
    pub gradient_time_min: f64,
    /// Smallest resolution.
    pub min_resolution: f64,
    /// Critical pair at this point.
    pub critical_pair: [String; 2],
    /// Last peak time, min.
    pub run_time_min: f64,
    /// Within the maximum run time.
    pub within_run_time: bool,
    /// Retention factor k = (tR − t0)/t0 of the first peak (–).
    pub first_peak_retention_factor: f64,
    /// The first peak's retention factor is at least the minimum.
    pub meets_min_retention: bool,
}

/// Window diagram: smallest resolution versus gradient time at fixed start and end composition.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct WindowDiagram {
    /// Initial composition held fixed, %.
    pub initial_pct: f64,
    /// Final composition held fixed, %.
    pub final_pct: f64,
    /// Resolution target line.
    pub target_resolution: f64,
    /// Minimum retention factor of the first peak (points below it are marked).
    pub min_retention_factor: f64,
    /// Chosen gradient time marked on the diagram, min.
    pub optimum_gradient_time_min: f64,
    /// Smallest resolution of the chosen condition (the marked point).
    pub optimum_min_resolution: f64,
    /// The chosen condition is a two-segment gradient (so the marked point is not on the
    /// linear-ramp curve).
    pub optimum_is_two_segment: bool,
    /// The series.
    pub points: Vec<WindowPoint>,
}

/// The optimiser's report.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OptimiseReport {
    /// Plate number used for widths.
    pub plates_used: f64,
    /// Best gradient time, min (end of ramp).
    pub gradient_time_min: f64,
    /// Best initial composition, %.
    pub initial_pct: f64,
    /// Best final composition, %.
    pub final_pct: f64,
    /// Knee of the two-segment gradient, when it was better.
    pub knee: Option<GradientPoint>,
    /// The predicted separation at the optimum.
    pub optimum: Prediction,
    /// Whether the optimum reaches the target resolution.
    pub meets_target: bool,
    /// Minimum retention factor of the first peak that was required.
    pub min_retention_factor: f64,
    /// Whether the optimum's first peak reaches the minimum retention factor.
    pub meets_min_retention: bool,
    /// Which rule chose the optimum.
    pub selection: Selection,
    /// Best single-linear-ramp result (for comparison when a two-segment gradient won).
    pub best_linear_min_resolution: f64,
    /// Window diagram around the optimum.
    pub window: WindowDiagram,
    /// Conditions evaluated.
    pub evaluated_conditions: usize,
    /// Notes (assumptions, warnings).
    pub notes: Vec<String>,
}

impl Prediction {
    /// The same prediction with compositions complemented (100 − %): the programs of a fit in
    /// the water fraction (HILIC) written back in % organic. The optimiser's programs are on
    /// the 0.1 % grid, and so are their complements (rounded so that they print as typed).
    pub fn complement(&mut self) {
        let points: Vec<GradientPoint> = self
            .program
            .points()
            .iter()
            .map(|p| GradientPoint {
                time_min: p.time_min,
                organic_pct: round_to_tenth(100.0 - p.organic_pct),
            })
            .collect();
        self.program =
            GradientProgram::from_points(&points).unwrap_or_else(|_| self.program.complement());
        for p in &mut self.peaks {
            p.organic_at_elution_pct = 100.0 - p.organic_at_elution_pct;
        }
    }
}

impl OptimiseReport {
    /// The report with every composition complemented (100 − %), for an optimisation run in
    /// the water fraction (HILIC) and reported in % organic: initial and final composition,
    /// knee, programs, compositions at elution and the window diagram's compositions.
    pub fn complement(&mut self) {
        self.initial_pct = round_to_tenth(100.0 - self.initial_pct);
        self.final_pct = round_to_tenth(100.0 - self.final_pct);
        if let Some(k) = &mut self.knee {
            k.organic_pct = round_to_tenth(100.0 - k.organic_pct);
        }
        self.optimum.complement();
        self.window.initial_pct = round_to_tenth(100.0 - self.window.initial_pct);
        self.window.final_pct = round_to_tenth(100.0 - self.window.final_pct);
    }
}

/// Which rule chose the reported condition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Selection {
    /// Some conditions met the target resolution: the shortest run among them.
    ShortestRunMeetingTarget,
    /// No condition met the target: the largest smallest resolution.
    LargestMinResolution,
}

/// Optimises a gradient for the analytes of the request.
///
/// # Errors
/// Fewer than 2 analytes, invalid ranges, unknown critical-pair names, invalid plate source or
/// times, or no feasible condition.
pub fn optimise(req: &OptimiseRequest) -> Result<OptimiseReport, OptimiseError> {
    if req.analytes.len() < 2 {
        return Err(OptimiseError::TooFewAnalytes {
            count: req.analytes.len(),
        });
    }
    let mut seen = std::collections::HashSet::with_capacity(req.analytes.len());
    for a in &req.analytes {
        if !seen.insert(a.name.as_str()) {
            return Err(OptimiseError::DuplicateAnalyte {
                name: a.name.clone(),
            });
        }
        theory::finite("log kw", a.log_kw)?;
        theory::finite("S", a.s)?;
    }
    theory::positive("dead time (min)", req.dead_time_min)?;
    theory::non_negative("dwell time (min)", req.dwell_time_min)?;
    theory::positive("maximum run time (min)", req.max_run_time_min)?;
    theory::positive("composition grid step (%)", req.composition_step_pct)?;
    // Bound the grid so a typo cannot make the search run for hours.
    if !(0.1..=50.0).contains(&req.composition_step_pct) {
        return Err(OptimiseError::BadGridSetting {
            name: "composition_step_pct",
            value: req.composition_step_pct,
            min: 0.1,
            max: 50.0,
        });
    }
    if !(2..=500).contains(&req.gradient_time_steps) {
        return Err(OptimiseError::BadGridSetting {
            name: "gradient_time_steps",
            value: req.gradient_time_steps as f64,
            min: 2.0,
            max: 500.0,
        });
    }
    theory::non_negative("target resolution", req.target_resolution)?;
    theory::non_negative(
        "minimum retention factor of the first peak",
        req.min_retention_factor,
    )?;
    check_range(
        "gradient_time_min",
        req.gradient_time_min,
        f64::MIN_POSITIVE,
        f64::MAX,
    )?;
    check_range("initial_pct", req.initial_pct, 0.0, 100.0)?;
    check_range("final_pct", req.final_pct, 0.0, 100.0)?;
    // Programs are written and evaluated on a 0.1 min / 0.1 % grid: keep the search inside the
    // range by moving its ends inwards onto that grid.
    let gradient_range = tenth_range("gradient_time_min", req.gradient_time_min)?;
    let initial_range = tenth_range("initial_pct", req.initial_pct)?;
    let final_range = tenth_range("final_pct", req.final_pct)?;
    if req.final_pct.max <= req.initial_pct.min {
        return Err(OptimiseError::BadRange {
            name: "final_pct",
            min: req.final_pct.min,
            max: req.final_pct.max,
            reason: "final % organic must be able to exceed the initial %",
        });
    }
    let plates = req.plates.plates()?;
    let names: Vec<&str> = req.analytes.iter().map(|a| a.name.as_str()).collect();
    let index: std::collections::HashMap<&str, usize> =
        names.iter().enumerate().map(|(i, n)| (*n, i)).collect();
    let mut pairs = Vec::new();
    for [a, b] in &req.critical_pairs {
        if a == b {
            return Err(OptimiseError::CriticalPairSameAnalyte { name: a.clone() });
        }
        let find = |n: &String| {
            index
                .get(n.as_str())
                .copied()
                .ok_or_else(|| OptimiseError::UnknownAnalyte {
                    name: n.clone(),
                    available: names.join(", "),
                })
        };
        pairs.push((find(a)?, find(b)?));
    }
    let ctx = Ctx {
        analytes: req
            .analytes
            .iter()
            .map(|a| {
                (
                    a.name.as_str(),
                    LssParameters {
                        log_kw: a.log_kw,
                        s: a.s,
                    },
                )
            })
            .collect(),
        uncertainty: req.analytes.iter().map(|a| a.uncertainty).collect(),
        system: GradientSystem {
            dead_time_min: req.dead_time_min,
            dwell_time_min: req.dwell_time_min,
        },
        plates,
        pairs,
        max_run: req.max_run_time_min,
        target: req.target_resolution,
        min_k: req.min_retention_factor,
        name_rank: name_ranks(&names),
    };
    let mut evaluated = 0usize;
    let mut eval = |p: &GradientProgram| -> Option<Score> {
        evaluated += 1;
        ctx.score_of(p)
    };
    // Grid over linear gradients.
    let tgs = linspace(gradient_range, req.gradient_time_steps.max(2));
    let inits = steps(initial_range, req.composition_step_pct);
    let finals = steps(final_range, req.composition_step_pct);
    let mut grid: Vec<(Score, [f64; 3])> = Vec::new();
    for &tg in &tgs {
        for &i in &inits {
            for &f in &finals {
                if let Some(p) = linear(i, f, tg)
                    && let Some(s) = eval(&p)
                {
                    grid.push((s, [tg, i, f]));
                }
            }
        }
    }
    // Best few grid points (stable order: grid order breaks ties).
    let mut order: Vec<usize> = (0..grid.len()).collect();
    order.sort_by(|&a, &b| grid[a].0.rank_cmp(&grid[b].0).then(a.cmp(&b)));
    if order.is_empty() || !grid[order[0]].0.feasible {
        return Err(OptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        });
    }
    let lo = [gradient_range.min, initial_range.min, final_range.min];
    let hi = [gradient_range.max, initial_range.max, final_range.max];
    let init_step = [
        ((hi[0] - lo[0]) / (tgs.len().max(2) - 1) as f64).max(1e-3),
        req.composition_step_pct,
        req.composition_step_pct,
    ];
    let mut best_lin: Option<(Score, [f64; 3])> = None;
    for &gi in order.iter().take(5) {
        let (s, x) = grid[gi];
        if !s.feasible {
            continue;
        }
        // Below half the 0.1 program step no move can change the program.
        let (s, x) = compass_search(
            (s, x),
            &lo,
            &hi,
            init_step,
            200,
            |y| linear(y[1], y[2], y[0]).and_then(|p| eval(&p)),
            |step| step[0] < 0.05 && step[1] < 0.05,
        );
        if best_lin.as_ref().is_none_or(|(b, _)| s.better_than(b)) {
            best_lin = Some((s, x));
        }
    }
    let Some((lin_score, lin_x)) = best_lin else {
        return Err(OptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        });
    };
    let mut best_program =
        linear(lin_x[1], lin_x[2], lin_x[0]).ok_or(OptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        })?;
    let mut knee = None;
    let mut notes = Vec::new();
    if req.two_segment {
        // Knee at fraction u of tG and composition v of the way from start to end.
        let mut best2: Option<(Score, [f64; 5])> = None;
        for iu in 1..10 {
            for iv in 1..10 {
                let (u, v) = (iu as f64 / 10.0, iv as f64 / 10.0);
                let x = [lin_x[0], lin_x[1], lin_x[2], u, v];
                let kp = x[1] + v * (x[2] - x[1]);
                if let Some(p) = two_segment(x[1], u, kp, x[2], x[0])
                    && let Some(s) = eval(&p)
                    && best2.as_ref().is_none_or(|(b, _)| s.better_than(b))
                {
                    best2 = Some((s, x));
                }
            }
        }
        if let Some(start) = best2 {
            let lo5 = [lo[0], lo[1], lo[2], 0.02, 0.0];
            let hi5 = [hi[0], hi[1], hi[2], 0.98, 1.0];
            let step = [init_step[0], init_step[1], init_step[2], 0.05, 0.05];
            let (s, x) = compass_search(
                start,
                &lo5,
                &hi5,
                step,
                300,
                |y| {
                    let kp = y[1] + y[4] * (y[2] - y[1]);
                    two_segment(y[1], y[3], kp, y[2], y[0]).and_then(|p| eval(&p))
                },
                |step| step[0] < 0.05 && step[1] < 0.05 && step[3] < 1e-3 && step[4] < 1e-3,
            );
            // Keep the two-segment gradient only if clearly better, since it is harder to
            // transfer and to run.
            if s.feasible && s.clearly_better_than(&lin_score) {
                let kp = x[1] + x[4] * (x[2] - x[1]);
                if let Some(p) = two_segment(x[1], x[3], kp, x[2], x[0]) {
                    // The knee as evaluated (on the 0.1 min / 0.1 % grid).
                    knee = Some(p.points()[1]);
                    best_program = p;
                    notes.push(format!(
                        "a two-segment gradient beats one linear ramp: smallest Rs {:.2} → {:.2}, \
                         last peak {:.1} → {:.1} min",
                        lin_score.min_rs, s.min_rs, lin_score.run, s.run
                    ));
                }
            } else {
                notes.push("a two-segment gradient gave no clear gain over one linear ramp".into());
            }
        }
    }
    let optimum = ctx
        .prediction(&best_program)
        .ok_or(OptimiseError::NoFeasibleCondition {
            max_run_time_min: req.max_run_time_min,
        })?;
    // The reported program is the evaluated one (already on the 0.1 min / 0.1 % grid).
    let (tg, ip, fp) = {
        let pts = best_program.points();
        let (first, last) = (pts[0], pts[pts.len() - 1]);
        (last.time_min, first.organic_pct, last.organic_pct)
    };
    // Window diagram at the optimum's start and end compositions (linear ramps), on the same
    // 0.1 min grid, with the chosen gradient time itself among the points.
    let mut tg_points: Vec<f64> = linspace(gradient_range, 60)
        .into_iter()
        .map(round_to_tenth)
        .chain(std::iter::once(tg))
        .collect();
    tg_points.sort_by(f64::total_cmp);
    tg_points.dedup();
    let mut points = Vec::new();
    for tgw in tg_points {
        if let Some(p) = linear(ip, fp, tgw)
            && let Some(pr) = ctx.window_eval(&p)
        {
            points.push(WindowPoint {
                gradient_time_min: tgw,
                min_resolution: pr.min_resolution,
                critical_pair: pr.critical_pair,
                run_time_min: pr.run_time_min,
                within_run_time: pr.run_time_min <= req.max_run_time_min,
                first_peak_retention_factor: pr.first_peak_retention_factor,
                meets_min_retention: pr.first_peak_retention_factor
                    >= req.min_retention_factor - 1e-12,
            });
        }
    }
    let meets_target = optimum.min_resolution >= req.target_resolution;
    let meets_min_retention =
        optimum.first_peak_retention_factor >= req.min_retention_factor - 1e-12;
    let selection = if meets_target {
        notes.push(format!(
            "chosen: the shortest run (last peak at {:.2} min) among conditions with smallest \
             Rs ≥ {}, first peak k ≥ {} and every peak out within {} min",
            optimum.run_time_min,
            req.target_resolution,
            req.min_retention_factor,
            req.max_run_time_min
        ));
        Selection::ShortestRunMeetingTarget
    } else {
        notes.push(format!(
            "no condition in the search space reaches the target Rs {}: the largest smallest \
             resolution found ({:.2}) is reported instead; widen the ranges, allow a longer \
             run or a more efficient column",
            req.target_resolution, optimum.min_resolution
        ));
        Selection::LargestMinResolution
    };
    notes.extend(edge_notes(&[
        ("gradient time", "min", tg, gradient_range),
        ("initial composition", "% organic", ip, initial_range),
        ("final composition", "% organic", fp, final_range),
    ]));
    if !meets_min_retention {
        notes.push(format!(
            "no condition in the search space retains the first peak ({}) to k ≥ {}: it elutes \
             at k = {:.2}; allow a weaker start (a lower initial % organic in reversed phase, a \
             higher one in HILIC)",
            optimum.peaks.first().map_or("?", |p| p.name.as_str()),
            req.min_retention_factor,
            optimum.first_peak_retention_factor
        ));
    }
    if optimum
        .peaks
        .iter()
        .any(|p| p.phase == ElutionPhase::AfterGradient)
    {
        notes.push("some analytes elute after the ramp ends (in the final hold)".into());
    }
    if optimum
        .peaks
        .iter()
        .any(|p| p.phase == ElutionPhase::BeforeGradient)
    {
        notes.push("some analytes elute before the gradient reaches them (during dwell)".into());
    }
    notes.push(format!(
        "widths from N = {plates:.0} with w = 4 t0 (1 + k_e)/√N (band compression ignored); \
         verify with a confirming run"
    ));
    Ok(OptimiseReport {
        plates_used: plates,
        gradient_time_min: tg,
        initial_pct: ip,
        final_pct: fp,
        knee,
        meets_target,
        min_retention_factor: req.min_retention_factor,
        meets_min_retention,
        selection,
        best_linear_min_resolution: lin_score.min_rs,
        window: WindowDiagram {
            initial_pct: ip,
            final_pct: fp,
            target_resolution: req.target_resolution,
            min_retention_factor: req.min_retention_factor,
            optimum_gradient_time_min: tg,
            optimum_min_resolution: optimum.min_resolution,
            optimum_is_two_segment: knee.is_some(),
            points,
        },
        optimum,
        evaluated_conditions: evaluated,
        notes,
    })
}

/// Renders the window diagram as a standalone SVG: smallest resolution versus gradient time
/// over the searched range, the target line, the chosen condition inside the plot (flagged when
/// it sits on an edge of the searched range) and a legend listing exactly what is drawn; shapes,
/// not colours, carry the meaning.
pub fn render_window_svg(diagram: &WindowDiagram) -> String {
    render_window_plot(&WindowPlot {
        title: format!(
            "Window diagram: smallest resolution versus gradient time ({:.0}–{:.0} % organic)",
            diagram.initial_pct, diagram.final_pct
        ),
        x_label: "Gradient time tG (min)".into(),
        heading: format!(
            "Window diagram, linear gradients {:.1}–{:.1} % organic",
            diagram.initial_pct, diagram.final_pct
        ),
        x_name: ("gradient time", "min"),
        chosen_label: format!(
            "chosen tG = {:.1} min, Rs = {:.2}{}",
            diagram.optimum_gradient_time_min,
            diagram.optimum_min_resolution,
            if diagram.optimum_is_two_segment {
                " (two-segment)"
            } else {
                ""
            }
        ),
        target_resolution: diagram.target_resolution,
        min_retention_factor: diagram.min_retention_factor,
        optimum_x: diagram.optimum_gradient_time_min,
        optimum_min_resolution: diagram.optimum_min_resolution,
        points: diagram
            .points
            .iter()
            .map(|p| PlotPoint {
                x: p.gradient_time_min,
                min_resolution: p.min_resolution,
                within_run_time: p.within_run_time,
                meets_min_retention: p.meets_min_retention,
            })
            .collect(),
    })
}

mod context;
mod programs;

pub use programs::round_to_tenth;
use programs::{check_range, edge_notes, linear, linspace, steps, tenth_range, two_segment};

#[cfg(test)]
mod tests;
