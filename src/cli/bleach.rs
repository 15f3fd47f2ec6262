//! `retidose bleach`: pigment bleaching and recovery over an exposure schedule, an inverse
//! solve (`--solve`) or a rod flash response (`--flash`).

use std::path::Path;

use anyhow::{Context, Result, bail};
use clap::Args;
use retidose::base::quantity::SiValue;
use retidose::base::units;
use retidose::pigment::bleach::{
    BleachReport, assess as bleach_assess, duration_for_target, flash_response, level_for_target, steady_at,
    steady_level_for_target,
};
use retidose::pigment::kinetics::{Model, Pigment, find_pigment};
use retidose::pigment::schedule::Schedule;
use retidose::scenario::bleach::{BleachScenario, parse_bleach_scenario, parse_level};

use super::args::Format;
use super::render::{csv, json, terminal};

/// Help shown after `retidose bleach --help`.
pub const EXAMPLES: &str = "\
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
pub struct BleachArgs {
    // The help is an attribute, not a doc comment: rustdoc would read `[[step]]` as a link.
    #[arg(
        long,
        value_name = "FILE",
        conflicts_with_all = ["receptor", "retinal", "rate"],
        help = "A schedule file ([[step]] tables) instead of the quick form"
    )]
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

/// Runs `retidose bleach`.
pub fn run(a: BleachArgs) -> Result<String> {
    let mut scenario = scenario(&a)?;
    let level = level(&a, &scenario.pigment)?;
    if let Some(phi) = a.flash {
        let r = flash_response(&scenario.pigment, phi)?;
        return Ok(match a.format {
            Format::Table => terminal::bleach::flash(&scenario.pigment, &r),
            Format::Json => json::bleach::flash(&scenario.pigment, &r),
        });
    }
    if let Some(what) = &a.solve {
        return solve(&a, &scenario, what, level);
    }
    if a.schedule.is_none() {
        quick_schedule(&a, &mut scenario, level)?;
    }
    let report = bleach_assess(
        &scenario.pigment,
        scenario.model,
        &scenario.schedule,
        scenario.start,
        Some(a.samples),
    )?;
    if let Some(path) = &a.time_course {
        write_time_course(path, &report)?;
    }
    Ok(match a.format {
        Format::Table => terminal::bleach::table(&report),
        Format::Json => json::bleach::document(&report),
    })
}

/// The receptor, model, schedule and start: from `--schedule`, or the quick form's receptor
/// with an empty schedule; then `--model` and every `--param` applied.
fn scenario(a: &BleachArgs) -> Result<BleachScenario> {
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
    Ok(scenario)
}

/// The light level of `--retinal` or `--rate`, in the receptor's level unit.
fn level(a: &BleachArgs, pigment: &Pigment) -> Result<Option<f64>> {
    Ok(match (&a.retinal, &a.rate) {
        (Some(t), _) | (None, Some(t)) => {
            Some(parse_level(pigment, t).context(if a.retinal.is_some() { "--retinal" } else { "--rate" })?)
        }
        (None, None) => None,
    })
}

/// `--solve level|duration|steady`: the answer in one line, as a table or JSON.
fn solve(a: &BleachArgs, scenario: &BleachScenario, what: &str, level: Option<f64>) -> Result<String> {
    let answer = solve_answer(a, scenario, what, level)?;
    let pigment = &scenario.pigment;
    Ok(match a.format {
        Format::Table => {
            format!("retidose bleach: {} ({} model)\n  {answer}\n", pigment.id, scenario.model.name())
        }
        Format::Json => format!(
            "{}\n",
            serde_json::json!({ "schema": "retidose.bleach-solve/1", "receptor": pigment.id, "model": scenario.model.name(), "answer": answer })
        ),
    })
}

/// The sentence that answers `--solve`.
fn solve_answer(a: &BleachArgs, scenario: &BleachScenario, what: &str, level: Option<f64>) -> Result<String> {
    let (pigment, model) = (&scenario.pigment, scenario.model);
    let target = a.target.unwrap_or_default();
    Ok(match what {
        "level" => {
            let d = units::parse_time(a.duration.as_deref().context("--solve level needs --for")?)
                .context("--for")?;
            let l = level_for_target(pigment, model, a.start, target, d.si())?;
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
            match duration_for_target(pigment, model, a.start, l, target) {
                Some(t) => format!(
                    "{t:.6e} s at {l} {} to reach {target} (from {})",
                    pigment.level_unit.symbol(),
                    a.start
                ),
                None => format!(
                    "never: the steady state at {l} {} is {:.6}, below the target {target}",
                    pigment.level_unit.symbol(),
                    steady_at(pigment, model, l)
                ),
            }
        }
        "steady" => {
            let l = steady_level_for_target(pigment, model, target)?;
            format!("a steady level of {l:.6e} {} holds {target} bleached", pigment.level_unit.symbol())
        }
        other => bail!("--solve {other}: expected level, duration or steady"),
    })
}

/// The quick form's schedule: a light step of `--for` at the level, an optional dark step,
/// repeated `--repeat` times.
fn quick_schedule(a: &BleachArgs, scenario: &mut BleachScenario, level: Option<f64>) -> Result<()> {
    let l = level.context("give --retinal (human) or --rate (rodent) with --for, or a --schedule file")?;
    let d = units::parse_time(a.duration.as_deref().context("--for is needed with a light level")?)
        .context("--for")?;
    scenario.schedule.push("light", d.si(), scenario.pigment.rate_of_level(l))?;
    if let Some(dark) = &a.then_dark {
        scenario.schedule.push("dark", units::parse_time(dark).context("--then-dark")?.si(), 0.0)?;
    }
    scenario.schedule.repeat(a.repeat)?;
    Ok(())
}

/// Writes `--time-course` (JSON when the name ends in `.json`, else CSV) to a new file; an
/// existing file is never overwritten.
fn write_time_course(path: &str, report: &BleachReport) -> Result<()> {
    let text =
        if path.ends_with(".json") { json::bleach::time_course(report) } else { csv::time_course(report) };
    let mut f = std::fs::OpenOptions::new().write(true).create_new(true).open(path).with_context(|| {
        format!("--time-course {path}: cannot create a new file (an existing file is never overwritten)")
    })?;
    std::io::Write::write_all(&mut f, text.as_bytes()).with_context(|| format!("--time-course {path}"))?;
    Ok(())
}
