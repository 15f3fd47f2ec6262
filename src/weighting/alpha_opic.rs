//! CIE S 026:2018 α-opic quantities for the human eye.
//!
//! For each of the five photoreceptor types α (s-cone, m-cone, l-cone, rods, ipRGC melanopsin):
//!
//! - α-opic quantity X_α = ∫ X_e,λ s_α(λ) dλ over 380–780 nm (W·m⁻² for an irradiance, W·m⁻²·sr⁻¹
//!   for a radiance, W·sr⁻¹ or W for intensity and flux);
//! - α-opic efficacy of luminous radiation ELR K_α,v = X_α / X_v (W/lm);
//! - α-opic daylight (D65) efficacy ratio DER = K_α,v / K_α,v^D65;
//! - α-opic equivalent daylight (D65) quantity EDI = X_α / K_α,v^D65 (lx for an irradiance,
//!   cd/m² for a radiance: the D65 illuminance or luminance that gives the same X_α).
//!
//! The action spectra and the published D65 constants are listed, with sources and status, in
//! `src/data/cie_s026_alpha_opic.toml`. The melanopic function is a reconstruction (that
//! file says how it is built and how far its D65 ELR is from the published one). DER and EDI
//! use the D65 ELR that each function gives on the embedded D65 table, so any D65 spectrum has
//! DER = 1 by construction; the published constants are reported beside them.

use std::sync::LazyLock;

use serde::Deserialize;

use crate::base::curve::Curve;
use crate::base::data::{ALPHA_OPIC_TOML, table_curve, tables};
use crate::base::quantity::{RadiantPerLuminous, SiValue};
use crate::spectrum::photometry::{Photometric, photopic};
use crate::spectrum::{Coverage, Radiometric, Spectrum};
use crate::weighting::lens::human_media_transmittance;
use crate::weighting::template::govardovskii_a1;

/// One α-opic action spectrum and its D65 constants.
#[derive(Debug, Clone)]
pub struct ActionSpectrum {
    /// The S 026 name (`s-cone-opic`, `m-cone-opic`, `l-cone-opic`, `rhodopic`, `melanopic`).
    pub name: String,
    /// The action spectrum, energy basis, peak 1, limited to S 026's 380–780 nm.
    pub curve: Curve,
    /// How the function is built, with its source.
    pub construction: String,
    /// The published CIE S 026 D65 ELR.
    pub published_d65_elr: RadiantPerLuminous,
    /// Status of the published constant (confirmed / derived / from memory) with its basis.
    pub published_status: String,
    /// The D65 ELR this function gives on the embedded D65 table (used for DER and EDI).
    pub d65_elr: RadiantPerLuminous,
    /// True for a function that is not the normative CIE table.
    pub reconstructed: bool,
    /// The document that defines the function.
    pub document: String,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSet {
    document: String,
    range_nm: [f64; 2],
    function: Vec<RawFunction>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFunction {
    name: String,
    table: Option<String>,
    construction: String,
    template_lambda_max_nm: Option<f64>,
    lens_age_years: Option<f64>,
    step_nm: Option<f64>,
    d65_elr_mw_per_lm: f64,
    d65_elr_status: String,
}

static SET: LazyLock<Vec<ActionSpectrum>> = LazyLock::new(|| {
    let raw: RawSet = toml::from_str(ALPHA_OPIC_TOML)
        .unwrap_or_else(|e| panic!("embedded cie_s026_alpha_opic.toml is malformed: {e}"));
    let [lo, hi] = raw.range_nm;
    let d65 = &tables().d65;
    let d65_lux = photopic(d65).raw;
    raw.function
        .into_iter()
        .map(|f| {
            let (curve, reconstructed) = match (&f.table, f.template_lambda_max_nm, f.lens_age_years) {
                (Some(table), None, None) => (clip(&table_curve(table), lo, hi), false),
                (None, Some(lmax), Some(age)) => {
                    (melanopic_reconstruction(lmax, age, lo, hi, f.step_nm.unwrap_or(1.0)), true)
                }
                _ => {
                    panic!("α-opic function {} needs either a table or a template λmax and lens age", f.name)
                }
            };
            let d65_elr = RadiantPerLuminous::from_si(d65.weighted(&curve).0 / d65_lux);
            ActionSpectrum {
                name: f.name,
                curve,
                construction: f.construction,
                published_d65_elr: RadiantPerLuminous::from_si(f.d65_elr_mw_per_lm * 1e-3),
                published_status: f.d65_elr_status,
                d65_elr,
                reconstructed,
                document: raw.document.clone(),
            }
        })
        .collect()
});

/// The five CIE S 026 action spectra, in the standard's order (s, m, l, rhodopic, melanopic).
pub fn action_spectra() -> &'static [ActionSpectrum] {
    &SET
}

/// The part of `curve` inside `[lo, hi]`, with interpolated end nodes if needed.
fn clip(curve: &Curve, lo: f64, hi: f64) -> Curve {
    let (a, b) = curve.range_nm();
    let (lo, hi) = (lo.max(a), hi.min(b));
    let mut w = vec![lo];
    w.extend(curve.wavelength_nm().iter().copied().filter(|&x| x > lo && x < hi));
    w.push(hi);
    curve.resampled(&w).unwrap_or_else(|e| panic!("clipping an embedded table: {e}"))
}

/// Melanopic action spectrum rebuilt by the method CIE S 026 describes: Govardovskii A1
/// template (quantal) × human ocular-media transmittance at `age` years, times λ for an
/// energy basis, normalised to peak 1.
fn melanopic_reconstruction(lambda_max_nm: f64, age: f64, lo: f64, hi: f64, step: f64) -> Curve {
    let n = ((hi - lo) / step).round() as usize + 1;
    let w: Vec<f64> = (0..n).map(|i| lo + step * i as f64).collect();
    let v: Vec<f64> = w
        .iter()
        .map(|&l| govardovskii_a1(lambda_max_nm, l) * human_media_transmittance(l, age) * l)
        .collect();
    let peak = v.iter().copied().fold(0.0, f64::max);
    Curve::new(w, v.iter().map(|x| x / peak).collect())
        .unwrap_or_else(|e| panic!("melanopic reconstruction: {e}"))
}

/// The α-opic quantities of one spectrum for one photoreceptor type.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct AlphaOpicValue {
    /// Which function (S 026 name).
    pub name: String,
    /// α-opic radiometric quantity; `None` for a relative spectrum.
    pub quantity: Option<Radiometric>,
    /// α-opic ELR, W/lm; `None` without photopic content.
    pub elr: Option<RadiantPerLuminous>,
    /// α-opic DER, unit-free; `None` without photopic content.
    pub der: Option<f64>,
    /// α-opic equivalent daylight quantity (lx for an irradiance); `None` for a relative spectrum.
    pub edi: Option<Photometric>,
    /// Coverage of the action spectrum by the spectrum.
    pub coverage: Coverage,
    /// True when the function is a reconstruction rather than the normative table.
    pub reconstructed: bool,
}

