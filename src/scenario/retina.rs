//! Describing a viewing situation in words and units: the `[subject]`, `[[source]]` and
//! `[[filter]]` tables of a retina scenario file, or the same fields from the command line,
//! turned into a [`RetinaScenario`].
//!
//! ```toml
//! [subject]
//! species = "mouse"          # human, mouse or rat
//! pupil = "dark"             # "2 mm", dark, light, dilated, watson-yellott, de-groot-gebhard, moon-spencer
//!
//! [[source]]
//! spectrum = "warm-white-led"
//! illuminance = "350 lx"     # or luminance, irradiance, photon_irradiance, radiance,
//!                            # luminous_intensity, luminous_flux, radiant_flux
//! full_field = true          # light from the whole field; or subtense = "10 deg"
//!
//! [[filter]]
//! name = "cage wall"
//! transmittance = "0.65"     # or file = "wall.csv"
//! ```

use std::path::{Path, PathBuf};

use serde::Deserialize;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Angle, SiValue};
use crate::base::units::{parse_angle, parse_length, parse_luminance, parse_time};
use crate::cornea::PlacedSource;
use crate::cornea::filter::Filter;
use crate::cornea::geometry::{Emission, Field, Geometry, subtense};
use crate::retina::eye::{Eye, Species, builtin_eye};
use crate::retina::pupil::PupilRule;
use crate::retina::report::RetinaScenario;
use crate::spectrum::Measure;
use crate::spectrum::scale::{SCALE_KEYS, ScaleTarget, scale_to};
use crate::spectrum::source::resolve;

/// One source as written: every value a string with its unit.
#[derive(Debug, Clone, Default, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SourceSpec {
    /// A name for the source (used by schedules and reports).
    pub id: Option<String>,
    /// A built-in lamp, a generator or a file (relative to the scenario file).
    pub spectrum: String,
    /// Scale to a measured illuminance at the eye.
    pub illuminance: Option<String>,
    /// Scale to a measured luminance of the source.
    pub luminance: Option<String>,
    /// Scale to an irradiance at the eye.
    pub irradiance: Option<String>,
    /// Scale to a photon irradiance at the eye.
    pub photon_irradiance: Option<String>,
    /// Scale to a radiance of the source.
    pub radiance: Option<String>,
    /// Scale to a luminous intensity of a small source.
    pub luminous_intensity: Option<String>,
    /// Scale to a luminous flux of a lamp.
    pub luminous_flux: Option<String>,
    /// Scale to a radiant flux of a lamp.
    pub radiant_flux: Option<String>,
    /// `at-eye`, `extended`, `intensity` or `flux`; inferred from the spectrum when absent.
    pub geometry: Option<String>,
    /// Distance from the source to the eye.
    pub distance: Option<String>,
    /// Source diameter.
    pub size: Option<String>,
    /// Full angle the source subtends.
    pub subtense: Option<String>,
    /// The light fills the field of view evenly.
    #[serde(default)]
    pub full_field: bool,
    /// `isotropic` or `lambertian` (flux geometry).
    pub emission: Option<String>,
    /// Angle from a Lambertian emitter's axis.
    pub emission_angle: Option<String>,
    /// Angle of incidence at the eye.
    pub incidence: Option<String>,
    /// The user's statement that the source emits nothing outside its measured range
    /// (`"measured"`, taken out to 180–3000 nm) or outside a range (`"300–1100 nm"`). Never
    /// assumed; recorded in every report that uses it.
    pub emission_range: Option<String>,
}

/// The subject as written.
#[derive(Debug, Clone, Default, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SubjectSpec {
    /// `human`, `mouse` or `rat`.
    pub species: String,
    /// `albino` or `pigmented` (rodents; albino animals get the Guide's phototoxicity range).
    pub pigmentation: Option<String>,
    /// Pupil diameter or rule (the light phase, and every phase unless `dark_pupil` is given).
    pub pupil: Option<String>,
    /// Pupil in dark-phase steps (`dark`, `night`); rodents default to their dark-adapted pupil.
    pub dark_pupil: Option<String>,
    /// Age (`"32 y"`).
    pub age: Option<String>,
    /// Eyes viewing, 1 or 2 (pupil formulas).
    pub eyes: Option<u8>,
    /// Adapting field (full angle) for the Watson & Yellott pupil.
    pub field: Option<String>,
    /// Adapting luminance for pupil formulas.
    pub adapting_luminance: Option<String>,
    /// Add light through an unpigmented iris (albino rodents).
    #[serde(default)]
    pub albino_iris: bool,
    /// A user eye-model file instead of the built-in one.
    pub eye_file: Option<String>,
}

