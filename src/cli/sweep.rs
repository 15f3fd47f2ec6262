//! `retidose sweep`: one source of a scenario moved along its axis; t_max of every hazard and
//! the risk group at each distance, or (`--solve`) the nearest distance within each limit and
//! each risk group.

use std::path::Path;

use anyhow::{Context, Result, bail};
use clap::{Args, ValueEnum};
use retidose::assess::parse_scenario_file;
use retidose::base::quantity::{Length, SiValue, Time};
use retidose::base::units;
use retidose::limits::report::LimitsRequest;
use retidose::limits::sweep::{
    DistancePoint, GroupAt, Longest, MAX_POINTS, MaxDuration, Nearest, NearestDistances, SCAN_POINTS,
    log_distances, solve_longest_duration, solve_nearest_distance, sweep_distance,
};
use retidose::limits::{LimitSet, Verdict, find_set};
use retidose::scenario::file::Scenario;

use super::Output;
use super::render::{duration, num};

/// Help shown after `retidose sweep --help`.
pub const EXAMPLES: &str = "\
The source is moved along its axis (facing the eye) as the IEC 62471 classification moves it:
a small source by the inverse-square law, an extended one at constant radiance.
--set, --for and the classification default to the scenario's [limits].
CSV columns: distance_m, hazard, ratio, lower_bound, t_max_s, verdict (one row per distance and
hazard, and one per distance with hazard = risk-group and the group as verdict); t_max_s is empty
when the limit is not reached within the set's range, already exceeded, or not assessed.

Examples:
  retidose assess --example stimulus-review > s.toml
  retidose sweep s.toml --source stimulus --set iec62471-2006 --from \"50 mm\" --to \"5 m\" --points 100
  retidose sweep s.toml --source stimulus --format csv > sweep.csv
  retidose sweep s.toml --source stimulus --solve";

#[derive(Debug, Args)]
pub struct SweepArgs {
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
    /// Nearest distance of the sweep (or of the bracket searched by --solve)
    #[arg(long, value_name = "LENGTH", default_value = "50 mm", allow_hyphen_values = true)]
    from: String,
    /// Farthest distance
    #[arg(long, value_name = "LENGTH", default_value = "5 m", allow_hyphen_values = true)]
    to: String,
    /// Number of distances, evenly spaced in log distance (1 to 100 000)
    #[arg(long, value_name = "N", default_value_t = 100)]
    points: usize,
    /// Print the nearest distance within each limit and each risk group instead of the sweep
    #[arg(long)]
    solve: bool,
    /// Output format
    #[arg(long, value_enum, default_value_t = SweepFormat::Table)]
    format: SweepFormat,
}

/// The formats of `retidose sweep`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SweepFormat {
    /// A table for the terminal
    Table,
    /// JSON (schema retidose.sweep/1; with --solve, retidose.solve/1)
    Json,
    /// Tidy long CSV rows
    Csv,
}

/// What the flags and the scenario settle.
struct Settled {
    scenario: Scenario,
    index: usize,
    set: &'static LimitSet,
    duration: Time,
    classify: Option<bool>,
    aphakic: bool,
    from: Length,
    to: Length,
}

/// Runs `retidose sweep`.
pub fn run(a: SweepArgs) -> Result<Output> {
    let s = settle(&a)?;
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
        if a.format == SweepFormat::Csv {
            bail!(
                "--solve prints a table or JSON; leave out --format csv (or drop --solve for the CSV sweep)"
            );
        }
        let n = solve_nearest_distance(&r, s.from, s.to)?;
        let placed =
            r.source.distance.map(|d| (d, solve_longest_duration(&r))).map(|(d, l)| l.map(|l| (d, l)));
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
            super::render::json::with_schema("retidose.solve/1", &doc)?
        } else {
            solve_table(&n, id, s.set, placed)
        }
    } else {
        let distances = log_distances(s.from, s.to, a.points)?;
        let points = sweep_distance(&r, &distances)?;
        match a.format {
            SweepFormat::Table => sweep_table(&points, id, s.set, s.duration),
            SweepFormat::Csv => sweep_csv(&points)?,
            SweepFormat::Json => super::render::json::with_schema(
                "retidose.sweep/1",
                &serde_json::json!({ "source": id, "set": s.set.id, "points": points }),
            )?,
        }
    };
    Ok(Output { text, status: 0 })
}

