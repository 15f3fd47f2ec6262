//! Speed of long schedules and large sweeps (run with `cargo bench`).
//!
//! - a year of minute steps (525 600 steps: 12 h light at a housing-room rod level, 12 h dark),
//!   solved exactly per step with both models;
//! - the same year summarised (end, peak, mean) without keeping per-step results.

use retidose::pigment::kinetics::{Model, find_pigment};
use retidose::pigment::schedule::{Schedule, summarise};

fn main() {
    divan::main();
}

fn year_of_minutes() -> (retidose::pigment::kinetics::Constants, Schedule) {
    let p = find_pigment("mouse-rod").unwrap();
    let light = p.rate_of_level(5e4);
    let leak = p.rate_of_level(20.0);
    let mut s = Schedule::default();
    for minute in 0..(365 * 24 * 60) {
        let in_light = (minute / 720) % 2 == 0;
        s.push(if in_light { "light" } else { "dark" }, 60.0, if in_light { light } else { leak }).unwrap();
    }
    (p.constants(), s)
}

#[divan::bench(args = [Model::Rushton, Model::RateLimited])]
fn year_of_minute_steps(bencher: divan::Bencher, model: Model) {
    let (c, s) = year_of_minutes();
    bencher.bench(|| summarise(model, c, divan::black_box(&s), 0.0));
}
