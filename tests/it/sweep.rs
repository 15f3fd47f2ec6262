//! `limits::sweep` and `retidose sweep`: solved distances put back into a single evaluation,
//! sweep points against a full assessment with the source placed there, the inverse-square law,
//! and bad input; duration, level and transmittance points against an assessment of the scenario
//! written with that input, the proportionality in level and transmittance, the small-source
//! blue-light limit against duration, a room's dimming counts against direct counts, the figures.

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
    // The table may be split to fit the width, each part repeating the distance column.
    let mut distances: Vec<&str> = text
        .lines()
        .filter_map(|l| l.strip_prefix('│')?.split('│').next().map(str::trim))
        .filter(|c| c.ends_with(" mm") || c.ends_with(" m"))
        .collect();
    distances.dedup();
    distances.sort_unstable();
    distances.dedup();
    assert_eq!(distances.len(), 5, "{text}");
    let out = retidose().args(["sweep", f, "--points", "3", "--format", "csv"]).assert().success();
    let csv = String::from_utf8(out.get_output().stdout.clone()).unwrap();
    assert!(csv.starts_with("distance_m,hazard,ratio,lower_bound,t_max_s,verdict\n"));
    assert_eq!(csv.lines().count(), 1 + 3 * 9);
    let out = retidose().args(["sweep", f, "--solve"]).assert().success();
    // Prose is wrapped to the terminal's width: compare with the line breaks taken out.
    let words =
        String::from_utf8_lossy(&out.get_output().stdout).split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(words.contains("bracket searched: 50.00 mm to 5.000 m"), "{words}");
    assert!(words.contains("relative tolerance 1e-6"), "{words}");
    assert!(words.contains("(bound by retinal blue light (photochemical), radiance)"), "{words}");
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

// ---- Sweeps with the source as placed: duration, level, transmittance; rooms against dimming.

use retidose::base::quantity::{Ratio, Time};
use retidose::housing::lever::dimming;
use retidose::limits::report::LimitsAssessment;
use retidose::limits::sweep::{
    HazardPoint, MaxDuration, log_durations, log_factors, sweep_duration, sweep_level, sweep_transmittance,
};
use retidose::limits::{TMax, Verdict};

/// Both relative to 1e-12, or both absent.
fn close(a: Option<f64>, b: Option<f64>, what: &str) {
    match (a, b) {
        (Some(a), Some(b)) => assert!((a - b).abs() <= 1e-12 * a.abs().max(b.abs()), "{what}: {a} vs {b}"),
        (a, b) => assert_eq!(a, b, "{what}"),
    }
}

/// A sweep point's hazards against a single assessment's: ratio, lower bound and t_max to 1e-12
/// relative, the verdict exactly.
fn same_as_assessment(points: &[HazardPoint], l: &LimitsAssessment, at: &str) {
    assert_eq!(points.len(), l.hazards.len(), "{at}");
    for (x, h) in points.iter().zip(&l.hazards) {
        assert_eq!(x.id, h.id);
        let what = format!("{} at {at}", h.id);
        assert_eq!(x.verdict, h.verdict, "{what}");
        close(x.ratio, h.ratio, &what);
        close(x.lower_bound, h.lower_bound_ratio, &what);
        let seconds = |t: Option<MaxDuration>| match t {
            Some(MaxDuration::Limited(t)) => Some(t.si()),
            _ => None,
        };
        let table = match h.t_max {
            Some(TMax::Seconds(s)) => Some(s),
            _ => None,
        };
        close(seconds(x.t_max), table, &what);
    }
}

/// `text` with `from` replaced once (it must be there).
fn with(text: &str, from: &str, to: &str) -> String {
    assert_eq!(text.matches(from).count(), 1, "{from}");
    text.replace(from, to)
}

fn real(v: f64) -> String {
    ryu::Buffer::new().format(v).to_string()
}

