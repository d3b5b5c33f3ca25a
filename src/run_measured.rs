//! Command-line layer for measured runs (`suitability`, `scout`, `transfer`) and for the LC
//! retention model (`model train`, `model eval`): the clap argument types, the handlers that
//! turn them into library requests, and the renderers of the results. All chromatography lives
//! in `phasewise::measured` and `phasewise::model`; this module only parses, checks cheap
//! things first (argument shapes, writable output directories), calls the library, prints and
//! picks the exit code.
//!
//! Also here, shared by every command that takes a column: the `LxID` geometry parser
//! ([`parse_column`]).
//!
//! Exit codes used by these commands: 0 all well; 1 (`suitability` only) the table was read and
//! evaluated but at least one check failed; 2 bad input or usage (the message names the file,
//! line, column or value).

use std::fmt;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::str::FromStr;

use anyhow::{Context, Result, bail};
use clap::{Args, Subcommand, ValueEnum};
use serde::Serialize;

use phasewise::measured::DeadTimeInput;
use phasewise::measured::gc_optimise::{
    GcOptimiseError, GcOptimiseReport, GcOptimiseRequest, TemperatureRange, optimise_gc,
    render_gc_window_svg,
};
use phasewise::measured::gc_scout::{
    GcFitFlag, GcScoutError, GcScoutFit, GcScoutRequest, GcScoutRun, apparent_plates, fit_gc,
};
use phasewise::measured::lc_temperature::{
    TemperatureError, TemperatureModel, TemperaturePoint, optimise_temperature, temperature_model,
};
use phasewise::measured::optimise::{
    OptimiseError, OptimiseReport, OptimiseRequest, PlateSource, Prediction, Range, Selection,
    optimise, render_window_svg,
};
use phasewise::measured::peaks::PeakTable;
use phasewise::measured::scout::{
    CompositionBasis, FitFlag, ScoutError, ScoutFit, ScoutRequest, ScoutRun, fit_in,
};
use phasewise::measured::suitability::{
    Criterion, Outcome, SuitabilityError, SuitabilityReport, SuitabilityRequest,
    SuitabilityTargets, evaluate,
};
use phasewise::measured::transfer::{
    ColumnGeometry, TransferError, TransferReport, TransferRequest, transfer,
};
use phasewise::model::eval::{EvalReport, evaluate_with};
use phasewise::model::features::PhasewiseDescriptors;
use phasewise::model::gc::{GcColumn, OvenProgram};
use phasewise::model::gradient::GradientProgram;
use phasewise::model::memory::MemoryTable;
use phasewise::model::regression::{DEFAULT_PENALTIES, TrainingData, train_with};
use phasewise::report::chromatogram::{render_gc_optimum_svg, render_optimum_svg};
use phasewise::report::plan::{check_writable, write_atomically};
use phasewise::report::table::render;

use crate::commands::EXIT_PARTIAL;

// ---------------------------------------------------------------------------------------------
// Help texts (referred to from cli.rs so that the hook lines there stay short).

/// `suitability` help footer.
pub const SUITABILITY_HELP: &str = "\
Exit status: 0 when every check passes, 1 when any check fails, 2 on bad input.
Checks that lack data (e.g. no tailing column) are listed as not evaluated; they do not fail.

Example:
  phasewise suitability run-07.csv --t0 1.02 --length-mm 150 --critical 'impurity A,main'
  phasewise suitability run-07.csv --column 150x4.6 --flow 1.0 --format json";

/// `scout` help footer.
pub const SCOUT_HELP: &str = "\
LC: the gradient programs are `time:%organic` points, one program per run, separated by `;`,
in the order of the run files; with --mode hilic log kw and S are fitted in the water fraction
(1 - %organic/100). GC (--mode gc): the oven programs are
INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN, one per run, separated by `;`; the runs
should differ in ramp rate (a factor of 2-3) or initial temperature. Recommendations are
starting points: verify them by a run. GC: hydrogen carrier is flammable; never exceed the
phase's maximum temperature.

Example:
  phasewise scout fast.csv slow.csv --gradients '0:5,10:95;0:5,30:95' \\
      --column 150x4.6 --flow 1.0 --dwell 0.8 --window-svg window.svg
  phasewise scout --mode gc slow.csv fast.csv --ovens '40:1,5:300:5;40:1,15:300:5' \\
      --column 30x0.25x0.25 --velocity 35 --phase gc-5-phenyl --window-svg ramp-window.svg";

/// `transfer` help footer.
pub const TRANSFER_HELP: &str = "\
Check the predicted pressure against the column's and the system's limits before running.

Example:
  phasewise transfer --from 150x4.6 --from-particle 5 --to 100x2.1 --to-particle 1.8 \\
      --flow 1.0 --gradient '0:5,20:95' --dwell-from 1.0 --dwell-to 0.2 --injection 10";

/// `model` help footer.
pub const MODEL_HELP: &str = "Example:\n  phasewise model eval --format markdown";

const MODEL_TRAIN_HELP: &str = "\
Without --systems/--retention the tables are read from ../shared/data/retention/ when they
exist there. Same tables and seed give byte-identical output files.

Example:
  phasewise model train --systems systems.tsv --retention retention.tsv --seed 42";

const MODEL_EVAL_HELP: &str = "\
Example:
  phasewise model eval --systems systems.tsv --retention retention.tsv --folds 5 --format json";

/// Where `model train`/`model eval` look for the tables when no path is given (relative to the
/// working directory; the layout of the project's shared data folder).
const SHARED_RETENTION_DIR: &str = "../shared/data/retention";

/// Plate number assumed by `scout` when neither `--plates` nor `--particle` is given (common
/// practice, no source: a typical value for a 150 mm column of 5 µm particles).
const DEFAULT_PLATES: f64 = 10_000.0;

// ---------------------------------------------------------------------------------------------
// Column geometry `LxID`.

/// A column's length and inner diameter, both in mm, as written `150x4.6`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct ColumnSize {
    /// Length, mm.
    pub(crate) length_mm: f64,
    /// Inner diameter, mm.
    pub(crate) inner_diameter_mm: f64,
}

/// Why a column text could not be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub(crate) enum ColumnSpecError {
    /// Not two numbers around an `x`.
    #[error(
        "column `{text}` is not LENGTHxID in mm: write length and inner diameter around an `x`, e.g. `150x4.6`"
    )]
    Malformed {
        /// The text given.
        text: String,
    },
    /// One part is not a number.
    #[error("column `{text}`: {part} `{value}` is not a number (write e.g. `150x4.6`, in mm)")]
    BadNumber {
        /// The text given.
        text: String,
        /// `length` or `inner diameter`.
        part: &'static str,
        /// The offending part.
        value: String,
    },
    /// One part is zero, negative or not finite.
    #[error("column `{text}`: {part} {value} mm must be a finite number greater than zero")]
    NotPositive {
        /// The text given.
        text: String,
        /// `length` or `inner diameter`.
        part: &'static str,
        /// The value.
        value: f64,
    },
}

/// Parses `LxID` in mm: `150x4.6`, `150 x 4.6`, `150X4.6`, `150×4.6`, optionally followed by
/// `mm`.
pub(crate) fn parse_column(text: &str) -> Result<ColumnSize, ColumnSpecError> {
    let t = text.trim();
    let t = t.strip_suffix("mm").unwrap_or(t).trim_end();
    let parts: Vec<&str> = t.split(['x', 'X', '×']).collect();
    if parts.len() != 2 {
        return Err(ColumnSpecError::Malformed { text: text.into() });
    }
    let number = |part: &'static str, s: &str| -> Result<f64, ColumnSpecError> {
        let s = s.trim();
        if s.is_empty() {
            return Err(ColumnSpecError::Malformed { text: text.into() });
        }
        let v: f64 = s.parse().map_err(|_| ColumnSpecError::BadNumber {
            text: text.into(),
            part,
            value: s.into(),
        })?;
        if v.is_finite() && v > 0.0 {
            Ok(v)
        } else {
            Err(ColumnSpecError::NotPositive {
                text: text.into(),
                part,
                value: v,
            })
        }
    };
    Ok(ColumnSize {
        length_mm: number("length", parts[0])?,
        inner_diameter_mm: number("inner diameter", parts[1])?,
    })
}

impl FromStr for ColumnSize {
    type Err = ColumnSpecError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        parse_column(s)
    }
}

impl fmt::Display for ColumnSize {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} mm × {} mm", self.length_mm, self.inner_diameter_mm)
    }
}

fn column_arg(s: &str) -> Result<ColumnSize, String> {
    parse_column(s).map_err(|e| e.to_string())
}

/// A finite number greater than zero (clap names the option in its message).
fn positive_arg(s: &str) -> Result<f64, String> {
    match s.trim().parse::<f64>() {
        Ok(v) if v.is_finite() && v > 0.0 => Ok(v),
        Ok(_) => Err(format!("`{s}` must be a finite number greater than zero")),
        Err(_) => Err(format!("`{s}` is not a number")),
    }
}

/// A finite number of zero or more (clap names the option in its message).
fn non_negative_arg(s: &str) -> Result<f64, String> {
    match s.trim().parse::<f64>() {
        Ok(v) if v.is_finite() && v >= 0.0 => Ok(v),
        Ok(_) => Err(format!("`{s}` must be a finite number of zero or more")),
        Err(_) => Err(format!("`{s}` is not a number")),
    }
}

/// Checks a `MIN,MAX` option against the allowed interval, naming the option.
fn check_option_range(option: &str, r: NumberRange, lo: f64, hi: f64, what: &str) -> Result<()> {
    if r.min < lo || r.max > hi {
        bail!("{option} {},{}: {what} (allowed {lo}–{hi})", r.min, r.max);
    }
    Ok(())
}

/// Two peak names `A,B`.
fn pair_arg(s: &str) -> Result<[String; 2], String> {
    let mut it = s.splitn(2, ',').map(str::trim);
    match (it.next(), it.next()) {
        (Some(a), Some(b)) if !a.is_empty() && !b.is_empty() => Ok([a.into(), b.into()]),
        _ => Err(format!(
            "`{s}` is not a pair of peak names: write `first,second`"
        )),
    }
}

/// A closed range `MIN,MAX`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct NumberRange {
    min: f64,
    max: f64,
}

fn range_arg(s: &str) -> Result<NumberRange, String> {
    let parts: Vec<&str> = s.split(',').map(str::trim).collect();
    if parts.len() != 2 {
        return Err(format!(
            "`{s}` is not a range: write `MIN,MAX`, e.g. `5,60`"
        ));
    }
    let num = |p: &str| -> Result<f64, String> {
        p.parse::<f64>()
            .ok()
            .filter(|v| v.is_finite())
            .ok_or_else(|| format!("`{p}` in range `{s}` is not a finite number"))
    };
    let (min, max) = (num(parts[0])?, num(parts[1])?);
    if min > max {
        return Err(format!(
            "range `{s}`: the lower end {min} is above the upper end {max}"
        ));
    }
    Ok(NumberRange { min, max })
}

// ---------------------------------------------------------------------------------------------
// Shared helpers.

fn read_text(path: &Path) -> Result<String> {
    if path.as_os_str() == "-" {
        let mut s = String::new();
        std::io::stdin()
            .read_to_string(&mut s)
            .context("reading stdin")?;
        return Ok(s);
    }
    std::fs::read_to_string(path).with_context(|| format!("reading {}", path.display()))
}

fn read_peaks(path: &Path) -> Result<PeakTable> {
    let text = read_text(path)?;
    PeakTable::parse(&text).with_context(|| format!("peak table {}", path.display()))
}

fn write_out(s: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(s.as_bytes())?;
    out.flush()?;
    Ok(())
}

