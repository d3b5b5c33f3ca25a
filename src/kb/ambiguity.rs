//! Names that denote more than one compound are never resolved to a guess.
//!
//! A name (or synonym, or abbreviation) is looked up in the shipped base with all the
//! compounds that carry it. Records of one molecule (a salt and its parent, a hydrate, a
//! record with and one without stereo) share a skeleton key (`structure::canon`) and count
//! as one candidate. The name is *ambiguous* when
//! - two or more different skeletons hold it at the same best rank (both as preferred name,
//!   or both only as synonyms), or
//! - it is written as an abbreviation (capitals and digits only, e.g. `AMPA`, `THF`) and more
//!   than one skeleton holds it at any rank: abbreviations are reused across fields (AMPA is
//!   a glutamate-receptor agonist and the glyphosate metabolite aminomethylphosphonic acid).
//!
//! Otherwise the skeleton holding the name at the best rank wins (a preferred name beats a
//! synonym). Records that are ring and open-chain forms of one sugar (glucopyranose and
//! open-chain glucose, lactose and its open-chain record) have different skeletons but the
//! same ring-chain key (`structure::canon::ring_chain_key`): they are one compound, and the
//! cyclic form is used, said so. An ambiguous name is reported with its candidates; `label=SMILES`, a CAS
//! number or a PubChem CID settles it. Common practice, no source.

use rusqlite::{Connection, params};

pub use crate::property::unresolved::Candidate;

struct Row {
    id: i64,
    rank: i64,
    skeleton: String,
    candidate: Candidate,
}

/// Whether `raw` is written as an abbreviation: 2–8 characters, capitals (and digits or
/// hyphens) only, at least two capitals.
pub fn looks_like_abbreviation(raw: &str) -> bool {
    let t = raw.trim();
    let n = t.chars().count();
    (2..=8).contains(&n)
        && t.chars()
            .all(|c| c.is_ascii_uppercase() || c.is_ascii_digit() || c == '-')
        && t.chars().filter(char::is_ascii_uppercase).count() >= 2
}

fn rows(conn: &Connection, norm: &str) -> rusqlite::Result<Vec<Row>> {
    let has_keys: bool = conn
        .prepare_cached(
            "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'structure_key'",
        )?
        .exists([])?;
    let sql = if has_keys {
        "SELECT c.id, min(n.rank), coalesce(k.skeleton, 'id:' || c.id), c.preferred_name, c.cas, c.cid, c.smiles, c.inchikey
         FROM name n JOIN compound c ON c.id = n.compound_id
         LEFT JOIN structure_key k ON k.compound_id = c.id
         WHERE n.norm = ?1 GROUP BY c.id ORDER BY min(n.rank), c.cid IS NULL, c.cid, c.id LIMIT 50"
    } else {
        "SELECT c.id, min(n.rank), 'id:' || c.id, c.preferred_name, c.cas, c.cid, c.smiles, c.inchikey
         FROM name n JOIN compound c ON c.id = n.compound_id
         WHERE n.norm = ?1 GROUP BY c.id ORDER BY min(n.rank), c.cid IS NULL, c.cid, c.id LIMIT 50"
    };
    let mut st = conn.prepare_cached(sql)?;
    let out = st
        .query_map(params![norm], |r| {
            let rank: i64 = r.get(1)?;
            Ok(Row {
                id: r.get(0)?,
                rank,
                skeleton: r.get(2)?,
                candidate: Candidate {
                    name: r.get(3)?,
                    cas: r.get(4)?,
                    cid: r.get(5)?,
                    smiles: r.get(6)?,
                    inchikey: r.get(7)?,
                    held_as: match rank {
                        0 => "preferred name",
                        1 => "systematic name",
                        _ => "synonym",
                    }
                    .to_string(),
                },
            })
        })?
        .collect::<Result<Vec<_>, _>>()?;
    Ok(out)
}

/// The decision for a name in one base.
#[derive(Debug, Clone, PartialEq)]
pub enum NameDecision {
    /// No compound holds the name.
    None,
    /// One compound (the row id of the best record of the winning skeleton).
    One(i64),
    /// One sugar held as several forms (ring and open chain, anomers): the row id of the
    /// common form and the sentence that says so.
    CommonForm {
        /// Row id of the record used.
        id: i64,
        /// What the base holds and which form is used.
        note: String,
    },
    /// Several different compounds: one candidate per skeleton, best first.
    Ambiguous(Vec<Candidate>),
}

/// A record's ring-chain key (`structure::canon::ring_chain_key`) and whether it is a cyclic
/// form (a hemiacetal opened); the skeleton key when the SMILES does not parse.
fn ring_chain_family(r: &Row) -> (String, bool) {
    r.candidate
        .smiles
        .as_deref()
        .and_then(|s| crate::structure::parse_smiles(s).ok())
        .map(|p| {
            let (k, opened) = crate::structure::canon::ring_chain_key(&p.graph);
            (k, opened > 0)
        })
        .unwrap_or_else(|| (r.skeleton.clone(), false))
}

/// Whether a record's structure carries an unpaired electron (a radical).
fn is_radical(r: &Row) -> bool {
    r.candidate
        .smiles
        .as_deref()
        .and_then(|s| {
            let keep = crate::structure::adapter::ParseOptions {
                allow_radicals: true,
                ..Default::default()
            };
            crate::structure::adapter::parse_smiles_with(s, &keep).ok()
        })
        .is_some_and(|p| p.graph.atoms.iter().any(|a| a.radical_electrons > 0))
}

/// Rank of a name as [`super::resolve`] orders it (a stereoisomer's name without descriptor,
/// rank 3, counts as a preferred name).
fn effective_rank(rank: i64) -> i64 {
    if rank == 3 { 0 } else { rank }
}

