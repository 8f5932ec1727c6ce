//! Gauss–Legendre quadrature for the property traits' default integrals.

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
pub(super) fn gauss_legendre(a: f64, b: f64, f: impl Fn(f64) -> f64) -> f64 {
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
    use super::{GAUSS_LEGENDRE_8, gauss_legendre};

    #[test]
    fn gauss_legendre_is_exact_for_degree_15() {
        // ∫_0^2 x^15 dx = 2^16 / 16 = 4096 (exact arithmetic).
        let v = gauss_legendre(0.0, 2.0, |x| x.powi(15));
        assert!((v - 4096.0).abs() < 1e-9, "{v}");
        let w: f64 = GAUSS_LEGENDRE_8.iter().map(|p| p.1).sum();
        assert!((w - 2.0).abs() < 1e-15);
    }
}
