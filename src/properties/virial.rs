//! The second virial coefficient from the Pitzer–Curl generalized correlation, in Abbott's
//! form, and the vapour's residual enthalpy it gives through the virial equation truncated
//! after the second term.

use super::component::Component;

use crate::units::GAS_CONSTANT;

/// Abbott's fit of the simple-fluid term, B⁰ = 0.083 − 0.422/Tr^1.6, and of the correction
/// term, B¹ = 0.139 − 0.172/Tr^4.2: (constant, coefficient, exponent). From Smith, Van Ness
/// & Abbott, *Introduction to Chemical Engineering Thermodynamics*, the chapter on
/// generalized correlations (from memory).
const B0: (f64, f64, f64) = (0.083, 0.422, 1.6);
const B1: (f64, f64, f64) = (0.139, 0.172, 4.2);

/// The largest reduced pressure, as a fraction of the reduced temperature, at which the
/// truncated virial equation is taken to hold: Pr ≤ Tr/2 (common practice: a conservative
/// form of the rule that the two-term virial equation describes a gas up to about half its
/// critical density).
pub const VIRIAL_REDUCED_PRESSURE_PER_REDUCED_TEMPERATURE: f64 = 0.5;

/// The second virial coefficient of a pure gas from the Pitzer–Curl generalized
/// correlation (K. S. Pitzer and R. F. Curl, *J. Am. Chem. Soc.* 79 (1957) 2369) in
/// Abbott's form (Smith, Van Ness & Abbott, *Introduction to Chemical Engineering
/// Thermodynamics*, chapter on generalized correlations; coefficients from memory):
///
/// B Pc/(R Tc) = B⁰ + ω B¹, B⁰ = 0.083 − 0.422/Tr^1.6, B¹ = 0.139 − 0.172/Tr^4.2,
///
/// and the residual (departure) enthalpy of the gas from the virial equation truncated after
/// B, Z = 1 + BP/(RT): H^R = P (B − T dB/dT), which is
/// H^R/(R Tc) = Pr [B⁰ − Tr dB⁰/dTr + ω (B¹ − Tr dB¹/dTr)].
///
/// The derivatives are those of B⁰ and B¹ as written, dB⁰/dTr = 0.6752/Tr^2.6 and
/// dB¹/dTr = 0.7224/Tr^5.2 (the textbook prints them rounded, 0.675 and 0.722), so that
/// every slope here is the exact derivative of the value beside it.
///
/// Pros: needs only Tc, Pc and ω; good for non-polar and slightly polar gases at low
/// reduced density. Cons: no polar or association term (it underestimates |B| of water by
/// about a fifth); the truncated virial equation fails at high reduced density, near the
/// critical point and for the saturated vapour close to Tc
/// ([`is_within_range`](Self::is_within_range)).
///
/// ```
/// use flashduty::properties::PitzerCurlVirial;
/// // Propane: Tc 369.83 K, Pc 4.248 MPa, ω 0.152 (Poling–Prausnitz–O'Connell, from memory).
/// let b = PitzerCurlVirial::new(369.83, 4.248e6, 0.152).unwrap();
/// // B of propane at 300 K is about −390 cm³/mol (Dymond & Smith compilation, from memory).
/// let b_cm3 = b.second_virial_m3_per_mol(300.0) * 1e6;
/// assert!((b_cm3 / -390.0 - 1.0).abs() < 0.1, "{b_cm3}");
/// // The real gas at 1 atm and 300 K lies below the ideal gas in enthalpy.
/// assert!(b.residual_enthalpy_j_per_mol(300.0, 101_325.0) < 0.0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PitzerCurlVirial {
    critical_temperature_k: f64,
    critical_pressure_pa: f64,
    acentric_factor: f64,
    /// R Tc / Pc, m³/mol.
    volume_scale_m3_per_mol: f64,
}

impl PitzerCurlVirial {
    /// The correlation for a gas of critical temperature `critical_temperature_k`,
    /// critical pressure `critical_pressure_pa` and acentric factor `acentric_factor`;
    /// `None` unless Tc and Pc are finite and positive and ω is finite.
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// assert!(PitzerCurlVirial::new(647.096, 22.064e6, 0.3443).is_some());
    /// assert!(PitzerCurlVirial::new(-1.0, 22.064e6, 0.3443).is_none());
    /// ```
    pub fn new(critical_temperature_k: f64, critical_pressure_pa: f64, acentric_factor: f64) -> Option<Self> {
        let ok = critical_temperature_k.is_finite()
            && critical_pressure_pa.is_finite()
            && acentric_factor.is_finite()
            && critical_temperature_k > 0.0
            && critical_pressure_pa > 0.0;
        ok.then_some(Self {
            critical_temperature_k,
            critical_pressure_pa,
            acentric_factor,
            volume_scale_m3_per_mol: GAS_CONSTANT * critical_temperature_k / critical_pressure_pa,
        })
    }

