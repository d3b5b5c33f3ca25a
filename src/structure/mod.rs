//! Structure engine: SMILES in, the project's own molecular graph and
//! RDKit-compatible descriptors out.
//!
//! [`adapter`] is the only place that sees the SMILES crate; everything else
//! reads [`graph::MolGraph`]. [`describe`] is the one entry point from a SMILES
//! string; [`describe_graph`] works on a graph. Every descriptor cites its
//! source in its module; agreement with RDKit 2026.09.1 is checked over 2,000
//! PubChem structures by `tests/rdkit_reference.rs` (tolerances in
//! [`tolerance`]).
//!
//! Read from the same graph: ionisable groups with typical pKa values ([`ionisable`]), the
//! Joback normal boiling point ([`joback`]) and GC suitability flags ([`volatility`]);
//! [`query`] is the checked view of the graph those three use. [`chromophore`] classes the
//! conjugated pi systems for UV detection.

pub mod abraham;
pub mod adapter;
pub mod canon;
pub mod chromophore;
pub mod crippen;
pub mod descriptors;
pub mod elements;
pub mod formula;
pub mod graph;
pub mod ionisable;
pub mod joback;
pub mod lipinski;
pub mod mcgowan;
pub mod query;
pub mod rings;
pub mod smarts;
pub mod tautomer;
pub mod tolerance;
pub mod tpsa;
pub mod volatility;

pub use adapter::{
    MAX_HEAVY_ATOMS, MAX_SMILES_BYTES, ParseOptions, Parsed, StructureError, parse_smiles,
    parse_smiles_with,
};
pub use canon::{StructureKey, key_of_graph, structure_key};
pub use descriptors::{Description, Descriptors, describe, describe_graph};
pub use graph::{Atom, Bond, BondOrder, MolGraph, StereoMark};

/// Whether `smiles` parses as a SMILES string the structure engine accepts.
///
/// A string that [`parse_smiles`] accepted in this thread moments ago is not parsed again
/// (resolving a list asks this of every analyte's query after its key was computed from it).
pub fn is_valid_smiles(smiles: &str) -> bool {
    adapter::recently_parsed(smiles) || parse_smiles(smiles).is_ok()
}

/// Parse `smiles`, returning the engine's message (with the offending position) when it fails.
///
/// # Errors
/// The description of the first problem.
pub fn check_smiles(smiles: &str) -> Result<(), String> {
    parse_smiles(smiles).map(|_| ()).map_err(|e| e.to_string())
}
