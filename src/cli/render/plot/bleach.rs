//! The bleach time-course figure: the bleached fraction over the whole schedule through the
//! report's uniform samples and its exact step-end values (so the plotted peak is the table's),
//! shaded bands where light is on, a band of at least [`MIN_BAND_PX`] for every room event
//! however brief, and for human rods the predicted threshold recovery on a second axis.

use plotters::prelude::*;
use retidose::assess::Assessment;
use retidose::base::quantity::SiValue;
use retidose::pigment::bleach::BleachReport;
use retidose::pigment::kinetics::{advance, find_pigment};

use super::{
    Area, DASHES, Figure, GRID, GRID_LIGHT, Mark, PlotResult, colour, font, legend, render, text, tick_label,
};

/// The narrowest band drawn, px: a brief pulse stays visible on a long course.
pub const MIN_BAND_PX: f64 = 3.0;

/// Light steps, dark-phase steps with light, room events.
const LIT: RGBAColor = RGBAColor(255, 214, 10, 0.28);
const DIM: RGBAColor = RGBAColor(90, 110, 170, 0.16);
const EVENT: RGBAColor = RGBAColor(213, 0, 0, 0.55);

/// A shaded stretch of time, s, and its colour.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Band {
    from: f64,
    to: f64,
    fill: RGBAColor,
}

