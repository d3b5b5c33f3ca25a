use super::*;
use proptest::prelude::*;

/// Agreement required between the numerical integration and the closed form, min.
const CLOSED_FORM_TOL_MIN: f64 = 1e-4;

fn sys(t0: f64, td: f64) -> GradientSystem {
    GradientSystem {
        dead_time_min: t0,
        dwell_time_min: td,
    }
}

#[test]
fn parser_accepts_and_interpolates() {
    let p = GradientProgram::parse(" 0:5 ,2:5%, 12:95 ,15:95").unwrap();
    assert_eq!(p.points().len(), 4);
    assert_eq!(p.organic_pct_at(-1.0), 5.0);
    assert_eq!(p.organic_pct_at(1.0), 5.0);
    assert!((p.organic_pct_at(7.0) - 50.0).abs() < 1e-12);
    assert_eq!(p.organic_pct_at(100.0), 95.0);
    assert_eq!(p.first_change_min(), Some(2.0));
    assert_eq!(p.last_change_min(), Some(12.0));
    let back = GradientProgram::parse(&p.to_spec()).unwrap();
    assert_eq!(back, p);
}

#[test]
fn parser_errors_name_the_token() {
    let cases = [
        ("", "empty"),
        ("0:5", "at least 2"),
        ("0:5,10", "`10`"),
        ("0:5,x:95", "`x`"),
        ("0:5,10:abc", "`abc`"),
        ("0:5,10:101", "101"),
        ("0:-1,10:50", "-1"),
        ("-1:5,10:50", "-1"),
        ("0:5,10:50,10:60", "10:60"),
        ("0:5,10:50,8:60", "8:60"),
        ("0:5,inf:50", "inf"),
        ("0:5,10:NaN", "NaN"),
    ];
    for (spec, needle) in cases {
        let err = GradientProgram::parse(spec).unwrap_err().to_string();
        assert!(err.contains(needle), "{spec}: {err}");
    }
}

#[test]
fn serde_round_trip_validates() {
    let p = GradientProgram::parse("0:10,20:90").unwrap();
    let j = serde_json::to_string(&p).unwrap();
    assert_eq!(j, "\"0:10,20:90\"");
    let q: GradientProgram = serde_json::from_str(&j).unwrap();
    assert_eq!(p, q);
    assert!(serde_json::from_str::<GradientProgram>("\"0:10,0:90\"").is_err());
}

#[test]
fn single_segment_matches_closed_form_without_dwell() {
    // Self-consistency with SD 2007 ch. 2 closed form: with tD = 0 the exact and simplified
    // forms coincide. Invented analyte: log kw = 3, S = 4; gradient 5–95 % in 20 min, t0 = 1.
    let a = LssParameters {
        log_kw: 3.0,
        s: 4.0,
    };
    let p = GradientProgram::linear(5.0, 95.0, 20.0).unwrap();
    let s = sys(1.0, 0.0);
    let b = gradient_steepness(1.0, 0.9, 4.0, 20.0).unwrap();
    let k0 = 10f64.powf(3.0 - 4.0 * 0.05);
    let closed = linear_gradient_retention_time(1.0, 0.0, k0, b).unwrap();
    let exact = gradient_elution(&a, &p, &s).unwrap();
    let numeric = gradient_elution_numeric(&a, &p, &s, 1e-7).unwrap();
    assert!((exact.retention_time_min - closed).abs() < 1e-9);
    assert!((numeric.retention_time_min - closed).abs() < CLOSED_FORM_TOL_MIN);
    assert_eq!(exact.phase, ElutionPhase::DuringGradient);
    // k at elution = 1/(2.3 b + 1/k0) → 1/(2.3 b) for k0 ≫ k* (SD 2007 ch. 2).
    assert!((exact.retention_factor_at_elution - 1.0 / (LN_10 * b + 1.0 / k0)).abs() < 1e-9);
}

