//! Runs a checked case through the library and collects what it returns. No calculation
//! lives here: only the choice of library call for the keys given, and the shaping of the
//! results for output (`to_json` here, human-readable text in `text.rs`).

use super::error::{CaseError, CaseResult, bail};
use super::parse::{Case, Command, ComponentFlow, StateInput, TotalFlow, WaterPhaseInput};
use crate::activity::{BinaryParameters, LiquidModel};
use crate::energy::{
    Curve, DutyOptions, DutyResult, EnthalpyModel, EnthalpyRow, ExcessEnthalpyModel, Stream, StreamState, VapourModel,
    heater_duty, heater_duty_with, heating_curve, heating_curve_with, outlet_for_duty, outlet_for_duty_with,
};
use crate::equilibrium::{
    Azeotrope, AzeotropeCondition, FlashResult, FlashSpec, KValueModel, ModifiedRaoult, Raoult, Sensitivity, WATER_CAS,
    WaterPhase, WaterSplit, azeotropes, component_keys, flash, flash_with_water,
};
use crate::library::Library;
use crate::properties::Component;
use crate::rachford_rice::{Phase, rachford_rice};
use crate::units::{MolarFlow, Pressure};
use crate::warnings::Warning;
use serde_json::{Value, json};
use std::sync::Arc;

/// The caution every human-readable report and the help end with.
pub const CAUTION: &str = "Caution: these results are estimates from ideal-mixture models (Raoult's law, \
ideal liquid, ideal-gas vapour, at most a second-virial correction to the vapour's enthalpy) or, where a liquid model \
is named, from an activity-coefficient model whose parameters are fitted to limited data. Check that the models suit your mixture and conditions; equipment design and \
operation follow the applicable local codes and the judgement of a qualified, licensed engineer.";

/// Default number of curve points.
pub const DEFAULT_POINTS: usize = 21;

/// The feed of a case, resolved against the library.
#[derive(Debug, Clone)]
pub struct Feed {
    /// Component names as the library spells them (or as given, for a flash with given K).
    pub names: Option<Vec<String>>,
    /// The stream (absent for a flash with given K-values).
    pub stream: Option<Stream>,
    /// Overall mole fractions, normalised.
    pub z: Vec<f64>,
    /// Total molar flow, mol/s, when a flow was given (or implied by component flows).
    pub flow_mol_s: Option<f64>,
    /// Warnings about the feed as given (mole fractions normalised).
    pub warnings: Vec<Warning>,
    /// The unit the total flow (or the component flows) was given in, where one was.
    pub flow_unit: Option<String>,
    /// The liquid model the case runs with.
    pub liquid_model: LiquidModel,
}

/// How far from 1 typed mole fractions may sum and still be normalised (with a warning):
/// 0.3333 three times is 0.9999.
pub const TYPED_SUM_TOLERANCE: f64 = 1e-3;

/// Mole fractions as typed: refused where their sum is more than [`TYPED_SUM_TOLERANCE`]
/// from 1, normalised with a [`Warning::CompositionNormalised`] added to `warnings` where
/// it is off at all (beyond round-off). Front ends that take z outside a case (the tool's
/// batch fast path) call it too, so they normalise exactly as a case does.
///
/// ```
/// use flashduty::case::typed_z;
/// let mut w = Vec::new();
/// let z = typed_z(&[0.3333, 0.3333, 0.3333], &mut w).unwrap();
/// assert!((z.iter().sum::<f64>() - 1.0).abs() < 1e-15 && w.len() == 1);
/// assert_eq!(typed_z(&[0.5, 0.4], &mut w).unwrap_err().kind(), "mole-fraction-sum");
/// ```
pub fn typed_z(z: &[f64], warnings: &mut Vec<Warning>) -> CaseResult<Vec<f64>> {
    let sum: f64 = z.iter().sum();
    if !sum.is_finite() || (sum - 1.0).abs() > TYPED_SUM_TOLERANCE {
        return Err(CaseError::with_kind(
            "mole-fraction-sum",
            format!(
                "z: mole fractions sum to {sum}, not 1 (within {TYPED_SUM_TOLERANCE}); give flows instead to have them normalised"
            ),
        ));
    }
    if (sum - 1.0).abs() > 1e-9 {
        warnings.push(Warning::CompositionNormalised { sum });
        Ok(z.iter().map(|v| v / sum).collect())
    } else {
        Ok(z.to_vec())
    }
}

/// A flash-like state ready for output.
#[derive(Debug, Clone, PartialEq)]
pub struct State {
    /// The phase.
    pub phase: Phase,
    /// β.
    pub vapour_fraction: f64,
    /// 1 − β.
    pub liquid_fraction: f64,
    /// Temperature, K (absent for a flash with given K and no T).
    pub t_k: Option<f64>,
    /// Pressure, Pa.
    pub p_pa: Option<f64>,
    /// Liquid mole fractions, where there is liquid (or an incipient liquid).
    pub x: Option<Vec<f64>>,
    /// Vapour mole fractions.
    pub y: Option<Vec<f64>>,
    /// K-values.
    pub k: Vec<f64>,
    /// Solver steps.
    pub iterations: u32,
    /// dβ/dT and dβ/dP when two-phase (and K depends on T and P).
    pub sensitivity: Option<Sensitivity>,
    /// Warnings.
    pub warnings: Vec<Warning>,
    /// With a water phase: the phase set, organic and aqueous amounts and the aqueous
    /// composition (`x` is then the organic liquid).
    pub water: Option<WaterSplit>,
}

