//! The C interface to flashduty.
//!
//! Opaque handles: [`FdLibrary`] (the component library, with user components added from a
//! file or a JSON string) and [`FdCalculator`] (a prepared stream: the duty calculator and
//! an allocation-free T–P flash). Every case the command-line tool runs goes through
//! [`fd_run_case`], JSON in and the same outcome JSON out, from the same library code.
//! The hot-loop calls ([`fd_calculator_tp_flash`], [`fd_calculator_duty`],
//! [`fd_calculator_outlet_for_duty`]) take and fill plain `#[repr(C)]` structs and caller
//! buffers.
//!
//! Errors: every call returns an [`FdStatus`]; the handle keeps the last error's kind (the
//! library's stable kebab-case kind, as in the tool's JSON errors), field and message,
//! copied out with [`fd_library_error`] or [`fd_calculator_error`]. Each handle holds its
//! own error behind a mutex, and the calculator's working state too: handles may be shared
//! between threads, and there is no global mutable state. No panic crosses the boundary
//! (each call runs under `catch_unwind`); null pointers and wrong buffer lengths are
//! errors, never undefined behaviour that the library can detect. Every handle and string
//! the interface returns has its free function.
//!
//! Results are estimates from ideal-mixture models; check that the models suit the mixture
//! and conditions. Equipment design and operation follow the applicable local codes and
//! the judgement of a qualified, licensed engineer.

use flashduty::case::{CaseError, Command, components, parse_case, parse_text, run};
use flashduty::energy::{
    DutyCalculator, DutyOptions, DutySummary, ReferencePhase, ReferenceState, StateSummary, Stream, StreamState,
    VaporisationPath, VapourModel,
};
use flashduty::equilibrium::{KValues, Raoult, tp_flash_into};
use flashduty::library::Library;
use flashduty::rachford_rice::Phase;
use flashduty::units::{MolarFlow, Power, Pressure, Temperature};
use std::ffi::{CStr, CString, c_char};
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::sync::Mutex;

/// What a call returned.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdStatus {
    /// Success.
    Ok = 0,
    /// Bad input or a calculation that cannot be done: the handle's error names the field
    /// and value (as the command-line tool's exit code 2).
    Input = 1,
    /// A required pointer was null.
    NullPointer = 2,
    /// A caller buffer's length does not match the stream's component count.
    BufferLength = 3,
    /// A text argument is not valid UTF-8.
    Utf8 = 4,
    /// An internal error (a panic, caught at the boundary); please report it.
    Internal = 5,
}

/// The phase of a state.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdPhase {
    /// All liquid (at or below the bubble point).
    Liquid = 0,
    /// All vapour (at or above the dew point).
    Vapour = 1,
    /// Liquid and vapour.
    TwoPhase = 2,
}

impl From<Phase> for FdPhase {
    fn from(p: Phase) -> Self {
        match p {
            Phase::Liquid => FdPhase::Liquid,
            Phase::Vapour => FdPhase::Vapour,
            _ => FdPhase::TwoPhase,
        }
    }
}

/// Which two quantities fix a state.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdStateSpec {
    /// Temperature and pressure.
    TemperaturePressure = 0,
    /// Pressure and vapour fraction.
    PressureVapourFraction = 1,
    /// Temperature and vapour fraction.
    TemperatureVapourFraction = 2,
}

/// A heater inlet or outlet state: `spec` says which two of the fields are read.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FdState {
    /// Which fields are given.
    pub spec: FdStateSpec,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Absolute pressure, Pa.
    pub pressure_pa: f64,
    /// Moles of vapour per mole of stream, 0 to 1.
    pub vapour_fraction: f64,
}

/// A solved state.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FdPoint {
    /// The phase.
    pub phase: FdPhase,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure, Pa.
    pub pressure_pa: f64,
    /// Vapour fraction.
    pub vapour_fraction: f64,
    /// Liquid fraction, 1 − vapour fraction without cancellation.
    pub liquid_fraction: f64,
}

