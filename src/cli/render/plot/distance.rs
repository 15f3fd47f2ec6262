//! The t_max-against-distance figure of a safety review: for one source and one limit set, the
//! longest permissible exposure of each hazard as the source moves along its axis, on log–log
//! axes, from re-evaluating the set with the library's engine ([`evaluate_set`]) at each
//! distance.
//!
//! The assessment does not carry the placed source, so the source is rebuilt from what it
//! does carry: its spectral irradiance at the eye after the filters becomes a spectral
//! intensity by the inverse-square law (I = E·d₀², as the library's risk-group classification
//! does for a measured irradiance), its size from the subtense it showed at d₀. The assessed
//! distance d₀ is recovered from the IEC 62471 classification, which gives the illuminance at
//! its own distance. Before drawing, the rebuilt source is checked against the report: at d₀
//! every ratio must equal the table's, or no figure is drawn.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use retidose::assess::Assessment;
use retidose::base::quantity::{Angle, Length, SiValue};
use retidose::cornea::geometry::Geometry;
use retidose::cornea::{PlacedSource, at_cornea};
use retidose::limits::report::LimitsAssessment;
use retidose::limits::{
    Classification, Condition, Exposure, HazardResult, LimitSet, TMax, Verdict, evaluate_set, find_set,
};
use retidose::spectrum::{Measure, Spectrum};

use super::{
    Area, Figure, GRID, GRID_LIGHT, Mark, PlotResult, colour, decade_count, decades, font, legend, log_axis,
    log_ticks, power_label, render, short_document, text, tick_label, x_ticks,
};

/// Distances drawn: d₀/10 to 10·d₀, this many per decade.
const PER_DECADE: i32 = 40;

/// The source rebuilt from the assessment, movable along its axis.
struct Movable<'a> {
    intensity: Spectrum,
    size: Option<Length>,
    d0: f64,
    set: &'a LimitSet,
    l: &'a LimitsAssessment,
    /// Whether the report evaluated the opt-in hazards (aphakic eyes, infants).
    aphakic: bool,
}

impl Movable<'_> {
    /// The set's results with the source at `d` m.
    fn at(&self, d: f64) -> retidose::Result<Vec<HazardResult>> {
        let placed = PlacedSource {
            spectrum: self.intensity.clone(),
            geometry: Geometry::Intensity {
                distance: Length::from_si(d),
                incidence: Angle::from_si(0.0),
                size: self.size,
            },
            size: self.size,
            distance: Some(Length::from_si(d)),
            assumption: None,
        };
        let c = at_cornea(&placed, &[])?;
        let e = Exposure {
            irradiance: &c.irradiance,
            radiance: c.radiance.as_ref(),
            subtense_rad: c.subtense.map(|a| a.si()),
            full_field: false,
            duration: self.l.duration,
            schedule: None,
            aphakic: self.aphakic,
        };
        Ok(evaluate_set(self.set, &e))
    }
}

/// The figure for `l`, or why it cannot be drawn (in words, for the report).
pub fn figure(a: &Assessment, l: &LimitsAssessment) -> Result<Figure, String> {
    let m = movable(a, l)?;
    check(&m)?;
    let n = 2 * PER_DECADE;
    let ds: Vec<f64> =
        (0..=n).map(|i| m.d0 * 10f64.powf(f64::from(i - PER_DECADE) / f64::from(PER_DECADE))).collect();
    let runs: Vec<Vec<HazardResult>> =
        ds.iter().map(|&d| m.at(d)).collect::<Result<_, _>>().map_err(|e| e.to_string())?;
    let lines: Vec<Line> = l
        .hazards
        .iter()
        .map(|h| {
            let at = |f: fn(&[HazardResult], &str) -> Option<f64>| -> Vec<(f64, f64)> {
                ds.iter().zip(&runs).filter_map(|(d, r)| f(r, &h.id).map(|t| (d * 1e3, t))).collect()
            };
            Line { name: h.name.clone(), points: at(seconds), above: at(not_reached) }
        })
        .collect();
    let lines = lines.into_iter().filter(|x| !x.points.is_empty() || !x.above.is_empty());
    let (drawn, never): (Vec<_>, Vec<_>) = lines.partition(|x| !x.points.is_empty());
    if drawn.is_empty() {
        return Err(format!(
            "t_max against distance ({}): no hazard reaches its limit within the set's durations at any distance from \
             {} to {} mm",
            short_document(&l.document, &l.edition),
            tick_label(ds[0] * 1e3),
            tick_label(ds[n as usize] * 1e3)
        ));
    }
    let label = format!("t_max against distance, {}", l.source);
    let svg = render((920, 420), &label, |root| draw(root, &m, &drawn)).map_err(|e| e.to_string())?;
    Ok(Figure { svg, caption: caption(&m, &never.iter().map(|x| x.name.as_str()).collect::<Vec<_>>()) })
}

