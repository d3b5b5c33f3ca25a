//! The `suitability` report: peaks, adjacent pairs and checks as tables or CSV blocks.

use serde::Serialize;

use super::{Render, csv_block, num};
use crate::measured::suitability::{Criterion, Outcome, ResolutionBasis, SuitabilityReport};
use crate::report::csv_opt;
use crate::report::table::render;

/// JSON output of `suitability` (schema version 1: the library report plus the file name).
#[derive(Serialize)]
pub struct SuitabilityOutput<'a> {
    /// Schema version (1).
    pub schema_version: u32,
    /// The peak table's file name as given.
    pub peak_table: String,
    /// The evaluation.
    #[serde(flatten)]
    pub report: &'a SuitabilityReport,
}

impl Render for SuitabilityOutput<'_> {
    fn table(&self) -> String {
        suitability_table(self.report)
    }
    fn csv(&self) -> Option<String> {
        Some(suitability_csv(self.report))
    }
}

const PEAK_HEADER: [&str; 9] = [
    "peak",
    "tR (min)",
    "k (–)",
    "N half-height (–)",
    "N base (–)",
    "H (µm)",
    "USP tailing (–)",
    "asymmetry (–)",
    "area (%)",
];
const PAIR_HEADER: [&str; 5] = [
    "first",
    "second",
    "selectivity α (–)",
    "resolution Rs (–)",
    "Rs from",
];
const CHECK_HEADER: [&str; 6] = [
    "check",
    "subject",
    "value (–)",
    "limit (–)",
    "result",
    "limit source",
];

/// Which widths a resolution was computed from, in words.
fn basis_text(b: ResolutionBasis) -> &'static str {
    match b {
        ResolutionBasis::HalfHeight => "half-height widths",
        ResolutionBasis::BaseWidth => "base widths",
        ResolutionBasis::MixedGaussian => "one width converted (Gaussian)",
    }
}

fn criterion_text(c: Criterion) -> &'static str {
    match c {
        Criterion::MinResolution => "Rs ≥ limit",
        Criterion::MinRetentionFactor => "k ≥ limit",
        Criterion::MaxRetentionFactor => "k ≤ limit",
        Criterion::MaxTailing => "tailing ≤ limit",
        Criterion::MinPlates => "N ≥ limit",
    }
}

fn outcome_text(o: Outcome) -> &'static str {
    match o {
        Outcome::Pass => "pass",
        Outcome::Fail => "FAIL",
        Outcome::NotEvaluated => "not evaluated",
    }
}

/// The rows of the three tables; `delimited` picks the CSV number rule ([`csv_num`], an empty
/// cell when absent) over the table's fixed decimals.
fn suitability_rows(r: &SuitabilityReport, delimited: bool) -> [Vec<Vec<String>>; 3] {
    let num = |v: Option<f64>, d: usize| {
        if delimited {
            csv_opt(v.filter(|x| x.is_finite()), Some(d))
        } else {
            num(v, d)
        }
    };
    let peaks = r
        .peaks
        .iter()
        .map(|p| {
            vec![
                p.name.clone(),
                num(Some(p.retention_time_min), 3),
                num(Some(p.retention_factor), 3),
                num(p.plates_half_height, 0),
                num(p.plates_base, 0),
                num(p.plate_height_um, 2),
                num(p.usp_tailing, 2),
                num(p.asymmetry, 2),
                num(p.area_pct, 2),
            ]
        })
        .collect();
    let pairs = r
        .pairs
        .iter()
        .map(|p| {
            vec![
                p.first.clone(),
                p.second.clone(),
                num(p.selectivity, 3),
                num(Some(p.resolution), 2),
                basis_text(p.resolution_basis).to_string(),
            ]
        })
        .collect();
    let checks = r
        .checks
        .iter()
        .map(|c| {
            vec![
                criterion_text(c.criterion).into(),
                c.subject.clone(),
                num(c.value, 2),
                num(Some(c.limit), 2),
                outcome_text(c.outcome).into(),
                c.limit_source.clone(),
            ]
        })
        .collect();
    [peaks, pairs, checks]
}

fn suitability_table(r: &SuitabilityReport) -> String {
    let [peaks, pairs, checks] = suitability_rows(r, false);
    let mut s = format!(
        "Dead time t0 = {:.3} min ({})\n\nPeaks, in retention order ((–) = dimensionless):\n",
        r.dead_time_min, r.dead_time_source
    );
    s.push_str(&render(&PEAK_HEADER, &peaks));
    s.push_str("\n\nAdjacent pairs:\n");
    if pairs.is_empty() {
        s.push_str("(one peak only: no pairs)\n");
    } else {
        s.push_str(&render(&PAIR_HEADER, &pairs));
        s.push('\n');
    }
    // The table names each limit's source by number and lists the sources once below it (a
    // source repeated on every row hides the values); the CSV keeps the text on every row.
    let mut sources: Vec<String> = Vec::new();
    let checks: Vec<Vec<String>> = checks
        .into_iter()
        .map(|mut row| {
            if let Some(src) = row.last_mut() {
                let n = match sources.iter().position(|x| x == src) {
                    Some(i) => i + 1,
                    None => {
                        sources.push(src.clone());
                        sources.len()
                    }
                };
                *src = format!("[{n}]");
            }
            row
        })
        .collect();
    s.push_str("\nChecks ((–) = dimensionless: Rs, k, tailing and N have no unit):\n");
    s.push_str(&render(&CHECK_HEADER, &checks));
    s.push_str("\nLimit sources:\n");
    for (i, src) in sources.iter().enumerate() {
        s.push_str(&format!(" [{}] {src}\n", i + 1));
    }
    let failed = r
        .checks
        .iter()
        .filter(|c| c.outcome == Outcome::Fail)
        .count();
    s.push_str(&format!(
        "\nResult: {} ({} checks, {} failed, {} not evaluated)\n",
        if r.passed { "PASS" } else { "FAIL" },
        r.checks.len(),
        failed,
        r.not_evaluated
    ));
    for n in &r.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    s.push_str(
        "note: limits are starting points; the validated method, the lab's SOPs and the \
         applicable pharmacopoeial chapter take precedence.\n",
    );
    s
}

fn suitability_csv(r: &SuitabilityReport) -> String {
    let [peaks, pairs, checks] = suitability_rows(r, true);
    let mut s = csv_block("peaks", &PEAK_HEADER, &peaks);
    s.push('\n');
    s.push_str(&csv_block("pairs", &PAIR_HEADER, &pairs));
    s.push('\n');
    s.push_str(&csv_block("checks", &CHECK_HEADER, &checks));
    s
}
