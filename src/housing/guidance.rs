//! Guidance sets (housing light for rodents; human melanopic EDI) from `limits/guidance/`.
//!
//! Unlike the exposure limits, these are recommendations: a value outside them raises a flag
//! for review, not a verdict. Evidence entries are shown as evidence, never as limits.

use std::sync::LazyLock;

use serde::Deserialize;

use crate::base::error::{Error, Result};
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
