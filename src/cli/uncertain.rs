//! `retidose uncertainty`: the Monte Carlo uncertainty (JCGM 101, GUM Supplement 1) of every
//! hazard ratio of one source of a scenario against one limit set.

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::base::quantity::{Length, SiValue};
use retidose::base::units;
use retidose::limits::report::LimitsRequest;
use retidose::uncertainty::figures::Summary;
use retidose::uncertainty::meter::{MeterClass, ReadingUncertainty};
use retidose::uncertainty::{
    BLEACH_DRAWS, FigureUncertainty, FiguresReport, FiguresRequest, Input, InputUncertainties,
    MAX_BLEACH_DRAWS, MAX_DRAWS, UncertaintyReport, assess_figures_with_age, assess_uncertainty,
};

use super::Output;
use super::render::terminal::{Page, Table, width};
use super::render::{duration, num};

/// Help shown after `retidose uncertainty --help`.
pub const EXAMPLES: &str = "\
Each input is a normal distribution about the scenario's value with the standard uncertainty
given (0 when left out). --reading and --tilt are relative (\"5%\" or 0.05); --tilt is the
spectral calibration error per 100 nm from the photopic centroid of the source spectrum, a
linear tilt (flat beyond 300 nm from it) that keeps the source's luminous quantity. --pupil
enters no corneal limit and is reported with a share of 0. --reading-class L|A|B|C takes the
meter class's total error limit of DIN 5032-7 (L 3 %, A 5 %, B 10 %, C 20 %) as the half-width
of a rectangular distribution, u = a/√3; with --reading too, the larger u is used. --age is the
standard uncertainty of a human subject's age (retina figures, through the ocular media; no
limit ratio depends on it). --set and --for default to the scenario's [limits].
The interval is the probabilistically symmetric 95 % coverage interval (2.5 % and 97.5 %
quantiles of the draws); shares are one-at-a-time variances, normalised to 100 %.
CSV columns (--figures limits): hazard, nominal, mean, standard_uncertainty, low_95, high_95,
p_exceed, decision, share_reading, share_distance, share_size, share_tilt, share_pupil, draws,
seed. With retina or bleach figures, one row per figure and input: section, figure, unit,
nominal, mean, standard_uncertainty, low_95, high_95, input, share, draws, seed.
--figures retina and bleach also draw every from-memory eye and pigment parameter from the
default range in its data file (--declared-only leaves them out); human scenarios also get the
recommended rod R*/rod/s with its spread between the routes.

Examples:
  retidose assess --example stimulus-review > s.toml
  retidose uncertainty s.toml --source stimulus --set iec62471-2006 --reading 5% \\
      --distance \"5 mm\" --size \"0.5 mm\" --tilt 3%
  retidose uncertainty s.toml --source stimulus --reading 10% --draws 1000000 --seed 7 --format csv
  retidose assess --example dark-adaptation > d.toml
  retidose uncertainty d.toml --figures retina --reading 5% --pupil \"0.3 mm\"";

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
    /// Meter class of the reading (DIN 5032-7: L, A, B or C): its total error limit a as a
    /// rectangular half-width, u = a/√3; with --reading the larger u is used
    #[arg(long, value_name = "CLASS")]
    reading_class: Option<String>,
    /// Standard uncertainty of a human subject's age, e.g. "5 y" (retina figures only)
    #[arg(long, value_name = "TIME", allow_hyphen_values = true)]
    age: Option<String>,
    /// Number of Monte Carlo draws
    #[arg(long, value_name = "N", default_value_t = 100_000)]
    draws: usize,
    /// Seed of the generator (the same seed gives the same output)
    #[arg(long, value_name = "N", default_value_t = 1)]
    seed: u64,
    /// Which figures: limits, retina, bleach or all (default: what the scenario has)
    #[arg(long, value_enum, value_name = "WHICH")]
    figures: Option<Which>,
    /// Leave the from-memory parameters at their values (draw only the declared inputs)
    #[arg(long)]
    declared_only: bool,
    /// Number of Monte Carlo draws of the bleach figures (2 to 100 000; each runs the schedule once per varied input)
    #[arg(long, value_name = "N", default_value_t = BLEACH_DRAWS)]
    bleach_draws: usize,
    /// Output format
    #[arg(long, value_enum, default_value_t = UncertaintyFormat::Table)]
    format: UncertaintyFormat,
}

/// The figures `retidose uncertainty` can give.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Which {
    /// The limit ratios
    Limits,
    /// Trolands, rod R*/rod/s and melanopic EDI of the source
    Retina,
    /// Peak bleached fraction and time to 90 % regenerated of the schedule
    Bleach,
    /// Every figure
    All,
}

