//! Case files: reading JSON or TOML text (or standard input) and checking every key and
//! value into a typed [`Case`]. Nothing is calculated here.
//!
//! The parser works on a `serde_json::Value` tree, so JSON files, TOML files and spreadsheet
//! rows (see `sheet.rs`) share it. Every error names the field (dotted for nested ones,
//! `inlet.T`, and indexed for lists, `z[2]`) and the value.

use super::error::{CaseError, CaseResult, bail};
use crate::activity::{BinaryParameters, LiquidModel};
use crate::energy::{ReferencePhase, ReferenceState, VaporisationPath, VapourModel};
use crate::units::{MassFlow, MolarFlow, Power, Pressure, Temperature, UnitError};
use serde_json::{Map, Value};
use std::path::Path;

/// The commands that take a case.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Command {
    /// Phase split at T and P, at T or P with a vapour fraction, or with given K-values.
    Flash,
    /// Bubble point at T or P.
    Bubble,
    /// Dew point at T or P.
    Dew,
    /// Heater duty between two states, or the outlet for a given duty.
    Duty,
    /// Heating or cooling curve.
    Curve,
    /// The azeotropes of a binary at T or P.
    Azeotropes,
}

impl Command {
    /// Every command that takes a case.
    pub const ALL: [Command; 6] = [
        Command::Flash,
        Command::Bubble,
        Command::Dew,
        Command::Duty,
        Command::Curve,
        Command::Azeotropes,
    ];

    /// The command's name on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Command::Flash => "flash",
            Command::Bubble => "bubble",
            Command::Dew => "dew",
            Command::Duty => "duty",
            Command::Curve => "curve",
            Command::Azeotropes => "azeotropes",
        }
    }

    /// The command named `text` (ignoring case and surrounding blanks).
    pub fn from_name(text: &str) -> Option<Command> {
        let t = text.trim().to_ascii_lowercase();
        Command::ALL.into_iter().find(|c| c.name() == t)
    }

    /// The top-level keys this command reads.
    fn keys(self) -> &'static [&'static str] {
        match self {
            Command::Flash => &[
                "note",
                "components",
                "z",
                "flows",
                "K",
                "T",
                "P",
                "vapour_fraction",
                "flow",
                "water_phase",
                "liquid_model",
                "binary_parameters",
            ],
            Command::Bubble | Command::Dew => &[
                "note",
                "components",
                "z",
                "flows",
                "T",
                "P",
                "flow",
                "water_phase",
                "liquid_model",
                "binary_parameters",
            ],
            Command::Duty => &[
                "note",
                "components",
                "z",
                "flows",
                "flow",
                "inlet",
                "outlet",
                "duty",
                "reference",
                "path",
                "vapour_model",
                "water_phase",
                "liquid_model",
                "binary_parameters",
            ],
            Command::Curve => &[
                "note",
                "components",
                "z",
                "flows",
                "flow",
                "inlet",
                "outlet",
                "duty",
                "reference",
                "path",
                "vapour_model",
                "points",
                "water_phase",
                "liquid_model",
                "binary_parameters",
            ],
            Command::Azeotropes => &["note", "components", "T", "P", "liquid_model", "binary_parameters"],
        }
    }
}

/// Every top-level key of a case, for any command.
pub const TOP_KEYS: &[&str] = &[
    "note",
    "components",
    "z",
    "flows",
    "K",
    "T",
    "P",
    "vapour_fraction",
    "flow",
    "inlet",
    "outlet",
    "duty",
    "reference",
    "path",
    "vapour_model",
    "points",
    "water_phase",
    "liquid_model",
    "binary_parameters",
];

/// Keys of a `water_phase` object.
pub const WATER_PHASE_KEYS: &[&str] = &["model", "water_in_organic", "organic_in_water"];

/// Keys of `inlet` and `outlet`.
pub const STATE_KEYS: &[&str] = &["T", "P", "vapour_fraction"];

/// Keys of `reference`.
pub const REFERENCE_KEYS: &[&str] = &["phase", "T"];

/// Keys whose value is a list.
pub const LIST_KEYS: &[&str] = &["components", "z", "flows", "K"];

/// Words people often write for a key, and the key meant.
const ALIASES: &[(&str, &str)] = &[
    ("temperature", "T"),
    ("temp", "T"),
    ("t", "T"),
    ("pressure", "P"),
    ("p", "P"),
    ("k", "K"),
    ("kvalues", "K"),
    ("k_values", "K"),
    ("beta", "vapour_fraction"),
    ("vapor_fraction", "vapour_fraction"),
    ("vaporfraction", "vapour_fraction"),
    ("vapour fraction", "vapour_fraction"),
    ("vf", "vapour_fraction"),
    ("x", "z"),
    ("composition", "z"),
    ("mole_fractions", "z"),
    ("component", "components"),
    ("names", "components"),
    ("flowrate", "flow"),
    ("flow_rate", "flow"),
    ("q", "duty"),
    ("heat", "duty"),
    ("ref", "reference"),
    ("comment", "note"),
    ("title", "note"),
    ("description", "note"),
    ("in", "inlet"),
    ("out", "outlet"),
    ("npoints", "points"),
    ("vapor_model", "vapour_model"),
    ("vapour", "vapour_model"),
    ("vapor", "vapour_model"),
    ("water", "water_phase"),
    ("free_water", "water_phase"),
    ("aqueous_phase", "water_phase"),
    ("activity_model", "liquid_model"),
    ("liquid", "liquid_model"),
    ("pairs", "binary_parameters"),
    ("parameters", "binary_parameters"),
];

