//! Gradient elution: the multi-point gradient program (`"t:%organic,..."`), gradient steepness,
//! retention time in linear and multi-segment gradients under the linear-solvent-strength (LSS)
//! model, gradient retention factor, gradient peak width and the isocratic equivalent of a
//! gradient run.
//!
//! Retention in a gradient follows the fundamental gradient equation (SD 2007 ch. 9 appendix;
//! SKD 2010 ch. 9): with ξ the time at which the mobile phase now surrounding the band entered
//! the column,
//!
//! ∫₀^{tR − t0} dξ / (t0 · k(φ(ξ − tD))) = 1,
//!
//! φ(·) the programmed composition, tD the dwell time (equivalently, with t = ξ + t0,
//! ∫_{t0}^{tR} dt / (t0 · k(φ(t − t0 − tD))) = 1). The band's position x obeys
//! dx/dξ = u/k, so the band leaves the column at ξ_e with tR = ξ_e + t0. Assumptions: the
//! retention factor follows the mobile phase instantly, no solvent demixing or modifier uptake,
//! no band compression in the width (G = 1), plug-flow delivery of the program after the dwell
//! volume. [`gradient_elution`] solves it exactly for the LSS model on a piecewise-linear program
//! (log k is linear in ξ on each segment); [`gradient_elution_numeric`] integrates it
//! numerically for any [`RetentionModel`] and is checked against the closed form.

use std::f64::consts::LN_10;
use std::fmt;
use std::str::FromStr;

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::model::theory::{self, TheoryError};

/// Errors from gradient programs and gradient-elution calculations.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum GradientError {
    /// The gradient specification was empty.
    #[error("gradient program is empty; give points as `time_min:%organic`, e.g. `0:5,10:95`")]
    Empty,
    /// A token is not of the form `time:percent`.
    #[error("gradient point {index} `{token}` is not `time_min:%organic` (e.g. `10:95`)")]
    BadToken {
        /// 1-based position of the token.
        index: usize,
        /// The token as given.
        token: String,
    },
    /// A number in a token could not be read.
    #[error(
        "gradient point {index} `{token}`: cannot read the {field} `{text}` as a finite number"
    )]
    BadNumber {
        /// 1-based position of the token.
        index: usize,
        /// The token as given.
        token: String,
        /// "time" or "percent".
        field: &'static str,
        /// The text that failed to parse.
        text: String,
    },
    /// A time is negative.
    #[error("gradient point {index} `{token}`: time {time_min} min is negative")]
    NegativeTime {
        /// 1-based position.
        index: usize,
        /// The token.
        token: String,
        /// The time, min.
        time_min: f64,
    },
    /// A composition lies outside 0–100 %.
    #[error("gradient point {index} `{token}`: {organic_pct} % organic is outside 0–100 %")]
    PercentOutOfRange {
        /// 1-based position.
        index: usize,
        /// The token.
        token: String,
        /// The composition, %.
        organic_pct: f64,
    },
    /// Times are not strictly increasing.
    #[error(
        "gradient point {index} `{token}`: time {time_min} min does not come after the previous \
         point's {previous_min} min; times must strictly increase"
    )]
    NotIncreasing {
        /// 1-based position.
        index: usize,
        /// The token.
        token: String,
        /// The time, min.
        time_min: f64,
        /// The previous time, min.
        previous_min: f64,
    },
    /// Fewer than two points.
    #[error("gradient program needs at least 2 points, got {count}")]
    TooFewPoints {
        /// Number of points given.
        count: usize,
    },
    /// The analyte would not elute (retention factor at the final composition overflows).
    #[error(
        "analyte (log kw = {log_kw}, S = {s}) does not elute: retention factor at the final \
         composition {final_organic_pct} % is beyond 1e300"
    )]
    DoesNotElute {
        /// log10 kw.
        log_kw: f64,
        /// LSS slope.
        s: f64,
        /// Final composition, %.
        final_organic_pct: f64,
    },
    /// The elution time could not be computed as a finite number (extreme parameters).
    #[error(
        "elution time is not a finite number for log k between {log_k_start} and {log_k_end} \
         over the program; check the retention parameters"
    )]
    NotFinite {
        /// log10 k at the start composition.
        log_k_start: f64,
        /// log10 k at the final composition.
        log_k_end: f64,
    },
    /// An input quantity failed validation.
    #[error(transparent)]
    Theory(#[from] TheoryError),
}

