//! One light path: the same light gives the same figure in every section of an assessment and in
//! every format, to 1e-12 relative. Scenarios with several sources, flat and spectral filters, a
//! dark-phase leak, a nightly safelight step and a survey; phases given freely; recovery after
//! lights-off checked against a closed form written here from the rate-limited model's equation
//! (Mahroo & Lamb 2004; Lamb & Pugh 2004: dB/dt = k(1 − B) − v·B/(K_m + B)).

use assert_cmd::Command;
use retidose::assess::{Assessment, GuidanceBasis, assess, parse_scenario_file};
use retidose::base::quantity::SiValue;
use retidose::housing::pass::Flags;
use retidose::pigment::kinetics::find_pigment;
use retidose::scenario::Phase;
use serde_json::Value;
use uom::si::illuminance::lux;

fn rel(a: f64, b: f64) -> f64 {
    if a == b { 0.0 } else { (a - b).abs() / b.abs().max(a.abs()) }
}

fn dir() -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("retidose-consistency-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(text: &str, name: &str) -> Assessment {
    let d = dir();
    let s = parse_scenario_file(text, name, Some(&d)).unwrap_or_else(|e| panic!("{e}"));
    assess(&s).unwrap_or_else(|e| panic!("{e}"))
}

fn demo(name: &str) -> Assessment {
    let text = retidose::assess::demo(name).unwrap();
    run(text, name)
}

/// The rod rate of source `i` in the retina section (light-phase pupil).
fn retina_rod(a: &Assessment, i: usize) -> f64 {
    let r = a.retina.as_ref().unwrap();
    r.sources[i].retinal.as_ref().unwrap().catch.iter().find(|c| c.receptor == "rod").unwrap().rate.si()
}

#[test]
fn vivarium_same_light_same_number_in_every_section() {
    let a = demo("vivarium");
    let steps = &a.steps;
    let light = steps.iter().find(|s| s.phase == Some(Phase::Light)).unwrap();
    let dark = steps.iter().find(|s| s.phase == Some(Phase::Dark)).unwrap();
    // Retina table = pigment level of the light step (the cage wall applies to both).
    assert!(rel(light.level, retina_rod(&a, 0)) < 1e-12, "{} vs {}", light.level, retina_rod(&a, 0));
    let b = a.bleach.as_ref().unwrap();
    let row = b.phases.iter().find(|p| p.name == light.name).unwrap();
    assert!(rel(row.level, light.level) < 1e-12);
    // The leak in the dark phase: dark-adapted pupil and cage wall, as in the survey, whose
    // positions all get the same 0.3 lx leak.
    let room_result = a.room.as_ref().unwrap();
    let plan = &room_result.rows.0;
    // Rack A holds the subject's albino mice behind the same 0.8 cage wall.
    let rack_a: Vec<_> = (0..plan.racks[0].len).map(|i| plan.row(i)).collect();
    for p in &rack_a {
        assert!(rel(p.leak_rod_rate, dark.level) < 1e-12, "{} vs {}", p.leak_rod_rate, dark.level);
    }
    let dark_row = b.phases.iter().find(|p| p.name == dark.name).unwrap();
    assert!(rel(dark_row.level, dark.level) < 1e-12);
    // Per lux of room light, the survey and the panels source agree (both through the wall, the
    // same spectrum, the light-adapted pupil): rate/lux is the same.
    let room = light.room_illuminance.get::<lux>();
    assert!(rel(room, 250.0) < 1e-12);
    for p in &rack_a {
        assert!(rel(p.rod_rate / p.room_lux, light.level / room) < 1e-12);
    }
    // The Guidance table's light-phase rows come from the rack's positions, so they agree.
    let outside_upper = rack_a.iter().filter(|p| p.flags.has(Flags::ABOVE)).count();
    let row = a.guidance.iter().find(|g| g.flag.rule == "cage-level-upper").unwrap();
    assert_eq!(
        row.basis,
        GuidanceBasis::Survey { rack: "A".into(), outside: outside_upper, positions: rack_a.len() }
    );
    // Mice get no human rod-threshold estimate.
    assert!(b.thresholds.is_empty());
}

