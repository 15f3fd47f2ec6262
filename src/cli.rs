//! Argument parsing (clap) and dispatch. Rendering lives in [`render`].

mod render;
mod report;

use std::path::Path;

use anyhow::{Context, Result, bail};
use clap::{Args, Parser, Subcommand, ValueEnum};
use retidose::base::quantity::SiValue;
use retidose::base::units;
use retidose::cornea::filter::Filter;
use retidose::limits::report::{LimitsRequest, assess_limits};
use retidose::limits::{LimitSet, find_set, parse_set};
use retidose::pigment::bleach::{
    assess as bleach_assess, duration_for_target, flash_response, level_for_target, steady_at,
    steady_level_for_target,
};
use retidose::pigment::kinetics::{Model, find_pigment};
use retidose::pigment::schedule::Schedule;
use retidose::retina::report::assess_retina;
use retidose::scenario::bleach::{BleachScenario, parse_bleach_scenario, parse_level};
use retidose::scenario::retina::{FilterSpec, SourceSpec, SubjectSpec, build, parse_scenario, place};
use retidose::spectrum::generate::Grid;
use retidose::spectrum::report::report;
use retidose::spectrum::scale::{ScaleTarget, scale_to};
use retidose::spectrum::source::resolve;
use retidose::spectrum::{Basis, Measure};

const ABOUT: &str = "Lighting safety and retinal exposure: from a lamp spectrum to what reaches the eye";

const EXAMPLES: &str = "\
Examples:
  retidose assess --demo
  retidose assess --example vivarium > room.toml
  retidose assess room.toml --format html -o room.html
  retidose spectrum cie:D65 --illuminance \"250 lx\"
  retidose spectrum blackbody:2856K --luminance \"100 cd/m2\" --format json
  retidose spectrum warm-white-led --illuminance \"300 lx\"
  retidose spectrum my-lamp.csv --kind irradiance
  retidose retina warm-white-led --illuminance \"350 lx\" --full-field --species mouse --pupil dark
  retidose sources

Exit status: 0 on success, 2 on an error (bad input, unreadable file); assess also exits
with 1 when a limit is exceeded or a guidance flag is raised.
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
    /// The main job: one scenario file in, one assessment out (try --demo)
    #[command(after_help = ASSESS_EXAMPLES)]
    Assess(Box<AssessArgs>),
    /// Photometric, scotopic and CIE S 026 α-opic quantities of one spectrum
    #[command(after_help = SPECTRUM_EXAMPLES)]
    Spectrum(Box<SpectrumArgs>),
    /// Corneal and retinal quantities and photoreceptor catch for a human, mouse or rat eye
    #[command(after_help = RETINA_EXAMPLES)]
    Retina(Box<RetinaArgs>),
    /// Pigment bleaching and recovery over an exposure schedule (rods and cones)
    #[command(after_help = BLEACH_EXAMPLES)]
    Bleach(Box<BleachArgs>),
    /// Photobiological exposure limits: list the sets, show one, or check a source against one
    #[command(subcommand)]
    Limits(LimitsCommand),
    /// List the built-in light sources, generators and reference tables
    Sources,
}

const ASSESS_EXAMPLES: &str = "\
Built-in demos (invented, in the fictional Fenwick Institute of Comparative Vision):
  vivarium          albino mice on a rack under LED panels, 12 h : 12 h with a dark-phase leak
  dark-adaptation   a human rod bleach of 60 s at 5000 cd/m², then 40 min of darkness
  stimulus-review   a 460 nm stimulus LED at 200 mm against IEC 62471 and the EU Directive

Examples:
  retidose assess --demo
  retidose assess --demo vivarium --format html -o vivarium.html
  retidose assess --example vivarium > my-room.toml
  retidose assess my-room.toml --format json

Exit status: 0 when every assessed item is within its limits and no guidance flag is raised,
1 when a limit is exceeded or a guidance flag is raised, 2 on an input error. A --demo run exits
with 0 (its flags are there to show them); its Outcome lines say what a scenario file would give.";

