//! Method transfer between column geometries and particle sizes: flow for constant linear
//! velocity, gradient times for a constant gradient volume in column volumes, injection volume
//! for constant load, dwell-volume correction, and the expected change in plate number,
//! pressure and run time.
//!
//! Equations (SD 2007 ch. 5 on method transfer, SKD 2010 ch. 9):
//! - F2 = F1 (dc2/dc1)² — same linear velocity; × dp1/dp2 optionally, to keep the reduced
//!   velocity (same place on the van Deemter curve).
//! - tG2 = tG1 (Vm2/Vm1)(F1/F2), applied to every program time — same gradient volume in
//!   column volumes, so the same gradient steepness b and the same band order.
//! - Vinj2 = Vinj1 · Vm2/Vm1 — same load per column volume.
//! - Dwell: the target should deliver the gradient after the same number of column volumes,
//!   VD1 · Vm2/Vm1. If its dwell volume VD2 is smaller, an initial isocratic hold of
//!   (VD1·Vm2/Vm1 − VD2)/F2 is added; if larger, the excess (VD2 − VD1·Vm2/Vm1)/F2 is reported as
//!   an injection delay to program (cannot be removed by a hold).
//! - N2/N1 = (L2/L1)(dp1/dp2) (constant reduced plate height).
//! - ΔP2/ΔP1 = (F2/F1)(L2/L1)(dc1/dc2)²(dp1/dp2)² (Darcy's law, same mobile phase and temperature).
//!
//! General pharmacopoeial chromatography chapters allow some adjustments of a validated method
//! (column dimensions, particle size, flow, gradient times) within stated limits; whether a
//! transfer computed here is an allowed adjustment or a method change is decided by the
//! applicable chapter and the lab's procedures, not by this module.

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::model::gradient::{GradientError, GradientProgram};
use crate::model::theory::{self, TheoryError};

/// Errors from method transfer.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum TransferError {
    /// A quantity failed validation (names the quantity and value).
    #[error(transparent)]
    Theory(#[from] TheoryError),
    /// The scaled program could not be built.
    #[error(transparent)]
    Gradient(#[from] GradientError),
    /// A run time shorter than the program.
    #[error(
        "original run time {run_time_min} min is shorter than the gradient program ({program_end_min} min)"
    )]
    RunTimeTooShort {
        /// Run time, min.
        run_time_min: f64,
        /// Program end, min.
        program_end_min: f64,
    },
}

/// A column's geometry.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ColumnGeometry {
    /// Length, mm.
    pub column_length_mm: f64,
    /// Inner diameter, mm.
    pub inner_diameter_mm: f64,
    /// Particle size, µm.
    pub particle_size_um: f64,
}

/// A method-transfer request.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TransferRequest {
    /// Column of the existing method.
    pub original: ColumnGeometry,
    /// Column to move to.
    pub target: ColumnGeometry,
    /// Flow of the existing method, mL/min.
    pub flow_ml_min: f64,
    /// Also scale flow by dp1/dp2 (keeps the reduced velocity).
    #[serde(default)]
    pub adjust_flow_for_particle_size: bool,
    /// Gradient program of the existing method.
    pub program: GradientProgram,
    /// Injection volume of the existing method, µL.
    #[serde(default)]
    pub injection_volume_ul: Option<f64>,
    /// Dwell volume of the existing system, mL.
    #[serde(default)]
    pub dwell_volume_original_ml: f64,
    /// Dwell volume of the target system, mL.
    #[serde(default)]
    pub dwell_volume_target_ml: f64,
    /// Run time of the existing method, min (default: end of the program).
    #[serde(default)]
    pub run_time_min: Option<f64>,
}

/// Result of a method transfer.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TransferReport {
    /// Flow on the target column, mL/min.
    pub flow_ml_min: f64,
    /// Target/original linear velocity.
    pub linear_velocity_ratio: f64,
    /// Dead volume of the original column, mL (Vm ≈ 0.5 L dc²).
    pub dead_volume_original_ml: f64,
    /// Dead volume of the target column, mL.
    pub dead_volume_target_ml: f64,
    /// Factor applied to every program time, (Vm2/Vm1)(F1/F2).
    pub time_scale_factor: f64,
    /// Initial isocratic hold added for the dwell correction, min.
    pub dwell_hold_min: f64,
    /// Injection delay to program when the target dwell volume is larger, min.
    pub injection_delay_min: f64,
    /// Target program (scaled, with the hold).
    pub program: GradientProgram,
    /// Target injection volume, µL.
    pub injection_volume_ul: Option<f64>,
    /// Expected N2/N1.
    pub plate_number_ratio: f64,
    /// Expected ΔP2/ΔP1.
    pub pressure_ratio: f64,
    /// Original run time, min.
    pub run_time_original_min: f64,
    /// Target run time, min.
    pub run_time_target_min: f64,
    /// Volume delivered over the original program, in column volumes (the scaled program
    /// delivers the same, plus any dwell hold).
    pub program_column_volumes: f64,
    /// Notes (safety, regulatory).
    pub notes: Vec<String>,
}

