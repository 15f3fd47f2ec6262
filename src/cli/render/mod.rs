//! Renderers: every output of the `retidose` binary, read from the library's report
//! structures. One module per format:
//!
//! | module | what |
//! |---|---|
//! | [`terminal`] | tables for the terminal, one file per command |
//! | [`json`] | JSON documents with stable field names, one file per command |
//! | [`csv`] | the retinal spectrum (`retina`), the time course (`bleach`) and `assess` |
//! | [`markdown`] | the `assess` report in Markdown |
//! | [`html`] | the `assess` report as one self-contained HTML file, its plots from `svg` |
//!
//! This module holds what several formats share: number formatting, the caution printed under
//! every report, and the wording of the `assess` report (verdicts, schedule steps, pupil rule,
//! guidance basis, recovery).

pub mod compare_doc;
pub mod csv;
pub mod csv_long;
pub mod escape;
pub mod html;
pub mod json;
pub mod markdown;
pub mod room;
pub mod svg;
pub mod terminal;

use std::fmt::Write;

use retidose::assess::{Assessment, GuidanceBasis, GuidanceRow};
use retidose::limits::{HazardResult, TMax, Verdict};
use retidose::spectrum::Basis;

/// Each caution as a "Caution. …" paragraph wrapped to `width` (at most 100 columns), each
/// followed by an empty line: the same block on top of every command's terminal report.
pub fn caution_block<'a>(cautions: impl IntoIterator<Item = &'a str>, width: usize) -> String {
    let mut out = String::new();
    for caution in cautions {
        out.push_str(&textwrap::fill(
            &format!("Caution. {}", escape::terminal_line(caution)),
            width.min(100),
        ));
        out.push_str("\n\n");
    }
    out
}

/// The caution printed under every report.
pub const CAUTION: &str = "retidose informs; it does not replace the standards, a qualified optical-radiation \
assessment, veterinary advice or local regulations. Check results with your optical safety officer, \
veterinarian or review board before relying on them.";

/// Formats a number as the reports write it everywhere: 4 significant digits; thousands
/// grouped with a space from 10 000 (`16 950`, `720 100`); scientific notation below 0.001 and
/// from a million (`3.281e-6`, `4.156e6`); "0" for zero.
pub fn num(v: f64) -> String {
    if v == 0.0 {
        return "0".to_string();
    }
    if !v.is_finite() {
        return if v.is_nan() {
            "—".into()
        } else if v > 0.0 {
            "∞".into()
        } else {
            "−∞".into()
        };
    }
    // The exponent after rounding to 4 significant digits (0.99996 is 1.000, not 0.9999 or 1.0000).
    let sci = format!("{v:.3e}");
    let exp: i32 = sci.split('e').nth(1).and_then(|e| e.parse().ok()).unwrap_or(0);
    if !(-3..6).contains(&exp) {
        return sci;
    }
    if exp >= 4 {
        let step = 10f64.powi(exp - 3);
        return group_thousands(&format!("{:.0}", (v / step).round() * step));
    }
    let decimals = (3 - exp).max(0) as usize;
    format!("{v:.decimals$}")
}

/// An integer's digits grouped by three with a space (`-16950` → `-16 950`).
fn group_thousands(int: &str) -> String {
    let (sign, digits) = int.split_at(usize::from(int.starts_with('-')));
    let mut out = String::from(sign);
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(' ');
        }
        out.push(c);
    }
    out
}

/// A duration as a person writes it: "45 s", "0.25 s", "2 min 13 s", "12 min", "5 h 5 min",
/// "6 d 12 h"; "—" when not finite.
pub fn duration(s: f64) -> String {
    retidose::base::units::duration_text(s)
}

/// The name of a spectrum's basis.
fn basis_name(b: Basis) -> &'static str {
    match b {
        Basis::Energy => "energy",
        Basis::Photon => "photon",
    }
}

/// A limit verdict in a few words (the `assess` report); an exceedance found on a partly
/// covered band says so.
fn verdict_word(h: &HazardResult) -> &'static str {
    match (&h.verdict, h.partial) {
        (Verdict::Within, _) if h.near_limit_on_coarse_spectrum => "within limit (near it, coarse spectrum)",
        (Verdict::Within, _) => "within limit",
        (Verdict::Exceeds, false) if h.near_limit_on_coarse_spectrum => {
            "EXCEEDS (near the limit, coarse spectrum)"
        }
        (Verdict::Exceeds, false) => "EXCEEDS",
        (Verdict::Exceeds, true) => "EXCEEDS on the measured band alone",
        (Verdict::NotAssessed(_), _) => "not assessed",
        (Verdict::NotApplicable(_), _) => "not applicable",
    }
}

