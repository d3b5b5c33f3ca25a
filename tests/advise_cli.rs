//! `advise` and `plan` through the binary, on panels a chromatographer would recognise. The
//! expected mode and phase family of each panel is common practice, no source, unless stated.

mod common;

use common::{Ctx, stderr};
use phasewise::report::advice::AdviceReport;

fn advise(ctx: &Ctx, analytes: &[&str], extra: &[&str]) -> (AdviceReport, i32) {
    let mut args = vec!["advise", "--format", "json"];
    args.extend_from_slice(extra);
    args.extend_from_slice(analytes);
    let out = ctx.run(&args);
    let code = out.status.code().unwrap_or(-1);
    // the documented schema decodes into the library's typed structs
    let report: AdviceReport = serde_json::from_slice(&out.stdout).unwrap_or_else(|e| {
        panic!(
            "advise JSON does not decode ({e}); stderr: {}",
            stderr(&out)
        )
    });
    (report, code)
}

fn first(r: &AdviceReport) -> &phasewise::report::advice::Recommendation {
    &r.recommendations[0]
}

fn crit(r: &AdviceReport) -> (String, String) {
    first(r).critical_pair.clone().expect("a critical pair")
}

fn pair_is(p: &(String, String), a: &str, b: &str) -> bool {
    (p.0 == a && p.1 == b) || (p.0 == b && p.1 == a)
}

#[test]
fn residual_solvents_go_to_gc_on_a_polysiloxane_phase() {
    let ctx = Ctx::new();
    let (r, code) = advise(
        &ctx,
        &[
            "methanol",
            "ethanol",
            "acetone",
            "dichloromethane",
            "hexane",
            "toluene",
            "ethyl acetate",
        ],
        &[],
    );
    assert_eq!(code, 0);
    assert_eq!(first(&r).mode, "gc");
    assert!(first(&r).phase.id.starts_with("gc-") && !first(&r).phase.id.contains("plot"));
    assert_eq!(first(&r).conditions.program_unit, "°C");
    assert!(
        first(&r)
            .conditions
            .inlet
            .as_deref()
            .unwrap_or("")
            .contains("headspace"),
        "volatile analytes: headspace"
    );
}

#[test]
fn xylene_isomers_go_to_gc_and_meta_para_xylene_is_flagged_as_a_difficult_pair() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &[
            "toluene",
            "ethylbenzene",
            "p-xylene",
            "m-xylene",
            "o-xylene",
        ],
        &[],
    );
    assert_eq!(first(&r).mode, "gc");
    assert!(
        pair_is(&crit(&r), "p-xylene", "m-xylene"),
        "critical pair {:?}",
        crit(&r)
    );
    assert!(
        first(&r)
            .coelutions
            .iter()
            .any(|c| (c.a == "p-xylene" && c.b == "m-xylene")
                || (c.a == "m-xylene" && c.b == "p-xylene"))
    );
    // the back-up is another GC phase that changes selectivity, or, when no evaluated phase
    // predicts a better resolution for the critical pair, the report says so (issue 15, item 6)
    match r.backup.as_ref() {
        Some(b) => assert_eq!(b.recommendation.mode, "gc"),
        None => assert!(
            r.warnings
                .iter()
                .any(|w| w.contains("no back-up") && w.contains("m-xylene")),
            "{:?}",
            r.warnings
        ),
    }
}

#[test]
fn alcohols_go_to_gc() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["methanol", "ethanol", "1-propanol", "1-butanol"],
        &[],
    );
    assert_eq!(first(&r).mode, "gc");
}

#[test]
fn inorganic_anions_go_to_anion_exchange_ic() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &[
            "fluoride", "chloride", "nitrite", "bromide", "nitrate", "sulfate",
        ],
        &[],
    );
    assert_eq!(first(&r).mode, "ic-anion");
    assert!(first(&r).conditions.suppression.is_some());
    // fluoride elutes first on anion exchangers (common practice, no source)
    assert_eq!(first(&r).predictions[0].analyte, "fluoride");
}

#[test]
fn inorganic_cations_go_to_cation_exchange_ic() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["sodium ion", "ammonium", "potassium ion", "calcium ion"],
        &[],
    );
    assert_eq!(first(&r).mode, "ic-cation");
}

#[test]
fn sugars_go_to_hilic_on_an_amide_phase() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["glucose", "fructose", "sucrose", "lactose=6134"],
        &[],
    );
    assert_eq!(first(&r).mode, "hilic");
    assert_eq!(first(&r).phase.id, "hilic-amide");
    assert!(
        r.analytes.iter().all(|a| a.gc_suitability != "suitable"),
        "sugars need derivatisation for GC"
    );
}

#[test]
fn steroids_go_to_reversed_phase_on_an_alkyl_or_phenyl_phase() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["testosterone", "progesterone", "estradiol", "cortisol"],
        &[],
    );
    assert_eq!(first(&r).mode, "rp");
    let id = &first(&r).phase.id;
    assert!(
        [
            "rp-c18",
            "rp-c8",
            "rp-biphenyl",
            "rp-phenyl-hexyl",
            "rp-c18-aq",
            "rp-c18-hybrid"
        ]
        .contains(&id.as_str()),
        "{id}"
    );
}

