//! `scout --mode gc` through the binary. Self-consistency only: the scouting runs are simulated
//! with the library's own migration integral from invented parameters (an imaginary lab's
//! "solvent mix S-4"; not real compounds), written as peak tables, and fitted and optimised
//! through the binary; no published worked example is reproduced.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

use phasewise::measured::gc_optimise::{
    GcNamedAnalyte, GcOptimiseRequest, TemperatureRange, optimise_gc,
};
use phasewise::measured::gc_scout::{VantHoffParameters, programmed_elution};
use phasewise::model::gc::OvenProgram;

/// Invented analytes (A, B in K): typical magnitudes for a 0.25 mm × 0.25 µm column, from
/// memory; chosen so that the optimum is not at an edge of the ramp range.
const ANALYTES: [(&str, f64, f64); 5] = [
    ("s4-a", -10.0, 4400.0),
    ("s4-b", -11.0, 5000.0),
    ("s4-c", -11.35, 5200.0),
    ("s4-d", -13.2, 6200.0),
    ("s4-e", -14.0, 7300.0),
];
const TM: f64 = 1.25;
const PLATES: f64 = 120_000.0;
const SLOW: &str = "40:1,5:300:5";
const FAST: &str = "40:1,15:300:5";

fn phasewise() -> Command {
    let mut c = Command::cargo_bin("phasewise").expect("binary built");
    c.env("PHASEWISE_KB", "/nonexistent/phasewise-test-kb.sqlite");
    c
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).expect("write fixture");
    p
}

/// A peak table simulated under `program`, with base widths from the width model at PLATES.
fn simulated_run(dir: &Path, name: &str, program: &str, skip: Option<&str>) -> PathBuf {
    let prog = OvenProgram::parse(program).unwrap();
    let mut text =
        String::from("# simulated from invented parameters (invented lab)\nname,rt,wb\n");
    for (n, a, b) in ANALYTES {
        if Some(n) == skip {
            continue;
        }
        let e = programmed_elution(&VantHoffParameters { a, b_k: b }, &prog, TM).unwrap();
        let w = 4.0 * TM * (1.0 + e.retention_factor_at_elution) / PLATES.sqrt();
        text.push_str(&format!("{n},{},{w}\n", e.retention_time_min));
    }
    write(dir, name, &text)
}