    /// The correlation with a component's critical constants and acentric factor (which
    /// the component checked when it was built).
    ///
    /// ```
    /// use flashduty::library::Library;
    /// use flashduty::properties::PitzerCurlVirial;
    /// let water = Library::builtin().get("water").unwrap();
    /// let b = PitzerCurlVirial::for_component(water);
    /// assert_eq!(b.critical_temperature_k(), water.critical_temperature_k());
    /// ```
    pub fn for_component(c: &Component) -> Self {
        let (tc, pc, omega) = (
            c.critical_temperature_k(),
            c.critical_pressure_pa(),
            c.acentric_factor(),
        );
        Self {
            critical_temperature_k: tc,
            critical_pressure_pa: pc,
            acentric_factor: omega,
            volume_scale_m3_per_mol: GAS_CONSTANT * tc / pc,
        }
    }

    /// Tc, K.
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// assert_eq!(PitzerCurlVirial::new(500.0, 3e6, 0.2).unwrap().critical_temperature_k(), 500.0);
    /// ```
    pub fn critical_temperature_k(&self) -> f64 {
        self.critical_temperature_k
    }

    /// Pc, Pa.
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// assert_eq!(PitzerCurlVirial::new(500.0, 3e6, 0.2).unwrap().critical_pressure_pa(), 3e6);
    /// ```
    pub fn critical_pressure_pa(&self) -> f64 {
        self.critical_pressure_pa
    }

    /// B at `t_k`, m³/mol.
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// // Water, Tc 647.096 K, Pc 22.064 MPa (IAPWS), ω 0.3443 (PPO, from memory): B at
    /// // 373.15 K is −451 cm³/mol by IAPWS-95; the correlation, with no polar term, gives
    /// // about a fifth less.
    /// let b = PitzerCurlVirial::new(647.096, 22.064e6, 0.3443).unwrap();
    /// let b_cm3 = b.second_virial_m3_per_mol(373.15) * 1e6;
    /// assert!(b_cm3 < -340.0 && b_cm3 > -451.0, "{b_cm3}");
    /// ```
    pub fn second_virial_m3_per_mol(&self, t_k: f64) -> f64 {
        self.second_virial_with_slopes(t_k).0
    }

    /// B (m³/mol), dB/dT (m³/(mol·K)) and d²B/dT² (m³/(mol·K²)) at `t_k`.
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// let b = PitzerCurlVirial::new(500.0, 3e6, 0.2).unwrap();
    /// let (v, d1, d2) = b.second_virial_with_slopes(400.0);
    /// let h = 1e-3;
    /// let fd = (b.second_virial_m3_per_mol(400.0 + h) - b.second_virial_m3_per_mol(400.0 - h)) / (2.0 * h);
    /// assert!(v < 0.0 && d1 > 0.0 && d2 < 0.0);
    /// assert!((fd / d1 - 1.0).abs() < 1e-8);
    /// ```
    pub fn second_virial_with_slopes(&self, t_k: f64) -> (f64, f64, f64) {
        let tc = self.critical_temperature_k;
        let tr = t_k / tc;
        let (p0, p1) = self.inverse_powers(tr);
        let (w, s) = (self.acentric_factor, self.volume_scale_m3_per_mol);
        let value = (B0.0 - B0.1 * p0) + w * (B1.0 - B1.1 * p1);
        let d1 = (B0.1 * B0.2 * p0 + w * B1.1 * B1.2 * p1) / tr;
        let d2 = -(B0.1 * B0.2 * (B0.2 + 1.0) * p0 + w * B1.1 * B1.2 * (B1.2 + 1.0) * p1) / (tr * tr);
        (s * value, s * d1 / tc, s * d2 / (tc * tc))
    }

    /// Tr^−1.6 and Tr^−4.2 from one logarithm.
    #[inline]
    fn inverse_powers(&self, tr: f64) -> (f64, f64) {
        let ln_tr = tr.ln();
        ((-B0.2 * ln_tr).exp(), (-B1.2 * ln_tr).exp())
    }

    /// H^R / P = B − T dB/dT (J/(mol·Pa), which is m³/mol) at `t_k`, and its temperature
    /// derivative −T d²B/dT² (J/(mol·Pa·K)): the residual enthalpy at P is P times the first,
    /// and its slope at constant pressure P times the second.
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// let b = PitzerCurlVirial::new(500.0, 3e6, 0.2).unwrap();
    /// let (g, dg) = b.residual_enthalpy_per_pa(400.0);
    /// assert_eq!(1e5 * g, b.residual_enthalpy_j_per_mol(400.0, 1e5));
    /// // The residual heat capacity of a gas at low density is positive.
    /// assert!(dg > 0.0);
    /// ```
    #[inline]
    pub fn residual_enthalpy_per_pa(&self, t_k: f64) -> (f64, f64) {
        let tc = self.critical_temperature_k;
        let tr = t_k / tc;
        let (p0, p1) = self.inverse_powers(tr);
        let (w, s) = (self.acentric_factor, self.volume_scale_m3_per_mol);
        // B − T dB/dT, reduced: B⁰ − Tr dB⁰/dTr = a − b (1 + n)/Tr^n, and likewise for B¹.
        let value = (B0.0 - B0.1 * (1.0 + B0.2) * p0) + w * (B1.0 - B1.1 * (1.0 + B1.2) * p1);
        // d/dTr of that: b n (1 + n)/Tr^(n+1) = −Tr d²B/dTr².
        let slope = (B0.1 * B0.2 * (1.0 + B0.2) * p0 + w * B1.1 * B1.2 * (1.0 + B1.2) * p1) / tr;
        (s * value, s * slope / tc)
    }