#[test]
fn acidic_drugs_are_run_at_low_ph_below_their_pka() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["ibuprofen", "naproxen", "diclofenac", "ketoprofen"],
        &[],
    );
    assert_eq!(first(&r).mode, "rp");
    let ph = first(&r).conditions.ph.unwrap();
    // carboxylic acids pKa about 4-4.5: pH at least ~1.5 units below keeps them neutral
    assert!(ph <= 3.0, "pH {ph}");
    assert!(
        first(&r)
            .reasons
            .iter()
            .any(|x| x.source == "rule:ph-two-units-from-pka")
    );
}

#[test]
fn basic_drugs_are_run_on_reversed_phase_at_a_ph_well_below_their_pka() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &[
            "amitriptyline",
            "nortriptyline",
            "imipramine",
            "desipramine",
        ],
        &[],
    );
    assert_eq!(first(&r).mode, "rp");
    let ph = first(&r).conditions.ph.unwrap();
    // tricyclic amines pKa about 9.5 (from memory): protonated side, inside silica's range
    assert!(ph <= 7.5, "pH {ph}");
    assert!(
        first(&r)
            .reasons
            .iter()
            .any(|x| x.source == "rule:bases-on-silanols")
    );
}

#[test]
fn methylxanthines_go_to_reversed_phase_and_the_dimethylxanthine_isomers_are_the_critical_pair() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["caffeine", "theobromine", "theophylline", "paraxanthine"],
        &["--detector", "uv:273"],
    );
    assert_eq!(first(&r).mode, "rp");
    // theophylline and paraxanthine are positional isomers (C7H8N4O2); on C18 they are the
    // closest pair in 11 of the 12 RP systems of the open retention data that measured all
    // four (RepoRT, CC BY-SA 4.0). Checked on the first recommendation and on plain C18.
    let c18 = r
        .recommendations
        .iter()
        .find(|x| x.phase.id == "rp-c18")
        .expect("a C18 recommendation");
    for c in [
        crit(&r),
        c18.critical_pair.clone().expect("a critical pair"),
    ] {
        assert!(
            pair_is(&c, "theophylline", "paraxanthine")
                || pair_is(&c, "theobromine", "theophylline")
                || pair_is(&c, "theobromine", "paraxanthine"),
            "{c:?}"
        );
    }
    // A chemistry the model has seen on 2 training systems (porous graphitic carbon) does not
    // come first on the strength of its predicted separation alone: that prediction is
    // discounted and says why (common practice, no source: start where the data are).
    assert!(
        first(&r).phase.id.starts_with("rp-c18"),
        "{}",
        first(&r).phase.id
    );
    let pgc = r
        .recommendations
        .iter()
        .chain(r.backup.iter().map(|b| &b.recommendation))
        .find(|x| x.phase.id == "rp-pgc")
        .expect("porous graphitic carbon among the candidates shown");
    assert!(
        pgc.reasons
            .iter()
            .any(|x| x.source == "model:training-support" && x.weight.is_some_and(|w| w < 0.0)),
        "{:?}",
        pgc.reasons
    );
    // the chemistry is named in words, not by the training data's class key (issue 16)
    for x in pgc
        .reasons
        .iter()
        .filter(|x| x.source == "model:training-support")
    {
        assert!(
            x.text.contains("(porous graphitic carbon)") && !x.text.contains('_'),
            "{}",
            x.text
        );
    }
    // Each pair the back-up is compared on appears once.
    let changes = &r.backup.as_ref().expect("a back-up").changes;
    for (i, c) in changes.iter().enumerate() {
        assert!(
            !changes[i + 1..]
                .iter()
                .any(|d| pair_is(&(d.a.clone(), d.b.clone()), &c.a, &c.b)),
            "{} / {} listed twice",
            c.a,
            c.b
        );
    }
}

#[test]
fn polycyclic_aromatics_go_to_reversed_phase_or_gc() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["naphthalene", "anthracene", "phenanthrene", "pyrene"],
        &[],
    );
    assert!(["rp", "gc"].contains(&first(&r).mode.as_str()));
    // anthracene and phenanthrene are isomers: the classic difficult pair, flagged as the
    // critical pair or a listed co-elution risk (GC is first since issue 15)
    assert!(
        pair_is(&crit(&r), "anthracene", "phenanthrene")
            || first(&r).coelutions.iter().any(|c| pair_is(
                &(c.a.clone(), c.b.clone()),
                "anthracene",
                "phenanthrene"
            )),
        "{:?}",
        crit(&r)
    );
}

#[test]
fn small_organic_acids_are_run_at_low_ph() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["citric acid", "malic acid", "succinic acid", "lactic acid"],
        &[],
    );
    let m = first(&r).mode.as_str();
    assert!(
        ["rp", "ion-exclusion", "ic-anion", "hilic"].contains(&m),
        "{m}"
    );
    if m == "rp" {
        assert!(first(&r).conditions.ph.unwrap() <= 3.0);
    }
}

#[test]
fn amino_acids_are_not_sent_to_reversed_phase() {
    let ctx = Ctx::new();
    let (r, _) = advise(&ctx, &["glycine", "alanine", "serine", "lysine"], &[]);
    assert_ne!(first(&r).mode, "rp");
}

#[test]
fn unresolved_analytes_are_listed_with_suggestions_and_the_rest_is_advised_with_the_partial_code() {
    let ctx = Ctx::new();
    let (r, code) = advise(&ctx, &["toluene", "ethylbenzne", "o-xylene"], &[]);
    assert_eq!(code, 1);
    assert_eq!(r.unresolved.len(), 1);
    assert!(
        r.unresolved[0]
            .suggestions
            .iter()
            .any(|s| s.compound == "ethylbenzene")
    );
    assert_eq!(r.analytes.len(), 2);
    assert!(!r.recommendations.is_empty());
}

