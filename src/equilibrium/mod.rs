//! Equilibrium: K-value models and the flash specifications built on the Rachford–Rice
//! solver.
//!
//! | specification | given | found |
//! |---|---|---|
//! | [`FlashSpec::TemperaturePressure`] | T, P | β, x, y (the isothermal flash) |
//! | [`FlashSpec::BubbleTemperature`] | P | T, incipient vapour y |
//! | [`FlashSpec::BubblePressure`] | T | P, incipient vapour y |
//! | [`FlashSpec::DewTemperature`] | P | T, incipient liquid x |
//! | [`FlashSpec::DewPressure`] | T | P, incipient liquid x |
//! | [`FlashSpec::TemperatureVapourFraction`] | T, β | P, x, y |
//! | [`FlashSpec::PressureVapourFraction`] | P, β | T, x, y |
//!
//! Temperature searches run Newton's method on the logarithm of the bubble or dew sum in
//! the variable 1/T, pressure searches in ln P, always inside a bracket with bisection as a
//! fallback and a hard cap, so they always terminate. For Raoult's law the bubble and dew
//! pressures come out in one Newton step, because their sums are linear in ln P.
//!
//! ```
//! use flashduty::equilibrium::{flash, FlashSpec, Raoult};
//! use flashduty::units::{Pressure, Temperature};
//! let model = Raoult::from_names(&["benzene", "toluene"]).unwrap();
//! let z = [0.5, 0.5];
//! let p = Pressure::parse("P", "1 atm").unwrap();
//! let bubble = flash(&model, &z, FlashSpec::BubbleTemperature { pressure: p }).unwrap();
//! let dew = flash(&model, &z, FlashSpec::DewTemperature { pressure: p }).unwrap();
//! assert!(bubble.temperature_k < dew.temperature_k);
//! let mid = Temperature::new("T", 0.5 * (bubble.temperature_k + dew.temperature_k)).unwrap();
//! let tp = flash(&model, &z, FlashSpec::TemperaturePressure { temperature: mid, pressure: p }).unwrap();
//! assert!(tp.vapour_fraction > 0.0 && tp.vapour_fraction < 1.0);
//! ```
//!
//! Which type describes which state: [`FlashSpec`] is what a flash is asked (what is held
//! fixed); [`FlashResult`] is what it answers; the Rachford–Rice solver's own
//! [`SplitSummary`](crate::rachford_rice::SplitSummary) and
//! [`PhaseSplit`](crate::rachford_rice::PhaseSplit) are a split of z by given K-values alone,
//! with no temperature or pressure. (Inside the crate, a solved flash in reusable buffers is
//! one `SolvedFlash`.)
//!
//! Files: `kvalue.rs` (the [`KValueModel`] trait, [`Raoult`], [`GivenK`]), `spec.rs` (what a
//! flash is asked and what it answers: [`FlashSpec`], [`FlashResult`], [`FlashError`]),
//! `flash.rs` ([`flash`] and the buffer-reusing flash the energy layer runs), `search.rs`
//! (the bubble, dew and vapour-fraction searches), `sensitivity.rs` (dβ/dT, dβ/dP and the
//! vapour amounts' slopes, for composition-independent and composition-dependent models),
//! `tp_flasher.rs` ([`TpFlasher`], the allocation-free T–P flash), `water_phase.rs`
//! ([`WaterPhase`] and [`flash_with_water`]: an immiscible water phase beside the organic
//! liquid, every specification above with up to three phases).

mod azeotrope;
mod flash;
mod kvalue;
mod modified_raoult;
mod search;
mod sensitivity;
mod spec;
mod tp_flasher;
mod water_phase;

pub use azeotrope::{Azeotrope, AzeotropeCondition, azeotropes};
pub use flash::{flash, tp_flash};
pub use kvalue::{GivenK, KValueModel, KValues, Raoult};
pub use modified_raoult::ModifiedRaoult;
pub use spec::{FlashError, FlashResult, FlashSpec, SEARCH_MAX_TEMPERATURE_K, SEARCH_MIN_TEMPERATURE_K, Sensitivity};
pub use tp_flasher::{TpFlasher, tp_flash_into};
pub use water_phase::{WATER_CAS, WaterPhase, WaterSplit, flash_with_water};

pub(crate) use flash::{SolvedFlash, flash_into, flash_result, saturation_temperature};
pub(crate) use modified_raoult::component_keys;
pub(crate) use sensitivity::{amount_slopes, sensitivity};
pub(crate) use water_phase::{
    Liquid, liquid_appearance_temperature, water_flash_into, water_flash_result, water_warnings,
};
