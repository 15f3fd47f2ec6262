//! Spectra computed from published formulas.
//!
//! - [`planck_radiance`]: Planck's law for a blackbody.
//! - [`cie_illuminant_a`]: CIE standard illuminant A from its defining formula.
//! - [`cie_d65`]: CIE standard illuminant D65 from the CIE 5 nm table (see `src/data/cie_d65.csv`).
//! - [`ohno_led`] and [`multi_band_led`]: the LED emission model of Ohno (2005) and white
//!   LEDs built from its bands.

use crate::base::constants::{PLANCK_J_S, SECOND_RADIATION_CONSTANT_M_K, SPEED_OF_LIGHT_M_PER_S};
use crate::base::curve::Curve;
use crate::base::error::{Error, Result};
use crate::base::quantity::{Length, SiValue, ThermodynamicTemperature, as_nm_f64};
use crate::spectrum::{Basis, Measure, Spectrum};

/// An evenly spaced wavelength grid, both ends included.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Grid {
    /// First wavelength.
    pub from: Length,
    /// Last wavelength (included when it falls on a step).
    pub to: Length,
    /// Spacing.
    pub step: Length,
}

impl Grid {
    /// A grid from `from_nm` to `to_nm` in steps of `step_nm` (all in nm).
    pub fn nm(from_nm: f64, to_nm: f64, step_nm: f64) -> Grid {
        Grid {
            from: crate::base::quantity::nm(from_nm),
            to: crate::base::quantity::nm(to_nm),
            step: crate::base::quantity::nm(step_nm),
        }
    }

    /// The grid's nodes in nm.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] if the range is empty or inverted, the step is not
    /// positive, or the grid would exceed one million nodes.
    pub fn nodes_nm(&self) -> Result<Vec<f64>> {
        let (a, b, h) = (as_nm_f64(self.from), as_nm_f64(self.to), as_nm_f64(self.step));
        if !(a > 0.0 && a.is_finite() && b.is_finite()) || b <= a {
            return Err(Error::input(format!(
                "wavelength range {a}–{b} nm is empty or inverted; the start must be above 0 nm and below the end"
            )));
        }
        if !(h > 0.0 && h.is_finite()) {
            return Err(Error::input(format!("wavelength step {h} nm must be above 0 nm")));
        }
        let count = ((b - a) / h + 1e-9).floor() + 1.0;
        if count.is_nan() || count > 1_000_000.0 {
            return Err(Error::input(format!(
                "{count:e} wavelengths from {a}–{b} nm in {h} nm steps is too many; use at most 1 000 000"
            )));
        }
        let n = count as usize;
        // Rounding to 1e-9 nm keeps 380 + 5·k exact-looking for decimal steps.
        Ok((0..n).map(|i| ((a + h * i as f64) * 1e9).round() / 1e9).collect())
    }
}

/// The hottest blackbody a lamp model takes, K (hotter than any lamp or star of interest; an
/// input bound, common practice, no source).
pub const MAX_BLACKBODY_K: f64 = 1.0e5;

/// The range of LED peak wavelengths a model takes, nm (ultraviolet to far infrared; an input
/// bound, common practice, no source).
pub const LED_PEAK_RANGE_NM: (f64, f64) = (100.0, 10_000.0);

