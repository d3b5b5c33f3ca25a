//! Replays the committed fuzz corpus (`fuzz/corpus/smiles_describe/`, seeded
//! from the RDKit reference set plus hand-written tricky inputs and any crash
//! the fuzzer found) through `describe`, so CI checks it without the fuzzer.

use std::path::Path;

#[test]
fn committed_fuzz_corpus_never_panics() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("fuzz/corpus/smiles_describe");
    let mut n = 0;
    let mut ok = 0;
    let mut entries: Vec<_> = std::fs::read_dir(&dir)
        .expect("corpus directory")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .collect();
    entries.sort();
    for path in entries {
        let Ok(bytes) = std::fs::read(&path) else {
            continue;
        };
        if let Ok(s) = std::str::from_utf8(&bytes) {
            if phasewise::structure::describe(s).is_ok() {
                ok += 1;
            }
            n += 1;
        }
    }
    assert!(
        n >= 300,
        "corpus should hold at least 300 inputs, found {n}"
    );
    // The 300 reference structures in the corpus all parse.
    assert!(ok >= 300, "only {ok} of {n} corpus inputs described");
}
