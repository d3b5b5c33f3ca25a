//! Hydrogen-bond donor/acceptor counts and rotatable bonds.
//!
//! Two families of H-bond counts are given, because both are in use and they
//! differ on about a third of drug-like molecules:
//!
//! - **RDKit definitions** ([`hbond_donors`], [`hbond_acceptors`]): the
//!   SMARTS of RDKit's `CalcNumHBD`/`CalcNumHBA` (rdkit/rdkit,
//!   `Code/GraphMol/Descriptors/Lipinski.cpp`, BSD licence), counting atoms.
//!   Donors: N with H and valence 3, N+ with H and valence 4, neutral O-H,
//!   S-H, aromatic n-H. Acceptors: O/S with one H and valence 2 not bonded to
//!   an atom doubly bonded to O/N/P/S, O/S with no H and valence 2, anionic
//!   O/S, trivalent N not in an amide-like `N-*=X` chain bond, neutral
//!   two-connected aromatic n (pyridine type), o and s.
//! - **Lipinski rule-of-five counts** (C. A. Lipinski et al., Adv. Drug
//!   Deliv. Rev. 1997, 23, 3): [`lipinski_nhoh_count`] = hydrogens on N and O
//!   (RDKit `NHOHCount`), [`lipinski_no_count`] = number of N and O atoms
//!   (RDKit `NOCount`).
//!
//! Rotatable bonds ([`rotatable_bonds`]) use RDKit's default, the "Strict"
//! SMARTS of `Lipinski.cpp`: a non-ring single bond between two non-terminal
//! atoms, neither in a triple bond, excluding bonds to CF3/CCl3/CBr3/t-butyl
//! groups and the C–N/C–O/C–S bond of amides, thioamides, esters, amidines.

use std::sync::OnceLock;

use super::graph::{BondOrder, MolGraph};
use super::smarts::{AtomFacts, Pattern};

/// RDKit `NumHBD` SMARTS (Lipinski.cpp, version 2.0.1).
pub const HBD_SMARTS: &str = "[N&!H0&v3,N&!H0&+1&v4,O&H1&+0,S&H1&+0,n&H1&+0]";
/// RDKit `NumHBA` SMARTS (Lipinski.cpp, version 2.0.2: aromatic n only when
/// two-connected, i.e. pyridine-type; 2.0.1 also counted N-substituted
/// pyrrole-type n, which the reference values rule out).
pub const HBA_SMARTS: &str = "[$([O,S;H1;v2]-[!$(*=[O,N,P,S])]),$([O,S;H0;v2]),$([O,S;-]),$([N;v3;!$(N-*=!@[O,N,P,S])]),$([nH0X2,o,s;+0])]";
/// RDKit's default ("Strict") rotatable-bond SMARTS (Lipinski.cpp).
pub const ROTATABLE_STRICT_SMARTS: &str = "[!$(*#*)&!D1&!$(C(F)(F)F)&!$(C(Cl)(Cl)Cl)&!$(C(Br)(Br)Br)&!$(C([CH3])([CH3])[CH3])&!$([CD3](=[N,O,S])-!@[#7,O,S!D1])&!$([#7,O,S!D1]-!@[CD3]=[N,O,S])&!$([CD3](=[N+])-!@[#7!D1])&!$([#7!D1]-!@[CD3]=[N+])]-,:;!@[!$(*#*)&!D1&!$(C(F)(F)F)&!$(C(Cl)(Cl)Cl)&!$(C(Br)(Br)Br)&!$(C([CH3])([CH3])[CH3])]";

struct Compiled {
    hbd: Option<Pattern>,
    hba: Option<Pattern>,
    rot: Option<Pattern>,
}

fn compiled() -> &'static Compiled {
    static C: OnceLock<Compiled> = OnceLock::new();
    C.get_or_init(|| Compiled {
        hbd: Pattern::new(HBD_SMARTS).ok(),
        hba: Pattern::new(HBA_SMARTS).ok(),
        rot: Pattern::new(ROTATABLE_STRICT_SMARTS).ok(),
    })
}