/// Planck's law for the spectral radiance of a blackbody, W·m⁻²·sr⁻¹·nm⁻¹:
///
/// L_λ(λ, T) = 2hc² λ⁻⁵ / (exp(c₂ / (λT)) − 1),
///
/// with the exact SI 2019 h and c and, unless `c2_m_k` is given, c₂ = hc/k
/// (Planck 1901; CIE 15:2004 §3 uses the same law with c₂ = 1.4388 × 10⁻² m·K, the value
/// colour-science also uses, which is why it can be passed in).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a temperature not above 0 K or a bad grid.
pub fn planck_radiance(
    temperature: ThermodynamicTemperature,
    grid: Grid,
    c2_m_k: Option<f64>,
) -> Result<Spectrum> {
    let t = temperature.si();
    if !(t > 0.0 && t <= MAX_BLACKBODY_K) {
        return Err(Error::input(format!(
            "blackbody temperature {t} K is outside the range a lamp model can take: above 0 K, at most {MAX_BLACKBODY_K} K"
        )));
    }
    let c2 = c2_m_k.unwrap_or(SECOND_RADIATION_CONSTANT_M_K);
    let c1l = 2.0 * PLANCK_J_S * SPEED_OF_LIGHT_M_PER_S * SPEED_OF_LIGHT_M_PER_S;
    let w = grid.nodes_nm()?;
    let v = w
        .iter()
        .map(|&nm| {
            let lm = nm * 1e-9;
            c1l / lm.powi(5) / (c2 / (lm * t)).exp_m1() * 1e-9
        })
        .collect();
    Spectrum::new(Curve::new(w, v)?, Measure::Radiance, Basis::Energy, format!("blackbody {t} K"))
}

/// CIE standard illuminant A, relative spectral power normalised to 100 at 560 nm, from its
/// defining formula (CIE 15:2004 §3.1; ISO/CIE 11664-2:2022):
///
/// S_A(λ) = 100 (560/λ)⁵ · [exp(1.435 × 10⁷ / (2848 · 560)) − 1] / [exp(1.435 × 10⁷ / (2848 λ)) − 1],
///
/// λ in nm. CIE defines it over 300–830 nm; the grid must stay inside that range.
///
/// # Errors
/// [`crate::ErrorKind::NotCovered`] for a grid outside 300–830 nm.
pub fn cie_illuminant_a(grid: Grid) -> Result<Spectrum> {
    let w = grid.nodes_nm()?;
    if w[0] < 300.0 - 1e-9 || w[w.len() - 1] > 830.0 + 1e-9 {
        return Err(Error::not_covered(format!(
            "CIE illuminant A is defined over 300–830 nm; {}–{} nm was asked for",
            w[0],
            w[w.len() - 1]
        )));
    }
    let c: f64 = 1.435e7 / 2848.0;
    let v =
        w.iter().map(|&nm| 100.0 * (560.0 / nm).powi(5) * (c / 560.0).exp_m1() / (c / nm).exp_m1()).collect();
    Spectrum::new(Curve::new(w, v)?, Measure::Relative, Basis::Energy, "CIE illuminant A")
}

/// CIE standard illuminant D65, relative spectral power (100 at 560 nm), 300–830 nm at 5 nm,
/// from the embedded CIE table. Between nodes it is linearly interpolated, as CIE 15:2004
/// recommends for finer steps (from memory; see the table's header).
pub fn cie_d65() -> Spectrum {
    crate::base::data::tables().d65.clone()
}

/// One LED band of the Ohno (2005) model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LedBand {
    /// Peak wavelength λ₀.
    pub peak: Length,
    /// Ohno's half spectral width Δλ₀.₅ (the full width at half maximum is 0.922 Δλ₀.₅).
    pub width: Length,
    /// Relative peak height of this band.
    pub ratio: f64,
}

/// The LED emission model of Ohno (2005), "Spectral design considerations for white LED color
/// rendering", Optical Engineering 44(11):111302:
///
/// S(λ) = [g(λ) + 2 g(λ)⁵] / 3,  g(λ) = exp(−((λ − λ₀)/Δλ₀.₅)²),
///
/// peak value 1 at λ₀. The form was checked against colour-science 0.4.7's
/// `sd_single_led_Ohno2005` (tests/colour_reference.py), not against the paper's text.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a width not above 0 nm or a bad grid.
pub fn ohno_led(peak: Length, width: Length, grid: Grid) -> Result<Spectrum> {
    multi_band_led(&[LedBand { peak, width, ratio: 1.0 }], grid).map(|s| {
        s.with_label(format!(
            "LED {} nm / {} nm",
            crate::base::units::tidy(as_nm_f64(peak)),
            crate::base::units::tidy(as_nm_f64(width))
        ))
    })
}

