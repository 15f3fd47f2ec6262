//! Eye models for humans, mice and rats, read from `src/data/eyes/*.toml`.
//!
//! Each parameter carries its value, its status and its source; outputs that depend on a
//! value "from memory" say so. Users may load their own eye file with the same layout.

use std::collections::BTreeMap;
use std::fmt;
use std::sync::LazyLock;

use serde::Deserialize;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Area, Length, SiValue, Time, as_nm_f64};
use crate::base::units::{parse_area, parse_length, parse_number, parse_time};
use crate::weighting::lens::human_media_transmittance;

/// The species the tool has eye models for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Species {
    /// Homo sapiens.
    Human,
    /// Mus musculus.
    Mouse,
    /// Rattus norvegicus.
    Rat,
}

impl Species {
    /// Lower-case name as used on the command line and in files.
    pub fn name(self) -> &'static str {
        match self {
            Species::Human => "human",
            Species::Mouse => "mouse",
            Species::Rat => "rat",
        }
    }

    /// Parses `human`, `mouse` or `rat`.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] naming the accepted species.
    pub fn parse(text: &str) -> Result<Species> {
        match text.trim().to_ascii_lowercase().as_str() {
            "human" => Ok(Species::Human),
            "mouse" => Ok(Species::Mouse),
            "rat" => Ok(Species::Rat),
            _ => Err(Error::input(format!("unknown species '{text}'; expected human, mouse or rat"))),
        }
    }
}

/// How far a parameter value can be trusted.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Status {
    /// In the cited source.
    Confirmed,
    /// Computed from confirmed values or data.
    Derived,
    /// Recalled, not checked against the source.
    FromMemory,
    /// A fact or assumption of the trade with no source.
    NoSource,
}

impl Status {
    fn parse(text: &str) -> Option<Status> {
        Some(match text.trim() {
            "confirmed" => Status::Confirmed,
            "derived" => Status::Derived,
            "from memory" => Status::FromMemory,
            "common practice, no source" => Status::NoSource,
            _ => return None,
        })
    }

    /// The tag as written in data files and outputs.
    pub fn name(self) -> &'static str {
        match self {
            Status::Confirmed => "confirmed",
            Status::Derived => "derived",
            Status::FromMemory => "from memory",
            Status::NoSource => "common practice, no source",
        }
    }
}

impl fmt::Display for Status {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// A parameter value with its status and source.
#[derive(Debug, Clone, PartialEq)]
pub struct Param<T> {
    /// The value.
    pub value: T,
    /// How far it can be trusted.
    pub status: Status,
    /// Where it comes from.
    pub source: String,
    /// Its default range, for the uncertainty of the figures it enters (every "from memory"
    /// value of the built-in files has one).
    pub spread: Option<Spread<T>>,
}

/// The distribution a parameter is drawn from when its uncertainty is propagated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Distribution<T> {
    /// Uniform between two values (the value lies between them): `range = ["lo", "hi"]`.
    Uniform {
        /// Lower end.
        low: T,
        /// Upper end.
        high: T,
    },
    /// Normal about the value with this relative standard uncertainty: `u_rel = 0.1`.
    Normal {
        /// Relative standard uncertainty (0.1 for 10 %).
        relative: f64,
    },
}

/// A parameter's default range and why.
#[derive(Debug, Clone, PartialEq)]
pub struct Spread<T> {
    /// The distribution.
    pub distribution: Distribution<T>,
    /// Its basis in words (`range_basis` in the file).
    pub basis: String,
}

/// Spectral transmittance of the ocular media.
#[derive(Debug, Clone, PartialEq)]
#[allow(clippy::large_enum_variant, reason = "one per eye model; boxing would gain nothing")]
pub enum Media {
    /// van de Kraats & van Norren (2007) age model (human), at the subject's age.
    HumanAge {
        /// Age used when the subject does not give one.
        default_age: Time,
    },
    /// A logistic cut-off edge τ(λ) = τ_vis / (1 + exp(−(λ − λ50)/w)) (rodents).
    CutOff {
        /// Wavelength of 50 % of the plateau.
        half_transmission: Param<Length>,
        /// Edge width w.
        edge_width: Param<Length>,
        /// Visible transmittance τ_vis.
        plateau: Param<f64>,
    },
}

