use super::render::md_escape;
use super::*;

#[test]
fn markdown_escaping_keeps_tables_intact() {
    assert_eq!(md_escape("a|b\nc"), "a\\|b c");
    assert_eq!(md_escape("<b>*x*</b>"), "&lt;b&gt;\\*x\\*&lt;/b&gt;");
}

#[test]
fn aromatic_rings_come_from_the_structure_not_the_letters() {
    // Aromatic and Kekulé forms of the same rings (benzene, N-methylpyrrole, aspirin as the
    // knowledge base stores it): ring counts as RDKit's CalcNumAromaticRings gives them.
    assert_eq!(aromatic_ring_count("c1ccccc1"), Some(1));
    assert_eq!(aromatic_ring_count("C1=CC=CC=C1"), Some(1));
    assert_eq!(aromatic_ring_count("Cn1cccc1"), Some(1));
    assert_eq!(aromatic_ring_count("CN1C=CC=C1"), Some(1));
    assert_eq!(aromatic_ring_count("CC(=O)OC1=CC=CC=C1C(=O)O"), Some(1));
    // Two-letter elements and aliphatic rings are not aromatic.
    assert_eq!(aromatic_ring_count("ClCCl"), Some(0));
    assert_eq!(aromatic_ring_count("CCO"), Some(0));
    assert_eq!(aromatic_ring_count("C1CCCCC1"), Some(0));
    // Unreadable SMILES: no claim either way.
    assert_eq!(aromatic_ring_count("C1CC"), None);
}

#[test]
fn chelating_groups_are_found_by_smiles_text() {
    assert_eq!(chelating_group("Oc1ccccc1O"), Some("catechol"));
    assert_eq!(chelating_group("CCO"), None);
}

#[test]
fn missing_directory_is_reported_before_writing() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("no-such-dir").join("plan.html");
    let err = check_writable(&target).unwrap_err();
    assert!(matches!(err, PlanError::MissingDirectory { .. }), "{err}");
    assert!(write_atomically(&target, "x").is_err());
    assert!(!target.exists());
}

#[test]
fn parent_that_is_a_file_is_reported() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("plain-file");
    std::fs::write(&file, "not a directory").unwrap();
    let target = file.join("plan.html");
    let err = check_writable(&target).unwrap_err();
    assert!(matches!(err, PlanError::NotADirectory { .. }), "{err}");
    let err = write_atomically(&target, "x").unwrap_err();
    assert!(err.to_string().contains("plain-file"), "{err}");
    assert_eq!(std::fs::read_to_string(&file).unwrap(), "not a directory");
}

#[test]
fn atomic_write_replaces_and_leaves_no_temporary_file() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("plan.md");
    std::fs::write(&target, "old").unwrap();
    write_atomically(&target, "new contents").unwrap();
    assert_eq!(std::fs::read_to_string(&target).unwrap(), "new contents");
    let names: Vec<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names, vec!["plan.md".to_string()]);
}

#[test]
fn a_directory_as_target_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let err = check_writable(dir.path()).unwrap_err();
    assert!(matches!(err, PlanError::TargetIsDirectory { .. }), "{err}");
}

#[test]
fn chelating_groups_are_found_in_kekule_and_aromatic_spellings() {
    // every pattern compiles
    for (p, _) in CHELATING_PATTERNS {
        assert!(crate::structure::smarts::Pattern::new(p).is_ok(), "{p}");
    }
    // catechol, aromatic and Kekulé
    assert_eq!(chelating_group("Oc1ccccc1O"), Some("catechol"));
    assert_eq!(chelating_group("OC1=CC=CC=C1O"), Some("catechol"));
    // phenol and anisole-like ethers are not catechols
    assert_eq!(chelating_group("Oc1ccccc1"), None);
    assert_eq!(chelating_group("COc1ccccc1OC"), None);
    assert_eq!(
        chelating_group("OP(=O)(O)OC"),
        Some("phosphate or phosphonate")
    );
    assert_eq!(chelating_group("CC(=O)NO"), Some("hydroxamic acid"));
    assert_eq!(
        chelating_group("Oc1cccc2cccnc12"),
        Some("8-hydroxyquinoline")
    );
    assert_eq!(
        chelating_group("OC1=CC=CC2=C1N=CC=C2"),
        Some("8-hydroxyquinoline")
    );
    // 3-hydroxypyridine has no fused carbon: not flagged
    assert_eq!(chelating_group("Oc1cccnc1"), None);
    assert_eq!(chelating_group("not a smiles"), None);
}

