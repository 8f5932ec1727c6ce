//! An immiscible water phase: water forms a liquid of its own beside the organic liquid,
//! and the flash finds which of the phase sets {vapour}, {vapour, organic}, {vapour,
//! water}, {vapour, organic, water}, {organic, water} (or one liquid alone) is stable.
//!
//! # The model
//! * The organic liquid follows the K-value model (Raoult's law by default):
//!   Kᵢ,organic = Kᵢ.
//! * The aqueous liquid is water with Raoult's law for water in it: K_water,aqueous =
//!   K_water (for Raoult's law, Psat_water/P: the vapour over a water layer holds water at
//!   its vapour pressure, the classical rule of steam distillation).
//! * Mutual solubilities, where the user gives them, are constant mole fractions: organic i
//!   dissolves in water at sᵢ times its mole fraction in the organic liquid, and water in
//!   the organic liquid at s_w times its mole fraction in the water (so
//!   Kᵢ,aqueous = Kᵢ/sᵢ and K_water,organic = K_water/s_w; a pure liquid sets the
//!   saturated solubility). Without them each liquid is pure in its own kind (K = ∞ in
//!   the other liquid). The solubilities do not vary with temperature, so they bring no
//!   heat of solution: both liquids are ideal and their enthalpy is the sum of the
//!   components' liquid enthalpies (common practice).
//!
//! The split at given T and P is the three-phase Rachford–Rice problem of
//! [`three_phase_split`](crate::rachford_rice::three_phase_split) (Michelsen's convex
//! formulation). The other specifications search one variable:
//! * the bubble point and the P–β and T–β flashes hold the vapour's amount at β and find
//!   the temperature (or pressure) where the vapour's mole fractions add up to 1, with the
//!   liquids' amounts from the same minimisation: for water and one insoluble organic this
//!   is the three-phase temperature where the two vapour pressures add up to P, and the
//!   state there is unique at given β even though it is not at given T;
//! * the dew point is the higher of the two liquids' dew points (each where Σ zᵢ/Kᵢ,ₖ = 1),
//!   the water dew point and the organic (hydrocarbon) dew point;
//! * the other liquid's appearance on cooling (the lower dew point) is where that liquid
//!   becomes stable in the split with it held out ([`liquid_appearance_temperature`]).
//!
//! Every search is bracketed and capped, so it terminates; none returns NaN.

use super::flash::SolvedFlash;
use super::kvalue::{KValueModel, KValues};
use super::spec::{
    FlashError, FlashResult, FlashSpec, SEARCH_MAX_TEMPERATURE_K, SEARCH_MIN_TEMPERATURE_K, check_vapour_fraction,
};
use crate::properties::{Component, WaterMiscibility};
use crate::rachford_rice::{Minimum, Phase, PhaseSet, Problem};
use crate::solve::{bracketed_newton, expand_bracket};
use crate::warnings::Warning;
use serde::Serialize;
use std::sync::Arc;

/// CAS number of water.
pub const WATER_CAS: &str = "7732-18-5";

/// K-values are kept within [1e-200, 1e200] in the three-phase split, so that 1/K stays a
/// normal float at extreme temperatures (a change far below anything measurable).
const K_CLAMP: f64 = 1e200;

/// Lowest and highest pressures the pressure searches visit, Pa.
const SEARCH_MIN_PRESSURE_PA: f64 = 1e-6;
const SEARCH_MAX_PRESSURE_PA: f64 = 1e10;

/// Phases in the three-phase split's order.
const V: usize = 0;
const O: usize = 1;
const A: usize = 2;

/// The immiscible water phase: which component is water and the mutual solubilities
/// (zero unless given).
///
/// ```
/// use flashduty::equilibrium::{flash_with_water, FlashSpec, Raoult, WaterPhase};
/// use flashduty::units::Pressure;
/// let model = Raoult::from_names(&["water", "toluene"]).unwrap();
/// let water = WaterPhase::immiscible(model.components()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let r = flash_with_water(&model, &water, &[0.5, 0.5], FlashSpec::BubbleTemperature { pressure: p }).unwrap();
/// // Water and toluene boil together near 84 °C at 1 atm (a handbook azeotrope table,
/// // from memory), far below either boiling point.
/// assert!((r.temperature_k - 357.3).abs() < 1.5);
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct WaterPhase {
    water: usize,
    /// Solubility of each organic in water (mole fraction; water's own entry unused).
    organic_in_water: Vec<f64>,
    /// Solubility of water in the organic liquid (mole fraction).
    water_in_organic: f64,
    /// Components put in the organic liquid that the library says dissolve in water to a
    /// few per cent, or whose miscibility it does not record: warned about.
    doubtful: Vec<Warning>,
    /// Their component indices.
    doubtful_index: Vec<usize>,
}

