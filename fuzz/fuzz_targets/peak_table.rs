//! Fuzz target: the peak-table parser and the suitability evaluation on whatever it accepts
//! must never panic.
#![no_main]

use libfuzzer_sys::fuzz_target;
use phasewise::measured::DeadTimeInput;
use phasewise::measured::peaks::PeakTable;
use phasewise::measured::suitability::{SuitabilityRequest, SuitabilityTargets, evaluate};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match PeakTable::parse(text) {
        Ok(table) => {
            let _ = evaluate(&SuitabilityRequest {
                peaks: table,
                dead_time: DeadTimeInput::Given { dead_time_min: 0.5 },
                column_length_mm: Some(100.0),
                exclude: vec![],
                targets: SuitabilityTargets::default(),
            });
        }
        Err(e) => assert!(!e.to_string().is_empty()),
    }
});
