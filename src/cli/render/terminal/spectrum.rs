//! The terminal text of `retidose spectrum`, fitted to the terminal's width.

use retidose::base::quantity::SiValue;
use retidose::spectrum::photometry::{Photometric, PhotometricResult};
use retidose::spectrum::report::SpectrumReport;

use super::{Page, Table, coverage_note, coverage_text, percent};
use crate::cli::render::{basis_name, num};

/// The width of the labels of the totals.
const LABEL: usize = 27;

/// The terminal text for one spectrum.
pub fn table(r: &SpectrumReport) -> String {
    table_at(r, super::width())
}

/// The terminal text for one spectrum, fitted to `width` columns.
pub fn table_at(r: &SpectrumReport, width: usize) -> String {
    let mut o = Page::new(width, false);
    source(&mut o, r);
    totals(&mut o, r);
    alpha_opic(&mut o, r);
    bands(&mut o, r);
    o.notes_and_caution(&r.notes);
    o.finish()
}

/// What the spectrum is: label, provenance, measure, range and scaling.
fn source(o: &mut Page, r: &SpectrumReport) {
    o.heading(&format!("retidose spectrum: {}", r.label), true);
    if let Some(p) = &r.provenance {
        o.field("  ", "from", 13, p);
    }
    o.field(
        "  ",
        "values",
        13,
        &format!(
            "spectral {} ({} basis), {}–{} nm, {} samples",
            r.measure.name(),
            basis_name(r.basis),
            r.range_nm.0,
            r.range_nm.1,
            r.samples
        ),
    );
    if let Some(t) = &r.scaled_to {
        o.field("  ", "scaled to", 13, &t.describe());
    }
}

/// Radiant, photon and photometric totals, S/P ratio, efficacy and peak.
fn totals(o: &mut Page, r: &SpectrumReport) {
    o.heading("Totals over the sampled range", false);
    match (r.radiometric, r.photon) {
        (Some(e), Some(p)) => {
            let (ev, eu) = e.si_with_unit();
            let (pv, pu) = p.si_with_unit();
            o.field("  ", "radiant", LABEL, &format!("{} {eu}", num(ev)));
            o.field("  ", "photon", LABEL, &format!("{} {pu}", num(pv)));
        }
        _ => o.field("  ", "radiant, photon", LABEL, "— (relative spectrum)"),
    }
    let photopic = if r.scaled_to.as_ref().is_some_and(|t| t.is_photopic()) {
        // The reading the spectrum was scaled to: exact by construction, whatever the coverage.
        r.photopic.value.map_or("—".into(), |v| {
            let (x, u) = v.si_with_unit();
            format!("{} {u} (the value scaled to)", num(x))
        })
    } else {
        photometric_text(&r.photopic, false)
    };
    o.field("  ", "photopic  (V, 683.002 lm/W)", LABEL, &photopic);
    o.field("  ", "scotopic (V′, 1700.06 lm/W)", LABEL, &photometric_text(&r.scotopic, true));
    o.field("  ", "S/P ratio", LABEL, &r.sp_ratio.map_or("—".into(), num));
    o.field(
        "  ",
        "luminous efficacy",
        LABEL,
        &r.luminous_efficacy.map_or("—".into(), |k| format!("{} lm/W", num(k.si()))),
    );
    o.field("  ", "peak wavelength", LABEL, &format!("{} nm", num(r.peak_nm)));
}

/// A photometric total, or why there is none.
fn photometric_text(p: &PhotometricResult, scotopic: bool) -> String {
    let prime = if scotopic { " (scotopic)" } else { "" };
    match p.value {
        Some(v) => {
            let (x, u) = v.si_with_unit();
            format!("{} {u}{prime}{}", num(x), coverage_text(&p.coverage))
        }
        None => format!("— (relative spectrum){}", coverage_text(&p.coverage)),
    }
}

/// The CIE S 026 α-opic quantities, one row per photoreceptor.
fn alpha_opic(o: &mut Page, r: &SpectrumReport) {
    o.heading("α-opic quantities (CIE S 026:2018)", false);
    let mut t = Table::new(&[
        "",
        "α-opic quantity",
        "efficacy of luminous radiation (ELR)",
        "daylight efficacy ratio (DER)",
        "equivalent daylight illuminance (EDI)",
    ]);
    for a in &r.alpha_opic {
        let q = a.quantity.map_or("—".into(), |q| {
            let (v, u) = q.si_with_unit();
            format!("{} {u}", num(v))
        });
        let edi = a.edi.map_or("—".into(), |e: Photometric| {
            let (v, u) = e.si_with_unit();
            format!("{} {u}", num(v))
        });
        let mark = if a.reconstructed { " *" } else { "" };
        t.row(vec![
            format!("{}{mark}", a.name),
            q,
            a.elr.map_or("—".into(), |e| format!("{} mW/lm", num(e.si() * 1e3))),
            a.der.map_or("—".into(), num),
            edi,
        ]);
    }
    o.table(&t);
    if r.alpha_opic.iter().any(|a| a.reconstructed) {
        o.para("* reconstructed action spectrum: see the notes", "  ");
    }
    for a in &r.alpha_opic {
        if let Some(note) = coverage_note(&a.coverage) {
            o.hanging("! ", "  ", &format!("{}: {note}", a.name));
        }
    }
}

/// A band's name in words (the JSON keeps the short key).
fn band_name(key: &str) -> &str {
    match key {
        "uv" => "UV",
        "blue-400-500" => "blue",
        "ir" => "IR",
        other => other,
    }
}

/// The share of radiant power in each band.
fn bands(o: &mut Page, r: &SpectrumReport) {
    o.heading("Share of radiant power", false);
    let mut t = Table::new(&["band", "range", "share"]);
    for b in &r.bands {
        let share = b.share.map_or("—".into(), percent);
        let hi = if b.band_nm.1 >= 1e6 { "1 mm".to_string() } else { format!("{} nm", b.band_nm.1) };
        t.row(vec![band_name(b.name).to_string(), format!("{} nm – {hi}", b.band_nm.0), share]);
    }
    o.table(&t);
    for b in &r.bands {
        if let Some(note) = coverage_note(&b.coverage) {
            o.hanging("! ", "  ", &format!("{}: {note}", band_name(b.name)));
        }
    }
}