/// What the figure draws (times in seconds).
struct Data {
    /// Seconds per unit of the time axis, and the unit.
    unit: (f64, &'static str),
    total_s: f64,
    /// The course: samples and exact step ends, in time order.
    course: Vec<(f64, f64)>,
    /// The exact step ends alone.
    exact: Vec<(f64, f64)>,
    /// Whether the course holds exact values through every step.
    stepped: bool,
    bands: Vec<Band>,
    /// Room events: (start s, duration s).
    events: Vec<(f64, f64)>,
    /// Threshold estimates: label and (s, log units).
    thresholds: Vec<(String, Vec<(f64, f64)>)>,
    legend: Vec<(String, Mark)>,
}

/// The bleach figure of an assessment; `None` without a pigment course.
pub fn figure(a: &Assessment) -> Option<Figure> {
    let b = a.bleach.as_ref()?;
    if b.time_course.is_empty() || !b.total_s.is_finite() || b.total_s <= 0.0 {
        return None;
    }
    let (cycle_s, repeat) = cycle(a, b);
    let exact = step_ends(a, b, cycle_s, repeat);
    let mut course: Vec<(f64, f64)> = b.time_course.clone();
    let through = through_steps(a, b, repeat, &exact);
    let stepped = !through.is_empty();
    course.extend(through);
    course.retain(|p| !exact.iter().any(|e| (e.0 - p.0).abs() < 1e-9));
    course.extend(&exact);
    course.sort_by(|x, y| x.0.total_cmp(&y.0));
    course.dedup_by(|x, y| (x.0 - y.0).abs() < 1e-9);
    let (bands, events) = bands(a, cycle_s, repeat);
    let thresholds = thresholds(b);
    let mut d = Data {
        unit: unit(b.total_s),
        total_s: b.total_s,
        course,
        exact,
        stepped,
        bands,
        events,
        thresholds,
        legend: Vec::new(),
    };
    d.legend = legend_entries(a, b, &d);
    let label = format!("bleach time course: {} bleached over the schedule", receptor(b));
    let svg = render((920, 400), &label, |root| draw(root, b, &d)).ok()?;
    Some(Figure { svg, caption: caption(a, b, &d) })
}

/// "mouse rod pigment" for `mouse-rod`.
fn receptor(b: &BleachReport) -> String {
    format!("{} pigment", b.receptor.replace('-', " "))
}

/// The length of one cycle of the steps, s, and how many cycles the course runs.
fn cycle(a: &Assessment, b: &BleachReport) -> (f64, usize) {
    let cycle_s: f64 = a.steps.iter().map(|s| s.duration.si()).sum();
    let repeat = if cycle_s > 0.0 { (b.total_s / cycle_s).round().max(1.0) as usize } else { 1 };
    (if cycle_s > 0.0 { cycle_s } else { b.total_s }, repeat)
}

/// The exact values the report holds: each phase's last step end, the peak and the end.
fn step_ends(a: &Assessment, b: &BleachReport, cycle_s: f64, repeat: usize) -> Vec<(f64, f64)> {
    let mut ends = Vec::new();
    let mut t = (repeat as f64 - 1.0) * cycle_s;
    for (i, s) in a.steps.iter().enumerate() {
        t += s.duration.si();
        let last = a.steps.iter().rposition(|x| x.name == s.name) == Some(i);
        let phase = b.phases.iter().find(|p| p.name == s.name);
        if let (true, Some(p), true) = (last, phase, t <= b.total_s * (1.0 + 1e-9)) {
            ends.push((t, p.end));
        }
    }
    ends.push((b.summary.peak_s, b.summary.peak));
    ends.push((b.total_s, b.summary.end));
    ends.sort_by(|x, y| x.0.total_cmp(&y.0));
    ends.dedup_by(|x, y| (x.0 - y.0).abs() < 1e-9);
    ends
}

/// Exact values through every step of the course: its start, points early in it where the
/// kinetics move fastest, and its end, from the library's kinetics with the report's model,
/// constants and levels; so a change within minutes shows as sharp on a week-long course.
/// Empty when they do not reproduce the report's exact values `ends` (1e-9).
fn through_steps(a: &Assessment, b: &BleachReport, repeat: usize, ends: &[(f64, f64)]) -> Vec<(f64, f64)> {
    let Ok(p) = find_pigment(&b.receptor) else { return Vec::new() };
    let (mut t, mut x) = (0.0, b.time_course.first().map_or(0.0, |q| q.1));
    let mut out = vec![(t, x)];
    for s in (0..repeat).flat_map(|_| &a.steps) {
        let (k, dur) = (p.rate_of_level(s.level), s.duration.si());
        if !k.is_finite() {
            return Vec::new();
        }
        let at = |dt: f64| advance(b.model, b.constants, x, k, dt).clamp(0.0, 1.0);
        out.extend([1e-4, 1e-3, 3e-3, 1e-2, 3e-2, 0.1, 0.3, 0.6].map(|f| (t + f * dur, at(f * dur))));
        (t, x) = (t + dur, at(dur));
        out.push((t, x));
    }
    let agrees = |e: &(f64, f64)| out.iter().any(|q| (q.0 - e.0).abs() < 1e-6 && (q.1 - e.1).abs() <= 1e-9);
    if ends.iter().all(agrees) { out } else { Vec::new() }
}

/// Seconds per unit and the unit of a course of `total_s`.
fn unit(total_s: f64) -> (f64, &'static str) {
    match total_s {
        t if t < 300.0 => (1.0, "s"),
        t if t < 3.0 * 3600.0 => (60.0, "min"),
        t if t < 48.0 * 3600.0 => (3600.0, "h"),
        _ => (86_400.0, "d"),
    }
}

/// Bands of the steps with light (over every cycle), and the room events after each lights-off.
fn bands(a: &Assessment, cycle_s: f64, repeat: usize) -> (Vec<Band>, Vec<(f64, f64)>) {
    let (mut out, mut offs) = (Vec::new(), Vec::new());
    for k in 0..repeat {
        let mut t = k as f64 * cycle_s;
        for (i, s) in a.steps.iter().enumerate() {
            let dark = s.phase.is_some_and(|p| p.is_dark());
            let prev_dark = i.checked_sub(1).map_or(a.steps.last(), |j| a.steps.get(j)).and_then(|p| p.phase);
            if dark && !prev_dark.is_some_and(|p| p.is_dark()) {
                offs.push(t);
            }
            if !s.on.is_empty() && s.level > 0.0 {
                out.push(Band { from: t, to: t + s.duration.si(), fill: if dark { DIM } else { LIT } });
            }
            t += s.duration.si();
        }
    }
    let events = a
        .room
        .iter()
        .flat_map(|r| &r.events)
        .flat_map(|e| offs.iter().map(move |o| (o + e.start.si(), e.duration.si())))
        .collect();
    (out, events)
}

/// The threshold estimates after the last lights-off, in seconds from the start.
fn thresholds(b: &BleachReport) -> Vec<(String, Vec<(f64, f64)>)> {
    let Some(off) = b.recoveries.last().map(|r| r.from_s) else { return Vec::new() };
    b.thresholds
        .iter()
        .map(|t| {
            let name = t.basis.split(':').next().unwrap_or("estimate").trim().to_string();
            let pts = t.curve.iter().map(|p| (off + 60.0 * p.0, p.1)).filter(|p| p.0 <= b.total_s).collect();
            (format!("rod threshold elevation, {name} (right axis)"), pts)
        })
        .collect()
}

/// The legend: the course, the exact points, the bands, events and thresholds.
fn legend_entries(a: &Assessment, b: &BleachReport, d: &Data) -> Vec<(String, Mark)> {
    let names = |dark: bool| -> Vec<String> {
        let mut v: Vec<String> = Vec::new();
        for s in a.steps.iter().filter(|s| s.phase.is_some_and(|p| p.is_dark()) == dark && s.level > 0.0) {
            v.extend(s.on.iter().filter(|n| !v.contains(n)).cloned().collect::<Vec<_>>());
        }
        v
    };
    let mut e = vec![
        (format!("{} bleached", receptor(b)), Mark::Line(colour(0))),
        ("exact step-end values (as in the table)".to_string(), Mark::Dot(colour(0))),
    ];
    if d.bands.iter().any(|x| x.fill == LIT) {
        e.push((format!("light on: {}", names(false).join(", ")), Mark::Band(LIT)));
    }
    if d.bands.iter().any(|x| x.fill == DIM) {
        e.push((format!("dark phase, lit by: {}", names(true).join(", ")), Mark::Band(DIM)));
    }
    for ev in a.room.iter().flat_map(|r| &r.events).filter(|_| !d.events.is_empty()) {
        let dur = crate::cli::render::room::duration(ev.duration.si());
        e.push((format!("room event: {} ({dur}, not in this course)", ev.name), Mark::Band(EVENT)));
    }
    for (i, t) in d.thresholds.iter().enumerate() {
        e.push((t.0.clone(), Mark::Dashed(colour(1 + i), i)));
    }
    e
}

/// The caption.
fn caption(a: &Assessment, b: &BleachReport, d: &Data) -> String {
    let mut c = format!(
        "Bleached fraction of the {} over the schedule ({} model). The line joins the report's {} uniform samples{} \
         and its exact step-end values (dots), so the plotted peak, {:.3} %, is the table's. Shaded: steps with light \
         on.",
        receptor(b),
        b.model.name(),
        b.time_course.len(),
        if d.stepped {
            ", exact values early in every step (so a change within minutes stays sharp)"
        } else {
            ""
        },
        100.0 * b.summary.peak
    );
    if !d.events.is_empty() {
        c.push_str(&format!(
            " Red: the room's dark-phase events, each at least {MIN_BAND_PX} px wide however brief; they belong to the \
             room survey, not to this course (their bleach is given per cage position in the rack section)."
        ));
    }
    if !d.thresholds.is_empty() {
        c.push_str(" Dashed, right axis: predicted rod threshold elevation after the last lights-off (two estimates; see the notes).");
    }
    if a.steps.is_empty() {
        c.push_str(" The schedule's steps are not known here, so no band is drawn.");
    }
    c
}

/// The axes, bands, course, exact points, peak label and thresholds; the legend on the right.
fn draw(root: &Area<'_>, b: &BleachReport, d: &Data) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(660);
    let u = d.unit.0;
    let x = 0.0..d.total_s / u;
    let top = (100.0 * b.summary.peak * 1.18).clamp(1e-3, 100.0);
    let high = d.thresholds.iter().flat_map(|t| &t.1).map(|p| p.1).fold(0.0, f64::max).max(1.0) * 1.12;
    let mut c = ChartBuilder::on(&plot)
        .margin(14)
        .x_label_area_size(46)
        .y_label_area_size(70)
        .right_y_label_area_size(if d.thresholds.is_empty() { 10 } else { 62 })
        .build_cartesian_2d(x.clone(), 0.0..top)?
        .set_secondary_coord(x, 0.0..high);
    c.configure_mesh()
        .x_desc(format!("time from the start ({})", d.unit.1))
        .y_desc("pigment bleached (%)")
        .x_label_formatter(&|v| tick_label(*v))
        .y_label_formatter(&|v| tick_label(*v))
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .bold_line_style(GRID)
        .light_line_style(GRID_LIGHT)
        .draw()?;
    let px = f64::from(c.plotting_area().get_pixel_range().0.len().max(1) as u32);
    let min_w = MIN_BAND_PX * d.total_s / px;
    let rect = |from: f64, to: f64, fill: RGBAColor| {
        Rectangle::new([(from / u, 0.0), (to.max(from + min_w) / u, top)], fill.filled())
    };
    c.draw_series(d.bands.iter().map(|s| rect(s.from, s.to, s.fill)))?;
    c.draw_series(d.events.iter().map(|e| rect(e.0, e.0 + e.1, EVENT)))?;
    c.draw_series(LineSeries::new(
        d.course.iter().map(|p| (p.0 / u, 100.0 * p.1)),
        colour(0).stroke_width(2),
    ))?;
    c.draw_series(d.exact.iter().map(|p| Circle::new((p.0 / u, 100.0 * p.1), 3, colour(0).filled())))?;
    let peak = (b.summary.peak_s / u, 100.0 * b.summary.peak);
    let style = text(12.0, BLACK).pos(plotters::style::text_anchor::Pos::new(
        plotters::style::text_anchor::HPos::Left,
        plotters::style::text_anchor::VPos::Bottom,
    ));
    c.draw_series(std::iter::once(Text::new(format!("  peak {:.3} %", peak.1), peak, style)))?;
    for (i, t) in d.thresholds.iter().enumerate() {
        let pts: Vec<(f64, f64)> = t.1.iter().map(|p| (p.0 / u, p.1)).collect();
        c.draw_secondary_series({
            let (dash, gap) = DASHES[i % DASHES.len()];
            DashedLineSeries::new(pts, dash, gap, colour(1 + i).stroke_width(2))
        })?;
    }
    if !d.thresholds.is_empty() {
        c.configure_secondary_axes()
            .y_desc("log₁₀ rod threshold elevation")
            .y_label_formatter(&|v| tick_label(*v))
            .label_style(font(12.0))
            .axis_desc_style(font(13.0))
            .draw()?;
    }
    legend(&side.margin(16, 0, 8, 0), "Legend", &d.legend)
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, demo, texts};
    use super::*;

