//! The terminal text of `retidose bleach`: a bleaching run and a rod flash response, fitted to
//! the terminal's width.

use retidose::pigment::bleach::{BleachReport, FlashResponse, Threshold};
use retidose::pigment::kinetics::Pigment;

use super::{Page, Table, percent};
use crate::cli::render::{CAUTION, duration, num};

/// The terminal text of a bleaching run.
pub fn table(r: &BleachReport) -> String {
    table_at(r, super::width())
}

/// The terminal text of a bleaching run, fitted to `width` columns.
pub fn table_at(r: &BleachReport, width: usize) -> String {
    let mut o = Page::new(width, false);
    parameters(&mut o, r);
    phases(&mut o, r);
    summary(&mut o, r);
    recoveries(&mut o, r);
    if let Some(sat) = &r.saturation {
        o.para(&format!("Saturation: {sat}"), "");
    }
    for th in &r.thresholds {
        threshold(&mut o, th);
    }
    o.notes_and_caution(&r.notes);
    o.finish()
}

/// Receptor, model, kinetic parameters and the schedule's length.
fn parameters(o: &mut Page, r: &BleachReport) {
    o.heading(&format!("retidose bleach: {} ({} model)", r.receptor, r.model.name()), true);
    let memo = if r.from_memory.is_empty() {
        String::new()
    } else {
        format!("  [from memory: {}]", r.from_memory.join(", "))
    };
    o.field(
        "  ",
        "parameters",
        11,
        &format!(
            "τ0 {} s, v {} /min, K_m {}{memo}",
            num(r.constants.tau0_s),
            num(r.constants.v_per_s * 60.0),
            num(r.constants.k_m)
        ),
    );
    o.field("  ", "schedule", 11, &format!("{} steps, {}", r.steps, duration(r.total_s)));
}

/// One row per phase: its level and the bleached fraction at the end of its last step.
fn phases(o: &mut Page, r: &BleachReport) {
    let unit = r.level_unit.symbol();
    o.heading("Phases (bleached at the end of the last step of each)", false);
    let mut t = Table::new(&["phase", "steps", "level", "bleached at end", "most at an end", "steady state"]);
    for p in &r.phases {
        t.row(vec![
            p.name.clone(),
            p.steps.to_string(),
            format!("{} {unit}", num(p.level)),
            percent(p.end),
            percent(p.max_end),
            percent(p.steady_state),
        ]);
    }
    o.table(&t);
}

/// Bleached fraction at the end, at the peak and on average.
fn summary(o: &mut Page, r: &BleachReport) {
    let s = &r.summary;
    o.para(
        &format!(
            "Bleached at the end {}, at the peak {} (at {}), time-weighted mean {}.",
            percent(s.end),
            percent(s.peak),
            duration(s.peak_s),
            percent(s.mean)
        ),
        "",
    );
}

/// Recovery after each lights-off (the first and the last when there are several).
fn recoveries(o: &mut Page, r: &BleachReport) {
    let t = |x: Option<f64>| match x {
        None => "not reached before the light rose again".to_string(),
        Some(0.0) => "already at lights-off".to_string(),
        Some(s) => format!("after {}", duration(s)),
    };
    if r.recoveries.is_empty() {
        o.para("Recovery: no lights-off in the schedule (no step is followed by a dimmer one)", "");
    }
    for (i, rec) in r.recoveries.iter().enumerate() {
        let which = match (i, r.lights_off) {
            (_, 1) => "the lights-off",
            (0, _) => "the first lights-off",
            _ => "the last lights-off",
        };
        o.para(
            &format!(
                "Recovery after {which} (end of '{}', at {}, {} bleached), under the conditions that follow: 90 % regenerated {}, 95 % {}, 99 % {}{}.",
                rec.after_step,
                duration(rec.from_s),
                percent(rec.bleached_at_start),
                t(rec.to_90_s),
                t(rec.to_95_s),
                t(rec.to_99_s),
                if rec.past_end { " (past the end of the schedule)" } else { "" }
            ),
            "",
        );
    }
}

/// A rod threshold estimate: log elevation every 10 min, and when it is back within 0.1 log.
fn threshold(o: &mut Page, th: &Threshold) {
    o.heading("Rod threshold estimate", false);
    o.field("  ", "basis", 14, &th.basis);
    let pts: Vec<String> = th
        .curve
        .iter()
        .filter(|p| (p.0 as usize).is_multiple_of(10) && p.0 <= 60.0)
        .map(|p| format!("{} min: {:.2}", p.0, p.1))
        .collect();
    o.field("  ", "log elevation", 14, &pts.join(", "));
    let when = match th.to_within_0_1_log_min {
        Some(m) => format!(
            "within 0.1 log units of absolute threshold after about {} (estimate)",
            duration(m * 60.0)
        ),
        None => "not within 0.1 log units after 2 h (estimate)".to_string(),
    };
    o.field("  ", "", 14, &when);
}

/// A rod flash response.
pub fn flash(p: &Pigment, r: &FlashResponse) -> String {
    flash_at(p, r, super::width())
}

/// A rod flash response, fitted to `width` columns.
pub fn flash_at(p: &Pigment, r: &FlashResponse, width: usize) -> String {
    let mut o = Page::new(width, false);
    o.heading(
        &format!("retidose bleach: rod response estimate for {} to a flash of {} R*/rod", p.id, num(r.phi)),
        true,
    );
    o.field("  ", "basis", 11, &r.basis);
    o.field(
        "  ",
        "suppression",
        11,
        &format!(
            "50 % of the circulating current at {} ms, 95 % at {} ms",
            num(r.t_half_s * 1e3),
            num(r.t_95_s * 1e3)
        ),
    );
    o.field("  ", "saturating", 11, if r.saturating { "yes (95 % within 100 ms)" } else { "no" });
    let pts: Vec<String> =
        r.curve.iter().step_by(10).map(|(t, x)| format!("{} ms: {}", num(t * 1e3), percent(*x))).collect();
    o.field("  ", "suppressed", 11, &pts.join(", "));
    o.blank();
    o.para("This is an estimate of the response's rising phase, not a measurement.", "");
    o.para(CAUTION, "");
    o.finish()
}
