//! `phasewise kb …`: build, inspect and extend the knowledge base. `build`, `add` and `import`
//! write; `stats`, `export` and `path` only read.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, Result};
use clap::{Args, Subcommand};

use phasewise::kb::user::{NewCompound, parse_property};
use phasewise::kb::{Access, build};
use phasewise::property::PropertyKind;
use phasewise::report::kb_stats::{stats_delimited, stats_table};

use super::Cli;
use super::exit::success_unless_partial;
use super::input::read_text;
use super::knowledge::{BuildProgress, located, open_kb, paths};
use super::output::{OutputFormat, note, write_out};

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

/// Runs `phasewise kb …`.
pub fn run(cli: &Cli, k: &KbCommand) -> Result<ExitCode> {
    match k {
        KbCommand::Build { force } => {
            let p = paths(cli)?;
            let status = build::shipped_status(&p.shipped).map_err(located)?;
            if status == build::Status::Current && !force {
                note(&format!(
                    "knowledge base {} is current (use --force to rebuild)",
                    p.shipped.display()
                ));
                return Ok(ExitCode::SUCCESS);
            }
            let mut progress = BuildProgress::new();
            let t = std::time::Instant::now();
            let counts = build::build_shipped(&p.shipped, &mut |f, msg| progress.update(f, msg))
                .map_err(located)?;
            progress.finish();
            note(&format!(
                "built {}: {} compounds, {} names, {} property rows in {:.1} s",
                p.shipped.display(),
                counts.compounds,
                counts.names,
                counts.properties,
                t.elapsed().as_secs_f64()
            ));
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Stats { format } => {
            let kb = open_kb(cli, Access::Read)?;
            let s = kb.stats()?;
            let text = match format {
                OutputFormat::Json => format!("{}\n", serde_json::to_string_pretty(&s)?),
                OutputFormat::Table => stats_table(&s),
                OutputFormat::Csv => stats_delimited(&s, ','),
                OutputFormat::Tsv => stats_delimited(&s, '\t'),
            };
            write_out(&text)?;
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Add(a) => {
            let properties = a
                .properties
                .iter()
                .map(|p| parse_property(p))
                .collect::<Result<Vec<_>, _>>()?;
            let c = NewCompound {
                name: a.name.clone(),
                synonyms: a.synonyms.clone(),
                smiles: a.smiles.clone(),
                cas: a.cas.clone(),
                inchikey: a.inchikey.clone(),
                properties,
                source: a.source.clone(),
                kind: if a.estimated {
                    PropertyKind::Estimated
                } else {
                    PropertyKind::Experimental
                },
            };
            let mut kb = open_kb(cli, Access::Write)?;
            kb.add_compound(&c)?;
            note(&format!(
                "added `{}` to {}",
                c.name,
                kb.user_path().display()
            ));
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Import {
            file,
            source,
            skip_bad,
        } => {
            let text = read_text(file)?;
            let mut kb = open_kb(cli, Access::Write)?;
            let r = kb
                .import(&text, source.as_deref(), *skip_bad)
                .with_context(|| format!("importing {}", file.display()))?;
            for s in &r.skipped {
                note(&format!("skipped line {}: {}", s.line, s.reason));
            }
            let plural = |n: usize, one: &str, many: &str| {
                format!("{n} {}", if n == 1 { one } else { many })
            };
            note(&format!(
                "imported {} into {}{}",
                plural(r.imported, "compound", "compounds"),
                kb.user_path().display(),
                if r.skipped.is_empty() {
                    String::new()
                } else {
                    format!(" ({} skipped)", plural(r.skipped.len(), "row", "rows"))
                }
            ));
            Ok(success_unless_partial(!r.skipped.is_empty()))
        }
        KbCommand::Export => {
            let kb = open_kb(cli, Access::Read)?;
            write_out(&kb.export_user()?)?;
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Path => {
            let p = paths(cli)?;
            write_out(&format!(
                "shipped\t{}\nuser\t{}\n",
                p.shipped.display(),
                p.user.display()
            ))?;
            Ok(ExitCode::SUCCESS)
        }
    }
}
