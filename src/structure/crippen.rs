//! Wildman–Crippen logP and molar refractivity.
//!
//! Source: S. A. Wildman and G. M. Crippen, "Prediction of Physicochemical
//! Parameters by Atomic Contributions", J. Chem. Inf. Comput. Sci. 1999, 39,
//! 868–873. Each atom (hydrogens included) gets one of the paper's atom types
//! and contributes that type's logP and MR increment; the molecule's values are
//! the sums.
//!
//! The atom-type definitions (SMARTS) and contributions are transcribed from
//! RDKit's `Crippen.txt` parameter table (rdkit/rdkit,
//! `Code/GraphMol/Descriptors/Crippen.txt`, BSD licence), which encodes the
//! paper's Table 1; types are tried in the table's order and the first match
//! wins (RDKit's rule, including its two intentional order flips O12/O7 and
//! S2/S1). Blank MR cells of that table (N10, N12, O12, Hal, Me2) are zero.
//! Hydrogen types (H1–H4, HS) follow the same table's `[#1]` definitions,
//! evaluated on the heavy atom each implicit hydrogen sits on.

use std::sync::OnceLock;

use super::graph::{BondOrder, MolGraph};
use super::smarts::{AtomFacts, Pattern};

/// (type label, SMARTS, logP contribution, MR contribution in cm3/mol), in RDKit's order.
const HEAVY_TYPES: &[(&str, &str, f64, f64)] = &[
    ("C1", "[CH4]", 0.1441, 2.503),
    ("C1", "[CH3]C", 0.1441, 2.503),
    ("C1", "[CH2](C)C", 0.1441, 2.503),
    ("C2", "[CH](C)(C)C", 0.0, 2.433),
    ("C2", "[C](C)(C)(C)C", 0.0, 2.433),
    ("C3", "[CH3][N,O,P,S,F,Cl,Br,I]", -0.2035, 2.753),
    ("C3", "[CH2X4]([N,O,P,S,F,Cl,Br,I])[A;!#1]", -0.2035, 2.753),
    (
        "C4",
        "[CH1X4]([N,O,P,S,F,Cl,Br,I])([A;!#1])[A;!#1]",
        -0.2051,
        2.731,
    ),
    (
        "C4",
        "[CH0X4]([N,O,P,S,F,Cl,Br,I])([A;!#1])([A;!#1])[A;!#1]",
        -0.2051,
        2.731,
    ),
    ("C5", "[C]=[!C;A;!#1]", -0.2783, 5.007),
    ("C6", "[CH2]=C", 0.1551, 3.513),
    ("C6", "[CH1](=C)[A;!#1]", 0.1551, 3.513),
    ("C6", "[CH0](=C)([A;!#1])[A;!#1]", 0.1551, 3.513),
    ("C6", "[C](=C)=C", 0.1551, 3.513),
    ("C7", "[CX2]#[A;!#1]", 0.0017, 3.888),
    ("C8", "[CH3]c", 0.08452, 2.464),
    ("C9", "[CH3]a", -0.1444, 2.412),
    ("C10", "[CH2X4]a", -0.0516, 2.488),
    ("C11", "[CHX4]a", 0.1193, 2.582),
    ("C12", "[CH0X4]a", -0.0967, 2.576),
    (
        "C13",
        "[cH0]-[A;!C;!N;!O;!S;!F;!Cl;!Br;!I;!#1]",
        -0.5443,
        4.041,
    ),
    ("C14", "[c][#9]", 0.0, 3.257),
    ("C15", "[c][#17]", 0.245, 3.564),
    ("C16", "[c][#35]", 0.198, 3.18),
    ("C17", "[c][#53]", 0.0, 3.104),
    ("C18", "[cH]", 0.1581, 3.35),
    ("C19", "[c](:a)(:a):a", 0.2955, 4.346),
    ("C20", "[c](:a)(:a)-a", 0.2713, 3.904),
    ("C21", "[c](:a)(:a)-C", 0.136, 3.509),
    ("C22", "[c](:a)(:a)-N", 0.4619, 4.067),
    ("C23", "[c](:a)(:a)-O", 0.5437, 3.853),
    ("C24", "[c](:a)(:a)-S", 0.1893, 2.673),
    ("C25", "[c](:a)(:a)=[C,N,O]", -0.8186, 3.135),
    ("C26", "[C](=C)(a)[A;!#1]", 0.264, 4.305),
    ("C26", "[C](=C)(c)a", 0.264, 4.305),
    ("C26", "[CH1](=C)a", 0.264, 4.305),
    ("C26", "[C]=c", 0.264, 4.305),
    (
        "C27",
        "[CX4][A;!C;!N;!O;!P;!S;!F;!Cl;!Br;!I;!#1]",
        0.2148,
        2.693,
    ),
    ("CS", "[#6]", 0.08129, 3.243),
    ("N1", "[NH2+0][A;!#1]", -1.019, 2.262),
    ("N2", "[NH+0]([A;!#1])[A;!#1]", -0.7096, 2.173),
    ("N3", "[NH2+0]a", -1.027, 2.827),
    ("N4", "[NH1+0]([!#1;A,a])a", -0.5188, 3.0),
    ("N5", "[NH+0]=[!#1;A,a]", 0.08387, 1.757),
    ("N6", "[N+0](=[!#1;A,a])[!#1;A,a]", 0.1836, 2.428),
    ("N7", "[N+0]([A;!#1])([A;!#1])[A;!#1]", -0.3187, 1.839),
    ("N8", "[N+0](a)([!#1;A,a])[A;!#1]", -0.4458, 2.819),
    ("N8", "[N+0](a)(a)a", -0.4458, 2.819),
    ("N9", "[N+0]#[A;!#1]", 0.01508, 1.725),
    ("N10", "[NH3,NH2,NH;+,+2,+3]", -1.95, 0.0),
    ("N11", "[n+0]", -0.3239, 2.202),
    ("N12", "[n;+,+2,+3]", -1.119, 0.0),
    (
        "N13",
        "[NH0;+,+2,+3]([A;!#1])([A;!#1])([A;!#1])[A;!#1]",
        -0.3396,
        0.2604,
    ),
    (
        "N13",
        "[NH0;+,+2,+3](=[A;!#1])([A;!#1])[!#1;A,a]",
        -0.3396,
        0.2604,
    ),
    ("N13", "[NH0;+,+2,+3](=[#6])=[#7]", -0.3396, 0.2604),
    ("N14", "[N;+,+2,+3]#[A;!#1]", 0.2887, 3.359),
    ("N14", "[N;-,-2,-3]", 0.2887, 3.359),
    ("N14", "[N;+,+2,+3](=[N;-,-2,-3])=N", 0.2887, 3.359),
    ("NS", "[#7]", -0.4806, 2.134),
    ("O1", "[o]", 0.1552, 1.08),
    ("O2", "[OH,OH2]", -0.2893, 0.8238),
    ("O3", "[O]([A;!#1])[A;!#1]", -0.0684, 1.085),
    ("O4", "[O](a)[!#1;A,a]", -0.4195, 1.182),
    ("O5", "[O]=[#7,#8]", 0.0335, 3.367),
    ("O5", "[OX1;-,-2,-3][#7]", 0.0335, 3.367),
    ("O6", "[OX1;-,-2,-2][#16]", -0.3339, 0.7774),
    ("O6", "[O;-0]=[#16;-0]", -0.3339, 0.7774),
    ("O12", "[O-]C(=O)", -1.326, 0.0),
    ("O7", "[OX1;-,-2,-3][!#1;!N;!S]", -1.189, 0.0),
    ("O8", "[O]=c", 0.1788, 3.135),
    ("O9", "[O]=[CH]C", -0.1526, 0.0),
    ("O9", "[O]=C(C)([A;!#1])", -0.1526, 0.0),
    ("O9", "[O]=[CH][N,O]", -0.1526, 0.0),
    ("O9", "[O]=[CH2]", -0.1526, 0.0),
    ("O9", "[O]=[CX2]=O", -0.1526, 0.0),
    ("O10", "[O]=[CH]c", 0.1129, 0.2215),
    ("O10", "[O]=C([C,c])[a;!#1]", 0.1129, 0.2215),
    ("O10", "[O]=C(c)[A;!#1]", 0.1129, 0.2215),
    ("O11", "[O]=C([!#1;!#6])[!#1;!#6]", 0.4833, 0.389),
    ("OS", "[#8]", -0.1188, 0.6865),
    ("F", "[#9-0]", 0.4202, 1.108),
    ("Cl", "[#17-0]", 0.6895, 5.853),
    ("Br", "[#35-0]", 0.8456, 8.927),
    ("I", "[#53-0]", 0.8857, 14.02),
    ("Hal", "[#9,#17,#35,#53;-]", -2.996, 0.0),
    ("Hal", "[#53;+,+2,+3]", -2.996, 0.0),
    ("Hal", "[+;#3,#11,#19,#37,#55]", -2.996, 0.0),
    ("P", "[#15]", 0.8612, 6.92),
    ("S2", "[S;-,-2,-3,-4,+1,+2,+3,+5,+6]", -0.0024, 7.365),
    ("S2", "[S-0]=[N,O,P,S]", -0.0024, 7.365),
    ("S1", "[S;A]", 0.6482, 7.591),
    ("S3", "[s;a]", 0.6237, 6.691),
    ("Me1", "[#3,#11,#19,#37,#55]", -0.3808, 5.754),
    ("Me1", "[#4,#12,#20,#38,#56]", -0.3808, 5.754),
    ("Me1", "[#5,#13,#31,#49,#81]", -0.3808, 5.754),
    ("Me1", "[#14,#32,#50,#82]", -0.3808, 5.754),
    ("Me1", "[#33,#51,#83]", -0.3808, 5.754),
    ("Me1", "[#34,#52,#84]", -0.3808, 5.754),
    (
        "Me2",
        "[#21,#22,#23,#24,#25,#26,#27,#28,#29,#30]",
        -0.0025,
        0.0,
    ),
    (
        "Me2",
        "[#39,#40,#41,#42,#43,#44,#45,#46,#47,#48]",
        -0.0025,
        0.0,
    ),
    ("Me2", "[#72,#73,#74,#75,#76,#77,#78,#79,#80]", -0.0025, 0.0),
];

