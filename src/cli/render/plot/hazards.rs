//! The hazard-ratio figure: one row per hazard evaluated (grouped by source and limit set, with
//! the hazards' own names), its ratio as a point on a ticked log axis with the ratio-1 line, and
//! the lower bound where the spectrum covers only part of a band. Points, not bars: a bar on a
//! log axis has no natural origin, so its length would mean nothing.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use retidose::assess::Assessment;
use retidose::limits::Verdict;

use super::{
    Area, Figure, GRID, PlotResult, bold, decades, log_rows, power_label, render, short_document, text,
    value_label,
};

/// Ratios below this are drawn at the axis edge, with their value.
const FLOOR: f64 = 1e-12;

const WITHIN: RGBColor = RGBColor(0, 158, 115);
const EXCEEDS: RGBColor = RGBColor(213, 94, 0);
const BOUND: RGBColor = RGBColor(90, 90, 90);

/// One row: a group heading (no values) or a hazard.
#[derive(Debug, Clone, PartialEq)]
struct Row {
    label: String,
    heading: bool,
    ratio: Option<f64>,
    lower_bound: Option<f64>,
    exceeds: bool,
}

/// The hazard-ratio figure; `None` when no hazard has a ratio or a lower bound.
pub fn figure(a: &Assessment) -> Option<Figure> {
    let rows = rows(a);
    let values: Vec<f64> = rows.iter().flat_map(|r| r.ratio.into_iter().chain(r.lower_bound)).collect();
    if values.is_empty() {
        return None;
    }
    let lo = values.iter().copied().fold(1.0, f64::min).max(FLOOR);
    let hi = values.iter().copied().fold(1.0, f64::max);
    let x = decades(lo, hi * 1.5);
    let label_px = rows.iter().map(|r| r.label.chars().count()).max().unwrap_or(10) as f64 * 6.9 + 24.0;
    let h = 70 + 26 * rows.len() as u32 + 70;
    let svg = render((920, h), "hazard ratios, log scale", |root| draw(root, &rows, x, label_px.min(460.0)))
        .ok()?;
    Some(Figure { svg, caption: caption(&rows) })
}

/// Heading rows per source and set, then its hazards with a ratio or a lower bound.
fn rows(a: &Assessment) -> Vec<Row> {
    let mut out = Vec::new();
    for l in &a.limits {
        let hs: Vec<Row> = l
            .hazards
            .iter()
            .filter(|h| h.ratio.is_some() || h.lower_bound_ratio.is_some())
            .map(|h| Row {
                label: h.name.clone(),
                heading: false,
                ratio: h.ratio,
                lower_bound: h.lower_bound_ratio.filter(|_| h.ratio.is_none() || h.partial),
                exceeds: h.verdict == Verdict::Exceeds,
            })
            .collect();
        if hs.is_empty() {
            continue;
        }
        let doc = short_document(&l.document, &l.edition);
        out.push(Row {
            label: format!("{} — {doc}", l.source),
            heading: true,
            ratio: None,
            lower_bound: None,
            exceeds: false,
        });
        out.extend(hs);
    }
    out
}

/// The caption.
fn caption(rows: &[Row]) -> String {
    let mut c = "Hazard ratio (exposure ÷ limit at the exposure duration) of each hazard evaluated, by source and \
                 limit set, on a logarithmic axis; right of the dashed line (ratio 1) the limit is exceeded. Hazards \
                 not applicable, or not assessed with no lower bound, are in the tables only."
        .to_string();
    if rows.iter().any(|r| r.lower_bound.is_some()) {
        c.push_str(" Open triangles: lower bounds, where the spectrum covers only part of a hazard's band.");
    }
    if rows.iter().flat_map(|r| r.ratio.into_iter().chain(r.lower_bound)).any(|v| v < FLOOR) {
        c.push_str(&format!(
            " Ratios below {} are drawn at the axis edge with their value.",
            power_label(FLOOR)
        ));
    }
    c
}

/// The axes, the ratio-1 line, the rows and their labels, and the key below.
fn draw(root: &Area<'_>, rows: &[Row], x: (f64, f64), label_px: f64) -> PlotResult<()> {
    let n = rows.len() as f64;
    let (plot, key) = root.split_vertically(root.dim_in_pixel().1 - 34);
    let mut c = log_rows(&plot, x, n, label_px, 14, "hazard ratio, exposure ÷ limit (log scale)")?;
    let dash = (0..(n * 4.0) as i32).map(|k| {
        let y = f64::from(k) / 4.0;
        PathElement::new(vec![(1.0, y), (1.0, y + 0.15)], EXCEEDS.stroke_width(2))
    });
    c.draw_series(dash)?;
    let top = c.backend_coord(&(1.0, n));
    let anchor = Pos::new(HPos::Center, VPos::Bottom);
    root.draw(&Text::new("limit (ratio 1)", (top.0, top.1 - 3), text(11.0, EXCEEDS).pos(anchor)))?;
    for (i, r) in rows.iter().enumerate() {
        let y = n - i as f64 - 0.5;
        let (px, py) = c.backend_coord(&(x.0, y));
        let style = if r.heading { bold(12.0, BLACK) } else { text(12.0, BLACK) };
        let (lx, anchor) = if r.heading { (16, HPos::Left) } else { (px - 8, HPos::Right) };
        root.draw(&Text::new(r.label.clone(), (lx, py), style.pos(Pos::new(anchor, VPos::Center))))?;
        if r.heading && i > 0 {
            c.draw_series(std::iter::once(PathElement::new(vec![(x.0, y + 0.5), (x.1, y + 0.5)], GRID)))?;
        }
        let items: Vec<_> =
            values(r).map(|(v, b)| (c.backend_coord(&(v.clamp(x.0, x.1), y)), v, b)).collect();
        marks(root, r, &items, x.0)?;
    }
    key_row(&key, rows, x.0)
}

