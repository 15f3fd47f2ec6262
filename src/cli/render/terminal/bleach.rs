//! The terminal tables of `retidose bleach`: a bleaching run and a rod flash response.

use std::fmt::Write;

use retidose::pigment::bleach::{BleachReport, FlashResponse, Threshold};
use retidose::pigment::kinetics::Pigment;

use super::{duration_text, notes_and_caution};
use crate::cli::render::escape::terminal_line;
use crate::cli::render::{CAUTION, num};

/// The terminal table of a bleaching run.
pub fn table(r: &BleachReport) -> String {
    let mut o = String::new();
    parameters(&mut o, r);
    phases(&mut o, r);
    summary(&mut o, r);
    recoveries(&mut o, r);
    if let Some(sat) = &r.saturation {
        let _ = writeln!(o, "Saturation: {}", terminal_line(sat));
    }
    for th in &r.thresholds {
        threshold(&mut o, th);
    }
    notes_and_caution(&mut o, &r.notes);
    o
}

/// Receptor, model, kinetic parameters and the schedule's length.
fn parameters(o: &mut String, r: &BleachReport) {
    let _ = writeln!(o, "retidose bleach: {} ({} model)", terminal_line(&r.receptor), r.model.name());
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
}

/// One line per phase: its level and the bleached fraction at the end of its last step.
fn phases(o: &mut String, r: &BleachReport) {
    let unit = r.level_unit.symbol();
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
            terminal_line(&p.name),
            p.steps,
            format!("{} {unit}", num(p.level)),
            100.0 * p.end,
            100.0 * p.max_end,
            100.0 * p.steady_state
        );
    }
}

/// Bleached fraction at the end, at the peak and on average.
fn summary(o: &mut String, r: &BleachReport) {
    let s = &r.summary;
    let _ = writeln!(
        o,
        "\nBleached at the end {:.4} %, peak {:.4} % at {}, time-weighted mean {:.4} %",
        100.0 * s.end,
        100.0 * s.peak,
        duration_text(s.peak_s),
        100.0 * s.mean
    );
}

/// Recovery after each lights-off (the first and the last when there are several).
fn recoveries(o: &mut String, r: &BleachReport) {
    let t = |x: Option<f64>| match x {
        None => "not reached before the light rose again".to_string(),
        Some(0.0) => "already at lights-off".to_string(),
        Some(s) => format!("after {}", duration_text(s)),
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
            "Recovery after {which} (end of '{}', t = {}, {:.4} % bleached), under the conditions that follow: 90 % regenerated {}, 95 % {}, 99 % {}{}",
            terminal_line(&rec.after_step),
            duration_text(rec.from_s),
            100.0 * rec.bleached_at_start,
            t(rec.to_90_s),
            t(rec.to_95_s),
            t(rec.to_99_s),
            if rec.past_end { " (past the end of the schedule)" } else { "" }
        );
    }
}

/// A rod threshold estimate: log elevation every 10 min, and when it is back within 0.1 log.
fn threshold(o: &mut String, th: &Threshold) {
    let _ = writeln!(o, "\nRod threshold estimate — {}", terminal_line(&th.basis));
    let pts: Vec<String> = th
        .curve
        .iter()
        .filter(|p| (p.0 as usize).is_multiple_of(10) && p.0 <= 60.0)
        .map(|p| format!("{} min: {:.2}", p.0, p.1))
        .collect();
    let _ = writeln!(o, "  log elevation  {}", pts.join(", "));
    match th.to_within_0_1_log_min {
        Some(m) => {
            let _ =
                writeln!(o, "  within 0.1 log units of absolute threshold after about {m} min (estimate)");
        }
        None => {
            let _ = writeln!(o, "  not within 0.1 log units after 120 min (estimate)");
        }
    }
}

/// A rod flash response as a table.
pub fn flash(p: &Pigment, r: &FlashResponse) -> String {
    let mut o = String::new();
    let _ = writeln!(
        o,
        "retidose bleach: rod response estimate for {} to a flash of {} R*/rod",
        terminal_line(&p.id),
        num(r.phi)
    );
    let _ = writeln!(o, "  basis        {}", terminal_line(&r.basis));
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