fn dead_time_input(
    t0: Option<f64>,
    column: Option<ColumnSize>,
    flow: Option<f64>,
) -> Result<DeadTimeInput> {
    match (t0, column, flow) {
        (Some(t), None, _) => Ok(DeadTimeInput::Given { dead_time_min: t }),
        (None, Some(c), Some(f)) => Ok(DeadTimeInput::FromColumn {
            column_length_mm: c.length_mm,
            inner_diameter_mm: c.inner_diameter_mm,
            flow_ml_min: f,
        }),
        (None, Some(_), None) => bail!("--column needs --flow (mL/min) to estimate t0"),
        (Some(_), Some(_), _) => bail!("give either --t0 or --column with --flow, not both"),
        (None, None, _) => {
            bail!("the dead time is needed: give --t0 MIN, or --column LxID with --flow ML_MIN")
        }
    }
}

/// Formats an optional number with `d` decimals; a dash when absent or not finite.
fn num(v: Option<f64>, d: usize) -> String {
    match v {
        Some(x) if x.is_finite() => format!("{x:.d$}"),
        _ => "–".into(),
    }
}

/// The snake_case label serde gives a unit enum variant.
fn label<T: Serialize>(t: &T) -> String {
    match serde_json::to_value(t) {
        Ok(serde_json::Value::String(s)) => s,
        Ok(v) => v.to_string(),
        Err(_) => "?".into(),
    }
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

fn csv_block(title: &str, header: &[&str], rows: &[Vec<String>]) -> String {
    let mut s = format!("# {title}\n");
    s.push_str(
        &header
            .iter()
            .map(|h| csv_field(h))
            .collect::<Vec<_>>()
            .join(","),
    );
    s.push('\n');
    for r in rows {
        s.push_str(&r.iter().map(|c| csv_field(c)).collect::<Vec<_>>().join(","));
        s.push('\n');
    }
    s
}

fn json_line<T: Serialize>(v: &T) -> Result<String> {
    Ok(format!("{}\n", serde_json::to_string_pretty(v)?))
}

// ---------------------------------------------------------------------------------------------
// suitability

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

/// JSON output of `suitability` (schema version 1: the library report plus the file name).
#[derive(Serialize)]
struct SuitabilityJson<'a> {
    schema_version: u32,
    peak_table: String,
    #[serde(flatten)]
    report: &'a SuitabilityReport,
}

/// Runs `phasewise suitability`.
pub fn run_suitability(a: &SuitabilityArgs) -> Result<ExitCode> {
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
    let report = evaluate(&req).map_err(|e| suitability_error(e, a))?;
    let text = match a.format {
        SuitabilityFormat::Json => json_line(&SuitabilityJson {
            schema_version: 1,
            peak_table: a.peaks.display().to_string(),
            report: &report,
        })?,
        SuitabilityFormat::Table => suitability_table(&report),
        SuitabilityFormat::Csv => suitability_csv(&report),
    };
    write_out(&text)?;
    Ok(if report.passed {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(EXIT_PARTIAL)
    })
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

fn suitability_rows(r: &SuitabilityReport) -> [Vec<Vec<String>>; 3] {
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
                label(&p.resolution_basis),
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
    let [peaks, pairs, checks] = suitability_rows(r);
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
    s.push_str("\nChecks:\n");
    s.push_str(&render(&CHECK_HEADER, &checks));
    let failed = r
        .checks
        .iter()
        .filter(|c| c.outcome == Outcome::Fail)
        .count();
    s.push_str(&format!(
        "\n\nResult: {} ({} checks, {} failed, {} not evaluated)\n",
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
    let [peaks, pairs, checks] = suitability_rows(r);
    let mut s = csv_block("peaks", &PEAK_HEADER, &peaks);
    s.push('\n');
    s.push_str(&csv_block("pairs", &PAIR_HEADER, &pairs));
    s.push('\n');
    s.push_str(&csv_block("checks", &CHECK_HEADER, &checks));
    s
}

// ---------------------------------------------------------------------------------------------
// scout

/// Output formats of `scout` and `transfer`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ReportFormat {
    /// Aligned tables.
    Table,
    /// JSON with `schema_version`.
    Json,
}

/// Which chromatography the scouting runs are.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ScoutMode {
    /// Reversed-phase LC: gradient runs, log k = log kw − S φ (φ the organic fraction).
    Rp,
    /// HILIC: gradient runs, log k = log kw − S ψ with ψ = 1 − %organic/100 (water is the
    /// strong solvent, so S is positive).
    Hilic,
    /// Gas chromatography: oven-program runs, ln k = A + B/T.
    Gc,
}

/// `scout` options.
#[derive(Debug, Args)]
pub struct ScoutArgs {
    /// Peak tables of the scouting runs (same sample and flow, different gradients or oven
    /// programs), 2 or more.
    #[arg(value_name = "RUN", num_args = 2.., required = true)]
    pub runs: Vec<PathBuf>,
    /// The runs: reversed-phase or HILIC gradients (LC), or GC oven programs.
    #[arg(long, value_enum, default_value_t = ScoutMode::Rp)]
    pub mode: ScoutMode,
    /// LC: gradient programs, one per run in the same order, separated by `;`:
    /// `0:5,10:95;0:5,30:95` (time min : % organic).
    #[arg(long, value_name = "PROGRAMS")]
    pub gradients: Option<String>,
    /// GC: oven programs, one per run in the same order, separated by `;`, each
    /// `INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN` (as `predict --oven`), e.g.
    /// `40:1,5:300:5;40:1,15:300:5`.
    #[arg(long, value_name = "PROGRAMS")]
    pub ovens: Option<String>,
    /// Dead time t0 (GC: hold-up time t_M, e.g. from an unretained methane peak), min.
    #[arg(long, value_name = "MIN", conflicts_with = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub t0: Option<f64>,
    /// LC: column as LENGTHxID in mm (e.g. `150x4.6`), t0 estimated with Vm ≈ 0.5·L·dc² (needs
    /// --flow). GC: `LENGTH_MxID_MMxFILM_UM` (e.g. `30x0.25x0.25`), t_M = L/u with --velocity.
    #[arg(long, value_name = "COLUMN")]
    pub column: Option<String>,
    /// GC: average carrier linear velocity, cm/s, for t_M from --column (default 35, as
    /// `predict --mode gc` assumes).
    #[arg(long, value_name = "CM_S", requires = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub velocity: Option<f64>,
    /// Flow rate, mL/min (needed with --column, and with --t0 when --dwell is not zero).
    #[arg(long, value_name = "ML_MIN", value_parser = positive_arg, allow_negative_numbers = true)]
    pub flow: Option<f64>,
    /// Dwell (gradient delay) volume, mL.
    #[arg(long, value_name = "ML", default_value_t = 0.0, value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub dwell: f64,
    /// LC: allowed gradient time, `MIN,MAX` in min [default: 5,60].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub tg_range: Option<NumberRange>,
    /// LC: allowed initial composition, `MIN,MAX` in % organic [default: 5,40; HILIC 80,97].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub start_range: Option<NumberRange>,
    /// LC: allowed final composition, `MIN,MAX` in % organic [default: 60,95; HILIC 50,70].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub end_range: Option<NumberRange>,
    /// LC: column temperature of each run, °C, in run order, separated by `;` (e.g.
    /// `30;30;50;50` for two gradients at each of two temperatures): log kw and S are fitted
    /// per temperature, taken linear in 1/T, and the temperature is searched with the gradient.
    #[arg(long, value_name = "TEMPS")]
    pub temperatures: Option<String>,
    /// LC with --temperatures: allowed column temperature, `MIN,MAX` in °C [default: the
    /// scouted temperatures' range]; searched in 5 °C steps.
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true, requires = "temperatures")]
    pub temperature_range: Option<NumberRange>,
    /// GC: allowed initial oven temperature, `MIN,MAX` in °C [default: 40,150, capped at the
    /// maximum temperature].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub initial_range: Option<NumberRange>,
    /// GC: allowed ramp rate, `MIN,MAX` in °C/min [default: 2,30].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub ramp_range: Option<NumberRange>,
    /// GC: initial hold of the optimised program, min [default: 1].
    #[arg(long, value_name = "MIN", value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub initial_hold: Option<f64>,
    /// GC: highest oven temperature allowed, °C (default: the limit of --phase; one of the two
    /// is needed in GC mode, and the lower wins when both are given).
    #[arg(long, value_name = "C", allow_negative_numbers = true)]
    pub max_temperature: Option<f64>,
    /// Latest allowed elution of the last peak, min.
    #[arg(long, value_name = "MIN", default_value_t = 60.0, value_parser = positive_arg, allow_negative_numbers = true)]
    pub max_run_time: f64,
    /// Optimise only this pair's resolution, `first,second`; repeatable.
    #[arg(long, value_name = "A,B", value_parser = pair_arg)]
    pub critical: Vec<[String; 2]>,
    /// Plate number for predicted widths (LC default: from --particle and the column length,
    /// else 10 000 assumed; GC default: the median apparent plate number of the runs' own peak
    /// widths).
    #[arg(long, value_name = "N", conflicts_with = "particle", value_parser = positive_arg, allow_negative_numbers = true)]
    pub plates: Option<f64>,
    /// Particle size, µm: estimate N = L/(2.5·dp) from it and the --column length.
    #[arg(long, value_name = "UM", requires = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub particle: Option<f64>,
    /// Resolution target: the shortest run whose smallest Rs reaches it is chosen (if none
    /// does, the largest smallest Rs); drawn in the window diagram.
    #[arg(long, value_name = "RS", default_value_t = 1.5, value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub target_resolution: f64,
    /// Smallest acceptable retention factor k = (tR − t0)/t0 of the first peak.
    #[arg(long, value_name = "K", default_value_t = 1.0, value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub min_k: f64,
    /// Also try a two-segment gradient.
    #[arg(long)]
    pub two_segment: bool,
    /// Write the window diagram (smallest Rs versus gradient time) as SVG.
    #[arg(long, value_name = "FILE")]
    pub window_svg: Option<PathBuf>,
    /// Write the window diagram data as TSV.
    #[arg(long, value_name = "FILE")]
    pub window_data: Option<PathBuf>,
    /// Write the predicted chromatogram at the chosen conditions as SVG.
    #[arg(long, value_name = "FILE")]
    pub chromatogram_svg: Option<PathBuf>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = ReportFormat::Table)]
    pub format: ReportFormat,
    /// Store the fitted log kw and S of every well-determined analyte in the user knowledge
    /// base, so that later `advise` and `predict` use them. Needs --phase, --modifier, --ph
    /// and --source; every analyte name must resolve in the knowledge base.
    #[arg(long)]
    pub store: bool,
    /// Stationary-phase id of the runs: an RP or HILIC phase of the catalogue, for --store; in
    /// GC mode a GC phase, whose maximum temperature limits the programs.
    #[arg(long, value_name = "ID")]
    pub phase: Option<String>,
    /// Organic modifier of the runs: acetonitrile or methanol, for --store.
    #[arg(long, value_name = "NAME", requires = "store")]
    pub modifier: Option<String>,
    /// Aqueous pH of the runs (inside the phase's range), for --store.
    #[arg(
        long,
        value_name = "PH",
        requires = "store",
        allow_negative_numbers = true
    )]
    pub ph: Option<f64>,
    /// Column temperature of the runs, °C, for --store.
    #[arg(
        long,
        value_name = "C",
        requires = "store",
        allow_negative_numbers = true
    )]
    pub temperature: Option<f64>,
    /// Where the runs are recorded (e.g. "lab notebook 12 p. 4"); required with --store.
    #[arg(long, value_name = "TEXT", requires = "store")]
    pub source: Option<String>,
    /// Buffer or additive of the aqueous phase of the runs, for --store (e.g. `0.1 % formic
    /// acid`, `10 mM ammonium acetate`, or a buffer id such as `ammonium-formate-1`); a later
    /// prediction with another additive does not use the fit directly.
    #[arg(long, value_name = "TEXT", requires = "store")]
    pub buffer: Option<String>,
}

