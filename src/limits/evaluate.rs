//! Evaluating a source against a limit set.
//!
//! For each hazard: the weighted quantity Q = ∫ X_λ w(λ) dλ over the hazard's band (X the
//! corneal spectral irradiance or the seen spectral radiance), the radiance averaged over the
//! field of view γ(t) when the source is smaller than it (uniform disc: Q·sin²(α/2)/sin²(γ/2)),
//! the limit at the exposure duration, the hazard ratio (IEC TR 62471-2 "exposure hazard
//! value") = exposure ÷ limit, the longest permissible duration t_max and a verdict.
//!
//! Doses are time integrals (ICNIRP 2013 errata, Eq. 11): for a schedule of steps the dose is
//! Σ Q·fᵢ·Δtᵢ and it is compared with the dose the limit allows over the whole duration (a rate
//! limit c·t^e allows c·t^e·t). For a constant exposure this is the usual comparison.
//!
//! Coverage rule: if the spectrum does not cover the hazard's band the verdict is "not
//! assessed", with the ratio of the covered part as a lower bound, never "within limit".

use std::f64::consts::FRAC_PI_2;

use super::set::{
    Condition, FieldOfView, Form, GroupFieldOfView, Hazard, LimitQuantity, LimitSet, Provenance, Segment,
};
use super::weighting::find_weighting;
use crate::base::curve::Curve;
use crate::base::quantity::{SiValue, Time};
use crate::base::units::{duration_text, sig4};
use crate::spectrum::photometry::photopic;
use crate::spectrum::{Coverage, Spectrum};

/// What reaches the eye, for a limits evaluation.
#[derive(Debug, Clone, Copy)]
pub struct Exposure<'a> {
    /// Spectral irradiance at the cornea (or skin).
    pub irradiance: &'a Spectrum,
    /// Spectral radiance of what the eye sees, if known.
    pub radiance: Option<&'a Spectrum>,
    /// Full angle the source subtends, rad, if known.
    pub subtense_rad: Option<f64>,
    /// True when the light fills the field of view.
    pub full_field: bool,
    /// Exposure duration.
    pub duration: Time,
    /// Relative level over time as (duration s, factor) steps; `None` for a constant exposure.
    pub schedule: Option<&'a [(f64, f64)]>,
    /// Evaluate the opt-in hazards (aphakic eyes, infants).
    pub aphakic: bool,
}

impl<'a> Exposure<'a> {
    /// A constant exposure of `duration` to what reaches the cornea.
    pub fn of(c: &'a crate::cornea::geometry::Corneal, duration: Time, aphakic: bool) -> Exposure<'a> {
        Exposure {
            irradiance: &c.irradiance,
            radiance: c.radiance.as_ref(),
            subtense_rad: c.subtense.map(|a| a.si()),
            full_field: c.full_field,
            duration,
            schedule: None,
            aphakic,
        }
    }
}

/// The outcome for one hazard.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Verdict {
    /// Exposure ≤ limit.
    Within,
    /// Exposure > limit.
    Exceeds,
    /// The hazard could not be assessed, with the reason.
    NotAssessed(String),
    /// The hazard does not apply to this exposure, with the reason.
    NotApplicable(String),
}

impl Verdict {
    /// Short text for reports.
    pub fn text(&self) -> String {
        match self {
            Verdict::Within => "within limit".to_string(),
            Verdict::Exceeds => "EXCEEDS LIMIT".to_string(),
            Verdict::NotAssessed(r) => format!("not assessed: {r}"),
            Verdict::NotApplicable(r) => format!("not applicable: {r}"),
        }
    }
}

/// The longest permissible duration.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum TMax {
    /// The limit is reached after this many seconds.
    Seconds(f64),
    /// Not reached anywhere the set gives limits (up to this duration, s; infinite if open).
    NotReached(f64),
    /// Already exceeded at the shortest duration the set covers, s.
    BelowRange(f64),
}