/// A sum of Ohno (2005) bands, each scaled by its ratio: a phosphor-converted white LED is a
/// narrow blue pump band plus one or more broad phosphor bands (the same construction as
/// colour-science's `sd_multi_leds_Ohno2005`; representing a phosphor by such broad bands is
/// common practice, no source). Relative shape, not normalised.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for no bands, a width not above 0 nm, a negative
/// ratio, or a bad grid.
pub fn multi_band_led(bands: &[LedBand], grid: Grid) -> Result<Spectrum> {
    if bands.is_empty() {
        return Err(Error::input("an LED model needs at least one band"));
    }
    for b in bands {
        let wd = as_nm_f64(b.width);
        if !(wd > 0.0 && wd <= 1000.0) {
            return Err(Error::input(format!(
                "LED band width {wd} nm must be above 0 nm and at most 1000 nm"
            )));
        }
        let pk = as_nm_f64(b.peak);
        let (lo, hi) = LED_PEAK_RANGE_NM;
        if !(lo..=hi).contains(&pk) {
            return Err(Error::input(format!("LED peak {pk} nm is outside {lo}–{hi} nm")));
        }
        if !(b.ratio >= 0.0 && b.ratio.is_finite()) {
            return Err(Error::input(format!("LED band ratio {} must be a finite number ≥ 0", b.ratio)));
        }
    }
    let w = grid.nodes_nm()?;
    let v = w
        .iter()
        .map(|&nm| {
            bands
                .iter()
                .map(|b| {
                    let g = (-((nm - as_nm_f64(b.peak)) / as_nm_f64(b.width)).powi(2)).exp();
                    b.ratio * (g + 2.0 * g.powi(5)) / 3.0
                })
                .sum()
        })
        .collect();
    Spectrum::new(Curve::new(w, v)?, Measure::Relative, Basis::Energy, "multi-band LED")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::base::quantity::nm;
    use uom::si::thermodynamic_temperature::kelvin;

    fn kelvins(t: f64) -> ThermodynamicTemperature {
        ThermodynamicTemperature::new::<kelvin>(t)
    }

    #[test]
    fn planck_peak_follows_wien_displacement() {
        // Wien's displacement law λ_max T = 2.897 771 955 × 10⁻³ m·K (CODATA 2018).
        let s = planck_radiance(kelvins(5000.0), Grid::nm(400.0, 800.0, 0.1), None).unwrap();
        assert!((s.peak_nm() - 2.897_771_955e-3 / 5000.0 * 1e9).abs() < 0.11);
    }

    #[test]
    fn illuminant_a_is_100_at_560_nm_and_bounded_to_its_definition() {
        let a = cie_illuminant_a(Grid::nm(300.0, 830.0, 1.0)).unwrap();
        assert!((a.curve().at(560.0).unwrap() - 100.0).abs() < 1e-12);
        // CIE 15:2004 Table T.1 value at 400 nm: 14.708 (also colour-science's dataset).
        assert!((a.curve().at(400.0).unwrap() - 14.708).abs() < 5e-4);
        assert!(cie_illuminant_a(Grid::nm(250.0, 830.0, 1.0)).is_err());
    }

    #[test]
    fn ohno_band_has_peak_one_and_its_stated_half_width() {
        let s = ohno_led(nm(460.0), nm(20.0), Grid::nm(400.0, 520.0, 0.01)).unwrap();
        assert!((s.curve().at(460.0).unwrap() - 1.0).abs() < 1e-12);
        // Half maximum lies at ±0.461 Δλ₀.₅ (solving (g + 2g⁵)/3 = ½ numerically).
        let half = s.curve().at(460.0 + 0.4608 * 20.0).unwrap();
        assert!((half - 0.5).abs() < 2e-3, "{half}");
    }

    #[test]
    fn bad_grids_are_rejected() {
        assert!(Grid::nm(500.0, 400.0, 1.0).nodes_nm().is_err());
        assert!(Grid::nm(400.0, 500.0, 0.0).nodes_nm().is_err());
        assert_eq!(Grid::nm(380.0, 780.0, 5.0).nodes_nm().unwrap().len(), 81);
    }
}
