//! A holding room as a facility manager has one: two racks of 6 shelves × 5 columns (pigmented
//! rats on one, albino mice on the other), two ceiling luminaires, a handheld meter's readings
//! for part of the mouse rack beside the model, a door leak and a 10-minute red-safelight check
//! every night. Every figure is derived here by hand, from the published formulas, not read
//! back from the engine:
//! - room light at cage level: inverse-square and cosine laws for a downward Lambertian
//!   luminaire, E = I·cos²θ/d² = I·h²/d⁴ (any photometry text, e.g. the IES Lighting Handbook's
//!   point method), times the rack's shading per shelf above;
//! - the calibration: the least-squares scales of the two luminaires by Cramer's rule on the
//!   2 × 2 normal equations;
//! - the safelight's rod rate: the retina chain run on its own for that light alone (the eye of
//!   the rack's species, its dark-adapted pupil, the cage wall as a flat filter);
//! - its effect on the rod pigment: the rate-limited model dB/dt = k(1 − B) − vB/(K_m + B)
//!   (Lamb & Pugh 2004; Mahroo & Lamb 2004) integrated by RK4 with a fine step;
//! - the dimming lever: a fine scan of factors, counting positions in range.

use std::path::PathBuf;

use assert_cmd::Command;
use retidose::assess::{Assessment, assess, parse_scenario_file};
use retidose::cornea::PlacedSource;
use retidose::cornea::filter::Filter;
use retidose::cornea::geometry::{Field, Geometry};
use retidose::housing::pass::{Basis, Flags, PositionRow};
use retidose::pigment::kinetics::{LevelUnit, find_pigment};
use retidose::retina::eye::{Species, builtin_eye};
use retidose::retina::pupil::PupilRule;
use retidose::retina::report::{RetinaScenario, assess_retina};
use retidose::spectrum::scale::{ScaleTarget, scale_to};
use retidose::spectrum::source::resolve;
use uom::si::f64::Illuminance;
use uom::si::illuminance::lux;

fn rel(a: f64, b: f64) -> f64 {
    if a == b { 0.0 } else { (a - b).abs() / a.abs().max(b.abs()) }
}

const LUMINAIRES: [(f64, f64, f64, f64); 2] = [(1.0, 1.5, 2.7, 700.0), (3.0, 1.5, 2.7, 1100.0)];
/// The "true" output of each luminaire relative to what is written (what the readings show).
const TRUE_SCALE: [f64; 2] = [0.8, 1.3];
const SHADING: f64 = 0.6;

/// Where a cage of rack `r` (0 = rats at y = 0.5 m, 1 = mice at y = 2.5 m) sits, m.
fn at(r: usize, shelf: u32, column: u32) -> [f64; 3] {
    let y = if r == 0 { 0.5 } else { 2.5 };
    [0.6 + 0.5 * f64::from(column - 1), y, 0.2 + 0.35 * f64::from(shelf - 1)]
}

/// Each luminaire's lux at a cage as written: I·h²/d⁴ × shading^(shelves above).
fn per_luminaire(r: usize, shelf: u32, column: u32) -> [f64; 2] {
    let [x, y, z] = at(r, shelf, column);
    LUMINAIRES.map(|(lx, ly, lz, i)| {
        let h = lz - z;
        let d2 = (lx - x).powi(2) + (ly - y).powi(2) + h * h;
        i * h * h / (d2 * d2) * SHADING.powi(6 - shelf as i32)
    })
}

fn readings() -> Vec<(u32, u32, f64)> {
    // Twelve mouse cages read by hand: the true output, give or take a few per cent.
    let mut v = Vec::new();
    for (k, (s, c)) in
        [(1, 1), (1, 5), (2, 3), (3, 1), (3, 4), (4, 2), (4, 5), (5, 1), (5, 3), (6, 2), (6, 4), (6, 5)]
            .into_iter()
            .enumerate()
    {
        let a = per_luminaire(1, s, c);
        let noise = 1.0 + 0.03 * ((k as f64 * 1.7).sin());
        v.push((s, c, (a[0] * TRUE_SCALE[0] + a[1] * TRUE_SCALE[1]) * noise));
    }
    v
}