/// The evaluation of one hazard.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HazardResult {
    /// Hazard id.
    pub id: String,
    /// Hazard name.
    pub name: String,
    /// Clause, row or equation.
    pub clause: String,
    /// Band, nm.
    pub band_nm: (f64, f64),
    /// Unit of the weighted quantity (W/m² or W/m²/sr).
    pub quantity_unit: &'static str,
    /// Weighted quantity over the band (covered part), before any averaging.
    pub weighted: Option<f64>,
    /// After averaging over the field of view at the exposure duration.
    pub averaged: Option<f64>,
    /// Averaging field of view at the exposure duration, rad.
    pub field_of_view_rad: Option<f64>,
    /// Status and source of that field of view.
    pub field_of_view_provenance: Option<Provenance>,
    /// C_α used, in the document's unit (rad or mrad).
    pub c_alpha: Option<f64>,
    /// Status and source of the C_α bounds.
    pub c_alpha_provenance: Option<Provenance>,
    /// Exposure in the limit's form at the duration (dose or rate) with its unit.
    pub exposure: Option<(f64, &'static str)>,
    /// Limit at the duration, same form and unit.
    pub limit: Option<(f64, &'static str)>,
    /// Exposure ÷ limit.
    pub ratio: Option<f64>,
    /// Longest permissible duration.
    pub t_max: Option<TMax>,
    /// Verdict.
    pub verdict: Verdict,
    /// Coverage of the band by the spectrum.
    pub coverage: Option<Coverage>,
    /// Ratio from the covered part only, when the band is not fully covered (a lower bound).
    pub lower_bound_ratio: Option<f64>,
    /// True when the spectrum covers only part of the band: the ratio is a lower bound and
    /// t_max an upper bound; a lower bound ≥ 1 is an exceedance on the measured band alone.
    pub partial: bool,
    /// Parts of this result that rest on values from memory.
    pub from_memory: Vec<String>,
    /// Values this result used that are the stricter of candidates the sources do not settle:
    /// what, the value and why.
    pub stricter_choices: Vec<String>,
    /// True when the ratio lies within 20 % of 1 (0.8–1.25) on a spectrum sampled coarser than
    /// [`crate::spectrum::COARSE_STEP_NM`]: the sampling alone could move it across the limit.
    pub near_limit_on_coarse_spectrum: bool,
    /// Source of the limit piece used.
    pub source: String,
}

fn unit(q: LimitQuantity, f: Form) -> &'static str {
    match (q, f) {
        (LimitQuantity::Irradiance, Form::Dose) => "J/m²",
        (LimitQuantity::Irradiance, Form::Rate) => "W/m²",
        (LimitQuantity::Radiance, Form::Dose) => "J/(m²·sr)",
        (LimitQuantity::Radiance, Form::Rate) => "W/(m²·sr)",
    }
}

fn segment_at(h: &Hazard, t: f64) -> Option<&Segment> {
    h.limits.iter().enumerate().find_map(|(i, s)| {
        let inside = (t > s.from_s || (i == 0 && t >= s.from_s)) && t <= s.to_s;
        inside.then_some(s)
    })
}

/// `x` with four significant digits, without trailing zeros (100, 11, 1.739, 0.25; 3.281e-6
/// below 10⁻³ and 1.2e7 from 10⁶).
pub(super) fn short(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    if !(1e-3..1e6).contains(&x.abs()) {
        return format!("{x:.3e}");
    }
    let digits = (3 - x.abs().log10().floor() as i32).max(0) as usize;
    let t = format!("{x:.digits$}");
    if t.contains('.') { t.trim_end_matches('0').trim_end_matches('.').to_string() } else { t }
}

/// The field-of-view piece that holds at duration `t`.
fn fov_piece(h: &Hazard, t: f64) -> Option<&FieldOfView> {
    h.field_of_view.iter().enumerate().find_map(|(i, f)| {
        let inside = (t > f.from_s || (i == 0 && t >= f.from_s)) && t <= f.to_s;
        inside.then_some(f)
    })
}