/// All five α-opic quantities of a spectrum.
pub fn alpha_opic(spectrum: &Spectrum) -> Vec<AlphaOpicValue> {
    let energy = spectrum.to_energy();
    let lum = photopic(&energy).raw;
    action_spectra()
        .iter()
        .map(|f| {
            let (x, coverage) = energy.weighted(&f.curve);
            let elr = (lum > 0.0).then(|| x / lum);
            let quantity = Radiometric::from_si(spectrum.measure(), x);
            AlphaOpicValue {
                name: f.name.clone(),
                quantity,
                elr: elr.map(RadiantPerLuminous::from_si),
                der: elr.map(|e| e / f.d65_elr.si()),
                edi: Photometric::from_si(spectrum.measure(), x / f.d65_elr.si()),
                coverage,
                reconstructed: f.reconstructed,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn five_functions_in_standard_order_with_peak_one() {
        let names: Vec<&str> = action_spectra().iter().map(|f| f.name.as_str()).collect();
        assert_eq!(names, ["s-cone-opic", "m-cone-opic", "l-cone-opic", "rhodopic", "melanopic"]);
        for f in action_spectra() {
            let peak = f.curve.values().iter().copied().fold(0.0, f64::max);
            assert!((peak - 1.0).abs() < 1e-12, "{}", f.name);
            let (lo, hi) = f.curve.range_nm();
            assert!(lo >= 380.0 && hi <= 780.0, "{}: {lo}–{hi}", f.name);
        }
    }

    #[test]
    fn melanopic_reconstruction_peaks_near_490_nm() {
        // CIE S 026: the melanopic action spectrum peaks at 490 nm (confirmed, see the data
        // file). The reconstruction peaks at 492 nm: its lens model absorbs a little more blue
        // than the CIE 170-1 lens. The data file states this.
        let mel = &action_spectra()[4];
        let peak_nm = mel.curve.wavelength_nm()[mel.curve.peak_index()];
        assert_eq!(peak_nm, 492.0);
        assert!(mel.reconstructed);
    }
}
