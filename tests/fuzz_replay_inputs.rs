//! Replays the fuzz corpora of the analyte-list and import-file targets
//! (`fuzz/corpus/{analyte_list,import_file}/*`, and any crash artifacts) through the same checks
//! as the fuzz targets, as a plain test; analyte lists are also resolved against the test
//! knowledge base, as the fuzz target does against the default one.

mod common;

use std::fs;
use std::path::Path;

use phasewise::kb::identifier::{classify, parse_analyte_list};
use phasewise::kb::user::{parse_import, parse_property};
use phasewise::kb::{BuildPolicy, Kb, KbPaths};

fn inputs(target: &str) -> Vec<(String, String)> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("fuzz");
    let mut out = Vec::new();
    for sub in ["corpus", "artifacts"] {
        let Ok(entries) = fs::read_dir(root.join(sub).join(target)) else {
            continue;
        };
        let mut paths: Vec<_> = entries.filter_map(|e| e.ok().map(|e| e.path())).collect();
        // hand-written seeds first (the fuzzer names its files by 40-digit hex hashes)
        paths.sort_by_key(|p| {
            let name = p.file_name().map(|n| n.to_string_lossy().into_owned());
            let hashed = name
                .as_deref()
                .is_some_and(|n| n.len() == 40 && n.bytes().all(|b| b.is_ascii_hexdigit()));
            (hashed, p.clone())
        });
        for p in paths.into_iter().filter(|p| p.is_file()) {
            let bytes = fs::read(&p).unwrap_or_else(|e| panic!("reading {}: {e}", p.display()));
            if let Ok(text) = String::from_utf8(bytes) {
                out.push((p.display().to_string(), text));
            }
        }
    }
    out
}

#[test]
fn analyte_list_corpus_replays_without_panic() {
    let files = inputs("analyte_list");
    assert!(
        files.len() >= 7,
        "seed corpus missing: {} files",
        files.len()
    );
    let dir = tempfile::tempdir().expect("tempdir");
    let kb = Kb::open(
        &KbPaths {
            shipped: common::shipped_kb().to_path_buf(),
            user: dir.path().join("absent.sqlite"),
        },
        BuildPolicy::Never,
        &mut |_, _| {},
    )
    .expect("open test kb");
    let (mut accepted, mut resolved) = (0, 0);
    // resolution of a miss costs a fuzzy search (~10 ms): the seeds (read first) and then the
    // fuzzer's files up to a budget
    let mut budget = 400;
    for (name, text) in &files {
        match parse_analyte_list(text) {
            Ok(entries) => {
                accepted += 1;
                for e in entries.iter().take(8) {
                    assert!(!e.query.is_empty() && e.query.trim() == e.query, "{name}");
                    let _ = classify(&e.query);
                    if budget == 0 {
                        continue;
                    }
                    budget -= 1;
                    if matches!(
                        kb.resolve(&e.query).expect("no database error"),
                        phasewise::kb::resolve::Resolution::Found(_)
                    ) {
                        resolved += 1;
                    }
                }
            }
            Err(e) => assert!(e.to_string().contains("line"), "{name}: {e}"),
        }
    }
    // the seed panels are valid lists of real compounds
    assert!(
        accepted >= 5 && resolved >= 10,
        "{accepted} lists, {resolved} found"
    );
}

#[test]
fn import_file_corpus_replays_without_panic() {
    let files = inputs("import_file");
    assert!(
        files.len() >= 5,
        "seed corpus missing: {} files",
        files.len()
    );
    let (mut good_rows, mut bad_rows) = (0, 0);
    for (name, text) in &files {
        let source = if text.len() % 2 == 0 {
            Some("fuzz source")
        } else {
            None
        };
        match parse_import(text, source) {
            Ok(rows) => {
                for (line, row) in rows {
                    assert!(line >= 1, "{name}");
                    match row {
                        Ok(_) => good_rows += 1,
                        Err(e) => {
                            bad_rows += 1;
                            assert!(!e.to_string().is_empty(), "{name}");
                        }
                    }
                }
            }
            Err(e) => assert!(!e.to_string().is_empty(), "{name}"),
        }
        for item in text.split_whitespace().take(16) {
            if let Err(e) = parse_property(item) {
                assert!(!e.to_string().is_empty(), "{name}");
            }
        }
    }
    // the seeds hold accepted rows and rejected ones
    assert!(
        good_rows >= 3 && bad_rows >= 2,
        "{good_rows} good, {bad_rows} bad"
    );
}
