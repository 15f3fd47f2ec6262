//! Sweeps with the source where it is placed: every hazard against the exposure duration
//! ([`sweep_duration`]), against a factor on the source's light ([`sweep_level`]) and against the
//! transmittance of a neutral filter in front of the eye ([`sweep_transmittance`]).
//!
//! Each point is [`assess_limits`] run with one input changed, so it equals a single assessment
//! of a scenario written with that input:
//!
//! - **duration** t replaces the request's duration: the ratio is exposure ÷ limit at t and the
//!   verdict follows it. t_max is the duration at which the ratio reaches 1, so it does not depend
//!   on t: it is the same at every point where the hazard is assessed (a duration beyond the
//!   durations a hazard's limits cover leaves that hazard not assessed there, with no t_max).
//! - **level** k multiplies the source's spectrum (the source written with k times its reading:
//!   its intensity, illuminance, luminance…). Every weighted exposure is linear in the spectrum
//!   and no limit depends on it (C_α and the averaging field of view depend on the geometry
//!   only), so ratio(k) = k·ratio(1) for every hazard; t_max moves with the limit's own time
//!   dependence. The risk group is the IEC 62471 classification of the scaled source, as
//!   [`assess_limits`] makes it (at 200 mm, or for general lighting at the distance giving
//!   500 lx, which moves with k).
//! - **transmittance** T adds a flat (neutral) filter of transmittance T after the request's
//!   filters, in front of the eye. A flat filter multiplies the spectrum by T at every wavelength,
//!   so this sweep gives the level sweep's numbers at k = T (to rounding), for 0 < T ≤ 1: a
//!   neutral filter and dimming the source by the same factor are indistinguishable to every
//!   limit. Like every filter of a scenario, the classification counts it as part of the lamp
//!   system.

use rayon::prelude::*;

use super::{GroupAt, HazardPoint, hazard_point, log_grid};
use crate::base::error::{Error, Result};
use crate::base::quantity::{Ratio, SiValue, Time};
use crate::cornea::PlacedSource;
use crate::cornea::filter::Filter;
use crate::limits::report::{LimitsRequest, assess_limits};

/// Every hazard at one exposure duration, the source as placed.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DurationPoint {
    /// The exposure duration.
    pub duration: Time,
    /// Per hazard, in the set's order (only those asked for); t_max is the same at every
    /// duration where the hazard is assessed.
    pub hazards: Vec<HazardPoint>,
}

/// Every hazard and the risk group with the source's light multiplied by a factor.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LevelPoint {
    /// The factor on the source's light (1: as written).
    pub factor: Ratio,
    /// Per hazard, in the set's order (only those asked for).
    pub hazards: Vec<HazardPoint>,
    /// The IEC 62471 classification's overall group, when asked for and made.
    pub risk_group: Option<GroupAt>,
}

/// Every hazard and the risk group with a neutral filter in front of the eye.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TransmittancePoint {
    /// The filter's transmittance, the same at every wavelength (1: no filter).
    pub transmittance: Ratio,
    /// Per hazard, in the set's order (only those asked for).
    pub hazards: Vec<HazardPoint>,
    /// The IEC 62471 classification's overall group, when asked for and made.
    pub risk_group: Option<GroupAt>,
}

/// The most factors [`sweep_level`] and [`sweep_transmittance`] take: each point is a whole
/// assessment with the risk-group classification, about 2 ms on one core, so 10 000 points take
/// about 10 s on two cores (the shared [`super::MAX_POINTS`] would take minutes).
pub const MAX_ASSESSED_POINTS: usize = 10_000;

/// An error unless there are at most [`MAX_ASSESSED_POINTS`] factors.
fn check_count(n: usize) -> Result<()> {
    if n > MAX_ASSESSED_POINTS {
        return Err(Error::input(format!(
            "{n} points: a level or transmittance sweep takes at most {MAX_ASSESSED_POINTS} (each is a whole \
             assessment with the risk group); e.g. --points 100"
        )));
    }
    Ok(())
}

/// `points` durations from `from` to `to`, evenly spaced in log duration (as [`super::log_distances`]).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] unless 0 s < from < to (finite) and 1 ≤ points ≤ [`super::MAX_POINTS`].
pub fn log_durations(from: Time, to: Time, points: usize) -> Result<Vec<Time>> {
    Ok(log_grid(from.si(), to.si(), points, "durations", " s")?.into_iter().map(Time::from_si).collect())
}

