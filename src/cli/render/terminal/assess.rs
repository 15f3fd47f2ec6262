//! The terminal report of `retidose assess`: one section per part of the assessment, with box
//! tables fitted to the terminal's width and, on a terminal, colour.

use retidose::assess::Assessment;
use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::limits::Verdict;
use retidose::limits::report::LimitsAssessment;
use retidose::pigment::bleach::BleachReport;
use retidose::retina::report::RetinaReport;

use super::{Page, Table, percent};
use crate::cli::render::escape::terminal_text;
use crate::cli::render::{
    STEP_HEADER, basis_text, data_notes, duration, fov_and_c_alpha, num, pupil_line, recovery_text,
    step_rows, summary_lines, t_max, verdict_word,
};

/// The terminal report, fitted to the terminal's width (see [`super::width`]).
pub fn report(all: &[Assessment], colour: bool) -> String {
    report_at(all, colour, super::width())
}

/// The terminal report, fitted to `width` columns.
pub fn report_at(all: &[Assessment], colour: bool, width: usize) -> String {
    let mut o = Page::new(width, colour);
    for (i, a) in all.iter().enumerate() {
        if i > 0 {
            o.blank();
            o.rule();
            o.blank();
        }
        scenario(&mut o, a);
    }
    o.finish()
}

/// One assessment, section by section.
fn scenario(o: &mut Page, a: &Assessment) {
    heading(o, a);
    if let Some(r) = &a.retina {
        what_reaches_the_eye(o, a, r);
    }
    if let Some(line) = pupil_line(a) {
        o.blank();
        o.para(&line, "");
    }
    if !a.steps.is_empty() {
        o.heading("Schedule steps (one cycle): what is lit, through every filter, with the pupil of the step's phase", false);
        let mut t = Table::new(&STEP_HEADER);
        for r in step_rows(a) {
            t.row(r);
        }
        o.table(&t);
    }
    if let Some(b) = &a.bleach {
        pigment(o, b);
    }
    for l in &a.limits {
        limits(o, l);
    }
    guidance(o, a);
    brightest(o, a);
    if a.room.is_none() && !a.evidence.is_empty() {
        o.heading("Evidence (not limits)", false);
        for e in &a.evidence {
            o.item("  ", &format!("{}: {} — {}", e.name, e.value, e.source));
        }
    }
    if let Some(r) = &a.room {
        super::room::room(o, a, r);
    }
    closing(o, a);
}

/// Title, description, the summary and the cautions.
fn heading(o: &mut Page, a: &Assessment) {
    o.heading(&format!("retidose assess — {}", a.title), true);
    if let Some(d) = &a.description {
        for line in terminal_text(d).lines() {
            o.para(line, "");
        }
    }
    o.heading("Summary", false);
    for line in summary_lines(a) {
        o.para(&line, "  ");
    }
    o.blank();
    for c in &a.cautions {
        o.hanging("! ", "  ", c);
    }
}

/// Each source at the eye (illuminance, trolands, rod rate), then the α-opic quantities.
fn what_reaches_the_eye(o: &mut Page, a: &Assessment, r: &RetinaReport) {
    o.heading(
        &format!(
            "What reaches the eye ({} eye, pupil {} mm)",
            r.species.name(),
            num(r.pupil.area_mm2().sqrt() * 2.0 / std::f64::consts::PI.sqrt())
        ),
        false,
    );
    let mut t = Table::new(&["source", "corneal illuminance", "photopic", "scotopic", "rod"]);
    for s in &r.sources {
        let ret = s.retinal.as_ref();
        let rod = ret
            .and_then(|x| x.catch.iter().find(|c| c.receptor == "rod"))
            .map_or("—".into(), |c| format!("{} R*/rod/s", num(c.rate.si())));
        t.row(vec![
            s.label.clone(),
            s.illuminance.value.map_or("—".into(), |v| format!("{} lx", num(v.si_value()))),
            ret.map_or("—".into(), |x| format!("{} td", num(as_td_f64(x.trolands.photopic)))),
            ret.map_or("—".into(), |x| format!("{} td", num(as_td_f64(x.trolands.scotopic)))),
            rod,
        ]);
    }
    o.table(&t);
    for s in &r.sources {
        for n in data_notes(&s.notes) {
            o.hanging("! ", "  ", &format!("{}: {n}", s.label));
        }
    }
    alpha_opic(o, a, r);
}

