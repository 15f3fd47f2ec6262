//! Bleach against the level of one step's light (`retidose bleach --sweep-level --plot`): the
//! bleached fraction at the end of the step and the peak over the schedule, each point a full
//! run of the schedule by `pigment::course`, on a log level axis.

use plotters::prelude::*;
use retidose::pigment::course::LevelSweep;

use super::{
    Figure, Mark, PlotResult, colour, font, legend, log_axis, log_ticks, power_label, render, x_ticks,
};

/// The figure of a level sweep; `None` with fewer than two points or a level that is not above 0.
pub fn figure(s: &LevelSweep, title: &str) -> Option<Figure> {
    let levels: Vec<f64> = s.points.iter().map(|p| p.level).collect();
    let (lo, hi) = (levels.first().copied()?, levels.last().copied()?);
    if s.points.len() < 2 || !(lo > 0.0 && hi > lo && hi.is_finite()) {
        return None;
    }
    let unit = s.level_unit.symbol();
    let svg = render((860, 440), &format!("bleach against the light of step '{}'", s.step), |root| {
        draw(root, s, (lo, hi), unit)
    })
    .ok()?;
    let caption = format!(
        "{title}: the bleached fraction at the end of step '{}' (the highest over the schedule's cycles) and the peak \
         over the whole schedule, against the step's level in {unit}, at {} levels evenly spaced in log level from {} \
         to {} {unit}; each point is a full run of the schedule with the step's light scaled (light is linear).",
        s.step,
        s.points.len(),
        super::value_label(lo),
        super::value_label(hi)
    );
    Some(Figure { svg, caption })
}

fn draw(root: &super::Area<'_>, s: &LevelSweep, x: (f64, f64), unit: &str) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(650);
    let mut chart = ChartBuilder::on(&plot)
        .margin(14)
        .x_label_area_size(44)
        .y_label_area_size(60)
        .build_cartesian_2d(log_axis(x), 0.0..100.0)?;
    let few = (x.1 / x.0).log10() < 3.5;
    chart
        .configure_mesh()
        .x_desc(format!("level of the step's light ({unit})"))
        .y_desc("bleached (%)")
        .y_label_formatter(&|v| format!("{v:.0}"))
        .x_label_formatter(&|v| if few { String::new() } else { power_label(*v) })
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .draw()?;
    if few {
        x_ticks(&mut chart, &log_ticks(x.0, x.1), (0.0, 100.0))?;
    }
    let end: Vec<(f64, f64)> = s.points.iter().map(|p| (p.level, 100.0 * p.step_end)).collect();
    let peak: Vec<(f64, f64)> = s.points.iter().map(|p| (p.level, 100.0 * p.peak)).collect();
    chart.draw_series(LineSeries::new(peak.iter().copied(), colour(2).stroke_width(2)))?;
    chart.draw_series(DashedLineSeries::new(end.iter().copied(), 8, 4, colour(1).stroke_width(2)))?;
    chart.draw_series(end.iter().map(|p| Circle::new(*p, 2, colour(1).filled())))?;
    let marks = vec![
        (format!("bleached at the end of step '{}'", s.step), Mark::Dashed(colour(1), 0)),
        ("peak over the schedule".to_string(), Mark::Line(colour(2))),
    ];
    legend(&side.margin(16, 0, 8, 0), "Legend", &marks)
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, demo, texts};
    use super::*;

    #[test]
    fn the_sweep_figure_has_its_axes_and_legend() {
        let a = demo("dark-adaptation");
        let sc = retidose::assess::parse_scenario_file(
            retidose::assess::demo("dark-adaptation").unwrap(),
            "d",
            None,
        )
        .unwrap();
        let c = retidose::assess::course(sc.schedule.as_ref().unwrap(), &a.steps);
        let s = c.sweep_level(0, 0.01, 10.0, 12).unwrap();
        let f = figure(&s, "dark-adaptation").unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg).join(" ");
        for needle in
            ["level of the step's light (scot td)", "bleached (%)", "peak over the schedule", "step 'bleach'"]
        {
            assert!(t.contains(needle), "{needle}: {t}");
        }
        assert!(f.caption.contains("12 levels"), "{}", f.caption);
    }
}
