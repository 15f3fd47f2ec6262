//! The list printed by `retidose sources`, fitted to the terminal's width.

use retidose::base::data::TABLE_FILES;
use retidose::base::quantity::SiValue;
use retidose::spectrum::reader::read_table;
use retidose::spectrum::source::BUILTIN_LAMPS;
use retidose::weighting::alpha_opic::action_spectra;

use super::Page;

/// The list of built-in sources, generators and reference tables.
pub fn list() -> String {
    list_at(super::width())
}

/// The list of built-in sources, generators and reference tables, fitted to `width` columns.
pub fn list_at(width: usize) -> String {
    let mut o = Page::new(width, false);
    o.heading("Generators", true);
    for (name, what) in [
        ("blackbody:TEMPERATURE", "Planck's law (spectral radiance), default 180–3000 nm at 1 nm"),
        ("cie:A", "CIE illuminant A from its formula (CIE 15:2004), 300–830 nm at 1 nm"),
        ("cie:D65", "CIE illuminant D65, CIE table 300–830 nm at 5 nm"),
        ("led:PEAK:WIDTH", "one LED band, Ohno (2005) model, 180–3000 nm at 1 nm"),
    ] {
        o.field("  ", name, 22, what);
    }
    o.heading("Built-in lamps (sources/, invented demo data)", false);
    for l in BUILTIN_LAMPS {
        o.field("  ", l.name, 22, &format!("sources/{}", l.file));
    }
    o.heading("Reference tables (src/data/)", false);
    for (name, text) in TABLE_FILES {
        if let Ok(t) = read_table(text, name) {
            o.para(name, "  ");
            o.para(t.meta("source").unwrap_or("(no source)"), "      ");
            o.para(&format!("status: {}", t.meta("status").unwrap_or("(none)")), "      ");
        }
    }
    o.heading("CIE S 026 α-opic action spectra (src/data/cie_s026_alpha_opic.toml)", false);
    for f in action_spectra() {
        o.field("  ", &f.name, 12, &f.construction);
        o.field(
            "  ",
            "",
            12,
            &format!(
                "D65 efficacy of luminous radiation {:.4} mW/lm here, published {:.4} mW/lm ({})",
                f.d65_elr.si() * 1e3,
                f.published_d65_elr.si() * 1e3,
                f.published_status
            ),
        );
    }
    o.finish()
}
