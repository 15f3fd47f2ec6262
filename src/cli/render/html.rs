//! The `retidose assess` report as one self-contained HTML file: one section per part of the
//! assessment, with inline SVG plots (see `svg.rs`).

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::housing::survey::RoomResult;

use super::room::{animals, rack_cells, rack_sentences, room_sentences};
use retidose::base::quantity::SiValue;
use retidose::limits::report::LimitsAssessment;
use retidose::limits::{Verdict, find_weighting};
use retidose::pigment::bleach::BleachReport;
use retidose::spectrum::Spectrum;

use super::svg::{self, Series};
use super::{
    STEP_HEADER, basis_text, data_notes, fov_and_c_alpha, num, pupil_line, step_rows, t_max, verdict_word,
};

/// The document head with its style sheet.
const HEAD: &str = "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>retidose assessment</title><style>body{font-family:sans-serif;max-width:980px;margin:2em auto;padding:0 1em;color:#222}table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #bbb;padding:3px 7px;font-size:13px}th{background:#eee}.caution{background:#fff4e5;border-left:4px solid #e65100;padding:.4em .8em}.flag{color:#b71c1c;font-weight:bold}svg{max-width:100%;background:#fafafa;margin:.6em 0}</style></head><body>";

/// One self-contained HTML file with inline SVG plots.
pub fn assessment(all: &[Assessment]) -> String {
    let mut o = String::from(HEAD);
    for a in all {
        section(&mut o, a);
    }
    o.push_str("</body></html>\n");
    o
}

/// One assessment, section by section.
fn section(o: &mut String, a: &Assessment) {
    let _ = write!(o, "<section><h1>{}</h1>", esc(&a.title));
    if let Some(d) = &a.description {
        let _ = write!(o, "<p>{}</p>", esc(d));
    }
    for c in &a.cautions {
        let _ = write!(o, "<p class=\"caution\">{}</p>", esc(c));
    }
    if let Some((name, sp)) = a.spectra.first() {
        spectrum(o, name, sp);
    }
    if let Some(line) = pupil_line(a) {
        let _ = write!(o, "<p>{}</p>", esc(&line));
    }
    if !a.steps.is_empty() {
        steps(o, a);
    }
    if let Some(b) = &a.bleach {
        pigment(o, b);
    }
    if !a.limits.is_empty() {
        limits(o, a);
    }
    if !a.guidance.is_empty() {
        guidance(o, a);
    }
    for e in &a.evidence {
        let _ = write!(
            o,
            "<p><i>Evidence, not a limit:</i> {}: {} ({})</p>",
            esc(&e.name),
            esc(&e.value),
            esc(&e.source)
        );
    }
    if let Some(r) = &a.room {
        room(o, a, r);
    }
    closing(o, a);
}

/// The first source's spectrum with the blue-light hazard, melanopic and rhodopic weightings.
fn spectrum(o: &mut String, name: &str, sp: &Spectrum) {
    let c = sp.curve();
    let peak = c.values().iter().copied().fold(0.0, f64::max).max(1e-300);
    let spec: Vec<(f64, f64)> = c
        .wavelength_nm()
        .iter()
        .zip(c.values())
        .filter(|(w, _)| **w >= 300.0 && **w <= 850.0)
        .map(|(w, v)| (*w, v / peak))
        .collect();
    let series: Vec<Series<'_>> = vec![
        ("spectrum (peak 1)", "#000", spec),
        ("B(λ) blue-light hazard", "#1565c0", hazard_weighting("B")),
        ("melanopic (S 026)", "#00897b", action_spectrum("melanopic")),
        ("rhodopic V′(λ)", "#6a1b9a", action_spectrum("rhodopic")),
    ];
    let _ = write!(
        o,
        "<h2>Spectrum of {} with hazard and pigment weightings</h2>{}",
        esc(name),
        svg::lines("spectrum and weightings", &series, "wavelength, nm", "relative", false)
    );
}

