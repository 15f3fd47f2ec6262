//! Solves and sweeps on a named step of a scenario's schedule (`retidose bleach --scenario
//! --step`), and the brightest light within a step's targets (`edi_target`, `rod_target`) and
//! the guidance's upper bounds: every answer put back into `retidose assess` of the edited
//! scenario text reproduces its target.

use std::path::PathBuf;

use assert_cmd::Command;
use retidose::assess::{Assessment, assess, course, demo, parse_scenario_file};
use retidose::base::quantity::SiValue;
use retidose::housing::guidance::{BoundSource, StepQuantity};
use retidose::pigment::course::Course;
use serde_json::Value;

fn run(text: &str) -> Assessment {
    assess(&parse_scenario_file(text, "test.toml", None).unwrap()).unwrap()
}

fn course_of(text: &str) -> Course {
    let s = parse_scenario_file(text, "test.toml", None).unwrap();
    let a = assess(&s).unwrap();
    course(s.schedule.as_ref().unwrap(), &a.steps)
}

/// The bleached fraction at the end of step `name`, the highest over its cycles, as `assess`
/// reports it (the pigment table's `max_end`).
fn step_end(a: &Assessment, name: &str) -> f64 {
    a.bleach.as_ref().unwrap().phases.iter().find(|p| p.name == name).unwrap().max_end
}

/// The dark-adaptation demo with its bleaching field's luminance times `factor` (written with
/// every digit, so the text reads back to the same number).
fn dark_adaptation_at(factor: f64) -> String {
    let text = demo("dark-adaptation").unwrap();
    let old = "luminance = \"5000 cd/m2\"";
    assert!(text.contains(old));
    text.replace(old, &format!("luminance = \"{:e} cd/m2\"", 5000.0 * factor))
}

fn retidose() -> Command {
    Command::cargo_bin("retidose").expect("binary is built")
}

fn temp_file(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-bleach-solve-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    crate::files::write(&p, text);
    p
}

#[test]
fn a_solved_level_put_back_into_assess_reproduces_its_target() {
    let file = temp_file("dark.toml", demo("dark-adaptation").unwrap());
    let out = retidose()
        .args(["bleach", "--scenario", file.to_str().unwrap(), "--step", "BLEACH", "--solve", "level"])
        .args(["--target", "0.9", "--format", "json"])
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["schema"], "retidose.bleach-solve/1");
    let answer = &v["answer"];
    assert_eq!(answer["solve"], "level");
    let factor = answer["factor"].as_f64().unwrap();
    let tolerance = answer["tolerance"].as_f64().unwrap();
    let (lo, hi) = (answer["bracket"][0].as_f64().unwrap(), answer["bracket"][1].as_f64().unwrap());
    assert!(lo <= factor && factor <= hi, "{factor} outside its bracket {lo}..{hi}");
    assert!(tolerance <= 1e-9);
    // Round trip: the luminance times the factor, through the whole light path again.
    let back = step_end(&run(&dark_adaptation_at(factor)), "bleach");
    assert!((back - 0.9).abs() <= tolerance, "{back} against 0.9 ± {tolerance}");
    // The step's light at the factor is linear in it: the source's luminance as written times it.
    let lum = v["step_light"]["sources"][0]["luminance"].as_f64().unwrap();
    assert!((lum / (5000.0 * factor) - 1.0).abs() < 1e-12, "{lum}");
}

#[test]
fn a_solved_duration_put_back_into_assess_reproduces_its_target() {
    let c = course_of(demo("dark-adaptation").unwrap());
    let step = c.find_step("bleach").unwrap();
    let s = c.solve_duration(step, 0.3).unwrap();
    let d = s.duration.si();
    assert!(s.bracket.0.si() <= d && d <= s.bracket.1.si());
    let text = demo("dark-adaptation").unwrap().replacen(
        "duration = \"60 s\"",
        &format!("duration = \"{d:e} s\""),
        1,
    );
    let back = step_end(&run(&text), "bleach");
    assert!((back - 0.3).abs() <= s.tolerance, "{back}");
}

