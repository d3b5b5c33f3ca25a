//! Tests of the GC retention model. Reference values are boiling points and indices from memory
//! of handbook tables and McReynolds (1970), as stated beside each check.

use super::boiling_point::*;
use super::ladder::*;
use super::*;
use crate::phase::{Catalogue, McReynoldsConstants, StationaryPhase};
use proptest::prelude::*;

fn phase(id: &str) -> &'static StationaryPhase {
    match Catalogue::builtin().and_then(|c| c.phase(id)) {
        Ok(phase) => phase,
        Err(err) => panic!("{err}"),
    }
}

fn liquid_gc_phases() -> Vec<&'static StationaryPhase> {
    Catalogue::builtin()
        .map(|c| {
            c.phases_by_mode(PhaseMode::Gc)
                .filter(|p| p.gc().is_some_and(|g| g.mcreynolds().is_some()))
                .collect()
        })
        .unwrap_or_default()
}

fn ri(analyte: &GcAnalyte, id: &str) -> RetentionIndexPrediction {
    match predict_retention_index(analyte, phase(id)) {
        Ok(p) => p,
        Err(err) => panic!("{err}"),
    }
}

/// An analyte with a handbook boiling point (sigma 0.5 K).
fn analyte(tb_k: f64, molar_mass_g_mol: f64) -> GcAnalyte {
    GcAnalyte {
        tb_k,
        tb_sigma_k: 0.5,
        molar_mass_g_mol,
        ..GcAnalyte::default()
    }
}

fn aromatic(tb_k: f64, molar_mass_g_mol: f64, substitution: RingSubstitution) -> GcAnalyte {
    GcAnalyte {
        n_aromatic_rings: 1,
        ring_substitution: substitution,
        ..analyte(tb_k, molar_mass_g_mol)
    }
}

fn alcohol(tb_k: f64, molar_mass_g_mol: f64) -> GcAnalyte {
    GcAnalyte {
        n_hydroxyl: 1,
        ..analyte(tb_k, molar_mass_g_mol)
    }
}

fn n_alkane(n: u32) -> GcAnalyte {
    GcAnalyte {
        is_n_alkane_carbon_count: Some(n),
        ..analyte(
            alkane_boiling_point_k(f64::from(n)),
            14.027 * f64::from(n) + 2.016,
        )
    }
}

fn standard_column() -> GcColumn {
    match GcColumn::new(30.0, 0.25, 0.25, 35.0) {
        Ok(c) => c,
        Err(err) => panic!("{err}"),
    }
}

fn program(final_c: f64) -> OvenProgram {
    match OvenProgram::new(40.0, 1.0, 10.0, final_c, 5.0) {
        Ok(p) => p,
        Err(err) => panic!("{err}"),
    }
}

#[test]
fn n_alkanes_have_index_100_n_on_every_phase() {
    // Kovats definition: I(n-alkane with n carbons) = 100 n on any phase.
    let phases = liquid_gc_phases();
    assert!(phases.len() >= 9);
    for p in phases {
        for n in [1, 5, 10, 22, 40] {
            let prediction = ri(&n_alkane(n), p.id());
            assert_eq!(
                prediction.retention_index,
                100.0 * f64::from(n),
                "{}",
                p.id()
            );
            assert_eq!(prediction.sigma_ri, 0.0);
        }
    }
}

#[test]
fn alkane_boiling_points_match_handbook_values() {
    // Handbook n-alkane boiling points (from memory, CRC tables): hexane 341.9 K, octane 398.8 K,
    // decane 447.3 K, hexadecane 560.0 K, eicosane 616.9 K. Tolerance 2 K.
    for (n, tb) in [
        (6.0, 341.9),
        (8.0, 398.8),
        (10.0, 447.3),
        (16.0, 560.0),
        (20.0, 616.9),
    ] {
        assert!((alkane_boiling_point_k(n) - tb).abs() < 2.0, "C{n}");
        let back = alkane_equivalent_carbon_number(alkane_boiling_point_k(n)).unwrap_or(f64::NAN);
        assert!((back - n).abs() < 1e-9);
    }
    // The Tb route alone puts n-alkanes within 2 index units of 100 n.
    let decane = analyte(447.3, 142.3);
    assert!((ri(&decane, "gc-dimethyl").retention_index - 1000.0).abs() < 5.0);
}