fn lc_report() -> AdviceReport {
    serde_json::from_str(include_str!(
        "../../../tests/data/plan/lc_impurity_panel.json"
    ))
    .unwrap()
}

fn set_ks(report: &mut AdviceReport, ks: &[f64]) {
    let rec = &mut report.recommendations[0];
    for (p, k) in rec.predictions.iter_mut().zip(ks.iter().cycle()) {
        p.retention_factor = *k;
    }
}

#[test]
fn k_range_below_one_is_a_miss_with_the_analyte_named() {
    // the case: predicted k from 0.45 to 6.29 against the 1 to 20 target
    let mut r = lc_report();
    set_ks(&mut r, &[0.45, 6.29]);
    let rows = target_rows(r.recommendations.first());
    let k = rows
        .iter()
        .find(|x| x.quantity.starts_with("Retention factor"))
        .unwrap();
    assert_eq!(k.verdict, Verdict::Misses);
    assert_eq!(k.predicted, "0.45 to 6.29");
    let low = &r.recommendations[0].predictions[0].analyte;
    assert!(
        k.reason.contains(low.as_str()) && k.reason.contains("below 1"),
        "{}",
        k.reason
    );
    // a strongly retained class (k up to 105) misses on the other side
    set_ks(&mut r, &[3.0, 105.0]);
    let rows = target_rows(r.recommendations.first());
    let k = rows
        .iter()
        .find(|x| x.quantity.starts_with("Retention factor"))
        .unwrap();
    assert_eq!(k.verdict, Verdict::Misses);
    assert!(k.reason.contains("above 20"), "{}", k.reason);
    // inside the range: meets
    set_ks(&mut r, &[1.5, 12.0]);
    let rows = target_rows(r.recommendations.first());
    assert_eq!(rows[1].verdict, Verdict::Meets);
}

#[test]
fn every_target_row_has_a_verdict_and_a_reason() {
    let mut r = lc_report();
    for rs in [2.5, 1.7, 0.8] {
        r.recommendations[0].critical_resolution = Some(rs);
        let rows = target_rows(r.recommendations.first());
        assert_eq!(rows.len(), 5);
        assert!(rows.iter().all(|x| !x.reason.is_empty()));
        let expect = if rs >= 1.5 {
            Verdict::Meets
        } else {
            Verdict::Misses
        };
        assert_eq!(rows[0].verdict, expect, "Rs {rs}");
    }
    // nothing predicted: every row is "not evaluated", none claims a pass
    let rows = target_rows(None);
    assert!(rows.iter().all(|x| x.verdict == Verdict::NotEvaluated));
}

#[test]
fn document_control_fills_given_entries_and_leaves_blanks_to_fill() {
    let r = lc_report();
    let opts = PlanOptions {
        title: "t".into(),
        date: Some("2026-12-04".into()),
    };
    let ctl = DocumentControl {
        document_id: Some("INV-PLAN-007".into()),
        author: Some("A. Analyst (invented)".into()),
        kb_checksum: Some("kb0123abcd".into()),
        matrix: Some("invented tablet blend".into()),
        ..DocumentControl::default()
    };
    let md = render_markdown_with(&r, &opts, &ctl);
    let html = render_html_with(&r, &opts, &ctl);
    for text in [&md, &html] {
        for needle in [
            "INV-PLAN-007",
            "draft 0.1",
            "2026-12-04",
            "kb0123abcd",
            "invented tablet blend",
            "reviewer",
            "approver",
            "Analytical target profile",
            "Sample and standard preparation",
            "Scouting design",
            "Equilibration, blanks and carry-over",
            "Robustness and validation outline",
            "ICH Q2(R2)",
            "to be completed",
        ] {
            assert!(text.contains(needle), "{needle} missing");
        }
    }
    // Markdown and HTML are twins: the same headings in the same order
    let md_heads: Vec<String> = md
        .lines()
        .filter(|l| l.starts_with('#'))
        .map(|l| l.trim_start_matches('#').trim().replace('\\', ""))
        .collect();
    let html_heads: Vec<String> = html
        .split("<h")
        .skip(1)
        .filter(|s| s.starts_with(|c: char| c.is_ascii_digit()))
        .filter_map(|s| {
            s.split_once('>')
                .and_then(|(_, r)| r.split_once("</h"))
                .map(|x| x.0)
        })
        .map(|s| s.replace("&amp;", "&"))
        .collect();
    assert_eq!(md_heads, html_heads);
}

