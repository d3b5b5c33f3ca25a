use super::*;
use crate::measured::peaks::Peak;

pub(crate) fn table(rows: &[(&str, f64)]) -> PeakTable {
    PeakTable::from_peaks(
        rows.iter()
            .map(|(n, t)| Peak {
                width_half_min: Some(0.02),
                ..Peak::at(n, *t)
            })
            .collect(),
    )
    .unwrap()
}

// Invented analytes (not real compounds): B of 4.5–7.5 kK (ΔH of 37–62 kJ/mol) and A of
// about −10 to −14, typical magnitudes for a 0.25 mm × 0.25 µm column (β = 250), from
// memory.
pub(crate) fn truth() -> Vec<(&'static str, VantHoffParameters)> {
    vec![
        (
            "inv-g1",
            VantHoffParameters {
                a: -10.2,
                b_k: 4500.0,
            },
        ),
        (
            "inv-g2",
            VantHoffParameters {
                a: -11.4,
                b_k: 5400.0,
            },
        ),
        (
            "inv-g3",
            VantHoffParameters {
                a: -12.9,
                b_k: 6500.0,
            },
        ),
        (
            "inv-g4",
            VantHoffParameters {
                a: -14.0,
                b_k: 7500.0,
            },
        ),
    ]
}

const TM: f64 = 1.2;

fn simulate(truth: &[(&str, VantHoffParameters)], specs: &[&str]) -> Vec<GcScoutRun> {
    specs
        .iter()
        .map(|spec| {
            let program = OvenProgram::parse(spec).unwrap();
            let rows: Vec<(&str, f64)> = truth
                .iter()
                .map(|(n, p)| {
                    (
                        *n,
                        programmed_elution(p, &program, TM)
                            .unwrap()
                            .retention_time_min,
                    )
                })
                .collect();
            GcScoutRun {
                name: format!("run {spec}"),
                program,
                peaks: table(&rows),
            }
        })
        .collect()
}

fn request(runs: Vec<GcScoutRun>) -> GcScoutRequest {
    GcScoutRequest {
        runs,
        holdup_time_min: TM,
        max_temperature_c: Some(325.0),
    }
}

#[test]
fn isothermal_elution_is_t_m_times_one_plus_k() {
    // tR = t_M (1 + k) at constant temperature (definition of k).
    let p = VantHoffParameters {
        a: -10.0,
        b_k: 5000.0,
    };
    let prog = OvenProgram::parse("120:60").unwrap();
    let k = p.ln_k(120.0 + KELVIN).exp();
    let e = programmed_elution(&p, &prog, 1.5).unwrap();
    assert!((e.retention_time_min - 1.5 * (1.0 + k)).abs() < 1e-12);
    assert_eq!(e.phase, OvenPhase::InitialHold);
}

#[test]
fn an_unretained_band_at_a_constant_rate_matches_the_closed_form() {
    // B = 0: k is constant (= e^A) and the ramp does not matter: tR = t_M (1 + k) exactly,
    // which checks the Simpson panels and the crossing solve through the ramp.
    let p = VantHoffParameters { a: 1.5, b_k: 0.0 };
    let prog = OvenProgram::parse("50:0.5,7:300:5").unwrap();
    let e = programmed_elution(&p, &prog, 1.0).unwrap();
    assert!(
        (e.retention_time_min - (1.0 + 1.5_f64.exp())).abs() < 1e-10,
        "{e:?}"
    );
    assert_eq!(e.phase, OvenPhase::Ramp);
}

#[test]
fn ramp_step_is_converged() {
    // The 0.5 K Simpson step against a 20-times finer integration (0.025 K): elution times
    // agree within 1e-6 min for every invented analyte at slow and fast ramps.
    for spec in ["40:1,3:300:5", "40:1,25:300:5", "90:0,10:300:10"] {
        let prog = OvenProgram::parse(spec).unwrap();
        for (_, p) in truth() {
            let coarse = elution_with_step(&p, &prog, TM, RAMP_STEP_K).unwrap();
            let fine = elution_with_step(&p, &prog, TM, RAMP_STEP_K / 20.0).unwrap();
            let d = (coarse.retention_time_min - fine.retention_time_min).abs();
            assert!(d < 1e-6, "{spec}: {d} min");
        }
    }
}

