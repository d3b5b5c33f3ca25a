//! Evaluation of the retention model by leave-whole-systems-out cross-validation: folds are
//! groups of systems (seeded), every held-out system is predicted by a model that never saw
//! it, and the memory path only uses measurements from *other* systems. Also produces the
//! calibration (intervals, difference errors, memory correlations) that training stores.

use std::collections::BTreeMap;
use std::path::Path;

use serde::{Deserialize, Serialize};

use super::features::PhasewiseDescriptors;
use super::memory::{MemoryWeights, SourceRelation};
use super::regression::{
    DEFAULT_PENALTIES, Mode, ModelError, PathCalibration, Penalties, TrainingData, fit_linear,
    lss_s, pair_probability, rt_from_psi, system_features, system_folds,
};

/// Upper bounds of the predicted-gap bins (psi) for the difference-error sd.
pub const GAP_BINS: [f64; 5] = [0.02, 0.05, 0.1, 0.2, 10.0];
/// Rows per system used for pair statistics (seeded subsample; keeps pair counts bounded).
const PAIR_ROWS: usize = 250;

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
}

fn quantile(sorted: &[f64], q: f64) -> f64 {
    if sorted.is_empty() {
        return f64::NAN;
    }
    let pos = q * (sorted.len() - 1) as f64;
    let lo = pos.floor() as usize;
    let hi = pos.ceil() as usize;
    sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo as f64)
}

fn sorted(mut v: Vec<f64>) -> Vec<f64> {
    v.retain(|x| x.is_finite());
    v.sort_by(f64::total_cmp);
    v
}

