//! JSON documents with stable field names (documented in the README), one file per command,
//! and the pieces they share.

pub mod assess;
pub mod bleach;
pub mod limits;
pub mod retina;
pub mod spectrum;

use retidose::spectrum::Coverage;
use retidose::spectrum::photometry::PhotometricResult;
use serde_json::{Value, json};

/// Pretty JSON with a final newline.
fn pretty(doc: &Value) -> String {
    let mut s = serde_json::to_string_pretty(doc).unwrap_or_else(|e| format!("{{\"error\": \"{e}\"}}"));
    s.push('\n');
    s
}

/// How far a spectrum covers a weighting.
fn coverage_json(c: &Coverage) -> Value {
    json!({
        "needed_nm": [c.needed_nm.0, c.needed_nm.1],
        "covered_nm": c.covered_nm.map(|(a, b)| vec![a, b]),
        "uncovered_weight_share": c.uncovered_weight_share,
        "complete": c.is_complete(),
    })
}

/// A value with its unit, or null.
fn value_json(v: Option<(f64, &str)>) -> Value {
    v.map_or(Value::Null, |(x, u)| json!({ "value": x, "unit": u }))
}

/// A photometric value with its unit and coverage.
fn photometric_json(p: &PhotometricResult) -> Value {
    json!({
        "value": p.value.map(|v| v.si_value()),
        "unit": p.value.map(|v| v.si_with_unit().1),
        "coverage": coverage_json(&p.coverage),
    })
}

/// A value with its unit.
fn si_json(v: (f64, &str)) -> Value {
    json!({ "value": v.0, "unit": v.1 })
}

/// Pretty JSON of a library record under a `schema` field (the records' field names are the
/// documented names; units as in the assessment's JSON: coherent SI).
///
/// # Errors
/// serde's, should a record not serialise.
pub fn with_schema<T: serde::Serialize>(schema: &str, value: &T) -> anyhow::Result<String> {
    let mut v = serde_json::to_value(value)?;
    let doc = match v.as_object_mut() {
        Some(map) => {
            let mut out = serde_json::Map::new();
            out.insert("schema".into(), Value::from(schema));
            out.append(map);
            Value::Object(out)
        }
        None => json!({ "schema": schema, "data": v }),
    };
    Ok(pretty(&doc))
}
