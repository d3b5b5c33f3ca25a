//! Reading what the user gives: analyte lists (arguments, `--input FILE`, stdin), SMILES lines,
//! text files or stdin (`-`), peak tables, and the values of options shared by several commands
//! (column geometry `LxID`, GC columns, positive numbers, `MIN,MAX` ranges, peak pairs, the
//! dead time). Every error names the option, file or value at fault.

use std::fmt;
use std::io::{IsTerminal, Read};
use std::path::{Path, PathBuf};
use std::str::FromStr;

use anyhow::{Context, Result, bail};
use clap::Args;

use phasewise::kb::identifier::{ListEntry, parse_analyte_list};
use phasewise::measured::DeadTimeInput;
use phasewise::measured::peaks::PeakTable;
use phasewise::model::gc::GcColumn;

/// Where analytes come from.
#[derive(Debug, Args)]
pub struct AnalyteInput {
    /// Analytes: names, synonyms, CAS numbers, InChIKeys, PubChem CIDs (`cid:2519`) or
    /// SMILES (`smiles:CCO` forces a SMILES reading); `-` reads a list from stdin, one per line.
    #[arg(value_name = "ANALYTE")]
    pub analytes: Vec<String>,
    /// Read analytes from a file: one per line (`#` at the start of a line marks a comment), or
    /// a tab-separated table with a `name` and/or `smiles` header; `-` reads stdin (so does a
    /// `-` among the analytes).
    #[arg(long, short, value_name = "FILE")]
    pub input: Option<PathBuf>,
}

/// The text behind `--input FILE` (or `-`), or stdin when nothing else was given and stdin is
/// not a terminal; `None` when there is none.
fn read_input_text(input: &AnalyteInput) -> Result<Option<String>> {
    let from_stdin = || -> Result<Option<String>> {
        let mut s = String::new();
        std::io::stdin()
            .read_to_string(&mut s)
            .context("reading analytes from stdin")?;
        Ok(Some(s))
    };
    // `-` among the analytes means "and the list on stdin", as for `--input -`.
    let dash = input.analytes.iter().any(|a| a == "-");
    match &input.input {
        Some(p) if p.as_os_str() == "-" => from_stdin(),
        Some(p) if dash => bail!(
            "both `--input {}` and `-` (stdin) were given; give one list source",
            p.display()
        ),
        None if dash => from_stdin(),
        Some(p) => {
            Ok(Some(std::fs::read_to_string(p).with_context(|| {
                format!("reading analyte list {}", p.display())
            })?))
        }
        None if input.analytes.is_empty() && !std::io::stdin().is_terminal() => from_stdin(),
        None => Ok(None),
    }
}

const NO_ANALYTES: &str =
    "no analytes given: name them as arguments, with --input FILE, or on stdin";

/// Read the analyte list: arguments, then `--input FILE` (or `-`), then stdin when nothing
/// else was given and stdin is not a terminal. A file may be a plain list or a tab-separated
/// table with `name`/`smiles` columns ([`parse_analyte_list`]).
pub fn read_analytes(input: &AnalyteInput) -> Result<Vec<ListEntry>> {
    let mut out: Vec<ListEntry> = input
        .analytes
        .iter()
        .filter(|q| *q != "-")
        .map(|q| ListEntry {
            query: q.clone(),
            label: None,
            line: 0,
        })
        .collect();
    if let Some(text) = read_input_text(input)? {
        let what = match &input.input {
            Some(p) if p.as_os_str() != "-" => p.display().to_string(),
            _ => "stdin".to_string(),
        };
        out.extend(parse_analyte_list(&text).with_context(|| format!("reading {what}"))?);
    }
    if out.is_empty() {
        bail!(NO_ANALYTES);
    }
    Ok(out)
}