/// A total flow: molar, or mass (converted with the stream's molar mass later).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TotalFlow {
    /// Molar flow.
    Molar(MolarFlow),
    /// Mass flow.
    Mass(MassFlow),
}

/// One component flow as given: molar (mol/s) or mass (kg/s).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ComponentFlow {
    /// mol/s.
    Molar(f64),
    /// kg/s.
    Mass(f64),
}

/// An inlet or outlet state as given: any of T, P and vapour fraction.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct StateInput {
    /// Temperature.
    pub t: Option<Temperature>,
    /// Pressure.
    pub p: Option<Pressure>,
    /// Vapour fraction in [0, 1].
    pub vapour_fraction: Option<f64>,
}

/// A checked case. Which fields are present was checked against the command's keys; the
/// combinations (two of T, P and vapour fraction, and so on) are checked by the command.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Case {
    /// Free text describing the case.
    pub note: Option<String>,
    /// Component names or CAS numbers.
    pub components: Option<Vec<String>>,
    /// Mole fractions.
    pub z: Option<Vec<f64>>,
    /// Component flows.
    pub flows: Option<Vec<ComponentFlow>>,
    /// Given K-values.
    pub k: Option<Vec<f64>>,
    /// Temperature.
    pub t: Option<Temperature>,
    /// Pressure.
    pub p: Option<Pressure>,
    /// Vapour fraction.
    pub vapour_fraction: Option<f64>,
    /// Total flow.
    pub flow: Option<TotalFlow>,
    /// Inlet state.
    pub inlet: Option<StateInput>,
    /// Outlet state.
    pub outlet: Option<StateInput>,
    /// Duty (heat into the stream).
    pub duty: Option<Power>,
    /// Reference state.
    pub reference: Option<ReferenceState>,
    /// Vaporisation path.
    pub path: Option<VaporisationPath>,
    /// Vapour model.
    pub vapour_model: Option<VapourModel>,
    /// Curve points.
    pub points: Option<usize>,
    /// The immiscible water phase, where asked for.
    pub water_phase: Option<WaterPhaseInput>,
    /// The unit the flow (or the first component flow) was typed in, where one was.
    pub flow_unit: Option<String>,
    /// The liquid model (`"liquid_model"`; ideal by default).
    pub liquid_model: LiquidModel,
    /// Binary parameters given in the case (`"binary_parameters"`): a parameter file's
    /// path or its content, already checked.
    pub binary_parameters: Option<BinaryParametersInput>,
}

/// The `binary_parameters` key: a parameter file (JSON or TOML, by path) or the same
/// content inline. Either adds to (and for the same pair replaces) the built-in set.
#[derive(Debug, Clone, PartialEq)]
pub enum BinaryParametersInput {
    /// A file path.
    File(String),
    /// The parameter object itself.
    Inline(Value),
}

impl BinaryParametersInput {
    /// The built-in set with these parameters added.
    ///
    /// # Errors
    /// The parameter file's error, its field named.
    pub fn load(&self) -> CaseResult<BinaryParameters> {
        let mut set = BinaryParameters::builtin().clone();
        match self {
            Self::File(path) => set.add_path(std::path::Path::new(path))?,
            Self::Inline(v) => set.add_value("binary_parameters", v)?,
        };
        Ok(set)
    }
}

/// `binary_parameters`: a path or an object, checked by loading it.
fn binary_parameters(v: &Value) -> CaseResult<BinaryParametersInput> {
    let input = match v {
        Value::String(path) => BinaryParametersInput::File(path.clone()),
        Value::Object(_) => BinaryParametersInput::Inline(v.clone()),
        Value::Array(_) => BinaryParametersInput::Inline(serde_json::json!({ "pairs": v })),
        other => bail!(
            "binary_parameters: expected a parameter file's path or an object with pairs, got {} {}",
            kind_of(other),
            show(other)
        ),
    };
    input.load()?;
    Ok(input)
}

/// The unit of a quantity typed as text (`"3.6 kmol/h"` gives `kmol/h`), if any.
fn typed_unit(v: &Value) -> Option<String> {
    let text = v.as_str()?.trim();
    let unit = text
        .trim_start_matches(|c: char| c.is_ascii_digit() || "+-.eE".contains(c))
        .trim();
    (!unit.is_empty() && unit.len() < text.len()).then(|| unit.to_string())
}

/// The `water_phase` key: water forms a liquid of its own beside the organic liquid, with
/// the mutual solubilities given (mole fractions; zero where not given).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct WaterPhaseInput {
    /// Mole fraction of water in the organic liquid.
    pub water_in_organic: f64,
    /// Mole fractions of organic components in the water phase, by name.
    pub organic_in_water: Vec<(String, f64)>,
}

