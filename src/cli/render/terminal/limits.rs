//! The terminal tables of `retidose limits list`, `show` and `check`. A set from a user's
//! `--set-file` is user text throughout: its ids, names, clauses, statuses and sources go through
//! [`terminal_line`].

use std::fmt::Write;

use retidose::base::quantity::SiValue;
use retidose::limits::report::{LIMITS_CAUTION, LimitsAssessment};
use retidose::limits::{
    Classification, Form, Hazard, HazardGroup, HazardResult, LimitQuantity, LimitSet, Provenance, RiskGroup,
    RiskGroupBases, builtin_sets, builtin_weightings,
};

use super::{duration_text, notes_and_caution, t_max_text};
use crate::cli::render::escape::terminal_line;
use crate::cli::render::num;

/// The list of limit sets.
pub fn sets() -> String {
    let mut o = String::new();
    let _ = writeln!(o, "{LIMITS_CAUTION}\n");
    for s in builtin_sets() {
        let counts: Vec<String> = s.status_counts().iter().map(|(k, n)| format!("{n} {k}")).collect();
        let _ = writeln!(o, "{}", s.id);
        let _ = writeln!(o, "  {}", s.document);
        let _ = writeln!(o, "  edition: {}; errata: {}", s.edition, s.errata);
        let _ = writeln!(
            o,
            "  {} hazards; values (limit pieces, fields of view, C_α, risk-group time bases): {}  ({})",
            s.hazards.len(),
            counts.join(", "),
            s.origin
        );
        let stricter = s.stricter_choices().len();
        if stricter > 0 {
            let _ = writeln!(
                o,
                "  {stricter} value(s) taken as the stricter of candidates (see `retidose limits show {}`)",
                s.id
            );
        }
    }
    let _ = writeln!(o, "\nWeighting functions");
    for w in builtin_weightings() {
        let (a, b) = w.curve.range_nm();
        let _ = writeln!(o, "  {:<7} {} ({a}–{b} nm): {} [{}]", w.id, w.name, w.source, w.status);
    }
    o
}

/// One limit set in full.
pub fn set(s: &LimitSet) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "{LIMITS_CAUTION}\n");
    let _ = writeln!(o, "{} — {}", terminal_line(&s.id), terminal_line(&s.document));
    let _ = writeln!(
        o,
        "  edition: {}\n  clauses: {}\n  errata: {}",
        terminal_line(&s.edition),
        terminal_line(&s.clauses),
        terminal_line(&s.errata)
    );
    for n in &s.notes {
        let _ = writeln!(o, "  note: {}", terminal_line(n));
    }
    for h in &s.hazards {
        hazard_definition(&mut o, h);
    }
    o
}

/// The risk groups a hazard's time bases stand for, in order.
const GROUP_NAMES: [&str; 3] = [RiskGroup::Exempt.name(), RiskGroup::Rg1.name(), RiskGroup::Rg2.name()];

/// One hazard of a set: band, weighting, conditions, C_α, field of view and limit pieces.
fn hazard_definition(o: &mut String, h: &Hazard) {
    let w = terminal_line(h.weighting.as_deref().unwrap_or("unweighted"));
    let kind = match h.quantity {
        LimitQuantity::Irradiance => "irradiance",
        LimitQuantity::Radiance => "radiance",
    };
    let _ = writeln!(
        o,
        "\n{} ({}) — {}, {}–{} nm, {w}, {kind}",
        terminal_line(&h.name),
        terminal_line(&h.id),
        terminal_line(&h.clause),
        h.band_nm.0,
        h.band_nm.1
    );
    for c in &h.conditions {
        let _ = writeln!(o, "  applies: {}", terminal_line(&format!("{c:?}")));
    }
    let _ = writeln!(o, "  status: {}", terminal_line(&h.status));
    if let Some(c) = &h.c_alpha {
        let _ = writeln!(
            o,
            "  C_α = α limited to {}–{} mrad{}  {}",
            num(c.min_rad * 1e3),
            num(c.max_rad * 1e3),
            if c.in_mrad { " (coefficients with C_α in mrad)" } else { " (coefficients with C_α in rad)" },
            labelled(&c.provenance)
        );
    }
    for f in &h.field_of_view {
        let _ = writeln!(
            o,
            "  field of view {}–{} s: {} rad × t^{}  {}",
            num(f.from_s),
            num(f.to_s),
            num(f.coefficient_rad),
            f.time_exponent,
            labelled(&f.provenance)
        );
    }
    for l in &h.limits {
        let form = match l.form {
            Form::Dose => "dose",
            Form::Rate => "rate",
        };
        let _ = writeln!(
            o,
            "  {}–{} s: {form} ≤ {} × t^{} × C_α^{}  {}",
            num(l.from_s),
            num(l.to_s),
            num(l.coefficient),
            l.time_exponent,
            l.alpha_exponent,
            labelled(&l.provenance)
        );
    }
    if let Some(rg) = &h.risk_groups {
        risk_group_bases(o, rg);
    }
}

