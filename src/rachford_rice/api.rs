//! What the solver is asked and answers: [`Phase`], [`Options`], [`SplitSummary`],
//! [`PhaseSplit`], [`RachfordRiceError`], the feed check and the entry points.

use super::dispatch::{Solve, solve_baseline};
use serde::{Deserialize, Serialize};

/// The tolerance on Σz: a feed whose mole fractions sum to 1 within this is normalised;
/// one further off is refused, because a spreadsheet typo must not pass silently.
pub const MOLE_FRACTION_SUM_TOLERANCE: f64 = 1e-6;

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
    /// A liquid's K-value in the three-phase split that is not positive (infinite is
    /// allowed: the component is absent from that liquid).
    #[error(
        "{field}[{index}]: K-value {value} must be positive (infinite where the component is absent from that liquid)"
    )]
    KValueNotPositive {
        /// "K_organic" or "K_aqueous".
        field: &'static str,
        /// Zero-based component index.
        index: usize,
        /// The value.
        value: f64,
    },
    /// A component with feed in it can be in none of the phases allowed (the vapour held at
    /// zero and the component absent from both liquids).
    #[error("z[{index}]: the component is in neither liquid and the vapour is held at zero, so it has nowhere to go")]
    NoPhaseFor {
        /// Zero-based component index.
        index: usize,
    },
    /// The three-phase minimisation reached its iteration cap.
    #[error("three-phase split: no convergence in {iterations} Newton steps")]
    NotConverged {
        /// Steps taken.
        iterations: u32,
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
            RachfordRiceError::KValueNotPositive { .. } => "k-value-not-positive",
            RachfordRiceError::NoPhaseFor { .. } => "no-phase-for-component",
            RachfordRiceError::NotConverged { .. } => "not-converged",
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
pub(super) fn validated(z: &[f64], k: &[f64]) -> Result<(f64, f64), RachfordRiceError> {
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
/// See the [module documentation](super#failures).
pub fn rachford_rice(z: &[f64], k: &[f64]) -> Result<PhaseSplit, RachfordRiceError> {
    rachford_rice_with(z, k, Options::default())
}

/// [`rachford_rice`] with options.
///
/// # Errors
/// See the [module documentation](super#failures).
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
/// See the [module documentation](super#failures); also
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