    /// H^R = P (B − T dB/dT) at `t_k` and `p_pa`, J/mol: the real gas's enthalpy minus the
    /// ideal gas's at the same temperature.
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// let b = PitzerCurlVirial::new(647.096, 22.064e6, 0.3443).unwrap();
    /// // Zero at zero pressure, linear in pressure.
    /// assert_eq!(b.residual_enthalpy_j_per_mol(400.0, 0.0), 0.0);
    /// let (one, two) = (b.residual_enthalpy_j_per_mol(400.0, 1e5), b.residual_enthalpy_j_per_mol(400.0, 2e5));
    /// assert!((two - 2.0 * one).abs() < 1e-12 * one.abs());
    /// ```
    pub fn residual_enthalpy_j_per_mol(&self, t_k: f64, p_pa: f64) -> f64 {
        p_pa * self.residual_enthalpy_per_pa(t_k).0
    }

    /// The reduced temperature and pressure of (`t_k`, `p_pa`).
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// let b = PitzerCurlVirial::new(500.0, 5e6, 0.2).unwrap();
    /// assert_eq!(b.reduced(400.0, 1e6), (0.8, 0.2));
    /// ```
    pub fn reduced(&self, t_k: f64, p_pa: f64) -> (f64, f64) {
        (t_k / self.critical_temperature_k, p_pa / self.critical_pressure_pa)
    }

    /// Whether (`t_k`, `p_pa`) lies where the truncated virial equation is taken to hold:
    /// Pr ≤ Tr/2 ([`VIRIAL_REDUCED_PRESSURE_PER_REDUCED_TEMPERATURE`], common practice).
    ///
    /// ```
    /// use flashduty::properties::PitzerCurlVirial;
    /// let b = PitzerCurlVirial::new(647.096, 22.064e6, 0.3443).unwrap();
    /// assert!(b.is_within_range(423.15, 101_325.0)); // steam at 1 atm
    /// assert!(!b.is_within_range(620.0, 15e6)); // near the critical point
    /// ```
    pub fn is_within_range(&self, t_k: f64, p_pa: f64) -> bool {
        let (tr, pr) = self.reduced(t_k, p_pa);
        pr <= VIRIAL_REDUCED_PRESSURE_PER_REDUCED_TEMPERATURE * tr
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn slopes_are_the_derivatives_of_the_values() {
        let b = PitzerCurlVirial::new(562.05, 4.895e6, 0.21).unwrap();
        for t in [250.0, 353.0, 500.0, 800.0] {
            let h = 1e-4 * t;
            let (v, d1, d2) = b.second_virial_with_slopes(t);
            let (vu, d1u, _) = b.second_virial_with_slopes(t + h);
            let (vd, d1d, _) = b.second_virial_with_slopes(t - h);
            assert!(((vu - vd) / (2.0 * h) / d1 - 1.0).abs() < 1e-7, "{t}");
            assert!(((d1u - d1d) / (2.0 * h) / d2 - 1.0).abs() < 1e-7, "{t}");
            // H^R/P = B − T dB/dT and its slope −T d²B/dT².
            let (g, dg) = b.residual_enthalpy_per_pa(t);
            assert!((g - (v - t * d1)).abs() < 1e-12 * g.abs(), "{t}");
            assert!((dg + t * d2).abs() < 1e-12 * dg.abs(), "{t}");
        }
    }

    #[test]
    fn reduced_form_matches_the_textbook_expression() {
        // H^R/(R Tc) = Pr [B⁰ − Tr dB⁰/dTr + ω (B¹ − Tr dB¹/dTr)], with the textbook's
        // printed derivatives 0.675/Tr^2.6 and 0.722/Tr^5.2 (from memory): agreement to the
        // rounding of those two coefficients.
        let (tc, pc, w) = (647.096, 22.064e6, 0.3443);
        let b = PitzerCurlVirial::new(tc, pc, w).unwrap();
        let (t, p) = (400.0, 2e5);
        let (tr, pr) = (t / tc, p / pc);
        let b0 = 0.083 - 0.422 / tr.powf(1.6);
        let b1 = 0.139 - 0.172 / tr.powf(4.2);
        let textbook = pr * (b0 - tr * 0.675 / tr.powf(2.6) + w * (b1 - tr * 0.722 / tr.powf(5.2)));
        let ours = b.residual_enthalpy_j_per_mol(t, p) / (GAS_CONSTANT * tc);
        // 0.675 and 0.722 are 0.03 % and 0.06 % below 0.6752 and 0.7224.
        assert!((ours / textbook - 1.0).abs() < 1e-3, "{ours} vs {textbook}");
    }
}
