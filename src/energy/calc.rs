//! The calculation behind every energy entry point: a stream's K-value and enthalpy models,
//! flashes into reusable buffers, stream enthalpies and their temperature slope, and the
//! duty-specified flash. [`heater_duty`](super::heater_duty) and the other functions build
//! their full results from it; [`DutyCalculator`](super::DutyCalculator) keeps one and its
//! buffers for hot loops, so both give the same numbers by construction.

use super::departure::Departures;
use super::duty_calculator::{DutySummary, StateSummary};
use super::ideal::EnthalpyModel;
use super::options::DutyOptions;
use super::path_table::PathTable;
use super::phase_enthalpy::PhaseEnthalpyModel;
use super::range_warnings::{enthalpy_warnings, virial_warnings};
use super::reference::VaporisationPath;
use super::result::{DutyResult, EnergyError, EnthalpyRow, PathSpread};
use super::stream::{Stream, StreamState};
use crate::equilibrium::{
    FlashError, FlashSpec, KValueModel, Liquid, Raoult, SEARCH_MAX_TEMPERATURE_K, SEARCH_MIN_TEMPERATURE_K,
    SolvedFlash, WaterPhase, amount_slopes, flash_into, flash_result, liquid_appearance_temperature,
    saturation_temperature, sensitivity, water_flash_into, water_flash_result, water_warnings,
};
use crate::properties::Component;
use crate::rachford_rice::Phase;
use crate::solve::{bracketed_newton, expand_bracket};
use crate::units::{Power, Pressure, Temperature, UnitError};
use crate::warnings::{Warning, push_unique};
use std::borrow::Cow;
use std::sync::Arc;

/// Above this width of the two-phase region (dew minus bubble temperature), the
/// duty-specified flash solves on temperature; below it, on vapour fraction.
pub(crate) const WIDE_TWO_PHASE_K: f64 = 1.0;

/// The tolerance on the vapour fraction of the duty-specified flash across a narrow
/// two-phase region.
const VAPOUR_FRACTION_TOLERANCE: f64 = 1e-13;

/// The summary of a flashed state that [`DutyCalculator`](super::DutyCalculator) returns.
fn state_summary(s: &SolvedFlash) -> StateSummary {
    let s = &s.state;
    StateSummary {
        phase: s.phase,
        temperature_k: s.t,
        pressure_pa: s.p,
        vapour_fraction: s.beta,
        liquid_fraction: s.liquid_fraction,
    }
}

/// The calculator: a stream's K-value and enthalpy models together. The defaults are the
/// library's: Raoult's law and the ideal-mixing [`EnthalpyModel`] of a [`DutyOptions`].
#[derive(Debug, Clone)]
pub(crate) struct Calc<'a, K = Raoult, H = EnthalpyModel> {
    stream: Cow<'a, Stream>,
    /// z as [`crate::equilibrium::flash`] normalises it, so that every flash here is the
    /// one `flash` would do.
    zn: Vec<f64>,
    k_model: K,
    enthalpy: H,
}

/// z normalised as [`crate::equilibrium::flash`] does.
fn normalised_z(stream: &Stream) -> Result<Vec<f64>, EnergyError> {
    let z = stream.z();
    let sum = crate::rachford_rice::validate(z, z)?;
    Ok(if sum == 1.0 {
        z.to_vec()
    } else {
        z.iter().map(|v| v / sum).collect()
    })
}

impl<'a> Calc<'a> {
    /// The library's models for `stream`: Raoult's law over its components and the
    /// [`EnthalpyModel`] of `options`.
    ///
    /// # Errors
    /// [`EnergyError::Unit`] for a reference temperature that is not finite and positive.
    pub fn new(stream: Cow<'a, Stream>, options: DutyOptions) -> Result<Self, EnergyError> {
        Temperature::new("reference.temperature_k", options.reference.temperature_k)?;
        let zn = normalised_z(&stream)?;
        let components = stream.components();
        Ok(Self {
            enthalpy: EnthalpyModel::from_options(components.to_vec(), options),
            k_model: Raoult::new(components.to_vec()),
            zn,
            stream,
        })
    }
}

impl<'a, K: KValueModel, H: PhaseEnthalpyModel> Calc<'a, K, H> {
    /// A calculator with the given models.
    ///
    /// # Errors
    /// [`EnergyError::Flash`] with [`FlashError::ComponentCount`] where a model's component
    /// count is not the stream's; [`EnergyError::Unit`] for an ideal base whose reference
    /// temperature is not finite and positive.
    pub fn with_models(stream: Cow<'a, Stream>, k_model: K, enthalpy: H) -> Result<Self, EnergyError> {
        let n = stream.z().len();
        for count in [k_model.component_count(), enthalpy.component_count()] {
            if count != n {
                return Err(FlashError::ComponentCount {
                    components: count,
                    z: n,
                }
                .into());
            }
        }
        if let Some(base) = enthalpy.ideal_base() {
            Temperature::new("reference.temperature_k", base.reference().temperature_k)?;
        }
        if stream.water_phase().is_some() && (!enthalpy.is_ideal_mixing() || k_model.is_composition_dependent()) {
            return Err(FlashError::WaterPhaseModel {
                detail: "the water phase takes the ideal-mixing enthalpy model and a K-value model that does not depend on composition",
            }
            .into());
        }
        let zn = normalised_z(&stream)?;
        Ok(Self {
            stream,
            zn,
            k_model,
            enthalpy,
        })
    }

