//! The terminal text of `retidose limits list`, `show` and `check`, fitted to the terminal's
//! width. A set from a user's `--set-file` is user text throughout: its ids, names, clauses,
//! statuses and sources are made safe by the [`Page`].

use retidose::base::quantity::SiValue;
use retidose::limits::report::{LIMITS_CAUTION, LimitsAssessment};
use retidose::limits::{
    Classification, Condition, Form, Hazard, HazardGroup, HazardResult, LimitQuantity, LimitSet, Provenance,
    RiskGroup, RiskGroupBases, Segment, builtin_sets, builtin_weightings,
};

use super::Page;
use crate::cli::render::{duration, num, t_max_words};

/// The list of limit sets.
pub fn sets() -> String {
    sets_at(super::width())
}

/// The list of limit sets, fitted to `width` columns.
pub fn sets_at(width: usize) -> String {
    let mut o = Page::new(width, false);
    o.para(LIMITS_CAUTION, "");
    for s in builtin_sets() {
        o.heading(&s.id, false);
        let counts: Vec<String> = s.status_counts().iter().map(|(k, n)| format!("{n} {k}")).collect();
        o.field("  ", "document", 9, &s.document);
        o.field("  ", "edition", 9, &format!("{}; errata: {}", s.edition, s.errata));
        o.field(
            "  ",
            "values",
            9,
            &format!(
                "{} hazards; their values (limit pieces, fields of view, C_α, risk-group time bases): {}",
                s.hazards.len(),
                counts.join(", ")
            ),
        );
        let stricter = s.stricter_choices().len();
        if stricter > 0 {
            o.field(
                "  ",
                "",
                9,
                &format!(
                    "{stricter} value(s) taken as the stricter of candidates (see `retidose limits show {}`)",
                    s.id
                ),
            );
        }
        o.field("  ", "file", 9, &s.origin);
    }
    o.heading("Weighting functions (as named in a set file's `weighting`)", false);
    for w in builtin_weightings() {
        let (a, b) = w.curve.range_nm();
        o.field("  ", &w.id, 7, &format!("{} ({a}–{b} nm)", w.name));
        o.field("  ", "", 7, &format!("source: {}", w.source));
        o.field("  ", "", 7, &format!("status: {}", w.status));
    }
    o.finish()
}

/// One limit set in full.
pub fn set(s: &LimitSet) -> String {
    set_at(s, super::width())
}

/// One limit set in full, fitted to `width` columns.
pub fn set_at(s: &LimitSet, width: usize) -> String {
    let mut o = Page::new(width, false);
    o.para(LIMITS_CAUTION, "");
    o.heading(&format!("{} — {}", s.id, s.document), false);
    o.field("  ", "edition", 8, &s.edition);
    o.field("  ", "clauses", 8, &s.clauses);
    o.field("  ", "errata", 8, &s.errata);
    for n in &s.notes {
        o.item("  ", n);
    }
    for h in &s.hazards {
        hazard_definition(&mut o, h);
    }
    o.finish()
}

/// The width of the labels of a hazard's definition and of a check.
const LABEL: usize = 16;

/// A value the document states (a coefficient, a time base, a bound), without the trailing
/// zeros [`num`] writes for a computed value: "30 J/m²", "0.25 s", "1e6".
fn exact(v: f64) -> String {
    let s = num(v);
    let (mantissa, exponent) = match s.split_once('e') {
        Some((m, e)) => (m.to_string(), format!("e{e}")),
        None => (s, String::new()),
    };
    let mantissa = if mantissa.contains('.') {
        mantissa.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        mantissa
    };
    format!("{mantissa}{exponent}")
}

/// The name of a weighting function, from its id.
fn weighting_name(id: Option<&str>) -> String {
    match id {
        None => "none (the unweighted band)".to_string(),
        Some(id) => {
            builtin_weightings().iter().find(|w| w.id == id).map_or(id.to_string(), |w| w.name.clone())
        }
    }
}

/// A condition of application in words.
fn condition_text(c: &Condition) -> String {
    match *c {
        Condition::SmallerThanRad(r) => {
            format!("only to sources that subtend less than {} mrad", exact(r * 1e3))
        }
        Condition::AtLeastRad(r) => format!("only to sources that subtend at least {} mrad", exact(r * 1e3)),
        Condition::LuminanceBelow(l) => format!("only when the luminance seen is below {} cd/m²", exact(l)),
        Condition::OptIn => {
            "only when asked for (aphakic eyes, infants: `retidose limits check --aphakic`)".to_string()
        }
    }
}

