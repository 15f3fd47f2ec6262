//! Limit sets: one TOML file per document and edition in `limits/`.

use std::sync::LazyLock;

use serde::Deserialize;

use super::weighting::find_weighting;
use crate::base::error::{Error, Result};

/// Whether a hazard limits an irradiance (W/m², dose J/m²) or a radiance (W/m²/sr, J/m²/sr).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LimitQuantity {
    /// Irradiance at the eye or skin.
    Irradiance,
    /// Radiance of the source as seen, averaged over the field of view.
    Radiance,
}

/// Dose form (∫Q dt ≤ limit) or rate form (Q ≤ limit).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Form {
    /// The time-integrated quantity is limited.
    Dose,
    /// The quantity itself is limited.
    Rate,
}

/// The status tags a value may carry (project rule): the tag alone, or followed by `: why`.
pub const STATUS_TAGS: [&str; 4] = ["confirmed", "derived", "from memory", "common practice, no source"];

/// Where a value comes from and how far it can be trusted.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Provenance {
    /// One of [`STATUS_TAGS`], optionally followed by `: why`.
    pub status: String,
    /// Document, edition and table, clause, equation or page.
    pub source: String,
    /// When the value is the stricter of candidates the sources do not settle: the candidates and
    /// why this one was taken.
    pub stricter_choice: Option<String>,
}

impl Provenance {
    /// The status tag (the text before any `:`).
    pub fn tag(&self) -> &str {
        self.status.split(':').next().unwrap_or("").trim()
    }

    /// True when the value is from memory.
    pub fn is_from_memory(&self) -> bool {
        self.tag() == "from memory"
    }

    /// `[status]  source`, then `stricter choice: why` on a new line after `pad` when the value
    /// is a stricter choice; for reports.
    pub fn labelled(&self, pad: &str) -> String {
        let mut t = format!("[{}]  {}", self.status, self.source);
        if let Some(why) = &self.stricter_choice {
            t.push_str(&format!("\n{pad}stricter choice: {why}"));
        }
        t
    }
}

/// One piece of a limit, valid for `from_s < t ≤ to_s` (the first piece includes `from_s`).
#[derive(Debug, Clone, PartialEq)]
pub struct Segment {
    /// Start of validity, s.
    pub from_s: f64,
    /// End of validity, s (may be infinite).
    pub to_s: f64,
    /// Dose or rate.
    pub form: Form,
    /// Coefficient c in SI units of the form (J/m², W/m², J/m²/sr, W/m²/sr), with C_α in the
    /// set's angle unit where `alpha_exponent` ≠ 0.
    pub coefficient: f64,
    /// Exponent e of t (in s).
    pub time_exponent: f64,
    /// Exponent k of C_α (0 or −1).
    pub alpha_exponent: f64,
    /// Status and source of this piece (row, clause, equation).
    pub provenance: Provenance,
}

/// The C_α rule: α clamped to [min, max], expressed in rad or mrad for the coefficient.
#[derive(Debug, Clone, PartialEq)]
pub struct CAlpha {
    /// Smallest C_α, rad.
    pub min_rad: f64,
    /// Largest C_α, rad.
    pub max_rad: f64,
    /// True when the document writes C_α in mrad (Directive 2006/25/EC).
    pub in_mrad: bool,
    /// Status and source of the bounds.
    pub provenance: Provenance,
}

impl CAlpha {
    /// C_α for a source of subtense `alpha_rad`, in the document's unit.
    pub fn value(&self, alpha_rad: f64) -> f64 {
        let c = alpha_rad.clamp(self.min_rad, self.max_rad);
        if self.in_mrad { c * 1e3 } else { c }
    }
}

/// One piece of the averaging field of view γ(t) = c·t^e rad, for `from_s < t ≤ to_s`.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldOfView {
    /// Start, s.
    pub from_s: f64,
    /// End, s.
    pub to_s: f64,
    /// c in rad.
    pub coefficient_rad: f64,
    /// e.
    pub time_exponent: f64,
    /// Status and source of this piece.
    pub provenance: Provenance,
}

impl FieldOfView {
    /// γ at duration `t`, rad.
    pub fn at(&self, t: f64) -> f64 {
        self.coefficient_rad * t.powf(self.time_exponent)
    }
}

