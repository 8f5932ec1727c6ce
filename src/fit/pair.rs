//! [`fit_pair`]: the two energies of a Wilson, NRTL or UNIQUAC pair fitted to a user's
//! vapour–liquid equilibrium data (T–x–y, P–x–y or x–y points), with the point test of the
//! data's thermodynamic consistency.

use super::csv::{BareKind, PRESSURE_NAMES, Records, TEMPERATURE_NAMES, match_header};
use super::error::FitError;
use crate::activity::{ActivityModel, BinaryParameters, LiquidModel, PAIRS_SCHEMA};
use crate::equilibrium::{FlashSpec, ModifiedRaoult, flash};
use crate::properties::{Component, VapourPressure};
use crate::units::{self, GAS_CONSTANT, Pressure, QuantityKind};
use argmin::core::{CostFunction, Executor, State};
use argmin::solver::neldermead::NelderMead;
use argmin_math::{ArgminAdd, ArgminMul, ArgminSub};
use serde_json::{Value, json};
use std::sync::Arc;

/// One measured point of a binary: the liquid's x₁ and, where measured, the vapour's y₁,
/// the temperature and the pressure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct VlePoint {
    /// Liquid mole fraction of component 1.
    pub x1: f64,
    /// Vapour mole fraction of component 1, where measured.
    pub y1: Option<f64>,
    /// Temperature, K, where measured.
    pub temperature_k: Option<f64>,
    /// Pressure, Pa, where measured.
    pub pressure_pa: Option<f64>,
}

const X_NAMES: &[&str] = &["x1", "x", "x_1"];
const Y_NAMES: &[&str] = &["y1", "y", "y_1"];
const EXAMPLE: &str = "x1, y1, T [degC], P [kPa]";