/// When the records holding a name differ only as ring and open-chain forms of one sugar
/// (or its anomers), the common form: a cyclic record (sugars are cyclic hemiacetals in
/// solution, over 99 % for the aldohexoses; common practice, no source), best-ranked (a name
/// held exactly before one held with its stereo descriptor stripped), lowest CID. The
/// ring-chain key ignores stereo, so a cyclic record without stereo (`hexopyranose`, any
/// aldohexose) never stands for a name that a record with stereo holds: when no cyclic record
/// with stereo holds the name, the best-ranked record with stereo is used (its chain form,
/// said so). `None` when the records are more than one compound or none is cyclic.
fn common_form(raw: &str, rows: &[Row]) -> Option<NameDecision> {
    let families: Vec<(String, bool)> = rows.iter().map(ring_chain_family).collect();
    if families.iter().any(|f| f.0 != families[0].0) || !families.iter().any(|f| f.1) {
        return None;
    }
    let has_stereo = |r: &Row| {
        r.candidate
            .smiles
            .as_deref()
            .is_some_and(|s| s.contains('@'))
    };
    let any_stereo = rows.iter().any(has_stereo);
    let order = |r: &Row| {
        (
            effective_rank(r.rank),
            r.rank == 3,
            r.candidate.cid.unwrap_or(i64::MAX),
            r.id,
        )
    };
    let cyclic = rows
        .iter()
        .zip(&families)
        .filter(|(r, f)| f.1 && (!any_stereo || has_stereo(r)))
        .map(|(r, _)| r)
        .min_by_key(|r| order(r));
    let (best, form) = match cyclic {
        Some(r) => (r, true),
        None => (
            rows.iter()
                .filter(|r| has_stereo(r))
                .min_by_key(|r| order(r))?,
            false,
        ),
    };
    let mut others: Vec<&str> = Vec::new();
    for r in rows.iter().filter(|r| r.id != best.id) {
        if !others.contains(&r.candidate.name.as_str()) && r.candidate.name != best.candidate.name {
            others.push(&r.candidate.name);
        }
    }
    Some(NameDecision::CommonForm {
        id: best.id,
        note: if form {
            format!(
                "`{}` is held by ring and open-chain forms of one sugar (also {}); the cyclic form `{}` is used, as sugars are cyclic in solution",
                raw.trim(),
                others.join(", "),
                best.candidate.name
            )
        } else {
            format!(
                "`{}` is held by ring and open-chain forms of one sugar (also {}); `{}` is used, the only form held with its stereo (open chain; in solution the sugar is cyclic)",
                raw.trim(),
                others.join(", "),
                best.candidate.name
            )
        },
    })
}

/// Decide what `norm` (a normalised name; `raw` as typed) denotes in `conn`.
///
/// # Errors
/// SQLite failures.
pub fn decide(conn: &Connection, raw: &str, norm: &str) -> rusqlite::Result<NameDecision> {
    let mut rows = rows(conn, norm)?;
    // a radical record never competes with a closed-shell one for a name: PubChem files some
    // names of a compound on its radical as well (`2-methylphenol` on the 2-hydroxybenzyl
    // radical), and a chromatographer never means the radical (common practice, no source)
    if rows.len() > 1 {
        let radical: Vec<bool> = rows.iter().map(is_radical).collect();
        if radical.iter().any(|r| *r) && radical.iter().any(|r| !*r) {
            let mut keep = radical.iter().map(|r| !*r);
            rows.retain(|_| keep.next().unwrap_or(true));
        }
    }
    let Some(first) = rows.first() else {
        return Ok(NameDecision::None);
    };
    // one entry per skeleton: its best rank and best row (rows come best first)
    let mut groups: Vec<(&str, i64, &Row)> = Vec::new();
    for r in &rows {
        if !groups.iter().any(|(s, _, _)| *s == r.skeleton) {
            groups.push((&r.skeleton, r.rank, r));
        }
    }
    if groups.len() == 1 {
        return Ok(NameDecision::One(first.id));
    }
    if let Some(d) = common_form(raw, &rows) {
        return Ok(d);
    }
    let best = groups.iter().map(|g| g.1).min().unwrap_or(0);
    let at_best = groups.iter().filter(|g| g.1 == best).count();
    if at_best > 1 || looks_like_abbreviation(raw) {
        return Ok(NameDecision::Ambiguous(
            groups.iter().map(|g| g.2.candidate.clone()).collect(),
        ));
    }
    Ok(NameDecision::One(first.id))
}

/// The reason text of an ambiguous name.
pub fn ambiguity_reason(raw: &str, candidates: &[Candidate]) -> String {
    let list: Vec<String> = candidates
        .iter()
        .map(|c| {
            let mut s = c.name.clone();
            if let Some(cas) = &c.cas {
                s.push_str(&format!(", CAS {cas}"));
            }
            if let Some(cid) = c.cid {
                s.push_str(&format!(", CID {cid}"));
            }
            s
        })
        .collect();
    format!(
        "ambiguous: `{}` names {} different compounds ({}); give `{}=SMILES`, a CAS number or a CID",
        raw.trim(),
        candidates.len(),
        list.join("; "),
        raw.trim()
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn abbreviations() {
        for a in ["AMPA", "THF", "DDT", "2,4-D", "MCPA", "PFOS", "EDTA"] {
            assert_eq!(looks_like_abbreviation(a), a != "2,4-D", "{a}");
        }
        for a in ["ampa", "Caffeine", "A", "TOOLONGNAME", "Na+"] {
            assert!(!looks_like_abbreviation(a), "{a}");
        }
    }
}
