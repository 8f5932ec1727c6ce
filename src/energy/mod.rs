//! Energy: enthalpy against a chosen reference state, heater duty with its enthalpy
//! table, the duty-specified flash, and heating and cooling curves.
//!
//! Enthalpies are those of an ideal liquid and an ideal-gas vapour: pressure does not
//! enter them, and mixing is ideal (a phase's molar enthalpy is the mole-fraction-weighted
//! sum of the pure-component enthalpies). The phase split comes from Raoult's law.
//!
//! Positive duty is heat into the stream (a heater or vaporiser); negative is heat out of
//! it (a cooler or condenser).
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

mod enthalpy;

use enthalpy::pure_enthalpy;
pub use enthalpy::{EnthalpyModel, EnthalpySplit, ReferencePhase, ReferenceState, VaporisationPath};

use crate::equilibrium::{
    FlashError, FlashResult, FlashSpec, KValueModel, KValues, Raoult, SEARCH_MAX_TEMPERATURE_K,
    SEARCH_MIN_TEMPERATURE_K, flash, flash_bracketed,
};
use crate::library::{Library, UnknownComponent};
use crate::properties::Component;
use crate::rachford_rice::{Phase, RachfordRiceError};
use crate::solve::{bracketed_newton, expand_bracket};
use crate::units::{MassFlow, MolarFlow, Power, Pressure, Temperature, UnitError};
use crate::warnings::{Warning, push_unique};
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
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct DutyOptions {
    /// The reference state (default: liquid at 298.15 K).
    pub reference: ReferenceState,
    /// The vaporisation path (default: via the normal boiling point).
    pub path: VaporisationPath,
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
    /// Its vapour sensible part, J/mol.
    pub vapour_sensible_j_per_mol: f64,
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
    /// The reference state and path used.
    pub options: DutyOptions,
    /// Warnings from the flashes and the enthalpy correlations.
    pub warnings: Vec<Warning>,
}

/// The calculator: a stream's K-value and enthalpy models together.
struct Calc<'a> {
    stream: &'a Stream,
    k_model: Raoult,
    h: EnthalpyModel,
}

impl<'a> Calc<'a> {
    fn new(stream: &'a Stream, options: DutyOptions) -> Self {
        Self {
            stream,
            k_model: Raoult::new(stream.components.clone()),
            h: EnthalpyModel::new(stream.components.clone(), options.reference, options.path),
        }
    }

    /// Per mole of stream: Σ over components and phases of amount × enthalpy.
    fn enthalpy(&self, r: &FlashResult) -> f64 {
        self.enthalpy_with(self.h.path(), r)
    }

    fn enthalpy_with(&self, path: VaporisationPath, r: &FlashResult) -> f64 {
        let reference = self.h.reference();
        let mut total = 0.0;
        for (i, c) in self.stream.components.iter().enumerate() {
            let (l, v) = amounts(r, i, &self.stream.z);
            if l > 0.0 {
                total += l * pure_enthalpy(c, Phase::Liquid, r.temperature_k, reference, path).total_j_per_mol();
            }
            if v > 0.0 {
                total += v * pure_enthalpy(c, Phase::Vapour, r.temperature_k, reference, path).total_j_per_mol();
            }
        }
        total
    }

    /// Appends the state's rows to the table and returns its enthalpy per mole of stream.
    fn rows(
        &self,
        state: &'static str,
        r: &FlashResult,
        out: &mut Vec<EnthalpyRow>,
        warnings: &mut Vec<Warning>,
    ) -> f64 {
        let flow = self.stream.flow.mol_per_s();
        let mut total = 0.0;
        for (i, c) in self.stream.components.iter().enumerate() {
            let (l, v) = amounts(r, i, &self.stream.z);
            for (amount, phase) in [(l, Phase::Liquid), (v, Phase::Vapour)] {
                if amount <= 0.0 {
                    continue;
                }
                let split = self.h.pure(i, phase, r.temperature_k);
                self.h.warnings(i, phase, r.temperature_k, warnings);
                let h = split.total_j_per_mol();
                out.push(EnthalpyRow {
                    state,
                    component: c.name().to_string(),
                    phase,
                    flow_mol_s: amount * flow,
                    enthalpy_j_per_mol: h,
                    liquid_sensible_j_per_mol: split.liquid_sensible_j_per_mol,
                    latent_j_per_mol: split.latent_j_per_mol,
                    vapour_sensible_j_per_mol: split.vapour_sensible_j_per_mol,
                    enthalpy_flow_w: amount * flow * h,
                });
                total += amount * h;
            }
        }
        total
    }