/// A duty and the states it joins.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FdDuty {
    /// Heat into the stream, W (negative: heat removed).
    pub duty_w: f64,
    /// The inlet state.
    pub inlet: FdPoint,
    /// The outlet state.
    pub outlet: FdPoint,
    /// Inlet enthalpy against the reference state, J/mol.
    pub inlet_enthalpy_j_per_mol: f64,
    /// Outlet enthalpy against the reference state, J/mol.
    pub outlet_enthalpy_j_per_mol: f64,
    /// Whether `dduty_dt_out_w_per_k` is given (the outlet given by T and P, or found from
    /// the duty, and not at a temperature where the duty jumps).
    pub has_dduty_dt: bool,
    /// dQ/dT at the outlet, W/K (0 where `has_dduty_dt` is false).
    pub dduty_dt_out_w_per_k: f64,
}

/// A T–P flash's phase split.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FdSplit {
    /// The phase.
    pub phase: FdPhase,
    /// Vapour fraction.
    pub vapour_fraction: f64,
    /// Liquid fraction.
    pub liquid_fraction: f64,
    /// Solver steps.
    pub iterations: u32,
}

/// The reference phase of the enthalpies.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdReferencePhase {
    /// Liquid (the default).
    Liquid = 0,
    /// Ideal-gas vapour.
    Vapour = 1,
}

/// The vaporisation path.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdPath {
    /// Via the normal boiling point (the default).
    BoilingPoint = 0,
    /// At the stream temperature.
    StreamTemperature = 1,
    /// At the reference temperature.
    ReferenceTemperature = 2,
}

/// The vapour's enthalpy model.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdVapourModel {
    /// Ideal gas (the default).
    IdealGas = 0,
    /// Second-virial residual enthalpy.
    SecondVirial = 1,
}

/// The options of a calculator; [`fd_options_default`] gives the library's defaults.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FdOptions {
    /// Reference phase.
    pub reference_phase: FdReferencePhase,
    /// Reference temperature, K.
    pub reference_temperature_k: f64,
    /// Vaporisation path.
    pub path: FdPath,
    /// Vapour model.
    pub vapour_model: FdVapourModel,
    /// Whether water forms a liquid phase of its own (the immiscible water phase).
    pub immiscible_water: bool,
}

/// The last error of a handle.
#[derive(Debug, Default)]
struct LastError {
    kind: String,
    field: String,
    message: String,
}

/// A failure inside a call: the status and what to keep on the handle.
struct Failure {
    status: FdStatus,
    kind: &'static str,
    field: String,
    message: String,
}

impl Failure {
    fn new(status: FdStatus, kind: &'static str, field: &str, message: impl Into<String>) -> Self {
        Self {
            status,
            kind,
            field: field.to_string(),
            message: message.into(),
        }
    }

    fn null(field: &str) -> Self {
        Self::new(
            FdStatus::NullPointer,
            "null-pointer",
            field,
            format!("{field}: a required pointer is null"),
        )
    }
}

impl From<CaseError> for Failure {
    fn from(e: CaseError) -> Self {
        Self {
            status: FdStatus::Input,
            kind: e.kind(),
            field: e.field().unwrap_or_default().to_string(),
            message: e.message().to_string(),
        }
    }
}

/// Library errors as a [`Failure`], through the case layer's conversion (kind and message).
fn input<E>(e: E) -> Failure
where
    CaseError: From<E>,
{
    Failure::from(CaseError::from(e))
}

/// Runs `body` under `catch_unwind`, keeping any failure in `error`.
fn guard(error: &Mutex<LastError>, body: impl FnOnce() -> Result<(), Failure>) -> FdStatus {
    let failure = match catch_unwind(AssertUnwindSafe(body)) {
        Ok(Ok(())) => return FdStatus::Ok,
        Ok(Err(f)) => f,
        Err(_) => Failure::new(
            FdStatus::Internal,
            "internal",
            "",
            "internal error (a panic was caught at the C boundary); please report it",
        ),
    };
    if let Ok(mut e) = error.lock() {
        *e = LastError {
            kind: failure.kind.to_string(),
            field: failure.field,
            message: failure.message,
        };
    }
    failure.status
}

