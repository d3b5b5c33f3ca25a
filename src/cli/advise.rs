//! `phasewise advise`: recommend mode, phase, conditions, co-elution risks and a back-up.

use std::process::ExitCode;

use anyhow::Result;
use clap::Args;

use super::Cli;
use super::advising::{AdviseOptions, advice};
use super::exit::success_unless_partial;
use super::output::{OutputFormat, write_out};

/// `advise` options.
#[derive(Debug, Args)]
pub struct AdviseArgs {
    /// Shared options.
    #[command(flatten)]
    pub opts: AdviseOptions,
    /// Output format: table, json (the full report), or csv/tsv (one row per predicted analyte
    /// of each listed recommendation and of the back-up; columns in docs/json-schema.md).
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// Runs `phasewise advise`.
pub fn run(cli: &Cli, args: &AdviseArgs) -> Result<ExitCode> {
    let (report, partial) = advice(cli, &args.opts, None)?;
    let text = match args.format {
        OutputFormat::Json => format!("{}\n", serde_json::to_string_pretty(&report)?),
        OutputFormat::Table => report.render_table(),
        OutputFormat::Csv => report.render_delimited(','),
        OutputFormat::Tsv => report.render_delimited('\t'),
    };
    write_out(&text)?;
    Ok(success_unless_partial(partial))
}
