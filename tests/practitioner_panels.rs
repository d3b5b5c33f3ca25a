//! The practitioner panel suite (issue 15): assay panels across GC, reversed phase, HILIC, ion
//! chromatography and ion exclusion, each with the mode, phase family, pH side, detector family
//! and critical pair a practising chromatographer would expect, and the source of each
//! expectation (`tests/data/practitioner_panels.tsv`, written for phasewise). Every panel runs
//! through the binary; the test prints one line per panel and the pass count, and fails when
//! the count drops below the floor reached so far (raise it as rules improve). The figure goes
//! into docs/science.md § practitioner panels.

mod common;

use common::Ctx;
use serde_json::Value;

/// Panels that passed when this floor was last raised (see docs/science.md).
/// 49 on the advisor branch alone; 46 after merging the solvation-model GC indices and the
/// identity work (ocp-2 phase, a hexachlorobiphenyl name and `lactose` now ambiguous): to be
/// raised back by fixing those causes, never by editing expectations. 50 on the adv branch
/// (issue 15, second pass): microspecies-aware logD sends the fluoroquinolones to reversed
/// phase, the GC class rules fix the free acids, the organochlorine pesticides and the solvent
/// screen; pcb and sugars fail only on ambiguous names (they pass with the structures given).
const FLOOR: usize = 55;

/// What "no detector named" is on the command line: nothing (the default `auto` chooses the
/// detector from structure).
const NO_DETECTOR_NAMED: &[&str] = &[];

struct Panel {
    id: String,
    analytes: Vec<String>,
    options: Vec<String>,
    modes: Vec<String>,
    phases: Vec<String>,
    ph: String,
    detectors: Vec<String>,
    pairs: Vec<(String, String)>,
    source: String,
}

fn panels() -> Vec<Panel> {
    let text = include_str!("data/practitioner_panels.tsv");
    let alts = |s: &str| -> Vec<String> {
        if s == "-" {
            Vec::new()
        } else {
            s.split('|').map(str::to_string).collect()
        }
    };
    text.lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("id\t") && !l.trim().is_empty())
        .map(|l| {
            let f: Vec<&str> = l.split('\t').collect();
            assert_eq!(f.len(), 10, "panel line needs 10 tab-separated fields: {l}");
            Panel {
                id: f[0].into(),
                analytes: f[2].split(';').map(str::to_string).collect(),
                options: if f[3] == "-" {
                    Vec::new()
                } else {
                    f[3].split_whitespace().map(str::to_string).collect()
                },
                modes: alts(f[4]),
                phases: alts(f[5]),
                ph: f[6].into(),
                detectors: alts(f[7]),
                pairs: alts(f[8])
                    .iter()
                    .map(|p| {
                        let (a, b) = p.split_once('/').expect("pair as a/b");
                        (a.to_string(), b.to_string())
                    })
                    .collect(),
                source: f[9].into(),
            }
        })
        .collect()
}

/// Words in the `detection` text that identify a detector family.
fn family_words(family: &str) -> &'static [&'static str] {
    match family {
        "uv" => &["uv absorbance"],
        "fluorescence" => &["fluorescence"],
        "ms" => &["mass spectrometry"],
        "fid" => &["flame ionisation"],
        "ecd" => &["electron capture"],
        "conductivity" => &["conductivity"],
        "aerosol" => &["aerosol", "light scattering"],
        "ri" => &["refractive index"],
        "amperometry" => &["amperometr"],
        other => panic!("unknown detector family `{other}` in the panel file"),
    }
}

