//! The terminal text of `retidose retina`, fitted to the terminal's width.

use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::retina::catch::ReceptorCatch;
use retidose::retina::report::{RetinaReport, SourceAtEye};
use uom::si::illuminance::lux;
use uom::si::length::millimeter;

use super::{Page, Table, coverage_note, coverage_text, pair, photometric_short};
use crate::cli::render::num;

/// The width of the labels.
const LABEL: usize = 17;

/// The terminal text of a retinal assessment.
pub fn table(r: &RetinaReport) -> String {
    table_at(r, super::width())
}

/// The terminal text of a retinal assessment, fitted to `width` columns.
pub fn table_at(r: &RetinaReport, width: usize) -> String {
    let mut o = Page::new(width, false);
    eye(&mut o, r);
    for (i, s) in r.sources.iter().enumerate() {
        o.heading(&format!("Source {}: {}", i + 1, s.label), false);
        at_the_cornea(&mut o, s);
        at_the_retina(&mut o, s);
    }
    o.blank();
    o.para(&format!("All sources at the cornea: {}", photometric_short(&r.total_illuminance)), "");
    human_alpha_opic(&mut o, r);
    species_alpha_opic(&mut o, r);
    o.notes_and_caution(&r.notes);
    o.finish()
}

/// The eye: species, pupil, collecting area, nodal distance and filters.
fn eye(o: &mut Page, r: &RetinaReport) {
    o.heading(&format!("retidose retina: {} eye", r.species.name()), true);
    o.field(
        "  ",
        "pupil",
        LABEL,
        &format!("{} mm, {} [{}]", num(r.pupil.diameter.get::<millimeter>()), r.pupil.basis, r.pupil.status),
    );
    o.field("  ", "collecting area", LABEL, &format!("{} mm²", num(r.collecting_area_mm2)));
    o.field("  ", "nodal distance", LABEL, &format!("{} mm", num(r.nodal_distance.get::<millimeter>())));
    if !r.filters.is_empty() {
        o.field("  ", "filters", LABEL, &r.filters.join(", "));
    }
}

/// One source at the cornea: illuminance, irradiance, the radiance the eye sees, subtense, notes.
fn at_the_cornea(o: &mut Page, s: &SourceAtEye) {
    o.field("  ", "at the cornea", LABEL, &photometric_short(&s.illuminance));
    o.field("  ", "", LABEL, &pair(s.irradiance.si_with_unit()));
    o.field("  ", "", LABEL, &pair(s.photon_irradiance.si_with_unit()));
    match (&s.radiance, &s.luminance) {
        (Some(l), Some(lv)) => {
            let derived = if s.radiance_derived { " (derived)" } else { "" };
            o.field("  ", "seen radiance", LABEL, &format!("{}{derived}", pair(l.si_with_unit())));
            o.field("  ", "seen luminance", LABEL, &photometric_short(lv));
        }
        _ => o.field("  ", "seen radiance", LABEL, "not known"),
    }
    if let Some(a) = s.subtense {
        o.field(
            "  ",
            "subtense",
            LABEL,
            &format!("{} mrad ({}°)", num(a.si() * 1e3), num(a.si().to_degrees())),
        );
    }
    for n in &s.notes {
        o.field("  ", "note", LABEL, n);
    }
}

