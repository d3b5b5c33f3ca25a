//! Building the shipped knowledge base from the embedded seed tables (`data/kb/*.tsv.gz`,
//! produced by `tools/build_seed.py`).
//!
//! The build writes a temporary file beside the target, in one transaction, then renames it
//! into place: readers never see a half-built base, and a build killed half-way leaves the
//! previous base (or none) untouched.

use std::fs;
use std::io::Read;
use std::path::{Path, PathBuf};

use flate2::read::GzDecoder;
use rusqlite::{Connection, params};

use super::normalise::normalise_name;
use super::resolve::TRIGRAM_DF_SQL;
use super::structure_match::{KEY_INDEX_SQL, KEY_TABLE_SQL, is_parent};
use super::{KbError, SEED_HASH, migrate, open_read_only};
use crate::property::estimate::{EstimatedValue, estimate};
use crate::structure::canon::{StructureKey, key_of_graph, possible_stereo_elements};

/// The embedded compound table.
const COMPOUNDS_GZ: &[u8] = include_bytes!("../../data/kb/compounds.tsv.gz");
/// The embedded property table.
const PROPERTIES_GZ: &[u8] = include_bytes!("../../data/kb/properties.tsv.gz");

/// Longest normalised name put into the trigram index used for suggestions.
const MAX_TRIGRAM_NAME: usize = 60;

/// State of the shipped base on disk.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Status {
    /// Built from the seed data embedded in this binary.
    Current,
    /// Built from other seed data (an older or newer phasewise).
    Stale,
    /// No file.
    Missing,
}

/// Check whether the shipped base exists and matches this binary's seed data.
///
/// # Errors
/// Corrupt files and schema errors.
pub fn shipped_status(path: &Path) -> Result<Status, KbError> {
    if !path.exists() {
        return Ok(Status::Missing);
    }
    let conn = open_read_only(path)?;
    if super::schema_version(&conn, path)?.is_none() {
        return Err(KbError::Corrupt {
            path: path.to_path_buf(),
            detail: "no schema_version table".into(),
        });
    }
    let hash: Option<String> = conn
        .query_row("SELECT value FROM meta WHERE key = 'seed_hash'", [], |r| {
            r.get(0)
        })
        .ok();
    Ok(if hash.as_deref() == Some(SEED_HASH) {
        Status::Current
    } else {
        Status::Stale
    })
}

fn gunzip(bytes: &[u8], what: &str) -> Result<String, KbError> {
    let mut s = String::new();
    GzDecoder::new(bytes)
        .read_to_string(&mut s)
        .map_err(|e| KbError::BadInput(format!("embedded seed table {what} is unreadable: {e}")))?;
    Ok(s)
}

/// Counts reported after a build.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct BuildCounts {
    /// Compounds inserted.
    pub compounds: usize,
    /// Names and synonyms inserted.
    pub names: usize,
    /// Property rows inserted.
    pub properties: usize,
}

/// Build the shipped base at `path` (replacing any existing file atomically).
///
/// # Errors
/// File-system and SQLite failures; the target is untouched when this fails.
pub fn build_shipped(
    path: &Path,
    progress: &mut dyn FnMut(f64, &str),
) -> Result<BuildCounts, KbError> {
    let dir = path.parent().unwrap_or(Path::new("."));
    fs::create_dir_all(dir).map_err(|e| KbError::Io {
        path: dir.to_path_buf(),
        source: e,
    })?;
    let tmp: PathBuf = dir.join(format!(
        ".{}.building-{}",
        path.file_name()
            .and_then(|n| n.to_str())
            .unwrap_or("kb.sqlite"),
        std::process::id()
    ));
    let _ = fs::remove_file(&tmp);
    let result = build_into(&tmp, progress);
    match result {
        Ok(counts) => {
            fs::rename(&tmp, path).map_err(|e| KbError::Io {
                path: path.to_path_buf(),
                source: e,
            })?;
            progress(1.0, "done");
            Ok(counts)
        }
        Err(e) => {
            let _ = fs::remove_file(&tmp);
            Err(e)
        }
    }
}

