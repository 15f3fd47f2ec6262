//! `retidose sweep`: one source of a scenario moved along its axis (t_max of every hazard and
//! the risk group at each distance, or with `--solve` the nearest distance within each limit and
//! each risk group), or with the source as placed, every hazard against the exposure duration,
//! a factor on its level or a neutral filter's transmittance; for a scenario with a [room],
//! `--over level` counts every rack's positions in range against a factor on every luminaire.

use std::path::Path;

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::assess::parse_scenario_file;
use retidose::base::quantity::{Length, Ratio, SiValue, Time};
use retidose::base::units;
use retidose::housing::lever::{RackDimming, dimming};
use retidose::limits::report::LimitsRequest;
use retidose::limits::sweep::{
    DistancePoint, GroupAt, HazardPoint, Longest, MAX_POINTS, MaxDuration, Nearest, NearestDistances,
    SCAN_POINTS, log_distances, log_durations, log_factors, solve_longest_duration, solve_nearest_distance,
    sweep_distance, sweep_duration, sweep_level, sweep_transmittance,
};
use retidose::limits::{LimitSet, Verdict, find_set};
use retidose::scenario::file::Scenario;

use super::Output;
use super::render::caution_block;
use super::render::terminal::{Page, Table, width};
use super::render::{duration, num};
use retidose::assess::{ANIMAL_CAUTION, GENERAL_CAUTION};
use retidose::limits::report::LIMITS_CAUTION;

/// Help shown after `retidose sweep --help`.
pub const EXAMPLES: &str = "\
--over distance (the default): the source is moved along its axis (facing the eye) as the IEC 62471
classification moves it: a small source by the inverse-square law, an extended one at constant
radiance. --over duration, level or transmittance keep the source where it is placed and vary the
exposure duration, a factor on the source's light, or a neutral filter in front of the eye
(transmittance T gives the numbers of level T). On a scenario with a [room], --over level without
--source counts every rack's positions in the guidance range with every luminaire scaled.
--set, --for and the classification default to the scenario's [limits].
--from/--to take lengths (distance, default 50 mm to 5 m), durations (default 0.25 s to 8 h) or
plain factors (level 0.1 to 10, transmittance 0.01 to 1); points are log-spaced.
CSV columns: the swept quantity (distance_m, duration_s, level_factor or transmittance), hazard,
ratio, lower_bound, t_max_s, verdict (one row per point and hazard, and one per point with hazard =
risk-group and the group as verdict); t_max_s is empty when the limit is not reached within the
set's range, already exceeded, or not assessed. For a room: level_factor, rack, positions, below,
in_range, above.

Examples:
  retidose assess --example stimulus-review > s.toml
  retidose sweep s.toml --source stimulus --set iec62471-2006 --from \"50 mm\" --to \"5 m\" --points 100
  retidose sweep s.toml --source stimulus --format csv > sweep.csv
  retidose sweep s.toml --source stimulus --solve
  retidose sweep s.toml --over duration --from \"1 s\" --to \"8 h\" --format svg > ratio.svg
  retidose sweep s.toml --over transmittance --from 0.01 --to 1
  retidose assess --example vivarium > room.toml
  retidose sweep room.toml --over level --from 0.1 --to 10 --format svg > dimming.svg";

#[derive(Debug, Args)]
pub struct SweepArgs {
    /// The scenario file (as for `retidose assess`)
    #[arg(value_name = "SCENARIO")]
    scenario: String,
    /// The source id ([[source]] id); may be left out when the scenario has one source
    #[arg(long, value_name = "ID")]
    source: Option<String>,
    /// What to vary
    #[arg(long, value_enum, default_value_t = Over::Distance)]
    over: Over,
    /// Limit set id (see `retidose limits list`); default: the first of the scenario's [limits] sets
    #[arg(long, value_name = "SET")]
    set: Option<String>,
    /// Exposure duration, e.g. "8 h"; default: the scenario's [limits] duration
    #[arg(long = "for", value_name = "DURATION")]
    duration: Option<String>,
    /// Start of the sweep (or of the bracket searched by --solve): a length, a duration or a
    /// factor, as --over asks; default per --over (see below)
    #[arg(long, value_name = "VALUE", allow_hyphen_values = true)]
    from: Option<String>,
    /// End of the sweep
    #[arg(long, value_name = "VALUE", allow_hyphen_values = true)]
    to: Option<String>,
    /// Number of points, evenly spaced in log (1 to 100 000; at most 10 000 for --over level or transmittance)
    #[arg(long, value_name = "N", default_value_t = 100)]
    points: usize,
    /// Print the nearest distance within each limit and each risk group instead of the sweep
    #[arg(long)]
    solve: bool,
    /// Output format
    #[arg(long, value_enum, default_value_t = SweepFormat::Table)]
    format: SweepFormat,
}