/// One hazard's curve: t_max where the limit is reached, and the distances where it is not.
struct Line {
    name: String,
    /// (mm, s).
    points: Vec<(f64, f64)>,
    /// (mm, the longest duration the set covers, s; infinite when open).
    above: Vec<(f64, f64)>,
}

/// The longest duration checked for hazard `id` in `r` when its limit is not reached in it.
fn not_reached(r: &[HazardResult], id: &str) -> Option<f64> {
    match r.iter().find(|h| h.id == id)?.t_max {
        Some(TMax::NotReached(u)) => Some(u),
        _ => None,
    }
}

/// t_max of hazard `id` in `r`, when the limit is reached within the set's durations.
fn seconds(r: &[HazardResult], id: &str) -> Option<f64> {
    match r.iter().find(|h| h.id == id)?.t_max {
        Some(TMax::Seconds(s)) if s > 0.0 && s.is_finite() => Some(s),
        _ => None,
    }
}

/// The risk-group classification of the source of `l` in any of the report's checks: it gives
/// an illuminance at a known distance, and so where the source is. Otherwise why not.
fn placed_by<'a>(a: &'a Assessment, l: &LimitsAssessment) -> Result<&'a Classification, String> {
    let classifies = |id: &str| find_set(id).is_ok_and(|s| s.hazards.iter().any(|h| h.risk_groups.is_some()));
    let mut why = None;
    for x in a.limits.iter().filter(|x| x.source == l.source) {
        match &x.classification {
            Some(Ok(c)) => return Ok(c),
            Some(Err(e)) if classifies(&x.set_id) => why = Some(e.clone()),
            _ => {}
        }
    }
    Err(match why {
        Some(e) => format!("the source cannot be placed at another distance: {e}"),
        None => "the report gives no distance for the source; the IEC 62471 risk-group classification (classify = \
                 true) gives it"
            .to_string(),
    })
}

/// Rebuilds the source of `l` from the assessment, or says why it cannot be.
fn movable<'a>(a: &'a Assessment, l: &'a LimitsAssessment) -> Result<Movable<'a>, String> {
    let why = |s: &str| format!("t_max against distance ({}) is not drawn: {s}", l.source);
    let c = placed_by(a, l).map_err(|e| why(&e))?;
    let set = find_set(&l.set_id).map_err(|_| why("the limit set is not a built-in one"))?;
    let r = a.retina.as_ref().ok_or_else(|| why("no light path"))?;
    let i = r
        .sources
        .iter()
        .position(|s| s.label == l.source)
        .ok_or_else(|| why("its light path is not in the report"))?;
    let e0 = &a.spectra.get(i).ok_or_else(|| why("its spectrum is not in the report"))?.1;
    let lux0 = retidose::spectrum::photometry::photopic(e0).raw;
    if !(lux0 > 0.0 && c.illuminance_lx > 0.0) {
        return Err(why("it gives no light at the eye"));
    }
    let d0 = c.distance.si() * (c.illuminance_lx / lux0).sqrt();
    let size = r.sources[i].subtense.map(|a| Length::from_si(2.0 * d0 * (a.si() / 2.0).tan()));
    let intensity = e0.scaled_as(d0 * d0, Measure::Intensity).map_err(|e| why(&e.to_string()))?;
    let opt_in = |id: &str| set.hazard(id).is_some_and(|z| z.conditions.contains(&Condition::OptIn));
    let aphakic = l.hazards.iter().any(|h| opt_in(&h.id) && !matches!(h.verdict, Verdict::NotApplicable(_)));
    Ok(Movable { intensity, size, d0, set, l, aphakic })
}