/// Reads VLE points from CSV text: a header naming `x1` and any of `y1`, `T` (with a unit in
/// brackets, `T [degC]`, or SI) and `P` (`P [kPa]`); a column that is absent takes
/// `temperature_k` or `pressure_pa` where given (isothermal or isobaric data). Comma
/// separated, `#` comment lines.
///
/// # Errors
/// The CSV errors of [`FitError`] naming the line; [`FitError::Degenerate`] where neither a
/// temperature nor a pressure is known for the points; [`FitError::MoleFractionRange`] for
/// a mole fraction outside [0, 1].
///
/// ```
/// use flashduty::fit::read_vle_csv;
/// let pts = read_vle_csv("x1, y1, T [degC]\n0.1, 0.44, 86.4\n", Some(101_325.0), None).unwrap();
/// assert_eq!(pts[0].pressure_pa, Some(101_325.0));
/// assert!((pts[0].temperature_k.unwrap() - 359.55).abs() < 1e-9);
/// ```
pub fn read_vle_csv(
    text: &str,
    pressure_pa: Option<f64>,
    temperature_k: Option<f64>,
) -> Result<Vec<VlePoint>, FitError> {
    let csv = Records::split(text, EXAMPLE)?;
    let (header_line, cells) = (csv.header_line, &csv.cells);
    // A column named with a unit gives (column, Some(unit)); a unit that is not one is an error.
    let find = |names: &[&str], kind: Option<QuantityKind>| -> Result<Option<(usize, Option<String>)>, FitError> {
        for (i, cell) in cells.iter().enumerate() {
            let ok = |u: &str| kind.is_some_and(|k| units::to_si(k, "", 1.0, u).is_ok());
            if let Some(unit) = match_header(cell, names, ok) {
                if let (Some(k), Some(u)) = (kind, &unit) {
                    units::to_si(k, cell, 1.0, u).map_err(|source| FitError::CsvUnit {
                        line: header_line,
                        source,
                    })?;
                }
                return Ok(Some((i, unit)));
            }
        }
        Ok(None)
    };
    let Some((x_col, _)) = find(X_NAMES, None)? else {
        return Err(FitError::CsvMissingColumn {
            line: header_line,
            column: "x1",
            header: cells.clone(),
            example: EXAMPLE,
        });
    };
    let y_col = find(Y_NAMES, None)?.map(|c| c.0);
    let t_col = find(TEMPERATURE_NAMES, Some(QuantityKind::Temperature))?;
    let p_col = find(PRESSURE_NAMES, Some(QuantityKind::Pressure))?;
    if t_col.is_none() && p_col.is_none() && temperature_k.is_none() && pressure_pa.is_none() {
        return Err(FitError::Degenerate {
            model: "VLE data",
            why: "neither a T nor a P column, and no temperature or pressure given for the data".into(),
        });
    }
    let mut points = Vec::new();
    for record in csv.records() {
        let record = record?;
        let row = record.row;
        let fraction = |col: usize, column: &'static str| -> Result<f64, FitError> {
            let v = record.number(col)?;
            if (0.0..=1.0).contains(&v) {
                Ok(v)
            } else {
                Err(FitError::MoleFractionRange { row, column, value: v })
            }
        };
        let converted = |(col, unit): &(usize, Option<String>), kind: QuantityKind| -> Result<f64, FitError> {
            let v = record.number(*col)?;
            match unit {
                Some(u) => units::to_si(kind, &cells[*col], v, u).map_err(|source| FitError::CsvUnit {
                    line: record.line,
                    source,
                }),
                None => Ok(v),
            }
        };
        let t = match &t_col {
            Some(c) => Some(converted(c, QuantityKind::Temperature)?),
            None => temperature_k,
        };
        let p = match &p_col {
            Some(c) => Some(converted(c, QuantityKind::Pressure)?),
            None => pressure_pa,
        };
        for (column, v) in [("temperature", t), ("pressure", p)] {
            match v {
                Some(v) if !v.is_finite() => return Err(FitError::NotFinite { row, column, value: v }),
                Some(t_k) if t_k <= 0.0 && column == "temperature" => {
                    return Err(FitError::NonPositiveTemperature { row, t_k });
                }
                Some(pressure_pa) if pressure_pa <= 0.0 => {
                    return Err(FitError::NonPositivePressure { row, pressure_pa });
                }
                _ => {}
            }
        }
        points.push(VlePoint {
            x1: fraction(x_col, "x1")?,
            y1: y_col.map(|c| fraction(c, "y1")).transpose()?,
            temperature_k: t,
            pressure_pa: p,
        });
    }
    // Bare numbers too small for SI (°C or kPa typed without the unit) are refused.
    for (col, kind, values) in [
        (
            &t_col,
            BareKind::Temperature,
            points.iter().filter_map(|p| p.temperature_k).collect::<Vec<_>>(),
        ),
        (
            &p_col,
            BareKind::Pressure,
            points.iter().filter_map(|p| p.pressure_pa).collect(),
        ),
    ] {
        if let Some((c, None)) = col {
            csv.refuse_bare_column(*c, kind, &values)?;
        }
    }
    Ok(points)
}

/// A point's measured and fitted values.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PointResidual {
    /// The point.
    pub point: VlePoint,
    /// The fitted model's bubble pressure at the point's T and x (where T is measured), Pa.
    pub pressure_pa: Option<f64>,
    /// The fitted model's bubble temperature at the point's P and x (where T is not
    /// measured), K.
    pub temperature_k: Option<f64>,
    /// The fitted model's y₁.
    pub y1: f64,
}

/// The point test of consistency: the data are fitted on pressure (or temperature) alone
/// (Barker's method) and the vapour compositions that fit predicts are compared with the
/// measured ones (H. C. Van Ness, S. M. Byer and R. E. Gibbs, AIChE J. 19 (1973) 238; the
/// criterion mean |Δy| < 0.01 as used by A. Fredenslund, J. Gmehling and P. Rasmussen,
/// *Vapor–Liquid Equilibria Using UNIFAC*, Elsevier, 1977; both from memory).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConsistencyTest {
    /// Mean |y₁ predicted − y₁ measured| of the fit without y.
    pub mean_abs_dy: f64,
    /// The criterion.
    pub threshold: f64,
    /// Whether the data pass.
    pub consistent: bool,
}

