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
/// GC); the texts are given in full by the caller.
pub(crate) struct WindowPlot {
    /// `<title>` text.
    pub(crate) title: String,
    /// x-axis label with its unit.
    pub(crate) x_label: String,
    /// Two legend lines above the plot.
    pub(crate) legend: [String; 2],
    /// Label of the chosen condition's vertical line.
    pub(crate) chosen_label: String,
    /// Dashed target line.
    pub(crate) target_resolution: f64,
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

/// The SVG of a [`WindowPlot`] (see [`render_window_svg`] for what is drawn).
pub(crate) fn render_window_plot(diagram: &WindowPlot) -> String {
    let (w, h) = (640.0, 400.0);
    let (ml, mr, mt, mb) = (70.0, 20.0, 40.0, 60.0);
    let pw = w - ml - mr;
    let ph = h - mt - mb;
    let pts = &diagram.points;
    let (x0, x1) = pts
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
            (a.min(p.x), b.max(p.x))
        });
    let (x0, x1) = if x0.is_finite() && x1 > x0 {
        (x0, x1)
    } else {
        (0.0, 1.0)
    };
    let ymax = pts
        .iter()
        .map(|p| p.min_resolution)
        .filter(|v| v.is_finite())
        .fold(diagram.target_resolution, f64::max)
        .max(0.5)
        * 1.1;
    let sx = |x: f64| ml + (x - x0) / (x1 - x0) * pw;
    let sy = |y: f64| mt + ph - (y.clamp(0.0, ymax) / ymax) * ph;
    let mut s = String::new();
    s.push_str(&format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\" font-family=\"sans-serif\" font-size=\"12\">\n"
    ));
    s.push_str(&format!("<title>{}</title>\n", esc(&diagram.title)));
    s.push_str("<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n");
    // Axes.
    s.push_str(&format!(
        "<line x1=\"{ml}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"black\"/>\n<line x1=\"{ml}\" y1=\"{mt}\" x2=\"{ml}\" y2=\"{}\" stroke=\"black\"/>\n",
        mt + ph, ml + pw, mt + ph, mt + ph
    ));
    let xs = nice_step(x1 - x0);
    let mut t = (x0 / xs).ceil() * xs;
    while t <= x1 + 1e-9 {
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
        "<text x=\"{ml}\" y=\"16\">{}</text>\n",
        esc(&diagram.legend[0])
    ));
    s.push_str(&format!(
        "<text x=\"{ml}\" y=\"31\">{}</text>\n",
        esc(&diagram.legend[1])
    ));
    // Target line.
    let yt = sy(diagram.target_resolution);
    s.push_str(&format!(
        "<line x1=\"{ml}\" y1=\"{yt:.1}\" x2=\"{}\" y2=\"{yt:.1}\" stroke=\"black\" stroke-dasharray=\"6 4\"/><text x=\"{}\" y=\"{:.1}\" text-anchor=\"end\">target Rs = {}</text>\n",
        ml + pw, ml + pw - 4.0, yt - 4.0, diagram.target_resolution
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
    for p in pts
        .iter()
        .filter(|p| !p.within_run_time && p.min_resolution.is_finite())
    {
        s.push_str(&format!(
            "<circle cx=\"{:.1}\" cy=\"{:.1}\" r=\"3\" fill=\"white\" stroke=\"black\"/>\n",
            sx(p.x),
            sy(p.min_resolution)
        ));
    }
    for p in pts
        .iter()
        .filter(|p| !p.meets_min_retention && p.min_resolution.is_finite())
    {
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
        mt + 12.0,
        esc(&diagram.chosen_label)
    ));
    if diagram.optimum_min_resolution.is_finite() {
        s.push_str(&format!(
            "<circle id=\"chosen\" cx=\"{xo:.1}\" cy=\"{:.1}\" r=\"4.5\" fill=\"black\"/>\n",
            sy(diagram.optimum_min_resolution)
        ));
    }
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
