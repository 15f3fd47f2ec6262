//! Visual-pigment bleaching and regeneration, solved exactly for each constant step.
//!
//! Light acts through the fractional bleaching rate k (s⁻¹): k = I/Q_e (human, I in trolands) or
//! k = R*/N (rodent rods). B is the fraction bleached.
//!
//! - **Rushton** first-order kinetics (Rushton 1961; reference notes §5):
//!   dB/dt = k(1 − B) − B/τ₀, so in a constant step B(t) = B∞ + (B₀ − B∞)·e^(−(k + 1/τ₀)t),
//!   B∞ = k/(k + 1/τ₀).
//! - **Rate-limited** regeneration (Lamb & Pugh 2004; Mahroo & Lamb 2004; standard human-rod
//!   parameters of Cameron, Mahroo & Lamb 2006): dB/dt = k(1 − B) − v·B/(K_m + B).
//!   In darkness B(t) = K_m·W₀[(B₀/K_m)·exp((B₀ − v t)/K_m)] (W₀ the principal Lambert W branch,
//!   from the `lambert_w` crate, Fukushima's method, about 50 bits). In constant light the ODE
//!   is separable: with r₁ > 0 > r₂ the roots of k B² + (v + k K_m − k) B − k K_m = 0,
//!   t(B) = −(1/k)[a ln((B − r₁)/(B₀ − r₁)) + b ln((B − r₂)/(B₀ − r₂))], a = (K_m + r₁)/(r₁ − r₂),
//!   b = (K_m + r₂)/(r₂ − r₁), inverted by a safeguarded Newton–bisection to 1e-13 in B.
//!   The time-weighted integral ∫B dt over a step is also closed-form (same partial fractions).

use serde::Deserialize;

use crate::base::error::{Error, Result};
use crate::base::quantity::{Frequency, SiValue, Time};
use crate::base::units::{
    parse_isomerisation_rate, parse_number, parse_rate, parse_time, parse_troland_seconds,
    parse_typed_trolands,
};
use crate::retina::eye::{Param, RawParam, Species, Status};

/// Which kinetic model.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Model {
    /// First-order (exponential) regeneration.
    Rushton,
    /// Rate-limited (Michaelis–Menten) regeneration.
    RateLimited,
}

impl Model {
    /// Parses `rushton` or `rate-limited`.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] naming the accepted models.
    pub fn parse(text: &str) -> Result<Model> {
        match text.trim() {
            "rushton" => Ok(Model::Rushton),
            "rate-limited" => Ok(Model::RateLimited),
            o => Err(Error::input(format!("unknown model '{o}'; expected rushton or rate-limited"))),
        }
    }

    /// Name as on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Model::Rushton => "rushton",
            Model::RateLimited => "rate-limited",
        }
    }
}

/// How a light level is expressed for a receptor.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum LevelUnit {
    /// Scotopic trolands (human rods).
    ScotopicTrolands,
    /// Photopic trolands (human cones).
    PhotopicTrolands,
    /// Photoisomerisations per receptor per second (rodents).
    IsomerisationsPerSecond,
}

impl LevelUnit {
    /// Symbol for reports.
    pub fn symbol(self) -> &'static str {
        match self {
            LevelUnit::ScotopicTrolands => "scot td",
            LevelUnit::PhotopicTrolands => "phot td",
            LevelUnit::IsomerisationsPerSecond => "R*/rod/s",
        }
    }
}

