//! Name normalisation for matching what a chemist types against names and synonyms.
//!
//! Two spellings match when they differ only in case, Greek letters written as symbols or
//! words (`α` = `alpha`), punctuation and white space; the prime of a locant (`4'`, `4′`)
//! is kept, since `2,2',3,4,4',5'-` and `2,2',3,4,4',5-hexachlorobiphenyl` are different
//! congeners. A leading stereo descriptor (`(R)-`,
//! `(S)-`, `(+)-`, `(-)-`, `(±)-`, `rac-`, `dl-`, `d-`, `l-`) is kept by [`normalise_name`]:
//! `L-alanine` and `D-alanine` are different analytes (issue 13). [`normalise_name_stereo_free`]
//! drops it; the knowledge base stores that form too (rank 3), so that a name whose stereo
//! descriptor the base does not hold still finds the compound, and the answer says so. Positional locants are
//! kept (they distinguish isomers), so `1,2-dichlorobenzene` and `1,3-dichlorobenzene` stay
//! distinct, but the comma itself is dropped. A sign of optical rotation, `(+)` or `(-)`, is kept
//! (as `+`/`-`) unless the name also carries a configuration (`(R)`, `D-`): `(+)-limonene` and
//! `(-)-limonene` are different analytes, and neither is plain `limonene`; a racemate's mark
//! (`(±)`) is dropped. Geometric descriptors (`(E)-`, `(Z)-`, `cis-`,
//! `trans-`) are kept: they name different compounds that can separate.

/// Greek letters as symbols and their spelled-out names (lower case).
const GREEK: &[(char, &str)] = &[
    ('α', "alpha"),
    ('β', "beta"),
    ('γ', "gamma"),
    ('δ', "delta"),
    ('ε', "epsilon"),
    ('ζ', "zeta"),
    ('η', "eta"),
    ('θ', "theta"),
    ('ι', "iota"),
    ('κ', "kappa"),
    ('λ', "lambda"),
    ('μ', "mu"),
    ('ν', "nu"),
    ('ξ', "xi"),
    ('ο', "omicron"),
    ('π', "pi"),
    ('ρ', "rho"),
    ('σ', "sigma"),
    ('τ', "tau"),
    ('υ', "upsilon"),
    ('φ', "phi"),
    ('χ', "chi"),
    ('ψ', "psi"),
    ('ω', "omega"),
];

/// Leading stereo descriptors removed before matching (checked after lower-casing).
const STEREO_PREFIXES: &[&str] = &[
    "(+/-)-", "(±)-", "(+-)-", "(rs)-", "(sr)-", "(r,s)-", "(r)-", "(s)-", "(+)-", "(-)-", "(−)-",
    "(–)-", "rac-", "dl-", "d-", "l-", "(d)-", "(l)-", "(dl)-",
];

/// Normalise a name for matching. Returns an empty string when nothing matchable is left.
///
/// # Examples
/// ```
/// use phasewise::kb::normalise::{normalise_name, normalise_name_stereo_free};
/// assert_eq!(normalise_name("α-Pinene"), normalise_name("alpha-pinene"));
/// assert_ne!(normalise_name("(S)-Ibuprofen"), normalise_name("ibuprofen"));
/// assert_eq!(normalise_name_stereo_free("(S)-Ibuprofen"), normalise_name("ibuprofen"));
/// assert_ne!(normalise_name("1,2-dichlorobenzene"), normalise_name("1,3-dichlorobenzene"));
/// ```
pub fn normalise_name(name: &str) -> String {
    normalise(name, false)
}

/// As [`normalise_name`] with leading stereo descriptors dropped (`(R)-(+)-limonene` ->
/// `limonene`).
pub fn normalise_name_stereo_free(name: &str) -> String {
    normalise(name, true)
}

