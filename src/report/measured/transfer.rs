//! The `transfer` report: original and target column, flow, volumes and run time side by side,
//! the scaled gradient program and the scaling factors.

use serde::Serialize;

use super::{Render, num};
use crate::measured::transfer::{ColumnGeometry, TransferReport};
use crate::report::table::render;

/// JSON output of `transfer` (schema version 1), with the original method's values the table
/// shows beside the target's.
#[derive(Serialize)]
pub struct TransferOutput<'a> {
    /// Schema version (1).
    pub schema_version: u32,
    /// The existing column.
    pub original: ColumnGeometry,
    /// The target column.
    pub target: ColumnGeometry,
    /// Flow of the existing method, mL/min.
    pub original_flow_ml_min: f64,
    /// Gradient program of the existing method, as typed back (`time:%organic,...`).
    pub original_program: String,
    /// The scaled method.
    #[serde(flatten)]
    pub report: &'a TransferReport,
    /// [`REGULATORY_NOTE`].
    pub regulatory_note: &'static str,
    /// Injection volume of the existing method, µL (table only).
    #[serde(skip)]
    pub original_injection_ul: Option<f64>,
    /// Dwell volumes of the existing and the target system, mL (table only).
    #[serde(skip)]
    pub dwell_ml: (Option<f64>, Option<f64>),
}

/// The caution printed with every transfer.
pub const REGULATORY_NOTE: &str = "General pharmacopoeial chromatography chapters allow limited \
adjustments of a validated method (column dimensions, particle size, flow, gradient times) in \
general terms; whether this transfer is an allowed adjustment or a method change is decided by \
the applicable chapter and the lab's procedures.";

impl Render for TransferOutput<'_> {
    fn table(&self) -> String {
        transfer_table(self)
    }
}

fn transfer_table(o: &TransferOutput) -> String {
    let r = o.report;
    let (from, to) = (&o.original, &o.target);
    let v = |x: f64, d: usize| num(Some(x), d);
    let rows = vec![
        vec![
            "column (mm)".into(),
            format!("{}x{}", from.column_length_mm, from.inner_diameter_mm),
            format!("{}x{}", to.column_length_mm, to.inner_diameter_mm),
        ],
        vec![
            "particle size (µm)".into(),
            from.particle_size_um.to_string(),
            to.particle_size_um.to_string(),
        ],
        vec![
            "flow (mL/min)".into(),
            v(o.original_flow_ml_min, 3),
            v(r.flow_ml_min, 3),
        ],
        vec![
            "column dead volume Vm (mL)".into(),
            v(r.dead_volume_original_ml, 3),
            v(r.dead_volume_target_ml, 3),
        ],
        vec![
            "injection volume (µL)".into(),
            num(o.original_injection_ul, 2),
            num(r.injection_volume_ul, 2),
        ],
        vec![
            "dwell volume (mL)".into(),
            v(o.dwell_ml.0.unwrap_or(0.0), 3),
            v(o.dwell_ml.1.unwrap_or(0.0), 3),
        ],
        vec![
            "run time (min)".into(),
            v(r.run_time_original_min, 2),
            v(r.run_time_target_min, 2),
        ],
    ];
    let mut s = render(&["quantity", "original", "target"], &rows);
    s.push_str("\n\nTarget gradient program:\n");
    let prog_rows: Vec<Vec<String>> = r
        .program
        .points()
        .iter()
        .map(|p| vec![v(p.time_min, 2), v(p.organic_pct, 1)])
        .collect();
    s.push_str(&render(&["time (min)", "organic (%)"], &prog_rows));
    s.push_str(&format!("\n\nOriginal program: {}\n", o.original_program));
    s.push_str(&format!(
        "time scale factor (Vm2/Vm1)(F1/F2) = {:.4}; linear velocity ratio = {:.3}\n\
         dwell correction: initial hold {:.2} min, injection delay {:.2} min\n\
         expected plate number ratio N2/N1 = {:.3}; pressure ratio ΔP2/ΔP1 = {:.2}\n\
         program delivers {:.1} column volumes\n",
        r.time_scale_factor,
        r.linear_velocity_ratio,
        r.dwell_hold_min,
        r.injection_delay_min,
        r.plate_number_ratio,
        r.pressure_ratio,
        r.program_column_volumes
    ));
    s.push_str(&format!("flow scaling: {}\n", r.scaling.label()));
    s.push_str("\nAllowed-adjustment checks (harmonised pharmacopoeial chapters, from memory):\n");
    let limit_rows: Vec<Vec<String>> = r
        .limits
        .iter()
        .map(|c| {
            vec![
                c.quantity.clone(),
                num(Some(c.original), 3),
                num(Some(c.target), 3),
                format!("{:+.1} %", c.change * 100.0),
                if c.allowed_min == 0.0 && c.allowed_max == 0.0 {
                    "formula".to_string()
                } else {
                    format!(
                        "{:+.0} % to {:+.0} %",
                        c.allowed_min * 100.0,
                        c.allowed_max * 100.0
                    )
                },
                c.verdict.label().to_string(),
            ]
        })
        .collect();
    s.push_str(&render(
        &[
            "check", "original", "target", "change", "allowed", "verdict",
        ],
        &limit_rows,
    ));
    s.push('\n');
    for n in &r.notes {
        s.push_str(&format!("note: {n}\n"));
    }
    // the library's notes usually carry the regulatory caveat already; never print it twice
    if !r.notes.iter().any(|n| n.contains("pharmacopoeial")) {
        s.push_str(&format!("note: {REGULATORY_NOTE}\n"));
    }
    s
}
