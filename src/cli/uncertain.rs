//! `retidose uncertainty`: the Monte Carlo uncertainty (JCGM 101, GUM Supplement 1) of every
//! hazard ratio of one source of a scenario against one limit set.

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::base::quantity::{Length, SiValue};
use retidose::base::units;
use retidose::limits::report::LimitsRequest;
use retidose::uncertainty::{Input, InputUncertainties, MAX_DRAWS, UncertaintyReport, assess_uncertainty};

use super::Output;
use super::render::terminal::{Page, Table, width};
use super::render::{duration, num};

/// Help shown after `retidose uncertainty --help`.
pub const EXAMPLES: &str = "\
Each input is a normal distribution about the scenario's value with the standard uncertainty
given (0 when left out). --reading and --tilt are relative (\"5%\" or 0.05); --tilt is the
spectral calibration error per 100 nm from the photopic centroid of the source spectrum, a
linear tilt (flat beyond 300 nm from it) that keeps the source's luminous quantity. --pupil
enters no corneal limit and is reported with a share of 0. --set and --for default to the
scenario's [limits].
The interval is the probabilistically symmetric 95 % coverage interval (2.5 % and 97.5 %
quantiles of the draws); shares are one-at-a-time variances, normalised to 100 %.
CSV columns: hazard, nominal, mean, standard_uncertainty, low_95, high_95, p_exceed, decision,
share_reading, share_distance, share_size, share_tilt, share_pupil, draws, seed.

Examples:
  retidose assess --example stimulus-review > s.toml
  retidose uncertainty s.toml --source stimulus --set iec62471-2006 --reading 5% \\
      --distance \"5 mm\" --size \"0.5 mm\" --tilt 3%
  retidose uncertainty s.toml --source stimulus --reading 10% --draws 1000000 --seed 7 --format csv";

#[derive(Debug, Args)]
pub struct UncertaintyArgs {
    /// The scenario file (as for `retidose assess`)
    #[arg(value_name = "SCENARIO")]
    scenario: String,
    /// The source id ([[source]] id); may be left out when the scenario has one source
    #[arg(long, value_name = "ID")]
    source: Option<String>,
    /// Limit set id (see `retidose limits list`); default: the first of the scenario's [limits] sets
    #[arg(long, value_name = "SET")]
    set: Option<String>,
    /// Exposure duration, e.g. "8 h"; default: the scenario's [limits] duration
    #[arg(long = "for", value_name = "DURATION")]
    duration: Option<String>,
    /// Relative standard uncertainty of the reading that scales the source, e.g. "5%"
    #[arg(long, value_name = "RELATIVE", default_value = "0", allow_hyphen_values = true)]
    reading: String,
    /// Standard uncertainty of the distance to the eye, e.g. "5 mm"
    #[arg(long, value_name = "LENGTH", default_value = "0 mm", allow_hyphen_values = true)]
    distance: String,
    /// Standard uncertainty of the source size, e.g. "0.5 mm"
    #[arg(long, value_name = "LENGTH", default_value = "0 mm", allow_hyphen_values = true)]
    size: String,
    /// Relative standard uncertainty of the spectral calibration per 100 nm, e.g. "3%"
    #[arg(long, value_name = "RELATIVE", default_value = "0", allow_hyphen_values = true)]
    tilt: String,
    /// Standard uncertainty of the pupil diameter, e.g. "0.3 mm" (enters no corneal limit)
    #[arg(long, value_name = "LENGTH", default_value = "0 mm", allow_hyphen_values = true)]
    pupil: String,
    /// Number of Monte Carlo draws
    #[arg(long, value_name = "N", default_value_t = 100_000)]
    draws: usize,
    /// Seed of the generator (the same seed gives the same output)
    #[arg(long, value_name = "N", default_value_t = 1)]
    seed: u64,
    /// Output format
    #[arg(long, value_enum, default_value_t = UncertaintyFormat::Table)]
    format: UncertaintyFormat,
}

/// The formats of `retidose uncertainty`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum UncertaintyFormat {
    /// A table for the terminal
    Table,
    /// JSON (schema retidose.uncertainty/1)
    Json,
    /// One CSV row per hazard
    Csv,
}