/// A fitted pair.
#[derive(Debug, Clone, PartialEq)]
pub struct PairFit {
    /// The model.
    pub kind: LiquidModel,
    /// The two components' names.
    pub components: [String; 2],
    /// The fitted energies over R, K: (a₁₂, a₂₁) of Wilson, (b₁₂, b₂₁) of NRTL, (u₁₂, u₂₁) of
    /// UNIQUAC.
    pub energies_k: (f64, f64),
    /// NRTL's α (fixed, not fitted); Wilson's volumes (cm³/mol) are in `volumes`.
    pub alpha: Option<f64>,
    /// Wilson's molar volumes V₁, V₂, cm³/mol.
    pub volumes: Option<(f64, f64)>,
    /// Each point's fitted values.
    pub residuals: Vec<PointResidual>,
    /// Root mean square of the relative pressure residuals (points with T and P measured).
    pub rms_relative_pressure: Option<f64>,
    /// Root mean square of the temperature residuals, K (points with P and T measured
    /// where the fit worked on temperature).
    pub rms_temperature_k: Option<f64>,
    /// Mean |Δy₁| over the points with y measured.
    pub mean_abs_dy: Option<f64>,
    /// The point test, where every point has T, P and y.
    pub consistency: Option<ConsistencyTest>,
    /// The temperature range of the data, K.
    pub range_k: (f64, f64),
    /// Cost evaluations taken.
    pub evaluations: u64,
}

#[derive(Clone)]
struct Problem<'a> {
    components: &'a [Arc<Component>],
    kind: LiquidModel,
    alpha: f64,
    volumes: (f64, f64),
    sizes: [(f64, f64); 2],
    points: &'a [VlePoint],
    with_y: bool,
}

impl Problem<'_> {
    fn activity(&self, e: &[f64]) -> ActivityModel {
        let second = match self.kind {
            LiquidModel::Wilson => (
                (self.volumes.1 / self.volumes.0).ln(),
                (self.volumes.0 / self.volumes.1).ln(),
            ),
            _ => (self.alpha, self.alpha),
        };
        ActivityModel::binary(self.kind, (e[0], e[1]), second, self.sizes)
    }

    /// Each point's (bubble P at T, or bubble T at P) and y₁ under energies `e`.
    fn predict(&self, e: &[f64]) -> Option<Vec<PointResidual>> {
        let activity = self.activity(e);
        let model = ModifiedRaoult::from_parts(self.components.to_vec(), activity.clone());
        let mut out = Vec::with_capacity(self.points.len());
        for pt in self.points {
            let x = [pt.x1, 1.0 - pt.x1];
            match (pt.temperature_k, pt.pressure_pa) {
                (Some(t), _) => {
                    let (mut g, mut s) = ([0.0; 2], [0.0; 2]);
                    activity.ln_gamma(t, &x, &mut g, &mut s);
                    let partial: Vec<f64> = (0..2)
                        .map(|i| x[i] * g[i].exp() * self.components[i].vapour_pressure().psat_pa(t))
                        .collect();
                    let p = partial[0] + partial[1];
                    if !(p.is_finite() && p > 0.0) {
                        return None;
                    }
                    out.push(PointResidual {
                        point: *pt,
                        pressure_pa: Some(p),
                        temperature_k: None,
                        y1: partial[0] / p,
                    });
                }
                (None, Some(p)) => {
                    let pressure = Pressure::new("P", p).ok()?;
                    let r = flash(&model, &x, FlashSpec::BubbleTemperature { pressure }).ok()?;
                    out.push(PointResidual {
                        point: *pt,
                        pressure_pa: None,
                        temperature_k: Some(r.temperature_k),
                        y1: r.vapour.as_ref()?[0],
                    });
                }
                (None, None) => return None,
            }
        }
        Some(out)
    }
}

