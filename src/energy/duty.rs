//! The full energy functions: [`heater_duty`], [`outlet_for_duty`], [`heating_curve`] and
//! [`path_spread`] with the library's default models (Raoult's law and the ideal-mixing
//! [`EnthalpyModel`](super::EnthalpyModel)), and their `_with` forms, which take any K-value and phase-enthalpy
//! model.

use super::calc::Calc;
use super::options::DutyOptions;
use super::phase_enthalpy::PhaseEnthalpyModel;
use super::reference::VaporisationPath;
use super::result::{Curve, CurvePoint, DutyResult, EnergyError, PathSpread};
use super::stream::{Stream, StreamState};
use crate::equilibrium::KValueModel;
use crate::equilibrium::{Liquid, SEARCH_MAX_TEMPERATURE_K, SEARCH_MIN_TEMPERATURE_K, SolvedFlash};
use crate::rachford_rice::Phase;
use crate::units::{Power, Pressure};
use std::borrow::Cow;

/// The duty to take `stream` from `inlet` to `outlet`, with both phase splits and the
/// enthalpy table.
///
/// For many duties of one stream in a loop, [`DutyCalculator`](super::DutyCalculator) gives the same numbers
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
    duty_of(&Calc::new(Cow::Borrowed(stream), options)?, inlet, outlet)
}

/// [`heater_duty`] with any K-value model and phase-enthalpy model, each with as many
/// components as the stream (the stream gives z, the flow and the names).
///
/// The flashes run on `k_model` (with its outer composition loop where K depends on
/// composition) and every enthalpy comes from `enthalpy`; dQ/dT carries the composition
/// dependence of both (the sensitivities of [`crate::equilibrium`] and the partial molar
/// enthalpies). With [`Raoult`](crate::equilibrium::Raoult) and the [`EnthalpyModel`](super::EnthalpyModel) of `options` it is
/// [`heater_duty`], to the bit.
///
/// # Errors
/// As [`heater_duty`], and [`EnergyError::Flash`] with
/// [`FlashError::ComponentCount`](crate::equilibrium::FlashError::ComponentCount) when a
/// model's component count is not the stream's.
///
/// ```
/// use flashduty::energy::{heater_duty, heater_duty_with, DutyOptions, EnthalpyModel, Stream, StreamState};
/// use flashduty::equilibrium::Raoult;
/// use flashduty::units::{MolarFlow, Pressure, Temperature};
/// let s = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
/// let k = Raoult::new(s.components().to_vec());
/// let h = EnthalpyModel::from_options(s.components().to_vec(), DutyOptions::default());
/// let a = heater_duty_with(&s, &k, &h, at("25 degC"), at("95 degC")).unwrap();
/// let b = heater_duty(&s, at("25 degC"), at("95 degC"), DutyOptions::default()).unwrap();
/// assert_eq!(a.duty_w, b.duty_w);
/// ```
pub fn heater_duty_with<K: KValueModel + ?Sized, H: PhaseEnthalpyModel + ?Sized>(
    stream: &Stream,
    k_model: &K,
    enthalpy: &H,
    inlet: StreamState,
    outlet: StreamState,
) -> Result<DutyResult, EnergyError> {
    duty_of(
        &Calc::with_models(Cow::Borrowed(stream), k_model, enthalpy)?,
        inlet,
        outlet,
    )
}

fn duty_of<K: KValueModel, H: PhaseEnthalpyModel>(
    calc: &Calc<'_, K, H>,
    inlet: StreamState,
    outlet: StreamState,
) -> Result<DutyResult, EnergyError> {
    let n = calc.component_count();
    let (mut inlet_s, mut outlet_s) = (SolvedFlash::new(n), SolvedFlash::new(n));
    calc.flash_state("inlet", inlet, &mut inlet_s)?;
    calc.flash_state("outlet", outlet, &mut outlet_s)?;
    Ok(calc.result(inlet_s, outlet_s, outlet.is_temperature_pressure()))
}

