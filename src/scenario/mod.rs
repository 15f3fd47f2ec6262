//! Scenario text to typed values, once.
//!
//! [`mod@file`] is the only code that reads a scenario file: it parses the text, then resolves it
//! into a [`file::Scenario`] of typed values (species and pigmentation as enums, every source
//! placed and scaled, the filters, the pupil rule for each phase, a schedule with explicit
//! phases, relative paths taken from the scenario's own folder). [`mod@retina`] holds the source,
//! subject and filter tables shared with the `retina` command, and [`mod@bleach`] the bleaching
//! schedule files of the `bleach` command.

pub mod bleach;
pub mod file;
pub mod retina;
pub mod room;
pub mod variant;

use serde::Serialize;

use crate::base::error::{Error, Result};

/// Whether a rodent's eyes are pigmented. Albino animals are susceptible to phototoxic
/// retinopathy, so the NRC Guide's narrower range applies to them.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Pigmentation {
    /// Pigmented iris and fundus.
    Pigmented,
    /// No pigment.
    Albino,
}

impl Pigmentation {
    /// Parses `albino` or `pigmented`, in any case.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] naming both.
    pub fn parse(text: &str) -> Result<Pigmentation> {
        match text.trim().to_ascii_lowercase().as_str() {
            "albino" => Ok(Pigmentation::Albino),
            "pigmented" => Ok(Pigmentation::Pigmented),
            _ => Err(Error::input(format!("'{text}' is not a pigmentation; expected albino or pigmented"))),
        }
    }
}

/// The phase of a day a schedule step belongs to: `light` and `dark` for animal housing, `day`,
/// `evening` and `night` for people. Guidance rules name the phase they apply to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Phase {
    /// Housing light phase.
    Light,
    /// Housing dark phase.
    Dark,
    /// Human daytime.
    Day,
    /// Human evening (the hours before bedtime).
    Evening,
    /// Human night (sleep).
    Night,
}

impl Phase {
    /// Every phase, in the order reports list them.
    pub const ALL: [Phase; 5] = [Phase::Light, Phase::Dark, Phase::Day, Phase::Evening, Phase::Night];

    /// Lower-case name as written in files.
    pub fn name(self) -> &'static str {
        match self {
            Phase::Light => "light",
            Phase::Dark => "dark",
            Phase::Day => "day",
            Phase::Evening => "evening",
            Phase::Night => "night",
        }
    }

    /// Parses a phase name in any case.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] listing the phases.
    pub fn parse(text: &str) -> Result<Phase> {
        let t = text.trim().to_ascii_lowercase();
        Phase::ALL.into_iter().find(|p| p.name() == t).ok_or_else(|| {
            Error::input(format!(
                "'{text}' is not a phase; expected light or dark (animal housing), day, evening or night (people)"
            ))
        })
    }

    /// True for the phases in which the eye is dark-adapted by default (rodents get their
    /// dark-adapted pupil in them unless the scenario says otherwise).
    pub fn is_dark(self) -> bool {
        matches!(self, Phase::Dark | Phase::Night)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn phases_and_pigmentation_parse_in_any_case() {
        for t in ["dark", "Dark", "DARK", " dark "] {
            assert_eq!(Phase::parse(t).unwrap(), Phase::Dark);
        }
        assert_eq!(Pigmentation::parse("Albino").unwrap(), Pigmentation::Albino);
        assert!(Phase::parse("dusk").unwrap_err().message().contains("evening"));
        assert!(Pigmentation::parse("white").is_err());
    }
}