/// One photoreceptor class.
#[derive(Debug, Clone, PartialEq)]
pub struct Receptor {
    /// `rod`, `l-cone`, `m-cone`, `s-cone` or `uv-cone`.
    pub name: String,
    /// Wavelength of peak absorbance of the pigment.
    pub lambda_max: Param<Length>,
    /// Peak axial optical density of the outer segment (dark-adapted).
    pub peak_optical_density: Param<f64>,
    /// End-on aperture (collecting) area at the retina.
    pub aperture_area: Param<Area>,
    /// Quantum efficiency of isomerisation.
    pub quantum_efficiency: Param<f64>,
    /// Pigment molecules per receptor, where known.
    pub pigment_per_cell: Option<Param<f64>>,
}

/// Pupil diameters of the species.
#[derive(Debug, Clone, PartialEq)]
pub struct PupilTable {
    /// Typical dark-adapted diameter.
    pub dark_adapted: Param<Length>,
    /// Typical light-adapted diameter.
    pub light_adapted: Param<Length>,
    /// Pharmacologically dilated diameter, where given.
    pub dilated: Option<Param<Length>>,
    /// Largest diameter accepted.
    pub maximum: Param<Length>,
}

/// The iris, for the albino-iris approximation.
#[derive(Debug, Clone, PartialEq)]
pub struct Iris {
    /// Visible iris diameter.
    pub diameter: Param<Length>,
    /// Transmittance of an unpigmented iris.
    pub albino_transmittance: Param<f64>,
}

/// An eye model.
#[derive(Debug, Clone, PartialEq)]
pub struct Eye {
    /// Species.
    pub species: Species,
    /// Posterior nodal distance (the eye's equivalent focal length in air).
    pub nodal_distance: Param<Length>,
    /// Pupil diameters.
    pub pupil: PupilTable,
    /// Ocular media model.
    pub media: Media,
    /// Status of the media model as a whole.
    pub media_status: Status,
    /// Source of the media model.
    pub media_source: String,
    /// Photoreceptor classes.
    pub receptors: Vec<Receptor>,
    /// Melanopsin λmax (rodents; the human melanopic function is CIE S 026's).
    pub melanopsin: Option<Param<Length>>,
    /// Iris, for the albino option (rodents).
    pub iris: Option<Iris>,
    /// Published R*/rod/s per scotopic troland, by name (human).
    pub rod_troland_factors: Vec<(String, Param<f64>)>,
}

impl Eye {
    /// Ocular media transmittance at `wavelength_nm`; `age` applies to the human age model.
    pub fn media_transmittance(&self, wavelength_nm: f64, age: Option<Time>) -> f64 {
        match &self.media {
            Media::HumanAge { default_age } => {
                let years = age.unwrap_or(*default_age).si() / 31_557_600.0;
                human_media_transmittance(wavelength_nm, years)
            }
            Media::CutOff { half_transmission, edge_width, plateau } => {
                let x = (wavelength_nm - as_nm_f64(half_transmission.value)) / as_nm_f64(edge_width.value);
                plateau.value / (1.0 + (-x).exp())
            }
        }
    }

    /// The receptor class called `name`.
    pub fn receptor(&self, name: &str) -> Option<&Receptor> {
        self.receptors.iter().find(|r| r.name == name)
    }

    /// Every parameter of this eye that is "from memory", as `key: source`, for notes.
    pub fn from_memory(&self) -> Vec<String> {
        let mut out = Vec::new();
        let mut add = |key: &str, status: Status| {
            if status == Status::FromMemory {
                out.push(key.to_string());
            }
        };
        add("nodal distance", self.nodal_distance.status);
        add("ocular media", self.media_status);
        if let Media::CutOff { plateau, .. } = &self.media {
            add("media plateau transmittance", plateau.status);
        }
        for r in &self.receptors {
            add(&format!("{} λmax", r.name), r.lambda_max.status);
            add(&format!("{} optical density", r.name), r.peak_optical_density.status);
            add(&format!("{} aperture area", r.name), r.aperture_area.status);
            add(&format!("{} quantum efficiency", r.name), r.quantum_efficiency.status);
        }
        if let Some(m) = &self.melanopsin {
            add("melanopsin λmax", m.status);
        }
        out
    }