    fn flash(&self, state: StreamState) -> Result<FlashResult, EnergyError> {
        Ok(flash(&self.k_model, &self.stream.z, state.spec())?)
    }

    /// The duty along every path; `selected_duty_w` is the one already known for the
    /// model's own path.
    fn path_spread(&self, inlet: &FlashResult, outlet: &FlashResult, selected_duty_w: f64) -> PathSpread {
        let flow = self.stream.flow.mol_per_s();
        let duty = |path| {
            if path == self.h.path() {
                selected_duty_w
            } else {
                flow * (self.enthalpy_with(path, outlet) - self.enthalpy_with(path, inlet))
            }
        };
        let [a, b, c] = VaporisationPath::ALL.map(duty);
        let max = a.max(b).max(c);
        let min = a.min(b).min(c);
        let scale = a.abs().max(b.abs()).max(c.abs());
        PathSpread {
            boiling_point_w: a,
            stream_temperature_w: b,
            reference_temperature_w: c,
            spread_w: max - min,
            relative: if scale > 0.0 { (max - min) / scale } else { 0.0 },
        }
    }

    /// The stream enthalpy (J/mol, the same sum as [`Self::enthalpy`]) and its analytic
    /// derivative dH/dT at constant pressure (J/(mol·K)) at a T–P state.
    ///
    /// H = Σ zᵢ hᴸᵢ + Σ vᵢ (hⱽᵢ − hᴸᵢ) with vᵢ = β Kᵢ zᵢ / dᵢ, dᵢ = 1 − β + β Kᵢ, so
    /// dvᵢ/dT = (zᵢ/dᵢ)(Kᵢ/dᵢ) (dβ/dT + β (1 − β) ∂ln Kᵢ/∂T), with dβ/dT from the flash.
    fn enthalpy_and_slope(&self, r: &FlashResult) -> (f64, f64) {
        let n = self.stream.components.len();
        let t = r.temperature_k;
        let (beta, lf) = (r.vapour_fraction, r.liquid_fraction);
        let two_phase = r.phase == Phase::TwoPhase;
        let mut kv = KValues::new(if two_phase { n } else { 0 });
        if two_phase {
            self.k_model.k_values(t, r.pressure_pa, &[], &[], &mut kv);
        }
        let dbeta_dt = r.sensitivity.map_or(0.0, |s| s.dvapour_fraction_dt_per_k);
        let (mut h, mut slope) = (0.0, 0.0);
        for i in 0..n {
            let z = self.stream.z[i];
            if z == 0.0 {
                continue;
            }
            let (l, v) = amounts(r, i, &self.stream.z);
            let h_liquid = (l > 0.0 || two_phase).then(|| self.h.pure(i, Phase::Liquid, t).total_j_per_mol());
            let h_vapour = (v > 0.0 || two_phase).then(|| self.h.pure(i, Phase::Vapour, t).total_j_per_mol());
            if l > 0.0 {
                h += l * h_liquid.unwrap_or(0.0);
            }
            if v > 0.0 {
                h += v * h_vapour.unwrap_or(0.0);
            }
            slope += l * self.h.pure_slope(i, Phase::Liquid, t) + v * self.h.pure_slope(i, Phase::Vapour, t);
            if let (true, Some(hl), Some(hv)) = (two_phase, h_liquid, h_vapour) {
                let k = r.k_values[i];
                let d = lf + beta * k;
                let dv = (z / d) * (k / d) * (dbeta_dt + beta * lf * kv.dln_k_dt[i]);
                slope += dv * (hv - hl);
            }
        }
        (h, slope)
    }

