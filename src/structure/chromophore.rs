//! UV chromophores from structure: the conjugated pi systems of a molecule, classed by what
//! they absorb, and a detection wavelength for each class.
//!
//! A pi system is a connected set of atoms that are aromatic or carry a C=C, C=O, C=N, N=N,
//! N=O or triple bond, joined by bonds between such atoms (S=O and P=O are not UV
//! chromophores and are left out). Classes and wavelengths are the usual rules of thumb of LC
//! practice (common practice, no source): benzene rings absorb strongly near 200-220 nm and
//! weakly at 254 nm; fused or conjugated aromatics (naphthalene, aromatic ketones, nitro- and
//! vinyl-aromatics) absorb well at 254 nm; conjugated dienes and enones (steroid 3-keto-4-enes)
//! near 240 nm; isolated carbonyls and double bonds (acids, esters, amides) only at 200-210 nm
//! where solvents and buffers also absorb; saturated molecules (sugars, polyols, aliphatic
//! amines and alcohols, perfluorinated chains) not at all.

use serde::{Deserialize, Serialize};

use super::graph::{BondOrder, MolGraph};

/// What a molecule absorbs, strongest system first.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ChromophoreClass {
    /// No conjugated or unsaturated group: not seen by UV absorbance.
    None,
    /// Only isolated C=O, C=C or C=N: weak, below about 210 nm.
    Weak,
    /// A conjugated diene or enone outside aromatic rings.
    ConjugatedEnone,
    /// One aromatic ring not conjugated with another pi group.
    Benzenoid,
    /// Fused or conjugated aromatic systems, or an aromatic ring conjugated with C=O, C=C, N=O.
    Extended,
}

impl ChromophoreClass {
    /// A detection wavelength that the class absorbs at, nm (common practice, no source).
    pub fn wavelength_nm(self) -> Option<f64> {
        match self {
            ChromophoreClass::None => None,
            ChromophoreClass::Weak => Some(210.0),
            ChromophoreClass::ConjugatedEnone => Some(240.0),
            ChromophoreClass::Benzenoid => Some(220.0),
            ChromophoreClass::Extended => Some(254.0),
        }
    }

    /// Whether UV absorbance is a sensible detector for the class (weak and absent
    /// chromophores are not: sensitivity is low and the mobile phase absorbs there).
    pub fn uv_suitable(self) -> bool {
        matches!(
            self,
            ChromophoreClass::ConjugatedEnone
                | ChromophoreClass::Benzenoid
                | ChromophoreClass::Extended
        )
    }

    /// Plain words for reports.
    pub fn describe(self) -> &'static str {
        match self {
            ChromophoreClass::None => "no UV chromophore",
            ChromophoreClass::Weak => "only a weak chromophore (isolated C=O or C=C, below 210 nm)",
            ChromophoreClass::ConjugatedEnone => "a conjugated diene or enone (about 240 nm)",
            ChromophoreClass::Benzenoid => "one aromatic ring (about 220 nm; weak at 254 nm)",
            ChromophoreClass::Extended => "an extended aromatic system (254 nm)",
        }
    }
}

fn pi_bond(order: BondOrder) -> bool {
    !matches!(order, BondOrder::Single)
}