/// Result alias for gradient functions.
pub type Result<T> = std::result::Result<T, GradientError>;

/// One point of a gradient program: time after injection (min) and organic content (%).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct GradientPoint {
    /// Time after injection, min (program time, i.e. at the mixer).
    pub time_min: f64,
    /// Organic solvent content, % v/v (0–100).
    pub organic_pct: f64,
}

/// A validated, piecewise-linear gradient program: at least two points, times ≥ 0 and strictly
/// increasing, compositions 0–100 %. Before the first point the first composition holds; after
/// the last point the last composition holds.
///
/// Serialised as its text form `"0:5,10:95"` and validated when deserialised.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "String", into = "String")]
pub struct GradientProgram {
    points: Vec<GradientPoint>,
}

impl GradientProgram {
    /// Parses `"t:%organic,t:%organic,..."` (minutes, % organic). Whitespace around tokens is
    /// ignored; a trailing `%` on the composition is allowed.
    ///
    /// # Errors
    /// A [`GradientError`] naming the offending token.
    ///
    /// # Examples
    /// ```
    /// use phasewise::model::gradient::GradientProgram;
    /// let p = GradientProgram::parse("0:5, 1:5, 11:95").unwrap();
    /// assert_eq!(p.points().len(), 3);
    /// assert!((p.organic_fraction_at(6.0) - 0.5).abs() < 1e-12);
    /// assert!(GradientProgram::parse("0:5,0:95").is_err());
    /// ```
    pub fn parse(spec: &str) -> Result<Self> {
        let spec = spec.trim();
        if spec.is_empty() {
            return Err(GradientError::Empty);
        }
        let mut points = Vec::new();
        for (i, raw) in spec.split(',').enumerate() {
            let index = i + 1;
            let token = raw.trim();
            let Some((t_text, p_text)) = token.split_once(':') else {
                return Err(GradientError::BadToken {
                    index,
                    token: token.to_string(),
                });
            };
            let t_text = t_text.trim();
            let p_text = p_text.trim();
            let p_text = p_text.strip_suffix('%').unwrap_or(p_text).trim();
            let time_min = parse_finite(t_text).ok_or_else(|| GradientError::BadNumber {
                index,
                token: token.to_string(),
                field: "time",
                text: t_text.to_string(),
            })?;
            let organic_pct = parse_finite(p_text).ok_or_else(|| GradientError::BadNumber {
                index,
                token: token.to_string(),
                field: "percent",
                text: p_text.to_string(),
            })?;
            points.push((index, token.to_string(), time_min, organic_pct));
        }
        Self::validate(points)
    }

    /// Builds a program from points, with the same checks as [`GradientProgram::parse`].
    ///
    /// # Errors
    /// A [`GradientError`] naming the offending point (by its 1-based position).
    pub fn from_points(points: &[GradientPoint]) -> Result<Self> {
        Self::validate(
            points
                .iter()
                .enumerate()
                .map(|(i, p)| {
                    (
                        i + 1,
                        format!("{}:{}", p.time_min, p.organic_pct),
                        p.time_min,
                        p.organic_pct,
                    )
                })
                .collect(),
        )
    }

    /// A single linear ramp from `initial_pct` at t = 0 to `final_pct` at `gradient_time_min`.
    ///
    /// # Errors
    /// As [`GradientProgram::from_points`].
    pub fn linear(initial_pct: f64, final_pct: f64, gradient_time_min: f64) -> Result<Self> {
        Self::from_points(&[
            GradientPoint {
                time_min: 0.0,
                organic_pct: initial_pct,
            },
            GradientPoint {
                time_min: gradient_time_min,
                organic_pct: final_pct,
            },
        ])
    }

    fn validate(raw: Vec<(usize, String, f64, f64)>) -> Result<Self> {
        if raw.len() < 2 {
            return Err(GradientError::TooFewPoints { count: raw.len() });
        }
        let mut points: Vec<GradientPoint> = Vec::with_capacity(raw.len());
        for (index, token, time_min, organic_pct) in raw {
            if !time_min.is_finite() || !organic_pct.is_finite() {
                return Err(GradientError::BadNumber {
                    index,
                    field: if time_min.is_finite() {
                        "percent"
                    } else {
                        "time"
                    },
                    text: token.clone(),
                    token,
                });
            }
            if time_min < 0.0 {
                return Err(GradientError::NegativeTime {
                    index,
                    token,
                    time_min,
                });
            }
            if !(0.0..=100.0).contains(&organic_pct) {
                return Err(GradientError::PercentOutOfRange {
                    index,
                    token,
                    organic_pct,
                });
            }
            if let Some(prev) = points.last()
                && time_min <= prev.time_min
            {
                return Err(GradientError::NotIncreasing {
                    index,
                    token,
                    time_min,
                    previous_min: prev.time_min,
                });
            }
            points.push(GradientPoint {
                time_min,
                organic_pct,
            });
        }
        Ok(Self { points })
    }

