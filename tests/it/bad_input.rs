//! Hostile and non-physical inputs: each exits 2 with a message naming the file and the key or
//! line, without a panic, a hang or unbounded memory. The time bound is a generous timeout
//! against hangs, not a speed figure.

use std::path::PathBuf;
use std::time::Duration;

use assert_cmd::Command;
use predicates::prelude::*;

fn retidose() -> Command {
    let mut c = Command::cargo_bin("retidose").expect("binary is built");
    c.timeout(Duration::from_secs(20));
    c
}

fn dir() -> PathBuf {
    let d = std::env::temp_dir().join(format!("retidose-bad-input-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn write(name: &str, text: &str) -> PathBuf {
    let p = dir().join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn vivarium() -> String {
    String::from_utf8(retidose().args(["assess", "--example", "vivarium"]).output().unwrap().stdout).unwrap()
}

fn review() -> String {
    String::from_utf8(retidose().args(["assess", "--example", "stimulus-review"]).output().unwrap().stdout)
        .unwrap()
}

/// Runs `assess` on `text` and expects exit 2 with every needle in the message.
fn rejects(name: &str, text: &str, needles: &[&str]) {
    let p = write(name, text);
    let mut a = retidose().args(["assess", p.to_str().unwrap()]).assert().code(2);
    a = a.stderr(predicate::str::contains(name)).stderr(predicate::str::contains("panicked").not());
    for n in needles {
        a = a.stderr(predicate::str::contains(*n));
    }
}

#[test]
fn huge_racks_repeats_and_ages_are_errors_not_crashes() {
    let v = vivarium();
    rejects(
        "cols.toml",
        &v.replace("columns = 4", "columns = 9223372036854775807"),
        &["key 'survey.columns'", "positions a survey may hold"],
    );
    rejects("repeat.toml", &v.replace("repeat = 7", "repeat = 1500000000000"), &["schedule", "100 years"]);
    let r = review();
    rejects("age.toml", &r.replace("age = \"35 y\"", "age = \"1e308 y\""), &["subject.age", "0–120 years"]);
    rejects("age-neg.toml", &r.replace("age = \"35 y\"", "age = \"-5 y\""), &["subject.age", "0–120 years"]);
}

#[test]
fn many_short_steps_hit_the_step_cap() {
    let v = vivarium()
        .replace("duration = \"12 h\"", "duration = \"1 ms\"")
        .replace("repeat = 7", "repeat = 1000000000");
    rejects("steps.toml", &v, &["schedule", "steps"]);
}

#[test]
fn generators_outside_their_physical_range_are_errors() {
    let r = review();
    rejects(
        "bb.toml",
        &r.replace("spectrum = \"stimulus-460-led\"", "spectrum = \"blackbody:1e308K\""),
        &["source[0].spectrum", "blackbody temperature"],
    );
    rejects(
        "led.toml",
        &r.replace("spectrum = \"stimulus-460-led\"", "spectrum = \"led:0nm:20nm\""),
        &["source[0].spectrum", "LED peak"],
    );
}

#[test]
fn a_lamp_file_naming_itself_is_an_error() {
    let lamp = write(
        "self.toml",
        "name = \"loop\"\ntitle = \"t\"\nprovenance = \"invented\"\ntable = \"self.toml\"\n",
    );
    retidose()
        .args(["spectrum", lamp.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("cannot refer to each other"));
}

#[test]
fn readings_and_room_values_must_be_physical() {
    let v = vivarium();
    rejects("dark.toml", &v.replace("dark_lux = \"0.3 lx\"", "dark_lux = \"-0.3 lx\""), &["survey.dark_lux"]);
    rejects(
        "cd.toml",
        &v.replacen("intensity = \"900 cd\"", "intensity = \"-900 cd\"", 1),
        &["survey.luminaire[0].intensity"],
    );
    write("half.csv", "shelf,column,lux\n2.5,1,100\n");
    let with_readings = v
        .split("[[survey.luminaire]]")
        .next()
        .unwrap()
        .replace("dark_lux = \"0.3 lx\"", "dark_lux = \"0.3 lx\"\nmeasurements = \"half.csv\"");
    rejects("half.toml", &with_readings, &["half.csv:2", "whole number"]);
}
