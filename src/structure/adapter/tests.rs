//! Tests of the SMILES adapter (moved out of `adapter.rs` to keep it under the line limit).

use super::*;

#[test]
fn ethanol_hydrogens() {
    let p = parse_smiles("CCO").unwrap();
    let h: Vec<u8> = p.graph.atoms.iter().map(|a| a.hydrogens).collect();
    assert_eq!(h, vec![3, 2, 1]);
    assert!(p.note.is_none());
}

#[test]
fn kekule_benzene_is_aromatic() {
    let p = parse_smiles("C1=CC=CC=C1").unwrap();
    assert!(p.graph.atoms.iter().all(|a| a.aromatic && a.in_ring));
    assert!(p.graph.bonds.iter().all(|b| b.order == BondOrder::Aromatic));
    assert_eq!(p.graph.rings.len(), 1);
}

#[test]
fn lowercase_pyrrole_needs_h() {
    assert!(parse_smiles("c1cc[nH]c1").is_ok());
    assert!(matches!(
        parse_smiles("c1ccnc1"),
        Err(StructureError::Kekulization { .. })
    ));
}

#[test]
fn salt_keeps_organic_fragment() {
    let p = parse_smiles("[Na+].CC(=O)[O-]").unwrap();
    assert_eq!(p.graph.atoms.len(), 4);
    assert_eq!(p.fragments_dropped, vec!["[Na+]".to_string()]);
    assert!(p.note.unwrap().contains("[Na+]"));
}

#[test]
fn errors_name_position() {
    match parse_smiles("CC(C") {
        Err(StructureError::Syntax { smiles, .. }) => assert_eq!(smiles, "CC(C"),
        other => panic!("unexpected {other:?}"),
    }
    match parse_smiles("CC[CH]C") {
        Ok(_) => panic!("radical accepted"),
        Err(StructureError::Radical {
            position,
            electrons,
            ..
        }) => {
            assert_eq!(position, 2);
            assert_eq!(electrons, 1);
        }
        Err(e) => panic!("unexpected {e}"),
    }
    assert!(
        parse_smiles_with(
            "C[CH2]",
            &ParseOptions {
                allow_radicals: true,
                ..ParseOptions::default()
            }
        )
        .is_ok()
    );
    assert!(matches!(
        parse_smiles("CC(C)(C)(C)(C)C"),
        Err(StructureError::Valence { position: 1, .. })
    ));
    assert!(matches!(
        parse_smiles("C*C"),
        Err(StructureError::UnsupportedElement { .. })
    ));
    assert!(matches!(parse_smiles("   "), Err(StructureError::Empty)));
}

#[test]
fn aromatic_outside_ring_is_rejected() {
    assert!(matches!(
        parse_smiles("Ccc1ccccc1"),
        Err(StructureError::AromaticOutsideRing { position: 1, .. })
    ));
}

#[test]
fn explicit_h_folded() {
    let p = parse_smiles("[H]C([H])([H])O").unwrap();
    assert_eq!(p.graph.atoms.len(), 2);
    assert_eq!(p.graph.atoms[0].hydrogens, 3);
}

#[test]
fn ring_set_is_rdkit_symmetrized() {
    // RDKit 2026.09.1 CalcNumRings: cubane 6 (tests/data/README.md), and
    // CID 143818 5 (tests/data/rdkit_descriptors.tsv); SSSR sizes 5 and 3.
    let rings = |s: &str| parse_smiles(s).unwrap().graph.rings.len();
    assert_eq!(rings("C12C3C4C1C5C2C3C45"), 6);
    assert_eq!(rings("C1CCC2C3CCCCC2C3C1"), 5);
    assert_eq!(rings("C1=CC=C2C=CC=CC2=C1"), 2);
    assert_eq!(rings("CCO"), 0);
}

#[test]
fn too_large() {
    let s = "C".repeat(MAX_HEAVY_ATOMS + 1);
    assert!(matches!(
        parse_smiles(&s),
        Err(StructureError::TooLarge { .. })
    ));
}
