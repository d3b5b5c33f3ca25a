//! `phasewise completions` and `phasewise manpages`: shell completion scripts and roff manual
//! pages, both generated from the clap definitions.

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, Result};
use clap::{Args, CommandFactory};

use super::Cli;
use super::output::{note, write_atomically, write_out};

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

/// Runs `phasewise completions`.
pub fn run_completions(a: &CompletionsArgs) -> Result<ExitCode> {
    let mut out = Vec::new();
    clap_complete::generate(a.shell, &mut Cli::command(), "phasewise", &mut out);
    write_out(&String::from_utf8_lossy(&out))?;
    Ok(ExitCode::SUCCESS)
}

/// Runs `phasewise manpages`.
pub fn run_manpages(a: &ManpagesArgs) -> Result<ExitCode> {
    let written = write_manpages(&a.output_dir)?;
    note(&format!(
        "wrote {} manual pages to {}",
        written,
        a.output_dir.display()
    ));
    Ok(ExitCode::SUCCESS)
}

/// Render one roff page per command (`phasewise.1`, `phasewise-advise.1`, `phasewise-kb-add.1`,
/// …), all in memory first, then write each atomically; returns how many were written.
fn write_manpages(dir: &Path) -> Result<usize> {
    fn collect(cmd: &clap::Command, out: &mut Vec<(String, Vec<u8>)>) -> Result<()> {
        // after `build()`, a subcommand's display name is `phasewise-<command>`
        let man = clap_mangen::Man::new(cmd.clone());
        let mut bytes = Vec::new();
        man.render(&mut bytes)
            .with_context(|| format!("rendering the manual page {}", man.get_filename()))?;
        out.push((man.get_filename(), bytes));
        for sub in cmd.get_subcommands().filter(|s| !s.is_hide_set()) {
            collect(sub, out)?;
        }
        Ok(())
    }
    std::fs::create_dir_all(dir)
        .with_context(|| format!("creating the directory {}", dir.display()))?;
    let mut cmd = Cli::command().disable_help_subcommand(true);
    cmd.build();
    let mut pages = Vec::new();
    collect(&cmd, &mut pages)?;
    for (file, bytes) in &pages {
        write_atomically(&dir.join(file), bytes)?;
    }
    Ok(pages.len())
}
