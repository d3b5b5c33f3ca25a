//! The `lookup` report: resolved analytes with every property and its provenance, and the
//! unresolved queries with suggestions.

use serde::{Deserialize, Serialize};

use super::{Format, SCHEMA_VERSION, csv_cell, csv_num, csv_opt, num, table};
use crate::kb::resolve::Unresolved;
use crate::property::Analyte;

/// Result of looking up a list of queries.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LookupReport {
    /// JSON schema version.
    pub schema_version: u32,
    /// Resolved analytes in query order.
    pub analytes: Vec<Analyte>,
    /// Queries that did not resolve, in query order.
    pub unresolved: Vec<Unresolved>,
}

/// The JSON form of [`LookupReport`]: each analyte with its `label` first.
#[derive(Serialize)]
struct LookupJson<'a> {
    schema_version: u32,
    analytes: Vec<Labelled<'a>>,
    unresolved: &'a [Unresolved],
}

#[derive(Serialize)]
struct Labelled<'a> {
    label: Option<&'a str>,
    #[serde(flatten)]
    analyte: &'a Analyte,
}

impl LookupReport {
    /// A report from resolved and unresolved queries.
    pub fn new(analytes: Vec<Analyte>, unresolved: Vec<Unresolved>) -> Self {
        LookupReport {
            schema_version: SCHEMA_VERSION,
            analytes,
            unresolved,
        }
    }

    /// Render in a format.
    pub fn render(&self, format: Format) -> String {
        match format {
            Format::Json => {
                // every analyte carries `label`: the user's own label, or null
                let v = LookupJson {
                    schema_version: self.schema_version,
                    analytes: self
                        .analytes
                        .iter()
                        .map(|a| Labelled {
                            label: a.label(),
                            analyte: a,
                        })
                        .collect(),
                    unresolved: &self.unresolved,
                };
                let mut s = serde_json::to_string_pretty(&v).unwrap_or_default();
                s.push('\n');
                s
            }
            Format::Table => self.table(),
            Format::Csv => self.delimited(','),
            Format::Tsv => self.delimited('\t'),
        }
    }

    /// Distinct compounds in query order, each with every query that resolved to it (two
    /// queries are the same compound when they share an InChIKey, or, without one, the same
    /// name and structure). The tables and CSV show each compound's properties once.
    fn distinct(&self) -> Vec<(Vec<&str>, &Analyte)> {
        let mut out: Vec<(Vec<&str>, &Analyte)> = Vec::new();
        for a in &self.analytes {
            let same = |b: &Analyte| match (&a.inchikey, &b.inchikey) {
                (Some(x), Some(y)) => x == y,
                (None, None) => a.name == b.name && a.smiles == b.smiles,
                _ => false,
            };
            match out.iter_mut().find(|(_, b)| same(b)) {
                Some((queries, _)) => queries.push(&a.query),
                None => out.push((vec![&a.query], a)),
            }
        }
        out
    }

