//! `retidose compare`: several scenario files, or the variants a variants file lists, assessed
//! and shown side by side (see [`retidose::compare`]).

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::assess::{Assessment, assess, parse_scenario_file};
use retidose::compare::{Aligned, Column, Comparison, Recovery90, compare, parse_variants};
use retidose::scenario::file::Scenario;
use tabled::builder::Builder;
use tabled::settings::Style;
use uom::si::illuminance::lux;
use uom::si::length::millimeter;
use uom::si::time::second;

use super::Output;
use super::output::{AtomicFile, check_target};
use super::render::escape::{csv_cell, terminal_line};
use super::render::{CAUTION, duration, num, t_max_words, terminal};

/// Help shown after `retidose compare --help`.
pub const EXAMPLES: &str = "\
Examples:
  retidose compare lamp-a.toml lamp-b.toml
  retidose compare --variants variants.toml --format csv

A variants file lists the scenarios to compare, each under a name, paths relative to it:
  [[variant]]
  name = \"as built\"
  file = \"rig.toml\"
  [[variant]]
  name = \"dimmer LED\"
  file = \"rig-dim.toml\"

Columns are ranked by margin, the factor to the limit (1 / the worst hazard ratio), largest
first; ties keep the order given.

Exit status: 0 when every compared scenario is within its limits and raises no guidance flag,
1 when any exceeds a limit or raises a flag, 2 on an input error.";

#[derive(Debug, Args)]
pub struct CompareArgs {
    /// Scenario files to compare (at least two, or one with --variants)
    #[arg(value_name = "SCENARIO", required_unless_present = "variants")]
    scenarios: Vec<String>,
    /// A variants file: [[variant]] tables with name and file
    #[arg(long, value_name = "FILE")]
    variants: Option<String>,
    /// Report format
    #[arg(long, value_enum, default_value_t = CompareFormat::Table)]
    format: CompareFormat,
    /// Write the report to this file instead of the terminal (refuses to overwrite without --force)
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    output: Option<String>,
    /// Allow -o to replace an existing file (never an input)
    #[arg(long)]
    force: bool,
}

/// Report formats of `compare`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum CompareFormat {
    /// One column per scenario (three per table), one row per figure
    Table,
    /// CSV, one row per figure and scenario: scenario, figure, value, unit
    Csv,
    /// JSON (schema retidose.comparison/1)
    Json,
}

/// Runs `retidose compare`.
pub fn run(a: CompareArgs) -> Result<Output> {
    let (named, inputs) = load(&a)?;
    if named.len() < 2 {
        bail!("compare needs at least two scenarios; give two files, or a variants file with two variants");
    }
    if let Some(path) = &a.output {
        check_target(Path::new(path), &inputs, a.force)?;
    }
    let results = named
        .iter()
        .map(|(label, s)| Ok((label.clone(), assess(s)?)))
        .collect::<Result<Vec<(String, Assessment)>>>()?;
    let items: Vec<(&str, &Assessment)> = results.iter().map(|(l, r)| (l.as_str(), r)).collect();
    let c = compare(&items);
    let status = u8::from(c.columns.iter().any(|col| col.limit_exceeded || col.flag_raised));
    let text = render(&c, a.format)?;
    match &a.output {
        None => {
            let mut w = std::io::stdout().lock();
            match w.write_all(text.as_bytes()).and_then(|()| w.flush()) {
                Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
                    return Err(e).context("cannot write the report");
                }
                _ => {}
            }
        }
        Some(path) => {
            let mut f = AtomicFile::create(Path::new(path))?;
            f.write_all(text.as_bytes()).with_context(|| format!("cannot write {path}"))?;
            f.commit()?;
        }
    }
    Ok(Output { text: String::new(), status })
}

/// Scenarios, each with the label of its column.
type Labelled = Vec<(String, Scenario)>;

