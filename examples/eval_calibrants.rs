//! Evaluates `--calibrants` (projection of predictions onto the user's system) on the open
//! retention data: leave-whole-systems-out cross-validated predictions (the model never saw the
//! held-out system; the memory path uses only other systems' measurements), then on each
//! held-out system K compounds picked at random (seeded) act as calibrants and the rest are
//! projected. Prints, per mode, path and K, the median over systems of the median and mean
//! absolute error in % of the gradient duration, and the coverage of the 90 % interval.
//!
//! Usage: `cargo run --release --example eval_calibrants -- SYSTEMS.tsv RETENTION.tsv SEED [FOLDS] [DRAWS]`

use std::path::Path;

use phasewise::model::calibration::cross_validate;
use phasewise::model::features::PhasewiseDescriptors;
use phasewise::model::lss::{lss_s, rt_from_psi};
use phasewise::model::projection::{MapKind, Projection};
use phasewise::model::regression::{DEFAULT_PENALTIES, TrainingData, common_descriptor_names};

fn mix(mut z: u64) -> u64 {
    z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

fn median(mut v: Vec<f64>) -> f64 {
    v.retain(|x| x.is_finite());
    if v.is_empty() {
        return f64::NAN;
    }
    v.sort_by(f64::total_cmp);
    let n = v.len();
    if n % 2 == 1 {
        v[n / 2]
    } else {
        0.5 * (v[n / 2 - 1] + v[n / 2])
    }
}

struct Cell {
    med: Vec<f64>,
    mae: Vec<f64>,
    covered: usize,
    total: usize,
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().collect();
    if args.len() < 4 {
        return Err("usage: eval_calibrants SYSTEMS RETENTION SEED [FOLDS] [DRAWS]".into());
    }
    let seed: u64 = args[3].parse()?;
    let folds: usize = args.get(4).map_or(Ok(5), |f| f.parse())?;
    let draws: u64 = args.get(5).map_or(Ok(5), |f| f.parse())?;
    let data = TrainingData::load(
        Path::new(&args[1]),
        Path::new(&args[2]),
        &PhasewiseDescriptors,
    )?;
    let names = common_descriptor_names(&data);
    let cv = cross_validate(&data, &names, seed, folds, DEFAULT_PENALTIES)?;
    let mut by_sys = vec![Vec::new(); data.systems.len()];
    for (i, r) in data.rows.iter().enumerate() {
        by_sys[r.system].push(i);
    }
    let ks = [5usize, 10, 20];
    let kinds = [
        ("none", None),
        ("line", Some(MapKind::Line)),
        ("isotonic", Some(MapKind::Isotonic)),
        ("blend", Some(MapKind::Blend)),
    ];
    let mut cells: std::collections::BTreeMap<(String, String, usize, String), Cell> =
        std::collections::BTreeMap::new();
    for (si, rows) in by_sys.iter().enumerate() {
        let ts = &data.systems[si];
        let duration = ts.gradient_duration_min.max(1e-3);
        let mode = ts.system.mode.label().to_owned();
        for path in ["memory+descriptor", "descriptor"] {
            let pred: Vec<(f64, f64)> = rows
                .iter()
                .map(|&r| {
                    let row = &data.rows[r];
                    let psi = match (path, &cv.psi_memory[r]) {
                        ("memory+descriptor", Some((p, _))) => *p,
                        _ => cv.psi_descriptor[r],
                    };
                    let s = lss_s(
                        data.analytes[row.analyte]
                            .descriptors
                            .get("mw_g_mol")
                            .copied()
                            .unwrap_or(300.0),
                    );
                    (ts.real_time(rt_from_psi(&ts.system, s, psi)), row.rt_min)
                })
                .filter(|p| p.0.is_finite() && p.1.is_finite())
                .collect();
            for &k in &ks {
                if pred.len() < k + 10 {
                    continue;
                }
                for d in 0..draws {
                    let mut order: Vec<(u64, usize)> = (0..pred.len())
                        .map(|i| (mix(seed ^ mix(si as u64 * 1000 + d) ^ i as u64), i))
                        .collect();
                    order.sort_unstable();
                    let cal: Vec<(f64, f64)> = order[..k].iter().map(|x| pred[x.1]).collect();
                    let rest: Vec<(f64, f64)> = order[k..].iter().map(|x| pred[x.1]).collect();
                    for (kind_name, kind) in kinds {
                        let proj = match kind {
                            Some(kind) => match Projection::fit_kind(&cal, kind) {
                                Ok(p) => Some(p),
                                Err(_) => continue,
                            },
                            None => None,
                        };
                        let mut errs = Vec::with_capacity(rest.len());
                        let cell = cells
                            .entry((mode.clone(), path.to_owned(), k, kind_name.to_owned()))
                            .or_insert(Cell {
                                med: vec![],
                                mae: vec![],
                                covered: 0,
                                total: 0,
                            });
                        for &(p, m) in &rest {
                            let (t, lo, hi) = match &proj {
                                Some(pr) => {
                                    let x = pr.project(p);
                                    (x.rt_min, x.interval_min.0, x.interval_min.1)
                                }
                                None => (p, f64::NAN, f64::NAN),
                            };
                            errs.push(100.0 * (t - m).abs() / duration);
                            if proj.is_some() {
                                cell.total += 1;
                                if (lo..=hi).contains(&m) {
                                    cell.covered += 1;
                                }
                            }
                        }
                        let mae = errs.iter().sum::<f64>() / errs.len() as f64;
                        cell.med.push(median(errs));
                        cell.mae.push(mae);
                    }
                }
            }
        }
    }
    println!(
        "Calibrants picked at random on each held-out system ({draws} draws per system, seed {seed}, {folds} folds); errors in % of the gradient duration, median over system draws.\n"
    );
    println!(
        "| mode | prediction path | calibrants | map | system draws | median abs. error (%) | mean abs. error (%) | 90 % interval coverage |"
    );
    println!("|---|---|---|---|---|---|---|---|");
    for ((mode, path, k, kind), c) in &cells {
        let cov = if c.total > 0 {
            format!("{:.2}", c.covered as f64 / c.total as f64)
        } else {
            "–".into()
        };
        println!(
            "| {mode} | {path} | {k} | {kind} | {} | {:.2} | {:.2} | {cov} |",
            c.med.len(),
            median(c.med.clone()),
            median(c.mae.clone())
        );
    }
    Ok(())
}
