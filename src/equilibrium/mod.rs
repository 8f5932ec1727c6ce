//! Equilibrium: K-value models and the flash specifications built on the Rachford–Rice
//! solver.
//!
//! | specification | given | found |
//! |---|---|---|
//! | [`FlashSpec::TemperaturePressure`] | T, P | β, x, y (the isothermal flash) |
//! | [`FlashSpec::BubbleTemperature`] | P | T, incipient vapour y |
//! | [`FlashSpec::BubblePressure`] | T | P, incipient vapour y |
//! | [`FlashSpec::DewTemperature`] | P | T, incipient liquid x |
//! | [`FlashSpec::DewPressure`] | T | P, incipient liquid x |
//! | [`FlashSpec::TemperatureVapourFraction`] | T, β | P, x, y |
//! | [`FlashSpec::PressureVapourFraction`] | P, β | T, x, y |
//!
//! Temperature searches run Newton's method on the logarithm of the bubble or dew sum in
//! the variable 1/T, pressure searches in ln P, always inside a bracket with bisection as a
//! fallback and a hard cap, so they always terminate. For Raoult's law the bubble and dew
//! pressures come out in one Newton step, because their sums are linear in ln P.
//!
//! ```
//! use flashduty::equilibrium::{flash, FlashSpec, Raoult};
//! use flashduty::units::{Pressure, Temperature};
//! let model = Raoult::from_names(&["benzene", "toluene"]).unwrap();
//! let z = [0.5, 0.5];
//! let p = Pressure::parse("P", "1 atm").unwrap();
//! let bubble = flash(&model, &z, FlashSpec::BubbleTemperature { pressure: p }).unwrap();
//! let dew = flash(&model, &z, FlashSpec::DewTemperature { pressure: p }).unwrap();
//! assert!(bubble.temperature_k < dew.temperature_k);
//! let mid = Temperature::new("T", 0.5 * (bubble.temperature_k + dew.temperature_k)).unwrap();
//! let tp = flash(&model, &z, FlashSpec::TemperaturePressure { temperature: mid, pressure: p }).unwrap();
//! assert!(tp.vapour_fraction > 0.0 && tp.vapour_fraction < 1.0);
//! ```

mod kvalue;

pub use kvalue::{GivenK, KValueModel, KValues, Raoult};

use crate::rachford_rice::{self, Options, Phase, RachfordRiceError};
use crate::solve::{Root, bracketed_newton, expand_bracket};
use crate::units::{Pressure, Temperature};
use crate::warnings::Warning;
use serde::Serialize;

/// Lowest temperature any search visits, K.
pub const SEARCH_MIN_TEMPERATURE_K: f64 = 1.0;
/// Highest temperature any search visits, K.
pub const SEARCH_MAX_TEMPERATURE_K: f64 = 10_000.0;
/// Relative tolerance on temperature and pressure in the searches.
const RELATIVE_TOLERANCE: f64 = 1e-13;
/// Outer successive-substitution rounds for composition-dependent K-values.
const OUTER_ROUNDS: u32 = 200;

/// What to hold fixed in a flash.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FlashSpec {
    /// Temperature and pressure: the isothermal flash.
    TemperaturePressure {
        /// Temperature.
        temperature: Temperature,
        /// Pressure.
        pressure: Pressure,
    },
    /// The bubble temperature at a pressure.
    BubbleTemperature {
        /// Pressure.
        pressure: Pressure,
    },
    /// The bubble pressure at a temperature.
    BubblePressure {
        /// Temperature.
        temperature: Temperature,
    },
    /// The dew temperature at a pressure.
    DewTemperature {
        /// Pressure.
        pressure: Pressure,
    },
    /// The dew pressure at a temperature.
    DewPressure {
        /// Temperature.
        temperature: Temperature,
    },
    /// Temperature and vapour fraction; the pressure is found. β = 0 is the bubble pressure
    /// and β = 1 the dew pressure.
    TemperatureVapourFraction {
        /// Temperature.
        temperature: Temperature,
        /// Vapour fraction β in [0, 1].
        vapour_fraction: f64,
    },
    /// Pressure and vapour fraction; the temperature is found. β = 0 is the bubble
    /// temperature and β = 1 the dew temperature.
    PressureVapourFraction {
        /// Pressure.
        pressure: Pressure,
        /// Vapour fraction β in [0, 1].
        vapour_fraction: f64,
    },
}

