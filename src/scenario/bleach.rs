//! Bleaching schedules written as TOML: the receptor, the model, optional parameter overrides,
//! and steps with a duration and either a level (with its unit) or a source seen by a subject.
//!
//! ```toml
//! receptor = "mouse-rod"        # human-rod, human-cone, mouse-rod, rat-rod
//! model = "rate-limited"        # or rushton (default rate-limited)
//! repeat = 7                    # the steps, 7 times over
//! [parameters]                  # optional overrides, units in values
//! tau0 = "600 s"
//! [subject]                     # needed for steps with a source (as in a retina scenario)
//! species = "mouse"
//! pupil = "dark"
//! [[step]]
//! name = "light"
//! duration = "12 h"
//! source = { spectrum = "warm-white-led", illuminance = "300 lx", full_field = true }
//! [[step]]
//! name = "dark"
//! duration = "12 h"
//! level = "0 R*/rod/s"
//! ```

use std::collections::BTreeMap;
use std::path::Path;

use serde::Deserialize;

use crate::base::error::{Error, Result};
use crate::base::quantity::SiValue;
use crate::base::units::{TrolandKind, parse_isomerisation_rate, parse_time, parse_typed_trolands};
use crate::pigment::course::{Course, CourseStep};
use crate::pigment::kinetics::{LevelUnit, Model, Pigment, find_pigment};
use crate::pigment::schedule::Schedule;
use crate::retina::report::assess_retina;
use crate::scenario::retina::{SourceSpec, SubjectSpec, build};

/// A parsed bleaching scenario.
#[derive(Debug, Clone, PartialEq)]
pub struct BleachScenario {
    /// The receptor with any overrides applied.
    pub pigment: Pigment,
    /// The model.
    pub model: Model,
    /// The schedule, levels converted to bleaching rates.
    pub schedule: Schedule,
    /// Starting bleached fraction.
    pub start: f64,
    /// The steps of one cycle with their levels, and the number of cycles (for the solves and
    /// sweeps on a named step; empty in the quick form).
    pub cycle: (Vec<CourseStep>, u64),
}

