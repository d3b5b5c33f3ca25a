//! Evaluation of the retention model by leave-whole-systems-out cross-validation: folds are
//! groups of systems (seeded), every held-out system is predicted by a model that never saw
//! it, and the memory path only uses measurements from *other* systems. Evaluation depends on the
//! model and its calibration (`calibration`), never the reverse.

use std::collections::BTreeMap;
use std::path::Path;

use serde::{Deserialize, Serialize};

use super::calibration::{
    PAIR_ROWS, cross_validate, pearson, quantile, rows_by_system, sorted, subsample,
};
use super::coelution::{
    curve_probability, difference_sigma_min, normal_probability, pair_slope, separation_ratio,
};
use super::features::PhasewiseDescriptors;
use super::fitted::Model;
use super::linear::{DEFAULT_PENALTIES, Penalties, common_descriptor_names, fit_linear};
use super::lss::{lss_s, rt_from_psi};
use super::memory::MemoryWeights;
use super::system::ModelError;
use super::training_data::TrainingData;

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
    /// Share of rows whose measured `psi_k1` lies inside the 90 % interval of their path.
    #[serde(default)]
    pub interval_coverage: f64,
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
                let sigma =
                    difference_sigma_min(&s.sd[a], &s.sd[b], pair_slope(s.slope[a], s.slope[b]));
                let map = if s.memory[a] && s.memory[b] {
                    &s.map_memory
                } else {
                    &s.map_descriptor
                };
                let p = curve_probability(map, separation_ratio(dp, sigma))
                    .unwrap_or_else(|| normal_probability(dp, sigma, width));
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
        interval_coverage: f64::NAN,
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
    let names = common_descriptor_names(data);
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
            // the curve fitted without this system's fold: the reliability table is out of sample
            let map_of = |path: &str| {
                cv.coelution_cross_fitted
                    .get(&format!("{mode}/{path}"))
                    .and_then(|per_fold| per_fold.get(cv.fold[si]).cloned())
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
            let inside = rows
                .iter()
                .zip(&sc.psi)
                .zip(&sc.memory)
                .filter(|((r, psi), mem)| {
                    let path = if **mem { "memory" } else { "descriptor" };
                    cv.calibration
                        .get(&format!("{mode}/{path}"))
                        .is_some_and(|c| {
                            let y = data.rows[**r].psi_k1;
                            (**psi + c.q05..=**psi + c.q95).contains(&y)
                        })
                })
                .count();
            let b = bins
                .entry(format!("{mode}/{method}"))
                .or_insert_with(|| vec![(0.0, 0.0, 0); 10]);
            let mut fig = figures(
                &sc,
                ts.gradient_duration_min.max(1e-3),
                method != "baseline",
                seed,
                b,
            );
            fig.interval_coverage = inside as f64 / rows.len().max(1) as f64;
            figs.insert(method.to_owned(), fig);
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
            let metrics: [(&str, Metric); 6] = [
                ("spearman", |f| f.spearman),
                ("order_accuracy", |f| f.order_accuracy),
                ("mae_min", |f| f.mae_min),
                ("mae_pct_gradient", |f| f.mae_pct_gradient),
                ("coelution_auc", |f| f.coelution_auc),
                ("interval_coverage", |f| f.interval_coverage),
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
        s.push_str("| mode | method | systems | Spearman | order acc. | MAE (min) | MAE (% gradient) | co-elution AUC | 90 % interval coverage |\n|---|---|---|---|---|---|---|---|---|\n");
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
                    "| {mode} | {method} | {n} | {} | {} | {} | {} | {} | {} |\n",
                    cell("spearman"),
                    cell("order_accuracy"),
                    cell("mae_min"),
                    cell("mae_pct_gradient"),
                    cell("coelution_auc"),
                    cell("interval_coverage")
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
