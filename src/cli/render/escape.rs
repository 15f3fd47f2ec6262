//! Escaping of text that comes from the user's files (titles, descriptions, ids, step and filter
//! names, notes that quote them) before it is written into a report, so that the text shows as
//! itself and cannot inject anything:
//!
//! | function | where | what it stops |
//! |---|---|---|
//! | [`markdown`] | Markdown inline text | headings, links, raw HTML, emphasis, table cells |
//! | [`csv_cell`] | a CSV cell | spreadsheet formulas (CSV injection) |
//! | [`terminal_line`], [`terminal_text`] | the terminal | escape sequences, control and bidi characters |
//!
//! Fixed text the renderers write themselves needs none of this.

use std::borrow::Cow;

/// The characters [`markdown`] escapes with a backslash wherever they are: CommonMark's
/// punctuation that can open or close an inline construct (emphasis, code spans, links and
/// images, autolinks and raw HTML, table cells, the backslash itself) and `~` (GitHub's
/// strikethrough). `(`, `)` and `!` need no escape once `[` and `]` have one.
const MARKDOWN_INLINE: &[char] = &['\\', '`', '*', '_', '[', ']', '|', '<', '>', '~'];

/// The characters that start a block (heading, list, block quote, setext underline) when they
/// open a line; escaped only where the text begins.
const MARKDOWN_BLOCK_START: &[char] = &['#', '+', '-', '=', '>'];

/// Escapes user text for Markdown inline context (a heading, a paragraph, a list item or a table
/// cell), so that it renders as the literal text in CommonMark and reads cleanly unrendered:
///
/// - `` \ ` * _ [ ] | < > ~ `` get a backslash anywhere, so no emphasis, code span, link or
///   image (hence no `javascript:` link), autolink or raw HTML can form, and `|` cannot end a
///   table cell;
/// - where the text begins, a block marker (`#`, `+`, `-`, `=`, `>`, or the `.` / `)` after
///   leading digits) gets a backslash, so the text cannot become a heading, list or quote;
/// - `&` becomes `&amp;`, so no entity reference is decoded;
/// - line feeds, carriage returns and every other control character become a space, so the text
///   stays on its line and cannot start a block of its own; so do the bidirectional embeddings,
///   overrides and isolates (U+202A–U+202E, U+2066–U+2069), which would show the text in another
///   order than it is.
pub fn markdown(text: &str) -> String {
    let mut o = String::with_capacity(text.len() + text.len() / 8 + 4);
    let lead = text.len() - text.trim_start_matches(' ').len();
    let digits = text[lead..].chars().take_while(char::is_ascii_digit).count();
    for (i, c) in text.char_indices() {
        let at_start = i == lead && MARKDOWN_BLOCK_START.contains(&c);
        let list_number = digits > 0 && i == lead + digits && matches!(c, '.' | ')');
        match c {
            '&' => o.push_str("&amp;"),
            c if MARKDOWN_INLINE.contains(&c) || at_start || list_number => {
                o.push('\\');
                o.push(c);
            }
            c if c.is_control() || is_bidi_control(c) => o.push(' '),
            c => o.push(c),
        }
    }
    o
}

/// Whether `c` is a bidirectional embedding, override or isolate (U+202A–U+202E,
/// U+2066–U+2069).
fn is_bidi_control(c: char) -> bool {
    matches!(c, '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}')
}

/// Neutralises a spreadsheet formula in a CSV cell, after the OWASP guidance on CSV injection:
/// a cell that starts with `=`, `+`, `-`, `@`, a tab or a carriage return gets a leading
/// apostrophe `'`, so a spreadsheet shows it as text instead of evaluating it
/// (`=HYPERLINK(…)` becomes `'=HYPERLINK(…)`).
///
/// A cell that is a plain decimal number (an optional sign, digits with an optional decimal
/// point, an optional exponent: `-3.5`, `+2`, `-1e-7`, `.5`) is left unchanged: numbers are
/// legitimate data and a spreadsheet reads them as numbers, not formulas. Words a number parser
/// might accept (`-inf`, `-NaN`) are not plain numbers and get the apostrophe.
///
/// The CSV writer still quotes the cell; this only decides what the cell holds.
pub fn csv_cell(text: &str) -> Cow<'_, str> {
    let risky = matches!(text.as_bytes().first(), Some(b'=' | b'+' | b'-' | b'@' | b'\t' | b'\r'));
    if risky && !is_plain_number(text) { Cow::Owned(format!("'{text}")) } else { Cow::Borrowed(text) }
}