    /// The ideal-mixing model where the enthalpy model is exactly that: the per-component
    /// sums are then taken as hand calculations take them.
    #[inline(always)]
    fn ideal(&self) -> Option<&EnthalpyModel> {
        if self.enthalpy.is_ideal_mixing() {
            self.enthalpy.ideal_base()
        } else {
            None
        }
    }

    /// The ideal-mixing model the enthalpy model is built on, if any.
    #[inline]
    pub fn base(&self) -> Option<&EnthalpyModel> {
        self.enthalpy.ideal_base()
    }

    pub fn stream(&self) -> &Stream {
        &self.stream
    }

    /// The options of the ideal base (the defaults where there is none).
    pub fn options(&self) -> DutyOptions {
        self.base().map_or_else(DutyOptions::default, EnthalpyModel::options)
    }

    pub fn component_count(&self) -> usize {
        self.zn.len()
    }

    pub(super) fn flow(&self) -> f64 {
        self.stream.flow().mol_per_s()
    }

    pub(super) fn z(&self) -> &[f64] {
        self.stream.z()
    }

    /// The stream's components (names and molar masses).
    fn components(&self) -> &[Arc<Component>] {
        self.stream.components()
    }

    /// Flashes `spec` into `out` (the flash [`crate::equilibrium::flash`] does, without
    /// allocating).
    pub(super) fn flash_spec(
        &self,
        spec: FlashSpec,
        t_bracket: Option<(f64, f64)>,
        out: &mut SolvedFlash,
    ) -> Result<(), EnergyError> {
        match self.water() {
            Some(w) => water_flash_into(&self.k_model, w, &self.zn, spec, out)?,
            None => flash_into(&self.k_model, &self.zn, spec, t_bracket, out)?,
        }
        Ok(())
    }

    /// The stream's water phase, where it has one and water is in the feed.
    #[inline(always)]
    pub(crate) fn water(&self) -> Option<&WaterPhase> {
        self.stream
            .water_phase()
            .filter(|w| self.zn.get(w.water_index()).is_some_and(|&z| z > 0.0))
    }

    /// The [`FlashResult`](crate::equilibrium::FlashResult) of a state this calculator
    /// solved.
    pub(crate) fn flash_result_of(&self, s: SolvedFlash) -> crate::equilibrium::FlashResult {
        match self.water() {
            Some(w) if s.water.active => water_flash_result(&self.k_model, w, &self.zn, s),
            _ => flash_result(&self.k_model, &self.zn, s),
        }
    }

    /// Flashes a heater inlet or outlet state (`which` names it in errors) into `out`.
    ///
    /// # Errors
    /// [`EnergyError::Unit`] for a given temperature outside the 1–10 000 K the energy
    /// calculations work over (the correlations can overflow beyond it); otherwise as the
    /// flash.
    pub fn flash_state(
        &self,
        which: &'static str,
        state: StreamState,
        out: &mut SolvedFlash,
    ) -> Result<(), EnergyError> {
        if let StreamState::TemperaturePressure { temperature, .. }
        | StreamState::TemperatureVapourFraction { temperature, .. } = state
        {
            let t = temperature.kelvin();
            if !(SEARCH_MIN_TEMPERATURE_K..=SEARCH_MAX_TEMPERATURE_K).contains(&t) {
                return Err(UnitError::OutOfRange {
                    field: format!("{which}.temperature"),
                    value: t,
                    unit: "K".to_string(),
                    why: "outside 1 to 10000 K, the range of the energy calculations",
                }
                .into());
            }
        }
        self.flash_spec(state.spec(), None, out)
    }

    /// The T–P flash of the stream at `t_k` and `p` into `out`.
    pub(super) fn tp_into(&self, t_k: f64, p: Pressure, out: &mut SolvedFlash) -> Result<(), EnergyError> {
        let spec = FlashSpec::TemperaturePressure {
            temperature: Temperature::new("T", t_k)?,
            pressure: p,
        };
        self.flash_spec(spec, None, out)
    }

    /// Amounts of component `i` in the liquid and vapour, per mole of stream.
    #[inline(always)]
    fn amounts(&self, s: &SolvedFlash, i: usize) -> (f64, f64) {
        let z = self.z();
        match s.state.phase {
            Phase::Liquid => (z[i], 0.0),
            Phase::Vapour => (0.0, z[i]),
            Phase::TwoPhase => {
                let l = if s.state.has_liquid {
                    s.state.liquid_fraction * s.x[i]
                } else {
                    0.0
                };
                let v = if s.state.has_vapour { s.state.beta * s.y[i] } else { 0.0 };
                (l, v)
            }
        }
    }

    /// Per mole of stream: Σ over components and phases of amount × enthalpy.
    pub fn enthalpy(&self, s: &SolvedFlash) -> f64 {
        let Some(m) = self.ideal() else {
            return self.general_enthalpy(s);
        };
        self.ideal_enthalpy(m, s)
    }

