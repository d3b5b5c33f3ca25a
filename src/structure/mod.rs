//! The structure engine: from a SMILES string to the descriptors that drive mode choice,
//! retention models and co-elution checks.

/// Whether `smiles` parses as a SMILES string.
pub fn is_valid_smiles(smiles: &str) -> bool {
    check_smiles(smiles).is_ok()
}

/// Parse `smiles`, returning the parser's message (with position) when it fails.
///
/// # Errors
/// The parser's description of the first problem.
pub fn check_smiles(smiles: &str) -> Result<(), String> {
    smiles_rs::Smiles::from_str(smiles)
        .map(|_| ())
        .map_err(|e| e.to_string())
}
