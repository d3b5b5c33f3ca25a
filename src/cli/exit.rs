//! Exit codes (documented in the user guide): 0 success; 1 partial (some analytes unresolved,
//! a suitability check failed, rows skipped, fits left unstored); 2 bad input or usage; 3
//! knowledge-base trouble (missing, damaged, newer schema, locked, or its location unusable:
//! no home directory, a path that cannot be read or written).

use std::process::ExitCode;

use phasewise::kb::KbError;

use super::knowledge::KbLocationError;

/// Exit code: some analytes did not resolve, the rest were handled.
pub const EXIT_PARTIAL: u8 = 1;
/// Exit code: bad input or usage.
pub const EXIT_BAD_INPUT: u8 = 2;
/// Exit code: the knowledge base is missing, damaged, newer or locked.
pub const EXIT_KB: u8 = 3;

/// Map an error to its documented exit code.
pub fn exit_code_for(e: &anyhow::Error) -> u8 {
    for c in e.chain() {
        if c.downcast_ref::<KbLocationError>().is_some() {
            return EXIT_KB;
        }
        if let Some(k) = c.downcast_ref::<KbError>() {
            return match k {
                KbError::BadIdentifier { .. } | KbError::BadInput(_) => EXIT_BAD_INPUT,
                KbError::Io { .. } => EXIT_BAD_INPUT,
                _ => EXIT_KB,
            };
        }
    }
    EXIT_BAD_INPUT
}

/// 0, or 1 when only part of the work could be done.
pub fn success_unless_partial(partial: bool) -> ExitCode {
    if partial {
        ExitCode::from(EXIT_PARTIAL)
    } else {
        ExitCode::SUCCESS
    }
}

/// Whether the error is a closed pipe (`phasewise lookup ... | head`), which is not an error.
pub fn is_broken_pipe(e: &anyhow::Error) -> bool {
    e.chain().any(|c| {
        c.downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}