#[test]
fn elution_in_the_final_hold_continues_at_the_final_temperature() {
    // A strongly retained invented analyte under a program ending at 100 °C.
    let p = VantHoffParameters {
        a: -14.0,
        b_k: 7500.0,
    };
    let prog = OvenProgram::parse("40:1,10:100:2").unwrap();
    let e = programmed_elution(&p, &prog, TM).unwrap();
    assert_eq!(e.phase, OvenPhase::FinalHold);
    assert!(e.after_program_end);
    assert!((e.elution_temperature_c - 100.0).abs() < 1e-9);
    // Never-eluting parameters are an error, not a silent number.
    let stuck = VantHoffParameters {
        a: 0.0,
        b_k: 9000.0,
    };
    assert!(matches!(
        programmed_elution(&stuck, &prog, TM),
        Err(GcScoutError::NotEluted { .. })
    ));
}

#[test]
fn two_ramps_recover_parameters() {
    // Self-consistency: simulate, fit, recover (no published worked example used).
    let runs = simulate(&truth(), &["40:1,5:300:5", "40:1,15:300:5"]);
    let f = fit_gc(&request(runs)).unwrap();
    for ((_, t), a) in truth().iter().zip(&f.analytes) {
        assert!((a.b_k - t.b_k).abs() < 1e-3, "{a:?}");
        assert!((a.a - t.a).abs() < 1e-5, "{a:?}");
        assert!(a.rms_residual_min < 1e-7, "{a:?}");
        assert!(a.flags.is_empty(), "{:?}", a.flags);
        assert!(a.b_uncertainty_k.is_finite() && a.b_uncertainty_k > 0.0);
        assert!(a.correlation.abs() <= 1.0 + 1e-9);
    }
}

#[test]
fn initial_temperatures_alone_identify_the_parameters() {
    // Same ramp, initial temperatures 40 and 80 °C with 3 runs (one with another rate).
    let runs = simulate(
        &truth(),
        &["40:2,10:300:5", "80:2,10:300:5", "60:0,20:300:5"],
    );
    let f = fit_gc(&request(runs)).unwrap();
    for ((_, t), a) in truth().iter().zip(&f.analytes) {
        assert!((a.b_k - t.b_k).abs() < 1e-2, "{a:?}");
        assert!(a.flags.is_empty(), "{:?}", a.flags);
    }
}

#[test]
fn two_isothermal_runs_give_the_van_t_hoff_line() {
    let t = vec![
        (
            "inv-a",
            VantHoffParameters {
                a: -10.0,
                b_k: 5000.0,
            },
        ),
        (
            "inv-b",
            VantHoffParameters {
                a: -10.5,
                b_k: 5400.0,
            },
        ),
    ];
    let runs = simulate(&t, &["100:120", "130:120"]);
    let f = fit_gc(&request(runs)).unwrap();
    for ((_, t), a) in t.iter().zip(&f.analytes) {
        assert!((a.b_k - t.b_k).abs() < 1e-3, "{a:?}");
    }
}

#[test]
fn the_same_program_twice_is_not_identifiable() {
    // Differ only in the final temperature: the peaks carry no extra information.
    let mut runs = simulate(&truth(), &["40:1,10:300:5", "40:1,10:280:5"]);
    runs[1].name = "repeat".into();
    let e = fit_gc(&request(runs)).unwrap_err().to_string();
    assert!(
        e.contains("not identifiable") && e.contains("repeat"),
        "{e}"
    );
}

#[test]
fn bad_inputs_name_the_value() {
    let runs = simulate(&truth(), &["40:1,5:300:5", "40:1,15:300:5"]);
    // Missing peak.
    let mut r = runs.clone();
    r[1].peaks = table(&[("inv-g1", 10.0), ("inv-g2", 12.0), ("inv-g3", 14.0)]);
    let e = fit_gc(&request(r)).unwrap_err().to_string();
    assert!(e.contains("inv-g4") && e.contains("missing"), "{e}");
    // Peak before t_M.
    let mut r = runs.clone();
    r[0].peaks = table(&[
        ("inv-g1", 1.1),
        ("inv-g2", 12.0),
        ("inv-g3", 14.0),
        ("inv-g4", 16.0),
    ]);
    let e = fit_gc(&request(r)).unwrap_err().to_string();
    assert!(e.contains("inv-g1") && e.contains("1.1"), "{e}");
    // Above the phase limit.
    let mut req = request(runs.clone());
    req.max_temperature_c = Some(250.0);
    let e = fit_gc(&req).unwrap_err().to_string();
    assert!(e.contains("300") && e.contains("250"), "{e}");
    // One run.
    let e = fit_gc(&request(runs[..1].to_vec())).unwrap_err();
    assert!(matches!(e, GcScoutError::TooFewRuns { count: 1 }));
    // Bad t_M.
    let mut req = request(runs);
    req.holdup_time_min = -1.0;
    assert!(fit_gc(&req).unwrap_err().to_string().contains("-1"));
}

