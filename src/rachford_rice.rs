//! The Rachford–Rice solver: the phase split of a feed of mole fractions z with K-values K.
//!
//! The vapour fraction β solves the Rachford–Rice equation (Rachford & Rice, *J. Petrol.
//! Technol.* 4 (1952) 19)
//!
//! ```text
//! F(β) = Σ zᵢ (Kᵢ − 1) / (1 + β (Kᵢ − 1)) = 0,
//! xᵢ = zᵢ / (1 + β (Kᵢ − 1)),   yᵢ = Kᵢ xᵢ.
//! ```
//!
//! # Method
//! * **Phase test.** F(0) = Σ zᵢ(Kᵢ − 1) ≤ 0: liquid (β = 0, x = z). F(1) = Σ zᵢ(Kᵢ − 1)/Kᵢ
//!   ≥ 0: vapour (β = 1, y = z). Otherwise there is one root in (0, 1).
//! * **Orientation (after Nielsen & Lia, 2023, *Avoiding round-off error in the
//!   Rachford–Rice equation*).** F(½) decides whether the root lies in (0, ½] or [½, 1).
//!   In the second case the unknown becomes the liquid fraction γ = 1 − β, and the
//!   denominators are written Kᵢ + γ(1 − Kᵢ). Either way the unknown s lies in (0, ½] and
//!   every denominator is a sum without cancellation: no precision is lost in forming
//!   1 − β, x or y as β → 0, β → 1 or Kᵢ → 0, and both fractions are returned. What remains
//!   is the conditioning of the equation itself (below).
//! * **Set-up pass.** One pass over the components checks the input and gathers Σz, F(0),
//!   F(1), F(½) with its first two derivatives and the extreme K-values, so the phase test,
//!   the orientation and the first step cost no further pass. The next pass forms the
//!   window and, in the same loop, G at the first step's landing point, which is used only
//!   if the step lands inside the window (else the first evaluation is a bisection, as it
//!   would be without the shared pass). Every pass takes the components two at a time in
//!   SIMD lanes (`wide::f64x2`: SSE2 on any x86-64, NEON on aarch64), which halves the
//!   dependency chain of each sum and pairs the divisions. On x86-64 processors with AVX2
//!   the solver runs a copy of itself built for that target (runtime detection by `pulp`),
//!   which gives the same results to the bit with about a fifth fewer instructions.
//! * **Window.** The root is bracketed by the Leibovici & Neoschil (1992) bounds
//!   (from xᵢ ≤ 1 and yᵢ ≤ 1), intersected with (0, ½].
//! * **Iteration.** Halley's method on H(s) = (s − s₋)(s₊ − s)·G(s), where G is the oriented
//!   Rachford–Rice function and s₋, s₊ its poles nearest the window: the pole factors take
//!   out the hyperbolic behaviour that slows Newton on F itself (the idea of Nichita &
//!   Leibovici, 2013, *Fluid Phase Equilib.* 353, 38), and G″ costs one multiply-add per
//!   component on top of G and G′, so the cubic step is nearly free. Where the curvature
//!   term would more than double Newton's step, Newton's step is taken. Every step that
//!   would leave the bracket is replaced by bisection of the bracket, and the bracket
//!   shrinks every step. The first step starts from s = ½ with the set-up pass's values.
//! * **Stopping.** The iteration stops when the step is below 2ε relative, when G is down
//!   to its own round-off, or when the step is below 1e-4 relative and the observed rate of
//!   convergence (the last two steps, read as cubic when both were Halley's and as
//!   quadratic otherwise) puts the error left after it below ε/4 relative; the last saves
//!   the confirming evaluation that a pure step test needs.
//! * **Polish.** In f64 the root of F is only known to about ε·Σ|zᵢ(Kᵢ − 1)/dᵢ| / |F′(β)|
//!   absolute: when every K lies within δ of 1 that is about ε/δ, and a root within a hair
//!   of β = 0 or 1 is known absolutely, not relatively, because F(0) itself is a cancelling
//!   sum. Where that bound exceeds 8 units in the last place of s, the root is finished by
//!   Newton steps on G evaluated in double-double arithmetic (every term and the sum carried
//!   to about ε², with Knuth's TwoSum and an exact product by fused multiply-add), usually
//!   one step. Well-conditioned feeds never take this path.
//! * **Termination.** After 50 safeguarded steps, bisection on the ordering of
//!   floating-point numbers takes over, which reaches adjacent floats in at most 64 steps;
//!   the polish takes at most 3 steps and stays in the bracket: the solver always stops,
//!   and it never returns NaN.
//!
//! Pros: β and 1 − β each to within a few units in their last place of the exact root of
//! the given f64 inputs, and x and y the same, whatever the conditioning: K within 1e-12 of
//! 1, roots within 1e-12 of 0 or 1, K spanning 1e-15 to 1e15 (checked against a 200-bit
//! reference on 10,000 feeds: worst 5ε for β or 1 − β, 5ε for x or y); two to three
//! iterations on typical feeds; no allocation in [`solve_into`].
//! Cons: the exactness is with respect to the f64 inputs: K-values themselves carry the
//! error of whatever model produced them, which usually dwarfs round-off. Ill-conditioned
//! feeds cost one or two extra passes (fused multiply-add is a library call on x86-64
//! builds without the `fma` target feature).
//!
//! # Failures
//! [`RachfordRiceError`]: [`Empty`](RachfordRiceError::Empty),
//! [`LengthMismatch`](RachfordRiceError::LengthMismatch),
//! [`NotFinite`](RachfordRiceError::NotFinite),
//! [`NegativeMoleFraction`](RachfordRiceError::NegativeMoleFraction),
//! [`MoleFractionSum`](RachfordRiceError::MoleFractionSum),
//! [`NegativeKValue`](RachfordRiceError::NegativeKValue). Every error is raised before
//! any iteration; a valid input always gives a result.
//!
//! ```
//! use flashduty::rachford_rice::{rachford_rice, Phase};
//! // Invented three-component feed.
//! let z = [0.3, 0.4, 0.3];
//! let k = [3.0, 1.2, 0.2];
//! let split = rachford_rice(&z, &k).unwrap();
//! assert_eq!(split.phase, Phase::TwoPhase);
//! let x = split.liquid.as_ref().unwrap();
//! let y = split.vapour.as_ref().unwrap();
//! for i in 0..3 {
//!     let back = split.liquid_fraction * x[i] + split.vapour_fraction * y[i];
//!     assert!((back - z[i]).abs() < 1e-15);
//! }
//! ```