/// Whether `text` is `[+-]?(digits[.digits?] | .digits)([eE][+-]?digits)?`, nothing else.
fn is_plain_number(text: &str) -> bool {
    let b = text.as_bytes();
    let mut i = usize::from(matches!(b.first(), Some(b'+' | b'-')));
    let digits = |i: &mut usize| {
        let start = *i;
        while b.get(*i).is_some_and(u8::is_ascii_digit) {
            *i += 1;
        }
        *i - start
    };
    let mut mantissa = digits(&mut i);
    if b.get(i) == Some(&b'.') {
        i += 1;
        mantissa += digits(&mut i);
    }
    if mantissa == 0 {
        return false;
    }
    if matches!(b.get(i), Some(b'e' | b'E')) {
        i += 1;
        if matches!(b.get(i), Some(b'+' | b'-')) {
            i += 1;
        }
        if digits(&mut i) == 0 {
            return false;
        }
    }
    i == b.len()
}

/// User text for one line of the terminal: escape sequences, control characters, C1 controls
/// and bidirectional overrides removed (see [`terminal_text`]); line feeds, carriage returns and
/// tabs become a space, so a name cannot break a table row or start a line of its own.
pub fn terminal_line(text: &str) -> Cow<'_, str> {
    terminal(text, false)
}

/// User text of several lines for the terminal (a description): as [`terminal_line`] but line
/// feeds are kept (a carriage return is dropped, so it cannot overwrite a line). Removed:
///
/// - ESC and the sequence that follows it: a CSI sequence (`ESC [` … final byte), a string
///   sequence (`ESC ]` OSC, `ESC P`, `ESC X`, `ESC ^`, `ESC _`, up to BEL or `ESC \`), or
///   another escape (`ESC` intermediates and a final byte); the C1 introducers U+009B (CSI) and
///   U+009D (OSC) likewise;
/// - the other C0 controls and DEL; tabs become a space;
/// - the C1 controls U+0080–U+009F;
/// - the bidirectional embeddings, overrides and isolates U+202A–U+202E and U+2066–U+2069,
///   which would show the text in another order than it is.
pub fn terminal_text(text: &str) -> Cow<'_, str> {
    terminal(text, true)
}

/// Whether a character is not shown as itself on a terminal (see [`terminal_text`]).
fn unsafe_on_terminal(c: char) -> bool {
    c.is_control() || is_bidi_control(c)
}

/// [`terminal_line`] (`keep_newlines` false) and [`terminal_text`] (true).
fn terminal(text: &str, keep_newlines: bool) -> Cow<'_, str> {
    let needs = text.chars().any(|c| unsafe_on_terminal(c) && !(keep_newlines && c == '\n'));
    if !needs {
        return Cow::Borrowed(text);
    }
    let mut o = String::with_capacity(text.len());
    let mut chars = text.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '\u{1b}' => skip_escape(&mut chars),
            '\u{9b}' => skip_csi(&mut chars),
            '\u{9d}' => skip_string(&mut chars),
            '\n' if keep_newlines => o.push('\n'),
            '\r' if keep_newlines => {}
            '\r' if chars.peek() == Some(&'\n') => {}
            '\n' | '\r' | '\t' => o.push(' '),
            c if unsafe_on_terminal(c) => {}
            c => o.push(c),
        }
    }
    Cow::Owned(o)
}

/// Skips what follows an ESC: a CSI sequence, a string sequence, or intermediates and a final
/// byte.
fn skip_escape(chars: &mut std::iter::Peekable<std::str::Chars<'_>>) {
    match chars.peek() {
        Some('[') => {
            chars.next();
            skip_csi(chars);
        }
        Some(']' | 'P' | 'X' | '^' | '_') => {
            chars.next();
            skip_string(chars);
        }
        _ => {
            while chars.next_if(|c| ('\u{20}'..='\u{2f}').contains(c)).is_some() {}
            chars.next_if(|c| ('\u{30}'..='\u{7e}').contains(c));
        }
    }
}

/// Skips a CSI sequence's parameter and intermediate bytes and its final byte.
fn skip_csi(chars: &mut std::iter::Peekable<std::str::Chars<'_>>) {
    while chars.next_if(|c| ('\u{20}'..='\u{3f}').contains(c)).is_some() {}
    chars.next_if(|c| ('\u{40}'..='\u{7e}').contains(c));
}

