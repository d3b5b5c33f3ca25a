//! Typed records of the phase catalogue. Fields are private; records are built only from
//! validated table rows (`from_row`), so every value a caller sees has passed the range checks.
//!
//! One file per kind of record: `stationary` (phases), `mobile` (solvents, buffers, IC eluents,
//! carrier gases), `ions` (IC panel ions); the id and InChIKey checks they share live here.

mod ions;
mod mobile;
mod stationary;

pub use ions::{IcIon, IonPanel};
pub use mobile::{
    Buffer, BufferRole, CarrierGas, IcEluent, MsCompatibility, Solvent, TypicalConcentration,
};
pub use stationary::{
    ChemClass, GcParameters, IcExchanger, Interaction, McReynoldsConstants, PhaseMode,
    RpParameters, StationaryPhase,
};

use super::PhaseError;
use super::tsv::Row;

pub(super) fn is_inchikey_shaped(key: &str) -> bool {
    let parts: Vec<&str> = key.split('-').collect();
    parts.len() == 3
        && parts[0].len() == 14
        && parts[1].len() == 10
        && parts[2].len() == 1
        && parts
            .iter()
            .all(|p| p.chars().all(|c| c.is_ascii_uppercase()))
}

/// Ids are short, lower-case ASCII with digits and hyphens, so they are stable in files and CLIs.
pub(super) fn parse_id(row: &Row<'_>) -> Result<String, PhaseError> {
    let id = row.text("id")?;
    let ok = id.len() <= 40
        && id
            .chars()
            .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
        && !id.starts_with('-')
        && !id.ends_with('-');
    if ok {
        Ok(id.to_string())
    } else {
        Err(row.bad(
            "id",
            id,
            "must be at most 40 characters of lower-case letters, digits and inner hyphens",
        ))
    }
}
