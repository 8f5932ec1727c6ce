//! The calculation behind every energy entry point: a stream's K-value and enthalpy models,
//! flashes into reusable buffers, stream enthalpies and their temperature slope, and the
//! duty-specified flash. [`heater_duty`](super::heater_duty) and the other functions build
//! their full results from it; [`DutyCalculator`](super::DutyCalculator) keeps one and its
//! buffers for hot loops, so both give the same numbers by construction.

use super::enthalpy::{Departures, PathTable, enthalpy_warnings, virial_warnings};
use super::{
    DutyOptions, DutyResult, DutySummary, EnergyError, EnthalpyRow, PathSpread, StateSummary, Stream, StreamState,
    VaporisationPath,
};
use crate::equilibrium::{
    FlashBuffers, FlashSpec, Raoult, SEARCH_MAX_TEMPERATURE_K, SEARCH_MIN_TEMPERATURE_K, SolvedState, flash_into,
    flash_result, saturation_temperature, sensitivity,
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
const WIDE_TWO_PHASE_K: f64 = 1.0;

/// A flashed state and the buffers holding its K-values and compositions.
#[derive(Debug, Clone)]
pub(crate) struct Solved {
    pub state: SolvedState,
    pub buffers: FlashBuffers,
}

impl Solved {
    pub fn new(n: usize) -> Self {
        Self {
            state: SolvedState::UNSET,
            buffers: FlashBuffers::new(n),
        }
    }

    pub fn summary(&self) -> StateSummary {
        let s = &self.state;
        StateSummary {
            phase: s.phase,
            temperature_k: s.t,
            pressure_pa: s.p,
            vapour_fraction: s.beta,
            liquid_fraction: s.liquid_fraction,
        }
    }

    /// Reports a state found on the single-phase side of a bubble or dew point as that
    /// phase: round-off can put its T–P flash a hair into the two-phase region, where β is
    /// then 1e-15.
    fn force_single(&mut self, phase: Phase, z: &[f64]) {
        let s = &mut self.state;
        if s.phase == phase {
            return;
        }
        s.phase = phase;
        if phase == Phase::Liquid {
            (s.beta, s.liquid_fraction, s.has_liquid, s.has_vapour) = (0.0, 1.0, true, false);
            self.buffers.x.copy_from_slice(z);
        } else {
            (s.beta, s.liquid_fraction, s.has_liquid, s.has_vapour) = (1.0, 0.0, false, true);
            self.buffers.y.copy_from_slice(z);
        }
    }
}

/// The calculator: a stream's K-value and enthalpy models together.
#[derive(Debug, Clone)]
pub(crate) struct Calc<'a> {
    stream: Cow<'a, Stream>,
    /// z as [`crate::equilibrium::flash`] normalises it, so that every flash here is the
    /// one `flash` would do.
    zn: Vec<f64>,
    /// Raoult's law over the stream's components (also the list every enthalpy reads).
    k_model: Raoult,
    /// The enthalpy constants for the reference state, path and vapour model of `options`.
    table: PathTable,
    options: DutyOptions,
}

impl<'a> Calc<'a> {
    /// # Errors
    /// [`EnergyError::Unit`] for a reference temperature that is not finite and positive.
    pub fn new(stream: Cow<'a, Stream>, options: DutyOptions) -> Result<Self, EnergyError> {
        Temperature::new("reference.temperature_k", options.reference.temperature_k)?;
        let z = stream.z();
        let sum = crate::rachford_rice::validate(z, z)?;
        let zn = if sum == 1.0 {
            z.to_vec()
        } else {
            z.iter().map(|v| v / sum).collect()
        };
        let components = stream.components();
        Ok(Self {
            table: PathTable::new(components, options.reference, options.path, options.vapour_model),
            k_model: Raoult::new(components.to_vec()),
            zn,
            stream,
            options,
        })
    }

