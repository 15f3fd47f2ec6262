//! Flash strengths converted to photoisomerisations (R*) per rod per flash, for human, mouse
//! and rat eyes, with the rod's fraction of the saturating flash.
//!
//! A flash is given as one of:
//!
//! - a photopic luminous exposure H_v in cd·s/m² (the luminance of a full field, a Ganzfeld,
//!   times the flash duration, as ERG flashes are specified);
//! - a retinal exposure in troland-seconds of a stated kind, `scot td·s` or `phot td·s`
//!   (CIE e-ILV 17-22-038: troland = cd/m² × pupil area in mm², so H = L·A_p·t);
//! - a photon fluence at the cornea, photons/µm², with a wavelength (a line) or a spectrum.
//!
//! Each is turned into the corneal spectral irradiance of a full field whose time integral is
//! the flash (full field: L = E/π), and run once through the tool's own chain,
//! [`crate::retina::report::assess_retina`] with the species' eye file (pupil, ocular media,
//! posterior nodal distance, rod aperture, optical density and quantum efficiency), so the rod
//! catch of a 1 s exposure is the R* per rod per flash. For a line at λ this is
//! R* = Q·τ(λ)·A_p/(π f²) · A_in·[1 − 10^(−D·S(λ))]·γ, Q the photons per µm² at the cornea
//! (`src/retina/catch.rs`). Human rods also get the published troland factors of the eye file
//! (R*/rod per scot td·s).
//!
//! **Saturation.** The saturating flash is the one whose rising phase suppresses 95 % of the
//! circulating current within 0.1 s, the criterion of [`crate::pigment::bleach::flash_response`]
//! (common practice, no source), under the Lamb & Pugh (1992) activation model with the
//! `[rod_response]` parameters of `src/data/pigments.toml`: Φ_sat = 2 ln 20 / (A·(0.1 s − t_eff)²).
//! The table's `saturating_level` is a steady rate (R*/rod/s), not a flash, and is not used.

use std::f64::consts::PI;

use uom::si::{ISQ, Quantity, SI};
use uom::typenum::{N2, P1, Z0};

use crate::base::curve::Curve;
use crate::base::error::{Error, Result};
use crate::base::quantity::{Length, PhotonKind, SiValue, Time, as_nm_f64, as_td_f64};
use crate::base::units::TrolandKind;
use crate::cornea::PlacedSource;
use crate::cornea::geometry::{Field, Geometry};
use crate::pigment::bleach::flash_response;
use crate::pigment::kinetics::{LevelUnit, builtin_pigments, find_pigment};
use crate::retina::eye::{Species, Status, builtin_eye};
use crate::retina::pupil::{Adaptation, Pupil, PupilRule, choose};
use crate::retina::report::{RetinaScenario, assess_retina};
use crate::spectrum::photometry::{photopic, scotopic};
use crate::spectrum::{Basis, Measure, Spectrum};

/// Luminous exposure of a luminance, cd·s·m⁻² (luminance × time).
pub type LuminousExposure = Quantity<ISQ<N2, Z0, P1, Z0, Z0, Z0, P1>, SI<f64>, f64>;

/// Kind marker for retinal exposure (troland-seconds), separating it from other cd·s.
pub trait RetinalExposureKind: uom::Kind {}

/// Retinal exposure, troland-seconds. Its SI value is in cd·s (1 td·s = 10⁻⁶ cd·s), as
/// [`crate::base::quantity::RetinalIlluminance`]; build and read it with [`troland_seconds`] and
/// [`as_td_s_f64`].
pub type RetinalExposure = Quantity<ISQ<Z0, Z0, P1, Z0, Z0, Z0, P1, dyn RetinalExposureKind>, SI<f64>, f64>;

/// Photon fluence, photons·m⁻² (counts are dimensionless).
pub type PhotonFluence = Quantity<ISQ<N2, Z0, Z0, Z0, Z0, Z0, Z0, dyn PhotonKind>, SI<f64>, f64>;

/// A retinal exposure of `td_s` troland-seconds.
pub fn troland_seconds(td_s: f64) -> RetinalExposure {
    RetinalExposure::from_si(td_s * 1e-6)
}