/// A row's values: the ratio, then the lower bound (`true`).
fn values(r: &Row) -> impl Iterator<Item = (f64, bool)> {
    r.ratio.map(|v| (v, false)).into_iter().chain(r.lower_bound.map(|v| (v, true)))
}

/// The marks and value labels of one row, at their pixels; `floor` is the axis start.
fn marks(root: &Area<'_>, r: &Row, items: &[((i32, i32), f64, bool)], floor: f64) -> PlotResult<()> {
    for &(at, v, bound) in items {
        let colour = match (bound, r.exceeds) {
            (true, _) => BOUND,
            (false, true) => EXCEEDS,
            (false, false) => WITHIN,
        };
        if bound {
            let tri =
                vec![(at.0 - 6, at.1 - 6), (at.0 + 6, at.1), (at.0 - 6, at.1 + 6), (at.0 - 6, at.1 - 6)];
            root.draw(&PathElement::new(tri, colour.stroke_width(2)))?;
        } else if v < floor {
            root.draw(&Polygon::new(
                vec![(at.0, at.1), (at.0 + 9, at.1 - 6), (at.0 + 9, at.1 + 6)],
                colour.filled(),
            ))?;
        } else {
            root.draw(&Circle::new(at, 6, colour.filled()))?;
        }
        let value = if bound { format!("≥ {}", value_label(v)) } else { value_label(v) };
        let style = text(11.0, colour).pos(Pos::new(HPos::Left, VPos::Center));
        root.draw(&Text::new(value, (at.0 + 12, at.1), style))?;
    }
    Ok(())
}

/// The key below the axis: what each mark that occurs means.
fn key_row(area: &Area<'_>, rows: &[Row], floor: f64) -> PlotResult<()> {
    let y = 14;
    let ratios = || rows.iter().filter(|r| r.ratio.is_some());
    let below = rows.iter().flat_map(values).any(|v| v.0 < floor);
    let entries = [
        (ratios().any(|r| !r.exceeds), 0, "within the limit".to_string()),
        (ratios().any(|r| r.exceeds), 1, "exceeds the limit".to_string()),
        (rows.iter().any(|r| r.lower_bound.is_some()), 2, "lower bound (band partly covered)".to_string()),
        (below, 3, format!("below {} (value printed)", power_label(floor))),
    ];
    let mut x = 24;
    for (_, kind, label) in entries.into_iter().filter(|e| e.0) {
        match kind {
            0 => area.draw(&Circle::new((x, y), 6, WITHIN.filled()))?,
            1 => area.draw(&Circle::new((x, y), 6, EXCEEDS.filled()))?,
            2 => {
                let tri = vec![(x - 6, y - 6), (x + 6, y), (x - 6, y + 6), (x - 6, y - 6)];
                area.draw(&PathElement::new(tri, BOUND.stroke_width(2)))?
            }
            _ => {
                area.draw(&Polygon::new(vec![(x - 4, y), (x + 5, y - 6), (x + 5, y + 6)], BOUND.filled()))?
            }
        }
        let style = text(11.0, BLACK).pos(Pos::new(HPos::Left, VPos::Center));
        area.draw(&Text::new(label.clone(), (x + 12, y), style))?;
        x += 12 + (label.chars().count() as f64 * 6.2) as i32 + 36;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, demo, texts};
    use super::*;

    #[test]
    fn names_not_ids_a_ticked_log_axis_and_the_limit_line() {
        let f = figure(&demo("stimulus-review")).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg);
        for want in [
            "retinal blue light (photochemical), radiance",
            "stimulus — IEC 62471:2006 / CIE S 009:2002",
            "stimulus — Directive 2006/25/EC",
            "limit (ratio 1)",
            "hazard ratio, exposure ÷ limit (log scale)",
            "1",
            "10⁻⁶",
        ] {
            assert!(t.iter().any(|x| x == want), "{want} missing from {t:?}");
        }
        assert!(!t.iter().any(|x| x == "blue-light" || x.contains("iec62471-2006")), "no internal ids");
    }

    #[test]
    fn lower_bounds_are_drawn_where_the_band_is_partly_covered() {
        let f = figure(&demo("dark-adaptation")).unwrap();
        assert_well_formed(&f.svg);
        assert!(texts(&f.svg).iter().any(|x| x.starts_with("≥ ")));
        assert!(f.caption.contains("lower bounds"));
    }
}
