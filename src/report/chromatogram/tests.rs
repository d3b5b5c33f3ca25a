use super::*;
use crate::measured::optimise::Prediction;
use crate::report::advice::ProgramStep;

#[test]
fn an_optimum_is_drawn_with_its_program_and_pairs_below_target_bracketed() {
    use crate::measured::optimise::{PredictedPair, PredictedPeak};
    use crate::model::gradient::{ElutionPhase, GradientProgram};
    // Invented prediction: three peaks, the last pair below Rs 1.5.
    let peak = |name: &str, t: f64| PredictedPeak {
        name: name.to_string(),
        retention_time_min: t,
        width_base_min: 0.1,
        organic_at_elution_pct: 50.0,
        phase: ElutionPhase::DuringGradient,
        retention_time_uncertainty_min: Some(0.02),
    };
    let pair = |a: &str, b: &str, rs: f64| PredictedPair {
        first: a.to_string(),
        second: b.to_string(),
        resolution: rs,
    };
    let p = Prediction {
        program: GradientProgram::parse("0:10,6.5:90").unwrap(),
        peaks: vec![peak("inv-a", 2.0), peak("inv-b", 3.0), peak("inv-c", 3.12)],
        pairs: vec![pair("inv-a", "inv-b", 10.0), pair("inv-b", "inv-c", 1.2)],
        min_resolution: 1.2,
        critical_pair: ["inv-b".into(), "inv-c".into()],
        run_time_min: 3.12,
        first_peak_retention_factor: 1.0,
    };
    let svg = render_optimum_svg(&p, 1.0, 1.5, "t");
    assert!(svg.contains("optimised gradient 0:10,6.5:90"));
    assert!(svg.contains("pair below the target Rs 1.5"));
    assert!(!svg.contains("see Risks"));
    assert_eq!(svg.matches("class=\"peak\"").count(), 3);
    assert_eq!(svg.matches("class=\"interval\"").count(), 3);
    // one labelled row per interval
    assert_eq!(svg.matches("class=\"interval-label\"").count(), 3);
    // Only the pair below the target gets a bracket, with its Rs.
    assert_eq!(svg.matches("class=\"risk-bracket\"").count(), 1);
    assert!(svg.contains("data-pair=\"inv-b / inv-c\"") && svg.contains(">Rs 1.20<"));
    // the program is drawn on the second axis and listed in the legend
    assert_eq!(svg.matches("class=\"program\"").count(), 1);
    assert!(svg.contains("data-kind=\"program\""));
    // no pattern fills anywhere
    assert!(!svg.contains("<pattern") && !svg.contains("url(#"));
}

#[test]
fn xml_escaping_covers_markup_characters() {
    assert_eq!(
        escape_xml("<script>alert(1)</script> \"q\" & 'a'"),
        "&lt;script&gt;alert(1)&lt;/script&gt; &quot;q&quot; &amp; &#39;a&#39;"
    );
}

#[test]
fn tick_steps_are_one_two_or_five() {
    assert_eq!(nice_step(10.0), 1.0);
    assert_eq!(nice_step(18.0), 2.0);
    assert_eq!(nice_step(42.0), 5.0);
    assert!((nice_step(0.9) - 0.1).abs() < 1e-12);
}

