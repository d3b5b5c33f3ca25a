//! `phasewise transfer`: scale a gradient method to another column geometry and particle size.

use std::process::ExitCode;

use anyhow::{Context, Result};
use clap::Args;

use phasewise::measured::transfer::{
    ColumnGeometry, FlowScaling, TransferError, TransferRequest, transfer_with,
};
use phasewise::model::gradient::GradientProgram;
use phasewise::report::measured::transfer::{REGULATORY_NOTE, TransferOutput};

use super::input::{ColumnSize, column_arg, non_negative_arg, positive_arg};
use super::output::{ReportFormat, write_report};

/// `transfer` help footer.
pub const TRANSFER_HELP: &str = "\
By default the flow follows the harmonised pharmacopoeial formula F2 = F1 (dc2² dp1)/(dc1² dp2)
and the gradient times scale by (F1/F2)(L2 dc2²)/(L1 dc1²); --constant-velocity keeps the linear
velocity instead. The allowed-adjustment checks (L/dp within -25 % to +50 %, from memory of the
chapters) are printed with their verdict. Check the predicted pressure against the column's and
the system's limits before running.

Example:
  phasewise transfer --from 150x4.6 --from-particle 5 --to 100x2.1 --to-particle 1.8 \\
      --flow 1.0 --gradient '0:5,20:95' --dwell-from 1.0 --dwell-to 0.2 --injection 10";

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
    /// Keep the linear velocity (F2 = F1 (dc2/dc1)²) instead of the pharmacopoeial formula.
    #[arg(long)]
    pub constant_velocity: bool,
    /// Accepted for old scripts: the pharmacopoeial scaling it asked for is now the default.
    #[arg(long, hide = true, conflicts_with = "constant_velocity")]
    pub scale_flow_for_particle: bool,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = ReportFormat::Table)]
    pub format: ReportFormat,
}

/// Runs `phasewise transfer`.
pub fn run(a: &TransferArgs) -> Result<ExitCode> {
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
        adjust_flow_for_particle_size: !a.constant_velocity,
        program: program.clone(),
        injection_volume_ul: a.injection,
        dwell_volume_original_ml: a.dwell_from.unwrap_or(0.0),
        dwell_volume_target_ml: a.dwell_to.unwrap_or(0.0),
        run_time_min: a.run_time,
    };
    let scaling = if a.constant_velocity {
        FlowScaling::ConstantLinearVelocity
    } else {
        FlowScaling::Pharmacopoeial
    };
    let r = transfer_with(&req, scaling).map_err(|e| match e {
        TransferError::RunTimeTooShort { .. } => anyhow::anyhow!("--run-time: {e}"),
        TransferError::Gradient(_) => anyhow::anyhow!("--gradient `{}`: {e}", a.gradient),
        other => anyhow::Error::new(other).context("scaling the method"),
    })?;
    let output = TransferOutput {
        schema_version: 1,
        original,
        target,
        original_flow_ml_min: a.flow,
        original_program: program.to_spec(),
        report: &r,
        regulatory_note: REGULATORY_NOTE,
        original_injection_ul: a.injection,
        dwell_ml: (a.dwell_from, a.dwell_to),
    };
    write_report(&output, a.format.into())?;
    Ok(ExitCode::SUCCESS)
}