#[test]
fn mcreynolds_probes_reproduce_their_definition() {
    // McReynolds (1970), squalane indices from memory: benzene 653, 1-butanol 590,
    // 2-pentanone 627, 1-nitropropane 652, pyridine 699. On each phase the probe's index must be
    // the squalane value plus that phase's constant (tolerance 10 index units).
    let probes: [(GcAnalyte, f64, usize); 5] = [
        (
            aromatic(353.2, 78.1, RingSubstitution::NotApplicable),
            653.0,
            0,
        ),
        (alcohol(390.9, 74.1), 590.0, 1),
        (
            GcAnalyte {
                n_carbonyl: 1,
                ..analyte(375.4, 86.1)
            },
            627.0,
            2,
        ),
        (
            GcAnalyte {
                n_nitro: 1,
                ..analyte(404.4, 89.1)
            },
            652.0,
            3,
        ),
        (
            GcAnalyte {
                n_aromatic_rings: 1,
                n_pyridine_like: 1,
                ..analyte(388.4, 79.1)
            },
            699.0,
            4,
        ),
    ];
    for p in liquid_gc_phases() {
        let constants = p
            .gc()
            .and_then(|g| g.mcreynolds())
            .map(McReynoldsConstants::as_array);
        let constants = constants.unwrap_or([f64::NAN; 5]);
        for (probe, squalane, slot) in &probes {
            let predicted = ri(probe, p.id()).retention_index;
            let expected = squalane + constants[*slot];
            assert!(
                (predicted - expected).abs() < 10.0,
                "{}: probe {slot}: {predicted} vs {expected}",
                p.id()
            );
        }
    }
}

#[test]
fn homologous_alcohols_elute_in_boiling_point_order_on_a_non_polar_phase() {
    // 1-alkanols, boiling points from memory (handbook): ethanol 351.4 K, 1-propanol 370.4 K,
    // 1-butanol 390.9 K, 1-pentanol 411.1 K, 1-hexanol 430.6 K.
    let series = [
        (351.4, 46.1),
        (370.4, 60.1),
        (390.9, 74.1),
        (411.1, 88.1),
        (430.6, 102.2),
    ];
    let indices: Vec<f64> = series
        .iter()
        .map(|(tb, m)| ri(&alcohol(*tb, *m), "gc-dimethyl").retention_index)
        .collect();
    for pair in indices.windows(2) {
        // Each CH2 adds roughly 100 index units (common practice, no source): 60-140 accepted.
        let step = pair[1] - pair[0];
        assert!((60.0..140.0).contains(&step), "{indices:?}");
    }
}

#[test]
fn alkylbenzenes_elute_benzene_toluene_ethylbenzene_on_dimethylpolysiloxane() {
    // Boiling points from memory: benzene 353.2 K, toluene 383.8 K, ethylbenzene 409.3 K.
    // Typical indices on dimethylpolysiloxane (from memory): about 655, 760, 855; tolerance 30.
    let none = RingSubstitution::NotApplicable;
    let benzene = ri(&aromatic(353.2, 78.1, none), "gc-dimethyl");
    let toluene = ri(&aromatic(383.8, 92.1, none), "gc-dimethyl");
    let ethylbenzene = ri(&aromatic(409.3, 106.2, none), "gc-dimethyl");
    assert!(benzene.retention_index < toluene.retention_index);
    assert!(toluene.retention_index < ethylbenzene.retention_index);
    for (p, expected) in [(&benzene, 655.0), (&toluene, 760.0), (&ethylbenzene, 855.0)] {
        assert!((p.retention_index - expected).abs() < 30.0, "{p:?}");
        assert!(p.low_95_ri < p.retention_index && p.retention_index < p.high_95_ri);
    }
}

