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
                super::json_pretty(&v, self.analytes.len() + self.unresolved.len())
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
                    let w = plain_property(p);
                    prows.push(vec![
                        a.name.clone(),
                        w.label,
                        w.value,
                        w.unit,
                        p.kind.as_str().to_string(),
                        p.source.clone(),
                        w.detail,
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

/// A property as a practitioner reads it in the table: a plain label, the value rounded to
/// what its uncertainty supports, in the unit read first (°C for boiling points; JSON and CSV
/// keep the stored key, value and unit), and the qualifiers in words.
struct PlainProperty {
    label: String,
    value: String,
    unit: String,
    detail: String,
}

/// Joback & Reid's group contributions were fitted on compounds boiling below about 800 K (from
/// memory); an estimate above that says only "not volatile".
const JOBACK_FITTED_UP_TO_K: f64 = 800.0;

fn plain_property(p: &crate::property::Property) -> PlainProperty {
    let mut qualifiers: Vec<(String, String)> = p
        .detail
        .split(';')
        .filter(|q| !q.trim().is_empty())
        .map(|q| match q.split_once('=') {
            Some((k, v)) => (k.trim().to_string(), v.trim().to_string()),
            None => (String::new(), q.trim().to_string()),
        })
        .collect();
    let typical_error = qualifiers
        .iter()
        .find(|(k, _)| k == "typical_error_k")
        .and_then(|(_, v)| v.parse::<f64>().ok())
        .filter(|e| e.is_finite() && *e > 0.0);
    let estimated = p.kind == crate::property::PropertyKind::Estimated;
    let label = match p.property.as_str() {
        "logp" => "log P (octanol/water)".to_string(),
        "pka" => "pKa".to_string(),
        "tpsa" => "polar surface area".to_string(),
        "hbd" => "H-bond donors".to_string(),
        "hba" => "H-bond acceptors".to_string(),
        "mcgowan_volume" => "McGowan volume".to_string(),
        "charge" => "net charge".to_string(),
        other => other.replace('_', " "),
    };
    let (value, unit) = match (p.property.as_str(), p.unit.as_str()) {
        ("boiling_point", "K") => {
            let c = p.value - 273.15;
            // experimental to 0.1 °C; an estimate to whole degrees, to tens when its typical
            // error is 100 K or more (two significant digits of the error)
            let v = match (estimated, typical_error) {
                (false, _) => num(c, 1),
                (true, Some(e)) if e >= 100.0 => num((c / 10.0).round() * 10.0, 0),
                (true, _) => num(c, 0),
            };
            (v, "°C".to_string())
        }
        ("pka", _) => (
            num(p.value, if estimated { 1 } else { 2 }),
            "(log units)".into(),
        ),
        ("logp", _) => (num(p.value, 2), "(log units)".into()),
        (_, "count") | ("charge", _) => (num(p.value, 0), p.unit.clone()),
        // atom-contribution estimates: two decimals (Crippen MR), three for the McGowan volume
        // (a sum of tabulated atom volumes), as `describe` prints them
        ("molar_refractivity", _) => (num(p.value, 2), p.unit.clone()),
        ("mcgowan_volume", _) => (num(p.value, 3), p.unit.clone()),
        (_, "") => (csv_num(p.value, None), "(log units)".into()),
        _ => (csv_num(p.value, None), p.unit.clone()),
    };
    let mut words: Vec<String> = Vec::new();
    if p.property == "boiling_point" && p.unit == "K" {
        words.push(format!("{} K", num(p.value, if estimated { 0 } else { 1 })));
    }
    for (k, v) in qualifiers.drain(..) {
        words.push(match k.as_str() {
            "typical_error_k" => format!("typical error ± {v} K"),
            "spread" => format!("class spread ± {v}"),
            "temp_c" => format!("at {v} °C"),
            // the pKa data sets that do not say whether a value is acidic or basic
            "type" if v == "unspecified" => "acid or base not stated by the source".to_string(),
            "type" | "class" | "" => v.replace('_', " "),
            other => format!("{} {v}", other.replace('_', " ")),
        });
    }
    if p.property == "boiling_point" && estimated && p.value > JOBACK_FITTED_UP_TO_K {
        words.push(format!(
            "beyond the range the method was fitted on (about {JOBACK_FITTED_UP_TO_K:.0} K): read as not volatile"
        ));
    }
    PlainProperty {
        label,
        value,
        unit,
        detail: words.join("; "),
    }
}

#[cfg(test)]
mod plain_tests {
    use super::*;
    use crate::property::{Property, PropertyKind};

    fn prop(name: &str, value: f64, unit: &str, kind: PropertyKind, detail: &str) -> Property {
        Property {
            property: name.into(),
            value,
            unit: unit.into(),
            kind,
            source: String::new(),
            licence: String::new(),
            detail: detail.into(),
            origin: crate::property::Origin::Shipped,
        }
    }

    #[test]
    fn boiling_points_read_in_celsius_at_the_precision_of_their_error() {
        let e = PropertyKind::Estimated;
        let w = plain_property(&prop("boiling_point", 386.44, "K", e, "typical_error_k=18"));
        assert_eq!(
            (w.label.as_str(), w.value.as_str(), w.unit.as_str()),
            ("boiling point", "113", "°C")
        );
        assert_eq!(w.detail, "386 K; typical error ± 18 K");
        let big = plain_property(&prop(
            "boiling_point",
            4040.45,
            "K",
            e,
            "typical_error_k=372",
        ));
        assert_eq!(big.value, "3770");
        assert!(big.detail.contains("not volatile"), "{}", big.detail);
        let x = PropertyKind::Experimental;
        let w = plain_property(&prop("boiling_point", 384.26, "K", x, ""));
        assert_eq!((w.value.as_str(), w.detail.as_str()), ("111.1", "384.3 K"));
    }

    #[test]
    fn qualifiers_and_names_are_words() {
        let e = PropertyKind::Estimated;
        let w = plain_property(&prop(
            "pka",
            9.89,
            "",
            e,
            "type=acidic;class=phenol;spread=0.6",
        ));
        assert_eq!((w.label.as_str(), w.value.as_str()), ("pKa", "9.9"));
        assert_eq!(w.detail, "acidic; phenol; class spread ± 0.6");
        // issue 16: a pKa data set that does not say acid or base prints no code word
        let x = PropertyKind::Experimental;
        let w = plain_property(&prop("pka", 3.47, "", x, "type=unspecified;temp_c=25.0"));
        assert_eq!(
            w.detail,
            "acid or base not stated by the source; at 25.0 °C"
        );
        assert!(!w.detail.contains("unspecified"));
        let w = plain_property(&prop("molar_refractivity", 42.4105, "cm³/mol", e, ""));
        assert_eq!(w.value, "42.41");
        let w = plain_property(&prop("mcgowan_volume", 1.17241, "cm³/mol/100", e, ""));
        assert_eq!(w.value, "1.172");
        for (k, u) in [
            ("mcgowan_volume", "cm³/mol/100"),
            ("hbd", "count"),
            ("tpsa", "Å²"),
        ] {
            let w = plain_property(&prop(k, 2.0, u, e, ""));
            assert!(!w.label.contains('_') && w.label != k, "{k} -> {}", w.label);
        }
    }
}
