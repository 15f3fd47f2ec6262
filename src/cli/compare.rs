//! `retidose compare`: several scenario files, or the variants a variants file lists, assessed
//! and shown side by side (see [`retidose::compare`]).

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::assess::{Assessment, assess};
use retidose::compare::{Comparison, compare, parse_variants};
use retidose::scenario::file::Scenario;
use retidose::scenario::variant::parse_with_variants;
use tabled::builder::Builder;
use tabled::settings::Style;

use super::Output;
use super::output::{AtomicFile, check_target};
use super::render::compare_doc::{self, figures};
use super::render::escape::{csv_cell, terminal_line};
use super::render::{CAUTION, terminal};

/// Help shown after `retidose compare --help`.
pub const EXAMPLES: &str = "\
Examples:
  retidose compare --example > lamp-variants.toml
  retidose compare lamp-variants.toml --format markdown
  retidose compare lamp-a.toml lamp-b.toml
  retidose compare room.toml --format html -o room-variants.html
  retidose compare --variants variants.toml --format csv

A scenario file can hold its own variants, each a name and the changes to the base scenario;
`compare FILE` compares the base and every variant:
  [[variant]]
  name = \"dimmed to 60 %\"
  [[variant.source]]
  id = \"panels\"          # sources, luminaires, racks by id; filters, steps, events by name
  scale = 0.6             # multiplies its level (illuminance, intensity, lux…)
  [[variant]]
  name = \"lamp at 1 m, with a diffuser\"
  [[variant.source]]
  id = \"lamp\"
  distance = \"1 m\"       # replaces the key
  [[variant.filter]]
  name = \"opal diffuser\"
  add = true              # a new entry (remove = true drops one)
  transmittance = \"0.5\"

A variants file lists whole scenario files instead, each under a name, paths relative to it:
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

/// The scenario `--example` prints: a lamp and four variants of it.
const EXAMPLE: &str = include_str!("../demo/lamp_variants.toml");

#[derive(Debug, Args)]
pub struct CompareArgs {
    /// Scenario files to compare (at least two, or one with [[variant]] tables, or --variants)
    #[arg(value_name = "SCENARIO", required_unless_present_any = ["variants", "example"])]
    scenarios: Vec<String>,
    /// Print an example scenario with variants to start from
    #[arg(long, conflicts_with_all = ["scenarios", "variants"])]
    example: bool,
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
    /// Markdown: the ranking, then every figure side by side
    Markdown,
    /// One self-contained HTML file, with a figure of the margins
    Html,
}

/// Runs `retidose compare`.
pub fn run(a: CompareArgs) -> Result<Output> {
    if a.example {
        return Ok(Output { text: EXAMPLE.to_string(), status: 0 });
    }
    let (named, inputs) = load(&a)?;
    if named.len() < 2 {
        bail!(
            "compare needs at least two scenarios; give two files, a scenario file with [[variant]] tables, or a variants file with two variants"
        );
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

/// The scenarios with their labels, and every input file read. A scenario file with
/// `[[variant]]` tables gives its base and each variant; alone, the base is labelled by the
/// scenario's name ("base" when a variant has that name) and each variant by its name, and with
/// other files every label starts with the file's.
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
    let alone = files.len() == 1;
    let mut out = Vec::with_capacity(files.len());
    for (label, path) in files {
        let shown = path.display().to_string();
        let text =
            std::fs::read_to_string(&path).with_context(|| format!("cannot read the scenario {shown}"))?;
        let (base, variants) = parse_with_variants(&text, &shown, path.parent())?;
        inputs.push(path);
        inputs.extend(base.inputs.iter().cloned());
        let base_label = match (alone, variants.is_empty()) {
            (true, false) if variants.iter().any(|v| v.name == base.name) => "base".to_string(),
            (true, false) => base.name.clone(),
            _ => label.clone(),
        };
        out.push((base_label, base));
        for v in variants {
            inputs.extend(v.scenario.inputs.iter().cloned());
            let l = if alone { v.name } else { format!("{label}: {}", v.name) };
            out.push((l, v.scenario));
        }
    }
    Ok((out, inputs))
}

fn render(c: &Comparison, format: CompareFormat) -> Result<String> {
    Ok(match format {
        CompareFormat::Table => table(c, terminal::width()),
        CompareFormat::Csv => csv(c)?,
        CompareFormat::Markdown => compare_doc::markdown(c),
        CompareFormat::Html => compare_doc::html(c),
        CompareFormat::Json => {
            let doc = serde_json::json!({ "schema": "retidose.comparison/1", "comparison": c });
            let mut s = serde_json::to_string_pretty(&doc)?;
            s.push('\n');
            s
        }
    })
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
    out.push_str(&super::render::caution_block(c.cautions.iter().map(String::as_str), width));
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
