//! From a source to the cornea: the spectral irradiance at the eye and, where it can be known
//! or derived, the spectral radiance the eye sees.
//!
//! - A small source of spectral radiant intensity I at distance d: E = I·cos θᵢ / d² (inverse
//!   square and cosine laws), θᵢ the angle of incidence on the receiving plane.
//! - A small source of total spectral flux Φ: I = Φ/(4π) if it emits isotropically, or
//!   I(θₑ) = (Φ/π)·cos θₑ for a Lambertian emitter seen at θₑ from its axis.
//! - An extended uniform disc of radiance L and diameter D at distance d subtends the full angle
//!   α = 2·atan(D / 2d) (IEC 62471:2006 §3 defines α as the angle subtended by the apparent source
//!   at the eye) and gives on axis E = π·L·sin²(α/2) = π·L·R²/(R² + d²).
//! - A measured spectral irradiance at the eye (or one scaled from a lux reading).
//!
//! Where a radiance is needed and only an irradiance is known, it is derived from the source's
//! subtense as L = E / (π sin²(α/2)) (uniform disc), or L = E/π for light arriving evenly from the
//! whole hemisphere (a full field); results say that the radiance was derived.

use std::f64::consts::PI;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Angle, Length, SiValue};
use crate::spectrum::{Measure, Spectrum};

/// How a small source emits.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Emission {
    /// The same intensity in every direction: I = Φ/(4π).
    Isotropic,
    /// A flat Lambertian emitter: I(θ) = (Φ/π) cos θ.
    Lambertian,
}

/// The angular extent of what the eye sees, used to derive a radiance from an irradiance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Field {
    /// A source of this full subtense α.
    Subtense(Angle),
    /// Light arriving evenly from the whole hemisphere in front of the eye (L = E/π).
    FullField,
}

/// Where a source is and how it radiates.
#[derive(Debug, Clone, PartialEq)]
pub enum Geometry {
    /// A small source of spectral radiant intensity.
    Intensity {
        /// Distance to the eye.
        distance: Length,
        /// Angle of incidence at the eye (0 = facing the source).
        incidence: Angle,
        /// Apparent source size, if known (to derive a radiance).
        size: Option<Length>,
    },
    /// A small source of total spectral flux.
    Flux {
        /// Isotropic or Lambertian.
        emission: Emission,
        /// Distance to the eye.
        distance: Length,
        /// Angle from the emitter's axis (Lambertian only).
        emission_angle: Angle,
        /// Angle of incidence at the eye.
        incidence: Angle,
        /// Apparent source size, if known.
        size: Option<Length>,
    },
    /// An extended uniform disc source of spectral radiance, of full angle α (use
    /// [`subtense`] for a size at a distance).
    Extended {
        /// Full angle subtended at the eye.
        subtense: Angle,
    },
    /// A spectral irradiance measured (or scaled) at the eye.
    AtEye {
        /// What the eye sees, if known.
        field: Option<Field>,
    },
}

/// What arrives at the cornea from one or more sources.
#[derive(Debug, Clone, PartialEq)]
pub struct Corneal {
    /// Spectral irradiance at the cornea.
    pub irradiance: Spectrum,
    /// Spectral radiance of what the eye sees, if known or derivable.
    pub radiance: Option<Spectrum>,
    /// True when the radiance was derived from an irradiance and a subtense.
    pub radiance_derived: bool,
    /// Full angle subtended by the source, if known (`None` for a full field).
    pub subtense: Option<Angle>,
    /// True when the light fills the field of view (a source larger than any limit's field).
    pub full_field: bool,
    /// How the radiance was obtained, or why it is not known.
    pub notes: Vec<String>,
}

fn check_distance(d: Length) -> Result<f64> {
    let v = d.si();
    if !(v > 0.0 && v.is_finite()) {
        return Err(Error::input(format!("distance {v} m must be above 0 m")));
    }
    Ok(v)
}

fn check_angle(a: Angle, what: &str) -> Result<f64> {
    let v = a.si();
    if !(0.0..PI / 2.0).contains(&v.abs()) {
        return Err(Error::input(format!(
            "{what} {:.4}° must be within −90° and 90° (exclusive)",
            v.to_degrees()
        )));
    }
    Ok(v)
}

fn check_subtense(a: Angle) -> Result<f64> {
    let a = a.si();
    if !(a > 0.0 && a < PI) {
        return Err(Error::input(format!("subtense {a} rad must be above 0 and below π rad (180°)")));
    }
    Ok(a)
}

/// Full angle α = 2·atan(D / 2d) subtended by a disc of diameter D at distance d.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a size or distance not above 0.
pub fn subtense(size: Length, distance: Length) -> Result<Angle> {
    let d = check_distance(distance)?;
    let s = size.si();
    if !(s > 0.0 && s.is_finite()) {
        return Err(Error::input(format!("source size {s} m must be above 0 m")));
    }
    Ok(Angle::from_si(2.0 * (s / (2.0 * d)).atan()))
}

