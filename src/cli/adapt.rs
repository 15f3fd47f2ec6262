//! `retidose threshold`: the predicted rod threshold after a bleach, and a fit of measured
//! thresholds; `retidose flash`: a flash strength as R* per rod per flash.

use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use retidose::base::quantity::{SiValue, nm};
use retidose::base::units;
use retidose::pigment::flash::{FlashConversion, FlashRequest, FlashSpectrum, FlashStrength, convert_flash};
use retidose::pigment::kinetics::{Model, builtin_pigments};
use retidose::pigment::threshold::{
    ThresholdCurve, ThresholdFit, fit_threshold, parse_threshold_csv, predict_threshold, threshold_pigment,
};
use retidose::retina::eye::Species;
use retidose::retina::pupil::PupilRule;

use super::Output;
use super::render::{duration, num};

/// Help shown after `retidose threshold --help`.
pub const THRESHOLD_EXAMPLES: &str = "\
The model: the threshold sits on the cone plateau until the bleached fraction falls to the
rod–cone break, then falls at the S2 slope (src/data/pigments.toml, [dark_adaptation]; human rods).
A measured file has the columns time_min,log_threshold (log units above absolute threshold).

Examples:
  retidose threshold --bleach 0.9
  retidose threshold --bleach 0.9 --to \"40 min\" --format csv > predicted.csv
  retidose threshold --fit measured.csv
  retidose threshold --bleach 0.9 --fit measured.csv --format csv";

/// Help shown after `retidose flash --help`.
pub const FLASH_EXAMPLES: &str = "\
A flash is a full field (Ganzfeld). Strengths: \"0.01 cd s/m2\" (photopic), \"5 scot td s\",
\"5 phot td s\", \"100 photons/um2\" (at the cornea; needs --wavelength or --spectrum).
Without --wavelength or --spectrum the flash is taken as white, CIE D65 (an assumption).

Examples:
  retidose flash \"0.01 cd s/m2\" --species mouse
  retidose flash \"0.01 cd s/m2\" --species mouse --pupil \"2 mm\" --wavelength \"500 nm\"
  retidose flash \"5 scot td s\" --species human --wavelength \"507 nm\"
  retidose flash \"100 photons/um2\" --species mouse --wavelength \"500 nm\"
  retidose flash \"1 cd s/m2\" --species rat --spectrum cool-white-led";

/// Output formats of `retidose flash`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum FlashFormat {
    /// A table for the terminal.
    Table,
    /// JSON (schema retidose.flash/1).
    Json,
}

/// Output formats of `retidose threshold`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ThresholdFormat {
    /// A table for the terminal.
    Table,
    /// CSV: time_min,log_threshold; with --fit, one row per fitted parameter.
    Csv,
    /// An SVG figure: the predicted curve, and the measured points with the fitted hinge.
    Svg,
    /// JSON (schema retidose.threshold/1): the predicted curve and the fit.
    Json,
}

#[derive(Debug, Args)]
pub struct ThresholdArgs {
    /// Fraction of the rod pigment bleached at the start of darkness (0–1)
    #[arg(long, value_name = "FRACTION", required_unless_present = "fit")]
    bleach: Option<f64>,
    /// Species (the threshold parameters are for human rods)
    #[arg(long, value_name = "SPECIES", default_value = "human")]
    species: String,
    /// Time range of the predicted curve
    #[arg(long, value_name = "DURATION", default_value = "40 min")]
    to: String,
    /// Number of samples (default: one a minute, and at least 2)
    #[arg(long, value_name = "N")]
    samples: Option<usize>,
    /// Pigment kinetics for the break: rate-limited (default) or rushton
    #[arg(long, value_name = "MODEL", default_value = "rate-limited")]
    model: String,
    /// Fit measured thresholds from a CSV file with the columns time_min,log_threshold
    #[arg(long, value_name = "FILE")]
    fit: Option<String>,
    /// Output format
    #[arg(long, value_enum, default_value_t = ThresholdFormat::Table)]
    format: ThresholdFormat,
}

