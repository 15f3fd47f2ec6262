//! The per-position pass of a room survey, over plain numbers.
//!
//! Everything that depends on a spectrum or an eye is computed once per rack into a
//! [`RackPlan`] (the chain is linear in light, so a position at N lx gets N times the per-lux
//! figures); shelf shading is a table per shelf; each position then costs a few
//! multiplications and the closed-form pigment kinetics. Flags are bits ([`Flags`]); words are
//! made only when a report is rendered. The work is split over the machine's cores in blocks,
//! and rows are handed out block by block in position order, so output can be streamed without
//! holding every row.
//!
//! The cycle: the light phase holds the rod pigment at its steady state for that light
//! (checked per position: from any starting bleach the light phase comes within
//! [`SETTLED`] of it), so every day is the same and one day gives the figures of all `days`.
//! When a light phase is too short for that, the days are run one after another from a
//! dark-adapted start and the last day is reported.

use std::ops::Range;

use crate::housing::room::{EventLight, MAX_EVENTS, Room};
use crate::pigment::kinetics::{Constants, Model, advance, light_time_to, steady_state};

/// Bleached fraction within which a pigment counts as settled at its steady state.
pub const SETTLED: f64 = 1e-12;

/// ln(1/[`SETTLED`]): a contraction λ·t at least this settles any bleach (≤ 1) to within
/// [`SETTLED`].
const SETTLED_DECAY: f64 = 27.631_021_115_928_547;

/// Positions per block handed to the threads.
pub const BLOCK: usize = 16_384;

/// Per-lux factors of one light and eye (room illuminance at cage level, 1 lx, full field,
/// through the cage wall).
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct PerLux {
    /// Rod R*/rod/s per lux.
    pub rod_rate: f64,
    /// Species α-opic photon irradiance per lux (rod, M cone, UV cone, melanopsin), m⁻²·s⁻¹.
    pub opic: [f64; 4],
}

/// Housing flags of one position, as bits (serialised as their names).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Flags(pub u8);

impl serde::Serialize for Flags {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeSeq;
        let mut seq = s.serialize_seq(None)?;
        for name in self.names() {
            seq.serialize_element(name)?;
        }
        seq.end()
    }
}

impl Flags {
    /// Room light at cage level above the rack's upper guidance bound.
    pub const ABOVE: u8 = 1;
    /// Below the lower guidance bound.
    pub const BELOW: u8 = 2;
    /// Light from the dark-phase leak (any light in the dark phase is flagged for review).
    pub const LEAK: u8 = 4;
    /// Light from a dark-phase event.
    pub const EVENT: u8 = 8;

    /// True when `bit` is set.
    pub fn has(self, bit: u8) -> bool {
        self.0 & bit != 0
    }

    /// True when any flag is set.
    pub fn any(self) -> bool {
        self.0 != 0
    }

    /// The names of the flags set: `above`, `below`, `leak`, `event`.
    pub fn names(self) -> impl Iterator<Item = &'static str> {
        [(Self::ABOVE, "above"), (Self::BELOW, "below"), (Self::LEAK, "leak"), (Self::EVENT, "event")]
            .into_iter()
            .filter(move |(b, _)| self.has(*b))
            .map(|(_, n)| n)
    }
}

/// Where a position's light-phase illuminance comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Basis {
    /// A reading.
    #[default]
    Reading,
    /// The luminaire model as written.
    Model,
    /// The model calibrated to the readings (a prediction where there is no reading).
    Predicted,
}

/// One dark-phase event at one position.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct EventAt {
    /// Its room illuminance at cage level, lx.
    pub room_lux: f64,
    /// Rod R*/rod/s during it (with the leak).
    pub rod_rate: f64,
    /// Melanopsin-weighted photon irradiance during it (with the leak), m⁻²·s⁻¹.
    pub melanopsin: f64,
    /// Rod bleach at its end (fraction).
    pub peak_bleach: f64,
    /// Time after it until its extra bleach has fallen to a tenth, s.
    pub recovery_s: f64,
}

