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

mod bleaching;
pub mod figures;
pub mod meter;
pub mod model;
mod params;
mod retina;
mod rng;
mod room;
pub mod routes;
mod sample;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Length, SiValue, Time};
use crate::limits::report::LimitsRequest;
use crate::scenario::file::Scenario;
use figures::{InputName, Summary, propagate};
use model::Model;
use routes::RodRateRecommendation;

pub use retina::{AGE_INPUT, MAX_AGE_YEARS};

/// Draws of the bleach figures when not told (each runs the schedule once per varied input).
pub const BLEACH_DRAWS: usize = 10_000;

/// Draws per chunk (one generator stream each).
pub const CHUNK: usize = 8192;

/// Draws per chunk of the bleach figures: each draw runs the whole schedule once per varied
/// input, so smaller chunks keep both cores busy on the default 10 000 draws.
pub const BLEACH_CHUNK: usize = 256;

/// The most draws of the bleach figures a run takes (about 0.3 ms each on a week-long schedule
/// with a dozen varied inputs: 10⁵ draws take about 15 s on two cores).
pub const MAX_BLEACH_DRAWS: usize = 100_000;

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

impl InputUncertainties {
    /// No declared uncertainty: every input at its value (fill the others with `..none()`).
    pub fn none() -> InputUncertainties {
        let zero = Length::from_si(0.0);
        InputUncertainties {
            reading_relative: 0.0,
            distance: zero,
            size: zero,
            tilt_relative: 0.0,
            pupil: zero,
        }
    }
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

/// A headline figure beyond the limit ratios.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Figure {
    /// Photopic retinal illuminance, td.
    PhotopicTrolands,
    /// Scotopic retinal illuminance, scot td.
    ScotopicTrolands,
    /// Rod R*/rod/s by the spectral route.
    RodRate,
    /// Rod R*/rod/s by a published R*/rod/s per scotopic troland (the factor's key).
    RodRateByFactor(String),
    /// Melanopic EDI at the cornea (CIE S 026 for people; the species' melanopsin equivalent
    /// daylight illuminance for rodents), lx.
    MelanopicEdi,
    /// Peak bleached fraction over the schedule.
    PeakBleached,
    /// Time to 90 % regenerated after the schedule's last lights-off, s.
    RecoveryTo90,
    /// Room lux at cage level of the brightest position, lx.
    BrightestLux,
    /// Room lux at cage level of the dimmest position, lx.
    DimmestLux,
    /// Positions of a rack (its id) within its guidance range.
    InRange(String),
}

impl Figure {
    /// Its name in reports.
    pub fn name(&self) -> String {
        match self {
            Figure::PhotopicTrolands => "photopic trolands".into(),
            Figure::ScotopicTrolands => "scotopic trolands".into(),
            Figure::RodRate => "rod R*/rod/s (spectral)".into(),
            Figure::RodRateByFactor(k) => format!("rod R*/rod/s ({k} factor)"),
            Figure::MelanopicEdi => "melanopic EDI".into(),
            Figure::PeakBleached => "peak bleached fraction".into(),
            Figure::RecoveryTo90 => "time to 90 % regenerated".into(),
            Figure::BrightestLux => "brightest position".into(),
            Figure::DimmestLux => "dimmest position".into(),
            Figure::InRange(r) => format!("{r}: positions in range"),
        }
    }

    /// Its unit symbol.
    pub fn unit(&self) -> &'static str {
        match self {
            Figure::PhotopicTrolands => "td",
            Figure::ScotopicTrolands => "scot td",
            Figure::RodRate | Figure::RodRateByFactor(_) => "R*/rod/s",
            Figure::MelanopicEdi => "lx",
            Figure::PeakBleached => "",
            Figure::RecoveryTo90 => "s",
            Figure::BrightestLux | Figure::DimmestLux => "lx",
            Figure::InRange(_) => "",
        }
    }
}