#[test]
fn m_and_p_xylene_coelute_on_non_polar_phases_but_not_on_polyethylene_glycol() {
    // Common practice, no source: m- and p-xylene co-elute on dimethylpolysiloxane and 5 % phenyl
    // phases and are separated on polyethylene glycol. Boiling points from memory: p-xylene
    // 411.5 K, m-xylene 412.3 K.
    let para = aromatic(411.5, 106.2, RingSubstitution::Para);
    let meta = aromatic(412.3, 106.2, RingSubstitution::Meta);
    for id in ["gc-dimethyl", "gc-5-phenyl"] {
        let (p, m) = (ri(&para, id), ri(&meta, id));
        let delta = (m.retention_index - p.retention_index).abs();
        assert!(
            delta < MIN_RESOLVABLE_DELTA_RI && delta < p.sigma_ri,
            "{id}: {delta}"
        );
        assert!(likely_coelute(&p, &m));
    }
    let (p, m) = (ri(&para, "gc-wax"), ri(&meta, "gc-wax"));
    assert!(
        m.retention_index - p.retention_index >= MIN_RESOLVABLE_DELTA_RI,
        "{p:?} {m:?}"
    );
    assert!(!likely_coelute(&p, &m));
}

#[test]
fn alcohols_are_retained_much_more_on_polyethylene_glycol() {
    // 1-butanol: about 650 on dimethylpolysiloxane and about 1140 on polyethylene glycol (from
    // memory of typical indices); the difference must exceed 300 units.
    let butanol = alcohol(390.9, 74.1);
    let pdms = ri(&butanol, "gc-dimethyl").retention_index;
    let peg = ri(&butanol, "gc-wax").retention_index;
    assert!(peg - pdms > 300.0, "{pdms} {peg}");
    assert!(
        (pdms - 650.0).abs() < 30.0 && (peg - 1140.0).abs() < 60.0,
        "{pdms} {peg}"
    );
}

#[test]
fn wrong_phases_and_bad_inputs_are_errors() {
    let toluene = aromatic(383.8, 92.1, RingSubstitution::NotApplicable);
    assert!(matches!(
        predict_retention_index(&toluene, phase("rp-c18")),
        Err(GcError::NotGcPhase { .. })
    ));
    assert!(matches!(
        predict_retention_index(&toluene, phase("gc-plot-alumina")),
        Err(GcError::NoMcReynolds { .. })
    ));
    let bad = GcAnalyte {
        tb_k: f64::NAN,
        ..toluene.clone()
    };
    let err = predict_retention_index(&bad, phase("gc-wax")).unwrap_err();
    assert!(err.to_string().contains("tb_k"), "{err}");
    let bad = GcAnalyte {
        molar_mass_g_mol: 0.0,
        ..toluene
    };
    assert!(predict_retention_index(&bad, phase("gc-wax")).is_err());
    assert!(OvenProgram::new(40.0, 1.0, -5.0, 200.0, 1.0).is_err());
    assert!(OvenProgram::new(200.0, 1.0, 5.0, 100.0, 1.0).is_err());
    assert!(GcColumn::new(30.0, 2.0, 0.25, 35.0).is_err());
    let hot = program(300.0);
    let err = alkane_ladder(phase("gc-wax"), &standard_column(), &hot).unwrap_err();
    assert!(matches!(err, GcError::AbovePhaseLimit { .. }), "{err}");
}

#[test]
fn ladder_elutes_alkanes_in_order_after_the_holdup_time() {
    let column = standard_column();
    let ladder = match alkane_ladder(phase("gc-dimethyl"), &column, &program(300.0)) {
        Ok(l) => l,
        Err(err) => panic!("{err}"),
    };
    let points = ladder.points();
    assert!(points.len() > 25, "{}", points.len());
    assert!(points[0].retention_time_min >= ladder.holdup_time_min());
    for pair in points.windows(2) {
        assert!(pair[1].retention_time_min > pair[0].retention_time_min);
        assert_eq!(pair[1].carbon_number, pair[0].carbon_number + 1);
    }
    // Rough plausibility (from memory of typical chromatograms, 30 m x 0.25 mm x 0.25 um, 40 C
    // + 10 C/min): decane elutes between 4 and 12 min, between 70 and 140 C.
    let decane = points[9];
    assert!(
        (4.0..12.0).contains(&decane.retention_time_min),
        "{decane:?}"
    );
    assert!(
        (70.0..140.0).contains(&decane.elution_temperature_c),
        "{decane:?}"
    );
    // van den Dool-Kratz: an alkane's own time gives exactly 100 n.
    for point in points {
        let index = ladder
            .retention_index_at(point.retention_time_min)
            .unwrap_or(f64::NAN);
        assert!((index - 100.0 * f64::from(point.carbon_number)).abs() < 1e-6);
    }
    assert!(matches!(
        ladder.retention_time_min(50.0),
        Err(GcError::OutsideLadder { .. })
    ));
}

