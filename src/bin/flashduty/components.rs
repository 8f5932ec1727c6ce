//! `components`: the library listed, or one component with every value's source and range
//! and the bibliography entries it cites.

use crate::compute::CAUTION;
use crate::error::{CliError, CliResult};
use crate::text::{Align, Table, num};
use flashduty::library::Library;
use flashduty::properties::{Component, HeatCapacity, LatentHeat, ValidityRange, VapourPressure};
use serde_json::{Map, Value, json};
use std::collections::BTreeMap;
use std::fmt::Write;

/// The list as text.
pub fn list_text(lib: &Library) -> String {
    let mut out = String::new();
    let _ = writeln!(
        out,
        "Component library: {} components ('flashduty components NAME' shows one with its sources)\n",
        lib.len()
    );
    let mut t = Table::new(&[
        ("name", Align::Left),
        ("CAS", Align::Left),
        ("formula", Align::Left),
        ("M [g/mol]", Align::Right),
        ("Tb [K]", Align::Right),
        ("Tc [K]", Align::Right),
        ("Pc [kPa]", Align::Right),
        ("also known as", Align::Left),
    ]);
    for c in lib.components() {
        t.row(vec![
            c.name().into(),
            c.cas().into(),
            c.formula().into(),
            num(c.molar_mass_g_per_mol(), 6),
            num(c.normal_boiling_point_k(), 6),
            num(c.critical_temperature_k(), 6),
            num(c.critical_pressure_pa() / 1e3, 6),
            c.synonyms().join(", "),
        ]);
    }
    out.push_str(&t.render(0));
    out
}

/// The list as JSON.
pub fn list_json(lib: &Library) -> Value {
    let comps: Vec<Value> = lib
        .components()
        .map(|c| {
            json!({
                "name": c.name(),
                "cas": c.cas(),
                "formula": c.formula(),
                "synonyms": c.synonyms(),
                "molar_mass_g_per_mol": c.molar_mass_g_per_mol(),
                "normal_boiling_point_K": c.normal_boiling_point_k(),
                "critical_temperature_K": c.critical_temperature_k(),
                "critical_pressure_Pa": c.critical_pressure_pa(),
                "acentric_factor": c.acentric_factor(),
            })
        })
        .collect();
    json!({"count": comps.len(), "components": comps})
}

fn range_json(r: ValidityRange) -> Value {
    json!({"min_K": r.min_k, "max_K": if r.max_k.is_finite() { json!(r.max_k) } else { Value::Null }})
}

fn range_text(r: ValidityRange, tc: f64) -> String {
    if r.max_k.is_finite() && r.min_k > 0.0 {
        format!("valid {}–{} K", exact(r.min_k), exact(r.max_k))
    } else {
        format!("no stated range (up to Tc = {} K)", exact(tc))
    }
}

fn cited(c: &Component, lib: &Library) -> BTreeMap<String, String> {
    c.provenance()
        .iter()
        .map(|(_, p)| {
            (
                p.source.clone(),
                lib.sources()
                    .get(&p.source)
                    .cloned()
                    .unwrap_or_else(|| "(not in the bibliography)".into()),
            )
        })
        .collect()
}

/// One component as JSON: its record in the component-file schema, the validity ranges of
/// its correlations, and the bibliography entries it cites.
pub fn one_json(lib: &Library, name: &str) -> CliResult<Value> {
    let c = lib.get(name).map_err(|e| CliError::new(format!("components: {e}")))?;
    let mut validity = Map::new();
    validity.insert("vapour_pressure".into(), range_json(c.vapour_pressure().validity()));
    validity.insert(
        "liquid_heat_capacity".into(),
        range_json(c.liquid_heat_capacity().validity()),
    );
    validity.insert(
        "vapour_heat_capacity".into(),
        range_json(c.vapour_heat_capacity().validity()),
    );
    validity.insert("latent_heat".into(), range_json(c.latent_heat().validity()));
    Ok(json!({
        "component": c.to_json(),
        "validity": validity,
        "sources": cited(c, lib),
    }))
}

