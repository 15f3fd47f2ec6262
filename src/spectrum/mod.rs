//! Spectra: a sampled curve plus what it measures.
//!
//! A [`Spectrum`] holds values per nanometre of one declared [`Measure`] (radiance, irradiance,
//! intensity, flux, or a unit-free relative shape) on an energy or photon [`Basis`]. Energy and
//! photon values convert exactly with E = h·c/λ (SI 2019 exact h and c). Outside its sampled
//! range a spectrum is not covered; every integral reports its [`Coverage`].

use serde::Serialize;

use crate::base::constants::PLANCK_TIMES_C_J_M;
use crate::base::curve::Curve;
use crate::base::error::{Error, Result};
use crate::base::quantity::{
    Irradiance, PhotonFlux, PhotonIntensity, PhotonIrradiance, PhotonRadiance, Power, Radiance,
    RadiantIntensity, SiValue,
};

/// What a spectrum's values measure (per nanometre of wavelength).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Measure {
    /// Spectral radiance, W·m⁻²·sr⁻¹·nm⁻¹ (photon basis: photons·s⁻¹·m⁻²·sr⁻¹·nm⁻¹).
    Radiance,
    /// Spectral irradiance, W·m⁻²·nm⁻¹ (photons·s⁻¹·m⁻²·nm⁻¹).
    Irradiance,
    /// Spectral radiant intensity, W·sr⁻¹·nm⁻¹ (photons·s⁻¹·sr⁻¹·nm⁻¹).
    Intensity,
    /// Spectral radiant flux, W·nm⁻¹ (photons·s⁻¹·nm⁻¹).
    Flux,
    /// A unit-free spectral shape, to be scaled to a measured quantity.
    Relative,
}

impl Measure {
    /// All measures, in the order used in help texts.
    pub const ALL: [Measure; 5] =
        [Measure::Radiance, Measure::Irradiance, Measure::Intensity, Measure::Flux, Measure::Relative];

    /// The name used in files and on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Measure::Radiance => "radiance",
            Measure::Irradiance => "irradiance",
            Measure::Intensity => "intensity",
            Measure::Flux => "flux",
            Measure::Relative => "relative",
        }
    }

    /// Parses a name as written in a spectrum file header or on the command line.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] listing the accepted names.
    pub fn parse(text: &str) -> Result<Self> {
        let t = text.trim().to_ascii_lowercase();
        let t = t.strip_prefix("spectral ").unwrap_or(&t);
        let t = t.strip_prefix("spectral-").unwrap_or(t);
        Ok(match t {
            "radiance" => Measure::Radiance,
            "irradiance" => Measure::Irradiance,
            "intensity" | "radiant intensity" | "radiant-intensity" => Measure::Intensity,
            "flux" | "radiant flux" | "radiant-flux" | "power" => Measure::Flux,
            "relative" | "shape" => Measure::Relative,
            _ => {
                return Err(Error::input(format!(
                    "unknown spectral quantity '{text}'; expected one of radiance, irradiance, intensity, flux, relative"
                )));
            }
        })
    }

    /// The unit of the values per nanometre on the given basis.
    pub fn unit_per_nm(self, basis: Basis) -> &'static str {
        match (self, basis) {
            (Measure::Radiance, Basis::Energy) => "W·m⁻²·sr⁻¹·nm⁻¹",
            (Measure::Irradiance, Basis::Energy) => "W·m⁻²·nm⁻¹",
            (Measure::Intensity, Basis::Energy) => "W·sr⁻¹·nm⁻¹",
            (Measure::Flux, Basis::Energy) => "W·nm⁻¹",
            (Measure::Radiance, Basis::Photon) => "photons·s⁻¹·m⁻²·sr⁻¹·nm⁻¹",
            (Measure::Irradiance, Basis::Photon) => "photons·s⁻¹·m⁻²·nm⁻¹",
            (Measure::Intensity, Basis::Photon) => "photons·s⁻¹·sr⁻¹·nm⁻¹",
            (Measure::Flux, Basis::Photon) => "photons·s⁻¹·nm⁻¹",
            (Measure::Relative, _) => "relative units per nm",
        }
    }
}

/// Whether values count energy (watts) or photons (photons per second).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Basis {
    /// Radiometric values in watts.
    Energy,
    /// Photon-count values in photons per second.
    Photon,
}