/// Kinetic parameters of one receptor, each with status and source.
#[derive(Debug, Clone, PartialEq)]
pub struct Pigment {
    /// Identifier (`human-rod`, `human-cone`, `mouse-rod`, `rat-rod`).
    pub id: String,
    /// Species.
    pub species: Species,
    /// How light levels are given.
    pub level_unit: LevelUnit,
    /// Q_e, td·s (human).
    pub q_e: Option<Param<f64>>,
    /// Half-bleach intensity I₀, td (human; for reference).
    pub i0: Option<Param<f64>>,
    /// Pigment molecules per receptor (rodents).
    pub pigment_per_cell: Option<Param<f64>>,
    /// Rushton time constant τ₀.
    pub tau0: Param<Time>,
    /// Rate-limited maximum regeneration rate v.
    pub v: Param<Frequency>,
    /// Rate-limited K_m (fraction of total pigment).
    pub k_m: Param<f64>,
    /// Level at which the receptor saturates, in its level unit.
    pub saturating_level: Option<Param<f64>>,
}

impl Pigment {
    /// k (s⁻¹) for a level in the receptor's unit.
    pub fn rate_of_level(&self, level: f64) -> f64 {
        match (self.level_unit, &self.q_e, &self.pigment_per_cell) {
            (LevelUnit::IsomerisationsPerSecond, _, Some(n)) => level / n.value,
            (_, Some(q), _) => level / q.value,
            _ => f64::NAN,
        }
    }

    /// The level (receptor's unit) giving a fractional bleaching rate `k_per_s`.
    pub fn level_of_rate(&self, k_per_s: f64) -> f64 {
        let one = self.rate_of_level(1.0);
        k_per_s / one
    }

    /// The model parameters in SI.
    pub fn constants(&self) -> Constants {
        Constants { tau0_s: self.tau0.value.si(), v_per_s: self.v.value.si(), k_m: self.k_m.value }
    }

    /// Names of the parameters that are from memory.
    pub fn from_memory(&self) -> Vec<&'static str> {
        let mut out = Vec::new();
        let mut add = |name: &'static str, st: Option<Status>| {
            if st == Some(Status::FromMemory) {
                out.push(name);
            }
        };
        add("Q_e", self.q_e.as_ref().map(|p| p.status));
        add("pigment per cell", self.pigment_per_cell.as_ref().map(|p| p.status));
        add("τ0", Some(self.tau0.status));
        add("v", Some(self.v.status));
        add("K_m", Some(self.k_m.status));
        add("saturating level", self.saturating_level.as_ref().map(|p| p.status));
        out
    }

    /// Replaces one parameter by a user value (`q_e`, `pigment_per_cell`, `tau0`, `v`, `k_m`),
    /// written with its unit (`"300 s"`, `"0.1 /min"`, `"1e7 td s"`).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for an unknown name, a bad unit, or a value outside the
    /// physical range (τ₀, v, K_m, Q_e, N must be above 0).
    pub fn override_param(&mut self, name: &str, value: &str) -> Result<()> {
        let user = |v| Param {
            value: v,
            status: Status::Confirmed,
            source: "given by the user".to_string(),
            spread: None,
        };
        let positive = |x: f64, what: &str| -> Result<f64> {
            if x > 0.0 && x.is_finite() {
                Ok(x)
            } else {
                Err(Error::input(format!("parameter {what} = {value} must be above 0")))
            }
        };
        match name {
            "q_e" => self.q_e = Some(user(positive(parse_troland_seconds(value)?, "q_e")?)),
            "pigment_per_cell" => {
                self.pigment_per_cell = Some(user(positive(parse_number(value)?, "pigment_per_cell")?))
            }
            "tau0" => {
                let t = parse_time(value)?;
                positive(t.si(), "tau0")?;
                self.tau0 = Param {
                    value: t,
                    status: Status::Confirmed,
                    source: "given by the user".into(),
                    spread: None,
                };
            }
            "v" => {
                let v = parse_rate(value)?;
                positive(v.si(), "v")?;
                self.v = Param {
                    value: v,
                    status: Status::Confirmed,
                    source: "given by the user".into(),
                    spread: None,
                };
            }
            "k_m" => self.k_m = user(positive(parse_number(value)?, "k_m")?),
            other => {
                return Err(Error::input(format!(
                    "unknown parameter '{other}'; expected q_e, pigment_per_cell, tau0, v or k_m"
                )));
            }
        }
        if self.level_unit == LevelUnit::IsomerisationsPerSecond && self.pigment_per_cell.is_none() {
            return Err(Error::input("a rodent receptor needs pigment_per_cell"));
        }
        Ok(())
    }
}