/// The system description `scout --store` records with the fits, checked before any work.
struct StoreTarget {
    phase_id: String,
    mode: &'static str,
    chem_class: String,
    modifier: String,
    ph: f64,
    temperature_c: Option<f64>,
    source: String,
    buffer: Option<String>,
}

fn store_target(a: &ScoutArgs) -> Result<Option<StoreTarget>> {
    use phasewise::phase::{Catalogue, PhaseMode};
    if !a.store {
        return Ok(None);
    }
    let missing: Vec<&str> = [
        ("--phase", a.phase.is_none()),
        ("--modifier", a.modifier.is_none()),
        ("--ph", a.ph.is_none()),
        (
            "--source",
            a.source.as_deref().is_none_or(|s| s.trim().is_empty()),
        ),
    ]
    .iter()
    .filter(|(_, m)| *m)
    .map(|(n, _)| *n)
    .collect();
    if !missing.is_empty() {
        bail!(
            "--store needs the system the runs were made on: give {} (nothing stored)",
            missing.join(", ")
        );
    }
    let (Some(phase_id), Some(modifier), Some(ph), Some(source)) =
        (&a.phase, &a.modifier, a.ph, &a.source)
    else {
        bail!("--store needs --phase, --modifier, --ph and --source (nothing stored)");
    };
    let catalogue = Catalogue::builtin()?;
    let phase = catalogue
        .phase(phase_id)
        .with_context(|| format!("--phase `{phase_id}` (nothing stored)"))?;
    let mode = match (phase.mode(), a.mode) {
        (PhaseMode::Rp, ScoutMode::Rp) => "rp",
        (PhaseMode::Hilic, ScoutMode::Hilic) => "hilic",
        (PhaseMode::Hilic, _) => bail!(
            "--phase `{phase_id}` is a HILIC phase: add --mode hilic, so that log kw and S are fitted in the water fraction (nothing stored)"
        ),
        (PhaseMode::Rp, _) => bail!(
            "--phase `{phase_id}` is a reversed phase, but --mode hilic was given: leave --mode out or give a HILIC phase (nothing stored)"
        ),
        (other, _) => bail!(
            "--phase `{phase_id}` is a {} phase; scouting fits are stored for RP or HILIC phases only (nothing stored)",
            other.as_str()
        ),
    };
    if modifier != "acetonitrile" && modifier != "methanol" {
        bail!("--modifier `{modifier}`: use acetonitrile or methanol (nothing stored)");
    }
    let (lo, hi) = (
        phase.ph_min().unwrap_or(0.0),
        phase.ph_max().unwrap_or(14.0),
    );
    if !(ph.is_finite() && (lo..=hi).contains(&ph)) {
        bail!("--ph {ph} is outside the range {lo}-{hi} of phase `{phase_id}` (nothing stored)");
    }
    if let Some(t) = a.temperature
        && !(t.is_finite() && (-10.0..=phase.t_max_c()).contains(&t))
    {
        bail!(
            "--temperature {t} °C is outside -10 to {} °C, the limit of phase `{phase_id}` (nothing stored)",
            phase.t_max_c()
        );
    }
    Ok(Some(StoreTarget {
        phase_id: phase_id.clone(),
        mode,
        chem_class: phasewise::advisor::lc::model_class(phase)
            .name()
            .to_string(),
        modifier: modifier.clone(),
        ph,
        temperature_c: a.temperature,
        source: source.trim().to_string(),
        buffer: match a.buffer.as_deref().map(str::trim) {
            Some("") => bail!(
                "--buffer is empty: name the buffer or additive, or leave it out (nothing stored)"
            ),
            b => b.map(str::to_string),
        },
    }))
}

/// Store the well-determined fits; every analyte must resolve first, else nothing is stored.
/// Returns the fits left out (poorly determined) with their reasons.
fn store_fits(
    cli: &crate::cli::Cli,
    a: &ScoutArgs,
    target: &StoreTarget,
    fitted: &ScoutFit,
    programs: &[String],
) -> Result<Vec<(String, String)>> {
    use phasewise::kb::resolve::Resolution;
    let mut kb = crate::commands::open_kb(cli)?;
    let mut keys = Vec::new();
    let mut problems = Vec::new();
    for f in &fitted.analytes {
        match kb.resolve(&f.name)? {
            Resolution::Found(an) => match &an.inchikey {
                Some(k) => keys.push(k.clone()),
                None => problems.push(format!(
                    "`{}` resolves to `{}`, which has no InChIKey (add one with `phasewise kb add --name '{}' --inchikey KEY --source ...`)",
                    f.name, an.name, an.name
                )),
            },
            Resolution::StructureOnly { .. } => problems.push(format!(
                "`{}` is a structure, not a compound of the knowledge base (add it with `phasewise kb add`)",
                f.name
            )),
            Resolution::Unresolved(u) => problems.push(format!(
                "`{}`: {}{}",
                f.name,
                u.reason,
                if u.suggestions.is_empty() {
                    String::new()
                } else {
                    format!(
                        " (did you mean {}?)",
                        u.suggestions
                            .iter()
                            .map(|s| format!("`{}`", s.name))
                            .collect::<Vec<_>>()
                            .join(", ")
                    )
                }
            )),
        }
    }
    if !problems.is_empty() {
        bail!(
            "--store: every analyte must resolve in the knowledge base, nothing stored: {}",
            problems.join("; ")
        );
    }
    let mut rows = Vec::new();
    let mut left_out = Vec::new();
    for (f, key) in fitted.analytes.iter().zip(keys) {
        if !f.flags.is_empty() {
            left_out.push((
                f.name.clone(),
                f.flags.iter().map(flag_text).collect::<Vec<_>>().join(", "),
            ));
            continue;
        }
        rows.push(phasewise::kb::retention::RetentionFitRecord {
            analyte: f.name.clone(),
            inchikey: key,
            phase_id: target.phase_id.clone(),
            mode: target.mode.to_string(),
            chem_class: target.chem_class.clone(),
            modifier: target.modifier.clone(),
            ph: target.ph,
            temperature_c: target.temperature_c,
            log_kw: f.log_kw,
            s: f.s,
            log_kw_uncertainty: f.log_kw_uncertainty,
            s_uncertainty: f.s_uncertainty,
            correlation: f.correlation,
            rms_residual_min: f.rms_residual_min,
            gradients: programs.to_vec(),
            basis: match fitted.basis {
                CompositionBasis::Organic => "organic",
                CompositionBasis::Water => "water",
            }
            .into(),
            buffer: target.buffer.clone(),
            t0_min: fitted.dead_time_min,
            dwell_min: fitted.dwell_time_min,
            flow_ml_min: a.flow,
            source: target.source.clone(),
            stored_on: String::new(),
        });
    }
    let n = if rows.is_empty() {
        0
    } else {
        kb.store_retention_fits(&rows)?
    };
    eprintln!(
        "stored {n} retention fit{} in {} (phase {}, {}, pH {}{}{}; {}; source: {})",
        if n == 1 { "" } else { "s" },
        kb.user_path().display(),
        target.phase_id,
        target.modifier,
        target.ph,
        target
            .temperature_c
            .map_or_else(String::new, |t| format!(", {t} °C")),
        target
            .buffer
            .as_deref()
            .map_or_else(|| ", buffer not given".to_string(), |b| format!(", {b}")),
        if fitted.basis == CompositionBasis::Water {
            "log kw and S in the water fraction"
        } else {
            "log kw and S in the organic fraction"
        },
        target.source
    );
    for (name, why) in &left_out {
        eprintln!("not stored: {name}: poorly determined fit ({why})");
    }
    Ok(left_out)
}

/// Schema version of the `scout` JSON output (2: the optimiser's selection rule, first-peak
/// retention and rounded programs; `rounded` removed).
const SCOUT_SCHEMA_VERSION: u32 = 2;

/// JSON output of `scout` (schema version [`SCOUT_SCHEMA_VERSION`]).
#[derive(Serialize)]
struct ScoutJson<'a> {
    schema_version: u32,
    /// Where the plate number for widths came from.
    plates_source: String,
    fit: &'a ScoutFit,
    optimisation: &'a OptimiseReport,
    /// The temperature model and search with `--temperatures`; null without.
    temperature: Option<&'a TemperatureJson>,
}

/// Splits a `;`-separated list with one item per run file, parsing each item; messages name
/// the option, the item's place and text.
fn per_run<T>(
    spec: &str,
    runs: usize,
    option: &str,
    what: &str,
    parse: impl Fn(&str) -> Result<T>,
) -> Result<Vec<T>> {
    let parts: Vec<&str> = spec.split(';').map(str::trim).collect();
    if parts.len() != runs {
        bail!(
            "{option} gives {} {what}(s) (`{spec}`) for {runs} run files; give one per run, separated by `;`",
            parts.len()
        );
    }
    parts
        .iter()
        .enumerate()
        .map(|(i, p)| parse(p).with_context(|| format!("{what} {} `{p}` in {option}", i + 1)))
        .collect()
}

fn split_programs(spec: &str, runs: usize) -> Result<Vec<GradientProgram>> {
    per_run(spec, runs, "--gradients", "gradient program", |p| {
        Ok(GradientProgram::parse(p)?)
    })
}

