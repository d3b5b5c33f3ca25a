//! Calibration of the LC model by system-grouped cross-validation, run by training: every
//! held-out system is predicted by a model that never saw it, and the residuals give the
//! prediction intervals per mode and path, the difference errors and co-elution maps, and the
//! retention-memory correlations that the model file stores. Evaluation (`eval`) reuses the
//! cross-validated predictions; this file never depends on it.

use std::collections::BTreeMap;

use super::coelution::{difference_sigma_min, fit_curve, pair_slope, separation_ratio};
use super::fitted::{Model, PathCalibration};
use super::linear::{Penalties, fit_linear, system_features};
use super::lss::{lss_s, rt_from_psi};
use super::memory::{MemoryWeights, SourceRelation};
use super::system::{Mode, ModelError};
use super::training_data::{TrainingData, system_folds};

/// Upper bounds of the predicted-gap bins (psi) for the difference-error sd.
pub const GAP_BINS: [f64; 5] = [0.02, 0.05, 0.1, 0.2, 10.0];
/// Rows per system used for pair statistics (seeded subsample; keeps pair counts bounded).
pub(crate) const PAIR_ROWS: usize = 250;

/// Cross-validated predictions and the calibration derived from them.
#[derive(Debug, Clone)]
pub struct CvOutput {
    /// Fold of each system.
    pub fold: Vec<usize>,
    /// Descriptor-path psi for each row (model without the row's system).
    pub psi_descriptor: Vec<f64>,
    /// Memory-path psi and source ids for rows with other-system measurements.
    pub psi_memory: Vec<Option<(f64, Vec<String>)>>,
    /// Calibration per `"<mode>/<path>"`.
    pub calibration: BTreeMap<String, PathCalibration>,
    /// Memory correlations.
    pub memory_weights: MemoryWeights,
    /// Cross-fitted co-elution curves per `"<mode>/<path>"`, one per fold: the curve for fold
    /// `f` is fitted on pairs of the other folds' held-out systems only, so scoring fold `f`
    /// with it gives an out-of-sample reliability table (`eval`).
    pub coelution_cross_fitted: BTreeMap<String, Vec<Vec<(f64, f64)>>>,
}

pub(crate) fn quantile(sorted: &[f64], q: f64) -> f64 {
    if sorted.is_empty() {
        return f64::NAN;
    }
    let pos = q * (sorted.len() - 1) as f64;
    let lo = pos.floor() as usize;
    let hi = pos.ceil() as usize;
    sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo as f64)
}

pub(crate) fn sorted(mut v: Vec<f64>) -> Vec<f64> {
    v.retain(|x| x.is_finite());
    v.sort_by(f64::total_cmp);
    v
}

pub(crate) fn pearson(pairs: &[(f64, f64)]) -> f64 {
    let n = pairs.len() as f64;
    if pairs.len() < 3 {
        return 0.0;
    }
    let (mx, my) = pairs
        .iter()
        .fold((0.0, 0.0), |a, p| (a.0 + p.0 / n, a.1 + p.1 / n));
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (x, y) in pairs {
        sxy += (x - mx) * (y - my);
        sxx += (x - mx) * (x - mx);
        syy += (y - my) * (y - my);
    }
    if sxx <= 0.0 || syy <= 0.0 {
        0.0
    } else {
        sxy / (sxx * syy).sqrt()
    }
}