/// The model constants in SI, for the hot loops.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Constants {
    /// Rushton τ₀, s.
    pub tau0_s: f64,
    /// Rate-limited v, s⁻¹.
    pub v_per_s: f64,
    /// Rate-limited K_m.
    pub k_m: f64,
}

/// Rate constants below this (s⁻¹) are treated as darkness in the rate-limited model, where the
/// light solution's 1/k terms would lose precision (1e-12 s⁻¹ bleaches 3 × 10⁻⁵ of the pigment in
/// a year).
pub const DARK_RATE_PER_S: f64 = 1e-12;

/// Steady-state bleached fraction for a constant k.
pub fn steady_state(model: Model, c: Constants, k_per_s: f64) -> f64 {
    match model {
        Model::Rushton => k_per_s / (k_per_s + 1.0 / c.tau0_s),
        Model::RateLimited => {
            if k_per_s < DARK_RATE_PER_S {
                return 0.0;
            }
            roots(c, k_per_s).0
        }
    }
}

/// The constant k that holds the bleached fraction at `b` in the steady state.
pub fn rate_for_steady_state(model: Model, c: Constants, b: f64) -> f64 {
    match model {
        Model::Rushton => b / ((1.0 - b) * c.tau0_s),
        Model::RateLimited => c.v_per_s * b / ((1.0 - b) * (c.k_m + b)),
    }
}

/// Roots r₁ > 0 > r₂ of k B² + (v + k K_m − k) B − k K_m = 0.
fn roots(c: Constants, k: f64) -> (f64, f64) {
    let bq = c.v_per_s + k * c.k_m - k;
    let disc = (bq * bq + 4.0 * k * k * c.k_m).sqrt();
    // Numerically stable pair: r₁ r₂ = −K_m, r₁ + r₂ = −bq/k.
    if bq >= 0.0 {
        let r2 = (-bq - disc) / (2.0 * k);
        (-c.k_m / r2, r2)
    } else {
        let r1 = (-bq + disc) / (2.0 * k);
        (r1, -c.k_m / r1)
    }
}

/// Time for the rate-limited model in light to go from `b0` to `b` (both on the same side of r₁).
fn time_to(c: Constants, k: f64, r: (f64, f64), b0: f64, b: f64) -> f64 {
    let (r1, r2) = r;
    let a = (c.k_m + r1) / (r1 - r2);
    let bb = (c.k_m + r2) / (r2 - r1);
    let l1 = ((b - b0) / (b0 - r1)).ln_1p();
    let l2 = ((b - b0) / (b0 - r2)).ln_1p();
    -(a * l1 + bb * l2) / k
}

