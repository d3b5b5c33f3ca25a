//! Bad input across the library gives an error naming the offending value, never a panic.
//! All data are invented.

use phasewise::measured::DeadTimeInput;
use phasewise::measured::optimise::{NamedAnalyte, OptimiseRequest, PlateSource, Range, optimise};
use phasewise::measured::peaks::PeakTable;
use phasewise::measured::scout::{ScoutRequest, ScoutRun, fit};
use phasewise::measured::suitability::{SuitabilityRequest, SuitabilityTargets, evaluate};
use phasewise::measured::transfer::{ColumnGeometry, TransferRequest, transfer};
use phasewise::model::gradient::GradientProgram;
use phasewise::model::theory;

fn msg<T: std::fmt::Debug, E: std::fmt::Display>(r: Result<T, E>) -> String {
    match r {
        Ok(v) => panic!("expected an error, got {v:?}"),
        Err(e) => e.to_string(),
    }
}

#[test]
fn peak_missing_from_one_run_names_peak_and_run() {
    let a = PeakTable::parse("name,rt,w50\np1,5.0,0.05\np2,6.0,0.05\n").unwrap();
    let b = PeakTable::parse("name,rt,w50\np1,8.0,0.07\n").unwrap();
    let req = ScoutRequest {
        runs: vec![
            ScoutRun {
                name: "short".into(),
                program: GradientProgram::parse("0:5,10:95").unwrap(),
                peaks: a,
            },
            ScoutRun {
                name: "long".into(),
                program: GradientProgram::parse("0:5,30:95").unwrap(),
                peaks: b,
            },
        ],
        dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
        dwell_volume_ml: 0.0,
        flow_ml_min: None,
    };
    let m = msg(fit(&req));
    assert!(m.contains("`p2`") && m.contains("`long`"), "{m}");
}

#[test]
fn zero_and_negative_widths_name_line_and_value() {
    let m = msg(PeakTable::parse("name,rt,wb\np1,5.0,0.2\np2,6.0,0\n"));
    assert!(m.contains("line 3") && m.contains("width_base"), "{m}");
    let m = msg(PeakTable::parse("name\trt\tw50\np1\t5.0\t-0.02\n"));
    assert!(m.contains("-0.02"), "{m}");
}

#[test]
fn retention_before_dead_time_names_the_peak() {
    let t = PeakTable::parse("name,rt,w50\nearly,0.4,0.02\nlate,3.0,0.05\n").unwrap();
    let m = msg(evaluate(&SuitabilityRequest {
        peaks: t,
        dead_time: DeadTimeInput::FromColumn {
            column_length_mm: 150.0,
            inner_diameter_mm: 4.6,
            flow_ml_min: 1.0,
        },
        column_length_mm: None,
        exclude: vec![],
        targets: SuitabilityTargets::default(),
    }));
    assert!(m.contains("`early`") && m.contains("0.4"), "{m}");
}

#[test]
fn non_monotonic_and_out_of_range_gradients_name_the_token() {
    assert!(msg(GradientProgram::parse("0:5,12:50,11:95")).contains("`11:95`"));
    assert!(msg(GradientProgram::parse("0:5,10:-3")).contains("-3"));
    assert!(msg(GradientProgram::parse("0:5,10:100.5")).contains("100.5"));
    assert!(msg(GradientProgram::parse("0;5,10;95")).contains("`0;5`"));
}

#[test]
fn negative_flow_and_dimensions_name_the_quantity() {
    assert!(msg(theory::column_dead_volume_ml(150.0, -4.6)).contains("inner diameter"));
    assert!(msg(theory::dead_time_min(1.5, -1.0)).contains("flow"));
    let geo = ColumnGeometry {
        column_length_mm: 150.0,
        inner_diameter_mm: 4.6,
        particle_size_um: 5.0,
    };
    let mut req = TransferRequest {
        original: geo,
        target: ColumnGeometry {
            particle_size_um: 0.0,
            ..geo
        },
        flow_ml_min: 1.0,
        adjust_flow_for_particle_size: true,
        program: GradientProgram::parse("0:5,20:95").unwrap(),
        injection_volume_ul: None,
        dwell_volume_original_ml: 0.0,
        dwell_volume_target_ml: 0.0,
        run_time_min: None,
    };
    assert!(msg(transfer(&req)).contains("target particle size"));
    req.target.particle_size_um = 3.0;
    req.flow_ml_min = -0.5;
    assert!(msg(transfer(&req)).contains("-0.5"));
}