#[test]
fn analytes_without_a_finite_time_are_listed_not_drawn() {
    let text = include_str!("../../../tests/data/plan/lc_impurity_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let mut rec = report.recommendations[0].clone();
    rec.predictions[1].retention_time_min = f64::NAN;
    rec.predictions[2].peak_width_half_min = 0.0;
    let svg = render_svg(&rec, "t");
    assert!(!svg.contains("NaN"));
    assert!(svg.contains("not drawn (no finite retention time or width): impurity B, impurity F"));
    assert_eq!(svg.matches("<path class=\"peak\"").count(), 3);
}

#[test]
fn fixed_decimals_never_print_negative_zero() {
    assert_eq!(f2(-0.001), "0.00");
    assert_eq!(f2(12.3456), "12.35");
}

fn t_max(svg: &str) -> f64 {
    let i = svg.find("data-t-max-min=\"").unwrap() + 16;
    svg[i..].split('"').next().unwrap().parse().unwrap()
}

#[test]
fn time_axis_follows_the_last_peak_not_the_run_time() {
    let text = include_str!("../../../tests/data/plan/lc_impurity_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let mut rec = report.recommendations[0].clone();
    rec.conditions.run_time_min = 2500.0;
    let last = rec
        .predictions
        .iter()
        .map(|p| p.retention_time_min.max(p.interval_high_min))
        .fold(0.0_f64, f64::max);
    let svg = render_svg(&rec, "t");
    let t = t_max(&svg);
    assert!(
        t >= last && t < last * 1.6 + 1.0,
        "axis {t} min for last peak {last} min"
    );
}

#[test]
fn legend_lists_only_what_is_drawn() {
    let text = include_str!("../../../tests/data/plan/lc_impurity_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let mut rec = report.recommendations[0].clone();
    rec.coelutions.clear();
    for p in &mut rec.predictions {
        p.interval_low_min = f64::NAN;
        p.interval_high_min = f64::NAN;
    }
    rec.conditions.dead_time_min = 0.0;
    let svg = render_svg(&rec, "t");
    for kind in ["risk", "interval", "t0"] {
        assert!(
            !svg.contains(&format!("data-kind=\"{kind}\"")),
            "{kind} listed but not drawn"
        );
    }
    assert!(!svg.contains("class=\"risk-bracket\"") && !svg.contains("class=\"interval\""));
    assert!(svg.contains("data-kind=\"sum\""));
    // with a pair at risk both the bracket and its legend entry appear
    let rec = report.recommendations[0].clone();
    let svg = render_svg(&rec, "t");
    let brackets = svg.matches("class=\"risk-bracket\"").count();
    assert_eq!(brackets > 0, svg.contains("data-kind=\"risk\""));
}

#[test]
fn a_gc_optimum_draws_its_oven_program_on_the_second_axis() {
    use crate::measured::gc_optimise::{GcPredictedPeak, GcPrediction};
    use crate::measured::gc_scout::OvenPhase;
    use crate::measured::optimise::PredictedPair;
    // Invented GC optimum: 40 °C for 2 min, 10 °C/min to 200 °C, hold 3 min.
    let peak = |name: &str, t: f64| GcPredictedPeak {
        name: name.to_string(),
        retention_time_min: t,
        retention_time_uncertainty_min: Some(0.01),
        width_base_min: 0.05,
        elution_temperature_c: 40.0 + (t - 2.0).max(0.0) * 10.0,
        retention_factor_at_elution: 3.0,
        phase: OvenPhase::Ramp,
    };
    let p = GcPrediction {
        program: "40:2,10:200:3".into(),
        initial_c: 40.0,
        initial_hold_min: 2.0,
        ramp_c_per_min: 10.0,
        final_c: 200.0,
        final_hold_min: 3.0,
        peaks: vec![peak("inv-x", 3.0), peak("inv-y", 6.0)],
        pairs: vec![PredictedPair {
            first: "inv-x".into(),
            second: "inv-y".into(),
            resolution: 20.0,
        }],
        min_resolution: 20.0,
        critical_pair: ["inv-x".into(), "inv-y".into()],
        run_time_min: 6.0,
        program_time_min: 21.0,
        first_peak_retention_factor: 3.0,
    };
    let svg = render_gc_optimum_svg(&p, 0.75, 1.5, "t");
    assert_eq!(svg.matches("class=\"program\"").count(), 1);
    assert_eq!(svg.matches("class=\"axis-right\"").count(), 1);
    assert!(svg.contains("data-kind=\"program\""));
    assert!(svg.contains("oven temperature (°C)"));
    // the break points: hold to 2 min, ramp end at 18 min, hold to 21 min
    let trace = super::optimum::oven_trace(&p);
    assert_eq!(
        trace.points,
        vec![(0.0, 40.0), (2.0, 40.0), (18.0, 200.0), (21.0, 200.0)]
    );
}

#[test]
fn a_gc_recommendation_draws_the_oven_program_on_the_second_axis() {
    let text = include_str!("../../../tests/data/plan/gc_solvent_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let rec = report.recommendations[0].clone();
    let svg = render_svg(&rec, "t");
    assert_eq!(svg.matches("class=\"program\"").count(), 1);
    assert_eq!(svg.matches("class=\"axis-right\"").count(), 1);
    assert!(svg.contains("oven temperature (°C)"));
    // without a program there is no second axis and no legend entry
    let mut bare = rec.clone();
    bare.conditions.program.clear();
    let svg = render_svg(&bare, "t");
    assert!(!svg.contains("class=\"program\"") && !svg.contains("class=\"axis-right\""));
    assert!(!svg.contains("data-kind=\"program\""));
}

/// The `d` attribute's points of the first element of `class`.
fn class_points(svg: &str, class: &str) -> Vec<(f64, f64)> {
    let at = svg
        .find(&format!("class=\"{class}\""))
        .unwrap_or_else(|| panic!("no {class}"));
    let d = &svg[at..];
    let d = &d[d.find(" d=\"").unwrap() + 4..];
    let d = &d[..d.find('"').unwrap()];
    let nums: Vec<f64> = d
        .split([' ', 'M', 'L'])
        .filter(|t| !t.is_empty())
        .map(|t| t.parse().unwrap())
        .collect();
    nums.chunks(2).map(|c| (c[0], c[1])).collect()
}

/// Attribute `name` of every element of `class`, as numbers.
fn class_attr(svg: &str, class: &str, name: &str) -> Vec<f64> {
    svg.match_indices(&format!("class=\"{class}\""))
        .map(|(i, _)| {
            let rest = &svg[i..];
            let key = format!("{name}=\"");
            let v = &rest[rest.find(&key).unwrap() + key.len()..];
            v[..v.find('"').unwrap()].parse().unwrap()
        })
        .collect()
}

/// Issue 16 (screenshot review): three pairs at risk among three close peaks printed their
/// "Rs" labels on top of each other; overlapping brackets now go to separate levels, and the
/// labels of one level keep apart.
#[test]
fn overlapping_risk_brackets_are_stacked_and_their_labels_never_collide() {
    let text = include_str!("../../../tests/data/plan/lc_impurity_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let mut rec = report.recommendations[0].clone();
    // three peaks 0.4 min apart (invented), every pair among them at risk
    let names: Vec<String> = rec
        .predictions
        .iter()
        .take(3)
        .map(|p| p.analyte.clone())
        .collect();
    for (i, p) in rec.predictions.iter_mut().enumerate() {
        p.retention_time_min = 8.0 + 0.4 * i as f64;
    }
    let template = rec.coelutions[0].clone();
    rec.coelutions = [(0, 1, 1.1), (1, 2, 1.3), (0, 2, 2.4)]
        .iter()
        .map(|&(a, b, rs)| {
            let mut c = template.clone();
            c.a = names[a].clone();
            c.b = names[b].clone();
            c.resolution = rs;
            c
        })
        .collect();
    let svg = render_svg(&rec, "t");
    assert_eq!(svg.matches("class=\"risk-bracket\"").count(), 3);
    let levels = class_attr(&svg, "risk-bracket", "data-level");
    // the wide bracket (first to third) cannot share a level with either narrow one
    let mut distinct = levels.clone();
    distinct.sort_by(f64::total_cmp);
    distinct.dedup();
    assert!(distinct.len() >= 2, "levels {levels:?}");
    // no two Rs labels at the same height overlap horizontally (6.4 px per character)
    let labels: Vec<(f64, f64, usize)> = svg
        .match_indices("class=\"risk-bracket\"")
        .map(|(i, _)| {
            let g = &svg[i..];
            let t = &g[g.find("<text").unwrap()..];
            let num = |k: &str| -> f64 {
                let v = &t[t.find(k).unwrap() + k.len()..];
                v[..v.find('"').unwrap()].parse().unwrap()
            };
            let body = &t[t.find('>').unwrap() + 1..t.find("</text>").unwrap()];
            (num(" x=\""), num(" y=\""), body.chars().count())
        })
        .collect();
    for (i, a) in labels.iter().enumerate() {
        for b in &labels[i + 1..] {
            if (a.1 - b.1).abs() < 10.0 {
                let half = (a.2.max(b.2) as f64) * 6.4 / 2.0;
                assert!(
                    (a.0 - b.0).abs() >= 2.0 * half,
                    "labels {a:?} and {b:?} overlap"
                );
            }
        }
    }
}

/// The program is drawn to the end of the time axis (held at its final value after its last
/// step, and the legend says so), and its lowest value sits above the time axis, so an
/// initial oven hold is visible.
#[test]
fn the_program_is_held_to_the_axis_end_and_kept_off_the_time_axis() {
    let text = include_str!("../../../tests/data/plan/lc_impurity_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let mut rec = report.recommendations[0].clone();
    // a short program that ends before the last peak (invented)
    let last = rec
        .predictions
        .iter()
        .map(|p| p.retention_time_min)
        .fold(0.0, f64::max);
    rec.conditions.program = vec![
        ProgramStep {
            time_min: 0.0,
            value: 40.0,
        },
        ProgramStep {
            time_min: 0.5 * last,
            value: 95.0,
        },
    ];
    let svg = render_svg(&rec, "t");
    let pts = class_points(&svg, "program");
    let x_end = 960.0 - 64.0;
    let (xe, ye) = *pts.last().unwrap();
    assert!(
        (xe - x_end).abs() < 0.01,
        "program ends at x = {xe}, axis at {x_end}"
    );
    assert!((ye - pts[pts.len() - 2].1).abs() < 0.01, "the hold is flat");
    assert!(svg.contains("final value held to the end"));
    // the lowest value is drawn above the time axis line
    let axes = class_points(&svg, "axes");
    let y_axis = axes[1].1;
    let y_low = pts.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
    assert!(
        y_axis - y_low >= 8.0,
        "lowest program value at {y_low}, axis at {y_axis}"
    );
}

/// Screenshot review (issue 16): a close-up's peak label near the panel's edge ran over the
/// panel's axis, and long one-line titles ran into the next panel. Every label now lies inside
/// its panel and every title line inside its panel and the gap beside it.
#[test]
fn close_up_labels_and_titles_stay_inside_their_panels() {
    let text = include_str!("../../../tests/data/plan/lc_impurity_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let mut rec = report.recommendations[0].clone();
    let names: Vec<String> = rec
        .predictions
        .iter()
        .take(3)
        .map(|p| p.analyte.clone())
        .collect();
    for (i, p) in rec.predictions.iter_mut().enumerate() {
        p.retention_time_min = 8.0 + 0.4 * i as f64;
        // a long name (invented), to test the title's wrapping
        if i == 2 {
            p.analyte = "impurity with a very long invented name X-17".into();
        }
    }
    let long = rec.predictions[2].analyte.clone();
    let template = rec.coelutions[0].clone();
    rec.coelutions = [(0, 1, 1.1), (1, 2, 1.3)]
        .iter()
        .map(|&(a, b, rs)| {
            let mut c = template.clone();
            c.a = if a == 2 {
                long.clone()
            } else {
                names[a].clone()
            };
            c.b = if b == 2 {
                long.clone()
            } else {
                names[b].clone()
            };
            c.resolution = rs;
            c
        })
        .collect();
    let svg = render_svg(&rec, "t");
    let panels: Vec<(f64, f64)> = (0..3)
        .map(|i| {
            let l = LEFT_PX + f64::from(i) * (detail::DETAIL_WIDTH_PX + detail::DETAIL_GAP_PX);
            (l, l + detail::DETAIL_WIDTH_PX)
        })
        .collect();
    let texts = |class: &str| -> Vec<(f64, String, String)> {
        svg.match_indices(&format!("class=\"{class}\""))
            .map(|(i, _)| {
                let t = &svg[i..];
                let attr = |k: &str| {
                    let v = &t[t.find(k).unwrap() + k.len()..];
                    v[..v.find('"').unwrap()].to_string()
                };
                let x: f64 = attr(" x=\"").parse().unwrap();
                let head = &t[..t.find('>').unwrap()];
                let anchor = if head.contains("text-anchor=\"end\"") {
                    "end".to_string()
                } else if head.contains("text-anchor=\"middle\"") {
                    "middle".to_string()
                } else {
                    "start".to_string()
                };
                let body = t[t.find('>').unwrap() + 1..t.find("</text>").unwrap()].to_string();
                (x, anchor, body)
            })
            .collect()
    };
    let labels = texts("detail-label");
    assert!(!labels.is_empty());
    for (x, anchor, body) in &labels {
        let w = body.chars().count() as f64 * 5.6;
        let (lo, hi) = match anchor.as_str() {
            "end" => (x - w, *x),
            "middle" => (x - w / 2.0, x + w / 2.0),
            _ => (*x, x + w),
        };
        assert!(
            panels
                .iter()
                .any(|&(l, r)| lo >= l - 0.01 && hi <= r + 0.01),
            "label `{body}` spans {lo:.0}-{hi:.0}, outside every panel {panels:?}"
        );
    }
    for (x, _, body) in texts("detail-title") {
        let w = body.chars().count() as f64 * 6.6;
        let panel = panels
            .iter()
            .find(|p| (p.0 - x).abs() < 0.01)
            .expect("title at a panel");
        assert!(
            x + w <= panel.1 + detail::DETAIL_GAP_PX,
            "title `{body}` runs into the next panel"
        );
    }
}

/// Screenshot review (issue 16): a leader line from an upper label tier struck through a lower
/// label. Every leader is drawn before every label, and labels and Rs values carry a white
/// halo that masks the lines behind them.
#[test]
fn labels_are_drawn_over_the_leader_lines_with_a_halo() {
    let text = include_str!("../../../tests/data/plan/lc_impurity_panel.json");
    let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
    let svg = render_svg(&report.recommendations[0], "t");
    let last_leader = svg.rfind("class=\"leader\"").expect("leaders");
    let first_label = svg.find("class=\"label\"").expect("labels");
    assert!(last_leader < first_label, "a leader is drawn over a label");
    for (i, _) in svg.match_indices("class=\"label\"") {
        let el = &svg[i..i + svg[i..].find('>').unwrap()];
        assert!(el.contains("paint-order=\"stroke\""), "{el}");
    }
    for (i, _) in svg.match_indices("class=\"risk-bracket\"") {
        let g = &svg[i..i + svg[i..].find("</g>").unwrap()];
        assert!(g.contains("paint-order=\"stroke\""), "{g}");
    }
}
