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

use crate::library::{Library, SCHEMA};
use crate::properties::component::ComponentRecord;
use crate::properties::{
    Antoine, AntoineForm, Component, ComponentError, ExtendedAntoine, HeatCapacity, LatentHeat, PolynomialCp,
    ValidityRange, VapourPressure,
};
use crate::units::{self, QuantityKind, UnitError};
use argmin::core::{CostFunction, Executor, State};
use argmin::solver::brent::BrentOpt;
use ndarray::{Array1, Array2};
use serde::Serialize;
use serde_json::{Value, json};
use std::collections::BTreeMap;
use std::fmt;

/// Molar gas constant, J/(mol·K): [`crate::units::GAS_CONSTANT`], re-exported here.
pub use crate::units::GAS_CONSTANT;

/// Largest accepted |Psat(Tb)/101.325 kPa − 1| of a user component (common practice; the
/// tolerance this project applies to its own library).
pub const BOILING_POINT_TOLERANCE: f64 = 0.015;

/// Largest accepted |ΔH_CC/ΔH(Tb) − 1|, where ΔH_CC = R Tb² d ln Psat/dT is the
/// Clausius–Clapeyron latent heat (common practice: the ideal-gas, negligible-liquid-volume
/// form runs a few per cent high at 1 atm because it ignores ΔZ).
pub const LATENT_HEAT_TOLERANCE: f64 = 0.08;

/// Points per fitted constant below which a fit is flagged as thinly supported (common
/// practice).
pub const RECOMMENDED_POINTS_PER_CONSTANT: usize = 2;

/// Temperature span below which a fit is flagged as narrow, K (common practice).
pub const RECOMMENDED_SPAN_K: f64 = 20.0;

/// Two temperatures closer than this (but not equal) are flagged as near duplicates, K
/// (common practice: below the resolution of most plant and laboratory thermometry).
pub const NEAR_DUPLICATE_K: f64 = 0.01;

/// One measured point: a temperature and the measured value at it.
///
/// `value` is a vapour pressure in Pa for the vapour-pressure fits, and a molar heat
/// capacity in J/(mol·K) for [`fit_cp_polynomial`].
///
/// ```
/// use flashduty::fit::DataPoint;
/// let p = DataPoint::new(373.15, 101_325.0);
/// assert_eq!(p.t_k, 373.15);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct DataPoint {
    /// Temperature, K.
    pub t_k: f64,
    /// The measured value, SI (Pa or J/(mol·K)).
    pub value: f64,
}

impl DataPoint {
    /// A point at `t_k` (K) with `value` (SI).
    pub const fn new(t_k: f64, value: f64) -> Self {
        Self { t_k, value }
    }
}

/// What a set of data points measures.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum DataKind {
    /// Vapour pressure, Pa.
    VapourPressure,
    /// Molar heat capacity, J/(mol·K).
    HeatCapacity,
}

impl DataKind {
    fn column(self) -> &'static str {
        match self {
            DataKind::VapourPressure => "vapour pressure",
            DataKind::HeatCapacity => "heat capacity",
        }
    }
}

/// An error in the data or in a request; each names the data row (1-based, counting data
/// rows as a user does, without header or comment lines) or the field, and the value.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum FitError {
    /// Fewer points than the model has constants.
    #[error("{model} has {constants} constants and needs at least {constants} data points; {points} given")]
    TooFewPoints {
        /// The model being fitted.
        model: &'static str,
        /// Points given.
        points: usize,
        /// Constants to fit.
        constants: usize,
    },
    /// A value is NaN or infinite.
    #[error("data row {row}: {column} is {value}, not a finite number")]
    NotFinite {
        /// 1-based data row.
        row: usize,
        /// `temperature`, `vapour pressure` or `heat capacity`.
        column: &'static str,
        /// The value given.
        value: f64,
    },
    /// A temperature at or below absolute zero.
    #[error("data row {row}: temperature {t_k} K is at or below absolute zero")]
    NonPositiveTemperature {
        /// 1-based data row.
        row: usize,
        /// The temperature, K.
        t_k: f64,
    },
    /// A vapour pressure that is zero or negative.
    #[error("data row {row}: vapour pressure {pressure_pa} Pa is not positive (give absolute pressures)")]
    NonPositivePressure {
        /// 1-based data row.
        row: usize,
        /// The pressure, Pa.
        pressure_pa: f64,
    },
    /// A heat capacity that is zero or negative.
    #[error("data row {row}: heat capacity {cp_j_per_mol_k} J/(mol·K) is not positive")]
    NonPositiveHeatCapacity {
        /// 1-based data row.
        row: usize,
        /// The heat capacity, J/(mol·K).
        cp_j_per_mol_k: f64,
    },
    /// Two rows at the same temperature.
    #[error(
        "data row {row}: temperature {t_k} K repeats data row {first_row}; average repeated measurements into one point"
    )]
    DuplicateTemperature {
        /// 1-based data row of the later occurrence.
        row: usize,
        /// 1-based data row of the first occurrence.
        first_row: usize,
        /// The temperature, K.
        t_k: f64,
    },
    /// A polynomial degree outside 0..=4.
    #[error("heat-capacity polynomial degree {degree} is not supported; choose 0 to 4")]
    InvalidDegree {
        /// The degree asked for.
        degree: usize,
    },
    /// An exponent E of the extended form that cannot be fitted.
    #[error("extended vapour-pressure exponent E = {exponent}: {why}")]
    InvalidExponent {
        /// The exponent asked for.
        exponent: f64,
        /// What is wrong with it.
        why: &'static str,
    },
    /// The data do not determine the constants (e.g. collinear columns), or the best fit is
    /// not a usable correlation.
    #[error("{model}: {why}")]
    Degenerate {
        /// The model being fitted.
        model: &'static str,
        /// What went wrong.
        why: String,
    },
    /// The iterative solver failed.
    #[error("{model}: the solver failed: {message}")]
    Solver {
        /// The model being fitted.
        model: &'static str,
        /// The solver's message.
        message: String,
    },
    /// CSV text with no header line.
    #[error("CSV: no header line (expected e.g. '{example}')")]
    CsvNoHeader {
        /// An example header for the kind of data.
        example: &'static str,
    },
    /// A needed column is not in the CSV header.
    #[error("CSV line {line}: no {column} column in header {header:?} (expected e.g. '{example}')")]
    CsvMissingColumn {
        /// 1-based line of the header.
        line: usize,
        /// The column looked for.
        column: &'static str,
        /// The header's cells.
        header: Vec<String>,
        /// An example header for the kind of data.
        example: &'static str,
    },
    /// A unit in the CSV header that is not known.
    #[error("CSV line {line}: {source}")]
    CsvUnit {
        /// 1-based line of the header.
        line: usize,
        /// The unit error, naming the header cell and the unit.
        source: UnitError,
    },
    /// A heat-capacity unit in the CSV header that is not known.
    #[error(
        "CSV line {line}: column '{column}': unknown heat-capacity unit '{unit}' (accepted: J/mol/K, kJ/kmol/K, J/kmol/K, kJ/mol/K, cal/mol/K, Btu/lbmol/degF)"
    )]
    CsvHeatCapacityUnit {
        /// 1-based line of the header.
        line: usize,
        /// The header cell.
        column: String,
        /// The unit given.
        unit: String,
    },
    /// A data line with a different number of fields from the header.
    #[error("CSV line {line} (data row {row}): {found} fields, but the header has {expected}")]
    CsvFieldCount {
        /// 1-based line in the text.
        line: usize,
        /// 1-based data row.
        row: usize,
        /// Fields found.
        found: usize,
        /// Fields in the header.
        expected: usize,
    },
    /// A field that is not a number.
    #[error("CSV line {line} (data row {row}): column '{column}': '{text}' is not a number")]
    CsvNumber {
        /// 1-based line in the text.
        line: usize,
        /// 1-based data row.
        row: usize,
        /// The header cell of the column.
        column: String,
        /// The text found.
        text: String,
    },
    /// A required value of a user component was not given.
    #[error("user component '{component}': {field} is required")]
    MissingField {
        /// The component's name.
        component: String,
        /// The missing field, as named in the component-file schema.
        field: &'static str,
    },
    /// A given value of a user component is unusable.
    #[error("user component '{component}': {field} = {value}: {why}")]
    InvalidValue {
        /// The component's name.
        component: String,
        /// The field, as named in the component-file schema.
        field: String,
        /// The value, as text.
        value: String,
        /// What is wrong with it.
        why: String,
    },
    /// A strict build whose consistency checks failed.
    #[error("user component '{component}' fails its consistency checks: {}", join_warnings(.failed))]
    ChecksFailed {
        /// The component's name.
        component: String,
        /// The failed checks, with their values.
        failed: Vec<FitWarning>,
    },
    /// The library's own checks rejected the component.
    #[error(transparent)]
    Component(#[from] ComponentError),
}