/// The projected solid angle π sin²(α/2) sr of a disc of full angle α seen on axis: it turns
/// the disc's radiance into the irradiance it gives.
fn projected_solid_angle(alpha: f64) -> f64 {
    PI * (alpha / 2.0).sin().powi(2)
}

fn require(s: &Spectrum, measure: Measure, geometry: &str) -> Result<()> {
    if s.measure() != measure {
        return Err(Error::input(format!(
            "'{}' is a spectral {}, but the {geometry} geometry needs a spectral {} \
             (scale a relative spectrum with a measured value first)",
            s.label(),
            s.measure().name(),
            measure.name()
        )));
    }
    Ok(())
}

/// What one geometry gives: the corneal spectral irradiance, the seen spectral radiance if
/// known, the subtense (rad) if known, and whether the radiance was derived.
type Arrival = (Spectrum, Option<Spectrum>, Option<f64>, bool);

/// The corneal spectra of one source.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] when the spectrum's measure does not fit the geometry,
/// or for impossible geometry (distance or size not above 0, angles at or beyond 90°,
/// a subtense not within 0 and π), with the allowed range.
pub fn corneal(spectrum: &Spectrum, geometry: &Geometry) -> Result<Corneal> {
    let mut notes = Vec::new();
    let (irradiance, radiance, alpha, derived) = match geometry {
        Geometry::Intensity { distance, incidence, size } => {
            require(spectrum, Measure::Intensity, "intensity")?;
            let d = check_distance(*distance)?;
            let inc = check_angle(*incidence, "angle of incidence")?;
            small_source(spectrum, 1.0, inc.cos(), d, *size, &mut notes)?
        }
        Geometry::Flux { emission, distance, emission_angle, incidence, size } => {
            require(spectrum, Measure::Flux, "flux")?;
            let d = check_distance(*distance)?;
            let inc = check_angle(*incidence, "angle of incidence")?;
            // On-axis intensity per watt, and the cosines that only the irradiance carries: a
            // Lambertian emitter's radiance is the same in every direction.
            let (factor, emission_cos) = match emission {
                Emission::Isotropic => (1.0 / (4.0 * PI), 1.0),
                Emission::Lambertian => (1.0 / PI, check_angle(*emission_angle, "emission angle")?.cos()),
            };
            small_source(spectrum, factor, emission_cos * inc.cos(), d, *size, &mut notes)?
        }
        Geometry::Extended { subtense } => {
            require(spectrum, Measure::Radiance, "extended-source")?;
            let a = check_subtense(*subtense)?;
            let e = spectrum.scaled_as(projected_solid_angle(a), Measure::Irradiance)?;
            (e, Some(spectrum.clone()), Some(a), false)
        }
        Geometry::AtEye { field } => at_eye(spectrum, *field, &mut notes)?,
    };
    Ok(Corneal {
        irradiance: irradiance.with_label(spectrum.label()),
        radiance,
        radiance_derived: derived,
        subtense: alpha.map(Angle::from_si),
        full_field: matches!(geometry, Geometry::AtEye { field: Some(Field::FullField) }),
        notes,
    })
}

/// The radiance of a uniform disc of full angle `alpha` rad giving irradiance `e`, with a
/// note saying so; `None` when the subtense is not known.
fn derive_radiance(e: &Spectrum, alpha: Option<f64>, notes: &mut Vec<String>) -> Result<Option<Spectrum>> {
    match alpha {
        Some(a) => {
            notes.push(format!(
                "radiance derived from the irradiance and a subtense of {} mrad (uniform disc: L = E / (π sin²(α/2)))",
                crate::base::units::sig4(a * 1e3)
            ));
            Ok(Some(e.scaled_as(1.0 / projected_solid_angle(a), Measure::Radiance)?))
        }
        None => Ok(None),
    }
}

/// A small source of intensity `i_factor` × `spectrum` at `d` m; the irradiance on the eye
/// carries `cos_factor` (the cosine of the angle of incidence, and of the emission angle for a
/// Lambertian emitter), the radiance does not: radiance is invariant with the viewing angle.
/// The radiance is derived when the source's size is known.
fn small_source(
    spectrum: &Spectrum,
    i_factor: f64,
    cos_factor: f64,
    d: f64,
    size: Option<Length>,
    notes: &mut Vec<String>,
) -> Result<Arrival> {
    let normal = spectrum.scaled_as(i_factor / (d * d), Measure::Irradiance)?;
    let e = normal.scaled_as(cos_factor, Measure::Irradiance)?;
    let alpha = size.map(|s| subtense(s, Length::from_si(d))).transpose()?.map(|a| a.si());
    if alpha.is_none() {
        notes.push("radiance not known: give the source size to derive it".to_string());
    }
    let radiance = derive_radiance(&normal, alpha, notes)?;
    let derived = radiance.is_some();
    Ok((e, radiance, alpha, derived))
}

