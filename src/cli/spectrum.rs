//! `retidose spectrum`: photometric, scotopic and CIE S 026 α-opic quantities of one spectrum.

use std::path::Path;

use anyhow::{Context, Result, bail};
use clap::Args;
use retidose::base::units;
use retidose::spectrum::generate::Grid;
use retidose::spectrum::report::report;
use retidose::spectrum::scale::scale_to;
use retidose::spectrum::source::resolve;
use retidose::spectrum::{Basis, Measure};

use super::args::{Format, ScaleArgs};
use super::render::{json, terminal};

/// Help shown after `retidose spectrum --help`.
pub const EXAMPLES: &str = "\
SOURCE is one of:
  blackbody:TEMPERATURE   Planck's law, e.g. blackbody:2856K (spectral radiance, 180–3000 nm)
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
pub struct SpectrumArgs {
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

/// Runs `retidose spectrum`.
pub fn run(args: SpectrumArgs) -> Result<String> {
    let grid = match (&args.from, &args.to, &args.step) {
        (Some(f), Some(t), Some(s)) => Some(Grid {
            from: units::parse_length(f).context("--from")?,
            to: units::parse_length(t).context("--to")?,
            step: units::parse_length(s).context("--step")?,
        }),
        _ => None,
    };
    let target = args.scale.target()?;
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
        Format::Table => terminal::spectrum::table(&r),
        Format::Json => json::spectrum::document(&r),
    })
}