/// A UTF-8 string argument.
///
/// # Safety
/// `p` is null or points to a NUL-terminated string.
unsafe fn text<'a>(p: *const c_char, field: &str) -> Result<&'a str, Failure> {
    if p.is_null() {
        return Err(Failure::null(field));
    }
    // SAFETY: non-null and NUL-terminated by the caller's contract.
    unsafe { CStr::from_ptr(p) }
        .to_str()
        .map_err(|_| Failure::new(FdStatus::Utf8, "not-utf8", field, format!("{field}: not valid UTF-8")))
}

/// Copies `s` into `buf` (capacity `len`, NUL-terminated, truncated to fit) and returns the
/// length `s` needs without the NUL.
///
/// # Safety
/// `buf` is null or valid for `len` bytes.
unsafe fn copy_out(s: &str, buf: *mut c_char, len: usize) -> usize {
    if !buf.is_null() && len > 0 {
        let bytes = s.as_bytes();
        let n = bytes.len().min(len - 1);
        // SAFETY: buf is valid for len bytes; n + 1 <= len.
        unsafe {
            std::ptr::copy_nonoverlapping(bytes.as_ptr(), buf.cast::<u8>(), n);
            *buf.add(n) = 0;
        }
    }
    s.len()
}

/// The component library handle.
pub struct FdLibrary {
    library: Library,
    error: Mutex<LastError>,
}

/// A new library holding the built-in components; null only if the built-in data cannot
/// be read (never in a correct build). Free it with [`fd_library_free`].
#[unsafe(no_mangle)]
pub extern "C" fn fd_library_new() -> *mut FdLibrary {
    match catch_unwind(Library::try_builtin) {
        Ok(Ok(library)) => Box::into_raw(Box::new(FdLibrary {
            library,
            error: Mutex::new(LastError::default()),
        })),
        _ => std::ptr::null_mut(),
    }
}

/// Frees a library from [`fd_library_new`] (null is ignored). Calculators made from it stay
/// valid: they hold their own copies of the components.
///
/// # Safety
/// `library` is null or a pointer from [`fd_library_new`] not yet freed.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_library_free(library: *mut FdLibrary) {
    if !library.is_null() {
        // SAFETY: from Box::into_raw, not yet freed.
        drop(unsafe { Box::from_raw(library) });
    }
}

/// Adds the user components of a JSON or TOML component file.
///
/// # Safety
/// `library` is null or a live library; `path` is null or a NUL-terminated string.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_library_add_file(library: *mut FdLibrary, path: *const c_char) -> FdStatus {
    // SAFETY: a live library or null, by contract.
    let Some(lib) = (unsafe { library.as_mut() }) else {
        return FdStatus::NullPointer;
    };
    let FdLibrary { library, error } = lib;
    guard(error, || {
        // SAFETY: by contract.
        let path = unsafe { text(path, "path") }?;
        library.add_path(std::path::Path::new(path)).map_err(input)?;
        Ok(())
    })
}

/// Adds user components from the text of a JSON component file.
///
/// # Safety
/// `library` is null or a live library; `json` is null or a NUL-terminated string.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_library_add_json(library: *mut FdLibrary, json: *const c_char) -> FdStatus {
    // SAFETY: a live library or null, by contract.
    let Some(lib) = (unsafe { library.as_mut() }) else {
        return FdStatus::NullPointer;
    };
    let FdLibrary { library, error } = lib;
    guard(error, || {
        // SAFETY: by contract.
        let json = unsafe { text(json, "json") }?;
        library.add_json("json", json).map_err(input)?;
        Ok(())
    })
}

/// The number of condensable components in the library (0 for null).
///
/// # Safety
/// `library` is null or a live library.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_library_len(library: *const FdLibrary) -> usize {
    // SAFETY: a live library or null, by contract.
    unsafe { library.as_ref() }.map_or(0, |l| l.library.len())
}

