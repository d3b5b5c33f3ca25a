//! Reference check of the Joback boiling point against an independent open implementation.
//!
//! Source: the `chemicals` 1.5.2 Python package (MIT licence), `Misc/joback_predictions.tsv`,
//! which holds its own Joback predictions (computed with `thermo`'s RDKit-based group
//! assignment), joined to SMILES from its `Identifiers/chemical identifiers pubchem large.tsv`.
//! A seeded sample of 2,000 rows is in `tests/data/joback_sample.tsv` (built by
//! `tools/make_joback_sample.py`; see `tests/data/ATTRIBUTION.md`).
//!
//! Requirement: agreement within 1 K for at least 95 % of the sample (molecules we refuse count
//! as disagreements). Exceptions are printed with `cargo test -- --nocapture`.

use phasewise::structure::adapter::parse_smiles;
use phasewise::structure::joback::{JobackOptions, joback_tb};

/// Agreement tolerance, K (the reference values are printed to 0.01 K).
const TOLERANCE_K: f64 = 1.0;
/// Required share of the sample within the tolerance.
const REQUIRED_SHARE: f64 = 0.95;

#[test]
fn joback_agrees_with_chemicals_1_5_2_on_95_percent_of_sample() {
    let text = include_str!("data/joback_sample.tsv");
    let mut total = 0usize;
    let mut agree = 0usize;
    let mut max_agreeing_deviation_k: f64 = 0.0;
    let mut exceptions: Vec<String> = Vec::new();
    for line in text.lines().filter(|l| !l.starts_with('#')).skip(1) {
        let cols: Vec<&str> = line.split('\t').collect();
        assert_eq!(cols.len(), 3, "malformed sample row: {line}");
        let reference: f64 = cols[2].parse().expect("sample tb_k is a number");
        total += 1;
        let ours = parse_smiles(cols[1])
            .map_err(|e| e.to_string())
            .and_then(|p| joback_tb(&p.graph, JobackOptions::default()).map_err(|e| e.to_string()));
        match ours {
            Ok(e) if (e.tb_k - reference).abs() <= TOLERANCE_K => {
                agree += 1;
                max_agreeing_deviation_k = max_agreeing_deviation_k.max((e.tb_k - reference).abs());
            }
            Ok(e) => exceptions.push(format!(
                "{}\t{}\tref {reference:.2}\tours {:.2}",
                cols[0], cols[1], e.tb_k
            )),
            Err(msg) => exceptions.push(format!(
                "{}\t{}\tref {reference:.2}\trefused: {msg}",
                cols[0], cols[1]
            )),
        }
    }
    let share = agree as f64 / total as f64;
    println!(
        "Joback vs chemicals 1.5.2: {agree}/{total} within {TOLERANCE_K} K ({:.1} %)",
        100.0 * share
    );
    println!("largest deviation among agreeing rows: {max_agreeing_deviation_k:.3} K");
    for e in &exceptions {
        println!("EXCEPTION\t{e}");
    }
    assert_eq!(total, 2000, "sample size changed");
    assert!(
        share >= REQUIRED_SHARE,
        "only {:.1} % within {TOLERANCE_K} K",
        100.0 * share
    );
}
