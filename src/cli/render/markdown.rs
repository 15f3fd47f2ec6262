//! The `retidose assess` report in Markdown: one section per part of the assessment.
//!
//! Every piece of text that comes from the user's files, or from the library's wording that may
//! quote it (notes, messages, step and source names, set ids, provenance), goes through
//! [`escape::markdown`] by way of [`user`], so a title cannot add a heading, a link or raw HTML;
//! text formatted here from numbers and fixed words only needs its table pipes escaped
//! ([`cell`]).

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::housing::pass::{Basis, Flags};
use retidose::housing::survey::RoomResult;

use super::room::{Cell, animals, rack_cells, rack_sentences, room_sentences};
use retidose::limits::report::LimitsAssessment;
use retidose::pigment::bleach::BleachReport;

use super::escape;
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
        eye(&mut o, a);
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
        brightest(&mut o, a);
        if let Some(r) = &a.room {
            room(&mut o, a, r);
        }
        closing(&mut o, a);
    }
    o
}

/// Title, description, the summary in words, the cautions that apply and the pupil rule.
fn heading(o: &mut String, a: &Assessment) {
    let _ = writeln!(o, "# {}\n", user(&a.title));
    if let Some(d) = &a.description {
        let _ = writeln!(o, "{}\n", user(d));
    }
    let _ = writeln!(o, "## Summary\n");
    for line in super::summary_lines(a) {
        let _ = writeln!(o, "- {}", user(&line));
    }
    let _ = writeln!(o);
    for c in &a.cautions {
        // The library's fixed cautions, no user text.
        let _ = writeln!(o, "> **Caution.** {}\n", cell(c));
    }
    if let Some(line) = pupil_line(a) {
        let _ = writeln!(o, "{}\n", user(&line));
    }
}

/// What reaches the eye from each source: corneal illuminance, trolands, the rod rate, then the
/// α-opic quantities (CIE S 026 EDIs for people, photon irradiances for rodents).
fn eye(o: &mut String, a: &Assessment) {
    let Some(r) = &a.retina else { return };
    let _ = writeln!(
        o,
        "## What reaches the eye ({} eye)\n\n| source | corneal illuminance | photopic td | scotopic td | rod R*/rod/s |\n|---|---:|---:|---:|---:|",
        r.species.name()
    );
    let (eye, opic) = super::eye_rows(r);
    for [label, lx, phot, scot, rod] in eye {
        let _ = writeln!(o, "| {} | {lx} | {phot} | {scot} | {rod} |", user(&label));
    }
    let _ = writeln!(o, "\n| source | α-opic quantity | value |\n|---|---|---:|");
    for [label, channel, value] in opic {
        let _ = writeln!(o, "| {} | {} | {value} |", user(&label), user(&channel));
    }
    let _ = writeln!(o);
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
        let cells: Vec<String> = r
            .iter()
            .enumerate()
            .map(|(i, c)| if STEP_USER_COLUMNS.contains(&i) { user(c) } else { cell(c) })
            .collect();
        let _ = writeln!(o, "| {} |", cells.join(" | "));
    }
    let _ = writeln!(o);
}

/// The pigment: one row per phase, the peak and the recovery.
fn pigment(o: &mut String, b: &BleachReport) {
    let _ = writeln!(
        o,
        "## Pigment ({}, {} model)\n\n| phase | level | bleached at end | steady state |\n|---|---|---|---|",
        user(&b.receptor),
        b.model.name()
    );
    for p in &b.phases {
        let _ = writeln!(
            o,
            "| {} | {} {} | {:.3} % | {:.3} % |",
            user(&p.name),
            num(p.level),
            b.level_unit.symbol(),
            100.0 * p.end,
            100.0 * p.steady_state
        );
    }
    let _ = writeln!(o, "\nPeak {:.3} %; {}.\n", 100.0 * b.summary.peak, user(&recovery_text(b)));
    for t in &b.thresholds {
        if let Some(s) = t.to_within_0_1_log_min {
            let _ = writeln!(
                o,
                "Rod threshold estimate: within 0.1 log unit of its dark-adapted level after {} ({}).\n",
                super::duration(s * 60.0),
                user(&t.basis)
            );
        }
    }
}