/// The hazard's weighting limited to its band (a box for an unweighted band).
fn band_weighting(h: &Hazard) -> Curve {
    let (lo, hi) = h.band_nm;
    match h.weighting.as_deref().and_then(find_weighting) {
        None => Curve::new(vec![lo, hi], vec![1.0, 1.0]).unwrap_or_else(|e| panic!("band box: {e}")),
        Some(w) => {
            let mut nodes = vec![lo];
            nodes.extend(w.curve.wavelength_nm().iter().copied().filter(|&x| x > lo && x < hi));
            nodes.push(hi);
            w.curve.resampled(&nodes).unwrap_or_else(|e| panic!("validated band: {e}"))
        }
    }
}

/// Everything about the exposure that does not depend on t.
struct Prepared<'h> {
    q: f64,
    alpha: Option<f64>,
    full_field: bool,
    /// A field of view that replaces the hazard's at every t (a risk group's own, at its time base).
    fov_override: Option<&'h GroupFieldOfView>,
}

impl Prepared<'_> {
    /// The averaging field of view at duration t, rad, with its provenance.
    fn fov<'a>(&'a self, h: &'a Hazard, t: f64) -> Option<(f64, &'a Provenance)> {
        match self.fov_override {
            Some(g) => Some((g.rad, &g.provenance)),
            None => fov_piece(h, t).map(|f| (f.at(t), &f.provenance)),
        }
    }

    /// True when the radiance is averaged over a field of view larger than the source at t.
    fn averages(&self, h: &Hazard, t: f64) -> bool {
        match (self.fov(h, t), self.alpha) {
            (Some((g, _)), Some(a)) => !self.full_field && a < g,
            _ => false,
        }
    }

    /// The quantity after field-of-view averaging at duration t.
    fn averaged(&self, h: &Hazard, t: f64) -> Option<f64> {
        match (self.fov(h, t).map(|f| f.0), self.alpha) {
            (None, _) => Some(self.q),
            (Some(_), _) if self.full_field => Some(self.q),
            (Some(g), Some(a)) if a < g => {
                let s = |x: f64| (x.min(FRAC_PI_2 * 2.0) / 2.0).sin().powi(2);
                Some(self.q * s(a) / s(g))
            }
            (Some(_), Some(_)) => Some(self.q),
            (Some(_), None) => None,
        }
    }

    fn c_alpha(&self, h: &Hazard) -> Option<f64> {
        let c = h.c_alpha.as_ref()?;
        if self.full_field {
            return Some(c.value(c.max_rad));
        }
        self.alpha.map(|a| c.value(a))
    }

    /// Dose over duration `t` (with the schedule's factors) and the dose the limit allows.
    fn ratio<'h>(&self, h: &'h Hazard, t: f64, schedule_factor: f64) -> Option<(f64, f64, &'h Segment)> {
        let seg = segment_at(h, t)?;
        let q = self.averaged(h, t)?;
        let c = if seg.alpha_exponent != 0.0 { self.c_alpha(h)?.powf(seg.alpha_exponent) } else { 1.0 };
        let el = seg.coefficient * t.powf(seg.time_exponent) * c;
        let allowed_dose = match seg.form {
            Form::Dose => el,
            Form::Rate => el * t,
        };
        let dose = q * t * schedule_factor;
        Some((dose, allowed_dose, seg))
    }
}

fn t_max(h: &Hazard, p: &Prepared) -> Option<TMax> {
    let first = h.limits.first()?.from_s.max(1e-9);
    let last = h.limits.last()?.to_s;
    let top = if last.is_finite() { last } else { 1e9 };
    let r = |t: f64| p.ratio(h, t, 1.0).map(|(d, a, _)| d / a);
    // At most 60 points per decade over a bounded range (pieces end by 10¹⁰ s or are open).
    let steps = ((top / first).log10() * 60.0).ceil().clamp(1.0, 2000.0) as usize;
    let mut prev = first;
    if r(first)? > 1.0 {
        return Some(TMax::BelowRange(first));
    }
    for i in 1..=steps {
        let t = (first.ln() + (top.ln() - first.ln()) * i as f64 / steps as f64).exp().min(top);
        if r(t).is_some_and(|x| x > 1.0) {
            let (mut lo, mut hi) = (prev, t);
            for _ in 0..60 {
                let mid = (lo * hi).sqrt();
                if r(mid).is_some_and(|x| x > 1.0) {
                    hi = mid;
                } else {
                    lo = mid;
                }
            }
            return Some(TMax::Seconds(lo));
        }
        prev = t;
    }
    Some(TMax::NotReached(last))
}

