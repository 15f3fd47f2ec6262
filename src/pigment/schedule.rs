//! Exposure schedules: a sequence of constant steps (duration and light level), solved step
//! by step with the exact solutions of [`crate::pigment::kinetics`].

use crate::base::error::{Error, Result};
use crate::pigment::kinetics::{Constants, Model, advance, integral, steady_state};

/// One constant step.
#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    /// Index of the step's name in [`Schedule::names`].
    pub name: usize,
    /// Duration, s.
    pub duration_s: f64,
    /// Fractional bleaching rate during the step, s⁻¹ (0 in darkness).
    pub rate_per_s: f64,
}

/// A schedule of steps (repeats already expanded).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Schedule {
    /// Step names ("light", "dark", "leak", …).
    pub names: Vec<String>,
    /// The steps in order.
    pub steps: Vec<Step>,
}

/// Longest schedule accepted: 100 years of steps (it must end).
pub const MAX_SCHEDULE_S: f64 = 100.0 * 365.25 * 86_400.0;

/// The most steps a schedule may hold after its repeats (about 240 MB; ten years of minute
/// steps fit only as longer steps). A cap is an error, never a silent truncation.
pub const MAX_STEPS: usize = 10_000_000;

/// Checks that `steps` steps of `one_cycle_s` in all, repeated `times` times, make a schedule
/// that ends (at most 100 years) and fits (at most [`MAX_STEPS`] steps).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] saying which bound is passed and what to change.
pub fn check_size(steps: usize, one_cycle_s: f64, times: u64) -> Result<()> {
    if times == 0 {
        return Err(Error::input("repeat must be at least 1"));
    }
    if one_cycle_s * times as f64 > MAX_SCHEDULE_S {
        return Err(Error::input(format!(
            "the schedule would last {:.3e} s, more than 100 years; a schedule must end",
            one_cycle_s * times as f64
        )));
    }
    let total = (steps as u64).saturating_mul(times);
    if total > MAX_STEPS as u64 {
        return Err(Error::input(format!(
            "{steps} steps × {times} repeats = {total} steps, more than the {MAX_STEPS} a schedule may hold; use longer \
             steps or fewer repeats"
        )));
    }
    Ok(())
}

impl Schedule {
    /// Adds a step called `name`.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for a duration not above 0 s or a negative or
    /// non-finite rate.
    pub fn push(&mut self, name: &str, duration_s: f64, rate_per_s: f64) -> Result<()> {
        if !(duration_s > 0.0 && duration_s.is_finite()) {
            return Err(Error::input(format!("step '{name}': duration {duration_s} s must be above 0 s")));
        }
        if self.steps.len() >= MAX_STEPS {
            return Err(Error::input(format!("a schedule may hold at most {MAX_STEPS} steps")));
        }
        if !(rate_per_s >= 0.0 && rate_per_s.is_finite()) {
            return Err(Error::input(format!("step '{name}': light level must be a finite number ≥ 0")));
        }
        let idx = match self.names.iter().position(|n| n == name) {
            Some(i) => i,
            None => {
                self.names.push(name.to_string());
                self.names.len() - 1
            }
        };
        self.steps.push(Step { name: idx, duration_s, rate_per_s });
        Ok(())
    }

    /// Repeats the steps so far `times` times in all.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for 0 repeats or a schedule longer than 100 years.
    pub fn repeat(&mut self, times: u64) -> Result<()> {
        let one: f64 = self.steps.iter().map(|s| s.duration_s).sum();
        check_size(self.steps.len(), one, times)?;
        let base = self.steps.clone();
        for _ in 1..times {
            self.steps.extend_from_slice(&base);
        }
        Ok(())
    }

    /// Total duration, s.
    pub fn total_s(&self) -> f64 {
        self.steps.iter().map(|s| s.duration_s).sum()
    }
}

/// What happened in one step.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StepOutcome {
    /// Step index.
    pub index: usize,
    /// Start time, s.
    pub start_s: f64,
    /// Bleached fraction at the start.
    pub b_start: f64,
    /// Bleached fraction at the end.
    pub b_end: f64,
    /// ∫B dt over the step, s.
    pub integral_s: f64,
    /// Steady state the step's level tends to.
    pub steady_state: f64,
}

/// Runs the schedule from `b0`, calling `each` for every step (no allocation per step).
pub fn run(
    model: Model,
    c: Constants,
    schedule: &Schedule,
    b0: f64,
    mut each: impl FnMut(&StepOutcome),
) -> f64 {
    let mut b = b0;
    let mut t = 0.0;
    for (i, s) in schedule.steps.iter().enumerate() {
        let b_end = advance(model, c, b, s.rate_per_s, s.duration_s).clamp(0.0, 1.0);
        let outcome = StepOutcome {
            index: i,
            start_s: t,
            b_start: b,
            b_end,
            integral_s: integral(model, c, b, b_end, s.rate_per_s, s.duration_s),
            steady_state: steady_state(model, c, s.rate_per_s),
        };
        each(&outcome);
        b = b_end;
        t += s.duration_s;
    }
    b
}

/// Summary of a run: end, peak (steps are monotone, so the peak is at a step boundary), and the
/// time-weighted mean bleached fraction.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Summary {
    /// Bleached fraction at the end.
    pub end: f64,
    /// Largest bleached fraction.
    pub peak: f64,
    /// Time of the peak, s.
    pub peak_s: f64,
    /// Time-weighted mean.
    pub mean: f64,
}

/// Runs and summarises.
pub fn summarise(model: Model, c: Constants, schedule: &Schedule, b0: f64) -> Summary {
    let (mut peak, mut peak_s, mut area) = (b0, 0.0, 0.0);
    let end = run(model, c, schedule, b0, |o| {
        if o.b_end > peak {
            peak = o.b_end;
            peak_s = o.start_s + schedule.steps[o.index].duration_s;
        }
        area += o.integral_s;
    });
    let total = schedule.total_s();
    Summary { end, peak, peak_s, mean: if total > 0.0 { area / total } else { b0 } }
}

/// The bleached fraction at `n` evenly spaced times over the schedule (both ends included).
pub fn sample(model: Model, c: Constants, schedule: &Schedule, b0: f64, n: usize) -> Vec<(f64, f64)> {
    let total = schedule.total_s();
    let n = n.max(2);
    let mut out = Vec::with_capacity(n);
    let mut next = 0usize;
    let at = |k: usize| total * k as f64 / (n - 1) as f64;
    run(model, c, schedule, b0, |o| {
        let s = &schedule.steps[o.index];
        let end = o.start_s + s.duration_s;
        while next < n && at(next) <= end + 1e-9 * end.max(1.0) {
            let dt = (at(next) - o.start_s).max(0.0);
            out.push((at(next), advance(model, c, o.b_start, s.rate_per_s, dt).clamp(0.0, 1.0)));
            next += 1;
        }
    });
    out
}