/// At d₀ the rebuilt source must give the report's ratios (1e-6), or the figure would mislead.
fn check(m: &Movable<'_>) -> Result<(), String> {
    let r = m.at(m.d0).map_err(|e| e.to_string())?;
    for h in m.l.hazards.iter().filter(|h| h.ratio.is_some()) {
        let (want, got) = (h.ratio.unwrap_or(0.0), r.iter().find(|x| x.id == h.id).and_then(|x| x.ratio));
        if !got.is_some_and(|g| (g - want).abs() <= 1e-6 * want.abs().max(1e-300)) {
            return Err(format!(
                "t_max against distance ({}) is not drawn: the source rebuilt at {} mm does not reproduce the table's \
                 ratio for {} ({} against {})",
                m.l.source,
                tick_label(m.d0 * 1e3),
                h.name,
                got.map_or("none".into(), tick_label),
                tick_label(want)
            ));
        }
    }
    Ok(())
}

/// The caption.
fn caption(m: &Movable<'_>, never: &[&str]) -> String {
    let mut c = format!(
        "Longest permissible exposure t_max of each hazard of {} against the distance from {} (log–log), from \
         re-evaluating the limits with the source moved along its axis: its spectral irradiance at the eye after the \
         filters taken as a small source by the inverse-square law from {} mm, where the report assessed it (the \
         distance follows from the risk-group classification's illuminance), its size kept. At that distance the \
         values are the table's. Dashed: the exposure duration; where a curve falls below it, the limit is exceeded. Triangles on the top \
         edge: the limit is not reached within the set's durations at that distance.",
        short_document(&m.l.document, &m.l.edition),
        m.l.source,
        tick_label(m.d0 * 1e3)
    );
    if !never.is_empty() {
        c.push_str(&format!(
            " Not reached within the set's durations at any distance shown: {}.",
            never.join("; ")
        ));
    }
    c
}

/// The log–log axes, the lines, the duration and distance references, and the legend.
fn draw(root: &Area<'_>, m: &Movable<'_>, lines: &[Line]) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(660);
    let dur = m.l.duration.si();
    let ts = lines.iter().flat_map(|x| x.points.iter().map(|p| p.1)).chain([dur]);
    let (tlo, thi) = ts.fold((f64::MAX, 0.0f64), |a, t| (a.0.min(t), a.1.max(t)));
    let (x, y) = ((m.d0 * 1e2, m.d0 * 1e4), decades(tlo, thi * 1.01));
    let mut c = ChartBuilder::on(&plot)
        .margin(14)
        .x_label_area_size(46)
        .y_label_area_size(70)
        .build_cartesian_2d(log_axis(x), log_axis(y))?;
    c.configure_mesh()
        .x_desc("distance from the source (mm)")
        .y_desc("t_max, longest permissible exposure (s)")
        .x_labels(decade_count(x) + 1)
        .y_labels(decade_count(y) + 1)
        .x_label_formatter(&|_| String::new())
        .disable_x_mesh()
        .y_label_formatter(&|v| power_label(*v))
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .bold_line_style(GRID)
        .light_line_style(GRID_LIGHT)
        .draw()?;
    c.draw_series(DashedLineSeries::new(vec![(x.0, dur), (x.1, dur)], 7, 4, BLACK.stroke_width(1)))?;
    let d0 = m.d0 * 1e3;
    c.draw_series(DashedLineSeries::new(
        vec![(d0, y.0), (d0, y.1)],
        3,
        3,
        RGBColor(90, 90, 90).stroke_width(1),
    ))?;
    let left = Pos::new(HPos::Left, VPos::Bottom);
    let dur_text = format!("exposure duration {}", crate::cli::render::room::duration(dur));
    c.draw_series(std::iter::once(Text::new(dur_text, (x.0 * 1.1, dur), text(11.0, BLACK).pos(left))))?;
    let at = format!(" assessed {} mm", tick_label(d0));
    c.draw_series(std::iter::once(Text::new(
        at,
        (d0, y.0),
        text(11.0, BLACK).pos(Pos::new(HPos::Left, VPos::Bottom)),
    )))?;
    x_ticks(&mut c, &log_ticks(x.0, x.1), y)?;
    for (i, line) in lines.iter().enumerate() {
        let k = colour(i + 1);
        for run in runs(&line.points) {
            c.draw_series(LineSeries::new(run, k.stroke_width(2)))?;
        }
        c.draw_series(line.points.iter().map(|&p| Circle::new(p, 2, k.filled())))?;
        let top = |p: &(f64, f64)| TriangleMarker::new((p.0, y.1), 4 + i as i32, k.filled());
        c.draw_series(line.above.iter().map(top))?;
    }
    let mut entries: Vec<(String, Mark)> =
        lines.iter().enumerate().map(|(i, x)| (x.name.clone(), Mark::Line(colour(i + 1)))).collect();
    if lines.iter().any(|x| !x.above.is_empty()) {
        entries.push((
            "on the top edge: not reached at that distance".to_string(),
            Mark::Up(RGBColor(90, 90, 90)),
        ));
    }
    legend(&side.margin(16, 0, 8, 0), "Hazards", &entries)
}