#[test]
fn sweep_points_equal_single_assess_runs() {
    let c = course_of(demo("dark-adaptation").unwrap());
    let sweep = c.sweep_level(c.find_step("bleach").unwrap(), 0.01, 10.0, 5).unwrap();
    assert_eq!(sweep.points.len(), 5);
    // Log spaced: each factor 10^(3/4) times the one before.
    for w in sweep.points.windows(2) {
        assert!((w[1].factor / w[0].factor - 10f64.powf(0.75)).abs() < 1e-12);
    }
    for p in &sweep.points {
        let a = run(&dark_adaptation_at(p.factor));
        let b = a.bleach.as_ref().unwrap();
        assert!((p.step_end - step_end(&a, "bleach")).abs() <= 1e-12, "{} {}", p.factor, p.step_end);
        assert!((p.peak - b.summary.peak).abs() <= 1e-12);
        let single = b.recoveries.iter().find(|r| r.after_step == "bleach").unwrap().to_90_s;
        match (p.recovery_90, single) {
            (Some(x), Some(y)) => assert!((x.si() - y).abs() <= 1e-12 * y.max(1.0), "{} {y}", x.si()),
            (None, None) => {}
            other => panic!("{other:?}"),
        }
        assert!((p.level - a.steps[0].level).abs() <= 1e-12 * p.level, "{} {}", p.level, a.steps[0].level);
    }
}

#[test]
fn a_rushton_level_solve_matches_the_closed_form() {
    // First-order (Rushton 1961) kinetics: dB/dt = k(1 − B) − B/τ0 with k = I/Q_e (I in scot td,
    // Q_e in td·s), so from B0 = 0 in a step of length t:
    //   B(t) = B∞ + (B0 − B∞)·e^{−t(k + 1/τ0)},  B∞ = k/(k + 1/τ0).
    // The level solved for B(60 s) = 0.6 must give 0.6 in this closed form.
    let text = demo("dark-adaptation").unwrap().replace("model = \"rate-limited\"", "model = \"rushton\"");
    let c = course_of(&text);
    let s = c.solve_level(c.find_step("bleach").unwrap(), 0.6).unwrap();
    let q_e = c.pigment.q_e.as_ref().unwrap().value;
    let tau0 = c.pigment.constants().tau0_s;
    let (k, t, b0) = (s.level / q_e, 60.0, 0.0);
    let b_inf = k / (k + 1.0 / tau0);
    let closed = b_inf + (b0 - b_inf) * (-t * (k + 1.0 / tau0)).exp();
    assert!((closed - 0.6).abs() <= 1e-9, "{closed}");
    // And the closed form solved for k by hand at the same time: bisection in the test.
    let b_of = |k: f64| {
        let b_inf = k / (k + 1.0 / tau0);
        b_inf * (1.0 - (-t * (k + 1.0 / tau0)).exp())
    };
    let (mut lo, mut hi) = (1e-6, 10.0);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if b_of(mid) < 0.6 { lo = mid } else { hi = mid }
    }
    assert!((s.level / q_e / lo - 1.0).abs() < 1e-6, "{} {lo}", s.level / q_e);
}

const EVENING: &str = r#"
[scenario]
name = "evening"
title = "An evening at home (invented)"
[subject]
species = "human"
age = "40 y"
pupil = "4 mm"
[[source]]
id = "lamp"
spectrum = "warm-white-led"
illuminance = "150 lx"
full_field = true
[schedule]
receptor = "human-rod"
[[schedule.step]]
name = "reading"
phase = "evening"
duration = "3 h"
on = ["lamp"]
edi_target = "10 lx"
rod_target = "100 R*/rod/s"
[guidance]
sets = ["brown-2022"]
"#;