#[derive(Debug, Args)]
struct AssessArgs {
    /// A scenario file (see `retidose assess --example`)
    #[arg(value_name = "SCENARIO", conflicts_with_all = ["demo", "example"], required_unless_present_any = ["demo", "example"])]
    scenario: Option<String>,
    /// Run a built-in demo (all three when no name is given)
    #[arg(long, value_name = "NAME", num_args = 0..=1, default_missing_value = "all")]
    demo: Option<String>,
    /// Print an annotated scenario to start from (the vivarium demo when no name is given)
    #[arg(long, value_name = "NAME", num_args = 0..=1, default_missing_value = "vivarium")]
    example: Option<String>,
    /// Report format
    #[arg(long, value_enum, default_value_t = ReportFormat::Table)]
    format: ReportFormat,
    /// Write the report to this file instead of the terminal (refuses to overwrite without --force)
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    output: Option<String>,
    /// Allow -o to replace an existing file (never an input)
    #[arg(long)]
    force: bool,
}

/// Report formats of `assess`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
enum ReportFormat {
    /// Tables for the terminal
    Table,
    /// JSON (schema retidose.assessment/1)
    Json,
    /// CSV: one row per cage position, or per hazard
    Csv,
    /// Markdown
    Markdown,
    /// One self-contained HTML file with inline SVG plots
    Html,
}

/// What a command produced: the text and the exit status.
pub struct Output {
    /// Text for standard output (empty when written to a file).
    pub text: String,
    /// Exit status.
    pub status: u8,
}

fn assess_cmd(a: AssessArgs) -> Result<Output> {
    use retidose::assess::{DEMOS, assess, demo, parse_scenario_file};
    if let Some(name) = &a.example {
        return Ok(Output { text: demo(name)?.to_string(), status: 0 });
    }
    let mut inputs: Vec<std::path::PathBuf> = Vec::new();
    let scenarios = match (&a.demo, &a.scenario) {
        (Some(name), _) => {
            let names: Vec<&str> =
                if name == "all" { DEMOS.iter().map(|d| d.0).collect() } else { vec![name.as_str()] };
            names
                .into_iter()
                .map(|n| Ok(parse_scenario_file(demo(n)?, &format!("demo {n}"), None)?))
                .collect::<Result<Vec<_>>>()?
        }
        (None, Some(file)) => {
            let text =
                std::fs::read_to_string(file).with_context(|| format!("cannot read the scenario {file}"))?;
            inputs.push(Path::new(file).to_path_buf());
            vec![parse_scenario_file(&text, file, Path::new(file).parent())?]
        }
        (None, None) => bail!("give a scenario file, --demo or --example"),
    };
    {
        use std::io::IsTerminal;
        if std::io::stderr().is_terminal() {
            eprintln!("retidose: assessing {} scenario(s)…", scenarios.len());
        }
    }
    let results = scenarios.iter().map(assess).collect::<std::result::Result<Vec<_>, _>>()?;
    // A demo raises flags on purpose; its run is a success. Scenario files get the documented
    // status (1 when a limit is exceeded or a guidance flag is raised).
    let raised = results.iter().any(|r| r.limit_exceeded || r.flag_raised);
    let status = u8::from(raised && a.demo.is_none());
    let colour = a.output.is_none() && report::use_colour();
    let text = match a.format {
        ReportFormat::Table => report::terminal(&results, colour),
        ReportFormat::Json => report::json_doc(&results),
        ReportFormat::Csv => report::csv(&results),
        ReportFormat::Markdown => report::markdown(&results),
        ReportFormat::Html => report::html(&results),
    };
    match &a.output {
        None => Ok(Output { text, status }),
        Some(path) => {
            let target = Path::new(path);
            let same = |p: &Path| match (p.canonicalize(), target.canonicalize()) {
                (Ok(x), Ok(y)) => x == y,
                _ => false,
            };
            if inputs.iter().any(|i| same(i)) {
                bail!("-o {path} is an input of this run; it is never overwritten");
            }
            if target.exists() && !a.force {
                bail!("-o {path} exists; give --force to replace it");
            }
            std::fs::write(target, text).with_context(|| format!("cannot write {path}"))?;
            Ok(Output { text: String::new(), status })
        }
    }
}

const BLEACH_EXAMPLES: &str = "\
Receptors: human-rod (levels in scot td), human-cone (phot td), mouse-rod, rat-rod (R*/rod/s).
Trolands must say which: \"20000 scot td\" (scotopic, rods) or \"20000 phot td\" (photopic, cones).
The default model is rate-limited; --model rushton gives first-order kinetics.

