//! Header recognition of peak tables: the synonyms of every column, unit suffixes, and the
//! CSV/TSV field splitter.

use super::PeakTableError;

/// Quantities a column can carry.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Col {
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
    pub(super) fn label(self) -> &'static str {
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
    pub(super) fn is_time(self) -> bool {
        !matches!(self, Col::Name | Col::Area | Col::Height | Col::Tailing)
    }
}

/// Every recognised header (after normalising case, spaces and hyphens to `_`) and what it
/// carries. The one list behind the parser, `recognised_headers` and the user guide.
pub(super) const SYNONYMS: &[(&str, Col)] = &[
    ("name", Col::Name),
    ("compound", Col::Name),
    ("compound_name", Col::Name),
    ("peak", Col::Name),
    ("peak_name", Col::Name),
    ("analyte", Col::Name),
    ("component", Col::Name),
    ("retention_time", Col::Rt),
    ("rt", Col::Rt),
    ("tr", Col::Rt),
    ("t_r", Col::Rt),
    ("ret_time", Col::Rt),
    ("ret._time", Col::Rt),
    ("retention", Col::Rt),
    ("width_half", Col::WHalf),
    ("w50", Col::WHalf),
    ("w_50", Col::WHalf),
    ("w0.5", Col::WHalf),
    ("w_0.5", Col::WHalf),
    ("w1/2", Col::WHalf),
    ("wh", Col::WHalf),
    ("w_h", Col::WHalf),
    ("fwhm", Col::WHalf),
    ("width_at_half_height", Col::WHalf),
    ("peak_width_at_half_height", Col::WHalf),
    ("half_height_width", Col::WHalf),
    ("width_50%", Col::WHalf),
    ("start_half", Col::StartHalf),
    ("end_half", Col::EndHalf),
    ("width_base", Col::WBase),
    ("wb", Col::WBase),
    ("w_b", Col::WBase),
    ("base_width", Col::WBase),
    ("width_at_base", Col::WBase),
    ("peak_width_at_base", Col::WBase),
    ("area", Col::Area),
    ("peak_area", Col::Area),
    ("height", Col::Height),
    ("peak_height", Col::Height),
    ("tailing", Col::Tailing),
    ("usp_tailing", Col::Tailing),
    ("tailing_factor", Col::Tailing),
    ("symmetry_factor", Col::Tailing),
    ("w5", Col::W5),
    ("f5", Col::F5),
    ("a10", Col::A10),
    ("b10", Col::B10),
];

/// The accepted headers of one quantity, comma-separated, for error messages.
pub(super) fn accepted(c: Col) -> String {
    SYNONYMS
        .iter()
        .filter(|(_, x)| *x == c)
        .map(|(h, _)| *h)
        .collect::<Vec<_>>()
        .join(", ")
}

pub(super) fn classify(base: &str) -> Option<Col> {
    SYNONYMS.iter().find(|(h, _)| *h == base).map(|(_, c)| *c)
}

/// Splits a header into (base name, unit) after normalising case, spaces and hyphens.
pub(super) fn split_header(raw: &str) -> (String, Option<String>) {
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

pub(super) fn split_fields(
    line: &str,
    delim: char,
    line_no: usize,
) -> Result<Vec<String>, PeakTableError> {
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
