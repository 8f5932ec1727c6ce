//! `fit`: fits a vapour-pressure or heat-capacity correlation to the user's data points
//! (through `flashduty::fit`), prints the report, and builds a user component file from a
//! component sheet.

use crate::case::{is_toml_name, kind_of, number, pressure, show, suggest_key, temperature, toml_value};
use crate::compute::CAUTION;
use crate::error::{CliError, CliResult, bail};
use crate::text::{Align, Table, fixed, num};
use clap::{Args, ValueEnum};
use flashduty::fit::{
    AntoineFit, CpFit, DataKind, DataPoint, ExtendedFit, FitReport, UserComponentBuilder, fit_antoine,
    fit_cp_polynomial, fit_extended, read_points_csv,
};
use flashduty::properties::AntoineForm;
use flashduty::units::MolarEnthalpy;
use serde_json::{Map, Value, json};
use std::fmt::Write;
use std::path::{Path, PathBuf};

/// What the data points measure.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Property {
    /// Vapour pressure against temperature.
    VapourPressure,
    /// Molar heat capacity (liquid or ideal gas) against temperature.
    HeatCapacity,
}

/// The vapour-pressure equation to fit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Form {
    /// ln(P/Pa) = A − B/(T + C).
    Antoine,
    /// ln(P/Pa) = A + B/T + C ln T + D T^E, with E given by --exponent.
    Extended,
}

/// Arguments of `fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// The data points, CSV: a temperature column and a value column (see docs/CLI.md).
    #[arg(
        value_name = "DATA.csv",
        required_unless_present = "component",
        conflicts_with = "component"
    )]
    pub data: Option<PathBuf>,

    /// What the data measure.
    #[arg(long, value_enum, requires = "data")]
    pub property: Option<Property>,

    /// The vapour-pressure equation.
    #[arg(long, value_enum, default_value = "antoine")]
    pub form: Form,

    /// The exponent E of the extended vapour-pressure equation (e.g. 2 or 6).
    #[arg(long, value_name = "E", allow_negative_numbers = true)]
    pub exponent: Option<f64>,

    /// The unit convention to print (and write) Antoine constants in: log10-bar-K,
    /// log10-mmHg-degC, log10-kPa-degC or ln-Pa-K.
    #[arg(long, value_name = "FORM", default_value = "log10-bar-K")]
    pub units: String,

    /// The degree of the heat-capacity polynomial, 0 to 4.
    #[arg(long, value_name = "N", default_value_t = 2)]
    pub degree: usize,

    /// A component sheet (JSON, or TOML by extension) naming the data files to fit and the
    /// other constants of a user component.
    #[arg(long, value_name = "SHEET")]
    pub component: Option<PathBuf>,

    /// Write the user component file (for --components FILE) here.
    #[arg(long, value_name = "FILE", requires = "component")]
    pub write: Option<PathBuf>,

    /// Make failed consistency checks of the component an error.
    #[arg(long, requires = "component")]
    pub strict: bool,
}

fn antoine_form(text: &str) -> CliResult<AntoineForm> {
    serde_json::from_value(json!(text.trim())).map_err(|_| {
        CliError::new(format!(
            "--units: '{text}' is not one of log10-bar-K, log10-mmHg-degC, log10-kPa-degC, ln-Pa-K"
        ))
    })
}

fn form_name(f: AntoineForm) -> String {
    serde_json::to_value(f)
        .ok()
        .and_then(|v| v.as_str().map(str::to_string))
        .unwrap_or_default()
}

/// One fitted correlation.
enum Fitted {
    Antoine(AntoineFit),
    Extended(ExtendedFit),
    Cp(CpFit),
}

impl Fitted {
    fn report(&self) -> &FitReport {
        match self {
            Fitted::Antoine(f) => &f.report,
            Fitted::Extended(f) => &f.report,
            Fitted::Cp(f) => &f.report,
        }
    }