/// The IEC 62471 risk groups a hazard's time bases stand for, in order.
pub const GROUP_NAMES: [&str; 3] = ["Exempt", "RG1", "RG2"];

/// A field of view the set gives for one risk-group time base, in place of the hazard's
/// `field_of_view` at that time.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupFieldOfView {
    /// γ, rad.
    pub rad: f64,
    /// Status and source.
    pub provenance: Provenance,
}

/// The IEC 62471 risk-group data of a hazard: time bases and, where they differ from the
/// exposure field of view at those times, the fields of view of the groups.
#[derive(Debug, Clone, PartialEq)]
pub struct RiskGroupBases {
    /// Exempt, RG1 and RG2 time bases, s.
    pub time_bases_s: [f64; 3],
    /// Status and source of the time bases.
    pub provenance: Provenance,
    /// Field of view at each time base where the set gives one of its own (Exempt, RG1, RG2).
    pub field_of_view: [Option<GroupFieldOfView>; 3],
}

/// When a hazard applies.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Condition {
    /// Only for sources smaller than this subtense (small-source blue light).
    SmallerThanRad(f64),
    /// Only for sources at least this large.
    AtLeastRad(f64),
    /// Only when the seen luminance is below this (weak visual stimulus), cd/m².
    LuminanceBelow(f64),
    /// Only when asked for (aphakic eyes, infants).
    OptIn,
}

/// One hazard of a set.
#[derive(Debug, Clone, PartialEq)]
pub struct Hazard {
    /// Identifier (`actinic-uv`, `blue-light`, …).
    pub id: String,
    /// Name.
    pub name: String,
    /// Clause, row or equation of the document.
    pub clause: String,
    /// Weighting function id, or `None` for an unweighted band.
    pub weighting: Option<String>,
    /// Band, nm.
    pub band_nm: (f64, f64),
    /// Irradiance or radiance.
    pub quantity: LimitQuantity,
    /// Conditions of application.
    pub conditions: Vec<Condition>,
    /// C_α rule, if the limit depends on the source size.
    pub c_alpha: Option<CAlpha>,
    /// Averaging field of view for radiance.
    pub field_of_view: Vec<FieldOfView>,
    /// The limit, piecewise in t.
    pub limits: Vec<Segment>,
    /// IEC 62471 risk-group time bases (Exempt, RG1, RG2) with their status and fields of view.
    pub risk_groups: Option<RiskGroupBases>,
    /// Status of the hazard's values as a whole.
    pub status: String,
}

/// A limit set.
#[derive(Debug, Clone, PartialEq)]
pub struct LimitSet {
    /// Identifier used on the command line.
    pub id: String,
    /// Document title.
    pub document: String,
    /// Edition.
    pub edition: String,
    /// Clauses and tables encoded.
    pub clauses: String,
    /// Errata applied.
    pub errata: String,
    /// Notes on what is and is not in the set.
    pub notes: Vec<String>,
    /// The hazards.
    pub hazards: Vec<Hazard>,
    /// The file it came from.
    pub origin: String,
}

impl Hazard {
    /// Every value of the hazard that carries its own status, as (what, provenance): limit
    /// pieces, field-of-view pieces, the C_α rule, the risk-group time bases and their fields of
    /// view.
    pub fn values(&self) -> Vec<(String, &Provenance)> {
        let mut out: Vec<(String, &Provenance)> = Vec::new();
        for (i, s) in self.limits.iter().enumerate() {
            out.push((format!("limit[{i}]"), &s.provenance));
        }
        for (i, f) in self.field_of_view.iter().enumerate() {
            out.push((format!("field_of_view[{i}]"), &f.provenance));
        }
        if let Some(c) = &self.c_alpha {
            out.push(("c_alpha".to_string(), &c.provenance));
        }
        if let Some(rg) = &self.risk_groups {
            out.push(("risk_groups.time_bases_s".to_string(), &rg.provenance));
            for (g, f) in GROUP_NAMES.iter().zip(&rg.field_of_view) {
                if let Some(f) = f {
                    out.push((format!("risk_groups.field_of_view ({g})"), &f.provenance));
                }
            }
        }
        out
    }
}