/// The most points a curve may have (each is a flash; more would only take time).
pub const MAX_POINTS: usize = 10_000;

/// Whether the file name asks for TOML.
pub fn is_toml_name(name: &str) -> bool {
    Path::new(name)
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("toml"))
}

/// Parses case text: TOML when `name` ends in `.toml`, JSON otherwise. Text on standard
/// input is JSON when it parses as JSON or starts with `{`, else TOML.
pub fn parse_text(name: &str, text: &str) -> CaseResult<Value> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    if text.trim().is_empty() {
        bail!("{name}: empty (expected a case: a JSON object, or TOML)");
    }
    let value: Value = if name == "<stdin>" {
        match json_value(text) {
            Ok(v) => v,
            Err(e) if text.trim_start().starts_with(['{', '[']) => return Err(json_error(name, e)),
            Err(_) => toml_value(name, text)?,
        }
    } else if is_toml_name(name) {
        toml_value(name, text)?
    } else {
        json_value(text).map_err(|e| json_error(name, e))?
    };
    if !value.is_object() {
        bail!(
            "{name}: the case must be an object of keys and values, not {}",
            kind_of(&value)
        );
    }
    Ok(value)
}

/// JSON text as a value, refusing a key given twice in one object (serde_json would keep
/// the last silently; TOML refuses it already).
fn json_value(text: &str) -> Result<Value, serde_json::Error> {
    serde_json::from_str::<StrictValue>(text).map(|v| v.0)
}

/// The error of [`json_value`]: a duplicated key names the key (kind `duplicate-key`).
fn json_error(name: &str, e: serde_json::Error) -> CaseError {
    let text = e.to_string();
    match text.strip_prefix(DUPLICATE_KEY) {
        Some(rest) => {
            let key = rest.split('\'').next().unwrap_or_default();
            CaseError::with_kind(
                "duplicate-key",
                format!(
                    "{name}: key '{key}' is given twice (at line {}, column {}); give each key once",
                    e.line(),
                    e.column()
                ),
            )
            .with_field(key)
        }
        None => CaseError::new(format!("{name}: malformed JSON: {text}")),
    }
}

const DUPLICATE_KEY: &str = "duplicate key '";

/// A JSON value built by a visitor that refuses duplicated keys in any object.
struct StrictValue(Value);

impl<'de> serde::Deserialize<'de> for StrictValue {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_any(StrictVisitor).map(StrictValue)
    }
}

struct StrictVisitor;

impl<'de> serde::de::Visitor<'de> for StrictVisitor {
    type Value = Value;

    fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("a JSON value")
    }
    fn visit_bool<E>(self, v: bool) -> Result<Value, E> {
        Ok(Value::Bool(v))
    }
    fn visit_i64<E>(self, v: i64) -> Result<Value, E> {
        Ok(Value::from(v))
    }
    fn visit_u64<E>(self, v: u64) -> Result<Value, E> {
        Ok(Value::from(v))
    }
    fn visit_f64<E>(self, v: f64) -> Result<Value, E> {
        Ok(Value::from(v))
    }
    fn visit_str<E>(self, v: &str) -> Result<Value, E> {
        Ok(Value::String(v.to_string()))
    }
    fn visit_string<E>(self, v: String) -> Result<Value, E> {
        Ok(Value::String(v))
    }
    fn visit_unit<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_none<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_some<D: serde::Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        serde::Deserialize::deserialize(d).map(|v: StrictValue| v.0)
    }
    fn visit_seq<A: serde::de::SeqAccess<'de>>(self, mut seq: A) -> Result<Value, A::Error> {
        let mut items = Vec::new();
        while let Some(StrictValue(v)) = seq.next_element()? {
            items.push(v);
        }
        Ok(Value::Array(items))
    }
    fn visit_map<A: serde::de::MapAccess<'de>>(self, mut map: A) -> Result<Value, A::Error> {
        let mut out = Map::new();
        while let Some(key) = map.next_key::<String>()? {
            if out.contains_key(&key) {
                return Err(serde::de::Error::custom(format!("{DUPLICATE_KEY}{key}'")));
            }
            let StrictValue(v) = map.next_value()?;
            out.insert(key, v);
        }
        Ok(Value::Object(out))
    }
}

/// TOML text as a JSON value. TOML's `nan` and `inf` become the text "NaN" and "inf", so that
/// the field they are in is named as not finite (JSON numbers cannot hold them).
pub fn toml_value(name: &str, text: &str) -> CaseResult<Value> {
    let v: toml::Value = toml::from_str(text).map_err(|e| CaseError::new(format!("{name}: malformed TOML: {e}")))?;
    Ok(from_toml(v))
}

fn from_toml(v: toml::Value) -> Value {
    match v {
        toml::Value::String(s) => Value::String(s),
        toml::Value::Integer(i) => Value::from(i),
        toml::Value::Float(f) => {
            serde_json::Number::from_f64(f).map_or_else(|| Value::String(f.to_string()), Value::Number)
        }
        toml::Value::Boolean(b) => Value::Bool(b),
        toml::Value::Datetime(d) => Value::String(d.to_string()),
        toml::Value::Array(a) => Value::Array(a.into_iter().map(from_toml).collect()),
        toml::Value::Table(t) => Value::Object(t.into_iter().map(|(k, v)| (k, from_toml(v))).collect()),
    }
}