    fn constants(&self, units: AntoineForm) -> (String, Vec<(String, f64)>) {
        match self {
            Fitted::Antoine(f) => {
                let (a, b, c) = f.constants(units);
                let eq = match units {
                    AntoineForm::Log10BarKelvin => "log10(P/bar) = A − B/(T/K + C)",
                    AntoineForm::Log10MmHgCelsius => "log10(P/mmHg) = A − B/(t/°C + C)",
                    AntoineForm::Log10KiloPascalCelsius => "log10(P/kPa) = A − B/(t/°C + C)",
                    AntoineForm::LnPascalKelvin => "ln(P/Pa) = A − B/(T/K + C)",
                };
                (
                    format!("Antoine, {eq} ({} form)", form_name(units)),
                    vec![("A".into(), a), ("B".into(), b), ("C".into(), c)],
                )
            }
            Fitted::Extended(f) => (
                "ln(P/Pa) = A + B/T + C ln T + D T^E".into(),
                ["A", "B", "C", "D", "E"]
                    .iter()
                    .zip(f.constants)
                    .map(|(n, v)| (n.to_string(), v))
                    .collect(),
            ),
            Fitted::Cp(f) => (
                "Cp = a + bT + cT² + dT³ + eT⁴ [J/(mol·K)], T in K".into(),
                ["a", "b", "c", "d", "e"]
                    .iter()
                    .zip(&f.coefficients)
                    .map(|(n, v)| (n.to_string(), *v))
                    .collect(),
            ),
        }
    }

    fn json(&self, units: AntoineForm) -> Value {
        let (equation, constants) = self.constants(units);
        let c: Map<String, Value> = constants.into_iter().map(|(k, v)| (k, json!(v))).collect();
        json!({
            "equation": equation,
            "constants": c,
            "report": serde_json::to_value(self.report()).unwrap_or(Value::Null),
            "warnings": self.report().warnings.iter().map(|w| {
                let mut v = serde_json::to_value(w).unwrap_or(Value::Null);
                if let Value::Object(m) = &mut v { m.insert("message".into(), json!(w.to_string())); }
                v
            }).collect::<Vec<_>>(),
        })
    }

    fn text(&self, out: &mut String, title: &str, kind: DataKind, units: AntoineForm) {
        let r = self.report();
        let (equation, constants) = self.constants(units);
        let _ = writeln!(out, "{title}");
        let _ = writeln!(out, "  {equation}");
        for (n, v) in constants {
            let _ = writeln!(out, "    {n} = {v:.10e}");
        }
        let _ = writeln!(
            out,
            "  {} points, {}–{} K (the correlation's validity range); max |deviation| {} % (data row {}), RMS {} %",
            r.residuals.len(),
            num(r.validity.min_k, 6),
            num(r.validity.max_k, 6),
            num(100.0 * r.max_abs_relative_deviation, 3),
            r.max_deviation_row,
            num(100.0 * r.rms_relative_deviation, 3)
        );
        let (unit, scale) = match kind {
            DataKind::VapourPressure => ("kPa", 1e-3),
            DataKind::HeatCapacity => ("J/(mol·K)", 1.0),
        };
        let measured = format!("measured [{unit}]");
        let fitted = format!("fitted [{unit}]");
        let mut t = Table::new(&[
            ("data row", Align::Right),
            ("T [K]", Align::Right),
            (measured.as_str(), Align::Right),
            (fitted.as_str(), Align::Right),
            ("deviation [%]", Align::Right),
        ]);
        for p in &r.residuals {
            t.row(vec![
                p.row.to_string(),
                fixed(p.t_k, 2),
                num(p.measured * scale, 6),
                num(p.fitted * scale, 6),
                fixed(100.0 * p.relative_deviation, 4),
            ]);
        }
        out.push_str(&t.render(2));
        if r.warnings.is_empty() {
            let _ = writeln!(out, "  Warnings: none");
        } else {
            let _ = writeln!(out, "  Warnings:");
            for w in &r.warnings {
                let _ = writeln!(out, "    - {w}");
            }
        }
    }
}

