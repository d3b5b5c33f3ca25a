//! `scout --mode rp|hilic`: fit log kw and S per analyte to the gradient runs (per
//! temperature with `--temperatures`), then search the gradient (and the temperature).

use std::process::ExitCode;

use anyhow::{Context, Result, bail};

use phasewise::measured::lc_temperature::{
    TemperatureError, optimise_temperature, temperature_model,
};
use phasewise::measured::optimise::{
    OptimiseError, OptimiseRequest, PlateSource, Range, optimise, render_window_svg,
};
use phasewise::measured::scout::{
    CompositionBasis, ScoutError, ScoutFit, ScoutRequest, ScoutRun, fit_in,
};
use phasewise::model::gradient::GradientProgram;
use phasewise::report::chromatogram::render_optimum_svg;
use phasewise::report::measured::scout::{
    SCOUT_SCHEMA_VERSION, ScoutOutput, TemperatureFitOutput, TemperatureOutput, program_text,
    window_tsv,
};

use super::store::{store_fits, store_target};
use super::{
    ScoutArgs, ScoutMode, per_run, progress, refuse_options, too_few_peaks, write_scout_outputs,
};
use crate::cli::Cli;
use crate::cli::exit::success_unless_partial;
use crate::cli::input::{
    NumberRange, check_option_range, dead_time_input, parse_column, read_retention_peaks,
};
use crate::cli::output::check_writable;

/// Plate number assumed by `scout` when neither `--plates` nor `--particle` is given (common
/// practice, no source: a typical value for a 150 mm column of 5 µm particles).
const DEFAULT_PLATES: f64 = 10_000.0;

pub(super) fn split_programs(spec: &str, runs: usize) -> Result<Vec<GradientProgram>> {
    per_run(spec, runs, "--gradients", "gradient program", |p| {
        Ok(GradientProgram::parse(p)?)
    })
}