fn pearson(pairs: &[(f64, f64)]) -> f64 {
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
fn subsample(items: &[usize], k: usize, seed: u64) -> Vec<usize> {
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

fn target(data: &TrainingData, r: usize) -> f64 {
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
        let model = super::regression::Model {
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
    let calibration = calibrate(data, &fold, &psi_desc, &psi_mem, seed);
    Ok(CvOutput {
        fold,
        psi_descriptor: psi_desc,
        psi_memory: psi_mem,
        calibration,
        memory_weights,
    })
}

fn rows_by_system(data: &TrainingData) -> Vec<Vec<usize>> {
    let mut out = vec![Vec::new(); data.systems.len()];
    for (i, r) in data.rows.iter().enumerate() {
        out[r.system].push(i);
    }
    out
}

fn calibrate(
    data: &TrainingData,
    _fold: &[usize],
    psi_desc: &[f64],
    psi_mem: &[Option<(f64, Vec<String>)>],
    seed: u64,
) -> BTreeMap<String, PathCalibration> {
    let mut out = BTreeMap::new();
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
            let coelution_map = coelution_map(data, &by_sys, mode, &pred, &difference_sd, seed);
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
    out
}

/// Isotonic (pool-adjacent-violators) fit of observed co-elution (|Δt| < 1 % of the gradient
/// duration) on the raw normal-model probability, over pairs within held-out systems,
/// reduced to about one knot per 0.05 of raw probability (Zadrozny & Elkan, KDD 2002, isotonic calibration; from memory).
fn coelution_map(
    data: &TrainingData,
    by_sys: &[Vec<usize>],
    mode: Mode,
    pred: &dyn Fn(usize) -> Option<f64>,
    sd: &[(f64, f64)],
    seed: u64,
) -> Vec<(f64, f64)> {
    let mut pts: Vec<(f64, f64)> = Vec::new();
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
        let info: Vec<(f64, f64, f64, f64)> = sub
            .iter()
            .map(|&r| {
                let psi = pred(r).unwrap_or(0.0);
                let s = row_s(data, r);
                let rt = ts.real_time(rt_from_psi(&ts.system, s, psi));
                let slope = (ts.real_time(rt_from_psi(&ts.system, s, psi + 0.01))
                    - ts.real_time(rt_from_psi(&ts.system, s, psi - 0.01)))
                    / 0.02;
                (psi, rt, slope, data.rows[r].rt_min)
            })
            .collect();
        for (i, a) in info.iter().enumerate() {
            for b in &info[i + 1..] {
                let p = pair_probability(
                    a.1 - b.1,
                    (a.0 - b.0).abs(),
                    sd,
                    sd,
                    0.5 * (a.2 + b.2),
                    width,
                );
                pts.push((p, f64::from(u8::from((a.3 - b.3).abs() < width))));
            }
        }
    }
    if pts.len() < 100 {
        return Vec::new();
    }
    pts.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    // PAV blocks: (sum x, sum y, count).
    let mut blocks: Vec<(f64, f64, f64)> = Vec::new();
    for (x, y) in pts {
        blocks.push((x, y, 1.0));
        while blocks.len() >= 2 {
            let n = blocks.len();
            let (a, b) = (blocks[n - 2], blocks[n - 1]);
            if a.1 / a.2 >= b.1 / b.2 {
                blocks[n - 2] = (a.0 + b.0, a.1 + b.1, a.2 + b.2);
                blocks.pop();
            } else {
                break;
            }
        }
    }
    // Knots: one per 0.05 of raw probability (block means), plus the first and last block.
    let round = |x: f64| (x * 1e5).round() / 1e5;
    let mut knots = Vec::new();
    let mut next = 0.0;
    for (i, b) in blocks.iter().enumerate() {
        let x = b.0 / b.2;
        if x >= next || i + 1 == blocks.len() {
            knots.push((round(x), round(b.1 / b.2)));
            next = (x / 0.05).floor() * 0.05 + 0.05;
        }
    }
    knots.dedup_by(|a, b| a.0 <= b.0);
    knots
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

/// Spearman rank correlation (average ranks for ties).
pub fn spearman(x: &[f64], y: &[f64]) -> f64 {
    fn ranks(v: &[f64]) -> Vec<f64> {
        let mut idx: Vec<usize> = (0..v.len()).collect();
        idx.sort_by(|&a, &b| v[a].total_cmp(&v[b]));
        let mut r = vec![0.0; v.len()];
        let mut i = 0;
        while i < idx.len() {
            let mut j = i;
            while j + 1 < idx.len() && v[idx[j + 1]] == v[idx[i]] {
                j += 1;
            }
            let avg = (i + j) as f64 / 2.0 + 1.0;
            for &k in &idx[i..=j] {
                r[k] = avg;
            }
            i = j + 1;
        }
        r
    }
    let pairs: Vec<(f64, f64)> = ranks(x).into_iter().zip(ranks(y)).collect();
    pearson(&pairs)
}

/// ROC AUC of `scores` for `labels` (Mann–Whitney U with tie correction); NaN without both
/// classes.
pub fn roc_auc(scores: &[f64], labels: &[bool]) -> f64 {
    let mut idx: Vec<usize> = (0..scores.len()).collect();
    idx.sort_by(|&a, &b| scores[a].total_cmp(&scores[b]));
    let (mut rank_sum, mut n_pos) = (0.0, 0.0);
    let mut i = 0;
    while i < idx.len() {
        let mut j = i;
        while j + 1 < idx.len() && scores[idx[j + 1]] == scores[idx[i]] {
            j += 1;
        }
        let avg = (i + j) as f64 / 2.0 + 1.0;
        for &k in &idx[i..=j] {
            if labels[k] {
                rank_sum += avg;
                n_pos += 1.0;
            }
        }
        i = j + 1;
    }
    let n_neg = scores.len() as f64 - n_pos;
    if n_pos == 0.0 || n_neg == 0.0 {
        return f64::NAN;
    }
    (rank_sum - n_pos * (n_pos + 1.0) / 2.0) / (n_pos * n_neg)
}

/// Figures for one held-out system and one method.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SystemFigures {
    /// Spearman of predicted vs measured rt.
    pub spearman: f64,
    /// Share of pairs (measured |Δt| > 0.1 min) in the right order.
    pub order_accuracy: f64,
    /// Mean absolute error (min).
    pub mae_min: f64,
    /// Mean signed error, predicted − measured (min): the system-wide part of the error.
    #[serde(default)]
    pub bias_min: f64,
    /// MAE as % of the gradient duration.
    pub mae_pct_gradient: f64,
    /// ROC AUC for measured co-eluting pairs (|Δt| < 1 % of gradient duration).
    pub coelution_auc: f64,
    /// Rows evaluated.
    pub n: usize,
}

/// Per-system result.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SystemResult {
    /// RepoRT dataset id.
    pub id: String,
    /// Mode label.
    pub mode: String,
    /// Chemistry class.
    pub chem_class: String,
    /// Share of rows predicted through memory.
    pub memory_coverage: f64,
    /// Method name → figures (`baseline`, `descriptor`, `memory+descriptor`).
    pub figures: BTreeMap<String, SystemFigures>,
}

/// Median and interquartile range.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct MedianIqr {
    /// Median.
    pub median: f64,
    /// 25th percentile.
    pub q25: f64,
    /// 75th percentile.
    pub q75: f64,
}

