//! The holding-room section of the terminal report: per rack, the sentences a manager reads,
//! then the rack map (room lux at cage level, top shelf first) for racks small enough to print;
//! a map wider than the terminal is split by columns.

use retidose::assess::Assessment;
use retidose::housing::pass::{Basis, Flags};
use retidose::housing::survey::RoomResult;

use super::super::num;
use super::super::room::{Cell, animals, rack_cells, rack_sentences, room_sentences};
use super::{Page, Table};

/// The room section.
pub fn room(o: &mut Page, a: &Assessment, room: &RoomResult) {
    o.heading("Holding room", false);
    for s in room_sentences(room) {
        o.para(&s, "");
    }
    let maps = rack_cells(room);
    for (k, r) in room.racks.iter().enumerate() {
        let head = format!("Rack {} — {}, {} shelves × {} columns", r.id, animals(r), r.shelves, r.columns);
        o.heading(&head, false);
        for s in rack_sentences(room, r, &a.evidence) {
            o.para(&s, "  ");
        }
        let ratio = &r.summary.reading_over_model;
        if ratio.max.is_finite() {
            o.para(
                &format!(
                    "Reading ÷ model as written: {}–{} (mean {}) over {} positions.",
                    num(ratio.min),
                    num(ratio.max),
                    num(ratio.sum / r.summary.basis[0].max(1) as f64),
                    r.summary.basis[0]
                ),
                "  ",
            );
        }
        match &maps[k] {
            Some(cells) => map(o, r.shelves, r.columns, cells),
            None => o.para(
                &format!("(no map: {} positions; --format positions gives every one)", r.summary.positions),
                "  ",
            ),
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

/// The rack map: a row per shelf, top shelf first, a column per cage column.
fn map(o: &mut Page, shelves: u32, columns: u32, cells: &[Option<Cell>]) {
    let header: Vec<String> =
        std::iter::once("lx".to_string()).chain((1..=columns).map(|c| format!("col {c}"))).collect();
    let mut t = Table::new(&header);
    for s in (1..=shelves).rev() {
        let mut row = vec![(format!("shelf {s}"), "")];
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
            row.push((cell, code));
        }
        t.painted_row(row);
    }
    o.table(&t);
    o.para(
        "room lux at cage level; + above the range, - below it, ~ predicted by the calibrated model (no reading), · no position",
        "  ",
    );
}
