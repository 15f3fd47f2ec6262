//! The terminal report of `retidose assess`: one section per part of the assessment, with box
//! tables and, on a terminal, colour.

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::limits::Verdict;
use retidose::limits::report::LimitsAssessment;
use retidose::pigment::bleach::BleachReport;
use retidose::retina::report::RetinaReport;

use super::{paint, safe_rows, table};
use crate::cli::render::escape::{terminal_line, terminal_text};
use crate::cli::render::{
    STEP_HEADER, basis_text, data_notes, fov_and_c_alpha, num, pupil_line, recovery_text, step_rows,
    summary_lines, t_max, verdict_word,
};

/// The terminal summary.
pub fn report(all: &[Assessment], colour: bool) -> String {
    let mut o = String::new();
    for (i, a) in all.iter().enumerate() {
        if i > 0 {
            let _ = writeln!(o, "\n{}\n", "═".repeat(78));
        }
        scenario(&mut o, a, colour);
    }
    o
}

/// One assessment, section by section.
fn scenario(o: &mut String, a: &Assessment, colour: bool) {
    heading(o, a, colour);
    if let Some(r) = &a.retina {
        what_reaches_the_eye(o, a, r);
    }
    if let Some(line) = pupil_line(a) {
        let _ = writeln!(o, "\n{}", terminal_line(&line));
    }
    if !a.steps.is_empty() {
        let _ = writeln!(
            o,
            "\nSchedule steps (one cycle): what is lit, through every filter, with the pupil of the step's phase"
        );
        let _ = writeln!(o, "{}", table(&STEP_HEADER, safe_rows(step_rows(a))));
    }
    if let Some(b) = &a.bleach {
        pigment(o, b);
    }
    for l in &a.limits {
        let src = &l.source;
        limits(o, src, l, colour);
    }
    guidance(o, a, colour);
    for e in a.evidence.iter().filter(|_| a.room.is_none()) {
        let (name, value, source) =
            (terminal_line(&e.name), terminal_line(&e.value), terminal_line(&e.source));
        let _ = writeln!(o, "evidence (not a limit): {name}: {value} — {source}");
    }
    if let Some(r) = &a.room {
        super::room::room(o, a, r, 100, colour);
    }
    closing(o, a, colour);
}

/// Title, description and cautions.
fn heading(o: &mut String, a: &Assessment, colour: bool) {
    let _ = writeln!(o, "{}", paint(&format!("retidose assess — {}", terminal_line(&a.title)), "1", colour));
    if let Some(d) = &a.description {
        let _ = writeln!(o, "{}", terminal_text(d));
    }
    let _ = writeln!(o, "\n{}", paint("Summary", "1", colour));
    for line in summary_lines(a) {
        super::room::wrapped(o, &line, 100, "  ");
    }
    let _ = writeln!(o);
    for c in &a.cautions {
        super::room::wrapped(o, &format!("! {c}"), 100, "");
    }
}

/// Each source at the eye (illuminance, trolands, rod rate), then the α-opic quantities.
fn what_reaches_the_eye(o: &mut String, a: &Assessment, r: &RetinaReport) {
    let _ = writeln!(
        o,
        "\nWhat reaches the eye ({} eye, pupil {} mm)",
        r.species.name(),
        num(r.pupil.area_mm2().sqrt() * 2.0 / std::f64::consts::PI.sqrt())
    );
    let rows = r
        .sources
        .iter()
        .map(|s| {
            let ret = s.retinal.as_ref();
            let rod = ret
                .and_then(|x| x.catch.iter().find(|c| c.receptor == "rod"))
                .map_or("—".into(), |c| num(c.rate.si()));
            vec![
                terminal_line(&s.label).into_owned(),
                s.illuminance.value.map_or("—".into(), |v| format!("{} lx", num(v.si_value()))),
                ret.map_or("—".into(), |x| num(as_td_f64(x.trolands.photopic))),
                ret.map_or("—".into(), |x| num(as_td_f64(x.trolands.scotopic))),
                rod,
            ]
        })
        .collect();
    let _ = writeln!(
        o,
        "{}",
        table(&["source", "corneal illuminance", "phot td", "scot td", "rod R*/rod/s"], rows)
    );
    for s in &r.sources {
        for n in data_notes(&s.notes) {
            let _ = writeln!(o, "! {}: {}", terminal_line(&s.label), terminal_line(n));
        }
    }
    alpha_opic(o, a, r);
}