/// What `retidose sweep` varies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Over {
    /// The distance from the source to the eye (lengths)
    Distance,
    /// The exposure duration (durations)
    Duration,
    /// A factor on the source's light, or on every luminaire of a [room] (plain numbers)
    Level,
    /// A neutral filter in front of the eye (plain numbers, above 0 and at most 1)
    Transmittance,
}

impl Over {
    /// The default range, as the flags would give it.
    fn default_range(self) -> (&'static str, &'static str) {
        match self {
            Over::Distance => ("50 mm", "5 m"),
            Over::Duration => ("0.25 s", "8 h"),
            Over::Level => ("0.1", "10"),
            Over::Transmittance => ("0.01", "1"),
        }
    }

    /// A valid pair of flags, for error messages.
    fn example(self) -> &'static str {
        match self {
            Over::Distance => "--from \"50 mm\" --to \"5 m\"",
            Over::Duration => "--from \"0.25 s\" --to \"8 h\"",
            Over::Level => "--from 0.1 --to 10",
            Over::Transmittance => "--from 0.01 --to 1",
        }
    }

    /// The CSV column of the swept quantity, with its unit.
    fn column(self) -> &'static str {
        match self {
            Over::Distance => "distance_m",
            Over::Duration => "duration_s",
            Over::Level => "level_factor",
            Over::Transmittance => "transmittance",
        }
    }

    /// The value of `flag` in SI units (m, s, or a plain factor), checked for this kind.
    fn parse(self, text: &str, flag: &str) -> Result<f64> {
        let value = match self {
            Over::Distance => return length(text, flag).map(|d| d.si()),
            Over::Duration => units::parse_time(text)
                .with_context(|| format!("{flag} takes a duration such as \"8 h\""))?
                .si(),
            Over::Level | Over::Transmittance => units::parse_number(text)
                .with_context(|| format!("{flag} takes a plain factor such as {}", self.default_range().0))?,
        };
        let top = if self == Over::Transmittance { 1.0 } else { f64::INFINITY };
        if !(value > 0.0 && value <= top && value.is_finite()) {
            let what = match self {
                Over::Duration => "a duration above 0 s, such as \"8 h\"",
                Over::Transmittance => "a transmittance above 0 and at most 1, such as 0.1",
                _ => "a factor above 0, such as 0.5",
            };
            bail!("{flag} must be {what}, not \"{text}\"");
        }
        Ok(value)
    }

    /// A swept value in a table cell.
    fn cell(self, x: f64) -> String {
        match self {
            Over::Distance => distance_text(Length::from_si(x)),
            Over::Duration => duration(x),
            Over::Level => format!("×{}", num(x)),
            Over::Transmittance => num(x),
        }
    }
}

/// The formats of `retidose sweep`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SweepFormat {
    /// A table for the terminal
    Table,
    /// JSON (schema retidose.sweep/1, with `over`; with --solve, retidose.solve/1)
    Json,
    /// Tidy long CSV rows
    Csv,
    /// An SVG figure: t_max against distance, the ratio against duration, level or
    /// transmittance, or a room's positions in range against the dimming factor
    Svg,
}

/// What the flags and the scenario settle.
struct Settled {
    scenario: Scenario,
    index: usize,
    set: &'static LimitSet,
    duration: Time,
    classify: Option<bool>,
    aphakic: bool,
    /// The values swept, in SI units (m, s or a factor).
    grid: Vec<f64>,
}