/// The two interaction energies over R (K): the point Nelder–Mead moves (argmin's vector
/// arithmetic for it is written here, so the crate needs no vector backend of argmin's).
#[derive(Debug, Clone, Copy, PartialEq)]
struct Energies([f64; 2]);

impl ArgminAdd<Energies, Energies> for Energies {
    fn add(&self, other: &Energies) -> Energies {
        Energies([self.0[0] + other.0[0], self.0[1] + other.0[1]])
    }
}

impl ArgminSub<Energies, Energies> for Energies {
    fn sub(&self, other: &Energies) -> Energies {
        Energies([self.0[0] - other.0[0], self.0[1] - other.0[1]])
    }
}

impl ArgminMul<f64, Energies> for Energies {
    fn mul(&self, factor: &f64) -> Energies {
        Energies([self.0[0] * factor, self.0[1] * factor])
    }
}

impl CostFunction for Problem<'_> {
    type Param = Energies;
    type Output = f64;

    fn cost(&self, e: &Energies) -> Result<f64, argmin::core::Error> {
        let Some(pred) = self.predict(&e.0) else {
            return Ok(1e10);
        };
        let mut sum = 0.0;
        for r in &pred {
            if let (Some(p), Some(pm)) = (r.pressure_pa, r.point.pressure_pa) {
                sum += (p / pm).ln().powi(2);
            }
            if let (Some(t), Some(tm)) = (r.temperature_k, r.point.temperature_k) {
                // 1 % in pressure is about 0.3 K near the normal boiling point.
                sum += ((t - tm) / 30.0).powi(2);
            }
            if self.with_y
                && let Some(y) = r.point.y1
            {
                sum += (r.y1 - y).powi(2);
            }
        }
        Ok(if sum.is_finite() { sum } else { 1e10 })
    }
}

/// Nelder–Mead from several starts; the best energies and the evaluations taken.
fn minimise(problem: &Problem<'_>) -> Result<([f64; 2], u64), FitError> {
    let mut best: Option<(f64, [f64; 2])> = None;
    let mut evaluations = 0;
    for start in [[0.0, 0.0], [300.0, 300.0], [-150.0, 600.0], [600.0, -150.0]] {
        let simplex = vec![
            Energies(start),
            Energies([start[0] + 200.0, start[1]]),
            Energies([start[0], start[1] + 200.0]),
        ];
        let solver = NelderMead::new(simplex)
            .with_sd_tolerance(1e-12)
            .map_err(|e| FitError::Solver {
                model: "pair",
                message: e.to_string(),
            })?;
        let res = Executor::new(problem.clone(), solver)
            .configure(|s| s.max_iters(2000))
            .run()
            .map_err(|e| FitError::Solver {
                model: "pair",
                message: e.to_string(),
            })?;
        evaluations += res.state().get_func_counts().values().sum::<u64>();
        if let Some(p) = res.state().get_best_param() {
            let cost = res.state().get_best_cost();
            if best.as_ref().is_none_or(|(c, _)| cost < *c) {
                best = Some((cost, p.0));
            }
        }
    }
    let (cost, p) = best.ok_or_else(|| FitError::Solver {
        model: "pair",
        message: "no parameters found".into(),
    })?;
    if cost >= 1e10 {
        return Err(FitError::Degenerate {
            model: "pair",
            why: "no parameters reproduce the data (every trial failed); check the data's units".into(),
        });
    }
    Ok((p, evaluations))
}

