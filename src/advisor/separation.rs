//! Scoring parts shared by the LC, GC and IC candidates: coverage of the request's analytes,
//! which analytes elute before the run ends, the critical pair and its resolution, the
//! separation score, and the co-elution entries.

use crate::report::advice::{Coelution, PhaseRef, PredictionRow, Reason, Recommendation};

/// Share of the request's analytes a recommendation predicts (1 when not yet counted).
pub fn coverage(rec: &Recommendation) -> f64 {
    if rec.total_analytes == 0 {
        1.0
    } else {
        rec.predicted_analytes as f64 / rec.total_analytes as f64
    }
}

/// Score a recommendation on all analytes of the request (rule:coverage): the score is scaled
/// by the share predicted, and a separation that rests on fewer than two predicted analytes of
/// a longer list is unknown, not perfect (common practice, no source: unknown is unknown).
pub fn apply_coverage(rec: &mut Recommendation, total: usize) {
    rec.total_analytes = total;
    rec.predicted_analytes = rec.predictions.len();
    // an analyte predicted to stay on the column past the end of the program is not handled by
    // this method as proposed either (issue 14: it counts against it, like one not predicted)
    let late = rec
        .predictions
        .iter()
        .filter(|p| !elutes_in_run(rec, p))
        .count();
    let n = rec.predicted_analytes - late;
    if n >= total {
        return;
    }
    let share = n as f64 / total.max(1) as f64;
    let mut factor = share;
    if n < 2 && total >= 2 {
        factor *= 0.5;
        for r in &mut rec.reasons {
            if r.source == "model:predicted-separation" {
                r.text = format!(
                    "only {n} of {total} analytes predicted to elute: the separation is unknown, not perfect (counted at half)"
                );
            }
        }
    }
    let before = rec.score;
    rec.score = (rec.score * factor).clamp(0.0, 1.0);
    rec.reasons.push(Reason {
        source: "rule:coverage".into(),
        text: format!(
            "predicted for {} of {total} analytes{}: the analytes this method cannot predict or handle count against it (score x {factor:.2}; common practice, no source)",
            rec.predicted_analytes,
            if late > 0 {
                format!(", {late} of them predicted not to elute before the run ends")
            } else {
                String::new()
            }
        ),
        weight: Some(rec.score - before),
    });
}

/// Resolution of the pair (a, b) in a recommendation, from its predictions.
pub fn pair_resolution(rec: &Recommendation, a: &str, b: &str) -> Option<f64> {
    let pa = rec.predictions.iter().find(|p| p.analyte == a)?;
    let pb = rec.predictions.iter().find(|p| p.analyte == b)?;
    Some(resolution(pa, pb))
}

/// Rs = 1.18 Δt / (w½,1 + w½,2) (half-height form; Snyder, Kirkland & Dolan 2010).
pub fn resolution(a: &PredictionRow, b: &PredictionRow) -> f64 {
    let w = a.peak_width_half_min + b.peak_width_half_min;
    if w <= 0.0 {
        return 0.0;
    }
    1.18 * (b.retention_time_min - a.retention_time_min).abs() / w
}

/// A candidate recommendation before scoring: predictions sorted, critical pair found, and its
/// separation score with the reason (shared by the LC, GC and IC candidates).
pub fn unscored_recommendation(
    mode: &str,
    phase: &crate::phase::StationaryPhase,
    conditions: crate::report::advice::Conditions,
    predictions: Vec<PredictionRow>,
    coelutions: Vec<Coelution>,
) -> (Recommendation, f64, Reason) {
    let mut rec = Recommendation {
        rank: 0,
        mode: mode.to_string(),
        phase: phase_ref(phase),
        score: 0.0,
        conditions,
        predictions,
        coelutions,
        reasons: Vec::new(),
        excluded: Vec::new(),
        critical_resolution: None,
        critical_pair: None,
        predicted_analytes: 0,
        total_analytes: 0,
    };
    finish_predictions(&mut rec);
    rec.predicted_analytes = rec.predictions.len();
    let (sep, reason) = separation_score(&rec);
    (rec, sep, reason)
}

/// Whether `p` is predicted to elute before the recommendation's run ends (always, when the
/// run time is not known).
pub fn elutes_in_run(rec: &Recommendation, p: &PredictionRow) -> bool {
    let end = rec.conditions.run_time_min;
    !(end > 0.0 && p.retention_time_min > end)
}