impl From<&FlashResult> for State {
    fn from(r: &FlashResult) -> Self {
        Self {
            phase: r.phase,
            vapour_fraction: r.vapour_fraction,
            liquid_fraction: r.liquid_fraction,
            t_k: Some(r.temperature_k),
            p_pa: Some(r.pressure_pa),
            x: r.liquid.clone(),
            y: r.vapour.clone(),
            k: r.k_values.clone(),
            iterations: r.iterations,
            sensitivity: r.sensitivity,
            warnings: r.warnings.clone(),
            water: r.water_phase.clone(),
        }
    }
}

/// One phase's flows: the phase's share of the stream, its mass flow, molar mass and
/// component flows.
#[derive(Debug, Clone, PartialEq)]
pub struct PhaseFlow {
    /// `"liquid"`, `"vapour"`, or with a water phase `"organic"` and `"aqueous"`.
    pub phase: &'static str,
    /// Molar flow of the phase, mol/s.
    pub flow_mol_s: f64,
    /// Mass flow of the phase, kg/s.
    pub mass_flow_kg_s: f64,
    /// Mean molar mass of the phase, g/mol.
    pub molar_mass_g_per_mol: f64,
    /// Each component's molar flow in the phase, mol/s.
    pub component_flows_mol_s: Vec<f64>,
}

/// The flows of each phase present in `s` for a stream of `components` at `flow_mol_s`.
pub fn phase_flows(components: &[Arc<Component>], flow_mol_s: f64, s: &State) -> Vec<PhaseFlow> {
    let mut out = Vec::new();
    let mut add = |phase: &'static str, amount: f64, x: Option<&Vec<f64>>| {
        let Some(x) = x else {
            return;
        };
        if amount.is_nan() || amount <= 0.0 || x.len() != components.len() {
            return;
        }
        let m: f64 = x
            .iter()
            .zip(components)
            .map(|(xi, c)| xi * c.molar_mass_g_per_mol())
            .sum();
        let n = flow_mol_s * amount;
        out.push(PhaseFlow {
            phase,
            flow_mol_s: n,
            mass_flow_kg_s: n * m * 1e-3,
            molar_mass_g_per_mol: m,
            component_flows_mol_s: x.iter().map(|xi| n * xi).collect(),
        });
    };
    match &s.water {
        None => add("liquid", s.liquid_fraction, s.x.as_ref()),
        Some(w) => {
            add("organic", w.organic_fraction, s.x.as_ref());
            add("aqueous", w.aqueous_fraction, w.aqueous.as_ref());
        }
    }
    add("vapour", s.vapour_fraction, s.y.as_ref());
    out
}

fn phases_json(flows: &[PhaseFlow]) -> Value {
    Value::Object(
        flows
            .iter()
            .map(|f| {
                (
                    f.phase.to_string(),
                    json!({
                        "flow_mol_s": f.flow_mol_s,
                        "mass_flow_kg_s": f.mass_flow_kg_s,
                        "molar_mass_g_per_mol": f.molar_mass_g_per_mol,
                        "component_flows_mol_s": f.component_flows_mol_s,
                    }),
                )
            })
            .collect(),
    )
}

/// What a flash, bubble or dew command found.
#[derive(Debug, Clone)]
pub struct FlashOutcome {
    /// The command.
    pub command: Command,
    /// What was held fixed, e.g. "T and P given".
    pub spec: &'static str,
    /// The feed.
    pub feed: Feed,
    /// The state.
    pub state: State,
    /// Whether the K-values were given rather than computed.
    pub given_k: bool,
}

/// What a duty command found.
#[derive(Debug, Clone)]
pub struct DutyOutcome {
    /// The feed.
    pub feed: Feed,
    /// The library's result.
    pub result: DutyResult,
    /// Whether the duty was given and the outlet found.
    pub duty_given: bool,
}

/// What a curve command found.
#[derive(Debug, Clone)]
pub struct CurveOutcome {
    /// The feed.
    pub feed: Feed,
    /// The curve.
    pub curve: Curve,
    /// The inlet and outlet states (the outlet found from the duty when one was given).
    pub inlet: State,
    /// The outlet state.
    pub outlet: State,
    /// The vapour model the curve used.
    pub vapour_model: VapourModel,
}

