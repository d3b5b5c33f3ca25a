//! Command-line definitions (clap only). Every command's help ends with an example.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

/// `--version` in full: the program, the seed data and the model it carries.
const LONG_VERSION: &str = concat!(
    env!("CARGO_PKG_VERSION"),
    "\nknowledge-base seed data: ",
    env!("PHASEWISE_SEED_HASH"),
    " (data/kb: PubChem identifiers via chemicals 1.5.2 (MIT), Wikidata (CC0), pKa (CC BY 4.0))",
    "\nLC retention model: data/lc_model.json.gz and data/retention_memory.tsv.gz (RepoRT, CC BY-SA 4.0)",
    "\nphase catalogue: data/phases.tsv and companions (see docs/phases.md)"
);

/// Chromatographic method-development advice from a list of analytes.
#[derive(Debug, Parser)]
#[command(name = "phasewise", version, long_version = LONG_VERSION, about, long_about = None)]
pub struct Cli {
    /// Shipped knowledge base file (built on first use if missing).
    #[arg(long, global = true, env = "PHASEWISE_KB", value_name = "PATH")]
    pub kb: Option<PathBuf>,
    /// User overlay database (lab-measured values and new compounds).
    #[arg(long, global = true, env = "PHASEWISE_USER_KB", value_name = "PATH")]
    pub user_kb: Option<PathBuf>,
    /// Never build the knowledge base implicitly; fail if it is missing.
    #[arg(long, global = true)]
    pub no_build: bool,
    /// The command.
    #[command(subcommand)]
    pub command: Command,
}

/// Commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Resolve analytes (names, synonyms, CAS numbers, InChIKeys, PubChem CIDs or SMILES) and
    /// show their properties with provenance.
    #[command(
        after_help = "Example:\n  phasewise lookup caffeine 58-08-2 'CC(=O)Oc1ccccc1C(=O)O'\n  printf 'toluene\\nphenol\\n' | phasewise lookup --format json"
    )]
    Lookup(LookupArgs),
    /// Recommend separation mode, stationary phase, starting conditions, co-elution risks and
    /// an orthogonal back-up for a list of analytes.
    #[command(
        after_help = "Example:\n  phasewise advise caffeine theobromine theophylline paraxanthine --detector uv:273\n  phasewise advise --input panel.txt --detector ms --format json"
    )]
    Advise(AdviseArgs),
    /// Predict retention of analytes under given conditions: LC (reversed phase or HILIC), GC
    /// (retention index and time under an oven program) or IC (elution order and relative
    /// retention).
    #[command(
        after_help = "Example:\n  phasewise predict caffeine theophylline --mode rp --phase rp-c18 --gradient '0:5,20:95' \\\n      --ph 2.7 --modifier acetonitrile --column 150x4.6 --flow 1.0\n  phasewise predict toluene p-xylene m-xylene --mode gc --phase gc-wax --oven '40:2,10:200:5' --column 30x0.25x0.25\n  phasewise predict chloride nitrate sulfate --mode ic-anion --phase ic-anion-hydroxide\n\nOven program (--oven): INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN, e.g. 40:2,10:250:5\n(40 °C for 2 min, 10 °C/min to 250 °C, 5 min); INITIAL_C:HOLD_MIN alone is isothermal."
    )]
    Predict(PredictArgs),
    /// List the stationary phases of the catalogue: id, mode, generic name, pH range,
    /// maximum temperature and interactions (the ids `--phases-available` and `--phase` take).
    #[command(
        after_help = "Example:\n  phasewise phases --mode gc\n  phasewise phases --format json > phases.json\n\nA --phases-available file lists one of these ids per line (`#` starts a comment)."
    )]
    Phases(PhasesArgs),
    /// Write a reviewable method-development plan (HTML or Markdown) for a list of analytes.
    #[command(
        after_help = "Example:\n  phasewise plan toluene ethylbenzene p-xylene m-xylene o-xylene --output plan.html"
    )]
    Plan(PlanArgs),
    /// Compute descriptors, ionisable sites, boiling point and GC suitability from SMILES
    /// (arguments, `--input FILE` with `SMILES<TAB>name` lines, or stdin).
    #[command(
        after_help = "Example:\n  phasewise describe 'CC(=O)Oc1ccccc1C(=O)O' 'c1ccccc1O'\n  printf 'CCO\\tethanol\\n' | phasewise describe --format json"
    )]
    Describe(DescribeArgs),
    /// Build, inspect and extend the knowledge base.
    #[command(subcommand)]
    Kb(KbCommand),
    /// System suitability of one measured run from its peak table.
    #[command(after_help = crate::run_measured::SUITABILITY_HELP)]
    Suitability(crate::run_measured::SuitabilityArgs),
    /// Fit log kw and S from two or more scouting gradients (or, with `--mode gc`, ln k = A + B/T
    /// from two or more oven programs), then optimise the gradient (or the oven program).
    #[command(after_help = crate::run_measured::SCOUT_HELP)]
    Scout(Box<crate::run_measured::ScoutArgs>),
    /// Scale a gradient method to another column geometry and particle size.
    #[command(after_help = crate::run_measured::TRANSFER_HELP)]
    Transfer(crate::run_measured::TransferArgs),
    /// Train and evaluate the LC retention model.
    #[command(subcommand, after_help = crate::run_measured::MODEL_HELP)]
    Model(crate::run_measured::ModelCommand),
    /// Write a shell completion script to stdout.
    #[command(
        after_help = "Example:\n  phasewise completions bash > ~/.local/share/bash-completion/completions/phasewise\n  phasewise completions zsh > ~/.zfunc/_phasewise"
    )]
    Completions(CompletionsArgs),
    /// Write manual pages (roff), one per command, into a directory.
    #[command(
        after_help = "Example:\n  phasewise manpages --output-dir ~/.local/share/man/man1 && man phasewise-advise"
    )]
    Manpages(ManpagesArgs),
}