fn read_points(path: &Path, kind: DataKind) -> CliResult<Vec<DataPoint>> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| CliError::new(format!("data file '{}': cannot read it ({e})", path.display())))?;
    read_points_csv(&text, kind).map_err(|e| CliError::new(format!("data file '{}': {e}", path.display())))
}

fn fit_vapour_pressure(path: &Path, form: Form, exponent: Option<f64>) -> CliResult<Fitted> {
    let pts = read_points(path, DataKind::VapourPressure)?;
    let ctx = |e: flashduty::fit::FitError| CliError::new(format!("data file '{}': {e}", path.display()));
    Ok(match form {
        Form::Antoine => {
            if exponent.is_some() {
                bail!("exponent: only the extended form takes an exponent");
            }
            Fitted::Antoine(fit_antoine(&pts).map_err(ctx)?)
        }
        Form::Extended => {
            let Some(e) = exponent else {
                bail!("exponent: required with the extended form (e.g. 2 or 6)");
            };
            Fitted::Extended(fit_extended(&pts, e).map_err(ctx)?)
        }
    })
}

fn fit_cp(path: &Path, degree: usize) -> CliResult<Fitted> {
    let pts = read_points(path, DataKind::HeatCapacity)?;
    Ok(Fitted::Cp(fit_cp_polynomial(&pts, degree).map_err(|e| {
        CliError::new(format!("data file '{}': {e}", path.display()))
    })?))
}

/// Runs `fit`; returns the text (or JSON) to print.
pub fn run(args: &FitArgs, json_out: bool) -> CliResult<String> {
    let units = antoine_form(&args.units)?;
    if let Some(sheet) = &args.component {
        return component(sheet, args, units, json_out);
    }
    let Some(data) = &args.data else {
        bail!("DATA.csv: give a data file, or --component SHEET");
    };
    let Some(property) = args.property else {
        bail!("--property: required with a data file (vapour-pressure or heat-capacity)");
    };
    let (fitted, kind, title) = match property {
        Property::VapourPressure => (
            fit_vapour_pressure(data, args.form, args.exponent)?,
            DataKind::VapourPressure,
            "Vapour-pressure fit",
        ),
        Property::HeatCapacity => {
            if args.exponent.is_some() {
                bail!("--exponent: only a vapour-pressure fit takes an exponent");
            }
            (fit_cp(data, args.degree)?, DataKind::HeatCapacity, "Heat-capacity fit")
        }
    };
    if json_out {
        let mut v = fitted.json(units);
        if let Value::Object(m) = &mut v {
            m.insert("command".into(), json!("fit"));
            m.insert("data".into(), json!(data.display().to_string()));
            m.insert("caution".into(), json!(CAUTION));
        }
        return serde_json::to_string_pretty(&v)
            .map(|s| s + "\n")
            .map_err(|e| CliError::new(format!("JSON output: {e}")));
    }
    let mut out = String::new();
    fitted.text(&mut out, &format!("{title}: {}", data.display()), kind, units);
    let _ = writeln!(out);
    let _ = writeln!(
        out,
        "A fitted correlation is only as good as its data and holds only over their temperature range."
    );
    let _ = writeln!(out, "{CAUTION}");
    Ok(out)
}

// ---------------------------------------------------------------------------------------
// Component sheets

const SHEET_KEYS: &[&str] = &[
    "note",
    "name",
    "cas",
    "formula",
    "citation",
    "synonyms",
    "source_key",
    "molar_mass_g_per_mol",
    "critical_temperature",
    "critical_pressure",
    "acentric_factor",
    "normal_boiling_point",
    "vapour_pressure",
    "liquid_heat_capacity",
    "vapour_heat_capacity",
    "latent_heat",
];
const VP_KEYS: &[&str] = &["data", "form", "exponent"];
const CP_KEYS: &[&str] = &["data", "degree", "constant", "T_min", "T_max"];
const LATENT_KEYS: &[&str] = &["T", "value", "exponent"];

