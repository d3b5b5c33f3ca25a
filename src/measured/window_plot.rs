//! The window diagram drawn as a standalone SVG, shared by the LC gradient optimiser
//! ([`super::optimise::render_window_svg`], smallest resolution versus gradient time) and the
//! GC oven optimiser ([`super::gc_optimise::render_gc_window_svg`], versus ramp rate): axes
//! with units, the target line, the chosen condition, and shapes (not colours) for points
//! beyond the run time or below the minimum retention.

fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

fn nice_step(range: f64) -> f64 {
    let raw = range / 5.0;
    let mag = 10f64.powf(raw.log10().floor());
    let n = raw / mag;
    let m = if n < 1.5 {
        1.0
    } else if n < 3.5 {
        2.0
    } else if n < 7.5 {
        5.0
    } else {
        10.0
    };
    m * mag
}

/// What a window diagram draws, whatever the swept variable (gradient time in LC, ramp rate in
/// GC); the texts are given in full by the caller. The points span the searched range of the
/// swept variable.
pub(crate) struct WindowPlot {
    /// `<title>` text.
    pub(crate) title: String,
    /// x-axis label with its unit.
    pub(crate) x_label: String,
    /// The heading line above the legend (what is held fixed).
    pub(crate) heading: String,
    /// The swept variable in words and its unit, for the edge flag ("gradient time", "min").
    pub(crate) x_name: (&'static str, &'static str),
    /// Label of the chosen condition's vertical line.
    pub(crate) chosen_label: String,
    /// Dashed target line.
    pub(crate) target_resolution: f64,
    /// Points below this first-peak k are drawn as open squares.
    pub(crate) min_retention_factor: f64,
    /// x of the chosen condition.
    pub(crate) optimum_x: f64,
    /// Smallest resolution of the chosen condition.
    pub(crate) optimum_min_resolution: f64,
    /// The series.
    pub(crate) points: Vec<PlotPoint>,
}

/// One point of a [`WindowPlot`].
pub(crate) struct PlotPoint {
    pub(crate) x: f64,
    pub(crate) min_resolution: f64,
    pub(crate) within_run_time: bool,
    pub(crate) meets_min_retention: bool,
}

/// Where the chosen condition sits in the searched range.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Edge {
    Lower,
    Upper,
}

/// The edge of the searched range `[lo, hi]` the chosen `x` sits on, if any (within 0.1 % of
/// the range, or 0.05 in the variable's unit: the optimiser writes programs on a 0.1 grid).
pub(crate) fn edge_of(x: f64, lo: f64, hi: f64) -> Option<Edge> {
    let tol = (1e-3 * (hi - lo)).max(0.05);
    if !(x.is_finite() && lo.is_finite() && hi.is_finite()) || hi <= lo {
        None
    } else if x - lo <= tol {
        Some(Edge::Lower)
    } else if hi - x <= tol {
        Some(Edge::Upper)
    } else {
        None
    }
}

/// Legend symbols, each drawn in a 22 × 12 px box whose left edge is at `x`, centred on `y`.
enum Symbol {
    Line,
    Dashed,
    Chosen,
    OpenCircle,
    OpenSquare,
    Shade,
}

fn symbol_svg(sym: &Symbol, x: f64, y: f64) -> String {
    match sym {
        Symbol::Line => format!(
            "<line x1=\"{x:.1}\" y1=\"{y:.1}\" x2=\"{:.1}\" y2=\"{y:.1}\" stroke=\"black\" stroke-width=\"1.5\"/>",
            x + 22.0
        ),
        Symbol::Dashed => format!(
            "<line x1=\"{x:.1}\" y1=\"{y:.1}\" x2=\"{:.1}\" y2=\"{y:.1}\" stroke=\"black\" stroke-dasharray=\"6 4\"/>",
            x + 22.0
        ),
        Symbol::Chosen => format!(
            "<line x1=\"{:.1}\" y1=\"{:.1}\" x2=\"{:.1}\" y2=\"{:.1}\" stroke=\"black\" stroke-dasharray=\"2 3\"/><circle cx=\"{:.1}\" cy=\"{y:.1}\" r=\"4.5\" fill=\"black\" stroke=\"white\" stroke-width=\"1.5\"/>",
            x + 11.0,
            y - 7.0,
            x + 11.0,
            y + 7.0,
            x + 11.0
        ),
        Symbol::OpenCircle => format!(
            "<circle cx=\"{:.1}\" cy=\"{y:.1}\" r=\"3\" fill=\"white\" stroke=\"black\"/>",
            x + 11.0
        ),
        Symbol::OpenSquare => format!(
            "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"6\" height=\"6\" fill=\"white\" stroke=\"black\"/>",
            x + 8.0,
            y - 3.0
        ),
        Symbol::Shade => format!(
            "<rect x=\"{x:.1}\" y=\"{:.1}\" width=\"22\" height=\"12\" fill=\"#e4e4e4\" stroke=\"#9a9a9a\"/>",
            y - 6.0
        ),
    }
}

