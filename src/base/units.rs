//! Parsing quantities written with their unit, such as `"300 lx"`, `"1.2 m"` or `"2856 K"`.
//!
//! A value without a unit is always rejected: no unit is ever assumed. Common spellings are
//! accepted (`µm` and `um`, `cd/m2` and `cd/m²`, `lx` and `lux`, `W/m2/sr` and `W·m⁻²·sr⁻¹`);
//! an error lists the accepted units for the quantity asked for.

use crate::base::error::{Error, Result};
use crate::base::quantity::{
    Angle, Area, Illuminance, Irradiance, Length, Luminance, LuminousFlux, LuminousIntensity,
    PhotonIrradiance, Power, Radiance, SiValue, ThermodynamicTemperature, Time,
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

const LUMINOUS_INTENSITY: &[Unit] = &[
    Unit { spellings: &["cd", "candela", "candelas"], to_si: 1.0 },
    Unit { spellings: &["mcd", "millicandela", "millicandelas"], to_si: 1e-3 },
    Unit { spellings: &["kcd", "kilocandela", "kilocandelas"], to_si: 1e3 },
];

const LUMINOUS_FLUX: &[Unit] = &[
    Unit { spellings: &["lm", "lumen", "lumens"], to_si: 1.0 },
    Unit { spellings: &["klm", "kilolumen", "kilolumens"], to_si: 1e3 },
    Unit { spellings: &["mlm", "millilumen", "millilumens"], to_si: 1e-3 },
];

const POWER: &[Unit] = &[
    Unit { spellings: &["W", "watt", "watts"], to_si: 1.0 },
    Unit { spellings: &["mW", "milliwatt", "milliwatts"], to_si: 1e-3 },
    Unit { spellings: &["uW", "µW", "microwatt", "microwatts"], to_si: 1e-6 },
];

const TROLAND_SECONDS: &[Unit] =
    &[Unit { spellings: &["td s", "td*s", "tds", "scottds", "phottds", "scottd*s", "phottd*s"], to_si: 1.0 }];

const RATE: &[Unit] = &[
    Unit { spellings: &["/s", "pers", "s-1", "1/s"], to_si: 1.0 },
    Unit { spellings: &["/min", "permin", "min-1", "1/min"], to_si: 1.0 / 60.0 },
    Unit { spellings: &["/h", "perh", "h-1", "1/h"], to_si: 1.0 / 3600.0 },
];

const RATE_SQUARED: &[Unit] = &[Unit { spellings: &["/s2", "s-2", "1/s2", "pers2"], to_si: 1.0 }];

const ISOMERISATION_RATE: &[Unit] =
    &[Unit { spellings: &["R*/rod/s", "R*/s", "R*/cell/s", "R*/receptor/s", "R*/cone/s"], to_si: 1.0 }];

const AREA: &[Unit] = &[
    Unit { spellings: &["um2", "µm2", "square micrometre", "square micrometer"], to_si: 1e-12 },
    Unit { spellings: &["mm2", "square millimetre", "square millimeter"], to_si: 1e-6 },
    Unit { spellings: &["cm2"], to_si: 1e-4 },
    Unit { spellings: &["m2", "square metre", "square meter"], to_si: 1.0 },
];

const ANGLE: &[Unit] = &[
    Unit { spellings: &["rad", "radian", "radians"], to_si: 1.0 },
    Unit { spellings: &["mrad", "milliradian", "milliradians"], to_si: 1e-3 },
    Unit { spellings: &["deg", "°", "degree", "degrees"], to_si: std::f64::consts::PI / 180.0 },
    Unit { spellings: &["arcmin", "'"], to_si: std::f64::consts::PI / 180.0 / 60.0 },
];

const TIME: &[Unit] = &[
    Unit { spellings: &["s", "sec", "second", "seconds"], to_si: 1.0 },
    Unit { spellings: &["ms", "millisecond", "milliseconds"], to_si: 1e-3 },
    Unit { spellings: &["min", "minute", "minutes"], to_si: 60.0 },
    Unit { spellings: &["h", "hr", "hour", "hours"], to_si: 3600.0 },
    Unit { spellings: &["d", "day", "days"], to_si: 86_400.0 },
    // A year of 365.25 days (the Julian year, IAU): ages are given in years.
    Unit { spellings: &["y", "yr", "year", "years"], to_si: 31_557_600.0 },
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

/// Parses a luminous intensity such as `"120 cd"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_luminous_intensity(text: &str) -> Result<LuminousIntensity> {
    parse_in(text, "luminous intensity", LUMINOUS_INTENSITY).map(LuminousIntensity::from_si)
}

/// Parses a luminous flux such as `"800 lm"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_luminous_flux(text: &str) -> Result<LuminousFlux> {
    parse_in(text, "luminous flux", LUMINOUS_FLUX).map(LuminousFlux::from_si)
}