/// A hazard weighting function up to 850 nm (empty if unknown).
fn hazard_weighting(id: &str) -> Vec<(f64, f64)> {
    find_weighting(id)
        .map(|w| {
            w.curve
                .wavelength_nm()
                .iter()
                .zip(w.curve.values())
                .filter(|(x, _)| **x <= 850.0)
                .map(|(x, v)| (*x, *v))
                .collect::<Vec<_>>()
        })
        .unwrap_or_default()
}

/// A CIE S 026 action spectrum by name (empty if unknown).
fn action_spectrum(name: &str) -> Vec<(f64, f64)> {
    retidose::weighting::alpha_opic::action_spectra()
        .iter()
        .find(|f| f.name == name)
        .map(|f| f.curve.wavelength_nm().iter().zip(f.curve.values()).map(|(x, v)| (*x, *v)).collect())
        .unwrap_or_default()
}

/// The schedule steps of one cycle.
fn steps(o: &mut String, a: &Assessment) {
    o.push_str("<h2>Schedule steps (one cycle)</h2><table><tr>");
    for h in STEP_HEADER {
        let _ = write!(o, "<th>{}</th>", esc(h));
    }
    o.push_str("</tr>");
    for r in step_rows(a) {
        let _ =
            write!(o, "<tr>{}</tr>", r.iter().map(|c| format!("<td>{}</td>", esc(c))).collect::<String>());
    }
    o.push_str("</table>");
}

/// The pigment: one row per phase and the bleach time course.
fn pigment(o: &mut String, b: &BleachReport) {
    let _ = write!(
        o,
        "<h2>Pigment: {} ({} model)</h2><table><tr><th>phase</th><th>level</th><th>bleached at end</th><th>steady state</th></tr>",
        esc(&b.receptor),
        b.model.name()
    );
    for p in &b.phases {
        let _ = write!(
            o,
            "<tr><td>{}</td><td>{} {}</td><td>{:.3} %</td><td>{:.3} %</td></tr>",
            esc(&p.name),
            num(p.level),
            b.level_unit.symbol(),
            100.0 * p.end,
            100.0 * p.steady_state
        );
    }
    o.push_str("</table>");
    let course: Vec<(f64, f64)> = b.time_course.iter().map(|(t, x)| (t / 3600.0, 100.0 * x)).collect();
    let _ = write!(
        o,
        "{}",
        svg::lines(
            "bleach time course",
            &[("rod pigment bleached, %", "#c62828", course)],
            "time, h",
            "bleached, %",
            false
        )
    );
}

/// Every hazard ratio as a bar, then one table per limits check.
fn limits(o: &mut String, a: &Assessment) {
    let bars: Vec<(String, f64)> = a
        .limits
        .iter()
        .flat_map(|l| {
            let src = &l.source;
            l.hazards
                .iter()
                .filter_map(move |h| h.ratio.map(|r| (format!("{src} · {} · {}", l.set_id, h.id), r)))
        })
        .collect();
    o.push_str("<h2>Exposure limits</h2>");
    if !bars.is_empty() {
        o.push_str(&svg::bars("hazard ratios (exposure ÷ limit)", &bars));
    }
    for l in &a.limits {
        let src = &l.source;
        limits_table(o, src, l);
    }
}