    fn result(&self, inlet: FlashResult, outlet: FlashResult, outlet_tp: bool, options: DutyOptions) -> DutyResult {
        let flow = self.stream.flow.mol_per_s();
        let mut table = Vec::with_capacity(4 * self.stream.components.len());
        let mut warnings = Vec::new();
        for w in inlet.warnings.iter().chain(&outlet.warnings) {
            push_unique(&mut warnings, w.clone());
        }
        // The table's rows give the stream enthalpies (the same sums as `enthalpy`).
        let h_in = self.rows("inlet", &inlet, &mut table, &mut warnings);
        let h_out = self.rows("outlet", &outlet, &mut table, &mut warnings);
        let duty_w = flow * (h_out - h_in);
        let dq = outlet_tp.then(|| flow * self.enthalpy_and_slope(&outlet).1);
        let spread = self.path_spread(&inlet, &outlet, duty_w);
        DutyResult {
            duty_w,
            flow_mol_s: flow,
            inlet_enthalpy_j_per_mol: h_in,
            outlet_enthalpy_j_per_mol: h_out,
            table,
            dduty_dt_out_w_per_k: dq,
            path_spread: spread,
            options,
            warnings,
            inlet,
            outlet,
        }
    }

    /// The outlet state at pressure `p` whose enthalpy is `target` J/mol, with the bubble
    /// and dew points at `p` (computed once by the caller).
    fn state_for_enthalpy(
        &self,
        target: f64,
        p: Pressure,
        bubble: &FlashResult,
        dew: Option<&FlashResult>,
        duty_w: f64,
    ) -> Result<FlashResult, EnergyError> {
        let z = &self.stream.z;
        let h_bub = self.enthalpy(bubble);
        let out_of_reach = || EnergyError::DutyOutOfReach { duty_w };
        let single = |phase: Phase, lo_t: f64, hi_t: f64| -> Result<FlashResult, EnergyError> {
            let h = |t: f64| self.h.phase_enthalpy(phase, z, t) - target;
            let bracket = expand_bracket(h, lo_t, hi_t, SEARCH_MIN_TEMPERATURE_K, SEARCH_MAX_TEMPERATURE_K)
                .ok_or_else(out_of_reach)?;
            let root = bracketed_newton(
                |t| {
                    let slope: f64 = (0..z.len()).map(|i| z[i] * self.h.pure_slope(i, phase, t)).sum();
                    (h(t), slope)
                },
                bracket.lo,
                bracket.hi,
                bracket.secant(),
                1e-10,
            );
            self.tp_flash(root.x, p)
        };
        if target <= h_bub {
            let tb = bubble.temperature_k;
            // A T–P flash just below the bubble point is all liquid; clamp there.
            let r = single(Phase::Liquid, tb - 10.0, tb)?;
            return Ok(force_single(r, Phase::Liquid, z));
        }
        let Some(dew) = dew else {
            return self.two_phase(target, p, bubble.temperature_k, SEARCH_MAX_TEMPERATURE_K);
        };
        let h_dew = self.enthalpy(dew);
        if target >= h_dew {
            let td = dew.temperature_k;
            let r = single(Phase::Vapour, td, td + 10.0)?;
            return Ok(force_single(r, Phase::Vapour, z));
        }
        let (t_bub, t_dew) = (bubble.temperature_k, dew.temperature_k);
        if t_dew - t_bub > WIDE_TWO_PHASE_K {
            // Start where the enthalpy would be if it ran linearly from bubble to dew point.
            let fraction = ((target - h_bub) / (h_dew - h_bub)).clamp(0.01, 0.99);
            let start = t_bub + fraction * (t_dew - t_bub);
            return self.two_phase_on_temperature(target, p, t_bub, t_dew, start);
        }
        self.two_phase(target, p, t_bub, t_dew)
    }

    /// Solves on temperature between the bubble and dew points, Newton with the analytic
    /// dH/dT inside the bracket: used where the two-phase region spans more than
    /// [`WIDE_TWO_PHASE_K`], so that temperature pins the vapour fraction down well.
    fn two_phase_on_temperature(
        &self,
        target: f64,
        p: Pressure,
        t_bub: f64,
        t_dew: f64,
        start: f64,
    ) -> Result<FlashResult, EnergyError> {
        let mut failure: Option<EnergyError> = None;
        let root = bracketed_newton(
            |t| match self.tp_flash(t, p) {
                Ok(r) => {
                    let (h, slope) = self.enthalpy_and_slope(&r);
                    (h - target, slope)
                }
                Err(e) => {
                    failure.get_or_insert(e);
                    (0.0, 1.0)
                }
            },
            t_bub,
            t_dew,
            start,
            1e-12,
        );
        if let Some(e) = failure {
            return Err(e);
        }
        self.tp_flash(root.x, p)
    }

