//! Recognising what kind of identifier a query is: CAS registry number (with its check digit),
//! InChIKey, PubChem CID, SMILES or name, with explicit prefixes (`cas:`, `inchikey:`, `cid:`,
//! `smiles:`, `name:`) to force a reading.

use super::KbError;

/// How a query is to be looked up.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Query {
    /// A CAS registry number whose check digit is valid, e.g. `64-17-5`.
    Cas(String),
    /// A standard InChIKey (14-10-1 upper-case letters).
    InchiKey(String),
    /// A PubChem compound id.
    Cid(i64),
    /// A SMILES string (forced with `smiles:`; otherwise tried after the name look-up fails).
    Smiles(String),
    /// A name or synonym.
    Name(String),
}

/// One analyte from a list: what to look up and, from a table with both a `name` and a
/// `smiles` column, the name to show for it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ListEntry {
    /// The query to resolve (the SMILES cell when the table has one, else the name).
    pub query: String,
    /// The name given beside a SMILES, shown when the structure is not in the knowledge base.
    pub label: Option<String>,
    /// 1-based line number in the list.
    pub line: usize,
}

/// Split an analyte list into entries. Two forms:
/// - plain: one query (name, synonym, CAS, InChIKey, CID or SMILES) per line;
/// - a tab-separated table whose header names a `name` and/or a `smiles` column (other
///   columns are ignored); a row's SMILES is looked up when present, else its name.
///
/// Blank lines and lines whose first non-blank character is `#` are skipped; white space
/// around cells and a leading UTF-8 byte-order mark are removed. No in-line comments: `#` is a
/// triple bond in SMILES.
///
/// # Errors
/// [`KbError::BadInput`] naming the line: a tab in a plain list (a table needs its header), or
/// a table row with neither a name nor a SMILES.
pub fn parse_analyte_list(text: &str) -> Result<Vec<ListEntry>, KbError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim_end_matches(['\r', '\n'])))
        .filter(|(_, l)| {
            let t = l.trim();
            !t.is_empty() && !t.starts_with('#')
        })
        .peekable();
    let header: Option<(Option<usize>, Option<usize>)> = lines.peek().and_then(|(_, l)| {
        let cols: Vec<String> = l
            .split('\t')
            .map(|c| c.trim().to_ascii_lowercase())
            .collect();
        let name = cols.iter().position(|c| c == "name");
        let smiles = cols.iter().position(|c| c == "smiles");
        (l.contains('\t') && (name.is_some() || smiles.is_some())).then_some((name, smiles))
    });
    let mut out = Vec::new();
    match header {
        None => {
            for (line, l) in lines {
                let l = l.trim();
                if l.contains('\t') {
                    return Err(KbError::BadInput(format!(
                        "analyte list line {line} (`{}`) has a tab: one analyte per line, or a \
                         tab-separated table whose first line names a `name` and/or `smiles` column",
                        l.escape_default()
                    )));
                }
                out.push(ListEntry {
                    query: l.to_string(),
                    label: None,
                    line,
                });
            }
        }
        Some((name_col, smiles_col)) => {
            lines.next();
            for (line, l) in lines {
                let cells: Vec<&str> = l.split('\t').map(str::trim).collect();
                let cell = |c: Option<usize>| {
                    c.and_then(|i| cells.get(i).copied())
                        .filter(|s| !s.is_empty())
                };
                let (name, smiles) = (cell(name_col), cell(smiles_col));
                let entry = match (name, smiles) {
                    (n, Some(s)) => ListEntry {
                        query: s.to_string(),
                        label: n.map(str::to_string),
                        line,
                    },
                    (Some(n), None) => ListEntry {
                        query: n.to_string(),
                        label: None,
                        line,
                    },
                    (None, None) => {
                        return Err(KbError::BadInput(format!(
                            "analyte table line {line} (`{}`) has neither a name nor a SMILES",
                            l.escape_default()
                        )));
                    }
                };
                out.push(entry);
            }
        }
    }
    Ok(out)
}

