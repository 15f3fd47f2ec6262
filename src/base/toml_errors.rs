//! Turning TOML and serde errors into messages a person can act on: the file and line, what is
//! wrong, the line itself with a caret line under the offending part, then what would be right
//! and, for an unknown key or value, the nearest one of those allowed at that place.
//!
//! ```text
//! room.toml:12: unknown field `pupl`
//!   line 12 | pupl = "dark"
//!           | ^^^^
//!   did you mean `pupil`?
//!   keys allowed here: `species`, `pupil`, `dark_pupil`, `age`
//! ```

/// Edit distance between two short strings (Levenshtein).
fn distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1];
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur.push(sub.min(prev[j + 1] + 1).min(cur[j] + 1));
        }
        prev = cur;
    }
    prev[b.len()]
}

/// The name among `allowed` that `unknown` is most likely a slip for: within an edit distance
/// of a third of its length (at least 1), ignoring case and `-` for `_`; otherwise the one
/// allowed name that contains it or that it contains. `None` when nothing is that close: a
/// suggestion far from what was written misleads more than it helps.
pub(crate) fn nearest<'a>(unknown: &str, allowed: &'a [String]) -> Option<&'a str> {
    let norm = |s: &str| s.to_lowercase().replace('-', "_");
    let u = norm(unknown);
    let limit = (u.chars().count() / 3).max(1);
    let best = allowed
        .iter()
        .map(|k| (distance(&u, &norm(k)), k))
        .filter(|(d, _)| *d <= limit)
        .min_by_key(|(d, _)| *d)
        .map(|(_, k)| k.as_str());
    if best.is_some() {
        return best;
    }
    let containing: Vec<&String> = allowed
        .iter()
        .filter(|k| {
            let k = norm(k);
            k.chars().count() >= 3 && u.chars().count() >= 3 && (k.contains(&u) || u.contains(&k))
        })
        .collect();
    match containing.as_slice() {
        [one] => Some(one.as_str()),
        _ => None,
    }
}

/// The names between backticks in `text` (`` expected one of `a`, `b` `` → a, b).
fn quoted(text: &str) -> Vec<String> {
    text.split('`').skip(1).step_by(2).map(str::to_string).collect()
}

/// A line of the user's file made safe to print: control and bidi characters become U+FFFD,
/// tabs a space (so the caret line below stays aligned).
fn shown(line: &str) -> String {
    line.chars()
        .map(|c| match c {
            '\t' => ' ',
            c if c.is_control() || matches!(c, '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}') => {
                '\u{fffd}'
            }
            c => c,
        })
        .collect()
}

/// Where a parse error is, read from the parser's report: line and column (1-based, the column
/// in characters) and the text of that line.
struct Place {
    line: usize,
    column: usize,
    content: String,
}

/// The place in `report` (a `toml::de::Error` displayed), when it names one.
fn place(report: &str) -> Option<Place> {
    let mut lines = report.lines();
    let head = lines.next()?.strip_prefix("TOML parse error at line ")?;
    let (line, column) = head.split_once(", column ")?;
    let (line, column): (usize, usize) = (line.trim().parse().ok()?, column.trim().parse().ok()?);
    let prefix = format!("{line} | ");
    let content = lines.find_map(|l| l.strip_prefix(prefix.as_str()))?.to_string();
    Some(Place { line, column, content })
}

/// Wraps `text` at 100 columns, every line indented by two spaces.
fn indented(text: &str) -> String {
    let opts = textwrap::Options::new(100).initial_indent("  ").subsequent_indent("    ");
    textwrap::wrap(text, opts).join("\n")
}

