//! System suitability from one measured run: per-peak retention factor, plate number, plate
//! height, USP tailing, asymmetry and area %, per adjacent pair selectivity and resolution, and
//! a pass/fail list against configurable targets.
//!
//! Default targets and where they come from:
//! - Rs ≥ 1.5 for every adjacent pair (or the named critical pair): general pharmacopoeial
//!   chromatography chapters commonly ask for this between the critical pair, in general terms;
//!   the applicable monograph or chapter governs. Rs = 1.5 is baseline separation of two
//!   equal-size Gaussian peaks (SKD 2010 ch. 2).
//! - 1 ≤ k ≤ 10: working range recommended for isocratic methods (SKD 2010 ch. 2, from memory;
//!   common practice). For gradient runs k from t0 alone is not the retention the band saw; set
//!   the k limits to suit, or judge retention by the gradient retention factor k*.
//! - USP tailing ≤ 2.0: a limit general pharmacopoeial chapters use when a monograph gives
//!   none, in general terms.
//! - Minimum plate number: none unless set (method-specific).
//!
//! These are starting points; the lab's SOPs, the validated method and the applicable
//! pharmacopoeial chapter take precedence.

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::measured::DeadTimeInput;
use crate::measured::peaks::{Peak, PeakTable};
use crate::model::theory::{self, TheoryError};

/// Errors from a suitability evaluation.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SuitabilityError {
    /// A quantity failed validation (dead time, column length, ...).
    #[error(transparent)]
    Theory(#[from] TheoryError),
    /// A peak elutes before the dead time.
    #[error(
        "peak `{name}` (line {line}) at {retention_time_min} min elutes before the dead time \
         {dead_time_min} min; check t0 or the column geometry and flow"
    )]
    PeakBeforeDeadTime {
        /// Peak name.
        name: String,
        /// Table line.
        line: usize,
        /// Retention time, min.
        retention_time_min: f64,
        /// Dead time, min.
        dead_time_min: f64,
    },
    /// A named peak (critical pair or excluded peak) is not in the table.
    #[error("peak `{name}` named in {role} is not in the peak table (peaks: {available})")]
    UnknownPeak {
        /// The name given.
        name: String,
        /// Where it was named.
        role: &'static str,
        /// Names available.
        available: String,
    },
    /// The critical pair names one peak twice.
    #[error("critical pair names `{name}` twice; give two different peaks")]
    CriticalPairSamePeak {
        /// The name.
        name: String,
    },
    /// A target is out of range.
    #[error("target {target} = {value} is not valid: {reason}")]
    BadTarget {
        /// Target name.
        target: &'static str,
        /// Value.
        value: f64,
        /// Why.
        reason: &'static str,
    },
    /// Fewer than one peak left after exclusions.
    #[error("no peaks left to evaluate after excluding {excluded:?}")]
    NoPeaks {
        /// Excluded names.
        excluded: Vec<String>,
    },
}

/// Targets for the pass/fail list (see the module documentation for the source of each default).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct SuitabilityTargets {
    /// Minimum resolution, default 1.5.
    pub min_resolution: f64,
    /// If set, resolution is checked only for this pair (names from the table).
    pub critical_pair: Option<[String; 2]>,
    /// Lowest acceptable retention factor, default 1.
    pub min_retention_factor: f64,
    /// Highest acceptable retention factor, default 10.
    pub max_retention_factor: f64,
    /// Highest acceptable USP tailing, default 2.0.
    pub max_tailing: f64,
    /// Minimum plate number (half-height form preferred), default none.
    pub min_plates: Option<f64>,
}

impl Default for SuitabilityTargets {
    fn default() -> Self {
        Self {
            min_resolution: 1.5,
            critical_pair: None,
            min_retention_factor: 1.0,
            max_retention_factor: 10.0,
            max_tailing: 2.0,
            min_plates: None,
        }
    }
}

