//! The rod threshold after a bleach: the predicted curve, and a least-squares fit of measured
//! thresholds with confidence intervals.
//!
//! **Prediction** (the S2 route of [`crate::pigment::bleach`], with the parameters of the
//! `[dark_adaptation]` table of `src/data/pigments.toml`). E(t) is the log₁₀ threshold above the
//! dark-adapted absolute rod threshold, t the time in darkness after a bleach of fraction B₀:
//!
//! - while the bleached fraction B(t) is above B_break = P/α, the threshold sits on the cone
//!   plateau, E = P;
//! - from the rod–cone break t_b, where B(t_b) = B_break, the rod branch falls at the S2 slope s:
//!   E = P − s·(t − t_b), down to 0 (S3 is not modelled);
//! - after a small bleach (B₀ ≤ B_break) there is no plateau: E = α·B₀ − s·t, down to 0.
//!
//! P = 3.6 log units (cone plateau; Lamb 2016, Eye, PMC4763127, Fig. 2 legend; confirmed),
//! s = 0.24 log units/min (Cameron, Mahroo & Lamb 2006 abstract and PMC2655377; confirmed),
//! α = 20 log units per unit fraction bleached (Dowling 1960; Rushton 1961; from memory), and
//! t_b from the pigment kinetics in darkness ([`crate::pigment::kinetics::dark_time_to`],
//! rate-limited by default). These parameters are for human rods.
//!
//! **Fit** ([`fit_threshold`]): the same hinge, E(t) = P for t ≤ t_b and P − s·(t − t_b) after,
//! with P, s and t_b free, fitted by least squares: for a fixed t_b the model is linear in
//! (P, s) and solved in closed form; t_b is found by a scan over the data's times and refined by
//! golden-section search on that profile. The covariance is σ²(JᵀJ)⁻¹ with J the Jacobian at
//! the optimum and σ² = SSE/(n − 3); the 95 % intervals use Student's t with n − 3 degrees of
//! freedom (exact finite series for integer degrees of freedom, Abramowitz & Stegun 26.7.3–4).
//! When fewer than two points lie at or before the fitted break (no plateau seen), the straight
//! line E = a − s·t is fitted instead, with n − 2 degrees of freedom.

use crate::base::error::{Error, Result};
use crate::base::quantity::{Frequency, SiValue, Time};
use crate::pigment::kinetics::{Model, Pigment, builtin_pigments, dark_time_to};
use crate::retina::eye::{Species, Status};

/// The most samples a predicted curve may hold.
pub const MAX_SAMPLES: usize = 100_000;

/// A predicted rod threshold against time after a bleach.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ThresholdCurve {
    /// Receptor id of the kinetics used for the break (`human-rod`).
    pub receptor: String,
    /// Kinetic model used for the break.
    pub model: Model,
    /// Bleached fraction at the start of darkness, B₀.
    pub bleach: f64,
    /// Cone plateau P, log units above absolute rod threshold.
    pub plateau: f64,
    /// Bleached fraction at the rod–cone break, B_break = P/α.
    pub break_bleach: f64,
    /// The rod–cone break t_b; `None` after a bleach too small for a plateau (B₀ ≤ B_break).
    pub break_time: Option<Time>,
    /// S2 slope, log units (decades) per second.
    pub s2_slope: Frequency,
    /// When the model curve reaches the absolute threshold (E = 0).
    pub to_absolute: Time,
    /// Samples (time after the bleach, log threshold elevation), uniform from 0.
    pub samples: Vec<(Time, f64)>,
    /// The model and its parameters with their status.
    pub basis: String,
}

impl ThresholdCurve {
    /// The model's log threshold elevation at `t` after the bleach.
    pub fn at(&self, t: Time) -> f64 {
        let s = self.s2_slope.si();
        match self.break_time {
            Some(tb) if t.si() <= tb.si() => self.plateau,
            Some(tb) => (self.plateau - s * (t.si() - tb.si())).max(0.0),
            None => {
                let alpha = self.plateau / self.break_bleach;
                (alpha * self.bleach - s * t.si()).max(0.0)
            }
        }
    }
}

