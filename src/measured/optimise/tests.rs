use super::*;
use crate::model::gradient::gradient_elution;

// Invented analytes, chosen so that two of them cross over as tG changes.
fn analytes() -> Vec<NamedAnalyte> {
    [
        ("inv-a", 2.0, 3.0),
        ("inv-b", 2.9, 4.4),
        ("inv-c", 3.1, 4.0),
        ("inv-d", 4.0, 5.0),
    ]
    .iter()
    .map(|(n, lk, s)| NamedAnalyte {
        name: n.to_string(),
        log_kw: *lk,
        s: *s,
        uncertainty: None,
    })
    .collect()
}

fn request() -> OptimiseRequest {
    OptimiseRequest {
        analytes: analytes(),
        dead_time_min: 1.0,
        dwell_time_min: 0.5,
        plates: PlateSource::Given { plates: 10_000.0 },
        gradient_time_min: Range {
            min: 5.0,
            max: 40.0,
        },
        initial_pct: Range {
            min: 5.0,
            max: 30.0,
        },
        final_pct: Range {
            min: 60.0,
            max: 100.0,
        },
        max_run_time_min: 45.0,
        critical_pairs: vec![],
        two_segment: false,
        target_resolution: 1.5,
        min_retention_factor: 1.0,
        gradient_time_steps: 12,
        composition_step_pct: 5.0,
    }
}

/// Brute force over a grid of linear programs with the same width and resolution formulas
/// (self-consistency): (run time, smallest Rs, first-peak k) or None past `max_run`.
fn brute(tg: f64, i: f64, f: f64, max_run: f64) -> Option<(f64, f64, f64)> {
    let p = GradientProgram::linear(i, f, tg).unwrap();
    let sys = GradientSystem {
        dead_time_min: 1.0,
        dwell_time_min: 0.5,
    };
    let mut el: Vec<(f64, f64)> = analytes()
        .iter()
        .map(|a| {
            let e = gradient_elution(
                &LssParameters {
                    log_kw: a.log_kw,
                    s: a.s,
                },
                &p,
                &sys,
            )
            .unwrap();
            (
                e.retention_time_min,
                4.0 * (1.0 + e.retention_factor_at_elution) / 100.0,
            )
        })
        .collect();
    el.sort_by(|a, b| a.0.total_cmp(&b.0));
    let run = el.last().unwrap().0;
    if run > max_run {
        return None;
    }
    let m = el
        .windows(2)
        .map(|w| 2.0 * (w[1].0 - w[0].0) / (w[0].1 + w[1].1))
        .fold(f64::INFINITY, f64::min);
    Some((run, m, (el[0].0 - 1.0) / 1.0))
}

#[test]
fn the_shortest_adequate_run_is_chosen_not_the_largest_resolution() {
    let r = optimise(&request()).unwrap();
    assert!(r.meets_target && r.meets_min_retention, "{:?}", r.notes);
    assert_eq!(r.selection, Selection::ShortestRunMeetingTarget);
    assert!(r.optimum.min_resolution >= 1.5);
    assert!(r.optimum.first_peak_retention_factor >= 1.0);
    assert!(r.optimum.run_time_min <= 45.0);
    assert_eq!(r.optimum.peaks.len(), 4);
    assert_eq!(r.optimum.pairs.len(), 3);
    // Some longer condition resolves better: the optimiser did not maximise Rs.
    let better_but_longer = r
        .window
        .points
        .iter()
        .any(|p| p.within_run_time && p.min_resolution > r.optimum.min_resolution + 0.5);
    assert!(better_but_longer, "{:?}", r.window.points);
    // No adequate window point or brute-force grid point is shorter (self-consistency).
    for p in &r.window.points {
        if p.within_run_time && p.meets_min_retention && p.min_resolution >= 1.5 {
            assert!(p.run_time_min >= r.optimum.run_time_min - 1e-9, "{p:?}");
        }
    }
    for tg in [5.0, 7.5, 10.0, 20.0, 30.0, 40.0] {
        for i in [5.0, 10.0, 15.0, 20.0, 25.0, 30.0] {
            for f in [60.0, 70.0, 80.0, 90.0, 100.0] {
                if let Some((run, m, k)) = brute(tg, i, f, 45.0)
                    && m >= 1.5
                    && k >= 1.0
                {
                    assert!(
                        run >= r.optimum.run_time_min - 1e-9,
                        "tg {tg} {i}-{f}: run {run} < {}",
                        r.optimum.run_time_min
                    );
                }
            }
        }
    }
    // The chosen point is on the window diagram.
    assert!(r.window.points.iter().any(|p| {
        p.gradient_time_min == r.gradient_time_min
            && (p.min_resolution - r.optimum.min_resolution).abs() < 1e-12
    }));
}

