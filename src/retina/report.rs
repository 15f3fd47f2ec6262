//! The assessment of what one viewing situation delivers to the eye: corneal quantities,
//! retinal quantities and the catch per receptor, as plain data for the renderers.

use crate::base::error::{Error, Result};
use crate::base::quantity::{Angle, Length, Luminance, SiValue, Time, as_td_f64};
use crate::cornea::filter::Filter;
use crate::cornea::geometry::Corneal;
use crate::cornea::{PlacedSource, at_cornea};
use crate::retina::catch::{ReceptorCatch, SpeciesOpic, receptor_catch, species_alpha_opic};
use crate::retina::eye::{Eye, Species, Status};
use crate::retina::optics::{Trolands, collecting_area_mm2, image_size, retinal_irradiance, trolands_of};
use crate::retina::pupil::{Adaptation, Pupil, PupilRule, choose};
use crate::spectrum::photometry::{PhotometricResult, photopic};
use crate::spectrum::{PhotonTotal, Radiometric, Spectrum};
use crate::uncertainty::routes::{RodRateRecommendation, recommended_rod_rate};
use crate::weighting::alpha_opic::{AlphaOpicValue, alpha_opic};

/// Everything needed to assess one viewing situation.
#[derive(Debug, Clone, PartialEq)]
pub struct RetinaScenario {
    /// The eye model (a built-in one or a user's).
    pub eye: Eye,
    /// One or more sources; their corneal irradiances add.
    pub sources: Vec<PlacedSource>,
    /// Filters in the path, applied to every source.
    pub filters: Vec<Filter>,
    /// How the pupil is chosen.
    pub pupil: PupilRule,
    /// Age (human media and pupil formulas).
    pub age: Option<Time>,
    /// Eyes viewing (pupil formulas): 1 or 2.
    pub eyes: u8,
    /// Full angle of the adapting field (Watson & Yellott pupil), if not the source's.
    pub field: Option<Angle>,
    /// Adapting luminance (pupil formulas), if not the source's.
    pub adapting_luminance: Option<Luminance>,
    /// Add light through an unpigmented (albino) iris (rodents; an approximation).
    pub albino_iris: bool,
}

/// What the eye receives from one source.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SourceAtEye {
    /// Source name.
    pub label: String,
    /// Corneal spectral irradiance after every filter (not serialised: the `retina` command
    /// writes spectra as CSV).
    #[serde(skip)]
    pub corneal_irradiance: Spectrum,
    /// CIE S 026 α-opic quantities of this source alone (human eyes).
    pub human_alpha_opic: Vec<AlphaOpicValue>,
    /// Species α-opic quantities of this source alone (rodent eyes).
    pub species_opic: Vec<SpeciesOpic>,
    /// Corneal irradiance (radiant total).
    pub irradiance: Radiometric,
    /// Corneal photon irradiance.
    pub photon_irradiance: PhotonTotal,
    /// Corneal illuminance.
    pub illuminance: PhotometricResult,
    /// Seen radiance (radiant total), if known.
    pub radiance: Option<Radiometric>,
    /// Seen luminance, if known.
    pub luminance: Option<PhotometricResult>,
    /// True when the radiance was derived from an irradiance.
    pub radiance_derived: bool,
    /// Full angle of the source, if known.
    pub subtense: Option<Angle>,
    /// Retinal quantities, if the radiance is known.
    pub retinal: Option<Retinal>,
    /// How the radiance was obtained or why it is unknown.
    pub notes: Vec<String>,
}

impl SourceAtEye {
    /// The light level this source gives a receptor whose kinetics take `unit`: scotopic or
    /// photopic trolands, or the rod's R* per rod per second. `None` when the seen radiance is
    /// not known (no retinal quantities) or the eye has no rod.
    pub fn level(&self, unit: crate::pigment::kinetics::LevelUnit) -> Option<f64> {
        use crate::pigment::kinetics::LevelUnit;
        let r = self.retinal.as_ref()?;
        match unit {
            LevelUnit::ScotopicTrolands => Some(as_td_f64(r.trolands.scotopic)),
            LevelUnit::PhotopicTrolands => Some(as_td_f64(r.trolands.photopic)),
            LevelUnit::IsomerisationsPerSecond => {
                r.catch.iter().find(|c| c.receptor == "rod").map(|c| c.rate.si())
            }
        }
    }
}