/// Runs a case as the command-line tool does: `command` is `flash`, `bubble`, `dew`,
/// `duty`, `curve` or `azeotropes`, `case_json` the case (JSON, the keys of docs/CLI.md). On success
/// `*out_json` is the outcome's JSON object, the tool's `--json` output; on failure it is
/// `{"error": {"kind", "field", "message"}}`, the tool's JSON error. Free it with
/// [`fd_string_free`]. `out_json` may be null where only the status is wanted.
///
/// # Safety
/// `library` is null or a live library; the strings are null or NUL-terminated;
/// `out_json` is null or valid for one write.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_run_case(
    library: *mut FdLibrary,
    command: *const c_char,
    case_json: *const c_char,
    out_json: *mut *mut c_char,
) -> FdStatus {
    // SAFETY: a live library or null, by contract.
    let Some(lib) = (unsafe { library.as_ref() }) else {
        return FdStatus::NullPointer;
    };
    let mut answer = String::new();
    let status = guard(&lib.error, || {
        // SAFETY: by contract.
        let name = unsafe { text(command, "command") }?;
        let Some(cmd) = Command::from_name(name) else {
            return Err(Failure::new(
                FdStatus::Input,
                "unknown-command",
                "command",
                format!("command: '{name}' is not flash, bubble, dew, duty, curve or azeotropes"),
            ));
        };
        // SAFETY: by contract.
        let body = unsafe { text(case_json, "case") }?;
        let value = parse_text("case.json", body)?;
        let case = parse_case(&value, cmd)?;
        let outcome = run(&lib.library, cmd, &case, None)?;
        answer = outcome.to_json().to_string();
        Ok(())
    });
    if status != FdStatus::Ok
        && let Ok(e) = lib.error.lock()
    {
        answer = serde_json::json!({"error": {"kind": e.kind, "field": e.field, "message": e.message}}).to_string();
    }
    if !out_json.is_null() {
        let s = CString::new(answer).unwrap_or_default();
        // SAFETY: valid for one write, by contract.
        unsafe { *out_json = s.into_raw() };
    }
    status
}

/// Frees a string returned by this interface (null is ignored).
///
/// # Safety
/// `s` is null or a string from this interface not yet freed.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_string_free(s: *mut c_char) {
    if !s.is_null() {
        // SAFETY: from CString::into_raw, not yet freed.
        drop(unsafe { CString::from_raw(s) });
    }
}

/// Which part of the last error to copy.
#[repr(C)]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FdErrorPart {
    /// The message: one line naming the field and value.
    Message = 0,
    /// The stable kebab-case kind (`unknown-component`, `mole-fraction-sum`, ...).
    Kind = 1,
    /// The field, where known (else empty).
    Field = 2,
}

fn error_part(error: &Mutex<LastError>, part: FdErrorPart) -> String {
    error.lock().map_or_else(
        |_| String::new(),
        |e| match part {
            FdErrorPart::Message => e.message.clone(),
            FdErrorPart::Kind => e.kind.clone(),
            FdErrorPart::Field => e.field.clone(),
        },
    )
}

/// Copies part of the library handle's last error into `buf` (capacity `len`, always
/// NUL-terminated when `len > 0`, truncated to fit) and returns the length the whole text
/// needs without the NUL (0: no error yet, or a null handle).
///
/// # Safety
/// `library` is null or a live library; `buf` is null or valid for `len` bytes.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_library_error(
    library: *const FdLibrary,
    part: FdErrorPart,
    buf: *mut c_char,
    len: usize,
) -> usize {
    // SAFETY: by contract.
    let Some(lib) = (unsafe { library.as_ref() }) else {
        return 0;
    };
    // SAFETY: by contract.
    unsafe { copy_out(&error_part(&lib.error, part), buf, len) }
}

/// The library's default options.
#[unsafe(no_mangle)]
pub extern "C" fn fd_options_default() -> FdOptions {
    let d = DutyOptions::default();
    FdOptions {
        reference_phase: FdReferencePhase::Liquid,
        reference_temperature_k: d.reference.temperature_k,
        path: FdPath::BoilingPoint,
        vapour_model: FdVapourModel::IdealGas,
        immiscible_water: false,
    }
}

/// The working state of a calculator.
struct Working {
    calculator: DutyCalculator,
    model: Raoult,
    z: Vec<f64>,
    k: KValues,
}

/// A prepared stream: its duty calculator and T–P flash.
pub struct FdCalculator {
    n: usize,
    working: Mutex<Working>,
    error: Mutex<LastError>,
}