/// `completions` options.
#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// Shell to write the script for.
    #[arg(value_enum)]
    pub shell: clap_complete::Shell,
}

/// `manpages` options.
#[derive(Debug, Args)]
pub struct ManpagesArgs {
    /// Directory to write `phasewise.1` and `phasewise-<command>.1` into (created if missing).
    #[arg(long, value_name = "DIR")]
    pub output_dir: PathBuf,
}

/// Where analytes come from.
#[derive(Debug, Args)]
pub struct AnalyteInput {
    /// Analytes: names, synonyms, CAS numbers, InChIKeys, PubChem CIDs (`cid:2519`) or
    /// SMILES (`smiles:CCO` forces a SMILES reading).
    #[arg(value_name = "ANALYTE")]
    pub analytes: Vec<String>,
    /// Read analytes from a file: one per line (`#` at the start of a line marks a comment), or
    /// a tab-separated table with a `name` and/or `smiles` header; `-` reads stdin.
    #[arg(long, short, value_name = "FILE")]
    pub input: Option<PathBuf>,
}

/// `lookup` options.
#[derive(Debug, Args)]
pub struct LookupArgs {
    /// Analytes.
    #[command(flatten)]
    pub input: AnalyteInput,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// Options shared by `advise` and `plan`.
#[derive(Debug, Args)]
pub struct AdviseOptions {
    /// Analytes.
    #[command(flatten)]
    pub input: AnalyteInput,
    /// Detector: uv[:nm] (default uv:220), ms, fluorescence, elsd, fid, ecd, conductivity.
    #[arg(long, default_value = "uv:220")]
    pub detector: String,
    /// LC column as LENGTHxID in mm, e.g. 100x2.1 (default 150x4.6).
    #[arg(long, value_name = "LxID")]
    pub column: Option<String>,
    /// LC particle size, µm (default 3.5).
    #[arg(long, value_name = "UM")]
    pub particle: Option<f64>,
    /// LC flow, mL/min (default scaled from 1.0 mL/min at 4.6 mm).
    #[arg(long, value_name = "ML_MIN")]
    pub flow: Option<f64>,
    /// Dwell volume of the LC system, mL.
    #[arg(long, value_name = "ML", default_value_t = 0.0)]
    pub dwell: f64,
    /// Modes to consider, comma-separated: gc, rp, hilic, ic-anion, ic-cation, ion-exclusion.
    #[arg(long, value_delimiter = ',')]
    pub modes: Vec<String>,
    /// File listing the stationary-phase ids the lab has, one per line (see `docs/phases.md`).
    #[arg(long, value_name = "FILE")]
    pub phases_available: Option<PathBuf>,
    /// Number of recommendations to list.
    #[arg(long, default_value_t = 3)]
    pub alternatives: usize,
    /// List pairs whose co-elution probability is at least this (0-1).
    #[arg(long, default_value_t = 0.2)]
    pub risk: f64,
}

/// `advise` options.
#[derive(Debug, Args)]
pub struct AdviseArgs {
    /// Shared options.
    #[command(flatten)]
    pub opts: AdviseOptions,
    /// Output format: table, json (the full report), or csv/tsv (one row per predicted analyte
    /// of each listed recommendation and of the back-up; columns in docs/json-schema.md).
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// `predict` options.
#[derive(Debug, Args)]
pub struct PredictArgs {
    /// Analytes.
    #[command(flatten)]
    pub input: AnalyteInput,
    /// Mode: rp, hilic, gc, ic-anion or ic-cation.
    #[arg(long)]
    pub mode: String,
    /// Stationary-phase id (`phasewise phases` lists them), e.g. rp-c18.
    #[arg(long)]
    pub phase: String,
    /// LC gradient as `time:%organic` pairs in minutes and percent, e.g. `0:5,20:95,23:95`
    /// (required for rp and hilic).
    #[arg(long)]
    pub gradient: Option<String>,
    /// GC oven program `INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN`, e.g. `40:2,10:250:5`
    /// (default: the advisor's program for the analytes).
    #[arg(long, value_name = "PROGRAM")]
    pub oven: Option<String>,
    /// Organic modifier: acetonitrile or methanol.
    #[arg(long)]
    pub modifier: Option<String>,
    /// Aqueous pH (must be inside the phase's range).
    #[arg(long)]
    pub ph: Option<f64>,
    /// Dead time, min (or give --column and --flow).
    #[arg(long, value_name = "MIN")]
    pub t0: Option<f64>,
    /// Column: LC `LENGTHxID` in mm, e.g. 150x4.6; GC `LENGTH_MxID_MMxFILM_UM`, e.g.
    /// 30x0.25x0.25 (carrier 35 cm/s helium; default: the advisor's column).
    #[arg(long, value_name = "COLUMN")]
    pub column: Option<String>,
    /// Flow, mL/min.
    #[arg(long, value_name = "ML_MIN")]
    pub flow: Option<f64>,
    /// Particle size, µm.
    #[arg(long, value_name = "UM")]
    pub particle: Option<f64>,
    /// Dwell volume, mL.
    #[arg(long, value_name = "ML", default_value_t = 0.0)]
    pub dwell: f64,
    /// Column temperature, °C.
    #[arg(long, value_name = "C")]
    pub temperature: Option<f64>,
    /// Flag pairs whose co-elution probability is at least this (0-1).
    #[arg(long, default_value_t = 0.2)]
    pub risk: f64,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// `phases` options.
#[derive(Debug, Args)]
pub struct PhasesArgs {
    /// Only phases of this mode: rp, hilic, gc, ic-anion, ic-cation or ion-exclusion.
    #[arg(long)]
    pub mode: Option<String>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = ListFormat::Table)]
    pub format: ListFormat,
}

/// Output formats of listing commands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ListFormat {
    /// Aligned table.
    Table,
    /// JSON (schema in docs/json-schema.md).
    Json,
}

