//! The figures of the HTML report, drawn with plotters' SVG backend (the drawing code is in
//! `plot/`, one file per figure; DEVELOPERS.md, "Figures in the HTML report", says why plotters
//! and how its text is laid out). Each function returns a [`Figure`], an inline `<svg>` and its
//! caption, or nothing when the assessment has nothing to draw; [`html`] writes one as a
//! `<figure>`.

#[path = "plot/mod.rs"]
mod plot;

use retidose::assess::Assessment;
use retidose::housing::survey::RackResult;
use retidose::limits::report::LimitsAssessment;

use super::html::esc;
use super::room::Cell;

pub use plot::Figure;
pub use plot::{dimming, sweep as sweep_figures};

/// Every source's spectral irradiance at the eye, with the weightings of the subject's species.
pub fn spectrum(a: &Assessment) -> Option<Figure> {
    plot::spectrum::figure(a)
}

/// The pigment bleached over the schedule, with the light bands, events and (people) the rod
/// threshold recovery.
pub fn bleach(a: &Assessment) -> Option<Figure> {
    plot::bleach::figure(a)
}

/// The rod threshold against time in the dark: the predicted curve, and measured points with the
/// fitted hinge when thresholds were fitted (`retidose threshold --format svg`).
pub fn threshold(
    curve: Option<&retidose::pigment::threshold::ThresholdCurve>,
    measured: &[(retidose::base::quantity::Time, f64)],
    fit: Option<&retidose::pigment::threshold::ThresholdFit>,
) -> Option<Figure> {
    plot::threshold::figure(curve, measured, fit)
}

/// Bleach against the level of one step's light (`retidose bleach --sweep-level --plot`).
pub fn bleach_level(sweep: &retidose::pigment::course::LevelSweep, title: &str) -> Option<Figure> {
    plot::bleach_level::figure(sweep, title)
}

/// Every hazard ratio on a log axis with the ratio-1 line.
pub fn hazard_ratios(a: &Assessment) -> Option<Figure> {
    plot::hazards::figure(a)
}

/// t_max of each hazard of one limits check against the distance from the source, or why it
/// cannot be drawn, in words.
pub fn t_max_distance(
    s: &retidose::scenario::file::Scenario,
    l: &LimitsAssessment,
) -> Result<Figure, String> {
    plot::distance::figure(s, l)
}

/// A rack as a heat map of room light at cage level.
pub fn heatmap(rack: &RackResult, cells: &[Option<Cell>]) -> Option<Figure> {
    plot::heatmap::figure(rack, cells)
}

/// The margin of each compared scenario on a log axis with the margin-1 line.
pub fn margins(c: &retidose::compare::Comparison) -> Option<Figure> {
    plot::margins::figure(c)
}

/// A figure as HTML: the inline SVG in a `<figure>` with its caption.
pub fn html(f: &Figure) -> String {
    format!(
        "<figure style=\"margin:1em 0\">{}<figcaption style=\"font-size:13px;color:#444;max-width:900px\">{}</figcaption></figure>",
        f.svg,
        esc(&f.caption)
    )
}
