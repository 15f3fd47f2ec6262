//! The ratio of every hazard as plain arithmetic on the perturbed inputs.
//!
//! The engine ([`crate::limits::evaluate_set`]) is run twice at the nominal values, on the
//! source as made movable by [`crate::limits::report::movable_source`] and placed at its
//! distance d₀ by [`crate::limits::MovableSource::at`]: once on the spectrum S(λ) and once on
//! it tilted. Each draw then changes only factors the engine applies after its weighted
//! integrals (see [`crate::limits::sweep`] for the geometry):
//!
//! - the reading scale k multiplies every spectrum, so every weighted quantity Q;
//! - a small source (a spectral intensity): E ∝ 1/d², α = 2·atan(D / 2d), the seen radiance
//!   L = E / (π sin²(α/2));
//! - an extended source (a radiance with its size): L is unchanged, E = π·L·sin²(α/2);
//! - the field-of-view average Q·sin²(α/2)/sin²(γ/2) when α < γ, and the limit's C_α^k
//!   (C_α = α clamped to the set's bounds), as in the engine;
//! - the spectral tilt f(λ) = 1 + c·(g(λ) − ḡ) ([`TiltShape`]: linear in λ at c per 100 nm
//!   within 300 nm of the photopic centroid λ₀ of S, flat beyond, less its photopic mean so the
//!   luminous quantity of S is unchanged): Q(c) = Q + c·K·(Q′ − Q), with Q′ the weighted
//!   quantity of the positive spectrum S·(1 + (g − ḡ)/K).
//!
//! All of this is exact for the engine's rules: the integration rule is linear in the sample
//! values, so a tilt applied to the samples of S adds exactly c times the second integral,
//! and the geometry factors are the ones the engine and the sweep apply. The tilt is defined
//! on the source's samples (between samples the tilted spectrum is interpolated linearly, as
//! every spectrum is).

use std::f64::consts::PI;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Length, SiValue};
use crate::limits::report::LimitsRequest;
use crate::limits::{CAlpha, Condition, Hazard, LimitQuantity, Segment};
use crate::limits::{Exposure, HazardResult, MovableSource, evaluate_set};
use crate::spectrum::photometry::photopic;
use crate::spectrum::{Measure, Spectrum};

/// The wavelength span over which the spectral tilt's relative error is stated, nm.
pub const TILT_SPAN_NM: f64 = 100.0;

/// The tilt is linear within this many spans of the pivot and flat beyond (so a spectrum
/// reaching far into the infrared is not driven negative by a small tilt).
pub const TILT_REACH: f64 = 3.0;

/// sin²(α/2), the engine's solid-angle factor (α at most π).
fn s2(alpha: f64) -> f64 {
    (alpha.min(PI) / 2.0).sin().powi(2)
}

/// One draw's inputs: the reading scale k, the distance d (m), the size D (m) and the tilt c.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Draw {
    pub scale: f64,
    pub distance_m: f64,
    pub size_m: Option<f64>,
    pub tilt: f64,
}

/// What a draw changes in the light at the eye, relative to the nominal.
struct Factors {
    irradiance: f64,
    radiance: f64,
    alpha: Option<f64>,
}

/// One hazard with a nominal ratio, ready for arithmetic.
pub(super) struct HazardModel {
    pub id: String,
    pub name: String,
    pub nominal: f64,
    quantity: LimitQuantity,
    /// dQ/dc ÷ Q: the tilt's relative effect per unit c.
    tilt_slope: f64,
    /// The averaging field of view at the exposure duration, rad.
    gamma: Option<f64>,
    /// The C_α rule and its exponent k in the limit piece used.
    c_alpha: Option<(CAlpha, f64)>,
    conditions: Vec<Condition>,
}

/// The source, the nominal geometry and the hazards.
pub(super) struct Model {
    pub nominal: Draw,
    extended: bool,
    alpha0: Option<f64>,
    /// The seen luminance at the nominal draw, cd/m² (for a luminance condition).
    luminance0: Option<f64>,
    pub hazards: Vec<HazardModel>,
    /// Hazards without a nominal ratio, with the engine's verdict.
    pub skipped: Vec<(String, String)>,
    /// The tilt's shape.
    pub tilt: TiltShape,
    /// The largest |g(λ) − ḡ| over the source's samples.
    pub tilt_reach: f64,
}

