//! The JSON output of `suitability`, `scout` and `transfer` against docs/json-schema.md: real
//! output of each command is decoded into the library's typed reports (as tests/advise_cli.rs
//! does for `advise`), every field the documentation's table lists is present, and every
//! top-level field of the output is listed. All inputs are invented (an imaginary QC lab's
//! "mix QC-9"; not real compounds).

use std::path::Path;

use assert_cmd::Command;
use serde::Deserialize;
use serde_json::Value;

use phasewise::measured::optimise::{OptimiseReport, Selection};
use phasewise::measured::scout::ScoutFit;
use phasewise::measured::suitability::SuitabilityReport;
use phasewise::measured::transfer::{ColumnGeometry, TransferReport};
use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};

fn phasewise() -> Command {
    let mut c = Command::cargo_bin("phasewise").expect("binary built");
    c.env("PHASEWISE_KB", "/nonexistent/phasewise-test-kb.sqlite");
    c
}

fn write(dir: &Path, name: &str, text: &str) -> std::path::PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).expect("write fixture");
    p
}

/// `suitability --format json` as documented.
#[derive(Deserialize)]
struct SuitabilityDoc {
    schema_version: u32,
    peak_table: String,
    #[serde(flatten)]
    report: SuitabilityReport,
}

/// `scout --format json` as documented.
#[derive(Deserialize)]
struct ScoutDoc {
    schema_version: u32,
    plates_source: String,
    fit: ScoutFit,
    optimisation: OptimiseReport,
}

/// `transfer --format json` as documented.
#[derive(Deserialize)]
struct TransferDoc {
    schema_version: u32,
    original: ColumnGeometry,
    target: ColumnGeometry,
    original_flow_ml_min: f64,
    original_program: GradientProgram,
    #[serde(flatten)]
    report: TransferReport,
    regulatory_note: String,
}

/// Field paths listed in the first column of the table under the heading that starts with
/// `heading` (e.g. "## `phasewise scout"): `a.b[].c`, several per cell separated by commas.
fn documented_fields(heading: &str) -> Vec<String> {
    let doc = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/docs/json-schema.md"))
        .expect("docs/json-schema.md");
    let start = doc
        .find(heading)
        .unwrap_or_else(|| panic!("no section {heading}"));
    let section = &doc[start..];
    let end = section[3..].find("\n## ").map_or(section.len(), |e| e + 3);
    let mut fields = Vec::new();
    for line in section[..end].lines() {
        let Some(cell) = line.strip_prefix("| ").and_then(|l| l.split(" | ").next()) else {
            continue;
        };
        for part in cell.split(", ") {
            if let Some(f) = part.strip_prefix('`').and_then(|p| p.strip_suffix('`')) {
                fields.push(f.to_string());
            }
        }
    }
    assert!(
        fields.len() > 5,
        "{heading}: too few fields read: {fields:?}"
    );
    fields
}

/// Checks that `path` exists in `v`; `x[]` descends into every element of array `x` (an empty
/// array cannot be checked deeper).
fn has_path(v: &Value, path: &[&str]) -> bool {
    let Some((first, rest)) = path.split_first() else {
        return true;
    };
    let (key, array) = match first.strip_suffix("[]") {
        Some(k) => (k, true),
        None => (*first, false),
    };
    let Some(child) = v.get(key) else {
        return false;
    };
    if array {
        let Some(items) = child.as_array() else {
            return false;
        };
        items.iter().all(|i| has_path(i, rest))
    } else if rest.is_empty() {
        true
    } else {
        has_path(child, rest)
    }
}

fn check_against_docs(heading: &str, out: &Value) {
    let fields = documented_fields(heading);
    for f in &fields {
        let parts: Vec<&str> = f.split('.').collect();
        assert!(
            has_path(out, &parts),
            "{heading}: documented `{f}` is missing from {out:#}"
        );
    }
    let top: Vec<&str> = fields
        .iter()
        .map(|f| {
            f.split('.')
                .next()
                .unwrap_or_default()
                .trim_end_matches("[]")
        })
        .collect();
    for key in out.as_object().expect("an object").keys() {
        assert!(
            top.contains(&key.as_str()),
            "{heading}: output field `{key}` is not documented"
        );
    }
}