impl Basis {
    /// Parses `energy` or `photon` (also `quantal`, `photons`).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] naming the accepted spellings.
    pub fn parse(text: &str) -> Result<Self> {
        match text.trim().to_ascii_lowercase().as_str() {
            "energy" | "radiometric" | "watts" => Ok(Basis::Energy),
            "photon" | "photons" | "quantal" => Ok(Basis::Photon),
            _ => Err(Error::input(format!("unknown basis '{text}'; expected energy or photon"))),
        }
    }
}

/// A radiometric total of a spectrum, typed by what the spectrum measures.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Radiometric {
    /// Radiance.
    Radiance(Radiance),
    /// Irradiance.
    Irradiance(Irradiance),
    /// Radiant intensity.
    Intensity(RadiantIntensity),
    /// Radiant flux.
    Flux(Power),
}

impl Radiometric {
    /// The value in coherent SI units and that unit's symbol, for renderers.
    pub fn si_with_unit(&self) -> (f64, &'static str) {
        match self {
            Radiometric::Radiance(q) => (q.si(), "W·m⁻²·sr⁻¹"),
            Radiometric::Irradiance(q) => (q.si(), "W·m⁻²"),
            Radiometric::Intensity(q) => (q.si(), "W·sr⁻¹"),
            Radiometric::Flux(q) => (q.si(), "W"),
        }
    }

    /// Wraps `value` in coherent SI units as the radiant quantity `measure` calls for;
    /// `None` for a relative spectrum.
    pub fn from_si(measure: Measure, value: f64) -> Option<Self> {
        Some(match measure {
            Measure::Radiance => Radiometric::Radiance(Radiance::from_si(value)),
            Measure::Irradiance => Radiometric::Irradiance(Irradiance::from_si(value)),
            Measure::Intensity => Radiometric::Intensity(RadiantIntensity::from_si(value)),
            Measure::Flux => Radiometric::Flux(Power::from_si(value)),
            Measure::Relative => return None,
        })
    }
}

/// A photon-count total of a spectrum, typed by what the spectrum measures.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PhotonTotal {
    /// Photon radiance.
    Radiance(PhotonRadiance),
    /// Photon irradiance.
    Irradiance(PhotonIrradiance),
    /// Photon intensity.
    Intensity(PhotonIntensity),
    /// Photon flux.
    Flux(PhotonFlux),
}

impl PhotonTotal {
    /// The value in coherent SI units and that unit's symbol, for renderers.
    pub fn si_with_unit(&self) -> (f64, &'static str) {
        match self {
            PhotonTotal::Radiance(q) => (q.si(), "photons·s⁻¹·m⁻²·sr⁻¹"),
            PhotonTotal::Irradiance(q) => (q.si(), "photons·s⁻¹·m⁻²"),
            PhotonTotal::Intensity(q) => (q.si(), "photons·s⁻¹·sr⁻¹"),
            PhotonTotal::Flux(q) => (q.si(), "photons·s⁻¹"),
        }
    }

    fn from_si(measure: Measure, value: f64) -> Option<Self> {
        Some(match measure {
            Measure::Radiance => PhotonTotal::Radiance(PhotonRadiance::from_si(value)),
            Measure::Irradiance => PhotonTotal::Irradiance(PhotonIrradiance::from_si(value)),
            Measure::Intensity => PhotonTotal::Intensity(PhotonIntensity::from_si(value)),
            Measure::Flux => PhotonTotal::Flux(PhotonFlux::from_si(value)),
            Measure::Relative => return None,
        })
    }
}

/// How much of a wavelength band an integral could actually use.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Coverage {
    /// The band the quantity needs, in nm.
    pub needed_nm: (f64, f64),
    /// The part of it the spectrum covers, in nm; `None` if none.
    pub covered_nm: Option<(f64, f64)>,
    /// Share of the weighting function's integral (or of the band's width, for an unweighted
    /// band) that lies outside the covered part: 0 when complete, 1 when nothing is covered.
    pub uncovered_weight_share: f64,
}

impl Coverage {
    /// True when the spectrum covers the whole band.
    pub fn is_complete(&self) -> bool {
        self.uncovered_weight_share == 0.0
    }

