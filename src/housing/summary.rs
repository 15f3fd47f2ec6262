//! Per-rack summaries of the per-position pass, the dimming lever, and streaming of the rows.
//!
//! Summaries are folded over blocks on every core and merged (ties go to the lower position
//! index, so the result does not depend on the split). Rows are computed block by block on
//! every core into one reused buffer and handed to a sink in position order.

use rayon::prelude::*;

use crate::housing::lever::LeverData;
use crate::housing::pass::{BLOCK, Basis, EventAt, Flags, Memo, Plan, PositionRow};
use crate::housing::room::MAX_EVENTS;

/// Smallest and largest value of a figure over positions, where they are, and the sum.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Extremes {
    /// Smallest value.
    pub min: f64,
    /// Global index of the smallest.
    pub min_at: usize,
    /// Largest value.
    pub max: f64,
    /// Global index of the largest.
    pub max_at: usize,
    /// Sum (for the mean).
    pub sum: f64,
}

impl Default for Extremes {
    fn default() -> Self {
        Extremes {
            min: f64::INFINITY,
            min_at: usize::MAX,
            max: f64::NEG_INFINITY,
            max_at: usize::MAX,
            sum: 0.0,
        }
    }
}

impl Extremes {
    fn add(&mut self, v: f64, at: usize) {
        if v < self.min || (v == self.min && at < self.min_at) {
            (self.min, self.min_at) = (v, at);
        }
        if v > self.max || (v == self.max && at < self.max_at) {
            (self.max, self.max_at) = (v, at);
        }
        self.sum += v;
    }

    fn merge(&mut self, o: &Extremes) {
        if o.min_at != usize::MAX {
            self.add_min_max(o);
        }
        self.sum += o.sum;
    }

    fn add_min_max(&mut self, o: &Extremes) {
        if o.min < self.min || (o.min == self.min && o.min_at < self.min_at) {
            (self.min, self.min_at) = (o.min, o.min_at);
        }
        if o.max > self.max || (o.max == self.max && o.max_at < self.max_at) {
            (self.max, self.max_at) = (o.max, o.max_at);
        }
    }
}

/// One dark-phase event over a rack.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct EventSummary {
    /// Room illuminance at cage level.
    pub room_lux: Extremes,
    /// Rod R*/rod/s during it.
    pub rod_rate: Extremes,
    /// Melanopsin photon irradiance during it, m⁻²·s⁻¹.
    pub melanopsin: Extremes,
    /// Rod bleach at its end.
    pub peak_bleach: Extremes,
    /// Time after it until its extra bleach has fallen to a tenth, s.
    pub recovery_s: Extremes,
}

/// A rack's figures over its positions.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct RackSummary {
    /// Positions.
    pub positions: usize,
    /// Positions by basis: reading, model as written, calibrated prediction.
    pub basis: [usize; 3],
    /// Light-phase room illuminance at cage level.
    pub room_lux: Extremes,
    /// Reading ÷ model as written, over positions with both.
    pub reading_over_model: Extremes,
    /// Positions above the upper bound.
    pub above: usize,
    /// Positions below the lower bound.
    pub below: usize,
    /// Positions with any flag.
    pub flagged: usize,
    /// Positions with dark-phase light (leak or event).
    pub dark_flagged: usize,
    /// Rod R*/rod/s in the light phase.
    pub rod_rate: Extremes,
    /// Steady light-phase bleach.
    pub light_bleach: Extremes,
    /// Time to 90 % after lights-off, s.
    pub recovery_90_s: Extremes,
    /// Dark-phase leak at cage level.
    pub leak_lux: Extremes,
    /// Rod R*/rod/s from the leak.
    pub leak_rod_rate: Extremes,
    /// Melanopsin photon irradiance from the leak.
    pub leak_melanopsin: Extremes,
    /// Steady rod bleach under the leak alone.
    pub leak_bleach: Extremes,
    /// Each event (the room's order).
    pub events: Vec<EventSummary>,
    /// Melanopsin-weighted photon exposure per night, m⁻².
    pub melanopic_dose: Extremes,
}

impl RackSummary {
    fn new(events: usize) -> RackSummary {
        let e = Extremes::default();
        RackSummary {
            positions: 0,
            basis: [0; 3],
            room_lux: e,
            reading_over_model: e,
            above: 0,
            below: 0,
            flagged: 0,
            dark_flagged: 0,
            rod_rate: e,
            light_bleach: e,
            recovery_90_s: e,
            leak_lux: e,
            leak_rod_rate: e,
            leak_melanopsin: e,
            leak_bleach: e,
            events: vec![EventSummary::default(); events],
            melanopic_dose: e,
        }
    }

    fn add(&mut self, r: &PositionRow) {
        let i = r.index;
        self.positions += 1;
        self.basis[r.basis as usize] += 1;
        self.room_lux.add(r.room_lux, i);
        if r.reading_lux.is_finite() && r.model_lux > 0.0 {
            self.reading_over_model.add(r.reading_lux / r.model_lux, i);
        }
        self.above += usize::from(r.flags.has(Flags::ABOVE));
        self.below += usize::from(r.flags.has(Flags::BELOW));
        self.flagged += usize::from(r.flags.any());
        self.dark_flagged += usize::from(r.flags.has(Flags::LEAK) || r.flags.has(Flags::EVENT));
        self.rod_rate.add(r.rod_rate, i);
        self.light_bleach.add(r.light_bleach, i);
        self.recovery_90_s.add(r.recovery_90_s, i);
        self.leak_lux.add(r.leak_lux, i);
        self.leak_rod_rate.add(r.leak_rod_rate, i);
        self.leak_melanopsin.add(r.leak_melanopsin, i);
        self.leak_bleach.add(r.leak_bleach, i);
        for (s, e) in self.events.iter_mut().zip(&r.events) {
            add_event(s, e, i);
        }
        self.melanopic_dose.add(r.melanopic_dose, i);
    }

