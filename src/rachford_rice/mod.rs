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
//!
//! Files: `api.rs` (types, the feed check, entry points), `dispatch.rs` (the AVX2 build and
//! the solver body), `window.rs` (set-up pass and window), `iterate.rs` (the Halley
//! iteration and write-back), `double_double.rs` (the polish arithmetic), `negative.rs`
//! (the negative flash), `batch.rs` (rows of `ndarray`s), `three_phase.rs` (vapour, organic
//! and aqueous liquids: [`three_phase_split`], Michelsen's convex formulation).

mod api;
mod batch;
mod dispatch;
mod double_double;
mod iterate;
mod negative;
#[cfg(test)]
mod tests;
mod three_phase;
mod window;

pub use api::{
    MOLE_FRACTION_SUM_TOLERANCE, Options, Phase, PhaseSplit, RachfordRiceError, SplitSummary, rachford_rice,
    rachford_rice_with, solve_into, validate,
};
pub use batch::{BatchOutput, BatchShapeError, solve_batch, solve_batch_with};
#[cfg(feature = "rayon")]
pub use batch::{par_solve_batch, par_solve_batch_with};
pub(crate) use three_phase::{Minimum, Problem};
pub use three_phase::{PhaseSet, ThreePhaseSplit, three_phase_split};