impl WaterPhase {
    /// The water phase for these components: water is found by its CAS number; every other
    /// component goes in the organic liquid.
    ///
    /// # Errors
    /// [`FlashError::NoWater`] where no component is water;
    /// [`FlashError::MiscibleWithWater`] for a component the library marks as miscible with
    /// water (a lower alcohol, acetone, acetic acid), which cannot form a separate liquid.
    ///
    /// ```
    /// use flashduty::equilibrium::{Raoult, WaterPhase};
    /// let m = Raoult::from_names(&["water", "ethanol"]).unwrap();
    /// let e = WaterPhase::immiscible(m.components()).unwrap_err();
    /// assert_eq!(e.kind(), "miscible-with-water");
    /// ```
    pub fn immiscible(components: &[Arc<Component>]) -> Result<Self, FlashError> {
        let water = components
            .iter()
            .position(|c| c.cas() == WATER_CAS)
            .ok_or(FlashError::NoWater {
                why: "no component is water, so there is no water phase to form",
            })?;
        let (mut doubtful, mut doubtful_index) = (Vec::new(), Vec::new());
        for (i, c) in components.iter().enumerate() {
            if i == water {
                continue;
            }
            match c.water_miscibility() {
                Some(WaterMiscibility::Miscible) => {
                    return Err(FlashError::MiscibleWithWater {
                        component: c.name().to_string(),
                    });
                }
                Some(WaterMiscibility::Immiscible) => {}
                Some(WaterMiscibility::PartiallyMiscible) | None => {
                    doubtful_index.push(i);
                    doubtful.push(Warning::PartlyMiscibleWithWater {
                        component: c.name().to_string(),
                        solubility_mass_percent: c.water_solubility_mass_percent(),
                    });
                }
            }
        }
        Ok(Self {
            water,
            organic_in_water: vec![0.0; components.len()],
            water_in_organic: 0.0,
            doubtful,
            doubtful_index,
        })
    }

    /// Sets the solubility of water in the organic liquid, as a mole fraction in [0, 1).
    ///
    /// # Errors
    /// [`FlashError::Solubility`] outside [0, 1) or not finite.
    ///
    /// ```
    /// use flashduty::equilibrium::{Raoult, WaterPhase};
    /// let m = Raoult::from_names(&["water", "toluene"]).unwrap();
    /// let w = WaterPhase::immiscible(m.components()).unwrap();
    /// assert!(w.clone().with_water_in_organic(2.5e-3).is_ok());
    /// assert_eq!(w.with_water_in_organic(1.5).unwrap_err().kind(), "solubility-out-of-range");
    /// ```
    pub fn with_water_in_organic(mut self, mole_fraction: f64) -> Result<Self, FlashError> {
        self.water_in_organic = check_solubility("water_phase.water_in_organic", mole_fraction)?;
        Ok(self)
    }

    /// Sets the solubility in water of organic component `index`, as a mole fraction in
    /// [0, 1).
    ///
    /// # Errors
    /// [`FlashError::Solubility`] outside [0, 1), not finite, for an index out of range or
    /// for water itself.
    ///
    /// ```
    /// use flashduty::equilibrium::{Raoult, WaterPhase};
    /// let m = Raoult::from_names(&["water", "benzene"]).unwrap();
    /// // CRC Handbook: benzene dissolves in water to about 4.1e-4 mole fraction at 25 °C
    /// // (from memory).
    /// let w = WaterPhase::immiscible(m.components()).unwrap().with_solubility_in_water(1, 4.1e-4).unwrap();
    /// assert_eq!(w.water_index(), 0);
    /// ```
    pub fn with_solubility_in_water(mut self, index: usize, mole_fraction: f64) -> Result<Self, FlashError> {
        let field = format!("water_phase.organic_in_water[{index}]");
        if index >= self.organic_in_water.len() || index == self.water {
            return Err(FlashError::Solubility {
                field,
                value: mole_fraction,
                why: "not an organic component of the feed",
            });
        }
        self.organic_in_water[index] = check_solubility(&field, mole_fraction)?;
        Ok(self)
    }

