//! Photopic and scotopic photometry (CIE 018:2019, the CIE photometric system).
//!
//! X_v = K_m ∫ X_e,λ V(λ) dλ  and  X′_v = K′_m ∫ X_e,λ V′(λ) dλ,
//!
//! with K_m = 683.002 lm/W and K′_m = 1700.06 lm/W, V(λ) (CIE 1924, 360–830 nm) and V′(λ)
//! (CIE 1951, 380–780 nm) from the embedded 1 nm tables, and the integration rule of
//! [`crate::base::curve`]. The luminous quantity matches the spectrum's measure: radiance gives
//! luminance (cd/m²), irradiance illuminance (lx), intensity luminous intensity (cd), flux
//! luminous flux (lm).

use uom::si::illuminance::lux;
use uom::si::luminance::candela_per_square_meter;
use uom::si::luminous_intensity::candela;

use crate::base::constants::{K_M_PHOTOPIC_LM_PER_W, K_M_SCOTOPIC_LM_PER_W};
use crate::base::data::tables;
use crate::base::quantity::{
    Illuminance, Luminance, LuminousEfficacy, LuminousFlux, LuminousIntensity, SiValue,
};
use crate::spectrum::{Coverage, Measure, Spectrum};

/// A photometric quantity, typed by what the spectrum measures.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Photometric {
    /// Luminance, cd/m².
    Luminance(Luminance),
    /// Illuminance, lx.
    Illuminance(Illuminance),
    /// Luminous intensity, cd.
    Intensity(LuminousIntensity),
    /// Luminous flux, lm.
    Flux(LuminousFlux),
}

impl Photometric {
    /// Wraps a value in lm-based SI units (cd/m², lx, cd, lm) as the quantity `measure` calls
    /// for; `None` for a relative spectrum.
    pub fn from_si(measure: Measure, value: f64) -> Option<Self> {
        Some(match measure {
            Measure::Radiance => Photometric::Luminance(Luminance::new::<candela_per_square_meter>(value)),
            Measure::Irradiance => Photometric::Illuminance(Illuminance::new::<lux>(value)),
            Measure::Intensity => Photometric::Intensity(LuminousIntensity::new::<candela>(value)),
            Measure::Flux => Photometric::Flux(LuminousFlux::from_si(value)),
            Measure::Relative => return None,
        })
    }

    /// The value in its SI unit and that unit's symbol, for renderers.
    pub fn si_with_unit(&self) -> (f64, &'static str) {
        match self {
            Photometric::Luminance(q) => (q.get::<candela_per_square_meter>(), "cd/m²"),
            Photometric::Illuminance(q) => (q.get::<lux>(), "lx"),
            Photometric::Intensity(q) => (q.get::<candela>(), "cd"),
            Photometric::Flux(q) => (q.si(), "lm"),
        }
    }

    /// The value in its SI unit.
    pub fn si_value(&self) -> f64 {
        self.si_with_unit().0
    }
}

/// A photometric result with the coverage of the luminous efficiency function.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct PhotometricResult {
    /// The luminous quantity; `None` for a relative spectrum.
    pub value: Option<Photometric>,
    /// K·∫X_e,λ·V dλ in lm-based SI units, also for a relative spectrum (relative units).
    pub raw: f64,
    /// How much of V(λ) or V′(λ) the spectrum covers.
    pub coverage: Coverage,
}

fn weighted(spectrum: &Spectrum, scotopic: bool) -> PhotometricResult {
    let t = tables();
    let (curve, k) =
        if scotopic { (&t.v_prime, K_M_SCOTOPIC_LM_PER_W) } else { (&t.v, K_M_PHOTOPIC_LM_PER_W) };
    let energy = spectrum.to_energy();
    let (integral, coverage) = energy.weighted(curve);
    let raw = k * integral;
    PhotometricResult { value: Photometric::from_si(spectrum.measure(), raw), raw, coverage }
}

/// Photopic luminous quantity, K_m ∫ X_e,λ V(λ) dλ.
pub fn photopic(spectrum: &Spectrum) -> PhotometricResult {
    weighted(spectrum, false)
}

/// Scotopic luminous quantity, K′_m ∫ X_e,λ V′(λ) dλ.
pub fn scotopic(spectrum: &Spectrum) -> PhotometricResult {
    weighted(spectrum, true)
}

/// Scotopic-to-photopic ratio S/P = K′_m ∫X V′ / (K_m ∫X V); unit-free, so defined for
/// relative spectra too. `None` if the spectrum has no photopic content.
pub fn sp_ratio(spectrum: &Spectrum) -> Option<f64> {
    let p = photopic(spectrum).raw;
    (p > 0.0).then(|| scotopic(spectrum).raw / p)
}

/// Luminous efficacy of radiation K_m ∫X V dλ / ∫X dλ over the spectrum's sampled range
/// (the whole range, so a spectrum that stops at 780 nm excludes its infrared).
/// `None` if the spectrum carries no power.
pub fn luminous_efficacy(spectrum: &Spectrum) -> Option<LuminousEfficacy> {
    let radiant = spectrum.to_energy().integral();
    (radiant > 0.0).then(|| LuminousEfficacy::from_si(photopic(spectrum).raw / radiant))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::base::curve::Curve;
    use crate::spectrum::Basis;

    fn line(nm: f64, measure: Measure) -> Spectrum {
        // A 1 W·nm⁻¹-high triangle of width 2 nm around `nm` carries 1 W (per m², sr…).
        let c = Curve::new(vec![nm - 1.0, nm, nm + 1.0], vec![0.0, 1.0, 0.0]).unwrap();
        Spectrum::new(c, measure, Basis::Energy, "line").unwrap()
    }

    #[test]
    fn one_watt_at_555_nm_gives_about_683_lumens() {
        // CIE 018:2019: 1 W at 555 nm gives K_m V(555) = 683.002 lm; the 2 nm triangle
        // averages V over 554–556 nm, so the result is within 0.02 %.
        let r = photopic(&line(555.0, Measure::Flux));
        let (v, unit) = r.value.unwrap().si_with_unit();
        assert_eq!(unit, "lm");
        assert!((v - 683.002).abs() < 0.0002 * 683.0, "{v}");
        // The line says nothing about 360–553 nm and 557–830 nm, so V(λ) is not fully covered.
        assert!(!r.coverage.is_complete());
        assert_eq!(r.coverage.covered_nm, Some((554.0, 556.0)));
    }

    #[test]
    fn each_measure_gets_its_photometric_quantity() {
        let units: Vec<&str> = [Measure::Radiance, Measure::Irradiance, Measure::Intensity, Measure::Flux]
            .iter()
            .map(|&m| photopic(&line(555.0, m)).value.unwrap().si_with_unit().1)
            .collect();
        assert_eq!(units, ["cd/m²", "lx", "cd", "lm"]);
        assert!(photopic(&line(555.0, Measure::Relative)).value.is_none());
    }

    #[test]
    fn ultraviolet_spectrum_is_not_covered_by_v() {
        let r = photopic(&line(300.0, Measure::Irradiance));
        assert_eq!(r.raw, 0.0);
        assert_eq!(r.coverage.covered_nm, None);
        assert!(sp_ratio(&line(300.0, Measure::Irradiance)).is_none());
    }
}
