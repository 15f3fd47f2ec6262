//! Guidance sets (housing light for rodents; human melanopic EDI) from `limits/guidance/`.
//!
//! Unlike the exposure limits, these are recommendations: a value outside them raises a flag
//! for review, not a verdict. Evidence entries are shown as evidence, never as limits.

use std::sync::LazyLock;

use serde::Deserialize;

use crate::assess::{GuidanceBasis, GuidanceRow, StepLight};
use crate::base::error::{Error, Result};
use crate::base::quantity::{Frequency, Illuminance, SiValue};
use crate::scenario::Phase;

/// One guidance rule.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Rule {
    /// Identifier.
    pub id: String,
    /// Name.
    pub name: String,
    /// Phase it applies to: light, dark (housing); day, evening, night (humans).
    pub phase: Phase,
    /// What it compares.
    pub quantity: GuidanceQuantity,
    /// Lower bound, lx.
    pub min_lx: Option<f64>,
    /// Upper bound, lx.
    pub max_lx: Option<f64>,
    /// Whom it applies to.
    pub applies_to: AppliesTo,
    /// Status.
    pub status: String,
    /// Source, with the quoted wording where available.
    pub source: String,
}

/// The quantity a rule compares.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum GuidanceQuantity {
    /// Illuminance, lx (for housing: room illuminance at cage level).
    Illuminance,
    /// CIE S 026 melanopic equivalent daylight illuminance at the eye, lx.
    MelanopicEdi,
}

/// Whom a rule applies to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum AppliesTo {
    /// Every animal subject.
    All,
    /// Albino animals (susceptible to phototoxic retinopathy).
    Albino,
    /// People.
    Human,
}

/// Evidence shown beside the rules (not a limit).
#[derive(Debug, Clone, PartialEq, Deserialize, serde::Serialize)]
#[serde(deny_unknown_fields)]
pub struct Evidence {
    /// What it is about.
    pub name: String,
    /// What was found.
    pub value: String,
    /// Source and status.
    pub source: String,
    /// The species it was found in, when it names one.
    #[serde(default)]
    pub species: Option<crate::retina::eye::Species>,
    /// The light it was found with, in words.
    #[serde(default)]
    pub light: Option<String>,
    /// Its illuminance at cage level, lx, when it gives one (compared like for like).
    #[serde(default)]
    pub lux: Option<f64>,
}

/// A guidance set.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GuidanceSet {
    /// Identifier.
    pub id: String,
    /// Document.
    pub document: String,
    /// Edition and pages.
    pub edition: String,
    /// What its numbers refer to.
    pub refers_to: String,
    /// Notes.
    #[serde(default)]
    pub notes: Vec<String>,
    /// Rules.
    pub rule: Vec<Rule>,
    /// Evidence.
    #[serde(default)]
    pub evidence: Vec<Evidence>,
}

/// One flag raised (or not) by a rule.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Flag {
    /// Set id.
    pub set: String,
    /// Rule id.
    pub rule: String,
    /// Rule name.
    pub name: String,
    /// The value compared, lx.
    pub value_lx: f64,
    /// True when the value is outside the rule.
    pub raised: bool,
    /// What the comparison says.
    pub message: String,
}

impl Rule {
    /// Compares `value_lx` with the rule.
    pub fn check(&self, set: &str, value_lx: f64) -> Flag {
        let (raised, message) = match (self.min_lx, self.max_lx) {
            (_, Some(max)) if max == 0.0 && value_lx > 0.0 => (
                true,
                format!(
                    "{} lx during the {} phase: the guidance asks that it be minimized or avoided",
                    tidy4(value_lx),
                    self.phase.name()
                ),
            ),
            (_, Some(max)) if value_lx > max => (true, format!("{} lx is above {max} lx", tidy4(value_lx))),
            (Some(min), _) if value_lx < min => (true, format!("{} lx is below {min} lx", tidy4(value_lx))),
            _ => (false, format!("{} lx is within the guidance", tidy4(value_lx))),
        };
        Flag {
            set: set.to_string(),
            rule: self.id.clone(),
            name: self.name.clone(),
            value_lx,
            raised,
            message,
        }
    }
}

/// The user's "at most" targets for one schedule step's light (`edi_target`, `rod_target` on a
/// `[[schedule.step]]`).
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct StepTargets {
    /// CIE S 026 melanopic EDI at the eye (people).
    pub edi: Option<Illuminance>,
    /// Rod R* per rod per second.
    pub rod: Option<Frequency>,
}

