//! Method-plan renderers (`report::plan`, `report::chromatogram`) on two invented panels
//! (tests/data/plan/, see README.md there): snapshots of the Markdown and HTML, a parse of the
//! SVG that checks every peak apex and label, escaping of hostile names, and determinism.

use phasewise::report::advice::{AdviceReport, Recommendation};
use phasewise::report::chromatogram::{escape_xml, render_svg};
use phasewise::report::plan::{PlanOptions, render_html, render_markdown};

fn load(name: &str) -> AdviceReport {
    let path = format!("{}/tests/data/plan/{name}", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path).unwrap();
    serde_json::from_str(&text).unwrap()
}

fn opts(title: &str) -> PlanOptions {
    PlanOptions {
        title: title.to_string(),
        date: None,
    }
}

const LC_TITLE: &str = "Method plan (invented panel: an invented lab's process impurity screen)";
const GC_TITLE: &str = "Method plan (invented panel: an invented lab's residual-solvent screen)";

#[test]
fn lc_panel_markdown_matches_snapshot() {
    insta::assert_snapshot!(
        "lc_plan_markdown",
        render_markdown(&load("lc_impurity_panel.json"), &opts(LC_TITLE))
    );
}

#[test]
fn lc_panel_html_matches_snapshot() {
    insta::assert_snapshot!(
        "lc_plan_html",
        render_html(&load("lc_impurity_panel.json"), &opts(LC_TITLE))
    );
}

#[test]
fn gc_panel_markdown_matches_snapshot() {
    insta::assert_snapshot!(
        "gc_plan_markdown",
        render_markdown(&load("gc_solvent_panel.json"), &opts(GC_TITLE))
    );
}

#[test]
fn gc_panel_html_matches_snapshot() {
    insta::assert_snapshot!(
        "gc_plan_html",
        render_html(&load("gc_solvent_panel.json"), &opts(GC_TITLE))
    );
}

/// Value of attribute `name` in one element's text (the renderer writes `name="value"`).
fn attr<'a>(element: &'a str, name: &str) -> Option<&'a str> {
    let key = format!(" {name}=\"");
    let start = element.find(&key)? + key.len();
    let len = element[start..].find('"')?;
    Some(&element[start..start + len])
}

/// Every element `<tag ...>` with `class="class"`, as the text from `<` to the closing `>`.
fn elements<'a>(svg: &'a str, tag: &str, class: &str) -> Vec<&'a str> {
    let open = format!("<{tag} ");
    let mut out = Vec::new();
    let mut rest = svg;
    while let Some(i) = rest.find(&open) {
        let tail = &rest[i..];
        let end = tail.find('>').map(|e| e + 1).unwrap_or(tail.len());
        let el = &tail[..end];
        if attr(el, "class") == Some(class) {
            out.push(el);
        }
        rest = &tail[end..];
    }
    out
}

/// The (x, y) points of an `M x y L x y ...` path.
fn path_points(d: &str) -> Vec<(f64, f64)> {
    let nums: Vec<f64> = d
        .split_whitespace()
        .filter(|t| *t != "M" && *t != "L" && *t != "Z")
        .map(|t| t.parse().unwrap())
        .collect();
    nums.chunks(2).map(|c| (c[0], c[1])).collect()
}

fn check_apexes_and_labels(rec: &Recommendation) {
    let svg = render_svg(rec, "test plot");
    let root = &svg[..svg.find('>').unwrap()];
    let x0: f64 = attr(root, "data-x-origin-px").unwrap().parse().unwrap();
    let ppm: f64 = attr(root, "data-px-per-min").unwrap().parse().unwrap();
    let one_pixel_min = 1.0 / ppm;
    let peaks = elements(&svg, "path", "peak");
    let labels = elements(&svg, "text", "label");
    assert_eq!(peaks.len(), rec.predictions.len());
    for p in &rec.predictions {
        let name = escape_xml(&p.analyte);
        let peak = peaks
            .iter()
            .find(|e| attr(e, "data-analyte") == Some(name.as_str()))
            .unwrap_or_else(|| panic!("no peak for {}", p.analyte));
        let pts = path_points(attr(peak, "d").unwrap());
        // SVG y grows downwards: the apex is the smallest y (ties: the first).
        let apex = pts
            .iter()
            .copied()
            .reduce(|a, b| if b.1 < a.1 { b } else { a })
            .unwrap();
        let apex_min = (apex.0 - x0) / ppm;
        assert!(
            (apex_min - p.retention_time_min).abs() <= one_pixel_min,
            "{}: apex at {apex_min} min, predicted {} min (one pixel = {one_pixel_min} min)",
            p.analyte,
            p.retention_time_min
        );
        assert!(
            labels
                .iter()
                .any(|e| attr(e, "data-analyte") == Some(name.as_str())),
            "no label for {}",
            p.analyte
        );
    }
    // Labels in one tier (same y) must not overlap, at the renderer's width estimate of
    // 6.6 px per character plus 8 px padding (text of each label read back from the SVG).
    let mut spans: Vec<(String, f64, f64)> = Vec::new();
    for el in &labels {
        let start = svg.find(el).unwrap() + el.len();
        let text_len = svg[start..].find("</text>").unwrap();
        let chars = svg[start..start + text_len].chars().count() as f64;
        let x: f64 = attr(el, "x").unwrap().parse().unwrap();
        let w = chars * 6.6 + 8.0;
        spans.push((attr(el, "y").unwrap().to_string(), x - w / 2.0, x + w / 2.0));
    }
    for (i, a) in spans.iter().enumerate() {
        for b in &spans[i + 1..] {
            if a.0 == b.0 {
                assert!(
                    a.2 <= b.1 + 1e-6 || b.2 <= a.1 + 1e-6,
                    "labels overlap: {a:?} {b:?}"
                );
            }
        }
    }
}

