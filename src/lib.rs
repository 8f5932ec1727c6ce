//! # flashduty
//!
//! Rachford–Rice isothermal flash and heater duty of ideal (Raoult's-law) mixtures, with
//! every constant traced to a published source.
//!
//! Results are estimates from ideal-mixture models. Check that the models suit your mixture
//! and conditions; equipment design and operation follow the applicable local codes and the
//! judgement of a qualified, licensed engineer.
//!
//! The modules, from the bottom layer up:
//!
//! - [`units`]: quantities with their units (`"65 degC"`, `"3.6 kmol/h"`), SI inside.
//! - [`properties`]: pure-component correlations (vapour pressure, heat capacity, latent
//!   heat, second virial), each with its validity range.
//! - [`library`]: the cited component library and user component files.
//! - [`fit`]: correlations fitted to a user's data, and a checked user component.
//! - [`rachford_rice`]: the Rachford–Rice solver on z and K alone.
//! - [`equilibrium`]: K-value models behind one trait, flashes, bubble and dew points.
//! - [`energy`]: phase-enthalpy models behind one trait, heater duty, duty-specified flash,
//!   curves.
//! - [`case`]: the case schema every front end shares, from keys to outcome JSON.
//! - [`warnings`]: the machine-readable warnings every result carries.
#![deny(missing_docs)]
#![deny(unsafe_code)]

pub mod activity;
pub mod case;
mod difference;
pub mod energy;
pub mod equilibrium;
pub mod fit;
pub mod library;
pub mod properties;
pub mod rachford_rice;
mod solve;
pub mod units;
pub mod warnings;

/// The seeded generator the integration tests and benchmarks share, for the unit tests.
#[cfg(test)]
#[path = "../tests/common/rng.rs"]
mod test_rng;

/// The README's code examples, compiled and run as doc tests.
#[doc = include_str!("../README.md")]
#[cfg(doctest)]
pub struct ReadmeDoctests;
