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

/// Rooms with more positions than this are written as compact JSON (pretty JSON of millions
/// of rows is mostly indentation).
pub const PRETTY_POSITIONS: usize = 10_000;

/// Writes the JSON document, streamed: one object, or an array when several scenarios ran.
///
/// # Errors
/// The writer's errors.
pub fn document_to(all: &[Assessment], w: &mut dyn std::io::Write) -> std::io::Result<()> {
    let docs: Vec<Doc<'_>> =
        all.iter().map(|a| Doc { schema: SCHEMA, units: UNITS, assessment: a }).collect();
    let big =
        all.iter().filter_map(|a| a.room.as_ref()).map(|r| r.positions).sum::<usize>() > PRETTY_POSITIONS;
    let r = match (docs.len() == 1, big) {
        (true, false) => serde_json::to_writer_pretty(&mut *w, &docs[0]),
        (true, true) => serde_json::to_writer(&mut *w, &docs[0]),
        (false, false) => serde_json::to_writer_pretty(&mut *w, &docs),
        (false, true) => serde_json::to_writer(&mut *w, &docs),
    };
    r.map_err(std::io::Error::other)?;
    w.write_all(
        b"
",
    )
}
