//! The set-up pass (sums, extremes, phase tests) and the window of β that brackets the
//! root, from the pole bounds of each component pair.

use wide::f64x2;

/// Components are taken two at a time, one per SIMD lane (`wide::f64x2`: SSE2 on every
/// x86-64, NEON on aarch64): each sum then carries half the dependency chain, and the
/// divisions of a pair issue as one instruction. A last odd component is paired with
/// (z, K) = (0, 1), which adds nothing to any sum and gives no bound.
#[inline(always)]
pub(super) fn in_pairs(z: &[f64], k: &[f64], mut f: impl FnMut(f64x2, f64x2)) {
    let (z_pairs, z_rest) = z.as_chunks::<2>();
    let (k_pairs, k_rest) = k.as_chunks::<2>();
    for (zz, kk) in z_pairs.iter().zip(k_pairs) {
        f(f64x2::new(*zz), f64x2::new(*kk));
    }
    if let (Some(&z), Some(&k)) = (z_rest.first(), k_rest.first()) {
        f(f64x2::new([z, 0.0]), f64x2::new([k, 1.0]));
    }
}

/// The Leibovici–Neoschil lower bounds from a pair of components (raw or normalised zᵢ):
/// [lower β, lower γ], NaN (every bit set) where a component gives none, which
/// [`Window::add`] passes over. The upper bounds are 1 − (the other lower bound), formed in
/// [`Window::finish`].
///
/// From yᵢ ≤ 1 (Kᵢ > 1: β ≥ (Kᵢzᵢ − 1)/(Kᵢ − 1)) and xᵢ ≤ 1 (Kᵢ < 1: γ ≥ (zᵢ − Kᵢ)/(1 − Kᵢ)).
/// `q` is 1/(Kᵢ − 1). Both lower bounds are formed directly, so that each keeps its relative
/// precision near its own zero, where a component with K = 0 (γ) or a large K (β) puts a
/// pole: the bound is then about zᵢ, within a hair of the root, and keeps the iteration off
/// the pole. The upper bounds face poles at or beyond 1, far from the bracket (0, ½], and
/// need no more than ε absolute. Each bound is widened by its round-off, `u` times the size
/// of the terms of its numerator (Kᵢzᵢ − 1 − u(Kᵢzᵢ + 1) and Kᵢ − zᵢ + u(Kᵢ + zᵢ), written
/// with the factors 1 ± u): the normalised zᵢ sum to 1 only within about nε, the numerators
/// cancel, and q is rounded. Without the margin a bound can land on the wrong side of a root
/// that lies within round-off of it (a binary with one K = 0 has its root exactly on the
/// bound). A component with zᵢ = 0 gives bounds outside [0, 1], which do no harm.
#[inline(always)]
pub(super) fn bounds(z: f64x2, k: f64x2, q: f64x2, u: f64) -> [f64x2; 2] {
    let one = f64x2::ONE;
    let (up, down) = (f64x2::splat(1.0 + u), f64x2::splat(1.0 - u));
    // OR with a comparison's all-ones lanes: one instruction, where a select takes three.
    [
        (k * z * down - up) * (q | k.simd_le(one)),
        (k * up - z * down) * (q | k.simd_ge(one)),
    ]
}

/// The round-off margin of [`bounds`] for `n` components.
pub(super) fn window_margin(n: usize) -> f64 {
    (4.0 * n as f64 + 10.0) * f64::EPSILON
}

/// The Leibovici–Neoschil window from zᵢ·`inv_sum` (1 for the raw z, 1/Σz for the
/// normalised z when Σz is not 1 to within 2nε): [lower β, upper β, lower γ, upper γ]. The
/// common path forms it in the loop of the first evaluation instead
/// ([`Oriented::window_and_derivatives_in`]).
#[inline(always)]
pub(super) fn window(z: &[f64], k: &[f64], inv_sum: f64) -> [f64; 4] {
    let u = window_margin(z.len());
    let mut w = Window::new();
    in_pairs(z, k, |z, k| {
        w.add(bounds(z * inv_sum, k, f64x2::ONE / (k - f64x2::ONE), u))
    });
    w.finish()
}

/// Pairwise running bounds, combined by [`finish`](Self::finish).
pub(super) struct Window(pub(super) [f64x2; 2]);

impl Window {
    pub(super) fn new() -> Self {
        Self([f64x2::splat(f64::NEG_INFINITY); 2])
    }

