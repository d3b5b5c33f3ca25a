//! The LC retention model, gathered under its historical path. Each part lives in its own file
//! of `model`, and this module re-exports them so `model::regression::X` keeps working:
//!
//! | file | holds |
//! |---|---|
//! | `system` | `LcSystem`, mode, chemistry class, modifier, additive, `ModelError` |
//! | `lss` | the retention target `psi_k1` and its conversion to retention time |
//! | `features` | analyte descriptors (`AnalyteFeatures`, descriptor sources) |
//! | `linear` | system features, the ridge design matrix (`LinearPart`) and its fit |
//! | `training_data` | RepoRT systems and retention rows, system folds |
//! | `memory` | the retention memory and stored scouting fits |
//! | `fitted` | the trained `Model` and its file format |
//! | `prediction` | the `Prediction` record and co-elution probabilities |
//! | `predict` | `Model::predict` (descriptor and memory paths) |
//! | `calibration` | cross-validated intervals, difference errors and memory weights |
//! | `train` | training (calibration, then the fit on all rows) |
//! | `eval` | evaluation by leave-systems-out cross-validation (depends on the model, never the reverse) |
//!
//! The LC retention model: chromatographic systems (`LcSystem`), the gradient-independent
//! retention target and its conversion to retention time through the linear-solvent-strength
//! (LSS) gradient integral, the ridge regression on analyte descriptors × system features,
//! cross-validated prediction intervals, co-elution probabilities, training and the model file.
//!
//! Target. For every (analyte, system) the model predicts `psi_k1`, the strong-solvent fraction
//! at which the analyte's retention factor is 1 under the LSS model
//! `log10 k = S (psi_k1 − psi)`, i.e. `psi_k1 = log10(kw)/S` (Snyder & Dolan, "High-Performance
//! Gradient Elution", Wiley 2007, ch. 2; from memory). The strong solvent is the organic
//! modifier in RP and water in HILIC (`psi = 1 − organic fraction`), an approximation for HILIC
//! documented in docs/model.md. S comes from the size rule `S = 0.25·sqrt(M/(g/mol))` (same
//! source, from memory). `psi_k1` is obtained from a measured retention time by inverting the
//! fundamental gradient equation `∫_0^{tR−t0} dt / (t0·k(psi_inlet(t))) = 1` (Nikitas &
//! Pappa-Louisi, J. Chromatogr. A 1216 (2009) 1737, from memory), which has a closed form for
//! piecewise-linear programs; the same integral maps a predicted `psi_k1` back to minutes for
//! any user gradient, dead time and dwell time.

pub use super::fitted::{MODEL_LICENCE, Model, PathCalibration};
pub use super::linear::*;
pub use super::lss::*;
pub use super::prediction::*;
pub use super::system::*;
pub use super::train::*;
pub use super::training_data::*;

#[cfg(test)]
mod tests;
