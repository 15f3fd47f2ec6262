//! `retidose compare`: several assessed scenarios side by side, the same figures in columns.
//!
//! [`compare`] reads finished [`Assessment`]s (one per scenario or variant, each with the label
//! it is shown under) and builds one [`Comparison`]:
//!
//! - one [`Column`] per scenario: the worst hazard ratio over every limit check (every source,
//!   every set) with the hazard it belongs to, the **margin**, the t_max of that binding hazard,
//!   the highest IEC 62471 risk group, the outcome, and the bleaching figures (peak bleached
//!   fraction, recovery to 90 % after the last lights-off) when the scenario has a schedule;
//! - rows aligned across the columns by key: one per hazard (`source/set/hazard id`), one per
//!   risk-group classification (`source/set`, with E_thr and the threshold distance) and one
//!   per rack of a room (positions below, above and in the guidance range, the lever's factor).
//!   A row a scenario does not have is `None` in its column: absent, never zero.
//!
//! The **margin** is the factor to the limit, 1 ÷ (worst ratio): how many times stronger the
//! exposure could be before the binding hazard reaches its limit. Above 1 every assessed hazard
//! is within its limit, below 1 the binding hazard exceeds it by 1 ÷ margin. It is infinite
//! when every ratio is 0, and absent when no hazard was assessed. When the binding ratio comes
//! from a partly covered band it is a lower bound, so the margin is an upper bound
//! ([`Worst::lower_bound`]).
//!
//! Columns are ranked by margin, largest first; a tie keeps the input order, and scenarios
//! without a margin come last, in input order. A scenario compared with itself therefore gives
//! two identical columns side by side.
//!
//! Variants are written inside a scenario file as `[[variant]]` patches of it
//! ([`crate::scenario::variant`]), or listed in a small file of their own ([`parse_variants`]):
//! `[[variant]]` tables with a `name` and a scenario `file`, relative to the variants file.

use std::path::{Path, PathBuf};

use uom::si::f64::Illuminance;
use uom::si::illuminance::lux;

use crate::assess::Assessment;
use crate::base::error::{Error, Result};
use crate::base::quantity::{Frequency, Length, SiValue, Time};
use crate::limits::{HazardResult, RiskGroup, TMax, Verdict};

/// The comparison of several scenarios: the columns ranked by margin, and the rows aligned
/// across them (each row's `cells` in the order of `columns`).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Comparison {
    /// One column per scenario, largest margin first.
    pub columns: Vec<Column>,
    /// Per hazard, keyed `source/set/hazard id`.
    pub hazards: Vec<Aligned<HazardCell>>,
    /// Per risk-group classification, keyed `source/set`.
    pub groups: Vec<Aligned<GroupCell>>,
    /// Per rack of the room, keyed by rack id.
    pub racks: Vec<Aligned<RackCell>>,
    /// The cautions of the assessments (each once, in the order of the columns).
    pub cautions: Vec<String>,
}

/// The figures of one scenario.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Column {
    /// The label the scenario is shown under (a variant's name or the file).
    pub label: String,
    /// Its position among the inputs, from 0.
    pub input: usize,
    /// The scenario's name.
    pub scenario: String,
    /// The scenario's title.
    pub title: String,
    /// The binding hazard: the largest ratio to its limit.
    pub worst: Option<Worst>,
    /// 1 ÷ the worst ratio (see the module documentation).
    pub margin: Option<f64>,
    /// The highest risk group over the classifications made, and whether it is a lower bound
    /// (some hazard could not be grouped).
    pub risk_group: Option<(RiskGroup, bool)>,
    /// True when a limit is exceeded.
    pub limit_exceeded: bool,
    /// True when a guidance flag is raised.
    pub flag_raised: bool,
    /// How many items were not assessed.
    pub not_assessed: usize,
    /// Positions in the room, when there is one.
    pub positions: Option<usize>,
    /// Pigment bleaching over the schedule, when there is one.
    pub bleach: Option<BleachCell>,
}

/// The binding hazard of a scenario.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Worst {
    /// Its row key (`source/set/hazard id`).
    pub key: String,
    /// The hazard's name.
    pub hazard: String,
    /// Exposure ÷ limit.
    pub ratio: f64,
    /// True when the ratio is a lower bound (the band is only partly covered).
    pub lower_bound: bool,
    /// The longest permissible duration of that hazard.
    pub t_max: Option<TMax>,
}

/// A row aligned across the columns.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Aligned<T> {
    /// The key rows are matched by.
    pub key: String,
    /// What the row shows, in words.
    pub label: String,
    /// One cell per column, `None` where the scenario has no such row.
    pub cells: Vec<Option<T>>,
}

/// One hazard of one scenario.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HazardCell {
    /// Exposure ÷ limit (or its lower bound on a partly covered band).
    pub ratio: Option<f64>,
    /// True when the spectrum covers only part of the band.
    pub partial: bool,
    /// The longest permissible duration.
    pub t_max: Option<TMax>,
    /// The verdict.
    pub verdict: Verdict,
}

