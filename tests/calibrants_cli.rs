//! `predict --calibrants FILE` through the binary: projection onto the user's system, and the
//! bad inputs (missing file, too few calibrants, unresolvable names, non-numeric times), each
//! with a clear message naming the file or value and a non-zero exit.
//!
//! The calibrant tables are INVENTED (an invented lab's C18 run, about 4 min later and 10 %
//! more stretched than the model's predictions for these compounds; the times are made up for
//! the test, in the usual reversed-phase order of these compounds), not measurements.

mod common;

use common::Ctx;

const BASE: [&str; 12] = [
    "predict",
    "--mode",
    "rp",
    "--phase",
    "rp-c18",
    "--modifier",
    "acetonitrile",
    "--gradient",
    "0:5,20:95,23:95",
    "--t0",
    "1",
    "--ph",
];

/// Invented calibrant table (name, retention time in minutes).
const CALIBRANTS: &str = "name\tretention_time\nphenol\t7.5\nbenzene\t8.1\ntoluene\t9.6\nethylbenzene\t11.1\npropylbenzene\t13.2\nnaphthalene\t13.5\nbiphenyl\t19.2\n";

fn run(ctx: &Ctx, table: Option<&str>, extra: &[&str]) -> std::process::Output {
    let mut args: Vec<String> = BASE.iter().map(|s| (*s).to_owned()).collect();
    args.push("3".into());
    if let Some(t) = table {
        let path = ctx.dir.path().join("calibrants.tsv");
        std::fs::write(&path, t).expect("write calibrants");
        args.push("--calibrants".into());
        args.push(path.display().to_string());
    }
    args.extend(extra.iter().map(|s| (*s).to_owned()));
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    ctx.run(&refs)
}

#[test]
fn predictions_are_projected_and_say_so() {
    let ctx = Ctx::new();
    let out = run(&ctx, Some(CALIBRANTS), &["benzonitrile", "toluene"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        out.status.success(),
        "{stdout}{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(stdout.contains("projected on calibrants"), "{stdout}");
    assert!(
        stdout.contains("projected onto the calibrants of"),
        "{stdout}"
    );
    assert!(stdout.contains("7 compounds"), "{stdout}");
    // a calibrant predicted as an analyte lands near its measured time (within the interval)
    let path = ctx.dir.path().join("calibrants.tsv").display().to_string();
    let toluene = |calibrants: bool| {
        let mut args: Vec<&str> = BASE.to_vec();
        args.extend(["3", "toluene", "--format", "json"]);
        if calibrants {
            args.extend(["--calibrants", &path]);
        }
        let (json, code) = ctx.json(&args);
        assert_eq!(code, 0);
        json["predictions"][0].clone()
    };
    let raw = toluene(false)["retention_time_min"]
        .as_f64()
        .unwrap_or(f64::NAN);
    let p = toluene(true);
    let t = p["retention_time_min"].as_f64().unwrap_or(f64::NAN);
    let (lo, hi) = (
        p["interval_low_min"].as_f64().unwrap_or(f64::NAN),
        p["interval_high_min"].as_f64().unwrap_or(f64::NAN),
    );
    // the calibrant itself lands near its measured 9.6 min, inside its interval, and nearer
    // than the unprojected prediction
    assert!(lo <= 9.6 && 9.6 <= hi, "toluene {t} [{lo}, {hi}]");
    assert!((t - 9.6).abs() < 1.0, "toluene projected to {t} min");
    assert!((t - 9.6).abs() < (raw - 9.6).abs(), "{t} vs raw {raw}");
    assert!(
        p["path"]
            .as_str()
            .is_some_and(|s| s.ends_with("projected on calibrants"))
    );
}

#[test]
fn missing_file_is_named() {
    let ctx = Ctx::new();
    let missing = ctx.dir.path().join("no-such-calibrants.tsv");
    let mut args: Vec<String> = BASE.iter().map(|s| (*s).to_owned()).collect();
    args.extend(["3".into(), "toluene".into(), "--calibrants".into()]);
    args.push(missing.display().to_string());
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let out = ctx.run(&refs);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("no-such-calibrants.tsv"), "{err}");
}

#[test]
fn three_calibrants_are_too_few() {
    let ctx = Ctx::new();
    let table = "name\tretention_time\nphenol\t7.5\ntoluene\t9.6\nnaphthalene\t13.5\n";
    let out = run(&ctx, Some(table), &["benzonitrile"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("3 usable calibrants"), "{err}");
    assert!(err.contains("at least 5"), "{err}");
    assert!(err.contains("calibrants.tsv"), "{err}");
}

#[test]
fn unresolvable_calibrants_are_named() {
    let ctx = Ctx::new();
    // enough good ones: the projection runs and the note names the one not used
    let table = format!("{CALIBRANTS}qwzxv-not-a-compound\t7.0\n");
    let out = run(&ctx, Some(&table), &["benzonitrile"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(out.status.success(), "{stdout}");
    assert!(stdout.contains("calibrants not used"), "{stdout}");
    assert!(stdout.contains("qwzxv-not-a-compound"), "{stdout}");
    // too few good ones left: the error names the count and the unusable names
    let table = "name\tretention_time\nphenol\t7.5\ntoluene\t9.6\nnaphthalene\t13.5\nbiphenyl\t19.2\nqwzxv-not-a-compound\t7.0\nzzqq-also-not\t8.0\n";
    let out = run(&ctx, Some(table), &["benzonitrile"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("4 usable calibrants"), "{err}");
    assert!(
        err.contains("qwzxv-not-a-compound") && err.contains("zzqq-also-not"),
        "{err}"
    );
}

#[test]
fn non_numeric_times_are_refused() {
    let ctx = Ctx::new();
    let table = CALIBRANTS.replace("9.6", "nine");
    let out = run(&ctx, Some(&table), &["benzonitrile"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("nine"), "{err}");
}