    /// Parses an eye file.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidData`] naming `origin` and the key: unknown keys, a value
    /// without its unit, an unknown status or species.
    pub fn from_toml(text: &str, origin: &str) -> Result<Eye> {
        let raw: RawEye =
            toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
        let species = Species::parse(&raw.species)
            .map_err(|e| Error::data(e.context(key_at(origin, "species")).to_string()))?;
        let media_status = Status::parse(&raw.media.status).ok_or_else(|| {
            Error::data(format!("{}: unknown status '{}'", key_at(origin, "media.status"), raw.media.status))
        })?;
        let media = parse_media(&raw.media, origin)?;
        let receptors = raw
            .receptor
            .iter()
            .enumerate()
            .map(|(i, r)| parse_receptor(r, i, origin))
            .collect::<Result<Vec<_>>>()?;
        Ok(Eye {
            species,
            nodal_distance: length_param(&raw.nodal_distance, "nodal_distance", origin, NODAL_M)?,
            pupil: parse_pupil(&raw.pupil, origin)?,
            media,
            media_status,
            media_source: raw.media.source,
            receptors,
            melanopsin: raw
                .melanopsin
                .as_ref()
                .map(|m| length_param(&m.lambda_max, "melanopsin.lambda_max", origin, LAMBDA_MAX_M))
                .transpose()?,
            iris: raw.iris.as_ref().map(|i| parse_iris(i, origin)).transpose()?,
            rod_troland_factors: raw
                .rod_troland_factors
                .iter()
                .map(|(k, p)| {
                    Ok((k.clone(), number_param(p, &format!("rod_troland_factors.{k}"), origin, POSITIVE)?))
                })
                .collect::<Result<Vec<_>>>()?,
        })
    }
}

/// "origin: key 'key'", the way errors name a key of an eye file.
fn key_at(origin: &str, key: &str) -> String {
    format!("{origin}: key '{key}'")
}

/// A parameter whose value is a length within `lo`–`hi` (m).
fn length_param(p: &RawParam, key: &str, origin: &str, (lo, hi): (f64, f64)) -> Result<Param<Length>> {
    convert(p, key, origin, parse_length, |v| {
        within(v.si(), (lo, hi), key, origin, |v| format!("{} mm", v * 1e3))
    })
}

/// A parameter whose value is a plain number within `lo`–`hi`.
fn number_param(p: &RawParam, key: &str, origin: &str, (lo, hi): (f64, f64)) -> Result<Param<f64>> {
    convert(p, key, origin, parse_number, |v| within(*v, (lo, hi), key, origin, |v| format!("{v}")))
}

/// Checks that `v` lies in (lo, hi] (above `lo`, at most `hi`), naming the physical range.
fn within(v: f64, (lo, hi): (f64, f64), key: &str, origin: &str, show: impl Fn(f64) -> String) -> Result<()> {
    if v > lo && v <= hi {
        return Ok(());
    }
    Err(Error::data(format!(
        "{}: {} is outside the physical range: above {}, at most {}",
        key_at(origin, key),
        show(v),
        show(lo),
        show(hi)
    )))
}

/// Physical ranges of eye parameters (input bounds wide enough for any vertebrate eye; common
/// practice, no source), in SI units.
const NODAL_M: (f64, f64) = (0.5e-3, 50e-3);
const PUPIL_M: (f64, f64) = (0.0, 15e-3);
const IRIS_M: (f64, f64) = (0.0, 25e-3);
const LAMBDA_MAX_M: (f64, f64) = (300e-9, 700e-9);
const MEDIA_EDGE_M: (f64, f64) = (0.0, 800e-9);
const MEDIA_WIDTH_M: (f64, f64) = (0.0, 200e-9);
const FRACTION: (f64, f64) = (0.0, 1.0);
const FRACTION_0: (f64, f64) = (-f64::MIN_POSITIVE, 1.0);
const OPTICAL_DENSITY: (f64, f64) = (0.0, 3.0);
const PIGMENT_PER_CELL: (f64, f64) = (0.0, 1e12);
const POSITIVE: (f64, f64) = (0.0, 1e12);

/// The `[media]` table's model (its status and source are read by the caller).
fn parse_media(m: &RawMedia, origin: &str) -> Result<Media> {
    match m.model.as_str() {
        "van-de-kraats-2007" => Ok(Media::HumanAge {
            default_age: parse_time(m.default_age.as_deref().unwrap_or("32 y"))
                .map_err(|e| Error::data(e.context(key_at(origin, "media.default_age")).to_string()))?,
        }),
        "cut-off" => parse_cut_off(m, origin),
        other => Err(Error::data(format!(
            "{}: unknown media model '{other}'; expected van-de-kraats-2007 or cut-off",
            key_at(origin, "media.model")
        ))),
    }
}

