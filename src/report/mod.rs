//! Reports: one serde model per command and one renderer per output format.
//!
//! Tables are for people, JSON for scripts (documented in `docs/json-schema.md`, versioned by
//! [`SCHEMA_VERSION`]), CSV/TSV for spreadsheets. Renderers return strings; the CLI writes
//! them, so a report is written in one step and never half-way.

pub mod advice;
pub mod candidates;
pub mod chromatogram;
pub mod describe;
pub mod kb_stats;
pub mod lookup;
pub mod measured;
pub mod phases;
pub mod plan;
pub mod predict;
pub mod predict_gc;
pub mod table;

use serde::{Deserialize, Serialize};

/// Version of the JSON output schema. Bumped on any incompatible change.
pub const SCHEMA_VERSION: u32 = 1;

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Format {
    /// Aligned text tables.
    Table,
    /// JSON, pretty-printed.
    Json,
    /// Comma-separated values.
    Csv,
    /// Tab-separated values.
    Tsv,
}

/// Pretty JSON of `value` and a closing line break, written into one buffer sized for
/// `records` records of a few kilobytes each: a report of thousands of records is built
/// without copying it over and over as it grows (the same text as
/// `serde_json::to_string_pretty`; an empty document when serialisation fails).
pub fn json_pretty<T: Serialize + ?Sized>(value: &T, records: usize) -> String {
    // at most 64 MiB up front; a larger report grows as usual
    let mut buf = Vec::with_capacity(records.saturating_add(1).saturating_mul(4096).min(64 << 20));
    if serde_json::to_writer_pretty(&mut buf, value).is_err() {
        buf.clear();
    }
    buf.push(b'\n');
    // serde_json writes valid UTF-8 only
    String::from_utf8(buf).unwrap_or_else(|_| "\n".to_string())
}

/// Format a float for text output: up to `digits` decimals, trailing zeros trimmed. A value
/// that rounds to zero prints as `0`, never `-0` (e.g. a net charge of −0.0004 e).
pub fn num(v: f64, digits: usize) -> String {
    let s = format!("{v:.digits$}");
    let s = if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    };
    if s == "-0" { "0".to_string() } else { s }
}

/// Format a float for text and CSV output with `digits` significant digits (trailing zeros
/// trimmed), so that binary noise such as `1.9950199999999998` prints as `1.99502`. JSON keeps
/// the full value.
pub fn sig(v: f64, digits: usize) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let digits = digits.max(1);
    let magnitude = v.abs().log10().floor() as i64;
    if !(-5..=15).contains(&magnitude) {
        // very small or large: scientific notation with the same significant digits
        let s = format!("{:.*e}", digits - 1, v);
        return match s.split_once('e') {
            Some((m, e)) if m.contains('.') => {
                format!("{}e{e}", m.trim_end_matches('0').trim_end_matches('.'))
            }
            _ => s,
        };
    }
    let decimals = (digits as i64 - 1 - magnitude).max(0) as usize;
    num(v, decimals)
}

/// Table cells for a predicted retention time, its interval and retention factor: a time past
/// the end of the program (`run_end_min`, 0 when unknown) is the model's extrapolation of an
/// endless final hold, not a time the run will show, so it reads "does not elute" with the
/// program's end, and the interval and k are not printed (issue 14: never a number of minutes
/// the run cannot reach). JSON and CSV keep the numbers.
pub fn elution_cells(
    rt_min: f64,
    low_min: f64,
    high_min: f64,
    k: f64,
    run_end_min: f64,
) -> (String, String, String) {
    if run_end_min > 0.0 && rt_min > run_end_min {
        (
            format!("does not elute (> {} min)", num(run_end_min, 1)),
            "-".into(),
            "-".into(),
        )
    } else {
        (
            num(rt_min, 2),
            format!("{}-{}", num(low_min, 2), num(high_min, 2)),
            num(k, 2),
        )
    }
}

/// Significant digits of every number in CSV/TSV output (see [`csv_num`]).
pub const CSV_SIGNIFICANT_DIGITS: usize = 6;

