//! The knowledge base: an SQLite database of compounds, their names and synonyms, and their
//! properties with provenance.
//!
//! Two files are involved. The *shipped* base is derived from the seed tables in `data/kb/`
//! (embedded in the binary) and can always be rebuilt; it is built on first use, in one
//! transaction into a temporary file that is renamed into place, so a crash never leaves a
//! half-built base. The *user overlay* holds lab-measured values and new compounds; it wins
//! over the shipped base and survives a rebuild. Both share one schema (`schema.sql`) with
//! forward migrations recorded in `schema_version`.

pub mod ambiguity;
pub mod build;
pub mod identifier;
pub mod ions;
pub mod normalise;
pub mod resolve;
pub mod retention;
pub mod standardise;
pub mod stats;
pub mod structure_match;
pub mod user;

use std::path::{Path, PathBuf};
use std::time::Duration;

use rusqlite::{Connection, OpenFlags};

/// The schema text, with `-- migration N` blocks.
pub const SCHEMA_SQL: &str = include_str!("schema.sql");

/// The newest schema version this build understands.
pub const SCHEMA_VERSION: i64 = 3;

/// Fingerprint of the embedded seed data (set by `build.rs`) and of the way it is turned
/// into a database: a base built by another version of either is stale and rebuilt.
pub const SEED_HASH: &str = concat!(env!("PHASEWISE_SEED_HASH"), "-build11");

/// How long a writer waits for another process's lock before giving up.
const BUSY_TIMEOUT_DEFAULT: Duration = Duration::from_secs(10);

/// The busy timeout: `PHASEWISE_BUSY_TIMEOUT_MS` when set (used by tests), else 10 s.
pub(crate) fn busy_timeout() -> Duration {
    std::env::var("PHASEWISE_BUSY_TIMEOUT_MS")
        .ok()
        .and_then(|v| v.parse().ok())
        .map_or(BUSY_TIMEOUT_DEFAULT, Duration::from_millis)
}

/// Errors of the knowledge base.
#[derive(Debug, thiserror::Error)]
pub enum KbError {
    /// A query looked like an identifier but is malformed.
    #[error("`{value}`: {why}")]
    BadIdentifier {
        /// The offending text.
        value: String,
        /// What is wrong.
        why: String,
    },
    /// The file is not an SQLite database or is damaged.
    #[error(
        "knowledge base {path} is damaged or not a phasewise database ({detail}); \
         rebuild it with `phasewise kb build --force` or point --kb elsewhere"
    )]
    Corrupt {
        /// File.
        path: PathBuf,
        /// SQLite's message.
        detail: String,
    },
    /// The file was written by a newer phasewise.
    #[error(
        "knowledge base {path} has schema version {found}, newer than this phasewise \
         understands ({supported}); upgrade phasewise or use another file"
    )]
    NewerSchema {
        /// File.
        path: PathBuf,
        /// Version in the file.
        found: i64,
        /// Newest version known here.
        supported: i64,
    },
    /// Another process holds a lock for longer than the busy timeout.
    #[error("knowledge base {path} is locked by another process; try again when it has finished")]
    Locked {
        /// File.
        path: PathBuf,
    },
    /// The shipped base has not been built and building was not allowed.
    #[error("knowledge base {path} does not exist; build it with `phasewise kb build`")]
    Missing {
        /// File.
        path: PathBuf,
    },
    /// A bad value in user input (add or import).
    #[error("{0}")]
    BadInput(String),
    /// File-system trouble.
    #[error("{path}: {source}")]
    Io {
        /// File.
        path: PathBuf,
        /// Cause.
        source: std::io::Error,
    },
    /// Any other SQLite failure.
    #[error("knowledge base {path}: {source}")]
    Sql {
        /// File.
        path: PathBuf,
        /// Cause.
        source: rusqlite::Error,
    },
}

