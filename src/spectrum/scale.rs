//! Giving a spectrum an absolute scale from one measured quantity.
//!
//! The spectrum is multiplied by k = target / current, where "current" is the same quantity
//! computed from the spectrum (for a relative shape, in relative units). An illuminance,
//! irradiance or photon irradiance makes a spectral irradiance; a luminance or radiance makes a
//! spectral radiance. Photometric targets use only the covered part of V(λ), which the result's
//! coverage reports.

use uom::si::illuminance::lux;
use uom::si::luminance::candela_per_square_meter;

use crate::base::error::{Error, Result};
use crate::base::quantity::{
    Illuminance, Irradiance, Luminance, LuminousFlux, LuminousIntensity, PhotonIrradiance, Power, Radiance,
    SiValue,
};
use crate::spectrum::photometry::photopic;
use crate::spectrum::{Measure, Spectrum};

/// A measured quantity to scale a spectrum to.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ScaleTarget {
    /// Illuminance at the plane of interest (gives a spectral irradiance).
    Illuminance(Illuminance),
    /// Luminance of the source (gives a spectral radiance).
    Luminance(Luminance),
    /// Irradiance over the spectrum's sampled range (gives a spectral irradiance).
    Irradiance(Irradiance),
    /// Photon irradiance over the spectrum's sampled range (gives a spectral irradiance).
    PhotonIrradiance(PhotonIrradiance),
    /// Radiance over the spectrum's sampled range (gives a spectral radiance).
    Radiance(Radiance),
    /// Luminous intensity of a small source (gives a spectral radiant intensity).
    LuminousIntensity(LuminousIntensity),
    /// Luminous flux of a lamp (gives a spectral radiant flux).
    LuminousFlux(LuminousFlux),
    /// Radiant flux over the sampled range (gives a spectral radiant flux).
    RadiantFlux(Power),
}

impl ScaleTarget {
    /// True when the target is a photopic quantity (lx, cd/m², cd, lm): the spectrum's V(λ)
    /// total then is the reading itself, whatever the spectrum's coverage.
    pub fn is_photopic(&self) -> bool {
        matches!(
            self,
            ScaleTarget::Illuminance(_)
                | ScaleTarget::Luminance(_)
                | ScaleTarget::LuminousIntensity(_)
                | ScaleTarget::LuminousFlux(_)
        )
    }

    /// The measure the scaled spectrum will have.
    pub fn measure(&self) -> Measure {
        match self {
            ScaleTarget::Illuminance(_) | ScaleTarget::Irradiance(_) | ScaleTarget::PhotonIrradiance(_) => {
                Measure::Irradiance
            }
            ScaleTarget::Luminance(_) | ScaleTarget::Radiance(_) => Measure::Radiance,
            ScaleTarget::LuminousIntensity(_) => Measure::Intensity,
            ScaleTarget::LuminousFlux(_) | ScaleTarget::RadiantFlux(_) => Measure::Flux,
        }
    }

    /// A description for reports, e.g. `illuminance 300 lx`.
    pub fn describe(&self) -> String {
        match self {
            ScaleTarget::Illuminance(q) => format!("illuminance {} lx", q.get::<lux>()),
            ScaleTarget::Luminance(q) => format!("luminance {} cd/m²", q.get::<candela_per_square_meter>()),
            ScaleTarget::Irradiance(q) => format!("irradiance {} W/m²", q.si()),
            ScaleTarget::PhotonIrradiance(q) => format!("photon irradiance {:e} photons·s⁻¹·m⁻²", q.si()),
            ScaleTarget::Radiance(q) => format!("radiance {} W·m⁻²·sr⁻¹", q.si()),
            ScaleTarget::LuminousIntensity(q) => format!("luminous intensity {} cd", q.si()),
            ScaleTarget::LuminousFlux(q) => format!("luminous flux {} lm", q.si()),
            ScaleTarget::RadiantFlux(q) => format!("radiant flux {} W", q.si()),
        }
    }

    fn target_si(&self) -> f64 {
        match self {
            ScaleTarget::Illuminance(q) => q.get::<lux>(),
            ScaleTarget::Luminance(q) => q.get::<candela_per_square_meter>(),
            ScaleTarget::Irradiance(q) => q.si(),
            ScaleTarget::PhotonIrradiance(q) => q.si(),
            ScaleTarget::Radiance(q) => q.si(),
            ScaleTarget::LuminousIntensity(q) => q.si(),
            ScaleTarget::LuminousFlux(q) => q.si(),
            ScaleTarget::RadiantFlux(q) => q.si(),
        }
    }
}

/// The names of the measured quantities a spectrum can be scaled to, as used for keys and flags.
pub const SCALE_KEYS: [&str; 8] = [
    "illuminance",
    "luminance",
    "irradiance",
    "photon_irradiance",
    "radiance",
    "luminous_intensity",
    "luminous_flux",
    "radiant_flux",
];

