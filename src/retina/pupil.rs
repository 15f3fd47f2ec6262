//! Pupil size: fixed, from the species table, or from a published formula of luminance.
//!
//! Formulas (L in cd/m², D in mm), as collected by Watson & Yellott (2012), "A unified formula
//! for light-adapted pupil size", J Vis 12(10):12:
//!
//! - de Groot & Gebhard (1952): D = 7.175 · exp[−0.00092 (7.597 + log₁₀ L)³] (their formula in
//!   millilamberts, converted to cd/m²; derived);
//! - Moon & Spencer (1944): D = 4.9 − 3 tanh(0.4 log₁₀ L) (as converted by Watson & Yellott;
//!   from memory);
//! - Stanley & Davies (1995): D_SD(F) = 7.75 − 5.75 [(F/846)^0.41 / ((F/846)^0.41 + 2)],
//!   F = L·a, a the field area in deg² (constants confirmed in a secondary page; the "+ 2" from
//!   memory);
//! - Watson & Yellott (2012) unified: F = L·a·M(e), M(1 eye) = 0.1, M(2 eyes) = 1,
//!   D = D_SD(F) + (y − 28.58)·[0.02132 − 0.009562 D_SD(F)], y the age in years
//!   (y₀ = 28.58 confirmed in a secondary page; the other constants from memory).

use std::f64::consts::PI;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Angle, Length, Luminance, SiValue, Time};
use crate::base::units::tidy;
use crate::retina::eye::{Eye, Status};
use uom::si::length::millimeter;
use uom::si::luminance::candela_per_square_meter;

/// How the pupil is chosen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PupilRule {
    /// A stated diameter (an artificial pupil, a measured or dilated pupil).
    Fixed(Length),
    /// The species table's dark-adapted diameter.
    DarkAdapted,
    /// The species table's light-adapted diameter.
    LightAdapted,
    /// The species table's pharmacologically dilated diameter.
    Dilated,
    /// Watson & Yellott (2012) unified formula (human).
    WatsonYellott,
    /// de Groot & Gebhard (1952) (human).
    DeGrootGebhard,
    /// Moon & Spencer (1944) (human).
    MoonSpencer,
}

impl PupilRule {
    /// Parses a diameter with its unit (`"7 mm"`) or a rule name: `dark`, `light`, `dilated`,
    /// `watson-yellott`, `de-groot-gebhard`, `moon-spencer`.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] listing the accepted forms.
    pub fn parse(text: &str) -> Result<PupilRule> {
        Ok(match text.trim() {
            "dark" | "dark-adapted" => PupilRule::DarkAdapted,
            "light" | "light-adapted" => PupilRule::LightAdapted,
            "dilated" => PupilRule::Dilated,
            "watson-yellott" => PupilRule::WatsonYellott,
            "de-groot-gebhard" => PupilRule::DeGrootGebhard,
            "moon-spencer" => PupilRule::MoonSpencer,
            t if t.starts_with(|c: char| c.is_ascii_digit() || c == '.') => {
                PupilRule::Fixed(crate::base::units::parse_length(t)?)
            }
            _ => {
                return Err(Error::input(format!(
                    "pupil '{text}' is neither a diameter (\"7 mm\") nor a rule: dark, light, dilated, \
                     watson-yellott, de-groot-gebhard, moon-spencer"
                )));
            }
        })
    }
}

/// What the pupil formulas need to know about the viewing.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Adaptation {
    /// Luminance of the adapting field.
    pub luminance: Option<Luminance>,
    /// Full angle of the adapting field (a circular field of this diameter).
    pub field: Option<Angle>,
    /// Age of the observer.
    pub age: Option<Time>,
    /// Number of eyes viewing (1 or 2).
    pub eyes: u8,
}

/// The pupil in use, with how it was chosen.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Pupil {
    /// Diameter.
    pub diameter: Length,
    /// How it was chosen, with the source.
    pub basis: String,
    /// Status of the value or formula.
    pub status: Status,
}

impl Pupil {
    /// Area π d²/4.
    pub fn area_mm2(&self) -> f64 {
        let d = self.diameter.get::<millimeter>();
        PI * d * d / 4.0
    }
}

/// de Groot & Gebhard (1952) pupil diameter in mm for luminance `l_cd_m2`.
pub fn de_groot_gebhard_mm(l_cd_m2: f64) -> f64 {
    7.175 * (-0.00092 * (7.597 + l_cd_m2.log10()).powi(3)).exp()
}

/// Moon & Spencer (1944) pupil diameter in mm, as converted by Watson & Yellott (2012).
pub fn moon_spencer_mm(l_cd_m2: f64) -> f64 {
    4.9 - 3.0 * (0.4 * l_cd_m2.log10()).tanh()
}

/// Stanley & Davies (1995) pupil diameter in mm for corneal flux density `f` (cd·m⁻²·deg²).
pub fn stanley_davies_mm(f: f64) -> f64 {
    let x = (f / 846.0).powf(0.41);
    7.75 - 5.75 * (x / (x + 2.0))
}

/// Watson & Yellott (2012) unified pupil diameter in mm.
pub fn watson_yellott_mm(l_cd_m2: f64, field_deg2: f64, age_years: f64, eyes: u8) -> f64 {
    let m = if eyes >= 2 { 1.0 } else { 0.1 };
    let d = stanley_davies_mm(l_cd_m2 * field_deg2 * m);
    d + (age_years - 28.58) * (0.02132 - 0.009562 * d)
}

