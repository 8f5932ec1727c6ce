//! The command-line tool with activity models: `liquid_model` and `binary_parameters` in
//! cases, the `azeotropes` command, `fit-pair`, and their bad inputs (exit code 2, one line
//! naming the field). Check values name their source; other cases are invented.
#![cfg(feature = "cli")]

use assert_cmd::Command;
use serde_json::{Value, json};
use std::path::{Path, PathBuf};

fn bin() -> Command {
    Command::cargo_bin("flashduty").expect("the flashduty binary is built for the tests")
}

fn repo(path: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(path)
}

fn run_json(command: &str, case: &Value) -> Value {
    let out = bin()
        .args([command, "--json", "-"])
        .write_stdin(case.to_string())
        .output()
        .unwrap();
    assert!(out.status.success(), "{case}: {}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice(&out.stdout).unwrap()
}

/// Exit code 2, one line on stderr holding every needle.
fn fails(command: &str, case: &Value, needles: &[&str]) {
    let out = bin()
        .args([command, "-"])
        .write_stdin(case.to_string())
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{case}: {stderr}");
    assert_eq!(stderr.trim_end().lines().count(), 1, "{stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
    for n in needles {
        assert!(stderr.contains(n), "{stderr:?} lacks {n:?}");
    }
}

fn ethanol_water(extra: Value) -> Value {
    let mut v = json!({"components": ["ethanol", "water"], "z": [0.1, 0.9], "P": "1 atm"});
    if let (Value::Object(m), Value::Object(e)) = (&mut v, extra) {
        m.extend(e);
    }
    v
}

/// Ethanol–water, x = 0.1 at 1 atm: Perry's table (from memory) puts the bubble point
/// between 86.7 °C (x = 0.0966) and 85.3 °C (x = 0.1238); Raoult's law says 96.8 °C and
/// warns.
#[test]
fn bubble_point_with_and_without_an_activity_model() {
    let ideal = run_json("bubble", &ethanol_water(json!({})));
    assert_eq!(ideal["liquid_model"], "ideal");
    assert!((ideal["T_K"].as_f64().unwrap() - 369.95).abs() < 0.1);
    let kinds: Vec<&str> = ideal["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["kind"].as_str().unwrap())
        .collect();
    assert!(kinds.contains(&"non-ideal-liquid"), "{kinds:?}");
    for model in ["nrtl", "uniquac"] {
        let v = run_json("bubble", &ethanol_water(json!({"liquid_model": model})));
        assert_eq!(v["liquid_model"], model);
        let t = v["T_K"].as_f64().unwrap() - 273.15;
        assert!(t > 85.3 && t < 87.2, "{model}: {t}");
        assert!(
            v["warnings"]
                .as_array()
                .unwrap()
                .iter()
                .all(|w| w["kind"] != "non-ideal-liquid")
        );
    }
    // Wilson has no built-in ethanol–water pair: ideal, with a warning naming the pair.
    let v = run_json("bubble", &ethanol_water(json!({"liquid_model": "wilson"})));
    let w = &v["warnings"][0];
    assert_eq!(w["kind"], "pair-without-parameters");
    assert!(w["message"].as_str().unwrap().contains("ethanol–water"));
}

/// Heating 10 % ethanol from 25 °C to 95 °C at 1 atm: with NRTL the outlet is partly
/// vapour (its bubble point is near 86 °C), so the duty carries latent heat that Raoult's
/// law (bubble point 96.8 °C) misses.
#[test]
fn heater_duty_takes_the_latent_heat_the_ideal_model_misses() {
    let case = |model: &str| {
        json!({"components": ["ethanol", "water"], "z": [0.1, 0.9], "flow": "1 mol/s",
               "inlet": {"T": "25 degC", "P": "1 atm"}, "outlet": {"T": "95 degC", "P": "1 atm"},
               "liquid_model": model})
    };
    let ideal = run_json("duty", &case("ideal"));
    let nrtl = run_json("duty", &case("nrtl"));
    assert_eq!(ideal["outlet"]["phase"], "liquid");
    assert_eq!(nrtl["outlet"]["phase"], "two-phase");
    assert!(nrtl["duty_W"].as_f64().unwrap() > ideal["duty_W"].as_f64().unwrap() + 5_000.0);
    let curve = run_json(
        "curve",
        &json!({"components": ["ethanol", "water"], "z": [0.1, 0.9],
                "inlet": {"T": "25 degC", "P": "1 atm"}, "outlet": {"T": "105 degC", "P": "1 atm"},
                "liquid_model": "nrtl", "points": 8}),
    );
    assert!((curve["bubble_T_K"].as_f64().unwrap() - 273.15 - 86.4).abs() < 0.8);
}

/// CRC azeotrope table at 1 atm (from memory): ethanol–water 78.15 °C, x = 0.894;
/// acetone–chloroform 64.5 °C, maximum-boiling.
#[test]
fn azeotropes_command() {
    let v = run_json(
        "azeotropes",
        &json!({"components": ["ethanol", "water"], "P": "1 atm", "liquid_model": "nrtl"}),
    );
    assert_eq!(v["count"], 1);
    assert_eq!(v["azeotropes"][0]["kind"], "minimum-boiling");
    assert!((v["azeotropes"][0]["T_K"].as_f64().unwrap() - 351.3).abs() < 0.2);
    let v = run_json(
        "azeotropes",
        &json!({"components": ["acetone", "chloroform"], "T": "60 degC", "liquid_model": "wilson"}),
    );
    assert_eq!(v["azeotropes"][0]["kind"], "maximum-boiling");
    let text = bin()
        .args(["azeotropes", "-"])
        .write_stdin(json!({"components": ["benzene", "toluene"], "P": "1 atm"}).to_string())
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&text.stdout).contains("none found"));
    fails(
        "azeotropes",
        &json!({"components": ["benzene"], "P": "1 atm"}),
        &["components:", "binary"],
    );
    fails(
        "azeotropes",
        &json!({"components": ["benzene", "toluene"], "P": "1 atm", "z": [0.5, 0.5]}),
        &["z"],
    );
}

/// fit-pair on the example data writes a parameter file a case can name, and the case then
/// reproduces the data's bubble point (Perry's table, from memory: x = 0.2337, 82.7 °C).
#[test]
fn fit_pair_writes_a_file_cases_can_use() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("ew.toml");
    let out = bin()
        .args([
            "fit-pair",
            "--json",
            "--pair",
            "ethanol,water",
            "--model",
            "nrtl",
            "--pressure",
            "1 atm",
        ])
        .arg(repo("examples/vle_ethanol_water.csv"))
        .arg("--write")
        .arg(&file)
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["consistency"]["consistent"], true);
    assert!(v["mean_abs_dy"].as_f64().unwrap() < 0.01);
    let case = json!({"components": ["ethanol", "water"], "z": [0.2337, 0.7663], "P": "1 atm",
                      "liquid_model": "nrtl", "binary_parameters": file.display().to_string()});
    let b = run_json("bubble", &case);
    assert!((b["T_K"].as_f64().unwrap() - 273.15 - 82.7).abs() < 0.5);
    // Wilson needs volumes; a bad model name; too few points.
    for (args, needle) in [
        (vec!["--model", "wilson"], "--volumes"),
        (vec!["--model", "margules"], "--model"),
        (vec!["--model", "nrtl", "--alpha", "1.5"], "--alpha"),
    ] {
        let out = bin()
            .args(["fit-pair", "--pair", "ethanol,water", "--pressure", "1 atm"])
            .args(&args)
            .arg(repo("examples/vle_ethanol_water.csv"))
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(2));
        assert!(String::from_utf8_lossy(&out.stderr).contains(needle), "{args:?}");
    }
}

