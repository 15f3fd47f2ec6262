//! The pigment course of a schedule of light levels, with one named step's light scaled by a
//! factor or its duration changed: the one computation `assess`, the level sweep and the inverse
//! solves of `retidose bleach --scenario` share.
//!
//! Light is linear: a factor on a step's light multiplies its trolands and its R*/rod/s, so the
//! pigment level of the step is the factor times the level as written. Every answer goes through
//! [`Course::report`] or [`Course::schedule`], the same path `assess` takes.

use crate::base::error::{Error, Result};
use crate::base::quantity::{SiValue, Time};
use crate::pigment::bleach::{BleachReport, assess as bleach_assess};
use crate::pigment::kinetics::{LevelUnit, Model, Pigment, steady_state};
use crate::pigment::schedule::{MAX_SCHEDULE_S, Schedule, run};

/// One step of one cycle: its name, its duration and its level in the pigment's unit.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct CourseStep {
    /// Free-text name.
    pub name: String,
    /// Duration.
    pub duration: Time,
    /// Light level in the pigment's level unit (scot td, phot td or R*/rod/s).
    pub level: f64,
}

/// A schedule of light levels for one pigment: one cycle of steps, repeated.
#[derive(Debug, Clone, PartialEq)]
pub struct Course {
    /// The receptor.
    pub pigment: Pigment,
    /// The model.
    pub model: Model,
    /// The steps of one cycle.
    pub steps: Vec<CourseStep>,
    /// Cycles.
    pub repeat: u64,
    /// Bleached fraction at the start.
    pub start: f64,
}

/// A change to one step (of every cycle): its light times `factor`, and its duration replaced.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Change {
    /// Index of the step in one cycle.
    pub step: usize,
    /// Factor on the step's light.
    pub factor: f64,
    /// A new duration for the step, if any.
    pub duration: Option<Time>,
}

impl Change {
    /// The step's light times `factor`.
    pub fn light(step: usize, factor: f64) -> Change {
        Change { step, factor, duration: None }
    }

    /// The step lasting `duration`.
    pub fn duration(step: usize, duration: Time) -> Change {
        Change { step, factor: 1.0, duration: Some(duration) }
    }
}

/// The tolerance of every solve on the bleached fraction at the end of the step.
pub const TOLERANCE: f64 = 1e-9;

/// The most points a level sweep may have.
pub const MAX_SWEEP_POINTS: usize = 10_000;

/// The most step runs a sweep may take (points × steps of the schedule), so it ends in seconds.
pub const MAX_SWEEP_WORK: u64 = 100_000_000;

/// The widest factor a level solve searches: from 10⁻¹⁵ to 10¹⁵ times the step's light.
const FACTOR_LIMITS: (f64, f64) = (1e-15, 1e15);

/// The shortest duration a duration solve searches, s.
const SHORTEST_S: f64 = 1e-9;

impl Course {
    /// The index of the step called `name` (any case), which must name one step of the cycle.
    ///
    /// # Errors
    /// [`crate::ErrorKind::UnknownName`] listing the step names, or
    /// [`crate::ErrorKind::InvalidInput`] when the name is shared by several steps.
    pub fn find_step(&self, name: &str) -> Result<usize> {
        let same = |s: &CourseStep| s.name.trim().eq_ignore_ascii_case(name.trim());
        let hits: Vec<usize> =
            self.steps.iter().enumerate().filter(|(_, s)| same(s)).map(|(i, _)| i).collect();
        let names = || self.steps.iter().map(|s| format!("'{}'", s.name)).collect::<Vec<_>>().join(", ");
        match hits.as_slice() {
            [i] => Ok(*i),
            [] => Err(Error::new(
                crate::ErrorKind::UnknownName,
                format!("no step named '{name}'; steps: {}", names()),
            )),
            many => Err(Error::input(format!(
                "{} steps are named '{name}' (steps {}); give the step a name of its own",
                many.len(),
                many.iter().map(|i| (i + 1).to_string()).collect::<Vec<_>>().join(" and ")
            ))),
        }
    }

    /// The schedule with `change` applied (levels converted to bleaching rates, cycles repeated).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for a step index outside the cycle, a negative or
    /// non-finite factor, a duration not above 0, or a schedule that is too long.
    pub fn schedule(&self, change: Option<Change>) -> Result<Schedule> {
        if let Some(c) = change {
            if c.step >= self.steps.len() {
                return Err(Error::input(format!(
                    "step {} is outside the cycle of {} steps",
                    c.step + 1,
                    self.steps.len()
                )));
            }
            if !(c.factor >= 0.0 && c.factor.is_finite()) {
                return Err(Error::input(format!(
                    "the factor {} on the light must be a finite number ≥ 0",
                    c.factor
                )));
            }
        }
        let mut schedule = Schedule::default();
        for (i, st) in self.steps.iter().enumerate() {
            let (mut level, mut duration) = (st.level, st.duration);
            if let Some(c) = change.filter(|c| c.step == i) {
                level *= c.factor;
                duration = c.duration.unwrap_or(duration);
            }
            schedule.push(&st.name, duration.si(), self.pigment.rate_of_level(level))?;
        }
        schedule.repeat(self.repeat)?;
        Ok(schedule)
    }

