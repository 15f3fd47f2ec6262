//! `limits::sweep` and `retidose sweep`: solved distances put back into a single evaluation,
//! sweep points against a full assessment with the source placed there, the inverse-square law,
//! and bad input.

use std::path::PathBuf;

use assert_cmd::Command;
use predicates::prelude::*;
use retidose::assess::{assess, demo, parse_scenario_file};
use retidose::base::quantity::{Length, SiValue};
use retidose::limits::report::LimitsRequest;
use retidose::limits::sweep::{
    MAX_POINTS, Nearest, SOLVE_TOLERANCE, log_distances, solve_longest_duration, solve_nearest_distance,
    sweep_distance,
};
use retidose::limits::{Classification, find_set};
use retidose::scenario::file::Scenario;

fn stimulus() -> String {
    demo("stimulus-review").unwrap().to_string()
}

/// The stimulus-review scenario with its source at `distance_m` (written so it reads back
/// exactly).
fn stimulus_at(distance_m: f64) -> String {
    let text = stimulus();
    assert!(text.contains("distance = \"200 mm\""));
    text.replace(
        "distance = \"200 mm\"",
        &format!("distance = \"{} m\"", ryu::Buffer::new().format(distance_m)),
    )
}

fn scenario(text: &str) -> Scenario {
    parse_scenario_file(text, "test", None).unwrap()
}

fn request<'a>(s: &'a Scenario, set: &'a str) -> LimitsRequest<'a> {
    let l = s.limits.as_ref().unwrap();
    LimitsRequest {
        source: &s.view.sources[0],
        filters: &s.view.filters,
        set: find_set(set).unwrap(),
        duration: l.duration,
        aphakic: false,
        classify: Some(false),
        only: &[],
    }
}

fn m(x: f64) -> Length {
    Length::from_si(x)
}

fn ratio_at(r: &LimitsRequest<'_>, id: &str, d: Length) -> Option<f64> {
    let p = sweep_distance(r, &[d]).unwrap();
    p[0].hazards.iter().find(|h| h.id == id).unwrap().ratio
}

#[test]
fn solved_distances_give_ratio_one_within_the_tolerance_and_nearer_exceeds() {
    let s = scenario(&stimulus());
    for set in ["iec62471-2006", "directive-2006-25-ec"] {
        let r = request(&s, set);
        let n = solve_nearest_distance(&r, m(0.01), m(10.0)).unwrap();
        assert_eq!(n.tolerance, SOLVE_TOLERANCE);
        assert_eq!((n.near.si(), n.far.si()), (0.01, 10.0));
        let mut found = 0;
        for h in &n.hazards {
            let Nearest::Found { distance, exceeds_at, ratio, .. } = &h.nearest else { continue };
            found += 1;
            assert!(distance.si() / exceeds_at.si() <= 1.0 + SOLVE_TOLERANCE, "{}", h.id);
            let back = ratio_at(&r, &h.id, *distance).unwrap();
            assert_eq!(Some(back), *ratio, "{}", h.id);
            // Ratio ∝ d^-k with k ≤ 2 near the crossing: within k·tolerance of 1.
            assert!((1.0 - 3.0 * SOLVE_TOLERANCE..=1.0).contains(&back), "{}: {back}", h.id);
            let nearer = m(distance.si() * (1.0 - SOLVE_TOLERANCE));
            assert!(ratio_at(&r, &h.id, nearer).unwrap() > 1.0, "{}", h.id);
            assert!(ratio_at(&r, &h.id, *exceeds_at).unwrap() > 1.0, "{}", h.id);
        }
        assert!(found >= 1, "{set}: the blue-light hazard exceeds at 200 mm, so a distance is solved");
    }
}

#[test]
fn risk_group_distances_separate_the_groups() {
    let s = scenario(&stimulus());
    let r = request(&s, "iec62471-2006");
    let n = solve_nearest_distance(&r, m(0.01), m(10.0)).unwrap();
    assert_eq!(n.groups.len(), 3);
    for (g, x) in &n.groups {
        if let Nearest::Found { distance, exceeds_at, .. } = x {
            let at = |d| sweep_distance(&r, &[d]).unwrap()[0].risk_group.unwrap().group.unwrap();
            assert!(at(*distance) <= *g);
            assert!(at(*exceeds_at) > *g);
        }
    }
}