/// Classify a query. Malformed identifiers that were clearly meant as one (a CAS-shaped string
/// with a wrong check digit, `inchikey:` with the wrong shape) are errors, never silently
/// treated as names.
///
/// # Errors
/// [`KbError::BadIdentifier`] naming the value and what is wrong with it.
pub fn classify(raw: &str) -> Result<Query, KbError> {
    let q = raw.trim();
    if q.is_empty() {
        return Err(bad(raw, "empty query"));
    }
    if let Some((prefix, rest)) = q.split_once(':') {
        let rest = rest.trim();
        match prefix.trim().to_ascii_lowercase().as_str() {
            "cas" => return parse_cas(rest).map(Query::Cas),
            "inchikey" => return parse_inchikey(rest).map(Query::InchiKey),
            "cid" => return parse_cid(rest).map(Query::Cid),
            "smiles" => {
                if rest.is_empty() {
                    return Err(bad(raw, "empty SMILES after `smiles:`"));
                }
                return Ok(Query::Smiles(rest.to_string()));
            }
            "name" => {
                if rest.is_empty() {
                    return Err(bad(raw, "empty name after `name:`"));
                }
                return Ok(Query::Name(rest.to_string()));
            }
            _ => {}
        }
    }
    if looks_like_cas(q) {
        return parse_cas(q).map(Query::Cas);
    }
    if looks_like_inchikey(q) {
        return parse_inchikey(q).map(Query::InchiKey);
    }
    if q.len() <= 12 && q.bytes().all(|b| b.is_ascii_digit()) {
        return parse_cid(q).map(Query::Cid);
    }
    Ok(Query::Name(q.to_string()))
}

fn bad(value: &str, why: &str) -> KbError {
    KbError::BadIdentifier {
        value: value.to_string(),
        why: why.to_string(),
    }
}

/// Digits-dash-two digits-dash-one digit: the shape of a CAS number.
fn looks_like_cas(q: &str) -> bool {
    let parts: Vec<&str> = q.split('-').collect();
    parts.len() == 3
        && (2..=7).contains(&parts[0].len())
        && parts[1].len() == 2
        && parts[2].len() == 1
        && parts.iter().all(|p| p.bytes().all(|b| b.is_ascii_digit()))
}

/// Validate a CAS registry number: shape and check digit (the last digit equals the sum of
/// the other digits, each times its position counted from the right, modulo 10; CAS
/// registry documentation).
///
/// # Errors
/// [`KbError::BadIdentifier`] for a wrong shape or check digit.
///
/// # Examples
/// ```
/// use phasewise::kb::identifier::parse_cas;
/// assert!(parse_cas("7732-18-5").is_ok()); // water
/// assert!(parse_cas("7732-18-4").is_err());
/// ```
pub fn parse_cas(q: &str) -> Result<String, KbError> {
    if !looks_like_cas(q) {
        return Err(bad(
            q,
            "a CAS number has the form NNNNNNN-NN-N (2 to 7 digits, 2, 1)",
        ));
    }
    let digits: Vec<u32> = q
        .bytes()
        .filter(u8::is_ascii_digit)
        .map(|b| u32::from(b - b'0'))
        .collect();
    let (body, check) = digits.split_at(digits.len() - 1);
    let sum: u32 = body
        .iter()
        .rev()
        .enumerate()
        .map(|(i, d)| (i as u32 + 1) * d)
        .sum();
    if sum % 10 != check[0] {
        return Err(bad(
            q,
            &format!(
                "CAS check digit is {} but the digits give {}",
                check[0],
                sum % 10
            ),
        ));
    }
    Ok(q.to_string())
}

fn looks_like_inchikey(q: &str) -> bool {
    let b = q.as_bytes();
    b.len() == 27 && b[14] == b'-' && b[25] == b'-'
}

/// Validate a standard InChIKey: 14 upper-case letters, `-`, 10 upper-case letters, `-`, one
/// upper-case letter (IUPAC InChI technical manual).
///
/// # Errors
/// [`KbError::BadIdentifier`] for any other shape.
pub fn parse_inchikey(q: &str) -> Result<String, KbError> {
    let up = q.to_ascii_uppercase();
    let ok = looks_like_inchikey(&up)
        && up.bytes().enumerate().all(|(i, c)| {
            if i == 14 || i == 25 {
                c == b'-'
            } else {
                c.is_ascii_uppercase()
            }
        });
    if ok {
        Ok(up)
    } else {
        Err(bad(
            q,
            "an InChIKey has the form XXXXXXXXXXXXXX-XXXXXXXXXX-X (letters only)",
        ))
    }
}

fn parse_cid(q: &str) -> Result<i64, KbError> {
    match q.parse::<i64>() {
        Ok(n) if n > 0 => Ok(n),
        _ => Err(bad(q, "a PubChem CID is a positive whole number")),
    }
}

/// Whether a string could be a SMILES string (used after a name look-up fails, to decide
/// between "unknown name" and "try it as a structure").
pub fn could_be_smiles(q: &str) -> bool {
    !q.is_empty()
        && !q.contains(char::is_whitespace)
        && q.chars()
            .all(|c| c.is_ascii_alphanumeric() || "()[]=#@+-\\/%.:*$~".contains(c))
        && q.chars().any(|c| "BCNOSPFIcnosp".contains(c))
}

