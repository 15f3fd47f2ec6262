//! From a placed source to the cornea: geometry (inverse-square and cosine laws, extended
//! sources) and the filters in the light path.
//!
//! [`at_cornea`] is the one function that places a source and applies every filter; the
//! retina, pigment, α-opic, guidance, housing and limits stages all start from its result.

pub mod filter;
pub mod geometry;

use crate::base::error::Result;
use crate::base::quantity::Length;
use crate::spectrum::Spectrum;
use filter::Filter;
use geometry::{Corneal, Geometry, corneal};

/// One source in place.
#[derive(Debug, Clone, PartialEq)]
pub struct PlacedSource {
    /// Its spectrum, with an absolute scale.
    pub spectrum: Spectrum,
    /// Where it is and how it radiates.
    pub geometry: Geometry,
    /// Its diameter, when given (lets an extended source be placed at another distance).
    pub size: Option<Length>,
    /// The distance from the source to the eye, when given (lets a measured irradiance be
    /// turned into an intensity for risk groups).
    pub distance: Option<Length>,
    /// An assumption the user stated about the source (an emission range), for every report.
    pub assumption: Option<String>,
}

/// How the note of a user's `emission_range` assumption begins.
pub const ASSUMPTION_NOTE: &str = "assumption stated by the user";

/// True for the notes about a source's data that a reader must see beside every figure made
/// from it: the user's stated assumption, and sampling too coarse for the spectrum (see
/// [`crate::spectrum::Spectrum::sampling_notes`]) or for a verdict near its limit.
pub fn is_data_note(note: &str) -> bool {
    note.starts_with(ASSUMPTION_NOTE)
        || note.contains("sampled too coarsely")
        || note.contains("coarser than")
}

/// What one source delivers at the cornea after every filter in `filters` (applied in order;
/// their transmittances multiply). The seen radiance, when known, passes the same filters.
///
/// # Errors
/// As [`corneal`] for impossible geometry; [`crate::ErrorKind::NotCovered`] when a spectral
/// filter does not overlap the spectrum.
pub fn at_cornea(source: &PlacedSource, filters: &[Filter]) -> Result<Corneal> {
    let mut c = corneal(&source.spectrum, &source.geometry)?;
    c.notes.extend(source.spectrum.sampling_notes());
    if let Some(a) = &source.assumption {
        c.notes.push(a.clone());
    }
    for f in filters {
        c.irradiance = f.apply(&c.irradiance)?;
        c.radiance = c.radiance.map(|l| f.apply(&l)).transpose()?;
    }
    Ok(c)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cornea::geometry::Field;
    use crate::spectrum::{photometry::photopic, scale::ScaleTarget, scale::scale_to, source::resolve};

    #[test]
    fn filters_multiply_on_irradiance_and_radiance_alike() {
        let s = resolve("cie:D65", None).unwrap();
        let s = scale_to(&s, ScaleTarget::parse("illuminance", "100 lx").unwrap()).unwrap();
        let p = PlacedSource {
            spectrum: s,
            geometry: Geometry::AtEye { field: Some(Field::FullField) },
            size: None,
            distance: None,
            assumption: None,
        };
        let f = [Filter::flat(0.5, "a").unwrap(), Filter::flat(0.2, "b").unwrap()];
        let c = at_cornea(&p, &f).unwrap();
        let bare = at_cornea(&p, &[]).unwrap();
        let ratio = |a: &Spectrum, b: &Spectrum| photopic(a).raw / photopic(b).raw;
        assert!((ratio(&c.irradiance, &bare.irradiance) - 0.1).abs() < 1e-12);
        let (l, l0) = (c.radiance.unwrap(), bare.radiance.unwrap());
        assert!((ratio(&l, &l0) - 0.1).abs() < 1e-12);
    }
}
