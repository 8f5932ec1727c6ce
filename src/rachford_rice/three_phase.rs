//! The three-phase Rachford–Rice problem: a vapour, an organic liquid and an aqueous
//! liquid, with K-values of each liquid against the vapour.
//!
//! # Method
//! Michelsen's formulation (M. L. Michelsen, *Calculation of multiphase equilibrium*,
//! Comput. Chem. Eng. 18 (1994) 545–550; from memory): with Eᵢₖ = yᵢ/xᵢₖ's inverse, that is
//! Eᵢ,vapour = 1 and Eᵢ,liquid = 1/Kᵢ,liquid, the phase amounts β = (β_V, β_O, β_A) minimise
//!
//! ```text
//! Q(β) = Σₖ βₖ − Σᵢ zᵢ ln tᵢ,   tᵢ = Σₖ βₖ Eᵢₖ,   subject to βₖ ≥ 0,
//! ```
//!
//! a convex function. At its minimum ∂Q/∂βₖ = 1 − Σᵢ xᵢₖ is zero for every phase present
//! (so each present phase's mole fractions add up to 1, with xᵢₖ = zᵢ Eᵢₖ / tᵢ) and
//! non-negative for every phase absent (an absent phase would have Σ x ≤ 1: it is not
//! stable), and Σₖ βₖ = 1 follows. So one convex minimisation finds both the phase set and
//! the fractions; no phase-set guess is needed and the answer is unique wherever Q is
//! strictly convex. The material balance zᵢ = Σₖ βₖ xᵢₖ holds by construction.
//!
//! A component absent from a liquid (pure water as the aqueous phase; a hydrocarbon
//! insoluble in water) has K = ∞ there, so Eᵢₖ = 0: no special case is needed. Each
//! component's row of E is scaled by its largest entry (Q changes by a constant), so every
//! Eᵢₖ lies in [0, 1] whatever the range of K.
//!
//! The minimisation is an active-set Newton method on at most three variables: Newton steps
//! on the phases present with the exact Hessian Hₖₗ = Σᵢ zᵢ Eᵢₖ Eᵢₗ / tᵢ²; a step that would
//! take a phase amount below zero stops at zero and drops the phase; at the minimum of a
//! face, a dropped phase with ∂Q/∂βₖ < 0 (it would be super-saturated) is added back;
//! backtracking keeps every tᵢ positive and Q decreasing. It starts from the all-vapour
//! state, which is always feasible. Near the minimum the Newton steps converge
//! quadratically and stop when they fall below a few units in the last place of every
//! phase amount.
//!
//! Pros: one method for every phase set, including two liquids without vapour; exact to
//! round-off on well-conditioned feeds (checked against a 200-bit reference,
//! `tests/three_phase_reference.rs`); terminates always (an iteration cap gives
//! [`RachfordRiceError::NotConverged`], never NaN).
//! Cons: where two components and three phases meet (water and a single organic at their
//! three-phase temperature) Q is flat along a line and the split at fixed T and P is not
//! unique: any point on that line is returned. Such a state is unique at given pressure and
//! vapour fraction, which the flash specifications in [`crate::equilibrium`] use.
//!
//! # Failures
//! [`RachfordRiceError`]: `Empty`, `LengthMismatch`, `NotFinite` (z), `NegativeMoleFraction`,
//! `MoleFractionSum`, [`KValueNotPositive`](RachfordRiceError::KValueNotPositive) (a liquid
//! K-value that is not positive, or NaN), [`NoPhaseFor`](RachfordRiceError::NoPhaseFor) (a
//! component in none of the phases allowed), [`NotConverged`](RachfordRiceError::NotConverged).

// Small dense 3×3 algebra reads best with indices.
#![allow(clippy::needless_range_loop)]

use super::api::{MOLE_FRACTION_SUM_TOLERANCE, RachfordRiceError};
use serde::Serialize;

/// The phases: vapour, organic liquid, aqueous liquid.
const V: usize = 0;
const O: usize = 1;
const A: usize = 2;

/// Iteration cap of the active-set Newton method (typical solves take 3 to 10).
const MAX_ITERATIONS: u32 = 200;

