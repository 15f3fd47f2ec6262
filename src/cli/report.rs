//! Renderers of the [`Assessment`] of `retidose assess`: terminal, JSON, CSV, Markdown and a
//! self-contained HTML file with inline SVG plots. All read the same structure.

use std::fmt::Write;

use retidose::assess::{Assessment, GuidanceBasis, GuidanceRow};
use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::limits::{TMax, Verdict, find_weighting};
use serde_json::{Value, json};
use tabled::builder::Builder;
use tabled::settings::Style;

use super::render::num;

/// Whether to colour terminal output: only on a terminal and when NO_COLOR is unset.
pub fn use_colour() -> bool {
    use std::io::IsTerminal;
    std::env::var_os("NO_COLOR").is_none() && std::io::stdout().is_terminal()
}

fn paint(text: &str, code: &str, colour: bool) -> String {
    if colour { format!("\x1b[{code}m{text}\x1b[0m") } else { text.to_string() }
}

fn verdict_word(v: &Verdict) -> &'static str {
    match v {
        Verdict::Within => "within limit",
        Verdict::Exceeds => "EXCEEDS",
        Verdict::NotAssessed(_) => "not assessed",
        Verdict::NotApplicable(_) => "not applicable",
    }
}

fn t_max(t: &Option<TMax>) -> String {
    match t {
        None => "—".into(),
        Some(TMax::Seconds(s)) => format!("{} s", num(*s)),
        Some(TMax::NotReached(u)) if u.is_infinite() => "no limit".into(),
        Some(TMax::NotReached(u)) => format!("> {} s", num(*u)),
        Some(TMax::BelowRange(s)) => format!("< {} s", num(*s)),
    }
}