/// The strongest chromophore class of a molecule.
pub fn classify(g: &MolGraph) -> ChromophoreClass {
    let n = g.atoms.len();
    // pi atoms: aromatic, or in a multiple bond to C, N or O (not S=O, P=O)
    let chromophoric_pair = |a: usize, b: usize| {
        let (za, zb) = (g.atoms[a].atomic_number, g.atoms[b].atomic_number);
        matches!(za, 6..=8) && matches!(zb, 6..=8)
    };
    let mut pi = vec![false; n];
    for (i, a) in g.atoms.iter().enumerate() {
        if a.aromatic {
            pi[i] = true;
        }
        for &(j, b) in &g.neighbours[i] {
            if pi_bond(g.bonds[b].order) && chromophoric_pair(i, j) {
                pi[i] = true;
            }
        }
    }
    // connected pi systems
    let mut seen = vec![false; n];
    let mut best = ChromophoreClass::None;
    for start in 0..n {
        if !pi[start] || seen[start] {
            continue;
        }
        let mut stack = vec![start];
        seen[start] = true;
        let mut atoms = Vec::new();
        while let Some(i) = stack.pop() {
            atoms.push(i);
            for &(j, _) in &g.neighbours[i] {
                if pi[j] && !seen[j] {
                    seen[j] = true;
                    stack.push(j);
                }
            }
        }
        let aromatic = atoms.iter().filter(|&&i| g.atoms[i].aromatic).count();
        // multiple bonds in the system outside aromatic rings
        let mut extra = 0;
        for &i in &atoms {
            for &(j, b) in &g.neighbours[i] {
                if j > i
                    && pi_bond(g.bonds[b].order)
                    && !(g.atoms[i].aromatic && g.atoms[j].aromatic)
                    && chromophoric_pair(i, j)
                {
                    extra += 1;
                }
            }
        }
        let rings = g
            .rings
            .iter()
            .filter(|r| r.iter().all(|a| atoms.contains(a) && g.atoms[*a].aromatic))
            .count();
        let class = if rings >= 2 || (aromatic > 0 && extra > 0) {
            ChromophoreClass::Extended
        } else if aromatic > 0 {
            ChromophoreClass::Benzenoid
        } else if extra >= 2 {
            ChromophoreClass::ConjugatedEnone
        } else {
            ChromophoreClass::Weak
        };
        best = best.max(class);
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::parse_smiles;

    fn class(s: &str) -> ChromophoreClass {
        classify(&parse_smiles(s).expect("parses").graph)
    }

    #[test]
    fn classes_follow_the_pi_system() {
        use ChromophoreClass::*;
        // saturated: sugars, polyols, amines, perfluorinated sulfonates (no chromophore)
        assert_eq!(class("OCC1OC(O)C(O)C(O)C1O"), None);
        assert_eq!(class("OCC(O)CO"), None);
        assert_eq!(class("CCN(CC)CC"), None);
        assert_eq!(
            class("OS(=O)(=O)C(F)(F)C(F)(F)C(F)(F)C(F)(F)F"),
            None,
            "S=O is not a UV chromophore"
        );
        // isolated carbonyls: acids, esters, amino acids
        assert_eq!(class("CC(=O)O"), Weak);
        assert_eq!(class("NCC(=O)O"), Weak);
        assert_eq!(class("CCCCCCCCCCCCCCCC(=O)OC"), Weak);
        // conjugated enone (cyclohexenone, a steroid 3-keto-4-ene model)
        assert_eq!(class("O=C1CCCC=C1"), ConjugatedEnone);
        // one benzene ring, not conjugated
        assert_eq!(class("CC(C)Cc1ccc(cc1)C(C)C"), Benzenoid);
        assert_eq!(class("Cc1ccccc1"), Benzenoid);
        // fused, or conjugated with C=O / N=O
        assert_eq!(class("c1ccc2ccccc2c1"), Extended);
        assert_eq!(class("CC(=O)c1ccccc1"), Extended);
        assert_eq!(class("[O-][N+](=O)c1ccccc1"), Extended);
        // ibuprofen: the acid is not conjugated with the ring
        assert_eq!(class("CC(C)Cc1ccc(cc1)C(C)C(=O)O"), Benzenoid);
        // caffeine: fused heteroaromatic with carbonyls
        assert_eq!(class("Cn1c(=O)c2c(ncn2C)n(C)c1=O"), Extended);
    }

    #[test]
    fn wavelengths_are_ordered_by_class() {
        assert_eq!(ChromophoreClass::None.wavelength_nm(), None);
        assert!(!ChromophoreClass::Weak.uv_suitable());
        assert!(ChromophoreClass::Benzenoid.uv_suitable());
        assert_eq!(ChromophoreClass::Extended.wavelength_nm(), Some(254.0));
    }
}