/// A spectral irradiance measured at the eye, with what the eye sees if known.
fn at_eye(spectrum: &Spectrum, field: Option<Field>, notes: &mut Vec<String>) -> Result<Arrival> {
    require(spectrum, Measure::Irradiance, "at-the-eye")?;
    Ok(match field {
        Some(Field::Subtense(a)) => {
            let a = check_subtense(a)?;
            let l = derive_radiance(spectrum, Some(a), notes)?;
            (spectrum.clone(), l, Some(a), true)
        }
        Some(Field::FullField) => {
            notes.push(
                "radiance derived for a full field (light arriving evenly from the hemisphere: L = E/π)"
                    .to_string(),
            );
            (spectrum.clone(), Some(spectrum.scaled_as(1.0 / PI, Measure::Radiance)?), None, true)
        }
        None => {
            notes.push(
                "radiance not known: give the source's subtense, or say the light fills the field"
                    .to_string(),
            );
            (spectrum.clone(), None, None, false)
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::base::curve::Curve;
    use crate::base::units::{parse_angle, parse_length};
    use crate::spectrum::Basis;

    fn flat(measure: Measure, v: f64) -> Spectrum {
        Spectrum::new(Curve::new(vec![400.0, 700.0], vec![v, v]).unwrap(), measure, Basis::Energy, "flat")
            .unwrap()
    }

    #[test]
    fn impossible_geometry_is_rejected_with_the_allowed_range() {
        let i = flat(Measure::Intensity, 1.0);
        let g = Geometry::Intensity {
            distance: parse_length("-1 m").unwrap(),
            incidence: Angle::from_si(0.0),
            size: None,
        };
        assert!(corneal(&i, &g).unwrap_err().message().contains("must be above 0 m"));
        let g = Geometry::Intensity {
            distance: parse_length("1 m").unwrap(),
            incidence: parse_angle("90 deg").unwrap(),
            size: None,
        };
        assert!(corneal(&i, &g).unwrap_err().message().contains("within −90° and 90°"));
        let e = flat(Measure::Irradiance, 1.0);
        let g = Geometry::AtEye { field: Some(Field::Subtense(parse_angle("181 deg").unwrap())) };
        assert!(corneal(&e, &g).unwrap_err().message().contains("below π rad"));
    }

    #[test]
    fn measure_must_fit_the_geometry() {
        let l = flat(Measure::Radiance, 1.0);
        let g = Geometry::AtEye { field: None };
        assert!(corneal(&l, &g).unwrap_err().message().contains("needs a spectral irradiance"));
    }

    #[test]
    fn radiance_is_invariant_with_incidence_and_irradiance_carries_the_cosine() {
        // Radiometry: a source's radiance does not change with the viewing angle; the irradiance
        // on a surface tilted by θ is E(0)·cos θ (Lambert's cosine law).
        let i = flat(Measure::Intensity, 2.0);
        let at = |deg: f64| {
            let g = Geometry::Intensity {
                distance: parse_length("0.5 m").unwrap(),
                incidence: parse_angle(&format!("{deg} deg")).unwrap(),
                size: Some(parse_length("5 mm").unwrap()),
            };
            corneal(&i, &g).unwrap()
        };
        let c0 = at(0.0);
        let total = |s: &Spectrum| s.curve().integral();
        for deg in [30.0, 60.0] {
            let c = at(deg);
            let l0 = total(c0.radiance.as_ref().unwrap());
            assert!((total(c.radiance.as_ref().unwrap()) - l0).abs() <= 1e-12 * l0, "{deg}°");
            let want = total(&c0.irradiance) * f64::to_radians(deg).cos();
            assert!((total(&c.irradiance) - want).abs() <= 1e-12 * want, "{deg}°");
        }
        // A Lambertian emitter seen off-axis: same radiance, irradiance × cos φ.
        let f = flat(Measure::Flux, 1.0);
        let lam = |deg: f64| {
            let g = Geometry::Flux {
                emission: Emission::Lambertian,
                distance: parse_length("1 m").unwrap(),
                emission_angle: parse_angle(&format!("{deg} deg")).unwrap(),
                incidence: Angle::from_si(0.0),
                size: Some(parse_length("10 mm").unwrap()),
            };
            corneal(&f, &g).unwrap()
        };
        let (a, b) = (lam(0.0), lam(60.0));
        let (la, lb) = (total(a.radiance.as_ref().unwrap()), total(b.radiance.as_ref().unwrap()));
        assert!((la - lb).abs() <= 1e-12 * la);
        assert!((total(&b.irradiance) - 0.5 * total(&a.irradiance)).abs() <= 1e-12 * total(&a.irradiance));
    }
}
