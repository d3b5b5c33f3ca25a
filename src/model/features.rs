//! Analyte features for the retention model: a named set of descriptors per analyte, the
//! `DescriptorSource` trait that produces them, and the built-in constitutional descriptor
//! source that reads atom and bond counts straight from a SMILES string.
//!
//! The retention model stores the names of the descriptors it was trained with and asks for
//! exactly those at prediction time, so a richer structure engine can replace the built-in
//! source by implementing `DescriptorSource` (only `describe` changes, the model code does not).

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};
use thiserror::Error;

/// Errors raised while computing analyte features.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum FeatureError {
    /// The SMILES could not be read by the constitutional counter.
    #[error("cannot read SMILES {smiles:?} at character {position}: {reason}; check the structure")]
    BadSmiles {
        /// The SMILES as given.
        smiles: String,
        /// Byte offset of the problem.
        position: usize,
        /// What was wrong.
        reason: String,
    },
    /// The SMILES holds no heavy atom.
    #[error("SMILES {0:?} contains no heavy atom; give the analyte's structure")]
    Empty(String),
}

/// Properties of one analyte as the retention model reads them.
///
/// `descriptors` maps descriptor names (e.g. `mw_g_mol`, `n_c`) to values; the model reports a
/// missing name as an error instead of guessing it. `inchikey` enables the retention memory.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, Default)]
pub struct AnalyteFeatures {
    /// Standard InChIKey, used to look the analyte up in the retention memory.
    pub inchikey: Option<String>,
    /// Named descriptor values.
    pub descriptors: BTreeMap<String, f64>,
}

impl AnalyteFeatures {
    /// Features computed from a SMILES string with `PhasewiseDescriptors` (structure engine
    /// plus constitutional counts), the source the shipped model was trained with.
    ///
    /// # Errors
    /// `FeatureError` if the SMILES cannot be read.
    pub fn from_smiles(smiles: &str, inchikey: Option<&str>) -> Result<Self, FeatureError> {
        Ok(Self {
            inchikey: inchikey.map(str::to_owned),
            descriptors: PhasewiseDescriptors.describe(smiles)?,
        })
    }
}

/// Anything that turns a SMILES string into named descriptors.
pub trait DescriptorSource {
    /// Descriptor values for one structure.
    ///
    /// # Errors
    /// `FeatureError` when the structure cannot be read.
    fn describe(&self, smiles: &str) -> Result<BTreeMap<String, f64>, FeatureError>;
}

/// The descriptor source of the shipped model: the structure engine's descriptors
/// (`structure::describe`: Crippen logP and MR, TPSA, H-bond donors/acceptors, rotatable bonds,
/// aromatic rings, fraction sp3, McGowan volume, formal charge, molar mass) merged with the
/// constitutional counts of `ConstitutionalCounts` (the engine's molar mass wins), the
/// ionisation terms `ION_NAMES` on an integer pH grid (`NAME_ph_N`), the counts of acidic,
/// basic and permanently charged sites, and the `SECOND_ORDER_NAMES`.
#[derive(Debug, Clone, Copy, Default)]
pub struct PhasewiseDescriptors;

/// Names added by `PhasewiseDescriptors` on top of `CONSTITUTIONAL_NAMES`.
pub const ENGINE_NAMES: [&str; 11] = [
    "logp",
    "molar_refractivity",
    "tpsa_a2",
    "hbond_donors",
    "hbond_acceptors",
    "rotatable_bonds",
    "aromatic_rings",
    "fraction_csp3",
    "mcgowan_volume",
    "net_charge",
    "heteroatoms",
];

