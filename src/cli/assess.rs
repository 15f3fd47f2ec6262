//! `retidose assess`: one scenario file (or a built-in demo) in, one assessment out, in the
//! format asked for, to the terminal or to a file.

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::assess::{Assessment, DEMOS, assess, demo, parse_scenario_file};
use retidose::scenario::file::Scenario;

use super::Output;
use super::output::{AtomicFile, check_target};
use super::render::{csv, csv_long, html, json, markdown, terminal};

/// Help shown after `retidose assess --help`.
pub const EXAMPLES: &str = "\
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
pub struct AssessArgs {
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
pub enum ReportFormat {
    /// Tables for the terminal
    Table,
    /// JSON (schema retidose.assessment/2)
    Json,
    /// CSV: the whole report as one long table (scenario, section, item, quantity, value, unit, status)
    Csv,
    /// CSV: one row per cage position of the room (streamed)
    Positions,
    /// Markdown
    Markdown,
    /// One self-contained HTML file with inline SVG plots
    Html,
}

/// Runs `retidose assess`.
pub fn run(a: AssessArgs) -> Result<Output> {
    if let Some(name) = &a.example {
        return Ok(Output { text: demo(name)?.to_string(), status: 0 });
    }
    let (scenarios, inputs) = load_scenarios(&a)?;
    if let Some(path) = &a.output {
        check_target(Path::new(path), &inputs, a.force)?;
    }
    {
        use std::io::IsTerminal;
        if std::io::stderr().is_terminal() {
            eprintln!("retidose: assessing {} scenario(s)…", scenarios.len());
        }
    }
    let results = scenarios.iter().map(assess).collect::<std::result::Result<Vec<_>, _>>()?;
    if a.format == ReportFormat::Positions && results.iter().all(|r| r.room.is_none()) {
        bail!(
            "--format positions writes one row per cage position, and no scenario here has a [room]; use --format csv"
        );
    }
    // A demo raises flags on purpose; its run is a success. Scenario files get the documented
    // status (1 when a limit is exceeded or a guidance flag is raised).
    let raised = results.iter().any(|r| r.limit_exceeded || r.flag_raised);
    let status = u8::from(raised && a.demo.is_none());
    let colour = a.output.is_none() && terminal::use_colour();
    match &a.output {
        None => {
            let mut w = std::io::BufWriter::new(std::io::stdout().lock());
            match render_to(&results, &scenarios, a.format, colour, &mut w).and_then(|()| w.flush()) {
                // A closed pipe (`retidose … | head`) is not an error.
                Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
                    return Err(e).context("cannot write the report");
                }
                _ => {}
            }
        }
        Some(path) => {
            let mut f = AtomicFile::create(Path::new(path))?;
            render_to(&results, &scenarios, a.format, colour, &mut f)
                .with_context(|| format!("cannot write {path}"))?;
            f.commit()?;
        }
    }
    Ok(Output { text: String::new(), status })
}

/// The scenarios to assess (the demos asked for, or the one file) and the input files read.
fn load_scenarios(a: &AssessArgs) -> Result<(Vec<Scenario>, Vec<PathBuf>)> {
    let mut inputs: Vec<PathBuf> = Vec::new();
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
            let s = parse_scenario_file(&text, file, Path::new(file).parent())?;
            inputs.extend(s.inputs.iter().cloned());
            let n = retidose::scenario::variant::count(&text);
            if n > 0 {
                eprintln!(
                    "retidose: assessing the base scenario only; {file} has {n} variant(s): compare them with `retidose compare {file}`"
                );
            }
            vec![s]
        }
        (None, None) => bail!("give a scenario file, --demo or --example"),
    };
    Ok((scenarios, inputs))
}

/// Writes the report in the format asked for: JSON and CSV streamed (memory does not grow with
/// the number of cage positions), the others rendered whole.
fn render_to(
    results: &[Assessment],
    scenarios: &[Scenario],
    format: ReportFormat,
    colour: bool,
    w: &mut dyn Write,
) -> std::io::Result<()> {
    match format {
        ReportFormat::Table => w.write_all(terminal::assess::report(results, colour).as_bytes()),
        ReportFormat::Json => json::assess::document_to(results, w),
        ReportFormat::Csv => csv_long::write(results, w),
        ReportFormat::Positions => csv::assessment_to(results, w),
        ReportFormat::Markdown => w.write_all(markdown::assessment(results).as_bytes()),
        ReportFormat::Html => w.write_all(html::assessment(results, scenarios).as_bytes()),
    }
}
