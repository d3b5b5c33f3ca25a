//! The measured-run and retention-model commands through the binary: `suitability`, `scout`,
//! `transfer`, `model eval`, `model train`. All peak tables and analytes are invented (an
//! imaginary QC lab's "mix QC-9"; not real compounds). Expected numbers are hand-computed from
//! the textbook equations (SKD 2010 ch. 2 for k, N, Rs; SD 2007 ch. 5 for transfer), with the
//! arithmetic shown beside each check; the scouting test is a self-consistency check (runs
//! simulated with the library's own gradient solution, then fitted through the binary).

use std::path::Path;

use assert_cmd::Command;
use predicates::prelude::*;
use serde_json::Value;

use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};

/// Relative tolerance for hand-computed values that the program should reproduce exactly up to
/// floating-point rounding.
const REL_TOL: f64 = 1e-9;
/// Absolute tolerance on log kw and S recovered from noise-free simulated runs through the CLI
/// (CSV keeps full precision; the fit's own convergence is about 1e-5).
const PARAM_TOL: f64 = 1e-4;

fn phasewise() -> Command {
    let mut c = Command::cargo_bin("phasewise").expect("binary built");
    // keep the knowledge-base location away from the user's home
    c.env("PHASEWISE_KB", "/nonexistent/phasewise-test-kb.sqlite");
    c
}

fn close(actual: f64, expected: f64, what: &str) {
    assert!(
        (actual - expected).abs() <= REL_TOL * expected.abs().max(1.0),
        "{what}: expected {expected}, got {actual}"
    );
}

fn f(v: &Value, what: &str) -> f64 {
    v.as_f64()
        .unwrap_or_else(|| panic!("{what} is not a number: {v}"))
}

fn json_of(out: &[u8]) -> Value {
    serde_json::from_slice(out).unwrap_or_else(|e| {
        panic!(
            "output is not JSON ({e}):\n{}",
            String::from_utf8_lossy(out)
        )
    })
}

fn write(dir: &Path, name: &str, text: &str) -> std::path::PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).expect("write fixture");
    p
}

/// Invented peak table of "mix QC-9" (not real compounds), t0 = 1.00 min, L = 150 mm.
const QC9: &str = "\
# invented demo data: imaginary lab, imaginary mix QC-9
name,rt,w50,w5,f5,area
marker-x,3.00,0.06,0.20,0.09,200
marker-y,4.00,0.08,0.28,0.13,300
marker-z,4.60,0.10,0.40,0.16,500
";

#[test]
fn suitability_reproduces_hand_computed_figures_and_passes() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "qc9.csv", QC9);
    let out = phasewise()
        .args([
            "suitability",
            "--t0",
            "1.0",
            "--length-mm",
            "150",
            "--format",
            "json",
        ])
        .arg(&p)
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let j = json_of(&out);
    assert_eq!(j["schema_version"], 1);
    assert_eq!(j["passed"], true);
    let peaks = j["peaks"].as_array().unwrap();
    // k = (tR − t0)/t0:            x (3.00−1)/1 = 2.0;  y (4.00−1)/1 = 3.0;  z (4.60−1)/1 = 3.6
    // N = 5.54 (tR/w½)²:           x 5.54·(3/0.06)² = 5.54·2500 = 13850
    //                              y 5.54·(4/0.08)² = 13850;  z 5.54·(4.6/0.1)² = 5.54·2116 = 11722.64
    // H = L/N:                     x 150 mm/13850 = 0.0108303 mm = 10.8303 µm
    // USP T = w5/(2 f5):           x 0.20/0.18 = 1.1111;  y 0.28/0.26 = 1.0769;  z 0.40/0.32 = 1.25
    // area % = area/Σarea:         x 200/1000 = 20 %;  y 30 %;  z 50 %
    let expect = [
        ("marker-x", 2.0, 13850.0, 0.20 / 0.18, 20.0),
        ("marker-y", 3.0, 13850.0, 0.28 / 0.26, 30.0),
        ("marker-z", 3.6, 5.54 * 46.0 * 46.0, 0.40 / 0.32, 50.0),
    ];
    assert_eq!(peaks.len(), 3);
    for (p, (name, k, n, t, area)) in peaks.iter().zip(expect) {
        assert_eq!(p["name"], name);
        close(f(&p["retention_factor"], "k"), k, &format!("k of {name}"));
        close(f(&p["plates_half_height"], "N"), n, &format!("N of {name}"));
        close(
            f(&p["plate_height_um"], "H"),
            150.0 * 1000.0 / n,
            &format!("H of {name}"),
        );
        close(f(&p["usp_tailing"], "T"), t, &format!("tailing of {name}"));
        close(
            f(&p["area_pct"], "area"),
            area,
            &format!("area % of {name}"),
        );
    }
    close(
        f(&peaks[0]["plate_height_um"], "H"),
        10.830_324_909_747_3,
        "H of x",
    );
    // α = k2/k1:                   x/y 3/2 = 1.5;  y/z 3.6/3 = 1.2
    // Rs = 1.18 Δt/(w½1 + w½2):    x/y 1.18·1.00/0.14 = 8.428571;  y/z 1.18·0.60/0.18 = 3.933333
    let pairs = j["pairs"].as_array().unwrap();
    assert_eq!(pairs.len(), 2);
    close(f(&pairs[0]["selectivity"], "α"), 1.5, "α x/y");
    close(f(&pairs[0]["resolution"], "Rs"), 1.18 / 0.14, "Rs x/y");
    close(f(&pairs[1]["selectivity"], "α"), 1.2, "α y/z");
    close(
        f(&pairs[1]["resolution"], "Rs"),
        1.18 * 0.6 / 0.18,
        "Rs y/z",
    );
    assert!((f(&pairs[0]["resolution"], "Rs") - 8.428_571).abs() < 1e-6);
    // every check has a stated source for its limit
    for c in j["checks"].as_array().unwrap() {
        assert!(!c["limit_source"].as_str().unwrap().is_empty(), "{c}");
        assert_eq!(c["outcome"], "pass", "{c}");
    }
}

