use super::*;
use crate::model::features::AnalyteFeatures;

fn sys(mode: Mode, grad: &[(f64, f64)], dwell: f64) -> LcSystem {
    LcSystem {
        mode,
        chem_class: ChemClass::C18,
        modifier: Modifier::Acetonitrile,
        ph: Some(2.7),
        additive: Additive::FormicAcid,
        gradient: grad
            .iter()
            .map(|&(t, p)| GradientPoint {
                time_min: t,
                organic_pct: p,
            })
            .collect(),
        t0_min: 1.0,
        dwell_min: dwell,
        flow_ml_min: 0.4,
        temperature_c: Some(40.0),
    }
}

#[test]
fn isocratic_retention_matches_lss_k() {
    // Isocratic: tR = t0 (1 + k), k = 10^{S(psi1 − psi)} (LSS definition).
    let s = sys(Mode::ReversedPhase, &[(0.0, 40.0)], 0.0);
    let (sv, psi1) = (4.0, 0.55);
    let k = 10f64.powf(sv * (psi1 - 0.40));
    let rt = rt_from_psi(&s, sv, psi1);
    assert!((rt - (1.0 + k)).abs() < 1e-9, "{rt} vs {}", 1.0 + k);
}

#[test]
fn linear_gradient_matches_lss_closed_form() {
    // Linear gradient without hold: tR = (t0/b) log10(2.3 k0 b + 1) + t0 with
    // b = S Δφ t0 / tG and k0 = k at the start (Snyder & Dolan 2007, eq. for tR; from memory).
    let s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 0.0);
    let (sv, psi1) = (5.0, 0.5);
    let k0 = 10f64.powf(sv * (psi1 - 0.05));
    let b = sv * 0.9 * 1.0 / 20.0;
    let expected = (1.0 / b) * (std::f64::consts::LN_10 * k0 * b + 1.0).log10() + 1.0;
    let rt = rt_from_psi(&s, sv, psi1);
    assert!((rt - expected).abs() < 1e-3, "{rt} vs {expected}");
}

#[test]
fn dwell_delays_elution_by_at_most_the_dwell_time() {
    let a = sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 0.0);
    let b = sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 2.0);
    let ra = rt_from_psi(&a, 5.0, 0.5);
    let rb = rt_from_psi(&b, 5.0, 0.5);
    assert!(rb > ra && rb <= ra + 2.0 + 1e-9);
}

proptest::proptest! {
    #[test]
    fn psi_rt_round_trip(psi in -0.3f64..1.2, sv in 2.0f64..10.0, dwell in 0.0f64..3.0,
                         hold in 0.0f64..5.0, hilic in proptest::bool::ANY) {
        let mode = if hilic { Mode::Hilic } else { Mode::ReversedPhase };
        let g = if hilic { [(0.0, 95.0), (hold, 95.0), (hold + 15.0, 40.0), (hold + 20.0, 40.0)] }
                else { [(0.0, 5.0), (hold, 5.0), (hold + 15.0, 100.0), (hold + 20.0, 100.0)] };
        let s = sys(mode, &g, dwell);
        let rt = rt_from_psi(&s, sv, psi);
        proptest::prop_assert!(rt > s.t0_min);
        let back = psi_from_rt(&s, sv, rt).unwrap();
        proptest::prop_assert!((back - psi).abs() < 1e-6, "{} vs {}", back, psi);
    }

    #[test]
    fn retention_increases_with_psi(psi in -0.3f64..1.1, d in 0.001f64..0.2) {
        let s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (2.0, 5.0), (12.0, 95.0)], 0.5);
        proptest::prop_assert!(rt_from_psi(&s, 4.0, psi + d) > rt_from_psi(&s, 4.0, psi));
    }
}

#[test]
fn bad_systems_are_errors_naming_the_value() {
    let mut s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (10.0, 95.0)], 0.0);
    s.t0_min = -1.0;
    assert!(s.validate().unwrap_err().to_string().contains("-1"));
    let mut s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (10.0, 195.0)], 0.0);
    assert!(s.validate().unwrap_err().to_string().contains("195"));
    s.gradient = vec![];
    assert!(s.validate().is_err());
    let s = sys(Mode::ReversedPhase, &[(1.0, 5.0)], 0.0);
    assert!(s.validate().is_err());
    assert!(psi_from_rt(&sys(Mode::ReversedPhase, &[(0.0, 5.0)], 0.0), 4.0, 0.5).is_err());
}