/// Runs `phasewise scout --mode rp|hilic`.
pub(super) fn run(cli: &Cli, a: &ScoutArgs) -> Result<ExitCode> {
    refuse_options(
        "a GC option; in LC mode give --gradients (or add --mode gc)",
        &[
            ("--ovens", a.ovens.is_some()),
            ("--velocity", a.velocity.is_some()),
            ("--initial-range", a.initial_range.is_some()),
            ("--ramp-range", a.ramp_range.is_some()),
            ("--initial-hold", a.initial_hold.is_some()),
            ("--max-temperature", a.max_temperature.is_some()),
        ],
    )?;
    if !a.store
        && let Some((option, _)) = [
            ("--phase", a.phase.is_some()),
            ("--modifier", a.modifier.is_some()),
            ("--ph", a.ph.is_some()),
            ("--temperature", a.temperature.is_some()),
            ("--source", a.source.is_some()),
        ]
        .iter()
        .find(|(_, given)| *given)
    {
        bail!("{option} describes the runs for --store; give --store too (or leave {option} out)");
    }
    let Some(gradients) = a.gradients.as_deref() else {
        bail!(
            "--gradients is needed in LC mode: one `time:%organic` program per run, separated by `;` (for GC runs add --mode gc and --ovens)"
        );
    };
    let hilic = a.mode == ScoutMode::Hilic;
    let basis = if hilic {
        CompositionBasis::Water
    } else {
        CompositionBasis::Organic
    };
    // HILIC defaults (common practice, no source): start with 3–20 % water, end at 30–50 %.
    let (start_default, end_default) = if hilic {
        ((80.0, 97.0), (50.0, 70.0))
    } else {
        ((5.0, 40.0), (60.0, 95.0))
    };
    let ranges = LcRanges {
        tg: a.tg_range.unwrap_or(NumberRange {
            min: 5.0,
            max: 60.0,
        }),
        start: a.start_range.unwrap_or(NumberRange {
            min: start_default.0,
            max: start_default.1,
        }),
        end: a.end_range.unwrap_or(NumberRange {
            min: end_default.0,
            max: end_default.1,
        }),
    };
    check_scout_options(a, &ranges, hilic)?;
    // The optimiser searches the strong-solvent composition: % water in HILIC.
    let strong = |r: NumberRange| {
        if hilic {
            NumberRange {
                min: 100.0 - r.max,
                max: 100.0 - r.min,
            }
        } else {
            r
        }
    };
    let search = LcRanges {
        tg: ranges.tg,
        start: strong(ranges.start),
        end: strong(ranges.end),
    };
    let column = a
        .column
        .as_deref()
        .map(parse_column)
        .transpose()
        .map_err(|e| anyhow::anyhow!("--column: {e}"))?;
    let dead_time = dead_time_input(a.t0, column, a.flow)?;
    let programs = split_programs(gradients, a.runs.len())?;
    let program_specs: Vec<String> = programs.iter().map(GradientProgram::to_spec).collect();
    let store = store_target(a)?;
    for out in a
        .window_svg
        .iter()
        .chain(a.window_data.iter())
        .chain(a.chromatogram_svg.iter())
    {
        check_writable(out)?;
    }
    let (plates, plates_source) = match (a.plates, a.particle, column) {
        (Some(n), _, _) => (PlateSource::Given { plates: n }, format!("given: {n}")),
        (None, Some(dp), Some(c)) => (
            PlateSource::Estimated {
                column_length_mm: c.length_mm,
                particle_size_um: dp,
            },
            format!(
                "estimated N = L/(2.5·dp) for L = {} mm, dp = {dp} µm",
                c.length_mm
            ),
        ),
        _ => (
            PlateSource::Given {
                plates: DEFAULT_PLATES,
            },
            format!(
                "assumed {DEFAULT_PLATES} (common practice, no source); give --plates or --particle"
            ),
        ),
    };
    let mut runs = Vec::new();
    for (path, program) in a.runs.iter().zip(programs) {
        runs.push(ScoutRun {
            name: path.file_name().map_or_else(
                || path.display().to_string(),
                |n| n.to_string_lossy().into(),
            ),
            program,
            peaks: read_retention_peaks(path)?,
        });
    }
    // retention-only tables are fine for the fit; say where predicted widths come from
    let no_width: usize = runs.iter().map(|r| r.peaks.peaks_without_width()).sum();
    let plates_source = if no_width > 0 {
        format!(
            "{plates_source}; {no_width} peak(s) in the tables have no width (not needed for the \
             fit): every predicted peak width is estimated from this plate number"
        )
    } else {
        plates_source
    };
    let run_temperatures = match a.temperatures.as_deref() {
        Some(text) => {
            if a.store {
                bail!(
                    "--temperatures with --store: store the fits of one temperature at a time (one `scout --store --temperature T` per temperature)"
                );
            }
            Some(parse_temperatures(text, runs.len())?)
        }
        None => None,
    };
    let analytes = runs.first().map_or(0, |r| r.peaks.peaks().len());
    progress(analytes, "peak tables read; fitting log kw and S");
    let fit_runs = |runs: Vec<ScoutRun>| {
        fit_in(
            &ScoutRequest {
                runs,
                dead_time,
                dwell_volume_ml: a.dwell,
                flow_ml_min: a.flow,
            },
            basis,
        )
        .map_err(|e| scout_error(e, a))
    };
    let mut temperature_fits: Vec<(f64, ScoutFit)> = Vec::new();
    let fitted = match &run_temperatures {
        None => fit_runs(runs)?,
        Some(ts) => {
            let mut distinct: Vec<f64> = ts.clone();
            distinct.sort_by(f64::total_cmp);
            distinct.dedup();
            for t in &distinct {
                let group: Vec<ScoutRun> = runs
                    .iter()
                    .zip(ts)
                    .filter(|(_, u)| *u == t)
                    .map(|(r, _)| r.clone())
                    .collect();
                let f = fit_runs(group)
                    .with_context(|| format!("the runs at {t} °C (--temperatures)"))?;
                temperature_fits.push((*t, f));
            }
            match temperature_fits.first() {
                Some((_, f)) => f.clone(),
                None => bail!("--temperatures gives no temperature"),
            }
        }
    };
    let req = OptimiseRequest {
        analytes: OptimiseRequest::analytes_from_fit(&fitted),
        dead_time_min: fitted.dead_time_min,
        dwell_time_min: fitted.dwell_time_min,
        plates,
        gradient_time_min: Range {
            min: ranges.tg.min,
            max: ranges.tg.max,
        },
        initial_pct: Range {
            min: search.start.min,
            max: search.start.max,
        },
        final_pct: Range {
            min: search.end.min,
            max: search.end.max,
        },
        max_run_time_min: a.max_run_time,
        critical_pairs: a.critical.clone(),
        two_segment: a.two_segment,
        target_resolution: a.target_resolution,
        min_retention_factor: a.min_k,
        gradient_time_steps: 25,
        composition_step_pct: 5.0,
    };
    progress(
        analytes,
        "fit done; searching gradient programs (time grows linearly with the analytes)",
    );
    let optimise_error = |e: OptimiseError| optimise_error(e, a, &ranges);
    let (mut report, temperature) = if temperature_fits.is_empty() {
        (optimise(&req).map_err(optimise_error)?, None)
    } else {
        let model = temperature_model(&temperature_fits)
            .map_err(|e| anyhow::anyhow!("--temperatures: {e}"))?;
        let range = a.temperature_range.map_or_else(
            || Range {
                min: model.temperatures_c.first().copied().unwrap_or(0.0),
                max: model.temperatures_c.last().copied().unwrap_or(0.0),
            },
            |r| Range {
                min: r.min,
                max: r.max,
            },
        );
        let found = optimise_temperature(&model, &req, range, 5.0).map_err(|e| match e {
            TemperatureError::Optimise(o) => optimise_error(o),
            TemperatureError::BadTemperature { .. } => anyhow::anyhow!("--temperature-range: {e}"),
            other => anyhow::anyhow!("--temperatures: {other}"),
        })?;
        let mut points = found.points.clone();
        if hilic {
            for p in &mut points {
                if let Ok(g) = GradientProgram::parse(&p.program) {
                    p.program = program_text(&g.complement());
                }
            }
        }
        let json = TemperatureOutput {
            chosen_c: found.temperature_c,
            extrapolated: found.extrapolated,
            model,
            points,
            fits: temperature_fits
                .iter()
                .map(|(t, f)| TemperatureFitOutput {
                    temperature_c: *t,
                    fit: f.clone(),
                })
                .collect(),
        };
        (found.report, Some(json))
    };
    if hilic {
        // Back from % water to % organic, as the programs are typed.
        report.complement();
    }
    let output = ScoutOutput {
        schema_version: SCOUT_SCHEMA_VERSION,
        plates_source: plates_source.clone(),
        fit: &fitted,
        optimisation: &report,
        temperature: temperature.as_ref(),
    };
    progress(analytes, "search done; writing the report");
    let text = phasewise::report::measured::render(&output, a.format.into())?;
    let left_out = match &store {
        Some(t) => store_fits(cli, a, t, &fitted, &program_specs)?,
        None => Vec::new(),
    };
    write_scout_outputs(
        a,
        &text,
        || render_window_svg(&report.window),
        || window_tsv(&report),
        || {
            render_optimum_svg(
                &report.optimum,
                fitted.dead_time_min,
                a.target_resolution,
                "Predicted chromatogram at the chosen gradient",
            )
        },
    )?;
    Ok(success_unless_partial(!left_out.is_empty()))
}

