//! [`flash`], and the flash into reusable buffers that it and the energy layer run.

use super::kvalue::{KValueModel, KValues};
use super::search::{Solver, max_change, normalised};
use super::sensitivity::state_sensitivity;
use super::spec::{FlashError, FlashResult, FlashSpec, check_vapour_fraction};
use crate::rachford_rice::{self, Phase};
use crate::units::{Pressure, Temperature};

/// Outer successive-substitution rounds for composition-dependent K-values.
const OUTER_ROUNDS: u32 = 200;

/// Every how many rounds the outer loop extrapolates (the dominant-eigenvalue method).
const ACCELERATE_EVERY: u32 = 4;

/// The dominant-eigenvalue extrapolation of successive substitution (Crowe and Nishio,
/// AIChE J. 21 (1975) 528, from memory; the form Michelsen uses on ln K): where the last two
/// steps shrink by a steady ratio λ = Δₖ·Δₖ / Δₖ₋₁·Δₖ in (0, 0.95), the remaining steps sum
/// to Δₖ λ/(1 − λ), and the compositions jump there (clipped at zero and normalised). The loop
/// still ends only where one plain round changes nothing (1e-12), so the answer is the
/// fixed point of successive substitution, whatever the jumps did on the way.
fn extrapolate(previous: &[f64], step: &[f64], liquid: &mut [f64], vapour: &mut [f64]) {
    let dot = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(a, b)| a * b).sum::<f64>();
    let (ss, ps) = (dot(step, step), dot(previous, step));
    let lambda = ss / ps;
    if !(lambda > 0.0 && lambda < 0.95) {
        return;
    }
    let factor = lambda / (1.0 - lambda);
    let n = liquid.len();
    let jump = |v: &mut [f64], d: &[f64]| {
        let mut trial: Vec<f64> = v.iter().zip(d).map(|(v, d)| (v + factor * d).max(0.0)).collect();
        let sum: f64 = trial.iter().sum();
        if sum > 0.0 && sum.is_finite() {
            trial.iter_mut().for_each(|t| *t /= sum);
            v.copy_from_slice(&trial);
        }
    };
    jump(liquid, &step[..n]);
    jump(vapour, &step[n..]);
}

/// Runs a flash of feed `z` with `model` at `spec`.
///
/// # Errors
/// [`FlashError`]: a refused feed ([`FlashError::Feed`]), a component-count mismatch, a
/// vapour fraction outside [0, 1], no dew point, no solution between 1 K and 10 000 K (or
/// over all positive pressures), or, for composition-dependent models only, an outer loop
/// that does not settle.
///
/// ```
/// use flashduty::equilibrium::{flash, FlashSpec, Raoult};
/// use flashduty::units::Temperature;
/// let model = Raoult::from_names(&["water"]).unwrap();
/// let t = Temperature::parse("T", "100 degC").unwrap();
/// let r = flash(&model, &[1.0], FlashSpec::BubblePressure { temperature: t }).unwrap();
/// // IAPWS-IF97: psat(373.15 K) = 101.418 kPa (iapws 1.5.5, tests/fixtures).
/// assert!((r.pressure_pa / 101_418.0 - 1.0).abs() < 0.005);
/// ```
pub fn flash<M: KValueModel + ?Sized>(model: &M, z: &[f64], spec: FlashSpec) -> Result<FlashResult, FlashError> {
    check_vapour_fraction(spec)?;
    let n = model.component_count();
    if z.len() != n {
        return Err(FlashError::ComponentCount {
            components: n,
            z: z.len(),
        });
    }
    let sum = rachford_rice::validate(z, z)?;
    // Normalise z, copying it only when that changes it.
    let normalised_z: Vec<f64>;
    let z: &[f64] = if sum == 1.0 {
        z
    } else {
        normalised_z = z.iter().map(|v| v / sum).collect();
        &normalised_z
    };
    let mut solved = SolvedFlash::new(n);
    flash_into(model, z, spec, None, &mut solved)?;
    Ok(flash_result(model, z, solved))
}

/// A solved flash in buffers a caller can reuse: the state, and the K-values and phase
/// compositions at it. The working storage of [`flash`] and of the energy layer's hot
/// loops; [`flash_result`] turns it into a [`FlashResult`].
#[derive(Debug, Clone)]
pub(crate) struct SolvedFlash {
    /// The state; after [`flash_into`], the one solved.
    pub state: SolvedState,
    /// K-values and their derivatives; after [`flash_into`], at the solved state.
    pub kv: KValues,
    /// Liquid mole fractions (meaningful where [`SolvedState::has_liquid`]).
    pub x: Vec<f64>,
    /// Vapour mole fractions (meaningful where [`SolvedState::has_vapour`]).
    pub y: Vec<f64>,
    /// The water phase's part, where the state was solved with one (`x` is then the
    /// organic and aqueous liquids lumped, as the energy layer sums them).
    pub water: super::water_phase::WaterState,
}

