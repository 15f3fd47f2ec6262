//! The `retidose` command line: the [`Cli`] definition and the dispatch to one module per
//! subcommand.
//!
//! | file | what |
//! |---|---|
//! | `mod.rs` | [`Cli`], the subcommands, [`Output`] and [`run`] |
//! | `args.rs` | argument groups shared by several commands (scaling, placing, format) |
//! | `assess.rs` | `retidose assess`: scenario file or demo in, report out |
//! | `spectrum.rs` | `retidose spectrum` |
//! | `sources.rs` | `retidose sources` |
//! | `retina.rs` | `retidose retina` |
//! | `limits.rs` | `retidose limits list`, `show` and `check` |
//! | `bleach.rs` | `retidose bleach` |
//! | `render/` | the outputs, one module per format (see [`render`]) |
//!
//! Each command file holds that command's arguments, help text and body; a command only parses,
//! calls the library and renders.

mod adapt;
mod args;
mod assess;
mod bleach;
mod compare;
mod limits;
pub mod output;
mod render;
mod retina;
mod sources;
mod spectrum;
mod sweep;
mod uncertain;

use anyhow::Result;
use clap::{Parser, Subcommand};

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

Exit status: 0 on success, 2 on an error (bad input, unreadable file); assess and limits
check exit with 1 when a limit is exceeded (on the measured band alone counts), assess also
when a guidance flag is raised.
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
    #[command(after_help = assess::EXAMPLES)]
    Assess(Box<assess::AssessArgs>),
    /// Photometric, scotopic and CIE S 026 α-opic quantities of one spectrum
    #[command(after_help = spectrum::EXAMPLES)]
    Spectrum(Box<spectrum::SpectrumArgs>),
    /// Corneal and retinal quantities and photoreceptor catch for a human, mouse or rat eye
    #[command(after_help = retina::EXAMPLES)]
    Retina(Box<retina::RetinaArgs>),
    /// Pigment bleaching and recovery over an exposure schedule (rods and cones)
    #[command(after_help = bleach::EXAMPLES)]
    Bleach(Box<bleach::BleachArgs>),
    /// Photobiological exposure limits: list the sets, show one, or check a source against one
    #[command(subcommand)]
    Limits(limits::LimitsCommand),
    /// List the built-in light sources, generators and reference tables
    Sources,
    /// Move one source of a scenario along its axis: t_max and risk group against distance, or --solve
    #[command(after_help = sweep::EXAMPLES)]
    Sweep(Box<sweep::SweepArgs>),
    /// Predicted rod threshold after a bleach, or a fit of measured thresholds
    #[command(after_help = adapt::THRESHOLD_EXAMPLES)]
    Threshold(Box<adapt::ThresholdArgs>),
    /// A flash strength as R* per rod per flash, with the fraction of the saturating flash
    #[command(after_help = adapt::FLASH_EXAMPLES)]
    Flash(Box<adapt::FlashArgs>),
    /// Monte Carlo uncertainty of every hazard ratio of one source (GUM Supplement 1)
    #[command(after_help = uncertain::EXAMPLES)]
    Uncertainty(Box<uncertain::UncertaintyArgs>),
    /// Several scenario files (or the variants of a variants file) side by side, ranked by margin
    #[command(after_help = compare::EXAMPLES)]
    Compare(Box<compare::CompareArgs>),
}

/// What a command produced: the text and the exit status.
pub struct Output {
    /// Text for standard output (empty when written to a file).
    pub text: String,
    /// Exit status.
    pub status: u8,
}

/// Runs the parsed command and returns the text to print with the exit status.
pub fn run(cli: Cli) -> Result<Output> {
    let text = match cli.command {
        Command::Assess(args) => return assess::run(*args),
        Command::Spectrum(args) => spectrum::run(*args),
        Command::Retina(args) => retina::run(*args),
        Command::Bleach(args) => bleach::run(*args),
        Command::Limits(command) => return limits::run(command),
        Command::Sources => Ok(sources::run()),
        Command::Sweep(args) => return sweep::run(*args),
        Command::Threshold(args) => return adapt::run_threshold(*args),
        Command::Flash(args) => return adapt::run_flash(*args),
        Command::Uncertainty(args) => return uncertain::run(*args),
        Command::Compare(args) => return compare::run(*args),
    }?;
    Ok(Output { text, status: 0 })
}