use serde::{Deserialize, Serialize};
use wide::f64x2;

/// The tolerance on Σz: a feed whose mole fractions sum to 1 within this is normalised;
/// one further off is refused, because a spreadsheet typo must not pass silently.
pub const MOLE_FRACTION_SUM_TOLERANCE: f64 = 1e-6;

/// How many safeguarded Halley (or Newton) steps before bisection alone takes over.
const NEWTON_STEPS: u32 = 50;

/// The iteration stops once |G| ≤ ROUND_OFF · ε · Σ|terms of G|: G is then round-off.
const ROUND_OFF: f64 = 4.0;

/// The phase of a stream at equilibrium.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum Phase {
    /// All liquid (at or below the bubble point).
    #[serde(rename = "liquid")]
    Liquid,
    /// All vapour (at or above the dew point).
    #[serde(rename = "vapour")]
    Vapour,
    /// Liquid and vapour in equilibrium.
    #[serde(rename = "two-phase")]
    TwoPhase,
}

impl std::fmt::Display for Phase {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            Phase::Liquid => "liquid",
            Phase::Vapour => "vapour",
            Phase::TwoPhase => "two-phase",
        })
    }
}

/// A bad input to the solver, naming the field and value.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum RachfordRiceError {
    /// No components.
    #[error("z: the feed has no components")]
    Empty,
    /// z and K differ in length.
    #[error("K: {k_len} K-values given for {z_len} mole fractions in z")]
    LengthMismatch {
        /// Length of z.
        z_len: usize,
        /// Length of K.
        k_len: usize,
    },
    /// A value is NaN or infinite.
    #[error("{field}[{index}]: value {value} is not finite")]
    NotFinite {
        /// "z" or "K".
        field: &'static str,
        /// Zero-based component index.
        index: usize,
        /// The value.
        value: f64,
    },
    /// A mole fraction below zero.
    #[error("z[{index}]: mole fraction {value} is negative")]
    NegativeMoleFraction {
        /// Zero-based component index.
        index: usize,
        /// The value.
        value: f64,
    },
    /// Σz differs from 1 by more than [`MOLE_FRACTION_SUM_TOLERANCE`].
    #[error("z: mole fractions sum to {sum}, not 1 (within 1e-6); give flows instead to have them normalised")]
    MoleFractionSum {
        /// The sum.
        sum: f64,
    },
    /// A K-value below zero.
    #[error("K[{index}]: K-value {value} is negative")]
    NegativeKValue {
        /// Zero-based component index.
        index: usize,
        /// The value.
        value: f64,
    },
}

impl RachfordRiceError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::rachford_rice::rachford_rice;
    /// assert_eq!(rachford_rice(&[0.5, 0.6], &[2.0, 0.5]).unwrap_err().kind(), "mole-fraction-sum");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            RachfordRiceError::Empty => "empty",
            RachfordRiceError::LengthMismatch { .. } => "length-mismatch",
            RachfordRiceError::NotFinite { .. } => "not-finite",
            RachfordRiceError::NegativeMoleFraction { .. } => "negative-mole-fraction",
            RachfordRiceError::MoleFractionSum { .. } => "mole-fraction-sum",
            RachfordRiceError::NegativeKValue { .. } => "negative-k-value",
        }
    }
}

/// Solver options.
///
/// ```
/// use flashduty::rachford_rice::{Options, rachford_rice_with};
/// // A subcooled invented feed: the negative flash gives β < 0.
/// let s = rachford_rice_with(&[0.5, 0.5], &[1.5, 0.2], Options { negative_flash: true }).unwrap();
/// assert!(s.vapour_fraction < 0.0);
/// ```
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Options {
    /// The negative flash (Whitson & Michelsen, *Fluid Phase Equilib.* 53 (1989) 51): when
    /// the feed is single-phase, return the root of F outside [0, 1] inside the pole window
    /// (β₋, β₊) = (1/(1 − K_max), 1/(1 − K_min)), with both x and y. Where no such root
    /// exists (all K on one side of 1) the single-phase result is returned.
    pub negative_flash: bool,
}

/// The summary of a split written into caller-owned x and y ([`solve_into`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SplitSummary {
    /// The phase.
    pub phase: Phase,
    /// β, moles of vapour per mole of feed.
    pub vapour_fraction: f64,
    /// 1 − β, computed without cancellation (use this, not `1.0 - vapour_fraction`).
    pub liquid_fraction: f64,
    /// Evaluations of G after the set-up pass: Halley, Newton or bisection steps (0 for a single-phase feed).
    pub iterations: u32,
    /// Evaluations of the Rachford–Rice function, including the phase tests.
    pub evaluations: u32,
}