/// The human rod pigment and model for a species' threshold curve.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a rodent: the `[dark_adaptation]` parameters are for
/// human rods.
pub fn threshold_pigment(species: Species) -> Result<Pigment> {
    match species {
        Species::Human => crate::pigment::kinetics::find_pigment("human-rod"),
        other => Err(Error::input(format!(
            "no rod threshold model for the {}: the dark-adaptation parameters in src/data/pigments.toml (S2 slope, \
             cone plateau, Dowling–Rushton α) are for human rods",
            other.name()
        ))),
    }
}

/// The predicted rod threshold after a bleach of fraction `bleach`, sampled at `samples`
/// evenly spaced times from 0 to `until`, with the break from `pigment`'s dark kinetics.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for a bleach outside [0, 1], a time not above 0 or not
/// finite, or fewer than 2 or more than [`MAX_SAMPLES`] samples.
pub fn predict_threshold(
    pigment: &Pigment,
    model: Model,
    bleach: f64,
    until: Time,
    samples: usize,
) -> Result<ThresholdCurve> {
    if !(0.0..=1.0).contains(&bleach) {
        return Err(Error::input(format!("bleached fraction {bleach} must be between 0 and 1")));
    }
    let end = until.si();
    if !(end > 0.0 && end.is_finite()) {
        return Err(Error::input(format!("the time range {end} s must be above 0 s")));
    }
    if !(2..=MAX_SAMPLES).contains(&samples) {
        return Err(Error::input(format!("{samples} samples: give between 2 and {MAX_SAMPLES}")));
    }
    let da = &builtin_pigments().dark_adaptation;
    let (plateau, alpha, slope) =
        (da.cone_plateau.value, da.dowling_rushton_alpha.value, da.s2_slope.value.si());
    let break_bleach = plateau / alpha;
    let c = pigment.constants();
    let break_time = (bleach > break_bleach)
        .then(|| dark_time_to(model, c, bleach, break_bleach).unwrap_or(0.0))
        .map(Time::from_si);
    let to_absolute = match break_time {
        Some(tb) => tb.si() + plateau / slope,
        None => alpha * bleach / slope,
    };
    let mut curve = ThresholdCurve {
        receptor: pigment.id.clone(),
        model,
        bleach,
        plateau,
        break_bleach,
        break_time,
        s2_slope: da.s2_slope.value,
        to_absolute: Time::from_si(to_absolute),
        samples: Vec::new(),
        basis: format!(
            "cone plateau P = {plateau} log units ({}) until the bleached fraction falls to P/α = {} (α = {alpha}, {}; \
             {} kinetics of {}), then the S2 slope {} log units/min ({}) down to absolute threshold; S3 not modelled",
            da.cone_plateau.status,
            crate::base::units::sig4(break_bleach),
            da.dowling_rushton_alpha.status,
            model.name(),
            pigment.id,
            crate::base::units::tidy(slope * 60.0),
            da.s2_slope.status
        ),
    };
    let step = end / (samples - 1) as f64;
    curve.samples = (0..samples)
        .map(|i| {
            let t = Time::from_si(if i == samples - 1 { end } else { i as f64 * step });
            (t, curve.at(t))
        })
        .collect();
    Ok(curve)
}

/// A fitted parameter: value, standard error and 95 % confidence interval.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Estimate<T> {
    /// Least-squares value.
    pub value: T,
    /// Standard error, from σ²(JᵀJ)⁻¹.
    pub standard_error: T,
    /// Lower end of the 95 % interval.
    pub low: T,
    /// Upper end of the 95 % interval.
    pub high: T,
}

impl<T: SiValue + Copy> Estimate<T> {
    /// Whether `x` lies within the 95 % interval.
    pub fn contains(&self, x: T) -> bool {
        self.low.si() <= x.si() && x.si() <= self.high.si()
    }

    fn new(value: f64, se: f64, t: f64) -> Estimate<T> {
        Estimate {
            value: T::from_si(value),
            standard_error: T::from_si(se),
            low: T::from_si(value - t * se),
            high: T::from_si(value + t * se),
        }
    }
}

impl SiValue for Plain {
    fn from_si(value: f64) -> Self {
        Plain(value)
    }
    fn si(&self) -> f64 {
        self.0
    }
}

/// A dimensionless value (log units) in an [`Estimate`].
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Plain(pub f64);

