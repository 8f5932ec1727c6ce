//! Energy: enthalpy against a chosen reference state, heater duty with its enthalpy
//! table, the duty-specified flash, and heating and cooling curves.
//!
//! Enthalpies are those of an ideal liquid and, by default, an ideal-gas vapour: pressure
//! does not enter them, and mixing is ideal (a phase's molar enthalpy is the
//! mole-fraction-weighted sum of the pure-component enthalpies). The phase split comes from
//! Raoult's law. [`VapourModel::SecondVirial`], chosen in [`DutyOptions::vapour_model`],
//! adds each component's real-gas residual enthalpy from the second virial coefficient,
//! kept consistent with the library's (real) latent heats.
//!
//! Positive duty is heat into the stream (a heater or vaporiser); negative is heat out of
//! it (a cooler or condenser).
//!
//! [`heater_duty`], [`outlet_for_duty`], [`heating_curve`] and [`path_spread`] return
//! everything needed to check a result (the enthalpy table, the duty along every
//! vaporisation path, warnings). Plant software that needs many duties of one stream uses
//! [`DutyCalculator`]: built once, it gives the same duties and states without allocating,
//! and without that audit trail.
//!
//! ```
//! use flashduty::energy::{heater_duty, DutyOptions, Stream, StreamState};
//! use flashduty::units::{MolarFlow, Pressure, Temperature};
//! // Invented: 10 mol/s of an equimolar benzene–toluene feed heated from 25 °C to 150 °C at 1 atm.
//! let stream = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5],
//!     MolarFlow::parse("flow", "10 mol/s").unwrap()).unwrap();
//! let p = Pressure::parse("P", "1 atm").unwrap();
//! let inlet = StreamState::TemperaturePressure { temperature: Temperature::parse("T", "25 degC").unwrap(), pressure: p };
//! let outlet = StreamState::TemperaturePressure { temperature: Temperature::parse("T", "150 degC").unwrap(), pressure: p };
//! let r = heater_duty(&stream, inlet, outlet, DutyOptions::default()).unwrap();
//! assert!(r.duty_w > 0.0);
//! // The enthalpy table adds up to the duty.
//! let table: f64 = r.table.iter().map(|row| row.sign() * row.enthalpy_flow_w).sum();
//! assert!((table - r.duty_w).abs() < 1e-6 * r.duty_w);
//! ```

mod calc;
mod duty_calculator;
mod enthalpy;

pub use duty_calculator::{DutyCalculator, DutySummary, StateSummary};
pub use enthalpy::{EnthalpyModel, EnthalpySplit, ReferencePhase, ReferenceState, VaporisationPath, VapourModel};

use crate::equilibrium::{FlashError, FlashResult, FlashSpec};
use crate::library::{Library, UnknownComponent};
use crate::properties::Component;
use crate::rachford_rice::{Phase, RachfordRiceError};
use crate::units::{MassFlow, MolarFlow, Power, Pressure, Temperature, UnitError};
use crate::warnings::Warning;
use calc::{Calc, Solved};
use serde::Serialize;
use std::sync::Arc;

/// An error from the energy layer, naming the field and value.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
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

/// A process stream: components, overall mole fractions and total molar flow.
///
/// ```
/// use flashduty::energy::Stream;
/// use flashduty::units::MolarFlow;
/// // Component flows are normalised to mole fractions.
/// let s = Stream::from_component_flows_names(&["methanol", "water"], &[3.0, 1.0]).unwrap();
/// assert_eq!(s.z(), &[0.75, 0.25]);
/// assert_eq!(s.flow().mol_per_s(), 4.0);
/// ```
#[derive(Debug, Clone)]
pub struct Stream {
    components: Vec<Arc<Component>>,
    z: Vec<f64>,
    flow: MolarFlow,
}

