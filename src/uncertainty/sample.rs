//! The draws, chunk by chunk on every core, and their summaries.

use rayon::prelude::*;

use crate::base::quantity::SiValue;

use super::model::{Draw, Model};
use super::rng::Normals;
use super::{CHUNK, COVERAGE, Decision, HazardUncertainty, Input, InputUncertainties};

/// The inputs varied one at a time (the pupil enters no ratio).
const VARIED: [Input; 4] = [Input::Reading, Input::Distance, Input::Size, Input::Tilt];

/// One chunk's results.
struct Chunk {
    /// Ratios, draw-major (draw i, hazard j at i·H + j).
    ratios: Vec<f64>,
    /// Per hazard: draws in which it did not apply.
    inapplicable: Vec<usize>,
    /// Per hazard and varied input: Σ(x − nominal) and Σ(x − nominal)² with that input alone.
    one_at_a_time: Vec<[(f64, f64); 4]>,
}

/// `value + u·z`, with z drawn again while the result is not above 0 (a truncated normal).
fn positive(g: &mut Normals, value: f64, u: f64) -> f64 {
    loop {
        let x = value + u * g.normal();
        if x > 0.0 {
            return x;
        }
    }
}

/// The draw, and the draws with one input at a time (in [`VARIED`] order).
fn draw(g: &mut Normals, n: &Draw, u: &InputUncertainties) -> (Draw, [Draw; 4]) {
    let scale = positive(g, 1.0, u.reading_relative);
    let distance_m = positive(g, n.distance_m, u.distance.si());
    let size_m = n.size_m.map(|s| positive(g, s, u.size.si()));
    let tilt = u.tilt_relative * g.normal();
    let all = Draw { scale, distance_m, size_m, tilt };
    let one = [Draw { scale, ..*n }, Draw { distance_m, ..*n }, Draw { size_m, ..*n }, Draw { tilt, ..*n }];
    (all, one)
}

/// Draws `count` samples from stream `stream` of `seed`.
fn chunk(m: &Model, u: &InputUncertainties, seed: u64, stream: u64, count: usize) -> Chunk {
    let h = m.hazards.len();
    let mut g = Normals::new(seed, stream);
    let mut c = Chunk {
        ratios: vec![0.0; count * h],
        inapplicable: vec![0; h],
        one_at_a_time: vec![[(0.0, 0.0); 4]; h],
    };
    let mut one_ratios = vec![0.0; h];
    for i in 0..count {
        let (all, one) = draw(&mut g, &m.nominal, u);
        let off = m.ratios(&all, &mut c.ratios[i * h..(i + 1) * h]);
        for (j, n) in c.inapplicable.iter_mut().enumerate() {
            *n += usize::from(off >> j.min(63) & 1 == 1);
        }
        for (k, d) in one.iter().enumerate() {
            m.ratios(d, &mut one_ratios);
            for ((acc, x), hz) in c.one_at_a_time.iter_mut().zip(&one_ratios).zip(&m.hazards) {
                let dx = x - hz.nominal;
                acc[k].0 += dx;
                acc[k].1 += dx * dx;
            }
        }
    }
    c
}

/// Every draw, in chunks of [`CHUNK`] on every core, joined in chunk order.
fn run(m: &Model, u: &InputUncertainties, draws: usize, seed: u64) -> Vec<Chunk> {
    let chunks = draws.div_ceil(CHUNK);
    (0..chunks).into_par_iter().map(|i| chunk(m, u, seed, i as u64, CHUNK.min(draws - i * CHUNK))).collect()
}

/// The §7.7.1 indices (1-based) of the probabilistically symmetric interval for M draws:
/// q = pM rounded to the nearest integer, r = (M − q)/2 rounded, interval [y_r, y_(r+q)].
pub(super) fn interval_indices(m: usize) -> (usize, usize) {
    let q = (COVERAGE * m as f64 + 0.5).floor() as usize;
    let r = (((m - q) as f64 + 1.0) / 2.0).floor().max(1.0) as usize;
    (r, (r + q).min(m))
}

/// The one-at-a-time variances of hazard `j`, summed over the chunks.
fn variances(chunks: &[Chunk], j: usize, n: usize) -> [f64; 4] {
    let mut v = [0.0; 4];
    for (k, x) in v.iter_mut().enumerate() {
        let (s, ss) = chunks
            .iter()
            .fold((0.0, 0.0), |(s, ss), c| (s + c.one_at_a_time[j][k].0, ss + c.one_at_a_time[j][k].1));
        *x = ((ss - s * s / n as f64) / (n as f64 - 1.0)).max(0.0);
    }
    v
}

/// Summarises hazard `j` from its draws.
fn summarise(m: &Model, chunks: &[Chunk], j: usize, n: usize) -> HazardUncertainty {
    let h = m.hazards.len();
    let mut x: Vec<f64> = chunks.iter().flat_map(|c| c.ratios.iter().skip(j).step_by(h).copied()).collect();
    let mean = x.iter().sum::<f64>() / n as f64;
    let var = x.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (n as f64 - 1.0);
    let exceeding = x.iter().filter(|&&v| v >= 1.0).count();
    x.sort_unstable_by(f64::total_cmp);
    let (lo, hi) = interval_indices(n);
    let interval = (x[lo - 1], x[hi - 1]);
    let v = variances(chunks, j, n);
    let total: f64 = v.iter().sum();
    let mut shares: Vec<(Input, f64)> =
        VARIED.iter().zip(v).map(|(&i, vi)| (i, if total > 0.0 { vi / total } else { 0.0 })).collect();
    shares.push((Input::Pupil, 0.0));
    let hz = &m.hazards[j];
    HazardUncertainty {
        id: hz.id.clone(),
        name: hz.name.clone(),
        nominal: hz.nominal,
        mean,
        standard_uncertainty: var.sqrt(),
        interval,
        exceedance_probability: exceeding as f64 / n as f64,
        decision: Decision::of(interval.0, interval.1),
        shares,
        one_at_a_time_sum: if var > 0.0 { total / var } else { 1.0 },
        inapplicable_draws: chunks.iter().map(|c| c.inapplicable[j]).sum(),
    }
}

/// Draws `draws` samples and summarises every hazard.
pub(super) fn sample(m: &Model, u: &InputUncertainties, draws: usize, seed: u64) -> Vec<HazardUncertainty> {
    let chunks = run(m, u, draws, seed);
    (0..m.hazards.len()).map(|j| summarise(m, &chunks, j, draws)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn symmetric_interval_indices_follow_section_7_7_1() {
        // M = 10⁶: q = 950 000, (M − q)/2 = 25 000 is an integer, so r = 25 000.
        assert_eq!(interval_indices(1_000_000), (25_000, 975_000));
        // M = 101: q = int(95.95 + 1/2) = 96, (M − q)/2 = 2.5 is not, so r = int((M − q + 1)/2) = 3.
        assert_eq!(interval_indices(101), (3, 99));
        assert_eq!(interval_indices(2), (1, 2));
    }
}
