//! The system-suitability section of the plan: every target with the predicted value and a
//! verdict (meets, misses, not evaluated) that gives its reason.

use super::Block;
use crate::report::advice::Recommendation;
use crate::report::num;

/// Verdict of one target against the prediction.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// The prediction meets the target.
    Meets,
    /// The prediction misses the target.
    Misses,
    /// The target cannot be judged from a prediction.
    NotEvaluated,
}

impl Verdict {
    /// Plain words.
    pub fn label(self) -> &'static str {
        match self {
            Verdict::Meets => "meets",
            Verdict::Misses => "misses",
            Verdict::NotEvaluated => "not evaluated",
        }
    }
}

/// One row of the targets table.
#[derive(Debug, Clone, PartialEq)]
pub struct TargetRow {
    /// Quantity.
    pub quantity: String,
    /// Target.
    pub target: String,
    /// Predicted value (or "-").
    pub predicted: String,
    /// Verdict.
    pub verdict: Verdict,
    /// Why the verdict (always filled).
    pub reason: String,
    /// Where the target comes from.
    pub source: String,
}

const PHARMACOPOEIA: &str = "general chromatography chapters of the major pharmacopoeias (USP \
<621>, Ph. Eur. 2.2.46) define the quantity";

/// Lower and upper retention-factor targets (common practice, no source).
pub const K_MIN: f64 = 1.0;
/// Upper retention-factor target.
pub const K_MAX: f64 = 20.0;

