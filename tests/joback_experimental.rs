//! The Joback method's error on a handful of experimental normal boiling points.
//!
//! Source of the experimental values: from memory of standard handbook values (CRC Handbook of
//! Chemistry and Physics-type normal boiling points, edition not checked), converted from °C
//! with T/K = t/°C + 273.15. Run with `--nocapture` to see the table recorded in
//! docs/ionisation-volatility.md.
//!
//! Bounds: Joback & Reid (1987) report an average absolute error of 12.9 K on their test set;
//! here the mean absolute error over the thirteen compounds must stay below 20 K, no compound may
//! be off by more than 45 K, and the Stein & Brown correction must shrink the error for
//! n-eicosane, where plain Joback overshoots (the large-molecule weakness).

use phasewise::structure::adapter::parse_smiles;
use phasewise::structure::joback::{JobackOptions, joback_tb};

/// (name, SMILES, experimental Tb in K, from memory).
const COMPOUNDS: &[(&str, &str, f64)] = &[
    ("n-hexane", "CCCCCC", 341.9),
    ("toluene", "Cc1ccccc1", 383.8),
    ("ethanol", "CCO", 351.4),
    ("acetone", "CC(C)=O", 329.2),
    ("chlorobenzene", "Clc1ccccc1", 404.9),
    ("phenol", "Oc1ccccc1", 454.9),
    ("naphthalene", "c1ccc2ccccc2c1", 491.1),
    ("ethyl acetate", "CCOC(C)=O", 350.2),
    ("n-decane", "CCCCCCCCCC", 447.3),
    ("benzoic acid", "OC(=O)c1ccccc1", 522.3),
    ("n-hexadecane", "CCCCCCCCCCCCCCCC", 560.0),
    ("glycerol", "OCC(O)CO", 563.2),
    ("n-eicosane", "CCCCCCCCCCCCCCCCCCCC", 616.3),
];

/// Largest mean absolute error accepted, K.
const MAX_MAE_K: f64 = 20.0;
/// Largest single error accepted, K.
const MAX_ERROR_K: f64 = 45.0;

#[test]
fn joback_error_on_experimental_boiling_points() {
    let mut sum = 0.0;
    let mut sum_corrected = 0.0;
    println!(
        "| compound | Tb exp / K | Joback / K | error / K | Joback + Stein-Brown / K | error / K |"
    );
    println!("|---|---|---|---|---|---|");
    for &(name, smiles, exp) in COMPOUNDS {
        let g = parse_smiles(smiles).expect("test SMILES parses").graph;
        let plain = joback_tb(&g, JobackOptions::default())
            .expect("Joback applies")
            .tb_k;
        let corrected = joback_tb(
            &g,
            JobackOptions {
                stein_brown_correction: true,
            },
        )
        .expect("Joback applies")
        .tb_k;
        let err = plain - exp;
        println!(
            "| {name} | {exp:.1} | {plain:.1} | {err:+.1} | {corrected:.1} | {:+.1} |",
            corrected - exp
        );
        assert!(err.abs() <= MAX_ERROR_K, "{name}: error {err:.1} K");
        sum += err.abs();
        sum_corrected += (corrected - exp).abs();
        if name == "n-eicosane" {
            assert!(
                (corrected - exp).abs() < err.abs(),
                "Stein-Brown should help for {name}"
            );
        }
    }
    let mae = sum / COMPOUNDS.len() as f64;
    let mae_corrected = sum_corrected / COMPOUNDS.len() as f64;
    println!("| **MAE** | | | {mae:.1} | | {mae_corrected:.1} |");
    assert!(mae <= MAX_MAE_K, "MAE {mae:.1} K");
}
