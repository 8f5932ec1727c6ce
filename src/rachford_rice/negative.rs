//! The negative flash (Whitson & Michelsen): the root of F outside [0, 1] for a
//! single-phase feed.

use super::api::{Phase, SplitSummary};
use super::double_double::POLISH_ULPS;
use super::iterate::{NEWTON_STEPS, Orientation, Oriented, ROUND_OFF, float_midpoint};

/// The negative-flash root in (pole, 0] of the oriented problem, if the pole exists.
///
/// G at the midpoint s₋/2 (exact in both coordinates below) says which end the root is
/// nearer, and so which coordinate resolves it: nearer 0, s itself, to ε|s|; nearer the
/// pole, r = s − s₋, to ε·r, where s would keep only ε|s₋| of it (and the pole component's
/// x = zᵢ/(aᵢr) needs r). With the pole at 1e15 (a K within 1e-15 of 1) and the root at
/// s = −1, the difference is fifteen digits.
pub(super) fn negative_root(
    z: &[f64],
    k: &[f64],
    inv_sum: f64,
    orientation: Orientation,
    (k_min, k_max): (f64, f64),
    x: &mut [f64],
    y: &mut [f64],
) -> Option<SplitSummary> {
    let problem = Oriented::new(z, k, inv_sum, orientation, k_min, k_max);
    if !problem.pole_lo.is_finite() || problem.pole_lo >= 0.0 {
        return None;
    }
    let pole = problem.pole_lo;
    let mid = 0.5 * pole;
    // (r = −s₋/2 is exact, and so is s₋ + r = s₋/2.)
    let [g_mid, ..] = problem.pole_split_from_pole(-mid);
    let (s, iterations, evaluations) = if g_mid > 0.0 {
        let (s, iterations, evaluations) = match orientation {
            Orientation::Liquid => problem.negative_near_zero::<true>(mid),
            Orientation::Vapour => problem.negative_near_zero::<false>(mid),
        };
        problem.write(s, x, y);
        (s, iterations, evaluations)
    } else {
        let (r, iterations, evaluations) = problem.negative_near_pole(-mid);
        problem.write_from_pole(r, x, y);
        (pole + r, iterations, evaluations)
    };
    // Two evaluations for the phase tests, one at the midpoint.
    let mut summary = problem.summary(s, iterations, evaluations + 3);
    summary.phase = match orientation {
        Orientation::Liquid => Phase::Liquid,
        Orientation::Vapour => Phase::Vapour,
    };
    Some(summary)
}