fn options_of(o: &FdOptions) -> DutyOptions {
    DutyOptions {
        reference: ReferenceState {
            phase: match o.reference_phase {
                FdReferencePhase::Liquid => ReferencePhase::Liquid,
                FdReferencePhase::Vapour => ReferencePhase::Vapour,
            },
            temperature_k: o.reference_temperature_k,
        },
        path: match o.path {
            FdPath::BoilingPoint => VaporisationPath::BoilingPoint,
            FdPath::StreamTemperature => VaporisationPath::StreamTemperature,
            FdPath::ReferenceTemperature => VaporisationPath::ReferenceTemperature,
        },
        vapour_model: match o.vapour_model {
            FdVapourModel::IdealGas => VapourModel::IdealGas,
            FdVapourModel::SecondVirial => VapourModel::SecondVirial,
        },
    }
}

/// A calculator for a stream of `n` components named in `names` (library names, synonyms
/// or CAS numbers) with mole fractions `z` and total flow `flow_mol_s`; `options` may be
/// null for the defaults. Returns null on failure, with the error on the library handle.
/// Free it with [`fd_calculator_free`].
///
/// # Safety
/// `library` is null or a live library; `names` is null or points to `n` NUL-terminated
/// strings; `z` is null or points to `n` doubles; `options` is null or valid.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_calculator_new(
    library: *mut FdLibrary,
    names: *const *const c_char,
    z: *const f64,
    n: usize,
    flow_mol_s: f64,
    options: *const FdOptions,
) -> *mut FdCalculator {
    // SAFETY: by contract.
    let Some(lib) = (unsafe { library.as_ref() }) else {
        return std::ptr::null_mut();
    };
    let mut made = None;
    guard(&lib.error, || {
        if names.is_null() {
            return Err(Failure::null("names"));
        }
        if z.is_null() {
            return Err(Failure::null("z"));
        }
        if n == 0 {
            return Err(Failure::new(
                FdStatus::Input,
                "empty",
                "z",
                "z: the feed has no components",
            ));
        }
        // SAFETY: names and z point to n elements, by contract.
        let (name_ptrs, z) = unsafe { (std::slice::from_raw_parts(names, n), std::slice::from_raw_parts(z, n)) };
        let mut list = Vec::with_capacity(n);
        for (i, &p) in name_ptrs.iter().enumerate() {
            // SAFETY: each is null or NUL-terminated, by contract.
            list.push(unsafe { text(p, &format!("components[{i}]")) }?.to_string());
        }
        let components = components(&lib.library, &list)?;
        let flow = MolarFlow::new("flow", flow_mol_s).map_err(input)?;
        let (opts, water) = match unsafe { options.as_ref() } {
            Some(o) => (options_of(o), o.immiscible_water),
            None => (DutyOptions::default(), false),
        };
        let mut stream = Stream::new(components.clone(), z, flow).map_err(input)?;
        if water {
            stream = stream.with_immiscible_water().map_err(input)?;
        }
        let calculator = DutyCalculator::new(&stream, opts).map_err(input)?;
        made = Some(FdCalculator {
            n,
            working: Mutex::new(Working {
                calculator,
                model: Raoult::new(components),
                z: stream.z().to_vec(),
                k: KValues::new(n),
            }),
            error: Mutex::new(LastError::default()),
        });
        Ok(())
    });
    made.map_or(std::ptr::null_mut(), |c| Box::into_raw(Box::new(c)))
}

/// Frees a calculator (null is ignored).
///
/// # Safety
/// `calculator` is null or a pointer from [`fd_calculator_new`] not yet freed.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_calculator_free(calculator: *mut FdCalculator) {
    if !calculator.is_null() {
        // SAFETY: from Box::into_raw, not yet freed.
        drop(unsafe { Box::from_raw(calculator) });
    }
}

/// The number of components of the calculator's stream (0 for null).
///
/// # Safety
/// `calculator` is null or a live calculator.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_calculator_len(calculator: *const FdCalculator) -> usize {
    // SAFETY: by contract.
    unsafe { calculator.as_ref() }.map_or(0, |c| c.n)
}

/// Copies part of the calculator's last error, as [`fd_library_error`].
///
/// # Safety
/// `calculator` is null or a live calculator; `buf` is null or valid for `len` bytes.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_calculator_error(
    calculator: *const FdCalculator,
    part: FdErrorPart,
    buf: *mut c_char,
    len: usize,
) -> usize {
    // SAFETY: by contract.
    let Some(c) = (unsafe { calculator.as_ref() }) else {
        return 0;
    };
    // SAFETY: by contract.
    unsafe { copy_out(&error_part(&c.error, part), buf, len) }
}

