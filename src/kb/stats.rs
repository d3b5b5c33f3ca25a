//! Counts of what the knowledge base holds, by source and property.

use rusqlite::Connection;
use serde::{Deserialize, Serialize};

use super::{Kb, KbError, SEED_HASH};

/// Counts for one database file.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct DbStats {
    /// File.
    pub path: String,
    /// Compounds.
    pub compounds: i64,
    /// Names and synonyms.
    pub names: i64,
    /// Property rows.
    pub properties: i64,
    /// Compounds by origin table (e.g. `shipped:pubchem-large`, `user`).
    pub compounds_by_origin: Vec<Count>,
    /// Property rows by property, kind and source.
    pub properties_by_source: Vec<PropertyCount>,
    /// File size in bytes.
    pub size_bytes: u64,
}

/// A labelled count.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Count {
    /// Label.
    pub label: String,
    /// Count.
    pub count: i64,
}

/// Property rows of one property, kind and source.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PropertyCount {
    /// Property.
    pub property: String,
    /// `experimental` or `estimated`.
    pub kind: String,
    /// Source or method.
    pub source: String,
    /// Licence.
    pub licence: String,
    /// Rows.
    pub count: i64,
}

/// Statistics of both databases.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct KbStats {
    /// Fingerprint of the seed data the shipped base was built from.
    pub seed_hash: String,
    /// The shipped base.
    pub shipped: DbStats,
    /// The user overlay, if it exists.
    pub user: Option<DbStats>,
    /// Total compounds (shipped plus user; a user record of a shipped compound counts twice).
    pub compounds: i64,
}

fn db_stats(conn: &Connection, path: &std::path::Path) -> Result<DbStats, KbError> {
    let sql = |e| KbError::sql(path, e);
    let one = |q: &str| conn.query_row(q, [], |r| r.get::<_, i64>(0)).map_err(sql);
    let compounds = one("SELECT count(*) FROM compound")?;
    let names = one("SELECT count(*) FROM name")?;
    let properties = one("SELECT count(*) FROM property")?;
    let compounds_by_origin = conn
        .prepare("SELECT origin, count(*) FROM compound GROUP BY origin ORDER BY origin")
        .and_then(|mut s| {
            s.query_map([], |r| {
                Ok(Count {
                    label: r.get(0)?,
                    count: r.get(1)?,
                })
            })?
            .collect::<Result<Vec<_>, _>>()
        })
        .map_err(sql)?;
    let properties_by_source = conn
        .prepare(
            "SELECT property, kind, source, licence, count(*) FROM property
             GROUP BY property, kind, source, licence ORDER BY property, kind, source",
        )
        .and_then(|mut s| {
            s.query_map([], |r| {
                Ok(PropertyCount {
                    property: r.get(0)?,
                    kind: r.get(1)?,
                    source: r.get(2)?,
                    licence: r.get(3)?,
                    count: r.get(4)?,
                })
            })?
            .collect::<Result<Vec<_>, _>>()
        })
        .map_err(sql)?;
    Ok(DbStats {
        path: path.display().to_string(),
        compounds,
        names,
        properties,
        compounds_by_origin,
        properties_by_source,
        size_bytes: std::fs::metadata(path).map(|m| m.len()).unwrap_or(0),
    })
}

impl Kb {
    /// Counts by source and property for both databases.
    ///
    /// # Errors
    /// Database failures.
    pub fn stats(&self) -> Result<KbStats, KbError> {
        let shipped = db_stats(&self.shipped, &self.shipped_path)?;
        let user = match &self.user {
            Some(u) => Some(db_stats(u, &self.user_path)?),
            None => None,
        };
        let compounds = shipped.compounds + user.as_ref().map_or(0, |u| u.compounds);
        Ok(KbStats {
            seed_hash: SEED_HASH.to_string(),
            shipped,
            user,
            compounds,
        })
    }
}
