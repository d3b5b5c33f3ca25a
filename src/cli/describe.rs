//! `phasewise describe`: descriptors, ionisable sites, boiling point and GC suitability from
//! SMILES, without the knowledge base.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Result, bail};
use clap::Args;

use phasewise::report::describe::DescribeReport;

use super::exit::success_unless_partial;
use super::input::{AnalyteInput, read_lines};
use super::output::{OutputFormat, write_out};

/// `describe` options.
#[derive(Debug, Args)]
pub struct DescribeArgs {
    /// SMILES strings.
    #[arg(value_name = "SMILES")]
    pub smiles: Vec<String>,
    /// Read `SMILES` or `SMILES<TAB>name` lines from a file; `-` reads stdin.
    #[arg(long, short, value_name = "FILE")]
    pub input: Option<PathBuf>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// Runs `phasewise describe`.
pub fn run(args: &DescribeArgs) -> Result<ExitCode> {
    let input = AnalyteInput {
        analytes: args.smiles.clone(),
        input: args.input.clone(),
    };
    let lines = read_lines(&input)?;
    let report = DescribeReport::from_inputs(&lines);
    write_out(&report.render(args.format.into()))?;
    if report.molecules.is_empty() {
        bail!(
            "no input could be described ({} failed)",
            report.failures.len()
        );
    }
    Ok(success_unless_partial(!report.failures.is_empty()))
}