impl LimitSet {
    /// Counts of the set's values by status tag (confirmed, derived, from memory …): limit
    /// pieces, field-of-view pieces, C_α rules and risk-group time bases and fields of view.
    pub fn status_counts(&self) -> Vec<(String, usize)> {
        let mut out: Vec<(String, usize)> = Vec::new();
        for (_, p) in self.hazards.iter().flat_map(Hazard::values) {
            let key = p.tag().to_string();
            match out.iter_mut().find(|(k, _)| *k == key) {
                Some((_, n)) => *n += 1,
                None => out.push((key, 1)),
            }
        }
        out
    }

    /// Every value taken as the stricter of candidates, as "hazard id, key: why".
    pub fn stricter_choices(&self) -> Vec<String> {
        self.hazards
            .iter()
            .flat_map(|h| {
                h.values().into_iter().filter_map(move |(k, p)| {
                    p.stricter_choice.as_ref().map(|why| format!("{}, {k}: {why}", h.id))
                })
            })
            .collect()
    }

    /// A hazard by id.
    pub fn hazard(&self, id: &str) -> Option<&Hazard> {
        self.hazards.iter().find(|h| h.id == id)
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSet {
    id: String,
    document: String,
    edition: String,
    clauses: String,
    errata: String,
    #[serde(default)]
    notes: Vec<String>,
    hazard: Vec<RawHazard>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawHazard {
    id: String,
    name: String,
    clause: String,
    weighting: String,
    band_nm: [f64; 2],
    quantity: String,
    status: String,
    smaller_than_rad: Option<f64>,
    at_least_rad: Option<f64>,
    luminance_below_cd_m2: Option<f64>,
    #[serde(default)]
    opt_in: bool,
    c_alpha: Option<RawCAlpha>,
    #[serde(default)]
    field_of_view: Vec<RawFov>,
    risk_groups: Option<RawRiskGroups>,
    limit: Vec<RawSegment>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCAlpha {
    min: String,
    max: String,
    unit: String,
    status: String,
    source: String,
    stricter_choice: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFov {
    from_s: f64,
    to_s: f64,
    coefficient_rad: f64,
    #[serde(default)]
    time_exponent: f64,
    status: String,
    source: String,
    stricter_choice: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRiskGroups {
    time_bases_s: [f64; 3],
    status: String,
    source: String,
    stricter_choice: Option<String>,
    #[serde(default)]
    field_of_view: Vec<RawGroupFov>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawGroupFov {
    group: String,
    rad: f64,
    status: String,
    source: String,
    stricter_choice: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSegment {
    from_s: f64,
    to_s: f64,
    form: String,
    coefficient: f64,
    unit: String,
    #[serde(default)]
    time_exponent: f64,
    #[serde(default)]
    alpha_exponent: f64,
    status: String,
    source: String,
    stricter_choice: Option<String>,
}

/// Checks a `status`: one of [`STATUS_TAGS`], alone or followed by `: why`.
fn check_status(status: &str, k: KeyName<'_>) -> Result<()> {
    let tag = status.split(':').next().unwrap_or("").trim();
    let rest = status.trim_start().strip_prefix(tag).unwrap_or("");
    if STATUS_TAGS.contains(&tag) && (rest.trim().is_empty() || rest.starts_with(':')) {
        return Ok(());
    }
    Err(Error::data(format!(
        "{}: '{status}' is not a status; write confirmed, derived, from memory or common practice, no source, \
         optionally followed by ': why'",
        k("status")
    )))
}

/// Checks a value's `status`, `source` and optional `stricter_choice` (keys named by `k`).
fn provenance(
    status: &str,
    source: &str,
    stricter_choice: Option<&String>,
    k: KeyName<'_>,
) -> Result<Provenance> {
    check_status(status, k)?;
    if source.trim().is_empty() {
        return Err(Error::data(format!(
            "{}: must name the document, edition and table, clause or page the value comes from",
            k("source")
        )));
    }
    if stricter_choice.is_some_and(|w| w.trim().is_empty()) {
        return Err(Error::data(format!(
            "{}: must name the candidates and why this one is the stricter (or leave the key out)",
            k("stricter_choice")
        )));
    }
    Ok(Provenance {
        status: status.to_string(),
        source: source.to_string(),
        stricter_choice: stricter_choice.cloned(),
    })
}

fn expected_unit(q: LimitQuantity, f: Form) -> &'static [&'static str] {
    match (q, f) {
        (LimitQuantity::Irradiance, Form::Dose) => &["J/m2", "J·m⁻²"],
        (LimitQuantity::Irradiance, Form::Rate) => &["W/m2", "W·m⁻²"],
        (LimitQuantity::Radiance, Form::Dose) => &["J/m2/sr", "J·m⁻²·sr⁻¹"],
        (LimitQuantity::Radiance, Form::Rate) => &["W/m2/sr", "W·m⁻²·sr⁻¹"],
    }
}

/// Names a key of one hazard in errors: "origin: key 'hazard[i].k' (id)".
type KeyName<'a> = &'a dyn Fn(&str) -> String;

/// Parses a limit-set file and checks it: known weightings, ordered contiguous time pieces,
/// units that fit the quantity and form, a valid C_α rule and band.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming `origin`, the key and the reason.
pub fn parse_set(text: &str, origin: &str) -> Result<LimitSet> {
    let raw: RawSet =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    if raw.hazard.is_empty() {
        return Err(Error::data(format!(
            "{origin}: key 'hazard': a limit set needs at least one [[hazard]]"
        )));
    }
    let hazards = raw
        .hazard
        .iter()
        .enumerate()
        .map(|(hi, h)| parse_hazard(h, hi, origin))
        .collect::<Result<Vec<_>>>()?;
    for (i, h) in hazards.iter().enumerate() {
        if hazards[..i].iter().any(|x| x.id == h.id) {
            return Err(Error::data(format!("{origin}: key 'hazard[{i}].id': '{}' is used twice", h.id)));
        }
    }
    Ok(LimitSet {
        id: raw.id,
        document: raw.document,
        edition: raw.edition,
        clauses: raw.clauses,
        errata: raw.errata,
        notes: raw.notes,
        hazards,
        origin: origin.to_string(),
    })
}

/// The longest duration a limit piece, field of view or time base may name, s (about 317
/// years; longer pieces are open-ended, `inf`). Keeps every evaluation bounded.
pub const MAX_LIMIT_S: f64 = 1e10;

/// Parses and checks the `hi`-th `[[hazard]]` table.
fn parse_hazard(h: &RawHazard, hi: usize, origin: &str) -> Result<Hazard> {
    let at = |k: &str| format!("{origin}: key 'hazard[{hi}].{k}' ({})", h.id);
    let quantity = parse_quantity(h, &at)?;
    let weighting = hazard_weighting(h, &at)?;
    if !(h.band_nm[0] > 0.0 && h.band_nm[0] < h.band_nm[1] && h.band_nm[1] <= 1e6) {
        return Err(Error::data(format!(
            "{}: band must be increasing, positive and finite (at most 10⁶ nm)",
            at("band_nm")
        )));
    }
    for (k, v) in [("smaller_than_rad", h.smaller_than_rad), ("at_least_rad", h.at_least_rad)] {
        if v.is_some_and(|v| !(v > 0.0 && v < std::f64::consts::PI)) {
            return Err(Error::data(format!("{}: must be above 0 and below π rad", at(k))));
        }
    }
    if h.luminance_below_cd_m2.is_some_and(|v| !(v > 0.0 && v.is_finite())) {
        return Err(Error::data(format!("{}: must be a finite number above 0", at("luminance_below_cd_m2"))));
    }
    check_status(&h.status, &at)?;
    let field_of_view = parse_fields_of_view(h, &at)?;
    let risk_groups = h.risk_groups.as_ref().map(|r| parse_risk_groups(r, &at)).transpose()?;
    let limits = parse_segments(h, quantity, &at)?;
    let c_alpha = h.c_alpha.as_ref().map(|c| parse_c_alpha(c, &at)).transpose()?;
    let conditions = conditions(h);
    let group_fov = risk_groups.as_ref().is_some_and(|r| r.field_of_view.iter().any(Option::is_some));
    if quantity == LimitQuantity::Irradiance && (!h.field_of_view.is_empty() || group_fov) {
        let key = if group_fov { "risk_groups.field_of_view" } else { "field_of_view" };
        return Err(Error::data(format!(
            "{}: only radiance hazards have an averaging field of view",
            at(key)
        )));
    }
    Ok(Hazard {
        id: h.id.clone(),
        name: h.name.clone(),
        clause: h.clause.clone(),
        weighting,
        band_nm: (h.band_nm[0], h.band_nm[1]),
        quantity,
        conditions,
        c_alpha,
        field_of_view,
        limits,
        risk_groups,
        status: h.status.clone(),
    })
}

/// The hazard's `[[hazard.field_of_view]]` pieces: bounded, positive, each with its status and
/// source, following each other without gap or overlap.
fn parse_fields_of_view(h: &RawHazard, at: KeyName<'_>) -> Result<Vec<FieldOfView>> {
    let mut out: Vec<FieldOfView> = Vec::new();
    for (fi, f) in h.field_of_view.iter().enumerate() {
        let k = |x: &str| at(&format!("field_of_view[{fi}].{x}"));
        let ok = f.from_s >= 0.0
            && f.from_s < f.to_s
            && (f.to_s <= MAX_LIMIT_S || f.to_s == f64::INFINITY)
            && f.coefficient_rad > 0.0
            && f.coefficient_rad.is_finite()
            && f.time_exponent.is_finite();
        if !ok {
            return Err(Error::data(format!(
                "{}: needs 0 ≤ from_s < to_s (finite up to {MAX_LIMIT_S} s, or inf), a finite coefficient above 0 \
                 and a finite exponent",
                at(&format!("field_of_view[{fi}]"))
            )));
        }
        if let Some(prev) = out.last()
            && (f.from_s - prev.to_s).abs() > 1e-12 * prev.to_s.max(1.0)
        {
            return Err(Error::data(format!(
                "{}: field-of-view pieces must follow each other without gap or overlap: this one starts at {} s, \
                 the previous ends at {} s",
                k("from_s"),
                f.from_s,
                prev.to_s
            )));
        }
        out.push(FieldOfView {
            from_s: f.from_s,
            to_s: f.to_s,
            coefficient_rad: f.coefficient_rad,
            time_exponent: f.time_exponent,
            provenance: provenance(&f.status, &f.source, f.stricter_choice.as_ref(), &k)?,
        });
    }
    Ok(out)
}

/// The hazard's `[hazard.risk_groups]` table: three time bases with their status and source, and
/// the groups' own fields of view (`[[hazard.risk_groups.field_of_view]]`, `group` = Exempt, RG1
/// or RG2, at most once each).
fn parse_risk_groups(r: &RawRiskGroups, at: KeyName<'_>) -> Result<RiskGroupBases> {
    if r.time_bases_s.iter().any(|v| !(*v > 0.0 && *v <= MAX_LIMIT_S)) {
        return Err(Error::data(format!(
            "{}: time bases must be above 0 s and at most {MAX_LIMIT_S} s",
            at("risk_groups.time_bases_s")
        )));
    }
    let k = |x: &str| at(&format!("risk_groups.{x}"));
    let mut field_of_view: [Option<GroupFieldOfView>; 3] = [None, None, None];
    for (i, f) in r.field_of_view.iter().enumerate() {
        let kf = |x: &str| at(&format!("risk_groups.field_of_view[{i}].{x}"));
        let Some(g) = GROUP_NAMES.iter().position(|n| *n == f.group) else {
            return Err(Error::data(format!("{}: '{}' is not Exempt, RG1 or RG2", kf("group"), f.group)));
        };
        if field_of_view[g].is_some() {
            return Err(Error::data(format!("{}: {} is given twice", kf("group"), f.group)));
        }
        if !(f.rad > 0.0 && f.rad < std::f64::consts::PI) {
            return Err(Error::data(format!("{}: must be above 0 and below π rad", kf("rad"))));
        }
        field_of_view[g] = Some(GroupFieldOfView {
            rad: f.rad,
            provenance: provenance(&f.status, &f.source, f.stricter_choice.as_ref(), &kf)?,
        });
    }
    Ok(RiskGroupBases {
        time_bases_s: r.time_bases_s,
        provenance: provenance(&r.status, &r.source, r.stricter_choice.as_ref(), &k)?,
        field_of_view,
    })
}

/// The hazard's `quantity`: irradiance or radiance.
fn parse_quantity(h: &RawHazard, at: KeyName<'_>) -> Result<LimitQuantity> {
    match h.quantity.as_str() {
        "irradiance" => Ok(LimitQuantity::Irradiance),
        "radiance" => Ok(LimitQuantity::Radiance),
        o => Err(Error::data(format!("{}: '{o}' is not irradiance or radiance", at("quantity")))),
    }
}

/// The hazard's `weighting` id (`None` for `none`), checked to be built in and to cover the
/// hazard's band.
fn hazard_weighting(h: &RawHazard, at: KeyName<'_>) -> Result<Option<String>> {
    let w = match h.weighting.as_str() {
        "none" => return Ok(None),
        w => w,
    };
    let f = find_weighting(w).ok_or_else(|| {
        Error::data(format!(
            "{}: unknown weighting '{w}'; built in: S_UV, B, A, R_1997, R_2013, or none",
            at("weighting")
        ))
    })?;
    let (a, b) = f.curve.range_nm();
    if h.band_nm[0] < a - 1e-9 || h.band_nm[1] > b + 1e-9 {
        return Err(Error::data(format!(
            "{}: band {}–{} nm reaches outside the weighting {w} ({a}–{b} nm)",
            at("band_nm"),
            h.band_nm[0],
            h.band_nm[1]
        )));
    }
    Ok(Some(w.to_string()))
}

/// The hazard's `[[hazard.limit]]` pieces, checked one by one; at least one is required.
fn parse_segments(h: &RawHazard, quantity: LimitQuantity, at: KeyName<'_>) -> Result<Vec<Segment>> {
    let mut limits: Vec<Segment> = Vec::new();
    for (si, s) in h.limit.iter().enumerate() {
        let k = |f: &str| at(&format!("limit[{si}].{f}"));
        let prev = limits.last().map(|p| p.to_s);
        limits.push(parse_segment(s, h, quantity, prev, &k)?);
    }
    if limits.is_empty() {
        return Err(Error::data(format!("{}: a hazard needs at least one limit piece", at("limit"))));
    }
    Ok(limits)
}

/// One limit piece; `prev` is where the previous piece ends, `k` names this piece's keys.
fn parse_segment(
    s: &RawSegment,
    h: &RawHazard,
    quantity: LimitQuantity,
    prev: Option<f64>,
    k: KeyName<'_>,
) -> Result<Segment> {
    let form = match s.form.as_str() {
        "dose" => Form::Dose,
        "rate" => Form::Rate,
        o => return Err(Error::data(format!("{}: '{o}' is not dose or rate", k("form")))),
    };
    let units = expected_unit(quantity, form);
    if !units.contains(&s.unit.as_str()) {
        return Err(Error::data(format!(
            "{}: unit '{}' does not fit a {} {}; expected {}",
            k("unit"),
            s.unit,
            h.quantity,
            s.form,
            units[0]
        )));
    }
    if !(s.coefficient.is_finite() && s.coefficient > 0.0) {
        return Err(Error::data(format!("{}: must be a finite number above 0", k("coefficient"))));
    }
    if !(s.from_s >= 0.0 && s.from_s < s.to_s && s.from_s <= MAX_LIMIT_S) {
        return Err(Error::data(format!("{}: from_s must be ≥ 0 and below to_s", k("from_s"))));
    }
    if !(s.to_s <= MAX_LIMIT_S || s.to_s == f64::INFINITY) {
        return Err(Error::data(format!(
            "{}: {} s is beyond {MAX_LIMIT_S} s (about 300 years); write inf for an open end",
            k("to_s"),
            s.to_s
        )));
    }
    for (name, v) in [("time_exponent", s.time_exponent), ("alpha_exponent", s.alpha_exponent)] {
        if !(v.is_finite() && v.abs() <= 10.0) {
            return Err(Error::data(format!("{}: {v} must be a finite number within ±10", k(name))));
        }
    }
    if let Some(prev) = prev
        && (s.from_s - prev).abs() > 1e-12 * prev.max(1.0)
    {
        return Err(Error::data(format!(
            "{}: pieces must follow each other without gap or overlap: this one starts at {} s, the previous ends at {prev} s",
            k("from_s"),
            s.from_s
        )));
    }
    if s.alpha_exponent != 0.0 && h.c_alpha.is_none() {
        return Err(Error::data(format!(
            "{}: depends on C_α but the hazard has no c_alpha rule",
            k("alpha_exponent")
        )));
    }
    Ok(Segment {
        from_s: s.from_s,
        to_s: s.to_s,
        form,
        coefficient: s.coefficient,
        time_exponent: s.time_exponent,
        alpha_exponent: s.alpha_exponent,
        provenance: provenance(&s.status, &s.source, s.stricter_choice.as_ref(), k)?,
    })
}

/// The hazard's `[hazard.c_alpha]` rule: `min`, `max`, `unit`, `status`, `source` and an
/// optional `stricter_choice`.
fn parse_c_alpha(c: &RawCAlpha, at: KeyName<'_>) -> Result<CAlpha> {
    use crate::base::quantity::SiValue;
    let parse = |t: &str, key: &str| {
        crate::base::units::parse_angle(t).map_err(|e| Error::data(format!("{}: {e}", at(key))))
    };
    let (min, max) = (parse(&c.min, "c_alpha.min")?, parse(&c.max, "c_alpha.max")?);
    let in_mrad = match c.unit.as_str() {
        "rad" => false,
        "mrad" => true,
        o => {
            return Err(Error::data(format!("{}: '{o}' is not rad or mrad", at("c_alpha.unit"))));
        }
    };
    if !(min.si() > 0.0 && min.si() < max.si() && max.si() < std::f64::consts::PI) {
        return Err(Error::data(format!("{}: need 0 < min < max < π rad", at("c_alpha"))));
    }
    let k = |x: &str| at(&format!("c_alpha.{x}"));
    let provenance = provenance(&c.status, &c.source, c.stricter_choice.as_ref(), &k)?;
    Ok(CAlpha { min_rad: min.si(), max_rad: max.si(), in_mrad, provenance })
}

/// The hazard's conditions of application, in the order the engine checks them.
fn conditions(h: &RawHazard) -> Vec<Condition> {
    let mut conditions = Vec::new();
    if let Some(r) = h.smaller_than_rad {
        conditions.push(Condition::SmallerThanRad(r));
    }
    if let Some(r) = h.at_least_rad {
        conditions.push(Condition::AtLeastRad(r));
    }
    if let Some(l) = h.luminance_below_cd_m2 {
        conditions.push(Condition::LuminanceBelow(l));
    }
    if h.opt_in {
        conditions.push(Condition::OptIn);
    }
    conditions
}

/// The limit-set files shipped in `limits/`.
pub const SET_FILES: [(&str, &str); 5] = [
    ("limits/iec62471_2006.toml", include_str!("../../limits/iec62471_2006.toml")),
    ("limits/directive_2006_25_ec.toml", include_str!("../../limits/directive_2006_25_ec.toml")),
    ("limits/icnirp_1997_visible_ir.toml", include_str!("../../limits/icnirp_1997_visible_ir.toml")),
    ("limits/icnirp_2004_uv.toml", include_str!("../../limits/icnirp_2004_uv.toml")),
    ("limits/icnirp_2013_visible_ir.toml", include_str!("../../limits/icnirp_2013_visible_ir.toml")),
];

static SETS: LazyLock<Vec<LimitSet>> = LazyLock::new(|| {
    SET_FILES
        .iter()
        .map(|(n, t)| parse_set(t, n).unwrap_or_else(|e| panic!("embedded limit set: {e}")))
        .collect()
});

/// The built-in limit sets.
pub fn builtin_sets() -> &'static [LimitSet] {
    &SETS
}

/// A built-in set by id.
///
/// # Errors
/// [`crate::ErrorKind::UnknownName`] listing the built-in ids.
pub fn find_set(id: &str) -> Result<&'static LimitSet> {
    SETS.iter().find(|s| s.id == id).ok_or_else(|| {
        Error::new(
            crate::ErrorKind::UnknownName,
            format!(
                "unknown limit set '{id}'; built in: {}",
                SETS.iter().map(|s| s.id.as_str()).collect::<Vec<_>>().join(", ")
            ),
        )
    })
}
