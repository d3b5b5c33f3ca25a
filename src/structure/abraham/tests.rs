//! Typing tests of the fragment scheme (`structure::abraham`).
use super::*;
use crate::structure::parse_smiles;

fn counts(smiles: &str) -> Vec<(&'static str, u32)> {
    let g = parse_smiles(smiles).unwrap().graph;
    fragment_counts(&g)
        .unwrap()
        .into_iter()
        .map(|(f, n)| (f.id(), n))
        .collect()
}

#[test]
fn groups_are_typed_once() {
    assert_eq!(counts("CCCCCC"), vec![("CH3", 2), ("CH2", 4)]);
    assert_eq!(
        counts("CCOC(C)=O"),
        vec![("CH3", 2), ("CH2", 1), ("ester C(=O)O", 1), ("in-group", 2)]
    );
    assert_eq!(
        counts("Cc1ccccc1[N+](=O)[O-]"),
        vec![
            ("CH3", 1),
            ("aCH", 4),
            ("aC-substituted", 2),
            ("nitro NO2", 1),
            ("ortho pair, polar", 1),
            ("in-group", 2)
        ]
    );
    assert!(counts("Oc1ccccc1[N+](=O)[O-]").contains(&("ortho OH...acceptor", 1)));
    assert!(!counts("Oc1ccc(cc1)[N+](=O)[O-]").contains(&("ortho OH...acceptor", 1)));
    assert!(counts("ClC(Cl)Cl").contains(&("acidic CHX2", 1)));
    assert!(counts("Cc1ccccc1C").contains(&("ortho pair", 1)));
    assert!(
        !counts("Cc1cccc(C)c1")
            .iter()
            .any(|(f, _)| *f == "ortho pair")
    );
    assert!(
        !counts("c1ccc2ccccc2c1")
            .iter()
            .any(|(f, _)| *f == "ortho pair")
    );
    assert!(counts("CNc1ccccc1").contains(&("aryl NH", 1)));
    assert_eq!(counts("c1ccc2ccccc2c1"), vec![("aCH", 8), ("aC-fused", 2)]);
    assert_eq!(
        counts("CC#N"),
        vec![("CH3", 1), ("nitrile C#N", 1), ("in-group", 1)]
    );
    assert_eq!(counts("c1ccncc1"), vec![("aCH", 5), ("pyridine n", 1)]);
}

fn has(smiles: &str, id: &str) -> u32 {
    counts(smiles)
        .iter()
        .find(|(f, _)| *f == id)
        .map_or(0, |(_, n)| *n)
}

// Classes of non-additive corrections (each with cases beyond the reference set).
#[test]
fn intramolecular_hydrogen_bonds_are_typed_by_acceptor_strength() {
    // strong: nitro, carbonyl, ester next to the OH (2-nitrophenol, salicylaldehyde,
    // methyl salicylate, 2-hydroxyacetophenone)
    for smi in [
        "Oc1ccccc1[N+](=O)[O-]",
        "Oc1ccccc1C=O",
        "COC(=O)c1ccccc1O",
        "CC(=O)c1ccccc1O",
    ] {
        assert_eq!(has(smi, "ortho OH...acceptor"), 1, "{smi}");
        assert_eq!(has(smi, "ortho OH...halogen or ether"), 0, "{smi}");
    }
    // weak: halogen or ether oxygen next to the OH (2-chlorophenol, 2-bromophenol,
    // 2-fluorophenol, guaiacol, 2,6-dichlorophenol counted once)
    for smi in [
        "Oc1ccccc1Cl",
        "Oc1ccccc1Br",
        "Oc1ccccc1F",
        "COc1ccccc1O",
        "Oc1c(Cl)cccc1Cl",
    ] {
        assert_eq!(has(smi, "ortho OH...halogen or ether"), 1, "{smi}");
        assert_eq!(has(smi, "ortho OH...acceptor"), 0, "{smi}");
    }
    // meta and para isomers: no intramolecular bond
    for smi in [
        "Oc1cccc(Cl)c1",
        "Oc1ccc(Cl)cc1",
        "COc1ccc(O)cc1",
        "Oc1ccc(cc1)C=O",
    ] {
        assert_eq!(has(smi, "ortho OH...halogen or ether"), 0, "{smi}");
        assert_eq!(has(smi, "ortho OH...acceptor"), 0, "{smi}");
    }
}

#[test]
fn withdrawing_groups_on_acidic_rings_are_counted_per_group() {
    assert_eq!(has("Oc1ccc(Cl)cc1", "withdrawing group on OH/NH ring"), 1);
    assert_eq!(has("Oc1ccc(Cl)cc1Cl", "withdrawing group on OH/NH ring"), 2);
    assert_eq!(
        has(
            "Oc1c(Cl)c(Cl)c(Cl)c(Cl)c1Cl",
            "withdrawing group on OH/NH ring"
        ),
        5
    );
    assert_eq!(
        has("Nc1ccc(cc1)[N+](=O)[O-]", "withdrawing group on OH/NH ring"),
        1
    );
    assert_eq!(has("Oc1ccc(cc1)C#N", "withdrawing group on OH/NH ring"), 1);
    // donors and alkyls do not count; a chlorine on another ring does not either
    assert_eq!(has("Cc1ccc(O)cc1", "withdrawing group on OH/NH ring"), 0);
    assert_eq!(
        has(
            "Oc1ccc(cc1)-c1ccc(Cl)cc1",
            "withdrawing group on OH/NH ring"
        ),
        0
    );
    assert_eq!(has("Clc1ccccc1", "withdrawing group on OH/NH ring"), 0);
}