#[test]
fn vivarium_json_carries_the_library_figures() {
    let a = demo("vivarium");
    let out = Command::cargo_bin("retidose")
        .unwrap()
        .args(["assess", "--demo", "vivarium", "--format", "json"])
        .output()
        .unwrap();
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["schema"], "retidose.assessment/2");
    let catch = v["retina"]["sources"][0]["retinal"]["catch"].as_array().unwrap();
    let rod = catch.iter().find(|c| c["receptor"] == "rod").unwrap()["rate"].as_f64().unwrap();
    assert!(rel(rod, retina_rod(&a, 0)) < 1e-12);
    let phases = v["bleach"]["phases"].as_array().unwrap();
    for p in phases {
        let lib = a.bleach.as_ref().unwrap().phases.iter().find(|x| x.name == p["name"]).unwrap();
        assert!(rel(p["level"].as_f64().unwrap(), lib.level) < 1e-12);
    }
    for (s, lib) in v["steps"].as_array().unwrap().iter().zip(&a.steps) {
        assert!(rel(s["level"].as_f64().unwrap(), lib.level) < 1e-12);
        assert!(rel(s["rod_rate"].as_f64().unwrap(), lib.rod_rate.unwrap().si()) < 1e-12);
    }
    let rows = v["room"]["rows"].as_array().unwrap();
    let plan = &a.room.as_ref().unwrap().rows.0;
    assert_eq!(rows.len(), plan.len());
    for (i, p) in rows.iter().enumerate() {
        let lib = plan.row(i);
        assert!(rel(p["leak_rod_rate"].as_f64().unwrap(), lib.leak_rod_rate) < 1e-12);
        assert!(rel(p["room_lux"].as_f64().unwrap(), lib.room_lux) < 1e-12);
        assert!(rel(p["events"][0]["rod_rate"].as_f64().unwrap(), lib.events[0].rod_rate) < 1e-12);
    }
    let text = String::from_utf8(
        Command::cargo_bin("retidose")
            .unwrap()
            .args(["assess", "--demo", "vivarium"])
            .output()
            .unwrap()
            .stdout,
    )
    .unwrap();
    // The terminal shows the same rod rate for the panels in the retina table and the pigment table.
    let shown = format!("{:.0}", retina_rod(&a, 0));
    assert!(text.matches(&shown).count() >= 2, "{shown} should be in both tables:\n{text}");
}

/// A room with a ceiling light, a door leak and a red safelight used for a nightly cage check,
/// seen through a flat cage wall and a spectral tint, with free step names.
fn room(species: &str, names: [&str; 4], phases: bool) -> String {
    let d = dir();
    std::fs::write(d.join("tint.csv"), "wavelength_nm,transmittance\n380,0.5\n500,0.7\n600,0.9\n780,0.9\n")
        .unwrap();
    let ph = |p: &str| if phases { format!("phase = \"{p}\"") } else { String::new() };
    format!(
        r#"
[scenario]
name = "room"
title = "room"
[subject]
species = "{species}"
pigmentation = "Albino"
pupil = "light"
[[source]]
id = "ceiling"
spectrum = "neutral-white-led"
illuminance = "200 lx"
full_field = true
[[source]]
id = "leak"
spectrum = "warm-white-led"
illuminance = "0.2 lx"
full_field = true
[[source]]
id = "safelight"
spectrum = "red-safelight-led"
illuminance = "5 lx"
full_field = true
[[filter]]
name = "wall"
transmittance = "0.8"
[[filter]]
name = "tint"
file = "tint.csv"
[schedule]
[[schedule.step]]
name = "{}"
{}
duration = "12 h"
on = ["ceiling"]
[[schedule.step]]
name = "{}"
{}
duration = "6 h"
on = ["leak"]
[[schedule.step]]
name = "{}"
{}
duration = "10 min"
on = ["leak", "safelight"]
[[schedule.step]]
name = "{}"
{}
duration = "350 min"
on = ["leak"]
[guidance]
sets = ["nrc-guide-2011"]
"#,
        names[0],
        ph("light"),
        names[1],
        ph("dark"),
        names[2],
        ph("dark"),
        names[3],
        ph("dark")
    )
}