/// Every bad input names its field.
#[test]
fn bad_parameters_are_refused_with_the_field() {
    let nrtl = |pair: Value| ethanol_water(json!({"liquid_model": "nrtl", "binary_parameters": {"pairs": [pair]}}));
    fails(
        "bubble",
        &ethanol_water(json!({"liquid_model": "margules"})),
        &["liquid_model", "margules"],
    );
    fails("bubble", &ethanol_water(json!({"liquid_model": 3})), &["liquid_model"]);
    fails(
        "bubble",
        &nrtl(json!({"components": ["ethanol", "water"], "nrtl": {"b12": 1, "b21": 1, "alpha": 1.5}})),
        &["binary_parameters.pairs[0].nrtl.alpha", "1.5", "(0, 1]"],
    );
    fails(
        "bubble",
        &nrtl(json!({"components": ["ethanol", "water"], "nrtl": {"b12": "1e400 J/mol", "b21": 1, "alpha": 0.3}})),
        &["binary_parameters.pairs[0].nrtl.b12", "not finite"],
    );
    fails(
        "bubble",
        &nrtl(json!({"components": ["ethanol", "benzene"], "nrtl": {"b12": 1, "b21": 1, "alpha": 0.3}})),
        &[
            "binary_parameters.pairs[0].components[1]",
            "benzene",
            "not a component of the case",
        ],
    );
    fails(
        "bubble",
        &json!({"components": ["ethanol", "n-decane"], "z": [0.5, 0.5], "P": "1 atm", "liquid_model": "uniquac"}),
        &["uniquac_components.n-decane", "r and q"],
    );
    fails(
        "bubble",
        &ethanol_water(json!({"binary_parameters": {"pairs": []}})),
        &["binary_parameters", "ideal"],
    );
    fails(
        "bubble",
        &ethanol_water(json!({"liquid_model": "nrtl", "binary_parameters": "/no/such/file.json"})),
        &["/no/such/file.json"],
    );
    // A device is not read (it could be endless).
    fails(
        "bubble",
        &ethanol_water(json!({"liquid_model": "nrtl", "binary_parameters": "/dev/zero"})),
        &["/dev/zero", "not a regular file"],
    );
    fails(
        "flash",
        &json!({"z": [0.5, 0.5], "K": [2.0, 0.5], "liquid_model": "nrtl"}),
        &["liquid_model", "given K"],
    );
    fails(
        "bubble",
        &json!({"components": ["toluene", "water"], "z": [0.5, 0.5], "P": "1 atm",
                "liquid_model": "nrtl", "water_phase": "immiscible"}),
        &["liquid_model", "water_phase"],
    );
}

