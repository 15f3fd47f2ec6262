//! Uncertainty of the hazard ratios of one source against one limit set, by the Monte Carlo
//! method of JCGM 101:2008 (GUM Supplement 1, "Propagation of distributions using a Monte
//! Carlo method").
//!
//! The declared inputs ([`InputUncertainties`]) are independent normal distributions about the
//! scenario's values: the reading that scales the source (relative), the distance, the source
//! size, a spectral calibration error applied as a linear tilt across wavelength (relative per
//! 100 nm, pivoting at the photopic centroid of the source spectrum, flat beyond 300 nm from
//! it, and shifted so a photometric reading keeps its value; see [`model::TiltShape`]), and the
//! pupil diameter. The pupil does not enter any radiance or
//! irradiance limit (they are set at the cornea or as the radiance the eye sees); it would
//! enter retinal quantities, where the retinal irradiance carries 2·u(p)/p from it. It is
//! reported with a variance share of 0.
//!
//! Draws with a non-positive reading scale, distance or size are drawn again (a normal
//! truncated at 0); inputs with a standard uncertainty above a quarter of their value are
//! rejected, so this touches fewer than 1 draw in 30 000.
//!
//! Each draw is plain arithmetic on two engine evaluations (see [`model`] for what is exact).
//! Per hazard the report gives the probabilistically symmetric 95 % coverage interval
//! (JCGM 101 §7.7: the 2.5 % and 97.5 % quantiles of the sorted draws, §7.7.1's indices), the
//! probability P(ratio ≥ 1), a [`Decision`], and each input's share of the variance by
//! one-at-a-time propagation: the variance of the ratio with that input alone uncertain (the
//! same normal deviates, the others at their values), divided by the sum of those variances.
//! With interactions the sum differs from the full variance; both are reported.
//!
//! Reproducible: the draws come in chunks of [`CHUNK`], chunk i from its own stream of the
//! seed (xoshiro256++ seeded by SplitMix64, Box–Muller normals), so the same seed and number
//! of draws give the same report on any number of threads.

pub mod model;
mod rng;
mod sample;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Length, SiValue, Time};
use crate::limits::report::LimitsRequest;
use model::Model;

/// Draws per chunk (one generator stream each).
pub const CHUNK: usize = 8192;

/// The most draws a run takes.
pub const MAX_DRAWS: usize = 10_000_000;

/// The coverage probability of the reported interval.
pub const COVERAGE: f64 = 0.95;

/// The declared standard uncertainties, each of a normal distribution about the scenario's value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct InputUncertainties {
    /// Relative standard uncertainty of the reading that scales the source (0.05 for 5 %).
    pub reading_relative: f64,
    /// Standard uncertainty of the distance from the source to the eye.
    pub distance: Length,
    /// Standard uncertainty of the source's size (diameter).
    pub size: Length,
    /// Relative standard uncertainty of the spectral calibration, per 100 nm from the pivot.
    pub tilt_relative: f64,
    /// Standard uncertainty of the pupil diameter (reported; enters no corneal limit).
    pub pupil: Length,
}

/// One declared input.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Input {
    /// The reading that scales the source.
    Reading,
    /// The distance to the eye.
    Distance,
    /// The source size.
    Size,
    /// The spectral calibration tilt.
    Tilt,
    /// The pupil diameter.
    Pupil,
}

impl Input {
    /// Every input, in report order.
    pub const ALL: [Input; 5] = [Input::Reading, Input::Distance, Input::Size, Input::Tilt, Input::Pupil];

    /// Its name in reports.
    pub fn name(self) -> &'static str {
        match self {
            Input::Reading => "reading",
            Input::Distance => "distance",
            Input::Size => "size",
            Input::Tilt => "spectral tilt",
            Input::Pupil => "pupil",
        }
    }
}

/// What the 95 % coverage interval says about the limit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Decision {
    /// The lower end is above 1.
    Exceeds,
    /// The upper end is at most 1.
    Within,
    /// The interval contains 1.
    Undecided,
}

impl Decision {
    /// The decision from the interval's ends (a ratio of exactly 1 is within, as in the engine).
    pub fn of(low: f64, high: f64) -> Decision {
        if low > 1.0 {
            Decision::Exceeds
        } else if high <= 1.0 {
            Decision::Within
        } else {
            Decision::Undecided
        }
    }

    /// The decision in words.
    pub fn text(self) -> &'static str {
        match self {
            Decision::Exceeds => "exceeds even at the lower 95 % bound",
            Decision::Within => "within even at the upper 95 % bound",
            Decision::Undecided => "undecided at 95 %",
        }
    }
}