fn table(header: &[&str], rows: Vec<Vec<String>>) -> String {
    let mut b = Builder::default();
    b.push_record(header.iter().map(|h| h.to_string()));
    for r in rows {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    t.to_string()
}

/// The terminal summary.
pub fn terminal(all: &[Assessment], colour: bool) -> String {
    let mut o = String::new();
    for (i, a) in all.iter().enumerate() {
        if i > 0 {
            let _ = writeln!(o, "\n{}\n", "═".repeat(78));
        }
        let _ = writeln!(o, "{}", paint(&format!("retidose assess — {}", a.title), "1", colour));
        if let Some(d) = &a.description {
            let _ = writeln!(o, "{d}");
        }
        let _ = writeln!(o);
        for c in &a.cautions {
            let _ = writeln!(o, "! {c}");
        }
        if let Some(r) = &a.retina {
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
                        s.label.clone(),
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
            if !r.species_opic.is_empty() {
                let rows = r
                    .species_opic
                    .iter()
                    .map(|c| {
                        vec![
                            c.channel.clone(),
                            format!("{} nm", num(c.lambda_max_nm)),
                            num(c.photon_irradiance.si()),
                            num(c.equivalent_daylight.si()),
                        ]
                    })
                    .collect();
                let _ = writeln!(
                    o,
                    "{} α-opic quantities, all sources (retidose method, not a CIE quantity)",
                    r.species.name()
                );
                let _ =
                    writeln!(o, "{}", table(&["channel", "λmax", "photons·m⁻²·s⁻¹", "equiv. D65 lx"], rows));
            }
            if !r.human_alpha_opic.is_empty() {
                let rows = r
                    .human_alpha_opic
                    .iter()
                    .map(|a| {
                        vec![
                            a.name.clone(),
                            a.edi.map_or("—".into(), |e| num(e.si_value())),
                            a.der.map_or("—".into(), num),
                        ]
                    })
                    .collect();
                let _ = writeln!(o, "CIE S 026 α-opic, all sources");
                let _ = writeln!(o, "{}", table(&["quantity", "EDI", "DER"], rows));
            }
        }
        if let Some(line) = pupil_line(a) {
            let _ = writeln!(o, "\n{line}");
        }
        if !a.steps.is_empty() {
            let _ = writeln!(
                o,
                "\nSchedule steps (one cycle): what is lit, through every filter, with the pupil of the step's phase"
            );
            let _ = writeln!(o, "{}", table(&STEP_HEADER, step_rows(a)));
        }
        if let Some(b) = &a.bleach {
            let _ = writeln!(o, "\nPigment ({}, {} model)", b.receptor, b.model.name());
            let rows = b
                .phases
                .iter()
                .map(|p| {
                    vec![
                        p.name.clone(),
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
                recovery_text(b)
            );
            if let Some(th) = b.thresholds.first() {
                let _ = writeln!(
                    o,
                    "rod threshold within 0.1 log units after ~{} (estimate: {})",
                    th.to_within_0_1_log_min.map_or("> 120 min".into(), |m| format!("{m} min")),
                    th.basis
                );
            }
            if let Some(s) = &b.saturation {
                let _ = writeln!(o, "{s}");
            }
        }
        for (src, l) in &a.limits {
            let _ =
                writeln!(o, "\nExposure limits: {src} against {} for {} s", l.set_id, num(l.duration.si()));
            let rows = l
                .hazards
                .iter()
                .map(|h| {
                    let v = verdict_word(&h.verdict);
                    let v = match h.verdict {
                        Verdict::Exceeds => paint(v, "31;1", colour),
                        Verdict::Within => paint(v, "32", colour),
                        _ => paint(v, "33", colour),
                    };
                    vec![
                        h.name.clone(),
                        h.clause.clone(),
                        h.ratio.map_or("—".into(), num),
                        t_max(&h.t_max),
                        format!("{v}{}", if h.from_memory.is_empty() { "" } else { " [from memory]" }),
                    ]
                })
                .collect();
            let _ = writeln!(o, "{}", table(&["hazard", "clause", "ratio", "t_max", "verdict"], rows));
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
            }
        }
        if !a.guidance.is_empty() {
            let _ = writeln!(o, "\nGuidance");
            let rows = a
                .guidance
                .iter()
                .map(|g| {
                    let (phase, f) = (basis_text(g), &g.flag);
                    vec![
                        f.set.clone(),
                        phase.clone(),
                        f.name.clone(),
                        if f.raised { paint("FLAG", "33;1", colour) } else { "ok".into() },
                        f.message.clone(),
                    ]
                })
                .collect();
            let _ = writeln!(o, "{}", table(&["set", "phase", "rule", "", "comparison"], rows));
        }
        for e in &a.evidence {
            let _ = writeln!(o, "evidence (not a limit): {}: {} — {}", e.name, e.value, e.source);
        }
        if let Some(s) = &a.survey {
            let _ = writeln!(o, "\nHousing survey: {} × {} positions; {}", s.shelves, s.columns, s.mode);
            let _ = writeln!(
                o,
                "room lux at cage level (the NRC Guide's quantity) by shelf (top first), then column:"
            );
            let mut rows = Vec::new();
            for shelf in (1..=s.shelves).rev() {
                let mut row = vec![format!("shelf {shelf}")];
                for p in s.positions.iter().filter(|p| p.position.shelf == shelf) {
                    let light_flag = p.flags.iter().any(|f| f != "dark-phase");
                    let cell = format!("{:.0}{}", p.room_lux, if light_flag { "*" } else { "" });
                    row.push(if light_flag { paint(&cell, "33", colour) } else { cell });
                }
                rows.push(row);
            }
            let header: Vec<String> =
                std::iter::once(String::new()).chain((1..=s.columns).map(|c| format!("col {c}"))).collect();
            let refs: Vec<&str> = header.iter().map(String::as_str).collect();
            let _ = writeln!(o, "{}", table(&refs, rows));
            let top = s.positions.iter().max_by(|a, b| a.room_lux.total_cmp(&b.room_lux));
            if let Some(t) = top {
                let _ = writeln!(
                    o,
                    "brightest cage: shelf {} col {}: {} lx room, {} lx in the cage, rod {} R*/rod/s, steady bleach {:.3} %",
                    t.position.shelf,
                    t.position.column,
                    num(t.room_lux),
                    num(t.cage_lux),
                    num(t.rod_rate),
                    100.0 * t.light_bleach
                );
            }
            let light = s.positions.iter().filter(|p| p.flags.iter().any(|f| f != "dark-phase")).count();
            let dark = s.positions.iter().filter(|p| p.flags.iter().any(|f| f == "dark-phase")).count();
            let _ = writeln!(
                o,
                "max/min over the rack {}×; {light} of {} positions outside the light-phase guidance (*), {dark} with dark-phase light",
                num(s.max_over_min),
                s.positions.len()
            );
        }
        let _ = writeln!(o, "\nSources of limits and guidance");
        for p in &a.provenance {
            let _ = writeln!(o, "  - {}: {} ({}) — {}", p.role, p.document, p.edition, p.status);
        }
        let _ = writeln!(o, "\nNot assessed");
        if a.not_assessed.is_empty() {
            let _ = writeln!(o, "  (nothing)");
        }
        for n in &a.not_assessed {
            let _ = writeln!(o, "  - {n}");
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
    o
}

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
        GuidanceBasis::Survey { outside, positions } => {
            format!("{}: survey, {outside} of {positions} positions outside", g.phase.name())
        }
    }
}

/// Recovery after the last lights-off, in words.
fn recovery_text(b: &retidose::pigment::bleach::BleachReport) -> String {
    let t = |x: Option<f64>| x.map_or_else(|| "not reached before the light rose again".to_string(), dur);
    match b.recoveries.last() {
        Some(r) => format!(
            "after lights-off (end of '{}', {:.3} % bleached) 90 % regenerated in {}, 99 % in {}",
            r.after_step,
            100.0 * r.bleached_at_start,
            t(r.to_90_s),
            t(r.to_99_s)
        ),
        None => "no lights-off in the schedule".to_string(),
    }
}

fn dur(s: f64) -> String {
    if !s.is_finite() {
        "—".into()
    } else if s >= 3600.0 {
        format!("{} h", num(s / 3600.0))
    } else if s >= 60.0 {
        format!("{} min", num(s / 60.0))
    } else {
        format!("{} s", num(s))
    }
}

/// The JSON document (schema `retidose.assessment/1`; an array when several scenarios ran).
pub fn json_doc(all: &[Assessment]) -> String {
    let docs: Vec<Value> = all.iter().map(one_json).collect();
    let v = if docs.len() == 1 { docs.into_iter().next().unwrap_or(Value::Null) } else { Value::Array(docs) };
    let mut s = serde_json::to_string_pretty(&v).unwrap_or_default();
    s.push('\n');
    s
}

fn one_json(a: &Assessment) -> Value {
    json!({
        "schema": "retidose.assessment/1",
        "name": a.name,
        "title": a.title,
        "cautions": a.cautions,
        "provenance": a.provenance.iter().map(|p| json!({"role": p.role, "document": p.document, "edition": p.edition, "status": p.status})).collect::<Vec<_>>(),
        "sources": a.retina.as_ref().map(|r| r.sources.iter().map(|s| json!({
            "label": s.label,
            "corneal_illuminance_lx": s.illuminance.value.map(|v| v.si_value()),
            "photopic_td": s.retinal.as_ref().map(|x| as_td_f64(x.trolands.photopic)),
            "scotopic_td": s.retinal.as_ref().map(|x| as_td_f64(x.trolands.scotopic)),
            "catch": s.retinal.as_ref().map(|x| x.catch.iter().map(|c| json!({"receptor": c.receptor, "r_star_per_receptor_per_s": c.rate.si()})).collect::<Vec<_>>()),
        })).collect::<Vec<_>>()),
        "species_alpha_opic": a.retina.as_ref().map(|r| r.species_opic.iter().map(|c| json!({
            "channel": c.channel, "photon_irradiance_per_m2_s": c.photon_irradiance.si(), "equivalent_daylight_lx": c.equivalent_daylight.si(),
        })).collect::<Vec<_>>()),
        "pupils": a.pupils.as_ref().map(|p| json!({
            "light_mm": p.light.diameter.get::<uom::si::length::millimeter>(), "light_basis": p.light.basis,
            "dark_mm": p.dark.as_ref().map(|d| d.diameter.get::<uom::si::length::millimeter>()),
            "dark_basis": p.dark.as_ref().map(|d| d.basis.clone()), "dark_rule": p.dark_basis,
        })),
        "steps": a.steps.iter().map(|s| json!({
            "name": s.name, "phase": s.phase, "on": s.on, "duration_s": s.duration.si(),
            "pupil_mm": s.pupil.diameter.get::<uom::si::length::millimeter>(),
            "room_illuminance_lx": s.room_illuminance.get::<uom::si::illuminance::lux>(),
            "illuminance_at_eye_lx": s.illuminance.get::<uom::si::illuminance::lux>(),
            "melanopic_edi_lx": s.melanopic_edi.map(|e| e.get::<uom::si::illuminance::lux>()),
            "rod_r_star_per_rod_per_s": s.rod_rate.map(|r| r.get::<uom::si::frequency::hertz>()),
            "pigment_level": s.level,
        })).collect::<Vec<_>>(),
        "bleach": a.bleach.as_ref().map(|b| json!({
            "receptor": b.receptor, "model": b.model.name(),
            "phases": b.phases.iter().map(|p| json!({"name": p.name, "level": p.level, "end_bleached": p.end, "steady_state_bleached": p.steady_state})).collect::<Vec<_>>(),
            "peak_bleached": b.summary.peak, "mean_bleached": b.summary.mean, "end_bleached": b.summary.end,
            "recovery_90_s": b.recoveries.last().and_then(|r| r.to_90_s), "recovery_99_s": b.recoveries.last().and_then(|r| r.to_99_s),
            "lights_off": b.lights_off, "recoveries": b.recoveries.iter().map(crate::cli::render::recovery_json).collect::<Vec<_>>(),
            "threshold_within_0_1_log_min": b.thresholds.first().and_then(|t| t.to_within_0_1_log_min),
        })),
        "limits": a.limits.iter().map(|(src, l)| json!({
            "source": src, "set": l.set_id, "duration_s": l.duration.si(),
            "hazards": l.hazards.iter().map(|h| json!({
                "id": h.id, "name": h.name, "clause": h.clause, "ratio": h.ratio,
                "verdict": verdict_word(&h.verdict), "reason": match &h.verdict { Verdict::NotAssessed(r) | Verdict::NotApplicable(r) => Some(r.clone()), _ => None },
                "from_memory": h.from_memory,
            })).collect::<Vec<_>>(),
            "risk_group": match &l.classification { Some(Ok(c)) => json!({"overall": c.overall.map(|g| g.name()), "distance_m": c.distance.si(), "e_thr_lx": c.e_thr_lx, "lower_bound": !c.not_assessed.is_empty()}), Some(Err(e)) => json!({"not_assessed": e}), None => Value::Null },
        })).collect::<Vec<_>>(),
        "guidance": a.guidance.iter().map(|g| { let f = &g.flag; json!({"set": f.set, "rule": f.rule, "phase": g.phase.name(), "step": match &g.basis { GuidanceBasis::Step(s) => Some(s), GuidanceBasis::Survey { .. } => None }, "survey_positions_outside": match g.basis { GuidanceBasis::Survey { outside, .. } => Some(outside), GuidanceBasis::Step(_) => None }, "value_lx": f.value_lx, "raised": f.raised, "message": f.message}) }).collect::<Vec<_>>(),
        "evidence": a.evidence.iter().map(|e| json!({"name": e.name, "value": e.value, "source": e.source})).collect::<Vec<_>>(),
        "survey": a.survey.as_ref().map(|s| json!({
            "shelves": s.shelves, "columns": s.columns, "mode": s.mode, "max_over_min": finite(s.max_over_min), "flagged": s.flagged,
            "positions": s.positions.iter().map(|p| json!({
                "shelf": p.position.shelf, "column": p.position.column,
                "room_lux": p.room_lux, "cage_lux": p.cage_lux, "dark_room_lux": p.dark_room_lux,
                "rod_r_star_per_s": p.rod_rate, "opic_photon_irradiance": {"rod": p.opic[0], "m_cone": p.opic[1], "uv_cone": p.opic[2], "melanopsin": p.opic[3]},
                "dark_rod_r_star_per_s": p.dark_rod_rate, "light_bleach": p.light_bleach, "dark_bleach": p.dark_bleach,
                "recovery_90_s": p.recovery_90_s, "flags": p.flags,
            })).collect::<Vec<_>>(),
        })),
        "not_assessed": a.not_assessed,
        "limit_exceeded": a.limit_exceeded,
        "flag_raised": a.flag_raised,
    })
}

fn finite(x: f64) -> Value {
    if x.is_finite() { json!(x) } else { Value::Null }
}

/// CSV: one row per cage position when there is a survey, otherwise one row per hazard.
pub fn csv(all: &[Assessment]) -> String {
    let mut o = String::new();
    let survey = all.iter().any(|a| a.survey.is_some());
    if survey {
        o.push_str("scenario,shelf,column,room_lux,cage_lux,dark_room_lux,rod_r_star_per_s,melanopsin_photons_per_m2_s,light_bleach,dark_bleach,recovery_90_s,flags\n");
        for a in all {
            for p in a.survey.iter().flat_map(|s| &s.positions) {
                let _ = writeln!(
                    o,
                    "{},{},{},{},{},{},{},{},{},{},{},{}",
                    csv_field(&a.name),
                    p.position.shelf,
                    p.position.column,
                    p.room_lux,
                    p.cage_lux,
                    p.dark_room_lux,
                    p.rod_rate,
                    p.opic[3],
                    p.light_bleach,
                    p.dark_bleach,
                    p.recovery_90_s.map_or(String::new(), |x| x.to_string()),
                    csv_field(&p.flags.join(" "))
                );
            }
        }
    } else {
        o.push_str("scenario,source,set,hazard,clause,ratio,t_max_s,verdict,reason\n");
        for a in all {
            for (src, l) in &a.limits {
                for h in &l.hazards {
                    let reason = match &h.verdict {
                        Verdict::NotAssessed(r) | Verdict::NotApplicable(r) => r.clone(),
                        _ => String::new(),
                    };
                    let tm = match h.t_max {
                        Some(TMax::Seconds(s)) => s.to_string(),
                        _ => String::new(),
                    };
                    let _ = writeln!(
                        o,
                        "{},{},{},{},{},{},{},{},{}",
                        csv_field(&a.name),
                        csv_field(src),
                        l.set_id,
                        h.id,
                        csv_field(&h.clause),
                        h.ratio.map_or(String::new(), |r| r.to_string()),
                        tm,
                        verdict_word(&h.verdict),
                        csv_field(&reason)
                    );
                }
            }
        }
    }
    o
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n']) { format!("\"{}\"", s.replace('"', "\"\"")) } else { s.to_string() }
}

