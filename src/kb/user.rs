//! The user overlay: lab-measured values and new compounds, kept in a separate database that
//! wins over the shipped base and survives a rebuild of it.
//!
//! Writers use SQLite's write-ahead log and a busy timeout, so two processes adding compounds
//! at once both succeed. Every change (one compound, or a whole import file) is one
//! transaction: a process killed half-way leaves the database as it was.

use std::fs;
use std::path::Path;

use rusqlite::{Connection, params};
use serde::{Deserialize, Serialize};

use super::identifier::{parse_cas, parse_inchikey};
use super::normalise::normalise_name;
use super::{Kb, KbError, SCHEMA_VERSION, busy_timeout, migrate, schema_version};
use crate::property::{PropertyKind, canonical_unit};

/// Open (creating if needed) the user overlay for reading and writing.
///
/// # Errors
/// File-system trouble, corruption, a newer schema, locks.
pub fn open_user(path: &Path) -> Result<Connection, KbError> {
    if let Some(dir) = path.parent()
        && !dir.as_os_str().is_empty()
    {
        fs::create_dir_all(dir).map_err(|e| KbError::Io {
            path: dir.to_path_buf(),
            source: e,
        })?;
    }
    let sql = |e| KbError::sql(path, e);
    let mut conn = Connection::open(path).map_err(sql)?;
    conn.busy_timeout(busy_timeout()).map_err(sql)?;
    conn.query_row("PRAGMA journal_mode=WAL", [], |_| Ok(()))
        .map_err(sql)?;
    conn.execute_batch("PRAGMA foreign_keys=ON;").map_err(sql)?;
    migrate(&mut conn, path)?;
    Ok(conn)
}

/// Open an existing user overlay for reading only: no file or directory is created, the journal
/// mode is left as it is and nothing is migrated, so a reader never takes a write lock and never
/// waits behind a running `kb import` (in WAL mode readers and a writer do not block each
/// other). Returns the connection and the overlay's schema version; `None` when there is no
/// overlay yet, or when it is still being created by another process (no schema table yet).
///
/// # Errors
/// Corruption, a newer schema, locks held past the busy timeout.
pub fn open_user_for_reading(path: &Path) -> Result<Option<(Connection, i64)>, KbError> {
    if !path.exists() {
        return Ok(None);
    }
    let sql = |e| KbError::sql(path, e);
    let conn = Connection::open_with_flags(
        path,
        rusqlite::OpenFlags::SQLITE_OPEN_READ_ONLY | rusqlite::OpenFlags::SQLITE_OPEN_NO_MUTEX,
    )
    .map_err(sql)?;
    conn.busy_timeout(busy_timeout()).map_err(sql)?;
    match schema_version(&conn, path)? {
        None => Ok(None),
        Some(v) if v > SCHEMA_VERSION => Err(KbError::NewerSchema {
            path: path.to_path_buf(),
            found: v,
            supported: SCHEMA_VERSION,
        }),
        Some(v) => Ok(Some((conn, v))),
    }
}

/// One property value supplied by the user.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct NewProperty {
    /// Property name (see [`crate::property::KNOWN_PROPERTIES`]).
    pub property: String,
    /// Value in the canonical unit.
    pub value: f64,
    /// Canonical unit.
    pub unit: String,
    /// Qualifiers such as `type=acidic`.
    pub detail: String,
}

/// A compound supplied by the user.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct NewCompound {
    /// Preferred name.
    pub name: String,
    /// Further names.
    pub synonyms: Vec<String>,
    /// Structure, if known.
    pub smiles: Option<String>,
    /// CAS number (checked).
    pub cas: Option<String>,
    /// InChIKey (checked).
    pub inchikey: Option<String>,
    /// Property values.
    pub properties: Vec<NewProperty>,
    /// Where the values come from (a lab notebook, a paper): required.
    pub source: String,
    /// Whether the values were measured (`experimental`) or computed (`estimated`).
    pub kind: PropertyKind,
}

