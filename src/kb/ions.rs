//! Ions named as ions, and element names in a panel of ions.
//!
//! An explicit ion form (`Na+`, `Ca2+`, `Ca++`, `Cl-`, `SO4 2-` is not parsed, `sodium ion`,
//! `calcium cation`, `chloride`) always means the ion. A bare element name (`sodium`,
//! `calcium`) means the element in general, but in a panel that holds other ions a
//! chromatographer means the ion: [`Kb::resolve_panel`] resolves it so. Common practice in
//! ion chromatography, no source.

use super::resolve::Resolution;
use super::{Kb, KbError};

/// Element names (lower case) and the SMILES of the ion an analyst means by them in a panel
/// of ions: the common cation of a metal, the halide of a halogen.
const ION_OF_ELEMENT: &[(&str, &str)] = &[
    ("lithium", "[Li+]"),
    ("sodium", "[Na+]"),
    ("potassium", "[K+]"),
    ("rubidium", "[Rb+]"),
    ("caesium", "[Cs+]"),
    ("cesium", "[Cs+]"),
    ("magnesium", "[Mg+2]"),
    ("calcium", "[Ca+2]"),
    ("strontium", "[Sr+2]"),
    ("barium", "[Ba+2]"),
    ("manganese", "[Mn+2]"),
    ("zinc", "[Zn+2]"),
    ("nickel", "[Ni+2]"),
    ("cobalt", "[Co+2]"),
    ("cadmium", "[Cd+2]"),
    ("lead", "[Pb+2]"),
    ("copper", "[Cu+2]"),
    ("aluminium", "[Al+3]"),
    ("aluminum", "[Al+3]"),
    ("fluorine", "[F-]"),
    ("chlorine", "[Cl-]"),
    ("bromine", "[Br-]"),
    ("iodine", "[I-]"),
    ("ammonium", "[NH4+]"),
];

/// Element symbols accepted in explicit ion formulas (`Na+`, `Ca2+`).
const SYMBOLS: &[&str] = &[
    "H", "Li", "Na", "K", "Rb", "Cs", "Be", "Mg", "Ca", "Sr", "Ba", "Al", "Mn", "Fe", "Co", "Ni",
    "Cu", "Zn", "Cd", "Pb", "Hg", "Ag", "Cr", "Sn", "Tl", "F", "Cl", "Br", "I",
];

/// The SMILES of an explicit ion form, or `None`: `Na+`, `Na(+)`, `Ca2+`, `Ca+2`, `Ca++`,
/// `Cl-`, `NH4+`, `sodium ion`, `sodium cation`, `calcium(2+)`, `chloride ion`.
pub fn explicit_ion_smiles(raw: &str) -> Option<String> {
    let t = raw.trim();
    if t.eq_ignore_ascii_case("NH4+") || t.eq_ignore_ascii_case("ammonium ion") {
        return Some("[NH4+]".into());
    }
    // formula form
    let body = t.replace(['(', ')', ' '], "");
    let split = body.find(|c: char| c == '+' || c == '-' || c.is_ascii_digit());
    if let Some(k) = split {
        let (sym, charge) = body.split_at(k);
        if SYMBOLS.contains(&sym) && !charge.is_empty() {
            let sign = if charge.contains('+') { '+' } else { '-' };
            let signs = charge.chars().filter(|&c| c == sign).count();
            let digits: String = charge.chars().filter(char::is_ascii_digit).collect();
            let others = charge
                .chars()
                .any(|c| !(c.is_ascii_digit() || c == '+' || c == '-'));
            if others || charge.contains('+') && charge.contains('-') {
                return None;
            }
            let n: u32 = if digits.is_empty() {
                signs as u32
            } else if signs == 1 {
                digits.parse().ok()?
            } else {
                return None;
            };
            if !(1..=4).contains(&n) {
                return None;
            }
            return Some(if n == 1 {
                format!("[{sym}{sign}]")
            } else {
                format!("[{sym}{sign}{n}]")
            });
        }
    }
    // word form: `<element> ion`, `<element> cation`, `<element>(2+)`
    let low = t.to_ascii_lowercase();
    for suffix in [" ion", " cation", " anion"] {
        if let Some(el) = low.strip_suffix(suffix) {
            return element_ion(el.trim());
        }
    }
    None
}

