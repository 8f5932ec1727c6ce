//! [`DutyCalculator`]: heater duties and duty-specified flashes for hot loops.

use super::calc::Calc;
use super::ideal::EnthalpyModel;
use super::options::DutyOptions;
use super::phase_enthalpy::PhaseEnthalpyModel;
use super::result::EnergyError;
use super::stream::{Stream, StreamState};
use crate::equilibrium::SolvedFlash;
use crate::equilibrium::{KValueModel, Raoult};
use crate::rachford_rice::Phase;
use crate::units::{Power, Pressure};
use serde::Serialize;
use std::borrow::Cow;

/// Heater duties and duty-specified flashes of one stream, many times over: for plant
/// software that calls the energy layer inside its own loops (an outlet-temperature
/// search, a network solve, a batch of operating points).
///
/// Build it once from a [`Stream`] and [`DutyOptions`]; every pure-component constant that
/// does not depend on temperature is computed then, and the K-values and phase
/// compositions live in buffers it owns. [`duty`](Self::duty) and
/// [`outlet_for_duty`](Self::outlet_for_duty) then allocate nothing, and return a small
/// [`DutySummary`]; the phase compositions of the last call are read with
/// [`inlet_liquid`](Self::inlet_liquid) and its siblings.
///
/// The numbers are those of [`heater_duty`](super::heater_duty) and
/// [`outlet_for_duty`](super::outlet_for_duty) to the last bit: both run the same code.
/// What the calculator leaves out is the audit trail: the enthalpy table, the duty along
/// the other vaporisation paths, the warnings (extrapolated correlations, supercritical
/// components, high pressure) and the iteration counts. Check a design point with the full
/// functions; loop with this.
///
/// Pros: about a fifth of the time of [`heater_duty`](super::heater_duty) for a T–P to T–P
/// duty; no allocation per call. Cons: no warnings; a call that fails leaves no
/// compositions to read.
///
/// # Failures
/// The same errors, for the same inputs, as the full functions:
/// - [`EnergyError::Unit`] from [`new`](Self::new) for a reference temperature that is not
///   finite and positive; from a call for an inlet or outlet temperature outside 1 to
///   10 000 K.
/// - [`EnergyError::Flash`] when a state cannot be flashed: a vapour fraction outside
///   [0, 1], no dew point for a P–β state with β > 0, no solution in the searched range.
/// - [`EnergyError::DutyOutOfReach`] from [`outlet_for_duty`](Self::outlet_for_duty) when
///   no temperature between 1 K and 10 000 K gives the enthalpy.
///
/// ```
/// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
/// use flashduty::units::{MolarFlow, Pressure, Temperature};
/// // Invented: 10 mol/s of n-hexane/n-heptane 40/60 preheated from 25 °C at 1.5 bar.
/// let stream = Stream::from_names(&["n-hexane", "n-heptane"], &[0.4, 0.6],
///     MolarFlow::new("flow", 10.0).unwrap()).unwrap();
/// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
/// let p = Pressure::new("P", 1.5e5).unwrap();
/// let at = |t: f64| StreamState::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: p };
/// // The outlet temperatures of a sweep, each duty computed without allocating.
/// let mut last = 0.0;
/// for t_out in [320.0, 340.0, 360.0, 380.0, 400.0] {
///     let s = calc.duty(at(298.15), at(t_out)).unwrap();
///     assert!(s.duty_w > last);
///     last = s.duty_w;
/// }
/// ```
///
/// Any K-value and phase-enthalpy models plug in through
/// [`with_models`](Self::with_models); the defaults are Raoult's law and the
/// [`EnthalpyModel`] of the [`DutyOptions`]. It stays allocation-free with an
/// [`EnthalpyModel`] and any composition-independent K-value model; a composition-dependent
/// K-value model allocates in its composition loop, and either such a model or another
/// enthalpy model allocates small vectors for dQ/dT of a two-phase state (the vapour
/// amounts' slopes and the partial molar enthalpies).
#[derive(Clone)]
pub struct DutyCalculator<K = Raoult, H = EnthalpyModel> {
    calc: Calc<'static, K, H>,
    inlet: SolvedFlash,
    outlet: SolvedFlash,
    /// Whether the buffers hold the states of a call that succeeded.
    valid: bool,
}