/// Parse a property given as `name=value[unit][;key=value...]`, e.g. `boiling_point=78.4C`,
/// `logp=0.91`, `pka=4.76;type=acidic`. Units are converted to the canonical unit
/// (°C → K for temperatures; Pa, kPa, mmHg, bar for pressure).
///
/// # Errors
/// [`KbError::BadInput`] naming the text and what is wrong.
pub fn parse_property(text: &str) -> Result<NewProperty, KbError> {
    let bad = |why: &str| KbError::BadInput(format!("property `{text}`: {why}"));
    let (head, detail) = match text.split_once(';') {
        Some((h, d)) => (h, d.trim().to_string()),
        None => (text, String::new()),
    };
    let (name, value) = head
        .split_once('=')
        .ok_or_else(|| bad("expected name=value, e.g. logp=2.1"))?;
    let name = name.trim().to_ascii_lowercase();
    let unit_expected = canonical_unit(&name).ok_or_else(|| {
        bad(&format!(
            "unknown property `{name}`; known: {}",
            known_list()
        ))
    })?;
    let value = value.trim();
    let split = value
        .char_indices()
        .find(|(i, c)| {
            !(c.is_ascii_digit()
                || *c == '.'
                || *c == 'e'
                || *c == 'E'
                || ((*c == '-' || *c == '+') && (*i == 0 || value[..*i].ends_with(['e', 'E']))))
        })
        .map_or(value.len(), |(i, _)| i);
    let (num, unit) = value.split_at(split);
    let v: f64 = num
        .parse()
        .map_err(|_| bad(&format!("`{value}` does not start with a number")))?;
    if !v.is_finite() {
        return Err(bad("value is not finite"));
    }
    let unit = unit.trim();
    let v = convert(v, unit, unit_expected).ok_or_else(|| {
        bad(&format!(
            "unit `{unit}` cannot be converted to `{unit_expected}` for {name}"
        ))
    })?;
    check_range(&name, v).map_err(|why| bad(&why))?;
    if !detail.is_empty() && !detail.split(';').all(|kv| kv.contains('=')) {
        return Err(bad("qualifiers after `;` must be key=value"));
    }
    if name == "pka"
        && let Some(t) = detail.split(';').find_map(|kv| kv.strip_prefix("type="))
        && !["acidic", "basic"].contains(&t)
    {
        return Err(bad("pKa type must be acidic or basic"));
    }
    Ok(NewProperty {
        property: name,
        value: v,
        unit: unit_expected.to_string(),
        detail,
    })
}

fn known_list() -> String {
    crate::property::KNOWN_PROPERTIES
        .iter()
        .map(|(p, _, _)| *p)
        .collect::<Vec<_>>()
        .join(", ")
}

fn convert(v: f64, unit: &str, expected: &str) -> Option<f64> {
    let u = unit.trim_start_matches('°');
    match (expected, u) {
        // no unit given: the value is taken to be in the canonical unit
        (_, "") => Some(v),
        ("K", "K") => Some(v),
        ("K", "C") => Some(v + 273.15),
        ("kPa", "kPa") => Some(v),
        ("kPa", "Pa") => Some(v / 1000.0),
        ("kPa", "mmHg") | ("kPa", "Torr") => Some(v * 0.133_322),
        ("kPa", "bar") => Some(v * 100.0),
        ("g/mol", "g/mol") => Some(v),
        (e, u) if e == u => Some(v),
        _ => None,
    }
}

/// Plausible ranges; values outside are almost always a unit mistake.
fn check_range(name: &str, v: f64) -> Result<(), String> {
    let (lo, hi) = match name {
        "logp" => (-15.0, 20.0),
        "pka" => (-15.0, 30.0),
        "boiling_point" => (4.0, 1500.0),
        "vapour_pressure" => (0.0, 1.0e5),
        "molar_mass" => (1.0, 1.0e5),
        "charge" => (-10.0, 10.0),
        _ => (f64::MIN, f64::MAX),
    };
    if v < lo || v > hi {
        Err(format!("{v} is outside the plausible range {lo} to {hi}"))
    } else {
        Ok(())
    }
}

/// Result of an import.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct ImportReport {
    /// Compounds written.
    pub imported: usize,
    /// Rows skipped (only with skip-bad), each with its line number and reason.
    pub skipped: Vec<SkippedRow>,
}

/// A row left out of an import.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SkippedRow {
    /// 1-based line number in the file.
    pub line: usize,
    /// What was wrong.
    pub reason: String,
}