impl DescriptorSource for PhasewiseDescriptors {
    fn describe(&self, smiles: &str) -> Result<BTreeMap<String, f64>, FeatureError> {
        let d = crate::structure::describe(smiles).map_err(|e| FeatureError::BadSmiles {
            smiles: smiles.to_owned(),
            position: 0,
            reason: e.to_string(),
        })?;
        let mut out = ConstitutionalCounts.describe(smiles)?;
        let x = &d.descriptors;
        let values = [
            x.crippen_logp,
            x.crippen_molar_refractivity_cm3_mol,
            x.tpsa_a2,
            f64::from(x.hbond_donors),
            f64::from(x.hbond_acceptors),
            f64::from(x.rotatable_bonds),
            f64::from(x.aromatic_ring_count),
            x.fraction_csp3,
            x.mcgowan_volume_cm3_mol.unwrap_or(f64::NAN),
            f64::from(x.formal_charge),
            f64::from(x.heteroatom_count),
        ];
        for (n, v) in ENGINE_NAMES.iter().zip(values) {
            out.insert((*n).to_owned(), v);
        }
        if let Some(m) = x.molar_mass_g_mol {
            out.insert("mw_g_mol".to_owned(), m);
        }
        // Ionisation terms on an integer pH grid 0-14 (the model interpolates at the eluent
        // pH; `ion_term_at`) and the counts of acidic, basic and permanently charged sites.
        let bad = |e: String| FeatureError::BadSmiles {
            smiles: smiles.to_owned(),
            position: 0,
            reason: e,
        };
        let parsed = crate::structure::parse_smiles(smiles).map_err(|e| bad(e.to_string()))?;
        let sites = crate::structure::ionisable::detect_sites(&parsed.graph)
            .map_err(|e| bad(e.to_string()))?;
        use crate::structure::ionisable::SiteKind;
        let count = |k: SiteKind| sites.iter().filter(|s| s.kind == k).count() as f64;
        out.insert("n_acid_sites".into(), count(SiteKind::Acid));
        out.insert("n_base_sites".into(), count(SiteKind::Base));
        out.insert(
            "n_permanent_charges".into(),
            count(SiteKind::PermanentCation) + count(SiteKind::PermanentAnion),
        );
        let acids: Vec<f64> = sites
            .iter()
            .filter(|s| s.kind == SiteKind::Acid)
            .filter_map(|s| s.pka)
            .collect();
        let bases: Vec<f64> = sites
            .iter()
            .filter(|s| s.kind == SiteKind::Base)
            .filter_map(|s| s.pka)
            .collect();
        for ph in 0..=14u8 {
            for (name, value) in ion_terms(&acids, &bases, f64::from(ph)) {
                out.insert(format!("{name}_ph_{ph}"), value);
            }
        }
        // Second-order terms: psi_k1 is not linear in logP over the whole range (it levels off
        // for very polar and very apolar analytes), and the effect of polarity and size depends
        // on logP; products of the main descriptors give the ridge that curvature (chosen by
        // the system-grouped CV, docs/model.md "What was tried").
        let logp = x.crippen_logp;
        let tpsa = x.tpsa_a2 / 100.0;
        // mw_g_mol is set above (engine's molar mass, else the constitutional one)
        let log_mw = out.get("mw_g_mol").copied().unwrap_or(1.0).max(1.0).log10();
        let second_order = [
            ("logp_sq", logp * logp),
            ("tpsa_sq", tpsa * tpsa),
            ("logp_x_tpsa", logp * tpsa),
            ("logp_x_log_mw", logp * log_mw),
            ("log_mw_sq", log_mw * log_mw),
            ("logp_x_hbd", logp * f64::from(x.hbond_donors)),
            (
                "logp_x_aromatic_rings",
                logp * f64::from(x.aromatic_ring_count),
            ),
        ];
        for (n, v) in second_order {
            out.insert(n.to_owned(), v);
        }
        Ok(out)
    }
}

/// The ionisation terms of the retention model. For an analyte whose ionisable sites are
/// independent (Henderson–Hasselbalch per site; common practice, no source), a site with
/// neutral fraction `f` at the eluent pH is retained as `f·k_n + (1 − f)·k_i`; with the ionised
/// form `10^D` times less retained than the neutral one, `log10 k` drops by
/// `−log10(f + (1 − f)·10^−D)` (the classical model of retention of ionisable analytes, e.g.
/// Horváth, Melander & Molnár, Anal. Chem. 49 (1977) 142; from memory). The model gets these
/// terms for acid and for base sites at two ionised-form penalties, D = 1 and D = 2.5, summed
/// over the sites of each kind; every term is 0 for an analyte that is neutral at the pH and
/// falls monotonically as the sites ionise (acids as the pH rises above their pKa, bases as it
/// falls below theirs). Their RP coefficients are kept ≥ 0 (`linear`), so in RP ionisation
/// can only lower retention and pH reaches a prediction through nothing else.
pub const ION_NAMES: [&str; 4] = ["ion_acid_d1", "ion_acid_d25", "ion_base_d1", "ion_base_d25"];

/// Ionised-form retention penalties D (log10 units) of `ION_NAMES`.
const ION_PENALTIES: [f64; 2] = [1.0, 2.5];