/// α-opic quantities per source and per schedule step (what is lit together), never summed over
/// sources that are not lit together: CIE S 026 EDI for people, retidose's equivalent-daylight
/// values for rodents.
fn alpha_opic(o: &mut String, a: &Assessment, r: &RetinaReport) {
    let human = !r.sources.iter().all(|s| s.human_alpha_opic.is_empty());
    let names: Vec<String> = match r.sources.first() {
        Some(s) if human => s.human_alpha_opic.iter().map(|x| x.name.clone()).collect(),
        Some(s) => s.species_opic.iter().map(|x| x.channel.clone()).collect(),
        None => return,
    };
    let human_row = |v: &[retidose::weighting::alpha_opic::AlphaOpicValue]| -> Vec<String> {
        v.iter().map(|x| x.edi.map_or("—".into(), |e| num(e.si_value()))).collect()
    };
    let rodent_row = |v: &[retidose::retina::catch::SpeciesOpic]| -> Vec<String> {
        v.iter().map(|x| num(x.equivalent_daylight.si())).collect()
    };
    let mut rows: Vec<Vec<String>> = Vec::new();
    for s in &r.sources {
        let vals = if human { human_row(&s.human_alpha_opic) } else { rodent_row(&s.species_opic) };
        rows.push([vec![format!("source {}", terminal_line(&s.label))], vals].concat());
    }
    for st in a.steps.iter().filter(|st| !st.on.is_empty()) {
        let vals = if human { human_row(&st.alpha_opic) } else { rodent_row(&st.species_opic) };
        rows.push([vec![format!("step {}", terminal_line(&st.name))], vals].concat());
    }
    let title = if human {
        "CIE S 026 α-opic EDI, lx, per source and per step (sources lit together)".to_string()
    } else {
        format!(
            "{} α-opic equivalent D65 lx, per source and per step (retidose method, not a CIE quantity)",
            r.species.name()
        )
    };
    let header: Vec<&str> = std::iter::once("").chain(names.iter().map(String::as_str)).collect();
    let _ = writeln!(o, "{title}");
    let _ = writeln!(o, "{}", table(&header, rows));
}

/// The pigment: one row per phase, peak and mean, recovery, rod threshold and saturation.
fn pigment(o: &mut String, b: &BleachReport) {
    let _ = writeln!(o, "\nPigment ({}, {} model)", terminal_line(&b.receptor), b.model.name());
    let rows = b
        .phases
        .iter()
        .map(|p| {
            vec![
                terminal_line(&p.name).into_owned(),
                format!("{} {}", num(p.level), b.level_unit.symbol()),
                format!("{:.3} %", 100.0 * p.end),
                format!("{:.3} %", 100.0 * p.steady_state),
            ]
        })
        .collect();
    let _ = writeln!(o, "{}", table(&["phase", "level", "bleached at end", "steady state"], rows));
    let _ = writeln!(
        o,
        "peak {:.3} %, mean {:.3} %; {}",
        100.0 * b.summary.peak,
        100.0 * b.summary.mean,
        terminal_line(&recovery_text(b))
    );
    if let Some(th) = b.thresholds.first() {
        let _ = writeln!(
            o,
            "rod threshold within 0.1 log units after ~{} (estimate: {})",
            th.to_within_0_1_log_min.map_or("> 120 min".into(), |m| format!("{m} min")),
            terminal_line(&th.basis)
        );
    }
    if let Some(s) = &b.saturation {
        let _ = writeln!(o, "{}", terminal_line(s));
    }
}