/// A phase absent at the minimum may have ∂Q/∂β down to −this (round-off in Σ x).
const RELEASE_TOLERANCE: f64 = 64.0 * f64::EPSILON;

/// Which of the three phases are present.
///
/// ```
/// use flashduty::rachford_rice::PhaseSet;
/// assert_eq!(PhaseSet::VapourOrganicAqueous.name(), "vapour+organic+aqueous");
/// assert!(PhaseSet::OrganicAqueous.has_aqueous() && !PhaseSet::OrganicAqueous.has_vapour());
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
#[non_exhaustive]
pub enum PhaseSet {
    /// Vapour only.
    Vapour,
    /// Organic liquid only.
    Organic,
    /// Aqueous liquid only.
    Aqueous,
    /// Vapour and organic liquid.
    VapourOrganic,
    /// Vapour and aqueous liquid.
    VapourAqueous,
    /// Vapour and both liquids.
    VapourOrganicAqueous,
    /// Both liquids, no vapour.
    OrganicAqueous,
}

impl PhaseSet {
    /// The set with these phases (vapour, organic, aqueous); `None` for none.
    pub fn from_phases(vapour: bool, organic: bool, aqueous: bool) -> Option<Self> {
        Some(match (vapour, organic, aqueous) {
            (true, false, false) => PhaseSet::Vapour,
            (false, true, false) => PhaseSet::Organic,
            (false, false, true) => PhaseSet::Aqueous,
            (true, true, false) => PhaseSet::VapourOrganic,
            (true, false, true) => PhaseSet::VapourAqueous,
            (true, true, true) => PhaseSet::VapourOrganicAqueous,
            (false, true, true) => PhaseSet::OrganicAqueous,
            (false, false, false) => return None,
        })
    }

    /// The name in reports and JSON: the phases joined by `+`.
    pub fn name(self) -> &'static str {
        match self {
            PhaseSet::Vapour => "vapour",
            PhaseSet::Organic => "organic",
            PhaseSet::Aqueous => "aqueous",
            PhaseSet::VapourOrganic => "vapour+organic",
            PhaseSet::VapourAqueous => "vapour+aqueous",
            PhaseSet::VapourOrganicAqueous => "vapour+organic+aqueous",
            PhaseSet::OrganicAqueous => "organic+aqueous",
        }
    }

    /// Whether the vapour is present.
    pub fn has_vapour(self) -> bool {
        matches!(
            self,
            PhaseSet::Vapour | PhaseSet::VapourOrganic | PhaseSet::VapourAqueous | PhaseSet::VapourOrganicAqueous
        )
    }

    /// Whether the organic liquid is present.
    pub fn has_organic(self) -> bool {
        matches!(
            self,
            PhaseSet::Organic | PhaseSet::VapourOrganic | PhaseSet::VapourOrganicAqueous | PhaseSet::OrganicAqueous
        )
    }

    /// Whether the aqueous liquid is present.
    pub fn has_aqueous(self) -> bool {
        matches!(
            self,
            PhaseSet::Aqueous | PhaseSet::VapourAqueous | PhaseSet::VapourOrganicAqueous | PhaseSet::OrganicAqueous
        )
    }
}

impl std::fmt::Display for PhaseSet {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// The answer of [`three_phase_split`]: phase amounts per mole of feed and compositions.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ThreePhaseSplit {
    /// The phases present.
    pub phase_set: PhaseSet,
    /// Moles of vapour per mole of feed.
    pub vapour_fraction: f64,
    /// Moles of organic liquid per mole of feed.
    pub organic_fraction: f64,
    /// Moles of aqueous liquid per mole of feed.
    pub aqueous_fraction: f64,
    /// Vapour mole fractions y; `None` where there is no vapour.
    pub vapour: Option<Vec<f64>>,
    /// Organic-liquid mole fractions; `None` where there is no organic liquid.
    pub organic: Option<Vec<f64>>,
    /// Aqueous-liquid mole fractions; `None` where there is no aqueous liquid.
    pub aqueous: Option<Vec<f64>>,
    /// Newton steps taken.
    pub iterations: u32,
}

