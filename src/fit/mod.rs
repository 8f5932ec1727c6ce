//! Fitting correlations to a user's own measurements, and turning them into a component the
//! library can read.
//!
//! Three fits are offered, each with a report of residuals and machine-readable warnings:
//!
//! * [`fit_antoine`]: ln(P/Pa) = a − b/(T + c) to (T, Psat) points, by least squares on ln P.
//!   For a fixed c the model is linear in a and b, so the fit is a one-dimensional search on
//!   c with a and b eliminated by linear least squares (variable projection, G. H. Golub and
//!   V. Pereyra, *SIAM J. Numer. Anal.* 10 (1973) 413). The search scans c from the
//!   Clausius–Clapeyron line (c = 0) through the usual −40 K region to near the pole, then
//!   polishes the best bracket with Brent's method from the `argmin` crate.
//! * [`fit_extended`]: ln(P/Pa) = A + B/T + C ln T + D T^E with E chosen by the caller. With
//!   E fixed, A–D enter linearly and the fit is a linear least-squares problem, solved by
//!   Householder QR on centred, scaled columns.
//! * [`fit_cp_polynomial`]: Cp = a + bT + cT² + dT³ + eT⁴ of degree 0 to 4, by Householder QR
//!   on a column-scaled Vandermonde matrix in a centred, scaled temperature (never the normal
//!   equations), converted back to coefficients in T.
//!
//! Data can come from CSV text ([`read_points_csv`]); a fitted correlation, with the values
//! the user supplies, becomes a component through [`UserComponentBuilder`], which checks it
//! as the built-in library is checked and writes it in the component-file schema.
//!
//! ```
//! use flashduty::fit::{fit_antoine, DataPoint};
//! use flashduty::properties::{AntoineForm, VapourPressure};
//! // Points from the NIST Chemistry WebBook Antoine constants for benzene,
//! // log10(P/bar) = 4.01814 − 1203.835/(T − 53.226), 287.7–354.07 K (from memory).
//! let points: Vec<DataPoint> = (0..12)
//!     .map(|i| {
//!         let t = 290.0 + 5.0 * i as f64;
//!         DataPoint::new(t, 1e5 * 10f64.powf(4.01814 - 1203.835 / (t - 53.226)))
//!     })
//!     .collect();
//! let fit = fit_antoine(&points).unwrap();
//! let (a, b, c) = fit.constants(AntoineForm::Log10BarKelvin);
//! assert!((a - 4.01814).abs() < 1e-6 && (b - 1203.835).abs() < 1e-3 && (c + 53.226).abs() < 1e-4);
//! assert!(fit.report.max_abs_relative_deviation < 1e-9);
//! assert!(fit.report.warnings.is_empty());
//! ```
//!
//! Files: `data.rs` (points and their checks), `error.rs` (errors and warnings),
//! `report.rs` (residuals), `least_squares.rs` (Householder QR), `antoine.rs`,
//! `extended.rs`, `cp.rs` (the three fits), `csv.rs` (reading data), `user_component.rs`
//! (a checked component in the library's schema).

mod antoine;
mod cp;
mod csv;
mod data;
mod error;
mod extended;
mod least_squares;
mod pair;
mod report;
#[cfg(test)]
mod tests;
mod user_component;

pub use antoine::{AntoineFit, fit_antoine, published_constants};
pub use cp::{CpFit, fit_cp_polynomial};
pub use csv::read_points_csv;
pub use data::{DataKind, DataPoint, NEAR_DUPLICATE_K, RECOMMENDED_POINTS_PER_CONSTANT, RECOMMENDED_SPAN_K};
pub use error::{FitError, FitWarning};
pub use extended::{ExtendedFit, fit_extended};
pub use pair::{ConsistencyTest, PairFit, PointResidual, VlePoint, fit_pair, read_vle_csv};
pub use report::{FitReport, NamedConstant, Residual};
pub use user_component::{UserComponent, UserComponentBuilder};

/// The consistency checks, defined in [`crate::properties`] and re-exported here.
pub use crate::properties::{BOILING_POINT_TOLERANCE, ComponentChecks, LATENT_HEAT_TOLERANCE};
/// Molar gas constant, J/(mol·K): [`crate::units::GAS_CONSTANT`], re-exported here.
pub use crate::units::GAS_CONSTANT;
