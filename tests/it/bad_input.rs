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
    crate::files::write(&p, text);
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
        &["key 'room.rack[0].columns'", "whole number"],
    );
    rejects(
        "big.toml",
        &v.replace("columns = 4", "columns = 9000000").replace("shelves = 5", "shelves = 9000"),
        &["positions", "a room may hold"],
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
    rejects("dark.toml", &v.replace("leak = \"0.3 lx\"", "leak = \"-0.3 lx\""), &["room.leak", "≥ 0 lx"]);
    rejects(
        "cd.toml",
        &v.replacen("intensity = \"900 cd\"", "intensity = \"-900 cd\"", 1),
        &["room.luminaire[0].intensity", "≥ 0 cd"],
    );
    rejects(
        "shelf.toml",
        &v.replacen("shelves = 5", "shelves = 2.5", 1),
        &["room.rack[0].shelves", "whole number"],
    );
    rejects(
        "target.toml",
        &v.replace("rod_target = \"100 R*/rod/s\"", "rod_target = \"-5 R*/rod/s\""),
        &["room.event[0].rod_target", "above 0"],
    );
    let with_readings = v.replace("leak = \"0.3 lx\"", "leak = \"0.3 lx\"\nreadings = \"half.csv\"");
    let cases = [
        ("rack,shelf,column,lux\nA,2.5,1,100\n", &["half.csv:2", "field 'shelf'", "whole number"][..]),
        ("rack,shelf,column,lux\nA,1,1,-4\n", &["half.csv:2", "field 'lux'", "≥ 0 lx"][..]),
        ("rack,shelf,column,lux\nA,9,1,100\n", &["half.csv:2", "rack A has no shelf 9", "shelves 1–5"][..]),
        ("rack,shelf,column,lux\nC,1,1,100\n", &["half.csv:2", "field 'rack'", "racks: A, B"][..]),
        ("rack,shelf,column,lux\nA,1,1,100\nA,1,1,90\n", &["half.csv:3", "given twice"][..]),
        ("shelf,column,lux\n1,1,100\n", &["half.csv:1", "needs a rack column"][..]),
        (
            "rack,shelf,column,lux,dark_lux\nA,1,1,100,x\n",
            &["half.csv:2", "field 'dark_lux'", "not a number"][..],
        ),
    ];
    for (csv, needles) in cases {
        write("half.csv", csv);
        rejects("half.toml", &with_readings, needles);
    }
}

#[test]
fn bleach_sizes_beyond_the_bounds_are_errors() {
    let base = ["bleach", "--receptor", "human-rod", "--retinal", "1000 scot td"];
    retidose()
        .args(base)
        .args(["--for", "10 s", "--samples", "1000000000000"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("time-course samples is more than the 1000000 allowed"));
    retidose()
        .args(base)
        .args(["--for", "1 ms", "--repeat", "1000000000000"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("a schedule may hold"));
}

#[test]
fn limit_sets_with_unbounded_numbers_are_rejected_at_once() {
    let iec = include_str!("../../limits/iec62471_2006.toml");
    let uv = include_str!("../../limits/icnirp_2004_uv.toml");
    assert!(iec.contains("to_s = inf"));
    for (text, needle) in [
        (iec.replacen("to_s = inf", "to_s = 1e300", 1), "10000000000 s"),
        (uv.replacen("band_nm = [", "band_nm = [180, inf] # was [", 1), "band_nm"),
    ] {
        let p = write("set.toml", &text);
        retidose()
            .args(["limits", "show", "--set-file", p.to_str().unwrap()])
            .assert()
            .code(2)
            .stderr(predicate::str::contains("set.toml"))
            .stderr(predicate::str::contains(needle));
    }
}

#[test]
fn two_lamp_files_naming_each_other_are_an_error() {
    write("a.toml", "name = \"a\"\ntitle = \"t\"\nprovenance = \"invented\"\ntable = \"b.toml\"\n");
    let b = write("b.toml", "name = \"b\"\ntitle = \"t\"\nprovenance = \"invented\"\ntable = \"a.toml\"\n");
    retidose()
        .args(["spectrum", b.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("key 'table'"))
        .stderr(predicate::str::contains("cannot refer to each other"));
}

#[test]
fn retina_scenario_geometry_errors_name_the_file_and_a_negative_reading_is_a_range_error() {
    let p = write(
        "eye.toml",
        "[subject]\nspecies = \"human\"\npupil = \"3 mm\"\n[[source]]\nspectrum = \"cie:D65\"\n\
         illuminance = \"100 lx\"\nsubtense = \"200 deg\"\n",
    );
    retidose()
        .args(["retina", "--scenario", p.to_str().unwrap()])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("eye.toml"))
        .stderr(predicate::str::contains("source[0]"));
    retidose()
        .args(["spectrum", "warm-white-led", "--illuminance", "-300 lx"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("≥ 0"))
        .stderr(predicate::str::contains("tip:").not());
}
