//! [`ComponentChecks`]: the consistency checks a component's data make of themselves at
//! the normal boiling point, in one place that the library's data tests, the fitting of a
//! user component and the component report all use.

use super::component::Component;
use super::latent_heat::LatentHeat;
use super::vapour_pressure::VapourPressure;
use crate::units::{ATM_PA, GAS_CONSTANT};
use serde::Serialize;

/// Largest accepted |Psat(Tb)/101.325 kPa − 1| of a component (common practice; the
/// tolerance this project applies to its own library and to a user's component).
pub const BOILING_POINT_TOLERANCE: f64 = 0.015;

/// Largest accepted |ΔH_CC/ΔH(Tb) − 1|, where ΔH_CC = R Tb² d ln Psat/dT is the
/// Clausius–Clapeyron latent heat (common practice: the ideal-gas, negligible-liquid-volume
/// form runs a few per cent high at 1 atm because it ignores ΔZ).
pub const LATENT_HEAT_TOLERANCE: f64 = 0.08;

/// The consistency checks of a component at its normal boiling point, with their values.
///
/// ```
/// use flashduty::properties::ComponentChecks;
/// use flashduty::library::Library;
/// let benzene = Library::builtin().get("benzene").unwrap();
/// let c = ComponentChecks::of(benzene);
/// assert!(c.boiling_point_passed(), "{c:?}");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ComponentChecks {
    /// The normal boiling point, K.
    pub normal_boiling_point_k: f64,
    /// Psat at Tb, Pa.
    pub psat_at_boiling_point_pa: f64,
    /// Psat(Tb)/101 325 Pa − 1.
    pub psat_relative_deviation: f64,
    /// [`BOILING_POINT_TOLERANCE`].
    pub psat_tolerance: f64,
    /// R Tb² d ln Psat/dT at Tb, J/mol.
    pub clausius_clapeyron_latent_heat_j_per_mol: f64,
    /// The latent-heat correlation at Tb, J/mol.
    pub latent_heat_at_boiling_point_j_per_mol: f64,
    /// Clausius–Clapeyron value / correlation − 1.
    pub latent_heat_relative_deviation: f64,
    /// [`LATENT_HEAT_TOLERANCE`].
    pub latent_heat_tolerance: f64,
}

impl ComponentChecks {
    /// Runs the checks on a component.
    pub fn of(component: &Component) -> Self {
        let tb = component.normal_boiling_point_k();
        let (ln_p, slope) = component.vapour_pressure().ln_psat_with_slope(tb);
        let psat = ln_p.exp();
        let cc = GAS_CONSTANT * tb * tb * slope;
        let dh = component.latent_heat().latent_heat(tb);
        Self {
            normal_boiling_point_k: tb,
            psat_at_boiling_point_pa: psat,
            psat_relative_deviation: psat / ATM_PA - 1.0,
            psat_tolerance: BOILING_POINT_TOLERANCE,
            clausius_clapeyron_latent_heat_j_per_mol: cc,
            latent_heat_at_boiling_point_j_per_mol: dh,
            latent_heat_relative_deviation: cc / dh - 1.0,
            latent_heat_tolerance: LATENT_HEAT_TOLERANCE,
        }
    }

    /// Whether Psat(Tb) is 101.325 kPa within tolerance.
    pub fn boiling_point_passed(&self) -> bool {
        self.psat_relative_deviation.abs() <= self.psat_tolerance
    }

    /// Whether the Clausius–Clapeyron latent heat agrees within tolerance.
    pub fn latent_heat_passed(&self) -> bool {
        self.latent_heat_relative_deviation.abs() <= self.latent_heat_tolerance
    }
}
