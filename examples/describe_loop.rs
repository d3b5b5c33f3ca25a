//! Profiling aid: `describe` over the 2,000 reference molecules, N times (default 20).
//! `cargo run --release --example describe_loop -- 20`; used with `perf record` to see where
//! the structure engine spends its time (docs/performance.md).

// The program's allocator (src/main.rs).
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    let n: usize = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(20);
    let all: Vec<&str> = include_str!("../tests/data/rdkit_descriptors.tsv")
        .lines()
        .skip(1)
        .filter_map(|l| l.split('\t').nth(1))
        .collect();
    let t = std::time::Instant::now();
    let mut ok = 0usize;
    for _ in 0..n {
        for s in &all {
            ok += usize::from(phasewise::structure::describe(s).is_ok());
        }
    }
    let secs = t.elapsed().as_secs_f64();
    println!(
        "{ok} descriptions in {secs:.2} s wall: {:.0} molecules/s",
        ok as f64 / secs
    );
}