impl FitError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::fit::FitError;
    /// assert_eq!(FitError::TooFewPoints { model: "Antoine", points: 1, constants: 3 }.kind(), "too-few-points");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            FitError::TooFewPoints { .. } => "too-few-points",
            FitError::NotFinite { .. } => "not-finite",
            FitError::NonPositiveTemperature { .. } => "non-positive-temperature",
            FitError::NonPositivePressure { .. } => "non-positive-pressure",
            FitError::NonPositiveHeatCapacity { .. } => "non-positive-heat-capacity",
            FitError::DuplicateTemperature { .. } => "duplicate-temperature",
            FitError::InvalidDegree { .. } => "invalid-degree",
            FitError::InvalidExponent { .. } => "invalid-exponent",
            FitError::Degenerate { .. } => "degenerate",
            FitError::Solver { .. } => "solver",
            FitError::CsvNoHeader { .. } => "csv-no-header",
            FitError::CsvMissingColumn { .. } => "csv-missing-column",
            FitError::CsvUnit { .. } => "csv-unit",
            FitError::CsvHeatCapacityUnit { .. } => "csv-heat-capacity-unit",
            FitError::CsvFieldCount { .. } => "csv-field-count",
            FitError::CsvNumber { .. } => "csv-number",
            FitError::MissingField { .. } => "missing-field",
            FitError::InvalidValue { .. } => "invalid-value",
            FitError::ChecksFailed { .. } => "checks-failed",
            FitError::Component(e) => e.kind(),
        }
    }
}

fn join_warnings(w: &[FitWarning]) -> String {
    w.iter().map(ToString::to_string).collect::<Vec<_>>().join("; ")
}

/// A warning about a fit or a user component: something to look at before trusting it.
/// Serialises with a `kind` tag for machine reading.
///
/// ```
/// use flashduty::fit::FitWarning;
/// let w = FitWarning::NarrowRange { span_k: 8.0, recommended_span_k: 20.0 };
/// assert!(serde_json::to_string(&w).unwrap().contains("\"kind\":\"narrow-range\""));
/// assert!(w.to_string().contains("8 K"));
/// ```
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum FitWarning {
    /// Fewer than [`RECOMMENDED_POINTS_PER_CONSTANT`] points per constant.
    FewPoints {
        /// Points given.
        points: usize,
        /// Constants fitted.
        constants: usize,
        /// Points recommended.
        recommended: usize,
    },
    /// The data span less than [`RECOMMENDED_SPAN_K`].
    NarrowRange {
        /// Highest minus lowest temperature, K.
        span_k: f64,
        /// The recommended span, K.
        recommended_span_k: f64,
    },
    /// Two temperatures closer than [`NEAR_DUPLICATE_K`].
    NearDuplicateTemperature {
        /// 1-based data row.
        row: usize,
        /// 1-based data row of the nearby point.
        other_row: usize,
        /// Its temperature, K.
        t_k: f64,
        /// The nearby point's temperature, K.
        other_t_k: f64,
    },
    /// A vapour pressure that does not rise with temperature.
    NotMonotonic {
        /// 1-based data row of the point whose pressure fails to rise.
        row: usize,
        /// Its temperature, K.
        t_k: f64,
        /// Its pressure, Pa.
        pressure_pa: f64,
        /// 1-based data row of the next colder point.
        previous_row: usize,
        /// That point's temperature, K.
        previous_t_k: f64,
        /// That point's pressure, Pa.
        previous_pressure_pa: f64,
    },
    /// A nonlinear constant ended at the edge of the range searched: the data barely
    /// determine it.
    ConstantAtSearchBound {
        /// The constant, as named in the published form.
        constant: &'static str,
        /// Its fitted value.
        value: f64,
    },
    /// Psat at the normal boiling point is not 101.325 kPa within
    /// [`BOILING_POINT_TOLERANCE`].
    BoilingPointPressure {
        /// The normal boiling point given, K.
        normal_boiling_point_k: f64,
        /// The vapour pressure there, Pa.
        psat_pa: f64,
        /// Psat/101 325 Pa − 1.
        relative_deviation: f64,
        /// The tolerance.
        tolerance: f64,
    },
    /// The Clausius–Clapeyron latent heat at Tb disagrees with the latent-heat correlation
    /// by more than [`LATENT_HEAT_TOLERANCE`].
    LatentHeatConsistency {
        /// The normal boiling point, K.
        normal_boiling_point_k: f64,
        /// R Tb² d ln Psat/dT, J/mol.
        clausius_clapeyron_j_per_mol: f64,
        /// The latent-heat correlation at Tb, J/mol.
        latent_heat_j_per_mol: f64,
        /// Clausius–Clapeyron value / correlation − 1.
        relative_deviation: f64,
        /// The tolerance.
        tolerance: f64,
    },
    /// The normal boiling point lies outside the vapour-pressure fit's range, so the
    /// boiling-point checks use an extrapolation.
    BoilingPointOutsideFit {
        /// The normal boiling point, K.
        normal_boiling_point_k: f64,
        /// Low end of the fitted range, K.
        min_k: f64,
        /// High end of the fitted range, K.
        max_k: f64,
    },
}

impl fmt::Display for FitWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FitWarning::FewPoints {
                points,
                constants,
                recommended,
            } => write!(
                f,
                "only {points} points for {constants} constants; at least {recommended} are recommended"
            ),
            FitWarning::NarrowRange {
                span_k,
                recommended_span_k,
            } => write!(
                f,
                "the data span only {span_k} K (at least {recommended_span_k} K recommended); do not extrapolate"
            ),
            FitWarning::NearDuplicateTemperature {
                row,
                other_row,
                t_k,
                other_t_k,
            } => write!(
                f,
                "data row {row} ({t_k} K) is within {NEAR_DUPLICATE_K} K of data row {other_row} ({other_t_k} K)"
            ),
            FitWarning::NotMonotonic {
                row,
                t_k,
                pressure_pa,
                previous_row,
                previous_t_k,
                previous_pressure_pa,
            } => write!(
                f,
                "vapour pressure does not rise with temperature: data row {row} ({t_k} K, {pressure_pa} Pa) \
                 vs data row {previous_row} ({previous_t_k} K, {previous_pressure_pa} Pa)"
            ),
            FitWarning::ConstantAtSearchBound { constant, value } => write!(
                f,
                "constant {constant} = {value} ended at the edge of the range searched; the data barely determine it"
            ),
            FitWarning::BoilingPointPressure {
                normal_boiling_point_k,
                psat_pa,
                relative_deviation,
                tolerance,
            } => write!(
                f,
                "Psat at the normal boiling point {normal_boiling_point_k} K is {psat_pa:.1} Pa, {:+.2} % from 101325 Pa \
                 (tolerance {:.1} %)",
                100.0 * relative_deviation,
                100.0 * tolerance
            ),
            FitWarning::LatentHeatConsistency {
                normal_boiling_point_k,
                clausius_clapeyron_j_per_mol,
                latent_heat_j_per_mol,
                relative_deviation,
                tolerance,
            } => write!(
                f,
                "Clausius-Clapeyron latent heat at {normal_boiling_point_k} K is {clausius_clapeyron_j_per_mol:.0} J/mol, \
                 {:+.2} % from the latent-heat correlation's {latent_heat_j_per_mol:.0} J/mol (tolerance {:.1} %)",
                100.0 * relative_deviation,
                100.0 * tolerance
            ),
            FitWarning::BoilingPointOutsideFit {
                normal_boiling_point_k,
                min_k,
                max_k,
            } => write!(
                f,
                "the normal boiling point {normal_boiling_point_k} K lies outside the vapour-pressure data ({min_k}–{max_k} K)"
            ),
        }
    }
}

/// One point's residual.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Residual {
    /// 1-based data row.
    pub row: usize,
    /// Temperature, K.
    pub t_k: f64,
    /// The measured value (SI).
    pub measured: f64,
    /// The fitted correlation's value (SI).
    pub fitted: f64,
    /// fitted / measured − 1.
    pub relative_deviation: f64,
}

/// A fitted constant with its name in the report's equation.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct NamedConstant {
    /// The name, as in [`FitReport::equation`].
    pub name: &'static str,
    /// The value, in the units of the equation.
    pub value: f64,
}

/// How well a correlation fits its data.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FitReport {
    /// The model: `antoine`, `extended` or `cp-polynomial`.
    pub model: &'static str,
    /// The equation the constants belong to, with its units.
    pub equation: &'static str,
    /// The fitted constants (for the extended form, E as given).
    pub constants: Vec<NamedConstant>,
    /// The data's temperature range, which becomes the correlation's validity range.
    pub validity: ValidityRange,
    /// Per-point residuals, in data-row order.
    pub residuals: Vec<Residual>,
    /// Largest |relative deviation|.
    pub max_abs_relative_deviation: f64,
    /// The data row where it occurs.
    pub max_deviation_row: usize,
    /// Root-mean-square relative deviation.
    pub rms_relative_deviation: f64,
    /// Iterations of the nonlinear solver (0 for linear fits).
    pub iterations: u64,
    /// Warnings about the data and the fit.
    pub warnings: Vec<FitWarning>,
}

impl fmt::Display for FitReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(
            f,
            "{} fit: {} points, {}–{} K; max |dev| {:.4} % (data row {}), RMS {:.4} %",
            self.model,
            self.residuals.len(),
            self.validity.min_k,
            self.validity.max_k,
            100.0 * self.max_abs_relative_deviation,
            self.max_deviation_row,
            100.0 * self.rms_relative_deviation
        )?;
        let constants: Vec<String> = self
            .constants
            .iter()
            .map(|c| format!("{} = {:e}", c.name, c.value))
            .collect();
        writeln!(f, "{}: {}", self.equation, constants.join(", "))?;
        for w in &self.warnings {
            writeln!(f, "warning: {w}")?;
        }
        Ok(())
    }
}