/// A system-suitability request.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SuitabilityRequest {
    /// The measured peaks.
    pub peaks: PeakTable,
    /// Where t0 comes from.
    pub dead_time: DeadTimeInput,
    /// Column length, mm (for plate height); optional.
    #[serde(default)]
    pub column_length_mm: Option<f64>,
    /// Peaks to leave out of the evaluation (e.g. the t0 marker).
    #[serde(default)]
    pub exclude: Vec<String>,
    /// Targets; defaults as documented.
    #[serde(default)]
    pub targets: SuitabilityTargets,
}

/// How a tailing value was obtained.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum TailingBasis {
    /// Given in the table.
    Given,
    /// Computed from w5 and f5.
    FromWidths,
}

/// Results for one peak.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PeakResult {
    /// Analyte name.
    pub name: String,
    /// Retention time, min.
    pub retention_time_min: f64,
    /// Retention factor k.
    pub retention_factor: f64,
    /// N = 5.54 (tR/w½)², when w½ is known.
    pub plates_half_height: Option<f64>,
    /// N = 16 (tR/wb)², when wb is known.
    pub plates_base: Option<f64>,
    /// Plate height from the half-height N (else the base N), µm, when the column length is given.
    pub plate_height_um: Option<f64>,
    /// USP tailing.
    pub usp_tailing: Option<f64>,
    /// Where the tailing came from.
    pub tailing_basis: Option<TailingBasis>,
    /// Asymmetry at 10 % height.
    pub asymmetry: Option<f64>,
    /// Area as % of the total of evaluated peaks (when every evaluated peak has an area).
    pub area_pct: Option<f64>,
}

/// Which widths a resolution used.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ResolutionBasis {
    /// Rs = 1.18 Δt/(w½,1 + w½,2).
    HalfHeight,
    /// Rs = 2 Δt/(wb,1 + wb,2).
    BaseWidth,
    /// One peak had only w½, the other only wb: w½ converted as wb = 1.699 w½ (Gaussian).
    MixedGaussian,
}

/// Results for a pair of peaks.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PairResult {
    /// Earlier peak.
    pub first: String,
    /// Later peak.
    pub second: String,
    /// α = k2/k1 (None when the first peak is unretained, k1 = 0).
    pub selectivity: Option<f64>,
    /// Resolution.
    pub resolution: f64,
    /// Widths used.
    pub resolution_basis: ResolutionBasis,
}

/// What a check tests.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Criterion {
    /// Rs ≥ limit.
    MinResolution,
    /// k ≥ limit.
    MinRetentionFactor,
    /// k ≤ limit.
    MaxRetentionFactor,
    /// T ≤ limit.
    MaxTailing,
    /// N ≥ limit.
    MinPlates,
}

/// Outcome of one check.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Outcome {
    /// Met.
    Pass,
    /// Not met.
    Fail,
    /// The table lacks the data for it.
    NotEvaluated,
}

/// One pass/fail line.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Check {
    /// What is tested.
    pub criterion: Criterion,
    /// Peak or pair (`a / b`) it applies to.
    pub subject: String,
    /// Measured value, when available.
    pub value: Option<f64>,
    /// The limit.
    pub limit: f64,
    /// Result.
    pub outcome: Outcome,
    /// Where the limit comes from.
    pub limit_source: String,
}

/// The system-suitability report.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SuitabilityReport {
    /// Dead time used, min.
    pub dead_time_min: f64,
    /// Where it came from.
    pub dead_time_source: String,
    /// Per peak, in retention order.
    pub peaks: Vec<PeakResult>,
    /// Per adjacent pair, in retention order (plus the critical pair if it is not adjacent).
    pub pairs: Vec<PairResult>,
    /// Pass/fail list.
    pub checks: Vec<Check>,
    /// No check failed (checks not evaluated do not count as failures; see `not_evaluated`).
    pub passed: bool,
    /// Number of checks that could not be evaluated.
    pub not_evaluated: usize,
    /// Notes on what was assumed or skipped.
    pub notes: Vec<String>,
}

