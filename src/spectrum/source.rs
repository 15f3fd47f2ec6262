//! Light sources: built-in generators, built-in demo lamps (`sources/`) and user files.
//!
//! A source is named by one of:
//! - `blackbody:TEMPERATURE` (Planck's law, e.g. `blackbody:2856K`), spectral radiance;
//! - `cie:A` (formula) or `cie:D65` (table), relative;
//! - `led:PEAK:WIDTH` (one Ohno 2005 band, e.g. `led:460nm:20nm`), relative;
//! - the name of a lamp in `sources/` (embedded in the binary);
//! - a path to a two-column spectrum file (`.csv`, `.tsv`, `.txt`, …) or a lamp file (`.toml`).
//!
//! Lamp files are TOML with `name`, `title`, `provenance` and either a `[model]` (an LED
//! model of Ohno bands, or a blackbody) or a `table` naming a spectrum file beside it. Every
//! value carries its unit (`"450 nm"`, `"3000 K"`).

use std::path::Path;

use serde::Deserialize;

use crate::base::error::{Error, ErrorKind, Result};
use crate::base::units::{parse_length, parse_temperature};
use crate::spectrum::generate::{
    Grid, LedBand, cie_d65, cie_illuminant_a, multi_band_led, ohno_led, planck_radiance,
};
use crate::spectrum::reader::read_spectrum;
use crate::spectrum::{Measure, Spectrum};

/// A lamp shipped with the tool, from `sources/`.
#[derive(Debug, Clone, Copy)]
pub struct BuiltinLamp {
    /// The name used on the command line (the file stem).
    pub name: &'static str,
    /// The file name inside `sources/`.
    pub file: &'static str,
    /// The file's text.
    pub text: &'static str,
}

macro_rules! lamp {
    ($name:literal, $file:literal) => {
        BuiltinLamp { name: $name, file: $file, text: include_str!(concat!("../../sources/", $file)) }
    };
}

/// The demo lamps in `sources/`, all invented for the tool's demo scenarios.
pub const BUILTIN_LAMPS: &[BuiltinLamp] = &[
    lamp!("warm-white-led", "warm-white-led.toml"),
    lamp!("neutral-white-led", "neutral-white-led.toml"),
    lamp!("cool-white-led", "cool-white-led.toml"),
    lamp!("red-safelight-led", "red-safelight-led.csv"),
    lamp!("stimulus-460-led", "stimulus-460-led.toml"),
    lamp!("uva-365-led", "uva-365-led.toml"),
    lamp!("halogen-3000k", "halogen-3000k.toml"),
];

/// Default grid for generated spectra (blackbodies and LED models): 180–3000 nm at 1 nm, the
/// span of the photobiological hazard bands, so a generated source gets every verdict.
const MODEL_GRID: (f64, f64, f64) = (180.0, 3000.0, 1.0);

/// CIE illuminant A's default grid: 300–830 nm at 1 nm, the range CIE defines it over.
const CIE_A_GRID: (f64, f64, f64) = (300.0, 830.0, 1.0);

fn default_grid(model: bool) -> Grid {
    let (a, b, s) = if model { MODEL_GRID } else { CIE_A_GRID };
    Grid::nm(a, b, s)
}

/// Resolves a source name to a spectrum. `grid`, if given, replaces a generator's default
/// wavelength grid, or resamples a tabulated spectrum (never beyond its range).
///
/// # Errors
/// [`ErrorKind::UnknownName`] for a name that is neither a file, a generator nor a built-in
/// lamp (the message lists them); otherwise the reader's or generator's error.
pub fn resolve(spec: &str, grid: Option<Grid>) -> Result<Spectrum> {
    let spec = spec.trim();
    if let Some(t) = spec.strip_prefix("blackbody:") {
        let t = parse_temperature(t).map_err(|e| e.context(format!("source '{spec}'")))?;
        return planck_radiance(t, grid.unwrap_or(default_grid(true)), None);
    }
    if let Some(name) = spec.strip_prefix("cie:") {
        return match name.to_ascii_uppercase().as_str() {
            "A" => cie_illuminant_a(grid.unwrap_or(default_grid(false))),
            "D65" => match grid {
                None => Ok(cie_d65()),
                Some(g) => resample(&cie_d65(), g),
            },
            _ => Err(Error::new(
                ErrorKind::UnknownName,
                format!("unknown CIE illuminant '{name}' in '{spec}'; built in: cie:A, cie:D65"),
            )),
        };
    }
    if let Some(rest) = spec.strip_prefix("led:") {
        let (peak, width) = rest.split_once(':').ok_or_else(|| {
            Error::input(format!("'{spec}' needs a peak and a width: led:PEAK:WIDTH, e.g. led:460nm:20nm"))
        })?;
        let peak = parse_length(peak).map_err(|e| e.context(format!("source '{spec}' peak")))?;
        let width = parse_length(width).map_err(|e| e.context(format!("source '{spec}' width")))?;
        return ohno_led(peak, width, grid.unwrap_or(default_grid(true)));
    }
    let path = Path::new(spec);
    if path.is_file() {
        return read_source_file(path, grid);
    }
    if let Some(lamp) = BUILTIN_LAMPS.iter().find(|l| l.name == spec) {
        let s = if lamp.file.ends_with(".toml") {
            parse_lamp(lamp.text, lamp.file, None, grid)?
        } else {
            let s = read_spectrum(lamp.text, lamp.file, None, None)?;
            match grid {
                Some(g) => resample(&s, g)?,
                None => s,
            }
        };
        return Ok(s);
    }
    let names: Vec<&str> = BUILTIN_LAMPS.iter().map(|l| l.name).collect();
    Err(Error::new(
        ErrorKind::UnknownName,
        format!(
            "unknown source '{spec}': not a file, a generator (blackbody:TEMPERATURE, cie:A, cie:D65, led:PEAK:WIDTH) \
             or a built-in lamp ({})",
            names.join(", ")
        ),
    ))
}