/// `plan` options.
#[derive(Debug, Args)]
pub struct PlanArgs {
    /// Shared options.
    #[command(flatten)]
    pub opts: AdviseOptions,
    /// The report file (.html or .md); written atomically.
    #[arg(long, short, value_name = "FILE")]
    pub output: PathBuf,
    /// Report format (default from the file extension).
    #[arg(long, value_parser = ["html", "md", "markdown"])]
    pub report_format: Option<String>,
    /// Add a date line to the report (otherwise output is byte-for-byte reproducible).
    #[arg(long)]
    pub date: Option<String>,
}

/// `describe` options.
#[derive(Debug, Args)]
pub struct DescribeArgs {
    /// SMILES strings.
    #[arg(value_name = "SMILES")]
    pub smiles: Vec<String>,
    /// Read `SMILES` or `SMILES<TAB>name` lines from a file; `-` reads stdin.
    #[arg(long, short, value_name = "FILE")]
    pub input: Option<PathBuf>,
    /// Output format.
    #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
    pub format: OutputFormat,
}

/// Output formats for data commands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum OutputFormat {
    /// Aligned tables.
    Table,
    /// JSON (schema in docs/json-schema.md).
    Json,
    /// Comma-separated values.
    Csv,
    /// Tab-separated values.
    Tsv,
}