/// Analytic sensitivities of a two-phase T–P flash, from the implicit-function theorem on
/// the Rachford–Rice equation: dβ/dT = −(∂F/∂T)/(∂F/∂β), with ∂F/∂Kᵢ = zᵢ/dᵢ².
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Sensitivity {
    /// dβ/dT at constant P, 1/K.
    pub dvapour_fraction_dt_per_k: f64,
    /// dβ/dP at constant T, 1/Pa.
    pub dvapour_fraction_dp_per_pa: f64,
}

/// The result of a flash: the state, the phase split and what it took to get there.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FlashResult {
    /// The phase. At a bubble point it is `Liquid`, at a dew point `Vapour`; the incipient
    /// phase's composition is still given.
    pub phase: Phase,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure, Pa.
    pub pressure_pa: f64,
    /// β, moles of vapour per mole of feed.
    pub vapour_fraction: f64,
    /// 1 − β, computed without cancellation.
    pub liquid_fraction: f64,
    /// Liquid mole fractions x; `None` where there is no liquid. At a dew point, the
    /// incipient liquid.
    pub liquid: Option<Vec<f64>>,
    /// Vapour mole fractions y; `None` where there is no vapour. At a bubble point, the
    /// incipient vapour.
    pub vapour: Option<Vec<f64>>,
    /// K-values at the final state.
    pub k_values: Vec<f64>,
    /// Steps of every search and of the Rachford–Rice solver, added up.
    pub iterations: u32,
    /// Evaluations of the K-value model.
    pub evaluations: u32,
    /// Warnings at the final state.
    pub warnings: Vec<Warning>,
    /// dβ/dT and dβ/dP, where the state is two-phase (`None` also where they overflow, at
    /// pressures near the smallest float).
    pub sensitivity: Option<Sensitivity>,
}

/// An error from a flash, naming the field and value.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FlashError {
    /// The feed composition was refused.
    #[error(transparent)]
    Feed(#[from] RachfordRiceError),
    /// The model has a different number of components from z.
    #[error("z: {z} mole fractions given for {components} components")]
    ComponentCount {
        /// Components in the model.
        components: usize,
        /// Entries in z.
        z: usize,
    },
    /// A vapour fraction outside [0, 1] (or not finite).
    #[error("vapour_fraction: {value} is outside [0, 1]")]
    VapourFractionOutOfRange {
        /// The value given.
        value: f64,
    },
    /// The mixture has no dew point: a component with feed in it does not vaporise.
    #[error("no dew point: '{component}' is non-volatile (K = 0), so the mixture never fully vaporises")]
    NoDewPoint {
        /// The non-volatile component.
        component: String,
    },
    /// No solution in the searched range.
    #[error("{what}: {detail}")]
    NoSolution {
        /// The specification.
        what: &'static str,
        /// Why.
        detail: String,
    },
    /// A composition-dependent model's outer loop did not settle.
    #[error("{what}: the composition loop did not converge in {rounds} rounds")]
    NotConverged {
        /// The specification.
        what: &'static str,
        /// Rounds taken.
        rounds: u32,
    },
}

