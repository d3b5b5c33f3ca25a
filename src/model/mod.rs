//! Retention models: chromatographic theory (`theory`: k, N, H, α, Rs, dead volume, pressure,
//! linear solvent strength), gradient elution (`gradient`), GC retention indices and
//! temperature-programmed retention times (`gc`), ion-chromatography elution order (`ic`).

pub mod gc;
pub mod gradient;
pub mod ic;
pub mod theory;
