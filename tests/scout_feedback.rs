//! Feeding measured retention back: `scout --store` keeps the fitted log kw and S in the user
//! overlay, and `predict` and `advise` then use them (directly on the same system, path
//! `scouting fit`; as a retention-memory source elsewhere). Self-consistency only: the runs are
//! simulated from invented LSS parameters with the library's own gradient equation (no
//! published worked example is reproduced).

mod common;

use common::{Ctx, stderr, stdout};
use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};

/// Invented LSS parameters for two shipped compounds (not measured values).
const TRUTH: &[(&str, f64, f64)] = &[("caffeine", 1.9, 3.6), ("acetaminophen", 1.5, 3.1)];
const T0_MIN: f64 = 1.0;
const SCOUT_PROGRAMS: [&str; 2] = ["0:5,10:95", "0:5,30:95"];
const SOURCE: &str = "Harbourside lab notebook 12 p. 4 (invented)";

fn truth_rt(log_kw: f64, s: f64, program: &str) -> f64 {
    let p = GradientProgram::parse(program).unwrap();
    let sys = GradientSystem {
        dead_time_min: T0_MIN,
        dwell_time_min: 0.0,
    };
    gradient_elution(&LssParameters { log_kw, s }, &p, &sys)
        .unwrap()
        .retention_time_min
}

/// Peak tables of the simulated runs, written into the test directory; `extra` adds a peak.
fn write_runs(ctx: &Ctx, extra: Option<&str>) -> Vec<String> {
    write_runs_with(ctx, extra, (2.6, 4.2))
}

fn write_runs_with(ctx: &Ctx, extra: Option<&str>, extra_lss: (f64, f64)) -> Vec<String> {
    SCOUT_PROGRAMS
        .iter()
        .enumerate()
        .map(|(i, prog)| {
            let mut text = String::from("# simulated from invented parameters\nname,rt,w50\n");
            for (name, lk, s) in TRUTH {
                text.push_str(&format!("{name},{:.5},0.05\n", truth_rt(*lk, *s, prog)));
            }
            if let Some(n) = extra {
                text.push_str(&format!(
                    "{n},{:.5},0.05\n",
                    truth_rt(extra_lss.0, extra_lss.1, prog)
                ));
            }
            let p = ctx.path(&format!("run{}.csv", i + 1));
            std::fs::write(&p, text).unwrap();
            p.to_string_lossy().into_owned()
        })
        .collect()
}