#[test]
fn alkanes_come_out_earlier_on_polyethylene_glycol() {
    let column = standard_column();
    let time_c12 = |id: &str| {
        alkane_ladder(phase(id), &column, &program(240.0))
            .ok()
            .and_then(|l| l.retention_time_min(1200.0).ok())
            .unwrap_or(f64::NAN)
    };
    assert!(time_c12("gc-wax") < time_c12("gc-dimethyl"));
}

#[test]
fn retention_time_prediction_carries_interval_and_path() {
    let toluene = aromatic(383.8, 92.1, RingSubstitution::NotApplicable);
    let prediction = predict_retention_time(
        &toluene,
        phase("gc-5-phenyl"),
        &standard_column(),
        &program(300.0),
    );
    let Ok(p) = prediction else {
        panic!("{prediction:?}");
    };
    assert!(p.low_95_min < p.retention_time_min && p.retention_time_min < p.high_95_min);
    assert!(p.path.contains("van den Dool"));
    assert!(p.elution_temperature_c >= 40.0);
}

#[test]
fn suggested_program_elutes_the_range_within_the_phase_limit() {
    let column = standard_column();
    for id in ["gc-dimethyl", "gc-wax", "gc-6-cyanopropylphenyl"] {
        let p = phase(id);
        let Ok(suggestion) = suggest_oven_program(700.0, 1800.0, p, &column) else {
            panic!("no suggestion for {id}");
        };
        let program = suggestion.program;
        assert!(program.final_c() <= p.t_max_c());
        assert!(program.initial_c() >= 40.0);
        let ladder = alkane_ladder(p, &column, &program).ok();
        let last = ladder.and_then(|l| l.retention_time_min(1800.0).ok());
        assert!(
            last.is_some_and(|t| t < program.total_time_min()),
            "{id}: {program:?}"
        );
        assert!(!suggestion.reasons.is_empty());
    }
    assert!(suggest_oven_program(900.0, 800.0, phase("gc-dimethyl"), &column).is_err());
}

#[test]
fn oven_texts_name_the_bad_part() {
    for (text, want) in [
        ("40:2,10:x:5", "`x`"),
        ("40,10:250:5", "`40`"),
        ("40:2,10:250", "`10:250`"),
        ("40:2,10:250:5,5:300:1", "more than one ramp"),
        ("", "``"),
        ("40:2,0:250:5", "ramp_c_per_min"),
        ("250:2,10:40:5", "final_c"),
    ] {
        let e = OvenProgram::parse(text).unwrap_err().to_string();
        assert!(e.contains(want), "{text}: {e}");
    }
    let iso = OvenProgram::parse(" 120 : 15 ").unwrap();
    assert_eq!(
        (iso.initial_c(), iso.final_c(), iso.total_time_min()),
        (120.0, 120.0, 15.0)
    );
}

#[test]
fn an_isothermal_program_is_one_hold_within_the_limit() {
    // found by the oven_program fuzz target: accepted, but its text form `248:606` was not
    let err = OvenProgram::parse("248:511,0:248:95")
        .unwrap_err()
        .to_string();
    assert!(err.contains("606") && err.contains("600"), "{err}");
    let ok = OvenProgram::parse("248:500,0:248:95").unwrap();
    let back = OvenProgram::parse(&ok.to_spec()).unwrap();
    assert_eq!(
        (back.to_spec(), back.total_time_min()),
        (ok.to_spec(), ok.total_time_min())
    );
}

