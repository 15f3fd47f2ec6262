//! Photoreceptor catch: photoisomerisations (R*) per receptor per second, and the
//! species-specific α-opic quantities of rodents.
//!
//! R* = ∫ q_ret(λ) · a_c(λ) dλ,  a_c(λ) = A_in · [1 − 10^(−D · S(λ))] · γ,
//!
//! with q_ret the retinal spectral photon irradiance (photons·µm⁻²·s⁻¹·nm⁻¹), A_in the
//! receptor's end-on aperture area, D its peak axial optical density (self-screening), S(λ) the
//! Govardovskii et al. (2000) A1 template at the pigment's λmax and γ the quantum efficiency
//! (reference notes §3). Because q_ret = L_q(λ)·τ(λ)·A_p/f², the weighting applied to the seen
//! photon radiance is τ(λ)·a_c(λ), so a spectrum's coverage is judged where the eye actually
//! passes light.

use uom::si::length::millimeter;

use crate::base::curve::Curve;
use crate::base::data::tables;
use crate::base::quantity::{Frequency, Illuminance, PhotonIrradiance, SiValue, Time, as_nm_f64};
use crate::retina::eye::{Eye, Receptor, Status};
use crate::spectrum::photometry::photopic;
use crate::spectrum::{Coverage, Spectrum};
use crate::weighting::template::govardovskii_a1;

/// Wavelength span searched for a pigment's sensitive band, nm.
const SEARCH_NM: (f64, f64) = (250.0, 900.0);
/// A weighting is kept where it is at least this fraction of its peak.
const BAND_FLOOR: f64 = 1e-4;

/// Samples `f` at 1 nm over [`SEARCH_NM`] and keeps the span where it is at least
/// [`BAND_FLOOR`] of its peak: the band the weighting needs.
fn band_curve(f: impl Fn(f64) -> f64) -> Curve {
    let n = (SEARCH_NM.1 - SEARCH_NM.0) as usize + 1;
    let w: Vec<f64> = (0..n).map(|i| SEARCH_NM.0 + i as f64).collect();
    let v: Vec<f64> = w.iter().map(|&x| f(x)).collect();
    let peak = v.iter().copied().fold(0.0, f64::max);
    let first = v.iter().position(|&x| x >= BAND_FLOOR * peak).unwrap_or(0);
    let last = v.iter().rposition(|&x| x >= BAND_FLOOR * peak).unwrap_or(n - 1).max(first + 1);
    Curve::new(w[first..=last].to_vec(), v[first..=last].to_vec())
        .unwrap_or_else(|e| panic!("pigment band curve: {e}"))
}

/// The corneal-referred catch weighting τ(λ)·a_c(λ) of `receptor`, in µm².
pub fn receptor_weighting(eye: &Eye, receptor: &Receptor, age: Option<Time>) -> Curve {
    let lmax = as_nm_f64(receptor.lambda_max.value);
    let d = receptor.peak_optical_density.value;
    let a_in_um2 = receptor.aperture_area.value.si() * 1e12;
    let gamma = receptor.quantum_efficiency.value;
    band_curve(|w| {
        let s = govardovskii_a1(lmax, w);
        eye.media_transmittance(w, age) * a_in_um2 * (1.0 - 10f64.powf(-d * s)) * gamma
    })
}

/// R*/rod/s from scotopic trolands by a published factor (human rods).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TrolandRoute {
    /// Name of the factor (`lamb_pugh_2006`, `makous`).
    pub name: String,
    /// R*/rod/s per scotopic troland.
    pub factor: f64,
    /// Where the factor comes from.
    pub source: String,
    /// The resulting rate.
    pub rate: Frequency,
}

/// The catch of one receptor class.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ReceptorCatch {
    /// Receptor name.
    pub receptor: String,
    /// λmax used.
    pub lambda_max_nm: f64,
    /// R* per receptor per second by the spectral route.
    pub rate: Frequency,
    /// How much of the receptor's band the spectrum covers.
    pub coverage: Coverage,
    /// Parameters of this receptor that are from memory.
    pub from_memory: Vec<&'static str>,
    /// Troland routes, where published (human rods).
    pub troland_routes: Vec<TrolandRoute>,
}