    /// The index of water among the components.
    pub fn water_index(&self) -> usize {
        self.water
    }

    /// The number of components.
    pub fn component_count(&self) -> usize {
        self.organic_in_water.len()
    }

    /// Each liquid's K-values from the model's: (organic, aqueous, ∂ln K/∂T, ∂ln K/∂P).
    fn liquid_k(&self, kv: &KValues, ko: &mut [f64], ka: &mut [f64]) {
        for (i, &k) in kv.k.iter().enumerate() {
            let k = if k.is_nan() {
                1.0
            } else {
                k.clamp(1.0 / K_CLAMP, K_CLAMP)
            };
            let dissolved = |s: f64| if s > 0.0 { k / s } else { f64::INFINITY };
            if i == self.water {
                ko[i] = dissolved(self.water_in_organic);
                ka[i] = k;
            } else {
                ko[i] = k;
                ka[i] = dissolved(self.organic_in_water[i]);
            }
        }
    }
}

fn check_solubility(field: &str, value: f64) -> Result<f64, FlashError> {
    if value.is_finite() && (0.0..1.0).contains(&value) {
        Ok(value)
    } else {
        Err(FlashError::Solubility {
            field: field.to_string(),
            value,
            why: "a solubility is a mole fraction in [0, 1)",
        })
    }
}

/// The water phase's part of a [`FlashResult`].
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WaterSplit {
    /// The phases present.
    pub phase_set: PhaseSet,
    /// Moles of organic liquid per mole of feed (the result's `liquid_fraction` is all
    /// liquid: organic plus aqueous).
    pub organic_fraction: f64,
    /// Moles of the water phase per mole of feed.
    pub aqueous_fraction: f64,
    /// Mole fractions of the water phase (`None` where there is none; at a dew point where
    /// water condenses first, its incipient composition).
    pub aqueous: Option<Vec<f64>>,
}

/// The water phase's state in a [`SolvedFlash`], beside the lumped liquid composition
/// that the energy layer reads.
#[derive(Debug, Clone, Default)]
pub(crate) struct WaterState {
    /// Whether the state was solved with a water phase.
    pub active: bool,
    pub phase_set: Option<PhaseSet>,
    pub organic_fraction: f64,
    pub aqueous_fraction: f64,
    /// Organic-liquid and aqueous mole fractions (empty until used).
    pub organic: Vec<f64>,
    pub aqueous: Vec<f64>,
    /// Whether the organic (aqueous) composition is one to report (present, or incipient).
    pub has_organic: bool,
    pub has_aqueous: bool,
    /// dvᵢ/dT at constant P (vapour amounts per mole of feed); `dv_dt_known` is false where
    /// the state is not unique at its T and P (the three-phase temperature of water and a
    /// single organic).
    pub dv_dt: Vec<f64>,
    pub dv_dt_known: bool,
    /// dβ/dP at constant T, where known.
    pub dbeta_dp: Option<f64>,
}

