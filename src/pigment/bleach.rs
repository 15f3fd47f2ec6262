//! The pigment assessment: a schedule run through a kinetic model, with recovery, a rod
//! threshold estimate, inverse solves and a rod response estimate, as plain data.

use crate::base::error::{Error, Result};
use crate::pigment::kinetics::{
    Constants, LevelUnit, Model, Pigment, builtin_pigments, dark_time_to, light_time_to,
    rate_for_steady_state, steady_state,
};
use crate::pigment::schedule::{Schedule, Summary, run, sample};

/// One named phase of the schedule (all steps of that name), for the report.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PhaseRow {
    /// Phase name.
    pub name: String,
    /// Number of steps with that name.
    pub steps: usize,
    /// Level during the last such step, in the receptor's unit.
    pub level: f64,
    /// Bleached fraction at the end of the last such step.
    pub end: f64,
    /// Largest end value over those steps.
    pub max_end: f64,
    /// Steady state of the last such step's level.
    pub steady_state: f64,
}

/// Regeneration after one lights-off (the end of a step followed by a dimmer one), under the
/// conditions that follow it, leaks included, until the light rises again.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Recovery {
    /// The step whose end is the lights-off.
    pub after_step: String,
    /// When the lights went off, s from the start of the schedule.
    pub from_s: f64,
    /// Bleached fraction then.
    pub bleached_at_start: f64,
    /// Time to 90 % regenerated (B ≤ 0.10), s; 0 if already there; `None` if not reached before
    /// the light rose again (the dimmer light holds the pigment above it).
    pub to_90_s: Option<f64>,
    /// To 95 %.
    pub to_95_s: Option<f64>,
    /// To 99 %.
    pub to_99_s: Option<f64>,
    /// True when the time runs past the end of the schedule: after the last lights-off of the
    /// schedule, its last step's light is taken to go on; after its very end, darkness.
    pub past_end: bool,
}

const TARGETS: [f64; 3] = [0.10, 0.05, 0.01];

/// Follows one lights-off through the steps after it.
struct Tracker {
    after_step: usize,
    from_s: f64,
    b: f64,
    to: [Option<f64>; 3],
}

impl Tracker {
    fn new(after_step: usize, from_s: f64, b: f64) -> Tracker {
        Tracker { after_step, from_s, b, to: TARGETS.map(|x| (b <= x).then_some(0.0)) }
    }

    /// Checks each target not yet reached inside a step of `duration_s` at `k_per_s`, starting
    /// at `start_s` with `b_start`.
    fn step(
        &mut self,
        model: Model,
        c: Constants,
        start_s: f64,
        b_start: f64,
        k_per_s: f64,
        duration_s: f64,
    ) {
        for (slot, target) in self.to.iter_mut().zip(TARGETS) {
            if slot.is_some() {
                continue;
            }
            let dt = if b_start <= target {
                Some(0.0)
            } else if k_per_s > 0.0 {
                light_time_to(model, c, b_start, k_per_s, target)
            } else {
                dark_time_to(model, c, b_start, target)
            };
            if let Some(dt) = dt.filter(|dt| *dt <= duration_s) {
                *slot = Some(start_s + dt - self.from_s);
            }
        }
    }

    fn finish(&self, names: &[String], schedule: &Schedule, past_end: bool) -> Recovery {
        Recovery {
            after_step: names[schedule.steps[self.after_step].name].clone(),
            from_s: self.from_s,
            bleached_at_start: self.b,
            to_90_s: self.to[0],
            to_95_s: self.to[1],
            to_99_s: self.to[2],
            past_end,
        }
    }
}

/// Keeps the first and the last of a run of values.
fn keep_first_and_last(list: &mut Vec<Recovery>, r: Recovery) {
    if list.len() == 2 {
        list[1] = r;
    } else {
        list.push(r);
    }
}

