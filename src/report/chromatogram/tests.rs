use super::*;
use crate::measured::optimise::Prediction;

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
