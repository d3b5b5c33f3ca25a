//! Build script: fingerprint the shipped seed data so that a knowledge base built from an
//! older copy is detected as stale at run time.

use std::fs;

fn main() {
    let files = ["data/kb/compounds.tsv.gz", "data/kb/properties.tsv.gz"];
    // FNV-1a 64-bit over the files' bytes (dependency-free and stable across platforms).
    let mut hash: u64 = 0xcbf2_9ce4_8422_2325;
    for f in files {
        println!("cargo:rerun-if-changed={f}");
        let bytes = fs::read(f).unwrap_or_else(|e| panic!("cannot read seed file {f}: {e}"));
        for b in bytes {
            hash ^= u64::from(b);
            hash = hash.wrapping_mul(0x0100_0000_01b3);
        }
    }
    println!("cargo:rustc-env=PHASEWISE_SEED_HASH={hash:016x}");
}
