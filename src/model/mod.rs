//! Retention models: chromatographic theory (`theory`: k, N, H, α, Rs, dead volume, pressure,
//! linear solvent strength), gradient elution (`gradient`), GC retention indices and
//! temperature-programmed retention times (`gc`), ion-chromatography elution order (`ic`), and
//! the LC regression model trained on open retention data (`regression`, `features`,
//! `memory`, `eval`).

pub mod eval;
pub mod features;
pub mod gc;
pub mod gradient;
pub mod ic;
pub mod memory;
pub mod regression;
pub mod theory;