#[test]
fn suitability_table_carries_units_in_headers_and_limit_sources() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "qc9.csv", QC9);
    phasewise()
        .args(["suitability", "--t0", "1.0", "--length-mm", "150"])
        .arg(&p)
        .assert()
        .code(0)
        .stdout(
            predicate::str::contains("tR (min)")
                .and(predicate::str::contains("H (µm)"))
                .and(predicate::str::contains("area (%)"))
                .and(predicate::str::contains("resolution Rs (–)"))
                .and(predicate::str::contains("limit source"))
                .and(predicate::str::contains("pharmacopoeial"))
                .and(predicate::str::contains("8.43"))
                .and(predicate::str::contains("Result: PASS")),
        );
    // issue 16: each limit source is printed once, under the table, and named by number on the
    // rows; the width basis of Rs is in words
    let out = phasewise()
        .args(["suitability", "--t0", "1.0", "--length-mm", "150"])
        .arg(&p)
        .output()
        .unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("half-height widths") && !text.contains("half_height"),
        "{text}"
    );
    let sources = &text[text.find("Limit sources:").expect("sources listed")..];
    assert!(
        sources.contains(" [1] default 1.5: general pharmacopoeial"),
        "{sources}"
    );
    assert_eq!(
        text.matches("general pharmacopoeial chromatography chapters (critical pair)")
            .count(),
        1,
        "{text}"
    );
    assert!(!text.contains("SKD"), "an unexplained abbreviation: {text}");
}

#[test]
fn suitability_csv_has_one_block_per_table() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "qc9.csv", QC9);
    phasewise()
        .args([
            "suitability",
            "--column",
            "150 x 4.6",
            "--flow",
            "1.0",
            "-f",
            "csv",
        ])
        .arg(&p)
        .assert()
        // t0 from the column: Vm ≈ 0.5·L·dc² = 0.5·15 cm·(0.46 cm)² = 1.587 mL → t0 = 1.587 min,
        // so k(marker-x) = (3.00 − 1.587)/1.587 = 0.890 < 1 and the k check fails: exit 1.
        .code(1)
        .stdout(
            predicate::str::contains("# peaks\npeak,tR (min),k (–)")
                .and(predicate::str::contains("# pairs\n"))
                .and(predicate::str::contains("# checks\n"))
                .and(predicate::str::contains("marker-x,3,0.89,"))
                .and(predicate::str::contains("k ≥ limit,marker-x,0.89,1,FAIL")),
        );
}

#[test]
fn a_failing_critical_pair_exits_with_one() {
    // marker-z moved to 4.20 min: Rs(y/z) = 1.18·0.20/(0.08 + 0.10) = 1.311 < 1.5 → fail.
    let dir = tempfile::tempdir().unwrap();
    let p = write(
        dir.path(),
        "qc9-close.csv",
        "# invented demo data\nname,rt,w50\nmarker-x,3.00,0.06\nmarker-y,4.00,0.08\nmarker-z,4.20,0.10\n",
    );
    let out = phasewise()
        .args([
            "suitability",
            "--t0",
            "1.0",
            "--critical",
            "marker-y,marker-z",
            "--format",
            "json",
        ])
        .arg(&p)
        .assert()
        .code(1)
        .get_output()
        .stdout
        .clone();
    let j = json_of(&out);
    assert_eq!(j["passed"], false);
    let rs: Vec<&Value> = j["checks"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|c| c["criterion"] == "min_resolution")
        .collect();
    assert_eq!(rs.len(), 1, "only the critical pair is checked: {rs:?}");
    assert_eq!(rs[0]["outcome"], "fail");
    close(f(&rs[0]["value"], "Rs"), 1.18 * 0.2 / 0.18, "Rs y/z");
}

