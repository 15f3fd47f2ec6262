//! The figures of `retidose sweep --format svg` for a source: t_max against distance (the
//! report's figure, [`super::distance`], on the sweep's own range) and the hazard ratio against
//! the exposure duration, a factor on the source's level or a neutral filter's transmittance,
//! one line per hazard on log–log axes with the ratio-1 line.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use retidose::base::quantity::{SiValue, Time};
use retidose::limits::LimitSet;
use retidose::limits::report::LimitsRequest;
use retidose::limits::sweep::DistancePoint;

use super::distance::{Drawn, from_points};
use super::{
    Area, Figure, Mark, PlotResult, colour, decades, legend, log_log, log_ticks, power_label, render,
    short_document, text, x_ticks,
};

/// Ratios below this are left out (a log axis has no zero).
const FLOOR: f64 = 1e-12;

/// The limit line's colour (black: the hazards' lines take the palette's colours).
const LIMIT: RGBColor = RGBColor(0, 0, 0);

/// t_max against distance of a distance sweep, one line per hazard.
///
/// # Errors
/// Why there is nothing to draw, in words.
pub fn distance(points: &[DistancePoint], r: &LimitsRequest<'_>, id: &str) -> Result<Figure, String> {
    from_points(points, &Drawn { duration: r.duration, placed: r.source.distance, source: id, set: r.set })
}

/// What the x axis of a ratio figure is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Axis {
    /// The exposure duration, s.
    Duration,
    /// A factor on the source's light.
    Level,
    /// A neutral filter's transmittance.
    Transmittance,
}

impl Axis {
    fn title(self) -> &'static str {
        match self {
            Axis::Duration => "exposure duration (s)",
            Axis::Level => "factor on the source's light (1 = as written)",
            Axis::Transmittance => "transmittance of a neutral filter in front of the eye",
        }
    }
}

/// One hazard's ratios: (swept value, ratio).
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Hazard name.
    pub name: String,
    /// The points with a ratio, in sweep order.
    pub points: Vec<(f64, f64)>,
}

/// The hazard ratio against the swept value, one line per hazard, with the ratio-1 line.
///
/// # Errors
/// Why there is nothing to draw, in words.
pub fn ratio(axis: Axis, series: &[Series], id: &str, set: &LimitSet, t: Time) -> Result<Figure, String> {
    let keep = |s: &Series| Series {
        points: s.points.iter().copied().filter(|p| p.1 >= FLOOR).collect(),
        ..s.clone()
    };
    let lines: Vec<Series> = series.iter().map(keep).filter(|s| !s.points.is_empty()).collect();
    let xs = lines.iter().flat_map(|s| s.points.iter().map(|p| p.0));
    let (x0, x1) = xs.fold((f64::INFINITY, 0.0f64), |a, v| (a.0.min(v), a.1.max(v)));
    if lines.is_empty() || x0 >= x1 {
        return Err("no hazard has a ratio at two or more points; nothing to draw".to_string());
    }
    let ys = lines.iter().flat_map(|s| s.points.iter().map(|p| p.1)).chain([1.0]);
    let (y0, y1) = ys.fold((f64::INFINITY, 0.0f64), |a, v| (a.0.min(v), a.1.max(v)));
    let y = decades(y0, y1 * 1.01);
    let label = format!("hazard ratio against {}, {id}", axis.title());
    let svg = render((920, 420), &label, |root| draw(root, axis, (x0, x1), y, &lines))
        .map_err(|e| e.to_string())?;
    let doc = short_document(&set.document, &set.edition);
    let mut caption = format!(
        "Hazard ratio (exposure ÷ limit) of each hazard of {doc} against the {} for the source {id} as placed \
         (log–log); above the dashed line (ratio 1) the limit is exceeded.",
        axis.title()
    );
    let left_out: Vec<&str> =
        series.iter().filter(|s| !lines.iter().any(|l| l.name == s.name)).map(|s| s.name.as_str()).collect();
    if !left_out.is_empty() {
        caption.push_str(&format!(
            " Not drawn (no ratio, or every ratio below {}): {}.",
            power_label(FLOOR),
            left_out.join("; ")
        ));
    }
    caption.push_str(&match axis {
        Axis::Duration => {
            " t_max, where a line crosses ratio 1, does not depend on the exposure duration.".to_string()
        }
        Axis::Level => format!(
            " Ratios for {}; each is proportional to the factor (ratio(k) = k·ratio(1)).",
            crate::cli::render::room::duration(t.si())
        ),
        Axis::Transmittance => format!(
            " Ratios for {}; a neutral filter of transmittance T gives the ratios of the source at ×T.",
            crate::cli::render::room::duration(t.si())
        ),
    });
    Ok(Figure { svg, caption })
}

/// The log–log axes, the ratio-1 line, one line per hazard and the legend.
fn draw(root: &Area<'_>, axis: Axis, x: (f64, f64), y: (f64, f64), lines: &[Series]) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(660);
    let mut c = log_log(&plot, x, y, axis.title(), "hazard ratio, exposure ÷ limit")?;
    c.draw_series(DashedLineSeries::new(vec![(x.0, 1.0), (x.1, 1.0)], 7, 4, LIMIT.stroke_width(2)))?;
    let left = Pos::new(HPos::Left, VPos::Bottom);
    c.draw_series(std::iter::once(Text::new(
        "limit (ratio 1)",
        (x.0 * 1.05, 1.0),
        text(11.0, LIMIT).pos(left),
    )))?;
    x_ticks(&mut c, &log_ticks(x.0, x.1), y)?;
    for (i, line) in lines.iter().enumerate() {
        let k = colour(i + 1);
        c.draw_series(LineSeries::new(line.points.iter().copied(), k.stroke_width(2)))?;
    }
    let entries: Vec<(String, Mark)> =
        lines.iter().enumerate().map(|(i, s)| (s.name.clone(), Mark::Line(colour(i + 1)))).collect();
    legend(&side.margin(16, 0, 8, 0), "Hazards", &entries)
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, texts};
    use super::*;

    #[test]
    fn the_ratio_figure_has_its_axes_legend_and_limit_line() {
        let set = retidose::limits::find_set("iec62471-2006").unwrap();
        let series = vec![
            Series { name: "retinal blue light".into(), points: vec![(0.1, 0.3), (1.0, 3.0), (10.0, 30.0)] },
            Series { name: "never there".into(), points: vec![] },
        ];
        let f = ratio(Axis::Level, &series, "stimulus", set, Time::from_si(28800.0)).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg);
        for want in
            [Axis::Level.title(), "hazard ratio, exposure ÷ limit", "limit (ratio 1)", "retinal blue light"]
        {
            assert!(t.iter().any(|x| x == want), "{want} missing from {t:?}");
        }
        assert!(!t.iter().any(|x| x == "never there"));
        assert!(f.caption.contains("k·ratio(1)"));
        assert!(ratio(Axis::Duration, &series[1..], "s", set, Time::from_si(1.0)).is_err());
    }
}
