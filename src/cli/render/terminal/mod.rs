//! Tables for the terminal, one file per command, and what they share: the terminal's width,
//! a [`Page`] that wraps prose and label–value lines to it, box tables that narrow their
//! columns (or split) to fit it, colour, coverage remarks.
//!
//! The width is the terminal's (`COLUMNS` when set), and 100 columns when the output is not a
//! terminal; prose is never set wider than 100 columns, however wide the terminal.
//!
//! Text from the user's files (titles, descriptions, ids, names, labels) and library wording
//! that may quote it (notes, messages) goes through [`terminal_line`] or
//! [`terminal_text`](super::escape::terminal_text) before it is printed, so it cannot carry
//! escape sequences, control or bidi characters to the terminal: every [`Page`] method that
//! takes text does this itself.

pub mod assess;
pub mod bleach;
pub mod limits;
pub mod retina;
pub mod room;
pub mod sources;
pub mod spectrum;

use std::fmt::Display;

use retidose::spectrum::Coverage;
use retidose::spectrum::photometry::PhotometricResult;
use tabled::builder::Builder;
use tabled::grid::util::string::get_text_width;
use tabled::settings::object::Cell;
use tabled::settings::{Color, Style};

use super::escape::terminal_line;
use super::{CAUTION, num};

/// The width used when the output is not a terminal (a file, a pipe).
pub const DEFAULT_WIDTH: usize = 100;

/// Prose is never set wider than this, however wide the terminal.
const PROSE_WIDTH: usize = 100;

/// Narrower terminals are treated as this wide: below it no table can be read anyway.
const NARROWEST: usize = 40;

/// The width to fit: `COLUMNS` when it is set to a number, else the terminal's width when the
/// output is a terminal, else [`DEFAULT_WIDTH`]; never below 40.
pub fn width() -> usize {
    use std::io::IsTerminal;
    let from_env = std::env::var("COLUMNS").ok().and_then(|v| v.trim().parse::<usize>().ok());
    let w = match from_env.filter(|&n| n > 0) {
        Some(n) => n,
        None if std::io::stdout().is_terminal() => terminal_size::terminal_size_of(std::io::stdout())
            .map_or(DEFAULT_WIDTH, |(terminal_size::Width(w), _)| usize::from(w)),
        None => DEFAULT_WIDTH,
    };
    w.max(NARROWEST)
}

/// Whether to colour terminal output: only on a terminal and when NO_COLOR is unset.
pub fn use_colour() -> bool {
    use std::io::IsTerminal;
    std::env::var_os("NO_COLOR").is_none() && std::io::stdout().is_terminal()
}

/// `text` in the ANSI colour `code`, when colouring.
fn paint(text: &str, code: &str, colour: bool) -> String {
    if colour && !code.is_empty() { format!("\x1b[{code}m{text}\x1b[0m") } else { text.to_string() }
}

/// A report being written for a terminal `width` columns wide.
pub struct Page {
    text: String,
    width: usize,
    colour: bool,
}

impl Page {
    /// An empty page for a terminal `width` columns wide, coloured or not.
    pub fn new(width: usize, colour: bool) -> Self {
        Page { text: String::new(), width: width.max(NARROWEST), colour }
    }

    /// The text written.
    pub fn finish(self) -> String {
        self.text
    }

    /// The width prose is wrapped to.
    fn prose(&self) -> usize {
        self.width.min(PROSE_WIDTH)
    }

    /// An empty line.
    pub fn blank(&mut self) {
        self.text.push('\n');
    }

    /// A double rule across the prose width, between reports.
    fn rule(&mut self) {
        let rule = "═".repeat(self.prose());
        self.text.push_str(&rule);
        self.text.push('\n');
    }

    /// `text` wrapped, every line indented by `indent`.
    pub fn para(&mut self, text: &str, indent: &str) {
        self.hanging(indent, indent, text);
    }