impl StepTargets {
    /// Reads `edi_target` ("10 lx") and `rod_target` ("100 R*/rod/s"); each must be above 0.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] naming the key, with an example of a good value.
    pub fn parse(edi: Option<&str>, rod: Option<&str>) -> Result<StepTargets> {
        let positive = |v: f64, text: &str, key: &str, example: &str| {
            if v > 0.0 && v.is_finite() {
                Ok(())
            } else {
                Err(Error::input(format!("{text}: give a value above 0, such as \"{example}\"")).key(key))
            }
        };
        let edi = edi
            .map(|t| {
                let v = crate::base::units::parse_illuminance(t).map_err(|e| e.key("edi_target"))?;
                positive(v.si(), t, "edi_target", "10 lx").map(|()| v)
            })
            .transpose()?;
        let rod = rod
            .map(|t| {
                let v = crate::base::units::parse_isomerisation_rate(t).map_err(|e| e.key("rod_target"))?;
                positive(v.si(), t, "rod_target", "100 R*/rod/s").map(|()| v)
            })
            .transpose()?;
        Ok(StepTargets { edi, rod })
    }
}

/// A quantity of a step's light that an "at most" bound caps.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case", tag = "quantity", content = "value")]
pub enum StepQuantity {
    /// CIE S 026 melanopic EDI at the eye.
    MelanopicEdi(Illuminance),
    /// Rod R* per rod per second.
    RodRate(Frequency),
    /// Illuminance (the quantity the rule compares).
    Illuminance(Illuminance),
}

impl StepQuantity {
    /// The value in coherent SI units (lx, or R*/rod/s as s⁻¹).
    pub fn si(self) -> f64 {
        match self {
            StepQuantity::MelanopicEdi(v) | StepQuantity::Illuminance(v) => v.si(),
            StepQuantity::RodRate(v) => v.si(),
        }
    }

    /// The same quantity with the value `si` (coherent SI units).
    fn with(self, si: f64) -> StepQuantity {
        match self {
            StepQuantity::MelanopicEdi(_) => StepQuantity::MelanopicEdi(Illuminance::from_si(si)),
            StepQuantity::RodRate(_) => StepQuantity::RodRate(Frequency::from_si(si)),
            StepQuantity::Illuminance(_) => StepQuantity::Illuminance(Illuminance::from_si(si)),
        }
    }
}

/// Where an "at most" bound on a step's light comes from.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum BoundSource {
    /// The user's `edi_target` or `rod_target` on the step.
    Target,
    /// A guidance rule with an upper bound compared with the step.
    Guidance {
        /// Set id.
        set: String,
        /// Rule id.
        rule: String,
        /// Rule name.
        name: String,
    },
}

/// The brightest light of a step within an "at most" bound. Light is linear: at a factor s on
/// the step's light (every source lit in it) the quantity is s·v, so s = bound ÷ v; the room
/// illuminance allowed is s times the step's. A factor of 1 or more means the step meets the
/// bound with that margin.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Brightest {
    /// The step.
    pub step: String,
    /// The bound's source.
    pub source: BoundSource,
    /// The bound.
    pub bound: StepQuantity,
    /// The step's value of that quantity as assessed (the largest the step produces).
    pub value: StepQuantity,
    /// True when the value is a lower bound (a spectrum covering the band in part): then the
    /// factor is an upper bound and the light should be measured further.
    pub value_is_lower_bound: bool,
    /// True for a rod rate in a step whose pupil follows a formula of the light (people): a
    /// dimmer light opens the pupil, so the rod rate falls less than in proportion and a factor
    /// below 1 is an upper bound (above 1 the pupil narrows: the factor is on the safe side).
    pub pupil_adapts: bool,
    /// The factor on the step's light that brings the quantity to the bound (∞ for a dark step).
    pub factor: f64,
    /// The room illuminance at that factor (the step's room light before filters, times it).
    pub brightest_room: Illuminance,
    /// True when the step already meets the bound (value ≤ bound).
    pub meets: bool,
}

impl Brightest {
    /// The brightest light of step `step`, whose `value` (a lower bound when `lower`) is capped
    /// by `bound`, with the room illuminance `room` as the step is written.
    pub fn of(
        step: &str,
        source: BoundSource,
        bound: StepQuantity,
        (value, lower): (f64, bool),
        room: Illuminance,
    ) -> Brightest {
        let factor = if value > 0.0 { bound.si() / value } else { f64::INFINITY };
        Brightest {
            step: step.to_string(),
            source,
            bound,
            value: bound.with(value),
            value_is_lower_bound: lower,
            pupil_adapts: false,
            factor,
            brightest_room: Illuminance::from_si(factor * room.si()),
            meets: value <= bound.si(),
        }
    }
}