/// A fitted Antoine equation and its report.
#[derive(Debug, Clone, PartialEq)]
pub struct AntoineFit {
    /// The correlation, valid over the data's range.
    pub antoine: Antoine,
    /// The fit's report.
    pub report: FitReport,
}

impl AntoineFit {
    /// The constants (A, B, C) of `log P = A − B/(T + C)` in a published unit convention.
    ///
    /// ```
    /// # use flashduty::fit::{fit_antoine, DataPoint};
    /// use flashduty::properties::AntoineForm;
    /// # let pts: Vec<_> = (0..8).map(|i| { let t = 300.0 + 10.0 * i as f64;
    /// #     DataPoint::new(t, (23.0 - 3500.0 / (t - 45.0)).exp()) }).collect();
    /// # let fit = fit_antoine(&pts).unwrap();
    /// let (a, b, c) = fit.constants(AntoineForm::LnPascalKelvin);
    /// assert!((a - 23.0).abs() < 1e-6 && (b - 3500.0).abs() < 1e-3 && (c + 45.0).abs() < 1e-4);
    /// ```
    pub fn constants(&self, form: AntoineForm) -> (f64, f64, f64) {
        published_constants(&self.antoine, form)
    }
}

/// The constants of `antoine` in a published unit convention (the inverse of
/// [`Antoine::from_published`]).
///
/// ```
/// use flashduty::fit::published_constants;
/// use flashduty::properties::{Antoine, AntoineForm, ValidityRange};
/// let r = ValidityRange::new(287.7, 354.07).unwrap();
/// let a = Antoine::from_published(AntoineForm::Log10BarKelvin, 4.01814, 1203.835, -53.226, r).unwrap();
/// let (x, y, z) = published_constants(&a, AntoineForm::Log10MmHgCelsius);
/// let back = Antoine::from_published(AntoineForm::Log10MmHgCelsius, x, y, z, r).unwrap();
/// let (a1, b1, c1) = a.internal_constants();
/// let (a2, b2, c2) = back.internal_constants();
/// assert!((a1 - a2).abs() < 1e-12 && (b1 - b2).abs() < 1e-9 && (c1 - c2).abs() < 1e-9);
/// ```
pub fn published_constants(antoine: &Antoine, form: AntoineForm) -> (f64, f64, f64) {
    let (a, b, c) = antoine.internal_constants();
    let ln10 = std::f64::consts::LN_10;
    match form {
        AntoineForm::LnPascalKelvin => (a, b, c),
        AntoineForm::Log10BarKelvin => ((a - 1e5f64.ln()) / ln10, b / ln10, c),
        AntoineForm::Log10MmHgCelsius => ((a - units::MMHG_PA.ln()) / ln10, b / ln10, c + 273.15),
        AntoineForm::Log10KiloPascalCelsius => ((a - 1e3f64.ln()) / ln10, b / ln10, c + 273.15),
    }
}

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

/// Checks the points (finite, positive, no repeated temperature, enough of them) and
/// returns the warnings about them.
fn check_points(
    points: &[DataPoint],
    kind: DataKind,
    model: &'static str,
    constants: usize,
) -> Result<Vec<FitWarning>, FitError> {
    for (i, p) in points.iter().enumerate() {
        let row = i + 1;
        if !p.t_k.is_finite() {
            return Err(FitError::NotFinite {
                row,
                column: "temperature",
                value: p.t_k,
            });
        }
        if !p.value.is_finite() {
            return Err(FitError::NotFinite {
                row,
                column: kind.column(),
                value: p.value,
            });
        }
        if p.t_k <= 0.0 {
            return Err(FitError::NonPositiveTemperature { row, t_k: p.t_k });
        }
        if p.value <= 0.0 {
            return Err(match kind {
                DataKind::VapourPressure => FitError::NonPositivePressure {
                    row,
                    pressure_pa: p.value,
                },
                DataKind::HeatCapacity => FitError::NonPositiveHeatCapacity {
                    row,
                    cp_j_per_mol_k: p.value,
                },
            });
        }
    }
    // Sorted by temperature, ties in row order.
    let mut order: Vec<usize> = (0..points.len()).collect();
    order.sort_by(|&i, &j| points[i].t_k.total_cmp(&points[j].t_k).then(i.cmp(&j)));
    for w in order.windows(2) {
        let (i, j) = (w[0], w[1]);
        if points[i].t_k == points[j].t_k {
            return Err(FitError::DuplicateTemperature {
                row: i.max(j) + 1,
                first_row: i.min(j) + 1,
                t_k: points[i].t_k,
            });
        }
    }
    if points.len() < constants {
        return Err(FitError::TooFewPoints {
            model,
            points: points.len(),
            constants,
        });
    }

    let mut warnings = Vec::new();
    let recommended = RECOMMENDED_POINTS_PER_CONSTANT * constants;
    if points.len() < recommended {
        warnings.push(FitWarning::FewPoints {
            points: points.len(),
            constants,
            recommended,
        });
    }
    if let (Some(&lo), Some(&hi)) = (order.first(), order.last()) {
        let span = points[hi].t_k - points[lo].t_k;
        if span < RECOMMENDED_SPAN_K {
            warnings.push(FitWarning::NarrowRange {
                span_k: span,
                recommended_span_k: RECOMMENDED_SPAN_K,
            });
        }
    }
    for w in order.windows(2) {
        let (i, j) = (w[0], w[1]);
        if points[j].t_k - points[i].t_k < NEAR_DUPLICATE_K {
            warnings.push(FitWarning::NearDuplicateTemperature {
                row: j + 1,
                other_row: i + 1,
                t_k: points[j].t_k,
                other_t_k: points[i].t_k,
            });
        }
        if kind == DataKind::VapourPressure && points[j].value <= points[i].value {
            warnings.push(FitWarning::NotMonotonic {
                row: j + 1,
                t_k: points[j].t_k,
                pressure_pa: points[j].value,
                previous_row: i + 1,
                previous_t_k: points[i].t_k,
                previous_pressure_pa: points[i].value,
            });
        }
    }
    Ok(warnings)
}

fn data_range(points: &[DataPoint]) -> ValidityRange {
    let lo = points.iter().map(|p| p.t_k).fold(f64::INFINITY, f64::min);
    let hi = points.iter().map(|p| p.t_k).fold(f64::NEG_INFINITY, f64::max);
    // The points were checked finite and positive, and there is at least one.
    ValidityRange::new(lo, hi).unwrap_or(ValidityRange::UNBOUNDED)
}

fn named(names: &[&'static str], values: &[f64]) -> Vec<NamedConstant> {
    names
        .iter()
        .zip(values)
        .map(|(&name, &value)| NamedConstant { name, value })
        .collect()
}

fn make_report(
    model: &'static str,
    equation: &'static str,
    constants: Vec<NamedConstant>,
    points: &[DataPoint],
    validity: ValidityRange,
    warnings: Vec<FitWarning>,
    f: impl Fn(f64) -> f64,
) -> FitReport {
    let residuals: Vec<Residual> = points
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let fitted = f(p.t_k);
            Residual {
                row: i + 1,
                t_k: p.t_k,
                measured: p.value,
                fitted,
                relative_deviation: fitted / p.value - 1.0,
            }
        })
        .collect();
    let (mut max, mut max_row, mut sum2) = (0.0f64, 1, 0.0);
    for r in &residuals {
        let d = r.relative_deviation.abs();
        // NaN compares false; make it the maximum so it cannot hide.
        if d > max || d.is_nan() {
            max = d;
            max_row = r.row;
        }
        sum2 += r.relative_deviation * r.relative_deviation;
    }
    let rms = (sum2 / residuals.len().max(1) as f64).sqrt();
    FitReport {
        model,
        equation,
        constants,
        validity,
        residuals,
        max_abs_relative_deviation: max,
        max_deviation_row: max_row,
        rms_relative_deviation: rms,
        iterations: 0,
        warnings,
    }
}

// ---------------------------------------------------------------------------------------
// Linear least squares

