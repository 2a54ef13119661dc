//! A small SVG chart of a decaying-source series and the fitted curves.

use std::fmt::Write;

/// One curve: a label, a stroke colour, and points (x, y).
pub struct Curve {
    pub label: String,
    pub colour: &'static str,
    pub points: Vec<(f64, f64)>,
}

/// A "nice" tick step for a range (1, 2 or 5 times a power of ten).
fn tick_step(span: f64) -> f64 {
    let raw = span / 6.0;
    let p = 10f64.powf(raw.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| m * p)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * p)
}

fn label(v: f64) -> String {
    if v != 0.0 && (v.abs() >= 1e5 || v.abs() < 1e-2) {
        format!("{v:.1e}")
    } else {
        format!("{}", (v * 1000.0).round() / 1000.0)
    }
}

/// Renders the data (dots) and the curves on linear axes.
pub fn chart(
    title: &str,
    x_label: &str,
    y_label: &str,
    data: &[(f64, f64)],
    curves: &[Curve],
) -> String {
    let (w, h) = (760.0, 460.0);
    let (left, right, top, bottom) = (80.0, 20.0, 40.0, 60.0);
    let all = data
        .iter()
        .chain(curves.iter().flat_map(|c| c.points.iter()));
    let (mut x0, mut x1, mut y0, mut y1) = (f64::MAX, f64::MIN, 0.0f64, f64::MIN);
    for &(x, y) in all {
        x0 = x0.min(x);
        x1 = x1.max(x);
        y0 = y0.min(y);
        y1 = y1.max(y);
    }
    if x1 <= x0 {
        x1 = x0 + 1.0;
    }
    if y1 <= y0 {
        y1 = y0 + 1.0;
    }
    y1 *= 1.05;
    let px = |x: f64| left + (x - x0) / (x1 - x0) * (w - left - right);
    let py = |y: f64| h - bottom - (y - y0) / (y1 - y0) * (h - top - bottom);
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="sans-serif" font-size="12">"#
    );
    let _ = writeln!(s, r#"<rect width="{w}" height="{h}" fill="white"/>"#);
    let _ = writeln!(
        s,
        r#"<text x="{}" y="24" text-anchor="middle" font-size="15">{title}</text>"#,
        w / 2.0
    );
    // Axes and ticks.
    let _ = writeln!(
        s,
        r#"<path d="M{left} {top} V{} H{}" stroke="black" fill="none"/>"#,
        h - bottom,
        w - right
    );
    let xs = tick_step(x1 - x0);
    let mut t = (x0 / xs).ceil() * xs;
    while t <= x1 + 1e-9 * xs {
        let x = px(t);
        let _ = writeln!(
            s,
            r##"<line x1="{x}" y1="{}" x2="{x}" y2="{}" stroke="#999"/><text x="{x}" y="{}" text-anchor="middle">{}</text>"##,
            h - bottom,
            h - bottom + 5.0,
            h - bottom + 18.0,
            label(t)
        );
        t += xs;
    }
    let ys = tick_step(y1 - y0);
    let mut t = (y0 / ys).ceil() * ys;
    while t <= y1 + 1e-9 * ys {
        let y = py(t);
        let _ = writeln!(
            s,
            r##"<line x1="{}" y1="{y}" x2="{}" y2="{y}" stroke="#ddd"/><text x="{}" y="{}" text-anchor="end">{}</text>"##,
            left,
            w - right,
            left - 6.0,
            y + 4.0,
            label(t)
        );
        t += ys;
    }
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}" text-anchor="middle">{x_label}</text>"#,
        (left + w - right) / 2.0,
        h - 18.0
    );
    let _ = writeln!(
        s,
        r#"<text x="18" y="{}" text-anchor="middle" transform="rotate(-90 18 {})">{y_label}</text>"#,
        (top + h - bottom) / 2.0,
        (top + h - bottom) / 2.0
    );
    // Curves, then data on top.
    for (i, c) in curves.iter().enumerate() {
        let d: Vec<String> = c
            .points
            .iter()
            .map(|&(x, y)| format!("{:.2},{:.2}", px(x), py(y)))
            .collect();
        let _ = writeln!(
            s,
            r#"<polyline points="{}" fill="none" stroke="{}" stroke-width="2"/>"#,
            d.join(" "),
            c.colour
        );
        let ly = top + 16.0 + 18.0 * i as f64;
        let _ = writeln!(
            s,
            r#"<line x1="{}" y1="{ly}" x2="{}" y2="{ly}" stroke="{}" stroke-width="2"/><text x="{}" y="{}">{}</text>"#,
            w - right - 250.0,
            w - right - 226.0,
            c.colour,
            w - right - 220.0,
            ly + 4.0,
            c.label
        );
    }
    for &(x, y) in data {
        let _ = writeln!(
            s,
            r##"<circle cx="{:.2}" cy="{:.2}" r="3" fill="#1b1b1b"/>"##,
            px(x),
            py(y)
        );
    }
    s.push_str("</svg>\n");
    s
}
