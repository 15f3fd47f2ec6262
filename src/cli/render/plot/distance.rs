//! The t_max-against-distance figure of a safety review: for one source and one limit set, the
//! longest permissible exposure of each hazard as the source moves along its axis, on log–log
//! axes. The points are the library's distance sweep ([`sweep_distance`], the computation of
//! `retidose sweep`), run on the scenario's resolved source and filters, so at the assessed
//! distance they are the table's values.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use retidose::base::quantity::{Length, SiValue, Time};
use retidose::limits::report::{LimitsAssessment, LimitsRequest};
use retidose::limits::sweep::{DistancePoint, MaxDuration, log_distances, sweep_distance};
use retidose::limits::{LimitSet, find_set};
use retidose::scenario::file::Scenario;

use super::{
    Area, Figure, Mark, PlotResult, colour, decades, legend, log_log, log_ticks, render, short_document,
    text, tick_label, x_ticks,
};

/// Distances drawn in the report: d₀/10 to 10·d₀, this many per decade.
const PER_DECADE: usize = 40;

/// The figure for the limits check `l` of the scenario `s`, or why it cannot be drawn (in words,
/// for the report).
pub fn figure(s: &Scenario, l: &LimitsAssessment) -> Result<Figure, String> {
    let why = |e: &str| format!("t_max against distance ({}) is not drawn: {e}", l.source);
    let i = s
        .source_ids
        .iter()
        .position(|id| *id == l.source)
        .ok_or_else(|| why("the source is not in the scenario"))?;
    let spec = s.limits.as_ref().ok_or_else(|| why("the scenario has no [limits]"))?;
    let set = spec
        .sets
        .iter()
        .copied()
        .find(|x| x.id == l.set_id)
        .map_or_else(|| find_set(&l.set_id).map_err(|_| why("the limit set is not known")), Ok)?;
    let source = &s.view.sources[i];
    let d0 = source.distance.ok_or_else(|| {
        why("the source has no distance to move it from (it is given at the eye or as a full field)")
    })?;
    let r = LimitsRequest {
        source,
        filters: &s.view.filters,
        set,
        duration: spec.duration,
        aphakic: spec.aphakic,
        classify: None,
        only: &[],
    };
    let grid = log_distances(d0 / 10.0, d0 * 10.0, 2 * PER_DECADE + 1).map_err(|e| why(e.message()))?;
    let points = sweep_distance(&r, &grid).map_err(|e| why(e.message()))?;
    from_points(&points, &Drawn { duration: spec.duration, placed: Some(d0), source: &l.source, set })
}

/// What a t_max-against-distance figure names besides its points.
pub struct Drawn<'a> {
    /// The exposure duration of the ratios (a dashed line).
    pub duration: Time,
    /// The placed distance, marked when inside the range.
    pub placed: Option<Length>,
    /// The source id.
    pub source: &'a str,
    /// The limit set.
    pub set: &'a LimitSet,
}

/// The figure of a distance sweep's `points` (at least two, ascending), or why there is
/// nothing to draw.
pub fn from_points(points: &[DistancePoint], d: &Drawn<'_>) -> Result<Figure, String> {
    let (Some(first), Some(last)) = (points.first(), points.last()) else {
        return Err("no distances to draw".to_string());
    };
    let x = (first.distance.si() * 1e3, last.distance.si() * 1e3);
    let names = first.hazards.iter().map(|h| h.name.clone());
    let lines: Vec<Line> = names.enumerate().map(|(i, name)| line(points, i, name)).collect();
    let lines = lines.into_iter().filter(|x| !x.runs.is_empty() || !x.above.is_empty());
    let (drawn, never): (Vec<_>, Vec<_>) = lines.partition(|x| !x.runs.is_empty());
    let doc = short_document(&d.set.document, &d.set.edition);
    if drawn.is_empty() || x.0 >= x.1 {
        return Err(format!(
            "t_max against distance ({doc}): no hazard reaches its limit within the set's durations at any distance \
             from {} to {} mm",
            tick_label(x.0),
            tick_label(x.1)
        ));
    }
    let label = format!("t_max against distance, {}", d.source);
    let placed = d.placed.map(|p| p.si() * 1e3).filter(|p| (x.0..=x.1).contains(p));
    let svg = render((920, 420), &label, |root| draw(root, x, d.duration.si(), placed, &drawn))
        .map_err(|e| e.to_string())?;
    Ok(Figure {
        svg,
        caption: caption(d, &doc, placed, &never.iter().map(|x| x.name.as_str()).collect::<Vec<_>>()),
    })
}

/// One hazard's curve: t_max where the limit is reached, and the distances where it is not.
struct Line {
    name: String,
    /// Stretches of consecutive distances with a t_max (mm, s); a gap breaks the line.
    runs: Vec<Vec<(f64, f64)>>,
    /// (mm, the longest duration the set covers, s; infinite when open).
    above: Vec<(f64, f64)>,
}

/// Hazard `i` of every point as a line.
fn line(points: &[DistancePoint], i: usize, name: String) -> Line {
    let mut out = Line { name, runs: Vec::new(), above: Vec::new() };
    let mut open = false;
    for p in points {
        let mm = p.distance.si() * 1e3;
        match p.hazards.get(i).and_then(|h| h.t_max) {
            Some(MaxDuration::Limited(t)) if t.si() > 0.0 && t.si().is_finite() => {
                match out.runs.last_mut() {
                    Some(r) if open => r.push((mm, t.si())),
                    _ => out.runs.push(vec![(mm, t.si())]),
                }
                open = true;
                continue;
            }
            Some(MaxDuration::NotReached(u)) => out.above.push((mm, u.si())),
            _ => {}
        }
        open = false;
    }
    out
}