impl ScaleTarget {
    /// Parses `value` (with its unit) as the quantity named by `key` (one of [`SCALE_KEYS`];
    /// dashes and underscores are the same).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for an unknown key, or the unit parser's error.
    pub fn parse(key: &str, value: &str) -> Result<ScaleTarget> {
        use crate::base::units as u;
        Ok(match key.replace('-', "_").as_str() {
            "illuminance" => ScaleTarget::Illuminance(u::parse_illuminance(value)?),
            "luminance" => ScaleTarget::Luminance(u::parse_luminance(value)?),
            "irradiance" => ScaleTarget::Irradiance(u::parse_irradiance(value)?),
            "photon_irradiance" => ScaleTarget::PhotonIrradiance(u::parse_photon_irradiance(value)?),
            "radiance" => ScaleTarget::Radiance(u::parse_radiance(value)?),
            "luminous_intensity" => ScaleTarget::LuminousIntensity(u::parse_luminous_intensity(value)?),
            "luminous_flux" => ScaleTarget::LuminousFlux(u::parse_luminous_flux(value)?),
            "radiant_flux" => ScaleTarget::RadiantFlux(u::parse_power(value)?),
            _ => {
                return Err(Error::input(format!(
                    "unknown measured quantity '{key}'; expected one of {}",
                    SCALE_KEYS.join(", ")
                )));
            }
        })
    }
}

/// Scales `spectrum` so that it reproduces `target`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] if the target is negative or not finite, if the spectrum's
/// measure cannot give the target (an irradiance spectrum cannot reproduce a luminance), or if
/// the spectrum has none of the quantity (a UV-only spectrum has no illuminance to scale).
pub fn scale_to(spectrum: &Spectrum, target: ScaleTarget) -> Result<Spectrum> {
    let measure = target.measure();
    if spectrum.measure() != Measure::Relative && spectrum.measure() != measure {
        return Err(Error::input(format!(
            "a spectral {} cannot be scaled to match the {}; that needs a spectral {} or a relative spectrum",
            spectrum.measure().name(),
            target.describe(),
            measure.name()
        )));
    }
    let wanted = target.target_si();
    if !(wanted.is_finite() && wanted >= 0.0) {
        return Err(Error::input(format!("scaling target {} must be a finite value ≥ 0", target.describe())));
    }
    let current = match target {
        ScaleTarget::Illuminance(_)
        | ScaleTarget::Luminance(_)
        | ScaleTarget::LuminousIntensity(_)
        | ScaleTarget::LuminousFlux(_) => photopic(spectrum).raw,
        ScaleTarget::Irradiance(_) | ScaleTarget::Radiance(_) | ScaleTarget::RadiantFlux(_) => {
            spectrum.to_energy().integral()
        }
        ScaleTarget::PhotonIrradiance(_) => spectrum.to_photon().integral(),
    };
    if current.is_nan() || current <= 0.0 {
        return Err(Error::input(format!(
            "cannot scale '{}' to {}: the spectrum has none of that quantity over {}–{} nm",
            spectrum.label(),
            target.describe(),
            spectrum.range_nm().0,
            spectrum.range_nm().1
        )));
    }
    spectrum.scaled_as(wanted / current, measure)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::base::units::{parse_illuminance, parse_luminance, parse_photon_irradiance};
    use crate::spectrum::generate::{Grid, cie_illuminant_a};

    #[test]
    fn scaled_spectrum_reproduces_the_target() {
        let a = cie_illuminant_a(Grid::nm(360.0, 830.0, 1.0)).unwrap();
        let s = scale_to(&a, ScaleTarget::Illuminance(parse_illuminance("300 lx").unwrap())).unwrap();
        assert_eq!(s.measure(), Measure::Irradiance);
        assert!((photopic(&s).value.unwrap().si_value() - 300.0).abs() < 1e-9);
        let q = scale_to(
            &a,
            ScaleTarget::PhotonIrradiance(parse_photon_irradiance("1e18 photons/m2/s").unwrap()),
        )
        .unwrap();
        assert!((q.to_photon().integral() / 1e18 - 1.0).abs() < 1e-12);
    }

    #[test]
    fn measure_mismatch_and_empty_bands_are_errors() {
        let a = cie_illuminant_a(Grid::nm(360.0, 830.0, 1.0)).unwrap();
        let e = scale_to(&a, ScaleTarget::Illuminance(parse_illuminance("300 lx").unwrap())).unwrap();
        let err = scale_to(&e, ScaleTarget::Luminance(parse_luminance("100 cd/m2").unwrap())).unwrap_err();
        assert!(err.message().contains("cannot be scaled"), "{err}");
        let uv = cie_illuminant_a(Grid::nm(300.0, 350.0, 1.0)).unwrap();
        assert!(scale_to(&uv, ScaleTarget::Illuminance(parse_illuminance("1 lx").unwrap())).is_err());
    }
}