fn scout_args<'a>(runs: &'a [String], more: &[&'a str]) -> Vec<&'a str> {
    let mut a = vec!["scout"];
    a.extend(runs.iter().map(String::as_str));
    a.extend(["--gradients", "0:5,10:95;0:5,30:95", "--t0", "1.0"]);
    a.extend(more);
    a
}

/// Rows in the overlay's retention_fit table (0 when the overlay does not exist).
fn stored_rows(ctx: &Ctx) -> i64 {
    let p = ctx.user_kb();
    if !p.exists() {
        return 0;
    }
    let c = rusqlite::Connection::open(&p).unwrap();
    c.query_row("SELECT count(*) FROM retention_fit", [], |r| r.get(0))
        .unwrap_or(0)
}

fn store(ctx: &Ctx, runs: &[String], ph: &str) {
    let out = ctx.run(&scout_args(
        runs,
        &[
            "--store",
            "--phase",
            "rp-c18",
            "--modifier",
            "acetonitrile",
            "--ph",
            ph,
            "--source",
            SOURCE,
        ],
    ));
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("stored 2 retention fits"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn stored_fits_predict_a_third_gradient_on_the_same_system() {
    let ctx = Ctx::new();
    let runs = write_runs(&ctx, None);
    store(&ctx, &runs, "3.0");
    assert_eq!(stored_rows(&ctx), 2);
    let third = "0:5,20:95,25:95";
    let (v, code) = ctx.json(&[
        "predict",
        "caffeine",
        "acetaminophen",
        "--mode",
        "rp",
        "--phase",
        "rp-c18",
        "--gradient",
        third,
        "--t0",
        "1.0",
        "--modifier",
        "acetonitrile",
        "--ph",
        "3.1",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{v}");
    let preds = v["predictions"].as_array().unwrap();
    assert_eq!(preds.len(), 2, "{v}");
    for (name, lk, s) in TRUTH {
        let p = preds.iter().find(|p| p["analyte"] == *name).unwrap();
        assert_eq!(p["path"], "scouting fit", "{p}");
        assert_eq!(p["path_source"], SOURCE, "{p}");
        let rt = p["retention_time_min"].as_f64().unwrap();
        let want = truth_rt(*lk, *s, third);
        // noise-free runs: the fit recovers the parameters, so only rounding of the peak
        // tables (5 decimals) separates prediction and truth
        assert!((rt - want).abs() < 0.005, "{name}: {rt} vs {want}");
        let (lo, hi) = (
            p["interval_low_min"].as_f64().unwrap(),
            p["interval_high_min"].as_f64().unwrap(),
        );
        assert!(lo < want && want < hi, "{name}: {lo}-{hi} vs {want}");
        // at least the assumed 0.01 min run repeatability either side, but tight
        assert!(hi - lo > 0.03 && hi - lo < 0.5, "{name}: {lo}-{hi}");
    }
    // the table says which path and source
    let out = ctx.run(&[
        "predict",
        "caffeine",
        "--mode",
        "rp",
        "--phase",
        "rp-c18",
        "--gradient",
        third,
        "--t0",
        "1.0",
        "--modifier",
        "acetonitrile",
        "--ph",
        "3.0",
    ]);
    assert!(stdout(&out).contains("scouting fit"), "{}", stdout(&out));
}

#[test]
fn another_system_uses_the_stored_fit_as_a_memory_source_not_directly() {
    let ctx = Ctx::new();
    let runs = write_runs(&ctx, None);
    store(&ctx, &runs, "3.0");
    let args = |ph: &'static str| {
        [
            "predict",
            "acetaminophen",
            "--mode",
            "rp",
            "--phase",
            "rp-c18",
            "--gradient",
            "0:5,20:95",
            "--t0",
            "1.0",
            "--modifier",
            "acetonitrile",
            "--ph",
            ph,
            "--format",
            "json",
        ]
    };
    // pH 6 differs by more than 0.2 from the runs' pH 3: not the same system
    let (v, code) = ctx.json(&args("6.0"));
    assert_eq!(code, 0, "{v}");
    let p = &v["predictions"][0];
    assert_ne!(p["path"], "scouting fit", "{p}");
    assert_eq!(p["path"], "memory", "{p}");
    assert!(
        p["path_source"]
            .as_str()
            .is_some_and(|s| s.starts_with("user: ") && s.contains(SOURCE)),
        "{p}"
    );
    // without the stored fit the prediction differs (the user source moved it)
    let fresh = Ctx::new();
    let (w, _) = fresh.json(&args("6.0"));
    let q = &w["predictions"][0];
    assert!(q["path_source"].is_null(), "{q}");
    assert_ne!(p["retention_time_min"], q["retention_time_min"]);
}

#[test]
fn advise_shows_the_scouting_fit_path() {
    let ctx = Ctx::new();
    let phases = ctx.path("phases.txt");
    std::fs::write(&phases, "rp-c18\n").unwrap();
    let advise = |ctx: &Ctx| {
        ctx.json(&[
            "advise",
            "caffeine",
            "acetaminophen",
            "--modes",
            "rp",
            "--phases-available",
            phases.to_str().unwrap(),
            "--format",
            "json",
        ])
    };
    // the advisor's own choice of pH and modifier for this panel, then runs stored at them
    let (v, code) = advise(&ctx);
    assert_eq!(code, 0, "{v}");
    let rec = &v["recommendations"][0];
    assert_eq!(rec["phase"]["id"], "rp-c18", "{rec}");
    let ph = rec["conditions"]["ph"].as_f64().unwrap();
    let modifier = rec["conditions"]["modifier"].as_str().unwrap().to_string();
    let runs = write_runs(&ctx, None);
    let ph_text = format!("{ph}");
    let out = ctx.run(&scout_args(
        &runs,
        &[
            "--store",
            "--phase",
            "rp-c18",
            "--modifier",
            &modifier,
            "--ph",
            &ph_text,
            "--source",
            SOURCE,
        ],
    ));
    assert!(out.status.success(), "{}", stderr(&out));
    let (v, code) = advise(&ctx);
    assert_eq!(code, 0, "{v}");
    let preds = v["recommendations"][0]["predictions"].as_array().unwrap();
    assert!(
        preds
            .iter()
            .all(|p| p["path"] == "scouting fit" && p["path_source"] == SOURCE),
        "{preds:?}"
    );
}

#[test]
fn an_unknown_analyte_stores_nothing_and_is_named() {
    let ctx = Ctx::new();
    let runs = write_runs(&ctx, Some("impurity ZZ-9 (invented)"));
    let out = ctx.run(&scout_args(
        &runs,
        &[
            "--store",
            "--phase",
            "rp-c18",
            "--modifier",
            "acetonitrile",
            "--ph",
            "3",
            "--source",
            SOURCE,
        ],
    ));
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    let e = stderr(&out);
    assert!(
        e.contains("impurity ZZ-9 (invented)") && e.contains("nothing stored"),
        "{e}"
    );
    assert_eq!(stored_rows(&ctx), 0);
}

#[test]
fn an_incomplete_or_invalid_system_description_stores_nothing() {
    let ctx = Ctx::new();
    let runs = write_runs(&ctx, None);
    for (more, want) in [
        (
            vec![
                "--store",
                "--phase",
                "rp-c18",
                "--modifier",
                "acetonitrile",
                "--ph",
                "3",
            ],
            "--source",
        ),
        (
            vec![
                "--store", "--phase", "rp-c18", "--ph", "3", "--source", SOURCE,
            ],
            "--modifier",
        ),
        (
            vec![
                "--store",
                "--phase",
                "rp-c18",
                "--modifier",
                "acetonitrile",
                "--ph",
                "9.5",
                "--source",
                SOURCE,
            ],
            "--ph 9.5 is outside the range 2-8",
        ),
        (
            vec![
                "--store",
                "--phase",
                "rp-c18",
                "--modifier",
                "propanol",
                "--ph",
                "3",
                "--source",
                SOURCE,
            ],
            "--modifier `propanol`",
        ),
        (
            vec![
                "--store",
                "--phase",
                "gc-dimethyl",
                "--modifier",
                "acetonitrile",
                "--ph",
                "3",
                "--source",
                SOURCE,
            ],
            "`gc-dimethyl` is a gc phase",
        ),
    ] {
        let out = ctx.run(&scout_args(&runs, &more));
        assert_eq!(out.status.code(), Some(2), "{more:?}: {}", stderr(&out));
        assert!(stderr(&out).contains(want), "{more:?}: {}", stderr(&out));
        assert_eq!(stored_rows(&ctx), 0, "{more:?}");
    }
    // the system options make no sense without --store
    let out = ctx.run(&scout_args(&runs, &["--phase", "rp-c18"]));
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("--store"), "{}", stderr(&out));
}

#[test]
fn a_poorly_determined_fit_is_listed_and_not_stored() {
    let ctx = Ctx::new();
    // invented S = 0.5, below the plausible range 1-60: the fit is flagged
    let runs = write_runs_with(&ctx, Some("theophylline"), (1.0, 0.5));
    let out = ctx.run(&scout_args(
        &runs,
        &[
            "--store",
            "--phase",
            "rp-c18",
            "--modifier",
            "acetonitrile",
            "--ph",
            "3",
            "--source",
            SOURCE,
        ],
    ));
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    let e = stderr(&out);
    assert!(
        e.contains("stored 2 retention fits") && e.contains("not stored: theophylline"),
        "{e}"
    );
    assert_eq!(stored_rows(&ctx), 2);
}
