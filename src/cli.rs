//! Argument parsing (clap) and dispatch. Rendering lives in [`render`].

mod render;

use std::path::Path;

use anyhow::{Context, Result, bail};
use clap::{Args, Parser, Subcommand, ValueEnum};
use retidose::generate::Grid;
use retidose::scale::{ScaleTarget, scale_to};
use retidose::source::resolve;
use retidose::spectrum::{Basis, Measure};
use retidose::spectrum_report::report;
use retidose::units;

const ABOUT: &str = "Lighting safety and retinal exposure: from a lamp spectrum to what reaches the eye";

const EXAMPLES: &str = "\
Examples:
  retidose spectrum cie:D65 --illuminance \"250 lx\"
  retidose spectrum blackbody:2856K --luminance \"100 cd/m2\" --format json
  retidose spectrum warm-white-led --illuminance \"300 lx\"
  retidose spectrum my-lamp.csv --kind irradiance
  retidose sources

Exit status: 0 on success, 2 on an error (bad input, unreadable file).
retidose informs; it does not replace the standards, a qualified optical-radiation
assessment, veterinary advice or local regulations.";

/// The command line.
#[derive(Debug, Parser)]
#[command(name = "retidose", version, about = ABOUT, after_help = EXAMPLES)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Photometric, scotopic and CIE S 026 α-opic quantities of one spectrum
    #[command(after_help = SPECTRUM_EXAMPLES)]
    Spectrum(Box<SpectrumArgs>),
    /// List the built-in light sources, generators and reference tables
    Sources,
}

const SPECTRUM_EXAMPLES: &str = "\
SOURCE is one of:
  blackbody:TEMPERATURE   Planck's law, e.g. blackbody:2856K (spectral radiance, 200–3000 nm)
  cie:A, cie:D65          CIE standard illuminants (relative)
  led:PEAK:WIDTH          one Ohno (2005) LED band, e.g. led:460nm:20nm (relative)
  NAME                    a built-in lamp (see `retidose sources`)
  FILE                    a two-column spectrum file (CSV, TSV or whitespace; `# kind: irradiance`
                          in its header says what it measures) or a lamp file (.toml)

Examples:
  retidose spectrum cie:A --illuminance \"300 lx\"
  retidose spectrum led:460nm:20nm --irradiance \"0.5 W/m2\"
  retidose spectrum blackbody:6500K --from \"380 nm\" --to \"780 nm\" --step \"5 nm\"
  retidose spectrum lamp.csv --kind irradiance --format json";

#[derive(Debug, Args)]
struct SpectrumArgs {
    /// The spectrum: a generator, a built-in lamp or a file (see below)
    #[arg(value_name = "SOURCE")]
    source: String,
    #[command(flatten)]
    scale: ScaleArgs,
    /// What a spectrum file's values measure, overriding its `# kind:` header
    #[arg(long, value_name = "KIND", value_parser = ["radiance", "irradiance", "intensity", "flux", "relative"])]
    kind: Option<String>,
    /// Whether a spectrum file's values count energy or photons, overriding its `# basis:` header
    #[arg(long, value_name = "BASIS", value_parser = ["energy", "photon"])]
    basis: Option<String>,
    /// First wavelength for a generator, or of the grid a table is resampled to
    #[arg(long, value_name = "LENGTH", requires_all = ["to", "step"])]
    from: Option<String>,
    /// Last wavelength (with --from and --step)
    #[arg(long, value_name = "LENGTH", requires_all = ["from", "step"])]
    to: Option<String>,
    /// Wavelength step (with --from and --to)
    #[arg(long, value_name = "LENGTH", requires_all = ["from", "to"])]
    step: Option<String>,
    /// Output format
    #[arg(long, value_enum, default_value_t = Format::Table)]
    format: Format,
}

#[derive(Debug, Args)]
#[group(multiple = false)]
struct ScaleArgs {
    /// Scale to a measured illuminance, e.g. "300 lx" (makes a spectral irradiance)
    #[arg(long, value_name = "ILLUMINANCE")]
    illuminance: Option<String>,
    /// Scale to a measured luminance, e.g. "100 cd/m2" (makes a spectral radiance)
    #[arg(long, value_name = "LUMINANCE")]
    luminance: Option<String>,
    /// Scale to an irradiance over the sampled range, e.g. "2 W/m2"
    #[arg(long, value_name = "IRRADIANCE")]
    irradiance: Option<String>,
    /// Scale to a photon irradiance over the sampled range, e.g. "1e18 photons/m2/s" or "5 umol/m2/s"
    #[arg(long, value_name = "PHOTON_IRRADIANCE")]
    photon_irradiance: Option<String>,
    /// Scale to a radiance over the sampled range, e.g. "10 W/m2/sr"
    #[arg(long, value_name = "RADIANCE")]
    radiance: Option<String>,
}

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
enum Format {
    /// A table for the terminal
    Table,
    /// JSON with stable field names (documented in the README)
    Json,
}

/// Runs the parsed command and returns the text to print.
pub fn run(cli: Cli) -> Result<String> {
    match cli.command {
        Command::Spectrum(args) => spectrum(*args),
        Command::Sources => Ok(render::sources()),
    }
}

fn scale_target(a: &ScaleArgs) -> Result<Option<ScaleTarget>> {
    Ok(Some(if let Some(t) = &a.illuminance {
        ScaleTarget::Illuminance(units::parse_illuminance(t).context("--illuminance")?)
    } else if let Some(t) = &a.luminance {
        ScaleTarget::Luminance(units::parse_luminance(t).context("--luminance")?)
    } else if let Some(t) = &a.irradiance {
        ScaleTarget::Irradiance(units::parse_irradiance(t).context("--irradiance")?)
    } else if let Some(t) = &a.photon_irradiance {
        ScaleTarget::PhotonIrradiance(units::parse_photon_irradiance(t).context("--photon-irradiance")?)
    } else if let Some(t) = &a.radiance {
        ScaleTarget::Radiance(units::parse_radiance(t).context("--radiance")?)
    } else {
        return Ok(None);
    }))
}

fn spectrum(args: SpectrumArgs) -> Result<String> {
    let grid = match (&args.from, &args.to, &args.step) {
        (Some(f), Some(t), Some(s)) => Some(Grid {
            from: units::parse_length(f).context("--from")?,
            to: units::parse_length(t).context("--to")?,
            step: units::parse_length(s).context("--step")?,
        }),
        _ => None,
    };
    let target = scale_target(&args.scale)?;
    let mut s = resolve(&args.source, grid)?;
    if args.kind.is_some() || args.basis.is_some() {
        if !Path::new(&args.source).is_file() {
            bail!("--kind and --basis describe a spectrum file; '{}' is not a file", args.source);
        }
        let measure = args.kind.as_deref().map(Measure::parse).transpose()?.unwrap_or(s.measure());
        let basis = args.basis.as_deref().map(Basis::parse).transpose()?.unwrap_or(s.basis());
        s = s.declared_as(measure, basis);
    }
    if let Some(t) = target {
        s = scale_to(&s, t)?;
    }
    let r = report(&s, target);
    Ok(match args.format {
        Format::Table => render::spectrum_table(&r),
        Format::Json => render::spectrum_json(&r),
    })
}
