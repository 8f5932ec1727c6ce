//! Vapour-pressure correlations: the Antoine equation in its common published forms, and
//! the extended form `ln P = A + B/T + C ln T + D T^E` valid up to the critical point.

use super::range::ValidityRange;
use serde::{Deserialize, Serialize};

/// A pure-component vapour-pressure model.
///
/// One method is required, [`ln_psat_with_slope`](Self::ln_psat_with_slope), which returns
/// ln(Psat / Pa) and its analytic temperature derivative; the rest have defaults.
///
/// ```
/// use flashduty::properties::VapourPressure;
/// /// A made-up Clausius–Clapeyron line through 1 atm at 350 K (invented, for illustration).
/// struct Line;
/// impl VapourPressure for Line {
///     fn ln_psat_with_slope(&self, t_k: f64) -> (f64, f64) {
///         let b = 4000.0;
///         (101_325f64.ln() + b * (1.0 / 350.0 - 1.0 / t_k), b / (t_k * t_k))
///     }
/// }
/// assert!((Line.psat_pa(350.0) - 101_325.0).abs() < 1e-6);
/// ```
pub trait VapourPressure {
    /// ln(Psat / Pa) at `t_k` (K > 0), and d ln(Psat) / dT in 1/K.
    fn ln_psat_with_slope(&self, t_k: f64) -> (f64, f64);

    /// Vapour pressure in Pa.
    fn psat_pa(&self, t_k: f64) -> f64 {
        self.ln_psat_with_slope(t_k).0.exp()
    }

    /// d ln(Psat) / dT in 1/K.
    fn dln_psat_dt(&self, t_k: f64) -> f64 {
        self.ln_psat_with_slope(t_k).1
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

impl<V: VapourPressure + ?Sized> VapourPressure for &V {
    fn ln_psat_with_slope(&self, t_k: f64) -> (f64, f64) {
        (**self).ln_psat_with_slope(t_k)
    }
    fn validity(&self) -> ValidityRange {
        (**self).validity()
    }
}

/// The unit convention of a published set of Antoine constants,
/// `log P = A − B / (T + C)`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum AntoineForm {
    /// log10(P / bar) with T in K (the form of the NIST Chemistry WebBook).
    #[serde(rename = "log10-bar-K")]
    Log10BarKelvin,
    /// log10(P / mmHg) with t in °C (the classic handbook form).
    #[serde(rename = "log10-mmHg-degC")]
    Log10MmHgCelsius,
    /// ln(P / Pa) with T in K.
    #[serde(rename = "ln-Pa-K")]
    LnPascalKelvin,
    /// log10(P / kPa) with t in °C.
    #[serde(rename = "log10-kPa-degC")]
    Log10KiloPascalCelsius,
}

/// The Antoine equation, held internally as ln(P / Pa) = a − b / (T / K + c).
///
/// Below the fitted range the equation is continued by its Clausius–Clapeyron tangent at the
/// lowest fitted temperature (ln P linear in 1/T, value and slope continuous), so that the
/// pole at T = −c is never reached and the vapour pressure stays positive and increasing at
/// every temperature. Such calls are reported as extrapolated.
///
/// Pros: the most widely published form; cheap. Cons: valid only over the range fitted,
/// typically 1 to 200 kPa; wrong near the critical point.
///
/// ```
/// use flashduty::properties::{Antoine, AntoineForm, VapourPressure, ValidityRange};
/// // Benzene, NIST Chemistry WebBook (Eon, Pommier & Kaliaguine 1974 fit), from memory.
/// let a = Antoine::from_published(
///     AntoineForm::Log10BarKelvin, 4.01814, 1203.835, -53.226,
///     ValidityRange::new(287.7, 354.07).unwrap(),
/// ).unwrap();
/// // Benzene boils at 353.2 K (CRC Handbook, from memory).
/// assert!((a.psat_pa(353.24) / 101_325.0 - 1.0).abs() < 0.01);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Antoine {
    a: f64,
    b: f64,
    c: f64,
    range: ValidityRange,
}