Examples:
  retidose bleach --receptor human-rod --retinal \"20000 scot td\" --for \"30 s\"
  retidose bleach --receptor human-cone --retinal \"20000 phot td\" --for \"30 s\"
  retidose bleach --receptor human-rod --retinal \"1e6 scot td\" --for \"60 s\" --then-dark \"40 min\" --time-course bleach.csv
  retidose bleach --receptor mouse-rod --rate \"2e5 R*/rod/s\" --for \"12 h\" --then-dark \"12 h\" --repeat 7
  retidose bleach --receptor human-rod --solve level --target 0.5 --for \"60 s\"
  retidose bleach --receptor human-rod --flash 100
  retidose bleach --schedule cage-cycle.toml --format json";

#[derive(Debug, Args)]
struct BleachArgs {
    /// A schedule file ([[step]] tables) instead of the quick form
    #[arg(long, value_name = "FILE", conflicts_with_all = ["receptor", "retinal", "rate"])]
    schedule: Option<String>,
    /// human-rod, human-cone, mouse-rod or rat-rod
    #[arg(long, value_name = "RECEPTOR", required_unless_present = "schedule")]
    receptor: Option<String>,
    /// rate-limited (default) or rushton
    #[arg(long, value_name = "MODEL")]
    model: Option<String>,
    /// Retinal illuminance of the light step, saying which trolands: "20000 scot td" (human-rod) or "20000 phot td" (human-cone)
    #[arg(long, value_name = "TROLANDS", conflicts_with = "rate")]
    retinal: Option<String>,
    /// Photoisomerisation rate of the light step, e.g. "1e4 R*/rod/s" (rodent rods)
    #[arg(long, value_name = "RATE")]
    rate: Option<String>,
    /// Duration of the light step
    #[arg(long = "for", value_name = "DURATION")]
    duration: Option<String>,
    /// A dark step after the light step
    #[arg(long, value_name = "DURATION")]
    then_dark: Option<String>,
    /// Repeat the light (and dark) steps this many times in all
    #[arg(long, value_name = "N", default_value_t = 1)]
    repeat: u64,
    /// Bleached fraction at the start (0 = dark adapted)
    #[arg(long, value_name = "FRACTION", default_value_t = 0.0)]
    start: f64,
    /// Override a parameter: q_e, pigment_per_cell, tau0, v, k_m (e.g. tau0="300 s"); repeatable
    #[arg(long, value_name = "NAME=VALUE")]
    param: Vec<String>,
    /// Inverse solve: level (for --target within --for), duration (to --target at the level), steady (level holding --target)
    #[arg(long, value_name = "WHAT", requires = "target")]
    solve: Option<String>,
    /// Target bleached fraction for --solve
    #[arg(long, value_name = "FRACTION")]
    target: Option<f64>,
    /// Rod response to a flash of this many R* per rod (Lamb & Pugh activation model)
    #[arg(long, value_name = "R_STAR")]
    flash: Option<f64>,
    /// Write the sampled time course to this new file (.csv or .json); never overwrites
    #[arg(long, value_name = "FILE")]
    time_course: Option<String>,
    /// Number of time-course samples
    #[arg(long, value_name = "N", default_value_t = 200)]
    samples: usize,
    /// Output format
    #[arg(long, value_enum, default_value_t = Format::Table)]
    format: Format,
}

#[derive(Debug, Subcommand)]
enum LimitsCommand {
    /// List the limit sets with document, edition and status counts
    List,
    /// Show one limit set: every hazard, band, weighting and limit piece with its status
    Show {
        /// Set id (see `retidose limits list`)
        #[arg(value_name = "SET", required_unless_present = "set_file")]
        set: Option<String>,
        /// A user limit-set file instead of a built-in set
        #[arg(long, value_name = "FILE")]
        set_file: Option<String>,
    },
    /// Check a source at a distance for an exposure duration against a limit set
    #[command(after_help = LIMITS_EXAMPLES)]
    Check(Box<CheckArgs>),
}

const LIMITS_EXAMPLES: &str = "\
Examples:
  retidose limits check stimulus-460-led --luminous-intensity \"2 cd\" --distance \"200 mm\" --size \"5 mm\" --for \"8 h\" --classify
  retidose limits check uva-365-led --irradiance \"0.5 W/m2\" --full-field --for \"1 h\" --set directive-2006-25-ec
  retidose limits check halogen-3000k --luminance \"2e6 cd/m2\" --size \"10 mm\" --distance \"0.5 m\" --for \"10 s\"";

