//! `phasewise plan`: write a reviewable method-development plan (HTML or Markdown).

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Result, bail};
use clap::Args;

use phasewise::report::plan::{PlanOptions, render_html, render_markdown};

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
    /// Add a date line to the report (otherwise output is byte-for-byte reproducible).
    #[arg(long)]
    pub date: Option<String>,
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
        date: args.date.clone(),
    };
    let text = if html {
        render_html(&report, &opts)
    } else {
        render_markdown(&report, &opts)
    };
    write_atomically(&args.output, &text)?;
    note(&format!("wrote {}", args.output.display()));
    Ok(success_unless_partial(partial))
}