/// Fits the two energies of a `kind` pair of `components` (two, with vapour pressures) to
/// `points`, by least squares on ln P (points with T and P measured: the model's bubble
/// pressure at the point's T and x), on T (points with P only: its bubble temperature) and on
/// y₁ (where measured), minimised by Nelder–Mead (`argmin`) from four starts. NRTL's α is
/// `alpha` (0.3 is common practice); Wilson's volumes are `volumes` (cm³/mol; `None` takes
/// them equal); UNIQUAC's r and q come from `sizes` (`None`: the built-in ones).
///
/// # Errors
/// [`FitError::TooFewPoints`] below three points; [`FitError::Degenerate`] for a point
/// without T or P, or data no parameters reproduce; [`FitError::Solver`].
///
/// ```
/// use flashduty::activity::LiquidModel;
/// use flashduty::fit::{fit_pair, VlePoint};
/// use flashduty::library::Library;
/// // Perry's ethanol–water table at 1 atm (from memory): x, y, T °C.
/// let data = [(0.0966, 0.4375, 86.7), (0.2337, 0.5445, 82.7), (0.5079, 0.6564, 79.8), (0.7472, 0.7815, 78.41)];
/// let points: Vec<VlePoint> = data.iter().map(|&(x, y, t)| VlePoint {
///     x1: x, y1: Some(y), temperature_k: Some(t + 273.15), pressure_pa: Some(101_325.0) }).collect();
/// let c = Library::builtin().get_all(&["ethanol", "water"]).unwrap();
/// let fit = fit_pair(&c, LiquidModel::Nrtl, &points, 0.3, None, None).unwrap();
/// assert!(fit.mean_abs_dy.unwrap() < 0.01);
/// ```
pub fn fit_pair(
    components: &[Arc<Component>],
    kind: LiquidModel,
    points: &[VlePoint],
    alpha: f64,
    volumes: Option<(f64, f64)>,
    sizes: Option<[(f64, f64); 2]>,
) -> Result<PairFit, FitError> {
    if points.len() < 3 {
        return Err(FitError::TooFewPoints {
            model: "pair",
            points: points.len(),
            constants: 2,
        });
    }
    if components.len() != 2 || kind == LiquidModel::Ideal {
        return Err(FitError::Degenerate {
            model: "pair",
            why: "give two components and the wilson, nrtl or uniquac model".into(),
        });
    }
    if !(alpha > 0.0 && alpha <= 1.0) {
        return Err(FitError::Degenerate {
            model: "pair",
            why: format!("alpha {alpha} is outside (0, 1]"),
        });
    }
    if points
        .iter()
        .any(|p| p.temperature_k.is_none() && p.pressure_pa.is_none())
    {
        return Err(FitError::Degenerate {
            model: "pair",
            why: "a point has neither T nor P".into(),
        });
    }
    let sizes = match (kind, sizes) {
        (LiquidModel::Uniquac, None) => {
            let set = BinaryParameters::builtin();
            let size = |c: &Arc<Component>| set.size(c.name()).map(|s| (s.r, s.q));
            match (size(&components[0]), size(&components[1])) {
                (Some(a), Some(b)) => [a, b],
                _ => {
                    return Err(FitError::Degenerate {
                        model: "pair",
                        why: "UNIQUAC needs r and q of both components; none are built in for one of them".into(),
                    });
                }
            }
        }
        (_, Some(s)) => s,
        (_, None) => [(1.0, 1.0); 2],
    };
    let volumes = volumes.unwrap_or((1.0, 1.0));
    let mut problem = Problem {
        components,
        kind,
        alpha,
        volumes,
        sizes,
        points,
        with_y: true,
    };
    let (best, evaluations) = minimise(&problem)?;
    let residuals = problem.predict(&best).ok_or_else(|| FitError::Degenerate {
        model: "pair",
        why: "the fitted parameters do not reproduce every point".into(),
    })?;
    let rms = |v: Vec<f64>| (!v.is_empty()).then(|| (v.iter().map(|d| d * d).sum::<f64>() / v.len() as f64).sqrt());
    let rms_relative_pressure = rms(residuals
        .iter()
        .filter_map(|r| Some(r.pressure_pa? / r.point.pressure_pa? - 1.0))
        .collect());
    let rms_temperature_k = rms(residuals
        .iter()
        .filter_map(|r| Some(r.temperature_k? - r.point.temperature_k?))
        .collect());
    let dy: Vec<f64> = residuals
        .iter()
        .filter_map(|r| Some((r.y1 - r.point.y1?).abs()))
        .collect();
    let mean_abs_dy = (!dy.is_empty()).then(|| dy.iter().sum::<f64>() / dy.len() as f64);
    // The point test: every point with T, P and y.
    let consistency = if points
        .iter()
        .all(|p| p.y1.is_some() && p.temperature_k.is_some() && p.pressure_pa.is_some())
    {
        problem.with_y = false;
        let (without_y, _) = minimise(&problem)?;
        problem.predict(&without_y).map(|pred| {
            let mean = pred
                .iter()
                .map(|r| (r.y1 - r.point.y1.unwrap_or(r.y1)).abs())
                .sum::<f64>()
                / pred.len() as f64;
            ConsistencyTest {
                mean_abs_dy: mean,
                threshold: 0.01,
                consistent: mean < 0.01,
            }
        })
    } else {
        None
    };
    let temps: Vec<f64> = residuals
        .iter()
        .filter_map(|r| r.point.temperature_k.or(r.temperature_k))
        .collect();
    let range_k = (
        temps.iter().copied().fold(f64::INFINITY, f64::min),
        temps.iter().copied().fold(0.0, f64::max),
    );
    Ok(PairFit {
        kind,
        components: [components[0].name().to_string(), components[1].name().to_string()],
        energies_k: (best[0], best[1]),
        alpha: (kind == LiquidModel::Nrtl).then_some(alpha),
        volumes: (kind == LiquidModel::Wilson).then_some(volumes),
        residuals,
        rms_relative_pressure,
        rms_temperature_k,
        mean_abs_dy,
        consistency,
        range_k,
        evaluations,
    })
}