/// A constant as written in the file: shortest form, exponent only for very small or large.
fn exact(x: f64) -> String {
    if x != 0.0 && (x.abs() < 1e-3 || x.abs() >= 1e7) {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

fn f(v: &Value, key: &str) -> String {
    v.get(key).and_then(Value::as_f64).map_or("-".into(), exact)
}

fn correlation_text(field: &str, v: &Value) -> String {
    let form = v.get("form").and_then(Value::as_str).unwrap_or("?");
    match (field, form) {
        ("vapour_pressure", "antoine") => format!(
            "Antoine, {} form: A = {}, B = {}, C = {}",
            v.get("units").and_then(Value::as_str).unwrap_or("?"),
            f(v, "A"),
            f(v, "B"),
            f(v, "C")
        ),
        ("vapour_pressure", "extended") => format!(
            "ln(P/Pa) = A + B/T + C ln T + D T^E: A = {}, B = {}, C = {}, D = {}, E = {}",
            f(v, "A"),
            f(v, "B"),
            f(v, "C"),
            f(v, "D"),
            f(v, "E")
        ),
        (_, "polynomial") => {
            let coefs: Vec<String> = v
                .get("coefficients")
                .and_then(Value::as_array)
                .map(|a| {
                    a.iter()
                        .zip(["a", "b", "c", "d", "e"])
                        .map(|(x, n)| format!("{n} = {}", x.as_f64().map_or("?".into(), exact)))
                        .collect()
                })
                .unwrap_or_default();
            format!("Cp = a + bT + cT² + dT³ + eT⁴ [J/(mol·K)]: {}", coefs.join(", "))
        }
        (_, "shomate") => format!(
            "Shomate (t = T/1000): A = {}, B = {}, C = {}, D = {}, E = {}",
            f(v, "A"),
            f(v, "B"),
            f(v, "C"),
            f(v, "D"),
            f(v, "E")
        ),
        (_, "constant") => format!("Cp = {} J/(mol·K)", f(v, "value")),
        ("latent_heat", "watson") => format!(
            "Watson from {} J/mol at {} K, exponent {}",
            f(v, "value_J_per_mol"),
            f(v, "T_anchor_K"),
            v.get("exponent")
                .and_then(Value::as_f64)
                .map_or("0.38".into(), |x| num(x, 4))
        ),
        ("latent_heat", "dippr106") => format!(
            "DIPPR-106: A = {} J/mol, B = {}, C = {}, D = {}, E = {}",
            f(v, "A_J_per_mol"),
            f(v, "B"),
            f(v, "C"),
            f(v, "D"),
            f(v, "E")
        ),
        _ => v.to_string(),
    }
}

/// One component as text.
pub fn one_text(lib: &Library, name: &str) -> CliResult<String> {
    let c = lib.get(name).map_err(|e| CliError::new(format!("components: {e}")))?;
    let record = c.to_json();
    let tc = c.critical_temperature_k();
    let mut out = String::new();
    let _ = writeln!(out, "{} ({}, CAS {})", c.name(), c.formula(), c.cas());
    if !c.synonyms().is_empty() {
        let _ = writeln!(out, "  also known as: {}", c.synonyms().join(", "));
    }
    let _ = writeln!(out);
    let ranges: BTreeMap<&str, String> = [
        ("vapour_pressure", range_text(c.vapour_pressure().validity(), tc)),
        (
            "liquid_heat_capacity",
            range_text(c.liquid_heat_capacity().validity(), tc),
        ),
        (
            "vapour_heat_capacity",
            range_text(c.vapour_heat_capacity().validity(), tc),
        ),
        ("latent_heat", range_text(c.latent_heat().validity(), tc)),
    ]
    .into_iter()
    .collect();
    let source = |p: &flashduty::properties::Provenance| {
        if p.from_memory {
            format!("[{}] (from memory)", p.source)
        } else {
            format!("[{}]", p.source)
        }
    };
    let mut t = Table::new(&[
        ("constant", Align::Left),
        ("value", Align::Right),
        ("source", Align::Left),
    ]);
    let mut correlations = Vec::new();
    let mut notes = Vec::new();
    let mut any_memory = false;
    for (field, p) in c.provenance() {
        any_memory |= p.from_memory;
        let entry = record.get(field.as_str()).cloned().unwrap_or(Value::Null);
        let scalar = match field.as_str() {
            "molar_mass_g_per_mol" => Some(("molar mass", format!("{} g/mol", exact(c.molar_mass_g_per_mol())))),
            "critical_temperature_K" => Some(("critical temperature", format!("{} K", exact(tc)))),
            "critical_pressure_Pa" => Some((
                "critical pressure",
                format!("{} kPa", exact(c.critical_pressure_pa() / 1e3)),
            )),
            "acentric_factor" => Some(("acentric factor", exact(c.acentric_factor()))),
            "normal_boiling_point_K" => Some((
                "normal boiling point",
                format!("{} K", exact(c.normal_boiling_point_k())),
            )),
            _ => None,
        };
        let label = match (&scalar, field.as_str()) {
            (Some((l, _)), _) => *l,
            (None, "vapour_pressure") => "vapour pressure",
            (None, "liquid_heat_capacity") => "liquid heat capacity",
            (None, "vapour_heat_capacity") => "ideal-gas heat capacity",
            (None, "latent_heat") => "latent heat",
            (None, other) => other,
        };
        if let Some(n) = &p.note {
            notes.push(format!("{label}: {n}"));
        }
        match scalar {
            Some((l, v)) => t.row(vec![l.to_string(), v, source(p)]),
            None => correlations.push(format!(
                "  {label}: {}; {}\n      {}",
                ranges.get(field.as_str()).cloned().unwrap_or_default(),
                source(p),
                correlation_text(field, &entry)
            )),
        }
    }
    out.push_str(&t.render(2));
    let _ = writeln!(out, "\n  Correlations (T in K):");
    for line in correlations {
        let _ = writeln!(out, "{line}");
    }
    if !notes.is_empty() {
        let _ = writeln!(out, "\n  Notes:");
        for n in notes {
            let _ = writeln!(out, "    {n}");
        }
    }
    let _ = writeln!(out, "\n  Sources cited:");
    for (k, v) in cited(c, lib) {
        let _ = writeln!(out, "    [{k}] {v}");
    }
    if any_memory {
        let _ = writeln!(
            out,
            "  (from memory): the value was typed from memory and should be checked against the source."
        );
    }
    let _ = writeln!(out);
    let _ = writeln!(out, "{CAUTION}");
    Ok(out)
}
