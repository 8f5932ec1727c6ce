//! [`FitReport`]: how well a correlation fits its data, point by point.

use super::data::DataPoint;
use super::error::FitWarning;
use crate::properties::ValidityRange;
use serde::Serialize;
use std::fmt;

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

pub(super) fn named(names: &[&'static str], values: &[f64]) -> Vec<NamedConstant> {
    names
        .iter()
        .zip(values)
        .map(|(&name, &value)| NamedConstant { name, value })
        .collect()
}

pub(super) fn make_report(
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
