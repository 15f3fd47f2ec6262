//! `uncertainty` and `retidose uncertainty`: the Monte Carlo against the GUM law of propagation
//! for a model linear in its one uncertain input, the coverage interval against the analytic
//! one, reproducibility (library, thread count and CLI), the decision words and bad input.
//!
//! Monte Carlo noise used below (M draws, σ the standard deviation of the ratio): the mean has
//! standard error σ/√M, the sample standard deviation σ/√(2(M − 1)), a p-quantile
//! √(p(1 − p)/M)/f(x_p) with f the density there (for a normal at p = 0.025: 0.00846·σ at
//! M = 10⁵), a probability √(P(1 − P)/M). Every bound is 4 standard errors.

use assert_cmd::Command;
use retidose::assess::{demo, parse_scenario_file};
use retidose::base::quantity::{Length, SiValue};
use retidose::limits::find_set;
use retidose::limits::report::LimitsRequest;
use retidose::scenario::file::Scenario;
use retidose::uncertainty::{
    Decision, HazardUncertainty, InputUncertainties, UncertaintyReport, assess_uncertainty,
};

const DRAWS: usize = 100_000;

fn scenario() -> Scenario {
    parse_scenario_file(demo("stimulus-review").unwrap(), "demo", None).unwrap()
}

fn request<'a>(s: &'a Scenario, set: &str) -> LimitsRequest<'a> {
    LimitsRequest {
        source: &s.view.sources[0],
        filters: &s.view.filters,
        set: find_set(set).unwrap(),
        duration: s.limits.as_ref().unwrap().duration,
        aphakic: false,
        classify: None,
        only: &[],
    }
}

fn none() -> InputUncertainties {
    let zero = Length::from_si(0.0);
    InputUncertainties { reading_relative: 0.0, distance: zero, size: zero, tilt_relative: 0.0, pupil: zero }
}

fn all() -> InputUncertainties {
    InputUncertainties {
        reading_relative: 0.05,
        distance: Length::from_si(0.005),
        size: Length::from_si(0.0005),
        tilt_relative: 0.03,
        pupil: Length::from_si(0.0003),
    }
}

fn run(inputs: &InputUncertainties, seed: u64) -> UncertaintyReport {
    let s = scenario();
    assess_uncertainty(&request(&s, "iec62471-2006"), inputs, DRAWS, seed).unwrap()
}

fn hazard<'a>(r: &'a UncertaintyReport, id: &str) -> &'a HazardUncertainty {
    r.hazards.iter().find(|h| h.id == id).unwrap()
}

/// Φ(x), the standard normal distribution function, by Abramowitz & Stegun 7.1.26 for erf
/// (absolute error below 1.5·10⁻⁷).
fn phi(x: f64) -> f64 {
    let z = x.abs() / std::f64::consts::SQRT_2;
    let t = 1.0 / (1.0 + 0.327_591_1 * z);
    let poly = t
        * (0.254_829_592
            + t * (-0.284_496_736 + t * (1.421_413_741 + t * (-1.453_152_027 + t * 1.061_405_429))));
    let erf = 1.0 - poly * (-z * z).exp();
    if x >= 0.0 { 0.5 * (1.0 + erf) } else { 0.5 * (1.0 - erf) }
}

/// Only the reading uncertain: ratio = r₀·k with k ~ N(1, u²), so by the GUM law of
/// propagation (GUM §5.1.2, one input, sensitivity coefficient ∂ratio/∂k = r₀) u(ratio) = r₀·u
/// and u(ratio)/ratio = u; the model is linear, so the mean is r₀ and the distribution normal.
/// (Truncation at k ≤ 0 is 20 standard uncertainties away.)
#[test]
fn monte_carlo_agrees_with_the_law_of_propagation_for_a_linear_model() {
    let u = 0.05;
    let r = run(&InputUncertainties { reading_relative: u, ..none() }, 3);
    assert!(r.hazards.len() >= 4);
    let m = DRAWS as f64;
    for h in &r.hazards {
        let sigma = h.nominal * u;
        assert!(
            (h.mean - h.nominal).abs() < 4.0 * sigma / m.sqrt(),
            "{}: mean {} vs {}",
            h.id,
            h.mean,
            h.nominal
        );
        let se_sd = sigma / (2.0 * (m - 1.0)).sqrt();
        assert!(
            (h.standard_uncertainty - sigma).abs() < 4.0 * se_sd,
            "{}: u {} vs {sigma}",
            h.id,
            h.standard_uncertainty
        );
        // The reading is the only input with variance.
        assert!((h.shares[0].1 - 1.0).abs() < 1e-12, "{}: {:?}", h.id, h.shares);
    }
}