fn json(out: &[u8]) -> Value {
    serde_json::from_slice(out).unwrap_or_else(|e| {
        panic!("not JSON ({e}):\n{}", String::from_utf8_lossy(out));
    })
}

#[test]
fn suitability_json_matches_the_documented_schema() {
    let dir = tempfile::tempdir().unwrap();
    // Invented peak table; the last pair fails Rs 1.5 so the exit code is 1.
    let table = write(
        dir.path(),
        "qc9.csv",
        "# invented demo data\nname,rt,w50,w5,f5,area\nqc9-x,3.00,0.06,0.20,0.09,200\n\
         qc9-y,4.00,0.08,0.28,0.13,300\nqc9-z,4.20,0.10,0.40,0.16,500\n",
    );
    let out = phasewise()
        .arg("suitability")
        .arg(&table)
        .args(["--t0", "1.0", "--length-mm", "150", "--format", "json"])
        .assert()
        .code(1)
        .get_output()
        .stdout
        .clone();
    let v = json(&out);
    check_against_docs("## `phasewise suitability", &v);
    let doc: SuitabilityDoc = serde_json::from_value(v).expect("typed decode");
    assert_eq!(doc.schema_version, 1);
    assert!(doc.peak_table.ends_with("qc9.csv"));
    assert_eq!(doc.report.peaks.len(), 3);
    assert!(!doc.report.passed);
    // k = (3.00 − 1.00)/1.00 = 2 (hand-computed).
    assert!((doc.report.peaks[0].retention_factor - 2.0).abs() < 1e-12);
}

fn simulated_run(dir: &Path, name: &str, program: &str) -> std::path::PathBuf {
    // Invented LSS parameters; t0 = 1.5 min, tD = 1.0 min.
    let sys = GradientSystem {
        dead_time_min: 1.5,
        dwell_time_min: 1.0,
    };
    let prog = GradientProgram::parse(program).unwrap();
    let mut text = String::from("# simulated from invented parameters\nname,rt,w50\n");
    for (n, log_kw, s) in [
        ("qc9-a", 2.1, 3.4),
        ("qc9-b", 2.8, 4.1),
        ("qc9-c", 3.4, 4.6),
        ("qc9-d", 4.2, 5.5),
    ] {
        let tr = gradient_elution(&LssParameters { log_kw, s }, &prog, &sys)
            .unwrap()
            .retention_time_min;
        text.push_str(&format!("{n},{tr},0.05\n"));
    }
    write(dir, name, &text)
}