impl KbError {
    /// Wrap an SQLite error, recognising corruption and locks.
    pub(crate) fn sql(path: &Path, e: rusqlite::Error) -> KbError {
        use rusqlite::ErrorCode;
        if let rusqlite::Error::SqliteFailure(f, ref msg) = e {
            match f.code {
                ErrorCode::NotADatabase | ErrorCode::DatabaseCorrupt => {
                    return KbError::Corrupt {
                        path: path.to_path_buf(),
                        detail: msg.clone().unwrap_or_else(|| f.to_string()),
                    };
                }
                ErrorCode::DatabaseBusy | ErrorCode::DatabaseLocked => {
                    return KbError::Locked {
                        path: path.to_path_buf(),
                    };
                }
                _ => {}
            }
        }
        KbError::Sql {
            path: path.to_path_buf(),
            source: e,
        }
    }
}

/// Where the knowledge-base files are.
#[derive(Debug, Clone)]
pub struct KbPaths {
    /// The shipped (derived) base.
    pub shipped: PathBuf,
    /// The user overlay.
    pub user: PathBuf,
}

impl KbPaths {
    /// The defaults: the platform's per-user data directory (e.g. `~/.local/share/phasewise`).
    ///
    /// # Errors
    /// [`KbError::BadInput`] when no home directory can be found.
    pub fn default_location() -> Result<KbPaths, KbError> {
        let dirs =
            directories::ProjectDirs::from("org", "phasewise", "phasewise").ok_or_else(|| {
                KbError::BadInput(
                    "no home directory found for the knowledge base; pass --kb and --user-kb"
                        .into(),
                )
            })?;
        let d = dirs.data_dir();
        Ok(KbPaths {
            shipped: d.join("kb.sqlite"),
            user: d.join("user.sqlite"),
        })
    }
}

/// An open knowledge base: the shipped base and, if it exists, the user overlay.
pub struct Kb {
    pub(crate) shipped: Connection,
    pub(crate) shipped_path: PathBuf,
    pub(crate) user: Option<Connection>,
    pub(crate) user_path: PathBuf,
    /// Whether `user` was opened for writing (WAL, migrated); a read-only opening is replaced
    /// by a writable one on the first write.
    pub(crate) user_writable: bool,
    /// Schema version of the overlay as found (older than [`SCHEMA_VERSION`] only when it was
    /// opened for reading).
    pub(crate) user_version: i64,
    /// Canonical keys of the overlay's structures, computed when first needed.
    pub(crate) user_keys: structure_match::OverlayKeys,
}

impl std::fmt::Debug for Kb {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Kb")
            .field("shipped", &self.shipped_path)
            .field("user", &self.user_path)
            .finish()
    }
}

/// How a command uses the user overlay.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Access {
    /// Read only (`lookup`, `advise`, `predict`, `plan`, `describe`, `kb stats`, `kb export`):
    /// the overlay is opened read-only, never created, switched to WAL or migrated, so a reader
    /// never waits behind a writer; an overlay of an older schema is read as it is.
    Read,
    /// Read and write (`kb add`, `kb import`, `scout --store`): the overlay is opened in WAL
    /// mode and migrated to the current schema.
    Write,
}

/// Whether a missing or stale shipped base may be built on open.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BuildPolicy {
    /// Build when missing or stale (the default for commands).
    IfNeeded,
    /// Never build; a missing base is an error and a stale one is used as it is.
    Never,
}

impl Kb {
    /// Open the knowledge base, building the shipped part first if needed.
    ///
    /// `progress` receives build progress (fraction 0–1 and a phase label); it is called only
    /// when a build happens.
    ///
    /// # Errors
    /// Any [`KbError`]: missing base under [`BuildPolicy::Never`], corruption, a newer schema,
    /// locks, or file-system trouble.
    pub fn open(
        paths: &KbPaths,
        policy: BuildPolicy,
        progress: &mut dyn FnMut(f64, &str),
    ) -> Result<Kb, KbError> {
        Kb::open_with(paths, policy, Access::Write, progress)
    }

