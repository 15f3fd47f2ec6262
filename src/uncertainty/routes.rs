//! The recommended human rod rate (R*/rod/s) where its routes disagree.
//!
//! A human source's rod rate comes by two kinds of route: the spectral route
//! ([`crate::retina::catch`]: the seen spectrum through the media, the rod's template, optical
//! density, aperture and quantum efficiency) and one route per published factor of R*/rod/s per
//! scotopic troland (`[rod_troland_factors]` of `src/data/eyes/human.toml`: Lamb & Pugh 2006,
//! Makous), each times the source's scotopic trolands. They differ by a factor of about 2 to 3
//! because they rest on different pupils, media and collecting areas.
//!
//! Rule: none of the routes is known to be the better one. The spectral route uses the
//! scenario's own spectrum but rests on a from-memory quantum efficiency and a derived aperture;
//! the factors are published but were fitted under particular conditions. So the routes are
//! taken as equally credible estimates of one rate, and
//!
//! - the spread is the span of the routes read as a rectangular distribution of ln R between the
//!   lowest and the highest route (JCGM 100:2008 §4.3.7: only the bounds are known), so the
//!   standard uncertainty of ln R is h/√3 with h = ½·ln(max/min);
//! - the recommended value is the centre of that distribution, √(min·max) (the geometric mean
//!   of the extreme routes: on a log scale a factor between routes counts the same either way),
//!   and the 95 % coverage interval is √(min·max)·exp(±0.95·h), the central 95 % of the
//!   rectangular distribution;
//! - for a bleach or exposure estimate the safe side is the higher rate: the highest route is
//!   given as the value to use there.

use crate::base::quantity::{Frequency, SiValue, as_td_f64};
use crate::retina::report::Retinal;

/// One route to the rod rate.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct RodRoute {
    /// `spectral`, or the factor's key in the eye file.
    pub route: String,
    /// R*/rod/s per scotopic troland, for a factor route.
    pub factor: Option<f64>,
    /// Where the factor is published (empty for the spectral route).
    pub source: String,
    /// The rate by this route.
    pub rate: Frequency,
}

/// The recommended rod rate of one source and its spread (see the module text for the rule).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct RodRateRecommendation {
    /// Source name.
    pub source: String,
    /// Scotopic trolands of the source.
    pub scotopic_td: f64,
    /// Every route.
    pub routes: Vec<RodRoute>,
    /// √(lowest · highest route), the centre of the spread.
    pub recommended: Frequency,
    /// Standard uncertainty of ln R (rectangular between the routes).
    pub log_standard_uncertainty: f64,
    /// The 95 % coverage interval.
    pub interval: (Frequency, Frequency),
    /// The highest route: the value for a bleach or exposure estimate (safe side).
    pub safe_side: Frequency,
}

/// The coverage factor of a rectangular distribution at 95 %: the central 95 % lies within
/// ±0.95 of the half-width.
const RECTANGULAR_95: f64 = 0.95;

/// The recommendation for the retinal quantities of source `label` (a human eye's), when the
/// rod rate comes by at least two routes; `None` with no rod, no factor routes or a zero rate.
pub fn recommended_rod_rate(label: &str, retinal: &Retinal) -> Option<RodRateRecommendation> {
    let rod = retinal.catch.iter().find(|c| c.receptor == "rod")?;
    let mut routes =
        vec![RodRoute { route: "spectral".into(), factor: None, source: String::new(), rate: rod.rate }];
    routes.extend(rod.troland_routes.iter().map(|t| RodRoute {
        route: t.name.clone(),
        factor: Some(t.factor),
        source: t.source.clone(),
        rate: t.rate,
    }));
    let rates: Vec<f64> = routes.iter().map(|r| r.rate.si()).collect();
    let (lo, hi) = rates.iter().fold((f64::MAX, f64::MIN), |(a, b), &r| (a.min(r), b.max(r)));
    if routes.len() < 2 || !(lo > 0.0 && hi.is_finite()) {
        return None;
    }
    let h = 0.5 * (hi / lo).ln();
    let gm = (lo * hi).sqrt();
    Some(RodRateRecommendation {
        source: label.to_string(),
        scotopic_td: as_td_f64(retinal.trolands.scotopic),
        recommended: Frequency::from_si(gm),
        log_standard_uncertainty: h / 3f64.sqrt(),
        interval: (
            Frequency::from_si(gm * (-RECTANGULAR_95 * h).exp()),
            Frequency::from_si(gm * (RECTANGULAR_95 * h).exp()),
        ),
        safe_side: Frequency::from_si(hi),
        routes,
    })
}
