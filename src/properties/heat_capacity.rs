//! Heat-capacity correlations: polynomial, Shomate and constant, with closed-form integrals
//! of Cp dT and Cp/T dT.

use super::quadrature::gauss_legendre;
use super::range::ValidityRange;

/// A pure-component molar heat capacity, J/(mol·K).
///
/// One method is required, [`cp`](Self::cp). The integrals default to Gauss–Legendre
/// quadrature so that a caller's own model works at once; every built-in correlation
/// overrides them with closed forms.
///
/// ```
/// use flashduty::properties::HeatCapacity;
/// /// A made-up linear heat capacity (invented, for illustration).
/// struct Linear;
/// impl HeatCapacity for Linear {
///     fn cp(&self, t_k: f64) -> f64 { 30.0 + 0.01 * t_k }
/// }
/// // ∫ from 300 to 400 K = 30·100 + 0.005·(400² − 300²) = 3350 J/mol.
/// assert!((Linear.enthalpy_change(300.0, 400.0) - 3350.0).abs() < 1e-9);
/// ```
pub trait HeatCapacity {
    /// Cp at `t_k`, J/(mol·K).
    fn cp(&self, t_k: f64) -> f64;

    /// ∫ Cp dT from `t1_k` to `t2_k`, J/mol.
    fn enthalpy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        gauss_legendre(t1_k, t2_k, |t| self.cp(t))
    }

    /// ∫ Cp / T dT from `t1_k` to `t2_k`, J/(mol·K).
    fn entropy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        gauss_legendre(t1_k, t2_k, |t| self.cp(t) / t)
    }

    /// The range the correlation was fitted over; unbounded by default.
    fn validity(&self) -> ValidityRange {
        ValidityRange::UNBOUNDED
    }

    /// Whether a call at `t_k` is outside the fitted range.
    fn is_extrapolated(&self, t_k: f64) -> bool {
        !self.validity().contains(t_k)
    }
}

impl<C: HeatCapacity + ?Sized> HeatCapacity for &C {
    fn cp(&self, t_k: f64) -> f64 {
        (**self).cp(t_k)
    }
    fn enthalpy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        (**self).enthalpy_change(t1_k, t2_k)
    }
    fn entropy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        (**self).entropy_change(t1_k, t2_k)
    }
    fn validity(&self) -> ValidityRange {
        (**self).validity()
    }
}

/// (t2^(k+1) − t1^(k+1)) / (k+1) for k = 0..=4, written as (t2 − t1) times a sum of
/// positive terms so that the difference keeps full relative precision when t1 ≈ t2.
#[inline]
fn power_integrals(t1: f64, t2: f64) -> [f64; 5] {
    let d = t2 - t1;
    let (a, b) = (t1, t2);
    let (a2, b2) = (a * a, b * b);
    [
        d,
        d * (a + b) / 2.0,
        d * (a2 + a * b + b2) / 3.0,
        d * (a + b) * (a2 + b2) / 4.0,
        d * (a2 * a2 + a2 * a * b + a2 * b2 + a * b2 * b + b2 * b2) / 5.0,
    ]
}

/// ln(t2 / t1) computed without cancellation when t1 ≈ t2.
#[inline]
fn ln_ratio(t1: f64, t2: f64) -> f64 {
    ((t2 - t1) / t1).ln_1p()
}

/// The polynomial Cp = a + bT + cT² + dT³ + eT⁴ (T in K, Cp in J/(mol·K)); the DIPPR-100
/// form with J/kmol converted to J/mol.
///
/// Pros: closed-form integrals; any degree up to four. Cons: diverges fast outside its
/// range.
///
/// ```
/// use flashduty::properties::{HeatCapacity, PolynomialCp, ValidityRange};
/// let cp = PolynomialCp::new([75.0, 0.0, 0.0, 0.0, 0.0], ValidityRange::UNBOUNDED).unwrap();
/// assert_eq!(cp.enthalpy_change(300.0, 310.0), 750.0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PolynomialCp {
    coefficients: [f64; 5],
    range: ValidityRange,
}

impl PolynomialCp {
    /// Builds the polynomial; `None` if a coefficient is not finite.
    pub fn new(coefficients: [f64; 5], range: ValidityRange) -> Option<Self> {
        coefficients
            .iter()
            .all(|c| c.is_finite())
            .then_some(Self { coefficients, range })
    }

    /// The coefficients a, b, c, d, e.
    pub fn coefficients(&self) -> [f64; 5] {
        self.coefficients
    }
}

impl HeatCapacity for PolynomialCp {
    #[inline]
    fn cp(&self, t: f64) -> f64 {
        let [a, b, c, d, e] = self.coefficients;
        a + t * (b + t * (c + t * (d + t * e)))
    }

