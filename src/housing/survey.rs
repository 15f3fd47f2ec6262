//! Housing surveys: light at many cage positions of a rack, what the rodent retina receives
//! there, the rod bleach it holds, the dark-phase leak in the same terms, and housing flags.
//!
//! Everything that depends on the spectrum is computed once per lux (the chain is linear in
//! light), so each position costs a few multiplications: 100 000 positions take milliseconds.
//!
//! Geometry mode: ceiling luminaires as downward Lambertian emitters of peak intensity I₀; on a
//! horizontal surface at vertical distance h and distance d, E = I₀ cos θ · cos θ / d² = I₀ h²/d⁴
//! (inverse-square and cosine laws), summed over luminaires, times a shading factor per shelf
//! above the position (a crude model of the rack's own shading) — the "room illuminance at cage
//! level" that the NRC Guide's numbers refer to. The animal inside the cage gets that times the
//! cage wall or filter-top transmittance. Measured mode: lux readings at cage level per position.

use crate::base::error::{Error, Result};
use crate::housing::guidance::{AppliesTo, GuidanceQuantity, GuidanceSet, Rule};
use crate::pigment::kinetics::{Model, Pigment, dark_time_to, light_time_to, steady_state};
use uom::si::f64::Illuminance;
use uom::si::illuminance::lux as lx;

use crate::base::quantity::SiValue;
use crate::cornea::PlacedSource;
use crate::cornea::filter::Filter;
use crate::cornea::geometry::{Field, Geometry};
use crate::pigment::kinetics::LevelUnit;
use crate::retina::pupil::PupilRule;
use crate::retina::report::{RetinaScenario, assess_retina};
use crate::spectrum::Spectrum;
use crate::spectrum::scale::{ScaleTarget, scale_to};

/// A downward-facing Lambertian ceiling luminaire.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Luminaire {
    /// Position along the room, m.
    pub x_m: f64,
    /// Position across the room, m.
    pub y_m: f64,
    /// Height above the floor, m.
    pub z_m: f64,
    /// Peak (downward) luminous intensity, cd.
    pub intensity_cd: f64,
}

/// One cage position.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Position {
    /// Shelf number, 1 = bottom.
    pub shelf: usize,
    /// Column number, 1 = first.
    pub column: usize,
    /// Position of the cage floor, m.
    pub x_m: f64,
    /// Across, m.
    pub y_m: f64,
    /// Height of the cage floor, m.
    pub z_m: f64,
    /// Number of shelves above (for shading).
    pub shelves_above: usize,
}

/// The most cage positions one survey may hold (a cap is an error, never a truncation).
pub const MAX_POSITIONS: usize = 100_000;

/// A rack of shelves × columns in a row along x.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rack {
    /// Shelves.
    pub shelves: usize,
    /// Columns.
    pub columns: usize,
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

impl Rack {
    /// The number of positions, shelves × columns.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for more than [`MAX_POSITIONS`].
    pub fn count(&self) -> Result<usize> {
        self.shelves.checked_mul(self.columns).filter(|n| *n <= MAX_POSITIONS).ok_or_else(|| {
            Error::input(format!(
                "{} shelves × {} columns is more than the {MAX_POSITIONS} positions a survey may hold",
                self.shelves, self.columns
            ))
        })
    }

    /// The positions, bottom shelf first.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for an empty rack or non-positive spacings.
    pub fn positions(&self) -> Result<Vec<Position>> {
        if self.shelves == 0 || self.columns == 0 {
            return Err(Error::input("a rack needs at least one shelf and one column"));
        }
        let n = self.count()?;
        let mut out = Vec::with_capacity(n);
        for s in 0..self.shelves {
            for c in 0..self.columns {
                out.push(Position {
                    shelf: s + 1,
                    column: c + 1,
                    x_m: self.x0_m + c as f64 * self.column_spacing_m,
                    y_m: self.y_m,
                    z_m: self.bottom_m + s as f64 * self.shelf_spacing_m,
                    shelves_above: self.shelves - 1 - s,
                });
            }
        }
        Ok(out)
    }
}

/// Room illuminance at cage level at `p` from `luminaires`, lx.
pub fn illuminance_at(p: &Position, luminaires: &[Luminaire], shelf_shading: f64) -> f64 {
    let direct: f64 = luminaires
        .iter()
        .filter(|l| l.z_m > p.z_m)
        .map(|l| {
            let (dx, dy, h) = (l.x_m - p.x_m, l.y_m - p.y_m, l.z_m - p.z_m);
            let d2 = dx * dx + dy * dy + h * h;
            l.intensity_cd * h * h / (d2 * d2)
        })
        .sum();
    direct * shelf_shading.powi(p.shelves_above as i32)
}

/// Per-lux conversion factors for one spectrum and eye, computed once.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PerLux {
    /// Rod R*/rod/s per lux at the eye (full field).
    pub rod_rate: f64,
    /// Species α-opic photon irradiance per lux (rod, M cone, UV cone, melanopsin), m⁻²·s⁻¹.
    pub opic: [f64; 4],
}