    /// `text` wrapped, its first line indented by `first`, the others by `rest`.
    fn hanging(&mut self, first: &str, rest: &str, text: &str) {
        let width = self.prose();
        for line in wrap(text, width, first, rest) {
            self.text.push_str(&line);
            self.text.push('\n');
        }
    }

    /// A bold heading (wrapped when long), after an empty line unless `first`.
    fn heading(&mut self, text: &str, first: bool) {
        if !first {
            self.blank();
        }
        let width = self.prose();
        for line in wrap(text, width, "", "  ") {
            let painted = paint(&line, "1", self.colour);
            self.text.push_str(&painted);
            self.text.push('\n');
        }
    }

    /// A line of text in a colour (wrapped when long).
    fn painted(&mut self, text: &str, code: &str, indent: &str) {
        let width = self.prose();
        for line in wrap(text, width, indent, indent) {
            let painted = paint(&line, code, self.colour);
            self.text.push_str(&painted);
            self.text.push('\n');
        }
    }

    /// `label` in a column `label_width` wide after `indent`, then `value`, wrapped under
    /// itself.
    fn field(&mut self, indent: &str, label: &str, label_width: usize, value: &str) {
        let first = format!("{indent}{label:<label_width$} ");
        let rest = " ".repeat(first.chars().count());
        self.hanging(&first, &rest, value);
    }

    /// A bulleted item: "- " after `indent`, the text wrapped under itself.
    fn item(&mut self, indent: &str, text: &str) {
        let first = format!("{indent}- ");
        let rest = format!("{indent}  ");
        self.hanging(&first, &rest, text);
    }

    /// A box table narrowed, or split, to fit the width.
    pub fn table(&mut self, t: &Table) {
        let colour = self.colour;
        self.text.push_str(&t.render(self.width, colour));
    }

    /// The closing "Notes" list and the caution, shared by the command tables.
    fn notes_and_caution(&mut self, notes: &[impl Display]) {
        if !notes.is_empty() {
            self.heading("Notes", false);
            for n in notes {
                self.item("  ", &n.to_string());
            }
        }
        self.blank();
        self.para(CAUTION, "");
    }
}

/// `text` (made safe for one terminal line) wrapped to `width` columns, the first line
/// indented by `first` and the others by `rest`. A number's thousands groups (`30 000`) stay
/// on one line; a word longer than a line is broken.
fn wrap(text: &str, width: usize, first: &str, rest: &str) -> Vec<String> {
    let safe = terminal_line(text);
    let glued = glue_numbers(&safe);
    let opts = textwrap::Options::new(width.max(1))
        .initial_indent(first)
        .subsequent_indent(rest)
        .word_splitter(textwrap::WordSplitter::NoHyphenation)
        .break_words(true);
    textwrap::wrap(&glued, opts).into_iter().map(|l| l.replace(NBSP, " ")).collect()
}

/// The no-break space that holds a number's groups together while wrapping.
const NBSP: char = '\u{a0}';

/// `text` with the space inside a grouped number (`30 000`, `4 156 000`) made a no-break space.
fn glue_numbers(text: &str) -> String {
    let chars: Vec<char> = text.chars().collect();
    let mut out = String::with_capacity(text.len());
    for (i, &c) in chars.iter().enumerate() {
        let grouped = c == ' '
            && i > 0
            && chars[i - 1].is_ascii_digit()
            && chars.len() >= i + 4
            && chars[i + 1..i + 4].iter().all(char::is_ascii_digit)
            && chars.get(i + 4).is_none_or(|n| !n.is_ascii_digit());
        out.push(if grouped { NBSP } else { c });
    }
    out
}

/// A box table (sharp style) whose cells are made safe for the terminal, with an optional
/// colour per cell. [`Table::render`] fits it to a width: cells are wrapped, words kept whole
/// where they can be, and the width there is goes where it saves the most lines; when even the
/// longest words do not fit side by side, the columns are split over several tables, each
/// repeating the first column.
pub struct Table {
    header: Vec<String>,
    rows: Vec<Vec<(String, &'static str)>>,
}

impl Table {
    /// A table with these column headings.
    pub fn new<S: AsRef<str>>(header: &[S]) -> Self {
        Table {
            header: header.iter().map(|h| terminal_line(h.as_ref()).into_owned()).collect(),
            rows: Vec::new(),
        }
    }