    /// True when the missing part can change a reported figure: at least
    /// [`COVERAGE_MATTERS_SHARE`] of the weighting lies where the spectrum is unmeasured.
    /// Reports mention coverage only then.
    pub fn matters(&self) -> bool {
        self.uncovered_weight_share >= COVERAGE_MATTERS_SHARE
    }

    /// Coverage of `weighting` (defined over its own range) by a spectrum sampled over `spectrum_nm`.
    pub fn of_weighting(spectrum_nm: (f64, f64), weighting: &Curve) -> Coverage {
        let needed = weighting.range_nm();
        let lo = spectrum_nm.0.max(needed.0);
        let hi = spectrum_nm.1.min(needed.1);
        let total = weighting.integral();
        if lo >= hi {
            return Coverage { needed_nm: needed, covered_nm: None, uncovered_weight_share: 1.0 };
        }
        let inside = weighting.integral_over(lo, hi);
        let share = if total > 0.0 { ((total - inside) / total).max(0.0) } else { 0.0 };
        // A weighting that is zero outside the covered part is completely covered.
        let share = if share < 1e-15 { 0.0 } else { share };
        Coverage { needed_nm: needed, covered_nm: Some((lo, hi)), uncovered_weight_share: share }
    }

    /// Coverage of an unweighted band `[lo, hi]` by a spectrum sampled over `spectrum_nm`.
    pub fn of_band(spectrum_nm: (f64, f64), band_nm: (f64, f64)) -> Coverage {
        let lo = spectrum_nm.0.max(band_nm.0);
        let hi = spectrum_nm.1.min(band_nm.1);
        if lo >= hi {
            return Coverage { needed_nm: band_nm, covered_nm: None, uncovered_weight_share: 1.0 };
        }
        let share = 1.0 - (hi - lo) / (band_nm.1 - band_nm.0);
        let share = if share < 1e-15 { 0.0 } else { share };
        Coverage { needed_nm: band_nm, covered_nm: Some((lo, hi)), uncovered_weight_share: share }
    }
}

/// Below this share of a weighting outside the measured range (0.01 %), the missing part
/// cannot change a figure printed to four significant digits, so reports do not mention it
/// (verdicts still treat any uncovered share as partial).
pub const COVERAGE_MATTERS_SHARE: f64 = 1e-4;

/// A peak needs at least this many samples at or above half its height to be integrated
/// reliably by the trapezoid rule (common practice, no source).
pub const MIN_SAMPLES_PER_PEAK: usize = 3;

/// Spacing above which a spectrum is called coarse for hazard weightings, nm (the 5 nm of
/// the CIE and IEC tables; common practice, no source).
pub const COARSE_STEP_NM: f64 = 5.0;

/// A sampled spectrum with its declared measure and basis.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Spectrum {
    curve: Curve,
    measure: Measure,
    basis: Basis,
    label: String,
    provenance: Option<String>,
}

impl Spectrum {
    /// Builds a spectrum, checking that the values are not negative (the curve checks order and
    /// finiteness).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidData`] naming the first negative sample.
    pub fn new(curve: Curve, measure: Measure, basis: Basis, label: impl Into<String>) -> Result<Self> {
        if let Some((i, (&w, &v))) =
            curve.wavelength_nm().iter().zip(curve.values()).enumerate().find(|(_, (_, v))| **v < 0.0)
        {
            return Err(Error::data(format!(
                "sample {} at {w} nm: value {v} is negative; spectral values must be ≥ 0",
                i + 1
            )));
        }
        Ok(Spectrum { curve, measure, basis, label: label.into(), provenance: None })
    }

    /// The sampled curve (values per nm in [`Measure::unit_per_nm`]).
    pub fn curve(&self) -> &Curve {
        &self.curve
    }

    /// What the values measure.
    pub fn measure(&self) -> Measure {
        self.measure
    }

    /// Energy or photon basis.
    pub fn basis(&self) -> Basis {
        self.basis
    }

    /// A short human-readable name for the spectrum.
    pub fn label(&self) -> &str {
        &self.label
    }

    /// First and last sampled wavelength, in nm.
    pub fn range_nm(&self) -> (f64, f64) {
        self.curve.range_nm()
    }

    /// Where the spectrum came from (a file's `source`, a lamp's provenance), if known.
    pub fn provenance(&self) -> Option<&str> {
        self.provenance.as_deref()
    }

