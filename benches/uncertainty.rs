//! Speed of the Monte Carlo uncertainty (run with `cargo bench --bench uncertainty`): 10⁵ draws
//! of every hazard of iec62471-2006 for the stimulus-review source, with all four inputs
//! uncertain and the one-at-a-time variances (issue target: under 1 s on 2 cores); and the
//! retina figures (10⁵ draws) and bleach figures (10⁴ draws) of the dark-adaptation demo with
//! the reading and pupil uncertain and the from-memory parameters drawn.

use retidose::assess::{demo, parse_scenario_file};
use retidose::base::quantity::{Length, SiValue};
use retidose::limits::find_set;
use retidose::limits::report::LimitsRequest;
use retidose::uncertainty::{FiguresRequest, InputUncertainties, assess_figures, assess_uncertainty};

fn main() {
    divan::main();
}

#[divan::bench(sample_count = 10)]
fn draws_100_000_every_hazard(bencher: divan::Bencher) {
    let s = parse_scenario_file(demo("stimulus-review").unwrap(), "demo stimulus-review", None).unwrap();
    let r = LimitsRequest {
        source: &s.view.sources[0],
        filters: &s.view.filters,
        set: find_set("iec62471-2006").unwrap(),
        duration: s.limits.as_ref().unwrap().duration,
        aphakic: false,
        classify: None,
        only: &[],
    };
    let u = InputUncertainties {
        reading_relative: 0.05,
        distance: Length::from_si(0.005),
        size: Length::from_si(0.0005),
        tilt_relative: 0.03,
        pupil: Length::from_si(0.0003),
    };
    bencher.bench(|| assess_uncertainty(divan::black_box(&r), divan::black_box(&u), 100_000, 1).unwrap());
}

/// The figures of the dark-adaptation demo: `retina` and `bleach` draws.
fn figures(bencher: divan::Bencher, retina: Option<usize>, bleach: Option<usize>) {
    let s = parse_scenario_file(demo("dark-adaptation").unwrap(), "demo dark-adaptation", None).unwrap();
    let u = InputUncertainties {
        reading_relative: 0.05,
        tilt_relative: 0.03,
        pupil: Length::from_si(0.0003),
        ..InputUncertainties::none()
    };
    let req = FiguresRequest {
        scenario: &s,
        index: 0,
        inputs: &u,
        parameters: true,
        retina_draws: retina,
        bleach_draws: bleach,
        seed: 1,
    };
    bencher.bench(|| assess_figures(divan::black_box(&req)).unwrap());
}

#[divan::bench(sample_count = 10)]
fn retina_figures_100_000_draws(bencher: divan::Bencher) {
    figures(bencher, Some(100_000), None);
}

#[divan::bench(sample_count = 10)]
fn bleach_figures_10_000_draws(bencher: divan::Bencher) {
    figures(bencher, None, Some(10_000));
}
