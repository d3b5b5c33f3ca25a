//! The GC `scout --mode gc` report: the ln k = A + B/T fit, the optimum oven program with its
//! predicted peaks, the safety note, and the window-diagram data as TSV.

use serde::Serialize;

use super::{
    Render, WindowRow, choice_lines, label, num, predicted_pairs_table, predicted_peak_row,
    predicted_peaks_table, window_tsv_rows,
};
use crate::measured::gc_optimise::GcOptimiseReport;
use crate::measured::gc_scout::{GcFitFlag, GcScoutFit};
use crate::report::csv_num;
use crate::report::table::render;

/// Schema version of the `scout --mode gc` JSON output.
pub const SCOUT_GC_SCHEMA_VERSION: u32 = 1;

/// JSON output of `scout --mode gc` (schema version [`SCOUT_GC_SCHEMA_VERSION`]).
#[derive(Serialize)]
pub struct GcScoutOutput<'a> {
    /// [`SCOUT_GC_SCHEMA_VERSION`].
    pub schema_version: u32,
    /// Always `gc`.
    pub mode: &'static str,
    /// Where t_M came from.
    pub holdup_source: String,
    /// Where the plate number for widths came from.
    pub plates_source: String,
    /// The fit.
    pub fit: &'a GcScoutFit,
    /// The optimum and the window diagram.
    pub optimisation: &'a GcOptimiseReport,
    /// [`GC_SAFETY`].
    pub safety: &'static str,
}

impl Render for GcScoutOutput<'_> {
    fn table(&self) -> String {
        scout_gc_table(
            self.fit,
            self.optimisation,
            &self.holdup_source,
            &self.plates_source,
        )
    }
}

/// The safety note printed with every GC recommendation.
pub const GC_SAFETY: &str = "Hydrogen carrier gas is flammable (explosive in air from about 4 % by \
volume, from memory): leak-check after every column installation, use a hydrogen sensor or a \
flow shut-off where the lab's SOPs require it, and never let hydrogen flow into the oven from an \
open column end. Secure gas cylinders upright, with the valve cap on during transport. Never program the oven above the phase's maximum temperature (bleed, \
phase damage), and let the oven and injector cool before opening them. The lab's SOPs, local \
regulations and licensed practice take precedence.";

fn gc_flag_text(f: &GcFitFlag) -> String {
    match f {
        GcFitFlag::NonPhysical { b_k } => {
            format!("non-physical B {b_k:.0} K (retention would rise with temperature)")
        }
        GcFitFlag::BOutsideRange { b_k } => format!("B {b_k:.0} K outside 1000–25000 K"),
        GcFitFlag::ElutedAfterProgram { run } => {
            format!("measured after the end of the program in {run}")
        }
        GcFitFlag::LargeResidual { rms_min } => format!("large residual {rms_min:.3} min"),
        GcFitFlag::IllConditioned {
            b_relative_uncertainty,
        } => format!(
            "ill-conditioned (σB/B = {:.0} %)",
            100.0 * b_relative_uncertainty
        ),
        GcFitFlag::NotConverged => "not converged".into(),
    }
}

fn scout_gc_table(
    f: &GcScoutFit,
    r: &GcOptimiseReport,
    holdup_source: &str,
    plates_source: &str,
) -> String {
    let rows: Vec<Vec<String>> = f
        .analytes
        .iter()
        .map(|x| {
            vec![
                x.name.clone(),
                num(Some(x.a), 3),
                num(Some(x.a_uncertainty), 3),
                num(Some(x.b_k), 0),
                num(Some(x.b_uncertainty_k), 0),
                num(Some(x.sorption_enthalpy_kj_mol), 1),
                num(Some(x.rms_residual_min), 4),
                x.flags
                    .iter()
                    .map(gc_flag_text)
                    .collect::<Vec<_>>()
                    .join("; "),
            ]
        })
        .collect();
    let mut s = format!(
        "GC scouting fit of ln k = A + B/T over {} runs ({}); t_M = {:.3} min ({holdup_source}); ramp integrated in {} K steps\n",
        f.runs.len(),
        f.runs.join(", "),
        f.holdup_time_min,
        f.integration_step_k
    );
    s.push_str(&render(
        &[
            "analyte",
            "A (–)",
            "±1σ A (–)",
            "B (K)",
            "±1σ B (K)",
            "ΔH (kJ/mol)",
            "RMS residual (min)",
            "flags",
        ],
        &rows,
    ));
    let o = &r.optimum;
    s.push_str(&format!(
        "\n\nOptimum oven program {} (initial °C : hold min, ramp °C/min : final °C : hold min): {} °C for {} min, {} °C/min to {} °C, hold {} min; limit {} °C\nplate number {:.0} ({plates_source}); {} programs evaluated\n",
        o.program,
        o.initial_c,
        o.initial_hold_min,
        o.ramp_c_per_min,
        o.final_c,
        o.final_hold_min,
        r.max_temperature_c,
        r.plates_used,
        r.evaluated_conditions
    ));
    s.push_str(&choice_lines(
        r.selection,
        r.window.target_resolution,
        r.meets_target,
        r.min_retention_factor,
        r.meets_min_retention,
    ));
    s.push_str(&format!(
        "last peak at {:.2} min, program ends at {:.2} min; smallest Rs {:.2} ({} / {}); first peak k = {:.2}\n",
        o.run_time_min,
        o.program_time_min,
        o.min_resolution,
        o.critical_pair[0],
        o.critical_pair[1],
        o.first_peak_retention_factor
    ));
    let peaks: Vec<Vec<String>> = o
        .peaks
        .iter()
        .map(|k| {
            predicted_peak_row(
                &k.name,
                k.retention_time_min,
                k.retention_time_uncertainty_min,
                k.width_base_min,
                k.elution_temperature_c,
                label(&k.phase),
            )
        })
        .collect();
    s.push_str(&predicted_peaks_table(
        &peaks,
        "elution temperature (°C)",
        "elutes in",
    ));
    s.push_str(&predicted_pairs_table(&o.pairs, &o.critical_pair));
    for n in &r.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    s.push_str(
        "note: predictions from a two-parameter retention–temperature model with constant t_M; verify the program by a run.\n",
    );
    s.push_str(&format!("safety: {GC_SAFETY}\n"));
    s
}

/// The window diagram (smallest Rs against ramp rate) as TSV, for `--window-data`.
pub fn gc_window_tsv(r: &GcOptimiseReport) -> String {
    let w = &r.window;
    let mut s = format!(
        "# window diagram at initial {} °C, hold {} min; target Rs {}; optimum ramp {} °C/min\n",
        csv_num(w.initial_c, None),
        csv_num(w.initial_hold_min, None),
        csv_num(w.target_resolution, None),
        csv_num(w.optimum_ramp_c_per_min, None)
    );
    s.push_str(&window_tsv_rows(
        "ramp_c_per_min",
        w.points.iter().map(|p| WindowRow {
            x: p.ramp_c_per_min,
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
