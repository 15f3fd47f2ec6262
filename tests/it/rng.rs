//! The random-number generator the randomised tests share: xorshift64* (Vigna 2016, "An
//! experimental exploration of Marsaglia's xorshift generators, scrambled", ACM TOMS 42(4):
//! shifts 12, 25, 27 and multiplier 0x2545F4914F6CDD1D), the same sequence on every machine. The
//! modules that use it add their own sampling methods.

/// The generator's state (never zero).
pub struct Rng(pub u64);

impl Rng {
    /// A generator started from the splitmix64 of `seed`, so near seeds start far apart.
    pub fn seeded(seed: u64) -> Rng {
        let mut z = seed.wrapping_add(0x9E37_79B9_7F4A_7C15);
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        Rng((z ^ (z >> 31)) | 1)
    }

    /// The next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        let mut x = self.0;
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        self.0 = x;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
}