    fn merge(mut self, o: RackSummary) -> RackSummary {
        self.positions += o.positions;
        for k in 0..3 {
            self.basis[k] += o.basis[k];
        }
        (self.above, self.below) = (self.above + o.above, self.below + o.below);
        (self.flagged, self.dark_flagged) = (self.flagged + o.flagged, self.dark_flagged + o.dark_flagged);
        for (a, b) in self.extremes_mut().into_iter().zip(o.extremes()) {
            a.merge(&b);
        }
        for (a, b) in self.events.iter_mut().zip(&o.events) {
            for (x, y) in [
                (&mut a.room_lux, b.room_lux),
                (&mut a.rod_rate, b.rod_rate),
                (&mut a.melanopsin, b.melanopsin),
                (&mut a.peak_bleach, b.peak_bleach),
                (&mut a.recovery_s, b.recovery_s),
            ] {
                x.merge(&y);
            }
        }
        self
    }

    fn extremes_mut(&mut self) -> [&mut Extremes; 10] {
        [
            &mut self.room_lux,
            &mut self.reading_over_model,
            &mut self.rod_rate,
            &mut self.light_bleach,
            &mut self.recovery_90_s,
            &mut self.leak_lux,
            &mut self.leak_rod_rate,
            &mut self.leak_melanopsin,
            &mut self.leak_bleach,
            &mut self.melanopic_dose,
        ]
    }

    fn extremes(&self) -> [Extremes; 10] {
        [
            self.room_lux,
            self.reading_over_model,
            self.rod_rate,
            self.light_bleach,
            self.recovery_90_s,
            self.leak_lux,
            self.leak_rod_rate,
            self.leak_melanopsin,
            self.leak_bleach,
            self.melanopic_dose,
        ]
    }
}

fn add_event(s: &mut EventSummary, e: &EventAt, i: usize) {
    s.room_lux.add(e.room_lux, i);
    s.rod_rate.add(e.rod_rate, i);
    s.melanopsin.add(e.melanopsin, i);
    s.peak_bleach.add(e.peak_bleach, i);
    s.recovery_s.add(e.recovery_s, i);
}

/// Summarises every rack, on every core, with the data of its lever.
pub fn summarise(plan: &Plan) -> Vec<(RackSummary, LeverData)> {
    let events = plan.room.events.len();
    let empty = || vec![(RackSummary::new(events), LeverData::default()); plan.racks.len()];
    let n = plan.len();
    (0..n.div_ceil(BLOCK))
        .into_par_iter()
        .fold(empty, |mut acc, b| {
            let mut memo = Memo::default();
            for i in b * BLOCK..((b + 1) * BLOCK).min(n) {
                let r = plan.row_with(i, &mut memo);
                let (sum, lever) = &mut acc[r.rack];
                sum.add(&r);
                let bounds = &plan.racks[r.rack].bounds;
                if bounds.lower.is_some() || bounds.upper.is_some() {
                    lever.add(r.room_lux, i);
                }
            }
            acc
        })
        .reduce(empty, |a, b| {
            a.into_iter()
                .zip(b)
                .map(|((s1, l1), (s2, mut l2))| {
                    // Keep the lux values in block order (the lever sorts them anyway).
                    let mut l = l1;
                    l.merge(std::mem::take(&mut l2));
                    (s1.merge(s2), l)
                })
                .collect()
        })
}

/// Computes every row, on every core, and hands them to `sink` in position order, a block of
/// [`BLOCK`] × threads at a time (memory does not grow with the number of positions).
///
/// # Errors
/// The sink's first error, which stops the pass.
pub fn stream<E>(plan: &Plan, mut sink: impl FnMut(&[PositionRow]) -> Result<(), E>) -> Result<(), E> {
    let n = plan.len();
    let span = BLOCK * rayon::current_num_threads().max(1);
    let blank = PositionRow {
        index: 0,
        rack: 0,
        shelf: 0,
        column: 0,
        basis: Basis::Model,
        model_lux: 0.0,
        calibrated_lux: 0.0,
        reading_lux: 0.0,
        room_lux: 0.0,
        cage_lux: 0.0,
        rod_rate: 0.0,
        opic: [0.0; 4],
        light_bleach: 0.0,
        recovery_90_s: 0.0,
        leak_lux: 0.0,
        leak_rod_rate: 0.0,
        leak_melanopsin: 0.0,
        leak_bleach: 0.0,
        events: [EventAt::default(); MAX_EVENTS],
        melanopic_dose: 0.0,
        flags: Flags(0),
    };
    let mut buf = vec![blank; span.min(n)];
    let mut start = 0;
    while start < n {
        let len = span.min(n - start);
        buf[..len].par_chunks_mut(1024).enumerate().for_each(|(k, chunk)| {
            let mut memo = Memo::default();
            for (j, slot) in chunk.iter_mut().enumerate() {
                *slot = plan.row_with(start + k * 1024 + j, &mut memo);
            }
        });
        sink(&buf[..len])?;
        start += len;
    }
    Ok(())
}