/// Read plain lines (for `describe`, whose lines are `SMILES[<TAB>name]`): arguments, then the
/// file or stdin; blank lines and `#` comment lines skipped.
pub fn read_lines(input: &AnalyteInput) -> Result<Vec<String>> {
    let mut out: Vec<String> = input
        .analytes
        .iter()
        .filter(|q| *q != "-")
        .cloned()
        .collect();
    if let Some(text) = read_input_text(input)? {
        let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
        out.extend(
            text.lines()
                .map(str::trim)
                .filter(|l| !l.is_empty() && !l.starts_with('#'))
                .map(str::to_string),
        );
    }
    if out.is_empty() {
        bail!(NO_ANALYTES);
    }
    Ok(out)
}

/// The text of a file, or of stdin for `-`.
pub fn read_text(path: &Path) -> Result<String> {
    if path.as_os_str() == "-" {
        let mut s = String::new();
        std::io::stdin()
            .read_to_string(&mut s)
            .context("reading stdin")?;
        return Ok(s);
    }
    std::fs::read_to_string(path).with_context(|| format!("reading {}", path.display()))
}

/// A peak table from a file or stdin (`-`).
pub fn read_peaks(path: &Path) -> Result<PeakTable> {
    let text = read_text(path)?;
    PeakTable::parse(&text).with_context(|| format!("peak table {}", path.display()))
}

/// A peak table for scouting fits, which need names and retention times only: widths may be
/// missing (from a file or stdin, `-`).
pub fn read_retention_peaks(path: &Path) -> Result<PeakTable> {
    let text = read_text(path)?;
    PeakTable::parse_retention_only(&text).with_context(|| format!("peak table {}", path.display()))
}

/// The dead time from `--t0`, or from `--column` with `--flow`.
pub fn dead_time_input(
    t0: Option<f64>,
    column: Option<ColumnSize>,
    flow: Option<f64>,
) -> Result<DeadTimeInput> {
    match (t0, column, flow) {
        (Some(t), None, _) => Ok(DeadTimeInput::Given { dead_time_min: t }),
        (None, Some(c), Some(f)) => Ok(DeadTimeInput::FromColumn {
            column_length_mm: c.length_mm,
            inner_diameter_mm: c.inner_diameter_mm,
            flow_ml_min: f,
        }),
        (None, Some(_), None) => bail!("--column needs --flow (mL/min) to estimate t0"),
        (Some(_), Some(_), _) => bail!("give either --t0 or --column with --flow, not both"),
        (None, None, _) => {
            bail!("the dead time is needed: give --t0 MIN, or --column LxID with --flow ML_MIN")
        }
    }
}

/// Parses a GC column `LENGTH_MxID_MMxFILM_UM`, e.g. `30x0.25x0.25`, at `velocity_cm_s`,
/// naming the option (`predict --mode gc` and `scout --mode gc`).
pub fn parse_gc_column(text: &str, velocity_cm_s: f64) -> Result<GcColumn> {
    let parts: Vec<&str> = text.split(['x', 'X', '×']).map(str::trim).collect();
    let nums: Option<Vec<f64>> = parts.iter().map(|p| p.parse::<f64>().ok()).collect();
    match nums.as_deref() {
        Some(&[l, id, film]) => GcColumn::new(l, id, film, velocity_cm_s)
            .map_err(|e| anyhow::anyhow!("--column {text}: {e}")),
        _ => bail!(
            "--column {text}: a GC column is LENGTH_MxID_MMxFILM_UM, e.g. 30x0.25x0.25 (30 m x 0.25 mm, 0.25 µm film)"
        ),
    }
}

// ---------------------------------------------------------------------------------------------
// Column geometry `LxID`.

/// A column's length and inner diameter, both in mm, as written `150x4.6`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ColumnSize {
    /// Length, mm.
    pub length_mm: f64,
    /// Inner diameter, mm.
    pub inner_diameter_mm: f64,
}