/// The result of a flash on given K-values.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PhaseSplit {
    /// The phase.
    pub phase: Phase,
    /// β, moles of vapour per mole of feed.
    pub vapour_fraction: f64,
    /// 1 − β, computed without cancellation.
    pub liquid_fraction: f64,
    /// Liquid mole fractions x; `None` when there is no liquid.
    pub liquid: Option<Vec<f64>>,
    /// Vapour mole fractions y; `None` when there is no vapour.
    pub vapour: Option<Vec<f64>>,
    /// Evaluations of G after the set-up pass (see [`SplitSummary::iterations`]).
    pub iterations: u32,
    /// Evaluations of the Rachford–Rice function.
    pub evaluations: u32,
}

/// Checks z and K, returning Σz.
///
/// # Errors
/// Every [`RachfordRiceError`] variant.
pub fn validate(z: &[f64], k: &[f64]) -> Result<f64, RachfordRiceError> {
    validated(z, k).map(|(sum, _)| sum)
}

/// [`validate`], also returning Σ zᵢ(Kᵢ − 1) of the raw z (so the solver's phase test costs
/// no extra pass).
fn validated(z: &[f64], k: &[f64]) -> Result<(f64, f64), RachfordRiceError> {
    if z.is_empty() {
        return Err(RachfordRiceError::Empty);
    }
    if z.len() != k.len() {
        return Err(RachfordRiceError::LengthMismatch {
            z_len: z.len(),
            k_len: k.len(),
        });
    }
    let (mut sum, mut f0) = (0.0, 0.0);
    for (index, (&zi, &ki)) in z.iter().zip(k).enumerate() {
        if !zi.is_finite() {
            return Err(RachfordRiceError::NotFinite {
                field: "z",
                index,
                value: zi,
            });
        }
        if !ki.is_finite() {
            return Err(RachfordRiceError::NotFinite {
                field: "K",
                index,
                value: ki,
            });
        }
        if zi < 0.0 {
            return Err(RachfordRiceError::NegativeMoleFraction { index, value: zi });
        }
        if ki < 0.0 {
            return Err(RachfordRiceError::NegativeKValue { index, value: ki });
        }
        sum += zi;
        f0 += zi * (ki - 1.0);
    }
    if (sum - 1.0).abs() > MOLE_FRACTION_SUM_TOLERANCE {
        return Err(RachfordRiceError::MoleFractionSum { sum });
    }
    Ok((sum, f0))
}

/// Solves the Rachford–Rice equation, allocating x and y.
///
/// # Errors
/// See the [module documentation](self#failures).
pub fn rachford_rice(z: &[f64], k: &[f64]) -> Result<PhaseSplit, RachfordRiceError> {
    rachford_rice_with(z, k, Options::default())
}

/// [`rachford_rice`] with options.
///
/// # Errors
/// See the [module documentation](self#failures).
pub fn rachford_rice_with(z: &[f64], k: &[f64], options: Options) -> Result<PhaseSplit, RachfordRiceError> {
    let mut x = vec![0.0; z.len()];
    let mut y = vec![0.0; z.len()];
    let s = solve_into(z, k, options, &mut x, &mut y)?;
    let two = options.negative_flash || s.phase == Phase::TwoPhase;
    Ok(PhaseSplit {
        phase: s.phase,
        vapour_fraction: s.vapour_fraction,
        liquid_fraction: s.liquid_fraction,
        liquid: (two || s.phase == Phase::Liquid).then_some(x),
        vapour: (two || s.phase == Phase::Vapour).then_some(y),
        iterations: s.iterations,
        evaluations: s.evaluations,
    })
}

/// Solves the Rachford–Rice equation into caller-owned `x` and `y` (no allocation).
///
/// z is normalised by its sum (which must be within 1e-6 of 1). For a liquid feed `x = z`
/// and `y` holds the incipient vapour (Kᵢ xᵢ, not normalised); for a vapour feed `y = z` and
/// `x` holds yᵢ / Kᵢ (0 where Kᵢ = 0 is impossible: such a feed is never all vapour). Use
/// [`SplitSummary::phase`] to tell which phases exist.
///
/// # Errors
/// See the [module documentation](self#failures); also
/// [`RachfordRiceError::LengthMismatch`] if `x` or `y` is not as long as `z`.
///
/// ```
/// use flashduty::rachford_rice::{solve_into, Options, Phase};
/// let (mut x, mut y) = ([0.0; 2], [0.0; 2]);
/// let s = solve_into(&[0.5, 0.5], &[2.0, 0.5], Options::default(), &mut x, &mut y).unwrap();
/// assert_eq!(s.phase, Phase::TwoPhase);
/// assert!((s.vapour_fraction - 0.5).abs() < 1e-15);
/// ```
pub fn solve_into(
    z: &[f64],
    k: &[f64],
    options: Options,
    x: &mut [f64],
    y: &mut [f64],
) -> Result<SplitSummary, RachfordRiceError> {
    #[cfg(target_arch = "x86_64")]
    if let Some(simd) = pulp::x86::V3::try_new() {
        return simd.vectorize(Solve { z, k, options, x, y });
    }
    solve_baseline(z, k, options, x, y)
}

