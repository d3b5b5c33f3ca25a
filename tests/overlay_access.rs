//! Read-only commands never write to the user overlay (issue 17, item 5): they open it
//! read-only, never migrate it or switch it to WAL, read an older overlay as it is (saying so),
//! and are not held up by a writer that has the overlay open in a transaction. Commands that
//! write still migrate. Control characters stored in names never reach the terminal raw.

mod common;

use common::{Ctx, stderr, stdout};

/// Adds a compound and turns the overlay into a real schema-2 overlay (the state before
/// migration 3: no `basis` and `buffer` columns), in rollback-journal mode.
fn make_schema_2_overlay(ctx: &Ctx) {
    let out = ctx.run(&[
        "kb",
        "add",
        "--name",
        "harbourside impurity Q (invented)",
        "--smiles",
        "CC(=O)Nc1ccc(O)c(Cl)c1",
        "--prop",
        "logp=1.4",
        "--source",
        "invented for a test",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    c.execute_batch(
        "ALTER TABLE retention_fit DROP COLUMN basis;
         ALTER TABLE retention_fit DROP COLUMN buffer;
         DELETE FROM schema_version; INSERT INTO schema_version(version) VALUES (2);",
    )
    .unwrap();
    let mode: String = c
        .query_row("PRAGMA journal_mode=DELETE", [], |r| r.get(0))
        .unwrap();
    assert_eq!(mode, "delete");
}

fn overlay_version(ctx: &Ctx) -> i64 {
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    c.query_row("SELECT max(version) FROM schema_version", [], |r| r.get(0))
        .unwrap()
}

#[test]
fn readers_leave_an_older_overlay_unchanged_and_say_so() {
    let ctx = Ctx::new();
    make_schema_2_overlay(&ctx);
    let before = std::fs::read(ctx.user_kb()).unwrap();
    for args in [
        &[
            "lookup",
            "harbourside impurity Q (invented)",
            "--format",
            "json",
        ][..],
        &["advise", "harbourside impurity Q (invented)", "caffeine"][..],
        &["kb", "stats"][..],
        &["kb", "export"][..],
    ] {
        let out = ctx.run(args);
        assert!(out.status.success(), "{args:?}: {}", stderr(&out));
        assert!(
            stderr(&out).contains("schema version 2") && stderr(&out).contains("left unchanged"),
            "{args:?}: {}",
            stderr(&out)
        );
        // not a byte changed, no WAL files created, still version 2
        assert_eq!(std::fs::read(ctx.user_kb()).unwrap(), before, "{args:?}");
        assert!(!ctx.dir.path().join("user.sqlite-wal").exists(), "{args:?}");
        assert_eq!(overlay_version(&ctx), 2);
    }
    // the user's compound and value were read from the old overlay
    let (json, code) = ctx.json(&[
        "lookup",
        "harbourside impurity Q (invented)",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0);
    assert!(json.to_string().contains("invented for a test"), "{json}");
    // a command that writes upgrades it
    let out = ctx.run(&[
        "kb",
        "add",
        "--name",
        "second compound (invented)",
        "--prop",
        "logp=2",
        "--source",
        "invented",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert_eq!(overlay_version(&ctx), 3);
    let out = ctx.run(&["lookup", "second compound (invented)"]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(!stderr(&out).contains("schema version"), "{}", stderr(&out));
}

#[test]
fn a_reader_is_not_held_up_by_a_writer_in_a_transaction() {
    let ctx = Ctx::new();
    let out = ctx.run(&[
        "kb",
        "add",
        "--name",
        "committed compound (invented)",
        "--prop",
        "logp=1",
        "--source",
        "invented",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    // a writer holds the (WAL) overlay in an open write transaction
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    c.execute_batch("BEGIN IMMEDIATE; INSERT INTO meta(key, value) VALUES ('x', 'y');")
        .unwrap();
    for args in [
        &["lookup", "committed compound (invented)"][..],
        &["advise", "caffeine", "theobromine"][..],
    ] {
        let out = ctx
            .cmd()
            .env("PHASEWISE_BUSY_TIMEOUT_MS", "300")
            .args(args)
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(0), "{args:?}: {}", stderr(&out));
    }
    // a writer, by contrast, waits and then says the overlay is locked
    let out = ctx
        .cmd()
        .env("PHASEWISE_BUSY_TIMEOUT_MS", "300")
        .args(["kb", "add", "--name", "blocked", "--source", "invented"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(3), "{}", stderr(&out));
    c.execute_batch("ROLLBACK;").unwrap();
}

#[test]
fn a_reader_meeting_an_overlay_still_being_created_reads_the_shipped_base() {
    let ctx = Ctx::new();
    // another process has just created the overlay and holds its first migration open
    let c = rusqlite::Connection::open(ctx.user_kb()).unwrap();
    let _: String = c
        .query_row("PRAGMA journal_mode=WAL", [], |r| r.get(0))
        .unwrap();
    c.execute_batch("BEGIN IMMEDIATE; CREATE TABLE schema_version (version INTEGER NOT NULL);")
        .unwrap();
    let out = ctx
        .cmd()
        .env("PHASEWISE_BUSY_TIMEOUT_MS", "300")
        .args(["lookup", "caffeine"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(stdout(&out).contains("caffeine"), "{}", stdout(&out));
    c.execute_batch("ROLLBACK;").unwrap();
}

#[test]
fn a_reader_creates_no_overlay() {
    let ctx = Ctx::new();
    for args in [
        &["lookup", "caffeine"][..],
        &["kb", "stats"][..],
        &["kb", "export"][..],
    ] {
        let out = ctx.run(args);
        assert!(out.status.success(), "{args:?}: {}", stderr(&out));
        assert!(!ctx.user_kb().exists(), "{args:?} created the overlay");
    }
}

#[test]
fn control_characters_in_stored_names_never_reach_the_terminal_raw() {
    let ctx = Ctx::new();
    let name = "red\u{1b}[31m alert\u{7} (invented)";
    let out = ctx.run(&[
        "kb",
        "add",
        "--name",
        name,
        "--smiles",
        "CCO",
        "--prop",
        "logp=0.1",
        "--source",
        "invented\u{1b}[0m",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let raw = |s: &str| s.chars().any(|c| c.is_control() && c != '\n' && c != '\t');
    assert!(!raw(&stderr(&out)), "kb add: {:?}", stderr(&out));
    assert!(stderr(&out).contains("\\u001b[31m"), "{:?}", stderr(&out));
    for args in [
        vec!["lookup", name],
        vec!["lookup", name, "--format", "csv"],
        vec!["lookup", name, "--format", "tsv"],
        vec!["lookup", name, "--format", "json"],
        vec!["kb", "export"],
        vec!["kb", "stats", "--format", "csv"],
        vec!["advise", name, "caffeine", "--format", "csv"],
        vec!["lookup", "no such\u{1b}[2J compound"],
    ] {
        let out = ctx.run(&args);
        assert!(!raw(&stdout(&out)), "{args:?}: {:?}", stdout(&out));
        assert!(!raw(&stderr(&out)), "{args:?}: {:?}", stderr(&out));
    }
    // JSON stays valid JSON with the same name, C1 controls (U+0080-U+009F, which the JSON
    // writer leaves raw) included
    let c1 = "mis\u{81}decoded \u{c2}\u{b9} name (invented)";
    let add = ctx.run(&[
        "kb", "add", "--name", c1, "--smiles", "CCCO", "--source", "invented",
    ]);
    assert!(add.status.success(), "{}", stderr(&add));
    for n in [name, c1] {
        let out = ctx.run(&["lookup", n, "--format", "json"]);
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap_or_else(|e| {
            panic!(
                "lookup {n:?} --format json is not JSON ({e}): {}",
                stdout(&out)
            )
        });
        assert_eq!(v["analytes"][0]["name"], n, "{v}");
    }
    // the name is still found and shown (escaped) where text is printed
    let out = ctx.run(&["lookup", name, "--format", "csv"]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(
        stdout(&out).contains("red\\u001b[31m alert"),
        "{}",
        stdout(&out)
    );
}