/// The probabilistically symmetric 95 % interval of a normal N(r₀, (r₀u)²) is r₀(1 ± 1.959964u);
/// the Monte Carlo ends must lie within 4 quantile standard errors (4 × 0.00846σ) of it, and
/// P(ratio ≥ 1) within 4 binomial standard errors of 1 − Φ((1 − r₀)/(r₀u)).
#[test]
fn coverage_interval_and_exceedance_match_the_analytic_normal() {
    let u = 0.05;
    let r = run(&InputUncertainties { reading_relative: u, ..none() }, 11);
    let m = DRAWS as f64;
    for h in &r.hazards {
        let sigma = h.nominal * u;
        let noise = 4.0 * 0.00846 * sigma;
        let (lo, hi) = (h.nominal - 1.959_964 * sigma, h.nominal + 1.959_964 * sigma);
        assert!((h.interval.0 - lo).abs() < noise, "{}: low {} vs {lo}", h.id, h.interval.0);
        assert!((h.interval.1 - hi).abs() < noise, "{}: high {} vs {hi}", h.id, h.interval.1);
        let p = 1.0 - phi((1.0 - h.nominal) / sigma);
        let se = (p * (1.0 - p) / m).sqrt().max(1.0 / m);
        assert!(
            (h.exceedance_probability - p).abs() < 4.0 * se + 2e-7,
            "{}: P {} vs {p}",
            h.id,
            h.exceedance_probability
        );
    }
    // The blue-light ratio (≈ 1.06) straddles 1: a real test of P, not 0 against 0.
    let b = hazard(&r, "blue-light");
    assert!(b.exceedance_probability > 0.5 && b.exceedance_probability < 0.99, "{b:?}");
}

#[test]
fn a_fixed_seed_gives_identical_output_on_any_number_of_threads() {
    let a = run(&all(), 42);
    let b = run(&all(), 42);
    assert_eq!(a, b);
    let pool = rayon::ThreadPoolBuilder::new().num_threads(1).build().unwrap();
    let c = pool.install(|| run(&all(), 42));
    assert_eq!(a, c);
    let d = run(&all(), 43);
    assert_ne!(a.hazards[0].mean, d.hazards[0].mean);
    assert_eq!((a.draws, a.seed), (DRAWS, 42));
}

#[test]
fn decisions_follow_the_interval_ends() {
    assert_eq!(Decision::of(1.01, 1.3), Decision::Exceeds);
    assert_eq!(Decision::of(0.5, 1.0), Decision::Within);
    assert_eq!(Decision::of(0.9, 1.1), Decision::Undecided);
    assert_eq!(Decision::Exceeds.text(), "exceeds even at the lower 95 % bound");
    assert_eq!(Decision::Within.text(), "within even at the upper 95 % bound");
    assert_eq!(Decision::Undecided.text(), "undecided at 95 %");
    let r = run(&all(), 1);
    for h in &r.hazards {
        assert_eq!(h.decision, Decision::of(h.interval.0, h.interval.1), "{}", h.id);
        assert!(h.interval.0 <= h.mean && h.mean <= h.interval.1, "{h:?}");
    }
    assert_eq!(hazard(&r, "blue-light").decision, Decision::Undecided);
    assert_eq!(hazard(&r, "actinic-uv").decision, Decision::Within);
    // Four times the reading: the blue-light ratio (≈ 4.2) exceeds at its lower bound.
    let s = scenario().view.sources[0].spectrum.scaled_as(4.0, scenario().view.sources[0].spectrum.measure());
    let mut sc = scenario();
    sc.view.sources[0].spectrum = s.unwrap();
    let r4 = assess_uncertainty(&request(&sc, "iec62471-2006"), &all(), 20_000, 1).unwrap();
    assert_eq!(hazard(&r4, "blue-light").decision, Decision::Exceeds);
}