/// Parses a radiant flux (power) such as `"5 mW"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_power(text: &str) -> Result<Power> {
    parse_in(text, "radiant flux", POWER).map(Power::from_si)
}

/// A number for messages and reports: 4 significant digits, in scientific notation below 0.001
/// and from a million (the exponent taken after rounding, so 0.99996 reads 1.000).
pub fn sig4(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let sci = format!("{v:.3e}");
    let exp: i32 = sci.split('e').nth(1).and_then(|e| e.parse().ok()).unwrap_or(0);
    if !(-3..6).contains(&exp) {
        return sci;
    }
    let decimals = (3 - exp).max(0) as usize;
    format!("{v:.decimals$}")
}

/// A duration as a person writes it: "45 s", "0.25 s", "2 min 13 s", "12 min", "5 h 5 min",
/// "6 d 12 h"; "—" when not finite.
pub fn duration_text(s: f64) -> String {
    if !s.is_finite() {
        return "—".into();
    }
    if s < 0.0 {
        return format!("−{}", duration_text(-s));
    }
    // Seconds below a minute: up to 3 significant digits, without trailing zeros.
    if s < 59.5 {
        if s == 0.0 {
            return "0 s".into();
        }
        if s < 1e-3 {
            return format!("{} s", sig4(s));
        }
        let digits = if s >= 10.0 {
            0
        } else if s >= 1.0 {
            1
        } else {
            (2 - s.log10().floor() as i32).max(0) as usize
        };
        let t = format!("{s:.digits$}");
        let t = if t.contains('.') { t.trim_end_matches('0').trim_end_matches('.').to_string() } else { t };
        return format!("{t} s");
    }
    let parts = |big: u64, big_unit: &str, small: u64, small_unit: &str| {
        if small == 0 {
            format!("{big} {big_unit}")
        } else {
            format!("{big} {big_unit} {small} {small_unit}")
        }
    };
    // Under 10 min to the second, under 48 h to the minute, beyond to the hour.
    if s < 599.5 {
        let total = s.round() as u64;
        return parts(total / 60, "min", total % 60, "s");
    }
    if s < 3570.0 {
        return format!("{} min", (s / 60.0).round() as u64);
    }
    if s < 48.0 * 3600.0 - 1800.0 {
        let total = (s / 60.0).round() as u64;
        return parts(total / 60, "h", total % 60, "min");
    }
    let hours = (s / 3600.0).round() as u64;
    parts(hours / 24, "d", hours % 24, "h")
}

/// A number for messages: rounded to 9 significant digits, so 9.000000000000002 reads 9.
pub fn tidy(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let digits = 8 - v.abs().log10().floor() as i32;
    let scale = 10f64.powi(digits);
    format!("{}", (v * scale).round() / scale)
}

/// Which troland a retinal illuminance is counted in (CIE e-ILV 17-22-038: luminance × pupil
/// area). The two differ by the spectral weighting of the luminance, so the same light gives
/// different numbers: a level must say which it is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TrolandKind {
    /// Photopic trolands, `phot td`: photopic luminance (V(λ)) × pupil area; for cones.
    Photopic,
    /// Scotopic trolands, `scot td`: scotopic luminance (V′(λ)) × pupil area; for rods.
    Scotopic,
}

impl TrolandKind {
    /// The unit symbol, `"phot td"` or `"scot td"`.
    pub fn symbol(self) -> &'static str {
        match self {
            TrolandKind::Photopic => "phot td",
            TrolandKind::Scotopic => "scot td",
        }
    }

    /// The adjective, `"photopic"` or `"scotopic"`.
    pub fn name(self) -> &'static str {
        match self {
            TrolandKind::Photopic => "photopic",
            TrolandKind::Scotopic => "scotopic",
        }
    }

    /// `text`'s number, as typed, followed by this kind's symbol: for messages that say what
    /// to write instead (`Scotopic.respell("5000 phot td")` is `"5000 scot td"`).
    pub fn respell(self, text: &str) -> String {
        format!("{} {}", number_text(text), self.symbol())
    }
}