/// Retinal quantities of one source.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Retinal {
    /// Retinal spectral irradiance (not serialised: the `retina` command writes it as CSV).
    #[serde(skip)]
    pub spectral_irradiance: Spectrum,
    /// Retinal irradiance (radiant total).
    pub irradiance: Radiometric,
    /// Retinal photon irradiance.
    pub photon_irradiance: PhotonTotal,
    /// Retinal illuminance in trolands.
    pub trolands: Trolands,
    /// Retinal image size (diameter), if the source's subtense is known.
    pub image_size: Option<Length>,
    /// Photoisomerisation rate per receptor class.
    pub catch: Vec<ReceptorCatch>,
    /// Human rod R*/rod/s: the recommended value and its spread between the routes.
    pub rod_rate: Option<RodRateRecommendation>,
}

/// The whole assessment.
#[derive(Debug, Clone, serde::Serialize)]
pub struct RetinaReport {
    /// Species of the eye.
    pub species: Species,
    /// Posterior nodal distance used.
    pub nodal_distance: Length,
    /// The pupil used.
    pub pupil: Pupil,
    /// Light-collecting area in mm² (pupil, plus the albino-iris term if asked for).
    pub collecting_area_mm2: f64,
    /// Filters applied, by name.
    pub filters: Vec<String>,
    /// Per source.
    pub sources: Vec<SourceAtEye>,
    /// Sum of all sources at the cornea (spectral irradiance; not serialised).
    #[serde(skip)]
    pub total_corneal: Spectrum,
    /// Total corneal illuminance.
    pub total_illuminance: PhotometricResult,
    /// CIE S 026 α-opic quantities of the total corneal irradiance (human eyes).
    pub human_alpha_opic: Vec<AlphaOpicValue>,
    /// Species α-opic quantities of the total corneal irradiance (rodent eyes).
    pub species_opic: Vec<SpeciesOpic>,
    /// Cautions and provenance a reader must see.
    pub notes: Vec<String>,
}

/// Assesses a scenario.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for no sources, impossible geometry, a spectrum whose
/// measure does not fit its geometry, or a pupil outside the species' range.
pub fn assess_retina(s: &RetinaScenario) -> Result<RetinaReport> {
    if s.sources.is_empty() {
        return Err(Error::input("a retinal assessment needs at least one source"));
    }
    let eye = &s.eye;
    let cornea = s.sources.iter().map(|src| at_cornea(src, &s.filters)).collect::<Result<Vec<Corneal>>>()?;
    let pupil = choose(eye, s.pupil, &adaptation(s, &cornea))?;
    let area = collecting_area_mm2(eye, &pupil, s.albino_iris);
    let human = eye.species == Species::Human;
    let sources = s
        .sources
        .iter()
        .zip(&cornea)
        .map(|(src, c)| source_at_eye(s, src, c, &pupil, area))
        .collect::<Result<Vec<_>>>()?;
    let total = Spectrum::sum(&cornea.iter().map(|c| c.irradiance.clone()).collect::<Vec<_>>())?;
    let notes = report_notes(s, &cornea, &sources, &pupil);
    Ok(RetinaReport {
        species: eye.species,
        nodal_distance: eye.nodal_distance.value,
        pupil,
        collecting_area_mm2: area,
        filters: s.filters.iter().map(|f| f.label().to_string()).collect(),
        total_illuminance: photopic(&total),
        human_alpha_opic: if human { alpha_opic(&total) } else { Vec::new() },
        species_opic: if human { Vec::new() } else { species_alpha_opic(&total, eye) },
        total_corneal: total,
        sources,
        notes,
    })
}

/// The adapting luminance and field for pupil formulas: as given, or the brightest seen source.
fn adaptation(s: &RetinaScenario, cornea: &[Corneal]) -> Adaptation {
    let brightest = cornea
        .iter()
        .filter_map(|c| c.radiance.as_ref().map(|l| (photopic(l).raw, c.subtense)))
        .fold(None, |best: Option<(f64, Option<Angle>)>, x| match best {
            Some(b) if b.0 >= x.0 => Some(b),
            _ => Some(x),
        });
    Adaptation {
        luminance: s
            .adapting_luminance
            .or(brightest.map(|b| Luminance::new::<uom::si::luminance::candela_per_square_meter>(b.0))),
        field: s.field.or(brightest.and_then(|b| b.1)),
        age: s.age,
        eyes: s.eyes,
    }
}

/// Retinal quantities of a seen spectral radiance `l` through `pupil` (collecting `area_mm2`).
fn retinal(s: &RetinaScenario, l: &Spectrum, c: &Corneal, pupil: &Pupil, area_mm2: f64) -> Result<Retinal> {
    let eye = &s.eye;
    let spectral = retinal_irradiance(l, eye, area_mm2, s.age)?;
    let td = trolands_of(l, pupil);
    let catch = receptor_catch(l, eye, area_mm2, s.age, as_td_f64(td.scotopic));
    let mut out = Retinal {
        irradiance: spectral
            .radiometric_total()
            .ok_or_else(|| Error::input("retinal spectrum has no scale"))?,
        photon_irradiance: spectral
            .photon_total()
            .ok_or_else(|| Error::input("retinal spectrum has no scale"))?,
        spectral_irradiance: spectral,
        trolands: td,
        image_size: c.subtense.map(|a| image_size(eye, a.si())),
        catch,
        rod_rate: None,
    };
    if eye.species == Species::Human {
        out.rod_rate = recommended_rod_rate(l.label(), &out);
    }
    Ok(out)
}

