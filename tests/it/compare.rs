//! `retidose compare`: a variant identical to the base gives identical columns, ranking by
//! margin, the table's figures, rooms side by side, and bad input naming the file.

use std::path::PathBuf;

use assert_cmd::Command;
use retidose::assess::{assess, demo, parse_scenario_file};
use retidose::compare::compare;
use serde_json::Value;

fn retidose() -> Command {
    Command::cargo_bin("retidose").expect("binary is built")
}

/// A folder of this test's own (the tests of the binary run in parallel).
fn folder(test: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-compare-{}-{test}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn write(dir: &std::path::Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    crate::files::write(&p, text);
    p.display().to_string()
}

fn stimulus() -> &'static str {
    demo("stimulus-review").unwrap()
}

/// The stimulus-review demo with its LED at half the luminous intensity.
fn half_stimulus() -> String {
    let full = stimulus();
    assert!(full.contains("luminous_intensity = \"2 cd\""), "the demo's LED is 2 cd");
    full.replace("luminous_intensity = \"2 cd\"", "luminous_intensity = \"1 cd\"")
}

fn json(args: &[&str]) -> (Value, i32) {
    let out = retidose().arg("compare").args(args).args(["--format", "json"]).output().unwrap();
    let code = out.status.code().unwrap();
    assert!(code == 0 || code == 1, "{}", String::from_utf8_lossy(&out.stderr));
    (serde_json::from_slice(&out.stdout).unwrap(), code)
}

#[test]
fn a_variant_identical_to_the_base_gives_identical_columns() {
    let dir = folder("identical");
    let base = write(&dir, "base.toml", stimulus());
    let same = write(&dir, "same.toml", stimulus());
    let (doc, code) = json(&[&base, &same]);
    assert_eq!(code, 1, "the demo LED exceeds the IEC 62471 blue-light limit over 8 h");
    let c = &doc["comparison"];
    let mut cols: Vec<Value> = c["columns"].as_array().unwrap().clone();
    assert_eq!(cols.len(), 2);
    assert_eq!(cols[0]["label"], Value::String(base.clone()), "a tie keeps the input order");
    for col in &mut cols {
        let o = col.as_object_mut().unwrap();
        o.remove("label");
        o.remove("input");
    }
    assert_eq!(cols[0], cols[1]);
    for section in ["hazards", "groups"] {
        let rows = c[section].as_array().unwrap();
        assert!(!rows.is_empty(), "{section}");
        for r in rows {
            let cells = r["cells"].as_array().unwrap();
            assert!(!cells[0].is_null(), "{section} {}", r["key"]);
            assert_eq!(cells[0], cells[1], "{section} {}", r["key"]);
        }
    }
}

#[test]
fn columns_are_ranked_by_margin_and_half_the_light_halves_every_ratio() {
    let full = parse_scenario_file(stimulus(), "full", None).unwrap();
    let half_text = half_stimulus();
    let half = parse_scenario_file(&half_text, "half", None).unwrap();
    let (a_full, a_half) = (assess(&full).unwrap(), assess(&half).unwrap());
    let c = compare(&[("full", &a_full), ("half", &a_half)]);
    let labels: Vec<&str> = c.columns.iter().map(|x| x.label.as_str()).collect();
    assert_eq!(labels, ["half", "full"], "the weaker lamp has the larger margin");
    // Every hazard here is a radiance or irradiance dose or rate at a fixed 8 h against a limit
    // that does not depend on the exposure: halving the intensity halves the radiance and the
    // irradiance at the eye, so each ratio halves and the margin (1 / worst ratio) doubles.
    let mut compared = 0;
    for row in &c.hazards {
        let ratio = |i: usize| row.cells[i].as_ref().and_then(|x| x.ratio);
        if let (Some(rh), Some(rf)) = (ratio(0), ratio(1)) {
            assert!((rh - rf / 2.0).abs() <= 1e-9 * rf, "{}: {rh} vs {rf}/2", row.key);
            compared += 1;
        }
    }
    assert!(compared >= 8, "{compared} hazards compared");
    let (mh, mf) = (c.columns[0].margin.unwrap(), c.columns[1].margin.unwrap());
    assert!((mh - 2.0 * mf).abs() <= 1e-9 * mh, "{mh} vs 2 × {mf}");
    // The full-strength LED exceeds the blue-light limit (ratio 1.060, margin 0.9435); at half
    // strength it is within it (0.5300, margin 1.887).
    assert!(mf < 1.0 && mh > 1.0);
    assert!(c.columns[1].limit_exceeded && !c.columns[0].limit_exceeded);
    let w = c.columns[1].worst.as_ref().unwrap();
    assert!(w.hazard.starts_with("retinal blue light (photochemical)"), "{}", w.hazard);
}

