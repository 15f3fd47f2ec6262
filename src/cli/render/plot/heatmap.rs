//! The rack heat map: room light at cage level in each cage position (top shelf at the top),
//! shelf and column labels, the lux in each cell in black or white by the fill's luminance, a
//! colour scale with its unit and the guidance bounds, and distinct marks for positions above
//! (red outline, ▲) and below (blue outline, ▼) the guidance range.

use plotters::coord::ranged1d::{AsRangedCoord, Ranged, ValueFormatter};
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use retidose::housing::pass::{Basis, Flags};
use retidose::housing::survey::RackResult;

use super::{Area, Figure, PlotResult, bold, font, ink_on, render, text, tick_label, viridis};
use crate::cli::render::room::Cell;

/// Cell side, label column width, top margin, px.
const CELL: i32 = 64;
const LEFT: i32 = 122;
const TOP: i32 = 16;
/// Width of the colour-scale panel, px.
const BAR_PANEL: i32 = 130;

const ABOVE: RGBColor = RGBColor(213, 0, 0);
const BELOW: RGBColor = RGBColor(41, 98, 255);

/// The lux range of the colours, and whether it is logarithmic.
#[derive(Debug, Clone, Copy)]
struct Scale {
    lo: f64,
    hi: f64,
    log: bool,
}

impl Scale {
    /// Where `lux` sits on the scale, 0 to 1.
    fn at(&self, lux: f64) -> f64 {
        if self.log {
            (lux.max(self.lo).ln() - self.lo.ln()) / (self.hi.ln() - self.lo.ln())
        } else {
            (lux - self.lo) / (self.hi - self.lo)
        }
    }
}

/// The heat map of one rack; `None` when no cell has a value.
pub fn figure(r: &RackResult, cells: &[Option<Cell>]) -> Option<Figure> {
    let lux: Vec<f64> = cells.iter().flatten().map(|c| c.lux).filter(|v| v.is_finite()).collect();
    if lux.is_empty() {
        return None;
    }
    let bounds = [r.bounds.lower.map(|b| b.lx), r.bounds.upper.map(|b| b.lx)];
    let all = lux.iter().copied().chain(bounds.iter().flatten().copied());
    let (lo, hi) = all.fold((f64::MAX, 0.0f64), |m, v| (m.0.min(v), m.1.max(v)));
    let log = lo > 0.0 && hi / lo > 5.0;
    let scale = if log {
        let (lo, hi) = super::decades(lo, hi);
        Scale { lo, hi, log }
    } else {
        Scale { lo: 0.0, hi: if hi > 0.0 { hi * 1.05 } else { 1.0 }, log }
    };
    let grid_h = CELL * r.shelves as i32;
    let w = (LEFT + CELL * r.columns as i32 + 24 + BAR_PANEL).max(560) as u32;
    let keys = bounds.iter().flatten().count().max(1) as i32;
    let h = (TOP + grid_h.max(200) + 34 + 20 * keys + 10) as u32;
    let label = format!("rack heat map: rack {}, room light at cage level, lx", r.id);
    let svg = render((w, h), &label, |root| draw(root, r, cells, scale, bounds)).ok()?;
    let caption = caption(r, cells, scale);
    Some(Figure { svg, caption })
}

/// The caption: what the colours, marks and type mean.
fn caption(r: &RackResult, cells: &[Option<Cell>], s: Scale) -> String {
    let range = match (r.bounds.lower, r.bounds.upper) {
        (Some(l), Some(u)) => format!("{}–{} lx", tick_label(l.lx), tick_label(u.lx)),
        (Some(l), None) => format!("at least {} lx", tick_label(l.lx)),
        (None, Some(u)) => format!("at most {} lx", tick_label(u.lx)),
        (None, None) => String::new(),
    };
    let mut c = format!(
        "Rack {}: room light at cage level (lx) in each position, top shelf at the top; colour scale {}.",
        r.id,
        if s.log { "logarithmic" } else { "linear" }
    );
    if !range.is_empty() {
        c.push_str(&format!(
            " Guidance range {range}: red outline and ▲ above it, blue outline and ▼ below it (also marked on the scale)."
        ));
    }
    let has = |b: Basis| cells.iter().flatten().any(|x| x.basis == b);
    if has(Basis::Reading) && (has(Basis::Model) || has(Basis::Predicted)) {
        c.push_str(" Bold values are readings; the others come from the luminaire model.");
    }
    c
}

