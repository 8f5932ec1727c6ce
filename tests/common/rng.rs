//! A small seeded random-number generator shared by the Rachford–Rice reference test and
//! benchmark, so they need no extra crate. Not every user calls every method.
#![allow(dead_code)]

/// splitmix64 (Steele, Lea & Flood, OOPSLA 2014; constants from memory, as in common use).
pub struct Rng(pub u64);

impl Rng {
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in [0, 1).
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
    }
    pub fn range(&mut self, lo: usize, hi_inclusive: usize) -> usize {
        lo + (self.next_u64() % (hi_inclusive - lo + 1) as u64) as usize
    }
    pub fn log_uniform(&mut self, lo: f64, hi: f64) -> f64 {
        (lo.ln() + self.uniform() * (hi.ln() - lo.ln())).exp()
    }
    /// A Gamma(1) (exponential) weight: normalised, these give a flat Dirichlet draw.
    pub fn weight(&mut self) -> f64 {
        -(1.0 - self.uniform()).ln() + 1e-300
    }
    pub fn chance(&mut self, p: f64) -> bool {
        self.uniform() < p
    }
}
