//! [`FitError`] and [`FitWarning`]: what can go wrong with a fit, and what to look at.

use super::data::NEAR_DUPLICATE_K;
use crate::properties::ComponentError;
use crate::units::UnitError;
use serde::Serialize;
use std::fmt;

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
    /// A mole fraction outside [0, 1].
    #[error("data row {row}: {column} = {value} is not a mole fraction (0 to 1)")]
    MoleFractionRange {
        /// 1-based data row.
        row: usize,
        /// `x1` or `y1`.
        column: &'static str,
        /// The value given.
        value: f64,
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
    /// A column without a unit (so read as SI) whose every value is below what SI data
    /// give (temperatures below 150 K, pressures below 1,000 Pa): almost always °C, kPa, bar
    /// or mmHg typed without the unit.
    #[error(
        "CSV line {line}: column '{column}' has no unit, so its values read as {unit} (a bare number is SI), and all are below {min} {unit}; name the unit in the header, e.g. '{example}', or '[{unit}]' if {unit} is meant"
    )]
    CsvBareColumn {
        /// 1-based line of the header.
        line: usize,
        /// The header cell.
        column: String,
        /// The SI unit the values were read in.
        unit: &'static str,
        /// The smallest SI value expected of such data.
        min: f64,
        /// A header that names a unit.
        example: &'static str,
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
            FitError::MoleFractionRange { .. } => "mole-fraction-range",
            FitError::CsvNoHeader { .. } => "csv-no-header",
            FitError::CsvMissingColumn { .. } => "csv-missing-column",
            FitError::CsvUnit { .. } => "csv-unit",
            FitError::CsvHeatCapacityUnit { .. } => "csv-heat-capacity-unit",
            FitError::CsvFieldCount { .. } => "csv-field-count",
            FitError::CsvNumber { .. } => "csv-number",
            FitError::CsvBareColumn { .. } => "csv-bare-column",
            FitError::MissingField { .. } => "missing-field",
            FitError::InvalidValue { .. } => "invalid-value",
            FitError::ChecksFailed { .. } => "checks-failed",
            FitError::Component(e) => e.kind(),
        }
    }
}

pub(super) fn join_warnings(w: &[FitWarning]) -> String {
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
    /// Fewer than [`RECOMMENDED_POINTS_PER_CONSTANT`](super::RECOMMENDED_POINTS_PER_CONSTANT) points per constant.
    FewPoints {
        /// Points given.
        points: usize,
        /// Constants fitted.
        constants: usize,
        /// Points recommended.
        recommended: usize,
    },
    /// The data span less than [`RECOMMENDED_SPAN_K`](super::RECOMMENDED_SPAN_K).
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
    /// [`BOILING_POINT_TOLERANCE`](super::BOILING_POINT_TOLERANCE).
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
    /// by more than [`LATENT_HEAT_TOLERANCE`](super::LATENT_HEAT_TOLERANCE).
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
