//! `retidose assess`: one scenario file in, one assessment out.
//!
//! A scenario names a subject, sources (each placed as in a retina scenario), filters, an
//! exposure schedule whose steps switch sources on, the limit sets and guidance sets to check,
//! and optionally a housing survey of a rack. [`crate::scenario::file`] resolves it once;
//! [`assess`] runs the resolved values through the stages into an [`Assessment`], the one
//! structure every report reads. Each source's light path (placing, filters, the pupil of the
//! step's phase) is computed once and every section reads it.

use uom::si::f64::{Frequency, Illuminance};
use uom::si::frequency::hertz;
use uom::si::illuminance::lux;

use crate::base::error::{Error, Result};
use crate::base::quantity::Time;
use crate::cornea::at_cornea;
use crate::housing::guidance::{
    AppliesTo, Brightest, Evidence, Flag, GuidanceQuantity, GuidanceSet, Rule, brightest,
};
use crate::housing::room::Rack;
use crate::housing::survey::{RoomResult, assess_room};
use crate::limits::Verdict;
use crate::limits::report::{LIMITS_CAUTION, LimitsAssessment, LimitsRequest, assess_limits};
use crate::pigment::bleach::BleachReport;
use crate::pigment::course::{Course, CourseStep};
use crate::pigment::kinetics::{LevelUnit, Pigment};
use crate::retina::catch::{SpeciesOpic, species_alpha_opic};
use crate::retina::eye::Species;
use crate::retina::pupil::Pupil;
use crate::retina::report::{RetinaReport, RetinaScenario, SourceAtEye, assess_retina};
use crate::scenario::file::{DarkPupilBasis, LimitsSpec, Scenario, ScheduleSpec, Step};
use crate::scenario::{Phase, Pigmentation};
use crate::spectrum::Spectrum;
use crate::spectrum::photometry::photopic;
use crate::weighting::alpha_opic::{AlphaOpicValue, alpha_opic};

pub use crate::scenario::file::parse_scenario_file;

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

/// The animal caution: shown when animals are the subject or a room is surveyed.
pub const ANIMAL_CAUTION: &str = "Animal housing guidance is not a welfare assessment: the attending veterinarian and the institution's animal care and use committee decide, under local regulation.";

/// The general deferral, shown in every report.
pub const GENERAL_CAUTION: &str = "retidose informs; it does not replace the standards bodies' texts, a qualified optical-radiation safety officer, the attending veterinarian, the institution's committee (IACUC, IRB) or local regulation.";

/// The cautions that apply to `s`: the human-limits caution when limits are checked, the animal
/// caution when animals are the subject or a room is surveyed, the general deferral always.
pub fn cautions(s: &Scenario) -> Vec<String> {
    let mut v = Vec::new();
    if s.limits.is_some() {
        v.push(LIMITS_CAUTION.to_string());
    }
    if s.species != Species::Human || s.room.is_some() {
        v.push(ANIMAL_CAUTION.to_string());
    }
    v.push(GENERAL_CAUTION.to_string());
    v
}

/// A cited document used by the assessment.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
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

/// What is lit in one step of the schedule (one cycle), from the one light path.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct StepLight {
    /// Free-text name.
    pub name: String,
    /// Its phase, when given or when the name is a phase.
    pub phase: Option<Phase>,
    /// Duration.
    pub duration: Time,
    /// Ids of the sources lit.
    pub on: Vec<String>,
    /// The pupil used in this step.
    pub pupil: Pupil,
    /// Illuminance of the lit sources before the filters (for housing: the room light at cage
    /// level, the NRC Guide's quantity).
    pub room_illuminance: Illuminance,
    /// Illuminance at the eye after every filter.
    pub illuminance: Illuminance,
    /// CIE S 026 melanopic EDI at the eye after every filter (people).
    pub melanopic_edi: Option<Illuminance>,
    /// CIE S 026 α-opic quantities of the lit sources together (people).
    pub alpha_opic: Vec<AlphaOpicValue>,
    /// Species α-opic quantities of the lit sources together (rodents).
    pub species_opic: Vec<SpeciesOpic>,
    /// Rod R* per rod per second (the sum over the lit sources).
    pub rod_rate: Option<Frequency>,
    /// The level the pigment model receives, in its unit (the sum over the lit sources).
    pub level: f64,
}

