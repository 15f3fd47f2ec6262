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
    InputUncertainties::none()
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
    args.extend(["--figures", "limits", "--format", "csv"]);
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

// ---- retina and bleach figures, from-memory ranges, the recommended rod rate ----

use retidose::pigment::kinetics::builtin_pigments;
use retidose::retina::eye::{Param, Species, Status, builtin_eye};
use retidose::retina::report::assess_retina;
use retidose::uncertainty::routes::recommended_rod_rate;
use retidose::uncertainty::{Figure, FigureUncertainty, FiguresRequest, assess_figures};

fn figure<'a>(list: &'a [FigureUncertainty], f: &Figure) -> &'a FigureUncertainty {
    list.iter().find(|x| x.figure == *f).unwrap_or_else(|| panic!("no {f:?} in {list:?}"))
}

fn figures_of(
    s: &Scenario,
    inputs: &InputUncertainties,
    parameters: bool,
    draws: usize,
    seed: u64,
) -> Vec<FigureUncertainty> {
    let req = FiguresRequest {
        scenario: s,
        index: 0,
        inputs,
        parameters,
        retina_draws: Some(draws),
        bleach_draws: None,
        seed,
    };
    assess_figures(&req).unwrap().retina
}

/// A figure linear in its one uncertain input: the rod rate by Makous's factor is
/// R = 4.31 × (scot td) × k with the reading k ~ N(1, u²). The GUM law of propagation
/// (JCGM 100:2008 eq. 10, one input, sensitivity ∂R/∂k = R₀) gives u(R) = R₀·u, and the mean is
/// R₀ (linear model). Monte Carlo standard errors: σ/√M for the mean, σ/√(2(M − 1)) for u.
#[test]
fn a_linear_retina_figure_agrees_with_the_law_of_propagation() {
    let s = parse_scenario_file(demo("dark-adaptation").unwrap(), "demo", None).unwrap();
    let u = 0.05;
    let list = figures_of(&s, &InputUncertainties { reading_relative: u, ..none() }, false, DRAWS, 5);
    let report = assess_retina(&s.view).unwrap();
    let scot_td =
        retidose::base::quantity::as_td_f64(report.sources[0].retinal.as_ref().unwrap().trolands.scotopic);
    // Makous, The Visual Neurosciences ch. 53, Table 53.1: 4.31 R*/rod/s per scotopic troland.
    let r0 = 4.31 * scot_td;
    let x = figure(&list, &Figure::RodRateByFactor("makous".into()));
    assert!((x.summary.nominal / r0 - 1.0).abs() < 1e-12, "{} vs {r0}", x.summary.nominal);
    let m = DRAWS as f64;
    let sigma = r0 * u;
    let mean = x.summary.mean.unwrap();
    let sd = x.summary.standard_uncertainty.unwrap();
    assert!((mean - r0).abs() < 4.0 * sigma / m.sqrt(), "mean {mean} vs {r0}");
    assert!((sd - sigma).abs() < 4.0 * sigma / (2.0 * (m - 1.0)).sqrt(), "u {sd} vs {sigma}");
    assert_eq!(x.summary.shares[0].1, 1.0, "{:?}", x.summary.shares);
}

