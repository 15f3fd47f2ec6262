//! One source moved along its axis: every hazard of a limit set at each of many distances
//! ([`sweep_distance`]), the nearest distance at which each hazard and each IEC 62471 risk group
//! is met ([`solve_nearest_distance`]), and the longest exposure within every limit at the placed
//! distance ([`solve_longest_duration`]). With the source where it is placed, [`sweep_duration`],
//! [`sweep_level`] and [`sweep_transmittance`] vary the exposure duration, a factor on the
//! source's light and a neutral filter's transmittance.
//!
//! The source is made movable as the risk-group classification makes it
//! ([`super::report::movable_source`]): a spectral intensity I (a measured irradiance becomes
//! I = E·d₀², a flux its on-axis intensity), or a radiance L with its size D, with the filters
//! of the lamp system. The spectra are placed and filtered once, at 1 m; at distance d,
//! on the axis (angle of incidence 0):
//!
//! - a small source: E(d) = E(1 m)·(1 m / d)² (inverse-square law); with a size, the source
//!   subtends α = 2·atan(D / 2d) and the seen radiance is L = E(d) / (π sin²(α/2)), as
//!   [`crate::cornea::geometry::corneal`] derives it;
//! - an extended disc: L is the same at every distance and E(d) = π·L·sin²(α/2).
//!
//! Every hazard is then evaluated by the same engine as [`super::report::assess_limits`], so a
//! point equals an assessment with the source placed at that distance. The hazards' weighted
//! integrals are taken again at each distance (the engine takes a spectrum, not a weighted
//! sum); the light path (placing and filtering) is not.

mod placed;

pub use placed::{
    DurationPoint, LevelPoint, MAX_ASSESSED_POINTS, TransmittancePoint, log_durations, log_factors,
    sweep_duration, sweep_level, sweep_transmittance,
};

use std::f64::consts::PI;

use rayon::prelude::*;

use super::evaluate::{Exposure, HazardResult, TMax, Verdict, assess};
use super::report::{LimitsRequest, assess_limits, movable_source};
use super::risk::{MovableSource, RiskGroup};
use super::set::{Hazard, RiskGroupBases};
use crate::base::error::{Error, Result};
use crate::base::quantity::{Length, SiValue, Time};
use crate::cornea::geometry::subtense;
use crate::spectrum::{Measure, Spectrum};

/// The relative tolerance on distance of [`solve_nearest_distance`]: the bisection stops when
/// the far (safe) end is within a factor 1 + 10⁻⁶ of the near end.
pub const SOLVE_TOLERANCE: f64 = 1e-6;

/// Log-spaced distances scanned across the bracket before bisecting, to find the outermost
/// change from exceeding to within.
pub const SCAN_POINTS: usize = 64;

/// The most points a sweep's grid ([`log_distances`], [`log_durations`], [`log_factors`]) makes.
pub const MAX_POINTS: usize = 100_000;

/// The longest permissible exposure duration t_max of a hazard.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum MaxDuration {
    /// The limit is reached after this duration.
    Limited(Time),
    /// Not reached anywhere the set gives limits, up to this duration (infinite if open).
    NotReached(Time),
    /// Already exceeded at the shortest duration the set covers.
    ExceededBefore(Time),
}

impl MaxDuration {
    fn of(t: TMax) -> MaxDuration {
        match t {
            TMax::Seconds(s) => MaxDuration::Limited(Time::from_si(s)),
            TMax::NotReached(s) => MaxDuration::NotReached(Time::from_si(s)),
            TMax::BelowRange(s) => MaxDuration::ExceededBefore(Time::from_si(s)),
        }
    }

    /// The engine's form, seconds as f64 (for the shared report wording).
    pub fn to_t_max(self) -> TMax {
        match self {
            MaxDuration::Limited(t) => TMax::Seconds(t.si()),
            MaxDuration::NotReached(t) => TMax::NotReached(t.si()),
            MaxDuration::ExceededBefore(t) => TMax::BelowRange(t.si()),
        }
    }
}