impl Antoine {
    /// Converts published constants in `form` to the internal form.
    ///
    /// Returns `None` when a constant is not finite, `b` is not positive, or the pole
    /// T = −c lies at or above the low end of the range.
    pub fn from_published(form: AntoineForm, a: f64, b: f64, c: f64, range: ValidityRange) -> Option<Self> {
        let ln10 = std::f64::consts::LN_10;
        let (a, b, c) = match form {
            AntoineForm::Log10BarKelvin => (1e5f64.ln() + ln10 * a, ln10 * b, c),
            AntoineForm::Log10MmHgCelsius => (crate::units::MMHG_PA.ln() + ln10 * a, ln10 * b, c - 273.15),
            AntoineForm::LnPascalKelvin => (a, b, c),
            AntoineForm::Log10KiloPascalCelsius => (1e3f64.ln() + ln10 * a, ln10 * b, c - 273.15),
        };
        let ok = a.is_finite() && b.is_finite() && c.is_finite() && b > 0.0 && range.min_k + c > 0.0;
        ok.then_some(Self { a, b, c, range })
    }

    /// The internal constants (a, b, c) of ln(P / Pa) = a − b / (T / K + c).
    pub fn internal_constants(&self) -> (f64, f64, f64) {
        (self.a, self.b, self.c)
    }

    #[inline]
    fn raw(&self, t_k: f64) -> (f64, f64) {
        let d = t_k + self.c;
        (self.a - self.b / d, self.b / (d * d))
    }
}

impl VapourPressure for Antoine {
    #[inline]
    fn ln_psat_with_slope(&self, t_k: f64) -> (f64, f64) {
        let t0 = self.range.min_k;
        if t_k >= t0 {
            return self.raw(t_k);
        }
        // Clausius–Clapeyron tangent at t0: ln P = ln P0 + s t0² (1/t0 − 1/T).
        let (ln_p0, s0) = self.raw(t0);
        let m = s0 * t0 * t0;
        (ln_p0 + m * (1.0 / t0 - 1.0 / t_k), m / (t_k * t_k))
    }

    fn validity(&self) -> ValidityRange {
        self.range
    }
}

/// The extended vapour-pressure form ln(P / Pa) = A + B/T + C ln T + D T^E (the DIPPR-101
/// form, as tabulated in Perry's *Chemical Engineers' Handbook*), usually fitted from the
/// triple point to the critical point.
///
/// Pros: one set of constants over the whole liquid range. Cons: five constants; the
/// published sets are in Pa and K, and a wrong exponent E is easy to miss.
///
/// ```
/// use flashduty::properties::{ExtendedAntoine, VapourPressure, ValidityRange};
/// // Water, Perry's Chemical Engineers' Handbook 7th ed. Table 2-6, from memory.
/// let w = ExtendedAntoine::new(73.649, -7258.2, -7.3037, 4.1653e-6, 2.0,
///     ValidityRange::new(273.16, 647.1).unwrap()).unwrap();
/// assert!((w.psat_pa(373.15) / 101_325.0 - 1.0).abs() < 0.01);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ExtendedAntoine {
    a: f64,
    b: f64,
    c: f64,
    d: f64,
    e: f64,
    range: ValidityRange,
}

impl ExtendedAntoine {
    /// Builds the correlation; `None` if any constant is not finite.
    pub fn new(a: f64, b: f64, c: f64, d: f64, e: f64, range: ValidityRange) -> Option<Self> {
        [a, b, c, d, e]
            .iter()
            .all(|v| v.is_finite())
            .then_some(Self { a, b, c, d, e, range })
    }
}

impl ExtendedAntoine {
    #[inline]
    fn raw(&self, t_k: f64) -> (f64, f64) {
        // Published exponents are almost always small integers (1, 2, 6): powi is exact
        // there and several times cheaper than powf.
        let power = if self.e == self.e.trunc() && self.e.abs() <= 16.0 {
            t_k.powi(self.e as i32)
        } else {
            t_k.powf(self.e)
        };
        let dte = self.d * power;
        let ln_p = self.a + self.b / t_k + self.c * t_k.ln() + dte;
        let slope = -self.b / (t_k * t_k) + self.c / t_k + self.e * dte / t_k;
        (ln_p, slope)
    }
}

