//! The `kb stats` report: counts of the shipped base and the user overlay by property, kind,
//! source and licence, as a table or CSV/TSV (JSON is the serde form of [`KbStats`]).

use crate::kb::stats::KbStats;
use crate::report::csv_cell;
use crate::report::table::render;

/// The `kb stats` table.
pub fn stats_table(s: &KbStats) -> String {
    let mut out = format!(
        "Shipped base {} ({} compounds, {} names, {} property rows, {:.1} MB)\n",
        s.shipped.path,
        s.shipped.compounds,
        s.shipped.names,
        s.shipped.properties,
        s.shipped.size_bytes as f64 / 1.0e6
    );
    let rows: Vec<Vec<String>> = s
        .shipped
        .properties_by_source
        .iter()
        .chain(s.user.iter().flat_map(|u| u.properties_by_source.iter()))
        .map(|p| {
            vec![
                p.property.clone(),
                p.kind.clone(),
                p.source.clone(),
                p.licence.clone(),
                p.count.to_string(),
            ]
        })
        .collect();
    if let Some(u) = &s.user {
        out.push_str(&format!(
            "User overlay {} ({} compounds, {} property rows)\n",
            u.path, u.compounds, u.properties
        ));
    } else {
        out.push_str("User overlay: none yet\n");
    }
    out.push('\n');
    out.push_str(&render(
        &["property", "kind", "source or method", "licence", "rows"],
        &rows,
    ));
    out.push('\n');
    out
}

/// The `kb stats` rows, one per database, property, kind, source and licence, with `delim`
/// between the cells (`,` or a tab).
pub fn stats_delimited(s: &KbStats, d: char) -> String {
    let cell = |x: &str| csv_cell(x, d);
    let mut t = ["database", "property", "kind", "source", "licence", "rows"].join(&d.to_string());
    t.push('\n');
    let dbs = std::iter::once(("shipped", &s.shipped)).chain(s.user.iter().map(|u| ("user", u)));
    for (db, stats) in dbs {
        for p in &stats.properties_by_source {
            t.push_str(&format!(
                "{db}{d}{}{d}{}{d}{}{d}{}{d}{}\n",
                cell(&p.property),
                cell(&p.kind),
                cell(&p.source),
                cell(&p.licence),
                p.count
            ));
        }
    }
    t
}
