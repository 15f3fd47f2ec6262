//! The dimming lever of a rack: the one factor applied to every luminaire that brings the most
//! positions into the guidance range, and the positions that stay outside even then.
//!
//! A position at E lx is in range at factor f when lower ≤ f·E ≤ upper, i.e. when ln E lies in
//! a window of width ln(upper/lower) placed by ln f. The best factor is therefore the placement
//! of that window over the sorted ln E covering the most points (two pointers over the sorted
//! values); among equally good placements the factor nearest 1 (the least change) is chosen,
//! inside the feasible interval. The counts at the chosen factor are made with the same
//! comparisons the flags use, so the figures reported are what the factor achieves. Dimming
//! scales the light phase only, readings included (they are taken to come from the luminaires).

use crate::housing::pass::RackBounds;

/// How many of the positions that stay out of range a lever lists (the furthest out).
pub const LISTED: usize = 5;

/// A position that stays out of range at the lever's factor.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct StayOut {
    /// Global index.
    pub index: usize,
    /// Room illuminance at cage level after the factor, lx.
    pub lux: f64,
    /// The light it needs relative to now (above 1: more light, e.g. a higher shelf or less
    /// shading; below 1: a shade passing at most this fraction, or a lower shelf).
    pub needs: f64,
}

/// The lever of one rack.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Lever {
    /// The factor for every luminaire (below 1: dim; above 1: brighten).
    pub factor: f64,
    /// Positions in range now.
    pub in_range_now: usize,
    /// Positions in range at the factor.
    pub in_range_after: usize,
    /// Positions that stay below the range at the factor.
    pub stay_below: usize,
    /// Positions that stay above it.
    pub stay_above: usize,
    /// The furthest out of those, at most [`LISTED`].
    pub worst: Vec<StayOut>,
    /// Highest ÷ lowest light over the rack (its own spread).
    pub spread: f64,
    /// upper ÷ lower of the guidance range.
    pub range_ratio: f64,
    /// Positions in range against the factor for every luminaire: [`DIMMING_POINTS`] factors
    /// spaced evenly in log from 1/10 to 10 (the sweep "what if the panels are dimmed").
    pub dimming: Vec<(f64, usize)>,
}

/// Points of [`Lever::dimming`].
pub const DIMMING_POINTS: usize = 41;

/// What the summary pass gathers for a rack's lever: its light-phase lux values (any order)
/// and the lowest and highest few with their positions.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct LeverData {
    /// Room lux at cage level of every position (only for racks with guidance bounds).
    pub lux: Vec<f64>,
    /// The [`LISTED`] lowest (lux, global index), lowest first.
    pub lowest: Vec<(f64, usize)>,
    /// The [`LISTED`] highest, highest first.
    pub highest: Vec<(f64, usize)>,
}

