//! Activity-coefficient models of the liquid: Wilson, NRTL and UNIQUAC, each from its
//! original paper, with analytic temperature derivatives, and the binary parameters they
//! take.
//!
//! A model gives ln γᵢ(T, x) and ∂ln γᵢ/∂T. From them the equilibrium layer builds the
//! modified Raoult's law Kᵢ = γᵢ Psatᵢ / P
//! ([`ModifiedRaoult`](crate::equilibrium::ModifiedRaoult)), and the energy layer the
//! excess enthalpy Hᴱ = −RT² Σ xᵢ ∂ln γᵢ/∂T (Gibbs–Helmholtz), whose partial molar form is
//! h̄ᴱᵢ = −RT² ∂ln γᵢ/∂T ([`ExcessEnthalpyModel`](crate::energy::ExcessEnthalpyModel)).
//!
//! Every pair parameter is an interaction energy held constant in temperature, as the three
//! papers write them (λᵢⱼ − λᵢᵢ, gᵢⱼ − gⱼⱼ, uᵢⱼ − uⱼⱼ); the temperature enters through 1/RT.
//! Parameter files give them in J/mol, cal/mol or kelvin (the energy over R), see
//! [`BinaryParameters`].
//!
//! ```
//! use flashduty::activity::{ActivityModel, BinaryParameters, LiquidModel};
//! let pairs = BinaryParameters::builtin();
//! let m = ActivityModel::new(LiquidModel::Nrtl, &["ethanol", "water"], pairs).unwrap();
//! let (mut ln_gamma, mut slope) = ([0.0; 2], [0.0; 2]);
//! m.ln_gamma(351.0, &[0.1, 0.9], &mut ln_gamma, &mut slope);
//! // Dilute ethanol in water is strongly non-ideal: γ well above 3.
//! assert!(ln_gamma[0].exp() > 3.0);
//! ```

mod error;
mod model;
mod nrtl;
mod pairs;
mod uniquac;
mod wilson;

pub use error::ActivityError;
pub use model::{ActivityModel, LiquidModel, PairInModel};
pub use pairs::{BUILTIN_PAIRS_JSON, BinaryParameters, PAIRS_SCHEMA, PairRecord, PairSource, SizeParameters};

#[cfg(test)]
mod tests;