/// Where a guidance comparison was made.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum GuidanceBasis {
    /// One schedule step.
    Step(String),
    /// Every cage position of one rack of the room: how many were outside, of how many.
    Survey {
        /// The rack.
        rack: String,
        /// Positions outside the rule.
        outside: usize,
        /// Positions.
        positions: usize,
    },
}

/// One guidance comparison.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct GuidanceRow {
    /// Step or survey.
    pub basis: GuidanceBasis,
    /// The rule's phase.
    pub phase: Phase,
    /// The comparison (for a survey, at the position furthest outside, or the brightest).
    pub flag: Flag,
}

/// The pupils used, and why.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PupilUse {
    /// Light-phase (and unphased) steps, the retina section and the limits.
    pub light: Pupil,
    /// Dark-phase steps, when the schedule has any.
    pub dark: Option<Pupil>,
    /// How the dark-phase rule was chosen.
    pub dark_basis: DarkPupilBasis,
}

/// The one assessment structure.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Assessment {
    /// Scenario name.
    pub name: String,
    /// Title.
    pub title: String,
    /// Description.
    pub description: Option<String>,
    /// Species of the subject.
    pub species: Species,
    /// The cautions that apply (after the summary).
    pub cautions: Vec<String>,
    /// Documents used.
    pub provenance: Vec<Provenance>,
    /// The pupils used.
    pub pupils: Option<PupilUse>,
    /// What the eye receives from each source (light-phase pupil).
    pub retina: Option<RetinaReport>,
    /// Corneal spectral irradiance of each source after every filter (for plots), by id; not
    /// serialised.
    #[serde(skip)]
    pub spectra: Vec<(String, Spectrum)>,
    /// What is lit in each step of one cycle.
    pub steps: Vec<StepLight>,
    /// Pigment over the schedule.
    pub bleach: Option<BleachReport>,
    /// Limit checks, per source (its id is each check's `source`) and set.
    pub limits: Vec<LimitsAssessment>,
    /// Guidance comparisons.
    pub guidance: Vec<GuidanceRow>,
    /// The brightest light of each step within the user's targets and the guidance's upper bounds.
    pub brightest: Vec<Brightest>,
    /// Evidence to show beside the guidance.
    pub evidence: Vec<Evidence>,
    /// The holding room's survey.
    pub room: Option<RoomResult>,
    /// What was not assessed, and why.
    pub not_assessed: Vec<String>,
    /// True when a limit is exceeded.
    pub limit_exceeded: bool,
    /// True when a guidance flag is raised.
    pub flag_raised: bool,
}

/// Assesses a resolved scenario.
///
/// # Errors
/// Any error of the chain it runs, naming the scenario file.
pub fn assess(s: &Scenario) -> Result<Assessment> {
    assess_inner(s).map_err(|e| e.in_file(&s.origin, None))
}

/// The light path of each phase: one retina assessment per pupil rule in use.
struct Paths {
    light: Option<RetinaReport>,
    dark: Option<RetinaReport>,
}

impl Paths {
    fn of(s: &Scenario) -> Result<Paths> {
        if s.view.sources.is_empty() {
            return Ok(Paths { light: None, dark: None });
        }
        let light = assess_retina(&s.view)?;
        let needs_dark = s
            .schedule
            .as_ref()
            .is_some_and(|sc| sc.steps.iter().any(|st| st.phase.is_some_and(Phase::is_dark)));
        let dark = if needs_dark && s.dark_pupil != s.view.pupil {
            Some(assess_retina(&s.view_for(Some(Phase::Dark)))?)
        } else {
            None
        };
        Ok(Paths { light: Some(light), dark })
    }

    fn for_phase(&self, phase: Option<Phase>) -> Option<&RetinaReport> {
        match (&self.dark, phase) {
            (Some(d), Some(p)) if p.is_dark() => Some(d),
            _ => self.light.as_ref(),
        }
    }
}

