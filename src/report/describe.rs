//! The `describe` report: every descriptor, ionisable site, boiling-point estimate and GC
//! verdict computed from a SMILES string, each with its unit and method.

use serde::{Deserialize, Serialize};

use super::{Format, SCHEMA_VERSION, csv_cell, csv_num, num, table};
use crate::property::estimate::{
    METHOD_JOBACK, METHOD_LOGP, METHOD_PKA, METHOD_TPSA, estimate_without_stereo,
};
use crate::structure::Descriptors;
use crate::structure::ionisable::IonisableSite;
use crate::structure::volatility::{GcAssessment, assess_gc, assess_gc_known};

/// One described molecule.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DescribedMolecule {
    /// Name given after a tab, or the SMILES.
    pub name: String,
    /// SMILES as given.
    pub smiles: String,
    /// Descriptors (units in field names).
    pub descriptors: Descriptors,
    /// Ionisable sites with typical pKa values (method: [`METHOD_PKA`]).
    pub ionisable_sites: Vec<IonisableSite>,
    /// Joback normal boiling point, K (method: [`METHOD_JOBACK`]).
    pub joback_tb_k: Option<f64>,
    /// Typical error of the Joback estimate, K.
    pub joback_typical_error_k: Option<f64>,
    /// Why there is no Joback estimate.
    pub joback_note: Option<String>,
    /// GC suitability and volatility class.
    pub gc: Option<GcAssessment>,
    /// Fragment-selection note (salts: the largest organic fragment is described).
    pub note: Option<String>,
}

/// A line that could not be described.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DescribeFailure {
    /// 1-based input line (or argument position).
    pub line: usize,
    /// The input.
    pub input: String,
    /// What is wrong, with the position in the SMILES string.
    pub error: String,
}

/// Result of `describe`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DescribeReport {
    /// JSON schema version.
    pub schema_version: u32,
    /// Methods behind the main values.
    pub methods: Vec<(String, String)>,
    /// Described molecules, in input order.
    pub molecules: Vec<DescribedMolecule>,
    /// Inputs that failed.
    pub failures: Vec<DescribeFailure>,
}

impl DescribeReport {
    /// Describe inputs given as `SMILES` or `SMILES<TAB>name`, numbered from 1.
    pub fn from_inputs(inputs: &[String]) -> DescribeReport {
        let mut molecules = Vec::new();
        let mut failures = Vec::new();
        for (i, input) in inputs.iter().enumerate() {
            let (smiles, name) = match input.split_once('\t') {
                Some((s, n)) => (s.trim(), n.trim()),
                None => (input.trim(), input.trim()),
            };
            match estimate_without_stereo(smiles) {
                Ok(e) => {
                    // the sites and the Joback sum found above are not worked out again
                    let gc = match (e.sites_detected, e.joback_tb_k) {
                        (true, Some((tb_joback_k, _))) => {
                            assess_gc_known(&e.graph, &e.sites, tb_joback_k).ok()
                        }
                        _ => assess_gc(&e.graph, None).ok(),
                    };
                    molecules.push(DescribedMolecule {
                        name: name.to_string(),
                        smiles: smiles.to_string(),
                        descriptors: e.descriptors,
                        ionisable_sites: e.sites,
                        joback_tb_k: e.joback_tb_k.map(|t| t.0),
                        joback_typical_error_k: e.joback_tb_k.map(|t| t.1),
                        joback_note: e.joback_note,
                        gc,
                        note: e.note,
                    });
                }
                Err(err) => failures.push(DescribeFailure {
                    line: i + 1,
                    input: input.clone(),
                    error: err.to_string(),
                }),
            }
        }
        DescribeReport {
            schema_version: SCHEMA_VERSION,
            methods: vec![
                ("logp".into(), METHOD_LOGP.into()),
                ("tpsa".into(), METHOD_TPSA.into()),
                ("pka".into(), METHOD_PKA.into()),
                ("boiling_point".into(), METHOD_JOBACK.into()),
            ],
            molecules,
            failures,
        }
    }

    /// Render in a format (CSV is rendered as TSV columns with commas).
    pub fn render(&self, format: Format) -> String {
        match format {
            Format::Json => super::json_pretty(self, self.molecules.len() + self.failures.len()),
            Format::Table => self.table(),
            Format::Csv => self.delimited(','),
            Format::Tsv => self.delimited('\t'),
        }
    }