/// Runs `retidose threshold`.
pub fn run_threshold(a: ThresholdArgs) -> Result<Output> {
    let species = Species::parse(&a.species).context("--species")?;
    let model = Model::parse(&a.model).context("--model")?;
    let curve = match a.bleach {
        Some(b) => {
            let pigment = threshold_pigment(species)?;
            let until = units::parse_time(&a.to).context("--to")?;
            let samples = a.samples.unwrap_or(((until.si() / 60.0).floor() as usize + 1).max(2));
            Some(predict_threshold(&pigment, model, b, until, samples)?)
        }
        None => None,
    };
    let (measured, fit) = match &a.fit {
        Some(path) => {
            let text = std::fs::read_to_string(path).with_context(|| format!("cannot read {path}"))?;
            let data = parse_threshold_csv(&text, path)?;
            let fit = fit_threshold(&data).with_context(|| format!("fitting {path}"))?;
            (data, Some(fit))
        }
        None => (Vec::new(), None),
    };
    let text = match (a.format, &curve, &fit) {
        (ThresholdFormat::Json, c, f) => crate::cli::render::json::with_schema(
            "retidose.threshold/1",
            &serde_json::json!({ "predicted": c, "fit": f }),
        )?,
        (ThresholdFormat::Svg, c, f) => crate::cli::render::svg::threshold(c.as_ref(), &measured, f.as_ref())
            .map(|fig| fig.svg + "\n")
            .ok_or_else(|| anyhow::anyhow!("nothing to draw: give --bleach or --fit"))?,
        (ThresholdFormat::Csv, _, Some(f)) => fit_csv(f),
        (ThresholdFormat::Csv, Some(c), None) => curve_csv(c),
        (ThresholdFormat::Table, c, f) => {
            let mut out = String::new();
            if let Some(c) = c {
                out.push_str(&curve_table(c));
            }
            if let Some(f) = f {
                if !out.is_empty() {
                    out.push('\n');
                }
                out.push_str(&fit_table(f, a.fit.as_deref().unwrap_or_default(), c.as_ref()));
            }
            out
        }
        (ThresholdFormat::Csv, None, None) => unreachable!("clap requires --bleach or --fit"),
    };
    Ok(Output { text, status: 0 })
}

/// The predicted curve as a table.
fn curve_table(c: &ThresholdCurve) -> String {
    let da = &builtin_pigments().dark_adaptation;
    let per_min = c.s2_slope.si() * 60.0;
    let mut out = format!(
        "retidose threshold: predicted rod threshold after a bleach of {} ({} kinetics, {})\n",
        num(c.bleach),
        c.model.name(),
        c.receptor
    );
    let row = |k: &str, v: String| format!("  {k:<22}{v}\n");
    out.push_str(&row(
        "rod–cone break",
        match c.break_time {
            Some(t) => format!(
                "{} ({} min) after the bleach, at a bleached fraction of {}",
                duration(t.si()),
                num(t.si() / 60.0),
                num(c.break_bleach)
            ),
            None => format!("none: the bleach is at or below the break ({})", num(c.break_bleach)),
        },
    ));
    out.push_str(&row("S2 slope", format!("{} log units/min ({})", num(per_min), da.s2_slope.status)));
    out.push_str(&row(
        "cone plateau",
        format!("{} log units above absolute threshold ({})", num(c.plateau), da.cone_plateau.status),
    ));
    out.push_str(&row(
        "absolute threshold at",
        format!("{} (S3 not modelled)", duration(c.to_absolute.si())),
    ));
    out.push_str(&format!("  basis: {}\n\n", c.basis));
    out.push_str("  time after bleach   log threshold\n");
    for (t, e) in &c.samples {
        out.push_str(&format!("  {:<20}{}\n", duration(t.si()), num(*e)));
    }
    out
}

/// The predicted curve as CSV, `time_min,log_threshold`.
fn curve_csv(c: &ThresholdCurve) -> String {
    let mut out = String::from("time_min,log_threshold\n");
    for (t, e) in &c.samples {
        out.push_str(&format!("{},{}\n", t.si() / 60.0, e));
    }
    out
}