fn assess_inner(s: &Scenario) -> Result<Assessment> {
    let paths = Paths::of(s)?;
    let mut provenance = Vec::new();
    let mut not_assessed = Vec::new();
    let steps = match (&s.schedule, &paths.light) {
        (Some(sc), Some(_)) => {
            sc.steps.iter().map(|st| step_light(s, &paths, sc, st)).collect::<Result<Vec<_>>>()?
        }
        (Some(sc), None) => sc.steps.iter().map(|st| dark_step(s, sc, st)).collect::<Result<Vec<_>>>()?,
        _ => Vec::new(),
    };
    let bleach = match &s.schedule {
        Some(sc) => {
            provenance.push(pigment_provenance(&sc.pigment));
            Some(run_bleach(sc, &steps)?)
        }
        None => None,
    };
    let evidence: Vec<Evidence> = s.guidance.iter().flat_map(|g| g.evidence.clone()).collect();
    let room = s.room.as_ref().map(|r| run_room(s, r, &evidence)).transpose()?;
    let guidance = guidance_rows(s, &steps, room.as_ref(), &mut not_assessed);
    let targets: Vec<_> = s
        .schedule
        .iter()
        .flat_map(|sc| sc.steps.iter().map(|st| (st.targets, pupil_adapts(s, st))))
        .collect();
    let brightest = brightest(&steps, &targets, &s.guidance, &guidance, &mut not_assessed);
    for g in &s.guidance {
        provenance.push(guidance_provenance(g));
    }
    let limits = match &s.limits {
        Some(l) => run_limits(s, l, &mut provenance, &mut not_assessed)?,
        None => Vec::new(),
    };
    if let Some(r) = &paths.light {
        for src in r.sources.iter().filter(|x| x.retinal.is_none()) {
            not_assessed
                .push(format!("{}: retinal quantities (the radiance the eye sees is not known)", src.label));
        }
    }
    let limit_exceeded = limits.iter().any(|l| l.hazards.iter().any(|h| h.verdict == Verdict::Exceeds));
    let flag_raised = guidance.iter().any(|g| g.flag.raised) || room.as_ref().is_some_and(|r| r.flagged > 0);
    Ok(Assessment {
        name: s.name.clone(),
        title: s.title.clone(),
        description: s.description.clone(),
        species: s.species,
        cautions: cautions(s),
        provenance,
        pupils: paths.light.as_ref().map(|l| PupilUse {
            light: l.pupil.clone(),
            dark: paths.dark.as_ref().map_or_else(
                || steps.iter().any(|st| st.phase.is_some_and(Phase::is_dark)).then(|| l.pupil.clone()),
                |d| Some(d.pupil.clone()),
            ),
            dark_basis: s.dark_pupil_basis,
        }),
        spectra: paths.light.as_ref().map_or_else(Vec::new, |r| {
            s.source_ids.iter().cloned().zip(r.sources.iter().map(|x| x.corneal_irradiance.clone())).collect()
        }),
        retina: paths.light,
        steps,
        bleach,
        limits,
        guidance,
        brightest,
        evidence,
        room,
        not_assessed,
        limit_exceeded,
        flag_raised,
    })
}

