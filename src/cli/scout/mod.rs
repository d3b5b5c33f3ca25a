//! `phasewise scout`: fit retention models to two or more scouting runs and optimise the
//! method. LC (`--mode rp|hilic`, log k = log kw − S φ, then the gradient) is in `lc.rs`, GC
//! (`--mode gc`, ln k = A + B/T, then the oven program) in `gc.rs`; `--store` (the fits into
//! the user overlay) in `store.rs`. This file holds the options and what both share.

mod gc;
mod lc;
mod store;

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};

use super::Cli;
use super::input::{NumberRange, non_negative_arg, pair_arg, positive_arg, range_arg};
use super::output::{ReportFormat, write_atomically, write_out};

/// `scout` help footer.
pub const SCOUT_HELP: &str = "\
LC: the gradient programs are `time:%organic` points, one program per run, separated by `;`,
in the order of the run files; with --mode hilic log kw and S are fitted in the water fraction
(1 - %organic/100). GC (--mode gc): the oven programs are
INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN, one per run, separated by `;`; the runs
should differ in ramp rate (a factor of 2-3) or initial temperature. Recommendations are
starting points: verify them by a run. GC: hydrogen carrier is flammable; never exceed the
phase's maximum temperature.

Example:
  phasewise scout fast.csv slow.csv --gradients '0:5,10:95;0:5,30:95' \\
      --column 150x4.6 --flow 1.0 --dwell 0.8 --window-svg window.svg
  phasewise scout --mode gc slow.csv fast.csv --ovens '40:1,5:300:5;40:1,15:300:5' \\
      --column 30x0.25x0.25 --velocity 35 --phase gc-5-phenyl --window-svg ramp-window.svg";

/// Which chromatography the scouting runs are.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ScoutMode {
    /// Reversed-phase LC: gradient runs, log k = log kw − S φ (φ the organic fraction).
    Rp,
    /// HILIC: gradient runs, log k = log kw − S ψ with ψ = 1 − %organic/100 (water is the
    /// strong solvent, so S is positive).
    Hilic,
    /// Gas chromatography: oven-program runs, ln k = A + B/T.
    Gc,
}

