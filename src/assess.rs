//! `retidose assess`: one scenario file in, one assessment out.
//!
//! A scenario names a subject, sources (each placed as in a retina scenario), filters, an
//! exposure schedule whose steps switch sources on, the limit sets and guidance sets to check,
//! and optionally a housing survey of a rack. [`assess`] turns it into an [`Assessment`], the one
//! structure every report reads.

use std::path::Path;

use serde::Deserialize;

use crate::base::error::{Error, Result};
use crate::base::quantity::SiValue;
use crate::base::toml_errors::describe;
use crate::base::units::{parse_length, parse_luminous_intensity, parse_number, parse_time};
use crate::housing::guidance::{Evidence, Flag, GuidanceSet, find_guidance};
use crate::housing::survey::{
    Luminaire, PositionResult, Rack, SurveyInput, illuminance_at, per_lux, read_measurements, run_survey,
};
use crate::limits::report::{LIMITS_CAUTION, LimitsAssessment, LimitsRequest, assess_limits};
use crate::limits::{LimitSet, find_set};
use crate::pigment::bleach::{BleachReport, assess as bleach_assess};
use crate::pigment::kinetics::{Model, Pigment, find_pigment};
use crate::pigment::schedule::Schedule;
use crate::retina::eye::Species;
use crate::retina::report::{RetinaReport, assess_retina};
use crate::scenario::bleach::level_of_source;
use crate::scenario::retina::{FilterSpec, SourceSpec, SubjectSpec, build, place};
use crate::spectrum::Spectrum;

/// The built-in demo scenarios (invented, set in the fictional Fenwick Institute of Comparative
/// Vision), by name.
pub const DEMOS: [(&str, &str); 3] = [
    ("vivarium", include_str!("demo/vivarium.toml")),
    ("dark-adaptation", include_str!("demo/dark_adaptation.toml")),
    ("stimulus-review", include_str!("demo/stimulus_review.toml")),
];

/// A demo scenario's text by name.
///
/// # Errors
/// [`crate::ErrorKind::UnknownName`] listing the demos.
pub fn demo(name: &str) -> Result<&'static str> {
    DEMOS.iter().find(|d| d.0 == name).map(|d| d.1).ok_or_else(|| {
        Error::new(
            crate::ErrorKind::UnknownName,
            format!(
                "unknown demo '{name}'; built in: {}",
                DEMOS.iter().map(|d| d.0).collect::<Vec<_>>().join(", ")
            ),
        )
    })
}