/// The whole output: the limit ratios and the figures (JSON schema retidose.uncertainty/2).
/// The limit ratios' fields stay at the top level, as in retidose.uncertainty/1.
#[derive(Debug, serde::Serialize)]
struct Both {
    #[serde(flatten)]
    limits: Option<UncertaintyReport>,
    /// How the reading's uncertainty was settled from a meter class, when one was given.
    #[serde(skip_serializing_if = "Option::is_none")]
    reading_class: Option<ReadingUncertainty>,
    figures: Option<FiguresReport>,
    /// Figures the scenario has that could not be sampled, with the reason.
    skipped: Vec<String>,
}

/// The formats of `retidose uncertainty`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum UncertaintyFormat {
    /// A table for the terminal
    Table,
    /// JSON (schema retidose.uncertainty/2)
    Json,
    /// One CSV row per hazard
    Csv,
}

/// Runs `retidose uncertainty`.
pub fn run(a: UncertaintyArgs) -> Result<Output> {
    let text = std::fs::read_to_string(&a.scenario)
        .with_context(|| format!("cannot read the scenario {}", a.scenario))?;
    let s = retidose::assess::parse_scenario_file(
        &text,
        &a.scenario,
        std::path::Path::new(&a.scenario).parent(),
    )?;
    let index = super::sweep::source_index(&s, a.source.as_deref())?;
    if !(1 < a.draws && a.draws <= MAX_DRAWS) {
        bail!("--draws must be 2 to {MAX_DRAWS}, such as 100000, not {}", a.draws);
    }
    if !(1 < a.bleach_draws && a.bleach_draws <= MAX_BLEACH_DRAWS) {
        bail!("--bleach-draws must be 2 to {MAX_BLEACH_DRAWS}, such as 10000, not {}", a.bleach_draws);
    }
    let (inputs, reading) = inputs(&a)?;
    let age = a.age.as_deref().map(age).transpose()?;
    let explicit = a.figures.is_some();
    let which = a.figures.unwrap_or(Which::All);
    let wants = |w: Which| which == w || which == Which::All;
    let reading_class = reading.class.is_some().then_some(reading);
    let mut both = Both { limits: None, reading_class, figures: None, skipped: Vec::new() };
    // Unless asked for by name, figures the source cannot give are skipped with the reason; a
    // bad flag is always an error.
    let mut fail = |what: &str, e: anyhow::Error| -> Result<()> {
        let text = format!("{e:#}");
        if (explicit && which != Which::All)
            || !(text.starts_with("the source") || text.starts_with("the chosen source"))
        {
            return Err(e);
        }
        both.skipped.push(format!("{what}: {text}"));
        Ok(())
    };
    if wants(Which::Limits) && (explicit || s.limits.is_some()) {
        match limits(&a, &inputs) {
            Ok(r) => both.limits = Some(r),
            Err(e) => fail("limit ratios", e)?,
        }
    }
    let retina = wants(Which::Retina);
    let bleach = wants(Which::Bleach) && (explicit || s.schedule.is_some());
    if retina || bleach {
        let req = FiguresRequest {
            scenario: &s,
            index,
            inputs: &inputs,
            parameters: !a.declared_only,
            retina_draws: retina.then_some(a.draws),
            bleach_draws: bleach.then_some(a.bleach_draws),
            seed: a.seed,
        };
        match assess_figures_with_age(&req, age) {
            Ok(f) => both.figures = Some(f),
            Err(e) => fail("retina and bleach figures", flagged(e.message()))?,
        }
    }
    if both.limits.is_none() && both.figures.is_none() {
        bail!("nothing to sample: {}", both.skipped.join("; "));
    }
    let id = &s.source_ids[index];
    let text = match (a.format, &both) {
        (UncertaintyFormat::Table, b) => {
            let class = b.reading_class.as_ref().and_then(ReadingUncertainty::text);
            let mut t =
                b.limits.as_ref().map(|r| table(r, id, class.as_deref(), age.is_some())).unwrap_or_default();
            if let Some(f) = &b.figures {
                t.push_str(&figures_table(f, id, &inputs, class.as_deref()));
            }
            for n in &b.skipped {
                t.push_str(&format!("not sampled: {n}\n"));
            }
            // The scenario's own cautions, and the human-limits one whenever limit ratios were sampled.
            let mut cautions = retidose::assess::cautions(&s);
            let limits = retidose::limits::report::LIMITS_CAUTION;
            if b.limits.is_some() && !cautions.iter().any(|c| c == limits) {
                cautions.insert(0, limits.to_string());
            }
            let block = super::render::caution_block(
                cautions.iter().map(String::as_str),
                super::render::terminal::width(),
            );
            t + "\n" + &block
        }
        (UncertaintyFormat::Csv, Both { limits: Some(r), figures: None, .. }) => csv(r)?,
        (UncertaintyFormat::Csv, b) => long_csv(b, a.seed)?,
        (UncertaintyFormat::Json, b) => super::render::json::with_schema("retidose.uncertainty/2", b)?,
    };
    Ok(Output { text, status: 0 })
}