/// Counts atoms matching `p`. Every alternative of the donor and acceptor
/// SMARTS is rooted on N, O or S, so only those atoms are tried (a shortcut
/// that cannot change the count).
fn count_atoms(p: Option<&Pattern>, facts: &AtomFacts<'_>) -> u32 {
    let g = facts.graph();
    p.map_or(0, |p| {
        (0..g.atoms.len())
            .filter(|&i| matches!(g.atoms[i].atomic_number, 7 | 8 | 16))
            .filter(|&i| p.matches_at_with(facts, i))
            .count() as u32
    })
}

/// H-bond donors, RDKit `CalcNumHBD` definition.
pub fn hbond_donors(g: &MolGraph) -> u32 {
    hbond_donors_with(&AtomFacts::new(g))
}

/// [`hbond_donors`] with the molecule's atom facts already computed.
pub fn hbond_donors_with(facts: &AtomFacts<'_>) -> u32 {
    count_atoms(compiled().hbd.as_ref(), facts)
}

/// H-bond acceptors, RDKit `CalcNumHBA` definition.
pub fn hbond_acceptors(g: &MolGraph) -> u32 {
    hbond_acceptors_with(&AtomFacts::new(g))
}

/// [`hbond_acceptors`] with the molecule's atom facts already computed.
pub fn hbond_acceptors_with(facts: &AtomFacts<'_>) -> u32 {
    count_atoms(compiled().hba.as_ref(), facts)
}

/// Lipinski donors: hydrogens on nitrogen and oxygen (RDKit `NHOHCount`).
pub fn lipinski_nhoh_count(g: &MolGraph) -> u32 {
    (0..g.atoms.len())
        .filter(|&i| matches!(g.atoms[i].atomic_number, 7 | 8))
        .map(|i| g.total_hydrogens(i))
        .sum()
}

/// Lipinski acceptors: number of nitrogen and oxygen atoms (RDKit `NOCount`).
pub fn lipinski_no_count(g: &MolGraph) -> u32 {
    g.atoms
        .iter()
        .filter(|a| matches!(a.atomic_number, 7 | 8))
        .count() as u32
}

/// Rotatable bonds, RDKit default (Strict) definition.
///
/// # Examples
/// ```
/// use phasewise::structure::{adapter::parse_smiles, lipinski::rotatable_bonds};
/// // Butane: one rotatable C-C bond; N-methylacetamide: the amide C-N is excluded.
/// assert_eq!(rotatable_bonds(&parse_smiles("CCCC").unwrap().graph), 1);
/// assert_eq!(rotatable_bonds(&parse_smiles("CC(=O)NC").unwrap().graph), 0);
/// ```
pub fn rotatable_bonds(g: &MolGraph) -> u32 {
    rotatable_bonds_with(&AtomFacts::new(g))
}

/// [`rotatable_bonds`] with the molecule's atom facts already computed.
pub fn rotatable_bonds_with(facts: &AtomFacts<'_>) -> u32 {
    let g = facts.graph();
    let Some(p) = compiled().rot.as_ref() else {
        return 0;
    };
    // Cheap necessary conditions first (single or aromatic, not in a ring,
    // both ends non-terminal), then the full SMARTS.
    let candidates = (0..g.bonds.len()).filter(|&b| {
        let bond = &g.bonds[b];
        !bond.in_ring
            && matches!(bond.order, BondOrder::Single | BondOrder::Aromatic)
            && g.degree(bond.a) > 1
            && g.degree(bond.b) > 1
    });
    p.count_bond_matches(facts, candidates) as u32
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::adapter::parse_smiles;

    #[test]
    fn patterns_compile() {
        assert!(Pattern::new(HBD_SMARTS).is_ok());
        assert!(Pattern::new(HBA_SMARTS).is_ok());
        assert!(Pattern::new(ROTATABLE_STRICT_SMARTS).is_ok());
    }

    #[test]
    fn counts() {
        let g = parse_smiles("NCC(=O)O").unwrap().graph;
        assert_eq!(lipinski_nhoh_count(&g), 3);
        assert_eq!(lipinski_no_count(&g), 3);
        assert_eq!(hbond_donors(&g), 2);
    }
}