/// Recovery after each lights-off of `schedule` from `b0`: (number of lights-offs, the first
/// and the last). Lights-off is the end of a step followed by a dimmer one; when the schedule
/// has none but ends lit, its end (darkness assumed after it).
fn recoveries(model: Model, c: Constants, schedule: &Schedule, b0: f64) -> (usize, Vec<Recovery>) {
    let steps = &schedule.steps;
    let (mut list, mut count, mut active): (Vec<Recovery>, usize, Option<Tracker>) = (Vec::new(), 0, None);
    let mut last = (b0, 0.0);
    run(model, c, schedule, b0, |o| {
        let s = &steps[o.index];
        if o.index > 0
            && s.rate_per_s > steps[o.index - 1].rate_per_s
            && let Some(t) = active.take()
        {
            keep_first_and_last(&mut list, t.finish(&schedule.names, schedule, false));
        }
        if let Some(t) = active.as_mut() {
            t.step(model, c, o.start_s, o.b_start, s.rate_per_s, s.duration_s);
        }
        let end_s = o.start_s + s.duration_s;
        // A run of falling steps is one lights-off, timed from its first fall; only a rise
        // ends a tracker.
        if active.is_none() && steps.get(o.index + 1).is_some_and(|n| n.rate_per_s < s.rate_per_s) {
            count += 1;
            active = Some(Tracker::new(o.index, end_s, o.b_end));
        }
        last = (o.b_end, end_s);
    });
    let n = steps.len();
    if count == 0 && steps[n - 1].rate_per_s > 0.0 {
        count = 1;
        active = Some(Tracker::new(n - 1, last.1, last.0));
    }
    if let Some(mut t) = active.take() {
        let unreached = t.to.iter().any(Option::is_none);
        let last_rate = if t.after_step == n - 1 { 0.0 } else { steps[n - 1].rate_per_s };
        t.step(model, c, last.1, last.0, last_rate, f64::INFINITY);
        keep_first_and_last(&mut list, t.finish(&schedule.names, schedule, unreached));
    }
    (count, list)
}

/// A rod-threshold estimate after the end of the schedule (log₁₀ elevation over time).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Threshold {
    /// How it was estimated.
    pub basis: String,
    /// (minutes after the end, log₁₀ threshold elevation).
    pub curve: Vec<(f64, f64)>,
    /// Minutes until the elevation falls below 0.1 log units, if within the curve.
    pub to_within_0_1_log_min: Option<f64>,
}

/// The assessment.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BleachReport {
    /// Receptor id.
    pub receptor: String,
    /// Model used.
    pub model: Model,
    /// Level unit.
    pub level_unit: LevelUnit,
    /// Constants used.
    pub constants: Constants,
    /// Parameters from memory.
    pub from_memory: Vec<&'static str>,
    /// Schedule length, s.
    pub total_s: f64,
    /// Number of steps.
    pub steps: usize,
    /// Per named phase.
    pub phases: Vec<PhaseRow>,
    /// End, peak and mean.
    pub summary: Summary,
    /// Number of lights-offs in the schedule.
    pub lights_off: usize,
    /// Recovery after the first and the last lights-off (one entry when they are the same).
    pub recoveries: Vec<Recovery>,
    /// Rod threshold estimates after the last lights-off (human rods only): S2 and Dowling–Rushton.
    pub thresholds: Vec<Threshold>,
    /// Sampled time course (time s, bleached fraction), if asked for.
    pub time_course: Vec<(f64, f64)>,
    /// Whether any level reaches the receptor's saturating level.
    pub saturation: Option<String>,
    /// Notes.
    pub notes: Vec<String>,
}

/// The most time-course samples a report may hold (a cap is an error, never a truncation).
pub const MAX_SAMPLES: usize = 1_000_000;

/// Why the default model is rate-limited.
pub const DEFAULT_MODEL_REASON: &str = "rate-limited is the default: it reproduces the near-linear recovery after large \
bleaches that rod and cone pigment show (Lamb & Pugh 2004; Mahroo & Lamb 2004; Cameron, Mahroo & Lamb 2006), which \
first-order Rushton kinetics does not; use --model rushton for the classical exponential form";

/// Runs `schedule` (levels already converted to bleaching rates) for `pigment`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for an empty schedule or a start outside [0, 1].
pub fn assess(
    pigment: &Pigment,
    model: Model,
    schedule: &Schedule,
    b0: f64,
    samples: Option<usize>,
) -> Result<BleachReport> {
    if schedule.steps.is_empty() {
        return Err(Error::input("the schedule has no steps"));
    }
    if !(0.0..=1.0).contains(&b0) {
        return Err(Error::input(format!("the starting bleached fraction {b0} must be between 0 and 1")));
    }
    if let Some(n) = samples.filter(|n| *n > MAX_SAMPLES) {
        return Err(Error::input(format!("{n} time-course samples is more than the {MAX_SAMPLES} allowed")));
    }
    let c = pigment.constants();
    let (phases, summary) = phases_and_summary(pigment, model, schedule, b0);
    let (lights_off, recoveries) = recoveries(model, c, schedule, b0);
    let human_rod = pigment.species == crate::retina::eye::Species::Human && pigment.id.ends_with("rod");
    let thresholds = match recoveries.last() {
        Some(r) if human_rod => threshold_estimates(model, c, r.bleached_at_start),
        _ => Vec::new(),
    };
    let saturation = saturation_text(pigment, schedule);
    let mut notes = vec![DEFAULT_MODEL_REASON.to_string()];
    let memo = pigment.from_memory();
    if !memo.is_empty() {
        notes.push(format!("these {} parameters are from memory: {}", pigment.id, memo.join(", ")));
    }
    if human_rod {
        notes.push(
            "rod threshold curves are estimates: the S2 route holds the cone plateau until the bleach falls to the \
             rod–cone break (B = plateau/α) and then falls at the S2 slope (S3 not modelled); the Dowling–Rushton route \
             is α·B(t), capped at the plateau"
                .to_string(),
        );
    }
    Ok(BleachReport {
        receptor: pigment.id.clone(),
        model,
        level_unit: pigment.level_unit,
        constants: c,
        from_memory: memo,
        total_s: schedule.total_s(),
        steps: schedule.steps.len(),
        phases,
        summary,
        lights_off,
        recoveries,
        thresholds,
        time_course: samples.map(|n| sample(model, c, schedule, b0, n)).unwrap_or_default(),
        saturation,
        notes,
    })
}