/// A result for `h` with nothing evaluated yet, carrying the from-memory notes of its
/// weighting and definition.
fn blank_result(h: &Hazard) -> HazardResult {
    let mut out = HazardResult {
        id: h.id.clone(),
        name: h.name.clone(),
        clause: h.clause.clone(),
        band_nm: h.band_nm,
        quantity_unit: unit(h.quantity, Form::Rate),
        weighted: None,
        averaged: None,
        field_of_view_rad: None,
        field_of_view_provenance: None,
        c_alpha: None,
        c_alpha_provenance: None,
        exposure: None,
        limit: None,
        ratio: None,
        t_max: None,
        verdict: Verdict::NotAssessed("not evaluated".into()),
        partial: false,
        coverage: None,
        lower_bound_ratio: None,
        from_memory: Vec::new(),
        stricter_choices: Vec::new(),
        near_limit_on_coarse_spectrum: false,
        source: String::new(),
    };
    if let Some(w) = h.weighting.as_deref().and_then(find_weighting)
        && w.is_from_memory()
    {
        out.from_memory.push(format!("weighting {}", w.name));
    }
    if h.status.starts_with("from memory") {
        let why = h.status.split_once(':').map_or(String::new(), |(_, w)| format!(": {}", w.trim()));
        out.from_memory.push(format!("hazard definition ({}){why}", h.clause));
    }
    out
}

/// `out` with its verdict set to `v`.
fn with_verdict(mut out: HazardResult, v: Verdict) -> HazardResult {
    out.verdict = v;
    out
}

/// The spectrum the hazard is evaluated on, if the hazard applies to the exposure: the
/// opt-in rule, the quantity the hazard limits, then its conditions of application.
fn applicable_spectrum<'a>(h: &Hazard, e: &Exposure<'a>) -> Result<&'a Spectrum, Verdict> {
    if h.conditions.contains(&Condition::OptIn) && !e.aphakic {
        return Err(Verdict::NotApplicable("opt-in hazard for aphakic eyes and infants (ask for it)".into()));
    }
    let spectrum = match h.quantity {
        LimitQuantity::Irradiance => e.irradiance,
        LimitQuantity::Radiance => match e.radiance {
            Some(l) => l,
            None => {
                return Err(Verdict::NotAssessed(
                    "needs the radiance the eye sees: give the source's size or subtense".into(),
                ));
            }
        },
    };
    for c in &h.conditions {
        match *c {
            Condition::SmallerThanRad(r) => check_smaller_than(r, e)?,
            Condition::AtLeastRad(r) => check_at_least(r, e)?,
            Condition::LuminanceBelow(limit) => check_luminance_below(limit, e)?,
            Condition::OptIn => {}
        }
    }
    Ok(spectrum)
}

/// The condition "only for sources smaller than `r` rad".
fn check_smaller_than(r: f64, e: &Exposure<'_>) -> Result<(), Verdict> {
    match (e.subtense_rad, e.full_field) {
        (_, true) => {
            Err(Verdict::NotApplicable(format!("the light fills the field (not a source below {r} rad)")))
        }
        (Some(a), _) if a >= r => Err(Verdict::NotApplicable(format!(
            "the source subtends {} mrad, not below {} mrad",
            sig4(a * 1e3),
            sig4(r * 1e3)
        ))),
        (None, _) => Err(Verdict::NotAssessed("needs the source's subtense".into())),
        _ => Ok(()),
    }
}

/// The condition "only for sources of at least `r` rad".
fn check_at_least(r: f64, e: &Exposure<'_>) -> Result<(), Verdict> {
    match (e.subtense_rad, e.full_field) {
        (_, true) => Ok(()),
        (Some(a), _) if a < r => Err(Verdict::NotApplicable(format!(
            "the source subtends {} mrad, below {} mrad",
            sig4(a * 1e3),
            sig4(r * 1e3)
        ))),
        (None, _) => Err(Verdict::NotAssessed("needs the source's subtense".into())),
        _ => Ok(()),
    }
}