/// The limit ratios' Monte Carlo, with the set and duration settled as for `retidose sweep`.
fn limits(a: &UncertaintyArgs, inputs: &InputUncertainties) -> Result<UncertaintyReport> {
    let super::sweep::Chosen { scenario: s, index, set, duration } =
        super::sweep::choose(&a.scenario, a.source.as_deref(), a.set.as_deref(), a.duration.as_deref())?;
    let r = LimitsRequest {
        source: &s.view.sources[index],
        filters: &s.view.filters,
        set,
        duration,
        aphakic: s.limits.as_ref().is_some_and(|l| l.aphakic),
        classify: None,
        only: &[],
    };
    assess_uncertainty(&r, inputs, a.draws, a.seed).map_err(|e| flagged(e.message()))
}

/// The library's error on an input, with the flag that gave it.
fn flagged(message: &str) -> anyhow::Error {
    let flag = [
        ("reading", "--reading"),
        ("distance", "--distance"),
        ("size", "--size"),
        ("tilt", "--tilt"),
        ("age", "--age"),
    ]
    .iter()
    .find(|(word, _)| {
        message.starts_with(&format!("the {word}")) || message.starts_with(&format!("the spectral {word}"))
    })
    .map(|(_, f)| *f);
    match flag {
        Some(f) => anyhow::anyhow!("{f}: {message}"),
        None => anyhow::anyhow!("{message}"),
    }
}

/// The declared uncertainties from the flags, and how the reading's was settled.
fn inputs(a: &UncertaintyArgs) -> Result<(InputUncertainties, ReadingUncertainty)> {
    let class = a
        .reading_class
        .as_deref()
        .map(MeterClass::parse)
        .transpose()
        .map_err(|e| anyhow::anyhow!("--reading-class: {}", e.message()))?;
    let reading = ReadingUncertainty::settle(relative(&a.reading, "--reading")?, class)?;
    let u = InputUncertainties {
        reading_relative: reading.relative,
        distance: length(&a.distance, "--distance")?,
        size: length(&a.size, "--size")?,
        tilt_relative: relative(&a.tilt, "--tilt")?,
        pupil: length(&a.pupil, "--pupil")?,
    };
    Ok((u, reading))
}

