//! Retention fits from the user's own scouting runs, kept in the user overlay
//! (`retention_fit` table, schema migration 2; composition basis and buffer, migration 3).
//!
//! A row is one analyte's fitted linear-solvent-strength parameters (log kw and S) on one
//! chromatographic system (phase id, modifier, pH, temperature), with the runs it came from
//! (gradient programs, dead and dwell time), the fit's quality and the user's source text.
//! The knowledge base only stores and returns the rows; turning them into predictions is the
//! model's job (`model::memory::StoredFit`).

use rusqlite::params;
use serde::{Deserialize, Serialize};

use super::{Kb, KbError};

/// One stored retention fit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RetentionFitRecord {
    /// Analyte name as written in the peak tables.
    pub analyte: String,
    /// InChIKey of the compound the name resolved to.
    pub inchikey: String,
    /// Stationary-phase id from the catalogue (e.g. `rp-c18`).
    pub phase_id: String,
    /// `rp` or `hilic`.
    pub mode: String,
    /// Chemistry class of the phase as the retention model names it (e.g. `C18`).
    pub chem_class: String,
    /// `acetonitrile` or `methanol`.
    pub modifier: String,
    /// Aqueous pH of the runs.
    pub ph: f64,
    /// Column temperature, °C, when given.
    pub temperature_c: Option<f64>,
    /// Fitted log10 kw.
    pub log_kw: f64,
    /// Fitted S (log k = log kw − S ψ, ψ the fraction named by `basis`).
    pub s: f64,
    /// The composition log kw and S refer to: `organic` (the organic fraction; RP, and HILIC
    /// rows stored before migration 3) or `water` (1 − organic fraction; HILIC).
    #[serde(default = "organic_basis")]
    pub basis: String,
    /// Buffer or additive of the runs' aqueous phase as the user gave it; `None` for rows
    /// stored before migration 3 or when not given.
    #[serde(default)]
    pub buffer: Option<String>,
    /// 1σ uncertainty of log kw.
    pub log_kw_uncertainty: f64,
    /// 1σ uncertainty of S.
    pub s_uncertainty: f64,
    /// Correlation of the log kw and S estimates.
    pub correlation: f64,
    /// RMS retention residual of the fit, min.
    pub rms_residual_min: f64,
    /// Gradient programs of the runs (`time:%organic,...`), in run order.
    pub gradients: Vec<String>,
    /// Dead time of the runs, min.
    pub t0_min: f64,
    /// Dwell time of the runs, min.
    pub dwell_min: f64,
    /// Flow of the runs, mL/min, when given.
    pub flow_ml_min: Option<f64>,
    /// Where the runs are recorded (lab notebook, report): required.
    pub source: String,
    /// Date stored (UTC, `YYYY-MM-DD`); set by the database, ignored on store.
    pub stored_on: String,
}

fn organic_basis() -> String {
    "organic".into()
}