#[derive(Debug, Args)]
struct CheckArgs {
    /// The source spectrum (as for `retidose spectrum`)
    #[arg(value_name = "SOURCE")]
    source: String,
    #[command(flatten)]
    scale: ScaleArgs,
    #[command(flatten)]
    place: PlaceArgs,
    /// Exposure duration, e.g. "8 h", "100 s"
    #[arg(long = "for", value_name = "DURATION")]
    duration: String,
    /// Limit set id (default: iec62471-2006)
    #[arg(long, value_name = "SET", default_value = "iec62471-2006")]
    set: String,
    /// A user limit-set file instead of a built-in set
    #[arg(long, value_name = "FILE")]
    set_file: Option<String>,
    /// Also evaluate the opt-in hazards (aphakic eyes, infants)
    #[arg(long)]
    aphakic: bool,
    /// Evaluate only this hazard (id as in `retidose limits show`); repeatable
    #[arg(long, value_name = "HAZARD")]
    hazard: Vec<String>,
    /// Classify into IEC 62471 risk groups at 200 mm
    #[arg(long)]
    classify: bool,
    /// With --classify: a lamp for general lighting (assessed where it gives 500 lx, not below 200 mm)
    #[arg(long, requires = "classify")]
    general_lighting: bool,
    /// Output format
    #[arg(long, value_enum, default_value_t = Format::Table)]
    format: Format,
}

/// Where the source is, as seen by the eye (shared by `retina` and `limits check`).
#[derive(Debug, Args)]
struct PlaceArgs {
    /// at-eye, extended, intensity or flux (default: from the spectrum's measure)
    #[arg(long, value_name = "GEOMETRY")]
    geometry: Option<String>,
    /// Distance from the source to the eye
    #[arg(long, value_name = "LENGTH")]
    distance: Option<String>,
    /// Source diameter
    #[arg(long, value_name = "LENGTH")]
    size: Option<String>,
    /// Full angle subtended by the source
    #[arg(long, value_name = "ANGLE")]
    subtense: Option<String>,
    /// The light fills the field of view evenly (radiance = irradiance / π)
    #[arg(long)]
    full_field: bool,
    /// isotropic or lambertian (flux geometry)
    #[arg(long, value_name = "EMISSION")]
    emission: Option<String>,
    /// Angle from a Lambertian emitter's axis
    #[arg(long, value_name = "ANGLE")]
    emission_angle: Option<String>,
    /// Angle of incidence at the eye
    #[arg(long, value_name = "ANGLE")]
    incidence: Option<String>,
    /// A filter in the path: a transmittance ("0.65") or a transmittance file; repeatable
    #[arg(long, value_name = "FILTER")]
    filter: Vec<String>,
}

impl PlaceArgs {
    fn source_spec(&self, spectrum: &str, scale: &ScaleArgs) -> SourceSpec {
        let mut src = SourceSpec {
            spectrum: spectrum.to_string(),
            geometry: self.geometry.clone(),
            distance: self.distance.clone(),
            size: self.size.clone(),
            subtense: self.subtense.clone(),
            full_field: self.full_field,
            emission: self.emission.clone(),
            emission_angle: self.emission_angle.clone(),
            incidence: self.incidence.clone(),
            ..SourceSpec::default()
        };
        if let Some((key, value)) = scale.given() {
            let v = Some(value.to_string());
            match key {
                "illuminance" => src.illuminance = v,
                "luminance" => src.luminance = v,
                "irradiance" => src.irradiance = v,
                "photon_irradiance" => src.photon_irradiance = v,
                "radiance" => src.radiance = v,
                "luminous_intensity" => src.luminous_intensity = v,
                "luminous_flux" => src.luminous_flux = v,
                _ => src.radiant_flux = v,
            }
        }
        src
    }

    fn filter_specs(&self) -> Vec<FilterSpec> {
        self.filter
            .iter()
            .map(|f| {
                if units::parse_number(f).is_ok() {
                    FilterSpec { transmittance: Some(f.clone()), ..FilterSpec::default() }
                } else {
                    FilterSpec { file: Some(f.clone()), ..FilterSpec::default() }
                }
            })
            .collect()
    }
}

