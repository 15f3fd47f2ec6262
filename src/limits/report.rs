//! The assessment of one source against one limit set, as plain data for the renderers.

use crate::base::error::Result;
use crate::base::quantity::{SiValue, Time};
use crate::cornea::PlacedSource;
use crate::cornea::filter::Filter;
use crate::cornea::geometry::{Emission, Geometry};
use crate::cornea::{at_cornea, is_data_note};
use crate::limits::risk::explain_exposure_check;
use crate::limits::{
    Classification, Exposure, HazardResult, LimitSet, MovableSource, Verdict, classify, evaluate_set,
};
use crate::spectrum::Measure;

/// The caution every limits output starts with.
pub const LIMITS_CAUTION: &str = "These limits apply to humans. They are guidance values, not a certification: defer to \
the standard's own text, a qualified optical-radiation safety officer and local regulation.";

/// What to assess.
#[derive(Debug, Clone)]
pub struct LimitsRequest<'a> {
    /// The source in place (its distance or field as seen by the exposed person).
    pub source: &'a PlacedSource,
    /// Filters in the path (spectacles, screens).
    pub filters: &'a [Filter],
    /// The limit set.
    pub set: &'a LimitSet,
    /// Exposure duration.
    pub duration: Time,
    /// Evaluate the opt-in hazards (aphakic eyes, infants).
    pub aphakic: bool,
    /// Classify into IEC 62471 risk groups (`Some(general_lighting)`).
    pub classify: Option<bool>,
    /// Evaluate only these hazards (ids); empty for all.
    pub only: &'a [String],
}

/// The assessment.
#[derive(Debug, Clone, serde::Serialize)]
pub struct LimitsAssessment {
    /// Set id.
    pub set_id: String,
    /// Document and edition.
    pub document: String,
    /// Edition.
    pub edition: String,
    /// Errata applied.
    pub errata: String,
    /// Exposure duration.
    pub duration: Time,
    /// Source name.
    pub source: String,
    /// Spectrum range, nm.
    pub range_nm: (f64, f64),
    /// Per hazard.
    pub hazards: Vec<HazardResult>,
    /// Risk groups, if asked for and possible.
    #[serde(serialize_with = "classification_json")]
    pub classification: Option<std::result::Result<Classification, String>>,
    /// Hazards not assessed or resting on from-memory values, and the set's notes.
    pub notes: Vec<String>,
}

/// The source as one that can be placed at any distance: a spectral intensity, a radiance
/// with its size, a flux as its on-axis intensity, or an irradiance measured at a known
/// distance turned into an intensity by
/// the inverse-square law (I = E·d²; valid when the distance is several times the source's size).
/// The filters of the lamp system go with it.
pub fn movable_source(
    source: &PlacedSource,
    filters: &[Filter],
) -> std::result::Result<MovableSource, String> {
    let s = &source.spectrum;
    let size = match &source.geometry {
        Geometry::Intensity { size, .. } | Geometry::Flux { size, .. } => *size,
        Geometry::Extended { .. } | Geometry::AtEye { .. } => None,
    }
    .or(source.size);
    let spectrum = match (s.measure(), source.distance) {
        (Measure::Intensity | Measure::Radiance, _) => s.clone(),
        (Measure::Irradiance, Some(d)) => {
            let d = d.si();
            s.scaled_as(d * d, Measure::Intensity).map_err(|e| e.to_string())?
        }
        // A lamp's flux as the intensity on its axis: Φ/π for a Lambertian emitter (its
        // brightest direction), Φ/4π for an isotropic one.
        (Measure::Flux, _) => {
            let per_sr = match &source.geometry {
                Geometry::Flux { emission: Emission::Lambertian, .. } => 1.0 / std::f64::consts::PI,
                _ => 1.0 / (4.0 * std::f64::consts::PI),
            };
            s.scaled_as(per_sr, Measure::Intensity).map_err(|e| e.to_string())?
        }
        (m, _) => {
            return Err(format!(
                "risk groups need the source as a spectral intensity, a radiance with its size, or an irradiance with \
                 the distance it was measured at, so it can be placed at the assessment distance; this one is a \
                 spectral {}",
                m.name()
            ));
        }
    };
    Ok(MovableSource { spectrum, size, filters: filters.to_vec() })
}

/// Serialises a classification as `{"classified": …}` or `{"not_classified": "reason"}`.
fn classification_json<S: serde::Serializer>(
    c: &Option<std::result::Result<Classification, String>>,
    s: S,
) -> std::result::Result<S::Ok, S::Error> {
    use serde::ser::SerializeMap;
    match c {
        None => s.serialize_none(),
        Some(r) => {
            let mut m = s.serialize_map(Some(1))?;
            match r {
                Ok(c) => m.serialize_entry("classified", c)?,
                Err(why) => m.serialize_entry("not_classified", why)?,
            }
            m.end()
        }
    }
}

