//! The Python package's native module, `flashduty._flashduty`. The Python layer
//! (`python/flashduty/__init__.py`) gives the public API; this module runs cases through the
//! library's case schema (the same code as the command-line tool) and the NumPy batch calls,
//! which release the GIL and run in parallel (rayon). No calculation lives here.

use flashduty::case::{Command, parse_case, run};
use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState};
use flashduty::equilibrium::{KValues, Raoult, tp_flash_into};
use flashduty::library::Library;
use flashduty::rachford_rice::{Options, Phase, solve_into};
use flashduty::units::{MolarFlow, Pressure, Temperature};
use numpy::{PyArray1, PyArrayMethods, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use rayon::prelude::*;
use std::sync::Arc;

/// A failure: (kind, field, message), raised in Python as `flashduty.FlashdutyError`.
type Failure = (String, String, String);

fn failure(kind: &str, field: &str, message: impl Into<String>) -> Failure {
    (kind.to_string(), field.to_string(), message.into())
}

fn from_case(e: flashduty::case::CaseError) -> Failure {
    (
        e.kind().to_string(),
        e.field().unwrap_or_default().to_string(),
        e.message().to_string(),
    )
}

fn lib_error<E>(e: E) -> Failure
where
    flashduty::case::CaseError: From<E>,
{
    from_case(flashduty::case::CaseError::from(e))
}

/// The component library: the built-in components and any user component files.
#[pyclass(name = "Library", module = "flashduty._flashduty", frozen)]
struct PyLibrary {
    inner: Arc<Library>,
}

#[pymethods]
impl PyLibrary {
    /// A library of the built-in components plus the user component files in `files` (JSON
    /// or TOML) and the JSON texts in `json`.
    #[new]
    #[pyo3(signature = (files = None, json = None))]
    fn new(files: Option<Vec<String>>, json: Option<Vec<String>>) -> Result<Self, PyErr> {
        let mut lib = Library::try_builtin().map_err(|e| raise(lib_error(e)))?;
        for f in files.unwrap_or_default() {
            lib.add_path(std::path::Path::new(&f))
                .map_err(|e| raise(lib_error(e)))?;
        }
        for (i, text) in json.unwrap_or_default().iter().enumerate() {
            lib.add_json(&format!("json[{i}]"), text)
                .map_err(|e| raise(lib_error(e)))?;
        }
        Ok(Self { inner: Arc::new(lib) })
    }

    fn __len__(&self) -> usize {
        self.inner.len()
    }

    /// The names of the condensable components.
    fn names(&self) -> Vec<String> {
        self.inner.components().map(|c| c.name().to_string()).collect()
    }
}

/// A Python exception carrying the failure (the Python layer turns it into
/// `FlashdutyError` with `kind`, `field` and the message).
fn raise(f: Failure) -> PyErr {
    pyo3::exceptions::PyValueError::new_err(f)
}

/// The library given, or the built-in one (shared).
fn library_of(library: Option<&PyLibrary>) -> Arc<Library> {
    static BUILTIN: std::sync::OnceLock<Arc<Library>> = std::sync::OnceLock::new();
    library.map_or_else(
        || Arc::clone(BUILTIN.get_or_init(|| Arc::new(Library::builtin().clone()))),
        |l| Arc::clone(&l.inner),
    )
}

/// Runs the case `case_json` (the keys of docs/CLI.md) with `command`; returns the
/// outcome's JSON text, or raises with (kind, field, message).
#[pyfunction]
#[pyo3(signature = (command, case_json, library = None))]
fn run_case(py: Python<'_>, command: &str, case_json: &str, library: Option<&PyLibrary>) -> PyResult<String> {
    let lib = library_of(library);
    let (command, case_json) = (command.to_string(), case_json.to_string());
    py.detach(move || -> Result<String, Failure> {
        let Some(cmd) = Command::from_name(&command) else {
            return Err(failure(
                "unknown-command",
                "command",
                format!("command: '{command}' is not flash, bubble, dew, duty, curve or azeotropes"),
            ));
        };
        let value = flashduty::case::parse_text("case.json", &case_json).map_err(from_case)?;
        let case = parse_case(&value, cmd).map_err(from_case)?;
        let outcome = run(&lib, cmd, &case, None).map_err(from_case)?;
        Ok(outcome.to_json().to_string())
    })
    .map_err(raise)
}

/// The rows of a 2-D array in row-major order, with its shape.
fn rows(a: &PyReadonlyArray2<'_, f64>) -> (Vec<f64>, usize, usize) {
    let v = a.as_array();
    let (r, c) = v.dim();
    (v.iter().copied().collect(), r, c)
}

fn column(a: &PyReadonlyArray1<'_, f64>) -> Vec<f64> {
    a.as_array().iter().copied().collect()
}

fn check_len(field: &str, len: usize, rows: usize) -> Result<(), Failure> {
    if len == rows {
        Ok(())
    } else {
        Err(failure(
            "length-mismatch",
            field,
            format!("{field}: {len} values given for {rows} rows"),
        ))
    }
}

fn phase_code(p: Phase) -> i8 {
    match p {
        Phase::Liquid => 0,
        Phase::Vapour => 1,
        _ => 2,
    }
}

/// The first failure of a batch, by row.
fn first_error<T>(results: Vec<Result<T, (usize, Failure)>>) -> Result<Vec<T>, Failure> {
    let mut out = Vec::with_capacity(results.len());
    for r in results {
        match r {
            Ok(v) => out.push(v),
            Err((row, (kind, field, message))) => {
                return Err((kind, format!("row {row}: {field}"), format!("row {row}: {message}")));
            }
        }
    }
    Ok(out)
}

/// One row's T–P flash: (phase, β, 1 − β, x, y).
type FlashRow = (i8, f64, f64, Vec<f64>, Vec<f64>);

/// A split and its compositions as a [`FlashRow`].
fn flash_row(s: &flashduty::rachford_rice::SplitSummary, x: &[f64], y: &[f64]) -> FlashRow {
    (
        phase_code(s.phase),
        s.vapour_fraction,
        s.liquid_fraction,
        x.to_vec(),
        y.to_vec(),
    )
}

/// T–P flashes of `components` with feeds `z` (N, n) at temperatures `t_k` (N,) and
/// pressures `p_pa` (N,), in parallel without the GIL. Returns a dict of arrays.
#[pyfunction]
#[pyo3(signature = (components, z, t_k, p_pa, library = None))]
fn flash_batch<'py>(
    py: Python<'py>,
    components: Vec<String>,
    z: PyReadonlyArray2<'py, f64>,
    t_k: PyReadonlyArray1<'py, f64>,
    p_pa: PyReadonlyArray1<'py, f64>,
    library: Option<&PyLibrary>,
) -> PyResult<Bound<'py, PyDict>> {
    let lib = library_of(library);
    let (zs, n_rows, n) = rows(&z);
    let (ts, ps) = (column(&t_k), column(&p_pa));
    let rows_out = py
        .detach(move || -> Result<Vec<FlashRow>, Failure> {
            check_len("T", ts.len(), n_rows)?;
            check_len("P", ps.len(), n_rows)?;
            let comps = flashduty::case::components(&lib, &components).map_err(from_case)?;
            if comps.len() != n {
                return Err(failure(
                    "component-count",
                    "z",
                    format!("z: {n} mole fractions per row for {} components", comps.len()),
                ));
            }
            let model = Raoult::new(comps);
            let results: Vec<Result<FlashRow, (usize, Failure)>> = (0..n_rows)
                .into_par_iter()
                .map_init(
                    || (KValues::new(n), vec![0.0; n], vec![0.0; n]),
                    |(kv, x, y), r| {
                        let zr = &zs[r * n..(r + 1) * n];
                        let t = Temperature::new("T", ts[r]).map_err(|e| (r, lib_error(e)))?;
                        let p = Pressure::new("P", ps[r]).map_err(|e| (r, lib_error(e)))?;
                        let s = tp_flash_into(&model, zr, t, p, kv, x, y).map_err(|e| (r, lib_error(e)))?;
                        Ok(flash_row(&s, x, y))
                    },
                )
                .collect();
            first_error(results)
        })
        .map_err(raise)?;
    split_dict(py, rows_out, n)
}