/// Runs `retidose sweep`.
pub fn run(a: SweepArgs) -> Result<Output> {
    if a.solve && a.over != Over::Distance {
        bail!("--solve finds the nearest distances; use it with --over distance (the default)");
    }
    let scenario = read(&a.scenario)?;
    if a.over == Over::Level && a.source.is_none() && scenario.room.is_some() {
        return room_run(&a, scenario);
    }
    let s = settle(&a, scenario)?;
    let r = LimitsRequest {
        source: &s.scenario.view.sources[s.index],
        filters: &s.scenario.view.filters,
        set: s.set,
        duration: s.duration,
        aphakic: s.aphakic,
        classify: s.classify,
        only: &[],
    };
    let id = &s.scenario.source_ids[s.index];
    let text = if a.solve {
        solve(&a, &r, &s, id)?
    } else if a.over == Over::Distance {
        let distances: Vec<Length> = s.grid.iter().map(|&d| Length::from_si(d)).collect();
        let points = sweep_distance(&r, &distances)?;
        match a.format {
            SweepFormat::Table => sweep_table(&points, id, s.set, s.duration),
            SweepFormat::Csv => sweep_csv(Over::Distance, &rows(&points))?,
            SweepFormat::Json => super::render::json::with_schema(
                "retidose.sweep/1",
                &serde_json::json!({ "over": Over::Distance, "source": id, "set": s.set.id,
                    "duration": s.duration, "points": points }),
            )?,
            SweepFormat::Svg => distance_svg(&points, &r, id)?,
        }
    } else {
        placed(&a, &r, &s, id)?
    };
    Ok(Output { text: with_cautions(text, a.format, &[LIMITS_CAUTION, GENERAL_CAUTION]), status: 0 })
}

/// A table with the cautions that apply under it (the other formats carry figures only).
fn with_cautions(text: String, format: SweepFormat, cautions: &[&str]) -> String {
    if format == SweepFormat::Table {
        text + "\n" + &caution_block(cautions.iter().copied(), width())
    } else {
        text
    }
}

/// `--solve`: the nearest distances, and the longest exposure at the placed distance.
fn solve(a: &SweepArgs, r: &LimitsRequest<'_>, s: &Settled, id: &str) -> Result<String> {
    if matches!(a.format, SweepFormat::Csv | SweepFormat::Svg) {
        bail!(
            "--solve prints a table or JSON; leave out --format (or drop --solve for the CSV or SVG sweep)"
        );
    }
    let (near, far) = (Length::from_si(s.grid[0]), Length::from_si(s.grid[s.grid.len() - 1]));
    let n = solve_nearest_distance(r, near, far)?;
    let placed = r.source.distance.map(|d| (d, solve_longest_duration(r))).map(|(d, l)| l.map(|l| (d, l)));
    let placed = placed.transpose()?;
    if a.format == SweepFormat::Json {
        #[derive(serde::Serialize)]
        struct Solved<'a> {
            source: &'a str,
            nearest: &'a retidose::limits::sweep::NearestDistances,
            longest_at_placed_distance: Option<&'a retidose::limits::sweep::LongestDuration>,
        }
        let doc =
            Solved { source: id, nearest: &n, longest_at_placed_distance: placed.as_ref().map(|p| &p.1) };
        return super::render::json::with_schema("retidose.solve/1", &doc);
    }
    Ok(solve_table(&n, id, s.set, placed))
}

/// One point of any limits sweep, for the renderers: the swept value in SI units, the hazards
/// and the risk group.
struct Row<'a> {
    x: f64,
    hazards: &'a [HazardPoint],
    group: Option<GroupAt>,
}

/// The distance sweep's points as rows.
fn rows(points: &[DistancePoint]) -> Vec<Row<'_>> {
    points.iter().map(|p| Row { x: p.distance.si(), hazards: &p.hazards, group: p.risk_group }).collect()
}

/// A point's swept value, hazards and risk group, owned.
type Owned = (f64, Vec<HazardPoint>, Option<GroupAt>);

/// `--over duration | level | transmittance`: the sweep with the source as placed.
fn placed(a: &SweepArgs, r: &LimitsRequest<'_>, s: &Settled, id: &str) -> Result<String> {
    let (rows_of, value): (Vec<Owned>, serde_json::Value) = match a.over {
        Over::Duration => {
            let t = durations(&s.grid);
            let p = sweep_duration(r, &t)?;
            let v = serde_json::to_value(&p)?;
            (p.into_iter().map(|p| (p.duration.si(), p.hazards, None)).collect(), v)
        }
        Over::Level => {
            let p = sweep_level(r, &ratios(&s.grid))?;
            let v = serde_json::to_value(&p)?;
            (p.into_iter().map(|p| (p.factor.si(), p.hazards, p.risk_group)).collect(), v)
        }
        _ => {
            let p = sweep_transmittance(r, &ratios(&s.grid))?;
            let v = serde_json::to_value(&p)?;
            (p.into_iter().map(|p| (p.transmittance.si(), p.hazards, p.risk_group)).collect(), v)
        }
    };
    let rows: Vec<Row<'_>> = rows_of.iter().map(|(x, h, g)| Row { x: *x, hazards: h, group: *g }).collect();
    Ok(match a.format {
        SweepFormat::Table => ratio_table(a.over, &rows, id, s.set, s.duration),
        SweepFormat::Csv => sweep_csv(a.over, &rows)?,
        SweepFormat::Json => super::render::json::with_schema(
            "retidose.sweep/1",
            &serde_json::json!({ "over": a.over, "source": id, "set": s.set.id,
                "duration": (a.over != Over::Duration).then_some(s.duration), "points": value }),
        )?,
        SweepFormat::Svg => ratio_svg(a.over, &rows, id, s.set, s.duration)?,
    })
}