/// A retinal exposure in troland-seconds.
pub fn as_td_s_f64(h: RetinalExposure) -> f64 {
    h.si() * 1e6
}

/// Window within which a saturating flash suppresses 95 % of the current: the criterion of
/// [`crate::pigment::bleach::flash_response`] (common practice, no source).
pub const SATURATION_WINDOW_S: f64 = 0.1;

/// Half-width of the triangular line used for a monochromatic flash, nm: narrow enough that the
/// 1 nm weighting tables are read at the line's wavelength (exactly so at a whole nm).
pub const LINE_HALF_WIDTH_NM: f64 = 0.01;

/// A flash strength as given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FlashStrength {
    /// Photopic luminance × duration of a full field, cd·s/m².
    Luminous(LuminousExposure),
    /// Retinal exposure in troland-seconds of the stated kind.
    Retinal {
        /// Scotopic or photopic trolands.
        kind: TrolandKind,
        /// The exposure.
        exposure: RetinalExposure,
    },
    /// Photons per area at the cornea.
    Photons(PhotonFluence),
}

impl FlashStrength {
    /// The strength as written in reports, e.g. `0.01 cd·s/m²`.
    pub fn describe(&self) -> String {
        use crate::base::units::sig4;
        match self {
            FlashStrength::Luminous(h) => format!("{} cd·s/m²", sig4(h.si())),
            FlashStrength::Retinal { kind, exposure } => {
                format!("{} {}·s", sig4(as_td_s_f64(*exposure)), kind.symbol())
            }
            FlashStrength::Photons(q) => format!("{} photons/µm² at the cornea", sig4(q.si() * 1e-12)),
        }
    }
}

/// Unit spellings after [`normalise`]: luminous exposure (to cd·s/m²).
const LUMINOUS: &[(&str, f64)] = &[
    ("cds/m2", 1.0),
    ("cd/m2s", 1.0),
    ("cdsm-2", 1.0),
    ("cdm-2s", 1.0),
    ("mcds/m2", 1e-3),
    ("mcd/m2s", 1e-3),
    ("mcdsm-2", 1e-3),
];

/// Troland-second spellings after [`normalise`].
const RETINAL: &[(TrolandKind, &[&str])] = &[
    (TrolandKind::Scotopic, &["scottds", "scotopictds", "scottrolands", "scotopictrolands"]),
    (TrolandKind::Photopic, &["phottds", "photopictds", "phottrolands", "photopictrolands"]),
];

/// Photon-fluence spellings after [`normalise`] (to photons per m²).
const PHOTONS: &[(&str, f64)] = &[
    ("photons/um2", 1e12),
    ("photon/um2", 1e12),
    ("photonsum-2", 1e12),
    ("/um2", 1e12),
    ("um-2", 1e12),
    ("photons/mm2", 1e6),
    ("photonsmm-2", 1e6),
    ("photons/cm2", 1e4),
    ("photonscm-2", 1e4),
    ("photons/m2", 1.0),
    ("photonsm-2", 1.0),
];

/// Lowercase, without spaces and product signs, with superscripts and µ spelled in ASCII.
fn normalise(unit: &str) -> String {
    let mut s = String::new();
    for ch in unit.chars().flat_map(char::to_lowercase) {
        match ch {
            ' ' | '·' | '⋅' | '*' | '.' | '^' | '(' | ')' => {}
            '²' => s.push('2'),
            '⁻' => s.push('-'),
            '¹' => s.push('1'),
            'µ' | 'μ' => s.push('u'),
            _ => s.push(ch),
        }
    }
    s
}

/// The longest leading number of `text` and the rest, trimmed.
fn split_number(text: &str) -> Result<(f64, &str)> {
    let t = text.trim();
    let mut best = None;
    for end in t.char_indices().map(|(i, _)| i).skip(1).chain(std::iter::once(t.len())) {
        if let Ok(v) = t[..end].parse::<f64>() {
            best = Some((v, end));
        }
    }
    match best {
        Some((v, end)) if v.is_finite() => Ok((v, t[end..].trim())),
        Some(_) => Err(Error::input(format!("flash strength '{text}' is not a finite number"))),
        None => Err(Error::input(format!("flash strength '{text}' does not start with a number"))),
    }
}