    /// The cells of one molecule: for the table (`delimited` false: fixed decimals, `-` when
    /// absent) or for CSV/TSV (the rule of [`super::csv_num`], an empty cell when absent).
    fn columns(m: &DescribedMolecule, delimited: bool) -> Vec<String> {
        let d = &m.descriptors;
        let fixed = |x: f64, n: usize| {
            if delimited {
                csv_num(x, Some(n))
            } else {
                num(x, n)
            }
        };
        let absent = || {
            if delimited {
                String::new()
            } else {
                "-".to_string()
            }
        };
        let opt = |v: Option<f64>, n| v.map_or_else(absent, |x| fixed(x, n));
        let sites: Vec<String> = m
            .ionisable_sites
            .iter()
            .map(|s| match s.pka {
                Some(p) => format!(
                    "{} ({}) pKa {}",
                    crate::plain::words(&s.class),
                    crate::plain::words(&s.kind),
                    num(p, 1)
                ),
                None => format!(
                    "{} ({})",
                    crate::plain::words(&s.class),
                    crate::plain::words(&s.kind)
                ),
            })
            .collect();
        vec![
            m.name.clone(),
            d.molecular_formula.clone(),
            opt(d.molar_mass_g_mol, 3),
            fixed(d.crippen_logp, 2),
            fixed(d.crippen_molar_refractivity_cm3_mol, 2),
            fixed(d.tpsa_a2, 2),
            d.hbond_donors.to_string(),
            d.hbond_acceptors.to_string(),
            d.rotatable_bonds.to_string(),
            d.ring_count.to_string(),
            d.aromatic_ring_count.to_string(),
            fixed(d.fraction_csp3, 3),
            d.heavy_atom_count.to_string(),
            opt(d.mcgowan_vx_100cm3_mol, 3),
            // °C first, to whole degrees: the Joback estimate's typical error is about 30 K
            // (K kept in the JSON)
            m.joback_tb_k
                .filter(|t| t.is_finite())
                .map_or_else(absent, |t| fixed(t - 273.15, 0)),
            if sites.is_empty() {
                "none".into()
            } else {
                sites.join("; ")
            },
            m.gc.as_ref()
                .map_or_else(absent, |g| crate::plain::words(&g.verdict)),
        ]
    }

    const HEADER: [&'static str; 17] = [
        "name",
        "formula",
        "molar mass (g/mol)",
        "logP (Crippen)",
        "MR (cm³/mol)",
        "TPSA (Å²)",
        "HBD",
        "HBA",
        "rotatable bonds",
        "rings",
        "aromatic rings",
        "fraction sp3 C",
        "heavy atoms",
        "McGowan Vx (cm³/mol/100)",
        "Tb Joback (°C, ±30 K typical)",
        "ionisable sites (typical pKa)",
        "GC",
    ];

    fn table(&self) -> String {
        let mut out = String::new();
        if !self.molecules.is_empty() {
            let rows: Vec<Vec<String>> = self
                .molecules
                .iter()
                .map(|m| Self::columns(m, false))
                .collect();
            out.push_str(&table::render(&Self::HEADER, &rows));
            out.push_str("\n\nMethods: ");
            out.push_str(
                &self
                    .methods
                    .iter()
                    .map(|(p, m)| format!("{}: {m}", p.replace('_', " ")))
                    .collect::<Vec<_>>()
                    .join("; "),
            );
            out.push('\n');
            for m in &self.molecules {
                if let Some(n) = &m.note {
                    out.push_str(&format!("{}: {}\n", table::printable(&m.name), n));
                }
            }
        }
        for f in &self.failures {
            out.push_str(&format!(
                "input {} `{}`: {}\n",
                f.line,
                table::printable(&f.input),
                f.error
            ));
        }
        out
    }

    fn delimited(&self, d: char) -> String {
        let mut out = Self::HEADER.join(&d.to_string());
        out.push('\n');
        for m in &self.molecules {
            let cells: Vec<String> = Self::columns(m, true)
                .iter()
                .map(|c| csv_cell(c, d))
                .collect();
            out.push_str(&cells.join(&d.to_string()));
            out.push('\n');
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn salts_keep_the_organic_fragment_and_bad_lines_are_reported() {
        let r = DescribeReport::from_inputs(&[
            "C[NH3+].[Cl-]\tmethylamine hydrochloride".into(),
            "C1CC(\tbroken".into(),
        ]);
        assert_eq!(r.molecules.len(), 1);
        assert!(r.molecules[0].note.is_some());
        assert_eq!(r.failures.len(), 1);
        assert_eq!(r.failures[0].line, 2);
        let t = r.render(Format::Table);
        assert!(
            t.contains("methylamine hydrochloride") && t.contains("input 2"),
            "{t}"
        );
    }
}