/// Bleached fraction after `dt_s` seconds at constant rate `k_per_s`, starting from `b0`.
pub fn advance(model: Model, c: Constants, b0: f64, k_per_s: f64, dt_s: f64) -> f64 {
    match model {
        Model::Rushton => {
            let lambda = k_per_s + 1.0 / c.tau0_s;
            let binf = k_per_s / lambda;
            binf + (b0 - binf) * (-lambda * dt_s).exp()
        }
        Model::RateLimited if k_per_s < DARK_RATE_PER_S => {
            if b0 <= 0.0 {
                return 0.0;
            }
            let km = c.k_m;
            let x = (b0 / km).ln() + (b0 - c.v_per_s * dt_s) / km;
            // W(e^x): for large x use the asymptotic branch through ln to avoid overflow.
            let w = if x < 700.0 { lambert_w::lambert_w0(x.exp()) } else { wright_omega_large(x) };
            (km * w).clamp(0.0, 1.0)
        }
        Model::RateLimited => {
            let r = roots(c, k_per_s);
            let target = r.0;
            if (b0 - target).abs() < 1e-15 {
                return target;
            }
            // B moves monotonically from b0 towards r₁; find B with time_to(B) = dt.
            let (mut lo, mut hi) = if b0 < target { (b0, target) } else { (target, b0) };
            let mut b =
                b0 + (target - b0) * (1.0 - (-(k_per_s + c.v_per_s / (c.k_m + b0.max(target))) * dt_s).exp());
            for _ in 0..100 {
                let t = time_to(c, k_per_s, r, b0, b);
                let f = t - dt_s;
                // Shrink the bracket.
                let moving_up = b0 < target;
                if (f > 0.0) == moving_up {
                    hi = b;
                } else {
                    lo = b;
                }
                if (hi - lo) < 1e-13 || f.abs() < 1e-12 * dt_s.max(1e-9) {
                    break;
                }
                // Newton step with dt/dB = (K_m + B) / (k (1 − B)(K_m + B) − v B) · ... = 1 / f(B).
                let rate = k_per_s * (1.0 - b) - c.v_per_s * b / (c.k_m + b);
                let next = b - f * rate;
                b = if next > lo && next < hi { next } else { 0.5 * (lo + hi) };
            }
            b
        }
    }
}

/// W₀(eᵡ) for large x (Wright ω): ω = x − ln ω, iterated.
fn wright_omega_large(x: f64) -> f64 {
    let mut w = x - x.ln();
    for _ in 0..8 {
        w = x - w.ln();
    }
    w
}

/// ∫₀^dt B dt for a step from `b0` to `b1` (as [`advance`] gives it), closed form.
pub fn integral(model: Model, c: Constants, b0: f64, b1: f64, k_per_s: f64, dt_s: f64) -> f64 {
    match model {
        Model::Rushton => {
            let lambda = k_per_s + 1.0 / c.tau0_s;
            let binf = k_per_s / lambda;
            binf * dt_s + (b0 - binf) * (-(-lambda * dt_s).exp_m1()) / lambda
        }
        Model::RateLimited if k_per_s < DARK_RATE_PER_S => {
            // dt = −(K_m + B)/(v B) dB  ⇒  ∫B dt = [K_m (B₀ − B₁) + (B₀² − B₁²)/2] / v.
            (c.k_m * (b0 - b1) + 0.5 * (b0 * b0 - b1 * b1)) / c.v_per_s
        }
        Model::RateLimited => {
            // ∫B dt = r₁ t + ∫(B − r₁) dt, and (B − r₁)·dt/dB = −(K_m + B)/(k (B − r₂)), so
            // ∫(B − r₁) dt = −[(B₁ − B₀) + (K_m + r₂) ln((B₁ − r₂)/(B₀ − r₂))]/k (no singular term).
            let (r1, r2) = roots(c, k_per_s);
            let l2 = ((b1 - b0) / (b0 - r2)).ln_1p();
            r1 * dt_s - ((b1 - b0) + (c.k_m + r2) * l2) / k_per_s
        }
    }
}

/// Time in darkness for the bleached fraction to fall from `b0` to `b` (`None` if b ≥ b0).
pub fn dark_time_to(model: Model, c: Constants, b0: f64, b: f64) -> Option<f64> {
    if b >= b0 {
        return Some(0.0);
    }
    if b <= 0.0 {
        return None;
    }
    Some(match model {
        Model::Rushton => c.tau0_s * (b0 / b).ln(),
        Model::RateLimited => (c.k_m * (b0 / b).ln() + (b0 - b)) / c.v_per_s,
    })
}