/// The caption.
fn caption(d: &Drawn<'_>, doc: &str, placed: Option<f64>, never: &[&str]) -> String {
    let mut c = format!(
        "Longest permissible exposure t_max of each hazard of {doc} against the distance from {} (log–log), from the \
         library's distance sweep (the computation of `retidose sweep`): the source moved along its axis, a small \
         source by the inverse-square law, an extended one at constant radiance, with the scenario's filters.",
        d.source
    );
    if let Some(p) = placed {
        c.push_str(&format!(
            " At {} mm, where the report assessed it, the values are the table's.",
            tick_label(p)
        ));
    }
    c.push_str(
        " Dashed: the exposure duration; where a curve falls below it, the limit is exceeded. Triangles on the top \
         edge: the limit is not reached within the set's durations at that distance.",
    );
    if !never.is_empty() {
        c.push_str(&format!(
            " Not reached within the set's durations at any distance shown: {}.",
            never.join("; ")
        ));
    }
    c
}

/// The log–log axes over `x` mm, the lines, the duration `dur` s and the placed distance, and
/// the legend.
fn draw(root: &Area<'_>, x: (f64, f64), dur: f64, placed: Option<f64>, lines: &[Line]) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(660);
    let ts = lines.iter().flat_map(|l| l.runs.iter().flatten().map(|p| p.1)).chain([dur]);
    let (tlo, thi) = ts.fold((f64::MAX, 0.0f64), |a, t| (a.0.min(t), a.1.max(t)));
    let y = decades(tlo, thi * 1.01);
    let mut c =
        log_log(&plot, x, y, "distance from the source (mm)", "t_max, longest permissible exposure (s)")?;
    c.draw_series(DashedLineSeries::new(vec![(x.0, dur), (x.1, dur)], 7, 4, BLACK.stroke_width(1)))?;
    let left = Pos::new(HPos::Left, VPos::Bottom);
    let dur_text = format!("exposure duration {}", crate::cli::render::room::duration(dur));
    c.draw_series(std::iter::once(Text::new(dur_text, (x.0 * 1.1, dur), text(11.0, BLACK).pos(left))))?;
    if let Some(d0) = placed {
        let grey = RGBColor(90, 90, 90).stroke_width(1);
        c.draw_series(DashedLineSeries::new(vec![(d0, y.0), (d0, y.1)], 3, 3, grey))?;
        let at = format!(" assessed {} mm", tick_label(d0));
        c.draw_series(std::iter::once(Text::new(at, (d0, y.0), text(11.0, BLACK).pos(left))))?;
    }
    x_ticks(&mut c, &log_ticks(x.0, x.1), y)?;
    for (i, line) in lines.iter().enumerate() {
        let k = colour(i + 1);
        for run in &line.runs {
            c.draw_series(LineSeries::new(run.iter().copied(), k.stroke_width(2)))?;
            c.draw_series(run.iter().map(|&p| Circle::new(p, 2, k.filled())))?;
        }
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

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, demo, texts};
    use super::*;
    use retidose::limits::TMax;

    fn scenario(name: &str) -> Scenario {
        retidose::assess::parse_scenario_file(retidose::assess::demo(name).unwrap(), name, None).unwrap()
    }

    #[test]
    fn the_stimulus_led_is_moved_and_agrees_with_the_table_at_200_mm() {
        let (a, s) = (demo("stimulus-review"), scenario("stimulus-review"));
        let l = a.limits.iter().find(|l| l.set_id == "iec62471-2006").unwrap();
        let f = figure(&s, l).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg);
        for want in ["distance from the source (mm)", "t_max, longest permissible exposure (s)", "Hazards"] {
            assert!(t.iter().any(|x| x == want), "{want} missing from {t:?}");
        }
        assert!(t.join(" ").contains("retinal blue light (photochemical)"));
        assert!(t.iter().any(|x| x.contains("assessed 200 mm")));
        // The sweep's point at the assessed distance is the table's t_max (the same engine).
        let r = LimitsRequest {
            source: &s.view.sources[0],
            filters: &s.view.filters,
            set: find_set("iec62471-2006").unwrap(),
            duration: l.duration,
            aphakic: false,
            classify: None,
            only: &[],
        };
        let p = sweep_distance(&r, &[Length::from_si(0.2)]).unwrap();
        let blue = p[0].hazards.iter().find(|h| h.id == "blue-light").unwrap();
        let table = l.hazards.iter().find(|h| h.id == "blue-light").unwrap();
        let (Some(MaxDuration::Limited(t)), Some(TMax::Seconds(want))) = (blue.t_max, table.t_max) else {
            panic!("{:?} {:?}", blue.t_max, table.t_max)
        };
        assert!((t.si() - want).abs() <= 1e-12 * want);
    }

    #[test]
    fn a_source_without_a_distance_says_why() {
        let (a, s) = (demo("dark-adaptation"), scenario("dark-adaptation"));
        let why = figure(&s, &a.limits[0]).unwrap_err();
        assert!(why.contains("is not drawn") && why.contains("no distance"), "{why}");
    }

    #[test]
    fn a_set_without_risk_groups_is_drawn_too() {
        let (a, s) = (demo("stimulus-review"), scenario("stimulus-review"));
        let l = a.limits.iter().find(|l| l.set_id == "directive-2006-25-ec").unwrap();
        let f = figure(&s, l).unwrap();
        assert_well_formed(&f.svg);
        assert!(f.caption.contains("Directive 2006/25/EC"));
    }
}
