//! `--output-units si|field|FILE`: the units of the human report and the unit-bearing keys added
//! to the JSON. The JSON keeps its SI keys (`T_K`, `duty_W`, ...) and, with a choice other
//! than `si`, adds beside each one the same value in the chosen unit under a key that names
//! it (`T_degF`, `duty_Btu_per_h`). The choice is made once, when the tool starts.

use crate::error::{CliError, CliResult, bail};
use flashduty::units::{QuantityKind, from_si};
use serde_json::{Map, Value};
use std::sync::OnceLock;

/// The unit of each kind of quantity the reports show.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Units {
    /// Temperature.
    pub temperature: String,
    /// Absolute pressure.
    pub pressure: String,
    /// Molar flow.
    pub molar_flow: String,
    /// Mass flow.
    pub mass_flow: String,
    /// Duty (power).
    pub power: String,
    /// Molar enthalpy.
    pub molar_enthalpy: String,
}

/// The keys of a custom units file.
const KEYS: &[&str] = &[
    "temperature",
    "pressure",
    "molar_flow",
    "mass_flow",
    "power",
    "molar_enthalpy",
];

impl Units {
    /// US customary ("field") units: °F, psia, lbmol/h, lb/h, Btu/h, Btu/lbmol.
    pub fn field() -> Self {
        Self {
            temperature: "degF".into(),
            pressure: "psia".into(),
            molar_flow: "lbmol/h".into(),
            mass_flow: "lb/h".into(),
            power: "Btu/h".into(),
            molar_enthalpy: "Btu/lbmol".into(),
        }
    }

    /// The units of a JSON or TOML file with the keys temperature, pressure, molar_flow,
    /// mass_flow, power and molar_enthalpy (those not given stay SI).
    fn from_text(name: &str, text: &str) -> CliResult<Self> {
        let value: Value = if name.to_ascii_lowercase().ends_with(".toml") {
            let t: toml::Value = toml::from_str(text)
                .map_err(|e| CliError::new(format!("--output-units {name}: malformed TOML: {e}")))?;
            serde_json::to_value(t).map_err(|e| CliError::new(format!("--output-units {name}: {e}")))?
        } else {
            serde_json::from_str(text)
                .map_err(|e| CliError::new(format!("--output-units {name}: malformed JSON: {e}")))?
        };
        let Some(map) = value.as_object() else {
            bail!("--output-units {name}: expected an object of quantity: unit");
        };
        let mut u = Self {
            temperature: "K".into(),
            pressure: "Pa".into(),
            molar_flow: "mol/s".into(),
            mass_flow: "kg/s".into(),
            power: "W".into(),
            molar_enthalpy: "J/mol".into(),
        };
        for (key, v) in map {
            let Some(text) = v.as_str() else {
                bail!("--output-units {name}: {key}: expected a unit as text, e.g. \"degC\"");
            };
            let (slot, kind) = match key.as_str() {
                "temperature" => (&mut u.temperature, QuantityKind::Temperature),
                "pressure" => (&mut u.pressure, QuantityKind::Pressure),
                "molar_flow" => (&mut u.molar_flow, QuantityKind::MolarFlow),
                "mass_flow" => (&mut u.mass_flow, QuantityKind::MassFlow),
                "power" => (&mut u.power, QuantityKind::Power),
                "molar_enthalpy" => (&mut u.molar_enthalpy, QuantityKind::MolarEnthalpy),
                other => bail!(
                    "--output-units {name}: unknown quantity '{}' (known: {})",
                    flashduty::units::clip(other),
                    KEYS.join(", ")
                ),
            };
            from_si(kind, &format!("--output-units {name}: {key}"), 1.0, text)?;
            *slot = text.trim().to_string();
        }
        Ok(u)
    }

    /// The choice of `--output-units`: `si` (none: the report as it always was), `field`, or a file.
    pub fn choose(arg: &str) -> CliResult<Option<Self>> {
        match arg.trim().to_ascii_lowercase().as_str() {
            "si" => Ok(None),
            "field" => Ok(Some(Self::field())),
            _ => {
                let text = std::fs::read_to_string(arg).map_err(|e| {
                    CliError::new(format!(
                        "--output-units: '{arg}' is not si, field or a readable units file ({e})"
                    ))
                })?;
                Ok(Some(Self::from_text(arg, &text)?))
            }
        }
    }
}

static CHOSEN: OnceLock<Option<Units>> = OnceLock::new();

/// Sets the units once, at start.
pub fn set(units: Option<Units>) {
    let _ = CHOSEN.set(units);
}

/// The units chosen, if not SI.
pub fn chosen() -> Option<&'static Units> {
    CHOSEN.get().and_then(Option::as_ref)
}

/// `x` (SI) in `unit` of `kind` (NaN never: units are checked when chosen).
pub fn convert(kind: QuantityKind, x: f64, unit: &str) -> f64 {
    from_si(kind, "output", x, unit).unwrap_or(x)
}

