//! Fits the GC solvation-route fragment values on the training half of the reference retention
//! indices and prints the validation figures of the solvation route and of the boiling-point
//! route (the model before issue 18) per phase and split.
//!
//! `cargo run --release --example gc_retention_fit` prints; `-- --write` also rewrites
//! `data/gc_solute_fragments.tsv` and `data/gc_retention_residuals.tsv` (deterministic: same
//! inputs, same bytes). Figures go into docs/gc-retention.md.

use phasewise::advisor::profile::AnalyteProfile;
use phasewise::model::gc::calibration::{
    Figures, REFERENCE_PHASES, ReferenceRow, Split, figures, fit, parse_priors, parse_reference,
    render_fragments,
};
use phasewise::model::gc::predict_retention_index;
use phasewise::model::gc::solvation::parse_system_constants;
use phasewise::phase::Catalogue;
use phasewise::property::{Analyte, Origin};
use phasewise::structure::abraham::{
    Fragment, FragmentValues, descriptors_from_counts, fragment_counts,
};
use phasewise::structure::parse_smiles;

fn read(path: &str) -> String {
    let full = format!("{}/{path}", env!("CARGO_MANIFEST_DIR"));
    std::fs::read_to_string(&full).unwrap_or_else(|e| {
        eprintln!("cannot read {full}: {e}");
        std::process::exit(2)
    })
}

fn line(label: &str, split: &str, f: &Figures) {
    println!(
        "| {label} | {split} | {} | {} | {:.0} | {:.0} % | {} | {:.0} % | {:.0} |",
        f.n,
        f.missing,
        f.median_abs_error,
        100.0 * f.within_30,
        f.close_pairs,
        100.0 * f.close_pairs_right,
        f.robust_sd
    );
}

