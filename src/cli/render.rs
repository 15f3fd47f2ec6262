//! Renderers: a terminal table and JSON, both read from the library's report structure.

use std::fmt::Write;

use retidose::base::data::TABLE_FILES;
use retidose::base::quantity::SiValue;
use retidose::base::quantity::as_td_f64;
use retidose::limits::report::{LIMITS_CAUTION, LimitsAssessment};
use retidose::limits::{Form, LimitQuantity, LimitSet, TMax, Verdict, builtin_sets, builtin_weightings};
use retidose::pigment::bleach::{BleachReport, FlashResponse};
use retidose::pigment::kinetics::Pigment;
use retidose::retina::catch::ReceptorCatch;
use retidose::retina::report::RetinaReport;
use retidose::spectrum::photometry::{Photometric, PhotometricResult};
use retidose::spectrum::reader::read_table;
use retidose::spectrum::report::SpectrumReport;
use retidose::spectrum::source::BUILTIN_LAMPS;
use retidose::spectrum::{Basis, Coverage};
use retidose::weighting::alpha_opic::action_spectra;
use serde_json::{Value, json};
use uom::si::illuminance::lux;
use uom::si::length::millimeter;

/// The caution printed under every report.
pub const CAUTION: &str = "retidose informs; it does not replace the standards, a qualified optical-radiation \
assessment, veterinary advice or local regulations. Check results with your optical safety officer, \
veterinarian or review board before relying on them.";

/// Formats a number with 4 significant digits, in scientific notation when very large or small.
pub fn num(v: f64) -> String {
    if v == 0.0 {
        return "0".to_string();
    }
    let a = v.abs();
    if (1e-3..1e6).contains(&a) {
        let digits = (3 - a.log10().floor() as i32).max(0) as usize;
        format!("{v:.digits$}")
    } else {
        format!("{v:.3e}")
    }
}

fn basis_name(b: Basis) -> &'static str {
    match b {
        Basis::Energy => "energy",
        Basis::Photon => "photon",
    }
}

fn coverage_text(c: &Coverage) -> String {
    match c.covered_nm {
        _ if c.is_complete() => String::new(),
        None => format!("  [not covered: needs {}–{} nm]", c.needed_nm.0, c.needed_nm.1),
        Some((a, b)) => format!(
            "  [partial: covers {a}–{b} of {}–{} nm, {:.3} % of weight missing]",
            c.needed_nm.0,
            c.needed_nm.1,
            100.0 * c.uncovered_weight_share
        ),
    }
}

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

/// The terminal table for one spectrum.
pub fn spectrum_table(r: &SpectrumReport) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "retidose spectrum: {}", r.label);
    if let Some(p) = &r.provenance {
        let _ = writeln!(o, "  from          {p}");
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
    let _ = writeln!(o, "  photopic  (V, 683.002 lm/W) {}", photometric_text(&r.photopic, false));
    let _ = writeln!(o, "  scotopic (V′, 1700.06 lm/W) {}", photometric_text(&r.scotopic, true));
    let _ = writeln!(o, "  S/P ratio                   {}", r.sp_ratio.map_or("—".into(), num));
    let _ = writeln!(
        o,
        "  luminous efficacy           {}",
        r.luminous_efficacy.map_or("—".into(), |k| format!("{} lm/W", num(k.si())))
    );
    let _ = writeln!(o, "  peak wavelength             {} nm", num(r.peak_nm));
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
    let _ = writeln!(o, "\nNotes");
    for n in &r.notes {
        let _ = writeln!(o, "  - {n}");
    }
    let _ = writeln!(o, "\n{CAUTION}");
    o
}

fn coverage_json(c: &Coverage) -> Value {
    json!({
        "needed_nm": [c.needed_nm.0, c.needed_nm.1],
        "covered_nm": c.covered_nm.map(|(a, b)| vec![a, b]),
        "uncovered_weight_share": c.uncovered_weight_share,
        "complete": c.is_complete(),
    })
}

fn value_json(v: Option<(f64, &str)>) -> Value {
    v.map_or(Value::Null, |(x, u)| json!({ "value": x, "unit": u }))
}

fn photometric_json(p: &PhotometricResult) -> Value {
    json!({
        "value": p.value.map(|v| v.si_value()),
        "unit": p.value.map(|v| v.si_with_unit().1),
        "coverage": coverage_json(&p.coverage),
    })
}