#[test]
fn each_duration_point_equals_an_assessment_with_that_limits_duration() {
    let s = scenario(&stimulus());
    let ts = log_durations(Time::from_si(0.25), Time::from_si(28800.0), 6).unwrap();
    for (i, set) in ["iec62471-2006", "directive-2006-25-ec"].into_iter().enumerate() {
        let points = sweep_duration(&request(&s, set), &ts).unwrap();
        let t_max0: Vec<_> = points[0].hazards.iter().map(|h| h.t_max).collect();
        for p in &points {
            let t = p.duration.si();
            let text = with(&stimulus(), "duration = \"8 h\"", &format!("duration = \"{} s\"", real(t)));
            let a = assess(&scenario(&text)).unwrap();
            assert_eq!(a.limits[i].set_id, set);
            same_as_assessment(&p.hazards, &a.limits[i], &format!("{t} s"));
            // t_max does not depend on the exposure duration, where the hazard is assessed (a
            // duration beyond a hazard's limits, such as skin thermal's 10 s, leaves it unassessed).
            for (h, t0) in p.hazards.iter().zip(&t_max0) {
                if let (Some(a), Some(b)) = (h.t_max, t0) {
                    assert_eq!(a, *b, "{} at {t} s", h.id);
                }
            }
        }
    }
}

#[test]
fn each_level_point_equals_an_assessment_with_the_reading_scaled() {
    let s = scenario(&stimulus());
    let ks = log_factors(Ratio::from_si(0.1), Ratio::from_si(10.0), 5).unwrap();
    let r = LimitsRequest { classify: Some(false), ..request(&s, "iec62471-2006") };
    let points = sweep_level(&r, &ks).unwrap();
    for p in &points {
        let k = p.factor.si();
        let text = with(
            &stimulus(),
            "luminous_intensity = \"2 cd\"",
            &format!("luminous_intensity = \"{} cd\"", real(2.0 * k)),
        );
        let a = assess(&scenario(&text)).unwrap();
        same_as_assessment(&p.hazards, &a.limits[0], &format!("×{k}"));
        let c: &Classification = a.limits[0].classification.as_ref().unwrap().as_ref().unwrap();
        let g = p.risk_group.unwrap();
        assert_eq!((g.group, g.lower_bound), (c.overall, !c.not_assessed.is_empty()), "×{k}");
    }
    // The stimulus LED exceeds the blue-light limit at 8 h (ratio 1.06): RG1 as written, so
    // the group rises with the level across the sweep.
    assert!(points[0].risk_group.unwrap().group < points[4].risk_group.unwrap().group);
}

#[test]
fn each_transmittance_point_equals_an_assessment_with_a_flat_filter_added() {
    let s = scenario(&stimulus());
    let ts = log_factors(Ratio::from_si(0.01), Ratio::from_si(1.0), 4).unwrap();
    let points = sweep_transmittance(&request(&s, "iec62471-2006"), &ts).unwrap();
    for p in &points {
        let t = p.transmittance.si();
        let text = format!(
            "{}\n[[filter]]\nname = \"neutral density\"\ntransmittance = \"{}\"\n",
            stimulus(),
            real(t)
        );
        let a = assess(&scenario(&text)).unwrap();
        same_as_assessment(&p.hazards, &a.limits[0], &format!("T = {t}"));
    }
}

#[test]
fn the_ratio_is_proportional_to_level_and_transmittance() {
    // Every weighted exposure is linear in the spectrum and no limit depends on it, so
    // ratio(k) = k·ratio(1) for every hazard (the proportionality of exposure hazard values,
    // IEC TR 62471-2); a flat filter multiplies the spectrum by T (Filter::Flat), so the
    // transmittance sweep at T is the level sweep at k = T.
    let s = scenario(&stimulus());
    let r = request(&s, "iec62471-2006");
    let one = sweep_level(&r, &[Ratio::from_si(1.0)]).unwrap().remove(0);
    let ks = [0.03, 0.2, 0.7, 1.0];
    let level = sweep_level(&r, &ks.map(Ratio::from_si)).unwrap();
    let filter = sweep_transmittance(&r, &ks.map(Ratio::from_si)).unwrap();
    let mut checked = 0;
    for ((l, f), k) in level.iter().zip(&filter).zip(ks) {
        for ((a, b), h1) in l.hazards.iter().zip(&f.hazards).zip(&one.hazards) {
            close(a.ratio, h1.ratio.map(|r| k * r), &format!("{} at ×{k}", a.id));
            close(b.ratio, a.ratio, &format!("{} at T = {k}", a.id));
            assert_eq!(a.verdict, b.verdict);
            checked += usize::from(a.ratio.is_some());
        }
        assert_eq!(l.risk_group, f.risk_group);
    }
    assert!(checked >= 4 * 5, "{checked}");
}

