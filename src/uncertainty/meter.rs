//! The reading's standard uncertainty from the class of the illuminance or luminance meter.
//!
//! DIN 5032-7 gives each meter class a limit of the total error ("Gesamtfehler") relative to
//! the reading; the table is `src/data/meter_classes.toml` (with its source, edition and
//! status per class). A limit with nothing known about the distribution inside it is read as
//! the half-width a of a rectangular distribution, u = a/√3 (JCGM 100:2008 §4.3.7); this is
//! the safe side of the two readings of a limit (as a 95 % normal bound it would give a/1.96).
//! The Monte Carlo draws the reading as a normal of that u, whose 95 % interval (±1.96·u) is
//! wider than the rectangle's (±1.645·u): the safe side again.
//!
//! When a class and a declared relative uncertainty are both given, the larger u is used.

use std::sync::LazyLock;

use crate::base::error::{Error, Result};
use crate::base::units::sig4;

/// A meter class of DIN 5032-7.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
pub enum MeterClass {
    /// Class L (reference meters).
    L,
    /// Class A (precision meters).
    A,
    /// Class B (operating meters).
    B,
    /// Class C (simple meters).
    C,
}

/// One row of `src/data/meter_classes.toml`.
#[derive(Debug, Clone, PartialEq, serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct ClassRow {
    name: String,
    total_error: f64,
    source: String,
    edition: String,
    status: String,
}

/// The file's rows, under `[[class]]`.
#[derive(Debug, serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct ClassFile {
    class: Vec<ClassRow>,
}

const FILE: &str = "src/data/meter_classes.toml";

/// The table, parsed and checked once: one row per class, in [`MeterClass::ALL`] order.
static TABLE: LazyLock<std::result::Result<Vec<ClassRow>, String>> = LazyLock::new(|| {
    let f: ClassFile =
        toml::from_str(include_str!("../data/meter_classes.toml")).map_err(|e| format!("{FILE}: {e}"))?;
    MeterClass::ALL
        .iter()
        .map(|c| {
            let row = f
                .class
                .iter()
                .find(|r| r.name == c.letter())
                .ok_or_else(|| format!("{FILE}: no [[class]] with name = \"{}\"", c.letter()))?;
            if !(row.total_error > 0.0 && row.total_error < 1.0) {
                return Err(format!(
                    "{FILE}: class {}: total_error must be a fraction between 0 and 1, not {}",
                    row.name, row.total_error
                ));
            }
            Ok(row.clone())
        })
        .collect()
});

impl MeterClass {
    /// Every class, best first.
    pub const ALL: [MeterClass; 4] = [MeterClass::L, MeterClass::A, MeterClass::B, MeterClass::C];

    /// Its letter.
    pub fn letter(self) -> &'static str {
        match self {
            MeterClass::L => "L",
            MeterClass::A => "A",
            MeterClass::B => "B",
            MeterClass::C => "C",
        }
    }

    /// The class named by `text` (`L`, `A`, `B` or `C`, either case).
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidInput`] naming the classes when `text` is none of them.
    pub fn parse(text: &str) -> Result<MeterClass> {
        let t = text.trim();
        MeterClass::ALL.into_iter().find(|c| c.letter().eq_ignore_ascii_case(t)).ok_or_else(|| {
            Error::input(format!("the reading class must be L, A, B or C (DIN 5032-7), not \"{text}\""))
        })
    }

    fn row(self) -> Result<&'static ClassRow> {
        let table = TABLE.as_ref().map_err(|e| Error::data(e.clone()))?;
        table.iter().find(|r| r.name == self.letter()).ok_or_else(|| Error::data(format!("{FILE}: no class")))
    }
}

/// What a meter class gives the reading.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ClassReading {
    /// The class.
    pub class: MeterClass,
    /// Its total error limit a, relative to the reading.
    pub total_error: f64,
    /// a/√3, relative.
    pub standard_uncertainty: f64,
    /// Where the limit comes from, with the edition.
    pub source: String,
    /// How sure the limit is.
    pub status: String,
}

/// The reading's relative standard uncertainty and how it was settled.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ReadingUncertainty {
    /// The relative standard uncertainty used.
    pub relative: f64,
    /// The declared one (`--reading`), 0 when not given.
    pub declared: f64,
    /// The meter class's, when one was given.
    pub class: Option<ClassReading>,
}

impl ReadingUncertainty {
    /// The reading's u from a declared relative u and a meter class: the larger of the two.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidData`] when the embedded class table is broken.
    pub fn settle(declared: f64, class: Option<MeterClass>) -> Result<ReadingUncertainty> {
        let class = match class {
            Some(c) => {
                let row = c.row()?;
                Some(ClassReading {
                    class: c,
                    total_error: row.total_error,
                    standard_uncertainty: row.total_error / 3f64.sqrt(),
                    source: format!("{}; edition {}", row.source, row.edition),
                    status: row.status.clone(),
                })
            }
            None => None,
        };
        let relative = class.as_ref().map_or(declared, |c| c.standard_uncertainty.max(declared));
        Ok(ReadingUncertainty { relative, declared, class })
    }

    /// The settlement in words, when a class was given.
    pub fn text(&self) -> Option<String> {
        let c = self.class.as_ref()?;
        let pct = |x: f64| format!("{} %", sig4(100.0 * x));
        let mut t = format!(
            "reading: class {} meter, total error limit {} read as the half-width of a rectangular distribution, \
             u = a/√3 = {} (JCGM 100 §4.3.7; {}; {})",
            c.class.letter(),
            pct(c.total_error),
            pct(c.standard_uncertainty),
            c.source,
            c.status
        );
        if self.declared > 0.0 {
            let which = if c.standard_uncertainty >= self.declared { "the class's" } else { "the declared" };
            t.push_str(&format!(
                "; declared u = {}: {which}, the larger, {}, is used (safe side)",
                pct(self.declared),
                pct(self.relative)
            ));
        }
        Some(t)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The table's limits (DIN 5032-7:1985-12 as reproduced in a maker's manual): L 3 %,
    /// A 5 %, B 10 %, C 20 %.
    #[test]
    fn the_table_holds_every_class() {
        for (c, a) in MeterClass::ALL.into_iter().zip([0.03, 0.05, 0.10, 0.20]) {
            let r = ReadingUncertainty::settle(0.0, Some(c)).unwrap();
            assert!((r.relative - a / 3f64.sqrt()).abs() < 1e-15, "{c:?}");
        }
        assert_eq!(MeterClass::parse(" b ").unwrap(), MeterClass::B);
        assert!(MeterClass::parse("D").unwrap_err().message().contains("L, A, B or C"));
    }
}
