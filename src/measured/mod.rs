//! Measured runs: peak tables ([`peaks`]), system suitability ([`suitability`]), scouting-run
//! fits of the LSS model ([`scout`]), gradient optimisation ([`optimise`]), GC scouting fits of
//! the retention–temperature relation ([`gc_scout`]) and oven-program optimisation
//! ([`gc_optimise`]), LC temperature as a second variable ([`lc_temperature`]), and method
//! transfer between column geometries ([`transfer`]).
//!
//! Shared here: how the column dead time is obtained ([`DeadTimeInput`]).

pub mod gc_optimise;
pub mod gc_scout;
pub mod lc_temperature;
pub mod optimise;
pub mod peaks;
pub mod scout;
pub mod suitability;
pub mod transfer;

use serde::{Deserialize, Serialize};

use crate::model::theory::{self, TheoryError};

/// Where the column dead time t0 comes from.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(tag = "source", rename_all = "snake_case")]
pub enum DeadTimeInput {
    /// Measured or known t0 (e.g. from an unretained marker).
    Given {
        /// Dead time, min.
        dead_time_min: f64,
    },
    /// Estimated from column geometry and flow: Vm ≈ 0.5 L dc² (SKD 2010 ch. 2), t0 = Vm/F.
    FromColumn {
        /// Column length, mm.
        column_length_mm: f64,
        /// Column inner diameter, mm.
        inner_diameter_mm: f64,
        /// Flow rate, mL/min.
        flow_ml_min: f64,
    },
}

impl DeadTimeInput {
    /// The dead time in minutes.
    ///
    /// # Errors
    /// Non-positive or non-finite t0, dimensions or flow.
    pub fn dead_time_min(&self) -> Result<f64, TheoryError> {
        match *self {
            DeadTimeInput::Given { dead_time_min } => {
                theory::positive("dead time t0 (min)", dead_time_min)
            }
            DeadTimeInput::FromColumn {
                column_length_mm,
                inner_diameter_mm,
                flow_ml_min,
            } => theory::dead_time_min(
                theory::column_dead_volume_ml(column_length_mm, inner_diameter_mm)?,
                flow_ml_min,
            ),
        }
    }

    /// A one-line description of where t0 came from, for reports.
    pub fn describe(&self) -> String {
        match *self {
            DeadTimeInput::Given { dead_time_min } => format!("given: {dead_time_min} min"),
            DeadTimeInput::FromColumn {
                column_length_mm,
                inner_diameter_mm,
                flow_ml_min,
            } => format!(
                "estimated from a {column_length_mm} mm × {inner_diameter_mm} mm column at \
                 {flow_ml_min} mL/min with Vm ≈ 0.5·L·dc² (±10–20 %)"
            ),
        }
    }
}