const SRC_RS: &str = "default 1.5: general pharmacopoeial chromatography chapters (critical pair), in general terms; the applicable chapter governs";
const SRC_K: &str = "default 1–10: common practice (Snyder, Kirkland & Dolan, Introduction to Modern Liquid Chromatography, 3rd ed., Wiley 2010, ch. 2; from memory)";
const SRC_T: &str = "default 2.0: general pharmacopoeial chromatography chapters, in general terms; the monograph governs";
const SRC_USER: &str = "set by the user";

fn pair_resolution(a: &Peak, b: &Peak) -> Result<(f64, ResolutionBasis), TheoryError> {
    const HALF_TO_BASE: f64 = 4.0 / 2.354_820_045; // Gaussian: wb = 4σ, w½ = 2.3548σ
    let (ta, tb) = (a.retention_time_min, b.retention_time_min);
    match (
        a.width_half_min,
        b.width_half_min,
        a.width_base_min,
        b.width_base_min,
    ) {
        (Some(w1), Some(w2), _, _) => Ok((
            theory::resolution_half_height(ta, tb, w1, w2)?,
            ResolutionBasis::HalfHeight,
        )),
        (_, _, Some(w1), Some(w2)) => Ok((
            theory::resolution_base(ta, tb, w1, w2)?,
            ResolutionBasis::BaseWidth,
        )),
        _ => {
            let base = |p: &Peak| {
                p.width_base_min
                    .or(p.width_half_min.map(|w| w * HALF_TO_BASE))
                    .unwrap_or(f64::NAN)
            };
            Ok((
                theory::resolution_base(ta, tb, base(a), base(b))?,
                ResolutionBasis::MixedGaussian,
            ))
        }
    }
}

fn check_target(name: &'static str, v: f64, reason: &'static str) -> Result<(), SuitabilityError> {
    if v.is_finite() && v >= 0.0 {
        Ok(())
    } else {
        Err(SuitabilityError::BadTarget {
            target: name,
            value: v,
            reason,
        })
    }
}

/// Progress of a long evaluation: peaks done out of the total.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Progress {
    /// Peaks evaluated so far.
    pub done: usize,
    /// Peaks to evaluate.
    pub total: usize,
}

/// How often (in peaks) [`evaluate_with_progress`] reports.
pub const PROGRESS_EVERY: usize = 10_000;

/// Evaluates system suitability for one run.
///
/// # Errors
/// Invalid dead time or column length, a peak before t0, unknown names in the critical pair or
/// exclusion list, invalid targets.
pub fn evaluate(req: &SuitabilityRequest) -> Result<SuitabilityReport, SuitabilityError> {
    evaluate_with_progress(req, &mut |_| {})
}

