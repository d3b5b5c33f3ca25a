//! The predicted chromatogram of one recommendation as a self-contained SVG image.
//!
//! Each analyte is drawn as a Gaussian peak of unit height (equal response is assumed: the
//! heights say nothing about amounts) at its predicted retention time, with σ = w½ / 2.355
//! (w½ = width at half height; for a Gaussian w½ = 2·√(2 ln 2)·σ ≈ 2.355 σ, textbook
//! relation, from memory). The prediction interval is drawn as a whisker with end caps at
//! half height, peaks of pairs flagged at risk of co-elution are hatched and their labels carry
//! a "!" marker, and labels are stacked in tiers with leader lines so that they never overlap.
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
use crate::measured::gc_optimise::GcPrediction;
use crate::measured::optimise::Prediction;

/// Width of the image, px.
const WIDTH_PX: f64 = 960.0;
/// Left margin (y-axis ticks and title), px.
const LEFT_PX: f64 = 72.0;
/// Right margin, px.
const RIGHT_PX: f64 = 28.0;
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
    render_chromatogram_svg(
        &ChromatogramData {
            predictions: &rec.predictions,
            coelutions: &rec.coelutions,
            run_time_min: rec.conditions.run_time_min,
            dead_time_min: rec.conditions.dead_time_min,
            id: format!("{}-{}-{}", rec.rank, rec.mode, rec.phase.id),
            subtitle: format!("{} on {}", rec.mode, rec.phase.name),
            hatch_legend: "pair at risk of co-elution (see Risks)".to_string(),
        },
        title,
    )
}

/// Gaussian half-height width over base width: w½/wb = 2.3548σ/4σ (textbook relation, from
/// memory).
const HALF_PER_BASE_WIDTH: f64 = FWHM_PER_SIGMA / 4.0;

/// Renders the predicted chromatogram of an optimised gradient (`scout`): each analyte at its
/// predicted time with its predicted width (w½ = 0.589 wb, Gaussian), a ±1σ whisker where the
/// fit gave an uncertainty, and pairs below `target_resolution` hatched and shown in detail.
pub fn render_optimum_svg(
    prediction: &Prediction,
    dead_time_min: f64,
    target_resolution: f64,
    title: &str,
) -> String {
    let peaks: Vec<OptimumPeak<'_>> = prediction
        .peaks
        .iter()
        .map(|p| OptimumPeak {
            name: &p.name,
            retention_time_min: p.retention_time_min,
            uncertainty_min: p.retention_time_uncertainty_min,
            width_base_min: p.width_base_min,
        })
        .collect();
    let pairs: Vec<(&str, &str, f64)> = prediction
        .pairs
        .iter()
        .map(|q| (q.first.as_str(), q.second.as_str(), q.resolution))
        .collect();
    render_optimum(
        &peaks,
        &pairs,
        OptimumFrame {
            dead_time_min,
            run_time_min: prediction.run_time_min,
            target_resolution,
            path: "scouting fit (LSS)",
            id: "scout-optimum",
            subtitle: format!(
                "optimised gradient {} (time min : % organic)",
                prediction.program.to_spec()
            ),
        },
        title,
    )
}

/// As [`render_optimum_svg`] for an optimised oven program (`scout --mode gc`); the dead time
/// is the hold-up time t_M.
pub fn render_gc_optimum_svg(
    prediction: &GcPrediction,
    holdup_time_min: f64,
    target_resolution: f64,
    title: &str,
) -> String {
    let peaks: Vec<OptimumPeak<'_>> = prediction
        .peaks
        .iter()
        .map(|p| OptimumPeak {
            name: &p.name,
            retention_time_min: p.retention_time_min,
            uncertainty_min: p.retention_time_uncertainty_min,
            width_base_min: p.width_base_min,
        })
        .collect();
    let pairs: Vec<(&str, &str, f64)> = prediction
        .pairs
        .iter()
        .map(|q| (q.first.as_str(), q.second.as_str(), q.resolution))
        .collect();
    render_optimum(
        &peaks,
        &pairs,
        OptimumFrame {
            dead_time_min: holdup_time_min,
            run_time_min: prediction.run_time_min,
            target_resolution,
            path: "scouting fit (ln k = A + B/T)",
            id: "scout-gc-optimum",
            subtitle: format!(
                "optimised oven program {} (initial °C : hold min, ramp °C/min : final °C : hold min)",
                prediction.program
            ),
        },
        title,
    )
}

