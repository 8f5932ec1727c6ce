//! Double-double arithmetic (TwoSum, FastTwoSum, TwoProduct) for the root's polish where
//! f64 cannot resolve it.

/// The polishing steps in double-double arithmetic start where the round-off of G leaves s
/// uncertain by more than this many units in its last place.
pub(super) const POLISH_ULPS: f64 = 8.0;

/// At most this many polishing steps (Newton steps from an f64 root already within
/// round-off of the exact one, so one nearly always suffices).
pub(super) const POLISH_STEPS: u32 = 3;

/// a + b = s + e exactly (Knuth's TwoSum; Knuth, *The Art of Computer Programming* vol. 2,
/// §4.2.2, from memory).
#[inline]
pub(super) fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

/// a + b = s + e exactly when |a| ≥ |b| (Dekker, *Numer. Math.* 18 (1971) 224, from memory).
#[inline]
pub(super) fn fast_two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    (s, b - (s - a))
}

/// a·b = p + e exactly, by a fused multiply-add (common practice).
#[inline]
pub(super) fn two_product(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    (p, a.mul_add(b, -p))
}
