//! A room survey: the plan (per-lux figures per rack, the guidance bounds, the calibration),
//! the per-rack summaries and levers, and the dark-phase evidence compared where it is like
//! for like. The per-position rows are streamed from the plan by [`super::summary::stream`].

use crate::base::error::{Error, Result};
use crate::base::quantity::SiValue;
use crate::cornea::PlacedSource;
use crate::cornea::geometry::{Field, Geometry};
use crate::housing::calibrate::{Fit, fit};
use crate::housing::guidance::{AppliesTo, GuidanceQuantity, GuidanceSet};
use crate::housing::lever::{Lever, lever};
use crate::housing::pass::{Bound, PerLux, Plan, RackBounds, RackPlan};
use crate::housing::room::{Animals, Calibration, Rack, Room};
use crate::housing::summary::{RackSummary, summarise};
use crate::pigment::kinetics::LevelUnit;
use crate::retina::eye::Species;
use crate::retina::report::{RetinaScenario, assess_retina};
use crate::scenario::{Phase, Pigmentation};
use crate::spectrum::Spectrum;
use crate::spectrum::scale::{ScaleTarget, scale_to};
use uom::si::f64::{Illuminance, LuminousIntensity, Time};
use uom::si::illuminance::lux as lx;
use uom::si::luminous_intensity::candela;
use uom::si::time::second;

/// Computes [`PerLux`] for light of `spectrum`'s shape at 1 lx of room light, seen full-field
/// by the eye of `view` (its pupil rule; no filters), times the cage wall's `transmittance`:
/// the same light path as every other source, so a position at N lx gets exactly N times these.
///
/// # Errors
/// As the retina chain.
pub fn per_lux(view: &RetinaScenario, spectrum: &Spectrum, transmittance: f64) -> Result<PerLux> {
    let one_lux = scale_to(spectrum, ScaleTarget::Illuminance(Illuminance::new::<lx>(1.0)))?;
    let source = PlacedSource {
        spectrum: one_lux,
        geometry: Geometry::AtEye { field: Some(Field::FullField) },
        size: None,
        distance: None,
        assumption: None,
    };
    let scenario = RetinaScenario { sources: vec![source], filters: Vec::new(), ..view.clone() };
    let report = assess_retina(&scenario)?;
    let rod_rate = report.sources[0]
        .level(LevelUnit::IsomerisationsPerSecond)
        .ok_or_else(|| Error::input("the eye model has no rod"))?;
    let mut opic = [0.0; 4];
    for (i, ch) in ["rod", "m-cone", "uv-cone", "melanopsin"].iter().enumerate() {
        opic[i] = report
            .species_opic
            .iter()
            .find(|c| c.channel == *ch)
            .map(|c| c.photon_irradiance.si())
            .unwrap_or(f64::NAN);
    }
    Ok(PerLux { rod_rate: rod_rate * transmittance, opic: opic.map(|v| v * transmittance) })
}

/// The eyes a rack's animals look through: (light phase, dark phase).
pub type Eyes<'a> = dyn Fn(&Rack) -> Result<(RetinaScenario, RetinaScenario)> + 'a;

/// Per-lux figures at 1 lx with no cage wall, cached by (species, pupil rules).
type Cache = Vec<((Species, String), Vec<PerLux>)>;

fn unit_factors(room: &Room, rack: &Rack, eyes: &Eyes<'_>, cache: &mut Cache) -> Result<Vec<PerLux>> {
    let key = (rack.animals.species, format!("{:?}/{:?}", rack.light_pupil, rack.dark_pupil));
    if let Some((_, v)) = cache.iter().find(|(k, _)| *k == key) {
        return Ok(v.clone());
    }
    let (light, dark) = eyes(rack)?;
    let mut v = vec![per_lux(&light, &room.light_spectrum, 1.0)?, per_lux(&dark, &room.leak_spectrum, 1.0)?];
    for e in &room.events {
        v.push(per_lux(&dark, &e.spectrum, 1.0).map_err(|x| x.key("spectrum").key("event"))?);
    }
    cache.push((key, v.clone()));
    Ok(v)
}

