//! The dimming lever of a rack: the one factor applied to every luminaire that brings the most
//! positions into the guidance range, and the positions that stay outside even then.
//!
//! A position at E lx is in range at factor f when lower ≤ f·E ≤ upper, i.e. when ln E lies in
//! a window of width ln(upper/lower) placed by ln f. The best factor is therefore the placement
//! of that window over the sorted ln E covering the most points (two pointers over the sorted
//! values); among equally good placements the factor nearest 1 (the least change) is chosen,
//! inside the feasible interval. The count at the chosen factor is then recounted with the
//! same comparison the flags use, so the figure reported is what the factor achieves. Dimming
//! scales the light phase only, readings included (they are taken to come from the luminaires).

use rayon::prelude::*;

use crate::housing::pass::{Plan, RackBounds};

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
}

fn in_range(b: &RackBounds, e: f64) -> bool {
    !(b.lower.is_some_and(|l| e < l.lx) || b.upper.is_some_and(|u| e > u.lx))
}

/// The best factor for lux values `e` (any order) and the bounds; 1 when nothing can be gained.
pub fn best_factor(mut u: Vec<f64>, b: &RackBounds) -> f64 {
    let lo = b.lower.map_or(0.0, |l| l.lx);
    let hi = b.upper.map_or(f64::INFINITY, |u| u.lx);
    u.retain(|v| *v > 0.0 && v.is_finite());
    u.par_iter_mut().for_each(|v| *v = v.ln());
    if u.is_empty() || (lo <= 0.0 && hi.is_infinite()) {
        return 1.0;
    }
    u.par_sort_unstable_by(f64::total_cmp);
    let (llo, lhi) = (lo.ln(), hi.ln());
    let (mut best, mut best_f) = (0usize, 0.0f64);
    let mut j = 0;
    for i in 0..u.len() {
        j = j.max(i);
        while j + 1 < u.len() && u[j + 1] - u[i] <= lhi - llo {
            j += 1;
        }
        // ln f must lie in [llo − u_i, lhi − u_j]; pick the point nearest 0, inside.
        let (a, c) = (llo - u[i], lhi - u[j]);
        let f = 0.0f64.clamp(a.min(c), c.max(a));
        let f = if a.is_finite() && c.is_finite() && c > a {
            let inset = ((c - a) * 0.25).min(1e-9);
            f.clamp(a + inset, c - inset)
        } else {
            f
        };
        let count = j + 1 - i;
        if count > best || (count == best && f.abs() < best_f.abs()) {
            (best, best_f) = (count, f);
        }
    }
    best_f.exp()
}

/// The lever of rack `rack`, when it has guidance bounds.
pub fn lever(plan: &Plan, rack: usize) -> Option<Lever> {
    let rp = &plan.racks[rack];
    let b = rp.bounds;
    if b.lower.is_none() && b.upper.is_none() {
        return None;
    }
    let range = rp.offset..rp.offset + rp.len;
    let e: Vec<f64> = range.clone().into_par_iter().map(|i| plan.room_lux(rack, i).0).collect();
    let in_range_now = e.iter().filter(|v| in_range(&b, **v)).count();
    let (mn, mx) = e.iter().fold((f64::INFINITY, 0.0f64), |(a, c), v| (a.min(*v), c.max(*v)));
    let factor = best_factor(e, &b);
    let mut out: Vec<StayOut> = Vec::new();
    let (mut below, mut above) = (0, 0);
    for i in range.clone() {
        let lux = plan.room_lux(rack, i).0 * factor;
        let needs = match (b.lower, b.upper) {
            (Some(l), _) if lux < l.lx => {
                below += 1;
                l.lx / lux
            }
            (_, Some(u)) if lux > u.lx => {
                above += 1;
                u.lx / lux
            }
            _ => continue,
        };
        out.push(StayOut { index: i, lux, needs });
        if out.len() > 4 * LISTED {
            keep_worst(&mut out);
        }
    }
    keep_worst(&mut out);
    Some(Lever {
        factor,
        in_range_now,
        in_range_after: rp.len - below - above,
        stay_below: below,
        stay_above: above,
        worst: out,
        spread: if mn > 0.0 { mx / mn } else { f64::INFINITY },
        range_ratio: b.upper.map_or(f64::INFINITY, |u| u.lx) / b.lower.map_or(0.0, |l| l.lx),
    })
}

/// Keeps the [`LISTED`] furthest out (largest |ln needs|), ties by index.
fn keep_worst(v: &mut Vec<StayOut>) {
    v.sort_by(|a, b| b.needs.ln().abs().total_cmp(&a.needs.ln().abs()).then(a.index.cmp(&b.index)));
    v.truncate(LISTED);
}
