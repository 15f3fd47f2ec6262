//! The Monte Carlo of JCGM 101:2008 for any set of figures computed from a vector of inputs:
//! the inputs' distributions, the chunked and seeded draws, and each figure's mean, standard
//! uncertainty, probabilistically symmetric 95 % interval and one-at-a-time variance shares
//! (the same rules as the limit ratios; see the module text of [`super`]).

use rayon::prelude::*;

use super::Input;
use super::rng::Normals;
use super::sample::interval_indices;

/// The distribution of one input.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Law {
    /// Normal about `mean` with standard deviation `u`, drawn again while not above 0 when
    /// `positive` (a truncated normal).
    Normal { mean: f64, u: f64, positive: bool },
    /// Uniform on [low, high].
    Uniform { low: f64, high: f64 },
    /// Normal about `mean` with standard deviation `u`, drawn again while not in (low, high]
    /// (a truncated normal; `mean` in the range and `u` at most a quarter of it, so at least
    /// about half the draws are kept).
    Truncated { mean: f64, u: f64, low: f64, high: f64 },
}

impl Law {
    /// True when the input does not vary.
    fn fixed(&self) -> bool {
        match *self {
            Law::Normal { u, .. } => u == 0.0,
            Law::Uniform { low, high } => low == high,
            Law::Truncated { u, .. } => u == 0.0,
        }
    }

    fn draw(&self, g: &mut Normals) -> f64 {
        match *self {
            Law::Normal { mean, u, positive } => loop {
                let x = mean + u * g.normal();
                if !positive || x > 0.0 || u == 0.0 {
                    return x;
                }
            },
            Law::Uniform { low, high } => low + (high - low) * g.unit(),
            Law::Truncated { mean, u, low, high } => loop {
                let x = mean + u * g.normal();
                if (low < x && x <= high) || u == 0.0 {
                    return x;
                }
            },
        }
    }
}

/// What an input is, in reports: a declared input or a parameter drawn from its default range.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
#[serde(untagged)]
pub enum InputName {
    /// One of the declared inputs.
    Declared(Input),
    /// A from-memory parameter, by its key (`eye: rod quantum efficiency`, `human-rod: τ0`).
    Parameter(String),
}

impl InputName {
    /// Its name in reports.
    pub fn text(&self) -> &str {
        match self {
            InputName::Declared(i) => i.name(),
            InputName::Parameter(k) => k,
        }
    }
}

/// One input: its name, the value at which the figures are nominal, and its distribution.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Var {
    pub name: InputName,
    pub nominal: f64,
    pub law: Law,
    /// The distribution and its basis, in words (for reports).
    pub basis: String,
}

/// A model: the figures for an input vector (one value per [`Var`], in order). A figure that
/// is not reached (a recovery that never comes) is `f64::INFINITY`.
pub(super) trait Figures: Sync {
    /// Number of figures.
    fn count(&self) -> usize;
    /// The figures for inputs `x`, into `out`.
    fn eval(&self, x: &[f64], out: &mut [f64]);
}

/// One figure's distribution.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Summary {
    /// The figure at the nominal inputs.
    pub nominal: f64,
    /// Mean of the draws (`None` when some draws never reach the figure).
    pub mean: Option<f64>,
    /// Standard deviation of the draws (`None` as for the mean).
    pub standard_uncertainty: Option<f64>,
    /// Probabilistically symmetric 95 % coverage interval (an end is `None` when that quantile
    /// is a draw that never reaches the figure).
    pub interval: (Option<f64>, Option<f64>),
    /// Each input's share of the summed one-at-a-time variances.
    pub shares: Vec<(InputName, f64)>,
    /// Sum of the one-at-a-time variances ÷ the variance of the draws.
    pub one_at_a_time_sum: Option<f64>,
    /// Draws in which the figure was not reached.
    pub unreached_draws: usize,
}

struct Chunk {
    values: Vec<f64>,
    /// Per figure and input: Σ(x − nominal) and Σ(x − nominal)² with that input alone varied.
    oat: Vec<Vec<(f64, f64)>>,
}

fn chunk(vars: &[Var], m: &dyn Figures, nominal: &[f64], seed: u64, stream: u64, count: usize) -> Chunk {
    let h = m.count();
    let mut g = Normals::new(seed, stream);
    let x0: Vec<f64> = vars.iter().map(|v| v.nominal).collect();
    let mut c = Chunk { values: vec![0.0; count * h], oat: vec![vec![(0.0, 0.0); vars.len()]; h] };
    let mut x = x0.clone();
    let mut one = x0.clone();
    let mut out = vec![0.0; h];
    for i in 0..count {
        for (xi, v) in x.iter_mut().zip(vars) {
            *xi = v.law.draw(&mut g);
        }
        m.eval(&x, &mut c.values[i * h..(i + 1) * h]);
        for (k, v) in vars.iter().enumerate() {
            if v.law.fixed() {
                continue;
            }
            one[k] = x[k];
            m.eval(&one, &mut out);
            one[k] = x0[k];
            for ((acc, y), y0) in c.oat.iter_mut().zip(&out).zip(nominal) {
                let d = y - y0;
                if d.is_finite() {
                    acc[k].0 += d;
                    acc[k].1 += d * d;
                }
            }
        }
    }
    c
}

