//! Tolerances for comparing descriptors with reference values (one place, as
//! the style guide asks). Reference: RDKit 2026.09.1 (`tests/data/README.md`),
//! which prints floats with 6 decimals.

/// Crippen logP, absolute (log units).
pub const LOGP: f64 = 0.01;
/// Crippen molar refractivity, absolute, cm³/mol.
pub const MR_CM3_MOL: f64 = 0.01;
/// TPSA, absolute, Å².
pub const TPSA_A2: f64 = 0.1;
/// Average molar mass, absolute, g/mol.
pub const MOLAR_MASS_G_MOL: f64 = 0.01;
/// Monoisotopic mass, absolute, Da.
pub const EXACT_MASS_DA: f64 = 0.001;
/// Fraction of sp3 carbons, absolute.
pub const FRACTION_CSP3: f64 = 1e-4;
/// Minimum fraction of reference molecules that must agree on each descriptor.
pub const MIN_AGREEMENT: f64 = 0.995;