impl Stream {
    /// A stream of `components` with mole fractions `z` (summing to 1 within 1e-6; then
    /// normalised) and total molar flow `flow`.
    ///
    /// # Errors
    /// [`EnergyError::Flash`] wrapping the feed error when z is refused or its length does
    /// not match.
    pub fn new(components: Vec<Arc<Component>>, z: &[f64], flow: MolarFlow) -> Result<Self, EnergyError> {
        if z.len() != components.len() {
            return Err(FlashError::ComponentCount {
                components: components.len(),
                z: z.len(),
            }
            .into());
        }
        let sum = crate::rachford_rice::validate(z, z).map_err(FlashError::from)?;
        Ok(Self {
            components,
            z: z.iter().map(|v| v / sum).collect(),
            flow,
        })
    }

    /// [`Stream::new`] with built-in components looked up by name.
    ///
    /// # Errors
    /// [`EnergyError::UnknownComponent`], or as [`Stream::new`].
    pub fn from_names<S: AsRef<str>>(names: &[S], z: &[f64], flow: MolarFlow) -> Result<Self, EnergyError> {
        Self::new(Library::builtin().get_all(names)?, z, flow)
    }

    /// A stream from component molar flows in mol/s, normalised to mole fractions.
    ///
    /// # Errors
    /// [`EnergyError::BadFlow`] for a negative or non-finite flow, or all flows zero.
    pub fn from_component_flows(components: Vec<Arc<Component>>, flows_mol_per_s: &[f64]) -> Result<Self, EnergyError> {
        if flows_mol_per_s.len() != components.len() {
            return Err(FlashError::ComponentCount {
                components: components.len(),
                z: flows_mol_per_s.len(),
            }
            .into());
        }
        let mut total = 0.0;
        for (index, &f) in flows_mol_per_s.iter().enumerate() {
            if !f.is_finite() || f < 0.0 {
                return Err(EnergyError::BadFlow {
                    index,
                    value: f,
                    why: "must be finite and not negative",
                });
            }
            total += f;
        }
        if total <= 0.0 {
            return Err(EnergyError::BadFlow {
                index: 0,
                value: total,
                why: "the flows add up to zero",
            });
        }
        let z: Vec<f64> = flows_mol_per_s.iter().map(|f| f / total).collect();
        Ok(Self {
            components,
            z,
            flow: MolarFlow::new("flow", total)?,
        })
    }

    /// [`Stream::from_component_flows`] with built-in components looked up by name.
    ///
    /// # Errors
    /// As [`Stream::from_component_flows`], or [`EnergyError::UnknownComponent`].
    pub fn from_component_flows_names<S: AsRef<str>>(
        names: &[S],
        flows_mol_per_s: &[f64],
    ) -> Result<Self, EnergyError> {
        Self::from_component_flows(Library::builtin().get_all(names)?, flows_mol_per_s)
    }

    /// Replaces the flow by a total mass flow, converted with the stream's molar mass.
    ///
    /// # Errors
    /// [`EnergyError::Unit`] if the conversion is refused.
    pub fn with_mass_flow(mut self, mass_flow: MassFlow) -> Result<Self, EnergyError> {
        self.flow = mass_flow.to_molar(self.molar_mass_kg_per_mol())?;
        Ok(self)
    }

    /// The stream's mean molar mass, kg/mol.
    pub fn molar_mass_kg_per_mol(&self) -> f64 {
        self.components
            .iter()
            .zip(&self.z)
            .map(|(c, z)| z * c.molar_mass_g_per_mol() * 1e-3)
            .sum()
    }

    /// The components.
    pub fn components(&self) -> &[Arc<Component>] {
        &self.components
    }

    /// Overall mole fractions.
    pub fn z(&self) -> &[f64] {
        &self.z
    }

    /// Total molar flow.
    pub fn flow(&self) -> MolarFlow {
        self.flow
    }
}

/// The state of a stream at a heater's inlet or outlet.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StreamState {
    /// Temperature and pressure.
    TemperaturePressure {
        /// Temperature.
        temperature: Temperature,
        /// Pressure.
        pressure: Pressure,
    },
    /// Pressure and vapour fraction (0: saturated liquid, 1: saturated vapour).
    PressureVapourFraction {
        /// Pressure.
        pressure: Pressure,
        /// Vapour fraction in [0, 1].
        vapour_fraction: f64,
    },
    /// Temperature and vapour fraction.
    TemperatureVapourFraction {
        /// Temperature.
        temperature: Temperature,
        /// Vapour fraction in [0, 1].
        vapour_fraction: f64,
    },
}

