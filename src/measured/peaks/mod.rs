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
//! | `name`, `compound`, `compound_name`, `peak`, `peak_name`, `analyte`, `component` | analyte name (required, unique) |
//! | `retention_time`, `rt`, `tr`, `t_r`, `ret_time`, `ret._time`, `retention` | retention time (required) |
//! | `width_half`, `w50`, `w_50`, `w0.5`, `w_0.5`, `w1/2`, `wh`, `w_h`, `fwhm`, `width_at_half_height`, `peak_width_at_half_height`, `half_height_width`, `width_50%` | width at half height |
//! | `start_half`, `end_half` | times where the peak crosses half height; width = end − start |
//! | `width_base`, `wb`, `w_b`, `base_width`, `width_at_base`, `peak_width_at_base` | tangent baseline width |
//! | `area`, `peak_area` | peak area (any unit, used for area %) |
//! | `height`, `peak_height` | peak height (any unit) |
//! | `tailing`, `usp_tailing`, `tailing_factor`, `symmetry_factor` | USP tailing factor (the pharmacopoeial symmetry factor is the same ratio) given directly |
//! | `w5`, `f5` | full width and front half-width at 5 % height (for USP tailing) |
//! | `a10`, `b10` | front and back half-widths at 10 % height (for asymmetry) |
//!
//! "Retention Time", "RT \[min\]", "Width at half height (min)" and "W0.5" therefore all
//! match (spaces and hyphens become `_`, case is ignored, a unit in brackets is split off).
//!
//! For [`PeakTable::parse`] at least one width column (`width_half`, the
//! `start_half`/`end_half` pair, or `width_base`) is required, and every peak needs a width
//! value; [`PeakTable::parse_retention_only`] accepts tables of names and retention times only
//! (scouting fits need no widths). Tables are limited to [`MAX_PEAKS`] rows. Parsing and
//! lookups by name take time linear in the number of peaks. Other columns are listed in
//! [`PeakTable::ignored_columns`], never silently dropped. A time column whose header carries a
//! unit other than minutes (`rt (s)`, `rt_sec`) is rejected.

use std::collections::HashMap;

use serde::{Deserialize, Serialize};
use thiserror::Error;

mod headers;

use headers::{Col, classify, split_fields, split_header};

/// Largest peak table accepted (rows). Far beyond any chromatogram (a comprehensive
/// two-dimensional run resolves a few thousand peaks); larger input is refused with a message
/// rather than read into memory.
pub const MAX_PEAKS: usize = 1_000_000;

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
        accepted: String,
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
    /// More rows than any chromatogram has.
    #[error(
        "peak table has more than {max} peaks (stopped at line {line}); no chromatogram has that \
         many: split the table or check that the file is a peak table"
    )]
    TooManyPeaks {
        /// The limit, [`MAX_PEAKS`].
        max: usize,
        /// Line where reading stopped.
        line: usize,
    },
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
    /// Widths were not required (a retention-time-only table for scouting).
    retention_only: bool,
    /// Position of each name in `peaks` (lookups in constant time).
    index: HashMap<String, usize>,
}

/// Serialised form of [`PeakTable`], validated on the way in.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PeakTableData {
    /// Peaks in table order.
    pub peaks: Vec<Peak>,
    /// Columns that were present but not used.
    #[serde(default)]
    pub ignored_columns: Vec<String>,
    /// Widths were not required (retention times only, for scouting fits).
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub retention_only: bool,
}

impl TryFrom<PeakTableData> for PeakTable {
    type Error = PeakTableError;
    fn try_from(d: PeakTableData) -> Result<Self, PeakTableError> {
        let mut t = PeakTable::build(d.peaks, !d.retention_only)?;
        t.ignored_columns = d.ignored_columns;
        Ok(t)
    }
}