/// Computes [`PerLux`] for light of `spectrum`'s shape at 1 lx of room light, seen full-field
/// through the cage `wall` by the eye of `view` with the pupil `pupil`: the same light path as
/// every other source of the scenario, so a position at N lx gets exactly N times these.
///
/// # Errors
/// As the retina chain.
pub fn per_lux(
    view: &RetinaScenario,
    spectrum: &Spectrum,
    wall: &Filter,
    pupil: PupilRule,
) -> Result<PerLux> {
    let one_lux = scale_to(spectrum, ScaleTarget::Illuminance(Illuminance::new::<lx>(1.0)))?;
    let source = PlacedSource {
        spectrum: one_lux,
        geometry: Geometry::AtEye { field: Some(Field::FullField) },
        size: None,
        distance: None,
        assumption: None,
    };
    let scenario =
        RetinaScenario { sources: vec![source], filters: vec![wall.clone()], pupil, ..view.clone() };
    let report = assess_retina(&scenario)?;
    let rod_rate = report.sources[0]
        .level(LevelUnit::IsomerisationsPerSecond)
        .ok_or_else(|| Error::input("the eye model has no rod"))?;
    let mut opic = [0.0; 4];
    for (i, ch) in ["rod", "m-cone", "uv-cone", "melanopsin"].iter().enumerate() {
        opic[i] = report
            .species_opic
            .iter()
            .find(|c| c.channel == *ch)
            .map(|c| c.photon_irradiance.si())
            .unwrap_or(f64::NAN);
    }
    Ok(PerLux { rod_rate, opic })
}

/// Results at one position.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PositionResult {
    /// The position.
    pub position: Position,
    /// Room illuminance at cage level during the light phase (the Guide's quantity), lx.
    pub room_lux: f64,
    /// Illuminance inside the cage (after the cage wall), lx.
    pub cage_lux: f64,
    /// Room illuminance at cage level during the dark phase (leak), lx.
    pub dark_room_lux: f64,
    /// Inside the cage during the dark phase, lx.
    pub dark_cage_lux: f64,
    /// Rod R*/rod/s in the light phase.
    pub rod_rate: f64,
    /// Species α-opic photon irradiance in the light phase (rod, M cone, UV cone, melanopsin).
    pub opic: [f64; 4],
    /// Rod R*/rod/s in the dark phase.
    pub dark_rod_rate: f64,
    /// Melanopsin photon irradiance in the dark phase.
    pub dark_melanopsin: f64,
    /// Steady-state rod bleach in the light phase.
    pub light_bleach: f64,
    /// Steady-state rod bleach in the dark phase (from the leak).
    pub dark_bleach: f64,
    /// Time after lights-off until 90 % regenerated, s (`None` if the leak holds more bleach).
    pub recovery_90_s: Option<f64>,
    /// Raised flags by rule id.
    pub flags: Vec<String>,
}

/// A housing survey's inputs, resolved.
#[derive(Debug, Clone)]
pub struct SurveyInput<'a> {
    /// The positions.
    pub positions: Vec<Position>,
    /// Room illuminance at cage level, light phase, per position (lx).
    pub room_lux: Vec<f64>,
    /// Room illuminance at cage level, dark phase, per position (lx).
    pub dark_room_lux: Vec<f64>,
    /// Cage wall / filter-top transmittance (0–1).
    pub cage_transmittance: f64,
    /// Per-lux (of room light) factors of the light-phase spectrum, through the cage wall.
    pub light: PerLux,
    /// Per-lux (of room light) factors of the dark-phase (leak) spectrum, through the cage wall.
    pub dark: PerLux,
    /// The rod pigment.
    pub pigment: &'a Pigment,
    /// Model.
    pub model: Model,
    /// Albino animals (the Guide's phototoxicity range applies).
    pub albino: bool,
    /// Guidance sets to flag against.
    pub guidance: &'a [&'a GuidanceSet],
}

fn applies(rule: &Rule, albino: bool) -> bool {
    match rule.applies_to {
        AppliesTo::Albino => albino,
        AppliesTo::All => true,
        AppliesTo::Human => false,
    }
}