/// One risk-group classification of one scenario.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct GroupCell {
    /// The highest group of the assessed hazards.
    pub group: Option<RiskGroup>,
    /// True when some hazard could not be grouped (the group is a lower bound).
    pub lower_bound: bool,
    /// The blue-light threshold illuminance E_thr.
    pub e_thr: Option<Illuminance>,
    /// The distance beyond which the blue-light group is at most RG1.
    pub threshold_distance: Option<Length>,
    /// Why the classification could not be made.
    pub error: Option<String>,
}

/// One rack of one scenario's room.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct RackCell {
    /// Cage positions.
    pub positions: usize,
    /// Positions below the light-phase range.
    pub below: usize,
    /// Positions above it.
    pub above: usize,
    /// Positions inside it (`None` when the rack's animals have no light-phase range).
    pub in_range: Option<usize>,
    /// The dimming (below 1) or brightening factor that puts the most positions in range.
    pub lever_factor: Option<f64>,
    /// The dimmest and the brightest room light at cage level in the light phase.
    pub room_lux: (Illuminance, Illuminance),
    /// The highest rod R*/rod/s in the light phase (in the cage, through its wall).
    pub rod_rate_max: Frequency,
    /// The highest steady bleached fraction in the light phase.
    pub bleach_max: f64,
    /// The highest rod R*/rod/s from the dark-phase leak.
    pub leak_rod_rate_max: Frequency,
}

/// Pigment bleaching of one scenario.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BleachCell {
    /// The receptor.
    pub receptor: String,
    /// The largest bleached fraction over the schedule.
    pub peak: f64,
    /// Recovery to 90 % regenerated after the last lights-off.
    pub recovery_90: Recovery90,
}

/// Recovery to 90 % after the last lights-off.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Recovery90 {
    /// The schedule has no lights-off.
    NoLightsOff,
    /// Not reached before the light rose again.
    NotReached,
    /// Reached after this time (0 when already there at lights-off).
    After(Time),
}