/// A scouting-fit error with the option (or the file) the user can change named first.
fn scout_error(e: ScoutError, a: &ScoutArgs) -> anyhow::Error {
    match e {
        ScoutError::PeakBeforeDeadTime { .. } => anyhow::anyhow!(
            "{e} (t0 from {})",
            if a.t0.is_some() {
                "--t0"
            } else {
                "--column and --flow"
            }
        ),
        ScoutError::InconsistentFlow { .. } | ScoutError::FlowNeeded { .. } => {
            anyhow::anyhow!("--flow, --dwell: {e}")
        }
        other => anyhow::Error::new(other).context("fitting log kw and S to the scouting runs"),
    }
}

/// An optimiser error naming the options that widen the search rather than library fields.
fn optimise_error(e: OptimiseError, a: &ScoutArgs, r: &LcRanges) -> anyhow::Error {
    match e {
        // Name the options that widen the search rather than the library's fields.
        OptimiseError::NoFeasibleCondition { .. } => anyhow::anyhow!(
            "no gradient within --tg-range {},{}, --start-range {},{} and --end-range {},{} \
             elutes every analyte within --max-run-time {} min; raise --max-run-time, the top \
             of --end-range, or lower the top of --tg-range",
            r.tg.min,
            r.tg.max,
            r.start.min,
            r.start.max,
            r.end.min,
            r.end.max,
            a.max_run_time
        ),
        OptimiseError::UnknownAnalyte { .. } | OptimiseError::CriticalPairSameAnalyte { .. } => {
            anyhow::anyhow!("--critical: {e}")
        }
        OptimiseError::TooFewAnalytes { .. } => too_few_peaks(e, a),
        other => anyhow::Error::new(other).context("optimising the gradient"),
    }
}