/// The duty-specified flash: the outlet state at `outlet_pressure` after `duty` is added
/// to `stream` at `inlet` (zero duty: the adiabatic flash).
///
/// Below the bubble point and above the dew point it solves for temperature; between them
/// it solves on the vapour fraction (bracketed secant steps, with bisection as a
/// fallback), so pure components and narrow-boiling mixtures, whose temperature is
/// flat across the two-phase region, are handled. It always terminates.
///
/// Each step of the temperature search is one K-value evaluation and one Rachford–Rice
/// solve in reused buffers, with dH/dT from the same K-values; the full result is built
/// once, at the end. [`DutyCalculator::outlet_for_duty`](super::DutyCalculator::outlet_for_duty) runs the same search without it.
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
    outlet_of(
        &Calc::new(Cow::Borrowed(stream), options)?,
        inlet,
        duty,
        outlet_pressure,
    )
}

/// [`outlet_for_duty`] with any K-value model and phase-enthalpy model (see
/// [`heater_duty_with`]).
///
/// # Errors
/// As [`outlet_for_duty`] and [`heater_duty_with`].
///
/// ```
/// use flashduty::energy::{outlet_for_duty_with, DutyOptions, EnthalpyModel, Stream, StreamState};
/// use flashduty::equilibrium::Raoult;
/// use flashduty::units::{MolarFlow, Power, Pressure, Temperature};
/// let s = Stream::from_names(&["water"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let inlet = StreamState::TemperaturePressure { temperature: Temperature::parse("T", "20 degC").unwrap(), pressure: p };
/// let k = Raoult::new(s.components().to_vec());
/// let h = EnthalpyModel::from_options(s.components().to_vec(), DutyOptions::default());
/// let r = outlet_for_duty_with(&s, &k, &h, inlet, Power::parse("duty", "26 kW").unwrap(), p).unwrap();
/// assert!(r.outlet.vapour_fraction > 0.4 && r.outlet.vapour_fraction < 0.6);
/// ```
pub fn outlet_for_duty_with<K: KValueModel + ?Sized, H: PhaseEnthalpyModel + ?Sized>(
    stream: &Stream,
    k_model: &K,
    enthalpy: &H,
    inlet: StreamState,
    duty: Power,
    outlet_pressure: Pressure,
) -> Result<DutyResult, EnergyError> {
    outlet_of(
        &Calc::with_models(Cow::Borrowed(stream), k_model, enthalpy)?,
        inlet,
        duty,
        outlet_pressure,
    )
}