    /// The program's points.
    pub fn points(&self) -> &[GradientPoint] {
        &self.points
    }

    /// The same program with every composition replaced by its complement, 100 − %: the water
    /// content of a % organic program. HILIC retention is written in the water (strong-solvent)
    /// fraction ψ = 1 − %organic/100 (docs/model.md §1), so [`gradient_elution`] of HILIC
    /// parameters runs on the complement. Applying it twice gives the program back.
    pub fn complement(&self) -> Self {
        Self {
            points: self
                .points
                .iter()
                .map(|p| GradientPoint {
                    time_min: p.time_min,
                    organic_pct: 100.0 - p.organic_pct,
                })
                .collect(),
        }
    }

    /// Organic volume fraction φ (0–1) at program time `time_min` (linear interpolation, holds
    /// before the first and after the last point).
    pub fn organic_fraction_at(&self, time_min: f64) -> f64 {
        self.organic_pct_at(time_min) / 100.0
    }

    /// Organic content (%) at program time `time_min`.
    pub fn organic_pct_at(&self, time_min: f64) -> f64 {
        let p = &self.points;
        if time_min <= p[0].time_min {
            return p[0].organic_pct;
        }
        for w in p.windows(2) {
            if time_min <= w[1].time_min {
                let f = (time_min - w[0].time_min) / (w[1].time_min - w[0].time_min);
                return w[0].organic_pct + f * (w[1].organic_pct - w[0].organic_pct);
            }
        }
        p[p.len() - 1].organic_pct
    }

    /// Time of the last point, min.
    pub fn end_time_min(&self) -> f64 {
        self.points[self.points.len() - 1].time_min
    }

    /// Program time at which the composition first starts to change (None if isocratic).
    pub fn first_change_min(&self) -> Option<f64> {
        self.points
            .windows(2)
            .find(|w| w[0].organic_pct != w[1].organic_pct)
            .map(|w| w[0].time_min)
    }

    /// Program time at which the composition last stops changing (None if isocratic).
    pub fn last_change_min(&self) -> Option<f64> {
        self.points
            .windows(2)
            .rev()
            .find(|w| w[0].organic_pct != w[1].organic_pct)
            .map(|w| w[1].time_min)
    }

    /// The same program with every time multiplied by `factor` (method transfer).
    ///
    /// # Errors
    /// `factor` must be positive and finite.
    pub fn scaled_times(&self, factor: f64) -> Result<Self> {
        theory::positive("time scaling factor", factor)?;
        let pts: Vec<GradientPoint> = self
            .points
            .iter()
            .map(|p| GradientPoint {
                time_min: p.time_min * factor,
                organic_pct: p.organic_pct,
            })
            .collect();
        Self::from_points(&pts)
    }

    /// The same program with an isocratic hold of `hold_min` inserted at the start (every point
    /// after the first shifted later by `hold_min`).
    ///
    /// # Errors
    /// `hold_min` must not be negative.
    pub fn with_initial_hold(&self, hold_min: f64) -> Result<Self> {
        theory::non_negative("initial hold (min)", hold_min)?;
        if hold_min == 0.0 {
            return Ok(self.clone());
        }
        let mut pts = vec![self.points[0]];
        let first = self.points[0].time_min;
        pts.push(GradientPoint {
            time_min: first + hold_min,
            organic_pct: self.points[0].organic_pct,
        });
        for p in &self.points[1..] {
            pts.push(GradientPoint {
                time_min: p.time_min + hold_min,
                organic_pct: p.organic_pct,
            });
        }
        Self::from_points(&pts)
    }

    /// The text form `"t:%,t:%"` (round-trips through [`GradientProgram::parse`]).
    pub fn to_spec(&self) -> String {
        self.points
            .iter()
            .map(|p| format!("{}:{}", p.time_min, p.organic_pct))
            .collect::<Vec<_>>()
            .join(",")
    }
}