/// The three-phase split of feed `z` with K-values of the organic liquid (`k_organic`,
/// yᵢ/xᵢ,organic) and of the aqueous liquid (`k_aqueous`, yᵢ/xᵢ,aqueous) against the vapour.
/// A K-value of `f64::INFINITY` means the component is absent from that liquid.
///
/// # Errors
/// See the module's *Failures*; every input error is raised before any iteration.
///
/// ```
/// use flashduty::rachford_rice::{three_phase_split, PhaseSet};
/// // Invented: water (0) and an insoluble organic (1) at a temperature where their vapour
/// // pressures add up to less than the pressure: two liquids, no vapour.
/// let inf = f64::INFINITY;
/// let s = three_phase_split(&[0.5, 0.5], &[inf, 0.3], &[0.4, inf]).unwrap();
/// assert_eq!(s.phase_set, PhaseSet::OrganicAqueous);
/// assert!((s.aqueous_fraction - 0.5).abs() < 1e-15);
/// // Hotter: the K-values add up to more than 1; all the water and part of the organic
/// // boil off, the vapour holding the organic at its K over the pure organic liquid.
/// let s = three_phase_split(&[0.5, 0.5], &[inf, 0.4], &[0.9, inf]).unwrap();
/// assert_eq!(s.phase_set, PhaseSet::VapourOrganic);
/// assert!((s.vapour_fraction - 5.0 / 6.0).abs() < 1e-15);
/// ```
pub fn three_phase_split(
    z: &[f64],
    k_organic: &[f64],
    k_aqueous: &[f64],
) -> Result<ThreePhaseSplit, RachfordRiceError> {
    let problem = Problem::new(z, k_organic, k_aqueous)?;
    let solution = problem.minimise([None; 3])?;
    Ok(problem.split(&solution))
}

/// A solved minimum: phase amounts and steps.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Minimum {
    /// (vapour, organic, aqueous) amounts per mole of feed.
    pub beta: [f64; 3],
    /// Newton steps.
    pub iterations: u32,
}

/// The scaled problem: z and the rows of E.
#[derive(Debug, Clone)]
pub(crate) struct Problem<'a> {
    z: &'a [f64],
    /// Eᵢₖ scaled so that each row's largest entry is 1.
    e: Vec<[f64; 3]>,
}

/// Checks z as the two-phase solver does (returning Σz).
fn check_feed(z: &[f64]) -> Result<f64, RachfordRiceError> {
    if z.is_empty() {
        return Err(RachfordRiceError::Empty);
    }
    let mut sum = 0.0;
    for (index, &v) in z.iter().enumerate() {
        if !v.is_finite() {
            return Err(RachfordRiceError::NotFinite {
                field: "z",
                index,
                value: v,
            });
        }
        if v < 0.0 {
            return Err(RachfordRiceError::NegativeMoleFraction { index, value: v });
        }
        sum += v;
    }
    if (sum - 1.0).abs() > MOLE_FRACTION_SUM_TOLERANCE {
        return Err(RachfordRiceError::MoleFractionSum { sum });
    }
    Ok(sum)
}

impl<'a> Problem<'a> {
    /// Checks the input and scales E.
    pub fn new(z: &'a [f64], k_organic: &[f64], k_aqueous: &[f64]) -> Result<Self, RachfordRiceError> {
        check_feed(z)?;
        for k in [k_organic, k_aqueous] {
            if k.len() != z.len() {
                return Err(RachfordRiceError::LengthMismatch {
                    z_len: z.len(),
                    k_len: k.len(),
                });
            }
        }
        let mut e = Vec::with_capacity(z.len());
        for (index, (&ko, &ka)) in k_organic.iter().zip(k_aqueous).enumerate() {
            for (field, k) in [("K_organic", ko), ("K_aqueous", ka)] {
                if k.is_nan() || k <= 0.0 {
                    return Err(RachfordRiceError::KValueNotPositive { field, index, value: k });
                }
            }
            e.push(scaled_row(ko, ka));
        }
        Ok(Self { z, e })
    }