/// The fit of measured thresholds.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ThresholdFit {
    /// Cone plateau P, log units (`None` when no plateau was seen).
    pub plateau: Option<Estimate<Plain>>,
    /// Rod–cone break t_b (`None` when no plateau was seen).
    pub break_time: Option<Estimate<Time>>,
    /// S2 slope s, log units per second.
    pub s2_slope: Estimate<Frequency>,
    /// Intercept a of the rod branch E = a − s·t at t = 0 (a = P + s·t_b with a plateau).
    pub intercept: Estimate<Plain>,
    /// Residual standard deviation σ = √(SSE/(n − p)), log units.
    pub residual_sd: f64,
    /// Number of points.
    pub points: usize,
    /// Degrees of freedom n − p.
    pub degrees_of_freedom: usize,
    /// Student's t quantile used for the 95 % intervals.
    pub t_quantile: f64,
    /// The model fitted, in words.
    pub model: String,
}

/// Fits the rod-threshold hinge (cone plateau, rod–cone break, S2 slope) to measured
/// `(time after the bleach, log threshold)` points by least squares (see the module text).
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] for fewer than 4 points, a time or threshold not finite,
/// a negative time, all points at one time, or a fit with no points after the break.
pub fn fit_threshold(data: &[(Time, f64)]) -> Result<ThresholdFit> {
    if data.len() < 4 {
        return Err(Error::input(format!(
            "{} points: a threshold fit needs at least 4 (plateau, break and S2 slope, with one degree of freedom)",
            data.len()
        )));
    }
    // Work in minutes, which keeps the normal equations well scaled.
    let mut pts: Vec<(f64, f64)> = Vec::with_capacity(data.len());
    for (i, (t, e)) in data.iter().enumerate() {
        let m = t.si() / 60.0;
        if !(m.is_finite() && m >= 0.0 && e.is_finite()) {
            return Err(Error::input(format!(
                "point {}: time {} s and log threshold {e} must be finite, the time ≥ 0",
                i + 1,
                t.si()
            )));
        }
        pts.push((m, *e));
    }
    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
    let (t_first, t_last) = (pts[0].0, pts[pts.len() - 1].0);
    if t_last <= t_first {
        return Err(Error::input("every point is at the same time: nothing to fit a slope to"));
    }
    // Profile: for each break, the best (P, s) and the SSE; scan the distinct times, then refine.
    let mut times: Vec<f64> = pts.iter().map(|p| p.0).collect();
    times.dedup();
    let mut best: Option<(f64, f64)> = None;
    for w in times.windows(2) {
        for tb in [w[0], 0.5 * (w[0] + w[1])] {
            if let Some((_, _, sse)) = hinge_given_break(&pts, tb)
                && best.is_none_or(|b| sse < b.1)
            {
                best = Some((tb, sse));
            }
        }
    }
    let line = line_fit(&pts);
    let Some((tb0, _)) = best else { return line_result(&pts, line) };
    // Golden-section refinement between the data times either side of the scan's best.
    let lo = times.iter().copied().filter(|t| *t < tb0).fold(t_first, f64::max);
    let hi = times.iter().copied().filter(|t| *t > tb0).fold(t_last, f64::min);
    let tb = golden_min(|tb| hinge_given_break(&pts, tb).map_or(f64::INFINITY, |r| r.2), lo, hi, tb0);
    let (p, s, _) = hinge_given_break(&pts, tb).ok_or_else(|| Error::input("no points after the break"))?;
    // Fewer than two points on the plateau: no plateau seen; fit the line.
    if pts.iter().filter(|q| q.0 <= tb).count() < 2 {
        return line_result(&pts, line);
    }
    let n = pts.len();
    let dof = n - 3;
    let resid: Vec<f64> = pts.iter().map(|&(t, e)| e - hinge(p, s, tb, t)).collect();
    let sse: f64 = resid.iter().map(|r| r * r).sum();
    let sigma2 = sse / dof as f64;
    // Jacobian columns: ∂E/∂P = 1, ∂E/∂s = −(t − t_b)₊, ∂E/∂t_b = s·[t > t_b].
    let rows: Vec<[f64; 3]> =
        pts.iter().map(|&(t, _)| if t > tb { [1.0, -(t - tb), s] } else { [1.0, 0.0, 0.0] }).collect();
    let jtj = gram(&rows);
    let inv = invert3(jtj).ok_or_else(|| {
        Error::input("the break is not determined by these points (too few on each side of it)")
    })?;
    let cov = inv.map(|r| r.map(|x| x * sigma2));
    let tq = student_t_95(dof);
    let se = |i: usize| cov[i][i].max(0.0).sqrt();
    // a = P + s t_b; gradient (1, t_b, s).
    let g = [1.0, tb, s];
    let var_a: f64 = (0..3).map(|i| (0..3).map(|j| g[i] * cov[i][j] * g[j]).sum::<f64>()).sum();
    Ok(ThresholdFit {
        plateau: Some(Estimate::new(p, se(0), tq)),
        break_time: Some(Estimate::new(tb * 60.0, se(2) * 60.0, tq)),
        s2_slope: Estimate::new(s / 60.0, se(1) / 60.0, tq),
        intercept: Estimate::new(p + s * tb, var_a.max(0.0).sqrt(), tq),
        residual_sd: sigma2.sqrt(),
        points: n,
        degrees_of_freedom: dof,
        t_quantile: tq,
        model: "E(t) = P for t ≤ t_b, P − s·(t − t_b) after (cone plateau, rod–cone break, S2 slope), least squares"
            .to_string(),
    })
}