/// "a number", "a string", ... for messages.
pub fn kind_of(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "a true/false value",
        Value::Number(_) => "a number",
        Value::String(_) => "a string",
        Value::Array(_) => "a list",
        Value::Object(_) => "an object",
    }
}

/// A short rendering of a value for messages (long ones are cut).
pub fn show(v: &Value) -> String {
    let s = match v {
        Value::String(s) => format!("'{s}'"),
        other => other.to_string(),
    };
    if s.chars().count() > 60 {
        let cut: String = s.chars().take(57).collect();
        format!("{cut}...")
    } else {
        s
    }
}

/// The nearest known key to `key`, if any is near.
pub fn suggest_key(key: &str, known: &[&str]) -> Option<String> {
    if key.len() > 256 {
        return None;
    }
    let lower = key.trim().to_lowercase();
    if let Some((_, k)) = ALIASES.iter().find(|(a, _)| *a == lower)
        && known.contains(k)
    {
        return Some((*k).to_string());
    }
    let mut best: Option<(usize, &str)> = None;
    let candidates = known.iter().map(|k| (k.to_lowercase(), *k)).chain(
        ALIASES
            .iter()
            .filter(|(_, k)| known.contains(k))
            .map(|(a, k)| (a.to_string(), *k)),
    );
    for (spelling, k) in candidates {
        let d = edit_distance(&lower, &spelling);
        if best.is_none_or(|(bd, _)| d < bd) {
            best = Some((d, k));
        }
    }
    let limit = (lower.chars().count() / 3).max(1);
    best.filter(|(d, _)| *d <= limit).map(|(_, k)| k.to_string())
}

pub use crate::library::edit_distance;

fn unknown_key(prefix: &str, key: &str, known: &[&str]) -> CaseError {
    let full = format!("{prefix}{}", crate::units::clip(key));
    let hint = suggest_key(key, known)
        .map(|k| format!(" (did you mean '{prefix}{k}'?)"))
        .unwrap_or_default();
    CaseError::with_kind(
        "unknown-key",
        format!(
            "unknown key '{full}'{hint}; known keys{}: {}",
            if prefix.is_empty() {
                String::new()
            } else {
                format!(" of '{}'", prefix.trim_end_matches('.'))
            },
            known.join(", ")
        ),
    )
    .with_field(full)
}

/// Checks that every key of `map` is in `known`.
fn check_keys(map: &Map<String, Value>, prefix: &str, known: &[&str]) -> CaseResult<()> {
    for key in map.keys() {
        if !known.contains(&key.as_str()) {
            return Err(unknown_key(prefix, key, known));
        }
    }
    Ok(())
}

/// Why a known key is refused by a command, with a hint at what the command wants.
fn not_used(command: Command, key: &str) -> CaseError {
    let hint = match (command, key) {
        (Command::Duty | Command::Curve, "T" | "P" | "vapour_fraction") => {
            format!(" (give inlet.{key} and outlet.{key})")
        }
        (Command::Bubble | Command::Dew, "vapour_fraction") => {
            " (a bubble point has vapour fraction 0 and a dew point 1; use the flash command for others)".to_string()
        }
        (Command::Bubble | Command::Dew, "K") => " (use the flash command with z and K)".to_string(),
        (_, "points") => " (only the curve command takes points)".to_string(),
        (_, "inlet" | "outlet" | "duty" | "reference" | "path" | "vapour_model") => {
            " (only the duty and curve commands take it)".to_string()
        }
        _ => String::new(),
    };
    CaseError::new(format!("{key}: not used by the {} command{hint}", command.name()))
}

/// A finite number from a JSON number or a numeric string.
pub fn number(field: &str, v: &Value) -> CaseResult<f64> {
    let x = match v {
        Value::Number(n) => n
            .as_f64()
            .ok_or_else(|| CaseError::new(format!("{field}: {n} is not a usable number")))?,
        Value::String(s) => s
            .trim()
            .parse::<f64>()
            .map_err(|_| CaseError::new(format!("{field}: '{s}' is not a number")))?,
        other => bail!("{field}: expected a number, got {} {}", kind_of(other), show(other)),
    };
    if !x.is_finite() {
        bail!("{field}: value {x} is not finite");
    }
    Ok(x)
}

/// A quantity: a number (SI) or a string with a unit.
fn quantity<Q>(
    field: &str,
    v: &Value,
    new: fn(&str, f64) -> Result<Q, UnitError>,
    parse: fn(&str, &str) -> Result<Q, UnitError>,
    example: &str,
) -> CaseResult<Q> {
    match v {
        Value::Number(_) => Ok(new(field, number(field, v)?)?),
        Value::String(s) => Ok(parse(field, s)?),
        other => bail!(
            "{field}: expected a number or a string like '{example}', got {} {}",
            kind_of(other),
            show(other)
        ),
    }
}