#[test]
fn cautions_are_plain_sentences_without_topic_ids_and_never_twice() {
    use crate::report::advice::Caution;
    let mut r = lc_report();
    r.cautions = vec![
        Caution {
            topic: "solvent".into(),
            text: "acetonitrile is toxic and flammable".into(),
        },
        Caution {
            topic: "solvent".into(),
            text: "acetonitrile is toxic and flammable".into(),
        },
        Caution {
            topic: "general".into(),
            text:
                "these are starting points to verify by experiment; the lab's SOPs take precedence"
                    .into(),
        },
    ];
    let md = render_markdown(&r, &PlanOptions::default());
    let cautions = &md[md.find("## 9 Cautions").unwrap()..md.find("## 10 References").unwrap()];
    assert!(
        !cautions.contains("solvent:") && !cautions.contains("general:"),
        "{cautions}"
    );
    assert_eq!(
        cautions
            .matches("Acetonitrile is toxic and flammable.")
            .count(),
        1
    );
    assert_eq!(cautions.matches("take precedence").count(), 1, "{cautions}");
}

#[test]
fn backup_changes_are_sentences_not_a_side_by_side_table() {
    let r = lc_report();
    assert!(r.backup.as_ref().is_some_and(|b| !b.changes.is_empty()));
    let md = render_markdown(&r, &PlanOptions::default());
    assert!(!md.contains("Rs, first choice") && !md.contains("Rs, back-up"));
    assert!(md.contains("on the back-up ("), "{md}");
    // the targets table names its sources once, as numbered notes
    let st = &md[md.find("## 7 System").unwrap()..md.find("## 8 Robustness").unwrap()];
    assert!(st.contains("| \\[1\\] |"), "{st}");
    assert_eq!(
        st.matches("- \\[1\\] general chromatography chapters")
            .count(),
        1,
        "{st}"
    );
}

#[test]
fn a_buffer_catalogue_id_is_not_shown_as_the_buffer() {
    // the advisor stores the catalogue id (`phosphate-1`) beside the recipe; the plan shows
    // the recipe in words and names the id only as a reference (issue 16)
    let mut r = lc_report();
    let c = &mut r.recommendations[0].conditions;
    c.buffer = Some("phosphate-1".into());
    c.buffer_preparation = Some(
        "20 mM potassium phosphate, adjusted to pH 2.5 with phosphoric acid; measure the pH \
         of the aqueous part before adding organic solvent"
            .into(),
    );
    let opts = PlanOptions {
        title: "t".into(),
        date: None,
    };
    let md = render_markdown(&r, &opts);
    let row = md
        .lines()
        .find(|l| l.starts_with("| Buffer or additive |"))
        .expect("buffer row");
    assert!(row.contains("20 mM potassium phosphate"), "{row}");
    assert!(row.contains("buffer id phosphate-1"), "{row}");
    assert!(!md.contains("| Buffer or additive | phosphate-1"), "{row}");
}

#[test]
fn print_style_is_a4_and_keeps_headings_with_what_follows() {
    // print-to-PDF review (issue 16): a section heading and its one-line introduction were left
    // at the foot of a page, the table on the next
    let html = render_html(
        &lc_report(),
        &PlanOptions {
            title: "t".into(),
            date: None,
        },
    );
    let print = &html[html.find("@media print").expect("print style")..];
    assert!(print.contains("size:A4"));
    assert!(print.contains("h2,h3{page-break-after:avoid;break-after:avoid}"));
    assert!(print.contains("h2+p,h3+p{page-break-after:avoid;break-after:avoid}"));
    assert!(print.contains("table,tr{page-break-inside:avoid}"));
}
