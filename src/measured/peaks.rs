//! Peak tables from a data system export: CSV or TSV text with a header line, parsed into
//! validated [`Peak`] rows.
//!
//! The delimiter is taken from the header line (a tab means TSV, otherwise a comma means CSV).
//! Lines that are blank or start with `#` are skipped. CSV fields may be wrapped in double
//! quotes (`""` inside quotes is a literal quote). Headers are matched case-insensitively, with
//! spaces and hyphens read as `_`, and an optional unit suffix `(min)`, `[min]` or `_min`.
//! Recognised headers (times in minutes):
//!
//! | header(s) | meaning |
//! | --- | --- |
//! | `name` | analyte name (required, unique) |
//! | `retention_time`, `rt`, `tr` | retention time (required) |
//! | `width_half`, `w50`, `fwhm` | width at half height |
//! | `start_half`, `end_half` | times where the peak crosses half height; width = end − start |
//! | `width_base`, `wb` | tangent baseline width |
//! | `area` | peak area (any unit, used for area %) |
//! | `height` | peak height (any unit) |
//! | `tailing`, `usp_tailing` | USP tailing factor given directly |
//! | `w5`, `f5` | full width and front half-width at 5 % height (for USP tailing) |
//! | `a10`, `b10` | front and back half-widths at 10 % height (for asymmetry) |
//!
//! At least one width column (`width_half`, the `start_half`/`end_half` pair, or `width_base`)
//! is required, and every peak needs a width value. Other columns are listed in
//! [`PeakTable::ignored_columns`], never silently dropped. A time column whose header carries a
//! unit other than minutes (`rt (s)`, `rt_sec`) is rejected.

use serde::{Deserialize, Serialize};
use thiserror::Error;

/// Errors reading or validating a peak table. Lines are 1-based as in a text editor.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum PeakTableError {
    /// No header line.
    #[error("peak table is empty: expected a header line such as `name,rt,w50`")]
    Empty,
    /// The header line has neither tab nor comma.
    #[error("line {line}: header `{header}` has neither tab nor comma; use CSV or TSV")]
    NoDelimiter {
        /// Line number.
        line: usize,
        /// Header text.
        header: String,
    },
    /// The header is separated by semicolons: the CSV a spreadsheet writes where the decimal
    /// separator is a comma (`1,23`), which would otherwise be read wrongly.
    #[error(
        "line {line}: header `{header}` is separated by semicolons, as a spreadsheet saves CSV where the decimal separator is a comma (1,23); save the table with commas between fields and points in numbers (1.23), or as tab-separated text"
    )]
    SemicolonSeparated {
        /// Line number.
        line: usize,
        /// Header text.
        header: String,
    },
    /// A required column is missing.
    #[error("peak table has no `{column}` column (accepted headers: {accepted})")]
    MissingColumn {
        /// The missing column.
        column: &'static str,
        /// Headers that would be accepted.
        accepted: &'static str,
    },
    /// No width column at all.
    #[error(
        "peak table has no width column: add `width_half` (or `w50`, `fwhm`), `start_half` and \
         `end_half`, or `width_base` (or `wb`)"
    )]
    NoWidthColumn,
    /// Only one of `start_half` / `end_half` present.
    #[error(
        "peak table has `{present}` but not `{missing}`; both are needed to compute the half-height width"
    )]
    HalfPairIncomplete {
        /// Column present.
        present: &'static str,
        /// Column missing.
        missing: &'static str,
    },
    /// Two headers map to the same quantity.
    #[error("line {line}: columns {first} and {second} both give `{quantity}`; keep one")]
    DuplicateColumn {
        /// Header line number.
        line: usize,
        /// Canonical quantity name.
        quantity: &'static str,
        /// First column (1-based).
        first: usize,
        /// Second column (1-based).
        second: usize,
    },
    /// A time column is in a unit other than minutes.
    #[error(
        "line {line}, column {column} `{header}`: times must be in minutes, this column is in `{unit}`; convert it"
    )]
    UnitMismatch {
        /// Header line number.
        line: usize,
        /// Column (1-based).
        column: usize,
        /// Header text.
        header: String,
        /// The unit found.
        unit: String,
    },
    /// Wrong number of fields on a data line.
    #[error("line {line}: expected {expected} fields like the header, found {found}")]
    WrongFieldCount {
        /// Line number.
        line: usize,
        /// Fields in the header.
        expected: usize,
        /// Fields on this line.
        found: usize,
    },
    /// Unterminated quoted field.
    #[error("line {line}: a quoted field is not closed")]
    UnterminatedQuote {
        /// Line number.
        line: usize,
    },
    /// A number could not be read.
    #[error("line {line}, column `{column}`: cannot read `{text}` as a finite number")]
    BadNumber {
        /// Line number.
        line: usize,
        /// Column header.
        column: String,
        /// The text.
        text: String,
    },
    /// A required value is empty.
    #[error("line {line}, column `{column}`: value is empty")]
    EmptyValue {
        /// Line number.
        line: usize,
        /// Column header.
        column: String,
    },
    /// A value that must be positive is zero or negative.
    #[error("line {line}, column `{column}`: {value} must be greater than zero")]
    NotPositive {
        /// Line number.
        line: usize,
        /// Column header.
        column: String,
        /// The value.
        value: f64,
    },
    /// A value that must not be negative is negative.
    #[error("line {line}, column `{column}`: {value} must not be negative")]
    Negative {
        /// Line number.
        line: usize,
        /// Column header.
        column: String,
        /// The value.
        value: f64,
    },
    /// `end_half` is not after `start_half`.
    #[error("line {line}: end_half {end_min} min is not after start_half {start_min} min")]
    HalfWidthOrder {
        /// Line number.
        line: usize,
        /// start_half, min.
        start_min: f64,
        /// end_half, min.
        end_min: f64,
    },
    /// A width at 5 % height smaller than its front part.
    #[error(
        "line {line}: w5 {width_min} min is smaller than f5 {front_min} min; the columns may be swapped"
    )]
    FrontLargerThanWidth {
        /// Line number.
        line: usize,
        /// w5, min.
        width_min: f64,
        /// f5, min.
        front_min: f64,
    },
    /// A peak without any width value.
    #[error(
        "line {line}: peak `{name}` has no width value; fill width_half, start_half/end_half or width_base"
    )]
    NoWidthValue {
        /// Line number.
        line: usize,
        /// Peak name.
        name: String,
    },
    /// A name used twice.
    #[error(
        "line {line}: peak name `{name}` already used on line {first_line}; names must be unique"
    )]
    DuplicateName {
        /// Peak name.
        name: String,
        /// Line of the first use.
        first_line: usize,
        /// Line of the second use.
        line: usize,
    },
    /// No data rows.
    #[error("peak table has a header but no peaks")]
    NoPeaks,
}

