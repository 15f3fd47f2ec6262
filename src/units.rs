//! Parsing quantities written with their unit, such as `"300 lx"`, `"1.2 m"` or `"2856 K"`.
//!
//! A value without a unit is always rejected: no unit is ever assumed. Common spellings are
//! accepted (`µm` and `um`, `cd/m2` and `cd/m²`, `lx` and `lux`, `W/m2/sr` and `W·m⁻²·sr⁻¹`);
//! an error lists the accepted units for the quantity asked for.

use crate::error::{Error, Result};
use crate::quantity::{
    Illuminance, Irradiance, Length, Luminance, PhotonIrradiance, Radiance, SiValue, ThermodynamicTemperature,
};

/// One unit: its accepted ASCII spellings (after normalisation) and its size in SI units.
struct Unit {
    spellings: &'static [&'static str],
    to_si: f64,
}

/// Avogadro constant, mol⁻¹ (exact, SI 2019), for µmol photon units.
const AVOGADRO: f64 = 6.022_140_76e23;

const LENGTH: &[Unit] = &[
    Unit { spellings: &["nm", "nanometre", "nanometer", "nanometres", "nanometers"], to_si: 1e-9 },
    Unit { spellings: &["um", "µm", "micron", "microns", "micrometre", "micrometer"], to_si: 1e-6 },
    Unit { spellings: &["mm", "millimetre", "millimeter", "millimetres", "millimeters"], to_si: 1e-3 },
    Unit { spellings: &["cm", "centimetre", "centimeter"], to_si: 1e-2 },
    Unit { spellings: &["m", "metre", "meter", "metres", "meters"], to_si: 1.0 },
];

const TEMPERATURE: &[Unit] = &[Unit { spellings: &["K", "kelvin"], to_si: 1.0 }];

const ILLUMINANCE: &[Unit] = &[
    Unit { spellings: &["lx", "lux"], to_si: 1.0 },
    Unit { spellings: &["klx", "kilolux"], to_si: 1e3 },
    Unit { spellings: &["mlx", "millilux"], to_si: 1e-3 },
    Unit { spellings: &["lm/m2", "lm*m-2"], to_si: 1.0 },
];

const LUMINANCE: &[Unit] = &[
    Unit { spellings: &["cd/m2", "cd*m-2", "cdm-2", "nit", "nits"], to_si: 1.0 },
    Unit { spellings: &["kcd/m2", "kcd*m-2"], to_si: 1e3 },
    Unit { spellings: &["mcd/m2", "mcd*m-2"], to_si: 1e-3 },
    Unit { spellings: &["cd/cm2", "cd*cm-2"], to_si: 1e4 },
];

const IRRADIANCE: &[Unit] = &[
    Unit { spellings: &["W/m2", "W*m-2", "Wm-2"], to_si: 1.0 },
    Unit { spellings: &["mW/m2", "mW*m-2"], to_si: 1e-3 },
    Unit { spellings: &["uW/m2", "µW/m2", "uW*m-2", "µW*m-2"], to_si: 1e-6 },
    Unit { spellings: &["W/cm2", "W*cm-2"], to_si: 1e4 },
    Unit { spellings: &["mW/cm2", "mW*cm-2"], to_si: 10.0 },
    Unit { spellings: &["uW/cm2", "µW/cm2", "uW*cm-2", "µW*cm-2"], to_si: 1e-2 },
];

const RADIANCE: &[Unit] = &[
    Unit { spellings: &["W/m2/sr", "W/(m2*sr)", "W*m-2*sr-1", "W/sr/m2"], to_si: 1.0 },
    Unit { spellings: &["mW/m2/sr", "mW/(m2*sr)", "mW*m-2*sr-1"], to_si: 1e-3 },
    Unit { spellings: &["W/cm2/sr", "W/(cm2*sr)", "W*cm-2*sr-1"], to_si: 1e4 },
];

const PHOTON_IRRADIANCE: &[Unit] = &[
    Unit {
        spellings: &["photons/m2/s", "photons/(m2*s)", "photons*m-2*s-1", "m-2*s-1", "/m2/s"],
        to_si: 1.0,
    },
    Unit {
        spellings: &["photons/cm2/s", "photons/(cm2*s)", "photons*cm-2*s-1", "cm-2*s-1", "/cm2/s"],
        to_si: 1e4,
    },
    Unit { spellings: &["umol/m2/s", "µmol/m2/s", "umol*m-2*s-1", "µmol*m-2*s-1"], to_si: 1e-6 * AVOGADRO },
];

/// Turns the usual typographic forms into the ASCII spellings of the tables.
fn normalise_unit(unit: &str) -> String {
    let mut s = String::with_capacity(unit.len());
    for ch in unit.chars() {
        match ch {
            ' ' | '^' => {}
            '·' | '⋅' | '.' => s.push('*'),
            '²' => s.push('2'),
            '³' => s.push('3'),
            '⁻' => s.push('-'),
            '¹' => s.push('1'),
            'μ' => s.push('µ'),
            _ => s.push(ch),
        }
    }
    s
}

fn split_number(text: &str) -> Result<(f64, &str)> {
    let t = text.trim();
    let mut end = 0;
    let bytes = t.as_bytes();
    while end < bytes.len() {
        let c = bytes[end] as char;
        let exponent_ok = (c == 'e' || c == 'E')
            && end > 0
            && bytes.get(end + 1).is_some_and(|n| n.is_ascii_digit() || *n == b'-' || *n == b'+');
        let sign_ok = (c == '-' || c == '+') && (end == 0 || matches!(bytes[end - 1], b'e' | b'E'));
        if c.is_ascii_digit() || c == '.' || exponent_ok || sign_ok {
            end += 1;
        } else {
            break;
        }
    }
    let (number, unit) = t.split_at(end);
    let value: f64 =
        number.parse().map_err(|_| Error::input(format!("'{text}' does not start with a number")))?;
    if !value.is_finite() {
        return Err(Error::input(format!("'{text}' is not a finite number")));
    }
    Ok((value, unit.trim()))
}