#[test]
fn a_table_without_a_retention_column_exits_with_two_naming_it() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "no-rt.csv", "name,w50\nmarker-x,0.06\n");
    phasewise()
        .args(["suitability", "--t0", "1.0"])
        .arg(&p)
        .assert()
        .code(2)
        .stderr(
            predicate::str::contains("retention_time").and(predicate::str::contains("no-rt.csv")),
        );
}

#[test]
fn a_zero_width_exits_with_two_naming_line_column_and_value() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(
        dir.path(),
        "zero.csv",
        "name,rt,w50\nmarker-x,3.00,0.06\nmarker-y,4.00,0\n",
    );
    phasewise()
        .args(["suitability", "--t0", "1.0"])
        .arg(&p)
        .assert()
        .code(2)
        .stderr(
            predicate::str::contains("line 3")
                // the library names the quantity the `w50` header maps to
                .and(predicate::str::contains("`width_half`"))
                .and(predicate::str::contains("0 must be greater than zero")),
        );
}

#[test]
fn a_peak_before_the_dead_time_exits_with_two_naming_peak_line_and_time() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(
        dir.path(),
        "early.csv",
        "name,rt,w50\nmarker-x,0.80,0.03\nmarker-y,4.00,0.08\n",
    );
    phasewise()
        .args(["suitability", "--t0", "1.0"])
        .arg(&p)
        .assert()
        .code(2)
        .stderr(
            predicate::str::contains("marker-x")
                .and(predicate::str::contains("line 2"))
                .and(predicate::str::contains("0.8 min")),
        );
}

#[test]
fn a_malformed_or_non_positive_column_is_a_usage_error() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "qc9.csv", QC9);
    phasewise()
        .args(["suitability", "--column", "150x0", "--flow", "1"])
        .arg(&p)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("inner diameter 0 mm"));
    phasewise()
        .args(["suitability", "--column", "150-4.6", "--flow", "1"])
        .arg(&p)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("`150-4.6`"));
}

#[test]
fn suitability_without_a_dead_time_is_a_usage_error() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "qc9.csv", QC9);
    phasewise()
        .arg("suitability")
        .arg(&p)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--t0"));
}

/// Invented analytes of "mix QC-9" with known LSS parameters.
const ANALYTES: [(&str, f64, f64); 4] = [
    ("qc9-a", 2.1, 3.4),
    ("qc9-b", 2.8, 4.1),
    ("qc9-c", 3.4, 4.6),
    ("qc9-d", 4.2, 5.5),
];
/// t0 = 1.5 min given; dwell 1.0 mL at 1.0 mL/min → tD = 1.0 min.
const SYSTEM: GradientSystem = GradientSystem {
    dead_time_min: 1.5,
    dwell_time_min: 1.0,
};

fn simulated_run(dir: &Path, name: &str, program: &str) -> std::path::PathBuf {
    let prog = GradientProgram::parse(program).unwrap();
    let mut text = String::from("# simulated from invented parameters\nname,rt,w50\n");
    for (n, log_kw, s) in ANALYTES {
        let tr = gradient_elution(&LssParameters { log_kw, s }, &prog, &SYSTEM)
            .unwrap()
            .retention_time_min;
        // `{}` prints the shortest text that reads back to the same f64
        text.push_str(&format!("{n},{tr},0.05\n"));
    }
    write(dir, name, &text)
}

#[test]
fn scout_recovers_known_parameters_and_writes_the_window_diagram() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "fast.csv", "0:5,10:95");
    let r2 = simulated_run(dir.path(), "slow.csv", "0:5,30:95");
    let svg = dir.path().join("window.svg");
    let tsv = dir.path().join("window.tsv");
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
            "--tg-range",
            "5,40",
            "--format",
            "json",
        ])
        .arg("--window-svg")
        .arg(&svg)
        .arg("--window-data")
        .arg(&tsv)
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let j = json_of(&out);
    let fitted = j["fit"]["analytes"].as_array().unwrap();
    assert_eq!(fitted.len(), ANALYTES.len());
    for (a, (name, log_kw, s)) in fitted.iter().zip(ANALYTES) {
        assert_eq!(a["name"], name);
        assert!(
            (f(&a["log_kw"], "log kw") - log_kw).abs() < PARAM_TOL,
            "{a}"
        );
        assert!((f(&a["s"], "S") - s).abs() < PARAM_TOL, "{a}");
        assert!(f(&a["rms_residual_min"], "rms") < 1e-4, "{a}");
        assert!(a["flags"].as_array().unwrap().is_empty(), "{a}");
    }
    let opt = &j["optimisation"];
    let tg = f(&opt["gradient_time_min"], "tG");
    assert!(
        (5.0..=40.0).contains(&tg),
        "tG {tg} outside the allowed range"
    );
    let pairs = opt["optimum"]["pairs"].as_array().unwrap();
    assert_eq!(pairs.len(), ANALYTES.len() - 1);
    let min_rs = pairs
        .iter()
        .map(|p| f(&p["resolution"], "Rs"))
        .fold(f64::INFINITY, f64::min);
    close(
        f(&opt["optimum"]["min_resolution"], "min Rs"),
        min_rs,
        "smallest Rs",
    );
    let svg_text = std::fs::read_to_string(&svg).unwrap();
    assert!(svg_text.contains("<svg") && svg_text.trim_end().ends_with("</svg>"));
    let tsv_text = std::fs::read_to_string(&tsv).unwrap();
    assert!(tsv_text.contains("gradient_time_min\tmin_resolution"));
    assert!(tsv_text.lines().filter(|l| !l.starts_with('#')).count() > 2);
    // no temporary files left behind
    let leftovers: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().starts_with('.'))
        .collect();
    assert!(leftovers.is_empty(), "{leftovers:?}");
}