/// One peak as read from a table (times in minutes).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Peak {
    /// Analyte name.
    pub name: String,
    /// Retention time, min.
    pub retention_time_min: f64,
    /// Width at half height, min (given, or end_half − start_half).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub width_half_min: Option<f64>,
    /// Tangent baseline width, min.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub width_base_min: Option<f64>,
    /// Peak area (detector units).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub area: Option<f64>,
    /// Peak height (detector units).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub height: Option<f64>,
    /// USP tailing factor given directly.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub usp_tailing: Option<f64>,
    /// Full width at 5 % height, min.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub width_5pct_min: Option<f64>,
    /// Front half-width at 5 % height, min.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub front_5pct_min: Option<f64>,
    /// Front half-width at 10 % height, min.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub front_10pct_min: Option<f64>,
    /// Back half-width at 10 % height, min.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub back_10pct_min: Option<f64>,
    /// Line of the source table (0 when built in code).
    #[serde(default)]
    pub line: usize,
}

impl Peak {
    /// A peak with only a name and a retention time (min), no widths or other inputs, as built
    /// in code (line 0); set the widths with struct-update syntax.
    pub fn at(name: &str, retention_time_min: f64) -> Peak {
        Peak {
            name: name.to_string(),
            retention_time_min,
            width_half_min: None,
            width_base_min: None,
            area: None,
            height: None,
            usp_tailing: None,
            width_5pct_min: None,
            front_5pct_min: None,
            front_10pct_min: None,
            back_10pct_min: None,
            line: 0,
        }
    }
}

/// Field delimiter of a peak table.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Delimiter {
    /// Comma-separated.
    Comma,
    /// Tab-separated.
    Tab,
}

/// A validated peak table: unique names, positive widths, every peak with a width.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "PeakTableData", into = "PeakTableData")]
pub struct PeakTable {
    peaks: Vec<Peak>,
    ignored_columns: Vec<String>,
}

/// Serialised form of [`PeakTable`], validated on the way in.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PeakTableData {
    /// Peaks in table order.
    pub peaks: Vec<Peak>,
    /// Columns that were present but not used.
    #[serde(default)]
    pub ignored_columns: Vec<String>,
}