/// The dict of a batch of splits.
fn split_dict(py: Python<'_>, rows_out: Vec<FlashRow>, n: usize) -> PyResult<Bound<'_, PyDict>> {
    let n_rows = rows_out.len();
    let mut phase = Vec::with_capacity(n_rows);
    let mut beta = Vec::with_capacity(n_rows);
    let mut liquid = Vec::with_capacity(n_rows);
    let mut x = Vec::with_capacity(n_rows * n);
    let mut y = Vec::with_capacity(n_rows * n);
    for (ph, b, l, xr, yr) in rows_out {
        phase.push(ph);
        beta.push(b);
        liquid.push(l);
        x.extend(xr);
        y.extend(yr);
    }
    let d = PyDict::new(py);
    d.set_item("phase", PyArray1::from_vec(py, phase))?;
    d.set_item("vapour_fraction", PyArray1::from_vec(py, beta))?;
    d.set_item("liquid_fraction", PyArray1::from_vec(py, liquid))?;
    d.set_item("x", PyArray1::from_vec(py, x).reshape([n_rows, n])?)?;
    d.set_item("y", PyArray1::from_vec(py, y).reshape([n_rows, n])?)?;
    Ok(d)
}

/// The Rachford–Rice split of feeds `z` (N, n) with given K-values `k` (N, n), in parallel
/// without the GIL. Returns a dict of arrays.
#[pyfunction]
fn rachford_rice_batch<'py>(
    py: Python<'py>,
    z: PyReadonlyArray2<'py, f64>,
    k: PyReadonlyArray2<'py, f64>,
) -> PyResult<Bound<'py, PyDict>> {
    let (zs, n_rows, n) = rows(&z);
    let (ks, k_rows, k_n) = rows(&k);
    let rows_out = py
        .detach(move || -> Result<Vec<FlashRow>, Failure> {
            if (k_rows, k_n) != (n_rows, n) {
                return Err(failure(
                    "length-mismatch",
                    "K",
                    format!("K: shape ({k_rows}, {k_n}) for z of shape ({n_rows}, {n})"),
                ));
            }
            let results: Vec<Result<FlashRow, (usize, Failure)>> = (0..n_rows)
                .into_par_iter()
                .map_init(
                    || (vec![0.0; n], vec![0.0; n]),
                    |(x, y), r| {
                        let s = solve_into(
                            &zs[r * n..(r + 1) * n],
                            &ks[r * n..(r + 1) * n],
                            Options::default(),
                            x,
                            y,
                        )
                        .map_err(|e| (r, lib_error(e)))?;
                        Ok(flash_row(&s, x, y))
                    },
                )
                .collect();
            first_error(results)
        })
        .map_err(raise)?;
    split_dict(py, rows_out, n)
}

