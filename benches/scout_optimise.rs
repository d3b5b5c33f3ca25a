//! Benchmark: scouting fit (3 runs) and gradient optimisation for a 20-analyte invented sample.
//! Run with `cargo bench --bench scout_optimise`.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use phasewise::measured::DeadTimeInput;
use phasewise::measured::optimise::{OptimiseRequest, PlateSource, Range, optimise};
use phasewise::measured::peaks::{Peak, PeakTable};
use phasewise::measured::scout::{ScoutRequest, ScoutRun, fit};
use phasewise::model::gradient::{
    GradientProgram, GradientSystem, LssParameters, gradient_elution,
};

// The program's allocator (src/main.rs), so that the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

/// Invented 20-analyte sample (not real compounds): parameters from a fixed linear
/// congruential sequence, so the benchmark is deterministic.
fn sample() -> Vec<(String, LssParameters)> {
    let mut state: u64 = 12345;
    let mut next = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    (0..20)
        .map(|i| {
            let log_kw = 1.5 + 0.18 * i as f64 + 0.3 * next();
            let s = 3.0 + 0.2 * i as f64 + 0.8 * next();
            (format!("bench-{i:02}"), LssParameters { log_kw, s })
        })
        .collect()
}

fn scout_request() -> ScoutRequest {
    let sys = GradientSystem {
        dead_time_min: 0.9,
        dwell_time_min: 0.8,
    };
    let runs = ["0:5,10:95", "0:5,20:95", "0:5,40:95"]
        .iter()
        .enumerate()
        .map(|(ri, spec)| {
            let program = GradientProgram::parse(spec).unwrap();
            let peaks = sample()
                .iter()
                .map(|(n, p)| Peak {
                    width_half_min: Some(0.05),
                    ..Peak::at(
                        n,
                        gradient_elution(p, &program, &sys)
                            .unwrap()
                            .retention_time_min,
                    )
                })
                .collect();
            ScoutRun {
                name: format!("run-{ri}"),
                program,
                peaks: PeakTable::from_peaks(peaks).unwrap(),
            }
        })
        .collect();
    ScoutRequest {
        runs,
        dead_time: DeadTimeInput::Given { dead_time_min: 0.9 },
        dwell_volume_ml: 0.4,
        flow_ml_min: Some(0.5),
    }
}

fn optimise_request(req: &ScoutRequest) -> OptimiseRequest {
    let f = fit(req).unwrap();
    OptimiseRequest {
        analytes: OptimiseRequest::analytes_from_fit(&f),
        dead_time_min: f.dead_time_min,
        dwell_time_min: f.dwell_time_min,
        plates: PlateSource::Estimated {
            column_length_mm: 150.0,
            particle_size_um: 3.0,
        },
        gradient_time_min: Range {
            min: 5.0,
            max: 60.0,
        },
        initial_pct: Range {
            min: 5.0,
            max: 40.0,
        },
        final_pct: Range {
            min: 50.0,
            max: 100.0,
        },
        max_run_time_min: 60.0,
        critical_pairs: vec![],
        two_segment: false,
        target_resolution: 1.5,
        min_retention_factor: 1.0,
        gradient_time_steps: 25,
        composition_step_pct: 5.0,
    }
}

fn bench(c: &mut Criterion) {
    let req = scout_request();
    let opt = optimise_request(&req);
    c.bench_function("scout_fit_20_analytes_3_runs", |b| {
        b.iter(|| fit(black_box(&req)).unwrap())
    });
    c.bench_function("optimise_20_analytes_linear", |b| {
        b.iter(|| optimise(black_box(&opt)).unwrap())
    });
    let mut opt2 = opt.clone();
    opt2.two_segment = true;
    c.bench_function("optimise_20_analytes_two_segment", |b| {
        b.iter(|| optimise(black_box(&opt2)).unwrap())
    });
    c.bench_function("fit_then_optimise_20_analytes", |b| {
        b.iter(|| {
            let f = fit(black_box(&req)).unwrap();
            let mut o = opt.clone();
            o.analytes = OptimiseRequest::analytes_from_fit(&f);
            optimise(&o).unwrap()
        })
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10);
    targets = bench
}
criterion_main!(benches);