/// The guidance bounds for `animals` from `sets`: the strictest lower and upper light-phase
/// bounds and the dark-phase bound (housing illuminance rules only).
pub fn bounds(animals: Animals, sets: &[&GuidanceSet]) -> RackBounds {
    let mut b = RackBounds::default();
    for (si, g) in sets.iter().enumerate() {
        for (ri, r) in g.rule.iter().enumerate() {
            let applies = match r.applies_to {
                AppliesTo::All => true,
                AppliesTo::Albino => animals.pigmentation == Pigmentation::Albino,
                AppliesTo::Human => false,
            };
            if !applies || r.quantity != GuidanceQuantity::Illuminance {
                continue;
            }
            let at = |v: f64| Some(Bound { set: si, rule: ri, lx: v });
            match r.phase {
                Phase::Light => {
                    if let Some(v) = r.min_lx.filter(|v| b.lower.is_none_or(|x| *v > x.lx)) {
                        b.lower = at(v);
                    }
                    if let Some(v) = r.max_lx.filter(|v| b.upper.is_none_or(|x| *v < x.lx)) {
                        b.upper = at(v);
                    }
                }
                Phase::Dark => {
                    if let Some(v) = r.max_lx.filter(|v| b.dark.is_none_or(|x| *v < x.lx)) {
                        b.dark = at(v);
                    }
                }
                _ => {}
            }
        }
    }
    b
}

/// Builds the plan of `room`: per-rack factors (each species' eye once), bounds, calibration.
///
/// # Errors
/// The retina chain's errors; a calibration the readings cannot determine.
pub fn plan(
    room: std::sync::Arc<Room>,
    sets: &[&GuidanceSet],
    eyes: &Eyes<'_>,
) -> Result<(Plan, Option<Fit>)> {
    room.check()?;
    let mut cache = Cache::new();
    let mut racks = Vec::with_capacity(room.racks.len());
    let mut offset = 0;
    for (i, r) in room.racks.iter().enumerate() {
        let at = |e: Error| e.key(&format!("rack[{i}]")).key("room");
        let unit = unit_factors(&room, r, eyes, &mut cache).map_err(at)?;
        let t = r.cage_transmittance;
        let scale = |p: &PerLux| PerLux { rod_rate: p.rod_rate * t, opic: p.opic.map(|v| v * t) };
        let top = r.top_shelf();
        racks.push(RackPlan {
            offset,
            len: r.len(),
            shade: (1..=top).map(|s| r.shelf_shading.powi((top - s) as i32)).collect(),
            light: scale(&unit[0]),
            leak: scale(&unit[1]),
            events: unit[2..].iter().map(scale).collect(),
            cage_transmittance: t,
            k_per_rate: r.pigment.rate_of_level(1.0),
            constants: r.pigment.constants(),
            bounds: bounds(r.animals, sets),
        });
        offset += r.len();
    }
    let mut order: Vec<usize> = (0..room.events.len()).collect();
    order.sort_by(|a, b| room.events[*a].start_s.total_cmp(&room.events[*b].start_s));
    let mut p = Plan { room, racks, scales: None, event_order: order };
    let fitted = calibration(&p)?;
    p.scales = fitted.as_ref().filter(|f| f.mode != Calibration::None).map(|f| f.scales.clone());
    Ok((p, fitted))
}

/// Fits the luminaires to the readings, when the room has both and asks for it.
fn calibration(p: &Plan) -> Result<Option<Fit>> {
    let (Some(readings), false) = (&p.room.readings, p.room.luminaires.is_empty()) else { return Ok(None) };
    let mut rows = Vec::with_capacity(readings.count);
    let mut y = Vec::with_capacity(readings.count);
    for (r, rp) in p.room.racks.iter().zip(&p.racks) {
        for local in 0..rp.len {
            let Some(v) = readings.at(rp.offset + local) else { continue };
            let Some([x, yy, z]) = r.coordinates(local) else { continue };
            let shade = rp.shade[r.shelf_column(local).0 as usize - 1];
            rows.push(
                p.room.luminaires.iter().map(|l| l.intensity_cd * l.lux_per_cd(x, yy, z) * shade).collect(),
            );
            y.push(v);
        }
    }
    if y.is_empty() {
        return Ok(None);
    }
    fit(p.room.calibration, &rows, &y).map(Some).map_err(|e| e.key("calibrate").key("room"))
}

/// The brightest light of a dark-phase event that keeps the rod R*/rod/s of every position of a
/// rack, with the leak, at or below the event's target. The rod rate is linear in the event's
/// light: at factor s it is leak_i + s·k·E_i (k the rack's rod rate per lux of that light, E_i
/// the event's lux at position i), so s = (T − max leak) / (k · max E). That is exact for an
/// event and a leak that are the same at every cage, and on the safe side (never brighter than
/// allowed) when they vary.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Safelight {
    /// The target.
    pub target: uom::si::f64::Frequency,
    /// The factor on the event's light as written (its lux, or its lamp's intensity).
    pub scale: f64,
    /// The highest room illuminance at cage level at that factor, lx.
    pub brightest_lux: f64,
    /// The leak alone reaches the target: no event light fits.
    pub leak_exceeds: bool,
}