/// A nonlinear figure: trolands T = L·π d²/4 through the mouse's dilated pupil, from memory
/// with the default range d ~ U(a, b), a = 2.0 mm, b = 3.0 mm (src/data/eyes/mouse.toml), so
/// T = T₀·(d/d₀)² with d₀ = 2.0 mm. For y = d², d uniform: the distribution function is
/// F(y) = (√y − a)/(b − a), so the p-quantile is (a + p(b − a))² and the density
/// f(y) = 1/(2√y (b − a)); E[y] = (a² + ab + b²)/3 and E[y²] = (b⁵ − a⁵)/(5(b − a)). Monte Carlo
/// standard errors: σ/√M for the mean; √((μ₄ − σ⁴)/M)/(2σ) for the standard deviation, with μ₄
/// the fourth central moment (integrated below); √(p(1 − p)/M)/f(y_p) for a quantile.
#[test]
fn trolands_follow_the_distribution_of_the_squared_pupil() {
    let text = r#"
[scenario]
name = "pupil-test"
title = "mouse under a full field"
[subject]
species = "mouse"
pupil = "dilated"
[[source]]
id = "field"
spectrum = "cie:D65"
illuminance = "100 lx"
full_field = true
"#;
    let s = parse_scenario_file(text, "test", None).unwrap();
    let list = figures_of(&s, &none(), true, DRAWS, 8);
    let x = figure(&list, &Figure::PhotopicTrolands);
    let (a, b, d0) = (2.0f64, 3.0f64, 2.0f64);
    let t0 = x.summary.nominal / (d0 * d0);
    let mean = (a * a + a * b + b * b) / 3.0;
    let second = (b.powi(5) - a.powi(5)) / (5.0 * (b - a));
    let sigma = (second - mean * mean).sqrt();
    // μ₄ = E[(y − E y)⁴] by the midpoint rule over d (10⁵ panels).
    let n = 100_000;
    let mu4 = (0..n)
        .map(|i| {
            let d = a + (b - a) * (i as f64 + 0.5) / n as f64;
            (d * d - mean).powi(4)
        })
        .sum::<f64>()
        / n as f64;
    let m = DRAWS as f64;
    let got_mean = x.summary.mean.unwrap() / t0;
    let got_sd = x.summary.standard_uncertainty.unwrap() / t0;
    assert!((got_mean - mean).abs() < 4.0 * sigma / m.sqrt(), "mean {got_mean} vs {mean}");
    let se_sd = ((mu4 - sigma.powi(4)) / m).sqrt() / (2.0 * sigma);
    assert!((got_sd - sigma).abs() < 4.0 * se_sd, "u {got_sd} vs {sigma}");
    for (p, end) in [(0.025, x.summary.interval.0.unwrap()), (0.975, x.summary.interval.1.unwrap())] {
        let y: f64 = (a + p * (b - a)).powi(2);
        let f = 1.0 / (2.0 * y.sqrt() * (b - a));
        let se = (p * (1.0 - p) / m).sqrt() / f;
        assert!((end / t0 - y).abs() < 4.0 * se, "{p}: {} vs {y}", end / t0);
    }
}

/// The routes to the human rod rate: each factor route is scot td × its published factor
/// (src/data/eyes/human.toml: Lamb & Pugh 2006 IOVS 47:5138, 8.6; Makous, Table 53.1, 4.31);
/// the spectral route is the catch's. The recommendation is √(min·max) with the 95 % interval
/// √(min·max)·exp(±0.95·½ln(max/min)) (a rectangular distribution of ln R between the routes,
/// JCGM 100:2008 §4.3.7), and the safe side is the highest route.
#[test]
fn the_recommended_rod_rate_lies_within_its_routes() {
    let s = parse_scenario_file(demo("dark-adaptation").unwrap(), "demo", None).unwrap();
    let report = assess_retina(&s.view).unwrap();
    let ret = report.sources[0].retinal.as_ref().unwrap();
    let scot_td = retidose::base::quantity::as_td_f64(ret.trolands.scotopic);
    let r = recommended_rod_rate("field", ret).unwrap();
    assert_eq!(ret.rod_rate.as_ref().map(|x| x.recommended), Some(r.recommended));
    let spectral = ret.catch.iter().find(|c| c.receptor == "rod").unwrap().rate.si();
    let mut expected =
        vec![("spectral", spectral), ("lamb_pugh_2006", 8.6 * scot_td), ("makous", 4.31 * scot_td)];
    expected.sort_by(|x, y| x.0.cmp(y.0));
    let mut got: Vec<(&str, f64)> = r.routes.iter().map(|x| (x.route.as_str(), x.rate.si())).collect();
    got.sort_by(|x, y| x.0.cmp(y.0));
    assert_eq!(got.len(), 3);
    for (g, e) in got.iter().zip(&expected) {
        assert_eq!(g.0, e.0);
        assert!((g.1 / e.1 - 1.0).abs() < 1e-12, "{}: {} vs {}", g.0, g.1, e.1);
    }
    let (lo, hi) = expected.iter().fold((f64::MAX, 0.0f64), |(l, h), x| (l.min(x.1), h.max(x.1)));
    let centre = (lo * hi).sqrt();
    let half = 0.5 * (hi / lo).ln();
    assert!((r.recommended.si() / centre - 1.0).abs() < 1e-12);
    assert!((r.interval.0.si() / (centre * (-0.95 * half).exp()) - 1.0).abs() < 1e-12);
    assert!((r.interval.1.si() / (centre * (0.95 * half).exp()) - 1.0).abs() < 1e-12);
    assert!(r.interval.0 < r.recommended && r.recommended < r.interval.1);
    assert_eq!(r.safe_side.si(), hi);
    // The routes disagree by more than 2×, which is why the spread is reported.
    assert!(hi / lo > 2.0, "{lo} {hi}");
}