impl FlashSpec {
    fn name(&self) -> &'static str {
        match self {
            FlashSpec::TemperaturePressure { .. } => "T-P flash",
            FlashSpec::BubbleTemperature { .. } => "bubble temperature",
            FlashSpec::BubblePressure { .. } => "bubble pressure",
            FlashSpec::DewTemperature { .. } => "dew temperature",
            FlashSpec::DewPressure { .. } => "dew pressure",
            FlashSpec::TemperatureVapourFraction { .. } => "T-vapour fraction flash",
            FlashSpec::PressureVapourFraction { .. } => "P-vapour fraction flash",
        }
    }
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
    let mut buffers = FlashBuffers::new(n);
    let state = flash_into(model, z, spec, None, &mut buffers)?;
    Ok(flash_result(model, z, &state, buffers))
}

/// A vapour fraction outside [0, 1] is refused before anything else.
fn check_vapour_fraction(spec: FlashSpec) -> Result<(), FlashError> {
    let value = match spec {
        FlashSpec::TemperatureVapourFraction { vapour_fraction, .. }
        | FlashSpec::PressureVapourFraction { vapour_fraction, .. } => vapour_fraction,
        _ => return Ok(()),
    };
    if (0.0..=1.0).contains(&value) {
        Ok(())
    } else {
        Err(FlashError::VapourFractionOutOfRange { value })
    }
}

/// The K-values and phase compositions of one flash, in buffers a caller can reuse: the
/// working storage of [`flash`], and of the energy layer's hot loops.
#[derive(Debug, Clone)]
pub(crate) struct FlashBuffers {
    /// K-values and their derivatives; after [`flash_into`], at the solved state.
    pub kv: KValues,
    /// Liquid mole fractions (meaningful where [`SolvedState::has_liquid`]).
    pub x: Vec<f64>,
    /// Vapour mole fractions (meaningful where [`SolvedState::has_vapour`]).
    pub y: Vec<f64>,
}

impl FlashBuffers {
    /// Buffers for `n` components.
    pub fn new(n: usize) -> Self {
        Self {
            kv: KValues::new(n),
            x: vec![0.0; n],
            y: vec![0.0; n],
        }
    }
}