/// One limits check: a row per hazard with its verdict.
fn limits(o: &mut String, src: &str, l: &LimitsAssessment) {
    let _ = writeln!(
        o,
        "## Exposure limits: {} against {}\n\n| hazard | clause | ratio | lower bound | t_max | field / C_α | verdict |\n|---|---|---|---|---|---|---|",
        user(src),
        user(&l.set_id)
    );
    for h in &l.hazards {
        let _ = writeln!(
            o,
            "| {} | {} | {} | {} | {} | {} | {}{} |",
            user(&h.name),
            user(&h.clause),
            h.ratio.map_or("—".into(), num),
            h.lower_bound_ratio.map_or("—".into(), num),
            cell(&t_max(h)),
            user(&fov_and_c_alpha(h)),
            verdict_word(h),
            if h.from_memory.is_empty() { "" } else { " (from memory)" }
        );
    }
    let _ = writeln!(o);
    for n in data_notes(&l.notes) {
        let _ = writeln!(o, "> **Note.** {}\n", user(n));
    }
    if let Some(Err(why)) = &l.classification {
        let _ = writeln!(o, "Risk group (IEC 62471): not assessed: {}\n", user(why));
    }
    if let Some(Ok(c)) = &l.classification {
        let _ = writeln!(
            o,
            "Risk group (IEC 62471) at {} mm: **{}**{}\n",
            num(c.distance.get::<uom::si::length::millimeter>()),
            c.overall.map_or("—", |g| g.name()),
            if c.not_assessed.is_empty() { "" } else { " (a lower bound: some hazards were not assessed)" }
        );
        if let Some(e) = c.e_thr_lx {
            let _ = writeln!(
                o,
                "- E_thr (IEC TR 62778: the illuminance at the eye up to which the blue-light hazard stays within RG1): {} lx",
                num(e)
            );
        }
        if let Some(d) = c.threshold_distance {
            let _ = writeln!(o, "- threshold distance: {} mm", num(d.get::<uom::si::length::millimeter>()));
        }
        for n in &c.notes {
            let _ = writeln!(o, "- {}", user(n));
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
            user(&f.set),
            user(&phase),
            user(&f.name),
            if f.raised { "**flag**" } else { "ok" },
            user(&f.message)
        );
    }
    let _ = writeln!(o);
}

/// The brightest light of each step within each bound, as a list.
fn brightest(o: &mut String, a: &Assessment) {
    let lines = super::terminal::assess::brightest_lines(a);
    if !lines.is_empty() {
        let _ = writeln!(o, "## Brightest light within each bound\n");
        for l in &lines {
            let _ = writeln!(o, "- {}", user(l));
        }
        let _ = writeln!(o);
    }
}

/// The holding room: the sentences per rack and each rack's map as a table.
fn room(o: &mut String, a: &Assessment, room: &RoomResult) {
    let _ = writeln!(
        o,
        "## Holding room
"
    );
    for s in room_sentences(room) {
        let _ = writeln!(
            o,
            "{}
",
            user(&s)
        );
    }
    let cells = rack_cells(room);
    for (r, c) in room.racks.iter().zip(&cells) {
        let _ = writeln!(
            o,
            "### Rack {} — {}
",
            user(&r.id),
            animals(r)
        );
        for s in rack_sentences(room, r, &a.evidence) {
            let _ = writeln!(o, "- {}", user(&s));
        }
        let _ = writeln!(o);
        if let Some(c) = c {
            rack_table(o, r.shelves, r.columns, c);
        }
    }
}

/// A rack map as a Markdown table, top shelf first; + above the range, - below, ~ predicted.
fn rack_table(o: &mut String, shelves: u32, columns: u32, cells: &[Option<Cell>]) {
    let _ = write!(o, "| room lx |");
    for c in 1..=columns {
        let _ = write!(o, " col {c} |");
    }
    let _ = write!(
        o,
        "
|---|"
    );
    for _ in 1..=columns {
        let _ = write!(o, "---:|");
    }
    let _ = writeln!(o);
    for s in (1..=shelves).rev() {
        let _ = write!(o, "| shelf {s} |");
        for c in 1..=columns {
            let text = cells[((s - 1) * columns + c - 1) as usize].as_ref().map_or_else(
                || "·".to_string(),
                |x| {
                    let mark = if x.flags.has(Flags::ABOVE) {
                        " +"
                    } else if x.flags.has(Flags::BELOW) {
                        " −"
                    } else {
                        ""
                    };
                    let pred = if x.basis == Basis::Predicted { "~" } else { "" };
                    format!("{pred}{}{mark}", num(x.lux))
                },
            );
            let _ = write!(o, " {text} |");
        }
        let _ = writeln!(o);
    }
    let _ = writeln!(
        o,
        "
Room lux at cage level; + above the range, − below it, ~ predicted by the calibrated model.
"
    );
}

/// Sources of limits and guidance, and what was not assessed.
fn closing(o: &mut String, a: &Assessment) {
    let _ = writeln!(o, "## Sources of limits and guidance\n");
    for p in &a.provenance {
        let _ = writeln!(
            o,
            "- {}: {} ({}) — {}",
            user(&p.role),
            user(&p.document),
            user(&p.edition),
            user(&p.status)
        );
    }
    let _ = writeln!(o, "\n## Not assessed\n");
    for n in &a.not_assessed {
        let _ = writeln!(o, "- {}", user(n));
    }
    if a.not_assessed.is_empty() {
        let _ = writeln!(o, "- nothing");
    }
    let _ = writeln!(o);
}

/// The columns of [`STEP_HEADER`] that hold user text: the step's name and the ids of the
/// sources lit.
const STEP_USER_COLUMNS: [usize; 2] = [0, 2];

/// Text from the user's files, or library wording that may quote it: escaped for Markdown.
fn user(s: &str) -> String {
    escape::markdown(s)
}

/// Text formatted here from numbers and fixed words: only the table separator is escaped.
fn cell(s: &str) -> String {
    s.replace('|', "\\|")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_user_columns_of_the_step_table_are_the_name_and_the_sources_lit() {
        assert_eq!(STEP_USER_COLUMNS.map(|i| STEP_HEADER[i]), ["step", "lit"]);
    }
}