/// The standard uncertainty of the subject's age: a time such as "5 y".
fn age(text: &str) -> Result<retidose::base::quantity::Time> {
    units::parse_time(text).with_context(|| format!("--age takes a time such as \"5 y\", not \"{text}\""))
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
fn table(r: &UncertaintyReport, id: &str, class: Option<&str>, age: bool) -> String {
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
    if let Some(c) = class {
        p.para(c, "  ");
    }
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
    if age {
        p.para("The subject's age enters no corneal limit (the ocular media lie behind the cornea); it enters the retina figures.", "");
    }
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

/// A figure's value with its unit.
fn with_unit(v: f64, unit: &str) -> String {
    if unit.is_empty() { num(v) } else { format!("{} {unit}", num(v)) }
}

/// A figure's value, or "not reached".
fn maybe(v: Option<f64>, unit: &str) -> String {
    v.map_or("not reached".into(), |v| with_unit(v, unit))
}

/// The retina and bleach figures as text for the terminal.
fn figures_table(f: &FiguresReport, id: &str, u: &InputUncertainties, class: Option<&str>) -> String {
    let mut p = Page::new(width(), false);
    p.para(&format!("Uncertainty of the retina, bleach and room figures: source {id}"), "");
    p.para(
        &format!(
            "Declared (standard uncertainties, normal): reading {}, distance {}, size {}, spectral tilt {} per 100 nm, \
             pupil {}; from-memory parameters {}",
            percent(u.reading_relative),
            mm(u.distance),
            mm(u.size),
            percent(u.tilt_relative),
            mm(u.pupil),
            if f.parameters { "drawn from their default ranges (--declared-only leaves them out)" } else { "at their values" }
        ),
        "",
    );
    if let Some(c) = class {
        p.para(c, "  ");
    }
    p.para(
        &format!(
            "Monte Carlo (JCGM 101): {} draws of the retina figures, {} of the bleach figures",
            f.retina_draws, f.bleach_draws
        ),
        "",
    );
    for (title, list) in [("retina", &f.retina), ("bleach", &f.bleach), ("room (reading only)", &f.room)] {
        if list.is_empty() {
            continue;
        }
        p.blank();
        let mut t = Table::new(&[title, "value", "mean ± u", "95 % interval", "largest shares"]);
        for x in list.iter() {
            t.row(figure_row(x));
        }
        p.table(&t);
    }
    if let Some(r) = &f.rod_rate {
        rod_rate_lines(&mut p, r);
    }
    p.blank();
    p.para("Inputs drawn:", "");
    for i in &f.inputs {
        p.para(&format!("{}: {}", i.input.text(), i.basis), "  ");
    }
    for n in &f.notes {
        p.para(n, "  ");
    }
    p.finish()
}

/// One figure's table row.
fn figure_row(x: &FigureUncertainty) -> Vec<String> {
    let s: &Summary = &x.summary;
    let mut shares: Vec<_> = s.shares.iter().filter(|(_, v)| *v >= 0.005).collect();
    shares.sort_by(|a, b| b.1.total_cmp(&a.1));
    let top: Vec<String> =
        shares.iter().take(3).map(|(i, v)| format!("{} {}", i.text(), percent(*v))).collect();
    vec![
        x.figure.name(),
        with_unit(s.nominal, x.unit),
        match (s.mean, s.standard_uncertainty) {
            (Some(m), Some(u)) => format!("{} ± {}", num(m), with_unit(u, x.unit)),
            _ => format!("{} of the draws not reached", s.unreached_draws),
        },
        format!("{} – {}", maybe(s.interval.0, x.unit), maybe(s.interval.1, x.unit)),
        if top.is_empty() { "—".into() } else { top.join(", ") },
    ]
}

/// The recommended human rod rate and its routes.
fn rod_rate_lines(p: &mut Page, r: &retidose::uncertainty::routes::RodRateRecommendation) {
    p.blank();
    p.para(&format!("Human rod R*/rod/s of {} ({} scot td), by route:", r.source, num(r.scotopic_td)), "");
    for x in &r.routes {
        let how = x
            .factor
            .map_or("spectral route".to_string(), |k| format!("{} per scot td ({})", num(k), x.source));
        p.para(&format!("{how}: {} R*/rod/s", num(x.rate.si())), "  ");
    }
    p.para(
        &format!(
            "recommended {} R*/rod/s, 95 % interval {} – {} (√(lowest × highest route); the routes' span read as a \
             rectangular distribution in log); for a bleach or exposure estimate use the highest route, {} R*/rod/s \
             (safe side)",
            num(r.recommended.si()),
            num(r.interval.0.si()),
            num(r.interval.1.si()),
            num(r.safe_side.si())
        ),
        "  ",
    );
}

/// Every figure (and hazard) as long CSV: one row per figure and input.
fn long_csv(b: &Both, seed: u64) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record([
        "section",
        "figure",
        "unit",
        "nominal",
        "mean",
        "standard_uncertainty",
        "low_95",
        "high_95",
        "input",
        "share",
        "draws",
        "seed",
    ])?;
    let real = |v: f64| ryu::Buffer::new().format(v).to_string();
    let opt = |v: Option<f64>| v.map_or(String::new(), real);
    if let Some(r) = &b.limits {
        for h in &r.hazards {
            for (i, sh) in &h.shares {
                w.write_record([
                    "limits".into(),
                    h.id.clone(),
                    "ratio".into(),
                    real(h.nominal),
                    real(h.mean),
                    real(h.standard_uncertainty),
                    real(h.interval.0),
                    real(h.interval.1),
                    i.name().into(),
                    real(*sh),
                    r.draws.to_string(),
                    seed.to_string(),
                ])?;
            }
        }
    }
    if let Some(f) = &b.figures {
        let sections = [
            ("retina", &f.retina, f.retina_draws),
            ("bleach", &f.bleach, f.bleach_draws),
            ("room", &f.room, f.retina_draws),
        ];
        for (section, list, n) in sections {
            for x in list {
                let s = &x.summary;
                for (i, sh) in &s.shares {
                    w.write_record([
                        section.into(),
                        x.figure.name(),
                        x.unit.into(),
                        real(s.nominal),
                        opt(s.mean),
                        opt(s.standard_uncertainty),
                        opt(s.interval.0),
                        opt(s.interval.1),
                        i.text().into(),
                        real(*sh),
                        n.to_string(),
                        seed.to_string(),
                    ])?;
                }
            }
        }
    }
    Ok(String::from_utf8(w.into_inner()?)?)
}