/// The JSON document for one spectrum (schema `retidose.spectrum/1`, see the README).
pub fn spectrum_json(r: &SpectrumReport) -> String {
    let doc = json!({
        "schema": "retidose.spectrum/1",
        "source": {
            "label": r.label,
            "provenance": r.provenance,
            "measure": r.measure.name(),
            "basis": basis_name(r.basis),
            "range_nm": [r.range_nm.0, r.range_nm.1],
            "samples": r.samples,
            "scaled_to": r.scaled_to.map(|t| t.describe()),
        },
        "radiant_total": value_json(r.radiometric.as_ref().map(|q| q.si_with_unit())),
        "photon_total": value_json(r.photon.as_ref().map(|q| q.si_with_unit())),
        "photopic": photometric_json(&r.photopic),
        "scotopic": photometric_json(&r.scotopic),
        "sp_ratio": r.sp_ratio,
        "luminous_efficacy_lm_per_w": r.luminous_efficacy.map(|k| k.si()),
        "peak_nm": r.peak_nm,
        "alpha_opic": r.alpha_opic.iter().map(|a| json!({
            "name": a.name,
            "quantity": value_json(a.quantity.as_ref().map(|q| q.si_with_unit())),
            "elr_mw_per_lm": a.elr.map(|e| e.si() * 1e3),
            "der": a.der,
            "edi": value_json(a.edi.as_ref().map(|e| e.si_with_unit())),
            "reconstructed": a.reconstructed,
            "coverage": coverage_json(&a.coverage),
        })).collect::<Vec<_>>(),
        "bands": r.bands.iter().map(|b| json!({
            "name": b.name,
            "band_nm": [b.band_nm.0, b.band_nm.1],
            "share": b.share,
            "coverage": coverage_json(&b.coverage),
        })).collect::<Vec<_>>(),
        "notes": r.notes,
        "caution": CAUTION,
    });
    pretty(&doc)
}

/// The list of built-in sources, generators and reference tables.
pub fn sources() -> String {
    let mut o = String::new();
    let _ = writeln!(o, "Generators");
    let _ = writeln!(
        o,
        "  blackbody:TEMPERATURE   Planck's law (spectral radiance), default 200–3000 nm at 1 nm"
    );
    let _ = writeln!(
        o,
        "  cie:A                   CIE illuminant A from its formula (CIE 15:2004), 300–830 nm at 1 nm"
    );
    let _ = writeln!(o, "  cie:D65                 CIE illuminant D65, CIE table 300–830 nm at 5 nm");
    let _ = writeln!(o, "  led:PEAK:WIDTH          one LED band, Ohno (2005) model, 300–830 nm at 1 nm");
    let _ = writeln!(o, "\nBuilt-in lamps (sources/, invented demo data)");
    for l in BUILTIN_LAMPS {
        let _ = writeln!(o, "  {:<22}  sources/{}", l.name, l.file);
    }
    let _ = writeln!(o, "\nReference tables (src/data/)");
    for (name, text) in TABLE_FILES {
        if let Ok(t) = read_table(text, name) {
            let _ = writeln!(o, "  {name}");
            let _ = writeln!(o, "      {}", t.meta("source").unwrap_or("(no source)"));
            let _ = writeln!(o, "      status: {}", t.meta("status").unwrap_or("(none)"));
        }
    }
    let _ = writeln!(o, "\nCIE S 026 α-opic action spectra (src/data/cie_s026_alpha_opic.toml)");
    for f in action_spectra() {
        let _ = writeln!(o, "  {:<12} {}", f.name, f.construction);
        let _ = writeln!(
            o,
            "      D65 ELR {:.4} mW/lm here, published {:.4} mW/lm ({})",
            f.d65_elr.si() * 1e3,
            f.published_d65_elr.si() * 1e3,
            f.published_status
        );
    }
    o
}

fn photometric_short(p: &PhotometricResult) -> String {
    match p.value {
        Some(v) => {
            let (x, u) = v.si_with_unit();
            format!("{} {u}{}", num(x), coverage_text(&p.coverage))
        }
        None => "—".to_string(),
    }
}

fn pair(v: (f64, &str)) -> String {
    format!("{} {}", num(v.0), v.1)
}

