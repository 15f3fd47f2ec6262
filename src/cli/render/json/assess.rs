//! The JSON document of `retidose assess` (schema `retidose.assessment/2`): the library's
//! [`Assessment`] records, serialised by serde, under a schema line and a units note.

use retidose::assess::Assessment;
use serde::Serialize;

/// The schema name; see the README's changelog for what changed from `/1`.
pub const SCHEMA: &str = "retidose.assessment/2";

/// How to read the numbers.
const UNITS: &str = "quantities are coherent SI values: m, s, Hz (R* per receptor per second), lx, cd/m², \
W/m², W/m²/sr, photons/m²/s, photons/m²/s/sr; retinal illuminances in trolands (cd/m² × mm²); fractions 0–1; \
spectra are not included (the retina command writes them as CSV)";

#[derive(Serialize)]
struct Doc<'a> {
    schema: &'static str,
    units: &'static str,
    #[serde(flatten)]
    assessment: &'a Assessment,
}

/// The JSON document: one object, or an array when several scenarios ran.
pub fn document(all: &[Assessment]) -> String {
    let docs: Vec<Doc<'_>> =
        all.iter().map(|a| Doc { schema: SCHEMA, units: UNITS, assessment: a }).collect();
    let mut s = if docs.len() == 1 {
        serde_json::to_string_pretty(&docs[0])
    } else {
        serde_json::to_string_pretty(&docs)
    }
    .unwrap_or_else(|e| format!("{{\"error\": \"{e}\"}}"));
    s.push('\n');
    s
}
