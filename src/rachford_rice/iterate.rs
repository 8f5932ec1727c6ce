//! The iteration: safeguarded Halley steps on the pole-weighted function in the chosen
//! orientation, the rate test and the write-back of x and y.

use super::api::{Phase, SplitSummary};
use super::double_double::{POLISH_STEPS, POLISH_ULPS, fast_two_sum, two_product, two_sum};
use super::window::{Window, bounds, in_pairs, window, window_margin};
use wide::f64x2;

/// How many safeguarded Halley (or Newton) steps before bisection alone takes over.
pub(super) const NEWTON_STEPS: u32 = 50;

/// The iteration stops once |G| ≤ ROUND_OFF · ε · Σ|terms of G|: G is then round-off.
pub(super) const ROUND_OFF: f64 = 4.0;

/// A step of Halley's method accepted without a further evaluation only below this
/// fraction of s, and only when the rate test passes.
pub(super) const RATE_STEP: f64 = 1e-4;

/// The midpoint of two non-negative floats in the ordering of their bit patterns: repeated
/// halving reaches adjacent floats in at most 64 steps, whatever the scale.
pub(super) fn float_midpoint(lo: f64, hi: f64) -> f64 {
    if hi > 2.0 * lo {
        f64::from_bits(lo.to_bits() / 2 + hi.to_bits() / 2 + (lo.to_bits() & hi.to_bits() & 1))
    } else {
        lo + 0.5 * (hi - lo)
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Orientation {
    /// The unknown is β; denominators 1 + β(K − 1).
    Liquid,
    /// The unknown is γ = 1 − β; denominators K + γ(1 − K).
    Vapour,
}

impl Orientation {
    /// The poles of the oriented G nearest to the bracket, (s₋ ≤ 0, s₊ ≥ 1), from the least
    /// and greatest K over the components present (±∞ where no component has K on that side
    /// of 1). The pole −pᵢ/aᵢ is monotone in Kᵢ in both orientations, so the extremes give
    /// the nearest; each is written as −pᵢ/aᵢ of its component, bit for bit, which
    /// [`Oriented::denominator_from_pole`] relies on to recognise the pole's own component.
    pub(super) fn poles(self, k_min: f64, k_max: f64) -> (f64, f64) {
        let below = k_min < 1.0;
        let above = k_max > 1.0;
        match self {
            Orientation::Liquid => (
                if above { -1.0 / (k_max - 1.0) } else { f64::NEG_INFINITY },
                if below { -1.0 / (k_min - 1.0) } else { f64::INFINITY },
            ),
            Orientation::Vapour => (
                if below {
                    -k_min / (1.0 - k_min)
                } else {
                    f64::NEG_INFINITY
                },
                if above { -k_max / (1.0 - k_max) } else { f64::INFINITY },
            ),
        }
    }
}

/// Where the iteration stands: s, [G, G′, G″, scale] there, the counts, and the last step
/// (0 after a bisection) and whether it was Halley's, for the rate test.
pub(super) struct State {
    pub(super) s: f64,
    pub(super) derivatives: [f64; 4],
    pub(super) iterations: u32,
    pub(super) evaluations: u32,
    pub(super) last_step: f64,
    pub(super) last_halley: bool,
}

/// A pair's terms of G, −G′, G″/2 and Σ|terms| at s, added to `acc`.
#[inline(always)]
pub(super) fn derivative_terms<const LIQUID: bool>(acc: &mut [f64x2; 4], z: f64x2, k: f64x2, s: f64x2) {
    let (p, a) = if LIQUID {
        (f64x2::ONE, k - f64x2::ONE)
    } else {
        (k, f64x2::ONE - k)
    };
    let r = a / (p + s * a);
    let term = z * r;
    acc[0] += term;
    acc[1] -= term * r;
    acc[2] += term * r * r;
    acc[3] += term.abs();
}

/// [G, G′, G″, scale] from the sums of [`derivative_terms`].
#[inline(always)]
pub(super) fn finish_derivatives(acc: [f64x2; 4]) -> [f64; 4] {
    let [g, dg, d2g, scale] = acc.map(f64x2::reduce_add);
    [g, dg, 2.0 * d2g, scale]
}

/// G(s) = Σ zᵢ aᵢ / (pᵢ + s aᵢ), decreasing in s, with (p, a) = (1, K − 1) in the liquid
/// orientation and (K, 1 − K) in the vapour one.
pub(super) struct Oriented<'a> {
    pub(super) z: &'a [f64],
    pub(super) k: &'a [f64],
    pub(super) inv_sum: f64,
    pub(super) orientation: Orientation,
    /// The nearest pole at or below 0 (−∞ if none).
    pub(super) pole_lo: f64,
    /// The nearest pole at or above 1 (+∞ if none).
    pub(super) pole_hi: f64,
}

impl<'a> Oriented<'a> {
    /// The problem in `orientation`, with the nearest poles from the extreme K-values of the
    /// components present ([`Orientation::poles`]).
    pub(super) fn new(
        z: &'a [f64],
        k: &'a [f64],
        inv_sum: f64,
        orientation: Orientation,
        k_min: f64,
        k_max: f64,
    ) -> Self {
        let (pole_lo, pole_hi) = orientation.poles(k_min, k_max);
        Self {
            z,
            k,
            inv_sum,
            orientation,
            pole_lo,
            pole_hi,
        }
    }

    #[inline]
    pub(super) fn coefficients(&self, i: usize) -> (f64, f64) {
        let k = self.k[i];
        match self.orientation {
            Orientation::Liquid => (1.0, k - 1.0),
            Orientation::Vapour => (k, 1.0 - k),
        }
    }

    /// Halley's step for H(s) = (s − s₋)(s₊ − s)·G(s) at s, from G, G′ and G″ there.
    ///
    /// With u = s − s₋, v = s₊ − s and w = uv: H = wG, H′ = (v − u)G + wG′ and
    /// H″ = −2G + 2(v − u)G′ + wG″; the step is 2HH′/(2H′² − HH″), one division. Where the
    /// curvature term would more than double Newton's step H/H′, Newton's step is taken
    /// instead (far from the root, where H″ is not to be trusted). w is at most about 1e32
    /// (poles within 4.5e15 of the window), so the products stay in range for any feed the
    /// window admits; a step that still overflows is not finite and the bracket is bisected.
    /// Returns the step and whether it is Halley's (not Newton's).
    #[inline(always)]
    pub(super) fn halley_step(&self, s: f64, g: f64, dg: f64, d2g: f64) -> (f64, bool) {
        let (u, v) = (s - self.pole_lo, self.pole_hi - s);
        let w = u * v;
        let h = w * g;
        let dh = (v - u) * g + w * dg;
        let d2h = -2.0 * g + 2.0 * (v - u) * dg + w * d2g;
        let dh2 = dh * dh;
        let den = 2.0 * dh2 - h * d2h;
        let halley = den >= dh2;
        let den = if halley { den } else { 2.0 * dh2 };
        (2.0 * h * dh / den, halley)
    }

    /// From s = ½, where G, G′, G″ and the scale are `start`: the window, the bracket and
    /// the iteration; writes x and y at the root.
    #[inline(always)]
    pub(super) fn solve_from_half<const LIQUID: bool>(
        &self,
        start: [f64; 4],
        raw: bool,
        evaluations: u32,
        x: &mut [f64],
        y: &mut [f64],
    ) -> SplitSummary {
        let [g, dg, d2g, _] = start;
        let (step, halley) = self.halley_step(0.5, g, dg, d2g);
        let first = 0.5 - step;
        // A first step that the iteration would take without a test (see `iterate`) and
        // that stays inside (0, ½): G there is evaluated in the window's pass, and used only
        // if the step lands inside the window (else the iteration starts from ½ as usual and
        // bisects the bracket).
        let speculate = raw && step.abs() > RATE_STEP * 0.5 && first > 0.0 && first < 0.5;
        let (window, at_first) = if speculate {
            let (window, at_first) = self.window_and_derivatives_in::<LIQUID>(first);
            (window, Some(at_first))
        } else {
            (window(self.z, self.k, if raw { 1.0 } else { self.inv_sum }), None)
        };
        let (ln_lo, ln_hi) = if LIQUID {
            (window[0], window[1])
        } else {
            (window[2], window[3])
        };
        // Bracket: (0, ½] intersected with the window.
        let lo = if ln_lo > 0.0 { ln_lo } else { 0.0 };
        let hi = if ln_hi < 0.5 { ln_hi } else { 0.5 };
        if lo >= hi {
            // Round-off can cross the bounds only when the window has collapsed onto the root.
            let s = (0.5 * (lo + hi)).clamp(f64::MIN_POSITIVE, 0.5);
            self.write(s, x, y);
            return self.summary(s, 0, evaluations);
        }
        let state = match at_first {
            Some(derivatives) if first > lo && first < hi => State {
                s: first,
                derivatives,
                iterations: 1,
                evaluations: evaluations + 1,
                last_step: step,
                last_halley: halley,
            },
            _ => State {
                s: 0.5,
                derivatives: start,
                iterations: 0,
                evaluations,
                last_step: 0.0,
                last_halley: false,
            },
        };
        self.iterate::<LIQUID>((lo, hi), state, x, y)
    }

    /// The window ([`bounds`] from the raw z) and [`derivatives_in`](Self::derivatives_in)
    /// at s, in one pass.
    #[inline(always)]
    pub(super) fn window_and_derivatives_in<const LIQUID: bool>(&self, s: f64) -> ([f64; 4], [f64; 4]) {
        let u = window_margin(self.z.len());
        let one = f64x2::ONE;
        let mut window = Window::new();
        let mut acc = [f64x2::ZERO; 4];
        let s = f64x2::splat(s);
        in_pairs(self.z, self.k, |z, k| {
            window.add(bounds(z, k, one / (k - one), u));
            derivative_terms::<LIQUID>(&mut acc, z, k, s);
        });
        (window.finish(), finish_derivatives(acc))
    }

    /// Halley's method on H from `state`, inside `bracket`; writes x and y at the root. The
    /// orientation is fixed at compile time, so the loop carries no branch on it.
    #[inline(always)]
    pub(super) fn iterate<const LIQUID: bool>(
        &self,
        bracket: (f64, f64),
        state: State,
        x: &mut [f64],
        y: &mut [f64],
    ) -> SplitSummary {
        let (mut lo, mut hi) = bracket;
        let State {
            mut s,
            derivatives: [mut g, mut dg, mut d2g, mut scale],
            mut iterations,
            mut evaluations,
            // The last step taken (0 after a bisection) and whether it was Halley's, for the
            // rate test.
            mut last_step,
            mut last_halley,
        } = state;
        loop {
            if g == 0.0 {
                break;
            }
            // (s, lo and hi are never NaN.)
            if g > 0.0 {
                if s > lo {
                    lo = s;
                }
            } else if s < hi {
                hi = s;
            }
            let next = if iterations <= NEWTON_STEPS {
                let (step, halley) = self.halley_step(s, g, dg, d2g);
                let candidate = s - step;
                let at_round_off = g.abs() <= ROUND_OFF * f64::EPSILON * scale;
                if step.abs() > RATE_STEP * s && !at_round_off {
                    // A step this large is neither tiny nor passes the rate test (below).
                    if candidate > lo && candidate < hi && candidate.is_finite() {
                        (last_step, last_halley) = (step, halley);
                        candidate
                    } else {
                        last_step = 0.0;
                        float_midpoint(lo, hi)
                    }
                } else {
                    // Converged when the step is below the resolution of s; when G is down to
                    // its own round-off (near β = 0 or 1 the absolute error of G, about
                    // ε Σ|terms|, can exceed ε·s·|G′|, and the step test alone would then never
                    // pass); or when the step is small and the rate of convergence so far says
                    // the error left after it is below the resolution of s. With e ≈ C·e_prev^p
                    // and steps standing for errors, the error after this step is about
                    // |step|·ρ^p with ρ = |step/last step|: p = 3 when this step and the last
                    // were Halley's, else (a Newton step among them) p = 2.
                    let rate = step.abs() / last_step.abs();
                    let rate_p = if halley && last_halley {
                        rate * rate * rate
                    } else {
                        rate * rate
                    };
                    let by_rate = step.abs() <= RATE_STEP * s && step.abs() * rate_p <= 0.25 * f64::EPSILON * s;
                    let tiny = step.abs() <= 2.0 * f64::EPSILON * s || by_rate;
                    // A tiny step is believed only if G agrees that s is near its root (|G/G′|
                    // small against s): close to a pole, H′ is a difference of large terms and
                    // its round-off can make a far-off point look converged.
                    let trusted = g.abs() <= 1e-3 * s * dg.abs();
                    if candidate.is_finite() && (at_round_off || (tiny && trusted)) {
                        // Converged; the step may round onto the bracket end just moved to s.
                        s = if candidate < lo {
                            lo
                        } else if candidate > hi {
                            hi
                        } else {
                            candidate
                        };
                        break;
                    }
                    if candidate > lo && candidate < hi && candidate.is_finite() && !tiny {
                        (last_step, last_halley) = (step, halley);
                        candidate
                    } else {
                        last_step = 0.0;
                        float_midpoint(lo, hi)
                    }
                }
            } else {
                float_midpoint(lo, hi)
            };
            if next <= lo || next >= hi {
                // lo and hi are adjacent floats: the root is pinned down to round-off.
                s = if next <= lo { lo } else { hi };
                if s == 0.0 {
                    s = hi;
                }
                break;
            }
            s = next;
            [g, dg, d2g, scale] = self.derivatives_in::<LIQUID>(s);
            evaluations += 1;
            iterations += 1;
        }
        // Where the round-off of G, about ε·Σ|terms|, leaves s uncertain by more than
        // POLISH_ULPS units in its last place (K-values all near 1, or a root within a
        // hair of β = 0 or 1), finish with Newton steps on G evaluated in double-double.
        if scale.is_nan() || scale > POLISH_ULPS * s * dg.abs() {
            let (polished, steps) = self.polish::<LIQUID>(s, (bracket.0.max(f64::MIN_POSITIVE), bracket.1));
            s = polished;
            evaluations += steps;
            iterations += steps;
        }
        self.write_in::<LIQUID>(s, x, y);
        self.summary(s, iterations, evaluations)
    }

    /// Newton steps on G with G evaluated in double-double arithmetic (every term
    /// zᵢaᵢ/(pᵢ + s aᵢ) and their sum carried to about ε², with the raw z, whose root is the
    /// same), from `s` inside `bracket`: the root of the given f64 inputs to about ε
    /// relative however ill-conditioned G is in f64. Returns s and the steps taken.
    pub(super) fn polish<const LIQUID: bool>(&self, mut s: f64, (lo, hi): (f64, f64)) -> (f64, u32) {
        let mut steps = 0;
        while steps < POLISH_STEPS {
            steps += 1;
            let (g, dg, d2g) = self.accurate_g::<LIQUID>(s);
            let step = g / dg;
            let next = s - step;
            if !next.is_finite() {
                break;
            }
            s = next.clamp(lo, hi);
            // Newton's error after the step is about |G″/(2G′)|·step² (Taylor): stop once
            // that is below the resolution of s.
            if (d2g / (2.0 * dg) * step * step).abs() <= 0.25 * f64::EPSILON * s.abs() {
                break;
            }
        }
        (s, steps)
    }

    /// G(s) in double-double arithmetic, and G′(s) and G″(s) in f64, all with the raw z.
    pub(super) fn accurate_g<const LIQUID: bool>(&self, s: f64) -> (f64, f64, f64) {
        let (mut sum, mut sum_lo, mut dg, mut d2g) = (0.0, 0.0, 0.0, 0.0);
        for (&z, &k) in self.z.iter().zip(self.k) {
            if z == 0.0 {
                continue;
            }
            // aᵢ and pᵢ + s aᵢ exactly as double-double; then zᵢaᵢ/dᵢ.
            let (p, (a, a_lo)) = if LIQUID {
                (1.0, two_sum(k, -1.0))
            } else {
                (k, two_sum(1.0, -k))
            };
            let (m, m_lo) = two_product(s, a);
            let (d, d_err) = two_sum(p, m);
            let (d, d_lo) = fast_two_sum(d, d_err + m_lo + s * a_lo);
            let (n, n_err) = two_product(z, a);
            let n_lo = n_err + z * a_lo;
            let q = n / d;
            let (qd, qd_lo) = two_product(q, d);
            let q_lo = ((n - qd) - qd_lo + n_lo - q * d_lo) / d;
            let (t, e) = two_sum(sum, q);
            sum = t;
            sum_lo += e + q_lo;
            let r = a / d;
            dg -= z * r * r;
            d2g += 2.0 * z * r * r * r;
        }
        (sum + sum_lo, dg, d2g)
    }

    /// [G(s), G′(s), G″(s), Σ|terms of G|], the last the scale of the round-off in G, all
    /// from the raw z (Σz times the values for the normalised z). The iteration needs
    /// nothing that depends on that factor: G's sign and root, Halley's step (a ratio of
    /// products of H, H′ and H″, each carrying it once) and the convergence tests (ratios of
    /// G, G′ and the scale) are the same with or without it, so it is not applied.
    #[inline(always)]
    pub(super) fn derivatives_in<const LIQUID: bool>(&self, s: f64) -> [f64; 4] {
        let mut acc = [f64x2::ZERO; 4];
        let s = f64x2::splat(s);
        in_pairs(self.z, self.k, |z, k| derivative_terms::<LIQUID>(&mut acc, z, k, s));
        finish_derivatives(acc)
    }

    pub(super) fn write(&self, s: f64, x: &mut [f64], y: &mut [f64]) {
        match self.orientation {
            Orientation::Liquid => self.write_in::<true>(s, x, y),
            Orientation::Vapour => self.write_in::<false>(s, x, y),
        }
    }

    #[inline(always)]
    pub(super) fn write_in<const LIQUID: bool>(&self, s: f64, x: &mut [f64], y: &mut [f64]) {
        let s = f64x2::splat(s);
        // d > 0 inside the window; a zero-feed component has x = y = 0.
        let x_of = |z: f64x2, k: f64x2| {
            let (p, a) = if LIQUID {
                (f64x2::ONE, k - f64x2::ONE)
            } else {
                (k, f64x2::ONE - k)
            };
            let z = z * self.inv_sum;
            z.simd_eq(f64x2::ZERO).select(f64x2::ZERO, z / (p + s * a))
        };
        let (x_pairs, x_rest) = x.as_chunks_mut::<2>();
        let (y_pairs, y_rest) = y.as_chunks_mut::<2>();
        let (z_pairs, z_rest) = self.z.as_chunks::<2>();
        let (k_pairs, k_rest) = self.k.as_chunks::<2>();
        for (((xx, yy), zz), kk) in x_pairs.iter_mut().zip(y_pairs).zip(z_pairs).zip(k_pairs) {
            let k = f64x2::new(*kk);
            let xv = x_of(f64x2::new(*zz), k);
            *xx = xv.to_array();
            *yy = (k * xv).to_array();
        }
        for (((xi, yi), &z), &k) in x_rest.iter_mut().zip(y_rest).zip(z_rest).zip(k_rest) {
            let xv = x_of(f64x2::splat(z), f64x2::splat(k)).to_array()[0];
            *xi = xv;
            *yi = k * xv;
        }
    }

    /// The denominator pᵢ + s aᵢ at s = s₋ + r: exactly aᵢr for the component(s) whose pole
    /// s₋ is, else pᵢ + s aᵢ. s₋ + r rounds away any r below ε|s₋|, so the pole component's
    /// denominator, aᵢr, is written from r to keep full precision however close the root is
    /// to the pole. The others are written from s, not as (pᵢ + s₋aᵢ) + r aᵢ: far from the
    /// pole (|s| ≪ |s₋|) that sum would cancel to a rounding error of ε|s₋ aᵢ|, not ε|s aᵢ|.
    #[inline]
    pub(super) fn denominator_from_pole(&self, i: usize, r: f64) -> f64 {
        let (p, a) = self.coefficients(i);
        let pole = self.pole_lo;
        if a > 0.0 && -p / a == pole {
            r * a
        } else {
            p + (pole + r) * a
        }
    }

    /// At s = s₋ + r: [m, R, R′, scale], where the component(s) whose pole s₋ is contribute
    /// exactly z_p/r to G (z_p their normalised feed), R is the rest of G and R′ its slope,
    /// m = rG = z_p + rR, and scale = r·Σ|terms of G|, the scale of m's round-off.
    /// Zero-feed components are skipped.
    ///
    /// Near the pole, G and G′ are dominated by z_p/r and −z_p/r²; Newton's step on the
    /// pole-weighted function formed from them is then a difference of huge terms that
    /// cancel to nothing (at r = 1e-154 every digit goes), and the iteration stalls. From
    /// m, R and R′ it has no such difference ([`negative_near_pole`](Self::negative_near_pole)).
    pub(super) fn pole_split_from_pole(&self, r: f64) -> [f64; 4] {
        let pole = self.pole_lo;
        let s = pole + r;
        let (mut z_pole, mut rest, mut slope, mut size) = (0.0, 0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            if self.z[i] == 0.0 {
                continue;
            }
            let (p, a) = self.coefficients(i);
            let zi = self.z[i] * self.inv_sum;
            if a > 0.0 && -p / a == pole {
                z_pole += zi;
                continue;
            }
            let q = a / (p + s * a);
            let term = zi * q;
            rest += term;
            slope -= term * q;
            size += term.abs();
        }
        [z_pole + r * rest, rest, slope, z_pole + r * size]
    }

    /// [`write`](Self::write) at s = s₋ + r.
    pub(super) fn write_from_pole(&self, r: f64, x: &mut [f64], y: &mut [f64]) {
        for i in 0..self.z.len() {
            let zi = self.z[i] * self.inv_sum;
            x[i] = if zi == 0.0 {
                0.0
            } else {
                zi / self.denominator_from_pole(i, r)
            };
            y[i] = self.k[i] * x[i];
        }
    }

    pub(super) fn summary(&self, s: f64, iterations: u32, evaluations: u32) -> SplitSummary {
        let (vapour_fraction, liquid_fraction) = match self.orientation {
            Orientation::Liquid => (s, 1.0 - s),
            Orientation::Vapour => (1.0 - s, s),
        };
        SplitSummary {
            phase: Phase::TwoPhase,
            vapour_fraction,
            liquid_fraction,
            iterations,
            evaluations,
        }
    }
}
