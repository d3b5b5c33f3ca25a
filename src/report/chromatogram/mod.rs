//! The predicted chromatogram of one recommendation as a self-contained SVG image.
//!
//! Each analyte is drawn as a Gaussian peak of unit height (equal response is assumed: the
//! heights say nothing about amounts) at its predicted retention time, with σ = w½ / 2.355
//! (w½ = width at half height; for a Gaussian w½ = 2·√(2 ln 2)·σ ≈ 2.355 σ, textbook
//! relation, from memory). Below the trace, each peak's prediction interval is a bar on its own
//! labelled row. Pairs at risk of co-elution are drawn in the project's own way: both peaks
//! with a heavy outline, joined by a bracket above their apexes that carries the predicted
//! resolution, and shown again in a close-up panel. The gradient or oven program is drawn
//! against a second axis on the right. The time axis ends a margin after the last peak (not at
//! the end of the program). Labels are stacked in tiers with leader lines so that they never
//! overlap, and the legend lists only what the image draws.
//! Meaning is carried by line style, pattern and text, never by colour alone, so the picture
//! reads in black and white. Numbers are written with fixed decimals, so the same
//! recommendation always gives the same bytes.
//!
//! The root element carries `data-x-origin-px` and `data-px-per-min`, and every peak path
//! carries `data-analyte` and `data-rt-min`, so tests (and curious readers) can map pixels back
//! to minutes.

use std::collections::BTreeSet;
use std::fmt::Write as _;

use super::advice::{Coelution, PredictionRow, Recommendation};

mod detail;
mod optimum;
#[cfg(test)]
mod tests;

use detail::{DETAIL_GAP_PX, DETAIL_HEIGHT_PX, DETAIL_WIDTH_PX, detail_windows, draw_detail};
pub use optimum::{render_gc_optimum_svg, render_optimum_svg};

/// Width of the image, px.
const WIDTH_PX: f64 = 960.0;
/// Left margin (y-axis ticks and title), px.
const LEFT_PX: f64 = 72.0;
/// Right margin, px.
const RIGHT_PX: f64 = 64.0;
/// Height of the plotting area, px.
const PLOT_HEIGHT_PX: f64 = 260.0;
/// Vertical distance between label tiers, px.
const TIER_PX: f64 = 14.0;
/// Estimated width of one label character at font size 11, px (generous, so that labels
/// that are placed apart really are apart).
const CHAR_PX: f64 = 6.6;
/// Gaussian width at half height over σ: 2·√(2 ln 2) (from memory).
const FWHM_PER_SIGMA: f64 = 2.354_820_045;

/// Escape a string for XML/HTML text and attribute values (`&`, `<`, `>`, `"`, `'`).
pub fn escape_xml(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c if c.is_control() && c != '\n' && c != '\t' => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// Fixed-decimal number for SVG coordinates (two decimals, no negative zero).
fn f2(v: f64) -> String {
    let s = format!("{v:.2}");
    if s == "-0.00" { "0.00".to_string() } else { s }
}

/// SVG path data `M x y L x y ...` through `points` (already in px), two decimals each.
fn path_data(points: impl IntoIterator<Item = (f64, f64)>) -> String {
    let mut d = String::new();
    for (i, (x, y)) in points.into_iter().enumerate() {
        let _ = write!(
            d,
            "{}{} {}",
            if i == 0 { "M " } else { " L " },
            f2(x),
            f2(y)
        );
    }
    d
}

/// A peak that can be drawn: finite, positive width.
struct Peak<'a> {
    row: &'a PredictionRow,
    sigma_min: f64,
    flagged: bool,
}

/// Names of the analytes that belong to a pair listed as at risk of co-elution.
fn flagged_names(coelutions: &[Coelution]) -> BTreeSet<&str> {
    coelutions
        .iter()
        .flat_map(|c| [c.a.as_str(), c.b.as_str()])
        .collect()
}

/// A tick step of 1, 2 or 5 × 10^n giving at most about ten intervals over `span`.
fn nice_step(span: f64) -> f64 {
    let raw = (span / 10.0).max(1e-6);
    let mag = 10f64.powf(raw.log10().floor());
    for m in [1.0, 2.0, 5.0, 10.0] {
        if m * mag >= raw {
            return m * mag;
        }
    }
    10.0 * mag
}

