//! Knowledge-base look-up: 1,000 exact names and one fuzzy miss against the whole shipped
//! base. The base is built once into cargo's target directory (about 15 s). Run with
//! `cargo bench --bench lookup`; figures go to docs/performance.md.

use std::hint::black_box;
use std::io::Read;

use criterion::{Criterion, criterion_group, criterion_main};
use phasewise::kb::{BuildPolicy, Kb, KbPaths};

// The program's allocator (src/main.rs), so that the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn names() -> Vec<String> {
    let gz = std::fs::read("data/kb/compounds.tsv.gz").expect("seed table");
    let mut s = String::new();
    flate2::read::GzDecoder::new(&gz[..])
        .read_to_string(&mut s)
        .expect("gunzip");
    s.lines()
        .skip(1)
        .take(1000)
        .filter_map(|l| l.split('\t').nth(6).map(str::to_string))
        .collect()
}

fn bench(c: &mut Criterion) {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("target/bench-kb");
    std::fs::create_dir_all(&dir).expect("bench dir");
    let paths = KbPaths {
        shipped: dir.join("kb.sqlite"),
        user: dir.join("user.sqlite"),
    };
    let kb = Kb::open(&paths, BuildPolicy::IfNeeded, &mut |_, _| {}).expect("knowledge base");
    let names = names();
    c.bench_function("lookup 1000 exact names", |b| {
        b.iter(|| {
            for n in &names {
                black_box(kb.resolve(n).expect("resolve"));
            }
        })
    });
    c.bench_function("fuzzy suggestions for a miss", |b| {
        b.iter(|| black_box(kb.resolve("caffiene").expect("resolve")))
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