/// The fit as a table, with the data file's values beside it.
fn fit_table(f: &ThresholdFit, path: &str, curve: Option<&ThresholdCurve>) -> String {
    let da = &builtin_pigments().dark_adaptation;
    let mut out = format!(
        "retidose threshold --fit {path}: {} points, {} degrees of freedom\n  model: {}\n",
        f.points, f.degrees_of_freedom, f.model
    );
    out.push_str(&format!(
        "  {:<16}{:>10}{:>12}   {:<24}{}\n",
        "parameter", "value", "± SE", "95 % interval", "pigments.toml / prediction"
    ));
    let line = |name: &str, v: f64, se: f64, lo: f64, hi: f64, unit: &str, reference: String| {
        format!(
            "  {name:<16}{:>10}{:>12}   {:<24}{reference}\n",
            num(v),
            num(se),
            format!("{} to {} {unit}", num(lo), num(hi))
        )
    };
    let m = 60.0;
    out.push_str(&line(
        "S2 slope",
        f.s2_slope.value.si() * m,
        f.s2_slope.standard_error.si() * m,
        f.s2_slope.low.si() * m,
        f.s2_slope.high.si() * m,
        "/min",
        format!("{} /min ({})", num(da.s2_slope.value.si() * m), da.s2_slope.status),
    ));
    if let Some(p) = &f.plateau {
        out.push_str(&line(
            "cone plateau",
            p.value.0,
            p.standard_error.0,
            p.low.0,
            p.high.0,
            "log",
            format!("{} ({})", num(da.cone_plateau.value), da.cone_plateau.status),
        ));
    }
    if let Some(b) = &f.break_time {
        out.push_str(&line(
            "break (min)",
            b.value.si() / m,
            b.standard_error.si() / m,
            b.low.si() / m,
            b.high.si() / m,
            "min",
            curve
                .and_then(|c| c.break_time)
                .map_or("—".to_string(), |t| format!("{} min predicted", num(t.si() / m))),
        ));
    }
    let i = &f.intercept;
    out.push_str(&line("intercept a", i.value.0, i.standard_error.0, i.low.0, i.high.0, "log", "—".into()));
    out.push_str(&format!(
        "  residual SD {} log units; intervals: ± t(0.975, {}) = {} × SE, from σ²(JᵀJ)⁻¹\n",
        num(f.residual_sd),
        f.degrees_of_freedom,
        num(f.t_quantile)
    ));
    out
}

/// The fit as CSV, one row per parameter.
fn fit_csv(f: &ThresholdFit) -> String {
    let mut out = String::from("parameter,value,standard_error,ci95_low,ci95_high,unit\n");
    let mut row = |name: &str, v: [f64; 4], unit: &str| {
        out.push_str(&format!("{name},{},{},{},{},{unit}\n", v[0], v[1], v[2], v[3]));
    };
    let m = 60.0;
    let s = &f.s2_slope;
    row("s2_slope", [s.value.si(), s.standard_error.si(), s.low.si(), s.high.si()].map(|x| x * m), "log/min");
    if let Some(p) = &f.plateau {
        row("cone_plateau", [p.value.0, p.standard_error.0, p.low.0, p.high.0], "log");
    }
    if let Some(b) = &f.break_time {
        row(
            "break_time",
            [b.value.si(), b.standard_error.si(), b.low.si(), b.high.si()].map(|x| x / m),
            "min",
        );
    }
    let i = &f.intercept;
    row("intercept", [i.value.0, i.standard_error.0, i.low.0, i.high.0], "log");
    row("residual_sd", [f.residual_sd, f64::NAN, f64::NAN, f64::NAN], "log");
    out.replace("NaN", "")
}

#[derive(Debug, Args)]
pub struct FlashArgs {
    /// Flash strength: "0.01 cd s/m2", "5 scot td s", "5 phot td s" or "100 photons/um2"
    #[arg(value_name = "STRENGTH")]
    strength: String,
    /// human, mouse or rat
    #[arg(long, value_name = "SPECIES")]
    species: String,
    /// A diameter ("2 mm") or dark, light, dilated (default: dilated, or dark where the eye has no dilated value)
    #[arg(long, value_name = "PUPIL")]
    pupil: Option<String>,
    /// A monochromatic flash at this wavelength ("500 nm")
    #[arg(long, value_name = "WAVELENGTH", conflicts_with = "spectrum")]
    wavelength: Option<String>,
    /// The flash's spectrum (as for `retidose spectrum`: a built-in lamp, led:PEAK:WIDTH, a file)
    #[arg(long, value_name = "SOURCE")]
    spectrum: Option<String>,
    /// Add light through an unpigmented (albino) iris (rodents; an approximation)
    #[arg(long)]
    albino: bool,
    /// Age of the subject ("32 y"): human ocular media
    #[arg(long, value_name = "AGE")]
    age: Option<String>,
    /// Output format: a table, or JSON (schema retidose.flash/1)
    #[arg(long, value_enum, default_value_t = FlashFormat::Table)]
    format: FlashFormat,
}