    /// The bleach report of the schedule with `change` applied, as `assess` makes it.
    ///
    /// # Errors
    /// As [`Course::schedule`] and [`crate::pigment::bleach::assess`].
    pub fn report(&self, change: Option<Change>, samples: Option<usize>) -> Result<BleachReport> {
        bleach_assess(&self.pigment, self.model, &self.schedule(change)?, self.start, samples)
    }

    /// The bleached fraction at the end of step `step`, the highest over its cycles (the
    /// report's `max_end` of that step), with `change` applied.
    ///
    /// # Errors
    /// As [`Course::schedule`].
    pub fn step_end(&self, step: usize, change: Option<Change>) -> Result<f64> {
        let schedule = self.schedule(change)?;
        let n = self.steps.len();
        let c = self.pigment.constants();
        let mut high = 0.0f64;
        run(self.model, c, &schedule, self.start, |o| {
            if o.index % n == step {
                high = high.max(o.b_end);
            }
        });
        Ok(high)
    }

    /// The factor on step `step`'s light that makes its end [`Course::step_end`] equal
    /// `target` within [`TOLERANCE`].
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] saying plainly why when the target cannot be reached:
    /// outside (0, 1), reached already with the step dark, or not reached at 10¹⁵ times the light.
    pub fn solve_level(&self, step: usize, target: f64) -> Result<LevelSolve> {
        check_target(target)?;
        let name = &self.steps[step].name;
        let end = |f: f64| self.step_end(step, Some(Change::light(step, f)));
        let dark = end(0.0)?;
        if dark >= target {
            return Err(Error::input(format!(
                "the target {target} cannot be reached by dimming: with step '{name}' dark the pigment is already {dark:.6} \
                 bleached at its end (from the steps before it); a lower target, or less light before it"
            )));
        }
        if self.steps[step].level <= 0.0 {
            return Err(Error::input(format!(
                "step '{name}' has no light to scale (level 0): no factor reaches the target {target}"
            )));
        }
        let bracket = expand(&end, target, 1.0, FACTOR_LIMITS)?.ok_or_else(|| {
            let most = end(FACTOR_LIMITS.1).unwrap_or(f64::NAN);
            Error::input(format!(
                "the target {target} cannot be reached: at {:e} times the light of step '{name}' its end is {most:.6} \
                 bleached (the model's steady state holds it below the target)",
                FACTOR_LIMITS.1
            ))
        })?;
        let (factor, reached) = bisect(&end, target, bracket)?;
        Ok(LevelSolve {
            step: name.clone(),
            target,
            bracket,
            tolerance: TOLERANCE,
            factor,
            level: factor * self.steps[step].level,
            level_unit: self.pigment.level_unit,
            reached,
        })
    }

    /// The duration of step `step` that makes its end [`Course::step_end`] equal `target`
    /// within [`TOLERANCE`], searched from 1 ns to the longest the schedule allows.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] saying plainly why when the target cannot be reached
    /// (for instance above the steady state of the step's light).
    pub fn solve_duration(&self, step: usize, target: f64) -> Result<DurationSolve> {
        check_target(target)?;
        let st = &self.steps[step];
        let end = |d: f64| self.step_end(step, Some(Change::duration(step, Time::from_si(d))));
        let others: f64 = self.steps.iter().map(|s| s.duration.si()).sum::<f64>() - st.duration.si();
        let longest = MAX_SCHEDULE_S / self.repeat.max(1) as f64 - others;
        let ss = steady_state(self.model, self.pigment.constants(), self.pigment.rate_of_level(st.level));
        let unreachable = |why: String| {
            Error::input(format!(
                "the target {target} cannot be reached at the end of step '{}' by any duration: {why}",
                st.name
            ))
        };
        if longest <= SHORTEST_S {
            return Err(unreachable("the other steps fill the longest schedule allowed (100 years)".into()));
        }
        let bracket = expand(&end, target, st.duration.si().min(longest), (SHORTEST_S, longest))?
            .ok_or_else(|| {
                unreachable(format!(
                    "its light holds the pigment at a steady state of {ss:.6} bleached, and from {SHORTEST_S:e} s to \
                     {longest:.4e} s its end stays on one side of the target"
                ))
            })?;
        let (d, reached) = bisect(&end, target, bracket)?;
        Ok(DurationSolve {
            step: st.name.clone(),
            target,
            bracket: (Time::from_si(bracket.0), Time::from_si(bracket.1)),
            tolerance: TOLERANCE,
            duration: Time::from_si(d),
            steady_state: ss,
            reached,
        })
    }

    /// Bleach against the factor on step `step`'s light at `points` factors evenly spaced in
    /// log from `from` to `to`, each point a full report as `assess` makes it.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] for factors not above 0, `from` not below `to`, a
    /// number of points outside 2..=[`MAX_SWEEP_POINTS`], or more than [`MAX_SWEEP_WORK`] step runs.
    pub fn sweep_level(&self, step: usize, from: f64, to: f64, points: usize) -> Result<LevelSweep> {
        if !(from > 0.0 && to > from && to.is_finite()) {
            return Err(Error::input(format!("the factors must satisfy 0 < from < to, not {from} to {to}")));
        }
        if !(2..=MAX_SWEEP_POINTS).contains(&points) {
            return Err(Error::input(format!("{points} points: give 2 to {MAX_SWEEP_POINTS}")));
        }
        let work = (self.steps.len() as u64).saturating_mul(self.repeat).saturating_mul(points as u64);
        if work > MAX_SWEEP_WORK {
            return Err(Error::input(format!(
                "{points} points × {} steps is more than the {MAX_SWEEP_WORK} step runs a sweep may take; give fewer \
                 points or a shorter schedule",
                self.steps.len() as u64 * self.repeat
            )));
        }
        let name = self.steps[step].name.clone();
        let ratio = (to / from).ln();
        let out = (0..points)
            .map(|k| {
                let factor =
                    if k + 1 == points { to } else { from * (ratio * k as f64 / (points - 1) as f64).exp() };
                self.point(step, factor)
            })
            .collect::<Result<Vec<_>>>()?;
        Ok(LevelSweep { step: name, level_unit: self.pigment.level_unit, points: out })
    }

    /// One sweep point: the report at `factor`, read as the assessment reads it.
    fn point(&self, step: usize, factor: f64) -> Result<SweepPoint> {
        let r = self.report(Some(Change::light(step, factor)), None)?;
        let name = &self.steps[step].name;
        let row = r.phases.iter().find(|p| &p.name == name);
        let after = r.recoveries.iter().find(|x| &x.after_step == name);
        Ok(SweepPoint {
            factor,
            level: factor * self.steps[step].level,
            step_end: row.map_or(0.0, |p| p.max_end),
            peak: r.summary.peak,
            recovery_90: after.and_then(|x| x.to_90_s).map(Time::from_si),
            lights_off_after: after.is_some(),
        })
    }
}