/// The limit piece at duration `t`, as the engine picks it.
fn segment_at(h: &Hazard, t: f64) -> Option<&Segment> {
    h.limits
        .iter()
        .enumerate()
        .find_map(|(i, s)| ((t > s.from_s || (i == 0 && t >= s.from_s)) && t <= s.to_s).then_some(s))
}

/// The engine's results for the movable source `m` at `d`.
fn evaluate_at(
    r: &LimitsRequest<'_>,
    m: &MovableSource,
    d: Length,
) -> Result<(Vec<HazardResult>, Option<f64>)> {
    let c = m.at(d)?;
    let e = Exposure::of(&c, r.duration, r.aphakic);
    let luminance = c.radiance.as_ref().map(|l| photopic(l).raw);
    let results = evaluate_set(r.set, &e).into_iter().filter(|h| r.only.is_empty() || r.only.contains(&h.id));
    Ok((results.collect(), luminance))
}

/// The shape of the spectral tilt: g(λ) − ḡ with g(λ) = (λ − λ₀)/[`TILT_SPAN_NM`] limited to
/// ±[`TILT_REACH`], λ₀ the photopic centroid of the source spectrum and ḡ the photopic mean of
/// g, so a tilt leaves the source's luminous quantity unchanged.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TiltShape {
    /// λ₀, nm.
    pub pivot_nm: f64,
    /// ḡ.
    pub mean: f64,
}

impl TiltShape {
    /// g(λ) − ḡ at `nm`.
    pub fn at(&self, nm: f64) -> f64 {
        ((nm - self.pivot_nm) / TILT_SPAN_NM).clamp(-TILT_REACH, TILT_REACH) - self.mean
    }

    /// The shape for spectrum `s`.
    pub(super) fn of(s: &Spectrum) -> Result<TiltShape> {
        let photopic_of = |f: &dyn Fn(f64) -> f64| -> Result<f64> {
            let curve = s.curve().map(|nm, v| v * f(nm));
            Ok(photopic(&Spectrum::new(curve, s.measure(), s.basis(), s.label())?).raw)
        };
        let v = photopic(s).raw;
        if !(v > 0.0 && v.is_finite()) {
            return Err(Error::input(
                "the spectral tilt needs a source with some light between 360 and 830 nm",
            ));
        }
        let pivot_nm = photopic_of(&|nm| nm)? / v;
        let shifted = TiltShape { pivot_nm, mean: -TILT_REACH };
        let mean = photopic_of(&|nm| shifted.at(nm))? / v - TILT_REACH;
        Ok(TiltShape { pivot_nm, mean })
    }

    /// The largest |g(λ) − ḡ| over the samples of `s`.
    pub(super) fn reach(&self, s: &Spectrum) -> f64 {
        s.curve().wavelength_nm().iter().map(|&nm| self.at(nm).abs()).fold(0.0, f64::max)
    }
}

/// S(λ)·(1 + (g(λ) − ḡ)/K), positive with K = 2·max|g − ḡ|; returns it with K.
pub(super) fn tilted(s: &Spectrum, shape: &TiltShape) -> Result<(Spectrum, f64)> {
    let k = 2.0 * shape.reach(s).max(1e-3);
    let curve = s.curve().map(|nm, v| v * (1.0 + shape.at(nm) / k));
    Ok((Spectrum::new(curve, s.measure(), s.basis(), s.label())?, k))
}