/// Solves min ‖A x − y‖₂ by Householder QR of the column-scaled A. Returns `None` when a
/// column is zero or A is numerically rank deficient.
fn least_squares(mut a: Array2<f64>, mut y: Array1<f64>) -> Option<Array1<f64>> {
    let (m, n) = a.dim();
    if n == 0 || m < n || y.len() != m {
        return None;
    }
    // Column scaling: every column to unit 2-norm.
    let mut scale = vec![0.0; n];
    for (j, sj) in scale.iter_mut().enumerate() {
        let mut col = a.column_mut(j);
        let big = col.iter().fold(0.0f64, |acc, v| acc.max(v.abs()));
        if !(big.is_finite() && big > 0.0) {
            return None;
        }
        let norm = big * col.iter().map(|v| (v / big) * (v / big)).sum::<f64>().sqrt();
        col.mapv_inplace(|v| v / norm);
        *sj = norm;
    }
    // Householder triangularisation, applying each reflector to y as well.
    let mut v = vec![0.0; m];
    for k in 0..n {
        // (The `s!` slicing macro cannot be used: it expands to code the crate forbids.)
        let len = m - k;
        for (vi, xi) in v[..len].iter_mut().zip(a.column(k).iter().skip(k)) {
            *vi = *xi;
        }
        let norm = v[..len].iter().map(|t| t * t).sum::<f64>().sqrt();
        if norm == 0.0 {
            return None;
        }
        let alpha = if v[0] > 0.0 { -norm } else { norm };
        v[0] -= alpha;
        let vtv: f64 = v[..len].iter().map(|t| t * t).sum();
        if vtv > 0.0 {
            for j in k..n {
                let dot: f64 = (0..len).map(|i| v[i] * a[[k + i, j]]).sum();
                let f = 2.0 * dot / vtv;
                for i in 0..len {
                    a[[k + i, j]] -= f * v[i];
                }
            }
            let dot: f64 = (0..len).map(|i| v[i] * y[k + i]).sum();
            let f = 2.0 * dot / vtv;
            for i in 0..len {
                y[k + i] -= f * v[i];
            }
        }
    }
    // Rank check on R's diagonal (the columns have unit norm, so |R_kk| <= 1).
    let rmax = (0..n).fold(0.0f64, |acc, k| acc.max(a[[k, k]].abs()));
    if (0..n).any(|k| a[[k, k]].abs() <= 1e-13 * rmax) {
        return None;
    }
    // Back substitution R z = (Qᵀ y)[..n], then undo the scaling.
    let mut z = Array1::<f64>::zeros(n);
    for k in (0..n).rev() {
        let mut sum = y[k];
        for j in k + 1..n {
            sum -= a[[k, j]] * z[j];
        }
        z[k] = sum / a[[k, k]];
    }
    for (zk, sk) in z.iter_mut().zip(&scale) {
        *zk /= sk;
    }
    z.iter().all(|v| v.is_finite()).then_some(z)
}

// ---------------------------------------------------------------------------------------
// Antoine

/// The Antoine least-squares problem profiled over c: for each c, a and b come from linear
/// least squares on ln P against 1/(T + c).
struct AntoineProfile {
    t: Vec<f64>,
    ln_p: Vec<f64>,
}

impl AntoineProfile {
    /// (a, b, sum of squared ln P residuals) at fixed c; `None` if T + c is not positive at
    /// every point or 1/(T + c) has no spread.
    fn solve(&self, c: f64) -> Option<(f64, f64, f64)> {
        let n = self.t.len() as f64;
        let mut x = Vec::with_capacity(self.t.len());
        for &t in &self.t {
            let d = t + c;
            if d.is_nan() || d <= 0.0 {
                return None;
            }
            x.push(1.0 / d);
        }
        let xm = x.iter().sum::<f64>() / n;
        let ym = self.ln_p.iter().sum::<f64>() / n;
        let (mut sxx, mut sxy) = (0.0, 0.0);
        for (xi, yi) in x.iter().zip(&self.ln_p) {
            sxx += (xi - xm) * (xi - xm);
            sxy += (xi - xm) * (yi - ym);
        }
        if sxx.is_nan() || sxx <= 0.0 {
            return None;
        }
        // Centred simple regression ln P = ym + β (x − xm): a = ym − β xm, b = −β.
        let beta = sxy / sxx;
        let sse: f64 = x
            .iter()
            .zip(&self.ln_p)
            .map(|(xi, yi)| {
                let r = (yi - ym) - beta * (xi - xm);
                r * r
            })
            .sum();
        Some((ym - beta * xm, -beta, sse))
    }
}

impl CostFunction for AntoineProfile {
    type Param = f64;
    type Output = f64;

    fn cost(&self, c: &f64) -> Result<f64, argmin::core::Error> {
        self.solve(*c)
            .map(|s| s.2)
            .ok_or_else(|| argmin::core::Error::msg(format!("C = {c} puts the pole inside the data")))
    }
}

/// Fits the Antoine equation ln(P/Pa) = a − b/(T + c) to (T, Psat) points by least squares on
/// ln P (so each point weighs by its relative error).
///
/// The search on c covers poles from 5 % to 300 % of the lowest temperature (c from −0.95
/// T_min to +2 T_min), which includes the Clausius–Clapeyron line c = 0 and the usual
/// c ≈ −40 K; a and b follow by linear least squares. A best c at the edge of that range is
/// reported as [`FitWarning::ConstantAtSearchBound`].
///
/// # Errors
/// [`FitError::NotFinite`], [`FitError::NonPositiveTemperature`],
/// [`FitError::NonPositivePressure`] or [`FitError::DuplicateTemperature`] naming the data row;
/// [`FitError::TooFewPoints`] for fewer than three points; [`FitError::Degenerate`] when the
/// best fit has the pressure falling with temperature; [`FitError::Solver`].
///
/// ```
/// use flashduty::fit::{fit_antoine, DataPoint, FitError};
/// let two = [DataPoint::new(300.0, 1e4), DataPoint::new(320.0, 2e4)];
/// assert!(matches!(fit_antoine(&two), Err(FitError::TooFewPoints { points: 2, constants: 3, .. })));
/// ```
pub fn fit_antoine(points: &[DataPoint]) -> Result<AntoineFit, FitError> {
    const MODEL: &str = "antoine";
    let mut warnings = check_points(points, DataKind::VapourPressure, MODEL, 3)?;
    let validity = data_range(points);
    let t_min = validity.min_k;
    let profile = AntoineProfile {
        t: points.iter().map(|p| p.t_k).collect(),
        ln_p: points.iter().map(|p| p.value.ln()).collect(),
    };

    // Scan the pole distance u = T_min + c on a logarithmic grid.
    const GRID: usize = 121;
    let (u_lo, u_hi) = (0.05 * t_min, 3.0 * t_min);
    let grid: Vec<f64> = (0..GRID)
        .map(|k| {
            let f = k as f64 / (GRID - 1) as f64;
            u_lo * (u_hi / u_lo).powf(f) - t_min
        })
        .collect();
    let mut best: Option<(usize, f64)> = None;
    for (k, &c) in grid.iter().enumerate() {
        if let Some((_, _, sse)) = profile.solve(c)
            && sse.is_finite()
            && best.is_none_or(|(_, b)| sse < b)
        {
            best = Some((k, sse));
        }
    }
    let Some((k, grid_sse)) = best else {
        return Err(FitError::Degenerate {
            model: MODEL,
            why: "no value of C gives a finite fit".to_string(),
        });
    };
    let (lo, hi) = (grid[k.saturating_sub(1)], grid[(k + 1).min(GRID - 1)]);

    // Polish the bracket with Brent's method.
    let solver = BrentOpt::new(lo, hi).set_tolerance(f64::EPSILON.sqrt(), 1e-10);
    let result = Executor::new(profile, solver)
        .configure(|state| state.max_iters(200))
        .run()
        .map_err(|e| FitError::Solver {
            model: MODEL,
            message: e.to_string(),
        })?;
    let iterations = result.state().get_iter();
    let brent_c = result.state().get_best_param().copied();
    let profile = &result.problem.problem;
    let mut c = grid[k];
    if let Some(bc) = brent_c
        && let Some(profile) = profile
        && let Some((_, _, sse)) = profile.solve(bc)
        && sse <= grid_sse
    {
        c = bc;
    }
    let Some((a, b, _)) = profile.as_ref().and_then(|p| p.solve(c)) else {
        return Err(FitError::Solver {
            model: MODEL,
            message: "the solver lost its problem".to_string(),
        });
    };
    if k == 0 || k == GRID - 1 {
        warnings.push(FitWarning::ConstantAtSearchBound {
            constant: "C",
            value: c,
        });
    }
    let antoine = Antoine::from_published(AntoineForm::LnPascalKelvin, a, b, c, validity).ok_or_else(|| {
        FitError::Degenerate {
            model: MODEL,
            why: format!(
                "the best fit (ln P = {a} − {b}/(T + {c})) does not rise with temperature; check the data's order and units"
            ),
        }
    })?;
    let constants = named(&["A", "B", "C"], &[a, b, c]);
    let mut report = make_report(
        MODEL,
        "ln(P/Pa) = A - B/(T/K + C)",
        constants,
        points,
        validity,
        warnings,
        |t| antoine.psat_pa(t),
    );
    report.iterations = iterations;
    Ok(AntoineFit { antoine, report })
}

// ---------------------------------------------------------------------------------------
// Extended form

/// Fits ln(P/Pa) = A + B/T + C ln T + D T^E to (T, Psat) points by least squares on ln P,
/// with the exponent E fixed by the caller (2 and 6 are common choices).
///
/// With E fixed the model is linear in A–D: the fit is one Householder QR solve on the
/// centred, scaled columns 1, 1/T, ln T and T^E.
///
/// # Errors
/// As [`fit_antoine`] (four points at least), and [`FitError::InvalidExponent`] for an E that
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