#[test]
fn each_sweep_point_equals_an_assessment_with_the_source_placed_there() {
    let s = scenario(&stimulus());
    let distances = log_distances(m(0.05), m(5.0), 7).unwrap();
    for (i, set) in ["iec62471-2006", "directive-2006-25-ec"].into_iter().enumerate() {
        let points = sweep_distance(&request(&s, set), &distances).unwrap();
        for p in &points {
            let a = assess(&scenario(&stimulus_at(p.distance.si()))).unwrap();
            let l = &a.limits[i];
            assert_eq!(l.set_id, set);
            assert_eq!(l.hazards.len(), p.hazards.len());
            for (h, x) in l.hazards.iter().zip(&p.hazards) {
                assert_eq!(h.id, x.id);
                assert_eq!(h.verdict, x.verdict, "{} at {} m", h.id, p.distance.si());
                for (a, b) in [(h.ratio, x.ratio), (h.lower_bound_ratio, x.lower_bound)] {
                    match (a, b) {
                        (Some(a), Some(b)) => {
                            assert!((a - b).abs() <= 1e-12 * a.abs(), "{}: {a} vs {b}", h.id)
                        }
                        (a, b) => assert_eq!(a, b, "{}", h.id),
                    }
                }
            }
        }
    }
}

#[test]
fn the_risk_group_at_200_mm_is_the_classification() {
    let s = scenario(&stimulus());
    let a = assess(&s).unwrap();
    let c: &Classification = a.limits[0].classification.as_ref().unwrap().as_ref().unwrap();
    assert_eq!(c.distance.si(), 0.2);
    let p = sweep_distance(&request(&s, "iec62471-2006"), &[m(0.2)]).unwrap();
    let g = p[0].risk_group.unwrap();
    assert_eq!(g.group, c.overall);
    assert_eq!(g.lower_bound, !c.not_assessed.is_empty());
}

#[test]
fn the_nearest_distance_of_a_point_source_follows_the_inverse_square_law() {
    // A 0.1 mm source of 20 cd: below 11 mrad from 10 mm outwards, so the small-source
    // blue-light hazard (an irradiance E_B, limit 1 W/m² beyond 100 s) applies everywhere.
    let text = stimulus().replace("size = \"5 mm\"", "size = \"0.1 mm\"").replace("\"2 cd\"", "\"20 cd\"");
    let s = scenario(&text);
    let r = request(&s, "iec62471-2006");
    let d0 = 0.2;
    let r0 = ratio_at(&r, "blue-light-small", m(d0)).unwrap();
    assert!(r0 > 1.0, "{r0}");
    // ratio(d) = r0·(d0/d)² = 1  ⇒  d = d0·√r0.
    let expected = d0 * r0.sqrt();
    for d in [0.05, 0.5, 3.0] {
        let x = ratio_at(&r, "blue-light-small", m(d)).unwrap();
        assert!((x - r0 * (d0 / d).powi(2)).abs() <= 1e-12 * x, "{d}: {x}");
    }
    let n = solve_nearest_distance(&r, m(0.05), m(50.0)).unwrap();
    let h = n.hazards.iter().find(|h| h.id == "blue-light-small").unwrap();
    let Nearest::Found { distance, crossings, .. } = h.nearest else { panic!("{:?}", h.nearest) };
    assert_eq!(crossings, 1);
    assert!(
        (distance.si() / expected - 1.0).abs() <= 2.0 * SOLVE_TOLERANCE,
        "{} vs {expected}",
        distance.si()
    );
}

#[test]
fn the_longest_duration_is_the_smallest_t_max_and_names_the_hazard() {
    let s = scenario(&stimulus());
    let r = request(&s, "iec62471-2006");
    let l = solve_longest_duration(&r).unwrap();
    let retidose::limits::sweep::Longest::Limited { t_max, hazard, .. } = &l.longest else { panic!("{l:?}") };
    assert_eq!(hazard, "blue-light");
    let smallest = l
        .hazards
        .iter()
        .filter_map(|(_, t)| match t {
            Some(retidose::limits::sweep::MaxDuration::Limited(t)) => Some(t.si()),
            _ => None,
        })
        .fold(f64::INFINITY, f64::min);
    assert_eq!(t_max.si(), smallest);
    assert!(l.not_assessed.iter().any(|x| x.starts_with("skin-thermal")));
}

