//! Each demo's HTML report in a real browser: headless Chromium (Debian's package, installed by
//! `.ci/run`) renders it to a PNG; the page must log nothing to the console (the reports carry
//! no script, so any console line is an error or a warning), the picture must not be blank, and
//! every inline SVG must parse as XML. Without a browser the test says it was skipped; under CI
//! (`CI` set, as `.ci/run` does) a missing browser is a failure.

use std::path::{Path, PathBuf};
use std::process::Command;

use assert_cmd::cargo::CommandCargoExt;

fn chromium() -> Option<PathBuf> {
    ["/usr/bin/chromium", "/usr/bin/chromium-browser", "/usr/bin/google-chrome"]
        .iter()
        .map(PathBuf::from)
        .find(|p| p.exists())
}

/// Every `<svg …>…</svg>` of `html` parses as XML.
fn svgs_parse(html: &str) -> usize {
    let mut n = 0;
    let mut rest = html;
    while let Some(start) = rest.find("<svg") {
        let end = rest[start..].find("</svg>").expect("an <svg> without its </svg>") + start + "</svg>".len();
        let svg = &rest[start..end];
        if let Err(e) = roxmltree::Document::parse(svg) {
            panic!("SVG {} does not parse: {e}\n{}", n + 1, &svg[..svg.len().min(400)]);
        }
        n += 1;
        rest = &rest[end..];
    }
    n
}

/// Share of pixels that are not near-white.
fn ink(png_path: &Path) -> f64 {
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(png_path).unwrap()));
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut buf).unwrap();
    let channels = info.color_type.samples();
    let px = &buf[..info.buffer_size()];
    let inked = px.chunks(channels).filter(|p| p.iter().take(3).any(|&c| c < 200)).count();
    inked as f64 / (px.len() / channels) as f64
}

#[test]
fn each_demo_html_report_renders_in_a_real_browser() {
    let Some(browser) = chromium() else {
        assert!(
            std::env::var_os("CI").is_none(),
            "CI runs the browser test: install chromium (.ci/run does)"
        );
        eprintln!("skipped: no Chromium here (CI installs Debian's chromium and runs this test)");
        return;
    };
    let dir = std::env::temp_dir().join(format!("retidose-browser-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    for (demo, html, figures) in pages(&dir) {
        assert!(svgs_parse(&html) >= figures, "{demo}: the report should hold its figures");
        let page = dir.join(format!("{demo}.html"));
        let png = dir.join(format!("{demo}.png"));
        std::fs::write(&page, &html).unwrap();
        let run = Command::new(&browser)
            .args([
                "--headless",
                "--no-sandbox",
                "--disable-gpu",
                "--hide-scrollbars",
                "--window-size=1280,2400",
            ])
            .arg(format!("--screenshot={}", png.display()))
            .args(["--enable-logging=stderr", "--v=0"])
            .arg(format!("file://{}", page.display()))
            .output()
            .unwrap();
        let log = String::from_utf8_lossy(&run.stderr);
        let console: Vec<&str> = log.lines().filter(|l| l.contains(":CONSOLE")).collect();
        assert!(console.is_empty(), "{demo}: the page logged to the console: {console:?}");
        assert!(png.exists(), "{demo}: no screenshot; the browser said:\n{log}");
        let share = ink(&png);
        assert!(share > 0.01, "{demo}: the page looks blank ({:.3} % of pixels inked)", 100.0 * share);
    }
}

/// Each demo's HTML report (at least 2 figures each) and the comparison of `compare --example`
/// (its margins figure), with a name for the files.
fn pages(dir: &Path) -> Vec<(String, String, usize)> {
    let run = |args: &[&str]| {
        let out = Command::cargo_bin("retidose").unwrap().args(args).output().unwrap();
        String::from_utf8(out.stdout).unwrap()
    };
    let mut pages: Vec<(String, String, usize)> = ["vivarium", "dark-adaptation", "stimulus-review"]
        .iter()
        .map(|d| (d.to_string(), run(&["assess", "--demo", d, "--format", "html"]), 2))
        .collect();
    let lamps = dir.join("lamps.toml");
    std::fs::write(&lamps, run(&["compare", "--example"])).unwrap();
    let lamps = lamps.to_str().unwrap();
    pages.push(("compare-example".into(), run(&["compare", lamps, "--format", "html"]), 1));
    pages
}