/// `--temperatures`: one column temperature (°C) per run, separated by `;`.
pub(super) fn parse_temperatures(text: &str, runs: usize) -> Result<Vec<f64>> {
    per_run(text, runs, "--temperatures", "temperature", |p| {
        match p.parse::<f64>() {
            Ok(v) if v.is_finite() && (-10.0..=200.0).contains(&v) => Ok(v),
            Ok(v) => bail!("{v} °C must lie between -10 and 200 °C"),
            Err(_) => bail!("`{p}` is not a temperature in °C"),
        }
    })
}

/// The LC search ranges, defaults applied.
struct LcRanges {
    tg: NumberRange,
    start: NumberRange,
    end: NumberRange,
}

/// Option checks that the library would otherwise report with its own field names.
fn check_scout_options(a: &ScoutArgs, r: &LcRanges, hilic: bool) -> Result<()> {
    if a.dwell > 0.0 && a.flow.is_none() {
        bail!(
            "--dwell {} mL needs --flow ML_MIN to be turned into a dwell time",
            a.dwell
        );
    }
    check_option_range(
        "--tg-range",
        r.tg,
        f64::MIN_POSITIVE,
        f64::MAX,
        "gradient times must be greater than zero",
    )?;
    let pct = "compositions are % organic";
    check_option_range("--start-range", r.start, 0.0, 100.0, pct)?;
    check_option_range("--end-range", r.end, 0.0, 100.0, pct)?;
    if hilic && r.end.min >= r.start.max {
        bail!(
            "--end-range {},{} never falls below --start-range {},{}: in HILIC the final % organic must be able to fall below the initial",
            r.end.min,
            r.end.max,
            r.start.min,
            r.start.max
        );
    }
    if !hilic && r.end.max <= r.start.min {
        bail!(
            "--end-range {},{} never exceeds --start-range {},{}: the final % organic must be able to exceed the initial",
            r.end.min,
            r.end.max,
            r.start.min,
            r.start.max
        );
    }
    for (option, range) in [
        ("--tg-range", r.tg),
        ("--start-range", r.start),
        ("--end-range", r.end),
    ] {
        if (range.max * 10.0 + 1e-9).floor() < (range.min * 10.0 - 1e-9).ceil() {
            bail!(
                "{option} {},{} holds no value on the 0.1 grid in which programs are written; widen it",
                range.min,
                range.max
            );
        }
    }
    Ok(())
}
