//! The trained LC retention model (`Model`) and its file format: gzip-compressed JSON written
//! deterministically, the bundled model and retention memory, the per-path calibration it
//! stores. Prediction lives in `predict`, training in `train`.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use super::gz::gzip;
use super::linear::LinearPart;
use super::memory::{MemoryTable, MemoryWeights};
use super::system::{ChemClass, Mode, ModelError};

/// Licence notice stored inside every model file (the model is derived from RepoRT).
pub const MODEL_LICENCE: &str = "Derived from RepoRT (Kretschmer et al., Nature Methods 21 (2024) 153-155), \
licensed CC BY-SA 4.0 (https://creativecommons.org/licenses/by-sa/4.0/); this model file is distributed under CC BY-SA 4.0.";

/// Cross-validated error summary of one path in one mode (psi units: measured − predicted).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PathCalibration {
    /// 5th percentile of the residual.
    pub q05: f64,
    /// 95th percentile of the residual.
    pub q95: f64,
    /// Per-prediction share of the retention-difference error sd, by predicted gap bin
    /// (upper bound of |Δpsi|, sd).
    pub difference_sd: Vec<(f64, f64)>,
    /// Isotonic raw → calibrated co-elution probability map (pairs of this path).
    pub coelution_map: Vec<(f64, f64)>,
    /// Residuals the summary is based on.
    pub n: usize,
}

/// The trained retention model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Model {
    /// Licence and attribution of the model file.
    pub licence: String,
    /// Format version.
    pub format_version: u32,
    /// Seed used for the CV folds.
    pub seed: u64,
    /// Training rows and systems.
    pub n_rows: usize,
    /// Number of training systems.
    pub n_systems: usize,
    /// Main model.
    pub linear: LinearPart,
    /// Calibration per `"<mode>/<path>"`, e.g. `RP/descriptor`.
    pub calibration: BTreeMap<String, PathCalibration>,
    /// Weights for the retention memory.
    pub memory_weights: MemoryWeights,
    /// Retention memory (not serialised with the model; loaded from its own table).
    #[serde(skip)]
    pub memory: Option<MemoryTable>,
}

/// Model file bundled at build time.
const BUILTIN_MODEL: &[u8] = include_bytes!("../../data/lc_model.json.gz");
/// Retention memory table bundled at build time.
const BUILTIN_MEMORY: &[u8] = include_bytes!("../../data/retention_memory.tsv.gz");

/// Checksum of the bundled model and retention-memory files, for a plan's document control:
/// FNV-1a 64-bit over both files' bytes, as 16 hex digits (identifies the files, not a
/// security hash).
pub fn builtin_checksum() -> String {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for b in BUILTIN_MODEL.iter().chain(BUILTIN_MEMORY) {
        h ^= u64::from(*b);
        h = h.wrapping_mul(0x0100_0000_01b3);
    }
    format!("fnv1a64:{h:016x}")
}

impl Model {
    /// Number of shipped training systems of one mode and chemistry class (from the retention
    /// memory's system records); `None` when no memory table is loaded. Classes with few
    /// systems are predicted close to the C18/mode reference by the ridge shrinkage
    /// (docs/model.md §2), so their predictions say less about that chemistry's selectivity.
    pub fn training_systems(&self, mode: Mode, chem_class: ChemClass) -> Option<usize> {
        let memory = self.memory.as_ref()?;
        Some(
            memory
                .systems
                .values()
                .filter(|s| s.mode == mode && s.chem_class == chem_class)
                .count(),
        )
    }

    /// Loads the bundled model and retention memory.
    ///
    /// # Errors
    /// `ModelError::Io` if the bundled files are corrupt.
    pub fn load_builtin() -> Result<Self, ModelError> {
        let mut m = Self::from_gz_bytes(BUILTIN_MODEL, "builtin lc_model.json.gz")?;
        m.memory = Some(MemoryTable::from_gz_bytes_lazy(
            BUILTIN_MEMORY,
            "builtin retention_memory.tsv.gz",
        )?);
        Ok(m)
    }

    /// Decodes a gzip-compressed JSON model.
    ///
    /// # Errors
    /// `ModelError::Io` on a decoding error.
    pub fn from_gz_bytes(bytes: &[u8], label: &str) -> Result<Self, ModelError> {
        let s = super::gz::gunzip(bytes, label)?;
        serde_json::from_str(&s).map_err(|e| ModelError::Io {
            path: label.into(),
            reason: e.to_string(),
        })
    }

    /// Serialises to gzip-compressed JSON (fixed compression level, byte-for-byte deterministic).
    ///
    /// # Errors
    /// `ModelError::Io` if serialisation fails.
    pub fn to_gz_bytes(&self) -> Result<Vec<u8>, ModelError> {
        let json = serde_json::to_string(self).map_err(|e| ModelError::Io {
            path: "model".into(),
            reason: e.to_string(),
        })?;
        gzip(json.as_bytes())
    }
}
