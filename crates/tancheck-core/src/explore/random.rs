//! The random numbers of `explore`: a seeded ChaCha8 generator and the few draws the paths
//! need (uniform, log-uniform, integers, Gaussian directions), each written out here.
//!
//! Why written out: a seed must give the same paths in every later version of tancheck. The
//! ChaCha8 stream is fixed by the algorithm, but the conversions of a general random library
//! (its ranges, its seeding from a u64) may change between its versions. So the 32-byte key is
//! made from the seed by splitmix64 (Steele, Lea & Flood 2014; from memory), and every draw
//! below uses only `next_u64`.

use rand_chacha::rand_core::{RngCore, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// The generator of one exploration.
pub struct Rng(ChaCha8Rng);

impl Rng {
    pub fn new(seed: u64) -> Rng {
        let mut x = seed;
        let mut key = [0u8; 32];
        for chunk in key.chunks_mut(8) {
            // splitmix64
            x = x.wrapping_add(0x9e37_79b9_7f4a_7c15);
            let mut z = x;
            z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
            z ^= z >> 31;
            chunk.copy_from_slice(&z.to_le_bytes());
        }
        Rng(ChaCha8Rng::from_seed(key))
    }

    /// Uniform in [0, 1): the top 53 bits.
    pub fn unit(&mut self) -> f64 {
        (self.0.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
    }

    /// Uniform in [lo, hi).
    pub fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.unit()
    }

    /// Log-uniform in [lo, hi) (both positive): every decade as likely.
    pub fn log_range(&mut self, lo: f64, hi: f64) -> f64 {
        (lo.ln() + (hi.ln() - lo.ln()) * self.unit()).exp()
    }

    /// True with probability `p`.
    pub fn chance(&mut self, p: f64) -> bool {
        self.unit() < p
    }

    /// An integer in [0, n) (n ≥ 1), by the multiply-shift of the top 32 bits.
    pub fn below(&mut self, n: usize) -> usize {
        let x = self.0.next_u64() >> 32;
        ((x * n as u64) >> 32) as usize
    }

    /// An integer in [lo, hi] inclusive.
    pub fn between(&mut self, lo: usize, hi: usize) -> usize {
        lo + self.below(hi - lo + 1)
    }

    /// A standard normal number (Box–Muller).
    pub fn normal(&mut self) -> f64 {
        let u = 1.0 - self.unit(); // (0, 1]
        let v = self.unit();
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos()
    }

    /// A ± sign.
    pub fn sign(&mut self) -> f64 {
        if self.chance(0.5) {
            1.0
        } else {
            -1.0
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_seed_gives_the_same_stream_and_the_draws_stay_in_range() {
        let (mut a, mut b) = (Rng::new(42), Rng::new(42));
        let xs: Vec<f64> = (0..100).map(|_| a.unit()).collect();
        let ys: Vec<f64> = (0..100).map(|_| b.unit()).collect();
        assert_eq!(xs, ys);
        assert_ne!(xs, (0..100).map(|_| Rng::new(43).unit()).collect::<Vec<_>>());
        let mut r = Rng::new(7);
        for _ in 0..1000 {
            let x = r.log_range(1e-4, 10.0);
            assert!((1e-4..10.0).contains(&x));
            assert!(r.between(2, 5) >= 2 && r.between(2, 5) <= 5);
            assert!(r.below(3) < 3);
        }
    }

    // The first draws of seed 1, pinned: a change of the generator or of the draws breaks the
    // reproducibility of every published seed, and must be seen here.
    #[test]
    fn the_stream_of_seed_1_is_pinned() {
        let mut r = Rng::new(1);
        let first: Vec<u64> = (0..3).map(|_| (r.unit() * 1e9) as u64).collect();
        assert_eq!(first, PINNED);
    }
    const PINNED: [u64; 3] = [935_347_256, 539_851_819, 47_851_998];
}