fn keys(map: &Map<String, Value>, prefix: &str, known: &[&str]) -> CliResult<()> {
    for k in map.keys() {
        if !known.contains(&k.as_str()) {
            let hint = suggest_key(k, known)
                .map(|s| format!(" (did you mean '{prefix}{s}'?)"))
                .unwrap_or_default();
            bail!("unknown key '{prefix}{k}'{hint}; known keys: {}", known.join(", "));
        }
    }
    Ok(())
}

fn get<'a>(map: &'a Map<String, Value>, field: &str, key: &str) -> CliResult<&'a Value> {
    map.get(key)
        .ok_or_else(|| CliError::new(format!("{field}{key}: missing")))
}

fn text_of(field: &str, v: &Value) -> CliResult<String> {
    match v {
        Value::String(s) if !s.trim().is_empty() => Ok(s.trim().to_string()),
        other => bail!("{field}: expected text, got {} {}", kind_of(other), show(other)),
    }
}

fn sub<'a>(field: &str, v: &'a Value, known: &[&str]) -> CliResult<&'a Map<String, Value>> {
    let m = v
        .as_object()
        .ok_or_else(|| CliError::new(format!("{field}: expected an object, got {} {}", kind_of(v), show(v))))?;
    keys(m, &format!("{field}."), known)?;
    Ok(m)
}

fn data_path(base: &Path, field: &str, v: &Value) -> CliResult<PathBuf> {
    let p = PathBuf::from(text_of(field, v)?);
    Ok(if p.is_absolute() { p } else { base.join(p) })
}

/// A heat capacity given in the sheet: fitted to data, or constant.
fn heat_capacity(base: &Path, field: &str, v: &Value) -> CliResult<Result<Fitted, (f64, f64, f64)>> {
    let m = sub(field, v, CP_KEYS)?;
    match (m.get("data"), m.get("constant")) {
        (Some(d), None) => {
            for k in ["T_min", "T_max"] {
                if m.contains_key(k) {
                    bail!("{field}.{k}: not used with data (the data's range is the validity range)");
                }
            }
            let degree = match m.get("degree") {
                Some(d) => {
                    let x = number(&format!("{field}.degree"), d)?;
                    if x.fract() != 0.0 || !(0.0..=4.0).contains(&x) {
                        bail!("{field}.degree: {x} is not a whole number from 0 to 4");
                    }
                    x as usize
                }
                None => 2,
            };
            Ok(Ok(fit_cp(&data_path(base, &format!("{field}.data"), d)?, degree)?))
        }
        (None, Some(c)) => {
            if m.contains_key("degree") {
                bail!("{field}.degree: not used with a constant");
            }
            let value = number(&format!("{field}.constant"), c)?;
            let t_min = temperature(&format!("{field}.T_min"), get(m, &format!("{field}."), "T_min")?)?.kelvin();
            let t_max = temperature(&format!("{field}.T_max"), get(m, &format!("{field}."), "T_max")?)?.kelvin();
            Ok(Err((value, t_min, t_max)))
        }
        (Some(_), Some(_)) => bail!("{field}: give data or constant, not both"),
        (None, None) => bail!("{field}: give data (a CSV file to fit) or constant (J/(mol·K), with T_min and T_max)"),
    }
}

fn component(sheet: &Path, args: &FitArgs, units: AntoineForm, json_out: bool) -> CliResult<String> {
    let name = sheet.display().to_string();
    let text = std::fs::read_to_string(sheet)
        .map_err(|e| CliError::new(format!("component sheet '{name}': cannot read it ({e})")))?;
    let value: Value = if is_toml_name(&name) {
        toml_value(&name, &text)?
    } else {
        serde_json::from_str(&text).map_err(|e| CliError::new(format!("{name}: malformed JSON: {e}")))?
    };
    let base = sheet.parent().unwrap_or(Path::new("."));
    build(&value, base, args, units, json_out).map_err(|e| e.context(&name))
}