/// One calibration bin of the co-elution probability.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CalibrationBin {
    /// Bin lower bound of predicted probability.
    pub lower: f64,
    /// Mean predicted probability in the bin.
    pub mean_predicted: f64,
    /// Observed co-elution fraction.
    pub observed: f64,
    /// Pairs in the bin.
    pub n: usize,
}

/// The evaluation report.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EvalReport {
    /// Seed and folds.
    pub seed: u64,
    /// Number of folds.
    pub folds: usize,
    /// Baseline descriptor name.
    pub baseline_descriptor: String,
    /// Per-system results.
    pub systems: Vec<SystemResult>,
    /// `"<mode>/<method>/<metric>"` → median and IQR over held-out systems.
    pub summary: BTreeMap<String, MedianIqr>,
    /// `"<mode>/<method>"` → calibration bins of the co-elution probability.
    pub calibration: BTreeMap<String, Vec<CalibrationBin>>,
}

struct Scored {
    memory: Vec<bool>,
    map_descriptor: Vec<(f64, f64)>,
    map_memory: Vec<(f64, f64)>,
    pred: Vec<f64>,
    meas: Vec<f64>,
    psi: Vec<f64>,
    sd: Vec<Vec<(f64, f64)>>,
    slope: Vec<f64>,
}

fn figures(
    s: &Scored,
    duration: f64,
    use_prob: bool,
    seed: u64,
    bins: &mut [(f64, f64, usize)],
) -> SystemFigures {
    let n = s.pred.len();
    let mae = s
        .pred
        .iter()
        .zip(&s.meas)
        .map(|(p, m)| (p - m).abs())
        .sum::<f64>()
        / n as f64;
    let idx: Vec<usize> = subsample(&(0..n).collect::<Vec<_>>(), PAIR_ROWS, seed);
    let (mut ok, mut tot) = (0usize, 0usize);
    let width = 0.01 * duration;
    let mut scores = Vec::new();
    let mut labels = Vec::new();
    for (i, &a) in idx.iter().enumerate() {
        for &b in &idx[i + 1..] {
            let dm = s.meas[a] - s.meas[b];
            let dp = s.pred[a] - s.pred[b];
            if dm.abs() > 0.1 {
                tot += 1;
                if dm * dp > 0.0 {
                    ok += 1;
                }
            }
            let label = dm.abs() < width;
            let score = if use_prob {
                let p = pair_probability(
                    dp,
                    (s.psi[a] - s.psi[b]).abs(),
                    &s.sd[a],
                    &s.sd[b],
                    0.5 * (s.slope[a] + s.slope[b]),
                    width,
                );
                let map = if s.memory[a] && s.memory[b] {
                    &s.map_memory
                } else {
                    &s.map_descriptor
                };
                let p = super::regression::apply_map(map, p);
                let bin = ((p * 10.0) as usize).min(9);
                bins[bin].0 += p;
                bins[bin].1 += f64::from(u8::from(label));
                bins[bin].2 += 1;
                p
            } else {
                -dp.abs()
            };
            scores.push(score);
            labels.push(label);
        }
    }
    SystemFigures {
        spearman: spearman(&s.pred, &s.meas),
        order_accuracy: if tot > 0 {
            ok as f64 / tot as f64
        } else {
            f64::NAN
        },
        mae_min: mae,
        bias_min: s.pred.iter().zip(&s.meas).map(|(p, m)| p - m).sum::<f64>() / n as f64,
        mae_pct_gradient: 100.0 * mae / duration,
        coelution_auc: roc_auc(&scores, &labels),
        n,
    }
}