impl<K: KValueModel, H: PhaseEnthalpyModel> std::fmt::Debug for DutyCalculator<K, H> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let names: Vec<&str> = self.stream().components().iter().map(|c| c.name()).collect();
        f.debug_struct("DutyCalculator")
            .field("components", &names)
            .field("z", &self.stream().z())
            .field("options", &self.options())
            .finish_non_exhaustive()
    }
}

/// The state at a heater's inlet or outlet: phase, temperature, pressure and vapour
/// fraction. The phase compositions stay in the [`DutyCalculator`].
///
/// ```
/// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
/// use flashduty::rachford_rice::Phase;
/// use flashduty::units::{MolarFlow, Pressure, Temperature};
/// let stream = Stream::from_names(&["water"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
/// let s = calc.duty(at("20 degC"), at("150 degC")).unwrap();
/// assert_eq!(s.inlet.phase, Phase::Liquid);
/// assert_eq!((s.outlet.phase, s.outlet.vapour_fraction), (Phase::Vapour, 1.0));
/// assert_eq!(s.outlet.pressure_pa, 101_325.0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct StateSummary {
    /// The phase (`Liquid` at a bubble point, `Vapour` at a dew point).
    pub phase: Phase,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure, Pa.
    pub pressure_pa: f64,
    /// β, moles of vapour per mole of stream.
    pub vapour_fraction: f64,
    /// 1 − β, computed without cancellation.
    pub liquid_fraction: f64,
}

/// A duty and the two states it joins: the numbers of a
/// [`DutyResult`](super::DutyResult) without its table, path spread and warnings.
///
/// ```
/// use flashduty::energy::{heater_duty, DutyCalculator, DutyOptions, Stream, StreamState};
/// use flashduty::units::{MolarFlow, Pressure, Temperature};
/// // Invented: an equimolar benzene–toluene feed at 1 atm, 25 °C to 95 °C (two-phase).
/// let stream = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5],
///     MolarFlow::new("flow", 2.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
/// let s = DutyCalculator::new(&stream, DutyOptions::default()).unwrap()
///     .duty(at("25 degC"), at("95 degC")).unwrap();
/// let full = heater_duty(&stream, at("25 degC"), at("95 degC"), DutyOptions::default()).unwrap();
/// assert_eq!(s.duty_w, full.duty_w);
/// assert_eq!(s.dduty_dt_out_w_per_k, full.dduty_dt_out_w_per_k);
/// assert_eq!(s.duty_w, 2.0 * (s.outlet_enthalpy_j_per_mol - s.inlet_enthalpy_j_per_mol));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct DutySummary {
    /// Heat into the stream, W (negative: heat removed). From
    /// [`DutyCalculator::outlet_for_duty`], the duty asked for.
    pub duty_w: f64,
    /// The inlet state.
    pub inlet: StateSummary,
    /// The outlet state.
    pub outlet: StateSummary,
    /// Inlet molar enthalpy relative to the reference state, J/mol of stream.
    pub inlet_enthalpy_j_per_mol: f64,
    /// Outlet molar enthalpy relative to the reference state, J/mol of stream.
    pub outlet_enthalpy_j_per_mol: f64,
    /// dQ/dT at the outlet at the outlet pressure, W/K (analytic, from the K-values the
    /// outlet flash already has). `None` unless the outlet was given by T and P or found
    /// by the duty-specified flash, and `None` where the duty rises at constant
    /// temperature there (a two-phase outlet of a pure component or an azeotrope, or at the
    /// three-phase temperature of water and one organic).
    pub dduty_dt_out_w_per_k: Option<f64>,
}

