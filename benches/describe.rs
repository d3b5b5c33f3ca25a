//! Throughput of parse + every descriptor over the 2,000 RDKit reference
//! molecules (`tests/data/rdkit_descriptors.tsv`). Run with
//! `cargo bench --bench describe`; the figure is recorded in docs/structure.md.

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use phasewise::structure::describe;

// The program's allocator (src/main.rs), so that the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn smiles() -> Vec<String> {
    include_str!("../tests/data/rdkit_descriptors.tsv")
        .lines()
        .skip(1)
        .filter_map(|l| l.split('\t').nth(1).map(str::to_string))
        .collect()
}

fn bench(c: &mut Criterion) {
    let all = smiles();
    let mut group = c.benchmark_group("describe");
    group.throughput(Throughput::Elements(all.len() as u64));
    group.sample_size(20);
    group.bench_function("reference_2000", |b| {
        b.iter(|| {
            let mut ok = 0usize;
            for s in &all {
                if describe(std::hint::black_box(s)).is_ok() {
                    ok += 1;
                }
            }
            ok
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