/// `scout` options.
#[derive(Debug, Args)]
pub struct ScoutArgs {
    /// Peak tables of the scouting runs (same sample and flow, different gradients or oven
    /// programs), 2 or more.
    #[arg(value_name = "RUN", num_args = 2.., required = true)]
    pub runs: Vec<PathBuf>,
    /// The runs: reversed-phase or HILIC gradients (LC), or GC oven programs.
    #[arg(long, value_enum, default_value_t = ScoutMode::Rp)]
    pub mode: ScoutMode,
    /// LC: gradient programs, one per run in the same order, separated by `;`:
    /// `0:5,10:95;0:5,30:95` (time min : % organic).
    #[arg(long, value_name = "PROGRAMS")]
    pub gradients: Option<String>,
    /// GC: oven programs, one per run in the same order, separated by `;`, each
    /// `INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN` (as `predict --oven`), e.g.
    /// `40:1,5:300:5;40:1,15:300:5`.
    #[arg(long, value_name = "PROGRAMS")]
    pub ovens: Option<String>,
    /// Dead time t0 (GC: hold-up time t_M, e.g. from an unretained methane peak), min.
    #[arg(long, value_name = "MIN", conflicts_with = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub t0: Option<f64>,
    /// LC: column as LENGTHxID in mm (e.g. `150x4.6`), t0 estimated with Vm ≈ 0.5·L·dc² (needs
    /// --flow). GC: `LENGTH_MxID_MMxFILM_UM` (e.g. `30x0.25x0.25`), t_M = L/u with --velocity.
    #[arg(long, value_name = "COLUMN")]
    pub column: Option<String>,
    /// GC: average carrier linear velocity, cm/s, for t_M from --column (default 35, as
    /// `predict --mode gc` assumes).
    #[arg(long, value_name = "CM_S", requires = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub velocity: Option<f64>,
    /// Flow rate, mL/min (needed with --column, and with --t0 when --dwell is not zero).
    #[arg(long, value_name = "ML_MIN", value_parser = positive_arg, allow_negative_numbers = true)]
    pub flow: Option<f64>,
    /// Dwell (gradient delay) volume, mL.
    #[arg(long, value_name = "ML", default_value_t = 0.0, value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub dwell: f64,
    /// LC: allowed gradient time, `MIN,MAX` in min [default: 5,60].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub tg_range: Option<NumberRange>,
    /// LC: allowed initial composition, `MIN,MAX` in % organic [default: 5,40; HILIC 80,97].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub start_range: Option<NumberRange>,
    /// LC: allowed final composition, `MIN,MAX` in % organic [default: 60,95; HILIC 50,70].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub end_range: Option<NumberRange>,
    /// LC: column temperature of each run, °C, in run order, separated by `;` (e.g.
    /// `30;30;50;50` for two gradients at each of two temperatures): log kw and S are fitted
    /// per temperature, taken linear in 1/T, and the temperature is searched with the gradient.
    #[arg(long, value_name = "TEMPS")]
    pub temperatures: Option<String>,
    /// LC with --temperatures: allowed column temperature, `MIN,MAX` in °C [default: the
    /// scouted temperatures' range]; searched in 5 °C steps.
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true, requires = "temperatures")]
    pub temperature_range: Option<NumberRange>,
    /// GC: allowed initial oven temperature, `MIN,MAX` in °C [default: 40,150, capped at the
    /// maximum temperature].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub initial_range: Option<NumberRange>,
    /// GC: allowed ramp rate, `MIN,MAX` in °C/min [default: 2,30].
    #[arg(long, value_name = "MIN,MAX", value_parser = range_arg, allow_hyphen_values = true)]
    pub ramp_range: Option<NumberRange>,
    /// GC: initial hold of the optimised program, min [default: 1].
    #[arg(long, value_name = "MIN", value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub initial_hold: Option<f64>,
    /// GC: highest oven temperature allowed, °C (default: the limit of --phase; one of the two
    /// is needed in GC mode, and the lower wins when both are given).
    #[arg(long, value_name = "C", allow_negative_numbers = true)]
    pub max_temperature: Option<f64>,
    /// Latest allowed elution of the last peak, min.
    #[arg(long, value_name = "MIN", default_value_t = 60.0, value_parser = positive_arg, allow_negative_numbers = true)]
    pub max_run_time: f64,
    /// Optimise only this pair's resolution, `first,second`; repeatable.
    #[arg(long, value_name = "A,B", value_parser = pair_arg)]
    pub critical: Vec<[String; 2]>,
    /// Plate number for predicted widths (LC default: from --particle and the column length,
    /// else 10 000 assumed; GC default: the median apparent plate number of the runs' own peak
    /// widths).
    #[arg(long, value_name = "N", conflicts_with = "particle", value_parser = positive_arg, allow_negative_numbers = true)]
    pub plates: Option<f64>,
    /// Particle size, µm: estimate N = L/(2.5·dp) from it and the --column length.
    #[arg(long, value_name = "UM", requires = "column", value_parser = positive_arg, allow_negative_numbers = true)]
    pub particle: Option<f64>,
    /// Resolution target: the shortest run whose smallest Rs reaches it is chosen (if none
    /// does, the largest smallest Rs); drawn in the window diagram.
    #[arg(long, value_name = "RS", default_value_t = 1.5, value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub target_resolution: f64,
    /// Smallest acceptable retention factor k = (tR − t0)/t0 of the first peak.
    #[arg(long, value_name = "K", default_value_t = 1.0, value_parser = non_negative_arg, allow_negative_numbers = true)]
    pub min_k: f64,
    /// Also try a two-segment gradient.
    #[arg(long)]
    pub two_segment: bool,
    /// Write the window diagram (smallest Rs versus gradient time) as SVG.
    #[arg(long, value_name = "FILE")]
    pub window_svg: Option<PathBuf>,
    /// Write the window diagram data as TSV.
    #[arg(long, value_name = "FILE")]
    pub window_data: Option<PathBuf>,
    /// Write the predicted chromatogram at the chosen conditions as SVG.
    #[arg(long, value_name = "FILE")]
    pub chromatogram_svg: Option<PathBuf>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = ReportFormat::Table)]
    pub format: ReportFormat,
    /// Store the fitted log kw and S of every well-determined analyte in the user knowledge
    /// base, so that later `advise` and `predict` use them. Needs --phase, --modifier, --ph
    /// and --source; every analyte name must resolve in the knowledge base.
    #[arg(long)]
    pub store: bool,
    /// Stationary-phase id of the runs: an RP or HILIC phase of the catalogue, for --store; in
    /// GC mode a GC phase, whose maximum temperature limits the programs.
    #[arg(long, value_name = "ID")]
    pub phase: Option<String>,
    /// Organic modifier of the runs: acetonitrile or methanol, for --store.
    #[arg(long, value_name = "NAME", requires = "store")]
    pub modifier: Option<String>,
    /// Aqueous pH of the runs (inside the phase's range), for --store.
    #[arg(
        long,
        value_name = "PH",
        requires = "store",
        allow_negative_numbers = true
    )]
    pub ph: Option<f64>,
    /// Column temperature of the runs, °C, for --store.
    #[arg(
        long,
        value_name = "C",
        requires = "store",
        allow_negative_numbers = true
    )]
    pub temperature: Option<f64>,
    /// Where the runs are recorded (e.g. "lab notebook 12 p. 4"); required with --store.
    #[arg(long, value_name = "TEXT", requires = "store")]
    pub source: Option<String>,
    /// Buffer or additive of the aqueous phase of the runs, for --store (e.g. `0.1 % formic
    /// acid`, `10 mM ammonium acetate`, or a buffer id such as `ammonium-formate-1`); a later
    /// prediction with another additive does not use the fit directly.
    #[arg(long, value_name = "TEXT", requires = "store")]
    pub buffer: Option<String>,
}
/// Runs `phasewise scout`.
pub fn run(cli: &Cli, a: &ScoutArgs) -> Result<ExitCode> {
    match a.mode {
        ScoutMode::Gc => gc::run(a),
        ScoutMode::Rp | ScoutMode::Hilic => lc::run(cli, a),
    }
}