/// One hazard's distribution of ratios.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HazardUncertainty {
    /// Hazard id.
    pub id: String,
    /// Hazard name.
    pub name: String,
    /// The ratio at the scenario's values (the engine's).
    pub nominal: f64,
    /// Mean of the draws.
    pub mean: f64,
    /// Standard deviation of the draws (the standard uncertainty of the ratio).
    pub standard_uncertainty: f64,
    /// Probabilistically symmetric 95 % coverage interval.
    pub interval: (f64, f64),
    /// Fraction of draws with ratio ≥ 1.
    pub exceedance_probability: f64,
    /// What the interval says.
    pub decision: Decision,
    /// Each input's share of the summed one-at-a-time variances, in [`Input::ALL`] order.
    pub shares: Vec<(Input, f64)>,
    /// Sum of the one-at-a-time variances ÷ the variance of the draws.
    pub one_at_a_time_sum: f64,
    /// Draws in which the hazard's condition of application (source subtense, seen luminance)
    /// did not hold; they are kept in the distribution.
    pub inapplicable_draws: usize,
}

/// The report.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct UncertaintyReport {
    /// Limit set id.
    pub set_id: String,
    /// Source name.
    pub source: String,
    /// Exposure duration.
    pub duration: Time,
    /// Number of draws.
    pub draws: usize,
    /// Master seed.
    pub seed: u64,
    /// The inputs declared.
    #[serde(skip)]
    pub inputs: InputUncertainties,
    /// The tilt's pivot wavelength, nm.
    pub pivot_nm: f64,
    /// Per hazard with a nominal ratio, in the set's order.
    pub hazards: Vec<HazardUncertainty>,
    /// Hazards not sampled, with the engine's verdict at the nominal.
    pub not_sampled: Vec<(String, String)>,
}

/// The relative standard uncertainty of each input, checked: finite, at least 0, at most a
/// quarter of the value (so truncation at 0 is negligible).
fn check(name: &str, u: f64, value: Option<f64>) -> Result<()> {
    if !(u >= 0.0 && u.is_finite()) {
        return Err(Error::input(format!(
            "the {name} uncertainty must be a finite value of at least 0, not {u}"
        )));
    }
    match value {
        Some(v) if u > 0.25 * v => Err(Error::input(format!(
            "the {name} uncertainty {u} is above a quarter of the value {v}: a normal model would give negative \
             values; give at most {}",
            0.25 * v
        ))),
        None if u > 0.0 => Err(Error::input(format!(
            "the {name} uncertainty has nothing to vary: the source has no {name}; give 0"
        ))),
        _ => Ok(()),
    }
}

/// Checks the declared inputs against the model's nominal values.
fn check_inputs(u: &InputUncertainties, m: &Model) -> Result<()> {
    check("reading", u.reading_relative, Some(1.0))?;
    check("distance", u.distance.si(), Some(m.nominal.distance_m))?;
    check("size", u.size.si(), m.nominal.size_m)?;
    let p = u.pupil.si();
    if !(p >= 0.0 && p.is_finite()) {
        return Err(Error::input(format!(
            "the pupil uncertainty must be finite and at least 0 m, not {p} m"
        )));
    }
    if !(u.tilt_relative >= 0.0 && 4.0 * u.tilt_relative * m.tilt_reach < 1.0) {
        return Err(Error::input(format!(
            "the spectral tilt uncertainty {} per 100 nm would make the spectrum negative within 4 standard \
             uncertainties; give below {}",
            u.tilt_relative,
            0.25 / m.tilt_reach
        )));
    }
    Ok(())
}

/// The Monte Carlo propagation of `inputs` through every hazard of the request's set for its
/// source, with `draws` draws from `seed`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] when the source cannot be moved (a full field, an
/// irradiance without its distance), has no distance, when an uncertainty is negative, not
/// finite or too large for a normal model, or when `draws` is not 2 to [`MAX_DRAWS`].
pub fn assess_uncertainty(
    r: &LimitsRequest<'_>,
    inputs: &InputUncertainties,
    draws: usize,
    seed: u64,
) -> Result<UncertaintyReport> {
    if !(2..=MAX_DRAWS).contains(&draws) {
        return Err(Error::input(format!("the number of draws must be 2 to {MAX_DRAWS}, not {draws}")));
    }
    let m = Model::new(r)?;
    check_inputs(inputs, &m)?;
    let hazards = sample::sample(&m, inputs, draws, seed);
    Ok(UncertaintyReport {
        set_id: r.set.id.clone(),
        source: r.source.spectrum.label().to_string(),
        duration: r.duration,
        draws,
        seed,
        inputs: *inputs,
        pivot_nm: m.tilt.pivot_nm,
        hazards,
        not_sampled: m.skipped,
    })
}