#[test]
fn the_ratio_against_duration_follows_the_small_source_blue_light_limit() {
    // IEC 62471:2006 cl. 4.3.4 (small source, α < 11 mrad): E_B·t ≤ 100 J·m⁻² for t ≤ 100 s and
    // E_B ≤ 1 W·m⁻² for t > 100 s. So ratio(t) = E_B·t / 100 J·m⁻² up to 100 s and E_B / 1 W·m⁻²
    // beyond, and t_max = 100 J·m⁻² / E_B when E_B > 1 W·m⁻².
    let text = stimulus().replace("size = \"5 mm\"", "size = \"0.1 mm\"").replace("\"2 cd\"", "\"20 cd\"");
    let s = scenario(&text);
    let r = request(&s, "iec62471-2006");
    let ts = log_durations(Time::from_si(0.25), Time::from_si(28800.0), 40).unwrap();
    let points = sweep_duration(&r, &ts).unwrap();
    let blue = |p: &retidose::limits::sweep::DurationPoint| {
        p.hazards.iter().find(|h| h.id == "blue-light-small").unwrap().clone()
    };
    let e_b = blue(points.last().unwrap()).ratio.unwrap(); // W·m⁻², from the rate limit 1 W·m⁻²
    assert!(e_b > 1.0, "{e_b}");
    for p in &points {
        let (t, h) = (p.duration.si(), blue(p));
        let want = if t <= 100.0 { e_b * t / 100.0 } else { e_b / 1.0 };
        close(h.ratio, Some(want), &format!("blue-light-small at {t} s"));
        let verdict = if want > 1.0 { Verdict::Exceeds } else { Verdict::Within };
        assert_eq!(h.verdict, verdict, "{t} s");
        let Some(MaxDuration::Limited(t_max)) = h.t_max else { panic!("{:?}", h.t_max) };
        close(Some(t_max.si()), Some(100.0 / e_b), "t_max");
    }
}

#[test]
fn bad_sweep_values_are_errors() {
    let s = scenario(&stimulus());
    let r = request(&s, "iec62471-2006");
    for k in [0.0, -1.0, f64::NAN, f64::INFINITY] {
        assert!(sweep_level(&r, &[Ratio::from_si(k)]).is_err(), "{k}");
    }
    for t in [0.0, -0.5, 1.5, f64::NAN] {
        let e = sweep_transmittance(&r, &[Ratio::from_si(t)]).unwrap_err();
        assert!(e.message().contains("at most 1"), "{t}: {}", e.message());
    }
    assert!(sweep_duration(&r, &[Time::from_si(0.0)]).is_err());
    assert!(log_durations(Time::from_si(10.0), Time::from_si(1.0), 5).is_err());
    assert!(log_factors(Ratio::from_si(0.0), Ratio::from_si(1.0), 5).is_err());
    assert!(log_factors(Ratio::from_si(0.1), Ratio::from_si(10.0), MAX_POINTS + 1).is_err());
    // Log spacing: a power of ten on the grid is exact.
    let k = log_factors(Ratio::from_si(0.1), Ratio::from_si(10.0), 3).unwrap();
    assert_eq!(k.iter().map(|x| x.si()).collect::<Vec<_>>(), vec![0.1, 1.0, 10.0]);
}