/// α-opic quantities per source and per schedule step (what is lit together), never summed over
/// sources that are not lit together: CIE S 026 EDI for people, retidose's equivalent-daylight
/// values for rodents.
fn alpha_opic(o: &mut Page, a: &Assessment, r: &RetinaReport) {
    let human = !r.sources.iter().all(|s| s.human_alpha_opic.is_empty());
    let names: Vec<String> = match r.sources.first() {
        Some(s) if human => s.human_alpha_opic.iter().map(|x| x.name.clone()).collect(),
        Some(s) => s.species_opic.iter().map(|x| x.channel.clone()).collect(),
        None => return,
    };
    let at_least = |c: &retidose::spectrum::Coverage| if c.matters() { "≥ " } else { "" };
    let human_row = |v: &[retidose::weighting::alpha_opic::AlphaOpicValue]| -> Vec<String> {
        v.iter()
            .map(|x| {
                x.edi.map_or("—".into(), |e| format!("{}{} lx", at_least(&x.coverage), num(e.si_value())))
            })
            .collect()
    };
    let rodent_row = |v: &[retidose::retina::catch::SpeciesOpic]| -> Vec<String> {
        v.iter().map(|x| format!("{}{} lx", at_least(&x.coverage), num(x.equivalent_daylight.si()))).collect()
    };
    let partial = r.sources.iter().any(|s| {
        s.human_alpha_opic.iter().any(|x| x.coverage.matters())
            || s.species_opic.iter().any(|x| x.coverage.matters())
    });
    let header: Vec<&str> = std::iter::once("").chain(names.iter().map(String::as_str)).collect();
    let mut t = Table::new(&header);
    for s in &r.sources {
        let vals = if human { human_row(&s.human_alpha_opic) } else { rodent_row(&s.species_opic) };
        t.row([vec![format!("source {}", s.label)], vals].concat());
    }
    for st in a.steps.iter().filter(|st| !st.on.is_empty()) {
        let vals = if human { human_row(&st.alpha_opic) } else { rodent_row(&st.species_opic) };
        t.row([vec![format!("step {}", st.name)], vals].concat());
    }
    let title = if human {
        "CIE S 026 α-opic equivalent daylight illuminance (EDI), per source and per step (sources lit together)"
            .to_string()
    } else {
        format!(
            "{} α-opic equivalent daylight (D65) illuminance, per source and per step (retidose method, not a CIE quantity)",
            r.species.name()
        )
    };
    o.heading(&title, false);
    o.table(&t);
    if partial {
        o.para(
            "≥: a lower bound; the spectrum does not cover the whole band of that channel (measure further into \
             the UV or give emission_range when the source emits nothing outside its measured range)",
            "  ",
        );
    }
}

/// The pigment: one row per phase, peak and mean, recovery, rod threshold and saturation.
fn pigment(o: &mut Page, b: &BleachReport) {
    o.heading(&format!("Pigment ({}, {} model)", b.receptor, b.model.name()), false);
    let mut t = Table::new(&["phase", "level", "bleached at end", "steady state"]);
    for p in &b.phases {
        t.row(vec![
            p.name.clone(),
            format!("{} {}", num(p.level), b.level_unit.symbol()),
            percent(p.end),
            percent(p.steady_state),
        ]);
    }
    o.table(&t);
    o.para(
        &format!(
            "Bleached at the peak {}, on average {}; {}.",
            percent(b.summary.peak),
            percent(b.summary.mean),
            recovery_text(b)
        ),
        "",
    );
    if let Some(th) = b.thresholds.first() {
        let when = th.to_within_0_1_log_min.map_or("more than 2 h".into(), |m| duration(m * 60.0));
        o.para(
            &format!(
                "Rod threshold back within 0.1 log units after about {when} (an estimate: {}).",
                th.basis
            ),
            "",
        );
    }
    if let Some(s) = &b.saturation {
        o.para(s, "");
    }
}

/// One limits check: a row per hazard with its verdict, then the risk group.
fn limits(o: &mut Page, l: &LimitsAssessment) {
    o.heading(
        &format!("Exposure limits: {} against {} for {}", l.source, l.set_id, duration(l.duration.si())),
        false,
    );
    let mut t = Table::new(&["hazard", "clause", "ratio to limit", "t_max", "field / C_α", "verdict"]);
    for h in &l.hazards {
        let code = match h.verdict {
            Verdict::Exceeds => "31;1",
            Verdict::Within => "32",
            _ => "33",
        };
        let memo = if h.from_memory.is_empty() { "" } else { " [from memory]" };
        t.painted_row(vec![
            (h.name.clone(), ""),
            (h.clause.clone(), ""),
            (h.ratio.map_or("—".into(), num), ""),
            (t_max(h), ""),
            (fov_and_c_alpha(h), ""),
            (format!("{}{memo}", verdict_word(h)), code),
        ]);
    }
    o.table(&t);
    for n in data_notes(&l.notes) {
        o.hanging("! ", "  ", n);
    }
    for h in l.hazards.iter().filter(|h| !h.stricter_choices.is_empty()) {
        o.hanging("", "  ", &format!("Stricter choice ({}): {}", h.name, h.stricter_choices.join("; ")));
    }
    match &l.classification {
        None => {}
        Some(Err(why)) => o.hanging("", "  ", &format!("Risk group (IEC 62471): not assessed: {why}")),
        Some(Ok(c)) => {
            o.hanging(
                "",
                "  ",
                &format!(
                    "Risk group (IEC 62471) at {} mm: {}{}",
                    num(c.distance.si() * 1e3),
                    c.overall.map_or("—", |g| g.name()),
                    if c.not_assessed.is_empty() { "" } else { " (lower bound: some hazards not assessed)" }
                ),
            );
            if let Some(e) = c.e_thr_lx {
                o.para(&format!("Blue-light E_thr {} lx", num(e)), "");
            }
            if let Some(d) = c.threshold_distance {
                o.para(&format!("Blue-light group at most RG1 beyond {} m", num(d.si())), "");
            }
            for n in &c.notes {
                o.item("  ", n);
            }
        }
    }
}

