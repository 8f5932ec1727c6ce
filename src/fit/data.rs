//! The data a fit takes: [`DataPoint`], [`DataKind`], the checks of the points (finite,
//! positive, no repeated temperature, enough of them) and the thresholds of its warnings.

use super::error::{FitError, FitWarning};
use crate::properties::ValidityRange;
use serde::Serialize;

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
/// capacity in J/(mol·K) for [`fit_cp_polynomial`](super::fit_cp_polynomial).
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

/// Checks the points (finite, positive, no repeated temperature, enough of them) and
/// returns the warnings about them.
pub(super) fn check_points(
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

pub(super) fn data_range(points: &[DataPoint]) -> ValidityRange {
    let lo = points.iter().map(|p| p.t_k).fold(f64::INFINITY, f64::min);
    let hi = points.iter().map(|p| p.t_k).fold(f64::NEG_INFINITY, f64::max);
    // The points were checked finite and positive, and there is at least one.
    ValidityRange::new(lo, hi).unwrap_or(ValidityRange::UNBOUNDED)
}
