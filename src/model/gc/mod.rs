//! GC retention: retention indices on any liquid GC phase of the catalogue, their conversion to
//! retention times under a linear oven program, and a starting oven program for a set of analytes.
//!
//! Method (documented in `docs/phases.md`):
//! 1. Boiling-point index. The n-alkane ladder's normal boiling points follow the Kreglewski &
//!    Zwolinski correlation Tb(n) = A - exp(B - C n^(2/3)) (J. Phys. Chem. 65 (1961) 1050;
//!    constants from memory, checked in the tests against handbook alkane boiling points, also from
//!    memory). Inverting it gives an "alkane-equivalent carbon number" n(Tb) for any analyte;
//!    100 n(Tb) is the index a purely dispersive analyte with that boiling point would have on a
//!    non-polar reference phase (boiling-point elution order on squalane-like phases).
//! 2. Group increments to the squalane index for functional groups that raise the boiling point
//!    through hydrogen bonding or dipoles more than they raise retention on a non-polar phase.
//!    They are fitted so that McReynolds' five probes land on their squalane indices (benzene 653,
//!    1-butanol 590, 2-pentanone 627, 1-nitropropane 652, pyridine 699; from memory of McReynolds,
//!    J. Chromatogr. Sci. 8 (1970) 685); the others are from memory of typical indices.
//! 3. Phase shift, Rohrschneider-McReynolds style: dI = a x' + b y' + c z' + d u' + e s', with the
//!    phase constants from `data/phases.tsv` and the analyte's a..e built from its group counts
//!    (one benzene-like ring gives a = 1, one hydroxyl b = 1, ...; weights from memory).
//! 4. n-alkanes are exact by definition: I = 100 n on every phase (Kovats).
//! 5. Retention time: the n-alkanes' retention times under the program are computed by
//!    integrating the migration equation dz/dt = 1 / (t_M (1 + k(T(t)))) with
//!    ln k = ln(K_b / beta) + H (Tb / T - 1) (Clausius-Clapeyron form; H and K_b, the partition
//!    coefficient at the boiling point, are a rough calibration from memory of typical alkane
//!    elution temperatures, see the constants), and the analyte time is interpolated with the linear-temperature-
//!    programmed index of van den Dool & Kratz (J. Chromatogr. 11 (1963) 463).
//!
//! Every number here is approximate; predictions carry an uncertainty and the path used.

use crate::phase::PhaseMode;

mod analyte;
mod boiling_point;
pub mod calibration;
mod ladder;
mod oven;
pub mod panel;
pub mod solvation;

pub use analyte::{GcAnalyte, MAX_CARBON, RingSubstitution};
pub use boiling_point::{
    MIN_RESOLVABLE_DELTA_RI, RetentionIndexPrediction, alkane_boiling_point_k,
    alkane_equivalent_carbon_number, likely_coelute, predict_retention_index,
};
pub use ladder::{
    AlkaneLadder, LadderPoint, OvenSuggestion, RetentionTimePrediction, alkane_ladder,
    predict_retention_time, suggest_oven_program,
};
pub use oven::{GcColumn, OvenProgram};
pub use solvation::{
    SystemConstants, predict_retention_index_from_structure, solute_descriptors, system_constants,
};

