//! [`fit_antoine`]: the Antoine equation by variable projection, a scan on c and Brent's
//! method (`argmin`).

use super::data::{DataKind, DataPoint, check_points, data_range};
use super::error::{FitError, FitWarning};
use super::report::{FitReport, make_report, named};
use crate::properties::{Antoine, AntoineForm, VapourPressure};
use crate::units::{self};
use argmin::core::{CostFunction, Executor, State};
use argmin::solver::brent::BrentOpt;

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

/// The Antoine least-squares problem profiled over c: for each c, a and b come from linear
/// least squares on ln P against 1/(T + c).
pub(super) struct AntoineProfile {
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

#[cfg(test)]
mod tests {
    use super::AntoineProfile;

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
