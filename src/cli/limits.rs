//! `retidose limits`: list the limit sets, show one, or check a source against one.

use crate::cli::Output;
use anyhow::{Context, Result};
use clap::{Args, Subcommand};
use retidose::base::units;
use retidose::cornea::filter::Filter;
use retidose::limits::report::{LimitsRequest, assess_limits};
use retidose::limits::{LimitSet, find_set, parse_set};
use retidose::scenario::retina::place;

use super::args::{Format, PlaceArgs, ScaleArgs};
use super::render::{json, terminal};

/// Help shown after `retidose limits check --help`.
const EXAMPLES: &str = "\
Examples:
  retidose limits check stimulus-460-led --luminous-intensity \"2 cd\" --distance \"200 mm\" --size \"5 mm\" --for \"8 h\" --classify
  retidose limits check uva-365-led --irradiance \"0.5 W/m2\" --full-field --for \"1 h\" --set directive-2006-25-ec
  retidose limits check halogen-3000k --luminance \"2e6 cd/m2\" --size \"10 mm\" --distance \"0.5 m\" --for \"10 s\"";

#[derive(Debug, Subcommand)]
pub enum LimitsCommand {
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
    #[command(after_help = EXAMPLES)]
    Check(Box<CheckArgs>),
}

#[derive(Debug, Args)]
pub struct CheckArgs {
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

/// Runs `retidose limits list|show|check`; a check that finds a limit exceeded (on the whole
/// band, or on the measured band alone) exits with 1.
pub fn run(command: LimitsCommand) -> Result<Output> {
    let text = match command {
        LimitsCommand::List => terminal::limits::sets(),
        LimitsCommand::Show { set, set_file } => {
            let set = load_set(set.as_deref().unwrap_or(""), set_file.as_deref())?;
            terminal::limits::set(&set)
        }
        LimitsCommand::Check(args) => return check(*args),
    };
    Ok(Output { text, status: 0 })
}

/// A built-in limit set by id, or a user limit-set file.
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

/// `retidose limits check`: places the source, then evaluates every hazard of the set.
fn check(a: CheckArgs) -> Result<Output> {
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
    let exceeded = report.hazards.iter().any(|h| h.verdict == retidose::limits::Verdict::Exceeds);
    let text = match a.format {
        Format::Table => terminal::limits::check(&report),
        Format::Json => json::limits::check(&report),
    };
    Ok(Output { text, status: u8::from(exceeded) })
}
