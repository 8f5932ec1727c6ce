//! [`read_points_csv`]: data points from CSV text, with units in the headers.

use super::data::{DataKind, DataPoint};
use super::error::FitError;
use crate::units::{self, QuantityKind};

pub(super) const TEMPERATURE_NAMES: &[&str] = &["t", "temp", "temperature"];
pub(super) const PRESSURE_NAMES: &[&str] = &[
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
pub(super) const CP_NAMES: &[&str] = &["cp", "c_p", "heat capacity", "heat_capacity"];

/// Factor from a molar heat-capacity unit to J/(mol·K), or `None` if unknown. Accepts
/// energy/amount/temperature spellings such as `J/mol/K`, `J/(mol K)`, `kJ/kmol/K`,
/// `J_per_mol_K`. Energy units: J, kJ, cal and kcal (thermochemical calorie, 4.184 J exactly),
/// Btu (International Table, 1055.05585262 J exactly); amounts: mol, kmol, lbmol
/// (453.59237 mol); temperature intervals: K, degC (1), degF, degR (9/5 per K). Factors from
/// NIST Special Publication 811 (2008), Appendix B.
pub(super) fn cp_unit_factor(unit: &str) -> Option<f64> {
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
pub(super) fn match_header(cell: &str, names: &[&str], unit_ok: impl Fn(&str) -> bool) -> Option<Option<String>> {
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
    let csv = Records::split(text, example)?;
    let (header_line, cells) = (csv.header_line, &csv.cells);
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
    let (v_col, to_si, v_unit_none): (usize, Box<dyn Fn(f64) -> f64>, bool) = match kind {
        DataKind::VapourPressure => {
            let p_ok = |u: &str| units::to_si(QuantityKind::Pressure, "", 1.0, u).is_ok();
            let (col, unit) = cells
                .iter()
                .enumerate()
                .find_map(|(i, c)| match_header(c, PRESSURE_NAMES, p_ok).map(|u| (i, u)))
                .ok_or_else(|| missing("vapour pressure"))?;
            match unit {
                None => (col, Box::new(|v| v), true),
                Some(u) => {
                    // Pressure units are all pure scales.
                    let factor = units::to_si(QuantityKind::Pressure, &cells[col], 1.0, &u).map_err(|source| {
                        FitError::CsvUnit {
                            line: header_line,
                            source,
                        }
                    })?;
                    (col, Box::new(move |v| v * factor), false)
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
                None => (col, Box::new(|v| v), false),
                Some(u) => {
                    let factor = cp_unit_factor(&u).ok_or_else(|| FitError::CsvHeatCapacityUnit {
                        line: header_line,
                        column: cells[col].clone(),
                        unit: u.clone(),
                    })?;
                    (col, Box::new(move |v| v * factor), false)
                }
            }
        }
    };

    let mut points = Vec::new();
    for record in csv.records() {
        let record = record?;
        let line = record.line;
        let t = record.number(t_col)?;
        let v = record.number(v_col)?;
        // Non-finite values pass through unconverted, for the fit to report by row.
        let t_k = match (&t_unit, t.is_finite()) {
            (Some(u), true) => units::to_si(QuantityKind::Temperature, &cells[t_col], t, u)
                .map_err(|source| FitError::CsvUnit { line, source })?,
            _ => t,
        };
        points.push(DataPoint::new(t_k, if v.is_finite() { to_si(v) } else { v }));
    }
    let temperatures: Vec<f64> = points.iter().map(|p| p.t_k).collect();
    if t_unit.is_none() {
        csv.refuse_bare_column(t_col, BareKind::Temperature, &temperatures)?;
    }
    let values: Vec<f64> = points.iter().map(|p| p.value).collect();
    if kind == DataKind::VapourPressure && v_unit_none {
        csv.refuse_bare_column(v_col, BareKind::Pressure, &values)?;
    }
    Ok(points)
}

/// CSV text split into its header's cells and its data lines: the first line that is
/// neither blank nor a `#` comment is the header (a byte-order mark is dropped).
pub(super) struct Records<'a> {
    /// 1-based line of the header.
    pub header_line: usize,
    /// The header's cells, trimmed.
    pub cells: Vec<String>,
    lines: Vec<(usize, &'a str)>,
}

/// A data line split into its fields, with its file line and 1-based data row.
pub(super) struct Record<'r> {
    /// 1-based line in the text.
    pub line: usize,
    /// 1-based data row.
    pub row: usize,
    fields: Vec<&'r str>,
    cells: &'r [String],
}

/// What a unitless (SI) column holds, for the bare-number check.
#[derive(Clone, Copy)]
pub(super) enum BareKind {
    /// Kelvin: values all below 150 K are almost always °C typed without the unit.
    Temperature,
    /// Pascal: values all below 1,000 Pa are almost always kPa, bar or mmHg.
    Pressure,
}

impl<'a> Records<'a> {
    /// Splits `text`; `example` is a header to suggest when there is none.
    pub fn split(text: &'a str, example: &'static str) -> Result<Self, FitError> {
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        let mut lines = text
            .lines()
            .enumerate()
            .map(|(i, l)| (i + 1, l.trim()))
            .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
        let Some((header_line, header)) = lines.next() else {
            return Err(FitError::CsvNoHeader { example });
        };
        Ok(Self {
            header_line,
            cells: header.split(',').map(|c| c.trim().to_string()).collect(),
            lines: lines.collect(),
        })
    }

    /// The data records in order; one with a different number of fields from the header
    /// is [`FitError::CsvFieldCount`].
    pub fn records(&self) -> impl Iterator<Item = Result<Record<'_>, FitError>> {
        self.lines.iter().enumerate().map(|(i, &(line, text))| {
            let fields: Vec<&str> = text.split(',').map(str::trim).collect();
            if fields.len() == self.cells.len() {
                Ok(Record {
                    line,
                    row: i + 1,
                    fields,
                    cells: &self.cells,
                })
            } else {
                Err(FitError::CsvFieldCount {
                    line,
                    row: i + 1,
                    found: fields.len(),
                    expected: self.cells.len(),
                })
            }
        })
    }

    /// [`FitError::CsvBareColumn`] where column `col` had no unit and every one of its
    /// `values` (in SI) is below what such data give.
    pub fn refuse_bare_column(&self, col: usize, kind: BareKind, values: &[f64]) -> Result<(), FitError> {
        let (min, unit, example) = match kind {
            BareKind::Temperature => (150.0, "K", "T [degC]"),
            BareKind::Pressure => (1000.0, "Pa", "P [kPa]"),
        };
        let all_low = !values.is_empty() && values.iter().all(|x| x.is_finite() && *x > 0.0 && *x < min);
        if all_low {
            return Err(FitError::CsvBareColumn {
                line: self.header_line,
                column: self.cells[col].clone(),
                unit,
                min,
                example,
            });
        }
        Ok(())
    }
}

impl Record<'_> {
    /// The field of column `col` as a number ([`FitError::CsvNumber`] if it is not one).
    pub fn number(&self, col: usize) -> Result<f64, FitError> {
        self.fields[col].parse::<f64>().map_err(|_| FitError::CsvNumber {
            line: self.line,
            row: self.row,
            column: self.cells[col].clone(),
            text: crate::units::clip(self.fields[col]).into_owned(),
        })
    }
}

// ---------------------------------------------------------------------------------------
// User components