fn parse_finite(text: &str) -> Option<f64> {
    let v: f64 = text.parse().ok()?;
    v.is_finite().then_some(v)
}

impl FromStr for GradientProgram {
    type Err = GradientError;
    fn from_str(s: &str) -> Result<Self> {
        Self::parse(s)
    }
}

impl fmt::Display for GradientProgram {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_spec())
    }
}

impl TryFrom<String> for GradientProgram {
    type Error = GradientError;
    fn try_from(s: String) -> Result<Self> {
        Self::parse(&s)
    }
}

impl From<GradientProgram> for String {
    fn from(p: GradientProgram) -> String {
        p.to_spec()
    }
}

/// LSS parameters of one analyte: log10 kw (extrapolated retention factor in water) and S.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct LssParameters {
    /// log10 of the retention factor extrapolated to φ = 0.
    pub log_kw: f64,
    /// LSS slope S = −d log k / dφ.
    pub s: f64,
}

/// A retention model: log10 k as a function of the organic volume fraction φ.
pub trait RetentionModel {
    /// log10 of the retention factor at organic volume fraction `organic_fraction` (0–1).
    fn log10_retention_factor(&self, organic_fraction: f64) -> f64;
}

impl RetentionModel for LssParameters {
    /// log k = log kw − S φ (SKD 2010 ch. 6).
    fn log10_retention_factor(&self, organic_fraction: f64) -> f64 {
        self.log_kw - self.s * organic_fraction
    }
}

/// Dead and dwell time of the system a gradient runs on.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct GradientSystem {
    /// Column dead time t0, min.
    pub dead_time_min: f64,
    /// Dwell time tD = VD/F, min.
    pub dwell_time_min: f64,
}

impl GradientSystem {
    fn validate(&self) -> Result<()> {
        theory::positive("dead time (min)", self.dead_time_min)?;
        theory::non_negative("dwell time (min)", self.dwell_time_min)?;
        Ok(())
    }
}

/// When, relative to the programmed gradient, the analyte left the column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ElutionPhase {
    /// The program never changes composition (isocratic run).
    Isocratic,
    /// Eluted before the changing composition reached it (during dwell and initial hold): the
    /// run tells nothing about S.
    BeforeGradient,
    /// Eluted while the composition was changing.
    DuringGradient,
    /// Eluted in the final hold, after the programmed change ended.
    AfterGradient,
}

/// Result of a gradient-elution calculation.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Elution {
    /// Retention time after injection, min.
    pub retention_time_min: f64,
    /// Composition at the band when it leaves the column, % organic.
    pub organic_at_elution_pct: f64,
    /// Instantaneous retention factor at elution, k_e.
    pub retention_factor_at_elution: f64,
    /// Index of the program segment (0-based, between points i and i+1) whose composition
    /// surrounds the band at elution; None before the first or after the last point.
    pub segment: Option<usize>,
    /// Phase of the run in which the analyte eluted.
    pub phase: ElutionPhase,
}

/// A piece of the inlet composition over ξ: from `start` for `length` (None = to infinity),
/// composition going from `phi_a` to `phi_b`.
struct Piece {
    start: f64,
    length: Option<f64>,
    phi_a: f64,
    phi_b: f64,
    segment: Option<usize>,
}

fn pieces(program: &GradientProgram, dwell_min: f64) -> Vec<Piece> {
    let pts = program.points();
    let mut out = Vec::with_capacity(pts.len() + 1);
    let first_start = dwell_min + pts[0].time_min;
    if first_start > 0.0 {
        out.push(Piece {
            start: 0.0,
            length: Some(first_start),
            phi_a: pts[0].organic_pct / 100.0,
            phi_b: pts[0].organic_pct / 100.0,
            segment: None,
        });
    }
    for (i, w) in pts.windows(2).enumerate() {
        out.push(Piece {
            start: dwell_min + w[0].time_min,
            length: Some(w[1].time_min - w[0].time_min),
            phi_a: w[0].organic_pct / 100.0,
            phi_b: w[1].organic_pct / 100.0,
            segment: Some(i),
        });
    }
    let last = pts[pts.len() - 1];
    out.push(Piece {
        start: dwell_min + last.time_min,
        length: None,
        phi_a: last.organic_pct / 100.0,
        phi_b: last.organic_pct / 100.0,
        segment: None,
    });
    out
}

