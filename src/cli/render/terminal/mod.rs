//! Tables for the terminal, one file per command, and the helpers they share: colour, box
//! tables, coverage remarks, durations.
//!
//! Text from the user's files (titles, descriptions, ids, names, labels) and library wording
//! that may quote it (notes, messages) goes through [`terminal_line`] or
//! [`terminal_text`](super::escape::terminal_text) before it is printed, so it cannot carry
//! escape sequences, control or bidi characters to the terminal.

pub mod assess;
pub mod bleach;
pub mod limits;
pub mod retina;
pub mod room;
pub mod sources;
pub mod spectrum;

use std::fmt::{Display, Write};

use retidose::limits::TMax;
use retidose::spectrum::Coverage;
use retidose::spectrum::photometry::PhotometricResult;
use tabled::builder::Builder;
use tabled::settings::Style;

use super::escape::terminal_line;
use super::{CAUTION, num};

/// Whether to colour terminal output: only on a terminal and when NO_COLOR is unset.
pub fn use_colour() -> bool {
    use std::io::IsTerminal;
    std::env::var_os("NO_COLOR").is_none() && std::io::stdout().is_terminal()
}

/// `text` in the ANSI colour `code`, when colouring.
fn paint(text: &str, code: &str, colour: bool) -> String {
    if colour { format!("\x1b[{code}m{text}\x1b[0m") } else { text.to_string() }
}

/// A box table (tabled, sharp style).
fn table(header: &[&str], rows: Vec<Vec<String>>) -> String {
    let mut b = Builder::default();
    b.push_record(header.iter().map(|h| h.to_string()));
    for r in rows {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    t.to_string()
}

/// Table rows whose every cell may hold user text (step names, source ids), each cell made safe
/// for one terminal line.
fn safe_rows(rows: Vec<Vec<String>>) -> Vec<Vec<String>> {
    rows.into_iter().map(|r| r.iter().map(|c| terminal_line(c).into_owned()).collect()).collect()
}

/// A remark after a value whose weighting the spectrum covers only in part, or not at all.
fn coverage_text(c: &Coverage) -> String {
    match c.covered_nm {
        _ if !c.matters() => String::new(),
        None => format!("  [not covered: needs {}–{} nm]", c.needed_nm.0, c.needed_nm.1),
        Some((a, b)) => format!(
            "  [lower bound: {} % of the weighting lies outside the measured {a}–{b} nm]",
            num(100.0 * c.uncovered_weight_share)
        ),
    }
}

/// A photometric value with its unit and coverage remark; "—" for a relative spectrum.
fn photometric_short(p: &PhotometricResult) -> String {
    match p.value {
        Some(v) => {
            let (x, u) = v.si_with_unit();
            format!("{} {u}{}", num(x), coverage_text(&p.coverage))
        }
        None => "—".to_string(),
    }
}

/// A value with its unit.
fn pair(v: (f64, &str)) -> String {
    format!("{} {}", num(v.0), v.1)
}

/// The maximum exposure time, in words.
fn t_max_text(t: &Option<TMax>) -> String {
    match t {
        None => "—".to_string(),
        Some(TMax::Seconds(s)) => duration_text(*s),
        Some(TMax::NotReached(up)) if up.is_infinite() => "not reached (no time limit)".to_string(),
        Some(TMax::NotReached(up)) => format!("not reached up to {}", duration_text(*up)),
        Some(TMax::BelowRange(s)) => format!("< {}", duration_text(*s)),
    }
}

/// A duration in h, min or s.
fn duration_text(s: f64) -> String {
    if s >= 3600.0 {
        format!("{} h", num(s / 3600.0))
    } else if s >= 60.0 {
        format!("{} min", num(s / 60.0))
    } else {
        format!("{} s", num(s))
    }
}

/// The closing "Notes" list and the caution, shared by the command tables.
fn notes_and_caution(o: &mut String, notes: &[impl Display]) {
    let _ = writeln!(o, "\nNotes");
    for n in notes {
        let _ = writeln!(o, "  - {}", terminal_line(&n.to_string()));
    }
    let _ = writeln!(o, "\n{CAUTION}");
}