/// A level solve: the factor on a step's light that bleaches the target by the step's end.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LevelSolve {
    /// The step.
    pub step: String,
    /// Target bleached fraction at the end of the step (the highest over its cycles).
    pub target: f64,
    /// The factors searched: the target lies between the ends at these two.
    pub bracket: (f64, f64),
    /// Tolerance on the bleached fraction.
    pub tolerance: f64,
    /// The factor on the step's light as written.
    pub factor: f64,
    /// The step's level at that factor, in `level_unit`.
    pub level: f64,
    /// The pigment's level unit.
    pub level_unit: LevelUnit,
    /// The bleached fraction at the end of the step at that factor.
    pub reached: f64,
}

/// A duration solve: how long a step must last to bleach the target by its end.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct DurationSolve {
    /// The step.
    pub step: String,
    /// Target bleached fraction at the end of the step (the highest over its cycles).
    pub target: f64,
    /// The durations searched: the target lies between the ends at these two.
    pub bracket: (Time, Time),
    /// Tolerance on the bleached fraction.
    pub tolerance: f64,
    /// The duration.
    pub duration: Time,
    /// The steady state of the step's light (no duration takes the step's end past it from below).
    pub steady_state: f64,
    /// The bleached fraction at the end of the step with that duration.
    pub reached: f64,
}

/// One point of a level sweep.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SweepPoint {
    /// Factor on the step's light.
    pub factor: f64,
    /// The step's level, in the sweep's level unit.
    pub level: f64,
    /// Bleached fraction at the end of the step (the highest over its cycles).
    pub step_end: f64,
    /// The peak over the schedule.
    pub peak: f64,
    /// Time to 90 % regenerated after the lights-off at the step's end; `None` when not reached
    /// before the light rose again, or when the step's end is not a lights-off the report follows.
    pub recovery_90: Option<Time>,
    /// Whether the step's end is a lights-off the report follows.
    pub lights_off_after: bool,
}