fn working(c: &FdCalculator) -> Result<std::sync::MutexGuard<'_, Working>, Failure> {
    c.working.lock().map_err(|_| {
        Failure::new(
            FdStatus::Internal,
            "internal",
            "",
            "the calculator was poisoned by an earlier internal error",
        )
    })
}

/// The library's state for an [`FdState`].
fn stream_state(field: &str, s: &FdState) -> Result<StreamState, Failure> {
    let t = || Temperature::new(&format!("{field}.T"), s.temperature_k).map_err(input);
    let p = || Pressure::new(&format!("{field}.P"), s.pressure_pa).map_err(input);
    Ok(match s.spec {
        FdStateSpec::TemperaturePressure => StreamState::TemperaturePressure {
            temperature: t()?,
            pressure: p()?,
        },
        FdStateSpec::PressureVapourFraction => StreamState::PressureVapourFraction {
            pressure: p()?,
            vapour_fraction: s.vapour_fraction,
        },
        FdStateSpec::TemperatureVapourFraction => StreamState::TemperatureVapourFraction {
            temperature: t()?,
            vapour_fraction: s.vapour_fraction,
        },
    })
}

fn point(s: &StateSummary) -> FdPoint {
    FdPoint {
        phase: s.phase.into(),
        temperature_k: s.temperature_k,
        pressure_pa: s.pressure_pa,
        vapour_fraction: s.vapour_fraction,
        liquid_fraction: s.liquid_fraction,
    }
}

fn duty_of(d: &DutySummary) -> FdDuty {
    FdDuty {
        duty_w: d.duty_w,
        inlet: point(&d.inlet),
        outlet: point(&d.outlet),
        inlet_enthalpy_j_per_mol: d.inlet_enthalpy_j_per_mol,
        outlet_enthalpy_j_per_mol: d.outlet_enthalpy_j_per_mol,
        has_dduty_dt: d.dduty_dt_out_w_per_k.is_some(),
        dduty_dt_out_w_per_k: d.dduty_dt_out_w_per_k.unwrap_or(0.0),
    }
}

/// The T–P flash of the calculator's stream (one liquid phase; for the water phase use a
/// case through [`fd_run_case`]): the split into `*out`, and, where `x` and `y` are not
/// null, the liquid and vapour mole fractions into them (each `len` doubles, `len` the
/// component count). Allocates nothing.
///
/// # Safety
/// `calculator` is null or a live calculator; `out` is null or valid; `x` and `y` are null
/// or valid for `len` doubles.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_calculator_tp_flash(
    calculator: *const FdCalculator,
    temperature_k: f64,
    pressure_pa: f64,
    out: *mut FdSplit,
    x: *mut f64,
    y: *mut f64,
    len: usize,
) -> FdStatus {
    // SAFETY: by contract.
    let Some(c) = (unsafe { calculator.as_ref() }) else {
        return FdStatus::NullPointer;
    };
    guard(&c.error, || {
        if out.is_null() {
            return Err(Failure::null("out"));
        }
        if (!x.is_null() || !y.is_null()) && len != c.n {
            return Err(Failure::new(
                FdStatus::BufferLength,
                "buffer-length",
                "len",
                format!("len: {len} given for {} components", c.n),
            ));
        }
        let t = Temperature::new("T", temperature_k).map_err(input)?;
        let p = Pressure::new("P", pressure_pa).map_err(input)?;
        let mut w = working(c)?;
        let Working { model, z, k, .. } = &mut *w;
        let n = z.len();
        let (mut xs, mut ys) = ([0.0f64; 0].to_vec(), Vec::new());
        // SAFETY: valid for len == n doubles where not null, by contract.
        let (xb, yb): (&mut [f64], &mut [f64]) = unsafe {
            (
                if x.is_null() {
                    xs.resize(n, 0.0);
                    &mut xs
                } else {
                    std::slice::from_raw_parts_mut(x, n)
                },
                if y.is_null() {
                    ys.resize(n, 0.0);
                    &mut ys
                } else {
                    std::slice::from_raw_parts_mut(y, n)
                },
            )
        };
        let s = tp_flash_into(model, z, t, p, k, xb, yb).map_err(input)?;
        // SAFETY: out is valid, checked non-null.
        unsafe {
            *out = FdSplit {
                phase: s.phase.into(),
                vapour_fraction: s.vapour_fraction,
                liquid_fraction: s.liquid_fraction,
                iterations: s.iterations,
            };
        }
        Ok(())
    })
}

