//! The LC `scout` report: the log kw/S fit, the temperature model (with `--temperatures`), the
//! optimum gradient and its predicted peaks, and the window-diagram data as TSV.

use serde::Serialize;

use super::{
    Render, WindowRow, choice_lines, label, num, predicted_pairs_table, predicted_peak_row,
    predicted_peaks_table, window_tsv_rows,
};
use crate::measured::lc_temperature::{TemperatureModel, TemperaturePoint};
use crate::measured::optimise::{OptimiseReport, Prediction};
use crate::measured::scout::{CompositionBasis, FitFlag, ScoutFit};
use crate::model::gradient::GradientProgram;
use crate::report::csv_num;
use crate::report::table::render;

/// Schema version of the `scout` JSON output (2: the optimiser's selection rule, first-peak
/// retention and rounded programs; `rounded` removed).
pub const SCOUT_SCHEMA_VERSION: u32 = 2;

/// JSON output of `scout` (schema version [`SCOUT_SCHEMA_VERSION`]).
#[derive(Serialize)]
pub struct ScoutOutput<'a> {
    /// [`SCOUT_SCHEMA_VERSION`].
    pub schema_version: u32,
    /// Where the plate number for widths came from.
    pub plates_source: String,
    /// The fit (at the first temperature with `--temperatures`).
    pub fit: &'a ScoutFit,
    /// The optimum and the window diagram.
    pub optimisation: &'a OptimiseReport,
    /// The temperature model and search with `--temperatures`; null without.
    pub temperature: Option<&'a TemperatureOutput>,
}

impl Render for ScoutOutput<'_> {
    fn table(&self) -> String {
        let mut t = String::new();
        if let Some(tj) = self.temperature {
            for f in &tj.fits {
                t.push_str(&format!("At {} °C:\n", f.temperature_c));
                t.push_str(&scout_fit_table(&f.fit));
                t.push_str("\n\n");
            }
            t.push_str(&temperature_table(tj));
            t.push('\n');
            t.push_str(&scout_optimum_table(self.optimisation, &self.plates_source));
        } else {
            t = scout_table(self.fit, self.optimisation, &self.plates_source);
        }
        t
    }
}

/// The fits at one temperature of `--temperatures`.
#[derive(Serialize)]
pub struct TemperatureFitOutput {
    /// Column temperature, °C.
    pub temperature_c: f64,
    /// The fit of the runs at that temperature.
    pub fit: ScoutFit,
}

/// `temperature` in the `scout` JSON when `--temperatures` is given.
#[derive(Serialize)]
pub struct TemperatureOutput {
    /// Chosen column temperature, °C.
    pub chosen_c: f64,
    /// Outside the scouted temperatures.
    pub extrapolated: bool,
    /// log kw and S as lines in 1/T.
    pub model: TemperatureModel,
    /// The best gradient at every temperature searched.
    pub points: Vec<TemperaturePoint>,
    /// The fit at each scouted temperature.
    pub fits: Vec<TemperatureFitOutput>,
}