fn accepted(units: &[Unit]) -> String {
    units.iter().map(|u| u.spellings[0]).collect::<Vec<_>>().join(", ")
}

/// Parses `text` as a value with one of `units`; returns the value in SI units.
fn parse_in(text: &str, what: &str, units: &[Unit]) -> Result<f64> {
    let (value, unit) = split_number(text).map_err(|e| e.context(format!("{what} '{text}'")))?;
    if unit.is_empty() {
        return Err(Error::input(format!(
            "{what} '{text}' has no unit; write it with one of: {}",
            accepted(units)
        )));
    }
    let norm = normalise_unit(unit);
    let exact = units.iter().find(|u| u.spellings.contains(&norm.as_str()));
    let found = exact.or_else(|| {
        let lower = norm.to_lowercase();
        let mut matches = units.iter().filter(|u| u.spellings.iter().any(|s| s.to_lowercase() == lower));
        let first = matches.next();
        if matches.next().is_some() { None } else { first }
    });
    match found {
        Some(u) => Ok(value * u.to_si),
        None => Err(Error::input(format!(
            "{what} '{text}': unknown unit '{unit}'; accepted units: {}",
            accepted(units)
        ))),
    }
}

/// Parses a length such as `"555 nm"`, `"1.2 m"`, `"2.5 mm"`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a missing or unknown unit, listing the accepted units.
pub fn parse_length(text: &str) -> Result<Length> {
    parse_in(text, "length", LENGTH).map(Length::from_si)
}

/// Parses a thermodynamic temperature such as `"2856 K"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_temperature(text: &str) -> Result<ThermodynamicTemperature> {
    parse_in(text, "temperature", TEMPERATURE).map(ThermodynamicTemperature::from_si)
}

/// Parses an illuminance such as `"300 lx"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_illuminance(text: &str) -> Result<Illuminance> {
    parse_in(text, "illuminance", ILLUMINANCE).map(Illuminance::from_si)
}

/// Parses a luminance such as `"250 cd/m2"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_luminance(text: &str) -> Result<Luminance> {
    parse_in(text, "luminance", LUMINANCE).map(Luminance::from_si)
}

/// Parses an irradiance such as `"1.5 W/m2"` or `"80 µW/cm²"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_irradiance(text: &str) -> Result<Irradiance> {
    parse_in(text, "irradiance", IRRADIANCE).map(Irradiance::from_si)
}

/// Parses a radiance such as `"10 W/m2/sr"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_radiance(text: &str) -> Result<Radiance> {
    parse_in(text, "radiance", RADIANCE).map(Radiance::from_si)
}

/// Parses a photon irradiance such as `"1e18 photons/m2/s"` or `"5 µmol/m2/s"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_photon_irradiance(text: &str) -> Result<PhotonIrradiance> {
    parse_in(text, "photon irradiance", PHOTON_IRRADIANCE).map(PhotonIrradiance::from_si)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn accepts_common_spellings() {
        assert_eq!(parse_illuminance("300 lx").unwrap().si(), 300.0);
        assert_eq!(parse_illuminance("300lux").unwrap().si(), 300.0);
        assert_eq!(parse_illuminance("0.3 klx").unwrap().si(), 300.0);
        assert_eq!(parse_luminance("250 cd/m2").unwrap().si(), 250.0);
        assert_eq!(parse_luminance("250 cd/m²").unwrap().si(), 250.0);
        assert_eq!(parse_luminance("250 cd·m⁻²").unwrap().si(), 250.0);
        assert!((parse_length("2.5 um").unwrap().si() - 2.5e-6).abs() < 1e-18);
        assert!((parse_length("2.5 µm").unwrap().si() - 2.5e-6).abs() < 1e-18);
        assert!((parse_irradiance("80 µW/cm²").unwrap().si() - 0.8).abs() < 1e-12);
        assert_eq!(parse_radiance("10 W/m2/sr").unwrap().si(), 10.0);
        assert_eq!(parse_radiance("10 W·m⁻²·sr⁻¹").unwrap().si(), 10.0);
        assert_eq!(parse_photon_irradiance("1e18 photons/m2/s").unwrap().si(), 1e18);
        assert!((parse_photon_irradiance("1 µmol/m2/s").unwrap().si() - 6.022_140_76e17).abs() < 1e3);
        assert_eq!(parse_temperature("2856 K").unwrap().si(), 2856.0);
        assert_eq!(parse_irradiance("-2e-3 W/m2").unwrap().si(), -2e-3);
    }

    #[test]
    fn rejects_a_missing_unit_and_lists_the_accepted_ones() {
        let err = parse_illuminance("300").unwrap_err();
        assert!(err.message().contains("has no unit"), "{err}");
        assert!(err.message().contains("lx"), "{err}");
    }

    #[test]
    fn rejects_a_wrong_unit() {
        let err = parse_illuminance("300 cd/m2").unwrap_err();
        assert!(err.message().contains("unknown unit 'cd/m2'"), "{err}");
        assert!(err.message().contains("accepted units: lx"), "{err}");
        assert!(parse_length("abc nm").is_err());
    }
}