/// One hazard at one distance.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HazardPoint {
    /// Hazard id.
    pub id: String,
    /// Hazard name.
    pub name: String,
    /// Exposure ÷ limit at the request's duration.
    pub ratio: Option<f64>,
    /// The ratio of the covered part of the band when the spectrum covers only part of it.
    pub lower_bound: Option<f64>,
    /// Longest permissible duration t_max.
    pub t_max: Option<MaxDuration>,
    /// True when t_max is only an upper bound (band partly covered).
    pub partial: bool,
    /// Verdict at the request's duration.
    pub verdict: Verdict,
}

/// The IEC 62471 risk group at one distance: the highest group of the hazards with risk-group
/// data, each the first of Exempt, RG1, RG2 whose time base it does not exceed.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct GroupAt {
    /// The overall group, `None` when no hazard could be grouped.
    pub group: Option<RiskGroup>,
    /// True when some hazard could not be grouped, so the group is a lower bound.
    pub lower_bound: bool,
}

/// Every hazard of the request at one distance.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DistancePoint {
    /// Distance from the source to the eye.
    pub distance: Length,
    /// Per hazard, in the set's order (only those asked for).
    pub hazards: Vec<HazardPoint>,
    /// The risk group, when the request asks for a classification and the set has risk-group data.
    pub risk_group: Option<GroupAt>,
}

/// The source placed and filtered once, at 1 m.
struct Mover {
    /// Corneal spectral irradiance at 1 m, W·m⁻²·nm⁻¹ (after the filters).
    irradiance_1m: Spectrum,
    /// The seen spectral radiance of an extended source (after the filters).
    radiance: Option<Spectrum>,
    /// Source diameter, m.
    size_m: Option<f64>,
}

/// What reaches the eye at one distance.
struct Arrival {
    irradiance: Spectrum,
    radiance: Option<Spectrum>,
    subtense_rad: Option<f64>,
}

impl Mover {
    fn new(m: &MovableSource) -> Result<Mover> {
        let c = m.at(Length::from_si(1.0))?;
        let extended = m.spectrum.measure() == Measure::Radiance;
        Ok(Mover {
            irradiance_1m: c.irradiance,
            radiance: if extended { c.radiance } else { None },
            size_m: m.size.map(|s| s.si()),
        })
    }

    /// The light at `distance_m`: E = E(1 m)/d² and L = E/(π sin²(α/2)) for a small source,
    /// E = π·L·sin²(α/2) for an extended one, with α = 2·atan(D / 2d).
    fn at(&self, distance_m: f64) -> Result<Arrival> {
        let d = Length::from_si(distance_m);
        let alpha = self.size_m.map(|s| subtense(Length::from_si(s), d)).transpose()?.map(|a| a.si());
        let solid = |a: f64| PI * (a / 2.0).sin().powi(2);
        if let (Some(l), Some(a)) = (&self.radiance, alpha) {
            let irradiance = l.scaled_as(solid(a), Measure::Irradiance)?;
            return Ok(Arrival { irradiance, radiance: Some(l.clone()), subtense_rad: alpha });
        }
        if !(distance_m > 0.0 && distance_m.is_finite()) {
            return Err(Error::input(format!("distance {distance_m} m must be above 0 m")));
        }
        let inverse_square = 1.0 / (distance_m * distance_m);
        let irradiance = self.irradiance_1m.scaled_as(inverse_square, Measure::Irradiance)?;
        let radiance = alpha
            .map(|a| self.irradiance_1m.scaled_as(inverse_square / solid(a), Measure::Radiance))
            .transpose()?;
        Ok(Arrival { irradiance, radiance, subtense_rad: alpha })
    }
}

impl Arrival {
    fn exposure(&self, duration: Time, aphakic: bool) -> Exposure<'_> {
        Exposure {
            irradiance: &self.irradiance,
            radiance: self.radiance.as_ref(),
            subtense_rad: self.subtense_rad,
            full_field: false,
            duration,
            schedule: None,
            aphakic,
        }
    }
}

/// The request made movable, with the hazards asked for.
struct Plan<'a> {
    r: &'a LimitsRequest<'a>,
    mover: Mover,
    hazards: Vec<&'a Hazard>,
    classify: bool,
}