fn build_into(tmp: &Path, progress: &mut dyn FnMut(f64, &str)) -> Result<BuildCounts, KbError> {
    let sql = |e| KbError::sql(tmp, e);
    let mut conn = Connection::open(tmp).map_err(sql)?;
    // A temporary file: durability comes from the final rename, not from the journal.
    conn.execute_batch(
        "PRAGMA journal_mode=OFF; PRAGMA synchronous=OFF; PRAGMA cache_size=-200000;",
    )
    .map_err(sql)?;
    migrate(&mut conn, tmp)?;
    conn.execute_batch(KEY_TABLE_SQL).map_err(sql)?;
    progress(0.02, "reading seed tables");
    let compounds = gunzip(COMPOUNDS_GZ, "compounds.tsv.gz")?;
    let properties = gunzip(PROPERTIES_GZ, "properties.tsv.gz")?;
    let total_lines = compounds.lines().count().max(1);
    progress(0.04, "estimating properties from structure");
    let estimates = estimate_all(&compounds);
    let mut counts = BuildCounts::default();
    let tx = conn.transaction().map_err(sql)?;
    {
        let mut ins_c = tx
            .prepare(
                "INSERT INTO compound(id, inchikey, preferred_name, smiles, formula, molar_mass_g_mol, cid, cas, origin)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9)",
            )
            .map_err(sql)?;
        let mut ins_n = tx
            .prepare(
                "INSERT INTO name(id, compound_id, name, norm, rank) VALUES (?1, ?2, ?3, ?4, ?5)",
            )
            .map_err(sql)?;
        let mut ins_t = tx
            .prepare("INSERT INTO name_trigram(rowid, norm) VALUES (?1, ?2)")
            .map_err(sql)?;
        let mut ins_p = tx
            .prepare(
                "INSERT INTO property(compound_id, property, value, unit, kind, source, licence, detail)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8)",
            )
            .map_err(sql)?;
        let mut ins_k = tx
            .prepare(
                "INSERT INTO structure_key(compound_id, skeleton, stereo, parent, stereo_elements, possible_stereo)
                 VALUES (?1, ?2, ?3, ?4, ?5, ?6)",
            )
            .map_err(sql)?;
        let mut name_id: i64 = 0;
        // FTS5 builds far faster when rowids arrive in increasing order: collect, sort, insert.
        let mut trigram_rows: Vec<(i64, String)> = Vec::new();
        for (i, line) in compounds.lines().enumerate().skip(1) {
            let f: Vec<&str> = line.split('\t').collect();
            if f.len() < 9 {
                return Err(KbError::BadInput(format!(
                    "embedded compounds.tsv.gz line {}: {} fields, expected 9",
                    i + 1,
                    f.len()
                )));
            }
            let id = i as i64;
            let cid: Option<i64> = f[1].parse().ok();
            let mw: Option<f64> = f[4].parse().ok();
            let opt = |s: &str| {
                if s.is_empty() {
                    None
                } else {
                    Some(s.to_string())
                }
            };
            ins_c
                .execute(params![
                    id,
                    f[0],
                    f[6],
                    opt(f[5]),
                    opt(f[3]),
                    mw,
                    cid,
                    opt(f[2]),
                    format!("shipped:{}", f[7])
                ])
                .map_err(sql)?;
            counts.compounds += 1;
            if let Some((values, key)) = estimates.get(i) {
                counts.properties += insert_values(&mut ins_p, id, values).map_err(sql)?;
                if let Some((key, parent, possible)) = key {
                    let elements = i64::try_from(key.stereo_elements).unwrap_or(i64::MAX);
                    let possible = i64::try_from(*possible).unwrap_or(i64::MAX);
                    ins_k
                        .execute(params![
                            id,
                            key.skeleton,
                            key.stereo,
                            i64::from(*parent),
                            elements,
                            possible
                        ])
                        .map_err(sql)?;
                }
            }
            let mut seen: Vec<String> = Vec::new();
            let names = std::iter::once(f[6]).chain(f[8].split('|'));
            for (j, n) in names.enumerate() {
                let norm = normalise_name(n);
                if norm.is_empty() || seen.contains(&norm) {
                    continue;
                }
                name_id += 1;
                // 0 preferred name, 1 IUPAC name (first of the synonyms), 2 other synonyms
                let rank = j.min(2) as i64;
                ins_n
                    .execute(params![name_id, id, n, norm, rank])
                    .map_err(sql)?;
                if norm.len() >= 2 && norm.len() <= MAX_TRIGRAM_NAME {
                    let text = super::resolve::trigram_text(&norm);
                    trigram_rows.push((super::resolve::trigram_rowid(name_id, &text), text));
                }
                // The stereo-free spelling as well (rank 3): a name whose stereo descriptor the
                // base does not hold still finds the compound, and says so (kb::resolve).
                let free = super::normalise::normalise_name_stereo_free(n);
                seen.push(norm);
                counts.names += 1;
                if !free.is_empty() && !seen.contains(&free) {
                    name_id += 1;
                    ins_n
                        .execute(params![name_id, id, n, free, 3i64])
                        .map_err(sql)?;
                    seen.push(free);
                }
            }
            if i % 2000 == 0 {
                progress(
                    0.05 + 0.75 * (i as f64 / total_lines as f64),
                    "compounds and names",
                );
            }
        }
        progress(0.8, "suggestion index");
        trigram_rows.sort_unstable();
        for (rowid, text) in &trigram_rows {
            ins_t.execute(params![rowid, text]).map_err(sql)?;
        }
        // document frequencies of the trigrams, read by every suggestion (the fts5vocab
        // table computes them by walking each posting list)
        tx.execute_batch(TRIGRAM_DF_SQL).map_err(sql)?;
        progress(0.88, "structure key index");
        tx.execute_batch(KEY_INDEX_SQL).map_err(sql)?;
        progress(0.9, "properties");
        let mut by_key = tx
            .prepare("SELECT id FROM compound WHERE inchikey = ?1")
            .map_err(sql)?;
        for (i, line) in properties.lines().enumerate().skip(1) {
            let f: Vec<&str> = line.split('\t').collect();
            if f.len() < 8 {
                return Err(KbError::BadInput(format!(
                    "embedded properties.tsv.gz line {}: {} fields, expected 8",
                    i + 1,
                    f.len()
                )));
            }
            let value: f64 = f[2].parse().map_err(|_| {
                KbError::BadInput(format!(
                    "embedded properties.tsv.gz line {}: value `{}`",
                    i + 1,
                    f[2]
                ))
            })?;
            let ids: Vec<i64> = by_key
                .query_map([f[0]], |r| r.get(0))
                .map_err(sql)?
                .collect::<Result<_, _>>()
                .map_err(sql)?;
            for id in ids {
                ins_p
                    .execute(params![id, f[1], value, f[3], f[4], f[5], f[6], f[7]])
                    .map_err(sql)?;
                counts.properties += 1;
            }
        }
        tx.execute(
            "INSERT INTO meta(key, value) VALUES ('seed_hash', ?1), ('built_by', ?2)",
            params![SEED_HASH, concat!("phasewise ", env!("CARGO_PKG_VERSION"))],
        )
        .map_err(sql)?;
    }
    progress(0.95, "committing");
    tx.commit().map_err(sql)?;
    conn.execute_batch("PRAGMA optimize;").map_err(sql)?;
    drop(conn);
    Ok(counts)
}

