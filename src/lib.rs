//! # flashduty
//!
//! Rachford–Rice isothermal flash and heater duty of ideal (Raoult's-law) mixtures, with
//! every constant traced to a published source.
//!
//! Results are estimates from ideal-mixture models. Check that the models suit your mixture
//! and conditions; equipment design and operation follow the applicable local codes and the
//! judgement of a qualified, licensed engineer.
//!
//! The layers, from the bottom up: [`units`] (quantities), [`properties`] (pure-component
//! correlations), [`library`] (the cited component data).
#![deny(missing_docs)]
#![deny(unsafe_code)]

pub mod case;
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
