//! The ions of the usual ion-chromatography panels.

use serde::Serialize;

use super::super::PhaseError;
use super::super::tsv::Row;
use super::{is_inchikey_shaped, parse_id};

/// Whether an ion belongs to the anion or the cation panel.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum IonPanel {
    /// Anion.
    Anion,
    /// Cation.
    Cation,
}

/// An ion with its relative retention on the generic IC phases.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IcIon {
    id: String,
    name: String,
    synonyms: Vec<String>,
    panel: IonPanel,
    charge: i8,
    formula: String,
    smiles: String,
    inchikey: Option<String>,
    hydrated_radius_pm: Option<f64>,
    rr_hydroxide: Option<f64>,
    rr_carbonate: Option<f64>,
    rr_carboxylate: Option<f64>,
    source: String,
}

impl IcIon {
    pub(crate) const COLUMNS: [&'static str; 13] = [
        "id",
        "name",
        "synonyms",
        "panel",
        "charge",
        "formula",
        "smiles",
        "inchikey",
        "hydrated_radius_pm",
        "rr_hydroxide",
        "rr_carbonate",
        "rr_carboxylate",
        "source",
    ];

    pub(crate) fn from_row(row: &Row<'_>) -> Result<Self, PhaseError> {
        let panel_text = row.text("panel")?;
        let panel = match panel_text {
            "anion" => IonPanel::Anion,
            "cation" => IonPanel::Cation,
            other => return Err(row.bad("panel", other, "must be anion or cation")),
        };
        let charge = row.number_in("charge", -3.0, 3.0)?;
        let sign_ok = match panel {
            IonPanel::Anion => charge < 0.0,
            IonPanel::Cation => charge > 0.0,
        };
        if charge.fract() != 0.0 || !sign_ok {
            return Err(row.bad(
                "charge",
                row.cell("charge"),
                "must be a non-zero whole number whose sign matches the panel",
            ));
        }
        // Relative retentions 0.05-50 relative to the reference ion (plausible range, no source).
        let rr_hydroxide = row.opt_number_in("rr_hydroxide", 0.05, 50.0)?;
        let rr_carbonate = row.opt_number_in("rr_carbonate", 0.05, 50.0)?;
        let rr_carboxylate = row.opt_number_in("rr_carboxylate", 0.05, 50.0)?;
        match panel {
            IonPanel::Anion => {
                row.require_empty(&["rr_carboxylate"], "for anions")?;
                if rr_hydroxide.is_none() && rr_carbonate.is_none() {
                    return Err(row.bad(
                        "rr_hydroxide",
                        "",
                        "an anion needs rr_hydroxide or rr_carbonate",
                    ));
                }
            }
            IonPanel::Cation => {
                row.require_empty(&["rr_hydroxide", "rr_carbonate"], "for cations")?;
                if rr_carboxylate.is_none() {
                    return Err(row.bad("rr_carboxylate", "", "a cation needs rr_carboxylate"));
                }
            }
        }
        let smiles = row.text("smiles")?;
        if smiles.contains(char::is_whitespace) {
            return Err(row.bad("smiles", smiles, "must not contain spaces"));
        }
        let inchikey = row.opt_text("inchikey");
        if let Some(key) = inchikey
            && !is_inchikey_shaped(key)
        {
            return Err(row.bad(
                "inchikey",
                key,
                "is not shaped like an InChIKey (14-10-1 upper-case letters)",
            ));
        }
        Ok(Self {
            id: parse_id(row)?,
            name: row.text("name")?.to_string(),
            synonyms: row
                .list("synonyms")
                .into_iter()
                .map(str::to_string)
                .collect(),
            panel,
            // Checked above to be a whole number in -3..=3.
            charge: charge as i8,
            formula: row.text("formula")?.to_string(),
            smiles: smiles.to_string(),
            inchikey: inchikey.map(str::to_string),
            hydrated_radius_pm: row.opt_number_in("hydrated_radius_pm", 200.0, 600.0)?,
            rr_hydroxide,
            rr_carbonate,
            rr_carboxylate,
            source: row.text("source")?.to_string(),
        })
    }

    /// Stable id (`chloride`, `sodium`, ...).
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Synonyms and formula spellings used for matching.
    pub fn synonyms(&self) -> &[String] {
        &self.synonyms
    }
    /// Anion or cation panel.
    pub fn panel(&self) -> IonPanel {
        self.panel
    }
    /// Charge of the listed species.
    pub fn charge(&self) -> i8 {
        self.charge
    }
    /// Formula of the listed species.
    pub fn formula(&self) -> &str {
        &self.formula
    }
    /// SMILES of the listed species.
    pub fn smiles(&self) -> &str {
        &self.smiles
    }
    /// InChIKey where certain (none are filled yet).
    pub fn inchikey(&self) -> Option<&str> {
        self.inchikey.as_deref()
    }
    /// Hydrated radius.
    pub fn hydrated_radius_pm(&self) -> Option<f64> {
        self.hydrated_radius_pm
    }
    /// Relative retention vs chloride on a hydroxide-selective anion exchanger.
    pub fn rr_hydroxide(&self) -> Option<f64> {
        self.rr_hydroxide
    }
    /// Relative retention vs chloride on a carbonate-selective anion exchanger.
    pub fn rr_carbonate(&self) -> Option<f64> {
        self.rr_carbonate
    }
    /// Relative retention vs sodium on a carboxylate cation exchanger.
    pub fn rr_carboxylate(&self) -> Option<f64> {
        self.rr_carboxylate
    }
    /// Where the values come from.
    pub fn source(&self) -> &str {
        &self.source
    }
    /// True when `query` equals the id, name or a synonym (case-insensitive).
    pub fn matches(&self, query: &str) -> bool {
        let query = query.trim();
        self.id.eq_ignore_ascii_case(query)
            || self.name.eq_ignore_ascii_case(query)
            || self.synonyms.iter().any(|s| s.eq_ignore_ascii_case(query))
    }
}