/// The notes about a source's data that a reader must see beside its figures: an assumption
/// the user stated, and sampling too coarse for the spectrum or near a limit.
fn data_notes(notes: &[String]) -> impl Iterator<Item = &String> {
    notes.iter().filter(|n| retidose::cornea::is_data_note(n))
}

/// The averaging field of view and C_α a hazard used, each with its status and, when it was
/// the stricter of unsettled candidates, a mark; "—" when neither applies.
fn fov_and_c_alpha(h: &HazardResult) -> String {
    let tag = |p: &Option<retidose::limits::Provenance>| {
        p.as_ref().map_or(String::new(), |p| {
            format!(" [{}{}]", p.tag(), if p.stricter_choice.is_some() { ", stricter choice" } else { "" })
        })
    };
    let mut parts = Vec::new();
    if let Some(g) = h.field_of_view_rad {
        parts.push(format!("field {} mrad{}", num(g * 1e3), tag(&h.field_of_view_provenance)));
    }
    if let Some(c) = h.c_alpha {
        parts.push(format!("C_α {}{}", num(c), tag(&h.c_alpha_provenance)));
    }
    if parts.is_empty() { "—".into() } else { parts.join("; ") }
}

/// The maximum exposure time in words, the same in every report: "5 h 5 min" (with "at most"
/// when the band is only partly covered), "not reached within 8 h 20 min", "never reached",
/// "exceeded before 0.25 s"; "—" when there is none.
pub fn t_max_words(t: &Option<TMax>, partial: bool) -> String {
    match t {
        None => "—".into(),
        Some(TMax::Seconds(s)) if partial => format!("at most {}", duration(*s)),
        Some(TMax::Seconds(s)) => duration(*s),
        Some(TMax::NotReached(u)) if u.is_infinite() => "never reached".into(),
        Some(TMax::NotReached(u)) => format!("not reached within {}", duration(*u)),
        Some(TMax::BelowRange(s)) => format!("exceeded before {}", duration(*s)),
    }
}

/// The maximum exposure time of a hazard (see [`t_max_words`]).
fn t_max(h: &HazardResult) -> String {
    t_max_words(&h.t_max, h.partial)
}

/// The columns of [`step_rows`].
const STEP_HEADER: [&str; 8] = [
    "step",
    "phase",
    "lit",
    "pupil",
    "room lx",
    "lx at eye",
    "melanopic EDI / rod R*/rod/s",
    "pigment level",
];

/// One row per schedule step of one cycle.
fn step_rows(a: &Assessment) -> Vec<Vec<String>> {
    let unit = a.bleach.as_ref().map_or("", |b| b.level_unit.symbol());
    a.steps
        .iter()
        .map(|s| {
            vec![
                s.name.clone(),
                s.phase.map_or("— (none)".into(), |p| p.name().to_string()),
                if s.on.is_empty() { "nothing".into() } else { s.on.join(" + ") },
                format!("{} mm", num(s.pupil.diameter.get::<uom::si::length::millimeter>())),
                num(s.room_illuminance.get::<uom::si::illuminance::lux>()),
                num(s.illuminance.get::<uom::si::illuminance::lux>()),
                match (s.melanopic_edi, s.rod_rate) {
                    (Some(e), _) => format!("{} lx mEDI", num(e.get::<uom::si::illuminance::lux>())),
                    (None, Some(r)) => format!("{} R*/rod/s", num(r.get::<uom::si::frequency::hertz>())),
                    _ => "—".into(),
                },
                format!("{} {unit}", num(s.level)),
            ]
        })
        .collect()
}