/// One predicted peak of an optimum.
struct OptimumPeak<'a> {
    name: &'a str,
    retention_time_min: f64,
    uncertainty_min: Option<f64>,
    width_base_min: f64,
}

/// What frames an optimum's chromatogram.
struct OptimumFrame {
    dead_time_min: f64,
    run_time_min: f64,
    target_resolution: f64,
    path: &'static str,
    id: &'static str,
    subtitle: String,
}

fn render_optimum(
    peaks: &[OptimumPeak<'_>],
    pairs: &[(&str, &str, f64)],
    frame: OptimumFrame,
    title: &str,
) -> String {
    let rows: Vec<PredictionRow> = peaks
        .iter()
        .map(|p| {
            let (lo, hi, coverage) = match p.uncertainty_min {
                // ±1σ of a normal distribution covers 68.27 % (textbook value, from memory).
                Some(u) if u.is_finite() => {
                    (p.retention_time_min - u, p.retention_time_min + u, 0.6827)
                }
                _ => (f64::NAN, f64::NAN, f64::NAN),
            };
            PredictionRow {
                analyte: p.name.to_string(),
                retention_time_min: p.retention_time_min,
                interval_low_min: lo,
                interval_high_min: hi,
                interval_coverage: coverage,
                retention_factor: (p.retention_time_min - frame.dead_time_min)
                    / frame.dead_time_min,
                peak_width_half_min: p.width_base_min * HALF_PER_BASE_WIDTH,
                path: frame.path.to_string(),
                source_systems: Vec::new(),
                path_source: None,
                retention_index: None,
            }
        })
        .collect();
    let target = frame.target_resolution;
    let coelutions: Vec<Coelution> = pairs
        .iter()
        .filter(|q| q.2 < target)
        .map(|q| Coelution {
            a: q.0.to_string(),
            b: q.1.to_string(),
            // Not computed by the optimiser; the renderer does not draw it.
            probability: f64::NAN,
            resolution: q.2,
            note: Some(format!("below the target Rs {target}")),
        })
        .collect();
    render_chromatogram_svg(
        &ChromatogramData {
            predictions: &rows,
            coelutions: &coelutions,
            run_time_min: frame.run_time_min,
            dead_time_min: frame.dead_time_min,
            id: frame.id.to_string(),
            subtitle: frame.subtitle,
            hatch_legend: format!("pair below the target Rs {target}"),
        },
        title,
    )
}

/// What the chromatogram renderer draws, independent of where the predictions came from (an
/// advice recommendation, or the optimum of a scouting fit).
#[derive(Debug, Clone)]
pub struct ChromatogramData<'a> {
    /// One row per analyte (time, half-height width, interval).
    pub predictions: &'a [PredictionRow],
    /// Pairs to hatch and to show in detail windows.
    pub coelutions: &'a [Coelution],
    /// Run time the axis should cover at least, min.
    pub run_time_min: f64,
    /// Dead time marked on the axis, min (not drawn when not finite or not positive).
    pub dead_time_min: f64,
    /// Text that makes the pattern ids of this image unique within one document.
    pub id: String,
    /// Subtitle before "; predicted, not measured; equal response assumed".
    pub subtitle: String,
    /// What hatching means in this image (after "! hatched: " in the legend).
    pub hatch_legend: String,
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

    // Time axis: cover the run, every interval and every peak's tails.
    let mut t_end = if data.run_time_min.is_finite() {
        data.run_time_min.max(0.0)
    } else {
        0.0
    };
    for p in &peaks {
        t_end = t_end.max(p.row.retention_time_min + 4.0 * p.sigma_min);
        if p.row.interval_high_min.is_finite() {
            t_end = t_end.max(p.row.interval_high_min);
        }
    }
    if t_end <= 0.0 {
        t_end = 1.0;
    }
    let step = nice_step(t_end);
    let t_max = (t_end / step).ceil() * step;
    let plot_w = WIDTH_PX - LEFT_PX - RIGHT_PX;
    let px_per_min = plot_w / t_max;
    let x_of = |t: f64| LEFT_PX + t.clamp(0.0, t_max) * px_per_min;

    // Sum trace on a one-pixel grid, to size the response axis.
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
    let y_top_value = grid
        .iter()
        .map(|&(_, v)| v)
        .chain(peak_sums.iter().copied())
        .fold(1.0_f64, f64::max)
        * 1.08;

    // Labels: greedy tiers, lowest tier whose previous label ends left of this one.
    let mut tier_right: Vec<f64> = Vec::new();
    let mut placed = Vec::new();
    for p in &peaks {
        let text = if p.flagged {
            format!("{} !", p.row.analyte)
        } else {
            p.row.analyte.clone()
        };
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
    let legend_top = plot_bottom + 58.0;
    let notes_lines = if not_drawn.is_empty() { 0.0 } else { 1.0 };
    let details = detail_windows(data.coelutions, &peaks);
    let detail_top = legend_top + 3.0 * 18.0 + notes_lines * 16.0 + 22.0;
    let height = if details.is_empty() {
        legend_top + 3.0 * 18.0 + notes_lines * 16.0 + 10.0
    } else {
        detail_top + DETAIL_HEIGHT_PX + 62.0
    };
    let coverage = peaks
        .first()
        .map(|p| p.row.interval_coverage)
        .filter(|c| c.is_finite() && *c > 0.0 && *c <= 1.0);
    let hatch_id = {
        let raw = format!("hatch-{}", data.id);
        raw.chars()
            .map(|c| {
                if c.is_ascii_alphanumeric() {
                    c.to_ascii_lowercase()
                } else {
                    '-'
                }
            })
            .collect::<String>()
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
        "<defs><pattern id=\"{hatch_id}\" patternUnits=\"userSpaceOnUse\" width=\"6\" height=\"6\" \
         patternTransform=\"rotate(45)\"><line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" stroke=\"#000\" \
         stroke-width=\"1.2\"/></pattern></defs>"
    );
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
    let _ = writeln!(
        s,
        "<path class=\"axes\" d=\"M {x0} {yt} L {x0} {yb} L {x1} {yb}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1\"/>",
        x0 = f2(LEFT_PX),
        yt = f2(plot_top),
        yb = f2(plot_bottom),
        x1 = f2(WIDTH_PX - RIGHT_PX)
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

    // Dead time marker.
    let t0 = data.dead_time_min;
    if t0.is_finite() && t0 > 0.0 && t0 < t_max {
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

    // Single peaks: one path each, apex included exactly.
    let px_min = 1.0 / px_per_min;
    for p in &peaks {
        let rt = p.row.retention_time_min;
        let dt = (p.sigma_min / 4.0).min(px_min);
        let half = (4.0 * p.sigma_min / dt).ceil() as i64;
        let mut pts: Vec<(f64, f64)> = Vec::new();
        for i in -half..=half {
            let t = rt + i as f64 * dt;
            if !(0.0..=t_max).contains(&t) {
                continue;
            }
            let z = (t - rt) / p.sigma_min;
            pts.push((t, (-0.5 * z * z).exp()));
        }
        let mut d = String::new();
        for (i, (t, v)) in pts.iter().enumerate() {
            let _ = write!(
                d,
                "{}{} {}",
                if i == 0 { "M " } else { " L " },
                f2(x_of(*t)),
                f2(y_of(*v))
            );
        }
        let fill = if p.flagged {
            if let (Some(first), Some(last)) = (pts.first(), pts.last()) {
                let _ = write!(
                    d,
                    " L {} {} L {} {} Z",
                    f2(x_of(last.0)),
                    f2(plot_bottom),
                    f2(x_of(first.0)),
                    f2(plot_bottom)
                );
            }
            format!("url(#{hatch_id})")
        } else {
            "none".to_string()
        };
        let _ = writeln!(
            s,
            "<path class=\"peak\" data-analyte=\"{}\" data-rt-min=\"{:.4}\" d=\"{}\" fill=\"{}\" stroke=\"#000\" stroke-width=\"0.8\"/>",
            escape_xml(&p.row.analyte),
            rt,
            d,
            fill
        );
    }

    // Sum trace.
    let mut d = String::new();
    for (i, (t, v)) in grid.iter().enumerate() {
        let _ = write!(
            d,
            "{}{} {}",
            if i == 0 { "M " } else { " L " },
            f2(x_of(*t)),
            f2(y_of(*v))
        );
    }
    let _ = writeln!(
        s,
        "<path class=\"sum\" d=\"{d}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1.8\"/>"
    );

    // Prediction-interval whiskers at half height, offset a little so neighbours stay apart.
    for (i, p) in peaks.iter().enumerate() {
        let lo = p.row.interval_low_min;
        let hi = p.row.interval_high_min;
        if !(lo.is_finite() && hi.is_finite() && hi >= lo) {
            continue;
        }
        let y = y_of(0.5) - (i % 3) as f64 * 6.0;
        let _ = writeln!(
            s,
            "<path class=\"interval\" data-analyte=\"{}\" d=\"M {xl} {ya} L {xl} {yb} M {xl} {y} L {xh} {y} M {xh} {ya} L {xh} {yb}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1\" stroke-dasharray=\"5 2\"/>",
            escape_xml(&p.row.analyte),
            xl = f2(x_of(lo)),
            xh = f2(x_of(hi)),
            y = f2(y),
            ya = f2(y - 4.0),
            yb = f2(y + 4.0),
        );
    }

    // Labels with leader lines.
    for (p, ((text, cx, tier), sum)) in peaks.iter().zip(placed.iter().zip(&peak_sums)) {
        let ly = title_h + (tiers - *tier as f64) * TIER_PX;
        let apex_x = x_of(p.row.retention_time_min);
        let apex_y = y_of(*sum);
        let _ = writeln!(
            s,
            "<line class=\"leader\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#000\" stroke-width=\"0.6\" stroke-dasharray=\"1 2\"/>",
            f2(*cx),
            f2(ly + 3.0),
            f2(apex_x),
            f2(apex_y - 3.0)
        );
        let weight = if p.flagged {
            " font-weight=\"bold\""
        } else {
            ""
        };
        let _ = writeln!(
            s,
            "<text class=\"label\" data-analyte=\"{}\" x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\"{}>{}</text>",
            escape_xml(&p.row.analyte),
            f2(*cx),
            f2(ly),
            weight,
            escape_xml(text)
        );
    }

    // Legend: samples of each line style and pattern.
    let lx = LEFT_PX;
    let col2 = LEFT_PX + 420.0;
    let row_y = |r: f64| legend_top + r * 18.0;
    let _ = writeln!(
        s,
        "<g class=\"legend\" font-size=\"11\">\
         <line x1=\"{a}\" y1=\"{y0}\" x2=\"{b}\" y2=\"{y0}\" stroke=\"#000\" stroke-width=\"1.8\"/>\
         <text x=\"{t}\" y=\"{y0t}\">sum of all peaks (equal response assumed)</text>\
         <line x1=\"{a}\" y1=\"{y1}\" x2=\"{b}\" y2=\"{y1}\" stroke=\"#000\" stroke-width=\"0.8\"/>\
         <text x=\"{t}\" y=\"{y1t}\">single analyte, Gaussian with sigma = w1/2 / 2.355</text>\
         <path d=\"M {a} {y2a} L {a} {y2b} M {a} {y2} L {b} {y2} M {b} {y2a} L {b} {y2b}\" fill=\"none\" stroke=\"#000\" stroke-dasharray=\"5 2\"/>\
         <text x=\"{t}\" y=\"{y2t}\">prediction interval{cov}</text>\
         <rect x=\"{c}\" y=\"{r0}\" width=\"28\" height=\"12\" fill=\"url(#{hatch_id})\" stroke=\"#000\"/>\
         <text x=\"{ct}\" y=\"{y0t}\">! hatched: {hatched}</text>\
         <line x1=\"{c}\" y1=\"{y1}\" x2=\"{c}\" y2=\"{y1b}\" stroke=\"#000\" stroke-dasharray=\"2 3\"/>\
         <text x=\"{ct}\" y=\"{y1t}\">t0: column dead time</text>\
         </g>",
        hatched = escape_xml(&data.hatch_legend),
        a = f2(lx),
        b = f2(lx + 28.0),
        t = f2(lx + 36.0),
        c = f2(col2),
        ct = f2(col2 + 36.0),
        y0 = f2(row_y(0.0)),
        y0t = f2(row_y(0.0) + 4.0),
        r0 = f2(row_y(0.0) - 6.0),
        y1 = f2(row_y(1.0) - 6.0),
        y1b = f2(row_y(1.0) + 6.0),
        y1t = f2(row_y(1.0) + 4.0),
        y2 = f2(row_y(2.0)),
        y2a = f2(row_y(2.0) - 4.0),
        y2b = f2(row_y(2.0) + 4.0),
        y2t = f2(row_y(2.0) + 4.0),
        cov = match coverage {
            Some(c) => format!(" ({:.0} % coverage)", c * 100.0),
            None => String::new(),
        },
    );
    if !not_drawn.is_empty() {
        let names: Vec<String> = not_drawn.iter().map(|n| escape_xml(n)).collect();
        let _ = writeln!(
            s,
            "<text class=\"not-drawn\" x=\"{}\" y=\"{}\" font-size=\"11\">not drawn (no finite retention time or width): {}</text>",
            f2(LEFT_PX),
            f2(row_y(3.0) + 4.0),
            names.join(", ")
        );
    }
    for (i, w) in details.iter().enumerate() {
        let left = LEFT_PX + i as f64 * (DETAIL_WIDTH_PX + DETAIL_GAP_PX);
        draw_detail(&mut s, &peaks, w, left, detail_top, &hatch_id);
    }
    s.push_str("</svg>\n");
    s
}

/// Width of one detail panel, px.
const DETAIL_WIDTH_PX: f64 = 250.0;
/// Height of one detail panel's plotting area, px.
const DETAIL_HEIGHT_PX: f64 = 120.0;
/// Gap between detail panels, px.
const DETAIL_GAP_PX: f64 = 55.0;
/// At most this many detail panels fit across the image.
const MAX_DETAILS: usize = 3;

/// A zoomed window on one flagged pair.
struct DetailWindow {
    a: String,
    b: String,
    resolution: f64,
    t_lo: f64,
    t_hi: f64,
}

/// Windows on the flagged pairs (most likely first, at most [`MAX_DETAILS`]), each wide
/// enough for both peaks' tails: a pair a few pixels wide in the full run is unreadable.
fn detail_windows(coelutions: &[Coelution], peaks: &[Peak]) -> Vec<DetailWindow> {
    let mut out = Vec::new();
    for c in coelutions {
        let find = |n: &str| peaks.iter().find(|p| p.row.analyte == n);
        let (Some(pa), Some(pb)) = (find(&c.a), find(&c.b)) else {
            continue;
        };
        let (ta, tb) = (pa.row.retention_time_min, pb.row.retention_time_min);
        let sigma = pa.sigma_min.max(pb.sigma_min);
        let mid = (ta + tb) / 2.0;
        let half = ((ta - tb).abs() / 2.0 + 5.0 * sigma).max(1e-3);
        out.push(DetailWindow {
            a: c.a.clone(),
            b: c.b.clone(),
            resolution: c.resolution,
            t_lo: (mid - half).max(0.0),
            t_hi: mid + half,
        });
        if out.len() == MAX_DETAILS {
            break;
        }
    }
    out
}

/// Draw one detail panel with its own time axis; peaks use class `peak-detail`.
fn draw_detail(s: &mut String, peaks: &[Peak], w: &DetailWindow, left: f64, top: f64, hatch: &str) {
    let bottom = top + DETAIL_HEIGHT_PX;
    let span = w.t_hi - w.t_lo;
    let x_of = |t: f64| left + (t - w.t_lo) / span * DETAIL_WIDTH_PX;
    let in_window: Vec<&Peak> = peaks
        .iter()
        .filter(|p| {
            let rt = p.row.retention_time_min;
            rt + 4.0 * p.sigma_min >= w.t_lo && rt - 4.0 * p.sigma_min <= w.t_hi
        })
        .collect();
    let n = DETAIL_WIDTH_PX.round() as usize;
    let grid: Vec<(f64, f64)> = (0..=n)
        .map(|i| {
            let t = w.t_lo + span * i as f64 / n as f64;
            let v: f64 = in_window
                .iter()
                .map(|p| {
                    let z = (t - p.row.retention_time_min) / p.sigma_min;
                    (-0.5 * z * z).exp()
                })
                .sum();
            (t, v)
        })
        .collect();
    // Headroom above the apexes for the two labels.
    let vmax = grid.iter().map(|g| g.1).fold(1.0_f64, f64::max) * 1.3;
    let y_of = |v: f64| bottom - v / vmax * DETAIL_HEIGHT_PX;
    let rs = if w.resolution.is_finite() {
        format!(", predicted Rs {:.2}", w.resolution)
    } else {
        String::new()
    };
    let _ = writeln!(
        s,
        "<g class=\"detail\"><text x=\"{}\" y=\"{}\" font-size=\"11\" font-weight=\"bold\">! detail: {} / {}{}</text>",
        f2(left),
        f2(top - 8.0),
        escape_xml(&w.a),
        escape_xml(&w.b),
        rs
    );
    let _ = writeln!(
        s,
        "<path d=\"M {l} {t} L {l} {b} L {r} {b}\" fill=\"none\" stroke=\"#000\"/>",
        l = f2(left),
        t = f2(top),
        b = f2(bottom),
        r = f2(left + DETAIL_WIDTH_PX)
    );
    let step = nice_step(span * 2.0);
    let digits = if step >= 1.0 {
        0
    } else if step >= 0.1 {
        1
    } else if step >= 0.01 {
        2
    } else {
        3
    };
    let mut k = (w.t_lo / step).ceil();
    while k * step <= w.t_hi + 1e-9 {
        let t = k * step;
        let x = x_of(t);
        let _ = writeln!(
            s,
            "<line x1=\"{x}\" y1=\"{b}\" x2=\"{x}\" y2=\"{b5}\" stroke=\"#000\"/><text x=\"{x}\" y=\"{bl}\" font-size=\"10\" text-anchor=\"middle\">{t:.digits$}</text>",
            x = f2(x),
            b = f2(bottom),
            b5 = f2(bottom + 4.0),
            bl = f2(bottom + 15.0),
        );
        k += 1.0;
    }
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"{}\" font-size=\"10\" text-anchor=\"middle\">retention time (min)</text>",
        f2(left + DETAIL_WIDTH_PX / 2.0),
        f2(bottom + 29.0)
    );
    for p in &in_window {
        let rt = p.row.retention_time_min;
        let dt = (p.sigma_min / 8.0).min(span / DETAIL_WIDTH_PX);
        let half = (4.0 * p.sigma_min / dt).ceil() as i64;
        let pts: Vec<(f64, f64)> = (-half..=half)
            .map(|i| rt + i as f64 * dt)
            .filter(|t| (w.t_lo..=w.t_hi).contains(t))
            .map(|t| {
                let z = (t - rt) / p.sigma_min;
                (t, (-0.5 * z * z).exp())
            })
            .collect();
        let (Some(first), Some(last)) = (pts.first(), pts.last()) else {
            continue;
        };
        let mut d = String::new();
        for (i, (t, v)) in pts.iter().enumerate() {
            let _ = write!(
                d,
                "{}{} {}",
                if i == 0 { "M " } else { " L " },
                f2(x_of(*t)),
                f2(y_of(*v))
            );
        }
        let fill = if p.flagged {
            let _ = write!(
                d,
                " L {} {} L {} {} Z",
                f2(x_of(last.0)),
                f2(bottom),
                f2(x_of(first.0)),
                f2(bottom)
            );
            format!("url(#{hatch})")
        } else {
            "none".to_string()
        };
        let _ = writeln!(
            s,
            "<path class=\"peak-detail\" data-analyte=\"{}\" d=\"{d}\" fill=\"{fill}\" stroke=\"#000\" stroke-width=\"0.8\"/>",
            escape_xml(&p.row.analyte)
        );
    }
    let mut d = String::new();
    for (i, (t, v)) in grid.iter().enumerate() {
        let _ = write!(
            d,
            "{}{} {}",
            if i == 0 { "M " } else { " L " },
            f2(x_of(*t)),
            f2(y_of(*v))
        );
    }
    let _ = writeln!(
        s,
        "<path d=\"{d}\" fill=\"none\" stroke=\"#000\" stroke-width=\"1.6\"/>"
    );
    // The earlier peak's label goes to its left, the later one's to its right.
    let mut named: Vec<&&Peak> = in_window
        .iter()
        .filter(|p| p.row.analyte == w.a || p.row.analyte == w.b)
        .collect();
    named.sort_by(|x, y| {
        x.row
            .retention_time_min
            .total_cmp(&y.row.retention_time_min)
    });
    for (i, p) in named.iter().enumerate() {
        let x = x_of(p.row.retention_time_min);
        let (dx, anchor) = if i == 0 {
            (-2.0, "end")
        } else {
            (2.0, "start")
        };
        let _ = writeln!(
            s,
            "<text x=\"{}\" y=\"{}\" font-size=\"10\" text-anchor=\"{anchor}\">{}</text>",
            f2(x + dx),
            f2(y_of(1.0) - 5.0),
            escape_xml(&p.row.analyte)
        );
    }
    s.push_str("</g>\n");
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_optimum_is_drawn_with_its_program_and_pairs_below_target_hatched() {
        use crate::measured::optimise::{PredictedPair, PredictedPeak};
        use crate::model::gradient::{ElutionPhase, GradientProgram};
        // Invented prediction: three peaks, the last pair below Rs 1.5.
        let peak = |name: &str, t: f64| PredictedPeak {
            name: name.to_string(),
            retention_time_min: t,
            width_base_min: 0.1,
            organic_at_elution_pct: 50.0,
            phase: ElutionPhase::DuringGradient,
            retention_time_uncertainty_min: Some(0.02),
        };
        let pair = |a: &str, b: &str, rs: f64| PredictedPair {
            first: a.to_string(),
            second: b.to_string(),
            resolution: rs,
        };
        let p = Prediction {
            program: GradientProgram::parse("0:10,6.5:90").unwrap(),
            peaks: vec![peak("inv-a", 2.0), peak("inv-b", 3.0), peak("inv-c", 3.12)],
            pairs: vec![pair("inv-a", "inv-b", 10.0), pair("inv-b", "inv-c", 1.2)],
            min_resolution: 1.2,
            critical_pair: ["inv-b".into(), "inv-c".into()],
            run_time_min: 3.12,
            first_peak_retention_factor: 1.0,
        };
        let svg = render_optimum_svg(&p, 1.0, 1.5, "t");
        assert!(svg.contains("optimised gradient 0:10,6.5:90"));
        assert!(svg.contains("hatched: pair below the target Rs 1.5"));
        assert!(!svg.contains("see Risks"));
        assert_eq!(svg.matches("class=\"peak\"").count(), 3);
        assert_eq!(svg.matches("class=\"interval\"").count(), 3);
        // Only the pair below the target is flagged ("!" after the names).
        assert!(svg.contains(">inv-b !<") && svg.contains(">inv-c !<"));
        assert!(!svg.contains(">inv-a !<"));
    }

    #[test]
    fn xml_escaping_covers_markup_characters() {
        assert_eq!(
            escape_xml("<script>alert(1)</script> \"q\" & 'a'"),
            "&lt;script&gt;alert(1)&lt;/script&gt; &quot;q&quot; &amp; &#39;a&#39;"
        );
    }

    #[test]
    fn tick_steps_are_one_two_or_five() {
        assert_eq!(nice_step(10.0), 1.0);
        assert_eq!(nice_step(18.0), 2.0);
        assert_eq!(nice_step(42.0), 5.0);
        assert!((nice_step(0.9) - 0.1).abs() < 1e-12);
    }

    #[test]
    fn analytes_without_a_finite_time_are_listed_not_drawn() {
        let text = include_str!("../../tests/data/plan/lc_impurity_panel.json");
        let report: super::super::advice::AdviceReport = serde_json::from_str(text).unwrap();
        let mut rec = report.recommendations[0].clone();
        rec.predictions[1].retention_time_min = f64::NAN;
        rec.predictions[2].peak_width_half_min = 0.0;
        let svg = render_svg(&rec, "t");
        assert!(!svg.contains("NaN"));
        assert!(
            svg.contains("not drawn (no finite retention time or width): impurity B, impurity F")
        );
        assert_eq!(svg.matches("<path class=\"peak\"").count(), 3);
    }

    #[test]
    fn fixed_decimals_never_print_negative_zero() {
        assert_eq!(f2(-0.001), "0.00");
        assert_eq!(f2(12.3456), "12.35");
    }
}