fn json_of(out: &[u8]) -> Value {
    serde_json::from_slice(out).unwrap_or_else(|e| {
        panic!("not JSON ({e}):\n{}", String::from_utf8_lossy(out));
    })
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

#[test]
fn gc_scout_recovers_parameters_plates_and_the_known_optimum() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "slow.csv", SLOW, None);
    let r2 = simulated_run(dir.path(), "fast.csv", FAST, None);
    let svg = dir.path().join("ramp.svg");
    let tsv = dir.path().join("ramp.tsv");
    let chrom = dir.path().join("optimum.svg");
    let out = phasewise()
        .arg("scout")
        .args(["--mode", "gc"])
        .arg(&r1)
        .arg(&r2)
        .args([
            "--ovens",
            &format!("{SLOW};{FAST}"),
            "--t0",
            &TM.to_string(),
            "--phase",
            "gc-5-phenyl",
            "--max-temperature",
            "300",
            "--format",
            "json",
        ])
        .arg("--window-svg")
        .arg(&svg)
        .arg("--window-data")
        .arg(&tsv)
        .arg("--chromatogram-svg")
        .arg(&chrom)
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let j = json_of(&out);
    assert_eq!(j["mode"], "gc");
    let fitted = j["fit"]["analytes"].as_array().unwrap();
    assert_eq!(fitted.len(), ANALYTES.len());
    for (x, (name, a, b)) in fitted.iter().zip(ANALYTES) {
        assert_eq!(x["name"], name);
        // CSV keeps full precision: recovery to 1e-3 K in B and 1e-5 in A.
        assert!((f(&x["b_k"]) - b).abs() < 1e-3, "{x}");
        assert!((f(&x["a"]) - a).abs() < 1e-5, "{x}");
        assert!(x["flags"].as_array().unwrap().is_empty(), "{x}");
    }
    // The median apparent plate number of the runs is the simulated one.
    let n = f(&j["optimisation"]["plates_used"]);
    assert!((n - PLATES).abs() < 1e-3 * PLATES, "{n}");
    assert!(j["plates_source"].as_str().unwrap().contains("median"));
    // The optimum equals the one computed from the invented truth itself.
    let truth = GcOptimiseRequest {
        analytes: ANALYTES
            .iter()
            .map(|(n, a, b)| GcNamedAnalyte {
                name: n.to_string(),
                parameters: VantHoffParameters { a: *a, b_k: *b },
                uncertainty: None,
            })
            .collect(),
        holdup_time_min: TM,
        plates: PLATES,
        initial_c: TemperatureRange {
            min: 40.0,
            max: 150.0,
        },
        ramp_c_per_min: TemperatureRange {
            min: 2.0,
            max: 30.0,
        },
        initial_hold_min: 1.0,
        max_temperature_c: 300.0,
        max_run_time_min: 60.0,
        critical_pairs: Vec::new(),
        target_resolution: 1.5,
        min_retention_factor: 1.0,
    };
    let known = optimise_gc(&truth).unwrap();
    let opt = &j["optimisation"]["optimum"];
    assert_eq!(opt["program"], known.optimum.program.as_str());
    assert!((f(&opt["min_resolution"]) - known.optimum.min_resolution).abs() < 1e-3);
    let program = OvenProgram::parse(opt["program"].as_str().unwrap()).unwrap();
    assert!(program.final_c() <= 300.0);
    let pairs = opt["pairs"].as_array().unwrap();
    assert_eq!(pairs.len(), ANALYTES.len() - 1);
    let min_rs = pairs
        .iter()
        .map(|p| f(&p["resolution"]))
        .fold(f64::INFINITY, f64::min);
    assert!((min_rs - f(&opt["min_resolution"])).abs() < 1e-12);
    let svg_text = std::fs::read_to_string(&svg).unwrap();
    assert!(svg_text.contains("<svg") && svg_text.trim_end().ends_with("</svg>"));
    assert!(svg_text.contains("Ramp rate"));
    let tsv_text = std::fs::read_to_string(&tsv).unwrap();
    assert!(tsv_text.contains("ramp_c_per_min\tmin_resolution"));
    assert!(tsv_text.lines().filter(|l| !l.starts_with('#')).count() > 10);
    // The predicted chromatogram names the optimum program and every analyte.
    let chrom_text = std::fs::read_to_string(&chrom).unwrap();
    assert!(chrom_text.contains("<svg") && chrom_text.trim_end().ends_with("</svg>"));
    assert!(
        chrom_text.contains(opt["program"].as_str().unwrap()),
        "program not named"
    );
    for (name, _, _) in ANALYTES {
        assert!(chrom_text.contains(name), "{name} not drawn");
    }
}