    /// The same spectrum with a provenance note.
    #[must_use]
    pub fn with_provenance(mut self, provenance: impl Into<String>) -> Spectrum {
        self.provenance = Some(provenance.into());
        self
    }

    /// The same values re-declared as `measure` on `basis` (for a file whose header is wrong or
    /// missing); no conversion is applied.
    #[must_use]
    pub fn declared_as(mut self, measure: Measure, basis: Basis) -> Spectrum {
        self.measure = measure;
        self.basis = basis;
        self
    }

    /// The same spectrum with another label.
    #[must_use]
    pub fn with_label(mut self, label: impl Into<String>) -> Spectrum {
        self.label = label.into();
        self
    }

    /// The same spectrum on the energy basis: X_e,λ = X_p,λ · h·c/λ (exact).
    #[must_use]
    pub fn to_energy(&self) -> Spectrum {
        match self.basis {
            Basis::Energy => self.clone(),
            Basis::Photon => Spectrum {
                curve: self.curve.map(|w, v| v * PLANCK_TIMES_C_J_M / (w * 1e-9)),
                basis: Basis::Energy,
                ..self.clone()
            },
        }
    }

    /// The same spectrum on the photon basis: X_p,λ = X_e,λ · λ/(h·c) (exact).
    #[must_use]
    pub fn to_photon(&self) -> Spectrum {
        match self.basis {
            Basis::Photon => self.clone(),
            Basis::Energy => Spectrum {
                curve: self.curve.map(|w, v| v * (w * 1e-9) / PLANCK_TIMES_C_J_M),
                basis: Basis::Photon,
                ..self.clone()
            },
        }
    }

    /// The same shape multiplied by `factor`, declared as `measure` (used to give a relative
    /// shape an absolute scale).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] if `factor` is negative or not finite.
    pub fn scaled_as(&self, factor: f64, measure: Measure) -> Result<Spectrum> {
        if !factor.is_finite() || factor < 0.0 {
            return Err(Error::input(format!("scale factor {factor} is not a finite number ≥ 0")));
        }
        Ok(Spectrum { curve: self.curve.scaled(factor), measure, ..self.clone() })
    }
    /// The widest spacing between neighbouring samples where there is light, nm.
    pub fn max_step_nm(&self) -> f64 {
        // Intervals where both ends are zero carry no light (such as the zeros a declared
        // emission range adds) and say nothing about the sampling.
        let (w, v) = (self.curve().wavelength_nm(), self.curve().values());
        (1..w.len()).filter(|&i| v[i - 1] != 0.0 || v[i] != 0.0).map(|i| w[i] - w[i - 1]).fold(0.0, f64::max)
    }

    /// Peaks too narrow for the sampling: local maxima (above 5 % of the spectrum's maximum)
    /// with fewer than [`MIN_SAMPLES_PER_PEAK`] samples at or above half their height. Returns
    /// (peak wavelength nm, samples above half height). A line between two samples cannot be
    /// seen at all; this catches the peaks that are seen but under-sampled.
    pub fn undersampled_peaks(&self) -> Vec<(f64, usize)> {
        let (w, v) = (self.curve().wavelength_nm(), self.curve().values());
        let top = v.iter().copied().fold(0.0, f64::max);
        let mut out = Vec::new();
        for i in 0..v.len() {
            let left = if i > 0 { v[i - 1] } else { 0.0 };
            let right = v.get(i + 1).copied().unwrap_or(0.0);
            if !(v[i] > 0.05 * top && v[i] >= left && v[i] > right) {
                continue;
            }
            let half = 0.5 * v[i];
            let lo = v[..i].iter().rev().take_while(|x| **x >= half).count();
            let hi = v[i + 1..].iter().take_while(|x| **x >= half).count();
            let n = lo + hi + 1;
            if n < MIN_SAMPLES_PER_PEAK {
                out.push((w[i], n));
            }
        }
        out
    }

