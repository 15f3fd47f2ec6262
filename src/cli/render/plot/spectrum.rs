//! The spectrum figure: every source's spectral irradiance at the eye (after the filters), on a
//! log axis when the sources span decades, with the weightings of the subject's own species on
//! a second axis: the rodent opsin templates for mice and rats, and for people the functions
//! the report used (V(λ), melanopic, V′(λ) for a rod bleach, the hazard functions of the limits).

use plotters::coord::ranged1d::{AsRangedCoord, Ranged, ValueFormatter};
use plotters::prelude::*;
use retidose::assess::Assessment;
use retidose::base::curve::Curve;
use retidose::pigment::kinetics::LevelUnit;
use retidose::retina::eye::{Species, builtin_eye};
use retidose::spectrum::{Basis, Measure};

use super::{
    Area, DASHES, Figure, GRID, GRID_LIGHT, Mark, PlotResult, colour, decade_count, decades, font, legend,
    log_axis, power_label, render, tick_label,
};

/// A named line: legend text and (x, y) points.
type Line = (String, Vec<(f64, f64)>);

/// What the figure draws.
struct Data {
    /// Spectral irradiance of each source, W·m⁻²·nm⁻¹.
    sources: Vec<Line>,
    /// Weightings, peak 1.
    weights: Vec<Line>,
    /// Wavelength range, nm.
    x: (f64, f64),
    /// The y range, and whether it is logarithmic.
    y: (f64, f64),
    log: bool,
}

/// The spectrum figure of an assessment; `None` without sources.
pub fn figure(a: &Assessment) -> Option<Figure> {
    let sources: Vec<Line> = a
        .spectra
        .iter()
        .map(|(id, sp)| {
            let c = sp.to_energy();
            let c = c.curve();
            (id.clone(), c.wavelength_nm().iter().copied().zip(c.values().iter().copied()).collect())
        })
        .collect();
    let peaks: Vec<f64> = sources.iter().map(|s| s.1.iter().map(|p| p.1).fold(0.0, f64::max)).collect();
    let (lo, hi) = peaks.iter().fold((f64::MAX, 0.0f64), |m, &p| (m.0.min(p), m.1.max(p)));
    if sources.is_empty() || !(hi > 0.0 && hi.is_finite()) {
        return None;
    }
    let x = x_range(&sources, &peaks);
    let log = lo > 0.0 && hi / lo > 10.0;
    let y = if log { decades(lo * 1e-3, hi) } else { (0.0, hi * 1.08) };
    let weights = weightings(a, x);
    let d = Data { sources, weights, x, y, log };
    let label = "spectrum and weightings: spectral irradiance at the eye of each source, with the weightings";
    let svg = render((920, 420), label, |root| draw(root, &d)).ok()?;
    Some(Figure { svg, caption: caption(a, &d) })
}

/// The wavelengths where some source gives at least 10⁻⁴ of its peak (a spectrum file may run
/// far into the infrared at zero), with the visible band, widened to whole 10 nm.
fn x_range(sources: &[Line], peaks: &[f64]) -> (f64, f64) {
    let mut r = (380.0f64, 780.0f64);
    for (s, p) in sources.iter().zip(peaks) {
        let lit: Vec<f64> = s.1.iter().filter(|q| q.1 >= 1e-4 * p).map(|q| q.0).collect();
        if let (Some(a), Some(b)) = (lit.first(), lit.last()) {
            r = (r.0.min(*a), r.1.max(*b));
        }
    }
    ((r.0 / 10.0).floor() * 10.0, (r.1 / 10.0).ceil() * 10.0)
}

/// The caption: what is drawn on which axis, and which weightings.
fn caption(a: &Assessment, d: &Data) -> String {
    let axis = if d.log { "left axis, logarithmic" } else { "left axis" };
    let w = match a.species {
        Species::Human => "the weightings this report used (dashed, right axis, each scaled to peak 1): V(λ) for \
            photometry, melanopic (CIE S 026) where the schedule reports melanopic EDI, V′(λ) for a rod bleach, and the \
            hazard functions of the limits checked"
            .to_string(),
        s => format!(
            "the {} photopigment weightings (dashed, right axis, peak 1): the Govardovskii A1 template at each \
             channel's λmax as reported, times the built-in {} ocular media; human weightings do not apply to a {} and \
             are not drawn",
            s.name(),
            s.name(),
            s.name()
        ),
    };
    format!(
        "Spectral irradiance at the eye of each source after every filter (solid, {axis}), with {w}. Each weighting \
         is drawn over the whole wavelength axis, so where it extends past a spectrum's ends that spectrum does not \
         cover it."
    )
}

