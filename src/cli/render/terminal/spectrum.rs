//! The terminal table of `retidose spectrum`.

use std::fmt::Write;

use retidose::base::quantity::SiValue;
use retidose::spectrum::photometry::{Photometric, PhotometricResult};
use retidose::spectrum::report::SpectrumReport;

use super::{coverage_text, notes_and_caution};
use crate::cli::render::escape::terminal_line;
use crate::cli::render::{basis_name, num};

/// The terminal table for one spectrum.
pub fn table(r: &SpectrumReport) -> String {
    let mut o = String::new();
    source(&mut o, r);
    totals(&mut o, r);
    alpha_opic(&mut o, r);
    bands(&mut o, r);
    notes_and_caution(&mut o, &r.notes);
    o
}

/// What the spectrum is: label, provenance, measure, range and scaling.
fn source(o: &mut String, r: &SpectrumReport) {
    let _ = writeln!(o, "retidose spectrum: {}", terminal_line(&r.label));
    if let Some(p) = &r.provenance {
        let _ = writeln!(o, "  from          {}", terminal_line(p));
    }
    let _ = writeln!(
        o,
        "  values        spectral {} ({} basis), {}–{} nm, {} samples",
        r.measure.name(),
        basis_name(r.basis),
        r.range_nm.0,
        r.range_nm.1,
        r.samples
    );
    if let Some(t) = &r.scaled_to {
        let _ = writeln!(o, "  scaled to     {}", t.describe());
    }
}

/// Radiant, photon and photometric totals, S/P ratio, efficacy and peak.
fn totals(o: &mut String, r: &SpectrumReport) {
    let _ = writeln!(o, "\nTotals over the sampled range");
    match (r.radiometric, r.photon) {
        (Some(e), Some(p)) => {
            let (ev, eu) = e.si_with_unit();
            let (pv, pu) = p.si_with_unit();
            let _ = writeln!(o, "  radiant                     {} {eu}", num(ev));
            let _ = writeln!(o, "  photon                      {} {pu}", num(pv));
        }
        _ => {
            let _ = writeln!(o, "  radiant, photon             — (relative spectrum)");
        }
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
    let _ = writeln!(o, "  photopic  (V, 683.002 lm/W) {photopic}");
    let _ = writeln!(o, "  scotopic (V′, 1700.06 lm/W) {}", photometric_text(&r.scotopic, true));
    let _ = writeln!(o, "  S/P ratio                   {}", r.sp_ratio.map_or("—".into(), num));
    let _ = writeln!(
        o,
        "  luminous efficacy           {}",
        r.luminous_efficacy.map_or("—".into(), |k| format!("{} lm/W", num(k.si())))
    );
    let _ = writeln!(o, "  peak wavelength             {} nm", num(r.peak_nm));
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

/// The CIE S 026 α-opic quantities, one line per photoreceptor.
fn alpha_opic(o: &mut String, r: &SpectrumReport) {
    let _ = writeln!(o, "\nα-opic quantities (CIE S 026:2018)");
    let _ =
        writeln!(o, "  {:<13} {:>24} {:>11} {:>7} {:>18}", "", "α-opic quantity", "ELR mW/lm", "DER", "EDI");
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
        let _ = writeln!(
            o,
            "  {:<13} {:>24} {:>11} {:>7} {:>18}{mark}{}",
            a.name,
            q,
            a.elr.map_or("—".into(), |e| num(e.si() * 1e3)),
            a.der.map_or("—".into(), num),
            edi,
            coverage_text(&a.coverage)
        );
    }
    if r.alpha_opic.iter().any(|a| a.reconstructed) {
        let _ = writeln!(o, "  * reconstructed action spectrum: see the notes");
    }
}

/// The share of radiant power in each band.
fn bands(o: &mut String, r: &SpectrumReport) {
    let _ = writeln!(o, "\nShare of radiant power");
    for b in &r.bands {
        let share = b.share.map_or("—".into(), |s| format!("{:.2} %", 100.0 * s));
        let hi = if b.band_nm.1 >= 1e6 { "1 mm".to_string() } else { format!("{} nm", b.band_nm.1) };
        let _ = writeln!(
            o,
            "  {:<13} {:>5} nm – {:<8} {:>9}{}",
            b.name,
            b.band_nm.0,
            hi,
            share,
            coverage_text(&b.coverage)
        );
    }
}