/// Binomial coefficient C(n, k) for n <= 4.
fn binomial(n: usize, k: usize) -> f64 {
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
/// [`FitError::InvalidDegree`]; as [`fit_antoine`] for the data, with
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

const TEMPERATURE_NAMES: &[&str] = &["t", "temp", "temperature"];
const PRESSURE_NAMES: &[&str] = &[
    "p",
    "psat",
    "p_sat",
    "pvap",
    "p_vap",
    "pressure",
    "vapour pressure",
    "vapor pressure",
    "vapour_pressure",
    "vapor_pressure",
];
const CP_NAMES: &[&str] = &["cp", "c_p", "heat capacity", "heat_capacity"];

/// Factor from a molar heat-capacity unit to J/(mol·K), or `None` if unknown. Accepts
/// energy/amount/temperature spellings such as `J/mol/K`, `J/(mol K)`, `kJ/kmol/K`,
/// `J_per_mol_K`. Energy units: J, kJ, cal and kcal (thermochemical calorie, 4.184 J exactly),
/// Btu (International Table, 1055.05585262 J exactly); amounts: mol, kmol, lbmol
/// (453.59237 mol); temperature intervals: K, degC (1), degF, degR (9/5 per K). Factors from
/// NIST Special Publication 811 (2008), Appendix B.
fn cp_unit_factor(unit: &str) -> Option<f64> {
    let u: String = unit
        .replace("_per_", "/")
        .replace('_', "/")
        .chars()
        .filter(|c| !matches!(c, ' ' | '(' | ')' | '·' | '⋅' | '*' | '.' | '-'))
        .collect::<String>()
        .to_lowercase();
    let (energy, rest) = u.split_once('/')?;
    let energy = match energy {
        "j" => 1.0,
        "kj" => 1e3,
        "cal" => 4.184,
        "kcal" => 4184.0,
        "btu" => units::BTU_J,
        _ => return None,
    };
    let amount_of = |a: &str| match a {
        "mol" => Some(1.0),
        "kmol" => Some(1e3),
        "lbmol" => Some(units::POUND_KG * 1e3),
        _ => None,
    };
    let interval_of = |t: &str| match t {
        "k" | "degc" | "°c" | "c" => Some(1.0),
        "degf" | "°f" | "f" | "degr" | "°r" | "r" => Some(1.8),
        _ => None,
    };
    let (amount, interval) = match rest.split_once('/') {
        Some((a, t)) => (amount_of(a)?, interval_of(t)?),
        None => {
            // "molk", "kmolk", "lbmoldegf": amount followed by the interval.
            let i = rest.find("mol")? + 3;
            (amount_of(&rest[..i])?, interval_of(&rest[i..])?)
        }
    };
    Some(energy / amount * interval)
}

/// A header cell split into its lower-case name and its unit, if the cell names one of
/// `names`. Accepts `name`, `name [unit]` and `name_unit` (when `unit_ok(unit)`).
fn match_header(cell: &str, names: &[&str], unit_ok: impl Fn(&str) -> bool) -> Option<Option<String>> {
    let cell = cell.trim();
    if let Some(open) = cell.find('[')
        && let Some(inner) = cell[open + 1..].strip_suffix(']')
    {
        let name = cell[..open].trim().to_lowercase();
        return names.contains(&name.as_str()).then(|| Some(inner.trim().to_string()));
    }
    let lower = cell.to_lowercase();
    if names.contains(&lower.as_str()) {
        return Some(None);
    }
    for (i, _) in cell.match_indices('_') {
        // Split the cell itself: lower-casing may change byte offsets outside ASCII.
        let (name, unit) = (cell[..i].to_lowercase(), &cell[i + 1..]);
        if names.contains(&name.as_str()) && unit_ok(unit) {
            return Some(Some(unit.to_string()));
        }
    }
    None
}

/// Reads data points from CSV text.
///
/// The first line that is neither blank nor a `#` comment is the header; it must name a
/// temperature column (`T`, `Temp`, `Temperature`) and a value column: for
/// [`DataKind::VapourPressure`] `P`, `Psat`, `Pvap`, `Pressure` or `vapour pressure`; for
/// [`DataKind::HeatCapacity`] `Cp` or `heat capacity`. Names ignore case. A unit follows in
/// brackets, `T [degC]`, `P [kPa]`, `Cp [J/mol/K]`, or after an underscore, `T_K`, `psat_Pa`;
/// without one the value is SI (K, Pa, J/(mol·K)). Temperature and pressure units are those
/// of [`crate::units`]; other columns are ignored. Fields are separated by commas, without
/// quoting; lines starting with `#` are comments.
///
/// The values are only converted here; the fits check them (finite, positive, no repeated
/// temperature) and name the data row, which counts the data lines from 1.
///
/// # Errors
/// [`FitError::CsvNoHeader`], [`FitError::CsvMissingColumn`], [`FitError::CsvUnit`],
/// [`FitError::CsvHeatCapacityUnit`], [`FitError::CsvFieldCount`] and [`FitError::CsvNumber`],
/// naming the line.
///
/// ```
/// use flashduty::fit::{read_points_csv, DataKind};
/// let text = "# plant lab, sample 17\nT [degC], P [kPa]\n80, 101.0\n90, 136.1\n";
/// let pts = read_points_csv(text, DataKind::VapourPressure).unwrap();
/// assert_eq!(pts.len(), 2);
/// assert!((pts[0].t_k - 353.15).abs() < 1e-12 && (pts[0].value - 101_000.0).abs() < 1e-9);
/// ```
pub fn read_points_csv(text: &str, kind: DataKind) -> Result<Vec<DataPoint>, FitError> {
    let example = match kind {
        DataKind::VapourPressure => "T [degC], P [kPa]",
        DataKind::HeatCapacity => "T [K], Cp [J/mol/K]",
    };
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let Some((header_line, header)) = lines.next() else {
        return Err(FitError::CsvNoHeader { example });
    };
    let cells: Vec<String> = header.split(',').map(|c| c.trim().to_string()).collect();
    let missing = |column: &'static str| FitError::CsvMissingColumn {
        line: header_line,
        column,
        header: cells.clone(),
        example,
    };

    // Temperature column and its unit.
    let temp_ok = |u: &str| units::to_si(QuantityKind::Temperature, "", 1.0, u).is_ok();
    let (t_col, t_unit) = cells
        .iter()
        .enumerate()
        .find_map(|(i, c)| match_header(c, TEMPERATURE_NAMES, temp_ok).map(|u| (i, u)))
        .ok_or_else(|| missing("temperature"))?;
    if let Some(u) = &t_unit {
        units::to_si(QuantityKind::Temperature, &cells[t_col], 1.0, u).map_err(|source| FitError::CsvUnit {
            line: header_line,
            source,
        })?;
    }

    // Value column and its conversion to SI.
    let (v_col, to_si): (usize, Box<dyn Fn(f64) -> f64>) = match kind {
        DataKind::VapourPressure => {
            let p_ok = |u: &str| units::to_si(QuantityKind::Pressure, "", 1.0, u).is_ok();
            let (col, unit) = cells
                .iter()
                .enumerate()
                .find_map(|(i, c)| match_header(c, PRESSURE_NAMES, p_ok).map(|u| (i, u)))
                .ok_or_else(|| missing("vapour pressure"))?;
            match unit {
                None => (col, Box::new(|v| v)),
                Some(u) => {
                    // Pressure units are all pure scales.
                    let factor = units::to_si(QuantityKind::Pressure, &cells[col], 1.0, &u).map_err(|source| {
                        FitError::CsvUnit {
                            line: header_line,
                            source,
                        }
                    })?;
                    (col, Box::new(move |v| v * factor))
                }
            }
        }
        DataKind::HeatCapacity => {
            let cp_ok = |u: &str| cp_unit_factor(u).is_some();
            let (col, unit) = cells
                .iter()
                .enumerate()
                .find_map(|(i, c)| match_header(c, CP_NAMES, cp_ok).map(|u| (i, u)))
                .ok_or_else(|| missing("heat capacity"))?;
            match unit {
                None => (col, Box::new(|v| v)),
                Some(u) => {
                    let factor = cp_unit_factor(&u).ok_or_else(|| FitError::CsvHeatCapacityUnit {
                        line: header_line,
                        column: cells[col].clone(),
                        unit: u.clone(),
                    })?;
                    (col, Box::new(move |v| v * factor))
                }
            }
        }
    };

    let mut points = Vec::new();
    for (row0, (line, text)) in lines.enumerate() {
        let row = row0 + 1;
        let fields: Vec<&str> = text.split(',').map(str::trim).collect();
        if fields.len() != cells.len() {
            return Err(FitError::CsvFieldCount {
                line,
                row,
                found: fields.len(),
                expected: cells.len(),
            });
        }
        let number = |col: usize| -> Result<f64, FitError> {
            fields[col].parse::<f64>().map_err(|_| FitError::CsvNumber {
                line,
                row,
                column: cells[col].clone(),
                text: fields[col].to_string(),
            })
        };
        let t = number(t_col)?;
        let v = number(v_col)?;
        // Non-finite values pass through unconverted, for the fit to report by row.
        let t_k = match (&t_unit, t.is_finite()) {
            (Some(u), true) => units::to_si(QuantityKind::Temperature, &cells[t_col], t, u)
                .map_err(|source| FitError::CsvUnit { line, source })?,
            _ => t,
        };
        points.push(DataPoint::new(t_k, if v.is_finite() { to_si(v) } else { v }));
    }
    Ok(points)
}

// ---------------------------------------------------------------------------------------
// User components

/// The consistency checks of a component at its normal boiling point, with their values.
///
/// ```
/// use flashduty::fit::ComponentChecks;
/// use flashduty::library::Library;
/// let benzene = Library::builtin().get("benzene").unwrap();
/// let c = ComponentChecks::of(benzene);
/// assert!(c.boiling_point_passed(), "{c:?}");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ComponentChecks {
    /// The normal boiling point, K.
    pub normal_boiling_point_k: f64,
    /// Psat at Tb, Pa.
    pub psat_at_boiling_point_pa: f64,
    /// Psat(Tb)/101 325 Pa − 1.
    pub psat_relative_deviation: f64,
    /// [`BOILING_POINT_TOLERANCE`].
    pub psat_tolerance: f64,
    /// R Tb² d ln Psat/dT at Tb, J/mol.
    pub clausius_clapeyron_latent_heat_j_per_mol: f64,
    /// The latent-heat correlation at Tb, J/mol.
    pub latent_heat_at_boiling_point_j_per_mol: f64,
    /// Clausius–Clapeyron value / correlation − 1.
    pub latent_heat_relative_deviation: f64,
    /// [`LATENT_HEAT_TOLERANCE`].
    pub latent_heat_tolerance: f64,
}