fn outlet_of<K: KValueModel, H: PhaseEnthalpyModel>(
    calc: &Calc<'_, K, H>,
    inlet: StreamState,
    duty: Power,
    outlet_pressure: Pressure,
) -> Result<DutyResult, EnergyError> {
    let n = calc.component_count();
    let (mut inlet_s, mut outlet_s) = (SolvedFlash::new(n), SolvedFlash::new(n));
    let (t_bub, dew) = calc.outlet_for_duty(inlet, duty, outlet_pressure, &mut inlet_s, &mut outlet_s)?;
    let t_out = outlet_s.state.t;
    let slope = Calc::<K, H>::outlet_has_slope(&outlet_s, t_bub, dew);
    let mut result = calc.result(inlet_s, outlet_s, slope);
    // Report the duty asked for; the computed one agrees to the solver tolerance.
    result.duty_w = duty.watts();
    if calc
        .base()
        .is_some_and(|b| b.path() == VaporisationPath::StreamTemperature)
    {
        // The search needs the dew point (for a liquid outlet not yet known; none: nothing
        // vaporises, no other outlet; a failed search only skips the check).
        let mut scratch = SolvedFlash::new(calc.component_count());
        let dew = match dew {
            Some(dew) => dew,
            None => calc.dew_temperature(outlet_pressure, &mut scratch).ok().flatten(),
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
    curve_of(&Calc::new(Cow::Borrowed(stream), options)?, inlet, outlet, points)
}

/// [`heating_curve`] with any K-value model and phase-enthalpy model (see
/// [`heater_duty_with`]).
///
/// # Errors
/// As [`heating_curve`] and [`heater_duty_with`].
///
/// ```
/// use flashduty::energy::{heating_curve_with, DutyOptions, EnthalpyModel, Stream, StreamState};
/// use flashduty::equilibrium::Raoult;
/// use flashduty::units::{MolarFlow, Pressure, Temperature};
/// let s = Stream::from_names(&["benzene", "toluene"], &[0.5, 0.5], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
/// let k = Raoult::new(s.components().to_vec());
/// let h = EnthalpyModel::from_options(s.components().to_vec(), DutyOptions::default());
/// let c = heating_curve_with(&s, &k, &h, at("60 degC"), at("130 degC"), 11).unwrap();
/// assert_eq!(c.points.len(), 13);
/// ```
pub fn heating_curve_with<K: KValueModel + ?Sized, H: PhaseEnthalpyModel + ?Sized>(
    stream: &Stream,
    k_model: &K,
    enthalpy: &H,
    inlet: StreamState,
    outlet: StreamState,
    points: usize,
) -> Result<Curve, EnergyError> {
    if points < 2 {
        return Err(EnergyError::TooFewPoints { value: points });
    }
    curve_of(
        &Calc::with_models(Cow::Borrowed(stream), k_model, enthalpy)?,
        inlet,
        outlet,
        points,
    )
}

/// The curve of [`heating_curve`]; the callers have checked `points` (before building the
/// calculator, so that too few points is the error reported first).
fn curve_of<K: KValueModel, H: PhaseEnthalpyModel>(
    calc: &Calc<'_, K, H>,
    inlet: StreamState,
    outlet: StreamState,
    points: usize,
) -> Result<Curve, EnergyError> {
    let n = calc.component_count();
    let (mut inlet_s, mut outlet_s, mut work) = (SolvedFlash::new(n), SolvedFlash::new(n), SolvedFlash::new(n));
    calc.flash_state("inlet", inlet, &mut inlet_s)?;
    calc.flash_state("outlet", outlet, &mut outlet_s)?;
    let p = Pressure::new("P", outlet_s.state.p)?;
    let flow = calc.stream().flow().mol_per_s();
    let h_in = calc.enthalpy(&inlet_s);
    let total = flow * (calc.enthalpy(&outlet_s) - h_in);
    let t_bub = calc.bubble_temperature(p, &mut work)?;
    let t_dew = calc.dew_temperature(p, &mut work)?;
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
    let mut liquid_dews = [None, None];
    if calc.water().is_some() {
        // Each liquid's dew point: where it appears on cooling. The higher is the dew
        // point; the enthalpy at the lower is that of the state with the other liquid
        // present and this one incipient.
        breaks.truncate(1);
        let hi = t_dew.map_or(SEARCH_MAX_TEMPERATURE_K, |t| (t + 1.0).min(SEARCH_MAX_TEMPERATURE_K));
        for (k, (liquid, name)) in [(Liquid::Aqueous, "water-dew"), (Liquid::Organic, "organic-dew")]
            .into_iter()
            .enumerate()
        {
            // From a kelvin below the bubble point to one above the dew point: a liquid that
            // appears right at either (at a three-phase temperature, or first at the dew
            // point) is then bracketed whatever the sign round-off gives there.
            let lo = (t_bub - 1.0).max(SEARCH_MIN_TEMPERATURE_K);
            if let Some(t) = calc.liquid_dew_temperature(p, liquid, (lo, hi), &mut work)? {
                liquid_dews[k] = Some(t);
                let q = flow * (calc.enthalpy(&work) - h_in);
                if inside(q) {
                    out.push(CurvePoint {
                        temperature_k: t,
                        duty_w: q,
                        vapour_fraction: work.state.beta,
                        breakpoint: name,
                    });
                }
            }
        }
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
        water_dew_temperature_k: liquid_dews[0],
        organic_dew_temperature_k: liquid_dews[1],
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