impl Kb {
    /// Store retention fits in the user overlay, all in one IMMEDIATE transaction (all or
    /// nothing). A fit replaces an earlier one of the same compound on the same system (phase,
    /// modifier, pH and temperature). Returns the number of rows written.
    ///
    /// # Errors
    /// [`KbError::BadInput`] for an empty source or a non-finite number (naming the analyte);
    /// database failures.
    pub fn store_retention_fits(&mut self, rows: &[RetentionFitRecord]) -> Result<usize, KbError> {
        for r in rows {
            if r.source.trim().is_empty() {
                return Err(KbError::BadInput(format!(
                    "retention fit of `{}`: say where the runs are recorded (source)",
                    r.analyte
                )));
            }
            if r.basis != "organic" && r.basis != "water" {
                return Err(KbError::BadInput(format!(
                    "retention fit of `{}`: composition basis `{}` is neither organic nor water",
                    r.analyte, r.basis
                )));
            }
            let numbers = [
                ("pH", r.ph),
                ("log kw", r.log_kw),
                ("S", r.s),
                ("t0", r.t0_min),
                ("dwell", r.dwell_min),
            ];
            if let Some((what, v)) = numbers.iter().find(|(_, v)| !v.is_finite()) {
                return Err(KbError::BadInput(format!(
                    "retention fit of `{}`: {what} {v} is not a finite number",
                    r.analyte
                )));
            }
        }
        let path = self.user_path.clone();
        let sql = |e| KbError::sql(&path, e);
        let conn = self.user_mut()?;
        let tx = conn
            .transaction_with_behavior(rusqlite::TransactionBehavior::Immediate)
            .map_err(sql)?;
        for r in rows {
            tx.execute(
                "DELETE FROM retention_fit WHERE inchikey = ?1 AND phase_id = ?2 AND modifier = ?3
                 AND ph = ?4 AND temperature_c IS ?5 AND buffer IS ?6",
                params![
                    r.inchikey,
                    r.phase_id,
                    r.modifier,
                    r.ph,
                    r.temperature_c,
                    r.buffer
                ],
            )
            .map_err(sql)?;
            tx.execute(
                "INSERT INTO retention_fit(analyte, inchikey, phase_id, mode, chem_class, modifier,
                 ph, temperature_c, log_kw, s, log_kw_sd, s_sd, correlation, rms_residual_min,
                 gradients, t0_min, dwell_min, flow_ml_min, source, stored_on, basis, buffer)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11, ?12, ?13, ?14, ?15, ?16,
                 ?17, ?18, ?19, date('now'), ?20, ?21)",
                params![
                    r.analyte,
                    r.inchikey,
                    r.phase_id,
                    r.mode,
                    r.chem_class,
                    r.modifier,
                    r.ph,
                    r.temperature_c,
                    r.log_kw,
                    r.s,
                    r.log_kw_uncertainty,
                    r.s_uncertainty,
                    r.correlation,
                    r.rms_residual_min,
                    r.gradients.join(";"),
                    r.t0_min,
                    r.dwell_min,
                    r.flow_ml_min,
                    r.source,
                    r.basis,
                    r.buffer,
                ],
            )
            .map_err(sql)?;
        }
        tx.commit().map_err(sql)?;
        Ok(rows.len())
    }

    /// Stored retention fits of a compound (by InChIKey), oldest first; none without an
    /// overlay.
    ///
    /// # Errors
    /// Database failures.
    pub fn retention_fits(&self, inchikey: &str) -> Result<Vec<RetentionFitRecord>, KbError> {
        let Some(conn) = &self.user else {
            return Ok(Vec::new());
        };
        let sql = |e| KbError::sql(&self.user_path, e);
        // An overlay read as an older schema (see `Access::Read`): version 1 has no stored
        // fits; version 2 lacks `basis` and `buffer`, which migration 3 fills with `organic`
        // and NULL, so the same values are read without migrating.
        let query = match self.user_version {
            ..=1 => return Ok(Vec::new()),
            2 => {
                "SELECT analyte, inchikey, phase_id, mode, chem_class, modifier, ph, temperature_c,
                 log_kw, s, log_kw_sd, s_sd, correlation, rms_residual_min, gradients, t0_min,
                 dwell_min, flow_ml_min, source, stored_on, 'organic', NULL
                 FROM retention_fit WHERE inchikey = ?1 ORDER BY id"
            }
            _ => {
                "SELECT analyte, inchikey, phase_id, mode, chem_class, modifier, ph, temperature_c,
                 log_kw, s, log_kw_sd, s_sd, correlation, rms_residual_min, gradients, t0_min,
                 dwell_min, flow_ml_min, source, stored_on, basis, buffer
                 FROM retention_fit WHERE inchikey = ?1 ORDER BY id"
            }
        };
        let mut st = conn.prepare_cached(query).map_err(sql)?;
        let rows = st
            .query_map([inchikey], |r| {
                let gradients: String = r.get(14)?;
                Ok(RetentionFitRecord {
                    analyte: r.get(0)?,
                    inchikey: r.get(1)?,
                    phase_id: r.get(2)?,
                    mode: r.get(3)?,
                    chem_class: r.get(4)?,
                    modifier: r.get(5)?,
                    ph: r.get(6)?,
                    temperature_c: r.get(7)?,
                    log_kw: r.get(8)?,
                    s: r.get(9)?,
                    log_kw_uncertainty: r.get(10)?,
                    s_uncertainty: r.get(11)?,
                    correlation: r.get(12)?,
                    rms_residual_min: r.get(13)?,
                    gradients: gradients.split(';').map(str::to_string).collect(),
                    t0_min: r.get(15)?,
                    dwell_min: r.get(16)?,
                    flow_ml_min: r.get(17)?,
                    source: r.get(18)?,
                    stored_on: r.get(19)?,
                    basis: r.get(20)?,
                    buffer: r.get(21)?,
                })
            })
            .map_err(sql)?
            .collect::<Result<Vec<_>, _>>()
            .map_err(sql)?;
        Ok(rows)
    }
}
