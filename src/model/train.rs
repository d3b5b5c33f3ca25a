//! Training the LC model: system-grouped cross-validation for the calibration (`calibration`),
//! then the fit on all rows.

use std::path::Path;

use super::features::PhasewiseDescriptors;
use super::fitted::{MODEL_LICENCE, Model};
use super::linear::{DEFAULT_PENALTIES, Penalties, common_descriptor_names, fit_linear};
use super::system::ModelError;
use super::training_data::TrainingData;

/// Trains the model from the two tables with `PhasewiseDescriptors`.
///
/// # Errors
/// File, format or data-size errors.
pub fn train(systems_path: &Path, retention_path: &Path, seed: u64) -> Result<Model, ModelError> {
    let data = TrainingData::load(systems_path, retention_path, &PhasewiseDescriptors)?;
    train_on(&data, seed)
}

/// Trains on loaded data: 5-fold system-grouped CV for calibration, then a fit on all rows.
///
/// # Errors
/// `ModelError::TooLittleData` when there are too few systems or rows.
pub fn train_on(data: &TrainingData, seed: u64) -> Result<Model, ModelError> {
    train_with(data, seed, DEFAULT_PENALTIES)
}

/// `train_on` with explicit ridge penalties.
///
/// # Errors
/// As `train_on`.
pub fn train_with(
    data: &TrainingData,
    seed: u64,
    penalties: Penalties,
) -> Result<Model, ModelError> {
    if data.systems.len() < 5 {
        return Err(ModelError::TooLittleData(format!(
            "{} systems, need at least 5",
            data.systems.len()
        )));
    }
    let names = common_descriptor_names(data);
    let cv = super::calibration::cross_validate(data, &names, seed, 5, penalties)?;
    let all: Vec<usize> = (0..data.rows.len()).collect();
    let linear = fit_linear(data, &all, &names, true, penalties)?;
    let n_systems = data.systems.len();
    Ok(Model {
        licence: MODEL_LICENCE.into(),
        format_version: 1,
        seed,
        n_rows: data.rows.len(),
        n_systems,
        linear,
        calibration: cv.calibration,
        memory_weights: cv.memory_weights,
        memory: None,
    })
}