/// `points` factors (levels or transmittances) from `from` to `to`, evenly spaced in log.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] unless 0 < from < to (finite) and 1 ≤ points ≤ [`super::MAX_POINTS`].
pub fn log_factors(from: Ratio, to: Ratio, points: usize) -> Result<Vec<Ratio>> {
    Ok(log_grid(from.si(), to.si(), points, "factors", "")?.into_iter().map(Ratio::from_si).collect())
}

/// One assessment as sweep data: the hazards and the classification's overall group (a lower
/// bound when some hazard could not be grouped; `None` when not asked for or not made).
fn point(r: &LimitsRequest<'_>) -> Result<(Vec<HazardPoint>, Option<GroupAt>)> {
    let a = assess_limits(r)?;
    let group = match &a.classification {
        Some(Ok(c)) => Some(GroupAt { group: c.overall, lower_bound: !c.not_assessed.is_empty() }),
        _ => None,
    };
    Ok((a.hazards.iter().map(hazard_point).collect(), group))
}

/// Every hazard of `r` at each of `durations`, the source as placed: the ratio exposure ÷ limit
/// and the verdict at that duration (IEC TR 62471-2 exposure hazard value); t_max does not
/// change where the hazard is assessed. No risk group: it does not depend on the exposure duration.
///
/// # Errors
/// As [`assess_limits`]: a duration not above 0 s, a hazard id not in the set, impossible geometry.
pub fn sweep_duration(r: &LimitsRequest<'_>, durations: &[Time]) -> Result<Vec<DurationPoint>> {
    let r = LimitsRequest { classify: None, ..r.clone() };
    durations
        .par_iter()
        .map(|&duration| {
            let (hazards, _) = point(&LimitsRequest { duration, ..r.clone() })?;
            Ok(DurationPoint { duration, hazards })
        })
        .collect()
}

/// Every hazard of `r` (and the risk group when `r.classify` is set) with the source's light
/// multiplied by each of `factors`: ratio(k) = k·ratio(1) for every hazard (see the module).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a factor not above 0 (or not finite), more than
/// [`MAX_ASSESSED_POINTS`] factors, and as [`assess_limits`].
pub fn sweep_level(r: &LimitsRequest<'_>, factors: &[Ratio]) -> Result<Vec<LevelPoint>> {
    check_count(factors.len())?;
    factors
        .par_iter()
        .map(|&factor| {
            let k = factor.si();
            if !(k > 0.0 && k.is_finite()) {
                return Err(Error::input(format!("the level factor {k} must be above 0, e.g. 0.5 or 2")));
            }
            let s = &r.source.spectrum;
            let source = PlacedSource { spectrum: s.scaled_as(k, s.measure())?, ..r.source.clone() };
            let (hazards, risk_group) = point(&LimitsRequest { source: &source, ..r.clone() })?;
            Ok(LevelPoint { factor, hazards, risk_group })
        })
        .collect()
}

/// Every hazard of `r` (and the risk group when `r.classify` is set) with a neutral filter of
/// each of `transmittances` added after `r.filters`: the level sweep's numbers at k = T.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a transmittance outside 0 < T ≤ 1, more than
/// [`MAX_ASSESSED_POINTS`] of them, and as [`assess_limits`].
pub fn sweep_transmittance(
    r: &LimitsRequest<'_>,
    transmittances: &[Ratio],
) -> Result<Vec<TransmittancePoint>> {
    check_count(transmittances.len())?;
    transmittances
        .par_iter()
        .map(|&transmittance| {
            let t = transmittance.si();
            if !(t > 0.0 && t <= 1.0) {
                return Err(Error::input(format!(
                    "the transmittance {t} must be above 0 and at most 1 (a filter cannot add light), e.g. 0.1"
                )));
            }
            let mut filters = r.filters.to_vec();
            filters.push(Filter::flat(t, format!("neutral filter, transmittance {t}"))?);
            let (hazards, risk_group) = point(&LimitsRequest { filters: &filters, ..r.clone() })?;
            Ok(TransmittancePoint { transmittance, hazards, risk_group })
        })
        .collect()
}