#[test]
fn dwell_adds_delay_and_matches_exact_closed_form() {
    // Closed form with dwell (derived in the module docs): tR = (t0/b) log10(2.303 b (k0 − tD/t0) + 1) + t0 + tD.
    let a = LssParameters {
        log_kw: 2.5,
        s: 5.0,
    };
    let p = GradientProgram::linear(10.0, 90.0, 15.0).unwrap();
    let (t0, td) = (0.8, 1.2);
    let b = t0 * 0.8 * 5.0 / 15.0;
    let k0 = 10f64.powf(2.5 - 5.0 * 0.1);
    let closed = t0 / b * (LN_10 * b * (k0 - td / t0) + 1.0).log10() + t0 + td;
    let exact = gradient_elution(&a, &p, &sys(t0, td)).unwrap();
    let numeric = gradient_elution_numeric(&a, &p, &sys(t0, td), 1e-7).unwrap();
    assert!((exact.retention_time_min - closed).abs() < 1e-9);
    assert!((numeric.retention_time_min - closed).abs() < CLOSED_FORM_TOL_MIN);
    // Snyder's simplified form differs by a little when tD ≪ t0 k0 (here tD/(t0 k0) = 0.015).
    let simple = linear_gradient_retention_time(t0, td, k0, b).unwrap();
    assert!((simple - closed).abs() < 0.05, "{simple} vs {closed}");
}

#[test]
fn weakly_retained_analyte_elutes_during_dwell() {
    // k0 = 10^(0.5 − 2×0.05) = 2.51; t0 k0 = 2.51 min < tD = 3 min → isocratic: tR = t0(1+k0).
    let a = LssParameters {
        log_kw: 0.5,
        s: 2.0,
    };
    let p = GradientProgram::linear(5.0, 95.0, 10.0).unwrap();
    let e = gradient_elution(&a, &p, &sys(1.0, 3.0)).unwrap();
    let k0 = 10f64.powf(0.4);
    assert!((e.retention_time_min - (1.0 + k0)).abs() < 1e-9);
    assert_eq!(e.phase, ElutionPhase::BeforeGradient);
}

#[test]
fn strongly_retained_analyte_elutes_in_final_hold() {
    let a = LssParameters {
        log_kw: 8.0,
        s: 5.0,
    };
    let p = GradientProgram::parse("0:5,10:50,20:50").unwrap();
    let e = gradient_elution(&a, &p, &sys(1.0, 0.5)).unwrap();
    assert_eq!(e.phase, ElutionPhase::AfterGradient);
    assert!(e.retention_time_min > 21.5);
    let n = gradient_elution_numeric(&a, &p, &sys(1.0, 0.5), 1e-7).unwrap();
    assert!((n.retention_time_min - e.retention_time_min).abs() < CLOSED_FORM_TOL_MIN);
}

#[test]
fn multi_segment_numeric_matches_exact() {
    let p = GradientProgram::parse("0:5,2:5,8:40,14:90,16:90").unwrap();
    for (lk, s) in [(1.5, 3.0), (3.0, 4.5), (4.0, 6.0), (6.0, 8.0), (9.0, 10.0)] {
        let a = LssParameters { log_kw: lk, s };
        let e = gradient_elution(&a, &p, &sys(1.2, 0.7)).unwrap();
        let n = gradient_elution_numeric(&a, &p, &sys(1.2, 0.7), 1e-7).unwrap();
        assert!(
            (n.retention_time_min - e.retention_time_min).abs() < CLOSED_FORM_TOL_MIN,
            "{lk},{s}: {} vs {}",
            n.retention_time_min,
            e.retention_time_min
        );
    }
}

#[test]
fn decreasing_segment_is_handled() {
    // A re-equilibration step back to low % organic: numeric and exact agree.
    let p = GradientProgram::parse("0:60,5:20,15:20").unwrap();
    let a = LssParameters {
        log_kw: 2.0,
        s: 3.0,
    };
    let e = gradient_elution(&a, &p, &sys(1.0, 0.0)).unwrap();
    let n = gradient_elution_numeric(&a, &p, &sys(1.0, 0.0), 1e-7).unwrap();
    assert!((n.retention_time_min - e.retention_time_min).abs() < CLOSED_FORM_TOL_MIN);
}

#[test]
fn numeric_with_absurd_tolerance_terminates() {
    // Regression: a tolerance below f64 resolution must not loop forever.
    let a = LssParameters {
        log_kw: 3.0,
        s: 4.0,
    };
    let p = GradientProgram::linear(5.0, 95.0, 20.0).unwrap();
    let e = gradient_elution(&a, &p, &sys(1.0, 0.0)).unwrap();
    let n = gradient_elution_numeric(&a, &p, &sys(1.0, 0.0), 1e-300).unwrap();
    assert!((n.retention_time_min - e.retention_time_min).abs() < CLOSED_FORM_TOL_MIN);
}