impl ComponentChecks {
    /// Runs the checks on a component.
    pub fn of(component: &Component) -> Self {
        let tb = component.normal_boiling_point_k();
        let (ln_p, slope) = component.vapour_pressure().ln_psat_with_slope(tb);
        let psat = ln_p.exp();
        let cc = GAS_CONSTANT * tb * tb * slope;
        let dh = component.latent_heat().latent_heat(tb);
        Self {
            normal_boiling_point_k: tb,
            psat_at_boiling_point_pa: psat,
            psat_relative_deviation: psat / units::ATM_PA - 1.0,
            psat_tolerance: BOILING_POINT_TOLERANCE,
            clausius_clapeyron_latent_heat_j_per_mol: cc,
            latent_heat_at_boiling_point_j_per_mol: dh,
            latent_heat_relative_deviation: cc / dh - 1.0,
            latent_heat_tolerance: LATENT_HEAT_TOLERANCE,
        }
    }

    /// Whether Psat(Tb) is 101.325 kPa within tolerance.
    pub fn boiling_point_passed(&self) -> bool {
        self.psat_relative_deviation.abs() <= self.psat_tolerance
    }

    /// Whether the Clausius–Clapeyron latent heat agrees within tolerance.
    pub fn latent_heat_passed(&self) -> bool {
        self.latent_heat_relative_deviation.abs() <= self.latent_heat_tolerance
    }

    /// The failed checks as warnings.
    pub fn failures(&self) -> Vec<FitWarning> {
        let mut out = Vec::new();
        if !self.boiling_point_passed() {
            out.push(FitWarning::BoilingPointPressure {
                normal_boiling_point_k: self.normal_boiling_point_k,
                psat_pa: self.psat_at_boiling_point_pa,
                relative_deviation: self.psat_relative_deviation,
                tolerance: self.psat_tolerance,
            });
        }
        if !self.latent_heat_passed() {
            out.push(FitWarning::LatentHeatConsistency {
                normal_boiling_point_k: self.normal_boiling_point_k,
                clausius_clapeyron_j_per_mol: self.clausius_clapeyron_latent_heat_j_per_mol,
                latent_heat_j_per_mol: self.latent_heat_at_boiling_point_j_per_mol,
                relative_deviation: self.latent_heat_relative_deviation,
                tolerance: self.latent_heat_tolerance,
            });
        }
        out
    }
}

#[derive(Debug, Clone)]
enum VapourPressureEntry {
    Antoine {
        antoine: Antoine,
        note: Option<String>,
    },
    Extended {
        constants: [f64; 5],
        range: ValidityRange,
        note: Option<String>,
    },
}

#[derive(Debug, Clone)]
enum HeatCapacityEntry {
    Polynomial {
        coefficients: Vec<f64>,
        range: ValidityRange,
        note: Option<String>,
    },
    Constant {
        value: f64,
        range: ValidityRange,
    },
}

#[derive(Debug, Clone)]
struct Citation {
    source: String,
    from_memory: bool,
    note: Option<String>,
}

/// The schema field names a value can be cited for.
const CITABLE_FIELDS: &[&str] = &[
    "molar_mass_g_per_mol",
    "critical_temperature_K",
    "critical_pressure_Pa",
    "acentric_factor",
    "normal_boiling_point_K",
    "vapour_pressure",
    "liquid_heat_capacity",
    "vapour_heat_capacity",
    "latent_heat",
];

fn fit_note(r: &FitReport) -> String {
    format!(
        "fitted to {} points, {}-{} K; max |dev| {:.3} %, RMS {:.3} %",
        r.residuals.len(),
        r.validity.min_k,
        r.validity.max_k,
        100.0 * r.max_abs_relative_deviation,
        100.0 * r.rms_relative_deviation
    )
}

/// Builds a user component from fitted correlations and given values, checks it, and writes
/// it as a component file.
///
/// Every value cites the user's source (key `user-data` unless set with
/// [`source_key`](Self::source_key)), whose citation is the text given to [`new`](Self::new),
/// with `from_memory: false`; [`cite`](Self::cite) lets a value cite another source instead.
///
/// [`build`](Self::build) runs the library's checks ([`Component`] schema checks), then the
/// consistency checks at the normal boiling point ([`ComponentChecks`]): Psat(Tb) within
/// 1.5 % of 101.325 kPa and the Clausius–Clapeyron latent heat within 8 % of the latent heat
/// given. Failed checks are warnings, or errors after [`strict`](Self::strict).
///
/// ```
/// use flashduty::fit::{fit_antoine, DataPoint, UserComponentBuilder};
/// use flashduty::library::Library;
/// // Points from the NIST WebBook Antoine constants for benzene (from memory).
/// let psat = |t: f64| 1e5 * 10f64.powf(4.01814 - 1203.835 / (t - 53.226));
/// let pts: Vec<_> = (0..14).map(|i| { let t = 290.0 + 5.0 * i as f64; DataPoint::new(t, psat(t)) }).collect();
/// let vp = fit_antoine(&pts).unwrap();
/// // Benzene constants: CRC Handbook (M, Tb, ΔHvap) and Poling–Prausnitz–O'Connell
/// // (Tc, Pc, ω), from memory; the name and CAS number are made up for the example.
/// let user = UserComponentBuilder::new("benzene-plant", "0000-00-0", "C6H6", "plant laboratory, 2026-03, sample 17")
///     .molar_mass_g_per_mol(78.112)
///     .critical_temperature_k(562.05)
///     .critical_pressure_pa(4.895e6)
///     .acentric_factor(0.210)
///     .normal_boiling_point_k(353.24)
///     .vapour_pressure_antoine(&vp)
///     .liquid_cp_constant(136.0, 280.0, 360.0)
///     .vapour_cp_constant(82.4, 280.0, 600.0)
///     .latent_heat_watson(353.24, 30_720.0, None)
///     .build()
///     .unwrap();
/// assert!(user.warnings().is_empty(), "{:?}", user.warnings());
/// let mut lib = Library::default();
/// lib.add_json("mine.json", &user.to_file_string()).unwrap();
/// assert_eq!(lib.get("benzene-plant").unwrap().cas(), "0000-00-0");
/// ```
#[derive(Debug, Clone)]
pub struct UserComponentBuilder {
    name: String,
    cas: String,
    formula: String,
    synonyms: Vec<String>,
    source_key: String,
    citation: String,
    extra_sources: BTreeMap<String, String>,
    citations: BTreeMap<String, Citation>,
    molar_mass: Option<f64>,
    tc: Option<f64>,
    pc: Option<f64>,
    omega: Option<f64>,
    tb: Option<f64>,
    vapour_pressure: Option<VapourPressureEntry>,
    antoine_form: AntoineForm,
    liquid_cp: Option<HeatCapacityEntry>,
    vapour_cp: Option<HeatCapacityEntry>,
    latent_heat: Option<(f64, f64, Option<f64>)>,
    strict: bool,
}

impl UserComponentBuilder {
    /// Starts a component with its name, CAS number and formula; `citation` is the full text
    /// of the user's source (e.g. "plant laboratory, 2026-03, sample 17").
    pub fn new(
        name: impl Into<String>,
        cas: impl Into<String>,
        formula: impl Into<String>,
        citation: impl Into<String>,
    ) -> Self {
        Self {
            name: name.into(),
            cas: cas.into(),
            formula: formula.into(),
            synonyms: Vec::new(),
            source_key: "user-data".to_string(),
            citation: citation.into(),
            extra_sources: BTreeMap::new(),
            citations: BTreeMap::new(),
            molar_mass: None,
            tc: None,
            pc: None,
            omega: None,
            tb: None,
            vapour_pressure: None,
            antoine_form: AntoineForm::LnPascalKelvin,
            liquid_cp: None,
            vapour_cp: None,
            latent_heat: None,
            strict: false,
        }
    }

    /// The bibliography key of the user's source (default `user-data`).
    pub fn source_key(mut self, key: impl Into<String>) -> Self {
        self.source_key = key.into();
        self
    }

    /// Other accepted names.
    pub fn synonyms<S: Into<String>>(mut self, names: impl IntoIterator<Item = S>) -> Self {
        self.synonyms = names.into_iter().map(Into::into).collect();
        self
    }

    /// Adds a bibliography entry for values that come from elsewhere (see [`cite`](Self::cite)).
    /// A key of the built-in library may be cited without adding it; its citation is copied.
    pub fn source(mut self, key: impl Into<String>, citation: impl Into<String>) -> Self {
        self.extra_sources.insert(key.into(), citation.into());
        self
    }

    /// Makes `field` (a schema field name such as `critical_temperature_K` or
    /// `latent_heat`) cite `source_key` instead of the user's source.
    pub fn cite(mut self, field: &str, source_key: impl Into<String>, from_memory: bool, note: Option<String>) -> Self {
        self.citations.insert(
            field.to_string(),
            Citation {
                source: source_key.into(),
                from_memory,
                note,
            },
        );
        self
    }