/// Reads the scenario and settles every flag, with errors naming the flag.
fn settle(a: &SweepArgs) -> Result<Settled> {
    let Chosen { scenario, index, set, duration } =
        choose(&a.scenario, a.source.as_deref(), a.set.as_deref(), a.duration.as_deref())?;
    let limits = scenario.limits.as_ref();
    let from = length(&a.from, "--from")?;
    let to = length(&a.to, "--to")?;
    if from.si() >= to.si() {
        bail!("--from ({}) must be nearer than --to ({}), e.g. --from \"50 mm\" --to \"5 m\"", a.from, a.to);
    }
    if !(1..=MAX_POINTS).contains(&a.points) {
        bail!("--points must be 1 to {MAX_POINTS}, not {}", a.points);
    }
    let classify = limits.map_or(Some(false), |l| l.classify.then_some(l.general_lighting));
    let aphakic = limits.is_some_and(|l| l.aphakic);
    Ok(Settled { scenario, index, set, duration, classify, aphakic, from, to })
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
    let text = std::fs::read_to_string(path).with_context(|| format!("cannot read the scenario {path}"))?;
    let scenario = parse_scenario_file(&text, path, Path::new(path).parent())?;
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

/// Columns padded to their widest cell, separated by two spaces.
fn columns(rows: &[Vec<String>]) -> String {
    let n = rows.iter().map(Vec::len).max().unwrap_or(0);
    let width: Vec<usize> = (0..n)
        .map(|i| rows.iter().filter_map(|r| r.get(i)).map(|c| c.chars().count()).max().unwrap_or(0))
        .collect();
    let mut out = String::new();
    for r in rows {
        let cells: Vec<String> = r
            .iter()
            .enumerate()
            .map(|(i, c)| format!("{c}{}", " ".repeat(width[i] - c.chars().count())))
            .collect();
        out.push_str(cells.join("  ").trim_end());
        out.push('\n');
    }
    out
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
    out.push_str(
        "\nt_max: the longest permissible exposure at that distance; \"> T\" not reached within the set's range \
         (T), \"never\" not reached at any duration, \"< T\" exceeded already at T, \"≤ T\" an upper bound (band \
         partly covered), \"—\" not applicable or not assessed. The source is moved along its axis.\n",
    );
    out
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

/// The sweep as tidy long CSV rows.
fn sweep_csv(points: &[DistancePoint]) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["distance_m", "hazard", "ratio", "lower_bound", "t_max_s", "verdict"])?;
    let real = |v: f64| ryu::Buffer::new().format(v).to_string();
    let opt = |x: Option<f64>| x.map_or(String::new(), real);
    for p in points {
        let d = real(p.distance.si());
        for h in &p.hazards {
            let t = match h.t_max {
                Some(MaxDuration::Limited(t)) => real(t.si()),
                _ => String::new(),
            };
            w.write_record([&d, &h.id, &opt(h.ratio), &opt(h.lower_bound), &t, verdict_word(&h.verdict)])?;
        }
        if p.risk_group.is_some() {
            w.write_record([&d, "risk-group", "", "", "", &group_cell(p.risk_group)])?;
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
fn longest_text(l: &Longest) -> String {
    match l {
        Longest::Limited { t_max, hazard, partial } => {
            let bound = if *partial { "at most " } else { "" };
            format!("{bound}{} (bound by {hazard})", duration(t_max.si()))
        }
        Longest::ExceededBefore { shortest, hazard } => {
            format!("none: {hazard} is exceeded already at {}", duration(shortest.si()))
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
    rows.extend(n.hazards.iter().map(|h| vec![h.id.clone(), nearest_text(&h.nearest, n.near, n.far)]));
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
            longest_text(&l.longest)
        ));
        if !l.not_assessed.is_empty() {
            out.push_str(&format!(
                "  not assessed (not covered by that duration): {}\n",
                l.not_assessed.join("; ")
            ));
        }
    }
    out
}