/// The terminal table for a retinal assessment.
pub fn retina_table(r: &RetinaReport) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "retidose retina: {} eye", r.species.name());
    let _ = writeln!(
        o,
        "  pupil             {} mm, {} [{}]",
        num(r.pupil.diameter.get::<millimeter>()),
        r.pupil.basis,
        r.pupil.status
    );
    let _ = writeln!(o, "  collecting area   {} mm²", num(r.collecting_area_mm2));
    let _ = writeln!(o, "  nodal distance    {} mm", num(r.nodal_distance.get::<millimeter>()));
    if !r.filters.is_empty() {
        let _ = writeln!(o, "  filters           {}", r.filters.join(", "));
    }
    for (i, s) in r.sources.iter().enumerate() {
        let _ = writeln!(o, "\nSource {}: {}", i + 1, s.label);
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
            let _ =
                writeln!(o, "  subtense          {} mrad ({}°)", num(a.si() * 1e3), num(a.si().to_degrees()));
        }
        for n in &s.notes {
            let _ = writeln!(o, "  note              {n}");
        }
        match &s.retinal {
            None => {
                let _ =
                    writeln!(o, "  retina            not assessed: the radiance the eye sees is not known");
            }
            Some(ret) => {
                let (e, eu) = ret.irradiance.si_with_unit();
                let (q, _) = ret.photon_irradiance.si_with_unit();
                let _ =
                    writeln!(o, "  retina            {} {eu}, {} photons·µm⁻²·s⁻¹", num(e), num(q * 1e-12));
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
                    let memo = if c.from_memory.is_empty() {
                        String::new()
                    } else {
                        format!("  [from memory: {}]", c.from_memory.join(", "))
                    };
                    let _ = writeln!(
                        o,
                        "    {:<8} λmax {:>5} nm  {:>11}{}{memo}",
                        c.receptor,
                        num(c.lambda_max_nm),
                        num(c.rate.si()),
                        coverage_text(&c.coverage)
                    );
                    for t in &c.troland_routes {
                        let _ = writeln!(
                            o,
                            "             troland route {} R*/rod/s per scot td ({}): {}",
                            num(t.factor),
                            t.name,
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
            }
        }
    }
    let _ = writeln!(o, "\nAll sources at the cornea: {}", photometric_short(&r.total_illuminance));
    if !r.human_alpha_opic.is_empty() {
        let _ = writeln!(o, "\nα-opic quantities at the cornea (CIE S 026:2018)");
        for a in &r.human_alpha_opic {
            let q = a.quantity.map_or("—".into(), |q| pair(q.si_with_unit()));
            let edi = a.edi.map_or("—".into(), |e| pair(e.si_with_unit()));
            let mark = if a.reconstructed { " *reconstructed" } else { "" };
            let _ = writeln!(
                o,
                "  {:<13} {:>24}   EDI {:>12}{mark}{}",
                a.name,
                q,
                edi,
                coverage_text(&a.coverage)
            );
        }
    }
    if !r.species_opic.is_empty() {
        let _ = writeln!(
            o,
            "\n{} α-opic quantities at the cornea (retidose method by analogy with CIE S 026; not a CIE quantity)",
            r.species.name()
        );
        let _ = writeln!(
            o,
            "  {:<11} {:>6}  {:>26}  {:>14}",
            "channel", "λmax", "photon irradiance", "equiv. D65"
        );
        for s in &r.species_opic {
            let _ = writeln!(
                o,
                "  {:<11} {:>6}  {:>26}  {:>14}{}",
                s.channel,
                format!("{} nm", num(s.lambda_max_nm)),
                format!("{} photons·m⁻²·s⁻¹", num(s.photon_irradiance.si())),
                format!("{} lx", num(s.equivalent_daylight.get::<lux>())),
                coverage_text(&s.coverage)
            );
        }
    }
    let _ = writeln!(o, "\nNotes");
    for n in &r.notes {
        let _ = writeln!(o, "  - {n}");
    }
    let _ = writeln!(o, "\n{CAUTION}");
    o
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

fn si_json(v: (f64, &str)) -> Value {
    json!({ "value": v.0, "unit": v.1 })
}

/// The JSON document for a retinal assessment (schema `retidose.retina/1`).
pub fn retina_json(r: &RetinaReport) -> String {
    let sources: Vec<Value> = r
        .sources
        .iter()
        .map(|s| {
            json!({
                "label": s.label,
                "corneal_irradiance": si_json(s.irradiance.si_with_unit()),
                "corneal_photon_irradiance": si_json(s.photon_irradiance.si_with_unit()),
                "corneal_illuminance": photometric_json(&s.illuminance),
                "seen_radiance": s.radiance.map(|l| si_json(l.si_with_unit())),
                "seen_luminance": s.luminance.as_ref().map(photometric_json),
                "radiance_derived": s.radiance_derived,
                "subtense_rad": s.subtense.map(|a| a.si()),
                "notes": s.notes,
                "retina": s.retinal.as_ref().map(|ret| json!({
                    "irradiance": si_json(ret.irradiance.si_with_unit()),
                    "photon_irradiance_per_um2_s": ret.photon_irradiance.si_with_unit().0 * 1e-12,
                    "photopic_td": as_td_f64(ret.trolands.photopic),
                    "scotopic_td": as_td_f64(ret.trolands.scotopic),
                    "photopic_effective_td_barten": as_td_f64(ret.trolands.photopic_effective_barten),
                    "photopic_effective_td_integral": as_td_f64(ret.trolands.photopic_effective_integral),
                    "image_size_um": ret.image_size.map(|l| l.si() * 1e6),
                    "catch": ret.catch.iter().map(|c| json!({
                        "receptor": c.receptor,
                        "lambda_max_nm": c.lambda_max_nm,
                        "r_star_per_receptor_per_s": c.rate.si(),
                        "coverage": coverage_json(&c.coverage),
                        "from_memory": c.from_memory,
                        "troland_routes": c.troland_routes.iter().map(|t| json!({
                            "name": t.name,
                            "factor_r_star_per_scot_td": t.factor,
                            "r_star_per_receptor_per_s": t.rate.si(),
                            "source": t.source,
                        })).collect::<Vec<_>>(),
                    })).collect::<Vec<_>>(),
                })),
            })
        })
        .collect();
    let doc = json!({
        "schema": "retidose.retina/1",
        "species": r.species.name(),
        "pupil": {
            "diameter_mm": r.pupil.diameter.get::<millimeter>(),
            "area_mm2": r.pupil.area_mm2(),
            "basis": r.pupil.basis,
            "status": r.pupil.status.name(),
        },
        "collecting_area_mm2": r.collecting_area_mm2,
        "nodal_distance_mm": r.nodal_distance.get::<millimeter>(),
        "filters": r.filters,
        "sources": sources,
        "total_corneal_illuminance": photometric_json(&r.total_illuminance),
        "human_alpha_opic": r.human_alpha_opic.iter().map(|a| json!({
            "name": a.name,
            "quantity": value_json(a.quantity.as_ref().map(|q| q.si_with_unit())),
            "edi": value_json(a.edi.as_ref().map(|e| e.si_with_unit())),
            "der": a.der,
            "reconstructed": a.reconstructed,
            "coverage": coverage_json(&a.coverage),
        })).collect::<Vec<_>>(),
        "species_alpha_opic": r.species_opic.iter().map(|s| json!({
            "channel": s.channel,
            "lambda_max_nm": s.lambda_max_nm,
            "photon_irradiance_per_m2_s": s.photon_irradiance.si(),
            "equivalent_daylight_lx": s.equivalent_daylight.get::<lux>(),
            "method": "retidose: lens-filtered Govardovskii template, peak 1, photon basis, relative to CIE D65; not a CIE quantity",
            "coverage": coverage_json(&s.coverage),
        })).collect::<Vec<_>>(),
        "notes": r.notes,
        "caution": CAUTION,
    });
    pretty(&doc)
}

/// The retinal spectral irradiance of every source with a known radiance, as CSV.
pub fn retinal_spectrum_csv(r: &RetinaReport) -> String {
    let mut o = String::from(
        "# retinal spectral irradiance written by retidose retina\n\
         source,wavelength_nm,retinal_irradiance_w_per_m2_nm,retinal_photons_per_um2_s_nm\n",
    );
    for s in &r.sources {
        let Some(ret) = &s.retinal else { continue };
        let e = &ret.spectral_irradiance;
        let q = e.to_photon();
        for ((w, v), p) in e.curve().wavelength_nm().iter().zip(e.curve().values()).zip(q.curve().values()) {
            let _ = writeln!(o, "\"{}\",{w},{v:e},{:e}", s.label.replace('"', "'"), p * 1e-12);
        }
    }
    o
}

/// Pretty JSON with a final newline.
fn pretty(doc: &Value) -> String {
    let mut s = serde_json::to_string_pretty(doc).unwrap_or_else(|e| format!("{{\"error\": \"{e}\"}}"));
    s.push('\n');
    s
}

fn t_max_text(t: &Option<TMax>) -> String {
    match t {
        None => "—".to_string(),
        Some(TMax::Seconds(s)) => duration_text(*s),
        Some(TMax::NotReached(up)) if up.is_infinite() => "not reached (no time limit)".to_string(),
        Some(TMax::NotReached(up)) => format!("not reached up to {}", duration_text(*up)),
        Some(TMax::BelowRange(s)) => format!("< {}", duration_text(*s)),
    }
}

fn duration_text(s: f64) -> String {
    if s >= 3600.0 {
        format!("{} h", num(s / 3600.0))
    } else if s >= 60.0 {
        format!("{} min", num(s / 60.0))
    } else {
        format!("{} s", num(s))
    }
}

/// The list of limit sets.
pub fn limit_sets() -> String {
    let mut o = String::new();
    let _ = writeln!(o, "{LIMITS_CAUTION}\n");
    for s in builtin_sets() {
        let counts: Vec<String> = s.status_counts().iter().map(|(k, n)| format!("{n} {k}")).collect();
        let _ = writeln!(o, "{}", s.id);
        let _ = writeln!(o, "  {}", s.document);
        let _ = writeln!(o, "  edition: {}; errata: {}", s.edition, s.errata);
        let _ =
            writeln!(o, "  {} hazards; limit pieces: {}  ({})", s.hazards.len(), counts.join(", "), s.origin);
    }
    let _ = writeln!(o, "\nWeighting functions");
    for w in builtin_weightings() {
        let (a, b) = w.curve.range_nm();
        let _ = writeln!(o, "  {:<7} {} ({a}–{b} nm): {} [{}]", w.id, w.name, w.source, w.status);
    }
    o
}

/// One limit set in full.
pub fn limit_set(s: &LimitSet) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "{LIMITS_CAUTION}\n");
    let _ = writeln!(o, "{} — {}", s.id, s.document);
    let _ = writeln!(o, "  edition: {}\n  clauses: {}\n  errata: {}", s.edition, s.clauses, s.errata);
    for n in &s.notes {
        let _ = writeln!(o, "  note: {n}");
    }
    for h in &s.hazards {
        let w = h.weighting.as_deref().unwrap_or("unweighted");
        let kind = match h.quantity {
            LimitQuantity::Irradiance => "irradiance",
            LimitQuantity::Radiance => "radiance",
        };
        let _ = writeln!(
            o,
            "\n{} ({}) — {}, {}–{} nm, {w}, {kind}",
            h.name, h.id, h.clause, h.band_nm.0, h.band_nm.1
        );
        for c in &h.conditions {
            let _ = writeln!(o, "  applies: {c:?}");
        }
        if let Some(c) = h.c_alpha {
            let _ = writeln!(
                o,
                "  C_α = α limited to {}–{} mrad{}",
                num(c.min_rad * 1e3),
                num(c.max_rad * 1e3),
                if c.in_mrad {
                    " (coefficients with C_α in mrad)"
                } else {
                    " (coefficients with C_α in rad)"
                }
            );
        }
        for f in &h.field_of_view {
            let _ = writeln!(
                o,
                "  field of view {}–{} s: {} rad × t^{}",
                num(f.from_s),
                num(f.to_s),
                num(f.coefficient_rad),
                f.time_exponent
            );
        }
        for l in &h.limits {
            let form = match l.form {
                Form::Dose => "dose",
                Form::Rate => "rate",
            };
            let _ = writeln!(
                o,
                "  {}–{} s: {form} ≤ {} × t^{} × C_α^{}  [{}]  {}",
                num(l.from_s),
                num(l.to_s),
                num(l.coefficient),
                l.time_exponent,
                l.alpha_exponent,
                l.status,
                l.source
            );
        }
        if let Some(b) = h.risk_group_time_bases_s {
            let _ = writeln!(
                o,
                "  risk-group time bases (Exempt, RG1, RG2): {} s, {} s, {} s",
                num(b[0]),
                num(b[1]),
                num(b[2])
            );
        }
    }
    o
}

