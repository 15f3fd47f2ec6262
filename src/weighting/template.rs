//! The visual-pigment absorbance template of Govardovskii et al. (2000).
//!
//! Govardovskii VI, Fyhrquist N, Reuter T, Kuzmin DG, Donner K (2000) "In search of the
//! visual pigment template", Visual Neuroscience 17:509–528, Eqs. (1) and (4) for A1 pigments.
//! Constants as transcribed in the project's reference notes (status: confirmed through a
//! secondary copy of the paper's equations):
//!
//! α-band, x = λmax/λ:
//! S_α = 1 / {exp[A(a − x)] + exp[B(b − x)] + exp[C(c − x)] + D},
//! A = 69.7, a = 0.8795 + 0.0459 exp[−(λmax − 300)²/11940], B = 28, b = 0.922, C = −14.9,
//! c = 1.104, D = 0.674.
//!
//! β-band: S_β = A_β exp{−[(λ − λmβ)/b_β]²}, A_β = 0.26, λmβ = 189 + 0.315 λmax,
//! b_β = −40.5 + 0.195 λmax (nm).
//!
//! The template is quantal (absorbance per photon) and normalised near 1 at λmax.

/// Quantal absorbance of an A1 pigment with peak `lambda_max_nm` at `wavelength_nm`
/// (α-band plus β-band, Govardovskii et al. 2000).
pub fn govardovskii_a1(lambda_max_nm: f64, wavelength_nm: f64) -> f64 {
    let x = lambda_max_nm / wavelength_nm;
    let a = 0.8795 + 0.0459 * (-(lambda_max_nm - 300.0).powi(2) / 11940.0).exp();
    let alpha =
        1.0 / ((69.7 * (a - x)).exp() + (28.0 * (0.922 - x)).exp() + (-14.9 * (1.104 - x)).exp() + 0.674);
    let peak_beta = 189.0 + 0.315 * lambda_max_nm;
    let width_beta = -40.5 + 0.195 * lambda_max_nm;
    let beta = 0.26 * (-((wavelength_nm - peak_beta) / width_beta).powi(2)).exp();
    alpha + beta
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn template_peaks_near_lambda_max_with_value_near_one() {
        for lmax in [360.0, 480.0, 498.0, 508.0, 560.0] {
            let (mut best, mut at) = (0.0, 0.0);
            let mut w = lmax - 40.0;
            while w <= lmax + 40.0 {
                let v = govardovskii_a1(lmax, w);
                if v > best {
                    best = v;
                    at = w;
                }
                w += 0.1;
            }
            // The published fit puts the α-band peak at λmax within about 1 nm.
            assert!((at - lmax).abs() < 1.5, "λmax {lmax}: peak at {at}");
            assert!((best - 1.0).abs() < 0.02, "λmax {lmax}: peak value {best}");
        }
    }
}