impl StreamState {
    fn is_temperature_pressure(self) -> bool {
        matches!(self, StreamState::TemperaturePressure { .. })
    }

    fn spec(self) -> FlashSpec {
        match self {
            StreamState::TemperaturePressure { temperature, pressure } => {
                FlashSpec::TemperaturePressure { temperature, pressure }
            }
            StreamState::PressureVapourFraction {
                pressure,
                vapour_fraction,
            } => FlashSpec::PressureVapourFraction {
                pressure,
                vapour_fraction,
            },
            StreamState::TemperatureVapourFraction {
                temperature,
                vapour_fraction,
            } => FlashSpec::TemperatureVapourFraction {
                temperature,
                vapour_fraction,
            },
        }
    }
}

/// Options for the energy calculations.
///
/// ```
/// use flashduty::energy::{DutyOptions, VaporisationPath, VapourModel};
/// let o = DutyOptions { vapour_model: VapourModel::SecondVirial, ..DutyOptions::default() };
/// assert_eq!(o.path, VaporisationPath::BoilingPoint);
/// let json = serde_json::to_value(o).unwrap();
/// assert_eq!(json["vapour_model"], "second-virial");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct DutyOptions {
    /// The reference state (default: liquid at 298.15 K).
    pub reference: ReferenceState,
    /// The vaporisation path (default: via the normal boiling point).
    pub path: VaporisationPath,
    /// How the vapour's enthalpy depends on pressure (default: the ideal gas, where it does
    /// not).
    pub vapour_model: VapourModel,
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
    /// [`EnthalpySplit::vapour_departure_j_per_mol`]); zero under [`VapourModel::IdealGas`].
    pub vapour_departure_j_per_mol: f64,
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
    /// sensitivity of the duty). `None` unless the outlet was given by T and P.
    pub dduty_dt_out_w_per_k: Option<f64>,
    /// The same duty along each vaporisation path.
    pub path_spread: PathSpread,
    /// The reference state, path and vapour model used.
    pub options: DutyOptions,
    /// Warnings from the flashes and the enthalpy correlations.
    pub warnings: Vec<Warning>,
}

/// The duty to take `stream` from `inlet` to `outlet`, with both phase splits and the
/// enthalpy table.
///
/// For many duties of one stream in a loop, [`DutyCalculator`] gives the same numbers
/// without the table, path spread and warnings, at a fraction of the cost.
///
/// # Errors
/// [`EnergyError::Flash`] when either state cannot be flashed (a vapour fraction outside
/// [0, 1], no dew point, ...); [`EnergyError::Unit`] for a reference temperature that is not
/// finite and positive, or a state temperature outside 1 to 10 000 K (the range over which
/// the energy calculations work; the correlations can overflow beyond it).
///
/// ```
/// use flashduty::energy::{heater_duty, DutyOptions, Stream, StreamState};
/// use flashduty::units::{MolarFlow, Pressure};
/// // Invented: vaporise 1 mol/s of n-hexane at 1 atm from saturated liquid to saturated vapour.
/// let s = Stream::from_names(&["n-hexane"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let r = heater_duty(&s,
///     StreamState::PressureVapourFraction { pressure: p, vapour_fraction: 0.0 },
///     StreamState::PressureVapourFraction { pressure: p, vapour_fraction: 1.0 },
///     DutyOptions::default()).unwrap();
/// // n-hexane ΔHvap at Tb ≈ 28.85 kJ/mol (CRC Handbook, from memory).
/// assert!((r.duty_w / 28_850.0 - 1.0).abs() < 0.03);
/// ```
pub fn heater_duty(
    stream: &Stream,
    inlet: StreamState,
    outlet: StreamState,
    options: DutyOptions,
) -> Result<DutyResult, EnergyError> {
    let (calc, mut inlet_s, mut outlet_s) = Calc::with_states(stream, options)?;
    calc.flash_state("inlet", inlet, &mut inlet_s)?;
    calc.flash_state("outlet", outlet, &mut outlet_s)?;
    Ok(calc.result(inlet_s, outlet_s, outlet.is_temperature_pressure()))
}

