//! The main job in process: loading the LC retention model, and `advise` on a 20-analyte and a
//! 500-analyte panel (`benches/panels/`), after the analytes are resolved. The knowledge base
//! is built once into cargo's target directory (about 15 s). Run with `cargo bench --bench
//! advise`; figures go to docs/performance.md (which also gives the end-to-end figures with
//! process start, measured with the binary).

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use phasewise::advisor::profile::AnalyteProfile;
use phasewise::advisor::{AdviseRequest, Detector, advise};
use phasewise::kb::identifier::parse_analyte_list;
use phasewise::kb::resolve::Resolution;
use phasewise::kb::{BuildPolicy, Kb, KbPaths};
use phasewise::model::regression::Model;

// The program's allocator (src/main.rs), so that the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn profiles(kb: &Kb, file: &str) -> Vec<AnalyteProfile> {
    let text = std::fs::read_to_string(file).expect("panel file");
    parse_analyte_list(&text)
        .expect("panel parses")
        .into_iter()
        .filter_map(|e| match kb.resolve(&e.query).expect("resolve") {
            Resolution::Found(a) => Some(AnalyteProfile::new(*a)),
            _ => None,
        })
        .collect()
}

fn request() -> AdviseRequest {
    AdviseRequest {
        detector: Detector::parse("uv:220").expect("detector"),
        column_mm: None,
        particle_um: None,
        flow_ml_min: None,
        dwell_ml: 0.0,
        modes: Vec::new(),
        phases_available: Vec::new(),
        alternatives: 3,
        risk_threshold: 0.2,
        fixed: None,
        fixed_gc: None,
        no_backup: false,
        stored_fits: Vec::new(),
        no_memory: false,
    }
}

fn bench(c: &mut Criterion) {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("target/bench-kb");
    std::fs::create_dir_all(&dir).expect("bench dir");
    let paths = KbPaths {
        shipped: dir.join("kb.sqlite"),
        user: dir.join("user.sqlite"),
    };
    let kb = Kb::open(&paths, BuildPolicy::IfNeeded, &mut |_, _| {}).expect("knowledge base");
    c.bench_function("load LC model and retention memory", |b| {
        b.iter(|| black_box(Model::load_builtin().expect("model")))
    });
    let req = request();
    for (label, file, samples) in [
        ("advise 20 analytes", "benches/panels/p20.txt", 30),
        ("advise 500 analytes", "benches/panels/p500.txt", 10),
    ] {
        let p = profiles(&kb, file);
        assert!(p.len() >= 20, "{file}: only {} resolved", p.len());
        let mut g = c.benchmark_group("advise");
        g.sample_size(samples);
        g.bench_function(label, |b| {
            b.iter(|| black_box(advise(&p, Vec::new(), &req).expect("advice")))
        });
        g.finish();
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);