impl Kb {
    /// The user overlay for writing, opened (and created) on demand.
    pub(crate) fn user_mut(&mut self) -> Result<&mut Connection, KbError> {
        if self.user.is_none() || !self.user_writable {
            // drop a read-only connection first, then open for writing (WAL, migrated)
            self.user = None;
            self.user = Some(open_user(&self.user_path)?);
            self.user_writable = true;
            self.user_version = SCHEMA_VERSION;
        }
        self.user.as_mut().ok_or_else(|| KbError::Missing {
            path: self.user_path.clone(),
        })
    }

    /// Add (or replace) one compound in the user overlay.
    ///
    /// # Errors
    /// Bad identifiers, a bad SMILES string, database failures.
    pub fn add_compound(&mut self, c: &NewCompound) -> Result<(), KbError> {
        let c = self.complete(c)?;
        let estimates = !self.shipped_has_structure(&c)?;
        let path = self.user_path.clone();
        let conn = self.user_mut()?;
        // IMMEDIATE takes the write lock up front, so a second writer waits (busy timeout)
        // instead of failing when it tries to upgrade a read transaction.
        let tx = conn
            .transaction_with_behavior(rusqlite::TransactionBehavior::Immediate)
            .map_err(|e| KbError::sql(&path, e))?;
        insert_compound(&tx, &c, estimates).map_err(|e| KbError::sql(&path, e))?;
        tx.commit().map_err(|e| KbError::sql(&path, e))
    }

    /// Whether the shipped base already holds this compound with the same structure, so that
    /// its structure estimates are already there and must not be stored again in the overlay.
    fn shipped_has_structure(&self, c: &NewCompound) -> Result<bool, KbError> {
        let Some(key) = &c.inchikey else {
            return Ok(false);
        };
        let hit = super::resolve::find_row(
            &self.shipped,
            &super::identifier::Query::InchiKey(key.clone()),
        )
        .map_err(|e| KbError::sql(&self.shipped_path, e))?;
        Ok(match hit {
            Some(((_, shipped_smiles), _)) => match (&c.smiles, &shipped_smiles) {
                (None, _) => true,
                (Some(a), Some(b)) => a == b,
                (Some(_), None) => false,
            },
            None => false,
        })
    }

    /// Validate identifiers and fill in the InChIKey from the shipped base when the name,
    /// CAS or SMILES identifies a shipped compound (so the user's values attach to it).
    fn complete(&self, c: &NewCompound) -> Result<NewCompound, KbError> {
        let mut c = c.clone();
        if c.name.trim().is_empty() {
            return Err(KbError::BadInput("a compound needs a name".into()));
        }
        if c.source.trim().is_empty() {
            return Err(KbError::BadInput(format!(
                "compound `{}`: say where the values come from (source)",
                c.name
            )));
        }
        if let Some(cas) = &c.cas {
            c.cas = Some(parse_cas(cas)?);
        }
        if let Some(k) = &c.inchikey {
            c.inchikey = Some(parse_inchikey(k)?);
        }
        if let Some(s) = &c.smiles {
            crate::structure::check_smiles(s)
                .map_err(|why| KbError::BadInput(format!("SMILES `{s}` of `{}`: {why}", c.name)))?;
        }
        if c.inchikey.is_none() {
            let mut queries = vec![super::identifier::Query::Name(c.name.clone())];
            if let Some(cas) = &c.cas {
                queries.insert(0, super::identifier::Query::Cas(cas.clone()));
            }
            if let Some(s) = &c.smiles {
                queries.push(super::identifier::Query::Smiles(s.clone()));
            }
            for q in queries {
                if let Some((row, _)) = super::resolve::find_row(&self.shipped, &q)
                    .map_err(|e| KbError::sql(&self.shipped_path, e))?
                {
                    c.inchikey = row.0;
                    if c.smiles.is_none() {
                        c.smiles = row.1;
                    }
                    break;
                }
            }
        }
        Ok(c)
    }