/// Sort predictions by time and compute the adjacent-pair critical resolution, among the
/// analytes that elute before the run ends (a pair that stays on the column has no resolution
/// the run can show; issue 14).
pub fn finish_predictions(rec: &mut Recommendation) {
    rec.predictions.sort_by(|a, b| {
        a.retention_time_min
            .total_cmp(&b.retention_time_min)
            .then_with(|| a.analyte.cmp(&b.analyte))
    });
    let eluting: Vec<PredictionRow> = rec
        .predictions
        .iter()
        .filter(|p| elutes_in_run(rec, p))
        .cloned()
        .collect();
    rec.critical_resolution = None;
    rec.critical_pair = None;
    let mut best: Option<(f64, String, String)> = None;
    for w in eluting.windows(2) {
        let rs = resolution(&w[0], &w[1]);
        if best.as_ref().is_none_or(|b| rs < b.0) {
            best = Some((rs, w[0].analyte.clone(), w[1].analyte.clone()));
        }
    }
    if let Some((rs, a, b)) = best {
        rec.critical_resolution = Some(rs);
        rec.critical_pair = Some((a, b));
    }
    // a pair that stays on the column has no co-elution the run can show
    let late: Vec<String> = rec
        .predictions
        .iter()
        .filter(|p| !elutes_in_run(rec, p))
        .map(|p| p.analyte.clone())
        .collect();
    rec.coelutions
        .retain(|c| !late.contains(&c.a) && !late.contains(&c.b));
    rec.coelutions.sort_by(|x, y| {
        y.probability
            .total_cmp(&x.probability)
            .then_with(|| x.a.cmp(&y.a))
    });
}

/// The separation part of a phase score (0–1): critical resolution (full marks at Rs ≥ 2) and
/// the mean co-elution probability of the listed pairs.
pub fn separation_score(rec: &Recommendation) -> (f64, Reason) {
    separation_score_counting(rec, None)
}

/// The separation score of [`separation_score`] with the critical resolution counted as
/// `credible` (a lower value than predicted, with the sentence that says why) when given.
pub fn separation_score_counting(
    rec: &Recommendation,
    credible: Option<(f64, String)>,
) -> (f64, Reason) {
    let predicted = rec.critical_resolution.unwrap_or(3.0);
    let rs = credible.as_ref().map_or(predicted, |c| c.0.min(predicted));
    let rs_part = (rs / 2.0).clamp(0.0, 1.0);
    let risky: Vec<f64> = rec
        .coelutions
        .iter()
        .map(|c| c.probability)
        .filter(|p| *p > 0.2)
        .collect();
    let penalty = (risky.iter().sum::<f64>() / rec.predictions.len().max(1) as f64).min(1.0);
    let s = (0.7 * rs_part + 0.3 * (1.0 - penalty)).clamp(0.0, 1.0);
    let text = match &rec.critical_pair {
        Some((a, b)) => format!(
            "predicted critical pair {a} / {b} at resolution {}{}; {} pair(s) with co-elution probability above 0.2",
            // beyond 50 a predicted resolution only says "far apart" (and past the end of the
            // program, nothing): the number is not printed
            if predicted > 50.0 {
                "above 50".to_string()
            } else {
                format!("{predicted:.2}")
            },
            credible
                .as_ref()
                .map_or(String::new(), |c| format!("; {}", c.1)),
            risky.len()
        ),
        None => "a single analyte: no critical pair".to_string(),
    };
    (
        s,
        Reason {
            source: "model:predicted-separation".into(),
            text,
            weight: Some(s),
        },
    )
}

/// Build a [`PhaseRef`].
pub fn phase_ref(p: &crate::phase::StationaryPhase) -> PhaseRef {
    PhaseRef {
        id: p.id().to_string(),
        name: p.name().to_string(),
        chemistry: p.chemistry().to_string(),
    }
}

/// Build a co-elution entry if the probability is worth listing.
pub fn coelution(
    a: &PredictionRow,
    b: &PredictionRow,
    probability: f64,
    note: Option<String>,
) -> Coelution {
    Coelution {
        a: a.analyte.clone(),
        b: b.analyte.clone(),
        probability,
        resolution: resolution(a, b),
        note,
    }
}
