//! Physical quantities as types.
//!
//! Stock `uom` SI quantities are used where they exist ([`Length`] for wavelengths,
//! [`Irradiance`] = uom's `HeatFluxDensity`, [`Illuminance`], [`Luminance`],
//! [`LuminousIntensity`], [`Power`]). The quantities `uom` lacks are type aliases of uom's
//! `Quantity` over the ISQ dimension they have, each tagged with a *kind* of our own, so that
//! two quantities of the same dimension (radiance and irradiance: the steradian is
//! dimensionless) cannot be mixed up:
//!
//! ```compile_fail
//! use retidose::base::quantity::{Irradiance, Radiance, SiValue};
//! let e = Irradiance::from_si(1.0);
//! let l: Radiance = e; // error: a radiance is not an irradiance
//! ```
//!
//! The aliases interoperate with uom's arithmetic, but have no `new::<unit>`/`get::<unit>`;
//! they are built and read through [`SiValue`] in coherent SI units (stated on each alias).
//! DEVELOPERS.md explains why this approach was chosen.

use std::marker::PhantomData;

use uom::si::{Dimension, ISQ, Quantity, SI};
use uom::typenum::{N1, N2, N3, P1, P2, P3, Z0};

pub use uom::si::f64::{
    Angle, Area, Frequency, HeatFluxDensity as Irradiance, Illuminance, Length, Luminance, LuminousIntensity,
    Power, Ratio, SolidAngle, ThermodynamicTemperature, Time,
};

/// Build a quantity from, and read it in, coherent SI units.
///
/// This is the one place where a bare `f64` meets a quantity type. The SI unit of each custom
/// quantity is stated on its alias.
pub trait SiValue: Sized {
    /// The quantity whose value in coherent SI units is `value`.
    fn from_si(value: f64) -> Self;
    /// The value in coherent SI units.
    fn si(&self) -> f64;
}

impl<D> SiValue for Quantity<D, SI<f64>, f64>
where
    D: Dimension + ?Sized,
{
    fn from_si(value: f64) -> Self {
        Quantity { dimension: PhantomData, units: PhantomData, value }
    }
    fn si(&self) -> f64 {
        self.value
    }
}

macro_rules! kind {
    ($(#[$doc:meta])* $name:ident) => {
        $(#[$doc])*
        pub trait $name: uom::Kind {}
    };
}

kind!(
    /// Kind marker for radiance (separates it from irradiance).
    RadianceKind
);
kind!(
    /// Kind marker for radiant intensity (separates it from power).
    RadiantIntensityKind
);
kind!(
    /// Kind marker for luminous flux (separates it from luminous intensity).
    LuminousFluxKind
);
kind!(
    /// Kind marker for photon quantities (counts per second and area or solid angle).
    PhotonKind
);
kind!(
    /// Kind marker for photon radiance and photon intensity (per steradian).
    PhotonPerSteradianKind
);
kind!(
    /// Kind marker for luminous efficacy of radiation.
    EfficacyKind
);
kind!(
    /// Kind marker for retinal illuminance (separates trolands from candelas).
    RetinalIlluminanceKind
);

/// Radiance, W·m⁻²·sr⁻¹.
pub type Radiance = Quantity<ISQ<Z0, P1, N3, Z0, Z0, Z0, Z0, dyn RadianceKind>, SI<f64>, f64>;
/// Radiant intensity, W·sr⁻¹.
pub type RadiantIntensity = Quantity<ISQ<P2, P1, N3, Z0, Z0, Z0, Z0, dyn RadiantIntensityKind>, SI<f64>, f64>;
/// Luminous flux, lm (= cd·sr).
pub type LuminousFlux = Quantity<ISQ<Z0, Z0, Z0, Z0, Z0, Z0, P1, dyn LuminousFluxKind>, SI<f64>, f64>;
/// Photon irradiance, photons·m⁻²·s⁻¹ (counts are dimensionless).
pub type PhotonIrradiance = Quantity<ISQ<N2, Z0, N1, Z0, Z0, Z0, Z0, dyn PhotonKind>, SI<f64>, f64>;
/// Photon radiance, photons·m⁻²·s⁻¹·sr⁻¹.
pub type PhotonRadiance = Quantity<ISQ<N2, Z0, N1, Z0, Z0, Z0, Z0, dyn PhotonPerSteradianKind>, SI<f64>, f64>;
/// Photon flux, photons·s⁻¹.
pub type PhotonFlux = Quantity<ISQ<Z0, Z0, N1, Z0, Z0, Z0, Z0, dyn PhotonKind>, SI<f64>, f64>;
/// Photon intensity, photons·s⁻¹·sr⁻¹.
pub type PhotonIntensity =
    Quantity<ISQ<Z0, Z0, N1, Z0, Z0, Z0, Z0, dyn PhotonPerSteradianKind>, SI<f64>, f64>;
/// Luminous efficacy of radiation, lm·W⁻¹.
pub type LuminousEfficacy = Quantity<ISQ<N2, N1, P3, Z0, Z0, Z0, P1, dyn EfficacyKind>, SI<f64>, f64>;
/// Radiant power per luminous flux, W·lm⁻¹: the unit of CIE S 026 α-opic efficacy of luminous
/// radiation (ELR, tabulated in mW·lm⁻¹).
pub type RadiantPerLuminous = Quantity<ISQ<P2, P1, N3, Z0, Z0, Z0, N1, dyn EfficacyKind>, SI<f64>, f64>;

/// Retinal illuminance. Its SI value is in cd (1 troland = 1 cd·m⁻² × 1 mm² = 10⁻⁶ cd); build
/// and read it in trolands with [`trolands`] and [`as_td_f64`].
pub type RetinalIlluminance =
    Quantity<ISQ<Z0, Z0, Z0, Z0, Z0, Z0, P1, dyn RetinalIlluminanceKind>, SI<f64>, f64>;

/// A retinal illuminance of `td` trolands (CIE e-ILV 17-22-038: luminance in cd/m² × pupil
/// area in mm²).
pub fn trolands(td: f64) -> RetinalIlluminance {
    RetinalIlluminance::from_si(td * 1e-6)
}

/// A retinal illuminance in trolands.
pub fn as_td_f64(r: RetinalIlluminance) -> f64 {
    r.si() * 1e6
}

/// Serialises a retinal illuminance in trolands (its SI value in cd would mislead readers).
///
/// # Errors
/// As the serializer.
pub fn serialize_td<S: serde::Serializer>(r: &RetinalIlluminance, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_f64(as_td_f64(*r))
}

/// Builds a wavelength from nanometres.
pub fn nm(value_nm: f64) -> Length {
    Length::new::<uom::si::length::nanometer>(value_nm)
}

/// A wavelength in nanometres, for spectral loops.
pub fn as_nm_f64(length: Length) -> f64 {
    length.get::<uom::si::length::nanometer>()
}

#[cfg(test)]
mod tests {
    use super::*;
    use uom::si::heat_flux_density::watt_per_square_meter;

    #[test]
    fn custom_quantities_round_trip_in_si() {
        let l = Radiance::from_si(2.5);
        assert_eq!(l.si(), 2.5);
        let e = Irradiance::new::<watt_per_square_meter>(3.0);
        assert_eq!(e.si(), 3.0);
    }

    #[test]
    fn quantities_of_one_kind_add() {
        let sum = Radiance::from_si(1.0) + Radiance::from_si(2.0);
        assert_eq!(sum.si(), 3.0);
    }

    #[test]
    fn wavelength_helpers_round_trip() {
        let w = nm(555.0);
        assert!((as_nm_f64(w) - 555.0).abs() < 1e-9);
    }
}