impl VapourPressure for ExtendedAntoine {
    /// Above the fitted range (normally the critical point) the curve is continued by its
    /// Clausius–Clapeyron tangent at the top of the range, so that it keeps rising: the
    /// D·T^E term would otherwise turn it over. Such calls are reported as extrapolated.
    #[inline]
    fn ln_psat_with_slope(&self, t_k: f64) -> (f64, f64) {
        let t1 = self.range.max_k;
        if t_k <= t1 {
            return self.raw(t_k);
        }
        let (ln_p1, s1) = self.raw(t1);
        let m = (s1 * t1 * t1).max(0.0);
        (ln_p1 + m * (1.0 / t1 - 1.0 / t_k), m / (t_k * t_k))
    }

    fn validity(&self) -> ValidityRange {
        self.range
    }
}

/// The vapour-pressure correlations the component library can hold.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum VapourPressureModel {
    /// [`Antoine`].
    Antoine(Antoine),
    /// [`ExtendedAntoine`].
    Extended(ExtendedAntoine),
}

impl VapourPressure for VapourPressureModel {
    #[inline]
    fn ln_psat_with_slope(&self, t_k: f64) -> (f64, f64) {
        match self {
            Self::Antoine(m) => m.ln_psat_with_slope(t_k),
            Self::Extended(m) => m.ln_psat_with_slope(t_k),
        }
    }

    fn validity(&self) -> ValidityRange {
        match self {
            Self::Antoine(m) => m.validity(),
            Self::Extended(m) => m.validity(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn benzene() -> Antoine {
        // NIST Chemistry WebBook, benzene, from memory.
        Antoine::from_published(
            AntoineForm::Log10BarKelvin,
            4.01814,
            1203.835,
            -53.226,
            ValidityRange::new(287.7, 354.07).unwrap(),
        )
        .unwrap()
    }

    #[test]
    fn forms_agree() {
        // The same curve in two unit conventions: convert the bar/K constants by hand.
        let b = benzene();
        let mm = Antoine::from_published(
            AntoineForm::Log10MmHgCelsius,
            4.01814 + (1e5 / crate::units::MMHG_PA).log10(),
            1203.835,
            -53.226 + 273.15,
            ValidityRange::new(287.7, 354.07).unwrap(),
        )
        .unwrap();
        for t in [290.0, 320.0, 350.0] {
            assert!((b.psat_pa(t) / mm.psat_pa(t) - 1.0).abs() < 1e-12);
        }
    }

    #[test]
    fn slope_is_analytic_derivative() {
        let b = benzene();
        let w = ExtendedAntoine::new(73.649, -7258.2, -7.3037, 4.1653e-6, 2.0, ValidityRange::UNBOUNDED).unwrap();
        for t in [150.0, 287.7, 300.0, 340.0, 500.0] {
            for m in [&b as &dyn VapourPressure, &w] {
                let h = 1e-4;
                let fd = (m.ln_psat_with_slope(t + h).0 - m.ln_psat_with_slope(t - h).0) / (2.0 * h);
                let an = m.dln_psat_dt(t);
                assert!((fd - an).abs() < 1e-6 * an.abs(), "{t}: {fd} vs {an}");
            }
        }
    }

    #[test]
    fn below_range_is_positive_increasing_and_flagged() {
        let b = benzene();
        let mut last = 0.0;
        for t in [1.0, 10.0, 53.0, 60.0, 200.0, 287.7] {
            let p = b.psat_pa(t);
            assert!(p >= last && p.is_finite(), "{t}: {p}");
            last = p;
        }
        assert!(b.is_extrapolated(200.0));
        assert!(!b.is_extrapolated(300.0));
    }

    #[test]
    fn rejects_bad_constants() {
        let r = ValidityRange::new(40.0, 100.0).unwrap();
        assert!(Antoine::from_published(AntoineForm::Log10BarKelvin, 4.0, 1200.0, -53.0, r).is_none());
        assert!(Antoine::from_published(AntoineForm::Log10BarKelvin, 4.0, -1.0, 0.0, r).is_none());
        assert!(ExtendedAntoine::new(f64::NAN, 0.0, 0.0, 0.0, 0.0, r).is_none());
    }
}
