//! What a flash is asked ([`FlashSpec`]) and what it answers ([`FlashResult`],
//! [`FlashError`]).

use crate::rachford_rice::{Phase, RachfordRiceError};
use crate::units::{Pressure, Temperature};
use crate::warnings::Warning;
use serde::Serialize;

/// Lowest temperature any search visits, K.
pub const SEARCH_MIN_TEMPERATURE_K: f64 = 1.0;
/// Highest temperature any search visits, K.
pub const SEARCH_MAX_TEMPERATURE_K: f64 = 10_000.0;

/// What to hold fixed in a flash.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
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
    /// pressures near the smallest float, and at a three-phase temperature where the state
    /// is not unique at its T and P).
    pub sensitivity: Option<Sensitivity>,
    /// With an immiscible water phase: the phase set, the organic and aqueous amounts and
    /// the aqueous composition. `liquid` is then the organic liquid and `liquid_fraction`
    /// all liquid (organic plus aqueous). `None` without a water phase.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub water_phase: Option<super::water_phase::WaterSplit>,
}

/// An error from a flash, naming the field and value.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
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
    /// The immiscible water phase was asked for where there is no water.
    #[error("water_phase: {why}")]
    NoWater {
        /// Why.
        why: &'static str,
    },
    /// A component that mixes with water in all proportions cannot form a separate organic
    /// liquid beside a water phase.
    #[error(
        "water_phase: '{component}' is miscible with water (library), so it cannot be in the water-immiscible organic liquid; leave out water_phase for this feed"
    )]
    MiscibleWithWater {
        /// The component.
        component: String,
    },
    /// A mutual solubility outside [0, 1).
    #[error("{field}: {value} is refused: {why}")]
    Solubility {
        /// The field, e.g. `water_phase.water_in_organic`.
        field: String,
        /// The value.
        value: f64,
        /// Why.
        why: &'static str,
    },
    /// The water phase was asked for with a model it does not take.
    #[error("water_phase: {detail}")]
    WaterPhaseModel {
        /// What is not supported.
        detail: &'static str,
    },
    /// The mixture has no bubble point: a component with feed in it does not dissolve in
    /// any liquid.
    #[error("no bubble point: '{component}' dissolves in neither liquid, so the mixture never fully condenses")]
    NoBubblePoint {
        /// The component.
        component: String,
    },
    /// A composition-dependent model's outer loop did not settle.
    #[error(
        "{what} at {state}: the composition loop did not converge in {rounds} rounds (no result is given rather than an unsettled one)"
    )]
    NotConverged {
        /// The specification.
        what: &'static str,
        /// The given state and the last compositions tried, e.g. `T = 350 K, P = 101325 Pa`.
        state: String,
        /// Rounds taken.
        rounds: u32,
    },
}

impl FlashError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::equilibrium::FlashError;
    /// assert_eq!(FlashError::NoDewPoint { component: "glycerol".into() }.kind(), "no-dew-point");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            FlashError::Feed(e) => e.kind(),
            FlashError::ComponentCount { .. } => "component-count",
            FlashError::VapourFractionOutOfRange { .. } => "vapour-fraction-out-of-range",
            FlashError::NoDewPoint { .. } => "no-dew-point",
            FlashError::NoSolution { .. } => "no-solution",
            FlashError::NotConverged { .. } => "not-converged",
            FlashError::NoWater { .. } => "no-water",
            FlashError::MiscibleWithWater { .. } => "miscible-with-water",
            FlashError::Solubility { .. } => "solubility-out-of-range",
            FlashError::WaterPhaseModel { .. } => "water-phase-model",
            FlashError::NoBubblePoint { .. } => "no-bubble-point",
        }
    }
}

impl FlashSpec {
    /// The given values, for messages: `T = 350 K, P = 101325 Pa`.
    pub(crate) fn given(&self) -> String {
        match *self {
            FlashSpec::TemperaturePressure { temperature, pressure } => {
                format!("T = {} K, P = {} Pa", temperature.kelvin(), pressure.pascal())
            }
            FlashSpec::BubbleTemperature { pressure } | FlashSpec::DewTemperature { pressure } => {
                format!("P = {} Pa", pressure.pascal())
            }
            FlashSpec::BubblePressure { temperature } | FlashSpec::DewPressure { temperature } => {
                format!("T = {} K", temperature.kelvin())
            }
            FlashSpec::TemperatureVapourFraction {
                temperature,
                vapour_fraction,
            } => format!("T = {} K, vapour fraction {vapour_fraction}", temperature.kelvin()),
            FlashSpec::PressureVapourFraction {
                pressure,
                vapour_fraction,
            } => format!("P = {} Pa, vapour fraction {vapour_fraction}", pressure.pascal()),
        }
    }

    pub(crate) fn name(&self) -> &'static str {
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

/// A vapour fraction outside [0, 1] is refused before anything else.
pub(crate) fn check_vapour_fraction(spec: FlashSpec) -> Result<(), FlashError> {
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
