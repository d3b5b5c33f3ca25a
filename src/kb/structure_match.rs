//! Matching a structure by its canonical key (`structure::canon`) instead of its text.
//!
//! The shipped base stores the keys of every record (table `structure_key`, written by the
//! build, with an index on each key); the user overlay's keys are computed when first
//! needed and kept while the overlay is unchanged, so the overlay needs no migration.
//!
//! Order of preference: the user overlay before the shipped base; within one base the stereo
//! key before the skeleton key; among records with the same key the parent form (a single
//! fragment with nothing neutralised, i.e. not a salt record) first, then the record with
//! the lowest PubChem CID.

use rusqlite::{Connection, OptionalExtension, params};

use crate::structure::canon::{StructureKey, structure_key};
use crate::structure::tautomer::mobile_h_key;

/// DDL of the key table (shipped base only; created by the build, not a numbered migration,
/// because the shipped base is rebuilt whenever the seed or the key algorithm changes).
pub(crate) const KEY_TABLE_SQL: &str = "
CREATE TABLE IF NOT EXISTS structure_key (
    compound_id INTEGER PRIMARY KEY,
    skeleton TEXT NOT NULL,
    stereo TEXT NOT NULL,
    parent INTEGER NOT NULL,
    -- stereo elements of the key (`StructureKey::stereo_elements`)
    stereo_elements INTEGER NOT NULL,
    -- possible stereo elements of the structure (`canon::possible_stereo_elements`) when the
    -- key has none; 0 otherwise (read only for records without stereo)
    possible_stereo INTEGER NOT NULL
);
";

/// Indexes of the key table, created after the rows are in.
pub(crate) const KEY_INDEX_SQL: &str = "
CREATE INDEX IF NOT EXISTS structure_key_skeleton ON structure_key(skeleton);
CREATE INDEX IF NOT EXISTS structure_key_stereo ON structure_key(stereo);
CREATE INDEX IF NOT EXISTS compound_formula ON compound(formula);
";

/// How a structure matched a record.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum KeyMatch {
    /// Same molecule including the stereo given (or neither has stereo).
    Stereo,
    /// Same skeleton; the stereo given differs from the record's or one side has none.
    SkeletonOnly,
}

impl KeyMatch {
    /// The `matched_by` text shown to the user.
    pub fn describe(self, query_key: &StructureKey) -> String {
        match self {
            KeyMatch::Stereo => "structure".to_string(),
            KeyMatch::SkeletonOnly if query_key.has_stereo() => {
                "structure without stereo (the base holds this skeleton with other or no stereo)"
                    .to_string()
            }
            KeyMatch::SkeletonOnly => {
                "structure without stereo (the base holds this skeleton only as a stereoisomer)"
                    .to_string()
            }
        }
    }
}

/// Whether a parsed record is its parent form (no fragment dropped, nothing normalised).
pub(crate) fn is_parent(note: Option<&str>, key: &StructureKey) -> bool {
    note.is_none() && key.normalised.is_empty()
}

/// The compound id in the shipped base whose key matches, with how.
pub(crate) fn find_shipped(
    conn: &Connection,
    key: &StructureKey,
) -> rusqlite::Result<Option<(i64, KeyMatch)>> {
    let pick = |column: &str, value: &str| -> rusqlite::Result<Option<i64>> {
        conn.prepare_cached(&format!(
            "SELECT k.compound_id FROM structure_key k JOIN compound c ON c.id = k.compound_id
             WHERE k.{column} = ?1 ORDER BY k.parent DESC, c.cid IS NULL, c.cid, c.id LIMIT 1"
        ))?
        .query_row(params![value], |r| r.get(0))
        .optional()
    };
    // The key table exists only in bases built by this version; older ones are stale and
    // rebuilt on open, but a base opened without building may lack it.
    let exists: bool = conn
        .prepare_cached(
            "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'structure_key'",
        )?
        .exists([])?;
    if !exists {
        return Ok(None);
    }
    if let Some(id) = pick("stereo", &key.stereo)? {
        return Ok(Some((id, KeyMatch::Stereo)));
    }
    Ok(pick("skeleton", &key.skeleton)?.map(|id| (id, KeyMatch::SkeletonOnly)))
}

/// Whether a shipped record is a salt (or other several-fragment form) of the structure
/// `smiles`: its stored formula differs from the structure's own.
pub(crate) fn is_salt_of(conn: &Connection, id: i64, smiles: &str) -> rusqlite::Result<bool> {
    let Ok(parsed) = crate::structure::parse_smiles(smiles) else {
        return Ok(false);
    };
    let own = crate::structure::formula::molecular_formula(&parsed.graph);
    let stored: Option<String> = conn
        .prepare_cached("SELECT formula FROM compound WHERE id = ?1")?
        .query_row(params![id], |r| r.get(0))
        .optional()?
        .flatten();
    Ok(stored.is_some_and(|f| !f.is_empty() && f != own))
}

