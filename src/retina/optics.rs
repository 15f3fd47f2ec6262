//! From the cornea to the retina: retinal spectral irradiance, retinal illuminance in trolands
//! (with and without the Stiles–Crawford effect) and the retinal image size.
//!
//! Retinal spectral irradiance of an extended source that fills the pupil (reduced eye):
//! E_ret(λ) = L(λ) · τ(λ) · A_p / f², A_p the pupil area and f the posterior nodal distance
//! (standard radiometry; reference notes §2.2), also in photons·µm⁻²·s⁻¹·nm⁻¹.
//!
//! Retinal illuminance (CIE e-ILV 17-22-038): T = L·A_p, td = cd·m⁻² × mm², photopic from the
//! luminance and scotopic from the scotopic luminance; media losses are not part of the troland.
//! Stiles–Crawford effective trolands: Barten (1999) T_eff = L·(π d²/4)·[1 − (d/9.7)² + (d/12.4)⁴],
//! or the integral of η(r) = 10^(−ρ r²) over the pupil, A_eff = π [1 − 10^(−ρ d²/4)] / (ρ ln 10),
//! ρ = 0.05 mm⁻² (Stiles 1937; Applegate & Lakshminarayanan 1993; ρ from memory).

use std::f64::consts::{LN_10, PI};

use uom::si::length::millimeter;

use crate::base::error::Result;
use crate::base::quantity::{Length, RetinalIlluminance, SiValue, Time, trolands};
use crate::retina::eye::Eye;
use crate::retina::pupil::Pupil;
use crate::spectrum::photometry::{photopic, scotopic};
use crate::spectrum::{Measure, Spectrum};

/// Stiles–Crawford directionality ρ in mm⁻² (about 550 nm; Applegate & Lakshminarayanan 1993,
/// from memory).
pub const STILES_CRAWFORD_RHO_PER_MM2: f64 = 0.05;

/// Barten (1999) Stiles–Crawford factor 1 − (d/9.7)² + (d/12.4)⁴ for a pupil of `d_mm`.
pub fn barten_factor(d_mm: f64) -> f64 {
    1.0 - (d_mm / 9.7).powi(2) + (d_mm / 12.4).powi(4)
}

/// Effective pupil area in mm² from the integral of 10^(−ρ r²) over a centred pupil of `d_mm`.
pub fn stiles_crawford_area_mm2(d_mm: f64, rho_per_mm2: f64) -> f64 {
    let r2 = d_mm * d_mm / 4.0;
    PI * (1.0 - 10f64.powf(-rho_per_mm2 * r2)) / (rho_per_mm2 * LN_10)
}

/// Retinal illuminances of a seen luminance through a pupil.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Trolands {
    /// Photopic retinal illuminance.
    #[serde(serialize_with = "crate::base::quantity::serialize_td")]
    pub photopic: RetinalIlluminance,
    /// Scotopic retinal illuminance.
    #[serde(serialize_with = "crate::base::quantity::serialize_td")]
    pub scotopic: RetinalIlluminance,
    /// Photopic, Stiles–Crawford corrected, Barten's closed form.
    #[serde(serialize_with = "crate::base::quantity::serialize_td")]
    pub photopic_effective_barten: RetinalIlluminance,
    /// Photopic, Stiles–Crawford corrected, integral form.
    #[serde(serialize_with = "crate::base::quantity::serialize_td")]
    pub photopic_effective_integral: RetinalIlluminance,
}

/// Retinal illuminance of `radiance` (a spectral radiance) through `pupil`.
pub fn trolands_of(radiance: &Spectrum, pupil: &Pupil) -> Trolands {
    let area = pupil.area_mm2();
    let d = pupil.diameter.get::<millimeter>();
    let lum = photopic(radiance).raw;
    let scot = scotopic(radiance).raw;
    Trolands {
        photopic: trolands(lum * area),
        scotopic: trolands(scot * area),
        photopic_effective_barten: trolands(lum * area * barten_factor(d)),
        photopic_effective_integral: trolands(lum * stiles_crawford_area_mm2(d, STILES_CRAWFORD_RHO_PER_MM2)),
    }
}

/// The light-collecting area of the eye in mm²: the pupil, plus for an albino rodent the light
/// that passes an unpigmented iris, T_iris·(A_iris − A_pupil) — an approximation (iris
/// transmittance from memory) that treats that light as reaching the retina like pupil light.
pub fn collecting_area_mm2(eye: &Eye, pupil: &Pupil, albino_iris: bool) -> f64 {
    let a = pupil.area_mm2();
    match (&eye.iris, albino_iris) {
        (Some(iris), true) => {
            let di = iris.diameter.value.get::<millimeter>();
            a + iris.albino_transmittance.value * (PI * di * di / 4.0 - a).max(0.0)
        }
        _ => a,
    }
}

/// Retinal spectral irradiance (W·m⁻²·nm⁻¹ at the retina) of a seen spectral radiance:
/// E_ret(λ) = L(λ)·τ(λ)·A/f².
///
/// # Errors
/// Only if the spectrum cannot be rescaled (it always can for a valid spectrum).
pub fn retinal_irradiance(
    radiance: &Spectrum,
    eye: &Eye,
    area_mm2: f64,
    age: Option<Time>,
) -> Result<Spectrum> {
    let f_mm = eye.nodal_distance.value.get::<millimeter>();
    let geometric = area_mm2 / (f_mm * f_mm);
    let energy = radiance.to_energy();
    let curve = energy.curve().map(|w, v| v * eye.media_transmittance(w, age) * geometric);
    Ok(energy
        .with_curve(curve)
        .scaled_as(1.0, Measure::Irradiance)?
        .with_label(format!("retina ({})", radiance.label())))
}

/// Size of the retinal image of a source of full angle `subtense_rad`: 2 f tan(α/2)
/// (rays through the nodal point).
pub fn image_size(eye: &Eye, subtense_rad: f64) -> Length {
    Length::from_si(2.0 * eye.nodal_distance.value.si() * (subtense_rad / 2.0).tan())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn effective_area_tends_to_the_pupil_for_small_pupils() {
        let d = 0.5;
        let a = PI * d * d / 4.0;
        assert!((stiles_crawford_area_mm2(d, 0.05) / a - 1.0).abs() < 0.01);
        // Reference notes §2.5 (derived): A_eff/A_p = 0.939 at 2.1 mm and 0.457 at 8 mm.
        for (d, r) in [(2.1, 0.939), (8.0, 0.457)] {
            let ratio = stiles_crawford_area_mm2(d, 0.05) / (PI * d * d / 4.0);
            assert!((ratio - r).abs() < 0.001, "{d} mm: {ratio}");
        }
    }
}
