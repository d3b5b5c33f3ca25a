//! Hashed circular count fingerprint with opaque alkyl chains, for the structure-only learner
//! (`model::learner_features`).
//!
//! Every heavy atom that is not an *alkyl carbon* gets an identifier at radius 0 (element,
//! aromaticity, ring membership, formal charge, hydrogens, heavy degree), then at radius 1 and 2
//! the identifier of its environment (own identifier and the sorted bond orders and neighbour
//! identifiers of the previous radius), in the manner of extended-connectivity fingerprints
//! (Rogers & Hahn, J. Chem. Inf. Model. 50 (2010) 742; from memory). Each identifier is hashed
//! into `FP_BITS` count bins.
//!
//! An alkyl carbon (acyclic, non-aromatic, uncharged carbon with single bonds only) sets no bit
//! and is seen by its neighbours as one opaque `ALKYL` token at every radius. So lengthening an
//! alkyl chain, or moving along it, leaves the fingerprint unchanged, and chain length reaches
//! the learner only through the alkyl-carbon count and the size descriptors, on which the
//! learner is constrained to be monotone (docs/model.md, "Structure-only learner"). This is
//! what lets a tree learner on the fingerprint keep "one more CH2 never lowers RP retention".
//! Deterministic: a fixed 64-bit mix, no random state, the same counts for the same graph.

use crate::structure::{BondOrder, MolGraph};

/// Number of count bins of the fingerprint.
pub const FP_BITS: usize = 256;
/// Largest radius (bonds) of the circular environments.
pub const FP_RADIUS: usize = 2;

/// Identifier every neighbour sees for an alkyl carbon.
const ALKYL: u64 = 0xA1C1_A1C1_A1C1_A1C1;

fn mix(mut z: u64) -> u64 {
    z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

fn combine(seed: u64, v: u64) -> u64 {
    mix(seed ^ v.wrapping_mul(0x1000_0000_01B3))
}

/// True when atom `i` is an alkyl carbon: acyclic, non-aromatic, uncharged carbon whose bonds
/// are all single (methyl, methylene, methine and quaternary chain carbons, also next to a
/// heteroatom).
pub fn is_alkyl_carbon(g: &MolGraph, i: usize) -> bool {
    let a = &g.atoms[i];
    a.atomic_number == 6
        && !a.aromatic
        && !a.in_ring
        && a.formal_charge == 0
        && a.radical_electrons == 0
        && g.neighbours[i]
            .iter()
            .all(|&(_, b)| g.bonds[b].order == BondOrder::Single)
}

fn bond_code(o: BondOrder) -> u64 {
    match o {
        BondOrder::Single => 1,
        BondOrder::Double => 2,
        BondOrder::Triple => 3,
        BondOrder::Aromatic => 4,
    }
}

/// Count fingerprint (`FP_BITS` bins) and the number of alkyl carbons of a molecular graph.
/// Explicit hydrogen nodes are ignored (their count enters the atom's hydrogen count).
pub fn alkyl_opaque_fingerprint(g: &MolGraph) -> (Vec<f64>, usize) {
    let n = g.atoms.len();
    let heavy: Vec<bool> = g.atoms.iter().map(|a| a.atomic_number != 1).collect();
    let alkyl: Vec<bool> = (0..n).map(|i| heavy[i] && is_alkyl_carbon(g, i)).collect();
    let mut ids: Vec<u64> = (0..n)
        .map(|i| {
            let a = &g.atoms[i];
            let mut h = mix(u64::from(a.atomic_number));
            h = combine(h, u64::from(a.aromatic));
            h = combine(h, u64::from(a.in_ring));
            h = combine(h, (i64::from(a.formal_charge) + 8) as u64);
            h = combine(h, u64::from(g.total_hydrogens(i)));
            combine(h, g.heavy_degree(i) as u64)
        })
        .collect();
    let mut bits = vec![0.0; FP_BITS];
    let mut add = |ids: &[u64], radius: usize| {
        for i in 0..n {
            if heavy[i] && !alkyl[i] {
                bits[(combine(ids[i], radius as u64) % FP_BITS as u64) as usize] += 1.0;
            }
        }
    };
    add(&ids, 0);
    for radius in 1..=FP_RADIUS {
        let mut next = ids.clone();
        for i in 0..n {
            if !heavy[i] || alkyl[i] {
                continue;
            }
            let mut env: Vec<(u64, u64)> = g.neighbours[i]
                .iter()
                .filter(|&&(j, _)| heavy[j])
                .map(|&(j, b)| {
                    let id = if alkyl[j] { ALKYL } else { ids[j] };
                    (bond_code(g.bonds[b].order), id)
                })
                .collect();
            env.sort_unstable();
            let mut h = combine(ids[i], radius as u64);
            for (b, id) in env {
                h = combine(combine(h, b), id);
            }
            next[i] = h;
        }
        ids = next;
        add(&ids, radius);
    }
    let n_alkyl = alkyl.iter().filter(|&&a| a).count();
    (bits, n_alkyl)
}

/// `alkyl_opaque_fingerprint` of a SMILES string (the structure engine's parse: largest
/// fragment kept).
///
/// # Errors
/// The structure engine's message when the SMILES cannot be read.
pub fn fingerprint_smiles(smiles: &str) -> Result<(Vec<f64>, usize), String> {
    let parsed = crate::structure::parse_smiles(smiles).map_err(|e| e.to_string())?;
    Ok(alkyl_opaque_fingerprint(&parsed.graph))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fp(s: &str) -> (Vec<f64>, usize) {
        fingerprint_smiles(s).unwrap()
    }

    #[test]
    fn homologues_share_the_fingerprint_and_differ_in_alkyl_count() {
        // parabens, methyl to butyl (common practice: a homologous series differs by CH2 only)
        let series = [
            "COC(=O)c1ccc(O)cc1",
            "CCOC(=O)c1ccc(O)cc1",
            "CCCOC(=O)c1ccc(O)cc1",
            "CCCCOC(=O)c1ccc(O)cc1",
        ];
        let first = fp(series[0]);
        for (k, s) in series.iter().enumerate() {
            let (bits, n) = fp(s);
            assert_eq!(bits, first.0, "{s}");
            assert_eq!(n, k + 1, "{s}");
        }
    }

    #[test]
    fn different_functional_groups_differ() {
        // an acid, its methyl ester, an amide and a nitrile on one ring (from memory)
        let a = fp("OC(=O)c1ccccc1").0;
        let b = fp("COC(=O)c1ccccc1").0;
        let c = fp("NC(=O)c1ccccc1").0;
        let d = fp("N#Cc1ccccc1").0;
        assert_ne!(a, b);
        assert_ne!(a, c);
        assert_ne!(c, d);
        // benzene has 6 aromatic CH atoms: 6 counts at radius 0, 1 and 2 each
        let benzene = fp("c1ccccc1").0;
        assert_eq!(benzene.iter().sum::<f64>(), 18.0);
    }

    #[test]
    fn ring_carbons_are_not_alkyl() {
        let (_, n) = fp("C1CCCCC1");
        assert_eq!(n, 0);
        let (_, n) = fp("CC(C)(C)c1ccccc1");
        assert_eq!(n, 4);
    }

    #[test]
    fn explicit_hydrogens_do_not_change_the_fingerprint() {
        assert_eq!(fp("[H]OC(=O)c1ccccc1"), fp("OC(=O)c1ccccc1"));
    }
}
