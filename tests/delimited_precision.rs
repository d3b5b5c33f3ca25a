//! One precision rule for every CSV/TSV output (issue 16): every command that writes CSV or TSV
//! is run through the binary and every numeric cell is checked against the rule of
//! `phasewise::report::csv_num` (at most `CSV_SIGNIFICANT_DIGITS` significant digits, no
//! binary noise such as `1.9950199999999998`). The analytes are ordinary compounds of the
//! shipped knowledge base; the peak tables are invented (an imaginary lab's "mix PR-3", not
//! real compounds) or simulated from invented parameters with the library's own elution
//! models.

mod common;

use std::path::Path;

use common::{Ctx, stderr, stdout};
use phasewise::measured::gc_scout::{VantHoffParameters, programmed_elution};
use phasewise::model::gc::OvenProgram;
use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};
use phasewise::report::CSV_SIGNIFICANT_DIGITS;

/// Integer columns that are identifiers or counts, not measured or predicted quantities.
const INTEGER_COLUMNS: [&str; 3] = ["cid", "rows", "rank"];

/// Splits one delimited line (RFC 4180 quoting for CSV; TSV has none).
fn cells(line: &str, d: char) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '"' if d == ',' && quoted && chars.peek() == Some(&'"') => {
                cur.push('"');
                chars.next();
            }
            '"' if d == ',' => quoted = !quoted,
            c if c == d && !quoted => out.push(std::mem::take(&mut cur)),
            c => cur.push(c),
        }
    }
    out.push(cur);
    out
}

/// Significant digits of a numeric cell, or `None` when the cell is not a number.
fn significant_digits(cell: &str) -> Option<usize> {
    let t = cell.trim();
    if t.is_empty()
        || t.parse::<f64>().is_err()
        || t.chars()
            .any(|c| c.is_ascii_alphabetic() && c != 'e' && c != 'E')
    {
        return None;
    }
    let mantissa = t.split(['e', 'E']).next().unwrap_or(t);
    let mantissa = mantissa.trim_start_matches(['-', '+']);
    let digits: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    let digits = digits.trim_start_matches('0');
    // an integer's trailing zeros are not significant (123457 000 is a rounded figure)
    let digits = if mantissa.contains('.') {
        digits
    } else {
        digits.trim_end_matches('0')
    };
    Some(digits.len().max(1))
}

/// Checks every numeric cell of `text` (blocks after `# title` lines each start with a header)
/// and returns the number of numeric cells seen.
fn check(what: &str, text: &str, d: char) -> usize {
    let mut header: Option<Vec<String>> = None;
    let mut seen = 0;
    for line in text.lines() {
        if line.starts_with('#') || line.trim().is_empty() {
            header = None;
            continue;
        }
        let row = cells(line, d);
        let Some(h) = &header else {
            header = Some(row);
            continue;
        };
        for (i, c) in row.iter().enumerate() {
            let column = h.get(i).map_or("", String::as_str);
            let Some(n) = significant_digits(c) else {
                continue;
            };
            if INTEGER_COLUMNS.contains(&column) && !c.contains('.') {
                continue;
            }
            seen += 1;
            assert!(
                n <= CSV_SIGNIFICANT_DIGITS,
                "{what}: column `{column}` cell `{c}` has {n} significant digits (rule: at most \
                 {CSV_SIGNIFICANT_DIGITS})\nline: {line}"
            );
            assert!(!c.contains("NaN") && !c.contains("inf"), "{what}: {line}");
        }
    }
    seen
}

fn run_ok(ctx: &Ctx, args: &[&str]) -> String {
    let out = ctx.run(args);
    assert!(
        out.status.success() || out.status.code() == Some(1),
        "{args:?}: {}",
        stderr(&out)
    );
    stdout(&out)
}

#[test]
fn the_rule_itself_is_six_significant_digits() {
    assert_eq!(CSV_SIGNIFICANT_DIGITS, 6);
    assert_eq!(significant_digits("1.9950199999999998"), Some(17));
    assert_eq!(significant_digits("0.000123457"), Some(6));
    assert_eq!(significant_digits("123457000"), Some(6));
    assert_eq!(significant_digits("ethanol"), None);
    assert_eq!(significant_digits("1.23457e-9"), Some(6));
    // and the checker fails on a noisy cell
    let r = std::panic::catch_unwind(|| check("t", "a,b\nx,1.9950199999999998\n", ','));
    assert!(r.is_err());
}

#[test]
fn data_commands_write_csv_and_tsv_numbers_by_one_rule() {
    let ctx = Ctx::new();
    let panels = [
        "examples/panels/analgesic-impurities.txt",
        "examples/panels/solvent-screen.txt",
    ];
    for (fmt, d) in [("csv", ','), ("tsv", '\t')] {
        for panel in panels {
            let text = run_ok(&ctx, &["advise", "--input", panel, "--format", fmt]);
            assert!(
                check(&format!("advise {panel} {fmt}"), &text, d) > 10,
                "{text}"
            );
        }
        let text = run_ok(
            &ctx,
            &[
                "predict",
                "caffeine",
                "theophylline",
                "theobromine",
                "paraxanthine",
                "--mode",
                "rp",
                "--phase",
                "rp-c18",
                "--gradient",
                "0:5,20:95",
                "--ph",
                "2.7",
                "--modifier",
                "acetonitrile",
                "--column",
                "150x4.6",
                "--flow",
                "1.0",
                "--format",
                fmt,
            ],
        );
        assert!(check(&format!("predict rp {fmt}"), &text, d) >= 8, "{text}");
        let text = run_ok(
            &ctx,
            &[
                "predict",
                "toluene",
                "ethylbenzene",
                "o-xylene",
                "--mode",
                "gc",
                "--phase",
                "gc-5-phenyl",
                "--oven",
                "40:2,10:250:5",
                "--column",
                "30x0.25x0.25",
                "--format",
                fmt,
            ],
        );
        assert!(check(&format!("predict gc {fmt}"), &text, d) >= 6, "{text}");
        let text = run_ok(
            &ctx,
            &["lookup", "caffeine", "aspirin", "toluene", "--format", fmt],
        );
        assert!(check(&format!("lookup {fmt}"), &text, d) > 5, "{text}");
        let text = run_ok(
            &ctx,
            &[
                "describe",
                "CC(=O)Oc1ccccc1C(=O)O",
                "Cn1cnc2c1c(=O)n(C)c(=O)n2C",
                "--format",
                fmt,
            ],
        );
        assert!(check(&format!("describe {fmt}"), &text, d) > 10, "{text}");
        let text = run_ok(&ctx, &["kb", "stats", "--format", fmt]);
        check(&format!("kb stats {fmt}"), &text, d);
    }
}

