//! `scout --temperatures` through the binary: two gradients at each of two column temperatures,
//! log kw and S taken linear in 1/T, temperature searched with the gradient. Self-consistency
//! only: the runs are simulated from invented lines (an imaginary lab's mix "T-5"; not real
//! compounds) with the library's own gradient equation.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};

/// Invented lines (name, a, b K, c, d K): log kw = a + b/T, S = c + d/T.
const TRUTH: [(&str, f64, f64, f64, f64); 4] = [
    ("t5-a", -1.0, 1000.0, 2.0, 400.0),
    ("t5-b", -2.0, 1500.0, 2.5, 500.0),
    ("t5-c", -0.2, 1050.0, 3.0, 500.0),
    ("t5-d", -1.5, 1800.0, 3.0, 700.0),
];

fn phasewise() -> Command {
    let mut c = Command::cargo_bin("phasewise").expect("binary built");
    c.env("PHASEWISE_KB", "/nonexistent/phasewise-test-kb.sqlite");
    c
}

fn run_file(dir: &Path, t_c: f64, program: &str) -> PathBuf {
    let prog = GradientProgram::parse(program).unwrap();
    let sys = GradientSystem {
        dead_time_min: 1.0,
        dwell_time_min: 0.0,
    };
    let inv = 1.0 / (t_c + 273.15);
    let mut text = String::from("# simulated from invented parameters\nname,rt,w50\n");
    for (n, a, b, c, d) in TRUTH {
        let p = LssParameters {
            log_kw: a + b * inv,
            s: c + d * inv,
        };
        let tr = gradient_elution(&p, &prog, &sys)
            .unwrap()
            .retention_time_min;
        text.push_str(&format!("{n},{tr},0.05\n"));
    }
    let tg = program
        .rsplit(',')
        .next()
        .and_then(|p| p.split(':').next())
        .unwrap_or("x");
    let path = dir.join(format!("t{t_c}-tg{tg}.csv"));
    std::fs::write(&path, text).unwrap();
    path
}

fn runs(dir: &Path) -> Vec<PathBuf> {
    vec![
        run_file(dir, 30.0, "0:5,10:95"),
        run_file(dir, 30.0, "0:5,30:95"),
        run_file(dir, 60.0, "0:5,10:95"),
        run_file(dir, 60.0, "0:5,30:95"),
    ]
}

#[test]
fn two_temperatures_give_the_lines_and_an_interior_optimum() {
    let dir = tempfile::tempdir().unwrap();
    let out = phasewise()
        .arg("scout")
        .args(runs(dir.path()))
        .args([
            "--gradients",
            "0:5,10:95;0:5,30:95;0:5,10:95;0:5,30:95",
            "--temperatures",
            "30;30;60;60",
            "--t0",
            "1.0",
            "--tg-range",
            "5,40",
            "--start-range",
            "5,30",
            "--max-run-time",
            "45",
            "--target-resolution",
            "2.3",
            "--format",
            "json",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let v: Value = serde_json::from_slice(&out).unwrap();
    let t = &v["temperature"];
    let model = t["model"]["analytes"].as_array().unwrap();
    for (m, (name, _, b, _, d)) in model.iter().zip(TRUTH) {
        assert_eq!(m["name"], name);
        assert!(
            (m["log_kw_slope_k"].as_f64().unwrap() - b).abs() < 0.5,
            "{m}"
        );
        assert!((m["s_slope_k"].as_f64().unwrap() - d).abs() < 0.5, "{m}");
    }
    // 30–60 °C in 5 °C steps; the target Rs 2.3 is reached only inside the range (the same
    // invented lines give 50 °C in the library's unit test).
    assert_eq!(t["points"].as_array().unwrap().len(), 7);
    assert_eq!(t["chosen_c"].as_f64().unwrap(), 50.0, "{t}");
    assert_eq!(t["extrapolated"], false);
    assert_eq!(t["fits"].as_array().unwrap().len(), 2);
    assert_eq!(v["optimisation"]["meets_target"], true);
}

#[test]
fn temperature_errors_name_the_option() {
    let dir = tempfile::tempdir().unwrap();
    let r = runs(dir.path());
    let base = |temps: &str, extra: &[&str]| {
        let out = phasewise()
            .arg("scout")
            .args(&r)
            .args([
                "--gradients",
                "0:5,10:95;0:5,30:95;0:5,10:95;0:5,30:95",
                "--temperatures",
                temps,
                "--t0",
                "1.0",
            ])
            .args(extra)
            .assert()
            .code(2)
            .get_output()
            .stderr
            .clone();
        String::from_utf8_lossy(&out).into_owned()
    };
    let e = base("30;30;60", &[]);
    assert!(
        e.contains("--temperatures") && e.contains("4 run files"),
        "{e}"
    );
    let e = base("30;30;x;60", &[]);
    assert!(e.contains("`x`"), "{e}");
    // One temperature only: the runs at 30 °C are fine, but temperature is not identifiable.
    let e = base("30;30;30;30", &[]);
    assert!(e.contains("not identifiable"), "{e}");
    // One run alone at a temperature cannot be fitted.
    let e = base("30;30;60;70", &[]);
    assert!(e.contains("60 °C") && e.contains("2 scouting runs"), "{e}");
    let e = base("30;30;60;60", &["--temperature-range", "30,400"]);
    assert!(
        e.contains("--temperature-range") && e.contains("400"),
        "{e}"
    );
}

#[test]
fn the_table_shows_the_fits_per_temperature_the_lines_and_the_search() {
    let dir = tempfile::tempdir().unwrap();
    let out = phasewise()
        .arg("scout")
        .args(runs(dir.path()))
        .args([
            "--gradients",
            "0:5,10:95;0:5,30:95;0:5,10:95;0:5,30:95",
            "--temperatures",
            "30;30;60;60",
            "--t0",
            "1.0",
            "--target-resolution",
            "2.3",
        ])
        .assert()
        .code(0)
        .get_output()
        .stdout
        .clone();
    let text = String::from_utf8_lossy(&out);
    assert!(
        text.contains("At 30 °C:") && text.contains("At 60 °C:"),
        "{text}"
    );
    assert!(text.contains("log kw = a + b/T"), "{text}");
    assert!(text.contains("Best gradient at each temperature"), "{text}");
    assert!(text.contains("column temperature 50 °C chosen"), "{text}");
}
