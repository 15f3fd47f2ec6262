//! Hazard weighting functions (S(λ), B(λ), A(λ), R(λ)) from `limits/weightings/*.toml`.
//!
//! A file gives tabulated nodes (interpolated linearly, or log-linearly for S(λ), as the file
//! says) and formula segments (`constant`, or `decade-exponential`: c·10^(k (λ − λ₀))). The
//! loader expands everything onto the table's nodes plus a 1 nm grid over each formula segment;
//! between those nodes the function is linear.

use std::sync::LazyLock;

use serde::Deserialize;

use crate::base::curve::Curve;
use crate::base::error::{Error, Result};

/// A weighting function ready for integration.
#[derive(Debug, Clone, PartialEq)]
pub struct Weighting {
    /// Identifier used by limit sets (`S_UV`, `B`, `A`, `R_1997`, `R_2013`).
    pub id: String,
    /// Human-readable name.
    pub name: String,
    /// Where it comes from.
    pub source: String,
    /// Status text (confirmed / from memory …).
    pub status: String,
    /// The function, dense enough for linear interpolation.
    pub curve: Curve,
    /// Tabulated nodes whose value is from memory (the rest of the table is as its status).
    pub from_memory_nm: Vec<f64>,
    /// The exposure limit printed beside each tabulated node, where the source gives one
    /// (S(λ): H = 30/S J/m²), as (nm, J/m²).
    pub anchor_limits: Vec<(f64, f64)>,
}