impl<'a> Plan<'a> {
    fn new(r: &'a LimitsRequest<'a>) -> Result<Plan<'a>> {
        let t = r.duration.si();
        if !(t > 0.0 && t.is_finite()) {
            return Err(Error::input(format!("exposure duration {t} s must be above 0 s")));
        }
        if let Some(missing) = r.only.iter().find(|id| r.set.hazard(id).is_none()) {
            return Err(Error::input(format!("the set '{}' has no hazard '{missing}'", r.set.id)));
        }
        let m = movable_source(r.source, r.filters)
            .map_err(|why| Error::input(format!("the source cannot be moved: {why}")))?;
        let hazards = r.set.hazards.iter().filter(|h| r.only.is_empty() || r.only.contains(&h.id)).collect();
        let classify = r.classify.is_some() && r.set.hazards.iter().any(|h| h.risk_groups.is_some());
        Ok(Plan { r, mover: Mover::new(&m)?, hazards, classify })
    }

    fn point(&self, distance: Length) -> Result<DistancePoint> {
        let a = self.mover.at(distance.si())?;
        let e = a.exposure(self.r.duration, self.r.aphakic);
        let hazards = self.hazards.iter().map(|h| hazard_point(&assess(h, &e, None))).collect();
        let risk_group = self.classify.then(|| self.group_at(&a));
        Ok(DistancePoint { distance, hazards, risk_group })
    }

    /// The highest group of the set's hazards with risk-group data (IEC 62471 cl. 6).
    fn group_at(&self, a: &Arrival) -> GroupAt {
        let mut out = GroupAt { group: None, lower_bound: false };
        for h in &self.r.set.hazards {
            let Some(rg) = &h.risk_groups else { continue };
            match hazard_group(h, rg, a) {
                Grouped::Group(g, lower) => {
                    out.group = out.group.max(Some(g));
                    out.lower_bound |= lower;
                }
                Grouped::NotApplicable => {}
                Grouped::Unknown => out.lower_bound = true,
            }
        }
        out
    }
}

fn hazard_point(r: &HazardResult) -> HazardPoint {
    HazardPoint {
        id: r.id.clone(),
        name: r.name.clone(),
        ratio: r.ratio,
        lower_bound: r.lower_bound_ratio,
        t_max: r.t_max.map(MaxDuration::of),
        partial: r.partial,
        verdict: r.verdict.clone(),
    }
}

/// The group of one hazard.
enum Grouped {
    /// The group, and whether it is only a lower bound.
    Group(RiskGroup, bool),
    NotApplicable,
    Unknown,
}

/// The first of Exempt, RG1, RG2 whose time base the hazard is within (with the group's own
/// field of view where it has one), else RG3; as `risk::classify` groups a hazard.
fn hazard_group(h: &Hazard, rg: &RiskGroupBases, a: &Arrival) -> Grouped {
    const GROUPS: [RiskGroup; 3] = [RiskGroup::Exempt, RiskGroup::Rg1, RiskGroup::Rg2];
    for (i, &t) in rg.time_bases_s.iter().enumerate() {
        let r = assess(h, &a.exposure(Time::from_si(t), false), rg.field_of_view[i].as_ref());
        match r.verdict {
            Verdict::Within => return Grouped::Group(GROUPS[i], false),
            Verdict::Exceeds => {}
            Verdict::NotApplicable(_) if i == 0 => return Grouped::NotApplicable,
            _ if i > 0 => return Grouped::Group(GROUPS[i], true),
            _ => return Grouped::Unknown,
        }
    }
    Grouped::Group(RiskGroup::Rg3, false)
}

/// `points` distances from `from` to `to`, evenly spaced in log distance:
/// dᵢ = from·(to/from)^(i/(points − 1)); one point is `from` alone.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] unless 0 < from < to (finite) and 1 ≤ points ≤ [`MAX_POINTS`].
pub fn log_distances(from: Length, to: Length, points: usize) -> Result<Vec<Length>> {
    Ok(log_grid(from.si(), to.si(), points, "distances", " m")?.into_iter().map(Length::from_si).collect())
}

