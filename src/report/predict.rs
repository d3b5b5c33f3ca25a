//! The `predict` report: the one recommendation under the user's fixed conditions, as a table
//! of predicted retention (with interval and the path that produced each number), JSON, or
//! CSV/TSV.

use crate::kb::resolve::Unresolved;
use crate::phase::PhaseMode;
use crate::report::advice::Recommendation;
use crate::report::{Format, SCHEMA_VERSION, csv_cell, csv_num, num};

/// What `predict` prints: the recommendation, the notes on the user's conditions, and what did
/// not resolve.
pub struct PredictionOutput<'a> {
    /// The recommendation for the fixed phase and conditions.
    pub rec: &'a Recommendation,
    /// The mode the user asked for.
    pub mode: PhaseMode,
    /// What the conditions implied, and predictions past the end of the program.
    pub notes: &'a [String],
    /// Analytes that did not resolve.
    pub unresolved: &'a [Unresolved],
    /// Warnings of the advisor.
    pub warnings: &'a [String],
    /// IC: the retention factor of the reference ion, by which `relative retention` divides.
    pub ic_reference_k: f64,
}

impl PredictionOutput<'_> {
    /// Renders the prediction in `format`.
    pub fn render(&self, format: Format) -> Result<String, serde_json::Error> {
        let rec = self.rec;
        let mode = self.mode;
        let lc = matches!(mode, PhaseMode::Rp | PhaseMode::Hilic);
        Ok(match format {
            Format::Json => format!(
                "{}\n",
                serde_json::to_string_pretty(&serde_json::json!({
                    "schema_version": SCHEMA_VERSION,
                    "mode": rec.mode,
                    "phase": rec.phase,
                    "conditions": rec.conditions,
                    "predictions": rec.predictions,
                    "coelutions": rec.coelutions,
                    "notes": self.notes,
                    "unresolved": self.unresolved,
                    "warnings": self.warnings,
                }))?
            ),
            Format::Table => {
                let mut t = format!("{} on {} [{}]\n", rec.mode, rec.phase.name, rec.phase.id);
                let c = &rec.conditions;
                if !lc {
                    // GC and IC: the column and program used (the advisor's unless given)
                    let steps: Vec<String> = c
                        .program
                        .iter()
                        .map(|p| format!("{} min {}", num(p.time_min, 1), num(p.value, 1)))
                        .collect();
                    t.push_str(&format!(
                        "column {}{}; dead time {} min; program ({}): {}\n",
                        if mode == PhaseMode::Gc {
                            format!(
                                "{} m x {} mm",
                                num(c.column_length_mm / 1000.0, 1),
                                num(c.column_id_mm, 2)
                            )
                        } else {
                            format!(
                                "{} x {} mm",
                                num(c.column_length_mm, 0),
                                num(c.column_id_mm, 2)
                            )
                        },
                        c.film_um
                            .map(|f| format!(", film {} µm", num(f, 2)))
                            .unwrap_or_default(),
                        num(c.dead_time_min, 2),
                        c.program_unit,
                        steps.join(" -> ")
                    ));
                }
                let coverage = rec.predictions.first().map_or(0.9, |p| p.interval_coverage);
                let interval_head = format!("{:.0} % interval (min)", coverage * 100.0);
                let extra_head = match mode {
                    PhaseMode::Gc => Some("RI"),
                    PhaseMode::IcAnion | PhaseMode::IcCation => Some("relative retention"),
                    _ => None,
                };
                let rows: Vec<Vec<String>> = rec
                    .predictions
                    .iter()
                    .map(|p| {
                        let (rt, interval, k) = super::elution_cells(
                            p.retention_time_min,
                            p.interval_low_min,
                            p.interval_high_min,
                            p.retention_factor,
                            rec.conditions.run_time_min,
                        );
                        let mut row = vec![p.analyte.clone(), rt, interval, k];
                        match mode {
                            PhaseMode::Gc => {
                                row.push(p.retention_index.map_or("-".into(), |ri| num(ri, 0)))
                            }
                            PhaseMode::IcAnion | PhaseMode::IcCation => {
                                row.push(num(p.retention_factor / self.ic_reference_k, 2))
                            }
                            _ => {}
                        }
                        row.push(p.path_label());
                        row
                    })
                    .collect();
                let mut head = vec!["analyte", "tR (min)", interval_head.as_str(), "k"];
                head.extend(extra_head);
                head.push("predicted by");
                t.push_str(&crate::report::table::render(&head, &rows));
                t.push('\n');
                for c in &rec.coelutions {
                    t.push_str(&format!(
                        "flagged pair: {} / {}: co-elution probability {}, resolution {}\n",
                        c.a,
                        c.b,
                        num(c.probability, 2),
                        num(c.resolution, 2)
                    ));
                }
                for n in self.notes {
                    t.push_str(&format!("note: {n}\n"));
                }
                for u in self.unresolved {
                    t.push_str(&format!("unresolved: {} ({})\n", u.query, u.reason));
                }
                t.push_str(&super::candidates::candidate_table(self.unresolved));
                for w in self.warnings {
                    t.push_str(&format!("warning: {w}\n"));
                }
                t
            }
            Format::Csv | Format::Tsv => {
                let d = if format == Format::Csv { ',' } else { '\t' };
                let mut t = [
                    "analyte",
                    "retention_time_min",
                    "interval_low_min",
                    "interval_high_min",
                    "retention_factor",
                    "path",
                ]
                .join(&d.to_string());
                t.push('\n');
                for p in &rec.predictions {
                    t.push_str(&format!(
                        "{}{d}{}{d}{}{d}{}{d}{}{d}{}\n",
                        csv_cell(&p.analyte, d),
                        csv_num(p.retention_time_min, None),
                        csv_num(p.interval_low_min, None),
                        csv_num(p.interval_high_min, None),
                        csv_num(p.retention_factor, None),
                        csv_cell(&p.path, d)
                    ));
                }
                t
            }
        })
    }
}