/// [`evaluate`], calling `progress` every [`PROGRESS_EVERY`] peaks and once at the end (the
/// library never prints; the caller decides how to show it). Time is linear in the number of
/// peaks.
///
/// # Errors
/// As [`evaluate`].
pub fn evaluate_with_progress(
    req: &SuitabilityRequest,
    progress: &mut dyn FnMut(Progress),
) -> Result<SuitabilityReport, SuitabilityError> {
    let t0 = req.dead_time.dead_time_min()?;
    let tg = &req.targets;
    check_target("min_resolution", tg.min_resolution, "must be ≥ 0")?;
    check_target(
        "min_retention_factor",
        tg.min_retention_factor,
        "must be ≥ 0",
    )?;
    check_target(
        "max_retention_factor",
        tg.max_retention_factor,
        "must be ≥ 0",
    )?;
    check_target("max_tailing", tg.max_tailing, "must be ≥ 0")?;
    if tg.max_retention_factor < tg.min_retention_factor {
        return Err(SuitabilityError::BadTarget {
            target: "max_retention_factor",
            value: tg.max_retention_factor,
            reason: "must not be below min_retention_factor",
        });
    }
    if let Some(n) = tg.min_plates {
        check_target("min_plates", n, "must be ≥ 0")?;
    }
    if let Some(l) = req.column_length_mm {
        theory::positive("column length (mm)", l)?;
    }
    let available = || {
        req.peaks
            .peaks()
            .iter()
            .map(|p| p.name.as_str())
            .collect::<Vec<_>>()
            .join(", ")
    };
    for name in &req.exclude {
        if req.peaks.get(name).is_none() {
            return Err(SuitabilityError::UnknownPeak {
                name: name.clone(),
                role: "the exclusion list",
                available: available(),
            });
        }
    }
    let excluded: std::collections::HashSet<&str> =
        req.exclude.iter().map(String::as_str).collect();
    let peaks: Vec<&Peak> = req
        .peaks
        .peaks_by_retention()
        .into_iter()
        .filter(|p| !excluded.contains(p.name.as_str()))
        .collect();
    if peaks.is_empty() {
        return Err(SuitabilityError::NoPeaks {
            excluded: req.exclude.clone(),
        });
    }
    if let Some([a, b]) = &tg.critical_pair {
        if a == b {
            return Err(SuitabilityError::CriticalPairSamePeak { name: a.clone() });
        }
        for n in [a, b] {
            if !peaks.iter().any(|p| &p.name == n) {
                return Err(SuitabilityError::UnknownPeak {
                    name: n.clone(),
                    role: "the critical pair",
                    available: available(),
                });
            }
        }
    }
    let mut notes = Vec::new();
    let all_area = peaks.iter().all(|p| p.area.is_some());
    let total_area: f64 = peaks.iter().filter_map(|p| p.area).sum();
    if !all_area && peaks.iter().any(|p| p.area.is_some()) {
        notes.push("area % not computed: some peaks have no area".to_string());
    }
    let mut results = Vec::with_capacity(peaks.len());
    let total = peaks.len();
    for (i, p) in peaks.iter().enumerate() {
        if i > 0 && i % PROGRESS_EVERY == 0 {
            progress(Progress { done: i, total });
        }
        if p.retention_time_min < t0 {
            return Err(SuitabilityError::PeakBeforeDeadTime {
                name: p.name.clone(),
                line: p.line,
                retention_time_min: p.retention_time_min,
                dead_time_min: t0,
            });
        }
        let k = theory::retention_factor(p.retention_time_min, t0)?;
        let nh = p
            .width_half_min
            .map(|w| theory::plate_number_half_height(p.retention_time_min, w))
            .transpose()?;
        let nb = p
            .width_base_min
            .map(|w| theory::plate_number_base(p.retention_time_min, w))
            .transpose()?;
        let h = match (req.column_length_mm, nh.or(nb)) {
            (Some(l), Some(n)) => Some(theory::plate_height_um(l, n)?),
            _ => None,
        };
        let (tailing, basis) = match (p.usp_tailing, p.width_5pct_min, p.front_5pct_min) {
            (Some(t), _, _) => (Some(t), Some(TailingBasis::Given)),
            (None, Some(w), Some(f)) => (
                Some(theory::usp_tailing(w, f)?),
                Some(TailingBasis::FromWidths),
            ),
            _ => (None, None),
        };
        let asym = match (p.front_10pct_min, p.back_10pct_min) {
            (Some(a), Some(b)) => Some(theory::asymmetry(a, b)?),
            _ => None,
        };
        let area_pct = match (all_area && total_area > 0.0, p.area) {
            (true, Some(a)) => Some(100.0 * a / total_area),
            _ => None,
        };
        results.push(PeakResult {
            name: p.name.clone(),
            retention_time_min: p.retention_time_min,
            retention_factor: k,
            plates_half_height: nh,
            plates_base: nb,
            plate_height_um: h,
            usp_tailing: tailing,
            tailing_basis: basis,
            asymmetry: asym,
            area_pct,
        });
    }
    progress(Progress { done: total, total });
    let make_pair = |i: usize, j: usize| -> Result<PairResult, SuitabilityError> {
        let (a, b) = (peaks[i], peaks[j]);
        let (rs, basis) = pair_resolution(a, b)?;
        let (ka, kb) = (results[i].retention_factor, results[j].retention_factor);
        let alpha = if ka > 0.0 {
            Some(theory::selectivity(ka, kb)?)
        } else {
            None
        };
        Ok(PairResult {
            first: a.name.clone(),
            second: b.name.clone(),
            selectivity: alpha,
            resolution: rs,
            resolution_basis: basis,
        })
    };
    let mut pairs = Vec::new();
    for i in 1..peaks.len() {
        pairs.push(make_pair(i - 1, i)?);
    }
    let mut checks = Vec::new();
    let mut rs_subjects: Vec<&PairResult> = Vec::new();
    let critical;
    if let Some([a, b]) = &tg.critical_pair {
        let ia = peaks.iter().position(|p| &p.name == a).unwrap_or(0);
        let ib = peaks.iter().position(|p| &p.name == b).unwrap_or(0);
        let (i, j) = if ia < ib { (ia, ib) } else { (ib, ia) };
        if j != i + 1 {
            notes.push(format!(
                "critical pair {a} / {b} is not adjacent in retention order; its resolution is \
                 computed directly"
            ));
            critical = Some(make_pair(i, j)?);
        } else {
            critical = None;
            if let Some(pr) = pairs.iter().find(|pr| pr.first == peaks[i].name) {
                rs_subjects.push(pr);
            }
        }
        if let Some(c) = &critical {
            rs_subjects.push(c);
        }
    } else {
        critical = None;
        rs_subjects.extend(pairs.iter());
    }
    for pr in &rs_subjects {
        checks.push(Check {
            criterion: Criterion::MinResolution,
            subject: format!("{} / {}", pr.first, pr.second),
            value: Some(pr.resolution),
            limit: tg.min_resolution,
            outcome: if pr.resolution >= tg.min_resolution {
                Outcome::Pass
            } else {
                Outcome::Fail
            },
            limit_source: if tg.min_resolution == 1.5 {
                SRC_RS
            } else {
                SRC_USER
            }
            .to_string(),
        });
    }
    let default_k = tg.min_retention_factor == 1.0 && tg.max_retention_factor == 10.0;
    for r in &results {
        for (criterion, limit, ok) in [
            (
                Criterion::MinRetentionFactor,
                tg.min_retention_factor,
                r.retention_factor >= tg.min_retention_factor,
            ),
            (
                Criterion::MaxRetentionFactor,
                tg.max_retention_factor,
                r.retention_factor <= tg.max_retention_factor,
            ),
        ] {
            checks.push(Check {
                criterion,
                subject: r.name.clone(),
                value: Some(r.retention_factor),
                limit,
                outcome: if ok { Outcome::Pass } else { Outcome::Fail },
                limit_source: if default_k { SRC_K } else { SRC_USER }.to_string(),
            });
        }
        checks.push(Check {
            criterion: Criterion::MaxTailing,
            subject: r.name.clone(),
            value: r.usp_tailing,
            limit: tg.max_tailing,
            outcome: match r.usp_tailing {
                Some(t) if t <= tg.max_tailing => Outcome::Pass,
                Some(_) => Outcome::Fail,
                None => Outcome::NotEvaluated,
            },
            limit_source: if tg.max_tailing == 2.0 {
                SRC_T
            } else {
                SRC_USER
            }
            .to_string(),
        });
        if let Some(nmin) = tg.min_plates {
            let n = r.plates_half_height.or(r.plates_base);
            checks.push(Check {
                criterion: Criterion::MinPlates,
                subject: r.name.clone(),
                value: n,
                limit: nmin,
                outcome: match n {
                    Some(n) if n >= nmin => Outcome::Pass,
                    Some(_) => Outcome::Fail,
                    None => Outcome::NotEvaluated,
                },
                limit_source: SRC_USER.to_string(),
            });
        }
    }
    if let Some(c) = critical {
        pairs.push(c);
    }
    if results.iter().any(|r| r.usp_tailing.is_none()) {
        notes.push(
            "tailing not evaluated where the table has neither `tailing` nor `w5`/`f5`".to_string(),
        );
    }
    if peaks.len() == 1 {
        notes.push("only one peak: no resolution to evaluate".to_string());
    }
    notes.push(format!(
        "dead time {t0:.4} min ({})",
        req.dead_time.describe()
    ));
    let passed = !checks.iter().any(|c| c.outcome == Outcome::Fail);
    let not_evaluated = checks
        .iter()
        .filter(|c| c.outcome == Outcome::NotEvaluated)
        .count();
    Ok(SuitabilityReport {
        dead_time_min: t0,
        dead_time_source: req.dead_time.describe(),
        peaks: results,
        pairs,
        checks,
        passed,
        not_evaluated,
        notes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // Invented demo run (invented lab, invented analytes), values hand-chosen.
    const TABLE: &str = "name,rt,w50,wb,area,tailing\n\
        marker,1.00,0.020,,5,\n\
        analyte-b,4.00,0.080,,300,1.2\n\
        analyte-a,3.00,0.060,,200,1.1\n\
        analyte-c,4.30,0.085,,500,2.4\n";

    fn req() -> SuitabilityRequest {
        SuitabilityRequest {
            peaks: PeakTable::parse(TABLE).unwrap(),
            dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
            column_length_mm: Some(150.0),
            exclude: vec!["marker".into()],
            targets: SuitabilityTargets::default(),
        }
    }

    #[test]
    fn hand_computed_report() {
        let r = evaluate(&req()).unwrap();
        assert_eq!(r.peaks.len(), 3);
        assert_eq!(r.peaks[0].name, "analyte-a");
        // k = (3 − 1)/1 = 2; N = 5.54 (3/0.06)² = 13 850; H = 150 000 µm / 13 850 = 10.83 µm.
        assert!((r.peaks[0].retention_factor - 2.0).abs() < 1e-12);
        assert!((r.peaks[0].plates_half_height.unwrap() - 13_850.0).abs() < 1e-6);
        assert!((r.peaks[0].plate_height_um.unwrap() - 150_000.0 / 13_850.0).abs() < 1e-9);
        // area % = 200/1000.
        assert!((r.peaks[0].area_pct.unwrap() - 20.0).abs() < 1e-12);
        // a/b: Rs = 1.18 × 1.0/(0.06 + 0.08) = 8.43; α = 3/2 = 1.5.
        assert!((r.pairs[0].resolution - 1.18 / 0.14).abs() < 1e-9);
        assert!((r.pairs[0].selectivity.unwrap() - 1.5).abs() < 1e-12);
        // b/c: Rs = 1.18 × 0.3/0.165 = 2.145 → pass; c tailing 2.4 → fail.
        assert!((r.pairs[1].resolution - 1.18 * 0.3 / 0.165).abs() < 1e-9);
        assert!(!r.passed);
        let fails: Vec<_> = r
            .checks
            .iter()
            .filter(|c| c.outcome == Outcome::Fail)
            .map(|c| (c.criterion, c.subject.clone()))
            .collect();
        assert_eq!(
            fails,
            vec![(Criterion::MaxTailing, "analyte-c".to_string())]
        );
    }

    #[test]
    fn critical_pair_limits_resolution_checks() {
        let mut q = req();
        q.targets.critical_pair = Some(["analyte-c".into(), "analyte-a".into()]);
        q.targets.max_tailing = 3.0;
        let r = evaluate(&q).unwrap();
        let rs: Vec<_> = r
            .checks
            .iter()
            .filter(|c| c.criterion == Criterion::MinResolution)
            .collect();
        assert_eq!(rs.len(), 1);
        assert_eq!(rs[0].subject, "analyte-a / analyte-c");
        assert!(r.passed);
    }

    #[test]
    fn peak_before_t0_is_an_error() {
        let mut q = req();
        q.dead_time = DeadTimeInput::Given { dead_time_min: 3.5 };
        let e = evaluate(&q).unwrap_err().to_string();
        assert!(e.contains("analyte-a") && e.contains("3.5"), "{e}");
    }

    #[test]
    fn dead_time_from_geometry() {
        // 150 × 4.6 mm at 1.5 mL/min: 1.587/1.5 = 1.058 min (> marker at 1.00 → excluded anyway).
        let mut q = req();
        q.dead_time = DeadTimeInput::FromColumn {
            column_length_mm: 150.0,
            inner_diameter_mm: 4.6,
            flow_ml_min: 1.5,
        };
        let r = evaluate(&q).unwrap();
        assert!((r.dead_time_min - 1.058).abs() < 1e-9);
        q.dead_time = DeadTimeInput::FromColumn {
            column_length_mm: 150.0,
            inner_diameter_mm: 4.6,
            flow_ml_min: -1.0,
        };
        assert!(evaluate(&q).unwrap_err().to_string().contains("-1"));
    }

    #[test]
    fn unknown_names_are_reported() {
        let mut q = req();
        q.targets.critical_pair = Some(["analyte-a".into(), "analyte-z".into()]);
        assert!(evaluate(&q).unwrap_err().to_string().contains("analyte-z"));
    }

    #[test]
    fn base_width_and_tailing_from_widths() {
        let t = PeakTable::parse("name,rt,wb,w5,f5,a10,b10\np,2.0,0.2,0.12,0.05,0.04,0.05\nq,2.5,0.2,0.1,0.05,0.04,0.04\n").unwrap();
        let r = evaluate(&SuitabilityRequest {
            peaks: t,
            dead_time: DeadTimeInput::Given { dead_time_min: 0.5 },
            column_length_mm: None,
            exclude: vec![],
            targets: SuitabilityTargets::default(),
        })
        .unwrap();
        // Rs = 2 × 0.5/0.4 = 2.5; T = 0.12/(2×0.05) = 1.2; As = 0.05/0.04 = 1.25; N = 16 (2/0.2)² = 1600.
        assert_eq!(r.pairs[0].resolution_basis, ResolutionBasis::BaseWidth);
        assert!((r.pairs[0].resolution - 2.5).abs() < 1e-12);
        assert!((r.peaks[0].usp_tailing.unwrap() - 1.2).abs() < 1e-12);
        assert!((r.peaks[0].asymmetry.unwrap() - 1.25).abs() < 1e-12);
        assert!((r.peaks[0].plates_base.unwrap() - 1600.0).abs() < 1e-9);
        let j = serde_json::to_string(&r).unwrap();
        let back: SuitabilityReport = serde_json::from_str(&j).unwrap();
        assert_eq!(back, r);
    }

    #[test]
    fn progress_is_reported_in_steps_and_at_the_end() {
        // invented run of 25 000 evenly spaced peaks
        let mut text = String::from("name,rt,w50\n");
        for i in 0..25_000 {
            text.push_str(&format!("p{i},{:.4},0.0005\n", 1.0 + f64::from(i) * 0.01));
        }
        let mut req = req();
        req.peaks = PeakTable::parse(&text).unwrap();
        req.targets.critical_pair = None;
        req.exclude.clear();
        let mut seen = Vec::new();
        let r = evaluate_with_progress(&req, &mut |p| seen.push(p)).unwrap();
        assert_eq!(r.peaks.len(), 25_000);
        let done: Vec<usize> = seen.iter().map(|p| p.done).collect();
        assert_eq!(done, [10_000, 20_000, 25_000]);
        assert!(seen.iter().all(|p| p.total == 25_000));
    }
}