/// Hydrogen types: (label, logP, MR) — Wildman & Crippen 1999 Table 1 via RDKit Crippen.txt.
const H1: (&str, f64, f64) = ("H1", 0.123, 1.057);
const H2: (&str, f64, f64) = ("H2", -0.2677, 1.395);
const H3: (&str, f64, f64) = ("H3", 0.2142, 0.9627);
const H4: (&str, f64, f64) = ("H4", 0.298, 1.805);
const HS: (&str, f64, f64) = ("HS", 0.1125, 1.112);

struct Compiled {
    patterns: Vec<Pattern>,
    /// For atomic number z (index), the pattern indices worth trying, in order.
    by_element: Vec<Vec<usize>>,
}

fn compiled() -> &'static Compiled {
    static C: OnceLock<Compiled> = OnceLock::new();
    C.get_or_init(|| {
        let patterns: Vec<Pattern> = HEAVY_TYPES
            .iter()
            .filter_map(|&(_, s, _, _)| Pattern::new(s).ok())
            .collect();
        let mut by_element = vec![Vec::new(); 256];
        for (z, list) in by_element.iter_mut().enumerate() {
            for (k, p) in patterns.iter().enumerate() {
                if p.root_element().is_none_or(|r| usize::from(r) == z) {
                    list.push(k);
                }
            }
        }
        Compiled {
            patterns,
            by_element,
        }
    })
}