fn phase_of(changes: (Option<f64>, Option<f64>), program_time: f64) -> ElutionPhase {
    match changes {
        (Some(first), Some(last)) => {
            if program_time < first {
                ElutionPhase::BeforeGradient
            } else if program_time > last {
                ElutionPhase::AfterGradient
            } else {
                ElutionPhase::DuringGradient
            }
        }
        _ => ElutionPhase::Isocratic,
    }
}

fn finish(
    run: &GradientRun<'_>,
    model: &dyn RetentionModel,
    xi_e: f64,
    segment: Option<usize>,
) -> Result<Elution> {
    let (program, system) = (run.program, run.system);
    if !xi_e.is_finite() {
        let pts = program.points();
        return Err(GradientError::NotFinite {
            log_k_start: model.log10_retention_factor(pts[0].organic_pct / 100.0),
            log_k_end: model.log10_retention_factor(pts[pts.len() - 1].organic_pct / 100.0),
        });
    }
    let program_time = xi_e - system.dwell_time_min;
    let phi = program.organic_fraction_at(program_time);
    Ok(Elution {
        retention_time_min: xi_e + system.dead_time_min,
        organic_at_elution_pct: phi * 100.0,
        retention_factor_at_elution: 10f64.powf(model.log10_retention_factor(phi)),
        segment,
        phase: phase_of(run.changes, program_time),
    })
}

/// Retention time of an LSS analyte in any piecewise-linear gradient, solving the fundamental
/// gradient equation exactly segment by segment.
///
/// On a segment where log k = La − β s (s the time into the segment, β = S Δφ/Δt), the integral
/// ∫ 10^{−log k} ds / t0 = 10^{−La} (10^{βs} − 1)/(β ln10 t0); setting it equal to what is left
/// of 1 gives s = log10(1 + rem · t0 · β · ln10 · 10^{La}) / β. For a single linear gradient from
/// t = 0 after the dwell this is tR = (t0/b) log10(2.303 b (k0 − tD/t0) + 1) + t0 + tD, which is
/// SD 2007 ch. 9 / SKD 2010 ch. 9 eq. for a linear gradient with dwell; Snyder's common simpler
/// form (t0/b) log10(2.3 k0 b + 1) + t0 + tD drops tD/t0 against k0 ([`linear_gradient_retention_time`]).
/// An analyte with tD/(t0 k0) ≥ 1 elutes isocratically before the gradient arrives,
/// tR = t0 (1 + k0).
///
/// # Errors
/// Invalid dead or dwell time, non-finite parameters, or an analyte that does not elute.
pub fn gradient_elution(
    analyte: &LssParameters,
    program: &GradientProgram,
    system: &GradientSystem,
) -> Result<Elution> {
    GradientRun::new(program, system)?.elution(analyte)
}

/// One program on one system, prepared once (its pieces and where its composition changes) for
/// the retention of many analytes: [`GradientRun::elution`] gives exactly what
/// [`gradient_elution`] gives, without rebuilding the program's pieces for every analyte.
pub struct GradientRun<'a> {
    program: &'a GradientProgram,
    system: &'a GradientSystem,
    pieces: Vec<Piece>,
    changes: (Option<f64>, Option<f64>),
}

impl<'a> GradientRun<'a> {
    /// Prepares `program` on `system`.
    ///
    /// # Errors
    /// Invalid dead or dwell time.
    pub fn new(program: &'a GradientProgram, system: &'a GradientSystem) -> Result<Self> {
        system.validate()?;
        Ok(GradientRun {
            program,
            system,
            pieces: pieces(program, system.dwell_time_min),
            changes: (program.first_change_min(), program.last_change_min()),
        })
    }

    /// Retention of one analyte (see [`gradient_elution`]).
    ///
    /// # Errors
    /// Non-finite parameters, or an analyte that does not elute.
    pub fn elution(&self, analyte: &LssParameters) -> Result<Elution> {
        elution_on(self, analyte)
    }
}