fn scenario(dir: &std::path::Path) -> String {
    let mut csv = String::from("rack,shelf,column,lux\n");
    for (s, c, l) in readings() {
        csv.push_str(&format!("mice,{s},{c},{l}\n"));
    }
    crate::files::write(&dir.join("readings.csv"), csv);
    let mut t = String::from(
        r#"[scenario]
name = "two-racks"
title = "Holding room C-2 (invented)"
[subject]
species = "mouse"
pigmentation = "albino"
pupil = "light"
[guidance]
sets = ["nrc-guide-2011"]
[room]
light_spectrum = "neutral-white-led"
leak_spectrum = "warm-white-led"
leak = "0.1 lx"
light_phase = "12 h"
dark_phase = "12 h"
days = 7
readings = "readings.csv"
calibrate = "per-luminaire"
[[room.event]]
name = "night check"
spectrum = "red-safelight-led"
lux = "5 lx"
start = "2 h"
duration = "10 min"
"#,
    );
    for (k, (x, y, z, i)) in LUMINAIRES.iter().enumerate() {
        t.push_str(&format!(
            "[[room.luminaire]]\nid = \"L{k}\"\nx = \"{x} m\"\ny = \"{y} m\"\nz = \"{z} m\"\nintensity = \"{i} cd\"\n"
        ));
    }
    for (id, y, extra) in
        [("rats", 0.5, "species = \"rat\"\npigmentation = \"pigmented\"\n"), ("mice", 2.5, "")]
    {
        t.push_str(&format!(
            "[[room.rack]]\nid = \"{id}\"\n{extra}shelves = 6\ncolumns = 5\nfirst_column_x = \"0.6 m\"\ncolumn_spacing = \
             \"0.5 m\"\nrack_y = \"{y} m\"\nbottom_shelf = \"0.2 m\"\nshelf_spacing = \"0.35 m\"\ncage_transmittance = \
             \"0.7\"\nshelf_shading = \"{SHADING}\"\n"
        ));
    }
    t
}