    /// Import compounds from a CSV or TSV file (see [`parse_import`] for the format). The
    /// import is all-or-nothing unless `skip_bad` is set, in which case bad rows are left
    /// out and listed.
    ///
    /// # Errors
    /// The first bad row (line and column) when `skip_bad` is off; database failures.
    pub fn import(
        &mut self,
        text: &str,
        default_source: Option<&str>,
        skip_bad: bool,
    ) -> Result<ImportReport, KbError> {
        let rows = parse_import(text, default_source)?;
        let mut good = Vec::new();
        let mut report = ImportReport::default();
        for (line, row) in rows {
            match row.and_then(|c| {
                let c = self.complete(&c)?;
                let estimates = !self.shipped_has_structure(&c)?;
                Ok((c, estimates))
            }) {
                Ok(c) => good.push(c),
                Err(e) if skip_bad => report.skipped.push(SkippedRow {
                    line,
                    reason: e.to_string(),
                }),
                Err(e) => return Err(KbError::BadInput(format!("line {line}: {e}"))),
            }
        }
        let path = self.user_path.clone();
        let conn = self.user_mut()?;
        // IMMEDIATE takes the write lock up front, so a second writer waits (busy timeout)
        // instead of failing when it tries to upgrade a read transaction.
        let tx = conn
            .transaction_with_behavior(rusqlite::TransactionBehavior::Immediate)
            .map_err(|e| KbError::sql(&path, e))?;
        // Rows of one compound (same InChIKey, or same name without one) are merged: each
        // row adds its values with its own kind and source (this is how `kb export` writes a
        // compound whose values come from several sources). A compound already in the overlay
        // before the import is replaced by the file's rows, as a single `kb add` would.
        let mut written: Vec<(String, i64)> = Vec::new();
        for (c, estimates) in &good {
            let key = compound_key(c);
            match written.iter().find(|(k, _)| *k == key) {
                Some((_, id)) => {
                    append_to_compound(&tx, *id, c).map_err(|e| KbError::sql(&path, e))?
                }
                None => {
                    let id =
                        insert_compound(&tx, c, *estimates).map_err(|e| KbError::sql(&path, e))?;
                    written.push((key, id));
                }
            }
        }
        tx.commit().map_err(|e| KbError::sql(&path, e))?;
        report.imported = written.len();
        Ok(report)
    }

    /// Export the user overlay in the import format (TSV), so that it can be re-imported.
    ///
    /// Only what the user supplied is written: one row per compound and (kind, source) group
    /// of its values, so that every value keeps its own provenance. phasewise's structure
    /// estimates are left out (`kb import` recomputes them from the SMILES). Values are
    /// written with 12 significant digits, which removes binary noise from unit conversions
    /// (e.g. `351.55`, not `351.54999999999995`) and is far below any measurement's precision.
    ///
    /// # Errors
    /// Database failures.
    pub fn export_user(&self) -> Result<String, KbError> {
        let mut out =
            String::from("name\tsmiles\tcas\tinchikey\tsynonyms\tkind\tsource\tproperties\n");
        let Some(conn) = &self.user else {
            return Ok(out);
        };
        let p = &self.user_path;
        let mut st = conn
            .prepare("SELECT id, preferred_name, smiles, cas, inchikey FROM compound ORDER BY id")
            .map_err(|e| KbError::sql(p, e))?;
        type Row = (i64, String, Option<String>, Option<String>, Option<String>);
        let rows: Vec<Row> = st
            .query_map([], |r| {
                Ok((r.get(0)?, r.get(1)?, r.get(2)?, r.get(3)?, r.get(4)?))
            })
            .map_err(|e| KbError::sql(p, e))?
            .collect::<Result<_, _>>()
            .map_err(|e| KbError::sql(p, e))?;
        type Prop = (String, f64, String, String, String, String);
        for (id, name, smiles, cas, key) in rows {
            let syn: Vec<String> = conn
                .prepare("SELECT name FROM name WHERE compound_id = ?1 AND rank > 0 ORDER BY id")
                .and_then(|mut s| s.query_map([id], |r| r.get(0))?.collect())
                .map_err(|e| KbError::sql(p, e))?;
            let props: Vec<Prop> = conn
                .prepare("SELECT property, value, detail, kind, source, licence FROM property WHERE compound_id = ?1 ORDER BY id")
                .and_then(|mut s| s.query_map([id], |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?, r.get(3)?, r.get(4)?, r.get(5)?)))?.collect())
                .map_err(|e| KbError::sql(p, e))?;
            // (kind, source) groups in the order their first value was stored
            let mut groups: Vec<((String, String), Vec<String>)> = Vec::new();
            for (n, v, d, k, src, licence) in &props {
                let kind = PropertyKind::parse(k).unwrap_or(PropertyKind::Estimated);
                if super::resolve::is_computed(kind, licence) {
                    continue;
                }
                let item = if d.is_empty() {
                    format!("{n}={}", export_number(*v))
                } else {
                    format!("{n}={};{d}", export_number(*v))
                };
                let g = (k.clone(), src.clone());
                match groups.iter_mut().find(|(gk, _)| *gk == g) {
                    Some((_, items)) => items.push(item),
                    None => groups.push((g, vec![item])),
                }
            }
            if groups.is_empty() {
                // a compound with no values of its own (a structure or a name only); `user`
                // keeps the row importable, which needs a source
                groups.push((("experimental".into(), "user".into()), Vec::new()));
            }
            for ((kind, source), items) in groups {
                out.push_str(&format!(
                    "{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\n",
                    clean(&name),
                    clean(smiles.as_deref().unwrap_or("")),
                    clean(cas.as_deref().unwrap_or("")),
                    clean(key.as_deref().unwrap_or("")),
                    syn.iter().map(|s| clean(s)).collect::<Vec<_>>().join("|"),
                    kind,
                    clean(&source),
                    items
                        .iter()
                        .map(|i| clean(i).replace(' ', ""))
                        .collect::<Vec<_>>()
                        .join(" ")
                ));
            }
        }
        Ok(out)
    }
}

