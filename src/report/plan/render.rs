//! Markdown and HTML writers of the plan's blocks (twins: both from one block list).

use std::fmt::Write as _;

use super::control::DocumentControl;
use super::{Block, PlanOptions, plan_blocks_with};
use crate::report::advice::AdviceReport;
use crate::report::chromatogram::escape_xml;

/// Escape text for Markdown: HTML-significant characters become entities, Markdown
/// punctuation is backslash-escaped, line breaks become spaces.
pub(super) fn md_escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '\\' | '`' | '*' | '_' | '[' | ']' | '|' | '#' => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            c if c.is_control() => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// Render the plan as one self-contained Markdown file (the chromatograms are inline SVG
/// blocks; every table is also given as text).
pub fn render_markdown(report: &AdviceReport, opts: &PlanOptions) -> String {
    render_markdown_with(report, opts, &DocumentControl::default())
}

/// [`render_markdown`] with the document-control entries.
pub fn render_markdown_with(
    report: &AdviceReport,
    opts: &PlanOptions,
    ctl: &DocumentControl,
) -> String {
    let mut s = String::new();
    for block in plan_blocks_with(report, opts, ctl) {
        match block {
            Block::Heading(level, text) => {
                let _ = writeln!(s, "{} {}\n", "#".repeat(level as usize), md_escape(&text));
            }
            Block::Para(text) => {
                let _ = writeln!(s, "{}\n", md_escape(&text));
            }
            Block::List(items) => {
                for i in items {
                    let _ = writeln!(s, "- {}", md_escape(&i));
                }
                s.push('\n');
            }
            Block::Table { header, rows } => {
                let h: Vec<String> = header.iter().map(|c| md_escape(c)).collect();
                let _ = writeln!(s, "| {} |", h.join(" | "));
                let _ = writeln!(s, "|{}", "---|".repeat(h.len()));
                for r in rows {
                    let cells: Vec<String> = r.iter().map(|c| md_escape(c)).collect();
                    let _ = writeln!(s, "| {} |", cells.join(" | "));
                }
                s.push('\n');
            }
            Block::Svg { svg, caption } => {
                // CommonMark HTML block: starts with the complete <svg> tag on its own line and
                // runs to the next blank line, so the SVG must hold none.
                let body: String = svg
                    .lines()
                    .filter(|l| !l.trim().is_empty())
                    .collect::<Vec<_>>()
                    .join("\n");
                let _ = writeln!(s, "{body}\n");
                let _ = writeln!(s, "*{}*\n", md_escape(&caption));
            }
        }
    }
    while s.ends_with("\n\n") {
        s.pop();
    }
    s
}

/// Inline style sheet of the HTML plan: print-friendly, black on white.
const CSS: &str = "body{font-family:sans-serif;max-width:1040px;margin:1.5em auto;padding:0 1em;\
color:#000;background:#fff;line-height:1.4}\
h1{font-size:1.6em;border-bottom:2px solid #000;padding-bottom:.2em}\
h2{font-size:1.25em;border-bottom:1px solid #000;margin-top:1.6em}\
h3{font-size:1.05em;margin-top:1.2em}\
table{border-collapse:collapse;margin:.6em 0;font-size:.9em}\
th,td{border:1px solid #000;padding:.25em .5em;text-align:left;vertical-align:top}\
th{background:#eee}\
figure{margin:1em 0}figcaption{font-style:italic;font-size:.9em}\
svg{max-width:100%;height:auto}\
@media print{@page{size:A4;margin:16mm 14mm}body{max-width:none;margin:0;padding:0;font-size:10pt}\
h2,h3{page-break-after:avoid;break-after:avoid}h2+p,h3+p{page-break-after:avoid;break-after:avoid}figure,table,tr{page-break-inside:avoid}td,th{overflow-wrap:break-word}}";

/// Render the plan as one self-contained HTML file (inline CSS and SVG, no scripts, no
/// external resources).
pub fn render_html(report: &AdviceReport, opts: &PlanOptions) -> String {
    render_html_with(report, opts, &DocumentControl::default())
}

/// [`render_html`] with the document-control entries.
pub fn render_html_with(
    report: &AdviceReport,
    opts: &PlanOptions,
    ctl: &DocumentControl,
) -> String {
    let mut s = String::new();
    s.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    let _ = writeln!(s, "<title>{}</title>", escape_xml(&opts.title));
    let _ = writeln!(s, "<style>{CSS}</style>\n</head>\n<body>");
    for block in plan_blocks_with(report, opts, ctl) {
        match block {
            Block::Heading(level, text) => {
                let _ = writeln!(s, "<h{level}>{}</h{level}>", escape_xml(&text));
            }
            Block::Para(text) => {
                let _ = writeln!(s, "<p>{}</p>", escape_xml(&text));
            }
            Block::List(items) => {
                s.push_str("<ul>\n");
                for i in items {
                    let _ = writeln!(s, "<li>{}</li>", escape_xml(&i));
                }
                s.push_str("</ul>\n");
            }
            Block::Table { header, rows } => {
                s.push_str("<table>\n<thead><tr>");
                for h in header {
                    let _ = write!(s, "<th>{}</th>", escape_xml(&h));
                }
                s.push_str("</tr></thead>\n<tbody>\n");
                for r in rows {
                    s.push_str("<tr>");
                    for c in r {
                        let _ = write!(s, "<td>{}</td>", escape_xml(&c));
                    }
                    s.push_str("</tr>\n");
                }
                s.push_str("</tbody>\n</table>\n");
            }
            Block::Svg { svg, caption } => {
                let _ = writeln!(
                    s,
                    "<figure>\n{svg}<figcaption>{}</figcaption>\n</figure>",
                    escape_xml(&caption)
                );
            }
        }
    }
    s.push_str("</body>\n</html>\n");
    s
}