/// Time at constant k for the bleached fraction to go from `b0` to `b` (`None` if never).
pub fn light_time_to(model: Model, c: Constants, b0: f64, k_per_s: f64, b: f64) -> Option<f64> {
    let target = steady_state(model, c, k_per_s);
    let between = (b0 <= b && b < target) || (target < b && b <= b0);
    if !between {
        return if (b - b0).abs() < 1e-15 { Some(0.0) } else { None };
    }
    Some(match model {
        Model::Rushton => {
            let lambda = k_per_s + 1.0 / c.tau0_s;
            ((b0 - target) / (b - target)).ln() / lambda
        }
        Model::RateLimited if k_per_s < DARK_RATE_PER_S => return dark_time_to(model, c, b0, b),
        Model::RateLimited => time_to(c, k_per_s, roots(c, k_per_s), b0, b),
    })
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    receptor: Vec<RawPigment>,
    rod_response: RawRodResponse,
    dark_adaptation: RawDarkAdaptation,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawDarkAdaptation {
    s2_slope: RawParam,
    cone_plateau: RawParam,
    dowling_rushton_alpha: RawParam,
}

/// Parameters linking bleach to rod threshold.
#[derive(Debug, Clone, PartialEq)]
pub struct DarkAdaptationParams {
    /// S2 slope, decades per second (given per minute in the file).
    pub s2_slope: Param<Frequency>,
    /// Cone plateau, log units above absolute rod threshold.
    pub cone_plateau: Param<f64>,
    /// Dowling–Rushton α, log units per unit fraction bleached.
    pub dowling_rushton_alpha: Param<f64>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPigment {
    id: String,
    species: String,
    level_unit: String,
    q_e: Option<RawParam>,
    i0: Option<RawParam>,
    pigment_per_cell: Option<RawParam>,
    tau0: RawParam,
    v: RawParam,
    k_m: RawParam,
    saturating_level: Option<RawParam>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRodResponse {
    human_amplification: RawParam,
    rodent_amplification: RawParam,
    effective_delay: RawParam,
}

/// Lamb & Pugh activation-model parameters.
#[derive(Debug, Clone, PartialEq)]
pub struct RodResponseParams {
    /// Human rod amplification constant A, s⁻².
    pub human_amplification: Param<f64>,
    /// Rodent rod amplification constant A, s⁻².
    pub rodent_amplification: Param<f64>,
    /// Effective delay t_eff.
    pub effective_delay: Param<Time>,
}

/// A parameter read from `at` ("file: key 'name'"), through the eye module's shared reader.
fn param<T: PartialOrd>(p: &RawParam, at: &str, parse: impl Fn(&str) -> Result<T>) -> Result<Param<T>> {
    crate::retina::eye::read_param(p, at, parse)
}

/// The pigment parameter file, parsed.
#[derive(Debug, Clone, PartialEq)]
pub struct PigmentTable {
    /// Receptors.
    pub pigments: Vec<Pigment>,
    /// Rod response parameters.
    pub rod_response: RodResponseParams,
    /// Bleach-to-threshold parameters.
    pub dark_adaptation: DarkAdaptationParams,
}

/// Parses a pigment parameter file.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming `origin` and the key.
pub fn parse_pigments(text: &str, origin: &str) -> Result<PigmentTable> {
    let raw: RawFile =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    let pigments = raw
        .receptor
        .iter()
        .enumerate()
        .map(|(i, r)| parse_receptor(r, i, origin))
        .collect::<Result<Vec<_>>>()?;
    Ok(PigmentTable {
        pigments,
        rod_response: parse_rod_response(&raw.rod_response, origin)?,
        dark_adaptation: parse_dark_adaptation(&raw.dark_adaptation, origin)?,
    })
}

/// Parses and checks the `i`-th `[[receptor]]` table.
fn parse_receptor(r: &RawPigment, i: usize, origin: &str) -> Result<Pigment> {
    let at = |k: &str| format!("{origin}: key 'receptor[{i}].{k}' ({})", r.id);
    let level_unit = parse_level_unit(&r.level_unit, &at("level_unit"))?;
    let p = Pigment {
        id: r.id.clone(),
        species: Species::parse(&r.species).map_err(|e| Error::data(format!("{}: {e}", at("species"))))?,
        level_unit,
        q_e: r.q_e.as_ref().map(|p| param(p, &at("q_e"), parse_troland_seconds)).transpose()?,
        i0: r.i0.as_ref().map(|p| param(p, &at("i0"), |t| typed_level(t, level_unit))).transpose()?,
        pigment_per_cell: r
            .pigment_per_cell
            .as_ref()
            .map(|p| param(p, &at("pigment_per_cell"), parse_number))
            .transpose()?,
        tau0: param(&r.tau0, &at("tau0"), parse_time)?,
        v: param(&r.v, &at("v"), parse_rate)?,
        k_m: param(&r.k_m, &at("k_m"), parse_number)?,
        saturating_level: r
            .saturating_level
            .as_ref()
            .map(|p| level_param(p, &at("saturating_level"), level_unit))
            .transpose()?,
    };
    check_receptor(&p, &at)?;
    Ok(p)
}

/// A receptor's `level_unit`; `at` names the key in errors.
fn parse_level_unit(text: &str, at: &str) -> Result<LevelUnit> {
    match text {
        "scot td" => Ok(LevelUnit::ScotopicTrolands),
        "phot td" => Ok(LevelUnit::PhotopicTrolands),
        "R*/rod/s" => Ok(LevelUnit::IsomerisationsPerSecond),
        o => Err(Error::data(format!("{at}: '{o}' is not scot td, phot td or R*/rod/s"))),
    }
}

/// A light level in the receptor's unit: R*/rod/s, or trolands of the receptor's kind.
fn level_param(p: &RawParam, at: &str, unit: LevelUnit) -> Result<Param<f64>> {
    match unit {
        LevelUnit::IsomerisationsPerSecond => param(p, at, |t| parse_isomerisation_rate(t).map(|f| f.si())),
        unit => param(p, at, |t| typed_level(t, unit)),
    }
}

/// Checks that the kinetic constants are positive and that the receptor has what its level
/// unit needs (Q_e for trolands, pigment per cell for R*/rod/s).
fn check_receptor(p: &Pigment, at: &dyn Fn(&str) -> String) -> Result<()> {
    if p.tau0.value.si() <= 0.0 || p.v.value.si() <= 0.0 || p.k_m.value <= 0.0 {
        return Err(Error::data(format!("{}: τ0, v and K_m must be above 0", at("tau0"))));
    }
    match p.level_unit {
        LevelUnit::IsomerisationsPerSecond if p.pigment_per_cell.is_none() => Err(Error::data(format!(
            "{}: a receptor with levels in R*/rod/s needs it",
            at("pigment_per_cell")
        ))),
        LevelUnit::ScotopicTrolands | LevelUnit::PhotopicTrolands if p.q_e.is_none() => {
            Err(Error::data(format!("{}: a receptor with levels in trolands needs it", at("q_e"))))
        }
        _ => Ok(()),
    }
}

/// The `[rod_response]` table.
fn parse_rod_response(rr: &RawRodResponse, origin: &str) -> Result<RodResponseParams> {
    let per_s2 = |t: &str| crate::base::units::parse_per_second_squared(t);
    Ok(RodResponseParams {
        human_amplification: param(
            &rr.human_amplification,
            &format!("{origin}: key 'rod_response.human_amplification'"),
            per_s2,
        )?,
        rodent_amplification: param(
            &rr.rodent_amplification,
            &format!("{origin}: key 'rod_response.rodent_amplification'"),
            per_s2,
        )?,
        effective_delay: param(
            &rr.effective_delay,
            &format!("{origin}: key 'rod_response.effective_delay'"),
            parse_time,
        )?,
    })
}

/// The `[dark_adaptation]` table.
fn parse_dark_adaptation(da: &RawDarkAdaptation, origin: &str) -> Result<DarkAdaptationParams> {
    Ok(DarkAdaptationParams {
        s2_slope: param(&da.s2_slope, &format!("{origin}: key 'dark_adaptation.s2_slope'"), parse_rate)?,
        cone_plateau: param(
            &da.cone_plateau,
            &format!("{origin}: key 'dark_adaptation.cone_plateau'"),
            parse_number,
        )?,
        dowling_rushton_alpha: param(
            &da.dowling_rushton_alpha,
            &format!("{origin}: key 'dark_adaptation.dowling_rushton_alpha'"),
            parse_number,
        )?,
    })
}

static TABLE: std::sync::LazyLock<PigmentTable> = std::sync::LazyLock::new(|| {
    parse_pigments(include_str!("../data/pigments.toml"), "src/data/pigments.toml")
        .unwrap_or_else(|e| panic!("embedded pigment table: {e}"))
});

/// The built-in pigment parameters.
pub fn builtin_pigments() -> &'static PigmentTable {
    &TABLE
}

/// A level in trolands of the kind `unit` says (`scot td` for rods, `phot td` for cones).
fn typed_level(text: &str, unit: LevelUnit) -> Result<f64> {
    let (v, kind) = parse_typed_trolands(text)?;
    let expected = match unit {
        LevelUnit::ScotopicTrolands => crate::base::units::TrolandKind::Scotopic,
        LevelUnit::PhotopicTrolands => crate::base::units::TrolandKind::Photopic,
        LevelUnit::IsomerisationsPerSecond => {
            return Err(Error::data(format!("'{text}': this receptor's levels are R*/rod/s")));
        }
    };
    if kind != expected {
        return Err(Error::data(format!("'{text}': this receptor's levels are {}", unit.symbol())));
    }
    Ok(v)
}

/// A built-in receptor by id.
///
/// # Errors
/// [`crate::ErrorKind::UnknownName`] listing the ids.
pub fn find_pigment(id: &str) -> Result<Pigment> {
    TABLE.pigments.iter().find(|p| p.id == id).cloned().ok_or_else(|| {
        Error::new(
            crate::ErrorKind::UnknownName,
            format!(
                "unknown receptor '{id}'; built in: {}",
                TABLE.pigments.iter().map(|p| p.id.as_str()).collect::<Vec<_>>().join(", ")
            ),
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn human_rod() -> (Pigment, Constants) {
        let p = find_pigment("human-rod").unwrap();
        let c = p.constants();
        (p, c)
    }

    #[test]
    fn rate_limited_light_step_matches_its_own_time_formula() {
        let (_, c) = human_rod();
        for (b0, k) in [(0.0, 1e-3), (0.9, 1e-4), (0.2, 5e-2), (0.5, 1e-6)] {
            let b = advance(Model::RateLimited, c, b0, k, 120.0);
            let t = light_time_to(Model::RateLimited, c, b0, k, b).unwrap();
            assert!((t - 120.0).abs() < 1e-6, "{b0} {k}: {t}");
        }
    }

    #[test]
    fn steady_states_are_fixed_points() {
        let (_, c) = human_rod();
        for model in [Model::Rushton, Model::RateLimited] {
            for k in [1e-6, 1e-3, 1.0] {
                let b = steady_state(model, c, k);
                assert!((advance(model, c, b, k, 1e4) - b).abs() < 1e-9);
                assert!((rate_for_steady_state(model, c, b) / k - 1.0).abs() < 1e-9);
            }
        }
    }

    #[test]
    fn overrides_check_range_and_unit() {
        let (mut p, _) = human_rod();
        assert!(p.override_param("tau0", "300 s").is_ok());
        assert_eq!(p.constants().tau0_s, 300.0);
        assert!(p.override_param("k_m", "0").unwrap_err().message().contains("must be above 0"));
        assert!(p.override_param("tau0", "300").unwrap_err().message().contains("has no unit"));
        assert!(p.override_param("speed", "1 s").is_err());
    }
}
