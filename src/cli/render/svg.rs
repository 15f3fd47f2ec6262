//! Inline SVG plots of the HTML report: line plots, bar charts and the rack heat map.

use std::fmt::Write;

use retidose::housing::pass::Flags;
use retidose::housing::survey::RackResult;

use super::room::Cell;

use super::html::esc;
use super::num;

/// A plotted line: name, colour and (x, y) points.
pub type Series<'a> = (&'a str, &'a str, Vec<(f64, f64)>);

/// A line plot of several series, with axes, labels and a legend; empty when there are no
/// finite points.
pub fn lines(title: &str, series: &[Series<'_>], x_label: &str, y_label: &str, log_y: bool) -> String {
    let (w, h, l, r, t, b) = (700.0, 300.0, 70.0, 190.0, 30.0, 40.0);
    let pts: Vec<(f64, f64)> = series
        .iter()
        .flat_map(|s| s.2.iter().copied())
        .filter(|p| p.0.is_finite() && p.1.is_finite())
        .collect();
    if pts.is_empty() {
        return String::new();
    }
    let fy = |y: f64| if log_y { y.max(1e-12).log10() } else { y };
    let (x0, x1) = pts.iter().fold((f64::MAX, f64::MIN), |a, p| (a.0.min(p.0), a.1.max(p.0)));
    let (y0, y1) = pts.iter().fold((f64::MAX, f64::MIN), |a, p| (a.0.min(fy(p.1)), a.1.max(fy(p.1))));
    let (y0, y1) = if (y1 - y0).abs() < 1e-12 { (y0 - 1.0, y1 + 1.0) } else { (y0, y1) };
    let sx = |x: f64| l + (x - x0) / (x1 - x0).max(1e-12) * (w - l - r);
    let sy = |y: f64| h - b - (fy(y) - y0) / (y1 - y0) * (h - t - b);
    let mut o = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"{}\">",
        esc(title)
    );
    let _ = write!(o, "<text x=\"{l}\" y=\"18\" font-size=\"13\" font-weight=\"bold\">{}</text>", esc(title));
    let _ = write!(
        o,
        "<line x1=\"{l}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#444\"/><line x1=\"{l}\" y1=\"{t}\" x2=\"{l}\" y2=\"{}\" stroke=\"#444\"/>",
        h - b,
        w - r,
        h - b,
        h - b
    );
    let _ = write!(
        o,
        "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">{} ({} to {})</text>",
        (l + w - r) / 2.0,
        h - 8.0,
        esc(x_label),
        num(x0),
        num(x1)
    );
    let _ = write!(
        o,
        "<text x=\"12\" y=\"{}\" font-size=\"11\" transform=\"rotate(-90 12 {})\" text-anchor=\"middle\">{}</text>",
        h / 2.0,
        h / 2.0,
        esc(y_label)
    );
    let unlog = |v: f64| if log_y { 10f64.powf(v) } else { v };
    for (v, y) in [(unlog(y1), t + 4.0), (unlog(y0), h - b)] {
        let _ = write!(
            o,
            "<text x=\"{}\" y=\"{y}\" font-size=\"10\" text-anchor=\"end\">{}</text>",
            l - 4.0,
            num(v)
        );
    }
    for (i, (name, colour, data)) in series.iter().enumerate() {
        let path: Vec<String> = data
            .iter()
            .filter(|p| p.1.is_finite())
            .map(|p| format!("{:.1},{:.1}", sx(p.0), sy(p.1)))
            .collect();
        let _ = write!(
            o,
            "<polyline fill=\"none\" stroke=\"{colour}\" stroke-width=\"1.6\" points=\"{}\"/>",
            path.join(" ")
        );
        let _ = write!(
            o,
            "<rect x=\"{}\" y=\"{}\" width=\"10\" height=\"10\" fill=\"{colour}\"/><text x=\"{}\" y=\"{}\" font-size=\"11\">{}</text>",
            w - r + 10.0,
            t + 16.0 * i as f64,
            w - r + 24.0,
            t + 9.0 + 16.0 * i as f64,
            esc(name)
        );
    }
    o.push_str("</svg>");
    o
}

