//! [`fit_extended`]: the extended (DIPPR-101) vapour-pressure form with a fixed exponent.

use super::data::{DataKind, DataPoint, check_points, data_range};
use super::error::FitError;
use super::least_squares::least_squares;
use super::report::{FitReport, make_report, named};
use crate::properties::{ExtendedAntoine, VapourPressure};
use ndarray::{Array1, Array2};

/// A fitted extended vapour-pressure equation and its report.
#[derive(Debug, Clone, PartialEq)]
pub struct ExtendedFit {
    /// The correlation, valid over the data's range.
    pub model: ExtendedAntoine,
    /// The constants A, B, C, D, E of ln(P/Pa) = A + B/T + C ln T + D T^E (E as given).
    pub constants: [f64; 5],
    /// The fit's report.
    pub report: FitReport,
}

/// Fits ln(P/Pa) = A + B/T + C ln T + D T^E to (T, Psat) points by least squares on ln P,
/// with the exponent E fixed by the caller (2 and 6 are common choices).
///
/// With E fixed the model is linear in A–D: the fit is one Householder QR solve on the
/// centred, scaled columns 1, 1/T, ln T and T^E.
///
/// # Errors
/// As [`fit_antoine`](super::fit_antoine) (four points at least), and [`FitError::InvalidExponent`] for an E that
/// is not finite or that makes T^E collinear with another term (0 or −1).
///
/// ```
/// use flashduty::fit::{fit_extended, DataPoint};
/// use flashduty::properties::VapourPressure;
/// // Points from the water constants of Perry's Chemical Engineers' Handbook 7th ed.,
/// // Table 2-6 (DIPPR-101), from memory.
/// let f = |t: f64| (73.649 - 7258.2 / t - 7.3037 * t.ln() + 4.1653e-6 * t * t).exp();
/// let pts: Vec<_> = (0..15).map(|i| { let t = 300.0 + 10.0 * i as f64; DataPoint::new(t, f(t)) }).collect();
/// let fit = fit_extended(&pts, 2.0).unwrap();
/// assert!(fit.report.max_abs_relative_deviation < 1e-9);
/// assert!((fit.constants[1] + 7258.2).abs() < 1e-3);
/// ```
pub fn fit_extended(points: &[DataPoint], exponent: f64) -> Result<ExtendedFit, FitError> {
    const MODEL: &str = "extended";
    if !exponent.is_finite() {
        return Err(FitError::InvalidExponent {
            exponent,
            why: "must be finite",
        });
    }
    if exponent == 0.0 || exponent == -1.0 {
        return Err(FitError::InvalidExponent {
            exponent,
            why: "T^E would repeat the constant or the 1/T term; choose e.g. 1, 2 or 6",
        });
    }
    let warnings = check_points(points, DataKind::VapourPressure, MODEL, 4)?;
    let validity = data_range(points);
    let m = points.len();
    let basis = |t: f64| [1.0 / t, t.ln(), t.powf(exponent)];
    let mut means = [0.0; 3];
    for p in points {
        for (mj, v) in means.iter_mut().zip(basis(p.t_k)) {
            *mj += v / m as f64;
        }
    }
    let mut a = Array2::<f64>::zeros((m, 4));
    let mut y = Array1::<f64>::zeros(m);
    for (i, p) in points.iter().enumerate() {
        a[[i, 0]] = 1.0;
        for (j, (v, mj)) in basis(p.t_k).iter().zip(&means).enumerate() {
            a[[i, j + 1]] = v - mj;
        }
        y[i] = p.value.ln();
    }
    let beta = least_squares(a, y).ok_or_else(|| FitError::Degenerate {
        model: MODEL,
        why: "the data do not determine A, B, C and D (too narrow a range for this form?)".to_string(),
    })?;
    let big_a = beta[0] - beta[1] * means[0] - beta[2] * means[1] - beta[3] * means[2];
    let constants = [big_a, beta[1], beta[2], beta[3], exponent];
    let model = ExtendedAntoine::new(big_a, beta[1], beta[2], beta[3], exponent, validity).ok_or_else(|| {
        FitError::Degenerate {
            model: MODEL,
            why: format!("the fitted constants {constants:?} are not finite"),
        }
    })?;
    let report = make_report(
        MODEL,
        "ln(P/Pa) = A + B/(T/K) + C ln(T/K) + D (T/K)^E",
        named(&["A", "B", "C", "D", "E"], &constants),
        points,
        validity,
        warnings,
        |t| model.psat_pa(t),
    );
    Ok(ExtendedFit {
        model,
        constants,
        report,
    })
}

// ---------------------------------------------------------------------------------------
// Heat-capacity polynomial