/// The hinge model's value.
fn hinge(p: f64, s: f64, tb: f64, t: f64) -> f64 {
    p - s * (t - tb).max(0.0)
}

/// The least-squares (P, s) for a fixed break and the SSE; `None` with fewer than one point on
/// the plateau or two after the break (minutes).
fn hinge_given_break(pts: &[(f64, f64)], tb: f64) -> Option<(f64, f64, f64)> {
    let after = pts.iter().filter(|p| p.0 > tb).count();
    if after < 2 || after == pts.len() {
        return None;
    }
    // E = P − s·x with x = (t − t_b)₊: ordinary least squares on (1, −x).
    let n = pts.len() as f64;
    let (sx, sy, sxx, sxy) = pts.iter().fold((0.0, 0.0, 0.0, 0.0), |a, &(t, e)| {
        let x = (t - tb).max(0.0);
        (a.0 + x, a.1 + e, a.2 + x * x, a.3 + x * e)
    });
    let det = n * sxx - sx * sx;
    if det <= 0.0 {
        return None;
    }
    let slope = (n * sxy - sx * sy) / det; // dE/dx = −s
    let p = (sy - slope * sx) / n;
    let s = -slope;
    let sse = pts.iter().map(|&(t, e)| (e - hinge(p, s, tb, t)).powi(2)).sum();
    Some((p, s, sse))
}

/// Ordinary least-squares line E = a − s·t (minutes): (a, s).
fn line_fit(pts: &[(f64, f64)]) -> (f64, f64) {
    let n = pts.len() as f64;
    let (sx, sy, sxx, sxy) =
        pts.iter().fold((0.0, 0.0, 0.0, 0.0), |a, &(t, e)| (a.0 + t, a.1 + e, a.2 + t * t, a.3 + t * e));
    let b = (n * sxy - sx * sy) / (n * sxx - sx * sx);
    ((sy - b * sx) / n, -b)
}

/// The straight-line result (no plateau seen).
fn line_result(pts: &[(f64, f64)], (a, s): (f64, f64)) -> Result<ThresholdFit> {
    let n = pts.len();
    let dof = n - 2;
    let sse: f64 = pts.iter().map(|&(t, e)| (e - (a - s * t)).powi(2)).sum();
    let sigma2 = sse / dof as f64;
    let nf = n as f64;
    let mean_t = pts.iter().map(|p| p.0).sum::<f64>() / nf;
    let sxx: f64 = pts.iter().map(|p| (p.0 - mean_t).powi(2)).sum();
    let se_s = (sigma2 / sxx).sqrt();
    let se_a = (sigma2 * (1.0 / nf + mean_t * mean_t / sxx)).sqrt();
    let tq = student_t_95(dof);
    Ok(ThresholdFit {
        plateau: None,
        break_time: None,
        s2_slope: Estimate::new(s / 60.0, se_s / 60.0, tq),
        intercept: Estimate::new(a, se_a, tq),
        residual_sd: sigma2.sqrt(),
        points: n,
        degrees_of_freedom: dof,
        t_quantile: tq,
        model: "E(t) = a − s·t (rod branch only: no cone plateau before the first point), least squares"
            .to_string(),
    })
}