/// Render the predicted separation of `rec` as an SVG document titled `title`.
///
/// Analytes whose predicted time or width is not a finite positive number are not drawn;
/// they are listed under the plot as "not drawn" so that nothing disappears silently.
///
/// # Examples
///
/// ```no_run
/// # fn demo(rec: &phasewise::report::advice::Recommendation) {
/// let svg = phasewise::report::chromatogram::render_svg(rec, "Predicted separation");
/// assert!(svg.starts_with("<svg"));
/// # }
/// ```
pub fn render_svg(rec: &Recommendation, title: &str) -> String {
    let unit = rec.conditions.program_unit.to_lowercase();
    let label = if unit.contains('c') && !unit.contains('%') {
        "oven temperature (°C)".to_string()
    } else if unit.contains('%') || unit.contains("organic") || unit.contains("b") {
        "eluent strength (% B)".to_string()
    } else {
        format!("program ({})", rec.conditions.program_unit)
    };
    let points: Vec<(f64, f64)> = rec
        .conditions
        .program
        .iter()
        .filter(|p| p.time_min.is_finite() && p.value.is_finite())
        .map(|p| (p.time_min, p.value))
        .collect();
    render_chromatogram_svg(
        &ChromatogramData {
            predictions: &rec.predictions,
            coelutions: &rec.coelutions,
            run_time_min: rec.conditions.run_time_min,
            dead_time_min: rec.conditions.dead_time_min,
            id: format!("{}-{}-{}", rec.rank, rec.mode, rec.phase.id),
            subtitle: format!("{} on {}", mode_words(&rec.mode), rec.phase.name),
            risk_legend: "pair at risk of co-elution (see Risks), predicted Rs".to_string(),
            program: (points.len() >= 2).then_some(ProgramTrace { points, label }),
        },
        title,
    )
}

/// Plain name of a mode id for the subtitle.
fn mode_words(mode: &str) -> String {
    match mode {
        "rp" => "reversed-phase LC".to_string(),
        "hilic" => "HILIC".to_string(),
        "gc" => "GC".to_string(),
        "ic-anion" => "anion-exchange IC".to_string(),
        "ic-cation" => "cation-exchange IC".to_string(),
        "ion-exclusion" => "ion-exclusion chromatography".to_string(),
        other => other.replace(['-', '_'], " "),
    }
}

/// A gradient or oven program drawn against the right-hand axis.
#[derive(Debug, Clone, PartialEq)]
pub struct ProgramTrace {
    /// (time min, value) break points, in time order.
    pub points: Vec<(f64, f64)>,
    /// Axis label with unit, e.g. "eluent strength (% B)".
    pub label: String,
}

/// What the chromatogram renderer draws, independent of where the predictions came from (an
/// advice recommendation, or the optimum of a scouting fit).
#[derive(Debug, Clone)]
pub struct ChromatogramData<'a> {
    /// One row per analyte (time, half-height width, interval).
    pub predictions: &'a [PredictionRow],
    /// Pairs to mark as at risk and to show in close-up panels.
    pub coelutions: &'a [Coelution],
    /// Run time, min (the axis follows the peaks; the run time is used only when nothing is
    /// drawn).
    pub run_time_min: f64,
    /// Dead time marked on the axis, min (not drawn when not finite or not positive).
    pub dead_time_min: f64,
    /// Text that makes ids of this image unique within one document.
    pub id: String,
    /// Subtitle before "; predicted, not measured; equal response assumed".
    pub subtitle: String,
    /// What the risk bracket means in this image (legend text).
    pub risk_legend: String,
    /// The program, drawn on the second axis.
    pub program: Option<ProgramTrace>,
}

/// A white outline drawn under a text's glyphs (`paint-order`), so that lines behind a label
/// do not strike through it.
const HALO: &str =
    " stroke=\"#fff\" stroke-width=\"3\" stroke-linejoin=\"round\" paint-order=\"stroke\"";

/// Height of the program's lowest value above the time axis, px.
const PROGRAM_BASE_PX: f64 = 12.0;

/// Gap between the highest apex and the lowest level of risk brackets, px.
const BRACKET_GAP_PX: f64 = 10.0;
/// Height of one level of risk brackets (bracket and its Rs label), px.
const BRACKET_LEVEL_PX: f64 = 15.0;
/// Estimated width of one character of a bracket's label (font size 10, bold), px.
const BRACKET_CHAR_PX: f64 = 6.4;

/// One risk bracket: the pair, its horizontal extent in px, its label and its level (0 is the
/// lowest).
#[derive(Debug, Clone, PartialEq)]
struct Bracket {
    a: String,
    b: String,
    xl: f64,
    xr: f64,
    text: String,
    level: usize,
}