/// The scenarios with their labels, and every input file read.
fn load(a: &CompareArgs) -> Result<(Labelled, Vec<PathBuf>)> {
    let mut inputs = Vec::new();
    let mut files: Vec<(String, PathBuf)> =
        a.scenarios.iter().map(|f| (f.clone(), PathBuf::from(f))).collect();
    if let Some(v) = &a.variants {
        let text =
            std::fs::read_to_string(v).with_context(|| format!("cannot read the variants file {v}"))?;
        inputs.push(PathBuf::from(v));
        for var in parse_variants(&text, v, Path::new(v).parent())? {
            files.push((var.name, var.file));
        }
    }
    let mut out = Vec::with_capacity(files.len());
    for (label, path) in files {
        let shown = path.display().to_string();
        let text =
            std::fs::read_to_string(&path).with_context(|| format!("cannot read the scenario {shown}"))?;
        let s = parse_scenario_file(&text, &shown, path.parent())?;
        inputs.push(path);
        inputs.extend(s.inputs.iter().cloned());
        out.push((label, s));
    }
    Ok((out, inputs))
}

fn render(c: &Comparison, format: CompareFormat) -> Result<String> {
    Ok(match format {
        CompareFormat::Table => table(c, terminal::width()),
        CompareFormat::Csv => csv(c)?,
        CompareFormat::Json => {
            let doc = serde_json::json!({ "schema": "retidose.comparison/1", "comparison": c });
            let mut s = serde_json::to_string_pretty(&doc)?;
            s.push('\n');
            s
        }
    })
}

/// One figure: its label, its unit ("" when none) and one value per column ("absent" where the
/// scenario has no such row).
struct Figure {
    label: String,
    unit: &'static str,
    values: Vec<String>,
}

impl Figure {
    fn per_column(label: &str, unit: &'static str, c: &Comparison, f: impl Fn(&Column) -> String) -> Self {
        Figure { label: label.to_string(), unit, values: c.columns.iter().map(f).collect() }
    }

    fn aligned<T>(label: String, unit: &'static str, row: &Aligned<T>, f: impl Fn(&T) -> String) -> Self {
        let values = row.cells.iter().map(|x| x.as_ref().map_or_else(|| "absent".to_string(), &f)).collect();
        Figure { label, unit, values }
    }
}

/// Every figure of the comparison, in the order the reports show them.
fn figures(c: &Comparison) -> Vec<Figure> {
    let dash = || "—".to_string();
    let mut out = vec![
        Figure::per_column("rank", "", c, |_| String::new()),
        Figure::per_column("scenario", "", c, |col| col.scenario.clone()),
        Figure::per_column("outcome", "", c, outcome),
        Figure::per_column("margin (factor to the limit)", "", c, |col| col.margin.map_or_else(dash, num)),
        Figure::per_column("binding hazard", "", c, |col| {
            col.worst.as_ref().map_or_else(dash, |w| w.hazard.clone())
        }),
        Figure::per_column("worst ratio to limit", "", c, |col| {
            col.worst
                .as_ref()
                .map_or_else(dash, |w| format!("{}{}", if w.lower_bound { "≥ " } else { "" }, num(w.ratio)))
        }),
        Figure::per_column("t_max (binding hazard)", "", c, |col| {
            col.worst.as_ref().map_or_else(dash, |w| t_max_words(&w.t_max, w.lower_bound))
        }),
        Figure::per_column("risk group", "", c, |col| {
            col.risk_group.map_or_else(dash, |(g, lb)| {
                format!("{}{}", g.name(), if lb { " (lower bound)" } else { "" })
            })
        }),
    ];
    for (i, v) in out[0].values.iter_mut().enumerate() {
        *v = (i + 1).to_string();
    }
    for g in &c.groups {
        out.push(Figure::aligned(format!("risk group: {}", g.label), "", g, |x| match (x.group, &x.error) {
            (Some(r), _) => format!("{}{}", r.name(), if x.lower_bound { " (lower bound)" } else { "" }),
            (None, Some(_)) => "not assessed".into(),
            (None, None) => dash(),
        }));
        out.push(Figure::aligned(format!("E_thr: {}", g.label), "lx", g, |x| {
            x.e_thr.map_or_else(dash, |e| num(e.get::<lux>()))
        }));
        out.push(Figure::aligned(format!("threshold distance: {}", g.label), "mm", g, |x| {
            x.threshold_distance.map_or_else(dash, |d| num(d.get::<millimeter>()))
        }));
    }
    for h in &c.hazards {
        out.push(Figure::aligned(format!("ratio: {}", h.label), "", h, |x| x.ratio.map_or_else(dash, num)));
    }
    out.extend(room_and_bleach(c));
    out
}