/// Everything computed at one position.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct PositionRow {
    /// Global index.
    pub index: usize,
    /// Rack index.
    pub rack: usize,
    /// Shelf, 1 = bottom.
    pub shelf: u32,
    /// Column.
    pub column: u32,
    /// Where `room_lux` comes from.
    pub basis: Basis,
    /// The luminaire model as written, lx (NaN without luminaires).
    pub model_lux: f64,
    /// The calibrated model, lx (NaN without a calibration).
    pub calibrated_lux: f64,
    /// The reading, lx (NaN where none).
    pub reading_lux: f64,
    /// Room illuminance at cage level in the light phase, lx (the Guide's quantity).
    pub room_lux: f64,
    /// Inside the cage, lx.
    pub cage_lux: f64,
    /// Rod R*/rod/s in the light phase.
    pub rod_rate: f64,
    /// Species α-opic photon irradiance in the light phase (rod, M cone, UV cone, melanopsin).
    pub opic: [f64; 4],
    /// Steady rod bleach in the light phase (fraction).
    pub light_bleach: f64,
    /// Time after lights-off until 90 % of the rod pigment is back, s (∞ if the leak holds it).
    pub recovery_90_s: f64,
    /// Dark-phase leak at cage level, lx.
    pub leak_lux: f64,
    /// Rod R*/rod/s from the leak.
    pub leak_rod_rate: f64,
    /// Melanopsin photon irradiance from the leak, m⁻²·s⁻¹.
    pub leak_melanopsin: f64,
    /// Steady rod bleach under the leak alone.
    pub leak_bleach: f64,
    /// The events, in the room's order (the first as many as the room has are used; serialised
    /// by [`crate::housing::survey::Rows`]).
    #[serde(skip)]
    pub events: [EventAt; MAX_EVENTS],
    /// Melanopsin-weighted photon exposure per night (leak and events), m⁻².
    pub melanopic_dose: f64,
    /// Flags.
    pub flags: Flags,
}

/// A guidance bound for a rack: which set and rule, and its value in lx.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Bound {
    /// Index of the guidance set in the scenario's list.
    pub set: usize,
    /// Index of the rule in its set.
    pub rule: usize,
    /// The bound, lx.
    pub lx: f64,
}

/// The guidance bounds that apply to a rack's animals.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct RackBounds {
    /// Light phase, lower (the strictest of the sets).
    pub lower: Option<Bound>,
    /// Light phase, upper (the strictest).
    pub upper: Option<Bound>,
    /// Dark phase, upper.
    pub dark: Option<Bound>,
}

/// What is precomputed for one rack.
#[derive(Debug, Clone, PartialEq)]
pub struct RackPlan {
    /// First global index.
    pub offset: usize,
    /// Positions.
    pub len: usize,
    /// Shading factor per shelf (index shelf − 1).
    pub shade: Vec<f64>,
    /// Light phase per lux, through the cage wall.
    pub light: PerLux,
    /// Leak per lux, through the cage wall.
    pub leak: PerLux,
    /// Each event per lux, through the cage wall.
    pub events: Vec<PerLux>,
    /// Cage wall transmittance.
    pub cage_transmittance: f64,
    /// Rod pigment k (s⁻¹) per R*/rod/s.
    pub k_per_rate: f64,
    /// Pigment constants.
    pub constants: Constants,
    /// Guidance bounds.
    pub bounds: RackBounds,
}

/// A room ready for the per-position pass.
#[derive(Debug, Clone, PartialEq)]
pub struct Plan {
    /// The room.
    pub room: std::sync::Arc<Room>,
    /// One per rack.
    pub racks: Vec<RackPlan>,
    /// Luminaire intensity scales from the calibration (`None` without one).
    pub scales: Option<Vec<f64>>,
    /// Events in start order, as indexes into `room.events`.
    pub event_order: Vec<usize>,
}

impl Plan {
    /// Positions.
    pub fn len(&self) -> usize {
        self.racks.last().map_or(0, |r| r.offset + r.len)
    }

    /// True without positions.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The rack holding global position `i`.
    pub fn rack_of(&self, i: usize) -> usize {
        self.racks.partition_point(|r| r.offset + r.len <= i)
    }

    /// Light-phase illuminance from the luminaires at a position: (as written, calibrated), lx.
    fn model_lux(&self, rack: usize, local: usize) -> (f64, f64) {
        let r = &self.room.racks[rack];
        let Some([x, y, z]) = r.coordinates(local) else { return (f64::NAN, f64::NAN) };
        if self.room.luminaires.is_empty() {
            return (f64::NAN, f64::NAN);
        }
        let (shelf, _) = r.shelf_column(local);
        let shade = self.racks[rack].shade[shelf as usize - 1];
        let (mut raw, mut cal) = (0.0, 0.0);
        for (j, l) in self.room.luminaires.iter().enumerate() {
            let e = l.intensity_cd * l.lux_per_cd(x, y, z);
            raw += e;
            cal += e * self.scales.as_ref().map_or(1.0, |s| s[j]);
        }
        (raw * shade, if self.scales.is_some() { cal * shade } else { f64::NAN })
    }

    /// The light-phase room illuminance at cage level used for a position, and its basis.
    pub fn room_lux(&self, rack: usize, i: usize) -> (f64, Basis, f64, f64, f64) {
        let local = i - self.racks[rack].offset;
        let reading = self.room.readings.as_ref().and_then(|r| r.at(i));
        let (raw, cal) = self.model_lux(rack, local);
        let (lux, basis) = match reading {
            Some(y) => (y, Basis::Reading),
            None if self.scales.is_some() => (cal, Basis::Predicted),
            None => (raw, Basis::Model),
        };
        (lux, basis, raw, cal, reading.unwrap_or(f64::NAN))
    }