#[test]
fn never_eluting_analyte_is_an_error() {
    let a = LssParameters {
        log_kw: 400.0,
        s: 1.0,
    };
    let p = GradientProgram::linear(5.0, 95.0, 10.0).unwrap();
    assert!(matches!(
        gradient_elution(&a, &p, &sys(1.0, 0.0)),
        Err(GradientError::DoesNotElute { .. })
    ));
}

#[test]
fn k_star_and_width_hand_computed() {
    // b = 1 × 0.9 × 4 / 20 = 0.18; k* = 1/(1.15 × 0.18) = 4.831.
    let b = gradient_steepness(1.0, 0.9, 4.0, 20.0).unwrap();
    assert!((b - 0.18).abs() < 1e-12);
    assert!((gradient_retention_factor(b).unwrap() - 4.830_917).abs() < 1e-5);
    // w = 4 × 1 × (1 + 2)/√10000 = 0.12 min.
    assert!((gradient_peak_width_min(1.0, 2.0, 10_000.0).unwrap() - 0.12).abs() < 1e-12);
}

#[test]
fn isocratic_equivalent_recovers_k_star() {
    let a = LssParameters {
        log_kw: 3.0,
        s: 4.0,
    };
    let p = GradientProgram::linear(5.0, 95.0, 20.0).unwrap();
    let eq = isocratic_equivalent(&a, &p, &sys(1.0, 0.0)).unwrap();
    let k_star = eq.gradient_retention_factor.unwrap();
    let phi = eq.isocratic_organic_for_same_k_pct.unwrap() / 100.0;
    assert!((10f64.powf(3.0 - 4.0 * phi) - k_star).abs() < 1e-9);
    // k* (midpoint) lies between k at elution and k0.
    assert!(k_star > eq.elution.retention_factor_at_elution);
}

proptest! {
    #[test]
    fn parser_never_panics(s in "\\PC{0,60}") {
        let _ = GradientProgram::parse(&s);
    }

    #[test]
    fn parser_never_panics_on_near_valid(s in "[0-9:.,%e +-]{0,40}") {
        if let Ok(p) = GradientProgram::parse(&s) {
            prop_assert!(p.points().len() >= 2);
            prop_assert!(p.points().windows(2).all(|w| w[0].time_min < w[1].time_min));
        }
    }

    #[test]
    fn valid_programs_round_trip(
        steps in proptest::collection::vec((0.001f64..30.0, 0.0f64..=100.0), 2..8),
    ) {
        let mut t = 0.0;
        let pts: Vec<GradientPoint> = steps
            .iter()
            .map(|(dt, pct)| {
                t += dt;
                GradientPoint { time_min: t, organic_pct: *pct }
            })
            .collect();
        let p = GradientProgram::from_points(&pts).unwrap();
        prop_assert_eq!(GradientProgram::parse(&p.to_spec()).unwrap(), p);
    }

    #[test]
    fn gradient_tr_increases_with_log_kw(
        lk in 0.0f64..6.0, dlk in 0.01f64..2.0, s in 1.0f64..10.0,
        tg in 2.0f64..60.0, td in 0.0f64..3.0,
    ) {
        let p = GradientProgram::linear(5.0, 95.0, tg).unwrap();
        let sy = sys(1.0, td);
        let e1 = gradient_elution(&LssParameters { log_kw: lk, s }, &p, &sy).unwrap();
        let e2 = gradient_elution(&LssParameters { log_kw: lk + dlk, s }, &p, &sy).unwrap();
        prop_assert!(e2.retention_time_min > e1.retention_time_min);
    }

    #[test]
    fn exact_and_numeric_agree(
        lk in 0.0f64..7.0, s in 1.0f64..12.0, tg in 2.0f64..40.0, td in 0.0f64..3.0,
    ) {
        let p = GradientProgram::linear(5.0, 95.0, tg).unwrap();
        let a = LssParameters { log_kw: lk, s };
        let e = gradient_elution(&a, &p, &sys(1.0, td)).unwrap();
        let n = gradient_elution_numeric(&a, &p, &sys(1.0, td), 1e-7).unwrap();
        prop_assert!((e.retention_time_min - n.retention_time_min).abs() < CLOSED_FORM_TOL_MIN);
    }
}
