//! The rod threshold after a bleach: the predicted curve (the cone plateau, the rod–cone break,
//! the S2 slope) and, when measured thresholds were fitted, the measured points and the fitted
//! hinge, against minutes in the dark.

use plotters::prelude::*;
use retidose::base::quantity::{SiValue, Time};
use retidose::pigment::threshold::{ThresholdCurve, ThresholdFit};

use super::{Figure, Mark, PlotResult, colour, font, legend, render, text};

/// What the figure draws, in minutes and log units.
struct Data {
    predicted: Vec<(f64, f64)>,
    break_min: Option<f64>,
    measured: Vec<(f64, f64)>,
    fitted: Vec<(f64, f64)>,
    x_max: f64,
    y: (f64, f64),
}

/// The fitted hinge at `t_min` minutes: the plateau until the break, then a − s·t.
fn hinge(f: &ThresholdFit, t_min: f64) -> f64 {
    let rod = f.intercept.value.0 - f.s2_slope.value.si() * 60.0 * t_min;
    match &f.plateau {
        Some(p) => rod.min(p.value.0),
        None => rod,
    }
}

fn data(curve: Option<&ThresholdCurve>, measured: &[(Time, f64)], fit: Option<&ThresholdFit>) -> Data {
    let predicted: Vec<(f64, f64)> =
        curve.map_or_else(Vec::new, |c| c.samples.iter().map(|(t, e)| (t.si() / 60.0, *e)).collect());
    let measured: Vec<(f64, f64)> = measured.iter().map(|(t, e)| (t.si() / 60.0, *e)).collect();
    let x_max = predicted.iter().chain(&measured).map(|p| p.0).fold(1.0, f64::max);
    let fitted = fit.map_or_else(Vec::new, |f| {
        (0..=200).map(|k| k as f64 * x_max / 200.0).map(|t| (t, hinge(f, t))).collect()
    });
    let ys = predicted.iter().chain(&measured).chain(&fitted).map(|p| p.1);
    let (lo, hi) = ys.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
    let y = if lo.is_finite() { ((lo - 0.3).min(0.0), hi + 0.3) } else { (0.0, 4.0) };
    Data {
        predicted,
        break_min: curve.and_then(|c| c.break_time).map(|t| t.si() / 60.0),
        measured,
        fitted,
        x_max,
        y,
    }
}

/// The figure, or `None` when there is nothing to draw.
pub fn figure(
    curve: Option<&ThresholdCurve>,
    measured: &[(Time, f64)],
    fit: Option<&ThresholdFit>,
) -> Option<Figure> {
    let d = data(curve, measured, fit);
    if d.predicted.is_empty() && d.measured.is_empty() {
        return None;
    }
    let svg = render((860, 420), "rod threshold against time in the dark", |root| draw(root, &d)).ok()?;
    let mut caption = String::from(
        "Rod threshold in log units above the dark-adapted absolute threshold, against minutes in the dark after the bleach.",
    );
    if let Some(c) = curve {
        caption.push_str(&format!(
            " Predicted: the cone plateau at {:.2} log units until the rod–cone break{}, then the S2 slope of {:.3} log units/min ({}).",
            c.plateau,
            d.break_min.map_or(String::new(), |b| format!(" at {b:.1} min")),
            c.s2_slope.si() * 60.0,
            c.basis
        ));
    }
    if let Some(f) = fit {
        caption.push_str(&format!(
            " Measured: {} points; fitted S2 slope {:.3} log units/min (95 % interval {:.3} to {:.3}), residual SD {:.3}.",
            f.points,
            f.s2_slope.value.si() * 60.0,
            f.s2_slope.low.si() * 60.0,
            f.s2_slope.high.si() * 60.0,
            f.residual_sd
        ));
    }
    Some(Figure { svg, caption })
}

fn draw(root: &super::Area<'_>, d: &Data) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(650);
    let mut chart = ChartBuilder::on(&plot)
        .margin(14)
        .x_label_area_size(44)
        .y_label_area_size(60)
        .build_cartesian_2d(0.0..d.x_max * 1.02, d.y.0..d.y.1)?;
    chart
        .configure_mesh()
        .x_desc("time in the dark after the bleach (min)")
        .y_desc("log threshold above absolute")
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .draw()?;
    let mut marks = Vec::new();
    if !d.predicted.is_empty() {
        chart.draw_series(LineSeries::new(d.predicted.iter().copied(), colour(0).stroke_width(2)))?;
        marks.push(("predicted".to_string(), Mark::Line(colour(0))));
    }
    if let Some(b) = d.break_min {
        chart.draw_series(DashedLineSeries::new(
            [(b, d.y.0), (b, d.y.1)],
            6,
            4,
            colour(2).stroke_width(1),
        ))?;
        chart.draw_series([Text::new(
            format!("rod–cone break {b:.1} min"),
            (b, d.y.1 - 0.15),
            text(11.0, colour(2)),
        )])?;
        marks.push(("rod–cone break".to_string(), Mark::Dashed(colour(2), 0)));
    }
    if !d.fitted.is_empty() {
        chart.draw_series(DashedLineSeries::new(
            d.fitted.iter().copied(),
            8,
            4,
            colour(1).stroke_width(2),
        ))?;
        marks.push(("fitted hinge".to_string(), Mark::Dashed(colour(1), 0)));
    }
    if !d.measured.is_empty() {
        chart.draw_series(d.measured.iter().map(|p| Circle::new(*p, 3, colour(1).filled())))?;
        marks.push(("measured".to_string(), Mark::Dot(colour(1))));
    }
    legend(&side.margin(16, 0, 8, 0), "Legend", &marks)
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, texts};
    use super::*;
    use retidose::pigment::kinetics::Model;
    use retidose::pigment::threshold::{predict_threshold, threshold_pigment};

    #[test]
    fn the_predicted_curve_shows_its_break_and_axes() {
        let p = threshold_pigment(retidose::retina::eye::Species::Human).unwrap();
        let c =
            predict_threshold(&p, Model::RateLimited, 0.9, Time::new::<uom::si::time::second>(2400.0), 200)
                .unwrap();
        let f = figure(Some(&c), &[], None).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg).join(" ");
        for needle in [
            "time in the dark after the bleach (min)",
            "log threshold above absolute",
            "rod–cone break",
            "predicted",
        ] {
            assert!(t.contains(needle), "{needle}: {t}");
        }
        assert!(f.caption.contains("S2 slope of 0.240 log units/min"), "{}", f.caption);
    }
}
