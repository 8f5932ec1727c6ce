//! The 200-bit arithmetic shared by the Rachford–Rice and negative-flash reference tests
//! (`dashu_float`): inputs converted exactly, results rounded back once. Not every user calls
//! every function.
#![allow(dead_code)]

use dashu_float::FBig;
use dashu_float::round::mode::HalfEven;

pub type Big = FBig<HalfEven>;

/// Binary digits of the reference arithmetic.
pub const PREC: usize = 200;

/// `v` exactly, as a 200-bit float.
pub fn big(v: f64) -> Big {
    Big::try_from(v).expect("finite input").with_precision(PREC).value()
}

/// `v` rounded to the nearest f64.
pub fn to_f64(v: &Big) -> f64 {
    v.to_f64().value()
}

/// |ours − reference|, formed in 200 bits and rounded once.
pub fn err(ours: f64, reference: &Big) -> f64 {
    to_f64(&(big(ours) - reference)).abs()
}

/// Divides `w` by its f64 sum.
pub fn normalise(w: &mut [f64]) {
    let s: f64 = w.iter().sum();
    w.iter_mut().for_each(|v| *v /= s);
}

/// The feed in 200 bits: z normalised by its exact sum (each quotient rounded to 200 bits),
/// and Kᵢ − 1, exact.
pub fn exact_feed(z: &[f64], k: &[f64]) -> (Vec<Big>, Vec<Big>) {
    let zb: Vec<Big> = z.iter().map(|&v| big(v)).collect();
    let mut sum = big(0.0);
    for v in &zb {
        sum += v;
    }
    let one = big(1.0);
    (
        zb.iter().map(|v| v / &sum).collect(),
        k.iter().map(|&v| big(v) - &one).collect(),
    )
}