    /// The T–P flash of the stream at `t_k` and `p`.
    fn tp_flash(&self, t_k: f64, p: Pressure) -> Result<FlashResult, EnergyError> {
        let spec = FlashSpec::TemperaturePressure {
            temperature: Temperature::new("T", t_k)?,
            pressure: p,
        };
        Ok(flash(&self.k_model, &self.stream.z, spec)?)
    }

    /// Solves on the vapour fraction between the bubble and dew points: temperature may be
    /// flat there (pure components, azeotrope-like narrow boilers), vapour fraction never is.
    fn two_phase(&self, target: f64, p: Pressure, t_bub: f64, t_dew: f64) -> Result<FlashResult, EnergyError> {
        let (lo, hi) = (0.0, 1.0);
        let z = &self.stream.z;
        let at = |beta: f64| -> Result<FlashResult, EnergyError> {
            let spec = FlashSpec::PressureVapourFraction {
                pressure: p,
                vapour_fraction: beta.clamp(0.0, 1.0),
            };
            Ok(flash_bracketed(&self.k_model, z, spec, Some((t_bub, t_dew)))?)
        };
        let mut failure: Option<EnergyError> = None;
        let beta = {
            let mut f = |beta: f64| match at(beta) {
                Ok(r) => self.enthalpy(&r) - target,
                Err(e) => {
                    // Stop the search; the error is returned below.
                    failure.get_or_insert(e);
                    0.0
                }
            };
            match roots::find_root_brent(lo, hi, &mut f, &mut BrentTolerance) {
                Ok(b) => b,
                Err(_) => {
                    // Brent can only fail here by running out of steps: finish by bisection.
                    let (mut a, mut b) = (lo, hi);
                    for _ in 0..200 {
                        let m = 0.5 * (a + b);
                        if f(m) < 0.0 {
                            a = m
                        } else {
                            b = m
                        }
                        if b - a < 1e-15 {
                            break;
                        }
                    }
                    0.5 * (a + b)
                }
            }
        };
        if let Some(e) = failure {
            return Err(e);
        }
        at(beta)
    }
}

/// Above this width of the two-phase region (dew minus bubble temperature), the
/// duty-specified flash solves on temperature; below it, on vapour fraction.
const WIDE_TWO_PHASE_K: f64 = 1.0;

/// Brent's tolerance for the vapour fraction in the duty-specified flash.
struct BrentTolerance;

impl roots::Convergency<f64> for BrentTolerance {
    fn is_root_found(&mut self, y: f64) -> bool {
        y == 0.0
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 1e-13
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= 200
    }
}

/// Amounts of component `i` in the liquid and vapour, per mole of stream.
fn amounts(r: &FlashResult, i: usize, z: &[f64]) -> (f64, f64) {
    match r.phase {
        Phase::Liquid => (z[i], 0.0),
        Phase::Vapour => (0.0, z[i]),
        Phase::TwoPhase => {
            let l = r.liquid.as_ref().map_or(0.0, |x| r.liquid_fraction * x[i]);
            let v = r.vapour.as_ref().map_or(0.0, |y| r.vapour_fraction * y[i]);
            (l, v)
        }
    }
}

/// A state found on the single-phase side of a bubble or dew point; round-off can put
/// its T–P flash a hair into the two-phase region, where β is then 1e-15: report it as
/// the single phase it is.
fn force_single(mut r: FlashResult, phase: Phase, z: &[f64]) -> FlashResult {
    if r.phase != phase {
        r.phase = phase;
        r.sensitivity = None;
        match phase {
            Phase::Liquid => {
                r.vapour_fraction = 0.0;
                r.liquid_fraction = 1.0;
                r.liquid = Some(z.to_vec());
                r.vapour = None;
            }
            _ => {
                r.vapour_fraction = 1.0;
                r.liquid_fraction = 0.0;
                r.vapour = Some(z.to_vec());
                r.liquid = None;
            }
        }
    }
    r
}

