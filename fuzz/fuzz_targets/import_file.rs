//! Fuzz target: the knowledge-base import parser (CSV/TSV with property columns) and the
//! `name=value[unit]` property parser must never panic; every rejected row carries a message.
#![no_main]

use libfuzzer_sys::fuzz_target;
use phasewise::kb::user::{parse_import, parse_property};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let source = if text.len() % 2 == 0 { Some("fuzz source") } else { None };
    match parse_import(text, source) {
        Ok(rows) => {
            for (line, row) in rows {
                assert!(line >= 1);
                if let Err(e) = row {
                    assert!(!e.to_string().is_empty());
                }
            }
        }
        Err(e) => assert!(!e.to_string().is_empty()),
    }
    for item in text.split_whitespace().take(16) {
        if let Err(e) = parse_property(item) {
            assert!(!e.to_string().is_empty());
        }
    }
});