impl BleachScenario {
    /// The schedule as a [`Course`] with the current receptor and model (after any overrides).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] when there is no schedule file (the quick form).
    pub fn course(&self) -> Result<Course> {
        if self.cycle.0.is_empty() {
            return Err(Error::input(
                "a named step needs a schedule: give --schedule FILE or --scenario FILE",
            ));
        }
        Ok(Course {
            pigment: self.pigment.clone(),
            model: self.model,
            steps: self.cycle.0.clone(),
            repeat: self.cycle.1,
            start: self.start,
        })
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawScenario {
    receptor: String,
    model: Option<String>,
    repeat: Option<u64>,
    start_bleached: Option<f64>,
    #[serde(default)]
    parameters: BTreeMap<String, String>,
    subject: Option<SubjectSpec>,
    step: Vec<RawStep>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStep {
    name: Option<String>,
    duration: String,
    level: Option<String>,
    source: Option<SourceSpec>,
}

/// Parses a light level written with the receptor's unit: `"300 scot td"` (human rods),
/// `"300 phot td"` (human cones), `"1e4 R*/rod/s"` (rodent rods). A level in trolands must say
/// which trolands it is, and they must be the receptor's.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a missing or wrong unit, trolands that do not say
/// which kind or are of the other kind than the receptor's, or a negative level.
pub fn parse_level(pigment: &Pigment, text: &str) -> Result<f64> {
    let v = match pigment.level_unit {
        LevelUnit::IsomerisationsPerSecond => parse_isomerisation_rate(text)?.si(),
        LevelUnit::ScotopicTrolands | LevelUnit::PhotopicTrolands => {
            let want = if pigment.level_unit == LevelUnit::ScotopicTrolands {
                TrolandKind::Scotopic
            } else {
                TrolandKind::Photopic
            };
            let (v, kind) = parse_typed_trolands(text)?;
            if kind != want {
                return Err(Error::input(format!(
                    "'{text}': {} levels are {} trolands: give '{}'",
                    pigment.id,
                    want.name(),
                    want.respell(text)
                )));
            }
            v
        }
    };
    if !(v >= 0.0 && v.is_finite()) {
        return Err(Error::input(format!("light level '{text}' must be a finite number ≥ 0")));
    }
    Ok(v)
}

/// The level a source gives for `pigment`, through the retina chain for `subject`.
///
/// # Errors
/// As the retina chain, or if the radiance the eye sees is not known.
pub fn level_of_source(
    pigment: &Pigment,
    subject: &SubjectSpec,
    source: &SourceSpec,
    base: Option<&Path>,
) -> Result<f64> {
    let scenario = build(subject, std::slice::from_ref(source), &[], base)?;
    if scenario.eye.species != pigment.species {
        return Err(Error::input(format!(
            "the subject is a {} but the receptor {} belongs to a {}",
            scenario.eye.species.name(),
            pigment.id,
            pigment.species.name()
        )));
    }
    let report = assess_retina(&scenario)?;
    let at_eye = &report.sources[0];
    if at_eye.retinal.is_none() {
        return Err(Error::input(format!(
            "source '{}': the radiance the eye sees is not known; give full_field, subtense, or size and distance",
            source.spectrum
        )));
    }
    at_eye.level(pigment.level_unit).ok_or_else(|| Error::input("the eye model has no rod"))
}

/// Parses a bleaching scenario; `origin` names it in errors and `base` is where relative files
/// are looked up.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] or [`crate::ErrorKind::InvalidInput`] naming the file and
/// the step or key: unknown keys, a missing or wrong unit, zero-length steps, a step with both or
/// neither of level and source, parameters outside their range, a schedule that never ends.
pub fn parse_bleach_scenario(text: &str, origin: &str, base: Option<&Path>) -> Result<BleachScenario> {
    let raw: RawScenario =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    resolve(&raw, base).map_err(|e| e.in_file(origin, Some(text)))
}

fn resolve(raw: &RawScenario, base: Option<&Path>) -> Result<BleachScenario> {
    let mut pigment = find_pigment(&raw.receptor).map_err(|e| e.key("receptor"))?;
    for (k, v) in &raw.parameters {
        pigment.override_param(k, v).map_err(|e| e.key(k).key("parameters"))?;
    }
    let model = match &raw.model {
        Some(m) => Model::parse(m).map_err(|e| e.key("model"))?,
        None => Model::RateLimited,
    };
    let mut schedule = Schedule::default();
    let mut source_levels: Vec<(SourceSpec, f64)> = Vec::new();
    let mut cycle = Vec::with_capacity(raw.step.len());
    for (i, s) in raw.step.iter().enumerate() {
        let at = |e: Error| e.key(&format!("step[{i}]"));
        let name = s.name.clone().unwrap_or_else(|| format!("step {}", i + 1));
        let duration = parse_time(&s.duration).map_err(|e| at(e.key("duration")))?;
        let level = step_level(raw, s, &pigment, &mut source_levels, base).map_err(at)?;
        schedule.push(&name, duration.si(), pigment.rate_of_level(level)).map_err(at)?;
        cycle.push(CourseStep { name, duration, level });
    }
    let repeat = raw.repeat.unwrap_or(1);
    schedule.repeat(repeat).map_err(|e| e.key("repeat"))?;
    let start = raw.start_bleached.unwrap_or(0.0);
    if !(0.0..=1.0).contains(&start) {
        return Err(Error::input(format!("{start} must be between 0 and 1")).key("start_bleached"));
    }
    Ok(BleachScenario { pigment, model, schedule, start, cycle: (cycle, repeat) })
}

/// The level of one step: its `level`, or its `source` through the retina chain (each distinct
/// source computed once).
fn step_level(
    raw: &RawScenario,
    s: &RawStep,
    pigment: &Pigment,
    cache: &mut Vec<(SourceSpec, f64)>,
    base: Option<&Path>,
) -> Result<f64> {
    match (&s.level, &s.source) {
        (Some(l), None) => parse_level(pigment, l).map_err(|e| e.key("level")),
        (None, Some(src)) => {
            if let Some((_, lv)) = cache.iter().find(|(spec, _)| spec == src) {
                return Ok(*lv);
            }
            let subject = raw.subject.as_ref().ok_or_else(|| {
                Error::input("a step with a source needs a [subject] table (species, pupil)")
            })?;
            let lv = level_of_source(pigment, subject, src, base).map_err(|e| e.key("source"))?;
            cache.push((src.clone(), lv));
            Ok(lv)
        }
        _ => Err(Error::input("give either 'level' or 'source'")),
    }
}