/// A solved flash whose K-values and compositions are in a [`FlashBuffers`].
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
/// on success the buffers hold the K-values at the solved state and its compositions.
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
    buffers: &mut FlashBuffers,
) -> Result<SolvedState, FlashError> {
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
    for _ in 0..rounds {
        let state = solver.solve_frozen(spec)?;
        if !model.is_composition_dependent() {
            return Ok(solver.done(state));
        }
        let new_liquid = normalised(if state.has_liquid { &solver.buffers.x } else { z });
        let new_vapour = normalised(if state.has_vapour { &solver.buffers.y } else { z });
        let change = max_change(&solver.liquid, &new_liquid).max(max_change(&solver.vapour, &new_vapour));
        solver.liquid = new_liquid;
        solver.vapour = new_vapour;
        solver.last_state = None;
        if change <= 1e-12 {
            return Ok(solver.done(state));
        }
    }
    Err(FlashError::NotConverged {
        what: spec.name(),
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
    buffers: &mut FlashBuffers,
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
        return flash_into(model, z, spec, None, buffers).map(|s| s.t);
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
pub(crate) fn flash_result<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    state: &SolvedState,
    buffers: FlashBuffers,
) -> FlashResult {
    let mut warnings = Vec::new();
    model.warnings(state.t, state.p, &mut warnings);
    let sensitivity = if state.phase == Phase::TwoPhase {
        sensitivity(z, &buffers.kv, state.beta, state.liquid_fraction)
    } else {
        None
    };
    FlashResult {
        phase: state.phase,
        temperature_k: state.t,
        pressure_pa: state.p,
        vapour_fraction: state.beta,
        liquid_fraction: state.liquid_fraction,
        liquid: state.has_liquid.then_some(buffers.x),
        vapour: state.has_vapour.then_some(buffers.y),
        k_values: buffers.kv.k,
        iterations: state.iterations,
        evaluations: state.evaluations,
        warnings,
        sensitivity,
    }
}

/// dβ/dT and dβ/dP of a two-phase state with vapour fraction `beta` (`liquid_fraction`
/// = 1 − β) and K-values `kv`, from the implicit-function theorem on the Rachford–Rice
/// equation; `None` where a derivative overflows (pressures near the smallest float).
pub(crate) fn sensitivity(z: &[f64], kv: &KValues, beta: f64, liquid_fraction: f64) -> Option<Sensitivity> {
    let (mut f_beta, mut f_t, mut f_p) = (0.0, 0.0, 0.0);
    for (i, &zi) in z.iter().enumerate() {
        let k = kv.k[i];
        let d = liquid_fraction + beta * k;
        // zᵢ/dᵢ² times (Kᵢ − 1)² or Kᵢ, written with ratios to d so that huge K cannot
        // overflow.
        let (zd, q, kd) = (zi / d, (k - 1.0) / d, k / d);
        f_beta -= zd * d * q * q;
        f_t += zd * kd * kv.dln_k_dt[i];
        f_p += zd * kd * kv.dln_k_dp[i];
    }
    let s = Sensitivity {
        dvapour_fraction_dt_per_k: if f_beta < 0.0 { -f_t / f_beta } else { 0.0 },
        dvapour_fraction_dp_per_pa: if f_beta < 0.0 { -f_p / f_beta } else { 0.0 },
    };
    (s.dvapour_fraction_dt_per_k.is_finite() && s.dvapour_fraction_dp_per_pa.is_finite()).then_some(s)
}

/// Divides `v` by its sum where that is positive (the arithmetic of [`normalised`]).
fn normalise_in_place(v: &mut [f64]) {
    let s: f64 = v.iter().sum();
    if s > 0.0 {
        v.iter_mut().for_each(|x| *x /= s);
    }
}

fn normalised(v: &[f64]) -> Vec<f64> {
    let s: f64 = v.iter().sum();
    if s > 0.0 {
        v.iter().map(|x| x / s).collect()
    } else {
        v.to_vec()
    }
}

fn max_change(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(a, b)| (a - b).abs()).fold(0.0, f64::max)
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

/// A reusable isothermal flash for hot loops: the K-values and phase compositions live in
/// buffers owned by the flasher, so a flash allocates nothing. It gives the phase split
/// only; for warnings, sensitivities and the other specifications use [`flash`].
///
/// A composition-dependent model is refused here ([`FlashError::NotConverged`] is never
/// returned by this type): use [`flash`], whose outer loop handles it.
///
/// ```
/// use flashduty::equilibrium::{Raoult, TpFlasher};
/// use flashduty::rachford_rice::Phase;
/// use flashduty::units::{Pressure, Temperature};
/// let model = Raoult::from_names(&["n-hexane", "n-heptane"]).unwrap();
/// let mut flasher = TpFlasher::new(&model).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// for t in [340.0, 360.0, 380.0] {
///     let split = flasher.flash(&[0.5, 0.5], Temperature::new("T", t).unwrap(), p).unwrap();
///     if split.phase == Phase::TwoPhase {
///         assert!(flasher.liquid()[0] < 0.5 && flasher.vapour()[0] > 0.5);
///     }
/// }
/// ```
pub struct TpFlasher<'a, M: KValueModel + ?Sized> {
    model: &'a M,
    kv: KValues,
    x: Vec<f64>,
    y: Vec<f64>,
}

impl<M: KValueModel + ?Sized> std::fmt::Debug for TpFlasher<'_, M> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("TpFlasher")
            .field("components", &self.x.len())
            .field("k_values", &self.kv.k)
            .finish_non_exhaustive()
    }
}

impl<'a, M: KValueModel + ?Sized> TpFlasher<'a, M> {
    /// A flasher for `model`, with buffers for its components.
    ///
    /// # Errors
    /// [`FlashError::NoSolution`] for a composition-dependent model (use [`flash`]).
    pub fn new(model: &'a M) -> Result<Self, FlashError> {
        if model.is_composition_dependent() {
            return Err(FlashError::NoSolution {
                what: "T-P flash",
                detail: "a composition-dependent K-value model needs flash(), which iterates on the compositions"
                    .to_string(),
            });
        }
        let n = model.component_count();
        Ok(Self {
            model,
            kv: KValues::new(n),
            x: vec![0.0; n],
            y: vec![0.0; n],
        })
    }