/// Runs `phasewise scout`.
pub fn run_scout(cli: &crate::cli::Cli, a: &ScoutArgs) -> Result<ExitCode> {
    if a.mode == ScoutMode::Gc {
        return run_scout_gc(a);
    }
    refuse_options(
        "a GC option; in LC mode give --gradients (or add --mode gc)",
        &[
            ("--ovens", a.ovens.is_some()),
            ("--velocity", a.velocity.is_some()),
            ("--initial-range", a.initial_range.is_some()),
            ("--ramp-range", a.ramp_range.is_some()),
            ("--initial-hold", a.initial_hold.is_some()),
            ("--max-temperature", a.max_temperature.is_some()),
        ],
    )?;
    if !a.store
        && let Some((option, _)) = [
            ("--phase", a.phase.is_some()),
            ("--modifier", a.modifier.is_some()),
            ("--ph", a.ph.is_some()),
            ("--temperature", a.temperature.is_some()),
            ("--source", a.source.is_some()),
        ]
        .iter()
        .find(|(_, given)| *given)
    {
        bail!("{option} describes the runs for --store; give --store too (or leave {option} out)");
    }
    let Some(gradients) = a.gradients.as_deref() else {
        bail!(
            "--gradients is needed in LC mode: one `time:%organic` program per run, separated by `;` (for GC runs add --mode gc and --ovens)"
        );
    };
    let hilic = a.mode == ScoutMode::Hilic;
    let basis = if hilic {
        CompositionBasis::Water
    } else {
        CompositionBasis::Organic
    };
    // HILIC defaults (common practice, no source): start with 3–20 % water, end at 30–50 %.
    let (start_default, end_default) = if hilic {
        ((80.0, 97.0), (50.0, 70.0))
    } else {
        ((5.0, 40.0), (60.0, 95.0))
    };
    let ranges = LcRanges {
        tg: a.tg_range.unwrap_or(NumberRange {
            min: 5.0,
            max: 60.0,
        }),
        start: a.start_range.unwrap_or(NumberRange {
            min: start_default.0,
            max: start_default.1,
        }),
        end: a.end_range.unwrap_or(NumberRange {
            min: end_default.0,
            max: end_default.1,
        }),
    };
    check_scout_options(a, &ranges, hilic)?;
    // The optimiser searches the strong-solvent composition: % water in HILIC.
    let strong = |r: NumberRange| {
        if hilic {
            NumberRange {
                min: 100.0 - r.max,
                max: 100.0 - r.min,
            }
        } else {
            r
        }
    };
    let search = LcRanges {
        tg: ranges.tg,
        start: strong(ranges.start),
        end: strong(ranges.end),
    };
    let column = a
        .column
        .as_deref()
        .map(parse_column)
        .transpose()
        .map_err(|e| anyhow::anyhow!("--column: {e}"))?;
    let dead_time = dead_time_input(a.t0, column, a.flow)?;
    let programs = split_programs(gradients, a.runs.len())?;
    let program_specs: Vec<String> = programs.iter().map(GradientProgram::to_spec).collect();
    let store = store_target(a)?;
    for out in a
        .window_svg
        .iter()
        .chain(a.window_data.iter())
        .chain(a.chromatogram_svg.iter())
    {
        check_writable(out)?;
    }
    let (plates, plates_source) = match (a.plates, a.particle, column) {
        (Some(n), _, _) => (PlateSource::Given { plates: n }, format!("given: {n}")),
        (None, Some(dp), Some(c)) => (
            PlateSource::Estimated {
                column_length_mm: c.length_mm,
                particle_size_um: dp,
            },
            format!(
                "estimated N = L/(2.5·dp) for L = {} mm, dp = {dp} µm",
                c.length_mm
            ),
        ),
        _ => (
            PlateSource::Given {
                plates: DEFAULT_PLATES,
            },
            format!(
                "assumed {DEFAULT_PLATES} (common practice, no source); give --plates or --particle"
            ),
        ),
    };
    let mut runs = Vec::new();
    for (path, program) in a.runs.iter().zip(programs) {
        runs.push(ScoutRun {
            name: path.file_name().map_or_else(
                || path.display().to_string(),
                |n| n.to_string_lossy().into(),
            ),
            program,
            peaks: read_peaks(path)?,
        });
    }
    let run_temperatures = match a.temperatures.as_deref() {
        Some(text) => {
            if a.store {
                bail!(
                    "--temperatures with --store: store the fits of one temperature at a time (one `scout --store --temperature T` per temperature)"
                );
            }
            Some(parse_temperatures(text, runs.len())?)
        }
        None => None,
    };
    let fit_runs = |runs: Vec<ScoutRun>| {
        fit_in(
            &ScoutRequest {
                runs,
                dead_time,
                dwell_volume_ml: a.dwell,
                flow_ml_min: a.flow,
            },
            basis,
        )
        .map_err(|e| scout_error(e, a))
    };
    let mut temperature_fits: Vec<(f64, ScoutFit)> = Vec::new();
    let fitted = match &run_temperatures {
        None => fit_runs(runs)?,
        Some(ts) => {
            let mut distinct: Vec<f64> = ts.clone();
            distinct.sort_by(f64::total_cmp);
            distinct.dedup();
            for t in &distinct {
                let group: Vec<ScoutRun> = runs
                    .iter()
                    .zip(ts)
                    .filter(|(_, u)| *u == t)
                    .map(|(r, _)| r.clone())
                    .collect();
                let f = fit_runs(group)
                    .with_context(|| format!("the runs at {t} °C (--temperatures)"))?;
                temperature_fits.push((*t, f));
            }
            match temperature_fits.first() {
                Some((_, f)) => f.clone(),
                None => bail!("--temperatures gives no temperature"),
            }
        }
    };
    let req = OptimiseRequest {
        analytes: OptimiseRequest::analytes_from_fit(&fitted),
        dead_time_min: fitted.dead_time_min,
        dwell_time_min: fitted.dwell_time_min,
        plates,
        gradient_time_min: Range {
            min: ranges.tg.min,
            max: ranges.tg.max,
        },
        initial_pct: Range {
            min: search.start.min,
            max: search.start.max,
        },
        final_pct: Range {
            min: search.end.min,
            max: search.end.max,
        },
        max_run_time_min: a.max_run_time,
        critical_pairs: a.critical.clone(),
        two_segment: a.two_segment,
        target_resolution: a.target_resolution,
        min_retention_factor: a.min_k,
        gradient_time_steps: 25,
        composition_step_pct: 5.0,
    };
    let optimise_error = |e: OptimiseError| optimise_error(e, a, &ranges);
    let (mut report, temperature) = if temperature_fits.is_empty() {
        (optimise(&req).map_err(optimise_error)?, None)
    } else {
        let model = temperature_model(&temperature_fits)
            .map_err(|e| anyhow::anyhow!("--temperatures: {e}"))?;
        let range = a.temperature_range.map_or_else(
            || Range {
                min: model.temperatures_c.first().copied().unwrap_or(0.0),
                max: model.temperatures_c.last().copied().unwrap_or(0.0),
            },
            |r| Range {
                min: r.min,
                max: r.max,
            },
        );
        let found = optimise_temperature(&model, &req, range, 5.0).map_err(|e| match e {
            TemperatureError::Optimise(o) => optimise_error(o),
            TemperatureError::BadTemperature { .. } => anyhow::anyhow!("--temperature-range: {e}"),
            other => anyhow::anyhow!("--temperatures: {other}"),
        })?;
        let mut points = found.points.clone();
        if hilic {
            for p in &mut points {
                if let Ok(g) = GradientProgram::parse(&p.program) {
                    p.program = program_text(&g.complement());
                }
            }
        }
        let json = TemperatureJson {
            chosen_c: found.temperature_c,
            extrapolated: found.extrapolated,
            model,
            points,
            fits: temperature_fits
                .iter()
                .map(|(t, f)| TemperatureFitJson {
                    temperature_c: *t,
                    fit: f.clone(),
                })
                .collect(),
        };
        (found.report, Some(json))
    };
    if hilic {
        // Back from % water to % organic, as the programs are typed.
        report.complement();
    }
    let text = match a.format {
        ReportFormat::Json => json_line(&ScoutJson {
            schema_version: SCOUT_SCHEMA_VERSION,
            plates_source: plates_source.clone(),
            fit: &fitted,
            optimisation: &report,
            temperature: temperature.as_ref(),
        })?,
        ReportFormat::Table => {
            let mut t = String::new();
            if let Some(tj) = &temperature {
                for f in &tj.fits {
                    t.push_str(&format!("At {} °C:\n", f.temperature_c));
                    t.push_str(&scout_fit_table(&f.fit));
                    t.push_str("\n\n");
                }
                t.push_str(&temperature_table(tj));
                t.push('\n');
                t.push_str(&scout_optimum_table(&report, &plates_source));
            } else {
                t = scout_table(&fitted, &report, &plates_source);
            }
            t
        }
    };
    let left_out = match &store {
        Some(t) => store_fits(cli, a, t, &fitted, &program_specs)?,
        None => Vec::new(),
    };
    if let Some(p) = &a.window_svg {
        write_atomically(p, render_window_svg(&report.window))?;
    }
    if let Some(p) = &a.window_data {
        write_atomically(p, window_tsv(&report))?;
    }
    if let Some(p) = &a.chromatogram_svg {
        let svg = render_optimum_svg(
            &report.optimum,
            fitted.dead_time_min,
            a.target_resolution,
            "Predicted chromatogram at the chosen gradient",
        );
        write_atomically(p, svg)?;
    }
    write_out(&text)?;
    Ok(if left_out.is_empty() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(EXIT_PARTIAL)
    })
}

/// A scouting-fit error with the option (or the file) the user can change named first.
fn scout_error(e: ScoutError, a: &ScoutArgs) -> anyhow::Error {
    match e {
        ScoutError::PeakBeforeDeadTime { .. } => anyhow::anyhow!(
            "{e} (t0 from {})",
            if a.t0.is_some() {
                "--t0"
            } else {
                "--column and --flow"
            }
        ),
        ScoutError::InconsistentFlow { .. } | ScoutError::FlowNeeded { .. } => {
            anyhow::anyhow!("--flow, --dwell: {e}")
        }
        other => anyhow::Error::new(other).context("fitting log kw and S to the scouting runs"),
    }
}

/// An optimiser error naming the options that widen the search rather than library fields.
fn optimise_error(e: OptimiseError, a: &ScoutArgs, r: &LcRanges) -> anyhow::Error {
    match e {
        // Name the options that widen the search rather than the library's fields.
        OptimiseError::NoFeasibleCondition { .. } => anyhow::anyhow!(
            "no gradient within --tg-range {},{}, --start-range {},{} and --end-range {},{} \
             elutes every analyte within --max-run-time {} min; raise --max-run-time, the top \
             of --end-range, or lower the top of --tg-range",
            r.tg.min,
            r.tg.max,
            r.start.min,
            r.start.max,
            r.end.min,
            r.end.max,
            a.max_run_time
        ),
        OptimiseError::UnknownAnalyte { .. } | OptimiseError::CriticalPairSameAnalyte { .. } => {
            anyhow::anyhow!("--critical: {e}")
        }
        OptimiseError::TooFewAnalytes { .. } => anyhow::anyhow!(
            "{e}: the peak tables {} name fewer than two peaks",
            a.runs
                .iter()
                .map(|p| p.display().to_string())
                .collect::<Vec<_>>()
                .join(", ")
        ),
        other => anyhow::Error::new(other).context("optimising the gradient"),
    }
}

/// `--temperatures`: one column temperature (°C) per run, separated by `;`.
fn parse_temperatures(text: &str, runs: usize) -> Result<Vec<f64>> {
    per_run(text, runs, "--temperatures", "temperature", |p| {
        match p.parse::<f64>() {
            Ok(v) if v.is_finite() && (-10.0..=200.0).contains(&v) => Ok(v),
            Ok(v) => bail!("{v} °C must lie between -10 and 200 °C"),
            Err(_) => bail!("`{p}` is not a temperature in °C"),
        }
    })
}

/// The fits at one temperature of `--temperatures`.
#[derive(Serialize)]
struct TemperatureFitJson {
    temperature_c: f64,
    fit: ScoutFit,
}

/// `temperature` in the `scout` JSON when `--temperatures` is given.
#[derive(Serialize)]
struct TemperatureJson {
    /// Chosen column temperature, °C.
    chosen_c: f64,
    /// Outside the scouted temperatures.
    extrapolated: bool,
    /// log kw and S as lines in 1/T.
    model: TemperatureModel,
    /// The best gradient at every temperature searched.
    points: Vec<TemperaturePoint>,
    /// The fit at each scouted temperature.
    fits: Vec<TemperatureFitJson>,
}