#[test]
fn each_dimming_point_equals_a_direct_count_from_the_position_lux() {
    let s = scenario(demo("vivarium").unwrap());
    let a = assess(&s).unwrap();
    let room = a.room.as_ref().unwrap();
    let plan = &room.rows.0;
    let mut factors: Vec<f64> = log_factors(Ratio::from_si(0.1), Ratio::from_si(10.0), 41)
        .unwrap()
        .into_iter()
        .map(|k| k.si())
        .collect();
    factors.extend([0.37, 0.52, 2.9]);
    let racks = dimming(plan, &factors);
    assert!(!racks.is_empty());
    let mut lux: Vec<Vec<f64>> = vec![Vec::new(); room.racks.len()];
    retidose::housing::summary::stream(plan, |rows| {
        rows.iter().for_each(|r| lux[r.rack].push(r.room_lux));
        Ok::<(), ()>(())
    })
    .unwrap();
    for d in &racks {
        let i = room.racks.iter().position(|r| r.id == d.rack).unwrap();
        let b = room.racks[i].bounds;
        // In range at factor f: lower ≤ f·E ≤ upper (NRC Guide 8th ed., albino rodents 130–325 lx).
        let (lo, hi) = (b.lower.map_or(f64::NEG_INFINITY, |x| x.lx), b.upper.map_or(f64::INFINITY, |x| x.lx));
        assert_eq!(d.positions, lux[i].len());
        for p in &d.points {
            let f = p.factor;
            let count = |keep: &dyn Fn(f64) -> bool| lux[i].iter().filter(|&&e| keep(f * e)).count();
            assert_eq!(p.counts.in_range, count(&|v| lo <= v && v <= hi), "rack {} ×{f}", d.rack);
            assert_eq!(p.counts.below, count(&|v| v < lo), "rack {} ×{f}", d.rack);
            assert_eq!(p.counts.above, count(&|v| v > hi), "rack {} ×{f}", d.rack);
        }
        // The 41 log-spaced factors from 0.1 to 10 are the lever's own dimming curve.
        let lever = room.racks[i].lever.as_ref().unwrap();
        for (p, (lf, n)) in d.points.iter().zip(&lever.dimming) {
            assert!((p.factor / lf - 1.0).abs() < 1e-12);
            assert_eq!(p.counts.in_range, *n);
        }
    }
}

fn file_with(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("retidose-sweep-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    crate::files::write(&p, text);
    p
}

fn stdout(args: &[&str]) -> String {
    let out = retidose().args(args).assert().success();
    String::from_utf8(out.get_output().stdout.clone()).unwrap()
}

#[test]
fn the_cli_sweeps_duration_level_transmittance_and_a_room() {
    let f = scenario_file();
    let f = f.to_str().unwrap();
    let csv = stdout(&["sweep", f, "--over", "duration", "--points", "4", "--format", "csv"]);
    assert!(csv.starts_with("duration_s,hazard,ratio,lower_bound,t_max_s,verdict\n0.25,"), "{csv}");
    assert_eq!(
        csv.lines().count(),
        1 + 4 * 8,
        "8 hazards, no risk group: it does not depend on the duration"
    );
    let csv = stdout(&[
        "sweep", f, "--over", "level", "--from", "0.5", "--to", "2", "--points", "3", "--format", "csv",
    ]);
    assert!(csv.starts_with("level_factor,hazard,"), "{csv}");
    assert!(csv.contains("\n1.0,risk-group,,,,RG1\n"), "{csv}");
    let csv = stdout(&["sweep", f, "--over", "transmittance", "--points", "2", "--format", "csv"]);
    assert!(csv.starts_with("transmittance,hazard,") && csv.contains("\n0.01,blue-light,"), "{csv}");
    let json: serde_json::Value =
        serde_json::from_str(&stdout(&["sweep", f, "--over", "level", "--points", "2", "--format", "json"]))
            .unwrap();
    assert_eq!(json["schema"], "retidose.sweep/1");
    assert_eq!(json["over"], "level");
    assert_eq!(json["points"][1]["factor"], 10.0);
    let json: serde_json::Value =
        serde_json::from_str(&stdout(&["sweep", f, "--points", "2", "--format", "json"])).unwrap();
    assert_eq!(
        (json["over"].as_str(), json["points"][0]["distance"].as_f64()),
        (Some("distance"), Some(0.05))
    );
    let room = file_with("room.toml", demo("vivarium").unwrap());
    let room = room.to_str().unwrap();
    let csv = stdout(&["sweep", room, "--over", "level", "--points", "3", "--format", "csv"]);
    assert!(csv.starts_with("level_factor,rack,positions,below,in_range,above\n0.1,A,20,"), "{csv}");
    let table = stdout(&["sweep", room, "--over", "level", "--points", "3"]);
    assert!(table.contains("rack A (of 20)") && table.contains("×1.000"), "{table}");
}

/// The text of every `<text>` element of an SVG (which must parse as XML).
fn svg_texts(svg: &str) -> Vec<String> {
    let doc = roxmltree::Document::parse(svg).unwrap_or_else(|e| panic!("the SVG does not parse: {e}"));
    assert_eq!(doc.root_element().tag_name().name(), "svg");
    doc.descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.text().unwrap_or("").trim().to_string())
        .collect()
}