/// Invented peak table of "mix PR-3" (not real compounds) with more digits than any
/// integrator prints, so that a formatter that passes numbers through would be caught.
const PR3: &str = "\
# invented demo data: imaginary lab, imaginary mix PR-3
name,rt,w50,w5,f5,area
pr3-a,3.123456789,0.0612345,0.2012345,0.0912345,200.123456
pr3-b,4.0123456789,0.0812345,0.2812345,0.1312345,300.654321
pr3-c,4.6987654321,0.1012345,0.4012345,0.1612345,500.111111
";

#[test]
fn suitability_csv_follows_the_rule() {
    let ctx = Ctx::new();
    let p = ctx.path("pr3.csv");
    std::fs::write(&p, PR3).unwrap();
    let text = run_ok(
        &ctx,
        &[
            "suitability",
            "--t0",
            "1.0123456",
            "--length-mm",
            "150",
            "-f",
            "csv",
            p.to_str().unwrap(),
        ],
    );
    assert!(check("suitability csv", &text, ',') > 20, "{text}");
    // missing values are empty cells, never a dash
    assert!(!text.contains(",–,") && !text.contains(",-,"), "{text}");
}

fn write(dir: &Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.to_str().unwrap().to_string()
}

#[test]
fn scout_window_data_follows_the_rule() {
    let ctx = Ctx::new();
    let dir = ctx.dir.path();
    // LC: invented (log kw, S) of four analytes; t0 1.5 min, dwell 1.0 min.
    let lc = [
        ("pr3-w", 2.1, 3.4),
        ("pr3-x", 2.8, 4.1),
        ("pr3-y", 3.4, 4.6),
        ("pr3-z", 4.2, 5.5),
    ];
    let system = GradientSystem {
        dead_time_min: 1.5,
        dwell_time_min: 1.0,
    };
    let mut runs = Vec::new();
    for (i, prog) in ["0:5,10:95", "0:5,30:95"].iter().enumerate() {
        let g = GradientProgram::parse(prog).unwrap();
        let mut t = String::from("name,rt,w50\n");
        for (n, log_kw, s) in lc {
            let tr = gradient_elution(&LssParameters { log_kw, s }, &g, &system)
                .unwrap()
                .retention_time_min;
            t.push_str(&format!("{n},{tr},0.05\n"));
        }
        runs.push(write(dir, &format!("lc{i}.csv"), &t));
    }
    let tsv = ctx.path("lc-window.tsv");
    let mut args = vec!["scout"];
    args.extend(runs.iter().map(String::as_str));
    args.extend([
        "--gradients",
        "0:5,10:95;0:5,30:95",
        "--t0",
        "1.5",
        "--flow",
        "1.0",
        "--dwell",
        "1.0",
        "--window-data",
        tsv.to_str().unwrap(),
    ]);
    run_ok(&ctx, &args);
    let text = std::fs::read_to_string(&tsv).unwrap();
    assert!(check("scout window data", &text, '\t') > 20, "{text}");

    // GC: invented ln k = A + B/T parameters; t_M 1.25 min.
    let gc = [
        ("pr3-g1", -10.0, 4400.0),
        ("pr3-g2", -11.0, 5000.0),
        ("pr3-g3", -13.2, 6200.0),
    ];
    let mut runs = Vec::new();
    for (i, prog) in ["40:1,5:300:5", "40:1,15:300:5"].iter().enumerate() {
        let o = OvenProgram::parse(prog).unwrap();
        let mut t = String::from("name,rt,wb\n");
        for (n, a, b) in gc {
            let e = programmed_elution(&VantHoffParameters { a, b_k: b }, &o, 1.25).unwrap();
            let w = 4.0 * 1.25 * (1.0 + e.retention_factor_at_elution) / 120_000f64.sqrt();
            t.push_str(&format!("{n},{},{w}\n", e.retention_time_min));
        }
        runs.push(write(dir, &format!("gc{i}.csv"), &t));
    }
    let tsv = ctx.path("gc-window.tsv");
    let mut args = vec!["scout", "--mode", "gc"];
    args.extend(runs.iter().map(String::as_str));
    args.extend([
        "--ovens",
        "40:1,5:300:5;40:1,15:300:5",
        "--t0",
        "1.25",
        "--phase",
        "gc-5-phenyl",
        "--max-temperature",
        "300",
        "--window-data",
        tsv.to_str().unwrap(),
    ]);
    run_ok(&ctx, &args);
    let text = std::fs::read_to_string(&tsv).unwrap();
    assert!(
        check("scout --mode gc window data", &text, '\t') > 20,
        "{text}"
    );
}