impl TryFrom<PeakTableData> for PeakTable {
    type Error = PeakTableError;
    fn try_from(d: PeakTableData) -> Result<Self, PeakTableError> {
        let mut t = PeakTable::from_peaks(d.peaks)?;
        t.ignored_columns = d.ignored_columns;
        Ok(t)
    }
}

impl From<PeakTable> for PeakTableData {
    fn from(t: PeakTable) -> Self {
        PeakTableData {
            peaks: t.peaks,
            ignored_columns: t.ignored_columns,
        }
    }
}

/// Quantities a column can carry.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Col {
    Name,
    Rt,
    WHalf,
    StartHalf,
    EndHalf,
    WBase,
    Area,
    Height,
    Tailing,
    W5,
    F5,
    A10,
    B10,
}

impl Col {
    fn label(self) -> &'static str {
        match self {
            Col::Name => "name",
            Col::Rt => "retention_time",
            Col::WHalf => "width_half",
            Col::StartHalf => "start_half",
            Col::EndHalf => "end_half",
            Col::WBase => "width_base",
            Col::Area => "area",
            Col::Height => "height",
            Col::Tailing => "tailing",
            Col::W5 => "w5",
            Col::F5 => "f5",
            Col::A10 => "a10",
            Col::B10 => "b10",
        }
    }
    fn is_time(self) -> bool {
        !matches!(self, Col::Name | Col::Area | Col::Height | Col::Tailing)
    }
}

fn classify(base: &str) -> Option<Col> {
    Some(match base {
        "name" => Col::Name,
        "retention_time" | "rt" | "tr" => Col::Rt,
        "width_half" | "w50" | "fwhm" => Col::WHalf,
        "start_half" => Col::StartHalf,
        "end_half" => Col::EndHalf,
        "width_base" | "wb" => Col::WBase,
        "area" => Col::Area,
        "height" => Col::Height,
        "tailing" | "usp_tailing" => Col::Tailing,
        "w5" => Col::W5,
        "f5" => Col::F5,
        "a10" => Col::A10,
        "b10" => Col::B10,
        _ => return None,
    })
}

/// Splits a header into (base name, unit) after normalising case, spaces and hyphens.
fn split_header(raw: &str) -> (String, Option<String>) {
    let h = raw.trim().to_lowercase();
    let (mut base, mut unit) = (h.clone(), None);
    for (open, close) in [('(', ')'), ('[', ']')] {
        if h.ends_with(close)
            && let Some(i) = h.rfind(open)
        {
            base = h[..i].trim().to_string();
            unit = Some(h[i + 1..h.len() - 1].trim().to_string());
            break;
        }
    }
    let mut base: String = base
        .chars()
        .map(|c| if c == ' ' || c == '-' { '_' } else { c })
        .collect();
    if unit.is_none() {
        for suffix in ["_min", "_s", "_sec", "_seconds", "_ms", "_h"] {
            if let Some(stripped) = base.strip_suffix(suffix)
                && classify(stripped).is_some()
            {
                unit = Some(suffix[1..].to_string());
                base = stripped.to_string();
                break;
            }
        }
    }
    (base, unit)
}

fn split_fields(line: &str, delim: char, line_no: usize) -> Result<Vec<String>, PeakTableError> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut chars = line.chars().peekable();
    let mut in_quotes = false;
    let mut at_field_start = true;
    while let Some(c) = chars.next() {
        if in_quotes {
            if c == '"' {
                if chars.peek() == Some(&'"') {
                    cur.push('"');
                    chars.next();
                } else {
                    in_quotes = false;
                }
            } else {
                cur.push(c);
            }
        } else if c == '"' && at_field_start && cur.trim().is_empty() {
            cur.clear();
            in_quotes = true;
            at_field_start = false;
        } else if c == delim {
            out.push(std::mem::take(&mut cur));
            at_field_start = true;
        } else {
            cur.push(c);
            if !c.is_whitespace() {
                at_field_start = false;
            }
        }
    }
    if in_quotes {
        return Err(PeakTableError::UnterminatedQuote { line: line_no });
    }
    out.push(cur);
    Ok(out.into_iter().map(|f| f.trim().to_string()).collect())
}