/// The pupil rule of each phase, in words.
fn pupil_line(a: &Assessment) -> Option<String> {
    use retidose::scenario::file::DarkPupilBasis;
    let p = a.pupils.as_ref()?;
    let mm = |x: &retidose::retina::pupil::Pupil| num(x.diameter.get::<uom::si::length::millimeter>());
    let mut line =
        format!("Pupil: {} mm in the light phase and unphased steps ({})", mm(&p.light), p.light.basis);
    if let Some(d) = &p.dark {
        let why = match p.dark_basis {
            DarkPupilBasis::Stated => "the scenario's dark_pupil",
            DarkPupilBasis::RodentDarkAdapted => {
                "a rodent in the dark phase: the dark-adapted pupil, unless [subject] gives dark_pupil"
            }
            DarkPupilBasis::SameAsLight => {
                "the same rule as the light phase, unless [subject] gives dark_pupil"
            }
        };
        let _ = write!(line, "; {} mm in dark-phase steps ({}; {why})", mm(d), d.basis);
    }
    Some(line)
}

/// Where a guidance comparison was made, in words.
fn basis_text(g: &GuidanceRow) -> String {
    match &g.basis {
        GuidanceBasis::Step(s) => format!("{} (step '{s}')", g.phase.name()),
        GuidanceBasis::Survey { rack, outside, positions } => {
            format!("{}: rack {rack}, {outside} of {positions} positions outside", g.phase.name())
        }
    }
}

/// Recovery after the last lights-off, in words.
fn recovery_text(b: &retidose::pigment::bleach::BleachReport) -> String {
    let t = |x: Option<f64>| match x {
        None => "not reached before the light rose again".to_string(),
        Some(0.0) => "already at lights-off".to_string(),
        Some(s) => format!("after {}", dur(s)),
    };
    match b.recoveries.last() {
        Some(r) => format!(
            "after lights-off (end of '{}', {} % bleached) 90 % regenerated {}, 99 % {}",
            r.after_step,
            num(100.0 * r.bleached_at_start),
            t(r.to_90_s),
            t(r.to_99_s)
        ),
        None => "no lights-off in the schedule".to_string(),
    }
}

/// A duration in words (see [`duration`]).
fn dur(s: f64) -> String {
    duration(s)
}

/// The report's opening in words, the same in every format: the outcome and what it means for
/// the exit status, each exceedance (where and by how much), each raised guidance flag, each
/// rack's light-phase verdict, and how many items were not assessed.
pub fn summary_lines(a: &Assessment) -> Vec<String> {
    let mut out = vec![outcome_sentence(a)];
    for l in &a.limits {
        for h in l.hazards.iter().filter(|h| h.verdict == Verdict::Exceeds) {
            let by = h.ratio.or(h.lower_bound_ratio).map_or(String::new(), |r| format!(" by {}×", num(r)));
            let part = if h.partial { " (on the measured band alone: a lower bound)" } else { "" };
            out.push(format!("{}: {} exceeds the {} limit{by}{part}.", l.source, h.name, l.set_id));
        }
    }
    let within: Vec<&HazardResult> =
        a.limits.iter().flat_map(|l| &l.hazards).filter(|h| h.verdict == Verdict::Within).collect();
    if let Some(h) = within
        .iter()
        .filter(|h| h.ratio.is_some())
        .max_by(|x, y| x.ratio.unwrap_or(0.0).total_cmp(&y.ratio.unwrap_or(0.0)))
    {
        out.push(format!(
            "{} hazard check(s) within their limits; the closest is {} for {} at a ratio of {} to its limit.",
            within.len(),
            h.name,
            h.source,
            num(h.ratio.unwrap_or(0.0))
        ));
    }
    for g in a.guidance.iter().filter(|g| g.flag.raised) {
        out.push(format!("Guidance flag — {}: {} ({}).", g.flag.name, g.flag.message, basis_text(g)));
    }
    if let Some(room) = &a.room {
        for r in &room.racks {
            let s = &r.summary;
            if r.bounds.lower.is_some() || r.bounds.upper.is_some() {
                out.push(format!(
                    "Rack {}: {} of {} positions below and {} above the guidance range; {} with dark-phase light.",
                    r.id, s.below, s.positions, s.above, s.dark_flagged
                ));
            }
        }
    }
    if !a.not_assessed.is_empty() {
        out.push(format!(
            "{} item(s) not assessed; the reasons are listed under Not assessed.",
            a.not_assessed.len()
        ));
    }
    out
}

/// The outcome in one sentence.
fn outcome_sentence(a: &Assessment) -> String {
    if a.limit_exceeded {
        "Outcome: a limit is exceeded (a scenario file with this outcome exits with status 1).".to_string()
    } else if a.flag_raised {
        "Outcome: a guidance flag is raised (a scenario file with this outcome exits with status 1)."
            .to_string()
    } else {
        "Outcome: no limit exceeded and no guidance flag raised among the items assessed (exit status 0)."
            .to_string()
    }
}

