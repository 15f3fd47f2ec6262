//! Integration tests that run the real `retidose` binary.

use std::path::PathBuf;

use assert_cmd::Command;
use predicates::prelude::*;
use serde_json::Value;

fn retidose() -> Command {
    Command::cargo_bin("retidose").expect("binary is built")
}

/// Writes `text` to a fresh file in the system temp folder and returns its path.
fn temp_file(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-cli-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    crate::files::write(&p, text);
    p
}

/// Runs a command with `--format json`; exit 0, or 1 where a limit check finds an exceedance.
fn json(args: &[&str]) -> Value {
    let out = retidose().args(args).args(["--format", "json"]).output().unwrap();
    let code = out.status.code();
    assert!(code == Some(0) || code == Some(1), "{}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn help_has_examples() {
    retidose().arg("--help").assert().success().stdout(predicate::str::contains("Examples:"));
    retidose()
        .args(["spectrum", "--help"])
        .assert()
        .success()
        .stdout(predicate::str::contains("retidose spectrum cie:A --illuminance"));
}

#[test]
fn d65_scaled_to_250_lux_reports_everything() {
    retidose()
        .args(["spectrum", "cie:D65", "--illuminance", "250 lx"])
        .assert()
        .success()
        .stdout(predicate::str::contains("250.0 lx"))
        .stdout(predicate::str::contains("melanopic"))
        .stdout(predicate::str::contains("S/P ratio                   2.465"))
        .stdout(predicate::str::contains("does not replace the standards"));
}

#[test]
fn json_has_stable_fields_with_units() {
    let v = json(&["spectrum", "cie:D65", "--illuminance", "250 lx"]);
    assert_eq!(v["schema"], "retidose.spectrum/1");
    assert_eq!(v["source"]["measure"], "irradiance");
    assert_eq!(v["photopic"]["unit"], "lx");
    assert!((v["photopic"]["value"].as_f64().unwrap() - 250.0).abs() < 1e-9);
    assert_eq!(v["radiant_total"]["unit"], "W·m⁻²");
    let alpha = v["alpha_opic"].as_array().unwrap();
    assert_eq!(alpha.len(), 5);
    for a in alpha {
        assert!((a["der"].as_f64().unwrap() - 1.0).abs() < 1e-9, "{a}");
        assert_eq!(a["edi"]["unit"], "lx");
        assert!(a["elr_mw_per_lm"].as_f64().unwrap() > 0.0);
    }
    assert_eq!(alpha[4]["reconstructed"], false, "CIE S 026 Table 2 is used, not a reconstruction");
    assert!(v["sp_ratio"].as_f64().unwrap() > 2.4);
    assert_eq!(v["bands"].as_array().unwrap().len(), 4);
}

#[test]
fn blackbody_luminance_scaling_gives_radiance_quantities() {
    let v = json(&["spectrum", "blackbody:2856K", "--luminance", "100 cd/m2"]);
    assert_eq!(v["photopic"]["unit"], "cd/m²");
    assert!((v["photopic"]["value"].as_f64().unwrap() - 100.0).abs() < 1e-9);
    assert_eq!(v["source"]["range_nm"], serde_json::json!([180.0, 3000.0]));
    assert_eq!(v["alpha_opic"][0]["edi"]["unit"], "cd/m²");
}

#[test]
fn every_builtin_lamp_runs_and_says_it_is_invented() {
    for lamp in [
        "warm-white-led",
        "neutral-white-led",
        "cool-white-led",
        "red-safelight-led",
        "stimulus-460-led",
        "uva-365-led",
        "halogen-3000k",
    ] {
        let v = json(&["spectrum", lamp]);
        let prov = v["source"]["provenance"].as_str().unwrap_or_default();
        assert!(prov.contains("invented"), "{lamp}: {prov}");
        assert_eq!(v["source"]["measure"], "relative", "{lamp}");
    }
}

#[test]
fn relative_spectrum_has_no_absolute_values_and_says_why() {
    let v = json(&["spectrum", "cie:A"]);
    assert!(v["photopic"]["value"].is_null());
    assert!(v["radiant_total"].is_null());
    assert!(v["sp_ratio"].as_f64().is_some());
    assert!(
        v["notes"].as_array().unwrap().iter().any(|n| n.as_str().unwrap().starts_with("relative spectrum"))
    );
}

#[test]
fn a_file_that_stops_at_700_nm_is_flagged_as_partial() {
    let mut text = String::from("# kind: irradiance\nwavelength_nm,value\n");
    for w in (400..=700).step_by(5) {
        text.push_str(&format!("{w},0.01\n"));
    }
    let p = temp_file("partial.csv", &text);
    let v = json(&["spectrum", p.to_str().unwrap()]);
    assert_eq!(v["photopic"]["coverage"]["complete"], false);
    assert_eq!(v["photopic"]["coverage"]["covered_nm"], serde_json::json!([400.0, 700.0]));
    // The terminal wraps long lines: compare with single spaces.
    let out = retidose().args(["spectrum", p.to_str().unwrap()]).output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap().split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(
        text.contains("lower bound: 0.05900 % of the weighting lies outside the measured 400–700 nm"),
        "{text}"
    );
    assert!(text.contains("is a lower bound"), "{text}");
}

#[test]
fn bad_files_exit_2_naming_file_and_line() {
    let cases = [
        ("unsorted.csv", "400,1\n410,1\n405,1\n", ":3: wavelength 405 nm is below the previous 410 nm"),
        ("dup.csv", "400,1\n400,1\n", ":2: duplicate wavelength 400 nm"),
        ("neg.csv", "400,1\n410,-1\n", ":2: value -1 at 410 nm is negative"),
        ("nan.csv", "400,1\n410,nan\n", ":2: value 'nan' is not a finite number"),
        ("short.csv", "400,1\n410\n", ":2: missing column"),
    ];
    for (name, text, expected) in cases {
        let p = temp_file(name, text);
        let before = std::fs::read_to_string(&p).unwrap();
        retidose()
            .args(["spectrum", p.to_str().unwrap()])
            .assert()
            .code(2)
            .stderr(predicate::str::contains(format!("{name}{expected}")));
        assert_eq!(std::fs::read_to_string(&p).unwrap(), before, "input must not change");
    }
}

#[test]
fn bad_arguments_exit_2_with_what_would_be_right() {
    retidose()
        .args(["spectrum", "cie:D65", "--illuminance", "300"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("has no unit; write it with one of: lx"));
    retidose()
        .args(["spectrum", "cie:D65", "--illuminance", "300 cd/m2"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("unknown unit 'cd/m2'; accepted units: lx"));
    retidose()
        .args(["spectrum", "no-such-lamp"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("unknown source 'no-such-lamp'"))
        .stderr(predicate::str::contains("warm-white-led"));
    retidose()
        .args(["spectrum", "cie:D65", "--luminance", "100 cd/m2", "--illuminance", "3 lx"])
        .assert()
        .code(2);
    retidose().args(["spectrum", "blackbody:2856K", "--illuminance", "300 lx"]).assert().code(2).stderr(
        predicate::str::contains("a spectral radiance cannot be scaled to match the illuminance 300 lx"),
    );
    retidose()
        .args(["spectrum", "blackbody:-5K"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("above 0 K"));
    retidose()
        .args([
            "spectrum",
            "led:300nm:5nm",
            "--from",
            "280 nm",
            "--to",
            "340 nm",
            "--step",
            "1 nm",
            "--illuminance",
            "1 lx",
        ])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("the spectrum has none of that quantity over 280–340 nm"));
}

#[test]
fn sources_lists_lamps_and_tables_with_status() {
    retidose()
        .arg("sources")
        .assert()
        .success()
        .stdout(predicate::str::contains("warm-white-led"))
        .stdout(predicate::str::contains("cie_1924_photopic_v.csv"))
        .stdout(predicate::str::contains("status: confirmed"))
        .stdout(predicate::str::contains("status: derived"));
}

#[test]
fn kind_override_applies_to_files_only() {
    let p = temp_file("plain.txt", "400 1\n500 1\n600 1\n700 1\n");
    let v = json(&["spectrum", p.to_str().unwrap(), "--kind", "irradiance"]);
    assert_eq!(v["source"]["measure"], "irradiance");
    retidose().args(["spectrum", "cie:A", "--kind", "irradiance"]).assert().code(2);
}

#[test]
fn retina_for_a_mouse_cage_reports_catch_and_species_alpha_opic() {
    let v = json(&[
        "retina",
        "warm-white-led",
        "--illuminance",
        "350 lx",
        "--full-field",
        "--species",
        "mouse",
        "--pupil",
        "dark",
    ]);
    assert_eq!(v["schema"], "retidose.retina/1");
    assert_eq!(v["species"], "mouse");
    let src = &v["sources"][0];
    assert_eq!(src["radiance_derived"], true);
    let catch = src["retina"]["catch"].as_array().unwrap();
    let names: Vec<&str> = catch.iter().map(|c| c["receptor"].as_str().unwrap()).collect();
    assert_eq!(names, ["rod", "m-cone", "uv-cone"]);
    assert!(catch.iter().all(|c| c["r_star_per_receptor_per_s"].as_f64().unwrap() > 0.0));
    let opic = v["species_alpha_opic"].as_array().unwrap();
    assert_eq!(opic.len(), 4);
    assert!(opic[0]["method"].as_str().unwrap().contains("not a CIE quantity"));
    assert!(v["notes"].as_array().unwrap().iter().any(|n| n.as_str().unwrap().contains("from memory")));
}

#[test]
fn retina_for_a_human_shows_both_rod_routes_and_trolands() {
    let v = json(&[
        "retina",
        "cie:D65",
        "--luminance",
        "100 cd/m2",
        "--subtense",
        "20 deg",
        "--species",
        "human",
        "--pupil",
        "3 mm",
    ]);
    let ret = &v["sources"][0]["retina"];
    assert!((ret["photopic_td"].as_f64().unwrap() - 100.0 * std::f64::consts::PI * 2.25).abs() < 1e-6);
    let rod = &ret["catch"][0];
    assert_eq!(rod["receptor"], "rod");
    assert_eq!(rod["troland_routes"].as_array().unwrap().len(), 2);
    assert_eq!(v["human_alpha_opic"].as_array().unwrap().len(), 5);
    assert!(ret["image_size_um"].as_f64().unwrap() > 5000.0);
}

#[test]
fn retina_without_a_known_radiance_says_what_is_not_assessed() {
    retidose()
        .args([
            "retina",
            "neutral-white-led",
            "--illuminance",
            "300 lx",
            "--species",
            "rat",
            "--pupil",
            "light",
        ])
        .assert()
        .success()
        .stdout(predicate::str::contains("not assessed: the radiance the eye sees is not known"));
}

/// Runs retidose with `args` and checks that it fails with exit status 2 and `needle` in stderr.
fn fails(args: &[&str], needle: &str) {
    retidose().args(args).assert().code(2).stderr(predicate::str::contains(needle));
}

#[test]
fn retina_rejects_impossible_geometry_and_pupils() {
    let led = ["retina", "stimulus-460-led", "--luminous-intensity", "2 cd", "--species", "human"];
    let with = |extra: &[&'static str]| -> Vec<&'static str> { led.iter().chain(extra).copied().collect() };
    fails(&with(&["--distance=-2 m", "--pupil", "3 mm"]), "must be above 0 m");
    fails(&with(&["--distance", "0.2 m", "--pupil", "12 mm"]), "at most 9 mm");
    fails(&with(&["--distance", "0.2", "--pupil", "3 mm"]), "has no unit");
    fails(
        &[
            "retina",
            "cie:D65",
            "--luminance",
            "100 cd/m2",
            "--subtense",
            "200 deg",
            "--species",
            "human",
            "--pupil",
            "3 mm",
        ],
        "below π rad",
    );
    fails(
        &[
            "retina",
            "warm-white-led",
            "--illuminance",
            "300 lx",
            "--full-field",
            "--species",
            "mouse",
            "--pupil",
            "watson-yellott",
        ],
        "for human eyes",
    );
}

#[test]
fn retina_scenario_file_with_two_sources_and_a_filter() {
    let dir = temp_file("wall.csv", "# name: cage wall\n300,0.5\n500,0.8\n800,0.85\n")
        .parent()
        .unwrap()
        .to_path_buf();
    let scenario = temp_file(
        "cage.toml",
        r#"
[subject]
species = "mouse"
pupil = "1.5 mm"

[[source]]
spectrum = "neutral-white-led"
illuminance = "200 lx"
full_field = true

[[source]]
spectrum = "red-safelight-led"
irradiance = "0.01 W/m2"
full_field = true

[[filter]]
name = "cage wall"
file = "wall.csv"
"#,
    );
    assert_eq!(scenario.parent().unwrap(), dir);
    let v = json(&["retina", "--scenario", scenario.to_str().unwrap()]);
    assert_eq!(v["sources"].as_array().unwrap().len(), 2);
    assert_eq!(v["filters"][0], "cage wall");
    let total = v["total_corneal_illuminance"]["value"].as_f64().unwrap();
    assert!(total > 150.0 && total < 200.0, "{total}");
    assert!(
        v["notes"].as_array().unwrap().iter().any(|n| n.as_str().unwrap().contains("cover different ranges"))
    );
    let bad = temp_file(
        "bad.toml",
        "[subject]\nspecies = \"mouse\"\npupil = \"dark\"\ncolour = 3\n[[source]]\nspectrum = \"cie:A\"\n",
    );
    retidose()
        .args(["retina", "--scenario", bad.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("bad.toml"))
        .stderr(predicate::str::contains("colour"));
}

#[test]
fn retinal_spectrum_is_written_to_a_new_file_and_never_over_an_existing_one() {
    let out = std::env::temp_dir().join(format!("retidose-cli-{}", std::process::id())).join("retina.csv");
    let _ = std::fs::remove_file(&out);
    let args = [
        "retina",
        "cie:D65",
        "--luminance",
        "100 cd/m2",
        "--subtense",
        "20 deg",
        "--species",
        "human",
        "--pupil",
        "3 mm",
    ];
    retidose().args(args).args(["--retinal-spectrum", out.to_str().unwrap()]).assert().success();
    let text = std::fs::read_to_string(&out).unwrap();
    assert!(text.contains("wavelength_nm,retinal_irradiance_w_per_m2_nm"));
    assert!(text.lines().count() > 100);
    retidose()
        .args(args)
        .args(["--retinal-spectrum", out.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("never overwritten"));
    assert_eq!(std::fs::read_to_string(&out).unwrap(), text);
}

#[test]
fn limits_list_and_show_start_with_the_caution() {
    for args in [vec!["limits", "list"], vec!["limits", "show", "iec62471-2006"]] {
        let out = retidose().args(&args).output().unwrap();
        assert!(out.status.success());
        let text = String::from_utf8(out.stdout).unwrap();
        assert!(text.starts_with("These limits apply to humans."), "{args:?}");
    }
    retidose()
        .args(["limits", "list"])
        .assert()
        .success()
        .stdout(predicate::str::contains("icnirp-2013-visible-ir"))
        .stdout(predicate::str::contains("from memory"));
    retidose()
        .args(["limits", "show", "directive-2006-25-ec"])
        .assert()
        .success()
        .stdout(predicate::str::contains("row g"))
        .stdout(predicate::str::contains("C_α in mrad"));
}

#[test]
fn limits_check_reports_every_hazard_and_the_risk_group() {
    let v = json(&[
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
    ]);
    assert_eq!(v["schema"], "retidose.limits/1");
    assert!(v["caution"].as_str().unwrap().starts_with("These limits apply to humans"));
    let hazards = v["hazards"].as_array().unwrap();
    assert_eq!(hazards.len(), 8);
    let uv = hazards.iter().find(|h| h["id"] == "actinic-uv").unwrap();
    // A built-in LED model is defined over 180–3000 nm, so every hazard gets a verdict.
    assert_eq!(uv["verdict"]["kind"], "within-limit");
    assert_eq!(uv["partial_band"], false);
    let blue = hazards.iter().find(|h| h["id"] == "blue-light").unwrap();
    assert!(blue["ratio"].as_f64().unwrap() > 0.0);
    assert!(!blue["from_memory"].as_array().unwrap().is_empty());
    let rg = &v["risk_group"];
    assert_eq!(rg["assessed"], true);
    assert!((rg["distance_m"].as_f64().unwrap() - 0.2).abs() < 1e-12);
    assert!(rg["e_thr_lx"].as_f64().unwrap() > 0.0);
}

#[test]
fn limits_check_rejects_bad_input() {
    let base =
        ["limits", "check", "stimulus-460-led", "--luminous-intensity", "2 cd", "--distance", "200 mm"];
    let with = |extra: &[&str]| -> Vec<String> { base.iter().chain(extra).map(|s| s.to_string()).collect() };
    let fails = |args: Vec<String>, needle: &str| {
        let refs: Vec<&str> = args.iter().map(String::as_str).collect();
        fails(&refs, needle);
    };
    fails(with(&["--for=-5 s"]), "must be above 0 s");
    fails(with(&["--for", "0 s"]), "must be above 0 s");
    fails(with(&["--for", "8"]), "has no unit");
    fails(with(&["--for", "8 h", "--hazard", "x-rays"]), "has no hazard 'x-rays'");
    fails(
        ["limits", "check", "cie:D65", "--luminance", "1000 cd/m2", "--subtense", "190 deg", "--for", "1 h"]
            .map(String::from)
            .to_vec(),
        "below π rad",
    );
    let set = include_str!("../../limits/icnirp_2004_uv.toml")
        .replace("from_s = 1000\nto_s = 28800", "from_s = 500\nto_s = 28800");
    let p = temp_file("overlap.toml", &set);
    fails(
        with(&["--for", "1 h", "--set-file", p.to_str().unwrap()]),
        "pieces must follow each other without gap or overlap",
    );
    let bad_unit =
        include_str!("../../limits/icnirp_2004_uv.toml").replace("unit = \"W/m2\"", "unit = \"W/m3\"");
    let p = temp_file("unit.toml", &bad_unit);
    fails(with(&["--for", "1 h", "--set-file", p.to_str().unwrap()]), "unit 'W/m3' does not fit");
    fails(with(&["--for", "1 h", "--set", "icnirp-1899"]), "unknown limit set 'icnirp-1899'");
}

#[test]
fn bleach_quick_form_reports_phases_recovery_and_thresholds() {
    let v = json(&[
        "bleach",
        "--receptor",
        "human-rod",
        "--retinal",
        "1e6 scot td",
        "--for",
        "60 s",
        "--then-dark",
        "40 min",
    ]);
    assert_eq!(v["schema"], "retidose.bleach/1");
    assert_eq!(v["model"], "rate-limited");
    let peak = v["peak_bleached"].as_f64().unwrap();
    assert!(peak > 0.98 && peak < 0.99, "{peak}");
    let to99 = v["recovery_s"]["to_99_percent"].as_f64().unwrap() / 60.0;
    assert!(to99 > 20.0 && to99 < 25.0, "{to99} min");
    assert_eq!(v["thresholds"].as_array().unwrap().len(), 2);
    assert!(v["saturation"].as_str().unwrap().contains("saturated"));
    retidose()
        .args([
            "bleach",
            "--receptor",
            "human-rod",
            "--retinal",
            "20000 scot td",
            "--for",
            "30 s",
            "--model",
            "rushton",
        ])
        .assert()
        .success()
        .stdout(predicate::str::contains("rushton model"))
        .stdout(predicate::str::contains("Recovery after the lights-off"));
}

#[test]
fn bleach_inverse_solves_and_flash() {
    retidose()
        .args(["bleach", "--receptor", "human-rod", "--solve", "steady", "--target", "0.5"])
        .assert()
        .success()
        .stdout(predicate::str::contains("holds 0.5 bleached"));
    retidose()
        .args([
            "bleach",
            "--receptor",
            "mouse-rod",
            "--solve",
            "duration",
            "--target",
            "0.2",
            "--rate",
            "1e5 R*/rod/s",
        ])
        .assert()
        .success()
        .stdout(predicate::str::contains("to reach 0.2"));
    let v = json(&["bleach", "--receptor", "human-rod", "--flash", "1000"]);
    assert_eq!(v["schema"], "retidose.rod-response/1");
    assert_eq!(v["saturating"], true);
}

#[test]
fn bleach_rejects_bad_input_and_never_overwrites() {
    fails(&["bleach", "--receptor", "human-rod", "--retinal=-5 scot td", "--for", "30 s"], "≥ 0");
    fails(&["bleach", "--receptor", "human-rod", "--retinal", "5000", "--for", "30 s"], "has no unit");
    fails(
        &["bleach", "--receptor", "human-rod", "--retinal", "5000 scot td", "--for", "0 s"],
        "must be above 0 s",
    );
    fails(
        &[
            "bleach",
            "--receptor",
            "human-rod",
            "--retinal",
            "5000 scot td",
            "--for",
            "30 s",
            "--param",
            "k_m=0",
        ],
        "must be above 0",
    );
    fails(
        &[
            "bleach",
            "--receptor",
            "human-rod",
            "--retinal",
            "5000 scot td",
            "--for",
            "30 s",
            "--param",
            "tau0=-3 s",
        ],
        "must be above 0",
    );
    fails(
        &[
            "bleach",
            "--receptor",
            "human-rod",
            "--retinal",
            "5000 scot td",
            "--for",
            "1 h",
            "--repeat",
            "2000000",
        ],
        "must end",
    );
    fails(
        &["bleach", "--receptor", "cat-rod", "--retinal", "5000 scot td", "--for", "1 h"],
        "unknown receptor 'cat-rod'",
    );
    let out = temp_file("course.csv", "keep me\n");
    fails(
        &[
            "bleach",
            "--receptor",
            "human-rod",
            "--retinal",
            "5000 scot td",
            "--for",
            "30 s",
            "--time-course",
            out.to_str().unwrap(),
        ],
        "never overwritten",
    );
    assert_eq!(std::fs::read_to_string(&out).unwrap(), "keep me\n");
}

#[test]
fn bleach_trolands_must_say_which_and_match_the_receptor() {
    // The typed units are accepted, short and long, for the receptor whose kind they are.
    let bleach = |receptor: &'static str, level: &'static str| -> Vec<&'static str> {
        vec!["bleach", "--receptor", receptor, "--retinal", level, "--for", "30 s"]
    };
    let cone = json(&bleach("human-cone", "20000 phot td"));
    assert_eq!(cone["receptor"], "human-cone");
    assert_eq!(cone["level_unit"], "phot td");
    assert!((cone["phases"][0]["level"].as_f64().unwrap() - 20000.0).abs() < 1e-6, "{cone}");
    assert_eq!(json(&bleach("human-cone", "20000 Photopic  td"))["end_bleached"], cone["end_bleached"]);
    let rod = json(&bleach("human-rod", "20000 scot td"));
    assert_eq!(rod["receptor"], "human-rod");
    assert_eq!(rod["level_unit"], "scot td");
    assert!((rod["phases"][0]["level"].as_f64().unwrap() - 20000.0).abs() < 1e-6, "{rod}");
    assert_eq!(json(&bleach("human-rod", "20000 scotopic td"))["end_bleached"], rod["end_bleached"]);

    // A bare td (or troland) could be either: exit 2, naming both ways to write it.
    for (receptor, level) in
        [("human-rod", "100531 td"), ("human-cone", "100531 td"), ("human-rod", "100531 trolands")]
    {
        retidose()
            .args(bleach(receptor, level))
            .assert()
            .code(2)
            .stderr(predicate::str::contains("--retinal"))
            .stderr(predicate::str::contains("say which trolands"))
            .stderr(predicate::str::contains("'100531 phot td' (photopic, cones)"))
            .stderr(predicate::str::contains("'100531 scot td' (scotopic, rods)"));
    }

    // The other kind's trolands: exit 2, naming the receptor and the right unit.
    fails(
        &bleach("human-rod", "5000 phot td"),
        "human-rod levels are scotopic trolands: give '5000 scot td'",
    );
    fails(
        &bleach("human-cone", "5000 scot td"),
        "human-cone levels are photopic trolands: give '5000 phot td'",
    );

    // A schedule file's levels go through the same check.
    let schedule = |level: &str| {
        format!("receptor = \"human-rod\"\n[[step]]\nduration = \"30 s\"\nlevel = \"{level}\"\n")
    };
    let good = temp_file("typed-td.toml", &schedule("20000 scot td"));
    let v = json(&["bleach", "--schedule", good.to_str().unwrap()]);
    assert_eq!(v["end_bleached"], rod["end_bleached"]);
    let bare = temp_file("bare-td.toml", &schedule("20000 td"));
    fails(&["bleach", "--schedule", bare.to_str().unwrap()], "'20000 phot td' (photopic, cones)");
    let wrong = temp_file("wrong-td.toml", &schedule("20000 phot td"));
    fails(&["bleach", "--schedule", wrong.to_str().unwrap()], "human-rod levels are scotopic trolands");
}

#[test]
fn the_study_commands_write_json_with_their_schema() {
    let ex = retidose().args(["assess", "--example", "stimulus-review"]).output().unwrap().stdout;
    let p = temp_file("json-lamp.toml", &String::from_utf8(ex).unwrap());
    let lamp = p.to_str().unwrap();
    for (args, schema, field) in [
        (vec!["sweep", lamp, "--points", "3", "--format", "json"], "retidose.sweep/1", "points"),
        (vec!["sweep", lamp, "--solve", "--format", "json"], "retidose.solve/1", "nearest"),
        (
            vec!["uncertainty", lamp, "--reading", "5%", "--draws", "1000", "--format", "json"],
            "retidose.uncertainty/2",
            "hazards",
        ),
        (vec!["threshold", "--bleach", "0.9", "--format", "json"], "retidose.threshold/1", "predicted"),
        (
            vec!["flash", "0.01 cd s/m2", "--species", "mouse", "--format", "json"],
            "retidose.flash/1",
            "r_star_per_rod",
        ),
    ] {
        let out = retidose().args(&args).output().unwrap();
        assert!(out.status.success(), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        assert_eq!(v["schema"], schema, "{args:?}");
        assert!(!v[field].is_null(), "{args:?}: no {field}");
    }
}
