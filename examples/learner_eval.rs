//! Evaluation of the structure-only learner (issue 14, part 3): the ridge's descriptor path
//! alone against the ridge plus a gradient-boosted residual model on the learner inputs of
//! `model::learner_features` (hashed alkyl-opaque fingerprint, ionisation at the eluent pH,
//! size, system class), in two cross-validations:
//! - leave-whole-systems-out: the 5 system folds of `build_model` (`system_folds`, same seed);
//! - leave-compounds-out: 5 folds of compounds grouped by the first InChIKey block (the
//!   skeleton, so stereoisomers stay together), seeded; scored on the held-out compounds of
//!   every system.
//!
//! Figures per held-out system (Spearman of predicted vs measured rt, MAE as % of the gradient
//! duration), medians per mode. The learner is `forust-ml` (gradient-boosted trees, pure Rust,
//! Apache-2.0) with non-decreasing constraints on the monotone inputs for RP.
//!
//! Usage: `cargo run --release --example learner_eval -- SYSTEMS.tsv RETENTION.tsv SEED [ITER,RATE,DEPTH] [systems,compounds]`

use std::cell::RefCell;
use std::collections::{BTreeMap, HashMap};
use std::path::Path;
use std::time::Instant;

use forust_ml::constraints::Constraint;
use forust_ml::objective::ObjectiveType;
use forust_ml::{GradientBooster, Matrix};
use phasewise::model::eval::spearman;
use phasewise::model::features::{DescriptorSource, PhasewiseDescriptors};
use phasewise::model::fingerprint::fingerprint_smiles;
use phasewise::model::fitted::Model;
use phasewise::model::learner_features::{N_INPUTS, constrained, learner_inputs, monotone_indices};
use phasewise::model::lss::{lss_s, rt_from_psi};
use phasewise::model::memory::MemoryWeights;
use phasewise::model::regression::{
    DEFAULT_PENALTIES, Mode, TrainingData, common_descriptor_names, fit_linear, system_folds,
};

/// Descriptor source that also records each readable structure's fingerprint, in the order
/// `TrainingData::load` pushes analytes.
struct Recording {
    fps: RefCell<Vec<(Vec<f64>, usize)>>,
}

impl DescriptorSource for Recording {
    fn describe(
        &self,
        smiles: &str,
    ) -> Result<BTreeMap<String, f64>, phasewise::model::features::FeatureError> {
        let d = PhasewiseDescriptors.describe(smiles)?;
        let fp = fingerprint_smiles(smiles).map_err(|reason| {
            phasewise::model::features::FeatureError::BadSmiles {
                smiles: smiles.to_owned(),
                position: 0,
                reason,
            }
        })?;
        self.fps.borrow_mut().push(fp);
        Ok(d)
    }
}

fn splitmix(mut z: u64) -> u64 {
    z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

fn block_fold(inchikey: &str, seed: u64, k: usize) -> usize {
    let block = inchikey.split('-').next().unwrap_or(inchikey);
    let mut h = seed ^ 0xCBF2_9CE4_8422_2325;
    for b in block.bytes() {
        h = splitmix(h ^ u64::from(b));
    }
    (h % k as u64) as usize
}

struct Ctx<'a> {
    data: &'a TrainingData,
    fps: &'a [(Vec<f64>, usize)],
    names: Vec<String>,
    params: (usize, f32, usize),
    seed: u64,
}

fn ridge_model(ctx: &Ctx, train: &[usize]) -> Result<Model, Box<dyn std::error::Error>> {
    let linear = fit_linear(ctx.data, train, &ctx.names, true, DEFAULT_PENALTIES)?;
    Ok(Model {
        licence: String::new(),
        format_version: 1,
        seed: ctx.seed,
        n_rows: 0,
        n_systems: 0,
        linear,
        calibration: BTreeMap::new(),
        memory_weights: MemoryWeights::default(),
        memory: None,
    })
}

fn inputs(ctx: &Ctx, r: usize) -> Vec<f64> {
    let row = &ctx.data.rows[r];
    let (fp, n_alkyl) = &ctx.fps[row.analyte];
    learner_inputs(
        &ctx.data.analytes[row.analyte],
        fp,
        *n_alkyl,
        &ctx.data.systems[row.system].system,
    )
}

