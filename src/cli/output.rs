//! Where output goes: the format options the commands share, writing to stdout and stderr with
//! control characters neutralised, and atomic file writes.
//!
//! Every text the program prints passes through [`write_out`] (stdout), [`note`] (stderr) or
//! [`print_error`], which escape control characters stored in names (an escape sequence added
//! with `kb add --name`, say) through [`printable_text`]; JSON escapes them itself. phasewise
//! prints no colour, so `NO_COLOR` needs no handling beyond that (and the progress bar is drawn
//! only on a terminal).

use std::io::Write;

use anyhow::Result;
use clap::ValueEnum;

use phasewise::report::Format;
use phasewise::report::measured::{MeasuredFormat, Render, render};
pub use phasewise::report::plan::{check_writable, write_atomically};
use phasewise::report::table::printable_text;

/// Output formats for data commands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum OutputFormat {
    /// Aligned tables.
    Table,
    /// JSON (schema in docs/json-schema.md).
    Json,
    /// Comma-separated values.
    Csv,
    /// Tab-separated values.
    Tsv,
}

/// Output formats of `scout` and `transfer`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ReportFormat {
    /// Aligned tables.
    Table,
    /// JSON with `schema_version`.
    Json,
}

impl From<OutputFormat> for Format {
    fn from(f: OutputFormat) -> Format {
        match f {
            OutputFormat::Table => Format::Table,
            OutputFormat::Json => Format::Json,
            OutputFormat::Csv => Format::Csv,
            OutputFormat::Tsv => Format::Tsv,
        }
    }
}

impl From<ReportFormat> for MeasuredFormat {
    fn from(f: ReportFormat) -> MeasuredFormat {
        match f {
            ReportFormat::Table => MeasuredFormat::Table,
            ReportFormat::Json => MeasuredFormat::Json,
        }
    }
}

/// Renders a measured-run report in `format` and writes it to stdout.
pub fn write_report<R: Render + ?Sized>(report: &R, format: MeasuredFormat) -> Result<()> {
    write_out(&render(report, format)?)
}

/// Writes `s` to stdout in one piece, control characters in it escaped (line breaks and tabs
/// kept).
pub fn write_out(s: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(printable_text(s).as_bytes())?;
    out.flush()?;
    Ok(())
}

/// Writes one line to stderr, control characters escaped.
pub fn note(line: &str) {
    let mut err = std::io::stderr().lock();
    let _ = writeln!(err, "{}", printable_text(line));
}

/// Prints an error and its causes to stderr, control characters escaped.
pub fn print_error(e: &anyhow::Error) {
    note(&format!("phasewise: error: {e}"));
    for cause in e.chain().skip(1) {
        note(&format!("  caused by: {cause}"));
    }
}
