//! CIE S 026:2018 α-opic quantities for the human eye.
//!
//! For each of the five photoreceptor types α (s-cone, m-cone, l-cone, rods, ipRGC melanopsin),
//! with s_α(λ) the action spectrum of CIE S 026/E:2018 Table 2:
//!
//! - α-opic quantity X_α = Σᵢ X_e,λ(λᵢ) s_α(λᵢ) Δλ (W·m⁻² for an irradiance, W·m⁻²·sr⁻¹ for a
//!   radiance, W·sr⁻¹ or W for intensity and flux);
//! - α-opic efficacy of luminous radiation ELR K_α,v = X_α / X_v (W/lm), with the luminous
//!   quantity taken by the same rule, X_v = K_m Σᵢ X_e,λ(λᵢ) V(λᵢ) Δλ, K_m = 683.002 lm/W and
//!   V(λ) the embedded CIE 1924 table ([`luminous_s026`]);
//! - α-opic daylight (D65) efficacy ratio DER = K_α,v / K_α,v^D65;
//! - α-opic equivalent daylight (D65) quantity EDI (lx for an irradiance, cd/m² for a radiance):
//!   the D65 illuminance or luminance that gives the same X_α (see "D65 constants").
//!
//! # Summation rule (CIE S 026)
//!
//! S 026 defines its quantities by sums at 1 nm over 380–780 nm, and limits luminous radiation
//! to that range too. Here λᵢ = 380, 381, …, 780 nm and Δλ = 1 nm. The spectrum, on the energy
//! basis, is linearly interpolated at the 1 nm nodes inside its sampled range (nodes it already
//! has are used as they are); it is never extrapolated. Nodes outside its range are left out
//! of every sum, and [`Coverage`] reports them: `needed_nm` is where Table 2 tabulates the
//! function, `uncovered_weight_share` the part of Σᵢ s_α(λᵢ) at the left-out nodes (a lower
//! bound is then flagged, as everywhere in the crate). Blank cells of Table 2 (the cone-opic
//! functions below 390 nm, the s-cone-opic function above 615 nm) count as 0, as in luxpy and
//! the CIE α-opic toolbox.
//!
//! This is not the trapezoid rule on the union of nodes that the rest of the crate uses
//! ([`crate::base::curve`]), and the ELR's X_v is not [`photopic`] (V(λ) over 360–830 nm):
//!
//! - structure narrower than about 1 nm (a laser line given as a sub-nanometre triangle) is only
//!   seen at the 1 nm nodes; give such a source at 1 nm or coarser, as S 026 expects;
//! - radiation below 380 nm or above 780 nm counts for no α-opic quantity and not for the ELR's
//!   X_v: for an Ohno LED at 365 nm (20 nm wide) that X_v is 42 % below [`photopic`]; for
//!   D65 the two differ by 2.5 × 10⁻⁶.
//!
//! # D65 constants
//!
//! K_α,v^D65 (each function's `d65_elr`) is computed by the same rule on the embedded D65 table
//! (5 nm, linearly interpolated to 1 nm); it reproduces the published CIE S 026 values to
//! 0.002 % (`tests/it/reference.rs`). DER uses it, so a D65 spectrum has DER = 1. For EDI the
//! D65 illuminance is the one the crate reports, [`photopic`]: EDI = X_α · X_v(D65) / X_α(D65)
//! with X_v(D65) from [`photopic`], so a D65 spectrum's EDI equals its reported illuminance
//! (luminance…) exactly. S 026's EDI = X_α / K_α,v^D65 is smaller by the constant factor
//! X_v(D65) from [`photopic`] over X_v(D65) from [`luminous_s026`], 1 + 2.5 × 10⁻⁶, far below
//! the 5 significant digits of the published constants.

use std::sync::LazyLock;

use serde::Deserialize;

use crate::base::constants::K_M_PHOTOPIC_LM_PER_W;
use crate::base::curve::Curve;
use crate::base::data::{ALPHA_OPIC_TABLE, ALPHA_OPIC_TOML, tables};
use crate::base::quantity::{RadiantPerLuminous, SiValue};
use crate::spectrum::photometry::{Photometric, photopic};
use crate::spectrum::{Coverage, Radiometric, Spectrum};