/// `points` values from `a` to `b` (in `unit`, with its leading space), evenly spaced in log:
/// xᵢ = 10^(lg a + (lg b − lg a)·i/(points − 1)), the ends exactly `a` and `b` (so a power of ten
/// on the grid, such as a factor of 1 from 0.1 to 10, is exact); one point is `a` alone.
fn log_grid(a: f64, b: f64, points: usize, what: &str, unit: &str) -> Result<Vec<f64>> {
    if !(a > 0.0 && b.is_finite() && a < b) {
        return Err(Error::input(format!(
            "{what} must satisfy 0{unit} < from < to, not {a}{unit} to {b}{unit}"
        )));
    }
    if !(1..=MAX_POINTS).contains(&points) {
        return Err(Error::input(format!("the number of points must be 1 to {MAX_POINTS}, not {points}")));
    }
    if points == 1 {
        return Ok(vec![a]);
    }
    let (la, lb, last) = (a.log10(), b.log10(), (points - 1) as f64);
    Ok((0..points)
        .map(|i| match i {
            0 => a,
            _ if i + 1 == points => b,
            _ => 10f64.powf(la + (lb - la) * i as f64 / last),
        })
        .collect())
}

/// Every hazard of `r` (and its risk group when `r.classify` is set and the set has risk-group
/// data) with the source moved along its axis to each of `distances`.
///
/// The ratio of a hazard is exposure ÷ limit at `r.duration` (IEC TR 62471-2 exposure hazard
/// value); for a small source of intensity I the irradiance is E = I/d², so irradiance hazards
/// without a C_α or field-of-view dependence scale as ratio(d) = ratio(d₀)·(d₀/d)².
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a source that cannot be moved (a spectral irradiance
/// without the distance it was measured at, a radiance without its size), a distance not above
/// 0 m, a duration not above 0 s or a hazard id not in the set.
pub fn sweep_distance(r: &LimitsRequest<'_>, distances: &[Length]) -> Result<Vec<DistancePoint>> {
    let plan = Plan::new(r)?;
    // Points are independent: spread them over every core (rayon keeps their order).
    distances.par_iter().map(|&d| plan.point(d)).collect()
}

/// The nearest safe distance of one hazard or group, or why there is none in the bracket.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Nearest {
    /// Within from `distance` outwards (ratio ≤ 1, or the hazard stops applying), exceeding at
    /// `exceeds_at`; distance ÷ exceeds_at ≤ 1 + tolerance.
    Found {
        /// The nearest distance found within (the safe end of the last bisection interval).
        distance: Length,
        /// A distance just nearer at which it still exceeds.
        exceeds_at: Length,
        /// The ratio at `distance` (`None` for a group, or when the hazard stops applying there).
        ratio: Option<f64>,
        /// Changes between exceeding and within seen along the scan; more than 1 means the
        /// ratio is not monotone in distance, and the outermost change was solved.
        crossings: usize,
    },
    /// Already within at the near end of the bracket (and at every scanned distance).
    WithinAtNearEnd {
        /// The ratio at the near end, if the hazard has one.
        ratio: Option<f64>,
    },
    /// Still exceeding at the far end of the bracket.
    ExceedsAtFarEnd {
        /// The ratio at the far end, if the hazard has one.
        ratio: Option<f64>,
    },
    /// No verdict at `distance` (not assessed: a partly covered band, missing geometry), so no
    /// distance can be given.
    NoVerdict {
        /// Where the verdict is missing.
        distance: Length,
        /// Why.
        reason: String,
    },
}

/// The nearest safe distance of one hazard.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HazardNearest {
    /// Hazard id.
    pub id: String,
    /// Hazard name.
    pub name: String,
    /// The result.
    pub nearest: Nearest,
}

/// The nearest safe distances of every hazard and risk group.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct NearestDistances {
    /// The bracket searched, near end.
    pub near: Length,
    /// The bracket searched, far end.
    pub far: Length,
    /// Relative tolerance on distance ([`SOLVE_TOLERANCE`]).
    pub tolerance: f64,
    /// Exposure duration of the hazard ratios.
    pub duration: Time,
    /// Per hazard, ratio ≤ 1 at `duration`.
    pub hazards: Vec<HazardNearest>,
    /// Per group (Exempt, RG1, RG2): the overall group at most that group; empty without
    /// classification.
    pub groups: Vec<(RiskGroup, Nearest)>,
}

