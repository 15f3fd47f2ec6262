//! The margins figure of `retidose compare`: one row per compared scenario, in rank order, its
//! margin (the factor to the limit, 1 ÷ the worst hazard ratio) as a bar from the margin-1 line
//! on a ticked log axis. On a log axis a bar needs an origin that means something: here it is
//! the limit, so a bar to the right shows how many times stronger the light could be, one to
//! the left how many times the limit is exceeded.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use retidose::compare::Comparison;

use super::{Area, Figure, PlotResult, decades, log_rows, render, text, value_label};

const WITHIN: RGBColor = RGBColor(0, 158, 115);
const EXCEEDS: RGBColor = RGBColor(213, 94, 0);

/// One row: the column's label and its finite margin (`None`: no margin or an infinite one).
struct Row {
    label: String,
    margin: Option<f64>,
    upper_bound: bool,
}

/// The margins figure; `None` when no scenario has a finite margin above 0.
pub fn figure(c: &Comparison) -> Option<Figure> {
    let rows: Vec<Row> = c
        .columns
        .iter()
        .map(|col| Row {
            label: col.label.clone(),
            margin: col.margin.filter(|m| m.is_finite() && *m > 0.0),
            upper_bound: col.worst.as_ref().is_some_and(|w| w.lower_bound),
        })
        .collect();
    let values: Vec<f64> = rows.iter().filter_map(|r| r.margin).collect();
    if values.is_empty() {
        return None;
    }
    let lo = values.iter().copied().fold(1.0, f64::min);
    let hi = values.iter().copied().fold(1.0, f64::max);
    let x = decades(lo / 1.5, hi * 1.5);
    let label_px =
        (rows.iter().map(|r| r.label.chars().count()).max().unwrap_or(10) as f64 * 6.9 + 24.0).min(360.0);
    let h = 60 + 30 * rows.len() as u32 + 50;
    let svg =
        render((920, h), "margin of each scenario, log scale", |root| draw(root, &rows, x, label_px)).ok()?;
    Some(Figure { svg, caption: caption(&rows) })
}

/// The caption.
fn caption(rows: &[Row]) -> String {
    let mut c = "Margin of each scenario (the factor to the limit: 1 ÷ the worst hazard ratio), ranked, on a \
                 logarithmic axis; bars start at the dashed line (margin 1, the limit): to the right the binding \
                 hazard is within its limit, to the left it exceeds it."
        .to_string();
    if rows.iter().any(|r| r.upper_bound) {
        c.push_str(" ≤: an upper bound, where the worst ratio is a lower bound (band partly covered).");
    }
    if rows.iter().any(|r| r.margin.is_none()) {
        c.push_str(" Scenarios with no hazard assessed, or with every ratio 0, have no bar.");
    }
    c
}

/// The axes, the margin-1 line, the bars and their labels.
fn draw(root: &Area<'_>, rows: &[Row], x: (f64, f64), label_px: f64) -> PlotResult<()> {
    let n = rows.len() as f64;
    let mut c = log_rows(root, x, n, label_px, 26, "margin, factor to the limit (log scale)")?;
    for (i, r) in rows.iter().enumerate() {
        let y = n - i as f64 - 0.5;
        let (px, py) = c.backend_coord(&(x.0, y));
        let style = text(12.0, BLACK).pos(Pos::new(HPos::Right, VPos::Center));
        root.draw(&Text::new(r.label.clone(), (px - 8, py), style))?;
        let Some(m) = r.margin else {
            let style = text(11.0, BLACK).pos(Pos::new(HPos::Left, VPos::Center));
            root.draw(&Text::new("no finite margin", (c.backend_coord(&(1.0, y)).0 + 8, py), style))?;
            continue;
        };
        let colour = if m >= 1.0 { WITHIN } else { EXCEEDS };
        c.draw_series(std::iter::once(Rectangle::new([(1.0, y - 0.3), (m, y + 0.3)], colour.filled())))?;
        let end = c.backend_coord(&(m, y));
        let (dx, anchor) = if m >= 1.0 { (6, HPos::Left) } else { (-6, HPos::Right) };
        let label = format!("{}{}", if r.upper_bound { "≤ " } else { "" }, value_label(m));
        root.draw(&Text::new(
            label,
            (end.0 + dx, end.1),
            text(11.0, colour).pos(Pos::new(anchor, VPos::Center)),
        ))?;
    }
    let dash = (0..(n * 4.0) as i32).map(|k| {
        let y = f64::from(k) / 4.0;
        PathElement::new(vec![(1.0, y), (1.0, y + 0.15)], BLACK.stroke_width(2))
    });
    c.draw_series(dash)?;
    let top = c.backend_coord(&(1.0, n));
    let anchor = Pos::new(HPos::Center, VPos::Bottom);
    root.draw(&Text::new("limit (margin 1)", (top.0, top.1 - 3), text(11.0, BLACK).pos(anchor)))?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, texts};
    use super::*;
    use retidose::assess::{assess, demo, parse_scenario_file};

    #[test]
    fn one_bar_per_scenario_with_its_margin_and_the_limit_line() {
        let s = parse_scenario_file(demo("stimulus-review").unwrap(), "s", None).unwrap();
        let a = assess(&s).unwrap();
        let c = retidose::compare::compare(&[("first <b>", &a), ("second", &a)]);
        let f = figure(&c).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg);
        let m = value_label(c.columns[0].margin.unwrap());
        assert_eq!(t.iter().filter(|x| **x == m).count(), 2, "{t:?}");
        for want in ["first <b>", "second", "limit (margin 1)", "margin, factor to the limit (log scale)"] {
            assert!(t.iter().any(|x| x == want), "{want} missing from {t:?}");
        }
        assert!(!f.svg.contains("<b>"), "labels are escaped in the SVG");
    }
}