/// Heater duties (W) of one stream (`components`, mole fractions `z`, flow in mol/s)
/// between inlet states (`t_in_k`, `p_in_pa`) and outlet states (`t_out_k`, `p_out_pa`),
/// arrays of N, in parallel without the GIL, with the library's default options.
#[allow(clippy::too_many_arguments)]
#[pyfunction]
#[pyo3(signature = (components, z, flow_mol_s, t_in_k, p_in_pa, t_out_k, p_out_pa, library = None, immiscible_water = false))]
fn duty_batch<'py>(
    py: Python<'py>,
    components: Vec<String>,
    z: Vec<f64>,
    flow_mol_s: f64,
    t_in_k: PyReadonlyArray1<'py, f64>,
    p_in_pa: PyReadonlyArray1<'py, f64>,
    t_out_k: PyReadonlyArray1<'py, f64>,
    p_out_pa: PyReadonlyArray1<'py, f64>,
    library: Option<&PyLibrary>,
    immiscible_water: bool,
) -> PyResult<Bound<'py, PyArray1<f64>>> {
    let lib = library_of(library);
    let cols = [column(&t_in_k), column(&p_in_pa), column(&t_out_k), column(&p_out_pa)];
    let duties = py
        .detach(move || -> Result<Vec<f64>, Failure> {
            let n_rows = cols[0].len();
            for (c, name) in cols.iter().zip(["T_in", "P_in", "T_out", "P_out"]) {
                check_len(name, c.len(), n_rows)?;
            }
            let comps = flashduty::case::components(&lib, &components).map_err(from_case)?;
            let flow = MolarFlow::new("flow", flow_mol_s).map_err(lib_error)?;
            let mut stream = Stream::new(comps, &z, flow).map_err(lib_error)?;
            if immiscible_water {
                stream = stream.with_immiscible_water().map_err(lib_error)?;
            }
            let calculator = DutyCalculator::new(&stream, DutyOptions::default()).map_err(lib_error)?;
            let state = |r: usize, t: &[f64], p: &[f64], which: &str| -> Result<StreamState, Failure> {
                Ok(StreamState::TemperaturePressure {
                    temperature: Temperature::new(&format!("{which}.T"), t[r]).map_err(lib_error)?,
                    pressure: Pressure::new(&format!("{which}.P"), p[r]).map_err(lib_error)?,
                })
            };
            let results: Vec<Result<f64, (usize, Failure)>> = (0..n_rows)
                .into_par_iter()
                .map_init(
                    || calculator.clone(),
                    |calc, r| {
                        let i = state(r, &cols[0], &cols[1], "inlet").map_err(|e| (r, e))?;
                        let o = state(r, &cols[2], &cols[3], "outlet").map_err(|e| (r, e))?;
                        calc.duty(i, o).map(|d| d.duty_w).map_err(|e| (r, lib_error(e)))
                    },
                )
                .collect();
            first_error(results)
        })
        .map_err(raise)?;
    Ok(PyArray1::from_vec(py, duties))
}

/// The native module.
#[pymodule]
fn _flashduty(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyLibrary>()?;
    m.add_function(wrap_pyfunction!(run_case, m)?)?;
    m.add_function(wrap_pyfunction!(flash_batch, m)?)?;
    m.add_function(wrap_pyfunction!(rachford_rice_batch, m)?)?;
    m.add_function(wrap_pyfunction!(duty_batch, m)?)?;
    m.add("CAUTION", flashduty::case::CAUTION)?;
    Ok(())
}
