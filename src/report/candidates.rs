//! The candidates of ambiguous names, shown the same way by every report that lists
//! unresolved queries (`lookup`, `advise`, `predict`): one row per compound the name could
//! mean, with what tells them apart and how the name is held.

use super::table;
use crate::property::Unresolved;

/// A table of the candidates of every ambiguous query (empty when none), headed by a line
/// that says how to settle it.
pub fn candidate_table(unresolved: &[Unresolved]) -> String {
    let rows: Vec<Vec<String>> = unresolved
        .iter()
        .flat_map(|u| {
            u.candidates.iter().map(move |c| {
                vec![
                    u.query.clone(),
                    c.name.clone(),
                    c.cas.clone().unwrap_or_else(|| "-".into()),
                    c.cid.map_or("-".into(), |n| n.to_string()),
                    c.inchikey.clone().unwrap_or_else(|| "-".into()),
                    c.held_as.clone(),
                ]
            })
        })
        .collect();
    if rows.is_empty() {
        return String::new();
    }
    let mut out = String::from(
        "\nAmbiguous names (left out; give `label=SMILES`, a CAS number or `cid:N` to choose)\n",
    );
    out.push_str(&table::render(
        &[
            "query",
            "could mean",
            "CAS",
            "PubChem CID",
            "InChIKey",
            "name held as",
        ],
        &rows,
    ));
    out.push('\n');
    out
}

/// The candidates of one query in one cell (`name (CAS …, InChIKey …) | …`), for CSV/TSV.
pub fn candidate_cell(u: &Unresolved) -> String {
    u.candidates
        .iter()
        .map(|c| {
            let mut s = c.name.clone();
            let ids: Vec<String> = [
                c.cas.as_ref().map(|x| format!("CAS {x}")),
                c.cid.map(|x| format!("CID {x}")),
                c.inchikey.as_ref().map(|x| format!("InChIKey {x}")),
            ]
            .into_iter()
            .flatten()
            .collect();
            if !ids.is_empty() {
                s.push_str(&format!(" ({})", ids.join(", ")));
            }
            s
        })
        .collect::<Vec<_>>()
        .join(" | ")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::property::Candidate;

    #[test]
    fn one_row_per_candidate() {
        let cand = |name: &str, cas: &str| Candidate {
            name: name.into(),
            cas: Some(cas.into()),
            cid: None,
            inchikey: None,
            smiles: None,
            held_as: "synonym".into(),
        };
        let u = Unresolved {
            query: "AMPA".into(),
            reason: "ambiguous".into(),
            suggestions: Vec::new(),
            // the herbicide metabolite and the receptor agonist (common practice, no source)
            candidates: vec![
                cand("aminomethylphosphonic acid", "1066-51-9"),
                cand("x", "1-1-1"),
            ],
        };
        let t = candidate_table(std::slice::from_ref(&u));
        assert!(t.contains("aminomethylphosphonic acid"), "{t}");
        assert!(t.contains("1066-51-9"), "{t}");
        assert_eq!(t.matches("AMPA").count(), 2, "{t}");
        assert_eq!(
            candidate_cell(&u),
            "aminomethylphosphonic acid (CAS 1066-51-9) | x (CAS 1-1-1)"
        );
        let none = Unresolved {
            candidates: Vec::new(),
            ..u
        };
        assert_eq!(candidate_table(&[none]), "");
    }
}