/// Errors from the GC retention model.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum GcError {
    /// The phase is not a GC phase.
    #[error("phase `{phase_id}` is a {mode} phase, not a GC phase; choose one of the gc-* phases")]
    NotGcPhase {
        /// Phase id.
        phase_id: String,
        /// Its mode.
        mode: PhaseMode,
    },
    /// The phase has no McReynolds constants (porous-layer adsorption phase).
    #[error(
        "phase `{phase_id}` is an adsorption (porous-layer) phase without McReynolds constants; retention indices are not predicted for it: measure them or use a liquid-film phase"
    )]
    NoMcReynolds {
        /// Phase id.
        phase_id: String,
    },
    /// The phase has no solvation-parameter system constants.
    #[error(
        "phase `{phase_id}` has no published solvation-parameter system constants in data/gc_system_constants.tsv; retention indices are not predicted for it by the solvation model"
    )]
    NoSystemConstants {
        /// Phase id.
        phase_id: String,
    },
    /// The structure cannot be described by the solute-descriptor fragments.
    #[error("structure not handled by the retention model: {0}")]
    Structure(String),
    /// A shipped model table is broken (a build defect).
    #[error("GC retention model data: {0}")]
    ModelData(String),
    /// An analyte field is invalid.
    #[error("analyte field `{field}` = {value} {reason}")]
    BadAnalyte {
        /// Field name.
        field: &'static str,
        /// Offending value.
        value: f64,
        /// What is expected.
        reason: &'static str,
    },
    /// An oven-program or column value is invalid.
    #[error("`{field}` = {value} {reason}")]
    BadCondition {
        /// Field name.
        field: &'static str,
        /// Offending value.
        value: f64,
        /// What is expected.
        reason: &'static str,
    },
    /// An oven-program text (`--oven`) could not be read.
    #[error(
        "oven program `{spec}`: `{token}` {reason}; write INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN, e.g. 40:2,10:250:5 (or INITIAL_C:HOLD_MIN alone for an isothermal run)"
    )]
    BadOvenSpec {
        /// The whole text.
        spec: String,
        /// The offending part.
        token: String,
        /// What is wrong.
        reason: String,
    },
    /// The program heats the column above the phase's limit.
    #[error(
        "oven final temperature {final_c} C exceeds the maximum {t_max_c} C of phase `{phase_id}`; lower the final temperature (bleed and phase damage above it)"
    )]
    AbovePhaseLimit {
        /// Phase id.
        phase_id: String,
        /// Requested final temperature.
        final_c: f64,
        /// Phase limit.
        t_max_c: f64,
    },
    /// The index is outside the range of n-alkanes eluted by the program.
    #[error(
        "retention index {retention_index:.0} is outside the n-alkane ladder eluted by this program (C{first_carbon} to C{last_carbon}); raise the final temperature or lengthen the final hold"
    )]
    OutsideLadder {
        /// Requested index.
        retention_index: f64,
        /// Smallest ladder carbon number.
        first_carbon: u32,
        /// Largest eluted carbon number.
        last_carbon: u32,
    },
    /// The retention time is outside the range of eluted n-alkanes.
    #[error(
        "retention time {retention_time_min} min is outside the n-alkane ladder eluted by this program (C{first_carbon} to C{last_carbon})"
    )]
    TimeOutsideLadder {
        /// Requested time.
        retention_time_min: f64,
        /// Smallest ladder carbon number.
        first_carbon: u32,
        /// Largest eluted carbon number.
        last_carbon: u32,
    },
    /// A retention-index range is invalid.
    #[error(
        "retention-index range {ri_min} to {ri_max} is invalid; give 100 <= ri_min <= ri_max <= 6000"
    )]
    BadIndexRange {
        /// Lower end.
        ri_min: f64,
        /// Upper end.
        ri_max: f64,
    },
}

#[cfg(test)]
mod tests;
#[cfg(test)]
mod tests_classes;
#[cfg(test)]
mod tests_solvation;

/// Predicts the retention index of one analyte on `phase` by the best route available: the
/// solvation-parameter model from the structure `graph` (phase selectivity, no boiling point
/// needed), else the boiling-point route from `fallback` (an analyte known only by its boiling
/// point and group counts). When the structure cannot be typed but a boiling point is known, the
/// fallback's path says why the solvation route was not used.
///
/// # Errors
/// [`GcError::NotGcPhase`]; [`GcError::NoSystemConstants`] / [`GcError::NoMcReynolds`] when
/// neither route has constants for the phase; [`GcError::Structure`] when the structure cannot be
/// typed and there is no boiling point.
pub fn predict_analyte_index(
    graph: Option<&crate::structure::graph::MolGraph>,
    fallback: Option<&GcAnalyte>,
    phase: &crate::phase::StationaryPhase,
) -> Result<RetentionIndexPrediction, GcError> {
    let solvation = graph.map(|g| predict_retention_index_from_structure(g, phase));
    match (solvation, fallback) {
        (Some(Ok(p)), _) => Ok(p),
        (Some(Err(e @ GcError::NotGcPhase { .. })), _) => Err(e),
        (Some(Err(e)), Some(a)) => predict_retention_index(a, phase).map(|mut p| {
            p.path = format!("{} (solvation route not used: {e})", p.path);
            p
        }),
        (Some(Err(e)), None) => Err(e),
        (None, Some(a)) => predict_retention_index(a, phase),
        (None, None) => Err(GcError::Structure(
            "no structure and no boiling point: nothing to predict the index from".into(),
        )),
    }
}
