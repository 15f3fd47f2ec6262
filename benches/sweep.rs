//! Speed of a distance sweep (run with `cargo bench --bench sweep`): the stimulus-review
//! source moved to 100 log-spaced distances from 50 mm to 5 m, every hazard of iec62471-2006
//! and the risk group at each distance (issue target: under 50 ms), and the nearest-distance
//! solve over the same bracket.

use retidose::assess::{demo, parse_scenario_file};
use retidose::base::quantity::{Length, SiValue};
use retidose::limits::find_set;
use retidose::limits::report::LimitsRequest;
use retidose::limits::sweep::{log_distances, solve_nearest_distance, sweep_distance};
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
