//! `phasewise model …`: train and evaluate the LC retention model from the open retention
//! tables.

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, Result, bail};
use clap::{Args, Subcommand, ValueEnum};

use phasewise::model::eval::evaluate_with;
use phasewise::model::features::PhasewiseDescriptors;
use phasewise::model::memory::MemoryTable;
use phasewise::model::regression::{DEFAULT_PENALTIES, TrainingData, train_with};
use phasewise::report::measured::MeasuredFormat;

use super::output::{check_writable, note, write_atomically, write_report};

/// `model` help footer.
pub const MODEL_HELP: &str = "Example:\n  phasewise model eval --format markdown";

const MODEL_TRAIN_HELP: &str = "\
Without --systems/--retention the tables are read from ../shared/data/retention/ when they
exist there. Same tables and seed give byte-identical output files.

Example:
  phasewise model train --systems systems.tsv --retention retention.tsv --seed 42";

const MODEL_EVAL_HELP: &str = "\
Example:
  phasewise model eval --systems systems.tsv --retention retention.tsv --folds 5 --format json";

/// Where `model train`/`model eval` look for the tables when no path is given (relative to the
/// working directory; the layout of the project's shared data folder).
const SHARED_RETENTION_DIR: &str = "../shared/data/retention";

/// Retention-model commands.
#[derive(Debug, Subcommand)]
pub enum ModelCommand {
    /// Train the LC retention model and the retention memory from the open retention tables.
    #[command(after_help = MODEL_TRAIN_HELP)]
    Train(ModelTrainArgs),
    /// Leave-whole-systems-out cross-validation of the model against a logP baseline.
    #[command(after_help = MODEL_EVAL_HELP)]
    Eval(ModelEvalArgs),
}

/// Where the training tables are.
#[derive(Debug, Args)]
pub struct TablePaths {
    /// Systems table (TSV, plain or .gz).
    #[arg(long, value_name = "PATH")]
    pub systems: Option<PathBuf>,
    /// Retention table (TSV, plain or .gz).
    #[arg(long, value_name = "PATH")]
    pub retention: Option<PathBuf>,
}

/// `model train` options.
#[derive(Debug, Args)]
pub struct ModelTrainArgs {
    /// Input tables.
    #[command(flatten)]
    pub tables: TablePaths,
    /// Random seed (fold assignment and subsampling).
    #[arg(long, default_value_t = 42)]
    pub seed: u64,
    /// Model file to write.
    #[arg(long, value_name = "PATH", default_value = "data/lc_model.json.gz")]
    pub output: PathBuf,
    /// Retention memory file to write.
    #[arg(
        long,
        value_name = "PATH",
        default_value = "data/retention_memory.tsv.gz"
    )]
    pub memory_output: PathBuf,
}

/// Output formats of `model eval`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum EvalFormat {
    /// Aligned table of medians and quartiles.
    Table,
    /// The full report as JSON.
    Json,
    /// Markdown (as in docs/model.md).
    Markdown,
}

/// `model eval` options.
#[derive(Debug, Args)]
pub struct ModelEvalArgs {
    /// Input tables.
    #[command(flatten)]
    pub tables: TablePaths,
    /// Number of folds over systems.
    #[arg(long, default_value_t = 5)]
    pub folds: usize,
    /// Random seed.
    #[arg(long, default_value_t = 42)]
    pub seed: u64,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = EvalFormat::Table)]
    pub format: EvalFormat,
}

fn table_path(given: Option<&PathBuf>, flag: &str, file: &str) -> Result<PathBuf> {
    if let Some(p) = given {
        return Ok(p.clone());
    }
    let shared = Path::new(SHARED_RETENTION_DIR).join(file);
    if shared.is_file() {
        Ok(shared)
    } else {
        bail!(
            "no {flag} given and {} does not exist here; pass {flag} PATH",
            shared.display()
        )
    }
}

fn load_tables(t: &TablePaths) -> Result<TrainingData> {
    let systems = table_path(t.systems.as_ref(), "--systems", "systems.tsv")?;
    let retention = table_path(t.retention.as_ref(), "--retention", "retention.tsv")?;
    note(&format!(
        "loading {} and {} (descriptors from structure)…",
        systems.display(),
        retention.display()
    ));
    let data =
        TrainingData::load(&systems, &retention, &PhasewiseDescriptors).with_context(|| {
            format!(
                "loading the retention tables {} and {}",
                systems.display(),
                retention.display()
            )
        })?;
    note(&format!(
        "loaded {} rows over {} systems ({} analytes); skipped {:?}",
        data.rows.len(),
        data.systems.len(),
        data.analytes.len(),
        data.skipped
    ));
    Ok(data)
}

/// Runs `phasewise model …`.
pub fn run(c: &ModelCommand) -> Result<ExitCode> {
    match c {
        ModelCommand::Train(a) => run_model_train(a),
        ModelCommand::Eval(a) => run_model_eval(a),
    }
}

fn run_model_train(a: &ModelTrainArgs) -> Result<ExitCode> {
    if a.output == a.memory_output {
        bail!(
            "--output and --memory-output are both {}; give two files",
            a.output.display()
        );
    }
    check_writable(&a.output)?;
    check_writable(&a.memory_output)?;
    let data = load_tables(&a.tables)?;
    note(&format!(
        "training (seed {}; cross-validated calibration, then a fit on all rows)…",
        a.seed
    ));
    let model = train_with(&data, a.seed, DEFAULT_PENALTIES).context("training the model")?;
    let bytes = model.to_gz_bytes().context("encoding the model")?;
    let memory = MemoryTable::from_training(&data)
        .to_gz_bytes()
        .context("encoding the retention memory")?;
    write_atomically(&a.output, &bytes)?;
    write_atomically(&a.memory_output, &memory)?;
    note(&format!(
        "wrote {} ({} B) and {} ({} B)",
        a.output.display(),
        bytes.len(),
        a.memory_output.display(),
        memory.len()
    ));
    Ok(ExitCode::SUCCESS)
}

fn run_model_eval(a: &ModelEvalArgs) -> Result<ExitCode> {
    if a.folds < 2 {
        bail!("--folds {} is too few: use 2 or more", a.folds);
    }
    let data = load_tables(&a.tables)?;
    if a.folds > data.systems.len() {
        bail!(
            "--folds {} is more than the {} systems in the tables; use at most {}",
            a.folds,
            data.systems.len(),
            data.systems.len()
        );
    }
    note(&format!(
        "evaluating: {} folds over systems, seed {}…",
        a.folds, a.seed
    ));
    let report = evaluate_with(&data, a.seed, a.folds, DEFAULT_PENALTIES)
        .context("cross-validating the model")?;
    let format = match a.format {
        EvalFormat::Json => MeasuredFormat::Json,
        EvalFormat::Markdown => MeasuredFormat::Markdown,
        EvalFormat::Table => MeasuredFormat::Table,
    };
    write_report(&report, format)?;
    Ok(ExitCode::SUCCESS)
}