#[test]
fn scout_table_names_the_critical_pair_and_the_program() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "fast.csv", "0:5,10:95");
    let r2 = simulated_run(dir.path(), "slow.csv", "0:5,30:95");
    phasewise()
        .arg("scout")
        .arg(&r1)
        .arg(&r2)
        .args([
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            "1.5",
            "--flow",
            "1",
            "--dwell",
            "1",
        ])
        .assert()
        .code(0)
        .stdout(
            predicate::str::contains("log kw (–)")
                .and(predicate::str::contains("predicted tR (min)"))
                .and(predicate::str::contains("critical"))
                .and(predicate::str::contains("Optimum: initial")),
        );
}

#[test]
fn scout_accepts_retention_time_only_tables_with_lab_headings_and_says_where_widths_come_from() {
    let dir = tempfile::tempdir().unwrap();
    let mut paths = Vec::new();
    for (name, program) in [("fast.csv", "0:5,10:95"), ("slow.csv", "0:5,30:95")] {
        // the simulated table of the test above, re-headed as a data system might export it
        // with no width column at all
        let full = std::fs::read_to_string(simulated_run(dir.path(), name, program)).unwrap();
        let text: String = full
            .lines()
            .map(|l| {
                if l.starts_with('#') {
                    l.to_string()
                } else if l.starts_with("name,") {
                    "Compound,Retention Time (min)".to_string()
                } else {
                    l.rsplit_once(',').map_or(l, |x| x.0).to_string()
                }
            })
            .collect::<Vec<_>>()
            .join("\n");
        paths.push(write(dir.path(), &format!("rt-only-{name}"), &text));
    }
    phasewise()
        .arg("scout")
        .args(&paths)
        .args([
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            "1.5",
            "--flow",
            "1",
            "--dwell",
            "1",
            "--plates",
            "12000",
        ])
        .assert()
        .code(0)
        .stdout(
            predicate::str::contains("Optimum: initial")
                .and(predicate::str::contains("have no width"))
                .and(predicate::str::contains("estimated from this plate number")),
        );
    // suitability still needs widths, and says so
    phasewise()
        .args(["suitability", "--t0", "1.5"])
        .arg(&paths[0])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("no width column"));
}

/// Issue 16: a long scouting run is never silent; each stage prints one line on stderr when the
/// tables hold more than 10,000 analytes, and an ordinary table prints none.
#[test]
fn scout_on_a_very_large_table_reports_progress_line_by_line() {
    let dir = tempfile::tempdir().unwrap();
    let n = 10_001;
    let mut paths = Vec::new();
    for (name, program) in [("big-10.csv", "0:5,10:95"), ("big-30.csv", "0:5,30:95")] {
        let prog = GradientProgram::parse(program).unwrap();
        let mut text =
            String::from("# invented: synthetic stress table, not a measurement\nname,rt\n");
        for i in 0..n {
            // invented parameters as in tools/make_scout_stress.py: log kw 1-4, S = 2 + 0.8 log kw
            // with a spread of ±0.3, so that every analyte elutes within the searched programs
            let x = i as f64 / n as f64;
            let log_kw = 1.0 + 3.0 * x;
            let p = LssParameters {
                log_kw,
                s: 2.0 + 0.8 * log_kw + 0.6 * (((i * 7919) % n) as f64 / n as f64 - 0.5),
            };
            let tr = gradient_elution(&p, &prog, &SYSTEM)
                .unwrap()
                .retention_time_min;
            text.push_str(&format!("x{i},{tr}\n"));
        }
        paths.push(write(dir.path(), name, &text));
    }
    let out = phasewise()
        .arg("scout")
        .args(&paths)
        .args([
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            "1.5",
            "--flow",
            "1",
            "--dwell",
            "1",
        ])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    for stage in [
        "peak tables read",
        "searching gradient programs",
        "writing the report",
    ] {
        assert!(
            err.lines().any(|l| l.starts_with("scout: ")
                && l.contains(stage)
                && l.contains("10001 analytes")),
            "no progress line for `{stage}`: {err}"
        );
    }
    // the small simulated tables of the tests above print no progress
    let small: Vec<_> = [("s-10.csv", "0:5,10:95"), ("s-30.csv", "0:5,30:95")]
        .iter()
        .map(|(n, p)| simulated_run(dir.path(), n, p))
        .collect();
    phasewise()
        .arg("scout")
        .args(&small)
        .args([
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            "1.5",
            "--flow",
            "1",
            "--dwell",
            "1",
        ])
        .assert()
        .stderr(predicate::str::contains("scout: ").not());
}