/// The `ION_NAMES` terms at `ph` for acid and base site pKa values (conjugate-acid pKa for
/// bases).
pub fn ion_terms(acid_pkas: &[f64], base_pkas: &[f64], ph: f64) -> [(&'static str, f64); 4] {
    let term = |neutral: f64, d: f64| (neutral + (1.0 - neutral) * 10f64.powf(-d)).log10();
    let acid = |d: f64| -> f64 {
        acid_pkas
            .iter()
            .map(|pka| term(1.0 / (1.0 + 10f64.powf(ph - pka)), d))
            .sum()
    };
    let base = |d: f64| -> f64 {
        base_pkas
            .iter()
            .map(|pka| term(1.0 / (1.0 + 10f64.powf(pka - ph)), d))
            .sum()
    };
    [
        (ION_NAMES[0], acid(ION_PENALTIES[0])),
        (ION_NAMES[1], acid(ION_PENALTIES[1])),
        (ION_NAMES[2], base(ION_PENALTIES[0])),
        (ION_NAMES[3], base(ION_PENALTIES[1])),
    ]
}

/// One `ION_NAMES` term at `ph`, interpolated linearly on its integer grid `NAME_ph_N`
/// (interpolation keeps the grid's monotonicity in pH).
pub fn ion_term_at(f: &AnalyteFeatures, name: &str, ph: f64) -> Option<f64> {
    let ph = ph.clamp(0.0, 14.0);
    let lo = ph.floor();
    let hi = ph.ceil();
    let get = |p: f64| {
        f.descriptors
            .get(&format!("{name}_ph_{}", p as u8))
            .copied()
            .filter(|v| v.is_finite())
    };
    let (a, b) = (get(lo)?, get(hi)?);
    Some(a + (b - a) * (ph - lo))
}

/// Second-order descriptors of `PhasewiseDescriptors` (products of logP, TPSA/100 Å², log10
/// molar mass, H-bond donors and aromatic rings). The model uses them as main effects and ×
/// the HILIC flag only, without the other system interactions.
pub const SECOND_ORDER_NAMES: [&str; 7] = [
    "logp_sq",
    "tpsa_sq",
    "logp_x_tpsa",
    "logp_x_log_mw",
    "log_mw_sq",
    "logp_x_hbd",
    "logp_x_aromatic_rings",
];

/// The built-in descriptor source: element, hydrogen, aromatic-atom, bond and ring counts read
/// from the SMILES string with default valences (OpenSMILES organic-subset rules), plus the
/// molecular mass from standard atomic masses. It needs no structure engine; its counts are
/// constitutional descriptors in the sense of Todeschini & Consonni, "Handbook of Molecular
/// Descriptors" (from memory).
#[derive(Debug, Clone, Copy, Default)]
pub struct ConstitutionalCounts;

/// Names produced by `ConstitutionalCounts`, in a fixed order.
pub const CONSTITUTIONAL_NAMES: [&str; 16] = [
    "mw_g_mol",
    "heavy_atoms",
    "n_c",
    "n_n",
    "n_o",
    "n_s",
    "n_p",
    "n_halogen",
    "n_aromatic_atoms",
    "n_h",
    "n_polar_h",
    "n_double_bonds",
    "n_rings",
    "n_charged_atoms",
    "n_carbonyl_like",
    "n_sp3_c",
];

/// Standard atomic mass (g/mol, IUPAC 2013 conventional values, from memory) for elements that
/// occur in small organic analytes; others make the SMILES unreadable for this counter.
fn atomic_mass(symbol: &str) -> Option<f64> {
    Some(match symbol {
        "H" => 1.008,
        "B" => 10.81,
        "C" => 12.011,
        "N" => 14.007,
        "O" => 15.999,
        "F" => 18.998,
        "Na" => 22.990,
        "Mg" => 24.305,
        "Al" => 26.982,
        "Si" => 28.085,
        "P" => 30.974,
        "S" => 32.06,
        "Cl" => 35.45,
        "K" => 39.098,
        "Ca" => 40.078,
        "Fe" => 55.845,
        "Co" => 58.933,
        "Cu" => 63.546,
        "Zn" => 65.38,
        "Se" => 78.971,
        "Br" => 79.904,
        "Sn" => 118.71,
        "I" => 126.904,
        "As" => 74.922,
        "Pt" => 195.08,
        "Hg" => 200.59,
        "Gd" => 157.25,
        "Li" => 6.94,
        "Mn" => 54.938,
        "Ni" => 58.693,
        "Ge" => 72.630,
        "Te" => 127.60,
        _ => return None,
    })
}

#[derive(Debug, Clone)]
struct ParsedAtom {
    symbol: String,
    aromatic: bool,
    bracket_h: Option<u8>,
    charge: i32,
    bond_order_x2: u32,
    double_to_o: bool,
    heavy_neighbours: u32,
}

/// Default valences of the OpenSMILES organic subset (OpenSMILES specification 2007-2016, §3.1.5).
fn default_valences(symbol: &str) -> &'static [u32] {
    match symbol {
        "B" => &[3],
        "C" => &[4],
        "N" => &[3, 5],
        "O" => &[2],
        "P" => &[3, 5],
        "S" => &[2, 4, 6],
        "F" | "Cl" | "Br" | "I" => &[1],
        _ => &[],
    }
}

