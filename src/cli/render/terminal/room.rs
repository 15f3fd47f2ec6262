//! The holding-room section of the terminal report: per rack, the sentences a manager reads,
//! then the rack map (room lux at cage level, top shelf first) for racks small enough to print.

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::housing::pass::{Basis, Flags};
use retidose::housing::survey::RoomResult;

use super::super::escape::terminal_line;
use super::super::num;
use super::super::room::{Cell, animals, rack_cells, rack_sentences, room_sentences};
use super::{paint, table};

/// Writes `text` wrapped to `width` columns, each line indented by `indent`.
pub fn wrapped(o: &mut String, text: &str, width: usize, indent: &str) {
    let opts = textwrap::Options::new(width).initial_indent(indent).subsequent_indent(indent);
    for line in textwrap::wrap(&terminal_line(text), opts) {
        let _ = writeln!(o, "{line}");
    }
}

/// The room section.
pub fn room(o: &mut String, a: &Assessment, room: &RoomResult, width: usize, colour: bool) {
    let _ = writeln!(o, "\n{}", paint("Holding room", "1", colour));
    for s in room_sentences(room) {
        wrapped(o, &s, width, "");
    }
    let maps = rack_cells(room);
    for (k, r) in room.racks.iter().enumerate() {
        let head = format!("\nRack {} — {}, {} shelves × {} columns", r.id, animals(r), r.shelves, r.columns);
        let _ = writeln!(o, "{}", paint(&terminal_line(&head), "1", colour));
        for s in rack_sentences(room, r, &a.evidence) {
            wrapped(o, &s, width, "  ");
        }
        let ratio = &r.summary.reading_over_model;
        if ratio.max.is_finite() {
            wrapped(
                o,
                &format!(
                    "Reading ÷ model as written: {}–{} (mean {}) over {} positions.",
                    num(ratio.min),
                    num(ratio.max),
                    num(ratio.sum / r.summary.basis[0].max(1) as f64),
                    r.summary.basis[0]
                ),
                width,
                "  ",
            );
        }
        match &maps[k] {
            Some(cells) => map(o, r.shelves, r.columns, cells, colour),
            None => {
                let _ = writeln!(
                    o,
                    "  (no map: {} positions; --format csv gives every one)",
                    r.summary.positions
                );
            }
        }
    }
}

/// A map cell's text: the lux, "~" before a prediction, "+" above the range, "-" below.
fn cell_text(c: &Cell) -> String {
    let mark = match (c.flags.has(Flags::ABOVE), c.flags.has(Flags::BELOW)) {
        (true, _) => "+",
        (_, true) => "-",
        _ => "",
    };
    let predicted = if c.basis == Basis::Predicted { "~" } else { "" };
    format!("{predicted}{}{mark}", num(c.lux))
}

fn map(o: &mut String, shelves: u32, columns: u32, cells: &[Option<Cell>], colour: bool) {
    let mut rows = Vec::with_capacity(shelves as usize);
    for s in (1..=shelves).rev() {
        let mut row = vec![format!("shelf {s}")];
        for c in 1..=columns {
            let cell = cells[((s - 1) * columns + c - 1) as usize]
                .as_ref()
                .map_or_else(|| "·".to_string(), cell_text);
            let code = if cell.ends_with('+') {
                "31"
            } else if cell.ends_with('-') {
                "34"
            } else {
                ""
            };
            row.push(if code.is_empty() { cell } else { paint(&cell, code, colour) });
        }
        rows.push(row);
    }
    let header: Vec<String> =
        std::iter::once("lx".to_string()).chain((1..=columns).map(|c| format!("col {c}"))).collect();
    let refs: Vec<&str> = header.iter().map(String::as_str).collect();
    let _ = writeln!(o, "{}", table(&refs, rows));
    let _ = writeln!(
        o,
        "  room lux at cage level; + above the range, - below it, ~ predicted by the calibrated model (no reading), · no position"
    );
}
