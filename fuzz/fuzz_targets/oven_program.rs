//! Fuzz target: the GC oven-program parser (`predict --oven`) must never panic; whatever it
//! accepts round-trips through its own syntax, and a short accepted program can be used for an
//! n-alkane ladder on the non-polar phase without panicking.
#![no_main]

use libfuzzer_sys::fuzz_target;
use phasewise::model::gc::{GcColumn, OvenProgram, alkane_ladder};
use phasewise::phase::Catalogue;

fn catalogue() -> Option<&'static Catalogue> {
    Catalogue::builtin().ok()
}

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match OvenProgram::parse(text) {
        Ok(p) => {
            let again = OvenProgram::parse(&p.to_spec()).expect("round trip");
            assert_eq!(again.to_spec(), p.to_spec());
            assert!(p.total_time_min() >= 0.0 && p.final_c() >= p.initial_c());
            if p.total_time_min() < 120.0
                && let Some(c) = catalogue()
                && let Ok(phase) = c.phase("gc-dimethyl")
                && let Ok(column) = GcColumn::new(30.0, 0.25, 0.25, 35.0)
            {
                let _ = alkane_ladder(phase, &column, &p);
            }
        }
        Err(e) => assert!(e.to_string().contains(text.trim()) || !e.to_string().is_empty()),
    }
});