/// Below this, a bare temperature (a number without a unit, read as K) is refused as likely
/// meant in °C or °F (common practice: no process stream is this cold).
pub const BARE_TEMPERATURE_MIN_K: f64 = 150.0;
/// Below this, a bare pressure (read as Pa) is refused as likely meant in kPa, bar or atm.
pub const BARE_PRESSURE_MIN_PA: f64 = 1000.0;

/// The number of a value given without a unit (a JSON number, or text that is only a
/// number), else `None`.
fn bare(v: &Value) -> Option<f64> {
    match v {
        Value::Number(n) => n.as_f64(),
        Value::String(s) => s.trim().parse::<f64>().ok(),
        _ => None,
    }
}

/// Refuses a bare number below `min` in a quantity whose SI unit is `unit`: a bare number
/// is SI, and such a small one is almost always a value typed in another unit.
fn check_bare(field: &str, v: &Value, min: f64, unit: &str, example: &str) -> CaseResult<()> {
    // Zero and negative values get the quantity's own, more specific, error.
    if let Some(x) = bare(v)
        && x.is_finite()
        && x > 0.0
        && x < min
    {
        return Err(CaseError::with_kind(
            "bare-number-suspect",
            format!(
                "{field}: {x} has no unit, so it reads as {x} {unit} (a bare number is SI), below the {min} {unit}                  that a bare number may give; write the unit, e.g. '{x} {example}', or '{x} {unit}' if {unit} is meant"
            ),
        ));
    }
    Ok(())
}

/// A temperature: a number in K or a string with a unit. A bare number below
/// [`BARE_TEMPERATURE_MIN_K`] is refused (it is almost always °C or °F typed without a unit).
pub fn temperature(field: &str, v: &Value) -> CaseResult<Temperature> {
    check_bare(field, v, BARE_TEMPERATURE_MIN_K, "K", "degC")?;
    let t = quantity(field, v, Temperature::new, Temperature::parse, "65 degC")?;
    let (lo, hi) = (
        crate::equilibrium::SEARCH_MIN_TEMPERATURE_K,
        crate::equilibrium::SEARCH_MAX_TEMPERATURE_K,
    );
    if !(lo..=hi).contains(&t.kelvin()) {
        bail!(
            "{field}: {} is outside the range the calculations cover ({lo} K to {hi} K)",
            given(v, t.kelvin(), "K")
        );
    }
    Ok(t)
}

/// The lowest pressure the tool accepts, Pa.
pub const MIN_PRESSURE_PA: f64 = 1e-3;
/// The highest pressure the tool accepts, Pa (1 GPa: far beyond any ideal-mixture model).
pub const MAX_PRESSURE_PA: f64 = 1e9;

/// The value as the user gave it, for messages ("1e300 K", "'3 bar'").
fn given(v: &Value, si: f64, unit: &str) -> String {
    match v {
        Value::String(s) => format!("'{}'", s.trim()),
        _ => format!("{} {unit}", short_number(si)),
    }
}