/// The logistic cut-off media model, whose three parameters are all required.
fn parse_cut_off(m: &RawMedia, origin: &str) -> Result<Media> {
    let need = |p: &Option<RawParam>, key: &str| {
        p.clone()
            .ok_or_else(|| Error::data(format!("{}: missing for a cut-off media model", key_at(origin, key))))
    };
    Ok(Media::CutOff {
        half_transmission: length_param(
            &need(&m.half_transmission, "media.half_transmission")?,
            "media.half_transmission",
            origin,
            MEDIA_EDGE_M,
        )?,
        edge_width: length_param(
            &need(&m.edge_width, "media.edge_width")?,
            "media.edge_width",
            origin,
            MEDIA_WIDTH_M,
        )?,
        plateau: number_param(&need(&m.plateau, "media.plateau")?, "media.plateau", origin, FRACTION)?,
    })
}

/// The `i`-th `[[receptor]]` table.
fn parse_receptor(r: &RawReceptor, i: usize, origin: &str) -> Result<Receptor> {
    let k = |f: &str| format!("receptor[{i}].{f}");
    Ok(Receptor {
        name: r.name.clone(),
        lambda_max: length_param(&r.lambda_max, &k("lambda_max"), origin, LAMBDA_MAX_M)?,
        peak_optical_density: number_param(
            &r.peak_optical_density,
            &k("peak_optical_density"),
            origin,
            OPTICAL_DENSITY,
        )?,
        aperture_area: aperture(r, &k("aperture_area"), origin)?,
        quantum_efficiency: number_param(&r.quantum_efficiency, &k("quantum_efficiency"), origin, FRACTION)?,
        pigment_per_cell: r
            .pigment_per_cell
            .as_ref()
            .map(|p| number_param(p, &k("pigment_per_cell"), origin, PIGMENT_PER_CELL))
            .transpose()?,
    })
}

/// A receptor's collecting aperture, above 0 and at most 1000 µm².
fn aperture(r: &RawReceptor, key: &str, origin: &str) -> Result<Param<crate::base::quantity::Area>> {
    convert(&r.aperture_area, key, origin, parse_area, |v| {
        within(v.si(), (0.0, 1e-9), key, origin, |v| format!("{} µm²", v * 1e12))
    })
}

/// The `[pupil]` table.
fn parse_pupil(p: &RawPupil, origin: &str) -> Result<PupilTable> {
    Ok(PupilTable {
        dark_adapted: length_param(&p.dark_adapted, "pupil.dark_adapted", origin, PUPIL_M)?,
        light_adapted: length_param(&p.light_adapted, "pupil.light_adapted", origin, PUPIL_M)?,
        dilated: p.dilated.as_ref().map(|d| length_param(d, "pupil.dilated", origin, PUPIL_M)).transpose()?,
        maximum: length_param(&p.maximum, "pupil.maximum", origin, PUPIL_M)?,
    })
}

/// The `[iris]` table.
fn parse_iris(i: &RawIris, origin: &str) -> Result<Iris> {
    Ok(Iris {
        diameter: length_param(&i.diameter, "iris.diameter", origin, IRIS_M)?,
        albino_transmittance: number_param(
            &i.albino_transmittance,
            "iris.albino_transmittance",
            origin,
            FRACTION_0,
        )?,
    })
}

/// A parameter whose value passes `check` (its physical range) before its default range is read.
fn convert<T: PartialOrd>(
    p: &RawParam,
    key: &str,
    origin: &str,
    parse: impl Fn(&str) -> Result<T>,
    check: impl Fn(&T) -> Result<()>,
) -> Result<Param<T>> {
    read_checked(p, &format!("{origin}: key '{key}'"), parse, check)
}

/// Reads a `{ value, status, source }` parameter, with its optional default range (`range =
/// ["lo", "hi"]` uniform or `u_rel = 0.1` normal, and `range_basis`); `at` names the file and
/// key in errors.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] for a value that does not parse, an unknown status, or a
/// range without its basis, not around the value, or with a relative uncertainty outside (0, 0.25].
pub(crate) fn read_param<T: PartialOrd>(
    p: &RawParam,
    at: &str,
    parse: impl Fn(&str) -> Result<T>,
) -> Result<Param<T>> {
    read_checked(p, at, parse, |_| Ok(()))
}