/// The message of a TOML deserialisation error of the file `origin`, over several lines:
///
/// 1. `FILE:LINE: what is wrong` (`FILE: what is wrong` when the parser gives no place);
/// 2. the line of the file, after `line N |`;
/// 3. a caret line under the offending part;
/// 4. what would be right: for an unknown key or value, "did you mean" the nearest of the
///    names the parser lists as allowed at that place (only those, and only when one is
///    close), then that list; otherwise what the parser expected.
pub fn describe(e: &toml::de::Error, origin: &str) -> String {
    let report = e.to_string();
    let message = e.message().trim();
    let (what, expected) = match message.split_once(", expected ") {
        Some((w, x)) => (w.trim(), Some(x.trim())),
        None => (message, None),
    };
    let mut out = match place(&report) {
        Some(p) => {
            let content = shown(&p.content);
            let col = p.column.saturating_sub(1).min(content.chars().count());
            let span = e.span().map_or(1, |s| s.end.saturating_sub(s.start));
            // The span is in bytes: count the characters it covers on this line.
            let mut bytes = 0;
            let carets = p.content.chars().skip(col).take_while(|c| {
                bytes += c.len_utf8();
                bytes <= span
            });
            let carets = carets.count().max(1);
            let gutter = format!("  line {} | ", p.line);
            format!(
                "{origin}:{}: {what}\n{gutter}{content}\n{}| {}{}",
                p.line,
                " ".repeat(gutter.chars().count() - 2),
                " ".repeat(col),
                "^".repeat(carets)
            )
        }
        None => {
            // No place: the parser's report is the message, then the key path (`in `a.b``).
            let key = report.lines().filter_map(|l| l.strip_prefix("in ")).next_back();
            match key {
                Some(k) => format!("{origin}: {what} (in {k})"),
                None => format!("{origin}: {what}"),
            }
        }
    };
    let unknown = ["unknown field `", "unknown variant `"]
        .iter()
        .find_map(|p| what.strip_prefix(p))
        .and_then(|rest| rest.split('`').next());
    match (unknown, expected) {
        (Some(u), Some(x)) => {
            let allowed = quoted(x);
            if let Some(best) = nearest(u, &allowed) {
                out.push_str(&format!("\n  did you mean `{best}`?"));
            }
            let what = if what.starts_with("unknown field") { "keys" } else { "values" };
            let list = allowed.iter().map(|k| format!("`{k}`")).collect::<Vec<_>>().join(", ");
            if !list.is_empty() {
                out.push('\n');
                out.push_str(&indented(&format!("{what} allowed here: {list}")));
            }
        }
        (Some(_), None) if message.contains("there are no fields") => {
            out.push_str("\n  this table takes no keys");
        }
        (_, None) if what == "duplicate key" => {
            out.push_str("\n  a key may be given once in a table: remove one of the two");
        }
        (_, Some(x)) => {
            out.push('\n');
            out.push_str(&indented(&format!("expected {x}")));
        }
        (_, None) => {}
    }
    out
}