/// The duty-specified flash: the outlet state at `outlet_pressure` after `duty` is added
/// to `stream` at `inlet` (zero duty: the adiabatic flash).
///
/// Below the bubble point and above the dew point it solves for temperature; between them
/// it solves on the vapour fraction (Brent's method from the `roots` crate, with bisection
/// as a fallback), so pure components and narrow-boiling mixtures, whose temperature is
/// flat across the two-phase region, are handled. It always terminates.
///
/// Each step of the temperature search is one K-value evaluation and one Rachford–Rice
/// solve in reused buffers, with dH/dT from the same K-values; the full result is built
/// once, at the end. [`DutyCalculator::outlet_for_duty`] runs the same search without it.
///
/// # Errors
/// [`EnergyError::Flash`] and [`EnergyError::Unit`] as [`heater_duty`];
/// [`EnergyError::DutyOutOfReach`] when no temperature between 1 K and 10 000 K gives the
/// enthalpy.
///
/// ```
/// use flashduty::energy::{heater_duty, outlet_for_duty, DutyOptions, Stream, StreamState};
/// use flashduty::units::{MolarFlow, Power, Pressure, Temperature};
/// let s = Stream::from_names(&["water"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let inlet = StreamState::TemperaturePressure { temperature: Temperature::parse("T", "20 degC").unwrap(), pressure: p };
/// // Half the water's latent heat beyond the boiling point: about half vaporised.
/// let r = outlet_for_duty(&s, inlet, Power::parse("duty", "26 kW").unwrap(), p, DutyOptions::default()).unwrap();
/// assert!(r.outlet.vapour_fraction > 0.4 && r.outlet.vapour_fraction < 0.6);
/// ```
pub fn outlet_for_duty(
    stream: &Stream,
    inlet: StreamState,
    duty: Power,
    outlet_pressure: Pressure,
    options: DutyOptions,
) -> Result<DutyResult, EnergyError> {
    let (calc, mut inlet_s, mut outlet_s) = Calc::with_states(stream, options)?;
    let (t_bub, dew) = calc.outlet_for_duty(inlet, duty, outlet_pressure, &mut inlet_s, &mut outlet_s)?;
    let t_out = outlet_s.state.t;
    let mut result = calc.result(inlet_s, outlet_s, true);
    // Report the duty asked for; the computed one agrees to the solver tolerance.
    result.duty_w = duty.watts();
    if options.path == VaporisationPath::StreamTemperature {
        // The search needs the dew point (for a liquid outlet not yet known; none: nothing
        // vaporises, no other outlet; a failed search only skips the check).
        let mut scratch = Solved::new(calc.component_count());
        let dew = match dew {
            Some(dew) => dew,
            None => calc
                .dew_temperature(outlet_pressure, &mut scratch.buffers)
                .ok()
                .flatten(),
        };
        if let Some(t_dew) = dew
            && let Some(w) = calc.outlet_uniqueness(
                result.outlet_enthalpy_j_per_mol,
                t_out,
                (t_bub, t_dew),
                outlet_pressure,
                &mut scratch,
            )
        {
            result.warnings.push(w);
        }
    }
    Ok(result)
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
    /// `"bubble"` or `"dew"` at a breakpoint, else empty.
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
    /// The pressure of every point, Pa (the outlet pressure).
    #[serde(rename = "P_Pa")]
    pub pressure_pa: f64,
    /// Total duty, W.
    #[serde(rename = "duty_W")]
    pub duty_w: f64,
    /// Warnings met along the curve.
    pub warnings: Vec<Warning>,
}