fn temperature_table(t: &TemperatureJson) -> String {
    let rows: Vec<Vec<String>> = t
        .model
        .analytes
        .iter()
        .map(|a| {
            let (lk, s) = a.at(t.chosen_c);
            vec![
                a.name.clone(),
                num(Some(a.log_kw_intercept), 3),
                num(Some(a.log_kw_slope_k), 0),
                num(Some(a.s_intercept), 3),
                num(Some(a.s_slope_k), 0),
                num(Some(lk), 3),
                num(Some(s), 3),
                if a.from_flagged_fit {
                    "from a flagged fit".into()
                } else {
                    String::new()
                },
            ]
        })
        .collect();
    let mut s = format!(
        "log kw = a + b/T and S = c + d/T (T in K) through the fits at {}:\n",
        t.model
            .temperatures_c
            .iter()
            .map(|x| format!("{x} °C"))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let at_lk = format!("log kw at {} °C", t.chosen_c);
    let at_s = format!("S at {} °C", t.chosen_c);
    s.push_str(&render(
        &[
            "analyte", "a (–)", "b (K)", "c (–)", "d (K)", &at_lk, &at_s, "",
        ],
        &rows,
    ));
    let pts: Vec<Vec<String>> = t
        .points
        .iter()
        .map(|p| {
            vec![
                num(Some(p.temperature_c), 1),
                p.program.clone(),
                num(Some(p.min_resolution), 2),
                num(Some(p.run_time_min), 2),
                if p.meets_target { "met" } else { "not met" }.into(),
                if (p.temperature_c - t.chosen_c).abs() < 1e-9 {
                    "chosen".into()
                } else {
                    String::new()
                },
            ]
        })
        .collect();
    s.push_str("\n\nBest gradient at each temperature:\n");
    s.push_str(&render(
        &[
            "temperature (°C)",
            "program (time min : % organic)",
            "smallest Rs (–)",
            "last peak (min)",
            "target",
            "",
        ],
        &pts,
    ));
    s.push('\n');
    if t.extrapolated {
        s.push_str("note: the chosen temperature is outside the scouted ones (extrapolation)\n");
    }
    s
}

/// The LC search ranges, defaults applied.
struct LcRanges {
    tg: NumberRange,
    start: NumberRange,
    end: NumberRange,
}

/// Refuses options of the other mode rather than ignoring them, naming the first one given.
fn refuse_options(why: &str, options: &[(&str, bool)]) -> Result<()> {
    if let Some((name, _)) = options.iter().find(|(_, given)| *given) {
        bail!("{name} is {why}");
    }
    Ok(())
}

/// Option checks that the library would otherwise report with its own field names.
fn check_scout_options(a: &ScoutArgs, r: &LcRanges, hilic: bool) -> Result<()> {
    if a.dwell > 0.0 && a.flow.is_none() {
        bail!(
            "--dwell {} mL needs --flow ML_MIN to be turned into a dwell time",
            a.dwell
        );
    }
    check_option_range(
        "--tg-range",
        r.tg,
        f64::MIN_POSITIVE,
        f64::MAX,
        "gradient times must be greater than zero",
    )?;
    let pct = "compositions are % organic";
    check_option_range("--start-range", r.start, 0.0, 100.0, pct)?;
    check_option_range("--end-range", r.end, 0.0, 100.0, pct)?;
    if hilic && r.end.min >= r.start.max {
        bail!(
            "--end-range {},{} never falls below --start-range {},{}: in HILIC the final % organic must be able to fall below the initial",
            r.end.min,
            r.end.max,
            r.start.min,
            r.start.max
        );
    }
    if !hilic && r.end.max <= r.start.min {
        bail!(
            "--end-range {},{} never exceeds --start-range {},{}: the final % organic must be able to exceed the initial",
            r.end.min,
            r.end.max,
            r.start.min,
            r.start.max
        );
    }
    for (option, range) in [
        ("--tg-range", r.tg),
        ("--start-range", r.start),
        ("--end-range", r.end),
    ] {
        if (range.max * 10.0 + 1e-9).floor() < (range.min * 10.0 - 1e-9).ceil() {
            bail!(
                "{option} {},{} holds no value on the 0.1 grid in which programs are written; widen it",
                range.min,
                range.max
            );
        }
    }
    Ok(())
}

fn flag_text(f: &FitFlag) -> String {
    match f {
        FitFlag::SOutsideRange { s } => format!("S {s:.2} outside 1–60"),
        FitFlag::ElutedBeforeGradient { run } => format!("eluted before the gradient in {run}"),
        FitFlag::ElutedAfterGradient { run } => format!("eluted after the gradient in {run}"),
        FitFlag::LargeResidual { rms_min } => format!("large residual {rms_min:.3} min"),
        FitFlag::IllConditioned {
            s_relative_uncertainty,
        } => format!(
            "ill-conditioned (σS/S = {:.0} %)",
            100.0 * s_relative_uncertainty
        ),
        FitFlag::NotConverged => "not converged".into(),
    }
}

fn prediction_table(p: &Prediction) -> String {
    let peaks: Vec<Vec<String>> = p
        .peaks
        .iter()
        .map(|k| {
            vec![
                k.name.clone(),
                num(Some(k.retention_time_min), 2),
                num(k.retention_time_uncertainty_min, 2),
                num(Some(k.width_base_min), 3),
                num(Some(k.organic_at_elution_pct), 1),
                label(&k.phase).replace('_', " "),
            ]
        })
        .collect();
    let pairs: Vec<Vec<String>> = p
        .pairs
        .iter()
        .map(|q| {
            let critical = q.first == p.critical_pair[0] && q.second == p.critical_pair[1];
            vec![
                q.first.clone(),
                q.second.clone(),
                num(Some(q.resolution), 2),
                if critical {
                    "critical".into()
                } else {
                    String::new()
                },
            ]
        })
        .collect();
    let mut s = format!(
        "program {} (time min : % organic); last peak at {:.2} min; smallest Rs {:.2} ({} / {}); first peak k = {:.2}\n",
        program_text(&p.program),
        p.run_time_min,
        p.min_resolution,
        p.critical_pair[0],
        p.critical_pair[1],
        p.first_peak_retention_factor
    );
    s.push_str(&render(
        &[
            "analyte",
            "predicted tR (min)",
            "±1σ tR (min)",
            "base width (min)",
            "organic at elution (%)",
            "elutes",
        ],
        &peaks,
    ));
    s.push('\n');
    s.push_str(&render(
        &["first", "second", "predicted Rs (–)", ""],
        &pairs,
    ));
    s.push('\n');
    s
}

/// A program as `time:%organic` points, times and compositions to 0.1 (the optimiser's
/// programs are on that grid already; this only keeps binary fractions out of the text).
fn program_text(p: &GradientProgram) -> String {
    p.points()
        .iter()
        .map(|q| format!("{}:{}", fmt_tenth(q.time_min), fmt_tenth(q.organic_pct)))
        .collect::<Vec<_>>()
        .join(",")
}

/// A number to 0.1 without a trailing `.0`, and never `-0`.
fn fmt_tenth(v: f64) -> String {
    let r = (v * 10.0).round() / 10.0;
    let r = if r == 0.0 { 0.0 } else { r };
    let t = format!("{r:.1}");
    t.strip_suffix(".0").map_or(t.clone(), str::to_string)
}

fn scout_table(f: &ScoutFit, r: &OptimiseReport, plates_source: &str) -> String {
    let mut s = scout_fit_table(f);
    s.push_str("\n\n");
    s.push_str(&scout_optimum_table(r, plates_source));
    s
}

/// The fit part of the `scout` table (no trailing newline).
fn scout_fit_table(f: &ScoutFit) -> String {
    let rows: Vec<Vec<String>> = f
        .analytes
        .iter()
        .map(|a| {
            vec![
                a.name.clone(),
                num(Some(a.log_kw), 3),
                num(Some(a.log_kw_uncertainty), 3),
                num(Some(a.s), 3),
                num(Some(a.s_uncertainty), 3),
                num(Some(a.rms_residual_min), 4),
                a.flags.iter().map(flag_text).collect::<Vec<_>>().join("; "),
            ]
        })
        .collect();
    let mut s = format!(
        "Scouting fit over {} runs ({}); t0 = {:.3} min, dwell time = {:.3} min\n",
        f.runs.len(),
        f.runs.join(", "),
        f.dead_time_min,
        f.dwell_time_min
    );
    if f.basis == CompositionBasis::Water {
        s.push_str(
            "HILIC: log k = log kw − S ψ with ψ = 1 − %organic/100, the water (strong-solvent) fraction\n",
        );
    }
    s.push_str(&render(
        &[
            "analyte",
            "log kw (–)",
            "±1σ log kw (–)",
            "S (–)",
            "±1σ S (–)",
            "RMS residual (min)",
            "flags",
        ],
        &rows,
    ));
    s
}

/// The optimum part of the `scout` table.
fn scout_optimum_table(r: &OptimiseReport, plates_source: &str) -> String {
    let mut s = String::new();
    s.push_str(&format!(
        "Optimum: initial {:.1} %, final {:.1} % organic over {:.1} min; plate number {:.0} ({plates_source}); {} conditions evaluated\n",
        r.initial_pct, r.final_pct, r.gradient_time_min, r.plates_used, r.evaluated_conditions
    ));
    if let Some(k) = &r.knee {
        s.push_str(&format!(
            "two-segment knee at {:.1} min, {:.1} % organic\n",
            k.time_min, k.organic_pct
        ));
    }
    s.push_str(&format!(
        "chosen by: {}\n",
        match r.selection {
            Selection::ShortestRunMeetingTarget => "shortest run meeting the target resolution",
            Selection::LargestMinResolution =>
                "largest smallest resolution (no condition meets the target)",
        }
    ));
    s.push_str(&format!(
        "target Rs {:.2}: {}; first peak k ≥ {}: {}\n",
        r.window.target_resolution,
        if r.meets_target { "met" } else { "NOT met" },
        r.min_retention_factor,
        if r.meets_min_retention {
            "met"
        } else {
            "NOT met"
        }
    ));
    s.push_str(&prediction_table(&r.optimum));
    for n in &r.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    s.push_str(
        "note: predictions from a two-parameter retention model; verify the conditions by a run.\n",
    );
    s
}

fn window_tsv(r: &OptimiseReport) -> String {
    let w = &r.window;
    let mut s = format!(
        "# window diagram at {} % → {} % organic; target Rs {}; optimum tG {} min\n",
        w.initial_pct, w.final_pct, w.target_resolution, w.optimum_gradient_time_min
    );
    s.push_str(
        "gradient_time_min\tmin_resolution\tcritical_first\tcritical_second\trun_time_min\twithin_run_time\tfirst_peak_k\tmeets_min_k\n",
    );
    for p in &w.points {
        s.push_str(&format!(
            "{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\n",
            p.gradient_time_min,
            p.min_resolution,
            p.critical_pair[0],
            p.critical_pair[1],
            p.run_time_min,
            p.within_run_time,
            p.first_peak_retention_factor,
            p.meets_min_retention
        ));
    }
    s
}

// ---------------------------------------------------------------------------------------------
// scout --mode gc

/// Schema version of the `scout --mode gc` JSON output.
const SCOUT_GC_SCHEMA_VERSION: u32 = 1;

/// Carrier velocity assumed for t_M from a GC `--column` when `--velocity` is not given, cm/s
/// (the value `predict --mode gc` assumes; common practice for helium, no source).
const DEFAULT_GC_VELOCITY_CM_S: f64 = 35.0;

/// JSON output of `scout --mode gc` (schema version [`SCOUT_GC_SCHEMA_VERSION`]).
#[derive(Serialize)]
struct ScoutGcJson<'a> {
    schema_version: u32,
    mode: &'static str,
    /// Where t_M came from.
    holdup_source: String,
    /// Where the plate number for widths came from.
    plates_source: String,
    fit: &'a GcScoutFit,
    optimisation: &'a GcOptimiseReport,
    safety: &'static str,
}

/// The safety note printed with every GC recommendation.
const GC_SAFETY: &str = "Hydrogen carrier gas is flammable (explosive in air from about 4 % by \
volume, from memory): leak-check after every column installation, use a hydrogen sensor or a \
flow shut-off where the lab's SOPs require it, and never let hydrogen flow into the oven from an \
open column end. Secure gas cylinders upright, with the valve cap on during transport. Never program the oven above the phase's maximum temperature (bleed, \
phase damage), and let the oven and injector cool before opening them. The lab's SOPs, local \
regulations and licensed practice take precedence.";

fn split_ovens(spec: &str, runs: usize) -> Result<Vec<OvenProgram>> {
    per_run(spec, runs, "--ovens", "oven program", |p| {
        Ok(OvenProgram::parse(p)?)
    })
}

/// Parses a GC column `LENGTH_MxID_MMxFILM_UM` for `scout --mode gc`, naming the option.
fn parse_gc_column(text: &str, velocity_cm_s: f64) -> Result<GcColumn> {
    let parts: Vec<&str> = text.split(['x', 'X', '×']).map(str::trim).collect();
    let nums: Option<Vec<f64>> = parts.iter().map(|p| p.parse::<f64>().ok()).collect();
    match nums.as_deref() {
        Some(&[l, id, film]) => GcColumn::new(l, id, film, velocity_cm_s)
            .map_err(|e| anyhow::anyhow!("--column {text}: {e}")),
        _ => bail!(
            "--column {text}: a GC column is LENGTH_MxID_MMxFILM_UM, e.g. 30x0.25x0.25 (30 m x 0.25 mm, 0.25 µm film)"
        ),
    }
}