impl SolvedFlash {
    /// Buffers for `n` components, nothing solved yet.
    pub fn new(n: usize) -> Self {
        Self {
            state: SolvedState::UNSET,
            kv: KValues::new(n),
            x: vec![0.0; n],
            y: vec![0.0; n],
            water: Default::default(),
        }
    }

    /// Reports a state found on the single-phase side of a bubble or dew point as that
    /// phase: round-off can put its T–P flash a hair into the two-phase region, where β is
    /// then 1e-15.
    pub fn force_single(&mut self, phase: Phase, z: &[f64]) {
        let s = &mut self.state;
        if s.phase == phase {
            return;
        }
        s.phase = phase;
        if phase == Phase::Liquid {
            (s.beta, s.liquid_fraction, s.has_liquid, s.has_vapour) = (0.0, 1.0, true, false);
            self.x.copy_from_slice(z);
        } else {
            (s.beta, s.liquid_fraction, s.has_liquid, s.has_vapour) = (1.0, 0.0, false, true);
            self.y.copy_from_slice(z);
        }
    }
}

/// The scalar part of a [`SolvedFlash`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct SolvedState {
    /// Temperature, K.
    pub t: f64,
    /// Pressure, Pa.
    pub p: f64,
    /// The phase (`Liquid` at a bubble point, `Vapour` at a dew point).
    pub phase: Phase,
    /// β.
    pub beta: f64,
    /// 1 − β, without cancellation.
    pub liquid_fraction: f64,
    /// Whether the buffers' x is a liquid composition to report.
    pub has_liquid: bool,
    /// Whether the buffers' y is a vapour composition to report.
    pub has_vapour: bool,
    /// Steps of every search and of the Rachford–Rice solver.
    pub iterations: u32,
    /// Evaluations of the K-value model.
    pub evaluations: u32,
}

impl SolvedState {
    /// A placeholder before anything is solved: all liquid at 0 K, no compositions.
    pub const UNSET: SolvedState = SolvedState {
        t: 0.0,
        p: 0.0,
        phase: Phase::Liquid,
        beta: 0.0,
        liquid_fraction: 1.0,
        has_liquid: false,
        has_vapour: false,
        iterations: 0,
        evaluations: 0,
    };
}

/// The flash of [`flash`] into caller-owned buffers, without the result's allocations:
/// on success `buffers` holds the solved state, the K-values at it and its compositions.
///
/// The caller has checked that `z` is a valid feed for `model` (as [`flash`] does) and
/// normalised it the way [`flash`] does, and sized `buffers` for the model. For a
/// composition-independent model this allocates nothing. `t_bracket` gives the bubble and
/// dew temperatures when already known (used by [`FlashSpec::PressureVapourFraction`]).
pub(crate) fn flash_into<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    spec: FlashSpec,
    t_bracket: Option<(f64, f64)>,
    buffers: &mut SolvedFlash,
) -> Result<(), FlashError> {
    check_vapour_fraction(spec)?;
    // Composition-independent models never read the phase compositions.
    let start = if model.is_composition_dependent() {
        z.to_vec()
    } else {
        Vec::new()
    };
    let mut solver = Solver {
        model,
        z,
        buffers,
        liquid: start.clone(),
        vapour: start,
        last_state: None,
        evaluations: 0,
        iterations: 0,
        t_bracket,
    };
    let rounds = if model.is_composition_dependent() {
        OUTER_ROUNDS
    } else {
        1
    };
    let (mut round, mut last_step): (u32, Option<Vec<f64>>) = (0, None);
    for _ in 0..rounds {
        let state = solver.solve_frozen(spec)?;
        if !model.is_composition_dependent() {
            solver.done(state);
            return Ok(());
        }
        // A single-phase state still leaves the incipient phase in the buffers: its
        // composition, not z, is where the next round evaluates the missing phase's K, so
        // that a feed just inside the two-phase region is not taken for single-phase
        // because K was frozen at the wrong composition.
        let usable = |v: &[f64]| v.iter().all(|x| x.is_finite() && *x >= 0.0) && v.iter().sum::<f64>() > 0.0;
        let new_liquid = normalised(if usable(&solver.buffers.x) {
            &solver.buffers.x
        } else {
            z
        });
        let new_vapour = normalised(if usable(&solver.buffers.y) {
            &solver.buffers.y
        } else {
            z
        });
        let change = max_change(&solver.liquid, &new_liquid).max(max_change(&solver.vapour, &new_vapour));
        // The step this round took, liquid then vapour, for the extrapolation below.
        let step: Vec<f64> = new_liquid
            .iter()
            .zip(&solver.liquid)
            .chain(new_vapour.iter().zip(&solver.vapour))
            .map(|(a, b)| a - b)
            .collect();
        solver.liquid = new_liquid;
        solver.vapour = new_vapour;
        solver.last_state = None;
        if change <= 1e-12 {
            solver.done(state);
            return Ok(());
        }
        round += 1;
        if round % ACCELERATE_EVERY == 0
            && let Some(previous) = &last_step
        {
            extrapolate(previous, &step, &mut solver.liquid, &mut solver.vapour);
        }
        last_step = Some(step);
    }
    Err(FlashError::NotConverged {
        what: spec.name(),
        state: spec.given(),
        rounds,
    })
}

