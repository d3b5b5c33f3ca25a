//! Renderers of the measured-run commands (`suitability`, `scout`, `transfer`) and of the LC
//! model's evaluation (`model eval`): aligned tables, CSV blocks, TSV window data and JSON.
//!
//! Every result is wrapped in an output struct (the JSON document of its command, with its
//! `schema_version`) that implements [`Render`]; the command layer calls [`render`] with the
//! format the user asked for. Adding a format is one place: a method of [`Render`] (with a
//! default that says the format is not offered) and one arm of [`render`].

pub mod gc_scout;
pub mod model_eval;
pub mod scout;
pub mod suitability;
pub mod transfer;

use serde::Serialize;

use crate::measured::optimise::{PredictedPair, Selection};
use crate::report::table::render as render_table;
use crate::report::{csv_cell, csv_num};

/// The formats of the measured-run reports.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MeasuredFormat {
    /// Aligned text tables.
    Table,
    /// Pretty JSON with `schema_version`.
    Json,
    /// Comma-separated blocks, each after a `# title` line.
    Csv,
    /// Markdown.
    Markdown,
}

/// A measured-run result that can be written in the formats its command offers.
pub trait Render: Serialize {
    /// Aligned text tables, for people.
    fn table(&self) -> String;
    /// The JSON document (pretty, newline-terminated).
    fn json(&self) -> Result<String, serde_json::Error> {
        Ok(format!("{}\n", serde_json::to_string_pretty(self)?))
    }
    /// Comma-separated blocks; `None` when the report has no CSV form.
    fn csv(&self) -> Option<String> {
        None
    }
    /// Markdown; `None` when the report has no Markdown form.
    fn markdown(&self) -> Option<String> {
        None
    }
}

/// A format the report does not offer (the command's options normally prevent it).
#[derive(Debug, thiserror::Error)]
pub enum RenderError {
    /// The report has no such form.
    #[error("this report cannot be written as {0:?}")]
    NotOffered(MeasuredFormat),
    /// JSON encoding failed.
    #[error(transparent)]
    Json(#[from] serde_json::Error),
}

/// Renders `report` in `format`.
pub fn render<R: Render + ?Sized>(
    report: &R,
    format: MeasuredFormat,
) -> Result<String, RenderError> {
    let text = match format {
        MeasuredFormat::Table => Some(report.table()),
        MeasuredFormat::Json => Some(report.json()?),
        MeasuredFormat::Csv => report.csv(),
        MeasuredFormat::Markdown => report.markdown(),
    };
    text.ok_or(RenderError::NotOffered(format))
}

/// Formats an optional number with `d` decimals; a dash when absent or not finite.
pub(crate) fn num(v: Option<f64>, d: usize) -> String {
    match v {
        Some(x) if x.is_finite() => format!("{x:.d$}"),
        _ => "–".into(),
    }
}

/// The snake_case label serde gives a unit enum variant.
pub(crate) fn label<T: Serialize>(t: &T) -> String {
    match serde_json::to_value(t) {
        Ok(serde_json::Value::String(s)) => s,
        Ok(v) => v.to_string(),
        Err(_) => "?".into(),
    }
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// One CSV block: a `# title` line, the header, the rows.
pub(crate) fn csv_block(title: &str, header: &[&str], rows: &[Vec<String>]) -> String {
    let mut s = format!("# {title}\n");
    s.push_str(
        &header
            .iter()
            .map(|h| csv_field(h))
            .collect::<Vec<_>>()
            .join(","),
    );
    s.push('\n');
    for r in rows {
        s.push_str(&r.iter().map(|c| csv_field(c)).collect::<Vec<_>>().join(","));
        s.push('\n');
    }
    s
}

/// The "chosen by" and "target" lines of an optimum (LC `scout` and `scout --mode gc`).
pub(crate) fn choice_lines(
    selection: Selection,
    target_resolution: f64,
    meets_target: bool,
    min_retention_factor: f64,
    meets_min_retention: bool,
) -> String {
    let met = |b: bool| if b { "met" } else { "NOT met" };
    format!(
        "chosen by: {}\ntarget Rs {:.2}: {}; first peak k ≥ {}: {}\n",
        match selection {
            Selection::ShortestRunMeetingTarget => "shortest run meeting the target resolution",
            Selection::LargestMinResolution =>
                "largest smallest resolution (no condition meets the target)",
        },
        target_resolution,
        met(meets_target),
        min_retention_factor,
        met(meets_min_retention)
    )
}

/// One predicted peak of an optimum as table cells: name, tR, ±1σ tR, base width, the value at
/// elution (% organic or °C, 0.1) and the part of the program it elutes in.
pub(crate) fn predicted_peak_row(
    name: &str,
    retention_time_min: f64,
    uncertainty_min: Option<f64>,
    width_base_min: f64,
    at_elution: f64,
    phase: String,
) -> Vec<String> {
    vec![
        name.to_string(),
        num(Some(retention_time_min), 2),
        num(uncertainty_min, 2),
        num(Some(width_base_min), 3),
        num(Some(at_elution), 1),
        phase.replace('_', " "),
    ]
}

/// The predicted-peaks table of an optimum; `at_elution` and `elutes` head the last two columns.
pub(crate) fn predicted_peaks_table(
    rows: &[Vec<String>],
    at_elution: &str,
    elutes: &str,
) -> String {
    let mut s = render_table(
        &[
            "analyte",
            "predicted tR (min)",
            "±1σ tR (min)",
            "base width (min)",
            at_elution,
            elutes,
        ],
        rows,
    );
    s.push('\n');
    s
}

/// The predicted-pairs table of an optimum, the critical pair marked.
pub(crate) fn predicted_pairs_table(pairs: &[PredictedPair], critical: &[String; 2]) -> String {
    let rows: Vec<Vec<String>> = pairs
        .iter()
        .map(|q| {
            let is_critical = q.first == critical[0] && q.second == critical[1];
            vec![
                q.first.clone(),
                q.second.clone(),
                num(Some(q.resolution), 2),
                if is_critical {
                    "critical".into()
                } else {
                    String::new()
                },
            ]
        })
        .collect();
    let mut s = render_table(&["first", "second", "predicted Rs (–)", ""], &rows);
    s.push('\n');
    s
}

/// One point of a window diagram (LC: gradient time; GC: ramp rate) for [`window_tsv_rows`].
pub(crate) struct WindowRow<'a> {
    /// The searched variable (gradient time, min, or ramp rate, °C/min).
    pub x: f64,
    pub min_resolution: f64,
    pub critical_pair: &'a [String; 2],
    pub run_time_min: f64,
    pub within_run_time: bool,
    pub first_peak_retention_factor: f64,
    pub meets_min_retention: bool,
}

/// The header and rows of a `--window-data` TSV after its `#` line; `x_column` names the
/// searched variable. Numbers follow [`csv_num`].
pub(crate) fn window_tsv_rows<'a>(
    x_column: &str,
    rows: impl Iterator<Item = WindowRow<'a>>,
) -> String {
    let mut s = format!(
        "{x_column}\tmin_resolution\tcritical_first\tcritical_second\trun_time_min\twithin_run_time\tfirst_peak_k\tmeets_min_k\n"
    );
    for p in rows {
        s.push_str(&format!(
            "{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\n",
            csv_num(p.x, None),
            csv_num(p.min_resolution, None),
            csv_cell(&p.critical_pair[0], '\t'),
            csv_cell(&p.critical_pair[1], '\t'),
            csv_num(p.run_time_min, None),
            p.within_run_time,
            csv_num(p.first_peak_retention_factor, None),
            p.meets_min_retention
        ));
    }
    s
}
