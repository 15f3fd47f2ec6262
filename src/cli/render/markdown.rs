//! The `retidose assess` report in Markdown: one section per part of the assessment.

use std::fmt::Write;

use retidose::assess::{Assessment, SurveyResult};
use retidose::limits::report::LimitsAssessment;
use retidose::pigment::bleach::BleachReport;

use super::{
    STEP_HEADER, basis_text, data_notes, fov_and_c_alpha, num, pupil_line, recovery_text, step_rows, t_max,
    verdict_word,
};

/// Markdown.
pub fn assessment(all: &[Assessment]) -> String {
    // The terminal layout without colour is plain text with box tables; wrap it for Markdown.
    let mut o = String::new();
    for a in all {
        heading(&mut o, a);
        if !a.steps.is_empty() {
            steps(&mut o, a);
        }
        if let Some(b) = &a.bleach {
            pigment(&mut o, b);
        }
        for l in &a.limits {
            let src = &l.source;
            limits(&mut o, src, l);
        }
        if !a.guidance.is_empty() {
            guidance(&mut o, a);
        }
        if let Some(s) = &a.survey {
            survey(&mut o, s);
        }
        closing(&mut o, a);
    }
    o
}

/// Title, description, cautions and the pupil rule.
fn heading(o: &mut String, a: &Assessment) {
    let _ = writeln!(o, "# {}\n", md(&a.title));
    if let Some(d) = &a.description {
        let _ = writeln!(o, "{}\n", md(d));
    }
    for c in &a.cautions {
        let _ = writeln!(o, "> **Caution.** {}\n", md(c));
    }
    if let Some(line) = pupil_line(a) {
        let _ = writeln!(o, "{}\n", md(&line));
    }
}

/// The schedule steps of one cycle.
fn steps(o: &mut String, a: &Assessment) {
    let _ = writeln!(
        o,
        "## Schedule steps (one cycle)\n\n| {} |\n|{}",
        STEP_HEADER.join(" | "),
        "---|".repeat(STEP_HEADER.len())
    );
    for r in step_rows(a) {
        let _ = writeln!(o, "| {} |", r.iter().map(|c| md(c)).collect::<Vec<_>>().join(" | "));
    }
    let _ = writeln!(o);
}

/// The pigment: one row per phase, the peak and the recovery.
fn pigment(o: &mut String, b: &BleachReport) {
    let _ = writeln!(
        o,
        "## Pigment ({}, {} model)\n\n| phase | level | bleached at end | steady state |\n|---|---|---|---|",
        b.receptor,
        b.model.name()
    );
    for p in &b.phases {
        let _ = writeln!(
            o,
            "| {} | {} {} | {:.3} % | {:.3} % |",
            md(&p.name),
            num(p.level),
            b.level_unit.symbol(),
            100.0 * p.end,
            100.0 * p.steady_state
        );
    }
    let _ = writeln!(o, "\nPeak {:.3} %; {}.\n", 100.0 * b.summary.peak, recovery_text(b));
}

/// One limits check: a row per hazard with its verdict.
fn limits(o: &mut String, src: &str, l: &LimitsAssessment) {
    let _ = writeln!(
        o,
        "## Exposure limits: {} against {}\n\n| hazard | clause | ratio | t_max | field / C_α | verdict |\n|---|---|---|---|---|---|",
        md(src),
        l.set_id
    );
    for h in &l.hazards {
        let _ = writeln!(
            o,
            "| {} | {} | {} | {} | {} | {}{} |",
            md(&h.name),
            md(&h.clause),
            h.ratio.map_or("—".into(), num),
            t_max(h),
            md(&fov_and_c_alpha(h)),
            verdict_word(h),
            if h.from_memory.is_empty() { "" } else { " (from memory)" }
        );
    }
    let _ = writeln!(o);
    for n in data_notes(&l.notes) {
        let _ = writeln!(o, "> **Note.** {}\n", md(n));
    }
    if let Some(Err(why)) = &l.classification {
        let _ = writeln!(o, "Risk group (IEC 62471): not assessed: {}\n", md(why));
    }
    if let Some(Ok(c)) = &l.classification {
        let _ = writeln!(
            o,
            "Risk group (IEC 62471) at {} mm: **{}**{}\n",
            num(c.distance.get::<uom::si::length::millimeter>()),
            c.overall.map_or("—", |g| g.name()),
            if c.not_assessed.is_empty() { "" } else { " (a lower bound: some hazards were not assessed)" }
        );
        for n in &c.notes {
            let _ = writeln!(o, "- {}", md(n));
        }
        let _ = writeln!(o);
    }
}

/// The guidance comparisons, a row per rule and phase.
fn guidance(o: &mut String, a: &Assessment) {
    let _ = writeln!(o, "## Guidance\n\n| set | phase | rule | flag | comparison |\n|---|---|---|---|---|");
    for g in &a.guidance {
        let (phase, f) = (basis_text(g), &g.flag);
        let _ = writeln!(
            o,
            "| {} | {} | {} | {} | {} |",
            f.set,
            md(&phase),
            md(&f.name),
            if f.raised { "**flag**" } else { "ok" },
            md(&f.message)
        );
    }
    let _ = writeln!(o);
}

/// The housing survey in one sentence.
fn survey(o: &mut String, s: &SurveyResult) {
    let _ = writeln!(
        o,
        "## Housing survey\n\n{} × {} positions, {}; {} flagged; max/min {}.\n",
        s.shelves,
        s.columns,
        md(&s.mode),
        s.flagged,
        num(s.max_over_min)
    );
}

/// Sources of limits and guidance, and what was not assessed.
fn closing(o: &mut String, a: &Assessment) {
    let _ = writeln!(o, "## Sources of limits and guidance\n");
    for p in &a.provenance {
        let _ =
            writeln!(o, "- {}: {} ({}) — {}", md(&p.role), md(&p.document), md(&p.edition), md(&p.status));
    }
    let _ = writeln!(o, "\n## Not assessed\n");
    for n in &a.not_assessed {
        let _ = writeln!(o, "- {}", md(n));
    }
    if a.not_assessed.is_empty() {
        let _ = writeln!(o, "- nothing");
    }
    let _ = writeln!(o);
}

/// Escapes the table separator.
fn md(s: &str) -> String {
    s.replace('|', "\\|")
}