fn build(value: &Value, base: &Path, args: &FitArgs, units: AntoineForm, json_out: bool) -> CliResult<String> {
    let m = value
        .as_object()
        .ok_or_else(|| CliError::new(format!("expected an object of keys and values, got {}", kind_of(value))))?;
    keys(m, "", SHEET_KEYS)?;
    let s = |k: &str| -> CliResult<String> { text_of(k, get(m, "", k)?) };
    let n = |k: &str| -> CliResult<f64> { Ok(number(k, get(m, "", k)?)?) };
    let mut b = UserComponentBuilder::new(s("name")?, s("cas")?, s("formula")?, s("citation")?)
        .molar_mass_g_per_mol(n("molar_mass_g_per_mol")?)
        .critical_temperature_k(temperature("critical_temperature", get(m, "", "critical_temperature")?)?.kelvin())
        .critical_pressure_pa(pressure("critical_pressure", get(m, "", "critical_pressure")?)?.pascal())
        .acentric_factor(n("acentric_factor")?)
        .normal_boiling_point_k(temperature("normal_boiling_point", get(m, "", "normal_boiling_point")?)?.kelvin())
        .antoine_units(units)
        .strict(args.strict);
    if let Some(v) = m.get("source_key") {
        b = b.source_key(text_of("source_key", v)?);
    }
    if let Some(v) = m.get("synonyms") {
        let Value::Array(items) = v else {
            bail!("synonyms: expected a list of names");
        };
        let names = items
            .iter()
            .enumerate()
            .map(|(i, x)| text_of(&format!("synonyms[{i}]"), x))
            .collect::<CliResult<Vec<_>>>()?;
        b = b.synonyms(names);
    }

    let mut fits: Vec<(&str, DataKind, Fitted)> = Vec::new();
    let vp = sub("vapour_pressure", get(m, "", "vapour_pressure")?, VP_KEYS)?;
    let form = match vp.get("form").map(|f| f.as_str().map(str::trim)) {
        None | Some(Some("antoine")) => Form::Antoine,
        Some(Some("extended")) => Form::Extended,
        Some(_) => bail!(
            "vapour_pressure.form: {} is not 'antoine' or 'extended'",
            show(&vp["form"])
        ),
    };
    let exponent = vp
        .get("exponent")
        .map(|e| number("vapour_pressure.exponent", e))
        .transpose()?;
    let path = data_path(base, "vapour_pressure.data", get(vp, "vapour_pressure.", "data")?)?;
    let fitted = fit_vapour_pressure(&path, form, exponent)?;
    b = match &fitted {
        Fitted::Antoine(f) => b.vapour_pressure_antoine(f),
        Fitted::Extended(f) => b.vapour_pressure_extended(f),
        Fitted::Cp(_) => b,
    };
    fits.push(("vapour pressure", DataKind::VapourPressure, fitted));

    for (field, label) in [
        ("liquid_heat_capacity", "liquid heat capacity"),
        ("vapour_heat_capacity", "ideal-gas heat capacity"),
    ] {
        match heat_capacity(base, field, get(m, "", field)?)? {
            Ok(f) => {
                if let Fitted::Cp(cp) = &f {
                    b = if field == "liquid_heat_capacity" {
                        b.liquid_cp_fit(cp)
                    } else {
                        b.vapour_cp_fit(cp)
                    };
                }
                fits.push((label, DataKind::HeatCapacity, f));
            }
            Err((v, lo, hi)) => {
                b = if field == "liquid_heat_capacity" {
                    b.liquid_cp_constant(v, lo, hi)
                } else {
                    b.vapour_cp_constant(v, lo, hi)
                };
            }
        }
    }
    let lh = sub("latent_heat", get(m, "", "latent_heat")?, LATENT_KEYS)?;
    let t = temperature("latent_heat.T", get(lh, "latent_heat.", "T")?)?.kelvin();
    let dh = match get(lh, "latent_heat.", "value")? {
        Value::String(s) => MolarEnthalpy::parse("latent_heat.value", s)?,
        other => MolarEnthalpy::new("latent_heat.value", number("latent_heat.value", other)?)?,
    };
    let exponent = lh
        .get("exponent")
        .map(|e| number("latent_heat.exponent", e))
        .transpose()?;
    b = b.latent_heat_watson(t, dh.joule_per_mol(), exponent);

    let user = b.build()?;
    if let Some(w) = &args.write {
        std::fs::write(w, user.to_file_string())
            .map_err(|e| CliError::new(format!("--write '{}': cannot write it ({e})", w.display())))?;
    }
    let checks = user.checks();
    if json_out {
        let v = json!({
            "command": "fit",
            "fits": fits.iter().map(|(label, _, f)| { let mut v = f.json(units); if let Value::Object(m) = &mut v { m.insert("property".into(), json!(label)); } v }).collect::<Vec<_>>(),
            "checks": serde_json::to_value(checks).unwrap_or(Value::Null),
            "warnings": user.warnings().iter().map(|w| json!({"message": w.to_string(), "detail": serde_json::to_value(w).unwrap_or(Value::Null)})).collect::<Vec<_>>(),
            "component_file": user.to_file_json(),
            "written_to": args.write.as_ref().map(|p| p.display().to_string()),
            "caution": CAUTION,
        });
        return serde_json::to_string_pretty(&v)
            .map(|s| s + "\n")
            .map_err(|e| CliError::new(format!("JSON output: {e}")));
    }
    let c = user.component();
    let mut out = String::new();
    let _ = writeln!(
        out,
        "User component '{}' ({}, CAS {})\n",
        c.name(),
        c.formula(),
        c.cas()
    );
    for (label, kind, f) in &fits {
        f.text(&mut out, &format!("Fit of the {label}"), *kind, units);
        let _ = writeln!(out);
    }
    let _ = writeln!(
        out,
        "Consistency checks at the normal boiling point {} K:",
        num(checks.normal_boiling_point_k, 6)
    );
    let _ = writeln!(
        out,
        "  vapour pressure there {} kPa, {} % from 101.325 kPa (tolerance {} %): {}",
        num(checks.psat_at_boiling_point_pa / 1e3, 6),
        fixed(100.0 * checks.psat_relative_deviation, 2),
        num(100.0 * checks.psat_tolerance, 3),
        if checks.boiling_point_passed() { "pass" } else { "FAIL" }
    );
    let _ = writeln!(
        out,
        "  Clausius–Clapeyron latent heat {} J/mol vs the latent-heat correlation's {} J/mol, {} % (tolerance {} %): {}",
        fixed(checks.clausius_clapeyron_latent_heat_j_per_mol, 0),
        fixed(checks.latent_heat_at_boiling_point_j_per_mol, 0),
        fixed(100.0 * checks.latent_heat_relative_deviation, 2),
        num(100.0 * checks.latent_heat_tolerance, 3),
        if checks.latent_heat_passed() { "pass" } else { "FAIL" }
    );
    if user.warnings().is_empty() {
        let _ = writeln!(out, "Warnings: none");
    } else {
        let _ = writeln!(out, "Warnings:");
        for w in user.warnings() {
            let _ = writeln!(out, "  - {w}");
        }
    }
    match &args.write {
        Some(p) => {
            let _ = writeln!(
                out,
                "\nComponent file written to {} (use it with --components {}).",
                p.display(),
                p.display()
            );
        }
        None => {
            let _ = writeln!(out, "\nGive --write FILE to save the component file.");
        }
    }
    let _ = writeln!(out, "\n{CAUTION}");
    Ok(out)
}