const RETINA_EXAMPLES: &str = "\
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
struct RetinaArgs {
    /// The source spectrum (as for `retidose spectrum`); or use --scenario
    #[arg(value_name = "SOURCE", required_unless_present = "scenario", conflicts_with = "scenario")]
    source: Option<String>,
    /// A scenario file ([subject], [[source]], [[filter]] tables) instead of the flags
    #[arg(long, value_name = "FILE")]
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
    /// Scale to a luminous intensity, e.g. "2 cd" (makes a spectral radiant intensity)
    #[arg(long, value_name = "INTENSITY")]
    luminous_intensity: Option<String>,
    /// Scale to a luminous flux, e.g. "800 lm" (makes a spectral radiant flux)
    #[arg(long, value_name = "FLUX")]
    luminous_flux: Option<String>,
    /// Scale to a radiant flux over the sampled range, e.g. "5 mW"
    #[arg(long, value_name = "POWER")]
    radiant_flux: Option<String>,
}

impl ScaleArgs {
    /// The one measured value given, as (key, text).
    fn given(&self) -> Option<(&'static str, &str)> {
        [
            ("illuminance", &self.illuminance),
            ("luminance", &self.luminance),
            ("irradiance", &self.irradiance),
            ("photon_irradiance", &self.photon_irradiance),
            ("radiance", &self.radiance),
            ("luminous_intensity", &self.luminous_intensity),
            ("luminous_flux", &self.luminous_flux),
            ("radiant_flux", &self.radiant_flux),
        ]
        .into_iter()
        .find_map(|(k, v)| v.as_deref().map(|v| (k, v)))
    }
}

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
enum Format {
    /// A table for the terminal
    Table,
    /// JSON with stable field names (documented in the README)
    Json,
}

/// Runs the parsed command and returns the text to print with the exit status.
pub fn run(cli: Cli) -> Result<Output> {
    let text = match cli.command {
        Command::Assess(args) => return assess_cmd(*args),
        Command::Spectrum(args) => spectrum(*args),
        Command::Retina(args) => retina(*args),
        Command::Bleach(args) => bleach(*args),
        Command::Limits(LimitsCommand::List) => Ok(render::limit_sets()),
        Command::Limits(LimitsCommand::Show { set, set_file }) => {
            let set = load_set(set.as_deref().unwrap_or(""), set_file.as_deref())?;
            Ok(render::limit_set(&set))
        }
        Command::Limits(LimitsCommand::Check(args)) => check(*args),
        Command::Sources => Ok(render::sources()),
    }?;
    Ok(Output { text, status: 0 })
}

fn scale_target(a: &ScaleArgs) -> Result<Option<ScaleTarget>> {
    a.given()
        .map(|(k, v)| ScaleTarget::parse(k, v).with_context(|| format!("--{}", k.replace('_', "-"))))
        .transpose()
}