fn gc_range(
    option: &str,
    r: NumberRange,
    lo: f64,
    hi: f64,
    what: &str,
) -> Result<TemperatureRange> {
    check_option_range(option, r, lo, hi, what)?;
    Ok(TemperatureRange {
        min: r.min,
        max: r.max,
    })
}

/// Runs `phasewise scout --mode gc`.
fn run_scout_gc(a: &ScoutArgs) -> Result<ExitCode> {
    use phasewise::phase::{Catalogue, PhaseMode};
    refuse_options(
        "an LC option; in GC mode give --ovens, --t0 or --column LENGTH_MxID_MMxFILM_UM, and --phase or --max-temperature",
        &[
            ("--gradients", a.gradients.is_some()),
            ("--flow", a.flow.is_some()),
            ("--dwell", a.dwell != 0.0),
            ("--particle", a.particle.is_some()),
            ("--tg-range", a.tg_range.is_some()),
            ("--start-range", a.start_range.is_some()),
            ("--end-range", a.end_range.is_some()),
            ("--two-segment", a.two_segment),
            ("--temperatures", a.temperatures.is_some()),
            ("--modifier", a.modifier.is_some()),
            ("--ph", a.ph.is_some()),
            ("--temperature", a.temperature.is_some()),
        ],
    )?;
    if a.store {
        bail!(
            "--store keeps LC scouting fits only; GC fits (A, B) are not stored yet: leave --store out"
        );
    }
    let Some(ovens) = a.ovens.as_deref() else {
        bail!(
            "--ovens is needed in GC mode: one oven program per run, separated by `;`, e.g. '40:1,5:300:5;40:1,15:300:5'"
        );
    };
    let programs = split_ovens(ovens, a.runs.len())?;
    // Temperature limit: the phase's, --max-temperature, or the lower of the two.
    let phase_limit = match &a.phase {
        Some(id) => {
            let catalogue = Catalogue::builtin()?;
            let phase = catalogue
                .phase(id)
                .with_context(|| format!("--phase `{id}`"))?;
            if phase.mode() != PhaseMode::Gc {
                bail!(
                    "--phase `{id}` is a {} phase; GC scouting needs a GC phase (`phasewise phases --mode gc`)",
                    phase.mode().as_str()
                );
            }
            Some(phase.t_max_c())
        }
        None => None,
    };
    if let Some(t) = a.max_temperature
        && !(t.is_finite() && (-100.0..=450.0).contains(&t))
    {
        bail!("--max-temperature {t} °C must lie between -100 and 450 °C");
    }
    let max_temperature = match (phase_limit, a.max_temperature) {
        (Some(p), Some(m)) => p.min(m),
        (Some(p), None) => p,
        (None, Some(m)) => m,
        (None, None) => bail!(
            "GC scouting needs the oven limit: give --phase ID (a GC phase of `phasewise phases --mode gc`) or --max-temperature C"
        ),
    };
    for (i, p) in programs.iter().enumerate() {
        if p.final_c() > max_temperature {
            bail!(
                "--ovens: program {} `{}` heats to {} °C, above the maximum {max_temperature} °C ({}); check the program",
                i + 1,
                p.to_spec(),
                p.final_c(),
                if phase_limit.is_some() {
                    "the limit of --phase"
                } else {
                    "--max-temperature"
                }
            );
        }
    }
    let (holdup, holdup_source, column) = match (a.t0, a.column.as_deref()) {
        (Some(t), None) => (t, format!("given: {t} min"), None),
        (None, Some(text)) => {
            let v = a.velocity.unwrap_or(DEFAULT_GC_VELOCITY_CM_S);
            let c = parse_gc_column(text, v)?;
            (
                c.holdup_time_min(),
                format!(
                    "t_M = L/u for {} m at {v} cm/s{} (constant-velocity approximation)",
                    c.length_m(),
                    if a.velocity.is_some() {
                        ""
                    } else {
                        " (assumed; give --velocity)"
                    }
                ),
                Some(c),
            )
        }
        (Some(_), Some(_)) => bail!("give either --t0 or --column, not both"),
        (None, None) => bail!(
            "the hold-up time is needed: give --t0 MIN (e.g. from an unretained methane peak) or --column LENGTH_MxID_MMxFILM_UM with --velocity CM_S"
        ),
    };
    let initial = gc_range(
        "--initial-range",
        a.initial_range.unwrap_or(NumberRange {
            min: 40.0_f64.min(max_temperature),
            max: 150.0_f64.min(max_temperature),
        }),
        -100.0,
        max_temperature,
        "initial temperatures in °C, at most the maximum temperature",
    )?;
    let ramp = gc_range(
        "--ramp-range",
        a.ramp_range.unwrap_or(NumberRange {
            min: 2.0,
            max: 30.0,
        }),
        0.1,
        100.0,
        "ramp rates in °C/min",
    )?;
    let initial_hold = a.initial_hold.unwrap_or(1.0);
    if initial_hold > 600.0 {
        bail!("--initial-hold {initial_hold} min must be at most 600 min");
    }
    for out in a
        .window_svg
        .iter()
        .chain(a.window_data.iter())
        .chain(a.chromatogram_svg.iter())
    {
        check_writable(out)?;
    }
    let mut runs = Vec::new();
    for (path, program) in a.runs.iter().zip(programs) {
        runs.push(GcScoutRun {
            name: path.file_name().map_or_else(
                || path.display().to_string(),
                |n| n.to_string_lossy().into(),
            ),
            program,
            peaks: read_peaks(path)?,
        });
    }
    let fitted = fit_gc(&GcScoutRequest {
        runs: runs.clone(),
        holdup_time_min: holdup,
        max_temperature_c: Some(max_temperature),
    })
    .map_err(|e| match e {
        GcScoutError::PeakBeforeHoldup { .. } => anyhow::anyhow!(
            "{e} (t_M from {})",
            if a.t0.is_some() {
                "--t0"
            } else {
                "--column and --velocity"
            }
        ),
        GcScoutError::NotIdentifiable { .. } => anyhow::anyhow!("--ovens: {e}"),
        other => {
            anyhow::Error::new(other).context("fitting ln k = A + B/T to the GC scouting runs")
        }
    })?;
    let (plates, plates_source) = match a.plates {
        Some(n) => (n, format!("given: {n}")),
        None => {
            let mut ns: Vec<f64> = Vec::new();
            for f in fitted.analytes.iter().filter(|f| f.flags.is_empty()) {
                for r in &runs {
                    if let Some(p) = r.peaks.get(&f.name)
                        && let Some(n) = apparent_plates(
                            &f.parameters(),
                            &r.program,
                            holdup,
                            p.width_base_min,
                            p.width_half_min,
                        )
                    {
                        ns.push(n);
                    }
                }
            }
            ns.sort_by(f64::total_cmp);
            let Some(median) = (!ns.is_empty()).then(|| {
                let m = ns.len() / 2;
                if ns.len() % 2 == 1 {
                    ns[m]
                } else {
                    0.5 * (ns[m - 1] + ns[m])
                }
            }) else {
                bail!(
                    "no well-determined fit to estimate the plate number from the peak widths: give --plates N"
                );
            };
            let golay = column.map_or_else(String::new, |c| {
                format!(
                    "; the open-tube estimate L/dc would be {:.0}",
                    c.length_m() * 1000.0 / c.inner_diameter_mm()
                )
            });
            (
                median,
                format!(
                    "median apparent plate number of {} measured peaks under w = 4 t_M (1 + k_e)/√N{golay}",
                    ns.len()
                ),
            )
        }
    };
    let req = GcOptimiseRequest {
        analytes: GcOptimiseRequest::analytes_from_fit(&fitted),
        holdup_time_min: holdup,
        plates,
        initial_c: initial,
        ramp_c_per_min: ramp,
        initial_hold_min: initial_hold,
        max_temperature_c: max_temperature,
        max_run_time_min: a.max_run_time,
        critical_pairs: a.critical.clone(),
        target_resolution: a.target_resolution,
        min_retention_factor: a.min_k,
    };
    let report = optimise_gc(&req).map_err(|e| match e {
        GcOptimiseError::NoFeasibleCondition { .. } => anyhow::anyhow!(
            "no oven program within --initial-range {},{} °C and --ramp-range {},{} °C/min (limit {max_temperature} °C) elutes every analyte within --max-run-time {} min; raise --max-run-time or the top of --ramp-range",
            initial.min,
            initial.max,
            ramp.min,
            ramp.max,
            a.max_run_time
        ),
        GcOptimiseError::UnknownAnalyte { .. } | GcOptimiseError::CriticalPairSameAnalyte { .. } => {
            anyhow::anyhow!("--critical: {e}")
        }
        GcOptimiseError::TooFewAnalytes { .. } => anyhow::anyhow!(
            "{e}: the peak tables {} name fewer than two peaks",
            a.runs
                .iter()
                .map(|p| p.display().to_string())
                .collect::<Vec<_>>()
                .join(", ")
        ),
        other => anyhow::Error::new(other).context("optimising the oven program"),
    })?;
    let text = match a.format {
        ReportFormat::Json => json_line(&ScoutGcJson {
            schema_version: SCOUT_GC_SCHEMA_VERSION,
            mode: "gc",
            holdup_source: holdup_source.clone(),
            plates_source: plates_source.clone(),
            fit: &fitted,
            optimisation: &report,
            safety: GC_SAFETY,
        })?,
        ReportFormat::Table => scout_gc_table(&fitted, &report, &holdup_source, &plates_source),
    };
    if let Some(p) = &a.chromatogram_svg {
        let svg = render_gc_optimum_svg(
            &report.optimum,
            fitted.holdup_time_min,
            a.target_resolution,
            "Predicted chromatogram at the chosen oven program",
        );
        write_atomically(p, svg)?;
    }
    if let Some(p) = &a.window_svg {
        write_atomically(p, render_gc_window_svg(&report.window))?;
    }
    if let Some(p) = &a.window_data {
        write_atomically(p, gc_window_tsv(&report))?;
    }
    write_out(&text)?;
    Ok(ExitCode::SUCCESS)
}

fn gc_flag_text(f: &GcFitFlag) -> String {
    match f {
        GcFitFlag::NonPhysical { b_k } => {
            format!("non-physical B {b_k:.0} K (retention would rise with temperature)")
        }
        GcFitFlag::BOutsideRange { b_k } => format!("B {b_k:.0} K outside 1000–25000 K"),
        GcFitFlag::ElutedAfterProgram { run } => {
            format!("measured after the end of the program in {run}")
        }
        GcFitFlag::LargeResidual { rms_min } => format!("large residual {rms_min:.3} min"),
        GcFitFlag::IllConditioned {
            b_relative_uncertainty,
        } => format!(
            "ill-conditioned (σB/B = {:.0} %)",
            100.0 * b_relative_uncertainty
        ),
        GcFitFlag::NotConverged => "not converged".into(),
    }
}

