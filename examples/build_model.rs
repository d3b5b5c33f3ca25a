//! Trains the LC retention model from the RepoRT-derived tables, writes the shipped model file
//! and retention memory into `data/`, and prints the cross-validated evaluation as Markdown.
//!
//! Usage: `cargo run --release --example build_model -- SYSTEMS.tsv RETENTION.tsv SEED OUT_DIR [FOLDS]`

use std::path::Path;
use std::time::Instant;

use phasewise::model::eval::evaluate_with;
use phasewise::model::features::PhasewiseDescriptors;
use phasewise::model::memory::MemoryTable;
use phasewise::model::regression::{DEFAULT_PENALTIES, Penalties, TrainingData, train_with};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().collect();
    if args.len() < 5 {
        return Err("usage: build_model SYSTEMS RETENTION SEED OUT_DIR [FOLDS]".into());
    }
    let seed: u64 = args[3].parse()?;
    let folds: usize = args.get(5).map_or(Ok(5), |f| f.parse())?;
    let out = Path::new(&args[4]);
    // Optional tuning override: PHASEWISE_PENALTIES="system,descriptor,interaction".
    let penalties = match std::env::var("PHASEWISE_PENALTIES") {
        Ok(v) => {
            let p: Vec<f64> = v.split(',').map(str::parse).collect::<Result<_, _>>()?;
            if p.len() != 3 {
                return Err("PHASEWISE_PENALTIES needs three numbers".into());
            }
            Penalties {
                system: p[0],
                descriptor: p[1],
                interaction: p[2],
                within_system: DEFAULT_PENALTIES.within_system,
            }
        }
        Err(_) => DEFAULT_PENALTIES,
    };
    // Optional: PHASEWISE_POOLED=1 fits one pooled ridge instead of the within-system fit
    // (for comparison, docs/model.md).
    let penalties = Penalties {
        within_system: std::env::var("PHASEWISE_POOLED")
            .map_or(penalties.within_system, |v| v != "1"),
        ..penalties
    };
    let start = Instant::now();
    let data = TrainingData::load(
        Path::new(&args[1]),
        Path::new(&args[2]),
        &PhasewiseDescriptors,
    )?;
    let model = train_with(&data, seed, penalties)?;
    let bytes = model.to_gz_bytes()?;
    let memory = MemoryTable::from_training(&data).to_gz_bytes()?;
    let train_s = start.elapsed().as_secs_f64();
    std::fs::write(out.join("lc_model.json.gz"), &bytes)?;
    std::fs::write(out.join("retention_memory.tsv.gz"), &memory)?;
    eprintln!(
        "trained on {} rows / {} systems in {train_s:.1} s (load + descriptors + CV calibration + fit); skipped {:?}; model {} B, memory {} B",
        data.rows.len(),
        data.systems.len(),
        data.skipped,
        bytes.len(),
        memory.len()
    );
    let t = Instant::now();
    let report = evaluate_with(&data, seed, folds, penalties)?;
    eprintln!("evaluation in {:.1} s", t.elapsed().as_secs_f64());
    println!("{}", report.to_markdown());
    std::fs::write(
        out.join("eval_report.json"),
        serde_json::to_string_pretty(&report)?,
    )?;
    Ok(())
}