/// One pass over the schedule: the rows per named phase and the end, peak and mean.
fn phases_and_summary(
    pigment: &Pigment,
    model: Model,
    schedule: &Schedule,
    b0: f64,
) -> (Vec<PhaseRow>, Summary) {
    let c = pigment.constants();
    let mut phases: Vec<PhaseRow> = schedule
        .names
        .iter()
        .map(|n| PhaseRow {
            name: n.clone(),
            steps: 0,
            level: 0.0,
            end: 0.0,
            max_end: 0.0,
            steady_state: 0.0,
        })
        .collect();
    let (mut peak, mut peak_s, mut area) = (b0, 0.0, 0.0);
    let end = run(model, c, schedule, b0, |o| {
        let s = &schedule.steps[o.index];
        let row = &mut phases[s.name];
        row.steps += 1;
        row.level = pigment.level_of_rate(s.rate_per_s);
        row.end = o.b_end;
        row.max_end = row.max_end.max(o.b_end);
        row.steady_state = o.steady_state;
        if o.b_end > peak {
            peak = o.b_end;
            peak_s = o.start_s + s.duration_s;
        }
        area += o.integral_s;
    });
    (phases, Summary { end, peak, peak_s, mean: area / schedule.total_s() })
}

/// Whether the brightest step reaches the receptor's saturating level, in words.
fn saturation_text(pigment: &Pigment, schedule: &Schedule) -> Option<String> {
    let max_level = schedule.steps.iter().map(|s| pigment.level_of_rate(s.rate_per_s)).fold(0.0, f64::max);
    pigment.saturating_level.as_ref().map(|sat| {
        let u = pigment.level_unit.symbol();
        let (verb, tail) = if max_level >= sat.value {
            ("reaches", ": rods are saturated during it")
        } else {
            ("is below", "")
        };
        format!(
            "the brightest step ({} {u}) {verb} the rod saturation level ({} {u}, {}){tail}",
            crate::base::units::sig4(max_level),
            crate::base::units::sig4(sat.value),
            sat.status
        )
    })
}

/// Bleached fraction in darkness `t_s` after `b0`.
fn dark_b(model: Model, c: Constants, b0: f64, t_s: f64) -> f64 {
    crate::pigment::kinetics::advance(model, c, b0, 0.0, t_s)
}

fn threshold_estimates(model: Model, c: Constants, b_end: f64) -> Vec<Threshold> {
    let da = &builtin_pigments().dark_adaptation;
    let plateau = da.cone_plateau.value;
    let alpha = da.dowling_rushton_alpha.value;
    let s2_per_min = da.s2_slope.value.value * 60.0;
    let b_break = plateau / alpha;
    let t_break_min = dark_time_to(model, c, b_end, b_break).unwrap_or(0.0) / 60.0;
    let minutes: Vec<f64> = (0..=120).map(f64::from).collect();
    let s2: Vec<(f64, f64)> = minutes
        .iter()
        .map(|&m| {
            let e = if b_end <= b_break {
                // Small bleach: rods never left the S2 branch; start from the Dowling–Rushton value.
                (alpha * b_end - s2_per_min * m).max(0.0)
            } else if m <= t_break_min {
                plateau
            } else {
                (plateau - s2_per_min * (m - t_break_min)).max(0.0)
            };
            (m, e)
        })
        .collect();
    let dr: Vec<(f64, f64)> =
        minutes.iter().map(|&m| (m, (alpha * dark_b(model, c, b_end, m * 60.0)).min(plateau))).collect();
    let within = |curve: &[(f64, f64)]| curve.iter().find(|p| p.1 < 0.1).map(|p| p.0);
    vec![
        Threshold {
            basis: format!(
                "S2 route: cone plateau {plateau} log units ({}), rod–cone break at B = {b_break:.3}, then {s2_per_min} log units/min ({})",
                da.cone_plateau.status, da.s2_slope.status
            ),
            to_within_0_1_log_min: within(&s2),
            curve: s2,
        },
        Threshold {
            basis: format!(
                "Dowling–Rushton route: log elevation = {alpha} × B(t) ({}), capped at the {plateau}-log-unit plateau",
                da.dowling_rushton_alpha.status
            ),
            to_within_0_1_log_min: within(&dr),
            curve: dr,
        },
    ]
}

