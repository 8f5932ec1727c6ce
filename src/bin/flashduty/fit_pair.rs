//! `fit-pair`: fits a Wilson, NRTL or UNIQUAC pair to the user's VLE data (through
//! `flashduty::fit::fit_pair`), prints the residuals and the consistency test, and writes a
//! parameter file a case's `binary_parameters` can name.

use crate::compute::CAUTION;
use crate::error::{CliError, CliResult, bail};
use crate::text::{Align, Table, fixed, num};
use clap::Args;
use flashduty::activity::LiquidModel;
use flashduty::fit::{PairFit, fit_pair, read_vle_csv};
use flashduty::library::Library;
use flashduty::units::{GAS_CONSTANT, Pressure, Temperature};
use serde_json::{Value, json};
use std::fmt::Write;
use std::path::PathBuf;

/// Arguments of `fit-pair`.
#[derive(Debug, Args)]
pub struct FitPairArgs {
    /// The data, CSV: x1 and any of y1, T [unit], P [unit] (see docs/CLI.md).
    #[arg(value_name = "DATA.csv")]
    pub data: PathBuf,

    /// The two components, component 1 first: "ethanol,water".
    #[arg(long, value_name = "A,B", value_delimiter = ',', required = true)]
    pub pair: Vec<String>,

    /// The model: wilson, nrtl or uniquac.
    #[arg(long, value_name = "MODEL")]
    pub model: String,

    /// NRTL's non-randomness α (fixed, not fitted).
    #[arg(long, default_value_t = 0.3)]
    pub alpha: f64,

    /// Wilson's liquid molar volumes V1,V2 in cm3/mol (at 25 °C, common practice).
    #[arg(long, value_name = "V1,V2", value_delimiter = ',')]
    pub volumes: Option<Vec<f64>>,

    /// The pressure of isobaric data without a P column ("1 atm").
    #[arg(long, value_name = "P")]
    pub pressure: Option<String>,

    /// The temperature of isothermal data without a T column ("60 degC").
    #[arg(long, value_name = "T")]
    pub temperature: Option<String>,

    /// Write the parameter file (JSON, or TOML when the name ends in .toml) here.
    #[arg(long, value_name = "FILE")]
    pub write: Option<PathBuf>,
}

fn parameter_text(fit: &PairFit) -> Vec<(String, String)> {
    let (e12, e21) = fit.energies_k;
    let names = match fit.kind {
        LiquidModel::Wilson => ("a12", "a21"),
        LiquidModel::Nrtl => ("b12", "b21"),
        _ => ("u12", "u21"),
    };
    let energy = |k: f64| {
        format!(
            "{} J/mol ({} cal/mol, {} K as energy/R)",
            num(k * GAS_CONSTANT, 6),
            num(k * GAS_CONSTANT / 4.184, 6),
            num(k, 6)
        )
    };
    let mut out = vec![(names.0.to_string(), energy(e12)), (names.1.to_string(), energy(e21))];
    if let Some(a) = fit.alpha {
        out.push(("alpha".into(), num(a, 4)));
    }
    if let Some((v1, v2)) = fit.volumes {
        out.push(("V1, V2".into(), format!("{} , {} cm3/mol", num(v1, 6), num(v2, 6))));
    }
    out
}