/// What is lit in one step: sums over the lit sources of the light path of the step's phase.
fn step_light(s: &Scenario, paths: &Paths, sc: &ScheduleSpec, st: &Step) -> Result<StepLight> {
    let own = own_pupil_path(s, st)?;
    let report = match &own {
        Some(r) => r,
        None => paths.for_phase(st.phase).ok_or_else(|| Error::input("no sources"))?,
    };
    let lit: Vec<&SourceAtEye> = match &own {
        Some(r) => r.sources.iter().collect(),
        None => st.on.iter().map(|&i| &report.sources[i]).collect(),
    };
    let mut level = 0.0;
    for (src, &i) in lit.iter().zip(&st.on) {
        level += src.level(sc.pigment.level_unit).ok_or_else(|| {
            Error::input(format!(
                "source '{}' is lit in step '{}' but the radiance the eye sees is not known; give full_field, \
                 subtense, or size and distance",
                s.source_ids[i], st.name
            ))
        })?;
    }
    let at_eye: Vec<Spectrum> = lit.iter().map(|x| x.corneal_irradiance.clone()).collect();
    let room: Vec<Spectrum> = st
        .on
        .iter()
        .map(|&i| at_cornea(&s.view.sources[i], &[]).map(|c| c.irradiance))
        .collect::<Result<_>>()?;
    let sum_lux = |list: &[Spectrum]| -> Result<f64> {
        if list.is_empty() { Ok(0.0) } else { Ok(photopic(&Spectrum::sum(list)?).raw) }
    };
    let human = s.species == Species::Human;
    let (opic, species_opic) = match (at_eye.is_empty(), human) {
        (true, _) => (Vec::new(), Vec::new()),
        (false, true) => (alpha_opic(&Spectrum::sum(&at_eye)?), Vec::new()),
        (false, false) => (Vec::new(), species_alpha_opic(&Spectrum::sum(&at_eye)?, &s.view.eye)),
    };
    let melanopic = human.then(|| {
        opic.iter().find(|a| a.name == "melanopic").and_then(|a| a.edi).map_or(0.0, |e| e.si_value())
    });
    let rod: Option<f64> = lit.iter().map(|x| x.level(LevelUnit::IsomerisationsPerSecond)).sum();
    Ok(StepLight {
        name: st.name.clone(),
        phase: st.phase,
        duration: st.duration,
        on: st.on.iter().map(|&i| s.source_ids[i].clone()).collect(),
        pupil: report.pupil.clone(),
        room_illuminance: Illuminance::new::<lux>(sum_lux(&room)?),
        illuminance: Illuminance::new::<lux>(sum_lux(&at_eye)?),
        melanopic_edi: melanopic.map(Illuminance::new::<lux>),
        alpha_opic: opic,
        species_opic,
        rod_rate: rod.map(Frequency::new::<hertz>),
        level,
    })
}

/// Whether the pupil of a step follows a formula of the light (it opens as the light dims), so
/// that its retinal light is not proportional to a factor on its sources.
pub fn pupil_adapts(s: &Scenario, st: &Step) -> bool {
    use crate::retina::pupil::PupilRule;
    matches!(
        s.view_for(st.phase).pupil,
        PupilRule::WatsonYellott | PupilRule::DeGrootGebhard | PupilRule::MoonSpencer
    )
}

/// A pupil formula adapts to the light: a step whose phase uses one gets its own light path,
/// with only its lit sources (in the order of `st.on`), so unrelated sources do not set its pupil.
fn own_pupil_path(s: &Scenario, st: &Step) -> Result<Option<RetinaReport>> {
    use crate::retina::pupil::PupilRule;
    let view = s.view_for(st.phase);
    let formula =
        matches!(view.pupil, PupilRule::WatsonYellott | PupilRule::DeGrootGebhard | PupilRule::MoonSpencer);
    if !formula || st.on.is_empty() {
        return Ok(None);
    }
    let sources = st.on.iter().map(|&i| view.sources[i].clone()).collect();
    Ok(Some(assess_retina(&RetinaScenario { sources, ..view })?))
}

/// A step of a scenario without sources: darkness.
fn dark_step(s: &Scenario, _sc: &ScheduleSpec, st: &Step) -> Result<StepLight> {
    let pupil = crate::retina::pupil::choose(
        &s.view.eye,
        if st.phase.is_some_and(Phase::is_dark) { s.dark_pupil } else { s.view.pupil },
        &crate::retina::pupil::Adaptation {
            luminance: None,
            field: None,
            age: s.view.age,
            eyes: s.view.eyes,
        },
    )?;
    Ok(StepLight {
        name: st.name.clone(),
        phase: st.phase,
        duration: st.duration,
        on: Vec::new(),
        pupil,
        room_illuminance: Illuminance::new::<lux>(0.0),
        illuminance: Illuminance::new::<lux>(0.0),
        melanopic_edi: (s.species == Species::Human).then(|| Illuminance::new::<lux>(0.0)),
        alpha_opic: Vec::new(),
        species_opic: Vec::new(),
        rod_rate: Some(Frequency::new::<hertz>(0.0)),
        level: 0.0,
    })
}