    /// Molar mass, g/mol.
    pub fn molar_mass_g_per_mol(mut self, v: f64) -> Self {
        self.molar_mass = Some(v);
        self
    }
    /// Critical temperature, K.
    pub fn critical_temperature_k(mut self, v: f64) -> Self {
        self.tc = Some(v);
        self
    }
    /// Critical pressure, Pa.
    pub fn critical_pressure_pa(mut self, v: f64) -> Self {
        self.pc = Some(v);
        self
    }
    /// Acentric factor.
    pub fn acentric_factor(mut self, v: f64) -> Self {
        self.omega = Some(v);
        self
    }
    /// Normal boiling point, K.
    pub fn normal_boiling_point_k(mut self, v: f64) -> Self {
        self.tb = Some(v);
        self
    }

    /// The vapour pressure from an Antoine fit (its note records the fit's statistics).
    pub fn vapour_pressure_antoine(mut self, fit: &AntoineFit) -> Self {
        self.vapour_pressure = Some(VapourPressureEntry::Antoine {
            antoine: fit.antoine,
            note: Some(fit_note(&fit.report)),
        });
        self
    }

    /// The vapour pressure from given Antoine constants.
    pub fn antoine(mut self, antoine: Antoine) -> Self {
        self.vapour_pressure = Some(VapourPressureEntry::Antoine { antoine, note: None });
        self
    }

    /// The unit convention the Antoine constants are written in (default `ln-Pa-K`, which
    /// writes the fitted constants without conversion).
    pub fn antoine_units(mut self, form: AntoineForm) -> Self {
        self.antoine_form = form;
        self
    }

    /// The vapour pressure from an extended-form fit.
    pub fn vapour_pressure_extended(mut self, fit: &ExtendedFit) -> Self {
        self.vapour_pressure = Some(VapourPressureEntry::Extended {
            constants: fit.constants,
            range: fit.report.validity,
            note: Some(fit_note(&fit.report)),
        });
        self
    }

    /// The liquid heat capacity from a polynomial fit.
    pub fn liquid_cp_fit(mut self, fit: &CpFit) -> Self {
        self.liquid_cp = Some(cp_entry(fit));
        self
    }

    /// A constant liquid heat capacity, J/(mol·K), valid from `t_min_k` to `t_max_k`.
    pub fn liquid_cp_constant(mut self, value: f64, t_min_k: f64, t_max_k: f64) -> Self {
        self.liquid_cp = Some(constant_entry(value, t_min_k, t_max_k));
        self
    }

    /// The ideal-gas heat capacity from a polynomial fit.
    pub fn vapour_cp_fit(mut self, fit: &CpFit) -> Self {
        self.vapour_cp = Some(cp_entry(fit));
        self
    }

    /// A constant ideal-gas heat capacity, J/(mol·K), valid from `t_min_k` to `t_max_k`.
    pub fn vapour_cp_constant(mut self, value: f64, t_min_k: f64, t_max_k: f64) -> Self {
        self.vapour_cp = Some(constant_entry(value, t_min_k, t_max_k));
        self
    }

    /// The latent heat by Watson's correlation from one known value, J/mol at `t_anchor_k`
    /// (usually the normal boiling point); exponent 0.38 unless given.
    pub fn latent_heat_watson(mut self, t_anchor_k: f64, value_j_per_mol: f64, exponent: Option<f64>) -> Self {
        self.latent_heat = Some((t_anchor_k, value_j_per_mol, exponent));
        self
    }

    /// Makes failed consistency checks errors rather than warnings.
    pub fn strict(mut self, strict: bool) -> Self {
        self.strict = strict;
        self
    }

    fn provenance(&self, field: &str) -> Value {
        match self.citations.get(field) {
            Some(c) => {
                let mut v = json!({"source": c.source, "from_memory": c.from_memory});
                if let Some(n) = &c.note {
                    v["note"] = json!(n);
                }
                v
            }
            None => json!({"source": self.source_key, "from_memory": false}),
        }
    }

    fn merge(mut entry: Value, provenance: Value, note: Option<&String>) -> Value {
        if let (Some(e), Some(p)) = (entry.as_object_mut(), provenance.as_object()) {
            for (k, v) in p {
                e.insert(k.clone(), v.clone());
            }
            if let Some(n) = note
                && !e.contains_key("note")
            {
                e.insert("note".to_string(), json!(n));
            }
        }
        entry
    }

    fn invalid(&self, field: &str, value: impl fmt::Display, why: &str) -> FitError {
        FitError::InvalidValue {
            component: self.name.clone(),
            field: field.to_string(),
            value: value.to_string(),
            why: why.to_string(),
        }
    }

    /// Checks the component and returns it with its checks and file text.
    ///
    /// # Errors
    /// [`FitError::MissingField`] or [`FitError::InvalidValue`] for a missing or non-finite
    /// value or an unknown cited field; [`FitError::Component`] when the library's checks
    /// reject it (naming the field); [`FitError::ChecksFailed`] in strict mode.
    pub fn build(&self) -> Result<UserComponent, FitError> {
        let missing = |field: &'static str| FitError::MissingField {
            component: self.name.clone(),
            field,
        };
        let given = |field: &'static str, v: Option<f64>| -> Result<Value, FitError> {
            let v = v.ok_or_else(|| missing(field))?;
            if !v.is_finite() {
                return Err(self.invalid(field, v, "must be a finite number"));
            }
            Ok(Self::merge(json!({"value": v}), self.provenance(field), None))
        };
        for field in self.citations.keys() {
            if !CITABLE_FIELDS.contains(&field.as_str()) {
                return Err(self.invalid(
                    "cite",
                    field,
                    &format!("not a citable field; use one of {}", CITABLE_FIELDS.join(", ")),
                ));
            }
        }
        let molar_mass = given("molar_mass_g_per_mol", self.molar_mass)?;
        let tc = given("critical_temperature_K", self.tc)?;
        let pc = given("critical_pressure_Pa", self.pc)?;
        let omega = given("acentric_factor", self.omega)?;
        let tb = given("normal_boiling_point_K", self.tb)?;

        let vapour_pressure = match self
            .vapour_pressure
            .as_ref()
            .ok_or_else(|| missing("vapour_pressure"))?
        {
            VapourPressureEntry::Antoine { antoine, note } => {
                let (a, b, c) = published_constants(antoine, self.antoine_form);
                let r = antoine.validity();
                let entry = json!({"form": "antoine", "units": self.antoine_form, "A": a, "B": b, "C": c,
                    "T_min_K": r.min_k, "T_max_K": r.max_k});
                Self::merge(entry, self.provenance("vapour_pressure"), note.as_ref())
            }
            VapourPressureEntry::Extended { constants, range, note } => {
                let [a, b, c, d, e] = *constants;
                let entry = json!({"form": "extended", "A": a, "B": b, "C": c, "D": d, "E": e,
                    "T_min_K": range.min_k, "T_max_K": range.max_k});
                Self::merge(entry, self.provenance("vapour_pressure"), note.as_ref())
            }
        };
        let cp = |field: &'static str, e: &Option<HeatCapacityEntry>| -> Result<Value, FitError> {
            Ok(match e.as_ref().ok_or_else(|| missing(field))? {
                HeatCapacityEntry::Polynomial {
                    coefficients,
                    range,
                    note,
                } => Self::merge(
                    json!({"form": "polynomial", "coefficients": coefficients, "T_min_K": range.min_k, "T_max_K": range.max_k}),
                    self.provenance(field),
                    note.as_ref(),
                ),
                HeatCapacityEntry::Constant { value, range } => {
                    if !value.is_finite() {
                        return Err(self.invalid(field, value, "must be a finite number"));
                    }
                    Self::merge(
                        json!({"form": "constant", "value": value, "T_min_K": range.min_k, "T_max_K": range.max_k}),
                        self.provenance(field),
                        None,
                    )
                }
            })
        };
        let liquid_cp = cp("liquid_heat_capacity", &self.liquid_cp)?;
        let vapour_cp = cp("vapour_heat_capacity", &self.vapour_cp)?;
        let (t_anchor, dh, exponent) = self.latent_heat.ok_or_else(|| missing("latent_heat"))?;
        for (what, v) in [("T_anchor_K", t_anchor), ("value_J_per_mol", dh)] {
            if !v.is_finite() {
                return Err(self.invalid(&format!("latent_heat.{what}"), v, "must be a finite number"));
            }
        }
        let mut latent = json!({"form": "watson", "T_anchor_K": t_anchor, "value_J_per_mol": dh});
        if let Some(n) = exponent {
            if !n.is_finite() {
                return Err(self.invalid("latent_heat.exponent", n, "must be a finite number"));
            }
            latent["exponent"] = json!(n);
        }
        let latent = Self::merge(latent, self.provenance("latent_heat"), None);

        let record_json = json!({
            "name": self.name,
            "synonyms": self.synonyms,
            "cas": self.cas,
            "formula": self.formula,
            "molar_mass_g_per_mol": molar_mass,
            "critical_temperature_K": tc,
            "critical_pressure_Pa": pc,
            "acentric_factor": omega,
            "normal_boiling_point_K": tb,
            "vapour_pressure": vapour_pressure,
            "liquid_heat_capacity": liquid_cp,
            "vapour_heat_capacity": vapour_cp,
            "latent_heat": latent,
        });
        let record: ComponentRecord = serde_json::from_value(record_json).map_err(|e| ComponentError::Parse {
            file: format!("<user component '{}'>", self.name),
            message: e.to_string(),
        })?;

        // The bibliography: the user's source, added sources, and built-in keys cited.
        let mut sources = BTreeMap::new();
        sources.insert(self.source_key.clone(), self.citation.clone());
        sources.extend(self.extra_sources.clone());
        let builtin = Library::builtin().sources();
        for c in self.citations.values() {
            if !sources.contains_key(&c.source)
                && let Some(text) = builtin.get(&c.source)
            {
                sources.insert(c.source.clone(), text.clone());
            }
        }
        let component = Component::from_record(record, &sources)?;

        let checks = ComponentChecks::of(&component);
        let failed = checks.failures();
        if self.strict && !failed.is_empty() {
            return Err(FitError::ChecksFailed {
                component: self.name.clone(),
                failed,
            });
        }
        let mut warnings = failed;
        let range = component.vapour_pressure().validity();
        let tb_k = component.normal_boiling_point_k();
        if !range.contains(tb_k) {
            warnings.insert(
                0,
                FitWarning::BoilingPointOutsideFit {
                    normal_boiling_point_k: tb_k,
                    min_k: range.min_k,
                    max_k: range.max_k,
                },
            );
        }
        Ok(UserComponent {
            component,
            checks,
            warnings,
            sources,
        })
    }
}