/// What `azeotropes` found.
#[derive(Debug, Clone)]
pub struct AzeotropeOutcome {
    /// The feed (the two components; z is not used).
    pub feed: Feed,
    /// The pressure (Pa) or temperature (K) given, as (`"P_Pa"` or `"T_K"`, value).
    pub given: (&'static str, f64),
    /// The azeotropes, by rising x of the first component.
    pub azeotropes: Vec<Azeotrope>,
    /// The pure components' boiling points (K) or vapour pressures (Pa) at the condition.
    pub pure: Vec<f64>,
    /// Warnings of the model at the azeotropes and the pure-component ends.
    pub warnings: Vec<Warning>,
}

/// The result of any case command.
#[derive(Debug, Clone)]
pub enum Outcome {
    /// flash, bubble, dew.
    Flash(FlashOutcome),
    /// duty.
    Duty(DutyOutcome),
    /// curve.
    Curve(CurveOutcome),
    /// azeotropes.
    Azeotropes(AzeotropeOutcome),
}

/// The library the tool uses: the built-in one plus any `--components` files.
pub fn library(files: &[std::path::PathBuf]) -> CaseResult<Library> {
    let mut lib = Library::try_builtin().map_err(|e| CaseError::new(format!("built-in library: {e}")))?;
    for f in files {
        lib.add_path(f)?;
    }
    Ok(lib)
}

/// The components named (library names, synonyms or CAS numbers), each error naming its
/// place (`components[1]: unknown component ...`) with the library's kind; a component named
/// twice is refused.
///
/// ```
/// use flashduty::case::components;
/// use flashduty::library::Library;
/// let e = components(Library::builtin(), &["benzene".into(), "unobtainium".into()]).unwrap_err();
/// assert_eq!((e.kind(), e.field()), ("unknown-component", Some("components[1]")));
/// ```
pub fn components(lib: &Library, names: &[String]) -> CaseResult<Vec<Arc<Component>>> {
    let mut out: Vec<Arc<Component>> = Vec::with_capacity(names.len());
    for (i, n) in names.iter().enumerate() {
        // The library's kind (`unknown-component`) is kept; the message is unchanged.
        let c = lib
            .get(n)
            .map_err(|e| CaseError::from(e.clone()).context(format!("components[{i}]")))?;
        if let Some(j) = out.iter().position(|o| o.name() == c.name()) {
            bail!("components[{i}]: '{n}' is {} again (already components[{j}])", c.name());
        }
        out.push(Arc::clone(c));
    }
    Ok(out)
}

/// Builds the feed: the components, their mole fractions (or flows) and the total flow.
pub fn feed(lib: &Library, case: &Case) -> CaseResult<Feed> {
    let Some(names) = &case.components else {
        bail!(
            "components: missing (give the component names or CAS numbers, or z and K for a flash with given K-values)"
        );
    };
    let comps = components(lib, names)?;
    let n = comps.len();
    let mut warnings = Vec::new();
    let stream = match (&case.z, &case.flows) {
        (Some(_), Some(_)) => bail!("z and flows: give one of them, not both"),
        (None, None) => bail!("z: missing (give z, the mole fractions, or flows, the component flows)"),
        (Some(z), None) => {
            if z.len() != n {
                bail!("z: {} mole fractions given for {n} components", z.len());
            }
            let z = &typed_z(z, &mut warnings)?;
            let flow = match case.flow {
                Some(TotalFlow::Molar(m)) => m,
                _ => MolarFlow::new("flow", 1.0)?,
            };
            let s = Stream::new(comps, z, flow)?;
            match case.flow {
                Some(TotalFlow::Mass(m)) => s.with_mass_flow(m)?,
                _ => s,
            }
        }
        (None, Some(flows)) => {
            if flows.len() != n {
                bail!("flows: {} component flows given for {n} components", flows.len());
            }
            if case.flow.is_some() {
                bail!("flow: not used with flows (the component flows give the total)");
            }
            let molar: Vec<f64> = flows
                .iter()
                .zip(&comps)
                .map(|(f, c)| match *f {
                    ComponentFlow::Molar(x) => x,
                    ComponentFlow::Mass(kg_s) => kg_s / (c.molar_mass_g_per_mol() * 1e-3),
                })
                .collect();
            Stream::from_component_flows(comps, &molar)?
        }
    };
    let stream = match &case.water_phase {
        Some(input) => with_water_phase(stream, input)?,
        None => stream,
    };
    let flow_given = case.flow.is_some() || case.flows.is_some();
    Ok(Feed {
        names: Some(stream.components().iter().map(|c| c.name().to_string()).collect()),
        z: stream.z().to_vec(),
        flow_mol_s: flow_given.then(|| stream.flow().mol_per_s()),
        stream: Some(stream),
        warnings,
        flow_unit: case.flow_unit.clone(),
        liquid_model: case.liquid_model,
    })
}

/// The stream with the case's water phase: water must be in the feed, and every named
/// solubility must be of an organic component of the feed.
fn with_water_phase(stream: Stream, input: &WaterPhaseInput) -> CaseResult<Stream> {
    let comps = stream.components();
    let Some(w) = comps.iter().position(|c| c.cas() == WATER_CAS) else {
        bail!("water_phase: the feed holds no water (add water to components, or leave water_phase out)");
    };
    if stream.z()[w] <= 0.0 {
        bail!("water_phase: the feed holds no water (its mole fraction is 0; leave water_phase out)");
    }
    let mut water = WaterPhase::immiscible(comps)?.with_water_in_organic(input.water_in_organic)?;
    for (name, x) in &input.organic_in_water {
        let field = format!("water_phase.organic_in_water.{name}");
        let found = comps.iter().position(|c| {
            c.name().eq_ignore_ascii_case(name.trim())
                || c.cas() == name.trim()
                || c.synonyms().iter().any(|s| s.eq_ignore_ascii_case(name.trim()))
        });
        match found {
            Some(i) if i == w => bail!(
                "{field}: water is the water phase itself; give its solubility in the organic liquid as water_in_organic"
            ),
            Some(i) => water = water.with_solubility_in_water(i, *x)?,
            None => bail!("{field}: '{name}' is not a component of the feed"),
        }
    }
    Ok(stream.with_water_phase(water))
}

fn which(state: &StateInput) -> String {
    let mut given = Vec::new();
    if state.t.is_some() {
        given.push("T");
    }
    if state.p.is_some() {
        given.push("P");
    }
    if state.vapour_fraction.is_some() {
        given.push("vapour_fraction");
    }
    if given.is_empty() {
        "nothing".to_string()
    } else {
        given.join(", ")
    }
}

/// The library's state for an inlet or outlet given by two of T, P and vapour fraction.
pub fn stream_state(field: &str, s: &StateInput) -> CaseResult<StreamState> {
    Ok(match (s.t, s.p, s.vapour_fraction) {
        (Some(temperature), Some(pressure), None) => StreamState::TemperaturePressure { temperature, pressure },
        (None, Some(pressure), Some(vapour_fraction)) => StreamState::PressureVapourFraction {
            pressure,
            vapour_fraction,
        },
        (Some(temperature), None, Some(vapour_fraction)) => StreamState::TemperatureVapourFraction {
            temperature,
            vapour_fraction,
        },
        _ => bail!("{field}: give two of T, P and vapour_fraction (got {})", which(s)),
    })
}

fn k_flash(case: &Case) -> CaseResult<FlashOutcome> {
    let Some(k) = &case.k else {
        bail!("K: missing");
    };
    if case.flows.is_some() {
        bail!("flows: a flash with given K-values takes z (mole fractions), not flows");
    }
    if case.vapour_fraction.is_some() {
        bail!("vapour_fraction: not used with given K-values (the flash finds it from z and K)");
    }
    let Some(z) = &case.z else {
        bail!("z: missing (a flash with given K-values needs z and K)");
    };
    if let Some(names) = &case.components
        && names.len() != z.len()
    {
        bail!(
            "components: {} names given for {} mole fractions in z",
            names.len(),
            z.len()
        );
    }
    let flow = match case.flow {
        None => None,
        Some(TotalFlow::Molar(m)) => Some(m.mol_per_s()),
        Some(TotalFlow::Mass(_)) => {
            bail!("flow: a mass flow needs molar masses; with given K-values give a molar flow (e.g. '3.6 kmol/h')")
        }
    };
    let mut warnings = Vec::new();
    let z = typed_z(z, &mut warnings)?;
    let split = rachford_rice(&z, k)?;
    let state = State {
        phase: split.phase,
        vapour_fraction: split.vapour_fraction,
        liquid_fraction: split.liquid_fraction,
        t_k: case.t.map(|t| t.kelvin()),
        p_pa: case.p.map(|p| p.pascal()),
        x: split.liquid.clone(),
        y: split.vapour.clone(),
        k: k.clone(),
        iterations: split.iterations,
        sensitivity: None,
        warnings: warnings.clone(),
        water: None,
    };
    Ok(FlashOutcome {
        command: Command::Flash,
        spec: "z and K given",
        feed: Feed {
            names: case.components.clone(),
            stream: None,
            z,
            flow_mol_s: flow,
            warnings,
            flow_unit: None,
            liquid_model: LiquidModel::Ideal,
        },
        state,
        given_k: true,
    })
}

/// The models of a case with a non-ideal liquid (`liquid_model` other than ideal): the
/// modified Raoult's law and the excess enthalpy of one activity model over the stream's
/// components, with the case's `binary_parameters` added to the built-in set.
///
/// # Errors
/// A parameter file that cannot be read, a pair naming a component not in the case, or
/// UNIQUAC without r and q.
pub fn liquid_models(case: &Case, stream: &Stream) -> CaseResult<Option<(ModifiedRaoult, ExcessEnthalpyModel)>> {
    if case.liquid_model == LiquidModel::Ideal {
        return Ok(None);
    }
    let set = match &case.binary_parameters {
        Some(input) => input.load()?,
        None => BinaryParameters::builtin().clone(),
    };
    let comps = stream.components().to_vec();
    let keys = component_keys(&comps);
    set.check_user_pairs(|name| {
        let name = name.trim().to_lowercase();
        keys.iter().any(|k| k.contains(&name))
    })?;
    let k_model = ModifiedRaoult::new(comps.clone(), case.liquid_model, &set)?;
    let enthalpy = ExcessEnthalpyModel::new(
        EnthalpyModel::from_options(comps, options(case)),
        k_model.activity().clone(),
    )
    .ok_or_else(|| CaseError::new("liquid_model: the activity model and the stream differ in components"))?;
    Ok(Some((k_model, enthalpy)))
}

fn flash_with(
    feed: Feed,
    case: &Case,
    command: Command,
    spec_name: &'static str,
    spec: FlashSpec,
) -> CaseResult<FlashOutcome> {
    let Some(stream) = &feed.stream else {
        bail!("components: missing");
    };
    let model = Raoult::new(stream.components().to_vec());
    let r = match (stream.water_phase(), liquid_models(case, stream)?) {
        (_, Some((k_model, _))) => flash(&k_model, &feed.z, spec)?,
        (Some(w), None) => flash_with_water(&model, w, &feed.z, spec)?,
        (None, None) => flash(&model, &feed.z, spec)?,
    };
    let mut state = State::from(&r);
    state.warnings.splice(0..0, feed.warnings.iter().cloned());
    Ok(FlashOutcome {
        command,
        spec: spec_name,
        state,
        feed,
        given_k: false,
    })
}

fn flash_case(lib: &Library, case: &Case) -> CaseResult<FlashOutcome> {
    if case.k.is_some() {
        return k_flash(case);
    }
    let feed = feed(lib, case)?;
    let (name, spec) = match (case.t, case.p, case.vapour_fraction) {
        (Some(temperature), Some(pressure), None) => (
            "T and P given",
            FlashSpec::TemperaturePressure { temperature, pressure },
        ),
        (Some(temperature), None, Some(vapour_fraction)) => (
            "T and vapour fraction given",
            FlashSpec::TemperatureVapourFraction {
                temperature,
                vapour_fraction,
            },
        ),
        (None, Some(pressure), Some(vapour_fraction)) => (
            "P and vapour fraction given",
            FlashSpec::PressureVapourFraction {
                pressure,
                vapour_fraction,
            },
        ),
        _ => bail!(
            "flash: give two of T, P and vapour_fraction, or z and K (got {})",
            which(&StateInput {
                t: case.t,
                p: case.p,
                vapour_fraction: case.vapour_fraction
            })
        ),
    };
    flash_with(feed, case, Command::Flash, name, spec)
}

fn saturation_case(lib: &Library, case: &Case, command: Command) -> CaseResult<FlashOutcome> {
    let feed = feed(lib, case)?;
    let bubble = command == Command::Bubble;
    let (name, spec) = match (case.t, case.p) {
        (Some(temperature), None) => (
            "T given, P found",
            if bubble {
                FlashSpec::BubblePressure { temperature }
            } else {
                FlashSpec::DewPressure { temperature }
            },
        ),
        (None, Some(pressure)) => (
            "P given, T found",
            if bubble {
                FlashSpec::BubbleTemperature { pressure }
            } else {
                FlashSpec::DewTemperature { pressure }
            },
        ),
        (Some(_), Some(_)) => bail!("{}: give T or P, not both (the other is found)", command.name()),
        (None, None) => bail!("{}: give T or P (the other is found)", command.name()),
    };
    flash_with(feed, case, command, name, spec)
}

fn options(case: &Case) -> DutyOptions {
    DutyOptions {
        reference: case.reference.unwrap_or_default(),
        path: case.path.unwrap_or_default(),
        vapour_model: case.vapour_model.unwrap_or_default(),
    }
}

fn stream_of(feed: &Feed) -> CaseResult<&Stream> {
    feed.stream
        .as_ref()
        .ok_or_else(|| CaseError::new("components: missing"))
}

/// Runs the duty (or duty-specified) calculation of a case.
fn duty_result(feed: &Feed, case: &Case) -> CaseResult<(DutyResult, bool)> {
    let stream = stream_of(feed)?;
    let Some(inlet) = &case.inlet else {
        bail!("inlet: missing (give inlet.T and inlet.P, or two of T, P and vapour_fraction)");
    };
    let inlet = stream_state("inlet", inlet)?;
    let Some(outlet) = &case.outlet else {
        bail!("outlet: missing (give the outlet state, or duty and outlet.P)");
    };
    let opts = options(case);
    let models = liquid_models(case, stream)?;
    match case.duty {
        Some(duty) => {
            let (None, Some(p), None) = (outlet.t, outlet.p, outlet.vapour_fraction) else {
                bail!(
                    "outlet: with duty given, give outlet.P only (got {}); the outlet state is found",
                    which(outlet)
                );
            };
            let r = match &models {
                Some((k, h)) => outlet_for_duty_with(stream, k, h, inlet, duty, p)?,
                None => outlet_for_duty(stream, inlet, duty, p, opts)?,
            };
            Ok((r, true))
        }
        None => {
            let outlet = stream_state("outlet", outlet)?;
            let r = match &models {
                Some((k, h)) => heater_duty_with(stream, k, h, inlet, outlet)?,
                None => heater_duty(stream, inlet, outlet, opts)?,
            };
            Ok((r, false))
        }
    }
}

fn duty_case(lib: &Library, case: &Case) -> CaseResult<DutyOutcome> {
    let feed = feed(lib, case)?;
    let (mut result, duty_given) = duty_result(&feed, case)?;
    result.warnings.splice(0..0, feed.warnings.iter().cloned());
    if !result.duty_w.is_finite() {
        bail!("duty: the result is not a finite number (is the flow absurdly large?)");
    }
    Ok(DutyOutcome {
        feed,
        result,
        duty_given,
    })
}

fn curve_case(lib: &Library, case: &Case, points: Option<usize>) -> CaseResult<CurveOutcome> {
    let feed = feed(lib, case)?;
    let stream = stream_of(&feed)?;
    let points = points.or(case.points).unwrap_or(DEFAULT_POINTS);
    let (ends, _) = duty_result(&feed, case)?;
    let Some(inlet_input) = &case.inlet else {
        bail!("inlet: missing");
    };
    let inlet = stream_state("inlet", inlet_input)?;
    // The outlet as the library found it; a two-phase outlet is given by its vapour
    // fraction, which stays well defined where the temperature is flat (pure components).
    let out = &ends.outlet;
    let p = Pressure::new("outlet.P", out.pressure_pa)?;
    let outlet = match (&case.outlet, case.duty) {
        (Some(o), None) => stream_state("outlet", o)?,
        _ if out.phase == Phase::TwoPhase => StreamState::PressureVapourFraction {
            pressure: p,
            vapour_fraction: out.vapour_fraction,
        },
        _ => StreamState::TemperaturePressure {
            temperature: crate::units::Temperature::new("outlet.T", out.temperature_k)?,
            pressure: p,
        },
    };
    let mut curve = match liquid_models(case, stream)? {
        Some((k, h)) => heating_curve_with(stream, &k, &h, inlet, outlet, points)?,
        None => heating_curve(stream, inlet, outlet, points, options(case))?,
    };
    curve.warnings.splice(0..0, feed.warnings.iter().cloned());
    if curve
        .points
        .iter()
        .any(|p| !(p.duty_w.is_finite() && p.temperature_k.is_finite()))
    {
        bail!("curve: a point is not a finite number (is the flow absurdly large?)");
    }
    Ok(CurveOutcome {
        inlet: State::from(&ends.inlet),
        outlet: State::from(&ends.outlet),
        vapour_model: options(case).vapour_model,
        feed,
        curve,
    })
}

fn azeotrope_case(lib: &Library, case: &Case) -> CaseResult<AzeotropeOutcome> {
    let Some(names) = &case.components else {
        bail!("components: missing (give the two components of the binary)");
    };
    if names.len() != 2 {
        bail!(
            "components: {} given; azeotropes are listed for a binary (give two)",
            names.len()
        );
    }
    let comps = components(lib, names)?;
    let stream = Stream::new(comps.clone(), &[0.5, 0.5], MolarFlow::new("flow", 1.0)?)?;
    let (condition, given, spec_of) = match (case.t, case.p) {
        (None, Some(p)) => (
            AzeotropeCondition::Pressure(p),
            ("P_Pa", p.pascal()),
            FlashSpec::BubbleTemperature { pressure: p },
        ),
        (Some(t), None) => (
            AzeotropeCondition::Temperature(t),
            ("T_K", t.kelvin()),
            FlashSpec::BubblePressure { temperature: t },
        ),
        (Some(_), Some(_)) => bail!("azeotropes: give T or P, not both (the other is found)"),
        (None, None) => bail!("azeotropes: give T or P (the other is found)"),
    };
    let raoult = Raoult::new(comps);
    let models = liquid_models(case, &stream)?;
    let model: &dyn KValueModel = match &models {
        Some((k, _)) => k,
        None => &raoult,
    };
    let azeotropes = azeotropes(model, condition)?;
    let mut warnings = Vec::new();
    let mut pure = Vec::new();
    for z in [[1.0, 0.0], [0.0, 1.0]] {
        let r = flash(model, &z, spec_of)?;
        pure.push(if given.0 == "P_Pa" {
            r.temperature_k
        } else {
            r.pressure_pa
        });
    }
    for az in &azeotropes {
        model.warnings(az.temperature_k, az.pressure_pa, &mut warnings);
    }
    model.feed_warnings(&[0.5, 0.5], &mut warnings);
    Ok(AzeotropeOutcome {
        feed: Feed {
            names: Some(stream.components().iter().map(|c| c.name().to_string()).collect()),
            z: vec![0.5, 0.5],
            flow_mol_s: None,
            stream: Some(stream),
            warnings: Vec::new(),
            flow_unit: None,
            liquid_model: case.liquid_model,
        },
        given,
        azeotropes,
        pure,
        warnings,
    })
}

/// Runs `command` on a checked case. `points` overrides the case's curve points.
pub fn run(lib: &Library, command: Command, case: &Case, points: Option<usize>) -> CaseResult<Outcome> {
    Ok(match command {
        Command::Flash => Outcome::Flash(flash_case(lib, case)?),
        Command::Bubble | Command::Dew => Outcome::Flash(saturation_case(lib, case, command)?),
        Command::Duty => Outcome::Duty(duty_case(lib, case)?),
        Command::Curve => Outcome::Curve(curve_case(lib, case, points)?),
        Command::Azeotropes => Outcome::Azeotropes(azeotrope_case(lib, case)?),
    })
}

// ---------------------------------------------------------------------------------------
// JSON

/// Warnings as JSON: the library's tagged form plus a readable `message`.
pub fn warnings_json(ws: &[Warning]) -> Value {
    Value::Array(
        ws.iter()
            .map(|w| {
                let mut v = serde_json::to_value(w).unwrap_or(Value::Null);
                if let Value::Object(m) = &mut v {
                    m.insert("message".into(), json!(w.to_string()));
                }
                v
            })
            .collect(),
    )
}

/// A flash-like object.
pub fn state_json(names: Option<&[String]>, s: &State) -> Value {
    let mut v = json!({
        "phase": s.phase.to_string(),
        "vapour_fraction": s.vapour_fraction,
        "liquid_fraction": s.liquid_fraction,
        "T_K": s.t_k,
        "P_Pa": s.p_pa,
        "components": names,
        "x": s.x,
        "y": s.y,
        "K": s.k,
        "iterations": s.iterations,
        "sensitivity": s.sensitivity.map(|d| json!({
            "dvapour_fraction_dT_per_K": d.dvapour_fraction_dt_per_k,
            "dvapour_fraction_dP_per_Pa": d.dvapour_fraction_dp_per_pa,
        })),
        "warnings": warnings_json(&s.warnings),
    });
    if let (Value::Object(m), Some(w)) = (&mut v, &s.water) {
        m.insert("phase_set".into(), json!(w.phase_set.name()));
        m.insert("organic_fraction".into(), json!(w.organic_fraction));
        m.insert("aqueous_fraction".into(), json!(w.aqueous_fraction));
        m.insert("x_aqueous".into(), json!(w.aqueous));
    }
    if let Value::Object(m) = &mut v {
        // At a bubble point the vapour is incipient; at a dew point the liquid is.
        if s.phase == Phase::Liquid && s.y.is_some() {
            m.insert("incipient_phase".into(), json!("vapour"));
        } else if s.phase == Phase::Vapour && s.x.is_some() {
            m.insert("incipient_phase".into(), json!("liquid"));
        }
    }
    v
}

impl Feed {
    /// An enthalpy-table row's flow in `unit` (the unit the input's flow was typed in), mass
    /// units through the row's component's molar mass.
    pub fn row_flow_in_unit(&self, row: &EnthalpyRow, unit: &str) -> Option<f64> {
        let molar_mass = self
            .stream
            .as_ref()
            .and_then(|s| s.components().iter().find(|c| c.name() == row.component))
            .map(|c| c.molar_mass_g_per_mol() * 1e-3);
        flow_in_unit(row.flow_mol_s, molar_mass, unit)
    }
}

/// A component's molar flow (mol/s) in the unit the input's flow was given in: a molar
/// unit directly, a mass unit through the molar mass (kg/mol).
pub fn flow_in_unit(flow_mol_s: f64, molar_mass_kg_per_mol: Option<f64>, unit: &str) -> Option<f64> {
    use crate::units::{QuantityKind, from_si};
    from_si(QuantityKind::MolarFlow, "flow", flow_mol_s, unit)
        .ok()
        .or_else(|| {
            from_si(
                QuantityKind::MassFlow,
                "flow",
                flow_mol_s * molar_mass_kg_per_mol?,
                unit,
            )
            .ok()
        })
}

fn row_json(r: &EnthalpyRow) -> Value {
    json!({
        "state": r.state,
        "component": r.component,
        "phase": r.phase.to_string(),
        "flow_mol_s": r.flow_mol_s,
        "h_J_per_mol": r.enthalpy_j_per_mol,
        "liquid_sensible_J_per_mol": r.liquid_sensible_j_per_mol,
        "latent_J_per_mol": r.latent_j_per_mol,
        "vapour_sensible_J_per_mol": r.vapour_sensible_j_per_mol,
        "vapour_departure_J_per_mol": r.vapour_departure_j_per_mol,
        "excess_J_per_mol": r.excess_j_per_mol,
        "enthalpy_flow_W": r.enthalpy_flow_w,
    })
}

fn options_json(o: &DutyOptions) -> (Value, Value, Value) {
    let phase = match o.reference.phase {
        crate::energy::ReferencePhase::Liquid => "liquid",
        crate::energy::ReferencePhase::Vapour => "vapour",
    };
    (
        json!({"phase": phase, "T_K": o.reference.temperature_k}),
        json!(o.path.name()),
        json!(o.vapour_model.name()),
    )
}

impl Outcome {
    /// The command that produced it.
    pub fn command(&self) -> Command {
        match self {
            Outcome::Flash(f) => f.command,
            Outcome::Duty(_) => Command::Duty,
            Outcome::Curve(_) => Command::Curve,
            Outcome::Azeotropes(_) => Command::Azeotropes,
        }
    }

