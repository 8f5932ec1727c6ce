//! Latent-heat correlations: Watson from a known point, and the DIPPR-106 form. Both are
//! zero at and above the critical temperature.

use super::range::ValidityRange;

/// A pure-component latent heat of vaporisation, J/mol.
///
/// One method is required, [`latent_heat_with_slope`](Self::latent_heat_with_slope).
///
/// ```
/// use flashduty::properties::LatentHeat;
/// /// A made-up latent heat falling linearly to zero at 500 K (invented, for illustration).
/// struct Falling;
/// impl LatentHeat for Falling {
///     fn latent_heat_with_slope(&self, t_k: f64) -> (f64, f64) {
///         if t_k >= 500.0 { (0.0, 0.0) } else { (100.0 * (500.0 - t_k), -100.0) }
///     }
/// }
/// assert_eq!(Falling.latent_heat(400.0), 10_000.0);
/// ```
pub trait LatentHeat {
    /// ΔHvap at `t_k` in J/mol, and its temperature derivative in J/(mol·K).
    fn latent_heat_with_slope(&self, t_k: f64) -> (f64, f64);

    /// ΔHvap at `t_k`, J/mol.
    fn latent_heat(&self, t_k: f64) -> f64 {
        self.latent_heat_with_slope(t_k).0
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

impl<L: LatentHeat + ?Sized> LatentHeat for &L {
    fn latent_heat_with_slope(&self, t_k: f64) -> (f64, f64) {
        (**self).latent_heat_with_slope(t_k)
    }
    fn validity(&self) -> ValidityRange {
        (**self).validity()
    }
}

/// The Watson correlation, ΔH(T) = ΔH₁ ((Tc − T)/(Tc − T₁))ⁿ (K. M. Watson, *Ind. Eng.
/// Chem.* 35 (1943) 398), from one known value ΔH₁ at T₁, usually the normal boiling point.
/// The exponent n is 0.38 unless given.
///
/// Pros: needs one data point and Tc; within a few per cent from the triple point to near
/// the critical point for most non-associating liquids. Cons: poorer for water and alcohols
/// far from the anchor.
///
/// ```
/// use flashduty::properties::{LatentHeat, Watson};
/// // Benzene: 30.72 kJ/mol at 353.24 K, Tc 562.05 K (CRC Handbook), from memory.
/// let w = Watson::new(353.24, 30_720.0, 562.05, None).unwrap();
/// assert_eq!(w.latent_heat(353.24), 30_720.0);
/// assert!(w.latent_heat(300.0) > 30_720.0);
/// assert_eq!(w.latent_heat(562.05), 0.0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Watson {
    anchor_t_k: f64,
    anchor_j_per_mol: f64,
    critical_t_k: f64,
    exponent: f64,
    range: ValidityRange,
}

impl Watson {
    /// The default Watson exponent (Watson 1943; common practice).
    pub const DEFAULT_EXPONENT: f64 = 0.38;

    /// Builds the correlation; `None` unless 0 < `anchor_t_k` < `critical_t_k`, the anchor
    /// value is positive, and the exponent (0.38 if `None`) lies in (0, 1].
    pub fn new(anchor_t_k: f64, anchor_j_per_mol: f64, critical_t_k: f64, exponent: Option<f64>) -> Option<Self> {
        let exponent = exponent.unwrap_or(Self::DEFAULT_EXPONENT);
        let ok = anchor_t_k.is_finite()
            && critical_t_k.is_finite()
            && anchor_j_per_mol.is_finite()
            && anchor_t_k > 0.0
            && anchor_t_k < critical_t_k
            && anchor_j_per_mol > 0.0
            && exponent > 0.0
            && exponent <= 1.0;
        ok.then_some(Self {
            anchor_t_k,
            anchor_j_per_mol,
            critical_t_k,
            exponent,
            range: ValidityRange {
                min_k: 0.0,
                max_k: critical_t_k,
            },
        })
    }

    /// The anchor temperature (K) and latent heat there (J/mol).
    pub fn anchor(&self) -> (f64, f64) {
        (self.anchor_t_k, self.anchor_j_per_mol)
    }

    /// The exponent n.
    pub fn exponent(&self) -> f64 {
        self.exponent
    }
}

impl LatentHeat for Watson {
    #[inline]
    fn latent_heat_with_slope(&self, t_k: f64) -> (f64, f64) {
        if t_k >= self.critical_t_k {
            return (0.0, 0.0);
        }
        let span = self.critical_t_k - self.anchor_t_k;
        let ratio = (self.critical_t_k - t_k) / span;
        let value = self.anchor_j_per_mol * ratio.powf(self.exponent);
        (value, -self.exponent * value / (self.critical_t_k - t_k))
    }

