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
mod parallel;
pub mod peaks;
pub mod scout;
mod scouting;
mod search;
pub mod suitability;
pub mod transfer;
mod window_plot;

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

/// Equal to rounding (relative 1e-9).
pub(crate) fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * (1.0 + a.abs().max(b.abs()))
}

/// Do the programs' signatures (the numbers that move peaks: e.g. start, slope and end of a
/// gradient, or initial temperature, hold and ramp of an oven program) all agree, to rounding?
/// Then the runs cannot separate the two retention parameters of a scouting fit.
pub(crate) fn all_signatures_equal(signatures: &[(f64, f64, f64)]) -> bool {
    signatures.iter().all(|s| {
        close(s.0, signatures[0].0) && close(s.1, signatures[0].1) && close(s.2, signatures[0].2)
    })
}

/// The first peak (name, run lacking it, run having it) that is in one scouting run and not in
/// another; `runs` are (run name, its peak table).
pub(crate) fn first_missing_peak(
    runs: &[(&str, &peaks::PeakTable)],
) -> Option<(String, String, String)> {
    for (present_in, table) in runs {
        for p in table.peaks() {
            if let Some((run, _)) = runs.iter().find(|(_, other)| other.get(&p.name).is_none()) {
                return Some((
                    p.name.clone(),
                    (*run).to_string(),
                    (*present_in).to_string(),
                ));
            }
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::peaks::PeakTable;
    use super::*;

    #[test]
    fn signatures_equal_only_to_rounding() {
        assert!(all_signatures_equal(&[
            (5.0, 9.0, 95.0),
            (5.0, 9.0 + 1e-12, 95.0)
        ]));
        assert!(!all_signatures_equal(&[(5.0, 9.0, 95.0), (5.0, 3.0, 95.0)]));
        assert!(all_signatures_equal(&[(40.0, 1.0, 10.0)]));
    }

    #[test]
    fn the_first_missing_peak_names_peak_and_both_runs() {
        let a = PeakTable::parse("name,rt,wb\nx,2.0,0.1\ny,3.0,0.1\n").unwrap();
        let b = PeakTable::parse("name,rt,wb\nx,2.5,0.1\n").unwrap();
        assert_eq!(
            first_missing_peak(&[("r1", &a), ("r2", &b)]),
            Some(("y".to_string(), "r2".to_string(), "r1".to_string()))
        );
        assert_eq!(first_missing_peak(&[("r1", &a), ("r1b", &a)]), None);
    }
}
