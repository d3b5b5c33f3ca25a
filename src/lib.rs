//! phasewise: chromatographic method-development advice from a list of analytes.
//!
//! The library follows one flow: [`kb`] resolves what the user typed into analytes with
//! properties and provenance ([`property`]); [`structure`] computes what the knowledge base
//! lacks from the SMILES string; the report layer renders results. The command-line program
//! is a thin layer over this API: the library never prints and never exits.
#![deny(missing_docs)]
// No `unwrap`/`expect`/`panic!` outside tests: user input must never crash the program; every
// failure becomes an error value naming the bad input (enforced by clippy in `.ci/run`).
#![cfg_attr(
    not(test),
    deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)
)]

pub mod advisor;
pub mod kb;
pub mod measured;
pub mod model;
pub mod phase;
pub mod plain;
pub mod property;
pub mod report;
pub mod structure;
