//! A key that is the same for the mobile-hydrogen tautomers of a structure (lactam and lactim,
//! amine and imine, thione and thiol, azo and hydrazone forms, a zwitterion and its neutral
//! form), so that a structure typed in another tautomeric form than the knowledge base's
//! record can still be recognised.
//!
//! The key is the canonical skeleton key ([`crate::structure::canon`]) of the graph with every
//! bond read as single, no aromaticity, and the hydrogens and charges of the heteroatoms
//! (N, O, S, P, Se) removed, followed by the molecule's total hydrogen count and net charge.
//! Hydrogens on carbon keep their places, so double-bond isomers that move a carbon's
//! hydrogen (1-butene and 2-butene) and keto/enol pairs keep different keys. The idea follows
//! the mobile-hydrogen layer of standard InChI (IUPAC/InChI Trust, technical manual; from
//! memory), in a simpler form of the project's own: it can join two structures InChI would
//! keep apart, so it is used only as a last resort among records of the same formula, and the
//! match is reported as a tautomer match.

use super::canon::key_of_graph;
use super::graph::{BondOrder, MolGraph};

/// Elements whose hydrogens and charges move between tautomers.
fn mobile(atomic_number: u8) -> bool {
    matches!(atomic_number, 7 | 8 | 15 | 16 | 34)
}

/// The mobile-hydrogen key of a graph.
///
/// # Examples
/// ```
/// use phasewise::structure::{adapter::parse_smiles, tautomer::mobile_h_key};
/// // 2-pyridone and 2-hydroxypyridine
/// let a = mobile_h_key(&parse_smiles("O=C1C=CC=CN1").unwrap().graph);
/// let b = mobile_h_key(&parse_smiles("Oc1ccccn1").unwrap().graph);
/// assert_eq!(a, b);
/// ```
pub fn mobile_h_key(g: &MolGraph) -> String {
    let mut h = g.clone();
    let mut total_h: u32 = 0;
    let mut charge: i32 = 0;
    for a in &mut h.atoms {
        total_h += u32::from(a.hydrogens);
        charge += i32::from(a.formal_charge);
        a.aromatic = false;
        if mobile(a.atomic_number) {
            a.hydrogens = 0;
            a.formal_charge = 0;
        }
    }
    for b in &mut h.bonds {
        b.order = BondOrder::Single;
    }
    h.stereo.clear();
    format!("{}|H{total_h}|q{charge}", key_of_graph(&h).skeleton)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::adapter::parse_smiles;

    fn key(s: &str) -> String {
        mobile_h_key(&parse_smiles(s).unwrap().graph)
    }

    // Tautomer pairs: common textbook forms, from memory.
    #[test]
    fn tautomers_of_each_class_share_the_key() {
        for (a, b) in [
            // guanine: lactam / lactim and 9H / 7H forms
            ("NC1=NC(=O)C2=C(N1)N=CN2", "Nc1nc(O)c2[nH]cnc2n1"),
            ("C1=NC2=C(N1)C(=O)NC(=N2)N", "NC1=Nc2[nH]cnc2C(=O)N1"),
            // cytosine amine / imine
            ("NC1=NC(=O)NC=C1", "N=C1NC(=O)NC=C1"),
            // a thione / thiol
            ("S=C1NC=CC=C1", "Sc1ccccn1"),
            // zwitterion / neutral amino acid
            ("[NH3+]CC([O-])=O", "NCC(O)=O"),
            // ergothioneine as betaine-thiolate and as thione (same formula, charges moved)
            (
                "C[N+](C)(C)C(CC1=CN=C(N1)[S-])C(=O)O",
                "C[N+](C)(C)C(CC1=CNC(=S)N1)C(=O)[O-]",
            ),
        ] {
            assert_eq!(key(a), key(b), "{a} / {b}");
        }
    }

    #[test]
    fn different_compounds_keep_different_keys() {
        for (a, b) in [
            // double-bond position on carbon
            ("C=CCC", "CC=CC"),
            // keto / enol moves a carbon's hydrogen
            ("CC(C)=O", "CC(O)=C"),
            // constitutional isomers
            ("Oc1ccccn1", "Oc1ccncc1"),
            // one hydrogen more
            ("O=C1CCCCN1", "O=C1C=CC=CN1"),
            // charge differs
            ("C[NH3+]", "CN"),
        ] {
            assert_ne!(key(a), key(b), "{a} / {b}");
        }
    }
}