    /// Warnings about this spectrum's sampling, for reports: peaks narrower than a few samples,
    /// and a spacing coarser than [`COARSE_STEP_NM`] (too coarse for hazard weightings such as
    /// B(λ), whose features are a few nm wide).
    pub fn sampling_notes(&self) -> Vec<String> {
        let mut notes = Vec::new();
        let step = self.max_step_nm();
        let peaks = self.undersampled_peaks();
        if !peaks.is_empty() {
            notes.push(format!(
                "'{}' is sampled too coarsely for its own peaks (fewer than {MIN_SAMPLES_PER_PEAK} samples above half \
                 height at {} nm; widest spacing {step} nm): integrals and verdicts can be far off; measure or tabulate \
                 at a finer spacing",
                self.label(),
                peaks.iter().map(|p| format!("{}", p.0)).collect::<Vec<_>>().join(", ")
            ));
        }
        if step > COARSE_STEP_NM {
            notes.push(format!(
                "'{}' has samples up to {step} nm apart, coarser than {COARSE_STEP_NM} nm: weighted hazard quantities can \
                 be off by several percent; a verdict within 20 % of its limit is marked",
                self.label()
            ));
        }
        notes
    }

    /// The spectrum taken as zero outside its measured range, out to `lo_nm`–`hi_nm`: the
    /// user's statement that the source emits nothing there. Zero nodes are added just outside
    /// the measured ends (10⁻⁶ of the wavelength away) and at the new ends, so integrals inside the
    /// measured range do not change.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] when the declared range does not contain the measured one.
    pub fn assumed_dark_outside(&self, lo_nm: f64, hi_nm: f64) -> Result<Spectrum> {
        let (a, b) = self.range_nm();
        if !(lo_nm > 0.0 && lo_nm <= a && hi_nm >= b && hi_nm.is_finite()) {
            return Err(Error::input(format!(
                "the declared emission range {lo_nm}–{hi_nm} nm must contain the measured range {a}–{b} nm"
            )));
        }
        let (mut w, mut v) = (Vec::new(), Vec::new());
        if lo_nm < a {
            let edge = a * (1.0 - 1e-6);
            w.extend([lo_nm.min(edge * (1.0 - 1e-9)), edge]);
            v.extend([0.0, 0.0]);
        }
        w.extend_from_slice(self.curve().wavelength_nm());
        v.extend_from_slice(self.curve().values());
        if hi_nm > b {
            let edge = b * (1.0 + 1e-6);
            w.extend([edge, hi_nm.max(edge * (1.0 + 1e-9))]);
            v.extend([0.0, 0.0]);
        }
        Ok(self.with_curve(Curve::new(w, v)?))
    }

    /// The same measure, basis, label and provenance with other sampled values (already
    /// checked to be ≥ 0 by the caller's construction).
    #[must_use]
    pub fn with_curve(&self, curve: Curve) -> Spectrum {
        Spectrum { curve, ..self.clone() }
    }

    /// The sum of spectra of one measure and basis over the union of their ranges, each source
    /// taken as emitting nothing outside its own tabulated range (on the union of their nodes).
    /// Callers should say so when the ranges differ.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for an empty list or mixed measures or bases.
    pub fn sum(parts: &[Spectrum]) -> Result<Spectrum> {
        let first = parts.first().ok_or_else(|| Error::input("nothing to add: no spectra"))?;
        let mut curve = first.curve.clone();
        for p in &parts[1..] {
            if p.measure != first.measure || p.basis != first.basis {
                return Err(Error::input(format!(
                    "cannot add '{}' (spectral {}) to '{}' (spectral {})",
                    p.label,
                    p.measure.name(),
                    first.label,
                    first.measure.name()
                )));
            }
            curve = curve.added_over_union(&p.curve);
        }
        let label = parts.iter().map(|p| p.label.as_str()).collect::<Vec<_>>().join(" + ");
        Ok(Spectrum { curve, label, provenance: None, ..first.clone() })
    }

    /// The spectrum linearly interpolated at `grid_nm`.
    ///
    /// # Errors
    /// [`crate::ErrorKind::NotCovered`] if the grid reaches outside the sampled range.
    pub fn resampled(&self, grid_nm: &[f64]) -> Result<Spectrum> {
        Ok(Spectrum { curve: self.curve.resampled(grid_nm)?, ..self.clone() })
    }

    /// ∫ X_λ dλ over the sampled range, on the spectrum's own basis (trapezoid rule).
    pub fn integral(&self) -> f64 {
        self.curve.integral()
    }

    /// Radiant total over the sampled range; `None` for a relative spectrum.
    pub fn radiometric_total(&self) -> Option<Radiometric> {
        Radiometric::from_si(self.measure, self.to_energy().integral())
    }

