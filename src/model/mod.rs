//! Retention models: chromatographic theory (`theory`: k, N, H, α, Rs, dead volume, pressure,
//! linear solvent strength), gradient elution (`gradient`), GC retention indices and
//! temperature-programmed retention times (`gc`), ion-chromatography elution order (`ic`), and
//! the LC regression model trained on open retention data. The LC model's parts, in the order
//! they depend on each other: `system`, `lss`, `features`, `training_data`, `linear`,
//! `prediction`, `memory`, `fitted`, `predict`, `calibration`, `train`, and last `eval`, which
//! depends on the model and never the reverse; `regression` re-exports them under the old path.

pub mod calibration;
pub mod coelution;
pub mod eval;
pub mod features;
pub mod fingerprint;
pub mod fitted;
pub mod gc;
pub mod gradient;
mod gz;
pub mod ic;
pub mod learner_features;
pub mod linear;
pub mod lss;
pub mod memory;
pub mod predict;
pub mod prediction;
pub mod projection;
pub mod regression;
pub mod system;
pub mod theory;
pub mod train;
pub mod training_data;