/// Reads one metric from a system's figures.
type Metric = fn(&SystemFigures) -> f64;

/// Method names in report order.
pub const METHODS: [&str; 3] = ["baseline", "descriptor", "memory+descriptor"];

/// Full evaluation: k-fold system-grouped CV of the model and of a one-descriptor baseline
/// (`logp` if the descriptor source gives it, else the carbon count `n_c`), scored per
/// held-out system in minutes.
///
/// # Errors
/// Fitting errors.
pub fn evaluate(data: &TrainingData, seed: u64, folds: usize) -> Result<EvalReport, ModelError> {
    evaluate_with(data, seed, folds, DEFAULT_PENALTIES)
}

/// `evaluate` with explicit ridge penalties (for tuning).
///
/// # Errors
/// Fitting errors.
pub fn evaluate_with(
    data: &TrainingData,
    seed: u64,
    folds: usize,
    penalties: Penalties,
) -> Result<EvalReport, ModelError> {
    let names = super::regression::common_descriptor_names(data);
    let cv = cross_validate(data, &names, seed, folds, penalties)?;
    let base_name = if names.iter().any(|n| n == "logp") {
        "logp"
    } else {
        "n_c"
    }
    .to_owned();
    let mut base_psi = vec![f64::NAN; data.rows.len()];
    for f in 0..folds {
        let train: Vec<usize> = (0..data.rows.len())
            .filter(|&r| cv.fold[data.rows[r].system] != f)
            .collect();
        let lp = fit_linear(
            data,
            &train,
            std::slice::from_ref(&base_name),
            true,
            penalties,
        )?;
        let model = super::regression::Model {
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
        for (r, row) in data.rows.iter().enumerate() {
            if cv.fold[row.system] == f {
                base_psi[r] = model.predict_psi_descriptor(
                    &data.analytes[row.analyte],
                    &data.systems[row.system].system,
                )?;
            }
        }
    }
    let by_sys = rows_by_system(data);
    let mut systems = Vec::new();
    let mut bins: BTreeMap<String, Vec<(f64, f64, usize)>> = BTreeMap::new();
    for (si, rows) in by_sys.iter().enumerate() {
        if rows.len() < 5 {
            continue;
        }
        let ts = &data.systems[si];
        let mode = ts.system.mode.label();
        let mut figs = BTreeMap::new();
        let coverage =
            rows.iter().filter(|&&r| cv.psi_memory[r].is_some()).count() as f64 / rows.len() as f64;
        for method in METHODS {
            let map_of = |path: &str| {
                cv.calibration
                    .get(&format!("{mode}/{path}"))
                    .map(|c| c.coelution_map.clone())
                    .unwrap_or_default()
            };
            let mut sc = Scored {
                memory: vec![],
                map_descriptor: map_of("descriptor"),
                map_memory: map_of("memory"),
                pred: vec![],
                meas: vec![],
                psi: vec![],
                sd: vec![],
                slope: vec![],
            };
            for &r in rows {
                let row = &data.rows[r];
                let s = lss_s(
                    data.analytes[row.analyte]
                        .descriptors
                        .get("mw_g_mol")
                        .copied()
                        .unwrap_or(300.0),
                );
                let (psi, path) = match method {
                    "baseline" => (base_psi[r], "descriptor"),
                    "descriptor" => (cv.psi_descriptor[r], "descriptor"),
                    _ => match &cv.psi_memory[r] {
                        Some((p, _)) => (*p, "memory"),
                        None => (cv.psi_descriptor[r], "descriptor"),
                    },
                };
                // systems with a flow program are modelled on the volume-equivalent time
                // axis; scores are in real minutes
                let rt = ts.real_time(rt_from_psi(&ts.system, s, psi));
                let h = 0.01;
                let slope = (ts.real_time(rt_from_psi(&ts.system, s, psi + h))
                    - ts.real_time(rt_from_psi(&ts.system, s, psi - h)))
                    / (2.0 * h);
                sc.memory.push(path == "memory");
                sc.pred.push(rt);
                sc.meas.push(row.rt_min);
                sc.psi.push(psi);
                sc.slope.push(slope);
                sc.sd.push(
                    cv.calibration
                        .get(&format!("{mode}/{path}"))
                        .map(|c| c.difference_sd.clone())
                        .unwrap_or_default(),
                );
            }
            let b = bins
                .entry(format!("{mode}/{method}"))
                .or_insert_with(|| vec![(0.0, 0.0, 0); 10]);
            figs.insert(
                method.to_owned(),
                figures(
                    &sc,
                    ts.gradient_duration_min.max(1e-3),
                    method != "baseline",
                    seed,
                    b,
                ),
            );
        }
        systems.push(SystemResult {
            id: ts.id.clone(),
            mode: mode.to_owned(),
            chem_class: ts.system.chem_class.name().to_owned(),
            memory_coverage: coverage,
            figures: figs,
        });
    }
    let mut summary = BTreeMap::new();
    for mode in ["RP", "HILIC"] {
        for method in METHODS {
            let metrics: [(&str, Metric); 5] = [
                ("spearman", |f| f.spearman),
                ("order_accuracy", |f| f.order_accuracy),
                ("mae_min", |f| f.mae_min),
                ("mae_pct_gradient", |f| f.mae_pct_gradient),
                ("coelution_auc", |f| f.coelution_auc),
            ];
            for (name, get) in metrics {
                let v = sorted(
                    systems
                        .iter()
                        .filter(|s| s.mode == mode)
                        .filter_map(|s| s.figures.get(method).map(get))
                        .collect(),
                );
                if v.is_empty() {
                    continue;
                }
                summary.insert(
                    format!("{mode}/{method}/{name}"),
                    MedianIqr {
                        median: quantile(&v, 0.5),
                        q25: quantile(&v, 0.25),
                        q75: quantile(&v, 0.75),
                    },
                );
            }
        }
        let cov = sorted(
            systems
                .iter()
                .filter(|s| s.mode == mode)
                .map(|s| s.memory_coverage)
                .collect(),
        );
        if !cov.is_empty() {
            summary.insert(
                format!("{mode}/memory/coverage"),
                MedianIqr {
                    median: quantile(&cov, 0.5),
                    q25: quantile(&cov, 0.25),
                    q75: quantile(&cov, 0.75),
                },
            );
        }
    }
    let calibration = bins
        .into_iter()
        .filter(|(k, _)| !k.ends_with("/baseline"))
        .map(|(k, b)| {
            let v = b
                .iter()
                .enumerate()
                .filter(|(_, x)| x.2 > 0)
                .map(|(i, x)| CalibrationBin {
                    lower: i as f64 / 10.0,
                    mean_predicted: x.0 / x.2 as f64,
                    observed: x.1 / x.2 as f64,
                    n: x.2,
                })
                .collect();
            (k, v)
        })
        .collect();
    Ok(EvalReport {
        seed,
        folds,
        baseline_descriptor: base_name,
        systems,
        summary,
        calibration,
    })
}

/// Loads the tables and runs `evaluate` (the `phasewise model eval` entry point).
///
/// # Errors
/// File or fitting errors.
pub fn run_evaluation(
    systems_path: &Path,
    retention_path: &Path,
    seed: u64,
    folds: usize,
) -> Result<EvalReport, ModelError> {
    let data = TrainingData::load(systems_path, retention_path, &PhasewiseDescriptors)?;
    evaluate(&data, seed, folds)
}

impl EvalReport {
    /// Markdown table of medians (interquartile range) per mode and method, plus calibration bins.
    pub fn to_markdown(&self) -> String {
        let mut s = String::new();
        s.push_str(&format!(
            "Leave-whole-systems-out CV: {} folds over systems, seed {}; baseline = ridge on `{}` × system features.\n\n",
            self.folds, self.seed, self.baseline_descriptor
        ));
        s.push_str("| mode | method | systems | Spearman | order acc. | MAE (min) | MAE (% gradient) | co-elution AUC |\n|---|---|---|---|---|---|---|---|\n");
        for mode in ["RP", "HILIC"] {
            let n = self.systems.iter().filter(|x| x.mode == mode).count();
            for method in METHODS {
                let cell = |m: &str| {
                    self.summary
                        .get(&format!("{mode}/{method}/{m}"))
                        .map_or("–".to_owned(), |x| {
                            format!("{:.3} [{:.3}–{:.3}]", x.median, x.q25, x.q75)
                        })
                };
                s.push_str(&format!(
                    "| {mode} | {method} | {n} | {} | {} | {} | {} | {} |\n",
                    cell("spearman"),
                    cell("order_accuracy"),
                    cell("mae_min"),
                    cell("mae_pct_gradient"),
                    cell("coelution_auc")
                ));
            }
        }
        for mode in ["RP", "HILIC"] {
            if let Some(c) = self.summary.get(&format!("{mode}/memory/coverage")) {
                s.push_str(&format!(
                    "\n{mode}: share of rows predicted through memory per system, median {:.2} [{:.2}–{:.2}]\n",
                    c.median, c.q25, c.q75
                ));
            }
        }
        s.push_str("\nCo-elution probability calibration (pairs pooled over held-out systems):\n\n| mode/method | bin | mean predicted | observed | pairs |\n|---|---|---|---|---|\n");
        for (k, bins) in &self.calibration {
            for b in bins {
                s.push_str(&format!(
                    "| {k} | {:.1}–{:.1} | {:.3} | {:.3} | {} |\n",
                    b.lower,
                    b.lower + 0.1,
                    b.mean_predicted,
                    b.observed,
                    b.n
                ));
            }
        }
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spearman_and_auc_reference_values() {
        // Perfect and reversed rankings; AUC of a perfect and a useless score (definitions).
        assert!((spearman(&[1.0, 2.0, 3.0], &[10.0, 20.0, 30.0]) - 1.0).abs() < 1e-12);
        assert!((spearman(&[1.0, 2.0, 3.0], &[3.0, 2.0, 1.0]) + 1.0).abs() < 1e-12);
        assert!((roc_auc(&[0.1, 0.2, 0.8, 0.9], &[false, false, true, true]) - 1.0).abs() < 1e-12);
        assert!((roc_auc(&[0.5, 0.5, 0.5, 0.5], &[false, true, false, true]) - 0.5).abs() < 1e-12);
        assert!(roc_auc(&[0.5], &[true]).is_nan());
    }

    #[test]
    fn subsample_is_deterministic() {
        let v: Vec<usize> = (0..1000).collect();
        assert_eq!(subsample(&v, 10, 3), subsample(&v, 10, 3));
        assert_eq!(subsample(&v, 10, 3).len(), 10);
    }
}