    fn table(&self) -> String {
        let mut out = String::new();
        let total = self.analytes.len() + self.unresolved.len();
        // The blank line after the count comes before a section, never twice.
        out.push_str(&format!(
            "Resolved {} of {} queries.\n{}",
            self.analytes.len(),
            total,
            if self.analytes.is_empty() { "" } else { "\n" }
        ));
        if !self.analytes.is_empty() {
            let rows: Vec<Vec<String>> = self
                .analytes
                .iter()
                .map(|a| {
                    vec![
                        a.query.clone(),
                        a.name.clone(),
                        a.matched_by.clone(),
                        a.cas.clone().unwrap_or_else(|| "-".into()),
                        a.cid.map_or("-".into(), |c| c.to_string()),
                        a.formula.clone().unwrap_or_else(|| "-".into()),
                        a.molar_mass_g_mol.map_or("-".into(), |m| num(m, 2)),
                        a.inchikey.clone().unwrap_or_else(|| "-".into()),
                    ]
                })
                .collect();
            out.push_str(&table::render(
                &[
                    "query",
                    "name",
                    "matched by",
                    "CAS",
                    "PubChem CID",
                    "formula",
                    "molar mass (g/mol)",
                    "InChIKey",
                ],
                &rows,
            ));
            out.push_str(
                "\n\nProperties (best value first; experimental > estimated, user > shipped within each)\n",
            );
            let distinct = self.distinct();
            for (queries, a) in &distinct {
                if queries.len() > 1 {
                    out.push_str(&format!(
                        "(queries {} are the same compound, {}: its properties are shown once)\n",
                        queries
                            .iter()
                            .map(|q| format!("`{q}`"))
                            .collect::<Vec<_>>()
                            .join(" and "),
                        a.name
                    ));
                }
            }
            let mut prows = Vec::new();
            for (_, a) in &distinct {
                for p in &a.properties {
                    prows.push(vec![
                        a.name.clone(),
                        p.property.clone(),
                        csv_num(p.value, None),
                        if p.unit.is_empty() {
                            "(log units)".into()
                        } else {
                            p.unit.clone()
                        },
                        p.kind.as_str().to_string(),
                        p.source.clone(),
                        p.detail.clone(),
                    ]);
                }
            }
            if prows.is_empty() {
                out.push_str("(no stored properties)\n");
            } else {
                out.push_str(&table::render(
                    &[
                        "analyte",
                        "property",
                        "value",
                        "unit",
                        "kind",
                        "source or method",
                        "detail",
                    ],
                    &prows,
                ));
                out.push('\n');
            }
        }
        if !self.unresolved.is_empty() {
            out.push_str("\nUnresolved\n");
            let rows: Vec<Vec<String>> = self
                .unresolved
                .iter()
                .map(|u| {
                    vec![
                        u.query.clone(),
                        u.reason.clone(),
                        if u.suggestions.is_empty() {
                            "-".into()
                        } else {
                            u.suggestions
                                .iter()
                                .map(|s| {
                                    if s.name == s.compound {
                                        s.compound.clone()
                                    } else {
                                        format!("{} [as `{}`]", s.compound, s.name)
                                    }
                                })
                                .collect::<Vec<_>>()
                                .join("; ")
                        },
                    ]
                })
                .collect();
            out.push_str(&table::render(&["query", "reason", "did you mean"], &rows));
            out.push_str(&super::candidates::candidate_table(&self.unresolved));
            out.push('\n');
        }
        out
    }

    fn delimited(&self, d: char) -> String {
        let header = [
            "status",
            "query",
            "name",
            "inchikey",
            "cas",
            "cid",
            "formula",
            "molar_mass_g_mol",
            "smiles",
            "property",
            "value",
            "unit",
            "kind",
            "source",
            "detail",
        ];
        let mut out = header.join(&d.to_string());
        out.push('\n');
        let mut line = |cells: Vec<String>| {
            out.push_str(
                &cells
                    .iter()
                    .map(|c| csv_cell(c, d))
                    .collect::<Vec<_>>()
                    .join(&d.to_string()),
            );
            out.push('\n');
        };
        for (queries, a) in self.distinct() {
            let id = vec![
                "resolved".to_string(),
                queries.join("; "),
                a.name.clone(),
                a.inchikey.clone().unwrap_or_default(),
                a.cas.clone().unwrap_or_default(),
                a.cid.map(|c| c.to_string()).unwrap_or_default(),
                a.formula.clone().unwrap_or_default(),
                csv_opt(a.molar_mass_g_mol, None),
                a.smiles.clone().unwrap_or_default(),
            ];
            if a.properties.is_empty() {
                let mut c = id.clone();
                c.extend(std::iter::repeat_n(String::new(), 6));
                line(c);
            }
            for p in &a.properties {
                let mut c = id.clone();
                c.extend([
                    p.property.clone(),
                    csv_num(p.value, None),
                    p.unit.clone(),
                    p.kind.as_str().to_string(),
                    p.source.clone(),
                    p.detail.clone(),
                ]);
                line(c);
            }
        }
        for u in &self.unresolved {
            let mut c = vec!["unresolved".to_string(), u.query.clone()];
            c.extend(std::iter::repeat_n(String::new(), 12));
            let sugg: Vec<String> = u.suggestions.iter().map(|s| s.name.clone()).collect();
            c.push(if u.candidates.is_empty() {
                format!("{}; suggestions: {}", u.reason, sugg.join(" | "))
            } else {
                format!(
                    "{}; candidates: {}",
                    u.reason,
                    super::candidates::candidate_cell(u)
                )
            });
            line(c);
        }
        out
    }
}
