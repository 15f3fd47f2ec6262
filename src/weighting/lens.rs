//! Optical density of the human ocular media as a function of age.
//!
//! van de Kraats J, van Norren D (2007) "Optical density of the aging human ocular media",
//! J Opt Soc Am A 24(7):1842–1857. Total media density (cornea, aqueous, lens, vitreous;
//! no macular pigment) as a sum of five components plus a neutral term, age A in years:
//!
//! - Rayleigh scatter: (0.446 + 0.000031 A²)(400/λ)⁴
//! - tryptophan: 14.19 · 10.68 · exp{−[0.057(λ − 273)]²}
//! - young lens: (0.998 − 0.000063 A²) · 2.13 · exp{−[0.029(λ − 370)]²}
//! - old lens, UV: (0.059 + 0.000186 A²) · 11.95 · exp{−[0.021(λ − 325)]²}
//! - old lens: (0.016 + 0.000132 A²) · 1.43 · exp{−[0.008(λ − 325)]²}
//! - neutral: 0.111
//!
//! **Status: from memory.** The coefficients could not be checked against the paper's text;
//! every output that depends on them says so.

/// Total optical density (log₁₀ units) of the human ocular media at `wavelength_nm` for an
/// observer aged `age_years` (van de Kraats & van Norren 2007; from memory).
pub fn human_media_density(wavelength_nm: f64, age_years: f64) -> f64 {
    let a2 = age_years * age_years;
    let l = wavelength_nm;
    let rayleigh = (0.446 + 0.000_031 * a2) * (400.0 / l).powi(4);
    let tryptophan = 14.19 * 10.68 * (-(0.057 * (l - 273.0)).powi(2)).exp();
    let young = (0.998 - 0.000_063 * a2) * 2.13 * (-(0.029 * (l - 370.0)).powi(2)).exp();
    let old_uv = (0.059 + 0.000_186 * a2) * 11.95 * (-(0.021 * (l - 325.0)).powi(2)).exp();
    let old = (0.016 + 0.000_132 * a2) * 1.43 * (-(0.008 * (l - 325.0)).powi(2)).exp();
    rayleigh + tryptophan + young + old_uv + old + 0.111
}

/// Transmittance 10^(−D) of the human ocular media (see [`human_media_density`]).
pub fn human_media_transmittance(wavelength_nm: f64, age_years: f64) -> f64 {
    10f64.powf(-human_media_density(wavelength_nm, age_years))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn density_falls_with_wavelength_in_the_visible_and_rises_with_age() {
        let mut prev = f64::INFINITY;
        for w in (400..=700).step_by(10) {
            let d = human_media_density(f64::from(w), 32.0);
            assert!(d < prev, "{w} nm");
            prev = d;
        }
        assert!(human_media_density(420.0, 70.0) > human_media_density(420.0, 32.0));
        // Long wavelengths approach the neutral term plus a little scatter.
        let d700 = human_media_density(700.0, 32.0);
        assert!(d700 > 0.111 && d700 < 0.2, "{d700}");
    }
}
