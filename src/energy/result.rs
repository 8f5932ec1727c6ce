//! What the energy layer answers: [`DutyResult`] with its enthalpy table and path spread,
//! [`Curve`], and [`EnergyError`].

use super::options::DutyOptions;
use crate::equilibrium::{FlashError, FlashResult};
use crate::library::UnknownComponent;
use crate::rachford_rice::{Phase, RachfordRiceError};
use crate::units::UnitError;
use crate::warnings::Warning;
use serde::Serialize;

/// An error from the energy layer, naming the field and value.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum EnergyError {
    /// A flash failed.
    #[error(transparent)]
    Flash(#[from] FlashError),
    /// A quantity was refused.
    #[error(transparent)]
    Unit(#[from] UnitError),
    /// A component name was not found.
    #[error(transparent)]
    UnknownComponent(#[from] UnknownComponent),
    /// Component flows that cannot be normalised (a negative or non-finite flow, or all zero).
    #[error("flows[{index}]: {value} is not a usable component flow ({why})")]
    BadFlow {
        /// Zero-based component index.
        index: usize,
        /// The value.
        value: f64,
        /// Why.
        why: &'static str,
    },
    /// The number of curve points asked for is below two.
    #[error("points: {value} is too few (at least 2)")]
    TooFewPoints {
        /// The value.
        value: usize,
    },
    /// No temperature between 1 K and 10 000 K gives the required enthalpy.
    #[error("duty: {duty_w:.6e} W cannot be reached at the outlet pressure between 1 K and 10000 K")]
    DutyOutOfReach {
        /// The duty asked for, W.
        duty_w: f64,
    },
}

impl EnergyError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::energy::EnergyError;
    /// assert_eq!(EnergyError::TooFewPoints { value: 1 }.kind(), "too-few-points");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            EnergyError::Flash(e) => e.kind(),
            EnergyError::Unit(e) => e.kind(),
            EnergyError::UnknownComponent(e) => e.kind(),
            EnergyError::BadFlow { .. } => "bad-flow",
            EnergyError::TooFewPoints { .. } => "too-few-points",
            EnergyError::DutyOutOfReach { .. } => "duty-out-of-reach",
        }
    }
}

impl From<RachfordRiceError> for EnergyError {
    fn from(e: RachfordRiceError) -> Self {
        EnergyError::Flash(FlashError::Feed(e))
    }
}

/// One line of the enthalpy table: one component in one phase of one state.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EnthalpyRow {
    /// `"inlet"` or `"outlet"`.
    pub state: &'static str,
    /// The component.
    pub component: String,
    /// `Liquid` or `Vapour`.
    pub phase: Phase,
    /// Flow of the component in this phase, mol/s.
    pub flow_mol_s: f64,
    /// Molar enthalpy relative to the reference state, J/mol.
    pub enthalpy_j_per_mol: f64,
    /// Its liquid sensible part, J/mol.
    pub liquid_sensible_j_per_mol: f64,
    /// Its latent part, J/mol.
    pub latent_j_per_mol: f64,
    /// Its vapour sensible part (ideal gas), J/mol.
    pub vapour_sensible_j_per_mol: f64,
    /// Its departure from the ideal gas, J/mol (see
    /// [`EnthalpySplit::vapour_departure_j_per_mol`](super::EnthalpySplit::vapour_departure_j_per_mol)); zero under [`VapourModel::IdealGas`](super::VapourModel::IdealGas).
    pub vapour_departure_j_per_mol: f64,
    /// What the phase-enthalpy model adds to the ideal-mixing enthalpy here (the
    /// component's partial molar enthalpy in its phase less the pure component's: an
    /// excess enthalpy or an enthalpy of solution), J/mol; zero under ideal mixing
    /// ([`EnthalpyModel`](super::EnthalpyModel)).
    pub excess_j_per_mol: f64,
    /// flow × enthalpy, W.
    pub enthalpy_flow_w: f64,
}

impl EnthalpyRow {
    /// +1 for an outlet row, −1 for an inlet row: the duty is Σ sign × enthalpy flow.
    pub fn sign(&self) -> f64 {
        if self.state == "outlet" { 1.0 } else { -1.0 }
    }
}