/// The duty to take `stream` from `inlet` to `outlet`, with both phase splits and the
/// enthalpy table.
///
/// # Errors
/// [`EnergyError::Flash`] when either state cannot be flashed (a vapour fraction outside
/// [0, 1], no dew point, ...).
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
    let calc = Calc::new(stream, options);
    let inlet_r = calc.flash(inlet)?;
    let outlet_r = calc.flash(outlet)?;
    let outlet_tp = matches!(outlet, StreamState::TemperaturePressure { .. });
    Ok(calc.result(inlet_r, outlet_r, outlet_tp, options))
}

/// The duty-specified flash: the outlet state at `outlet_pressure` after `duty` is added
/// to `stream` at `inlet` (zero duty: the adiabatic flash).
///
/// Below the bubble point and above the dew point it solves for temperature; between them
/// it solves on the vapour fraction (Brent's method from the `roots` crate, with bisection
/// as a fallback), so pure components and narrow-boiling mixtures, whose temperature is
/// flat across the two-phase region, are handled. It always terminates.
///
/// # Errors
/// [`EnergyError::Flash`] as [`heater_duty`]; [`EnergyError::DutyOutOfReach`] when no
/// temperature between 1 K and 10 000 K gives the enthalpy.
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
    let calc = Calc::new(stream, options);
    let inlet_r = calc.flash(inlet)?;
    let target = calc.enthalpy(&inlet_r) + duty.watts() / stream.flow.mol_per_s();
    let (bubble, dew) = saturation(&calc, outlet_pressure)?;
    let outlet_r = calc.state_for_enthalpy(target, outlet_pressure, &bubble, dew.as_ref(), duty.watts())?;
    let mut result = calc.result(inlet_r, outlet_r, true, options);
    // Report the duty asked for; the computed one agrees to the solver tolerance.
    result.duty_w = duty.watts();
    Ok(result)
}

fn saturation(calc: &Calc, p: Pressure) -> Result<(FlashResult, Option<FlashResult>), EnergyError> {
    let z = &calc.stream.z;
    let bubble = flash(&calc.k_model, z, FlashSpec::BubbleTemperature { pressure: p })?;
    let dew = match flash(&calc.k_model, z, FlashSpec::DewTemperature { pressure: p }) {
        Ok(d) => Some(d),
        Err(FlashError::NoDewPoint { .. }) => None,
        Err(e) => return Err(e.into()),
    };
    Ok((bubble, dew))
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
    let calc = Calc::new(stream, options);
    let inlet_r = calc.flash(inlet)?;
    let outlet_r = calc.flash(outlet)?;
    let p = Pressure::new("P", outlet_r.pressure_pa)?;
    let flow = stream.flow.mol_per_s();
    let h_in = calc.enthalpy(&inlet_r);
    let total = flow * (calc.enthalpy(&outlet_r) - h_in);
    let (bubble, dew) = saturation(&calc, p)?;
    let mut warnings = Vec::new();
    let mut out = Vec::with_capacity(points + 2);
    for k in 0..points {
        let q = total * k as f64 / (points - 1) as f64;
        let r = if k + 1 == points {
            outlet_r.clone()
        } else {
            calc.state_for_enthalpy(h_in + q / flow, p, &bubble, dew.as_ref(), q)?
        };
        for w in &r.warnings {
            push_unique(&mut warnings, w.clone());
        }
        out.push(CurvePoint {
            temperature_k: r.temperature_k,
            duty_w: q,
            vapour_fraction: r.vapour_fraction,
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
    let mut breaks = vec![(&bubble, "bubble", 0.0)];
    if let Some(d) = &dew {
        breaks.push((d, "dew", 1.0));
    }
    for (r, name, beta) in breaks {
        let q = flow * (calc.enthalpy(r) - h_in);
        if inside(q) {
            out.push(CurvePoint {
                temperature_k: r.temperature_k,
                duty_w: q,
                vapour_fraction: beta,
                breakpoint: name,
            });
        }
    }
    out.sort_by(|a, b| (a.duty_w.abs()).total_cmp(&b.duty_w.abs()));
    Ok(Curve {
        points: out,
        bubble_temperature_k: bubble.temperature_k,
        dew_temperature_k: dew.map(|d| d.temperature_k),
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