impl LeverData {
    /// Adds a position.
    pub fn add(&mut self, lux: f64, index: usize) {
        self.lux.push(lux + 0.0);
        keep(&mut self.lowest, (lux, index), |a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        keep(&mut self.highest, (lux, index), |a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
    }

    /// Merges another block's data.
    pub fn merge(&mut self, o: LeverData) {
        self.lux.extend(o.lux);
        for x in o.lowest {
            keep(&mut self.lowest, x, |a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        }
        for x in o.highest {
            keep(&mut self.highest, x, |a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
        }
    }
}

/// Inserts `x` into the sorted, at most [`LISTED`]-long `v`.
fn keep(
    v: &mut Vec<(f64, usize)>,
    x: (f64, usize),
    cmp: impl Fn(&(f64, usize), &(f64, usize)) -> std::cmp::Ordering,
) {
    if v.len() == LISTED && cmp(&x, &v[LISTED - 1]).is_ge() {
        return;
    }
    let at = v.partition_point(|y| cmp(y, &x).is_lt());
    v.insert(at, x);
    v.truncate(LISTED);
}

/// The best factor for ascending lux values `e` and the bounds (1 when nothing can be gained):
/// two pointers over the sorted values, comparing ratios (no logarithms).
pub fn best_factor(e: &[f64], b: &RackBounds) -> f64 {
    let lo = b.lower.map_or(0.0, |l| l.lx);
    let hi = b.upper.map_or(f64::INFINITY, |u| u.lx);
    let first = e.partition_point(|v| *v <= 0.0);
    let e = &e[first..];
    if e.is_empty() || (lo <= 0.0 && hi.is_infinite()) {
        return 1.0;
    }
    if lo <= 0.0 {
        return (hi / e[e.len() - 1]).min(1.0);
    }
    if hi.is_infinite() {
        return (lo / e[0]).max(1.0);
    }
    let (mut best, mut best_f) = (0usize, 1.0f64);
    let mut j = 0;
    for i in 0..e.len() {
        j = j.max(i);
        while j + 1 < e.len() && e[j + 1] / e[i] <= hi / lo {
            j += 1;
        }
        // f must lie in [lo/e_i, hi/e_j]; take the point nearest 1, kept a hair inside.
        let (a, c) = (lo / e[i], hi / e[j]);
        let f = if c > a * (1.0 + 1e-9) {
            1.0f64.clamp(a * (1.0 + 1e-12), c * (1.0 - 1e-12))
        } else {
            0.5 * (a + c)
        };
        let count = j + 1 - i;
        if count > best || (count == best && f.ln().abs() < best_f.ln().abs()) {
            (best, best_f) = (count, f);
        }
    }
    best_f
}

/// Non-negative lux values in ascending order: such floats order as their bit patterns, so an
/// integer sort (in place: the maps reuse the vector's memory).
pub fn sorted_lux(lux: Vec<f64>) -> Vec<f64> {
    let mut bits: Vec<u64> = lux.into_iter().map(f64::to_bits).collect();
    bits.sort_unstable();
    bits.into_iter().map(f64::from_bits).collect()
}

/// The positions of a rack at one factor on every luminaire: below, in and above the guidance
/// range, with the comparisons the flags use (in range: lower ≤ f·E ≤ upper).
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
pub struct Counts {
    /// Below the lower bound.
    pub below: usize,
    /// In range.
    pub in_range: usize,
    /// Above the upper bound.
    pub above: usize,
}

/// The [`Counts`] of the ascending lux values `e` of a rack with bounds `b` at factor `f`: two
/// binary searches.
pub fn counts(e: &[f64], b: &RackBounds, f: f64) -> Counts {
    let lo = b.lower.map_or(f64::NEG_INFINITY, |l| l.lx);
    let hi = b.upper.map_or(f64::INFINITY, |u| u.lx);
    let below = e.partition_point(|v| v * f < lo);
    let above = e.len() - e.partition_point(|v| v * f <= hi);
    Counts { below, in_range: e.len() - below - above, above }
}

/// One point of a rack's dimming curve.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct DimmingPoint {
    /// The factor on every luminaire (1: as now).
    pub factor: f64,
    /// The positions below, in and above the range at that factor.
    #[serde(flatten)]
    pub counts: Counts,
}

/// A rack's positions against the dimming factor.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct RackDimming {
    /// Rack id.
    pub rack: String,
    /// Its positions.
    pub positions: usize,
    /// The guidance bounds compared.
    pub bounds: RackBounds,
    /// One point per factor asked for, in order.
    pub points: Vec<DimmingPoint>,
}

/// Every rack of `plan` with a guidance range, counted at each of `factors` on every luminaire
/// (dimming scales the light phase only, readings included): the summary pass gathers each
/// rack's lux values, sorted once, then each factor is two binary searches ([`counts`]).
pub fn dimming(plan: &crate::housing::pass::Plan, factors: &[f64]) -> Vec<RackDimming> {
    let sums = crate::housing::summary::summarise(plan);
    plan.room
        .racks
        .iter()
        .zip(&plan.racks)
        .zip(sums)
        .filter(|((_, rp), _)| rp.bounds.lower.is_some() || rp.bounds.upper.is_some())
        .map(|((r, rp), (_, data))| {
            let e = sorted_lux(data.lux);
            let points =
                factors.iter().map(|&factor| DimmingPoint { factor, counts: counts(&e, &rp.bounds, factor) });
            RackDimming { rack: r.id.clone(), positions: rp.len, bounds: rp.bounds, points: points.collect() }
        })
        .collect()
}

/// The lever of a rack from the summary pass's `data`, when the rack has guidance bounds.
pub fn lever(b: &RackBounds, mut data: LeverData) -> Option<Lever> {
    if b.lower.is_none() && b.upper.is_none() {
        return None;
    }
    // Racks are levered in parallel; each sorts its own values.
    let sorted = sorted_lux(std::mem::take(&mut data.lux));
    let e = &sorted;
    let lo = b.lower.map_or(f64::NEG_INFINITY, |l| l.lx);
    let hi = b.upper.map_or(f64::INFINITY, |u| u.lx);
    let factor = best_factor(e, b);
    let at = counts(e, b, factor);
    let mut worst: Vec<StayOut> = Vec::new();
    for &(v, index) in data.lowest.iter().filter(|x| x.0 * factor < lo) {
        worst.push(StayOut { index, lux: v * factor, needs: lo / (v * factor) });
    }
    for &(v, index) in data.highest.iter().filter(|x| x.0 * factor > hi) {
        worst.push(StayOut { index, lux: v * factor, needs: hi / (v * factor) });
    }
    worst.sort_by(|a, b| b.needs.ln().abs().total_cmp(&a.needs.ln().abs()).then(a.index.cmp(&b.index)));
    worst.truncate(LISTED);
    let (mn, mx) = (e.first().copied().unwrap_or(0.0), e.last().copied().unwrap_or(0.0));
    Some(Lever {
        factor,
        in_range_now: counts(e, b, 1.0).in_range,
        in_range_after: at.in_range,
        stay_below: at.below,
        stay_above: at.above,
        worst,
        spread: if mn > 0.0 { mx / mn } else { f64::INFINITY },
        range_ratio: hi / b.lower.map_or(0.0, |l| l.lx),
        dimming: (0..DIMMING_POINTS)
            .map(|k| 10f64.powf(-1.0 + 2.0 * k as f64 / (DIMMING_POINTS - 1) as f64))
            .map(|f| (f, counts(e, b, f).in_range))
            .collect(),
    })
}
