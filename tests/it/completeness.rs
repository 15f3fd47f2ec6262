//! Every answer in every format: for each demo, each headline figure of the JSON (trolands,
//! R*/rod/s, α-opic values, ratios and their lower bounds, E_thr, threshold distance, risk
//! groups, the outcome) appears in the terminal, CSV, Markdown and HTML reports. Text formats round to 4 significant digits (the rule written again here);
//! the CSV keeps full precision.

use assert_cmd::Command;
use serde_json::Value;

fn run(demo: &str, format: &str) -> String {
    let out = Command::cargo_bin("retidose")
        .unwrap()
        .args(["assess", "--demo", demo, "--format", format])
        .env("COLUMNS", "100")
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    String::from_utf8(out.stdout).unwrap()
}

/// 4 significant digits: plain from 0.001 up to a million (thousands grouped with a space),
/// scientific notation outside (the reports' rule, written again here).
pub(crate) fn num4(v: f64) -> String {
    if v == 0.0 {
        return "0".into();
    }
    let sci = format!("{v:.3e}");
    let exp: i32 = sci.split('e').nth(1).and_then(|e| e.parse().ok()).unwrap_or(0);
    if !(-3..6).contains(&exp) {
        return sci;
    }
    if exp >= 4 {
        let step = 10f64.powi(exp - 3);
        let digits = format!("{:.0}", (v / step).round() * step);
        let (sign, d) = digits.strip_prefix('-').map_or(("", digits.as_str()), |d| ("-", d));
        let mut out = String::new();
        for (k, c) in d.chars().enumerate() {
            if k > 0 && (d.len() - k) % 3 == 0 {
                out.push(' ');
            }
            out.push(c);
        }
        return format!("{sign}{out}");
    }
    let decimals = (3 - exp).max(0) as usize;
    format!("{v:.decimals$}")
}

/// A figure: what it is, its value, and how a text report writes it.
struct Figure {
    what: String,
    value: f64,
}

fn f(v: &Value) -> Option<f64> {
    v.as_f64()
}

/// The headline figures of one assessment's JSON.
fn figures(a: &Value) -> (Vec<Figure>, Vec<String>) {
    let mut out = Vec::new();
    let mut words = Vec::new();
    let mut add = |what: String, v: Option<f64>| {
        if let Some(value) = v.filter(|x| x.is_finite() && *x != 0.0) {
            out.push(Figure { what, value });
        }
    };
    for s in a["retina"]["sources"].as_array().into_iter().flatten() {
        let r = &s["retinal"];
        add("photopic td".into(), f(&r["trolands"]["photopic"]));
        add("scotopic td".into(), f(&r["trolands"]["scotopic"]));
        for c in r["catch"].as_array().into_iter().flatten().filter(|c| c["receptor"] == "rod") {
            add("rod R*/rod/s".into(), f(&c["rate"]));
        }
        for x in s["human_alpha_opic"].as_array().into_iter().flatten() {
            add(format!("{} EDI", x["name"]), f(&x["edi"]["illuminance"]));
        }
        for x in s["species_opic"].as_array().into_iter().flatten() {
            add(format!("{} equivalent daylight", x["channel"]), f(&x["equivalent_daylight"]));
        }
    }
    for l in a["limits"].as_array().into_iter().flatten() {
        for h in l["hazards"].as_array().into_iter().flatten() {
            add(format!("{} ratio", h["id"]), f(&h["ratio"]));
            add(format!("{} lower bound", h["id"]), f(&h["lower_bound_ratio"]));
        }
        let c = &l["classification"]["Ok"];
        add("E_thr".into(), f(&c["e_thr_lx"]));
        if let Some(g) = c["overall"].as_str() {
            words.push(g.to_uppercase().replace("EXEMPT", "Exempt"));
        }
    }
    words.push("Outcome".into());
    (out, words)
}

fn csv_has(csv: &str, v: f64) -> bool {
    csv.lines()
        .any(|l| l.split(',').any(|c| c.parse::<f64>().is_ok_and(|x| (x - v).abs() <= 1e-12 * v.abs())))
}

#[test]
fn every_headline_figure_is_in_the_terminal_csv_markdown_and_html() {
    for demo in ["vivarium", "dark-adaptation", "stimulus-review"] {
        let json: Value = serde_json::from_str(&run(demo, "json")).unwrap();
        let (figs, words) = figures(&json);
        assert!(figs.len() >= 5, "{demo}: too few figures found in the JSON");
        let terminal = run(demo, "table");
        let markdown = run(demo, "markdown");
        let csv = run(demo, "csv");
        let html = run(demo, "html");
        for fig in &figs {
            let text = num4(fig.value);
            assert!(html.contains(&text), "{demo}: {} {text} missing from HTML", fig.what);
            assert!(terminal.contains(&text), "{demo}: {} {text} missing from the terminal", fig.what);
            assert!(markdown.contains(&text), "{demo}: {} {text} missing from Markdown", fig.what);
            assert!(csv_has(&csv, fig.value), "{demo}: {} {} missing from the CSV", fig.what, fig.value);
        }
        for w in &words {
            for (name, out) in
                [("terminal", &terminal), ("markdown", &markdown), ("csv", &csv), ("html", &html)]
            {
                assert!(out.to_lowercase().contains(&w.to_lowercase()), "{demo}: {w} missing from {name}");
            }
        }
    }
}