fn bad(smiles: &str, position: usize, reason: &str) -> FeatureError {
    FeatureError::BadSmiles {
        smiles: smiles.to_owned(),
        position,
        reason: reason.to_owned(),
    }
}

/// Reads a SMILES string into atoms with bond-order sums (twice the order, aromatic = 3).
fn parse_atoms(smiles: &str) -> Result<(Vec<ParsedAtom>, u32), FeatureError> {
    let bytes = smiles.as_bytes();
    let mut atoms: Vec<ParsedAtom> = Vec::new();
    let mut prev: Option<usize> = None;
    let mut stack: Vec<Option<usize>> = Vec::new();
    let mut pending_bond: Option<u32> = None;
    let mut rings: BTreeMap<u32, (usize, Option<u32>)> = BTreeMap::new();
    let mut ring_count = 0u32;
    let mut i = 0usize;
    let connect = |atoms: &mut Vec<ParsedAtom>, a: usize, b: usize, explicit: Option<u32>| {
        let order = explicit.unwrap_or(if atoms[a].aromatic && atoms[b].aromatic {
            3
        } else {
            2
        });
        for (x, y) in [(a, b), (b, a)] {
            atoms[x].bond_order_x2 += order;
            atoms[x].heavy_neighbours += 1;
            if order == 4 && atoms[y].symbol == "O" {
                atoms[x].double_to_o = true;
            }
        }
    };
    while i < bytes.len() {
        let c = bytes[i] as char;
        match c {
            '(' => {
                stack.push(prev);
                i += 1;
            }
            ')' => {
                prev = stack.pop().ok_or_else(|| bad(smiles, i, "unmatched ')'"))?;
                i += 1;
            }
            '-' | '=' | '#' | '$' | ':' | '/' | '\\' => {
                pending_bond = match c {
                    '=' => Some(4),
                    '#' => Some(6),
                    '$' => Some(8),
                    ':' => Some(3),
                    _ => Some(2),
                };
                i += 1;
            }
            '.' => {
                prev = None;
                pending_bond = None;
                i += 1;
            }
            '0'..='9' | '%' => {
                let (num, len) = if c == '%' {
                    let digits = smiles
                        .get(i + 1..i + 3)
                        .ok_or_else(|| bad(smiles, i, "'%' needs two digits"))?;
                    let n: u32 = digits
                        .parse()
                        .map_err(|_| bad(smiles, i, "'%' needs two digits"))?;
                    (n, 3)
                } else {
                    (c as u32 - '0' as u32, 1)
                };
                let here = prev.ok_or_else(|| bad(smiles, i, "ring bond before any atom"))?;
                if let Some((other, bond)) = rings.remove(&num) {
                    connect(&mut atoms, here, other, pending_bond.or(bond));
                    ring_count += 1;
                } else {
                    rings.insert(num, (here, pending_bond));
                }
                pending_bond = None;
                i += len;
            }
            '[' => {
                let end = smiles[i..]
                    .find(']')
                    .map(|e| i + e)
                    .ok_or_else(|| bad(smiles, i, "unclosed '['"))?;
                let inner = &smiles[i + 1..end];
                let atom = parse_bracket(inner)
                    .ok_or_else(|| bad(smiles, i, "unreadable bracket atom"))?;
                let idx = atoms.len();
                atoms.push(atom);
                if let Some(p) = prev {
                    connect(&mut atoms, p, idx, pending_bond.take());
                }
                pending_bond = None;
                prev = Some(idx);
                i = end + 1;
            }
            _ => {
                let two = smiles.get(i..i + 2);
                let (symbol, aromatic, len) = match two {
                    Some("Cl") => ("Cl", false, 2),
                    Some("Br") => ("Br", false, 2),
                    _ => match c {
                        'B' | 'C' | 'N' | 'O' | 'P' | 'S' | 'F' | 'I' => {
                            (&smiles[i..i + 1], false, 1)
                        }
                        'b' => ("B", true, 1),
                        'c' => ("C", true, 1),
                        'n' => ("N", true, 1),
                        'o' => ("O", true, 1),
                        'p' => ("P", true, 1),
                        's' => ("S", true, 1),
                        '*' => return Err(bad(smiles, i, "wildcard atom '*'")),
                        _ => return Err(bad(smiles, i, "unexpected character")),
                    },
                };
                let idx = atoms.len();
                atoms.push(ParsedAtom {
                    symbol: symbol.to_owned(),
                    aromatic,
                    bracket_h: None,
                    charge: 0,
                    bond_order_x2: 0,
                    double_to_o: false,
                    heavy_neighbours: 0,
                });
                if let Some(p) = prev {
                    connect(&mut atoms, p, idx, pending_bond.take());
                }
                pending_bond = None;
                prev = Some(idx);
                i += len;
            }
        }
    }
    if !rings.is_empty() {
        return Err(bad(smiles, smiles.len(), "unclosed ring bond"));
    }
    if !stack.is_empty() {
        return Err(bad(smiles, smiles.len(), "unclosed '('"));
    }
    Ok((atoms, ring_count))
}

