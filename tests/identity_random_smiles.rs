//! Reference check of the canonical structure key against RDKit: randomised SMILES
//! (other atom order, Kekulé form, explicit hydrogens) of 2,300 compounds of the open
//! retention data (RepoRT, CC BY-SA 4.0) and of the shipped base, written by RDKit
//! 2026.09.1 (`tools/make_random_smiles.py`, `tests/data/random_smiles.tsv`).
//!
//! Requirement (issue 13): at least 99.5 % of the variants resolve to the right compound
//! (by InChIKey) and none to a wrong one.

use std::collections::HashMap;

use phasewise::structure::canon::structure_key;

struct Row {
    inchikey: String,
    form: String,
    smiles: String,
    reference: String,
}

fn rows() -> Vec<Row> {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/random_smiles.tsv"
    ))
    .expect("tests/data/random_smiles.tsv");
    text.lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .map(|l| {
            let f: Vec<&str> = l.split('\t').collect();
            assert_eq!(f.len(), 5, "{l}");
            Row {
                inchikey: f[1].to_string(),
                form: f[2].to_string(),
                smiles: f[3].to_string(),
                reference: f[4].to_string(),
            }
        })
        .collect()
}

/// Every variant's stereo key finds its own compound among all reference structures
/// (keyed by the source's SMILES, not RDKit's), and never another compound.
#[test]
fn randomised_smiles_resolve_by_key_to_the_right_compound() {
    let rows = rows();
    assert!(rows.len() >= 8_000, "{} rows", rows.len());
    let mut by_stereo: HashMap<String, Vec<String>> = HashMap::new();
    let mut by_skeleton: HashMap<String, Vec<String>> = HashMap::new();
    let mut seen = std::collections::HashSet::new();
    for r in &rows {
        if !seen.insert(r.inchikey.clone()) {
            continue;
        }
        if let Ok(k) = structure_key(&r.reference) {
            by_stereo
                .entry(k.stereo)
                .or_default()
                .push(r.inchikey.clone());
            by_skeleton
                .entry(k.skeleton)
                .or_default()
                .push(r.inchikey.clone());
        }
    }
    let compounds = seen.len();
    assert!(compounds >= 2_000, "{compounds} compounds");
    let (mut right, mut wrong, mut missed) = (0usize, Vec::new(), Vec::new());
    for r in &rows {
        let hit = structure_key(&r.smiles).ok().and_then(|k| {
            by_stereo
                .get(&k.stereo)
                .or_else(|| by_skeleton.get(&k.skeleton))
                .cloned()
        });
        // The key neutralises acids and bases (structure::canon), so a record of the anion and
        // one of the acid are one analyte: InChIKeys that differ only in the final protonation
        // flag denote the same molecule here.
        let molecule = |k: &str| k[..k.len().saturating_sub(2)].to_string();
        match hit {
            Some(keys) if keys.iter().all(|k| molecule(k) == molecule(&r.inchikey)) => right += 1,
            Some(keys) if keys.contains(&r.inchikey) => {
                wrong.push(format!("{} {} ambiguous {keys:?}", r.form, r.smiles))
            }
            Some(keys) => wrong.push(format!(
                "{} {} -> {keys:?} not {}",
                r.form, r.smiles, r.inchikey
            )),
            None => missed.push(format!("{} {} ({})", r.form, r.smiles, r.reference)),
        }
    }
    let rate = right as f64 / rows.len() as f64;
    eprintln!(
        "randomised SMILES: {right}/{} right ({:.2} %), {} wrong, {} unresolved, {compounds} compounds",
        rows.len(),
        100.0 * rate,
        wrong.len(),
        missed.len()
    );
    assert!(wrong.is_empty(), "resolved to a wrong compound: {wrong:#?}");
    assert!(
        rate >= 0.995,
        "only {:.2} % resolved; first misses: {:#?}",
        100.0 * rate,
        &missed[..missed.len().min(20)]
    );
}