/// The figures of the rooms' racks and of bleaching.
fn room_and_bleach(c: &Comparison) -> Vec<Figure> {
    let dash = || "—".to_string();
    let mut out = Vec::new();
    for r in &c.racks {
        let n = |f: fn(&retidose::compare::RackCell) -> usize| {
            move |x: &retidose::compare::RackCell| f(x).to_string()
        };
        out.push(Figure::aligned(format!("{}: positions", r.label), "", r, n(|x| x.positions)));
        out.push(Figure::aligned(format!("{}: below range", r.label), "", r, n(|x| x.below)));
        out.push(Figure::aligned(format!("{}: in range", r.label), "", r, |x| {
            x.in_range.map_or_else(dash, |v| v.to_string())
        }));
        out.push(Figure::aligned(format!("{}: above range", r.label), "", r, n(|x| x.above)));
        out.push(Figure::aligned(format!("{}: lever factor", r.label), "", r, |x| {
            x.lever_factor.map_or_else(dash, num)
        }));
    }
    if c.columns.iter().any(|col| col.bleach.is_some()) {
        let absent = || "absent".to_string();
        out.push(Figure::per_column("peak bleached", "%", c, |col| {
            col.bleach.as_ref().map_or_else(absent, |b| num(100.0 * b.peak))
        }));
        out.push(Figure::per_column("recovery to 90 % after the last lights-off", "", c, |col| {
            col.bleach.as_ref().map_or_else(absent, |b| match b.recovery_90 {
                Recovery90::NoLightsOff => "no lights-off".into(),
                Recovery90::NotReached => "not reached".into(),
                Recovery90::After(t) => duration(t.get::<second>()),
            })
        }));
    }
    out
}

fn outcome(col: &Column) -> String {
    match (col.limit_exceeded, col.flag_raised) {
        (false, false) => "within limits, no flag",
        (true, false) => "LIMIT EXCEEDED",
        (false, true) => "FLAG RAISED",
        (true, true) => "LIMIT EXCEEDED, FLAG RAISED",
    }
    .to_string()
}

/// The CSV report: scenario, figure, value, unit (cells quoted where needed, a leading formula
/// character neutralised).
fn csv(c: &Comparison) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["scenario", "figure", "value", "unit"])?;
    for f in figures(c) {
        for (col, v) in c.columns.iter().zip(&f.values) {
            let cells = [col.label.as_str(), f.label.as_str(), v.as_str(), f.unit];
            w.write_record(cells.iter().map(|x| csv_cell(x).into_owned()))?;
        }
    }
    Ok(String::from_utf8(w.into_inner()?)?)
}

/// Most scenario columns in one table; more are split over several tables.
const PER_TABLE: usize = 3;

/// The terminal report: tables of at most three scenarios, one row per figure, fitted to `width`.
fn table(c: &Comparison, width: usize) -> String {
    let figs = figures(c);
    let label_w = figs.iter().map(|f| f.label.chars().count() + f.unit.len() + 3).max().unwrap_or(10).min(36);
    let mut out =
        String::from("retidose compare — ranked by margin (factor to the limit), largest first\n\n");
    for (chunk, cols) in c.columns.chunks(PER_TABLE).enumerate() {
        let first = chunk * PER_TABLE;
        let n = cols.len();
        let value_w = (width.saturating_sub(label_w + 3 * (n + 1) + 1) / n).max(8);
        let mut b = Builder::default();
        let mut head = vec![wrap("figure", label_w)];
        head.extend(cols.iter().map(|col| wrap(&col.label, value_w)));
        b.push_record(head);
        for f in &figs {
            let label = if f.unit.is_empty() { f.label.clone() } else { format!("{} ({})", f.label, f.unit) };
            let mut row = vec![wrap(&label, label_w)];
            row.extend(f.values[first..first + n].iter().map(|v| wrap(v, value_w)));
            b.push_record(row);
        }
        let mut t = b.build();
        t.with(Style::sharp());
        out.push_str(&t.to_string());
        out.push('\n');
    }
    out.push('\n');
    out.push_str(&textwrap::fill(CAUTION, width.min(100)));
    out.push('\n');
    out
}

/// A cell's text made safe for the terminal and wrapped to `width` columns.
fn wrap(text: &str, width: usize) -> String {
    let safe = terminal_line(text);
    let opts = textwrap::Options::new(width.max(1)).break_words(true);
    textwrap::wrap(&safe, opts).join("\n")
}