/// The quantity and the unit for a JSON key's SI suffix, and the key's stem.
fn key_kind<'a>(key: &'a str, u: &'a Units) -> Option<(&'a str, QuantityKind, &'a str)> {
    if key.contains("_per_K") || key.contains("_per_Pa") || key.contains("_W_per_K") {
        return None;
    }
    let table: [(&str, QuantityKind, &str); 6] = [
        ("_J_per_mol", QuantityKind::MolarEnthalpy, &u.molar_enthalpy),
        ("_mol_s", QuantityKind::MolarFlow, &u.molar_flow),
        ("_kg_s", QuantityKind::MassFlow, &u.mass_flow),
        ("_K", QuantityKind::Temperature, &u.temperature),
        ("_Pa", QuantityKind::Pressure, &u.pressure),
        ("_W", QuantityKind::Power, &u.power),
    ];
    table
        .into_iter()
        .find_map(|(suffix, kind, unit)| key.strip_suffix(suffix).map(|stem| (stem, kind, unit)))
}

/// A unit as it goes into a key: `lbmol/h` as `lbmol_per_h`.
fn key_unit(unit: &str) -> String {
    unit.replace('/', "_per_").replace(['°', ' '], "")
}

/// Adds, beside every SI key of `v` (recursively), the value in the chosen unit.
pub fn augment(v: &mut Value) {
    let Some(u) = chosen() else {
        return;
    };
    augment_with(v, u);
}

fn augment_with(v: &mut Value, u: &Units) {
    match v {
        Value::Object(m) => {
            let mut added = Map::new();
            for (key, value) in m.iter_mut() {
                augment_with(value, u);
                if let Some((stem, kind, unit)) = key_kind(key, u) {
                    let convert_one = |x: &Value| -> Value {
                        x.as_f64()
                            .and_then(|x| serde_json::Number::from_f64(convert(kind, x, unit)))
                            .map_or(Value::Null, Value::Number)
                    };
                    let converted = match value {
                        Value::Number(_) => convert_one(value),
                        Value::Array(items) if items.iter().all(Value::is_number) => {
                            Value::Array(items.iter().map(convert_one).collect())
                        }
                        _ => continue,
                    };
                    added.insert(format!("{stem}_{}", key_unit(unit)), converted);
                }
            }
            for (k, v) in added {
                m.entry(k).or_insert(v);
            }
        }
        Value::Array(items) => items.iter_mut().for_each(|i| augment_with(i, u)),
        _ => {}
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn json_keeps_si_keys_and_adds_the_chosen_units() {
        let mut v = json!({"T_K": 373.15, "P_Pa": 101325.0, "duty_W": 1000.0, "flow_mol_s": 1.0,
            "sensitivity": {"dvapour_fraction_dT_per_K": 0.1},
            "table": [{"h_J_per_mol": 2.326, "component_flows_mol_s": [1.0, 2.0]}]});
        augment_with(&mut v, &Units::field());
        // NIST SP 811: 212 °F, 14.6959 psia, 3412.14 Btu/h per kW, 7.93664 lbmol/h per mol/s,
        // 1 Btu/lbmol = 2.326 J/mol.
        assert!((v["T_degF"].as_f64().unwrap() - 212.0).abs() < 1e-9);
        assert!((v["P_psia"].as_f64().unwrap() - 14.6959).abs() < 1e-4);
        assert!((v["duty_Btu_per_h"].as_f64().unwrap() - 3412.14).abs() < 0.01);
        assert!((v["flow_lbmol_per_h"].as_f64().unwrap() - 7.93664).abs() < 1e-5);
        assert!((v["table"][0]["h_Btu_per_lbmol"].as_f64().unwrap() - 1.0).abs() < 1e-12);
        assert_eq!(
            v["table"][0]["component_flows_lbmol_per_h"].as_array().unwrap().len(),
            2
        );
        assert_eq!(v["T_K"], 373.15);
        assert!(v["sensitivity"].get("dvapour_fraction_dT_per_degF").is_none());
    }

    #[test]
    fn custom_units_are_checked() {
        let u = Units::from_text("u.json", r#"{"temperature": "degC", "power": "kW"}"#).unwrap();
        assert_eq!(
            (u.temperature.as_str(), u.power.as_str(), u.pressure.as_str()),
            ("degC", "kW", "Pa")
        );
        assert!(Units::from_text("u.json", r#"{"temperature": "furlongs"}"#).is_err());
        assert!(Units::from_text("u.json", r#"{"colour": "degC"}"#).is_err());
        assert!(Units::from_text("u.toml", "pressure = \"bar\"\n").is_ok());
        assert!(Units::choose("nonexistent-units-file.json").is_err());
        assert_eq!(Units::choose("SI").unwrap(), None);
    }
}