/// A hazard's IEC 62471 risk-group time bases and fields of view, each with its provenance.
fn risk_group_bases(o: &mut String, rg: &RiskGroupBases) {
    let b = rg.time_bases_s;
    let _ = writeln!(
        o,
        "  risk-group time bases (Exempt, RG1, RG2): {} s, {} s, {} s  {}",
        num(b[0]),
        num(b[1]),
        num(b[2]),
        labelled(&rg.provenance)
    );
    for (i, f) in rg.field_of_view.iter().enumerate() {
        if let Some(f) = f {
            let _ = writeln!(
                o,
                "  risk-group field of view, {} ({} s): {} mrad  {}",
                GROUP_NAMES[i],
                num(b[i]),
                num(f.rad * 1e3),
                labelled(&f.provenance)
            );
        }
    }
}

/// `[status]  source` of a value, then `stricter choice: why` on an indented line (as
/// [`Provenance::labelled`]), each part made safe for the terminal.
fn labelled(p: &Provenance) -> String {
    let mut t = format!("[{}]  {}", terminal_line(&p.status), terminal_line(&p.source));
    if let Some(why) = &p.stricter_choice {
        let _ = write!(t, "\n    stricter choice: {}", terminal_line(why));
    }
    t
}

/// The terminal table of a limits check.
pub fn check(r: &LimitsAssessment) -> String {
    let mut o = String::new();
    let _ = writeln!(o, "{LIMITS_CAUTION}\n");
    let _ = writeln!(
        o,
        "retidose limits check: {} against {}",
        terminal_line(&r.source),
        terminal_line(&r.set_id)
    );
    let _ = writeln!(o, "  document   {}", terminal_line(&r.document));
    let _ = writeln!(o, "  edition    {}; errata: {}", terminal_line(&r.edition), terminal_line(&r.errata));
    let _ = writeln!(o, "  duration   {}", duration_text(r.duration.si()));
    let _ = writeln!(o, "  spectrum   {}–{} nm", r.range_nm.0, r.range_nm.1);
    for h in &r.hazards {
        hazard(&mut o, h);
    }
    match &r.classification {
        None => {}
        Some(Err(e)) => {
            let _ = writeln!(o, "\nRisk group (IEC 62471): not assessed: {}", terminal_line(e));
        }
        Some(Ok(c)) => risk_group(&mut o, c),
    }
    notes_and_caution(&mut o, &r.notes);
    o
}