/// A number in a short form for messages.
pub fn short_number(x: f64) -> String {
    if x != 0.0 && (x.abs() >= 1e9 || x.abs() < 1e-4) {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

/// A pressure: a number in Pa or a string with a unit. A bare number below
/// [`BARE_PRESSURE_MIN_PA`] is refused (it is almost always kPa, bar or atm without a unit).
pub fn pressure(field: &str, v: &Value) -> CaseResult<Pressure> {
    check_bare(field, v, BARE_PRESSURE_MIN_PA, "Pa", "bar")?;
    let p = quantity(field, v, Pressure::new, Pressure::parse, "1 atm")?;
    if !(MIN_PRESSURE_PA..=MAX_PRESSURE_PA).contains(&p.pascal()) {
        bail!(
            "{field}: {} is outside the range the tool accepts ({MIN_PRESSURE_PA} Pa to {} Pa)",
            given(v, p.pascal(), "Pa"),
            short_number(MAX_PRESSURE_PA)
        );
    }
    Ok(p)
}

/// A duty: a number in W or a string with a unit.
pub fn power(field: &str, v: &Value) -> CaseResult<Power> {
    quantity(field, v, Power::new, Power::parse, "250 kW")
}

/// A vapour fraction in [0, 1].
pub fn vapour_fraction(field: &str, v: &Value) -> CaseResult<f64> {
    let b = number(field, v)?;
    if !(0.0..=1.0).contains(&b) {
        bail!("{field}: {b} is outside [0, 1]");
    }
    Ok(b)
}

/// A molar or a mass flow; a bare number is mol/s.
fn any_flow(field: &str, v: &Value) -> CaseResult<TotalFlow> {
    match v {
        Value::Number(_) => Ok(TotalFlow::Molar(MolarFlow::new(field, number(field, v)?)?)),
        Value::String(s) => Ok(match molar_or_mass(field, s, MolarFlow::parse, MassFlow::parse)? {
            MolarOrMass::Molar(m) => TotalFlow::Molar(m),
            MolarOrMass::Mass(m) => TotalFlow::Mass(m),
        }),
        other => bail!(
            "{field}: expected a number (mol/s) or a string like '3.6 kmol/h' or '1200 kg/h', got {} {}",
            kind_of(other),
            show(other)
        ),
    }
}

/// A flow read by [`molar_or_mass`].
enum MolarOrMass<M, W> {
    Molar(M),
    Mass(W),
}

/// A flow given as text: tried in molar units, then (for a unit that is not molar) in mass
/// units; a unit that is neither is refused with both lists of accepted units. Any other
/// error (a bad number, a value out of range) is the parser's own, in the user's unit.
fn molar_or_mass<M, W>(
    field: &str,
    text: &str,
    molar: impl FnOnce(&str, &str) -> Result<M, UnitError>,
    mass: impl FnOnce(&str, &str) -> Result<W, UnitError>,
) -> CaseResult<MolarOrMass<M, W>> {
    match molar(field, text) {
        Ok(m) => Ok(MolarOrMass::Molar(m)),
        Err(UnitError::UnknownUnit {
            unit,
            accepted: molar_units,
            ..
        }) => match mass(field, text) {
            Ok(w) => Ok(MolarOrMass::Mass(w)),
            Err(UnitError::UnknownUnit {
                accepted: mass_units, ..
            }) => bail!("{field}: unknown flow unit '{unit}' (molar: {molar_units}; mass: {mass_units})"),
            Err(e) => Err(e.into()),
        },
        Err(e) => Err(e.into()),
    }
}

/// One component flow, zero allowed.
fn component_flow(field: &str, v: &Value) -> CaseResult<ComponentFlow> {
    let check = |x: f64| -> CaseResult<f64> {
        if !x.is_finite() {
            bail!("{field}: value {x} is not finite");
        }
        if x < 0.0 {
            bail!("{field}: flow {x} is negative");
        }
        Ok(x)
    };
    match v {
        Value::Number(_) => Ok(ComponentFlow::Molar(check(number(field, v)?)?)),
        Value::String(s) => {
            // Parse the number and unit without the positivity check, so that 0 is allowed.
            use crate::units::{QuantityKind, parse_si};
            let molar = |f: &str, s: &str| parse_si(QuantityKind::MolarFlow, f, s);
            let mass = |f: &str, s: &str| parse_si(QuantityKind::MassFlow, f, s);
            Ok(match molar_or_mass(field, s, molar, mass)? {
                MolarOrMass::Molar(x) => ComponentFlow::Molar(check(x)?),
                MolarOrMass::Mass(x) => ComponentFlow::Mass(check(x)?),
            })
        }
        other => bail!(
            "{field}: expected a number (mol/s) or a string like '3.6 kmol/h', got {} {}",
            kind_of(other),
            show(other)
        ),
    }
}

/// A non-empty list, each item read by `item`.
fn list<T>(field: &str, v: &Value, item: impl Fn(&str, &Value) -> CaseResult<T>) -> CaseResult<Vec<T>> {
    let Value::Array(items) = v else {
        bail!("{field}: expected a list, got {} {}", kind_of(v), show(v));
    };
    if items.is_empty() {
        bail!("{field}: the list is empty");
    }
    items
        .iter()
        .enumerate()
        .map(|(i, x)| item(&format!("{field}[{i}]"), x))
        .collect()
}

fn name(field: &str, v: &Value) -> CaseResult<String> {
    match v {
        Value::String(s) if !s.trim().is_empty() => Ok(s.trim().to_string()),
        Value::String(_) => bail!("{field}: the name is empty"),
        Value::Number(n) => Ok(n.to_string()),
        other => bail!(
            "{field}: expected a component name or CAS number, got {} {}",
            kind_of(other),
            show(other)
        ),
    }
}

fn object<'a>(field: &str, v: &'a Value) -> CaseResult<&'a Map<String, Value>> {
    v.as_object()
        .ok_or_else(|| CaseError::new(format!("{field}: expected an object, got {} {}", kind_of(v), show(v))))
}

fn state(field: &str, v: &Value) -> CaseResult<StateInput> {
    let map = object(field, v)?;
    check_keys(map, &format!("{field}."), STATE_KEYS)?;
    let mut s = StateInput::default();
    if let Some(v) = map.get("T") {
        s.t = Some(temperature(&format!("{field}.T"), v)?);
    }
    if let Some(v) = map.get("P") {
        s.p = Some(pressure(&format!("{field}.P"), v)?);
    }
    if let Some(v) = map.get("vapour_fraction") {
        s.vapour_fraction = Some(vapour_fraction(&format!("{field}.vapour_fraction"), v)?);
    }
    Ok(s)
}

fn reference(v: &Value) -> CaseResult<ReferenceState> {
    let map = object("reference", v)?;
    check_keys(map, "reference.", REFERENCE_KEYS)?;
    let mut r = ReferenceState::default();
    if let Some(p) = map.get("phase") {
        r.phase = match p.as_str().map(|s| s.trim().to_ascii_lowercase()).as_deref() {
            Some("liquid") => ReferencePhase::Liquid,
            Some("vapour" | "vapor") => ReferencePhase::Vapour,
            _ => bail!("reference.phase: {} is not 'liquid' or 'vapour'", show(p)),
        };
    }
    if let Some(t) = map.get("T") {
        r.temperature_k = temperature("reference.T", t)?.kelvin();
    }
    Ok(r)
}