    /// Photon total over the sampled range; `None` for a relative spectrum.
    pub fn photon_total(&self) -> Option<PhotonTotal> {
        PhotonTotal::from_si(self.measure, self.to_photon().integral())
    }

    /// ∫ X_λ(λ)·w(λ) dλ on the spectrum's own basis, with how much of `w` was covered.
    pub fn weighted(&self, weighting: &Curve) -> (f64, Coverage) {
        (self.curve.product_integral(weighting), Coverage::of_weighting(self.range_nm(), weighting))
    }

    /// ∫ X_λ dλ over a band, on the spectrum's own basis, with its coverage.
    pub fn band_integral(&self, band_nm: (f64, f64)) -> (f64, Coverage) {
        (self.curve.integral_over(band_nm.0, band_nm.1), Coverage::of_band(self.range_nm(), band_nm))
    }

    /// Wavelength of the largest spectral value, in nm (on the spectrum's own basis).
    pub fn peak_nm(&self) -> f64 {
        self.curve.wavelength_nm()[self.curve.peak_index()]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coarse_sampling_of_a_narrow_peak_is_flagged() {
        use crate::spectrum::generate::{Grid, ohno_led};
        let nm = crate::base::quantity::nm;
        let fine = ohno_led(nm(450.0), nm(5.0), Grid::nm(380.0, 780.0, 1.0)).unwrap();
        assert!(fine.undersampled_peaks().is_empty());
        assert!(fine.sampling_notes().is_empty());
        let coarse = ohno_led(nm(450.0), nm(5.0), Grid::nm(380.0, 780.0, 10.0)).unwrap();
        assert_eq!(coarse.undersampled_peaks(), vec![(450.0, 1)]);
        let notes = coarse.sampling_notes();
        assert!(notes.iter().any(|n| n.contains("too coarsely for its own peaks")), "{notes:?}");
        assert!(notes.iter().any(|n| n.contains("coarser than 5 nm")), "{notes:?}");
    }

    #[test]
    fn a_declared_emission_range_adds_zeros_and_changes_no_integral_inside() {
        let s = Spectrum::new(
            Curve::new(vec![380.0, 500.0, 780.0], vec![1.0, 2.0, 1.0]).unwrap(),
            Measure::Irradiance,
            Basis::Energy,
            "x",
        )
        .unwrap();
        let d = s.assumed_dark_outside(180.0, 3000.0).unwrap();
        assert_eq!(d.range_nm(), (180.0, 3000.0));
        let (a, b) = (s.curve().integral(), d.curve().integral());
        assert!((a - b).abs() < 1e-5 * a, "{a} {b}");
        assert!(s.assumed_dark_outside(400.0, 3000.0).is_err());
    }

    fn flat(measure: Measure, basis: Basis) -> Spectrum {
        let w: Vec<f64> = (400..=700).map(f64::from).collect();
        let n = w.len();
        Spectrum::new(Curve::new(w, vec![1.0; n]).unwrap(), measure, basis, "flat").unwrap()
    }

    #[test]
    fn negative_values_are_rejected_with_their_position() {
        let c = Curve::new(vec![400.0, 500.0, 600.0], vec![1.0, -0.1, 1.0]).unwrap();
        let err = Spectrum::new(c, Measure::Irradiance, Basis::Energy, "x").unwrap_err();
        assert!(err.message().contains("sample 2 at 500 nm"), "{err}");
    }

    #[test]
    fn relative_spectra_have_no_absolute_totals() {
        assert!(flat(Measure::Relative, Basis::Energy).radiometric_total().is_none());
        let t = flat(Measure::Irradiance, Basis::Energy).radiometric_total().unwrap();
        assert_eq!(t.si_with_unit(), (300.0, "W·m⁻²"));
    }

    #[test]
    fn band_coverage_reports_the_missing_part() {
        let s = flat(Measure::Irradiance, Basis::Energy);
        let (v, cov) = s.band_integral((300.0, 400.0));
        assert_eq!(v, 0.0);
        assert_eq!(cov.covered_nm, None);
        let (_, cov) = s.band_integral((600.0, 800.0));
        assert_eq!(cov.covered_nm, Some((600.0, 700.0)));
        assert!((cov.uncovered_weight_share - 0.5).abs() < 1e-12);
        assert!(!cov.is_complete());
    }
}

pub mod generate;
pub mod photometry;
pub mod reader;
pub mod report;
pub mod scale;
pub mod source;