/// The cells, labels, colour scale and key.
fn draw(
    root: &Area<'_>,
    r: &RackResult,
    cells: &[Option<Cell>],
    s: Scale,
    bounds: [Option<f64>; 2],
) -> PlotResult<()> {
    let (shelves, columns) = (r.shelves as i32, r.columns as i32);
    for shelf in 1..=shelves {
        let y = TOP + CELL * (shelves - shelf);
        let tag = if shelf == shelves && shelves > 1 {
            " (top)"
        } else if shelf == 1 && shelves > 1 {
            " (bottom)"
        } else {
            ""
        };
        let style = text(12.0, BLACK).pos(Pos::new(HPos::Right, VPos::Center));
        root.draw(&Text::new(format!("shelf {shelf}{tag}"), (LEFT - 8, y + CELL / 2), style))?;
        for col in 1..=columns {
            if let Some(c) = cells.get(((shelf - 1) * columns + col - 1) as usize).copied().flatten() {
                cell(root, (LEFT + CELL * (col - 1), y), c, s)?;
            }
        }
    }
    let below = TOP + CELL * shelves + 6;
    for col in 1..=columns {
        let style = text(12.0, BLACK).pos(Pos::new(HPos::Center, VPos::Top));
        root.draw(&Text::new(format!("column {col}"), (LEFT + CELL * (col - 1) + CELL / 2, below), style))?;
    }
    let x0 = LEFT + CELL * columns + 24;
    let bar = root.clone().shrink((x0, TOP - 8), (BAR_PANEL, (CELL * shelves).max(200) + 16));
    if s.log {
        scale_bar(&bar, s, (s.lo..s.hi).log_scale(), bounds)?
    } else {
        scale_bar(&bar, s, s.lo..s.hi, bounds)?
    }
    key(root, below + 26, r)
}

/// One cell: the fill, the value in legible ink, and the out-of-range outline and mark.
fn cell(root: &Area<'_>, (x, y): (i32, i32), c: Cell, s: Scale) -> PlotResult<()> {
    let fill = viridis(s.at(c.lux));
    root.draw(&Rectangle::new([(x, y), (x + CELL, y + CELL)], fill.filled()))?;
    root.draw(&Rectangle::new([(x, y), (x + CELL, y + CELL)], WHITE.stroke_width(1)))?;
    let style = if c.basis == Basis::Reading { bold(13.0, ink_on(fill)) } else { text(13.0, ink_on(fill)) };
    let centre = (x + CELL / 2, y + CELL / 2 + 4);
    root.draw(&Text::new(lux_text(c.lux), centre, style.pos(Pos::new(HPos::Center, VPos::Center))))?;
    let mark = if c.flags.has(Flags::ABOVE) {
        Some((ABOVE, "▲"))
    } else if c.flags.has(Flags::BELOW) {
        Some((BELOW, "▼"))
    } else {
        None
    };
    if let Some((colour, glyph)) = mark {
        root.draw(&Rectangle::new([(x + 3, y + 3), (x + CELL - 3, y + CELL - 3)], colour.stroke_width(4)))?;
        root.draw(&Rectangle::new([(x + 6, y + 6), (x + CELL - 6, y + CELL - 6)], WHITE.stroke_width(1)))?;
        root.draw(&Circle::new((x + CELL - 15, y + 15), 9, WHITE.filled()))?;
        let g = text(12.0, colour).pos(Pos::new(HPos::Center, VPos::Center));
        root.draw(&Text::new(glyph, (x + CELL - 15, y + 16), g))?;
    }
    Ok(())
}

/// A lux value with three significant digits at most.
fn lux_text(v: f64) -> String {
    match v.abs() {
        a if a >= 100.0 => format!("{v:.0}"),
        a if a >= 10.0 => format!("{v:.1}"),
        a if a >= 0.01 || a == 0.0 => format!("{v:.2}"),
        _ => format!("{v:.1e}"),
    }
}

