//! [`fit_cp_polynomial`]: a heat-capacity polynomial in a centred, scaled temperature.

use super::data::{DataKind, DataPoint, check_points, data_range};
use super::error::FitError;
use super::least_squares::least_squares;
use super::report::{FitReport, make_report, named};
use crate::properties::{HeatCapacity, PolynomialCp};
use ndarray::{Array1, Array2};

/// A fitted heat-capacity polynomial and its report.
#[derive(Debug, Clone, PartialEq)]
pub struct CpFit {
    /// The correlation, valid over the data's range.
    pub polynomial: PolynomialCp,
    /// The coefficients a, b, … up to the fitted degree (length degree + 1), J/(mol·K)/Kⁿ.
    pub coefficients: Vec<f64>,
    /// The fit's report.
    pub report: FitReport,
}

// ---------------------------------------------------------------------------------------
// Data checks

/// Binomial coefficient C(n, k) for n <= 4.
pub(super) fn binomial(n: usize, k: usize) -> f64 {
    const ROWS: [[f64; 5]; 5] = [
        [1.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 1.0, 0.0, 0.0, 0.0],
        [1.0, 2.0, 1.0, 0.0, 0.0],
        [1.0, 3.0, 3.0, 1.0, 0.0],
        [1.0, 4.0, 6.0, 4.0, 1.0],
    ];
    ROWS[n][k]
}

/// Fits Cp = a + bT + cT² + dT³ + eT⁴, truncated at `degree` (0 to 4), to (T, Cp) points by
/// linear least squares on Cp.
///
/// The temperature is first centred and scaled to x = (T − T_mid)/(half span) in [−1, 1];
/// the column-scaled Vandermonde matrix in x is solved by Householder QR, and the
/// coefficients in x are expanded back to coefficients in T. The report's residuals are
/// those of the coefficients in T as stored, so any loss in that conversion is visible.
///
/// # Errors
/// [`FitError::InvalidDegree`]; as [`fit_antoine`](super::fit_antoine) for the data, with
/// [`FitError::NonPositiveHeatCapacity`]; [`FitError::TooFewPoints`] for fewer than
/// degree + 1 points.
///
/// ```
/// use flashduty::fit::{fit_cp_polynomial, DataPoint};
/// use flashduty::properties::HeatCapacity;
/// // Benzene liquid, DIPPR-100 in Perry's 7th ed. Table 2-153 (J/kmol/K ÷ 1000), from memory.
/// let cp = |t: f64| 129.44 - 0.1695 * t + 6.4781e-4 * t * t;
/// let pts: Vec<_> = (0..10).map(|i| { let t = 290.0 + 7.0 * i as f64; DataPoint::new(t, cp(t)) }).collect();
/// let fit = fit_cp_polynomial(&pts, 2).unwrap();
/// assert!((fit.coefficients[2] / 6.4781e-4 - 1.0).abs() < 1e-9);
/// assert!((fit.polynomial.cp(330.0) / cp(330.0) - 1.0).abs() < 1e-12);
/// ```
pub fn fit_cp_polynomial(points: &[DataPoint], degree: usize) -> Result<CpFit, FitError> {
    const MODEL: &str = "cp-polynomial";
    if degree > 4 {
        return Err(FitError::InvalidDegree { degree });
    }
    let n = degree + 1;
    let warnings = check_points(points, DataKind::HeatCapacity, MODEL, n)?;
    let validity = data_range(points);
    let mid = 0.5 * (validity.min_k + validity.max_k);
    let half = 0.5 * (validity.max_k - validity.min_k);
    let half = if half > 0.0 { half } else { 1.0 };
    let m = points.len();
    let mut a = Array2::<f64>::zeros((m, n));
    let mut y = Array1::<f64>::zeros(m);
    for (i, p) in points.iter().enumerate() {
        let x = (p.t_k - mid) / half;
        let mut xk = 1.0;
        for k in 0..n {
            a[[i, k]] = xk;
            xk *= x;
        }
        y[i] = p.value;
    }
    let beta = least_squares(a, y).ok_or_else(|| FitError::Degenerate {
        model: MODEL,
        why: format!("the data do not determine a degree-{degree} polynomial"),
    })?;
    // Σ_k β_k ((T − mid)/half)^k  =  Σ_j T^j Σ_{k≥j} β_k half^−k C(k, j) (−mid)^(k−j).
    let mut coefficients = vec![0.0; n];
    for (j, cj) in coefficients.iter_mut().enumerate() {
        *cj = (j..n)
            .map(|k| beta[k] / half.powi(k as i32) * binomial(k, j) * (-mid).powi((k - j) as i32))
            .sum();
    }
    let mut c5 = [0.0; 5];
    c5[..n].copy_from_slice(&coefficients);
    let polynomial = PolynomialCp::new(c5, validity).ok_or_else(|| FitError::Degenerate {
        model: MODEL,
        why: format!("the fitted coefficients {coefficients:?} are not finite"),
    })?;
    let report = make_report(
        MODEL,
        "Cp/(J/(mol K)) = a + b (T/K) + c (T/K)^2 + d (T/K)^3 + e (T/K)^4",
        named(&["a", "b", "c", "d", "e"], &coefficients),
        points,
        validity,
        warnings,
        |t| polynomial.cp(t),
    );
    Ok(CpFit {
        polynomial,
        coefficients,
        report,
    })
}

// ---------------------------------------------------------------------------------------
// CSV