/// Markdown.
pub fn markdown(all: &[Assessment]) -> String {
    // The terminal layout without colour is plain text with box tables; wrap it for Markdown.
    let mut o = String::new();
    for a in all {
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
        if !a.steps.is_empty() {
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
        if let Some(b) = &a.bleach {
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
        for (src, l) in &a.limits {
            let _ = writeln!(
                o,
                "## Exposure limits: {} against {}\n\n| hazard | clause | ratio | t_max | verdict |\n|---|---|---|---|---|",
                md(src),
                l.set_id
            );
            for h in &l.hazards {
                let _ = writeln!(
                    o,
                    "| {} | {} | {} | {} | {}{} |",
                    md(&h.name),
                    md(&h.clause),
                    h.ratio.map_or("—".into(), num),
                    t_max(&h.t_max),
                    verdict_word(&h.verdict),
                    if h.from_memory.is_empty() { "" } else { " (from memory)" }
                );
            }
            let _ = writeln!(o);
        }
        if !a.guidance.is_empty() {
            let _ = writeln!(
                o,
                "## Guidance\n\n| set | phase | rule | flag | comparison |\n|---|---|---|---|---|"
            );
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
        if let Some(s) = &a.survey {
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
        let _ = writeln!(o, "## Sources of limits and guidance\n");
        for p in &a.provenance {
            let _ = writeln!(
                o,
                "- {}: {} ({}) — {}",
                md(&p.role),
                md(&p.document),
                md(&p.edition),
                md(&p.status)
            );
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
    o
}

fn md(s: &str) -> String {
    s.replace('|', "\\|")
}

/// Escapes text for HTML.
pub fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&#39;")
}

/// A plotted line: name, colour and (x, y) points.
type Series<'a> = (&'a str, &'a str, Vec<(f64, f64)>);

fn svg_lines(title: &str, series: &[Series<'_>], x_label: &str, y_label: &str, log_y: bool) -> String {
    let (w, h, l, r, t, b) = (700.0, 300.0, 70.0, 190.0, 30.0, 40.0);
    let pts: Vec<(f64, f64)> = series
        .iter()
        .flat_map(|s| s.2.iter().copied())
        .filter(|p| p.0.is_finite() && p.1.is_finite())
        .collect();
    if pts.is_empty() {
        return String::new();
    }
    let fy = |y: f64| if log_y { y.max(1e-12).log10() } else { y };
    let (x0, x1) = pts.iter().fold((f64::MAX, f64::MIN), |a, p| (a.0.min(p.0), a.1.max(p.0)));
    let (y0, y1) = pts.iter().fold((f64::MAX, f64::MIN), |a, p| (a.0.min(fy(p.1)), a.1.max(fy(p.1))));
    let (y0, y1) = if (y1 - y0).abs() < 1e-12 { (y0 - 1.0, y1 + 1.0) } else { (y0, y1) };
    let sx = |x: f64| l + (x - x0) / (x1 - x0).max(1e-12) * (w - l - r);
    let sy = |y: f64| h - b - (fy(y) - y0) / (y1 - y0) * (h - t - b);
    let mut o = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"{}\">",
        esc(title)
    );
    let _ = write!(o, "<text x=\"{l}\" y=\"18\" font-size=\"13\" font-weight=\"bold\">{}</text>", esc(title));
    let _ = write!(
        o,
        "<line x1=\"{l}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#444\"/><line x1=\"{l}\" y1=\"{t}\" x2=\"{l}\" y2=\"{}\" stroke=\"#444\"/>",
        h - b,
        w - r,
        h - b,
        h - b
    );
    let _ = write!(
        o,
        "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">{} ({} to {})</text>",
        (l + w - r) / 2.0,
        h - 8.0,
        esc(x_label),
        num(x0),
        num(x1)
    );
    let _ = write!(
        o,
        "<text x=\"12\" y=\"{}\" font-size=\"11\" transform=\"rotate(-90 12 {})\" text-anchor=\"middle\">{}</text>",
        h / 2.0,
        h / 2.0,
        esc(y_label)
    );
    let unlog = |v: f64| if log_y { 10f64.powf(v) } else { v };
    for (v, y) in [(unlog(y1), t + 4.0), (unlog(y0), h - b)] {
        let _ = write!(
            o,
            "<text x=\"{}\" y=\"{y}\" font-size=\"10\" text-anchor=\"end\">{}</text>",
            l - 4.0,
            num(v)
        );
    }
    for (i, (name, colour, data)) in series.iter().enumerate() {
        let path: Vec<String> = data
            .iter()
            .filter(|p| p.1.is_finite())
            .map(|p| format!("{:.1},{:.1}", sx(p.0), sy(p.1)))
            .collect();
        let _ = write!(
            o,
            "<polyline fill=\"none\" stroke=\"{colour}\" stroke-width=\"1.6\" points=\"{}\"/>",
            path.join(" ")
        );
        let _ = write!(
            o,
            "<rect x=\"{}\" y=\"{}\" width=\"10\" height=\"10\" fill=\"{colour}\"/><text x=\"{}\" y=\"{}\" font-size=\"11\">{}</text>",
            w - r + 10.0,
            t + 16.0 * i as f64,
            w - r + 24.0,
            t + 9.0 + 16.0 * i as f64,
            esc(name)
        );
    }
    o.push_str("</svg>");
    o
}

fn svg_bars(title: &str, bars: &[(String, f64)]) -> String {
    let (w, bar_h, l) = (640.0, 20.0, 260.0);
    let h = 40.0 + bar_h * bars.len() as f64 + 20.0;
    let max = bars.iter().map(|b| b.1.max(1e-12).log10()).fold(0.0f64, f64::max).max(0.5);
    let min = bars.iter().map(|b| b.1.max(1e-12).log10()).fold(0.0f64, f64::min).min(-3.0);
    let sx = |v: f64| l + (v.max(1e-12).log10() - min) / (max - min) * (w - l - 40.0);
    let mut o = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"{}\">",
        esc(title)
    );
    let _ = write!(o, "<text x=\"10\" y=\"18\" font-size=\"13\" font-weight=\"bold\">{}</text>", esc(title));
    for (i, (name, v)) in bars.iter().enumerate() {
        let y = 30.0 + bar_h * i as f64;
        let colour = if *v > 1.0 { "#c62828" } else { "#2e7d32" };
        let _ = write!(
            o,
            "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"end\">{}</text>",
            l - 6.0,
            y + 14.0,
            esc(name)
        );
        let _ = write!(
            o,
            "<rect x=\"{l}\" y=\"{}\" width=\"{:.1}\" height=\"{}\" fill=\"{colour}\"/><text x=\"{:.1}\" y=\"{}\" font-size=\"10\">{}</text>",
            y + 3.0,
            (sx(*v) - l).max(1.0),
            bar_h - 6.0,
            sx(*v) + 4.0,
            y + 14.0,
            num(*v)
        );
    }
    let one = sx(1.0);
    let _ = write!(
        o,
        "<line x1=\"{one:.1}\" y1=\"26\" x2=\"{one:.1}\" y2=\"{}\" stroke=\"#000\" stroke-dasharray=\"4 3\"/><text x=\"{one:.1}\" y=\"{}\" font-size=\"10\" text-anchor=\"middle\">ratio 1 (the limit); log scale</text>",
        h - 16.0,
        h - 4.0
    );
    o.push_str("</svg>");
    o
}

fn svg_heatmap(s: &retidose::assess::SurveyResult) -> String {
    let (cell, l, t) = (56.0, 70.0, 30.0);
    let w = (l + cell * s.columns as f64 + 20.0).max(560.0);
    let h = t + cell * s.shelves as f64 + 40.0;
    let max = s.positions.iter().map(|p| p.room_lux).fold(0.0, f64::max).max(1e-9);
    let mut o = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"rack heat map\">"
    );
    let _ = write!(
        o,
        "<text x=\"10\" y=\"18\" font-size=\"13\" font-weight=\"bold\">Room lux at cage level (red outline: outside the light-phase guidance)</text>"
    );
    for p in &s.positions {
        let x = l + cell * (p.position.column - 1) as f64;
        let y = t + cell * (s.shelves - p.position.shelf) as f64;
        let f = p.room_lux / max;
        let (r, g, bl) = ((255.0 * f) as u8, (200.0 * f + 30.0) as u8, (80.0 * (1.0 - f) + 40.0) as u8);
        let stroke = if p.flags.iter().any(|f| f != "dark-phase") { "#d50000" } else { "#fff" };
        let _ = write!(
            o,
            "<rect x=\"{x}\" y=\"{y}\" width=\"{cell}\" height=\"{cell}\" fill=\"rgb({r},{g},{bl})\" stroke=\"{stroke}\" stroke-width=\"3\"/><text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">{:.0}</text>",
            x + cell / 2.0,
            y + cell / 2.0 + 4.0,
            p.room_lux
        );
    }
    for shelf in 1..=s.shelves {
        let _ = write!(
            o,
            "<text x=\"{}\" y=\"{}\" font-size=\"11\" text-anchor=\"end\">shelf {shelf}</text>",
            l - 6.0,
            t + cell * (s.shelves - shelf) as f64 + cell / 2.0 + 4.0
        );
    }
    o.push_str("</svg>");
    o
}

/// One self-contained HTML file with inline SVG plots.
pub fn html(all: &[Assessment]) -> String {
    let mut o = String::from(
        "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>retidose assessment</title><style>body{font-family:sans-serif;max-width:980px;margin:2em auto;padding:0 1em;color:#222}table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #bbb;padding:3px 7px;font-size:13px}th{background:#eee}.caution{background:#fff4e5;border-left:4px solid #e65100;padding:.4em .8em}.flag{color:#b71c1c;font-weight:bold}svg{max-width:100%;background:#fafafa;margin:.6em 0}</style></head><body>",
    );
    for a in all {
        let _ = write!(o, "<section><h1>{}</h1>", esc(&a.title));
        if let Some(d) = &a.description {
            let _ = write!(o, "<p>{}</p>", esc(d));
        }
        for c in &a.cautions {
            let _ = write!(o, "<p class=\"caution\">{}</p>", esc(c));
        }
        // Spectrum with weightings.
        if let Some((name, sp)) = a.spectra.first() {
            let c = sp.curve();
            let peak = c.values().iter().copied().fold(0.0, f64::max).max(1e-300);
            let spec: Vec<(f64, f64)> = c
                .wavelength_nm()
                .iter()
                .zip(c.values())
                .filter(|(w, _)| **w >= 300.0 && **w <= 850.0)
                .map(|(w, v)| (*w, v / peak))
                .collect();
            let weight = |id: &str| {
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
            };
            let mel = retidose::weighting::alpha_opic::action_spectra()
                .iter()
                .find(|f| f.name == "melanopic")
                .map(|f| {
                    f.curve.wavelength_nm().iter().zip(f.curve.values()).map(|(x, v)| (*x, *v)).collect()
                })
                .unwrap_or_default();
            let rod = retidose::weighting::alpha_opic::action_spectra()
                .iter()
                .find(|f| f.name == "rhodopic")
                .map(|f| {
                    f.curve.wavelength_nm().iter().zip(f.curve.values()).map(|(x, v)| (*x, *v)).collect()
                })
                .unwrap_or_default();
            let series = vec![
                ("spectrum (peak 1)", "#000", spec),
                ("B(λ) blue-light hazard", "#1565c0", weight("B")),
                ("melanopic (S 026)", "#00897b", mel),
                ("rhodopic V′(λ)", "#6a1b9a", rod),
            ];
            let _ = write!(
                o,
                "<h2>Spectrum of {} with hazard and pigment weightings</h2>{}",
                esc(name),
                svg_lines("spectrum and weightings", &series, "wavelength, nm", "relative", false)
            );
        }
        if let Some(line) = pupil_line(a) {
            let _ = write!(o, "<p>{}</p>", esc(&line));
        }
        if !a.steps.is_empty() {
            o.push_str("<h2>Schedule steps (one cycle)</h2><table><tr>");
            for h in STEP_HEADER {
                let _ = write!(o, "<th>{}</th>", esc(h));
            }
            o.push_str("</tr>");
            for r in step_rows(a) {
                let _ = write!(
                    o,
                    "<tr>{}</tr>",
                    r.iter().map(|c| format!("<td>{}</td>", esc(c))).collect::<String>()
                );
            }
            o.push_str("</table>");
        }
        if let Some(b) = &a.bleach {
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
            let course: Vec<(f64, f64)> =
                b.time_course.iter().map(|(t, x)| (t / 3600.0, 100.0 * x)).collect();
            let _ = write!(
                o,
                "{}",
                svg_lines(
                    "bleach time course",
                    &[("rod pigment bleached, %", "#c62828", course)],
                    "time, h",
                    "bleached, %",
                    false
                )
            );
        }
        let bars: Vec<(String, f64)> = a
            .limits
            .iter()
            .flat_map(|(src, l)| {
                l.hazards
                    .iter()
                    .filter_map(move |h| h.ratio.map(|r| (format!("{src} · {} · {}", l.set_id, h.id), r)))
            })
            .collect();
        if !a.limits.is_empty() {
            o.push_str("<h2>Exposure limits</h2>");
            if !bars.is_empty() {
                o.push_str(&svg_bars("hazard ratios (exposure ÷ limit)", &bars));
            }
            for (src, l) in &a.limits {
                let _ = write!(
                    o,
                    "<h3>{} against {}</h3><table><tr><th>hazard</th><th>clause</th><th>ratio</th><th>t_max</th><th>verdict</th></tr>",
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
                        "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td{cls}>{}{}{}</td></tr>",
                        esc(&h.name),
                        esc(&h.clause),
                        h.ratio.map_or("—".into(), num),
                        esc(&t_max(&h.t_max)),
                        verdict_word(&h.verdict),
                        why,
                        if h.from_memory.is_empty() { "" } else { " [from memory]" }
                    );
                }
                o.push_str("</table>");
                if let Some(Ok(c)) = &l.classification {
                    let _ = write!(
                        o,
                        "<p>Risk group (IEC 62471) at {} mm: <b>{}</b>{}</p>",
                        num(c.distance.si() * 1e3),
                        c.overall.map_or("—", |g| g.name()),
                        if c.not_assessed.is_empty() {
                            ""
                        } else {
                            " (a lower bound: some hazards were not assessed)"
                        }
                    );
                }
            }
        }
        if !a.guidance.is_empty() {
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
        for e in &a.evidence {
            let _ = write!(
                o,
                "<p><i>Evidence, not a limit:</i> {}: {} ({})</p>",
                esc(&e.name),
                esc(&e.value),
                esc(&e.source)
            );
        }
        if let Some(s) = &a.survey {
            let _ = write!(
                o,
                "<h2>Housing survey</h2><p>{} × {} positions; {}. {} flagged; max/min over the rack {}×. The NRC Guide's numbers are room illuminance at cage level, not light at the animal's eye.</p>{}",
                s.shelves,
                s.columns,
                esc(&s.mode),
                s.flagged,
                num(s.max_over_min),
                svg_heatmap(s)
            );
        }
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
    o.push_str("</body></html>\n");
    o
}