/// The condition "only when the seen luminance is below `limit` cd/m²".
fn check_luminance_below(limit: f64, e: &Exposure<'_>) -> Result<(), Verdict> {
    let lum = e.radiance.map(|l| photopic(l).raw);
    match lum {
        None => Err(Verdict::NotAssessed("needs the seen luminance".into())),
        Some(l) if l >= limit => Err(Verdict::NotApplicable(format!(
            "the seen luminance {} cd/m² is not below {} cd/m² (a visible stimulus)",
            sig4(l),
            sig4(limit)
        ))),
        _ => Ok(()),
    }
}

/// The exposure duration, s, and the schedule's mean relative level (1 for a constant
/// exposure).
fn duration_and_factor(e: &Exposure<'_>) -> Result<(f64, f64), Verdict> {
    let t = e.duration.si();
    if !(t > 0.0 && t.is_finite()) {
        return Err(Verdict::NotAssessed(format!("exposure duration {t} s must be above 0 s")));
    }
    let factor = match e.schedule {
        None => 1.0,
        Some(steps) => {
            let total: f64 = steps.iter().map(|s| s.0).sum();
            if total <= 0.0 {
                return Err(Verdict::NotAssessed("the schedule has no duration".into()));
            }
            steps.iter().map(|s| s.0 * s.1).sum::<f64>() / total
        }
    };
    Ok((t, factor))
}

/// Why no ratio could be formed at duration `t`.
fn no_limit_reason(h: &Hazard, p: &Prepared, t: f64) -> String {
    let (a, b) = (h.limits[0].from_s, h.limits[h.limits.len() - 1].to_s);
    if segment_at(h, t).is_none() {
        if b.is_finite() {
            format!(
                "this set gives no limit for an exposure of {} (it covers {} to {})",
                duration_text(t),
                duration_text(a),
                duration_text(b)
            )
        } else {
            format!(
                "this set gives no limit for an exposure of {} (it covers {} and longer)",
                duration_text(t),
                duration_text(a)
            )
        }
    } else if h.c_alpha.is_some() && p.c_alpha(h).is_none() {
        "needs the source's subtense for C_α".to_string()
    } else {
        "needs the source's subtense to average over the field of view".to_string()
    }
}

/// Records the limit piece used, and the exposure and limit in its form at duration `t`.
fn record_limit(out: &mut HazardResult, h: &Hazard, seg: &Segment, dose: f64, allowed: f64, t: f64) {
    let p = &seg.provenance;
    if p.is_from_memory() {
        out.from_memory.push(format!("limit {}", p.source));
    }
    if let Some(why) = &p.stricter_choice {
        out.stricter_choices.push(format!("limit: {why}"));
    }
    out.source = p.source.clone();
    out.exposure = Some(match seg.form {
        Form::Dose => (dose, unit(h.quantity, Form::Dose)),
        Form::Rate => (dose / t, unit(h.quantity, Form::Rate)),
    });
    out.limit = Some(match seg.form {
        Form::Dose => (allowed, unit(h.quantity, Form::Dose)),
        Form::Rate => (allowed / t, unit(h.quantity, Form::Rate)),
    });
}

/// Records the field of view and C_α in use at duration `t` with their provenance; flags the
/// from-memory ones that can raise the result and lists the stricter choices that shaped it.
///
/// A field of view matters when the source has a size and does not fill the field: a
/// from-memory field is flagged when it averages (a smaller true field would average less), a
/// stricter choice is listed whenever it could have averaged. C_α matters when the limit piece
/// used depends on it.
fn record_geometry(out: &mut HazardResult, h: &Hazard, p: &Prepared<'_>, seg: Option<&Segment>, t: f64) {
    if let Some((g, prov)) = p.fov(h, t) {
        out.field_of_view_rad = Some(g);
        out.field_of_view_provenance = Some(prov.clone());
        let mrad = format!("{} mrad", short(g * 1e3));
        if prov.is_from_memory() && p.averages(h, t) {
            out.from_memory.push(format!("field of view {mrad} ({})", prov.source));
        }
        if let Some(why) = &prov.stricter_choice
            && !p.full_field
            && p.alpha.is_some()
        {
            out.stricter_choices.push(format!("field of view {mrad}: {why}"));
        }
    }
    out.c_alpha = p.c_alpha(h);
    if let Some(c) = &h.c_alpha {
        out.c_alpha_provenance = Some(c.provenance.clone());
        if seg.is_some_and(|s| s.alpha_exponent != 0.0) && out.c_alpha.is_some() {
            let bounds = format!("C_α bounds {}–{} mrad", short(c.min_rad * 1e3), short(c.max_rad * 1e3));
            if c.provenance.is_from_memory() {
                out.from_memory.push(format!("{bounds} ({})", c.provenance.source));
            }
            if let Some(why) = &c.provenance.stricter_choice {
                out.stricter_choices.push(format!("{bounds}: {why}"));
            }
        }
    }
}