/// The one precision rule for numbers in CSV/TSV output, used by every command that writes
/// them (documented in docs/json-schema.md, "CSV and TSV"): at most [`CSV_SIGNIFICANT_DIGITS`]
/// significant digits, trailing zeros trimmed; `decimals`, where given, rounds coarser when the
/// quantity's uncertainty supports fewer digits (a Joback boiling point to whole degrees); a
/// missing or non-finite value is an empty cell. JSON keeps the full value.
pub fn csv_num(v: f64, decimals: Option<usize>) -> String {
    if !v.is_finite() {
        return String::new();
    }
    if v == 0.0 {
        return "0".to_string();
    }
    let magnitude = v.abs().log10().floor() as i64;
    if !(-5..=15).contains(&magnitude) {
        return sig(v, CSV_SIGNIFICANT_DIGITS);
    }
    let by_sig = (CSV_SIGNIFICANT_DIGITS as i64 - 1 - magnitude).max(0) as usize;
    num(v, decimals.map_or(by_sig, |d| d.min(by_sig)))
}

/// [`csv_num`] of an optional value (an empty cell when absent).
pub fn csv_opt(v: Option<f64>, decimals: Option<usize>) -> String {
    v.map_or(String::new(), |v| csv_num(v, decimals))
}

/// Quote a CSV cell when needed (RFC 4180).
pub fn csv_cell(s: &str, delim: char) -> String {
    if delim == '\t' {
        return s.replace(['\t', '\n', '\r'], " ");
    }
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits_remove_binary_noise() {
        assert_eq!(sig(1.995_019_999_999_999_8, 6), "1.99502");
        assert_eq!(sig(47.420_500_000_000_004, 6), "47.4205");
        assert_eq!(sig(351.549_999_999_999_95, 6), "351.55");
        assert_eq!(sig(-0.31, 6), "-0.31");
        assert_eq!(sig(0.0, 6), "0");
        assert_eq!(sig(1.234_567e-7, 3), "1.23e-7");
        assert_eq!(sig(9.999_999_9, 6), "10");
    }

    #[test]
    fn csv_numbers_follow_one_rule() {
        assert_eq!(csv_num(1.995_019_999_999_999_8, None), "1.99502");
        assert_eq!(csv_num(12.345_678_9, None), "12.3457");
        assert_eq!(csv_num(1234.5678, None), "1234.57");
        assert_eq!(csv_num(123_456.789, None), "123457");
        assert_eq!(csv_num(56.2, Some(0)), "56");
        // decimals given: the coarser of the two rules (8 decimals here, not 6 significant digits)
        assert_eq!(csv_num(0.000_123_456_78, Some(8)), "0.00012346");
        assert_eq!(csv_num(0.000_123_456_78, None), "0.000123457");
        assert_eq!(csv_num(f64::NAN, None), "");
        assert_eq!(csv_num(-0.0, None), "0");
        assert_eq!(csv_opt(None, None), "");
        assert_eq!(csv_num(1.234_567_8e-9, None), "1.23457e-9");
    }

    #[test]
    fn a_time_past_the_program_reads_does_not_elute() {
        let (rt, iv, k) = elution_cells(7_167_974.9, 21_807.0, 4.2e8, 4.5e6, 28.0);
        assert_eq!(rt, "does not elute (> 28 min)");
        assert_eq!((iv.as_str(), k.as_str()), ("-", "-"));
        let (rt, iv, k) = elution_cells(12.345, 10.0, 14.5, 6.2, 28.0);
        assert_eq!(
            (rt.as_str(), iv.as_str(), k.as_str()),
            ("12.35", "10-14.5", "6.2")
        );
    }

    #[test]
    fn numbers_drop_trailing_zeros() {
        assert_eq!(num(1.500, 3), "1.5");
        assert_eq!(num(2.0, 2), "2");
        assert_eq!(num(-0.0712, 2), "-0.07");
    }

    #[test]
    fn values_that_round_to_zero_have_no_sign() {
        // The plan's Scope table printed "-0 e" for a stored charge of −0.0 and for net charges
        // such as −0.0004 e.
        assert_eq!(num(-0.0, 2), "0");
        assert_eq!(num(-0.0004, 2), "0");
        assert_eq!(num(-0.4, 0), "0");
        assert_eq!(num(-0.6, 0), "-1");
        assert_eq!(num(-0.005, 3), "-0.005");
    }

    #[test]
    fn csv_cells_are_quoted_when_needed() {
        assert_eq!(
            csv_cell("1,2-dichloroethane", ','),
            "\"1,2-dichloroethane\""
        );
        assert_eq!(csv_cell("say \"x\"", ','), "\"say \"\"x\"\"\"");
        assert_eq!(csv_cell("a\tb", '\t'), "a b");
    }
}
