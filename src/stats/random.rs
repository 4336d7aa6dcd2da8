//! A small deterministic pseudo-random generator, identical on every platform.
//!
//! Guarantees:
//! - [`SplitMix64`] (Steele, Lea & Flood 2014) and [`Xoshiro256StarStar`] (Blackman & Vigna
//!   2018) are implemented on `u64` with wrapping arithmetic only: no floating point, no
//!   platform-dependent state, so one seed gives the same stream everywhere.
//! - [`Xoshiro256StarStar::below`] draws uniform integers in `[0, n)` without modulo bias
//!   (Lemire 2019, "Fast random integer generation in an interval", with rejection).
//! - [`mix64`] is the SplitMix64 output function applied to `x + γ`: a fixed bijection on `u64`
//!   used to hash keys (e.g. for jitter).

/// The SplitMix64 increment γ = 0x9E3779B97F4A7C15 (the odd integer nearest 2^64/φ).
const GOLDEN_GAMMA: u64 = 0x9E37_79B9_7F4A_7C15;

/// The SplitMix64 output function (its "mix" step) on a raw 64-bit state.
fn finalize(mut z: u64) -> u64 {
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// Hashes `x` to a well-mixed 64-bit value: the first SplitMix64 output for seed `x`.
pub fn mix64(x: u64) -> u64 {
    finalize(x.wrapping_add(GOLDEN_GAMMA))
}

/// A uniform double in `[0, 1)` from the top 53 bits of `bits`.
pub fn unit_interval(bits: u64) -> f64 {
    const TWO_POW_MINUS_53: f64 = 1.0 / 9_007_199_254_740_992.0;
    (bits >> 11) as f64 * TWO_POW_MINUS_53
}

/// SplitMix64: a 64-bit state advanced by γ, each output the mixed state.
#[derive(Debug, Clone)]
pub struct SplitMix64 {
    state: u64,
}

impl SplitMix64 {
    pub fn new(seed: u64) -> Self {
        SplitMix64 { state: seed }
    }

    pub fn next_u64(&mut self) -> u64 {
        self.state = self.state.wrapping_add(GOLDEN_GAMMA);
        finalize(self.state)
    }
}

/// xoshiro256**: 256 bits of state, seeded from SplitMix64 as its authors recommend.
#[derive(Debug, Clone)]
pub struct Xoshiro256StarStar {
    state: [u64; 4],
}

impl Xoshiro256StarStar {
    /// Seeds the state with four SplitMix64 outputs, so no seed gives the all-zero state.
    pub fn seed_from(seed: u64) -> Self {
        let mut seeder = SplitMix64::new(seed);
        let state = [
            seeder.next_u64(),
            seeder.next_u64(),
            seeder.next_u64(),
            seeder.next_u64(),
        ];
        Xoshiro256StarStar { state }
    }

    pub fn next_u64(&mut self) -> u64 {
        let s = &mut self.state;
        let result = s[1].wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = s[1] << 17;
        s[2] ^= s[0];
        s[3] ^= s[1];
        s[1] ^= s[2];
        s[0] ^= s[3];
        s[2] ^= t;
        s[3] = s[3].rotate_left(45);
        result
    }

    /// A uniform integer in `[0, n)`; `n` must be positive (0 gives 0).
    pub fn below(&mut self, n: u64) -> u64 {
        if n == 0 {
            return 0;
        }
        let mut product = u128::from(self.next_u64()) * u128::from(n);
        let mut low = product as u64;
        if low < n {
            let threshold = n.wrapping_neg() % n;
            while low < threshold {
                product = u128::from(self.next_u64()) * u128::from(n);
                low = product as u64;
            }
        }
        (product >> 64) as u64
    }
}