/// The duty of the same change of state along each vaporisation path: they agree only
/// when the liquid Cp, vapour Cp and latent-heat data agree.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PathSpread {
    /// Duty along (a) the normal boiling point, W.
    pub boiling_point_w: f64,
    /// Duty along (b) the stream temperature, W.
    pub stream_temperature_w: f64,
    /// Duty along (c) the reference temperature, W.
    pub reference_temperature_w: f64,
    /// Largest minus smallest, W.
    pub spread_w: f64,
    /// The spread relative to the largest |duty| (0 when every duty is 0).
    pub relative: f64,
}

/// A heater, vaporiser or condenser duty with everything needed to check it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DutyResult {
    /// Heat into the stream, W (negative: heat removed).
    pub duty_w: f64,
    /// Total molar flow, mol/s.
    pub flow_mol_s: f64,
    /// The inlet state and phase split.
    pub inlet: FlashResult,
    /// The outlet state and phase split.
    pub outlet: FlashResult,
    /// Inlet molar enthalpy, J/mol of stream.
    pub inlet_enthalpy_j_per_mol: f64,
    /// Outlet molar enthalpy, J/mol of stream.
    pub outlet_enthalpy_j_per_mol: f64,
    /// The enthalpy table: every component in every phase present, inlet then outlet.
    pub table: Vec<EnthalpyRow>,
    /// dQ/dT at the outlet, at the outlet pressure, W/K (analytic; the outlet-temperature
    /// sensitivity of the duty). `None` unless the outlet was given by T and P (or found
    /// by the duty-specified flash), and `None` where the duty rises at constant
    /// temperature there (a two-phase pure component or azeotrope, a three-phase
    /// temperature).
    pub dduty_dt_out_w_per_k: Option<f64>,
    /// The same duty along each vaporisation path.
    pub path_spread: PathSpread,
    /// The reference state, path and vapour model used.
    pub options: DutyOptions,
    /// Warnings from the flashes and the enthalpy correlations.
    pub warnings: Vec<Warning>,
}

/// One point of a heating or cooling curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CurvePoint {
    /// Temperature, K.
    #[serde(rename = "T_K")]
    pub temperature_k: f64,
    /// Cumulative duty from the inlet, W.
    #[serde(rename = "duty_W")]
    pub duty_w: f64,
    /// Vapour fraction.
    pub vapour_fraction: f64,
    /// `"bubble"` or `"dew"` at a breakpoint (with a water phase, `"bubble"`,
    /// `"water-dew"` and `"organic-dew"`: where each liquid appears on cooling), else empty.
    #[serde(skip_serializing_if = "str::is_empty")]
    pub breakpoint: &'static str,
}

/// A heating or cooling curve: duty against temperature and vapour fraction.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Curve {
    /// Points from inlet to outlet, the bubble and dew points among them where crossed.
    pub points: Vec<CurvePoint>,
    /// Bubble temperature at the curve's pressure, K.
    #[serde(rename = "bubble_T_K")]
    pub bubble_temperature_k: f64,
    /// Dew temperature at the curve's pressure, K (`None`: no dew point).
    #[serde(rename = "dew_T_K")]
    pub dew_temperature_k: Option<f64>,
    /// With a water phase: where the water phase appears on cooling, K (the water dew
    /// point; `None` without a water phase, or where it does not form).
    #[serde(rename = "water_dew_T_K", skip_serializing_if = "Option::is_none")]
    pub water_dew_temperature_k: Option<f64>,
    /// With a water phase: where the organic liquid appears on cooling, K (the hydrocarbon
    /// dew point).
    #[serde(rename = "organic_dew_T_K", skip_serializing_if = "Option::is_none")]
    pub organic_dew_temperature_k: Option<f64>,
    /// The pressure of every point, Pa (the outlet pressure).
    #[serde(rename = "P_Pa")]
    pub pressure_pa: f64,
    /// Total duty, W.
    #[serde(rename = "duty_W")]
    pub duty_w: f64,
    /// Warnings met along the curve.
    pub warnings: Vec<Warning>,
}