impl Weighting {
    /// True when the function as a whole is from memory.
    pub fn is_from_memory(&self) -> bool {
        self.status.starts_with("from memory")
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawWeighting {
    id: String,
    name: String,
    source: String,
    status: String,
    interpolation: String,
    nm: Vec<f64>,
    value: Vec<f64>,
    #[serde(default)]
    from_memory_nm: Vec<f64>,
    #[serde(default)]
    el_j_per_m2: Vec<f64>,
    #[serde(default)]
    formula: Vec<RawFormula>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFormula {
    from_nm: f64,
    to_nm: f64,
    form: String,
    coefficient: f64,
    per_nm: Option<f64>,
    origin_nm: Option<f64>,
}

/// Names a key of the file in errors: "origin: key 'k'".
type KeyName<'a> = &'a dyn Fn(&str) -> String;

/// Parses a weighting file.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming `origin` and the key: unsorted or mismatched nodes,
/// negative values, an unknown interpolation or formula form, overlapping segments.
pub fn parse_weighting(text: &str, origin: &str) -> Result<Weighting> {
    let raw: RawWeighting =
        toml::from_str(text).map_err(|e| Error::data(crate::base::toml_errors::describe(&e, origin)))?;
    let at = |k: &str| format!("{origin}: key '{k}'");
    check_columns(&raw, &at)?;
    let table = Curve::new(raw.nm.clone(), raw.value.clone()).map_err(|e| e.context(at("nm")))?;
    if table.range_nm().1 > MAX_WEIGHTING_NM {
        return Err(Error::data(format!("{}: wavelengths beyond {MAX_WEIGHTING_NM} nm (1 mm)", at("nm"))));
    }
    let log = match raw.interpolation.as_str() {
        "linear" => false,
        "log-linear" => true,
        other => {
            return Err(Error::data(format!(
                "{}: '{other}' is not linear or log-linear",
                at("interpolation")
            )));
        }
    };
    let mut nodes = table_nodes(&table, log);
    let (_, t1) = table.range_nm();
    formula_nodes(&raw.formula, t1, &mut nodes, &at)?;
    nodes.sort_by(|a, b| a.0.total_cmp(&b.0));
    nodes.dedup_by(|a, b| (a.0 - b.0).abs() < 1e-9);
    let (w, v): (Vec<f64>, Vec<f64>) = nodes.into_iter().unzip();
    Ok(Weighting {
        id: raw.id,
        name: raw.name,
        source: raw.source,
        status: raw.status,
        curve: Curve::new(w, v).map_err(|e| e.context(origin))?,
        anchor_limits: raw.nm.iter().copied().zip(raw.el_j_per_m2.iter().copied()).collect(),
        from_memory_nm: raw.from_memory_nm,
    })
}

/// Checks that `nm`, `value` and `el_j_per_m2` have matching lengths and that the weights are
/// finite and not negative.
fn check_columns(raw: &RawWeighting, at: KeyName<'_>) -> Result<()> {
    if raw.nm.len() != raw.value.len() {
        return Err(Error::data(format!(
            "{}: {} wavelengths but {} values",
            at("value"),
            raw.nm.len(),
            raw.value.len()
        )));
    }
    if !raw.el_j_per_m2.is_empty() && raw.el_j_per_m2.len() != raw.nm.len() {
        return Err(Error::data(format!("{}: needs one limit per wavelength", at("el_j_per_m2"))));
    }
    if let Some(v) = raw.value.iter().find(|v| !(v.is_finite() && **v >= 0.0)) {
        return Err(Error::data(format!("{}: weight {v} must be a finite number ≥ 0", at("value"))));
    }
    Ok(())
}

/// The table part as nodes: the tabulated nodes, densified to 1 nm for log-linear
/// interpolation so that linear use is faithful.
fn table_nodes(table: &Curve, log: bool) -> Vec<(f64, f64)> {
    let mut nodes: Vec<(f64, f64)> = Vec::new();
    let (t0, t1) = table.range_nm();
    if log {
        let w = table.wavelength_nm();
        let v = table.values();
        let mut x = t0;
        while x <= t1 + 1e-9 {
            let i = w.partition_point(|&n| n <= x).clamp(1, w.len() - 1);
            let (xa, xb, ya, yb) = (w[i - 1], w[i], v[i - 1], v[i]);
            let y = if ya > 0.0 && yb > 0.0 {
                (ya.ln() + (yb.ln() - ya.ln()) * (x - xa) / (xb - xa)).exp()
            } else {
                ya + (yb - ya) * (x - xa) / (xb - xa)
            };
            nodes.push((x, y));
            x += 1.0;
        }
        for (&a, &b) in w.iter().zip(v) {
            nodes.push((a, b));
        }
    } else {
        nodes.extend(table.wavelength_nm().iter().copied().zip(table.values().iter().copied()));
    }
    nodes
}

/// Appends the formula segments on a 1 nm grid; each must start at or after `table_end` nm
/// and after the previous segment.
/// The longest wavelength a weighting may reach, nm (1 mm: the end of optical radiation);
/// keeps the 1 nm nodes of a formula segment bounded.
pub const MAX_WEIGHTING_NM: f64 = 1e6;

fn formula_nodes(
    formula: &[RawFormula],
    table_end: f64,
    nodes: &mut Vec<(f64, f64)>,
    at: KeyName<'_>,
) -> Result<()> {
    let mut last_end = table_end;
    for (i, f) in formula.iter().enumerate() {
        let k = format!("formula[{i}]");
        if f.to_nm.is_nan() || f.to_nm > MAX_WEIGHTING_NM {
            return Err(Error::data(format!(
                "{}: to_nm {} nm is beyond {MAX_WEIGHTING_NM} nm (1 mm), the end of optical radiation",
                at(&k),
                f.to_nm
            )));
        }
        if f.from_nm.is_nan() || f.from_nm >= f.to_nm || f.from_nm < last_end - 1e-9 {
            return Err(Error::data(format!(
                "{}: segment {}–{} nm must follow the previous part (ending at {last_end} nm) without overlap",
                at(&k),
                f.from_nm,
                f.to_nm
            )));
        }
        last_end = f.to_nm;
        let mut x = f.from_nm;
        while x <= f.to_nm + 1e-9 {
            nodes.push((x, formula_value(f, x, &k, at)?));
            x += 1.0;
        }
    }
    Ok(())
}

/// The value of formula segment `f` (key `k`) at `x` nm.
fn formula_value(f: &RawFormula, x: f64, k: &str, at: KeyName<'_>) -> Result<f64> {
    match f.form.as_str() {
        "constant" => Ok(f.coefficient),
        "decade-exponential" => {
            let per = f.per_nm.ok_or_else(|| Error::data(format!("{}: needs per_nm", at(k))))?;
            let origin = f.origin_nm.ok_or_else(|| Error::data(format!("{}: needs origin_nm", at(k))))?;
            Ok(f.coefficient * 10f64.powf(per * (x - origin)))
        }
        other => Err(Error::data(format!(
            "{}: form '{other}' is not constant or decade-exponential",
            at(&format!("{k}.form"))
        ))),
    }
}

/// The weighting files shipped in `limits/weightings/`.
pub const WEIGHTING_FILES: [(&str, &str); 5] = [
    ("limits/weightings/s_uv.toml", include_str!("../../limits/weightings/s_uv.toml")),
    ("limits/weightings/b.toml", include_str!("../../limits/weightings/b.toml")),
    ("limits/weightings/a.toml", include_str!("../../limits/weightings/a.toml")),
    ("limits/weightings/r_1997.toml", include_str!("../../limits/weightings/r_1997.toml")),
    ("limits/weightings/r_2013.toml", include_str!("../../limits/weightings/r_2013.toml")),
];

static WEIGHTINGS: LazyLock<Vec<Weighting>> = LazyLock::new(|| {
    WEIGHTING_FILES
        .iter()
        .map(|(n, t)| parse_weighting(t, n).unwrap_or_else(|e| panic!("embedded weighting: {e}")))
        .collect()
});

/// The built-in weighting functions.
pub fn builtin_weightings() -> &'static [Weighting] {
    &WEIGHTINGS
}

/// A built-in weighting function by id.
pub fn find_weighting(id: &str) -> Option<&'static Weighting> {
    WEIGHTINGS.iter().find(|w| w.id == id)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn weightings_are_continuous_where_their_parts_meet() {
        let b = find_weighting("B").unwrap();
        assert!((b.curve.at(500.0).unwrap() - 0.1).abs() < 1e-12);
        assert!((b.curve.at(600.0).unwrap() - 0.001).abs() < 1e-12);
        let r = find_weighting("R_1997").unwrap();
        assert!((r.curve.at(1050.0).unwrap() - 10f64.powf(-0.7)).abs() < 1e-12);
        assert!((r.curve.at(1200.0).unwrap() - 0.02).abs() < 1e-12);
        assert_eq!(r.curve.range_nm(), (380.0, 1400.0));
    }

    #[test]
    fn malformed_weightings_name_the_key() {
        let bad =
            include_str!("../../limits/weightings/b.toml").replace("form = \"constant\"", "form = \"cubic\"");
        let err = parse_weighting(&bad, "b.toml").unwrap_err();
        assert!(err.message().contains("b.toml: key 'formula[1].form'"), "{err}");
    }
}
