//! Deterministic gzip for the model and memory files: fixed level, zero timestamp.

use std::io::{Read, Write};

use super::system::ModelError;

/// Reads gzip-compressed bytes as UTF-8 text; `label` names the source in the error.
pub(crate) fn gunzip(bytes: &[u8], label: &str) -> Result<String, ModelError> {
    let mut s = String::new();
    flate2::read::GzDecoder::new(bytes)
        .read_to_string(&mut s)
        .map_err(|e| ModelError::Io {
            path: label.to_owned(),
            reason: e.to_string(),
        })?;
    Ok(s)
}

/// Gzip with a fixed level and a zero timestamp, so the same bytes in give the same file out
/// (model and memory files).
pub(crate) fn gzip(bytes: &[u8]) -> Result<Vec<u8>, ModelError> {
    let mut enc = flate2::GzBuilder::new()
        .mtime(0)
        .write(Vec::new(), flate2::Compression::new(9));
    enc.write_all(bytes)
        .and_then(|()| enc.finish())
        .map_err(|e| ModelError::Io {
            path: "gzip".into(),
            reason: e.to_string(),
        })
}