impl PairFit {
    /// The pair as a parameter file (`binary_parameters`), energies in J/mol, with the data's
    /// temperature range and `source` as its source.
    ///
    /// ```
    /// use flashduty::activity::{BinaryParameters, LiquidModel};
    /// use flashduty::fit::{fit_pair, VlePoint};
    /// use flashduty::library::Library;
    /// let c = Library::builtin().get_all(&["ethanol", "water"]).unwrap();
    /// // Invented points, for the shape of the file only.
    /// let pts: Vec<VlePoint> = [(0.1, 0.44, 359.6), (0.4, 0.61, 353.9), (0.8, 0.82, 351.5)].iter()
    ///     .map(|&(x, y, t)| VlePoint { x1: x, y1: Some(y), temperature_k: Some(t), pressure_pa: Some(101_325.0) }).collect();
    /// let fit = fit_pair(&c, LiquidModel::Nrtl, &pts, 0.3, None, None).unwrap();
    /// let mut set = BinaryParameters::default();
    /// assert_eq!(set.add_value("file", &fit.parameter_file("invented")).unwrap(), 1);
    /// ```
    pub fn parameter_file(&self, source: &str) -> Value {
        let j = |k: f64| k * GAS_CONSTANT;
        let (e12, e21) = self.energies_k;
        let mut pair = json!({
            "components": self.components,
            "T_min_K": self.range_k.0,
            "T_max_K": self.range_k.1,
            "source": source,
            "from_memory": false,
            "note": format!("fitted by flashduty fit-pair to {} points; energies in J/mol", self.residuals.len()),
        });
        let params = match self.kind {
            LiquidModel::Wilson => {
                let (v1, v2) = self.volumes.unwrap_or((1.0, 1.0));
                (
                    "wilson",
                    json!({"a12": j(e12), "a21": j(e21), "V1_cm3_per_mol": v1, "V2_cm3_per_mol": v2}),
                )
            }
            LiquidModel::Nrtl => (
                "nrtl",
                json!({"b12": j(e12), "b21": j(e21), "alpha": self.alpha.unwrap_or(0.3)}),
            ),
            _ => ("uniquac", json!({"u12": j(e12), "u21": j(e21)})),
        };
        if let Value::Object(m) = &mut pair {
            m.insert(params.0.into(), params.1);
        }
        json!({"schema": PAIRS_SCHEMA, "pairs": [pair]})
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every way a VLE data file is refused, each naming its line, row or column.
    #[test]
    fn vle_csv_errors() {
        let kind = |text: &str| read_vle_csv(text, Some(101_325.0), None).unwrap_err().kind();
        assert_eq!(kind("# only a comment\n"), "csv-no-header");
        assert_eq!(kind("y1, T [degC]\n0.5, 80\n"), "csv-missing-column");
        assert_eq!(kind("x1, T [furlongs]\n0.5, 80\n"), "csv-unit");
        assert_eq!(kind("x1, T [degC]\n0.5\n"), "csv-field-count");
        assert_eq!(kind("x1, T [degC]\n0.5, hot\n"), "csv-number");
        assert_eq!(kind("x1, y1, T [degC]\n0.5, 1.2, 80\n"), "mole-fraction-range");
        assert_eq!(kind("x1, T\n0.5, 80\n0.6, 79\n"), "csv-bare-column");
        assert_eq!(kind("x1, P\n0.5, 101.3\n"), "csv-bare-column");
        assert_eq!(kind("x1, T [K]\n0.5, -3\n"), "non-positive-temperature");
        assert_eq!(kind("x1, T [K], P [kPa]\n0.5, 350, 0\n"), "non-positive-pressure");
        let e = read_vle_csv("x1, y1\n0.5, 0.6\n", None, None).unwrap_err();
        assert_eq!(e.kind(), "degenerate");
        // SI without a unit is read as SI.
        let p = read_vle_csv("x1, T\n0.5, 350\n", Some(1e5), None).unwrap();
        assert_eq!(p[0].temperature_k, Some(350.0));
        // A unit that is not a temperature unit in a T header is named.
        let e = read_vle_csv("x1, T [kPa]\n0.5, 80\n", None, None).unwrap_err();
        assert_eq!(e.kind(), "csv-unit");
        assert!(e.to_string().contains("kPa"), "{e}");
    }

    /// fit_pair refuses what it cannot fit, naming why.
    #[test]
    fn fit_pair_errors() {
        let c = crate::library::Library::builtin()
            .get_all(&["ethanol", "water"])
            .unwrap();
        let pt = |x: f64| VlePoint {
            x1: x,
            y1: None,
            temperature_k: Some(350.0),
            pressure_pa: Some(1e5),
        };
        let two = [pt(0.2), pt(0.4)];
        assert_eq!(
            fit_pair(&c, LiquidModel::Nrtl, &two, 0.3, None, None)
                .unwrap_err()
                .kind(),
            "too-few-points"
        );
        let three = [pt(0.2), pt(0.4), pt(0.6)];
        for (kind, alpha) in [
            (LiquidModel::Ideal, 0.3),
            (LiquidModel::Nrtl, 0.0),
            (LiquidModel::Nrtl, 1.5),
        ] {
            assert_eq!(
                fit_pair(&c, kind, &three, alpha, None, None).unwrap_err().kind(),
                "degenerate"
            );
        }
        let bare = [
            VlePoint {
                temperature_k: None,
                pressure_pa: None,
                ..pt(0.2)
            },
            pt(0.4),
            pt(0.6),
        ];
        assert_eq!(
            fit_pair(&c, LiquidModel::Nrtl, &bare, 0.3, None, None)
                .unwrap_err()
                .kind(),
            "degenerate"
        );
        let d = crate::library::Library::builtin()
            .get_all(&["ethanol", "n-decane"])
            .unwrap();
        let e = fit_pair(&d, LiquidModel::Uniquac, &three, 0.3, None, None).unwrap_err();
        assert!(e.to_string().contains("r and q"), "{e}");
    }
}