/// The SVG of a [`WindowPlot`]: axes with units, the smallest resolution over the searched
/// range (a polyline), the dashed target line, the chosen condition (a dotted vertical line and
/// a filled circle inside the plot, with a flag when it sits on an edge of the searched range),
/// grey bands beside the searched range, open circles for points beyond the run time and open
/// squares for points whose first peak is retained too little, and a legend listing exactly the
/// marks drawn. No meaning depends on colour.
pub(crate) fn render_window_plot(diagram: &WindowPlot) -> String {
    let (w, h) = (640.0, 440.0);
    let (ml, mr, mt, mb) = (70.0, 20.0, 76.0, 60.0);
    let pw = w - ml - mr;
    let ph = h - mt - mb;
    let pts = &diagram.points;
    let (x0, x1) = pts
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
            (a.min(p.x), b.max(p.x))
        });
    let (x0, x1, searched) = if x0.is_finite() && x1 > x0 {
        (x0, x1, true)
    } else {
        (0.0, 1.0, false)
    };
    // The axis runs 4 % beyond the searched range on each side, so a point on an edge sits
    // inside the plot, not on an axis.
    let pad = 0.04 * (x1 - x0);
    let (ax0, ax1) = (x0 - pad, x1 + pad);
    let ymax = pts
        .iter()
        .map(|p| p.min_resolution)
        .filter(|v| v.is_finite())
        .fold(diagram.target_resolution, f64::max)
        .max(0.5)
        * 1.1;
    // Rs = 0 is drawn 8 px above the x axis for the same reason.
    let inset = 8.0;
    let sx = |x: f64| ml + (x - ax0) / (ax1 - ax0) * pw;
    let sy = |y: f64| mt + ph - inset - (y.clamp(0.0, ymax) / ymax) * (ph - inset);
    let mut s = String::new();
    s.push_str(&format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\" font-family=\"sans-serif\" font-size=\"12\">\n"
    ));
    s.push_str(&format!("<title>{}</title>\n", esc(&diagram.title)));
    s.push_str("<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n");
    // Outside the searched range.
    if searched {
        for (a, b) in [(ax0, x0), (x1, ax1)] {
            s.push_str(&format!(
                "<rect class=\"not-searched\" x=\"{:.1}\" y=\"{mt}\" width=\"{:.1}\" height=\"{ph}\" fill=\"#e4e4e4\"/>\n",
                sx(a),
                sx(b) - sx(a)
            ));
        }
    }
    // Axes.
    s.push_str(&format!(
        "<line x1=\"{ml}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"black\"/>\n<line x1=\"{ml}\" y1=\"{mt}\" x2=\"{ml}\" y2=\"{}\" stroke=\"black\"/>\n",
        mt + ph, ml + pw, mt + ph, mt + ph
    ));
    let xs = nice_step(x1 - x0);
    let mut t = (ax0 / xs).ceil() * xs;
    while t <= ax1 + 1e-9 {
        let x = sx(t);
        s.push_str(&format!(
            "<line x1=\"{x:.1}\" y1=\"{}\" x2=\"{x:.1}\" y2=\"{}\" stroke=\"black\"/><text x=\"{x:.1}\" y=\"{}\" text-anchor=\"middle\">{}</text>\n",
            mt + ph, mt + ph + 5.0, mt + ph + 18.0, fmt_tick(t)
        ));
        t += xs;
    }
    let ys = nice_step(ymax);
    let mut t = 0.0;
    while t <= ymax + 1e-9 {
        let y = sy(t);
        s.push_str(&format!(
            "<line x1=\"{}\" y1=\"{y:.1}\" x2=\"{ml}\" y2=\"{y:.1}\" stroke=\"black\"/><text x=\"{}\" y=\"{:.1}\" text-anchor=\"end\">{}</text>\n",
            ml - 5.0, ml - 8.0, y + 4.0, fmt_tick(t)
        ));
        t += ys;
    }
    s.push_str(&format!(
        "<text x=\"{:.1}\" y=\"{}\" text-anchor=\"middle\">{}</text>\n",
        ml + pw / 2.0,
        h - 15.0,
        esc(&diagram.x_label)
    ));
    s.push_str(&format!(
        "<text x=\"18\" y=\"{:.1}\" text-anchor=\"middle\" transform=\"rotate(-90 18 {:.1})\">Smallest resolution Rs (dimensionless)</text>\n",
        mt + ph / 2.0,
        mt + ph / 2.0
    ));
    s.push_str(&format!(
        "<text x=\"{ml}\" y=\"16\" font-weight=\"bold\">{}</text>\n",
        esc(&diagram.heading)
    ));
    // Target line, labelled at the end away from the chosen point (a chosen point at the
    // right end, often on the target line itself, would sit under the label).
    let yt = sy(diagram.target_resolution);
    let chosen_right = sx(diagram.optimum_x.clamp(x0, x1)) > ml + 0.5 * pw;
    let (tx, tanchor) = if chosen_right {
        (ml + 4.0, "start")
    } else {
        (ml + pw - 4.0, "end")
    };
    s.push_str(&format!(
        "<line x1=\"{ml}\" y1=\"{yt:.1}\" x2=\"{}\" y2=\"{yt:.1}\" stroke=\"black\" stroke-dasharray=\"6 4\"/><text class=\"target-label\" x=\"{tx:.1}\" y=\"{:.1}\" text-anchor=\"{tanchor}\">target Rs = {}</text>\n",
        ml + pw, yt - 4.0, diagram.target_resolution
    ));
    // Series.
    let poly: Vec<String> = pts
        .iter()
        .filter(|p| p.min_resolution.is_finite())
        .map(|p| format!("{:.1},{:.1}", sx(p.x), sy(p.min_resolution)))
        .collect();
    s.push_str(&format!(
        "<polyline fill=\"none\" stroke=\"black\" stroke-width=\"1.5\" points=\"{}\"/>\n",
        poly.join(" ")
    ));
    let late: Vec<&PlotPoint> = pts
        .iter()
        .filter(|p| !p.within_run_time && p.min_resolution.is_finite())
        .collect();
    for p in &late {
        s.push_str(&format!(
            "<circle cx=\"{:.1}\" cy=\"{:.1}\" r=\"3\" fill=\"white\" stroke=\"black\"/>\n",
            sx(p.x),
            sy(p.min_resolution)
        ));
    }
    let unretained: Vec<&PlotPoint> = pts
        .iter()
        .filter(|p| !p.meets_min_retention && p.min_resolution.is_finite())
        .collect();
    for p in &unretained {
        s.push_str(&format!(
            "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"6\" height=\"6\" fill=\"white\" stroke=\"black\"/>\n",
            sx(p.x) - 3.0,
            sy(p.min_resolution) - 3.0
        ));
    }
    let xo = sx(diagram.optimum_x.clamp(x0, x1));
    // Put the label on the side of the line with room for it.
    let (lx, anchor) = if xo > ml + 0.6 * pw {
        (xo - 4.0, "end")
    } else {
        (xo + 4.0, "start")
    };
    s.push_str(&format!(
        "<line x1=\"{xo:.1}\" y1=\"{mt}\" x2=\"{xo:.1}\" y2=\"{}\" stroke=\"black\" stroke-dasharray=\"2 3\"/><text x=\"{lx:.1}\" y=\"{}\" text-anchor=\"{anchor}\">{}</text>\n",
        mt + ph,
        mt + 14.0,
        esc(&diagram.chosen_label)
    ));
    let edge = if searched {
        edge_of(diagram.optimum_x, x0, x1)
    } else {
        None
    };
    if let Some(edge) = edge {
        let (name, unit) = diagram.x_name;
        let text = match edge {
            Edge::Lower => format!(
                "at the lower edge of the searched range: a {name} below {} {unit} was not tried",
                fmt_tick(x0)
            ),
            Edge::Upper => format!(
                "at the upper edge of the searched range: a {name} above {} {unit} was not tried",
                fmt_tick(x1)
            ),
        };
        s.push_str(&format!(
            "<text class=\"edge-flag\" x=\"{lx:.1}\" y=\"{}\" text-anchor=\"{anchor}\" font-style=\"italic\">{}</text>\n",
            mt + 30.0,
            esc(&text)
        ));
    }
    if diagram.optimum_min_resolution.is_finite() {
        s.push_str(&format!(
            "<circle id=\"chosen\" cx=\"{xo:.1}\" cy=\"{:.1}\" r=\"4.5\" fill=\"black\" stroke=\"white\" stroke-width=\"1.5\"/>\n",
            sy(diagram.optimum_min_resolution)
        ));
    }
    // Legend: exactly the marks drawn, flowed into rows under the heading.
    let mut items = vec![
        (
            Symbol::Line,
            "smallest Rs over the searched range".to_string(),
        ),
        (
            Symbol::Dashed,
            format!("target Rs = {}", diagram.target_resolution),
        ),
        (Symbol::Chosen, "chosen condition".to_string()),
    ];
    if searched {
        items.push((Symbol::Shade, "outside the searched range".to_string()));
    }
    if !late.is_empty() {
        items.push((
            Symbol::OpenCircle,
            "beyond the maximum run time".to_string(),
        ));
    }
    if !unretained.is_empty() {
        items.push((
            Symbol::OpenSquare,
            format!("first peak below k = {}", diagram.min_retention_factor),
        ));
    }
    s.push_str("<g class=\"legend\">\n");
    let (mut x, mut y) = (ml, 38.0);
    for (sym, text) in &items {
        // About 6.7 px per character at 12 px sans-serif.
        let width = 28.0 + 6.7 * text.chars().count() as f64 + 16.0;
        if x > ml && x + width > w - mr {
            x = ml;
            y += 18.0;
        }
        s.push_str(&format!(
            "{}<text x=\"{:.1}\" y=\"{:.1}\">{}</text>\n",
            symbol_svg(sym, x, y),
            x + 28.0,
            y + 4.0,
            esc(text)
        ));
        x += width;
    }
    s.push_str("</g>\n");
    s.push_str(&format!("<desc>{}</desc>\n", esc("generated by phasewise")));
    s.push_str("</svg>\n");
    s
}