fn normalise(name: &str, drop_stereo: bool) -> String {
    let mut lower = String::with_capacity(name.len());
    for c in name.trim().chars() {
        for l in c.to_lowercase() {
            lower.push(l);
        }
    }
    let mut rest = lower.as_str();
    // Strip repeated stereo prefixes such as "(r)-(+)-".
    loop {
        if !drop_stereo {
            break;
        }
        let before = rest.len();
        for p in STEREO_PREFIXES {
            if let Some(r) = rest.strip_prefix(p) {
                // keep the prefix if nothing (or only punctuation) is left: "d-" alone is a name
                if r.chars().any(char::is_alphanumeric) {
                    rest = r;
                }
                break;
            }
        }
        if rest.len() == before {
            break;
        }
    }
    let keep_sign = !has_configuration_descriptor(&lower);
    let mut out = String::with_capacity(rest.len());
    let mut chars = rest.char_indices();
    while let Some((at, c)) = chars.next() {
        if c == '('
            && let Some((sign, len)) = rotation_sign(&rest[at..])
        {
            // skip the group; keep its sign when no configuration descriptor says more
            for _ in 0..len - 1 {
                chars.next();
            }
            if keep_sign && let Some(s) = sign {
                out.push(s);
            }
            continue;
        }
        if let Some((_, word)) = GREEK.iter().find(|(g, _)| *g == c) {
            out.push_str(word);
        } else if c == 'µ' {
            out.push_str("mu");
        } else if c.is_alphanumeric() {
            out.push(c);
        } else if PRIMES.contains(&c) && out.ends_with(|p: char| p.is_ascii_digit() || p == '\'') {
            // a primed locant (`2,2',4,4'-`) names another position than the unprimed one:
            // PCB, PBDE and other biphenyl congeners differ only there
            out.push('\'');
            if c == '″' {
                out.push('\'');
            }
        }
    }
    out
}

/// A sign of optical rotation in parentheses at the start of `s`, `(+)` or `(-)` (the minus
/// also written `−` or `–`), with its length in characters: `Some('+')`/`Some('-')`, or
/// `None` for a racemate's mark (`(±)`, `(+/-)`, `(+-)`, CAS's `(.+-.)`), which says no
/// more than a name without descriptor.
fn rotation_sign(s: &str) -> Option<(Option<char>, usize)> {
    let inner: String = s[1..].chars().take_while(|&c| c != ')').collect();
    let len = inner.chars().count() + 2;
    if !s[1..].contains(')') || inner.is_empty() || inner.chars().count() > 6 {
        return None;
    }
    if !inner.chars().all(|c| "+-−–±/. ".contains(c)) {
        return None;
    }
    let plus = inner.contains('+');
    let minus = inner.contains(['-', '−', '–']);
    Some(match (plus, minus, inner.contains('±')) {
        (true, false, false) => (Some('+'), len),
        (false, true, false) => (Some('-'), len),
        (false, false, false) => return None,
        _ => (None, len),
    })
}

/// Whether a (lower-cased) name carries a configuration descriptor, `(R)`, `(2S,3R)`,
/// `(4aR,8aS)`, `D-`, `L-`, `DL-`, `(RS)`: a sign of rotation beside one adds nothing
/// (`(R)-(+)-limonene` is `(R)-limonene`, `D-(+)-glucose` is `D-glucose`), and is dropped.
fn has_configuration_descriptor(lower: &str) -> bool {
    let config_part = |p: &str| {
        let p = p.trim().trim_end_matches('*');
        if matches!(p, "r" | "s" | "rs" | "sr" | "d" | "l" | "dl") {
            return true;
        }
        let after_digits = p.trim_start_matches(|c: char| c.is_ascii_digit());
        if after_digits.len() == p.len() {
            return false;
        }
        let letter = after_digits
            .strip_prefix(['a', 'b'])
            .unwrap_or(after_digits);
        matches!(letter, "r" | "s")
    };
    let mut rest = lower;
    while let Some(open) = rest.find('(') {
        let after = &rest[open + 1..];
        let Some(close) = after.find(')') else { break };
        let inner = &after[..close];
        if !inner.is_empty() && inner.split(',').all(config_part) {
            return true;
        }
        rest = &after[close..];
    }
    // `d-`, `l-`, `dl-` as a word of their own (`d-glucose`, `n-acetyl-l-cysteine`)
    let b = lower.as_bytes();
    (0..b.len()).any(|i| {
        let start = i == 0 || !b[i - 1].is_ascii_alphanumeric();
        let word = |w: &[u8]| b[i..].starts_with(w) && b.get(i + w.len()) == Some(&b'-');
        start && (word(b"d") || word(b"l") || word(b"dl"))
    })
}