#[test]
fn the_table_lists_each_scenarios_risk_group_and_worst_hazard() {
    let dir = folder("table");
    let full = write(&dir, "full.toml", stimulus());
    let half = write(&dir, "half.toml", &half_stimulus());
    let out = retidose().args(["compare", &full, &half]).env("COLUMNS", "100").output().unwrap();
    assert_eq!(out.status.code(), Some(1), "the full-strength LED exceeds a limit");
    let text = String::from_utf8(out.stdout).unwrap();
    for l in text.lines() {
        assert!(l.chars().count() <= 100, "{l}");
    }
    let row = |name: &str| -> Vec<String> {
        let l = text
            .lines()
            .find(|l| l.starts_with(&format!("│ {name}")))
            .unwrap_or_else(|| panic!("{name}: {text}"));
        l.split('│').map(|c| c.trim().to_string()).filter(|c| !c.is_empty()).collect()
    };
    assert_eq!(row("risk group  "), ["risk group", "Exempt", "RG1"]);
    // The hazard's name is wrapped to the column's width: its first line.
    let binding = row("binding hazard");
    assert_eq!(binding.len(), 3, "{binding:?}");
    assert!(binding[1..].iter().all(|c| c.starts_with("retinal blue")), "{binding:?}");
    assert_eq!(row("worst ratio"), ["worst ratio to limit", "0.5300", "1.060"]);
    assert_eq!(row("margin"), ["margin (factor to the limit)", "1.887", "0.9435"]);
    assert_eq!(row("t_max"), ["t_max (binding hazard)", "never reached", "2 h 47 min"]);
    assert!(text.contains("E_thr: stimulus (iec62471-2006) (lx)"), "{text}");

    let csv = retidose().args(["compare", &full, &half, "--format", "csv"]).output().unwrap();
    let csv = String::from_utf8(csv.stdout).unwrap();
    assert!(csv.starts_with("scenario,figure,value,unit\n"));
    assert!(csv.contains(&format!("{half},outcome,\"within limits, no flag\",\n")), "{csv}");
    assert!(csv.contains(&format!("{full},risk group,RG1,\n")), "{csv}");
    assert!(csv.contains(&format!("{half},risk group,Exempt,\n")), "{csv}");
}

#[test]
fn the_vivarium_compared_with_itself_shows_the_rooms_figures() {
    let dir = folder("vivarium");
    write(&dir, "room.toml", demo("vivarium").unwrap());
    let variants = write(
        &dir,
        "variants.toml",
        "[[variant]]\nname = \"as built\"\nfile = \"room.toml\"\n\n[[variant]]\nname = \"copy\"\nfile = \"room.toml\"\n",
    );
    let (doc, code) = json(&["--variants", &variants]);
    assert_eq!(code, 1, "the vivarium raises guidance flags");
    let c = &doc["comparison"];
    let labels: Vec<&str> =
        c["columns"].as_array().unwrap().iter().map(|x| x["label"].as_str().unwrap()).collect();
    assert_eq!(labels, ["as built", "copy"]);
    let racks = c["racks"].as_array().unwrap();
    assert!(!racks.is_empty());
    for r in racks {
        let cells = r["cells"].as_array().unwrap();
        assert!(cells[0]["positions"].as_u64().unwrap() > 0);
        assert_eq!(cells[0], cells[1], "{}", r["key"]);
    }
    let text = retidose().args(["compare", "--variants", &variants]).output().unwrap().stdout;
    let text = String::from_utf8(text).unwrap();
    for figure in ["rack A: positions", "rack A: in range", "rack A: lever factor", "peak bleached (%)"] {
        assert!(text.contains(figure), "{figure}: {text}");
    }
}

#[test]
fn bad_input_names_the_file() {
    let dir = folder("bad");
    let base = write(&dir, "base.toml", stimulus());
    let missing = dir.join("nowhere.toml").display().to_string();
    let out = retidose().args(["compare", &base, &missing]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("nowhere.toml"), "{err}");

    let variants = write(
        &dir,
        "variants.toml",
        "[[variant]]\nname = \"base\"\nfile = \"base.toml\"\n\n[[variant]]\nname = \"gone\"\nfile = \"gone.toml\"\n",
    );
    let out = retidose().args(["compare", "--variants", &variants]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("gone.toml"), "{err}");

    let unknown =
        write(&dir, "unknown.toml", "[[variant]]\nname = \"a\"\nfile = \"base.toml\"\npath = \"x\"\n");
    let out = retidose().args(["compare", "--variants", &unknown]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("unknown.toml") && err.contains("path"), "{err}");

    let out = retidose().args(["compare", &base]).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "one scenario is nothing to compare");
}