/// Accepted forms, for messages.
const ACCEPTED: &str = "\"0.01 cd s/m2\" (photopic luminous exposure of a full field), \"5 scot td s\" or \
\"5 phot td s\" (troland-seconds), \"100 photons/um2\" (at the cornea)";

/// Parses a flash strength: `"0.01 cd s/m2"` (also `cd·s/m²`, `cd s m-2`, `mcd s/m2`),
/// `"5 scot td s"` or `"5 phot td s"` (also `scotopic td·s`), `"100 photons/um2"` (also
/// `photons/µm²`, `photons/mm2`, `photons/cm2`, `photons/m2`).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a missing or unknown unit, a bare `td s` (say which
/// trolands), or a value that is negative or not finite; the message lists the accepted forms.
pub fn parse_flash_strength(text: &str) -> Result<FlashStrength> {
    let (v, unit) = split_number(text)?;
    if unit.is_empty() {
        return Err(Error::input(format!("flash strength '{text}' has no unit; write it as {ACCEPTED}")));
    }
    if v < 0.0 {
        return Err(Error::input(format!("flash strength '{text}' must be ≥ 0")));
    }
    let u = normalise(unit);
    if let Some((_, f)) = LUMINOUS.iter().find(|(s, _)| *s == u) {
        return Ok(FlashStrength::Luminous(LuminousExposure::from_si(v * f)));
    }
    if let Some((kind, _)) = RETINAL.iter().find(|(_, s)| s.contains(&u.as_str())) {
        return Ok(FlashStrength::Retinal { kind: *kind, exposure: troland_seconds(v) });
    }
    if let Some((_, f)) = PHOTONS.iter().find(|(s, _)| *s == u) {
        return Ok(FlashStrength::Photons(PhotonFluence::from_si(v * f)));
    }
    if matches!(u.as_str(), "tds" | "trolands" | "trolandseconds" | "trolandsecond") {
        return Err(Error::input(format!(
            "flash strength '{text}': say which trolands: '{v} scot td s' (scotopic, rods) or '{v} phot td s' (photopic)"
        )));
    }
    Err(Error::input(format!("flash strength '{text}': unknown unit '{unit}'; write it as {ACCEPTED}")))
}

/// The spectral make-up of a flash.
#[derive(Debug, Clone, PartialEq)]
pub enum FlashSpectrum {
    /// A monochromatic flash (a triangular line [`LINE_HALF_WIDTH_NM`] wide either side).
    Line(Length),
    /// A spectrum's shape (its scale and measure are ignored).
    Shape(Spectrum),
}

impl FlashSpectrum {
    /// The relative spectral irradiance of the flash.
    fn shape(&self) -> Result<Spectrum> {
        match self {
            FlashSpectrum::Line(w) => {
                let nm = as_nm_f64(*w);
                if !(nm > 300.0 && nm < 900.0) {
                    return Err(Error::input(format!("wavelength {nm} nm: give one within 300–900 nm")));
                }
                let d = LINE_HALF_WIDTH_NM;
                let c = Curve::new(vec![nm - d, nm, nm + d], vec![0.0, 1.0, 0.0])?;
                Spectrum::new(
                    c,
                    Measure::Irradiance,
                    Basis::Energy,
                    format!("{} nm line", crate::base::units::tidy(nm)),
                )
            }
            FlashSpectrum::Shape(s) => Ok(s.clone().declared_as(Measure::Irradiance, s.basis())),
        }
    }

    /// In words, for reports.
    pub fn describe(&self) -> String {
        match self {
            FlashSpectrum::Line(w) => {
                format!("monochromatic, {} nm", crate::base::units::tidy(as_nm_f64(*w)))
            }
            FlashSpectrum::Shape(s) => format!("spectrum '{}'", s.label()),
        }
    }
}

/// What to convert.
#[derive(Debug, Clone, PartialEq)]
pub struct FlashRequest {
    /// Species of the eye (the built-in eye file).
    pub species: Species,
    /// The flash.
    pub strength: FlashStrength,
    /// Its spectrum.
    pub spectrum: FlashSpectrum,
    /// The pupil; `None` for the default ([`default_pupil`]).
    pub pupil: Option<PupilRule>,
    /// Add light through an unpigmented (albino) iris (rodents; an approximation).
    pub albino_iris: bool,
    /// Age (human ocular media).
    pub age: Option<Time>,
}