impl DutyCalculator {
    /// A calculator for `stream` (copied in) with `options`: the pure-component enthalpy
    /// constants are computed here, and the buffers sized for the stream.
    ///
    /// # Errors
    /// [`EnergyError::Unit`] when the reference temperature is not finite and positive
    /// (field `reference.temperature_k`).
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, EnergyError, ReferenceState, Stream};
    /// use flashduty::units::MolarFlow;
    /// let stream = Stream::from_names(&["benzene"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// assert!(DutyCalculator::new(&stream, DutyOptions::default()).is_ok());
    /// let bad = DutyOptions {
    ///     reference: ReferenceState { temperature_k: f64::NAN, ..ReferenceState::default() },
    ///     ..DutyOptions::default()
    /// };
    /// let e = DutyCalculator::new(&stream, bad).unwrap_err();
    /// assert!(matches!(e, EnergyError::Unit(_)) && e.to_string().contains("reference.temperature_k"));
    /// ```
    pub fn new(stream: &Stream, options: DutyOptions) -> Result<Self, EnergyError> {
        Ok(Self::from_calc(Calc::new(Cow::Owned(stream.clone()), options)?))
    }
}

impl<K: KValueModel, H: PhaseEnthalpyModel> DutyCalculator<K, H> {
    fn from_calc(calc: Calc<'static, K, H>) -> Self {
        let n = calc.component_count();
        Self {
            calc,
            inlet: SolvedFlash::new(n),
            outlet: SolvedFlash::new(n),
            valid: false,
        }
    }