/// The brightest light of each step within every "at most" bound compared with it: the user's
/// targets (`targets[i]` for `steps[i]`, with whether that step's pupil follows a formula of
/// the light) and each guidance row of a step whose rule has an upper
/// bound above 0 (a bound of 0 asks for no light; its flag says so). A target the step cannot
/// give (an `edi_target` for an animal) is listed in `not_assessed`.
pub fn brightest(
    steps: &[StepLight],
    targets: &[(StepTargets, bool)],
    sets: &[&GuidanceSet],
    rows: &[GuidanceRow],
    not_assessed: &mut Vec<String>,
) -> Vec<Brightest> {
    let edi_lower =
        |st: &StepLight| st.alpha_opic.iter().any(|a| a.name == "melanopic" && a.coverage.matters());
    let mut out = Vec::new();
    for (st, (t, adapts)) in steps.iter().zip(targets) {
        let room = st.room_illuminance;
        match (t.edi, st.melanopic_edi) {
            (Some(b), Some(v)) => out.push(Brightest::of(
                &st.name,
                BoundSource::Target,
                StepQuantity::MelanopicEdi(b),
                (v.si(), edi_lower(st)),
                room,
            )),
            (Some(_), None) => not_assessed.push(format!(
                "step '{}': edi_target is for people (CIE S 026 melanopic EDI); use rod_target for animals",
                st.name
            )),
            _ => {}
        }
        match (t.rod, st.rod_rate) {
            (Some(b), Some(v)) => out.push(Brightest {
                pupil_adapts: *adapts,
                ..Brightest::of(
                    &st.name,
                    BoundSource::Target,
                    StepQuantity::RodRate(b),
                    (v.si(), false),
                    room,
                )
            }),
            (Some(_), None) => not_assessed
                .push(format!("step '{}': rod_target: the rod R*/rod/s of this step is not known", st.name)),
            _ => {}
        }
    }
    for row in rows {
        let GuidanceBasis::Step(name) = &row.basis else { continue };
        let f = &row.flag;
        let rule = sets.iter().filter(|g| g.id == f.set).flat_map(|g| &g.rule).find(|r| r.id == f.rule);
        let (Some(rule), Some(st)) = (rule, steps.iter().find(|st| &st.name == name)) else { continue };
        let Some(max) = rule.max_lx.filter(|m| *m > 0.0) else { continue };
        let (bound, lower) = match rule.quantity {
            GuidanceQuantity::MelanopicEdi => {
                (StepQuantity::MelanopicEdi(Illuminance::from_si(max)), edi_lower(st))
            }
            GuidanceQuantity::Illuminance => (StepQuantity::Illuminance(Illuminance::from_si(max)), false),
        };
        let source = BoundSource::Guidance { set: f.set.clone(), rule: f.rule.clone(), name: f.name.clone() };
        out.push(Brightest::of(name, source, bound, (f.value_lx, lower), st.room_illuminance));
    }
    out
}

/// A reading with 4 significant digits.
fn tidy4(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let digits = (3 - v.abs().log10().floor() as i32).max(0) as usize;
    format!("{v:.digits$}")
}

/// Parses a guidance file.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming `origin`: unknown keys, a rule without bounds or
/// with an unknown quantity.
pub fn parse_guidance(text: &str, origin: &str) -> Result<GuidanceSet> {
    let g: GuidanceSet =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    for (i, r) in g.rule.iter().enumerate() {
        if r.min_lx.is_none() && r.max_lx.is_none() {
            return Err(Error::data(format!("{origin}: key 'rule[{i}]' ({}) needs min_lx or max_lx", r.id)));
        }
    }
    Ok(g)
}

/// The guidance files shipped in `limits/guidance/`.
pub const GUIDANCE_FILES: [(&str, &str); 2] = [
    ("limits/guidance/nrc_guide_2011.toml", include_str!("../../limits/guidance/nrc_guide_2011.toml")),
    ("limits/guidance/brown_2022.toml", include_str!("../../limits/guidance/brown_2022.toml")),
];

static SETS: LazyLock<Vec<GuidanceSet>> = LazyLock::new(|| {
    GUIDANCE_FILES
        .iter()
        .map(|(n, t)| parse_guidance(t, n).unwrap_or_else(|e| panic!("embedded guidance: {e}")))
        .collect()
});

/// The built-in guidance sets.
pub fn builtin_guidance() -> &'static [GuidanceSet] {
    &SETS
}

/// A built-in guidance set by id.
///
/// # Errors
/// [`crate::ErrorKind::UnknownName`] listing the ids.
pub fn find_guidance(id: &str) -> Result<&'static GuidanceSet> {
    SETS.iter().find(|s| s.id == id).ok_or_else(|| {
        Error::new(
            crate::ErrorKind::UnknownName,
            format!(
                "unknown guidance set '{id}'; built in: {}",
                SETS.iter().map(|s| s.id.as_str()).collect::<Vec<_>>().join(", ")
            ),
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn flags_change_exactly_at_the_thresholds() {
        let nrc = find_guidance("nrc-guide-2011").unwrap();
        let upper = nrc.rule.iter().find(|r| r.id == "cage-level-upper").unwrap();
        assert!(!upper.check("nrc", 325.0).raised);
        assert!(upper.check("nrc", 325.000_001).raised);
        let lower = nrc.rule.iter().find(|r| r.id == "cage-level-lower").unwrap();
        assert!(!lower.check("nrc", 130.0).raised);
        assert!(lower.check("nrc", 129.999_999).raised);
        let dark = nrc.rule.iter().find(|r| r.id == "dark-phase").unwrap();
        assert!(!dark.check("nrc", 0.0).raised);
        assert!(dark.check("nrc", 1e-6).raised);
    }
}