/// Golden-section minimum of `f` on [lo, hi], starting from the scan's best `x0`.
fn golden_min(f: impl Fn(f64) -> f64, lo: f64, hi: f64, x0: f64) -> f64 {
    let g = 0.5 * (5f64.sqrt() - 1.0);
    let (mut a, mut b) = (lo, hi);
    let mut c = b - g * (b - a);
    let mut d = a + g * (b - a);
    let (mut fc, mut fd) = (f(c), f(d));
    for _ in 0..200 {
        if (b - a).abs() <= 1e-12 * (1.0 + a.abs()) {
            break;
        }
        if fc < fd {
            b = d;
            d = c;
            fd = fc;
            c = b - g * (b - a);
            fc = f(c);
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + g * (b - a);
            fd = f(d);
        }
    }
    let x = 0.5 * (a + b);
    if f(x) <= f(x0) { x } else { x0 }
}

/// JᵀJ of 3-column rows.
fn gram(rows: &[[f64; 3]]) -> [[f64; 3]; 3] {
    let mut m = [[0.0; 3]; 3];
    for r in rows {
        for i in 0..3 {
            for j in 0..3 {
                m[i][j] += r[i] * r[j];
            }
        }
    }
    m
}

/// The inverse of a symmetric 3 × 3 matrix by cofactors; `None` when (near) singular.
fn invert3(m: [[f64; 3]; 3]) -> Option<[[f64; 3]; 3]> {
    let c = |i: usize, j: usize| {
        let (r0, r1) = ((i + 1) % 3, (i + 2) % 3);
        let (c0, c1) = ((j + 1) % 3, (j + 2) % 3);
        m[r0][c0] * m[r1][c1] - m[r0][c1] * m[r1][c0]
    };
    let det = m[0][0] * c(0, 0) + m[0][1] * c(0, 1) + m[0][2] * c(0, 2);
    let scale = m.iter().flatten().fold(0.0f64, |a, x| a.max(x.abs()));
    if det.is_nan() || det.abs() <= 1e-12 * scale.powi(3) {
        return None;
    }
    let mut out = [[0.0; 3]; 3];
    for (i, row) in out.iter_mut().enumerate() {
        for (j, x) in row.iter_mut().enumerate() {
            *x = c(j, i) / det;
        }
    }
    Some(out)
}

/// P(|T| ≤ t) for Student's t with `nu` ≥ 1 degrees of freedom (Abramowitz & Stegun 26.7.3
/// and 26.7.4, exact for integer ν).
pub fn student_t_two_sided(t: f64, nu: usize) -> f64 {
    let theta = (t / (nu as f64).sqrt()).atan();
    let (s, c) = theta.sin_cos();
    let c2 = c * c;
    if nu % 2 == 1 {
        let mut sum = 0.0;
        if nu > 1 {
            let mut term = c;
            sum = term;
            let mut k = 2;
            while k < nu - 1 {
                term *= c2 * k as f64 / (k + 1) as f64;
                sum += term;
                k += 2;
            }
        }
        2.0 / std::f64::consts::PI * (theta + s * sum)
    } else {
        let mut term = 1.0;
        let mut sum = 1.0;
        let mut k = 1;
        while k < nu - 1 {
            term *= c2 * k as f64 / (k + 1) as f64;
            sum += term;
            k += 2;
        }
        s * sum
    }
}

