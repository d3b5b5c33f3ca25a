//! The phasewise command-line program: parse arguments, run the command (`src/cli/`), print
//! errors and map the outcome to an exit code. Exit codes: 0 success; 1 partial (some analytes
//! unresolved); 2 bad input or usage; 3 knowledge-base trouble (missing, damaged, newer schema,
//! locked).
// No `unwrap`/`expect`/`panic!` outside tests (see src/lib.rs).
#![cfg_attr(
    not(test),
    deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)
)]

mod cli;

use std::process::ExitCode;

use clap::Parser;

/// The general-purpose allocator of the program. Describing a molecule makes many small,
/// short-lived allocations (graphs, ring lists, SMARTS scratch) inside the SMILES crate and our
/// own code; mimalloc (MIT licence) takes about a fifth off the time of `describe` against the
/// system allocator (docs/performance.md). Benchmarks declare the same allocator so that they
/// measure what the program does.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() -> ExitCode {
    let cli = cli::Cli::parse();
    match cli::run(&cli) {
        Ok(code) => code,
        // a closed pipe (`phasewise lookup ... | head`) is not an error
        Err(e) if cli::exit::is_broken_pipe(&e) => ExitCode::SUCCESS,
        Err(e) => {
            cli::output::print_error(&e);
            ExitCode::from(cli::exit::exit_code_for(&e))
        }
    }
}