/// Ridge psi for every row and ridge+learner psi for the `test` rows, trained on `train`.
fn fit_fold(
    ctx: &Ctx,
    train: &[usize],
    test: &[usize],
    ridge_out: &mut [f64],
    boost_out: &mut [f64],
) -> Result<(), Box<dyn std::error::Error>> {
    let data = ctx.data;
    let model = ridge_model(ctx, train)?;
    let psi = |r: usize| -> Result<f64, Box<dyn std::error::Error>> {
        let row = &data.rows[r];
        Ok(model.predict_psi_descriptor(
            &data.analytes[row.analyte],
            &data.systems[row.system].system,
        )?)
    };
    for &r in test {
        ridge_out[r] = psi(r)?;
    }
    for mode in [Mode::ReversedPhase, Mode::Hilic] {
        let tr: Vec<usize> = train
            .iter()
            .copied()
            .filter(|&r| data.systems[data.rows[r].system].system.mode == mode)
            .collect();
        let te: Vec<usize> = test
            .iter()
            .copied()
            .filter(|&r| data.systems[data.rows[r].system].system.mode == mode)
            .collect();
        if tr.is_empty() || te.is_empty() {
            continue;
        }
        let mut per_sys: HashMap<usize, usize> = HashMap::new();
        for &r in &tr {
            *per_sys.entry(data.rows[r].system).or_default() += 1;
        }
        let n = tr.len();
        let mut x = vec![0.0; n * N_INPUTS];
        let mut y = Vec::with_capacity(n);
        let mut w = Vec::with_capacity(n);
        for (i, &r) in tr.iter().enumerate() {
            for (j, v) in inputs(ctx, r).into_iter().enumerate() {
                x[j * n + i] = v;
            }
            y.push(data.rows[r].psi_k1 - psi(r)?);
            w.push(1.0 / (per_sys[&data.rows[r].system] as f64).sqrt());
        }
        let (iterations, rate, depth) = ctx.params;
        let mut booster = GradientBooster::default()
            .set_objective_type(ObjectiveType::SquaredLoss)
            .set_base_score(0.0)
            .set_iterations(iterations)
            .set_learning_rate(rate)
            .set_max_depth(depth)
            .set_nbins(64)
            .set_min_leaf_weight(1.0)
            .set_l2(1.0)
            .set_colsample_bytree(0.5)
            .set_seed(ctx.seed)
            .set_parallel(true)
            .set_num_threads(Some(2));
        if constrained(mode) {
            let map: HashMap<usize, Constraint> = monotone_indices()
                .map(|j| (j, Constraint::Positive))
                .collect();
            booster = booster.set_monotone_constraints(Some(map));
        }
        let t = Instant::now();
        booster.fit(&Matrix::new(&x, n, N_INPUTS), &y, &w, None)?;
        let json = booster.json_dump()?;
        let mut gz = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::best());
        std::io::Write::write_all(&mut gz, json.as_bytes())?;
        eprintln!(
            "  {} learner: {} rows, {:.1} s, JSON {} B, gzip {} B",
            mode.label(),
            n,
            t.elapsed().as_secs_f64(),
            json.len(),
            gz.finish()?.len()
        );
        let m = te.len();
        let mut xt = vec![0.0; m * N_INPUTS];
        for (i, &r) in te.iter().enumerate() {
            for (j, v) in inputs(ctx, r).into_iter().enumerate() {
                xt[j * m + i] = v;
            }
        }
        let corr = booster.predict(&Matrix::new(&xt, m, N_INPUTS), false);
        for (i, &r) in te.iter().enumerate() {
            boost_out[r] = ridge_out[r] + corr[i];
        }
    }
    Ok(())
}

/// Per-system Spearman values and MAE values (% gradient) of one mode and method.
type SpearmanAndMae = (Vec<f64>, Vec<f64>);

