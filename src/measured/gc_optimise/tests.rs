use super::*;
use crate::measured::gc_scout::{GcScoutRequest, GcScoutRun, fit_gc};
use crate::measured::peaks::{Peak, PeakTable};

// Invented analytes: a pair (inv-p, inv-q) whose order crosses with the ramp rate (the
// one with the larger B is retained more at low temperature), and two easy ones.
fn analytes() -> Vec<GcNamedAnalyte> {
    [
        ("inv-o", -10.0, 4400.0),
        ("inv-p", -11.0, 5200.0),
        ("inv-q", -13.2, 6200.0),
        ("inv-r", -14.0, 7300.0),
    ]
    .iter()
    .map(|(n, a, b)| GcNamedAnalyte {
        name: n.to_string(),
        parameters: VantHoffParameters { a: *a, b_k: *b },
        uncertainty: None,
    })
    .collect()
}

fn request() -> GcOptimiseRequest {
    GcOptimiseRequest {
        analytes: analytes(),
        holdup_time_min: 1.2,
        plates: 100_000.0,
        initial_c: TemperatureRange {
            min: 40.0,
            max: 120.0,
        },
        ramp_c_per_min: TemperatureRange {
            min: 2.0,
            max: 30.0,
        },
        initial_hold_min: 1.0,
        max_temperature_c: 320.0,
        max_run_time_min: 60.0,
        critical_pairs: Vec::new(),
        target_resolution: 1.5,
        min_retention_factor: 1.0,
    }
}

/// Brute force over the fine grid with the same rule: the optimum must not be beaten.
#[test]
fn optimum_is_not_beaten_by_a_fine_brute_force_search() {
    let req = request();
    let rep = optimise_gc(&req).unwrap();
    let ctx = Ctx {
        req: &req,
        pairs: Vec::new(),
    };
    let Some((best, _)) = ctx.evaluate(rep.window.initial_c, rep.optimum.ramp_c_per_min) else {
        panic!("optimum not evaluable");
    };
    let mut t = 40.0;
    while t <= 120.0 {
        let mut r = 2.0;
        while r <= 30.0 + 1e-9 {
            if let Some((s, _)) = ctx.evaluate(t, r) {
                // Shorter run meeting the target by more than the fine step would beat it.
                assert!(
                    !(s.feasible && s.retained && s.meets && s.run < best.run - 0.05),
                    "({t}, {r}) beats the optimum: {} < {}",
                    s.run,
                    best.run
                );
            }
            r += 0.5;
        }
        t += 2.0;
    }
    assert!(rep.meets_target, "{:?}", rep.notes);
    assert!(rep.optimum.run_time_min <= 60.0);
    // The reported program re-predicts to the reported times.
    let p = OvenProgram::parse(&rep.optimum.program).unwrap();
    for pk in &rep.optimum.peaks {
        let a = analytes().into_iter().find(|a| a.name == pk.name).unwrap();
        let e = programmed_elution(&a.parameters, &p, 1.2).unwrap();
        assert!((e.retention_time_min - pk.retention_time_min).abs() < 1e-9);
    }
    assert!(rep.optimum.final_c <= 320.0);
    // Written as typed: at most one decimal in every number of the program.
    for part in rep.optimum.program.split([':', ',']) {
        assert!(
            part.split('.').nth(1).is_none_or(|d| d.len() <= 1),
            "{}",
            rep.optimum.program
        );
    }
    // The window diagram has the chosen rate and a point per grid rate.
    assert!(
        rep.window
            .points
            .iter()
            .any(|q| (q.ramp_c_per_min - rep.window.optimum_ramp_c_per_min).abs() < 1e-9)
    );
    let svg = render_gc_window_svg(&rep.window);
    assert!(svg.starts_with("<svg") && svg.contains("Ramp rate (°C/min)"));
    assert!(svg.contains("id=\"chosen\""));
}

#[test]
fn an_impossible_run_time_is_an_error_naming_it() {
    let mut req = request();
    req.max_run_time_min = 1.5;
    let e = optimise_gc(&req).unwrap_err().to_string();
    assert!(e.contains("1.5"), "{e}");
}

#[test]
fn bad_ranges_and_names_are_errors() {
    let mut req = request();
    req.ramp_c_per_min = TemperatureRange {
        min: 0.0,
        max: 10.0,
    };
    assert!(optimise_gc(&req).unwrap_err().to_string().contains("0.1"));
    let mut req = request();
    req.critical_pairs = vec![["inv-o".into(), "nope".into()]];
    assert!(optimise_gc(&req).unwrap_err().to_string().contains("nope"));
    let mut req = request();
    req.initial_c = TemperatureRange {
        min: 40.0,
        max: 400.0,
    };
    assert!(optimise_gc(&req).unwrap_err().to_string().contains("400"));
}

fn table(rows: &[(&str, f64, f64)]) -> PeakTable {
    PeakTable::from_peaks(
        rows.iter()
            .map(|(n, t, w)| Peak {
                width_base_min: Some(*w),
                ..Peak::at(n, *t)
            })
            .collect(),
    )
    .unwrap()
}

#[test]
fn fitted_parameters_find_the_known_optimum() {
    // Self-consistency: simulate two scouting runs from the invented truth, fit, optimise
    // with the fitted parameters, and compare with the optimum of the truth itself.
    let truth = request();
    let tm = truth.holdup_time_min;
    let runs: Vec<GcScoutRun> = ["50:1,5:320:5", "50:1,20:320:5"]
        .iter()
        .map(|spec| {
            let program = OvenProgram::parse(spec).unwrap();
            let rows: Vec<(&str, f64, f64)> = truth
                .analytes
                .iter()
                .map(|a| {
                    let e = programmed_elution(&a.parameters, &program, tm).unwrap();
                    let w = 4.0 * tm * (1.0 + e.retention_factor_at_elution) / truth.plates.sqrt();
                    (a.name.as_str(), e.retention_time_min, w)
                })
                .collect();
            GcScoutRun {
                name: spec.to_string(),
                program,
                peaks: table(&rows),
            }
        })
        .collect();
    let fit = fit_gc(&GcScoutRequest {
        runs,
        holdup_time_min: tm,
        max_temperature_c: Some(320.0),
    })
    .unwrap();
    let mut from_fit = request();
    from_fit.analytes = GcOptimiseRequest::analytes_from_fit(&fit);
    let a = optimise_gc(&truth).unwrap();
    let b = optimise_gc(&from_fit).unwrap();
    assert_eq!(a.optimum.program, b.optimum.program);
    assert!((a.optimum.min_resolution - b.optimum.min_resolution).abs() < 1e-4);
    // Uncertainties propagate to the predicted times.
    assert!(
        b.optimum
            .peaks
            .iter()
            .all(|p| p.retention_time_uncertainty_min.is_some_and(|u| u > 0.0))
    );
}
