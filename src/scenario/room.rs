//! The `[room]` table of a scenario: luminaires, racks, readings, the cycle and dark-phase
//! events, resolved into a [`Room`].

use std::path::Path;

use serde::Deserialize;

use crate::base::error::{Error, Result};
use crate::base::quantity::SiValue;
use crate::base::units::{
    parse_illuminance, parse_length, parse_luminous_intensity, parse_number, parse_time,
};
use crate::housing::readings::read_readings;
use crate::housing::room::{
    Animals, Calibration, DarkEvent, EventLight, Grid, GridPlace, Layout, Luminaire, Rack, Room, Spot,
};
use crate::pigment::kinetics::{Model, find_pigment};
use crate::retina::eye::Species;
use crate::retina::pupil::PupilRule;
use crate::scenario::Pigmentation;
use crate::scenario::retina::resolve_spectrum;

/// `[room]` as written.
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawRoom {
    light_spectrum: String,
    leak_spectrum: Option<String>,
    leak: Option<String>,
    light_phase: Option<String>,
    dark_phase: Option<String>,
    days: Option<u32>,
    readings: Option<String>,
    calibrate: Option<String>,
    #[serde(default)]
    luminaire: Vec<RawLuminaire>,
    #[serde(default)]
    rack: Vec<RawRack>,
    #[serde(default)]
    event: Vec<RawEvent>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLuminaire {
    id: Option<String>,
    x: String,
    y: String,
    z: String,
    intensity: String,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRack {
    id: String,
    species: Option<String>,
    pigmentation: Option<String>,
    shelves: Option<toml::Value>,
    columns: Option<toml::Value>,
    first_column_x: Option<String>,
    column_spacing: Option<String>,
    rack_y: Option<String>,
    bottom_shelf: Option<String>,
    shelf_spacing: Option<String>,
    cage_transmittance: String,
    shelf_shading: Option<String>,
    pupil: Option<String>,
    dark_pupil: Option<String>,
    #[serde(default)]
    position: Vec<RawSpot>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSpot {
    shelf: toml::Value,
    column: toml::Value,
    x: Option<String>,
    y: Option<String>,
    z: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawEvent {
    name: String,
    spectrum: String,
    lux: Option<String>,
    luminaire: Option<RawLuminaire>,
    start: String,
    duration: String,
    rod_target: Option<String>,
}

/// What the rest of the scenario tells the room: the subject and the schedule's phases.
pub struct Context<'a> {
    /// The subject's species and pigmentation (the default for racks).
    pub subject: (Species, Option<Pigmentation>),
    /// The subject's pupil rules (light, dark), used for racks of the subject's species.
    pub pupils: (PupilRule, PupilRule),
    /// Light- and dark-phase time per cycle and the cycles, from `[schedule]`, if it has phases.
    pub schedule: Option<(f64, f64, u32)>,
    /// The pigment model.
    pub model: Model,
    /// Folder relative files are read from.
    pub base: Option<&'a Path>,
}

/// Resolves `[room]`.
///
/// # Errors
/// Errors naming the key (`room.rack[1].shelves`, …) and saying what would be right.
pub fn resolve_room(raw: RawRoom, cx: &Context<'_>) -> Result<Room> {
    let luminaires = raw
        .luminaire
        .iter()
        .enumerate()
        .map(|(i, l)| luminaire(l, i).map_err(|e| e.key(&format!("luminaire[{i}]"))))
        .collect::<Result<Vec<_>>>()?;
    let needs_place = !luminaires.is_empty() || raw.event.iter().any(|e| e.luminaire.is_some());
    if raw.rack.is_empty() {
        return Err(Error::input("a room needs at least one [[room.rack]]").key("rack"));
    }
    let mut racks = Vec::with_capacity(raw.rack.len());
    for (i, r) in raw.rack.iter().enumerate() {
        let rack = rack(r, cx, needs_place).map_err(|e| e.key(&format!("rack[{i}]")))?;
        if racks.iter().any(|x: &Rack| x.id == rack.id) {
            return Err(Error::input(format!("rack id '{}' is used twice", rack.id))
                .key("id")
                .key(&format!("rack[{i}]")));
        }
        racks.push(rack);
    }
    let (light_s, dark_s, days) = cycle(&raw, cx)?;
    let readings = match &raw.readings {
        Some(f) => Some(read_file(f, cx.base, &racks).map_err(|e| e.key("readings"))?),
        None => None,
    };
    if luminaires.is_empty() {
        check_covered(readings.as_ref(), &racks)?;
    }
    let calibration = calibration(raw.calibrate.as_deref(), readings.is_some(), luminaires.is_empty())?;
    let light_spectrum =
        resolve_spectrum(&raw.light_spectrum, cx.base).map_err(|e| e.key("light_spectrum"))?;
    let leak_spectrum = match &raw.leak_spectrum {
        Some(d) => resolve_spectrum(d, cx.base).map_err(|e| e.key("leak_spectrum"))?,
        None => light_spectrum.clone(),
    };
    let events = raw
        .event
        .iter()
        .enumerate()
        .map(|(i, e)| event(e, cx.base, i).map_err(|x| x.key(&format!("event[{i}]"))))
        .collect::<Result<Vec<_>>>()?;
    let room = Room {
        luminaires,
        racks,
        light_spectrum,
        leak_spectrum,
        leak_lux: raw.leak.as_deref().map(|t| lux(t, "leak")).transpose()?.unwrap_or(0.0),
        light_s,
        dark_s,
        days,
        events,
        readings,
        calibration,
        model: cx.model,
    };
    room.check()?;
    Ok(room)
}

fn lux(text: &str, key: &str) -> Result<f64> {
    let v = parse_illuminance(text).map_err(|e| e.key(key))?.si();
    if !(v >= 0.0 && v.is_finite()) {
        return Err(Error::input(format!("{v} lx: give a finite illuminance ≥ 0 lx")).key(key));
    }
    Ok(v)
}

fn positive_time(text: &str, key: &str, zero_ok: bool) -> Result<f64> {
    let v = parse_time(text).map_err(|e| e.key(key))?.si();
    if !(v.is_finite() && (v > 0.0 || (zero_ok && v == 0.0))) {
        return Err(Error::input(format!("{v} s: give a finite time above 0 s")).key(key));
    }
    Ok(v)
}

fn cycle(raw: &RawRoom, cx: &Context<'_>) -> Result<(f64, f64, u32)> {
    let given = (raw.light_phase.as_deref(), raw.dark_phase.as_deref());
    let (light, dark) = match (given, cx.schedule) {
        ((Some(l), Some(d)), _) => {
            (positive_time(l, "light_phase", false)?, positive_time(d, "dark_phase", false)?)
        }
        ((None, None), Some((l, d, _))) if l > 0.0 && d > 0.0 => (l, d),
        _ => {
            return Err(Error::input(
                "give light_phase and dark_phase (\"12 h\", \"12 h\"), or a [schedule] whose steps have \
                 phase = \"light\" and \"dark\"",
            )
            .key("light_phase"));
        }
    };
    let days = raw.days.or(cx.schedule.map(|s| s.2)).unwrap_or(1);
    if days == 0 || f64::from(days) * (light + dark) > 100.0 * 365.25 * 86_400.0 {
        return Err(Error::input(format!("{days} days: give at least 1, and at most 100 years of cycles"))
            .key("days"));
    }
    Ok((light, dark, days))
}

fn calibration(text: Option<&str>, readings: bool, no_luminaires: bool) -> Result<Calibration> {
    let c = match text.map(|t| t.trim().to_ascii_lowercase()) {
        None => return Ok(Calibration::None),
        Some(t) if t == "none" => Calibration::None,
        Some(t) if t == "one-scale" => Calibration::OneScale,
        Some(t) if t == "per-luminaire" => Calibration::PerLuminaire,
        Some(t) => {
            return Err(Error::input(format!(
                "'{t}' is not a calibration; expected none, one-scale or per-luminaire"
            ))
            .key("calibrate"));
        }
    };
    if c != Calibration::None && (!readings || no_luminaires) {
        return Err(Error::input("calibrating needs both [[room.luminaire]] tables and a readings file")
            .key("calibrate"));
    }
    Ok(c)
}

fn luminaire(l: &RawLuminaire, i: usize) -> Result<Luminaire> {
    let len = |t: &str, k: &str| parse_length(t).map(|l| l.si()).map_err(|e| e.key(k));
    let intensity_cd = parse_luminous_intensity(&l.intensity).map_err(|e| e.key("intensity"))?.si();
    if !(intensity_cd >= 0.0 && intensity_cd.is_finite()) {
        return Err(
            Error::input(format!("{intensity_cd} cd: give a finite intensity ≥ 0 cd")).key("intensity")
        );
    }
    Ok(Luminaire {
        id: l.id.clone().unwrap_or_else(|| format!("luminaire {}", i + 1)),
        x_m: len(&l.x, "x")?,
        y_m: len(&l.y, "y")?,
        z_m: len(&l.z, "z")?,
        intensity_cd,
    })
}

/// A shelf or column number: a whole number from 1 (TOML integer, or a float with no fraction).
fn whole(v: &toml::Value, key: &str) -> Result<u32> {
    let n = match v {
        toml::Value::Integer(i) => *i as f64,
        toml::Value::Float(f) => *f,
        _ => f64::NAN,
    };
    if n.fract() != 0.0 || !(1.0..=1e7).contains(&n) {
        return Err(
            Error::input(format!("{v} is not a {key} count or number: give a whole number from 1")).key(key)
        );
    }
    Ok(n as u32)
}

fn rack(r: &RawRack, cx: &Context<'_>, needs_place: bool) -> Result<Rack> {
    let species = match &r.species {
        Some(s) => Species::parse(s).map_err(|e| e.key("species"))?,
        None => cx.subject.0,
    };
    if species == Species::Human {
        return Err(Error::input("a rack houses mice or rats").key("species"));
    }
    let pigmentation = match (&r.pigmentation, species == cx.subject.0) {
        (Some(p), _) => Pigmentation::parse(p).map_err(|e| e.key("pigmentation"))?,
        (None, true) if cx.subject.1.is_some() => cx.subject.1.unwrap_or(Pigmentation::Pigmented),
        _ => {
            return Err(
                Error::input("give albino or pigmented for the animals on this rack").key("pigmentation")
            );
        }
    };
    let same = species == cx.subject.0;
    let pupil = |t: &Option<String>, k: &str, default: PupilRule| -> Result<PupilRule> {
        t.as_deref()
            .map(|p| PupilRule::parse(p).map_err(|e| e.key(k)))
            .transpose()
            .map(|p| p.unwrap_or(default))
    };
    let light_pupil = pupil(&r.pupil, "pupil", if same { cx.pupils.0 } else { PupilRule::LightAdapted })?;
    let dark_pupil =
        pupil(&r.dark_pupil, "dark_pupil", if same { cx.pupils.1 } else { PupilRule::DarkAdapted })?;
    let fraction = |t: &str, k: &str| -> Result<f64> {
        let v = parse_number(t).map_err(|e| e.key(k))?;
        if !(0.0..=1.0).contains(&v) {
            return Err(Error::input(format!("{v} must be between 0 and 1")).key(k));
        }
        Ok(v)
    };
    Ok(Rack {
        id: r.id.clone(),
        layout: layout(r, needs_place)?,
        animals: Animals { species, pigmentation },
        cage_transmittance: fraction(&r.cage_transmittance, "cage_transmittance")?,
        shelf_shading: r
            .shelf_shading
            .as_deref()
            .map(|t| fraction(t, "shelf_shading"))
            .transpose()?
            .unwrap_or(1.0),
        light_pupil,
        dark_pupil,
        pigment: find_pigment(&format!("{}-rod", species.name()))?,
    })
}

fn layout(r: &RawRack, needs_place: bool) -> Result<Layout> {
    if !r.position.is_empty() {
        if r.shelves.is_some() || r.columns.is_some() {
            return Err(
                Error::input("give shelves and columns, or [[…position]] tables, not both").key("shelves")
            );
        }
        return r
            .position
            .iter()
            .enumerate()
            .map(|(i, p)| spot(p, needs_place).map_err(|e| e.key(&format!("position[{i}]"))))
            .collect::<Result<Vec<_>>>()
            .map(Layout::List);
    }
    let (Some(s), Some(c)) = (&r.shelves, &r.columns) else {
        return Err(
            Error::input("give shelves and columns (a regular rack) or [[…position]] tables").key("shelves")
        );
    };
    let (shelves, columns) = (whole(s, "shelves")?, whole(c, "columns")?);
    let keys = [
        ("first_column_x", &r.first_column_x),
        ("column_spacing", &r.column_spacing),
        ("rack_y", &r.rack_y),
        ("bottom_shelf", &r.bottom_shelf),
        ("shelf_spacing", &r.shelf_spacing),
    ];
    let missing: Vec<&str> = keys.iter().filter(|(_, v)| v.is_none()).map(|(k, _)| *k).collect();
    let place = if missing.len() == keys.len() && !needs_place {
        None
    } else if missing.is_empty() {
        let len = |i: usize| {
            parse_length(keys[i].1.as_deref().unwrap_or_default())
                .map(|l| l.si())
                .map_err(|e| e.key(keys[i].0))
        };
        Some(GridPlace {
            x0_m: len(0)?,
            column_spacing_m: len(1)?,
            y_m: len(2)?,
            bottom_m: len(3)?,
            shelf_spacing_m: len(4)?,
        })
    } else {
        return Err(Error::input(format!(
            "the rack's place is incomplete: missing {} (all five are needed with luminaires; none with readings only)",
            missing.join(", ")
        ))
        .key(missing[0]));
    };
    Ok(Layout::Grid(Grid { shelves, columns, place }))
}

fn spot(p: &RawSpot, needs_place: bool) -> Result<Spot> {
    let len = |t: &Option<String>, k: &str| {
        t.as_deref().map(|t| parse_length(t).map(|l| l.si()).map_err(|e| e.key(k))).transpose()
    };
    let at = match (len(&p.x, "x")?, len(&p.y, "y")?, len(&p.z, "z")?) {
        (Some(x), Some(y), Some(z)) => Some([x, y, z]),
        (None, None, None) if !needs_place => None,
        _ => return Err(Error::input("give x, y and z of the cage floor").key("x")),
    };
    Ok(Spot { shelf: whole(&p.shelf, "shelf")?, column: whole(&p.column, "column")?, at_m: at })
}

fn event(e: &RawEvent, base: Option<&Path>, i: usize) -> Result<DarkEvent> {
    let light = match (&e.lux, &e.luminaire) {
        (Some(t), None) => EventLight::Uniform(lux(t, "lux")?),
        (None, Some(l)) => EventLight::Luminaire(luminaire(l, i).map_err(|x| x.key("luminaire"))?),
        _ => {
            return Err(Error::input("give lux (the same at every cage) or a luminaire table, one of them")
                .key("lux"));
        }
    };
    Ok(DarkEvent {
        name: e.name.clone(),
        spectrum: resolve_spectrum(&e.spectrum, base).map_err(|x| x.key("spectrum"))?,
        light,
        start_s: positive_time(&e.start, "start", true)?,
        duration_s: positive_time(&e.duration, "duration", false)?,
        rod_target: e.rod_target.as_deref().map(rod_target).transpose()?,
    })
}

/// A rod isomerisation rate above 0 ("50 R*/rod/s").
fn rod_target(text: &str) -> Result<crate::base::quantity::Frequency> {
    let r = crate::base::units::parse_isomerisation_rate(text).map_err(|e| e.key("rod_target"))?;
    if !(r.si() > 0.0 && r.si().is_finite()) {
        return Err(
            Error::input(format!("{text}: give a rate above 0, such as \"50 R*/rod/s\"")).key("rod_target")
        );
    }
    Ok(r)
}

fn read_file(file: &str, base: Option<&Path>, racks: &[Rack]) -> Result<crate::housing::readings::Readings> {
    let p = crate::scenario::retina::rel(base, file);
    let text =
        std::fs::read_to_string(&p).map_err(|e| Error::input(format!("cannot read {}: {e}", p.display())))?;
    read_readings(&text, &p.display().to_string(), racks)
}

/// With readings only, every position needs one.
fn check_covered(readings: Option<&crate::housing::readings::Readings>, racks: &[Rack]) -> Result<()> {
    let Some(r) = readings else {
        return Err(Error::input("give [[room.luminaire]] tables, a readings file, or both").key("readings"));
    };
    if let Some(i) = r.lux.iter().position(|v| v.is_nan()) {
        let (mut k, mut at) = (0, i);
        while at >= racks[k].len() {
            at -= racks[k].len();
            k += 1;
        }
        let (s, c) = racks[k].shelf_column(at);
        return Err(Error::input(format!(
            "{}: {} positions have no reading (the first: rack {} shelf {s} column {c}) and there are no luminaires to \
             predict them; add readings or [[room.luminaire]] tables",
            r.origin,
            r.lux.len() - r.count,
            racks[k].id
        ))
        .key("readings"));
    }
    Ok(())
}
