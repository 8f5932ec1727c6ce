//! Henry's constants of gases in water: the IAPWS guideline correlation ([`IapwsHenry`]) and
//! the saturation pressure of water it is written on ([`water_saturation_pressure`]).
//!
//! Groundwork for Henry's law in the flash: the correlation, its range, its temperature
//! slope and the enthalpy of solution that slope gives. No K-value model takes it yet.

use super::range::ValidityRange;
use crate::units::GAS_CONSTANT;

/// Critical temperature of water, K (IAPWS-95; IAPWS R6-95).
pub const WATER_CRITICAL_TEMPERATURE_K: f64 = 647.096;
/// Critical pressure of water, Pa (IAPWS-95; IAPWS R6-95).
pub const WATER_CRITICAL_PRESSURE_PA: f64 = 22.064e6;

/// Coefficients a₁…a₆ of the saturation-pressure equation of W. Wagner and A. Pruß,
/// J. Phys. Chem. Ref. Data 22 (1993) 783, eq. (1) (the IAPWS auxiliary equation; from
/// memory, checked against the iapws package: `tests/iapws_henry.rs`).
const WAGNER_PRUSS: [(f64, f64); 6] = [
    (-7.859_517_83, 1.0),
    (1.844_082_59, 1.5),
    (-11.786_649_7, 3.0),
    (22.680_741_1, 3.5),
    (-15.961_871_9, 4.0),
    (1.801_225_02, 7.5),
];

/// ln(psat / Pa) of water and its temperature slope (1/K), from the Wagner–Pruß equation
/// ln(p/p_c) = (T_c/T)(a₁τ + a₂τ^1.5 + a₃τ³ + a₄τ^3.5 + a₅τ⁴ + a₆τ^7.5), τ = 1 − T/T_c, valid
/// from the triple point to the critical point. Above T_c the value at T_c is returned with
/// a zero slope.
///
/// ```
/// use flashduty::properties::water_saturation_pressure;
/// // IAPWS-95: psat(373.124 K) = 101.325 kPa (the normal boiling point, from memory).
/// let (ln_p, _) = water_saturation_pressure(373.124);
/// assert!((ln_p.exp() / 101_325.0 - 1.0).abs() < 1e-4);
/// ```
pub fn water_saturation_pressure(t_k: f64) -> (f64, f64) {
    let tc = WATER_CRITICAL_TEMPERATURE_K;
    if t_k >= tc {
        return (WATER_CRITICAL_PRESSURE_PA.ln(), 0.0);
    }
    let tau = 1.0 - t_k / tc;
    let (mut sum, mut dsum_dtau) = (0.0, 0.0);
    for (a, e) in WAGNER_PRUSS {
        sum += a * tau.powf(e);
        dsum_dtau += a * e * tau.powf(e - 1.0);
    }
    let ln_p = WATER_CRITICAL_PRESSURE_PA.ln() + tc / t_k * sum;
    // d/dT of (T_c/T)·S(τ), with dτ/dT = −1/T_c.
    let slope = -tc / (t_k * t_k) * sum - dsum_dtau / t_k;
    (ln_p, slope)
}

/// One gas's Henry's constant in water by the IAPWS guideline (IAPWS G7-04, *Guideline on
/// the Henry's Constant and Vapor-Liquid Distribution Constant for Gases in H₂O and D₂O at
/// High Temperatures*, 2004; R. Fernández-Prini, J. L. Alvarez and A. H. Harvey, J. Phys.
/// Chem. Ref. Data 32 (2003) 903):
/// ln(k_H / p₁*) = A/T_R + B τ^0.355 / T_R + C T_R^−0.41 e^τ, T_R = T/T_c, τ = 1 − T_R, with
/// p₁* the saturation pressure of water. Valid from about 273 K to near water's critical
/// point; each gas's range is that of the data the guideline fitted.
///
/// Pros: one form for fourteen gases, from the ice point to near 640 K, with a stated
/// range. Cons: water only, infinite dilution (no salting out, no non-ideal gas phase).
///
/// ```
/// use flashduty::properties::IapwsHenry;
/// let n2 = IapwsHenry::for_gas("N2").unwrap();
/// // The mole fraction of N2 in water under 1 atm of N2 at 25 °C: CRC Handbook "Solubility
/// // of selected gases in water", 1.18e-5 (from memory).
/// let x = 101_325.0 / n2.henry_pa(298.15);
/// assert!((x / 1.18e-5 - 1.0).abs() < 0.02);
/// assert_eq!(IapwsHenry::for_gas("7727-37-9"), Some(n2));
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct IapwsHenry {
    /// The gas's formula as the guideline writes it.
    pub formula: &'static str,
    /// Its CAS registry number.
    pub cas: &'static str,
    /// A, B and C of the guideline's table.
    pub coefficients: (f64, f64, f64),
    /// The temperature range of the data, K.
    pub range: ValidityRange,
}