/// The colour scale: a vertical bar with its lux axis and the guidance bounds.
fn scale_bar<Y>(area: &Area<'_>, s: Scale, y: Y, bounds: [Option<f64>; 2]) -> PlotResult<()>
where
    Y: AsRangedCoord<Value = f64>,
    Y::CoordDescType: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    let mut c =
        ChartBuilder::on(area).margin(8).right_y_label_area_size(70).build_cartesian_2d(0.0..1.0, y)?;
    let mut mesh = c.configure_mesh();
    let log = s.log;
    let label = move |v: &f64| if log { String::new() } else { tick_label(*v) };
    mesh.disable_mesh().x_labels(0).y_desc("room light at cage level (lx)").y_label_formatter(&label);
    mesh.label_style(font(12.0)).axis_desc_style(font(13.0));
    if s.log {
        mesh.y_labels(0);
    }
    mesh.draw()?;
    let n = 120;
    let value = |t: f64| if s.log { s.lo * (s.hi / s.lo).powf(t) } else { s.lo + t * (s.hi - s.lo) };
    c.draw_series((0..n).map(|i| {
        let (a, b) = (f64::from(i) / f64::from(n), f64::from(i + 1) / f64::from(n));
        Rectangle::new([(0.0, value(a)), (1.0, value(b))], viridis(a).filled())
    }))?;
    let style = text(12.0, BLACK).pos(Pos::new(HPos::Left, VPos::Center));
    c.draw_series(log_ticks(s).into_iter().map(|v| {
        EmptyElement::at((1.0, v))
            + PathElement::new(vec![(0, 0), (5, 0)], BLACK)
            + Text::new(tick_label(v), (9, 0), style.clone())
    }))?;
    for (v, colour) in [(bounds[0], BELOW), (bounds[1], ABOVE)] {
        if let Some(v) = v {
            c.draw_series(std::iter::once(PathElement::new(
                vec![(0.0, v), (1.0, v)],
                colour.stroke_width(3),
            )))?;
        }
    }
    Ok(())
}

/// Ticks of a logarithmic scale: 1, 2 and 5 times each power of ten over up to three decades,
/// the powers alone over more; none for a linear scale (plotters ticks it).
fn log_ticks(s: Scale) -> Vec<f64> {
    if !s.log {
        return Vec::new();
    }
    let few = (s.hi / s.lo).log10() < 3.5;
    let (a, b) = (s.lo.log10().floor() as i32, s.hi.log10().ceil() as i32);
    let steps: &[f64] = if few { &[1.0, 2.0, 5.0] } else { &[1.0] };
    (a..=b)
        .flat_map(|k| steps.iter().map(move |m| m * 10f64.powi(k)))
        .filter(|v| *v >= s.lo * (1.0 - 1e-9) && *v <= s.hi * (1.0 + 1e-9))
        .collect()
}

/// The key under the map: the marks that occur, and the bounds.
fn key(root: &Area<'_>, y: i32, r: &RackResult) -> PlotResult<()> {
    let mut lines: Vec<(RGBColor, String)> = Vec::new();
    if let Some(u) = r.bounds.upper {
        lines.push((
            ABOVE,
            format!("▲ red outline: above the upper bound, {} lx (red line on the scale)", tick_label(u.lx)),
        ));
    }
    if let Some(l) = r.bounds.lower {
        lines.push((
            BELOW,
            format!(
                "▼ blue outline: below the lower bound, {} lx (blue line on the scale)",
                tick_label(l.lx)
            ),
        ));
    }
    if lines.is_empty() {
        lines.push((BLACK, "no numeric guidance range applies to these animals".to_string()));
    }
    for (i, (c, t)) in lines.into_iter().enumerate() {
        let style = text(12.0, c).pos(Pos::new(HPos::Left, VPos::Center));
        root.draw(&Text::new(t, (16, y + 20 * i as i32), style))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, texts};
    use super::*;

    fn vivarium() -> retidose::assess::Assessment {
        let d = retidose::assess::demo("vivarium").unwrap();
        let s = retidose::assess::parse_scenario_file(d, "vivarium", None).unwrap();
        retidose::assess::assess(&s).unwrap()
    }

    #[test]
    fn labels_scale_and_both_marks() {
        let a = vivarium();
        let room = a.room.as_ref().unwrap();
        let cells = crate::cli::render::room::rack_cells(room);
        let (rack, cells) = (&room.racks[0], cells[0].clone().unwrap());
        let mut cells = cells;
        let flags = |bit: u8| Flags(bit);
        if let Some(c) = cells[0].as_mut() {
            c.flags = flags(Flags::BELOW);
        }
        if let Some(c) = cells.last_mut().and_then(|c| c.as_mut()) {
            c.flags = flags(Flags::ABOVE);
        }
        let f = figure(rack, &cells).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg);
        for want in [
            "shelf 1 (bottom)",
            "shelf 5 (top)",
            "column 1",
            "column 4",
            "room light at cage level (lx)",
            "▲",
            "▼",
        ] {
            assert!(t.iter().any(|x| x == want), "{want} missing from {t:?}");
        }
        assert!(f.svg.contains("stroke=\"#D50000\"") || f.svg.to_lowercase().contains("#d50000"));
        assert!(f.svg.to_lowercase().contains("#2962ff"));
    }

    #[test]
    fn lux_text_is_short() {
        assert_eq!(lux_text(1234.4), "1234");
        assert_eq!(lux_text(56.27), "56.3");
        assert_eq!(lux_text(0.3), "0.30");
    }
}