#[cfg(test)]
mod tests {
    use super::*;

    // Check digits of these CAS numbers, PubChem records: ethanol 64-17-5, water 7732-18-5,
    // caffeine 58-08-2, benzene 71-43-2.
    #[test]
    fn valid_cas_numbers_pass_the_check_digit() {
        for c in ["64-17-5", "7732-18-5", "58-08-2", "71-43-2"] {
            assert_eq!(classify(c).unwrap(), Query::Cas(c.to_string()), "{c}");
        }
    }

    #[test]
    fn a_wrong_check_digit_is_an_error_not_a_name() {
        let e = classify("64-17-6").unwrap_err().to_string();
        assert!(e.contains("64-17-6") && e.contains("check digit"), "{e}");
    }

    #[test]
    fn inchikeys_and_cids_are_recognised() {
        // caffeine, PubChem CID 2519
        assert_eq!(
            classify("RYYVLZVUVIJVGH-UHFFFAOYSA-N").unwrap(),
            Query::InchiKey("RYYVLZVUVIJVGH-UHFFFAOYSA-N".into())
        );
        assert_eq!(classify("2519").unwrap(), Query::Cid(2519));
        assert_eq!(classify("cid:2519").unwrap(), Query::Cid(2519));
        assert!(classify("inchikey:RYYVLZVUVIJVGH").is_err());
        assert!(classify("cid:-4").is_err());
    }

    #[test]
    fn prefixes_force_a_reading() {
        assert_eq!(classify("smiles:CO").unwrap(), Query::Smiles("CO".into()));
        assert_eq!(classify("name:2519").unwrap(), Query::Name("2519".into()));
        assert_eq!(
            classify("caffeine").unwrap(),
            Query::Name("caffeine".into())
        );
        // a colon that is not a known prefix stays part of the name
        assert_eq!(
            classify("ratio: 1:1").unwrap(),
            Query::Name("ratio: 1:1".into())
        );
    }

    #[test]
    fn analyte_lists_skip_comments_blanks_and_bom() {
        let text = "\u{feff}caffeine\r\n\n  # a comment\n  C#N  \n\t\ntheobromine";
        let q: Vec<String> = parse_analyte_list(text)
            .unwrap()
            .into_iter()
            .map(|e| e.query)
            .collect();
        assert_eq!(q, ["caffeine", "C#N", "theobromine"]);
        assert!(
            parse_analyte_list("# only a comment\n\n")
                .unwrap()
                .is_empty()
        );
    }

    #[test]
    fn analyte_tables_take_the_smiles_and_keep_the_name() {
        let text = "name\tsmiles\tnote\ninvented-a\tCCO\tx\nwater\t\n\tCCN\n";
        let e = parse_analyte_list(text).unwrap();
        assert_eq!(e.len(), 3);
        assert_eq!(
            (e[0].query.as_str(), e[0].label.as_deref(), e[0].line),
            ("CCO", Some("invented-a"), 2)
        );
        assert_eq!(
            (e[1].query.as_str(), e[1].label.as_deref()),
            ("water", None)
        );
        assert_eq!((e[2].query.as_str(), e[2].label.as_deref()), ("CCN", None));
        // a row with neither cell, and a tab in a plain list, name their line
        let err = parse_analyte_list("name\tsmiles\tnote\n\t\tfoo\n")
            .unwrap_err()
            .to_string();
        assert!(err.contains("line 2"), "{err}");
        let err = parse_analyte_list("caffeine\nCCO\tethanol\n")
            .unwrap_err()
            .to_string();
        assert!(err.contains("line 2"), "{err}");
    }

    proptest::proptest! {
        #[test]
        fn analyte_list_lines_are_trimmed_and_non_empty(s in "\\PC{0,200}") {
            if let Ok(entries) = parse_analyte_list(&s) {
                for e in entries {
                    proptest::prop_assert!(!e.query.is_empty());
                    proptest::prop_assert_eq!(e.query.trim(), e.query.as_str());
                    proptest::prop_assert!(e.line >= 1);
                }
            }
        }

        #[test]
        fn classify_never_panics(s in "\\PC{0,60}") {
            let _ = classify(&s);
        }

        #[test]
        fn every_valid_cas_body_has_exactly_one_check_digit(body in 1000u32..99_999_999) {
            let s = body.to_string();
            let (a, b) = s.split_at(s.len() - 2);
            let ok = (0..10).filter(|d| parse_cas(&format!("{a}-{b}-{d}")).is_ok()).count();
            proptest::prop_assert_eq!(ok, 1);
        }
    }
}
