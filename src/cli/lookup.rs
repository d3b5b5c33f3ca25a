//! `phasewise lookup`: resolve analytes and show their properties with provenance.

use std::process::ExitCode;

use anyhow::Result;
use clap::Args;

use phasewise::property::Origin;
use phasewise::property::estimate::{attach_estimates, estimate};
use phasewise::report::lookup::LookupReport;

use phasewise::kb::Access;

use super::Cli;
use super::exit::success_unless_partial;
use super::input::{AnalyteInput, read_analytes};
use super::knowledge::{open_kb, resolve_all};
use super::output::{OutputFormat, write_out};

/// `lookup` options.
#[derive(Debug, Args)]
pub struct LookupArgs {
    /// Analytes.
    #[command(flatten)]
    pub input: AnalyteInput,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// Runs `phasewise lookup`.
pub fn run(cli: &Cli, args: &LookupArgs) -> Result<ExitCode> {
    let queries = read_analytes(&args.input)?;
    let kb = open_kb(cli, Access::Read)?;
    let (mut found, missing) = resolve_all(&kb, &queries)?;
    // a structure the base does not hold is shown with what phasewise computes from it
    for a in found.iter_mut().filter(|a| a.origin == Origin::Structure) {
        if let Some(e) = a.smiles.as_deref().and_then(|s| estimate(s).ok()) {
            attach_estimates(a, &e);
        }
    }
    let partial = !missing.is_empty();
    let report = LookupReport::new(found, missing);
    write_out(&report.render(args.format.into()))?;
    Ok(success_unless_partial(partial))
}