/// Horizontal bars of hazard ratios on a log scale, with the ratio-1 line (the limit).
pub fn bars(title: &str, bars: &[(String, f64)]) -> String {
    let (w, bar_h, l) = (640.0, 20.0, 260.0);
    let h = 40.0 + bar_h * bars.len() as f64 + 20.0;
    let max = bars.iter().map(|b| b.1.max(1e-12).log10()).fold(0.0f64, f64::max).max(0.5);
    let min = bars.iter().map(|b| b.1.max(1e-12).log10()).fold(0.0f64, f64::min).min(-3.0);
    let sx = |v: f64| l + (v.max(1e-12).log10() - min) / (max - min) * (w - l - 40.0);
    let mut o = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"{}\">",
        esc(title)
    );
    let _ = write!(o, "<text x=\"10\" y=\"18\" font-size=\"13\" font-weight=\"bold\">{}</text>", esc(title));
    for (i, (name, v)) in bars.iter().enumerate() {
        let y = 30.0 + bar_h * i as f64;
        let colour = if *v > 1.0 { "#c62828" } else { "#2e7d32" };
        let _ = write!(
            o,
            "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"end\">{}</text>",
            l - 6.0,
            y + 14.0,
            esc(name)
        );
        let _ = write!(
            o,
            "<rect x=\"{l}\" y=\"{}\" width=\"{:.1}\" height=\"{}\" fill=\"{colour}\"/><text x=\"{:.1}\" y=\"{}\" font-size=\"10\">{}</text>",
            y + 3.0,
            (sx(*v) - l).max(1.0),
            bar_h - 6.0,
            sx(*v) + 4.0,
            y + 14.0,
            num(*v)
        );
    }
    let one = sx(1.0);
    let _ = write!(
        o,
        "<line x1=\"{one:.1}\" y1=\"26\" x2=\"{one:.1}\" y2=\"{}\" stroke=\"#000\" stroke-dasharray=\"4 3\"/><text x=\"{one:.1}\" y=\"{}\" font-size=\"10\" text-anchor=\"middle\">ratio 1 (the limit); log scale</text>",
        h - 16.0,
        h - 4.0
    );
    o.push_str("</svg>");
    o
}

/// A rack as a heat map of room lux at cage level: shelf and column labels, the lux in each
/// cell in a colour chosen for contrast, red outline above the range, blue below.
pub fn heatmap(r: &RackResult, cells: &[Option<Cell>]) -> String {
    let (cell, l, t) = (56.0, 70.0, 48.0);
    let (shelves, columns) = (r.shelves, r.columns);
    let w = (l + cell * f64::from(columns) + 20.0).max(560.0);
    let h = t + cell * f64::from(shelves) + 40.0;
    let max = cells.iter().flatten().map(|c| c.lux).fold(0.0, f64::max).max(1e-9);
    let mut o = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"rack heat map\">"
    );
    let _ = write!(
        o,
        "<text x=\"10\" y=\"18\" font-size=\"13\" font-weight=\"bold\">Room lux at cage level, lx (0 to {:.0}; red outline above the range, blue below)</text>",
        max
    );
    for s in 1..=shelves {
        for c in 1..=columns {
            let Some(p) = cells[((s - 1) * columns + c - 1) as usize] else { continue };
            let x = l + cell * f64::from(c - 1);
            let y = t + cell * f64::from(shelves - s);
            let f = p.lux / max;
            let (rr, g, bl) = ((255.0 * f) as u8, (200.0 * f + 30.0) as u8, (80.0 * (1.0 - f) + 40.0) as u8);
            let ink = if f > 0.45 { "#000" } else { "#fff" };
            let stroke = if p.flags.has(Flags::ABOVE) {
                "#d50000"
            } else if p.flags.has(Flags::BELOW) {
                "#2962ff"
            } else {
                "#fff"
            };
            let _ = write!(
                o,
                "<rect x=\"{x}\" y=\"{y}\" width=\"{cell}\" height=\"{cell}\" fill=\"rgb({rr},{g},{bl})\" stroke=\"{stroke}\" stroke-width=\"3\"/><text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\" fill=\"{ink}\">{:.0}</text>",
                x + cell / 2.0,
                y + cell / 2.0 + 4.0,
                p.lux
            );
        }
    }
    for s in 1..=shelves {
        let _ = write!(
            o,
            "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"end\">shelf {s}</text>",
            l - 6.0,
            t + cell * f64::from(shelves - s) + cell / 2.0 + 4.0
        );
    }
    for c in 1..=columns {
        let _ = write!(
            o,
            "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">col {c}</text>",
            l + cell * f64::from(c - 1) + cell / 2.0,
            t - 6.0
        );
    }
    o.push_str("</svg>");
    o
}