/// The guidance comparisons, a row per rule and phase; the set in the heading when there is one.
fn guidance(o: &mut Page, a: &Assessment) {
    let Some(first) = a.guidance.first() else {
        return;
    };
    let one_set = a.guidance.iter().all(|g| g.flag.set == first.flag.set);
    if one_set {
        o.heading(&format!("Guidance ({})", first.flag.set), false);
    } else {
        o.heading("Guidance", false);
    }
    let mut header = vec!["set", "where", "rule", "result", "comparison"];
    if one_set {
        header.remove(0);
    }
    let mut t = Table::new(&header);
    for g in &a.guidance {
        let f = &g.flag;
        let mut row = vec![
            (f.set.clone(), ""),
            (basis_text(g), ""),
            (f.name.clone(), ""),
            if f.raised { ("FLAG".to_string(), "33;1") } else { ("ok".to_string(), "") },
            (f.message.clone(), ""),
        ];
        if one_set {
            row.remove(0);
        }
        t.painted_row(row);
    }
    o.table(&t);
}

/// The brightest light of each step within the user's targets and the guidance's upper bounds.
fn brightest(o: &mut Page, a: &Assessment) {
    let lines = brightest_lines(a);
    if lines.is_empty() {
        return;
    }
    o.heading("Brightest light within each bound (the step's light scaled; light is linear)", false);
    for l in &lines {
        o.item("  ", l);
    }
}

/// The brightest-light sentences, one per bound and step (shared by the terminal, Markdown and
/// HTML reports).
pub fn brightest_lines(a: &Assessment) -> Vec<String> {
    use retidose::housing::guidance::{BoundSource, StepQuantity};
    a.brightest
        .iter()
        .map(|b| {
            let (unit, what, key) = match b.bound {
                StepQuantity::MelanopicEdi(_) => ("lx", " melanopic EDI", "edi_target"),
                StepQuantity::RodRate(_) => ("R*/rod/s", "", "rod_target"),
                StepQuantity::Illuminance(_) => ("lx", "", ""),
            };
            let bound = match &b.source {
                BoundSource::Target => format!("{key} {} {unit}{what}", num(b.bound.si())),
                BoundSource::Guidance { set, name, .. } => {
                    format!("{set} / {name}: at most {} {unit}{what}", num(b.bound.si()))
                }
            };
            let head = format!("Step '{}', {bound}", b.step);
            if b.factor.is_infinite() {
                return format!("{head}: met (no light in this step).");
            }
            let value = format!("{}{} {unit}", if b.value_is_lower_bound { "≥ " } else { "" }, num(b.value.si()));
            let state = if b.meets {
                format!("met with a margin of {}× ({value})", num(b.factor))
            } else {
                format!("{value} is above it")
            };
            let lower = match (b.value_is_lower_bound, b.pupil_adapts) {
                (true, _) => " (at most: the step's value is a lower bound)",
                (_, true) if b.factor < 1.0 => " (at most: the pupil opens as the light dims)",
                _ => "",
            };
            format!(
                "{head}: {state}; the brightest allowed is {}× the step's light as written{lower}, {} lx of room light \
                 before the filters.",
                num(b.factor),
                num(b.brightest_room.si())
            )
        })
        .collect()
}

/// Sources of limits and guidance, what was not assessed, and the outcome.
fn closing(o: &mut Page, a: &Assessment) {
    o.heading("Sources of limits and guidance", false);
    for p in &a.provenance {
        o.item("  ", &format!("{}: {} ({}) — {}", p.role, p.document, p.edition, p.status));
    }
    o.heading("Not assessed", false);
    if a.not_assessed.is_empty() {
        o.para("(nothing)", "  ");
    }
    for n in &a.not_assessed {
        o.item("  ", n);
    }
    o.blank();
    if a.limit_exceeded {
        o.painted("Outcome: a limit is exceeded", "31;1", "");
    } else if a.flag_raised {
        o.painted("Outcome: a guidance flag is raised", "33;1", "");
    } else {
        o.para("Outcome: no limit exceeded and no flag raised among the items assessed", "");
    }
}