fn temperature_table(t: &TemperatureOutput) -> String {
    let rows: Vec<Vec<String>> = t
        .model
        .analytes
        .iter()
        .map(|a| {
            let (lk, s) = a.at(t.chosen_c);
            vec![
                a.name.clone(),
                num(Some(a.log_kw_intercept), 3),
                num(Some(a.log_kw_slope_k), 0),
                num(Some(a.s_intercept), 3),
                num(Some(a.s_slope_k), 0),
                num(Some(lk), 3),
                num(Some(s), 3),
                if a.from_flagged_fit {
                    "from a flagged fit".into()
                } else {
                    String::new()
                },
            ]
        })
        .collect();
    let mut s = format!(
        "log kw = a + b/T and S = c + d/T (T in K) through the fits at {}:\n",
        t.model
            .temperatures_c
            .iter()
            .map(|x| format!("{x} °C"))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let at_lk = format!("log kw at {} °C", t.chosen_c);
    let at_s = format!("S at {} °C", t.chosen_c);
    s.push_str(&render(
        &[
            "analyte", "a (–)", "b (K)", "c (–)", "d (K)", &at_lk, &at_s, "",
        ],
        &rows,
    ));
    let pts: Vec<Vec<String>> = t
        .points
        .iter()
        .map(|p| {
            vec![
                num(Some(p.temperature_c), 1),
                p.program.clone(),
                num(Some(p.min_resolution), 2),
                num(Some(p.run_time_min), 2),
                if p.meets_target { "met" } else { "not met" }.into(),
                if (p.temperature_c - t.chosen_c).abs() < 1e-9 {
                    "chosen".into()
                } else {
                    String::new()
                },
            ]
        })
        .collect();
    s.push_str("\n\nBest gradient at each temperature:\n");
    s.push_str(&render(
        &[
            "temperature (°C)",
            "program (time min : % organic)",
            "smallest Rs (–)",
            "last peak (min)",
            "target",
            "",
        ],
        &pts,
    ));
    s.push('\n');
    if t.extrapolated {
        s.push_str("note: the chosen temperature is outside the scouted ones (extrapolation)\n");
    }
    s
}

/// A fit flag in plain words.
pub fn flag_text(f: &FitFlag) -> String {
    match f {
        FitFlag::SOutsideRange { s } => format!("S {s:.2} outside 1–60"),
        FitFlag::ElutedBeforeGradient { run } => format!("eluted before the gradient in {run}"),
        FitFlag::ElutedAfterGradient { run } => format!("eluted after the gradient in {run}"),
        FitFlag::LargeResidual { rms_min } => format!("large residual {rms_min:.3} min"),
        FitFlag::IllConditioned {
            s_relative_uncertainty,
        } => format!(
            "ill-conditioned (σS/S = {:.0} %)",
            100.0 * s_relative_uncertainty
        ),
        FitFlag::NotConverged => "not converged".into(),
    }
}

fn prediction_table(p: &Prediction) -> String {
    let peaks: Vec<Vec<String>> = p
        .peaks
        .iter()
        .map(|k| {
            predicted_peak_row(
                &k.name,
                k.retention_time_min,
                k.retention_time_uncertainty_min,
                k.width_base_min,
                k.organic_at_elution_pct,
                label(&k.phase),
            )
        })
        .collect();
    let mut s = format!(
        "program {} (time min : % organic); last peak at {:.2} min; smallest Rs {:.2} ({} / {}); first peak k = {:.2}\n",
        program_text(&p.program),
        p.run_time_min,
        p.min_resolution,
        p.critical_pair[0],
        p.critical_pair[1],
        p.first_peak_retention_factor
    );
    s.push_str(&predicted_peaks_table(
        &peaks,
        "organic at elution (%)",
        "elutes",
    ));
    s.push_str(&predicted_pairs_table(&p.pairs, &p.critical_pair));
    s
}

/// A program as `time:%organic` points, times and compositions to 0.1 (the optimiser's
/// programs are on that grid already; this only keeps binary fractions out of the text).
pub fn program_text(p: &GradientProgram) -> String {
    p.points()
        .iter()
        .map(|q| format!("{}:{}", fmt_tenth(q.time_min), fmt_tenth(q.organic_pct)))
        .collect::<Vec<_>>()
        .join(",")
}

/// A number to 0.1 without a trailing `.0`, and never `-0`.
fn fmt_tenth(v: f64) -> String {
    let r = (v * 10.0).round() / 10.0;
    let r = if r == 0.0 { 0.0 } else { r };
    let t = format!("{r:.1}");
    t.strip_suffix(".0").map_or(t.clone(), str::to_string)
}

fn scout_table(f: &ScoutFit, r: &OptimiseReport, plates_source: &str) -> String {
    let mut s = scout_fit_table(f);
    s.push_str("\n\n");
    s.push_str(&scout_optimum_table(r, plates_source));
    s
}

/// The fit part of the `scout` table (no trailing newline).
fn scout_fit_table(f: &ScoutFit) -> String {
    let rows: Vec<Vec<String>> = f
        .analytes
        .iter()
        .map(|a| {
            vec![
                a.name.clone(),
                num(Some(a.log_kw), 3),
                num(Some(a.log_kw_uncertainty), 3),
                num(Some(a.s), 3),
                num(Some(a.s_uncertainty), 3),
                num(Some(a.rms_residual_min), 4),
                a.flags.iter().map(flag_text).collect::<Vec<_>>().join("; "),
            ]
        })
        .collect();
    let mut s = format!(
        "Scouting fit over {} runs ({}); t0 = {:.3} min, dwell time = {:.3} min\n",
        f.runs.len(),
        f.runs.join(", "),
        f.dead_time_min,
        f.dwell_time_min
    );
    if f.basis == CompositionBasis::Water {
        s.push_str(
            "HILIC: log k = log kw − S ψ with ψ = 1 − %organic/100, the water (strong-solvent) fraction\n",
        );
    }
    s.push_str(&render(
        &[
            "analyte",
            "log kw (–)",
            "±1σ log kw (–)",
            "S (–)",
            "±1σ S (–)",
            "RMS residual (min)",
            "flags",
        ],
        &rows,
    ));
    s
}

/// The optimum part of the `scout` table.
fn scout_optimum_table(r: &OptimiseReport, plates_source: &str) -> String {
    let mut s = String::new();
    s.push_str(&format!(
        "Optimum: initial {:.1} %, final {:.1} % organic over {:.1} min; plate number {:.0} ({plates_source}); {} conditions evaluated\n",
        r.initial_pct, r.final_pct, r.gradient_time_min, r.plates_used, r.evaluated_conditions
    ));
    if let Some(k) = &r.knee {
        s.push_str(&format!(
            "two-segment knee at {:.1} min, {:.1} % organic\n",
            k.time_min, k.organic_pct
        ));
    }
    s.push_str(&choice_lines(
        r.selection,
        r.window.target_resolution,
        r.meets_target,
        r.min_retention_factor,
        r.meets_min_retention,
    ));
    s.push_str(&prediction_table(&r.optimum));
    for n in &r.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    s.push_str(
        "note: predictions from a two-parameter retention model; verify the conditions by a run.\n",
    );
    s
}

/// The window diagram (smallest Rs against gradient time) as TSV, for `--window-data`.
pub fn window_tsv(r: &OptimiseReport) -> String {
    let w = &r.window;
    let mut s = format!(
        "# window diagram at {} % → {} % organic; target Rs {}; optimum tG {} min\n",
        csv_num(w.initial_pct, None),
        csv_num(w.final_pct, None),
        csv_num(w.target_resolution, None),
        csv_num(w.optimum_gradient_time_min, None)
    );
    s.push_str(&window_tsv_rows(
        "gradient_time_min",
        w.points.iter().map(|p| WindowRow {
            x: p.gradient_time_min,
            min_resolution: p.min_resolution,
            critical_pair: &p.critical_pair,
            run_time_min: p.run_time_min,
            within_run_time: p.within_run_time,
            first_peak_retention_factor: p.first_peak_retention_factor,
            meets_min_retention: p.meets_min_retention,
        }),
    ));
    s
}