/// The safelight solve of each event of `room` for a rack with `summary` and `per_lux`
/// (light, leak, each event).
fn safelights(room: &Room, summary: &RackSummary, per_lux: &[PerLux]) -> Vec<Option<Safelight>> {
    room.events
        .iter()
        .enumerate()
        .map(|(e, ev)| {
            let target = ev.rod_target?;
            let t = target.si();
            let headroom = t - summary.leak_rod_rate.max;
            let per_scale = per_lux[2 + e].rod_rate * summary.events[e].room_lux.max;
            let scale = if headroom <= 0.0 {
                0.0
            } else if per_scale > 0.0 {
                headroom / per_scale
            } else {
                f64::INFINITY
            };
            Some(Safelight {
                target,
                scale,
                brightest_lux: scale * summary.events[e].room_lux.max,
                leak_exceeds: headroom <= 0.0,
            })
        })
        .collect()
}

/// A piece of dark-phase evidence set beside one rack.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct EvidenceComparison {
    /// Index into the assessment's evidence list.
    pub evidence: usize,
    /// Its species, if it names one.
    pub species: Option<Species>,
    /// The rack's darkest-phase light against the evidence, in the evidence's own terms (lux at
    /// cage level): (highest leak ÷ evidence lux, each event's highest lux ÷ evidence lux).
    pub ratios: Option<(f64, Vec<f64>)>,
    /// Why there is no comparison.
    pub not_compared: Option<NotCompared>,
}

/// Why a piece of evidence is not compared with a rack.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum NotCompared {
    /// It was found in another species.
    OtherSpecies,
    /// It gives no illuminance to compare.
    NoFigure,
}

/// One rack's outcome.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct RackResult {
    /// Rack id.
    pub id: String,
    /// Its animals.
    pub animals: Animals,
    /// Shelves (highest shelf number) and columns.
    pub shelves: u32,
    /// Columns.
    pub columns: u32,
    /// The guidance bounds that apply.
    pub bounds: RackBounds,
    /// Per-lux figures: light phase, leak, each event (through the cage wall).
    pub per_lux: Vec<PerLux>,
    /// Figures over its positions.
    pub summary: RackSummary,
    /// The dimming lever, when a guidance range applies.
    pub lever: Option<Lever>,
    /// Per event (the room's order), the brightest light within its rod target, when it has one.
    pub safelights: Vec<Option<Safelight>>,
    /// Dark-phase evidence beside it.
    pub evidence: Vec<EvidenceComparison>,
}

/// Runs the summary pass and the levers of `plan`.
pub fn rack_results(plan: &Plan, evidence: &[crate::housing::guidance::Evidence]) -> Vec<RackResult> {
    use rayon::prelude::*;
    let sums = summarise(plan);
    plan.room
        .racks
        .par_iter()
        .zip(&plan.racks)
        .zip(sums)
        .map(|((r, rp), (summary, data))| RackResult {
            id: r.id.clone(),
            animals: r.animals,
            shelves: r.top_shelf(),
            columns: r.last_column(),
            bounds: rp.bounds,
            per_lux: [rp.light, rp.leak].into_iter().chain(rp.events.iter().copied()).collect(),
            lever: lever(&rp.bounds, data),
            safelights: safelights(
                &plan.room,
                &summary,
                &[rp.light, rp.leak].into_iter().chain(rp.events.iter().copied()).collect::<Vec<_>>(),
            ),
            evidence: compare_evidence(r.animals.species, &summary, evidence),
            summary,
        })
        .collect()
}

fn compare_evidence(
    species: Species,
    s: &RackSummary,
    evidence: &[crate::housing::guidance::Evidence],
) -> Vec<EvidenceComparison> {
    evidence
        .iter()
        .enumerate()
        .filter(|(_, e)| e.lux.is_some() || e.species.is_some())
        .map(|(k, e)| {
            let mut c =
                EvidenceComparison { evidence: k, species: e.species, ratios: None, not_compared: None };
            match (e.species, e.lux) {
                (Some(sp), _) if sp != species => c.not_compared = Some(NotCompared::OtherSpecies),
                (_, None) => c.not_compared = Some(NotCompared::NoFigure),
                (_, Some(lux)) => {
                    c.ratios =
                        Some((s.leak_lux.max / lux, s.events.iter().map(|x| x.room_lux.max / lux).collect()))
                }
            }
            c
        })
        .collect()
}