#[test]
fn every_analyte_has_a_peak_apex_at_its_predicted_time_and_a_label() {
    for file in ["lc_impurity_panel.json", "gc_solvent_panel.json"] {
        let report = load(file);
        for rec in &report.recommendations {
            check_apexes_and_labels(rec);
        }
        check_apexes_and_labels(&report.backup.as_ref().unwrap().recommendation);
    }
}

#[test]
fn co_eluting_pairs_are_bracketed_drawn_heavy_and_shown_close_up() {
    let report = load("gc_solvent_panel.json");
    let svg = render_svg(&report.recommendations[0], "x");
    for name in ["p-xylene", "m-xylene"] {
        let peak = elements(&svg, "path", "peak")
            .into_iter()
            .find(|e| attr(e, "data-analyte") == Some(name))
            .unwrap();
        assert_eq!(attr(peak, "data-risk"), Some("true"), "{peak}");
        assert_eq!(attr(peak, "stroke-width"), Some("2.2"), "{peak}");
    }
    assert!(svg.contains("class=\"risk-bracket\""));
    assert!(svg.contains("close-up: "));
    let toluene = elements(&svg, "path", "peak")
        .into_iter()
        .find(|e| attr(e, "data-analyte") == Some("toluene"))
        .unwrap();
    assert_eq!(attr(toluene, "data-risk"), Some("false"));
    assert!(svg.contains("retention time (min)") && svg.contains("relative response"));
    // the oven program is drawn on the second axis
    assert!(svg.contains("class=\"program\"") && svg.contains("oven temperature"));
}

const HOSTILE: &str = "<script>alert(1)</script> \"quotes\" & ampersands";

fn hostile_report() -> AdviceReport {
    let text = std::fs::read_to_string(format!(
        "{}/tests/data/plan/lc_impurity_panel.json",
        env!("CARGO_MANIFEST_DIR")
    ))
    .unwrap();
    // The name is JSON-escaped so it can be swapped in everywhere "compound A" appears.
    let hostile_json = serde_json::to_string(HOSTILE).unwrap();
    let swapped = text
        .replace("\"compound A\"", &hostile_json)
        .replace("\"impurity B\"", "\"impurity|B\\nsecond line\"");
    serde_json::from_str(&swapped).unwrap()
}

#[test]
fn hostile_names_are_escaped_in_html_and_svg() {
    let report = hostile_report();
    let html = render_html(&report, &opts("plan <b>title</b>"));
    assert!(!html.contains("<script"), "raw script tag in HTML");
    assert!(!html.contains("<b>"), "raw tag from the title in HTML");
    assert!(
        html.contains("&lt;script&gt;alert(1)&lt;/script&gt; &quot;quotes&quot; &amp; ampersands")
    );
    let svg = render_svg(&report.recommendations[0], HOSTILE);
    assert!(!svg.contains("<script"), "raw script tag in SVG");
    assert!(svg.contains(
        "data-analyte=\"&lt;script&gt;alert(1)&lt;/script&gt; &quot;quotes&quot; &amp; ampersands\""
    ));
    // Self-contained: no scripts, links or external resources.
    for bad in ["<link", " src=", " href=", "http://", "https://"] {
        let allowed = bad == "http://"
            && html.matches(bad).count()
                == html.matches("xmlns=\"http://www.w3.org/2000/svg\"").count();
        assert!(!html.contains(bad) || allowed, "HTML contains {bad}");
    }
}

#[test]
fn markdown_escapes_pipes_newlines_and_markup() {
    let md = render_markdown(&hostile_report(), &opts("plan"));
    assert!(!md.contains("<script"));
    assert!(md.contains("&lt;script&gt;alert(1)&lt;/script&gt;"));
    assert!(md.contains("impurity\\|B second line"));
    // Every table row of the scope table keeps its column count: count unescaped pipes.
    let unescaped = |line: &str| {
        let b = line.as_bytes();
        (0..b.len())
            .filter(|&i| b[i] == b'|' && (i == 0 || b[i - 1] != b'\\'))
            .count()
    };
    let header = md
        .lines()
        .find(|l| l.starts_with("| Analyte | InChIKey"))
        .unwrap();
    let n = unescaped(header);
    let row = md
        .lines()
        .find(|l| l.starts_with("| impurity\\|B"))
        .unwrap();
    assert_eq!(unescaped(row), n, "{row}");
}

