//! Property tests: `describe` never panics, on arbitrary strings and on
//! mutations of valid SMILES (reference structures from
//! `tests/data/rdkit_descriptors.tsv`, RDKit 2026.09.1 on PubChem).

use phasewise::structure::{StructureError, describe, parse_smiles};
use proptest::prelude::*;

fn reference_smiles() -> Vec<String> {
    include_str!("data/rdkit_descriptors.tsv")
        .lines()
        .skip(1)
        .filter_map(|l| l.split('\t').nth(1).map(str::to_string))
        .take(200)
        .collect()
}

/// Characters that SMILES uses, so mutations stay close to valid input.
const ALPHABET: &[char] = &[
    'C', 'N', 'O', 'S', 'P', 'F', 'I', 'B', 'c', 'n', 'o', 's', 'l', 'r', 'H', '[', ']', '(', ')',
    '=', '#', '$', ':', '/', '\\', '.', '+', '-', '@', '%', '0', '1', '2', '3', '9', '*',
];

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn arbitrary_strings_never_panic(s in "\\PC{0,60}") {
        let _ = describe(&s);
    }

    #[test]
    fn smiles_alphabet_strings_never_panic(v in proptest::collection::vec(proptest::sample::select(ALPHABET), 0..40)) {
        let s: String = v.into_iter().collect();
        let _ = describe(&s);
    }

    #[test]
    fn mutated_reference_smiles_never_panic(
        idx in 0usize..200,
        edits in proptest::collection::vec((0usize..200, 0usize..3, proptest::sample::select(ALPHABET)), 1..4),
    ) {
        let all = reference_smiles();
        let mut chars: Vec<char> = all[idx % all.len()].chars().collect();
        for (pos, kind, c) in edits {
            if chars.is_empty() { chars.push(c); continue; }
            let p = pos % chars.len();
            match kind {
                0 => chars[p] = c,
                1 => chars.insert(p, c),
                _ => { chars.remove(p); }
            }
        }
        let s: String = chars.into_iter().collect();
        match describe(&s) {
            Ok(d) => {
                // A successful result is internally consistent.
                prop_assert!(d.descriptors.heavy_atom_count > 0);
                prop_assert!(d.descriptors.tpsa_a2 >= 0.0);
                prop_assert!((0.0..=1.0).contains(&d.descriptors.fraction_csp3));
            }
            Err(e) => {
                // Every error names the input (or says it is empty/too large).
                let msg = e.to_string();
                prop_assert!(!msg.is_empty());
                if let StructureError::Syntax { smiles, .. } = &e {
                    prop_assert_eq!(smiles.as_str(), s.trim());
                }
            }
        }
    }
}

#[test]
fn salts_keep_the_organic_ion() {
    // Invented example: sodium benzoate.
    let d = describe("[Na+].[O-]C(=O)c1ccccc1").unwrap();
    assert_eq!(d.descriptors.molecular_formula, "C7H5O2-");
    assert_eq!(d.fragments_dropped, vec!["[Na+]".to_string()]);
    assert!(d.note.is_some());
}

#[test]
fn errors_carry_the_position() {
    match parse_smiles("CC(=O)X") {
        Err(StructureError::Syntax { position, .. })
        | Err(StructureError::UnsupportedElement { position, .. }) => {
            assert_eq!(position, 6)
        }
        other => panic!("unexpected {other:?}"),
    }
}

/// Regression (fuzzing, 2026-12-01): a 512-byte input with long chains of
/// lowercase atoms outside rings took 10–17 s per run under the fuzzer
/// (0.1 s in release) inside kekulization before failing; it is now rejected
/// up front, as RDKit rejects non-ring aromatic atoms.
#[test]
fn regression_fuzz_slow_unit_aromatic_chain_is_rejected() {
    let s = include_str!("data/fuzz_slow_unit_aromatic_chain.smi");
    assert!(matches!(
        parse_smiles(s),
        Err(StructureError::AromaticOutsideRing { .. })
    ));
}
