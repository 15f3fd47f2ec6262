//! Safety verdicts on ordinary measurements: a spectrum measured 380–780 nm, a filter tabulated
//! over part of the band, a declared emission range, coarse sampling, the angle of incidence,
//! a built-in blackbody, and lists that would check nothing. Expected behaviour follows the
//! project's safety rules (a lower bound ≥ 1 is an exceedance; a verdict starts at "not
//! assessed"); the incidence check is Lambert's cosine law and the invariance of radiance.

use std::path::PathBuf;

use assert_cmd::Command;
use predicates::prelude::*;
use retidose::assess::{Assessment, assess, parse_scenario_file};
use retidose::limits::Verdict;
use retidose::limits::report::{LimitsRequest, assess_limits};
use retidose::scenario::retina::{SourceSpec, place};

fn dir() -> PathBuf {
    let d = std::env::temp_dir().join(format!("retidose-verdicts-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// A 450 nm LED (Ohno 2005 shape, half width 20 nm) tabulated 380–780 nm every `step` nm, as a
/// spectroradiometer gives it.
fn led_file(name: &str, step: usize) -> PathBuf {
    let mut text = String::from("# kind: irradiance\n");
    for nm in (380..=780).step_by(step) {
        let g = (-((nm as f64 - 450.0) / 20.0).powi(2)).exp();
        text.push_str(&format!("{nm},{:e}\n", (g + 2.0 * g.powi(5)) / 3.0));
    }
    // Tests run in parallel and share the file.
    let p = dir().join(name);
    crate::files::write(&p, text);
    p
}

fn scenario(spectrum: &str, extra_source: &str, extra: &str) -> String {
    format!(
        r#"
[scenario]
name = "led"
title = "a measured LED"
[subject]
species = "human"
pupil = "3 mm"
[[source]]
id = "led"
spectrum = "{spectrum}"
irradiance = "2 W/m2"
subtense = "0.05 rad"
{extra_source}
{extra}
[limits]
sets = ["iec62471-2006"]
duration = "1 h"
"#
    )
}

fn run(text: &str) -> Assessment {
    let s = parse_scenario_file(text, "led.toml", Some(&dir())).unwrap_or_else(|e| panic!("{e}"));
    assess(&s).unwrap_or_else(|e| panic!("{e}"))
}

fn blue(a: &Assessment) -> &retidose::limits::HazardResult {
    a.limits[0].hazards.iter().find(|h| h.id == "blue-light").unwrap()
}

#[test]
fn a_380_to_780_nm_measurement_exceeds_on_its_measured_band_alone() {
    led_file("led450.csv", 1);
    let a = run(&scenario("led450.csv", "", ""));
    let h = blue(&a);
    assert_eq!(h.verdict, Verdict::Exceeds);
    assert!(h.partial && h.lower_bound_ratio.unwrap() >= 1.0, "{h:?}");
    assert!(a.limit_exceeded);
    // The CLI exits 1 and says why.
    let p = dir().join("led.toml");
    std::fs::write(&p, scenario("led450.csv", "", "")).unwrap();
    Command::cargo_bin("retidose")
        .unwrap()
        .args(["assess", p.to_str().unwrap()])
        .env("COLUMNS", "250")
        .assert()
        .code(1)
        .stdout(predicate::str::contains("EXCEEDS on the measured band alone"));
}

#[test]
fn a_declared_emission_range_gives_full_verdicts_and_is_recorded() {
    led_file("led450.csv", 1);
    let a = run(&scenario("led450.csv", "emission_range = \"measured\"", ""));
    let h = blue(&a);
    assert_eq!(h.verdict, Verdict::Exceeds);
    assert!(!h.partial, "{h:?}");
    // Every hazard now has a verdict (no band is left partly covered).
    for h in &a.limits[0].hazards {
        assert!(!h.partial, "{}", h.id);
    }
    let r = a.retina.as_ref().unwrap();
    assert!(
        r.sources[0].notes.iter().any(|n| n.contains("assumption stated by the user")),
        "{:?}",
        r.sources[0].notes
    );
}

#[test]
fn a_filter_tabulated_over_part_of_the_band_cannot_hide_an_exceedance() {
    led_file("led450.csv", 1);
    std::fs::write(dir().join("window.csv"), "400,1\n700,1\n").unwrap();
    let a = run(&scenario("led450.csv", "", "[[filter]]\nname = \"window\"\nfile = \"window.csv\""));
    assert_eq!(blue(&a).verdict, Verdict::Exceeds, "{:?}", blue(&a));
    assert!(a.limit_exceeded);
}

#[test]
fn coarse_sampling_is_reported_and_a_near_limit_verdict_marked() {
    let p = led_file("led450-10nm.csv", 10);
    let a = run(&scenario("led450-10nm.csv", "", ""));
    let notes = &a.retina.as_ref().unwrap().sources[0].notes;
    assert!(notes.iter().any(|n| n.contains("coarser than 5 nm")), "{notes:?}");
    // 1 W/m² of this LED over 1 h through a 0.05 rad source: L_B/limit ≈ 0.94, within 20 % of 1.
    Command::cargo_bin("retidose")
        .unwrap()
        .args(["limits", "check", p.to_str().unwrap(), "--irradiance", "1 W/m2", "--subtense", "0.05 rad"])
        .args(["--for", "1 h", "--hazard", "blue-light", "--emission-range", "measured"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains("the sampling could decide it"))
        .stdout(predicate::str::contains("assumption stated by the user"));
}

#[test]
fn a_built_in_blackbody_gets_a_retinal_thermal_verdict() {
    let text = scenario("blackbody:3000K", "", "")
        .replace("irradiance = \"2 W/m2\"\nsubtense", "radiance = \"1e4 W/m2/sr\"\nsubtense");
    let a = run(&text);
    let h = a.limits[0].hazards.iter().find(|h| h.id == "retinal-thermal").unwrap();
    assert!(matches!(h.verdict, Verdict::Within | Verdict::Exceeds), "{:?}", h.verdict);
    assert!(!h.partial);
}

#[test]
fn radiance_hazards_do_not_change_with_the_angle_of_incidence() {
    let set = retidose::limits::find_set("iec62471-2006").unwrap();
    let weighted = |deg: f64, id: &str| {
        let spec = SourceSpec {
            spectrum: "halogen-3000k".into(),
            luminous_intensity: Some("500 cd".into()),
            geometry: Some("intensity".into()),
            distance: Some("0.5 m".into()),
            size: Some("10 mm".into()),
            incidence: Some(format!("{deg} deg")),
            ..SourceSpec::default()
        };
        let placed = place(&spec, None).unwrap();
        let r = assess_limits(&LimitsRequest {
            source: &placed,
            filters: &[],
            set,
            duration: retidose::base::units::parse_time("10 s").unwrap(),
            aphakic: false,
            classify: None,
            only: &[],
        })
        .unwrap();
        r.hazards.iter().find(|h| h.id == id).unwrap().weighted.unwrap()
    };
    for id in ["blue-light", "retinal-thermal"] {
        let l0 = weighted(0.0, id);
        for deg in [30.0, 60.0] {
            assert!((weighted(deg, id) - l0).abs() <= 1e-12 * l0, "{id} at {deg}°");
        }
    }
    // The irradiance hazards carry cos θ (Lambert's cosine law).
    let (e0, e60) = (weighted(0.0, "ir-eye"), weighted(60.0, "ir-eye"));
    assert!((e60 - 0.5 * e0).abs() <= 1e-9 * e0);
}

#[test]
fn empty_lists_are_errors() {
    led_file("led450.csv", 1);
    for (text, key) in [
        (scenario("led450.csv", "", "").replace("sets = [\"iec62471-2006\"]", "sets = []"), "limits.sets"),
        (scenario("led450.csv", "", "[guidance]\nsets = []"), "guidance.sets"),
    ] {
        let e = parse_scenario_file(&text, "led.toml", Some(&dir())).unwrap_err();
        assert!(e.to_string().contains(key) && e.to_string().contains("empty list"), "{e}");
    }
}

#[test]
fn a_uv_lamp_given_by_its_flux_gets_a_risk_group() {
    // IEC 62471 cl. 5.2: assessed at 200 mm; a Lambertian lamp's flux taken as its on-axis
    // intensity Φ/π (its brightest direction).
    let out = Command::cargo_bin("retidose")
        .unwrap()
        .args(["limits", "check", "uva-365-led", "--radiant-flux", "0.5 W", "--emission", "lambertian"])
        .args(["--distance", "0.2 m", "--size", "3 mm", "--for", "1 h", "--classify", "--format", "json"])
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["risk_group"]["assessed"], true, "{}", v["risk_group"]);
    let uv = v["hazards"].as_array().unwrap().iter().find(|h| h["id"] == "actinic-uv").unwrap();
    assert_eq!(uv["partial_band"], false);
}

#[test]
fn a_dimming_in_stages_is_one_lights_off_from_the_first_fall() {
    // Rate-limited model (Mahroo & Lamb 2004): recovery is timed from the end of the bright
    // step, through the dim step and the dark one.
    let text = "receptor = \"human-rod\"\n[[step]]\nname = \"bright\"\nduration = \"60 s\"\nlevel = \"1e6 scot td\"\n\
                [[step]]\nname = \"dim\"\nduration = \"2 min\"\nlevel = \"10 scot td\"\n\
                [[step]]\nname = \"dark\"\nduration = \"40 min\"\nlevel = \"0 scot td\"\n";
    let s = retidose::scenario::bleach::parse_bleach_scenario(text, "s.toml", None).unwrap();
    let r = retidose::pigment::bleach::assess(&s.pigment, s.model, &s.schedule, 0.0, None).unwrap();
    assert_eq!(r.lights_off, 1);
    let rec = &r.recoveries[0];
    assert_eq!(rec.after_step, "bright");
    assert!((rec.from_s - 60.0).abs() < 1e-9);
    assert!(rec.to_90_s.is_some_and(|t| t > 14.0 * 60.0), "{rec:?}");
}

#[test]
fn a_pupil_formula_adapts_to_what_is_lit_in_each_step() {
    let text = |day: bool| {
        format!(
            "[scenario]\nname = \"h\"\ntitle = \"h\"\n[subject]\nspecies = \"human\"\nage = \"30 y\"\npupil = \"de-groot-gebhard\"\n\
             {}[[source]]\nid = \"night-light\"\nspectrum = \"cie:D65\"\nluminance = \"1 cd/m2\"\nsubtense = \"20 deg\"\n\
             [schedule]\nreceptor = \"human-rod\"\n{}[[schedule.step]]\nname = \"night\"\nphase = \"night\"\nduration = \"1 h\"\non = [\"night-light\"]\n",
            if day {
                "[[source]]\nid = \"room\"\nspectrum = \"cie:D65\"\nluminance = \"300 cd/m2\"\nsubtense = \"60 deg\"\n"
            } else {
                ""
            },
            if day {
                "[[schedule.step]]\nname = \"day\"\nphase = \"day\"\nduration = \"8 h\"\non = [\"room\"]\n"
            } else {
                ""
            },
        )
    };
    let with_day = run(&text(true));
    let alone = run(&text(false));
    let night = |a: &Assessment| a.steps.iter().find(|s| s.name == "night").unwrap().clone();
    let (a, b) = (night(&with_day), night(&alone));
    assert!(
        (a.pupil.diameter.value - b.pupil.diameter.value).abs() < 1e-12,
        "{:?} vs {:?}",
        a.pupil,
        b.pupil
    );
    assert!((a.level - b.level).abs() <= 1e-12 * b.level);
}

#[test]
fn late_errors_are_caught_when_the_file_is_read_with_their_key() {
    led_file("led450.csv", 1);
    let cases = [
        (scenario("led450.csv", "", "").replace("duration = \"1 h\"", "duration = \"-8 h\""), "limits.duration"),
        (
            scenario("led450.csv", "", "").replace("species = \"human\"\npupil = \"3 mm\"", "species = \"mouse\"\npupil = \"5 mm\""),
            "subject.pupil",
        ),
        (
            scenario("led450.csv", "", "").replace("species = \"human\"\npupil = \"3 mm\"", "species = \"mouse\"\npupil = \"watson-yellott\""),
            "subject.pupil",
        ),
        (
            scenario("led450.csv", "", "[schedule]\nreceptor = \"human-rod\"\n[[schedule.step]]\nname = \"x\"\nduration = \"1 s\"\non = [\"led\"]")
                .replace("subtense = \"0.05 rad\"", ""),
            "schedule.step[0].on",
        ),
        (scenario("led450.csv", "incidence = \"30 deg\"", ""), "source[0].incidence"),
    ];
    for (text, key) in cases {
        let e = parse_scenario_file(&text, "led.toml", Some(&dir())).unwrap_err();
        let loc = e.location().unwrap_or_else(|| panic!("{e}"));
        assert_eq!(loc.key.as_deref(), Some(key), "{e}");
        assert!(loc.line.is_some(), "{e}");
    }
}

#[test]
fn a_declared_range_raises_no_false_coarse_warning_and_assess_shows_data_notes() {
    led_file("led450.csv", 1);
    let a = run(&scenario("led450.csv", "emission_range = \"measured\"", ""));
    assert!(!a.limits[0].notes.iter().any(|n| n.contains("coarser than")), "{:?}", a.limits[0].notes);
    let p = dir().join("declared.toml");
    std::fs::write(&p, scenario("led450.csv", "emission_range = \"measured\"", "")).unwrap();
    for format in ["table", "markdown", "html"] {
        Command::cargo_bin("retidose")
            .unwrap()
            .args(["assess", p.to_str().unwrap(), "--format", format])
            .assert()
            .stdout(predicate::str::contains("assumption stated by the user"));
    }
}
