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

/// Invented HILIC parameters in the water fraction ψ = 1 − %organic/100 (log k = log kw − S ψ;
/// not measured values).
const HILIC_TRUTH: &[(&str, f64, f64)] = &[("caffeine", 1.9, 8.0), ("acetaminophen", 2.6, 10.0)];
const HILIC_PROGRAMS: [&str; 2] = ["0:95,10:60", "0:95,30:60"];

/// Retention of HILIC parameters on a % organic program: the gradient equation on its water
/// content (the complement).
fn hilic_rt(log_kw: f64, s: f64, program: &str) -> f64 {
    let p = GradientProgram::parse(program).unwrap().complement();
    let sys = GradientSystem {
        dead_time_min: T0_MIN,
        dwell_time_min: 0.0,
    };
    gradient_elution(&LssParameters { log_kw, s }, &p, &sys)
        .unwrap()
        .retention_time_min
}

fn write_hilic_runs(ctx: &Ctx) -> Vec<String> {
    HILIC_PROGRAMS
        .iter()
        .enumerate()
        .map(|(i, prog)| {
            let mut text = String::from("# simulated from invented parameters\nname,rt,w50\n");
            for (name, lk, s) in HILIC_TRUTH {
                text.push_str(&format!("{name},{:.5},0.05\n", hilic_rt(*lk, *s, prog)));
            }
            let p = ctx.path(&format!("hilic{}.csv", i + 1));
            std::fs::write(&p, text).unwrap();
            p.to_string_lossy().into_owned()
        })
        .collect()
}

#[test]
fn hilic_fits_are_in_the_water_fraction_stored_and_predict_a_third_gradient() {
    let ctx = Ctx::new();
    let runs = write_hilic_runs(&ctx);
    let mut args = vec!["scout", "--mode", "hilic"];
    args.extend(runs.iter().map(String::as_str));
    args.extend([
        "--gradients",
        "0:95,10:60;0:95,30:60",
        "--t0",
        "1.0",
        "--format",
        "json",
    ]);
    let (v, code) = ctx.json(&args);
    assert_eq!(code, 0, "{v}");
    assert_eq!(v["fit"]["basis"], "water", "{v}");
    for (a, (name, lk, s)) in v["fit"]["analytes"]
        .as_array()
        .unwrap()
        .iter()
        .zip(HILIC_TRUTH)
    {
        assert_eq!(a["name"], *name);
        // positive S, recovered from noise-free runs (5-decimal tables)
        assert!((a["s"].as_f64().unwrap() - s).abs() < 0.01, "{a}");
        assert!((a["log_kw"].as_f64().unwrap() - lk).abs() < 0.01, "{a}");
        assert!(a["flags"].as_array().unwrap().is_empty(), "{a}");
    }
    // The optimised program is written in % organic, falling (HILIC).
    let prog = v["optimisation"]["optimum"]["program"].as_str().unwrap();
    let p = GradientProgram::parse(prog).unwrap();
    let pts = p.points();
    assert!(
        pts[0].organic_pct > pts[pts.len() - 1].organic_pct,
        "{prog}"
    );
    assert!((80.0..=97.0).contains(&pts[0].organic_pct), "{prog}");
    // Store them: allowed now that S is positive.
    let mut store = vec!["scout", "--mode", "hilic"];
    store.extend(runs.iter().map(String::as_str));
    store.extend([
        "--gradients",
        "0:95,10:60;0:95,30:60",
        "--t0",
        "1.0",
        "--store",
        "--phase",
        "hilic-amide",
        "--modifier",
        "acetonitrile",
        "--ph",
        "4.0",
        "--source",
        SOURCE,
    ]);
    let out = ctx.run(&store);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("stored 2 retention fits") && stderr(&out).contains("water fraction"),
        "{}",
        stderr(&out)
    );
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    let (basis, s): (String, f64) = c
        .query_row(
            "SELECT basis, s FROM retention_fit WHERE analyte = 'caffeine'",
            [],
            |r| Ok((r.get(0)?, r.get(1)?)),
        )
        .unwrap();
    assert_eq!(basis, "water");
    assert!(s > 0.0);
    // A third gradient on the same system is predicted from the fits directly.
    let third = "0:95,20:60,25:60";
    let (v, code) = ctx.json(&[
        "predict",
        "caffeine",
        "acetaminophen",
        "--mode",
        "hilic",
        "--phase",
        "hilic-amide",
        "--gradient",
        third,
        "--t0",
        "1.0",
        "--modifier",
        "acetonitrile",
        "--ph",
        "4.0",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{v}");
    for (name, lk, s) in HILIC_TRUTH {
        let p = v["predictions"]
            .as_array()
            .unwrap()
            .iter()
            .find(|p| p["analyte"] == *name)
            .unwrap();
        assert_eq!(p["path"], "scouting fit", "{p}");
        let rt = p["retention_time_min"].as_f64().unwrap();
        let want = hilic_rt(*lk, *s, third);
        assert!((rt - want).abs() < 0.005, "{name}: {rt} vs {want}");
    }
    // A HILIC phase needs --mode hilic for --store (the fit would be in the organic fraction).
    let wrong: Vec<&str> = store
        .iter()
        .copied()
        .filter(|a| *a != "--mode" && *a != "hilic")
        .collect();
    let out = ctx.run(&wrong);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("--mode hilic"), "{}", stderr(&out));
}

