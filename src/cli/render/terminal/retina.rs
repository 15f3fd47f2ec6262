//! The terminal table of `retidose retina`.

use std::fmt::Write;

use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::retina::catch::ReceptorCatch;
use retidose::retina::report::{RetinaReport, SourceAtEye};
use uom::si::illuminance::lux;
use uom::si::length::millimeter;

use super::{coverage_text, notes_and_caution, pair, photometric_short};
use crate::cli::render::escape::terminal_line;
use crate::cli::render::num;

/// The terminal table for a retinal assessment.
pub fn table(r: &RetinaReport) -> String {
    let mut o = String::new();
    eye(&mut o, r);
    for (i, s) in r.sources.iter().enumerate() {
        let _ = writeln!(o, "\nSource {}: {}", i + 1, terminal_line(&s.label));
        at_the_cornea(&mut o, s);
        at_the_retina(&mut o, s);
    }
    let _ = writeln!(o, "\nAll sources at the cornea: {}", photometric_short(&r.total_illuminance));
    human_alpha_opic(&mut o, r);
    species_alpha_opic(&mut o, r);
    notes_and_caution(&mut o, &r.notes);
    o
}

/// The eye: species, pupil, collecting area, nodal distance and filters.
fn eye(o: &mut String, r: &RetinaReport) {
    let _ = writeln!(o, "retidose retina: {} eye", r.species.name());
    let _ = writeln!(
        o,
        "  pupil             {} mm, {} [{}]",
        num(r.pupil.diameter.get::<millimeter>()),
        terminal_line(&r.pupil.basis),
        r.pupil.status
    );
    let _ = writeln!(o, "  collecting area   {} mm²", num(r.collecting_area_mm2));
    let _ = writeln!(o, "  nodal distance    {} mm", num(r.nodal_distance.get::<millimeter>()));
    if !r.filters.is_empty() {
        let _ = writeln!(o, "  filters           {}", terminal_line(&r.filters.join(", ")));
    }
}

/// One source at the cornea: illuminance, irradiance, the radiance the eye sees, subtense, notes.
fn at_the_cornea(o: &mut String, s: &SourceAtEye) {
    let _ = writeln!(o, "  at the cornea     {}", photometric_short(&s.illuminance));
    let _ = writeln!(o, "                    {}", pair(s.irradiance.si_with_unit()));
    let _ = writeln!(o, "                    {}", pair(s.photon_irradiance.si_with_unit()));
    match (&s.radiance, &s.luminance) {
        (Some(l), Some(lv)) => {
            let derived = if s.radiance_derived { " (derived)" } else { "" };
            let _ = writeln!(o, "  seen radiance     {}{derived}", pair(l.si_with_unit()));
            let _ = writeln!(o, "  seen luminance    {}", photometric_short(lv));
        }
        _ => {
            let _ = writeln!(o, "  seen radiance     not known");
        }
    }
    if let Some(a) = s.subtense {
        let _ = writeln!(o, "  subtense          {} mrad ({}°)", num(a.si() * 1e3), num(a.si().to_degrees()));
    }
    for n in &s.notes {
        let _ = writeln!(o, "  note              {}", terminal_line(n));
    }
}

/// One source at the retina: irradiance, trolands, image size and the photoreceptor catch.
fn at_the_retina(o: &mut String, s: &SourceAtEye) {
    let Some(ret) = &s.retinal else {
        let _ = writeln!(o, "  retina            not assessed: the radiance the eye sees is not known");
        return;
    };
    let (e, eu) = ret.irradiance.si_with_unit();
    let (q, _) = ret.photon_irradiance.si_with_unit();
    let _ = writeln!(o, "  retina            {} {eu}, {} photons·µm⁻²·s⁻¹", num(e), num(q * 1e-12));
    let t = &ret.trolands;
    let _ = writeln!(
        o,
        "  trolands          photopic {} td, scotopic {} td",
        num(as_td_f64(t.photopic)),
        num(as_td_f64(t.scotopic))
    );
    let _ = writeln!(
        o,
        "                    Stiles–Crawford effective: {} td (Barten 1999), {} td (integral, ρ 0.05 mm⁻²)",
        num(as_td_f64(t.photopic_effective_barten)),
        num(as_td_f64(t.photopic_effective_integral))
    );
    if let Some(sz) = ret.image_size {
        let _ = writeln!(o, "  image size        {} µm", num(sz.si() * 1e6));
    }
    let _ = writeln!(o, "  photoisomerisations, R*/receptor/s (spectral route)");
    for c in &ret.catch {
        catch(o, c);
    }
}