/// One source at the retina: irradiance, trolands, image size and the photoreceptor catch.
fn at_the_retina(o: &mut Page, s: &SourceAtEye) {
    let Some(ret) = &s.retinal else {
        o.field("  ", "retina", LABEL, "not assessed: the radiance the eye sees is not known");
        return;
    };
    let (e, eu) = ret.irradiance.si_with_unit();
    let (q, _) = ret.photon_irradiance.si_with_unit();
    o.field("  ", "retina", LABEL, &format!("{} {eu}, {} photons·µm⁻²·s⁻¹", num(e), num(q * 1e-12)));
    let t = &ret.trolands;
    o.field(
        "  ",
        "trolands",
        LABEL,
        &format!("photopic {} td, scotopic {} td", num(as_td_f64(t.photopic)), num(as_td_f64(t.scotopic))),
    );
    o.field(
        "  ",
        "",
        LABEL,
        &format!(
            "Stiles–Crawford effective: {} td (Barten 1999), {} td (integral, ρ 0.05 mm⁻²)",
            num(as_td_f64(t.photopic_effective_barten)),
            num(as_td_f64(t.photopic_effective_integral))
        ),
    );
    if let Some(sz) = ret.image_size {
        o.field("  ", "image size", LABEL, &format!("{} µm", num(sz.si() * 1e6)));
    }
    o.para("photoisomerisations per receptor per second (spectral route)", "  ");
    for c in &ret.catch {
        catch(o, c);
        if let Some(r) = ret.rod_rate.as_ref().filter(|_| c.receptor == "rod") {
            let text = format!(
                "recommended rod rate {} R*/rod/s, 95 % interval {} – {} between the routes; {} on the safe side",
                num(r.recommended.si()),
                num(r.interval.0.si()),
                num(r.interval.1.si()),
                num(r.safe_side.si())
            );
            o.field("    ", "", LABEL - 2, &text);
        }
    }
}

/// One receptor's catch: the spectral route, the troland routes and how far they differ.
fn catch(o: &mut Page, c: &ReceptorCatch) {
    let memo = if c.from_memory.is_empty() {
        String::new()
    } else {
        format!("  [from memory: {}]", c.from_memory.join(", "))
    };
    o.field(
        "    ",
        &c.receptor,
        LABEL - 2,
        &format!(
            "{} R*/{}/s (λmax {} nm){}{memo}",
            num(c.rate.si()),
            c.receptor,
            num(c.lambda_max_nm),
            coverage_text(&c.coverage)
        ),
    );
    for t in &c.troland_routes {
        o.field(
            "    ",
            "",
            LABEL - 2,
            &format!(
                "troland route: {} R*/rod/s per scotopic td ({}): {} R*/rod/s",
                num(t.factor),
                t.source,
                num(t.rate.si())
            ),
        );
    }
    if let Some(ratio) = route_spread(c) {
        o.field(
            "    ",
            "",
            LABEL - 2,
            &format!(
                "the routes differ by up to {}×: pupil, media and collecting-area assumptions differ",
                num(ratio)
            ),
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
fn human_alpha_opic(o: &mut Page, r: &RetinaReport) {
    if r.human_alpha_opic.is_empty() {
        return;
    }
    o.heading("α-opic quantities at the cornea (CIE S 026:2018)", false);
    let mut t = Table::new(&["", "α-opic irradiance", "EDI"]);
    for a in &r.human_alpha_opic {
        let mark = if a.reconstructed { " *" } else { "" };
        t.row(vec![
            format!("{}{mark}", a.name),
            a.quantity.map_or("—".into(), |q| pair(q.si_with_unit())),
            a.edi.map_or("—".into(), |e| pair(e.si_with_unit())),
        ]);
    }
    o.table(&t);
    if r.human_alpha_opic.iter().any(|a| a.reconstructed) {
        o.para("* reconstructed action spectrum: see the notes", "  ");
    }
    for a in &r.human_alpha_opic {
        if let Some(note) = coverage_note(&a.coverage) {
            o.hanging("! ", "  ", &format!("{}: {note}", a.name));
        }
    }
}

/// The species' own α-opic quantities at the cornea (retidose's method), all sources.
fn species_alpha_opic(o: &mut Page, r: &RetinaReport) {
    if r.species_opic.is_empty() {
        return;
    }
    o.heading(
        &format!(
            "{} α-opic quantities at the cornea (retidose method by analogy with CIE S 026; not a CIE quantity)",
            r.species.name()
        ),
        false,
    );
    let mut t = Table::new(&["channel", "λmax", "photon irradiance", "equivalent D65 illuminance"]);
    for s in &r.species_opic {
        t.row(vec![
            s.channel.clone(),
            format!("{} nm", num(s.lambda_max_nm)),
            format!("{} photons·m⁻²·s⁻¹", num(s.photon_irradiance.si())),
            format!("{} lx", num(s.equivalent_daylight.get::<lux>())),
        ]);
    }
    o.table(&t);
    for s in &r.species_opic {
        if let Some(note) = coverage_note(&s.coverage) {
            o.hanging("! ", "  ", &format!("{}: {note}", s.channel));
        }
    }
}
