//! `retidose assess`: the demo, the examples, the report formats, exit codes, consistency between
//! a survey and a single assessment, and a bad-input suite. Expected values carry their
//! derivation beside them.

use std::path::PathBuf;

use assert_cmd::Command;
use predicates::prelude::*;
use retidose::assess::{assess, parse_scenario_file};
use serde_json::Value;

fn retidose() -> Command {
    Command::cargo_bin("retidose").expect("binary is built")
}

fn temp_file(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-assess-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    crate::files::write(&p, text);
    p
}

fn run_json(args: &[&str]) -> (Value, i32) {
    let out = retidose().args(args).args(["--format", "json"]).output().unwrap();
    let code = out.status.code().unwrap();
    assert!(code == 0 || code == 1, "{}", String::from_utf8_lossy(&out.stderr));
    (serde_json::from_slice(&out.stdout).unwrap(), code)
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

#[test]
fn the_demo_runs_all_three_each_opening_with_its_verdict_then_the_cautions_that_apply() {
    let out = retidose().args(["assess", "--demo"]).output().unwrap();
    assert_eq!(out.status.code(), Some(0), "a demo run succeeds even though it raises flags");
    let text = String::from_utf8(out.stdout).unwrap();
    for title in ["Holding room B-14", "Rod bleach and dark adaptation", "460 nm stimulus LED"] {
        assert!(text.contains(title), "{title}");
    }
    let first_lines: Vec<&str> = text.lines().take(6).collect();
    assert!(first_lines.iter().any(|l| l.trim_start().starts_with("Outcome: ")), "{first_lines:?}");
    // Each demo's section: the human-limits caution only where limits are checked, the animal
    // caution only where animals are the subject, the general deferral always.
    let sections: Vec<&str> = text.split("retidose assess — ").skip(1).collect();
    assert_eq!(sections.len(), 3);
    let has = |s: &str, c: &str| s.split_whitespace().collect::<Vec<_>>().join(" ").contains(c);
    for (s, limits, animals) in
        [(sections[0], false, true), (sections[1], true, false), (sections[2], true, false)]
    {
        assert_eq!(has(s, "! These limits apply to humans"), limits, "{s}");
        assert_eq!(has(s, "! Animal housing guidance is not a welfare assessment"), animals, "{s}");
        assert!(has(s, "! retidose informs"));
        assert!(s.find("Outcome: ").unwrap() < s.find("! retidose informs").unwrap(), "verdict first");
    }
    assert!(text.contains("Not assessed"));
    assert!(text.contains("Sources of limits and guidance"));
}

#[test]
fn vivarium_demo_values() {
    let (v, _) = run_json(&["assess", "--demo", "vivarium"]);
    // Corneal illuminance of the panels = the 250 lx reading × the 0.8 cage wall = 200 lx.
    let panels = &v["retina"]["sources"][0];
    assert!(rel(panels["illuminance"]["raw"].as_f64().unwrap(), 200.0) < 1e-9);
    // Survey: top shelf, column 3 at (1.3 m, 0.5 m, 0.25 + 4·0.38 m); two 900 cd Lambertian
    // panels at (0.7, 1.2, 2.6) and (1.6, 1.2, 2.6): E = Σ I h²/d⁴ (no shelves above).
    let p = v["room"]["rows"]
        .as_array()
        .unwrap()
        .iter()
        .find(|p| p["rack"] == 0 && p["shelf"] == 5 && p["column"] == 3)
        .unwrap();
    let z = 0.25 + 4.0 * 0.38;
    let e: f64 = [(0.7f64, 1.2f64), (1.6, 1.2)]
        .iter()
        .map(|(x, y)| {
            let (dx, dy, h) = (x - 1.3, y - 0.5, 2.6 - z);
            let d2 = dx * dx + dy * dy + h * h;
            900.0 * h * h / (d2 * d2)
        })
        .sum();
    assert!(rel(p["room_lux"].as_f64().unwrap(), e) < 1e-12, "{} vs {e}", p["room_lux"]);
    assert!(rel(p["cage_lux"].as_f64().unwrap(), 0.8 * e) < 1e-12);
    // One shelf down is shaded by 0.55 (the scenario's shelf_shading).
    let below = v["room"]["rows"]
        .as_array()
        .unwrap()
        .iter()
        .find(|p| p["rack"] == 0 && p["shelf"] == 4 && p["column"] == 3)
        .unwrap();
    assert!(below["room_lux"].as_f64().unwrap() < 0.55 * e);
    // 650 lx at the top is above the Guide's 325 lx for albino animals: flagged.
    assert!(p["flags"].as_array().unwrap().iter().any(|f| f == "above"));
    // The 0.3 lx door leak raises the dark-phase flag; Dauchy's findings are evidence only.
    assert!(
        v["guidance"]
            .as_array()
            .unwrap()
            .iter()
            .any(|g| g["flag"]["rule"] == "dark-phase" && g["flag"]["raised"] == true)
    );
    assert_eq!(v["evidence"].as_array().unwrap().len(), 2);
    assert_eq!(v["flag_raised"], true);
    // 12 h of light is many recovery time constants: the light phase ends at its steady state.
    let light = v["bleach"]["phases"].as_array().unwrap().iter().find(|p| p["name"] == "lights on").unwrap();
    assert!((light["end"].as_f64().unwrap() - light["steady_state"].as_f64().unwrap()).abs() < 1e-9);
}

#[test]
fn dark_adaptation_demo_values() {
    let (v, _) = run_json(&["assess", "--demo", "dark-adaptation"]);
    // 5000 cd/m² of D65 through a 7 mm pupil: photopic td = 5000 × π 3.5² = 192 423 td.
    let td = v["retina"]["sources"][0]["retinal"]["trolands"]["photopic"].as_f64().unwrap();
    assert!(rel(td, 5000.0 * std::f64::consts::PI * 12.25) < 1e-9);
    // 60 s at 4.7e5 scot td with the rate-limited model bleaches about 92 %; full recovery
    // (99 %) takes a little over 20 min (Cameron et al. 2006 parameters).
    let b = &v["bleach"];
    assert!(b["summary"]["peak"].as_f64().unwrap() > 0.85);
    let to99 = b["recoveries"][0]["to_99_s"].as_f64().unwrap() / 60.0;
    assert!(to99 > 18.0 && to99 < 25.0, "{to99}");
}

#[test]
fn stimulus_review_demo_values() {
    let (v, _) = run_json(&["assess", "--demo", "stimulus-review"]);
    let limits = v["limits"].as_array().unwrap();
    assert_eq!(limits.len(), 2, "IEC 62471 and the Directive");
    // 2 cd at 200 mm is 50 lx (inverse-square law).
    assert!(rel(v["retina"]["sources"][0]["illuminance"]["raw"].as_f64().unwrap(), 50.0) < 1e-9);
    let iec = limits.iter().find(|l| l["set_id"] == "iec62471-2006").unwrap();
    assert!(iec["classification"]["classified"]["overall"].is_string());
    assert!(iec["hazards"].as_array().unwrap().iter().any(|h| h["verdict"].get("not-assessed").is_some()));
    assert_eq!(v["limit_exceeded"], true, "blue light over 8 h exceeds the IEC limit (ratio ≈ 1.06)");
}

#[test]
fn every_example_prints_a_file_that_runs() {
    for name in ["vivarium", "dark-adaptation", "stimulus-review"] {
        let out = retidose().args(["assess", "--example", name]).output().unwrap();
        assert!(out.status.success());
        let p = temp_file(&format!("{name}.toml"), &String::from_utf8(out.stdout).unwrap());
        let code = retidose().args(["assess", p.to_str().unwrap()]).output().unwrap().status.code();
        assert!(matches!(code, Some(0 | 1)), "{name}: {code:?}");
    }
}

#[test]
fn exit_codes_follow_the_documentation() {
    // Flags raised (dark-phase leak) → 1 for a scenario file.
    let viv = retidose().args(["assess", "--example", "vivarium"]).output().unwrap().stdout;
    let p = temp_file("viv.toml", &String::from_utf8(viv).unwrap());
    retidose().args(["assess", p.to_str().unwrap()]).assert().code(1);
    // A dim red safelight in a human room, well within every limit assessed → 0.
    let ok = temp_file(
        "ok.toml",
        r#"
[scenario]
name = "ok"
title = "dim safelight"
[subject]
species = "human"
pupil = "5 mm"
[[source]]
id = "safelight"
spectrum = "red-safelight-led"
irradiance = "0.001 W/m2"
full_field = true
[limits]
sets = ["icnirp-2013-visible-ir"]
duration = "1 h"
"#,
    );
    retidose().args(["assess", ok.to_str().unwrap()]).assert().code(0);
    // Bad input → 2.
    let bad = temp_file("bad.toml", "[scenario]\nname = 1\n");
    retidose().args(["assess", bad.to_str().unwrap()]).assert().code(2);
}

#[test]
fn every_format_renders_and_the_html_holds_each_plot() {
    for (fmt, needle) in [
        ("table", "Outcome"),
        ("json", "retidose.assessment/2"),
        ("csv", "scenario,section,item,quantity,value,unit,status"),
        ("positions", "rack,shelf,column"),
        ("markdown", "# Holding room"),
    ] {
        retidose()
            .args(["assess", "--demo", "vivarium", "--format", fmt])
            .assert()
            .success()
            .stdout(predicate::str::contains(needle));
    }
    let out = retidose().args(["assess", "--demo", "--format", "html"]).output().unwrap();
    let html = String::from_utf8(out.stdout).unwrap();
    assert!(html.starts_with("<!DOCTYPE html>") && html.trim_end().ends_with("</html>"));
    for label in ["spectrum and weightings", "bleach time course", "hazard ratios", "rack heat map"] {
        assert!(html.contains(&format!("aria-label=\"{label}")), "{label}");
    }
    assert_eq!(html.matches("<svg").count(), html.matches("</svg>").count());
    // The long table holds every scenario of a run, hazards and risk groups included; the
    // per-position table is refused, with what to use instead, when there is no room.
    let out = retidose().args(["assess", "--demo", "--format", "csv"]).output().unwrap();
    let csv = String::from_utf8(out.stdout).unwrap();
    for needle in
        ["\nvivarium,room,", "\ndark-adaptation,bleach,", "\nstimulus-review,limits,", ",risk group,RG1,"]
    {
        assert!(csv.contains(needle), "{needle}");
    }
    retidose()
        .args(["assess", "--demo", "stimulus-review", "--format", "positions"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("use --format csv"));
}

#[test]
fn html_escapes_text_from_input_files() {
    let ex = String::from_utf8(
        retidose().args(["assess", "--example", "stimulus-review"]).output().unwrap().stdout,
    )
    .unwrap();
    let evil = ex.replace(
        "title = \"460 nm stimulus LED viewed at 200 mm (invented demo)\"",
        "title = \"<script>alert(1)</script> & co\"",
    );
    let p = temp_file("evil.toml", &evil);
    let out = retidose().args(["assess", p.to_str().unwrap(), "--format", "html"]).output().unwrap();
    let html = String::from_utf8(out.stdout).unwrap();
    assert!(!html.contains("<script>"));
    assert!(html.contains("&lt;script&gt;alert(1)&lt;/script&gt; &amp; co"));
}

#[test]
fn output_files_are_never_overwritten_by_accident() {
    let target = temp_file("report.html", "old");
    retidose()
        .args(["assess", "--demo", "vivarium", "--format", "html", "-o", target.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("give --force"));
    assert_eq!(std::fs::read_to_string(&target).unwrap(), "old");
    retidose()
        .args(["assess", "--demo", "vivarium", "--format", "html", "-o", target.to_str().unwrap(), "--force"])
        .assert()
        .success();
    assert!(std::fs::read_to_string(&target).unwrap().starts_with("<!DOCTYPE html>"));
    let ex = retidose().args(["assess", "--example", "vivarium"]).output().unwrap().stdout;
    let input = temp_file("input.toml", &String::from_utf8(ex).unwrap());
    let before = std::fs::read_to_string(&input).unwrap();
    retidose()
        .args(["assess", input.to_str().unwrap(), "-o", input.to_str().unwrap(), "--force"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("never overwritten"));
    assert_eq!(std::fs::read_to_string(&input).unwrap(), before);
}

fn one_cage(lux: &str, readings: &str) -> String {
    format!(
        r#"
[scenario]
name = "one-cage"
title = "one cage"
[subject]
species = "mouse"
pigmentation = "albino"
pupil = "light"
[[source]]
id = "room"
spectrum = "neutral-white-led"
illuminance = "{lux}"
full_field = true
[[source]]
id = "none"
spectrum = "warm-white-led"
illuminance = "1e-9 lx"
full_field = true
[schedule]
receptor = "mouse-rod"
[[schedule.step]]
name = "light"
duration = "12 h"
on = ["room"]
[[schedule.step]]
name = "dark"
duration = "12 h"
on = []
[guidance]
sets = ["nrc-guide-2011"]
[room]
light_spectrum = "neutral-white-led"
readings = "{readings}"
[[room.rack]]
id = "only"
shelves = 1
columns = 1
cage_transmittance = "1"
"#
    )
}

#[test]
fn a_survey_of_one_position_equals_assessing_that_position() {
    let dir = temp_file("one.csv", "shelf,column,lux\n1,1,200\n").parent().unwrap().to_path_buf();
    let s = parse_scenario_file(&one_cage("200 lx", "one.csv"), "one.toml", Some(&dir)).unwrap();
    let a = assess(&s).unwrap();
    let room = a.room.as_ref().unwrap();
    let pos = room.rows.0.row(0);
    let rod = a.retina.as_ref().unwrap().sources[0].retinal.as_ref().unwrap().catch[0].rate;
    use retidose::base::quantity::SiValue;
    assert!(rel(pos.rod_rate, rod.si()) < 1e-12, "{} vs {}", pos.rod_rate, rod.si());
    let light = a.bleach.as_ref().unwrap().phases.iter().find(|p| p.name == "light").unwrap();
    assert!((pos.light_bleach - light.steady_state).abs() < 1e-12);
}

#[test]
fn housing_flags_change_state_exactly_at_the_guidance_thresholds() {
    for (lux, flagged) in [("325", false), ("325.0001", true), ("130", false), ("129.9999", true)] {
        let dir =
            temp_file("flags.csv", &format!("shelf,column,lux\n1,1,{lux}\n")).parent().unwrap().to_path_buf();
        let s = parse_scenario_file(&one_cage("200 lx", "flags.csv"), "one.toml", Some(&dir)).unwrap();
        let a = assess(&s).unwrap();
        let p = a.room.as_ref().unwrap().rows.0.row(0);
        assert_eq!(p.flags.any(), flagged, "{lux} lx: {:?}", p.flags);
    }
}

#[test]
fn bad_scenarios_exit_2_naming_the_field() {
    let good = String::from_utf8(
        retidose().args(["assess", "--example", "stimulus-review"]).output().unwrap().stdout,
    )
    .unwrap();
    let cases: Vec<(String, &str)> = vec![
        ("[scenario\nname = \"x\"\n".to_string(), "line 1"),
        (good.replace("luminous_intensity = \"2 cd\"", "luminous_intensity = \"2\""), "has no unit"),
        (good.replace("distance = \"200 mm\"", "distance = \"200 kg\""), "unknown unit 'kg'"),
        (good.replace("[subject]", "[subject]\npupl = \"3 mm\""), "did you mean `pupil`?"),
        (
            good.replace("spectrum = \"stimulus-460-led\"", "spectrum = \"missing-file.csv\""),
            "missing-file.csv does not exist",
        ),
        (good.replace("duration = \"8 h\"", "duration = \"0 h\""), "must be above 0 s"),
        (
            good.replace("sets = [\"iec62471-2006\", \"directive-2006-25-ec\"]", "sets = [\"iec-9999\"]"),
            "unknown limit set 'iec-9999'",
        ),
    ];
    for (i, (text, needle)) in cases.iter().enumerate() {
        let p = temp_file(&format!("bad{i}.toml"), text);
        retidose()
            .args(["assess", p.to_str().unwrap()])
            .assert()
            .code(2)
            .stderr(predicate::str::contains(*needle))
            .stderr(predicate::str::contains(format!("bad{i}.toml")));
    }
    // An empty spectrum file and a schedule that does not add up.
    let dir = temp_file("empty.csv", "wavelength_nm,value\n").parent().unwrap().to_path_buf();
    let empty = good.replace(
        "spectrum = \"stimulus-460-led\"",
        &format!("spectrum = \"{}\"", dir.join("empty.csv").display()),
    );
    let p = temp_file("empty-spectrum.toml", &empty);
    retidose()
        .args(["assess", p.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("found 0 data rows"));
    let viv =
        String::from_utf8(retidose().args(["assess", "--example", "vivarium"]).output().unwrap().stdout)
            .unwrap();
    let p = temp_file("bad-schedule.toml", &viv.replace("on = [\"door-leak\"]", "on = [\"window\"]"));
    retidose()
        .args(["assess", p.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("no source with id 'window'"));
    let p = temp_file("missing.toml", "x");
    std::fs::remove_file(&p).unwrap();
    retidose()
        .args(["assess", p.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("cannot read the scenario"));
}