    /// Event `e`'s room illuminance at cage level at a position, lx.
    fn event_lux(&self, e: usize, rack: usize, local: usize) -> f64 {
        match &self.room.events[e].light {
            EventLight::Uniform(lx) => *lx,
            EventLight::Luminaire(l) => {
                let r = &self.room.racks[rack];
                let (shelf, _) = r.shelf_column(local);
                r.coordinates(local).map_or(0.0, |[x, y, z]| {
                    l.intensity_cd * l.lux_per_cd(x, y, z) * self.racks[rack].shade[shelf as usize - 1]
                })
            }
        }
    }

    /// Computes the row of global position `i`.
    pub fn row(&self, i: usize) -> PositionRow {
        self.row_with(i, &mut Memo::default())
    }

    /// Computes the row of global position `i`, reusing `memo` (one per thread) for event
    /// kinetics whose inputs equal the previous position's (the same figures, not an estimate).
    pub fn row_with(&self, i: usize, memo: &mut Memo) -> PositionRow {
        let rack = self.rack_of(i);
        let rp = &self.racks[rack];
        let local = i - rp.offset;
        let (shelf, column) = self.room.racks[rack].shelf_column(local);
        let (room_lux, basis, model_lux, calibrated_lux, reading_lux) = self.room_lux(rack, i);
        let leak_lux = self
            .room
            .readings
            .as_ref()
            .and_then(|r| r.dark_lux.as_ref())
            .map(|d| d[i])
            .filter(|v| !v.is_nan())
            .unwrap_or(self.room.leak_lux);
        let mut row = PositionRow {
            index: i,
            rack,
            shelf,
            column,
            basis,
            model_lux,
            calibrated_lux,
            reading_lux,
            room_lux,
            cage_lux: room_lux * rp.cage_transmittance,
            rod_rate: room_lux * rp.light.rod_rate,
            opic: rp.light.opic.map(|f| f * room_lux),
            light_bleach: 0.0,
            recovery_90_s: 0.0,
            leak_lux,
            leak_rod_rate: leak_lux * rp.leak.rod_rate,
            leak_melanopsin: leak_lux * rp.leak.opic[3],
            leak_bleach: 0.0,
            events: [EventAt::default(); MAX_EVENTS],
            melanopic_dose: leak_lux * rp.leak.opic[3] * self.room.dark_s,
            flags: Flags(0),
        };
        for (e, per) in rp.events.iter().enumerate() {
            let lux = self.event_lux(e, rack, local);
            row.events[e] = EventAt {
                room_lux: lux,
                rod_rate: row.leak_rod_rate + lux * per.rod_rate,
                melanopsin: row.leak_melanopsin + lux * per.opic[3],
                ..EventAt::default()
            };
            row.melanopic_dose += lux * per.opic[3] * self.room.events[e].duration_s;
        }
        self.pigment(rp, &mut row, memo);
        row.flags = flags(&rp.bounds, &row, rp.events.len());
        row
    }

    /// Computes rows `range` into `out` (cleared first).
    pub fn rows_into(&self, range: Range<usize>, out: &mut Vec<PositionRow>) {
        out.clear();
        let mut memo = Memo::default();
        out.extend(range.map(|i| self.row_with(i, &mut memo)));
    }
}

fn flags(b: &RackBounds, row: &PositionRow, events: usize) -> Flags {
    let mut f = 0;
    if b.upper.is_some_and(|u| row.room_lux > u.lx) {
        f |= Flags::ABOVE;
    }
    if b.lower.is_some_and(|l| row.room_lux < l.lx) {
        f |= Flags::BELOW;
    }
    if let Some(d) = b.dark {
        if row.leak_lux > d.lx {
            f |= Flags::LEAK;
        }
        if row.events[..events].iter().any(|e| e.room_lux + row.leak_lux > d.lx && e.room_lux > 0.0) {
            f |= Flags::EVENT;
        }
    }
    Flags(f)
}

/// The inputs of one event's kinetics (bit patterns of the starting bleach, the event's and the
/// leak's rate constants and v) and its outcome (peak bleach, recovery time).
type EventMemo = Option<([u64; 4], (f64, f64))>;

/// Event kinetics of the previous position, per event.
#[derive(Debug, Clone, Default)]
pub struct Memo {
    events: [EventMemo; MAX_EVENTS],
}

/// The pigment through one cycle at a position (see the module notes).
struct Kinetics {
    model: Model,
    c: Constants,
}

impl Kinetics {
    fn steady(&self, k: f64) -> f64 {
        steady_state(self.model, self.c, k)
    }