/// The terminal table of a limits check.
pub fn limits_table(r: &LimitsAssessment) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "{LIMITS_CAUTION}\n");
    let _ = writeln!(o, "retidose limits check: {} against {}", r.source, r.set_id);
    let _ = writeln!(o, "  document   {}", r.document);
    let _ = writeln!(o, "  edition    {}; errata: {}", r.edition, r.errata);
    let _ = writeln!(o, "  duration   {}", duration_text(r.duration.si()));
    let _ = writeln!(o, "  spectrum   {}–{} nm", r.range_nm.0, r.range_nm.1);
    for h in &r.hazards {
        let memo = if h.from_memory.is_empty() { String::new() } else { " [from memory]".to_string() };
        let _ = writeln!(o, "\n{} — {} ({}–{} nm)", h.name, h.clause, h.band_nm.0, h.band_nm.1);
        if let Some(q) = h.weighted {
            let _ = writeln!(o, "  weighted        {} {}", num(q), h.quantity_unit);
        }
        if let (Some(a), Some(g)) = (h.averaged, h.field_of_view_rad) {
            let _ =
                writeln!(o, "  averaged        {} {} over {} mrad", num(a), h.quantity_unit, num(g * 1e3));
        }
        if let Some(c) = h.c_alpha {
            let _ = writeln!(o, "  C_α             {}", num(c));
        }
        if let (Some((x, u)), Some((l, _))) = (h.exposure, h.limit) {
            let _ = writeln!(o, "  exposure/limit  {} / {} {u}", num(x), num(l));
        }
        if let Some(r) = h.ratio {
            let _ = writeln!(o, "  hazard ratio    {}", num(r));
        }
        if let Some(r) = h.lower_bound_ratio {
            let _ = writeln!(o, "  ratio of the covered part (a lower bound) {}", num(r));
        }
        if h.t_max.is_some() {
            let _ = writeln!(o, "  t_max           {}", t_max_text(&h.t_max));
        }
        let _ = writeln!(o, "  verdict         {}{memo}", h.verdict.text());
        if !h.from_memory.is_empty() {
            let _ = writeln!(o, "  from memory     {}", h.from_memory.join("; "));
        }
        if !h.source.is_empty() {
            let _ = writeln!(o, "  limit from      {}", h.source);
        }
    }
    match &r.classification {
        None => {}
        Some(Err(e)) => {
            let _ = writeln!(o, "\nRisk group (IEC 62471): not assessed: {e}");
        }
        Some(Ok(c)) => {
            let _ = writeln!(
                o,
                "\nRisk group (IEC 62471 cl. 6) at {} mm ({}), {} lx",
                num(c.distance.si() * 1e3),
                c.distance_basis,
                num(c.illuminance_lx)
            );
            for g in &c.hazards {
                let group =
                    g.group.map_or_else(|| g.reason.clone().unwrap_or_default(), |x| x.name().to_string());
                let ratios: Vec<String> = g.ratios.iter().map(|x| x.map_or("—".into(), num)).collect();
                let _ = writeln!(
                    o,
                    "  {:<44} {:<8} (ratios at {}/{}/{} s: {})",
                    g.name,
                    group,
                    num(g.time_bases_s[0]),
                    num(g.time_bases_s[1]),
                    num(g.time_bases_s[2]),
                    ratios.join(", ")
                );
            }
            let overall = c.overall.map_or("—", |x| x.name());
            let lb = if c.not_assessed.is_empty() { "" } else { " (lower bound: some hazards not assessed)" };
            let _ = writeln!(o, "  overall: {overall}{lb}");
            if let Some(k) = c.blue_efficacy_w_per_lm {
                let _ = writeln!(
                    o,
                    "  blue-light efficacy K_B,v {} mW/lm; E_thr = 1 W/m² / K_B,v = {} lx",
                    num(k * 1e3),
                    num(1.0 / k)
                );
            }
            if let Some(d) = c.threshold_distance {
                let _ = writeln!(o, "  blue-light group is at most RG1 beyond {} m", num(d.si()));
            }
            for n in &c.notes {
                let _ = writeln!(o, "  note: {n}");
            }
        }
    }
    let _ = writeln!(o, "\nNotes");
    for n in &r.notes {
        let _ = writeln!(o, "  - {n}");
    }
    let _ = writeln!(o, "\n{CAUTION}");
    o
}