/// Places one bracket per drawable pair at risk: greedy levels, left to right, so that
/// neither two brackets nor two Rs labels of one level overlap (with a 4 px gap).
fn layout_brackets(
    coelutions: &[Coelution],
    peaks: &[Peak],
    x_of: &dyn Fn(f64) -> f64,
) -> Vec<Bracket> {
    let mut out: Vec<Bracket> = Vec::new();
    for c in coelutions {
        let find = |n: &str| peaks.iter().find(|p| p.row.analyte == n);
        let (Some(pa), Some(pb)) = (find(&c.a), find(&c.b)) else {
            continue;
        };
        let (xa, xb) = (
            x_of(pa.row.retention_time_min),
            x_of(pb.row.retention_time_min),
        );
        let (xl, xr) = if xa <= xb { (xa, xb) } else { (xb, xa) };
        let (xl, xr) = if xr - xl < 8.0 {
            ((xl + xr) / 2.0 - 4.0, (xl + xr) / 2.0 + 4.0)
        } else {
            (xl, xr)
        };
        let text = if c.resolution.is_finite() {
            format!("Rs {:.2}", c.resolution)
        } else {
            "Rs ?".to_string()
        };
        out.push(Bracket {
            a: c.a.clone(),
            b: c.b.clone(),
            xl,
            xr,
            text,
            level: 0,
        });
    }
    let extent = |b: &Bracket| {
        let half = b.text.chars().count() as f64 * BRACKET_CHAR_PX / 2.0 + 2.0;
        let xm = (b.xl + b.xr) / 2.0;
        (b.xl.min(xm - half), b.xr.max(xm + half))
    };
    out.sort_by(|p, q| {
        extent(p)
            .0
            .total_cmp(&extent(q).0)
            .then_with(|| p.xr.total_cmp(&q.xr))
            .then_with(|| (&p.a, &p.b).cmp(&(&q.a, &q.b)))
    });
    let mut level_right: Vec<f64> = Vec::new();
    for b in &mut out {
        let (left, right) = extent(b);
        let level = match level_right.iter().position(|&r| r + 4.0 <= left) {
            Some(l) => l,
            None => {
                level_right.push(f64::NEG_INFINITY);
                level_right.len() - 1
            }
        };
        level_right[level] = right;
        b.level = level;
    }
    out
}

/// Row height of one interval bar, px.
const INTERVAL_ROW_PX: f64 = 13.0;

/// Value of a piecewise-linear program at `t` (held flat outside its points).
fn program_at(points: &[(f64, f64)], t: f64) -> f64 {
    let Some(&(t0, v0)) = points.first() else {
        return f64::NAN;
    };
    if t <= t0 {
        return v0;
    }
    for w in points.windows(2) {
        let ((ta, va), (tb, vb)) = (w[0], w[1]);
        if t <= tb {
            return if tb > ta {
                va + (vb - va) * (t - ta) / (tb - ta)
            } else {
                vb
            };
        }
    }
    points.last().map_or(f64::NAN, |p| p.1)
}