    /// Open the knowledge base with the user overlay opened for `access` (see [`Access`]);
    /// otherwise as [`Kb::open`].
    ///
    /// # Errors
    /// As [`Kb::open`]; an overlay of a newer schema is an error for readers too.
    pub fn open_with(
        paths: &KbPaths,
        policy: BuildPolicy,
        access: Access,
        progress: &mut dyn FnMut(f64, &str),
    ) -> Result<Kb, KbError> {
        let needs_build = match build::shipped_status(&paths.shipped)? {
            build::Status::Current => false,
            build::Status::Missing => {
                if policy == BuildPolicy::Never {
                    return Err(KbError::Missing {
                        path: paths.shipped.clone(),
                    });
                }
                true
            }
            build::Status::Stale => policy == BuildPolicy::IfNeeded,
        };
        if needs_build {
            build::build_shipped(&paths.shipped, progress)?;
        }
        let shipped = open_read_only(&paths.shipped)?;
        check_schema(&shipped, &paths.shipped)?;
        let (user, user_version) = match access {
            Access::Write if paths.user.exists() => {
                (Some(user::open_user(&paths.user)?), SCHEMA_VERSION)
            }
            Access::Write => (None, SCHEMA_VERSION),
            Access::Read => match user::open_user_for_reading(&paths.user)? {
                Some((conn, version)) => (Some(conn), version),
                None => (None, SCHEMA_VERSION),
            },
        };
        Ok(Kb {
            shipped,
            shipped_path: paths.shipped.clone(),
            user_writable: access == Access::Write,
            user,
            user_path: paths.user.clone(),
            user_version,
            user_keys: structure_match::OverlayKeys::default(),
        })
    }

    /// A note for the user when the overlay was read as an older schema (nothing was changed;
    /// the next command that writes upgrades it); `None` otherwise.
    pub fn user_overlay_note(&self) -> Option<String> {
        (self.user.is_some() && self.user_version < SCHEMA_VERSION).then(|| {
            format!(
                "note: the user overlay {} has schema version {}, older than version {} of this program; it was read as it is and left unchanged (the next command that writes to it, such as `kb add`, `kb import` or `scout --store`, upgrades it)",
                self.user_path.display(),
                self.user_version,
                SCHEMA_VERSION
            )
        })
    }

    /// Path of the shipped base.
    pub fn shipped_path(&self) -> &Path {
        &self.shipped_path
    }

    /// Path of the user overlay (which may not exist yet).
    pub fn user_path(&self) -> &Path {
        &self.user_path
    }
}

impl Kb {
    /// Run `f` inside one read transaction of each open database, so that its many look-ups
    /// see one snapshot and take the file lock once instead of once per statement (a list of
    /// 1,000 names runs some 10,000 statements). A database already inside a transaction is
    /// left as it is.
    pub(crate) fn in_one_read<T>(
        &self,
        f: impl FnOnce() -> Result<T, KbError>,
    ) -> Result<T, KbError> {
        let begin = |c: &Connection| c.is_autocommit() && c.execute_batch("BEGIN").is_ok();
        let shipped = begin(&self.shipped);
        let user = self.user.as_ref().is_some_and(begin);
        let out = f();
        // ending a read transaction cannot lose data; a failure here leaves nothing undone
        if shipped {
            let _ = self.shipped.execute_batch("COMMIT");
        }
        if user && let Some(u) = &self.user {
            let _ = u.execute_batch("COMMIT");
        }
        out
    }
}

pub(crate) fn open_read_only(path: &Path) -> Result<Connection, KbError> {
    let conn = Connection::open_with_flags(
        path,
        OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX,
    )
    .map_err(|e| KbError::sql(path, e))?;
    conn.busy_timeout(busy_timeout())
        .map_err(|e| KbError::sql(path, e))?;
    // Memory-map the (read-only) base: look-ups touch pages all over the file, and mapped
    // reads avoid a system call per page.
    conn.query_row("PRAGMA mmap_size = 536870912", [], |_| Ok(()))
        .or_else(|e| match e {
            rusqlite::Error::QueryReturnedNoRows => Ok(()),
            e => Err(e),
        })
        .map_err(|e| KbError::sql(path, e))?;
    stable_plans(&conn, path)?;
    // every look-up statement of a resolution stays compiled (the default keeps 16)
    conn.set_prepared_statement_cache_capacity(64);
    Ok(conn)
}

