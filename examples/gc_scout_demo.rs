//! Writes the invented GC scouting runs of the user guide (§ 6.4):
//! `examples/measured/gc-scout-5cpm.csv` and `gc-scout-15cpm.csv`, simulated with the library's
//! own migration integral from invented retention–temperature parameters (the fictitious
//! "Harbourside QC Lab", an invented residual-solvent-like mix "RS-7"; not real compounds, not a
//! measurement). Deterministic: `cargo run --example gc_scout_demo -- examples/measured`.

use std::path::PathBuf;

use phasewise::measured::gc_scout::{VantHoffParameters, programmed_elution};
use phasewise::model::gc::OvenProgram;

/// Invented analytes: name, A, B (K).
const MIX: [(&str, f64, f64); 6] = [
    ("rs7-a (invented)", -9.6, 4100.0),
    ("rs7-b (invented)", -10.4, 4650.0),
    ("rs7-c (invented)", -10.95, 4900.0),
    ("rs7-d (invented)", -12.2, 5700.0),
    ("rs7-e (invented)", -12.65, 5930.0),
    ("rs7-f (invented)", -14.1, 7250.0),
];
/// Hold-up time of the invented 30 m column at 35 cm/s: 3000 cm / 35 cm/s / 60 = 1.4286 min.
const TM: f64 = 3000.0 / 35.0 / 60.0;
/// Plate number of the invented column (about L/dc for 30 m × 0.25 mm).
const PLATES: f64 = 110_000.0;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = PathBuf::from(
        std::env::args()
            .nth(1)
            .unwrap_or_else(|| "examples/measured".into()),
    );
    for (file, spec, rate) in [
        ("gc-scout-5cpm.csv", "40:1,5:300:5", 5),
        ("gc-scout-15cpm.csv", "40:1,15:300:5", 15),
    ] {
        let program = OvenProgram::parse(spec)?;
        let mut text = format!(
            "# Invented scenario: simulated GC scouting run of the fictitious Harbourside QC Lab,\n\
             # invented mix RS-7 on a 30 m x 0.25 mm x 0.25 um 5 % phenyl column, helium 35 cm/s,\n\
             # oven 40 C (1 min), {rate} C/min to 300 C (5 min). Simulated from invented\n\
             # parameters (examples/gc_scout_demo.rs); not a measurement.\nname,rt,wb\n"
        );
        for (name, a, b) in MIX {
            let e = programmed_elution(&VantHoffParameters { a, b_k: b }, &program, TM)?;
            let w = 4.0 * TM * (1.0 + e.retention_factor_at_elution) / PLATES.sqrt();
            text.push_str(&format!("{name},{:.4},{:.4}\n", e.retention_time_min, w));
        }
        std::fs::write(dir.join(file), text)?;
    }
    Ok(())
}