/// Why a column text could not be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ColumnSpecError {
    /// Not two numbers around an `x`.
    #[error(
        "column `{text}` is not LENGTHxID in mm: write length and inner diameter around an `x`, e.g. `150x4.6`"
    )]
    Malformed {
        /// The text given.
        text: String,
    },
    /// One part is not a number.
    #[error("column `{text}`: {part} `{value}` is not a number (write e.g. `150x4.6`, in mm)")]
    BadNumber {
        /// The text given.
        text: String,
        /// `length` or `inner diameter`.
        part: &'static str,
        /// The offending part.
        value: String,
    },
    /// One part is zero, negative or not finite.
    #[error("column `{text}`: {part} {value} mm must be a finite number greater than zero")]
    NotPositive {
        /// The text given.
        text: String,
        /// `length` or `inner diameter`.
        part: &'static str,
        /// The value.
        value: f64,
    },
}

/// Parses `LxID` in mm: `150x4.6`, `150 x 4.6`, `150X4.6`, `150×4.6`, optionally followed by
/// `mm`.
pub fn parse_column(text: &str) -> Result<ColumnSize, ColumnSpecError> {
    let t = text.trim();
    let t = t.strip_suffix("mm").unwrap_or(t).trim_end();
    let parts: Vec<&str> = t.split(['x', 'X', '×']).collect();
    if parts.len() != 2 {
        return Err(ColumnSpecError::Malformed { text: text.into() });
    }
    let number = |part: &'static str, s: &str| -> Result<f64, ColumnSpecError> {
        let s = s.trim();
        if s.is_empty() {
            return Err(ColumnSpecError::Malformed { text: text.into() });
        }
        let v: f64 = s.parse().map_err(|_| ColumnSpecError::BadNumber {
            text: text.into(),
            part,
            value: s.into(),
        })?;
        if v.is_finite() && v > 0.0 {
            Ok(v)
        } else {
            Err(ColumnSpecError::NotPositive {
                text: text.into(),
                part,
                value: v,
            })
        }
    };
    Ok(ColumnSize {
        length_mm: number("length", parts[0])?,
        inner_diameter_mm: number("inner diameter", parts[1])?,
    })
}

impl FromStr for ColumnSize {
    type Err = ColumnSpecError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        parse_column(s)
    }
}

impl fmt::Display for ColumnSize {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} mm × {} mm", self.length_mm, self.inner_diameter_mm)
    }
}

/// clap value parser for `LxID`.
pub fn column_arg(s: &str) -> Result<ColumnSize, String> {
    parse_column(s).map_err(|e| e.to_string())
}

/// A finite number greater than zero (clap names the option in its message).
pub fn positive_arg(s: &str) -> Result<f64, String> {
    match s.trim().parse::<f64>() {
        Ok(v) if v.is_finite() && v > 0.0 => Ok(v),
        Ok(_) => Err(format!("`{s}` must be a finite number greater than zero")),
        Err(_) => Err(format!("`{s}` is not a number")),
    }
}

/// A finite number of zero or more (clap names the option in its message).
pub fn non_negative_arg(s: &str) -> Result<f64, String> {
    match s.trim().parse::<f64>() {
        Ok(v) if v.is_finite() && v >= 0.0 => Ok(v),
        Ok(_) => Err(format!("`{s}` must be a finite number of zero or more")),
        Err(_) => Err(format!("`{s}` is not a number")),
    }
}

/// Checks a `MIN,MAX` option against the allowed interval, naming the option.
pub fn check_option_range(
    option: &str,
    r: NumberRange,
    lo: f64,
    hi: f64,
    what: &str,
) -> Result<()> {
    if r.min < lo || r.max > hi {
        bail!("{option} {},{}: {what} (allowed {lo}–{hi})", r.min, r.max);
    }
    Ok(())
}

/// Two peak names `A,B`.
pub fn pair_arg(s: &str) -> Result<[String; 2], String> {
    let mut it = s.splitn(2, ',').map(str::trim);
    match (it.next(), it.next()) {
        (Some(a), Some(b)) if !a.is_empty() && !b.is_empty() => Ok([a.into(), b.into()]),
        _ => Err(format!(
            "`{s}` is not a pair of peak names: write `first,second`"
        )),
    }
}

