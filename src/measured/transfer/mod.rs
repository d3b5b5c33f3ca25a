//! Method transfer between column geometries and particle sizes: flow, gradient times for a
//! constant gradient volume in column volumes, injection volume for constant load, dwell-volume
//! correction, the expected change in plate number, pressure and run time, and the check of
//! the allowed-adjustment limits ([`limits`]).
//!
//! Equations (SD 2007 ch. 5 on method transfer, SKD 2010 ch. 9; the harmonised pharmacopoeial
//! chapters on chromatography, USP <621> and Ph. Eur. 2.2.46, from memory):
//! - default ([`FlowScaling::Pharmacopoeial`]): F2 = F1 (dc2² dp1)/(dc1² dp2), the same reduced
//!   velocity (same place on the van Deemter curve): the speed gain of small particles is the
//!   reason to transfer;
//! - option ([`FlowScaling::ConstantLinearVelocity`]): F2 = F1 (dc2/dc1)², the same linear
//!   velocity.
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

pub mod limits;

pub use limits::{LimitCheck, LimitVerdict};

/// How the flow is scaled to the new column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FlowScaling {
    /// F2 = F1 (dc2² dp1)/(dc1² dp2): the harmonised pharmacopoeial formula (same reduced
    /// velocity).
    #[default]
    Pharmacopoeial,
    /// F2 = F1 (dc2/dc1)²: the same linear velocity (slower on smaller particles).
    ConstantLinearVelocity,
}

impl FlowScaling {
    /// Plain words for tables and reports.
    pub fn label(self) -> &'static str {
        match self {
            FlowScaling::Pharmacopoeial => {
                "pharmacopoeial formula F2 = F1 (dc2² dp1)/(dc1² dp2) (same reduced velocity)"
            }
            FlowScaling::ConstantLinearVelocity => "same linear velocity F2 = F1 (dc2/dc1)²",
        }
    }
}

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
    /// Also scale flow by dp1/dp2 (keeps the reduced velocity). Read only by [`transfer`];
    /// [`transfer_with`] takes the scaling explicitly.
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
    /// How the flow was scaled.
    pub scaling: FlowScaling,
    /// Flow on the target column, mL/min.
    pub flow_ml_min: f64,
    /// Flow by the pharmacopoeial formula F1 (dc2² dp1)/(dc1² dp2), mL/min (equal to
    /// `flow_ml_min` under the default scaling).
    pub pharmacopoeial_flow_ml_min: f64,
    /// Allowed-adjustment checks (L/dp, flow), each with its verdict and source.
    pub limits: Vec<LimitCheck>,
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

/// Scales a method to a new column, reading the scaling from
/// `req.adjust_flow_for_particle_size` (true: pharmacopoeial; false: same linear velocity).
///
/// # Errors
/// As [`transfer_with`].
pub fn transfer(req: &TransferRequest) -> Result<TransferReport, TransferError> {
    let scaling = if req.adjust_flow_for_particle_size {
        FlowScaling::Pharmacopoeial
    } else {
        FlowScaling::ConstantLinearVelocity
    };
    transfer_with(req, scaling)
}