/// The leading number of `text` as typed (all of `text`, trimmed, if it does not start with one).
fn number_text(text: &str) -> &str {
    let t = text.trim();
    match split_number(t) {
        Ok((_, unit)) => t[..t.len() - unit.len()].trim_end(),
        Err(_) => t,
    }
}

/// The spellings of typed troland units, after [`normalise_unit`] and lowercasing.
const TYPED_TROLAND: &[(TrolandKind, &[&str])] = &[
    (
        TrolandKind::Photopic,
        &["phottd", "photopictd", "phottroland", "phottrolands", "photopictroland", "photopictrolands"],
    ),
    (
        TrolandKind::Scotopic,
        &["scottd", "scotopictd", "scottroland", "scottrolands", "scotopictroland", "scotopictrolands"],
    ),
];

/// Parses a retinal illuminance in trolands that says which trolands it is: `"20000 phot td"`
/// or `"20000 photopic td"` (photopic), `"20000 scot td"` or `"20000 scotopic td"` (scotopic);
/// case and spaces do not matter. Returns the value in trolands and its kind.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a missing number, a negative or non-finite value, a
/// missing or unknown unit, and a bare `td` (`troland`, `trolands`), which could be either
/// kind: the message shows both ways of writing the level.
pub fn parse_typed_trolands(text: &str) -> Result<(f64, TrolandKind)> {
    let what = "retinal illuminance";
    let (value, unit) = split_number(text).map_err(|e| e.context(format!("{what} '{text}'")))?;
    let both = || {
        format!(
            "say which trolands: '{}' (photopic, cones) or '{}' (scotopic, rods)",
            TrolandKind::Photopic.respell(text),
            TrolandKind::Scotopic.respell(text)
        )
    };
    if unit.is_empty() {
        return Err(Error::input(format!("{what} '{text}' has no unit; {}", both())));
    }
    let norm = normalise_unit(unit).to_lowercase();
    if matches!(norm.as_str(), "td" | "troland" | "trolands") {
        return Err(Error::input(format!("{what} '{text}': {}", both())));
    }
    let kind =
        TYPED_TROLAND.iter().find(|(_, spellings)| spellings.contains(&norm.as_str())).map(|(k, _)| *k);
    let Some(kind) = kind else {
        return Err(Error::input(format!(
            "{what} '{text}': unknown unit '{unit}'; accepted units: phot td (photopic td), scot td (scotopic td)"
        )));
    };
    if value < 0.0 {
        return Err(Error::input(format!("{what} '{text}' must be ≥ 0 {}", kind.symbol())));
    }
    Ok((value, kind))
}

/// Parses a retinal exposure in troland-seconds, `"1e7 td s"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_troland_seconds(text: &str) -> Result<f64> {
    parse_in(text, "retinal exposure", TROLAND_SECONDS)
}

/// Parses a rate such as `"0.085 /min"` into s⁻¹.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_rate(text: &str) -> Result<crate::base::quantity::Frequency> {
    parse_in(text, "rate", RATE).map(crate::base::quantity::Frequency::from_si)
}

/// Parses a rate per second squared, `"4 /s2"`, in s⁻².
///
/// # Errors
/// As [`parse_length`].
pub fn parse_per_second_squared(text: &str) -> Result<f64> {
    parse_in(text, "amplification constant", RATE_SQUARED)
}

/// Parses a photoisomerisation rate per receptor, `"1e4 R*/rod/s"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_isomerisation_rate(text: &str) -> Result<crate::base::quantity::Frequency> {
    parse_in(text, "photoisomerisation rate", ISOMERISATION_RATE)
        .map(crate::base::quantity::Frequency::from_si)
}

/// Parses an area such as `"2.4 µm²"`, `"2.4 um2"` or `"12.6 mm2"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_area(text: &str) -> Result<Area> {
    parse_in(text, "area", AREA).map(Area::from_si)
}

/// Parses a plain number such as `"0.35"` (a ratio, a density); a unit is an error.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] if the text is not a number alone.
pub fn parse_number(text: &str) -> Result<f64> {
    let (value, unit) = split_number(text)?;
    if !unit.is_empty() {
        return Err(Error::input(format!("'{text}' should be a plain number without a unit")));
    }
    Ok(value)
}

/// Parses a plane angle such as `"10 deg"`, `"10°"`, `"0.011 rad"` or `"1.7 mrad"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_angle(text: &str) -> Result<Angle> {
    parse_in(text, "angle", ANGLE).map(Angle::from_si)
}

