//! The finite differences that the defaulted trait methods take (∂ln K/∂x of a
//! [`KValueModel`](crate::equilibrium::KValueModel), partial molar enthalpies of a
//! [`PhaseEnthalpyModel`](crate::energy::PhaseEnthalpyModel)): one stencil, so that both use
//! the same step and the same rule near zero.

/// Step in a mole fraction, 1e-6 (common practice for O(h²) differences in f64: truncation
/// about 1e-12, round-off about 1e-10 relative).
pub(crate) const STEP: f64 = 1e-6;

/// The points (offsets from `v`) and weights of a second-order difference in a mole fraction
/// at `v`: central where `v` ≥ [`STEP`], else the three-point one-sided form, whose first
/// point is `v` itself (offset 0), so that no mole fraction below zero is evaluated. Unused
/// slots have weight 0.
pub(crate) fn stencil(v: f64) -> [(f64, f64); 3] {
    let w = 1.0 / (2.0 * STEP);
    if v >= STEP {
        [(STEP, w), (-STEP, -w), (0.0, 0.0)]
    } else {
        [(0.0, -3.0 * w), (STEP, 4.0 * w), (2.0 * STEP, -w)]
    }
}

#[cfg(test)]
mod tests {
    use super::stencil;

    #[test]
    fn both_forms_differentiate_a_quadratic_exactly() {
        // d/dv (v² + 3v) = 2v + 3, which a second-order stencil gets to round-off.
        let f = |v: f64| v * v + 3.0 * v;
        for v in [0.0, 5e-7, 0.3] {
            let d: f64 = stencil(v).iter().map(|(o, w)| w * f(v + o)).sum();
            assert!((d - (2.0 * v + 3.0)).abs() < 1e-8, "{v}: {d}");
        }
    }
}