/// The bubble (`bubble`) or dew temperature of `z` at `p_pa`, with `z` and `buffers` as for
/// [`flash_into`]: the same search as [`flash`] with [`FlashSpec::BubbleTemperature`] or
/// [`FlashSpec::DewTemperature`], without the incipient phase.
pub(crate) fn saturation_temperature<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    p_pa: f64,
    bubble: bool,
    buffers: &mut SolvedFlash,
) -> Result<f64, FlashError> {
    if model.is_composition_dependent() {
        // The outer loop is needed: take the full route.
        let pressure = Pressure::new("P", p_pa).map_err(|e| FlashError::NoSolution {
            what: if bubble {
                "bubble temperature"
            } else {
                "dew temperature"
            },
            detail: e.to_string(),
        })?;
        let spec = if bubble {
            FlashSpec::BubbleTemperature { pressure }
        } else {
            FlashSpec::DewTemperature { pressure }
        };
        flash_into(model, z, spec, None, buffers)?;
        return Ok(buffers.state.t);
    }
    let mut solver = Solver {
        model,
        z,
        buffers,
        liquid: Vec::new(),
        vapour: Vec::new(),
        last_state: None,
        evaluations: 0,
        iterations: 0,
        t_bracket: None,
    };
    if bubble {
        solver.bubble_t(p_pa)
    } else {
        solver.dew_t(p_pa)
    }
}

/// The [`FlashResult`] of a state solved by [`flash_into`] (with the same `model` and `z`),
/// taking the buffers' vectors into it.
pub(crate) fn flash_result<M: KValueModel + ?Sized>(model: &M, z: &[f64], solved: SolvedFlash) -> FlashResult {
    let state = solved.state;
    let mut warnings = Vec::new();
    model.warnings(state.t, state.p, &mut warnings);
    crate::warnings::drop_for_pure_feed(z, &mut warnings);
    if state.has_liquid {
        model.feed_warnings(z, &mut warnings);
    }
    let sensitivity = state_sensitivity(model, z, &solved);
    FlashResult {
        phase: state.phase,
        temperature_k: state.t,
        pressure_pa: state.p,
        vapour_fraction: state.beta,
        liquid_fraction: state.liquid_fraction,
        liquid: state.has_liquid.then_some(solved.x),
        vapour: state.has_vapour.then_some(solved.y),
        k_values: solved.kv.k,
        iterations: state.iterations,
        evaluations: state.evaluations,
        warnings,
        sensitivity,
        water_phase: None,
    }
}

/// The isothermal flash at T and P: shorthand for [`flash`] with
/// [`FlashSpec::TemperaturePressure`].
///
/// # Errors
/// As [`flash`].
///
/// ```
/// use flashduty::equilibrium::{tp_flash, Raoult};
/// use flashduty::units::{Pressure, Temperature};
/// let m = Raoult::from_names(&["n-hexane", "n-heptane"]).unwrap();
/// let r = tp_flash(&m, &[0.5, 0.5], Temperature::parse("T", "85 degC").unwrap(),
///     Pressure::parse("P", "1 atm").unwrap()).unwrap();
/// assert_eq!(r.phase, flashduty::rachford_rice::Phase::TwoPhase);
/// ```
pub fn tp_flash<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    temperature: Temperature,
    pressure: Pressure,
) -> Result<FlashResult, FlashError> {
    flash(model, z, FlashSpec::TemperaturePressure { temperature, pressure })
}