/// Structure-based estimates for every line of the compound table, with the canonical
/// structure key and whether the record is its parent form (index = line number; the
/// header and SMILES the engine cannot parse, such as exotic inorganics, get none), computed
/// on all cores: this is the CPU-heavy part of a build.
fn estimate_all(compounds: &str) -> Vec<Estimated> {
    let lines: Vec<&str> = compounds.lines().collect();
    let threads = std::thread::available_parallelism()
        .map_or(1, |n| n.get())
        .clamp(1, 8);
    let chunk = lines.len().div_ceil(threads).max(1);
    let mut out: Vec<Estimated> = Vec::with_capacity(lines.len());
    std::thread::scope(|scope| {
        let handles: Vec<_> = lines
            .chunks(chunk)
            .enumerate()
            .map(|(c, part)| {
                let n = part.len();
                let h = scope.spawn(move || {
                    part.iter()
                        .enumerate()
                        .map(|(j, line)| {
                            let smiles = line.split('\t').nth(5).unwrap_or("");
                            if c == 0 && j == 0 || smiles.is_empty() {
                                return (Vec::new(), None);
                            }
                            match estimate(smiles) {
                                Ok(e) => {
                                    let key = key_of_graph(&e.graph);
                                    let parent = is_parent(e.note.as_deref(), &key);
                                    // read by the standardisation only for a record without
                                    // stereo (kb::standardise)
                                    let possible = if key.stereo_elements == 0 {
                                        possible_stereo_elements(&e.graph)
                                    } else {
                                        0
                                    };
                                    (e.values(), Some((key, parent, possible)))
                                }
                                Err(_) => (Vec::new(), None),
                            }
                        })
                        .collect::<Vec<_>>()
                });
                (n, h)
            })
            .collect();
        for (n, h) in handles {
            // A worker can only fail by panicking, which the engine's fuzzing rules out; if
            // it happens, that chunk gets no estimates (keeping every index aligned).
            match h.join() {
                Ok(v) => out.extend(v),
                Err(_) => out.extend(std::iter::repeat_with(|| (Vec::new(), None)).take(n)),
            }
        }
    });
    out
}

/// Estimates of one compound, and its structure key with its parent flag and, when the key
/// has no stereo element, the number of possible stereo elements.
type Estimated = (Vec<EstimatedValue>, Option<(StructureKey, bool, usize)>);

/// Insert estimated rows of one compound. Returns the rows written.
pub(crate) fn insert_values(
    ins: &mut rusqlite::Statement<'_>,
    compound_id: i64,
    values: &[EstimatedValue],
) -> rusqlite::Result<usize> {
    for v in values {
        ins.execute(params![
            compound_id,
            v.property,
            v.value,
            v.unit,
            "estimated",
            v.method,
            crate::property::estimate::LICENCE_COMPUTED,
            v.detail
        ])?;
    }
    Ok(values.len())
}