fn t_max_json(t: &Option<TMax>) -> Value {
    match t {
        None => Value::Null,
        Some(TMax::Seconds(s)) => json!({ "kind": "seconds", "seconds": s }),
        Some(TMax::NotReached(up)) => {
            json!({ "kind": "not-reached", "up_to_s": if up.is_finite() { json!(up) } else { Value::Null } })
        }
        Some(TMax::BelowRange(s)) => json!({ "kind": "below-range", "seconds": s }),
    }
}

fn verdict_json(v: &Verdict) -> Value {
    match v {
        Verdict::Within => json!({ "kind": "within-limit" }),
        Verdict::Exceeds => json!({ "kind": "exceeds-limit" }),
        Verdict::NotAssessed(r) => json!({ "kind": "not-assessed", "reason": r }),
        Verdict::NotApplicable(r) => json!({ "kind": "not-applicable", "reason": r }),
    }
}

/// The JSON document of a limits check (schema `retidose.limits/1`).
pub fn limits_json(r: &LimitsAssessment) -> String {
    let classification = match &r.classification {
        None => Value::Null,
        Some(Err(e)) => json!({ "assessed": false, "reason": e }),
        Some(Ok(c)) => json!({
            "assessed": true,
            "distance_m": c.distance.si(),
            "distance_basis": c.distance_basis,
            "illuminance_lx": c.illuminance_lx,
            "hazards": c.hazards.iter().map(|g| json!({
                "id": g.id,
                "name": g.name,
                "group": g.group.map(|x| x.name()),
                "reason": g.reason,
                "not_applicable": g.not_applicable,
                "ratios": g.ratios,
                "time_bases_s": g.time_bases_s,
            })).collect::<Vec<_>>(),
            "overall": c.overall.map(|x| x.name()),
            "not_assessed": c.not_assessed,
            "blue_light_efficacy_w_per_lm": c.blue_efficacy_w_per_lm,
            "e_thr_lx": c.e_thr_lx,
            "threshold_distance_m": c.threshold_distance.map(|d| d.si()),
            "notes": c.notes,
        }),
    };
    let doc = json!({
        "schema": "retidose.limits/1",
        "caution": LIMITS_CAUTION,
        "set": { "id": r.set_id, "document": r.document, "edition": r.edition, "errata": r.errata },
        "source": r.source,
        "duration_s": r.duration.si(),
        "range_nm": [r.range_nm.0, r.range_nm.1],
        "hazards": r.hazards.iter().map(|h| json!({
            "id": h.id,
            "name": h.name,
            "clause": h.clause,
            "band_nm": [h.band_nm.0, h.band_nm.1],
            "weighted": h.weighted.map(|q| json!({ "value": q, "unit": h.quantity_unit })),
            "averaged": h.averaged.map(|q| json!({ "value": q, "unit": h.quantity_unit })),
            "field_of_view_rad": h.field_of_view_rad,
            "c_alpha": h.c_alpha,
            "exposure": h.exposure.map(|(x, u)| json!({ "value": x, "unit": u })),
            "limit": h.limit.map(|(x, u)| json!({ "value": x, "unit": u })),
            "ratio": h.ratio,
            "lower_bound_ratio": h.lower_bound_ratio,
            "t_max": t_max_json(&h.t_max),
            "verdict": verdict_json(&h.verdict),
            "coverage": h.coverage.as_ref().map(coverage_json),
            "from_memory": h.from_memory,
            "limit_source": h.source,
        })).collect::<Vec<_>>(),
        "risk_group": classification,
        "notes": r.notes,
    });
    pretty(&doc)
}