/// The weightings of the subject's species, sampled at 1 nm over `x` where defined.
fn weightings(a: &Assessment, x: (f64, f64)) -> Vec<Line> {
    let mut out = Vec::new();
    match a.species {
        Species::Human => {
            let t = retidose::base::data::tables();
            out.push(("V(λ) photopic (CIE 1924)".to_string(), points(&t.v, x)));
            if a.steps.iter().any(|s| s.melanopic_edi.is_some()) {
                let mel =
                    retidose::weighting::alpha_opic::action_spectra().iter().find(|f| f.name == "melanopic");
                out.extend(mel.map(|f| ("melanopic (CIE S 026)".to_string(), points(&f.curve, x))));
            }
            if a.bleach.as_ref().is_some_and(|b| b.level_unit == LevelUnit::ScotopicTrolands) {
                out.push(("V′(λ) scotopic (CIE 1951), the rod bleach".to_string(), points(&t.v_prime, x)));
            }
            out.extend(hazard_weightings(a, x));
        }
        species => out.extend(rodent_weightings(a, species, x)),
    }
    out.retain(|w| !w.1.is_empty());
    out
}

/// The hazard functions of the hazards the limits evaluated, each once.
fn hazard_weightings(a: &Assessment, x: (f64, f64)) -> Vec<Line> {
    let mut ids: Vec<String> = Vec::new();
    for l in &a.limits {
        let Ok(set) = retidose::limits::find_set(&l.set_id) else { continue };
        for h in l.hazards.iter().filter(|h| h.ratio.is_some() || h.lower_bound_ratio.is_some()) {
            let w = set.hazard(&h.id).and_then(|z| z.weighting.clone());
            if let Some(w) = w.filter(|w| !ids.contains(w)) {
                ids.push(w);
            }
        }
    }
    ids.iter()
        .filter_map(|id| retidose::limits::find_weighting(id))
        .map(|w| {
            let peak = w.curve.values().iter().copied().fold(0.0, f64::max);
            let name = if (peak - 1.0).abs() > 1e-9 && peak > 0.0 {
                format!("{} ÷ {}", w.name, tick_label(peak))
            } else {
                w.name.clone()
            };
            (name, points(&w.curve, x))
        })
        .collect()
}

/// τ(λ)·S(λ) at peak 1 for each of the species' channels (λmax as the report has them).
fn rodent_weightings(a: &Assessment, species: Species, x: (f64, f64)) -> Vec<Line> {
    let eye = builtin_eye(species);
    let mut channels: Vec<(String, f64)> = a
        .retina
        .as_ref()
        .map(|r| r.species_opic.iter().map(|o| (o.channel.clone(), o.lambda_max_nm)).collect())
        .unwrap_or_default();
    if channels.is_empty() {
        channels = eye.receptors.iter().map(|r| (r.name.clone(), r.lambda_max.value.value * 1e9)).collect();
        channels.extend(eye.melanopsin.iter().map(|m| ("melanopsin".to_string(), m.value.value * 1e9)));
    }
    let grid: Vec<f64> = (0..=((x.1 - x.0) as usize)).map(|i| x.0 + i as f64).collect();
    channels
        .into_iter()
        .map(|(name, lmax)| {
            let v: Vec<f64> = grid
                .iter()
                .map(|&w| {
                    eye.media_transmittance(w, None) * retidose::weighting::template::govardovskii_a1(lmax, w)
                })
                .collect();
            let peak = v.iter().copied().fold(0.0, f64::max).max(1e-300);
            let label = format!("{} {name}, λmax {} nm", species.name(), tick_label(lmax));
            (label, grid.iter().zip(&v).map(|(&w, &s)| (w, s / peak)).collect())
        })
        .collect()
}

/// A weighting's points inside `x`, scaled to peak 1 over the whole curve.
fn points(c: &Curve, x: (f64, f64)) -> Vec<(f64, f64)> {
    let peak = c.values().iter().copied().fold(0.0, f64::max);
    if peak.is_nan() || peak <= 0.0 {
        return Vec::new();
    }
    c.wavelength_nm()
        .iter()
        .zip(c.values())
        .filter(|(w, _)| **w >= x.0 && **w <= x.1)
        .map(|(w, v)| (*w, v / peak))
        .collect()
}

/// The plot on the left, the legend on the right.
fn draw(root: &Area<'_>, d: &Data) -> PlotResult<()> {
    let (plot, side) = root.split_horizontally(660);
    if d.log {
        chart(&plot, d, log_axis(d.y))?
    } else {
        chart(&plot, d, d.y.0..d.y.1)?
    }
    let n = d.sources.len();
    let mut entries: Vec<(String, Mark)> =
        d.sources.iter().enumerate().map(|(i, s)| (s.0.clone(), Mark::Line(colour(i)))).collect();
    entries.extend(d.weights.iter().enumerate().map(|(j, w)| (w.0.clone(), Mark::Dashed(colour(n + j), j))));
    legend(&side.margin(16, 0, 8, 0), "Sources (solid), weightings (dashed)", &entries)
}