#[test]
fn an_unreachable_target_falls_back_to_the_largest_resolution_and_says_so() {
    let mut q = request();
    q.target_resolution = 1000.0;
    let r = optimise(&q).unwrap();
    assert!(!r.meets_target);
    assert_eq!(r.selection, Selection::LargestMinResolution);
    assert!(
        r.notes
            .iter()
            .any(|n| n.contains("no condition") && n.contains("1000"))
    );
    for p in &r.window.points {
        if p.within_run_time && p.meets_min_retention {
            assert!(r.optimum.min_resolution >= p.min_resolution - 1e-9, "{p:?}");
        }
    }
    for tg in [5.0, 10.0, 20.0, 30.0, 40.0] {
        for i in [5.0, 15.0, 30.0] {
            for f in [60.0, 80.0, 100.0] {
                if let Some((_, m, k)) = brute(tg, i, f, 45.0)
                    && k >= 1.0
                {
                    assert!(m <= r.optimum.min_resolution + 1e-6, "tg {tg} {i}-{f}: {m}");
                }
            }
        }
    }
}

#[test]
fn the_first_peak_is_kept_above_the_minimum_retention_factor() {
    // Without the limit the shortest adequate run starts at a high % organic and the first
    // peak comes out early; a limit above that k pushes the start down.
    let mut q = request();
    q.final_pct = Range {
        min: 60.0,
        max: 100.0,
    };
    q.initial_pct = Range {
        min: 5.0,
        max: 59.0,
    };
    q.min_retention_factor = 0.0;
    let free = optimise(&q).unwrap();
    let k_free = free.optimum.first_peak_retention_factor;
    let limit = (2.0 * k_free).max(k_free + 1.0);
    q.min_retention_factor = limit;
    let held = optimise(&q).unwrap();
    assert!(held.meets_min_retention, "{:?}", held.notes);
    assert!(held.optimum.first_peak_retention_factor >= limit);
    assert!(held.optimum.run_time_min >= free.optimum.run_time_min - 1e-9);
    assert!(
        held.initial_pct < free.initial_pct,
        "{} vs {}",
        held.initial_pct,
        free.initial_pct
    );
    // An impossible limit is reported, not silently ignored.
    q.min_retention_factor = 1000.0;
    let r = optimise(&q).unwrap();
    assert!(!r.meets_min_retention);
    assert!(
        r.notes.iter().any(|n| n.contains("k ≥ 1000")),
        "{:?}",
        r.notes
    );
    q.min_retention_factor = -1.0;
    assert!(optimise(&q).is_err());
}

#[test]
fn the_reported_program_is_the_rounded_one_that_was_evaluated() {
    let mut q = request();
    q.two_segment = true;
    for q in [request(), q] {
        let r = optimise(&q).unwrap();
        for p in r.optimum.program.points() {
            assert_eq!(p.time_min, round_to_tenth(p.time_min), "{p:?}");
            assert_eq!(p.organic_pct, round_to_tenth(p.organic_pct), "{p:?}");
        }
        assert_eq!(r.gradient_time_min, round_to_tenth(r.gradient_time_min));
        assert!(!r.optimum.program.to_spec().contains("000"));
        // Retention is predicted for exactly that program.
        let sys = GradientSystem {
            dead_time_min: 1.0,
            dwell_time_min: 0.5,
        };
        for pk in &r.optimum.peaks {
            let a = analytes().into_iter().find(|a| a.name == pk.name).unwrap();
            let e = gradient_elution(
                &LssParameters {
                    log_kw: a.log_kw,
                    s: a.s,
                },
                &r.optimum.program,
                &sys,
            )
            .unwrap();
            assert_eq!(e.retention_time_min, pk.retention_time_min);
        }
    }
}

#[test]
fn critical_pair_and_two_segment() {
    let mut q = request();
    q.critical_pairs = vec![["inv-b".into(), "inv-c".into()]];
    q.two_segment = true;
    let r = optimise(&q).unwrap();
    assert_eq!(r.optimum.pairs.len(), 1);
    let mut names = r.optimum.critical_pair.clone();
    names.sort();
    assert_eq!(names, ["inv-b".to_string(), "inv-c".to_string()]);
    // The two-segment result is kept only when it beats the linear ramp by the rule.
    if r.knee.is_some() {
        assert!(
            r.notes
                .iter()
                .any(|n| n.contains("two-segment gradient beats"))
        );
    }
    assert!(r.meets_target);
}

#[test]
fn bad_ranges_and_names_are_errors() {
    let mut q = request();
    q.initial_pct = Range {
        min: 5.0,
        max: 130.0,
    };
    assert!(optimise(&q).unwrap_err().to_string().contains("130"));
    let mut q = request();
    q.critical_pairs = vec![["inv-a".into(), "nope".into()]];
    assert!(optimise(&q).unwrap_err().to_string().contains("nope"));
    let mut q = request();
    q.max_run_time_min = 1.2;
    assert!(matches!(
        optimise(&q),
        Err(OptimiseError::NoFeasibleCondition { .. })
    ));
    let mut q = request();
    q.gradient_time_min = Range {
        min: -5.0,
        max: 10.0,
    };
    assert!(optimise(&q).is_err());
}