fn run_bleach(sc: &ScheduleSpec, steps: &[StepLight]) -> Result<BleachReport> {
    course(sc, steps).report(None, Some(240))
}

/// The pigment course of a schedule from its step lights: the one computation behind the
/// assessment's pigment section and the solves and sweeps of `retidose bleach --scenario`.
pub fn course(sc: &ScheduleSpec, steps: &[StepLight]) -> Course {
    Course {
        pigment: sc.pigment.clone(),
        model: sc.model,
        steps: steps
            .iter()
            .map(|st| CourseStep { name: st.name.clone(), duration: st.duration, level: st.level })
            .collect(),
        repeat: sc.repeat,
        start: 0.0,
    }
}

fn pigment_provenance(pigment: &Pigment) -> Provenance {
    Provenance {
        role: format!("pigment kinetics ({})", pigment.id),
        document: "src/data/pigments.toml (Rushton 1961; Lamb & Pugh 2004; Cameron, Mahroo & Lamb 2006; others per value)".into(),
        edition: "as listed per parameter".into(),
        status: if pigment.from_memory().is_empty() {
            "confirmed or derived".into()
        } else {
            format!("from memory: {}", pigment.from_memory().join(", "))
        },
    }
}

fn guidance_provenance(g: &GuidanceSet) -> Provenance {
    Provenance {
        role: format!("guidance ({})", g.refers_to),
        document: g.document.clone(),
        edition: g.edition.clone(),
        status: g.rule.iter().map(|r| format!("{}: {}", r.name, r.status)).collect::<Vec<_>>().join("; "),
    }
}

fn applies(rule: &Rule, s: &Scenario) -> bool {
    match rule.applies_to {
        AppliesTo::Human => s.species == Species::Human,
        AppliesTo::All => s.species != Species::Human,
        AppliesTo::Albino => s.species != Species::Human && s.pigmentation == Some(Pigmentation::Albino),
    }
}

/// The value a rule compares in a step: housing rules take the room light before the filters
/// (the Guide's "room at cage level"), people's rules the light at the eye after them.
fn step_value(rule: &Rule, st: &StepLight) -> f64 {
    match (rule.quantity, rule.applies_to) {
        (GuidanceQuantity::MelanopicEdi, _) => st.melanopic_edi.map_or(0.0, |e| e.get::<lux>()),
        (GuidanceQuantity::Illuminance, AppliesTo::Human) => st.illuminance.get::<lux>(),
        (GuidanceQuantity::Illuminance, _) => st.room_illuminance.get::<lux>(),
    }
}

/// Every step is compared with the rules of its phase; with a survey, housing illuminance rules
/// are compared at every cage position instead of at the scenario's nominal sources, so the
/// table and the survey agree. A rule whose phase no step has is reported as not assessed.
fn guidance_rows(
    s: &Scenario,
    steps: &[StepLight],
    room: Option<&RoomResult>,
    not_assessed: &mut Vec<String>,
) -> Vec<GuidanceRow> {
    let mut rows = Vec::new();
    for g in &s.guidance {
        for r in g.rule.iter().filter(|r| applies(r, s)) {
            let housing = r.quantity == GuidanceQuantity::Illuminance && r.applies_to != AppliesTo::Human;
            if let (true, Some(room)) = (housing, room) {
                rows.extend(room_rows(g, r, room));
                if r.phase == Phase::Light {
                    continue;
                }
            }
            let matching: Vec<&StepLight> = steps.iter().filter(|st| st.phase == Some(r.phase)).collect();
            for st in &matching {
                rows.push(GuidanceRow {
                    basis: GuidanceBasis::Step(st.name.clone()),
                    phase: r.phase,
                    flag: r.check(&g.id, step_value(r, st)),
                });
            }
            if matching.is_empty() && !(housing && room.is_some()) {
                not_assessed.push(format!(
                    "guidance {} / {}: no schedule step has phase = \"{}\"; give each step a phase",
                    g.id,
                    r.id,
                    r.phase.name()
                ));
            }
        }
    }
    let unphased: Vec<&str> =
        steps.iter().filter(|st| st.phase.is_none()).map(|st| st.name.as_str()).collect();
    if !s.guidance.is_empty() && !unphased.is_empty() {
        not_assessed.push(format!(
            "guidance: steps without a phase are not compared with any rule: {}",
            unphased.join(", ")
        ));
    }
    if !s.guidance.is_empty() && s.schedule.is_none() && room.is_none() {
        not_assessed.push("guidance: no schedule, so no phase to compare".to_string());
    }
    rows
}