/// The state of one hazard or group at one distance.
enum State {
    Within(Option<f64>),
    Exceeds(Option<f64>),
    Unknown(String),
}

impl State {
    fn of(v: &Verdict, ratio: Option<f64>) -> State {
        match v {
            Verdict::Within => State::Within(ratio),
            // A hazard that does not apply at this distance sets no limit here.
            Verdict::NotApplicable(_) => State::Within(None),
            Verdict::Exceeds => State::Exceeds(ratio),
            Verdict::NotAssessed(why) => State::Unknown(why.clone()),
        }
    }

    fn within(&self) -> bool {
        matches!(self, State::Within(_))
    }
}

/// The outermost change from exceeding to within of `f` in [near, far] m: a scan of
/// [`SCAN_POINTS`] log-spaced distances, then bisection on log distance (d = √(lo·hi)) until
/// hi/lo ≤ 1 + `tol`.
fn nearest(f: impl Fn(f64) -> Result<State>, near_m: f64, far_m: f64, tol: f64) -> Result<Nearest> {
    let grid = log_distances(Length::from_si(near_m), Length::from_si(far_m), SCAN_POINTS)?;
    let states: Vec<State> = grid.iter().map(|d| f(d.si())).collect::<Result<_>>()?;
    let crossings = states.windows(2).filter(|w| w[0].within() != w[1].within()).count();
    let Some(i) = states.iter().rposition(|s| !s.within()) else {
        let ratio = match &states[0] {
            State::Within(r) => *r,
            _ => None,
        };
        return Ok(Nearest::WithinAtNearEnd { ratio });
    };
    match &states[i] {
        State::Unknown(why) => return Ok(Nearest::NoVerdict { distance: grid[i], reason: why.clone() }),
        State::Exceeds(r) if i + 1 == grid.len() => return Ok(Nearest::ExceedsAtFarEnd { ratio: *r }),
        _ => {}
    }
    let (mut lo, mut hi) = (grid[i].si(), grid[i + 1].si());
    let mut ratio = match &states[i + 1] {
        State::Within(r) => *r,
        _ => None,
    };
    while hi / lo > 1.0 + tol {
        let mid = (lo * hi).sqrt();
        match f(mid)? {
            State::Within(r) => (hi, ratio) = (mid, r),
            State::Exceeds(_) => lo = mid,
            State::Unknown(why) => {
                return Ok(Nearest::NoVerdict { distance: Length::from_si(mid), reason: why });
            }
        }
    }
    Ok(Nearest::Found { distance: Length::from_si(hi), exceeds_at: Length::from_si(lo), ratio, crossings })
}

/// For each hazard of `r`, the nearest distance in [near, far] from which the hazard ratio at
/// `r.duration` is ≤ 1; and, when `r.classify` is set and the set has risk-group data, the
/// nearest distance from which the overall IEC 62471 risk group is at most Exempt, RG1 and RG2.
///
/// The scan of [`SCAN_POINTS`] log-spaced distances finds the outermost change from exceeding
/// to within, and bisection on log distance narrows it to a relative tolerance of
/// [`SOLVE_TOLERANCE`]. A hazard within at the near end, or exceeding at the far end, says so
/// ([`Nearest`]); no distance outside the bracket is given.
///
/// # Errors
/// As [`sweep_distance`], and unless 0 m < near < far.
pub fn solve_nearest_distance(r: &LimitsRequest<'_>, near: Length, far: Length) -> Result<NearestDistances> {
    let plan = Plan::new(r)?;
    let (near_m, far_m) = (near.si(), far.si());
    log_distances(near, far, 2)?;
    let mut hazards = Vec::new();
    for h in &plan.hazards {
        let f = |d_m: f64| -> Result<State> {
            let a = plan.mover.at(d_m)?;
            let x = assess(h, &a.exposure(r.duration, r.aphakic), None);
            Ok(State::of(&x.verdict, x.ratio))
        };
        let nearest = nearest(f, near_m, far_m, SOLVE_TOLERANCE)?;
        hazards.push(HazardNearest { id: h.id.clone(), name: h.name.clone(), nearest });
    }
    let mut groups = Vec::new();
    if plan.classify {
        for target in [RiskGroup::Exempt, RiskGroup::Rg1, RiskGroup::Rg2] {
            let f = |d_m: f64| -> Result<State> {
                let g = plan.group_at(&plan.mover.at(d_m)?);
                Ok(match g.group {
                    Some(x) if x > target => State::Exceeds(None),
                    Some(_) if !g.lower_bound => State::Within(None),
                    _ => State::Unknown("some hazards could not be grouped".to_string()),
                })
            };
            groups.push((target, nearest(f, near_m, far_m, SOLVE_TOLERANCE)?));
        }
    }
    Ok(NearestDistances { near, far, tolerance: SOLVE_TOLERANCE, duration: r.duration, hazards, groups })
}