/// The cautions every report opens with.
pub const CAUTIONS: [&str; 3] = [
    LIMITS_CAUTION,
    "Animal housing guidance is not a welfare assessment: the attending veterinarian and the institution's animal care and use committee decide, under local regulation.",
    "retidose informs; it does not replace the standards bodies' texts, a qualified optical-radiation safety officer, the attending veterinarian, the institution's committee (IACUC, IRB) or local regulation.",
];

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
    survey: Option<RawSurvey>,
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
    duration: String,
    #[serde(default)]
    on: Vec<String>,
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

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSurvey {
    shelves: usize,
    columns: usize,
    first_column_x: String,
    column_spacing: String,
    rack_y: String,
    bottom_shelf: String,
    shelf_spacing: String,
    cage_transmittance: String,
    shelf_shading: Option<String>,
    light_spectrum: String,
    dark_spectrum: Option<String>,
    dark_lux: Option<String>,
    measurements: Option<String>,
    #[serde(default)]
    luminaire: Vec<RawLuminaire>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLuminaire {
    x: String,
    y: String,
    z: String,
    intensity: String,
}

/// A scenario, parsed and checked (sources are resolved when assessed).
#[derive(Debug, Clone)]
pub struct Scenario {
    /// Short name.
    pub name: String,
    /// Title.
    pub title: String,
    /// Description.
    pub description: Option<String>,
    /// The subject.
    pub subject: SubjectSpec,
    /// Sources by id.
    pub sources: Vec<SourceSpec>,
    /// Filters.
    pub filters: Vec<FilterSpec>,
    /// The exposure schedule.
    pub schedule: Option<ScheduleSpec>,
    /// The limit checks.
    pub limits: Option<LimitsSpec>,
    /// Guidance sets.
    pub guidance: Vec<&'static GuidanceSet>,
    /// Housing survey.
    pub survey: Option<SurveySpec>,
    /// Where relative files are looked up.
    pub base: Option<std::path::PathBuf>,
    /// The file (or demo) it came from, for messages.
    pub origin: String,
    /// Its text, to find the line of a key named in an error.
    pub text: String,
}

/// One step of a scenario's schedule.
#[derive(Debug, Clone, PartialEq)]
pub struct StepSpec {
    /// Phase name (matched against guidance phases: light, dark, day, evening, night).
    pub name: String,
    /// Duration, s.
    pub duration_s: f64,
    /// Ids of the sources lit in this step.
    pub on: Vec<String>,
}

/// A scenario's schedule.
#[derive(Debug, Clone, PartialEq)]
pub struct ScheduleSpec {
    /// The receptor.
    pub pigment: Pigment,
    /// The model.
    pub model: Model,
    /// The steps.
    pub steps: Vec<StepSpec>,
    /// Repeats of the steps.
    pub repeat: u64,
}

/// A scenario's limit checks.
#[derive(Debug, Clone)]
pub struct LimitsSpec {
    /// The sets.
    pub sets: Vec<&'static LimitSet>,
    /// Exposure duration, s.
    pub duration_s: f64,
    /// Which sources (all when `None`).
    pub sources: Option<Vec<String>>,
    /// Classify into risk groups.
    pub classify: bool,
    /// General-lighting assessment distance.
    pub general_lighting: bool,
    /// Evaluate the opt-in aphakic hazard.
    pub aphakic: bool,
}

/// A housing survey, resolved.
#[derive(Debug, Clone)]
pub struct SurveySpec {
    /// The rack.
    pub rack: Rack,
    /// Ceiling luminaires (geometry mode).
    pub luminaires: Vec<Luminaire>,
    /// Measured lux readings text and its name (measured mode).
    pub measurements: Option<(String, String)>,
    /// Cage transmittance.
    pub cage_transmittance: f64,
    /// Shading per shelf above.
    pub shelf_shading: f64,
    /// Spectrum of the room light.
    pub light_spectrum: String,
    /// Spectrum of the dark-phase leak.
    pub dark_spectrum: String,
    /// Uniform dark-phase leak at cage level, lx (if no measured dark readings).
    pub dark_lux: f64,
}

fn key_err(origin: &str, key: &str, e: Error) -> Error {
    e.context(format!("{origin}: key '{key}'"))
}

/// Parses a scenario file.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] or [`crate::ErrorKind::InvalidInput`] naming the file, the
/// line (for syntax and unknown keys, with the nearest valid key) or the key, and the reason.
pub fn parse_scenario_file(text: &str, origin: &str, base: Option<&Path>) -> Result<Scenario> {
    parse_inner(text, origin, base).map_err(|e| with_line(e, text, origin))
}

/// Puts `origin:LINE` in front of an error that names a key, when the line can be found.
fn with_line(e: Error, text: &str, origin: &str) -> Error {
    let msg = e.message();
    if msg.starts_with(&format!("{origin}:"))
        && msg[origin.len() + 1..].starts_with(|c: char| c.is_ascii_digit())
    {
        return e;
    }
    match crate::base::toml_errors::locate(text, msg) {
        Some(line) => {
            let rest = msg.strip_prefix(&format!("{origin}: ")).unwrap_or(msg).to_string();
            Error::new(e.kind(), format!("{origin}:{line}: {rest}"))
        }
        None => e,
    }
}

fn parse_inner(text: &str, origin: &str, base: Option<&Path>) -> Result<Scenario> {
    let raw: RawScenario = toml::from_str(text).map_err(|e| Error::data(describe(&e, origin)))?;
    let species = Species::parse(&raw.subject.species).map_err(|e| key_err(origin, "subject.species", e))?;
    if let Some(p) = &raw.subject.pigmentation
        && p != "albino"
        && p != "pigmented"
    {
        return Err(key_err(
            origin,
            "subject.pigmentation",
            Error::input(format!("'{p}' is not albino or pigmented")),
        ));
    }
    let mut ids = Vec::new();
    for (i, s) in raw.source.iter().enumerate() {
        let id = s.id.clone().ok_or_else(|| {
            key_err(origin, &format!("source[{i}].id"), Error::input("every source needs an id"))
        })?;
        if ids.contains(&id) {
            return Err(key_err(
                origin,
                &format!("source[{i}].id"),
                Error::input(format!("'{id}' is used twice")),
            ));
        }
        ids.push(id);
    }
    let schedule = match raw.schedule {
        None => None,
        Some(s) => {
            let receptor = s.receptor.unwrap_or_else(|| format!("{}-rod", species.name()));
            let pigment = find_pigment(&receptor).map_err(|e| key_err(origin, "schedule.receptor", e))?;
            if pigment.species != species {
                return Err(key_err(
                    origin,
                    "schedule.receptor",
                    Error::input(format!("{receptor} does not belong to a {}", species.name())),
                ));
            }
            let model = s
                .model
                .as_deref()
                .map(Model::parse)
                .transpose()
                .map_err(|e| key_err(origin, "schedule.model", e))?;
            let mut steps = Vec::new();
            for (i, st) in s.step.iter().enumerate() {
                let d = parse_time(&st.duration)
                    .map_err(|e| key_err(origin, &format!("schedule.step[{i}].duration"), e))?
                    .si();
                if d.is_nan() || d <= 0.0 {
                    return Err(key_err(
                        origin,
                        &format!("schedule.step[{i}].duration"),
                        Error::input("must be above 0 s"),
                    ));
                }
                for on in &st.on {
                    if !ids.contains(on) {
                        return Err(key_err(
                            origin,
                            &format!("schedule.step[{i}].on"),
                            Error::input(format!("no source with id '{on}'; sources: {}", ids.join(", "))),
                        ));
                    }
                }
                steps.push(StepSpec { name: st.name.clone(), duration_s: d, on: st.on.clone() });
            }
            if steps.is_empty() {
                return Err(key_err(
                    origin,
                    "schedule.step",
                    Error::input("a schedule needs at least one step"),
                ));
            }
            Some(ScheduleSpec {
                pigment,
                model: model.unwrap_or(Model::RateLimited),
                steps,
                repeat: s.repeat.unwrap_or(1),
            })
        }
    };
    let limits = match raw.limits {
        None => None,
        Some(l) => {
            let sets = l
                .sets
                .iter()
                .map(|s| find_set(s).map_err(|e| key_err(origin, "limits.sets", e)))
                .collect::<Result<Vec<_>>>()?;
            let d = parse_time(&l.duration).map_err(|e| key_err(origin, "limits.duration", e))?.si();
            if let Some(list) = &l.sources
                && let Some(bad) = list.iter().find(|s| !ids.contains(s))
            {
                return Err(key_err(
                    origin,
                    "limits.sources",
                    Error::input(format!("no source with id '{bad}'")),
                ));
            }
            Some(LimitsSpec {
                sets,
                duration_s: d,
                sources: l.sources,
                classify: l.classify,
                general_lighting: l.general_lighting,
                aphakic: l.aphakic,
            })
        }
    };
    let guidance = match raw.guidance {
        None => Vec::new(),
        Some(g) => g
            .sets
            .iter()
            .map(|s| find_guidance(s).map_err(|e| key_err(origin, "guidance.sets", e)))
            .collect::<Result<Vec<_>>>()?,
    };
    let survey = match raw.survey {
        None => None,
        Some(s) => {
            let len = |t: &str, k: &str| {
                parse_length(t).map(|l| l.si()).map_err(|e| key_err(origin, &format!("survey.{k}"), e))
            };
            let num =
                |t: &str, k: &str| parse_number(t).map_err(|e| key_err(origin, &format!("survey.{k}"), e));
            let rack = Rack {
                shelves: s.shelves,
                columns: s.columns,
                x0_m: len(&s.first_column_x, "first_column_x")?,
                column_spacing_m: len(&s.column_spacing, "column_spacing")?,
                y_m: len(&s.rack_y, "rack_y")?,
                bottom_m: len(&s.bottom_shelf, "bottom_shelf")?,
                shelf_spacing_m: len(&s.shelf_spacing, "shelf_spacing")?,
            };
            let luminaires = s
                .luminaire
                .iter()
                .enumerate()
                .map(|(i, l)| {
                    Ok(Luminaire {
                        x_m: len(&l.x, &format!("luminaire[{i}].x"))?,
                        y_m: len(&l.y, &format!("luminaire[{i}].y"))?,
                        z_m: len(&l.z, &format!("luminaire[{i}].z"))?,
                        intensity_cd: parse_luminous_intensity(&l.intensity)
                            .map_err(|e| key_err(origin, &format!("survey.luminaire[{i}].intensity"), e))?
                            .si(),
                    })
                })
                .collect::<Result<Vec<_>>>()?;
            let measurements = match &s.measurements {
                None => None,
                Some(f) => {
                    let p = base.map_or_else(|| Path::new(f).to_path_buf(), |b| b.join(f));
                    let text = std::fs::read_to_string(&p).map_err(|e| {
                        key_err(
                            origin,
                            "survey.measurements",
                            Error::input(format!("cannot read {}: {e}", p.display())),
                        )
                    })?;
                    Some((text, p.display().to_string()))
                }
            };
            if luminaires.is_empty() == measurements.is_none() {
                return Err(key_err(
                    origin,
                    "survey",
                    Error::input(
                        "give either [[survey.luminaire]] tables or a measurements file, not both or neither",
                    ),
                ));
            }
            let t = num(&s.cage_transmittance, "cage_transmittance")?;
            let shade =
                s.shelf_shading.as_deref().map(|x| num(x, "shelf_shading")).transpose()?.unwrap_or(1.0);
            for (v, k) in [(t, "cage_transmittance"), (shade, "shelf_shading")] {
                if !(0.0..=1.0).contains(&v) {
                    return Err(key_err(
                        origin,
                        &format!("survey.{k}"),
                        Error::input(format!("{v} must be between 0 and 1")),
                    ));
                }
            }
            let dark_lux = match &s.dark_lux {
                Some(t) => crate::base::units::parse_illuminance(t)
                    .map_err(|e| key_err(origin, "survey.dark_lux", e))?
                    .si(),
                None => 0.0,
            };
            Some(SurveySpec {
                rack,
                luminaires,
                measurements,
                cage_transmittance: t,
                shelf_shading: shade,
                light_spectrum: s.light_spectrum.clone(),
                dark_spectrum: s.dark_spectrum.clone().unwrap_or(s.light_spectrum),
                dark_lux,
            })
        }
    };
    Ok(Scenario {
        name: raw.scenario.name,
        title: raw.scenario.title,
        description: raw.scenario.description,
        subject: raw.subject,
        sources: raw.source,
        filters: raw.filter,
        schedule,
        limits,
        guidance,
        survey,
        base: base.map(Path::to_path_buf),
        origin: origin.to_string(),
        text: text.to_string(),
    })
}

/// A cited document used by the assessment.
#[derive(Debug, Clone, PartialEq)]
pub struct Provenance {
    /// What it is used for.
    pub role: String,
    /// Document.
    pub document: String,
    /// Edition.
    pub edition: String,
    /// Status summary.
    pub status: String,
}

/// A housing survey's results with its summary.
#[derive(Debug, Clone, PartialEq)]
pub struct SurveyResult {
    /// Shelves × columns.
    pub shelves: usize,
    /// Columns.
    pub columns: usize,
    /// Per position.
    pub positions: Vec<PositionResult>,
    /// Ratio of the highest to the lowest room lux over the rack.
    pub max_over_min: f64,
    /// Positions with a raised flag.
    pub flagged: usize,
    /// How the light was obtained.
    pub mode: String,
}

/// The one assessment structure.
#[derive(Debug, Clone)]
pub struct Assessment {
    /// Scenario name.
    pub name: String,
    /// Title.
    pub title: String,
    /// Description.
    pub description: Option<String>,
    /// Cautions (always shown first).
    pub cautions: Vec<String>,
    /// Documents used.
    pub provenance: Vec<Provenance>,
    /// What the eye receives from each source.
    pub retina: Option<RetinaReport>,
    /// Corneal spectral irradiance of each source (for plots), by id.
    pub spectra: Vec<(String, Spectrum)>,
    /// Pigment over the schedule.
    pub bleach: Option<BleachReport>,
    /// Limit checks, per source id and set.
    pub limits: Vec<(String, LimitsAssessment)>,
    /// Guidance flags per schedule phase.
    pub guidance: Vec<(String, Flag)>,
    /// Evidence to show beside the guidance.
    pub evidence: Vec<Evidence>,
    /// Housing survey.
    pub survey: Option<SurveyResult>,
    /// What was not assessed, and why.
    pub not_assessed: Vec<String>,
    /// True when a limit is exceeded.
    pub limit_exceeded: bool,
    /// True when a guidance flag is raised.
    pub flag_raised: bool,
}

/// Assesses a scenario.
///
/// # Errors
/// Any error of the chain it runs, naming the source or key.
pub fn assess(s: &Scenario) -> Result<Assessment> {
    assess_inner(s).map_err(|e| {
        let e = if e.message().starts_with(&s.origin) { e } else { e.context(&s.origin) };
        with_line(e, &s.text, &s.origin)
    })
}

fn assess_inner(s: &Scenario) -> Result<Assessment> {
    let base = s.base.as_deref();
    let mut provenance = Vec::new();
    let mut not_assessed = Vec::new();
    let label = |src: &SourceSpec| src.id.clone().unwrap_or_else(|| src.spectrum.clone());
    let retina = if s.sources.is_empty() {
        None
    } else {
        let sc = build(&s.subject, &s.sources, &s.filters, base)?;
        Some(assess_retina(&sc)?)
    };
    let spectra = s
        .sources
        .iter()
        .map(|src| {
            let p = place(src, base)?;
            Ok((label(src), crate::cornea::geometry::corneal(&p.spectrum, &p.geometry)?.irradiance))
        })
        .collect::<Result<Vec<_>>>()?;
    let mut bleach = None;
    let mut guidance = Vec::new();
    if let Some(ScheduleSpec { pigment, model, steps, repeat }) = &s.schedule {
        let mut levels = Vec::new();
        for src in &s.sources {
            levels.push((label(src), level_of_source(pigment, &s.subject, src, base)?));
        }
        let mut schedule = Schedule::default();
        for st in steps {
            let level: f64 =
                st.on.iter().map(|id| levels.iter().find(|(i, _)| i == id).map_or(0.0, |l| l.1)).sum();
            schedule.push(&st.name, st.duration_s, pigment.rate_of_level(level))?;
        }
        schedule.repeat(*repeat)?;
        bleach = Some(bleach_assess(pigment, *model, &schedule, 0.0, Some(240))?);
        provenance.push(Provenance {
            role: format!("pigment kinetics ({})", pigment.id),
            document: "src/data/pigments.toml (Rushton 1961; Lamb & Pugh 2004; Cameron, Mahroo & Lamb 2006; others per value)".into(),
            edition: "as listed per parameter".into(),
            status: if pigment.from_memory().is_empty() { "confirmed or derived".into() } else { format!("from memory: {}", pigment.from_memory().join(", ")) },
        });
        // Guidance per phase: the corneal illuminance (and melanopic EDI) of the sources on.
        let albino = s.subject.pigmentation.as_deref() == Some("albino");
        for g in &s.guidance {
            for r in &g.rule {
                let applies = match r.applies_to.as_str() {
                    "albino" => albino,
                    "human" => pigment.species == Species::Human,
                    _ => true,
                };
                let Some(StepSpec { name, on, .. }) = steps.iter().find(|st| st.name == r.phase) else {
                    continue;
                };
                if !applies {
                    continue;
                }
                let mut v = 0.0;
                for id in on {
                    if let Some((_, spec)) = spectra.iter().find(|(i, _)| i == id) {
                        v += match r.quantity.as_str() {
                            "melanopic-edi" => crate::weighting::alpha_opic::alpha_opic(spec)
                                .iter()
                                .find(|a| a.name == "melanopic")
                                .and_then(|a| a.edi)
                                .map_or(0.0, |e| e.si_value()),
                            _ => crate::spectrum::photometry::photopic(spec).raw,
                        };
                    }
                }
                guidance.push((name.clone(), r.check(&g.id, v)));
            }
        }
    } else if !s.guidance.is_empty() && s.survey.is_none() {
        not_assessed.push("guidance: no schedule, so no light or dark phase to compare".to_string());
    }
    for g in &s.guidance {
        provenance.push(Provenance {
            role: format!("guidance ({})", g.refers_to),
            document: g.document.clone(),
            edition: g.edition.clone(),
            status: g.rule.iter().map(|r| format!("{}: {}", r.id, r.status)).collect::<Vec<_>>().join("; "),
        });
    }
    let mut limits = Vec::new();
    if let Some(LimitsSpec {
        sets,
        duration_s: d,
        sources: only,
        classify,
        general_lighting: general,
        aphakic,
    }) = &s.limits
    {
        if s.subject.species != "human" {
            not_assessed.push(
                "exposure limits: the limits are for humans; they are evaluated for the light as placed, not for the animals"
                    .to_string(),
            );
        }
        for set in sets {
            provenance.push(Provenance {
                role: "exposure limits".into(),
                document: set.document.clone(),
                edition: format!("{}; errata: {}", set.edition, set.errata),
                status: set
                    .status_counts()
                    .iter()
                    .map(|(k, n)| format!("{n} {k}"))
                    .collect::<Vec<_>>()
                    .join(", "),
            });
            for src in s.sources.iter().filter(|x| only.as_ref().is_none_or(|o| o.contains(&label(x)))) {
                let placed = place(src, base)?;
                let filters = s
                    .filters
                    .iter()
                    .map(|f| match (&f.transmittance, &f.file) {
                        (Some(t), _) => crate::cornea::filter::Filter::parse(t),
                        (_, Some(p)) => crate::cornea::filter::Filter::parse(
                            &base.map_or_else(|| p.clone(), |b| b.join(p).display().to_string()),
                        ),
                        _ => Err(Error::input("a filter needs transmittance or file")),
                    })
                    .collect::<Result<Vec<_>>>()?;
                let r = assess_limits(&LimitsRequest {
                    source: &placed,
                    filters: &filters,
                    set,
                    duration: crate::base::quantity::Time::from_si(*d),
                    aphakic: *aphakic,
                    classify: classify.then_some(*general),
                    only: &[],
                })?;
                for h in &r.hazards {
                    if let crate::limits::Verdict::NotAssessed(why) = &h.verdict {
                        not_assessed.push(format!("{} / {} / {}: {why}", label(src), set.id, h.name));
                    }
                }
                limits.push((label(src), r));
            }
        }
    }
    let survey = match &s.survey {
        None => None,
        Some(sv) => Some(run_housing_survey(s, sv)?),
    };
    let evidence: Vec<Evidence> = s.guidance.iter().flat_map(|g| g.evidence.clone()).collect();
    let limit_exceeded =
        limits.iter().any(|(_, l)| l.hazards.iter().any(|h| h.verdict == crate::limits::Verdict::Exceeds));
    let flag_raised =
        guidance.iter().any(|(_, f)| f.raised) || survey.as_ref().is_some_and(|sv| sv.flagged > 0);
    if let Some(r) = &retina {
        for src in &r.sources {
            if src.retinal.is_none() {
                not_assessed.push(format!(
                    "{}: retinal quantities (the radiance the eye sees is not known)",
                    src.label
                ));
            }
        }
    }
    Ok(Assessment {
        name: s.name.clone(),
        title: s.title.clone(),
        description: s.description.clone(),
        cautions: CAUTIONS.iter().map(|c| c.to_string()).collect(),
        provenance,
        retina,
        spectra,
        bleach,
        limits,
        guidance,
        evidence,
        survey,
        not_assessed,
        limit_exceeded,
        flag_raised,
    })
}

/// Runs the housing survey of a scenario.
///
/// # Errors
/// As the survey and the retina chain.
pub fn run_housing_survey(s: &Scenario, sv: &SurveySpec) -> Result<SurveyResult> {
    let species = Species::parse(&s.subject.species)?;
    if species == Species::Human {
        return Err(Error::input("a housing survey needs a rodent subject (mouse or rat)"));
    }
    let pigment = match &s.schedule {
        Some(sch) => sch.pigment.clone(),
        None => find_pigment(&format!("{}-rod", species.name()))?,
    };
    let model = s.schedule.as_ref().map_or(Model::RateLimited, |x| x.model);
    let positions = sv.rack.positions()?;
    let (room_lux, dark_measured, mode) = match &sv.measurements {
        Some((text, name)) => {
            let (l, d) = read_measurements(text, name, &positions)?;
            (l, d, format!("measured lux at cage level from {name}"))
        }
        None => (
            positions.iter().map(|p| illuminance_at(p, &sv.luminaires, sv.shelf_shading)).collect(),
            None,
            format!(
                "computed from {} ceiling luminaire(s) (Lambertian, inverse-square and cosine laws, shading {} per shelf above)",
                sv.luminaires.len(),
                sv.shelf_shading
            ),
        ),
    };
    let dark_room_lux = dark_measured.unwrap_or_else(|| vec![sv.dark_lux; positions.len()]);
    let light = per_lux(&pigment, &s.subject, &sv.light_spectrum)?;
    let mut dark_subject = s.subject.clone();
    dark_subject.pupil = Some("dark".to_string());
    let dark = per_lux(&pigment, &dark_subject, &sv.dark_spectrum)?;
    let guidance: Vec<&GuidanceSet> = s.guidance.to_vec();
    let results = run_survey(&SurveyInput {
        positions,
        room_lux,
        dark_room_lux,
        cage_transmittance: sv.cage_transmittance,
        light,
        dark,
        pigment: &pigment,
        model,
        albino: s.subject.pigmentation.as_deref() == Some("albino"),
        guidance: &guidance,
    })?;
    let max = results.iter().map(|r| r.room_lux).fold(0.0, f64::max);
    let min = results.iter().map(|r| r.room_lux).fold(f64::INFINITY, f64::min);
    Ok(SurveyResult {
        shelves: sv.rack.shelves,
        columns: sv.rack.columns,
        flagged: results.iter().filter(|r| !r.flags.is_empty()).count(),
        positions: results,
        max_over_min: if min > 0.0 { max / min } else { f64::INFINITY },
        mode,
    })
}