#[test]
fn gc_scout_table_names_the_program_the_critical_pair_and_the_hazards() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "slow.csv", SLOW, None);
    let r2 = simulated_run(dir.path(), "fast.csv", FAST, None);
    let out = phasewise()
        .arg("scout")
        .args(["--mode", "gc"])
        .arg(&r1)
        .arg(&r2)
        .args([
            "--ovens",
            &format!("{SLOW};{FAST}"),
            "--column",
            "30x0.25x0.25",
            "--velocity",
            "40",
            "--max-temperature",
            "300",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let text = String::from_utf8_lossy(&out);
    // t_M = 30 m / 40 cm/s = 3000 cm / 40 cm/s = 75 s = 1.250 min.
    assert!(text.contains("t_M = 1.250 min"), "{text}");
    assert!(text.contains("Optimum oven program"), "{text}");
    assert!(text.contains("critical"), "{text}");
    assert!(text.contains("Hydrogen") && text.contains("maximum temperature"));
    assert!(text.contains("open-tube estimate"), "{text}");
}

/// Runs phasewise and returns stderr, asserting exit code 2 and that it names `needle`.
fn usage_error(args: &[&str], needle: &str) -> String {
    let out = phasewise().args(args).assert().code(2).get_output().clone();
    let err = String::from_utf8_lossy(&out.stderr).into_owned();
    assert!(err.contains(needle), "`{needle}` not named in:\n{err}");
    err
}

#[test]
fn gc_scout_bad_inputs_are_errors_naming_the_value() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "slow.csv", SLOW, None);
    let r2 = simulated_run(dir.path(), "fast.csv", FAST, None);
    let short = simulated_run(dir.path(), "short.csv", FAST, Some("s4-c"));
    let same = simulated_run(dir.path(), "same.csv", "40:1,5:280:5", None);
    let (r1, r2, short, same) = (
        r1.to_str().unwrap(),
        r2.to_str().unwrap(),
        short.to_str().unwrap(),
        same.to_str().unwrap(),
    );
    let ovens = format!("{SLOW};{FAST}");
    let base = |a: &str, b: &str, ovens: &str, more: &[&str]| -> Vec<String> {
        let mut v: Vec<String> = [
            "scout", "--mode", "gc", a, b, "--ovens", ovens, "--t0", "1.25",
        ]
        .iter()
        .map(|s| s.to_string())
        .collect();
        v.extend(more.iter().map(|s| s.to_string()));
        v
    };
    let run = |v: Vec<String>, needle: &str| {
        let refs: Vec<&str> = v.iter().map(String::as_str).collect();
        usage_error(&refs, needle)
    };
    let lim = ["--max-temperature", "300"];
    // Two runs with the same program up to the final temperature.
    let e = run(
        base(r1, same, &format!("{SLOW};40:1,5:280:5"), &lim),
        "not identifiable",
    );
    assert!(e.contains("same.csv"), "{e}");
    // A peak missing from one run names the peak and the run.
    let e = run(base(r1, short, &ovens, &lim), "s4-c");
    assert!(e.contains("short.csv"), "{e}");
    // Retention before t_M names the peak and where t_M came from.
    let mut v = base(r1, r2, &ovens, &lim);
    v[8] = "30".into();
    let e = run(v, "--t0");
    assert!(e.contains("s4-a"), "{e}");
    // A program above the phase limit (gc-wax is limited well below 300 °C).
    let e = run(base(r1, r2, &ovens, &["--phase", "gc-wax"]), "300");
    assert!(e.contains("--ovens"), "{e}");
    // An LC phase is refused.
    run(base(r1, r2, &ovens, &["--phase", "rp-c18"]), "rp-c18");
    // No limit at all.
    run(base(r1, r2, &ovens, &[]), "--max-temperature");
    // LC options are refused rather than ignored.
    run(
        base(
            r1,
            r2,
            &ovens,
            &[
                "--max-temperature",
                "300",
                "--gradients",
                "0:5,10:95;0:5,30:95",
            ],
        ),
        "--gradients",
    );
    run(
        base(
            r1,
            r2,
            &ovens,
            &["--max-temperature", "300", "--tg-range", "5,20"],
        ),
        "--tg-range",
    );
    // --store is refused in GC mode (nothing is stored).
    run(
        base(r1, r2, &ovens, &["--max-temperature", "300", "--store"]),
        "--store",
    );
    // Program count unlike run count; a bad oven text names the part.
    run(base(r1, r2, SLOW, &lim), "--ovens");
    let e = run(base(r1, r2, "40:1,5:x:5;40:1,15:300:5", &lim), "`x`");
    assert!(e.contains("--ovens"), "{e}");
    // Ranges outside what an oven does.
    run(
        base(
            r1,
            r2,
            &ovens,
            &["--max-temperature", "300", "--initial-range", "40,400"],
        ),
        "--initial-range",
    );
    run(
        base(
            r1,
            r2,
            &ovens,
            &["--max-temperature", "300", "--ramp-range", "0,20"],
        ),
        "--ramp-range",
    );
    // Nothing elutes within 2 min: the options that widen the search are named.
    let e = run(
        base(
            r1,
            r2,
            &ovens,
            &["--max-temperature", "300", "--max-run-time", "2"],
        ),
        "--max-run-time",
    );
    assert!(e.contains("--ramp-range"), "{e}");
    // A bad GC column names the option.
    let v: Vec<String> = [
        "scout",
        "--mode",
        "gc",
        r1,
        r2,
        "--ovens",
        &ovens,
        "--column",
        "30x0.25",
        "--max-temperature",
        "300",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    run(v, "--column");
    // In LC mode the GC options are refused.
    let e = usage_error(
        &[
            "scout",
            r1,
            r2,
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            "1",
            "--ovens",
            &ovens,
        ],
        "--ovens",
    );
    assert!(e.contains("--mode gc"), "{e}");
}
