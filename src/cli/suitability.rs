//! `phasewise suitability`: system suitability of one measured run from its peak table.
//! Exit status 0 when every check passes, 1 when any check fails, 2 on bad input.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;
use clap::{Args, ValueEnum};

use phasewise::measured::suitability::{
    SuitabilityError, SuitabilityRequest, SuitabilityTargets, evaluate_with_progress,
};
use phasewise::report::measured::MeasuredFormat;
use phasewise::report::measured::suitability::SuitabilityOutput;

use super::exit::success_unless_partial;
use super::input::{
    ColumnSize, NumberRange, check_option_range, column_arg, dead_time_input, non_negative_arg,
    pair_arg, positive_arg, range_arg, read_peaks,
};
use super::output::write_report;

/// `suitability` help footer.
pub const SUITABILITY_HELP: &str = "\
Exit status: 0 when every check passes, 1 when any check fails, 2 on bad input.
Checks that lack data (e.g. no tailing column) are listed as not evaluated; they do not fail.

Example:
  phasewise suitability run-07.csv --t0 1.02 --length-mm 150 --critical 'impurity A,main'
  phasewise suitability run-07.csv --column 150x4.6 --flow 1.0 --format json";

/// Output formats of `suitability`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SuitabilityFormat {
    /// Aligned tables.
    Table,
    /// JSON: the report with `schema_version`.
    Json,
    /// Comma-separated blocks (peaks, pairs, checks), each after a `# title` line.
    Csv,
}

/// `suitability` options.
#[derive(Debug, Args)]
pub struct SuitabilityArgs {
    /// Peak table (CSV or TSV with a header line; `-` reads stdin). Times in minutes.
    #[arg(value_name = "PEAKS")]
    pub peaks: PathBuf,
    /// Dead time t0, min (e.g. from an unretained marker).
    #[arg(long, value_name = "MIN", conflicts_with = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub t0: Option<f64>,
    /// Column as LENGTHxID in mm (e.g. `150x4.6`): t0 is estimated with Vm ≈ 0.5·L·dc².
    #[arg(long, value_name = "LxID", value_parser = column_arg, requires = "flow")]
    pub column: Option<ColumnSize>,
    /// Flow rate, mL/min (with --column).
    #[arg(long, value_name = "ML_MIN", requires = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub flow: Option<f64>,
    /// Column length, mm, for the plate height (default: the length in --column).
    #[arg(long, value_name = "L", value_parser = positive_arg, allow_negative_numbers = true)]
    pub length_mm: Option<f64>,
    /// Check resolution only for this pair of peaks, `first,second`.
    #[arg(long, value_name = "A,B", value_parser = pair_arg)]
    pub critical: Option<[String; 2]>,
    /// Minimum resolution Rs.
    #[arg(long, value_name = "RS", default_value_t = 1.5, value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub min_resolution: f64,
    /// Acceptable retention-factor range, `MIN,MAX`.
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, default_value = "1,10", allow_hyphen_values = true)]
    pub k_range: NumberRange,
    /// Highest acceptable USP tailing.
    #[arg(long, value_name = "T", default_value_t = 2.0, value_parser = positive_arg, allow_negative_numbers = true)]
    pub max_tailing: f64,
    /// Minimum plate number (none by default).
    #[arg(long, value_name = "N", value_parser = positive_arg, allow_negative_numbers = true)]
    pub min_plates: Option<f64>,
    /// Leave a peak out (e.g. the t0 marker); repeatable.
    #[arg(long, value_name = "NAME")]
    pub exclude: Vec<String>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = SuitabilityFormat::Table)]
    pub format: SuitabilityFormat,
}

/// Runs `phasewise suitability`.
pub fn run(a: &SuitabilityArgs) -> Result<ExitCode> {
    check_option_range(
        "--k-range",
        a.k_range,
        0.0,
        f64::MAX,
        "retention factors cannot be negative",
    )?;
    let dead_time = dead_time_input(a.t0, a.column, a.flow)?;
    let peaks = read_peaks(&a.peaks)?;
    let req = SuitabilityRequest {
        peaks,
        dead_time,
        column_length_mm: a.length_mm.or(a.column.map(|c| c.length_mm)),
        exclude: a.exclude.clone(),
        targets: SuitabilityTargets {
            min_resolution: a.min_resolution,
            critical_pair: a.critical.clone(),
            min_retention_factor: a.k_range.min,
            max_retention_factor: a.k_range.max,
            max_tailing: a.max_tailing,
            min_plates: a.min_plates,
        },
    };
    // progress on stderr, one line per step, only for tables long enough to take a while
    let mut progress = |p: phasewise::measured::suitability::Progress| {
        if p.total > phasewise::measured::suitability::PROGRESS_EVERY {
            eprintln!("suitability: {} of {} peaks evaluated", p.done, p.total);
        }
    };
    let report =
        evaluate_with_progress(&req, &mut progress).map_err(|e| suitability_error(e, a))?;
    let output = SuitabilityOutput {
        schema_version: 1,
        peak_table: a.peaks.display().to_string(),
        report: &report,
    };
    write_report(
        &output,
        match a.format {
            SuitabilityFormat::Table => MeasuredFormat::Table,
            SuitabilityFormat::Json => MeasuredFormat::Json,
            SuitabilityFormat::Csv => MeasuredFormat::Csv,
        },
    )?;
    Ok(success_unless_partial(!report.passed))
}
/// A library error with the option (or the file) the user can change named first.
fn suitability_error(e: SuitabilityError, a: &SuitabilityArgs) -> anyhow::Error {
    let file = a.peaks.display();
    match &e {
        SuitabilityError::UnknownPeak { role, .. } => {
            let option = if role.contains("exclusion") {
                "--exclude"
            } else {
                "--critical"
            };
            anyhow::anyhow!("{option}: {e}")
        }
        SuitabilityError::CriticalPairSamePeak { .. } => anyhow::anyhow!("--critical: {e}"),
        SuitabilityError::BadTarget { target, .. } => {
            let option = match *target {
                "min_resolution" => "--min-resolution",
                "min_retention_factor" | "max_retention_factor" => "--k-range",
                "max_tailing" => "--max-tailing",
                "min_plates" => "--min-plates",
                _ => "a limit option",
            };
            anyhow::anyhow!("{option}: {e}")
        }
        SuitabilityError::PeakBeforeDeadTime { .. } => anyhow::anyhow!(
            "{file}: {e} (t0 from {})",
            if a.t0.is_some() {
                "--t0"
            } else {
                "--column and --flow"
            }
        ),
        SuitabilityError::NoPeaks { .. } => anyhow::anyhow!("{file}, --exclude: {e}"),
        _ => anyhow::Error::new(e).context(format!("evaluating {file}")),
    }
}