/// The flash spectrum assumed when none is given.
const DEFAULT_FLASH_SPECTRUM: &str = "cie:D65";

/// Runs `retidose flash`.
pub fn run_flash(a: FlashArgs) -> Result<Output> {
    let species = Species::parse(&a.species).context("--species")?;
    let strength = retidose::pigment::flash::parse_flash_strength(&a.strength)?;
    let mut assumed = None;
    let spectrum = match (&a.wavelength, &a.spectrum) {
        (Some(w), _) => FlashSpectrum::Line(nm(units::parse_length(w).context("--wavelength")?.si() * 1e9)),
        (None, Some(s)) => FlashSpectrum::Shape(
            retidose::spectrum::source::resolve(s, None).with_context(|| format!("--spectrum {s}"))?,
        ),
        (None, None) if matches!(strength, FlashStrength::Photons(_)) => {
            anyhow::bail!(
                "a flash in photons/µm² needs its wavelength (--wavelength \"500 nm\") or --spectrum"
            )
        }
        (None, None) => {
            assumed = Some(format!(
                "no --wavelength or --spectrum: the flash is taken as white, {DEFAULT_FLASH_SPECTRUM} (an assumption)"
            ));
            FlashSpectrum::Shape(retidose::spectrum::source::resolve(DEFAULT_FLASH_SPECTRUM, None)?)
        }
    };
    let pupil = a.pupil.as_deref().map(PupilRule::parse).transpose().context("--pupil")?;
    let age = a.age.as_deref().map(units::parse_time).transpose().context("--age")?;
    let mut conv =
        convert_flash(&FlashRequest { species, strength, spectrum, pupil, albino_iris: a.albino, age })?;
    conv.notes.extend(assumed);
    let text = match a.format {
        FlashFormat::Table => flash_table(&conv),
        FlashFormat::Json => crate::cli::render::json::with_schema("retidose.flash/1", &conv)?,
    };
    Ok(Output { text, status: 0 })
}

/// The conversion as a table.
fn flash_table(c: &FlashConversion) -> String {
    let mut out = format!("retidose flash: {} for the {} eye ({})\n", c.given, c.species.name(), c.spectrum);
    let row = |k: &str, v: String| format!("  {k:<24}{v}\n");
    out.push_str(&row(
        "pupil",
        format!(
            "{} mm ({}, {})",
            num(c.pupil.diameter.si() * 1e3),
            c.pupil.basis.split(" (").next().unwrap_or_default(),
            c.pupil.status
        ),
    ));
    out.push_str(&row("collecting area", format!("{} mm²", num(c.collecting_area_mm2))));
    out.push_str(&row("luminous exposure", format!("{} cd·s/m² (photopic)", num(c.luminous))));
    out.push_str(&row(
        "retinal exposure",
        format!("{} scot td·s, {} phot td·s", num(c.scotopic_td_s), num(c.photopic_td_s)),
    ));
    out.push_str(&row("photons at the cornea", format!("{} photons/µm²", num(c.photons_per_um2))));
    out.push_str(&row(
        "R* per rod per flash",
        format!("{} (spectral route, eye file)", num(c.r_star_per_rod)),
    ));
    for r in &c.troland_routes {
        out.push_str(&row(
            &format!("  by {}", r.name),
            format!("{} ({} R*/rod per scot td·s, {})", num(r.r_star_per_rod), num(r.factor), r.status),
        ));
    }
    out.push_str(&row("rhodopsin bleached", format!("{} of the rod's pigment", num(c.bleached_fraction))));
    out.push_str(&row(
        "saturating flash",
        format!("{} R*/rod ({})", num(c.saturation.flash), c.saturation.status),
    ));
    out.push_str(&row("fraction of saturation", num(c.fraction_of_saturation)));
    out.push_str(&format!("  saturation basis: {}\n", c.saturation.basis));
    if !c.notes.is_empty() {
        out.push_str("notes:\n");
        for n in &c.notes {
            out.push_str(&format!("  - {n}\n"));
        }
    }
    out
}