/// Durations from seconds.
fn durations(grid: &[f64]) -> Vec<Time> {
    grid.iter().map(|&t| Time::from_si(t)).collect()
}

/// Factors from plain numbers.
fn ratios(grid: &[f64]) -> Vec<Ratio> {
    grid.iter().map(|&k| Ratio::from_si(k)).collect()
}

/// Reads and resolves the scenario file.
fn read(path: &str) -> Result<Scenario> {
    let text = std::fs::read_to_string(path).with_context(|| format!("cannot read the scenario {path}"))?;
    Ok(parse_scenario_file(&text, path, Path::new(path).parent())?)
}

/// `--from`, `--to` and `--points` as the grid of values of `over`, with errors naming the flag.
fn grid(a: &SweepArgs, over: Over) -> Result<Vec<f64>> {
    let (d_from, d_to) = over.default_range();
    let (from_text, to_text) = (a.from.as_deref().unwrap_or(d_from), a.to.as_deref().unwrap_or(d_to));
    let from = over.parse(from_text, "--from")?;
    let to = over.parse(to_text, "--to")?;
    if from >= to {
        let word = if over == Over::Distance { "nearer than" } else { "below" };
        bail!("--from ({from_text}) must be {word} --to ({to_text}), e.g. {}", over.example());
    }
    if !(1..=MAX_POINTS).contains(&a.points) {
        bail!("--points must be 1 to {MAX_POINTS}, not {}", a.points);
    }
    let grid = match over {
        Over::Distance => log_distances(Length::from_si(from), Length::from_si(to), a.points)?
            .into_iter()
            .map(|d| d.si())
            .collect(),
        Over::Duration => log_durations(Time::from_si(from), Time::from_si(to), a.points)?
            .into_iter()
            .map(|t| t.si())
            .collect(),
        _ => log_factors(Ratio::from_si(from), Ratio::from_si(to), a.points)?
            .into_iter()
            .map(|k| k.si())
            .collect(),
    };
    Ok(grid)
}

/// Settles every flag for a limits sweep, with errors naming the flag.
fn settle(a: &SweepArgs, scenario: Scenario) -> Result<Settled> {
    let grid = grid(a, a.over)?;
    let Chosen { scenario, index, set, duration } =
        choose_in(scenario, a.source.as_deref(), a.set.as_deref(), a.duration.as_deref())?;
    let limits = scenario.limits.as_ref();
    let classify = limits.map_or(Some(false), |l| l.classify.then_some(l.general_lighting));
    let aphakic = limits.is_some_and(|l| l.aphakic);
    Ok(Settled { scenario, index, set, duration, classify, aphakic, grid })
}

/// A scenario read and resolved, with the source, limit set and exposure duration its flags
/// name (set and duration default to the scenario's [limits]); shared by `sweep` and
/// `uncertainty`.
pub(crate) struct Chosen {
    /// The resolved scenario.
    pub scenario: Scenario,
    /// The source's index.
    pub index: usize,
    /// The limit set.
    pub set: &'static LimitSet,
    /// The exposure duration.
    pub duration: Time,
}

/// Reads `path` and settles `--source`, `--set` and `--for`, with errors naming the flag.
pub(crate) fn choose(
    path: &str,
    source: Option<&str>,
    set: Option<&str>,
    duration: Option<&str>,
) -> Result<Chosen> {
    choose_in(read(path)?, source, set, duration)
}