/// Skips a string sequence (OSC, DCS, SOS, PM, APC) up to and with its terminator: BEL, `ESC \`
/// or the C1 string terminator U+009C; an unterminated one runs to the end of the text.
fn skip_string(chars: &mut std::iter::Peekable<std::str::Chars<'_>>) {
    while let Some(c) = chars.next() {
        match c {
            '\u{7}' | '\u{9c}' => return,
            '\u{1b}' => {
                chars.next_if_eq(&'\\');
                return;
            }
            _ => {}
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn markdown_escapes_html_links_and_headings() {
        assert_eq!(markdown("<script>alert(1)</script>"), r"\<script\>alert(1)\</script\>");
        assert_eq!(markdown("<img src=x onerror=alert(1)>"), r"\<img src=x onerror=alert(1)\>");
        assert_eq!(
            markdown("Title\n# Injected\n[x](javascript:alert(1))"),
            r"Title # Injected \[x\](javascript:alert(1))"
        );
        assert_eq!(markdown("# Injected"), r"\# Injected");
        assert_eq!(markdown("  - item"), r"  \- item");
        assert_eq!(markdown("12. x"), r"12\. x");
        assert_eq!(markdown("v2.5 at 20.40 lx (rack A-1)"), "v2.5 at 20.40 lx (rack A-1)");
        assert_eq!(markdown("a\r\nb"), "a  b");
    }

    #[test]
    fn markdown_escapes_every_construct_and_entities() {
        assert_eq!(markdown("*a* _b_ `c` ~~d~~ | e"), r"\*a\* \_b\_ \`c\` \~\~d\~\~ \| e");
        assert_eq!(markdown("&lt; & {x} !"), r"&amp;lt; &amp; {x} !");
        assert_eq!(markdown("1. - + > \\"), r"1\. - + \> \\");
        assert_eq!(markdown("tab\there\u{7}bell"), "tab here bell");
        assert_eq!(markdown("plain text, 5 mm"), "plain text, 5 mm");
        assert_eq!(markdown("µ°²"), "µ°²");
        assert_eq!(markdown("\u{202e}abc\u{2066}d"), " abc d");
    }

    #[test]
    fn csv_cells_with_formulas_get_an_apostrophe() {
        assert_eq!(csv_cell("=HYPERLINK(\"http://x\")"), "'=HYPERLINK(\"http://x\")");
        assert_eq!(csv_cell("+1+cmd"), "'+1+cmd");
        assert_eq!(csv_cell("-2+3"), "'-2+3");
        assert_eq!(csv_cell("@SUM(A1)"), "'@SUM(A1)");
        assert_eq!(csv_cell("\tx"), "'\tx");
        assert_eq!(csv_cell("\rx"), "'\rx");
        assert_eq!(csv_cell("-inf"), "'-inf");
        assert_eq!(csv_cell("-"), "'-");
        assert_eq!(csv_cell("-1e"), "'-1e");
        assert_eq!(csv_cell("+."), "'+.");
    }

    #[test]
    fn csv_numbers_and_plain_text_are_left_unchanged() {
        for ok in ["-3.5", "+2", "-1e-7", "-.5", "+5.", "-2E+10", "3.5", "holding room", "", "a=b"] {
            assert!(matches!(csv_cell(ok), Cow::Borrowed(s) if s == ok), "{ok}");
        }
    }

    #[test]
    fn terminal_strips_escape_sequences() {
        assert_eq!(terminal_line("\u{1b}[31mred\u{1b}[0m"), "red");
        assert_eq!(terminal_line("\u{1b}]0;title\u{7}"), "");
        assert_eq!(terminal_line("a\u{1b}]8;;http://x\u{1b}\\link\u{1b}]8;;\u{1b}\\b"), "alinkb");
        assert_eq!(terminal_line("\u{9b}2Jx"), "x");
        assert_eq!(terminal_line("\u{1b}cx\u{1b}(By"), "xy");
        assert_eq!(terminal_line("\u{1b}]0;never ends"), "");
        assert_eq!(terminal_line("trailing\u{1b}"), "trailing");
    }

    #[test]
    fn terminal_strips_controls_and_bidi_overrides() {
        assert_eq!(terminal_line("\u{202e}abc"), "abc");
        assert_eq!(terminal_line("a\u{2066}b\u{2069}c\u{202a}d"), "abcd");
        assert_eq!(terminal_line("a\u{85}b\u{9f}c\u{7f}d\u{8}e\u{0}f"), "abcdef");
        assert_eq!(terminal_line("Title\n# Injected\r\nx\ty"), "Title # Injected x y");
        assert_eq!(terminal_text("one\r\ntwo\nthree\rfour\tfive"), "one\ntwo\nthreefour five");
    }

    #[test]
    fn terminal_leaves_plain_text_borrowed() {
        for ok in ["5000 cd/m² — 20°", "<script>alert(1)</script>", "=HYPERLINK(\"http://x\")", ""] {
            assert!(matches!(terminal_line(ok), Cow::Borrowed(s) if s == ok), "{ok}");
        }
        assert!(matches!(terminal_text("a\nb"), Cow::Borrowed("a\nb")));
    }
}
