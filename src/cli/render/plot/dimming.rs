//! Positions in the guidance range against a factor on every luminaire (dimming below 1,
//! brightening above), one line per rack, on a log factor axis: from `retidose sweep --over
//! level` on a room ([`figure`]), and in the report's room section from each rack's lever
//! ([`rack`], its 41 factors from ×0.1 to ×10, with the lever's factor marked). Every point is a
//! count made by the lever's own comparisons (`housing::lever::counts`).

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use retidose::housing::lever::RackDimming;
use retidose::housing::survey::RackResult;

use super::{
    Area, Figure, GRID, GRID_LIGHT, Mark, PlotResult, colour, font, legend, log_axis, log_ticks, render,
    text, tick_label, value_label, x_ticks,
};

/// One rack's curve: its name, positions and (factor, positions in range).
struct Curve {
    name: String,
    positions: usize,
    points: Vec<(f64, usize)>,
}

/// Every rack of a room's dimming sweep, one line each; `None` with nothing to draw.
pub fn figure(racks: &[RackDimming]) -> Option<Figure> {
    let curves: Vec<Curve> = racks
        .iter()
        .map(|r| Curve {
            name: format!("rack {} ({} positions)", r.rack, r.positions),
            positions: r.positions,
            points: r.points.iter().map(|p| (p.factor, p.counts.in_range)).collect(),
        })
        .collect();
    let svg = draw_figure("positions in range against the dimming factor", &curves, None)?;
    Some(Figure {
        svg,
        caption: "Cage positions of each rack within its guidance range for the light phase against one factor on \
                  every luminaire (below 1: dimmed; readings scale with it), each point counted exactly from the \
                  survey's lux at cage level. Dashed: the room as it is (factor 1)."
            .to_string(),
    })
}

/// One rack of the report, from its lever's dimming curve; `None` without a lever.
pub fn rack(r: &RackResult) -> Option<Figure> {
    let l = r.lever.as_ref()?;
    let curve = Curve {
        name: format!("rack {} ({} positions)", r.id, r.summary.positions),
        positions: r.summary.positions,
        points: l.dimming.clone(),
    };
    let svg = draw_figure(
        &format!("rack {}: positions in range against dimming", r.id),
        &[curve],
        Some((l.factor, l.in_range_after)),
    )?;
    Some(Figure {
        svg,
        caption: format!(
            "Rack {}: cage positions within the guidance range for the light phase against one factor on every \
             luminaire, from ×0.1 to ×10 (log axis), each point counted exactly from the survey's lux at cage \
             level. Dashed: the room as it is (factor 1); dotted, with an open circle: the lever's factor ×{}, \
             which brings {} of {} positions into range.",
            r.id,
            value_label(l.factor),
            l.in_range_after,
            r.summary.positions
        ),
    })
}

/// Draws `curves` (at least two factors each) with an optional lever (its factor and the
/// positions in range there); `None` when there is nothing to draw.
fn draw_figure(label: &str, curves: &[Curve], lever: Option<(f64, usize)>) -> Option<String> {
    let xs = curves.iter().flat_map(|c| c.points.iter().map(|p| p.0));
    let (x0, x1) = xs.fold((f64::INFINITY, 0.0f64), |a, v| (a.0.min(v), a.1.max(v)));
    if !(x0 > 0.0 && x0 < x1) {
        return None;
    }
    render((920, 400), label, |root| draw(root, (x0, x1), curves, lever)).ok()
}

/// The axes, the factor-1 and lever lines, one line per rack and the legend.
fn draw(root: &Area<'_>, x: (f64, f64), curves: &[Curve], lever: Option<(f64, usize)>) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(660);
    let top = curves.iter().map(|c| c.positions).max().unwrap_or(1).max(1) as f64 * 1.08;
    let mut c = ChartBuilder::on(&plot)
        .margin(14)
        .x_label_area_size(46)
        .y_label_area_size(60)
        .build_cartesian_2d(log_axis(x), 0.0..top)?;
    c.configure_mesh()
        .x_desc("factor on every luminaire (log scale; 1 = as now)")
        .y_desc("cage positions in the guidance range")
        .x_labels(3)
        .x_label_formatter(&|_| String::new())
        .disable_x_mesh()
        .y_label_formatter(&|v| tick_label(*v))
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .bold_line_style(GRID)
        .light_line_style(GRID_LIGHT)
        .draw()?;
    x_ticks(&mut c, &log_ticks(x.0, x.1), (0.0, top))?;
    let grey = RGBColor(90, 90, 90);
    let left = Pos::new(HPos::Left, VPos::Top);
    if (x.0..=x.1).contains(&1.0) {
        c.draw_series(DashedLineSeries::new(vec![(1.0, 0.0), (1.0, top)], 7, 4, grey.stroke_width(1)))?;
        c.draw_series(std::iter::once(Text::new(" as now", (1.0, top * 0.99), text(11.0, BLACK).pos(left))))?;
    }
    if let Some((f, n)) = lever.filter(|l| (x.0..=x.1).contains(&l.0)) {
        c.draw_series(DashedLineSeries::new(vec![(f, 0.0), (f, top)], 2, 3, grey.stroke_width(1)))?;
        let t = format!("lever ×{} ", value_label(f));
        let right = Pos::new(HPos::Right, VPos::Top);
        c.draw_series(std::iter::once(Text::new(t, (f, top * 0.99), text(11.0, BLACK).pos(right))))?;
        c.draw_series(std::iter::once(Circle::new((f, n as f64), 5, colour(1).stroke_width(2))))?;
    }
    for (i, curve) in curves.iter().enumerate() {
        let k = colour(i + 1);
        let pts: Vec<(f64, f64)> = curve.points.iter().map(|&(f, n)| (f, n as f64)).collect();
        c.draw_series(LineSeries::new(pts.iter().copied(), k.stroke_width(2)))?;
        c.draw_series(pts.iter().map(|&p| Circle::new(p, 2, k.filled())))?;
    }
    let entries: Vec<(String, Mark)> =
        curves.iter().enumerate().map(|(i, c)| (c.name.clone(), Mark::Line(colour(i + 1)))).collect();
    legend(&side.margin(16, 0, 8, 0), "Racks", &entries)
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, demo, texts};
    use super::*;

    #[test]
    fn each_rack_of_the_vivarium_gets_its_dimming_figure() {
        let a = demo("vivarium");
        let room = a.room.as_ref().unwrap();
        let mut drawn = 0;
        for r in &room.racks {
            let Some(f) = rack(r) else { continue };
            drawn += 1;
            assert_well_formed(&f.svg);
            let t = texts(&f.svg);
            for want in
                ["factor on every luminaire (log scale; 1 = as now)", "cage positions in the guidance range"]
            {
                assert!(t.iter().any(|x| x == want), "{want} missing from {t:?}");
            }
            assert!(t.iter().any(|x| x.starts_with(&format!("rack {} (", r.id))), "{t:?}");
            assert!(f.caption.contains("lever's factor"));
        }
        assert!(drawn >= 1, "the albino mice's rack has the Guide's range, so a lever");
    }
}