/// What one source delivers: corneal totals, its own α-opic quantities and, when the seen
/// radiance is known, the retinal quantities.
fn source_at_eye(
    s: &RetinaScenario,
    src: &PlacedSource,
    c: &Corneal,
    pupil: &Pupil,
    area_mm2: f64,
) -> Result<SourceAtEye> {
    let human = s.eye.species == Species::Human;
    let no_scale = || Error::input("corneal spectrum has no scale");
    Ok(SourceAtEye {
        label: src.spectrum.label().to_string(),
        corneal_irradiance: c.irradiance.clone(),
        human_alpha_opic: if human { alpha_opic(&c.irradiance) } else { Vec::new() },
        species_opic: if human { Vec::new() } else { species_alpha_opic(&c.irradiance, &s.eye) },
        irradiance: c.irradiance.radiometric_total().ok_or_else(no_scale)?,
        photon_irradiance: c.irradiance.photon_total().ok_or_else(no_scale)?,
        illuminance: photopic(&c.irradiance),
        radiance: c.radiance.as_ref().and_then(Spectrum::radiometric_total),
        luminance: c.radiance.as_ref().map(photopic),
        radiance_derived: c.radiance_derived,
        subtense: c.subtense,
        retinal: c.radiance.as_ref().map(|l| retinal(s, l, c, pupil, area_mm2)).transpose()?,
        notes: c.notes.clone(),
    })
}

/// The cautions and provenance a reader must see beside the figures.
fn report_notes(
    s: &RetinaScenario,
    cornea: &[Corneal],
    sources: &[SourceAtEye],
    pupil: &Pupil,
) -> Vec<String> {
    let eye = &s.eye;
    let human = eye.species == Species::Human;
    let mut notes = Vec::new();
    let ranges: Vec<(f64, f64)> = cornea.iter().map(|c| c.irradiance.range_nm()).collect();
    if ranges.windows(2).any(|w| w[0] != w[1]) {
        notes.push(format!(
            "the sources' spectra cover different ranges ({}); the total takes each source as emitting nothing outside \
             its own range",
            cornea
                .iter()
                .map(|c| format!("{} {}–{} nm", c.irradiance.label(), c.irradiance.range_nm().0, c.irradiance.range_nm().1))
                .collect::<Vec<_>>()
                .join("; ")
        ));
    }
    if s.sources.len() > 1 {
        notes.push(
            "corneal quantities add over the sources; retinal quantities are per source, because the images \
             of different sources fall on different parts of the retina"
                .to_string(),
        );
    }
    if sources.iter().any(|x| x.retinal.is_some()) {
        notes.push(
            "R* rates are for dark-adapted, unbleached pigment; bleaching lowers them at high levels and is not \
             modelled here"
                .to_string(),
        );
    }
    let saturating =
        sources.iter().filter_map(|x| x.retinal.as_ref()).any(|r| as_td_f64(r.trolands.scotopic) > 1000.0);
    if human && saturating {
        notes.push(
            "above about 3 log scotopic trolands human rods saturate (common practice, no source): the rod rate is \
             a photon count, not a signal"
                .to_string(),
        );
    }
    provenance_notes(s, pupil, &mut notes);
    notes
}

fn provenance_notes(s: &RetinaScenario, pupil: &Pupil, notes: &mut Vec<String>) {
    let eye = &s.eye;
    let memory = eye.from_memory();
    if !memory.is_empty() {
        notes.push(format!(
            "these {} eye parameters are from memory and affect the results: {}",
            eye.species.name(),
            memory.join(", ")
        ));
    }
    if pupil.status == Status::FromMemory {
        notes.push(format!("the pupil ({}) is from memory", pupil.basis));
    }
    if s.albino_iris {
        notes.push(
            "albino iris: light through the unpigmented iris is added as T_iris × (iris area − pupil area), \
             an approximation with a from-memory iris transmittance"
                .to_string(),
        );
    }
    if eye.species != Species::Human {
        notes.push(
            "rodent α-opic quantities are retidose's method (lens-filtered Govardovskii templates, peak 1, photon \
             basis, equivalent daylight relative to CIE D65 by analogy with CIE S 026): not a CIE quantity"
                .to_string(),
        );
    }
}