    /// A row of plain cells.
    pub fn row(&mut self, cells: Vec<String>) {
        self.rows.push(cells.into_iter().map(|c| (terminal_line(&c).into_owned(), "")).collect());
    }

    /// A row of cells, each with an ANSI colour code ("" for none).
    fn painted_row(&mut self, cells: Vec<(String, &'static str)>) {
        self.rows.push(cells.into_iter().map(|(c, k)| (terminal_line(&c).into_owned(), k)).collect());
    }

    /// The text of column `c`: its heading, then each row's cell.
    fn column(&self, c: usize) -> Vec<&str> {
        std::iter::once(self.header[c].as_str())
            .chain(self.rows.iter().map(|r| r.get(c).map_or("", |x| x.0.as_str())))
            .collect()
    }

    /// The table's text, fitted to `width` columns.
    fn render(&self, width: usize, colour: bool) -> String {
        let n = self.header.len();
        if n == 0 {
            return String::new();
        }
        let columns: Vec<Vec<&str>> = (0..n).map(|c| self.column(c)).collect();
        let least: Vec<usize> = columns
            .iter()
            .map(|col| col.iter().map(|t| longest_word(t)).max().unwrap_or(0).min(MAX_WORD))
            .collect();
        if n > 2 && least.iter().sum::<usize>() + 3 * n + 1 > width {
            return self.split(width, &least, colour);
        }
        let widths = fit(&columns, &least, width.saturating_sub(3 * n + 1));
        self.draw(&widths, colour)
    }

    /// The table split by columns into tables that fit `width`, each repeating the first column.
    fn split(&self, width: usize, least: &[usize], colour: bool) -> String {
        let mut groups: Vec<Vec<usize>> = Vec::new();
        let mut current: Vec<usize> = Vec::new();
        let used =
            |g: &[usize]| least[0] + g.iter().map(|&c| least[c]).sum::<usize>() + 3 * (g.len() + 1) + 1;
        for c in 1..self.header.len() {
            current.push(c);
            if current.len() > 1 && used(&current) > width {
                current.pop();
                groups.push(std::mem::take(&mut current));
                current.push(c);
            }
        }
        groups.push(current);
        let mut out = String::new();
        for g in groups {
            let cols: Vec<usize> = std::iter::once(0).chain(g).collect();
            let part = Table {
                header: cols.iter().map(|&c| self.header[c].clone()).collect(),
                rows: self
                    .rows
                    .iter()
                    .map(|r| cols.iter().map(|&c| r.get(c).cloned().unwrap_or_default()).collect())
                    .collect(),
            };
            // Each part fits with its columns at their narrowest, so it is not split again.
            let columns: Vec<Vec<&str>> = (0..cols.len()).map(|c| part.column(c)).collect();
            let part_least: Vec<usize> = cols.iter().map(|&c| least[c]).collect();
            let widths = fit(&columns, &part_least, width.saturating_sub(3 * cols.len() + 1));
            out.push_str(&part.draw(&widths, colour));
        }
        out
    }

    /// The table drawn with each column's text wrapped to `widths`.
    fn draw(&self, widths: &[usize], colour: bool) -> String {
        let mut b = Builder::default();
        b.push_record(self.header.iter().enumerate().map(|(c, h)| wrap_cell(h, widths[c])));
        for r in &self.rows {
            b.push_record(
                (0..widths.len()).map(|c| r.get(c).map_or(String::new(), |x| wrap_cell(&x.0, widths[c]))),
            );
        }
        let mut t = b.build();
        t.with(Style::sharp());
        if colour {
            for (i, r) in self.rows.iter().enumerate() {
                for (c, (_, code)) in r.iter().enumerate().filter(|(_, (_, k))| !k.is_empty()) {
                    t.modify(Cell::new(i + 1, c), Color::new(format!("\x1b[{code}m"), "\x1b[0m"));
                }
            }
        }
        let mut s = t.to_string();
        s.push('\n');
        s
    }
}

/// A cell's text wrapped to `width` columns (lines joined with a line feed).
fn wrap_cell(text: &str, width: usize) -> String {
    if text_width(text) <= width { text.to_string() } else { wrap(text, width, "", "").join("\n") }
}

/// How many lines a cell's text takes at `width` columns.
fn lines_at(text: &str, width: usize) -> usize {
    if text_width(text) <= width { 1 } else { wrap(text, width, "", "").len() }
}

/// A word longer than this may be broken inside a table cell.
const MAX_WORD: usize = 20;

/// The display width of `text` (its widest line), in terminal columns.
fn text_width(text: &str) -> usize {
    get_text_width(text)
}

/// The width of the longest word of `text` (a grouped number is one word).
fn longest_word(text: &str) -> usize {
    glue_numbers(text).split([' ', '\n']).map(text_width).max().unwrap_or(0)
}

/// Column widths for `columns` of text (each a heading then its cells) in `avail` columns:
/// every column at its natural width when they fit; else each column starts at its longest word
/// (`least`; narrower still when even those do not fit), and the columns left over go, a few at
/// a time, to the column where they save the most lines of the table.
fn fit(columns: &[Vec<&str>], least: &[usize], avail: usize) -> Vec<usize> {
    let natural: Vec<usize> =
        columns.iter().map(|c| c.iter().map(|t| text_width(t)).max().unwrap_or(0).max(1)).collect();
    if natural.iter().sum::<usize>() <= avail {
        return natural;
    }
    let mut widths: Vec<usize> = if least.iter().sum::<usize>() <= avail {
        least.iter().zip(&natural).map(|(l, n)| (*l).min(*n).max(1)).collect()
    } else {
        let even = (avail / columns.len().max(1)).max(3);
        natural.iter().map(|n| (*n).min(even)).collect()
    };
    // The lines each cell takes at each width its column can have, wrapped once.
    let rows = columns.first().map_or(0, Vec::len);
    let table: Vec<Vec<Vec<usize>>> = columns
        .iter()
        .enumerate()
        .map(|(c, col)| {
            (0..=natural[c]).map(|w| col.iter().map(|t| lines_at(t, w.max(1))).collect()).collect()
        })
        .collect();
    let height = |widths: &[usize]| -> (usize, usize) {
        let rows_height =
            (0..rows).map(|r| (0..widths.len()).map(|c| table[c][widths[c]][r]).max().unwrap_or(1)).sum();
        let cells = (0..widths.len()).map(|c| table[c][widths[c]].iter().sum::<usize>()).sum();
        (rows_height, cells)
    };
    let mut spare = avail.saturating_sub(widths.iter().sum());
    while spare > 0 {
        let (now, now_cells) = height(&widths);
        // The best gain per column spent, over every column and every width it can grow to: lines
        // of the table saved first, then lines inside cells (so that headings wrapped in several
        // columns are widened together).
        let mut best: Option<(f64, usize, usize)> = None;
        for c in 0..columns.len() {
            let from = widths[c];
            for w in from + 1..=natural[c].min(from + spare) {
                widths[c] = w;
                let (h, cells) = height(&widths);
                let saved = 1000 * now.saturating_sub(h) + now_cells.saturating_sub(cells);
                if saved > 0 {
                    let gain = saved as f64 / (w - from) as f64;
                    if best.is_none_or(|b| gain > b.0) {
                        best = Some((gain, c, w));
                    }
                }
            }
            widths[c] = from;
        }
        let Some((_, c, w)) = best else {
            break;
        };
        spare -= w - widths[c];
        widths[c] = w;
    }
    // No more lines to save: what is left goes to the columns still wrapped, widest first.
    let mut order: Vec<usize> = (0..widths.len()).filter(|&c| widths[c] < natural[c]).collect();
    order.sort_by_key(|&c| std::cmp::Reverse(natural[c] - widths[c]));
    for c in order {
        let add = spare.min(natural[c] - widths[c]);
        widths[c] += add;
        spare -= add;
    }
    widths
}

/// What a value misses when the spectrum covers its weighting only in part, or not at all;
/// `None` when the coverage does not matter.
fn coverage_note(c: &Coverage) -> Option<String> {
    match c.covered_nm {
        _ if !c.matters() => None,
        None => Some(format!("not covered: needs {}–{} nm", c.needed_nm.0, c.needed_nm.1)),
        Some((a, b)) => Some(format!(
            "lower bound: {} % of the weighting lies outside the measured {a}–{b} nm",
            num(100.0 * c.uncovered_weight_share)
        )),
    }
}

/// [`coverage_note`] as a remark after a value ("" when there is none).
fn coverage_text(c: &Coverage) -> String {
    coverage_note(c).map_or(String::new(), |n| format!("  [{n}]"))
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

/// A fraction (0–1) as a percentage with 4 significant digits; "0 %" and "< 0.001 %" for the
/// smallest.
fn percent(fraction: f64) -> String {
    let p = 100.0 * fraction;
    if p == 0.0 {
        "0 %".into()
    } else if p.abs() < 1e-3 {
        "< 0.001 %".into()
    } else {
        format!("{} %", num(p))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tables_narrow_their_widest_columns_then_split() {
        let mut t = Table::new(&["name", "a long comparison", "x"]);
        t.row(vec![
            "nrc-guide-2011".into(),
            "5.300 lx during the dark phase: the guidance asks that it be minimized or avoided".repeat(2),
            "ok".into(),
        ]);
        for w in [40, 60, 100] {
            let s = t.render(w, false);
            assert!(s.lines().all(|l| text_width(l) <= w), "{w}:\n{s}");
            assert!(s.contains("nrc-guide-2011"), "a word that fits stays whole:\n{s}");
        }
        let mut empty = Table::new(&["", "x"]);
        empty.row(vec![String::new(), "y".repeat(80)]);
        assert!(empty.render(40, false).lines().all(|l| text_width(l) <= 40));
        let mut wide = Table::new(&(0..14).map(|c| format!("col {c}")).collect::<Vec<_>>());
        wide.row((0..14).map(|c| format!("{}.5+", 100 + c)).collect());
        let s = wide.render(60, false);
        assert!(s.lines().all(|l| text_width(l) <= 60), "{s}");
        assert!(s.matches("col 0").count() >= 2, "each part repeats the first column:\n{s}");
        assert!(s.contains("113.5+"), "{s}");
    }

    #[test]
    fn colour_does_not_change_the_layout() {
        let mut t = Table::new(&["hazard", "verdict"]);
        t.painted_row(vec![
            ("retinal blue light (photochemical), radiance".into(), ""),
            ("EXCEEDS".into(), "31;1"),
        ]);
        t.painted_row(vec![("retinal thermal".into(), ""), ("within limit".into(), "32")]);
        let plain = t.render(30, false);
        let coloured = t.render(30, true);
        assert!(coloured.contains("\x1b[31;1mEXCEEDS"), "{coloured:?}");
        let strip = |s: &str| {
            let mut out = String::new();
            let mut chars = s.chars();
            while let Some(c) = chars.next() {
                if c == '\x1b' {
                    chars.by_ref().find(|&c| c == 'm');
                } else {
                    out.push(c);
                }
            }
            out
        };
        assert_eq!(strip(&coloured), plain);
    }

    #[test]
    fn prose_wraps_without_splitting_a_grouped_number() {
        let text = format!("{}the limit is not reached within 30 000 s here", "x ".repeat(37));
        let lines = wrap(&text, 80, "", "");
        assert!(lines.iter().all(|l| l.chars().count() <= 80), "{lines:?}");
        assert!(lines.iter().any(|l| l.contains("30 000")), "{lines:?}");
    }
}