/// Chooses the pupil for `eye` by `rule`, checking it against the species' maximum.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a diameter not above 0 or above the species' maximum
/// (the message gives the range), a formula rule for a non-human eye, or a formula without
/// the luminance it needs.
pub fn choose(eye: &Eye, rule: PupilRule, adaptation: &Adaptation) -> Result<Pupil> {
    let human = eye.species == crate::retina::eye::Species::Human;
    let luminance = || {
        adaptation.luminance.map(|l| l.get::<candela_per_square_meter>()).filter(|l| *l > 0.0).ok_or_else(|| {
            Error::input(
                "this pupil formula needs the adapting luminance: give the source as a radiance or luminance, \
                 or an adapting luminance (\"50 cd/m2\")",
            )
        })
    };
    let formula_only_human = |name: &str| {
        Error::input(format!(
            "the {name} pupil formula is for human eyes; give a diameter (\"2 mm\") or dark/light/dilated"
        ))
    };
    let (mm, basis, status) = match rule {
        PupilRule::Fixed(d) => (d.get::<millimeter>(), "given".to_string(), Status::Confirmed),
        PupilRule::DarkAdapted => param(&eye.pupil.dark_adapted, "species table, dark-adapted"),
        PupilRule::LightAdapted => param(&eye.pupil.light_adapted, "species table, light-adapted"),
        PupilRule::Dilated => match &eye.pupil.dilated {
            Some(p) => param(p, "species table, dilated"),
            None => {
                return Err(Error::input(format!(
                    "the {} eye model has no dilated pupil; give a diameter",
                    eye.species.name()
                )));
            }
        },
        PupilRule::DeGrootGebhard if human => {
            (de_groot_gebhard_mm(luminance()?), "de Groot & Gebhard (1952)".into(), Status::Derived)
        }
        PupilRule::MoonSpencer if human => (
            moon_spencer_mm(luminance()?),
            "Moon & Spencer (1944), as converted by Watson & Yellott (2012)".into(),
            Status::FromMemory,
        ),
        PupilRule::WatsonYellott if human => {
            let field = adaptation.field.ok_or_else(|| {
                Error::input("the Watson & Yellott pupil formula needs the field size (\"--field 10 deg\")")
            })?;
            let r_deg = field.si().to_degrees() / 2.0;
            let area_deg2 = PI * r_deg * r_deg;
            let age = adaptation.age.map_or(28.58, |a| a.si() / 31_557_600.0);
            (
                watson_yellott_mm(luminance()?, area_deg2, age, adaptation.eyes),
                format!(
                    "Watson & Yellott (2012) unified formula, {:.1} deg² field, age {age:.1} y, {} eye(s)",
                    area_deg2, adaptation.eyes
                ),
                Status::FromMemory,
            )
        }
        PupilRule::DeGrootGebhard => return Err(formula_only_human("de Groot & Gebhard")),
        PupilRule::MoonSpencer => return Err(formula_only_human("Moon & Spencer")),
        PupilRule::WatsonYellott => return Err(formula_only_human("Watson & Yellott")),
    };
    let max = eye.pupil.maximum.value.get::<millimeter>();
    if !(mm > 0.0 && mm.is_finite()) || mm > max {
        return Err(Error::input(format!(
            "pupil diameter {} mm is outside the range for a {} eye: above 0 and at most {} mm",
            tidy(mm),
            eye.species.name(),
            tidy(max)
        )));
    }
    Ok(Pupil { diameter: Length::new::<millimeter>(mm), basis, status })
}

fn param(p: &crate::retina::eye::Param<Length>, what: &str) -> (f64, String, Status) {
    (p.value.get::<millimeter>(), format!("{what} ({})", p.source), p.status)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::retina::eye::{Species, builtin_eye};

    #[test]
    fn formulas_run_from_large_to_small_pupils() {
        // Stanley & Davies spans 7.75 mm (dark) to 2.0 mm (very bright) by construction.
        assert!((stanley_davies_mm(0.0) - 7.75).abs() < 1e-12);
        assert!(stanley_davies_mm(1e12) > 2.0 && stanley_davies_mm(1e12) < 2.1);
        // Each formula falls monotonically with luminance.
        let mut prev = [f64::INFINITY; 3];
        for e in -3..=4 {
            let l = 10f64.powi(e);
            let now = [de_groot_gebhard_mm(l), moon_spencer_mm(l), watson_yellott_mm(l, 100.0, 30.0, 2)];
            for (n, p) in now.iter().zip(prev) {
                assert!(*n < p, "{l} cd/m²");
            }
            prev = now;
        }
    }

    #[test]
    fn pupil_above_species_maximum_is_rejected() {
        let mouse = builtin_eye(Species::Mouse);
        let a = Adaptation { luminance: None, field: None, age: None, eyes: 2 };
        let err = choose(mouse, PupilRule::parse("7 mm").unwrap(), &a).unwrap_err();
        // Manno 2009: dilated mouse pupils reach 3.2 mm.
        assert!(err.message().contains("at most 3.2 mm"), "{err}");
        assert!(choose(mouse, PupilRule::parse("3 mm").unwrap(), &a).is_ok());
        assert!(choose(mouse, PupilRule::WatsonYellott, &a).is_err());
        assert!(choose(mouse, PupilRule::Dilated, &a).is_ok());
    }
}
