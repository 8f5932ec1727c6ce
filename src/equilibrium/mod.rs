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
    flash_bracketed(model, z, spec, None)
}

/// [`flash`] with the bubble and dew temperatures already known (for a
/// [`FlashSpec::PressureVapourFraction`] search), so repeated flashes at one pressure do
/// not search for them again.
pub(crate) fn flash_bracketed<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    spec: FlashSpec,
    t_bracket: Option<(f64, f64)>,
) -> Result<FlashResult, FlashError> {
    if let FlashSpec::TemperatureVapourFraction { vapour_fraction, .. }
    | FlashSpec::PressureVapourFraction { vapour_fraction, .. } = spec
        && !(0.0..=1.0).contains(&vapour_fraction)
    {
        return Err(FlashError::VapourFractionOutOfRange { value: vapour_fraction });
    }
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
    // Composition-independent models never read the phase compositions.
    let start = if model.is_composition_dependent() {
        z.to_vec()
    } else {
        Vec::new()
    };
    let mut solver = Solver {
        model,
        z,
        kv: KValues::new(n),
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
            return Ok(solver.finish(state));
        }
        let new_liquid = normalised(state.x.as_deref().unwrap_or(z));
        let new_vapour = normalised(state.y.as_deref().unwrap_or(z));
        let change = max_change(&solver.liquid, &new_liquid).max(max_change(&solver.vapour, &new_vapour));
        solver.liquid = new_liquid;
        solver.vapour = new_vapour;
        solver.last_state = None;
        if change <= 1e-12 {
            return Ok(solver.finish(state));
        }
    }
    Err(FlashError::NotConverged {
        what: spec.name(),
        rounds,
    })
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

/// The solved state before warnings and sensitivities are attached.
struct State {
    t: f64,
    p: f64,
    phase: Phase,
    beta: f64,
    liquid_fraction: f64,
    x: Option<Vec<f64>>,
    y: Option<Vec<f64>>,
}