/// Settles `--source`, `--set` and `--for` in a scenario read already.
fn choose_in(
    scenario: Scenario,
    source: Option<&str>,
    set: Option<&str>,
    duration: Option<&str>,
) -> Result<Chosen> {
    let index = source_index(&scenario, source)?;
    let limits = scenario.limits.as_ref();
    let set = match (set, limits.and_then(|l| l.sets.first())) {
        (Some(id), _) => find_set(id).context("--set")?,
        (None, Some(set)) => set,
        (None, None) => {
            bail!("--set: the scenario has no [limits] sets; give --set (see `retidose limits list`)")
        }
    };
    let duration = match (duration, limits) {
        (Some(t), _) => units::parse_time(t).context("--for")?,
        (None, Some(l)) => l.duration,
        (None, None) => bail!("--for: the scenario has no [limits] duration; give --for, e.g. --for \"8 h\""),
    };
    if !(duration.si() > 0.0 && duration.si().is_finite()) {
        bail!("--for: the exposure duration must be above 0 s, e.g. \"8 h\"");
    }
    Ok(Chosen { scenario, index, set, duration })
}

/// A distance flag: a length above 0 m.
fn length(text: &str, flag: &str) -> Result<Length> {
    let d = units::parse_length(text).with_context(|| format!("{flag} takes a length such as \"200 mm\""))?;
    if !(d.si() > 0.0 && d.si().is_finite()) {
        bail!("{flag} must be a distance above 0 m, such as \"200 mm\", not \"{text}\"");
    }
    Ok(d)
}

/// The index of the source `id`, or the one source when there is only one.
pub(crate) fn source_index(s: &Scenario, id: Option<&str>) -> Result<usize> {
    let ids = s.source_ids.join(", ");
    match id {
        Some(id) => {
            s.source_ids.iter().position(|x| x == id).with_context(|| {
                format!("--source: the scenario has no source '{id}'; its sources are: {ids}")
            })
        }
        None if s.source_ids.len() == 1 => Ok(0),
        None => bail!("--source: the scenario has {} sources; name one of: {ids}", s.source_ids.len()),
    }
}

/// "150.0 mm" below 1 m, "2.500 m" from 1 m.
fn distance_text(d: Length) -> String {
    let m = d.si();
    if m < 1.0 { format!("{} mm", num(m * 1e3)) } else { format!("{} m", num(m)) }
}

/// t_max in a table cell: "2 h 47 min", "≤ 2 h" (band partly covered), "> 8 h 20 min" (not
/// reached within the set's range), "never", "< 0.25 s" (exceeded before), "—" (none).
fn t_max_cell(t: Option<MaxDuration>, partial: bool) -> String {
    match t {
        None => "—".into(),
        Some(MaxDuration::Limited(t)) if partial => format!("≤ {}", duration(t.si())),
        Some(MaxDuration::Limited(t)) => duration(t.si()),
        Some(MaxDuration::NotReached(t)) if t.si().is_infinite() => "never".into(),
        Some(MaxDuration::NotReached(t)) => format!("> {}", duration(t.si())),
        Some(MaxDuration::ExceededBefore(t)) => format!("< {}", duration(t.si())),
    }
}

/// "RG2", "≥ RG1" (a lower bound), "—".
fn group_cell(g: Option<GroupAt>) -> String {
    match g.and_then(|g| g.group.map(|x| (x, g.lower_bound))) {
        Some((x, false)) => x.name().to_string(),
        Some((x, true)) => format!("≥ {}", x.name()),
        None => "—".into(),
    }
}

/// The rows (the first is the header) as the shared box table, fitted to the terminal's width
/// (narrowed, or split with the first column repeated).
fn columns(rows: &[Vec<String>]) -> String {
    let Some((header, body)) = rows.split_first() else { return String::new() };
    let mut table = Table::new(header);
    for r in body {
        table.row(r.clone());
    }
    let mut page = Page::new(width(), false);
    page.table(&table);
    page.finish()
}

/// `text` with every line outside a table wrapped to the terminal's width.
fn fitted(text: &str) -> String {
    let mut page = Page::new(width(), false);
    let mut out = String::new();
    for line in text.lines() {
        if line.is_empty() || line.starts_with(['┌', '│', '├', '└']) {
            out.push_str(line);
            out.push('\n');
        } else {
            page.para(line.trim_start(), &line[..line.len() - line.trim_start().len()]);
            out.push_str(&std::mem::replace(&mut page, Page::new(width(), false)).finish());
        }
    }
    out
}

/// The columns' hazard ids in words, one line.
fn legend(hazards: &[HazardPoint]) -> String {
    let words: Vec<String> = hazards.iter().map(|h| format!("{} = {}", h.id, h.name)).collect();
    format!("\nColumns: {}.\n", words.join("; "))
}