fn cp_entry(fit: &CpFit) -> HeatCapacityEntry {
    HeatCapacityEntry::Polynomial {
        coefficients: fit.coefficients.clone(),
        range: fit.report.validity,
        note: Some(fit_note(&fit.report)),
    }
}

fn constant_entry(value: f64, t_min_k: f64, t_max_k: f64) -> HeatCapacityEntry {
    HeatCapacityEntry::Constant {
        value,
        // An unusable range is caught by the library's checks when built.
        range: ValidityRange {
            min_k: t_min_k,
            max_k: t_max_k,
        },
    }
}

/// A checked user component, its consistency checks, and its component-file text.
#[derive(Debug, Clone)]
pub struct UserComponent {
    component: Component,
    checks: ComponentChecks,
    warnings: Vec<FitWarning>,
    sources: BTreeMap<String, String>,
}

impl UserComponent {
    /// The checked component.
    pub fn component(&self) -> &Component {
        &self.component
    }

    /// The component, consumed.
    pub fn into_component(self) -> Component {
        self.component
    }

    /// The consistency checks at the normal boiling point, with their values.
    pub fn checks(&self) -> &ComponentChecks {
        &self.checks
    }

    /// Failed checks, and a normal boiling point outside the vapour-pressure data.
    pub fn warnings(&self) -> &[FitWarning] {
        &self.warnings
    }

    /// The component file: `schema`, the `sources` it cites, and the component.
    pub fn to_file_json(&self) -> Value {
        json!({
            "schema": SCHEMA,
            "sources": self.sources,
            "components": [self.component.to_json()],
        })
    }

    /// The component file as pretty-printed JSON text, for [`Library::add_json`].
    pub fn to_file_string(&self) -> String {
        format!("{:#}\n", self.to_file_json())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn qr_solves_a_consistent_system_exactly() {
        // y = 2 − 3x + 0.5x² at five points.
        let xs = [-2.0, -1.0, 0.0, 1.5, 3.0];
        let mut a = Array2::zeros((5, 3));
        let mut y = Array1::zeros(5);
        for (i, &x) in xs.iter().enumerate() {
            a[[i, 0]] = 1.0;
            a[[i, 1]] = x;
            a[[i, 2]] = x * x;
            y[i] = 2.0 - 3.0 * x + 0.5 * x * x;
        }
        let z = least_squares(a, y).unwrap();
        assert!((z[0] - 2.0).abs() < 1e-14 && (z[1] + 3.0).abs() < 1e-14 && (z[2] - 0.5).abs() < 1e-14);
    }

    #[test]
    fn qr_least_squares_matches_closed_form_line() {
        // Straight line through noisy points: compare with the centred closed form.
        let pts = [(0.0, 1.1), (1.0, 2.9), (2.0, 5.2), (3.0, 6.8), (4.0, 9.1)];
        let mut a = Array2::zeros((5, 2));
        let mut y = Array1::zeros(5);
        for (i, &(x, v)) in pts.iter().enumerate() {
            a[[i, 0]] = 1.0;
            a[[i, 1]] = x;
            y[i] = v;
        }
        let z = least_squares(a, y).unwrap();
        let xm = 2.0;
        let ym = pts.iter().map(|p| p.1).sum::<f64>() / 5.0;
        let sxy: f64 = pts.iter().map(|p| (p.0 - xm) * (p.1 - ym)).sum();
        let sxx: f64 = pts.iter().map(|p| (p.0 - xm) * (p.0 - xm)).sum();
        let slope = sxy / sxx;
        assert!((z[1] - slope).abs() < 1e-13);
        assert!((z[0] - (ym - slope * xm)).abs() < 1e-13);
    }

    #[test]
    fn qr_detects_rank_deficiency() {
        let mut a = Array2::zeros((4, 2));
        for i in 0..4 {
            a[[i, 0]] = i as f64 + 1.0;
            a[[i, 1]] = 2.0 * (i as f64 + 1.0);
        }
        assert!(least_squares(a, Array1::ones(4)).is_none());
        assert!(least_squares(Array2::zeros((3, 1)), Array1::ones(3)).is_none());
        assert!(least_squares(Array2::ones((1, 2)), Array1::ones(1)).is_none());
    }

    #[test]
    fn heat_capacity_units() {
        for u in [
            "J/mol/K",
            "J/(mol K)",
            "J/(mol·K)",
            "J/mol-K",
            "J_per_mol_K",
            "kJ/kmol/K",
            "J/mol/degC",
        ] {
            assert_eq!(cp_unit_factor(u), Some(1.0), "{u}");
        }
        assert_eq!(cp_unit_factor("J/kmol/K"), Some(1e-3));
        assert_eq!(cp_unit_factor("kJ/(mol K)"), Some(1e3));
        assert_eq!(cp_unit_factor("cal/mol/K"), Some(4.184));
        // 1 Btu_IT/(lb·°F) = 4.1868 kJ/(kg·K) exactly (NIST SP 811, B.8, from memory).
        let btu = cp_unit_factor("Btu/lbmol/degF").unwrap();
        assert!((btu - 4.1868).abs() < 1e-12, "{btu}");
        assert_eq!(cp_unit_factor("J/g/K"), None);
        assert_eq!(cp_unit_factor("furlong"), None);
    }

    #[test]
    fn header_cells() {
        let t_ok = |u: &str| units::to_si(QuantityKind::Temperature, "", 1.0, u).is_ok();
        assert_eq!(
            match_header("T [degC]", TEMPERATURE_NAMES, t_ok),
            Some(Some("degC".into()))
        );
        assert_eq!(match_header("T_K", TEMPERATURE_NAMES, t_ok), Some(Some("K".into())));
        assert_eq!(match_header("Temperature", TEMPERATURE_NAMES, t_ok), Some(None));
        assert_eq!(match_header("h_liquid_J_per_mol", TEMPERATURE_NAMES, t_ok), None);
        assert_eq!(match_header("Tc [K]", TEMPERATURE_NAMES, t_ok), None);
        let cp_ok = |u: &str| cp_unit_factor(u).is_some();
        assert_eq!(
            match_header("Cp_J_per_mol_K", CP_NAMES, cp_ok),
            Some(Some("J_per_mol_K".into()))
        );
    }

    #[test]
    fn binomial_expansion_round_trips() {
        // Σ β_k ((T − m)/h)^k expanded in T must give the same values.
        let beta = [3.0, -1.5, 0.25, 0.75, -0.125];
        let (m, h): (f64, f64) = (305.0, 5.0);
        let coeff: Vec<f64> = (0..5)
            .map(|j| {
                (j..5)
                    .map(|k| beta[k] / f64::powi(h, k as i32) * binomial(k, j) * (-m).powi((k - j) as i32))
                    .sum()
            })
            .collect();
        for t in [300.0, 303.0, 307.5, 310.0] {
            let x: f64 = (t - m) / h;
            let direct: f64 = beta.iter().enumerate().map(|(k, b)| b * x.powi(k as i32)).sum();
            let expanded: f64 = coeff.iter().enumerate().map(|(k, c)| c * f64::powi(t, k as i32)).sum();
            assert!(
                (direct - expanded).abs() < 1e-6 * direct.abs().max(1.0),
                "{t}: {direct} vs {expanded}"
            );
        }
    }

    #[test]
    fn antoine_profile_is_exact_at_true_c() {
        let t: Vec<f64> = (0..6).map(|i| 300.0 + 10.0 * i as f64).collect();
        let ln_p = t.iter().map(|t| 21.0 - 3000.0 / (t - 40.0)).collect();
        let prof = AntoineProfile { t, ln_p };
        let (a, b, sse) = prof.solve(-40.0).unwrap();
        assert!((a - 21.0).abs() < 1e-10 && (b - 3000.0).abs() < 1e-7 && sse < 1e-24);
        assert!(prof.solve(-300.0).is_none());
    }
}