/// A filter as written.
#[derive(Debug, Clone, Default, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FilterSpec {
    /// Name for reports.
    pub name: Option<String>,
    /// A flat transmittance, 0–1.
    pub transmittance: Option<String>,
    /// A transmittance file (relative to the scenario file).
    pub file: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawScenario {
    subject: SubjectSpec,
    source: Vec<SourceSpec>,
    #[serde(default)]
    filter: Vec<FilterSpec>,
}

/// `p` relative to `base` (the scenario file's folder) when it is a relative path; a file that
/// exists is recorded as an input of the run ([`crate::base::inputs`]).
pub fn rel(base: Option<&Path>, p: &str) -> PathBuf {
    let path = match base {
        Some(b) if Path::new(p).is_relative() => b.join(p),
        _ => PathBuf::from(p),
    };
    if path.is_file() {
        crate::base::inputs::record(&path);
    }
    path
}

fn opt<T>(v: &Option<String>, key: &str, parse: impl Fn(&str) -> Result<T>) -> Result<Option<T>> {
    v.as_deref().map(|t| parse(t).map_err(|e| e.key(key))).transpose()
}

/// Checks a pupil rule against the eye when the scenario is read: a stated diameter within the
/// species' range, a formula only for people (the formulas are for human eyes).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] naming the allowed range or the rules that fit.
pub fn check_pupil(eye: &Eye, rule: PupilRule) -> Result<()> {
    use crate::retina::pupil::{Adaptation, choose};
    match rule {
        PupilRule::WatsonYellott | PupilRule::DeGrootGebhard | PupilRule::MoonSpencer => {
            if eye.species != Species::Human {
                return Err(Error::input(format!(
                    "pupil formulas are for human eyes; for a {} give a diameter or dark, light or dilated",
                    eye.species.name()
                )));
            }
            Ok(())
        }
        _ => choose(eye, rule, &Adaptation { luminance: None, field: None, age: None, eyes: 2 }).map(|_| ()),
    }
}

/// The widest span of the built-in hazard bands, nm: what `emission_range = "measured"` extends to.
pub const HAZARD_SPAN_NM: (f64, f64) = (180.0, 3000.0);

/// Parses an emission range: `measured` (the hazard span), or `A–B nm` (also `A-B nm`, `A to B nm`).
fn parse_emission_range(text: &str) -> Result<(f64, f64)> {
    let t = text.trim();
    if t.eq_ignore_ascii_case("measured") {
        return Ok(HAZARD_SPAN_NM);
    }
    let bad = || {
        Error::input(format!(
            "'{text}' is not an emission range; write \"measured\" (nothing outside the measured range) or a range \
             such as \"300–1100 nm\""
        ))
    };
    let body = t.strip_suffix("nm").ok_or_else(bad)?.trim();
    let (a, b) = body
        .split_once('–')
        .or_else(|| body.split_once(" to "))
        .or_else(|| body.split_once('-'))
        .ok_or_else(bad)?;
    let (a, b): (f64, f64) = (a.trim().parse().map_err(|_| bad())?, b.trim().parse().map_err(|_| bad())?);
    if !(a > 0.0 && a < b && b <= 1e6) {
        return Err(bad());
    }
    Ok((a, b))
}

/// An age with its unit, within 0–120 years (the range the human media and pupil formulas
/// take; an input bound, common practice, no source).
fn parse_age(text: &str) -> Result<crate::base::quantity::Time> {
    let t = parse_time(text)?;
    let years = t.si() / (365.25 * 86_400.0);
    if !(years > 0.0 && years <= 120.0) {
        return Err(Error::input(format!("{text} is outside 0–120 years")));
    }
    Ok(t)
}