/// One hazard of a check: weighted and averaged quantities, exposure against limit, verdict.
fn hazard(o: &mut String, h: &HazardResult) {
    let memo = if h.from_memory.is_empty() { String::new() } else { " [from memory]".to_string() };
    let (name, clause) = (terminal_line(&h.name), terminal_line(&h.clause));
    let _ = writeln!(o, "\n{name} — {clause} ({}–{} nm)", h.band_nm.0, h.band_nm.1);
    if let Some(q) = h.weighted {
        let _ = writeln!(o, "  weighted        {} {}", num(q), h.quantity_unit);
    }
    if let (Some(a), Some(g)) = (h.averaged, h.field_of_view_rad) {
        let _ = writeln!(o, "  averaged        {} {} over {} mrad", num(a), h.quantity_unit, num(g * 1e3));
    }
    if let (Some(g), Some(p)) = (h.field_of_view_rad, &h.field_of_view_provenance) {
        let (status, source) = (terminal_line(&p.status), terminal_line(&p.source));
        let _ = writeln!(o, "  field of view   {} mrad  [{status}]  {source}", num(g * 1e3));
    }
    if let Some(c) = h.c_alpha {
        match &h.c_alpha_provenance {
            Some(p) => {
                let (status, source) = (terminal_line(&p.status), terminal_line(&p.source));
                let _ = writeln!(o, "  C_α             {}  [{status}]  {source}", num(c));
            }
            None => {
                let _ = writeln!(o, "  C_α             {}", num(c));
            }
        }
    }
    if let (Some((x, u)), Some((l, _))) = (h.exposure, h.limit) {
        let _ = writeln!(o, "  exposure/limit  {} / {} {u}", num(x), num(l));
    }
    if let Some(r) = h.ratio {
        let _ = writeln!(o, "  hazard ratio    {}", num(r));
    }
    if let Some(r) = h.lower_bound_ratio {
        let _ = writeln!(o, "  ratio of the covered part (a lower bound) {}", num(r));
    }
    if h.t_max.is_some() {
        let at_most = if h.partial { "at most " } else { "" };
        let _ = writeln!(o, "  t_max           {at_most}{}", t_max_text(&h.t_max));
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
    let _ = writeln!(o, "  verdict         {}{partial}{coarse}{memo}", h.verdict.text());
    if !h.from_memory.is_empty() {
        let _ = writeln!(o, "  from memory     {}", terminal_line(&h.from_memory.join("; ")));
    }
    for c in &h.stricter_choices {
        let _ = writeln!(o, "  stricter choice {}", terminal_line(c));
    }
    if !h.source.is_empty() {
        let _ = writeln!(o, "  limit from      {}", terminal_line(&h.source));
    }
}

/// The IEC 62471 risk group of each hazard, the overall group and the blue-light threshold.
fn risk_group(o: &mut String, c: &Classification) {
    let _ = writeln!(
        o,
        "\nRisk group (IEC 62471 cl. 6) at {} mm ({}), {} lx",
        num(c.distance.si() * 1e3),
        terminal_line(&c.distance_basis),
        num(c.illuminance_lx)
    );
    for g in &c.hazards {
        group_of_hazard(o, g);
    }
    let overall = c.overall.map_or("—", |x| x.name());
    let lb = if c.not_assessed.is_empty() { "" } else { " (lower bound: some hazards not assessed)" };
    let _ = writeln!(o, "  overall: {overall}{lb}");
    if let Some(k) = c.blue_efficacy_w_per_lm {
        let _ = writeln!(
            o,
            "  blue-light efficacy K_B,v {} mW/lm; E_thr = 1 W/m² / K_B,v = {} lx",
            num(k * 1e3),
            num(1.0 / k)
        );
    }
    if let Some(d) = c.threshold_distance {
        let _ = writeln!(o, "  blue-light group is at most RG1 beyond {} m", num(d.si()));
    }
    for n in &c.notes {
        let _ = writeln!(o, "  note: {}", terminal_line(n));
    }
}

/// One hazard's risk group: the group with its ratios at each time base, the time bases' and
/// fields of view's provenance, what is from memory and the stricter choices.
fn group_of_hazard(o: &mut String, g: &HazardGroup) {
    let group = match (g.group, g.lower_bound) {
        (Some(x), true) => {
            format!("at least {} ({})", x.name(), terminal_line(g.reason.as_deref().unwrap_or_default()))
        }
        (Some(x), false) => x.name().to_string(),
        (None, _) => terminal_line(g.reason.as_deref().unwrap_or_default()).into_owned(),
    };
    let ratios: Vec<String> = g.ratios.iter().map(|x| x.map_or("—".into(), num)).collect();
    let _ = writeln!(
        o,
        "  {:<44} {:<8} (ratios at {}/{}/{} s: {})",
        terminal_line(&g.name),
        group,
        num(g.time_bases_s[0]),
        num(g.time_bases_s[1]),
        num(g.time_bases_s[2]),
        ratios.join(", ")
    );
    let (status, source) = (terminal_line(&g.time_bases.status), terminal_line(&g.time_bases.source));
    let _ = writeln!(o, "    time bases [{status}]  {source}");
    for (i, name) in GROUP_NAMES.iter().enumerate() {
        if let (Some(f), Some(p)) = (g.fields_of_view_rad[i], &g.field_of_view_provenance[i]) {
            let _ = writeln!(
                o,
                "    field of view at {name} ({} s): {} mrad  [{}]  {}",
                num(g.time_bases_s[i]),
                num(f * 1e3),
                terminal_line(&p.status),
                terminal_line(&p.source)
            );
        }
    }
    if !g.from_memory.is_empty() {
        let _ = writeln!(o, "    from memory: {}", terminal_line(&g.from_memory.join("; ")));
    }
    for x in &g.stricter_choices {
        let _ = writeln!(o, "    stricter choice: {}", terminal_line(x));
    }
}