#[test]
fn every_dark_step_is_compared_and_sources_add_only_when_lit_together() {
    let a = run(&room("Mouse", ["Lights", "Night 1", "cage check (red)", "Night 2"], true), "room.toml");
    // Species in any case resolves to the enum.
    assert_eq!(a.species, retidose::retina::eye::Species::Mouse);
    // Every dark step is compared with the dark-phase rule, not only the first.
    let dark_rows: Vec<&str> = a
        .guidance
        .iter()
        .filter_map(|g| match &g.basis {
            GuidanceBasis::Step(s) if g.flag.rule == "dark-phase" => Some(s.as_str()),
            _ => None,
        })
        .collect();
    assert_eq!(dark_rows, ["Night 1", "cage check (red)", "Night 2"]);
    // The safelight step's room light is the sum of the leak and the safelight, before the
    // filters (the Guide's quantity), and its rod rate the sum of both through the dark pupil.
    let check = &a.steps[2];
    assert!(rel(check.room_illuminance.get::<lux>(), 5.2) < 1e-12, "{:?}", check.room_illuminance);
    let night = &a.steps[1];
    let safelight_only = check.level - night.level;
    assert!(safelight_only > 0.0);
    let row = a.guidance.iter().find(|g| g.basis == GuidanceBasis::Step("cage check (red)".into())).unwrap();
    assert!(rel(row.flag.value_lx, 5.2) < 1e-12);
    // The light step's level equals the retina table's ceiling rod rate (same pupil, both filters).
    assert!(rel(a.steps[0].level, retina_rod(&a, 0)) < 1e-12);
    // Nothing is summed over sources never lit together: the light step has only the ceiling.
    assert_eq!(a.steps[0].on, ["ceiling"]);
    // Dark steps use the dark-adapted pupil (rodent default), stated in the report.
    let pupils = a.pupils.as_ref().unwrap();
    assert!(pupils.dark.as_ref().unwrap().diameter > pupils.light.diameter);
    assert!(night.pupil.diameter > a.steps[0].pupil.diameter);
}

#[test]
fn phase_names_are_case_insensitive_and_a_missing_phase_is_reported() {
    let by_name = run(&room("mouse", ["light", "dark", "Dark", "DARK"], false), "names.toml");
    let dark_steps = by_name.steps.iter().filter(|s| s.phase == Some(Phase::Dark)).count();
    assert_eq!(dark_steps, 3, "dark, Dark and DARK are all the dark phase");
    let by_phase = run(&room("mouse", ["a", "b", "c", "d"], true), "phases.toml");
    for (x, y) in by_name.steps.iter().zip(&by_phase.steps) {
        assert!(rel(x.level, y.level) < 1e-12);
    }
    // Free names without a phase: nothing is compared, and the report says so.
    let none = run(&room("mouse", ["a", "b", "c", "d"], false), "none.toml");
    assert!(none.guidance.is_empty());
    assert!(
        none.not_assessed.iter().any(|n| n.contains("no schedule step has phase = \"dark\"")),
        "{:?}",
        none.not_assessed
    );
    assert!(none.not_assessed.iter().any(|n| n.contains("without a phase")));
}