/// One row per rack whose animals the rule applies to: how many positions are outside and the
/// value furthest outside.
fn room_rows(g: &GuidanceSet, r: &Rule, room: &RoomResult) -> Vec<GuidanceRow> {
    let mut out = Vec::new();
    for rack in &room.racks {
        let b = rack.bounds;
        let mine = |x: Option<crate::housing::pass::Bound>| x.is_some_and(|x| g.rule[x.rule].id == r.id);
        let sm = &rack.summary;
        let (outside, value) = if mine(b.lower) && r.phase == Phase::Light && r.max_lx.is_none() {
            (sm.below, sm.room_lux.min)
        } else if mine(b.upper) && r.phase == Phase::Light {
            (sm.above, sm.room_lux.max)
        } else if mine(b.dark) && r.phase.is_dark() {
            let event = sm.events.iter().map(|e| e.room_lux.max).fold(0.0, f64::max);
            (sm.dark_flagged, sm.leak_lux.max + event)
        } else {
            continue;
        };
        out.push(GuidanceRow {
            basis: GuidanceBasis::Survey { rack: rack.id.clone(), outside, positions: sm.positions },
            phase: r.phase,
            flag: r.check(&g.id, value),
        });
    }
    out
}

fn run_limits(
    s: &Scenario,
    l: &LimitsSpec,
    provenance: &mut Vec<Provenance>,
    not_assessed: &mut Vec<String>,
) -> Result<Vec<LimitsAssessment>> {
    if s.species != Species::Human {
        not_assessed.push(
            "exposure limits: the limits are for humans; they are evaluated for the light as placed, not for the animals"
                .to_string(),
        );
    }
    let mut out = Vec::new();
    for set in &l.sets {
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
        for &i in &l.sources {
            let id = &s.source_ids[i];
            let r = assess_limits(&LimitsRequest {
                source: &s.view.sources[i],
                filters: &s.view.filters,
                set,
                duration: l.duration,
                aphakic: l.aphakic,
                classify: l.classify.then_some(l.general_lighting),
                only: &[],
            })?;
            for h in &r.hazards {
                if let Verdict::NotAssessed(why) = &h.verdict {
                    not_assessed.push(format!("{id} / {} / {}: {why}", set.id, h.name));
                }
            }
            out.push(r);
        }
    }
    Ok(out)
}

/// Runs the housing survey of a scenario: per-lux factors through the same light path as the
/// sources (the subject's eye, the cage wall as a filter, the pupil of each phase).
///
/// # Errors
/// As the survey and the retina chain.
fn run_room(s: &Scenario, room: &crate::housing::room::Room, evidence: &[Evidence]) -> Result<RoomResult> {
    let eyes = |rack: &Rack| -> Result<(RetinaScenario, RetinaScenario)> {
        let mut light = if rack.animals.species == s.species {
            RetinaScenario { sources: Vec::new(), filters: Vec::new(), ..s.view.clone() }
        } else {
            bare_view(rack.animals.species)
        };
        light.pupil = rack.light_pupil;
        let dark = RetinaScenario { pupil: rack.dark_pupil, ..light.clone() };
        Ok((light, dark))
    };
    assess_room(room.clone(), &s.guidance, evidence, &eyes).map_err(|e| e.in_file(&s.origin, None))
}

/// The built-in eye of `species` with no sources, filters or pupil formula inputs.
fn bare_view(species: Species) -> RetinaScenario {
    RetinaScenario {
        eye: crate::retina::eye::builtin_eye(species).clone(),
        sources: Vec::new(),
        filters: Vec::new(),
        pupil: crate::retina::pupil::PupilRule::LightAdapted,
        age: None,
        eyes: 2,
        field: None,
        adapting_luminance: None,
        albino_iris: false,
    }
}