/// At the azeotrope's composition (CRC: x = 0.894 at 1 atm, from memory) the mixture boils
/// like a pure component: the curve has a plateau, bubble and dew points meet, and a
/// duty-specified condenser outlet on the plateau is found by its vapour fraction.
#[test]
fn curves_and_duties_through_the_azeotrope() {
    let c = run_json(
        "curve",
        &json!({"components": ["ethanol", "water"], "z": [0.894, 0.106], "liquid_model": "nrtl",
                "inlet": {"T": "70 degC", "P": "1 atm"}, "outlet": {"T": "90 degC", "P": "1 atm"}, "points": 6}),
    );
    let (b, d) = (c["bubble_T_K"].as_f64().unwrap(), c["dew_T_K"].as_f64().unwrap());
    assert!((b - d).abs() < 1e-6 && (b - 351.3).abs() < 0.1, "{b} {d}");
    let plateau = c["points"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|p| (p["T_K"].as_f64().unwrap() - b).abs() < 1e-6)
        .count();
    assert!(plateau >= 4, "{c}");
    let q = c["duty_W"].as_f64().unwrap();
    let half = run_json(
        "duty",
        &json!({"components": ["ethanol", "water"], "z": [0.894, 0.106], "liquid_model": "nrtl",
                "inlet": {"T": "70 degC", "P": "1 atm"}, "duty": format!("{} W", q / 2.0), "outlet": {"P": "1 atm"}}),
    );
    assert_eq!(half["outlet"]["phase"], "two-phase");
    assert!((half["outlet"]["T_K"].as_f64().unwrap() - b).abs() < 1e-6);
}