/// Check one panel; `Ok(summary)` or `Err(what failed)`.
fn check(ctx: &Ctx, p: &Panel) -> Result<String, String> {
    let mut args: Vec<&str> = vec!["advise", "--format", "json"];
    args.extend(p.options.iter().map(String::as_str));
    if !p.options.iter().any(|o| o == "--detector") {
        args.extend_from_slice(NO_DETECTOR_NAMED);
    }
    args.extend(p.analytes.iter().map(String::as_str));
    let out = ctx.run(&args);
    let code = out.status.code().unwrap_or(-1);
    let err = String::from_utf8_lossy(&out.stderr).to_string();
    if code != 0 && code != 1 {
        // an impossible request must be refused with a message; a panel that expects it
        // says `error` among its modes
        return if p.modes.iter().any(|m| m == "error") && !err.trim().is_empty() {
            Ok(format!("refused: {}", err.trim()))
        } else {
            Err(format!("exit {code}: {}", err.trim()))
        };
    }
    let r: Value = serde_json::from_slice(&out.stdout).map_err(|e| format!("not JSON: {e}"))?;
    let mut fails = Vec::new();
    if let Some(u) = r["unresolved"].as_array()
        && !u.is_empty()
    {
        fails.push(format!("unresolved: {u:?}"));
    }
    let rec = &r["recommendations"][0];
    let mode = rec["mode"].as_str().unwrap_or("");
    let phase = rec["phase"]["id"].as_str().unwrap_or("");
    let c = &rec["conditions"];
    if !p.modes.iter().any(|m| m == mode) {
        fails.push(format!("mode {mode}"));
    }
    if !p.phases.is_empty() && !p.phases.iter().any(|x| phase.starts_with(x.as_str())) {
        fails.push(format!("phase {phase}"));
    }
    let ph = c["ph"].as_f64();
    if p.ph != "-" && (mode == "rp" || mode == "hilic") {
        match ph {
            None => fails.push("no pH".into()),
            Some(v) => {
                let ok = match p.ph.as_str() {
                    "low" => v <= 3.5,
                    "high" => v >= 9.5,
                    "low|high" => v <= 3.5 || v >= 9.5,
                    "notmid" => !(4.5..9.0).contains(&v),
                    other => panic!("unknown pH side `{other}`"),
                };
                if !ok {
                    fails.push(format!("pH {v}"));
                }
            }
        }
    }
    let detection = c["detection"].as_str().unwrap_or("").to_lowercase();
    if !p.detectors.is_empty()
        && !p
            .detectors
            .iter()
            .any(|f| family_words(f).iter().any(|w| detection.contains(w)))
    {
        fails.push(format!("detection `{detection}`"));
    }
    if !p.pairs.is_empty() {
        // names as the report shows them: the query typed maps to the resolved name
        let shown = |q: &str| -> String {
            r["analytes"]
                .as_array()
                .and_then(|a| {
                    a.iter().find(|x| {
                        x["query"]
                            .as_str()
                            .is_some_and(|s| s.eq_ignore_ascii_case(q))
                    })
                })
                .and_then(|x| x["name"].as_str())
                .unwrap_or(q)
                .to_string()
        };
        let same = |x: &str, y: &str, a: &str, b: &str| (x == a && y == b) || (x == b && y == a);
        let mut listed: Vec<(String, String)> = Vec::new();
        if let Some(cp) = rec["critical_pair"].as_array() {
            listed.push((
                cp[0].as_str().unwrap_or("").into(),
                cp[1].as_str().unwrap_or("").into(),
            ));
        }
        for co in rec["coelutions"].as_array().into_iter().flatten() {
            listed.push((
                co["a"].as_str().unwrap_or("").into(),
                co["b"].as_str().unwrap_or("").into(),
            ));
        }
        let found = p.pairs.iter().any(|(a, b)| {
            let (a, b) = (shown(a), shown(b));
            listed.iter().any(|(x, y)| same(x, y, &a, &b))
        });
        if !found {
            fails.push(format!(
                "known pair not flagged (critical pair {})",
                rec["critical_pair"]
            ));
        }
    }
    let summary = format!("{mode} on {phase}, pH {ph:?}, detection `{detection}`");
    if fails.is_empty() {
        Ok(summary)
    } else {
        Err(format!("{}; got {summary}", fails.join("; ")))
    }
}

#[test]
fn practitioner_panels_pass_at_least_the_floor() {
    let all = panels();
    assert!(all.len() >= 40, "at least 40 panels");
    for p in &all {
        assert!(
            !p.source.trim().is_empty(),
            "{}: every panel names its source",
            p.id
        );
        assert!(!p.modes.is_empty(), "{}: an expected mode", p.id);
    }
    let ctx = Ctx::new();
    let mut passed = 0;
    for p in &all {
        match check(&ctx, p) {
            Ok(s) => {
                passed += 1;
                println!("PASS {}: {s}", p.id);
            }
            Err(e) => println!("FAIL {}: {e}", p.id),
        }
    }
    println!(
        "practitioner panels: {passed} of {} pass ({:.0} %)",
        all.len(),
        100.0 * passed as f64 / all.len() as f64
    );
    assert!(
        passed >= FLOOR,
        "{passed} of {} panels pass, below the floor of {FLOOR}",
        all.len()
    );
}