/// First node of the S 026 summation grid, nm.
pub const S026_FIRST_NM: f64 = 380.0;
/// Number of S 026 summation nodes: 380, 381, …, 780 nm.
pub const S026_NODES: usize = 401;

/// One α-opic action spectrum and its D65 constants.
#[derive(Debug, Clone)]
pub struct ActionSpectrum {
    /// The S 026 name (`s-cone-opic`, `m-cone-opic`, `l-cone-opic`, `rhodopic`, `melanopic`).
    pub name: String,
    /// The action spectrum at the 1 nm nodes where Table 2 gives a value, energy basis, as
    /// published (peak 1 for rhodopic and melanopic, 0.99994–0.99998 for the cone-opic ones).
    pub curve: Curve,
    /// How the function is built, with its source.
    pub construction: String,
    /// The published CIE S 026 D65 ELR.
    pub published_d65_elr: RadiantPerLuminous,
    /// Status of the published constant (confirmed / derived / from memory) with its basis.
    pub published_status: String,
    /// The D65 ELR by this module's rule on the embedded D65 table (used for DER).
    pub d65_elr: RadiantPerLuminous,
    /// True for a function that is not the normative CIE table: false for all five, which are
    /// CIE S 026 Table 2 (kept for the reports that print it).
    pub reconstructed: bool,
    /// The document that defines the function.
    pub document: String,
    /// s_α at the [`S026_NODES`] nodes, 0 where Table 2 is blank.
    on_grid: Vec<f64>,
    /// X_v(D65) / X_α(D65) with X_v from [`photopic`], lm/W (EDI = X_α times this).
    edi_per_alpha: f64,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSet {
    document: String,
    range_nm: [f64; 2],
    step_nm: f64,
    table: String,
    function: Vec<RawFunction>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFunction {
    name: String,
    construction: String,
    d65_elr_mw_per_lm: f64,
    d65_elr_status: String,
}

/// The wavelength of S 026 node `i`, nm.
fn node_nm(i: usize) -> f64 {
    S026_FIRST_NM + i as f64
}

/// The columns of Table 2: (name, value at each S 026 node, `None` where blank).
///
/// # Panics
/// On a malformed embedded file (an error in the program; the tests load it).
fn parse_table(file: &str, text: &str) -> Vec<(String, Vec<Option<f64>>)> {
    let mut rows = text.lines().filter(|l| !l.starts_with('#') && !l.trim().is_empty());
    let header: Vec<&str> = rows.next().unwrap_or_else(|| panic!("{file}: no header")).split(',').collect();
    assert_eq!(header[0], "wavelength_nm", "{file}: first column");
    let mut columns: Vec<(String, Vec<Option<f64>>)> =
        header[1..].iter().map(|h| (h.trim().to_string(), Vec::with_capacity(S026_NODES))).collect();
    for (i, row) in rows.enumerate() {
        let cells: Vec<&str> = row.split(',').map(str::trim).collect();
        assert_eq!(cells.len(), header.len(), "{file}: row '{row}'");
        let nm: f64 = cells[0].parse().unwrap_or_else(|e| panic!("{file}: row '{row}': {e}"));
        assert_eq!(nm, node_nm(i), "{file}: rows must run 380, 381, …, 780 nm");
        for ((_, values), cell) in columns.iter_mut().zip(&cells[1..]) {
            values.push(
                (!cell.is_empty())
                    .then(|| cell.parse::<f64>().unwrap_or_else(|e| panic!("{file}: row '{row}': {e}"))),
            );
        }
    }
    for (name, values) in &columns {
        assert_eq!(values.len(), S026_NODES, "{file}: column {name}");
    }
    columns
}

/// The tabulated part of a column as a curve (blanks only at the ends).
fn tabulated_curve(name: &str, values: &[Option<f64>]) -> Curve {
    let first = values.iter().position(Option::is_some).unwrap_or_else(|| panic!("{name}: empty"));
    let last = values.iter().rposition(Option::is_some).unwrap_or(first);
    let (w, v): (Vec<f64>, Vec<f64>) = (first..=last)
        .map(|i| (node_nm(i), values[i].unwrap_or_else(|| panic!("{name}: blank inside the table"))))
        .unzip();
    Curve::new(w, v).unwrap_or_else(|e| panic!("{name}: {e}"))
}

/// A curve's values at the S 026 nodes, `None` outside its sampled range.
fn on_s026_grid(curve: &Curve) -> Vec<Option<f64>> {
    (0..S026_NODES).map(|i| curve.at(node_nm(i))).collect()
}

/// Σᵢ x(λᵢ) w(λᵢ) · 1 nm over the nodes where `x` is known.
fn node_sum(x: &[Option<f64>], w: &[f64]) -> f64 {
    x.iter().zip(w).filter_map(|(x, w)| x.map(|x| x * w)).sum()
}

/// V(λ) at the S 026 nodes.
static V_ON_GRID: LazyLock<Vec<f64>> = LazyLock::new(|| {
    on_s026_grid(&tables().v)
        .into_iter()
        .map(|v| v.unwrap_or_else(|| panic!("V(λ) must cover 380–780 nm")))
        .collect()
});

static SET: LazyLock<Vec<ActionSpectrum>> = LazyLock::new(|| {
    let raw: RawSet = toml::from_str(ALPHA_OPIC_TOML)
        .unwrap_or_else(|e| panic!("embedded cie_s026_alpha_opic.toml is malformed: {e}"));
    assert_eq!(raw.range_nm, [S026_FIRST_NM, node_nm(S026_NODES - 1)], "cie_s026_alpha_opic.toml range_nm");
    assert_eq!(raw.step_nm, 1.0, "cie_s026_alpha_opic.toml step_nm");
    let (file, text) = ALPHA_OPIC_TABLE;
    assert_eq!(raw.table, file, "cie_s026_alpha_opic.toml table");
    let columns = parse_table(file, text);
    let d65 = &tables().d65;
    let d65_samples = on_s026_grid(d65.curve());
    let d65_lum_s026 = K_M_PHOTOPIC_LM_PER_W * node_sum(&d65_samples, &V_ON_GRID);
    let d65_lum = photopic(d65).raw;
    raw.function
        .into_iter()
        .map(|f| {
            let (_, values) = columns
                .iter()
                .find(|(n, _)| *n == f.name)
                .unwrap_or_else(|| panic!("{file} has no column {}", f.name));
            let on_grid: Vec<f64> = values.iter().map(|v| v.unwrap_or(0.0)).collect();
            let x = node_sum(&d65_samples, &on_grid);
            ActionSpectrum {
                curve: tabulated_curve(&f.name, values),
                name: f.name,
                construction: f.construction,
                published_d65_elr: RadiantPerLuminous::from_si(f.d65_elr_mw_per_lm * 1e-3),
                published_status: f.d65_elr_status,
                d65_elr: RadiantPerLuminous::from_si(x / d65_lum_s026),
                reconstructed: false,
                document: raw.document.clone(),
                on_grid,
                edi_per_alpha: d65_lum / x,
            }
        })
        .collect()
});

/// The five CIE S 026 action spectra, in the standard's order (s, m, l, rhodopic, melanopic).
pub fn action_spectra() -> &'static [ActionSpectrum] {
    &SET
}

/// The luminous quantity by the S 026 rule, K_m Σᵢ X_e,λ(λᵢ) V(λᵢ) · 1 nm over the 1 nm nodes
/// of 380–780 nm the spectrum covers (lm-based SI units; relative units for a relative
/// spectrum). The denominator of the α-opic ELR; [`photopic`] is the crate's general one.
pub fn luminous_s026(spectrum: &Spectrum) -> f64 {
    K_M_PHOTOPIC_LM_PER_W * node_sum(&on_s026_grid(spectrum.to_energy().curve()), &V_ON_GRID)
}

/// How far a spectrum sampled over `spectrum_nm` (with `samples` at the S 026 nodes) covers `f`.
fn coverage(spectrum_nm: (f64, f64), f: &ActionSpectrum, samples: &[Option<f64>]) -> Coverage {
    let needed = f.curve.range_nm();
    let (lo, hi) = (spectrum_nm.0.max(needed.0), spectrum_nm.1.min(needed.1));
    if lo >= hi {
        return Coverage { needed_nm: needed, covered_nm: None, uncovered_weight_share: 1.0 };
    }
    let total: f64 = f.on_grid.iter().sum();
    let missing: f64 = samples.iter().zip(&f.on_grid).filter(|(x, _)| x.is_none()).map(|(_, s)| s).sum();
    let share = if total > 0.0 { (missing / total).clamp(0.0, 1.0) } else { 0.0 };
    Coverage { needed_nm: needed, covered_nm: Some((lo, hi)), uncovered_weight_share: share }
}

/// The α-opic quantities of one spectrum for one photoreceptor type.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct AlphaOpicValue {
    /// Which function (S 026 name).
    pub name: String,
    /// α-opic radiometric quantity; `None` for a relative spectrum.
    pub quantity: Option<Radiometric>,
    /// α-opic ELR, W/lm; `None` without photopic content in 380–780 nm.
    pub elr: Option<RadiantPerLuminous>,
    /// α-opic DER, unit-free; `None` without photopic content in 380–780 nm.
    pub der: Option<f64>,
    /// α-opic equivalent daylight quantity (lx for an irradiance); `None` for a relative spectrum.
    pub edi: Option<Photometric>,
    /// Coverage of the action spectrum by the spectrum (at the S 026 nodes).
    pub coverage: Coverage,
    /// True when the function is a reconstruction rather than the normative table: always
    /// false now (all five are CIE S 026 Table 2).
    pub reconstructed: bool,
}