/// Renders [`ChromatogramData`] as an SVG document titled `title` (see [`render_svg`]).
pub fn render_chromatogram_svg(data: &ChromatogramData, title: &str) -> String {
    let flagged = flagged_names(data.coelutions);
    let mut peaks = Vec::new();
    let mut not_drawn = Vec::new();
    for row in data.predictions {
        let ok = row.retention_time_min.is_finite()
            && row.retention_time_min >= 0.0
            && row.peak_width_half_min.is_finite()
            && row.peak_width_half_min > 0.0;
        if ok {
            peaks.push(Peak {
                row,
                sigma_min: row.peak_width_half_min / FWHM_PER_SIGMA,
                flagged: flagged.contains(row.analyte.as_str()),
            });
        } else {
            not_drawn.push(row.analyte.as_str());
        }
    }
    peaks.sort_by(|a, b| {
        a.row
            .retention_time_min
            .total_cmp(&b.row.retention_time_min)
            .then_with(|| a.row.analyte.cmp(&b.row.analyte))
    });

    // Time axis: the last peak's tail or interval, plus a 10 % margin; the run time only
    // when nothing is drawn.
    let mut t_end: f64 = 0.0;
    for p in &peaks {
        t_end = t_end.max(p.row.retention_time_min + 4.0 * p.sigma_min);
        if p.row.interval_high_min.is_finite() {
            t_end = t_end.max(p.row.interval_high_min);
        }
    }
    t_end *= 1.1;
    if peaks.is_empty() && data.run_time_min.is_finite() {
        t_end = data.run_time_min.max(0.0);
    }
    if t_end <= 0.0 {
        t_end = 1.0;
    }
    let step = nice_step(t_end);
    let t_max = (t_end / step).ceil() * step;
    let plot_w = WIDTH_PX - LEFT_PX - RIGHT_PX;
    let px_per_min = plot_w / t_max;
    let x_of = |t: f64| LEFT_PX + t.clamp(0.0, t_max) * px_per_min;

    let response = |t: f64| -> f64 {
        peaks
            .iter()
            .map(|p| {
                let z = (t - p.row.retention_time_min) / p.sigma_min;
                (-0.5 * z * z).exp()
            })
            .sum()
    };
    // One point per pixel, plus points every σ/4 across each peak, so that a peak narrower
    // than a pixel still reaches its true height in the sum trace.
    let n_grid = plot_w.round() as usize;
    let mut times: Vec<f64> = (0..=n_grid)
        .map(|i| t_max * i as f64 / n_grid as f64)
        .collect();
    for p in &peaks {
        for i in -16..=16 {
            let t = p.row.retention_time_min + f64::from(i) * p.sigma_min / 4.0;
            if (0.0..=t_max).contains(&t) {
                times.push(t);
            }
        }
    }
    times.sort_by(f64::total_cmp);
    times.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
    let grid: Vec<(f64, f64)> = times.into_iter().map(|t| (t, response(t))).collect();
    let peak_sums: Vec<f64> = peaks
        .iter()
        .map(|p| response(p.row.retention_time_min))
        .collect();
    let any_risk = peaks.iter().any(|p| p.flagged);
    let brackets = layout_brackets(data.coelutions, &peaks, &x_of);
    let levels = brackets.iter().map(|b| b.level + 1).max().unwrap_or(0);
    let apex_max = grid
        .iter()
        .map(|&(_, v)| v)
        .chain(peak_sums.iter().copied())
        .fold(1.0_f64, f64::max);
    // headroom for the risk brackets: each level of brackets (pairs whose brackets or labels
    // would overlap go one level up) needs BRACKET_LEVEL_PX above the highest apex
    let headroom_px = if levels == 0 {
        0.0
    } else {
        (BRACKET_GAP_PX + levels as f64 * BRACKET_LEVEL_PX).min(0.6 * PLOT_HEIGHT_PX)
    };
    let y_top_value = (apex_max * if any_risk { 1.3 } else { 1.08 })
        .max(apex_max / (1.0 - headroom_px / PLOT_HEIGHT_PX));

    // Labels: greedy tiers, lowest tier whose previous label ends left of this one.
    let mut tier_right: Vec<f64> = Vec::new();
    let mut placed = Vec::new();
    for p in &peaks {
        let text = p.row.analyte.clone();
        let w = text.chars().count() as f64 * CHAR_PX + 8.0;
        let apex_x = x_of(p.row.retention_time_min);
        let cx = apex_x.clamp(LEFT_PX + w / 2.0, WIDTH_PX - RIGHT_PX - w / 2.0);
        let left = cx - w / 2.0;
        let tier = match tier_right.iter().position(|&r| r <= left) {
            Some(t) => t,
            None => {
                tier_right.push(f64::NEG_INFINITY);
                tier_right.len() - 1
            }
        };
        tier_right[tier] = cx + w / 2.0;
        placed.push((text, cx, tier));
    }
    let tiers = tier_right.len().max(1) as f64;
    let title_h = 44.0;
    let plot_top = title_h + tiers * TIER_PX + 12.0;
    let plot_bottom = plot_top + PLOT_HEIGHT_PX;
    let y_of = |v: f64| plot_bottom - v / y_top_value * PLOT_HEIGHT_PX;
    let intervals: Vec<&Peak> = peaks
        .iter()
        .filter(|p| {
            let (lo, hi) = (p.row.interval_low_min, p.row.interval_high_min);
            lo.is_finite() && hi.is_finite() && hi >= lo
        })
        .collect();
    let coverage = intervals
        .first()
        .map(|p| p.row.interval_coverage)
        .filter(|c| c.is_finite() && *c > 0.0 && *c <= 1.0);
    let strip_top = plot_bottom + 62.0;
    let strip_bottom = if intervals.is_empty() {
        plot_bottom + 44.0
    } else {
        strip_top + intervals.len() as f64 * INTERVAL_ROW_PX + 6.0
    };
    let t0 = data.dead_time_min;
    let t0_drawn = t0.is_finite() && t0 > 0.0 && t0 < t_max && !peaks.is_empty();
    let program = data
        .program
        .as_ref()
        .filter(|p| p.points.len() >= 2 && !peaks.is_empty());

    // Legend entries: only what is drawn.
    let mut legend: Vec<(&str, String)> = Vec::new();
    if !peaks.is_empty() {
        legend.push((
            "sum",
            "sum of all peaks (equal response assumed)".to_string(),
        ));
    }
    if peaks.len() > 1 {
        legend.push((
            "single",
            "one analyte: Gaussian, sigma = w1/2 / 2.355".to_string(),
        ));
    }
    if any_risk {
        legend.push(("risk", data.risk_legend.clone()));
    }
    if !intervals.is_empty() {
        legend.push((
            "interval",
            match coverage {
                Some(c) => format!(
                    "{:.0} % prediction interval (rows below the axis)",
                    c * 100.0
                ),
                None => "prediction interval (rows below the axis)".to_string(),
            },
        ));
    }
    if let Some(p) = program {
        let held = p.points.last().is_some_and(|&(t, _)| t < t_max);
        legend.push((
            "program",
            format!(
                "program, right axis: {}{}",
                p.label,
                if held {
                    "; final value held to the end"
                } else {
                    ""
                }
            ),
        ));
    }
    if t0_drawn {
        legend.push(("t0", "t0: column dead time".to_string()));
    }
    let legend_top = strip_bottom + 22.0;
    let legend_rows = legend.len().div_ceil(2) as f64;
    let notes_lines = if not_drawn.is_empty() { 0.0 } else { 1.0 };
    let details = detail_windows(data.coelutions, &peaks);
    let after_legend = legend_top + legend_rows * 18.0 + notes_lines * 16.0;
    // room for the two-line titles of the close-up panels
    let detail_top = after_legend + 36.0;
    let height = if details.is_empty() {
        after_legend + 10.0
    } else {
        detail_top + DETAIL_HEIGHT_PX + 62.0
    };

    let mut s = String::new();
    let _ = writeln!(
        s,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\" \
         font-family=\"sans-serif\" role=\"img\" aria-label=\"{t}\" data-x-origin-px=\"{x0}\" \
         data-px-per-min=\"{ppm}\" data-t-max-min=\"{tm}\">",
        w = f2(WIDTH_PX),
        h = f2(height),
        t = escape_xml(title),
        x0 = f2(LEFT_PX),
        ppm = format_args!("{px_per_min:.6}"),
        tm = format_args!("{t_max:.6}"),
    );
    let _ = writeln!(s, "<title>{}</title>", escape_xml(title));
    let _ = writeln!(
        s,
        "<rect x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" fill=\"#fff\"/>",
        f2(WIDTH_PX),
        f2(height)
    );
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"20\" font-size=\"15\" font-weight=\"bold\">{}</text>",
        f2(LEFT_PX),
        escape_xml(title)
    );
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"37\" font-size=\"11\">{}; predicted, not measured; equal response assumed</text>",
        f2(LEFT_PX),
        escape_xml(&data.subtitle)
    );

    // Axes, ticks and grid.
    let x_right = WIDTH_PX - RIGHT_PX;
    let _ = writeln!(
        s,
        "<path class=\"axes\" d=\"M {x0} {yt} L {x0} {yb} L {x1} {yb}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1\"/>",
        x0 = f2(LEFT_PX),
        yt = f2(plot_top),
        yb = f2(plot_bottom),
        x1 = f2(x_right)
    );
    let n_ticks = (t_max / step).round() as usize;
    let tick_digits = if step >= 1.0 {
        0
    } else if step >= 0.1 {
        1
    } else {
        2
    };
    for i in 0..=n_ticks {
        let t = step * i as f64;
        let x = x_of(t);
        let _ = writeln!(
            s,
            "<line class=\"xtick\" x1=\"{x}\" y1=\"{y0}\" x2=\"{x}\" y2=\"{y1}\" stroke=\"#000\"/>\
             <text x=\"{x}\" y=\"{yl}\" font-size=\"11\" text-anchor=\"middle\">{label}</text>",
            x = f2(x),
            y0 = f2(plot_bottom),
            y1 = f2(plot_bottom + 5.0),
            yl = f2(plot_bottom + 18.0),
            label = format_args!("{t:.tick_digits$}")
        );
    }
    let y_step = if y_top_value <= 1.6 { 0.25 } else { 0.5 };
    let mut v = 0.0;
    while v <= y_top_value + 1e-9 {
        let y = y_of(v);
        let _ = writeln!(
            s,
            "<line class=\"ytick\" x1=\"{x0}\" y1=\"{y}\" x2=\"{x1}\" y2=\"{y}\" stroke=\"#000\"/>\
             <text x=\"{xl}\" y=\"{yl}\" font-size=\"11\" text-anchor=\"end\">{v:.2}</text>",
            x0 = f2(LEFT_PX - 5.0),
            x1 = f2(LEFT_PX),
            y = f2(y),
            xl = f2(LEFT_PX - 8.0),
            yl = f2(y + 4.0),
        );
        v += y_step;
    }
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"{}\" font-size=\"12\" text-anchor=\"middle\">retention time (min)</text>",
        f2(LEFT_PX + plot_w / 2.0),
        f2(plot_bottom + 38.0)
    );
    let _ = writeln!(
        s,
        "<text x=\"18\" y=\"{y}\" font-size=\"12\" text-anchor=\"middle\" transform=\"rotate(-90 18 {y})\">relative response</text>",
        y = f2(plot_top + PLOT_HEIGHT_PX / 2.0)
    );

    // Program on the right-hand axis (thin dash-dot line, its own scale).
    if let Some(prog) = program {
        let mut pts: Vec<(f64, f64)> = prog
            .points
            .iter()
            .copied()
            .filter(|p| p.0 <= t_max)
            .collect();
        if prog.points.iter().any(|p| p.0 > t_max) {
            pts.push((t_max, program_at(&prog.points, t_max)));
        } else if let Some(&(_, v_last)) = pts.last().filter(|p| p.0 < t_max) {
            // peaks after the program's last step elute at its final value (the instrument
            // holds it until the run stops): draw that hold to the end of the axis
            pts.push((t_max, v_last));
        }
        let vmin_raw = prog
            .points
            .iter()
            .map(|p| p.1)
            .fold(f64::INFINITY, f64::min);
        let vmax_raw = prog
            .points
            .iter()
            .map(|p| p.1)
            .fold(f64::NEG_INFINITY, f64::max);
        let pstep = nice_step((vmax_raw - vmin_raw).max(1.0));
        let vlo = (vmin_raw / pstep).floor() * pstep;
        let vhi = ((vmax_raw / pstep).ceil() * pstep).max(vlo + pstep);
        // the lowest value sits a little above the time axis, so that an initial hold (a GC
        // oven at its starting temperature) is not hidden under the axis line
        let py = |v: f64| {
            plot_bottom
                - PROGRAM_BASE_PX
                - (v - vlo) / (vhi - vlo) * (PLOT_HEIGHT_PX * 0.9 - PROGRAM_BASE_PX)
        };
        let d = path_data(pts.iter().map(|&(t, v)| (x_of(t), py(v))));
        let _ = writeln!(
            s,
            "<path class=\"program\" d=\"{d}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1.1\" stroke-dasharray=\"8 3 2 3\"/>"
        );
        let _ = writeln!(
            s,
            "<path class=\"axis-right\" d=\"M {x} {yt} L {x} {yb}\" fill=\"none\" stroke=\"#000\"/>",
            x = f2(x_right),
            yt = f2(py(vhi)),
            yb = f2(plot_bottom)
        );
        let digits = if pstep >= 1.0 { 0 } else { 1 };
        let mut v = vlo;
        while v <= vhi + 1e-9 {
            let _ = writeln!(
                s,
                "<line class=\"rtick\" x1=\"{x0}\" y1=\"{y}\" x2=\"{x1}\" y2=\"{y}\" stroke=\"#000\"/>\
                 <text x=\"{xl}\" y=\"{yl}\" font-size=\"10\">{v:.digits$}</text>",
                x0 = f2(x_right),
                x1 = f2(x_right + 5.0),
                y = f2(py(v)),
                xl = f2(x_right + 7.0),
                yl = f2(py(v) + 4.0),
            );
            v += pstep;
        }
        let ym = f2(plot_top + PLOT_HEIGHT_PX / 2.0);
        let xr = f2(WIDTH_PX - 8.0);
        let _ = writeln!(
            s,
            "<text x=\"{xr}\" y=\"{ym}\" font-size=\"11\" text-anchor=\"middle\" transform=\"rotate(90 {xr} {ym})\">{}</text>",
            escape_xml(&prog.label)
        );
    }

    // Dead time marker.
    if t0_drawn {
        let x = x_of(t0);
        let _ = writeln!(
            s,
            "<line class=\"dead-time\" x1=\"{x}\" y1=\"{y0}\" x2=\"{x}\" y2=\"{y1}\" stroke=\"#000\" stroke-dasharray=\"2 3\"/>\
             <text x=\"{xt}\" y=\"{yt}\" font-size=\"10\">t0</text>",
            x = f2(x),
            y0 = f2(plot_bottom),
            y1 = f2(y_of(0.35)),
            xt = f2(x + 3.0),
            yt = f2(y_of(0.35) + 10.0),
        );
    }

    // Single peaks: one path each, apex included exactly; peaks of risky pairs heavy.
    let px_min = 1.0 / px_per_min;
    for p in &peaks {
        let rt = p.row.retention_time_min;
        let dt = (p.sigma_min / 4.0).min(px_min);
        let half = (4.0 * p.sigma_min / dt).ceil() as i64;
        let d = path_data(
            (-half..=half)
                .map(|i| rt + i as f64 * dt)
                .filter(|t| (0.0..=t_max).contains(t))
                .map(|t| {
                    let z = (t - rt) / p.sigma_min;
                    (x_of(t), y_of((-0.5 * z * z).exp()))
                }),
        );
        let _ = writeln!(
            s,
            "<path class=\"peak\" data-analyte=\"{}\" data-rt-min=\"{:.4}\" data-risk=\"{}\" d=\"{}\" fill=\"none\" stroke=\"#000\" stroke-width=\"{}\"/>",
            escape_xml(&p.row.analyte),
            rt,
            p.flagged,
            d,
            if p.flagged { "2.2" } else { "0.8" }
        );
    }

    // Sum trace.
    let d = path_data(grid.iter().map(|&(t, v)| (x_of(t), y_of(v))));
    let _ = writeln!(
        s,
        "<path class=\"sum\" d=\"{d}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1.8\"/>"
    );

    // Risk brackets: one per pair at risk, above the highest apex, with the predicted Rs;
    // overlapping brackets are stacked in levels so that no two labels collide.
    let bracket_base = y_of(apex_max) - BRACKET_GAP_PX;
    for b in &brackets {
        let top = bracket_base - b.level as f64 * BRACKET_LEVEL_PX;
        let _ = writeln!(
            s,
            "<g class=\"risk-bracket\" data-pair=\"{a} / {b_name}\" data-level=\"{level}\"><path d=\"M {xl} {y1} L {xl} {y0} L {xr} {y0} L {xr} {y1}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1.4\"/>\
             <text x=\"{xm}\" y=\"{yt}\" font-size=\"10\" font-weight=\"bold\" text-anchor=\"middle\"{HALO}>{rs}</text></g>",
            a = escape_xml(&b.a),
            b_name = escape_xml(&b.b),
            level = b.level,
            xl = f2(b.xl),
            xr = f2(b.xr),
            y0 = f2(top),
            y1 = f2(top + 6.0),
            xm = f2((b.xl + b.xr) / 2.0),
            yt = f2(top - 3.0),
            rs = escape_xml(&b.text),
        );
    }

    // Labels with leader lines: every leader first, then every label over them with a white
    // halo, so that a leader from a higher tier never strikes through a lower label (screenshot
    // review, issue 16).
    let label_y = |tier: usize| title_h + (tiers - tier as f64) * TIER_PX;
    for (p, ((_, cx, tier), sum)) in peaks.iter().zip(placed.iter().zip(&peak_sums)) {
        let _ = writeln!(
            s,
            "<line class=\"leader\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#000\" stroke-width=\"0.6\" stroke-dasharray=\"1 2\"/>",
            f2(*cx),
            f2(label_y(*tier) + 3.0),
            f2(x_of(p.row.retention_time_min)),
            f2(y_of(*sum) - 3.0)
        );
    }
    for (p, (text, cx, tier)) in peaks.iter().zip(placed.iter()) {
        let weight = if p.flagged {
            " font-weight=\"bold\""
        } else {
            ""
        };
        let _ = writeln!(
            s,
            "<text class=\"label\" data-analyte=\"{}\" x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\"{}{HALO}>{}</text>",
            escape_xml(&p.row.analyte),
            f2(*cx),
            f2(label_y(*tier)),
            weight,
            escape_xml(text)
        );
    }

    // Interval bars, one labelled row per peak, on the chromatogram's time axis.
    if !intervals.is_empty() {
        let _ = writeln!(
            s,
            "<text class=\"interval-title\" x=\"{}\" y=\"{}\" font-size=\"11\">{}</text>",
            f2(LEFT_PX),
            f2(strip_top - 6.0),
            match coverage {
                Some(c) => format!(
                    "{:.0} % prediction interval of each retention time",
                    c * 100.0
                ),
                None => "prediction interval of each retention time".to_string(),
            }
        );
        for (i, p) in intervals.iter().enumerate() {
            let y = strip_top + (i as f64 + 0.5) * INTERVAL_ROW_PX;
            let (xl, xh) = (x_of(p.row.interval_low_min), x_of(p.row.interval_high_min));
            let xr = x_of(p.row.retention_time_min);
            let name = escape_xml(&p.row.analyte);
            let _ = writeln!(
                s,
                "<path class=\"interval\" data-analyte=\"{name}\" d=\"M {xl} {ya} L {xl} {yb} M {xl} {y} L {xh} {y} M {xh} {ya} L {xh} {yb} M {xr} {ya} L {xr} {yb}\" fill=\"none\" stroke=\"#000\" stroke-width=\"{sw}\"/>",
                xl = f2(xl),
                xh = f2(xh),
                xr = f2(xr),
                y = f2(y),
                ya = f2(y - 4.0),
                yb = f2(y + 4.0),
                sw = if p.flagged { "2" } else { "1" },
            );
            let w = p.row.analyte.chars().count() as f64 * 5.6 + 6.0;
            let (lx, anchor) = if xh + 6.0 + w <= x_right {
                (xh + 6.0, "start")
            } else {
                (xl - 6.0, "end")
            };
            let _ = writeln!(
                s,
                "<text class=\"interval-label\" data-analyte=\"{name}\" x=\"{}\" y=\"{}\" font-size=\"10\" text-anchor=\"{anchor}\">{name}</text>",
                f2(lx),
                f2(y + 3.5),
            );
        }
    }

    // Legend: a sample of each drawn element, two columns.
    let col_x = [LEFT_PX, LEFT_PX + 430.0];
    s.push_str("<g class=\"legend\" font-size=\"11\">\n");
    for (i, (kind, text)) in legend.iter().enumerate() {
        let a = col_x[i % 2];
        let b = a + 28.0;
        let y = legend_top + (i / 2) as f64 * 18.0;
        let sample = match *kind {
            "sum" => format!(
                "<line x1=\"{}\" y1=\"{y}\" x2=\"{}\" y2=\"{y}\" stroke=\"#000\" stroke-width=\"1.8\"/>",
                f2(a),
                f2(b),
                y = f2(y)
            ),
            "single" => format!(
                "<line x1=\"{}\" y1=\"{y}\" x2=\"{}\" y2=\"{y}\" stroke=\"#000\" stroke-width=\"0.8\"/>",
                f2(a),
                f2(b),
                y = f2(y)
            ),
            "risk" => format!(
                "<path d=\"M {a} {y1} L {a} {y0} L {b} {y0} L {b} {y1}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1.4\"/>",
                a = f2(a),
                b = f2(b),
                y0 = f2(y - 5.0),
                y1 = f2(y + 3.0)
            ),
            "interval" => format!(
                "<path d=\"M {a} {ya} L {a} {yb} M {a} {y} L {b} {y} M {b} {ya} L {b} {yb}\" fill=\"none\" stroke=\"#000\"/>",
                a = f2(a),
                b = f2(b),
                y = f2(y),
                ya = f2(y - 4.0),
                yb = f2(y + 4.0)
            ),
            "program" => format!(
                "<line x1=\"{}\" y1=\"{y}\" x2=\"{}\" y2=\"{y}\" stroke=\"#000\" stroke-width=\"1.1\" stroke-dasharray=\"8 3 2 3\"/>",
                f2(a),
                f2(b),
                y = f2(y)
            ),
            _ => format!(
                "<line x1=\"{x}\" y1=\"{ya}\" x2=\"{x}\" y2=\"{yb}\" stroke=\"#000\" stroke-dasharray=\"2 3\"/>",
                x = f2(a + 14.0),
                ya = f2(y - 6.0),
                yb = f2(y + 6.0)
            ),
        };
        let _ = writeln!(
            s,
            "<g class=\"legend-entry\" data-kind=\"{kind}\">{sample}<text x=\"{}\" y=\"{}\">{}</text></g>",
            f2(a + 36.0),
            f2(y + 4.0),
            escape_xml(text)
        );
    }
    s.push_str("</g>\n");
    if !not_drawn.is_empty() {
        let names: Vec<String> = not_drawn.iter().map(|n| escape_xml(n)).collect();
        let _ = writeln!(
            s,
            "<text class=\"not-drawn\" x=\"{}\" y=\"{}\" font-size=\"11\">not drawn (no finite retention time or width): {}</text>",
            f2(LEFT_PX),
            f2(legend_top + legend_rows * 18.0 + 4.0),
            names.join(", ")
        );
    }
    for (i, w) in details.iter().enumerate() {
        let left = LEFT_PX + i as f64 * (DETAIL_WIDTH_PX + DETAIL_GAP_PX);
        draw_detail(&mut s, &peaks, w, left, detail_top);
    }
    s.push_str("</svg>\n");
    s
}