#[test]
fn ortho_pairs_are_typed_by_kind() {
    assert_eq!(has("Cc1ccccc1C", "ortho pair"), 1);
    assert_eq!(has("CCc1ccccc1C", "ortho pair"), 1);
    assert_eq!(has("Cc1cccc(C)c1C", "ortho pair"), 2);
    assert_eq!(has("Clc1ccccc1Cl", "ortho pair, halogens"), 1);
    assert_eq!(has("Clc1ccccc1Br", "ortho pair, halogens"), 1);
    assert_eq!(has("Clc1cccc(Cl)c1Cl", "ortho pair, halogens"), 2);
    // a para halogen cancels the pair's dipole: 1,2,4-trichloro-, hexachlorobenzene
    assert_eq!(has("Clc1ccc(Cl)c(Cl)c1", "ortho pair, halogens"), 0);
    assert_eq!(
        has("Clc1c(Cl)c(Cl)c(Cl)c(Cl)c1Cl", "ortho pair, halogens"),
        0
    );
    assert_eq!(has("Cc1ccccc1Cl", "ortho pair"), 1);
    assert_eq!(has("CCOC(=O)c1ccccc1C(=O)OCC", "ortho pair, polar"), 1);
    assert_eq!(has("Cc1ccccc1C#N", "ortho pair, polar"), 1);
    assert_eq!(has("Cc1ccccc1O", "ortho pair, heteroatom"), 1);
    assert_eq!(has("Cc1ccccc1N", "ortho pair, heteroatom"), 1);
    assert_eq!(has("COc1ccccc1C", "ortho pair, heteroatom"), 1);
    // para and meta isomers and ring fusions: no pair
    for smi in [
        "Cc1ccc(C)cc1",
        "Cc1cccc(O)c1",
        "c1ccc2ccccc2c1",
        "Clc1ccc(Cl)cc1",
    ] {
        assert!(
            !counts(smi).iter().any(|(f, _)| f.starts_with("ortho pair")),
            "{smi}"
        );
    }
}

#[test]
fn alcohols_are_typed_by_carbinol_substitution() {
    assert_eq!(has("CO", "alcohol OH"), 1);
    assert_eq!(has("CCCCO", "alcohol OH"), 1);
    assert_eq!(has("OCc1ccccc1", "alcohol OH"), 1);
    assert_eq!(has("CC(C)O", "secondary alcohol OH"), 1);
    assert_eq!(has("OC1CCCCC1", "secondary alcohol OH"), 1);
    assert_eq!(has("CC(C)(C)O", "tertiary alcohol OH"), 1);
    assert_eq!(has("CC(O)(CC)CC", "tertiary alcohol OH"), 1);
    assert_eq!(has("OCC(O)CO", "alcohol OH"), 2);
    assert_eq!(has("OCC(O)CO", "secondary alcohol OH"), 1);
}

#[test]
fn ethers_and_pyridine_neighbours_are_typed() {
    assert_eq!(has("c1ccc(cc1)Oc1ccccc1", "diaryl ether O"), 1);
    assert_eq!(has("COc1ccccc1", "aryl ether O"), 1);
    assert_eq!(has("COc1ccccc1", "diaryl ether O"), 0);
    assert_eq!(has("Cc1ccccn1", "substituent next to pyridine n"), 1);
    assert_eq!(has("Cc1cccc(C)n1", "substituent next to pyridine n"), 2);
    assert_eq!(has("Clc1ccccn1", "substituent next to pyridine n"), 1);
    assert_eq!(has("Cc1cccnc1", "substituent next to pyridine n"), 0);
    assert_eq!(has("Cc1ccncc1", "substituent next to pyridine n"), 0);
    assert_eq!(has("c1ccc2ncccc2c1", "substituent next to pyridine n"), 0);
}

#[test]
fn unusual_atoms_are_named() {
    let g = parse_smiles("C[Hg]C").unwrap().graph;
    let err = fragment_counts(&g).unwrap_err().to_string();
    assert!(err.contains("Hg") && err.contains("no fragment"), "{err}");
}

fn alicyclic(smiles: &str) -> u32 {
    counts(smiles)
        .into_iter()
        .find(|(id, _)| *id == "alicyclic ring carbon")
        .map_or(0, |(_, n)| n)
}

/// Every carbon of a non-aromatic ring gets the ring correction, whatever its own fragment
/// (ring CH2, ring alkene, ring carbonyl, bridged cage carbon); ring heteroatoms, aromatic
/// carbons and chains do not.
#[test]
fn alicyclic_ring_carbons_are_counted_once_each() {
    for (smiles, n) in [
        ("C1CCCCC1", 6),
        ("O=C1CCCCC1", 6),
        ("C1CCOC1", 4),
        ("C1Cc2ccccc2C1", 3),
        ("C1CC2CCC1C2", 7),
        ("CC1=CCC2CC1C2(C)C", 7),
        ("C1=CCCCC1", 6),
        ("c1ccccc1", 0),
        ("CCCCCC=C", 0),
        ("c1ccc2ccccc2c1", 0),
        ("CC(C)c1ccc(C)cc1", 0),
    ] {
        assert_eq!(alicyclic(smiles), n, "{smiles}");
    }
}