/// A room's outcome: per rack, the calibration, and the plan that streams the rows.
#[derive(Debug, Clone, serde::Serialize)]
pub struct RoomResult {
    /// Positions over all racks.
    pub positions: usize,
    /// Positions with any flag.
    pub flagged: usize,
    /// The light–dark cycle.
    pub cycle: Cycle,
    /// The luminaires as written and their fitted scales.
    pub luminaires: Vec<LuminaireUse>,
    /// The dark-phase events.
    pub events: Vec<EventUse>,
    /// The readings file and how many positions it gives.
    pub readings: Option<ReadingsUse>,
    /// The fit of the model to the readings.
    pub fit: Option<Fit>,
    /// Per rack.
    pub racks: Vec<RackResult>,
    /// Every position, streamed when serialised.
    pub rows: Rows,
}

/// The light–dark cycle of a room.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Cycle {
    /// Light phase.
    pub light: Time,
    /// Dark phase.
    pub dark: Time,
    /// Days run.
    pub days: u32,
}

/// A luminaire as written, and the scale the calibration gave it (1 without one).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LuminaireUse {
    /// Its id.
    pub id: String,
    /// Peak intensity as written.
    pub intensity: LuminousIntensity,
    /// Fitted scale.
    pub scale: f64,
}

/// A dark-phase event, every night.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct EventUse {
    /// Its name.
    pub name: String,
    /// Start after lights-off.
    pub start: Time,
    /// Duration.
    pub duration: Time,
}

/// The readings used.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ReadingsUse {
    /// The file.
    pub file: String,
    /// Positions with a reading.
    pub positions: usize,
}

/// The per-position rows of a room, computed when they are serialised (never held).
#[derive(Debug, Clone)]
pub struct Rows(pub std::sync::Arc<Plan>);

impl serde::Serialize for Rows {
    fn serialize<S: serde::Serializer>(&self, ser: S) -> std::result::Result<S::Ok, S::Error> {
        use serde::ser::SerializeSeq;
        #[derive(serde::Serialize)]
        struct Row<'a> {
            #[serde(flatten)]
            row: &'a crate::housing::pass::PositionRow,
            events: &'a [crate::housing::pass::EventAt],
        }
        let n = self.0.room.events.len();
        let mut seq = ser.serialize_seq(Some(self.0.len()))?;
        crate::housing::summary::stream(&self.0, |rows| {
            rows.iter().try_for_each(|r| seq.serialize_element(&Row { row: r, events: &r.events[..n] }))
        })?;
        seq.end()
    }
}

/// Surveys `room`: the plan, every rack's figures and lever, the evidence beside each rack.
///
/// # Errors
/// As [`plan`].
pub fn assess_room(
    room: Room,
    sets: &[&GuidanceSet],
    evidence: &[crate::housing::guidance::Evidence],
    eyes: &Eyes<'_>,
) -> Result<RoomResult> {
    let room = std::sync::Arc::new(room);
    let (plan, fit) = plan(room.clone(), sets, eyes)?;
    let racks = rack_results(&plan, evidence);
    Ok(RoomResult {
        positions: plan.len(),
        flagged: racks.iter().map(|r| r.summary.flagged).sum(),
        cycle: Cycle {
            light: Time::new::<second>(room.light_s),
            dark: Time::new::<second>(room.dark_s),
            days: room.days,
        },
        luminaires: room
            .luminaires
            .iter()
            .enumerate()
            .map(|(j, l)| LuminaireUse {
                id: l.id.clone(),
                intensity: LuminousIntensity::new::<candela>(l.intensity_cd),
                scale: plan.scales.as_ref().map_or(1.0, |s| s[j]),
            })
            .collect(),
        events: room
            .events
            .iter()
            .map(|e| EventUse {
                name: e.name.clone(),
                start: Time::new::<second>(e.start_s),
                duration: Time::new::<second>(e.duration_s),
            })
            .collect(),
        readings: room.readings.as_ref().map(|r| ReadingsUse { file: r.origin.clone(), positions: r.count }),
        fit,
        racks,
        rows: Rows(std::sync::Arc::new(plan)),
    })
}