#[test]
fn flow_programs_map_to_volume_equivalent_time_and_back() {
    // Flow doubles at 10 min: after 20 min, 10·F + 10·2F = 30·F of eluent has passed,
    // i.e. 30 min at the nominal flow F (definition of τ).
    let ts = TrainingSystem {
        id: "x".into(),
        system: sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 0.0),
        gradient_duration_min: 20.0,
        flow_program: vec![(0.0, 0.4), (10.0, 0.4), (10.0, 0.8)],
    };
    assert!((ts.volume_time(5.0) - 5.0).abs() < 1e-12);
    assert!((ts.volume_time(20.0) - 30.0).abs() < 1e-9);
    assert!((ts.real_time(30.0) - 20.0).abs() < 1e-6);
    // A linear ramp 0.4 → 0.8 over 10 min: mean flow 0.6, τ(10) = 15 min.
    let ramp = TrainingSystem {
        flow_program: vec![(0.0, 0.4), (10.0, 0.8)],
        ..ts.clone()
    };
    assert!((ramp.volume_time(10.0) - 15.0).abs() < 1e-9);
    let constant = TrainingSystem {
        flow_program: Vec::new(),
        ..ts
    };
    assert_eq!(constant.volume_time(7.5), 7.5);
    assert_eq!(constant.real_time(7.5), 7.5);
}

#[test]
fn normal_cdf_reference_values() {
    // Φ(0) = 0.5, Φ(1.959964) = 0.975 (standard normal table, from memory).
    assert!((normal_cdf(0.0) - 0.5).abs() < 1e-7);
    assert!((normal_cdf(1.959_964) - 0.975).abs() < 1e-6);
    assert!((normal_cdf(-1.959_964) - 0.025).abs() < 1e-6);
}

#[test]
fn program_parser_rejects_garbage() {
    assert_eq!(parse_program("0:5;10:95").unwrap().len(), 2);
    assert!(parse_program("0:5;x:95").is_err());
    assert!(parse_program("0-5").is_err());
}

#[test]
fn folds_are_deterministic_and_balanced() {
    let a = system_folds(23, 5, 7);
    assert_eq!(a, system_folds(23, 5, 7));
    for f in 0..5 {
        let n = a.iter().filter(|&&x| x == f).count();
        assert!((4..=5).contains(&n));
    }
    assert_ne!(a, system_folds(23, 5, 8));
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(48))]
    /// On reversed phase, predicted retention grows along a homologous series (n-alkyl
    /// benzenes, one CH2 at a time) under any sensible gradient, pH and modifier: the
    /// methylene increment is positive on every RP phase (common practice, no source).
    #[test]
    fn retention_grows_along_a_homologous_series_on_rp(
        start in 0.0f64..40.0,
        end in 80.0f64..100.0,
        tg in 5.0f64..60.0,
        t0 in 0.3f64..3.0,
        ph in 2.0f64..8.0,
        methanol in proptest::bool::ANY,
    ) {
        let model = Model::load_builtin().unwrap();
        let mut system = sys(Mode::ReversedPhase, &[(0.0, start), (tg, end)], 0.0);
        system.t0_min = t0;
        system.ph = Some(ph);
        system.modifier = if methanol { Modifier::Methanol } else { Modifier::Acetonitrile };
        let mut last = f64::NEG_INFINITY;
        for n in 1..=8 {
            let smiles = format!("{}c1ccccc1", "C".repeat(n));
            let f = AnalyteFeatures::from_smiles(&smiles, None).unwrap();
            let p = model.predict(&f, &system).unwrap();
            proptest::prop_assert!(
                p.rt_min > last,
                "C{n}-benzene at {} min after {} min", p.rt_min, last
            );
            last = p.rt_min;
        }
    }
}