/// The ion an analyst means by an element name in a panel of ions.
pub fn element_ion(name: &str) -> Option<String> {
    let low = name.trim().to_ascii_lowercase();
    ION_OF_ELEMENT
        .iter()
        .find(|(n, _)| *n == low)
        .map(|(_, s)| (*s).to_string())
}

/// Whether a resolved structure is an ion (one fragment with a net charge, or a formal
/// charge written on a single atom).
fn is_ion_smiles(smiles: &str) -> bool {
    let plus = smiles.matches('+').count();
    let minus = smiles.matches('-').count();
    !smiles.contains('.') && (plus > 0 || minus > 0) && plus != minus
        || smiles.starts_with('[') && smiles.ends_with(']') && (plus + minus) > 0
}

impl Kb {
    /// Resolve an explicit ion form (`Na+`, `sodium ion`), `None` when `raw` is not one.
    ///
    /// # Errors
    /// Database failures.
    pub fn resolve_ion(&self, raw: &str) -> Result<Option<Resolution>, KbError> {
        let Some(smiles) = explicit_ion_smiles(raw) else {
            return Ok(None);
        };
        Ok(Some(self.resolve_as(raw, &smiles)?))
    }

    fn resolve_as(&self, raw: &str, smiles: &str) -> Result<Resolution, KbError> {
        Ok(match self.resolve(&format!("smiles:{smiles}"))? {
            Resolution::Found(mut a) => {
                a.query = raw.trim().to_string();
                a.matched_by = format!("ion ({smiles})");
                Resolution::Found(a)
            }
            Resolution::StructureOnly { smiles, .. } => Resolution::StructureOnly {
                query: raw.trim().to_string(),
                smiles,
            },
            other => other,
        })
    }

    /// Resolve a panel: as [`Kb::resolve`] for each query, except that when the panel holds
    /// an ion, a bare element name (`sodium`, `calcium`, `chlorine`) is resolved as its ion.
    ///
    /// # Errors
    /// Database failures.
    pub fn resolve_panel(&self, queries: &[&str]) -> Result<Vec<Resolution>, KbError> {
        self.in_one_read(|| self.resolve_panel_now(queries))
    }

    fn resolve_panel_now(&self, queries: &[&str]) -> Result<Vec<Resolution>, KbError> {
        let mut out = Vec::with_capacity(queries.len());
        for q in queries {
            out.push(self.resolve(q)?);
        }
        let ion_panel = queries.iter().zip(&out).any(|(q, r)| match r {
            Resolution::Found(a) => {
                element_ion(q).is_none() && a.smiles.as_deref().is_some_and(is_ion_smiles)
            }
            _ => false,
        });
        if ion_panel {
            for (q, r) in queries.iter().zip(out.iter_mut()) {
                if let Some(smiles) = element_ion(q) {
                    *r = self.resolve_as(q, &smiles)?;
                    if let Resolution::Found(a) = r {
                        a.matched_by = format!("element name in a panel of ions: the ion {smiles}");
                    }
                }
            }
        }
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn explicit_forms() {
        let cases = [
            ("Na+", Some("[Na+]")),
            ("Na(+)", Some("[Na+]")),
            ("Ca2+", Some("[Ca+2]")),
            ("Ca+2", Some("[Ca+2]")),
            ("Ca++", Some("[Ca+2]")),
            ("Cl-", Some("[Cl-]")),
            ("NH4+", Some("[NH4+]")),
            ("sodium ion", Some("[Na+]")),
            ("Calcium cation", Some("[Ca+2]")),
            ("sodium", None),
            ("Na", None),
            ("caffeine", None),
            ("C-", None),
        ];
        for (q, want) in cases {
            assert_eq!(explicit_ion_smiles(q).as_deref(), want, "{q}");
        }
    }

    #[test]
    fn ion_smiles() {
        assert!(is_ion_smiles("[Na+]"));
        assert!(is_ion_smiles("O=S(=O)([O-])[O-]"));
        assert!(is_ion_smiles("O=[N+]([O-])[O-]"));
        assert!(!is_ion_smiles("C[N+](=O)[O-]"));
        assert!(!is_ion_smiles("CCO"));
    }
}
