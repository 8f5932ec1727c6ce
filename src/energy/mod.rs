//! Energy: enthalpy against a chosen reference state, heater duty with its enthalpy
//! table, the duty-specified flash, and heating and cooling curves.
//!
//! By default enthalpies are those of an ideal liquid and an ideal-gas vapour: pressure
//! does not enter them, and mixing is ideal (a phase's molar enthalpy is the
//! mole-fraction-weighted sum of the pure-component enthalpies, [`EnthalpyModel`]). The
//! phase split comes from Raoult's law. Both are models behind traits: the `_with`
//! functions ([`heater_duty_with`], [`outlet_for_duty_with`], [`heating_curve_with`]) and
//! [`DutyCalculator::with_models`] take any [`KValueModel`](crate::equilibrium::KValueModel)
//! and any [`PhaseEnthalpyModel`], and dQ/dT then carries the composition dependence of
//! both. [`VapourModel::SecondVirial`], chosen in [`DutyOptions::vapour_model`],
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
//!
//! Which type describes which state: [`StreamState`] is where a heater's inlet or outlet is
//! (T and P, P and β, or T and β: the flash specifications a stream state can be);
//! [`FlashResult`](crate::equilibrium::FlashResult) is a solved state with its compositions,
//! K-values, warnings and sensitivities, as the full functions return it; [`StateSummary`] is
//! the small `Copy` summary of a solved state that [`DutyCalculator`] returns in hot loops.
//!
//! Files: `stream.rs` ([`Stream`], [`StreamState`]), `reference.rs` (reference state,
//! vaporisation path, vapour model), `options.rs` ([`DutyOptions`]), `phase_enthalpy.rs`
//! (the [`PhaseEnthalpyModel`] trait), `ideal.rs` ([`EnthalpyModel`], ideal mixing),
//! `path_table.rs` (its per-component constants), `excess.rs` ([`ExcessEnthalpyModel`], the
//! excess enthalpy of an activity model's liquid), `departure.rs` (the second-virial
//! vapour), `range_warnings.rs` (correlation range warnings), `calc.rs` (the one calculation
//! behind every entry point), `uniqueness.rs` (several outlets for one duty), `result.rs`
//! (results and [`EnergyError`]), `duty.rs` (the full functions), `duty_calculator.rs`
//! ([`DutyCalculator`]).

mod calc;
mod departure;
mod duty;
mod duty_calculator;
mod excess;
mod ideal;
mod options;
mod path_table;
mod phase_enthalpy;
mod range_warnings;
mod reference;
mod result;
mod stream;
mod uniqueness;

pub use duty::{
    heater_duty, heater_duty_with, heating_curve, heating_curve_with, outlet_for_duty, outlet_for_duty_with,
    path_spread,
};
pub use duty_calculator::{DutyCalculator, DutySummary, StateSummary};
pub use excess::ExcessEnthalpyModel;
pub use ideal::{EnthalpyModel, EnthalpySplit};
pub use options::DutyOptions;
pub use phase_enthalpy::PhaseEnthalpyModel;
pub use reference::{ReferencePhase, ReferenceState, VaporisationPath, VapourModel};
pub use result::{Curve, CurvePoint, DutyResult, EnergyError, EnthalpyRow, PathSpread};
pub use stream::{Stream, StreamState};