    /// tᵢ at β.
    #[inline]
    fn t(&self, i: usize, b: &[f64; 3]) -> f64 {
        let e = &self.e[i];
        e[V] * b[V] + e[O] * b[O] + e[A] * b[A]
    }

    /// Q(β); infinite where some tᵢ (with zᵢ > 0) is not positive.
    fn objective(&self, b: &[f64; 3]) -> f64 {
        let mut q = b[V] + b[O] + b[A];
        for (i, &zi) in self.z.iter().enumerate() {
            if zi > 0.0 {
                let t = self.t(i, b);
                if t.is_nan() || t <= 0.0 {
                    return f64::INFINITY;
                }
                q -= zi * t.ln();
            }
        }
        q
    }

    /// The gradient (1 − Σᵢ xᵢₖ) and Hessian of Q at β.
    fn gradient_hessian(&self, b: &[f64; 3]) -> ([f64; 3], [[f64; 3]; 3]) {
        let mut g = [1.0; 3];
        let mut h = [[0.0; 3]; 3];
        for (i, &zi) in self.z.iter().enumerate() {
            if zi > 0.0 {
                let t = self.t(i, b);
                let a = [self.e[i][V] / t, self.e[i][O] / t, self.e[i][A] / t];
                for k in 0..3 {
                    g[k] -= zi * a[k];
                    for l in k..3 {
                        h[k][l] += zi * a[k] * a[l];
                    }
                }
            }
        }
        for k in 0..3 {
            for l in 0..k {
                h[k][l] = h[l][k];
            }
        }
        (g, h)
    }

