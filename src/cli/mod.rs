//! The command layer: one file per command, each holding that command's clap arguments and its
//! handler, top to bottom in the order it runs (check cheap arguments, open what it needs, call
//! the library, hand the result to a renderer in `phasewise::report`, choose the exit code).
//!
//! Shared pieces live once: [`input`] (analyte lists, peak tables, files and stdin, option
//! values), [`output`] (formats, stdout/stderr with control characters neutralised, atomic
//! file writes), [`exit`] (error to exit code), [`knowledge`] (opening the knowledge base,
//! resolving analytes) and [`advising`] (the advice `advise`, `plan` and `predict` start from).
//! No command file imports another.

pub mod advise;
pub mod advising;
pub mod calibrants;
pub mod describe;
pub mod exit;
pub mod input;
pub mod kb;
pub mod knowledge;
pub mod lookup;
pub mod meta;
pub mod model;
pub mod output;
pub mod phases;
pub mod plan;
pub mod predict;
pub mod scout;
pub mod suitability;
pub mod transfer;

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;
use clap::{Parser, Subcommand};

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
    Lookup(lookup::LookupArgs),
    /// Recommend separation mode, stationary phase, starting conditions, co-elution risks and
    /// an orthogonal back-up for a list of analytes.
    #[command(
        after_help = "Example:\n  phasewise advise caffeine theobromine theophylline paraxanthine --detector uv:273\n  phasewise advise --input panel.txt --detector ms --format json"
    )]
    Advise(advise::AdviseArgs),
    /// Predict retention of analytes under given conditions: LC (reversed phase or HILIC), GC
    /// (retention index and time under an oven program) or IC (elution order and relative
    /// retention).
    #[command(
        after_help = "Example:\n  phasewise predict caffeine theophylline --mode rp --phase rp-c18 --gradient '0:5,20:95' \\\n      --ph 2.7 --modifier acetonitrile --column 150x4.6 --flow 1.0\n  phasewise predict toluene p-xylene m-xylene --mode gc --phase gc-wax --oven '40:2,10:200:5' --column 30x0.25x0.25\n  phasewise predict chloride nitrate sulfate --mode ic-anion --phase ic-anion-hydroxide\n\nOven program (--oven): INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN, e.g. 40:2,10:250:5\n(40 °C for 2 min, 10 °C/min to 250 °C, 5 min); INITIAL_C:HOLD_MIN alone is isothermal."
    )]
    Predict(predict::PredictArgs),
    /// List the stationary phases of the catalogue: id, mode, generic name, pH range,
    /// maximum temperature and interactions (the ids `--phases-available` and `--phase` take).
    #[command(
        after_help = "Example:\n  phasewise phases --mode gc\n  phasewise phases --format json > phases.json\n\nA --phases-available file lists one of these ids per line (`#` starts a comment)."
    )]
    Phases(phases::PhasesArgs),
    /// Write a reviewable method-development plan (HTML or Markdown) for a list of analytes.
    #[command(
        after_help = "Example:\n  phasewise plan toluene ethylbenzene p-xylene m-xylene o-xylene --output plan.html"
    )]
    Plan(plan::PlanArgs),
    /// Compute descriptors, ionisable sites, boiling point and GC suitability from SMILES
    /// (arguments, `--input FILE` with `SMILES<TAB>name` lines, or stdin).
    #[command(
        after_help = "Example:\n  phasewise describe 'CC(=O)Oc1ccccc1C(=O)O' 'c1ccccc1O'\n  printf 'CCO\\tethanol\\n' | phasewise describe --format json"
    )]
    Describe(describe::DescribeArgs),
    /// Build, inspect and extend the knowledge base.
    #[command(subcommand)]
    Kb(kb::KbCommand),
    /// System suitability of one measured run from its peak table.
    #[command(after_help = suitability::SUITABILITY_HELP)]
    Suitability(suitability::SuitabilityArgs),
    /// Fit log kw and S from two or more scouting gradients (or, with `--mode gc`, ln k = A + B/T
    /// from two or more oven programs), then optimise the gradient (or the oven program).
    #[command(after_help = scout::SCOUT_HELP)]
    Scout(Box<scout::ScoutArgs>),
    /// Scale a gradient method to another column geometry and particle size.
    #[command(after_help = transfer::TRANSFER_HELP)]
    Transfer(transfer::TransferArgs),
    /// Train and evaluate the LC retention model.
    #[command(subcommand, after_help = model::MODEL_HELP)]
    Model(model::ModelCommand),
    /// Write a shell completion script to stdout.
    #[command(
        after_help = "Example:\n  phasewise completions bash > ~/.local/share/bash-completion/completions/phasewise\n  phasewise completions zsh > ~/.zfunc/_phasewise"
    )]
    Completions(meta::CompletionsArgs),
    /// Write manual pages (roff), one per command, into a directory.
    #[command(
        after_help = "Example:\n  phasewise manpages --output-dir ~/.local/share/man/man1 && man phasewise-advise"
    )]
    Manpages(meta::ManpagesArgs),
}

/// Run a parsed command line.
pub fn run(cli: &Cli) -> Result<ExitCode> {
    match &cli.command {
        Command::Lookup(a) => lookup::run(cli, a),
        Command::Advise(a) => advise::run(cli, a),
        Command::Predict(a) => predict::run(cli, a),
        Command::Phases(a) => phases::run(a),
        Command::Plan(a) => plan::run(cli, a),
        Command::Describe(a) => describe::run(a),
        Command::Kb(k) => kb::run(cli, k),
        Command::Suitability(a) => suitability::run(a),
        Command::Scout(a) => scout::run(cli, a),
        Command::Transfer(a) => transfer::run(a),
        Command::Model(m) => model::run(m),
        Command::Completions(a) => meta::run_completions(a),
        Command::Manpages(a) => meta::run_manpages(a),
    }
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