/// A closed range `MIN,MAX`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NumberRange {
    pub min: f64,
    pub max: f64,
}

/// clap value parser for `MIN,MAX`.
pub fn range_arg(s: &str) -> Result<NumberRange, String> {
    let parts: Vec<&str> = s.split(',').map(str::trim).collect();
    if parts.len() != 2 {
        return Err(format!(
            "`{s}` is not a range: write `MIN,MAX`, e.g. `5,60`"
        ));
    }
    let num = |p: &str| -> Result<f64, String> {
        p.parse::<f64>()
            .ok()
            .filter(|v| v.is_finite())
            .ok_or_else(|| format!("`{p}` in range `{s}` is not a finite number"))
    };
    let (min, max) = (num(parts[0])?, num(parts[1])?);
    if min > max {
        return Err(format!(
            "range `{s}`: the lower end {min} is above the upper end {max}"
        ));
    }
    Ok(NumberRange { min, max })
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn column_sizes_read_with_and_without_spaces() {
        let a = parse_column("150x4.6").unwrap();
        assert_eq!(a.length_mm, 150.0);
        assert_eq!(a.inner_diameter_mm, 4.6);
        assert_eq!(parse_column(" 150 x 4.6 ").unwrap(), a);
        assert_eq!(parse_column("150X4.6 mm").unwrap(), a);
        assert_eq!(parse_column("150×4.6").unwrap(), a);
    }

    #[test]
    fn malformed_columns_are_rejected_naming_the_text() {
        for bad in ["150", "150x", "x4.6", "150x4.6x2", "", "150*4.6"] {
            let e = parse_column(bad).unwrap_err();
            assert!(matches!(e, ColumnSpecError::Malformed { .. }), "{bad}: {e}");
        }
        let e = parse_column("15o x 4.6").unwrap_err();
        assert!(e.to_string().contains("`15o`"), "{e}");
        assert!(e.to_string().contains("length"), "{e}");
    }

    #[test]
    fn non_positive_columns_are_rejected() {
        let e = parse_column("150x0").unwrap_err();
        assert!(matches!(e, ColumnSpecError::NotPositive { value, .. } if value == 0.0));
        assert!(e.to_string().contains("inner diameter"), "{e}");
        assert!(parse_column("-150x4.6").is_err());
        assert!(parse_column("infx4.6").is_err());
        assert!(parse_column("NaNx4.6").is_err());
    }

    #[test]
    fn ranges_and_pairs_parse() {
        assert_eq!(
            range_arg("5, 60").unwrap(),
            NumberRange {
                min: 5.0,
                max: 60.0
            }
        );
        assert!(range_arg("60,5").unwrap_err().contains("above"));
        assert!(range_arg("5").is_err());
        assert!(range_arg("5,x").unwrap_err().contains("`x`"));
        assert_eq!(
            pair_arg("a, b").unwrap(),
            ["a".to_string(), "b".to_string()]
        );
        assert!(pair_arg("a").is_err());
        assert!(pair_arg(",b").is_err());
    }

    proptest! {
        #[test]
        fn any_positive_pair_round_trips(l in 1e-3f64..1e4, d in 1e-3f64..1e3, spaced: bool) {
            let text = if spaced { format!("{l} x {d}") } else { format!("{l}x{d}") };
            let c = parse_column(&text).unwrap();
            prop_assert_eq!(c.length_mm, l);
            prop_assert_eq!(c.inner_diameter_mm, d);
        }

        #[test]
        fn arbitrary_text_never_panics(s in "\\PC{0,20}") {
            if let Ok(c) = parse_column(&s) {
                prop_assert!(c.length_mm > 0.0 && c.inner_diameter_mm > 0.0);
                prop_assert!(c.length_mm.is_finite() && c.inner_diameter_mm.is_finite());
            }
        }

        #[test]
        fn non_positive_length_is_an_error(l in -1e4f64..=0.0, d in 1e-3f64..1e3) {
            let text = format!("{l}x{d}");
            prop_assert!(parse_column(&text).is_err());
        }
    }
}