/// The stretches of consecutive distances (a gap where the limit is not reached breaks the line).
fn runs(pts: &[(f64, f64)]) -> Vec<Vec<(f64, f64)>> {
    let step = 10f64.powf(1.0 / f64::from(PER_DECADE)) * 1.001;
    let mut out: Vec<Vec<(f64, f64)>> = Vec::new();
    for &p in pts {
        match out.last_mut() {
            Some(r) if r.last().is_some_and(|q| p.0 / q.0 <= step) => r.push(p),
            _ => out.push(vec![p]),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, demo, texts};
    use super::*;

    #[test]
    fn the_stimulus_led_is_moved_and_agrees_with_the_table_at_200_mm() {
        let a = demo("stimulus-review");
        let l = a.limits.iter().find(|l| l.set_id == "iec62471-2006").unwrap();
        let m = movable(&a, l).unwrap();
        assert!((m.d0 - 0.2).abs() < 1e-9, "d0 = {}", m.d0);
        let r = m.at(m.d0).unwrap();
        let tmax = |r: &[HazardResult]| seconds(r, "blue-light").unwrap();
        assert!((tmax(&r) - seconds(&l.hazards, "blue-light").unwrap()).abs() < 1e-6);
        assert!(tmax(&m.at(0.1).unwrap()) < tmax(&r), "closer, shorter t_max");
        assert!(seconds(&m.at(0.3).unwrap(), "blue-light").is_none(), "further away, not reached");
        let f = figure(&a, l).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg);
        for want in ["distance from the source (mm)", "t_max, longest permissible exposure (s)", "Hazards"] {
            assert!(t.iter().any(|x| x == want), "{want} missing from {t:?}");
        }
        assert!(t.join(" ").contains("retinal blue light (photochemical)"));
        assert!(t.iter().any(|x| x.contains("assessed 200 mm")));
    }

    #[test]
    fn without_a_classification_it_says_why() {
        let a = demo("dark-adaptation");
        let why = figure(&a, &a.limits[0]).unwrap_err();
        assert!(why.contains("classification (classify = true)"), "{why}");
    }

    #[test]
    fn a_set_without_risk_groups_borrows_the_distance_of_the_same_source() {
        let a = demo("stimulus-review");
        let l = a.limits.iter().find(|l| l.set_id == "directive-2006-25-ec").unwrap();
        let f = figure(&a, l).unwrap();
        assert_well_formed(&f.svg);
        assert!(f.caption.contains("Directive 2006/25/EC"));
    }
}
