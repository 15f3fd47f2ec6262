//! The room figures of a scenario with a `[room]`: the brightest and dimmest position's room
//! lux and each rack's positions within its guidance range, under the declared reading
//! uncertainty taken as one meter for every luminaire (a factor k on every luminaire's light
//! phase, as the dimming lever applies it: [`crate::housing::lever::counts`]). The room's
//! geometry, shading and cage walls are taken as exact. Each draw is exact: lux is linear in k,
//! and a count at k is two binary searches on the rack's sorted lux values.

use crate::base::error::{Error, Result};
use crate::housing::lever::{counts, sorted_lux};
use crate::housing::pass::RackBounds;
use crate::housing::summary::summarise;
use crate::scenario::file::Scenario;

use super::Figure;
use super::figures::{Figures, Var};

/// The room's positions as the Monte Carlo model of its figures.
pub(super) struct RoomModel {
    pub figures: Vec<Figure>,
    brightest: f64,
    dimmest: f64,
    /// Per rack with a guidance range: its sorted lux values and bounds.
    racks: Vec<(Vec<f64>, RackBounds)>,
}

impl RoomModel {
    /// The model of the room of `s` (the whole survey runs once).
    pub(super) fn new(s: &Scenario) -> Result<RoomModel> {
        let a = crate::assess::assess(s)?;
        let room =
            a.room.as_ref().ok_or_else(|| Error::input("the scenario has no [room]: no room figures"))?;
        let plan = &room.rows.0;
        let sums = summarise(plan);
        let brightest = sums.iter().filter_map(|(_, d)| d.highest.first().map(|x| x.0)).fold(0.0, f64::max);
        let dimmest =
            sums.iter().filter_map(|(_, d)| d.lowest.first().map(|x| x.0)).fold(f64::INFINITY, f64::min);
        let mut figures = vec![Figure::BrightestLux, Figure::DimmestLux];
        let mut racks = Vec::new();
        for ((r, rp), (_, data)) in plan.room.racks.iter().zip(&plan.racks).zip(sums) {
            if rp.bounds.lower.is_some() || rp.bounds.upper.is_some() {
                figures.push(Figure::InRange(r.id.clone()));
                racks.push((sorted_lux(data.lux), rp.bounds));
            }
        }
        if !dimmest.is_finite() {
            return Err(Error::input("the room has no positions: no room figures"));
        }
        Ok(RoomModel { figures, brightest, dimmest, racks })
    }
}

impl Figures for RoomModel {
    fn count(&self) -> usize {
        self.figures.len()
    }

    /// `x[0]` is the reading's factor k.
    fn eval(&self, x: &[f64], out: &mut [f64]) {
        let k = x[0];
        out[0] = self.brightest * k;
        out[1] = self.dimmest * k;
        for (o, (e, b)) in out[2..].iter_mut().zip(&self.racks) {
            *o = counts(e, b, k).in_range as f64;
        }
    }
}

/// The inputs of the room figures: the reading alone (the first of `vars`).
pub(super) fn room_vars(vars: &[Var]) -> Vec<Var> {
    vars.iter().take(1).cloned().collect()
}
