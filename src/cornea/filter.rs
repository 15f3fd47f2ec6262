//! Spectral filters in the light path: cage walls, filter tops, neutral-density or colour
//! filters, spectacles. Transmittances multiply the spectrum; a filter may be flat
//! (`"0.65"`) or a two-column transmittance file (wavelength nm, transmittance 0–1).

use crate::base::curve::Curve;
use crate::base::error::{Error, Result};
use crate::spectrum::Spectrum;
use crate::spectrum::reader::read_table;

/// A filter in the light path.
#[derive(Debug, Clone, PartialEq)]
pub enum Filter {
    /// The same transmittance at every wavelength.
    Flat {
        /// Transmittance, 0–1.
        transmittance: f64,
        /// Name for reports.
        label: String,
    },
    /// A spectral transmittance curve; outside its range the light is not covered.
    Spectral {
        /// Transmittance, 0–1, per wavelength.
        curve: Curve,
        /// Name for reports.
        label: String,
    },
}

impl Filter {
    /// A flat filter.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] unless 0 ≤ `transmittance` ≤ 1.
    pub fn flat(transmittance: f64, label: impl Into<String>) -> Result<Filter> {
        if !(0.0..=1.0).contains(&transmittance) {
            return Err(Error::input(format!(
                "filter transmittance {transmittance} must be between 0 and 1 (a filter cannot add light)"
            )));
        }
        Ok(Filter::Flat { transmittance, label: label.into() })
    }

    /// A spectral filter from a two-column file's text.
    ///
    /// # Errors
    /// The reader's errors, and a transmittance outside 0–1 (naming the file and wavelength).
    pub fn from_table(text: &str, origin: &str) -> Result<Filter> {
        let t = read_table(text, origin)?;
        if let Some((w, v)) =
            t.curve.wavelength_nm().iter().zip(t.curve.values()).find(|(_, v)| !(0.0..=1.0).contains(*v))
        {
            return Err(Error::data(format!(
                "{origin}: transmittance {v} at {w} nm must be between 0 and 1"
            )));
        }
        let label = t.meta("name").unwrap_or(origin).to_string();
        Ok(Filter::Spectral { curve: t.curve, label })
    }

    /// Parses `"0.65"` as a flat filter, or reads a transmittance file at that path.
    ///
    /// # Errors
    /// As [`Filter::flat`] and [`Filter::from_table`], or a file that cannot be read.
    pub fn parse(spec: &str) -> Result<Filter> {
        if let Ok(t) = crate::base::units::parse_number(spec) {
            return Filter::flat(t, format!("flat {t}"));
        }
        let text = std::fs::read_to_string(spec).map_err(|e| {
            Error::input(format!("filter '{spec}' is neither a transmittance (0–1) nor a readable file: {e}"))
        })?;
        Filter::from_table(&text, spec)
    }

    /// The same filter with another name.
    #[must_use]
    pub fn with_label(self, name: &str) -> Filter {
        match self {
            Filter::Flat { transmittance, .. } => Filter::Flat { transmittance, label: name.to_string() },
            Filter::Spectral { curve, .. } => Filter::Spectral { curve, label: name.to_string() },
        }
    }

    /// Name for reports.
    pub fn label(&self) -> &str {
        match self {
            Filter::Flat { label, .. } | Filter::Spectral { label, .. } => label,
        }
    }

    /// The spectrum after the filter. A spectral filter limits the result to where both are
    /// defined.
    ///
    /// # Errors
    /// [`crate::ErrorKind::NotCovered`] if a spectral filter does not overlap the spectrum.
    pub fn apply(&self, s: &Spectrum) -> Result<Spectrum> {
        match self {
            Filter::Flat { transmittance, .. } => s.scaled_as(*transmittance, s.measure()),
            Filter::Spectral { curve, label } => {
                let c = s.curve().combined(curve, |x, t| x * t).ok_or_else(|| {
                    Error::not_covered(format!(
                        "filter '{label}' ({}–{} nm) does not overlap '{}' ({}–{} nm)",
                        curve.range_nm().0,
                        curve.range_nm().1,
                        s.label(),
                        s.range_nm().0,
                        s.range_nm().1
                    ))
                })?;
                Ok(s.with_curve(c))
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn transmittances_outside_zero_to_one_are_rejected() {
        assert!(Filter::flat(1.2, "x").is_err());
        assert!(Filter::parse("-0.1").is_err());
        let err = Filter::from_table("400,0.5\n500,1.5\n", "f.csv").unwrap_err();
        assert!(err.message().contains("f.csv: transmittance 1.5 at 500 nm"), "{err}");
    }
}