/// The corneal irradiance and seen radiance for draw `d` relative to the nominal distance
/// `d0_m` and subtense `alpha0`, and the draw's subtense: a radiance with its size (`extended`)
/// keeps its radiance and its irradiance follows the solid angle; a small source's irradiance
/// follows the inverse square and its radiance is the irradiance over the solid angle.
pub(super) fn light_factors(
    extended: bool,
    d0_m: f64,
    alpha0: Option<f64>,
    d: &Draw,
) -> (f64, f64, Option<f64>) {
    let alpha = d.size_m.map(|s| 2.0 * (s / (2.0 * d.distance_m)).atan());
    let solid = match (alpha, alpha0) {
        (Some(a), Some(a0)) => s2(a) / s2(a0),
        _ => 1.0,
    };
    if extended {
        (d.scale * solid, d.scale, alpha)
    } else {
        let e = d.scale * (d0_m / d.distance_m).powi(2);
        (e, e / solid, alpha)
    }
}

impl Model {
    /// Builds the model of the request's source at its distance.
    pub(super) fn new(r: &LimitsRequest<'_>) -> Result<Model> {
        let m = crate::limits::report::movable_source(r.source, r.filters)
            .map_err(|why| Error::input(format!("the source cannot be moved: {why}")))?;
        let d0 = r.source.distance.ok_or_else(|| {
            Error::input("the source has no distance to the eye: give its distance so it can be varied")
        })?;
        let tilt_shape = TiltShape::of(&m.spectrum)?;
        let (s_tilt, k) = tilted(&m.spectrum, &tilt_shape)?;
        let (nominal, luminance0) = evaluate_at(r, &m, d0)?;
        let m_tilt = MovableSource { spectrum: s_tilt, size: m.size, filters: m.filters.clone() };
        let (tilt, _) = evaluate_at(r, &m_tilt, d0)?;
        let size_m = m.size.map(|s| s.si());
        let alpha0 = size_m.map(|s| 2.0 * (s / (2.0 * d0.si())).atan());
        let mut hazards = Vec::new();
        let mut skipped = Vec::new();
        for (h0, h1) in nominal.iter().zip(&tilt) {
            let hazard = r.set.hazard(&h0.id).ok_or_else(|| Error::data(format!("no hazard '{}'", h0.id)))?;
            match (h0.ratio, h0.partial, h0.weighted, h1.weighted) {
                (Some(ratio), false, Some(q), Some(q1)) if q > 0.0 => {
                    hazards.push(HazardModel::new(hazard, h0, ratio, k * (q1 / q - 1.0), r));
                }
                _ => skipped.push((h0.id.clone(), h0.verdict.text())),
            }
        }
        let nominal = Draw { scale: 1.0, distance_m: d0.si(), size_m, tilt: 0.0 };
        let extended = m.spectrum.measure() == Measure::Radiance;
        let tilt_reach = tilt_shape.reach(&m.spectrum);
        Ok(Model { nominal, extended, alpha0, luminance0, hazards, skipped, tilt: tilt_shape, tilt_reach })
    }

    /// The light at the eye for draw `d`, relative to the nominal.
    fn factors(&self, d: &Draw) -> Factors {
        let (irradiance, radiance, alpha) =
            light_factors(self.extended, self.nominal.distance_m, self.alpha0, d);
        Factors { irradiance, radiance, alpha }
    }

    /// Every hazard's ratio for draw `d`, into `out`; returns a bit per hazard (up to 64) set
    /// when the hazard's condition of application does not hold for this draw.
    pub(super) fn ratios(&self, d: &Draw, out: &mut [f64]) -> u64 {
        let f = self.factors(d);
        let luminance = self.luminance0.map(|l| l * f.radiance);
        let mut off = 0u64;
        for (i, (h, o)) in self.hazards.iter().zip(out.iter_mut()).enumerate() {
            *o = h.ratio(&f, self.alpha0, d.tilt);
            if !h.applies(f.alpha, luminance) {
                off |= 1 << i.min(63);
            }
        }
        off
    }
}

impl HazardModel {
    fn new(
        h: &Hazard,
        r0: &HazardResult,
        nominal: f64,
        tilt_slope: f64,
        r: &LimitsRequest<'_>,
    ) -> HazardModel {
        let t = r.duration.si();
        let k = segment_at(h, t).map_or(0.0, |s| s.alpha_exponent);
        let c_alpha = h.c_alpha.clone().filter(|_| k != 0.0 && r0.c_alpha.is_some()).map(|c| (c, k));
        HazardModel {
            id: h.id.clone(),
            name: h.name.clone(),
            nominal,
            quantity: h.quantity,
            tilt_slope,
            gamma: r0.field_of_view_rad,
            c_alpha,
            conditions: h.conditions.clone(),
        }
    }

