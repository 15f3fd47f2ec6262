//! Text from a scenario file cannot inject anything into a report: a title, description, source
//! id and step name full of HTML, Markdown links and headings, spreadsheet formulas, terminal
//! escape sequences and bidi overrides come out as inert text in the Markdown and terminal
//! reports.

use std::path::PathBuf;
use std::time::Duration;

use assert_cmd::Command;

fn retidose() -> Command {
    let mut c = Command::cargo_bin("retidose").expect("binary is built");
    c.timeout(Duration::from_secs(60)).env("NO_COLOR", "1");
    c
}

/// `text` as a TOML basic string, control characters as `\uXXXX`.
fn toml_str(text: &str) -> String {
    let mut o = String::from("\"");
    for c in text.chars() {
        match c {
            '"' => o.push_str("\\\""),
            '\\' => o.push_str("\\\\"),
            c if c.is_control() => o.push_str(&format!("\\u{:04X}", u32::from(c))),
            c => o.push(c),
        }
    }
    o.push('"');
    o
}

const TITLE: &str = "<script>alert(1)</script> \u{1b}[31mred\u{1b}[0m \u{202e}abc";
const DESCRIPTION: &str =
    "Title\n# Injected\n[x](javascript:alert(1))\n\u{1b}]0;title\u{7}\u{9b}2J <img src=x onerror=alert(1)>";
const SOURCE: &str = "<img src=x onerror=alert(1)>\u{1b}]0;title\u{7}\u{202e}";
const STEP: &str = "=HYPERLINK(\"http://x\")\n# Injected\n[x](javascript:alert(1)) \u{1b}[2J";

/// The dark-adaptation example with the hostile strings as title, description, source id and
/// step name, written to a temporary file.
fn hostile_scenario() -> PathBuf {
    let out = retidose().args(["assess", "--example", "dark-adaptation"]).output().unwrap();
    let example = String::from_utf8(out.stdout).unwrap();
    let replacements = [
        (
            "title = \"Rod bleach and dark adaptation, 60 s at 5000 cd/m² (invented demo)\"".to_string(),
            format!("title = {}", toml_str(TITLE)),
        ),
        (
            "description = \"A bleaching field for a dark-adaptation run, then 40 minutes in darkness.\""
                .to_string(),
            format!("description = {}", toml_str(DESCRIPTION)),
        ),
        ("id = \"bleaching-field\"".to_string(), format!("id = {}", toml_str(SOURCE))),
        ("on = [\"bleaching-field\"]".to_string(), format!("on = [{}]", toml_str(SOURCE))),
        ("name = \"bleach\"".to_string(), format!("name = {}", toml_str(STEP))),
    ];
    let mut text = example;
    for (from, to) in replacements {
        assert!(text.contains(&from), "the example has no {from}");
        text = text.replace(&from, &to);
    }
    let dir = std::env::temp_dir().join(format!("retidose-hostile-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join("hostile.toml");
    crate::files::write(&p, text);
    p
}

/// Runs `assess` on the hostile scenario in `format`; the report, whatever the verdict.
fn report(format: &str) -> String {
    let p = hostile_scenario();
    let out = retidose().args(["assess", p.to_str().unwrap(), "--format", format]).output().unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(matches!(out.status.code(), Some(0 | 1)), "{stderr}");
    String::from_utf8(out.stdout).unwrap()
}

/// Whether `needle` occurs in Markdown `md` without a backslash escaping its first character
/// (an odd number of backslashes before it).
fn raw(md: &str, needle: &str) -> bool {
    md.match_indices(needle).any(|(i, _)| md[..i].chars().rev().take_while(|&c| c == '\\').count() % 2 == 0)
}

#[test]
fn markdown_report_shows_hostile_text_as_text() {
    let md = report("markdown");
    assert!(raw("a <b", "<b") && !raw(r"a \<b", "<b") && raw(r"a \\<b", "<b"));
    assert!(md.contains(r"\<script\>alert(1)\</script\>"), "{md}");
    assert!(md.contains(r"\<img src=x onerror=alert(1)\>"), "{md}");
    assert!(!raw(&md, "<script") && !raw(&md, "<img"), "{md}");
    // Every `[` and `]` is escaped, so no link can form.
    assert!(!raw(&md, "](javascript:") && !raw(&md, "[x]"), "{md}");
    assert!(!md.lines().any(|l| l.trim_start().starts_with("# Injected")), "{md}");
    assert!(!md.contains('\u{1b}') && !md.contains('\u{9b}'), "{md}");
    // The step name reaches the step table, escaped, on one row.
    assert!(md.lines().any(|l| l.starts_with("| \\=HYPERLINK(\"http://x\") # Injected")), "{md}");
}

#[test]
fn terminal_report_carries_no_escape_control_or_bidi_characters() {
    let t = report("table");
    assert!(!t.contains('\u{1b}'), "{t:?}");
    assert!(!t.contains('\u{9b}'), "{t:?}");
    assert!(!t.contains('\u{202e}'), "{t:?}");
    assert!(!t.chars().any(|c| c.is_control() && c != '\n'), "{t:?}");
    assert!(t.contains("retidose assess — <script>alert(1)</script> red abc"), "{t}");
    assert!(t.contains("<img src=x onerror=alert(1)>"), "{t}");
}

#[test]
fn csv_cells_from_user_text_cannot_run_as_spreadsheet_formulas() {
    let text = report("csv");
    let mut rdr = csv::ReaderBuilder::new().has_headers(true).from_reader(text.as_bytes());
    let mut cells = 0;
    for rec in rdr.records() {
        for c in rec.unwrap().iter() {
            cells += 1;
            let risky = c.starts_with(['=', '+', '-', '@', '\t', '\r']);
            assert!(!risky || c.parse::<f64>().is_ok(), "a cell that a spreadsheet would run: {c:?}");
        }
    }
    assert!(cells > 50);
    // The hostile step name is there, neutralised with a leading apostrophe.
    assert!(text.contains("'=HYPERLINK"), "{text}");
}