/// Per-system Spearman and MAE % gradient over the rows in `scored`, medians per mode.
fn summarise(ctx: &Ctx, label: &str, scored: &[bool], ridge: &[f64], boost: &[f64]) {
    let data = ctx.data;
    let mut by_sys: Vec<Vec<usize>> = vec![Vec::new(); data.systems.len()];
    for (r, row) in data.rows.iter().enumerate() {
        if scored[r] && ridge[r].is_finite() && boost[r].is_finite() {
            by_sys[row.system].push(r);
        }
    }
    let mut figs: BTreeMap<(&str, &str), SpearmanAndMae> = BTreeMap::new();
    for (si, rows) in by_sys.iter().enumerate() {
        if rows.len() < 5 {
            continue;
        }
        let ts = &data.systems[si];
        let meas: Vec<f64> = rows.iter().map(|&r| data.rows[r].rt_min).collect();
        for (method, psi) in [("ridge", ridge), ("ridge+learner", boost)] {
            let pred: Vec<f64> = rows
                .iter()
                .map(|&r| {
                    let row = &data.rows[r];
                    let mw = data.analytes[row.analyte]
                        .descriptors
                        .get("mw_g_mol")
                        .copied()
                        .unwrap_or(300.0);
                    ts.real_time(rt_from_psi(&ts.system, lss_s(mw), psi[r]))
                })
                .collect();
            let mae = pred
                .iter()
                .zip(&meas)
                .map(|(p, m)| (p - m).abs())
                .sum::<f64>()
                / pred.len() as f64;
            let e = figs
                .entry((ts.system.mode.label(), method))
                .or_insert_with(|| (Vec::new(), Vec::new()));
            e.0.push(spearman(&pred, &meas));
            e.1.push(100.0 * mae / ts.gradient_duration_min.max(1e-3));
        }
    }
    let median = |mut v: Vec<f64>| {
        v.retain(|x| x.is_finite());
        v.sort_by(f64::total_cmp);
        if v.is_empty() {
            return f64::NAN;
        }
        let m = v.len() / 2;
        if v.len().is_multiple_of(2) {
            0.5 * (v[m - 1] + v[m])
        } else {
            v[m]
        }
    };
    for ((mode, method), (sp, mae)) in figs {
        println!(
            "| {label} | {mode} | {method} | {} | {:.3} | {:.2} |",
            sp.len(),
            median(sp.clone()),
            median(mae.clone())
        );
    }
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().collect();
    if args.len() < 4 {
        return Err("usage: learner_eval SYSTEMS RETENTION SEED [ITER,RATE,DEPTH] [SPLITS]".into());
    }
    let seed: u64 = args[3].parse()?;
    // learner parameters: ITERATIONS,LEARNING_RATE,MAX_DEPTH
    let p: Vec<&str> = args
        .get(4)
        .map_or("200,0.1,5", String::as_str)
        .split(',')
        .collect();
    if p.len() != 3 {
        return Err("parameters: ITERATIONS,LEARNING_RATE,MAX_DEPTH".into());
    }
    let params: (usize, f32, usize) = (p[0].parse()?, p[1].parse()?, p[2].parse()?);
    let splits = args
        .get(5)
        .cloned()
        .unwrap_or_else(|| "systems,compounds".into());
    let start = Instant::now();
    let source = Recording {
        fps: RefCell::new(Vec::new()),
    };
    let data = TrainingData::load(Path::new(&args[1]), Path::new(&args[2]), &source)?;
    let fps = source.fps.into_inner();
    if fps.len() != data.analytes.len() {
        return Err("fingerprints and analytes out of step".into());
    }
    eprintln!(
        "loaded {} rows, {} systems, {} analytes in {:.1} s",
        data.rows.len(),
        data.systems.len(),
        data.analytes.len(),
        start.elapsed().as_secs_f64()
    );
    let ctx = Ctx {
        data: &data,
        fps: &fps,
        names: common_descriptor_names(&data),
        params,
        seed,
    };
    let k = 5;
    let n = data.rows.len();
    println!("| split | mode | method | systems | Spearman median | MAE median (% gradient) |");
    println!("|---|---|---|---|---|---|");
    if splits.contains("systems") {
        let fold = system_folds(data.systems.len(), k, seed);
        let (mut ridge, mut boost) = (vec![f64::NAN; n], vec![f64::NAN; n]);
        for f in 0..k {
            let t = Instant::now();
            let train: Vec<usize> = (0..n).filter(|&r| fold[data.rows[r].system] != f).collect();
            let test: Vec<usize> = (0..n).filter(|&r| fold[data.rows[r].system] == f).collect();
            fit_fold(&ctx, &train, &test, &mut ridge, &mut boost)?;
            eprintln!("systems fold {f}: {:.1} s", t.elapsed().as_secs_f64());
        }
        summarise(&ctx, "systems out", &vec![true; n], &ridge, &boost);
    }
    if splits.contains("compounds") {
        let (mut ridge, mut boost) = (vec![f64::NAN; n], vec![f64::NAN; n]);
        for f in 0..k {
            let t = Instant::now();
            let in_fold = |r: usize| block_fold(&data.rows[r].inchikey, seed, k) == f;
            let train: Vec<usize> = (0..n).filter(|&r| !in_fold(r)).collect();
            let test: Vec<usize> = (0..n).filter(|&r| in_fold(r)).collect();
            fit_fold(&ctx, &train, &test, &mut ridge, &mut boost)?;
            eprintln!("compounds fold {f}: {:.1} s", t.elapsed().as_secs_f64());
        }
        summarise(&ctx, "compounds out", &vec![true; n], &ridge, &boost);
    }
    eprintln!("total {:.1} s", start.elapsed().as_secs_f64());
    Ok(())
}