/// The heating (or cooling) curve from `inlet` to `outlet` with `points` points evenly
/// spaced in duty, plus the bubble and dew points as explicit breakpoints where the curve
/// crosses them. Every point lies at the outlet pressure: any pressure drop is taken at the
/// inlet.
///
/// # Errors
/// [`EnergyError::TooFewPoints`] for fewer than 2 points, else as [`heater_duty`] and
/// [`outlet_for_duty`].
///
/// ```
/// use flashduty::energy::{heating_curve, DutyOptions, Stream, StreamState};
/// use flashduty::units::{MolarFlow, Pressure, Temperature};
/// let s = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
/// let c = heating_curve(&s, at("60 degC"), at("130 degC"), 11, DutyOptions::default()).unwrap();
/// assert_eq!(c.points.len(), 13); // 11 points and two breakpoints
/// assert!(c.points.windows(2).all(|w| w[1].temperature_k >= w[0].temperature_k));
/// ```
pub fn heating_curve(
    stream: &Stream,
    inlet: StreamState,
    outlet: StreamState,
    points: usize,
    options: DutyOptions,
) -> Result<Curve, EnergyError> {
    if points < 2 {
        return Err(EnergyError::TooFewPoints { value: points });
    }
    let (calc, mut inlet_s, mut outlet_s) = Calc::with_states(stream, options)?;
    let mut work = Solved::new(calc.component_count());
    calc.flash_state("inlet", inlet, &mut inlet_s)?;
    calc.flash_state("outlet", outlet, &mut outlet_s)?;
    let p = Pressure::new("P", outlet_s.state.p)?;
    let flow = stream.flow.mol_per_s();
    let h_in = calc.enthalpy(&inlet_s);
    let total = flow * (calc.enthalpy(&outlet_s) - h_in);
    let t_bub = calc.bubble_temperature(p, &mut work.buffers)?;
    let t_dew = calc.dew_temperature(p, &mut work.buffers)?;
    let mut warnings = Vec::new();
    let mut warned = vec![0u8; calc.component_count()];
    let mut out = Vec::with_capacity(points + 2);
    for k in 0..points {
        let q = total * k as f64 / (points - 1) as f64;
        let r = if k + 1 == points {
            &outlet_s
        } else {
            calc.state_for_enthalpy(h_in + q / flow, p, t_bub, Some(t_dew), q, &mut work)?;
            &work
        };
        calc.flash_warnings(r, &mut warnings);
        calc.vapour_model_warnings(r, &mut warned, &mut warnings);
        out.push(CurvePoint {
            temperature_k: r.state.t,
            duty_w: q,
            vapour_fraction: r.state.beta,
            breakpoint: "",
        });
    }
    let inside = |q: f64| {
        if total >= 0.0 {
            q > 0.0 && q < total
        } else {
            q < 0.0 && q > total
        }
    };
    let mut breaks = vec![(t_bub, Phase::Liquid, "bubble", 0.0)];
    if let Some(t) = t_dew {
        breaks.push((t, Phase::Vapour, "dew", 1.0));
    }
    for (t, phase, name, beta) in breaks {
        let q = flow * (calc.saturated_enthalpy(phase, t, p.pascal()) - h_in);
        if inside(q) {
            out.push(CurvePoint {
                temperature_k: t,
                duty_w: q,
                vapour_fraction: beta,
                breakpoint: name,
            });
        }
    }
    out.sort_by(|a, b| (a.duty_w.abs()).total_cmp(&b.duty_w.abs()));
    Ok(Curve {
        points: out,
        bubble_temperature_k: t_bub,
        dew_temperature_k: t_dew,
        pressure_pa: p.pascal(),
        duty_w: total,
        warnings,
    })
}

/// The duty of a change of state along each vaporisation path, as a data-consistency
/// indicator. (Also part of every [`DutyResult`].)
///
/// # Errors
/// As [`heater_duty`].
///
/// ```
/// use flashduty::energy::{path_spread, DutyOptions, Stream, StreamState};
/// use flashduty::units::{MolarFlow, Pressure, Temperature};
/// let s = Stream::from_names(&["water"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
/// let s = path_spread(&s, at("20 degC"), at("150 degC"), DutyOptions::default()).unwrap();
/// assert!(s.relative < 0.05);
/// ```
pub fn path_spread(
    stream: &Stream,
    inlet: StreamState,
    outlet: StreamState,
    options: DutyOptions,
) -> Result<PathSpread, EnergyError> {
    Ok(heater_duty(stream, inlet, outlet, options)?.path_spread)
}

impl From<RachfordRiceError> for EnergyError {
    fn from(e: RachfordRiceError) -> Self {
        EnergyError::Flash(FlashError::Feed(e))
    }
}
