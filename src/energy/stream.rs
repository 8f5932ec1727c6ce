//! [`Stream`] (components, composition, flow) and [`StreamState`] (where a heater's inlet
//! or outlet is).

use super::result::EnergyError;
use crate::equilibrium::{FlashError, FlashSpec, WaterPhase};
use crate::library::Library;
use crate::properties::Component;
use crate::units::{MassFlow, MolarFlow, Pressure, Temperature};
use std::sync::Arc;

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
    water_phase: Option<WaterPhase>,
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
            water_phase: None,
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
            water_phase: None,
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

    /// The stream with an immiscible water phase: water forms a liquid of its own beside
    /// the organic liquid in every flash, duty, duty-specified flash and curve of the
    /// stream (see [`WaterPhase`]). Without water in the feed it changes nothing.
    ///
    /// # Errors
    /// [`EnergyError::Flash`] with [`FlashError::NoWater`] where no component is water,
    /// [`FlashError::MiscibleWithWater`] for a component miscible with water.
    ///
    /// ```
    /// use flashduty::energy::{heater_duty, DutyOptions, Stream, StreamState};
    /// use flashduty::units::{MolarFlow, Pressure, Temperature};
    /// // Invented: wet toluene heated from 25 °C to 95 °C at 1 atm.
    /// let s = Stream::from_names(&["water", "toluene"], &[0.3, 0.7], MolarFlow::parse("flow", "1 mol/s").unwrap()).unwrap();
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
    /// let one_liquid = heater_duty(&s, at("25 degC"), at("95 degC"), DutyOptions::default()).unwrap();
    /// let wet = s.with_immiscible_water().unwrap();
    /// let two_liquids = heater_duty(&wet, at("25 degC"), at("95 degC"), DutyOptions::default()).unwrap();
    /// // The two liquids boil together near 84 °C: at 95 °C much of the stream is vapour.
    /// assert!(two_liquids.outlet.vapour_fraction > 0.3);
    /// assert!(one_liquid.outlet.vapour_fraction < 0.1);
    /// assert!(two_liquids.duty_w > 2.0 * one_liquid.duty_w);
    /// ```
    pub fn with_immiscible_water(self) -> Result<Self, EnergyError> {
        let water = WaterPhase::immiscible(&self.components)?;
        Ok(self.with_water_phase(water))
    }

    /// The stream with the given water phase (built for the same components, for example
    /// with mutual solubilities).
    pub fn with_water_phase(mut self, water: WaterPhase) -> Self {
        self.water_phase = Some(water);
        self
    }

    /// The water phase, where the stream has one.
    pub fn water_phase(&self) -> Option<&WaterPhase> {
        self.water_phase.as_ref()
    }
}

/// The state of a stream at a heater's inlet or outlet.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
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
    pub(crate) fn is_temperature_pressure(self) -> bool {
        matches!(self, StreamState::TemperaturePressure { .. })
    }

    pub(crate) fn spec(self) -> FlashSpec {
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