#[test]
fn the_brightest_evening_light_within_an_edi_target_is_linear() {
    // CIE S 026:2018: melanopic EDI = E_mel / K_mel,v^D65 with E_mel = ∫ E_e(λ) s_mel(λ) dλ, linear
    // in the spectral irradiance, so at a factor s on the light EDI(s·E) = s·EDI(E), and the
    // factor that brings the step to its target T is T / EDI(E).
    let a = run(EVENING);
    let st = &a.steps[0];
    let edi = st.melanopic_edi.unwrap().si();
    let target = a
        .brightest
        .iter()
        .find(|b| b.source == BoundSource::Target && matches!(b.bound, StepQuantity::MelanopicEdi(_)))
        .unwrap();
    assert!((target.factor - 10.0 / edi).abs() <= 1e-12 * target.factor);
    assert!((target.factor * edi - 10.0).abs() <= 1e-9);
    assert!(!target.meets);
    // The room light at that factor, re-assessed, gives the target: linear through the light path.
    let scaled = EVENING
        .replace("illuminance = \"150 lx\"", &format!("illuminance = \"{:e} lx\"", 150.0 * target.factor));
    let b = run(&scaled);
    assert!((b.steps[0].melanopic_edi.unwrap().si() - 10.0).abs() <= 1e-9);
    assert!((b.steps[0].room_illuminance.si() - target.brightest_room.si()).abs() <= 1e-9);
    // Brown et al. 2022, at most 10 lx melanopic EDI in the evening: the same bound, the same factor.
    let rule = a
        .brightest
        .iter()
        .find(|b| matches!(&b.source, BoundSource::Guidance { rule, .. } if rule == "evening-maximum"))
        .unwrap();
    assert!((rule.factor - target.factor).abs() <= 1e-12 * rule.factor);
    // The rod target: factor = 100 / rod rate of the step.
    let rod = a.brightest.iter().find(|b| matches!(b.bound, StepQuantity::RodRate(_))).unwrap();
    assert!((rod.factor - 100.0 / st.rod_rate.unwrap().si()).abs() <= 1e-12 * rod.factor);
    // A step already within its bound says so, with its margin.
    let dim = run(&EVENING.replace("illuminance = \"150 lx\"", "illuminance = \"5 lx\""));
    let t = dim
        .brightest
        .iter()
        .find(|b| b.source == BoundSource::Target && matches!(b.bound, StepQuantity::MelanopicEdi(_)))
        .unwrap();
    assert!(t.meets && t.factor > 1.0);
}