/// Peak tables with more analytes than this get one progress line on stderr per stage of the
/// work (reading, fitting, searching, writing), so a long run is never silent. At about 0.6 s
/// of CPU per 1,000 analytes for the search (docs/performance.md), 10,000 analytes take a few
/// seconds.
pub(super) const PROGRESS_ABOVE_ANALYTES: usize = 10_000;

/// One progress line on stderr (`scout: ...`) when the run has more than
/// [`PROGRESS_ABOVE_ANALYTES`] analytes; nothing for ordinary tables.
pub(super) fn progress(analytes: usize, stage: &str) {
    if analytes > PROGRESS_ABOVE_ANALYTES {
        crate::cli::output::note(&format!("scout: {stage} ({analytes} analytes)"));
    }
}

/// Splits a `;`-separated list with one item per run file, parsing each item; messages name
/// the option, the item's place and text.
pub(super) fn per_run<T>(
    spec: &str,
    runs: usize,
    option: &str,
    what: &str,
    parse: impl Fn(&str) -> Result<T>,
) -> Result<Vec<T>> {
    let parts: Vec<&str> = spec.split(';').map(str::trim).collect();
    if parts.len() != runs {
        bail!(
            "{option} gives {} {what}(s) (`{spec}`) for {runs} run files; give one per run, separated by `;`",
            parts.len()
        );
    }
    parts
        .iter()
        .enumerate()
        .map(|(i, p)| parse(p).with_context(|| format!("{what} {} `{p}` in {option}", i + 1)))
        .collect()
}

