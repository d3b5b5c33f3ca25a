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

    proptest::proptest! {
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