/// A time range of a piece, in seconds as the documents write them.
fn range_s(from: f64, to: f64) -> String {
    match (from, to) {
        (0.0, t) if t.is_infinite() => "at any duration".to_string(),
        (0.0, t) => format!("up to {} s", exact(t)),
        (f, t) if t.is_infinite() => format!("from {} s", exact(f)),
        (f, t) => format!("{}–{} s", exact(f), exact(t)),
    }
}

/// ` × t^e` (t in s), or nothing when e is 0.
fn time_factor(e: f64) -> String {
    if e == 0.0 { String::new() } else { format!(" × t^{e}") }
}

/// A limit piece as a formula: "up to 10 000 s: radiance × t ≤ 1.000e6 J/(m²·sr)".
fn piece(h: &Hazard, l: &Segment) -> String {
    let (q, rate_unit, dose_unit) = match h.quantity {
        LimitQuantity::Irradiance => ("irradiance", "W/m²", "J/m²"),
        LimitQuantity::Radiance => ("radiance", "W/(m²·sr)", "J/(m²·sr)"),
    };
    let (lhs, unit) = match l.form {
        Form::Dose => (format!("{q} × t"), dose_unit),
        Form::Rate => (q.to_string(), rate_unit),
    };
    let c_alpha = match l.alpha_exponent {
        0.0 => String::new(),
        -1.0 => " / C_α".to_string(),
        k => format!(" × C_α^{k}"),
    };
    let units = match (l.time_exponent != 0.0, l.alpha_exponent != 0.0) {
        (false, false) => String::new(),
        (true, false) => " (t in s)".to_string(),
        (t, true) => {
            let c =
                if h.c_alpha.as_ref().is_some_and(|c| c.in_mrad) { "C_α in mrad" } else { "C_α in rad" };
            if t { format!(" (t in s, {c})") } else { format!(" ({c})") }
        }
    };
    format!(
        "{}: {lhs} ≤ {}{}{c_alpha} {unit}{units}",
        range_s(l.from_s, l.to_s),
        exact(l.coefficient),
        time_factor(l.time_exponent)
    )
}

/// A value's status and source, then why it is the stricter choice, each under the value.
fn provenance(o: &mut Page, p: &Provenance) {
    o.field("  ", "", LABEL, &format!("[{}]  {}", p.status, p.source));
    if let Some(why) = &p.stricter_choice {
        o.field("  ", "", LABEL, &format!("stricter choice: {why}"));
    }
}

/// One hazard of a set: band, weighting, conditions, C_α, field of view and limit pieces.
fn hazard_definition(o: &mut Page, h: &Hazard) {
    let kind = match h.quantity {
        LimitQuantity::Irradiance => "limits the irradiance",
        LimitQuantity::Radiance => "limits the radiance seen",
    };
    o.heading(&format!("{} — {}, {}–{} nm, {kind}", h.name, h.clause, h.band_nm.0, h.band_nm.1), false);
    o.field("  ", "select with", LABEL, &format!("--hazard {}", h.id));
    o.field("  ", "weighting", LABEL, &weighting_name(h.weighting.as_deref()));
    for c in &h.conditions {
        o.field("  ", "applies", LABEL, &condition_text(c));
    }
    o.field("  ", "status", LABEL, &h.status);
    if let Some(c) = &h.c_alpha {
        o.field(
            "  ",
            "C_α",
            LABEL,
            &format!(
                "the source's subtense α, limited to {}–{} mrad{}",
                exact(c.min_rad * 1e3),
                exact(c.max_rad * 1e3),
                if c.in_mrad {
                    " (the coefficients take C_α in mrad)"
                } else {
                    " (the coefficients take C_α in rad)"
                }
            ),
        );
        provenance(o, &c.provenance);
    }
    for f in &h.field_of_view {
        let gamma = if f.time_exponent == 0.0 {
            format!("{} mrad", exact(f.coefficient_rad * 1e3))
        } else {
            format!("{} mrad{} (t in s)", exact(f.coefficient_rad * 1e3), time_factor(f.time_exponent))
        };
        o.field("  ", "field of view", LABEL, &format!("{}: {gamma}", range_s(f.from_s, f.to_s)));
        provenance(o, &f.provenance);
    }
    for l in &h.limits {
        o.field("  ", "limit", LABEL, &piece(h, l));
        provenance(o, &l.provenance);
    }
    if let Some(rg) = &h.risk_groups {
        risk_group_bases(o, rg);
    }
}

