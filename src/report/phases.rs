//! The `phases` report: the stationary-phase catalogue as a table or JSON, so that the ids a
//! user may give to `--phases-available` and `predict --phase` can be listed.

use serde::{Deserialize, Serialize};

use crate::phase::{Catalogue, PhaseMode};

/// The catalogue's phases, in file order (documented in `docs/json-schema.md`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PhasesReport {
    /// JSON schema version.
    pub schema_version: u32,
    /// One row per phase.
    pub phases: Vec<PhaseRow>,
}

/// One stationary phase.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PhaseRow {
    /// Catalogue id (what `--phases-available` and `--phase` take).
    pub id: String,
    /// Mode (`rp`, `hilic`, `gc`, `ic-anion`, `ic-cation`, `ion-exclusion`).
    pub mode: String,
    /// Generic chemistry name.
    pub name: String,
    /// Lowest recommended mobile-phase pH (LC and IC phases that state one).
    pub ph_min: Option<f64>,
    /// Highest recommended mobile-phase pH.
    pub ph_max: Option<f64>,
    /// Maximum operating temperature, °C.
    pub max_temperature_c: f64,
    /// Retention interactions the phase adds (`hydrophobic`, `pi-pi`, ...).
    pub interactions: Vec<String>,
}

impl PhasesReport {
    /// The phases of `catalogue`, all or those of one mode.
    pub fn new(catalogue: &Catalogue, mode: Option<PhaseMode>) -> PhasesReport {
        let phases = catalogue
            .phases()
            .iter()
            .filter(|p| mode.is_none_or(|m| p.mode() == m))
            .map(|p| PhaseRow {
                id: p.id().to_string(),
                mode: p.mode().as_str().to_string(),
                name: p.name().to_string(),
                ph_min: p.ph_min(),
                ph_max: p.ph_max(),
                max_temperature_c: p.t_max_c(),
                interactions: p
                    .interactions()
                    .iter()
                    .map(|i| i.as_str().to_string())
                    .collect(),
            })
            .collect();
        PhasesReport {
            schema_version: super::SCHEMA_VERSION,
            phases,
        }
    }

    /// Render as an aligned table.
    pub fn render_table(&self) -> String {
        use super::num;
        let rows: Vec<Vec<String>> = self
            .phases
            .iter()
            .map(|p| {
                vec![
                    p.id.clone(),
                    p.mode.clone(),
                    p.name.clone(),
                    match (p.ph_min, p.ph_max) {
                        (Some(lo), Some(hi)) => format!("{}-{}", num(lo, 1), num(hi, 1)),
                        _ => "-".into(),
                    },
                    num(p.max_temperature_c, 0),
                    p.interactions.join(", "),
                ]
            })
            .collect();
        let mut s = super::table::render(
            &["id", "mode", "name", "pH range", "max °C", "interactions"],
            &rows,
        );
        s.push('\n');
        s
    }

    /// Render as pretty JSON.
    ///
    /// # Errors
    /// Only if serialisation fails (it does not for this model).
    pub fn render_json(&self) -> Result<String, serde_json::Error> {
        Ok(format!("{}\n", serde_json::to_string_pretty(self)?))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lists_every_phase_once_and_filters_by_mode() {
        let c = Catalogue::builtin().unwrap();
        let all = PhasesReport::new(c, None);
        assert_eq!(all.phases.len(), c.phases().len());
        assert!(all.phases.iter().any(|p| p.id == "gc-wax"));
        let gc = PhasesReport::new(c, Some(PhaseMode::Gc));
        assert!(!gc.phases.is_empty() && gc.phases.iter().all(|p| p.mode == "gc"));
        let t = gc.render_table();
        assert!(t.contains("gc-5-phenyl") && !t.contains("rp-c18"));
        let back: PhasesReport = serde_json::from_str(&gc.render_json().unwrap()).unwrap();
        assert_eq!(back, gc);
    }
}
