//! Test harness: one shipped knowledge base built once per test binary (in cargo's target
//! temp directory) and a fresh user overlay per test.

#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::Output;
use std::sync::OnceLock;

use assert_cmd::Command;

/// Path of the shared shipped knowledge base, built on first call.
pub fn shipped_kb() -> &'static Path {
    static KB: OnceLock<PathBuf> = OnceLock::new();
    KB.get_or_init(|| {
        let dir = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("shared-kb");
        std::fs::create_dir_all(&dir).expect("create test kb dir");
        let kb = dir.join("kb.sqlite");
        let out = Command::cargo_bin("phasewise")
            .expect("binary")
            .args(["--kb"])
            .arg(&kb)
            .args(["kb", "build"])
            .output()
            .expect("run kb build");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(out.status.success(), "kb build failed: {err}");
        // Off a terminal a build reports progress in plain lines, never carriage returns.
        assert!(!err.contains('\r'), "{err}");
        if !err.contains("is current") {
            assert!(
                err.contains("building knowledge base: 100 % (done)"),
                "{err}"
            );
        }
        kb
    })
}

/// A test context: the shared shipped base and a private user overlay.
pub struct Ctx {
    pub dir: tempfile::TempDir,
}

impl Ctx {
    pub fn new() -> Ctx {
        shipped_kb();
        Ctx {
            dir: tempfile::tempdir().expect("tempdir"),
        }
    }

    pub fn user_kb(&self) -> PathBuf {
        self.dir.path().join("user.sqlite")
    }

    /// A command with both databases set.
    pub fn cmd(&self) -> Command {
        self.cmd_with(shipped_kb(), &self.user_kb())
    }

    /// A command with another shipped base and this context's overlay.
    pub fn cmd_with_kb(&self, kb: &Path) -> Command {
        self.cmd_with(kb, &self.user_kb())
    }

    /// A command with the shared shipped base and another overlay.
    pub fn cmd_with_user_kb(&self, user: &Path) -> Command {
        self.cmd_with(shipped_kb(), user)
    }

    fn cmd_with(&self, kb: &Path, user: &Path) -> Command {
        Command::from_std(self.std_cmd(kb, user))
    }

    /// A plain `std::process::Command` with both databases set (for spawning).
    pub fn spawnable(&self) -> std::process::Command {
        self.std_cmd(shipped_kb(), &self.user_kb())
    }

    fn std_cmd(&self, kb: &Path, user: &Path) -> std::process::Command {
        let mut c = std::process::Command::new(assert_cmd::cargo::cargo_bin("phasewise"));
        c.env_remove("PHASEWISE_KB")
            .env_remove("PHASEWISE_USER_KB")
            .arg("--kb")
            .arg(kb)
            .arg("--user-kb")
            .arg(user);
        c
    }

    /// Run with arguments, returning the output.
    pub fn run(&self, args: &[&str]) -> Output {
        self.cmd().args(args).output().expect("run phasewise")
    }

    /// Run and parse stdout as JSON.
    pub fn json(&self, args: &[&str]) -> (serde_json::Value, i32) {
        let out = self.run(args);
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap_or_else(|e| {
            panic!(
                "stdout is not JSON ({e}): {}\nstderr: {}",
                String::from_utf8_lossy(&out.stdout),
                String::from_utf8_lossy(&out.stderr)
            )
        });
        (v, out.status.code().unwrap_or(-1))
    }

    pub fn path(&self, name: &str) -> PathBuf {
        self.dir.path().join(name)
    }
}

pub fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}