/// Every parameter of the built-in eye and pigment files whose status is "from memory" states a
/// default range, so the uncertainty can draw it.
#[test]
fn every_from_memory_parameter_has_a_default_range() {
    fn check<T>(p: &Param<T>, what: &str, count: &mut usize) {
        if p.status == Status::FromMemory {
            *count += 1;
            let s = p.spread.as_ref().unwrap_or_else(|| panic!("{what}: from memory without a range"));
            assert!(!s.basis.trim().is_empty(), "{what}");
        }
    }
    let mut n = 0;
    for sp in [Species::Human, Species::Mouse, Species::Rat] {
        let e = builtin_eye(sp);
        let w = sp.name();
        check(&e.nodal_distance, w, &mut n);
        for p in [&e.pupil.dark_adapted, &e.pupil.light_adapted, &e.pupil.maximum] {
            check(p, w, &mut n);
        }
        if let Some(p) = &e.pupil.dilated {
            check(p, w, &mut n);
        }
        if let retidose::retina::eye::Media::CutOff { half_transmission, edge_width, plateau } = &e.media {
            check(half_transmission, w, &mut n);
            check(edge_width, w, &mut n);
            check(plateau, w, &mut n);
        }
        if let Some(i) = &e.iris {
            check(&i.diameter, w, &mut n);
            check(&i.albino_transmittance, w, &mut n);
        }
        for r in &e.receptors {
            check(&r.lambda_max, w, &mut n);
            check(&r.peak_optical_density, w, &mut n);
            check(&r.aperture_area, w, &mut n);
            check(&r.quantum_efficiency, w, &mut n);
            if let Some(p) = &r.pigment_per_cell {
                check(p, w, &mut n);
            }
        }
        if let Some(m) = &e.melanopsin {
            check(m, w, &mut n);
        }
        for (k, p) in &e.rod_troland_factors {
            check(p, k, &mut n);
        }
    }
    let t = builtin_pigments();
    for p in &t.pigments {
        for q in [&p.q_e, &p.i0, &p.pigment_per_cell, &p.saturating_level].into_iter().flatten() {
            check(q, &p.id, &mut n);
        }
        check(&p.tau0, &p.id, &mut n);
        check(&p.v, &p.id, &mut n);
        check(&p.k_m, &p.id, &mut n);
    }
    let rr = &t.rod_response;
    check(&rr.human_amplification, "rod response", &mut n);
    check(&rr.rodent_amplification, "rod response", &mut n);
    check(&rr.effective_delay, "rod response", &mut n);
    let da = &t.dark_adaptation;
    check(&da.s2_slope, "dark adaptation", &mut n);
    check(&da.cone_plateau, "dark adaptation", &mut n);
    check(&da.dowling_rushton_alpha, "dark adaptation", &mut n);
    // 5 human + 13 mouse + 19 rat eye values and 11 pigment-table values are from memory.
    assert_eq!(n, 48);
}