    /// The phase split of feed `z` at `temperature` and `pressure`; the compositions are then
    /// in [`liquid`](Self::liquid) and [`vapour`](Self::vapour), with the conventions of
    /// [`rachford_rice::solve_into`] for a single-phase feed.
    ///
    /// # Errors
    /// [`FlashError::ComponentCount`] when z does not match the model, and
    /// [`FlashError::Feed`] for a refused feed.
    pub fn flash(
        &mut self,
        z: &[f64],
        temperature: Temperature,
        pressure: Pressure,
    ) -> Result<rachford_rice::SplitSummary, FlashError> {
        if z.len() != self.x.len() {
            return Err(FlashError::ComponentCount {
                components: self.x.len(),
                z: z.len(),
            });
        }
        self.model
            .k_values(temperature.kelvin(), pressure.pascal(), &[], &[], &mut self.kv);
        Ok(rachford_rice::solve_into(
            z,
            &self.kv.k,
            Options::default(),
            &mut self.x,
            &mut self.y,
        )?)
    }

    /// Liquid mole fractions of the last flash.
    pub fn liquid(&self) -> &[f64] {
        &self.x
    }

    /// Vapour mole fractions of the last flash.
    pub fn vapour(&self) -> &[f64] {
        &self.y
    }

    /// K-values of the last flash.
    pub fn k_values(&self) -> &[f64] {
        &self.kv.k
    }
}

struct Solver<'a, M: ?Sized> {
    model: &'a M,
    z: &'a [f64],
    /// K-values and compositions; a solved state's x and y are written here.
    buffers: &'a mut FlashBuffers,
    liquid: Vec<f64>,
    vapour: Vec<f64>,
    evaluations: u32,
    iterations: u32,
    t_bracket: Option<(f64, f64)>,
    /// The (T, P) at which `kv` was last evaluated.
    last_state: Option<(f64, f64)>,
}

/// v = −1000/T: the bubble and dew sums are nearly linear in it.
fn v_of_t(t: f64) -> f64 {
    -1000.0 / t
}
fn t_of_v(v: f64) -> f64 {
    -1000.0 / v
}