/// Resolves a `spectrum` value: a generator (`blackbody:…`, `cie:…`, `led:…`) or a built-in lamp
/// by name, else a file relative to `base` (the scenario file's folder; the working directory
/// only when there is no scenario file). A file beside the scenario wins over a built-in lamp of
/// the same name; a relative name is never looked up in the working directory of a scenario.
///
/// # Errors
/// As [`resolve`]; a file that does not exist is named with the path that was tried.
pub fn resolve_spectrum(spec: &str, base: Option<&Path>) -> Result<crate::spectrum::Spectrum> {
    let generator = ["blackbody:", "cie:", "led:"].iter().any(|p| spec.trim().starts_with(p));
    if generator {
        return resolve(spec, None);
    }
    let path = rel(base, spec);
    if path.is_file() {
        return resolve(&path.to_string_lossy(), None);
    }
    if crate::spectrum::source::BUILTIN_LAMPS.iter().any(|l| l.name == spec.trim()) {
        return resolve(spec, None);
    }
    match base {
        Some(_) => Err(Error::input(format!(
            "'{spec}' is neither a built-in lamp, a generator (blackbody:…, cie:…, led:…) nor a file: {} does not exist",
            path.display()
        ))),
        None => resolve(spec, None),
    }
}

/// Resolves, scales and places one source.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] naming the key: more than one measured value, a
/// missing distance or size for the geometry, an unknown geometry or emission, a bad unit.
pub fn place(spec: &SourceSpec, base: Option<&Path>) -> Result<PlacedSource> {
    let spectrum = scaled_spectrum(spec, base)?;
    let size = opt(&spec.size, "size", parse_length)?;
    let geometry = geometry(spec, &spectrum, size)?;
    // Check the geometry now, so that an impossible one is reported against this source's keys.
    crate::cornea::geometry::corneal(&spectrum, &geometry)?;
    let distance = opt(&spec.distance, "distance", parse_length)?;
    let (spectrum, assumption) = match &spec.emission_range {
        None => (spectrum, None),
        Some(text) => {
            let (lo, hi) = parse_emission_range(text).map_err(|e| e.key("emission_range"))?;
            let (a, b) = spectrum.range_nm();
            let s = spectrum.assumed_dark_outside(lo, hi).map_err(|e| e.key("emission_range"))?;
            let note = format!(
                "{}: '{}' emits nothing outside its measured {a}–{b} nm (taken as zero \
                 out to {lo}–{hi} nm)",
                crate::cornea::ASSUMPTION_NOTE,
                spec.id.as_deref().unwrap_or(&spec.spectrum)
            );
            (s, Some(note))
        }
    };
    Ok(PlacedSource { spectrum, geometry, size, distance, assumption })
}

/// The source's spectrum, resolved and scaled to its one measured value.
fn scaled_spectrum(spec: &SourceSpec, base: Option<&Path>) -> Result<crate::spectrum::Spectrum> {
    let given: Vec<(&str, &String)> = SCALE_KEYS
        .iter()
        .zip([
            &spec.illuminance,
            &spec.luminance,
            &spec.irradiance,
            &spec.photon_irradiance,
            &spec.radiance,
            &spec.luminous_intensity,
            &spec.luminous_flux,
            &spec.radiant_flux,
        ])
        .filter_map(|(k, v)| v.as_ref().map(|v| (*k, v)))
        .collect();
    if given.len() > 1 {
        return Err(Error::input(format!(
            "source '{}' gives {} measured values ({}); give one",
            spec.spectrum,
            given.len(),
            given.iter().map(|g| g.0).collect::<Vec<_>>().join(", ")
        )));
    }
    let mut spectrum = resolve_spectrum(&spec.spectrum, base).map_err(|e| e.key("spectrum"))?;
    if let Some(id) = &spec.id {
        spectrum = spectrum.with_label(id.clone());
    }
    if let Some((key, value)) = given.first() {
        let t = ScaleTarget::parse(key, value).map_err(|e| e.key(key))?;
        spectrum = scale_to(&spectrum, t).map_err(|e| e.key(key))?;
    }
    Ok(spectrum)
}