/// The duration must be above 0 s, and every hazard asked for must be in the set.
fn check_request(r: &LimitsRequest<'_>) -> Result<()> {
    let t = r.duration.si();
    if !(t > 0.0 && t.is_finite()) {
        return Err(crate::Error::input(format!("exposure duration {t} s must be above 0 s")));
    }
    if let Some(missing) = r.only.iter().find(|id| r.set.hazard(id).is_none()) {
        return Err(crate::Error::input(format!(
            "the set '{}' has no hazard '{missing}'; it has: {}",
            r.set.id,
            r.set.hazards.iter().map(|h| h.id.as_str()).collect::<Vec<_>>().join(", ")
        )));
    }
    Ok(())
}

/// The notes of a check, in order: what was not assessed, the set's notes, the source's data
/// notes, sampling near a limit, from-memory values, stricter choices and the filters applied.
fn limit_notes(
    r: &LimitsRequest<'_>,
    hazards: &[HazardResult],
    source_notes: impl Iterator<Item = String>,
) -> Vec<String> {
    let mut notes = r.set.notes.clone();
    notes.extend(source_notes);
    if hazards.iter().any(|h| h.near_limit_on_coarse_spectrum) {
        notes.push(format!(
            "a verdict lies within 20 % of its limit on a spectrum sampled coarser than {} nm: the sampling alone could \
             move it across the limit; measure at a finer spacing",
            crate::spectrum::COARSE_STEP_NM
        ));
    }
    let unassessed: Vec<&str> = hazards
        .iter()
        .filter(|h| matches!(h.verdict, Verdict::NotAssessed(_)))
        .map(|h| h.name.as_str())
        .collect();
    if !unassessed.is_empty() {
        notes.insert(
            0,
            format!(
                "NOT ASSESSED (no verdict, not \"safe\"): {}; see each hazard's reason",
                unassessed.join("; ")
            ),
        );
    }
    if hazards.iter().any(|h| !h.from_memory.is_empty()) {
        notes.push(
            "verdicts marked [from memory] rest on values not checked against the published text".to_string(),
        );
    }
    if hazards.iter().any(|h| !h.stricter_choices.is_empty()) {
        notes.push(
            "where the sources leave a value open between candidates, the stricter is used; each hazard lists \
             the ones it used (stricter choices)"
                .to_string(),
        );
    }
    if !r.filters.is_empty() {
        notes.push(format!(
            "filters applied: {}",
            r.filters.iter().map(Filter::label).collect::<Vec<_>>().join(", ")
        ));
    }
    notes
}

/// The IEC 62471 classification of the source, with a note comparing it with the exposure
/// check, or why it could not be made.
fn classification(
    r: &LimitsRequest<'_>,
    hazards: &[HazardResult],
    general: bool,
) -> std::result::Result<Classification, String> {
    let from_irradiance = r.source.spectrum.measure() == Measure::Irradiance;
    let m = movable_source(r.source, r.filters)?;
    let mut c = classify(r.set, &m, general).map_err(|e| e.to_string())?;
    explain_exposure_check(&mut c, hazards, r.duration.si());
    if from_irradiance {
        c.notes.push(
            "classified from the irradiance measured at the stated distance, as an intensity I = E·d² \
             (inverse-square law; valid when the distance is several times the source's size)"
                .to_string(),
        );
    }
    Ok(c)
}

/// Assesses a source against a set.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for impossible geometry or a duration not above 0 s.
pub fn assess_limits(r: &LimitsRequest<'_>) -> Result<LimitsAssessment> {
    check_request(r)?;
    let c = at_cornea(r.source, r.filters)?;
    let e = Exposure::of(&c, r.duration, r.aphakic);
    let hazards: Vec<HazardResult> =
        evaluate_set(r.set, &e).into_iter().filter(|h| r.only.is_empty() || r.only.contains(&h.id)).collect();
    let source_notes = c.notes.iter().filter(|n| is_data_note(n)).cloned();
    let notes = limit_notes(r, &hazards, source_notes);
    let classification = r.classify.map(|general| classification(r, &hazards, general));
    Ok(LimitsAssessment {
        set_id: r.set.id.clone(),
        document: r.set.document.clone(),
        edition: r.set.edition.clone(),
        errata: r.set.errata.clone(),
        duration: r.duration,
        source: r.source.spectrum.label().to_string(),
        range_nm: c.irradiance.range_nm(),
        hazards,
        classification,
        notes,
    })
}