/// Scales a method to a new column with the given flow scaling.
///
/// # Errors
/// Non-positive dimensions or flow, negative dwell or injection volumes, run time shorter than
/// the program.
pub fn transfer_with(
    req: &TransferRequest,
    scaling: FlowScaling,
) -> Result<TransferReport, TransferError> {
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
    let f_pharm = f1 * d_ratio * d_ratio * dp_ratio;
    let f2 = match scaling {
        FlowScaling::Pharmacopoeial => f_pharm,
        FlowScaling::ConstantLinearVelocity => f1 * d_ratio * d_ratio,
    };
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
    let mut limits = vec![limits::check_length_over_particle(o, t)];
    let flow_change = f2 / f_pharm - 1.0;
    let flow_ok = flow_change.abs() < 1e-9;
    limits.push(LimitCheck {
        quantity: "flow against the formula F1 (dc2² dp1)/(dc1² dp2) (mL/min)".into(),
        original: f_pharm,
        target: f2,
        change: flow_change,
        allowed_min: 0.0,
        allowed_max: 0.0,
        verdict: if flow_ok {
            LimitVerdict::Within
        } else {
            LimitVerdict::Outside
        },
        source: format!(
            "{}; a further ±50 % is allowed for isocratic methods only",
            limits::LIMITS_SOURCE
        ),
    });
    if limits[0].verdict == LimitVerdict::Outside {
        notes.push(format!(
            "L/dp changes by {:+.0} % (allowed {:+.0} % to {:+.0} %, from memory of the \
             pharmacopoeial chapters): this transfer is a method change that needs the lab's \
             change control and verification, not an allowed adjustment",
            limits[0].change * 100.0,
            limits::L_OVER_DP_MIN_CHANGE * 100.0,
            limits::L_OVER_DP_MAX_CHANGE * 100.0
        ));
    }
    if !flow_ok {
        notes.push(format!(
            "the flow keeps the linear velocity ({f2:.3} mL/min) instead of following the \
             pharmacopoeial formula ({f_pharm:.3} mL/min); for a gradient method this is outside \
             the allowed adjustments (from memory of the chapters)"
        ));
    }
    let ramp_volume_cv = req.program.end_time_min() * f1 / vm1;
    Ok(TransferReport {
        scaling,
        flow_ml_min: f2,
        pharmacopoeial_flow_ml_min: f_pharm,
        limits,
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

    fn col(l: f64, d: f64, dp: f64) -> ColumnGeometry {
        ColumnGeometry {
            column_length_mm: l,
            inner_diameter_mm: d,
            particle_size_um: dp,
        }
    }

    fn plain(o: ColumnGeometry, t: ColumnGeometry, flow: f64, program: &str) -> TransferRequest {
        TransferRequest {
            original: o,
            target: t,
            flow_ml_min: flow,
            adjust_flow_for_particle_size: true,
            program: GradientProgram::parse(program).unwrap(),
            injection_volume_ul: Some(10.0),
            dwell_volume_original_ml: 0.0,
            dwell_volume_target_ml: 0.0,
            run_time_min: None,
        }
    }

    #[test]
    fn pharmacopoeial_formulas_issue_example() {
        // Issue 16's example; formulas of the harmonised chapters (USP <621>, Ph. Eur. 2.2.46,
        // from memory). F2 = 1.0 × (2.1² × 5)/(4.6² × 1.7) = 22.05/35.972 = 0.612976 mL/min.
        // tG factor = (F1/F2)(L2 dc2²)/(L1 dc1²) = (L2 dp2)/(L1 dp1) = 170/750 = 0.226667,
        // so the 20 min ramp becomes 4.5333 min.
        let q = plain(col(150.0, 4.6, 5.0), col(100.0, 2.1, 1.7), 1.0, "0:5,20:95");
        let r = transfer_with(&q, FlowScaling::default()).unwrap();
        assert_eq!(r.scaling, FlowScaling::Pharmacopoeial);
        assert!(
            (r.flow_ml_min - 0.612_976).abs() < 1e-6,
            "{}",
            r.flow_ml_min
        );
        assert!((r.time_scale_factor - 0.226_667).abs() < 1e-6);
        assert!((r.program.points()[1].time_min - 4.533_33).abs() < 1e-4);
        // injection 10 µL × (100 × 2.1²)/(150 × 4.6²) = 10 × 441/3174 = 1.38941 µL.
        assert!((r.injection_volume_ul.unwrap() - 1.389_414).abs() < 1e-5);
        // L/dp 30 → 58.8 (+96 %): outside the −25 % to +50 % range, said in a note.
        assert_eq!(r.limits[0].verdict, LimitVerdict::Outside);
        assert_eq!(r.limits[1].verdict, LimitVerdict::Within);
        assert!(r.notes.iter().any(|n| n.contains("method change")));
        // the same request with constant linear velocity gives the old 0.208 mL/min, and the
        // flow check reports the departure from the formula.
        let r = transfer_with(&q, FlowScaling::ConstantLinearVelocity).unwrap();
        assert!((r.flow_ml_min - 0.208_412).abs() < 1e-6);
        assert!((r.pharmacopoeial_flow_ml_min - 0.612_976).abs() < 1e-6);
        assert_eq!(r.limits[1].verdict, LimitVerdict::Outside);
    }

    #[test]
    fn pharmacopoeial_formulas_second_case_by_hand() {
        // Own case (invented method): 250 × 4.6 mm, 5 µm, 1.5 mL/min, 10→80 % in 30 min, 10 µL,
        // moved to 150 × 3.0 mm, 3 µm. By hand:
        // F2 = 1.5 × (3.0² × 5)/(4.6² × 3) = 1.5 × 45/63.48 = 1.063327 mL/min;
        // time factor = (1.5/1.063327) × (150 × 9)/(250 × 21.16) = 1.410667 × 0.255198 = 0.36
        //   (= (L2 dp2)/(L1 dp1) = 450/1250), so 30 min → 10.8 min;
        // injection = 10 × 0.255198 = 2.55198 µL;
        // L/dp: 250/5 = 50 and 150/3 = 50, change 0 %: within;
        // ΔP2/ΔP1 = 0.708885 × 0.6 × (4.6/3.0)² × (5/3)² = 0.425331 × 2.351111 × 2.777778 = 2.7778.
        let q = plain(
            col(250.0, 4.6, 5.0),
            col(150.0, 3.0, 3.0),
            1.5,
            "0:10,30:80",
        );
        let r = transfer_with(&q, FlowScaling::Pharmacopoeial).unwrap();
        assert!(
            (r.flow_ml_min - 1.063_327).abs() < 1e-6,
            "{}",
            r.flow_ml_min
        );
        assert!((r.time_scale_factor - 0.36).abs() < 1e-9);
        assert!((r.program.points()[1].time_min - 10.8).abs() < 1e-9);
        assert!((r.injection_volume_ul.unwrap() - 2.551_985).abs() < 1e-5);
        assert!(r.limits[0].change.abs() < 1e-12);
        assert!(r.limits.iter().all(|c| c.verdict == LimitVerdict::Within));
        assert!(
            (r.pressure_ratio - 2.777_778).abs() < 1e-5,
            "{}",
            r.pressure_ratio
        );
        assert!(!r.notes.iter().any(|n| n.contains("method change")));
    }
}