/// A value with 12 significant digits, trailing zeros removed, in a form `parse_property`
/// reads back.
fn export_number(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let s = format!("{v:.11e}");
    let (mant, exp) = s.split_once('e').unwrap_or((&s, "0"));
    let mant = if mant.contains('.') {
        mant.trim_end_matches('0').trim_end_matches('.')
    } else {
        mant
    };
    let e: i32 = exp.parse().unwrap_or(0);
    let text = format!("{mant}e{e}");
    // plain decimal when it is as short and exact: 351.55 rather than 3.5155e2
    match text.parse::<f64>() {
        Ok(x) if (-6..=15).contains(&e) => {
            let plain = format!("{x}");
            if plain.parse::<f64>().ok() == Some(x) {
                plain
            } else {
                text
            }
        }
        _ => text,
    }
}

/// The key that identifies a compound across rows of one import file.
fn compound_key(c: &NewCompound) -> String {
    match &c.inchikey {
        Some(k) => format!("key:{k}"),
        None => format!("name:{}", normalise_name(&c.name)),
    }
}

/// Tabs and newlines cannot survive a TSV cell.
fn clean(s: &str) -> String {
    s.replace(['\t', '\n', '\r'], " ")
}

/// Write one compound (replacing an earlier user record of it) and return its row id.
/// `estimates`: also store phasewise's structure estimates (only for compounds the shipped
/// base does not already hold with this structure). The formula and molar mass are computed
/// from the SMILES when there is one.
pub(crate) fn insert_compound(
    tx: &rusqlite::Transaction<'_>,
    c: &NewCompound,
    estimates: bool,
) -> rusqlite::Result<i64> {
    // Replace an earlier user record of the same compound (same InChIKey or same name).
    let norm = normalise_name(&c.name);
    let old: Vec<i64> = {
        let mut st = tx.prepare(
            "SELECT id FROM compound WHERE (inchikey IS NOT NULL AND inchikey = ?1)
             OR id IN (SELECT compound_id FROM name WHERE norm = ?2 AND rank = 0)",
        )?;
        st.query_map(params![c.inchikey, norm], |r| r.get(0))?
            .collect::<Result<_, _>>()?
    };
    // The user's earlier values survive a new `kb add` for the same compound: only a value of
    // the same property from the same source is replaced (a correction); earlier names stay as
    // synonyms. (Before, the whole earlier record was replaced and its values lost.)
    type KeptRow = (String, f64, Option<String>, String, String, Option<String>);
    let mut kept_values: Vec<KeptRow> = Vec::new();
    let mut kept_names: Vec<String> = Vec::new();
    for &id in &old {
        let rows: Vec<KeptRow> = tx
            .prepare(
                "SELECT property, value, unit, kind, source, detail FROM property
                 WHERE compound_id = ?1 AND licence = 'user data' ORDER BY id",
            )?
            .query_map([id], |r| {
                Ok((
                    r.get(0)?,
                    r.get(1)?,
                    r.get(2)?,
                    r.get(3)?,
                    r.get(4)?,
                    r.get(5)?,
                ))
            })?
            .collect::<Result<_, _>>()?;
        kept_values.extend(rows.into_iter().filter(|(prop, _, _, _, source, _)| {
            !(source == &c.source && c.properties.iter().any(|p| &p.property == prop))
        }));
        let names: Vec<String> = tx
            .prepare("SELECT name FROM name WHERE compound_id = ?1 ORDER BY rank, id")?
            .query_map([id], |r| r.get(0))?
            .collect::<Result<_, _>>()?;
        kept_names.extend(names);
    }
    for id in old {
        let names: Vec<(i64, String)> = tx
            .prepare("SELECT id, norm FROM name WHERE compound_id = ?1")?
            .query_map([id], |r| Ok((r.get(0)?, r.get(1)?)))?
            .collect::<Result<_, _>>()?;
        for (n, norm) in names {
            tx.execute(
                "DELETE FROM name_trigram WHERE rowid = ?1",
                [super::resolve::trigram_rowid(
                    n,
                    &super::resolve::trigram_text(&norm),
                )],
            )?;
        }
        tx.execute("DELETE FROM property WHERE compound_id = ?1", [id])?;
        tx.execute("DELETE FROM name WHERE compound_id = ?1", [id])?;
        tx.execute("DELETE FROM compound WHERE id = ?1", [id])?;
    }
    let est = c
        .smiles
        .as_deref()
        .and_then(|s| crate::property::estimate::estimate(s).ok());
    let formula = est
        .as_ref()
        .map(|e| e.descriptors.molecular_formula.clone());
    let molar_mass = est.as_ref().and_then(|e| e.descriptors.molar_mass_g_mol);
    tx.execute(
        "INSERT INTO compound(inchikey, preferred_name, smiles, formula, molar_mass_g_mol, cid, cas, origin)
         VALUES (?1, ?2, ?3, ?4, ?5, NULL, ?6, 'user')",
        params![c.inchikey, c.name, c.smiles, formula, molar_mass, c.cas],
    )?;
    let id = tx.last_insert_rowid();
    insert_names(tx, id, c, true)?;
    if estimates && let Some(e) = &est {
        let mut ins = tx.prepare(
            "INSERT INTO property(compound_id, property, value, unit, kind, source, licence, detail)
             VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8)",
        )?;
        super::build::insert_values(&mut ins, id, &e.values())?;
    }
    insert_user_values(tx, id, c)?;
    if !kept_names.is_empty() {
        let earlier = NewCompound {
            synonyms: kept_names,
            ..c.clone()
        };
        insert_names(tx, id, &earlier, false)?;
    }
    for (property, value, unit, kind, source, detail) in kept_values {
        tx.execute(
            "INSERT INTO property(compound_id, property, value, unit, kind, source, licence, detail)
             VALUES (?1, ?2, ?3, ?4, ?5, ?6, 'user data', ?7)",
            params![id, property, value, unit, kind, source, detail],
        )?;
    }
    Ok(id)
}