/// The geometry named by `geometry`, or inferred from what the spectrum measures.
fn geometry_kind(spec: &SourceSpec, spectrum: &crate::spectrum::Spectrum) -> Result<String> {
    Ok(match spec.geometry.as_deref() {
        Some(g) => g.to_string(),
        None => match spectrum.measure() {
            Measure::Irradiance => "at-eye".to_string(),
            Measure::Radiance => "extended".to_string(),
            Measure::Intensity => "intensity".to_string(),
            Measure::Flux => "flux".to_string(),
            Measure::Relative => {
                return Err(Error::input(format!(
                    "source '{}' is a relative spectrum: give one measured value ({})",
                    spec.spectrum,
                    SCALE_KEYS.join(", ")
                )));
            }
        },
    })
}

/// Where the source is and how it radiates, from the keys its geometry needs.
fn geometry(
    spec: &SourceSpec,
    spectrum: &crate::spectrum::Spectrum,
    size: Option<crate::base::quantity::Length>,
) -> Result<Geometry> {
    let kind = geometry_kind(spec, spectrum)?;
    let oblique = matches!(kind.as_str(), "intensity" | "flux");
    if !oblique && (spec.incidence.is_some() || spec.emission_angle.is_some()) {
        let key = if spec.incidence.is_some() { "incidence" } else { "emission_angle" };
        return Err(Error::input(format!(
            "applies to a source at a distance (geometry intensity or flux), not to {kind} geometry: a measured \
             irradiance already includes the angle, and a radiance does not change with it"
        ))
        .key(key));
    }
    let distance = opt(&spec.distance, "distance", parse_length)?;
    let sub = opt(&spec.subtense, "subtense", parse_angle)?;
    let zero = Angle::from_si(0.0);
    let incidence = opt(&spec.incidence, "incidence", parse_angle)?.unwrap_or(zero);
    let missing =
        |key: &str| Error::input(format!("source '{}' with {kind} geometry needs '{key}'", spec.spectrum));
    match kind.as_str() {
        "at-eye" => Ok(Geometry::AtEye { field: at_eye_field(spec.full_field, sub, size, distance)? }),
        "extended" => {
            let a = match (sub, size, distance) {
                (Some(a), None, _) => a,
                (None, Some(s), Some(d)) => subtense(s, d)?,
                _ => {
                    return Err(Error::input(format!(
                        "source '{}' with extended geometry needs 'subtense', or 'size' and 'distance'",
                        spec.spectrum
                    )));
                }
            };
            Ok(Geometry::Extended { subtense: a })
        }
        "intensity" => Ok(Geometry::Intensity {
            distance: distance.ok_or_else(|| missing("distance"))?,
            incidence,
            size,
        }),
        "flux" => Ok(Geometry::Flux {
            emission: emission(spec.emission.as_deref().ok_or_else(|| missing("emission"))?)?,
            distance: distance.ok_or_else(|| missing("distance"))?,
            emission_angle: opt(&spec.emission_angle, "emission_angle", parse_angle)?.unwrap_or(zero),
            incidence,
            size,
        }),
        other => Err(Error::input(format!(
            "'{other}' is not a geometry; expected at-eye, extended, intensity or flux"
        ))
        .key("geometry")),
    }
}

/// What the eye sees of light measured at the eye: the whole field, a subtense (given, or from a
/// size and distance), or not known.
fn at_eye_field(
    full_field: bool,
    sub: Option<Angle>,
    size: Option<crate::base::quantity::Length>,
    distance: Option<crate::base::quantity::Length>,
) -> Result<Option<Field>> {
    Ok(match (full_field, sub, size, distance) {
        (true, None, None, _) => Some(Field::FullField),
        (true, _, _, _) => {
            return Err(Error::input(
                "give either full_field or a subtense (or size and distance), not both",
            ));
        }
        (false, Some(a), None, _) => Some(Field::Subtense(a)),
        (false, None, Some(s), Some(d)) => Some(Field::Subtense(subtense(s, d)?)),
        (false, None, Some(_), None) => return Err(Error::input("a source size needs its 'distance'")),
        (false, Some(_), Some(_), _) => {
            return Err(Error::input("give either 'subtense' or 'size', not both"));
        }
        (false, None, None, _) => None,
    })
}