    /// Per mole of stream: the ideal-mixing model `m`'s enthalpy of the state, its
    /// second-virial departures included.
    #[inline]
    fn ideal_enthalpy(&self, m: &EnthalpyModel, s: &SolvedFlash) -> f64 {
        let h = self.enthalpy_with(m.table(), m.components(), s);
        match m.table().virial(m.components()) {
            Some(v) => h + self.departure(v, s),
            None => h,
        }
    }

    /// The phases of a state: (phase, amount per mole of stream, composition).
    fn phases<'s>(&'s self, s: &'s SolvedFlash) -> [(Phase, f64, &'s [f64]); 2] {
        let st = &s.state;
        match st.phase {
            Phase::Liquid => [(Phase::Liquid, 1.0, self.z()), (Phase::Vapour, 0.0, &[])],
            Phase::Vapour => [(Phase::Liquid, 0.0, &[]), (Phase::Vapour, 1.0, self.z())],
            Phase::TwoPhase => [
                (
                    Phase::Liquid,
                    if st.has_liquid { st.liquid_fraction } else { 0.0 },
                    &s.x,
                ),
                (Phase::Vapour, if st.has_vapour { st.beta } else { 0.0 }, &s.y),
            ],
        }
    }

    /// [`Self::enthalpy`] for any phase-enthalpy model: Σ over phases of amount × the
    /// phase's molar enthalpy.
    fn general_enthalpy(&self, s: &SolvedFlash) -> f64 {
        let (t, p) = (s.state.t, s.state.p);
        let mut total = 0.0;
        for (phase, amount, x) in self.phases(s) {
            if amount > 0.0 {
                total += amount * self.enthalpy.phase_enthalpy(phase, x, t, p).0;
            }
        }
        total
    }

    /// Per mole of stream: Σ over components and phases of amount × second-virial
    /// departure, at the state's temperature and pressure.
    #[inline(never)]
    fn departure(&self, v: Departures<'_>, s: &SolvedFlash) -> f64 {
        let (t, p) = (s.state.t, s.state.p);
        let mut total = 0.0;
        for i in 0..self.component_count() {
            let (l, vap) = self.amounts(s, i);
            if l > 0.0 {
                total += l * v.liquid(i);
            }
            if vap > 0.0 {
                total += vap * v.vapour(i, t, p).0;
            }
        }
        total
    }

    fn enthalpy_with(&self, table: &PathTable, components: &[Arc<Component>], s: &SolvedFlash) -> f64 {
        let t = s.state.t;
        let mut total = 0.0;
        for i in 0..self.component_count() {
            let (l, v) = self.amounts(s, i);
            if l > 0.0 {
                total += l * table.total(components, i, Phase::Liquid, t);
            }
            if v > 0.0 {
                total += v * table.total(components, i, Phase::Vapour, t);
            }
        }
        total
    }

    /// The enthalpy of the stream all liquid (at its bubble point) or all vapour (at its
    /// dew point) at `t_k` and `p_pa`, J/mol.
    #[inline]
    pub fn saturated_enthalpy(&self, phase: Phase, t_k: f64, p_pa: f64) -> f64 {
        self.phase_enthalpy(phase, self.z(), t_k, p_pa)
    }

    /// The enthalpy of a phase of composition `fractions` at `t_k` and `p_pa`, J/mol.
    #[inline]
    pub(crate) fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        match self.ideal() {
            Some(m) => m.table().phase_enthalpy_at(m.components(), phase, fractions, t_k, p_pa),
            None => self.enthalpy.phase_enthalpy(phase, fractions, t_k, p_pa).0,
        }
    }

    /// [`Self::phase_enthalpy`] and its derivative in T at constant pressure, J/(mol·K),
    /// from one evaluation of a general model.
    #[inline]
    pub(crate) fn phase_enthalpy_and_slope(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> (f64, f64) {
        match self.ideal() {
            Some(m) => (
                m.table().phase_enthalpy_at(m.components(), phase, fractions, t_k, p_pa),
                m.table().phase_slope_at(m.components(), phase, fractions, t_k, p_pa),
            ),
            None => self.enthalpy.phase_enthalpy(phase, fractions, t_k, p_pa),
        }
    }

    /// Adds the second-virial range warnings of the state (none under an ideal-gas
    /// vapour); `warned` keeps one byte per component across calls.
    pub fn vapour_model_warnings(&self, s: &SolvedFlash, warned: &mut [u8], out: &mut Vec<Warning>) {
        let Some(base) = self.base() else {
            return;
        };
        let o = base.options();
        for (i, c) in base.components().iter().enumerate() {
            let (l, v) = self.amounts(s, i);
            for (amount, phase) in [(l, Phase::Liquid), (v, Phase::Vapour)] {
                if amount > 0.0 {
                    let w = &mut warned[i];
                    virial_warnings(c, o, phase, s.state.t, s.state.p, w, out);
                }
            }
        }
    }

    /// Adds the K-value model's warnings at the state (those of its flash result).
    pub fn flash_warnings(&self, s: &SolvedFlash, out: &mut Vec<Warning>) {
        self.k_model.warnings(s.state.t, s.state.p, out);
        crate::warnings::drop_for_pure_feed(&self.zn, out);
        match self.water() {
            Some(w) => water_warnings(w, &self.zn, out),
            None if s.state.has_liquid => self.k_model.feed_warnings(&self.zn, out),
            None => {}
        }
    }

    /// The stream enthalpy (J/mol, the same sum as [`Self::enthalpy`]) and its analytic
    /// derivative dH/dT at constant pressure (J/(mol·K)) at a state flashed at T and P,
    /// using the K-values and ∂ln K/∂T the flash left in the buffers.
    ///
    /// H = Σ zᵢ hᴸᵢ + Σ vᵢ (hⱽᵢ − hᴸᵢ) with vᵢ = β Kᵢ zᵢ / dᵢ, dᵢ = 1 − β + β Kᵢ, so
    /// dvᵢ/dT = (zᵢ/dᵢ)(Kᵢ/dᵢ) (dβ/dT + β (1 − β) ∂ln Kᵢ/∂T).
    ///
    /// For a composition-dependent K-value model or any phase-enthalpy model other than
    /// ideal mixing: H = Σ over phases of nₚ hₚ(T, xₚ), and
    /// dH/dT = Σₚ nₚ ∂hₚ/∂T + Σᵢ (h̄ⱽᵢ − h̄ᴸᵢ) dvᵢ/dT, with the partial molar enthalpies h̄ and
    /// dvᵢ/dT from the equilibrium conditions in full.
    pub fn enthalpy_and_slope(&self, s: &SolvedFlash) -> (f64, f64) {
        let m = match self.ideal() {
            Some(m) if !self.k_model.is_composition_dependent() => m,
            _ => return self.general_enthalpy_and_slope(s),
        };
        let dbeta_dt = self.vapour_fraction_slope(s);
        match m.table().virial(m.components()) {
            None => self.ideal_enthalpy_and_slope(m, s, dbeta_dt),
            Some(departures) => {
                let (h, slope) = self.ideal_enthalpy_and_slope(m, s, dbeta_dt);
                let (dh, dslope) = self.departure_and_slope(departures, s, dbeta_dt);
                (h + dh, slope + dslope)
            }
        }
    }

    /// [`Self::enthalpy_and_slope`] for any pair of models.
    fn general_enthalpy_and_slope(&self, s: &SolvedFlash) -> (f64, f64) {
        let (t, p) = (s.state.t, s.state.p);
        let n = self.component_count();
        let (mut h, mut slope) = (0.0, 0.0);
        for (phase, amount, x) in self.phases(s) {
            if amount > 0.0 {
                let (hp, sp) = self.enthalpy.phase_enthalpy(phase, x, t, p);
                h += amount * hp;
                slope += amount * sp;
            }
        }
        if s.state.phase == Phase::TwoPhase && s.state.has_liquid && s.state.has_vapour {
            let (mut dv_dt, mut dv_dp) = (vec![0.0; n], vec![0.0; n]);
            if amount_slopes(&self.k_model, &self.zn, s, &mut dv_dt, &mut dv_dp) {
                let (mut h_liquid, mut h_vapour) = (vec![0.0; n], vec![0.0; n]);
                self.enthalpy
                    .partial_molar_enthalpies(Phase::Liquid, &s.x, t, p, &mut h_liquid);
                self.enthalpy
                    .partial_molar_enthalpies(Phase::Vapour, &s.y, t, p, &mut h_vapour);
                for i in 0..n {
                    slope += dv_dt[i] * (h_vapour[i] - h_liquid[i]);
                }
            }
        }
        (h, slope)
    }

    /// dβ/dT at constant pressure of a state flashed at T and P (0 unless two-phase).
    fn vapour_fraction_slope(&self, s: &SolvedFlash) -> f64 {
        let st = &s.state;
        if st.phase != Phase::TwoPhase {
            return 0.0;
        }
        if s.water.active {
            return self.water_slope(s, |dv| dv.iter().sum());
        }
        sensitivity(&self.zn, &s.kv, st.beta, st.liquid_fraction).map_or(0.0, |s| s.dvapour_fraction_dt_per_k)
    }

    /// dvᵢ/dT of a two-phase state, from dβ/dT: (zᵢ/dᵢ)(Kᵢ/dᵢ)(dβ/dT + β(1 − β) ∂ln Kᵢ/∂T).
    #[inline]
    fn vapour_amount_slope(&self, s: &SolvedFlash, i: usize, dbeta_dt: f64) -> f64 {
        if s.water.active {
            return self.water_slope(s, |dv| dv[i]);
        }
        let (st, kv) = (&s.state, &s.kv);
        let (beta, lf) = (st.beta, st.liquid_fraction);
        let k = kv.k[i];
        let d = lf + beta * k;
        (self.z()[i] / d) * (k / d) * (dbeta_dt + beta * lf * kv.dln_k_dt[i])
    }

    /// With a water phase: `f` of the vapour amounts' slopes dvᵢ/dT the flash left, or
    /// infinity where the state is not unique at its T and P (the three-phase temperature
    /// of water and a single organic, where the enthalpy jumps at constant T).
    #[cold]
    fn water_slope(&self, s: &SolvedFlash, f: impl Fn(&[f64]) -> f64) -> f64 {
        if s.water.dv_dt_known {
            f(&s.water.dv_dt)
        } else {
            f64::INFINITY
        }
    }

    /// [`Self::enthalpy_and_slope`] without the second-virial departures: the ideal-gas
    /// vapour's, or the rest of the second virial's.
    #[inline]
    fn ideal_enthalpy_and_slope(&self, m: &EnthalpyModel, s: &SolvedFlash, dbeta_dt: f64) -> (f64, f64) {
        let (table, components) = (m.table(), m.components());
        let t = s.state.t;
        let two_phase = s.state.phase == Phase::TwoPhase;
        let z = self.z();
        let (mut h, mut slope) = (0.0, 0.0);
        for (i, &zi) in z.iter().enumerate() {
            if zi == 0.0 {
                continue;
            }
            let Some(pure) = table.pure(components, i) else {
                continue;
            };
            let (l, v) = self.amounts(s, i);
            let h_liquid = (l > 0.0 || two_phase).then(|| pure.total(Phase::Liquid, t));
            let h_vapour = (v > 0.0 || two_phase).then(|| pure.total(Phase::Vapour, t));
            if l > 0.0 {
                h += l * h_liquid.unwrap_or(0.0);
            }
            if v > 0.0 {
                h += v * h_vapour.unwrap_or(0.0);
            }
            slope += l * pure.slope(Phase::Liquid, t) + v * pure.slope(Phase::Vapour, t);
            if let (true, Some(hl), Some(hv)) = (two_phase, h_liquid, h_vapour) {
                slope += self.vapour_amount_slope(s, i, dbeta_dt) * (hv - hl);
            }
        }
        (h, slope)
    }

    /// The second-virial part of [`Self::enthalpy_and_slope`], apart (and out of line, so
    /// that the ideal-gas loop is compiled as it was): the liquid's departure is a
    /// constant, the vapour's changes with T at constant P, and a two-phase state moves
    /// dvᵢ/dT between them.
    #[inline(never)]
    fn departure_and_slope(&self, departures: Departures<'_>, s: &SolvedFlash, dbeta_dt: f64) -> (f64, f64) {
        let (t, p) = (s.state.t, s.state.p);
        let two_phase = s.state.phase == Phase::TwoPhase;
        let (mut dh, mut dslope) = (0.0, 0.0);
        for (i, &zi) in self.z().iter().enumerate() {
            if zi == 0.0 {
                continue;
            }
            let (l, v) = self.amounts(s, i);
            let liquid = departures.liquid(i);
            let (vapour, vapour_slope) = departures.vapour(i, t, p);
            if l > 0.0 {
                dh += l * liquid;
            }
            if v > 0.0 {
                dh += v * vapour;
            }
            dslope += v * vapour_slope;
            if two_phase {
                dslope += self.vapour_amount_slope(s, i, dbeta_dt) * (vapour - liquid);
            }
        }
        (dh, dslope)
    }

    /// The duty and states of a change from `inlet` to `outlet`; dQ/dT at the outlet where
    /// `outlet_tp` (the outlet was flashed at T and P).
    pub fn summary(&self, inlet: &SolvedFlash, outlet: &SolvedFlash, outlet_tp: bool) -> DutySummary {
        let flow = self.flow();
        let h_in = self.enthalpy(inlet);
        let (h_out, dq) = if outlet_tp {
            let (h, slope) = self.enthalpy_and_slope(outlet);
            // Infinite at a three-phase temperature, where the duty jumps at constant T.
            (h, (slope.is_finite()).then_some(flow * slope))
        } else {
            (self.enthalpy(outlet), None)
        };
        DutySummary {
            duty_w: flow * (h_out - h_in),
            inlet: state_summary(inlet),
            outlet: state_summary(outlet),
            inlet_enthalpy_j_per_mol: h_in,
            outlet_enthalpy_j_per_mol: h_out,
            dduty_dt_out_w_per_k: dq,
        }
    }

    /// Appends the state's rows to the table (their enthalpies add up to
    /// [`Self::enthalpy`]), and the enthalpy correlations' warnings; `warned` keeps one
    /// byte per component across calls.
    fn rows(
        &self,
        state: &'static str,
        s: &SolvedFlash,
        out: &mut Vec<EnthalpyRow>,
        warned: &mut [u8],
        warnings: &mut Vec<Warning>,
    ) {
        let Some(m) = self.ideal() else {
            return self.general_rows(state, s, out, warned, warnings);
        };
        let flow = self.flow();
        let (t, p) = (s.state.t, s.state.p);
        let o = m.options();
        for (i, c) in m.components().iter().enumerate() {
            let (l, v) = self.amounts(s, i);
            for (amount, phase) in [(l, Phase::Liquid), (v, Phase::Vapour)] {
                if amount <= 0.0 {
                    continue;
                }
                let split = m.table().split_at(m.components(), i, phase, t, p);
                let w = &mut warned[i];
                enthalpy_warnings(c, o, phase, t, p, w, warnings);
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
                    vapour_departure_j_per_mol: split.vapour_departure_j_per_mol,
                    excess_j_per_mol: 0.0,
                    enthalpy_flow_w: amount * flow * h,
                });
            }
        }
    }

    /// [`Self::rows`] for any phase-enthalpy model: each row's enthalpy is the component's
    /// partial molar enthalpy in its phase (so the rows still add up to the stream's
    /// enthalpy), split into the ideal base's parts where there is a base, and the rest in
    /// `excess_j_per_mol`.
    fn general_rows(
        &self,
        state: &'static str,
        s: &SolvedFlash,
        out: &mut Vec<EnthalpyRow>,
        warned: &mut [u8],
        warnings: &mut Vec<Warning>,
    ) {
        let flow = self.flow();
        let (t, p) = (s.state.t, s.state.p);
        let n = self.component_count();
        let base = self.base();
        let mut h_bar = vec![0.0; n];
        for (phase, amount, x) in self.phases(s) {
            if amount <= 0.0 {
                continue;
            }
            self.enthalpy.partial_molar_enthalpies(phase, x, t, p, &mut h_bar);
            for (i, c) in self.components().iter().enumerate() {
                let component_amount = amount * x[i];
                if component_amount <= 0.0 {
                    continue;
                }
                let split = match base {
                    Some(m) => {
                        if let Some(bc) = m.components().get(i) {
                            enthalpy_warnings(bc, m.options(), phase, t, p, &mut warned[i], warnings);
                        }
                        m.table().split_at(m.components(), i, phase, t, p)
                    }
                    None => Default::default(),
                };
                let h = h_bar[i];
                out.push(EnthalpyRow {
                    state,
                    component: c.name().to_string(),
                    phase,
                    flow_mol_s: component_amount * flow,
                    enthalpy_j_per_mol: h,
                    liquid_sensible_j_per_mol: split.liquid_sensible_j_per_mol,
                    latent_j_per_mol: split.latent_j_per_mol,
                    vapour_sensible_j_per_mol: split.vapour_sensible_j_per_mol,
                    vapour_departure_j_per_mol: split.vapour_departure_j_per_mol,
                    excess_j_per_mol: h - split.total_j_per_mol(),
                    enthalpy_flow_w: component_amount * flow * h,
                });
            }
        }
    }

    /// The duty along every path; `selected_duty_w` is the one already known for the
    /// model's own path. The other paths' constants are computed here, once each, and each
    /// component's liquid sensible heat once per state for both.
    ///
    /// For a model that adds to an ideal base, the other paths' duties are the selected
    /// duty plus the base's change of duty between the paths (what the model adds does not
    /// depend on the path); for a model with no base, every path gives the selected duty.
    fn path_spread(&self, inlet: &SolvedFlash, outlet: &SolvedFlash, selected_duty_w: f64) -> PathSpread {
        let Some(base) = self.base() else {
            return spread_of([selected_duty_w; 3]);
        };
        let flow = self.flow();
        let o = base.options();
        let (reference, selected, vapour_model) = (o.reference, o.path, o.vapour_model);
        let components = base.components();
        let others: Vec<(VaporisationPath, PathTable)> = VaporisationPath::ALL
            .into_iter()
            .filter(|p| *p != selected)
            .map(|p| (p, PathTable::new(components, reference, p, vapour_model)))
            .collect();
        // Σ over components and phases of amount × enthalpy along each other path: the sum
        // of `enthalpy_with`, in the same order.
        let enthalpies = |s: &SolvedFlash| {
            let t = s.state.t;
            let mut totals = [0.0; 2];
            for i in 0..self.component_count() {
                let (l, v) = self.amounts(s, i);
                if l <= 0.0 && v <= 0.0 {
                    continue;
                }
                let mut liquid = None;
                for ((_, table), total) in others.iter().zip(&mut totals) {
                    let Some(pure) = table.pure(components, i) else {
                        continue;
                    };
                    let mut liquid_to_t = || *liquid.get_or_insert_with(|| pure.liquid_sensible(t));
                    if l > 0.0 {
                        *total += l * pure.total_given(Phase::Liquid, t, &mut liquid_to_t);
                    }
                    if v > 0.0 {
                        *total += v * pure.total_given(Phase::Vapour, t, &mut liquid_to_t);
                    }
                }
            }
            for ((_, table), total) in others.iter().zip(&mut totals) {
                if let Some(v) = table.virial(components) {
                    *total += self.departure(v, s);
                }
            }
            totals
        };
        let (h_in, h_out) = (enthalpies(inlet), enthalpies(outlet));
        // What the model adds to its base, per unit of duty: nothing under ideal mixing.
        let added_w = if self.ideal().is_some() {
            None
        } else {
            Some(selected_duty_w - flow * (self.ideal_enthalpy(base, outlet) - self.ideal_enthalpy(base, inlet)))
        };
        let duty = |path| {
            others
                .iter()
                .position(|(p, _)| *p == path)
                .map_or(selected_duty_w, |k| {
                    let ideal = flow * (h_out[k] - h_in[k]);
                    added_w.map_or(ideal, |a| ideal + a)
                })
        };
        spread_of(VaporisationPath::ALL.map(duty))
    }

    /// The full result: [`Self::summary`]'s numbers with both flash results, the enthalpy
    /// table, the path spread and the warnings.
    pub fn result(&self, inlet: SolvedFlash, outlet: SolvedFlash, outlet_tp: bool) -> DutyResult {
        let summary = self.summary(&inlet, &outlet, outlet_tp);
        let n = self.component_count();
        let mut table = Vec::with_capacity(4 * n);
        let mut row_warnings = Vec::new();
        let mut warned = vec![0u8; n];
        self.rows("inlet", &inlet, &mut table, &mut warned, &mut row_warnings);
        self.rows("outlet", &outlet, &mut table, &mut warned, &mut row_warnings);
        let spread = self.path_spread(&inlet, &outlet, summary.duty_w);
        let inlet = self.flash_result_of(inlet);
        let outlet = self.flash_result_of(outlet);
        let mut warnings = Vec::new();
        for w in inlet.warnings.iter().chain(&outlet.warnings) {
            push_unique(&mut warnings, w.clone());
        }
        for w in row_warnings {
            push_unique(&mut warnings, w);
        }
        DutyResult {
            duty_w: summary.duty_w,
            flow_mol_s: self.flow(),
            inlet_enthalpy_j_per_mol: summary.inlet_enthalpy_j_per_mol,
            outlet_enthalpy_j_per_mol: summary.outlet_enthalpy_j_per_mol,
            table,
            dduty_dt_out_w_per_k: summary.dduty_dt_out_w_per_k,
            path_spread: spread,
            options: self.options(),
            warnings,
            inlet,
            outlet,
        }
    }

    /// The bubble temperature at `p`, searched with `buffers` as scratch.
    pub fn bubble_temperature(&self, p: Pressure, buffers: &mut SolvedFlash) -> Result<f64, EnergyError> {
        if self.water().is_some() {
            self.flash_spec(FlashSpec::BubbleTemperature { pressure: p }, None, buffers)?;
            return Ok(buffers.state.t);
        }
        Ok(saturation_temperature(
            &self.k_model,
            &self.zn,
            p.pascal(),
            true,
            buffers,
        )?)
    }

    /// The dew temperature at `p` (`None`: a non-volatile component means there is none).
    pub fn dew_temperature(&self, p: Pressure, buffers: &mut SolvedFlash) -> Result<Option<f64>, EnergyError> {
        if self.water().is_some() {
            self.flash_spec(FlashSpec::DewTemperature { pressure: p }, None, buffers)?;
            return Ok(Some(buffers.state.t));
        }
        match saturation_temperature(&self.k_model, &self.zn, p.pascal(), false, buffers) {
            Ok(t) => Ok(Some(t)),
            Err(crate::equilibrium::FlashError::NoDewPoint { .. }) => Ok(None),
            Err(e) => Err(e.into()),
        }
    }

    /// With a water phase: the temperature at `p` between `lo` and `hi` where `liquid` first
    /// appears on cooling (its dew point), with the state there (that liquid incipient)
    /// written into `out`; `None` without a water phase or where it does not appear.
    pub fn liquid_dew_temperature(
        &self,
        p: Pressure,
        liquid: Liquid,
        (lo, hi): (f64, f64),
        out: &mut SolvedFlash,
    ) -> Result<Option<f64>, EnergyError> {
        let Some(w) = self.water() else {
            return Ok(None);
        };
        Ok(liquid_appearance_temperature(
            &self.k_model,
            w,
            &self.zn,
            p.pascal(),
            liquid,
            (lo, hi),
            out,
        )?)
    }

    /// Whether dQ/dT at a duty-specified outlet is defined: not where the outlet is
    /// two-phase between bubble and dew points that coincide (a pure component, an
    /// azeotrope), where the duty rises at constant temperature.
    pub fn outlet_has_slope(outlet: &SolvedFlash, t_bub: f64, dew: Option<Option<f64>>) -> bool {
        let at_constant_t =
            outlet.state.phase == Phase::TwoPhase && matches!(dew, Some(Some(t_dew)) if t_dew - t_bub <= 1e-8 * t_dew);
        !at_constant_t
    }

    /// The duty-specified flash: `inlet` flashed into `inlet_out`, and the state at
    /// `outlet_pressure` after `duty` is added into `outlet_out`. Returns the bubble
    /// temperature at the outlet pressure and the dew temperature where the search needed
    /// it (as [`Self::state_for_enthalpy`]).
    pub fn outlet_for_duty(
        &self,
        inlet: StreamState,
        duty: Power,
        outlet_pressure: Pressure,
        inlet_out: &mut SolvedFlash,
        outlet_out: &mut SolvedFlash,
    ) -> Result<(f64, Option<Option<f64>>), EnergyError> {
        self.flash_state("inlet", inlet, inlet_out)?;
        let target = self.enthalpy(inlet_out) + duty.watts() / self.flow();
        let t_bub = self.bubble_temperature(outlet_pressure, outlet_out)?;
        let dew = self.state_for_enthalpy(target, outlet_pressure, t_bub, None, duty.watts(), outlet_out)?;
        Ok((t_bub, dew))
    }

    /// Writes into `out` the state at pressure `p` whose enthalpy is `target` J/mol, given
    /// the bubble temperature at `p` and, where already known, the dew temperature
    /// (`Some(None)`: there is none); an unknown dew temperature is searched for only when
    /// the target lies above the bubble point. Returns the dew temperature as then known.
    pub fn state_for_enthalpy(
        &self,
        target: f64,
        p: Pressure,
        t_bub: f64,
        dew: Option<Option<f64>>,
        duty_w: f64,
        out: &mut SolvedFlash,
    ) -> Result<Option<Option<f64>>, EnergyError> {
        let (z, p_pa) = (self.z(), p.pascal());
        let h_bub = self.saturated_enthalpy(Phase::Liquid, t_bub, p_pa);
        let out_of_reach = || EnergyError::DutyOutOfReach { duty_w };
        let single = |phase: Phase, lo_t: f64, hi_t: f64, out: &mut SolvedFlash| -> Result<(), EnergyError> {
            let h = |t: f64| self.phase_enthalpy(phase, z, t, p_pa) - target;
            let bracket = expand_bracket(h, lo_t, hi_t, SEARCH_MIN_TEMPERATURE_K, SEARCH_MAX_TEMPERATURE_K)
                .ok_or_else(out_of_reach)?;
            let root = bracketed_newton(
                |t| {
                    let (h, slope) = self.phase_enthalpy_and_slope(phase, z, t, p_pa);
                    (h - target, slope)
                },
                bracket.lo,
                bracket.hi,
                bracket.secant(),
                1e-10,
            );
            self.tp_into(root.x, p, out)?;
            out.force_single(phase, z);
            Ok(())
        };
        if target <= h_bub {
            // A T–P flash just below the bubble point is all liquid; clamp there.
            single(Phase::Liquid, t_bub - 10.0, t_bub, out)?;
            return Ok(dew);
        }
        let dew = match dew {
            Some(d) => d,
            None => self.dew_temperature(p, out)?,
        };
        let Some(t_dew) = dew else {
            self.two_phase(target, p, t_bub, SEARCH_MAX_TEMPERATURE_K, out)?;
            return Ok(Some(None));
        };
        let h_dew = self.saturated_enthalpy(Phase::Vapour, t_dew, p_pa);
        if target >= h_dew {
            single(Phase::Vapour, t_dew, t_dew + 10.0, out)?;
        } else if t_dew - t_bub > WIDE_TWO_PHASE_K && self.water().is_none() {
            // (With a water phase the enthalpy can jump at constant temperature, at the
            // three-phase temperature of water and a single organic: vapour fraction, not
            // temperature, pins every state down.)
            // Start where the enthalpy would be if it ran linearly from bubble to dew point.
            let fraction = ((target - h_bub) / (h_dew - h_bub)).clamp(0.01, 0.99);
            let start = t_bub + fraction * (t_dew - t_bub);
            self.two_phase_on_temperature(target, p, t_bub, t_dew, start, out)?;
        } else {
            self.two_phase(target, p, t_bub, t_dew, out)?;
        }
        Ok(Some(Some(t_dew)))
    }

    /// Solves on temperature between the bubble and dew points, Newton with the analytic
    /// dH/dT inside the bracket: used where the two-phase region spans more than
    /// [`WIDE_TWO_PHASE_K`], so that temperature pins the vapour fraction down well. Each
    /// step is one K-value evaluation and one Rachford–Rice solve, in `out`'s buffers.
    fn two_phase_on_temperature(
        &self,
        target: f64,
        p: Pressure,
        t_bub: f64,
        t_dew: f64,
        start: f64,
        out: &mut SolvedFlash,
    ) -> Result<(), EnergyError> {
        const TOLERANCE_K: f64 = 1e-12;
        let mut failure: Option<EnergyError> = None;
        let root = bracketed_newton(
            |t| match self.tp_into(t, p, out) {
                Ok(()) => {
                    let (h, slope) = self.enthalpy_and_slope(out);
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
            TOLERANCE_K,
        );
        if let Some(e) = failure {
            return Err(e);
        }
        // The search ends with a Newton step shorter than its tolerance from the state it
        // last flashed, which is in `out`: that state is the answer to the same tolerance.
        if (root.x - out.state.t).abs() <= TOLERANCE_K {
            return Ok(());
        }
        self.tp_into(root.x, p, out)
    }

    /// Solves on the vapour fraction between the bubble and dew points: temperature may be
    /// flat there (pure components, azeotrope-like narrow boilers), vapour fraction never is.
    fn two_phase(
        &self,
        target: f64,
        p: Pressure,
        t_bub: f64,
        t_dew: f64,
        out: &mut SolvedFlash,
    ) -> Result<(), EnergyError> {
        let at = |beta: f64, out: &mut SolvedFlash| {
            let spec = FlashSpec::PressureVapourFraction {
                pressure: p,
                vapour_fraction: beta.clamp(0.0, 1.0),
            };
            self.flash_spec(spec, Some((t_bub, t_dew)), out)
        };
        let mut failure: Option<EnergyError> = None;
        // The enthalpy rises with β at fixed pressure; its slope there is not at hand, so
        // the search takes secant steps (bracketed, with bisection as the fallback).
        let beta = bracketed_newton(
            |beta: f64| match at(beta, out) {
                Ok(()) => (self.enthalpy(out) - target, f64::NAN),
                Err(e) => {
                    // Stop the search; the error is returned below.
                    failure.get_or_insert(e);
                    (0.0, f64::NAN)
                }
            },
            0.0,
            1.0,
            0.5,
            VAPOUR_FRACTION_TOLERANCE,
        )
        .x;
        if let Some(e) = failure {
            return Err(e);
        }
        at(beta, out)
    }
}

/// The spread of the duties along paths (a), (b) and (c).
fn spread_of([a, b, c]: [f64; 3]) -> PathSpread {
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