/// One figure's distribution.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct FigureUncertainty {
    /// The figure.
    pub figure: Figure,
    /// Its unit.
    pub unit: &'static str,
    /// The distribution.
    #[serde(flatten)]
    pub summary: Summary,
}

/// An input of the figures and its distribution in words.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DrawnInput {
    /// The input.
    pub input: InputName,
    /// Its value (SI; a factor of 1 for the reading and a from-memory pupil).
    pub nominal: f64,
    /// Its distribution and the basis.
    pub basis: String,
}

/// What to propagate to the retina and bleach figures of one source of a scenario.
#[derive(Debug, Clone, Copy)]
pub struct FiguresRequest<'a> {
    /// The scenario.
    pub scenario: &'a Scenario,
    /// The chosen source's index.
    pub index: usize,
    /// The declared inputs (of the chosen source and the pupil).
    pub inputs: &'a InputUncertainties,
    /// Draw the from-memory parameters from their default ranges too.
    pub parameters: bool,
    /// Retina figures: `Some(draws)`, or `None` to leave them out.
    pub retina_draws: Option<usize>,
    /// Bleach figures: `Some(draws)`, or `None` to leave them out.
    pub bleach_draws: Option<usize>,
    /// Master seed.
    pub seed: u64,
}

/// The retina and bleach figures of one source.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct FiguresReport {
    /// Source name.
    pub source: String,
    /// Whether the from-memory parameters were drawn.
    pub parameters: bool,
    /// Draws of the retina figures (0 when left out).
    pub retina_draws: usize,
    /// Draws of the bleach figures (0 when left out).
    pub bleach_draws: usize,
    /// Every input drawn, with its distribution.
    pub inputs: Vec<DrawnInput>,
    /// The retina figures.
    pub retina: Vec<FigureUncertainty>,
    /// The bleach figures.
    pub bleach: Vec<FigureUncertainty>,
    /// The room figures (with the retina figures, when the scenario has a room), from the
    /// reading alone.
    pub room: Vec<FigureUncertainty>,
    /// Human rod rate: the routes, the recommended value and its spread.
    pub rod_rate: Option<RodRateRecommendation>,
    /// How the figures were computed, and their approximations.
    pub notes: Vec<String>,
}

fn check_draws(n: usize) -> Result<usize> {
    if (2..=MAX_DRAWS).contains(&n) {
        Ok(n)
    } else {
        Err(Error::input(format!("the number of draws must be 2 to {MAX_DRAWS}, not {n}")))
    }
}

fn check_bleach_draws(n: usize) -> Result<usize> {
    if (2..=MAX_BLEACH_DRAWS).contains(&n) {
        Ok(n)
    } else {
        Err(Error::input(format!("the number of bleach draws must be 2 to {MAX_BLEACH_DRAWS}, not {n}")))
    }
}

fn records(figures: &[Figure], summaries: Vec<Summary>) -> Vec<FigureUncertainty> {
    figures
        .iter()
        .zip(summaries)
        .map(|(f, summary)| FigureUncertainty { figure: f.clone(), unit: f.unit(), summary })
        .collect()
}

/// The Monte Carlo propagation of the declared inputs (and, when asked, the from-memory
/// parameters) to the retina figures of the chosen source and the bleach figures of the
/// scenario's schedule, and (with the retina figures) the room figures of a scenario with a room
/// under the reading's uncertainty. The retina figures use the seed's streams 0, 1, …; the
/// bleach figures those of the seed + 1, the room figures those of the seed + 2.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] when the source has no retina figures, a declared
/// uncertainty has nothing to vary, bleach figures are asked for without a schedule, or a
/// number of draws is not 2 to [`MAX_DRAWS`]; any error of the engines.
pub fn assess_figures(req: &FiguresRequest<'_>) -> Result<FiguresReport> {
    assess_figures_with_age(req, None)
}