/// All five α-opic quantities of a spectrum, by the S 026 rule of the module documentation.
pub fn alpha_opic(spectrum: &Spectrum) -> Vec<AlphaOpicValue> {
    let energy = spectrum.to_energy();
    let samples = on_s026_grid(energy.curve());
    let lum = K_M_PHOTOPIC_LM_PER_W * node_sum(&samples, &V_ON_GRID);
    action_spectra()
        .iter()
        .map(|f| {
            let x = node_sum(&samples, &f.on_grid);
            let elr = (lum > 0.0).then(|| x / lum);
            AlphaOpicValue {
                name: f.name.clone(),
                quantity: Radiometric::from_si(spectrum.measure(), x),
                elr: elr.map(RadiantPerLuminous::from_si),
                der: elr.map(|e| e / f.d65_elr.si()),
                edi: Photometric::from_si(spectrum.measure(), x * f.edi_per_alpha),
                coverage: coverage(energy.range_nm(), f, &samples),
                reconstructed: f.reconstructed,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::spectrum::{Basis, Measure};

    fn flat(lo: f64, hi: f64, step: f64) -> Spectrum {
        let n = ((hi - lo) / step).round() as usize + 1;
        let w: Vec<f64> = (0..n).map(|i| lo + step * i as f64).collect();
        Spectrum::new(Curve::new(w, vec![1.0; n]).unwrap(), Measure::Irradiance, Basis::Energy, "flat")
            .unwrap()
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    #[test]
    fn five_table_2_functions_in_standard_order_with_their_ranges_and_peaks() {
        // CIE S 026/E:2018 Table 2 (src/data/cie_s026_alpha_opic_action_spectra.csv): cone-opic
        // functions from 390 nm, s-cone-opic to 615 nm; melanopic peak 1 at 490 nm, rhodopic
        // (= V′) 1 from 506 nm; the cone-opic maxima are the CIE 2006 values (0.99994–0.99998).
        let names: Vec<&str> = action_spectra().iter().map(|f| f.name.as_str()).collect();
        assert_eq!(names, ["s-cone-opic", "m-cone-opic", "l-cone-opic", "rhodopic", "melanopic"]);
        let ranges: Vec<(f64, f64)> = action_spectra().iter().map(|f| f.curve.range_nm()).collect();
        assert_eq!(ranges, [(390.0, 615.0), (390.0, 780.0), (390.0, 780.0), (380.0, 780.0), (380.0, 780.0)]);
        let peaks: Vec<(f64, f64)> = action_spectra()
            .iter()
            .map(|f| (f.curve.wavelength_nm()[f.curve.peak_index()], f.curve.values()[f.curve.peak_index()]))
            .collect();
        assert_eq!(
            peaks,
            [(448.0, 0.999978), (541.0, 0.999942), (569.0, 0.999965), (506.0, 1.0), (490.0, 1.0)]
        );
        for f in action_spectra() {
            assert!(!f.reconstructed, "{}", f.name);
            assert_eq!(f.on_grid.len(), S026_NODES);
            // Blank cells are 0 on the grid, tabulated ones are the table's values.
            for (i, s) in f.on_grid.iter().enumerate() {
                assert_eq!(*s, f.curve.at(node_nm(i)).unwrap_or(0.0), "{} at {} nm", f.name, node_nm(i));
            }
        }
    }

    #[test]
    fn a_flat_spectrum_sums_the_table_at_1_nm() {
        // Definition (S 026 sums at 1 nm): 1 W·m⁻²·nm⁻¹ over 380–780 nm gives X_α = Σ s_α(λᵢ),
        // not the trapezoid integral (which would drop half of each end value).
        let r = alpha_opic(&flat(380.0, 780.0, 1.0));
        for (a, f) in r.iter().zip(action_spectra()) {
            let sum: f64 = f.on_grid.iter().sum();
            assert!(rel(a.quantity.unwrap().si_with_unit().0, sum) < 1e-14, "{}", f.name);
            assert!(a.coverage.is_complete(), "{}", f.name);
        }
        // A 5 nm flat spectrum is linearly interpolated to the same values: same sums.
        for (a, b) in r.iter().zip(alpha_opic(&flat(380.0, 780.0, 5.0))) {
            assert!(rel(a.quantity.unwrap().si_with_unit().0, b.quantity.unwrap().si_with_unit().0) < 1e-14);
        }
    }

    #[test]
    fn a_spectrum_short_of_380_780_nm_is_partial_and_counts_only_covered_nodes() {
        // 400–700 nm: nodes 400..=700 only. Melanopic misses 380–399 and 701–780 nm; the share is
        // the part of Σ s_mel at those nodes. The s-cone-opic function (390–615 nm) misses 390–399.
        let r = alpha_opic(&flat(400.0, 700.0, 1.0));
        let mel = &action_spectra()[4];
        let inside: f64 = mel.on_grid[20..=320].iter().sum();
        let total: f64 = mel.on_grid.iter().sum();
        assert!(rel(r[4].quantity.unwrap().si_with_unit().0, inside) < 1e-14);
        assert_eq!(r[4].coverage.covered_nm, Some((400.0, 700.0)));
        assert!(rel(r[4].coverage.uncovered_weight_share, 1.0 - inside / total) < 1e-9);
        assert!(!r[4].coverage.is_complete());
        assert_eq!(r[0].coverage.needed_nm, (390.0, 615.0));
        assert!(!r[0].coverage.is_complete());
        // 390–780 nm covers every tabulated cone-opic value: complete; melanopic is not.
        let r = alpha_opic(&flat(390.0, 780.0, 1.0));
        assert!(r[..3].iter().all(|a| a.coverage.is_complete()));
        assert!(!r[3].coverage.is_complete() && !r[4].coverage.is_complete());
        // Nothing in 380–780 nm: nothing covered, no ELR.
        let r = alpha_opic(&flat(800.0, 900.0, 1.0));
        for a in &r {
            assert_eq!(a.coverage.covered_nm, None);
            assert_eq!(a.coverage.uncovered_weight_share, 1.0);
            assert_eq!(a.quantity.unwrap().si_with_unit().0, 0.0);
            assert_eq!(a.elr, None);
        }
    }

    #[test]
    fn d65_has_der_one_and_edi_equal_to_its_reported_illuminance() {
        // Definitions (CIE S 026): D65 has DER = 1 and EDI = its illuminance. The crate's
        // illuminance and the S 026 one differ for D65 by 2.5e-6 (the module doc's factor).
        let d65 = tables().d65.clone().declared_as(Measure::Irradiance, Basis::Energy);
        let ev = photopic(&d65).raw;
        for a in alpha_opic(&d65) {
            assert!((a.der.unwrap() - 1.0).abs() < 1e-14, "{}", a.name);
            assert!(rel(a.edi.unwrap().si_value(), ev) < 1e-14, "{}", a.name);
        }
        let factor = ev / luminous_s026(&d65) - 1.0;
        assert!((2.4e-6..2.7e-6).contains(&factor), "{factor:e}");
        for f in action_spectra() {
            assert!(rel(f.edi_per_alpha * f.d65_elr.si(), 1.0 + factor) < 1e-14, "{}", f.name);
        }
    }
}
