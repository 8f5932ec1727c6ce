//! Runtime dispatch of the solver to its x86-64-v3 (AVX2) build through `pulp`, and the
//! solver body both builds inline.

use super::api::{MOLE_FRACTION_SUM_TOLERANCE, Options, Phase, RachfordRiceError, SplitSummary, validated};
use super::iterate::{Orientation, Oriented};
use super::negative::negative_root;
use super::window::SetUp;

/// The solver built for the baseline target (SSE2 on x86-64, NEON on aarch64).
///
/// [`solve_into`] runs this same code built for x86-64-v3 (AVX2) where the processor has it,
/// through `pulp`'s runtime detection. Both builds do the same floating-point operations in
/// the same order (no fused multiply-adds: Rust does not contract `a * b + c`), so they give
/// the same results to the bit; the wider instruction set only drops register copies (its
/// three-operand forms) and so about a fifth of the instructions.
#[inline(never)]
pub(super) fn solve_baseline(
    z: &[f64],
    k: &[f64],
    options: Options,
    x: &mut [f64],
    y: &mut [f64],
) -> Result<SplitSummary, RachfordRiceError> {
    solve_inline(z, k, options, x, y)
}

/// The arguments of [`solve_into`], for `pulp`'s dispatch.
#[cfg(target_arch = "x86_64")]
pub(super) struct Solve<'a> {
    pub(super) z: &'a [f64],
    pub(super) k: &'a [f64],
    pub(super) options: Options,
    pub(super) x: &'a mut [f64],
    pub(super) y: &'a mut [f64],
}

#[cfg(target_arch = "x86_64")]
impl pulp::NullaryFnOnce for Solve<'_> {
    type Output = Result<SplitSummary, RachfordRiceError>;

    /// Inlined into `pulp`'s x86-64-v3 function, with everything the solver's common path
    /// calls (marked `#[inline(always)]`), so that all of it is built for that target.
    #[inline(always)]
    fn call(self) -> Self::Output {
        solve_inline(self.z, self.k, self.options, self.x, self.y)
    }
}

/// The body of [`solve_into`].
#[inline(always)]
pub(super) fn solve_inline(
    z: &[f64],
    k: &[f64],
    options: Options,
    x: &mut [f64],
    y: &mut [f64],
) -> Result<SplitSummary, RachfordRiceError> {
    if z.is_empty() || z.len() != k.len() || x.len() != z.len() || y.len() != z.len() {
        // `validated` names a fault in z or K first; else x or y is the wrong length.
        validated(z, k)?;
        return Err(RachfordRiceError::LengthMismatch {
            z_len: z.len(),
            k_len: x.len().min(y.len()),
        });
    }
    let n = z.len();
    // The set-up pass (`SetUp::gather`) checks the input and gathers everything the phase
    // test, the orientation, the poles and the first step need.
    let set_up = SetUp::gather(z, k);
    if !set_up.valid {
        // Find the first bad value, in the order `validated` checks them.
        validated(z, k)?;
    }
    if (set_up.sum - 1.0).abs() > MOLE_FRACTION_SUM_TOLERANCE {
        return Err(RachfordRiceError::MoleFractionSum { sum: set_up.sum });
    }
    let inv_sum = 1.0 / set_up.sum;

    // Phase tests: F(0) ≤ 0 is liquid. F is decreasing between its poles, which lie outside
    // [0, 1], so F(½) < 0 rules out an all-vapour feed and F(1) matters only when F(½) ≥ 0.
    let mut evaluations = 1;
    if set_up.f0 <= 0.0 {
        if options.negative_flash
            && let Some(s) = negative_root(z, k, inv_sum, Orientation::Liquid, (set_up.k_min, set_up.k_max), x, y)
        {
            return Ok(s);
        }
        for i in 0..n {
            x[i] = z[i] * inv_sum;
            y[i] = k[i] * x[i];
        }
        return Ok(SplitSummary {
            phase: Phase::Liquid,
            vapour_fraction: 0.0,
            liquid_fraction: 1.0,
            iterations: 0,
            evaluations,
        });
    }
    evaluations += 1;
    if set_up.half[0] >= 0.0 {
        evaluations += 1;
        if set_up.f1 >= 0.0 {
            if options.negative_flash
                && let Some(s) = negative_root(z, k, inv_sum, Orientation::Vapour, (set_up.k_min, set_up.k_max), x, y)
            {
                return Ok(s);
            }
            for i in 0..n {
                y[i] = z[i] * inv_sum;
                // A component with zᵢ = 0 has xᵢ = 0 (0/0 when also Kᵢ = 0).
                x[i] = if y[i] == 0.0 { 0.0 } else { y[i] / k[i] };
            }
            return Ok(SplitSummary {
                phase: Phase::Vapour,
                vapour_fraction: 1.0,
                liquid_fraction: 0.0,
                iterations: 0,
                evaluations,
            });
        }
    }

    // Two phases. F(½) chooses the orientation: G(s) = F(β) with s = β, or −F(β) with
    // s = 1 − β; either way G(½) ≤ 0 and the root lies in (0, ½].
    let orientation = if set_up.half[0] < 0.0 {
        Orientation::Liquid
    } else {
        Orientation::Vapour
    };
    // Both nearest poles are finite here: K_max > 1 and K_min < 1, since F(0) > 0 > F(1).
    let problem = Oriented::new(z, k, inv_sum, orientation, set_up.k_min, set_up.k_max);
    if set_up.half[0] == 0.0 {
        let s = 0.5;
        problem.write(s, x, y);
        return Ok(problem.summary(s, 0, evaluations));
    }
    // Start at ½ with G, G′ and G″ from the set-up pass (G = F and G″ = F″ in the liquid
    // orientation, both negated in the vapour one; G′ = F′ in both). ½ may lie above the
    // window: the first step still starts there, and the bracket catches it if it lands
    // outside. The scale of G's round-off at ½ is not gathered (one running sum fewer in the
    // set-up pass); NaN turns the round-off test off for the first step, and a root accepted
    // there is polished. Like every G in the iteration, these are from the raw z
    // ([`Oriented::derivatives_in`]).
    let [f_half, df_half, d2f_half] = set_up.half;
    let sign = if orientation == Orientation::Liquid { 1.0 } else { -1.0 };
    let start = [sign * f_half, df_half, sign * 2.0 * d2f_half, f64::NAN];
    // The window from the raw z carries a round-off margin that also covers normalising z
    // when Σz is 1 to within 2nε; a feed further off (up to the 1e-6 tolerance) has it from
    // the normalised z.
    let raw = (set_up.sum - 1.0).abs() <= 2.0 * n as f64 * f64::EPSILON;
    Ok(match orientation {
        Orientation::Liquid => problem.solve_from_half::<true>(start, raw, evaluations, x, y),
        Orientation::Vapour => problem.solve_from_half::<false>(start, raw, evaluations, x, y),
    })
}
