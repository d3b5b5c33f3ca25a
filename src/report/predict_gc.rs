//! The `predict --mode gc` report: one row per analyte with its retention index (and 95 %
//! interval) on the phase, its time under the oven program (and interval), the route that
//! produced the index, and a note or caution of its own; the pairs at risk of co-elution. An
//! analyte without an index keeps its row with the reason. Table, JSON (docs/json-schema.md),
//! CSV/TSV.

use serde::Serialize;

use crate::property::Unresolved;
use crate::report::advice::{PhaseRef, ProgramStep};
use crate::report::{Format, SCHEMA_VERSION, csv_cell, csv_opt, num};

/// Column, carrier and oven program the predictions are for.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GcPanelConditions {
    /// Column length, m.
    pub column_length_m: f64,
    /// Column inner diameter, mm.
    pub column_id_mm: f64,
    /// Film thickness, µm.
    pub film_um: f64,
    /// Carrier gas (helium: the ladder's calibration assumes it).
    pub carrier_gas: String,
    /// Average linear velocity of the carrier, cm/s.
    pub linear_velocity_cm_s: f64,
    /// Hold-up (dead) time, min.
    pub dead_time_min: f64,
    /// Oven program in the `--oven` syntax.
    pub oven: String,
    /// Oven program as (time, °C) steps.
    pub program: Vec<ProgramStep>,
    /// Unit of the program values (°C).
    pub program_unit: String,
    /// Where the column and program came from (given by the user or chosen for the analytes).
    pub origin: Vec<String>,
    /// Run time, min.
    pub run_time_min: f64,
    /// Smallest and largest n-alkane carbon number eluted by the program.
    pub ladder_carbons: (u32, u32),
}

/// One analyte's prediction (or the reason there is none).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GcPanelPrediction {
    /// Analyte name.
    pub analyte: String,
    /// Predicted retention index on the phase (van den Dool-Kratz scale), when predicted.
    pub retention_index: Option<f64>,
    /// 1σ uncertainty of the index (held-out residuals of the model), index units.
    pub retention_index_sigma: Option<f64>,
    /// 95 % interval of the index, low end.
    pub retention_index_low: Option<f64>,
    /// 95 % interval of the index, high end.
    pub retention_index_high: Option<f64>,
    /// Predicted retention time, min, when the index lies on the eluted ladder.
    pub retention_time_min: Option<f64>,
    /// 95 % interval of the time, low end, min (from the index interval).
    pub interval_low_min: Option<f64>,
    /// 95 % interval of the time, high end, min.
    pub interval_high_min: Option<f64>,
    /// Retention factor k = (tR - tM) / tM.
    pub retention_factor: Option<f64>,
    /// Oven temperature at elution, °C.
    pub elution_temperature_c: Option<f64>,
    /// Predicted peak width at half height, min.
    pub peak_width_half_min: Option<f64>,
    /// Route of the index in a few words: `solvation model`, `boiling-point route`,
    /// `n-alkane`; empty when not predicted.
    pub path: String,
    /// The full path: descriptors, constants and their source, ladder interpolation.
    pub path_detail: String,
    /// Caution kept with the prediction (e.g. the analyte is judged unsuitable for GC as is).
    pub caution: Option<String>,
    /// Why the index or the time is missing.
    pub note: Option<String>,
}

/// A pair at risk of co-elution.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GcPanelPair {
    /// Earlier analyte.
    pub a: String,
    /// Later analyte.
    pub b: String,
    /// Predicted index difference (b - a), index units.
    pub delta_retention_index: f64,
    /// Index difference the column resolves at resolution 1 at this point of the run.
    pub resolvable_delta_retention_index: f64,
    /// Probability 0-1 that the pair is not resolved (resolution below 1).
    pub probability: f64,
    /// Predicted resolution.
    pub resolution: f64,
    /// Whether the two have the same molecular formula (their index errors are shared more).
    pub isomers: bool,
}

/// What `predict --mode gc` prints.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GcPanelReport {
    /// Schema version.
    pub schema_version: u32,
    /// Always `gc`.
    pub mode: String,
    /// The phase.
    pub phase: PhaseRef,
    /// Column, carrier and program.
    pub conditions: GcPanelConditions,
    /// One row per resolved analyte, by retention time (then index); rows without an index
    /// last, in input order.
    pub predictions: Vec<GcPanelPrediction>,
    /// Pairs with a co-elution probability at or above the `--risk` threshold, most probable
    /// first.
    pub coelutions: Vec<GcPanelPair>,
    /// Notes on the conditions and the model.
    pub notes: Vec<String>,
    /// Analytes that did not resolve.
    pub unresolved: Vec<Unresolved>,
}

impl GcPanelReport {
    /// A new report (schema version set).
    pub fn new(phase: PhaseRef, conditions: GcPanelConditions) -> Self {
        GcPanelReport {
            schema_version: SCHEMA_VERSION,
            mode: "gc".into(),
            phase,
            conditions,
            predictions: Vec::new(),
            coelutions: Vec::new(),
            notes: Vec::new(),
            unresolved: Vec::new(),
        }
    }