/// The rows of the "what reaches the eye" tables, shared by Markdown and HTML: per source its
/// label, corneal illuminance, photopic and scotopic trolands and rod R*/rod/s; then per source
/// and α-opic channel its label, the channel and the value (CIE S 026 EDI for people; photon
/// irradiance and equivalent daylight for rodents), "≥ " before a value whose band the spectrum
/// covers only in part (a lower bound). Labels are user text: escape them.
pub fn eye_rows(r: &retidose::retina::report::RetinaReport) -> (Vec<[String; 5]>, Vec<[String; 3]>) {
    use retidose::base::quantity::{SiValue, as_td_f64};
    let mut eye = Vec::new();
    let mut opic = Vec::new();
    for s in &r.sources {
        let ret = s.retinal.as_ref();
        let rod = ret
            .and_then(|x| x.catch.iter().find(|c| c.receptor == "rod"))
            .map_or("—".into(), |c| num(c.rate.si()));
        eye.push([
            s.label.clone(),
            s.illuminance.value.map_or("—".into(), |v| format!("{} lx", num(v.si_value()))),
            ret.map_or("—".into(), |x| num(as_td_f64(x.trolands.photopic))),
            ret.map_or("—".into(), |x| num(as_td_f64(x.trolands.scotopic))),
            rod,
        ]);
        let at_least = |c: &retidose::spectrum::Coverage| if c.matters() { "≥ " } else { "" };
        for x in &s.human_alpha_opic {
            let v = x
                .edi
                .map_or("—".into(), |e| format!("{}{} lx EDI", at_least(&x.coverage), num(e.si_value())));
            opic.push([s.label.clone(), x.name.clone(), v]);
        }
        for x in &s.species_opic {
            let v = format!(
                "{}{} photons/cm²/s ({} lx equivalent daylight)",
                at_least(&x.coverage),
                num(x.photon_irradiance.si() * 1e-4),
                num(x.equivalent_daylight.get::<uom::si::illuminance::lux>())
            );
            opic.push([s.label.clone(), x.channel.clone(), v]);
        }
    }
    (eye, opic)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_have_4_significant_digits_grouped_or_scientific() {
        let cases = [
            (0.0, "0"),
            (0.001515, "0.001515"),
            (0.0009999, "9.999e-4"),
            (0.99996, "1.000"),
            (12.5, "12.50"),
            (6642.2, "6642"),
            (9999.6, "10 000"),
            (16948.0, "16 950"),
            (101875.079, "101 900"),
            (-720113.0, "-720 100"),
            (999_950.0, "1.000e6"),
            (4155814.372, "4.156e6"),
            (1.642e-96, "1.642e-96"),
        ];
        for (v, text) in cases {
            assert_eq!(num(v), text, "{v}");
        }
    }

    #[test]
    fn durations_read_as_a_person_writes_them() {
        let cases = [
            (0.25, "0.25 s"),
            (0.0022, "0.0022 s"),
            (1.5, "1.5 s"),
            (45.0, "45 s"),
            (59.6, "1 min"),
            (132.5, "2 min 13 s"),
            (720.0, "12 min"),
            (3599.0, "1 h"),
            (18299.0, "5 h 5 min"),
            (28800.0, "8 h"),
            (30000.0, "8 h 20 min"),
            (156.0 * 3600.0, "6 d 12 h"),
            (f64::INFINITY, "—"),
        ];
        for (s, text) in cases {
            assert_eq!(duration(s), text, "{s}");
        }
    }

    #[test]
    fn t_max_has_one_wording() {
        assert_eq!(t_max_words(&Some(TMax::Seconds(18299.0)), false), "5 h 5 min");
        assert_eq!(t_max_words(&Some(TMax::Seconds(600.0)), true), "at most 10 min");
        assert_eq!(t_max_words(&Some(TMax::NotReached(30000.0)), false), "not reached within 8 h 20 min");
        assert_eq!(t_max_words(&Some(TMax::NotReached(f64::INFINITY)), false), "never reached");
        assert_eq!(t_max_words(&Some(TMax::BelowRange(0.25)), false), "exceeded before 0.25 s");
        assert_eq!(t_max_words(&None, false), "—");
    }
}