/// The water-phase models by name: `"one-liquid"` (the default: no water phase) and
/// `"immiscible"`.
const WATER_PHASE_MODELS: [&str; 2] = ["one-liquid", "immiscible"];

fn water_model(field: &str, v: &Value) -> CaseResult<bool> {
    match v.as_str().map(|s| s.trim().to_ascii_lowercase()).as_deref() {
        Some("immiscible") => Ok(true),
        Some("one-liquid") => Ok(false),
        _ => bail!("{field}: {} is not one of {}", show(v), WATER_PHASE_MODELS.join(", ")),
    }
}

fn solubility(field: &str, v: &Value) -> CaseResult<f64> {
    let x = number(field, v)?;
    if !(0.0..1.0).contains(&x) {
        bail!("{field}: {x} is refused: a solubility is a mole fraction in [0, 1)");
    }
    Ok(x)
}

/// `water_phase`: `"immiscible"`, `"one-liquid"`, or an object with `model` and the
/// solubilities.
fn water_phase(v: &Value) -> CaseResult<Option<WaterPhaseInput>> {
    let Some(map) = v.as_object() else {
        return Ok(water_model("water_phase", v)?.then(WaterPhaseInput::default));
    };
    check_keys(map, "water_phase.", WATER_PHASE_KEYS)?;
    let on = match map.get("model") {
        Some(m) => water_model("water_phase.model", m)?,
        None => bail!("water_phase.model: missing (give \"immiscible\")"),
    };
    let mut input = WaterPhaseInput::default();
    if let Some(x) = map.get("water_in_organic") {
        input.water_in_organic = solubility("water_phase.water_in_organic", x)?;
    }
    if let Some(o) = map.get("organic_in_water") {
        for (name, x) in object("water_phase.organic_in_water", o)? {
            let field = format!("water_phase.organic_in_water.{name}");
            input.organic_in_water.push((name.clone(), solubility(&field, x)?));
        }
    }
    if !on && input != WaterPhaseInput::default() {
        bail!("water_phase: solubilities are given but the model is \"one-liquid\"; use \"immiscible\"");
    }
    Ok(on.then_some(input))
}

fn path(v: &Value) -> CaseResult<VaporisationPath> {
    one_of("path", v, &VaporisationPath::ALL, |p| p.name())
}

fn vapour_model(v: &Value) -> CaseResult<VapourModel> {
    one_of("vapour_model", v, &VapourModel::ALL, |m| m.name())
}

/// The option of `all` whose name is the text `v` (trimmed, any case), or an error naming
/// `field`, the value and every name.
fn one_of<T: Copy>(field: &str, v: &Value, all: &[T], name: impl Fn(T) -> &'static str) -> CaseResult<T> {
    let text = v.as_str().map(|s| s.trim().to_ascii_lowercase());
    all.iter()
        .copied()
        .find(|&o| text.as_deref() == Some(name(o)))
        .ok_or_else(|| {
            let names: Vec<&str> = all.iter().map(|&o| name(o)).collect();
            CaseError::new(format!("{field}: {} is not one of {}", show(v), names.join(", ")))
        })
}

/// The number of curve points: a whole number from 2 to [`MAX_POINTS`].
pub fn points(field: &str, v: &Value) -> CaseResult<usize> {
    let x = number(field, v)?;
    if x.fract() != 0.0 || !(2.0..=MAX_POINTS as f64).contains(&x) {
        bail!("{field}: {x} is not a whole number from 2 to {MAX_POINTS}");
    }
    Ok(x as usize)
}