#[test]
fn the_buffer_is_recorded_shown_and_must_match_for_a_direct_prediction() {
    let ctx = Ctx::new();
    let runs = write_runs(&ctx, None);
    let store_with = |buffer: &str| {
        let out = ctx.run(&scout_args(
            &runs,
            &[
                "--store",
                "--phase",
                "rp-c18",
                "--modifier",
                "acetonitrile",
                "--ph",
                "2.7",
                "--buffer",
                buffer,
                "--source",
                SOURCE,
            ],
        ));
        assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
        assert!(stderr(&out).contains(buffer), "{}", stderr(&out));
    };
    let predict = || {
        let (v, code) = ctx.json(&[
            "predict",
            "caffeine",
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
            "2.7",
            "--format",
            "json",
        ]);
        assert_eq!(code, 0, "{v}");
        v["predictions"][0].clone()
    };
    // Stored with ammonium acetate; `predict --ph 2.7` runs with 0.1 % formic acid: another
    // additive, so the fit is a memory source (named with its buffer), not used directly.
    store_with("10 mM ammonium acetate");
    let p = predict();
    assert_ne!(p["path"], "scouting fit", "{p}");
    assert!(
        p["path_source"]
            .as_str()
            .is_some_and(|s| s.contains("ammonium acetate")),
        "{p}"
    );
    // Stored again with formic acid (another system: a second row), it is used directly.
    store_with("0.1 % formic acid");
    assert_eq!(stored_rows(&ctx), 4);
    let p = predict();
    assert_eq!(p["path"], "scouting fit", "{p}");
}

#[test]
fn fits_stored_before_migration_3_stay_readable_and_old_hilic_rows_are_converted() {
    let ctx = Ctx::new();
    // An overlay at schema version 2 (migrations 1 and 2 only), as an earlier phasewise left it.
    let sql = phasewise::kb::SCHEMA_SQL;
    let upto2 = &sql[..sql.find("-- migration 3").expect("migration 3 block")];
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    c.execute_batch(upto2).unwrap();
    c.execute("INSERT INTO schema_version(version) VALUES (2)", [])
        .unwrap();
    // caffeine's InChIKey from the knowledge base
    let (v, _) = ctx.json(&["lookup", "caffeine", "--format", "json"]);
    let key = v["analytes"][0]["inchikey"].as_str().unwrap().to_string();
    // An old HILIC row fitted in the organic fraction: log k = a − s φ with the invented
    // water-fraction truth (1.9, 8.0): a = log kw − S = −6.1, s = −S = −8.0.
    c.execute(
        "INSERT INTO retention_fit(analyte, inchikey, phase_id, mode, chem_class, modifier, ph,
         temperature_c, log_kw, s, log_kw_sd, s_sd, correlation, rms_residual_min, gradients,
         t0_min, dwell_min, flow_ml_min, source, stored_on)
         VALUES ('caffeine', ?1, 'hilic-amide', 'hilic', 'amide', 'acetonitrile', 4.0, NULL,
         -6.1, -8.0, 0.01, 0.05, 0.5, 0.0, '0:95,10:60;0:95,30:60', 1.0, 0.0, NULL, ?2,
         '2026-01-01')",
        rusqlite::params![key, SOURCE],
    )
    .unwrap();
    drop(c);
    let third = "0:95,20:60,25:60";
    let (v, code) = ctx.json(&[
        "predict",
        "caffeine",
        "--mode",
        "hilic",
        "--phase",
        "hilic-amide",
        "--gradient",
        third,
        "--t0",
        "1.0",
        "--modifier",
        "acetonitrile",
        "--ph",
        "4.0",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{v}");
    let p = &v["predictions"][0];
    assert_eq!(p["path"], "scouting fit", "{p}");
    let rt = p["retention_time_min"].as_f64().unwrap();
    let want = hilic_rt(1.9, 8.0, third);
    assert!((rt - want).abs() < 1e-6, "{rt} vs {want}");
    // `predict` only reads (issue 17): the overlay is still at version 2. A command that
    // writes migrates it to version 3, where the old row reads as organic basis without a
    // buffer.
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    let version: i64 = c
        .query_row("SELECT version FROM schema_version", [], |r| r.get(0))
        .unwrap();
    assert_eq!(version, 2);
    drop(c);
    let out = ctx.run(&[
        "kb",
        "add",
        "--name",
        "migration trigger (invented)",
        "--prop",
        "logp=1",
        "--source",
        "invented",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    let (basis, buffer): (String, Option<String>) = c
        .query_row("SELECT basis, buffer FROM retention_fit", [], |r| {
            Ok((r.get(0)?, r.get(1)?))
        })
        .unwrap();
    assert_eq!((basis.as_str(), buffer), ("organic", None));
    let version: i64 = c
        .query_row("SELECT version FROM schema_version", [], |r| r.get(0))
        .unwrap();
    assert_eq!(version, 3);
}