/// The two-sided 95 % quantile of Student's t with `nu` degrees of freedom (t₀.₉₇₅,ν).
pub fn student_t_95(nu: usize) -> f64 {
    let nu = nu.max(1);
    let (mut lo, mut hi) = (0.0f64, 1000.0f64);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if student_t_two_sided(mid, nu) < 0.95 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-13 {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// Reads measured thresholds from CSV text with the columns `time_min,log_threshold` (a header
/// line is optional; blank lines and lines starting with `#` are skipped).
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming `origin`, the line and the field: a wrong number of
/// fields, a field that is not a finite number, a negative time, or no data at all.
pub fn parse_threshold_csv(text: &str, origin: &str) -> Result<Vec<(Time, f64)>> {
    let mut out = Vec::new();
    let mut header_seen = false;
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        let l = raw.trim().trim_start_matches('\u{feff}');
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let fields: Vec<&str> = l.split(',').map(str::trim).collect();
        if !header_seen && out.is_empty() && fields.first().is_some_and(|f| f.parse::<f64>().is_err()) {
            if fields != ["time_min", "log_threshold"] {
                return Err(Error::data(format!(
                    "{origin}:{line}: header '{l}' should be 'time_min,log_threshold'"
                )));
            }
            header_seen = true;
            continue;
        }
        if fields.len() != 2 {
            return Err(Error::data(format!(
                "{origin}:{line}: {} fields; expected 2, time_min,log_threshold",
                fields.len()
            )));
        }
        let number = |k: usize, name: &str| -> Result<f64> {
            let f = fields[k];
            match f.parse::<f64>() {
                Ok(v) if v.is_finite() => Ok(v),
                _ => Err(Error::data(format!(
                    "{origin}:{line}: field '{name}' (column {}): '{f}' is not a finite number",
                    k + 1
                ))),
            }
        };
        let t = number(0, "time_min")?;
        if t < 0.0 {
            return Err(Error::data(format!(
                "{origin}:{line}: field 'time_min' (column 1): {t} is negative; minutes after the bleach are ≥ 0"
            )));
        }
        out.push((Time::from_si(t * 60.0), number(1, "log_threshold")?));
    }
    if out.is_empty() {
        return Err(Error::data(format!("{origin}: no data lines (time_min,log_threshold)")));
    }
    Ok(out)
}

/// Status of the threshold model's parameters, the weakest first.
pub fn parameter_statuses() -> [(&'static str, Status); 3] {
    let da = &builtin_pigments().dark_adaptation;
    [
        ("Dowling–Rushton α", da.dowling_rushton_alpha.status),
        ("cone plateau", da.cone_plateau.status),
        ("S2 slope", da.s2_slope.status),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::pigment::kinetics::find_pigment;

    #[test]
    fn student_t_quantiles_match_the_tables() {
        // Two-sided 95 % points, any statistics table.
        for (nu, t) in [(1, 12.706), (2, 4.303), (5, 2.571), (10, 2.228), (30, 2.042), (120, 1.980)] {
            assert!((student_t_95(nu) - t).abs() < 1e-3, "{nu}: {}", student_t_95(nu));
        }
    }

    #[test]
    fn predicted_curve_matches_the_bleach_report_s2_route() {
        use crate::pigment::schedule::Schedule;
        let p = find_pigment("human-rod").unwrap();
        let mut s = Schedule::default();
        // A light step that leaves B ≈ 0.9, then darkness.
        let level = crate::pigment::bleach::level_for_target(&p, Model::RateLimited, 0.0, 0.9, 60.0).unwrap();
        s.push("light", 60.0, p.rate_of_level(level)).unwrap();
        s.push("dark", 600.0, 0.0).unwrap();
        let r = crate::pigment::bleach::assess(&p, Model::RateLimited, &s, 0.0, None).unwrap();
        let b0 = r.recoveries.last().unwrap().bleached_at_start;
        let c = predict_threshold(&p, Model::RateLimited, b0, Time::from_si(7200.0), 121).unwrap();
        for &(m, e) in &r.thresholds[0].curve {
            let mine = c.at(Time::from_si(m * 60.0));
            assert!((mine - e).abs() < 1e-9, "{m} min: {mine} vs {e}");
        }
    }

    #[test]
    fn a_noiseless_hinge_is_recovered_exactly() {
        let data: Vec<(Time, f64)> = (0..40)
            .map(|i| {
                let m = f64::from(i);
                (Time::from_si(m * 60.0), hinge(3.6, 0.24, 12.3, m))
            })
            .collect();
        let f = fit_threshold(&data).unwrap();
        assert!((f.plateau.unwrap().value.0 - 3.6).abs() < 1e-9);
        assert!((f.s2_slope.value.si() * 60.0 - 0.24).abs() < 1e-9);
        assert!((f.break_time.unwrap().value.si() / 60.0 - 12.3).abs() < 1e-6);
    }

    #[test]
    fn csv_errors_name_file_line_and_field() {
        let e = parse_threshold_csv("time_min,log_threshold\n1,2\n2,x\n", "m.csv").unwrap_err();
        assert!(e.message().contains("m.csv:3: field 'log_threshold' (column 2)"), "{e}");
        let e = parse_threshold_csv("1,2,3\n", "m.csv").unwrap_err();
        assert!(e.message().contains("m.csv:1: 3 fields"), "{e}");
    }
}