#[test]
fn two_runs_with_the_same_gradient_are_not_identifiable() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "run1.csv", "0:5,20:95");
    let r2 = simulated_run(dir.path(), "run2.csv", "0:5,20:95");
    phasewise()
        .arg("scout")
        .arg(&r1)
        .arg(&r2)
        .args(["--gradients", "0:5,20:95;0:5,20:95", "--t0", "1.5"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("not identifiable"));
}

#[test]
fn scout_refuses_an_unwritable_window_file_before_any_work() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "fast.csv", "0:5,10:95");
    let missing_dir = dir.path().join("no-such-dir").join("w.svg");
    phasewise()
        .arg("scout")
        .arg(&r1)
        .arg(dir.path().join("never-read.csv"))
        .args(["--gradients", "0:5,10:95;0:5,30:95", "--t0", "1.5"])
        .arg("--window-svg")
        .arg(&missing_dir)
        .assert()
        .code(2)
        .stderr(
            predicate::str::contains("does not exist").and(predicate::str::contains("no-such-dir")),
        );
}

#[test]
fn scout_with_a_program_count_unlike_the_run_count_is_a_usage_error() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "fast.csv", "0:5,10:95");
    let r2 = simulated_run(dir.path(), "slow.csv", "0:5,30:95");
    phasewise()
        .arg("scout")
        .arg(&r1)
        .arg(&r2)
        .args(["--gradients", "0:5,10:95", "--t0", "1.5"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("1 gradient program(s)"));
}