proptest! {
    #[test]
    fn any_accepted_oven_text_round_trips(
        t0 in -100.0f64..450.0, h0 in 0.0f64..600.0, r in 0.0f64..100.0,
        dt in 0.0f64..100.0, h1 in 0.0f64..600.0,
    ) {
        let text = format!("{t0}:{h0},{r}:{}:{h1}", t0 + dt);
        if let Ok(p) = OvenProgram::parse(&text) {
            let back = OvenProgram::parse(&p.to_spec());
            prop_assert!(back.is_ok(), "{text} -> {} rejected", p.to_spec());
        }
    }

    #[test]
    fn oven_texts_round_trip(t0 in -50.0f64..200.0, h0 in 0.0f64..20.0, r in 0.5f64..50.0, dt in 1.0f64..200.0, h1 in 0.0f64..20.0) {
        let p = OvenProgram::new(t0, h0, r, t0 + dt, h1).unwrap();
        let back = OvenProgram::parse(&p.to_spec()).unwrap();
        prop_assert_eq!(back, p);
    }

    #[test]
    fn any_oven_text_parses_or_errs_without_panic(text in "[0-9:,. x-]{0,24}") {
        let _ = OvenProgram::parse(&text);
    }

    #[test]
    fn index_rises_with_boiling_point(tb in 250.0f64..700.0, extra in 0.5f64..50.0, hydroxyl in 0u32..3) {
        let low = GcAnalyte { n_hydroxyl: hydroxyl, ..analyte(tb, 100.0) };
        let high = GcAnalyte { tb_k: tb + extra, ..low.clone() };
        for id in ["gc-dimethyl", "gc-wax"] {
            let (a, b) = (ri(&low, id), ri(&high, id));
            prop_assert!(b.retention_index > a.retention_index);
            prop_assert!(a.sigma_ri > 0.0 && a.sigma_ri.is_finite());
        }
    }

    #[test]
    fn program_temperature_stays_within_its_limits(time in -5.0f64..100.0) {
        let p = program(250.0);
        let t = p.temperature_c_at(time);
        prop_assert!((40.0..=250.0).contains(&t));
    }
}

#[test]
fn ladder_index_and_time_round_trip() {
    let ladder = alkane_ladder(
        phase("gc-14-cyanopropylphenyl"),
        &standard_column(),
        &program(280.0),
    );
    let Ok(ladder) = ladder else {
        panic!("{ladder:?}");
    };
    for index in [150.0, 555.5, 1234.0, 2010.0] {
        let time = ladder.retention_time_min(index).unwrap_or(f64::NAN);
        let back = ladder.retention_index_at(time).unwrap_or(f64::NAN);
        assert!((back - index).abs() < 1e-6, "{index} {back}");
    }
}

#[test]
fn analyte_deserialises_with_defaults_and_flags_volatiles() {
    // The lead's structure engine may send only the non-zero fields.
    let json = r#"{"tb_k": 184.6, "tb_sigma_k": 0.5, "molar_mass_g_mol": 30.07}"#;
    let ethane: GcAnalyte = serde_json::from_str(json).unwrap_or_default();
    assert_eq!(ethane.n_hydroxyl, 0);
    assert!(ethane.is_very_volatile());
    assert!(!aromatic(383.8, 92.1, RingSubstitution::NotApplicable).is_very_volatile());
    let missing: GcAnalyte = serde_json::from_str("{}").unwrap_or_default();
    assert!(matches!(
        missing.validate(),
        Err(GcError::BadAnalyte { field: "tb_k", .. })
    ));
}

#[test]
fn times_outside_the_ladder_are_errors() {
    let ladder = alkane_ladder(phase("gc-dimethyl"), &standard_column(), &program(200.0));
    let Ok(ladder) = ladder else {
        panic!("{ladder:?}");
    };
    assert!(matches!(
        ladder.retention_index_at(0.1),
        Err(GcError::TimeOutsideLadder { .. })
    ));
    assert!(matches!(
        ladder.retention_time_min(6000.0),
        Err(GcError::OutsideLadder { .. })
    ));
}

#[test]
fn ladder_step_is_converged() {
    // Self-consistency: the production step against a 20-times finer integration, on a
    // non-polar and a polar phase and a short and a long program.
    let column = standard_column();
    for id in ["gc-dimethyl", "gc-wax"] {
        for final_c in [200.0, 240.0] {
            let p = program(final_c);
            let coarse = alkane_ladder(phase(id), &column, &p).unwrap();
            let fine =
                alkane_ladder_with_steps(phase(id), &column, &p, 20.0 * LADDER_STEPS_PER_HOLDUP)
                    .unwrap();
            assert_eq!(coarse.points().len(), fine.points().len(), "{id} {final_c}");
            for (a, b) in coarse.points().iter().zip(fine.points()) {
                let err = (a.retention_time_min - b.retention_time_min).abs();
                assert!(
                    err < 5e-4 * column.holdup_time_min(),
                    "{id} C{}: {} vs {} min",
                    a.carbon_number,
                    a.retention_time_min,
                    b.retention_time_min
                );
            }
        }
    }
}