/// Runs a flash of feed `z` with the K-value model `model` for the organic liquid and an
/// immiscible water phase.
///
/// Where water's mole fraction in the feed is zero there is no water phase, and the result
/// is [`crate::equilibrium::flash`]'s, to the bit.
///
/// # Errors
/// As [`crate::equilibrium::flash`], and [`FlashError::WaterPhaseModel`] for a
/// composition-dependent K-value model, [`FlashError::NoBubblePoint`] for a bubble point of
/// a feed that has none.
///
/// ```
/// use flashduty::equilibrium::{flash_with_water, FlashSpec, Raoult, WaterPhase};
/// use flashduty::rachford_rice::PhaseSet;
/// use flashduty::units::{Pressure, Temperature};
/// let model = Raoult::from_names(&["water", "n-heptane", "n-decane"]).unwrap();
/// let water = WaterPhase::immiscible(model.components()).unwrap();
/// let spec = FlashSpec::TemperaturePressure {
///     temperature: Temperature::parse("T", "90 degC").unwrap(),
///     pressure: Pressure::parse("P", "1 atm").unwrap(),
/// };
/// let r = flash_with_water(&model, &water, &[0.4, 0.3, 0.3], spec).unwrap();
/// let w = r.water_phase.as_ref().unwrap();
/// assert_eq!(w.phase_set, PhaseSet::VapourOrganicAqueous);
/// // The material balance over three phases.
/// let (x, y, xa) = (r.liquid.as_ref().unwrap(), r.vapour.as_ref().unwrap(), w.aqueous.as_ref().unwrap());
/// for (i, zi) in [0.4, 0.3, 0.3].into_iter().enumerate() {
///     let back = w.organic_fraction * x[i] + w.aqueous_fraction * xa[i] + r.vapour_fraction * y[i];
///     assert!((back - zi).abs() < 1e-14);
/// }
/// ```
pub fn flash_with_water<M: KValueModel + ?Sized>(
    model: &M,
    water: &WaterPhase,
    z: &[f64],
    spec: FlashSpec,
) -> Result<FlashResult, FlashError> {
    check_vapour_fraction(spec)?;
    let n = model.component_count();
    if z.len() != n || water.component_count() != n {
        return Err(FlashError::ComponentCount {
            components: n,
            z: if z.len() != n { z.len() } else { water.component_count() },
        });
    }
    let sum = crate::rachford_rice::validate(z, z)?;
    if z[water.water] == 0.0 {
        // No water, no water phase: the two-phase flash, unchanged to the bit.
        return super::flash::flash(model, z, spec);
    }
    let z: Vec<f64> = z.iter().map(|v| v / sum).collect();
    let mut solved = SolvedFlash::new(n);
    water_flash_into(model, water, &z, spec, &mut solved)?;
    Ok(water_flash_result(model, water, &z, solved))
}

/// The [`FlashResult`] of a state solved by [`water_flash_into`].
pub(crate) fn water_flash_result<M: KValueModel + ?Sized>(
    model: &M,
    water: &WaterPhase,
    z: &[f64],
    solved: SolvedFlash,
) -> FlashResult {
    let state = solved.state;
    let mut warnings = Vec::new();
    model.warnings(state.t, state.p, &mut warnings);
    crate::warnings::drop_for_pure_feed(z, &mut warnings);
    water_warnings(water, z, &mut warnings);
    let w = solved.water;
    let sensitivity = match (w.dv_dt_known, w.dbeta_dp, state.phase == Phase::TwoPhase) {
        (true, Some(dp), true) => Some(super::spec::Sensitivity {
            dvapour_fraction_dt_per_k: w.dv_dt.iter().sum(),
            dvapour_fraction_dp_per_pa: dp,
        }),
        _ => None,
    };
    FlashResult {
        phase: state.phase,
        temperature_k: state.t,
        pressure_pa: state.p,
        vapour_fraction: state.beta,
        liquid_fraction: state.liquid_fraction,
        liquid: w.has_organic.then_some(w.organic),
        vapour: state.has_vapour.then_some(solved.y),
        k_values: solved.kv.k,
        iterations: state.iterations,
        evaluations: state.evaluations,
        warnings,
        sensitivity,
        water_phase: w.phase_set.map(|phase_set| WaterSplit {
            phase_set,
            organic_fraction: w.organic_fraction,
            aqueous_fraction: w.aqueous_fraction,
            aqueous: w.has_aqueous.then_some(w.aqueous),
        }),
    }
}

/// The water phase's own warnings (components of doubtful immiscibility with feed in
/// them), added to every result with a water phase.
pub(crate) fn water_warnings(water: &WaterPhase, z: &[f64], out: &mut Vec<Warning>) {
    for (w, &zi) in water.doubtful.iter().zip(&water.doubtful_index) {
        if z.get(zi).is_some_and(|&v| v > 0.0) && !out.contains(w) {
            out.push(w.clone());
        }
    }
}

/// Checks what a water-phase flash needs of the model; `false` where the feed holds no
/// water (the two-phase flash is then the answer).
fn check_water<M: KValueModel + ?Sized>(model: &M, water: &WaterPhase, z: &[f64]) -> Result<bool, FlashError> {
    if model.is_composition_dependent() {
        return Err(FlashError::WaterPhaseModel {
            detail: "the water phase takes a K-value model that does not depend on composition",
        });
    }
    Ok(z.get(water.water).is_some_and(|&zw| zw > 0.0))
}

