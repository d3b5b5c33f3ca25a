//! The `model eval` report: medians and quartiles of the cross-validation metrics.

use super::{Render, num};
use crate::model::eval::EvalReport;
use crate::report::table::render;

impl Render for EvalReport {
    fn table(&self) -> String {
        eval_table(self)
    }
    fn markdown(&self) -> Option<String> {
        Some(format!("{}\n", self.to_markdown()))
    }
}

fn eval_table(r: &EvalReport) -> String {
    let rows: Vec<Vec<String>> = r
        .summary
        .iter()
        .map(|(k, m)| {
            let mut parts: Vec<String> = k.splitn(3, '/').map(str::to_string).collect();
            parts.resize(3, String::new());
            parts.extend([
                num(Some(m.median), 3),
                num(Some(m.q25), 3),
                num(Some(m.q75), 3),
            ]);
            parts
        })
        .collect();
    let mut s = format!(
        "Leave-whole-systems-out cross-validation: {} folds, seed {}, {} held-out systems; baseline descriptor `{}`\n",
        r.folds,
        r.seed,
        r.systems.len(),
        r.baseline_descriptor
    );
    s.push_str(&render(
        &["mode", "method", "metric", "median", "25th pct", "75th pct"],
        &rows,
    ));
    s.push_str(
        "\nmetrics: spearman (–), order_accuracy (fraction), mae_min (min), mae_pct_gradient (%), coelution_auc (–)\n",
    );
    s
}