impl Oriented<'_> {
    /// Newton's step on H = (s − s₋)(s₊ − s)G (the two-phase iteration's function), written
    /// H/H′ = G/(G′ + G(1/(s − s₋) − 1/(s₊ − s))) so that a pole at infinity (no component on
    /// that side of 1) drops out.
    pub(super) fn pole_weighted_newton_step(&self, s: f64, g: f64, dg: f64) -> f64 {
        g / (dg + g * (1.0 / (s - self.pole_lo) - 1.0 / (self.pole_hi - s)))
    }

    /// The negative-flash root in [lo, 0], lo = s₋/2 with G(lo) > 0 ≥ G(0), in s: Newton on
    /// the pole-weighted function with a bracket, bisection on the float ordering of −s
    /// after NEWTON_STEPS, then the double-double polish where G's round-off leaves s
    /// uncertain (as in the two-phase iteration). Returns s, iterations, evaluations.
    pub(super) fn negative_near_zero<const LIQUID: bool>(&self, lo: f64) -> (f64, u32, u32) {
        // The polish gets the whole interval: the bracket the f64 signs of G narrow it to can
        // exclude the root by a few units of G's round-off.
        let outer = (lo, 0.0);
        let (mut lo, mut hi) = outer;
        let mut s = 0.0_f64;
        let [mut g, mut dg, _, mut scale] = self.derivatives_in::<LIQUID>(s);
        let (mut iterations, mut evaluations) = (0, 1);
        // The midpoint of [lo, hi] ⊂ [s₋/2, 0] on the float ordering of −s (0 − hi, not −hi,
        // so that 0 stays +0).
        let bisect = |lo: f64, hi: f64| -float_midpoint(0.0 - hi, 0.0 - lo);
        loop {
            if g == 0.0 {
                break;
            }
            if g > 0.0 {
                lo = s;
            } else {
                hi = s;
            }
            let next = if iterations < NEWTON_STEPS {
                let step = self.pole_weighted_newton_step(s, g, dg);
                let candidate = s - step;
                let at_round_off = g.abs() <= ROUND_OFF * f64::EPSILON * scale;
                let tiny = step.abs() <= 2.0 * f64::EPSILON * s.abs();
                if candidate.is_finite() && (at_round_off || tiny) {
                    s = candidate.clamp(lo, hi);
                    break;
                }
                if candidate > lo && candidate < hi && candidate.is_finite() {
                    candidate
                } else {
                    bisect(lo, hi)
                }
            } else {
                bisect(lo, hi)
            };
            if next <= lo || next >= hi {
                // lo and hi are adjacent floats.
                s = if g > 0.0 { hi } else { lo };
                break;
            }
            s = next;
            [g, dg, _, scale] = self.derivatives_in::<LIQUID>(s);
            evaluations += 1;
            iterations += 1;
        }
        if scale > POLISH_ULPS * s.abs() * dg.abs() {
            let (polished, steps) = self.polish::<LIQUID>(s, outer);
            s = polished;
            evaluations += steps;
            iterations += steps;
        }
        (s, iterations, evaluations)
    }

    /// The negative-flash root in r = s − s₋ ∈ (0, `hi`], hi = −s₋/2 with G(s₋ + hi) ≤ 0:
    /// Newton on the pole-weighted function with a bracket, bisection on the float ordering
    /// of r after NEWTON_STEPS, G split at the pole by
    /// [`pole_split_from_pole`](Self::pole_split_from_pole).
    /// Returns r, iterations, evaluations.
    pub(super) fn negative_near_pole(&self, hi: f64) -> (f64, u32, u32) {
        let pole = self.pole_lo;
        let (mut lo, mut hi): (f64, f64) = (0.0, hi);
        let mut r = hi;
        let (mut iterations, mut evaluations) = (0, 0);
        loop {
            // m = rG has G's sign.
            let [m, rest, slope, scale] = self.pole_split_from_pole(r);
            evaluations += 1;
            iterations += 1;
            if m == 0.0 {
                break;
            }
            if m > 0.0 {
                lo = lo.max(r);
            } else {
                hi = hi.min(r);
            }
            let next = if iterations <= NEWTON_STEPS {
                // Newton's step on H = r(s₊ − s)G = v·m, v = s₊ − s: H/H′ =
                // m/(R + rR′ − m/v), v = ∞ where there is no pole above.
                let v = self.pole_hi - (pole + r);
                let candidate = r - m / (rest + r * slope - m / v);
                if candidate.is_finite() && m.abs() <= ROUND_OFF * f64::EPSILON * scale {
                    // G is down to its round-off (see `solve_into`).
                    r = candidate.max(lo.max(f64::MIN_POSITIVE)).min(hi);
                    break;
                }
                if candidate > lo && candidate < hi && candidate.is_finite() {
                    candidate
                } else {
                    float_midpoint(lo, hi)
                }
            } else {
                float_midpoint(lo, hi)
            };
            if next <= lo || next >= hi || (next - r).abs() <= 2.0 * f64::EPSILON * next {
                // (max/min, not clamp: clamp panics if hi has fallen below MIN_POSITIVE.)
                r = next.max(lo.max(f64::MIN_POSITIVE)).min(hi);
                break;
            }
            r = next;
        }
        (r, iterations, evaluations)
    }
}

// ---------------------------------------------------------------------------------------
// Batch API: many feeds at once, rows of two-dimensional arrays.
// ---------------------------------------------------------------------------------------