/// The sweep as a table: distance, t_max per hazard, the risk group.
fn sweep_table(points: &[DistancePoint], id: &str, set: &LimitSet, t: Time) -> String {
    let mut out = format!(
        "t_max against distance: source {id}, {} ({}), ratios for {}\n\n",
        set.id,
        set.document,
        duration(t.si())
    );
    let Some(first) = points.first() else { return out };
    let mut header = vec!["distance".to_string()];
    header.extend(first.hazards.iter().map(|h| h.id.clone()));
    let grouped = first.risk_group.is_some();
    if grouped {
        header.push("risk group".into());
    }
    let mut rows = vec![header];
    for p in points {
        let mut row = vec![distance_text(p.distance)];
        row.extend(p.hazards.iter().map(|h| t_max_cell(h.t_max, h.partial)));
        if grouped {
            row.push(group_cell(p.risk_group));
        }
        rows.push(row);
    }
    out.push_str(&columns(&rows));
    out.push_str(&legend(&first.hazards));
    out.push_str(
        "\nt_max: the longest permissible exposure at that distance; \"> T\" not reached within the set's range \
         (T), \"never\" not reached at any duration, \"< T\" exceeded already at T, \"≤ T\" an upper bound (band \
         partly covered), \"—\" not applicable or not assessed. The source is moved along its axis.\n",
    );
    fitted(&out)
}

/// The verdict as one CSV word.
fn verdict_word(v: &Verdict) -> &'static str {
    match v {
        Verdict::Within => "within",
        Verdict::Exceeds => "exceeds",
        Verdict::NotAssessed(_) => "not-assessed",
        Verdict::NotApplicable(_) => "not-applicable",
    }
}

