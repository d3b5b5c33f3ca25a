//! A query that named no analyte: the plain record that resolution hands on and that the
//! advisor and the reports carry through unchanged. It lives here, beside [`super::Analyte`],
//! so that the advisor never needs the knowledge base to speak of what did not resolve.

use serde::{Deserialize, Serialize};

/// A near-miss offered for an unresolved query.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Suggestion {
    /// A name or synonym in the knowledge base.
    pub name: String,
    /// The compound's preferred name (differs when the suggestion is a synonym).
    pub compound: String,
    /// Similarity 0–1 (normalised Damerau–Levenshtein on normalised names).
    pub similarity: f64,
}

/// A query that did not resolve.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Unresolved {
    /// What the user typed.
    pub query: String,
    /// Why it did not resolve.
    pub reason: String,
    /// Near misses, best first (never used automatically).
    pub suggestions: Vec<Suggestion>,
    /// For a name that denotes several different compounds: each of them, best first (empty
    /// otherwise). `label=SMILES`, a CAS number or a CID settles which one is meant.
    #[serde(default)]
    pub candidates: Vec<Candidate>,
}

/// One compound an ambiguous name could mean.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Candidate {
    /// The compound's preferred name.
    pub name: String,
    /// CAS number, when known.
    pub cas: Option<String>,
    /// PubChem CID, when known.
    pub cid: Option<i64>,
    /// Standard InChIKey, when known.
    #[serde(default)]
    pub inchikey: Option<String>,
    /// SMILES as stored.
    pub smiles: Option<String>,
    /// How the name is held by this compound: `preferred name`, `systematic name` or
    /// `synonym` (why it is a candidate).
    pub held_as: String,
}