/// Characters written as the prime of a locant (`4'`, `4′`, `4’`, `4″` for a double prime).
const PRIMES: &[char] = &['\'', '′', '’', '‘', 'ʹ', '`', '´', '″'];

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn case_punctuation_and_space_are_ignored() {
        assert_eq!(normalise_name("Acetic Acid"), "aceticacid");
        assert_eq!(normalise_name("acetic-acid"), "aceticacid");
        assert_eq!(normalise_name("  ACETIC  acid "), "aceticacid");
    }

    #[test]
    fn greek_symbols_equal_spelled_names() {
        assert_eq!(normalise_name("β-carotene"), "betacarotene");
        assert_eq!(normalise_name("Β-Carotene"), "betacarotene");
    }

    #[test]
    fn stereo_prefixes_are_dropped_but_bare_prefix_is_kept() {
        assert_eq!(normalise_name_stereo_free("(R)-(+)-limonene"), "limonene");
        assert_eq!(normalise_name_stereo_free("(±)-ibuprofen"), "ibuprofen");
        assert_eq!(normalise_name_stereo_free("L-alanine"), "alanine");
        assert_eq!(normalise_name_stereo_free("d-"), "d");
        // kept by the default form: the stereoisomers are different analytes
        assert_eq!(normalise_name("L-alanine"), "lalanine");
        assert_ne!(normalise_name("L-alanine"), normalise_name("D-alanine"));
    }

    #[test]
    fn a_sign_of_rotation_is_kept_unless_a_configuration_says_more() {
        // (+)- and (-)-limonene are the two enantiomers; neither is plain limonene
        assert_eq!(normalise_name("(+)-Limonene"), "+limonene");
        assert_eq!(normalise_name("(−)-limonene"), "-limonene");
        assert_ne!(normalise_name("(-)-carvone"), normalise_name("carvone"));
        assert_eq!(normalise_name_stereo_free("(+)-limonene"), "limonene");
        assert_eq!(normalise_name_stereo_free("(−)-limonene"), "limonene");
        // an inverted CAS-style name keeps its sign: `alanine, (-)-` is not `alanine`
        assert_eq!(normalise_name("alanine, (-)-"), "alanine-");
        // a racemate's mark says no more than no descriptor
        assert_eq!(normalise_name("(±)-ibuprofen"), "ibuprofen");
        assert_eq!(normalise_name("malic acid, (.+-.)-"), "malicacid");
        assert_eq!(normalise_name("(+/-)-2-butanol"), "2butanol");
        // beside a configuration the sign is redundant
        assert_eq!(normalise_name("D-(+)-glucose"), normalise_name("D-glucose"));
        assert_eq!(
            normalise_name("(R)-(+)-limonene"),
            normalise_name("(R)-limonene")
        );
        assert_eq!(
            normalise_name("(1R,2S,5R)-(-)-menthol"),
            normalise_name("(1R,2S,5R)-menthol")
        );
        assert_eq!(
            normalise_name("(4aR,8aS)-(+)-decalol"),
            normalise_name("(4aR,8aS)-decalol")
        );
        assert_eq!(
            normalise_name("N-acetyl-L-(-)-cysteine"),
            normalise_name("N-acetyl-L-cysteine")
        );
        // parentheses that are not a sign stay punctuation
        assert_eq!(normalise_name("iron(III) chloride"), "ironiiichloride");
        assert_eq!(normalise_name("sodium(1+)"), "sodium1");
    }

    #[test]
    fn quotes_and_sql_are_just_characters() {
        assert_eq!(
            normalise_name("O'Brien's; DROP TABLE name;--"),
            "obriensdroptablename"
        );
    }

    #[test]
    fn primed_locants_are_kept() {
        // PCB 138 and PCB 137 (Ballschmiter & Zell numbering; from memory)
        assert_ne!(
            normalise_name("2,2',3,4,4',5'-hexachlorobiphenyl"),
            normalise_name("2,2',3,4,4',5-hexachlorobiphenyl")
        );
        // the prime written as ′ or ’ is the same prime
        assert_eq!(
            normalise_name("2,2′,4,4′-tetrabromodiphenyl ether"),
            normalise_name("2,2',4,4'-Tetrabromodiphenyl ether")
        );
        assert_eq!(
            normalise_name("2,2’,4,4’-tetrabromodiphenyl ether"),
            normalise_name("2,2',4,4'-tetrabromodiphenyl ether")
        );
        assert_eq!(normalise_name("2″-chloro"), normalise_name("2''-chloro"));
        // an apostrophe after a letter is punctuation
        assert_eq!(normalise_name("Bayer's"), "bayers");
    }

    proptest::proptest! {
        #[test]
        fn normalised_names_hold_no_space_or_punctuation(s in "\\PC{0,40}") {
            let n = normalise_name(&s);
            // letters, digits, the prime of a locant after a digit and a sign of rotation
            proptest::prop_assert!(
                n.chars().all(|c| c.is_alphanumeric() || c == '\'' || c == '+' || c == '-'),
                "{n:?}"
            );
            proptest::prop_assert!(!n.starts_with('\''), "{n:?}");
        }
    }
}
