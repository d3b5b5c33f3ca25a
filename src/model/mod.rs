//! Retention models: GC retention indices and temperature-programmed retention times (`gc`),
//! ion-chromatography elution order (`ic`).

pub mod gc;
pub mod ic;
