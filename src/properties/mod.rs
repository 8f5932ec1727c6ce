//! Pure-component property models: vapour pressure, heat capacity and latent heat, and the
//! [`Component`] that holds them.
//!
//! Each property is a small trait with one required method and defaults for the rest
//! ([`VapourPressure`], [`HeatCapacity`], [`LatentHeat`]); the published correlations
//! implement them, and so can a caller's own model. Every correlation knows its validity
//! range ([`ValidityRange`]) and can say when a call is extrapolated. [`IapwsHenry`] gives
//! Henry's constants of gases in water (the IAPWS guideline).

mod checks;
pub(crate) mod component;
mod heat_capacity;
mod henry;
mod latent_heat;
mod quadrature;
mod range;
mod vapour_pressure;
mod virial;

pub use checks::{BOILING_POINT_TOLERANCE, ComponentChecks, LATENT_HEAT_TOLERANCE};
pub use component::{Component, ComponentError, ComponentKind, Gas, Provenance, Sourced, WaterMiscibility};
pub use heat_capacity::{ConstantCp, HeatCapacity, HeatCapacityModel, PolynomialCp, ShomateCp};
pub use henry::{IapwsHenry, WATER_CRITICAL_PRESSURE_PA, WATER_CRITICAL_TEMPERATURE_K, water_saturation_pressure};
pub use latent_heat::{Dippr106, LatentHeat, LatentHeatModel, Watson};
pub use range::ValidityRange;
pub use vapour_pressure::{Antoine, AntoineForm, ExtendedAntoine, VapourPressure, VapourPressureModel};
pub use virial::{PitzerCurlVirial, VIRIAL_REDUCED_PRESSURE_PER_REDUCED_TEMPERATURE};