/// The constant level (receptor units) that bleaches `target` in `duration_s` from `b0`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a target outside (b0, 1) or a duration not above 0.
pub fn level_for_target(
    pigment: &Pigment,
    model: Model,
    b0: f64,
    target: f64,
    duration_s: f64,
) -> Result<f64> {
    if !(target > b0 && target < 1.0 && duration_s > 0.0 && duration_s.is_finite()) {
        return Err(Error::input(format!(
            "target bleach {target} must be above the start ({b0}) and below 1, and the duration above 0 s"
        )));
    }
    let c = pigment.constants();
    let reach = |k: f64| crate::pigment::kinetics::advance(model, c, b0, k, duration_s);
    let (mut lo, mut hi) = (1e-15f64, 1.0f64);
    while reach(hi) < target {
        hi *= 10.0;
        if hi > 1e15 {
            return Err(Error::input("no finite level reaches that target"));
        }
    }
    for _ in 0..200 {
        let mid = (lo * hi).sqrt();
        if reach(mid) < target {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi / lo < 1.0 + 1e-13 {
            break;
        }
    }
    Ok(pigment.level_of_rate(hi))
}

/// The duration (s) at `level` to go from `b0` to `target`; `None` if the level's steady state
/// never reaches it.
pub fn duration_for_target(pigment: &Pigment, model: Model, b0: f64, level: f64, target: f64) -> Option<f64> {
    light_time_to(model, pigment.constants(), b0, pigment.rate_of_level(level), target)
}

/// The constant level (receptor units) whose steady state is `target`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] unless 0 < target < 1.
pub fn steady_level_for_target(pigment: &Pigment, model: Model, target: f64) -> Result<f64> {
    if !(target > 0.0 && target < 1.0) {
        return Err(Error::input(format!("target bleach {target} must be between 0 and 1 (exclusive)")));
    }
    Ok(pigment.level_of_rate(rate_for_steady_state(model, pigment.constants(), target)))
}

/// Steady-state bleached fraction at `level`.
pub fn steady_at(pigment: &Pigment, model: Model, level: f64) -> f64 {
    steady_state(model, pigment.constants(), pigment.rate_of_level(level))
}

/// A rod flash response estimate (Lamb & Pugh 1992 activation model).
#[derive(Debug, Clone, PartialEq)]
pub struct FlashResponse {
    /// Flash strength, R* per rod.
    pub phi: f64,
    /// Amplification constant A used, s⁻².
    pub amplification: f64,
    /// Effective delay, s.
    pub delay_s: f64,
    /// (time s, fraction of circulating current suppressed).
    pub curve: Vec<(f64, f64)>,
    /// Time to half suppression, s.
    pub t_half_s: f64,
    /// Time to 95 % suppression, s.
    pub t_95_s: f64,
    /// Whether the flash saturates (95 % within 0.1 s).
    pub saturating: bool,
    /// Basis and status.
    pub basis: String,
}

/// Lamb & Pugh (1992) activation: r(t) = 1 − exp(−½ Φ A (t − t_eff)²) for t > t_eff.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for Φ not above 0.
pub fn flash_response(pigment: &Pigment, phi: f64) -> Result<FlashResponse> {
    if !(phi > 0.0 && phi.is_finite()) {
        return Err(Error::input(format!("flash strength {phi} R*/rod must be above 0")));
    }
    let rr = &builtin_pigments().rod_response;
    let a = if pigment.id.starts_with("human") { &rr.human_amplification } else { &rr.rodent_amplification };
    let d = crate::base::quantity::SiValue::si(&rr.effective_delay.value);
    let r = |t: f64| if t <= d { 0.0 } else { 1.0 - (-0.5 * phi * a.value * (t - d).powi(2)).exp() };
    let curve = (0..=100).map(|i| f64::from(i) * 0.002).map(|t| (t, r(t))).collect();
    let t_of = |level: f64| d + (2.0 * (1.0 / (1.0 - level)).ln() / (phi * a.value)).sqrt();
    let t_95 = t_of(0.95);
    Ok(FlashResponse {
        phi,
        amplification: a.value,
        delay_s: d,
        curve,
        t_half_s: t_of(0.5),
        t_95_s: t_95,
        saturating: t_95 <= 0.1,
        basis: format!(
            "Lamb & Pugh (1992) activation model, A = {} s⁻² ({}), t_eff = {} ms ({}); an estimate of the rising phase only \
             (no recovery); a flash that suppresses 95 % of the current within 0.1 s is called saturating (common practice, no source)",
            a.value,
            a.status,
            d * 1e3,
            rr.effective_delay.status
        ),
    })
}