#[test]
fn identical_gradient_times_are_not_identifiable() {
    let t = PeakTable::parse("name,rt,w50\np1,5.0,0.05\n").unwrap();
    let run = |n: &str| ScoutRun {
        name: n.into(),
        program: GradientProgram::parse("0:10,15:90").unwrap(),
        peaks: t.clone(),
    };
    let m = msg(fit(&ScoutRequest {
        runs: vec![run("monday"), run("tuesday")],
        dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
        dwell_volume_ml: 0.0,
        flow_ml_min: None,
    }));
    assert!(
        m.contains("not identifiable") && m.contains("monday") && m.contains("tuesday"),
        "{m}"
    );
}

#[test]
fn inconsistent_units_are_rejected() {
    // Retention time in seconds.
    assert!(msg(PeakTable::parse("name,rt_s,w50\np,300,0.05\n")).contains("minutes"));
    // Width column in seconds while rt is in minutes.
    assert!(msg(PeakTable::parse("name,rt (min),w50 [s]\np,5,3\n")).contains("`s`"));
    // Two different flows for the same run.
    let t = PeakTable::parse("name,rt,w50\np1,5.0,0.05\n").unwrap();
    let m = msg(fit(&ScoutRequest {
        runs: vec![
            ScoutRun {
                name: "a".into(),
                program: GradientProgram::parse("0:5,10:95").unwrap(),
                peaks: t.clone(),
            },
            ScoutRun {
                name: "b".into(),
                program: GradientProgram::parse("0:5,30:95").unwrap(),
                peaks: t,
            },
        ],
        dead_time: DeadTimeInput::FromColumn {
            column_length_mm: 150.0,
            inner_diameter_mm: 4.6,
            flow_ml_min: 1.0,
        },
        dwell_volume_ml: 1.0,
        flow_ml_min: Some(1000.0),
    }));
    assert!(m.contains("1000") && m.contains("mL/min"), "{m}");
}

#[test]
fn optimiser_rejects_bad_requests() {
    let a = |n: &str, lk: f64| NamedAnalyte {
        name: n.into(),
        log_kw: lk,
        s: 4.0,
        uncertainty: None,
    };
    let mut req = OptimiseRequest {
        analytes: vec![a("x", 2.0), a("y", 3.0)],
        dead_time_min: 1.0,
        dwell_time_min: 0.0,
        plates: PlateSource::Given { plates: -5.0 },
        gradient_time_min: Range {
            min: 5.0,
            max: 30.0,
        },
        initial_pct: Range {
            min: 5.0,
            max: 20.0,
        },
        final_pct: Range {
            min: 60.0,
            max: 95.0,
        },
        max_run_time_min: 40.0,
        critical_pairs: vec![],
        two_segment: false,
        target_resolution: 1.5,
        min_retention_factor: 1.0,
        gradient_time_steps: 5,
        composition_step_pct: 5.0,
    };
    assert!(msg(optimise(&req)).contains("-5"));
    req.plates = PlateSource::Given { plates: 8000.0 };
    req.critical_pairs = vec![["x".into(), "x".into()]];
    assert!(msg(optimise(&req)).contains("twice"));
    req.critical_pairs = vec![];
    req.analytes = vec![a("x", 2.0), a("x", 3.0)];
    assert!(msg(optimise(&req)).contains("`x`"));
    req.analytes = vec![a("x", 2.0), a("y", f64::NAN)];
    assert!(msg(optimise(&req)).contains("NaN"));
}