    /// The feed the outcome is of.
    pub fn feed(&self) -> &Feed {
        match self {
            Outcome::Flash(f) => &f.feed,
            Outcome::Duty(d) => &d.feed,
            Outcome::Curve(c) => &c.feed,
            Outcome::Azeotropes(a) => &a.feed,
        }
    }

    /// The result as one JSON object (the keys of docs/CLI.md).
    pub fn to_json(&self) -> Value {
        let mut v = match self {
            Outcome::Flash(f) => {
                let mut v = state_json(f.feed.names.as_deref(), &f.state);
                if let Value::Object(m) = &mut v {
                    m.insert("specification".into(), json!(f.spec));
                    m.insert("z".into(), json!(f.feed.z));
                    m.insert("K_given".into(), json!(f.given_k));
                    if let Some(flow) = f.feed.flow_mol_s {
                        m.insert("flow_mol_s".into(), json!(flow));
                        m.insert("liquid_flow_mol_s".into(), json!(flow * f.state.liquid_fraction));
                        m.insert("vapour_flow_mol_s".into(), json!(flow * f.state.vapour_fraction));
                        if let Some(w) = &f.state.water {
                            m.insert("organic_flow_mol_s".into(), json!(flow * w.organic_fraction));
                            m.insert("aqueous_flow_mol_s".into(), json!(flow * w.aqueous_fraction));
                        }
                        if let Some(stream) = &f.feed.stream {
                            let flows = phase_flows(stream.components(), flow, &f.state);
                            m.insert("phases".into(), phases_json(&flows));
                        }
                    }
                }
                v
            }
            Outcome::Duty(d) => {
                let r = &d.result;
                let names = d.feed.names.as_deref();
                let (reference, path, vapour_model) = options_json(&r.options);
                let with_phases = |s: &FlashResult| {
                    let state = State::from(s);
                    let mut v = state_json(names, &state);
                    if let (Value::Object(m), Some(stream)) = (&mut v, &d.feed.stream) {
                        m.insert(
                            "phases".into(),
                            phases_json(&phase_flows(stream.components(), r.flow_mol_s, &state)),
                        );
                    }
                    v
                };
                let table: Vec<Value> = r
                    .table
                    .iter()
                    .map(|row| {
                        let mut v = row_json(row);
                        if let (Value::Object(m), Some(unit)) = (&mut v, &d.feed.flow_unit)
                            && let Some(x) = d.feed.row_flow_in_unit(row, unit)
                        {
                            m.insert("flow_in_unit".into(), json!(x));
                            m.insert("flow_unit".into(), json!(unit));
                        }
                        v
                    })
                    .collect();
                json!({
                    "duty_W": r.duty_w,
                    "duty_given": d.duty_given,
                    "flow_mol_s": r.flow_mol_s,
                    "components": names,
                    "z": d.feed.z,
                    "inlet": with_phases(&r.inlet),
                    "outlet": with_phases(&r.outlet),
                    "inlet_h_J_per_mol": r.inlet_enthalpy_j_per_mol,
                    "outlet_h_J_per_mol": r.outlet_enthalpy_j_per_mol,
                    "table": table,
                    "path_spread": {
                        "boiling_point_W": r.path_spread.boiling_point_w,
                        "stream_temperature_W": r.path_spread.stream_temperature_w,
                        "reference_temperature_W": r.path_spread.reference_temperature_w,
                        "spread_W": r.path_spread.spread_w,
                        "relative": r.path_spread.relative,
                    },
                    "dduty_dT_out_W_per_K": r.dduty_dt_out_w_per_k,
                    "reference": reference,
                    "path": path,
                    "vapour_model": vapour_model,
                    "warnings": warnings_json(&r.warnings),
                })
            }
            Outcome::Curve(c) => {
                let names = c.feed.names.as_deref();
                let points: Vec<Value> = c
                    .curve
                    .points
                    .iter()
                    .map(|p| {
                        json!({
                            "T_K": p.temperature_k,
                            "duty_W": p.duty_w,
                            "vapour_fraction": p.vapour_fraction,
                            "breakpoint": if p.breakpoint.is_empty() { Value::Null } else { json!(p.breakpoint) },
                        })
                    })
                    .collect();
                json!({
                    "points": points,
                    "bubble_T_K": c.curve.bubble_temperature_k,
                    "dew_T_K": c.curve.dew_temperature_k,
                    "water_dew_T_K": c.curve.water_dew_temperature_k,
                    "organic_dew_T_K": c.curve.organic_dew_temperature_k,
                    "P_Pa": c.curve.pressure_pa,
                    "duty_W": c.curve.duty_w,
                    "components": names,
                    "z": c.feed.z,
                    "inlet": state_json(names, &c.inlet),
                    "outlet": state_json(names, &c.outlet),
                    "vapour_model": c.vapour_model.name(),
                    "warnings": warnings_json(&c.curve.warnings),
                })
            }
            Outcome::Azeotropes(a) => {
                let list: Vec<Value> = a
                    .azeotropes
                    .iter()
                    .map(|az| {
                        json!({
                            "x": az.x,
                            "T_K": az.temperature_k,
                            "P_Pa": az.pressure_pa,
                            "kind": if az.maximum_boiling { "maximum-boiling" } else { "minimum-boiling" },
                        })
                    })
                    .collect();
                let pure_key = if a.given.0 == "P_Pa" {
                    "pure_boiling_T_K"
                } else {
                    "pure_vapour_pressure_Pa"
                };
                json!({
                    "components": a.feed.names,
                    (a.given.0): a.given.1,
                    "azeotropes": list,
                    "count": a.azeotropes.len(),
                    "azeotrope_T_K": a.azeotropes.iter().map(|z| z.temperature_k).collect::<Vec<_>>(),
                    "azeotrope_P_Pa": a.azeotropes.iter().map(|z| z.pressure_pa).collect::<Vec<_>>(),
                    "azeotrope_x1": a.azeotropes.iter().map(|z| z.x[0]).collect::<Vec<_>>(),
                    (pure_key): a.pure,
                    "warnings": warnings_json(&a.warnings),
                })
            }
        };
        if let Value::Object(m) = &mut v {
            m.insert("command".into(), json!(self.command().name()));
            m.insert("liquid_model".into(), json!(self.feed().liquid_model.name()));
            m.insert("caution".into(), json!(CAUTION));
        }
        v
    }
}