#[test]
fn every_sweep_draws_an_svg_with_its_axis_titles() {
    let f = scenario_file();
    let f = f.to_str().unwrap();
    let room = file_with("room-svg.toml", demo("vivarium").unwrap());
    for (file, over, titles) in [
        (f, "distance", ["distance from the source (mm)", "t_max, longest permissible exposure (s)"]),
        (f, "duration", ["exposure duration (s)", "hazard ratio, exposure ÷ limit"]),
        (f, "level", ["factor on the source's light (1 = as written)", "hazard ratio, exposure ÷ limit"]),
        (
            f,
            "transmittance",
            ["transmittance of a neutral filter in front of the eye", "hazard ratio, exposure ÷ limit"],
        ),
        (
            room.to_str().unwrap(),
            "level",
            ["factor on every luminaire (log scale; 1 = as now)", "cage positions in the guidance range"],
        ),
    ] {
        let t = svg_texts(&stdout(&["sweep", file, "--over", over, "--points", "20", "--format", "svg"]));
        for want in titles {
            assert!(t.iter().any(|x| x == want), "{over}: {want} missing from {t:?}");
        }
        if over != "distance" && file == f {
            assert!(t.iter().any(|x| x == "limit (ratio 1)"), "{over}: {t:?}");
        }
    }
}

#[test]
fn bad_sweep_flags_name_the_flag_and_show_an_example() {
    let f = scenario_file();
    let f = f.to_str().unwrap();
    for (args, said) in [
        (
            vec!["--over", "duration", "--from", "8 h", "--to", "1 s"],
            "--from (8 h) must be below --to (1 s), e.g. --from \"0.25 s\"",
        ),
        (
            vec!["--over", "level", "--from", "2", "--to", "2"],
            "--from (2) must be below --to (2), e.g. --from 0.1 --to 10",
        ),
        (vec!["--over", "level", "--points", "0"], "--points must be 1 to 100000"),
        (
            vec!["--over", "transmittance", "--to", "2"],
            "--to must be a transmittance above 0 and at most 1, such as 0.1",
        ),
        (vec!["--over", "level", "--from", "-1"], "--from must be a factor above 0, such as 0.5"),
        (vec!["--over", "level", "--from", "1 m"], "--from takes a plain factor such as 0.1"),
        (vec!["--over", "duration", "--to", "5 mm"], "--to takes a duration such as \"8 h\""),
        (
            vec!["--over", "duration", "--solve"],
            "--solve finds the nearest distances; use it with --over distance",
        ),
    ] {
        retidose().args(["sweep", f]).args(&args).assert().code(2).stderr(predicate::str::contains(said));
    }
}

#[test]
fn a_level_sweep_takes_at_most_ten_thousand_points() {
    // Each level point is a whole assessment with the risk group; the cap keeps a run to
    // seconds. A room's dimming counts are not capped this way (they are counts over sorted lux).
    let f = scenario_file();
    let f = f.to_str().unwrap();
    for over in ["level", "transmittance"] {
        retidose()
            .args(["sweep", f, "--over", over, "--points", "10001", "--format", "csv"])
            .assert()
            .code(2)
            .stderr(predicate::str::contains("at most 10000"));
    }
}

#[test]
fn sweep_tables_carry_the_cautions_that_apply() {
    // A limits sweep is about human exposure limits; a room's dimming sweep about animal housing.
    let f = scenario_file();
    let out = retidose().args(["sweep", f.to_str().unwrap(), "--points", "2"]).assert().success();
    let words =
        String::from_utf8_lossy(&out.get_output().stdout).split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(words.contains("Caution. These limits apply to humans."), "{words}");
    assert!(words.contains("Caution. retidose informs;"), "{words}");
    let room = std::env::temp_dir().join(format!("retidose-sweep-caution-{}.toml", std::process::id()));
    crate::files::write(&room, retidose::assess::demo("vivarium").unwrap());
    let out = retidose()
        .args(["sweep", room.to_str().unwrap(), "--over", "level", "--points", "2"])
        .assert()
        .success();
    let words =
        String::from_utf8_lossy(&out.get_output().stdout).split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(words.contains("Caution. Animal housing guidance is not a welfare assessment"), "{words}");
}