/// Per-atom Crippen assignment.
#[derive(Debug, Clone, PartialEq)]
pub struct CrippenAtom {
    /// The atom's own type label (e.g. `C18`), or `None` if no type matched.
    pub atom_type: Option<&'static str>,
    /// logP of the atom plus its implicit hydrogens.
    pub logp: f64,
    /// MR of the atom plus its implicit hydrogens, cm3/mol.
    pub mr_cm3_mol: f64,
}

/// Crippen contributions of every atom (implicit hydrogens folded into their heavy atom).
pub fn crippen_atoms(g: &MolGraph) -> Vec<CrippenAtom> {
    crippen_atoms_with(&AtomFacts::new(g))
}

/// [`crippen_atoms`] with the molecule's atom facts already computed.
pub fn crippen_atoms_with(facts: &AtomFacts<'_>) -> Vec<CrippenAtom> {
    let g = facts.graph();
    let c = compiled();
    let mut out = Vec::with_capacity(g.atoms.len());
    for i in 0..g.atoms.len() {
        let z = g.atoms[i].atomic_number;
        let mut entry = CrippenAtom {
            atom_type: None,
            logp: 0.0,
            mr_cm3_mol: 0.0,
        };
        if z == 1 {
            let parent = g.neighbours[i].first().map(|&(n, _)| n);
            let (label, lp, mr) = hydrogen_type(g, parent, Some(i));
            entry = CrippenAtom {
                atom_type: Some(label),
                logp: lp,
                mr_cm3_mol: mr,
            };
        } else {
            for &k in &c.by_element[usize::from(z)] {
                if c.patterns[k].matches_at_with(facts, i) {
                    let (label, _, lp, mr) = HEAVY_TYPES[k];
                    entry.atom_type = Some(label);
                    entry.logp = lp;
                    entry.mr_cm3_mol = mr;
                    break;
                }
            }
            let nh = g.atoms[i].hydrogens;
            if nh > 0 {
                let (_, lp, mr) = hydrogen_type(g, Some(i), None);
                entry.logp += f64::from(nh) * lp;
                entry.mr_cm3_mol += f64::from(nh) * mr;
            }
        }
        out.push(entry);
    }
    out
}

