//! `phasewise phases`: list the stationary phases of the catalogue.

use std::process::ExitCode;

use anyhow::Result;
use clap::{Args, ValueEnum};

use phasewise::phase::{Catalogue, PhaseMode};
use phasewise::report::phases::PhasesReport;

use super::output::write_out;

/// `phases` options.
#[derive(Debug, Args)]
pub struct PhasesArgs {
    /// Only phases of this mode: rp, hilic, gc, ic-anion, ic-cation or ion-exclusion.
    #[arg(long)]
    pub mode: Option<String>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = ListFormat::Table)]
    pub format: ListFormat,
}

/// Output formats of listing commands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ListFormat {
    /// Aligned table.
    Table,
    /// JSON (schema in docs/json-schema.md).
    Json,
}

/// Runs `phasewise phases`.
pub fn run(args: &PhasesArgs) -> Result<ExitCode> {
    let mode = match &args.mode {
        Some(m) => Some(PhaseMode::parse(m.trim()).ok_or_else(|| {
            anyhow::anyhow!(
                "unknown mode `{m}`; use rp, hilic, gc, ic-anion, ic-cation or ion-exclusion"
            )
        })?),
        None => None,
    };
    let report = PhasesReport::new(Catalogue::builtin()?, mode);
    write_out(&match args.format {
        ListFormat::Table => report.render_table(),
        ListFormat::Json => report.render_json()?,
    })?;
    Ok(ExitCode::SUCCESS)
}