/// One limits check: a row per hazard with its verdict, then the risk group.
fn limits_table(o: &mut String, src: &str, l: &LimitsAssessment) {
    let _ = write!(
        o,
        "<h3>{} against {}</h3><table><tr><th>hazard</th><th>clause</th><th>ratio</th><th>t_max</th><th>field / C_α</th><th>verdict</th></tr>",
        esc(src),
        esc(&l.set_id)
    );
    for h in &l.hazards {
        let cls = if h.verdict == Verdict::Exceeds { " class=\"flag\"" } else { "" };
        let why = match &h.verdict {
            Verdict::NotAssessed(r) | Verdict::NotApplicable(r) => format!(": {}", esc(r)),
            _ => String::new(),
        };
        let _ = write!(
            o,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td{cls}>{}{}{}</td></tr>",
            esc(&h.name),
            esc(&h.clause),
            h.ratio.map_or("—".into(), num),
            esc(&t_max(h)),
            esc(&fov_and_c_alpha(h)),
            verdict_word(h),
            why,
            if h.from_memory.is_empty() { "" } else { " [from memory]" }
        );
    }
    o.push_str("</table>");
    for n in data_notes(&l.notes) {
        let _ = write!(o, "<p class=\"flag\">{}</p>", esc(n));
    }
    if let Some(Err(why)) = &l.classification {
        let _ = write!(o, "<p>Risk group (IEC 62471): not assessed: {}</p>", esc(why));
    }
    if let Some(Ok(c)) = &l.classification {
        let _ = write!(
            o,
            "<p>Risk group (IEC 62471) at {} mm: <b>{}</b>{}</p>",
            num(c.distance.si() * 1e3),
            c.overall.map_or("—", |g| g.name()),
            if c.not_assessed.is_empty() { "" } else { " (a lower bound: some hazards were not assessed)" }
        );
        if !c.notes.is_empty() {
            let items: String = c.notes.iter().map(|n| format!("<li>{}</li>", esc(n))).collect();
            let _ = write!(o, "<ul>{items}</ul>");
        }
    }
    let stricter: Vec<String> = l
        .hazards
        .iter()
        .filter(|h| !h.stricter_choices.is_empty())
        .map(|h| {
            format!("<li>stricter choice ({}): {}</li>", esc(&h.name), esc(&h.stricter_choices.join("; ")))
        })
        .collect();
    if !stricter.is_empty() {
        let _ = write!(o, "<ul>{}</ul>", stricter.concat());
    }
}

/// The guidance comparisons, a row per rule and phase.
fn guidance(o: &mut String, a: &Assessment) {
    o.push_str("<h2>Guidance</h2><table><tr><th>set</th><th>phase</th><th>rule</th><th>flag</th><th>comparison</th></tr>");
    for g in &a.guidance {
        let (phase, f) = (basis_text(g), &g.flag);
        let _ = write!(
            o,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td{}>{}</td><td>{}</td></tr>",
            esc(&f.set),
            esc(&phase),
            esc(&f.name),
            if f.raised { " class=\"flag\"" } else { "" },
            if f.raised { "flag" } else { "ok" },
            esc(&f.message)
        );
    }
    o.push_str("</table>");
}

/// The holding room: the sentences per rack and each rack's heat map.
fn room(o: &mut String, a: &Assessment, room: &RoomResult) {
    o.push_str("<h2>Holding room</h2>");
    for s in room_sentences(room) {
        let _ = write!(o, "<p>{}</p>", esc(&s));
    }
    let cells = rack_cells(room);
    for (r, c) in room.racks.iter().zip(&cells) {
        let _ = write!(o, "<h3>Rack {} — {}</h3>", esc(&r.id), esc(&animals(r)));
        for s in rack_sentences(room, r, &a.evidence) {
            let _ = write!(o, "<p>{}</p>", esc(&s));
        }
        if let Some(c) = c {
            o.push_str(&svg::heatmap(r, c));
        }
    }
}

/// Sources of limits and guidance, and what was not assessed.
fn closing(o: &mut String, a: &Assessment) {
    o.push_str("<h2>Sources of limits and guidance</h2><ul>");
    for p in &a.provenance {
        let _ = write!(
            o,
            "<li>{}: {} ({}) — {}</li>",
            esc(&p.role),
            esc(&p.document),
            esc(&p.edition),
            esc(&p.status)
        );
    }
    o.push_str("</ul><h2>Not assessed</h2><ul>");
    for n in &a.not_assessed {
        let _ = write!(o, "<li>{}</li>", esc(n));
    }
    if a.not_assessed.is_empty() {
        o.push_str("<li>nothing</li>");
    }
    o.push_str("</ul></section>");
}

/// Escapes text for HTML.
pub fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&#39;")
}