    fn validity(&self) -> ValidityRange {
        self.range
    }
}

/// The DIPPR-106 form ΔH = A (1 − Tr)^(B + C Tr + D Tr² + E Tr³), Tr = T/Tc, with A in J/mol
/// (Perry's *Chemical Engineers' Handbook* tabulates A in J/kmol).
///
/// Pros: fitted over the whole liquid range; exact zero at Tc. Cons: five constants and Tc
/// must be the same Tc the fit used.
///
/// ```
/// use flashduty::properties::{Dippr106, LatentHeat, ValidityRange};
/// // Water, Perry's 7th ed. Table 2-193 (A = 5.2053e7 J/kmol), from memory.
/// let w = Dippr106::new([52_053.0, 0.3199, -0.212, 0.25795, 0.0], 647.13,
///     ValidityRange::new(273.16, 647.13).unwrap()).unwrap();
/// assert!((w.latent_heat(373.15) - 40_660.0).abs() < 400.0);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Dippr106 {
    constants: [f64; 5],
    critical_t_k: f64,
    range: ValidityRange,
}

impl Dippr106 {
    /// Builds the correlation; `None` unless the constants are finite, A is positive and
    /// Tc is positive.
    pub fn new(constants: [f64; 5], critical_t_k: f64, range: ValidityRange) -> Option<Self> {
        let ok = constants.iter().all(|c| c.is_finite())
            && constants[0] > 0.0
            && critical_t_k.is_finite()
            && critical_t_k > 0.0;
        ok.then_some(Self {
            constants,
            critical_t_k,
            range,
        })
    }

    /// The constants A (J/mol), B, C, D, E.
    pub fn constants(&self) -> [f64; 5] {
        self.constants
    }
}

impl LatentHeat for Dippr106 {
    #[inline]
    fn latent_heat_with_slope(&self, t_k: f64) -> (f64, f64) {
        if t_k >= self.critical_t_k {
            return (0.0, 0.0);
        }
        let [a, b, c, d, e] = self.constants;
        let tr = t_k / self.critical_t_k;
        let expo = b + tr * (c + tr * (d + tr * e));
        let dexpo = c + tr * (2.0 * d + tr * 3.0 * e);
        let one_minus = 1.0 - tr;
        let ln_base = one_minus.ln();
        let value = a * (expo * ln_base).exp();
        // d/dTr [expo ln(1−Tr)] = dexpo ln(1−Tr) − expo/(1−Tr)
        let dvalue_dtr = value * (dexpo * ln_base - expo / one_minus);
        (value, dvalue_dtr / self.critical_t_k)
    }

    fn validity(&self) -> ValidityRange {
        self.range
    }
}

/// The latent-heat correlations the component library can hold.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum LatentHeatModel {
    /// [`Watson`].
    Watson(Watson),
    /// [`Dippr106`].
    Dippr106(Dippr106),
}

impl LatentHeat for LatentHeatModel {
    #[inline]
    fn latent_heat_with_slope(&self, t_k: f64) -> (f64, f64) {
        match self {
            Self::Watson(m) => m.latent_heat_with_slope(t_k),
            Self::Dippr106(m) => m.latent_heat_with_slope(t_k),
        }
    }
    fn validity(&self) -> ValidityRange {
        match self {
            Self::Watson(m) => m.validity(),
            Self::Dippr106(m) => m.validity(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn slopes_match_finite_differences() {
        let w = Watson::new(353.24, 30_720.0, 562.05, None).unwrap();
        let d = Dippr106::new(
            [52_053.0, 0.3199, -0.212, 0.25795, 0.0],
            647.13,
            ValidityRange::UNBOUNDED,
        )
        .unwrap();
        for (m, t) in [(&w as &dyn LatentHeat, 300.0), (&w, 500.0), (&d, 300.0), (&d, 600.0)] {
            let h = 1e-4;
            let fd = (m.latent_heat(t + h) - m.latent_heat(t - h)) / (2.0 * h);
            let (_, an) = m.latent_heat_with_slope(t);
            assert!((fd - an).abs() < 1e-6 * an.abs(), "{t}: {fd} vs {an}");
        }
    }

    #[test]
    fn zero_at_and_above_critical() {
        let d = Dippr106::new(
            [52_053.0, 0.3199, -0.212, 0.25795, 0.0],
            647.13,
            ValidityRange::UNBOUNDED,
        )
        .unwrap();
        assert_eq!(d.latent_heat(647.13), 0.0);
        assert_eq!(d.latent_heat(700.0), 0.0);
        let w = Watson::new(353.24, 30_720.0, 562.05, None).unwrap();
        assert_eq!(w.latent_heat_with_slope(600.0), (0.0, 0.0));
        assert!(w.is_extrapolated(600.0));
    }

    #[test]
    fn rejects_bad_constants() {
        assert!(Watson::new(600.0, 30_000.0, 562.0, None).is_none());
        assert!(Watson::new(350.0, -1.0, 562.0, None).is_none());
        assert!(Watson::new(350.0, 1.0, 562.0, Some(2.0)).is_none());
        assert!(Dippr106::new([-1.0, 0.3, 0.0, 0.0, 0.0], 600.0, ValidityRange::UNBOUNDED).is_none());
    }
}