#[test]
fn scout_json_matches_the_documented_schema() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "fast.csv", "0:5,10:95");
    let r2 = simulated_run(dir.path(), "slow.csv", "0:5,30:95");
    let out = phasewise()
        .arg("scout")
        .arg(&r1)
        .arg(&r2)
        .args([
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            "1.5",
            "--flow",
            "1.0",
            "--dwell",
            "1.0",
            "--format",
            "json",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let v = json(&out);
    check_against_docs("## `phasewise scout", &v);
    let doc: ScoutDoc = serde_json::from_value(v).expect("typed decode");
    assert_eq!(doc.schema_version, 2);
    assert!(doc.plates_source.contains("assumed"));
    assert_eq!(doc.fit.analytes.len(), 4);
    let o = &doc.optimisation;
    assert_eq!(o.selection, Selection::ShortestRunMeetingTarget);
    assert!(o.meets_target && o.meets_min_retention);
    assert_eq!(o.optimum.peaks.len(), 4);
    // The documented 0.1 grid of programs.
    assert_eq!(
        (o.gradient_time_min * 10.0).round() / 10.0,
        o.gradient_time_min
    );
}

#[test]
fn transfer_json_matches_the_documented_schema() {
    let out = phasewise()
        .arg("transfer")
        .args([
            "--from",
            "150x4.6",
            "--from-particle",
            "5",
            "--to",
            "100x2.1",
            "--to-particle",
            "1.8",
            "--flow",
            "1.0",
            "--gradient",
            "0:5,20:95",
            "--injection",
            "10",
            "--constant-velocity",
            "--format",
            "json",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let v = json(&out);
    check_against_docs("## `phasewise transfer", &v);
    assert_eq!(v["scaling"], "constant_linear_velocity");
    // L/dp 150/5 = 30 → 100/1.8 = 55.6 (+85 %): outside the −25 % to +50 % range
    assert_eq!(v["limits"][0]["verdict"], "outside");
    let doc: TransferDoc = serde_json::from_value(v).expect("typed decode");
    assert_eq!(doc.schema_version, 1);
    assert_eq!(doc.original.column_length_mm, 150.0);
    assert_eq!(doc.target.inner_diameter_mm, 2.1);
    assert_eq!(doc.original_flow_ml_min, 1.0);
    assert_eq!(doc.original_program.to_spec(), "0:5,20:95");
    // F2 = F1 (dc2/dc1)² = 1.0 × (2.1/4.6)² = 0.2084 mL/min (same linear velocity).
    assert!((doc.report.flow_ml_min - (2.1f64 / 4.6).powi(2)).abs() < 1e-9);
    assert!(doc.regulatory_note.contains("pharmacopoeial"));
}

/// `scout --mode gc --format json` as documented.
#[derive(Deserialize)]
struct ScoutGcDoc {
    schema_version: u32,
    mode: String,
    holdup_source: String,
    plates_source: String,
    fit: phasewise::measured::gc_scout::GcScoutFit,
    optimisation: phasewise::measured::gc_optimise::GcOptimiseReport,
    safety: String,
}

#[test]
fn scout_gc_json_matches_the_documented_schema() {
    use phasewise::measured::gc_scout::{VantHoffParameters, programmed_elution};
    use phasewise::model::gc::OvenProgram;
    let dir = tempfile::tempdir().unwrap();
    // Invented parameters (A, B in K) of an imaginary mix; t_M = 1.25 min, N = 100 000.
    let run = |name: &str, spec: &str| {
        let prog = OvenProgram::parse(spec).unwrap();
        let mut text = String::from("# simulated from invented parameters\nname,rt,wb\n");
        for (n, a, b) in [
            ("qc9-g1", -10.2, 4500.0),
            ("qc9-g2", -11.4, 5400.0),
            ("qc9-g3", -12.9, 6500.0),
        ] {
            let e = programmed_elution(&VantHoffParameters { a, b_k: b }, &prog, 1.25).unwrap();
            let w = 4.0 * 1.25 * (1.0 + e.retention_factor_at_elution) / 100_000f64.sqrt();
            text.push_str(&format!("{n},{},{w}\n", e.retention_time_min));
        }
        write(dir.path(), name, &text)
    };
    let r1 = run("slow.csv", "40:1,5:300:5");
    let r2 = run("fast.csv", "40:1,15:300:5");
    let out = phasewise()
        .args(["scout", "--mode", "gc"])
        .arg(&r1)
        .arg(&r2)
        .args([
            "--ovens",
            "40:1,5:300:5;40:1,15:300:5",
            "--t0",
            "1.25",
            "--phase",
            "gc-5-phenyl",
            "--format",
            "json",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let v = json(&out);
    check_against_docs("## `phasewise scout --mode gc", &v);
    let doc: ScoutGcDoc = serde_json::from_value(v).expect("typed decode");
    assert_eq!((doc.schema_version, doc.mode.as_str()), (1, "gc"));
    assert!(doc.holdup_source.contains("given"));
    assert!(doc.plates_source.contains("median"));
    assert!(doc.safety.contains("Hydrogen"));
    assert_eq!(doc.fit.analytes.len(), 3);
    assert_eq!(doc.optimisation.optimum.peaks.len(), 3);
    // gc-5-phenyl is limited to 325 °C (data/phases.tsv).
    assert_eq!(doc.optimisation.max_temperature_c, 325.0);
    assert!(doc.optimisation.optimum.final_c <= 325.0);
}