/// Parses a duration or an age such as `"30 s"`, `"12 h"` or `"32 y"`.
///
/// # Errors
/// As [`parse_length`].
pub fn parse_time(text: &str) -> Result<Time> {
    parse_in(text, "time", TIME).map(Time::from_si)
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
        assert!((parse_angle("180 deg").unwrap().si() - std::f64::consts::PI).abs() < 1e-15);
        assert!((parse_angle("90°").unwrap().si() - std::f64::consts::FRAC_PI_2).abs() < 1e-15);
        assert_eq!(parse_angle("11 mrad").unwrap().si(), 0.011);
        assert_eq!(parse_time("12 h").unwrap().si(), 43_200.0);
        assert!((parse_area("2.4 µm²").unwrap().si() - 2.4e-12).abs() < 1e-24);
        assert_eq!(parse_number("0.35").unwrap(), 0.35);
        assert!(parse_number("0.35 mm").is_err());
        assert_eq!(parse_typed_trolands("2e4 scot td").unwrap().0, 2e4);
        assert_eq!(parse_troland_seconds("1e7 td·s").unwrap(), 1e7);
        assert!((parse_rate("0.085 /min").unwrap().si() - 0.085 / 60.0).abs() < 1e-15);
        assert_eq!(parse_isomerisation_rate("1e4 R*/rod/s").unwrap().si(), 1e4);
        assert_eq!(parse_time("2 y").unwrap().si(), 63_115_200.0);
    }

    #[test]
    fn typed_trolands_accept_each_spelling() {
        let photopic = [
            "100531 phot td",
            "100531 photopic td",
            "100531 PHOT TD",
            "100531   Photopic   td",
            "100531phot td",
        ];
        for t in photopic {
            assert_eq!(parse_typed_trolands(t).unwrap(), (100_531.0, TrolandKind::Photopic), "{t}");
        }
        let scotopic =
            ["2e4 scot td", "2e4 scotopic td", "2e4 SCOT Td", " 2e4  scotopic  td ", "2e4 scot trolands"];
        for t in scotopic {
            assert_eq!(parse_typed_trolands(t).unwrap(), (2e4, TrolandKind::Scotopic), "{t}");
        }
        assert_eq!(parse_typed_trolands("0 scot td").unwrap(), (0.0, TrolandKind::Scotopic));
    }

    #[test]
    fn typed_trolands_reject_a_bare_td_naming_both_kinds() {
        for t in ["100531 td", "100531 Td", "100531 troland", "100531 trolands"] {
            let err = parse_typed_trolands(t).unwrap_err();
            assert_eq!(err.kind(), crate::base::error::ErrorKind::InvalidInput);
            let m = err.message();
            assert!(m.contains(&format!("'{t}'")), "{m}");
            assert!(m.contains("say which trolands"), "{m}");
            assert!(m.contains("'100531 phot td' (photopic, cones)"), "{m}");
            assert!(m.contains("'100531 scot td' (scotopic, rods)"), "{m}");
        }
        let m = parse_typed_trolands("1e6").unwrap_err().to_string();
        assert!(
            m.contains("has no unit") && m.contains("'1e6 phot td'") && m.contains("'1e6 scot td'"),
            "{m}"
        );
    }

    #[test]
    fn typed_trolands_reject_a_negative_missing_or_wrong_value() {
        let m = parse_typed_trolands("-5 scot td").unwrap_err().to_string();
        assert!(m.contains("'-5 scot td' must be ≥ 0"), "{m}");
        let m = parse_typed_trolands("scot td").unwrap_err().to_string();
        assert!(m.contains("does not start with a number"), "{m}");
        assert!(parse_typed_trolands("").is_err());
        let m = parse_typed_trolands("5000 cd/m2").unwrap_err().to_string();
        assert!(m.contains("unknown unit 'cd/m2'") && m.contains("phot td") && m.contains("scot td"), "{m}");
        assert!(parse_typed_trolands("5000 mesopic td").is_err());
        assert!(parse_typed_trolands("5000 scot td s").is_err());
    }

    #[test]
    fn troland_kind_respells_a_level() {
        assert_eq!(TrolandKind::Scotopic.respell("5000 phot td"), "5000 scot td");
        assert_eq!(TrolandKind::Photopic.respell(" 1e6 td"), "1e6 phot td");
        assert_eq!(TrolandKind::Photopic.symbol(), "phot td");
        assert_eq!(TrolandKind::Scotopic.name(), "scotopic");
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