struct Solver<'a, M: ?Sized> {
    model: &'a M,
    z: &'a [f64],
    kv: KValues,
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
        self.model.k_values(t, p, &self.liquid, &self.vapour, &mut self.kv);
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
            let w = self.z[i] * self.kv.k[i];
            s += w;
            st += w * self.kv.dln_k_dt[i];
            sp += w * self.kv.dln_k_dp[i] * p;
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
            let w = self.z[i] / self.kv.k[i];
            s += w;
            st += w * self.kv.dln_k_dt[i];
            sp += w * self.kv.dln_k_dp[i] * p;
        }
        (-s.ln(), st / s, sp / s)
    }

    /// F(β) of Rachford–Rice at fixed β, and its derivatives with respect to T and ln P.
    fn rr_at(&mut self, beta: f64, t: f64, p: f64) -> (f64, f64, f64) {
        self.k_at(t, p);
        let (mut f, mut ft, mut fp) = (0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            let k = self.kv.k[i];
            let d = (1.0 - beta) + beta * k;
            let zi = self.z[i];
            f += zi * (k - 1.0) / d;
            let dk = zi / (d * d) * k;
            ft += dk * self.kv.dln_k_dt[i];
            fp += dk * self.kv.dln_k_dp[i] * p;
        }
        (f, ft, fp)
    }

    fn no_dew_point(&mut self, t: f64, p: f64, what: &'static str) -> FlashError {
        self.k_at(t, p);
        match (0..self.z.len()).find(|&i| self.z[i] > 0.0 && self.kv.k[i] == 0.0) {
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
    fn saturated(&mut self, t: f64, p: f64, bubble: bool) -> State {
        self.k_at(t, p);
        let z = self.z;
        let k = &self.kv.k;
        if bubble {
            let y: Vec<f64> = normalised(&z.iter().zip(k).map(|(z, k)| z * k).collect::<Vec<_>>());
            State {
                t,
                p,
                phase: Phase::Liquid,
                beta: 0.0,
                liquid_fraction: 1.0,
                x: Some(z.to_vec()),
                y: Some(y),
            }
        } else {
            let x: Vec<f64> = normalised(
                &z.iter()
                    .zip(k)
                    .map(|(z, k)| if *z == 0.0 { 0.0 } else { z / k })
                    .collect::<Vec<_>>(),
            );
            State {
                t,
                p,
                phase: Phase::Vapour,
                beta: 1.0,
                liquid_fraction: 0.0,
                x: Some(x),
                y: Some(z.to_vec()),
            }
        }
    }

    fn split_at(&mut self, t: f64, p: f64) -> Result<State, FlashError> {
        self.k_at(t, p);
        let n = self.z.len();
        let (mut x, mut y) = (vec![0.0; n], vec![0.0; n]);
        let s = rachford_rice::solve_into(self.z, &self.kv.k, Options::default(), &mut x, &mut y)?;
        self.iterations += s.iterations;
        Ok(State {
            t,
            p,
            phase: s.phase,
            beta: s.vapour_fraction,
            liquid_fraction: s.liquid_fraction,
            x: (s.phase != Phase::Vapour).then_some(x),
            y: (s.phase != Phase::Liquid).then_some(y),
        })
    }

    /// The two-phase state at a given β, T and P (K evaluated there).
    fn at_fraction(&mut self, beta: f64, t: f64, p: f64) -> State {
        self.k_at(t, p);
        let liquid_fraction = 1.0 - beta;
        let (x, y): (Vec<f64>, Vec<f64>) = self
            .z
            .iter()
            .zip(&self.kv.k)
            .map(|(z, k)| {
                let x = z / (liquid_fraction + beta * k);
                (x, k * x)
            })
            .unzip();
        State {
            t,
            p,
            phase: Phase::TwoPhase,
            beta,
            liquid_fraction,
            x: Some(x),
            y: Some(y),
        }
    }

    fn solve_frozen(&mut self, spec: FlashSpec) -> Result<State, FlashError> {
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

    fn finish(&mut self, state: State) -> FlashResult {
        self.k_at_cached(state.t, state.p);
        let mut warnings = Vec::new();
        self.model.warnings(state.t, state.p, &mut warnings);
        let sensitivity = (state.phase == Phase::TwoPhase)
            .then(|| {
                let (beta, lf) = (state.beta, state.liquid_fraction);
                let (mut f_beta, mut f_t, mut f_p) = (0.0, 0.0, 0.0);
                for i in 0..self.z.len() {
                    let k = self.kv.k[i];
                    let d = lf + beta * k;
                    // zᵢ/dᵢ² times (Kᵢ − 1)² or Kᵢ, written with ratios to d so that huge K
                    // cannot overflow.
                    let (zd, q, kd) = (self.z[i] / d, (k - 1.0) / d, k / d);
                    f_beta -= zd * d * q * q;
                    f_t += zd * kd * self.kv.dln_k_dt[i];
                    f_p += zd * kd * self.kv.dln_k_dp[i];
                }
                Sensitivity {
                    dvapour_fraction_dt_per_k: if f_beta < 0.0 { -f_t / f_beta } else { 0.0 },
                    dvapour_fraction_dp_per_pa: if f_beta < 0.0 { -f_p / f_beta } else { 0.0 },
                }
            })
            // At absurd states (pressures near the smallest float) a derivative can overflow:
            // then there is none to give.
            .filter(|s| s.dvapour_fraction_dt_per_k.is_finite() && s.dvapour_fraction_dp_per_pa.is_finite());
        FlashResult {
            phase: state.phase,
            temperature_k: state.t,
            pressure_pa: state.p,
            vapour_fraction: state.beta,
            liquid_fraction: state.liquid_fraction,
            liquid: state.x,
            vapour: state.y,
            k_values: std::mem::take(&mut self.kv.k),
            iterations: self.iterations,
            evaluations: self.evaluations,
            warnings,
            sensitivity,
        }
    }
}
