//! Throughput of parse + every descriptor over the 2,000 RDKit reference
//! molecules (`tests/data/rdkit_descriptors.tsv`). Run with
//! `cargo bench --bench describe`; the figures are recorded in docs/performance.md.
//!
//! Two measurements of the same work: wall-clock time (criterion's default) and the CPU time
//! of the benchmarking thread (`describe_cpu`, `CLOCK_THREAD_CPUTIME_ID`). On a machine shared
//! with other work the wall-clock figure depends on how much of a core the benchmark got; the
//! CPU-time figure is what one core does while it runs the code, which is what the target of
//! "molecules per second on one core" asks for.

use criterion::measurement::{Measurement, ValueFormatter};
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

/// CPU time of the calling thread, in nanoseconds (POSIX `clock_gettime`).
struct ThreadCpuTime;

fn thread_cpu_ns() -> u64 {
    let mut ts = libc::timespec {
        tv_sec: 0,
        tv_nsec: 0,
    };
    // SAFETY: `ts` is a valid, writable timespec; the clock id is a constant the C library knows.
    let rc = unsafe { libc::clock_gettime(libc::CLOCK_THREAD_CPUTIME_ID, &mut ts) };
    assert_eq!(rc, 0, "clock_gettime(CLOCK_THREAD_CPUTIME_ID) failed");
    ts.tv_sec as u64 * 1_000_000_000 + ts.tv_nsec as u64
}

impl Measurement for ThreadCpuTime {
    type Intermediate = u64;
    type Value = u64;
    fn start(&self) -> u64 {
        thread_cpu_ns()
    }
    fn end(&self, start: u64) -> u64 {
        thread_cpu_ns().saturating_sub(start)
    }
    fn add(&self, a: &u64, b: &u64) -> u64 {
        a + b
    }
    fn zero(&self) -> u64 {
        0
    }
    fn to_f64(&self, v: &u64) -> f64 {
        *v as f64
    }
    fn formatter(&self) -> &dyn ValueFormatter {
        &CpuFormatter
    }
}

/// Formats nanoseconds of CPU time as ms of CPU, and throughputs per CPU-second.
struct CpuFormatter;

impl ValueFormatter for CpuFormatter {
    fn scale_values(&self, _typical: f64, values: &mut [f64]) -> &'static str {
        values.iter_mut().for_each(|v| *v /= 1e6);
        "ms CPU"
    }
    fn scale_throughputs(
        &self,
        _typical: f64,
        throughput: &Throughput,
        values: &mut [f64],
    ) -> &'static str {
        let elements = match throughput {
            Throughput::Elements(n) | Throughput::ElementsAndBytes { elements: n, .. } => *n,
            Throughput::Bytes(n) | Throughput::BytesDecimal(n) | Throughput::Bits(n) => *n,
        } as f64;
        values
            .iter_mut()
            .for_each(|v| *v = elements / (*v / 1e9) / 1e3);
        "Kelem/CPU-s"
    }
    fn scale_for_machines(&self, _values: &mut [f64]) -> &'static str {
        "ns"
    }
}

fn run<M: Measurement>(c: &mut Criterion<M>, name: &str) {
    let all = smiles();
    let mut group = c.benchmark_group(name);
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

fn bench(c: &mut Criterion) {
    run(c, "describe");
}

fn bench_cpu(c: &mut Criterion<ThreadCpuTime>) {
    run(c, "describe_cpu");
}

criterion_group!(benches, bench);
criterion_group! {
    name = cpu;
    config = Criterion::default().with_measurement(ThreadCpuTime);
    targets = bench_cpu
}
criterion_main!(benches, cpu);