/// Runs `fit-pair`; returns the text (or JSON) to print.
pub fn run(lib: &Library, args: &FitPairArgs, json_out: bool) -> CliResult<String> {
    let kind: LiquidModel = args.model.parse().map_err(|e: flashduty::activity::ActivityError| {
        CliError::with_kind(e.kind(), e.to_string().replacen("liquid_model", "--model", 1))
    })?;
    if kind == LiquidModel::Ideal {
        bail!("--model: give wilson, nrtl or uniquac (an ideal liquid has nothing to fit)");
    }
    if args.pair.len() != 2 {
        bail!("--pair: give two components, component 1 first (e.g. --pair ethanol,water)");
    }
    let components = lib
        .get_all(&args.pair)
        .map_err(|e| CliError::with_kind(e.kind(), format!("--pair: {e}")))?;
    let pressure = match &args.pressure {
        Some(p) => Some(Pressure::parse("--pressure", p)?.pascal()),
        None => None,
    };
    let temperature = match &args.temperature {
        Some(t) => Some(Temperature::parse("--temperature", t)?.kelvin()),
        None => None,
    };
    let text = std::fs::read_to_string(&args.data)
        .map_err(|e| CliError::new(format!("data file '{}': cannot read it ({e})", args.data.display())))?;
    let name = args.data.display().to_string();
    let points = read_vle_csv(&text, pressure, temperature)
        .map_err(|e| CliError::with_kind(e.kind(), format!("{name}: {e}")))?;
    let volumes = match (&args.volumes, kind) {
        (Some(v), _) if v.len() == 2 && v.iter().all(|x| x.is_finite() && *x > 0.0) => Some((v[0], v[1])),
        (Some(_), _) => bail!("--volumes: give two positive molar volumes, V1,V2 in cm3/mol"),
        (None, LiquidModel::Wilson) => {
            bail!("--volumes: Wilson needs the liquid molar volumes V1,V2 (cm3/mol at 25 °C)")
        }
        (None, _) => None,
    };
    if !(args.alpha > 0.0 && args.alpha <= 1.0) {
        bail!("--alpha: {} is outside (0, 1]", args.alpha);
    }
    let fit = fit_pair(&components, kind, &points, args.alpha, volumes, None)
        .map_err(|e| CliError::with_kind(e.kind(), format!("{name}: {e}")))?;
    let file = fit.parameter_file(&format!("fitted to {name}"));
    if let Some(path) = &args.write {
        let text = if path.extension().is_some_and(|e| e.eq_ignore_ascii_case("toml")) {
            toml::to_string(&file).map_err(|e| CliError::new(format!("--write: {e}")))?
        } else {
            serde_json::to_string_pretty(&file).map_err(|e| CliError::new(format!("--write: {e}")))? + "\n"
        };
        std::fs::write(path, text)
            .map_err(|e| CliError::new(format!("--write '{}': cannot write it ({e})", path.display())))?;
    }
    if json_out {
        let residuals: Vec<Value> = fit
            .residuals
            .iter()
            .map(|r| {
                json!({
                    "x1": r.point.x1, "y1": r.point.y1, "T_K": r.point.temperature_k, "P_Pa": r.point.pressure_pa,
                    "y1_fit": r.y1, "P_fit_Pa": r.pressure_pa, "T_fit_K": r.temperature_k,
                })
            })
            .collect();
        let v = json!({
            "command": "fit-pair",
            "data": name,
            "model": kind.name(),
            "components": fit.components,
            "parameter_file": file,
            "residuals": residuals,
            "rms_relative_pressure": fit.rms_relative_pressure,
            "rms_temperature_K": fit.rms_temperature_k,
            "mean_abs_dy": fit.mean_abs_dy,
            "consistency": fit.consistency.map(|c| json!({
                "test": "point test (Van Ness, Byer and Gibbs 1973)",
                "mean_abs_dy": c.mean_abs_dy, "threshold": c.threshold, "consistent": c.consistent,
            })),
            "evaluations": fit.evaluations,
            "caution": CAUTION,
        });
        return Ok(serde_json::to_string_pretty(&v).unwrap_or_default() + "\n");
    }
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{} pair fitted to {name}: {} (1) – {} (2), {} points",
        kind.name().to_uppercase(),
        fit.components[0],
        fit.components[1],
        fit.residuals.len()
    );
    for (k, v) in parameter_text(&fit) {
        let _ = writeln!(out, "  {k:<7} {v}");
    }
    let _ = writeln!(
        out,
        "  data from {} to {}",
        crate::text::temp(fit.range_k.0),
        crate::text::temp(fit.range_k.1)
    );
    let _ = writeln!(out);
    let mut t = Table::new(&[
        ("x1", Align::Right),
        ("y1", Align::Right),
        ("y1 fit", Align::Right),
        ("T [K]", Align::Right),
        ("T fit", Align::Right),
        ("P [kPa]", Align::Right),
        ("P fit", Align::Right),
    ]);
    let opt = |v: Option<f64>, scale: f64, places: usize| v.map_or("-".to_string(), |v| fixed(v * scale, places));
    for r in &fit.residuals {
        t.row(vec![
            fixed(r.point.x1, 4),
            opt(r.point.y1, 1.0, 4),
            fixed(r.y1, 4),
            opt(r.point.temperature_k, 1.0, 2),
            opt(r.temperature_k, 1.0, 2),
            opt(r.point.pressure_pa, 1e-3, 3),
            opt(r.pressure_pa, 1e-3, 3),
        ]);
    }
    out.push_str(&t.render(2));
    let _ = writeln!(out);
    if let Some(v) = fit.rms_relative_pressure {
        let _ = writeln!(out, "  rms pressure residual {} %", num(100.0 * v, 3));
    }
    if let Some(v) = fit.rms_temperature_k {
        let _ = writeln!(out, "  rms temperature residual {} K", num(v, 3));
    }
    if let Some(v) = fit.mean_abs_dy {
        let _ = writeln!(out, "  mean |y1 − y1 fit| {}", num(v, 3));
    }
    match fit.consistency {
        Some(c) => {
            let _ = writeln!(
                out,
                "  consistency (point test, Van Ness–Byer–Gibbs 1973): fitted without y, mean |Δy| = {} against {}: {}",
                num(c.mean_abs_dy, 3),
                c.threshold,
                if c.consistent {
                    "consistent"
                } else {
                    "NOT consistent (check the data)"
                }
            );
        }
        None => {
            let _ = writeln!(
                out,
                "  consistency: not tested (the point test needs T, P and y at every point)"
            );
        }
    }
    if let Some(p) = &args.write {
        let _ = writeln!(
            out,
            "\nParameter file written to {} (name it in a case's binary_parameters).",
            p.display()
        );
    }
    let _ = writeln!(out, "\n{CAUTION}");
    Ok(out)
}