    #[inline]
    fn enthalpy_change(&self, t1: f64, t2: f64) -> f64 {
        let p = power_integrals(t1, t2);
        self.coefficients.iter().zip(p).map(|(c, p)| c * p).sum()
    }

    fn entropy_change(&self, t1: f64, t2: f64) -> f64 {
        // ∫ (a/T + b + cT + dT² + eT³) dT
        let [a, b, c, d, e] = self.coefficients;
        let p = power_integrals(t1, t2);
        a * ln_ratio(t1, t2) + b * p[0] + c * p[1] + d * p[2] + e * p[3]
    }

    fn validity(&self) -> ValidityRange {
        self.range
    }
}

/// The Shomate equation Cp = A + Bt + Ct² + Dt³ + E/t² with t = T/1000 K, Cp in J/(mol·K),
/// the form of the NIST Chemistry WebBook gas-phase tables.
///
/// Pros: the form NIST publishes for most gases, good over wide ranges. Cons: the E/t²
/// term blows up at low temperature.
///
/// ```
/// use flashduty::properties::{HeatCapacity, ShomateCp, ValidityRange};
/// // Water vapour, NIST Chemistry WebBook Shomate constants (500–1700 K), from memory.
/// let cp = ShomateCp::new([30.09200, 6.832514, 6.793435, -2.534480, 0.082139],
///     ValidityRange::new(500.0, 1700.0).unwrap()).unwrap();
/// // Ideal-gas water at 500 K: 35.2 J/(mol·K) (JANAF Thermochemical Tables, from memory).
/// assert!((cp.cp(500.0) - 35.2).abs() < 0.2);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShomateCp {
    constants: [f64; 5],
    range: ValidityRange,
}

impl ShomateCp {
    /// Builds the correlation from A, B, C, D, E; `None` if any is not finite.
    pub fn new(constants: [f64; 5], range: ValidityRange) -> Option<Self> {
        constants
            .iter()
            .all(|c| c.is_finite())
            .then_some(Self { constants, range })
    }

    /// The constants A, B, C, D, E.
    pub fn constants(&self) -> [f64; 5] {
        self.constants
    }
}

impl HeatCapacity for ShomateCp {
    #[inline]
    fn cp(&self, t_k: f64) -> f64 {
        let [a, b, c, d, e] = self.constants;
        let t = t_k / 1000.0;
        a + t * (b + t * (c + t * d)) + e / (t * t)
    }

    #[inline]
    fn enthalpy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        let [a, b, c, d, e] = self.constants;
        let (t1, t2) = (t1_k / 1000.0, t2_k / 1000.0);
        let p = power_integrals(t1, t2);
        // ∫ E/t² dt = E (1/t1 − 1/t2) = E (t2 − t1)/(t1 t2); the factor 1000 converts t to K.
        1000.0 * (a * p[0] + b * p[1] + c * p[2] + d * p[3] + e * (t2 - t1) / (t1 * t2))
    }

    fn entropy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        // ∫ Cp/T dT = ∫ Cp/t dt.
        let [a, b, c, d, e] = self.constants;
        let (t1, t2) = (t1_k / 1000.0, t2_k / 1000.0);
        let p = power_integrals(t1, t2);
        // ∫ E/t³ dt = E/2 (1/t1² − 1/t2²) = E (t2 − t1)(t2 + t1) / (2 t1² t2²).
        a * ln_ratio(t1, t2) + b * p[0] + c * p[1] + d * p[2] + e * (t2 - t1) * (t2 + t1) / (2.0 * t1 * t1 * t2 * t2)
    }

    fn validity(&self) -> ValidityRange {
        self.range
    }
}

/// A constant heat capacity, J/(mol·K): the usual hand-calculation assumption.
///
/// ```
/// use flashduty::properties::{ConstantCp, HeatCapacity, ValidityRange};
/// let cp = ConstantCp::new(136.0, ValidityRange::UNBOUNDED).unwrap();
/// assert_eq!(cp.cp(400.0), 136.0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConstantCp {
    value: f64,
    range: ValidityRange,
}

impl ConstantCp {
    /// Builds the model; `None` unless `value_j_per_mol_k` is finite and positive.
    pub fn new(value_j_per_mol_k: f64, range: ValidityRange) -> Option<Self> {
        (value_j_per_mol_k.is_finite() && value_j_per_mol_k > 0.0).then_some(Self {
            value: value_j_per_mol_k,
            range,
        })
    }
}

impl HeatCapacity for ConstantCp {
    #[inline]
    fn cp(&self, _t_k: f64) -> f64 {
        self.value
    }
    #[inline]
    fn enthalpy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        self.value * (t2_k - t1_k)
    }
    fn entropy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        self.value * ln_ratio(t1_k, t2_k)
    }
    fn validity(&self) -> ValidityRange {
        self.range
    }
}