/// One limits check: a row per hazard with its verdict, then the risk group.
fn limits(o: &mut String, src: &str, l: &LimitsAssessment, colour: bool) {
    let (src, set) = (terminal_line(src), terminal_line(&l.set_id));
    let _ = writeln!(o, "\nExposure limits: {src} against {set} for {} s", num(l.duration.si()));
    let rows = l
        .hazards
        .iter()
        .map(|h| {
            let v = verdict_word(h);
            let v = match h.verdict {
                Verdict::Exceeds => paint(v, "31;1", colour),
                Verdict::Within => paint(v, "32", colour),
                _ => paint(v, "33", colour),
            };
            vec![
                terminal_line(&h.name).into_owned(),
                terminal_line(&h.clause).into_owned(),
                h.ratio.map_or("—".into(), num),
                t_max(h),
                terminal_line(&fov_and_c_alpha(h)).into_owned(),
                format!("{v}{}", if h.from_memory.is_empty() { "" } else { " [from memory]" }),
            ]
        })
        .collect();
    let _ = writeln!(o, "{}", table(&["hazard", "clause", "ratio", "t_max", "field / C_α", "verdict"], rows));
    for n in data_notes(&l.notes) {
        let _ = writeln!(o, "! {}", terminal_line(n));
    }
    for h in l.hazards.iter().filter(|h| !h.stricter_choices.is_empty()) {
        let (name, why) =
            (terminal_line(&h.name), terminal_line(&h.stricter_choices.join("; ")).into_owned());
        let _ = writeln!(o, "stricter choice ({name}): {why}");
    }
    if let Some(Err(why)) = &l.classification {
        let _ = writeln!(o, "risk group (IEC 62471): not assessed: {}", terminal_line(why));
    }
    if let Some(Ok(c)) = &l.classification {
        let _ = writeln!(
            o,
            "risk group (IEC 62471) at {} mm: {}{}",
            num(c.distance.si() * 1e3),
            c.overall.map_or("—", |g| g.name()),
            if c.not_assessed.is_empty() { "" } else { " (lower bound: some hazards not assessed)" }
        );
        if let Some(e) = c.e_thr_lx {
            let _ = writeln!(o, "blue-light E_thr {} lx", num(e));
        }
        if let Some(d) = c.threshold_distance {
            let _ = writeln!(o, "blue-light group at most RG1 beyond {} m", num(d.si()));
        }
        for n in &c.notes {
            let _ = writeln!(o, "  - {}", terminal_line(n));
        }
    }
}

/// The guidance comparisons, a row per rule and phase.
fn guidance(o: &mut String, a: &Assessment, colour: bool) {
    if a.guidance.is_empty() {
        return;
    }
    let _ = writeln!(o, "\nGuidance");
    let rows = a
        .guidance
        .iter()
        .map(|g| {
            let (phase, f) = (basis_text(g), &g.flag);
            vec![
                terminal_line(&f.set).into_owned(),
                terminal_line(&phase).into_owned(),
                terminal_line(&f.name).into_owned(),
                if f.raised { paint("FLAG", "33;1", colour) } else { "ok".into() },
                terminal_line(&f.message).into_owned(),
            ]
        })
        .collect();
    let _ = writeln!(o, "{}", table(&["set", "phase", "rule", "", "comparison"], rows));
}

/// Sources of limits and guidance, what was not assessed, and the outcome.
fn closing(o: &mut String, a: &Assessment, colour: bool) {
    let _ = writeln!(o, "\nSources of limits and guidance");
    for p in &a.provenance {
        let _ = writeln!(
            o,
            "  - {}: {} ({}) — {}",
            terminal_line(&p.role),
            terminal_line(&p.document),
            terminal_line(&p.edition),
            terminal_line(&p.status)
        );
    }
    let _ = writeln!(o, "\nNot assessed");
    if a.not_assessed.is_empty() {
        let _ = writeln!(o, "  (nothing)");
    }
    for n in &a.not_assessed {
        let _ = writeln!(o, "  - {}", terminal_line(n));
    }
    let outcome = if a.limit_exceeded {
        paint("a limit is exceeded", "31;1", colour)
    } else if a.flag_raised {
        paint("a guidance flag is raised", "33;1", colour)
    } else {
        "no limit exceeded and no flag raised among the items assessed".to_string()
    };
    let _ = writeln!(o, "\nOutcome: {outcome}");
}