fn resample(s: &Spectrum, grid: Grid) -> Result<Spectrum> {
    s.resampled(&grid.nodes_nm()?)
}

fn read_source_file(path: &Path, grid: Option<Grid>) -> Result<Spectrum> {
    let origin = path.display().to_string();
    let text = std::fs::read_to_string(path)
        .map_err(|e| Error::new(ErrorKind::Io, format!("{origin}: cannot read the file: {e}")))?;
    if path.extension().is_some_and(|e| e.eq_ignore_ascii_case("toml")) {
        return parse_lamp(&text, &origin, path.parent(), grid);
    }
    let s = read_spectrum(&text, &origin, None, None)?;
    match grid {
        Some(g) => resample(&s, g),
        None => Ok(s),
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLamp {
    name: String,
    title: String,
    provenance: String,
    model: Option<RawModel>,
    table: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields, tag = "type", rename_all = "kebab-case")]
enum RawModel {
    Led { bands: Vec<RawBand>, from: Option<String>, to: Option<String>, step: Option<String> },
    Blackbody { temperature: String, from: Option<String>, to: Option<String>, step: Option<String> },
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawBand {
    peak: String,
    width: String,
    ratio: f64,
}

/// Parses a lamp description (TOML). `dir` is where a `table` file is looked up.
///
/// # Errors
/// [`ErrorKind::InvalidData`] naming `origin` and the key: unknown keys, a value without its
/// unit, a model that is neither `led` nor `blackbody`, or both or neither of `model` and
/// `table`.
pub fn parse_lamp(text: &str, origin: &str, dir: Option<&Path>, grid: Option<Grid>) -> Result<Spectrum> {
    let raw: RawLamp =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    let at = |key: &str| format!("{origin}: key '{key}'");
    let grid_of = |from: &Option<String>, to: &Option<String>, step: &Option<String>| -> Result<Grid> {
        let d = grid.unwrap_or(default_grid(true));
        Ok(Grid {
            from: from
                .as_deref()
                .map(parse_length)
                .transpose()
                .map_err(|e| e.context(at("model.from")))?
                .unwrap_or(d.from),
            to: to
                .as_deref()
                .map(parse_length)
                .transpose()
                .map_err(|e| e.context(at("model.to")))?
                .unwrap_or(d.to),
            step: step
                .as_deref()
                .map(parse_length)
                .transpose()
                .map_err(|e| e.context(at("model.step")))?
                .unwrap_or(d.step),
        })
    };
    let spectrum = match (&raw.model, &raw.table) {
        (Some(RawModel::Led { bands, from, to, step }), None) => {
            let bands = bands
                .iter()
                .enumerate()
                .map(|(i, b)| {
                    Ok(LedBand {
                        peak: parse_length(&b.peak)
                            .map_err(|e| e.context(at(&format!("model.bands[{i}].peak"))))?,
                        width: parse_length(&b.width)
                            .map_err(|e| e.context(at(&format!("model.bands[{i}].width"))))?,
                        ratio: b.ratio,
                    })
                })
                .collect::<Result<Vec<_>>>()?;
            multi_band_led(&bands, grid_of(from, to, step)?).map_err(|e| e.context(at("model")))?
        }
        (Some(RawModel::Blackbody { temperature, from, to, step }), None) => {
            let t = parse_temperature(temperature).map_err(|e| e.context(at("model.temperature")))?;
            // A lamp file describes a shape: the blackbody is used as a relative spectrum.
            let s = planck_radiance(t, grid_of(from, to, step)?, None).map_err(|e| e.context(at("model")))?;
            s.scaled_as(1.0 / s.curve().values().iter().copied().fold(0.0, f64::max), Measure::Relative)
                .map_err(|e| e.context(at("model")))?
        }
        (None, Some(table)) => {
            let p = dir.map_or_else(|| Path::new(table).to_path_buf(), |d| d.join(table));
            crate::base::inputs::record(&p);
            if p.extension().is_some_and(|e| e.eq_ignore_ascii_case("toml")) {
                return Err(Error::data(format!(
                    "{}: {} is a lamp description; a lamp's table must be a spectrum file (two columns), so lamp \
                     files cannot refer to each other",
                    at("table"),
                    p.display()
                )));
            }
            read_source_file(&p, grid).map_err(|e| e.context(at("table")))?
        }
        (Some(_), Some(_)) => {
            return Err(Error::data(format!("{origin}: give either [model] or table, not both")));
        }
        (None, None) => {
            return Err(Error::data(format!(
                "{origin}: the lamp has neither [model] (type = \"led\" or \"blackbody\") nor table = \"FILE\""
            )));
        }
    };
    Ok(spectrum.with_label(raw.name).with_provenance(format!("{}: {}", raw.title, raw.provenance)))
}
