//! [`azeotropes`]: the azeotropes of a binary at a given pressure or temperature.

use super::flash::flash;
use super::kvalue::KValueModel;
use super::spec::{FlashError, FlashSpec};
use crate::units::{Pressure, Temperature};

/// Where azeotropes are looked for: along the bubble curve at a pressure (T–x–y) or at a
/// temperature (P–x–y).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum AzeotropeCondition {
    /// At this pressure.
    Pressure(Pressure),
    /// At this temperature.
    Temperature(Temperature),
}

/// One azeotrope of a binary: the composition where liquid and vapour are the same.
#[derive(Debug, Clone, PartialEq)]
pub struct Azeotrope {
    /// Its composition (liquid = vapour), mole fractions of the two components.
    pub x: Vec<f64>,
    /// Its temperature, K.
    pub temperature_k: f64,
    /// Its pressure, Pa.
    pub pressure_pa: f64,
    /// Whether it boils above both pure components (a maximum-boiling, negative-deviation
    /// azeotrope; at a given temperature, a minimum of pressure) rather than below both.
    pub maximum_boiling: bool,
}

/// Compositions scanned for a sign change of ln(K₁/K₂) on the bubble curve.
const SCAN_POINTS: usize = 200;

/// The azeotropes of a two-component `model` at `at`: the compositions where the bubble
/// point's relative volatility K₁/K₂ is 1 (so y = x).
///
/// Method: ln(K₁/K₂) at the bubble point is evaluated on 200 compositions evenly spaced in
/// x₁ from 0.0025 to 0.9975; each sign change is bracketed and refined by the Illinois
/// variant of regula falsi to |Δx| < 1e-10. Pros: finds every azeotrope whose composition
/// the scan separates (two azeotropes closer than 0.005 in x could hide each other); never
/// diverges. Cons: 200 bubble points and then a few dozen, so milliseconds, not microseconds.
/// An azeotrope within 0.0025 of a pure component is not reported.
///
/// # Failures
/// [`FlashError::ComponentCount`] where the model does not have two components; the
/// bubble-point search's errors (no solution in range, an outer loop that does not settle).
///
/// ```
/// use flashduty::activity::{BinaryParameters, LiquidModel};
/// use flashduty::equilibrium::{azeotropes, AzeotropeCondition, ModifiedRaoult};
/// use flashduty::library::Library;
/// use flashduty::units::Pressure;
/// let c = Library::builtin().get_all(&["ethanol", "water"]).unwrap();
/// let m = ModifiedRaoult::new(c, LiquidModel::Nrtl, BinaryParameters::builtin()).unwrap();
/// let found = azeotropes(&m, AzeotropeCondition::Pressure(Pressure::parse("P", "1 atm").unwrap())).unwrap();
/// // CRC Handbook azeotrope table (from memory): 78.15 °C, x(ethanol) = 0.894.
/// assert_eq!(found.len(), 1);
/// assert!((found[0].temperature_k - 351.3).abs() < 0.5 && !found[0].maximum_boiling);
/// ```
pub fn azeotropes<M: KValueModel + ?Sized>(model: &M, at: AzeotropeCondition) -> Result<Vec<Azeotrope>, FlashError> {
    if model.component_count() != 2 {
        return Err(FlashError::ComponentCount {
            components: model.component_count(),
            z: 2,
        });
    }
    let spec = match at {
        AzeotropeCondition::Pressure(pressure) => FlashSpec::BubbleTemperature { pressure },
        AzeotropeCondition::Temperature(temperature) => FlashSpec::BubblePressure { temperature },
    };
    // ln(K₁/K₂), T and P of the bubble point of x₁.
    let at_x = |x1: f64| -> Result<(f64, f64, f64), FlashError> {
        let r = flash(model, &[x1, 1.0 - x1], spec)?;
        Ok(((r.k_values[0] / r.k_values[1]).ln(), r.temperature_k, r.pressure_pa))
    };
    let lo_end = 0.5 / SCAN_POINTS as f64;
    let grid: Vec<f64> = (0..SCAN_POINTS)
        .map(|i| lo_end + (1.0 - 2.0 * lo_end) * i as f64 / (SCAN_POINTS - 1) as f64)
        .collect();
    let mut values = Vec::with_capacity(grid.len());
    for &x in &grid {
        values.push(at_x(x)?.0);
    }
    // Pure-component bubble points, to tell maximum- from minimum-boiling.
    let pure: Vec<(f64, f64)> = [[1.0, 0.0], [0.0, 1.0]]
        .iter()
        .map(|z| flash(model, z, spec).map(|r| (r.temperature_k, r.pressure_pa)))
        .collect::<Result<_, _>>()?;
    let mut found = Vec::new();
    for w in 0..grid.len() - 1 {
        let (fa, fb) = (values[w], values[w + 1]);
        if fa == 0.0 || fa.signum() == fb.signum() {
            continue;
        }
        let (mut a, mut b, mut fa, mut fb) = (grid[w], grid[w + 1], fa, fb);
        let mut side = 0i8;
        let mut x = a;
        for _ in 0..100 {
            x = (a * fb - b * fa) / (fb - fa);
            if !(x > a && x < b) {
                x = 0.5 * (a + b);
            }
            let fx = at_x(x)?.0;
            if fx == 0.0 || b - a < 1e-10 {
                break;
            }
            if fx.signum() == fa.signum() {
                (a, fa) = (x, fx);
                if side == -1 {
                    fb *= 0.5;
                }
                side = -1;
            } else {
                (b, fb) = (x, fx);
                if side == 1 {
                    fa *= 0.5;
                }
                side = 1;
            }
        }
        let (_, t, p) = at_x(x)?;
        let maximum_boiling = match at {
            AzeotropeCondition::Pressure(_) => t > pure[0].0.max(pure[1].0),
            AzeotropeCondition::Temperature(_) => p < pure[0].1.min(pure[1].1),
        };
        found.push(Azeotrope {
            x: vec![x, 1.0 - x],
            temperature_k: t,
            pressure_pa: p,
            maximum_boiling,
        });
    }
    Ok(found)
}