/// The default pupil for a flash: the eye file's dilated pupil (flash ERGs are recorded with
/// dilated pupils), or the dark-adapted one where the file has no dilated value (human).
pub fn default_pupil(species: Species) -> PupilRule {
    if builtin_eye(species).pupil.dilated.is_some() { PupilRule::Dilated } else { PupilRule::DarkAdapted }
}

/// R*/rod from scot td·s by a published factor (human rods).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TrolandFactorRoute {
    /// Name of the factor in the eye file.
    pub name: String,
    /// R*/rod per scot td·s.
    pub factor: f64,
    /// Its status.
    pub status: Status,
    /// Its source.
    pub source: String,
    /// R* per rod per flash by this route.
    pub r_star_per_rod: f64,
}

/// The saturating flash of a species' rods.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Saturation {
    /// The saturating flash, R*/rod.
    pub flash: f64,
    /// Amplification constant A used, s⁻².
    pub amplification_per_s2: f64,
    /// Effective delay t_eff.
    pub delay: Time,
    /// The weakest status of the inputs (the 0.1 s criterion is common practice, no source).
    pub status: Status,
    /// Basis in words.
    pub basis: String,
}

/// The saturating flash of `species`' rods (see the module text).
///
/// # Errors
/// [`crate::ErrorKind::UnknownName`] if the species has no rod in the pigment table.
pub fn saturating_flash(species: Species) -> Result<Saturation> {
    let pigment = find_pigment(&format!("{}-rod", species.name()))?;
    // One evaluation of the library's flash response gives A and t_eff as it uses them.
    let r = flash_response(&pigment, 1.0)?;
    let window = SATURATION_WINDOW_S - r.delay_s;
    let flash = 2.0 * 20f64.ln() / (r.amplification * window * window);
    let rr = &builtin_pigments().rod_response;
    let a = if species == Species::Human { &rr.human_amplification } else { &rr.rodent_amplification };
    let status = weakest([a.status, rr.effective_delay.status, Status::NoSource]);
    Ok(Saturation {
        flash,
        amplification_per_s2: r.amplification,
        delay: Time::from_si(r.delay_s),
        status,
        basis: format!(
            "Lamb & Pugh (1992) activation, A = {} s⁻² ({}), t_eff = {} ms ({}); saturating = 95 % of the current \
             suppressed within {} s (common practice, no source): Φ_sat = 2 ln 20 / (A (0.1 s − t_eff)²)",
            r.amplification,
            a.status,
            crate::base::units::tidy(r.delay_s * 1e3),
            rr.effective_delay.status,
            SATURATION_WINDOW_S
        ),
    })
}

/// The least trustworthy of some statuses.
fn weakest(list: impl IntoIterator<Item = Status>) -> Status {
    let rank = |s: Status| match s {
        Status::Confirmed => 0,
        Status::Derived => 1,
        Status::NoSource => 2,
        Status::FromMemory => 3,
    };
    list.into_iter().max_by_key(|s| rank(*s)).unwrap_or(Status::Confirmed)
}

/// A flash converted.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct FlashConversion {
    /// Species.
    pub species: Species,
    /// The flash as given, in words.
    pub given: String,
    /// The flash's spectrum, in words.
    pub spectrum: String,
    /// The pupil used.
    pub pupil: Pupil,
    /// Light-collecting area, mm² (pupil, plus the albino-iris term if asked for).
    pub collecting_area_mm2: f64,
    /// The flash as photopic luminous exposure of the full field, cd·s/m².
    pub luminous: f64,
    /// As scotopic troland-seconds (through the pupil).
    pub scotopic_td_s: f64,
    /// As photopic troland-seconds.
    pub photopic_td_s: f64,
    /// As photons per µm² at the cornea.
    pub photons_per_um2: f64,
    /// R* per rod per flash by the spectral route.
    pub r_star_per_rod: f64,
    /// Human rods: R*/rod by the eye file's published troland factors.
    pub troland_routes: Vec<TrolandFactorRoute>,
    /// Fraction of the rod pigment bleached by the flash, 1 − exp(−k·t) with the pigment
    /// table's Q_e (human) or pigment per rod (rodents).
    pub bleached_fraction: f64,
    /// The saturating flash.
    pub saturation: Saturation,
    /// R*/rod ÷ the saturating flash.
    pub fraction_of_saturation: f64,
    /// Cautions and provenance.
    pub notes: Vec<String>,
}