impl PeakTable {
    /// Parses CSV or TSV text (see the module documentation for the accepted headers).
    ///
    /// # Errors
    /// A [`PeakTableError`] naming the line and column of the first problem.
    ///
    /// # Examples
    /// ```
    /// use phasewise::measured::peaks::PeakTable;
    /// // Invented demo table.
    /// let t = PeakTable::parse("name,rt,w50\nalpha-ol,3.2,0.05\nbeta-one,4.1,0.06\n").unwrap();
    /// assert_eq!(t.peaks().len(), 2);
    /// assert!(PeakTable::parse("name,rt,w50\nalpha-ol,3.2,0\n").is_err());
    /// ```
    pub fn parse(text: &str) -> Result<Self, PeakTableError> {
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        let mut lines = text
            .lines()
            .enumerate()
            .map(|(i, l)| (i + 1, l.trim_end_matches('\r')))
            .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
        let Some((header_line, header)) = lines.next() else {
            return Err(PeakTableError::Empty);
        };
        let delim = if header.contains('\t') {
            '\t'
        } else if header.contains(',') {
            ','
        } else if header.contains(';') {
            return Err(PeakTableError::SemicolonSeparated {
                line: header_line,
                header: header.to_string(),
            });
        } else {
            return Err(PeakTableError::NoDelimiter {
                line: header_line,
                header: header.to_string(),
            });
        };
        let headers = split_fields(header, delim, header_line)?;
        let mut cols: Vec<Option<Col>> = Vec::with_capacity(headers.len());
        let mut ignored = Vec::new();
        for (i, raw) in headers.iter().enumerate() {
            let (base, unit) = split_header(raw);
            let col = classify(&base);
            if let Some(c) = col {
                if let Some(first) = cols.iter().position(|x| *x == Some(c)) {
                    return Err(PeakTableError::DuplicateColumn {
                        line: header_line,
                        quantity: c.label(),
                        first: first + 1,
                        second: i + 1,
                    });
                }
                if c.is_time()
                    && let Some(u) = &unit
                    && !matches!(u.as_str(), "min" | "mins" | "minutes" | "minute")
                {
                    return Err(PeakTableError::UnitMismatch {
                        line: header_line,
                        column: i + 1,
                        header: raw.clone(),
                        unit: u.clone(),
                    });
                }
            } else {
                ignored.push(raw.clone());
            }
            cols.push(col);
        }
        let idx = |c: Col| cols.iter().position(|x| *x == Some(c));
        if idx(Col::Name).is_none() {
            return Err(PeakTableError::MissingColumn {
                column: "name",
                accepted: "name",
            });
        }
        if idx(Col::Rt).is_none() {
            return Err(PeakTableError::MissingColumn {
                column: "retention_time",
                accepted: "retention_time, rt, tr",
            });
        }
        match (idx(Col::StartHalf), idx(Col::EndHalf)) {
            (Some(_), None) => {
                return Err(PeakTableError::HalfPairIncomplete {
                    present: "start_half",
                    missing: "end_half",
                });
            }
            (None, Some(_)) => {
                return Err(PeakTableError::HalfPairIncomplete {
                    present: "end_half",
                    missing: "start_half",
                });
            }
            _ => {}
        }
        if idx(Col::WHalf).is_none() && idx(Col::StartHalf).is_none() && idx(Col::WBase).is_none() {
            return Err(PeakTableError::NoWidthColumn);
        }
        let mut peaks = Vec::new();
        for (line_no, line) in lines {
            let fields = split_fields(line, delim, line_no)?;
            if fields.len() != headers.len() {
                return Err(PeakTableError::WrongFieldCount {
                    line: line_no,
                    expected: headers.len(),
                    found: fields.len(),
                });
            }
            let get = |c: Col| -> Result<Option<f64>, PeakTableError> {
                let Some(i) = idx(c) else { return Ok(None) };
                let t = fields[i].as_str();
                if t.is_empty() {
                    return Ok(None);
                }
                match t.parse::<f64>() {
                    Ok(v) if v.is_finite() => Ok(Some(v)),
                    _ => Err(PeakTableError::BadNumber {
                        line: line_no,
                        column: headers[i].clone(),
                        text: t.to_string(),
                    }),
                }
            };
            let name_i = idx(Col::Name).unwrap_or(0);
            let name = fields[name_i].clone();
            if name.is_empty() {
                return Err(PeakTableError::EmptyValue {
                    line: line_no,
                    column: headers[name_i].clone(),
                });
            }
            let rt_i = idx(Col::Rt).unwrap_or(0);
            let Some(rt) = get(Col::Rt)? else {
                return Err(PeakTableError::EmptyValue {
                    line: line_no,
                    column: headers[rt_i].clone(),
                });
            };
            let mut width_half = get(Col::WHalf)?;
            let start = get(Col::StartHalf)?;
            let end = get(Col::EndHalf)?;
            if let (Some(s), Some(e)) = (start, end) {
                if e <= s {
                    return Err(PeakTableError::HalfWidthOrder {
                        line: line_no,
                        start_min: s,
                        end_min: e,
                    });
                }
                if width_half.is_none() {
                    width_half = Some(e - s);
                }
            }
            peaks.push(Peak {
                name,
                retention_time_min: rt,
                width_half_min: width_half,
                width_base_min: get(Col::WBase)?,
                area: get(Col::Area)?,
                height: get(Col::Height)?,
                usp_tailing: get(Col::Tailing)?,
                width_5pct_min: get(Col::W5)?,
                front_5pct_min: get(Col::F5)?,
                front_10pct_min: get(Col::A10)?,
                back_10pct_min: get(Col::B10)?,
                line: line_no,
            });
        }
        let mut table = Self::from_peaks(peaks)?;
        table.ignored_columns = ignored;
        Ok(table)
    }

