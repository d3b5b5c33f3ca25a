//! The project's ring perception against the SMILES crate's (moved out of `adapter.rs` to
//! keep it under the line limit).

use super::*;

/// Every input of the RDKit reference set (tests/data/rdkit_descriptors.tsv, 2,000 PubChem
/// structures) plus inputs with spiro rings, cages, macrocycles and fragments: the
/// project's own ring perception (structure::rings) gives exactly the SMILES crate's ring
/// membership; where it finds isolated rings only, exactly the crate's symmetrized SSSR
/// (same cycles, same atom order, same ring order); and for fused systems the same rings as
/// the crate's search completed by `add_interchangeable_rings`. That path is itself checked
/// against RDKit's ring counts by the reference test.
#[test]
fn own_ring_perception_agrees_with_the_smiles_crate() {
    let mut inputs: Vec<&str> = include_str!("../../../tests/data/rdkit_descriptors.tsv")
        .lines()
        .skip(1)
        .filter_map(|l| l.split('\t').nth(1))
        .collect();
    inputs.extend([
        "C1CC12CC2",
        "C1CCC2(CC1)CCCC2",
        "C1CCCCCCCCCCCCCCCCCCCCC1",
        "c1ccccc1CCc1ccccc1.Cl",
        "C1CC1.C1CCC1",
        "[H]C1([H])CC1",
        "C1CC2CC1C1CC21",
        "C12C3C4C1C5C2C3C45",
        "C1C2CC3CC1CC(C2)C3",
        "C1CC2CCC1CC2",
        "C1CCC2CC3CCCCC3CC2C1",
        "C1CCC2C3CCCCC2C3C1",
        "CC12CCC3C(CCC4=CC(=O)CCC34C)C1CCC2O",
    ]);
    let (mut simple, mut fused, mut crate_search, mut compared) = (0, 0, 0, 0);
    for smiles in inputs {
        let raw: Smiles = smiles.parse().unwrap();
        let n = raw.nodes().len();
        let mut edges = Vec::new();
        for i in 0..n {
            for edge in raw.edges_for_node(i) {
                let Some(j) = edge.other(i) else { continue };
                if j > i {
                    edges.push((i, j));
                }
            }
        }
        let ours = crate::structure::rings::perceive(n, &edges);
        let membership = raw.ring_membership();
        for i in 0..n {
            assert_eq!(
                ours.atom_in_ring[i],
                membership.contains_atom(i),
                "{smiles}: atom {i}"
            );
        }
        for (k, &(a, b)) in edges.iter().enumerate() {
            assert_eq!(
                ours.bond_in_ring[k],
                membership.contains_edge(a, b),
                "{smiles}: bond {a}-{b}"
            );
        }
        let isolated = ours.simple_cycles.as_ref().is_some_and(|c| {
            c.iter().all(|r| {
                r.iter()
                    .all(|&x| !c.iter().any(|o| o != r && o.contains(&x)))
            })
        });
        match &ours.simple_cycles {
            Some(cycles) if isolated => {
                simple += 1;
                // Isolated rings: the very same list as the crate's.
                assert_eq!(
                    cycles.as_slice(),
                    raw.symm_sssr_result().cycles(),
                    "{smiles}"
                );
            }
            Some(_) => fused += 1,
            None => crate_search += 1,
        }
        // The rings the adapter keeps, against the crate's symmetrized SSSR completed by
        // add_interchangeable_rings (the path used before structure::rings existed), as
        // sets of canonical cycles; single-fragment inputs without [H] atoms, where the
        // graph keeps the crate's atom numbering.
        let parsed = parse_smiles(smiles).unwrap();
        if parsed.graph.atoms.len() == n {
            let mut old = parsed.graph.clone();
            old.rings = raw.symm_sssr_result().cycles().to_vec();
            add_interchangeable_rings(&mut old);
            assert_eq!(
                canonical(&parsed.graph.rings),
                canonical(&old.rings),
                "{smiles}"
            );
            compared += 1;
        }
    }
    // Every path is exercised by the reference set.
    assert!(
        simple > 1_000 && fused > 300 && compared > 1_900,
        "{simple} isolated, {fused} fused, {crate_search} by the crate, {compared} compared"
    );
}

/// Each ring rotated to start at its lowest atom and turned towards the lower neighbour;
/// the rings sorted.
fn canonical(rings: &[Vec<usize>]) -> Vec<Vec<usize>> {
    let mut out: Vec<Vec<usize>> = rings
        .iter()
        .map(|r| {
            let start = (0..r.len()).min_by_key(|&i| r[i]).unwrap_or(0);
            let mut c: Vec<usize> = r[start..].iter().chain(&r[..start]).copied().collect();
            if c.len() > 2 && c[c.len() - 1] < c[1] {
                c[1..].reverse();
            }
            c
        })
        .collect();
    out.sort();
    out
}