/// Converts a flash to R* per rod per flash through the species' eye (see the module text).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a pupil outside the species' range, a wavelength
/// outside 300–900 nm, or a spectrum with none of the quantity the flash is given in (a UV-only
/// spectrum has no luminance).
pub fn convert_flash(req: &FlashRequest) -> Result<FlashConversion> {
    let eye = builtin_eye(req.species);
    let rule = req.pupil.unwrap_or_else(|| default_pupil(req.species));
    let pupil = choose(eye, rule, &Adaptation { luminance: None, field: None, age: req.age, eyes: 2 })?;
    let a_p = pupil.area_mm2();
    let shape = req.spectrum.shape()?;
    let corneal = corneal_flash(req, &shape, a_p)?;
    let scenario = flash_view(req, eye, &pupil, corneal.clone());
    let report = assess_retina(&scenario)?;
    let source = &report.sources[0];
    let retinal =
        source.retinal.as_ref().ok_or_else(|| Error::input("the full-field flash has no radiance"))?;
    let r_star = source
        .level(LevelUnit::IsomerisationsPerSecond)
        .ok_or_else(|| Error::input(format!("the {} eye model has no rod", req.species.name())))?;
    let scot_td_s = as_td_f64(retinal.trolands.scotopic);
    let troland_routes = eye
        .rod_troland_factors
        .iter()
        .map(|(name, p)| TrolandFactorRoute {
            name: name.clone(),
            factor: p.value,
            status: p.status,
            source: p.source.clone(),
            r_star_per_rod: p.value * scot_td_s,
        })
        .collect();
    let pigment = find_pigment(&format!("{}-rod", req.species.name()))?;
    let dose = match pigment.level_unit {
        LevelUnit::ScotopicTrolands => scot_td_s,
        LevelUnit::PhotopicTrolands => as_td_f64(retinal.trolands.photopic),
        LevelUnit::IsomerisationsPerSecond => r_star,
    };
    let saturation = saturating_flash(req.species)?;
    let notes = flash_notes(req, eye, &pupil);
    Ok(FlashConversion {
        species: req.species,
        given: req.strength.describe(),
        spectrum: req.spectrum.describe(),
        collecting_area_mm2: report.collecting_area_mm2,
        luminous: photopic(&corneal).raw / PI,
        scotopic_td_s: scot_td_s,
        photopic_td_s: as_td_f64(retinal.trolands.photopic),
        photons_per_um2: corneal.to_photon().integral() * 1e-12,
        r_star_per_rod: r_star,
        troland_routes,
        bleached_fraction: -(-pigment.rate_of_level(dose)).exp_m1(),
        fraction_of_saturation: r_star / saturation.flash,
        saturation,
        notes,
        pupil,
    })
}

/// The corneal spectral irradiance whose 1 s integral is the flash (full field, E = πL), for
/// the flash's spectral `shape` and a pupil of `a_p` mm².
fn corneal_flash(req: &FlashRequest, shape: &Spectrum, a_p: f64) -> Result<Spectrum> {
    let (per_unit, target, what) = match req.strength {
        FlashStrength::Luminous(h) => (photopic(shape).raw / PI, h.si(), "luminance"),
        FlashStrength::Retinal { kind: TrolandKind::Scotopic, exposure } => {
            (scotopic(shape).raw / PI * a_p, as_td_s_f64(exposure), "scotopic luminance")
        }
        FlashStrength::Retinal { kind: TrolandKind::Photopic, exposure } => {
            (photopic(shape).raw / PI * a_p, as_td_s_f64(exposure), "luminance")
        }
        FlashStrength::Photons(q) => (shape.to_photon().integral(), q.si(), "photons"),
    };
    if !(per_unit > 0.0 && per_unit.is_finite()) {
        return Err(Error::input(format!(
            "the flash's {} has no {what} to scale to (it lies outside the weighting's band)",
            req.spectrum.describe()
        )));
    }
    shape.scaled_as(target / per_unit, Measure::Irradiance)
}

