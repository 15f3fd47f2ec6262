//! The list printed by `retidose sources`.

use std::fmt::Write;

use retidose::base::data::TABLE_FILES;
use retidose::base::quantity::SiValue;
use retidose::spectrum::reader::read_table;
use retidose::spectrum::source::BUILTIN_LAMPS;
use retidose::weighting::alpha_opic::action_spectra;

/// The list of built-in sources, generators and reference tables.
pub fn list() -> String {
    let mut o = String::new();
    let _ = writeln!(o, "Generators");
    let _ = writeln!(
        o,
        "  blackbody:TEMPERATURE   Planck's law (spectral radiance), default 180–3000 nm at 1 nm"
    );
    let _ = writeln!(
        o,
        "  cie:A                   CIE illuminant A from its formula (CIE 15:2004), 300–830 nm at 1 nm"
    );
    let _ = writeln!(o, "  cie:D65                 CIE illuminant D65, CIE table 300–830 nm at 5 nm");
    let _ = writeln!(o, "  led:PEAK:WIDTH          one LED band, Ohno (2005) model, 180–3000 nm at 1 nm");
    let _ = writeln!(o, "\nBuilt-in lamps (sources/, invented demo data)");
    for l in BUILTIN_LAMPS {
        let _ = writeln!(o, "  {:<22}  sources/{}", l.name, l.file);
    }
    let _ = writeln!(o, "\nReference tables (src/data/)");
    for (name, text) in TABLE_FILES {
        if let Ok(t) = read_table(text, name) {
            let _ = writeln!(o, "  {name}");
            let _ = writeln!(o, "      {}", t.meta("source").unwrap_or("(no source)"));
            let _ = writeln!(o, "      status: {}", t.meta("status").unwrap_or("(none)"));
        }
    }
    let _ = writeln!(o, "\nCIE S 026 α-opic action spectra (src/data/cie_s026_alpha_opic.toml)");
    for f in action_spectra() {
        let _ = writeln!(o, "  {:<12} {}", f.name, f.construction);
        let _ = writeln!(
            o,
            "      D65 ELR {:.4} mW/lm here, published {:.4} mW/lm ({})",
            f.d65_elr.si() * 1e3,
            f.published_d65_elr.si() * 1e3,
            f.published_status
        );
    }
    o
}
