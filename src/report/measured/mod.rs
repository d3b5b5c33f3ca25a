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
