//! The terminal output is written for people: it fits the terminal's width (100 columns when
//! the output is not a terminal, `COLUMNS` when set), and a TOML error shows the line with a
//! caret line under the mistake and suggests only keys allowed at that place. Snapshot tests
//! hold the wording of the three demos, in the terminal and in Markdown.

use std::path::PathBuf;

use assert_cmd::Command;
use unicode_width::UnicodeWidthStr;

const DEMOS: [&str; 3] = ["vivarium", "dark-adaptation", "stimulus-review"];

/// The binary with stdout captured (not a terminal), no colour and `COLUMNS` set to `width`.
fn retidose(width: usize) -> Command {
    let mut c = Command::cargo_bin("retidose").expect("binary is built");
    c.env("COLUMNS", width.to_string()).env("NO_COLOR", "1");
    c
}

/// Runs `args` at `width` columns; exit 0, or 1 where a check finds an exceedance or a flag.
fn run(width: usize, args: &[&str]) -> String {
    let out = retidose(width).args(args).output().unwrap();
    let code = out.status.code();
    assert!(code == Some(0) || code == Some(1), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
    String::from_utf8(out.stdout).unwrap()
}

/// Every line of `text` at most `width` columns wide, as a terminal shows it.
fn assert_fits(text: &str, width: usize, what: &str) {
    let long: Vec<(usize, &str)> =
        text.lines().map(|l| (UnicodeWidthStr::width(l), l)).filter(|(w, _)| *w > width).collect();
    assert!(long.is_empty(), "{what}: {} line(s) wider than {width} columns: {long:#?}", long.len());
}

/// The README's examples of every command but `assess`.
const EXAMPLES: [&[&str]; 14] = [
    &["limits", "list"],
    &["limits", "show", "iec62471-2006"],
    &["limits", "show", "directive-2006-25-ec"],
    &[
        "limits",
        "check",
        "stimulus-460-led",
        "--luminous-intensity",
        "2 cd",
        "--distance",
        "200 mm",
        "--size",
        "5 mm",
        "--for",
        "8 h",
        "--classify",
    ],
    &[
        "limits",
        "check",
        "uva-365-led",
        "--irradiance",
        "0.5 W/m2",
        "--full-field",
        "--for",
        "1 h",
        "--set",
        "directive-2006-25-ec",
    ],
    &[
        "retina",
        "warm-white-led",
        "--illuminance",
        "350 lx",
        "--full-field",
        "--species",
        "mouse",
        "--pupil",
        "dark",
    ],
    &[
        "retina",
        "cie:D65",
        "--luminance",
        "100 cd/m2",
        "--subtense",
        "20 deg",
        "--species",
        "human",
        "--pupil",
        "watson-yellott",
        "--age",
        "25 y",
    ],
    &[
        "retina",
        "stimulus-460-led",
        "--luminous-intensity",
        "2 cd",
        "--distance",
        "200 mm",
        "--size",
        "5 mm",
        "--species",
        "human",
        "--pupil",
        "3 mm",
    ],
    &[
        "bleach",
        "--receptor",
        "human-rod",
        "--retinal",
        "1e6 scot td",
        "--for",
        "60 s",
        "--then-dark",
        "40 min",
    ],
    &[
        "bleach",
        "--receptor",
        "mouse-rod",
        "--rate",
        "2e5 R*/rod/s",
        "--for",
        "12 h",
        "--then-dark",
        "12 h",
        "--repeat",
        "7",
    ],
    &["bleach", "--receptor", "human-rod", "--flash", "100"],
    &["spectrum", "cie:D65", "--illuminance", "250 lx"],
    &["spectrum", "led:460nm:20nm", "--irradiance", "0.5 W/m2"],
    &["sources"],
];

#[test]
fn every_demo_fits_100_columns_and_narrower_terminals() {
    for width in [100, 72] {
        for demo in DEMOS {
            assert_fits(&run(width, &["assess", "--demo", demo]), width, demo);
        }
    }
    // All three in one run, and without COLUMNS: not a terminal, so 100 columns.
    assert_fits(&run(100, &["assess", "--demo"]), 100, "all demos");
    let out = Command::cargo_bin("retidose")
        .unwrap()
        .env_remove("COLUMNS")
        .args(["assess", "--demo"])
        .output()
        .unwrap();
    assert_fits(&String::from_utf8(out.stdout).unwrap(), 100, "all demos, no COLUMNS");
}

#[test]
fn the_readme_examples_of_every_command_fit_100_columns() {
    for args in EXAMPLES {
        assert_fits(&run(100, args), 100, &args.join(" "));
    }
}

#[test]
fn a_wider_terminal_gets_wider_tables_but_prose_stays_readable() {
    let narrow = run(100, &["assess", "--demo", "stimulus-review"]);
    let wide = run(200, &["assess", "--demo", "stimulus-review"]);
    assert_fits(&wide, 200, "stimulus-review at 200 columns");
    assert!(wide.lines().count() < narrow.lines().count(), "tables wrap less when there is room");
    // Prose (not table lines) is never set wider than 100 columns.
    let prose = wide.lines().filter(|l| !l.starts_with(['┌', '│', '├', '└']));
    assert!(prose.map(UnicodeWidthStr::width).all(|w| w <= 100));
}

#[test]
fn numbers_durations_and_names_are_written_for_people() {
    let review = run(100, &["assess", "--demo", "stimulus-review"]);
    // A duration in hours, not 28800 s; t_max in one wording.
    assert!(review.contains("against iec62471-2006 for 8 h"), "{review}");
    assert!(review.contains("2 h 47 min"), "{review}");
    assert!(review.contains("never reached"), "{review}");
    assert!(!review.contains("> 30000 s"), "{review}");
    assert!(!review.lines().any(|l| l.starts_with("Exposure limits") && l.contains("28800")), "{review}");
    // Large numbers: 4 significant digits, grouped or in scientific notation.
    assert!(review.contains("720 100 td") && review.contains("1.489e7 td"), "{review}");
    let show = run(100, &["limits", "show", "iec62471-2006"]);
    assert!(!show.contains("SmallerThanRad") && !show.contains("OptIn"), "{show}");
    assert!(show.contains("only to sources that subtend less than 11 mrad"), "{show}");
    let retina = run(
        100,
        &[
            "retina",
            "stimulus-460-led",
            "--luminous-intensity",
            "2 cd",
            "--distance",
            "200 mm",
            "--size",
            "5 mm",
            "--species",
            "human",
            "--pupil",
            "3 mm",
        ],
    );
    assert!(!retina.contains("lamb_pugh_2006"), "a troland route is named by its source: {retina}");
    assert!(retina.contains("101 900 cd/m²"), "{retina}");
}

/// A scenario file in a fresh folder.
fn scenario(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-terminal-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// The stderr of `assess` on `text`, which must fail with exit 2.
fn error_of(name: &str, text: &str) -> String {
    let p = scenario(name, text);
    let out = retidose(100).args(["assess", p.to_str().unwrap()]).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "{}", String::from_utf8_lossy(&out.stdout));
    String::from_utf8(out.stderr).unwrap()
}

#[test]
fn a_toml_error_shows_the_line_a_caret_line_and_suggests_only_keys_valid_there() {
    let good = run(100, &["assess", "--example", "vivarium"]);
    // A slip of a [subject] key: the file and line first, then the line, the carets under the
    // key on a line of their own, then the nearest key of [subject].
    let text = good.replacen("\n[subject]\n", "\n[subject]\npupl = \"3 mm\"\n", 1);
    let line = text.lines().position(|l| l.starts_with("pupl =")).unwrap() + 1;
    let e = error_of("slip.toml", &text);
    let lines: Vec<&str> = e.lines().collect();
    assert!(
        lines[0].starts_with("retidose: error: ")
            && lines[0].ends_with(&format!("slip.toml:{line}: unknown field `pupl`")),
        "{e}"
    );
    assert_eq!(lines[1].trim_start(), format!("line {line} | pupl = \"3 mm\""), "{e}");
    assert_eq!(lines[2].trim(), "| ^^^^", "{e}");
    assert_eq!(lines[1].find("pupl"), lines[2].find('^'), "the carets sit under the key: {e}");
    assert_eq!(lines[3].trim(), "did you mean `pupil`?", "{e}");
    assert!(e.contains("keys allowed here: `species`"), "{e}");
    // `name` in a luminaire: nothing of [[room.luminaire]] is close, and the keys of other
    // tables (the event's `name`, the rack's `rack_y`) are not offered.
    let text = good.replacen("[[room.luminaire]]\n", "[[room.luminaire]]\nname = \"west\"\n", 1);
    let e = error_of("luminaire.toml", &text);
    assert!(e.contains("unknown field `name`"), "{e}");
    assert!(!e.contains("did you mean"), "{e}");
    assert!(e.contains("keys allowed here: `id`, `x`, `y`, `z`, `intensity`"), "{e}");
    assert!(!e.contains("rack_y"), "{e}");
    // A syntax error: the caret under the place the parser stopped, then what it expected.
    let e = error_of("syntax.toml", "[scenario\nname = \"x\"\n");
    let lines: Vec<&str> = e.lines().collect();
    assert!(lines[0].ends_with("syntax.toml:1: unclosed table"), "{e}");
    assert_eq!(lines[1].trim_start(), "line 1 | [scenario", "{e}");
    assert_eq!(lines[2].find('^'), Some(lines[1].find("[scenario").unwrap() + "[scenario".len()), "{e}");
    assert_eq!(lines[3].trim(), "expected `]`", "{e}");
}

// The demos' wording, reviewed and held. After a deliberate change, review the new text
// (`cargo insta review`, or INSTA_UPDATE=always once, then read the .snap diffs).

#[test]
fn snapshot_of_the_demos_in_the_terminal() {
    for demo in DEMOS {
        insta::assert_snapshot!(format!("terminal_{demo}"), run(100, &["assess", "--demo", demo]));
    }
}

#[test]
fn snapshot_of_the_demos_in_markdown() {
    for demo in DEMOS {
        insta::assert_snapshot!(
            format!("markdown_{demo}"),
            run(100, &["assess", "--demo", demo, "--format", "markdown"])
        );
    }
}