/// The working set of one water-phase flash: K-values, each liquid's K and ln-derivatives.
struct Work<'a, M: ?Sized> {
    model: &'a M,
    water: &'a WaterPhase,
    z: &'a [f64],
    kv: KValues,
    ko: Vec<f64>,
    ka: Vec<f64>,
    evaluations: u32,
    iterations: u32,
}

impl<'a, M: KValueModel + ?Sized> Work<'a, M> {
    fn new(model: &'a M, water: &'a WaterPhase, z: &'a [f64]) -> Self {
        let n = z.len();
        Self {
            model,
            water,
            z,
            kv: KValues::new(n),
            ko: vec![0.0; n],
            ka: vec![0.0; n],
            evaluations: 0,
            iterations: 0,
        }
    }

    /// K-values at (T, P).
    fn k_at(&mut self, t: f64, p: f64) {
        self.model.k_values(t, p, &[], &[], &mut self.kv);
        self.water.liquid_k(&self.kv, &mut self.ko, &mut self.ka);
        self.evaluations += 1;
    }

    /// The split at (T, P) with some phase amounts held.
    fn split(&mut self, t: f64, p: f64, fixed: [Option<f64>; 3]) -> Result<(Problem<'a>, Minimum), FlashError> {
        self.k_at(t, p);
        let problem = Problem::new(self.z, &self.ko, &self.ka)?;
        let m = problem.minimise(fixed)?;
        self.iterations += m.iterations;
        Ok((problem, m))
    }

    /// Σ y − 1 at (T, P) with the vapour's amount held at `beta`.
    fn vapour_excess(&mut self, t: f64, p: f64, beta: f64) -> Result<f64, FlashError> {
        let (problem, m) = self.split(t, p, [Some(beta), None, None])?;
        Ok(-problem.gradient(&m)[V])
    }

    /// ln Σ zᵢ/Kᵢ,ₖ of liquid `k` at (T, P) and its derivatives in T and ln P (`None`: no
    /// component can be in that liquid).
    fn dew_sum(&mut self, t: f64, p: f64, k: usize) -> Option<(f64, f64, f64)> {
        self.k_at(t, p);
        let ks = if k == O { &self.ko } else { &self.ka };
        let (mut s, mut st, mut sp) = (0.0, 0.0, 0.0);
        for (i, &zi) in self.z.iter().enumerate() {
            if zi > 0.0 && ks[i].is_finite() {
                let term = zi / ks[i];
                s += term;
                st -= term * self.kv.dln_k_dt[i];
                sp -= term * self.kv.dln_k_dp[i] * p;
            }
        }
        (s > 0.0).then(|| (s.ln(), st / s, sp / s))
    }

    /// The temperature bracket to start from at pressure `p`.
    fn t_hint(&self, p: f64) -> (f64, f64) {
        let (lo, hi) = self.model.temperature_hint(p).unwrap_or((250.0, 450.0));
        let lo = if lo.is_finite() { lo } else { 250.0 };
        let hi = if hi.is_finite() && hi > lo { hi } else { lo + 100.0 };
        (lo, hi)
    }

    /// The temperature at `p` where `f` (increasing in T) is zero.
    fn search_t(
        &mut self,
        p: f64,
        what: &'static str,
        mut f: impl FnMut(&mut Self, f64) -> Result<(f64, f64), FlashError>,
    ) -> Result<f64, FlashError> {
        let (lo, hi) = self.t_hint(p);
        let mut failure = None;
        let mut eval = |s: &mut Self, t: f64| match f(s, t) {
            Ok(v) => v,
            Err(e) => {
                failure.get_or_insert(e);
                (f64::NAN, f64::NAN)
            }
        };
        let bracket = expand_bracket(
            |t| eval(self, t).0,
            lo,
            hi,
            SEARCH_MIN_TEMPERATURE_K,
            SEARCH_MAX_TEMPERATURE_K,
        );
        let Some(bracket) = bracket else {
            return Err(failure.unwrap_or(FlashError::NoSolution {
                what,
                detail: "no solution between 1 K and 10 000 K".to_string(),
            }));
        };
        let root = bracketed_newton(|t| eval(self, t), bracket.lo, bracket.hi, bracket.secant(), 1e-11);
        self.iterations += root.iterations;
        match failure {
            Some(e) => Err(e),
            None => Ok(root.x),
        }
    }

