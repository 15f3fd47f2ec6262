//! The seeded generator of the Monte Carlo draws: xoshiro256++ seeded through SplitMix64
//! (D. Blackman and S. Vigna, "Scrambled linear pseudorandom number generators", ACM TOMS 47
//! (2021); reference code at prng.di.unimi.it), and standard normal deviates by the
//! Box–Muller transform (G. E. P. Box and M. E. Muller, Ann. Math. Stat. 29 (1958) 610).
//!
//! Written out here rather than taken from a crate so that a seed gives the same draws for as
//! long as this file is unchanged, whatever the versions of the dependencies.

use std::f64::consts::TAU;

/// One SplitMix64 step: advances `state` and returns the next output.
fn split_mix(state: &mut u64) -> u64 {
    *state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
    let mut z = *state;
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// xoshiro256++ with a spare normal deviate from the last Box–Muller pair.
pub(super) struct Normals {
    s: [u64; 4],
    spare: Option<f64>,
}

impl Normals {
    /// The generator of stream `stream` of master seed `seed`: the state is four SplitMix64
    /// outputs from `seed` mixed with the stream number, so each chunk of draws has its own
    /// stream and the draws do not depend on how the chunks are spread over threads.
    pub(super) fn new(seed: u64, stream: u64) -> Normals {
        let mut sm = seed ^ split_mix(&mut stream.wrapping_mul(0xD1B5_4A32_D192_ED03));
        let s = [split_mix(&mut sm), split_mix(&mut sm), split_mix(&mut sm), split_mix(&mut sm)];
        Normals { s, spare: None }
    }

    fn next_u64(&mut self) -> u64 {
        let s = &mut self.s;
        let out = s[0].wrapping_add(s[3]).rotate_left(23).wrapping_add(s[0]);
        let t = s[1] << 17;
        s[2] ^= s[0];
        s[3] ^= s[1];
        s[1] ^= s[2];
        s[0] ^= s[3];
        s[2] ^= t;
        s[3] = s[3].rotate_left(45);
        out
    }

    /// A uniform deviate in (0, 1]: the top 53 bits, plus one ulp so the logarithm is finite.
    pub(super) fn unit(&mut self) -> f64 {
        ((self.next_u64() >> 11) + 1) as f64 * (1.0 / (1u64 << 53) as f64)
    }

    /// A standard normal deviate.
    pub(super) fn normal(&mut self) -> f64 {
        if let Some(z) = self.spare.take() {
            return z;
        }
        let r = (-2.0 * self.unit().ln()).sqrt();
        let phi = TAU * self.unit();
        self.spare = Some(r * phi.sin());
        r * phi.cos()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn split_mix_matches_the_reference_sequence() {
        // SplitMix64 from state 0: the reference implementation's first output.
        let mut s = 0u64;
        assert_eq!(split_mix(&mut s), 0xE220_A839_7B1D_CDAF);
    }

    #[test]
    fn normals_have_mean_0_and_variance_1() {
        let mut g = Normals::new(7, 0);
        let n = 200_000;
        let z: Vec<f64> = (0..n).map(|_| g.normal()).collect();
        let mean = z.iter().sum::<f64>() / n as f64;
        let var = z.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1) as f64;
        // Standard errors: 1/√n ≈ 0.0022 for the mean, √(2/n) ≈ 0.0032 for the variance.
        assert!(mean.abs() < 0.01, "{mean}");
        assert!((var - 1.0).abs() < 0.015, "{var}");
    }

    #[test]
    fn streams_differ_and_repeat() {
        let a: Vec<f64> = (0..4)
            .map({
                let mut g = Normals::new(1, 0);
                move |_| g.normal()
            })
            .collect();
        let b: Vec<f64> = (0..4)
            .map({
                let mut g = Normals::new(1, 1);
                move |_| g.normal()
            })
            .collect();
        let c: Vec<f64> = (0..4)
            .map({
                let mut g = Normals::new(1, 0);
                move |_| g.normal()
            })
            .collect();
        assert_ne!(a, b);
        assert_eq!(a, c);
    }
}