/// Wildman–Crippen logP and MR (cm3/mol) of the molecule.
///
/// # Examples
/// ```
/// use phasewise::structure::{adapter::parse_smiles, crippen::crippen_logp_mr};
/// let g = parse_smiles("c1ccccc1").unwrap().graph;
/// let (logp, mr) = crippen_logp_mr(&g);
/// // RDKit 2026.09.1 MolLogP / MolMR of benzene.
/// assert!((logp - 1.6866).abs() < 1e-4);
/// assert!((mr - 26.442).abs() < 1e-3);
/// ```
pub fn crippen_logp_mr(g: &MolGraph) -> (f64, f64) {
    crippen_logp_mr_with(&AtomFacts::new(g))
}

/// [`crippen_logp_mr`] with the molecule's atom facts already computed.
pub fn crippen_logp_mr_with(facts: &AtomFacts<'_>) -> (f64, f64) {
    crippen_atoms_with(facts)
        .iter()
        .fold((0.0, 0.0), |(l, m), a| (l + a.logp, m + a.mr_cm3_mol))
}

/// Type of a hydrogen on `parent` (`own` = the H node itself when it is a graph atom).
fn hydrogen_type(
    g: &MolGraph,
    parent: Option<usize>,
    own: Option<usize>,
) -> (&'static str, f64, f64) {
    let Some(p) = parent else {
        return HS;
    };
    let pa = &g.atoms[p];
    match pa.atomic_number {
        1 | 6 => return H1,
        7 => return H3,
        8 => {}
        _ => return H2,
    }
    if pa.aromatic {
        // `[#1]O...` patterns need an aliphatic O; an aromatic O-H falls through to HS.
        return HS;
    }
    // Other neighbours of the oxygen (heavy atoms and graph H atoms), plus its other implicit Hs.
    let others: Vec<usize> = g.neighbours[p]
        .iter()
        .map(|&(n, _)| n)
        .filter(|&n| Some(n) != own)
        .collect();
    let other_implicit_h =
        u32::from(pa.hydrogens).saturating_sub(if own.is_none() { 1 } else { 0 });
    // H2: [#1]O[CX4,c]
    if others.iter().any(|&n| {
        let a = &g.atoms[n];
        a.atomic_number == 6 && (a.aromatic || g.degree(n) as u32 + u32::from(a.hydrogens) == 4)
    }) {
        return H2;
    }
    // H2: [#1]O[!#6;!#7;!#8;!#16] (another H counts)
    if other_implicit_h > 0
        || others
            .iter()
            .any(|&n| !matches!(g.atoms[n].atomic_number, 6 | 7 | 8 | 16))
    {
        return H2;
    }
    // H3: [#1]O[#7]
    if others.iter().any(|&n| g.atoms[n].atomic_number == 7) {
        return H3;
    }
    // H4: [#1]OC=[#6,#7,O,S]
    for &n in &others {
        let a = &g.atoms[n];
        if a.atomic_number != 6 || a.aromatic {
            continue;
        }
        let bond_ok = g
            .bond_between(p, n)
            .is_some_and(|b| matches!(g.bonds[b].order, BondOrder::Single | BondOrder::Aromatic));
        if !bond_ok {
            continue;
        }
        let double_partner = g.neighbours[n].iter().any(|&(m, b)| {
            m != p && g.bonds[b].order == BondOrder::Double && {
                let x = &g.atoms[m];
                matches!(x.atomic_number, 6 | 7)
                    || (matches!(x.atomic_number, 8 | 16) && !x.aromatic)
            }
        });
        if double_partner {
            return H4;
        }
    }
    // H4: [#1]O[O,S]
    if others.iter().any(|&n| {
        let a = &g.atoms[n];
        matches!(a.atomic_number, 8 | 16) && !a.aromatic
    }) {
        return H4;
    }
    HS
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn all_type_patterns_compile() {
        for &(label, s, _, _) in HEAVY_TYPES {
            assert!(Pattern::new(s).is_ok(), "{label} {s}");
        }
        assert_eq!(compiled().patterns.len(), HEAVY_TYPES.len());
    }

    #[test]
    fn water_and_acetic_acid() {
        // RDKit 2026.09.1 MolLogP: water -0.8247 (O2 + 2 H2), acetic acid 0.0909.
        let w = crate::structure::adapter::parse_smiles("O").unwrap().graph;
        assert!((crippen_logp_mr(&w).0 - (-0.8247)).abs() < 1e-4);
        let a = crate::structure::adapter::parse_smiles("CC(=O)O")
            .unwrap()
            .graph;
        assert!((crippen_logp_mr(&a).0 - 0.0909).abs() < 1e-4);
    }
}