    /// The pressure where `f` (increasing in ln P) is zero.
    fn search_p(
        &mut self,
        what: &'static str,
        mut f: impl FnMut(&mut Self, f64) -> Result<(f64, f64), FlashError>,
    ) -> Result<f64, FlashError> {
        let mut failure = None;
        let mut eval = |s: &mut Self, l: f64| match f(s, l.exp()) {
            Ok(v) => v,
            Err(e) => {
                failure.get_or_insert(e);
                (f64::NAN, f64::NAN)
            }
        };
        let bracket = expand_bracket(
            |l| eval(self, l).0,
            1e4f64.ln(),
            1e6f64.ln(),
            SEARCH_MIN_PRESSURE_PA.ln(),
            SEARCH_MAX_PRESSURE_PA.ln(),
        );
        let Some(bracket) = bracket else {
            return Err(failure.unwrap_or(FlashError::NoSolution {
                what,
                detail: "no solution between 1e-6 Pa and 1e10 Pa".to_string(),
            }));
        };
        let root = bracketed_newton(|l| eval(self, l), bracket.lo, bracket.hi, bracket.secant(), 1e-14);
        self.iterations += root.iterations;
        match failure {
            Some(e) => Err(e),
            None => Ok(root.x.exp()),
        }
    }

    /// The dew temperature at `p`: the higher of the liquids' dew points. Also returns the
    /// liquid that forms first.
    fn dew_t(&mut self, p: f64) -> Result<(f64, usize), FlashError> {
        let mut best: Option<(f64, usize)> = None;
        for k in [O, A] {
            if self.dew_sum(300.0, p, k).is_none() {
                continue;
            }
            let t = self.search_t(p, "dew temperature", |s, t| {
                let (l, lt, _) = s.dew_sum(t, p, k).unwrap_or((0.0, 0.0, 0.0));
                Ok((-l, -lt))
            })?;
            if best.is_none_or(|(b, _)| t > b) {
                best = Some((t, k));
            }
        }
        best.ok_or(FlashError::NoSolution {
            what: "dew temperature",
            detail: "no component can condense".to_string(),
        })
    }

    /// The dew pressure at `t`: the lower of the liquids' dew pressures.
    fn dew_p(&mut self, t: f64) -> Result<(f64, usize), FlashError> {
        let mut best: Option<(f64, usize)> = None;
        for k in [O, A] {
            if self.dew_sum(t, 1e5, k).is_none() {
                continue;
            }
            let p = self.search_p("dew pressure", |s, p| {
                let (l, _, lp) = s.dew_sum(t, p, k).unwrap_or((0.0, 0.0, 0.0));
                Ok((l, lp))
            })?;
            if best.is_none_or(|(b, _)| p < b) {
                best = Some((p, k));
            }
        }
        best.ok_or(FlashError::NoSolution {
            what: "dew pressure",
            detail: "no component can condense".to_string(),
        })
    }