    /// Builds a table from peaks, with the same value checks as [`PeakTable::parse`].
    ///
    /// # Errors
    /// Duplicate names, non-positive widths or retention times, missing widths.
    pub fn from_peaks(peaks: Vec<Peak>) -> Result<Self, PeakTableError> {
        if peaks.is_empty() {
            return Err(PeakTableError::NoPeaks);
        }
        for (i, p) in peaks.iter().enumerate() {
            let line = p.line;
            if p.name.trim().is_empty() {
                return Err(PeakTableError::EmptyValue {
                    line,
                    column: "name".into(),
                });
            }
            let checks: [(&str, Option<f64>, bool); 10] = [
                ("retention_time", Some(p.retention_time_min), true),
                ("width_half", p.width_half_min, true),
                ("width_base", p.width_base_min, true),
                ("area", p.area, false),
                ("height", p.height, false),
                ("tailing", p.usp_tailing, true),
                ("w5", p.width_5pct_min, true),
                ("f5", p.front_5pct_min, true),
                ("a10", p.front_10pct_min, true),
                ("b10", p.back_10pct_min, true),
            ];
            for (column, value, strictly) in checks {
                let Some(v) = value else { continue };
                if !v.is_finite() {
                    return Err(PeakTableError::BadNumber {
                        line,
                        column: column.into(),
                        text: v.to_string(),
                    });
                }
                if strictly && v <= 0.0 {
                    return Err(PeakTableError::NotPositive {
                        line,
                        column: column.into(),
                        value: v,
                    });
                }
                if !strictly && v < 0.0 {
                    return Err(PeakTableError::Negative {
                        line,
                        column: column.into(),
                        value: v,
                    });
                }
            }
            if let (Some(w), Some(f)) = (p.width_5pct_min, p.front_5pct_min)
                && w < f
            {
                return Err(PeakTableError::FrontLargerThanWidth {
                    line,
                    width_min: w,
                    front_min: f,
                });
            }
            if p.width_half_min.is_none() && p.width_base_min.is_none() {
                return Err(PeakTableError::NoWidthValue {
                    line,
                    name: p.name.clone(),
                });
            }
            if let Some(first) = peaks[..i].iter().find(|q| q.name == p.name) {
                return Err(PeakTableError::DuplicateName {
                    name: p.name.clone(),
                    first_line: first.line,
                    line,
                });
            }
        }
        Ok(Self {
            peaks,
            ignored_columns: Vec::new(),
        })
    }

    /// Peaks in table order.
    pub fn peaks(&self) -> &[Peak] {
        &self.peaks
    }

    /// Peaks sorted by retention time (ties by name, for determinism).
    pub fn peaks_by_retention(&self) -> Vec<&Peak> {
        let mut v: Vec<&Peak> = self.peaks.iter().collect();
        v.sort_by(|a, b| {
            a.retention_time_min
                .total_cmp(&b.retention_time_min)
                .then_with(|| a.name.cmp(&b.name))
        });
        v
    }

    /// The peak with this name, if any.
    pub fn get(&self, name: &str) -> Option<&Peak> {
        self.peaks.iter().find(|p| p.name == name)
    }

    /// Header cells that matched no recognised column.
    pub fn ignored_columns(&self) -> &[String] {
        &self.ignored_columns
    }
}

