//! The `retidose assess` report as one self-contained HTML file: one section per part of the
//! assessment, with inline SVG plots (see `svg.rs`).

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::housing::survey::RoomResult;
use retidose::scenario::file::Scenario;

use super::room::{animals, rack_cells, rack_sentences, room_sentences};
use retidose::base::quantity::SiValue;
use retidose::limits::Verdict;
use retidose::limits::report::LimitsAssessment;
use retidose::pigment::bleach::BleachReport;

use super::svg;
use super::{
    STEP_HEADER, basis_text, data_notes, fov_and_c_alpha, num, pupil_line, step_rows, t_max, verdict_word,
};

/// The document head with its style sheet.
pub(crate) const HEAD: &str = "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>retidose assessment</title><style>body{font-family:sans-serif;max-width:980px;margin:2em auto;padding:0 1em;color:#222}table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #bbb;padding:3px 7px;font-size:13px}th{background:#eee}.caution{background:#fff4e5;border-left:4px solid #e65100;padding:.4em .8em}.flag{color:#b71c1c;font-weight:bold}svg{max-width:100%;background:#fafafa;margin:.6em 0}</style></head><body>";

/// One self-contained HTML file with inline SVG plots; `scenarios` are the resolved scenarios of
/// `all`, in order (figures that re-run the library on a source need them).
pub fn assessment(all: &[Assessment], scenarios: &[Scenario]) -> String {
    let mut o = String::from(HEAD);
    for (a, s) in all.iter().zip(scenarios) {
        section(&mut o, a, s);
    }
    o.push_str("</body></html>\n");
    o
}

/// One assessment, section by section.
fn section(o: &mut String, a: &Assessment, s: &Scenario) {
    let _ = write!(o, "<section><h1>{}</h1>", esc(&a.title));
    if let Some(d) = &a.description {
        let _ = write!(o, "<p>{}</p>", esc(d));
    }
    o.push_str("<h2>Summary</h2><ul class=\"summary\">");
    for line in super::summary_lines(a) {
        let _ = write!(o, "<li>{}</li>", esc(&line));
    }
    o.push_str("</ul>");
    for c in &a.cautions {
        let _ = write!(o, "<p class=\"caution\">{}</p>", esc(c));
    }
    eye(o, a);
    if let Some(f) = svg::spectrum(a) {
        let _ = write!(o, "<h2>Spectra at the eye</h2>{}", svg::html(&f));
    }
    if let Some(line) = pupil_line(a) {
        let _ = write!(o, "<p>{}</p>", esc(&line));
    }
    if !a.steps.is_empty() {
        steps(o, a);
    }
    if let Some(b) = &a.bleach {
        pigment(o, b);
        o.push_str(&svg::bleach(a).map_or_else(String::new, |f| svg::html(&f)));
    }
    if !a.limits.is_empty() {
        limits(o, a, s);
    }
    if !a.guidance.is_empty() {
        guidance(o, a);
    }
    brightest(o, a);
    for e in a.evidence.iter().filter(|_| a.room.is_none()) {
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

/// What reaches the eye from each source (corneal illuminance, trolands, rod R*/rod/s), then
/// the α-opic quantities.
fn eye(o: &mut String, a: &Assessment) {
    let Some(r) = &a.retina else { return };
    let _ = write!(
        o,
        "<h2>What reaches the eye ({} eye)</h2><table><tr><th>source</th><th>corneal illuminance</th><th>photopic td</th><th>scotopic td</th><th>rod R*/rod/s</th></tr>",
        r.species.name()
    );
    let (eye, opic) = super::eye_rows(r);
    for [label, lx, phot, scot, rod] in eye {
        let _ = write!(
            o,
            "<tr><td>{}</td><td>{lx}</td><td>{phot}</td><td>{scot}</td><td>{rod}</td></tr>",
            esc(&label)
        );
    }
    o.push_str("</table><table><tr><th>source</th><th>α-opic quantity</th><th>value</th></tr>");
    for [label, channel, value] in opic {
        let _ =
            write!(o, "<tr><td>{}</td><td>{}</td><td>{}</td></tr>", esc(&label), esc(&channel), esc(&value));
    }
    o.push_str("</table>");
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

/// The pigment: one row per phase (the time course is a figure, see [`svg::bleach`]).
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
    let _ = write!(o, "<p>Peak {:.3} %; {}.</p>", 100.0 * b.summary.peak, esc(&super::recovery_text(b)));
    for t in &b.thresholds {
        if let Some(s) = t.to_within_0_1_log_min {
            let _ = write!(
                o,
                "<p>Rod threshold estimate: within 0.1 log unit of its dark-adapted level after {} ({}).</p>",
                super::duration(s * 60.0),
                esc(&t.basis)
            );
        }
    }
}

/// Every hazard ratio in one figure, then per limits check its table and t_max against distance
/// (or why that figure is not drawn).
fn limits(o: &mut String, a: &Assessment, s: &Scenario) {
    o.push_str("<h2>Exposure limits</h2>");
    if let Some(f) = svg::hazard_ratios(a) {
        o.push_str(&svg::html(&f));
    }
    for l in &a.limits {
        let src = &l.source;
        limits_table(o, src, l);
        match svg::t_max_distance(s, l) {
            Ok(f) => o.push_str(&svg::html(&f)),
            Err(why) => {
                let _ = write!(o, "<p><i>{}</i></p>", esc(&why));
            }
        }
    }
}

/// One limits check: a row per hazard with its verdict, then the risk group.
fn limits_table(o: &mut String, src: &str, l: &LimitsAssessment) {
    let _ = write!(
        o,
        "<h3>{} against {}</h3><table><tr><th>hazard</th><th>clause</th><th>ratio</th><th>lower bound</th><th>t_max</th><th>field / C_α</th><th>verdict</th></tr>",
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
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td{cls}>{}{}{}</td></tr>",
            esc(&h.name),
            esc(&h.clause),
            h.ratio.map_or("—".into(), num),
            h.lower_bound_ratio.map_or("—".into(), num),
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
        if let Some(e) = c.e_thr_lx {
            let _ = write!(
                o,
                "<p>E_thr (IEC TR 62778: the illuminance at the eye up to which the blue-light hazard stays within RG1): {} lx</p>",
                num(e)
            );
        }
        if let Some(d) = c.threshold_distance {
            let _ = write!(o, "<p>Threshold distance: {} mm</p>", num(d.si() * 1e3));
        }
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
        if let Some(f) = c.as_ref().and_then(|c| svg::heatmap(r, c)) {
            o.push_str(&svg::html(&f));
        }
        o.push_str(&svg::dimming::rack(r).map_or_else(String::new, |f| svg::html(&f)));
    }
}

/// The brightest light of each step within each bound, as a list.
fn brightest(o: &mut String, a: &Assessment) {
    let lines = super::terminal::assess::brightest_lines(a);
    if !lines.is_empty() {
        o.push_str("<h2>Brightest light within each bound</h2><ul>");
        for l in &lines {
            let _ = write!(o, "<li>{}</li>", esc(l));
        }
        o.push_str("</ul>");
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