/// The axes and the lines, on a linear or a log y axis.
fn chart<Y>(area: &Area<'_>, d: &Data, y: Y) -> PlotResult<()>
where
    Y: AsRangedCoord<Value = f64>,
    Y::CoordDescType: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    let unit = Measure::Irradiance.unit_per_nm(Basis::Energy);
    let mut c = ChartBuilder::on(area)
        .margin(14)
        .x_label_area_size(46)
        .y_label_area_size(80)
        .right_y_label_area_size(62)
        .build_cartesian_2d(d.x.0..d.x.1, y)?
        .set_secondary_coord(d.x.0..d.x.1, 0.0..1.05);
    let log = d.log;
    let ylab = move |v: &f64| if log { power_label(*v) } else { tick_label(*v) };
    let mut mesh = c.configure_mesh();
    mesh.x_desc("wavelength (nm)")
        .y_desc(format!("spectral irradiance ({unit})"))
        .x_label_formatter(&|v| tick_label(*v))
        .y_label_formatter(&ylab)
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .bold_line_style(GRID)
        .light_line_style(GRID_LIGHT);
    if log {
        mesh.y_labels(decade_count(d.y) + 1);
    }
    mesh.draw()?;
    c.configure_secondary_axes()
        .y_desc("relative sensitivity (peak 1)")
        .y_label_formatter(&|v| tick_label(*v))
        .label_style(font(12.0))
        .axis_desc_style(font(13.0))
        .draw()?;
    for (i, s) in d.sources.iter().enumerate() {
        for run in runs(&s.1, if log { d.y.0 } else { f64::MIN }) {
            c.draw_series(LineSeries::new(run, colour(i).stroke_width(2)))?;
        }
    }
    let n = d.sources.len();
    for (j, w) in d.weights.iter().enumerate() {
        c.draw_secondary_series({
            let (dash, gap) = DASHES[j % DASHES.len()];
            DashedLineSeries::new(w.1.clone(), dash, gap, colour(n + j).stroke_width(2))
        })?;
    }
    Ok(())
}

/// The stretches of `pts` at or above `floor` (a log axis cannot show the rest).
fn runs(pts: &[(f64, f64)], floor: f64) -> Vec<Vec<(f64, f64)>> {
    let mut out: Vec<Vec<(f64, f64)>> = vec![Vec::new()];
    for &p in pts {
        if p.1 >= floor && p.1.is_finite() {
            if let Some(r) = out.last_mut() {
                r.push(p);
            }
        } else if out.last().is_some_and(|r| !r.is_empty()) {
            out.push(Vec::new());
        }
    }
    out.retain(|r| !r.is_empty());
    out
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{assert_well_formed, demo, texts};
    use super::*;

    #[test]
    fn mice_get_their_opsins_and_no_human_weighting() {
        let f = figure(&demo("vivarium")).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg).join(" ");
        for want in
            ["wavelength (nm)", "spectral irradiance (W·m⁻²·nm⁻¹)", "relative sensitivity (peak 1)", "panels"]
        {
            assert!(t.contains(want), "{want} missing from {t}");
        }
        assert!(t.contains("door-leak"), "every source is drawn");
        assert!(t.contains("mouse rod, λmax 498 nm") && t.contains("mouse uv-cone, λmax 360 nm"));
        assert!(!t.contains("B(λ)") && !t.contains("V(λ)") && !t.contains("melanopic (CIE"));
        assert!(t.contains("10⁻"), "two sources decades apart get a log axis");
    }

    #[test]
    fn a_safety_review_shows_the_hazard_functions_it_used() {
        let f = figure(&demo("stimulus-review")).unwrap();
        assert_well_formed(&f.svg);
        let t = texts(&f.svg).join(" ");
        assert!(t.contains("blue-light hazard function B(λ)"), "{t}");
        assert!(t.contains("V(λ) photopic"));
        assert!(!t.contains("rod, λmax"));
    }

    #[test]
    fn runs_break_below_the_floor() {
        let r = runs(&[(1.0, 1.0), (2.0, 0.0), (3.0, 2.0), (4.0, 3.0)], 0.5);
        assert_eq!(r, vec![vec![(1.0, 1.0)], vec![(3.0, 2.0), (4.0, 3.0)]]);
    }
}