/// Evaluates a hazard that applies to the exposure, on `spectrum`, filling `out`; `fov` replaces
/// the hazard's field of view (a risk group's own at its time base).
fn evaluate_on(
    h: &Hazard,
    e: &Exposure<'_>,
    spectrum: &Spectrum,
    fov: Option<&GroupFieldOfView>,
    mut out: HazardResult,
) -> HazardResult {
    let w = band_weighting(h);
    let (q, coverage) = spectrum.to_energy().weighted(&w);
    out.weighted = Some(q);
    out.coverage = Some(coverage);
    let p = Prepared { q, alpha: e.subtense_rad, full_field: e.full_field, fov_override: fov };
    let (t, factor) = match duration_and_factor(e) {
        Ok(x) => x,
        Err(v) => return with_verdict(out, v),
    };
    out.averaged = p.averaged(h, t);
    let ratio = p.ratio(h, t, factor);
    record_geometry(&mut out, h, &p, ratio.map(|r| r.2), t);
    let Some((dose, allowed, seg)) = ratio else {
        let reason = no_limit_reason(h, &p, t);
        return with_verdict(out, Verdict::NotAssessed(reason));
    };
    record_limit(&mut out, h, seg, dose, allowed, t);
    let ratio = dose / allowed;
    // A group's own field of view holds at its time base only, so no t_max with one.
    out.t_max = if e.schedule.is_none() && fov.is_none() { t_max(h, &p) } else { None };
    if !coverage.is_complete() {
        // The covered part alone: a lower bound on the ratio. At or above 1 it already exceeds.
        out.lower_bound_ratio = Some(ratio);
        out.partial = true;
        if ratio >= 1.0 {
            out.ratio = Some(ratio);
            return with_verdict(out, Verdict::Exceeds);
        }
        out.t_max = None;
        let (lo, hi) = spectrum.range_nm();
        return with_verdict(
            out,
            Verdict::NotAssessed(format!(
                "spectrum covers {lo}–{hi} nm, hazard needs {}–{} nm; the measured band alone gives {ratio:.3e} of the limit",
                h.band_nm.0, h.band_nm.1
            )),
        );
    }
    out.ratio = Some(ratio);
    out.near_limit_on_coarse_spectrum =
        spectrum.max_step_nm() > crate::spectrum::COARSE_STEP_NM && (0.8..=1.25).contains(&ratio);
    out.verdict = if ratio <= 1.0 { Verdict::Within } else { Verdict::Exceeds };
    out
}

/// Evaluates one hazard; `fov` replaces the hazard's field of view (a risk group's own field at
/// its time base).
pub(super) fn assess(h: &Hazard, e: &Exposure<'_>, fov: Option<&GroupFieldOfView>) -> HazardResult {
    let out = blank_result(h);
    match applicable_spectrum(h, e) {
        Ok(spectrum) => evaluate_on(h, e, spectrum, fov, out),
        Err(v) => with_verdict(out, v),
    }
}

/// Evaluates every hazard of `set` for `exposure`.
pub fn evaluate_set(set: &LimitSet, exposure: &Exposure<'_>) -> Vec<HazardResult> {
    set.hazards.iter().map(|h| assess(h, exposure, None)).collect()
}