fn fmt_tick(v: f64) -> String {
    if (v - v.round()).abs() < 1e-9 {
        format!("{}", v.round())
    } else {
        format!("{v:.2}")
            .trim_end_matches('0')
            .trim_end_matches('.')
            .to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn plot(optimum_x: f64, late: bool, unretained: bool) -> WindowPlot {
        WindowPlot {
            title: "t".into(),
            x_label: "Gradient time tG (min)".into(),
            heading: "Window diagram, invented sample".into(),
            x_name: ("gradient time", "min"),
            chosen_label: "chosen".into(),
            target_resolution: 1.5,
            min_retention_factor: 1.0,
            optimum_x,
            optimum_min_resolution: 0.0,
            points: (0..=10)
                .map(|i| PlotPoint {
                    x: 5.0 + 5.5 * f64::from(i),
                    min_resolution: 0.2 * f64::from(i),
                    within_run_time: !(late && i == 10),
                    meets_min_retention: !(unretained && i == 0),
                })
                .collect(),
        }
    }

    /// The value of attribute `name` in the first element that has `id="chosen"`.
    fn chosen_attr(svg: &str, name: &str) -> f64 {
        let el = svg
            .lines()
            .find(|l| l.contains("id=\"chosen\""))
            .expect("chosen marker");
        let key = format!(" {name}=\"");
        let rest = &el[el.find(&key).expect("attribute") + key.len()..];
        rest[..rest.find('"').expect("closing quote")]
            .parse()
            .expect("number")
    }

    /// Attribute `name` of the target-line label.
    fn target_label_attr<'a>(svg: &'a str, name: &str) -> &'a str {
        let el = &svg[svg.find("class=\"target-label\"").expect("target label")..];
        let key = format!(" {name}=\"");
        let rest = &el[el.find(&key).expect("attribute") + key.len()..];
        &rest[..rest.find('"').expect("closing quote")]
    }

    /// Issue 16 (screenshot review): with the chosen point at the right end (a GC ramp just
    /// meeting the target), the "target Rs" label sat on the point; it now goes to the other
    /// end of the line.
    #[test]
    fn the_target_label_sits_at_the_end_away_from_the_chosen_point() {
        let right = render_window_plot(&plot(58.0, false, false));
        let left = render_window_plot(&plot(6.0, false, false));
        assert_eq!(target_label_attr(&right, "text-anchor"), "start");
        assert_eq!(target_label_attr(&left, "text-anchor"), "end");
        for svg in [&right, &left] {
            let tx: f64 = target_label_attr(svg, "x").parse().unwrap();
            let cx = chosen_attr(svg, "cx");
            // the label (about 95 px wide) starts or ends at least 200 px from the point
            assert!((tx - cx).abs() > 200.0, "label at {tx}, point at {cx}");
        }
    }

    #[test]
    fn a_chosen_point_on_an_edge_is_inside_the_plot_and_flagged() {
        // Optimum at the lower limit with Rs 0: the case of a marker sitting on both axes.
        let svg = render_window_plot(&plot(5.0, false, false));
        let (cx, cy) = (chosen_attr(&svg, "cx"), chosen_attr(&svg, "cy"));
        // Plot area: x from 70 to 620, y from 76 to 380 (the axes).
        assert!(cx > 70.0 + 10.0 && cx < 620.0, "{cx}");
        assert!(cy < 380.0 - 5.0 && cy > 76.0, "{cy}");
        assert!(svg.contains("class=\"edge-flag\""));
        assert!(svg.contains("lower edge of the searched range"));
        assert!(svg.contains("below 5 min was not tried"), "{svg}");
        let svg = render_window_plot(&plot(60.0, false, false));
        assert!(svg.contains("upper edge of the searched range"));
        assert!(svg.contains("above 60 min was not tried"));
        // Inside the range: no flag.
        let svg = render_window_plot(&plot(30.0, false, false));
        assert!(!svg.contains("edge-flag"));
    }

    #[test]
    fn the_legend_lists_exactly_the_marks_drawn() {
        let legend = |svg: &str| -> String {
            let a = svg.find("<g class=\"legend\">").expect("legend");
            let b = svg[a..].find("</g>").expect("end of legend");
            svg[a..a + b].to_string()
        };
        let svg = render_window_plot(&plot(30.0, false, false));
        let l = legend(&svg);
        assert!(l.contains("smallest Rs") && l.contains("target Rs = 1.5"));
        assert!(l.contains("chosen condition") && l.contains("outside the searched range"));
        assert!(!l.contains("beyond the maximum run time") && !l.contains("first peak below"));
        // Without late or unretained points no open circle or square is drawn anywhere.
        assert!(!svg.contains("r=\"3\" fill=\"white\""));
        assert!(!svg.contains("width=\"6\" height=\"6\""));
        assert_eq!(svg.matches("class=\"not-searched\"").count(), 2);
        let svg = render_window_plot(&plot(30.0, true, true));
        let l = legend(&svg);
        assert!(l.contains("beyond the maximum run time"));
        assert!(l.contains("first peak below k = 1"));
        // One open circle and one open square in the plot, one of each in the legend.
        assert_eq!(svg.matches("r=\"3\" fill=\"white\"").count(), 2);
        assert_eq!(svg.matches("width=\"6\" height=\"6\"").count(), 2);
    }

    #[test]
    fn edges_are_found_within_a_tenth_of_the_grid() {
        assert_eq!(edge_of(5.0, 5.0, 60.0), Some(Edge::Lower));
        assert_eq!(edge_of(5.04, 5.0, 60.0), Some(Edge::Lower));
        assert_eq!(edge_of(59.96, 5.0, 60.0), Some(Edge::Upper));
        assert_eq!(edge_of(5.2, 5.0, 60.0), None);
        assert_eq!(edge_of(f64::NAN, 5.0, 60.0), None);
        assert_eq!(edge_of(5.0, 5.0, 5.0), None);
    }
}