#[test]
fn svg_has_axes_labels_and_polyline() {
    let r = optimise(&request()).unwrap();
    let svg = render_window_svg(&r.window);
    assert!(svg.starts_with("<svg"));
    assert!(svg.contains("Gradient time tG (min)"));
    assert!(svg.contains("Smallest resolution Rs"));
    assert!(svg.contains("<polyline"));
    assert!(svg.contains("target Rs = 1.5"));
    // The chosen point is marked where the curve has it.
    let chosen = format!("chosen tG = {:.1} min", r.gradient_time_min);
    assert!(svg.contains(&chosen), "{svg}");
    assert_eq!(svg.matches("id=\"chosen\"").count(), 1);
    assert_eq!(svg.matches("<svg").count(), 1);
    assert!(svg.trim_end().ends_with("</svg>"));
}

#[test]
fn an_optimum_on_an_edge_of_the_search_is_named_in_the_notes() {
    // The invented sample with a lax target: the shortest gradient allowed already meets it,
    // so the chosen gradient time sits on the lower limit (the case).
    let mut q = request();
    q.target_resolution = 0.5;
    q.gradient_time_min = Range {
        min: 20.0,
        max: 40.0,
    };
    let r = optimise(&q).unwrap();
    assert!(
        (r.gradient_time_min - 20.0).abs() < 1e-9,
        "{}",
        r.gradient_time_min
    );
    let note = r
        .notes
        .iter()
        .find(|n| n.contains("chosen gradient time"))
        .expect("edge note");
    assert!(
        note.contains("lower edge") && note.contains("20.0–40.0 min"),
        "{note}"
    );
    let svg = render_window_svg(&r.window);
    assert!(svg.contains("lower edge of the searched range"), "{svg}");
    // Inside the range: no note for the gradient time.
    let r = optimise(&request()).unwrap();
    if r.gradient_time_min > 5.1 && r.gradient_time_min < 39.9 {
        assert!(!r.notes.iter().any(|n| n.contains("chosen gradient time")));
    }
}

#[test]
fn a_large_sample_is_scored_as_the_reference_formula_scores_it() {
    // 5,000 invented analytes (above the size at which evaluation is shared between threads):
    // the optimiser's smallest Rs of the reported program equals a plain recomputation
    // (sorted by time, neighbours' Rs = 2 ΔtR/(w1 + w2), w = 4 t0 (1 + k_e)/√N).
    let mut q = request();
    q.analytes = (0..5000)
        .map(|i| {
            let lk = 1.0 + 3.0 * f64::from(i) / 5000.0;
            NamedAnalyte {
                name: format!("inv-{i:05}"),
                log_kw: lk,
                s: 2.5 + 0.7 * lk + 0.3 * f64::from(i % 7) / 7.0,
                uncertainty: None,
            }
        })
        .collect();
    let r = optimise(&q).unwrap();
    let program = r.optimum.program.clone();
    let sys = GradientSystem {
        dead_time_min: 1.0,
        dwell_time_min: 0.5,
    };
    let mut el: Vec<(f64, f64)> = q
        .analytes
        .iter()
        .map(|a| {
            let e = gradient_elution(
                &LssParameters {
                    log_kw: a.log_kw,
                    s: a.s,
                },
                &program,
                &sys,
            )
            .unwrap();
            (
                e.retention_time_min,
                4.0 * (1.0 + e.retention_factor_at_elution) / 100.0,
            )
        })
        .collect();
    el.sort_by(|a, b| a.0.total_cmp(&b.0));
    let min_rs = el
        .windows(2)
        .map(|w| 2.0 * (w[1].0 - w[0].0) / (w[0].1 + w[1].1))
        .fold(f64::INFINITY, f64::min);
    assert!((r.optimum.min_resolution - min_rs).abs() < 1e-12);
    assert_eq!(r.optimum.peaks.len(), 5000);
    // Peaks come out in time order, equal times in name order.
    assert!(r.optimum.peaks.windows(2).all(|w| {
        w[0].retention_time_min < w[1].retention_time_min
            || (w[0].retention_time_min == w[1].retention_time_min && w[0].name < w[1].name)
    }));
}

#[test]
fn a_duplicate_analyte_is_refused_by_name() {
    let mut q = request();
    let dup = q.analytes[1].clone();
    q.analytes.push(dup);
    let e = optimise(&q).unwrap_err().to_string();
    assert!(e.contains("inv-b"), "{e}");
}