/// The shipped record that holds the query as another mobile-hydrogen tautomer
/// ([`crate::structure::tautomer`]): among the records of the same molecular formula, the
/// first (parent form, then the same presence of stereo as the query, then lowest PubChem
/// CID) whose structure has the query's
/// mobile-hydrogen key. Used only when neither structure key matched.
pub(crate) fn find_shipped_tautomer(
    conn: &Connection,
    smiles: &str,
) -> rusqlite::Result<Option<i64>> {
    let Ok(parsed) = crate::structure::parse_smiles(smiles) else {
        return Ok(None);
    };
    let formula = crate::structure::formula::molecular_formula(&parsed.graph);
    let target = mobile_h_key(&parsed.graph);
    // a query without stereo prefers a record without stereo, and one with stereo the reverse
    let no_stereo = !crate::structure::canon::key_of_graph(&parsed.graph).has_stereo();
    let mut st = conn.prepare_cached(
        "SELECT c.id, c.smiles FROM compound c LEFT JOIN structure_key k ON k.compound_id = c.id
         WHERE c.formula = ?1 AND c.smiles IS NOT NULL AND c.smiles != ''
         ORDER BY k.parent DESC, (k.stereo = k.skeleton) = ?2 DESC, c.cid IS NULL, c.cid, c.id",
    )?;
    let rows: Vec<(i64, String)> = st
        .query_map(params![formula, no_stereo], |r| Ok((r.get(0)?, r.get(1)?)))?
        .collect::<Result<_, _>>()?;
    for (id, record_smiles) in rows {
        if let Ok(p) = crate::structure::parse_smiles(&record_smiles)
            && mobile_h_key(&p.graph) == target
        {
            return Ok(Some(id));
        }
    }
    Ok(None)
}

/// (row id, key, parent form) of each overlay structure.
type KeyRows = std::rc::Rc<Vec<(i64, StructureKey, bool)>>;

/// Keys of the overlay's compounds, cached while the overlay is unchanged.
#[derive(Debug, Default)]
pub(crate) struct OverlayKeys {
    /// (row count, largest id) the cache was computed for, and (id, key, parent) rows.
    cache: std::cell::RefCell<Option<((i64, i64), KeyRows)>>,
}

impl OverlayKeys {
    fn rows(&self, conn: &Connection) -> rusqlite::Result<KeyRows> {
        let stamp: (i64, i64) = conn
            .prepare_cached("SELECT count(*), coalesce(max(id), 0) FROM compound")?
            .query_row([], |r| Ok((r.get(0)?, r.get(1)?)))?;
        if let Some((s, rows)) = self.cache.borrow().as_ref()
            && *s == stamp
        {
            return Ok(rows.clone());
        }
        let mut st = conn.prepare_cached(
            "SELECT id, smiles FROM compound WHERE smiles IS NOT NULL AND smiles != '' ORDER BY id",
        )?;
        let list: Vec<(i64, String)> = st
            .query_map([], |r| Ok((r.get(0)?, r.get(1)?)))?
            .collect::<Result<_, _>>()?;
        let mut rows = Vec::with_capacity(list.len());
        for (id, smiles) in list {
            if let Ok(parsed) = crate::structure::parse_smiles(&smiles) {
                let key = crate::structure::canon::key_of_graph(&parsed.graph);
                let parent = is_parent(parsed.note.as_deref(), &key);
                rows.push((id, key, parent));
            }
        }
        let rows = std::rc::Rc::new(rows);
        *self.cache.borrow_mut() = Some((stamp, rows.clone()));
        Ok(rows)
    }

    /// The overlay compound id whose key matches, with how.
    pub(crate) fn find(
        &self,
        conn: &Connection,
        key: &StructureKey,
    ) -> rusqlite::Result<Option<(i64, KeyMatch)>> {
        let rows = self.rows(conn)?;
        let best = |hit: &dyn Fn(&StructureKey) -> bool| {
            rows.iter()
                .filter(|(_, k, _)| hit(k))
                .min_by_key(|(id, _, parent)| (!*parent, *id))
                .map(|(id, _, _)| *id)
        };
        if let Some(id) = best(&|k| k.stereo == key.stereo) {
            return Ok(Some((id, KeyMatch::Stereo)));
        }
        Ok(best(&|k| k.skeleton == key.skeleton).map(|id| (id, KeyMatch::SkeletonOnly)))
    }
}

/// The key of a query SMILES, or `None` when it does not parse (the caller reports why).
pub(crate) fn query_key(smiles: &str) -> Option<StructureKey> {
    structure_key(smiles).ok()
}
