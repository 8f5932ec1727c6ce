//! Pure-component property models: vapour pressure, heat capacity and latent heat, and the
//! [`Component`] that holds them.
//!
//! Each property is a small trait with one required method and defaults for the rest
//! ([`VapourPressure`], [`HeatCapacity`], [`LatentHeat`]); the published correlations
//! implement them, and so can a caller's own model. Every correlation knows its validity
//! range ([`ValidityRange`]) and can say when a call is extrapolated.

mod checks;
pub(crate) mod component;
mod heat_capacity;
mod latent_heat;
mod vapour_pressure;
mod virial;

pub use checks::{BOILING_POINT_TOLERANCE, ComponentChecks, LATENT_HEAT_TOLERANCE};
pub use component::{Component, ComponentError, ComponentKind, Gas, Provenance, Sourced};
pub use heat_capacity::{ConstantCp, HeatCapacity, HeatCapacityModel, PolynomialCp, ShomateCp};
pub use latent_heat::{Dippr106, LatentHeat, LatentHeatModel, Watson};
pub use vapour_pressure::{Antoine, AntoineForm, ExtendedAntoine, VapourPressure, VapourPressureModel};
pub use virial::{PitzerCurlVirial, VIRIAL_REDUCED_PRESSURE_PER_REDUCED_TEMPERATURE};

use serde::{Deserialize, Serialize};

/// The temperature range over which a correlation was fitted, in kelvin.
///
/// ```
/// use flashduty::properties::ValidityRange;
/// let r = ValidityRange::new(280.0, 450.0).unwrap();
/// assert!(r.contains(300.0));
/// assert!(!r.contains(500.0));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ValidityRange {
    /// Lowest temperature of the fitted data, K.
    pub min_k: f64,
    /// Highest temperature of the fitted data, K.
    pub max_k: f64,
}

impl ValidityRange {
    /// A range from `min_k` to `max_k`; `None` unless both are finite, positive and
    /// `min_k <= max_k`.
    pub fn new(min_k: f64, max_k: f64) -> Option<Self> {
        (min_k.is_finite() && max_k.is_finite() && min_k > 0.0 && min_k <= max_k).then_some(Self { min_k, max_k })
    }

    /// A range that contains every positive temperature (for models with no stated limit).
    pub const UNBOUNDED: Self = Self {
        min_k: 0.0,
        max_k: f64::INFINITY,
    };

    /// Whether `t_k` lies within the range, ends included.
    pub fn contains(&self, t_k: f64) -> bool {
        t_k >= self.min_k && t_k <= self.max_k
    }
}

/// Nodes and weights of 8-point Gauss–Legendre quadrature on [-1, 1] (Abramowitz & Stegun,
/// *Handbook of Mathematical Functions*, 1964, Table 25.4; from memory, checked in tests by
/// integrating polynomials up to degree 15 exactly). Used only by the default methods of
/// the property traits, for user-supplied models that give no closed form.
const GAUSS_LEGENDRE_8: [(f64, f64); 8] = [
    (-0.960_289_856_497_536_2, 0.101_228_536_290_376_26),
    (-0.796_666_477_413_626_7, 0.222_381_034_453_374_47),
    (-0.525_532_409_916_329, 0.313_706_645_877_887_3),
    (-0.183_434_642_495_649_8, 0.362_683_783_378_362),
    (0.183_434_642_495_649_8, 0.362_683_783_378_362),
    (0.525_532_409_916_329, 0.313_706_645_877_887_3),
    (0.796_666_477_413_626_7, 0.222_381_034_453_374_47),
    (0.960_289_856_497_536_2, 0.101_228_536_290_376_26),
];

/// ∫ f from `a` to `b` by composite 8-point Gauss–Legendre on 16 panels.
fn gauss_legendre(a: f64, b: f64, f: impl Fn(f64) -> f64) -> f64 {
    const PANELS: usize = 16;
    let h = (b - a) / PANELS as f64;
    let mut sum = 0.0;
    for p in 0..PANELS {
        let mid = a + (p as f64 + 0.5) * h;
        for (x, w) in GAUSS_LEGENDRE_8 {
            sum += w * f(mid + 0.5 * h * x);
        }
    }
    0.5 * h * sum
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gauss_legendre_is_exact_for_degree_15() {
        // ∫_0^2 x^15 dx = 2^16 / 16 = 4096 (exact arithmetic).
        let v = gauss_legendre(0.0, 2.0, |x| x.powi(15));
        assert!((v - 4096.0).abs() < 1e-9, "{v}");
        let w: f64 = GAUSS_LEGENDRE_8.iter().map(|p| p.1).sum();
        assert!((w - 2.0).abs() < 1e-15);
    }

    #[test]
    fn range_checks() {
        assert!(ValidityRange::new(300.0, 200.0).is_none());
        assert!(ValidityRange::new(f64::NAN, 200.0).is_none());
        assert!(ValidityRange::UNBOUNDED.contains(1e9));
    }
}