/// A hazard's IEC 62471 risk-group time bases and fields of view, each with its provenance.
fn risk_group_bases(o: &mut Page, rg: &RiskGroupBases) {
    let b = rg.time_bases_s;
    o.field(
        "  ",
        "risk groups",
        LABEL,
        &format!("time bases {} s (Exempt), {} s (RG1), {} s (RG2)", exact(b[0]), exact(b[1]), exact(b[2])),
    );
    provenance(o, &rg.provenance);
    for (i, f) in rg.field_of_view.iter().enumerate() {
        if let Some(f) = f {
            o.field(
                "  ",
                "",
                LABEL,
                &format!(
                    "field of view for {} ({} s): {} mrad",
                    GROUP_NAMES[i],
                    exact(b[i]),
                    exact(f.rad * 1e3)
                ),
            );
            provenance(o, &f.provenance);
        }
    }
}

/// The risk groups a hazard's time bases stand for, in order.
const GROUP_NAMES: [&str; 3] = [RiskGroup::Exempt.name(), RiskGroup::Rg1.name(), RiskGroup::Rg2.name()];

/// The terminal text of a limits check.
pub fn check(r: &LimitsAssessment) -> String {
    check_at(r, super::width())
}

/// The terminal text of a limits check, fitted to `width` columns.
pub fn check_at(r: &LimitsAssessment, width: usize) -> String {
    let mut o = Page::new(width, false);
    o.para(LIMITS_CAUTION, "");
    o.heading(&format!("retidose limits check: {} against {}", r.source, r.set_id), false);
    o.field("  ", "document", 10, &r.document);
    o.field("  ", "edition", 10, &format!("{}; errata: {}", r.edition, r.errata));
    o.field("  ", "duration", 10, &duration(r.duration.si()));
    o.field("  ", "spectrum", 10, &format!("{}–{} nm", r.range_nm.0, r.range_nm.1));
    for h in &r.hazards {
        hazard(&mut o, h);
    }
    match &r.classification {
        None => {}
        Some(Err(e)) => {
            o.blank();
            o.para(&format!("Risk group (IEC 62471): not assessed: {e}"), "");
        }
        Some(Ok(c)) => risk_group(&mut o, c),
    }
    o.notes_and_caution(&r.notes);
    o.finish()
}

/// One hazard of a check: weighted and averaged quantities, exposure against limit, verdict.
fn hazard(o: &mut Page, h: &HazardResult) {
    let memo = if h.from_memory.is_empty() { "" } else { " [from memory]" };
    o.heading(&format!("{} — {} ({}–{} nm)", h.name, h.clause, h.band_nm.0, h.band_nm.1), false);
    if let Some(q) = h.weighted {
        o.field("  ", "weighted", LABEL, &format!("{} {}", num(q), h.quantity_unit));
    }
    if let (Some(a), Some(g)) = (h.averaged, h.field_of_view_rad) {
        o.field(
            "  ",
            "averaged",
            LABEL,
            &format!("{} {} over {} mrad", num(a), h.quantity_unit, num(g * 1e3)),
        );
    }
    if let (Some(g), Some(p)) = (h.field_of_view_rad, &h.field_of_view_provenance) {
        o.field(
            "  ",
            "field of view",
            LABEL,
            &format!("{} mrad  [{}]  {}", num(g * 1e3), p.status, p.source),
        );
    }
    if let Some(c) = h.c_alpha {
        match &h.c_alpha_provenance {
            Some(p) => o.field("  ", "C_α", LABEL, &format!("{}  [{}]  {}", num(c), p.status, p.source)),
            None => o.field("  ", "C_α", LABEL, &num(c)),
        }
    }
    if let (Some((x, u)), Some((l, _))) = (h.exposure, h.limit) {
        o.field("  ", "exposure/limit", LABEL, &format!("{} / {} {u}", num(x), num(l)));
    }
    if let Some(r) = h.ratio {
        o.field("  ", "hazard ratio", LABEL, &num(r));
    }
    if let Some(r) = h.lower_bound_ratio {
        o.field("  ", "covered part", LABEL, &format!("hazard ratio {} (a lower bound)", num(r)));
    }
    if h.t_max.is_some() {
        o.field("  ", "t_max", LABEL, &t_max_words(&h.t_max, h.partial));
    }
    let partial = if h.partial && h.verdict == retidose::limits::Verdict::Exceeds {
        " — on the measured band alone (the spectrum covers part of the band; the rest can only add)"
    } else {
        ""
    };
    let coarse = if h.near_limit_on_coarse_spectrum {
        " — within 20 % of the limit on a spectrum sampled coarser than 5 nm: the sampling could decide it"
    } else {
        ""
    };
    o.field("  ", "verdict", LABEL, &format!("{}{partial}{coarse}{memo}", h.verdict.text()));
    if !h.from_memory.is_empty() {
        o.field("  ", "from memory", LABEL, &h.from_memory.join("; "));
    }
    for c in &h.stricter_choices {
        o.field("  ", "stricter choice", LABEL, c);
    }
    if !h.source.is_empty() {
        o.field("  ", "limit from", LABEL, &h.source);
    }
}