/// Add a further row of an already written compound (same import file): its names not yet
/// present and its values with the row's own kind and source.
fn append_to_compound(
    tx: &rusqlite::Transaction<'_>,
    id: i64,
    c: &NewCompound,
) -> rusqlite::Result<()> {
    insert_names(tx, id, c, false)?;
    insert_user_values(tx, id, c)
}

fn insert_user_values(
    tx: &rusqlite::Transaction<'_>,
    id: i64,
    c: &NewCompound,
) -> rusqlite::Result<()> {
    for p in &c.properties {
        tx.execute(
            "INSERT INTO property(compound_id, property, value, unit, kind, source, licence, detail)
             VALUES (?1, ?2, ?3, ?4, ?5, ?6, 'user data', ?7)",
            params![id, p.property, p.value, p.unit, c.kind.as_str(), c.source, p.detail],
        )?;
    }
    Ok(())
}

/// Names of a compound; `first` makes the row's name the preferred one (rank 0), otherwise
/// every new name is a synonym. Names already stored for the compound are skipped.
fn insert_names(
    tx: &rusqlite::Transaction<'_>,
    id: i64,
    c: &NewCompound,
    first: bool,
) -> rusqlite::Result<()> {
    let mut seen: Vec<String> = tx
        .prepare("SELECT norm FROM name WHERE compound_id = ?1")?
        .query_map([id], |r| r.get(0))?
        .collect::<Result<_, _>>()?;
    for (j, n) in std::iter::once(&c.name)
        .chain(c.synonyms.iter())
        .enumerate()
    {
        let norm = normalise_name(n);
        if norm.is_empty() || seen.contains(&norm) {
            continue;
        }
        tx.execute(
            "INSERT INTO name(compound_id, name, norm, rank) VALUES (?1, ?2, ?3, ?4)",
            params![id, n, norm, if j == 0 && first { 0 } else { 1 }],
        )?;
        let nid = tx.last_insert_rowid();
        if norm.len() >= 2 {
            tx.execute(
                "INSERT INTO name_trigram(rowid, norm) VALUES (?1, ?2)",
                params![
                    super::resolve::trigram_rowid(nid, &super::resolve::trigram_text(&norm)),
                    super::resolve::trigram_text(&norm)
                ],
            )?;
        }
        seen.push(norm);
    }
    Ok(())
}