/// One entry of a variants file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Variant {
    /// The label of its column.
    pub name: String,
    /// The scenario file, resolved against the variants file's folder.
    pub file: PathBuf,
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct VariantsFile {
    variant: Vec<VariantEntry>,
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct VariantEntry {
    name: String,
    file: String,
}

/// Reads a variants file: `[[variant]]` tables, each with a `name` (unique, not empty) and a
/// scenario `file`, relative paths taken from `dir` (the variants file's folder).
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming `origin` for malformed TOML, an unknown key, no
/// variant, an empty or repeated name.
pub fn parse_variants(text: &str, origin: &str, dir: Option<&Path>) -> Result<Vec<Variant>> {
    let file: VariantsFile =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    if file.variant.is_empty() {
        return Err(Error::data("no [[variant]] listed; give at least one, each with name and file")
            .in_file(origin, None));
    }
    let mut out: Vec<Variant> = Vec::with_capacity(file.variant.len());
    for (i, v) in file.variant.into_iter().enumerate() {
        let key = format!("variant[{i}].name");
        if v.name.trim().is_empty() {
            return Err(Error::data("the name is empty; give each variant a name")
                .key(&key)
                .in_file(origin, Some(text)));
        }
        if out.iter().any(|o| o.name == v.name) {
            return Err(Error::data(format!("the name '{}' is used twice; names must differ", v.name))
                .key(&key)
                .in_file(origin, Some(text)));
        }
        let path = Path::new(&v.file);
        let file = match dir {
            Some(d) if path.is_relative() => d.join(path),
            _ => path.to_path_buf(),
        };
        out.push(Variant { name: v.name, file });
    }
    Ok(out)
}

/// Compares the assessments, each with the label of its column (see the module documentation).
pub fn compare(items: &[(&str, &Assessment)]) -> Comparison {
    let mut order: Vec<usize> = (0..items.len()).collect();
    let columns: Vec<Column> = items.iter().enumerate().map(|(i, (l, a))| column(i, l, a)).collect();
    // Largest margin first, no margin last; a stable sort keeps the input order on ties.
    order.sort_by(|&x, &y| match (columns[x].margin, columns[y].margin) {
        (Some(a), Some(b)) => b.total_cmp(&a),
        (Some(_), None) => std::cmp::Ordering::Less,
        (None, Some(_)) => std::cmp::Ordering::Greater,
        (None, None) => std::cmp::Ordering::Equal,
    });
    let ranked: Vec<&Assessment> = order.iter().map(|&i| items[i].1).collect();
    let mut cautions: Vec<String> = Vec::new();
    for c in ranked.iter().flat_map(|a| &a.cautions) {
        if !cautions.contains(c) {
            cautions.push(c.clone());
        }
    }
    Comparison {
        cautions,
        hazards: align(&ranked, hazard_rows),
        groups: align(&ranked, group_rows),
        racks: align(&ranked, rack_rows),
        columns: order.iter().map(|&i| columns[i].clone()).collect(),
    }
}

/// The rows `rows` gives for each assessment, aligned by key in order of first appearance.
fn align<T: Clone>(
    ranked: &[&Assessment],
    rows: fn(&Assessment) -> Vec<(String, String, T)>,
) -> Vec<Aligned<T>> {
    let mut out: Vec<Aligned<T>> = Vec::new();
    for (c, a) in ranked.iter().enumerate() {
        for (key, label, cell) in rows(a) {
            let i = match out.iter().position(|r| r.key == key) {
                Some(i) => i,
                None => {
                    out.push(Aligned { key, label, cells: vec![None; ranked.len()] });
                    out.len() - 1
                }
            };
            out[i].cells[c] = Some(cell);
        }
    }
    out
}

/// The ratio a hazard counts with: the ratio, or on a partly covered band its lower bound.
fn ratio_of(h: &HazardResult) -> Option<f64> {
    h.ratio.or(h.lower_bound_ratio)
}

fn hazard_rows(a: &Assessment) -> Vec<(String, String, HazardCell)> {
    let mut out = Vec::new();
    for l in &a.limits {
        for h in &l.hazards {
            let cell = HazardCell {
                ratio: ratio_of(h),
                partial: h.partial,
                t_max: h.t_max,
                verdict: h.verdict.clone(),
            };
            out.push((
                format!("{}/{}/{}", l.source, l.set_id, h.id),
                format!("{} ({}, {})", h.name, l.set_id, l.source),
                cell,
            ));
        }
    }
    out
}

fn group_rows(a: &Assessment) -> Vec<(String, String, GroupCell)> {
    let mut out = Vec::new();
    for l in &a.limits {
        let cell = match &l.classification {
            None => continue,
            Some(Ok(c)) => GroupCell {
                group: c.overall,
                lower_bound: !c.not_assessed.is_empty(),
                e_thr: c.e_thr_lx.map(Illuminance::new::<lux>),
                threshold_distance: c.threshold_distance,
                error: None,
            },
            Some(Err(e)) => GroupCell {
                group: None,
                lower_bound: false,
                e_thr: None,
                threshold_distance: None,
                error: Some(e.clone()),
            },
        };
        out.push((format!("{}/{}", l.source, l.set_id), format!("{} ({})", l.source, l.set_id), cell));
    }
    out
}

fn rack_rows(a: &Assessment) -> Vec<(String, String, RackCell)> {
    let Some(room) = &a.room else { return Vec::new() };
    room.racks
        .iter()
        .map(|r| {
            let s = &r.summary;
            let bounded = r.bounds.lower.is_some() || r.bounds.upper.is_some();
            let cell = RackCell {
                positions: s.positions,
                below: s.below,
                above: s.above,
                in_range: bounded.then(|| s.positions.saturating_sub(s.below + s.above)),
                lever_factor: r.lever.as_ref().map(|l| l.factor),
                room_lux: (Illuminance::new::<lux>(s.room_lux.min), Illuminance::new::<lux>(s.room_lux.max)),
                rod_rate_max: Frequency::from_si(s.rod_rate.max),
                bleach_max: s.light_bleach.max,
                leak_rod_rate_max: Frequency::from_si(s.leak_rod_rate.max),
            };
            (r.id.clone(), format!("rack {}", r.id), cell)
        })
        .collect()
}

/// The figures of one scenario.
fn column(input: usize, label: &str, a: &Assessment) -> Column {
    let worst = worst(a);
    let margin = worst.as_ref().map(|w| 1.0 / w.ratio);
    let groups = group_rows(a);
    let top = groups.iter().filter_map(|g| g.2.group).max();
    let incomplete = groups.iter().any(|g| g.2.lower_bound);
    Column {
        label: label.to_string(),
        input,
        scenario: a.name.clone(),
        title: a.title.clone(),
        worst,
        margin,
        risk_group: top.map(|g| (g, incomplete)),
        limit_exceeded: a.limit_exceeded,
        flag_raised: a.flag_raised,
        not_assessed: a.not_assessed.len(),
        positions: a.room.as_ref().map(|r| r.positions),
        bleach: a.bleach.as_ref().map(bleach_cell),
    }
}

/// The hazard with the largest ratio over every limit check (the first of equals).
fn worst(a: &Assessment) -> Option<Worst> {
    let mut best: Option<Worst> = None;
    for l in &a.limits {
        for h in &l.hazards {
            let Some(r) = ratio_of(h) else { continue };
            if best.as_ref().is_none_or(|b| r > b.ratio) {
                best = Some(Worst {
                    key: format!("{}/{}/{}", l.source, l.set_id, h.id),
                    hazard: h.name.clone(),
                    ratio: r,
                    lower_bound: h.partial,
                    t_max: h.t_max,
                });
            }
        }
    }
    best
}

fn bleach_cell(b: &crate::pigment::bleach::BleachReport) -> BleachCell {
    let recovery_90 = match b.recoveries.last() {
        None => Recovery90::NoLightsOff,
        Some(r) => r
            .to_90_s
            .map_or(Recovery90::NotReached, |s| Recovery90::After(Time::new::<uom::si::time::second>(s))),
    };
    BleachCell { receptor: b.receptor.clone(), peak: b.summary.peak, recovery_90 }
}