#[test]
fn a_filter_applies_to_the_guidance_value_of_people() {
    let text = r#"
[scenario]
name = "evening"
title = "evening"
[subject]
species = "Human"
pupil = "3 mm"
[[source]]
id = "lamp"
spectrum = "cie:D65"
illuminance = "100 lx"
full_field = true
[[filter]]
name = "dark glasses"
transmittance = "0.1"
[schedule]
receptor = "human-rod"
[[schedule.step]]
name = "reading"
phase = "evening"
duration = "2 h"
on = ["lamp"]
[guidance]
sets = ["brown-2022"]
"#;
    let a = run(text, "evening.toml");
    assert_eq!(a.species, retidose::retina::eye::Species::Human);
    let step = &a.steps[0];
    let edi = step.melanopic_edi.unwrap().get::<lux>();
    // D65: melanopic EDI = illuminance (CIE S 026: D65 DER = 1), after the 0.1 filter: 10 lx.
    assert!(rel(edi, 10.0) < 1e-9, "{edi}");
    let r = a.retina.as_ref().unwrap();
    let total = r.human_alpha_opic.iter().find(|x| x.name == "melanopic").unwrap().edi.unwrap().si_value();
    assert!(rel(edi, total) < 1e-12);
    let row = a.guidance.iter().find(|g| g.flag.rule == "evening-maximum").unwrap();
    assert!(rel(row.flag.value_lx, edi) < 1e-12);
}

/// Time for the rate-limited model to go from `b0` down to `b1` under a constant bleaching rate
/// `k` (s⁻¹), by partial fractions of dt = (K + B) dB / −[k B² + (v − k + kK) B − kK], whose roots
/// are r₁ < 0 < r₂ (r₂ the steady state). In darkness (k = 0): t = (K ln(b0/b1) + b0 − b1)/v.
fn closed_form_time(v: f64, km: f64, k: f64, b0: f64, b1: f64) -> f64 {
    if k == 0.0 {
        return (km * (b0 / b1).ln() + b0 - b1) / v;
    }
    let (a, bq, c) = (k, v - k + k * km, -k * km);
    let disc = (bq * bq - 4.0 * a * c).sqrt();
    let (r1, r2) = ((-bq - disc) / (2.0 * a), (-bq + disc) / (2.0 * a));
    let ca = (km + r1) / (r1 - r2);
    let cc = (km + r2) / (r2 - r1);
    (ca * ((b0 - r1) / (b1 - r1)).ln() + cc * ((b0 - r2) / (b1 - r2)).ln()) / k
}

/// Steady state of the rate-limited model: the positive root of k(1 − B)(K + B) = v B.
fn closed_form_steady(v: f64, km: f64, k: f64) -> f64 {
    let (a, bq, c) = (-k, k - k * km - v, k * km);
    (-bq - (bq * bq - 4.0 * a * c).sqrt()) / (2.0 * a)
}

#[test]
fn vivarium_recovery_after_lights_off_matches_the_closed_form() {
    let a = demo("vivarium");
    let p = find_pigment("mouse-rod").unwrap();
    let c = p.constants();
    let k_light = p.rate_of_level(a.steps[0].level);
    let k_dark = p.rate_of_level(a.steps[1].level);
    let b = a.bleach.as_ref().unwrap();
    assert_eq!(b.lights_off, 7, "one lights-off per day of the week");
    let b_off = closed_form_steady(c.v_per_s, c.k_m, k_light);
    for r in &b.recoveries {
        assert!(rel(r.bleached_at_start, b_off) < 1e-9, "{} vs {b_off}", r.bleached_at_start);
        // Under 10 % already at lights-off: 90 % regenerated at once.
        assert_eq!(r.to_90_s, Some(0.0));
        let expect = closed_form_time(c.v_per_s, c.k_m, k_dark, b_off, 0.01);
        let got = r.to_99_s.unwrap();
        assert!(rel(got, expect) < 1e-7, "{got} vs {expect}");
        assert!(got > closed_form_time(c.v_per_s, c.k_m, 0.0, b_off, 0.01), "the leak slows recovery");
    }
}