fn scout_gc_table(
    f: &GcScoutFit,
    r: &GcOptimiseReport,
    holdup_source: &str,
    plates_source: &str,
) -> String {
    let rows: Vec<Vec<String>> = f
        .analytes
        .iter()
        .map(|x| {
            vec![
                x.name.clone(),
                num(Some(x.a), 3),
                num(Some(x.a_uncertainty), 3),
                num(Some(x.b_k), 0),
                num(Some(x.b_uncertainty_k), 0),
                num(Some(x.sorption_enthalpy_kj_mol), 1),
                num(Some(x.rms_residual_min), 4),
                x.flags
                    .iter()
                    .map(gc_flag_text)
                    .collect::<Vec<_>>()
                    .join("; "),
            ]
        })
        .collect();
    let mut s = format!(
        "GC scouting fit of ln k = A + B/T over {} runs ({}); t_M = {:.3} min ({holdup_source}); ramp integrated in {} K steps\n",
        f.runs.len(),
        f.runs.join(", "),
        f.holdup_time_min,
        f.integration_step_k
    );
    s.push_str(&render(
        &[
            "analyte",
            "A (–)",
            "±1σ A (–)",
            "B (K)",
            "±1σ B (K)",
            "ΔH (kJ/mol)",
            "RMS residual (min)",
            "flags",
        ],
        &rows,
    ));
    let o = &r.optimum;
    s.push_str(&format!(
        "\n\nOptimum oven program {} (initial °C : hold min, ramp °C/min : final °C : hold min): {} °C for {} min, {} °C/min to {} °C, hold {} min; limit {} °C\nplate number {:.0} ({plates_source}); {} programs evaluated\n",
        o.program,
        o.initial_c,
        o.initial_hold_min,
        o.ramp_c_per_min,
        o.final_c,
        o.final_hold_min,
        r.max_temperature_c,
        r.plates_used,
        r.evaluated_conditions
    ));
    s.push_str(&format!(
        "chosen by: {}\n",
        match r.selection {
            Selection::ShortestRunMeetingTarget => "shortest run meeting the target resolution",
            Selection::LargestMinResolution =>
                "largest smallest resolution (no condition meets the target)",
        }
    ));
    s.push_str(&format!(
        "target Rs {:.2}: {}; first peak k ≥ {}: {}\n",
        r.window.target_resolution,
        if r.meets_target { "met" } else { "NOT met" },
        r.min_retention_factor,
        if r.meets_min_retention {
            "met"
        } else {
            "NOT met"
        }
    ));
    s.push_str(&format!(
        "last peak at {:.2} min, program ends at {:.2} min; smallest Rs {:.2} ({} / {}); first peak k = {:.2}\n",
        o.run_time_min,
        o.program_time_min,
        o.min_resolution,
        o.critical_pair[0],
        o.critical_pair[1],
        o.first_peak_retention_factor
    ));
    let peaks: Vec<Vec<String>> = o
        .peaks
        .iter()
        .map(|k| {
            vec![
                k.name.clone(),
                num(Some(k.retention_time_min), 2),
                num(k.retention_time_uncertainty_min, 2),
                num(Some(k.width_base_min), 3),
                num(Some(k.elution_temperature_c), 1),
                label(&k.phase).replace('_', " "),
            ]
        })
        .collect();
    s.push_str(&render(
        &[
            "analyte",
            "predicted tR (min)",
            "±1σ tR (min)",
            "base width (min)",
            "elution temperature (°C)",
            "elutes in",
        ],
        &peaks,
    ));
    s.push('\n');
    let pairs: Vec<Vec<String>> = o
        .pairs
        .iter()
        .map(|q| {
            let critical = q.first == o.critical_pair[0] && q.second == o.critical_pair[1];
            vec![
                q.first.clone(),
                q.second.clone(),
                num(Some(q.resolution), 2),
                if critical {
                    "critical".into()
                } else {
                    String::new()
                },
            ]
        })
        .collect();
    s.push_str(&render(
        &["first", "second", "predicted Rs (–)", ""],
        &pairs,
    ));
    s.push('\n');
    for n in &r.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    s.push_str(
        "note: predictions from a two-parameter retention–temperature model with constant t_M; verify the program by a run.\n",
    );
    s.push_str(&format!("safety: {GC_SAFETY}\n"));
    s
}

fn gc_window_tsv(r: &GcOptimiseReport) -> String {
    let w = &r.window;
    let mut s = format!(
        "# window diagram at initial {} °C, hold {} min; target Rs {}; optimum ramp {} °C/min\n",
        w.initial_c, w.initial_hold_min, w.target_resolution, w.optimum_ramp_c_per_min
    );
    s.push_str(
        "ramp_c_per_min\tmin_resolution\tcritical_first\tcritical_second\trun_time_min\twithin_run_time\tfirst_peak_k\tmeets_min_k\n",
    );
    for p in &w.points {
        s.push_str(&format!(
            "{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\n",
            p.ramp_c_per_min,
            p.min_resolution,
            p.critical_pair[0],
            p.critical_pair[1],
            p.run_time_min,
            p.within_run_time,
            p.first_peak_retention_factor,
            p.meets_min_retention
        ));
    }
    s
}

// ---------------------------------------------------------------------------------------------
// transfer

/// `transfer` options.
#[derive(Debug, Args)]
pub struct TransferArgs {
    /// Column of the existing method, LENGTHxID in mm.
    #[arg(long, value_name = "LxID", value_parser = column_arg)]
    pub from: ColumnSize,
    /// Particle size of the existing column, µm.
    #[arg(long, value_name = "UM", value_parser = positive_arg, allow_negative_numbers = true)]
    pub from_particle: f64,
    /// Target column, LENGTHxID in mm.
    #[arg(long, value_name = "LxID", value_parser = column_arg)]
    pub to: ColumnSize,
    /// Particle size of the target column, µm.
    #[arg(long, value_name = "UM", value_parser = positive_arg, allow_negative_numbers = true)]
    pub to_particle: f64,
    /// Flow of the existing method, mL/min.
    #[arg(long, value_name = "ML_MIN", value_parser = positive_arg, allow_negative_numbers = true)]
    pub flow: f64,
    /// Gradient program of the existing method, `time:%organic,...`.
    #[arg(long, value_name = "PROGRAM")]
    pub gradient: String,
    /// Dwell volume of the existing system, mL.
    #[arg(long, value_name = "ML", requires = "dwell_to", value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub dwell_from: Option<f64>,
    /// Dwell volume of the target system, mL.
    #[arg(long, value_name = "ML", requires = "dwell_from", value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub dwell_to: Option<f64>,
    /// Injection volume of the existing method, µL.
    #[arg(long, value_name = "UL", value_parser = positive_arg, allow_negative_numbers = true)]
    pub injection: Option<f64>,
    /// Run time of the existing method, min (default: end of the program).
    #[arg(long, value_name = "MIN", value_parser = positive_arg, allow_negative_numbers = true)]
    pub run_time: Option<f64>,
    /// Also scale the flow by dp1/dp2 (same reduced velocity) instead of the same linear velocity.
    #[arg(long)]
    pub scale_flow_for_particle: bool,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = ReportFormat::Table)]
    pub format: ReportFormat,
}

/// JSON output of `transfer` (schema version 1).
#[derive(Serialize)]
struct TransferJson<'a> {
    schema_version: u32,
    original: ColumnGeometry,
    target: ColumnGeometry,
    original_flow_ml_min: f64,
    original_program: String,
    #[serde(flatten)]
    report: &'a TransferReport,
    regulatory_note: &'static str,
}

const REGULATORY_NOTE: &str = "General pharmacopoeial chromatography chapters allow limited \
adjustments of a validated method (column dimensions, particle size, flow, gradient times) in \
general terms; whether this transfer is an allowed adjustment or a method change is decided by \
the applicable chapter and the lab's procedures.";

/// Runs `phasewise transfer`.
pub fn run_transfer(a: &TransferArgs) -> Result<ExitCode> {
    let program = GradientProgram::parse(&a.gradient)
        .with_context(|| format!("--gradient `{}`", a.gradient))?;
    let original = ColumnGeometry {
        column_length_mm: a.from.length_mm,
        inner_diameter_mm: a.from.inner_diameter_mm,
        particle_size_um: a.from_particle,
    };
    let target = ColumnGeometry {
        column_length_mm: a.to.length_mm,
        inner_diameter_mm: a.to.inner_diameter_mm,
        particle_size_um: a.to_particle,
    };
    let req = TransferRequest {
        original,
        target,
        flow_ml_min: a.flow,
        adjust_flow_for_particle_size: a.scale_flow_for_particle,
        program: program.clone(),
        injection_volume_ul: a.injection,
        dwell_volume_original_ml: a.dwell_from.unwrap_or(0.0),
        dwell_volume_target_ml: a.dwell_to.unwrap_or(0.0),
        run_time_min: a.run_time,
    };
    let r = transfer(&req).map_err(|e| match e {
        TransferError::RunTimeTooShort { .. } => anyhow::anyhow!("--run-time: {e}"),
        TransferError::Gradient(_) => anyhow::anyhow!("--gradient `{}`: {e}", a.gradient),
        other => anyhow::Error::new(other).context("scaling the method"),
    })?;
    let text = match a.format {
        ReportFormat::Json => json_line(&TransferJson {
            schema_version: 1,
            original,
            target,
            original_flow_ml_min: a.flow,
            original_program: program.to_spec(),
            report: &r,
            regulatory_note: REGULATORY_NOTE,
        })?,
        ReportFormat::Table => transfer_table(a, &program, &r),
    };
    write_out(&text)?;
    Ok(ExitCode::SUCCESS)
}

fn transfer_table(a: &TransferArgs, program: &GradientProgram, r: &TransferReport) -> String {
    let v = |x: f64, d: usize| num(Some(x), d);
    let rows = vec![
        vec![
            "column (mm)".into(),
            format!("{}x{}", a.from.length_mm, a.from.inner_diameter_mm),
            format!("{}x{}", a.to.length_mm, a.to.inner_diameter_mm),
        ],
        vec![
            "particle size (µm)".into(),
            a.from_particle.to_string(),
            a.to_particle.to_string(),
        ],
        vec!["flow (mL/min)".into(), v(a.flow, 3), v(r.flow_ml_min, 3)],
        vec![
            "column dead volume Vm (mL)".into(),
            v(r.dead_volume_original_ml, 3),
            v(r.dead_volume_target_ml, 3),
        ],
        vec![
            "injection volume (µL)".into(),
            num(a.injection, 2),
            num(r.injection_volume_ul, 2),
        ],
        vec![
            "dwell volume (mL)".into(),
            v(a.dwell_from.unwrap_or(0.0), 3),
            v(a.dwell_to.unwrap_or(0.0), 3),
        ],
        vec![
            "run time (min)".into(),
            v(r.run_time_original_min, 2),
            v(r.run_time_target_min, 2),
        ],
    ];
    let mut s = render(&["quantity", "original", "target"], &rows);
    s.push_str("\n\nTarget gradient program:\n");
    let prog_rows: Vec<Vec<String>> = r
        .program
        .points()
        .iter()
        .map(|p| vec![v(p.time_min, 2), v(p.organic_pct, 1)])
        .collect();
    s.push_str(&render(&["time (min)", "organic (%)"], &prog_rows));
    s.push_str(&format!("\n\nOriginal program: {}\n", program.to_spec()));
    s.push_str(&format!(
        "time scale factor (Vm2/Vm1)(F1/F2) = {:.4}; linear velocity ratio = {:.3}\n\
         dwell correction: initial hold {:.2} min, injection delay {:.2} min\n\
         expected plate number ratio N2/N1 = {:.3}; pressure ratio ΔP2/ΔP1 = {:.2}\n\
         program delivers {:.1} column volumes\n",
        r.time_scale_factor,
        r.linear_velocity_ratio,
        r.dwell_hold_min,
        r.injection_delay_min,
        r.plate_number_ratio,
        r.pressure_ratio,
        r.program_column_volumes
    ));
    for n in &r.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    // the library's notes usually carry the regulatory caveat already; never print it twice
    if !r.notes.iter().any(|n| n.contains("pharmacopoeial")) {
        s.push_str(&format!("note: {REGULATORY_NOTE}\n"));
    }
    s
}

// ---------------------------------------------------------------------------------------------
// model