    /// Whether some analyte did not resolve or got no index.
    pub fn partial(&self) -> bool {
        !self.unresolved.is_empty() || self.predictions.iter().any(|p| p.retention_index.is_none())
    }

    /// Renders the report in `format`.
    pub fn render(&self, format: Format) -> Result<String, serde_json::Error> {
        Ok(match format {
            Format::Json => format!("{}\n", serde_json::to_string_pretty(self)?),
            Format::Table => self.table(),
            Format::Csv => self.delimited(','),
            Format::Tsv => self.delimited('\t'),
        })
    }

    fn table(&self) -> String {
        let c = &self.conditions;
        let mut t = format!("gc on {} [{}]\n", self.phase.name, self.phase.id);
        let steps: Vec<String> = c
            .program
            .iter()
            .map(|p| format!("{} min {}", num(p.time_min, 1), num(p.value, 1)))
            .collect();
        t.push_str(&format!(
            "column {} m x {} mm, film {} µm; {} at {} cm/s, dead time {} min; program ({}): {}\n",
            num(c.column_length_m, 1),
            num(c.column_id_mm, 2),
            num(c.film_um, 2),
            c.carrier_gas,
            num(c.linear_velocity_cm_s, 1),
            num(c.dead_time_min, 2),
            c.program_unit,
            steps.join(" -> ")
        ));
        let dash = || "-".to_string();
        let rows: Vec<Vec<String>> = self
            .predictions
            .iter()
            .map(|p| {
                vec![
                    p.analyte.clone(),
                    p.retention_index.map_or_else(dash, |v| num(v, 0)),
                    match (p.retention_index_low, p.retention_index_high) {
                        (Some(lo), Some(hi)) => format!("{}-{}", num(lo, 0), num(hi, 0)),
                        _ => dash(),
                    },
                    p.retention_time_min.map_or_else(dash, |v| num(v, 2)),
                    match (p.interval_low_min, p.interval_high_min) {
                        (Some(lo), Some(hi)) => format!("{}-{}", num(lo, 2), num(hi, 2)),
                        _ => dash(),
                    },
                    p.elution_temperature_c.map_or_else(dash, |v| num(v, 0)),
                    if p.path.is_empty() {
                        "not predicted".into()
                    } else {
                        p.path.clone()
                    },
                ]
            })
            .collect();
        t.push_str(&crate::report::table::render(
            &[
                "analyte",
                "RI",
                "RI 95 % interval",
                "tR (min)",
                "tR 95 % interval (min)",
                "elutes at (°C)",
                "predicted by",
            ],
            &rows,
        ));
        t.push('\n');
        for p in &self.coelutions {
            t.push_str(&format!(
                "flagged pair: {} / {}: co-elution probability {}, index difference {} (resolved from about {}), resolution {}{}\n",
                p.a,
                p.b,
                num(p.probability, 2),
                num(p.delta_retention_index, 0),
                num(p.resolvable_delta_retention_index, 0),
                num(p.resolution, 2),
                if p.isomers { "; isomers" } else { "" }
            ));
        }
        for p in &self.predictions {
            if let Some(n) = &p.note {
                t.push_str(&format!("note: {}: {n}\n", p.analyte));
            }
            if let Some(c) = &p.caution {
                t.push_str(&format!("caution: {}: {c}\n", p.analyte));
            }
        }
        for n in &self.notes {
            t.push_str(&format!("note: {n}\n"));
        }
        for u in &self.unresolved {
            t.push_str(&format!("unresolved: {} ({})\n", u.query, u.reason));
        }
        t
    }

    fn delimited(&self, d: char) -> String {
        let mut t = [
            "analyte",
            "retention_index",
            "retention_index_sigma",
            "retention_index_low",
            "retention_index_high",
            "retention_time_min",
            "interval_low_min",
            "interval_high_min",
            "elution_temperature_c",
            "path",
            "caution",
            "note",
        ]
        .join(&d.to_string());
        t.push('\n');
        let opt = |v: Option<f64>| csv_opt(v, None);
        for p in &self.predictions {
            let cells = [
                csv_cell(&p.analyte, d),
                opt(p.retention_index),
                opt(p.retention_index_sigma),
                opt(p.retention_index_low),
                opt(p.retention_index_high),
                opt(p.retention_time_min),
                opt(p.interval_low_min),
                opt(p.interval_high_min),
                opt(p.elution_temperature_c),
                csv_cell(&p.path, d),
                csv_cell(p.caution.as_deref().unwrap_or(""), d),
                csv_cell(p.note.as_deref().unwrap_or(""), d),
            ];
            t.push_str(&cells.join(&d.to_string()));
            t.push('\n');
        }
        t
    }
}