impl From<PeakTable> for PeakTableData {
    fn from(t: PeakTable) -> Self {
        PeakTableData {
            peaks: t.peaks,
            ignored_columns: t.ignored_columns,
            retention_only: t.retention_only,
        }
    }
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
        Self::parse_inner(text, true, MAX_PEAKS)
    }

    /// Parses a table that may lack widths: names and retention times are enough for
    /// scouting fits. Widths present are read and checked as in [`PeakTable::parse`]; peaks
    /// without one report it through [`PeakTable::peaks_without_width`].
    ///
    /// # Errors
    /// As [`PeakTable::parse`], less the width requirement.
    ///
    /// # Examples
    /// ```
    /// use phasewise::measured::peaks::PeakTable;
    /// // Invented demo table with the headings of a typical data-system export.
    /// let t = PeakTable::parse_retention_only("Compound,Retention Time (min)\nalpha-ol,3.2\n").unwrap();
    /// assert_eq!(t.peaks_without_width(), 1);
    /// ```
    pub fn parse_retention_only(text: &str) -> Result<Self, PeakTableError> {
        Self::parse_inner(text, false, MAX_PEAKS)
    }

    fn parse_inner(
        text: &str,
        require_widths: bool,
        max_peaks: usize,
    ) -> Result<Self, PeakTableError> {
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
                accepted: headers::accepted(Col::Name),
            });
        }
        if idx(Col::Rt).is_none() {
            return Err(PeakTableError::MissingColumn {
                column: "retention_time",
                accepted: headers::accepted(Col::Rt),
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
        if require_widths
            && idx(Col::WHalf).is_none()
            && idx(Col::StartHalf).is_none()
            && idx(Col::WBase).is_none()
        {
            return Err(PeakTableError::NoWidthColumn);
        }
        let mut peaks = Vec::new();
        for (line_no, line) in lines {
            if peaks.len() >= max_peaks {
                return Err(PeakTableError::TooManyPeaks {
                    max: max_peaks,
                    line: line_no,
                });
            }
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
        let mut table = Self::build(peaks, require_widths)?;
        table.ignored_columns = ignored;
        Ok(table)
    }

    /// Builds a table from peaks, with the same value checks as [`PeakTable::parse`].
    ///
    /// # Errors
    /// Duplicate names, non-positive widths or retention times, missing widths.
    pub fn from_peaks(peaks: Vec<Peak>) -> Result<Self, PeakTableError> {
        Self::build(peaks, true)
    }

    /// Validates peaks in one pass (time linear in the number of peaks: names are checked for
    /// duplicates through a hash map, not by scanning the earlier rows).
    fn build(peaks: Vec<Peak>, require_widths: bool) -> Result<Self, PeakTableError> {
        if peaks.is_empty() {
            return Err(PeakTableError::NoPeaks);
        }
        if peaks.len() > MAX_PEAKS {
            return Err(PeakTableError::TooManyPeaks {
                max: MAX_PEAKS,
                line: peaks[MAX_PEAKS].line,
            });
        }
        let mut index: HashMap<String, usize> = HashMap::with_capacity(peaks.len());
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
            if require_widths && p.width_half_min.is_none() && p.width_base_min.is_none() {
                return Err(PeakTableError::NoWidthValue {
                    line,
                    name: p.name.clone(),
                });
            }
            if let Some(&first) = index.get(&p.name) {
                return Err(PeakTableError::DuplicateName {
                    name: p.name.clone(),
                    first_line: peaks[first].line,
                    line,
                });
            }
            index.insert(p.name.clone(), i);
        }
        Ok(Self {
            peaks,
            ignored_columns: Vec::new(),
            retention_only: !require_widths,
            index,
        })
    }

    /// Number of peaks with neither a half-height nor a baseline width.
    pub fn peaks_without_width(&self) -> usize {
        self.peaks
            .iter()
            .filter(|p| p.width_half_min.is_none() && p.width_base_min.is_none())
            .count()
    }

    /// A copy in which every peak without a width gets a half-height width estimated from
    /// the plate number: w½ = 2.3548 tR/√N (Gaussian peak, σ = tR/√N; isocratic theory,
    /// SKD 2010 ch. 2). Returns the table and the names of the peaks whose width was
    /// estimated, so the output can say so.
    ///
    /// # Errors
    /// A plate number that is not positive and finite.
    pub fn with_estimated_widths(
        &self,
        plates: f64,
    ) -> Result<(PeakTable, Vec<String>), PeakTableError> {
        if !(plates.is_finite() && plates > 0.0) {
            return Err(PeakTableError::NotPositive {
                line: 0,
                column: "plate number".into(),
                value: plates,
            });
        }
        let mut out = self.clone();
        let mut estimated = Vec::new();
        let factor = (8.0 * std::f64::consts::LN_2).sqrt() / plates.sqrt();
        for p in &mut out.peaks {
            if p.width_half_min.is_none() && p.width_base_min.is_none() {
                p.width_half_min = Some(p.retention_time_min * factor);
                estimated.push(p.name.clone());
            }
        }
        Ok((out, estimated))
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
        self.index.get(name).map(|&i| &self.peaks[i])
    }

    /// Header cells that matched no recognised column.
    pub fn ignored_columns(&self) -> &[String] {
        &self.ignored_columns
    }
}

/// Every header the parser recognises, for documentation and help text.
pub fn recognised_headers() -> Vec<&'static str> {
    headers::SYNONYMS.iter().map(|(h, _)| *h).collect()
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

    #[test]
    fn common_headings_of_lab_exports_are_recognised() {
        // Invented tables with headings as data systems commonly export them.
        for header in [
            "Compound,Retention Time (min),Width at half height (min),Area,Height",
            "Peak Name,RT [min],W0.5,Peak Area,Peak Height",
            "name,tR,w1/2,area,height",
            "Analyte,Ret. Time,W50,area,height",
            "component,t_R,FWHM,area,height",
        ] {
            let t = PeakTable::parse(&format!("{header}\nalpha-ol,3.2,0.05,100,10\n"))
                .unwrap_or_else(|e| panic!("{header}: {e}"));
            let p = &t.peaks()[0];
            assert_eq!(p.name, "alpha-ol", "{header}");
            assert_eq!(p.width_half_min, Some(0.05), "{header}");
            assert_eq!(p.area, Some(100.0), "{header}");
            assert!(
                t.ignored_columns().is_empty(),
                "{header}: {:?}",
                t.ignored_columns()
            );
        }
        // every documented synonym is listed once
        let h = recognised_headers();
        let mut d = h.clone();
        d.sort_unstable();
        d.dedup();
        assert_eq!(d.len(), h.len());
        // the error for a missing retention column lists the synonyms
        let e = PeakTable::parse("name,w50\nx,0.1\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("ret_time") && e.contains("tr"), "{e}");
    }

    #[test]
    fn retention_only_tables_are_accepted_for_scouting_and_widths_estimated_on_request() {
        let text = "name,rt\ninv-a,2.0\ninv-b,4.0\n";
        assert!(PeakTable::parse(text).is_err());
        let t = PeakTable::parse_retention_only(text).unwrap();
        assert_eq!(t.peaks_without_width(), 2);
        // w½ = 2.3548 tR/√N; N = 10 000: 2.0 × 2.3548/100 = 0.047096 min
        let (e, names) = t.with_estimated_widths(10_000.0).unwrap();
        assert_eq!(names, ["inv-a", "inv-b"]);
        assert!((e.peaks()[0].width_half_min.unwrap() - 0.047_096).abs() < 1e-6);
        assert_eq!(e.peaks_without_width(), 0);
        assert!(t.with_estimated_widths(0.0).is_err());
        // given widths are kept and checked
        let t = PeakTable::parse_retention_only("name,rt,w50\na,2.0,0.05\nb,3.0,\n").unwrap();
        assert_eq!(t.peaks_without_width(), 1);
        assert!(PeakTable::parse_retention_only("name,rt,w50\na,2.0,-1\n").is_err());
        // a retention-only table survives a JSON round trip
        let j = serde_json::to_string(&t).unwrap();
        assert_eq!(serde_json::from_str::<PeakTable>(&j).unwrap(), t);
    }

    #[test]
    fn lookups_and_duplicate_checks_use_the_index() {
        let mut text = String::from("name,rt,w50\n");
        for i in 0..5000 {
            text.push_str(&format!("p{i},{},0.01\n", 1.0 + f64::from(i) * 0.01));
        }
        let t = PeakTable::parse(&text).unwrap();
        assert_eq!(t.get("p4999").unwrap().line, 5001);
        assert!(t.get("p5000").is_none());
        text.push_str("p17,99,0.01\n");
        let e = PeakTable::parse(&text).unwrap_err().to_string();
        assert!(
            e.contains("line 5002: peak name `p17` already used on line 19"),
            "{e}"
        );
    }

    #[test]
    fn tables_beyond_the_limit_are_refused_with_a_message() {
        let text = "name,rt,w50\na,1,0.1\nb,2,0.1\nc,3,0.1\n";
        let e = PeakTable::parse_inner(text, true, 2)
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("more than 2 peaks") && e.contains("line 4"),
            "{e}"
        );
        assert!(PeakTable::parse_inner(text, true, 3).is_ok());
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
