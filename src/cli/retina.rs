//! `retidose retina`: corneal and retinal quantities and photoreceptor catch for a human, mouse
//! or rat eye, from one source given by flags or a scenario file.

use std::path::Path;

use anyhow::{Context, Result};
use clap::Args;
use retidose::retina::report::{RetinaReport, RetinaScenario, assess_retina};
use retidose::scenario::retina::{SubjectSpec, build, parse_scenario};

use super::args::{Format, PlaceArgs, ScaleArgs};
use super::render::{csv, json, terminal};

/// Help shown after `retidose retina --help`.
pub const EXAMPLES: &str = "\
Geometry follows from what the (scaled) spectrum measures, or from --geometry:
  irradiance at the eye (e.g. --illuminance)   at-eye; add --full-field, --subtense or --size/--distance
                                               to derive the radiance the eye sees
  radiance (e.g. --luminance)                  extended; needs --subtense or --size and --distance
  intensity (e.g. --luminous-intensity)        intensity; needs --distance (optional --incidence, --size)
  flux (e.g. --luminous-flux)                  flux; needs --distance and --emission isotropic|lambertian

Examples:
  retidose retina warm-white-led --illuminance \"350 lx\" --full-field --species mouse --pupil dark
  retidose retina cie:D65 --luminance \"100 cd/m2\" --subtense \"20 deg\" --species human --pupil watson-yellott --age \"25 y\"
  retidose retina stimulus-460-led --luminous-intensity \"2 cd\" --distance \"200 mm\" --size \"5 mm\" --species human --pupil \"3 mm\"
  retidose retina --scenario cage.toml --format json";

#[derive(Debug, Args)]
pub struct RetinaArgs {
    /// The source spectrum (as for `retidose spectrum`); or use --scenario
    #[arg(value_name = "SOURCE", required_unless_present = "scenario", conflicts_with = "scenario")]
    source: Option<String>,
    // The help is an attribute, not a doc comment: rustdoc would read `[subject]` as a link.
    #[arg(
        long,
        value_name = "FILE",
        help = "A scenario file ([subject], [[source]], [[filter]] tables) instead of the flags"
    )]
    scenario: Option<String>,
    #[command(flatten)]
    scale: ScaleArgs,
    /// human, mouse or rat
    #[arg(long, value_name = "SPECIES", required_unless_present = "scenario")]
    species: Option<String>,
    /// A diameter ("3 mm") or a rule: dark, light, dilated, watson-yellott, de-groot-gebhard, moon-spencer
    #[arg(long, value_name = "PUPIL", required_unless_present = "scenario")]
    pupil: Option<String>,
    #[command(flatten)]
    place: PlaceArgs,
    /// Age of the subject ("32 y"): human media and pupil formulas
    #[arg(long, value_name = "AGE")]
    age: Option<String>,
    /// Eyes viewing (1 or 2), for the Watson & Yellott pupil
    #[arg(long, value_name = "N")]
    eyes: Option<u8>,
    /// Adapting field (full angle) for the Watson & Yellott pupil
    #[arg(long, value_name = "ANGLE")]
    field: Option<String>,
    /// Adapting luminance for pupil formulas, if not the source's
    #[arg(long, value_name = "LUMINANCE")]
    adapting_luminance: Option<String>,
    /// Add light through an unpigmented iris (albino rodents; an approximation)
    #[arg(long)]
    albino_iris: bool,
    /// A user eye-model file (same layout as the built-in ones)
    #[arg(long, value_name = "FILE")]
    eye_file: Option<String>,
    /// Also write the retinal spectral irradiance of each source to this new CSV file
    /// (W·m⁻²·nm⁻¹ and photons·µm⁻²·s⁻¹·nm⁻¹); an existing file is never overwritten
    #[arg(long, value_name = "FILE")]
    retinal_spectrum: Option<String>,
    /// Output format
    #[arg(long, value_enum, default_value_t = Format::Table)]
    format: Format,
}

/// Runs `retidose retina`.
pub fn run(a: RetinaArgs) -> Result<String> {
    let scenario = scenario(&a)?;
    let r = assess_retina(&scenario)?;
    if let Some(path) = &a.retinal_spectrum {
        write_retinal_spectrum(path, &r)?;
    }
    Ok(match a.format {
        Format::Table => terminal::retina::table(&r),
        Format::Json => json::retina::document(&r),
    })
}

/// The scenario: read from `--scenario`, or built from the flags.
fn scenario(a: &RetinaArgs) -> Result<RetinaScenario> {
    Ok(match &a.scenario {
        Some(file) => {
            let text = std::fs::read_to_string(file).with_context(|| format!("cannot read {file}"))?;
            parse_scenario(&text, file, Path::new(file).parent())?
        }
        None => {
            let src = a.place.source_spec(a.source.as_deref().unwrap_or_default(), &a.scale);
            let subject = SubjectSpec {
                species: a.species.clone().unwrap_or_default(),
                pupil: a.pupil.clone(),
                age: a.age.clone(),
                eyes: a.eyes,
                field: a.field.clone(),
                adapting_luminance: a.adapting_luminance.clone(),
                albino_iris: a.albino_iris,
                eye_file: a.eye_file.clone(),
                dark_pupil: None,
                pigmentation: None,
            };
            let filters = a.place.filter_specs();
            build(&subject, &[src], &filters, None)?
        }
    })
}

/// Writes `--retinal-spectrum` to a new file; an existing file is never overwritten.
fn write_retinal_spectrum(path: &str, r: &RetinaReport) -> Result<()> {
    let csv = csv::retinal_spectrum(r);
    let mut f = std::fs::OpenOptions::new().write(true).create_new(true).open(path).with_context(|| {
        format!("--retinal-spectrum {path}: cannot create a new file (an existing file is never overwritten)")
    })?;
    std::io::Write::write_all(&mut f, csv.as_bytes())
        .with_context(|| format!("--retinal-spectrum {path}"))?;
    Ok(())
}