    /// Minimises Q over β ≥ 0, holding the amounts of the phases that `fixed` gives (the
    /// vapour's at a given vapour fraction; a liquid's at zero to keep it out).
    ///
    /// # Errors
    /// [`RachfordRiceError::NoPhaseFor`] where a component can be in none of the phases
    /// allowed (for example the vapour held at zero and the component absent from both
    /// liquids);
    /// [`RachfordRiceError::NotConverged`] at the iteration cap.
    pub fn minimise(&self, fixed: [Option<f64>; 3]) -> Result<Minimum, RachfordRiceError> {
        let free: [bool; 3] = std::array::from_fn(|k| fixed[k].is_none());
        // Start with each component wholly in the free phase (or the held vapour) where its
        // E is largest, the phase it prefers; the liquids share what the held vapour
        // leaves. Where every component prefers one phase this is the answer.
        let mut b = [0.0; 3];
        for (i, &zi) in self.z.iter().enumerate() {
            let e = &self.e[i];
            let allowed = |k: usize| free[k] || (k == V && fixed[V].is_some_and(|v| v > 0.0));
            if let Some(k) = (0..3).filter(|&k| allowed(k)).max_by(|&a, &c| e[a].total_cmp(&e[c])) {
                b[k] += zi;
            }
        }
        if let Some(v) = fixed[V] {
            let liquid_share = (1.0 - v).max(0.5) / (b[O] + b[A] + b[V]).max(f64::MIN_POSITIVE);
            b = [v, b[O] + b[V], b[A]];
            b[O] *= liquid_share;
            b[A] *= liquid_share;
            if !free[O] {
                b[O] = fixed[O].unwrap_or(0.0);
            }
            if !free[A] {
                b[A] = fixed[A].unwrap_or(0.0);
            }
        }
        for k in 0..3 {
            if let Some(v) = fixed[k] {
                b[k] = v;
            }
        }
        for (i, &zi) in self.z.iter().enumerate() {
            if zi > 0.0 && self.t(i, &b).partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
                return Err(RachfordRiceError::NoPhaseFor { index: i });
            }
        }
        let mut at_zero = [false; 3];
        for k in 0..3 {
            at_zero[k] = free[k] && b[k] == 0.0;
        }
        let mut converged_steps = 0;
        // A phase added back that cannot grow from zero is kept out until a step is taken.
        let mut refused = [false; 3];
        for iteration in 1..=MAX_ITERATIONS {
            let (g, h) = self.gradient_hessian(&b);
            let active: [bool; 3] = std::array::from_fn(|k| free[k] && !at_zero[k]);
            let d = newton_direction(&g, &h, active);
            let negligible = (0..3).all(|k| !active[k] || d[k].abs() <= 4.0 * f64::EPSILON * b[k]);
            let decrement = -(0..3).map(|k| g[k] * d[k]).sum::<f64>();
            if negligible || converged_steps >= 3 {
                // The minimum on this face: add back the most super-saturated dropped phase.
                let release = (0..3)
                    .filter(|&k| at_zero[k] && !refused[k] && g[k] < -RELEASE_TOLERANCE)
                    .min_by(|&a, &c| g[a].total_cmp(&g[c]));
                match release {
                    Some(k) => {
                        at_zero[k] = false;
                        converged_steps = 0;
                        continue;
                    }
                    None => {
                        return Ok(Minimum {
                            beta: b,
                            iterations: iteration,
                        });
                    }
                }
            }
            if decrement < 1e-28 {
                converged_steps += 1;
            }
            // Ratio test: the largest step keeping every present phase's amount ≥ 0.
            let mut alpha_max = f64::INFINITY;
            let mut blocking = None;
            for k in 0..3 {
                if active[k] && d[k] < 0.0 {
                    let a = b[k] / -d[k];
                    if a < alpha_max {
                        alpha_max = a;
                        blocking = Some(k);
                    }
                }
            }
            let mut alpha = alpha_max.min(1.0);
            if alpha <= 0.0 {
                // A phase just added back cannot grow along this direction: keep it out.
                if let Some(k) = blocking {
                    at_zero[k] = true;
                    refused[k] = true;
                    b[k] = 0.0;
                }
                continue;
            }
            let q0 = self.objective(&b);
            let mut accepted = None;
            for _ in 0..60 {
                let mut trial = [b[V] + alpha * d[V], b[O] + alpha * d[O], b[A] + alpha * d[A]];
                let hits = alpha == alpha_max;
                if hits && let Some(k) = blocking {
                    trial[k] = 0.0;
                }
                let q = self.objective(&trial);
                // Near the minimum Q's decrease is lost in its round-off (about ε|Q|): there
                // Newton's step is taken as it is, being well inside its quadratic region.
                if q.is_finite() && (q <= q0 - 1e-4 * alpha * decrement || decrement < 1e-12 * (1.0 + q0.abs())) {
                    accepted = Some((trial, hits));
                    break;
                }
                alpha *= 0.5;
            }
            match accepted {
                Some((trial, _)) if trial == b => converged_steps = 3,
                Some((trial, hits)) => {
                    b = trial;
                    refused = [false; 3];
                    if hits && let Some(k) = blocking {
                        at_zero[k] = true;
                    }
                }
                None => {
                    // No decrease along Newton's direction: we are at the minimum to
                    // round-off.
                    converged_steps = 3;
                }
            }
        }
        Err(RachfordRiceError::NotConverged {
            iterations: MAX_ITERATIONS,
        })
    }

    /// The split at a minimum: phase set, fractions and compositions.
    pub fn split(&self, m: &Minimum) -> ThreePhaseSplit {
        let b = m.beta;
        let present = |k: usize| b[k] > 0.0;
        let composition = |k: usize| {
            present(k).then(|| {
                self.z
                    .iter()
                    .enumerate()
                    .map(|(i, &zi)| {
                        if zi > 0.0 {
                            zi * self.e[i][k] / self.t(i, &b)
                        } else {
                            0.0
                        }
                    })
                    .collect::<Vec<f64>>()
            })
        };
        ThreePhaseSplit {
            // Some phase is always present: the amounts add up to 1.
            phase_set: PhaseSet::from_phases(present(V), present(O), present(A)).unwrap_or(PhaseSet::Vapour),
            vapour_fraction: b[V],
            organic_fraction: b[O],
            aqueous_fraction: b[A],
            vapour: composition(V),
            organic: composition(O),
            aqueous: composition(A),
            iterations: m.iterations,
        }
    }

    /// ∂Q/∂βₖ = 1 − Σᵢ xᵢₖ at a minimum, for every phase (present or not): zero for a
    /// phase present and free; for a phase held, how far its composition is from adding up
    /// to 1 (for the vapour held at β, 1 − Σ y, zero where β is the equilibrium amount).
    pub fn gradient(&self, m: &Minimum) -> [f64; 3] {
        self.gradient_hessian(&m.beta).0
    }

    /// The mole fractions zᵢ Eᵢₖ / tᵢ of phase `k` at a minimum, into `out`: the phase's
    /// composition where it is present, its incipient composition (normalised) where it is
    /// not.
    pub fn composition(&self, m: &Minimum, k: usize, out: &mut [f64]) {
        let b = m.beta;
        let mut sum = 0.0;
        for (i, &zi) in self.z.iter().enumerate() {
            out[i] = if zi > 0.0 {
                zi * self.e[i][k] / self.t(i, &b)
            } else {
                0.0
            };
            sum += out[i];
        }
        if b[k] == 0.0 && sum > 0.0 {
            out.iter_mut().for_each(|x| *x /= sum);
        }
    }

    /// The derivatives of the phase amounts with respect to a variable (T or P) on which
    /// the E's depend, given ∂ln Eᵢₖ/∂(variable) in `dln_e` (scaled rows have the same
    /// logarithmic derivatives; the vapour's is zero), from the stationarity conditions of
    /// the phases present. With `fixed_vapour`, the vapour's amount is held. `None` where
    /// the phases present do not determine the derivatives (Q flat along a line: a state
    /// that is not unique at given T and P).
    pub fn amount_derivatives(&self, m: &Minimum, dln_e: &[[f64; 3]], fixed_vapour: bool) -> Option<[f64; 3]> {
        let b = m.beta;
        let active: [bool; 3] = std::array::from_fn(|k| b[k] > 0.0 && !(fixed_vapour && k == V));
        let (_, h) = self.gradient_hessian(&b);
        // ∂gₖ/∂x = −Σᵢ zᵢ (Eᵢₖ/tᵢ) (∂ln Eᵢₖ − Σₗ βₗ Eᵢₗ ∂ln Eᵢₗ / tᵢ).
        let mut dg = [0.0; 3];
        for (i, &zi) in self.z.iter().enumerate() {
            if zi > 0.0 {
                let t = self.t(i, &b);
                let e = &self.e[i];
                let dt = (0..3).map(|l| b[l] * e[l] * dln_e[i][l]).sum::<f64>() / t;
                for k in 0..3 {
                    dg[k] -= zi * e[k] / t * (dln_e[i][k] - dt);
                }
            }
        }
        let rhs = [-dg[0], -dg[1], -dg[2]];
        let d = solve_exact(&h, &rhs, active)?;
        Some(d)
    }

    /// dvᵢ/dx (vapour amount of each component per mole of feed) from the amounts'
    /// derivatives `db` (as from [`Self::amount_derivatives`]).
    pub fn vapour_amount_derivatives(&self, m: &Minimum, dln_e: &[[f64; 3]], db: &[f64; 3], out: &mut [f64]) {
        let b = m.beta;
        for (i, &zi) in self.z.iter().enumerate() {
            out[i] = if zi > 0.0 && b[V] > 0.0 {
                let e = &self.e[i];
                let t = self.t(i, &b);
                let dt: f64 = (0..3).map(|l| db[l] * e[l] + b[l] * e[l] * dln_e[i][l]).sum();
                zi * e[V] * (db[V] / t - b[V] * dt / (t * t))
            } else {
                0.0
            };
        }
    }
}

