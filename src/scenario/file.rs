//! The `assess` scenario file: parsed, then resolved into typed values, once.
//!
//! Nothing after [`parse_scenario_file`] reads scenario text. Every source is resolved and placed
//! here (files relative to the scenario's own folder, never the working directory), the filters
//! are read once, the species, pigmentation and step phases become enums, and the pupil rule of
//! each phase is decided. Errors carry their location as fields: the file, the key path and the
//! line from the TOML parser's spans.

use std::path::Path;

use serde::Deserialize;

use crate::base::error::{Error, Result};
use crate::base::quantity::{SiValue, Time};
use crate::base::toml_errors::describe;
use crate::base::units::parse_time;
use crate::housing::guidance::{GuidanceSet, find_guidance};
use crate::housing::room::Room;
use crate::limits::{LimitSet, find_set};
use crate::pigment::kinetics::{Model, Pigment, find_pigment};
use crate::retina::eye::Species;
use crate::retina::pupil::PupilRule;
use crate::retina::report::RetinaScenario;
use crate::scenario::retina::{FilterSpec, SourceSpec, SubjectSpec, build};
use crate::scenario::room::{Context, RawRoom, resolve_room};
use crate::scenario::{Phase, Pigmentation};

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawScenario {
    scenario: RawMeta,
    subject: SubjectSpec,
    #[serde(default)]
    source: Vec<SourceSpec>,
    #[serde(default)]
    filter: Vec<FilterSpec>,
    schedule: Option<RawSchedule>,
    limits: Option<RawLimits>,
    guidance: Option<RawGuidance>,
    survey: Option<toml::Value>,
    room: Option<RawRoom>,
    /// `[[variant]]` tables: read by `scenario::variant`, ignored by the base scenario.
    #[serde(rename = "variant")]
    _variants: Option<serde::de::IgnoredAny>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawMeta {
    name: String,
    title: String,
    description: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSchedule {
    receptor: Option<String>,
    model: Option<String>,
    repeat: Option<u64>,
    step: Vec<RawStep>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStep {
    name: String,
    phase: Option<String>,
    duration: String,
    #[serde(default)]
    on: Vec<String>,
    edi_target: Option<String>,
    rod_target: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLimits {
    sets: Vec<String>,
    duration: String,
    sources: Option<Vec<String>>,
    #[serde(default)]
    classify: bool,
    #[serde(default)]
    general_lighting: bool,
    #[serde(default)]
    aphakic: bool,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawGuidance {
    sets: Vec<String>,
}

/// How the pupil of dark-phase steps was chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum DarkPupilBasis {
    /// The scenario's `dark_pupil`.
    Stated,
    /// A rodent in a dark phase: the species' dark-adapted pupil (the scenario did not say).
    RodentDarkAdapted,
    /// The same rule as the light phase (people, unless the scenario says otherwise).
    SameAsLight,
}

/// One step of the schedule, resolved.
#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    /// Free-text name.
    pub name: String,
    /// Its phase, from `phase` or, failing that, from a name that is a phase (any case).
    pub phase: Option<Phase>,
    /// Duration.
    pub duration: Time,
    /// Indexes (into the scenario's sources) of the sources lit.
    pub on: Vec<usize>,
    /// The user's targets for this step's light (`edi_target`, `rod_target`).
    pub targets: crate::housing::guidance::StepTargets,
}

/// The schedule, resolved.
#[derive(Debug, Clone, PartialEq)]
pub struct ScheduleSpec {
    /// The receptor.
    pub pigment: Pigment,
    /// The model.
    pub model: Model,
    /// The steps of one cycle.
    pub steps: Vec<Step>,
    /// Cycles.
    pub repeat: u64,
}

/// The limit checks, resolved.
#[derive(Debug, Clone)]
pub struct LimitsSpec {
    /// The sets.
    pub sets: Vec<&'static LimitSet>,
    /// Exposure duration.
    pub duration: Time,
    /// Indexes of the sources to check.
    pub sources: Vec<usize>,
    /// Classify into risk groups.
    pub classify: bool,
    /// General-lighting assessment distance.
    pub general_lighting: bool,
    /// Evaluate the opt-in aphakic hazard.
    pub aphakic: bool,
}

/// A scenario, resolved: every later stage reads only these values.
#[derive(Debug, Clone)]
pub struct Scenario {
    /// Short name.
    pub name: String,
    /// Title.
    pub title: String,
    /// Description.
    pub description: Option<String>,
    /// The file (or demo) it came from.
    pub origin: String,
    /// Species of the subject.
    pub species: Species,
    /// Pigmentation (rodents).
    pub pigmentation: Option<Pigmentation>,
    /// The subject's eye with every source placed and every filter, and the light-phase pupil.
    pub view: RetinaScenario,
    /// Source ids, one per `view.sources` entry.
    pub source_ids: Vec<String>,
    /// The pupil rule of dark-phase steps.
    pub dark_pupil: PupilRule,
    /// Why that rule.
    pub dark_pupil_basis: DarkPupilBasis,
    /// The exposure schedule.
    pub schedule: Option<ScheduleSpec>,
    /// The limit checks.
    pub limits: Option<LimitsSpec>,
    /// Guidance sets.
    pub guidance: Vec<&'static GuidanceSet>,
    /// The holding room, when the scenario surveys one.
    pub room: Option<Room>,
    /// Every file the scenario made retidose read (spectra, filters, eye files, readings).
    pub inputs: Vec<std::path::PathBuf>,
}

impl Scenario {
    /// The view for a step of `phase`: the same sources and filters, with that phase's pupil.
    pub fn view_for(&self, phase: Option<Phase>) -> RetinaScenario {
        let mut v = self.view.clone();
        if phase.is_some_and(Phase::is_dark) {
            v.pupil = self.dark_pupil;
        }
        v
    }
}

/// Parses and resolves a scenario file; `origin` names it in errors and `base` is the folder
/// relative files are read from.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] or [`crate::ErrorKind::InvalidInput`] with a
/// [`crate::base::error::Location`]: the file, the key path and its line.
pub fn parse_scenario_file(text: &str, origin: &str, base: Option<&Path>) -> Result<Scenario> {
    let raw: RawScenario = toml::from_str(text).map_err(|e| Error::data(describe(&e, origin)))?;
    crate::base::inputs::start();
    let resolved = resolve(raw, origin, base);
    let inputs = crate::base::inputs::finish();
    let mut s = resolved.map_err(|e| e.in_file(origin, Some(text)))?;
    s.inputs = inputs;
    Ok(s)
}

fn resolve(raw: RawScenario, origin: &str, base: Option<&Path>) -> Result<Scenario> {
    let species = Species::parse(&raw.subject.species).map_err(|e| e.key("species").key("subject"))?;
    let pigmentation = raw
        .subject
        .pigmentation
        .as_deref()
        .map(Pigmentation::parse)
        .transpose()
        .map_err(|e| e.key("pigmentation").key("subject"))?;
    let source_ids = source_ids(&raw.source)?;
    let view = build(&raw.subject, &raw.source, &raw.filter, base)?;
    let (dark_pupil, dark_pupil_basis) = dark_pupil(&raw.subject, species, view.pupil)?;
    crate::scenario::retina::check_pupil(&view.eye, dark_pupil)
        .map_err(|e| e.key("dark_pupil").key("subject"))?;
    let seen = radiance_known(&view)?;
    let schedule = raw.schedule.map(|s| schedule(s, species, &source_ids, &seen)).transpose()?;
    let limits = raw.limits.map(|l| limits(l, &source_ids)).transpose()?;
    let guidance = match raw.guidance {
        None => Vec::new(),
        Some(g) if g.sets.is_empty() => {
            let msg = "an empty list compares nothing: name at least one set (nrc-guide-2011, brown-2022), or leave out [guidance]";
            return Err(Error::input(msg).key("sets").key("guidance"));
        }
        Some(g) => g
            .sets
            .iter()
            .map(|s| find_guidance(s).map_err(|e| e.key("sets").key("guidance")))
            .collect::<Result<Vec<_>>>()?,
    };
    if raw.survey.is_some() {
        let msg = "[survey] became [room]: luminaires as [[room.luminaire]], each rack as [[room.rack]] with its animals \
                   (see `retidose assess --example vivarium`)";
        return Err(Error::input(msg).key("survey"));
    }
    let room = match raw.room {
        Some(r) => {
            let cx = room_context(species, pigmentation, &view, dark_pupil, schedule.as_ref(), base);
            Some(resolve_room(r, &cx).map_err(|e| e.key("room"))?)
        }
        None => None,
    };
    Ok(Scenario {
        name: raw.scenario.name,
        title: raw.scenario.title,
        description: raw.scenario.description,
        origin: origin.to_string(),
        species,
        pigmentation,
        view,
        source_ids,
        dark_pupil,
        dark_pupil_basis,
        schedule,
        limits,
        guidance,
        room,
        inputs: Vec::new(),
    })
}

/// What the room takes from the rest of the scenario.
fn room_context<'a>(
    species: Species,
    pigmentation: Option<Pigmentation>,
    view: &RetinaScenario,
    dark_pupil: PupilRule,
    schedule: Option<&ScheduleSpec>,
    base: Option<&'a Path>,
) -> Context<'a> {
    let phases = schedule.map(|sc| {
        let sum = |dark: bool| -> f64 {
            sc.steps
                .iter()
                .filter(|st| st.phase.is_some_and(|p| p.is_dark() == dark))
                .map(|st| st.duration.si())
                .sum()
        };
        (sum(false), sum(true), u32::try_from(sc.repeat).unwrap_or(u32::MAX))
    });
    Context {
        subject: (species, pigmentation),
        pupils: (view.pupil, dark_pupil),
        schedule: phases,
        model: schedule.map_or(Model::RateLimited, |s| s.model),
        base,
    }
}

fn source_ids(sources: &[SourceSpec]) -> Result<Vec<String>> {
    let mut ids: Vec<String> = Vec::new();
    for (i, s) in sources.iter().enumerate() {
        let at = |e: Error| e.key("id").key(&format!("source[{i}]"));
        let id = s.id.clone().ok_or_else(|| at(Error::input("every source needs an id")))?;
        if ids.contains(&id) {
            return Err(at(Error::input(format!("'{id}' is used twice"))));
        }
        ids.push(id);
    }
    Ok(ids)
}

fn dark_pupil(
    subject: &SubjectSpec,
    species: Species,
    light: PupilRule,
) -> Result<(PupilRule, DarkPupilBasis)> {
    Ok(match &subject.dark_pupil {
        Some(p) => {
            (PupilRule::parse(p).map_err(|e| e.key("dark_pupil").key("subject"))?, DarkPupilBasis::Stated)
        }
        None if species != Species::Human => (PupilRule::DarkAdapted, DarkPupilBasis::RodentDarkAdapted),
        None => (light, DarkPupilBasis::SameAsLight),
    })
}

/// For each source, whether the radiance the eye sees is known (a pigment level needs it).
fn radiance_known(view: &RetinaScenario) -> Result<Vec<bool>> {
    view.sources
        .iter()
        .map(|s| Ok(crate::cornea::geometry::corneal(&s.spectrum, &s.geometry)?.radiance.is_some()))
        .collect()
}

fn schedule(s: RawSchedule, species: Species, ids: &[String], seen: &[bool]) -> Result<ScheduleSpec> {
    let at = |e: Error, key: &str| e.key(key).key("schedule");
    let receptor = s.receptor.unwrap_or_else(|| format!("{}-rod", species.name()));
    let pigment = find_pigment(&receptor).map_err(|e| at(e, "receptor"))?;
    if pigment.species != species {
        let msg = format!("{receptor} does not belong to a {}", species.name());
        return Err(at(Error::input(msg), "receptor"));
    }
    let model = s.model.as_deref().map(Model::parse).transpose().map_err(|e| at(e, "model"))?;
    let mut steps = Vec::with_capacity(s.step.len());
    for (i, st) in s.step.iter().enumerate() {
        steps.push(step(st, ids, seen).map_err(|e| at(e, &format!("step[{i}]")))?);
    }
    if steps.is_empty() {
        return Err(at(Error::input("a schedule needs at least one step"), "step"));
    }
    let repeat = s.repeat.unwrap_or(1);
    let one: f64 = steps.iter().map(|st| st.duration.si()).sum();
    crate::pigment::schedule::check_size(steps.len(), one, repeat).map_err(|e| at(e, "repeat"))?;
    Ok(ScheduleSpec { pigment, model: model.unwrap_or(Model::RateLimited), steps, repeat })
}

fn step(st: &RawStep, ids: &[String], seen: &[bool]) -> Result<Step> {
    let duration = parse_time(&st.duration).map_err(|e| e.key("duration"))?;
    let d = duration.si();
    if !(d > 0.0 && d.is_finite()) {
        return Err(Error::input(format!("{d} s must be above 0 s")).key("duration"));
    }
    let phase = match &st.phase {
        Some(p) => Some(Phase::parse(p).map_err(|e| e.key("phase"))?),
        None => Phase::parse(&st.name).ok(),
    };
    let on = st
        .on
        .iter()
        .map(|id| {
            ids.iter().position(|x| x == id).ok_or_else(|| {
                Error::input(format!("no source with id '{id}'; sources: {}", ids.join(", "))).key("on")
            })
        })
        .collect::<Result<Vec<_>>>()?;
    if let Some(&i) = on.iter().find(|&&i| !seen[i]) {
        return Err(Error::input(format!(
            "source '{}' is lit here, but the radiance the eye sees is not known, so no pigment level can be \
             computed; give the source full_field, subtense, or size and distance",
            ids[i]
        ))
        .key("on"));
    }
    let targets =
        crate::housing::guidance::StepTargets::parse(st.edi_target.as_deref(), st.rod_target.as_deref())?;
    Ok(Step { name: st.name.clone(), phase, duration, on, targets })
}

fn limits(l: RawLimits, ids: &[String]) -> Result<LimitsSpec> {
    let at = |e: Error, key: &str| e.key(key).key("limits");
    if l.sets.is_empty() {
        let msg = "an empty list checks nothing: name at least one set (see `retidose limits list`), or leave out [limits]";
        return Err(at(Error::input(msg), "sets"));
    }
    let sets = l.sets.iter().map(|s| find_set(s).map_err(|e| at(e, "sets"))).collect::<Result<Vec<_>>>()?;
    let duration = parse_time(&l.duration).map_err(|e| at(e, "duration"))?;
    if !(duration.si() > 0.0 && duration.si().is_finite()) {
        return Err(at(Error::input(format!("{} s must be above 0 s", duration.si())), "duration"));
    }
    let sources = match &l.sources {
        None => (0..ids.len()).collect(),
        Some(list) => list
            .iter()
            .map(|s| {
                ids.iter().position(|x| x == s).ok_or_else(|| {
                    at(
                        Error::input(format!("no source with id '{s}'; sources: {}", ids.join(", "))),
                        "sources",
                    )
                })
            })
            .collect::<Result<Vec<_>>>()?,
    };
    Ok(LimitsSpec {
        sets,
        duration,
        sources,
        classify: l.classify,
        general_lighting: l.general_lighting,
        aphakic: l.aphakic,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"
[scenario]
name = "x"
title = "x"
[subject]
species = "MOUSE"
pigmentation = "Albino"
pupil = "light"
[[source]]
id = "a"
spectrum = "cie:D65"
illuminance = "100 lx"
full_field = true
[[source]]
id = "b"
spectrum = "cie:D65"
illuminance = "1 lx"
full_field = true
[schedule]
[[schedule.step]]
name = "Lights"
phase = "Light"
duration = "12 h"
on = ["a"]
[[schedule.step]]
name = "DARK"
duration = "12 h"
on = ["b"]
"#;

    #[test]
    fn resolves_enums_in_any_case_and_phases_from_names() {
        let s = parse_scenario_file(GOOD, "x.toml", None).unwrap();
        assert_eq!(s.species, Species::Mouse);
        assert_eq!(s.pigmentation, Some(Pigmentation::Albino));
        let sc = s.schedule.as_ref().unwrap();
        assert_eq!(sc.steps[0].phase, Some(Phase::Light));
        assert_eq!(sc.steps[1].phase, Some(Phase::Dark));
        assert_eq!(sc.pigment.id, "mouse-rod");
        assert_eq!(s.dark_pupil, PupilRule::DarkAdapted);
        assert_eq!(s.dark_pupil_basis, DarkPupilBasis::RodentDarkAdapted);
        assert_eq!(s.view_for(Some(Phase::Dark)).pupil, PupilRule::DarkAdapted);
        assert_eq!(s.view_for(Some(Phase::Light)).pupil, PupilRule::LightAdapted);
    }

    #[test]
    fn errors_carry_file_key_and_line_as_fields() {
        let cases = [
            (GOOD.replace("illuminance = \"1 lx\"", "illuminance = \"1\""), "source[1].illuminance", 17),
            (
                GOOD.replace("duration = \"12 h\"\non = [\"b\"]", "duration = \"0 h\"\non = [\"b\"]"),
                "schedule.step[1].duration",
                27,
            ),
            (GOOD.replace("on = [\"b\"]", "on = [\"c\"]"), "schedule.step[1].on", 28),
            (GOOD.replace("phase = \"Light\"", "phase = \"dusk\""), "schedule.step[0].phase", 22),
            (GOOD.replace("species = \"MOUSE\"", "species = \"cat\""), "subject.species", 6),
        ];
        for (text, key, line) in cases {
            let e = parse_scenario_file(&text, "x.toml", None).unwrap_err();
            let loc = e.location().unwrap_or_else(|| panic!("{e}"));
            assert_eq!(loc.file.as_deref(), Some("x.toml"), "{e}");
            assert_eq!(loc.key.as_deref(), Some(key), "{e}");
            assert_eq!(loc.line, Some(line), "{e}");
            assert!(e.to_string().starts_with(&format!("x.toml:{line}: key '{key}': ")), "{e}");
        }
    }

    #[test]
    fn relative_files_are_read_from_the_scenario_folder_only() {
        let dir = std::env::temp_dir().join(format!("retidose-file-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let text = GOOD.replacen("spectrum = \"cie:D65\"", "spectrum = \"lamp.csv\"", 1);
        // Not beside the scenario: an error naming the path tried, never the working directory.
        let e = parse_scenario_file(&text, "x.toml", Some(&dir)).unwrap_err();
        assert!(e.to_string().contains(&dir.join("lamp.csv").display().to_string()), "{e}");
        std::fs::write(dir.join("lamp.csv"), "# kind: irradiance\n400,1\n500,1\n600,1\n700,1\n").unwrap();
        let s = parse_scenario_file(&text, "x.toml", Some(&dir)).unwrap();
        assert_eq!(s.view.sources.len(), 2);
    }
}
