//! Zoomed panels on the pairs at risk (the critical pair first).

use std::fmt::Write as _;

use super::{Peak, escape_xml, f2, nice_step, path_data};
use crate::report::advice::Coelution;

/// Width of one detail panel, px.
pub(super) const DETAIL_WIDTH_PX: f64 = 250.0;
/// Height of one detail panel's plotting area, px.
pub(super) const DETAIL_HEIGHT_PX: f64 = 120.0;
/// Gap between detail panels, px.
pub(super) const DETAIL_GAP_PX: f64 = 55.0;
/// At most this many detail panels fit across the image.
const MAX_DETAILS: usize = 3;
/// Estimated width of one character of a panel title (font size 11, bold), px.
const TITLE_CHAR_PX: f64 = 6.6;
/// Estimated width of one character of a peak label in a panel (font size 10), px.
const LABEL_CHAR_PX: f64 = 5.6;

/// A zoomed window on one flagged pair.
pub(super) struct DetailWindow {
    a: String,
    b: String,
    resolution: f64,
    t_lo: f64,
    t_hi: f64,
}

/// Windows on the flagged pairs (most likely first, at most [`MAX_DETAILS`]), each wide
/// enough for both peaks' tails: a pair a few pixels wide in the full run is unreadable.
pub(super) fn detail_windows(coelutions: &[Coelution], peaks: &[Peak]) -> Vec<DetailWindow> {
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
pub(super) fn draw_detail(s: &mut String, peaks: &[Peak], w: &DetailWindow, left: f64, top: f64) {
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
    // The title takes two lines, so that it stays within its panel and the gap beside it
    // (screenshot review, issue 16: one-line titles of long names ran into the next panel).
    let max_chars = ((DETAIL_WIDTH_PX + DETAIL_GAP_PX - 10.0) / TITLE_CHAR_PX).floor() as usize;
    let pair = format!("close-up: {} / {}", w.a, w.b);
    let (line1, line2) = if pair.chars().count() <= max_chars {
        (pair, rs.trim_start_matches(", ").to_string())
    } else {
        // long names: the resolution first, then the pair, each name shortened with "…" if
        // needed (the full names are on the main plot's labels)
        let each = (max_chars.saturating_sub(3) / 2).max(4);
        let short = |n: &str| {
            if n.chars().count() <= each
                || w.a.chars().count() + w.b.chars().count() + 3 <= max_chars
            {
                n.to_string()
            } else {
                let mut t: String = n.chars().take(each - 1).collect();
                t.push('…');
                t
            }
        };
        let head = if rs.is_empty() {
            "close-up:".to_string()
        } else {
            format!("close-up{rs}:")
        };
        (head, format!("{} / {}", short(&w.a), short(&w.b)))
    };
    let _ = writeln!(
        s,
        "<g class=\"detail\"><text class=\"detail-title\" x=\"{x}\" y=\"{}\" font-size=\"11\" font-weight=\"bold\">{}</text><text class=\"detail-title\" x=\"{x}\" y=\"{}\" font-size=\"11\">{}</text>",
        f2(top - 21.0),
        escape_xml(&line1),
        f2(top - 8.0),
        escape_xml(&line2),
        x = f2(left),
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
        if pts.is_empty() {
            continue;
        }
        let d = path_data(pts.iter().map(|&(t, v)| (x_of(t), y_of(v))));
        let stroke_w = if p.flagged { "2.2" } else { "0.8" };
        let _ = writeln!(
            s,
            "<path class=\"peak-detail\" data-analyte=\"{}\" d=\"{d}\" fill=\"none\" stroke=\"#000\" stroke-width=\"{stroke_w}\"/>",
            escape_xml(&p.row.analyte)
        );
    }
    let d = path_data(grid.iter().map(|&(t, v)| (x_of(t), y_of(v))));
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
        // a name wider than the panel is shortened with "…" (the main plot has it in full)
        let max_chars = ((DETAIL_WIDTH_PX - 6.0) / LABEL_CHAR_PX).floor() as usize;
        let name: String = if p.row.analyte.chars().count() > max_chars {
            let mut t: String = p.row.analyte.chars().take(max_chars - 1).collect();
            t.push('…');
            t
        } else {
            p.row.analyte.clone()
        };
        let width = name.chars().count() as f64 * LABEL_CHAR_PX;
        let right = left + DETAIL_WIDTH_PX;
        // a label that would cross the panel's edge is centred over its own apex instead,
        // shifted just enough to stay inside the panel (so it never seems to name a cut-off
        // neighbour at the edge)
        let centred = || {
            (
                x.clamp(left + 3.0 + width / 2.0, right - 3.0 - width / 2.0),
                "middle",
            )
        };
        let (lx, anchor) = if i == 0 {
            if x - 2.0 - width < left + 3.0 {
                centred()
            } else {
                (x - 2.0, "end")
            }
        } else if x + 2.0 + width > right - 3.0 {
            centred()
        } else {
            (x + 2.0, "start")
        };
        let _ = writeln!(
            s,
            "<text class=\"detail-label\" x=\"{}\" y=\"{}\" font-size=\"10\" text-anchor=\"{anchor}\">{}</text>",
            f2(lx),
            f2(y_of(1.0) - 5.0),
            escape_xml(&name)
        );
    }
    s.push_str("</g>\n");
}