/// The terminal table of a bleaching run.
pub fn bleach_table(r: &BleachReport) -> String {
    let mut o = String::new();
    let unit = r.level_unit.symbol();
    let _ = writeln!(o, "retidose bleach: {} ({} model)", r.receptor, r.model.name());
    let _ = writeln!(
        o,
        "  parameters  τ0 {} s, v {} /min, K_m {}{}",
        num(r.constants.tau0_s),
        num(r.constants.v_per_s * 60.0),
        num(r.constants.k_m),
        if r.from_memory.is_empty() {
            String::new()
        } else {
            format!("  [from memory: {}]", r.from_memory.join(", "))
        }
    );
    let _ = writeln!(o, "  schedule    {} steps, {}", r.steps, duration_text(r.total_s));
    let _ = writeln!(o, "\nPhases (last step of each)");
    let _ = writeln!(
        o,
        "  {:<14} {:>6} {:>16} {:>11} {:>11} {:>13}",
        "phase", "steps", "level", "end", "max end", "steady state"
    );
    for p in &r.phases {
        let _ = writeln!(
            o,
            "  {:<14} {:>6} {:>16} {:>10.4}% {:>10.4}% {:>12.4}%",
            p.name,
            p.steps,
            format!("{} {unit}", num(p.level)),
            100.0 * p.end,
            100.0 * p.max_end,
            100.0 * p.steady_state
        );
    }
    let s = &r.summary;
    let _ = writeln!(
        o,
        "\nBleached at the end {:.4} %, peak {:.4} % at {}, time-weighted mean {:.4} %",
        100.0 * s.end,
        100.0 * s.peak,
        duration_text(s.peak_s),
        100.0 * s.mean
    );
    let t = |x: Option<f64>| {
        x.map_or_else(|| "not reached before the light rose again".to_string(), duration_text)
    };
    if r.recoveries.is_empty() {
        let _ = writeln!(o, "Recovery: no lights-off in the schedule (no step is followed by a dimmer one)");
    }
    for (i, rec) in r.recoveries.iter().enumerate() {
        let which = match (i, r.lights_off) {
            (_, 1) => "the lights-off",
            (0, _) => "the first lights-off",
            _ => "the last lights-off",
        };
        let _ = writeln!(
            o,
            "Recovery after {which} (end of '{}', t = {}, {:.4} % bleached), under the conditions that follow: 90 % regenerated after {}, 95 % after {}, 99 % after {}{}",
            rec.after_step,
            duration_text(rec.from_s),
            100.0 * rec.bleached_at_start,
            t(rec.to_90_s),
            t(rec.to_95_s),
            t(rec.to_99_s),
            if rec.past_end { " (past the end of the schedule)" } else { "" }
        );
    }
    if let Some(sat) = &r.saturation {
        let _ = writeln!(o, "Saturation: {sat}");
    }
    for th in &r.thresholds {
        let _ = writeln!(o, "\nRod threshold estimate — {}", th.basis);
        let pts: Vec<String> = th
            .curve
            .iter()
            .filter(|p| (p.0 as usize).is_multiple_of(10) && p.0 <= 60.0)
            .map(|p| format!("{} min: {:.2}", p.0, p.1))
            .collect();
        let _ = writeln!(o, "  log elevation  {}", pts.join(", "));
        match th.to_within_0_1_log_min {
            Some(m) => {
                let _ = writeln!(
                    o,
                    "  within 0.1 log units of absolute threshold after about {m} min (estimate)"
                );
            }
            None => {
                let _ = writeln!(o, "  not within 0.1 log units after 120 min (estimate)");
            }
        }
    }
    let _ = writeln!(o, "\nNotes");
    for n in &r.notes {
        let _ = writeln!(o, "  - {n}");
    }
    let _ = writeln!(o, "\n{CAUTION}");
    o
}

