//! The phasewise command-line program: parse arguments, call the library, print, and map the
//! outcome to an exit code. Exit codes: 0 success; 1 partial (some analytes unresolved);
//! 2 bad input or usage; 3 knowledge-base trouble (missing, damaged, newer schema, locked).
// No `unwrap`/`expect`/`panic!` outside tests (see src/lib.rs).
#![cfg_attr(
    not(test),
    deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)
)]

mod cli;
mod commands;
mod run_measured;

use std::io::Write;
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
    match commands::run(cli) {
        Ok(code) => code,
        Err(e) => {
            // a closed pipe (`phasewise lookup ... | head`) is not an error
            if e.chain().any(|c| {
                c.downcast_ref::<std::io::Error>()
                    .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
            }) {
                return ExitCode::SUCCESS;
            }
            let mut err = std::io::stderr().lock();
            let _ = writeln!(err, "phasewise: error: {e}");
            for cause in e.chain().skip(1) {
                let _ = writeln!(err, "  caused by: {cause}");
            }
            ExitCode::from(commands::exit_code_for(&e))
        }
    }
}