#[test]
fn the_ends_of_the_bracket_are_reported_not_extrapolated() {
    let s = scenario(&stimulus());
    let r = request(&s, "iec62471-2006");
    let n = solve_nearest_distance(&r, m(0.01), m(0.1)).unwrap();
    let blue = n.hazards.iter().find(|h| h.id == "blue-light").unwrap();
    assert!(matches!(blue.nearest, Nearest::ExceedsAtFarEnd { ratio: Some(x) } if x > 1.0));
    let n = solve_nearest_distance(&r, m(1.0), m(2.0)).unwrap();
    let blue = n.hazards.iter().find(|h| h.id == "blue-light").unwrap();
    assert!(matches!(blue.nearest, Nearest::WithinAtNearEnd { ratio: Some(x) } if x <= 1.0));
}

#[test]
fn bad_library_input_is_an_error() {
    let s = scenario(&stimulus());
    let r = request(&s, "iec62471-2006");
    assert!(sweep_distance(&r, &[m(0.0)]).is_err());
    assert!(sweep_distance(&r, &[m(-1.0)]).is_err());
    assert!(sweep_distance(&r, &[m(f64::NAN)]).is_err());
    assert!(solve_nearest_distance(&r, m(1.0), m(1.0)).is_err());
    assert!(solve_nearest_distance(&r, m(2.0), m(1.0)).is_err());
    assert!(log_distances(m(0.1), m(1.0), 0).is_err());
    assert!(log_distances(m(0.1), m(1.0), MAX_POINTS + 1).is_err());
    assert!(log_distances(m(1.0), m(0.1), 10).is_err());
    let d = log_distances(m(0.1), m(10.0), 3).unwrap();
    assert!((d[1].si() - 1.0).abs() < 1e-15 && d[0].si() == 0.1 && d[2].si() == 10.0);
    // A measured irradiance without the distance it was measured at cannot be moved.
    let fixed = stimulus().replace(
        "luminous_intensity = \"2 cd\"\ndistance = \"200 mm\"\nsize = \"5 mm\"",
        "illuminance = \"50 lx\"\nsubtense = \"25 mrad\"",
    );
    let s = scenario(&fixed);
    let e = sweep_distance(&request(&s, "iec62471-2006"), &[m(0.2)]).unwrap_err();
    assert!(e.message().contains("cannot be moved"), "{}", e.message());
}

fn retidose() -> Command {
    Command::cargo_bin("retidose").expect("binary is built")
}

fn scenario_file() -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-sweep-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join("s.toml");
    crate::files::write(&p, stimulus());
    p
}

#[test]
fn the_cli_sweeps_and_solves() {
    let f = scenario_file();
    let f = f.to_str().unwrap();
    let out = retidose().args(["sweep", f, "--source", "stimulus", "--points", "5"]).assert().success();
    let text = String::from_utf8(out.get_output().stdout.clone()).unwrap();
    assert!(text.contains("blue-light") && text.contains("risk group") && text.contains("RG1"), "{text}");
    assert_eq!(
        text.lines().filter(|l| l.ends_with(" mm") || l.contains(" mm ") || l.contains(" m ")).count(),
        5
    );
    let out = retidose().args(["sweep", f, "--points", "3", "--format", "csv"]).assert().success();
    let csv = String::from_utf8(out.get_output().stdout.clone()).unwrap();
    assert!(csv.starts_with("distance_m,hazard,ratio,lower_bound,t_max_s,verdict\n"));
    assert_eq!(csv.lines().count(), 1 + 3 * 9);
    retidose()
        .args(["sweep", f, "--solve"])
        .assert()
        .success()
        .stdout(predicate::str::contains("bracket searched: 50.00 mm to 5.000 m"))
        .stdout(predicate::str::contains("relative tolerance 1e-6"))
        .stdout(predicate::str::contains("bound by blue-light"));
}

#[test]
fn bad_cli_input_names_the_flag() {
    let f = scenario_file();
    let f = f.to_str().unwrap();
    for (args, said) in [
        (vec!["--source", "lamp"], "--source: the scenario has no source 'lamp'; its sources are: stimulus"),
        (vec!["--from", "5 m", "--to", "50 mm"], "--from (5 m) must be nearer than --to"),
        (vec!["--from", "1 m", "--to", "1 m"], "--from (1 m) must be nearer than --to"),
        (vec!["--points", "0"], "--points must be 1 to 100000"),
        (vec!["--points", "100001"], "--points must be 1 to 100000"),
        (vec!["--from", "-5 mm"], "--from"),
        (vec!["--to", "5 kg"], "--to"),
        (vec!["--for", "0 s"], "--for"),
        (vec!["--set", "no-such-set"], "--set"),
    ] {
        retidose().args(["sweep", f]).args(&args).assert().code(2).stderr(predicate::str::contains(said));
    }
}