/// Keep each cached statement's query plan when its parameters are rebound.
///
/// The bundled SQLite uses the `sqlite_stat4` samples that the build's `PRAGMA optimize`
/// writes; without this setting a statement whose plan could depend on a bound value is
/// compiled again on every new binding, which made resolving a list spend a fifth of its
/// time in the SQL parser (docs/performance.md, identity). The look-ups are equality
/// searches on indexed columns, whose plan does not depend on the value.
pub(crate) fn stable_plans(conn: &Connection, path: &Path) -> Result<(), KbError> {
    conn.set_db_config(
        rusqlite::config::DbConfig::SQLITE_DBCONFIG_ENABLE_QPSG,
        true,
    )
    .map(|_| ())
    .map_err(|e| KbError::sql(path, e))
}

/// Read the schema version, mapping "not a database" and "newer" to their errors.
pub(crate) fn schema_version(conn: &Connection, path: &Path) -> Result<Option<i64>, KbError> {
    let has_table: bool = conn
        .query_row(
            "SELECT count(*) FROM sqlite_master WHERE type='table' AND name='schema_version'",
            [],
            |r| r.get::<_, i64>(0),
        )
        .map_err(|e| KbError::sql(path, e))?
        > 0;
    if !has_table {
        return Ok(None);
    }
    let v: Option<i64> = conn
        .query_row("SELECT max(version) FROM schema_version", [], |r| r.get(0))
        .map_err(|e| KbError::sql(path, e))?;
    Ok(v)
}

fn check_schema(conn: &Connection, path: &Path) -> Result<(), KbError> {
    match schema_version(conn, path)? {
        Some(v) if v > SCHEMA_VERSION => Err(KbError::NewerSchema {
            path: path.to_path_buf(),
            found: v,
            supported: SCHEMA_VERSION,
        }),
        Some(_) => Ok(()),
        None => Err(KbError::Corrupt {
            path: path.to_path_buf(),
            detail: "no schema_version table".into(),
        }),
    }
}

/// Apply every migration newer than the file's version, each in its own transaction.
pub(crate) fn migrate(conn: &mut Connection, path: &Path) -> Result<(), KbError> {
    let current = schema_version(conn, path)?.unwrap_or(0);
    if current > SCHEMA_VERSION {
        return Err(KbError::NewerSchema {
            path: path.to_path_buf(),
            found: current,
            supported: SCHEMA_VERSION,
        });
    }
    for (version, sql) in migrations() {
        if version <= current {
            continue;
        }
        let tx = conn
            .transaction_with_behavior(rusqlite::TransactionBehavior::Immediate)
            .map_err(|e| KbError::sql(path, e))?;
        tx.execute_batch(sql).map_err(|e| KbError::sql(path, e))?;
        tx.execute("DELETE FROM schema_version", [])
            .map_err(|e| KbError::sql(path, e))?;
        tx.execute("INSERT INTO schema_version(version) VALUES (?1)", [version])
            .map_err(|e| KbError::sql(path, e))?;
        tx.commit().map_err(|e| KbError::sql(path, e))?;
    }
    Ok(())
}

/// The numbered migration blocks of [`SCHEMA_SQL`].
fn migrations() -> Vec<(i64, &'static str)> {
    let mut out = Vec::new();
    let mut rest = SCHEMA_SQL;
    while let Some(start) = rest.find("-- migration ") {
        let after = &rest[start + "-- migration ".len()..];
        let (num, body) = after.split_once('\n').unwrap_or((after, ""));
        let end = body.find("-- migration ").unwrap_or(body.len());
        if let Ok(n) = num.trim().parse::<i64>() {
            out.push((n, &body[..end]));
        }
        rest = &body[end..];
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn schema_has_one_block_per_version_up_to_the_current_one() {
        let m = migrations();
        let versions: Vec<i64> = m.iter().map(|(v, _)| *v).collect();
        assert_eq!(versions, (1..=SCHEMA_VERSION).collect::<Vec<_>>());
    }

    #[test]
    fn migrating_an_empty_file_reaches_the_current_version() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("x.sqlite");
        let mut c = Connection::open(&p).unwrap();
        migrate(&mut c, &p).unwrap();
        assert_eq!(schema_version(&c, &p).unwrap(), Some(SCHEMA_VERSION));
        // idempotent
        migrate(&mut c, &p).unwrap();
        assert_eq!(schema_version(&c, &p).unwrap(), Some(SCHEMA_VERSION));
    }
}