fn elution_on(run: &GradientRun<'_>, analyte: &LssParameters) -> Result<Elution> {
    let (program, system) = (run.program, run.system);
    theory::finite("log kw", analyte.log_kw)?;
    theory::finite("S", analyte.s)?;
    let t0 = system.dead_time_min;
    let mut rem = 1.0_f64;
    for piece in &run.pieces {
        let la = analyte.log10_retention_factor(piece.phi_a);
        match piece.length {
            None => {
                // Final hold: constant k; need rem · t0 · k more minutes.
                let tau_log = rem.log10() + t0.log10() + la;
                if tau_log > 300.0 {
                    return Err(GradientError::DoesNotElute {
                        log_kw: analyte.log_kw,
                        s: analyte.s,
                        final_organic_pct: piece.phi_a * 100.0,
                    });
                }
                let xi = piece.start + rem * t0 * 10f64.powf(la);
                return finish(run, analyte, xi, piece.segment);
            }
            Some(len) => {
                let beta = analyte.s * (piece.phi_b - piece.phi_a) / len;
                if beta.abs() * len < 1e-12 {
                    let integral = len * 10f64.powf(-la) / t0;
                    if integral >= rem {
                        let xi = piece.start + rem * t0 * 10f64.powf(la);
                        return finish(run, analyte, xi, piece.segment);
                    }
                    rem -= integral;
                } else {
                    // integral over the whole piece, in a form that cannot overflow before the
                    // comparison: I = 10^{-La} (10^{βL} − 1) / (β ln10 t0).
                    let integral =
                        10f64.powf(-la) * (10f64.powf(beta * len) - 1.0) / (beta * LN_10 * t0);
                    // 0 × ∞ when La is huge and βL too: use the logarithmic form (β > 0 there).
                    let integral = if integral.is_nan() {
                        10f64.powf(beta * len - la - (beta.abs() * LN_10 * t0).log10())
                    } else {
                        integral
                    };
                    if integral >= rem {
                        let x = rem * t0 * beta * LN_10 * 10f64.powf(la);
                        let s = if x.is_finite() && x > -1.0 {
                            x.ln_1p() / (beta * LN_10)
                        } else if beta > 0.0 {
                            // x overflowed: log10(1 + x) ≈ log10(x).
                            (rem.log10() + t0.log10() + beta.log10() + LN_10.log10() + la) / beta
                        } else {
                            len
                        };
                        let s = s.clamp(0.0, len);
                        return finish(run, analyte, piece.start + s, piece.segment);
                    }
                    rem -= integral;
                }
            }
        }
    }
    // pieces() always ends with an unbounded piece, which returns above.
    Err(GradientError::DoesNotElute {
        log_kw: analyte.log_kw,
        s: analyte.s,
        final_organic_pct: program.points()[program.points().len() - 1].organic_pct,
    })
}

/// Retention time in any piecewise-linear program for any [`RetentionModel`], by adaptive
/// Simpson integration of the fundamental gradient equation (see the module documentation) and
/// bisection for the upper limit. `tolerance_min` bounds the error in tR (1e-6 is a good value).
///
/// Checked against [`gradient_elution`] (exact for LSS) to 1e-4 min in the tests.
///
/// # Errors
/// Invalid system times or tolerance, or an analyte that does not elute.
pub fn gradient_elution_numeric(
    model: &dyn RetentionModel,
    program: &GradientProgram,
    system: &GradientSystem,
    tolerance_min: f64,
) -> Result<Elution> {
    let run = GradientRun::new(program, system)?;
    let tol = theory::positive("tolerance (min)", tolerance_min)?;
    let t0 = system.dead_time_min;
    let mut rem = 1.0_f64;
    for piece in &run.pieces {
        let phi_at = |s: f64, len: f64| -> f64 {
            if len > 0.0 {
                piece.phi_a + (piece.phi_b - piece.phi_a) * (s / len)
            } else {
                piece.phi_a
            }
        };
        let g = |s: f64, len: f64| -> f64 {
            10f64.powf(-model.log10_retention_factor(phi_at(s, len))) / t0
        };
        match piece.length {
            None => {
                let gk = g(0.0, 0.0);
                if gk <= 0.0 || !gk.is_finite() || rem / gk > 1e300 {
                    return Err(GradientError::DoesNotElute {
                        log_kw: model.log10_retention_factor(0.0),
                        s: model.log10_retention_factor(0.0) - model.log10_retention_factor(1.0),
                        final_organic_pct: piece.phi_a * 100.0,
                    });
                }
                let xi = piece.start + rem / gk;
                return finish(&run, model, xi, piece.segment);
            }
            Some(len) => {
                let f = |s: f64| g(s, len);
                // An error δ in the integral moves the elution time by δ / g(end); 1e-12 keeps
                // that far below `tol` for any k at elution below ~1e4.
                let int_tol = 1e-12;
                let total = adaptive_simpson(&f, 0.0, len, int_tol, MAX_SIMPSON_DEPTH);
                if total >= rem {
                    let (mut lo, mut hi) = (0.0, len);
                    for _ in 0..200 {
                        let mid = 0.5 * (lo + hi);
                        if hi - lo <= tol * 1e-3 || mid <= lo || mid >= hi {
                            break;
                        }
                        if adaptive_simpson(&f, 0.0, mid, int_tol, MAX_SIMPSON_DEPTH) >= rem {
                            hi = mid;
                        } else {
                            lo = mid;
                        }
                    }
                    let xi = piece.start + 0.5 * (lo + hi);
                    return finish(&run, model, xi, piece.segment);
                }
                rem -= total;
            }
        }
    }
    Err(GradientError::DoesNotElute {
        log_kw: model.log10_retention_factor(0.0),
        s: model.log10_retention_factor(0.0) - model.log10_retention_factor(1.0),
        final_organic_pct: program.points()[program.points().len() - 1].organic_pct,
    })
}