/// The heat-capacity correlations the component library can hold.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum HeatCapacityModel {
    /// [`PolynomialCp`].
    Polynomial(PolynomialCp),
    /// [`ShomateCp`].
    Shomate(ShomateCp),
    /// [`ConstantCp`].
    Constant(ConstantCp),
}

macro_rules! dispatch {
    ($self:ident, $m:ident => $e:expr) => {
        match $self {
            HeatCapacityModel::Polynomial($m) => $e,
            HeatCapacityModel::Shomate($m) => $e,
            HeatCapacityModel::Constant($m) => $e,
        }
    };
}

impl HeatCapacity for HeatCapacityModel {
    #[inline]
    fn cp(&self, t_k: f64) -> f64 {
        dispatch!(self, m => m.cp(t_k))
    }
    #[inline]
    fn enthalpy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        dispatch!(self, m => m.enthalpy_change(t1_k, t2_k))
    }
    fn entropy_change(&self, t1_k: f64, t2_k: f64) -> f64 {
        dispatch!(self, m => m.entropy_change(t1_k, t2_k))
    }
    fn validity(&self) -> ValidityRange {
        dispatch!(self, m => m.validity())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// An independent reference: composite Simpson's rule with 20 000 panels.
    fn simpson(a: f64, b: f64, f: impl Fn(f64) -> f64) -> f64 {
        let n = 20_000;
        let h = (b - a) / n as f64;
        let mut s = f(a) + f(b);
        for i in 1..n {
            let x = a + i as f64 * h;
            s += if i % 2 == 1 { 4.0 } else { 2.0 } * f(x);
        }
        s * h / 3.0
    }

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs().max(1e-300)
    }

    // Benzene liquid, DIPPR-100 (Perry's 7th ed. Table 2-153, J/kmol/K ÷ 1000), from memory.
    const BENZENE_LIQ: [f64; 5] = [129.44, -0.1695, 6.4781e-4, 0.0, 0.0];
    // Benzene gas, NIST WebBook Shomate (298–1500 K), from memory.
    const BENZENE_GAS: [f64; 5] = [-36.22414, 484.7750, -315.5870, 77.62260, -0.002523];

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(2000))]

        #[test]
        fn closed_forms_match_quadrature(t1 in 280.0f64..500.0, t2 in 280.0f64..500.0) {
            prop_assume!((t2 - t1).abs() > 1.0);
            let p = PolynomialCp::new(BENZENE_LIQ, ValidityRange::UNBOUNDED).unwrap();
            let s = ShomateCp::new(BENZENE_GAS, ValidityRange::UNBOUNDED).unwrap();
            let c = ConstantCp::new(136.0, ValidityRange::UNBOUNDED).unwrap();
            for m in [&p as &dyn HeatCapacity, &s, &c] {
                let h = simpson(t1, t2, |t| m.cp(t));
                prop_assert!(rel(m.enthalpy_change(t1, t2), h) < 1e-10);
                let sv = simpson(t1, t2, |t| m.cp(t) / t);
                prop_assert!(rel(m.entropy_change(t1, t2), sv) < 1e-10);
            }
        }
    }

    #[test]
    fn default_quadrature_is_close_for_user_models() {
        struct Wrapped(ShomateCp);
        impl HeatCapacity for Wrapped {
            fn cp(&self, t: f64) -> f64 {
                self.0.cp(t)
            }
        }
        let s = ShomateCp::new(BENZENE_GAS, ValidityRange::UNBOUNDED).unwrap();
        let w = Wrapped(s);
        assert!(rel(w.enthalpy_change(300.0, 900.0), s.enthalpy_change(300.0, 900.0)) < 1e-12);
        assert!(rel(w.entropy_change(300.0, 900.0), s.entropy_change(300.0, 900.0)) < 1e-12);
    }

    #[test]
    fn tiny_intervals_keep_precision() {
        let p = PolynomialCp::new(BENZENE_LIQ, ValidityRange::UNBOUNDED).unwrap();
        let t2 = 350.0 + 1e-7;
        let dt = t2 - 350.0; // exact (Sterbenz)
        let h = p.enthalpy_change(350.0, t2);
        assert!(rel(h, p.cp(350.0 + dt / 2.0) * dt) < 1e-8);
    }

    #[test]
    fn constructors_reject_non_finite() {
        assert!(PolynomialCp::new([f64::NAN, 0., 0., 0., 0.], ValidityRange::UNBOUNDED).is_none());
        assert!(ShomateCp::new([f64::INFINITY, 0., 0., 0., 0.], ValidityRange::UNBOUNDED).is_none());
        assert!(ConstantCp::new(-1.0, ValidityRange::UNBOUNDED).is_none());
    }
}