fn geometry(prefix: &'static [&'static str; 3], g: &ColumnGeometry) -> Result<(), TheoryError> {
    theory::positive(prefix[0], g.column_length_mm)?;
    theory::positive(prefix[1], g.inner_diameter_mm)?;
    theory::positive(prefix[2], g.particle_size_um)?;
    Ok(())
}

/// Scales a method to a new column.
///
/// # Errors
/// Non-positive dimensions or flow, negative dwell or injection volumes, run time shorter than
/// the program.
pub fn transfer(req: &TransferRequest) -> Result<TransferReport, TransferError> {
    geometry(
        &[
            "original column length (mm)",
            "original column inner diameter (mm)",
            "original particle size (µm)",
        ],
        &req.original,
    )?;
    geometry(
        &[
            "target column length (mm)",
            "target column inner diameter (mm)",
            "target particle size (µm)",
        ],
        &req.target,
    )?;
    let f1 = theory::positive("original flow rate (mL/min)", req.flow_ml_min)?;
    let vd1 = theory::non_negative("original dwell volume (mL)", req.dwell_volume_original_ml)?;
    let vd2 = theory::non_negative("target dwell volume (mL)", req.dwell_volume_target_ml)?;
    if let Some(v) = req.injection_volume_ul {
        theory::positive("injection volume (µL)", v)?;
    }
    let end = req.program.end_time_min();
    let run1 = match req.run_time_min {
        Some(r) => {
            theory::positive("original run time (min)", r)?;
            if r < end {
                return Err(TransferError::RunTimeTooShort {
                    run_time_min: r,
                    program_end_min: end,
                });
            }
            r
        }
        None => end,
    };
    let (o, t) = (&req.original, &req.target);
    let d_ratio = t.inner_diameter_mm / o.inner_diameter_mm;
    let dp_ratio = o.particle_size_um / t.particle_size_um;
    let mut f2 = f1 * d_ratio * d_ratio;
    if req.adjust_flow_for_particle_size {
        f2 *= dp_ratio;
    }
    let u_ratio = (f2 / f1) / (d_ratio * d_ratio);
    let vm1 = theory::column_dead_volume_ml(o.column_length_mm, o.inner_diameter_mm)?;
    let vm2 = theory::column_dead_volume_ml(t.column_length_mm, t.inner_diameter_mm)?;
    let time_factor = (vm2 / vm1) * (f1 / f2);
    let vd_wanted = vd1 * vm2 / vm1;
    let (hold, delay) = if vd2 < vd_wanted {
        ((vd_wanted - vd2) / f2, 0.0)
    } else {
        (0.0, (vd2 - vd_wanted) / f2)
    };
    let program = req
        .program
        .scaled_times(time_factor)?
        .with_initial_hold(hold)?;
    let plate_ratio = (t.column_length_mm / o.column_length_mm) * dp_ratio;
    let pressure_ratio = (f2 / f1)
        * (t.column_length_mm / o.column_length_mm)
        * (1.0 / (d_ratio * d_ratio))
        * dp_ratio
        * dp_ratio;
    let run2 = run1 * time_factor + hold;
    let mut notes = vec![
        "general pharmacopoeial chromatography chapters allow limited adjustments of validated \
         methods; check the applicable chapter and the lab's procedures before using these \
         conditions for a validated method"
            .to_string(),
    ];
    if pressure_ratio > 1.0 {
        notes.push(format!(
            "back-pressure rises about {pressure_ratio:.1}-fold: check it against the column's and \
             the instrument's limits before running (an over-pressured fitting can fail and spray solvent)"
        ));
    }
    if delay > 0.0 {
        notes.push(format!(
            "the target system's dwell volume is larger than the scaled original; delay the \
             injection by {delay:.2} min after the gradient starts (if the instrument allows), or \
             expect earlier-eluting peaks to move"
        ));
    }
    if (u_ratio - 1.0).abs() > 1e-9 {
        notes.push(format!(
            "linear velocity changes by a factor {u_ratio:.3} (particle-size adjustment)"
        ));
    }
    let ramp_volume_cv = req.program.end_time_min() * f1 / vm1;
    Ok(TransferReport {
        flow_ml_min: f2,
        linear_velocity_ratio: u_ratio,
        dead_volume_original_ml: vm1,
        dead_volume_target_ml: vm2,
        time_scale_factor: time_factor,
        dwell_hold_min: hold,
        injection_delay_min: delay,
        program,
        injection_volume_ul: req.injection_volume_ul.map(|v| v * vm2 / vm1),
        plate_number_ratio: plate_ratio,
        pressure_ratio,
        run_time_original_min: run1,
        run_time_target_min: run2,
        program_column_volumes: ramp_volume_cv,
        notes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const TOL: f64 = 1e-5;

    fn req() -> TransferRequest {
        // Invented method: 150 × 4.6 mm, 5 µm, 1.0 mL/min, 5–95 % in 20 min, 10 µL.
        TransferRequest {
            original: ColumnGeometry {
                column_length_mm: 150.0,
                inner_diameter_mm: 4.6,
                particle_size_um: 5.0,
            },
            target: ColumnGeometry {
                column_length_mm: 50.0,
                inner_diameter_mm: 2.1,
                particle_size_um: 1.7,
            },
            flow_ml_min: 1.0,
            adjust_flow_for_particle_size: false,
            program: GradientProgram::parse("0:5,20:95,25:95").unwrap(),
            injection_volume_ul: Some(10.0),
            dwell_volume_original_ml: 1.0,
            dwell_volume_target_ml: 0.1,
            run_time_min: Some(30.0),
        }
    }

    #[test]
    fn hand_computed_without_particle_adjustment() {
        let r = transfer(&req()).unwrap();
        // F2 = 1.0 × (2.1/4.6)² = 0.208412 mL/min.
        assert!((r.flow_ml_min - 0.208_412).abs() < TOL);
        // Vm1 = 0.5 × 15 × 0.46² = 1.587 mL; Vm2 = 0.5 × 5 × 0.21² = 0.11025 mL.
        assert!((r.dead_volume_original_ml - 1.587).abs() < 1e-12);
        assert!((r.dead_volume_target_ml - 0.11025).abs() < 1e-12);
        // time factor = (0.11025/1.587)/0.208412 = 0.333333 (= L2/L1 at constant velocity).
        assert!((r.time_scale_factor - 1.0 / 3.0).abs() < TOL);
        // injection 10 × 0.11025/1.587 = 0.69471 µL.
        assert!((r.injection_volume_ul.unwrap() - 0.694_707).abs() < TOL);
        // dwell: wanted 1.0 × 0.069471 = 0.069471 mL < 0.1 mL → delay (0.1 − 0.069471)/0.208412 = 0.14648 min.
        assert_eq!(r.dwell_hold_min, 0.0);
        assert!((r.injection_delay_min - 0.146_484).abs() < TOL);
        // program times × 1/3: 0, 6.6667, 8.3333.
        let p = r.program.points();
        assert!((p[1].time_min - 20.0 / 3.0).abs() < 1e-9);
        // N ratio = (50/150)(5/1.7) = 0.980392.
        assert!((r.plate_number_ratio - 0.980_392).abs() < TOL);
        // ΔP ratio = 0.208412 × 0.33333 × (4.6/2.1)² × (5/1.7)² = 0.208412 × 0.33333 × 4.79819 × 8.65052 = 2.88350.
        assert!(
            (r.pressure_ratio - 2.883_50).abs() < 1e-4,
            "{}",
            r.pressure_ratio
        );
        // run time 30 × 1/3 = 10 min.
        assert!((r.run_time_target_min - 10.0).abs() < 1e-9);
    }

    #[test]
    fn hand_computed_with_particle_adjustment_and_hold() {
        let mut q = req();
        q.adjust_flow_for_particle_size = true;
        q.dwell_volume_target_ml = 0.02;
        let r = transfer(&q).unwrap();
        // F2 = 0.208412 × 5/1.7 = 0.612976 mL/min.
        assert!((r.flow_ml_min - 0.612_976).abs() < TOL);
        // time factor = 0.069471/0.612976 = 0.113333.
        assert!((r.time_scale_factor - 0.113_333).abs() < TOL);
        // hold = (0.069471 − 0.02)/0.612976 = 0.080706 min.
        assert!((r.dwell_hold_min - 0.080_706).abs() < TOL);
        assert_eq!(r.program.points().len(), 4);
        // ΔP ratio = 2.88350 × (5/1.7) = 8.48088.
        assert!(
            (r.pressure_ratio - 8.480_88).abs() < 1e-4,
            "{}",
            r.pressure_ratio
        );
        assert!((r.linear_velocity_ratio - 5.0 / 1.7).abs() < 1e-9);
    }

    #[test]
    fn same_column_is_identity() {
        let mut q = req();
        q.target = q.original;
        q.dwell_volume_target_ml = 1.0;
        let r = transfer(&q).unwrap();
        assert!((r.flow_ml_min - 1.0).abs() < 1e-12);
        assert!((r.time_scale_factor - 1.0).abs() < 1e-12);
        assert_eq!(r.program, q.program);
        assert!((r.pressure_ratio - 1.0).abs() < 1e-12);
    }

    #[test]
    fn bad_inputs_name_the_value() {
        let mut q = req();
        q.target.inner_diameter_mm = -2.1;
        assert!(
            transfer(&q)
                .unwrap_err()
                .to_string()
                .contains("target column inner diameter (mm)")
        );
        let mut q = req();
        q.flow_ml_min = 0.0;
        assert!(transfer(&q).unwrap_err().to_string().contains("flow"));
        let mut q = req();
        q.run_time_min = Some(10.0);
        assert!(transfer(&q).unwrap_err().to_string().contains("shorter"));
        let mut q = req();
        q.dwell_volume_target_ml = -1.0;
        assert!(transfer(&q).unwrap_err().to_string().contains("-1"));
    }
}