/// A flux source's `emission`: isotropic or lambertian.
fn emission(text: &str) -> Result<Emission> {
    match text {
        "isotropic" => Ok(Emission::Isotropic),
        "lambertian" => Ok(Emission::Lambertian),
        other => Err(Error::input(format!("'{other}' is not an emission; expected isotropic or lambertian"))
            .key("emission")),
    }
}

/// Builds a scenario from its parts.
///
/// # Errors
/// As [`place`]; an unknown species, pupil, age or filter; a user eye file that cannot be read.
pub fn build(
    subject: &SubjectSpec,
    sources: &[SourceSpec],
    filters: &[FilterSpec],
    base: Option<&Path>,
) -> Result<RetinaScenario> {
    let species = Species::parse(&subject.species).map_err(|e| e.key("species").key("subject"))?;
    let eye = match &subject.eye_file {
        Some(f) => {
            let p = rel(base, f);
            let text = std::fs::read_to_string(&p).map_err(|e| {
                Error::input(format!("cannot read {}: {e}", p.display())).key("eye_file").key("subject")
            })?;
            let eye = Eye::from_toml(&text, &p.display().to_string())?;
            if eye.species != species {
                return Err(Error::input(format!(
                    "{} describes a {} eye, the subject is a {}",
                    p.display(),
                    eye.species.name(),
                    species.name()
                ))
                .key("eye_file")
                .key("subject"));
            }
            eye
        }
        None => builtin_eye(species).clone(),
    };
    let pupil = match &subject.pupil {
        Some(p) => PupilRule::parse(p).map_err(|e| e.key("pupil").key("subject"))?,
        None => {
            return Err(Error::input(
                "is missing: give a diameter (\"3 mm\") or a rule (dark, light, dilated, \
                 watson-yellott, de-groot-gebhard, moon-spencer)",
            )
            .key("pupil")
            .key("subject"));
        }
    };
    check_pupil(&eye, pupil).map_err(|e| e.key("pupil").key("subject"))?;
    let eyes = subject.eyes.unwrap_or(2);
    if !(1..=2).contains(&eyes) {
        return Err(Error::input(format!("{eyes} must be 1 or 2")).key("eyes").key("subject"));
    }
    let sources = sources
        .iter()
        .enumerate()
        .map(|(i, s)| place(s, base).map_err(|e| e.key(&format!("source[{i}]"))))
        .collect::<Result<Vec<_>>>()?;
    let filters = filters
        .iter()
        .enumerate()
        .map(|(i, f)| {
            let at = |e: Error| e.key(&format!("filter[{i}]"));
            let mut filter = match (&f.transmittance, &f.file) {
                (Some(t), None) => Filter::parse(t).map_err(at)?,
                (None, Some(file)) => Filter::parse(&rel(base, file).to_string_lossy()).map_err(at)?,
                _ => return Err(at(Error::input("give either 'transmittance' or 'file'"))),
            };
            if let Some(n) = &f.name {
                filter = filter.with_label(n);
            }
            Ok(filter)
        })
        .collect::<Result<Vec<_>>>()?;
    Ok(RetinaScenario {
        eye,
        sources,
        filters,
        pupil,
        age: opt(&subject.age, "age", parse_age).map_err(|e| e.key("subject"))?,
        eyes,
        field: opt(&subject.field, "field", parse_angle).map_err(|e| e.key("subject"))?,
        adapting_luminance: opt(&subject.adapting_luminance, "adapting_luminance", parse_luminance)
            .map_err(|e| e.key("subject"))?,
        albino_iris: subject.albino_iris,
    })
}

/// Parses a retina scenario file; `origin` names it in errors and `base` is where relative
/// files are looked up.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] or [`crate::ErrorKind::InvalidInput`] naming the file,
/// the line (for syntax and unknown keys) or the key, and what would be right.
pub fn parse_scenario(text: &str, origin: &str, base: Option<&Path>) -> Result<RetinaScenario> {
    let raw: RawScenario =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    build(&raw.subject, &raw.source, &raw.filter, base).map_err(|e| e.in_file(origin, Some(text)))
}