/// Parses the inside of a bracket atom: isotope, symbol, chirality, H count, charge, class.
fn parse_bracket(inner: &str) -> Option<ParsedAtom> {
    let s = inner.trim_start_matches(|c: char| c.is_ascii_digit());
    let first = s.chars().next()?;
    let two_letter = s.get(..2).filter(|t| {
        t.chars().nth(1).is_some_and(|c| c.is_ascii_lowercase())
            && (first.is_ascii_uppercase() || matches!(*t, "se" | "as" | "te"))
    });
    let (raw, end) = match two_letter {
        Some(t) if atomic_mass(&capitalise(t)).is_some() => (t, 2),
        _ => (s.get(..1)?, 1),
    };
    let aromatic = first.is_ascii_lowercase();
    let symbol = capitalise(raw);
    if atomic_mass(&symbol).is_none() || !first.is_ascii_alphabetic() {
        return None;
    }
    let rest = s[end..].trim_start_matches('@');
    let mut h = 0u8;
    let mut charge = 0i32;
    let mut it = rest.chars().peekable();
    while let Some(c) = it.next() {
        match c {
            'H' => {
                let mut n = String::new();
                while let Some(d) = it.peek().copied().filter(char::is_ascii_digit) {
                    n.push(d);
                    it.next();
                }
                h = if n.is_empty() { 1 } else { n.parse().ok()? };
            }
            '+' | '-' => {
                let sign = if c == '+' { 1 } else { -1 };
                let mut n = String::new();
                while let Some(d) = it.peek().copied().filter(char::is_ascii_digit) {
                    n.push(d);
                    it.next();
                }
                let mut mag: i32 = if n.is_empty() { 1 } else { n.parse().ok()? };
                while it.peek() == Some(&c) {
                    mag += 1;
                    it.next();
                }
                charge = sign * mag;
            }
            ':' => break,
            _ => return None,
        }
    }
    Some(ParsedAtom {
        symbol,
        aromatic,
        bracket_h: Some(h),
        charge,
        bond_order_x2: 0,
        double_to_o: false,
        heavy_neighbours: 0,
    })
}

fn capitalise(t: &str) -> String {
    let mut up = t.to_owned();
    if let Some(f) = up.get_mut(..1) {
        f.make_ascii_uppercase();
    }
    up
}

/// Implicit hydrogens of an organic-subset atom: the smallest default valence that holds the
/// bond-order sum, minus that sum (aromatic bonds count 1.5, rounded down as OpenSMILES does).
fn implicit_h(atom: &ParsedAtom) -> u32 {
    if let Some(h) = atom.bracket_h {
        return u32::from(h);
    }
    let used = atom.bond_order_x2 / 2;
    default_valences(&atom.symbol)
        .iter()
        .find(|&&v| v >= used)
        .map_or(0, |&v| v - used)
}