/// The JSON document of a bleaching run (schema `retidose.bleach/1`).
pub fn bleach_json(r: &BleachReport) -> String {
    let doc = json!({
        "schema": "retidose.bleach/1",
        "receptor": r.receptor,
        "model": r.model.name(),
        "level_unit": r.level_unit.symbol(),
        "parameters": { "tau0_s": r.constants.tau0_s, "v_per_min": r.constants.v_per_s * 60.0, "k_m": r.constants.k_m },
        "from_memory": r.from_memory,
        "total_s": r.total_s,
        "steps": r.steps,
        "phases": r.phases.iter().map(|p| json!({
            "name": p.name, "steps": p.steps, "level": p.level, "end_bleached": p.end,
            "max_end_bleached": p.max_end, "steady_state_bleached": p.steady_state,
        })).collect::<Vec<_>>(),
        "end_bleached": r.summary.end,
        "peak_bleached": r.summary.peak,
        "peak_time_s": r.summary.peak_s,
        "mean_bleached": r.summary.mean,
        "lights_off": r.lights_off,
        "recoveries_s": r.recoveries.iter().map(recovery_json).collect::<Vec<_>>(),
        "recovery_s": r.recoveries.last().map(recovery_json),
        "saturation": r.saturation,
        "thresholds": r.thresholds.iter().map(|t| json!({
            "basis": t.basis,
            "within_0_1_log_min": t.to_within_0_1_log_min,
            "curve_min_log": t.curve,
        })).collect::<Vec<_>>(),
        "notes": r.notes,
        "caution": CAUTION,
    });
    pretty(&doc)
}

