//! `scout --mode gc`: fit ln k = A + B/T per analyte to the oven-program runs, then search the
//! oven program (initial temperature and ramp) within the phase's limit.

use std::process::ExitCode;

use anyhow::{Context, Result, bail};

use phasewise::measured::gc_optimise::{
    GcOptimiseError, GcOptimiseRequest, TemperatureRange, optimise_gc, render_gc_window_svg,
};
use phasewise::measured::gc_scout::{
    GcScoutError, GcScoutRequest, GcScoutRun, apparent_plates, fit_gc,
};
use phasewise::model::gc::OvenProgram;
use phasewise::phase::{Catalogue, PhaseMode};
use phasewise::report::chromatogram::render_gc_optimum_svg;
use phasewise::report::measured::gc_scout::{
    GC_SAFETY, GcScoutOutput, SCOUT_GC_SCHEMA_VERSION, gc_window_tsv,
};

use super::{ScoutArgs, per_run, progress, refuse_options, too_few_peaks, write_scout_outputs};
use crate::cli::input::{NumberRange, check_option_range, parse_gc_column, read_retention_peaks};
use crate::cli::output::check_writable;

/// Carrier velocity assumed for t_M from a GC `--column` when `--velocity` is not given, cm/s
/// (the value `predict --mode gc` assumes; common practice for helium, no source).
const DEFAULT_GC_VELOCITY_CM_S: f64 = 35.0;

pub(super) fn split_ovens(spec: &str, runs: usize) -> Result<Vec<OvenProgram>> {
    per_run(spec, runs, "--ovens", "oven program", |p| {
        Ok(OvenProgram::parse(p)?)
    })
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
pub(super) fn run(a: &ScoutArgs) -> Result<ExitCode> {
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
            peaks: read_retention_peaks(path)?,
        });
    }
    let analytes = runs.first().map_or(0, |r| r.peaks.peaks().len());
    progress(analytes, "peak tables read; fitting ln k = A + B/T");
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
    progress(
        analytes,
        "fit done; searching oven programs (time grows linearly with the analytes)",
    );
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
        GcOptimiseError::TooFewAnalytes { .. } => too_few_peaks(e, a),
        other => anyhow::Error::new(other).context("optimising the oven program"),
    })?;
    let output = GcScoutOutput {
        schema_version: SCOUT_GC_SCHEMA_VERSION,
        mode: "gc",
        holdup_source: holdup_source.clone(),
        plates_source: plates_source.clone(),
        fit: &fitted,
        optimisation: &report,
        safety: GC_SAFETY,
    };
    let text = phasewise::report::measured::render(&output, a.format.into())?;
    write_scout_outputs(
        a,
        &text,
        || render_gc_window_svg(&report.window),
        || gc_window_tsv(&report),
        || {
            render_gc_optimum_svg(
                &report.optimum,
                fitted.holdup_time_min,
                a.target_resolution,
                "Predicted chromatogram at the chosen oven program",
            )
        },
    )?;
    Ok(ExitCode::SUCCESS)
}