/// Leaving the parameters out narrows the interval of a figure they enter (the rod quantum
/// efficiency enters the spectral rod rate), and the bleach figures are reported.
#[test]
fn parameters_widen_the_figures_and_bleach_figures_are_given() {
    let s = parse_scenario_file(demo("dark-adaptation").unwrap(), "demo", None).unwrap();
    let u = InputUncertainties { reading_relative: 0.05, ..none() };
    let req = |parameters| FiguresRequest {
        scenario: &s,
        index: 0,
        inputs: &u,
        parameters,
        retina_draws: Some(20_000),
        bleach_draws: Some(2_000),
        seed: 4,
    };
    let with = assess_figures(&req(true)).unwrap();
    let without = assess_figures(&req(false)).unwrap();
    let width = |r: &retidose::uncertainty::FiguresReport| {
        let x = figure(&r.retina, &Figure::RodRate);
        x.summary.interval.1.unwrap() - x.summary.interval.0.unwrap()
    };
    assert!(width(&with) > width(&without));
    let peak = figure(&with.bleach, &Figure::PeakBleached);
    let (lo, hi) = (peak.summary.interval.0.unwrap(), peak.summary.interval.1.unwrap());
    assert!(lo < peak.summary.nominal && peak.summary.nominal < hi && hi <= 1.0, "{peak:?}");
    // τ0 is the human rod's only from-memory kinetic value and enters only the Rushton model;
    // the demo runs the rate-limited one (v and K_m confirmed), so no kinetic input is drawn.
    assert!(!with.inputs.iter().any(|i| i.input.text().starts_with("human-rod")), "{:?}", with.inputs);
    assert!(with.inputs.iter().any(|i| i.input.text() == "eye: rod quantum efficiency"));
    assert!(figure(&with.bleach, &Figure::RecoveryTo90).summary.mean.is_some());
}