#[test]
fn transfer_to_a_narrow_short_column_matches_hand_computed_scaling() {
    let out = phasewise()
        .args([
            "transfer",
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
            "--dwell-from",
            "2.0",
            "--dwell-to",
            "0.2",
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
    let j = json_of(&out);
    // Same linear velocity (--constant-velocity): F2 = 1.0·(2.1/4.6)² = 0.2084121 mL/min.
    let f2 = (2.1f64 / 4.6).powi(2);
    close(f(&j["flow_ml_min"], "F2"), f2, "flow");
    assert!((f2 - 0.208_412).abs() < 1e-6);
    // Vm2/Vm1 = (100·2.1²)/(150·4.6²) = 441/3174 = 0.1389414;
    // time factor (Vm2/Vm1)(F1/F2) = 0.1389414/0.2084121 = 0.6667 (= L2/L1 at equal velocity).
    let vm_ratio = 441.0 / 3174.0;
    close(
        f(&j["time_scale_factor"], "factor"),
        vm_ratio / f2,
        "time factor",
    );
    close(vm_ratio / f2, 100.0 / 150.0, "time factor is L2/L1");
    // Injection 10 µL · 0.1389414 = 1.389 µL.
    close(
        f(&j["injection_volume_ul"], "Vinj"),
        10.0 * vm_ratio,
        "injection",
    );
    // Dwell: wanted VD1·Vm2/Vm1 = 2.0·0.1389414 = 0.2778828 mL; target has 0.2 mL →
    // hold (0.2778828 − 0.2)/0.2084121 = 0.373693 min.
    let hold = (2.0 * vm_ratio - 0.2) / f2;
    close(f(&j["dwell_hold_min"], "hold"), hold, "dwell hold");
    assert!((hold - 0.373_693).abs() < 1e-5);
    // N2/N1 = (100/150)(5/1.8) = 1.851852.
    close(
        f(&j["plate_number_ratio"], "N ratio"),
        (100.0 / 150.0) * (5.0 / 1.8),
        "N ratio",
    );
    // ΔP2/ΔP1 = (F2/F1)(L2/L1)(dc1/dc2)²(dp1/dp2)² = 1 · 0.6667 · (5/1.8)² = 5.144033.
    close(
        f(&j["pressure_ratio"], "P ratio"),
        f2 * (100.0 / 150.0) * (4.6f64 / 2.1).powi(2) * (5.0f64 / 1.8).powi(2),
        "pressure ratio",
    );
    assert!((f(&j["pressure_ratio"], "P") - 5.144_033).abs() < 1e-5);
    // Run time: 20 min · 0.6667 + hold = 13.3333 + 0.3737 = 13.7070 min.
    close(
        f(&j["run_time_target_min"], "run time"),
        20.0 * 100.0 / 150.0 + hold,
        "run time",
    );
    assert!(
        j["regulatory_note"]
            .as_str()
            .unwrap()
            .contains("applicable chapter")
    );
}

#[test]
fn transfer_scales_flow_by_the_pharmacopoeial_formula_by_default() {
    let out = phasewise()
        .args([
            "transfer",
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
            "--format",
            "json",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let j = json_of(&out);
    // F2 = 1.0·(2.1/4.6)²·(5/1.8) = 0.2084121·2.7778 = 0.578923 mL/min;
    // time factor = 0.1389414/0.578923 = 0.24 = (L2/L1)(dp2/dp1) = 0.6667·0.36.
    let f2 = (2.1f64 / 4.6).powi(2) * 5.0 / 1.8;
    close(f(&j["flow_ml_min"], "F2"), f2, "flow");
    close(f(&j["time_scale_factor"], "factor"), 0.24, "time factor");
    assert_eq!(j["scaling"], "pharmacopoeial");
    // the old opt-in flag is still accepted and gives the same answer
    phasewise()
        .args([
            "transfer",
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
            "--scale-flow-for-particle",
        ])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("0.579"));
}

#[test]
fn transfer_of_the_issue_example_gives_the_pharmacopoeial_flow_and_gradient_time() {
    // issue 16: 150x4.6 mm, 5 µm -> 100x2.1 mm, 1.7 µm at 1.0 mL/min, 0:5,20:95:
    // F2 = 1.0 (2.1² · 5)/(4.6² · 1.7) = 0.613 mL/min, ramp 20 · (100 · 1.7)/(150 · 5) = 4.53 min
    // (harmonised pharmacopoeial chapters, from memory); L/dp +96 %: outside the allowed range.
    phasewise()
        .args([
            "transfer",
            "--from",
            "150x4.6",
            "--from-particle",
            "5",
            "--to",
            "100x2.1",
            "--to-particle",
            "1.7",
            "--flow",
            "1.0",
            "--gradient",
            "0:5,20:95",
        ])
        .assert()
        .code(0)
        .stdout(
            predicate::str::contains("0.613")
                .and(predicate::str::contains("4.53"))
                .and(predicate::str::contains("outside the allowed adjustment"))
                .and(predicate::str::contains("Allowed-adjustment checks")),
        );
}

#[test]
fn transfer_table_shows_the_regulatory_note_and_the_program() {
    phasewise()
        .args([
            "transfer",
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
        ])
        .assert()
        .code(0)
        .stdout(
            predicate::str::contains("flow (mL/min)")
                .and(predicate::str::contains("0.579"))
                .and(predicate::str::contains("4.80"))
                .and(predicate::str::contains("pharmacopoeial")),
        );
}

#[test]
fn transfer_with_only_one_dwell_volume_is_a_usage_error() {
    phasewise()
        .args([
            "transfer",
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
            "--dwell-from",
            "1.0",
        ])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--dwell-to"));
}

const SYSTEMS: &str = "tests/data/systems_subset.tsv";
const RETENTION: &str = "tests/data/retention_subset.tsv";

#[test]
fn model_eval_on_the_subset_reports_spearman_medians() {
    let out = phasewise()
        .args([
            "model",
            "eval",
            "--systems",
            SYSTEMS,
            "--retention",
            RETENTION,
            "--folds",
            "3",
            "--format",
            "json",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let j = json_of(&out);
    assert_eq!(j["folds"], 3);
    assert_eq!(j["seed"], 42);
    let summary = j["summary"].as_object().unwrap();
    let spearman: Vec<(&String, f64)> = summary
        .iter()
        .filter(|(k, _)| k.ends_with("/spearman"))
        .map(|(k, v)| (k, f(&v["median"], k)))
        .collect();
    assert!(
        spearman.iter().any(|(k, _)| k.contains("/baseline/")),
        "no baseline: {spearman:?}"
    );
    assert!(
        spearman.iter().any(|(k, _)| k.contains("/descriptor/")),
        "no model: {spearman:?}"
    );
    for (k, m) in &spearman {
        assert!((-1.0..=1.0).contains(m), "{k}: median {m}");
    }
}

#[test]
fn model_eval_without_tables_names_the_missing_flag() {
    let dir = tempfile::tempdir().unwrap();
    phasewise()
        .current_dir(dir.path())
        .args(["model", "eval"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--systems"));
}

#[test]
fn model_train_twice_on_the_subset_writes_identical_bytes() {
    let dir = tempfile::tempdir().unwrap();
    let mut outputs = Vec::new();
    for i in 0..2 {
        let model = dir.path().join(format!("model-{i}.json.gz"));
        let memory = dir.path().join(format!("memory-{i}.tsv.gz"));
        phasewise()
            .args([
                "model",
                "train",
                "--systems",
                SYSTEMS,
                "--retention",
                RETENTION,
            ])
            .arg("--output")
            .arg(&model)
            .arg("--memory-output")
            .arg(&memory)
            .assert()
            .code(0)
            .stderr(predicate::str::contains("wrote"));
        outputs.push((
            std::fs::read(&model).unwrap(),
            std::fs::read(&memory).unwrap(),
        ));
    }
    assert!(!outputs[0].0.is_empty() && !outputs[0].1.is_empty());
    assert!(
        outputs[0].0 == outputs[1].0,
        "model files differ between runs"
    );
    assert!(
        outputs[0].1 == outputs[1].1,
        "memory files differ between runs"
    );
}

/// Runs phasewise with `args` and returns stderr, asserting exit code 2 and that the message
/// names `needle` (an option or file) and no internal field name (`_ml_min`, `_pct`, ...).
fn usage_error(args: &[&str], needle: &str) -> String {
    let out = phasewise().args(args).assert().code(2).get_output().clone();
    let err = String::from_utf8_lossy(&out.stderr).into_owned();
    assert!(err.contains(needle), "`{needle}` not named in:\n{err}");
    for internal in [
        "_ml_min",
        "_pct",
        "_min`",
        "_time_",
        "flow_ml",
        "composition_step",
    ] {
        assert!(
            !err.contains(internal),
            "internal name `{internal}` in:\n{err}"
        );
    }
    err
}

#[test]
fn scout_errors_name_the_option_not_the_field() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "fast.csv", "0:5,10:95");
    let r2 = simulated_run(dir.path(), "slow.csv", "0:5,30:95");
    let (r1, r2) = (r1.to_str().unwrap(), r2.to_str().unwrap());
    let base = [
        "scout",
        r1,
        r2,
        "--gradients",
        "0:5,10:95;0:5,30:95",
        "--t0",
        "1.5",
    ];
    let with = |extra: &[&'static str]| -> Vec<&str> {
        base.iter().copied().chain(extra.iter().copied()).collect()
    };
    // A dwell volume without a flow (the library's field is `flow_ml_min`).
    let e = usage_error(&with(&["--dwell", "0.8"]), "--dwell");
    assert!(e.contains("--flow"), "{e}");
    usage_error(&with(&["--flow", "-1", "--dwell", "1"]), "--flow");
    usage_error(
        &with(&["--flow", "1", "--max-run-time", "0"]),
        "--max-run-time",
    );
    usage_error(&with(&["--start-range", "5,120"]), "--start-range");
    usage_error(&with(&["--tg-range", "-5,10"]), "--tg-range");
    usage_error(&with(&["--end-range", "1,4"]), "--end-range");
    usage_error(&with(&["--min-k", "-1"]), "--min-k");
    usage_error(&with(&["--target-resolution", "x"]), "--target-resolution");
    let e = usage_error(&with(&["--critical", "qc9-a,nope"]), "--critical");
    assert!(e.contains("nope"), "{e}");
    // Nothing elutes within one minute: the options that widen the search are named.
    let e = usage_error(&with(&["--max-run-time", "1"]), "--max-run-time");
    assert!(e.contains("--end-range") && e.contains("--tg-range"), "{e}");
    // One peak only: the run files are named.
    let one =
        |name: &str, rt: &str| write(dir.path(), name, &format!("name,rt,w50\nqc9-a,{rt},0.05\n"));
    let (o1, o2) = (one("one-a.csv", "6.1"), one("one-b.csv", "14.2"));
    usage_error(
        &[
            "scout",
            o1.to_str().unwrap(),
            o2.to_str().unwrap(),
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            "1.5",
        ],
        "one-b.csv",
    );
    // A peak before t0 names the run file, the peak and where t0 came from.
    let first_rt: f64 = std::fs::read_to_string(r1)
        .unwrap()
        .lines()
        .nth(2)
        .and_then(|l| l.split(',').nth(1))
        .and_then(|v| v.parse().ok())
        .unwrap();
    let late_t0 = format!("{}", first_rt + 0.1);
    let e = usage_error(
        &[
            "scout",
            r1,
            r2,
            "--gradients",
            "0:5,10:95;0:5,30:95",
            "--t0",
            &late_t0,
        ],
        "--t0",
    );
    assert!(e.contains("fast.csv") && e.contains("qc9-a"), "{e}");
}

#[test]
fn suitability_errors_name_the_option_or_the_file() {
    let dir = tempfile::tempdir().unwrap();
    let table = write(dir.path(), "qc9.csv", QC9);
    let t = table.to_str().unwrap();
    let e = usage_error(
        &["suitability", t, "--t0", "1", "--critical", "marker-x,nope"],
        "--critical",
    );
    assert!(e.contains("nope"), "{e}");
    usage_error(
        &["suitability", t, "--t0", "1", "--exclude", "nope"],
        "--exclude",
    );
    usage_error(
        &["suitability", t, "--t0", "1", "--max-tailing", "0"],
        "--max-tailing",
    );
    usage_error(
        &["suitability", t, "--t0", "1", "--k-range", "-1,10"],
        "--k-range",
    );
    usage_error(&["suitability", t, "--t0", "-1"], "--t0");
    usage_error(
        &["suitability", t, "--t0", "1", "--length-mm", "0"],
        "--length-mm",
    );
    let e = usage_error(&["suitability", t, "--t0", "3.5"], "qc9.csv");
    assert!(e.contains("--t0") && e.contains("marker-x"), "{e}");
    // A bad cell names the file, the line and the column.
    let bad = write(dir.path(), "bad.csv", "name,rt,w50\nx,3.0,abc\n");
    let e = usage_error(
        &["suitability", bad.to_str().unwrap(), "--t0", "1"],
        "bad.csv",
    );
    assert!(e.contains("line 2") && e.contains("w50"), "{e}");
}

#[test]
fn transfer_errors_name_the_option() {
    let base = [
        "transfer",
        "--from",
        "150x4.6",
        "--from-particle",
        "5",
        "--flow",
        "1.0",
        "--gradient",
        "0:5,20:95",
    ];
    let with = |extra: &[&'static str]| -> Vec<&str> {
        base.iter().copied().chain(extra.iter().copied()).collect()
    };
    let to = ["--to", "100x2.1", "--to-particle", "1.8"];
    let ok = |extra: &[&'static str]| -> Vec<&str> {
        with(&to).into_iter().chain(extra.iter().copied()).collect()
    };
    usage_error(
        &with(&["--to", "100x2.1", "--to-particle", "-1.8"]),
        "--to-particle",
    );
    usage_error(&ok(&["--run-time", "5"]), "--run-time");
    usage_error(&ok(&["--injection", "0"]), "--injection");
    usage_error(
        &ok(&["--dwell-from", "-1", "--dwell-to", "0.2"]),
        "--dwell-from",
    );
    usage_error(&with(&["--to", "100x0", "--to-particle", "1.8"]), "--to");
}

/// Value of attribute `name` in one element's text (the renderer writes `name="value"`).
fn attr<'a>(element: &'a str, name: &str) -> Option<&'a str> {
    let key = format!(" {name}=\"");
    let start = element.find(&key)? + key.len();
    let len = element[start..].find('"')?;
    Some(&element[start..start + len])
}

/// Every `<path ...>` element with `class="peak"`.
fn peak_paths(svg: &str) -> Vec<&str> {
    let mut out = Vec::new();
    let mut rest = svg;
    while let Some(i) = rest.find("<path ") {
        let tail = &rest[i..];
        let end = tail.find('>').map_or(tail.len(), |e| e + 1);
        if attr(&tail[..end], "class") == Some("peak") {
            out.push(&tail[..end]);
        }
        rest = &tail[end..];
    }
    out
}

#[test]
fn scout_writes_the_predicted_chromatogram_with_each_apex_at_its_predicted_time() {
    let dir = tempfile::tempdir().unwrap();
    let r1 = simulated_run(dir.path(), "fast.csv", "0:5,10:95");
    let r2 = simulated_run(dir.path(), "slow.csv", "0:5,30:95");
    let svg_path = dir.path().join("chromatogram.svg");
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
        .arg("--chromatogram-svg")
        .arg(&svg_path)
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let j = json_of(&out);
    let svg = std::fs::read_to_string(&svg_path).unwrap();
    assert!(svg.starts_with("<svg") && svg.trim_end().ends_with("</svg>"));
    let program = j["optimisation"]["optimum"]["program"].as_str().unwrap();
    assert!(
        svg.contains(program),
        "the subtitle names the program {program}"
    );
    let root = &svg[..svg.find('>').unwrap()];
    let x0: f64 = attr(root, "data-x-origin-px").unwrap().parse().unwrap();
    let ppm: f64 = attr(root, "data-px-per-min").unwrap().parse().unwrap();
    let paths = peak_paths(&svg);
    let peaks = j["optimisation"]["optimum"]["peaks"].as_array().unwrap();
    assert_eq!(paths.len(), peaks.len());
    for p in peaks {
        let name = p["name"].as_str().unwrap();
        let tr = f(&p["retention_time_min"], "tR");
        let path = paths
            .iter()
            .find(|e| attr(e, "data-analyte") == Some(name))
            .unwrap_or_else(|| panic!("no peak for {name}"));
        let nums: Vec<f64> = attr(path, "d")
            .unwrap()
            .split_whitespace()
            .filter(|t| !matches!(*t, "M" | "L" | "Z"))
            .map(|t| t.parse().unwrap())
            .collect();
        // SVG y grows downwards: the apex is the smallest y.
        let apex = nums
            .chunks(2)
            .map(|c| (c[0], c[1]))
            .reduce(|a, b| if b.1 < a.1 { b } else { a })
            .unwrap();
        let apex_min = (apex.0 - x0) / ppm;
        assert!(
            (apex_min - tr).abs() <= 1.0 / ppm,
            "{name}: apex at {apex_min} min, predicted {tr} min"
        );
    }
}
