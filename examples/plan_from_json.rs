//! Renders a method plan (HTML or Markdown) from a saved advice report (`phasewise advise
//! --format json` output), for looking at plans and figures in a browser without a knowledge
//! base, e.g. the invented panels in tests/data/plan/:
//!
//! `cargo run --example plan_from_json -- tests/data/plan/lc_impurity_panel.json plan.html`

use std::process::ExitCode;

use phasewise::report::advice::AdviceReport;
use phasewise::report::plan::{
    DocumentControl, PlanOptions, render_html_with, render_markdown_with,
};

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let [input, output] = args.as_slice() else {
        eprintln!("usage: plan_from_json ADVICE.json OUT.html|OUT.md");
        return ExitCode::from(2);
    };
    let text = match std::fs::read_to_string(input) {
        Ok(t) => t,
        Err(e) => {
            eprintln!("{input}: {e}");
            return ExitCode::from(2);
        }
    };
    let report: AdviceReport = match serde_json::from_str(&text) {
        Ok(r) => r,
        Err(e) => {
            eprintln!("{input}: not an advice report: {e}");
            return ExitCode::from(2);
        }
    };
    let opts = PlanOptions {
        title: "Method development plan (invented panel)".to_string(),
        date: Some("2026-12-04".to_string()),
    };
    let ctl = DocumentControl::default();
    let out = if output.ends_with(".md") {
        render_markdown_with(&report, &opts, &ctl)
    } else {
        render_html_with(&report, &opts, &ctl)
    };
    if let Err(e) = std::fs::write(output, out) {
        eprintln!("{output}: {e}");
        return ExitCode::from(1);
    }
    ExitCode::SUCCESS
}