/// The 1-based line of the key at `path` (`survey.luminaire[1].intensity`) in the TOML `text`,
/// found by walking the parsed document and reading the key's span. When the full path is not
/// in the document (a key that is missing), the line of the deepest enclosing key that is.
pub fn line_of_key(text: &str, path: &str) -> Option<usize> {
    use toml::de::{DeTable, DeValue};
    let doc = DeTable::parse(text).ok()?;
    let mut table = doc.get_ref();
    let mut found: Option<usize> = None;
    let segments: Vec<&str> = path.split('.').collect();
    for (n, seg) in segments.iter().enumerate() {
        let (name, index) = match seg.split_once('[') {
            Some((k, rest)) => (k, rest.trim_end_matches(']').parse::<usize>().ok()),
            None => (*seg, None),
        };
        let Some((key, value)) = table.iter().find(|(k, _)| k.get_ref().as_ref() == name) else {
            break;
        };
        found = Some(key.span().start);
        let value = match (value.get_ref(), index) {
            (DeValue::Array(items), Some(i)) => {
                let Some(item) = items.get(i) else {
                    break;
                };
                found = Some(item.span().start);
                item.get_ref()
            }
            (v, _) => v,
        };
        match value {
            DeValue::Table(inner) if n + 1 < segments.len() => table = inner,
            _ => break,
        }
    }
    found.map(|offset| text[..offset.min(text.len())].matches('\n').count() + 1)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(serde::Deserialize, Debug)]
    #[serde(deny_unknown_fields)]
    #[allow(dead_code, reason = "fields are only deserialised in this test")]
    struct S {
        species: String,
        pupil: Option<String>,
        shelves: Option<u32>,
        rack: Option<Rack>,
    }

    #[derive(serde::Deserialize, Debug)]
    #[serde(deny_unknown_fields)]
    #[allow(dead_code, reason = "fields are only deserialised in this test")]
    struct Rack {
        id: String,
        rack_y: Option<String>,
        days: Option<u32>,
    }

    fn error(text: &str) -> String {
        describe(&toml::from_str::<S>(text).unwrap_err(), "x.toml")
    }

    #[test]
    fn locates_keys_inside_their_table() {
        let text = "[subject]\nspecies = \"human\"\n[[source]]\nid = \"a\"\ndistance = \"1 m\"\n[[source]]\nid = \"b\"\ndistance = \"2\"\n";
        assert_eq!(line_of_key(text, "source[1].distance"), Some(8));
        assert_eq!(line_of_key(text, "source[0].distance"), Some(5));
        assert_eq!(line_of_key(text, "subject.species"), Some(2));
        // A missing key: the line of its table.
        assert_eq!(line_of_key(text, "subject.pupil"), Some(1));
        assert_eq!(line_of_key(text, "nothing"), None);
        let inline = "[[step]]\nsource = { spectrum = \"x\", distance = \"1\" }\n";
        assert_eq!(line_of_key(inline, "step[0].source.distance"), Some(2));
    }

    #[test]
    fn names_file_and_line_then_shows_the_line_with_a_caret_line_under_the_key() {
        let m = error("species = \"mouse\"\npupl = \"dark\"\n");
        let lines: Vec<&str> = m.lines().collect();
        assert_eq!(lines[0], "x.toml:2: unknown field `pupl`", "{m}");
        assert_eq!(lines[1], "  line 2 | pupl = \"dark\"", "{m}");
        assert_eq!(lines[2], "         | ^^^^", "{m}");
        assert_eq!(lines[3], "  did you mean `pupil`?", "{m}");
        assert_eq!(lines[4], "  keys allowed here: `species`, `pupil`, `shelves`, `rack`", "{m}");
        // The carets sit under the key: same column as its first character.
        assert_eq!(lines[1].find("pupl"), lines[2].find('^'));
    }

    #[test]
    fn suggests_only_from_the_keys_of_the_table_at_that_place_and_only_when_close() {
        // `name` is far from every key of [rack] (`id`, `rack_y`, `days`): no suggestion.
        let m = error("species = \"m\"\n[rack]\nid = \"A\"\nname = \"x\"\n");
        assert!(m.starts_with("x.toml:4: unknown field `name`\n"), "{m}");
        assert!(!m.contains("did you mean"), "{m}");
        assert!(m.contains("keys allowed here: `id`, `rack_y`, `days`"), "{m}");
        // A slip in [rack] is matched against [rack]'s keys, not the top level's.
        let m = error("species = \"m\"\n[rack]\nid = \"A\"\nrack-y = \"1 m\"\n");
        assert!(m.contains("did you mean `rack_y`?"), "{m}");
        let m = error("species = \"m\"\n[rack]\nid = \"A\"\nspecis = \"rat\"\n");
        assert!(!m.contains("did you mean"), "`species` is not a key of [rack]: {m}");
        assert_eq!(nearest("shelfs", &["shelves".into(), "rack".into()]), Some("shelves"));
        assert_eq!(nearest("pupil_mm", &["pupil".into(), "species".into()]), Some("pupil"));
        assert_eq!(nearest("name", &["days".into(), "id".into(), "rack_y".into()]), None);
    }

    #[test]
    fn syntax_and_type_errors_say_what_was_expected() {
        let m = error("[scenario\nname = 1\n");
        let lines: Vec<&str> = m.lines().collect();
        assert_eq!(lines[0], "x.toml:1: unclosed table", "{m}");
        assert_eq!(lines[1], "  line 1 | [scenario", "{m}");
        assert_eq!(lines[2], "         |          ^", "{m}");
        assert_eq!(lines[3], "  expected `]`", "{m}");
        let m = error("species = \"m\"\nshelves = \"five\"\n");
        assert!(m.starts_with("x.toml:2: invalid type: string \"five\"\n"), "{m}");
        let lines: Vec<&str> = m.lines().collect();
        assert!(lines[2].ends_with(" ^^^^^^") && lines[1].find('"') == lines[2].find('^'), "{m}");
        assert!(m.ends_with("\n  expected u32"), "{m}");
        let m = error("species = \"m\"\nspecies = \"r\"\n");
        assert!(m.starts_with("x.toml:2: duplicate key\n"), "{m}");
    }

    #[test]
    fn control_characters_of_the_file_are_not_printed() {
        let m = error("species = \"m\"\n\u{1b}[31mpupl = 1\n");
        assert!(!m.contains('\u{1b}'), "{m:?}");
    }
}