/// As [`assess_figures`], with the subject's age also uncertain when `age` (its standard
/// uncertainty) is given: a normal about the scenario's age (or the eye's default), truncated
/// to (0, [`MAX_AGE_YEARS`]] years, entering the retina figures through the human ocular media
/// (van de Kraats & van Norren 2007) and any age-dependent pupil formula, by the parabola
/// through three engine runs used for the eye parameters. The limit ratios do not depend on it.
///
/// # Errors
/// As [`assess_figures`]; [`crate::ErrorKind::InvalidInput`] when `age` is given for a subject
/// without the human age model, or is not above 0 or above a quarter of the age range.
pub fn assess_figures_with_age(req: &FiguresRequest<'_>, age: Option<Time>) -> Result<FiguresReport> {
    let s = req.scenario;
    let u = req.inputs;
    check("reading", u.reading_relative, Some(1.0))?;
    let mut model = retina::RetinaModel::new(&s.view, req.index, u, req.parameters)?;
    if let Some(a) = age {
        model.add_age(&s.view, req.index, a)?;
    }
    let retina_draws = req.retina_draws.map(check_draws).transpose()?;
    let retina = match retina_draws {
        Some(n) => records(&model.figures, propagate(&model.vars, &model, n, req.seed, CHUNK)),
        None => Vec::new(),
    };
    let (bleach, vars) = match req.bleach_draws.map(check_bleach_draws).transpose()? {
        Some(n) => {
            let b = bleaching::BleachModel::new(s, req.index, &model, req.parameters)?;
            let seed = req.seed.wrapping_add(1);
            (records(&b.figures, propagate(&b.vars, &b, n, seed, BLEACH_CHUNK)), b.vars.clone())
        }
        None => (Vec::new(), model.vars.clone()),
    };
    let room = match (retina_draws, &s.room) {
        (Some(n), Some(_)) => {
            let r = room::RoomModel::new(s)?;
            records(
                &r.figures,
                propagate(&room::room_vars(&model.vars), &r, n, req.seed.wrapping_add(2), CHUNK),
            )
        }
        _ => Vec::new(),
    };
    let report = crate::retina::report::assess_retina(&s.view)?;
    let rod_rate = report.sources[req.index].retinal.as_ref().and_then(|r| r.rod_rate.clone());
    Ok(FiguresReport {
        source: s.view.sources[req.index].spectrum.label().to_string(),
        parameters: req.parameters,
        retina_draws: retina_draws.unwrap_or(0),
        bleach_draws: req.bleach_draws.unwrap_or(0),
        inputs: vars
            .into_iter()
            .map(|v| DrawnInput { input: v.name, nominal: v.nominal, basis: v.basis })
            .collect(),
        retina,
        bleach,
        room,
        rod_rate,
        notes: figure_notes(model.pivot_nm, age.is_some()),
    })
}

/// How the figures were computed.
fn figure_notes(pivot_nm: f64, age: bool) -> Vec<String> {
    let mut notes = vec![
        format!(
            "retina figures: the engine at the nominal values, with the source tilted (pivot {} nm) and at three \
             values of each parameter; per draw exact scaling for the reading, geometry, tilt, pupil and the \
             parameters that enter linearly; λmax and optical density by a parabola through three runs, their \
             cross-terms left out",
            crate::base::units::sig4(pivot_nm)
        ),
        "bleach figures: each draw runs the schedule through the engine's exact step solutions; steps that do not \
         light the chosen source take only the pupil and eye-parameter factors"
            .to_string(),
        "declared inputs belong to the chosen source and the pupil; a from-memory pupil is drawn as a factor on the \
         diameter"
            .to_string(),
    ];
    if age {
        notes.push(AGE_NOTE.to_string());
    }
    notes
}

/// What the subject's age enters, for reports.
pub const AGE_NOTE: &str = "the subject's age enters the figures that pass the ocular media (the spectral rod \
     R*/rod/s and other receptor catches) and, with an age-dependent pupil formula, the pupil; trolands, \
     the factor routes and the melanopic EDI at the cornea do not pass the media, and no limit ratio depends on \
     it (the limits are set at the cornea)";
