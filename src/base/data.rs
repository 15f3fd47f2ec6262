//! Embedded reference tables, parsed once.
//!
//! The tables are CSV files under `src/data/`, each with a header naming its source,
//! edition, where it was copied from and its status. They are compiled into the binary so the tool works
//! from any folder.

use std::sync::LazyLock;

use crate::base::curve::Curve;
use crate::spectrum::reader::read_table;
use crate::spectrum::{Basis, Measure, Spectrum};

/// The embedded tables, by file name, in the order they are listed by the tool.
pub const TABLE_FILES: &[(&str, &str)] = &[
    ("cie_1924_photopic_v.csv", include_str!("../data/cie_1924_photopic_v.csv")),
    ("cie_1951_scotopic_v_prime.csv", include_str!("../data/cie_1951_scotopic_v_prime.csv")),
    (
        "cie_2006_10deg_cone_fundamentals_l.csv",
        include_str!("../data/cie_2006_10deg_cone_fundamentals_l.csv"),
    ),
    (
        "cie_2006_10deg_cone_fundamentals_m.csv",
        include_str!("../data/cie_2006_10deg_cone_fundamentals_m.csv"),
    ),
    (
        "cie_2006_10deg_cone_fundamentals_s.csv",
        include_str!("../data/cie_2006_10deg_cone_fundamentals_s.csv"),
    ),
    ("cie_d65.csv", include_str!("../data/cie_d65.csv")),
];

/// The α-opic definition file (`src/data/cie_s026_alpha_opic.toml`).
pub const ALPHA_OPIC_TOML: &str = include_str!("../data/cie_s026_alpha_opic.toml");

/// CIE S 026/E:2018 Table 2, the five α-opic action spectra (file name, text): a six-column
/// CSV (`wavelength_nm` and one column per function), 380–780 nm at 1 nm, blank where the CIE
/// leaves the table blank. Not in [`TABLE_FILES`], which holds two-column tables; read by
/// [`crate::weighting::alpha_opic`].
pub const ALPHA_OPIC_TABLE: (&str, &str) = (
    "cie_s026_alpha_opic_action_spectra.csv",
    include_str!("../data/cie_s026_alpha_opic_action_spectra.csv"),
);

/// The parsed reference tables.
#[derive(Debug)]
pub struct Tables {
    /// CIE 1924 photopic V(λ), 360–830 nm, 1 nm.
    pub v: Curve,
    /// CIE 1951 scotopic V′(λ), 380–780 nm, 1 nm.
    pub v_prime: Curve,
    /// CIE D65, relative, 300–830 nm, 5 nm.
    pub d65: Spectrum,
}

/// The text of an embedded table by file name.
pub fn table_text(name: &str) -> Option<&'static str> {
    TABLE_FILES.iter().find(|(n, _)| *n == name).map(|(_, t)| *t)
}

/// A parsed embedded table by file name.
///
/// # Panics
/// If `name` is not an embedded table or the embedded file is malformed: both are errors in
/// the program, not in user input, and the test suite loads every table.
pub fn table_curve(name: &str) -> Curve {
    let text = table_text(name).unwrap_or_else(|| panic!("no embedded table named {name}"));
    read_table(text, name).unwrap_or_else(|e| panic!("embedded table {name} is malformed: {e}")).curve
}

static TABLES: LazyLock<Tables> = LazyLock::new(|| {
    let d65 =
        Spectrum::new(table_curve("cie_d65.csv"), Measure::Relative, Basis::Energy, "CIE illuminant D65")
            .unwrap_or_else(|e| panic!("embedded D65 table is malformed: {e}"));
    Tables {
        v: table_curve("cie_1924_photopic_v.csv"),
        v_prime: table_curve("cie_1951_scotopic_v_prime.csv"),
        d65,
    }
});

/// The parsed tables (parsed on first use).
pub fn tables() -> &'static Tables {
    &TABLES
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_embedded_table_parses_and_names_its_source_and_status() {
        for (name, text) in TABLE_FILES {
            let t = read_table(text, name).unwrap();
            assert!(t.meta("source").is_some(), "{name} has no source");
            assert!(t.meta("status").is_some(), "{name} has no status");
            assert!(t.curve.values().iter().all(|v| *v >= 0.0), "{name}");
        }
    }

    #[test]
    fn alpha_opic_table_names_source_licence_and_status() {
        let (name, text) = ALPHA_OPIC_TABLE;
        let meta = |key: &str| {
            text.lines()
                .filter_map(|l| l.strip_prefix(&format!("# {key}: ")))
                .next()
                .unwrap_or_else(|| panic!("{name} has no {key}"))
        };
        assert!(meta("source").contains("CIE S 026/E:2018") && meta("source").contains("Table 2"));
        assert!(meta("source").contains("10.25039/CIE.DS.vqqhzp5a"));
        assert!(meta("licence").starts_with("CC BY-SA 4.0"));
        assert!(meta("attribution").contains("CIE"));
        assert!(meta("transcribed_from").contains("luxpy 1.12.5"));
        assert!(meta("transcribed_from").contains("tests/make_s026_table.py"));
        assert!(meta("status").starts_with("confirmed"));
    }

    #[test]
    fn tables_have_their_published_ranges_and_peaks() {
        let t = tables();
        assert_eq!(t.v.range_nm(), (360.0, 830.0));
        assert_eq!(t.v_prime.range_nm(), (380.0, 780.0));
        assert_eq!(t.d65.range_nm(), (300.0, 830.0));
        // V(555 nm) = 1 and V′(507 nm) = 1 exactly in the CIE tables (CIE 018:2019).
        assert_eq!(t.v.at(555.0), Some(1.0));
        assert_eq!(t.v_prime.at(507.0), Some(1.0));
        assert_eq!(t.d65.curve().at(560.0), Some(100.0));
    }
}