#[test]
fn errors_name_the_flag_or_key_and_the_valid_values() {
    let file = temp_file("dark-errors.toml", demo("dark-adaptation").unwrap());
    let f = file.to_str().unwrap();
    let err = |args: &[&str]| {
        let out = retidose().args(["bleach", "--scenario", f]).args(args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        String::from_utf8_lossy(&out.stderr).to_string()
    };
    let e = err(&["--step", "light", "--solve", "level", "--target", "0.9"]);
    assert!(e.contains("--step") && e.contains("no step named 'light'; steps: 'bleach', 'dark'"), "{e}");
    // Above the steady state of the step's light: no duration reaches it.
    let e = err(&["--step", "bleach", "--solve", "duration", "--target", "0.999"]);
    assert!(
        e.contains("--solve duration") && e.contains("cannot be reached") && e.contains("steady state"),
        "{e}"
    );
    let e = err(&["--step", "bleach", "--solve", "level", "--target", "1.5"]);
    assert!(e.contains("between 0 and 1"), "{e}");
    let e = err(&["--step", "bleach", "--solve", "steady", "--target", "0.5"]);
    assert!(e.contains("expected level or duration"), "{e}");
    for (bad, key) in [
        ("edi_target = \"0 lx\"", "edi_target"),
        ("edi_target = \"10\"", "edi_target"),
        ("rod_target = \"-1 R*/rod/s\"", "rod_target"),
    ] {
        let text = EVENING.replace("edi_target = \"10 lx\"\nrod_target = \"100 R*/rod/s\"", bad);
        let e = parse_scenario_file(&text, "evening.toml", None).unwrap_err();
        let loc = e.location().unwrap();
        assert_eq!(loc.key.as_deref(), Some(format!("schedule.step[0].{key}").as_str()), "{e}");
    }
}

#[test]
fn a_bleach_schedule_file_with_named_steps_solves_with_the_same_code() {
    let file = temp_file(
        "named.toml",
        "receptor = \"human-rod\"\nmodel = \"rushton\"\n[[step]]\nname = \"flash\"\nduration = \"30 s\"\nlevel = \"1e5 scot td\"\n\
         [[step]]\nname = \"dark\"\nduration = \"20 min\"\nlevel = \"0 scot td\"\n",
    );
    let out = retidose()
        .args(["bleach", "--schedule", file.to_str().unwrap(), "--step", "Flash", "--solve", "level"])
        .args(["--target", "0.5", "--format", "csv"])
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8_lossy(&out.stdout);
    let level: f64 = text
        .lines()
        .find(|l| l.starts_with("flash,level,"))
        .and_then(|l| l.split(',').nth(2))
        .unwrap()
        .parse()
        .unwrap();
    // Rushton closed form from B0 = 0 (as above): B(30 s) at k = level/Q_e is the target.
    let p = retidose::pigment::kinetics::find_pigment("human-rod").unwrap();
    let (k, tau0) = (level / p.q_e.as_ref().unwrap().value, p.constants().tau0_s);
    let b = k / (k + 1.0 / tau0) * (1.0 - (-30.0 * (k + 1.0 / tau0)).exp());
    assert!((b - 0.5).abs() <= 1e-9, "{b}");
}

#[test]
fn a_rod_target_under_a_pupil_formula_is_marked_as_an_upper_bound() {
    // With a pupil formula (de Groot & Gebhard 1952) a dimmer light opens the pupil, so the rod
    // rate falls less than in proportion to the light: a linear factor below 1 is an upper bound.
    let text = EVENING
        .replace("pupil = \"4 mm\"", "pupil = \"de-groot-gebhard\"")
        .replace("100 R*/rod/s", "1 R*/rod/s");
    let a = run(&text);
    let rod = a.brightest.iter().find(|b| matches!(b.bound, StepQuantity::RodRate(_))).unwrap();
    assert!(rod.pupil_adapts && rod.factor < 1.0, "{rod:?}");
    let fixed = run(EVENING);
    assert!(!fixed.brightest.iter().any(|b| b.pupil_adapts));
}

#[test]
fn a_level_solve_is_refused_when_the_pupil_follows_the_light() {
    // Trolands are luminance × pupil area; with a pupil formula (Watson & Yellott 2012) the pupil
    // narrows as the light rises, so trolands are not proportional to a factor on the light and
    // the linear level solve would overshoot. It is refused; the duration solve is still exact.
    let text = demo("dark-adaptation").unwrap();
    let fixed = "pupil = \"7 mm\"";
    assert!(text.contains(fixed));
    let text = text.replacen(fixed, "pupil = \"watson-yellott\"\nfield = \"20 deg\"", 1);
    let f = temp_file("adapting-pupil.toml", &text);
    let f = f.to_str().unwrap();
    for args in [&["--solve", "level", "--target", "0.9"][..], &["--sweep-level"][..]] {
        retidose()
            .args(["bleach", "--scenario", f, "--step", "bleach"])
            .args(args)
            .assert()
            .code(2)
            .stderr(predicates::str::contains("its pupil follows a formula of the light"))
            .stderr(predicates::str::contains("pupil = \"7 mm\""));
    }
    retidose()
        .args(["bleach", "--scenario", f, "--step", "bleach", "--solve", "duration", "--target", "0.5"])
        .assert()
        .success();
}