fn bleach(a: BleachArgs) -> Result<String> {
    let mut scenario = match &a.schedule {
        Some(file) => {
            let text = std::fs::read_to_string(file).with_context(|| format!("cannot read {file}"))?;
            parse_bleach_scenario(&text, file, Path::new(file).parent())?
        }
        None => {
            let pigment = find_pigment(a.receptor.as_deref().unwrap_or_default())?;
            let model = a.model.as_deref().map(Model::parse).transpose()?.unwrap_or(Model::RateLimited);
            BleachScenario { pigment, model, schedule: Schedule::default(), start: a.start }
        }
    };
    if let Some(m) = &a.model {
        scenario.model = Model::parse(m)?;
    }
    for p in &a.param {
        let (k, v) = p.split_once('=').with_context(|| format!("--param '{p}' must be NAME=VALUE"))?;
        scenario.pigment.override_param(k.trim(), v.trim().trim_matches('"'))?;
    }
    let pigment = &scenario.pigment;
    let level = match (&a.retinal, &a.rate) {
        (Some(t), _) | (None, Some(t)) => {
            Some(parse_level(pigment, t).context(if a.retinal.is_some() { "--retinal" } else { "--rate" })?)
        }
        (None, None) => None,
    };
    if let Some(phi) = a.flash {
        let r = flash_response(pigment, phi)?;
        return Ok(match a.format {
            Format::Table => render::flash_table(pigment, &r),
            Format::Json => render::flash_json(pigment, &r),
        });
    }
    if let Some(what) = &a.solve {
        let target = a.target.unwrap_or_default();
        let answer = match what.as_str() {
            "level" => {
                let d = units::parse_time(a.duration.as_deref().context("--solve level needs --for")?)
                    .context("--for")?;
                let l = level_for_target(pigment, scenario.model, a.start, target, d.si())?;
                format!(
                    "level {:.6e} {} bleaches {target} in {} s (from {})",
                    l,
                    pigment.level_unit.symbol(),
                    d.si(),
                    a.start
                )
            }
            "duration" => {
                let l = level.context("--solve duration needs --retinal or --rate")?;
                match duration_for_target(pigment, scenario.model, a.start, l, target) {
                    Some(t) => format!(
                        "{t:.6e} s at {l} {} to reach {target} (from {})",
                        pigment.level_unit.symbol(),
                        a.start
                    ),
                    None => format!(
                        "never: the steady state at {l} {} is {:.6}, below the target {target}",
                        pigment.level_unit.symbol(),
                        steady_at(pigment, scenario.model, l)
                    ),
                }
            }
            "steady" => {
                let l = steady_level_for_target(pigment, scenario.model, target)?;
                format!("a steady level of {l:.6e} {} holds {target} bleached", pigment.level_unit.symbol())
            }
            other => bail!("--solve {other}: expected level, duration or steady"),
        };
        return Ok(match a.format {
            Format::Table => {
                format!("retidose bleach: {} ({} model)\n  {answer}\n", pigment.id, scenario.model.name())
            }
            Format::Json => format!(
                "{}\n",
                serde_json::json!({ "schema": "retidose.bleach-solve/1", "receptor": pigment.id, "model": scenario.model.name(), "answer": answer })
            ),
        });
    }
    if a.schedule.is_none() {
        let l =
            level.context("give --retinal (human) or --rate (rodent) with --for, or a --schedule file")?;
        let d = units::parse_time(a.duration.as_deref().context("--for is needed with a light level")?)
            .context("--for")?;
        scenario.schedule.push("light", d.si(), pigment.rate_of_level(l))?;
        if let Some(dark) = &a.then_dark {
            scenario.schedule.push("dark", units::parse_time(dark).context("--then-dark")?.si(), 0.0)?;
        }
        scenario.schedule.repeat(a.repeat)?;
    }
    let report = bleach_assess(
        &scenario.pigment,
        scenario.model,
        &scenario.schedule,
        scenario.start,
        Some(a.samples),
    )?;
    if let Some(path) = &a.time_course {
        let text = if path.ends_with(".json") {
            render::time_course_json(&report)
        } else {
            render::time_course_csv(&report)
        };
        let mut f =
            std::fs::OpenOptions::new().write(true).create_new(true).open(path).with_context(|| {
                format!(
                    "--time-course {path}: cannot create a new file (an existing file is never overwritten)"
                )
            })?;
        std::io::Write::write_all(&mut f, text.as_bytes())
            .with_context(|| format!("--time-course {path}"))?;
    }
    Ok(match a.format {
        Format::Table => render::bleach_table(&report),
        Format::Json => render::bleach_json(&report),
    })
}

fn load_set(id: &str, file: Option<&str>) -> Result<LimitSet> {
    Ok(match file {
        Some(f) => {
            let text =
                std::fs::read_to_string(f).with_context(|| format!("cannot read the limit set {f}"))?;
            parse_set(&text, f)?
        }
        None => find_set(id)?.clone(),
    })
}

fn check(a: CheckArgs) -> Result<String> {
    let set = load_set(&a.set, a.set_file.as_deref())?;
    let duration = units::parse_time(&a.duration).context("--for")?;
    let spec = a.place.source_spec(&a.source, &a.scale);
    let source = place(&spec, None)?;
    let filters =
        a.place.filter.iter().map(|f| Filter::parse(f)).collect::<std::result::Result<Vec<_>, _>>()?;
    let report = assess_limits(&LimitsRequest {
        source: &source,
        filters: &filters,
        set: &set,
        duration,
        aphakic: a.aphakic,
        classify: a.classify.then_some(a.general_lighting),
        only: &a.hazard,
    })?;
    Ok(match a.format {
        Format::Table => render::limits_table(&report),
        Format::Json => render::limits_json(&report),
    })
}

fn retina(a: RetinaArgs) -> Result<String> {
    let scenario = match &a.scenario {
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
    };
    let r = assess_retina(&scenario)?;
    if let Some(path) = &a.retinal_spectrum {
        let csv = render::retinal_spectrum_csv(&r);
        let mut f = std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(path)
            .with_context(|| format!("--retinal-spectrum {path}: cannot create a new file (an existing file is never overwritten)"))?;
        std::io::Write::write_all(&mut f, csv.as_bytes())
            .with_context(|| format!("--retinal-spectrum {path}"))?;
    }
    Ok(match a.format {
        Format::Table => render::retina_table(&r),
        Format::Json => render::retina_json(&r),
    })
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
