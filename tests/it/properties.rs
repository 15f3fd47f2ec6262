//! Property tests (proptest) for invariants of the spectrum core: linearity of scaling,
//! invariance of integrals under refinement of the grid, additivity over a split, symmetry of
//! the integration rule, and bounds of coverage and band shares. Inputs are finite only.

use proptest::prelude::*;
use retidose::base::curve::Curve;
use retidose::base::quantity::nm;
use retidose::spectrum::generate::{Grid, LedBand, multi_band_led};
use retidose::spectrum::photometry::{photopic, scotopic};
use retidose::spectrum::report::report;
use retidose::spectrum::{Basis, Measure, Spectrum};
use retidose::weighting::alpha_opic::alpha_opic;

/// A random non-negative spectrum on an irregular grid inside 300–900 nm.
fn spectrum() -> impl Strategy<Value = Spectrum> {
    (300.0f64..450.0, prop::collection::vec((0.5f64..12.0, 0.0f64..5.0), 8..80)).prop_map(|(start, steps)| {
        let mut w = Vec::with_capacity(steps.len());
        let mut v = Vec::with_capacity(steps.len());
        let mut x = start;
        for (dx, y) in steps {
            w.push(x);
            v.push(y);
            x += dx;
        }
        Spectrum::new(Curve::new(w, v).unwrap(), Measure::Irradiance, Basis::Energy, "random").unwrap()
    })
}

/// The spectrum's nodes plus extra nodes at fractions of its range.
fn refined(s: &Spectrum, extra: &[f64]) -> Vec<f64> {
    let (lo, hi) = s.range_nm();
    let mut w: Vec<f64> = s.curve().wavelength_nm().to_vec();
    w.extend(extra.iter().map(|f| lo + f * (hi - lo)));
    w.sort_by(f64::total_cmp);
    w.dedup();
    w
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * a.abs().max(b.abs()).max(1e-300)
}

proptest! {
    #[test]
    fn scaling_is_linear(s in spectrum(), k in 1e-6f64..1e6) {
        let t = s.scaled_as(k, Measure::Irradiance).unwrap();
        prop_assert!(close(photopic(&t).raw, k * photopic(&s).raw, 1e-12));
        prop_assert!(close(scotopic(&t).raw, k * scotopic(&s).raw, 1e-12));
        for (a, b) in alpha_opic(&s).iter().zip(alpha_opic(&t)) {
            let (x, _) = a.quantity.unwrap().si_with_unit();
            let (y, _) = b.quantity.unwrap().si_with_unit();
            prop_assert!(close(y, k * x, 1e-12));
            if let (Some(d1), Some(d2)) = (a.der, b.der) {
                prop_assert!(close(d1, d2, 1e-9), "DER must not change with scale");
            }
        }
    }

    #[test]
    fn refining_the_grid_keeps_the_plain_integral_exactly(s in spectrum(), extra in prop::collection::vec(0.0f64..1.0, 1..40)) {
        // Adding nodes where the spectrum is linearly interpolated leaves ∫X dλ unchanged: the
        // trapezoid rule integrates the piecewise-linear interpolant exactly (1e-12 relative).
        let fine = s.resampled(&refined(&s, &extra)).unwrap();
        prop_assert!(close(fine.integral(), s.integral(), 1e-12));
    }

    #[test]
    fn refining_a_smooth_spectrum_keeps_weighted_integrals(
        bands in prop::collection::vec((420.0f64..680.0, 40.0f64..120.0, 0.1f64..1.0), 1..4),
        extra in prop::collection::vec(0.0f64..1.0, 1..200),
    ) {
        // A smooth spectrum (Ohno LED bands 40–120 nm wide, 5 nm grid) resampled onto a finer
        // grid: weighted integrals (V, V′, the α-opic functions, all ≤ 1) change by less than
        // 1e-4 of the spectrum's unweighted total, the size of the trapezoid rule's error on a
        // product of two linear interpolants at 5 nm.
        let bands: Vec<LedBand> = bands.into_iter().map(|(p, w, r)| LedBand { peak: nm(p), width: nm(w), ratio: r }).collect();
        let s = multi_band_led(&bands, Grid::nm(360.0, 830.0, 5.0)).unwrap().declared_as(Measure::Irradiance, Basis::Energy);
        let fine = s.resampled(&refined(&s, &extra)).unwrap();
        let tol = 1e-4 * s.integral();
        prop_assert!((photopic(&fine).raw - photopic(&s).raw).abs() <= 683.002 * tol);
        prop_assert!((scotopic(&fine).raw - scotopic(&s).raw).abs() <= 1700.06 * tol);
        for (a, b) in alpha_opic(&s).iter().zip(alpha_opic(&fine)) {
            let (x, _) = a.quantity.unwrap().si_with_unit();
            let (y, _) = b.quantity.unwrap().si_with_unit();
            prop_assert!((x - y).abs() <= tol, "{}: {x} vs {y}", a.name);
        }
    }

    #[test]
    fn splitting_a_spectrum_and_summing_the_parts(s in spectrum(), at in 1usize..7) {
        let w = s.curve().wavelength_nm();
        let v = s.curve().values();
        let k = at.min(w.len() - 2);
        let part = |r: std::ops::RangeInclusive<usize>| {
            Spectrum::new(Curve::new(w[r.clone()].to_vec(), v[r].to_vec()).unwrap(), Measure::Irradiance, Basis::Energy, "part").unwrap()
        };
        let (a, b) = (part(0..=k), part(k..=w.len() - 1));
        prop_assert!(close(a.integral() + b.integral(), s.integral(), 1e-12));
        prop_assert!(close(photopic(&a).raw + photopic(&b).raw, photopic(&s).raw, 1e-12));
    }

    #[test]
    fn integration_is_symmetric(s in spectrum(), t in spectrum()) {
        prop_assert_eq!(s.curve().product_integral(t.curve()), t.curve().product_integral(s.curve()));
    }

    #[test]
    fn coverage_and_shares_are_bounded(s in spectrum()) {
        let r = report(&s, None);
        for b in &r.bands {
            prop_assert!((0.0..=1.0).contains(&b.coverage.uncovered_weight_share));
            if let Some(x) = b.share {
                prop_assert!((0.0..=1.0 + 1e-12).contains(&x));
            }
        }
        for a in &r.alpha_opic {
            prop_assert!((0.0..=1.0).contains(&a.coverage.uncovered_weight_share));
        }
        prop_assert!((0.0..=1.0).contains(&r.photopic.coverage.uncovered_weight_share));
    }

    #[test]
    fn photon_round_trip(s in spectrum()) {
        let back = s.to_photon().to_energy();
        for (a, b) in s.curve().values().iter().zip(back.curve().values()) {
            prop_assert!((a - b).abs() <= 4.0 * f64::EPSILON * a.abs());
        }
    }
}