/// The solver built for the baseline target (SSE2 on x86-64, NEON on aarch64).
///
/// [`solve_into`] runs this same code built for x86-64-v3 (AVX2) where the processor has it,
/// through `pulp`'s runtime detection. Both builds do the same floating-point operations in
/// the same order (no fused multiply-adds: Rust does not contract `a * b + c`), so they give
/// the same results to the bit; the wider instruction set only drops register copies (its
/// three-operand forms) and so about a fifth of the instructions.
#[inline(never)]
fn solve_baseline(
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
struct Solve<'a> {
    z: &'a [f64],
    k: &'a [f64],
    options: Options,
    x: &'a mut [f64],
    y: &'a mut [f64],
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
fn solve_inline(
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

/// The polishing steps in double-double arithmetic start where the round-off of G leaves s
/// uncertain by more than this many units in its last place.
const POLISH_ULPS: f64 = 8.0;

/// At most this many polishing steps (Newton steps from an f64 root already within
/// round-off of the exact one, so one nearly always suffices).
const POLISH_STEPS: u32 = 3;

/// a + b = s + e exactly (Knuth's TwoSum; Knuth, *The Art of Computer Programming* vol. 2,
/// §4.2.2, from memory).
#[inline]
fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

/// a + b = s + e exactly when |a| ≥ |b| (Dekker, *Numer. Math.* 18 (1971) 224, from memory).
#[inline]
fn fast_two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    (s, b - (s - a))
}

/// a·b = p + e exactly, by a fused multiply-add (common practice).
#[inline]
fn two_product(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    (p, a.mul_add(b, -p))
}

/// A step of Halley's method accepted without a further evaluation only below this
/// fraction of s, and only when the rate test passes.
const RATE_STEP: f64 = 1e-4;

/// Components are taken two at a time, one per SIMD lane (`wide::f64x2`: SSE2 on every
/// x86-64, NEON on aarch64): each sum then carries half the dependency chain, and the
/// divisions of a pair issue as one instruction. A last odd component is paired with
/// (z, K) = (0, 1), which adds nothing to any sum and gives no bound.
#[inline(always)]
fn in_pairs(z: &[f64], k: &[f64], mut f: impl FnMut(f64x2, f64x2)) {
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
fn bounds(z: f64x2, k: f64x2, q: f64x2, u: f64) -> [f64x2; 2] {
    let one = f64x2::ONE;
    let (up, down) = (f64x2::splat(1.0 + u), f64x2::splat(1.0 - u));
    // OR with a comparison's all-ones lanes: one instruction, where a select takes three.
    [
        (k * z * down - up) * (q | k.simd_le(one)),
        (k * up - z * down) * (q | k.simd_ge(one)),
    ]
}

/// The round-off margin of [`bounds`] for `n` components.
fn window_margin(n: usize) -> f64 {
    (4.0 * n as f64 + 10.0) * f64::EPSILON
}

/// The Leibovici–Neoschil window from zᵢ·`inv_sum` (1 for the raw z, 1/Σz for the
/// normalised z when Σz is not 1 to within 2nε): [lower β, upper β, lower γ, upper γ]. The
/// common path forms it in the loop of the first evaluation instead
/// ([`Oriented::window_and_derivatives_in`]).
#[inline(always)]
fn window(z: &[f64], k: &[f64], inv_sum: f64) -> [f64; 4] {
    let u = window_margin(z.len());
    let mut w = Window::new();
    in_pairs(z, k, |z, k| {
        w.add(bounds(z * inv_sum, k, f64x2::ONE / (k - f64x2::ONE), u))
    });
    w.finish()
}

/// Pairwise running bounds, combined by [`finish`](Self::finish).
struct Window([f64x2; 2]);

impl Window {
    fn new() -> Self {
        Self([f64x2::splat(f64::NEG_INFINITY); 2])
    }

    /// Takes in the bounds of a pair; a NaN bound leaves the running one as it is (the
    /// hardware's max returns its second operand when either is NaN). The running bounds
    /// are never NaN: a bound that [`bounds`] does not mask is finite for valid input (q is
    /// ±∞ only where K = 1, which is masked).
    #[inline(always)]
    fn add(&mut self, b: [f64x2; 2]) {
        let w = &mut self.0;
        w[0] = b[0].fast_max(w[0]);
        w[1] = b[1].fast_max(w[1]);
    }

    /// [lower β, upper β, lower γ, upper γ]; each upper bound is 1 − (the other lower
    /// bound) plus the absolute round-off of that subtraction.
    #[inline(always)]
    fn finish(&self) -> [f64; 4] {
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
struct SetUp {
    /// No value is NaN, infinite or negative (when false, possibly only an overflowing sum:
    /// the ordered validation decides).
    valid: bool,
    /// Σz.
    sum: f64,
    /// Σ zᵢ(Kᵢ − 1) = F(0).
    f0: f64,
    /// Σ zᵢ(Kᵢ − 1)/Kᵢ = F(1), over zᵢ > 0.
    f1: f64,
    /// F(½), F′(½) and Σ zᵢ rᵢ³ = F″(½)/2, with rᵢ = (Kᵢ − 1)/(1 + ½(Kᵢ − 1)).
    half: [f64; 3],
    /// The extreme K-values over zᵢ > 0.
    k_min: f64,
    k_max: f64,
}

impl SetUp {
    /// One loop over the components, two at a time. The window is formed in the next loop,
    /// with the first evaluation ([`Oriented::window_and_derivatives_in`]): its running
    /// bounds added to the nine sums here made the loop spill to the stack (17 moves per
    /// pair with three bounds, 8 with two on x86-64-v3).
    #[inline(always)]
    fn gather(z: &[f64], k: &[f64]) -> Self {
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

/// The midpoint of two non-negative floats in the ordering of their bit patterns: repeated
/// halving reaches adjacent floats in at most 64 steps, whatever the scale.
fn float_midpoint(lo: f64, hi: f64) -> f64 {
    if hi > 2.0 * lo {
        f64::from_bits(lo.to_bits() / 2 + hi.to_bits() / 2 + (lo.to_bits() & hi.to_bits() & 1))
    } else {
        lo + 0.5 * (hi - lo)
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Orientation {
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
    fn poles(self, k_min: f64, k_max: f64) -> (f64, f64) {
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
struct State {
    s: f64,
    derivatives: [f64; 4],
    iterations: u32,
    evaluations: u32,
    last_step: f64,
    last_halley: bool,
}

/// A pair's terms of G, −G′, G″/2 and Σ|terms| at s, added to `acc`.
#[inline(always)]
fn derivative_terms<const LIQUID: bool>(acc: &mut [f64x2; 4], z: f64x2, k: f64x2, s: f64x2) {
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
fn finish_derivatives(acc: [f64x2; 4]) -> [f64; 4] {
    let [g, dg, d2g, scale] = acc.map(f64x2::reduce_add);
    [g, dg, 2.0 * d2g, scale]
}

/// G(s) = Σ zᵢ aᵢ / (pᵢ + s aᵢ), decreasing in s, with (p, a) = (1, K − 1) in the liquid
/// orientation and (K, 1 − K) in the vapour one.
struct Oriented<'a> {
    z: &'a [f64],
    k: &'a [f64],
    inv_sum: f64,
    orientation: Orientation,
    /// The nearest pole at or below 0 (−∞ if none).
    pole_lo: f64,
    /// The nearest pole at or above 1 (+∞ if none).
    pole_hi: f64,
}

impl<'a> Oriented<'a> {
    /// The problem in `orientation`, with the nearest poles from the extreme K-values of the
    /// components present ([`Orientation::poles`]).
    fn new(z: &'a [f64], k: &'a [f64], inv_sum: f64, orientation: Orientation, k_min: f64, k_max: f64) -> Self {
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
    fn coefficients(&self, i: usize) -> (f64, f64) {
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
    fn halley_step(&self, s: f64, g: f64, dg: f64, d2g: f64) -> (f64, bool) {
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
    fn solve_from_half<const LIQUID: bool>(
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
    fn window_and_derivatives_in<const LIQUID: bool>(&self, s: f64) -> ([f64; 4], [f64; 4]) {
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
    fn iterate<const LIQUID: bool>(
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
    fn polish<const LIQUID: bool>(&self, mut s: f64, (lo, hi): (f64, f64)) -> (f64, u32) {
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
    fn accurate_g<const LIQUID: bool>(&self, s: f64) -> (f64, f64, f64) {
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
    fn derivatives_in<const LIQUID: bool>(&self, s: f64) -> [f64; 4] {
        let mut acc = [f64x2::ZERO; 4];
        let s = f64x2::splat(s);
        in_pairs(self.z, self.k, |z, k| derivative_terms::<LIQUID>(&mut acc, z, k, s));
        finish_derivatives(acc)
    }

    fn write(&self, s: f64, x: &mut [f64], y: &mut [f64]) {
        match self.orientation {
            Orientation::Liquid => self.write_in::<true>(s, x, y),
            Orientation::Vapour => self.write_in::<false>(s, x, y),
        }
    }

    #[inline(always)]
    fn write_in<const LIQUID: bool>(&self, s: f64, x: &mut [f64], y: &mut [f64]) {
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
    fn denominator_from_pole(&self, i: usize, r: f64) -> f64 {
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
    fn pole_split_from_pole(&self, r: f64) -> [f64; 4] {
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
    fn write_from_pole(&self, r: f64, x: &mut [f64], y: &mut [f64]) {
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

    fn summary(&self, s: f64, iterations: u32, evaluations: u32) -> SplitSummary {
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

/// The negative-flash root in (pole, 0] of the oriented problem, if the pole exists.
///
/// G at the midpoint s₋/2 (exact in both coordinates below) says which end the root is
/// nearer, and so which coordinate resolves it: nearer 0, s itself, to ε|s|; nearer the
/// pole, r = s − s₋, to ε·r, where s would keep only ε|s₋| of it (and the pole component's
/// x = zᵢ/(aᵢr) needs r). With the pole at 1e15 (a K within 1e-15 of 1) and the root at
/// s = −1, the difference is fifteen digits.
fn negative_root(
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
    fn pole_weighted_newton_step(&self, s: f64, g: f64, dg: f64) -> f64 {
        g / (dg + g * (1.0 / (s - self.pole_lo) - 1.0 / (self.pole_hi - s)))
    }

    /// The negative-flash root in [lo, 0], lo = s₋/2 with G(lo) > 0 ≥ G(0), in s: Newton on
    /// the pole-weighted function with a bracket, bisection on the float ordering of −s
    /// after NEWTON_STEPS, then the double-double polish where G's round-off leaves s
    /// uncertain (as in the two-phase iteration). Returns s, iterations, evaluations.
    fn negative_near_zero<const LIQUID: bool>(&self, lo: f64) -> (f64, u32, u32) {
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
    fn negative_near_pole(&self, hi: f64) -> (f64, u32, u32) {
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

#[cfg(feature = "rayon")]
use ndarray::Axis;
use ndarray::{Array1, Array2, ArrayView1, ArrayView2, ArrayViewMut1, ArrayViewMut2};

/// Preallocated outputs of [`solve_batch`]: entry or row `r` belongs to feed `r`.
///
/// A row that fails validation keeps zeros in every numeric output, `None` as its phase
/// and its error in [`errors`](Self::errors); the other rows are unaffected. For a solved
/// row, x and y are as written by [`solve_into`] (for a single-phase feed one of them is the
/// incipient phase, not normalised).
///
/// ```
/// use flashduty::rachford_rice::{solve_batch, BatchOutput, Phase};
/// use ndarray::array;
/// let z = array![[0.5, 0.5], [0.5, 0.5]];
/// let k = array![[2.0, 0.5], [0.5, 0.2]];
/// let mut out = BatchOutput::new(2, 2);
/// assert_eq!(solve_batch(z.view(), k.view(), &mut out), Ok(0));
/// assert_eq!(out.phase, vec![Some(Phase::TwoPhase), Some(Phase::Liquid)]);
/// assert!((out.vapour_fraction[0] - 0.5).abs() < 1e-15);
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct BatchOutput {
    /// β per row (0 for a failed row).
    pub vapour_fraction: Array1<f64>,
    /// 1 − β per row, computed without cancellation (0 for a failed row).
    pub liquid_fraction: Array1<f64>,
    /// Liquid mole fractions, one row per feed.
    pub x: Array2<f64>,
    /// Vapour mole fractions, one row per feed.
    pub y: Array2<f64>,
    /// The phase per row; `None` for a failed row.
    pub phase: Vec<Option<Phase>>,
    /// Iterations per row (see [`SplitSummary::iterations`]).
    pub iterations: Array1<u32>,
    /// The validation error per row; `None` for a solved row.
    pub errors: Vec<Option<RachfordRiceError>>,
}

impl BatchOutput {
    /// Outputs for `rows` feeds of `n` components, zero-filled.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchOutput;
    /// let out = BatchOutput::new(3, 4);
    /// assert_eq!(out.x.dim(), (3, 4));
    /// assert_eq!(out.errors.len(), 3);
    /// ```
    pub fn new(rows: usize, n: usize) -> Self {
        Self {
            vapour_fraction: Array1::zeros(rows),
            liquid_fraction: Array1::zeros(rows),
            x: Array2::zeros((rows, n)),
            y: Array2::zeros((rows, n)),
            phase: vec![None; rows],
            iterations: Array1::zeros(rows),
            errors: vec![None; rows],
        }
    }

    /// The number of feeds (rows) these outputs hold.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchOutput;
    /// assert_eq!(BatchOutput::new(3, 4).rows(), 3);
    /// ```
    pub fn rows(&self) -> usize {
        self.x.nrows()
    }

    /// The number of components (columns) these outputs hold.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchOutput;
    /// assert_eq!(BatchOutput::new(3, 4).components(), 4);
    /// ```
    pub fn components(&self) -> usize {
        self.x.ncols()
    }

    /// The failed rows with their errors, in row order.
    ///
    /// ```
    /// use flashduty::rachford_rice::{solve_batch, BatchOutput, RachfordRiceError};
    /// use ndarray::array;
    /// let z = array![[0.5, 0.5], [0.5, -0.5]];
    /// let k = array![[2.0, 0.5], [2.0, 0.5]];
    /// let mut out = BatchOutput::new(2, 2);
    /// assert_eq!(solve_batch(z.view(), k.view(), &mut out), Ok(1));
    /// let failures: Vec<_> = out.failures().collect();
    /// assert_eq!(failures.len(), 1);
    /// assert_eq!(failures[0].0, 1);
    /// assert!(matches!(failures[0].1, RachfordRiceError::NegativeMoleFraction { index: 1, .. }));
    /// ```
    pub fn failures(&self) -> impl Iterator<Item = (usize, &RachfordRiceError)> + '_ {
        self.errors
            .iter()
            .enumerate()
            .filter_map(|(row, e)| e.as_ref().map(|e| (row, e)))
    }

    fn rows_mut(&mut self) -> BatchRows<'_> {
        BatchRows {
            vapour_fraction: self.vapour_fraction.view_mut(),
            liquid_fraction: self.liquid_fraction.view_mut(),
            x: self.x.view_mut(),
            y: self.y.view_mut(),
            phase: &mut self.phase,
            iterations: self.iterations.view_mut(),
            errors: &mut self.errors,
        }
    }

    fn check_shape(&self, rows: usize, n: usize) -> Result<(), BatchShapeError> {
        for (field, found) in [("out.x", self.x.dim()), ("out.y", self.y.dim())] {
            if found != (rows, n) {
                return Err(BatchShapeError::Matrix {
                    field,
                    rows,
                    columns: n,
                    found_rows: found.0,
                    found_columns: found.1,
                });
            }
        }
        for (field, found) in [
            ("out.vapour_fraction", self.vapour_fraction.len()),
            ("out.liquid_fraction", self.liquid_fraction.len()),
            ("out.phase", self.phase.len()),
            ("out.iterations", self.iterations.len()),
            ("out.errors", self.errors.len()),
        ] {
            if found != rows {
                return Err(BatchShapeError::Rows { field, rows, found });
            }
        }
        Ok(())
    }
}

/// Arrays of mismatched shape given to [`solve_batch`]: nothing was solved.
///
/// ```
/// use flashduty::rachford_rice::{solve_batch, BatchOutput, BatchShapeError};
/// use ndarray::array;
/// let z = array![[0.5, 0.5]];
/// let k = array![[2.0, 0.5, 0.1]];
/// let err = solve_batch(z.view(), k.view(), &mut BatchOutput::new(1, 2)).unwrap_err();
/// assert!(matches!(err, BatchShapeError::Matrix { field: "K", .. }));
/// assert_eq!(err.to_string(), "K: shape 1×3, expected 1×2 (the shape of z)");
/// ```
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum BatchShapeError {
    /// K, `out.x` or `out.y` is not shaped like z.
    #[error("{field}: shape {found_rows}×{found_columns}, expected {rows}×{columns} (the shape of z)")]
    Matrix {
        /// "K", "out.x" or "out.y".
        field: &'static str,
        /// Rows of z.
        rows: usize,
        /// Columns (components) of z.
        columns: usize,
        /// Rows found.
        found_rows: usize,
        /// Columns found.
        found_columns: usize,
    },
    /// A per-row output is not as long as z has rows.
    #[error("{field}: length {found}, expected {rows} (one per row of z)")]
    Rows {
        /// The output field, e.g. "out.phase".
        field: &'static str,
        /// Rows of z.
        rows: usize,
        /// Length found.
        found: usize,
    },
}

impl BatchShapeError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchShapeError;
    /// assert_eq!(BatchShapeError::Rows { field: "out.phase", rows: 2, found: 3 }.kind(), "rows");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            BatchShapeError::Matrix { .. } => "matrix",
            BatchShapeError::Rows { .. } => "rows",
        }
    }
}

/// Solves the Rachford–Rice equation for every row of `z` (feeds) with the K-values in the
/// same row of `k`, writing into the preallocated `out` without allocating per row.
///
/// Every row is solved exactly as [`solve_into`] would solve it. A row that fails
/// validation is reported in `out.errors` and zero-filled; the other rows are solved.
/// Returns the number of failed rows.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`; then `out` is untouched.
///
/// ```
/// use flashduty::rachford_rice::{solve_batch, BatchOutput, Phase};
/// use ndarray::array;
/// let z = array![[0.3, 0.4, 0.3], [0.3, 0.4, 0.3]];
/// let k = array![[3.0, 1.2, 0.2], [3.0, f64::NAN, 0.2]];
/// let mut out = BatchOutput::new(2, 3);
/// assert_eq!(solve_batch(z.view(), k.view(), &mut out), Ok(1));
/// assert_eq!(out.phase[0], Some(Phase::TwoPhase));
/// assert!(out.errors[1].is_some());
/// assert_eq!(out.vapour_fraction[1], 0.0);
/// ```
pub fn solve_batch(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    solve_batch_with(z, k, Options::default(), out)
}

/// [`solve_batch`] with options.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`.
///
/// ```
/// use flashduty::rachford_rice::{solve_batch_with, BatchOutput, Options};
/// use ndarray::array;
/// let z = array![[0.5, 0.5]];
/// let k = array![[1.5, 0.2]];
/// let mut out = BatchOutput::new(1, 2);
/// solve_batch_with(z.view(), k.view(), Options { negative_flash: true }, &mut out).unwrap();
/// assert!(out.vapour_fraction[0] < 0.0);
/// ```
pub fn solve_batch_with(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    options: Options,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    check_batch_shapes(z, k, out)?;
    Ok(solve_rows(z, k, options, out.rows_mut()))
}

/// [`solve_batch`] with the rows shared among the threads of the current rayon pool. The
/// results are identical to [`solve_batch`]'s.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`.
///
/// ```
/// use flashduty::rachford_rice::{par_solve_batch, solve_batch, BatchOutput};
/// use ndarray::Array2;
/// let z = Array2::from_shape_fn((500, 2), |(r, c)| if c == 0 { r as f64 / 500.0 } else { 1.0 - r as f64 / 500.0 });
/// let k = Array2::from_shape_fn((500, 2), |(_, c)| if c == 0 { 2.0 } else { 0.5 });
/// let (mut a, mut b) = (BatchOutput::new(500, 2), BatchOutput::new(500, 2));
/// par_solve_batch(z.view(), k.view(), &mut a).unwrap();
/// solve_batch(z.view(), k.view(), &mut b).unwrap();
/// assert_eq!(a, b);
/// ```
#[cfg(feature = "rayon")]
pub fn par_solve_batch(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    par_solve_batch_with(z, k, Options::default(), out)
}

/// [`par_solve_batch`] with options.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`.
///
/// ```
/// use flashduty::rachford_rice::{par_solve_batch_with, BatchOutput, Options};
/// use ndarray::array;
/// let z = array![[0.5, 0.5]];
/// let k = array![[1.5, 0.2]];
/// let mut out = BatchOutput::new(1, 2);
/// par_solve_batch_with(z.view(), k.view(), Options { negative_flash: true }, &mut out).unwrap();
/// assert!(out.vapour_fraction[0] < 0.0);
/// ```
#[cfg(feature = "rayon")]
pub fn par_solve_batch_with(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    options: Options,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    check_batch_shapes(z, k, out)?;
    Ok(par_solve_rows(z, k, options, out.rows_mut()))
}

fn check_batch_shapes(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    out: &BatchOutput,
) -> Result<(), BatchShapeError> {
    let (rows, n) = z.dim();
    if k.dim() != (rows, n) {
        return Err(BatchShapeError::Matrix {
            field: "K",
            rows,
            columns: n,
            found_rows: k.nrows(),
            found_columns: k.ncols(),
        });
    }
    out.check_shape(rows, n)
}

/// Rows below this many are solved on one thread.
#[cfg(feature = "rayon")]
const PARALLEL_GRAIN: usize = 64;

#[cfg(feature = "rayon")]
fn par_solve_rows(z: ArrayView2<'_, f64>, k: ArrayView2<'_, f64>, options: Options, out: BatchRows<'_>) -> usize {
    let rows = z.nrows();
    if rows <= PARALLEL_GRAIN {
        return solve_rows(z, k, options, out);
    }
    let mid = rows / 2;
    let (z_a, z_b) = z.split_at(Axis(0), mid);
    let (k_a, k_b) = k.split_at(Axis(0), mid);
    let (out_a, out_b) = out.split_at(mid);
    let (a, b) = rayon::join(
        || par_solve_rows(z_a, k_a, options, out_a),
        || par_solve_rows(z_b, k_b, options, out_b),
    );
    a + b
}

/// Mutable views of a band of rows of a [`BatchOutput`].
struct BatchRows<'a> {
    vapour_fraction: ArrayViewMut1<'a, f64>,
    liquid_fraction: ArrayViewMut1<'a, f64>,
    x: ArrayViewMut2<'a, f64>,
    y: ArrayViewMut2<'a, f64>,
    phase: &'a mut [Option<Phase>],
    iterations: ArrayViewMut1<'a, u32>,
    errors: &'a mut [Option<RachfordRiceError>],
}

impl<'a> BatchRows<'a> {
    #[cfg(feature = "rayon")]
    fn split_at(self, mid: usize) -> (Self, Self) {
        let (vf_a, vf_b) = self.vapour_fraction.split_at(Axis(0), mid);
        let (lf_a, lf_b) = self.liquid_fraction.split_at(Axis(0), mid);
        let (x_a, x_b) = self.x.split_at(Axis(0), mid);
        let (y_a, y_b) = self.y.split_at(Axis(0), mid);
        let (ph_a, ph_b) = self.phase.split_at_mut(mid);
        let (it_a, it_b) = self.iterations.split_at(Axis(0), mid);
        let (er_a, er_b) = self.errors.split_at_mut(mid);
        (
            BatchRows {
                vapour_fraction: vf_a,
                liquid_fraction: lf_a,
                x: x_a,
                y: y_a,
                phase: ph_a,
                iterations: it_a,
                errors: er_a,
            },
            BatchRows {
                vapour_fraction: vf_b,
                liquid_fraction: lf_b,
                x: x_b,
                y: y_b,
                phase: ph_b,
                iterations: it_b,
                errors: er_b,
            },
        )
    }
}

/// Copies of one row, used only when a row of the inputs or outputs is not contiguous.
struct RowScratch {
    z: Vec<f64>,
    k: Vec<f64>,
    x: Vec<f64>,
    y: Vec<f64>,
}

/// Solves the rows one after another; returns the number of failed rows.
fn solve_rows(z: ArrayView2<'_, f64>, k: ArrayView2<'_, f64>, options: Options, mut out: BatchRows<'_>) -> usize {
    let mut scratch: Option<RowScratch> = None;
    let mut failed = 0;
    for r in 0..z.nrows() {
        let x = out.x.row_mut(r);
        let y = out.y.row_mut(r);
        match solve_row(z.row(r), k.row(r), options, x, y, &mut scratch) {
            Ok(s) => {
                out.vapour_fraction[r] = s.vapour_fraction;
                out.liquid_fraction[r] = s.liquid_fraction;
                out.phase[r] = Some(s.phase);
                out.iterations[r] = s.iterations;
                out.errors[r] = None;
            }
            Err(e) => {
                out.x.row_mut(r).fill(0.0);
                out.y.row_mut(r).fill(0.0);
                out.vapour_fraction[r] = 0.0;
                out.liquid_fraction[r] = 0.0;
                out.phase[r] = None;
                out.iterations[r] = 0;
                out.errors[r] = Some(e);
                failed += 1;
            }
        }
    }
    failed
}

fn solve_row(
    z: ArrayView1<'_, f64>,
    k: ArrayView1<'_, f64>,
    options: Options,
    mut x: ArrayViewMut1<'_, f64>,
    mut y: ArrayViewMut1<'_, f64>,
    scratch: &mut Option<RowScratch>,
) -> Result<SplitSummary, RachfordRiceError> {
    if let (Some(zs), Some(ks)) = (z.as_slice(), k.as_slice())
        && let (Some(xs), Some(ys)) = (x.as_slice_mut(), y.as_slice_mut())
    {
        return solve_into(zs, ks, options, xs, ys);
    }
    // A strided row: solve on contiguous copies (allocated once per batch, not per row).
    let n = z.len();
    let s = scratch.get_or_insert_with(|| RowScratch {
        z: vec![0.0; n],
        k: vec![0.0; n],
        x: vec![0.0; n],
        y: vec![0.0; n],
    });
    for (dst, src) in s.z.iter_mut().zip(z.iter()) {
        *dst = *src;
    }
    for (dst, src) in s.k.iter_mut().zip(k.iter()) {
        *dst = *src;
    }
    let summary = solve_into(&s.z, &s.k, options, &mut s.x, &mut s.y)?;
    for (dst, src) in x.iter_mut().zip(&s.x) {
        *dst = *src;
    }
    for (dst, src) in y.iter_mut().zip(&s.y) {
        *dst = *src;
    }
    Ok(summary)
}

#[cfg(test)]
mod tests {
    use super::*;
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
}