/// Recursion limit of the adaptive Simpson rule: bounds the work to about 2^22 evaluations per
/// segment even for an integrand that never meets the tolerance.
const MAX_SIMPSON_DEPTH: u32 = 22;

fn simpson(fa: f64, fm: f64, fb: f64, a: f64, b: f64) -> f64 {
    (b - a) / 6.0 * (fa + 4.0 * fm + fb)
}

fn adaptive_simpson(f: &dyn Fn(f64) -> f64, a: f64, b: f64, tol: f64, depth: u32) -> f64 {
    if b <= a {
        return 0.0;
    }
    let fa = f(a);
    let fb = f(b);
    let m = 0.5 * (a + b);
    let fm = f(m);
    let whole = simpson(fa, fm, fb, a, b);
    simpson_rec(f, a, b, fa, fm, fb, whole, tol, depth)
}

#[allow(clippy::too_many_arguments)]
fn simpson_rec(
    f: &dyn Fn(f64) -> f64,
    a: f64,
    b: f64,
    fa: f64,
    fm: f64,
    fb: f64,
    whole: f64,
    tol: f64,
    depth: u32,
) -> f64 {
    let m = 0.5 * (a + b);
    let lm = 0.5 * (a + m);
    let rm = 0.5 * (m + b);
    let flm = f(lm);
    let frm = f(rm);
    let left = simpson(fa, flm, fm, a, m);
    let right = simpson(fm, frm, fb, m, b);
    let delta = left + right - whole;
    if depth == 0
        || !delta.is_finite()
        || delta.abs() <= 15.0 * tol.max(1e-12 * (left + right).abs())
    {
        left + right + delta / 15.0
    } else {
        simpson_rec(f, a, m, fa, flm, fm, left, tol / 2.0, depth - 1)
            + simpson_rec(f, m, b, fm, frm, fb, right, tol / 2.0, depth - 1)
    }
}

/// Gradient steepness b = t0 · Δφ · S / tG (= Vm Δφ S / (tG F)).
///
/// Source: SD 2007 ch. 2 / SKD 2010 ch. 9. Δφ is the change in volume fraction over the ramp.
///
/// # Errors
/// t0 and tG positive; Δφ and S finite.
pub fn gradient_steepness(
    dead_time_min: f64,
    delta_fraction: f64,
    s: f64,
    gradient_time_min: f64,
) -> Result<f64> {
    let t0 = theory::positive("dead time (min)", dead_time_min)?;
    let dphi = theory::finite("change in organic fraction", delta_fraction)?;
    let s = theory::finite("S", s)?;
    let tg = theory::positive("gradient time (min)", gradient_time_min)?;
    Ok(t0 * dphi * s / tg)
}

/// Gradient retention factor k* = 1 / (1.15 b): the effective k of the band at the column
/// midpoint in a linear gradient.
///
/// Source: SD 2007 ch. 2 (k* = tG F/(1.15 Vm Δφ S)). Valid for a band well retained at the start
/// (k0 ≫ k*), eluting during the ramp.
///
/// # Errors
/// b positive.
pub fn gradient_retention_factor(steepness: f64) -> Result<f64> {
    let b = theory::positive("gradient steepness b", steepness)?;
    Ok(1.0 / (1.15 * b))
}