/// The targets with their verdicts for the first recommendation (`None`: nothing predicted).
pub fn target_rows(first: Option<&Recommendation>) -> Vec<TargetRow> {
    let mut rows = Vec::new();
    let crit = first
        .and_then(|f| f.critical_pair.as_ref())
        .map(|(x, y)| format!("{x} / {y}"))
        .unwrap_or_else(|| "the least resolved pair".to_string());
    let rs = first
        .and_then(|f| f.critical_resolution)
        .filter(|r| r.is_finite());
    let (verdict, reason) = match rs {
        Some(r) if r >= 2.0 => (Verdict::Meets, "predicted Rs ≥ 2.0".to_string()),
        Some(r) if r >= 1.5 => (
            Verdict::Meets,
            format!(
                "meets the 1.5 minimum only; {} is below the proposed 2.0",
                num(r, 2)
            ),
        ),
        Some(r) => (
            Verdict::Misses,
            format!(
                "predicted Rs {} is below 1.5: optimise after scouting, or try the back-up",
                num(r, 2)
            ),
        ),
        None => (
            Verdict::NotEvaluated,
            "no pair predicted (fewer than two analytes with a prediction)".to_string(),
        ),
    };
    rows.push(TargetRow {
        quantity: format!("Resolution of the critical pair ({crit})"),
        target: "≥ 2.0 proposed, ≥ 1.5 minimum".to_string(),
        predicted: rs.map(|r| num(r, 2)).unwrap_or_else(|| "-".to_string()),
        verdict,
        reason,
        source: format!(
            "{PHARMACOPOEIA}; 1.5 is baseline separation of two equal Gaussian peaks (from \
             memory); 2.0 leaves margin for column ageing (common practice, no source)"
        ),
    });
    let ks: Vec<(&str, f64)> = first
        .map(|f| {
            f.predictions
                .iter()
                .filter(|p| p.retention_factor.is_finite())
                .map(|p| (p.analyte.as_str(), p.retention_factor))
                .collect()
        })
        .unwrap_or_default();
    let lo = ks.iter().map(|x| x.1).reduce(f64::min);
    let hi = ks.iter().map(|x| x.1).reduce(f64::max);
    let (verdict, reason) = match (lo, hi) {
        (Some(_), Some(_)) => {
            let low: Vec<String> = ks
                .iter()
                .filter(|x| x.1 < K_MIN)
                .map(|x| format!("{} ({})", x.0, num(x.1, 2)))
                .collect();
            let high: Vec<String> = ks
                .iter()
                .filter(|x| x.1 > K_MAX)
                .map(|x| format!("{} ({})", x.0, num(x.1, 1)))
                .collect();
            let mut why = Vec::new();
            if !low.is_empty() {
                why.push(format!(
                    "below 1: {}; start with a weaker eluent or a lower initial temperature",
                    low.join(", ")
                ));
            }
            if !high.is_empty() {
                why.push(format!(
                    "above 20: {}; end stronger or steeper",
                    high.join(", ")
                ));
            }
            if why.is_empty() {
                (
                    Verdict::Meets,
                    "every predicted k lies within 1 to 20".to_string(),
                )
            } else {
                (Verdict::Misses, why.join("; "))
            }
        }
        _ => (
            Verdict::NotEvaluated,
            "no retention factor predicted".to_string(),
        ),
    };
    rows.push(TargetRow {
        quantity: "Retention factor k of every analyte".to_string(),
        target: "1 to 20; first peak ≥ 2 preferred".to_string(),
        predicted: match (lo, hi) {
            (Some(lo), Some(hi)) => format!("{} to {}", num(lo, 2), num(hi, 2)),
            _ => "-".to_string(),
        },
        verdict,
        reason,
        source: "common practice, no source (peaks with k < 1 elute with unretained matrix; \
                 k > 20 wastes time and broadens peaks)"
            .to_string(),
    });
    let n_est = first
        .map(|f| f.conditions.plate_number)
        .filter(|n| n.is_finite() && *n > 0.0);
    rows.push(TargetRow {
        quantity: "Plate number N (critical-pair peak)".to_string(),
        target: match n_est {
            Some(n) => format!("≥ {} (half the estimated column value)", num(n / 2.0, 0)),
            None => "≥ 2000".to_string(),
        },
        predicted: n_est
            .map(|n| format!("{} (estimate for the column)", num(n, 0)))
            .unwrap_or_else(|| "-".to_string()),
        verdict: Verdict::NotEvaluated,
        reason: "the target is derived from the same estimate; measure N on the column".to_string(),
        source: format!(
            "{PHARMACOPOEIA}; the half-of-estimate target is common practice, no source"
        ),
    });
    rows.push(TargetRow {
        quantity: "Tailing factor (symmetry factor) of every peak".to_string(),
        target: "≤ 2.0".to_string(),
        predicted: "-".to_string(),
        verdict: Verdict::NotEvaluated,
        reason: "peak shape is not predicted; measure it on the suitability solution".to_string(),
        source: format!("{PHARMACOPOEIA}; ≤ 2.0 is a common general limit (from memory)"),
    });
    rows.push(TargetRow {
        quantity: "Repeatability of retention time (replicate injections)".to_string(),
        target: "RSD ≤ 1 %".to_string(),
        predicted: "-".to_string(),
        verdict: Verdict::NotEvaluated,
        reason: "needs replicate injections".to_string(),
        source: "common practice, no source".to_string(),
    });
    rows
}

/// The section's blocks: the targets table (sources as numbered notes, so a long citation is
/// written once, not on every row) and the notes.
pub fn targets_blocks(first: Option<&Recommendation>) -> Vec<Block> {
    let mut notes: Vec<String> = Vec::new();
    let rows = target_rows(first)
        .into_iter()
        .map(|r| {
            let n = match notes.iter().position(|x| *x == r.source) {
                Some(i) => i + 1,
                None => {
                    notes.push(r.source.clone());
                    notes.len()
                }
            };
            vec![
                r.quantity,
                r.target,
                r.predicted,
                r.verdict.label().to_string(),
                r.reason,
                format!("[{n}]"),
            ]
        })
        .collect();
    vec![
        Block::Table {
            header: vec![
                "quantity".to_string(),
                "target".to_string(),
                "predicted".to_string(),
                "verdict".to_string(),
                "why".to_string(),
                "source".to_string(),
            ],
            rows,
        },
        Block::Para("Where the targets come from:".to_string()),
        Block::List(
            notes
                .iter()
                .enumerate()
                .map(|(i, n)| format!("[{}] {n}", i + 1))
                .collect(),
        ),
    ]
}