    /// A calculator borrowing `stream`, and buffers for an inlet and an outlet state.
    pub fn with_states(stream: &'a Stream, options: DutyOptions) -> Result<(Self, Solved, Solved), EnergyError> {
        let calc = Self::new(Cow::Borrowed(stream), options)?;
        let n = calc.component_count();
        Ok((calc, Solved::new(n), Solved::new(n)))
    }

    pub fn stream(&self) -> &Stream {
        &self.stream
    }

    pub fn options(&self) -> DutyOptions {
        self.options
    }

    pub fn component_count(&self) -> usize {
        self.zn.len()
    }

    fn flow(&self) -> f64 {
        self.stream.flow().mol_per_s()
    }

    fn z(&self) -> &[f64] {
        self.stream.z()
    }

    fn components(&self) -> &[Arc<Component>] {
        self.k_model.components()
    }

    /// Flashes `spec` into `out` (the flash [`crate::equilibrium::flash`] does, without
    /// allocating).
    fn flash_spec(&self, spec: FlashSpec, t_bracket: Option<(f64, f64)>, out: &mut Solved) -> Result<(), EnergyError> {
        out.state = flash_into(&self.k_model, &self.zn, spec, t_bracket, &mut out.buffers)?;
        Ok(())
    }

    /// Flashes a heater inlet or outlet state (`which` names it in errors) into `out`.
    ///
    /// # Errors
    /// [`EnergyError::Unit`] for a given temperature outside the 1–10 000 K the energy
    /// calculations work over (the correlations can overflow beyond it); otherwise as the
    /// flash.
    pub fn flash_state(&self, which: &'static str, state: StreamState, out: &mut Solved) -> Result<(), EnergyError> {
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
    fn tp_into(&self, t_k: f64, p: Pressure, out: &mut Solved) -> Result<(), EnergyError> {
        let spec = FlashSpec::TemperaturePressure {
            temperature: Temperature::new("T", t_k)?,
            pressure: p,
        };
        self.flash_spec(spec, None, out)
    }

    /// Amounts of component `i` in the liquid and vapour, per mole of stream.
    #[inline(always)]
    fn amounts(&self, s: &Solved, i: usize) -> (f64, f64) {
        let z = self.z();
        match s.state.phase {
            Phase::Liquid => (z[i], 0.0),
            Phase::Vapour => (0.0, z[i]),
            Phase::TwoPhase => {
                let l = if s.state.has_liquid {
                    s.state.liquid_fraction * s.buffers.x[i]
                } else {
                    0.0
                };
                let v = if s.state.has_vapour {
                    s.state.beta * s.buffers.y[i]
                } else {
                    0.0
                };
                (l, v)
            }
        }
    }

    /// Per mole of stream: Σ over components and phases of amount × enthalpy.
    pub fn enthalpy(&self, s: &Solved) -> f64 {
        let h = self.enthalpy_with(&self.table, s);
        match self.table.virial(self.components()) {
            Some(v) => h + self.departure(v, s),
            None => h,
        }
    }

    /// Per mole of stream: Σ over components and phases of amount × second-virial
    /// departure, at the state's temperature and pressure.
    #[inline(never)]
    fn departure(&self, v: Departures<'_>, s: &Solved) -> f64 {
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

    fn enthalpy_with(&self, table: &PathTable, s: &Solved) -> f64 {
        let t = s.state.t;
        let components = self.components();
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
    fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        self.table
            .phase_enthalpy_at(self.components(), phase, fractions, t_k, p_pa)
    }

    /// d/dT at constant pressure of [`Self::phase_enthalpy`], J/(mol·K).
    #[inline]
    fn phase_slope(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        self.table
            .phase_slope_at(self.components(), phase, fractions, t_k, p_pa)
    }

    /// Adds the second-virial range warnings of the state (none under an ideal-gas
    /// vapour); `warned` keeps one byte per component across calls.
    pub fn vapour_model_warnings(&self, s: &Solved, warned: &mut [u8], out: &mut Vec<Warning>) {
        let o = self.options;
        for (i, c) in self.components().iter().enumerate() {
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
    pub fn flash_warnings(&self, s: &Solved, out: &mut Vec<Warning>) {
        use crate::equilibrium::KValueModel;
        self.k_model.warnings(s.state.t, s.state.p, out);
    }

    /// The stream enthalpy (J/mol, the same sum as [`Self::enthalpy`]) and its analytic
    /// derivative dH/dT at constant pressure (J/(mol·K)) at a state flashed at T and P,
    /// using the K-values and ∂ln K/∂T the flash left in the buffers.
    ///
    /// H = Σ zᵢ hᴸᵢ + Σ vᵢ (hⱽᵢ − hᴸᵢ) with vᵢ = β Kᵢ zᵢ / dᵢ, dᵢ = 1 − β + β Kᵢ, so
    /// dvᵢ/dT = (zᵢ/dᵢ)(Kᵢ/dᵢ) (dβ/dT + β (1 − β) ∂ln Kᵢ/∂T).
    pub fn enthalpy_and_slope(&self, s: &Solved) -> (f64, f64) {
        let dbeta_dt = self.vapour_fraction_slope(s);
        match self.table.virial(self.components()) {
            None => self.ideal_enthalpy_and_slope(s, dbeta_dt),
            Some(departures) => {
                let (h, slope) = self.ideal_enthalpy_and_slope(s, dbeta_dt);
                let (dh, dslope) = self.departure_and_slope(departures, s, dbeta_dt);
                (h + dh, slope + dslope)
            }
        }
    }

    /// dβ/dT at constant pressure of a state flashed at T and P (0 unless two-phase).
    fn vapour_fraction_slope(&self, s: &Solved) -> f64 {
        let st = &s.state;
        if st.phase != Phase::TwoPhase {
            return 0.0;
        }
        sensitivity(&self.zn, &s.buffers.kv, st.beta, st.liquid_fraction).map_or(0.0, |s| s.dvapour_fraction_dt_per_k)
    }

    /// dvᵢ/dT of a two-phase state, from dβ/dT: (zᵢ/dᵢ)(Kᵢ/dᵢ)(dβ/dT + β(1 − β) ∂ln Kᵢ/∂T).
    #[inline]
    fn vapour_amount_slope(&self, s: &Solved, i: usize, dbeta_dt: f64) -> f64 {
        let (st, kv) = (&s.state, &s.buffers.kv);
        let (beta, lf) = (st.beta, st.liquid_fraction);
        let k = kv.k[i];
        let d = lf + beta * k;
        (self.z()[i] / d) * (k / d) * (dbeta_dt + beta * lf * kv.dln_k_dt[i])
    }

    /// [`Self::enthalpy_and_slope`] without the second-virial departures: the ideal-gas
    /// vapour's, or the rest of the second virial's.
    #[inline]
    fn ideal_enthalpy_and_slope(&self, s: &Solved, dbeta_dt: f64) -> (f64, f64) {
        let (table, components) = (&self.table, self.components());
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
    fn departure_and_slope(&self, departures: Departures<'_>, s: &Solved, dbeta_dt: f64) -> (f64, f64) {
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
    pub fn summary(&self, inlet: &Solved, outlet: &Solved, outlet_tp: bool) -> DutySummary {
        let flow = self.flow();
        let h_in = self.enthalpy(inlet);
        let (h_out, dq) = if outlet_tp {
            let (h, slope) = self.enthalpy_and_slope(outlet);
            (h, Some(flow * slope))
        } else {
            (self.enthalpy(outlet), None)
        };
        DutySummary {
            duty_w: flow * (h_out - h_in),
            inlet: inlet.summary(),
            outlet: outlet.summary(),
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
        s: &Solved,
        out: &mut Vec<EnthalpyRow>,
        warned: &mut [u8],
        warnings: &mut Vec<Warning>,
    ) {
        let flow = self.flow();
        let (t, p) = (s.state.t, s.state.p);
        let o = self.options;
        for (i, c) in self.components().iter().enumerate() {
            let (l, v) = self.amounts(s, i);
            for (amount, phase) in [(l, Phase::Liquid), (v, Phase::Vapour)] {
                if amount <= 0.0 {
                    continue;
                }
                let split = self.table.split_at(self.components(), i, phase, t, p);
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
                    enthalpy_flow_w: amount * flow * h,
                });
            }
        }
    }

    /// The duty along every path; `selected_duty_w` is the one already known for the
    /// model's own path. The other paths' constants are computed here, once each, and each
    /// component's liquid sensible heat once per state for both.
    fn path_spread(&self, inlet: &Solved, outlet: &Solved, selected_duty_w: f64) -> PathSpread {
        let flow = self.flow();
        let (reference, selected, vapour_model) =
            (self.options.reference, self.options.path, self.options.vapour_model);
        let components = self.components();
        let others: Vec<(VaporisationPath, PathTable)> = VaporisationPath::ALL
            .into_iter()
            .filter(|p| *p != selected)
            .map(|p| (p, PathTable::new(components, reference, p, vapour_model)))
            .collect();
        // Σ over components and phases of amount × enthalpy along each other path: the sum
        // of `enthalpy_with`, in the same order.
        let enthalpies = |s: &Solved| {
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
        let duty = |path| {
            others
                .iter()
                .position(|(p, _)| *p == path)
                .map_or(selected_duty_w, |k| flow * (h_out[k] - h_in[k]))
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

    /// The full result: [`Self::summary`]'s numbers with both flash results, the enthalpy
    /// table, the path spread and the warnings.
    pub fn result(&self, inlet: Solved, outlet: Solved, outlet_tp: bool) -> DutyResult {
        let summary = self.summary(&inlet, &outlet, outlet_tp);
        let n = self.component_count();
        let mut table = Vec::with_capacity(4 * n);
        let mut row_warnings = Vec::new();
        let mut warned = vec![0u8; n];
        self.rows("inlet", &inlet, &mut table, &mut warned, &mut row_warnings);
        self.rows("outlet", &outlet, &mut table, &mut warned, &mut row_warnings);
        let spread = self.path_spread(&inlet, &outlet, summary.duty_w);
        let inlet = flash_result(&self.k_model, &self.zn, &inlet.state, inlet.buffers);
        let outlet = flash_result(&self.k_model, &self.zn, &outlet.state, outlet.buffers);
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
            options: self.options,
            warnings,
            inlet,
            outlet,
        }
    }

    /// The bubble temperature at `p`, searched with `buffers` as scratch.
    pub fn bubble_temperature(&self, p: Pressure, buffers: &mut FlashBuffers) -> Result<f64, EnergyError> {
        Ok(saturation_temperature(
            &self.k_model,
            &self.zn,
            p.pascal(),
            true,
            buffers,
        )?)
    }

    /// The dew temperature at `p` (`None`: a non-volatile component means there is none).
    pub fn dew_temperature(&self, p: Pressure, buffers: &mut FlashBuffers) -> Result<Option<f64>, EnergyError> {
        match saturation_temperature(&self.k_model, &self.zn, p.pascal(), false, buffers) {
            Ok(t) => Ok(Some(t)),
            Err(crate::equilibrium::FlashError::NoDewPoint { .. }) => Ok(None),
            Err(e) => Err(e.into()),
        }
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
        inlet_out: &mut Solved,
        outlet_out: &mut Solved,
    ) -> Result<(f64, Option<Option<f64>>), EnergyError> {
        self.flash_state("inlet", inlet, inlet_out)?;
        let target = self.enthalpy(inlet_out) + duty.watts() / self.flow();
        let t_bub = self.bubble_temperature(outlet_pressure, &mut outlet_out.buffers)?;
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
        out: &mut Solved,
    ) -> Result<Option<Option<f64>>, EnergyError> {
        let (z, p_pa) = (self.z(), p.pascal());
        let h_bub = self.saturated_enthalpy(Phase::Liquid, t_bub, p_pa);
        let out_of_reach = || EnergyError::DutyOutOfReach { duty_w };
        let single = |phase: Phase, lo_t: f64, hi_t: f64, out: &mut Solved| -> Result<(), EnergyError> {
            let h = |t: f64| self.phase_enthalpy(phase, z, t, p_pa) - target;
            let bracket = expand_bracket(h, lo_t, hi_t, SEARCH_MIN_TEMPERATURE_K, SEARCH_MAX_TEMPERATURE_K)
                .ok_or_else(out_of_reach)?;
            let root = bracketed_newton(
                |t| (h(t), self.phase_slope(phase, z, t, p_pa)),
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
            None => self.dew_temperature(p, &mut out.buffers)?,
        };
        let Some(t_dew) = dew else {
            self.two_phase(target, p, t_bub, SEARCH_MAX_TEMPERATURE_K, out)?;
            return Ok(Some(None));
        };
        let h_dew = self.saturated_enthalpy(Phase::Vapour, t_dew, p_pa);
        if target >= h_dew {
            single(Phase::Vapour, t_dew, t_dew + 10.0, out)?;
        } else if t_dew - t_bub > WIDE_TWO_PHASE_K {
            // Start where the enthalpy would be if it ran linearly from bubble to dew point.
            let fraction = ((target - h_bub) / (h_dew - h_bub)).clamp(0.01, 0.99);
            let start = t_bub + fraction * (t_dew - t_bub);
            self.two_phase_on_temperature(target, p, t_bub, t_dew, start, out)?;
        } else {
            self.two_phase(target, p, t_bub, t_dew, out)?;
        }
        Ok(Some(Some(t_dew)))
    }

    /// A [`Warning::OutletNotUnique`] where the duty-specified outlet at `t_out` (enthalpy
    /// `target` J/mol, pressure `p`) is not the only state with that enthalpy; `scratch`
    /// holds the flashes of the search.
    ///
    /// Only the stream-temperature path can have several: its vapour enthalpy carries the
    /// latent heat at T, which falls to zero at Tc with an unbounded slope, so a vapour's
    /// enthalpy has a cusp-shaped minimum at every component's Tc, and so has a two-phase
    /// mixture's where that Tc lies between the bubble and dew points. (Along the other
    /// paths the latent heat is taken at a fixed temperature.) The two-phase region
    /// (`t_bub` to `t_dew`, wider than [`WIDE_TWO_PHASE_K`]) and the vapour branch above
    /// `t_dew` are searched, each cut at the critical temperatures inside it
    /// ([`crossings`]); the liquid's enthalpy rises with T. Nothing is searched unless the
    /// enthalpy at some Tc is below the target.
    pub fn outlet_uniqueness(
        &self,
        target: f64,
        t_out: f64,
        (t_bub, t_dew): (f64, f64),
        p: Pressure,
        scratch: &mut Solved,
    ) -> Option<Warning> {
        if self.options.path != VaporisationPath::StreamTemperature {
            return None;
        }
        let (z, p_pa) = (self.z(), p.pascal());
        let mut cusps: Vec<(f64, usize)> = self
            .components()
            .iter()
            .enumerate()
            .filter(|&(i, _)| z[i] > 0.0)
            .map(|(i, c)| (c.critical_temperature_k(), i))
            .filter(|&(tc, _)| tc > t_bub && tc < SEARCH_MAX_TEMPERATURE_K)
            .collect();
        cusps.sort_by(|a, b| a.0.total_cmp(&b.0));
        let (inside, above) = cusps.split_at(cusps.partition_point(|c| c.0 <= t_dew));
        // A narrow two-phase region is solved on β, not searched on T.
        let inside = if t_dew - t_bub > WIDE_TWO_PHASE_K { inside } else { &[] };
        let mut failed = false;
        let mut mixture = |t: f64| match self.tp_into(t, p, scratch) {
            Ok(()) => {
                let (h, slope) = self.enthalpy_and_slope(scratch);
                (h - target, slope)
            }
            Err(_) => {
                failed = true;
                (f64::NAN, f64::NAN)
            }
        };
        let mut vapour = |t: f64| {
            let h = self.phase_enthalpy(Phase::Vapour, z, t, p_pa) - target;
            (h, self.phase_slope(Phase::Vapour, z, t, p_pa))
        };
        // The first critical temperature where the enthalpy falls below the target.
        let dip = inside
            .iter()
            .find(|c| mixture(c.0).0 < 0.0)
            .or_else(|| above.iter().find(|c| vapour(c.0).0 < 0.0))
            .copied();
        let (tc, index) = dip?;
        let mut outlets = Vec::new();
        if !inside.is_empty() {
            let cuts: Vec<f64> = inside.iter().map(|c| c.0).collect();
            crossings(&mut mixture, t_bub, t_dew, &cuts, &mut outlets);
        }
        let cuts: Vec<f64> = above.iter().map(|c| c.0).collect();
        crossings(&mut vapour, t_dew, SEARCH_MAX_TEMPERATURE_K, &cuts, &mut outlets);
        if failed {
            return None;
        }
        let others: Vec<f64> = outlets.into_iter().filter(|t| (t - t_out).abs() > 1e-6).collect();
        if others.is_empty() {
            return None;
        }
        Some(Warning::OutletNotUnique {
            component: self.components()[index].name().to_string(),
            critical_temperature_k: tc,
            outlet_temperature_k: t_out,
            other_outlet_temperatures_k: others,
        })
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
        out: &mut Solved,
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
    fn two_phase(&self, target: f64, p: Pressure, t_bub: f64, t_dew: f64, out: &mut Solved) -> Result<(), EnergyError> {
        let (lo, hi) = (0.0, 1.0);
        let at = |beta: f64, out: &mut Solved| {
            let spec = FlashSpec::PressureVapourFraction {
                pressure: p,
                vapour_fraction: beta.clamp(0.0, 1.0),
            };
            self.flash_spec(spec, Some((t_bub, t_dew)), out)
        };
        let mut failure: Option<EnergyError> = None;
        let beta = {
            let mut f = |beta: f64| match at(beta, out) {
                Ok(()) => self.enthalpy(out) - target,
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
        at(beta, out)
    }
}

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

/// Adds to `out` the temperatures in (`lo`, `hi`) where `f` (value and slope in T) crosses
/// zero, for an `f` that between consecutive `cusps` (ascending, inside the interval) rises
/// to one peak and falls into the next cusp: each piece's peak is found by bisection on the
/// sign of the slope (just below a cusp the slope is unbounded below), and each rise and
/// fall through zero is solved by bracketed Newton. A NaN value finds nothing.
fn crossings(f: &mut impl FnMut(f64) -> (f64, f64), lo: f64, hi: f64, cusps: &[f64], out: &mut Vec<f64>) {
    const TOLERANCE_K: f64 = 1e-10;
    let mut a = lo;
    for &b in cusps.iter().chain([&hi]) {
        let top = if b == hi { b } else { b * (1.0 - 1e-12) };
        let peak = if f(top).1 >= 0.0 {
            top
        } else if f(a).1 <= 0.0 {
            a
        } else {
            let (mut l, mut h) = (a, top);
            while h - l > 1e-9 * h {
                let mid = 0.5 * (l + h);
                if f(mid).1 > 0.0 { l = mid } else { h = mid }
            }
            l
        };
        if f(peak).0 > 0.0 {
            if f(a).0 < 0.0 {
                out.push(bracketed_newton(&mut *f, a, peak, 0.5 * (a + peak), TOLERANCE_K).x);
            }
            if f(b).0 < 0.0 {
                out.push(
                    bracketed_newton(
                        |t| {
                            let (v, d) = f(t);
                            (-v, -d)
                        },
                        peak,
                        b,
                        0.5 * (peak + b),
                        TOLERANCE_K,
                    )
                    .x,
                );
            }
        }
        a = b;
    }
}