/// Every header the parser recognises, for documentation and help text.
pub fn recognised_headers() -> Vec<&'static str> {
    vec![
        "name",
        "retention_time",
        "rt",
        "tr",
        "width_half",
        "w50",
        "fwhm",
        "start_half",
        "end_half",
        "width_base",
        "wb",
        "area",
        "height",
        "tailing",
        "usp_tailing",
        "w5",
        "f5",
        "a10",
        "b10",
    ]
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    // All tables below are invented demo data.

    #[test]
    fn parses_csv_with_aliases_units_and_quotes() {
        let t = PeakTable::parse(
            "# invented run\nName,RT (min),W50,Area,Comment\n\"uracil-like, marker\",1.02,0.021,10,\nalpha-ol,3.20,0.050,200,main\n",
        )
        .unwrap();
        assert_eq!(t.peaks().len(), 2);
        assert_eq!(t.peaks()[0].name, "uracil-like, marker");
        assert_eq!(t.peaks()[1].line, 4);
        assert_eq!(t.ignored_columns(), ["Comment"]);
    }

    #[test]
    fn semicolon_tables_with_decimal_commas_name_the_cause() {
        // the CSV a spreadsheet writes in a locale with decimal commas (invented peaks)
        for text in [
            "name;rt;w50\nA;1,23;0,05\nB;2,5;0,06\n",
            "\u{feff}peak;tR;width\r\nA;1,23;0,05\r\n",
            "name;rt;w50\n",
        ] {
            let e = PeakTable::parse(text).unwrap_err();
            assert!(
                matches!(e, PeakTableError::SemicolonSeparated { line: 1, .. }),
                "{text:?}: {e}"
            );
            let m = e.to_string();
            assert!(
                m.contains("semicolons") && m.contains("decimal separator"),
                "{m}"
            );
        }
        // a header with neither is still refused as before
        assert!(matches!(
            PeakTable::parse("name rt w50\n").unwrap_err(),
            PeakTableError::NoDelimiter { .. }
        ));
    }

    #[test]
    fn parses_tsv_and_half_pair() {
        let t = PeakTable::parse("name\ttr\tstart_half\tend_half\nx\t2.0\t1.98\t2.03\n").unwrap();
        let w = t.peaks()[0].width_half_min.unwrap();
        assert!((w - 0.05).abs() < 1e-12);
    }

    #[test]
    fn errors_name_line_and_column() {
        let cases: [(&str, &str); 12] = [
            ("", "empty"),
            ("name rt w50\n", "neither tab nor comma"),
            ("rt,w50\n1,0.1\n", "`name`"),
            ("name,w50\nx,0.1\n", "`retention_time`"),
            ("name,rt\nx,1\n", "no width column"),
            (
                "name,rt,w50\nx,abc,0.1\n",
                "line 2, column `rt`: cannot read `abc`",
            ),
            ("name,rt,w50\nx,1,0\n", "line 2, column `width_half`: 0"),
            ("name,rt,w50\nx,1,-0.1\n", "-0.1"),
            (
                "name,rt,w50\nx,1,0.1\nx,2,0.1\n",
                "line 3: peak name `x` already used on line 2",
            ),
            ("name,rt (s),w50\nx,60,0.1\n", "minutes"),
            ("name,rt,w50\nx,1\n", "line 2: expected 3 fields"),
            (
                "name,rt,rt_min,w50\nx,1,1,0.1\n",
                "both give `retention_time`",
            ),
        ];
        for (text, needle) in cases {
            let e = PeakTable::parse(text).unwrap_err().to_string();
            assert!(e.contains(needle), "{text:?}: {e}");
        }
    }

    #[test]
    fn serde_round_trip_validates() {
        let t = PeakTable::parse("name,rt,wb\nx,1,0.2\n").unwrap();
        let j = serde_json::to_string(&t).unwrap();
        let back: PeakTable = serde_json::from_str(&j).unwrap();
        assert_eq!(back, t);
        let bad = j.replace("0.2", "-0.2");
        assert!(serde_json::from_str::<PeakTable>(&bad).is_err());
    }

    proptest! {
        #[test]
        fn parser_never_panics(s in "\\PC{0,200}") {
            let _ = PeakTable::parse(&s);
        }

        #[test]
        fn parser_never_panics_on_table_like_text(
            s in "(name|rt|w50|wb|area|\"|,|\t|\n|[0-9.\\-]{1,4}|x){0,40}"
        ) {
            if let Ok(t) = PeakTable::parse(&s) {
                prop_assert!(!t.peaks().is_empty());
            }
        }
    }
}