/// Checks a case object for `command`: every key known and used by the command, every
/// value of the right kind and range.
pub fn parse_case(value: &Value, command: Command) -> CaseResult<Case> {
    let map = object("case", value)?;
    check_keys(map, "", TOP_KEYS)?;
    for key in map.keys() {
        if !command.keys().contains(&key.as_str()) {
            return Err(not_used(command, key));
        }
    }
    let mut case = Case::default();
    for (key, v) in map {
        match key.as_str() {
            "note" => {
                case.note = Some(match v {
                    Value::String(s) => s.clone(),
                    other => bail!("note: expected text, got {} {}", kind_of(other), show(other)),
                })
            }
            "components" => case.components = Some(list("components", v, name)?),
            "z" => case.z = Some(list("z", v, number)?),
            "flows" => {
                case.flows = Some(list("flows", v, component_flow)?);
                if case.flow_unit.is_none() {
                    case.flow_unit = v.as_array().and_then(|a| a.first()).and_then(typed_unit);
                }
            }
            "K" => case.k = Some(list("K", v, number)?),
            "T" => case.t = Some(temperature("T", v)?),
            "P" => case.p = Some(pressure("P", v)?),
            "vapour_fraction" => case.vapour_fraction = Some(vapour_fraction("vapour_fraction", v)?),
            "flow" => {
                case.flow = Some(any_flow("flow", v)?);
                case.flow_unit = typed_unit(v);
            }
            "inlet" => case.inlet = Some(state("inlet", v)?),
            "outlet" => case.outlet = Some(state("outlet", v)?),
            "duty" => case.duty = Some(power("duty", v)?),
            "reference" => case.reference = Some(reference(v)?),
            "path" => case.path = Some(path(v)?),
            "vapour_model" => case.vapour_model = Some(vapour_model(v)?),
            "points" => case.points = Some(points("points", v)?),
            "water_phase" => case.water_phase = water_phase(v)?,
            "liquid_model" => {
                case.liquid_model = match v {
                    Value::String(s) => s.parse()?,
                    other => bail!(
                        "liquid_model: expected text (ideal, wilson, nrtl or uniquac), got {} {}",
                        kind_of(other),
                        show(other)
                    ),
                }
            }
            "binary_parameters" => case.binary_parameters = Some(binary_parameters(v)?),
            _ => return Err(unknown_key("", key, TOP_KEYS)),
        }
    }
    if case.binary_parameters.is_some() && case.liquid_model == LiquidModel::Ideal {
        bail!("binary_parameters: given, but liquid_model is ideal (set liquid_model to wilson, nrtl or uniquac)");
    }
    if case.k.is_some() && case.liquid_model != LiquidModel::Ideal {
        bail!("liquid_model: not used with given K-values (the K-values already hold the liquid's non-ideality)");
    }
    if case.water_phase.is_some() && case.liquid_model != LiquidModel::Ideal {
        bail!(
            "liquid_model: the immiscible water phase takes an ideal organic liquid; give one of water_phase and liquid_model"
        );
    }
    // Negative K-values and mole fractions are named here with their field; sums and
    // lengths are checked where the feed is built.
    if let Some(k) = &case.k {
        for (i, &x) in k.iter().enumerate() {
            if x < 0.0 {
                bail!("K[{i}]: K-value {x} is negative");
            }
        }
    }
    if let Some(z) = &case.z {
        for (i, &x) in z.iter().enumerate() {
            if x < 0.0 {
                bail!("z[{i}]: mole fraction {x} is negative");
            }
        }
    }
    Ok(case)
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn units_give_the_same_state() {
        let a = parse_case(
            &json!({"components": ["water"], "z": [1], "T": "65 degC", "P": "1 atm"}),
            Command::Flash,
        )
        .unwrap();
        let b = parse_case(
            &json!({"components": ["water"], "z": [1], "T": 338.15, "P": 101325}),
            Command::Flash,
        )
        .unwrap();
        assert_eq!(a.p, b.p);
        assert!((a.t.unwrap().kelvin() - b.t.unwrap().kelvin()).abs() < 1e-12);
    }

    #[test]
    fn unknown_keys_are_named_with_a_hint() {
        let e = parse_case(&json!({"temperature": 300}), Command::Flash).unwrap_err();
        assert!(
            e.message().contains("'temperature'") && e.message().contains("'T'"),
            "{e}"
        );
        let e = parse_case(&json!({"inlet": {"Temp": 300}}), Command::Duty).unwrap_err();
        assert!(
            e.message().contains("inlet.Temp") && e.message().contains("inlet.T"),
            "{e}"
        );
        let e = parse_case(&json!({"duty": 3}), Command::Flash).unwrap_err();
        assert!(e.message().contains("not used by the flash command"), "{e}");
    }

    #[test]
    fn flows_may_be_molar_or_mass() {
        let c = parse_case(&json!({"flows": [1, "3.6 kmol/h", "36 kg/h", 0]}), Command::Flash).unwrap();
        let f = c.flows.unwrap();
        assert_eq!(f[0], ComponentFlow::Molar(1.0));
        assert!(matches!(f[1], ComponentFlow::Molar(x) if (x - 1.0).abs() < 1e-12));
        assert!(matches!(f[2], ComponentFlow::Mass(x) if (x - 0.01).abs() < 1e-12));
        let e = parse_case(&json!({"flows": ["1 furlong/s"]}), Command::Flash).unwrap_err();
        assert!(
            e.message().contains("flows[0]") && e.message().contains("furlong"),
            "{e}"
        );
    }

    #[test]
    fn vapour_model_is_read_and_checked() {
        let c = parse_case(&json!({"vapour_model": " Second-Virial "}), Command::Duty).unwrap();
        assert_eq!(c.vapour_model, Some(VapourModel::SecondVirial));
        let e = parse_case(&json!({"vapour_model": "virial"}), Command::Curve).unwrap_err();
        assert!(
            e.message()
                .starts_with("vapour_model: 'virial' is not one of ideal-gas, second-virial"),
            "{e}"
        );
        let e = parse_case(&json!({"vapour_model": "ideal-gas"}), Command::Flash).unwrap_err();
        assert!(e.message().contains("only the duty and curve commands"), "{e}");
        assert_eq!(suggest_key("vapor_model", TOP_KEYS).as_deref(), Some("vapour_model"));
    }

    #[test]
    fn suggestions() {
        assert_eq!(
            suggest_key("vapor_fraction", TOP_KEYS).as_deref(),
            Some("vapour_fraction")
        );
        assert_eq!(suggest_key("componets", TOP_KEYS).as_deref(), Some("components"));
        assert_eq!(suggest_key("zzzzzzzz", TOP_KEYS), None);
    }
}