/// Writes the files a scouting run was asked for (`--window-svg`, `--window-data`,
/// `--chromatogram-svg`; each atomically, each built only when its option is given), then the
/// report on stdout.
pub(super) fn write_scout_outputs(
    a: &ScoutArgs,
    text: &str,
    window_svg: impl FnOnce() -> String,
    window_data: impl FnOnce() -> String,
    chromatogram_svg: impl FnOnce() -> String,
) -> Result<()> {
    if let Some(p) = &a.window_svg {
        write_atomically(p, window_svg())?;
    }
    if let Some(p) = &a.window_data {
        write_atomically(p, window_data())?;
    }
    if let Some(p) = &a.chromatogram_svg {
        write_atomically(p, chromatogram_svg())?;
    }
    write_out(text)
}

/// The optimiser's "too few analytes" error `e`, naming the peak tables given.
pub(super) fn too_few_peaks(e: impl std::fmt::Display, a: &ScoutArgs) -> anyhow::Error {
    anyhow::anyhow!(
        "{e}: the peak tables {} name fewer than two peaks",
        a.runs
            .iter()
            .map(|p| p.display().to_string())
            .collect::<Vec<_>>()
            .join(", ")
    )
}

/// Refuses options of the other mode rather than ignoring them, naming the first one given.
pub(super) fn refuse_options(why: &str, options: &[(&str, bool)]) -> Result<()> {
    if let Some((name, _)) = options.iter().find(|(_, given)| *given) {
        bail!("{name} is {why}");
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::gc::split_ovens;
    use super::lc::{parse_temperatures, split_programs};
    use proptest::prelude::*;

    #[test]
    fn per_run_lists_name_the_option_the_count_and_the_bad_item() {
        let e = format!("{:#}", parse_temperatures("30;x", 2).unwrap_err());
        assert!(e.contains("--temperatures") && e.contains("`x`"), "{e}");
        let e = format!("{:#}", parse_temperatures("30;40;50", 2).unwrap_err());
        assert!(
            e.contains("3 temperature(s)") && e.contains("2 run files"),
            "{e}"
        );
        let e = format!("{:#}", parse_temperatures("30;500", 2).unwrap_err());
        assert!(e.contains("500 °C must lie between"), "{e}");
        assert_eq!(
            parse_temperatures(" 30 ; 60 ", 2).unwrap(),
            vec![30.0, 60.0]
        );
        let e = format!(
            "{:#}",
            split_ovens("40:1,5:300:5;40:1,x:300:5", 2).unwrap_err()
        );
        assert!(e.contains("oven program 2") && e.contains("--ovens"), "{e}");
        let e = format!("{:#}", split_programs("0:5,10:95", 2).unwrap_err());
        assert!(e.contains("--gradients gives 1 gradient program(s)"), "{e}");
    }

    proptest! {
        // Any text: a list of the right length or an error, never a panic; accepted
        // temperatures are inside the stated range.
        #[test]
        fn per_run_lists_never_panic(text in "\\PC{0,40}", runs in 1usize..4) {
            if let Ok(t) = parse_temperatures(&text, runs) {
                prop_assert_eq!(t.len(), runs);
                prop_assert!(t.iter().all(|v| (-10.0..=200.0).contains(v)));
            }
            if let Ok(p) = split_ovens(&text, runs) {
                prop_assert_eq!(p.len(), runs);
            }
            if let Ok(p) = split_programs(&text, runs) {
                prop_assert_eq!(p.len(), runs);
            }
        }

        #[test]
        fn valid_temperature_lists_are_read_back(ts in proptest::collection::vec(-10i32..=200, 1..5)) {
            let text: Vec<String> = ts.iter().map(i32::to_string).collect();
            let got = parse_temperatures(&text.join(";"), ts.len()).unwrap();
            let want: Vec<f64> = ts.iter().map(|&t| f64::from(t)).collect();
            prop_assert_eq!(got, want);
        }
    }
}