#[test]
fn the_report_carries_units_provenance_reasons_and_cautions() {
    let ctx = Ctx::new();
    let (r, _) = advise(&ctx, &["ibuprofen", "naproxen"], &[]);
    assert_eq!(r.schema_version, phasewise::report::SCHEMA_VERSION);
    for a in &r.analytes {
        assert!(a.properties.iter().all(|p| !p.source.is_empty()));
        assert!(a.properties.iter().any(|p| p.property == "logp"));
    }
    let f = first(&r);
    assert!(
        f.predictions
            .iter()
            .all(|p| p.interval_low_min <= p.retention_time_min
                && p.retention_time_min <= p.interval_high_min)
    );
    assert!(
        f.reasons
            .iter()
            .all(|x| x.source.starts_with("rule:") || x.source.starts_with("model:"))
    );
    assert!(
        r.cautions
            .iter()
            .any(|c| c.topic == "general" && c.text.contains("starting points"))
    );
    assert!(r.cautions.iter().any(|c| c.topic == "solvent"));
}

#[test]
fn a_lab_restricted_to_its_own_phases_gets_only_those() {
    let ctx = Ctx::new();
    let f = ctx.path("our-columns.txt");
    std::fs::write(
        &f,
        "# invented lab's column cabinet\nrp-c18\nrp-phenyl-hexyl\n",
    )
    .unwrap();
    let (r, _) = advise(
        &ctx,
        &["ibuprofen", "naproxen"],
        &["--phases-available", f.to_str().unwrap()],
    );
    assert!(
        r.recommendations
            .iter()
            .all(|x| x.phase.id == "rp-c18" || x.phase.id == "rp-phenyl-hexyl")
    );
    std::fs::write(&f, "rp-c81\n").unwrap();
    let out = ctx.run(&[
        "advise",
        "ibuprofen",
        "--phases-available",
        f.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("rp-c81"), "{}", stderr(&out));
}

#[test]
fn bad_advise_options_name_the_value() {
    let ctx = Ctx::new();
    for (args, want) in [
        (vec!["--detector", "uv:50"], "uv:50"),
        (vec!["--column", "150y4.6"], "150y4.6"),
        (vec!["--column", "0x4.6"], "greater than zero"),
        (vec!["--modes", "lc"], "lc"),
        (vec!["--risk", "2"], "2"),
    ] {
        let mut a = vec!["advise", "ibuprofen"];
        a.extend(args.iter());
        let out = ctx.run(&a);
        assert_eq!(out.status.code(), Some(2), "{a:?}");
        assert!(stderr(&out).contains(want), "{a:?}: {}", stderr(&out));
    }
}

#[test]
fn plan_writes_one_self_contained_html_file_and_refuses_a_missing_directory_before_any_work() {
    let ctx = Ctx::new();
    let out_path = ctx.path("plan.html");
    let out = ctx.run(&[
        "plan",
        "toluene",
        "p-xylene",
        "m-xylene",
        "--output",
        out_path.to_str().unwrap(),
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let html = std::fs::read_to_string(&out_path).unwrap();
    assert!(html.contains("<svg") && html.contains("m-xylene"));
    let md = ctx.path("plan.md");
    assert!(
        ctx.run(&[
            "plan",
            "toluene",
            "p-xylene",
            "--output",
            md.to_str().unwrap()
        ])
        .status
        .success()
    );
    assert!(std::fs::read_to_string(&md).unwrap().contains("p-xylene"));
    let missing = ctx.path("no/such/dir/plan.html");
    let out = ctx.run(&["plan", "toluene", "--output", missing.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    assert!(!missing.exists());
    // same input, same bytes with --no-date (the date is on by default)
    let (first, again) = (ctx.path("first.html"), ctx.path("again.html"));
    for p in [&first, &again] {
        assert!(
            ctx.run(&[
                "plan",
                "toluene",
                "p-xylene",
                "m-xylene",
                "--no-date",
                "--output",
                p.to_str().unwrap()
            ])
            .status
            .success()
        );
    }
    assert_eq!(
        std::fs::read(&first).unwrap(),
        std::fs::read(&again).unwrap()
    );
    // the date is on by default; document-control entries go where they belong
    assert!(
        html.contains("<td>date written</td><td>20"),
        "no date by default"
    );
    let ctl = ctx.path("ctl.md");
    let out = ctx.run(&[
        "plan",
        "toluene",
        "--document-id",
        "INV-PLAN-042",
        "--author",
        "A. Analyst (invented)",
        "--matrix",
        "invented solvent blend",
        "--output",
        ctl.to_str().unwrap(),
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let md = std::fs::read_to_string(&ctl).unwrap();
    for want in [
        "| document identifier | INV-PLAN-042 |",
        "| author | A. Analyst (invented) |",
        "| sample matrix | invented solvent blend |",
        "| retention model checksum | fnv1a64:",
        "| reviewer | to be completed |",
    ] {
        assert!(md.contains(want), "{want} missing");
    }
}

#[test]
fn predict_says_when_an_analyte_would_elute_only_after_the_program_ends() {
    // A C36 alkane cannot leave a C18 column under a short gradient to 60 % acetonitrile
    // (common practice, no source); caffeine elutes well inside it.
    let ctx = Ctx::new();
    let out = ctx.run(&[
        "predict",
        "hexatriacontane",
        "caffeine",
        "--mode",
        "rp",
        "--phase",
        "rp-c18",
        "--gradient",
        "0:5,10:60,12:60",
        "--ph",
        "3",
        "--t0",
        "1",
        "--format",
        "json",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let notes: Vec<&str> = v["notes"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|n| n.as_str())
        .collect();
    let late: Vec<&&str> = notes
        .iter()
        .filter(|n| n.contains("after the program ends"))
        .collect();
    assert_eq!(late.len(), 1, "{notes:?}");
    assert!(late[0].starts_with("hexatriacontane:"), "{}", late[0]);
}

#[test]
fn predict_gives_retention_with_intervals_and_the_path_for_given_lc_conditions() {
    let ctx = Ctx::new();
    let out = ctx.run(&[
        "predict",
        "caffeine",
        "theophylline",
        "--mode",
        "rp",
        "--phase",
        "rp-c18",
        "--gradient",
        "0:5,20:95",
        "--ph",
        "2.7",
        "--column",
        "150x4.6",
        "--flow",
        "1.0",
        "--format",
        "json",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let preds = v["predictions"].as_array().unwrap();
    assert_eq!(preds.len(), 2);
    for p in preds {
        let t = p["retention_time_min"].as_f64().unwrap();
        assert!(
            p["interval_low_min"].as_f64().unwrap() <= t
                && t <= p["interval_high_min"].as_f64().unwrap()
        );
        assert!(["memory", "descriptor"].contains(&p["path"].as_str().unwrap()));
    }
    // a longer gradient moves every analyte later (LSS gradient theory, Snyder & Dolan 2007)
    let out2 = ctx.run(&[
        "predict",
        "caffeine",
        "theophylline",
        "--mode",
        "rp",
        "--phase",
        "rp-c18",
        "--gradient",
        "0:5,40:95",
        "--ph",
        "2.7",
        "--column",
        "150x4.6",
        "--flow",
        "1.0",
        "--format",
        "json",
    ]);
    let v2: serde_json::Value = serde_json::from_slice(&out2.stdout).unwrap();
    for (a, b) in preds.iter().zip(v2["predictions"].as_array().unwrap()) {
        assert_eq!(a["analyte"], b["analyte"]);
        assert!(
            b["retention_time_min"].as_f64().unwrap() > a["retention_time_min"].as_f64().unwrap()
        );
    }
}

#[test]
fn predict_rejects_bad_conditions_naming_the_value() {
    let ctx = Ctx::new();
    for (args, want) in [
        (
            vec![
                "--mode",
                "rp",
                "--phase",
                "hilic-amide",
                "--gradient",
                "0:5,20:95",
                "--flow",
                "1",
            ],
            "hilic-amide",
        ),
        (
            vec![
                "--mode",
                "rp",
                "--phase",
                "rp-c18",
                "--gradient",
                "0:5,20:95,10:50",
                "--flow",
                "1",
            ],
            "10:50",
        ),
        (
            vec![
                "--mode",
                "rp",
                "--phase",
                "rp-c18",
                "--gradient",
                "0:5,20:150",
                "--flow",
                "1",
            ],
            "150",
        ),
        (
            vec![
                "--mode",
                "rp",
                "--phase",
                "rp-c18",
                "--gradient",
                "0:5,20:95",
                "--ph",
                "13",
                "--flow",
                "1",
            ],
            "13",
        ),
        (
            vec![
                "--mode",
                "rp",
                "--phase",
                "rp-c18",
                "--gradient",
                "0:5,20:95",
                "--flow=-1",
            ],
            "-1",
        ),
        (
            vec![
                "--mode",
                "gc",
                "--phase",
                "gc-wax",
                "--gradient",
                "0:5,20:95",
                "--flow",
                "1",
            ],
            // GC predictions take an oven program, not a gradient (issue #4)
            "--oven",
        ),
        (
            vec![
                "--mode",
                "rp",
                "--phase",
                "rp-c81",
                "--gradient",
                "0:5,20:95",
                "--flow",
                "1",
            ],
            "rp-c81",
        ),
    ] {
        let mut a = vec!["predict", "caffeine"];
        a.extend(args.iter());
        let out = ctx.run(&a);
        assert_eq!(out.status.code(), Some(2), "{a:?}");
        assert!(stderr(&out).contains(want), "{a:?}: {}", stderr(&out));
    }
}

fn predict_json(ctx: &Ctx, extra: &[&str]) -> serde_json::Value {
    let mut args = vec![
        "predict",
        "caffeine",
        "theophylline",
        "--mode",
        "rp",
        "--phase",
        "rp-c18",
        "--gradient",
        "0:5,20:95",
        "--format",
        "json",
    ];
    args.extend_from_slice(extra);
    let out = ctx.run(&args);
    assert!(out.status.success(), "{args:?}: {}", stderr(&out));
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn predict_uses_a_buffer_chosen_for_the_given_ph() {
    let ctx = Ctx::new();
    let catalogue = phasewise::phase::Catalogue::builtin().unwrap();
    for ph in ["2.7", "3.2", "4.5", "6.8"] {
        let v = predict_json(&ctx, &["--ph", ph, "--column", "150x4.6", "--flow", "1.0"]);
        let c = &v["conditions"];
        let buffer = c["buffer"].as_str().unwrap();
        let a = c["mobile_phase_a"].as_str().unwrap();
        let ph_f: f64 = ph.parse().unwrap();
        assert_eq!(c["ph"].as_f64(), Some(ph_f));
        if buffer == "formic-acid" {
            // 0.1 % formic acid sets pH about 2.7 by itself (common practice)
            assert!((ph_f - 2.7).abs() < 0.2, "pH {ph}: {a}");
        } else {
            // buffering range pKa ± 1 (common practice, no source)
            let pka = catalogue.buffer(buffer).unwrap().pka_25c();
            assert!((pka - ph_f).abs() <= 1.0, "pH {ph}: {buffer} (pKa {pka})");
            assert!(a.contains(&format!("pH {ph}")), "pH {ph}: {a}");
        }
    }
    // at pH 2.7 the advisor's pH 6.8 buffer (ammonium bicarbonate) must not appear
    let v = predict_json(
        &ctx,
        &["--ph", "2.7", "--column", "150x4.6", "--flow", "1.0"],
    );
    assert!(
        !v["conditions"]["mobile_phase_a"]
            .as_str()
            .unwrap()
            .contains("bicarbonate")
    );
}

#[test]
fn predict_reports_the_temperature_flow_and_column_it_used() {
    let ctx = Ctx::new();
    // --t0 alone: the flow is the one that gives t0 on the (default) column, F = Vm / t0
    let v = predict_json(
        &ctx,
        &["--t0", "1.2", "--temperature", "50", "--dwell", "0.5"],
    );
    let c = &v["conditions"];
    assert_eq!(c["temperature_c"].as_f64(), Some(50.0));
    assert_eq!(c["dead_time_min"].as_f64(), Some(1.2));
    let vm = phasewise::model::theory::column_dead_volume_ml(
        c["column_length_mm"].as_f64().unwrap(),
        c["column_id_mm"].as_f64().unwrap(),
    )
    .unwrap();
    let flow = c["flow_ml_min"].as_f64().unwrap();
    assert!((flow * 1.2 - vm).abs() < 1e-9, "flow {flow}, Vm {vm}");
    assert!(
        v["notes"]
            .as_array()
            .unwrap()
            .iter()
            .any(|n| n.as_str().unwrap().contains("Vm / t0")),
        "{}",
        v["notes"]
    );
    // given column and flow are reported as given
    let v = predict_json(
        &ctx,
        &[
            "--column",
            "100x2.1",
            "--flow",
            "0.3",
            "--temperature",
            "40",
        ],
    );
    let c = &v["conditions"];
    assert_eq!(c["temperature_c"].as_f64(), Some(40.0));
    assert_eq!(c["flow_ml_min"].as_f64(), Some(0.3));
    assert_eq!(c["column_id_mm"].as_f64(), Some(2.1));
    // a temperature above the phase's limit is refused, naming the value
    let out = ctx.run(&[
        "predict",
        "caffeine",
        "--mode",
        "rp",
        "--phase",
        "rp-c18",
        "--gradient",
        "0:5,20:95",
        "--t0",
        "1",
        "--temperature",
        "120",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("120"), "{}", stderr(&out));
}

#[test]
fn predict_json_carries_the_memory_source_systems() {
    let ctx = Ctx::new();
    let v = predict_json(
        &ctx,
        &["--ph", "2.7", "--column", "150x4.6", "--flow", "1.0"],
    );
    for p in v["predictions"].as_array().unwrap() {
        let ids = p["source_systems"].as_array().unwrap();
        // docs/model.md: memory predictions name the systems they came from
        if p["path"] == "memory" {
            assert!(!ids.is_empty(), "{p}");
        } else {
            assert!(ids.is_empty(), "{p}");
        }
    }
}

const SOLVENTS: [&str; 7] = [
    "methanol",
    "ethanol",
    "acetone",
    "dichloromethane",
    "hexane",
    "toluene",
    "ethyl acetate",
];

#[test]
fn gc_dead_time_is_column_length_over_carrier_velocity() {
    let ctx = Ctx::new();
    let (r, _) = advise(&ctx, &SOLVENTS, &[]);
    let c = &first(&r).conditions;
    // t_M = L / u (definition; SKD 2010 ch. 2): 30 m at 35 cm/s = 85.7 s = 1.43 min
    let want = c.column_length_mm / 10.0 / c.linear_velocity_cm_s.unwrap() / 60.0;
    assert!((want - 1.4286).abs() < 1e-3, "{want}");
    assert!((c.dead_time_min - want).abs() < 1e-9, "{}", c.dead_time_min);
    for p in &first(&r).predictions {
        let k = (p.retention_time_min - want) / want;
        assert!(
            (p.retention_factor - k.max(0.0)).abs() < 1e-9,
            "{}",
            p.analyte
        );
    }
}

#[test]
fn ic_conditions_match_the_eluent_and_the_back_up_is_a_mode_the_anions_fit() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &[
            "fluoride", "chloride", "nitrite", "bromide", "nitrate", "sulfate",
        ],
        &[],
    );
    let recs = r
        .recommendations
        .iter()
        .chain(r.backup.iter().map(|b| &b.recommendation));
    for rec in recs.filter(|x| x.mode.starts_with("ic")) {
        let c = &rec.conditions;
        let a = c.mobile_phase_a.as_deref().unwrap();
        let prep = c.buffer_preparation.as_deref().unwrap();
        if a.contains("carbonate") {
            assert!(c.program.iter().all(|s| s.value == 3.5), "{:?}", c.program);
            assert!(c.program_unit.contains("carbonate"), "{}", c.program_unit);
            assert!(!prep.contains("hydroxide"), "{prep}");
        } else if a.contains("hydroxide") {
            assert!(c.program_unit.contains("hydroxide"), "{}", c.program_unit);
        }
        assert!(!c.program_unit.contains("mM eluent"));
        // the isocratic program lasts the run
        assert_eq!(c.program.last().unwrap().time_min, c.run_time_min);
    }
    // none of the anions fits HILIC, so the back-up is another anion exchanger (or none)
    if let Some(b) = &r.backup {
        assert_eq!(
            b.recommendation.mode, "ic-anion",
            "{}",
            b.recommendation.phase.id
        );
    } else {
        assert!(
            r.warnings
                .iter()
                .any(|w| w.contains("no orthogonal back-up") || w.contains("no back-up"))
        );
    }
    assert!(
        !r.cautions
            .iter()
            .any(|c| c.text.contains("cetonitrile") || c.topic == "ph"),
        "{:?}",
        r.cautions
    );
}

#[test]
fn the_mode_table_and_the_ranking_use_the_same_score() {
    let ctx = Ctx::new();
    for panel in [
        &["caffeine"][..],
        &["glucose", "fructose", "sucrose", "lactose"][..],
        &SOLVENTS[..],
    ] {
        let (r, _) = advise(&ctx, panel, &[]);
        // the first recommendation is in the top-scoring mode of the table
        assert_eq!(first(&r).mode, r.mode_scores[0].mode, "{panel:?}");
        for w in r.mode_scores.windows(2) {
            assert!(w[0].score >= w[1].score, "{panel:?}: {:?}", r.mode_scores);
        }
        for m in &r.mode_scores {
            let pref = m.preference.as_ref().and_then(|p| p.weight).unwrap_or(0.0);
            assert!((m.score - (m.fit + pref).min(1.0)).abs() < 1e-12, "{m:?}");
        }
    }
    // caffeine: a neutral, moderately polar drug goes to reversed phase first (common practice)
    let (r, _) = advise(&ctx, &["caffeine"], &[]);
    assert_eq!(first(&r).mode, "rp");
    let rp = r.mode_scores.iter().find(|m| m.mode == "rp").unwrap();
    assert_eq!(
        rp.preference.as_ref().map(|p| p.source.as_str()),
        Some("rule:usual-first-mode")
    );
}

#[test]
fn a_phases_file_with_only_comments_is_an_error_naming_the_file() {
    let ctx = Ctx::new();
    let f = ctx.path("empty-cabinet.txt");
    std::fs::write(&f, "# invented lab: nothing yet\n\n").unwrap();
    let out = ctx.run(&[
        "advise",
        "ibuprofen",
        "--phases-available",
        f.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("empty-cabinet.txt"),
        "{}",
        stderr(&out)
    );
    // an unknown id points at the command that lists the known ones
    std::fs::write(&f, "rp-c81\n").unwrap();
    let out = ctx.run(&[
        "advise",
        "ibuprofen",
        "--phases-available",
        f.to_str().unwrap(),
    ]);
    assert!(
        stderr(&out).contains("phasewise phases"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn phases_lists_the_catalogue_as_a_table_or_json() {
    let ctx = Ctx::new();
    let (v, code) = ctx.json(&["phases", "--mode", "gc", "--format", "json"]);
    assert_eq!(code, 0);
    let phases = v["phases"].as_array().unwrap();
    assert!(phases.iter().any(|p| p["id"] == "gc-wax"));
    for p in phases {
        assert_eq!(p["mode"], "gc");
        assert!(p["max_temperature_c"].as_f64().unwrap() > 0.0);
        assert!(p["interactions"].is_array() && p["name"].is_string());
    }
    let out = ctx.run(&["phases"]);
    assert!(out.status.success());
    let t = common::stdout(&out);
    assert!(t.contains("rp-c18") && t.contains("hilic-amide") && t.contains("pH range"));
    let out = ctx.run(&["phases", "--mode", "lc"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("lc"));
}

#[test]
fn advise_writes_one_delimited_row_per_predicted_analyte() {
    let ctx = Ctx::new();
    let (r, _) = advise(&ctx, &SOLVENTS, &[]);
    let want: usize = r
        .recommendations
        .iter()
        .chain(r.backup.iter().map(|b| &b.recommendation))
        .map(|x| x.predictions.len())
        .sum();
    for (fmt, d) in [("tsv", '\t'), ("csv", ',')] {
        let mut args = vec!["advise", "--format", fmt];
        args.extend_from_slice(&SOLVENTS);
        let out = ctx.run(&args);
        assert!(out.status.success(), "{}", stderr(&out));
        let text = common::stdout(&out);
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(
            lines[0].split(d).collect::<Vec<_>>(),
            phasewise::report::advice::DELIMITED_COLUMNS
        );
        assert_eq!(lines.len(), want + 1, "{fmt}: {text}");
        assert!(lines[1].starts_with(&format!("recommendation{d}1{d}gc{d}")));
        assert!(lines.iter().any(|l| l.contains("ethyl acetate")));
    }
}

#[test]
fn reasons_rules_hilic_program_and_cautions_are_stated_once_and_in_their_units() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["glucose", "fructose", "sucrose", "lactose=6134"],
        &[],
    );
    let rec = first(&r);
    assert_eq!(rec.mode, "hilic");
    // eluent B is acetonitrile with 5 % aqueous buffer: the program is given in % B
    assert!(rec.conditions.program_unit.starts_with("% B"));
    assert!(
        rec.conditions
            .mobile_phase_b
            .as_deref()
            .unwrap()
            .contains("95:5")
    );
    assert!(
        rec.conditions.program[0].value > 99.0,
        "{:?}",
        rec.conditions.program
    );
    for panel in [
        &SOLVENTS[..],
        &["ibuprofen", "naproxen"][..],
        &["caffeine"][..],
    ] {
        let (r, _) = advise(&ctx, panel, &[]);
        for x in r
            .recommendations
            .iter()
            .chain(r.backup.iter().map(|b| &b.recommendation))
        {
            if let Some(a) = &x.conditions.mobile_phase_a {
                assert!(
                    !(a.starts_with("water with") && a.contains("in water")),
                    "{a}"
                );
            }
        }
        assert!(r.cautions.iter().filter(|c| c.topic == "pressure").count() <= 1);
    }
    // the table shows each rule's weight, and a weight of 0 as not scored
    let mut args = vec!["advise"];
    args.extend_from_slice(&["ibuprofen", "naproxen", "amitriptyline"]);
    let t = common::stdout(&ctx.run(&args));
    assert!(t.contains(", weight +"), "{t}");
    // the basic drug makes `rule:bases-on-silanols` apply, with weight 0 on some phases
    assert!(
        t.lines()
            .filter(|l| l.contains(", weight 0"))
            .all(|l| l.contains("not scored")),
        "{t}"
    );
}

#[test]
fn predict_gc_gives_retention_index_time_and_flagged_pairs_under_a_given_oven_program() {
    let ctx = Ctx::new();
    let xylenes = [
        "toluene",
        "ethylbenzene",
        "p-xylene",
        "m-xylene",
        "o-xylene",
    ];
    let run = |extra: &[&str]| {
        let mut args = vec!["predict", "--mode", "gc", "--format", "json"];
        args.extend_from_slice(extra);
        args.extend_from_slice(&xylenes);
        let out = ctx.run(&args);
        assert!(out.status.success(), "{args:?}: {}", stderr(&out));
        serde_json::from_slice::<serde_json::Value>(&out.stdout).unwrap()
    };
    let v = run(&[
        "--phase",
        "gc-5-phenyl",
        "--oven",
        "40:2,10:250:5",
        "--column",
        "30x0.25x0.25",
    ]);
    let c = &v["conditions"];
    assert_eq!(c["column_id_mm"].as_f64(), Some(0.25));
    assert_eq!(c["film_um"].as_f64(), Some(0.25));
    // the program reported is the one given: 40 °C, 2 min hold, 10 °C/min to 250 °C, 5 min
    let prog: Vec<(f64, f64)> = c["program"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| {
            (
                p["time_min"].as_f64().unwrap(),
                p["value"].as_f64().unwrap(),
            )
        })
        .collect();
    assert_eq!(
        prog,
        vec![(0.0, 40.0), (2.0, 40.0), (23.0, 250.0), (28.0, 250.0)]
    );
    let preds = v["predictions"].as_array().unwrap();
    assert_eq!(preds.len(), 5);
    for p in preds {
        assert!(p["retention_index"].as_f64().is_some(), "{p}");
        assert_eq!(p["path"], "solvation model");
        assert!(p["retention_index_low"].as_f64() < p["retention_index"].as_f64());
    }
    // m-/p-xylene (predicted nearly identical) are the most probable co-elution (issue 18)
    let top = &v["coelutions"][0];
    let mut pair = [top["a"].as_str().unwrap(), top["b"].as_str().unwrap()];
    pair.sort_unstable();
    assert_eq!(pair, ["m-xylene", "p-xylene"], "{}", v["coelutions"]);
    // on a low-polarity phase m- and p-xylene are the classic co-eluting pair (common practice)
    assert!(
        v["coelutions"].as_array().unwrap().iter().any(|x| {
            let (a, b) = (x["a"].as_str().unwrap(), x["b"].as_str().unwrap());
            (a == "p-xylene" && b == "m-xylene") || (a == "m-xylene" && b == "p-xylene")
        }),
        "{}",
        v["coelutions"]
    );
    // a faster ramp elutes every analyte earlier (temperature-programmed GC)
    let fast = run(&[
        "--phase",
        "gc-5-phenyl",
        "--oven",
        "40:2,20:250:5",
        "--column",
        "30x0.25x0.25",
    ]);
    for p in fast["predictions"].as_array().unwrap() {
        let slow = preds.iter().find(|q| q["analyte"] == p["analyte"]).unwrap();
        assert!(
            p["retention_time_min"].as_f64() < slow["retention_time_min"].as_f64(),
            "{p}"
        );
    }
    // an analyte judged unsuitable for GC is still predicted when asked, with its caution, and
    // the others are unaffected (issue 18; sugars need derivatisation: common practice)
    let out = ctx.run(&[
        "predict", "--mode", "gc", "--phase", "gc-wax", "--format", "json", "toluene", "sucrose",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let rows = v["predictions"].as_array().unwrap();
    assert_eq!(rows.len(), 2, "{v}");
    let sucrose = rows.iter().find(|p| p["analyte"] != "toluene").unwrap();
    assert!(sucrose["retention_index"].as_f64().is_some(), "{sucrose}");
    assert!(sucrose["caution"].as_str().is_some(), "{sucrose}");
    // bad GC input names the value
    for (extra, want) in [
        (vec!["--oven", "40:2,10:x:5"], "`x`"),
        (vec!["--oven", "40:2,10:400:5"], "400"),
        (vec!["--column", "30x0.25"], "30x0.25"),
        (vec!["--ph", "3"], "--ph"),
    ] {
        let mut a = vec!["predict", "toluene", "--mode", "gc", "--phase", "gc-wax"];
        a.extend(extra.iter());
        let out = ctx.run(&a);
        assert_eq!(out.status.code(), Some(2), "{a:?}");
        assert!(stderr(&out).contains(want), "{a:?}: {}", stderr(&out));
    }
}

#[test]
fn predict_ic_gives_the_elution_order_and_relative_retention() {
    let ctx = Ctx::new();
    let (v, code) = ctx.json(&[
        "predict",
        "--mode",
        "ic-anion",
        "--phase",
        "ic-anion-hydroxide",
        "--format",
        "json",
        "sulfate",
        "chloride",
        "fluoride",
        "nitrate",
    ]);
    assert_eq!(code, 0);
    let order: Vec<&str> = v["predictions"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["analyte"].as_str().unwrap())
        .collect();
    // fluoride first, chloride before nitrate (common practice, no source)
    assert_eq!(order[0], "fluoride");
    let pos = |n: &str| order.iter().position(|x| *x == n).unwrap();
    assert!(pos("chloride") < pos("nitrate"));
    assert!(
        v["warnings"].as_array().unwrap().is_empty(),
        "{}",
        v["warnings"]
    );
    let out = ctx.run(&[
        "predict",
        "--mode",
        "ic-anion",
        "--phase",
        "ic-anion-hydroxide",
        "chloride",
        "nitrate",
    ]);
    assert!(common::stdout(&out).contains("relative retention"));
    let out = ctx.run(&[
        "predict",
        "chloride",
        "--mode",
        "ic-anion",
        "--phase",
        "ic-anion-hydroxide",
        "--gradient",
        "0:5,20:95",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("--gradient"));
}

#[test]
fn the_pressure_caution_says_whose_pressure_it_is() {
    // Narrow-bore column with sub-2 µm particles: the first choice and the back-up need
    // different pressures; the caution names the recommendation with the highest, and its
    // number is that recommendation's own estimate.
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["caffeine", "theophylline"],
        &[
            "--column",
            "100x2.1",
            "--particle",
            "1.8",
            "--dwell",
            "0.2",
            "--modes",
            "rp",
            "--alternatives",
            "1",
        ],
    );
    let cautions: Vec<&str> = r
        .cautions
        .iter()
        .filter(|c| c.topic == "pressure")
        .map(|c| c.text.as_str())
        .collect();
    assert_eq!(cautions.len(), 1, "{cautions:?}");
    let shown = std::iter::once(("first choice", first(&r)))
        .chain(r.backup.iter().map(|b| ("back-up", &b.recommendation)))
        .filter_map(|(role, x)| x.conditions.pressure_bar.map(|p| (p, role, x)))
        .max_by(|a, b| a.0.total_cmp(&b.0))
        .expect("a pressure estimate");
    let (p, role, x) = shown;
    assert!(
        cautions[0].contains(&format!("{p:.0} bar"))
            && cautions[0].contains(&format!("the {role} on"))
            && cautions[0].contains(&x.phase.id),
        "{}",
        cautions[0]
    );
}

// Issue 15: detector and mode checked against each other (common practice, no source).
#[test]
fn an_impossible_detector_and_mode_pair_is_refused_naming_both() {
    let ctx = Ctx::new();
    let out = ctx.run(&[
        "advise",
        "--detector",
        "conductivity",
        "--modes",
        "rp",
        "caffeine",
        "theophylline",
    ]);
    assert_eq!(out.status.code(), Some(2));
    let err = stderr(&out);
    assert!(
        err.contains("conductivity") && err.contains("reversed-phase"),
        "{err}"
    );
    // electron capture is a GC detector: never an LC method with it
    let (r, _) = advise(
        &ctx,
        &["lindane", "dieldrin", "hexachlorobenzene"],
        &["--detector", "ecd"],
    );
    assert_eq!(first(&r).mode, "gc");
    assert!(first(&r).conditions.detection.contains("electron capture"));
}

#[test]
fn salts_and_ion_names_go_to_ic_by_their_ion() {
    let ctx = Ctx::new();
    let (r, _) = advise(
        &ctx,
        &["potassium nitrate", "sodium sulfate", "sodium fluoride"],
        &["--detector", "auto"],
    );
    assert_eq!(first(&r).mode, "ic-anion");
    assert_eq!(
        first(&r).predicted_analytes,
        3,
        "every salt predicted as its anion"
    );
    assert!(first(&r).conditions.detection.contains("conductivity"));
}

#[test]
fn with_no_detector_named_it_is_chosen_from_structure() {
    let ctx = Ctx::new();
    // no chromophore: never UV
    let (r, _) = advise(
        &ctx,
        &["glucose", "fructose", "sucrose"],
        &["--detector", "auto"],
    );
    let d = &first(&r).conditions.detection;
    assert!(!d.contains("UV"), "{d}");
    // polyhalogenated GC list: electron capture
    let (r, _) = advise(
        &ctx,
        &["lindane", "dieldrin", "hexachlorobenzene", "heptachlor"],
        &["--detector", "auto"],
    );
    assert_eq!(first(&r).mode, "gc");
    assert!(first(&r).conditions.detection.contains("electron capture"));
    assert!(
        first(&r)
            .reasons
            .iter()
            .any(|x| x.source == "rule:detector-from-structure")
    );
}