/// One recovery as JSON (seconds; null when not reached).
pub fn recovery_json(r: &retidose::pigment::bleach::Recovery) -> Value {
    json!({
        "after_step": r.after_step,
        "from_s": r.from_s,
        "bleached_at_start": r.bleached_at_start,
        "to_90_percent": r.to_90_s,
        "to_95_percent": r.to_95_s,
        "to_99_percent": r.to_99_s,
        "past_end": r.past_end,
    })
}

/// The sampled time course as CSV.
pub fn time_course_csv(r: &BleachReport) -> String {
    let mut o = format!(
        "# retidose bleach time course: {} ({} model)\ntime_s,bleached_fraction\n",
        r.receptor,
        r.model.name()
    );
    for (t, b) in &r.time_course {
        let _ = writeln!(o, "{t},{b}");
    }
    o
}

/// The sampled time course as JSON.
pub fn time_course_json(r: &BleachReport) -> String {
    pretty(
        &json!({ "schema": "retidose.time-course/1", "receptor": r.receptor, "model": r.model.name(), "time_s_bleached": r.time_course }),
    )
}

/// A rod flash response as a table.
pub fn flash_table(p: &Pigment, r: &FlashResponse) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "retidose bleach: rod response estimate for {} to a flash of {} R*/rod",
        p.id,
        num(r.phi)
    );
    let _ = writeln!(o, "  basis        {}", r.basis);
    let _ = writeln!(
        o,
        "  50 % of the circulating current suppressed at {} ms, 95 % at {} ms",
        num(r.t_half_s * 1e3),
        num(r.t_95_s * 1e3)
    );
    let _ = writeln!(o, "  saturating   {}", if r.saturating { "yes (95 % within 100 ms)" } else { "no" });
    let pts: Vec<String> =
        r.curve.iter().step_by(10).map(|(t, x)| format!("{} ms: {:.3}", num(t * 1e3), x)).collect();
    let _ = writeln!(o, "  suppressed   {}", pts.join(", "));
    let _ =
        writeln!(o, "\nThis is an estimate of the response's rising phase, not a measurement.\n{CAUTION}");
    o
}

/// A rod flash response as JSON.
pub fn flash_json(p: &Pigment, r: &FlashResponse) -> String {
    pretty(&json!({
        "schema": "retidose.rod-response/1",
        "receptor": p.id,
        "flash_r_star_per_rod": r.phi,
        "amplification_per_s2": r.amplification,
        "effective_delay_s": r.delay_s,
        "t_half_s": r.t_half_s,
        "t_95_s": r.t_95_s,
        "saturating": r.saturating,
        "curve_s_fraction": r.curve,
        "basis": r.basis,
        "caution": CAUTION,
    }))
}
