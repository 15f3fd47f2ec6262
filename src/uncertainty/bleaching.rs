//! The bleach figures of a scenario's schedule as a Monte Carlo model: per draw the schedule's
//! light levels are scaled by the draw's factor on the pigment's level (scotopic or photopic
//! trolands, or R*/rod/s, from [`super::retina::RetinaModel`]), the kinetic parameters are
//! drawn, and the schedule is run by the engine's own [`crate::pigment::bleach::assess`]
//! (exact step solutions of [`crate::pigment::kinetics`]).
//!
//! A step that lights the chosen source takes its full factor (a step lighting it with other
//! sources too: an approximation, the others take the same factor); a step that does not light
//! it takes the factor of the eye's inputs only (pupil and eye parameters), with the source's
//! reading, distance, size and tilt at their values, and a dark-phase step with a pupil of its
//! own the eye parameters' factor only.

use crate::base::error::{Error, Result};
use crate::base::quantity::SiValue;
use crate::pigment::bleach::assess as run_schedule;
use crate::pigment::kinetics::{LevelUnit, Model, Pigment};
use crate::pigment::schedule::Schedule;
use crate::scenario::file::Scenario;

use super::Figure;
use super::figures::{Figures, Var};
use super::params::{PigmentSlot, pigment_vars, set_pigment};
use super::retina::RetinaModel;

/// Which inputs act on a step's light.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Acting {
    /// Every input (the step lights the chosen source).
    All,
    /// The pupil and the eye parameters (another source, through the same pupil).
    Eye,
    /// The eye parameters only (another source, through a dark-phase pupil of its own).
    Parameters,
}

/// The schedule of a scenario, its pigment, and the retina model of its level.
pub(super) struct BleachModel<'a> {
    retina: &'a RetinaModel,
    /// The retina figure that is the pigment's level.
    level: usize,
    pigment: Pigment,
    model: Model,
    schedule: Schedule,
    /// Per expanded step: which inputs act on its light.
    acting: Vec<Acting>,
    slots: Vec<PigmentSlot>,
    pub figures: Vec<Figure>,
    pub vars: Vec<Var>,
}

impl<'a> BleachModel<'a> {
    /// The model of the schedule of `s` with the chosen source `index`.
    pub(super) fn new(
        s: &Scenario,
        index: usize,
        retina: &'a RetinaModel,
        parameters: bool,
    ) -> Result<BleachModel<'a>> {
        let sc = s
            .schedule
            .as_ref()
            .ok_or_else(|| Error::input("the scenario has no [schedule]: no bleach figures"))?;
        let wanted = match sc.pigment.level_unit {
            LevelUnit::ScotopicTrolands => Figure::ScotopicTrolands,
            LevelUnit::PhotopicTrolands => Figure::PhotopicTrolands,
            LevelUnit::IsomerisationsPerSecond => Figure::RodRate,
        };
        let level = retina.figures.iter().position(|f| *f == wanted).ok_or_else(|| {
            Error::input("the chosen source has no retinal level for the pigment: no bleach figures")
        })?;
        let a = crate::assess::assess(s)?;
        let mut schedule = Schedule::default();
        let mut lights = Vec::new();
        for st in &a.steps {
            schedule.push(&st.name, st.duration.si(), sc.pigment.rate_of_level(st.level))?;
            let own_pupil = st.phase.is_some_and(|p| p.is_dark()) && s.dark_pupil != s.view.pupil;
            lights.push(if st.on.iter().any(|id| *id == s.source_ids[index]) {
                Acting::All
            } else if own_pupil {
                Acting::Parameters
            } else {
                Acting::Eye
            });
        }
        schedule.repeat(sc.repeat)?;
        let acting = lights.iter().copied().cycle().take(schedule.steps.len()).collect();
        let nominal = run_schedule(&sc.pigment, sc.model, &schedule, 0.0, None)?;
        let mut figures = vec![Figure::PeakBleached];
        if !nominal.recoveries.is_empty() {
            figures.push(Figure::RecoveryTo90);
        }
        let mut vars = retina.vars.clone();
        let mut slots = Vec::new();
        if parameters {
            // τ0 enters only the Rushton model, v and K_m only the rate-limited one.
            let used = |slot: &PigmentSlot| match slot {
                PigmentSlot::Tau0 => sc.model == Model::Rushton,
                PigmentSlot::V | PigmentSlot::Km => sc.model == Model::RateLimited,
                PigmentSlot::QE | PigmentSlot::PerCell => true,
            };
            for (slot, v) in pigment_vars(&sc.pigment).into_iter().filter(|(slot, _)| used(slot)) {
                slots.push(slot);
                vars.push(v);
            }
        }
        Ok(BleachModel {
            retina,
            level,
            pigment: sc.pigment.clone(),
            model: sc.model,
            schedule,
            acting,
            slots,
            figures,
            vars,
        })
    }
}

impl Figures for BleachModel<'_> {
    fn count(&self) -> usize {
        self.figures.len()
    }

    fn eval(&self, x: &[f64], out: &mut [f64]) {
        let n = self.retina.vars.len();
        let full = self.retina.relative(&x[..n], self.level);
        let mut y = x[..n].to_vec();
        // The source's own inputs (reading, distance, size, tilt) at their values.
        for (k, v) in y.iter_mut().zip(&self.retina.vars).take(4) {
            *k = v.nominal;
        }
        let eye = self.retina.relative(&y, self.level);
        // And the pupil's too.
        for &k in [4].iter().chain(self.retina.pupil_factor.as_ref()) {
            y[k] = self.retina.vars[k].nominal;
        }
        let parameters = self.retina.relative(&y, self.level);
        let mut p = self.pigment.clone();
        for (slot, &xi) in self.slots.iter().zip(&x[n..]) {
            set_pigment(&mut p, *slot, xi);
        }
        // The nominal rates are level ÷ (Q_e or N) of the nominal pigment.
        let per_level = p.rate_of_level(1.0) / self.pigment.rate_of_level(1.0);
        let mut schedule = self.schedule.clone();
        for (st, a) in schedule.steps.iter_mut().zip(&self.acting) {
            st.rate_per_s *= per_level
                * match a {
                    Acting::All => full,
                    Acting::Eye => eye,
                    Acting::Parameters => parameters,
                };
        }
        match run_schedule(&p, self.model, &schedule, 0.0, None) {
            Ok(r) => {
                out[0] = r.summary.peak;
                if let Some(o) = out.get_mut(1) {
                    *o = r.recoveries.last().and_then(|c| c.to_90_s).unwrap_or(f64::INFINITY);
                }
            }
            Err(_) => out.iter_mut().for_each(|o| *o = f64::NAN),
        }
    }
}
