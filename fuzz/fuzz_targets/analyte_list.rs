//! Fuzz target: the analyte-list parser, the identifier classifier and (when a built knowledge
//! base sits at the default location) resolution with its fuzzy suggestions must never panic,
//! and every accepted entry must be a trimmed, non-empty query.
#![no_main]

use std::sync::OnceLock;

use libfuzzer_sys::fuzz_target;
use phasewise::kb::identifier::{classify, parse_analyte_list};
use phasewise::kb::{BuildPolicy, Kb, KbPaths};

/// The shipped base, read only, with no user overlay (a path that never exists).
fn kb() -> Option<&'static std::sync::Mutex<Kb>> {
    static KB: OnceLock<Option<std::sync::Mutex<Kb>>> = OnceLock::new();
    KB.get_or_init(|| {
        let mut paths = KbPaths::default_location().ok()?;
        paths.user = std::env::temp_dir().join("phasewise-fuzz-no-such-overlay.sqlite");
        Kb::open(&paths, BuildPolicy::Never, &mut |_, _| {})
            .ok()
            .map(std::sync::Mutex::new)
    })
    .as_ref()
}

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match parse_analyte_list(text) {
        Ok(entries) => {
            for e in entries.iter().take(8) {
                assert!(!e.query.is_empty() && e.query.trim() == e.query);
                let _ = classify(&e.query);
                if let Some(kb) = kb()
                    && let Ok(kb) = kb.lock()
                {
                    // database errors are allowed results; panics are not
                    let _ = kb.resolve(&e.query);
                }
            }
        }
        Err(e) => assert!(e.to_string().contains("line")),
    }
});