/// Bleach against the factor on one step's light.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LevelSweep {
    /// The step.
    pub step: String,
    /// The pigment's level unit.
    pub level_unit: LevelUnit,
    /// The points, in increasing factor.
    pub points: Vec<SweepPoint>,
}

fn check_target(target: f64) -> Result<()> {
    if target > 0.0 && target < 1.0 {
        Ok(())
    } else {
        Err(Error::input(format!("target bleach {target} must be between 0 and 1 (exclusive)")))
    }
}

/// A bracket (lo, hi) within `limits` around `start` where `f` crosses `target` (either
/// direction), widening by tens from `start`; `None` when `f` stays on one side at both limits.
fn expand(
    f: &dyn Fn(f64) -> Result<f64>,
    target: f64,
    start: f64,
    limits: (f64, f64),
) -> Result<Option<(f64, f64)>> {
    let side = |x: f64| -> Result<bool> { Ok(f(x)? >= target) };
    let s0 = side(start)?;
    let (mut lo, mut hi) = (start, start);
    loop {
        let (nlo, nhi) = ((lo / 10.0).max(limits.0), (hi * 10.0).min(limits.1));
        if side(nhi)? != s0 {
            return Ok(Some((hi, nhi)));
        }
        if side(nlo)? != s0 {
            return Ok(Some((nlo, lo)));
        }
        if nlo <= limits.0 && nhi >= limits.1 {
            return Ok(None);
        }
        (lo, hi) = (nlo, nhi);
    }
}

/// Bisection in log x on a bracket where `f − target` changes sign, until `f` is within
/// [`TOLERANCE`] of the target: (x, f(x)).
///
/// # Errors
/// When the bracket closes to one float without reaching the tolerance (a step in `f`).
fn bisect(f: &dyn Fn(f64) -> Result<f64>, target: f64, bracket: (f64, f64)) -> Result<(f64, f64)> {
    let (mut lo, mut hi) = bracket;
    let rising = f(hi)? >= target;
    for _ in 0..400 {
        let mid = (lo * hi).sqrt();
        let v = f(mid)?;
        if (v - target).abs() <= TOLERANCE {
            return Ok((mid, v));
        }
        if (v >= target) == rising {
            hi = mid;
        } else {
            lo = mid;
        }
        if hi <= lo * (1.0 + 4.0 * f64::EPSILON) {
            break;
        }
    }
    Err(Error::input(format!(
        "no value between {lo:e} and {hi:e} brings the bleach within {TOLERANCE} of {target} (it jumps across the target)"
    )))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::pigment::kinetics::find_pigment;

    fn course() -> Course {
        let s = |name: &str, d: f64, level: f64| CourseStep {
            name: name.into(),
            duration: Time::from_si(d),
            level,
        };
        Course {
            pigment: find_pigment("human-rod").unwrap(),
            model: Model::Rushton,
            steps: vec![s("Bleach", 60.0, 1e5), s("dark", 2400.0, 0.0)],
            repeat: 1,
            start: 0.0,
        }
    }

    #[test]
    fn steps_are_found_in_any_case_and_unknown_names_list_the_steps() {
        let c = course();
        assert_eq!(c.find_step("BLEACH").unwrap(), 0);
        let e = c.find_step("light").unwrap_err().to_string();
        assert!(e.contains("no step named 'light'; steps: 'Bleach', 'dark'"), "{e}");
    }

    #[test]
    fn a_solved_factor_reproduces_its_target() {
        let c = course();
        let s = c.solve_level(0, 0.5).unwrap();
        let back = c.step_end(0, Some(Change::light(0, s.factor))).unwrap();
        assert!((back - 0.5).abs() <= s.tolerance, "{back}");
        assert!(s.bracket.0 <= s.factor && s.factor <= s.bracket.1);
        let d = c.solve_duration(0, 0.3).unwrap();
        let back = c.step_end(0, Some(Change::duration(0, d.duration))).unwrap();
        assert!((back - 0.3).abs() <= d.tolerance, "{back}");
    }

    #[test]
    fn unreachable_targets_say_why() {
        let c = course();
        let e = c.solve_duration(0, 0.999_999).unwrap_err().to_string();
        assert!(e.contains("cannot be reached") && e.contains("steady state"), "{e}");
        let e = c.solve_level(1, 0.5).unwrap_err().to_string();
        assert!(e.contains("cannot be reached by dimming") || e.contains("no light to scale"), "{e}");
    }
}