impl ThreePhaseSplit {
    /// The lumped liquid (organic and aqueous together) mole fractions, for reports that
    /// show one liquid.
    ///
    /// ```
    /// use flashduty::rachford_rice::three_phase_split;
    /// let inf = f64::INFINITY;
    /// let s = three_phase_split(&[0.5, 0.5], &[inf, 0.3], &[0.4, inf]).unwrap();
    /// assert_eq!(s.lumped_liquid(), vec![0.5, 0.5]);
    /// ```
    pub fn lumped_liquid(&self) -> Vec<f64> {
        let n = self
            .organic
            .as_ref()
            .or(self.aqueous.as_ref())
            .or(self.vapour.as_ref())
            .map_or(0, Vec::len);
        let total = self.organic_fraction + self.aqueous_fraction;
        (0..n)
            .map(|i| {
                let o = self.organic.as_ref().map_or(0.0, |x| x[i]);
                let a = self.aqueous.as_ref().map_or(0.0, |x| x[i]);
                if total > 0.0 {
                    (self.organic_fraction * o + self.aqueous_fraction * a) / total
                } else {
                    0.0
                }
            })
            .collect()
    }
}

/// One component's row of E = (1, 1/K_organic, 1/K_aqueous), scaled by its largest entry.
fn scaled_row(k_organic: f64, k_aqueous: f64) -> [f64; 3] {
    // Divide by the largest of 1, 1/K_O, 1/K_A, i.e. multiply by the smallest of 1, K_O, K_A.
    let m = 1.0f64.min(k_organic).min(k_aqueous);
    let inv = |k: f64| if k.is_infinite() { 0.0 } else { m / k };
    [m, inv(k_organic), inv(k_aqueous)]
}