    /// A calculator for `stream` with any K-value model and phase-enthalpy model (owned;
    /// pass references to share them), each with as many components as the stream. The
    /// numbers are those of [`heater_duty_with`](super::heater_duty_with) and
    /// [`outlet_for_duty_with`](super::outlet_for_duty_with).
    ///
    /// # Errors
    /// [`EnergyError::Flash`] with
    /// [`FlashError::ComponentCount`](crate::equilibrium::FlashError::ComponentCount) where a
    /// model's component count is not the stream's; [`EnergyError::Unit`] for an ideal base
    /// whose reference temperature is not finite and positive.
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, EnthalpyModel, Stream, StreamState};
    /// use flashduty::equilibrium::Raoult;
    /// use flashduty::units::{MolarFlow, Pressure, Temperature};
    /// let stream = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let k = Raoult::new(stream.components().to_vec());
    /// let h = EnthalpyModel::from_options(stream.components().to_vec(), DutyOptions::default());
    /// let mut calc = DutyCalculator::with_models(&stream, &k, &h).unwrap();
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let at = |t: f64| StreamState::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: p };
    /// let mut default = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// assert_eq!(calc.duty(at(300.0), at(400.0)).unwrap(), default.duty(at(300.0), at(400.0)).unwrap());
    /// ```
    pub fn with_models(stream: &Stream, k_model: K, enthalpy: H) -> Result<Self, EnergyError> {
        Ok(Self::from_calc(Calc::with_models(
            Cow::Owned(stream.clone()),
            k_model,
            enthalpy,
        )?))
    }

    /// The stream.
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream};
    /// use flashduty::units::MolarFlow;
    /// let stream = Stream::from_names(&["benzene"], &[1.0], MolarFlow::new("flow", 3.0).unwrap()).unwrap();
    /// let calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// assert_eq!(calc.stream().flow().mol_per_s(), 3.0);
    /// ```
    pub fn stream(&self) -> &Stream {
        self.calc.stream()
    }

    /// The reference state and vaporisation path.
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, VaporisationPath};
    /// use flashduty::units::MolarFlow;
    /// let stream = Stream::from_names(&["benzene"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let o = DutyOptions { path: VaporisationPath::StreamTemperature, ..DutyOptions::default() };
    /// assert_eq!(DutyCalculator::new(&stream, o).unwrap().options(), o);
    /// ```
    pub fn options(&self) -> DutyOptions {
        self.calc.options()
    }

    /// The duty to take the stream from `inlet` to `outlet`: the number
    /// [`heater_duty`](super::heater_duty) gives, without its table, path spread and
    /// warnings. T–P, P–β and T–β states are all accepted, and none allocates.
    ///
    /// # Errors
    /// As [`heater_duty`](super::heater_duty): [`EnergyError::Unit`] for a given temperature
    /// outside 1 to 10 000 K; [`EnergyError::Flash`] when a state cannot be flashed. After
    /// an error no compositions can be read until a call succeeds.
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
    /// use flashduty::units::{MolarFlow, Pressure};
    /// // Vaporise 1 mol/s of water at 1 atm, saturated liquid to saturated vapour.
    /// let stream = Stream::from_names(&["water"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let s = calc.duty(
    ///     StreamState::PressureVapourFraction { pressure: p, vapour_fraction: 0.0 },
    ///     StreamState::PressureVapourFraction { pressure: p, vapour_fraction: 1.0 },
    /// ).unwrap();
    /// // Water's ΔHvap at 100 °C: 40.65 kJ/mol (CRC Handbook, from memory).
    /// assert!((s.duty_w / 40_650.0 - 1.0).abs() < 0.02);
    /// assert!(s.dduty_dt_out_w_per_k.is_none());
    /// ```
    pub fn duty(&mut self, inlet: StreamState, outlet: StreamState) -> Result<DutySummary, EnergyError> {
        self.valid = false;
        self.calc.flash_state("inlet", inlet, &mut self.inlet)?;
        self.calc.flash_state("outlet", outlet, &mut self.outlet)?;
        self.valid = true;
        Ok(self
            .calc
            .summary(&self.inlet, &self.outlet, outlet.is_temperature_pressure()))
    }

    /// The duty-specified flash: the outlet state at `outlet_pressure` after `duty` is
    /// added to the stream at `inlet` (zero duty: the adiabatic flash). The same search as
    /// [`outlet_for_duty`](super::outlet_for_duty), whose outlet it returns, without the
    /// full result; no allocation.
    ///
    /// # Errors
    /// As [`outlet_for_duty`](super::outlet_for_duty): [`EnergyError::Unit`],
    /// [`EnergyError::Flash`], and [`EnergyError::DutyOutOfReach`] when no temperature
    /// between 1 K and 10 000 K gives the enthalpy. After an error no compositions can be
    /// read until a call succeeds.
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
    /// use flashduty::rachford_rice::Phase;
    /// use flashduty::units::{MolarFlow, Power, Pressure, Temperature};
    /// // Invented: an adiabatic let-down of n-pentane/n-hexane 50/50 from 100 °C, 5 bar to 1 atm.
    /// let stream = Stream::from_names(&["n-pentane", "n-hexane"], &[0.5, 0.5],
    ///     MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// let inlet = StreamState::TemperaturePressure {
    ///     temperature: Temperature::parse("T", "100 degC").unwrap(),
    ///     pressure: Pressure::parse("P", "5 bar").unwrap(),
    /// };
    /// let s = calc.outlet_for_duty(inlet, Power::new("duty", 0.0).unwrap(),
    ///     Pressure::parse("P", "1 atm").unwrap()).unwrap();
    /// // Part of the liquid flashes, and the stream cools as it does.
    /// assert_eq!((s.inlet.phase, s.outlet.phase), (Phase::Liquid, Phase::TwoPhase));
    /// assert!(s.outlet.temperature_k < 373.15);
    /// assert!((s.outlet_enthalpy_j_per_mol - s.inlet_enthalpy_j_per_mol).abs() < 1e-6);
    /// ```
    pub fn outlet_for_duty(
        &mut self,
        inlet: StreamState,
        duty: Power,
        outlet_pressure: Pressure,
    ) -> Result<DutySummary, EnergyError> {
        self.valid = false;
        let (t_bub, dew) =
            self.calc
                .outlet_for_duty(inlet, duty, outlet_pressure, &mut self.inlet, &mut self.outlet)?;
        self.valid = true;
        let slope = Calc::<K, H>::outlet_has_slope(&self.outlet, t_bub, dew);
        let mut summary = self.calc.summary(&self.inlet, &self.outlet, slope);
        // Report the duty asked for, as the full function does.
        summary.duty_w = duty.watts();
        Ok(summary)
    }

    fn composition<'a>(&'a self, s: &'a SolvedFlash, liquid: bool) -> Option<&'a [f64]> {
        if !self.valid {
            return None;
        }
        if liquid {
            s.state.has_liquid.then_some(s.x.as_slice())
        } else {
            s.state.has_vapour.then_some(s.y.as_slice())
        }
    }

    /// Liquid mole fractions at the inlet of the last successful call, where there is
    /// liquid (at a dew point: the incipient liquid), as in
    /// [`FlashResult::liquid`](crate::equilibrium::FlashResult::liquid).
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
    /// use flashduty::units::{MolarFlow, Pressure, Temperature};
    /// let stream = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5],
    ///     MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// assert!(calc.inlet_liquid().is_none()); // nothing computed yet
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let at = |t: f64| StreamState::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: p };
    /// calc.duty(at(300.0), at(400.0)).unwrap();
    /// assert_eq!(calc.inlet_liquid().unwrap(), &[0.5, 0.5]);
    /// assert!(calc.inlet_vapour().is_none());
    /// ```
    pub fn inlet_liquid(&self) -> Option<&[f64]> {
        self.composition(&self.inlet, true)
    }

    /// Vapour mole fractions at the inlet of the last successful call, where there is
    /// vapour (at a bubble point: the incipient vapour).
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
    /// use flashduty::units::{MolarFlow, Pressure};
    /// let stream = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5],
    ///     MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let bubble = StreamState::PressureVapourFraction { pressure: p, vapour_fraction: 0.0 };
    /// let dew = StreamState::PressureVapourFraction { pressure: p, vapour_fraction: 1.0 };
    /// calc.duty(bubble, dew).unwrap();
    /// // The first bubble is richer in benzene, the lighter component.
    /// assert!(calc.inlet_vapour().unwrap()[0] > 0.5);
    /// ```
    pub fn inlet_vapour(&self) -> Option<&[f64]> {
        self.composition(&self.inlet, false)
    }

    /// Liquid mole fractions at the outlet of the last successful call, where there is
    /// liquid (at a dew point: the incipient liquid).
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
    /// use flashduty::units::{MolarFlow, Pressure, Temperature};
    /// let stream = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5],
    ///     MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let at = |t: f64| StreamState::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: p };
    /// let s = calc.duty(at(300.0), at(368.0)).unwrap();
    /// let (x, y) = (calc.outlet_liquid().unwrap(), calc.outlet_vapour().unwrap());
    /// // The material balance z = (1 − β) x + β y closes.
    /// let z0 = s.outlet.liquid_fraction * x[0] + s.outlet.vapour_fraction * y[0];
    /// assert!((z0 - 0.5).abs() < 1e-12);
    /// ```
    pub fn outlet_liquid(&self) -> Option<&[f64]> {
        self.composition(&self.outlet, true)
    }

    /// Vapour mole fractions at the outlet of the last successful call, where there is
    /// vapour (at a bubble point: the incipient vapour).
    ///
    /// ```
    /// use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
    /// use flashduty::units::{MolarFlow, Pressure, Temperature};
    /// let stream = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5],
    ///     MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let mut calc = DutyCalculator::new(&stream, DutyOptions::default()).unwrap();
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let at = |t: f64| StreamState::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: p };
    /// calc.duty(at(300.0), at(420.0)).unwrap();
    /// assert_eq!(calc.outlet_vapour().unwrap(), &[0.5, 0.5]);
    /// assert!(calc.outlet_liquid().is_none());
    /// ```
    pub fn outlet_vapour(&self) -> Option<&[f64]> {
        self.composition(&self.outlet, false)
    }
}