#[test]
fn rendering_is_deterministic_apart_from_the_date_line() {
    for file in ["lc_impurity_panel.json", "gc_solvent_panel.json"] {
        let report = load(file);
        let o = opts("t");
        assert_eq!(render_html(&report, &o), render_html(&report, &o));
        assert_eq!(render_markdown(&report, &o), render_markdown(&report, &o));
        let dated = PlanOptions {
            date: Some("2026-12-01".to_string()),
            ..o.clone()
        };
        let a = render_markdown(&report, &o);
        let b = render_markdown(&report, &dated);
        assert_ne!(a, b);
        // the date appears twice (date line, document-control row) and nowhere else
        assert_eq!(
            b.replace("Date: 2026-12-01\n\n", "").replace(
                "| date written | 2026-12-01 |",
                "| date written | not recorded (written with the date off) |"
            ),
            a
        );
    }
}

#[test]
fn both_formats_have_the_ten_sections() {
    let report = load("lc_impurity_panel.json");
    let md = render_markdown(&report, &opts("t"));
    let html = render_html(&report, &opts("t"));
    for (i, name) in [
        "Scope",
        "Decision",
        "Starting conditions",
        "Predicted chromatogram",
        "Scouting design",
        "Risks",
        "System suitability targets",
        "Robustness and validation outline",
        "Cautions",
        "References",
    ]
    .iter()
    .enumerate()
    {
        assert!(
            md.contains(&format!("\n## {} {name}\n", i + 1)),
            "Markdown lacks {name}"
        );
        assert!(
            html.contains(&format!("<h2>{} {name}</h2>", i + 1)),
            "HTML lacks {name}"
        );
    }
    assert_eq!(
        html.matches("<svg ").count(),
        2,
        "first choice and back-up plots"
    );
    assert_eq!(md.matches("\n<svg ").count(), 2);
}

mod random_predictions {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(48))]

        /// Any finite set of predictions: no panic, one peak and one label per analyte, each
        /// apex within one pixel of its time, no NaN or infinity written into the SVG.
        #[test]
        fn apexes_stay_within_one_pixel(
            rows in proptest::collection::vec((0.0f64..90.0, 0.002f64..3.0, 0.0f64..5.0), 1..12),
        ) {
            let report = load("lc_impurity_panel.json");
            let mut rec = report.recommendations[0].clone();
            let template = rec.predictions[0].clone();
            rec.predictions = rows
                .iter()
                .enumerate()
                .map(|(i, (t, w, half))| {
                    let mut p = template.clone();
                    p.analyte = format!("analyte {i}");
                    p.retention_time_min = *t;
                    p.peak_width_half_min = *w;
                    p.interval_low_min = t - half;
                    p.interval_high_min = t + half;
                    p
                })
                .collect();
            rec.coelutions.clear();
            let svg = render_svg(&rec, "random");
            prop_assert!(!svg.contains("NaN") && !svg.contains("inf"));
            check_apexes_and_labels(&rec);
        }
    }
}

#[test]
fn aromatic_analytes_stored_as_kekule_smiles_get_no_weak_uv_note() {
    // The knowledge base stores Kekulé SMILES (upper case); the plan read aromaticity from
    // lower-case letters and called every such analyte "no aromatic ring".
    let mut report = load("lc_impurity_panel.json");
    let kekule = "O=C(NC1=CC=C(Cl)C=C1)C1CCN(C)CC1"; // compound A, written in Kekulé form
    let a = &mut report.analytes[0];
    a.smiles = Some(kekule.to_string());
    let name = a.name.clone();
    // An analyte without an aromatic ring (its ring saturated, as an invented variant) is still
    // flagged.
    let b = &mut report.analytes[1];
    b.smiles = Some("O=C(NC1CCCCC1)C1CCN(C)CC1".to_string());
    let plain = b.name.clone();
    let md = render_markdown(&report, &opts(LC_TITLE));
    assert!(
        !md.contains(&format!("{name}: no aromatic ring")),
        "{name} ({kekule}) was called non-aromatic"
    );
    assert!(md.contains(&format!("{plain}: no aromatic ring")), "{md}");
}

#[test]
fn charges_that_round_to_zero_print_without_a_sign() {
    // A stored charge of −0.0 and a net charge of −0.0004 e printed as "-0 e" in the Scope table.
    let mut report = load("lc_impurity_panel.json");
    for a in &mut report.analytes {
        for p in a.properties.iter_mut().filter(|p| p.property == "charge") {
            p.value = -0.0;
        }
        if let Some(ion) = a.ionisation.as_mut() {
            ion.net_charge_e = -0.0004;
        }
    }
    for text in [
        render_markdown(&report, &opts(LC_TITLE)),
        render_html(&report, &opts(LC_TITLE)),
    ] {
        assert!(!text.contains("-0 e"), "negative zero in the plan");
        assert!(text.contains("net charge 0 e"));
    }
}
