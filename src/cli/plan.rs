//! `phasewise plan`: write a reviewable method-development plan (HTML or Markdown).

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Result, bail};
use clap::Args;

use phasewise::report::plan::{
    DocumentControl, PlanOptions, render_html_with, render_markdown_with,
};

use super::Cli;
use super::advising::{AdviseOptions, advice};
use super::exit::success_unless_partial;
use super::output::{check_writable, note, write_atomically};

/// `plan` options.
#[derive(Debug, Args)]
pub struct PlanArgs {
    /// Shared options.
    #[command(flatten)]
    pub opts: AdviseOptions,
    /// The report file (.html or .md); written atomically.
    #[arg(long, short, value_name = "FILE")]
    pub output: PathBuf,
    /// Report format (default from the file extension).
    #[arg(long, value_parser = ["html", "md", "markdown"])]
    pub report_format: Option<String>,
    /// Date of the document (default: today, UTC, as YYYY-MM-DD).
    #[arg(long, value_name = "DATE", conflicts_with = "no_date")]
    pub date: Option<String>,
    /// Leave the date out, so the same input gives the same bytes.
    #[arg(long)]
    pub no_date: bool,
    /// Document identifier in the lab's document system.
    #[arg(long, value_name = "ID")]
    pub document_id: Option<String>,
    /// Document version (default "draft 0.1").
    #[arg(long, value_name = "TEXT")]
    pub doc_version: Option<String>,
    /// Author's name (signature and date are left blank to sign).
    #[arg(long, value_name = "NAME")]
    pub author: Option<String>,
    /// Reviewer's name.
    #[arg(long, value_name = "NAME")]
    pub reviewer: Option<String>,
    /// Approver's name.
    #[arg(long, value_name = "NAME")]
    pub approver: Option<String>,
    /// Sample matrix, for the analytical target profile.
    #[arg(long, value_name = "TEXT")]
    pub matrix: Option<String>,
    /// Working range, e.g. "0.05-1.5 mg/mL".
    #[arg(long, value_name = "TEXT")]
    pub range: Option<String>,
    /// Required precision, e.g. "RSD <= 2 % at 100 %".
    #[arg(long, value_name = "TEXT")]
    pub precision: Option<String>,
}

/// Today's date (UTC) as YYYY-MM-DD, from the system clock (civil-from-days conversion of
/// the proleptic Gregorian calendar, H. Hinnant's published algorithm, from memory).
fn today_utc() -> Option<String> {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .ok()?
        .as_secs();
    let z = i64::try_from(secs / 86_400).ok()? + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    Some(format!("{y:04}-{m:02}-{d:02}"))
}

/// Runs `phasewise plan`.
pub fn run(cli: &Cli, args: &PlanArgs) -> Result<ExitCode> {
    // fail before any work when the report cannot be written
    check_writable(&args.output)?;
    let html = match args.report_format.as_deref() {
        Some("html") => true,
        Some(_) => false,
        None => match args.output.extension().and_then(|e| e.to_str()) {
            Some("html") | Some("htm") => true,
            Some("md") | Some("markdown") => false,
            other => bail!(
                "cannot tell the report format from the extension {:?} of {}; use .html or .md, or --report-format",
                other.unwrap_or(""),
                args.output.display()
            ),
        },
    };
    let (report, partial) = advice(cli, &args.opts, None)?;
    let opts = PlanOptions {
        title: "Method development plan".to_string(),
        date: if args.no_date {
            None
        } else {
            args.date.clone().or_else(today_utc)
        },
    };
    let ctl = DocumentControl {
        document_id: args.document_id.clone(),
        version: args.doc_version.clone(),
        author: args.author.clone(),
        reviewer: args.reviewer.clone(),
        approver: args.approver.clone(),
        kb_checksum: Some(phasewise::kb::SEED_HASH.to_string()),
        model_checksum: Some(phasewise::model::fitted::builtin_checksum()),
        matrix: args.matrix.clone(),
        range: args.range.clone(),
        precision: args.precision.clone(),
    };
    let text = if html {
        render_html_with(&report, &opts, &ctl)
    } else {
        render_markdown_with(&report, &opts, &ctl)
    };
    write_atomically(&args.output, &text)?;
    note(&format!("wrote {}", args.output.display()));
    Ok(success_unless_partial(partial))
}
