//! A holding room, resolved: ceiling luminaires, racks of cage positions (each with its own
//! animals, cage wall and shelf shading), the light–dark cycle, a dark-phase leak and timed
//! dark-phase events.
//!
//! Geometry: ceiling luminaires are downward Lambertian emitters of peak intensity I₀; on a
//! horizontal surface at vertical distance h below and distance d, E = I₀ cos θ · cos θ / d² =
//! I₀ h²/d⁴ (inverse-square and cosine laws), summed over luminaires, times a shading factor per
//! shelf above the position (a crude model of the rack's own shading). That is the "room
//! illuminance at cage level" the NRC Guide's numbers refer to; the animal inside the cage gets
//! it times the cage wall's transmittance.

use crate::base::error::{Error, Result};
use crate::pigment::kinetics::{Model, Pigment};
use crate::retina::eye::Species;
use crate::retina::pupil::PupilRule;
use crate::scenario::Pigmentation;
use crate::spectrum::Spectrum;

/// The most cage positions one room may hold (a cap is an error, never a truncation).
pub const MAX_POSITIONS: usize = 10_000_000;

/// The most timed dark-phase events one room may hold (each is a column group per position).
pub const MAX_EVENTS: usize = 4;

/// A downward-facing Lambertian luminaire.
#[derive(Debug, Clone, PartialEq)]
pub struct Luminaire {
    /// Name for reports.
    pub id: String,
    /// Position along the room, m.
    pub x_m: f64,
    /// Position across the room, m.
    pub y_m: f64,
    /// Height above the floor, m.
    pub z_m: f64,
    /// Peak (downward) luminous intensity, cd.
    pub intensity_cd: f64,
}

impl Luminaire {
    /// Illuminance on a horizontal surface at (x, y, z) below it per candela, lx/cd: h²/d⁴
    /// (0 for a point at or above the luminaire).
    pub fn lux_per_cd(&self, x_m: f64, y_m: f64, z_m: f64) -> f64 {
        let h = self.z_m - z_m;
        if h <= 0.0 {
            return 0.0;
        }
        let (dx, dy) = (self.x_m - x_m, self.y_m - y_m);
        let d2 = dx * dx + dy * dy + h * h;
        h * h / (d2 * d2)
    }
}

/// Where a rack's cages are.
#[derive(Debug, Clone, PartialEq)]
pub enum Layout {
    /// Shelves × columns in a row along x.
    Grid(Grid),
    /// Positions given one by one.
    List(Vec<Spot>),
}

/// A regular rack: `shelves` × `columns`, the columns along x.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Grid {
    /// Shelves (1 = bottom).
    pub shelves: u32,
    /// Columns (1 = first).
    pub columns: u32,
    /// Where the cages are; `None` when only readings describe the rack.
    pub place: Option<GridPlace>,
}

/// The coordinates of a regular rack.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GridPlace {
    /// x of the first column, m.
    pub x0_m: f64,
    /// Column spacing, m.
    pub column_spacing_m: f64,
    /// y of the rack, m.
    pub y_m: f64,
    /// Height of the bottom shelf's cage floor, m.
    pub bottom_m: f64,
    /// Shelf spacing, m.
    pub shelf_spacing_m: f64,
}

/// One position given by hand.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Spot {
    /// Shelf number, 1 = bottom.
    pub shelf: u32,
    /// Column number, 1 = first.
    pub column: u32,
    /// Coordinates of the cage floor, m (`None` when only readings describe it).
    pub at_m: Option<[f64; 3]>,
}

/// The animals housed on a rack.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
pub struct Animals {
    /// Species (mouse or rat).
    pub species: Species,
    /// Pigmentation; albino animals get the Guide's phototoxicity range.
    pub pigmentation: Pigmentation,
}

/// A rack of cages.
#[derive(Debug, Clone, PartialEq)]
pub struct Rack {
    /// Name for reports.
    pub id: String,
    /// Where its cages are.
    pub layout: Layout,
    /// Who lives on it.
    pub animals: Animals,
    /// Cage wall (or filter top) transmittance, 0–1.
    pub cage_transmittance: f64,
    /// Fraction passed per shelf above, 0–1.
    pub shelf_shading: f64,
    /// Pupil rule in the light phase.
    pub light_pupil: PupilRule,
    /// Pupil rule in the dark phase.
    pub dark_pupil: PupilRule,
    /// The rod pigment of the species and the model that runs it.
    pub pigment: Pigment,
}

impl Rack {
    /// The number of positions.
    pub fn len(&self) -> usize {
        match &self.layout {
            Layout::Grid(g) => g.shelves as usize * g.columns as usize,
            Layout::List(v) => v.len(),
        }
    }

    /// True for a rack without positions.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The highest shelf number.
    pub fn top_shelf(&self) -> u32 {
        match &self.layout {
            Layout::Grid(g) => g.shelves,
            Layout::List(v) => v.iter().map(|s| s.shelf).max().unwrap_or(0),
        }
    }

    /// The highest column number.
    pub fn last_column(&self) -> u32 {
        match &self.layout {
            Layout::Grid(g) => g.columns,
            Layout::List(v) => v.iter().map(|s| s.column).max().unwrap_or(0),
        }
    }