fn dark_adaptation_file() -> String {
    let dir = std::env::temp_dir().join(format!("retidose-uncertainty-figures-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join("d.toml");
    std::fs::write(&p, demo("dark-adaptation").unwrap()).unwrap();
    p.to_str().unwrap().to_string()
}

#[test]
fn the_figures_json_repeats_on_one_and_two_threads() {
    let f = dark_adaptation_file();
    let args = [
        "uncertainty",
        f.as_str(),
        "--figures",
        "all",
        "--reading",
        "5%",
        "--pupil",
        "0.3 mm",
        "--draws",
        "20000",
        "--bleach-draws",
        "10000",
        "--seed",
        "3",
        "--format",
        "json",
    ];
    let on = |threads: &str| {
        let out = retidose().env("RAYON_NUM_THREADS", threads).args(args).assert().success();
        String::from_utf8(out.get_output().stdout.clone()).unwrap()
    };
    let one = on("1");
    assert_eq!(one, on("1"));
    assert_eq!(one, on("2"));
    let v: serde_json::Value = serde_json::from_str(&one).unwrap();
    assert_eq!(v["schema"], "retidose.uncertainty/2");
    assert!(v["figures"]["retina"].as_array().is_some_and(|a| !a.is_empty()));
    assert!(v["figures"]["rod_rate"]["recommended"].is_number(), "{}", v["figures"]["rod_rate"]);
    assert!(v["skipped"][0].as_str().is_some_and(|t| t.contains("no distance")), "{}", v["skipped"]);
}

/// The room figures under the reading alone: room lux is linear in the reading's factor k, so
/// by the GUM law of propagation (JCGM 100:2008 eq. 10) the brightest position has mean L₀ and
/// u = L₀·u(k); the in-range count at the nominal is the dimming lever's count at factor 1
/// (retidose::housing::lever::dimming, the engine's own count).
#[test]
fn room_figures_follow_the_reading() {
    let s = parse_scenario_file(demo("vivarium").unwrap(), "demo", None).unwrap();
    let u = 0.1;
    let req = FiguresRequest {
        scenario: &s,
        index: 0,
        inputs: &InputUncertainties { reading_relative: u, ..none() },
        parameters: false,
        retina_draws: Some(DRAWS),
        bleach_draws: None,
        seed: 6,
    };
    let r = assess_figures(&req).unwrap();
    let a = retidose::assess::assess(&s).unwrap();
    let plan = &a.room.as_ref().unwrap().rows.0;
    let racks = retidose::housing::lever::dimming(plan, &[1.0]);
    assert!(!racks.is_empty());
    for rack in &racks {
        let x = figure(&r.room, &Figure::InRange(rack.rack.clone()));
        assert_eq!(x.summary.nominal, rack.points[0].counts.in_range as f64, "{}", rack.rack);
    }
    let b = figure(&r.room, &Figure::BrightestLux);
    let (l0, m) = (b.summary.nominal, DRAWS as f64);
    let sigma = l0 * u;
    assert!((b.summary.mean.unwrap() - l0).abs() < 4.0 * sigma / m.sqrt());
    assert!((b.summary.standard_uncertainty.unwrap() - sigma).abs() < 4.0 * sigma / (2.0 * (m - 1.0)).sqrt());
    let d = figure(&r.room, &Figure::DimmestLux);
    assert!(d.summary.nominal > 0.0 && d.summary.nominal < l0);
}

// ---- the meter's class (DIN 5032-7) and the subject's age ----

use retidose::uncertainty::meter::{MeterClass, ReadingUncertainty};
use retidose::uncertainty::{AGE_INPUT, assess_figures_with_age};

/// Class B's total error limit, a = 10 % (DIN 5032-7:1985-12, table of meter classes, as
/// reproduced in the MX-Elektronik Minilux manual), read as the half-width of a rectangular
/// distribution: u = a/√3 (JCGM 100:2008 §4.3.7). Every limit ratio is linear in the reading
/// factor k, ratio = r₀·k, so the GUM law of propagation (JCGM 100:2008 eq. 10,
/// u²_c(y) = Σ (∂f/∂x_i)² u²(x_i), here one input with ∂f/∂k = r₀) gives u(ratio) = r₀·a/√3.
/// Monte Carlo standard errors: σ/√M for the mean, σ/√(2(M − 1)) for u; bounds 4 of them.
#[test]
fn a_class_b_meter_gives_a_rectangular_u_and_the_law_of_propagation() {
    let a = 0.10;
    let u_k = a / 3f64.sqrt();
    let reading = ReadingUncertainty::settle(0.0, Some(MeterClass::B)).unwrap();
    assert!((reading.relative - u_k).abs() < 1e-15, "{reading:?}");
    assert_eq!(reading.class.as_ref().unwrap().total_error, a);
    let r = run(&InputUncertainties { reading_relative: reading.relative, ..none() }, 13);
    let m = DRAWS as f64;
    assert!(r.hazards.len() >= 4);
    for h in &r.hazards {
        let sigma = h.nominal * u_k;
        assert!((h.mean - h.nominal).abs() < 4.0 * sigma / m.sqrt(), "{}: mean {}", h.id, h.mean);
        let se = sigma / (2.0 * (m - 1.0)).sqrt();
        assert!(
            (h.standard_uncertainty - sigma).abs() < 4.0 * se,
            "{}: u {} vs {sigma}",
            h.id,
            h.standard_uncertainty
        );
    }
    // The flag gives the same u: the JSON says which class and the u it gives.
    let f = scenario_file();
    let args =
        ["uncertainty", f.as_str(), "--source", "stimulus", "--reading-class", "B", "--figures", "limits"];
    let mut json = args.to_vec();
    json.extend(["--draws", "2000", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_str(&stdout(&json)).unwrap();
    assert_eq!(v["reading_class"]["class"]["class"], "B", "{}", v["reading_class"]);
    assert_eq!(v["reading_class"]["class"]["total_error"], 0.1, "{}", v["reading_class"]);
    assert!((v["reading_class"]["relative"].as_f64().unwrap() - u_k).abs() < 1e-15);
    let mut text = args.to_vec();
    text.extend(["--draws", "2000"]);
    let t = stdout(&text);
    assert!(t.contains("class B meter") && t.contains("u = a/√3 = 5.774 %"), "{t}");
}

/// With --reading and --reading-class both given, the larger u is used (the safe side):
/// class B gives 0.10/√3 = 0.05774.
#[test]
fn with_both_reading_flags_the_larger_u_is_used() {
    let b = 0.10 / 3f64.sqrt();
    let small = ReadingUncertainty::settle(0.03, Some(MeterClass::B)).unwrap();
    assert!((small.relative - b).abs() < 1e-15, "{small:?}");
    assert!(small.text().unwrap().contains("the class's, the larger, 5.774 %, is used (safe side)"));
    let large = ReadingUncertainty::settle(0.08, Some(MeterClass::B)).unwrap();
    assert_eq!(large.relative, 0.08);
    assert!(large.text().unwrap().contains("the declared, the larger, 8.000 %"));
    assert_eq!(ReadingUncertainty::settle(0.04, None).unwrap().relative, 0.04);
    let f = scenario_file();
    let t = stdout(&[
        "uncertainty",
        f.as_str(),
        "--source",
        "stimulus",
        "--reading",
        "8%",
        "--reading-class",
        "b",
        "--figures",
        "limits",
        "--draws",
        "2000",
        "--format",
        "json",
    ]);
    let v: serde_json::Value = serde_json::from_str(&t).unwrap();
    assert_eq!(v["reading_class"]["relative"], 0.08, "{t}");
    assert_eq!(v["reading_class"]["declared"], 0.08, "{t}");
    let out = retidose()
        .args(["uncertainty", f.as_str(), "--source", "stimulus", "--reading-class", "D"])
        .assert()
        .code(2);
    let err = String::from_utf8(out.get_output().stderr.clone()).unwrap();
    assert!(err.contains("--reading-class") && err.contains("L, A, B or C"), "{err}");
}

fn aged(s: &Scenario, age: Option<f64>, draws: usize) -> Vec<FigureUncertainty> {
    let req = FiguresRequest {
        scenario: s,
        index: 0,
        inputs: &InputUncertainties { reading_relative: 0.02, ..none() },
        parameters: false,
        retina_draws: Some(draws),
        bleach_draws: None,
        seed: 21,
    };
    let years = age.map(|y| retidose::base::quantity::Time::from_si(y * 365.25 * 86_400.0));
    assess_figures_with_age(&req, years).unwrap().retina
}

/// The subject's age (28 y in the dark-adaptation demo, u = 5 y) leaves every nominal figure as
/// it was and widens the spectral rod rate's interval. Its size, by the GUM law of
/// propagation (JCGM 100:2008 eq. 10) with the age alone: u(R) = |∂R/∂A|·u(A), ∂R/∂A by the
/// engine's central difference over 28 ± 1 y. Bound 3 %, the sum of (measured once, seed 22 to
/// 26: the Monte Carlo gave 0.990–0.993 of u_GUM): the parabola through the runs at 18, 28 and
/// 38 y, whose slope at 28 y is the chord's, 1.3 % below the engine's (the media density of van
/// de Kraats & van Norren 2007 is quadratic in A, the transmittance 10^(−D) is not); the
/// curvature, which adds 2c²u⁴ to the variance (+0.45 % in u here); and 4 Monte Carlo standard
/// errors of u, 4/√(2M) = 0.9 % at M = 10⁵.
/// Trolands and the melanopic EDI do not pass the media (fixed 7 mm pupil): share 0.
#[test]
fn the_age_widens_the_media_figures_only() {
    let s = parse_scenario_file(demo("dark-adaptation").unwrap(), "demo", None).unwrap();
    let without = aged(&s, None, 20_000);
    let with = aged(&s, Some(5.0), 20_000);
    for (a, b) in without.iter().zip(&with) {
        assert_eq!(a.summary.nominal, b.summary.nominal, "{:?}", a.figure);
    }
    let width = |l: &[FigureUncertainty], f: &Figure| {
        let i = figure(l, f).summary.interval;
        i.1.unwrap() - i.0.unwrap()
    };
    assert!(width(&with, &Figure::RodRate) > 1.2 * width(&without, &Figure::RodRate));
    for f in [Figure::PhotopicTrolands, Figure::MelanopicEdi] {
        let share = figure(&with, &f).summary.shares.iter().find(|(i, _)| i.text() == AGE_INPUT).unwrap().1;
        assert!(share.abs() < 1e-12, "{f:?}: {share}");
    }
    // The law of propagation for the age alone.
    let rate = |years: f64| {
        let mut only = s.clone();
        only.view.age = Some(retidose::base::quantity::Time::from_si(years * 365.25 * 86_400.0));
        let r = assess_retina(&only.view).unwrap();
        r.sources[0].retinal.as_ref().unwrap().catch.iter().find(|c| c.receptor == "rod").unwrap().rate.si()
    };
    let slope = (rate(29.0) - rate(27.0)) / 2.0;
    let req = FiguresRequest {
        scenario: &s,
        index: 0,
        inputs: &none(),
        parameters: false,
        retina_draws: Some(DRAWS),
        bleach_draws: None,
        seed: 22,
    };
    let r =
        assess_figures_with_age(&req, Some(retidose::base::quantity::Time::from_si(5.0 * 365.25 * 86_400.0)))
            .unwrap();
    let u_mc = figure(&r.retina, &Figure::RodRate).summary.standard_uncertainty.unwrap();
    let u_gum = slope.abs() * 5.0;
    assert!((u_mc / u_gum - 1.0).abs() < 0.03, "Monte Carlo {u_mc} vs GUM {u_gum}");
    assert!(r.notes.iter().any(|n| n.contains("no limit ratio depends on it")), "{:?}", r.notes);
}

/// A rodent has no age model (the media model of a rat or mouse is a cut-off edge): --age is an
/// error naming the flag.
#[test]
fn age_for_a_rodent_is_an_error_naming_the_flag() {
    let s = parse_scenario_file(demo("vivarium").unwrap(), "demo", None).unwrap();
    let req = FiguresRequest {
        scenario: &s,
        index: 0,
        inputs: &none(),
        parameters: false,
        retina_draws: Some(100),
        bleach_draws: None,
        seed: 1,
    };
    let year = retidose::base::quantity::Time::from_si(5.0 * 365.25 * 86_400.0);
    let e = assess_figures_with_age(&req, Some(year)).unwrap_err();
    assert!(e.message().contains("human only"), "{}", e.message());
    let dir = std::env::temp_dir().join(format!("retidose-uncertainty-age-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join("v.toml");
    std::fs::write(&p, demo("vivarium").unwrap()).unwrap();
    let out = retidose()
        .args([
            "uncertainty",
            p.to_str().unwrap(),
            "--source",
            "panels",
            "--figures",
            "retina",
            "--age",
            "5 y",
        ])
        .assert()
        .code(2);
    let err = String::from_utf8(out.get_output().stderr.clone()).unwrap();
    assert!(err.contains("--age") && err.contains("human only"), "{err}");
}

#[test]
fn the_retina_json_carries_the_recommended_rod_rate_between_its_routes() {
    // The rule written again: √(lowest × highest route), the highest route the safe side.
    let out = retidose()
        .args(["retina", "cie:D65", "--luminance", "100 cd/m2", "--subtense", "20 deg", "--species", "human"])
        .args(["--pupil", "3 mm", "--format", "json"])
        .assert()
        .success();
    let v: serde_json::Value = serde_json::from_slice(&out.get_output().stdout).unwrap();
    let r = &v["sources"][0]["retina"]["rod_rate_recommended"];
    let rates: Vec<f64> =
        r["routes"].as_array().unwrap().iter().map(|x| x["rate"].as_f64().unwrap()).collect();
    assert!(rates.len() >= 3, "{r}");
    let (lo, hi) = rates.iter().fold((f64::MAX, 0.0f64), |(a, b), &x| (a.min(x), b.max(x)));
    let rec = r["recommended"].as_f64().unwrap();
    assert!((rec - (lo * hi).sqrt()).abs() <= 1e-9 * rec, "{rec} vs √({lo}·{hi})");
    assert_eq!(r["safe_side"].as_f64().unwrap(), hi);
}

#[test]
fn the_uncertainty_table_carries_the_cautions_that_apply() {
    // Limit ratios were sampled, so the human-limits caution applies; the general deferral always.
    let f = scenario_file();
    let mut args = vec!["uncertainty", f.as_str()];
    args.extend(FLAGS);
    args.extend(["--draws", "2000"]);
    let words = stdout(&args).split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(words.contains("Caution. These limits apply to humans."), "{words}");
    assert!(words.contains("Caution. retidose informs;"), "{words}");
}