/// Parse an import file: CSV or TSV (by the header's delimiter), UTF-8, a header row. Columns
/// (case-insensitive): `name` (required), `smiles`, `cas`, `inchikey`, `synonyms` (`|`
/// separated), `kind` (`experimental`, the default, or `estimated`), `source` (required per
/// row unless given for the whole file), `properties` (space-separated `name=value[unit]`
/// items as for `kb add --prop`), and any known property name as its own column (e.g.
/// `logp`, `boiling_point`, `pka`; a unit may be appended to the header in brackets, e.g.
/// `boiling_point[C]`). Lines starting with `#` and blank lines are ignored.
///
/// Returns each data row with its 1-based line number, parsed or with its error.
///
/// # Errors
/// A missing header or `name` column.
#[allow(clippy::type_complexity)]
pub fn parse_import(
    text: &str,
    default_source: Option<&str>,
) -> Result<Vec<(usize, Result<NewCompound, KbError>)>, KbError> {
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim_end_matches('\r')))
        .filter(|(_, l)| !l.trim().is_empty() && !l.starts_with('#'));
    let (_, header) = lines
        .next()
        .ok_or_else(|| KbError::BadInput("import file is empty: expected a header row".into()))?;
    let delim = if header.contains('\t') { '\t' } else { ',' };
    let cols: Vec<String> = split_row(header, delim)
        .iter()
        // names are case-insensitive; a unit in brackets keeps its case (`[C]`, `[kPa]`)
        .map(|c| match c.trim().split_once('[') {
            Some((b, u)) => format!("{}[{u}", b.trim().to_ascii_lowercase()),
            None => c.trim().to_ascii_lowercase(),
        })
        .collect();
    let idx = |n: &str| cols.iter().position(|c| c == n);
    let name_col = idx("name").ok_or_else(|| {
        KbError::BadInput(format!(
            "import header has no `name` column (found: {})",
            cols.join(", ")
        ))
    })?;
    let mut out = Vec::new();
    for (line, l) in lines {
        let cells = split_row(l, delim);
        let get = |i: Option<usize>| {
            i.and_then(|i| cells.get(i))
                .map(|s| s.trim().to_string())
                .filter(|s| !s.is_empty())
        };
        let row = (|| -> Result<NewCompound, KbError> {
            if cells.len() > cols.len() {
                return Err(KbError::BadInput(format!(
                    "{} cells but the header has {} columns",
                    cells.len(),
                    cols.len()
                )));
            }
            let name = get(Some(name_col)).ok_or_else(|| {
                KbError::BadInput(format!("column {} (`name`) is empty", name_col + 1))
            })?;
            let kind = match get(idx("kind")).as_deref() {
                None | Some("experimental") => PropertyKind::Experimental,
                Some("estimated") => PropertyKind::Estimated,
                Some(k) => {
                    return Err(KbError::BadInput(format!(
                        "column {} (`kind`): `{k}` is neither experimental nor estimated",
                        idx("kind").map_or(0, |i| i + 1)
                    )));
                }
            };
            let mut properties = Vec::new();
            if let Some(list) = get(idx("properties")) {
                for item in list.split_whitespace() {
                    properties.push(parse_property(item).map_err(|e| {
                        KbError::BadInput(format!(
                            "column {} (`properties`): {e}",
                            idx("properties").map_or(0, |i| i + 1)
                        ))
                    })?);
                }
            }
            for (i, c) in cols.iter().enumerate() {
                let (base, unit) = match c.split_once('[') {
                    Some((b, u)) => (b.trim(), u.trim_end_matches(']').trim()),
                    None => (c.as_str(), ""),
                };
                if canonical_unit(base).is_none() {
                    continue;
                }
                if let Some(v) = get(Some(i)) {
                    let detail = if base == "pka" {
                        get(idx("pka_type"))
                            .map(|t| format!(";type={t}"))
                            .unwrap_or_default()
                    } else {
                        String::new()
                    };
                    properties.push(
                        parse_property(&format!("{base}={v}{unit}{detail}")).map_err(|e| {
                            KbError::BadInput(format!("column {} (`{c}`): {e}", i + 1))
                        })?,
                    );
                }
            }
            let source = get(idx("source"))
                .or_else(|| default_source.map(str::to_string))
                .ok_or_else(|| {
                    KbError::BadInput("no `source` (give a source column or --source)".into())
                })?;
            Ok(NewCompound {
                name,
                synonyms: get(idx("synonyms"))
                    .map(|s| {
                        s.split('|')
                            .map(|x| x.trim().to_string())
                            .filter(|x| !x.is_empty())
                            .collect()
                    })
                    .unwrap_or_default(),
                smiles: get(idx("smiles")),
                cas: get(idx("cas")),
                inchikey: get(idx("inchikey")),
                properties,
                source,
                kind,
            })
        })();
        out.push((line, row));
    }
    Ok(out)
}