/// The IEC 62471 risk group of each hazard, the overall group and the blue-light threshold.
fn risk_group(o: &mut Page, c: &Classification) {
    o.heading(
        &format!(
            "Risk group (IEC 62471 cl. 6) at {} mm ({}), {} lx",
            num(c.distance.si() * 1e3),
            c.distance_basis,
            num(c.illuminance_lx)
        ),
        false,
    );
    for g in &c.hazards {
        group_of_hazard(o, g);
    }
    let overall = c.overall.map_or("—", |x| x.name());
    let lb = if c.not_assessed.is_empty() { "" } else { " (lower bound: some hazards not assessed)" };
    o.field("  ", "overall", LABEL, &format!("{overall}{lb}"));
    if let Some(k) = c.blue_efficacy_w_per_lm {
        o.field(
            "  ",
            "blue light",
            LABEL,
            &format!("efficacy K_B,v {} mW/lm; E_thr = 1 W/m² / K_B,v = {} lx", num(k * 1e3), num(1.0 / k)),
        );
    }
    if let Some(d) = c.threshold_distance {
        o.field("  ", "", LABEL, &format!("the blue-light group is at most RG1 beyond {} m", num(d.si())));
    }
    for n in &c.notes {
        o.item("  ", n);
    }
}

/// One hazard's risk group: the group with its ratios at each time base, the time bases' and
/// fields of view's provenance, what is from memory and the stricter choices.
fn group_of_hazard(o: &mut Page, g: &HazardGroup) {
    let reason = g.reason.as_deref().unwrap_or_default();
    let group = match (g.group, g.lower_bound) {
        (Some(x), true) => format!("at least {} ({reason})", x.name()),
        (Some(x), false) => x.name().to_string(),
        (None, _) => reason.to_string(),
    };
    o.hanging("  ", "    ", &format!("{}: {group}", g.name));
    let ratios: Vec<String> = g.ratios.iter().map(|x| x.map_or("—".into(), num)).collect();
    let bases: Vec<String> = g.time_bases_s.iter().map(|t| format!("{} s", exact(*t))).collect();
    o.hanging(
        "    ",
        "      ",
        &format!("hazard ratios at the time bases {}: {}", bases.join(" / "), ratios.join(" / ")),
    );
    o.hanging("    ", "      ", &format!("time bases [{}]  {}", g.time_bases.status, g.time_bases.source));
    for (i, name) in GROUP_NAMES.iter().enumerate() {
        if let (Some(f), Some(p)) = (g.fields_of_view_rad[i], &g.field_of_view_provenance[i]) {
            o.hanging(
                "    ",
                "      ",
                &format!(
                    "field of view for {name} ({} s): {} mrad  [{}]  {}",
                    exact(g.time_bases_s[i]),
                    exact(f * 1e3),
                    p.status,
                    p.source
                ),
            );
        }
    }
    if !g.from_memory.is_empty() {
        o.hanging("    ", "      ", &format!("from memory: {}", g.from_memory.join("; ")));
    }
    for x in &g.stricter_choices {
        o.hanging("    ", "      ", &format!("stricter choice: {x}"));
    }
}