/// Draws `draws` input vectors from stream family `seed`, in chunks of `chunk_len` (one stream
/// each), and summarises every figure.
pub(super) fn propagate(
    vars: &[Var],
    m: &dyn Figures,
    draws: usize,
    seed: u64,
    chunk_len: usize,
) -> Vec<Summary> {
    let h = m.count();
    let mut nominal = vec![0.0; h];
    m.eval(&vars.iter().map(|v| v.nominal).collect::<Vec<_>>(), &mut nominal);
    let chunks: Vec<Chunk> = (0..draws.div_ceil(chunk_len))
        .into_par_iter()
        .map(|i| chunk(vars, m, &nominal, seed, i as u64, chunk_len.min(draws - i * chunk_len)))
        .collect();
    (0..h).map(|j| summarise(vars, &chunks, j, h, nominal[j], draws)).collect()
}

fn summarise(vars: &[Var], chunks: &[Chunk], j: usize, h: usize, nominal: f64, n: usize) -> Summary {
    let mut x: Vec<f64> = chunks.iter().flat_map(|c| c.values.iter().skip(j).step_by(h).copied()).collect();
    let unreached = x.iter().filter(|v| !v.is_finite()).count();
    let nf = n as f64;
    let (mean, var) = if unreached == 0 {
        let mean = x.iter().sum::<f64>() / nf;
        (Some(mean), Some(x.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (nf - 1.0)))
    } else {
        (None, None)
    };
    x.sort_unstable_by(f64::total_cmp);
    let (lo, hi) = interval_indices(n);
    let finite = |v: f64| v.is_finite().then_some(v);
    let v: Vec<f64> = (0..vars.len())
        .map(|k| {
            let (s, ss) =
                chunks.iter().fold((0.0, 0.0), |(s, ss), c| (s + c.oat[j][k].0, ss + c.oat[j][k].1));
            ((ss - s * s / nf) / (nf - 1.0)).max(0.0)
        })
        .collect();
    let total: f64 = v.iter().sum();
    Summary {
        nominal,
        mean,
        standard_uncertainty: var.map(f64::sqrt),
        interval: (finite(x[lo - 1]), finite(x[hi - 1])),
        shares: vars
            .iter()
            .zip(&v)
            .map(|(var, vi)| (var.name.clone(), if total > 0.0 { vi / total } else { 0.0 }))
            .collect(),
        one_at_a_time_sum: var.map(|var| if var > 0.0 { total / var } else { 1.0 }),
        unreached_draws: unreached,
    }
}

/// A function known at three points, interpolated by the parabola through them (exact for a
/// quadratic such as a pupil area in the diameter, or a linear factor).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Parabola {
    x: [f64; 3],
    y: [f64; 3],
}

impl Parabola {
    /// Through (x[i], y[i]); the three x must differ.
    pub(super) fn new(x: [f64; 3], y: [f64; 3]) -> Parabola {
        Parabola { x, y }
    }

    /// A constant.
    pub(super) fn flat(y: f64) -> Parabola {
        Parabola { x: [0.0, 1.0, 2.0], y: [y; 3] }
    }

    /// True when it is the same at the three points (within 10⁻¹²).
    pub(super) fn is_flat(&self) -> bool {
        (self.y[0] - self.y[1]).abs() <= 1e-12 * self.y[1].abs()
            && (self.y[2] - self.y[1]).abs() <= 1e-12 * self.y[1].abs()
    }

    /// The value at `t` (Lagrange form).
    pub(super) fn at(&self, t: f64) -> f64 {
        let [a, b, c] = self.x;
        let [ya, yb, yc] = self.y;
        ya * (t - b) * (t - c) / ((a - b) * (a - c))
            + yb * (t - a) * (t - c) / ((b - a) * (b - c))
            + yc * (t - a) * (t - b) / ((c - a) * (c - b))
    }
}

/// The three points at which a parameter's effect is computed, the nominal among them (so the
/// parabola gives the nominal figure exactly): the ends of a uniform range and the nominal
/// (the middle when the nominal is an end), or the mean and ±2 standard deviations of a normal.
pub(super) fn nodes(law: &Law, nominal: f64) -> [f64; 3] {
    match *law {
        Law::Uniform { low, high } if low < nominal && nominal < high => [low, nominal, high],
        Law::Uniform { low, high } => [low, 0.5 * (low + high), high],
        Law::Normal { mean, u, .. } => [mean - 2.0 * u, mean, mean + 2.0 * u],
        Law::Truncated { mean, u, low, high } => {
            let (a, b) = ((mean - 2.0 * u).max(low), (mean + 2.0 * u).min(high));
            if a < mean && mean < b { [a, mean, b] } else { [a, 0.5 * (a + b), b] }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_parabola_reproduces_a_quadratic_exactly() {
        let f = |t: f64| 3.0 - 2.0 * t + 0.5 * t * t;
        let p = Parabola::new([1.0, 2.5, 4.0], [f(1.0), f(2.5), f(4.0)]);
        for t in [0.0, 1.7, 3.3, 9.0] {
            assert!((p.at(t) - f(t)).abs() < 1e-12);
        }
        assert!(Parabola::flat(2.0).is_flat());
    }
}