    /// The ratio for the factors `f` (nominal subtense `alpha0`, tilt `c`).
    fn ratio(&self, f: &Factors, alpha0: Option<f64>, c: f64) -> f64 {
        let q = match self.quantity {
            LimitQuantity::Irradiance => f.irradiance,
            LimitQuantity::Radiance => f.radiance,
        } * (1.0 + c * self.tilt_slope);
        let average = |a: f64, g: f64| if a < g { s2(a) / s2(g) } else { 1.0 };
        let averaged = match (self.gamma, f.alpha, alpha0) {
            (Some(g), Some(a), Some(a0)) => average(a, g) / average(a0, g),
            _ => 1.0,
        };
        let limit = match (&self.c_alpha, f.alpha, alpha0) {
            (Some((c, k)), Some(a), Some(a0)) => (c.value(a) / c.value(a0)).powf(*k),
            _ => 1.0,
        };
        self.nominal * q * averaged / limit
    }

    /// True when the hazard's conditions of application hold for subtense `alpha` and seen
    /// luminance `luminance` (the opt-in rule is settled at the nominal).
    fn applies(&self, alpha: Option<f64>, luminance: Option<f64>) -> bool {
        self.conditions.iter().all(|c| match *c {
            Condition::SmallerThanRad(r) => alpha.is_some_and(|a| a < r),
            Condition::AtLeastRad(r) => alpha.is_some_and(|a| a >= r),
            Condition::LuminanceBelow(l) => luminance.is_some_and(|x| x < l),
            Condition::OptIn => true,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::assess::{demo, parse_scenario_file};

    /// The fast ratios at `d` against the engine run on the source rescaled, resized, tilted
    /// and moved (what each draw stands for), for every hazard of both demo sets.
    fn check_against_engine(d: Draw) {
        let s = parse_scenario_file(demo("stimulus-review").unwrap(), "demo", None).unwrap();
        let l = s.limits.as_ref().unwrap();
        for set in &l.sets {
            let r = LimitsRequest {
                source: &s.view.sources[0],
                filters: &s.view.filters,
                set,
                duration: l.duration,
                aphakic: false,
                classify: None,
                only: &[],
            };
            let model = Model::new(&r).unwrap();
            let mut fast = vec![0.0; model.hazards.len()];
            model.ratios(&d, &mut fast);
            let m = crate::limits::report::movable_source(r.source, r.filters).unwrap();
            let curve = m.spectrum.curve().map(|nm, v| v * d.scale * (1.0 + d.tilt * model.tilt.at(nm)));
            let spectrum = Spectrum::new(curve, m.spectrum.measure(), m.spectrum.basis(), "moved").unwrap();
            let moved =
                MovableSource { spectrum, size: d.size_m.map(Length::from_si), filters: m.filters.clone() };
            let (engine, _) = evaluate_at(&r, &moved, Length::from_si(d.distance_m)).unwrap();
            assert!(!model.hazards.is_empty());
            for (h, x) in model.hazards.iter().zip(&fast) {
                let e = engine.iter().find(|e| e.id == h.id).and_then(|e| e.ratio).unwrap();
                assert!((x / e - 1.0).abs() < 1e-9, "{} {}: fast {x}, engine {e}", set.id, h.id);
            }
        }
    }

    #[test]
    fn each_draw_is_the_engine_on_the_changed_source() {
        check_against_engine(Draw { scale: 1.0, distance_m: 0.2, size_m: Some(0.005), tilt: 0.0 });
        check_against_engine(Draw { scale: 1.13, distance_m: 0.17, size_m: Some(0.0057), tilt: 0.0 });
        check_against_engine(Draw { scale: 0.9, distance_m: 0.26, size_m: Some(0.0042), tilt: 0.04 });
        check_against_engine(Draw { scale: 1.0, distance_m: 0.2, size_m: Some(0.005), tilt: -0.05 });
    }
}
