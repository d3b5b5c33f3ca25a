//! Fuzz target: the gradient-program parser must never panic, and whatever it accepts must be
//! a valid program that round-trips and can be used for an elution calculation.
#![no_main]

use libfuzzer_sys::fuzz_target;
use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match GradientProgram::parse(text) {
        Ok(p) => {
            assert!(p.points().len() >= 2);
            assert!(p.points().windows(2).all(|w| w[0].time_min < w[1].time_min));
            let again = GradientProgram::parse(&p.to_spec()).expect("round trip");
            assert_eq!(again, p);
            let _ = gradient_elution(
                &LssParameters {
                    log_kw: 3.0,
                    s: 4.0,
                },
                &p,
                &GradientSystem {
                    dead_time_min: 1.0,
                    dwell_time_min: 0.5,
                },
            );
        }
        Err(e) => assert!(!e.to_string().is_empty()),
    }
});
