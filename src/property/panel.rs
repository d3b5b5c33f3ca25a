//! One panel, each compound once: two entries of a list that are the same molecule (the same
//! InChIKey, or without one the same canonical structure key with its stereo) are one analyte,
//! analysed once under both labels, and the merge is said out loud. Treating them as two
//! analytes would predict a co-eluting pair at resolution 0 that is no pair at all.

use super::Analyte;
use crate::structure::canon::structure_key;

/// What [`merge_same_compounds`] merged: the labels as given, the resolved name and how the
/// identity was established.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Merged {
    /// The labels (or queries) of the entries, in list order, each once.
    pub labels: Vec<String>,
    /// The resolved name.
    pub name: String,
    /// `InChIKey ...` or `the same structure key`.
    pub evidence: String,
}

impl Merged {
    /// The sentence shown in the warnings of a report.
    pub fn note(&self) -> String {
        let labels: Vec<String> = self.labels.iter().map(|l| format!("`{l}`")).collect();
        if labels.len() == 1 {
            return format!(
                "{} was given more than once ({}, {}): analysed once",
                labels[0], self.name, self.evidence
            );
        }
        let (last, rest) = labels.split_last().unwrap_or((&labels[0], &[]));
        format!(
            "{} and {last} are the same compound ({}, {}): analysed once",
            rest.join(", "),
            self.name,
            self.evidence
        )
    }
}

/// The identity two entries are compared by: the InChIKey, else the stereo-aware structure
/// key of the SMILES, else nothing (such an entry is never merged).
fn identity(a: &Analyte) -> Option<(String, String)> {
    if let Some(k) = &a.inchikey {
        return Some((format!("inchikey:{k}"), format!("InChIKey {k}")));
    }
    let key = structure_key(a.smiles.as_deref()?).ok()?;
    Some((
        format!("key:{}", key.stereo),
        "the same structure".to_string(),
    ))
}