/// Retention-model commands.
#[derive(Debug, Subcommand)]
pub enum ModelCommand {
    /// Train the LC retention model and the retention memory from the open retention tables.
    #[command(after_help = MODEL_TRAIN_HELP)]
    Train(ModelTrainArgs),
    /// Leave-whole-systems-out cross-validation of the model against a logP baseline.
    #[command(after_help = MODEL_EVAL_HELP)]
    Eval(ModelEvalArgs),
}

/// Where the training tables are.
#[derive(Debug, Args)]
pub struct TablePaths {
    /// Systems table (TSV, plain or .gz).
    #[arg(long, value_name = "PATH")]
    pub systems: Option<PathBuf>,
    /// Retention table (TSV, plain or .gz).
    #[arg(long, value_name = "PATH")]
    pub retention: Option<PathBuf>,
}

/// `model train` options.
#[derive(Debug, Args)]
pub struct ModelTrainArgs {
    /// Input tables.
    #[command(flatten)]
    pub tables: TablePaths,
    /// Random seed (fold assignment and subsampling).
    #[arg(long, default_value_t = 42)]
    pub seed: u64,
    /// Model file to write.
    #[arg(long, value_name = "PATH", default_value = "data/lc_model.json.gz")]
    pub output: PathBuf,
    /// Retention memory file to write.
    #[arg(
        long,
        value_name = "PATH",
        default_value = "data/retention_memory.tsv.gz"
    )]
    pub memory_output: PathBuf,
}

/// Output formats of `model eval`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum EvalFormat {
    /// Aligned table of medians and quartiles.
    Table,
    /// The full report as JSON.
    Json,
    /// Markdown (as in docs/model.md).
    Markdown,
}

/// `model eval` options.
#[derive(Debug, Args)]
pub struct ModelEvalArgs {
    /// Input tables.
    #[command(flatten)]
    pub tables: TablePaths,
    /// Number of folds over systems.
    #[arg(long, default_value_t = 5)]
    pub folds: usize,
    /// Random seed.
    #[arg(long, default_value_t = 42)]
    pub seed: u64,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = EvalFormat::Table)]
    pub format: EvalFormat,
}

fn table_path(given: Option<&PathBuf>, flag: &str, file: &str) -> Result<PathBuf> {
    if let Some(p) = given {
        return Ok(p.clone());
    }
    let shared = Path::new(SHARED_RETENTION_DIR).join(file);
    if shared.is_file() {
        Ok(shared)
    } else {
        bail!(
            "no {flag} given and {} does not exist here; pass {flag} PATH",
            shared.display()
        )
    }
}

fn load_tables(t: &TablePaths) -> Result<TrainingData> {
    let systems = table_path(t.systems.as_ref(), "--systems", "systems.tsv")?;
    let retention = table_path(t.retention.as_ref(), "--retention", "retention.tsv")?;
    eprintln!(
        "loading {} and {} (descriptors from structure)…",
        systems.display(),
        retention.display()
    );
    let data =
        TrainingData::load(&systems, &retention, &PhasewiseDescriptors).with_context(|| {
            format!(
                "loading the retention tables {} and {}",
                systems.display(),
                retention.display()
            )
        })?;
    eprintln!(
        "loaded {} rows over {} systems ({} analytes); skipped {:?}",
        data.rows.len(),
        data.systems.len(),
        data.analytes.len(),
        data.skipped
    );
    Ok(data)
}

/// Runs `phasewise model …`.
pub fn run_model(c: &ModelCommand) -> Result<ExitCode> {
    match c {
        ModelCommand::Train(a) => run_model_train(a),
        ModelCommand::Eval(a) => run_model_eval(a),
    }
}

fn run_model_train(a: &ModelTrainArgs) -> Result<ExitCode> {
    if a.output == a.memory_output {
        bail!(
            "--output and --memory-output are both {}; give two files",
            a.output.display()
        );
    }
    check_writable(&a.output)?;
    check_writable(&a.memory_output)?;
    let data = load_tables(&a.tables)?;
    eprintln!(
        "training (seed {}; cross-validated calibration, then a fit on all rows)…",
        a.seed
    );
    let model = train_with(&data, a.seed, DEFAULT_PENALTIES).context("training the model")?;
    let bytes = model.to_gz_bytes().context("encoding the model")?;
    let memory = MemoryTable::from_training(&data)
        .to_gz_bytes()
        .context("encoding the retention memory")?;
    write_atomically(&a.output, &bytes)?;
    write_atomically(&a.memory_output, &memory)?;
    eprintln!(
        "wrote {} ({} B) and {} ({} B)",
        a.output.display(),
        bytes.len(),
        a.memory_output.display(),
        memory.len()
    );
    Ok(ExitCode::SUCCESS)
}

fn run_model_eval(a: &ModelEvalArgs) -> Result<ExitCode> {
    if a.folds < 2 {
        bail!("--folds {} is too few: use 2 or more", a.folds);
    }
    let data = load_tables(&a.tables)?;
    if a.folds > data.systems.len() {
        bail!(
            "--folds {} is more than the {} systems in the tables; use at most {}",
            a.folds,
            data.systems.len(),
            data.systems.len()
        );
    }
    eprintln!(
        "evaluating: {} folds over systems, seed {}…",
        a.folds, a.seed
    );
    let report = evaluate_with(&data, a.seed, a.folds, DEFAULT_PENALTIES)
        .context("cross-validating the model")?;
    let text = match a.format {
        EvalFormat::Json => json_line(&report)?,
        EvalFormat::Markdown => format!("{}\n", report.to_markdown()),
        EvalFormat::Table => eval_table(&report),
    };
    write_out(&text)?;
    Ok(ExitCode::SUCCESS)
}

fn eval_table(r: &EvalReport) -> String {
    let rows: Vec<Vec<String>> = r
        .summary
        .iter()
        .map(|(k, m)| {
            let mut parts: Vec<String> = k.splitn(3, '/').map(str::to_string).collect();
            parts.resize(3, String::new());
            parts.extend([
                num(Some(m.median), 3),
                num(Some(m.q25), 3),
                num(Some(m.q75), 3),
            ]);
            parts
        })
        .collect();
    let mut s = format!(
        "Leave-whole-systems-out cross-validation: {} folds, seed {}, {} held-out systems; baseline descriptor `{}`\n",
        r.folds,
        r.seed,
        r.systems.len(),
        r.baseline_descriptor
    );
    s.push_str(&render(
        &["mode", "method", "metric", "median", "25th pct", "75th pct"],
        &rows,
    ));
    s.push_str(
        "\nmetrics: spearman (–), order_accuracy (fraction), mae_min (min), mae_pct_gradient (%), coelution_auc (–)\n",
    );
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn per_run_lists_name_the_option_the_count_and_the_bad_item() {
        let e = format!("{:#}", parse_temperatures("30;x", 2).unwrap_err());
        assert!(e.contains("--temperatures") && e.contains("`x`"), "{e}");
        let e = format!("{:#}", parse_temperatures("30;40;50", 2).unwrap_err());
        assert!(
            e.contains("3 temperature(s)") && e.contains("2 run files"),
            "{e}"
        );
        let e = format!("{:#}", parse_temperatures("30;500", 2).unwrap_err());
        assert!(e.contains("500 °C must lie between"), "{e}");
        assert_eq!(
            parse_temperatures(" 30 ; 60 ", 2).unwrap(),
            vec![30.0, 60.0]
        );
        let e = format!(
            "{:#}",
            split_ovens("40:1,5:300:5;40:1,x:300:5", 2).unwrap_err()
        );
        assert!(e.contains("oven program 2") && e.contains("--ovens"), "{e}");
        let e = format!("{:#}", split_programs("0:5,10:95", 2).unwrap_err());
        assert!(e.contains("--gradients gives 1 gradient program(s)"), "{e}");
    }

    proptest! {
        // Any text: a list of the right length or an error, never a panic; accepted
        // temperatures are inside the stated range.
        #[test]
        fn per_run_lists_never_panic(text in "\\PC{0,40}", runs in 1usize..4) {
            if let Ok(t) = parse_temperatures(&text, runs) {
                prop_assert_eq!(t.len(), runs);
                prop_assert!(t.iter().all(|v| (-10.0..=200.0).contains(v)));
            }
            if let Ok(p) = split_ovens(&text, runs) {
                prop_assert_eq!(p.len(), runs);
            }
            if let Ok(p) = split_programs(&text, runs) {
                prop_assert_eq!(p.len(), runs);
            }
        }

        #[test]
        fn valid_temperature_lists_are_read_back(ts in proptest::collection::vec(-10i32..=200, 1..5)) {
            let text: Vec<String> = ts.iter().map(i32::to_string).collect();
            let got = parse_temperatures(&text.join(";"), ts.len()).unwrap();
            let want: Vec<f64> = ts.iter().map(|&t| f64::from(t)).collect();
            prop_assert_eq!(got, want);
        }
    }

    #[test]
    fn column_sizes_read_with_and_without_spaces() {
        let a = parse_column("150x4.6").unwrap();
        assert_eq!(a.length_mm, 150.0);
        assert_eq!(a.inner_diameter_mm, 4.6);
        assert_eq!(parse_column(" 150 x 4.6 ").unwrap(), a);
        assert_eq!(parse_column("150X4.6 mm").unwrap(), a);
        assert_eq!(parse_column("150×4.6").unwrap(), a);
    }

    #[test]
    fn malformed_columns_are_rejected_naming_the_text() {
        for bad in ["150", "150x", "x4.6", "150x4.6x2", "", "150*4.6"] {
            let e = parse_column(bad).unwrap_err();
            assert!(matches!(e, ColumnSpecError::Malformed { .. }), "{bad}: {e}");
        }
        let e = parse_column("15o x 4.6").unwrap_err();
        assert!(e.to_string().contains("`15o`"), "{e}");
        assert!(e.to_string().contains("length"), "{e}");
    }

    #[test]
    fn non_positive_columns_are_rejected() {
        let e = parse_column("150x0").unwrap_err();
        assert!(matches!(e, ColumnSpecError::NotPositive { value, .. } if value == 0.0));
        assert!(e.to_string().contains("inner diameter"), "{e}");
        assert!(parse_column("-150x4.6").is_err());
        assert!(parse_column("infx4.6").is_err());
        assert!(parse_column("NaNx4.6").is_err());
    }

    #[test]
    fn ranges_and_pairs_parse() {
        assert_eq!(
            range_arg("5, 60").unwrap(),
            NumberRange {
                min: 5.0,
                max: 60.0
            }
        );
        assert!(range_arg("60,5").unwrap_err().contains("above"));
        assert!(range_arg("5").is_err());
        assert!(range_arg("5,x").unwrap_err().contains("`x`"));
        assert_eq!(
            pair_arg("a, b").unwrap(),
            ["a".to_string(), "b".to_string()]
        );
        assert!(pair_arg("a").is_err());
        assert!(pair_arg(",b").is_err());
    }

    proptest! {
        #[test]
        fn any_positive_pair_round_trips(l in 1e-3f64..1e4, d in 1e-3f64..1e3, spaced: bool) {
            let text = if spaced { format!("{l} x {d}") } else { format!("{l}x{d}") };
            let c = parse_column(&text).unwrap();
            prop_assert_eq!(c.length_mm, l);
            prop_assert_eq!(c.inner_diameter_mm, d);
        }

        #[test]
        fn arbitrary_text_never_panics(s in "\\PC{0,20}") {
            if let Ok(c) = parse_column(&s) {
                prop_assert!(c.length_mm > 0.0 && c.inner_diameter_mm > 0.0);
                prop_assert!(c.length_mm.is_finite() && c.inner_diameter_mm.is_finite());
            }
        }

        #[test]
        fn non_positive_length_is_an_error(l in -1e4f64..=0.0, d in 1e-3f64..1e3) {
            let text = format!("{l}x{d}");
            prop_assert!(parse_column(&text).is_err());
        }
    }
}