/// A limits sweep as tidy long CSV rows, the first column the swept quantity.
fn sweep_csv(over: Over, points: &[Row<'_>]) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record([over.column(), "hazard", "ratio", "lower_bound", "t_max_s", "verdict"])?;
    let real = |v: f64| ryu::Buffer::new().format(v).to_string();
    let opt = |x: Option<f64>| x.map_or(String::new(), real);
    for p in points {
        let d = real(p.x);
        for h in p.hazards {
            let t = match h.t_max {
                Some(MaxDuration::Limited(t)) => real(t.si()),
                _ => String::new(),
            };
            w.write_record([&d, &h.id, &opt(h.ratio), &opt(h.lower_bound), &t, verdict_word(&h.verdict)])?;
        }
        if p.group.is_some() {
            w.write_record([&d, "risk-group", "", "", "", &group_cell(p.group)])?;
        }
    }
    Ok(String::from_utf8(w.into_inner()?)?)
}

/// A ratio in a table cell: "1.234", "≥ 0.5" (a lower bound only), "—".
fn ratio_cell(h: &HazardPoint) -> String {
    match (h.ratio, h.lower_bound) {
        (Some(r), _) => num(r),
        (None, Some(b)) => format!("≥ {}", num(b)),
        (None, None) => "—".into(),
    }
}

/// The sweep with the source as placed: the swept value, the ratio per hazard, the risk group;
/// for a duration sweep, t_max (the same at every duration) above the table.
fn ratio_table(over: Over, points: &[Row<'_>], id: &str, set: &LimitSet, t: Time) -> String {
    let what = match over {
        Over::Duration => "exposure duration".to_string(),
        Over::Level => format!("a factor on the source's light (ratios for {})", duration(t.si())),
        _ => format!("a neutral filter's transmittance (ratios for {})", duration(t.si())),
    };
    let mut out = format!("Hazard ratio against {what}: source {id}, {} ({})\n", set.id, set.document);
    let Some(first) = points.first() else { return out };
    if over == Over::Duration {
        let t_max: Vec<String> = (0..first.hazards.len())
            .map(|i| {
                let h = points
                    .iter()
                    .map(|p| &p.hazards[i])
                    .find(|h| h.t_max.is_some())
                    .unwrap_or(&first.hazards[i]);
                format!("{} {}", h.id, t_max_cell(h.t_max, h.partial))
            })
            .collect();
        out.push_str(&format!("t_max (the same at every duration where assessed): {}\n", t_max.join(", ")));
    }
    out.push('\n');
    let mut header = vec![over.column().split('_').next().unwrap_or("value").to_string()];
    header.extend(first.hazards.iter().map(|h| h.id.clone()));
    let grouped = first.group.is_some();
    if grouped {
        header.push("risk group".into());
    }
    let mut rows = vec![header];
    for p in points {
        let mut row = vec![over.cell(p.x)];
        row.extend(p.hazards.iter().map(ratio_cell));
        if grouped {
            row.push(group_cell(p.group));
        }
        rows.push(row);
    }
    out.push_str(&columns(&rows));
    out.push_str(&legend(first.hazards));
    out.push_str(
        "\nratio: exposure ÷ limit (above 1 the limit is exceeded); \"≥ x\" a lower bound (band partly covered), \
         \"—\" not applicable or not assessed. The source stays where it is placed.\n",
    );
    if over == Over::Transmittance {
        out.push_str("A neutral filter of transmittance T gives the numbers of the source at level ×T.\n");
    }
    fitted(&out)
}

/// The t_max-against-distance figure of a distance sweep.
fn distance_svg(points: &[DistancePoint], r: &LimitsRequest<'_>, id: &str) -> Result<String> {
    let f = super::render::svg::sweep_figures::distance(points, r, id).map_err(anyhow::Error::msg)?;
    Ok(f.svg + "\n")
}

/// The ratio against the swept value, one line per hazard, with the ratio-1 line.
fn ratio_svg(over: Over, points: &[Row<'_>], id: &str, set: &LimitSet, t: Time) -> Result<String> {
    use super::render::svg::sweep_figures::{Axis, Series, ratio};
    let Some(first) = points.first() else { bail!("nothing to draw") };
    let series: Vec<Series> = first
        .hazards
        .iter()
        .enumerate()
        .map(|(i, h)| Series {
            name: h.name.clone(),
            points: points.iter().filter_map(|p| p.hazards.get(i)?.ratio.map(|v| (p.x, v))).collect(),
        })
        .collect();
    let axis = match over {
        Over::Duration => Axis::Duration,
        Over::Level => Axis::Level,
        _ => Axis::Transmittance,
    };
    let f = ratio(axis, &series, id, set, t).map_err(anyhow::Error::msg)?;
    Ok(f.svg + "\n")
}

/// `--over level` on a scenario with a [room]: every rack's positions in range against a factor
/// on every luminaire, counted from the survey's lux values.
fn room_run(a: &SweepArgs, scenario: Scenario) -> Result<Output> {
    let grid = grid(a, Over::Level)?;
    let assessed = retidose::assess::assess(&scenario)?;
    let room = assessed.room.as_ref().context("the scenario's [room] gave no survey")?;
    let racks = dimming(&room.rows.0, &grid);
    if racks.is_empty() {
        bail!(
            "--over level: no rack has a guidance range for its light phase ([guidance] sets with an illuminance \
             range, e.g. sets = [\"nrc-guide-2011\"]); give --source to sweep a source's limits instead"
        );
    }
    let text = match a.format {
        SweepFormat::Table => room_table(&racks),
        SweepFormat::Csv => room_csv(&racks)?,
        SweepFormat::Json => super::render::json::with_schema(
            "retidose.sweep/1",
            &serde_json::json!({ "over": Over::Level, "room": racks }),
        )?,
        SweepFormat::Svg => {
            let f = super::render::svg::dimming::figure(&racks).context("nothing to draw")?;
            f.svg + "\n"
        }
    };
    Ok(Output { text: with_cautions(text, a.format, &[ANIMAL_CAUTION, GENERAL_CAUTION]), status: 0 })
}

/// The room's dimming sweep as a table: the factor, then per rack the positions in range.
fn room_table(racks: &[RackDimming]) -> String {
    let mut out = String::from(
        "Positions in the guidance range against a factor on every luminaire (the light phase; \
         readings scale with it)\n\n",
    );
    let mut header = vec!["factor".to_string()];
    header.extend(racks.iter().map(|r| format!("rack {} (of {})", r.rack, r.positions)));
    let mut rows = vec![header];
    for (i, p) in racks[0].points.iter().enumerate() {
        let mut row = vec![Over::Level.cell(p.factor)];
        row.extend(racks.iter().map(|r| r.points[i].counts.in_range.to_string()));
        rows.push(row);
    }
    out.push_str(&columns(&rows));
    fitted(&out)
}

/// The room's dimming sweep as tidy long CSV rows.
fn room_csv(racks: &[RackDimming]) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["level_factor", "rack", "positions", "below", "in_range", "above"])?;
    for r in racks {
        for p in &r.points {
            let c = p.counts;
            let n = [r.positions, c.below, c.in_range, c.above].map(|v| v.to_string());
            w.write_record([ryu::Buffer::new().format(p.factor), &r.rack, &n[0], &n[1], &n[2], &n[3]])?;
        }
    }
    Ok(String::from_utf8(w.into_inner()?)?)
}

/// One solve result in words.
fn nearest_text(n: &Nearest, near: Length, far: Length) -> String {
    let r = |x: Option<f64>| x.map_or(String::new(), |v| format!(" (ratio {})", num(v)));
    match n {
        Nearest::Found { distance, ratio, crossings, .. } => {
            let mut t = format!("{}{}", distance_text(*distance), r(*ratio));
            if *crossings > 1 {
                t.push_str(&format!(
                    " [not monotone: {crossings} changes on the scan; the outermost solved]"
                ));
            }
            t
        }
        Nearest::WithinAtNearEnd { ratio: Some(x) } => {
            format!("within already at {} (ratio {})", distance_text(near), num(*x))
        }
        Nearest::WithinAtNearEnd { ratio: None } => {
            format!("not exceeded anywhere from {} (or does not apply there)", distance_text(near))
        }
        Nearest::ExceedsAtFarEnd { ratio } => format!("still exceeds at {}{}", distance_text(far), r(*ratio)),
        Nearest::NoVerdict { distance, reason } => {
            format!("no verdict at {}: {reason}", distance_text(*distance))
        }
    }
}

/// The longest exposure at the placed distance in words.
fn longest_text(l: &Longest, name: &dyn Fn(&str) -> String) -> String {
    match l {
        Longest::Limited { t_max, hazard, partial } => {
            let bound = if *partial { "at most " } else { "" };
            format!("{bound}{} (bound by {})", duration(t_max.si()), name(hazard))
        }
        Longest::ExceededBefore { shortest, hazard } => {
            format!("none: {} is exceeded already at {}", name(hazard), duration(shortest.si()))
        }
        Longest::NotReached { up_to } if up_to.si().is_infinite() => "no limit is ever reached".into(),
        Longest::NotReached { up_to } => format!("no limit is reached within {}", duration(up_to.si())),
        Longest::NoneAssessed => "no hazard could be assessed".into(),
    }
}

/// The solve as a table, with the bracket and tolerance.
fn solve_table(
    n: &NearestDistances,
    id: &str,
    set: &LimitSet,
    placed: Option<(Length, retidose::limits::sweep::LongestDuration)>,
) -> String {
    let mut out = format!(
        "Nearest distance within each limit: source {id}, {} ({}), exposure {}\n\
         bracket searched: {} to {} ({SCAN_POINTS} log-spaced scan points, then bisection on log distance); \
         relative tolerance {:e} on distance\n\n",
        set.id,
        set.document,
        duration(n.duration.si()),
        distance_text(n.near),
        distance_text(n.far),
        n.tolerance
    );
    let mut rows = vec![vec!["hazard".to_string(), "nearest distance within the limit".to_string()]];
    rows.extend(n.hazards.iter().map(|h| vec![h.name.clone(), nearest_text(&h.nearest, n.near, n.far)]));
    out.push_str(&columns(&rows));
    if !n.groups.is_empty() {
        let mut rows =
            vec![vec!["risk group".to_string(), "nearest distance at most this group".to_string()]];
        rows.extend(n.groups.iter().map(|(g, x)| {
            let text = match x {
                Nearest::WithinAtNearEnd { .. } => {
                    format!("{} or lower already at {}", g.name(), distance_text(n.near))
                }
                x => nearest_text(x, n.near, n.far),
            };
            vec![g.name().to_string(), text]
        }));
        out.push('\n');
        out.push_str(&columns(&rows));
    }
    if let Some((d, l)) = placed {
        out.push_str(&format!(
            "\nAt the placed distance {}: longest exposure within every limit {}\n",
            distance_text(d),
            longest_text(&l.longest, &|id: &str| {
                n.hazards.iter().find(|h| h.id == id).map_or_else(|| id.to_string(), |h| h.name.clone())
            })
        ));
        if !l.not_assessed.is_empty() {
            out.push_str(&format!(
                "  not assessed (not covered by that duration): {}\n",
                l.not_assessed.join("; ")
            ));
        }
    }
    fitted(&out)
}
