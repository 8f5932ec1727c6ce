//! Unit tests of the solver.

use super::api::{Options, rachford_rice, solve_into};
use super::dispatch::solve_baseline;
use super::iterate::float_midpoint;

use crate::test_rng::Rng;

#[test]
fn binary_closed_form() {
    // For a binary the root is explicit: β = −(z₁(K₁−1) + z₂(K₂−1)) /((K₁−1)(K₂−1)) (common practice).
    let (z, k) = ([0.4, 0.6], [2.5, 0.3]);
    let s = rachford_rice(&z, &k).unwrap();
    let exact = -(z[0] * (k[0] - 1.0) + z[1] * (k[1] - 1.0)) / ((k[0] - 1.0) * (k[1] - 1.0));
    assert!(
        (s.vapour_fraction - exact).abs() < 1e-15,
        "{} {}",
        s.vapour_fraction,
        exact
    );
}

/// [`solve_into`] dispatches to an x86-64-v3 build of the solver where the processor has
/// AVX2; it must agree with the baseline build to the bit (same operations, same order,
/// no contraction into fused multiply-adds). On a processor without AVX2 both calls run
/// the baseline build and the test passes trivially.
#[test]
fn dispatched_build_matches_baseline_to_the_bit() {
    let mut rng = Rng(0x5EED);
    let mut next = move || rng.uniform();
    for case in 0..20_000 {
        let n = 1 + (next() * 40.0) as usize;
        // K log-uniform over 10^±(1..12), some exactly 0 or 1, some z exactly 0.
        let span = 1.0 + 11.0 * next();
        let k: Vec<f64> = (0..n)
            .map(|_| match next() {
                u if u < 0.03 => 0.0,
                u if u < 0.06 => 1.0,
                _ => 10f64.powf(span * (2.0 * next() - 1.0)),
            })
            .collect();
        let mut z: Vec<f64> = (0..n).map(|_| if next() < 0.05 { 0.0 } else { next() }).collect();
        let sum: f64 = z.iter().sum();
        if sum > 0.0 {
            z.iter_mut().for_each(|v| *v /= sum);
        }
        let options = Options {
            negative_flash: case % 4 == 0,
        };
        let (mut x, mut y, mut xb, mut yb) = (vec![0.0; n], vec![0.0; n], vec![0.0; n], vec![0.0; n]);
        let dispatched = solve_into(&z, &k, options, &mut x, &mut y);
        let baseline = solve_baseline(&z, &k, options, &mut xb, &mut yb);
        assert_eq!(dispatched, baseline, "case {case}: z {z:?} K {k:?}");
        if let (Ok(d), Ok(b)) = (dispatched, baseline) {
            assert_eq!(d.vapour_fraction.to_bits(), b.vapour_fraction.to_bits(), "case {case}");
            assert_eq!(d.liquid_fraction.to_bits(), b.liquid_fraction.to_bits(), "case {case}");
        }
        let bits = |v: &[f64]| v.iter().map(|f| f.to_bits()).collect::<Vec<_>>();
        assert_eq!(bits(&x), bits(&xb), "case {case}");
        assert_eq!(bits(&y), bits(&yb), "case {case}");
    }
}

#[test]
fn float_midpoint_terminates() {
    let (mut lo, mut hi) = (1e-300, 0.5);
    let mut n = 0;
    while float_midpoint(lo, hi) > lo && float_midpoint(lo, hi) < hi {
        let m = float_midpoint(lo, hi);
        if m < 1e-10 {
            lo = m
        } else {
            hi = m
        }
        n += 1;
        assert!(n < 130, "{n}");
    }
}