/// The eye of `req` seeing `corneal` as a full field through a fixed `pupil`.
fn flash_view(
    req: &FlashRequest,
    eye: &crate::retina::eye::Eye,
    pupil: &crate::retina::pupil::Pupil,
    corneal: Spectrum,
) -> RetinaScenario {
    RetinaScenario {
        eye: eye.clone(),
        sources: vec![PlacedSource {
            spectrum: corneal,
            geometry: Geometry::AtEye { field: Some(Field::FullField) },
            size: None,
            distance: None,
            assumption: None,
        }],
        filters: Vec::new(),
        pupil: PupilRule::Fixed(pupil.diameter),
        age: req.age,
        eyes: 2,
        field: None,
        adapting_luminance: None,
        albino_iris: req.albino_iris,
    }
}

/// What a reader of a flash conversion must know: the full-field and dose assumptions, and the
/// from-memory parameters the result rests on.
fn flash_notes(
    req: &FlashRequest,
    eye: &crate::retina::eye::Eye,
    pupil: &crate::retina::pupil::Pupil,
) -> Vec<String> {
    let mut notes = vec![
        "the flash is taken as a full field (Ganzfeld): corneal irradiance = π × luminance".to_string(),
        "R* are for dark-adapted, unbleached pigment, counted as a 1 s exposure of the same time integral (the \
         count does not depend on the flash duration)"
            .to_string(),
    ];
    // The rod's chain: every from-memory parameter but the cones'.
    let memory: Vec<String> = eye.from_memory().into_iter().filter(|k| !k.contains("cone")).collect();
    if !memory.is_empty() {
        notes.push(format!(
            "these {} eye parameters are from memory and affect R*: {}",
            req.species.name(),
            memory.join(", ")
        ));
    }
    if pupil.status == Status::FromMemory {
        let mm = pupil.diameter.si() * 1e3;
        notes.push(format!(
            "the {} mm pupil of the species table is from memory",
            crate::base::units::tidy(mm)
        ));
    }
    if req.albino_iris {
        notes.push("albino iris: light through the unpigmented iris is added (an approximation)".to_string());
    }
    notes
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_each_form_and_rejects_a_bare_troland() {
        let cases =
            [("0.01 cd s/m2", 0.01), ("0.01 cd·s/m²", 0.01), ("10 mcd s/m2", 0.01), ("0.01 cd s m-2", 0.01)];
        for (t, v) in cases {
            match parse_flash_strength(t).unwrap() {
                FlashStrength::Luminous(h) => assert!((h.si() - v).abs() < 1e-15, "{t}"),
                other => panic!("{t}: {other:?}"),
            }
        }
        assert!(matches!(
            parse_flash_strength("5 scot td s").unwrap(),
            FlashStrength::Retinal { kind: TrolandKind::Scotopic, .. }
        ));
        assert!(matches!(
            parse_flash_strength("5 scotopic td·s").unwrap(),
            FlashStrength::Retinal { kind: TrolandKind::Scotopic, .. }
        ));
        match parse_flash_strength("100 photons/µm²").unwrap() {
            FlashStrength::Photons(q) => assert!((q.si() - 1e14).abs() < 1.0),
            other => panic!("{other:?}"),
        }
        assert!(parse_flash_strength("5 td s").unwrap_err().message().contains("say which trolands"));
        assert!(parse_flash_strength("5").unwrap_err().message().contains("has no unit"));
        assert!(parse_flash_strength("5 lx").unwrap_err().message().contains("unknown unit 'lx'"));
        assert!(parse_flash_strength("-5 cd s/m2").unwrap_err().message().contains("≥ 0"));
    }

    #[test]
    fn the_saturating_flash_meets_the_bleach_module_criterion() {
        for species in [Species::Human, Species::Mouse, Species::Rat] {
            let sat = saturating_flash(species).unwrap();
            let p = find_pigment(&format!("{}-rod", species.name())).unwrap();
            assert!(flash_response(&p, sat.flash * 1.001).unwrap().saturating);
            assert!(!flash_response(&p, sat.flash * 0.999).unwrap().saturating);
        }
    }
}