/// Merge the entries of a panel that are the same molecule: the first keeps its record and
/// takes every label (`Impurity A = Main peak`); the rest are dropped. Returns the panel in
/// list order and one [`Merged`] per compound given more than once.
pub fn merge_same_compounds(analytes: Vec<Analyte>) -> (Vec<Analyte>, Vec<Merged>) {
    let mut out: Vec<Analyte> = Vec::with_capacity(analytes.len());
    let mut ids: Vec<Option<(String, String)>> = Vec::with_capacity(analytes.len());
    let mut labels: Vec<Vec<String>> = Vec::with_capacity(analytes.len());
    for a in analytes {
        let id = identity(&a);
        let label = a.label().unwrap_or(&a.name).to_string();
        let seen = id.as_ref().and_then(|(k, _)| {
            ids.iter()
                .position(|o| o.as_ref().is_some_and(|o| &o.0 == k))
        });
        match seen {
            Some(i) => {
                if !labels[i].contains(&label) {
                    labels[i].push(label);
                }
                // the entry counts even when its label repeats one already given
                labels[i].push(String::new());
            }
            None => {
                labels.push(vec![label]);
                ids.push(id);
                out.push(a);
            }
        }
    }
    let mut merged = Vec::new();
    for ((a, id), ls) in out.iter_mut().zip(&ids).zip(labels) {
        if ls.len() < 2 {
            continue;
        }
        let given: Vec<String> = ls.into_iter().filter(|l| !l.is_empty()).collect();
        if given.len() > 1 {
            let joined = given.join(" = ");
            // keep the resolved name visible when every label is only that name
            a.query = if given.iter().all(|l| *l == a.name) {
                a.name.clone()
            } else {
                joined
            };
        }
        merged.push(Merged {
            labels: given,
            name: a.name.clone(),
            evidence: id.as_ref().map(|(_, e)| e.clone()).unwrap_or_default(),
        });
    }
    (out, merged)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::property::Origin;

    fn analyte(query: &str, name: &str, key: Option<&str>, smiles: &str) -> Analyte {
        Analyte {
            query: query.into(),
            name: name.into(),
            inchikey: key.map(str::to_string),
            smiles: Some(smiles.into()),
            formula: None,
            molar_mass_g_mol: None,
            cid: None,
            cas: None,
            origin: if key.is_some() {
                Origin::Shipped
            } else {
                Origin::Structure
            },
            matched_by: if key.is_some() {
                "structure"
            } else {
                "smiles (not in knowledge base)"
            }
            .into(),
            properties: Vec::new(),
        }
    }

    // paracetamol, InChIKey from PubChem CID 1983 (from memory)
    const PARA: &str = "RZVAJINKPMORJF-UHFFFAOYSA-N";

    #[test]
    fn two_labels_of_one_compound_are_one_analyte() {
        let (out, merged) = merge_same_compounds(vec![
            analyte(
                "Impurity A",
                "acetaminophen",
                Some(PARA),
                "CC(=O)Nc1ccc(O)cc1",
            ),
            analyte(
                "Side product",
                "toluene",
                Some("YXFVVABEGXRONW-UHFFFAOYSA-N"),
                "Cc1ccccc1",
            ),
            analyte(
                "Main peak",
                "acetaminophen",
                Some(PARA),
                "CC(=O)Nc1ccc(O)cc1",
            ),
        ]);
        assert_eq!(out.len(), 2);
        assert_eq!(out[0].query, "Impurity A = Main peak");
        assert_eq!(
            out[0].display_name(),
            "Impurity A = Main peak (acetaminophen)"
        );
        assert_eq!(merged.len(), 1);
        let note = merged[0].note();
        assert!(
            note.contains("`Impurity A` and `Main peak` are the same compound"),
            "{note}"
        );
        assert!(note.contains(PARA), "{note}");
    }

    #[test]
    fn structures_outside_the_base_merge_by_structure_key() {
        // an invented compound given in two atom orders and in Kekulé form
        let (out, merged) = merge_same_compounds(vec![
            analyte("Peak 1", "Peak 1", None, "CCOC(=O)c1ccc(Cl)cc1CN"),
            analyte("Peak 2", "Peak 2", None, "NCc1cc(Cl)ccc1C(=O)OCC"),
            analyte("Peak 3", "Peak 3", None, "CCOC(=O)C1=C(CN)C=C(Cl)C=C1"),
            analyte("Peak 4", "Peak 4", None, "CCOC(=O)c1ccc(Br)cc1CN"),
        ]);
        assert_eq!(out.len(), 2);
        assert_eq!(merged[0].labels, vec!["Peak 1", "Peak 2", "Peak 3"]);
        assert!(
            merged[0]
                .note()
                .starts_with("`Peak 1`, `Peak 2` and `Peak 3`")
        );
    }

    #[test]
    fn stereoisomers_and_the_same_name_twice() {
        // enantiomers are different analytes (a chiral phase separates them)
        let (out, merged) = merge_same_compounds(vec![
            analyte("L", "L", None, "C[C@H](N)C(=O)O"),
            analyte("D", "D", None, "C[C@@H](N)C(=O)O"),
        ]);
        assert_eq!((out.len(), merged.len()), (2, 0));
        // the same name typed twice: one analyte, said so
        let (out, merged) = merge_same_compounds(vec![
            analyte(
                "caffeine",
                "caffeine",
                Some("RYYVLZVUVIJVGH-UHFFFAOYSA-N"),
                "Cn1cnc2c1c(=O)n(C)c(=O)n2C",
            ),
            analyte(
                "Caffeine",
                "caffeine",
                Some("RYYVLZVUVIJVGH-UHFFFAOYSA-N"),
                "Cn1cnc2c1c(=O)n(C)c(=O)n2C",
            ),
        ]);
        assert_eq!(out.len(), 1);
        assert_eq!(out[0].query, "caffeine");
        assert!(
            merged[0].note().contains("given more than once"),
            "{}",
            merged[0].note()
        );
    }

    #[test]
    fn labels() {
        let a = analyte(
            "Main peak",
            "acetaminophen",
            Some(PARA),
            "CC(=O)Nc1ccc(O)cc1",
        );
        assert_eq!(a.label(), Some("Main peak"));
        // the bare SMILES the analyte was found by is no label
        let b = analyte(
            "Oc1ccc(NC(C)=O)cc1",
            "acetaminophen",
            Some(PARA),
            "CC(=O)Nc1ccc(O)cc1",
        );
        assert_eq!(b.label(), None);
        assert_eq!(b.display_name(), "acetaminophen");
        // a name differing only in case or punctuation repeats the resolved name
        let c = analyte("Acetaminophen", "acetaminophen", Some(PARA), "x");
        assert_eq!(c.label(), None);
        let mut d = c.clone();
        d.query = "103-90-2".into();
        d.matched_by = "cas".into();
        assert_eq!(d.display_name(), "103-90-2 (acetaminophen)");
    }
}