/// The heater duty from `inlet` to `outlet` into `*out`. Allocates nothing with the
/// default models.
///
/// # Safety
/// `calculator` is null or a live calculator; `out` is null or valid.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_calculator_duty(
    calculator: *const FdCalculator,
    inlet: FdState,
    outlet: FdState,
    out: *mut FdDuty,
) -> FdStatus {
    // SAFETY: by contract.
    let Some(c) = (unsafe { calculator.as_ref() }) else {
        return FdStatus::NullPointer;
    };
    guard(&c.error, || {
        if out.is_null() {
            return Err(Failure::null("out"));
        }
        let (i, o) = (stream_state("inlet", &inlet)?, stream_state("outlet", &outlet)?);
        let d = working(c)?.calculator.duty(i, o).map_err(input)?;
        // SAFETY: checked non-null, valid by contract.
        unsafe { *out = duty_of(&d) };
        Ok(())
    })
}

/// The duty-specified flash: the outlet at `outlet_pressure_pa` after `duty_w` is added to
/// the stream at `inlet` (zero duty: the adiabatic flash), into `*out`.
///
/// # Safety
/// `calculator` is null or a live calculator; `out` is null or valid.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn fd_calculator_outlet_for_duty(
    calculator: *const FdCalculator,
    inlet: FdState,
    duty_w: f64,
    outlet_pressure_pa: f64,
    out: *mut FdDuty,
) -> FdStatus {
    // SAFETY: by contract.
    let Some(c) = (unsafe { calculator.as_ref() }) else {
        return FdStatus::NullPointer;
    };
    guard(&c.error, || {
        if out.is_null() {
            return Err(Failure::null("out"));
        }
        let i = stream_state("inlet", &inlet)?;
        let q = Power::new("duty", duty_w).map_err(input)?;
        let p = Pressure::new("outlet.P", outlet_pressure_pa).map_err(input)?;
        let d = working(c)?.calculator.outlet_for_duty(i, q, p).map_err(input)?;
        // SAFETY: checked non-null, valid by contract.
        unsafe { *out = duty_of(&d) };
        Ok(())
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_case_round_trips_and_errors_are_kept_per_handle() {
        let lib = fd_library_new();
        assert!(!lib.is_null());
        let cmd = CString::new("bubble").unwrap();
        let case = CString::new(r#"{"components": ["benzene", "toluene"], "z": [0.5, 0.5], "P": "1 atm"}"#).unwrap();
        let mut out: *mut c_char = std::ptr::null_mut();
        let status = unsafe { fd_run_case(lib, cmd.as_ptr(), case.as_ptr(), &mut out) };
        assert_eq!(status, FdStatus::Ok);
        let json: serde_json::Value = serde_json::from_str(unsafe { CStr::from_ptr(out) }.to_str().unwrap()).unwrap();
        assert_eq!(json["command"], "bubble");
        unsafe { fd_string_free(out) };
        let bad = CString::new(r#"{"components": ["unobtainium"], "z": [1], "P": "1 atm"}"#).unwrap();
        let status = unsafe { fd_run_case(lib, cmd.as_ptr(), bad.as_ptr(), &mut out) };
        assert_eq!(status, FdStatus::Input);
        let mut buf = [0 as c_char; 256];
        let n = unsafe { fd_library_error(lib, FdErrorPart::Kind, buf.as_mut_ptr(), buf.len()) };
        assert_eq!(
            unsafe { CStr::from_ptr(buf.as_ptr()) }.to_str().unwrap(),
            "unknown-component"
        );
        assert_eq!(n, "unknown-component".len());
        unsafe { fd_string_free(out) };
        unsafe { fd_library_free(lib) };
    }
}
