//! `retidose bleach`: pigment bleaching and recovery over an exposure schedule, an inverse
//! solve (`--solve`) or a rod flash response (`--flash`).

use std::path::Path;

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::base::quantity::SiValue;
use retidose::base::units;
use retidose::pigment::bleach::{
    BleachReport, assess as bleach_assess, duration_for_target, flash_response, level_for_target, steady_at,
    steady_level_for_target,
};
use retidose::pigment::kinetics::{Model, Pigment, find_pigment};
use retidose::pigment::schedule::Schedule;
use retidose::scenario::bleach::{BleachScenario, parse_bleach_scenario, parse_level};

use retidose::assess::{Assessment, assess, course, parse_scenario_file};
use retidose::base::quantity::{Frequency, Illuminance, Luminance};
use retidose::pigment::course::{Course, DurationSolve, LevelSolve, LevelSweep, SweepPoint, TOLERANCE};

use super::args::Format;
use super::render::escape::csv_cell;
use super::render::terminal::{Page, Table};
use super::render::{CAUTION, csv, duration, json, num, svg, terminal};

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
  retidose bleach --schedule cage-cycle.toml --format json

A step of a schedule by its name (any case), from an assess scenario or a schedule file: the factor
on its light (and its level) or its duration for a target bleach at its end, or bleach against the
factor on its light (log spaced). Each solve states the bracket searched and its tolerance.
  retidose assess --example dark-adaptation > dark.toml
  retidose bleach --scenario dark.toml --step bleach --solve level --target 0.9
  retidose bleach --scenario dark.toml --step bleach --solve duration --target 0.5 --format json
  retidose bleach --scenario dark.toml --step bleach --sweep-level --from 0.01 --to 100 --points 50 --plot b.svg";

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
    /// An assess scenario file: its [schedule] with the light of each step as assessed (with --step)
    #[arg(long, value_name = "FILE", conflicts_with_all = ["schedule", "receptor", "retinal", "rate", "flash"])]
    scenario: Option<String>,
    /// The step (by its name, any case) whose light or duration --solve finds or --sweep-level scales
    #[arg(long, value_name = "NAME")]
    step: Option<String>,
    /// Bleach against a factor on the --step's light, log spaced from --from to --to
    #[arg(long, requires = "step", conflicts_with = "solve")]
    sweep_level: bool,
    /// Smallest factor on the step's light for --sweep-level
    #[arg(long, value_name = "FACTOR", default_value_t = 0.01)]
    from: f64,
    /// Largest factor on the step's light for --sweep-level
    #[arg(long, value_name = "FACTOR", default_value_t = 100.0)]
    to: f64,
    /// Number of factors for --sweep-level (2 to 10 000)
    #[arg(long, value_name = "N", default_value_t = 50)]
    points: usize,
    /// Write the --sweep-level figure (bleach against level) to this new SVG file; never overwrites
    #[arg(long, value_name = "FILE", requires = "sweep_level")]
    plot: Option<String>,
    /// human-rod, human-cone, mouse-rod or rat-rod
    #[arg(long, value_name = "RECEPTOR", required_unless_present_any = ["schedule", "scenario"])]
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
    /// Output format (csv: for --step solves and sweeps)
    #[arg(long, value_enum, default_value_t = BleachFormat::Table)]
    format: BleachFormat,
}

/// The formats of `retidose bleach`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum BleachFormat {
    /// A table for the terminal
    Table,
    /// JSON with stable field names
    Json,
    /// CSV (with --step: the solve's figures, or one row per sweep point)
    Csv,
}

impl BleachFormat {
    /// The shared format of the runs that have no CSV form.
    fn plain(self) -> Result<Format> {
        match self {
            BleachFormat::Table => Ok(Format::Table),
            BleachFormat::Json => Ok(Format::Json),
            BleachFormat::Csv => bail!(
                "--format csv is for --step solves and sweeps; for a run's time course use --time-course FILE.csv"
            ),
        }
    }
}