    /// Writes the state at (T, P) with the given phase amounts held into `out`, with
    /// dvᵢ/dT where `slopes`.
    fn write(
        &mut self,
        t: f64,
        p: f64,
        fixed: [Option<f64>; 3],
        incipient: Option<usize>,
        out: &mut SolvedFlash,
    ) -> Result<(), FlashError> {
        let (problem, m) = self.split(t, p, fixed)?;
        let s = problem.split(&m);
        let n = self.z.len();
        let w = &mut out.water;
        w.active = true;
        w.organic.resize(n, 0.0);
        w.aqueous.resize(n, 0.0);
        w.dv_dt.resize(n, 0.0);
        // Round-off can put an amount a unit in the last place above 1.
        let b = m.beta.map(|v| v.clamp(0.0, 1.0));
        w.phase_set = Some(s.phase_set);
        w.organic_fraction = b[O];
        w.aqueous_fraction = b[A];
        problem.composition(&m, O, &mut w.organic);
        problem.composition(&m, A, &mut w.aqueous);
        problem.composition(&m, V, &mut out.y);
        w.has_organic = b[O] > 0.0 || incipient == Some(O);
        w.has_aqueous = b[A] > 0.0 || incipient == Some(A);
        let has_vapour = b[V] > 0.0 || incipient == Some(V);
        let liquid = (b[O] + b[A]).min(1.0);
        for i in 0..n {
            out.x[i] = if liquid > 0.0 {
                (b[O] * w.organic[i] + b[A] * w.aqueous[i]) / liquid
            } else {
                0.0
            };
        }
        if liquid == 0.0 {
            // A dew point: the incipient liquid's composition.
            let src = if incipient == Some(A) { &w.aqueous } else { &w.organic };
            out.x.copy_from_slice(src);
        }
        // Temperature and pressure derivatives at constant P (T) of the split, all phases
        // free: the slopes of the T–P flash at this state.
        let dln_t: Vec<[f64; 3]> = (0..n)
            .map(|i| [0.0, -self.kv.dln_k_dt[i], -self.kv.dln_k_dt[i]])
            .collect();
        let dln_p: Vec<[f64; 3]> = (0..n)
            .map(|i| [0.0, -self.kv.dln_k_dp[i], -self.kv.dln_k_dp[i]])
            .collect();
        match problem.amount_derivatives(&m, &dln_t, false) {
            Some(db) => {
                problem.vapour_amount_derivatives(&m, &dln_t, &db, &mut w.dv_dt);
                w.dv_dt_known = true;
            }
            None => w.dv_dt_known = false,
        }
        w.dbeta_dp = problem.amount_derivatives(&m, &dln_p, false).map(|d| d[V]);
        let phase = match (b[V] > 0.0, liquid > 0.0) {
            (true, true) => Phase::TwoPhase,
            (true, false) => Phase::Vapour,
            _ => Phase::Liquid,
        };
        out.kv.clone_from(&self.kv);
        out.state.t = t;
        out.state.p = p;
        out.state.phase = phase;
        out.state.beta = b[V];
        out.state.liquid_fraction = liquid;
        out.state.has_liquid = liquid > 0.0 || incipient.is_some_and(|k| k != V);
        out.state.has_vapour = has_vapour;
        out.state.iterations = self.iterations;
        out.state.evaluations = self.evaluations;
        Ok(())
    }
}

/// The water-phase flash of `spec` into `out` (z normalised, sizes checked by the caller).
pub(crate) fn water_flash_into<M: KValueModel + ?Sized>(
    model: &M,
    water: &WaterPhase,
    z: &[f64],
    spec: FlashSpec,
    out: &mut SolvedFlash,
) -> Result<(), FlashError> {
    check_vapour_fraction(spec)?;
    if !check_water(model, water, z)? {
        out.water.active = false;
        return super::flash::flash_into(model, z, spec, None, out);
    }
    let mut w = Work::new(model, water, z);
    match spec {
        FlashSpec::TemperaturePressure { temperature, pressure } => {
            w.write(temperature.kelvin(), pressure.pascal(), [None; 3], None, out)
        }
        FlashSpec::BubbleTemperature { pressure } => {
            held_vapour_fraction(&mut w, Held::Pressure(pressure.pascal()), 0.0, out)
        }
        FlashSpec::DewTemperature { pressure } => {
            held_vapour_fraction(&mut w, Held::Pressure(pressure.pascal()), 1.0, out)
        }
        FlashSpec::PressureVapourFraction {
            pressure,
            vapour_fraction,
        } => held_vapour_fraction(&mut w, Held::Pressure(pressure.pascal()), vapour_fraction, out),
        FlashSpec::BubblePressure { temperature } => {
            held_vapour_fraction(&mut w, Held::Temperature(temperature.kelvin()), 0.0, out)
        }
        FlashSpec::DewPressure { temperature } => {
            held_vapour_fraction(&mut w, Held::Temperature(temperature.kelvin()), 1.0, out)
        }
        FlashSpec::TemperatureVapourFraction {
            temperature,
            vapour_fraction,
        } => held_vapour_fraction(&mut w, Held::Temperature(temperature.kelvin()), vapour_fraction, out),
    }
}

