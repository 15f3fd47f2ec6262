//! Speed of a distance sweep (run with `cargo bench --bench sweep`): the stimulus-review
//! source moved to 100 log-spaced distances from 50 mm to 5 m, every hazard of iec62471-2006
//! and the risk group at each distance (issue target: under 50 ms), the nearest-distance
//! solve over the same bracket, and with the source as placed, 100 log-spaced exposure durations
//! (0.25 s to 8 h) and 100 level factors (×0.1 to ×10, with the risk-group classification).

use retidose::assess::{demo, parse_scenario_file};
use retidose::base::quantity::{Length, Ratio, SiValue, Time};
use retidose::limits::find_set;
use retidose::limits::report::LimitsRequest;
use retidose::limits::sweep::{
    log_distances, log_durations, log_factors, solve_nearest_distance, sweep_distance, sweep_duration,
    sweep_level,
};
use retidose::scenario::file::Scenario;

fn main() {
    divan::main();
}

fn stimulus() -> Scenario {
    parse_scenario_file(demo("stimulus-review").unwrap(), "demo stimulus-review", None).unwrap()
}

fn request(s: &Scenario) -> LimitsRequest<'_> {
    LimitsRequest {
        source: &s.view.sources[0],
        filters: &s.view.filters,
        set: find_set("iec62471-2006").unwrap(),
        duration: s.limits.as_ref().unwrap().duration,
        aphakic: false,
        classify: Some(false),
        only: &[],
    }
}

#[divan::bench]
fn sweep_100_distances_every_hazard(bencher: divan::Bencher) {
    let s = stimulus();
    let r = request(&s);
    let d = log_distances(Length::from_si(0.05), Length::from_si(5.0), 100).unwrap();
    bencher.bench(|| sweep_distance(divan::black_box(&r), divan::black_box(&d)).unwrap());
}

#[divan::bench]
fn solve_nearest_distance_every_hazard(bencher: divan::Bencher) {
    let s = stimulus();
    let r = request(&s);
    bencher.bench(|| {
        solve_nearest_distance(divan::black_box(&r), Length::from_si(0.05), Length::from_si(5.0)).unwrap()
    });
}

#[divan::bench]
fn sweep_100_durations_every_hazard(bencher: divan::Bencher) {
    let s = stimulus();
    let r = request(&s);
    let t = log_durations(Time::from_si(0.25), Time::from_si(28800.0), 100).unwrap();
    bencher.bench(|| sweep_duration(divan::black_box(&r), divan::black_box(&t)).unwrap());
}

#[divan::bench]
fn sweep_100_levels_every_hazard_and_the_risk_group(bencher: divan::Bencher) {
    let s = stimulus();
    let r = request(&s);
    let k = log_factors(Ratio::from_si(0.1), Ratio::from_si(10.0), 100).unwrap();
    bencher.bench(|| sweep_level(divan::black_box(&r), divan::black_box(&k)).unwrap());
}