/// Runs `retidose uncertainty`.
pub fn run(a: UncertaintyArgs) -> Result<Output> {
    let super::sweep::Chosen { scenario: s, index, set, duration } =
        super::sweep::choose(&a.scenario, a.source.as_deref(), a.set.as_deref(), a.duration.as_deref())?;
    let limits = s.limits.as_ref();
    if !(1 < a.draws && a.draws <= MAX_DRAWS) {
        bail!("--draws must be 2 to {MAX_DRAWS}, such as 100000, not {}", a.draws);
    }
    let inputs = inputs(&a)?;
    let r = LimitsRequest {
        source: &s.view.sources[index],
        filters: &s.view.filters,
        set,
        duration,
        aphakic: limits.is_some_and(|l| l.aphakic),
        classify: None,
        only: &[],
    };
    let report = assess_uncertainty(&r, &inputs, a.draws, a.seed).map_err(|e| flagged(e.message()))?;
    let text = match a.format {
        UncertaintyFormat::Table => table(&report, &s.source_ids[index]),
        UncertaintyFormat::Csv => csv(&report)?,
        UncertaintyFormat::Json => super::render::json::with_schema("retidose.uncertainty/1", &report)?,
    };
    Ok(Output { text, status: 0 })
}

/// The library's error on an input, with the flag that gave it.
fn flagged(message: &str) -> anyhow::Error {
    let flag = [("reading", "--reading"), ("distance", "--distance"), ("size", "--size"), ("tilt", "--tilt")]
        .iter()
        .find(|(word, _)| {
            message.starts_with(&format!("the {word}"))
                || message.starts_with(&format!("the spectral {word}"))
        })
        .map(|(_, f)| *f);
    match flag {
        Some(f) => anyhow::anyhow!("{f}: {message}"),
        None => anyhow::anyhow!("{message}"),
    }
}

/// The declared uncertainties from the flags.
fn inputs(a: &UncertaintyArgs) -> Result<InputUncertainties> {
    Ok(InputUncertainties {
        reading_relative: relative(&a.reading, "--reading")?,
        distance: length(&a.distance, "--distance")?,
        size: length(&a.size, "--size")?,
        tilt_relative: relative(&a.tilt, "--tilt")?,
        pupil: length(&a.pupil, "--pupil")?,
    })
}

/// A relative uncertainty: "5%" or 0.05, finite and at least 0.
fn relative(text: &str, flag: &str) -> Result<f64> {
    let t = text.trim();
    let (number, scale) = match t.strip_suffix('%') {
        Some(n) => (n.trim(), 0.01),
        None => (t, 1.0),
    };
    let v = number.parse::<f64>().ok().map(|v| v * scale).filter(|v| *v >= 0.0 && v.is_finite());
    v.with_context(|| {
        format!("{flag} takes a relative standard uncertainty of at least 0, such as \"5%\" or 0.05, not \"{text}\"")
    })
}

/// An uncertainty in length: at least 0 m, finite.
fn length(text: &str, flag: &str) -> Result<Length> {
    let d = units::parse_length(text).with_context(|| format!("{flag} takes a length such as \"5 mm\""))?;
    if !(d.si() >= 0.0 && d.si().is_finite()) {
        bail!("{flag} must be a length of at least 0 m, such as \"5 mm\", not \"{text}\"");
    }
    Ok(d)
}

/// A fraction as a percentage with the shared number style; shares below 10⁻¹² (rounding in a
/// variance that is zero in principle) read 0.
fn percent(x: f64) -> String {
    if x.abs() < 1e-12 { "0 %".to_string() } else { format!("{} %", num(100.0 * x)) }
}