    /// Shelf and column of the `i`-th position (grid: bottom shelf first, then along x).
    pub fn shelf_column(&self, i: usize) -> (u32, u32) {
        match &self.layout {
            Layout::Grid(g) => ((i / g.columns as usize) as u32 + 1, (i % g.columns as usize) as u32 + 1),
            Layout::List(v) => (v[i].shelf, v[i].column),
        }
    }

    /// Coordinates of the `i`-th position's cage floor, m, when known.
    pub fn coordinates(&self, i: usize) -> Option<[f64; 3]> {
        match &self.layout {
            Layout::Grid(g) => g.place.map(|p| {
                let (s, c) = (i / g.columns as usize, i % g.columns as usize);
                [p.x0_m + c as f64 * p.column_spacing_m, p.y_m, p.bottom_m + s as f64 * p.shelf_spacing_m]
            }),
            Layout::List(v) => v[i].at_m,
        }
    }
}

/// How much light an event gives.
#[derive(Debug, Clone, PartialEq)]
pub enum EventLight {
    /// The same room illuminance at cage level at every position, lx.
    Uniform(f64),
    /// A luminaire of the room's kind (downward Lambertian) at a place.
    Luminaire(Luminaire),
}

/// A timed dark-phase event, every night.
#[derive(Debug, Clone, PartialEq)]
pub struct DarkEvent {
    /// Name for reports (free text).
    pub name: String,
    /// Spectrum of its light (shape).
    pub spectrum: Spectrum,
    /// Its light at cage level.
    pub light: EventLight,
    /// Start, after lights-off, s.
    pub start_s: f64,
    /// Duration, s.
    pub duration_s: f64,
    /// A rod R*/rod/s the event's light must stay at or below (with the leak), when the user
    /// asks for the brightest such light.
    pub rod_target: Option<crate::base::quantity::Frequency>,
}

/// How the model is fitted to the readings.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Calibration {
    /// No fit: the model as written.
    None,
    /// One intensity scale for all luminaires.
    OneScale,
    /// One intensity scale per luminaire.
    PerLuminaire,
}

/// A room, resolved.
#[derive(Debug, Clone, PartialEq)]
pub struct Room {
    /// Ceiling luminaires of the light phase.
    pub luminaires: Vec<Luminaire>,
    /// The racks.
    pub racks: Vec<Rack>,
    /// Spectrum of the light phase (shape).
    pub light_spectrum: Spectrum,
    /// Spectrum of the dark-phase leak (shape).
    pub leak_spectrum: Spectrum,
    /// Dark-phase leak at cage level where no dark reading is given, lx.
    pub leak_lux: f64,
    /// Light phase, s.
    pub light_s: f64,
    /// Dark phase, s.
    pub dark_s: f64,
    /// Days the cycle runs.
    pub days: u32,
    /// Timed dark-phase events, every night.
    pub events: Vec<DarkEvent>,
    /// Lux readings per position, when given.
    pub readings: Option<super::readings::Readings>,
    /// How the model is fitted to the readings.
    pub calibration: Calibration,
    /// The pigment model.
    pub model: Model,
}

impl Room {
    /// Positions over all racks.
    pub fn len(&self) -> usize {
        self.racks.iter().map(Rack::len).sum()
    }

    /// True for a room without positions.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The first global position index of each rack, and the total.
    pub fn offsets(&self) -> (Vec<usize>, usize) {
        let mut at = 0;
        let offsets = self
            .racks
            .iter()
            .map(|r| {
                let o = at;
                at += r.len();
                o
            })
            .collect();
        (offsets, at)
    }

    /// Checks what the file cannot: the number of positions and events, and that events fall
    /// inside the dark phase.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] saying what to change.
    pub fn check(&self) -> Result<()> {
        let n = self.racks.iter().try_fold(0usize, |a, r| a.checked_add(r.len())).unwrap_or(usize::MAX);
        if n > MAX_POSITIONS {
            return Err(Error::input(format!(
                "the racks hold {n} positions, more than the {MAX_POSITIONS} a room may hold"
            )));
        }
        if self.events.len() > MAX_EVENTS {
            return Err(Error::input(format!("{} events; a room may hold {MAX_EVENTS}", self.events.len())));
        }
        for e in &self.events {
            if e.start_s + e.duration_s > self.dark_s * (1.0 + 1e-12) {
                return Err(Error::input(format!(
                    "event '{}' ends {} s after lights-off, after the {} s dark phase",
                    e.name,
                    e.start_s + e.duration_s,
                    self.dark_s
                )));
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lambertian_ceiling_light_follows_the_cosine_and_inverse_square_laws() {
        let l = Luminaire { id: "a".into(), x_m: 0.0, y_m: 0.0, z_m: 3.0, intensity_cd: 1.0 };
        // Straight below at 2 m: 1/4 lx per cd.
        assert!((l.lux_per_cd(0.0, 0.0, 1.0) - 0.25).abs() < 1e-15);
        // 2 m below and 2 m aside: d = √8, cos θ = 2/√8; E = cos² θ / d² = (4/8)/8.
        assert!((l.lux_per_cd(2.0, 0.0, 1.0) - 0.0625).abs() < 1e-15);
        assert_eq!(l.lux_per_cd(0.0, 0.0, 3.0), 0.0);
    }
}