/// The longest exposure within every limit at the placed distance.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Longest {
    /// t_max = min over hazards of each hazard's t_max, and the hazard that binds.
    Limited {
        /// The duration.
        t_max: Time,
        /// The hazard id that binds.
        hazard: String,
        /// True when that hazard's band is only partly covered (t_max is an upper bound).
        partial: bool,
    },
    /// A hazard is exceeded already at the shortest duration its set covers.
    ExceededBefore {
        /// That shortest duration.
        shortest: Time,
        /// The hazard id.
        hazard: String,
    },
    /// No assessed hazard reaches its limit within the durations its set covers.
    NotReached {
        /// The shortest of those ranges' ends (infinite if every range is open).
        up_to: Time,
    },
    /// No hazard has a t_max.
    NoneAssessed,
}

/// The longest duration and each hazard's t_max.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LongestDuration {
    /// The result over every hazard with a t_max.
    pub longest: Longest,
    /// Per hazard: id and t_max (`None` when not assessed or not applicable).
    pub hazards: Vec<(String, Option<MaxDuration>)>,
    /// Hazards without a t_max that were not assessed (so `longest` does not cover them).
    pub not_assessed: Vec<String>,
}

/// The longest exposure duration within every limit of `r` with the source as placed:
/// t_max = minᵢ t_max,ᵢ over the hazards, where t_max,ᵢ solves ratioᵢ(t) = 1 (the engine's own
/// t_max, as [`super::report::assess_limits`] reports it), with the hazard that binds.
///
/// # Errors
/// As [`super::report::assess_limits`].
pub fn solve_longest_duration(r: &LimitsRequest<'_>) -> Result<LongestDuration> {
    let a = assess_limits(&LimitsRequest { classify: None, ..r.clone() })?;
    let mut longest = Longest::NoneAssessed;
    let mut not_assessed = Vec::new();
    for h in &a.hazards {
        if let Verdict::NotAssessed(why) = &h.verdict {
            not_assessed.push(format!("{}: {why}", h.id));
        }
        longest = match (h.t_max, &longest) {
            (None, _) | (_, Longest::ExceededBefore { .. }) => longest,
            (Some(TMax::BelowRange(s)), _) => {
                Longest::ExceededBefore { shortest: Time::from_si(s), hazard: h.id.clone() }
            }
            (Some(TMax::Seconds(s)), Longest::Limited { t_max, .. }) if t_max.si() <= s => longest,
            (Some(TMax::Seconds(s)), _) => {
                Longest::Limited { t_max: Time::from_si(s), hazard: h.id.clone(), partial: h.partial }
            }
            (Some(TMax::NotReached(_)), Longest::Limited { .. }) => longest,
            (Some(TMax::NotReached(u)), Longest::NotReached { up_to }) => {
                Longest::NotReached { up_to: Time::from_si(u.min(up_to.si())) }
            }
            (Some(TMax::NotReached(u)), _) => Longest::NotReached { up_to: Time::from_si(u) },
        };
    }
    let hazards = a.hazards.iter().map(|h| (h.id.clone(), h.t_max.map(MaxDuration::of))).collect();
    Ok(LongestDuration { longest, hazards, not_assessed })
}
