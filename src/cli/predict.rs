//! `phasewise predict`: retention of analytes under given conditions (LC, GC or IC), through
//! the advisor with the phase and conditions fixed.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, Result, bail};
use clap::Args;

use phasewise::advisor::FixedLc;
use phasewise::advisor::gc_predict::{GcPanelRequest, predict_gc_panel};
use phasewise::advisor::profile::AnalyteProfile;
use phasewise::kb::Access;
use phasewise::model::gc::OvenProgram;
use phasewise::model::gradient::GradientProgram;
use phasewise::phase::{Catalogue, PhaseMode, StationaryPhase};
use phasewise::report::num;
use phasewise::report::predict::PredictionOutput;

use super::Cli;
use super::advising::{AdviseOptions, Fixed, advice};
use super::exit::success_unless_partial;
use super::input::{AnalyteInput, parse_gc_column, read_analytes};
use super::knowledge::{open_kb, resolve_all};
use super::output::{OutputFormat, write_out};

/// `predict` options.
#[derive(Debug, Args)]
pub struct PredictArgs {
    /// Analytes.
    #[command(flatten)]
    pub input: AnalyteInput,
    /// Mode: rp, hilic, gc, ic-anion or ic-cation.
    #[arg(long)]
    pub mode: String,
    /// Stationary-phase id (`phasewise phases` lists them), e.g. rp-c18.
    #[arg(long)]
    pub phase: String,
    /// LC gradient as `time:%organic` pairs in minutes and percent, e.g. `0:5,20:95,23:95`
    /// (required for rp and hilic).
    #[arg(long)]
    pub gradient: Option<String>,
    /// GC oven program `INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN`, e.g. `40:2,10:250:5`
    /// (default: the advisor's program for the analytes).
    #[arg(long, value_name = "PROGRAM")]
    pub oven: Option<String>,
    /// Organic modifier: acetonitrile or methanol.
    #[arg(long)]
    pub modifier: Option<String>,
    /// Aqueous pH (must be inside the phase's range).
    #[arg(long)]
    pub ph: Option<f64>,
    /// Dead time, min (or give --column and --flow).
    #[arg(long, value_name = "MIN")]
    pub t0: Option<f64>,
    /// Column: LC `LENGTHxID` in mm, e.g. 150x4.6; GC `LENGTH_MxID_MMxFILM_UM`, e.g.
    /// 30x0.25x0.25 (carrier 35 cm/s helium; default: the advisor's column).
    #[arg(long, value_name = "COLUMN")]
    pub column: Option<String>,
    /// Flow, mL/min.
    #[arg(long, value_name = "ML_MIN")]
    pub flow: Option<f64>,
    /// Particle size, µm.
    #[arg(long, value_name = "UM")]
    pub particle: Option<f64>,
    /// Dwell volume, mL.
    #[arg(long, value_name = "ML", default_value_t = 0.0)]
    pub dwell: f64,
    /// Column temperature, °C.
    #[arg(long, value_name = "C")]
    pub temperature: Option<f64>,
    /// Flag pairs whose co-elution probability is at least this (0-1).
    #[arg(long, default_value_t = 0.2)]
    pub risk: f64,
    /// LC: retention from the analytes' structures only, even for analytes with measured
    /// retention (open data or stored scouting fits); the path column says so.
    #[arg(long)]
    pub no_memory: bool,
    /// LC: peak table (name or SMILES, retention time) of at least 5 compounds measured on
    /// your column and gradient; predictions are projected onto that system.
    #[arg(long, value_name = "FILE")]
    pub calibrants: Option<PathBuf>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// Runs `phasewise predict`.
pub fn run(cli: &Cli, a: &PredictArgs) -> Result<ExitCode> {
    let mode = PhaseMode::parse(&a.mode).ok_or_else(|| {
        anyhow::anyhow!(
            "unknown mode `{}`; predict takes rp, hilic, gc, ic-anion or ic-cation",
            a.mode
        )
    })?;
    if mode == PhaseMode::IonExclusion {
        bail!(
            "predict has no retention model for `{}`; it takes rp, hilic, gc, ic-anion or ic-cation",
            a.mode
        );
    }
    let catalogue = Catalogue::builtin()?;
    let phase = catalogue.phase(&a.phase)?;
    if phase.mode() != mode {
        bail!(
            "phase `{}` is a {} phase, not {}",
            a.phase,
            phase.mode().as_str(),
            mode.as_str()
        );
    }
    let lc = matches!(mode, PhaseMode::Rp | PhaseMode::Hilic);
    // options that belong to another mode are refused rather than ignored
    let lc_only = [
        ("--gradient", a.gradient.is_some()),
        ("--ph", a.ph.is_some()),
        ("--modifier", a.modifier.is_some()),
        ("--t0", a.t0.is_some() && mode != PhaseMode::Gc),
        ("--flow", a.flow.is_some()),
        ("--particle", a.particle.is_some()),
        ("--dwell", a.dwell != 0.0),
        ("--temperature", a.temperature.is_some()),
    ];
    if !lc {
        if let Some((name, _)) = lc_only.iter().find(|(_, given)| *given) {
            bail!(
                "{name} is an LC option; for {} give {}",
                mode.as_str(),
                if mode == PhaseMode::Gc {
                    "--oven, --column LENGTH_MxID_MMxFILM_UM and --t0"
                } else {
                    "only the analytes, --phase and --risk"
                }
            );
        }
        if mode != PhaseMode::Gc && a.column.is_some() {
            bail!(
                "--column is not used for {}: the IC column is fixed (250 x 4 mm)",
                mode.as_str()
            );
        }
    } else if a.oven.is_some() {
        bail!(
            "--oven is a GC option; for {} give --gradient",
            mode.as_str()
        );
    }
    let mut opts = AdviseOptions {
        input: AnalyteInput {
            analytes: a.input.analytes.clone(),
            input: a.input.input.clone(),
        },
        detector: if lc {
            "uv:220"
        } else if mode == PhaseMode::Gc {
            "fid"
        } else {
            "conductivity"
        }
        .into(),
        column: None,
        particle: None,
        flow: None,
        dwell: 0.0,
        modes: vec![mode.as_str().to_string()],
        phases_available: None,
        alternatives: 1,
        risk: a.risk,
        no_memory: a.no_memory,
    };
    let (fixed, fixed_gc) = if lc {
        (Some(predict_lc_conditions(a, phase)?), None)
    } else if mode == PhaseMode::Gc {
        let oven = match &a.oven {
            Some(spec) => {
                let p = OvenProgram::parse(spec).with_context(|| format!("--oven `{spec}`"))?;
                if p.final_c() > phase.t_max_c() {
                    bail!(
                        "--oven {spec}: final temperature {} °C is above the maximum {} °C of phase `{}`",
                        p.final_c(),
                        phase.t_max_c(),
                        a.phase
                    );
                }
                Some(p)
            }
            None => None,
        };
        let column = a
            .column
            .as_deref()
            .map(|c| parse_gc_column(c, 35.0))
            .transpose()?;
        // every analyte on the one phase, each with its own note (model::gc::panel)
        return predict_gc(
            cli,
            a,
            phase,
            GcPanelRequest {
                column,
                oven,
                dead_time_min: a.t0,
                risk: a.risk,
            },
        );
    } else {
        (None, None)
    };
    if lc {
        opts.column = a.column.clone();
        opts.particle = a.particle;
        opts.flow = a.flow;
        opts.dwell = a.dwell;
    }
    let fixed = Fixed {
        phase: a.phase.clone(),
        lc: fixed,
        gc: fixed_gc,
    };
    let (report, partial) = advice(cli, &opts, Some(fixed.clone()))?;
    let Some(mut rec) = report.recommendations.first().cloned() else {
        bail!("no prediction could be made");
    };
    let projected = match &a.calibrants {
        Some(file) => super::calibrants::project(cli, &opts, &fixed, file, &mut rec)?,
        None => Vec::new(),
    };
    // what the user's conditions implied (buffer for the pH, flow from t0)
    let mut notes: Vec<String> = rec
        .reasons
        .iter()
        .filter(|r| r.source == "user")
        .map(|r| r.text.clone())
        .chain(projected)
        .collect();
    // A time past the end of the program is the model's extrapolation of an endless final
    // hold, not a retention time the run will show: say so beside the number.
    let run_end = rec.conditions.run_time_min;
    if run_end > 0.0 {
        for p in rec
            .predictions
            .iter()
            .filter(|p| p.retention_time_min > run_end)
        {
            notes.push(format!(
                "{}: predicted at {} min, after the program ends at {} min; it does not elute in this run (the time assumes the final conditions are held); raise the final strength or extend the program",
                p.analyte,
                num(p.retention_time_min, 1),
                num(run_end, 1)
            ));
        }
    }
    let output = PredictionOutput {
        rec: &rec,
        mode,
        notes: &notes,
        unresolved: &report.unresolved,
        warnings: &report.warnings,
        ic_reference_k: phasewise::advisor::ic::reference_retention_factor(catalogue, &rec),
    };
    write_out(&output.render(a.format.into())?)?;
    Ok(success_unless_partial(partial))
}

/// `predict --mode gc`: resolve, profile, predict the panel (`advisor::gc_predict`), render.
fn predict_gc(
    cli: &Cli,
    a: &PredictArgs,
    phase: &StationaryPhase,
    req: GcPanelRequest,
) -> Result<ExitCode> {
    if !(0.0..=1.0).contains(&a.risk) {
        bail!("--risk {}: must be between 0 and 1", a.risk);
    }
    let queries = read_analytes(&a.input)?;
    let kb = open_kb(cli, Access::Read)?;
    let (found, missing) = resolve_all(&kb, &queries)?;
    if found.is_empty() {
        bail!(
            "none of the analytes resolved: {}",
            missing
                .iter()
                .map(|u| format!("`{}` ({})", u.query, u.reason))
                .collect::<Vec<_>>()
                .join(", ")
        );
    }
    let profiles: Vec<AnalyteProfile> = found.into_iter().map(AnalyteProfile::new).collect();
    let mut report = predict_gc_panel(&profiles, phase, &req).map_err(|e| anyhow::anyhow!(e))?;
    report.unresolved = missing;
    write_out(&report.render(a.format.into())?)?;
    Ok(success_unless_partial(report.partial()))
}

/// The fixed LC conditions of `predict --mode rp|hilic`, checked.
fn predict_lc_conditions(a: &PredictArgs, phase: &StationaryPhase) -> Result<FixedLc> {
    let Some(gradient) = a.gradient.as_deref() else {
        bail!("give the gradient with --gradient, e.g. --gradient '0:5,20:95'");
    };
    if let Some(ph) = a.ph {
        let (lo, hi) = (
            phase.ph_min().unwrap_or(0.0),
            phase.ph_max().unwrap_or(14.0),
        );
        if !(lo..=hi).contains(&ph) {
            bail!(
                "--ph {ph} is outside the range {lo}-{hi} of phase `{}`",
                a.phase
            );
        }
    }
    if let Some(t) = a.temperature
        && !(t.is_finite() && (5.0..=phase.t_max_c()).contains(&t))
    {
        bail!(
            "--temperature {t}: must be between 5 °C and the maximum {} °C of phase `{}`",
            phase.t_max_c(),
            a.phase
        );
    }
    if let Some(m) = &a.modifier
        && m != "acetonitrile"
        && m != "methanol"
    {
        bail!("--modifier `{m}`: use acetonitrile or methanol");
    }
    let program = GradientProgram::parse(gradient)?;
    if let Some(t0) = a.t0 {
        if !(t0 > 0.0 && t0.is_finite()) {
            bail!("--t0 {t0}: must be a positive number of minutes");
        }
    } else if a.flow.is_none() {
        bail!(
            "give the dead time with --t0 MIN, or the column with --column LxID and --flow ML_MIN"
        );
    }
    Ok(FixedLc {
        gradient: program
            .points()
            .iter()
            .map(|p| (p.time_min, p.organic_pct))
            .collect(),
        ph: a.ph,
        modifier: a.modifier.clone(),
        t0_min: a.t0,
        temperature_c: a.temperature,
    })
}