/// [`read_param`] with the value passed through `check` before its status and range are read.
fn read_checked<T: PartialOrd>(
    p: &RawParam,
    at: &str,
    parse: impl Fn(&str) -> Result<T>,
    check: impl Fn(&T) -> Result<()>,
) -> Result<Param<T>> {
    let value = parse(&p.value).map_err(|e| Error::data(format!("{at}: {e}")))?;
    check(&value)?;
    let status = Status::parse(&p.status).ok_or_else(|| {
        Error::data(format!(
            "{at}: unknown status '{}'; expected confirmed, derived, from memory or common practice, no source",
            p.status
        ))
    })?;
    let spread = read_spread(p, at, &value, &parse)?;
    Ok(Param { value, status, source: p.source.clone(), spread })
}

/// The optional default range of a parameter (see [`read_param`]).
fn read_spread<T: PartialOrd>(
    p: &RawParam,
    at: &str,
    value: &T,
    parse: &impl Fn(&str) -> Result<T>,
) -> Result<Option<Spread<T>>> {
    let distribution = match (&p.range, p.u_rel) {
        (None, None) => return Ok(None),
        (Some(_), Some(_)) => {
            return Err(Error::data(format!(
                "{at}: give either range = [\"lo\", \"hi\"] or u_rel, not both"
            )));
        }
        (Some([lo, hi]), None) => {
            let low = parse(lo).map_err(|e| Error::data(format!("{at}: range: {e}")))?;
            let high = parse(hi).map_err(|e| Error::data(format!("{at}: range: {e}")))?;
            if !(low <= *value && *value <= high && low < high) {
                return Err(Error::data(format!(
                    "{at}: range [\"{lo}\", \"{hi}\"] must hold the value \"{}\" with lo below hi",
                    p.value
                )));
            }
            Distribution::Uniform { low, high }
        }
        (None, Some(u)) => {
            if !(u > 0.0 && u <= 0.25) {
                return Err(Error::data(format!(
                    "{at}: u_rel = {u} must be above 0 and at most 0.25 (a relative standard uncertainty)"
                )));
            }
            Distribution::Normal { relative: u }
        }
    };
    let basis = p.range_basis.clone().filter(|b| !b.trim().is_empty()).ok_or_else(|| {
        Error::data(format!(
            "{at}: a range needs range_basis, its basis in words (\"common practice, no source\")"
        ))
    })?;
    Ok(Some(Spread { distribution, basis }))
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawEye {
    species: String,
    nodal_distance: RawParam,
    pupil: RawPupil,
    media: RawMedia,
    receptor: Vec<RawReceptor>,
    melanopsin: Option<RawMelanopsin>,
    iris: Option<RawIris>,
    #[serde(default)]
    rod_troland_factors: BTreeMap<String, RawParam>,
}

/// A `{ value, status, source }` table as written in the data files.
#[derive(Deserialize, Clone)]
#[serde(deny_unknown_fields)]
pub(crate) struct RawParam {
    value: String,
    status: String,
    source: String,
    range: Option<[String; 2]>,
    u_rel: Option<f64>,
    range_basis: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPupil {
    dark_adapted: RawParam,
    light_adapted: RawParam,
    dilated: Option<RawParam>,
    maximum: RawParam,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawMedia {
    model: String,
    status: String,
    source: String,
    default_age: Option<String>,
    half_transmission: Option<RawParam>,
    edge_width: Option<RawParam>,
    plateau: Option<RawParam>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawReceptor {
    name: String,
    lambda_max: RawParam,
    peak_optical_density: RawParam,
    aperture_area: RawParam,
    quantum_efficiency: RawParam,
    pigment_per_cell: Option<RawParam>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawMelanopsin {
    lambda_max: RawParam,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawIris {
    diameter: RawParam,
    albino_transmittance: RawParam,
}

const EYE_FILES: [(&str, &str); 3] = [
    ("human.toml", include_str!("../data/eyes/human.toml")),
    ("mouse.toml", include_str!("../data/eyes/mouse.toml")),
    ("rat.toml", include_str!("../data/eyes/rat.toml")),
];

static EYES: LazyLock<Vec<Eye>> = LazyLock::new(|| {
    EYE_FILES
        .iter()
        .map(|(name, text)| Eye::from_toml(text, name).unwrap_or_else(|e| panic!("embedded eye file: {e}")))
        .collect()
});

/// The built-in eye model of `species`.
pub fn builtin_eye(species: Species) -> &'static Eye {
    EYES.iter()
        .find(|e| e.species == species)
        .unwrap_or_else(|| panic!("no built-in eye for {}", species.name()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_builtin_eye_loads_with_sources() {
        for s in [Species::Human, Species::Mouse, Species::Rat] {
            let e = builtin_eye(s);
            assert!(!e.receptors.is_empty());
            assert!(e.receptors.iter().all(|r| !r.lambda_max.source.is_empty()));
            assert!(e.receptor("rod").is_some(), "{}", s.name());
        }
        assert!((as_nm_f64(builtin_eye(Species::Human).nodal_distance.value) - 16.7e6).abs() < 1e-3);
    }

    #[test]
    fn rodent_media_pass_near_uv_and_human_media_do_not() {
        let m = builtin_eye(Species::Mouse);
        let h = builtin_eye(Species::Human);
        assert!((m.media_transmittance(310.0, None) - 0.4).abs() < 1e-12);
        assert!(m.media_transmittance(360.0, None) > 0.79);
        assert!(h.media_transmittance(360.0, None) < 0.01);
    }

    #[test]
    fn bad_eye_files_name_the_key() {
        let text = include_str!("../data/eyes/mouse.toml").replace("\"1.95 mm\"", "\"1.95\"");
        let err = Eye::from_toml(&text, "m.toml").unwrap_err();
        assert!(err.message().contains("m.toml: key 'nodal_distance'"), "{err}");
        assert!(err.message().contains("has no unit"), "{err}");
        let text =
            include_str!("../data/eyes/mouse.toml").replace("status = \"confirmed\"", "status = \"sure\"");
        assert!(Eye::from_toml(&text, "m.toml").unwrap_err().message().contains("unknown status 'sure'"));
    }

    #[test]
    fn default_ranges_are_read_and_checked() {
        let h = builtin_eye(Species::Human);
        let qe = &h.receptor("rod").unwrap().quantum_efficiency;
        // human.toml: range = ["0.64", "0.67"] about 0.67, uniform.
        assert_eq!(qe.spread.as_ref().unwrap().distribution, Distribution::Uniform { low: 0.64, high: 0.67 });
        let base = include_str!("../data/eyes/mouse.toml");
        for (from, to, why) in [
            ("range = [\"0.7\", \"0.9\"]", "range = [\"0.85\", \"0.9\"]", "must hold the value"),
            ("range = [\"0.7\", \"0.9\"], ", "u_rel = 0.1, range = [\"0.7\", \"0.9\"], ", "not both"),
            ("range = [\"0.7\", \"0.9\"], ", "u_rel = 0.5, ", "at most 0.25"),
            ("range_basis = \"±0.1 about an assumed", "source2 = \"", "unknown field"),
        ] {
            assert!(base.contains(from), "{from}");
            let err = Eye::from_toml(&base.replacen(from, to, 1), "m.toml").unwrap_err();
            assert!(err.message().contains(why), "{to}: {err}");
        }
        let text = base.replacen(
            ", range_basis = \"±0.1 about an assumed visible transmittance, common practice, no source\"",
            "",
            1,
        );
        let err = Eye::from_toml(&text, "m.toml").unwrap_err();
        assert!(
            err.message().contains("key 'media.plateau'") && err.message().contains("range_basis"),
            "{err}"
        );
    }

    #[test]
    fn non_physical_eye_parameters_are_rejected_with_the_range() {
        let base = include_str!("../data/eyes/mouse.toml");
        for (from, to, key) in [
            ("\"1.95 mm\"", "\"0 mm\"", "nodal_distance"),
            ("\"498 nm\"", "\"0 nm\"", "receptor[0].lambda_max"),
            ("\"0.8\"", "\"1.5\"", "media.plateau"),
        ] {
            let text = base.replacen(from, to, 1);
            let err = Eye::from_toml(&text, "m.toml").unwrap_err();
            assert!(err.message().contains(&format!("key '{key}'")), "{err}");
            assert!(err.message().contains("outside the physical range"), "{err}");
        }
        let text = base.replacen("value = \"0.67\"", "value = \"-1\"", 1);
        let err = Eye::from_toml(&text, "m.toml").unwrap_err();
        assert!(
            err.message().contains("quantum_efficiency") && err.message().contains("physical range"),
            "{err}"
        );
    }
}