fn main() {
    let write = std::env::args().any(|a| a == "--write");
    let rows = parse_reference(&read("tests/data/gc_ri_reference.tsv")).unwrap_or_else(|e| {
        eprintln!("{e}");
        std::process::exit(2)
    });
    let priors = parse_priors(&read("data/gc_fragment_priors.tsv")).unwrap_or_else(|e| {
        eprintln!("{e}");
        std::process::exit(2)
    });
    let constants =
        parse_system_constants(&read("data/gc_system_constants.tsv")).unwrap_or_else(|e| {
            eprintln!("{e}");
            std::process::exit(2)
        });
    let fitted = fit(&rows, &priors, &constants).unwrap_or_else(|e| {
        eprintln!("{e}");
        std::process::exit(1)
    });
    let catalogue = Catalogue::builtin().unwrap_or_else(|e| {
        eprintln!("{e}");
        std::process::exit(3)
    });
    let lookup = |f: Fragment| {
        fitted
            .iter()
            .find(|(g, _)| *g == f)
            .map_or_else(FragmentValues::default, |(_, v)| *v)
    };
    let prior_lookup = |f: Fragment| {
        priors
            .iter()
            .find(|p| p.fragment == f)
            .map_or_else(FragmentValues::default, |p| p.values)
    };
    println!(
        "| model | split | n | no index | median abs error | within 30 | close pairs | right order | robust sd |"
    );
    println!("|---|---|---|---|---|---|---|---|---|");
    let mut residual_rows = Vec::new();
    for (pi, phase_id) in REFERENCE_PHASES.iter().enumerate() {
        let Some(c) = constants.iter().find(|c| c.phase_id == *phase_id) else {
            continue;
        };
        let Ok(phase) = catalogue.phase(phase_id) else {
            continue;
        };
        let solvation = |table: &dyn Fn(Fragment) -> FragmentValues, r: &ReferenceRow| {
            let g = parse_smiles(&r.smiles).ok()?.graph;
            let counts = fragment_counts(&g).ok()?;
            Some(c.retention_index(&descriptors_from_counts(&g, &counts, table)))
        };
        let new = |r: &ReferenceRow| solvation(&lookup, r);
        let prior_only = |r: &ReferenceRow| solvation(&prior_lookup, r);
        let old = |r: &ReferenceRow| {
            let profile = AnalyteProfile::new(Analyte {
                query: r.name.clone(),
                name: r.name.clone(),
                inchikey: None,
                smiles: Some(r.smiles.clone()),
                formula: None,
                molar_mass_g_mol: None,
                cid: None,
                cas: None,
                origin: Origin::Structure,
                matched_by: "smiles".into(),
                properties: Vec::new(),
            });
            let a = profile.gc_analyte()?;
            predict_retention_index(&a, phase)
                .ok()
                .map(|p| p.retention_index)
        };
        println!("| **{phase_id}** | | | | | | | | |");
        for (label, split, s) in [
            ("all", "all", None),
            ("train", "train", Some(Split::Train)),
            ("test", "test", Some(Split::Test)),
        ] {
            let _ = label;
            line(
                "boiling-point route (before)",
                split,
                &figures(&rows, pi, s, &old),
            );
            line(
                "solvation, prior fragments",
                split,
                &figures(&rows, pi, s, &prior_only),
            );
            let f = figures(&rows, pi, s, &new);
            line("solvation, fitted (after)", split, &f);
            if s == Some(Split::Test) {
                residual_rows.push(format!(
                    "{phase_id}\t{:.1}\t{:.1}\t{}",
                    f.robust_sd.max(f.median_abs_error * 1.4826),
                    f.median_abs_error,
                    f.n
                ));
            }
        }
    }
    if std::env::args().any(|a| a == "--residuals") {
        for (pi, phase_id) in REFERENCE_PHASES.iter().enumerate() {
            let Some(c) = constants.iter().find(|c| c.phase_id == *phase_id) else {
                continue;
            };
            for r in &rows {
                let (Some(reference), Ok(p)) = (r.ri[pi], parse_smiles(&r.smiles)) else {
                    continue;
                };
                let Ok(counts) = fragment_counts(&p.graph) else {
                    continue;
                };
                let ri = c.retention_index(&descriptors_from_counts(&p.graph, &counts, &lookup));
                println!(
                    "{phase_id}\t{:?}\t{}\t{}\t{reference:.0}\t{ri:.0}\t{:+.0}",
                    r.split,
                    r.class,
                    r.name,
                    ri - reference
                );
            }
        }
    }
    if std::env::args().any(|a| a == "--counts") {
        for r in &rows {
            let Ok(p) = parse_smiles(&r.smiles) else {
                continue;
            };
            let Ok(counts) = fragment_counts(&p.graph) else {
                continue;
            };
            let cells: Vec<String> = counts
                .iter()
                .map(|(f, n)| format!("{}={n}", f.id()))
                .collect();
            let ri: Vec<String> =
                r.ri.iter()
                    .map(|v| v.map_or(String::new(), |v| format!("{v}")))
                    .collect();
            println!(
                "COUNTS\t{}\t{:?}\t{}\t{}\t{}",
                r.name,
                r.split,
                r.class,
                ri.join("\t"),
                cells.join(";")
            );
        }
    }
    if write {
        let dir = env!("CARGO_MANIFEST_DIR");
        let fragments = render_fragments(&fitted);
        let residuals = format!(
            "# Held-out (test-half) residual spread of the GC solvation route per reference phase, used as the\n\
             # 1-sigma index uncertainty (sigma_ri = max(robust sd, 1.4826 x median absolute error)).\n\
             # Generated by `cargo run --release --example gc_retention_fit -- --write`. Do not edit by hand.\n\
             phase\tsigma_ri\tmedian_abs_error_test\tn_test\n{}\n",
            residual_rows.join("\n")
        );
        for (name, text) in [
            ("data/gc_solute_fragments.tsv", fragments),
            ("data/gc_retention_residuals.tsv", residuals),
        ] {
            if let Err(e) = std::fs::write(format!("{dir}/{name}"), text) {
                eprintln!("cannot write {name}: {e}");
                std::process::exit(1);
            }
        }
        eprintln!("wrote data/gc_solute_fragments.tsv and data/gc_retention_residuals.tsv");
    }
}