/// Newton's direction −H⁻¹g on the active phases (zero elsewhere). Where the active block
/// is singular to working precision (Q flat along a line), a small ridge is added so that
/// the step stays finite; any point on that line is a minimum.
fn newton_direction(g: &[f64; 3], h: &[[f64; 3]; 3], active: [bool; 3]) -> [f64; 3] {
    let rhs = [-g[0], -g[1], -g[2]];
    if let Some(d) = solve_exact(h, &rhs, active) {
        return d;
    }
    let trace: f64 = (0..3).filter(|&k| active[k]).map(|k| h[k][k]).sum();
    let mut ridged = *h;
    for (k, row) in ridged.iter_mut().enumerate() {
        row[k] += 1e-10 * trace.max(f64::MIN_POSITIVE);
    }
    solve_exact(&ridged, &rhs, active).unwrap_or([0.0; 3])
}

/// Solves the active block of `h` d = `rhs` by Gaussian elimination with partial pivoting;
/// `None` if a pivot is below 1e-13 of the block's largest diagonal entry.
fn solve_exact(h: &[[f64; 3]; 3], rhs: &[f64; 3], active: [bool; 3]) -> Option<[f64; 3]> {
    let idx: Vec<usize> = (0..3).filter(|&k| active[k]).collect();
    let n = idx.len();
    let mut out = [0.0; 3];
    if n == 0 {
        return Some(out);
    }
    let mut a = [[0.0; 4]; 3];
    let mut scale: f64 = 0.0;
    for (r, &k) in idx.iter().enumerate() {
        for (c, &l) in idx.iter().enumerate() {
            a[r][c] = h[k][l];
        }
        a[r][n] = rhs[k];
        scale = scale.max(h[k][k].abs());
    }
    for col in 0..n {
        let pivot = (col..n).max_by(|&p, &q| a[p][col].abs().total_cmp(&a[q][col].abs()))?;
        if a[pivot][col].abs().partial_cmp(&(1e-13 * scale)) != Some(std::cmp::Ordering::Greater) {
            return None;
        }
        a.swap(col, pivot);
        for r in (col + 1)..n {
            let f = a[r][col] / a[col][col];
            for c in col..=n {
                a[r][c] -= f * a[col][c];
            }
        }
    }
    let mut x = [0.0; 3];
    for r in (0..n).rev() {
        let mut s = a[r][n];
        for c in (r + 1)..n {
            s -= a[r][c] * x[c];
        }
        x[r] = s / a[r][r];
    }
    for (r, &k) in idx.iter().enumerate() {
        out[k] = x[r];
    }
    out.iter().all(|v| v.is_finite()).then_some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    const INF: f64 = f64::INFINITY;

    fn balance(z: &[f64], s: &ThreePhaseSplit) -> f64 {
        let mut worst: f64 = 0.0;
        for (i, &zi) in z.iter().enumerate() {
            let mut back = 0.0;
            for (amount, comp) in [
                (s.vapour_fraction, &s.vapour),
                (s.organic_fraction, &s.organic),
                (s.aqueous_fraction, &s.aqueous),
            ] {
                if let Some(c) = comp {
                    back += amount * c[i];
                }
            }
            worst = worst.max((back - zi).abs());
        }
        worst
    }

    #[test]
    fn water_and_one_insoluble_organic() {
        // Invented K-values. Below the three-phase temperature: two liquids.
        let z = [0.3, 0.7];
        let s = three_phase_split(&z, &[INF, 0.5], &[0.3, INF]).unwrap();
        assert_eq!(s.phase_set, PhaseSet::OrganicAqueous);
        assert_eq!(s.aqueous.as_ref().unwrap(), &vec![1.0, 0.0]);
        assert!(balance(&z, &s) < 1e-16);
        // Water-rich and hot enough for the organic to boil off first: vapour + aqueous.
        let z = [0.9, 0.1];
        let s = three_phase_split(&z, &[INF, 3.0], &[0.5, INF]).unwrap();
        assert_eq!(s.phase_set, PhaseSet::VapourAqueous);
        // The vapour holds water at its K and all the organic: y_w = K_w.
        assert!((s.vapour.as_ref().unwrap()[0] - 0.5).abs() < 1e-15);
        assert!(balance(&z, &s) < 1e-16);
        // Superheated: vapour only.
        let s = three_phase_split(&z, &[INF, 30.0], &[5.0, INF]).unwrap();
        assert_eq!(s.phase_set, PhaseSet::Vapour);
        assert_eq!(s.vapour_fraction, 1.0);
    }

    #[test]
    fn three_phases_with_two_organics() {
        // Invented: water (K_w = 0.4), a light (3.0) and a heavy (0.2) organic.
        let z = [0.4, 0.3, 0.3];
        let s = three_phase_split(&z, &[INF, 3.0, 0.2], &[0.4, INF, INF]).unwrap();
        assert_eq!(s.phase_set, PhaseSet::VapourOrganicAqueous);
        let y = s.vapour.as_ref().unwrap();
        let x = s.organic.as_ref().unwrap();
        assert!((y[0] - 0.4).abs() < 1e-15, "{y:?}");
        assert!((y.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        assert!((x.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        assert!((y[1] / x[1] - 3.0).abs() < 1e-14);
        assert!(balance(&z, &s) < 1e-16);
        let total = s.vapour_fraction + s.organic_fraction + s.aqueous_fraction;
        assert!((total - 1.0).abs() < 1e-15);
    }

    #[test]
    fn errors_are_named() {
        assert_eq!(three_phase_split(&[], &[], &[]).unwrap_err(), RachfordRiceError::Empty);
        assert!(matches!(
            three_phase_split(&[0.5, 0.5], &[1.0], &[1.0, 1.0]).unwrap_err(),
            RachfordRiceError::LengthMismatch { .. }
        ));
        let e = three_phase_split(&[0.5, 0.5], &[1.0, 0.0], &[1.0, 1.0]).unwrap_err();
        assert_eq!(e.kind(), "k-value-not-positive");
        assert!(e.to_string().starts_with("K_organic[1]"), "{e}");
        let e = three_phase_split(&[0.5, 0.5], &[1.0, 1.0], &[f64::NAN, 1.0]).unwrap_err();
        assert!(e.to_string().starts_with("K_aqueous[0]"), "{e}");
        assert_eq!(
            three_phase_split(&[0.5, 0.6], &[1.0, 1.0], &[1.0, 1.0])
                .unwrap_err()
                .kind(),
            "mole-fraction-sum"
        );
        // Held at no vapour, a component in neither liquid has nowhere to go.
        let p = Problem::new(&[0.5, 0.5], &[INF, 1.0], &[INF, INF]).unwrap();
        assert_eq!(
            p.minimise([Some(0.0), None, None]).unwrap_err(),
            RachfordRiceError::NoPhaseFor { index: 0 }
        );
    }
}