fn dir() -> PathBuf {
    let d = std::env::temp_dir().join(format!("retidose-room-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run() -> (Assessment, Vec<PositionRow>) {
    let d = dir();
    let s = parse_scenario_file(&scenario(&d), "room.toml", Some(&d)).unwrap_or_else(|e| panic!("{e}"));
    let a = assess(&s).unwrap_or_else(|e| panic!("{e}"));
    let plan = &a.room.as_ref().unwrap().rows.0;
    let rows = (0..plan.len()).map(|i| plan.row(i)).collect();
    (a, rows)
}

/// The least-squares scales by Cramer's rule on the normal equations.
fn cramer() -> [f64; 2] {
    let (mut s00, mut s01, mut s11, mut b0, mut b1) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for (s, c, y) in readings() {
        let a = per_luminaire(1, s, c);
        s00 += a[0] * a[0];
        s01 += a[0] * a[1];
        s11 += a[1] * a[1];
        b0 += a[0] * y;
        b1 += a[1] * y;
    }
    let det = s00 * s11 - s01 * s01;
    [(b0 * s11 - b1 * s01) / det, (s00 * b1 - s01 * b0) / det]
}

#[test]
fn model_readings_and_calibration_match_the_hand_derivation() {
    let (a, rows) = run();
    let room = a.room.as_ref().unwrap();
    assert_eq!(room.positions, 60);
    let s = cramer();
    for (l, want) in room.luminaires.iter().zip(s) {
        assert!(rel(l.scale, want) < 1e-9, "{} vs {want}", l.scale);
    }
    // The fit recovers the true outputs to within the few-per-cent noise of the readings.
    assert!((s[0] / TRUE_SCALE[0] - 1.0).abs() < 0.05 && (s[1] / TRUE_SCALE[1] - 1.0).abs() < 0.05, "{s:?}");
    let read = readings();
    for r in &rows {
        let rack = r.rack;
        let a_ = per_luminaire(rack, r.shelf, r.column);
        assert!(rel(r.model_lux, a_[0] + a_[1]) < 1e-12, "model at {rack}/{}/{}", r.shelf, r.column);
        let predicted = a_[0] * s[0] + a_[1] * s[1];
        match read.iter().find(|(sh, c, _)| rack == 1 && *sh == r.shelf && *c == r.column) {
            Some((_, _, y)) => {
                assert_eq!(r.basis, Basis::Reading);
                assert!(
                    rel(r.room_lux, *y) < 1e-12
                        && rel(r.reading_lux / r.model_lux, y / (a_[0] + a_[1])) < 1e-12
                );
            }
            None => {
                assert_eq!(r.basis, Basis::Predicted);
                assert!(rel(r.room_lux, predicted) < 1e-9, "{} vs {predicted}", r.room_lux);
            }
        }
        assert!(rel(r.cage_lux, 0.7 * r.room_lux) < 1e-12);
    }
    // The fit's residual RMS, by hand.
    let rms = (read
        .iter()
        .map(|(sh, c, y)| {
            let a_ = per_luminaire(1, *sh, *c);
            (y - a_[0] * s[0] - a_[1] * s[1]).powi(2)
        })
        .sum::<f64>()
        / read.len() as f64)
        .sqrt();
    assert!(rel(room.fit.as_ref().unwrap().rms_residual_lx, rms) < 1e-6);
}

/// The rod rate of `spectrum` at `lx` of room light, full field, through the 0.7 cage wall, for
/// the eye of `species` with its dark-adapted pupil: the retina chain on its own.
fn rod_rate(species: Species, spectrum: &str, lx: f64) -> f64 {
    let s =
        scale_to(&resolve(spectrum, None).unwrap(), ScaleTarget::Illuminance(Illuminance::new::<lux>(lx)))
            .unwrap();
    let view = RetinaScenario {
        eye: builtin_eye(species).clone(),
        sources: vec![PlacedSource {
            spectrum: s,
            geometry: Geometry::AtEye { field: Some(Field::FullField) },
            size: None,
            distance: None,
            assumption: None,
        }],
        filters: vec![Filter::flat(0.7, "cage wall").unwrap()],
        pupil: PupilRule::DarkAdapted,
        age: None,
        eyes: 2,
        field: None,
        adapting_luminance: None,
        albino_iris: false,
    };
    assess_retina(&view).unwrap().sources[0].level(LevelUnit::IsomerisationsPerSecond).unwrap()
}

/// RK4 of the rate-limited model at constant k from `b0` for `t` s in `n` steps.
fn rk4(v: f64, km: f64, k: f64, b0: f64, t: f64, n: usize) -> f64 {
    let f = |b: f64| k * (1.0 - b) - v * b / (km + b);
    let h = t / n as f64;
    let mut b = b0;
    for _ in 0..n {
        let k1 = f(b);
        let k2 = f(b + 0.5 * h * k1);
        let k3 = f(b + 0.5 * h * k2);
        let k4 = f(b + h * k3);
        b += h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
    }
    b
}

#[test]
fn the_nightly_safelight_gives_what_the_retina_chain_and_the_rate_equation_give() {
    let (_, rows) = run();
    for (rack, species) in [(0, Species::Rat), (1, Species::Mouse)] {
        let leak = rod_rate(species, "warm-white-led", 0.1);
        let safelight = rod_rate(species, "red-safelight-led", 5.0);
        let p = find_pigment(&format!("{}-rod", species.name())).unwrap();
        let c = p.constants();
        let per_rod = p.rate_of_level(1.0);
        for r in rows.iter().filter(|r| r.rack == rack) {
            assert!(rel(r.leak_rod_rate, leak) < 1e-12, "{} vs {leak}", r.leak_rod_rate);
            assert!(rel(r.events[0].rod_rate, leak + safelight) < 1e-12);
            assert!(r.flags.has(Flags::LEAK) && r.flags.has(Flags::EVENT));
            // The leak's steady bleach two hours after lights-off, then ten minutes of safelight.
            let b_leak = rk4(c.v_per_s, c.k_m, leak * per_rod, r.light_bleach, 2.0 * 3600.0, 200_000);
            let peak = rk4(c.v_per_s, c.k_m, (leak + safelight) * per_rod, b_leak, 600.0, 100_000);
            // Within 1e-9 of the bleached fraction (1e-6 relative here): the closed-form kinetics
            // are checked against RK4 to 1e-7 absolute in bleach_reference.rs.
            assert!((r.events[0].peak_bleach - peak).abs() < 1e-9, "{} vs {peak}", r.events[0].peak_bleach);
            assert!(r.events[0].peak_bleach > r.leak_bleach);
        }
    }
}

#[test]
fn the_lever_is_the_best_factor_of_a_fine_scan() {
    let (a, rows) = run();
    let room = a.room.as_ref().unwrap();
    let mice = &room.racks[1];
    assert!(room.racks[0].lever.is_none(), "no numeric range applies to pigmented rats");
    let lever = mice.lever.as_ref().unwrap();
    let values: Vec<f64> = rows.iter().filter(|r| r.rack == 1).map(|r| r.room_lux).collect();
    let count = |f: f64| values.iter().filter(|e| (130.0..=325.0).contains(&(*e * f))).count();
    let best_scan = (0..=40_000).map(|k| count(10f64.powf(-2.0 + 4.0 * k as f64 / 40_000.0))).max().unwrap();
    assert_eq!(count(lever.factor), lever.in_range_after);
    assert!(lever.in_range_after >= best_scan, "{} < {best_scan}", lever.in_range_after);
    assert_eq!(lever.in_range_now, count(1.0));
    assert_eq!(lever.stay_below + lever.stay_above + lever.in_range_after, 30);
    // The dimming sweep: each point is the count at its factor, and none beats the lever.
    assert_eq!(lever.dimming.len(), retidose::housing::lever::DIMMING_POINTS);
    for (f, n) in &lever.dimming {
        assert_eq!(*n, count(*f), "at ×{f}");
        assert!(*n <= lever.in_range_after);
    }
    assert!((lever.dimming[0].0 - 0.1).abs() < 1e-12 && (lever.dimming[40].0 - 10.0).abs() < 1e-9);
}

#[test]
fn the_report_says_in_words_which_cages_and_what_to_change() {
    let d = dir();
    let p = d.join("room.toml");
    crate::files::write(&p, scenario(&d));
    let out = Command::cargo_bin("retidose").unwrap().args(["assess", p.to_str().unwrap()]).output().unwrap();
    // The sentences are wrapped to the terminal's width: compare with single spaces.
    let text = String::from_utf8(out.stdout).unwrap().split_whitespace().collect::<Vec<_>>().join(" ");
    assert_eq!(out.status.code(), Some(1), "a raised flag exits 1");
    for needle in [
        "Rack mice — albino mice, 6 shelves × 5 columns",
        "Rack rats — pigmented rats",
        "no numeric guidance range applies to pigmented rats",
        "Lever:",
        "event 'night check'",
        "Calibration (one scale per luminaire, 12 readings)",
        "not compared: found in another species than the albino mice",
        "the leak here is",
    ] {
        assert!(text.contains(needle), "{needle} missing:\n{text}");
    }
    // CSV rows are the library's rows, in order.
    let csv = Command::cargo_bin("retidose")
        .unwrap()
        .args(["assess", p.to_str().unwrap(), "--format", "positions"])
        .output()
        .unwrap()
        .stdout;
    let (_, rows) = run();
    let mut rdr = csv::Reader::from_reader(csv.as_slice());
    let head = rdr.headers().unwrap().clone();
    let col = |n: &str| head.iter().position(|h| h == n).unwrap();
    let recs: Vec<csv::StringRecord> = rdr.records().map(Result::unwrap).collect();
    assert_eq!(recs.len(), rows.len());
    for (rec, r) in recs.iter().zip(&rows) {
        let get = |n: &str| rec[col(n)].parse::<f64>().unwrap();
        assert_eq!(get("room_lux"), r.room_lux);
        assert_eq!(get("event1_peak_bleach"), r.events[0].peak_bleach);
        assert_eq!(&rec[col("rack")], if r.rack == 0 { "rats" } else { "mice" });
    }
}

#[test]
fn listed_positions_and_an_event_from_a_placed_lamp_follow_the_same_laws() {
    let text = r#"[scenario]
name = "list"
title = "listed cages (invented)"
[subject]
species = "rat"
pigmentation = "albino"
pupil = "light"
[room]
light_spectrum = "neutral-white-led"
light_phase = "12 h"
dark_phase = "12 h"
[[room.luminaire]]
x = "1 m"
y = "1 m"
z = "3 m"
intensity = "1000 cd"
[[room.event]]
name = "torch"
spectrum = "red-safelight-led"
start = "1 h"
duration = "5 min"
[room.event.luminaire]
x = "2 m"
y = "1 m"
z = "2 m"
intensity = "3 cd"
[[room.rack]]
id = "shelf unit"
cage_transmittance = "1"
shelf_shading = "0.5"
[[room.rack.position]]
shelf = 1
column = 1
x = "1 m"
y = "1 m"
z = "1 m"
[[room.rack.position]]
shelf = 2
column = 1
x = "2 m"
y = "1.5 m"
z = "1.4 m"
"#;
    let s = parse_scenario_file(text, "list.toml", None).unwrap_or_else(|e| panic!("{e}"));
    let a = assess(&s).unwrap();
    let plan = &a.room.as_ref().unwrap().rows.0;
    let (r0, r1) = (plan.row(0), plan.row(1));
    // Shelf 1 is under one shelf (× 0.5); shelf 2 is the top.
    let e = |i: f64, (lx, ly, lz): (f64, f64, f64), (x, y, z): (f64, f64, f64)| {
        let h = lz - z;
        let d2 = (lx - x).powi(2) + (ly - y).powi(2) + h * h;
        i * h * h / (d2 * d2)
    };
    assert!(rel(r0.room_lux, 0.5 * e(1000.0, (1.0, 1.0, 3.0), (1.0, 1.0, 1.0))) < 1e-12);
    assert!(rel(r1.room_lux, e(1000.0, (1.0, 1.0, 3.0), (2.0, 1.5, 1.4))) < 1e-12);
    assert!(rel(r0.events[0].room_lux, 0.5 * e(3.0, (2.0, 1.0, 2.0), (1.0, 1.0, 1.0))) < 1e-12);
    assert!(rel(r1.events[0].room_lux, e(3.0, (2.0, 1.0, 2.0), (2.0, 1.5, 1.4))) < 1e-12);
    assert_eq!((r1.shelf, r1.column), (2, 1));
}

#[test]
fn the_brightest_safelight_within_a_rod_target_gives_that_target_when_used() {
    let d = dir();
    let text =
        scenario(&d).replace("duration = \"10 min\"", "duration = \"10 min\"\nrod_target = \"200 R*/rod/s\"");
    let s = parse_scenario_file(&text, "room.toml", Some(&d)).unwrap_or_else(|e| panic!("{e}"));
    let a = assess(&s).unwrap();
    for (k, rack) in a.room.as_ref().unwrap().racks.iter().enumerate() {
        let sl = rack.safelights[0].expect("a target gives a solve");
        assert!(!sl.leak_exceeds && sl.scale > 0.0);
        // Put the brightest light back: the highest rod rate during the event is the target.
        let back = text.replace("lux = \"5 lx\"", &format!("lux = \"{} lx\"", sl.brightest_lux));
        let s2 = parse_scenario_file(&back, "room.toml", Some(&d)).unwrap();
        let a2 = assess(&s2).unwrap();
        let rate = a2.room.as_ref().unwrap().racks[k].summary.events[0].rod_rate.max;
        assert!(rel(rate, 200.0) < 1e-9, "rack {k}: {rate} R*/rod/s at {} lx", sl.brightest_lux);
    }
    // A target the leak alone reaches leaves no room for the event's light.
    let low = text.replace("rod_target = \"200 R*/rod/s\"", "rod_target = \"1e-6 R*/rod/s\"");
    let a3 = assess(&parse_scenario_file(&low, "room.toml", Some(&d)).unwrap()).unwrap();
    assert!(a3.room.as_ref().unwrap().racks.iter().all(|r| r.safelights[0].unwrap().leak_exceeds));
}

#[test]
fn a_380_to_780_nm_measurement_marks_rodent_opic_values_as_lower_bounds() {
    let d = dir();
    let mut csv = String::from("# kind: irradiance\n");
    for nm in (380..=780).step_by(5) {
        csv.push_str(&format!("{nm},{:e}\n", (-((nm as f64 - 450.0) / 12.0).powi(2)).exp() + 0.3));
    }
    crate::files::write(&d.join("measured.csv"), csv);
    let text = "[scenario]\nname = \"m\"\ntitle = \"measured lamp (invented)\"\n[subject]\nspecies = \"mouse\"\n\
                pigmentation = \"albino\"\npupil = \"light\"\n[[source]]\nid = \"lamp\"\nspectrum = \"measured.csv\"\n\
                illuminance = \"100 lx\"\nfull_field = true\n";
    let p = d.join("measured.toml");
    crate::files::write(&p, text);
    let out = Command::cargo_bin("retidose").unwrap().args(["assess", p.to_str().unwrap()]).output().unwrap();
    let t = String::from_utf8(out.stdout).unwrap();
    // The mouse UV cone peaks near 360 nm, outside the measured band: its value is a lower bound.
    let uv = t.lines().find(|l| l.contains("source lamp")).expect("the α-opic row");
    assert!(uv.contains("≥"), "{uv}");
    assert!(t.contains("≥: a lower bound"), "{t}");
    let md = Command::cargo_bin("retidose")
        .unwrap()
        .args(["assess", p.to_str().unwrap(), "--format", "markdown"])
        .output()
        .unwrap()
        .stdout;
    assert!(String::from_utf8(md).unwrap().contains("| lamp | uv-cone | ≥ "));
}