/// Runs the survey.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] when the per-position lists do not match the positions
/// or the transmittance is outside 0–1.
pub fn run_survey(input: &SurveyInput<'_>) -> Result<Vec<PositionResult>> {
    let n = input.positions.len();
    if input.room_lux.len() != n || input.dark_room_lux.len() != n {
        return Err(Error::input(format!(
            "{} positions but {} light and {} dark readings",
            n,
            input.room_lux.len(),
            input.dark_room_lux.len()
        )));
    }
    if !(0.0..=1.0).contains(&input.cage_transmittance) {
        return Err(Error::input("cage transmittance must be between 0 and 1"));
    }
    let c = input.pigment.constants();
    let rules: Vec<(&str, &Rule)> = input
        .guidance
        .iter()
        .flat_map(|g| g.rule.iter().map(move |r| (g.id.as_str(), r)))
        .filter(|(_, r)| r.quantity == GuidanceQuantity::Illuminance && applies(r, input.albino))
        .collect();
    let mut out = Vec::with_capacity(n);
    for i in 0..n {
        let (room, dark_room) = (input.room_lux[i], input.dark_room_lux[i]);
        let (cage, dark_cage) = (room * input.cage_transmittance, dark_room * input.cage_transmittance);
        let rod_rate = room * input.light.rod_rate;
        let dark_rod_rate = dark_room * input.dark.rod_rate;
        let k_light = input.pigment.rate_of_level(rod_rate);
        let k_dark = input.pigment.rate_of_level(dark_rod_rate);
        let light_bleach = steady_state(input.model, c, k_light);
        let dark_bleach = steady_state(input.model, c, k_dark);
        let recovery_90_s = if k_dark > 0.0 {
            light_time_to(input.model, c, light_bleach, k_dark, 0.10)
        } else {
            dark_time_to(input.model, c, light_bleach, 0.10)
        };
        let flags = rules
            .iter()
            .filter(|(set, r)| {
                let v = if r.phase.is_dark() { dark_room } else { room };
                r.check(set, v).raised
            })
            .map(|(_, r)| r.id.clone())
            .collect();
        out.push(PositionResult {
            position: input.positions[i],
            room_lux: room,
            cage_lux: cage,
            dark_room_lux: dark_room,
            dark_cage_lux: dark_cage,
            rod_rate,
            opic: input.light.opic.map(|f| f * room),
            dark_rod_rate,
            dark_melanopsin: input.dark.opic[3] * dark_room,
            light_bleach,
            dark_bleach,
            recovery_90_s: if light_bleach <= 0.10 { Some(0.0) } else { recovery_90_s },
            flags,
        });
    }
    Ok(out)
}

/// Reads measured lux per position from CSV text with columns `shelf,column,lux` and optionally
/// `dark_lux`, matched to `positions`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming the file and line: a missing column, a value that
/// is not a number, a negative reading, a position not in the rack, a position given twice.
pub fn read_measurements(
    text: &str,
    origin: &str,
    positions: &[Position],
) -> Result<(Vec<f64>, Option<Vec<f64>>)> {
    let mut rdr =
        csv::ReaderBuilder::new().comment(Some(b'#')).trim(csv::Trim::All).from_reader(text.as_bytes());
    let headers = rdr.headers().map_err(|e| Error::data(format!("{origin}: {e}")))?.clone();
    let col = |name: &str| headers.iter().position(|h| h == name);
    let (s_i, c_i, l_i) = match (col("shelf"), col("column"), col("lux")) {
        (Some(a), Some(b), Some(c)) => (a, b, c),
        _ => {
            return Err(Error::data(format!(
                "{origin}:1: the header needs shelf, column and lux (and optionally dark_lux)"
            )));
        }
    };
    let d_i = col("dark_lux");
    let mut lux = vec![f64::NAN; positions.len()];
    let mut dark = d_i.map(|_| vec![f64::NAN; positions.len()]);
    for rec in rdr.records() {
        let rec = rec.map_err(|e| Error::data(format!("{origin}: {e}")))?;
        let line = rec.position().map_or(0, |p| p.line());
        let field = |i: usize, what: &str| -> Result<f64> {
            let t = rec.get(i).ok_or_else(|| Error::data(format!("{origin}:{line}: missing {what}")))?;
            let v: f64 = t
                .parse()
                .map_err(|_| Error::data(format!("{origin}:{line}: {what} '{t}' is not a number")))?;
            if !(v >= 0.0 && v.is_finite()) {
                return Err(Error::data(format!("{origin}:{line}: {what} {v} must be a finite number ≥ 0")));
            }
            Ok(v)
        };
        let whole = |i: usize, what: &str| -> Result<usize> {
            let v = field(i, what)?;
            if v.fract() != 0.0 || !(1.0..=1e9).contains(&v) {
                return Err(Error::data(format!(
                    "{origin}:{line}: {what} {v} must be a whole number from 1"
                )));
            }
            Ok(v as usize)
        };
        let (s, c) = (whole(s_i, "shelf")?, whole(c_i, "column")?);
        let idx = positions.iter().position(|p| p.shelf == s && p.column == c).ok_or_else(|| {
            Error::data(format!("{origin}:{line}: shelf {s} column {c} is not a position of the rack"))
        })?;
        if !lux[idx].is_nan() {
            return Err(Error::data(format!("{origin}:{line}: shelf {s} column {c} is given twice")));
        }
        lux[idx] = field(l_i, "lux")?;
        if let (Some(d), Some(di)) = (dark.as_mut(), d_i) {
            d[idx] = field(di, "dark_lux")?;
        }
    }
    if let Some(i) = lux.iter().position(|v| v.is_nan()) {
        return Err(Error::data(format!(
            "{origin}: no reading for shelf {} column {}",
            positions[i].shelf, positions[i].column
        )));
    }
    Ok((lux, dark))
}