/// Knowledge-base commands.
#[derive(Debug, Subcommand)]
pub enum KbCommand {
    /// Build the shipped knowledge base from the embedded seed data.
    #[command(after_help = "Example:\n  phasewise kb build --force")]
    Build {
        /// Rebuild even if the base is current.
        #[arg(long)]
        force: bool,
    },
    /// Show counts by source and property.
    #[command(
        after_help = "Example:\n  phasewise kb stats --format json\n  phasewise kb stats --format tsv"
    )]
    Stats {
        /// Output format: table, json, or csv/tsv (one row per database, property, kind,
        /// source and licence, with its row count).
        #[arg(long, short, value_enum, default_value_t = OutputFormat::Table)]
        format: OutputFormat,
    },
    /// Add one compound (or lab-measured values for a known one) to the user overlay.
    #[command(
        after_help = "Example:\n  phasewise kb add --name 'impurity B' --smiles 'CC(=O)Nc1ccc(O)cc1Cl' \\\n      --prop logp=1.4 --prop 'pka=9.1;type=acidic' --source 'lab notebook 12, p. 40'"
    )]
    Add(AddArgs),
    /// Import compounds from a CSV or TSV file into the user overlay (all or nothing).
    #[command(
        after_help = "Columns: name (required), smiles, cas, inchikey, synonyms (|-separated), kind,\nsource, properties, and property columns such as logp, pka, pka_type, boiling_point[C].\n\nExample:\n  phasewise kb import lab-compounds.csv --source 'lab QC data 2026'"
    )]
    Import {
        /// The file (`-` for stdin).
        file: PathBuf,
        /// Source for rows without a `source` cell.
        #[arg(long)]
        source: Option<String>,
        /// Leave out bad rows (listed) instead of rejecting the whole file.
        #[arg(long)]
        skip_bad: bool,
    },
    /// Export the user overlay as TSV (re-importable).
    #[command(after_help = "Example:\n  phasewise kb export > my-compounds.tsv")]
    Export,
    /// Print where the knowledge-base files are.
    #[command(after_help = "Example:\n  phasewise kb path")]
    Path,
}

/// `kb add` options.
#[derive(Debug, Args)]
pub struct AddArgs {
    /// Preferred name.
    #[arg(long)]
    pub name: String,
    /// Further names (repeatable).
    #[arg(long = "synonym", value_name = "NAME")]
    pub synonyms: Vec<String>,
    /// Structure as SMILES.
    #[arg(long)]
    pub smiles: Option<String>,
    /// CAS registry number.
    #[arg(long)]
    pub cas: Option<String>,
    /// Standard InChIKey.
    #[arg(long)]
    pub inchikey: Option<String>,
    /// A property as `name=value[unit][;key=value]`, e.g. `boiling_point=78.4C`,
    /// `pka=4.76;type=acidic` (repeatable).
    #[arg(long = "prop", value_name = "PROPERTY")]
    pub properties: Vec<String>,
    /// Where the values come from (required).
    #[arg(long)]
    pub source: String,
    /// The values were computed, not measured.
    #[arg(long)]
    pub estimated: bool,
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::CommandFactory;

    #[test]
    fn the_command_definition_is_consistent() {
        Cli::command().debug_assert();
    }

    #[test]
    fn every_command_has_an_example() {
        fn walk(c: &clap::Command, path: &str) {
            let name = format!("{path} {}", c.get_name());
            if c.get_subcommands().next().is_none() {
                let help = c
                    .get_after_help()
                    .map(|h| h.to_string())
                    .unwrap_or_default();
                assert!(
                    help.contains("Example"),
                    "`{name}` has no example in its help"
                );
            }
            for s in c.get_subcommands() {
                walk(s, &name);
            }
        }
        walk(&Cli::command(), "");
    }
}