/// Gradient peak (baseline, 4σ) width w = 4 t0 (1 + k_e)/√N, k_e the instantaneous retention
/// factor when the band leaves the column.
///
/// Source: SD 2007 ch. 2 (peak width in gradient elution, the form without the band-compression
/// factor G, i.e. G = 1; G ≈ 0.8–1 in practice, so this slightly overestimates widths and
/// underestimates resolution). The half-height width is 0.589 × this for a Gaussian.
///
/// # Errors
/// t0 and N positive, k_e not negative.
pub fn gradient_peak_width_min(
    dead_time_min: f64,
    retention_factor_at_elution: f64,
    plates: f64,
) -> Result<f64> {
    let t0 = theory::positive("dead time (min)", dead_time_min)?;
    let ke = theory::non_negative("retention factor at elution", retention_factor_at_elution)?;
    let n = theory::positive("plate number", plates)?;
    Ok(4.0 * t0 * (1.0 + ke) / n.sqrt())
}

/// Snyder's simplified closed form for a single linear gradient starting at injection:
/// tR = (t0/b) log10(2.3 k0 b + 1) + t0 + tD, with 2.3 taken as ln 10.
///
/// Source: SD 2007 ch. 2 / SKD 2010 ch. 9. Assumes the band has not moved appreciably before the
/// gradient reaches it (tD ≪ t0 k0) and elutes before the ramp ends; the exact form used by
/// [`gradient_elution`] replaces k0 by k0 − tD/t0. k0 is the retention factor at the initial
/// composition.
///
/// # Errors
/// t0 and b positive, k0 and tD not negative.
pub fn linear_gradient_retention_time(
    dead_time_min: f64,
    dwell_time_min: f64,
    initial_retention_factor: f64,
    steepness: f64,
) -> Result<f64> {
    let t0 = theory::positive("dead time (min)", dead_time_min)?;
    let td = theory::non_negative("dwell time (min)", dwell_time_min)?;
    let k0 = theory::non_negative("initial retention factor", initial_retention_factor)?;
    let b = theory::positive("gradient steepness b", steepness)?;
    Ok(t0 / b * (LN_10 * k0 * b + 1.0).log10() + t0 + td)
}

/// The isocratic equivalent of a gradient run for one analyte.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct IsocraticEquivalent {
    /// The gradient elution itself.
    pub elution: Elution,
    /// Gradient steepness b of the segment in which the analyte eluted (None when it eluted
    /// before or after the ramp, or in a flat segment).
    pub steepness: Option<f64>,
    /// Gradient retention factor k* = 1/(1.15 b).
    pub gradient_retention_factor: Option<f64>,
    /// Organic content at which the isocratic retention factor equals k*, %, clamped to 0–100
    /// (None without k* or with S ≤ 0).
    pub isocratic_organic_for_same_k_pct: Option<f64>,
}

/// Isocratic-to-gradient conversion: the composition at elution, k* of the eluting segment and
/// the isocratic composition φ* that gives the same k: φ* = (log kw − log k*)/S.
///
/// Source: SD 2007 ch. 2 (k* as the isocratic analogue of a gradient run).
///
/// # Errors
/// As [`gradient_elution`].
pub fn isocratic_equivalent(
    analyte: &LssParameters,
    program: &GradientProgram,
    system: &GradientSystem,
) -> Result<IsocraticEquivalent> {
    let elution = gradient_elution(analyte, program, system)?;
    let mut steepness = None;
    if elution.phase == ElutionPhase::DuringGradient
        && let Some(i) = elution.segment
    {
        let p = program.points();
        let dphi = (p[i + 1].organic_pct - p[i].organic_pct) / 100.0;
        let b = gradient_steepness(
            system.dead_time_min,
            dphi,
            analyte.s,
            p[i + 1].time_min - p[i].time_min,
        )?;
        if b > 0.0 {
            steepness = Some(b);
        }
    }
    let k_star = steepness.map(|b| 1.0 / (1.15 * b));
    let phi_star = match k_star {
        Some(k) if analyte.s > 0.0 => {
            Some(((analyte.log_kw - k.log10()) / analyte.s * 100.0).clamp(0.0, 100.0))
        }
        _ => None,
    };
    Ok(IsocraticEquivalent {
        elution,
        steepness,
        gradient_retention_factor: k_star,
        isocratic_organic_for_same_k_pct: phi_star,
    })
}

#[cfg(test)]
mod tests;