/// The guideline's gases in H₂O: formula, CAS number, A, B, C, and the range (K) of its
/// data (IAPWS G7-04, Table 2, typed from memory; every coefficient and range checked
/// against the iapws 1.5.5 package, `tests/fixtures/iapws_henry.csv`; CAS numbers from the
/// CRC Handbook, from memory).
const GASES: [(&str, &str, f64, f64, f64, f64, f64); 14] = [
    ("He", "7440-59-7", -3.52839, 7.12983, 4.47770, 273.21, 553.18),
    ("Ne", "7440-01-9", -3.18301, 5.31448, 5.43774, 273.20, 543.36),
    ("Ar", "7440-37-1", -8.40954, 4.29587, 10.52779, 273.19, 568.36),
    ("Kr", "7439-90-9", -8.97358, 3.61508, 11.29963, 273.19, 525.56),
    ("Xe", "7440-63-3", -14.21635, 4.00041, 15.60999, 273.22, 574.85),
    ("H2", "1333-74-0", -4.73284, 6.08954, 6.06066, 273.15, 636.09),
    ("N2", "7727-37-9", -9.67578, 4.72162, 11.70585, 278.12, 636.46),
    ("O2", "7782-44-7", -9.44833, 4.43822, 11.42005, 274.15, 616.52),
    ("CO", "630-08-0", -10.52862, 5.13259, 12.01421, 278.15, 588.67),
    ("CO2", "124-38-9", -8.55445, 4.01195, 9.52345, 274.19, 642.66),
    ("H2S", "7783-06-4", -4.51499, 5.23538, 4.42126, 273.15, 533.09),
    ("CH4", "74-82-8", -10.44708, 4.66491, 12.12986, 275.46, 633.11),
    ("C2H6", "74-84-0", -19.67563, 4.51222, 20.62567, 275.44, 473.46),
    ("SF6", "2551-62-4", -16.56118, 2.15289, 20.35440, 283.14, 505.55),
];

impl IapwsHenry {
    /// Every gas of the guideline (in water), in its table's order.
    pub fn all() -> Vec<IapwsHenry> {
        GASES
            .iter()
            .filter_map(|&(formula, cas, a, b, c, lo, hi)| {
                Some(IapwsHenry {
                    formula,
                    cas,
                    coefficients: (a, b, c),
                    range: ValidityRange::new(lo, hi)?,
                })
            })
            .collect()
    }

    /// The guideline's correlation for the gas with this formula (`"N2"`, case ignored) or
    /// CAS number, if it has one.
    pub fn for_gas(formula_or_cas: &str) -> Option<IapwsHenry> {
        let key = formula_or_cas.trim();
        Self::all()
            .into_iter()
            .find(|g| g.formula.eq_ignore_ascii_case(key) || g.cas == key)
    }

    /// ln(k_H / Pa) and its temperature slope d ln k_H / dT (1/K) at `t_k`.
    pub fn ln_henry_with_slope(&self, t_k: f64) -> (f64, f64) {
        let (a, b, c) = self.coefficients;
        let tc = WATER_CRITICAL_TEMPERATURE_K;
        let tr = (t_k / tc).min(1.0);
        let tau = 1.0 - tr;
        let (ln_p, dln_p) = water_saturation_pressure(t_k);
        let tau_pow = tau.powf(0.355);
        let value = a / tr + b * tau_pow / tr + c * tr.powf(-0.41) * tau.exp();
        // d/dT_R of each term; dT_R/dT = 1/T_c (τ^−0.645 is unbounded at T_c: no slope there).
        let dtau_pow = if tau > 0.0 { 0.355 * tau.powf(-0.645) } else { 0.0 };
        let d_dtr = -a / (tr * tr)
            + b * (-dtau_pow / tr - tau_pow / (tr * tr))
            + c * tau.exp() * (-0.41 * tr.powf(-1.41) - tr.powf(-0.41));
        (ln_p + value, dln_p + d_dtr / tc)
    }

    /// k_H at `t_k`, Pa: the partial pressure of the gas over water per unit of its mole
    /// fraction in the water, at infinite dilution.
    pub fn henry_pa(&self, t_k: f64) -> f64 {
        self.ln_henry_with_slope(t_k).0.exp()
    }

    /// The enthalpy of solution of the gas in water at `t_k`, J/mol: the partial molar
    /// enthalpy of the dissolved gas less that of the ideal gas, −RT² d ln k_H/dT (van 't
    /// Hoff; negative where the gas dissolves less as it warms).
    pub fn enthalpy_of_solution_j_per_mol(&self, t_k: f64) -> f64 {
        -GAS_CONSTANT * t_k * t_k * self.ln_henry_with_slope(t_k).1
    }

    /// Whether `t_k` lies outside the range of the guideline's data for this gas.
    pub fn is_extrapolated(&self, t_k: f64) -> bool {
        !self.range.contains(t_k)
    }
}
