//! Projection of an LC recommendation's predicted retention onto the user's own system from
//! calibrants (compounds the user measured on that column and gradient): the monotone map of
//! `model::projection` is fitted to the calibrants' (predicted, measured) times and applied to
//! every prediction; the path says so and the notes say how, on how many calibrants, with what
//! leave-one-out error, and which calibrants could not be used.

use crate::model::projection::{MIN_CALIBRANTS, Projection, ProjectionError};
use crate::report::advice::Recommendation;
use crate::report::num;

/// One usable calibrant: its name as the user gave it, the time measured on the user's system
/// and the time the model predicts for it under the same conditions (min).
#[derive(Debug, Clone, PartialEq)]
pub struct Calibrant {
    /// Name as given in the calibrant table.
    pub name: String,
    /// Measured retention time, min.
    pub measured_min: f64,
    /// Predicted retention time under the user's conditions, min.
    pub predicted_min: f64,
}

/// Why the projection was refused.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CalibrantError {
    /// Too few usable calibrants (the file, the count, those not usable and why).
    #[error(
        "calibrants {file}: {usable} usable calibrant{} (at least {MIN_CALIBRANTS} are needed){}",
        if *usable == 1 { "" } else { "s" },
        if unusable.is_empty() { String::new() } else { format!("; not usable: {}", unusable.join(", ")) }
    )]
    TooFew {
        /// The calibrant file as given.
        file: String,
        /// Usable calibrants.
        usable: usize,
        /// Calibrants that could not be used, each with its reason.
        unusable: Vec<String>,
    },
    /// The map could not be fitted (bad times, no spread).
    #[error("calibrants {file}: {source}")]
    Fit {
        /// The calibrant file as given.
        file: String,
        /// What went wrong.
        source: ProjectionError,
    },
}

/// Projects every prediction of `rec` onto the calibrants' system and returns the notes that
/// say so. `unusable` lists calibrants that did not resolve or could not be predicted, each with
/// its reason (named in the notes, or in the error when too few remain).
///
/// # Errors
/// `CalibrantError::TooFew` with fewer than `MIN_CALIBRANTS` usable calibrants,
/// `CalibrantError::Fit` when the map cannot be fitted.
pub fn project_onto_calibrants(
    rec: &mut Recommendation,
    calibrants: &[Calibrant],
    unusable: &[String],
    file: &str,
) -> Result<Vec<String>, CalibrantError> {
    if calibrants.len() < MIN_CALIBRANTS {
        return Err(CalibrantError::TooFew {
            file: file.to_owned(),
            usable: calibrants.len(),
            unusable: unusable.to_vec(),
        });
    }
    let pairs: Vec<(f64, f64)> = calibrants
        .iter()
        .map(|c| (c.predicted_min, c.measured_min))
        .collect();
    let proj = Projection::fit(&pairs).map_err(|source| CalibrantError::Fit {
        file: file.to_owned(),
        source,
    })?;
    let mut extrapolated = Vec::new();
    for p in &mut rec.predictions {
        let x = proj.project(p.retention_time_min);
        p.retention_time_min = x.rt_min;
        p.interval_low_min = x.interval_min.0;
        p.interval_high_min = x.interval_min.1;
        p.interval_coverage = 0.9;
        p.path = format!("{}, projected on calibrants", p.path);
        if x.extrapolated {
            extrapolated.push(p.analyte.clone());
        }
    }
    // a monotone map keeps the order; ties stay in the model's order (stable sort)
    rec.predictions
        .sort_by(|a, b| a.retention_time_min.total_cmp(&b.retention_time_min));
    let loo = proj.loo_residuals();
    let mae = loo.iter().map(|r| r.abs()).sum::<f64>() / loo.len() as f64;
    let (lo, hi) = proj.range_min();
    let mut notes = vec![format!(
        "retention times projected onto the calibrants of {file} ({n} compounds measured on your system): a monotone map from predicted to measured time (mean of a least-squares line and an isotonic fit); leave-one-out error of the calibrants {mae} min on average, 90 % intervals ±{hw} min from those residuals; co-elution probabilities and resolutions are those of the model before projection",
        n = calibrants.len(),
        mae = num(mae, 2),
        hw = num(proj.half_width_min(), 2),
    )];
    if calibrants.len() < 10 {
        notes.push(format!(
            "only {} calibrants: the interval rests on few residuals; 10 or more spread over the run give a firmer projection",
            calibrants.len()
        ));
    }
    if !extrapolated.is_empty() {
        notes.push(format!(
            "outside the calibrants' predicted range ({}-{} min), extrapolated with the map's slope: {}",
            num(lo, 2),
            num(hi, 2),
            extrapolated.join(", ")
        ));
    }
    if !unusable.is_empty() {
        notes.push(format!("calibrants not used: {}", unusable.join(", ")));
    }
    Ok(notes)
}