impl<M: KValueModel + ?Sized> Solver<'_, M> {
    fn k_at(&mut self, t: f64, p: f64) {
        self.model
            .k_values(t, p, &self.liquid, &self.vapour, &mut self.buffers.kv);
        self.evaluations += 1;
        self.last_state = Some((t, p));
    }

    /// K at (t, p), reusing the last evaluation when it was made there.
    fn k_at_cached(&mut self, t: f64, p: f64) {
        if self.last_state != Some((t, p)) {
            self.k_at(t, p);
        }
    }

    /// ln Σ zK and its derivatives with respect to T and ln P.
    fn bubble_sum(&mut self, t: f64, p: f64) -> (f64, f64, f64) {
        self.k_at(t, p);
        let (mut s, mut st, mut sp) = (0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            let w = self.z[i] * self.buffers.kv.k[i];
            s += w;
            st += w * self.buffers.kv.dln_k_dt[i];
            sp += w * self.buffers.kv.dln_k_dp[i] * p;
        }
        (s.ln(), st / s, sp / s)
    }

    /// −ln Σ z/K and its derivatives with respect to T and ln P.
    fn dew_sum(&mut self, t: f64, p: f64) -> (f64, f64, f64) {
        self.k_at(t, p);
        let (mut s, mut st, mut sp) = (0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            if self.z[i] == 0.0 {
                continue;
            }
            let w = self.z[i] / self.buffers.kv.k[i];
            s += w;
            st += w * self.buffers.kv.dln_k_dt[i];
            sp += w * self.buffers.kv.dln_k_dp[i] * p;
        }
        (-s.ln(), st / s, sp / s)
    }

    /// F(β) of Rachford–Rice at fixed β, and its derivatives with respect to T and ln P.
    fn rr_at(&mut self, beta: f64, t: f64, p: f64) -> (f64, f64, f64) {
        self.k_at(t, p);
        let (mut f, mut ft, mut fp) = (0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            let k = self.buffers.kv.k[i];
            let d = (1.0 - beta) + beta * k;
            let zi = self.z[i];
            f += zi * (k - 1.0) / d;
            let dk = zi / (d * d) * k;
            ft += dk * self.buffers.kv.dln_k_dt[i];
            fp += dk * self.buffers.kv.dln_k_dp[i] * p;
        }
        (f, ft, fp)
    }

    fn no_dew_point(&mut self, t: f64, p: f64, what: &'static str) -> FlashError {
        self.k_at(t, p);
        match (0..self.z.len()).find(|&i| self.z[i] > 0.0 && self.buffers.kv.k[i] == 0.0) {
            Some(i) => FlashError::NoDewPoint {
                component: self.model.component_name(i),
            },
            None => FlashError::NoSolution {
                what,
                detail: format!(
                    "no temperature between {SEARCH_MIN_TEMPERATURE_K} and {SEARCH_MAX_TEMPERATURE_K} K at {p} Pa"
                ),
            },
        }
    }

    /// Solves an increasing h(v) = 0 in v = −1000/T at pressure p.
    fn search_temperature(
        &mut self,
        p: f64,
        what: &'static str,
        mut h: impl FnMut(&mut Self, f64) -> (f64, f64),
    ) -> Result<f64, FlashError> {
        let (t_lo, t_hi) = self.model.temperature_hint(p).unwrap_or((250.0, 450.0));
        let clamp = |t: f64| t.clamp(SEARCH_MIN_TEMPERATURE_K, SEARCH_MAX_TEMPERATURE_K);
        let (v_min, v_max) = (v_of_t(SEARCH_MIN_TEMPERATURE_K), v_of_t(SEARCH_MAX_TEMPERATURE_K));
        let (v_lo, v_hi) = (v_of_t(clamp(0.99 * t_lo)), v_of_t(clamp(1.01 * t_hi)));
        let bracket = expand_bracket(|v| h(self, v).0, v_lo, v_hi, v_min, v_max);
        let Some(bracket) = bracket else {
            return Err(if what.starts_with("dew") {
                self.no_dew_point(SEARCH_MAX_TEMPERATURE_K, p, what)
            } else {
                FlashError::NoSolution {
                    what,
                    detail: format!(
                        "no temperature between {SEARCH_MIN_TEMPERATURE_K} and {SEARCH_MAX_TEMPERATURE_K} K at {p} Pa"
                    ),
                }
            });
        };
        // The sums are nearly linear in v, so the secant through the bracket's ends is close.
        let root: Root = bracketed_newton(
            |v| h(self, v),
            bracket.lo,
            bracket.hi,
            bracket.secant(),
            RELATIVE_TOLERANCE * bracket.hi.abs(),
        );
        self.iterations += root.iterations;
        Ok(t_of_v(root.x))
    }

    /// Solves an increasing h(ln P) = 0 at temperature t.
    fn search_pressure(
        &mut self,
        what: &'static str,
        guess_ln_p: f64,
        mut h: impl FnMut(&mut Self, f64) -> (f64, f64),
    ) -> Result<f64, FlashError> {
        let (lmin, lmax) = (f64::MIN_POSITIVE.ln(), f64::MAX.ln());
        // One Newton step from the guess lands on the root when h is linear in ln P.
        let (h0, s0) = h(self, guess_ln_p);
        let start = if h0.is_finite() && s0 > 0.0 {
            (guess_ln_p - h0 / s0).clamp(lmin, lmax)
        } else {
            guess_ln_p
        };
        let Some(bracket) = expand_bracket(|l| h(self, l).0, start - 1e-3, start + 1e-3, lmin, lmax) else {
            return Err(FlashError::NoSolution {
                what,
                detail: "no positive pressure satisfies it (is any component volatile?)".to_string(),
            });
        };
        let root = bracketed_newton(
            |l| h(self, l),
            bracket.lo,
            bracket.hi,
            start,
            RELATIVE_TOLERANCE * start.abs().max(1.0),
        );
        self.iterations += root.iterations;
        Ok(root.x.exp())
    }

    fn bubble_t(&mut self, p: f64) -> Result<f64, FlashError> {
        self.search_temperature(p, "bubble temperature", |s, v| {
            let t = t_of_v(v);
            let (f, ft, _) = s.bubble_sum(t, p);
            (f, ft * t * t / 1000.0)
        })
    }

    fn dew_t(&mut self, p: f64) -> Result<f64, FlashError> {
        self.search_temperature(p, "dew temperature", |s, v| {
            let t = t_of_v(v);
            let (f, ft, _) = s.dew_sum(t, p);
            (f, ft * t * t / 1000.0)
        })
    }

    fn bubble_p(&mut self, t: f64) -> Result<f64, FlashError> {
        self.search_pressure("bubble pressure", 1e5f64.ln(), |s, l| {
            let (f, _, fp) = s.bubble_sum(t, l.exp());
            (-f, -fp)
        })
    }

    fn dew_p(&mut self, t: f64) -> Result<f64, FlashError> {
        let p = self.search_pressure("dew pressure", 1e5f64.ln(), |s, l| {
            let (f, _, fp) = s.dew_sum(t, l.exp());
            (-f, -fp)
        });
        match p {
            Err(FlashError::NoSolution { .. }) => Err(self.no_dew_point(t, 1e5, "dew pressure")),
            other => other,
        }
    }

    /// The incipient vapour at a bubble point (x = z) or liquid at a dew point (y = z).
    fn saturated(&mut self, t: f64, p: f64, bubble: bool) -> SolvedState {
        self.k_at(t, p);
        let z = self.z;
        let b = &mut *self.buffers;
        let (copy, incipient) = if bubble {
            (&mut b.x, &mut b.y)
        } else {
            (&mut b.y, &mut b.x)
        };
        copy.copy_from_slice(z);
        for ((w, z), k) in incipient.iter_mut().zip(z).zip(&b.kv.k) {
            *w = if bubble {
                z * k
            } else if *z == 0.0 {
                0.0
            } else {
                z / k
            };
        }
        normalise_in_place(incipient);
        let (phase, beta, liquid_fraction) = if bubble {
            (Phase::Liquid, 0.0, 1.0)
        } else {
            (Phase::Vapour, 1.0, 0.0)
        };
        SolvedState {
            t,
            p,
            phase,
            beta,
            liquid_fraction,
            has_liquid: true,
            has_vapour: true,
            ..SolvedState::UNSET
        }
    }

    fn split_at(&mut self, t: f64, p: f64) -> Result<SolvedState, FlashError> {
        self.k_at(t, p);
        let b = &mut *self.buffers;
        let s = rachford_rice::solve_into(self.z, &b.kv.k, Options::default(), &mut b.x, &mut b.y)?;
        self.iterations += s.iterations;
        Ok(SolvedState {
            t,
            p,
            phase: s.phase,
            beta: s.vapour_fraction,
            liquid_fraction: s.liquid_fraction,
            has_liquid: s.phase != Phase::Vapour,
            has_vapour: s.phase != Phase::Liquid,
            ..SolvedState::UNSET
        })
    }

    /// The two-phase state at a given β, T and P (K evaluated there).
    fn at_fraction(&mut self, beta: f64, t: f64, p: f64) -> SolvedState {
        self.k_at(t, p);
        let liquid_fraction = 1.0 - beta;
        let b = &mut *self.buffers;
        for (((x, y), z), k) in b.x.iter_mut().zip(b.y.iter_mut()).zip(self.z).zip(&b.kv.k) {
            *x = z / (liquid_fraction + beta * k);
            *y = k * *x;
        }
        SolvedState {
            t,
            p,
            phase: Phase::TwoPhase,
            beta,
            liquid_fraction,
            has_liquid: true,
            has_vapour: true,
            ..SolvedState::UNSET
        }
    }

    fn solve_frozen(&mut self, spec: FlashSpec) -> Result<SolvedState, FlashError> {
        match spec {
            FlashSpec::TemperaturePressure { temperature, pressure } => {
                self.split_at(temperature.kelvin(), pressure.pascal())
            }
            FlashSpec::BubbleTemperature { pressure } => {
                let p = pressure.pascal();
                let t = self.bubble_t(p)?;
                Ok(self.saturated(t, p, true))
            }
            FlashSpec::DewTemperature { pressure } => {
                let p = pressure.pascal();
                let t = self.dew_t(p)?;
                Ok(self.saturated(t, p, false))
            }
            FlashSpec::BubblePressure { temperature } => {
                let t = temperature.kelvin();
                let p = self.bubble_p(t)?;
                Ok(self.saturated(t, p, true))
            }
            FlashSpec::DewPressure { temperature } => {
                let t = temperature.kelvin();
                let p = self.dew_p(t)?;
                Ok(self.saturated(t, p, false))
            }
            FlashSpec::TemperatureVapourFraction {
                temperature,
                vapour_fraction: beta,
            } => {
                let t = temperature.kelvin();
                if beta == 0.0 {
                    return self.solve_frozen(FlashSpec::BubblePressure { temperature });
                }
                if beta == 1.0 {
                    return self.solve_frozen(FlashSpec::DewPressure { temperature });
                }
                let (p_dew, p_bub) = (self.dew_p(t)?, self.bubble_p(t)?);
                let guess = (1.0 - beta) * p_bub.ln() + beta * p_dew.ln();
                let (lo, hi) = (p_dew.ln(), p_bub.ln());
                let root = bracketed_newton(
                    |l| {
                        let (f, _, fp) = self.rr_at(beta, t, l.exp());
                        (-f, -fp)
                    },
                    lo.min(hi),
                    hi.max(lo),
                    guess,
                    RELATIVE_TOLERANCE * guess.abs().max(1.0),
                );
                self.iterations += root.iterations;
                Ok(self.at_fraction(beta, t, root.x.exp()))
            }
            FlashSpec::PressureVapourFraction {
                pressure,
                vapour_fraction: beta,
            } => {
                let p = pressure.pascal();
                if beta == 0.0 {
                    return self.solve_frozen(FlashSpec::BubbleTemperature { pressure });
                }
                if beta == 1.0 {
                    return self.solve_frozen(FlashSpec::DewTemperature { pressure });
                }
                let (t_bub, t_dew) = match self.t_bracket {
                    Some(b) if !self.model.is_composition_dependent() => b,
                    _ => (self.bubble_t(p)?, self.dew_t(p)?),
                };
                let (lo, hi) = (v_of_t(t_bub), v_of_t(t_dew));
                let guess = (1.0 - beta) * lo + beta * hi;
                let root = bracketed_newton(
                    |v| {
                        let t = t_of_v(v);
                        let (f, ft, _) = self.rr_at(beta, t, p);
                        (f, ft * t * t / 1000.0)
                    },
                    lo.min(hi),
                    hi.max(lo),
                    guess,
                    RELATIVE_TOLERANCE * guess.abs(),
                );
                self.iterations += root.iterations;
                Ok(self.at_fraction(beta, t_of_v(root.x), p))
            }
        }
    }

    /// The state with the search's counts, and the K-values in the buffers at it.
    fn done(&mut self, state: SolvedState) -> SolvedState {
        self.k_at_cached(state.t, state.p);
        SolvedState {
            iterations: self.iterations,
            evaluations: self.evaluations,
            ..state
        }
    }
}