    /// Takes in the bounds of a pair; a NaN bound leaves the running one as it is (the
    /// hardware's max returns its second operand when either is NaN). The running bounds
    /// are never NaN: a bound that [`bounds`] does not mask is finite for valid input (q is
    /// ±∞ only where K = 1, which is masked).
    #[inline(always)]
    pub(super) fn add(&mut self, b: [f64x2; 2]) {
        let w = &mut self.0;
        w[0] = b[0].fast_max(w[0]);
        w[1] = b[1].fast_max(w[1]);
    }

    /// [lower β, upper β, lower γ, upper γ]; each upper bound is 1 − (the other lower
    /// bound) plus the absolute round-off of that subtraction.
    #[inline(always)]
    pub(super) fn finish(&self) -> [f64; 4] {
        let [a, c] = self.0.map(f64x2::to_array);
        let lower_beta = if a[1] > a[0] { a[1] } else { a[0] };
        let lower_gamma = if c[1] > c[0] { c[1] } else { c[0] };
        [
            lower_beta,
            (1.0 - lower_gamma) + f64::EPSILON,
            lower_gamma,
            (1.0 - lower_beta) + f64::EPSILON,
        ]
    }
}

/// What the set-up pass gathers, from the raw z (multiply the sums by 1/Σz).
pub(super) struct SetUp {
    /// No value is NaN, infinite or negative (when false, possibly only an overflowing sum:
    /// the ordered validation decides).
    pub(super) valid: bool,
    /// Σz.
    pub(super) sum: f64,
    /// Σ zᵢ(Kᵢ − 1) = F(0).
    pub(super) f0: f64,
    /// Σ zᵢ(Kᵢ − 1)/Kᵢ = F(1), over zᵢ > 0.
    pub(super) f1: f64,
    /// F(½), F′(½) and Σ zᵢ rᵢ³ = F″(½)/2, with rᵢ = (Kᵢ − 1)/(1 + ½(Kᵢ − 1)).
    pub(super) half: [f64; 3],
    /// The extreme K-values over zᵢ > 0.
    pub(super) k_min: f64,
    pub(super) k_max: f64,
}

impl SetUp {
    /// One loop over the components, two at a time. The window is formed in the next loop,
    /// with the first evaluation ([`Oriented::window_and_derivatives_in`]): its running
    /// bounds added to the nine sums here made the loop spill to the stack (17 moves per
    /// pair with three bounds, 8 with two on x86-64-v3).
    #[inline(always)]
    pub(super) fn gather(z: &[f64], k: &[f64]) -> Self {
        let (zero, one) = (f64x2::ZERO, f64x2::ONE);
        // The least zᵢ or Kᵢ (or 0): negative values. NaN or infinite values make Σz or F(0)
        // NaN or infinite (0·∞ is NaN).
        let mut least = zero;
        let (mut sum, mut f0, mut f1) = (zero, zero, zero);
        let mut half = [zero; 3];
        let (mut k_min, mut k_max) = (f64x2::splat(f64::INFINITY), zero);
        in_pairs(z, k, |z, k| {
            least = least.fast_min(z.fast_min(k));
            let t = k - one;
            sum += z;
            f0 += z * t;
            // Masks by AND (0 where absent) and OR (NaN where absent, passed over by the
            // fast min): one instruction each, where a select takes three.
            let present = z.simd_gt(zero);
            f1 += (z * t / k) & present;
            // rᵢ = (Kᵢ − 1)/(1 + ½(Kᵢ − 1)) = 2(Kᵢ − 1)/(Kᵢ + 1), doubled after the division
            // so that no Kᵢ near the top of the f64 range overflows.
            let r = t / (k + one);
            let r = r + r;
            let term = z * r;
            half[0] += term;
            half[1] -= term * r;
            half[2] += term * r * r;
            k_min = (k | z.simd_le(zero)).fast_min(k_min);
            k_max = k_max.fast_max(k & present);
        });
        let [k_min, k_max] = [k_min.to_array(), k_max.to_array()];
        let least = least.to_array();
        let (sum, f0) = (sum.reduce_add(), f0.reduce_add());
        Self {
            valid: sum.is_finite() && f0.is_finite() && least[0] >= 0.0 && least[1] >= 0.0,
            sum,
            f0,
            f1: f1.reduce_add(),
            half: half.map(f64x2::reduce_add),
            k_min: k_min[0].min(k_min[1]),
            k_max: k_max[0].max(k_max[1]),
        }
    }
}