impl DescriptorSource for ConstitutionalCounts {
    fn describe(&self, smiles: &str) -> Result<BTreeMap<String, f64>, FeatureError> {
        let (atoms, ring_count) = parse_atoms(smiles.trim())?;
        if atoms.iter().all(|a| a.symbol == "H") {
            return Err(FeatureError::Empty(smiles.to_owned()));
        }
        let mut out: BTreeMap<String, f64> = CONSTITUTIONAL_NAMES
            .iter()
            .map(|n| ((*n).to_owned(), 0.0))
            .collect();
        let mut add = |k: &str, v: f64| {
            if let Some(x) = out.get_mut(k) {
                *x += v;
            }
        };
        for a in &atoms {
            let h = f64::from(implicit_h(a));
            let mass = atomic_mass(&a.symbol).unwrap_or(0.0);
            add("mw_g_mol", mass + h * 1.008);
            add("n_h", h);
            if a.symbol == "H" {
                continue;
            }
            add("heavy_atoms", 1.0);
            match a.symbol.as_str() {
                "C" => {
                    add("n_c", 1.0);
                    if !a.aromatic && a.bond_order_x2 / 2 == a.heavy_neighbours {
                        add("n_sp3_c", 1.0);
                    }
                    if a.double_to_o {
                        add("n_carbonyl_like", 1.0);
                    }
                }
                "N" => add("n_n", 1.0),
                "O" => add("n_o", 1.0),
                "S" => {
                    add("n_s", 1.0);
                    if a.double_to_o {
                        add("n_carbonyl_like", 1.0);
                    }
                }
                "P" => {
                    add("n_p", 1.0);
                    if a.double_to_o {
                        add("n_carbonyl_like", 1.0);
                    }
                }
                "F" | "Cl" | "Br" | "I" => add("n_halogen", 1.0),
                _ => {}
            }
            if a.aromatic {
                add("n_aromatic_atoms", 1.0);
            }
            if matches!(a.symbol.as_str(), "N" | "O" | "S") {
                add("n_polar_h", h);
            }
            if a.charge != 0 {
                add("n_charged_atoms", 1.0);
            }
        }
        let doubles: u32 = atoms.iter().map(|a| u32::from(a.double_to_o)).sum::<u32>();
        add("n_double_bonds", f64::from(doubles));
        add("n_rings", f64::from(ring_count));
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d(smiles: &str) -> BTreeMap<String, f64> {
        ConstitutionalCounts.describe(smiles).unwrap()
    }

    #[test]
    fn benzene_counts() {
        // Benzene C6H6, 78.11 g/mol (standard atomic masses, from memory).
        let v = d("c1ccccc1");
        assert_eq!(v["n_c"], 6.0);
        assert_eq!(v["n_h"], 6.0);
        assert_eq!(v["n_aromatic_atoms"], 6.0);
        assert_eq!(v["n_rings"], 1.0);
        assert!((v["mw_g_mol"] - 78.11).abs() < 0.01);
    }

    #[test]
    fn acetic_acid_counts() {
        // Acetic acid C2H4O2, 60.05 g/mol; one O-H, one C=O (from memory).
        let v = d("CC(=O)O");
        assert_eq!(v["n_h"], 4.0);
        assert_eq!(v["n_polar_h"], 1.0);
        assert_eq!(v["n_carbonyl_like"], 1.0);
        assert_eq!(v["n_sp3_c"], 1.0);
        assert!((v["mw_g_mol"] - 60.05).abs() < 0.01);
    }

    #[test]
    fn bracket_atoms_and_charges() {
        // Pyrrole C4H5N (67.09 g/mol) and tetramethylammonium C4H12N+ (74.14 g/mol), from memory.
        let v = d("c1cc[nH]c1");
        assert_eq!(v["n_h"], 5.0);
        assert!((v["mw_g_mol"] - 67.09).abs() < 0.01);
        let q = d("C[N+](C)(C)C");
        assert_eq!(q["n_charged_atoms"], 1.0);
        assert_eq!(q["n_h"], 12.0);
        let cl = d("[Cl-].C[NH3+]");
        assert_eq!(cl["n_halogen"], 1.0);
        assert_eq!(cl["n_charged_atoms"], 2.0);
    }

    #[test]
    fn bad_smiles_is_an_error_naming_the_input() {
        for s in ["C1CC", "C(C", "C)", "[Xx]", "*C", ""] {
            let r = ConstitutionalCounts.describe(s);
            assert!(r.is_err(), "{s} should fail");
        }
        let msg = ConstitutionalCounts
            .describe("C1CC")
            .unwrap_err()
            .to_string();
        assert!(msg.contains("C1CC"));
    }

    proptest::proptest! {
        #[test]
        fn counter_never_panics(s in "[CNOcnos()=#1-3\\[\\]H+@-]{0,24}") {
            let _ = ConstitutionalCounts.describe(&s);
        }
    }
}