#[test]
fn inconsistent_retention_is_flagged_not_hidden() {
    // Swap one analyte's times between runs: the later time under the faster ramp cannot
    // be fitted with B > 0 and a small residual.
    let mut runs = simulate(&truth(), &["40:1,5:300:5", "40:1,15:300:5"]);
    let t_slow = runs[0].peaks.get("inv-g2").unwrap().retention_time_min;
    let t_fast = runs[1].peaks.get("inv-g2").unwrap().retention_time_min;
    let swap = |run: &GcScoutRun, t: f64| {
        let rows: Vec<(String, f64)> = run
            .peaks
            .peaks()
            .iter()
            .map(|p| {
                let v = if p.name == "inv-g2" {
                    t
                } else {
                    p.retention_time_min
                };
                (p.name.clone(), v)
            })
            .collect();
        let r: Vec<(&str, f64)> = rows.iter().map(|(n, t)| (n.as_str(), *t)).collect();
        table(&r)
    };
    runs[0].peaks = swap(&runs[0], t_fast);
    runs[1].peaks = swap(&runs[1], t_slow);
    let f = fit_gc(&request(runs)).unwrap();
    let g2 = &f.analytes[1];
    assert!(!g2.flags.is_empty(), "{g2:?}");
    assert!(f.analytes[0].flags.is_empty());
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(64))]
    /// Physical sense of the migration integral for arbitrary invented parameters and
    /// programs: the band never leaves before t_M, more retention (larger A) never elutes
    /// earlier, and a faster ramp from the same start never elutes later.
    #[test]
    fn elution_is_monotone(
        a in -16.0f64..-6.0,
        b in 2000.0f64..9000.0,
        t0 in 30.0f64..120.0,
        hold in 0.0f64..3.0,
        ramp in 1.0f64..30.0,
        tm in 0.5f64..3.0,
    ) {
        let p = VantHoffParameters { a, b_k: b };
        let slow = OvenProgram::new(t0, hold, ramp, 350.0, 30.0).unwrap();
        let fast = OvenProgram::new(t0, hold, ramp * 1.5, 350.0, 30.0).unwrap();
        if let (Ok(e), Ok(more), Ok(f)) = (
            programmed_elution(&p, &slow, tm),
            programmed_elution(&VantHoffParameters { a: a + 0.5, b_k: b }, &slow, tm),
            programmed_elution(&p, &fast, tm),
        ) {
            proptest::prop_assert!(e.retention_time_min > tm);
            proptest::prop_assert!(more.retention_time_min >= e.retention_time_min - 1e-9);
            proptest::prop_assert!(f.retention_time_min <= e.retention_time_min + 1e-9);
            proptest::prop_assert!(e.elution_temperature_c >= t0 - 1e-9);
            proptest::prop_assert!(e.elution_temperature_c <= 350.0 + 1e-9);
        }
    }
}

#[test]
fn apparent_plates_invert_the_width_model() {
    let p = truth()[2].1;
    let prog = OvenProgram::parse("40:1,10:300:5").unwrap();
    let e = programmed_elution(&p, &prog, TM).unwrap();
    let n = 120_000.0;
    let w = 4.0 * TM * (1.0 + e.retention_factor_at_elution) / f64::sqrt(n);
    let got = apparent_plates(&p, &prog, TM, Some(w), None).unwrap();
    assert!((got - n).abs() < 1e-6 * n);
    // Half-height width of a Gaussian: w½ = 2.3548 σ, w_base = 4 σ.
    let half = w / 4.0 * 2.354_820_045;
    let got = apparent_plates(&p, &prog, TM, None, Some(half)).unwrap();
    assert!((got - n).abs() < 1e-6 * n, "{got}");
}
