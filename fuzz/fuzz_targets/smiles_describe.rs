//! Fuzz target: `describe` must return Ok or Err, never panic, on any input.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(s) = std::str::from_utf8(data) {
        let _ = phasewise::structure::describe(s);
        let _ = phasewise::structure::adapter::parse_smiles_with(
            s,
            &phasewise::structure::ParseOptions { allow_radicals: true },
        )
        .map(|p| phasewise::structure::describe_graph(&p.graph));
    }
});