    #[test]
    fn the_plotted_peak_is_the_tables_and_thresholds_are_drawn_for_people() {
        let a = demo("dark-adaptation");
        let b = a.bleach.as_ref().unwrap();
        let f = figure(&a).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg).join(" ");
        let table = format!("{:.3} %", 100.0 * b.phases.iter().map(|p| p.max_end).fold(0.0, f64::max));
        assert!(t.contains(&format!("peak {table}")), "{t}");
        for want in
            ["time from the start (min)", "pigment bleached (%)", "log₁₀ rod threshold elevation", "S2 route"]
        {
            assert!(t.contains(want), "{want} missing");
        }
        assert!(t.contains("light on: bleaching-field"));
    }

    #[test]
    fn a_week_in_days_with_every_nightly_event() {
        let a = demo("vivarium");
        let f = figure(&a).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg).join(" ");
        assert!(t.contains("time from the start (d)"), "{t}");
        assert!(t.contains("room event: night check, red safelight"));
        assert!(!t.contains("threshold"), "no rod threshold for mice");
        let (cycle_s, repeat) = cycle(&a, a.bleach.as_ref().unwrap());
        assert_eq!(bands(&a, cycle_s, repeat).1.len(), 7, "one check a night for 7 nights");
    }

    #[test]
    fn the_steps_run_again_reproduce_the_report() {
        for name in ["vivarium", "dark-adaptation"] {
            let a = demo(name);
            let b = a.bleach.as_ref().unwrap();
            let (cycle_s, repeat) = cycle(&a, b);
            let ends = step_ends(&a, b, cycle_s, repeat);
            let through = through_steps(&a, b, repeat, &ends);
            assert!(through.len() > 2 * a.steps.len(), "{name}: the kinetics agree with the table");
            for (t, x) in b.time_course.iter().step_by(37) {
                let near = through.iter().min_by(|p, q| (p.0 - t).abs().total_cmp(&(q.0 - t).abs())).unwrap();
                assert!(near.0 != *t || (near.1 - x).abs() < 1e-9, "{name}: sample at {t} s");
            }
        }
    }

    #[test]
    fn step_ends_hold_the_exact_peak_and_end() {
        let a = demo("dark-adaptation");
        let b = a.bleach.as_ref().unwrap();
        let ends = step_ends(&a, b, 2460.0, 1);
        assert!(ends.contains(&(60.0, b.summary.peak)));
        assert!(ends.contains(&(b.total_s, b.summary.end)));
    }
}