/// A feed all of whose components stay out of both liquids has no bubble point.
fn no_bubble_point(w: &Work<'_, impl KValueModel + ?Sized>) -> Option<FlashError> {
    let n = w.z.len();
    let mut kv = KValues::new(n);
    w.model.k_values(300.0, 1e5, &[], &[], &mut kv);
    let (mut ko, mut ka) = (vec![0.0; n], vec![0.0; n]);
    w.water.liquid_k(&kv, &mut ko, &mut ka);
    (0..n)
        .find(|&i| w.z[i] > 0.0 && ko[i].is_infinite() && ka[i].is_infinite())
        .map(|i| FlashError::NoBubblePoint {
            component: w.model.component_name(i),
        })
}

/// What a vapour-fraction specification holds: the pressure (T is found) or the
/// temperature (P is found).
#[derive(Debug, Clone, Copy)]
enum Held {
    Pressure(f64),
    Temperature(f64),
}

/// The state at the held pressure or temperature with vapour fraction `beta`: the dew point
/// at 1, the bubble point at 0, else the search on the other variable.
fn held_vapour_fraction<M: KValueModel + ?Sized>(
    w: &mut Work<'_, M>,
    held: Held,
    beta: f64,
    out: &mut SolvedFlash,
) -> Result<(), FlashError> {
    if beta == 1.0 {
        let (t, p, k) = match held {
            Held::Pressure(p) => {
                let (t, k) = w.dew_t(p)?;
                (t, p, k)
            }
            Held::Temperature(t) => {
                let (p, k) = w.dew_p(t)?;
                (t, p, k)
            }
        };
        return w.write(t, p, [Some(1.0), Some(0.0), Some(0.0)], Some(k), out);
    }
    if beta == 0.0
        && let Some(e) = no_bubble_point(w)
    {
        return Err(e);
    }
    let (t, p) = match held {
        Held::Pressure(p) => {
            let what = if beta == 0.0 {
                "bubble temperature"
            } else {
                "P-vapour fraction flash"
            };
            let t = w.search_t(p, what, |s, t| Ok((s.vapour_excess(t, p, beta)?, f64::NAN)))?;
            (t, p)
        }
        Held::Temperature(t) => {
            let what = if beta == 0.0 {
                "bubble pressure"
            } else {
                "T-vapour fraction flash"
            };
            let p = w.search_p(what, |s, p| Ok((-s.vapour_excess(t, p, beta)?, f64::NAN)))?;
            (t, p)
        }
    };
    w.write(t, p, [Some(beta), None, None], (beta == 0.0).then_some(V), out)
}

/// Which liquid: the organic or the aqueous.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Liquid {
    Organic,
    Aqueous,
}

impl Liquid {
    fn index(self) -> usize {
        match self {
            Liquid::Organic => O,
            Liquid::Aqueous => A,
        }
    }
}

/// The temperature between `lo` and `hi` at pressure `p` where `liquid` appears on
/// cooling (becomes stable in the split with it held out), and the state there with that
/// liquid incipient, written into `out`. `None` where it does not appear in the range.
pub(crate) fn liquid_appearance_temperature<M: KValueModel + ?Sized>(
    model: &M,
    water: &WaterPhase,
    z: &[f64],
    p: f64,
    liquid: Liquid,
    (lo, hi): (f64, f64),
    out: &mut SolvedFlash,
) -> Result<Option<f64>, FlashError> {
    if !check_water(model, water, z)? {
        return Ok(None);
    }
    let mut w = Work::new(model, water, z);
    let k = liquid.index();
    let mut fixed = [None; 3];
    fixed[k] = Some(0.0);
    let g = |w: &mut Work<'_, M>, t: f64| -> Result<f64, FlashError> {
        let (problem, m) = w.split(t, p, fixed)?;
        Ok(problem.gradient(&m)[k])
    };
    let (g_lo, g_hi) = (g(&mut w, lo)?, g(&mut w, hi)?);
    if !(g_lo <= 0.0 && g_hi >= 0.0) {
        return Ok(None);
    }
    let mut failure = None;
    let root = bracketed_newton(
        |t| match g(&mut w, t) {
            Ok(v) => (v, f64::NAN),
            Err(e) => {
                failure.get_or_insert(e);
                (0.0, f64::NAN)
            }
        },
        lo,
        hi,
        0.5 * (lo + hi),
        1e-11,
    );
    if let Some(e) = failure {
        return Err(e);
    }
    w.write(root.x, p, fixed, Some(k), out)?;
    Ok(Some(root.x))
}