    /// A rate λ with |B(t) − B∞| ≤ |B₀ − B∞|·e^(−λt) at constant k while B stays at or below
    /// `b_max`. Rushton: λ = k + 1/τ₀ exactly. Rate-limited: dB/dt = f(B) = k(1 − B) − vB/(K_m +
    /// B) has |f′(B)| = k + vK_m/(K_m + B)², which falls as B rises; B moves monotonically
    /// between B₀ and B∞, so on that stretch |f(B)| ≥ (k + vK_m/(K_m + b_max)²)·|B − B∞| with
    /// b_max = max(B₀, B∞), and the distance shrinks at least that fast.
    fn contraction(&self, k: f64, b_max: f64) -> f64 {
        match self.model {
            Model::Rushton => k + 1.0 / self.c.tau0_s,
            Model::RateLimited => {
                k + self.c.v_per_s * self.c.k_m / ((self.c.k_m + b_max) * (self.c.k_m + b_max))
            }
        }
    }

    /// The state after `dt` at `k` from `b0`, or the steady state when it is reached within
    /// [`SETTLED`]: first by the contraction bound (no logarithms), then by the closed-form time.
    fn settle(&self, b0: f64, k: f64, dt: f64) -> f64 {
        let bs = self.steady(k);
        let near = if b0 > bs { bs + SETTLED } else { bs - SETTLED };
        let gap = (b0 - bs).abs();
        let decay = self.contraction(k, b0.max(bs)) * dt;
        // gap ≤ 1, so λ·dt ≥ ln(1/SETTLED) settles without an exponential.
        if gap <= SETTLED || decay >= SETTLED_DECAY || gap * (-decay).exp() <= SETTLED {
            return bs;
        }
        match light_time_to(self.model, self.c, b0, k, near) {
            Some(t) if t <= dt => bs,
            _ => advance(self.model, self.c, b0, k, dt),
        }
    }

    /// Time from `b0` until the bleach reaches `b` at `k` (∞ if never).
    fn time_to(&self, b0: f64, k: f64, b: f64) -> f64 {
        if b0 <= b {
            return 0.0;
        }
        light_time_to(self.model, self.c, b0, k, b).unwrap_or(f64::INFINITY)
    }
}

impl Plan {
    fn pigment(&self, rp: &RackPlan, row: &mut PositionRow, memo: &mut Memo) {
        let kin = Kinetics { model: self.room.model, c: rp.constants };
        let k_light = row.rod_rate * rp.k_per_rate;
        let k_leak = row.leak_rod_rate * rp.k_per_rate;
        row.light_bleach = kin.steady(k_light);
        row.leak_bleach = kin.steady(k_leak);
        // Day one starts dark-adapted. When the light phase brings the state at lights-on back
        // to the light's steady state, the next day repeats this one exactly (to SETTLED), so
        // one day gives the figures of all; otherwise the days run on until they repeat.
        let mut b_on = 0.0;
        for _ in 0..self.room.days.max(1) {
            let b_off = kin.settle(b_on, k_light, self.room.light_s);
            let next = self.night(&kin, rp, row, b_off, memo);
            if kin.settle(next, k_light, self.room.light_s) == b_off || (next - b_on).abs() <= SETTLED * 1e-3
            {
                break;
            }
            b_on = next;
        }
    }

    /// Runs one dark phase from `b_off`, filling the row's dark figures; returns the bleach at
    /// lights-on.
    fn night(
        &self,
        kin: &Kinetics,
        rp: &RackPlan,
        row: &mut PositionRow,
        b_off: f64,
        memo: &mut Memo,
    ) -> f64 {
        let k_leak = row.leak_rod_rate * rp.k_per_rate;
        row.recovery_90_s = kin.time_to(b_off, k_leak, 0.10);
        let (mut b, mut t) = (b_off, 0.0);
        for &e in &self.event_order {
            let ev = &self.room.events[e];
            b = kin.settle(b, k_leak, ev.start_s - t);
            let k_ev = row.events[e].rod_rate * rp.k_per_rate;
            let key = [b.to_bits(), k_ev.to_bits(), k_leak.to_bits(), rp.constants.v_per_s.to_bits()];
            let (peak, recovery) = match memo.events[e] {
                Some((k, v)) if k == key => v,
                _ => {
                    let peak = kin.settle(b, k_ev, ev.duration_s);
                    let v =
                        (peak, kin.time_to(peak, k_leak, row.leak_bleach + 0.1 * (peak - row.leak_bleach)));
                    memo.events[e] = Some((key, v));
                    v
                }
            };
            b = peak;
            t = ev.start_s + ev.duration_s;
            row.events[e].peak_bleach = peak;
            row.events[e].recovery_s = recovery;
        }
        kin.settle(b, k_leak, self.room.dark_s - t)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_settling_decay_is_ln_of_one_over_settled() {
        assert!((SETTLED_DECAY + SETTLED.ln()).abs() < 1e-12);
    }
}