#[test]
fn shares_and_not_sampled_hazards_are_reported() {
    let r = run(&all(), 5);
    for h in &r.hazards {
        let total: f64 = h.shares.iter().map(|s| s.1).sum();
        assert!((total - 1.0).abs() < 1e-9, "{}: {:?}", h.id, h.shares);
        assert_eq!(h.shares[4].1, 0.0, "the pupil enters no corneal limit");
    }
    // Blue light at 25 mrad is averaged over a larger field: E/(π sin²(γ/2)), free of the size.
    assert!(hazard(&r, "blue-light").shares[2].1 < 1e-12);
    assert!(r.not_sampled.iter().any(|(id, _)| id == "blue-light-small"));
}

#[test]
fn bad_inputs_are_errors_naming_what_is_wrong() {
    let s = scenario();
    let r = request(&s, "iec62471-2006");
    let bad = |u: InputUncertainties, draws: usize| {
        assess_uncertainty(&r, &u, draws, 1).unwrap_err().message().to_string()
    };
    assert!(bad(none(), 1).contains("draws"));
    assert!(bad(InputUncertainties { reading_relative: -0.1, ..none() }, 100).contains("reading"));
    assert!(bad(InputUncertainties { reading_relative: f64::NAN, ..none() }, 100).contains("reading"));
    assert!(bad(InputUncertainties { distance: Length::from_si(0.1), ..none() }, 100).contains("quarter"));
    assert!(bad(InputUncertainties { size: Length::from_si(0.002), ..none() }, 100).contains("size"));
    assert!(bad(InputUncertainties { tilt_relative: 0.5, ..none() }, 100).contains("tilt"));
    assert!(bad(InputUncertainties { pupil: Length::from_si(-1e-3), ..none() }, 100).contains("pupil"));
    let mut full = scenario();
    full.view.sources[0].distance = None;
    let e = assess_uncertainty(&request(&full, "iec62471-2006"), &none(), 100, 1).unwrap_err();
    assert!(e.message().contains("distance") || e.message().contains("moved"), "{}", e.message());
}

fn retidose() -> Command {
    Command::cargo_bin("retidose").expect("binary is built")
}

fn scenario_file() -> String {
    let dir = std::env::temp_dir().join(format!("retidose-uncertainty-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join("s.toml");
    std::fs::write(&p, demo("stimulus-review").unwrap()).unwrap();
    p.to_str().unwrap().to_string()
}

const FLAGS: [&str; 12] = [
    "--source",
    "stimulus",
    "--set",
    "iec62471-2006",
    "--reading",
    "5%",
    "--distance",
    "5 mm",
    "--size",
    "0.5 mm",
    "--tilt",
    "3%",
];

fn stdout(args: &[&str]) -> String {
    let out = retidose().args(args).assert().success();
    String::from_utf8(out.get_output().stdout.clone()).unwrap()
}

#[test]
fn the_cli_repeats_itself_exactly() {
    let f = scenario_file();
    let mut args = vec!["uncertainty", f.as_str()];
    args.extend(FLAGS);
    args.extend(["--draws", "20000", "--seed", "9"]);
    let a = stdout(&args);
    assert_eq!(a, stdout(&args));
    assert!(
        a.contains("blue-light") && a.contains("undecided at 95 %") && a.contains("20000 draws, seed 9"),
        "{a}"
    );
    args.extend(["--format", "csv"]);
    let c = stdout(&args);
    assert_eq!(c, stdout(&args));
    assert!(
        c.starts_with("hazard,nominal,mean,standard_uncertainty,low_95,high_95,p_exceed,decision"),
        "{c}"
    );
}

#[test]
fn the_cli_names_the_flag_that_is_wrong() {
    let f = scenario_file();
    let cases: [(&[&str], &str); 8] = [
        (&["--reading", "-5%"], "--reading"),
        (&["--reading", "five"], "--reading"),
        (&["--distance", "5 kg"], "--distance"),
        (&["--size", "3 mm"], "--size"),
        (&["--tilt", "50%"], "--tilt"),
        (&["--draws", "1"], "--draws"),
        (&["--source", "lamp"], "--source"),
        (&["--set", "no-such-set"], "--set"),
    ];
    for (extra, flag) in cases {
        let mut args = vec!["uncertainty", f.as_str(), "--source", "stimulus"];
        args.extend(extra);
        let out = retidose().args(&args).assert().code(2);
        let err = String::from_utf8(out.get_output().stderr.clone()).unwrap();
        assert!(err.contains(flag), "{extra:?}: {err}");
    }
}