/// Deterministic subsample of up to `k` items (seeded hash order).
pub(crate) fn subsample(items: &[usize], k: usize, seed: u64) -> Vec<usize> {
    if items.len() <= k {
        return items.to_vec();
    }
    let mut keyed: Vec<(u64, usize)> = items
        .iter()
        .map(|&i| {
            let mut z = (i as u64)
                .wrapping_add(seed)
                .wrapping_mul(0x9E37_79B9_7F4A_7C15);
            z = (z ^ (z >> 31)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            (z ^ (z >> 29), i)
        })
        .collect();
    keyed.sort_unstable();
    let mut out: Vec<usize> = keyed.into_iter().take(k).map(|x| x.1).collect();
    out.sort_unstable();
    out
}

pub(crate) fn target(data: &TrainingData, r: usize) -> f64 {
    data.rows[r].psi_k1.clamp(-0.5, 1.6)
}

/// Runs k-fold system-grouped CV with the full model and derives the calibration.
///
/// # Errors
/// Fitting errors (`TooLittleData`, `MissingDescriptor`).
pub fn cross_validate(
    data: &TrainingData,
    names: &[String],
    seed: u64,
    k: usize,
    penalties: Penalties,
) -> Result<CvOutput, ModelError> {
    let fold = system_folds(data.systems.len(), k, seed);
    let n = data.rows.len();
    let mut by_key: BTreeMap<&str, Vec<usize>> = BTreeMap::new();
    for (i, r) in data.rows.iter().enumerate() {
        by_key.entry(r.inchikey.as_str()).or_default().push(i);
    }
    let sys_feats: Vec<Vec<f64>> = data
        .systems
        .iter()
        .map(|s| system_features(&s.system))
        .collect();
    let mut psi_desc = vec![f64::NAN; n];
    let mut fold_preds: Vec<Vec<f64>> = Vec::with_capacity(k);
    let mut pair_acc: BTreeMap<String, Vec<(f64, f64)>> = BTreeMap::new();
    for f in 0..k {
        let train: Vec<usize> = (0..n).filter(|&r| fold[data.rows[r].system] != f).collect();
        if train.is_empty() {
            fold_preds.push(vec![f64::NAN; n]);
            continue;
        }
        let lp = fit_linear(data, &train, names, true, penalties)?;
        let mut buf = Vec::new();
        let model = Model {
            licence: String::new(),
            format_version: 1,
            seed,
            n_rows: 0,
            n_systems: 0,
            linear: lp,
            calibration: BTreeMap::new(),
            memory_weights: MemoryWeights::default(),
            memory: None,
        };
        let preds: Vec<f64> = data
            .rows
            .iter()
            .map(|r| {
                let z = model
                    .linear
                    .standardise(&data.analytes[r.analyte], &data.systems[r.system].system)?;
                Ok(model.linear.predict_z(&z, &sys_feats[r.system], &mut buf))
            })
            .collect::<Result<_, ModelError>>()?;
        for r in 0..n {
            if fold[data.rows[r].system] == f {
                psi_desc[r] = preds[r];
            }
        }
        // Residual correlations between systems from training rows of this fold (in-sample
        // residuals; the held-out systems are not involved).
        for rows in by_key.values() {
            let tr: Vec<usize> = rows
                .iter()
                .copied()
                .filter(|&r| fold[data.rows[r].system] != f)
                .take(24)
                .collect();
            for (a_i, &a) in tr.iter().enumerate() {
                for &b in &tr[a_i + 1..] {
                    let (sa, sb) = (
                        &data.systems[data.rows[a].system],
                        &data.systems[data.rows[b].system],
                    );
                    if sa.id == sb.id || sa.system.mode != sb.system.mode {
                        continue;
                    }
                    let rel = SourceRelation::between(&sa.system, &sb.system);
                    let key = format!("{}/{}", sa.system.mode.label(), rel.name());
                    pair_acc
                        .entry(key)
                        .or_default()
                        .push((target(data, a) - preds[a], target(data, b) - preds[b]));
                }
            }
        }
        fold_preds.push(preds);
    }
    let mut memory_weights = MemoryWeights::default();
    for (key, pairs) in &pair_acc {
        // Symmetrise so the estimate does not depend on pair order.
        let sym: Vec<(f64, f64)> = pairs
            .iter()
            .flat_map(|&(a, b)| [(a, b), (b, a)])
            .map(|(a, b)| (a.clamp(-0.4, 0.4), b.clamp(-0.4, 0.4)))
            .collect();
        memory_weights
            .rho
            .insert(key.clone(), (pearson(&sym) * 1e4).round() / 1e4);
        memory_weights.n_pairs.insert(key.clone(), pairs.len());
    }
    // Memory path for each row, from other systems' measurements and the row's fold model.
    let mut psi_mem: Vec<Option<(f64, Vec<String>)>> = vec![None; n];
    for rows in by_key.values() {
        for &r in rows {
            let t_sys = data.rows[r].system;
            let f = fold[t_sys];
            let preds = &fold_preds[f];
            let target_sys = &data.systems[t_sys].system;
            let sources: Vec<(String, SourceRelation, f64)> = rows
                .iter()
                .filter(|&&s| {
                    let ss = data.rows[s].system;
                    ss != t_sys && data.systems[ss].system.mode == target_sys.mode
                })
                .map(|&s| {
                    let ss = &data.systems[data.rows[s].system];
                    (
                        ss.id.clone(),
                        SourceRelation::between(&ss.system, target_sys),
                        target(data, s) - preds[s],
                    )
                })
                .collect();
            if let Some((shift, used)) = memory_weights.combine(target_sys.mode, &sources) {
                psi_mem[r] = Some((psi_desc[r] + shift, used));
            }
        }
    }
    let (calibration, coelution_cross_fitted) =
        calibrate(data, &fold, k, &psi_desc, &psi_mem, seed);
    Ok(CvOutput {
        fold,
        psi_descriptor: psi_desc,
        psi_memory: psi_mem,
        calibration,
        memory_weights,
        coelution_cross_fitted,
    })
}

pub(crate) fn rows_by_system(data: &TrainingData) -> Vec<Vec<usize>> {
    let mut out = vec![Vec::new(); data.systems.len()];
    for (i, r) in data.rows.iter().enumerate() {
        out[r.system].push(i);
    }
    out
}

/// Calibration per `"<mode>/<path>"` and the cross-fitted co-elution curves per fold.
type Calibrated = (
    BTreeMap<String, PathCalibration>,
    BTreeMap<String, Vec<Vec<(f64, f64)>>>,
);

fn calibrate(
    data: &TrainingData,
    fold: &[usize],
    k: usize,
    psi_desc: &[f64],
    psi_mem: &[Option<(f64, Vec<String>)>],
    seed: u64,
) -> Calibrated {
    let mut out = BTreeMap::new();
    let mut cross = BTreeMap::new();
    let by_sys = rows_by_system(data);
    for mode in [Mode::ReversedPhase, Mode::Hilic] {
        for path in ["descriptor", "memory"] {
            let pred = |r: usize| -> Option<f64> {
                if path == "descriptor" {
                    Some(psi_desc[r])
                } else {
                    psi_mem[r].as_ref().map(|m| m.0)
                }
            };
            let mut res = Vec::new();
            let mut gaps: Vec<Vec<f64>> = vec![Vec::new(); GAP_BINS.len()];
            for (si, rows) in by_sys.iter().enumerate() {
                if data.systems[si].system.mode != mode {
                    continue;
                }
                for &r in rows {
                    if let Some(p) = pred(r) {
                        res.push(target(data, r) - p);
                    }
                }
                let with: Vec<usize> = rows
                    .iter()
                    .copied()
                    .filter(|&r| pred(r).is_some())
                    .collect();
                let sub = subsample(&with, PAIR_ROWS, seed);
                for (i, &a) in sub.iter().enumerate() {
                    for &b in &sub[i + 1..] {
                        let (pa, pb) = (pred(a).unwrap_or(0.0), pred(b).unwrap_or(0.0));
                        let gap = (pa - pb).abs();
                        let err = (target(data, a) - pa) - (target(data, b) - pb);
                        let bin = GAP_BINS
                            .iter()
                            .position(|&u| gap < u)
                            .unwrap_or(GAP_BINS.len() - 1);
                        gaps[bin].push(err.abs());
                    }
                }
            }
            let n = res.len();
            if n < 20 {
                continue;
            }
            let res = sorted(res);
            let round = |x: f64| (x * 1e5).round() / 1e5;
            let difference_sd: Vec<(f64, f64)> = GAP_BINS
                .iter()
                .zip(gaps)
                .filter(|(_, g)| g.len() >= 20)
                .map(|(&u, g)| {
                    // Median |error| × 1.4826 estimates the sd of the difference (robust);
                    // divided by √2 it is each prediction's share.
                    let g = sorted(g);
                    (
                        u,
                        round(1.4826 * quantile(&g, 0.5) / std::f64::consts::SQRT_2),
                    )
                })
                .collect();
            let points = coelution_points(data, &by_sys, mode, &pred, &difference_sd, seed);
            let all: Vec<(f64, bool)> = points.iter().map(|p| (p.0, p.1)).collect();
            let coelution_map = fit_curve(&all);
            let per_fold: Vec<Vec<(f64, f64)>> = (0..k)
                .map(|f| {
                    let other: Vec<(f64, bool)> = points
                        .iter()
                        .filter(|p| fold[p.2] != f)
                        .map(|p| (p.0, p.1))
                        .collect();
                    fit_curve(&other)
                })
                .collect();
            cross.insert(format!("{}/{path}", mode.label()), per_fold);
            out.insert(
                format!("{}/{path}", mode.label()),
                PathCalibration {
                    q05: round(quantile(&res, 0.05)),
                    q95: round(quantile(&res, 0.95)),
                    difference_sd,
                    coelution_map,
                    n,
                },
            );
        }
    }
    (out, cross)
}

/// Pairs within held-out systems of one mode for the co-elution curve: separation ratio
/// `|Δt_pred| / σ_Δ` (`coelution`), whether the measured peaks are within 1 % of the gradient
/// duration of each other, and the system index (for cross-fitting by fold).
fn coelution_points(
    data: &TrainingData,
    by_sys: &[Vec<usize>],
    mode: Mode,
    pred: &dyn Fn(usize) -> Option<f64>,
    sd: &[(f64, f64)],
    seed: u64,
) -> Vec<(f64, bool, usize)> {
    let mut pts = Vec::new();
    for (si, rows) in by_sys.iter().enumerate() {
        let ts = &data.systems[si];
        if ts.system.mode != mode {
            continue;
        }
        let with: Vec<usize> = rows
            .iter()
            .copied()
            .filter(|&r| pred(r).is_some())
            .collect();
        let sub = subsample(&with, PAIR_ROWS, seed);
        let width = 0.01 * ts.gradient_duration_min.max(1e-3);
        let info: Vec<(f64, f64, f64)> = sub
            .iter()
            .map(|&r| {
                let psi = pred(r).unwrap_or(0.0);
                let s = row_s(data, r);
                let rt = ts.real_time(rt_from_psi(&ts.system, s, psi));
                let slope = (ts.real_time(rt_from_psi(&ts.system, s, psi + 0.01))
                    - ts.real_time(rt_from_psi(&ts.system, s, psi - 0.01)))
                    / 0.02;
                (rt, slope, data.rows[r].rt_min)
            })
            .collect();
        for (i, a) in info.iter().enumerate() {
            for b in &info[i + 1..] {
                let sigma = difference_sigma_min(sd, sd, pair_slope(a.1, b.1));
                pts.push((
                    separation_ratio(a.0 - b.0, sigma),
                    (a.2 - b.2).abs() < width,
                    si,
                ));
            }
        }
    }
    // sorted once here; the per-fold subsets stay sorted, so their fits sort in linear time
    pts.sort_by(|a, b| a.0.total_cmp(&b.0).then(b.1.cmp(&a.1)));
    pts
}

fn row_s(data: &TrainingData, r: usize) -> f64 {
    lss_s(
        data.analytes[data.rows[r].analyte]
            .descriptors
            .get("mw_g_mol")
            .copied()
            .unwrap_or(300.0),
    )
}