/// Split one row; in CSV, double quotes protect commas and `""` is a literal quote.
fn split_row(line: &str, delim: char) -> Vec<String> {
    if delim == '\t' {
        return line.split('\t').map(str::to_string).collect();
    }
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '"' if quoted && chars.peek() == Some(&'"') => {
                cur.push('"');
                chars.next();
            }
            '"' => quoted = !quoted,
            c if c == delim && !quoted => out.push(std::mem::take(&mut cur)),
            c => cur.push(c),
        }
    }
    out.push(cur);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn properties_parse_with_units_and_qualifiers() {
        let p = parse_property("boiling_point=78.4C").unwrap();
        assert!((p.value - 351.55).abs() < 1e-9 && p.unit == "K");
        let p = parse_property("pka=4.76;type=acidic").unwrap();
        assert_eq!((p.value, p.detail.as_str()), (4.76, "type=acidic"));
        let p = parse_property("logp=-0.31").unwrap();
        assert_eq!(p.value, -0.31);
        let p = parse_property("vapour_pressure=760mmHg").unwrap();
        assert!((p.value - 101.32).abs() < 0.01);
    }

    #[test]
    fn bad_properties_name_the_problem() {
        for (t, want) in [
            ("logp", "name=value"),
            ("colour=red", "unknown property"),
            ("logp=abc", "not start with a number"),
            ("boiling_point=78psi", "cannot be converted"),
            ("boiling_point=-400C", "plausible range"),
            ("pka=4;type=neutral", "acidic or basic"),
        ] {
            let e = parse_property(t).unwrap_err().to_string();
            assert!(e.contains(want) && e.contains(t), "{t}: {e}");
        }
    }

    #[test]
    fn import_rows_report_line_and_column() {
        let text = "name,logp,source\nfoo,1.2,lab book 7\nbar,x,lab book 7\n,1,lab\n";
        let rows = parse_import(text, None).unwrap();
        assert!(rows[0].1.is_ok());
        let e = rows[1].1.as_ref().unwrap_err().to_string();
        assert_eq!(rows[1].0, 3);
        assert!(e.contains("column 2") && e.contains("`x`"), "{e}");
        let e = rows[2].1.as_ref().unwrap_err().to_string();
        assert!(e.contains("column 1"), "{e}");
    }

    #[test]
    fn csv_quotes_protect_commas_and_quotes() {
        assert_eq!(
            split_row(r#""1,2-dichloroethane","say ""hi""",x"#, ','),
            vec!["1,2-dichloroethane", "say \"hi\"", "x"]
        );
    }

    proptest::proptest! {
        #[test]
        fn import_parser_never_panics(s in "\\PC{0,200}") {
            let _ = parse_import(&s, Some("x"));
        }

        #[test]
        fn property_parser_never_panics(s in "\\PC{0,40}") {
            let _ = parse_property(&s);
        }
    }
}