/// R* per receptor per second for each receptor class of `eye`, from the seen spectral
/// radiance, the light-collecting area (mm²) and, for human rods, the scotopic trolands.
pub fn receptor_catch(
    radiance: &Spectrum,
    eye: &Eye,
    area_mm2: f64,
    age: Option<Time>,
    scotopic_td: f64,
) -> Vec<ReceptorCatch> {
    let f_mm = eye.nodal_distance.value.get::<millimeter>();
    let geometric = area_mm2 / (f_mm * f_mm);
    let photons = radiance.to_photon();
    eye.receptors
        .iter()
        .map(|r| {
            let w = receptor_weighting(eye, r, age);
            // photons·s⁻¹·m⁻²·sr⁻¹·nm⁻¹ × sr → per m² at the retina; × 1e-12 → per µm²; × µm².
            let (integral, coverage) = photons.weighted(&w);
            let rate = Frequency::from_si(integral * geometric * 1e-12);
            let mut from_memory = Vec::new();
            for (name, st) in [
                ("λmax", r.lambda_max.status),
                ("optical density", r.peak_optical_density.status),
                ("aperture area", r.aperture_area.status),
                ("quantum efficiency", r.quantum_efficiency.status),
            ] {
                if st == Status::FromMemory {
                    from_memory.push(name);
                }
            }
            let troland_routes = if r.name == "rod" {
                eye.rod_troland_factors
                    .iter()
                    .map(|(name, p)| TrolandRoute {
                        name: name.clone(),
                        factor: p.value,
                        source: p.source.clone(),
                        rate: Frequency::from_si(p.value * scotopic_td),
                    })
                    .collect()
            } else {
                Vec::new()
            };
            ReceptorCatch {
                receptor: r.name.clone(),
                lambda_max_nm: as_nm_f64(r.lambda_max.value),
                rate,
                coverage,
                from_memory,
                troland_routes,
            }
        })
        .collect()
}

/// A rodent α-opic quantity (retidose's method, by analogy with CIE S 026; not a CIE quantity).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SpeciesOpic {
    /// Channel: `rod`, `m-cone`, `uv-cone` or `melanopsin`.
    pub channel: String,
    /// λmax of the pigment.
    pub lambda_max_nm: f64,
    /// Pigment-weighted photon irradiance at the cornea, ∫ E_q(λ)·s(λ) dλ with
    /// s(λ) = τ(λ)·S(λ) normalised to peak 1.
    pub photon_irradiance: PhotonIrradiance,
    /// Equivalent daylight illuminance: the D65 illuminance giving the same weighted photon
    /// irradiance.
    pub equivalent_daylight: Illuminance,
    /// Coverage of the channel's band by the spectrum.
    pub coverage: Coverage,
    /// Coverage of the channel's band by the D65 table (300–830 nm).
    pub d65_coverage: Coverage,
}

/// Lens-filtered pigment weighting s(λ) = τ(λ)·S(λ), peak 1, quantal.
fn species_weighting(eye: &Eye, lambda_max_nm: f64) -> Curve {
    let c = band_curve(|w| eye.media_transmittance(w, None) * govardovskii_a1(lambda_max_nm, w));
    let peak = c.values().iter().copied().fold(0.0, f64::max);
    c.scaled(1.0 / peak)
}

/// Species-specific α-opic quantities of a corneal spectral irradiance for a rodent eye:
/// the pigment templates (Govardovskii et al. 2000) at each receptor's λmax and melanopsin's,
/// each multiplied by the species' ocular media and normalised to peak 1 (the approach of
/// Lucas et al. 2014, Trends Neurosci 37:1–9), applied on a photon basis; and an equivalent
/// daylight illuminance relative to CIE D65, as CIE S 026 does for humans. This is retidose's
/// own construction, not a CIE quantity.
pub fn species_alpha_opic(irradiance: &Spectrum, eye: &Eye) -> Vec<SpeciesOpic> {
    let d65 = &tables().d65;
    let d65_q = d65.to_photon();
    let d65_lux = photopic(d65).raw;
    let q = irradiance.to_photon();
    let mut channels: Vec<(String, f64)> =
        eye.receptors.iter().map(|r| (r.name.clone(), as_nm_f64(r.lambda_max.value))).collect();
    if let Some(m) = &eye.melanopsin {
        channels.push(("melanopsin".to_string(), as_nm_f64(m.value)));
    }
    channels
        .into_iter()
        .map(|(channel, lmax)| {
            let s = species_weighting(eye, lmax);
            let (x, coverage) = q.weighted(&s);
            let (k, d65_coverage) = d65_q.weighted(&s);
            let per_lux = k / d65_lux;
            SpeciesOpic {
                channel,
                lambda_max_nm: lmax,
                photon_irradiance: PhotonIrradiance::from_si(x),
                equivalent_daylight: Illuminance::from_si(x / per_lux),
                coverage,
                d65_coverage,
            }
        })
        .collect()
}