/// Runs `retidose bleach`.
pub fn run(a: BleachArgs) -> Result<String> {
    if a.step.is_some() || a.scenario.is_some() {
        return named_step(&a);
    }
    let format = a.format.plain()?;
    let mut scenario = scenario(&a)?;
    let level = level(&a, &scenario.pigment)?;
    if let Some(phi) = a.flash {
        let r = flash_response(&scenario.pigment, phi)?;
        return Ok(match format {
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
    Ok(match format {
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
            BleachScenario {
                pigment,
                model,
                schedule: Schedule::default(),
                start: a.start,
                cycle: (Vec::new(), 1),
            }
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
    Ok(match a.format.plain()? {
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
    write_new(path, "--time-course", &text)
}

/// What a named step's solve or sweep runs on: the course, and for a scenario its assessment
/// (each step's light as assessed) and the scenario's source ids.
struct Named {
    title: String,
    course: Course,
    assessed: Option<(Assessment, Vec<String>)>,
    /// Per step, whether its pupil follows a formula of the light (a scenario's steps only).
    adapts: Vec<bool>,
}

/// `--scenario FILE` (assessed as `retidose assess` does) or `--schedule FILE`, with `--model`
/// and every `--param` applied.
fn named(a: &BleachArgs) -> Result<Named> {
    let Some(file) = &a.scenario else {
        let file = a
            .schedule
            .as_deref()
            .context("--step needs a schedule: give --scenario FILE or --schedule FILE")?;
        return Ok(Named {
            title: file.to_string(),
            course: scenario(a)?.course()?,
            assessed: None,
            adapts: Vec::new(),
        });
    };
    let text = std::fs::read_to_string(file).with_context(|| format!("cannot read the scenario {file}"))?;
    let s = parse_scenario_file(&text, file, Path::new(file).parent())?;
    let assessment = assess(&s)?;
    let sc = s
        .schedule
        .as_ref()
        .with_context(|| format!("--scenario {file}: it has no [schedule] to solve on"))?;
    let mut course = course(sc, &assessment.steps);
    if let Some(m) = &a.model {
        course.model = Model::parse(m).context("--model")?;
    }
    for p in &a.param {
        let (k, v) = p.split_once('=').with_context(|| format!("--param '{p}' must be NAME=VALUE"))?;
        course.pigment.override_param(k.trim(), v.trim().trim_matches('"'))?;
    }
    let adapts = sc.steps.iter().map(|st| retidose::assess::pupil_adapts(&s, st)).collect();
    Ok(Named { title: s.name.clone(), course, assessed: Some((assessment, s.source_ids)), adapts })
}

/// `--step NAME` with `--solve level|duration --target F` or `--sweep-level`.
fn named_step(a: &BleachArgs) -> Result<String> {
    let name = a.step.as_deref().context("--scenario needs --step NAME: the step to solve or sweep")?;
    let n = named(a)?;
    let step = n.course.find_step(name).context("--step")?;
    if (a.sweep_level || a.solve.as_deref() == Some("level")) && n.adapts.get(step) == Some(&true) {
        bail!(
            "--step {name}: its pupil follows a formula of the light, so the light reaching the retina is not \
             proportional to a factor on the step's sources, and a level solve or sweep would be wrong; give the \
             subject a fixed pupil (e.g. pupil = \"7 mm\", as for a dilated eye) to solve the level, or use \
             --solve duration"
        );
    }
    if a.sweep_level {
        let sweep = n
            .course
            .sweep_level(step, a.from, a.to, a.points)
            .context("--sweep-level (--from, --to, --points)")?;
        if let Some(path) = &a.plot {
            write_new(path, "--plot", &plot_svg(&n, &sweep)?)?;
        }
        return Ok(render_sweep(a.format, &n, &sweep));
    }
    let target = a.target.context("--step needs --solve level|duration with --target F, or --sweep-level")?;
    let solved = match a.solve.as_deref() {
        Some("level") => Solved::Level(n.course.solve_level(step, target).context("--solve level --target")?),
        Some("duration") => {
            Solved::Duration(n.course.solve_duration(step, target).context("--solve duration --target")?)
        }
        Some(other) => bail!("--solve {other}: with --step, expected level or duration"),
        None => bail!("--step needs --solve level|duration (with --target) or --sweep-level"),
    };
    render_solve(a.format, &n, step, &solved)
}

/// A named step's solve.
#[derive(serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "solve")]
enum Solved {
    /// The factor on the step's light.
    Level(LevelSolve),
    /// The step's duration.
    Duration(DurationSolve),
}

/// The step's light at a factor, as assessed (scenario files only): every figure is linear in it.
#[derive(serde::Serialize)]
struct StepLightAt {
    factor: f64,
    rod_rate: Option<Frequency>,
    room_illuminance: Illuminance,
    illuminance_at_eye: Illuminance,
    melanopic_edi: Option<Illuminance>,
    sources: Vec<SourceAt>,
}

/// One lit source's luminance (as seen) at the factor.
#[derive(serde::Serialize)]
struct SourceAt {
    id: String,
    luminance: Option<Luminance>,
}

fn light_at(n: &Named, step: usize, factor: f64) -> Option<StepLightAt> {
    let (a, ids) = n.assessed.as_ref()?;
    let st = &a.steps[step];
    let lum = |id: &str| {
        let i = ids.iter().position(|x| x == id)?;
        let l = a.retina.as_ref()?.sources.get(i)?.luminance.as_ref()?.value?;
        Some(Luminance::from_si(factor * l.si_value()))
    };
    Some(StepLightAt {
        factor,
        rod_rate: st.rod_rate.map(|r| r * factor),
        room_illuminance: st.room_illuminance * factor,
        illuminance_at_eye: st.illuminance * factor,
        melanopic_edi: st.melanopic_edi.map(|e| e * factor),
        sources: st.on.iter().map(|id| SourceAt { id: id.clone(), luminance: lum(id) }).collect(),
    })
}

/// The lines of a solve (table and CSV share them): (quantity, value, unit).
fn solve_rows(n: &Named, step: usize, s: &Solved) -> Vec<(String, f64, String)> {
    let unit = n.course.pigment.level_unit.symbol();
    let mut rows: Vec<(String, f64, String)> = Vec::new();
    let mut push = |q: &str, v: f64, u: &str| rows.push((q.to_string(), v, u.to_string()));
    let factor = match s {
        Solved::Level(l) => {
            push("target bleached at the end of the step", l.target, "1");
            push("factor on the step's light", l.factor, "1");
            push("bracket searched, lowest factor", l.bracket.0, "1");
            push("bracket searched, highest factor", l.bracket.1, "1");
            push("tolerance on the bleached fraction", l.tolerance, "1");
            push("level", l.level, unit);
            push("bleached at the end of the step", l.reached, "1");
            l.factor
        }
        Solved::Duration(d) => {
            push("target bleached at the end of the step", d.target, "1");
            push("duration", d.duration.si(), "s");
            push("bracket searched, shortest", d.bracket.0.si(), "s");
            push("bracket searched, longest", d.bracket.1.si(), "s");
            push("tolerance on the bleached fraction", d.tolerance, "1");
            push("steady state of the step's light", d.steady_state, "1");
            push("bleached at the end of the step", d.reached, "1");
            return rows;
        }
    };
    if let Some(l) = light_at(n, step, factor) {
        if let Some(r) = l.rod_rate {
            push("rod rate", r.si(), "R*/rod/s");
        }
        push("room illuminance before the filters", l.room_illuminance.si(), "lx");
        push("illuminance at the eye", l.illuminance_at_eye.si(), "lx");
        if let Some(e) = l.melanopic_edi {
            push("melanopic EDI at the eye", e.si(), "lx");
        }
        for src in &l.sources {
            if let Some(v) = src.luminance {
                push(&format!("luminance of source '{}'", src.id), v.si(), "cd/m²");
            }
        }
    }
    rows
}

/// The heading line of a named step's output.
fn heading(n: &Named, step: usize) -> String {
    let c = &n.course;
    format!(
        "retidose bleach: step '{}' of {} ({}, {} model)",
        c.steps[step].name,
        n.title,
        c.pigment.id,
        c.model.name()
    )
}

/// A solve as a table, CSV or JSON (schema retidose.bleach-solve/1).
fn render_solve(format: BleachFormat, n: &Named, step: usize, s: &Solved) -> Result<String> {
    let rows = solve_rows(n, step, s);
    Ok(match format {
        BleachFormat::Csv => {
            let mut out = String::from("step,quantity,value,unit\n");
            for (q, v, u) in &rows {
                out.push_str(&format!(
                    "{},{},{v},{}\n",
                    csv_field(&n.course.steps[step].name),
                    csv_field(q),
                    u
                ));
            }
            out
        }
        BleachFormat::Json => {
            let factor = match s {
                Solved::Level(l) => Some(l.factor),
                Solved::Duration(_) => None,
            };
            let doc = serde_json::json!({
                "scenario": n.title,
                "receptor": n.course.pigment.id,
                "model": n.course.model.name(),
                "level_unit": n.course.pigment.level_unit.symbol(),
                "answer": s,
                "step_light": factor.and_then(|f| light_at(n, step, f)),
                "caution": CAUTION,
            });
            json::with_schema("retidose.bleach-solve/1", &doc)?
        }
        BleachFormat::Table => solve_table(n, step, s, &rows),
    })
}

/// A solve for the terminal: what was solved, the bracket and tolerance, then each figure.
fn solve_table(n: &Named, step: usize, s: &Solved, rows: &[(String, f64, String)]) -> String {
    let (what, searched) = match s {
        Solved::Level(l) => (
            format!("the light that bleaches {} by the step's end", l.target),
            format!("factors {} to {} on the step's light", num(l.bracket.0), num(l.bracket.1)),
        ),
        Solved::Duration(d) => (
            format!("the duration that bleaches {} by the step's end", d.target),
            format!("{} to {}", duration(d.bracket.0.si()), duration(d.bracket.1.si())),
        ),
    };
    let mut o = Page::new(terminal::width(), false);
    o.para(&heading(n, step), "");
    o.para(
        &format!("solve: {what}; searched {searched}, tolerance {TOLERANCE:e} on the bleached fraction"),
        "  ",
    );
    for (q, v, u) in
        rows.iter().skip(1).filter(|r| !r.0.starts_with("bracket") && !r.0.starts_with("tolerance"))
    {
        let v =
            if u == "s" { format!("{} ({} s)", duration(*v), num(*v)) } else { format!("{} {u}", num(*v)) };
        o.para(&format!("{q}: {}", v.trim_end_matches(" 1")), "  ");
    }
    o.blank();
    o.para(CAUTION, "");
    o.finish()
}

/// A fraction in per cent, 4 significant digits.
fn pct(fraction: f64) -> String {
    format!("{} %", num(100.0 * fraction))
}

/// A CSV field, quoted when it must be.
fn csv_field(s: &str) -> String {
    let s = csv_cell(s);
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.into_owned()
    }
}

/// A sweep as a table, CSV (one row per factor) or JSON (schema retidose.bleach-sweep/1).
fn render_sweep(format: BleachFormat, n: &Named, s: &LevelSweep) -> String {
    let unit = s.level_unit.symbol();
    let recovery = |p: &SweepPoint| match (p.lights_off_after, p.recovery_90) {
        (false, _) => "—".to_string(),
        (true, None) => "not before the light rose".to_string(),
        (true, Some(t)) if t.si() == 0.0 => "already at lights-off".to_string(),
        (true, Some(t)) => duration(t.si()),
    };
    match format {
        BleachFormat::Csv => {
            let mut out =
                String::from("factor,level,level_unit,step_end_bleached,peak_bleached,recovery_90_s\n");
            for p in &s.points {
                let r = p.recovery_90.map_or(String::new(), |t| t.si().to_string());
                out.push_str(&format!("{},{},{unit},{},{},{r}\n", p.factor, p.level, p.step_end, p.peak));
            }
            out
        }
        BleachFormat::Json => json::with_schema(
            "retidose.bleach-sweep/1",
            &serde_json::json!({
                "scenario": n.title, "receptor": n.course.pigment.id, "model": n.course.model.name(),
                "level_unit": unit, "step": s.step, "points": s.points, "caution": CAUTION,
            }),
        )
        .unwrap_or_default(),
        BleachFormat::Table => {
            let step = n.course.find_step(&s.step).unwrap_or_default();
            let mut o = Page::new(terminal::width(), false);
            o.para(&heading(n, step), "");
            o.para("Bleach against a factor on the step's light (log spaced; each row a full run of the schedule)", "");
            let mut t = Table::new(&[
                "factor",
                "level",
                "bleached at the step's end",
                "peak",
                "90 % regenerated after",
            ]);
            for p in &s.points {
                t.row(vec![
                    num(p.factor),
                    format!("{} {unit}", num(p.level)),
                    pct(p.step_end),
                    pct(p.peak),
                    recovery(p),
                ]);
            }
            o.table(&t);
            o.para(CAUTION, "");
            o.finish()
        }
    }
}

/// The sweep's figure as an SVG document.
fn plot_svg(n: &Named, s: &LevelSweep) -> Result<String> {
    let f = svg::bleach_level(s, &n.title).context("--plot: nothing to draw")?;
    Ok(format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n{}\n<!-- {} -->\n",
        f.svg,
        f.caption.replace("--", "—")
    ))
}

/// Writes `text` to a new file at `path`; an existing file is never overwritten.
fn write_new(path: &str, flag: &str, text: &str) -> Result<()> {
    let mut f = std::fs::OpenOptions::new().write(true).create_new(true).open(path).with_context(|| {
        format!("{flag} {path}: cannot create a new file (an existing file is never overwritten)")
    })?;
    std::io::Write::write_all(&mut f, text.as_bytes()).with_context(|| format!("{flag} {path}"))?;
    Ok(())
}