/// A length in mm.
fn mm(l: Length) -> String {
    format!("{} mm", num(l.si() * 1e3))
}

/// The report as text for the terminal.
fn table(r: &UncertaintyReport, id: &str) -> String {
    let u = &r.inputs;
    let mut p = Page::new(width(), false);
    p.para(
        &format!(
            "Uncertainty of the hazard ratios: source {id}, {}, ratios for {}",
            r.set_id,
            duration(r.duration.si())
        ),
        "",
    );
    p.para(
        &format!(
            "Inputs (standard uncertainties, normal): reading {}, distance {}, size {}, spectral tilt {} per 100 nm \
             about {} nm, pupil {}",
            percent(u.reading_relative),
            mm(u.distance),
            mm(u.size),
            percent(u.tilt_relative),
            num(r.pivot_nm),
            mm(u.pupil),
        ),
        "",
    );
    p.para(
        &format!(
            "Monte Carlo (JCGM 101): {} draws, seed {}; 95 % intervals probabilistically symmetric",
            r.draws, r.seed
        ),
        "",
    );
    p.blank();
    let mut t = Table::new(&["hazard", "ratio", "mean ± u", "95 % interval", "P(ratio ≥ 1)", "decision"]);
    for h in &r.hazards {
        t.row(vec![
            h.id.clone(),
            num(h.nominal),
            format!("{} ± {}", num(h.mean), num(h.standard_uncertainty)),
            format!("{} – {}", num(h.interval.0), num(h.interval.1)),
            percent(h.exceedance_probability),
            h.decision.text().to_string(),
        ]);
    }
    p.table(&t);
    shares_table(&mut p, r);
    for (id, why) in &r.not_sampled {
        p.para(&format!("not sampled: {id}: {why}"), "");
    }
    for h in r.hazards.iter().filter(|h| h.inapplicable_draws > 0) {
        p.para(
            &format!(
                "{}: its condition of application fails in {} of {} draws (kept in the distribution)",
                h.id, h.inapplicable_draws, r.draws
            ),
            "",
        );
    }
    p.para("The pupil enters no corneal irradiance or radiance limit; a retinal irradiance would carry 2·u(p)/p from it.", "");
    p.finish()
}

/// Each input's share of the variance per hazard.
fn shares_table(p: &mut Page, r: &UncertaintyReport) {
    let mut header = vec!["hazard".to_string()];
    header.extend(Input::ALL.iter().map(|i| i.name().to_string()));
    header.push("Σ one-at-a-time ÷ variance".into());
    let mut t = Table::new(&header);
    for h in &r.hazards {
        let mut row = vec![h.id.clone()];
        row.extend(h.shares.iter().map(|(_, s)| percent(*s)));
        row.push(num(h.one_at_a_time_sum));
        t.row(row);
    }
    p.blank();
    p.para("Share of the variance (one input at a time, the others at their values; normalised):", "");
    p.table(&t);
}

/// One CSV row per hazard.
fn csv(r: &UncertaintyReport) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header =
        vec!["hazard", "nominal", "mean", "standard_uncertainty", "low_95", "high_95", "p_exceed"];
    header.extend(["decision", "share_reading", "share_distance", "share_size", "share_tilt", "share_pupil"]);
    header.extend(["draws", "seed"]);
    w.write_record(&header)?;
    let real = |v: f64| ryu::Buffer::new().format(v).to_string();
    for h in &r.hazards {
        let mut row = vec![h.id.clone(), real(h.nominal), real(h.mean), real(h.standard_uncertainty)];
        row.extend([real(h.interval.0), real(h.interval.1), real(h.exceedance_probability)]);
        row.push(h.decision.text().to_string());
        row.extend(h.shares.iter().map(|(_, s)| real(*s)));
        row.extend([r.draws.to_string(), r.seed.to_string()]);
        w.write_record(&row)?;
    }
    Ok(String::from_utf8(w.into_inner()?)?)
}