/// One receptor's catch: the spectral route, the troland routes and how far they differ.
fn catch(o: &mut String, c: &ReceptorCatch) {
    let memo = if c.from_memory.is_empty() {
        String::new()
    } else {
        format!("  [from memory: {}]", c.from_memory.join(", "))
    };
    let _ = writeln!(
        o,
        "    {:<8} λmax {:>5} nm  {:>11}{}{memo}",
        terminal_line(&c.receptor),
        num(c.lambda_max_nm),
        num(c.rate.si()),
        coverage_text(&c.coverage)
    );
    for t in &c.troland_routes {
        let _ = writeln!(
            o,
            "             troland route {} R*/rod/s per scot td ({}): {}",
            num(t.factor),
            terminal_line(&t.name),
            num(t.rate.si())
        );
    }
    if let Some(ratio) = route_spread(c) {
        let _ = writeln!(
            o,
            "             the routes differ by up to {ratio:.1}×: pupil, media and collecting-area assumptions differ"
        );
    }
}

/// Largest ratio between the spectral route and the troland routes, if they differ by more
/// than 20 %.
fn route_spread(c: &ReceptorCatch) -> Option<f64> {
    let mut rates: Vec<f64> = c.troland_routes.iter().map(|t| t.rate.si()).collect();
    rates.push(c.rate.si());
    let max = rates.iter().copied().fold(f64::MIN, f64::max);
    let min = rates.iter().copied().fold(f64::MAX, f64::min);
    (rates.len() > 1 && min > 0.0 && max / min > 1.2).then(|| max / min)
}

/// The CIE S 026 α-opic quantities at the cornea, all sources.
fn human_alpha_opic(o: &mut String, r: &RetinaReport) {
    if r.human_alpha_opic.is_empty() {
        return;
    }
    let _ = writeln!(o, "\nα-opic quantities at the cornea (CIE S 026:2018)");
    for a in &r.human_alpha_opic {
        let q = a.quantity.map_or("—".into(), |q| pair(q.si_with_unit()));
        let edi = a.edi.map_or("—".into(), |e| pair(e.si_with_unit()));
        let mark = if a.reconstructed { " *reconstructed" } else { "" };
        let name = terminal_line(&a.name);
        let _ = writeln!(o, "  {name:<13} {q:>24}   EDI {edi:>12}{mark}{}", coverage_text(&a.coverage));
    }
}

/// The species' own α-opic quantities at the cornea (retidose's method), all sources.
fn species_alpha_opic(o: &mut String, r: &RetinaReport) {
    if r.species_opic.is_empty() {
        return;
    }
    let _ = writeln!(
        o,
        "\n{} α-opic quantities at the cornea (retidose method by analogy with CIE S 026; not a CIE quantity)",
        r.species.name()
    );
    let _ =
        writeln!(o, "  {:<11} {:>6}  {:>26}  {:>14}", "channel", "λmax", "photon irradiance", "equiv. D65");
    for s in &r.species_opic {
        let _ = writeln!(
            o,
            "  {:<11} {:>6}  {:>26}  {:>14}{}",
            terminal_line(&s.channel),
            format!("{} nm", num(s.lambda_max_nm)),
            format!("{} photons·m⁻²·s⁻¹", num(s.photon_irradiance.si())),
            format!("{} lx", num(s.equivalent_daylight.get::<lux>())),
            coverage_text(&s.coverage)
        );
    }
}
