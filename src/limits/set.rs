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
    /// Status of this piece.
    pub status: String,
    /// Where the piece comes from (row, clause, equation).
    pub source: String,
}

/// The C_α rule: α clamped to [min, max], expressed in rad or mrad for the coefficient.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CAlpha {
    /// Smallest C_α, rad.
    pub min_rad: f64,
    /// Largest C_α, rad.
    pub max_rad: f64,
    /// True when the document writes C_α in mrad (Directive 2006/25/EC).
    pub in_mrad: bool,
}

impl CAlpha {
    /// C_α for a source of subtense `alpha_rad`, in the document's unit.
    pub fn value(&self, alpha_rad: f64) -> f64 {
        let c = alpha_rad.clamp(self.min_rad, self.max_rad);
        if self.in_mrad { c * 1e3 } else { c }
    }
}

/// One piece of the averaging field of view γ(t) = c·t^e rad, for `from_s < t ≤ to_s`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FieldOfView {
    /// Start, s.
    pub from_s: f64,
    /// End, s.
    pub to_s: f64,
    /// c in rad.
    pub coefficient_rad: f64,
    /// e.
    pub time_exponent: f64,
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
    /// IEC 62471 risk-group time bases (Exempt, RG1, RG2), s.
    pub risk_group_time_bases_s: Option<[f64; 3]>,
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

impl LimitSet {
    /// Counts of segments by status text (confirmed, from memory, derived …).
    pub fn status_counts(&self) -> Vec<(String, usize)> {
        let mut out: Vec<(String, usize)> = Vec::new();
        for s in self.hazards.iter().flat_map(|h| &h.limits) {
            let key = s.status.split(':').next().unwrap_or("").trim().to_string();
            match out.iter_mut().find(|(k, _)| *k == key) {
                Some((_, n)) => *n += 1,
                None => out.push((key, 1)),
            }
        }
        out
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
    risk_group_time_bases_s: Option<[f64; 3]>,
    limit: Vec<RawSegment>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCAlpha {
    min: String,
    max: String,
    unit: String,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFov {
    from_s: f64,
    to_s: f64,
    coefficient_rad: f64,
    #[serde(default)]
    time_exponent: f64,
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
    if let Some(tb) = h.risk_group_time_bases_s
        && tb.iter().any(|v| !(*v > 0.0 && *v <= MAX_LIMIT_S))
    {
        return Err(Error::data(format!(
            "{}: time bases must be above 0 s and at most {MAX_LIMIT_S} s",
            at("risk_group_time_bases_s")
        )));
    }
    for (fi, f) in h.field_of_view.iter().enumerate() {
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
    }
    let limits = parse_segments(h, quantity, &at)?;
    let c_alpha = h.c_alpha.as_ref().map(|c| parse_c_alpha(c, &at)).transpose()?;
    let conditions = conditions(h);
    if quantity == LimitQuantity::Irradiance && !h.field_of_view.is_empty() {
        return Err(Error::data(format!(
            "{}: only radiance hazards have an averaging field of view",
            at("field_of_view")
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
        field_of_view: h
            .field_of_view
            .iter()
            .map(|f| FieldOfView {
                from_s: f.from_s,
                to_s: f.to_s,
                coefficient_rad: f.coefficient_rad,
                time_exponent: f.time_exponent,
            })
            .collect(),
        limits,
        risk_group_time_bases_s: h.risk_group_time_bases_s,
        status: h.status.clone(),
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
        status: s.status.clone(),
        source: s.source.clone(),
    })
}

/// The hazard's `c_alpha = { min, max, unit }` rule.
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
    Ok(CAlpha { min_rad: min.si(), max_rad: max.si(), in_mrad })
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
