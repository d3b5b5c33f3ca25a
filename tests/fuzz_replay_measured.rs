//! Replays the fuzz corpora (`fuzz/corpus/<target>/*`, and any crash artifacts under
//! `fuzz/artifacts/<target>/`) through the same checks as the fuzz targets, as a plain test, so
//! `cargo test` covers every input the fuzzer ever kept.

use std::fs;
use std::path::Path;

use phasewise::measured::DeadTimeInput;
use phasewise::measured::peaks::PeakTable;
use phasewise::measured::suitability::{SuitabilityRequest, SuitabilityTargets, evaluate};
use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};

fn inputs(target: &str) -> Vec<(String, Vec<u8>)> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("fuzz");
    let mut out = Vec::new();
    for sub in ["corpus", "artifacts"] {
        let dir = root.join(sub).join(target);
        let Ok(entries) = fs::read_dir(&dir) else {
            continue;
        };
        let mut paths: Vec<_> = entries.filter_map(|e| e.ok().map(|e| e.path())).collect();
        paths.sort();
        for p in paths.into_iter().filter(|p| p.is_file()) {
            let bytes = fs::read(&p).unwrap_or_else(|e| panic!("reading {}: {e}", p.display()));
            out.push((p.display().to_string(), bytes));
        }
    }
    out
}

#[test]
fn peak_table_corpus_replays_without_panic() {
    let files = inputs("peak_table");
    assert!(
        files.len() >= 9,
        "seed corpus missing: {} files",
        files.len()
    );
    let mut accepted = 0;
    for (name, bytes) in files {
        let Ok(text) = std::str::from_utf8(&bytes) else {
            continue;
        };
        match PeakTable::parse(text) {
            Ok(table) => {
                accepted += 1;
                let _ = evaluate(&SuitabilityRequest {
                    peaks: table,
                    dead_time: DeadTimeInput::Given { dead_time_min: 0.5 },
                    column_length_mm: Some(100.0),
                    exclude: vec![],
                    targets: SuitabilityTargets::default(),
                });
            }
            Err(e) => assert!(!e.to_string().is_empty(), "{name}"),
        }
    }
    // The seed corpus holds valid tables as well as broken ones.
    assert!(accepted >= 4, "only {accepted} seed tables parsed");
}

#[test]
fn gradient_spec_corpus_replays_without_panic() {
    let files = inputs("gradient_spec");
    assert!(
        files.len() >= 8,
        "seed corpus missing: {} files",
        files.len()
    );
    let mut accepted = 0;
    for (name, bytes) in files {
        let Ok(text) = std::str::from_utf8(&bytes) else {
            continue;
        };
        match GradientProgram::parse(text) {
            Ok(p) => {
                accepted += 1;
                assert!(
                    p.points().windows(2).all(|w| w[0].time_min < w[1].time_min),
                    "{name}"
                );
                let again = GradientProgram::parse(&p.to_spec()).unwrap();
                assert_eq!(again, p, "{name}");
                let _ = gradient_elution(
                    &LssParameters {
                        log_kw: 3.0,
                        s: 4.0,
                    },
                    &p,
                    &GradientSystem {
                        dead_time_min: 1.0,
                        dwell_time_min: 0.5,
                    },
                );
            }
            Err(e) => assert!(!e.to_string().is_empty(), "{name}"),
        }
    }
    assert!(accepted >= 4, "only {accepted} seed programs parsed");
}

#[test]
fn oven_program_corpus_replays_without_panic() {
    use phasewise::model::gc::{GcColumn, OvenProgram, alkane_ladder};
    let files = inputs("oven_program");
    assert!(
        files.len() >= 9,
        "seed corpus missing: {} files",
        files.len()
    );
    let phase = phasewise::phase::Catalogue::builtin()
        .unwrap()
        .phase("gc-dimethyl")
        .unwrap();
    let column = GcColumn::new(30.0, 0.25, 0.25, 35.0).unwrap();
    let (mut accepted, mut rejected) = (0, 0);
    for (name, bytes) in files {
        let Ok(text) = std::str::from_utf8(&bytes) else {
            continue;
        };
        match OvenProgram::parse(text) {
            Ok(p) => {
                accepted += 1;
                let again = OvenProgram::parse(&p.to_spec()).unwrap();
                assert_eq!(again.to_spec(), p.to_spec(), "{name}");
                assert!(p.final_c() >= p.initial_c(), "{name}");
                if p.total_time_min() < 120.0 {
                    let _ = alkane_ladder(phase, &column, &p);
                }
            }
            Err(e) => {
                rejected += 1;
                assert!(!e.to_string().is_empty(), "{name}");
            }
        }
    }
    // the seeds hold valid programs and broken ones
    assert!(
        accepted >= 2 && rejected >= 5,
        "{accepted} accepted, {rejected} rejected"
    );
}
