//! The command-line tool against its contract (docs/CLI.md): every command, every output key,
//! every exit code, units in every accepted form, and bad input of every kind giving exit
//! code 2 with one readable line on stderr and never a panic.
//!
//! Cases here are invented for the tests unless a comment names a source.
#![cfg(feature = "cli")]

use assert_cmd::Command;
use predicates::prelude::*;
use serde_json::{Value, json};
use std::path::{Path, PathBuf};

fn bin() -> Command {
    Command::cargo_bin("flashduty").expect("the flashduty binary is built for the tests")
}

fn repo(path: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(path)
}

/// Runs `args` with `case` on standard input and returns the JSON output (exit code 0).
fn json_stdin(args: &[&str], case: &Value) -> Value {
    let out = bin()
        .args(args)
        .arg("--json")
        .arg("-")
        .write_stdin(case.to_string())
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{args:?} {case}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("stdout is one JSON object")
}

/// Runs `args` (a file or no case) and returns the JSON output.
fn json_args(args: &[&str]) -> Value {
    let out = bin().args(args).arg("--json").output().unwrap();
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("stdout is one JSON object")
}

/// Asserts exit code 2, one line on stderr containing every needle, and no panic.
fn assert_error_output(out: &std::process::Output, needles: &[&str]) {
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "stderr: {stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert_eq!(stderr.trim_end().lines().count(), 1, "not one line: {stderr:?}");
    assert!(stderr.starts_with("error: "), "{stderr}");
    for n in needles {
        assert!(stderr.contains(n), "stderr {stderr:?} lacks {n:?}");
    }
    assert!(
        out.stdout.is_empty(),
        "stdout not empty: {}",
        String::from_utf8_lossy(&out.stdout)
    );
}

/// Runs `check` on the sheet at `path`, writing its JUnit report to `junit`.
fn check_with_junit(path: &Path, junit: &Path) -> std::process::Output {
    bin().arg("check").arg(path).arg("--junit").arg(junit).output().unwrap()
}

/// Asserts that `command` with `case` on stdin fails with one line naming the needles.
fn fails(command: &str, case: &str, needles: &[&str]) {
    let out = bin().args([command, "-"]).write_stdin(case).output().unwrap();
    assert_error_output(&out, needles);
}

fn f(v: &Value, key: &str) -> f64 {
    v[key]
        .as_f64()
        .unwrap_or_else(|| panic!("{key} is not a number in {v}"))
}

fn hexane_heptane(extra: Value) -> Value {
    let mut v = json!({"components": ["n-hexane", "n-heptane"], "z": [0.5, 0.5]});
    if let (Value::Object(m), Value::Object(e)) = (&mut v, extra) {
        m.extend(e);
    }
    v
}

const FLASH_KEYS: &[&str] = &[
    "phase",
    "vapour_fraction",
    "T_K",
    "P_Pa",
    "x",
    "y",
    "K",
    "warnings",
    "components",
    "iterations",
    "sensitivity",
];

fn assert_flash_like(v: &Value) {
    for k in FLASH_KEYS {
        assert!(v.get(k).is_some(), "missing {k} in {v}");
    }
    assert!(["liquid", "vapour", "two-phase"].contains(&v["phase"].as_str().unwrap()));
    assert!(v["warnings"].is_array());
}

// ---------------------------------------------------------------------------------------
// flash

#[test]
fn flash_two_phase_has_every_key() {
    let v = json_stdin(&["flash"], &hexane_heptane(json!({"T": "85 degC", "P": "1 atm"})));
    assert_flash_like(&v);
    assert_eq!(v["command"], "flash");
    assert_eq!(v["phase"], "two-phase");
    let beta = f(&v, "vapour_fraction");
    assert!(beta > 0.0 && beta < 1.0);
    assert_eq!(f(&v, "T_K"), 358.15);
    assert_eq!(f(&v, "P_Pa"), 101_325.0);
    let x: Vec<f64> = serde_json::from_value(v["x"].clone()).unwrap();
    let y: Vec<f64> = serde_json::from_value(v["y"].clone()).unwrap();
    let k: Vec<f64> = serde_json::from_value(v["K"].clone()).unwrap();
    // Material balance and y = K x.
    for i in 0..2 {
        assert!(((1.0 - beta) * x[i] + beta * y[i] - 0.5).abs() < 1e-12);
        assert!((y[i] - k[i] * x[i]).abs() < 1e-12);
    }
    let s = &v["sensitivity"];
    assert!(f(s, "dvapour_fraction_dT_per_K") > 0.0);
    assert!(f(s, "dvapour_fraction_dP_per_Pa") < 0.0);
    assert!(v["iterations"].as_u64().is_some());
    assert_eq!(v["components"], json!(["n-hexane", "n-heptane"]));
    assert!(v["caution"].as_str().unwrap().contains("licensed engineer"));
}

#[test]
fn flash_single_phase_has_null_absent_phase() {
    let v = json_stdin(&["flash"], &hexane_heptane(json!({"T": "25 degC", "P": "1 atm"})));
    assert_eq!(v["phase"], "liquid");
    assert_eq!(f(&v, "vapour_fraction"), 0.0);
    assert!(v["y"].is_null());
    assert!(v["sensitivity"].is_null());
    let v = json_stdin(&["flash"], &hexane_heptane(json!({"T": "150 degC", "P": "1 atm"})));
    assert_eq!(v["phase"], "vapour");
    assert!(v["x"].is_null());
}

#[test]
fn flash_with_vapour_fraction_finds_the_other_variable() {
    let v = json_stdin(
        &["flash"],
        &hexane_heptane(json!({"P": "1 atm", "vapour_fraction": 0.4})),
    );
    assert_eq!(v["phase"], "two-phase");
    assert!((f(&v, "vapour_fraction") - 0.4).abs() < 1e-12);
    let t = f(&v, "T_K");
    // The T-P flash at the temperature found gives the vapour fraction back.
    let back = json_stdin(&["flash"], &hexane_heptane(json!({"T": t, "P": "1 atm"})));
    assert!((f(&back, "vapour_fraction") - 0.4).abs() < 1e-8, "{back}");

    let v = json_stdin(
        &["flash"],
        &hexane_heptane(json!({"T": "85 degC", "vapour_fraction": 0.25})),
    );
    let p = f(&v, "P_Pa");
    let back = json_stdin(&["flash"], &hexane_heptane(json!({"T": "85 degC", "P": p})));
    assert!((f(&back, "vapour_fraction") - 0.25).abs() < 1e-8, "{back}");
}

#[test]
fn flash_with_given_k_values() {
    // Analytic: z = (0.5, 0.5), K = (2, 0.5) gives beta = 0.5, x = (1/3, 2/3), y = (2/3, 1/3).
    let v = json_stdin(&["flash"], &json!({"z": [0.5, 0.5], "K": [2.0, 0.5]}));
    assert_flash_like(&v);
    assert_eq!(v["phase"], "two-phase");
    assert!((f(&v, "vapour_fraction") - 0.5).abs() < 1e-15);
    assert!((v["x"][0].as_f64().unwrap() - 1.0 / 3.0).abs() < 1e-15);
    assert!(v["T_K"].is_null() && v["P_Pa"].is_null() && v["components"].is_null());
    assert!(v["sensitivity"].is_null());
    assert_eq!(v["K_given"], true);
    let v = json_stdin(
        &["flash"],
        &json!({"components": ["a", "b"], "z": [0.5, 0.5], "K": [1.5, 0.2], "flow": "3.6 kmol/h"}),
    );
    assert_eq!(v["phase"], "liquid");
    assert_eq!(v["components"], json!(["a", "b"]));
    assert!((f(&v, "flow_mol_s") - 1.0).abs() < 1e-12);
}

#[test]
fn flash_flows_are_normalised_and_give_phase_flows() {
    let v = json_stdin(
        &["flash"],
        &json!({"components": ["n-hexane", "n-heptane"], "flows": ["18 kmol/h", 5.0], "T": "85 degC", "P": "1 atm"}),
    );
    assert_eq!(v["z"], json!([0.5, 0.5]));
    assert!((f(&v, "flow_mol_s") - 10.0).abs() < 1e-12);
    let sum = f(&v, "liquid_flow_mol_s") + f(&v, "vapour_flow_mol_s");
    assert!((sum - 10.0).abs() < 1e-9);
}

// ---------------------------------------------------------------------------------------
// bubble and dew

#[test]
fn bubble_and_dew_at_pressure_and_temperature() {
    let b = json_stdin(&["bubble"], &hexane_heptane(json!({"P": "1 atm"})));
    let d = json_stdin(&["dew"], &hexane_heptane(json!({"P": "1 atm"})));
    assert_flash_like(&b);
    assert_flash_like(&d);
    assert_eq!(b["phase"], "liquid");
    assert_eq!(d["phase"], "vapour");
    assert_eq!(b["incipient_phase"], "vapour");
    assert_eq!(d["incipient_phase"], "liquid");
    assert!(f(&b, "T_K") < f(&d, "T_K"));
    // The incipient vapour at the bubble point sums to 1.
    let y: f64 = b["y"].as_array().unwrap().iter().map(|v| v.as_f64().unwrap()).sum();
    assert!((y - 1.0).abs() < 1e-9);
    // Bubble pressure at the bubble temperature is the pressure given.
    let tb = f(&b, "T_K");
    let p = json_stdin(&["bubble"], &hexane_heptane(json!({"T": tb})));
    assert!((f(&p, "P_Pa") / 101_325.0 - 1.0).abs() < 1e-9, "{p}");
    let td = f(&d, "T_K");
    let p = json_stdin(&["dew"], &hexane_heptane(json!({"T": td})));
    assert!((f(&p, "P_Pa") / 101_325.0 - 1.0).abs() < 1e-9, "{p}");
}

#[test]
fn pure_component_boiling_points_match_the_handbook() {
    // Normal boiling points from the CRC Handbook, 97th ed. (tests/fixtures/handbook_boiling_points.csv).
    for (name, tb) in [("water", 373.12), ("n-hexane", 341.88), ("toluene", 383.78)] {
        let v = json_stdin(&["bubble"], &json!({"components": [name], "z": [1], "P": "1 atm"}));
        assert!((f(&v, "T_K") - tb).abs() < 0.25, "{name}: {v}");
    }
}

// ---------------------------------------------------------------------------------------
// units

#[test]
fn temperature_units_give_identical_results() {
    let forms = [
        json!("65 degC"),
        json!(338.15),
        json!("149 degF"),
        json!("338.15 K"),
        json!("608.67 degR"),
    ];
    let base = json_stdin(&["flash"], &hexane_heptane(json!({"T": forms[0], "P": "0.5 atm"})));
    for t in &forms[1..] {
        let v = json_stdin(&["flash"], &hexane_heptane(json!({"T": t, "P": "0.5 atm"})));
        assert!((f(&v, "T_K") - f(&base, "T_K")).abs() < 1e-9, "{t}");
        assert!(
            (f(&v, "vapour_fraction") - f(&base, "vapour_fraction")).abs() < 1e-9,
            "{t}"
        );
    }
}

#[test]
fn pressure_units_give_identical_results() {
    let base = json_stdin(&["bubble"], &hexane_heptane(json!({"P": "1 atm"})));
    for p in [
        json!("101.325 kPa"),
        json!(101_325),
        json!("1.01325 bar"),
        json!("0.101325 MPa"),
    ] {
        let v = json_stdin(&["bubble"], &hexane_heptane(json!({"P": p})));
        assert!((f(&v, "P_Pa") / 101_325.0 - 1.0).abs() < 1e-12, "{p}");
        assert!((f(&v, "T_K") - f(&base, "T_K")).abs() < 1e-9, "{p}");
    }
    // 760 mmHg (conventional, 133.322387415 Pa) is 1 atm within 1.5e-7.
    let v = json_stdin(&["bubble"], &hexane_heptane(json!({"P": "760 mmHg"})));
    assert!((f(&v, "P_Pa") / 101_325.0 - 1.0).abs() < 2e-7);
    // 14.6959 psia is 1 atm (14.69594877 psia) rounded to six figures: equal within that
    // rounding, 3.3e-6.
    let v = json_stdin(&["bubble"], &hexane_heptane(json!({"P": "14.6959 psia"})));
    assert!((f(&v, "P_Pa") / 101_325.0 - 1.0).abs() < 4e-6);
    assert!((f(&v, "T_K") - f(&base, "T_K")).abs() < 1e-3);
    let v = json_stdin(&["bubble"], &hexane_heptane(json!({"P": "14.69594877 psia"})));
    assert!((f(&v, "P_Pa") / 101_325.0 - 1.0).abs() < 1e-9);
}

#[test]
fn flow_and_duty_units_give_identical_results() {
    let case = |flow: Value| {
        hexane_heptane(
            json!({"flow": flow, "inlet": {"T": "25 degC", "P": "1 atm"}, "outlet": {"T": "60 degC", "P": "1 atm"}}),
        )
    };
    let base = json_stdin(&["duty"], &case(json!(1.0)));
    for flow in [json!("1 mol/s"), json!("3.6 kmol/h"), json!("60 mol/min")] {
        let v = json_stdin(&["duty"], &case(flow.clone()));
        assert!((f(&v, "duty_W") / f(&base, "duty_W") - 1.0).abs() < 1e-12, "{flow}");
    }
    // A mass flow is converted with the stream's molar mass (hexane 86.18, heptane 100.2 g/mol).
    let v = json_stdin(&["duty"], &case(json!("93.19 g/s")));
    assert!((f(&v, "flow_mol_s") - 1.0).abs() < 0.01, "{v}");
    // Duty units in the duty-specified flash.
    let given = |duty: Value| {
        json!({"components": ["water"], "z": [1], "inlet": {"T": "20 degC", "P": "1 atm"},
               "outlet": {"P": "1 atm"}, "duty": duty})
    };
    let a = json_stdin(&["duty"], &given(json!(26_000.0)));
    for d in [json!("26 kW"), json!("93.6 MJ/h"), json!("0.026 MW")] {
        let b = json_stdin(&["duty"], &given(d.clone()));
        assert!(
            (f(&b["outlet"], "vapour_fraction") - f(&a["outlet"], "vapour_fraction")).abs() < 1e-9,
            "{d}"
        );
    }
}

#[test]
fn toml_and_json_cases_agree() {
    let a = json_args(&["flash", repo("examples/flash_tp.json").to_str().unwrap()]);
    let b = json_args(&["flash", repo("examples/flash_tp.toml").to_str().unwrap()]);
    assert!((f(&a, "vapour_fraction") - f(&b, "vapour_fraction")).abs() < 1e-9);
    // TOML on standard input.
    let out = bin()
        .args(["flash", "--json", "-"])
        .write_stdin("components = [\"n-hexane\", \"n-heptane\"]\nz = [0.5, 0.5]\nT = \"85 degC\"\nP = \"1 atm\"\n")
        .output()
        .unwrap();
    assert!(out.status.success());
    let c: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!((f(&a, "vapour_fraction") - f(&c, "vapour_fraction")).abs() < 1e-12);
}

// ---------------------------------------------------------------------------------------
// duty

#[test]
fn duty_has_every_key_and_the_table_adds_up() {
    let v = json_stdin(
        &["duty"],
        &hexane_heptane(json!({"flow": "36 kmol/h", "inlet": {"T": "25 degC", "P": "1 atm"},
                               "outlet": {"T": "85 degC", "P": "1 atm"}})),
    );
    for k in [
        "duty_W",
        "flow_mol_s",
        "inlet",
        "outlet",
        "table",
        "path_spread",
        "dduty_dT_out_W_per_K",
        "reference",
        "path",
        "warnings",
    ] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    assert_flash_like(&v["inlet"]);
    assert_flash_like(&v["outlet"]);
    assert_eq!(v["outlet"]["phase"], "two-phase");
    assert!((f(&v, "flow_mol_s") - 10.0).abs() < 1e-12);
    let mut sum = 0.0;
    for row in v["table"].as_array().unwrap() {
        for k in [
            "state",
            "component",
            "phase",
            "flow_mol_s",
            "h_J_per_mol",
            "liquid_sensible_J_per_mol",
            "latent_J_per_mol",
            "vapour_sensible_J_per_mol",
            "enthalpy_flow_W",
        ] {
            assert!(row.get(k).is_some(), "table row lacks {k}: {row}");
        }
        let sign = if row["state"] == "outlet" { 1.0 } else { -1.0 };
        sum += sign * f(row, "enthalpy_flow_W");
    }
    let duty = f(&v, "duty_W");
    assert!(duty > 0.0);
    assert!((sum - duty).abs() < 1e-6 * duty.abs());
    for k in [
        "boiling_point_W",
        "stream_temperature_W",
        "reference_temperature_W",
        "spread_W",
        "relative",
    ] {
        assert!(v["path_spread"][k].is_number(), "path_spread.{k}");
    }
    assert!(f(&v, "dduty_dT_out_W_per_K") > 0.0);
    assert_eq!(v["reference"], json!({"phase": "liquid", "T_K": 298.15}));
    assert_eq!(v["path"], "boiling-point");
}

#[test]
fn duty_of_water_matches_iapws_if97() {
    // IAPWS-IF97 at 1 atm (tests/fixtures/iapws_water_1atm.csv): h(368.15 K) - h(293.15 K).
    let expected = 7170.640270593918 - 1513.5177581186138;
    let v = json_stdin(
        &["duty"],
        &json!({"components": ["water"], "z": [1], "inlet": {"T": 293.15, "P": "1 atm"},
                "outlet": {"T": 368.15, "P": "1 atm"}}),
    );
    assert!((f(&v, "duty_W") / expected - 1.0).abs() < 0.01, "{}", v["duty_W"]);
}

#[test]
fn duty_specified_flash_inverts_the_duty() {
    let case = hexane_heptane(json!({"flow": 2.0, "inlet": {"T": "25 degC", "P": "1 atm"},
                                     "outlet": {"P": "1 atm"}, "duty": "50 kW"}));
    let v = json_stdin(&["duty"], &case);
    assert_eq!(v["duty_given"], true);
    assert!((f(&v, "duty_W") - 50_000.0).abs() < 1e-9);
    let out = &v["outlet"];
    let t = f(out, "T_K");
    // The duty from the inlet to the outlet found is the duty given.
    let back = json_stdin(
        &["duty"],
        &hexane_heptane(json!({"flow": 2.0, "inlet": {"T": "25 degC", "P": "1 atm"},
                               "outlet": {"T": t, "P": "1 atm"}})),
    );
    assert!((f(&back, "duty_W") / 50_000.0 - 1.0).abs() < 1e-6, "{}", back["duty_W"]);
}

#[test]
fn reference_and_path_are_used_and_echoed() {
    let case = |extra: Value| {
        let mut c =
            hexane_heptane(json!({"inlet": {"T": "25 degC", "P": "1 atm"}, "outlet": {"T": "120 degC", "P": "1 atm"}}));
        if let (Value::Object(m), Value::Object(e)) = (&mut c, extra) {
            m.extend(e);
        }
        c
    };
    let a = json_stdin(&["duty"], &case(json!({})));
    let b = json_stdin(
        &["duty"],
        &case(json!({"reference": {"phase": "vapour", "T": "0 degC"}, "path": "stream-temperature"})),
    );
    assert_eq!(b["reference"]["phase"], "vapour");
    assert!((f(&b["reference"], "T_K") - 273.15).abs() < 1e-12);
    assert_eq!(b["path"], "stream-temperature");
    assert!((f(&b, "duty_W") - f(&b["path_spread"], "stream_temperature_W")).abs() < 1e-6 * f(&b, "duty_W"));
    assert!((f(&a, "duty_W") - f(&a["path_spread"], "boiling_point_W")).abs() < 1e-6 * f(&a, "duty_W"));
}

#[test]
fn duty_states_by_vapour_fraction() {
    let v = json_stdin(
        &["duty"],
        &json!({"components": ["water"], "z": [1], "inlet": {"P": "1 atm", "vapour_fraction": 0},
                "outlet": {"P": "1 atm", "vapour_fraction": 1}}),
    );
    // IAPWS-IF97 latent heat at 1 atm, 40 652 J/mol (tests/fixtures/iapws_water_1atm.csv).
    assert!((f(&v, "duty_W") / 40_652.186 - 1.0).abs() < 0.01);
    assert!(v["dduty_dT_out_W_per_K"].is_null());
}

// ---------------------------------------------------------------------------------------
// curve

#[test]
fn curve_points_breakpoints_svg_and_csv() {
    let dir = tempfile::tempdir().unwrap();
    let svg = dir.path().join("curve.svg");
    let csv = dir.path().join("curve.csv");
    let out = bin()
        .args(["curve", "--json", "--points", "11", "--svg"])
        .arg(&svg)
        .arg("--csv")
        .arg(&csv)
        .arg(repo("examples/curve.json"))
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let points = v["points"].as_array().unwrap();
    assert_eq!(points.len(), 13, "11 points and the bubble and dew points");
    for p in points {
        for k in ["T_K", "duty_W", "vapour_fraction"] {
            assert!(p[k].is_number(), "{p}");
        }
    }
    let tb = f(&v, "bubble_T_K");
    let td = f(&v, "dew_T_K");
    assert!(tb < td);
    assert!(
        points
            .iter()
            .any(|p| p["breakpoint"] == "bubble" && (f(p, "T_K") - tb).abs() < 1e-9)
    );
    assert!(points.iter().any(|p| p["breakpoint"] == "dew"));
    assert!(points.windows(2).all(|w| f(&w[1], "duty_W") >= f(&w[0], "duty_W")));
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.starts_with("<svg") && text.trim_end().ends_with("</svg>"));
    for needle in [
        "bubble point",
        "dew point",
        "temperature [°C]",
        "cumulative duty [kW]",
        "Heating curve",
    ] {
        assert!(text.contains(needle), "the SVG lacks {needle}");
    }
    let rows = std::fs::read_to_string(&csv).unwrap();
    assert_eq!(rows.lines().count(), 14);
    assert!(rows.starts_with("T_K,T_degC,duty_W,vapour_fraction,breakpoint"));
}

#[test]
fn curve_default_points_and_from_a_duty() {
    let v = json_args(&["curve", repo("examples/curve.json").to_str().unwrap()]);
    assert_eq!(v["points"].as_array().unwrap().len(), 23);
    let v = json_stdin(
        &["curve"],
        &json!({"components": ["water"], "z": [1], "inlet": {"T": "20 degC", "P": "1 atm"},
                "outlet": {"P": "1 atm"}, "duty": "26 kW", "points": 5}),
    );
    let last = v["points"].as_array().unwrap().last().unwrap().clone();
    assert!((f(&last, "duty_W") / 26_000.0 - 1.0).abs() < 1e-6, "{last}");
    assert!(f(&last, "vapour_fraction") > 0.3 && f(&last, "vapour_fraction") < 0.7);
}

#[test]
fn cooling_curve_runs_downhill() {
    let v = json_stdin(
        &["curve"],
        &json!({"components": ["benzene", "toluene"], "z": [0.5, 0.5],
                "inlet": {"T": "130 degC", "P": "1 atm"}, "outlet": {"T": "60 degC", "P": "1 atm"}, "points": 6}),
    );
    assert!(f(&v, "duty_W") < 0.0);
    let pts = v["points"].as_array().unwrap();
    assert!(pts.windows(2).all(|w| f(&w[1], "T_K") <= f(&w[0], "T_K") + 1e-9));
}

// ---------------------------------------------------------------------------------------
// human-readable reports

#[test]
fn human_reports_have_tables_units_warnings_and_the_caution() {
    for (command, file) in [
        ("flash", "examples/flash_tp.json"),
        ("flash", "examples/flash_given_k.json"),
        ("bubble", "examples/bubble.json"),
        ("dew", "examples/dew.json"),
        ("duty", "examples/duty.json"),
        ("duty", "examples/duty_given.json"),
        ("curve", "examples/curve.json"),
    ] {
        let out = bin().arg(command).arg(repo(file)).output().unwrap();
        assert!(out.status.success(), "{file}: {}", String::from_utf8_lossy(&out.stderr));
        let text = String::from_utf8(out.stdout).unwrap();
        assert!(text.contains("Warnings"), "{file}");
        assert!(text.contains("qualified, licensed engineer"), "{file}");
        assert!(text.contains("estimates from ideal-mixture models"), "{file}");
        assert!(text.contains("-----"), "{file}: no table");
        if command != "flash" || file.contains("tp") {
            assert!(text.contains(" K (") && text.contains("kPa"), "{file}: no units");
        }
    }
    let out = bin().args(["duty"]).arg(repo("examples/duty.json")).output().unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Enthalpy table") && text.contains("kW") && text.contains("latent"));
    // A warning reaches the human report.
    let out = bin()
        .args(["flash", "-"])
        .write_stdin(r#"{"components": ["benzene", "toluene"], "z": [0.5, 0.5], "T": "150 degC", "P": "8 bar"}"#)
        .output()
        .unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Raoult's law is commonly doubted"), "{text}");
}

#[test]
fn warnings_are_tagged_in_json() {
    let v = json_stdin(
        &["flash"],
        &json!({"components": ["benzene", "toluene"], "z": [0.5, 0.5], "T": "150 degC", "P": "8 bar"}),
    );
    let kinds: Vec<&str> = v["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["kind"].as_str().unwrap())
        .collect();
    assert!(kinds.contains(&"high-pressure"), "{kinds:?}");
    assert!(kinds.contains(&"correlation-extrapolated"), "{kinds:?}");
    assert!(v["warnings"][0]["message"].is_string());
}

// ---------------------------------------------------------------------------------------
// components, demo, help

#[test]
fn components_list_and_one_component_with_sources() {
    let out = bin().arg("components").output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("toluene") && text.contains("108-88-3") && text.contains("n-decane"));
    let v = json_args(&["components"]);
    assert!(v["count"].as_u64().unwrap() >= 31);
    assert!(v["components"].as_array().unwrap().iter().any(|c| c["name"] == "water"));

    let out = bin().args(["components", "108-88-3"]).output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    for needle in [
        "toluene",
        "critical temperature",
        "vapour pressure",
        "Sources cited",
        "valid",
        "licensed engineer",
    ] {
        assert!(text.contains(needle), "lacks {needle}: {text}");
    }
    let v = json_args(&["components", "Toluene"]);
    assert_eq!(v["component"]["name"], "toluene");
    let sources = v["sources"].as_object().unwrap();
    assert!(!sources.is_empty());
    let cited = v["component"]["vapour_pressure"]["source"].as_str().unwrap();
    assert!(sources.contains_key(cited));
    assert!(v["validity"]["vapour_pressure"]["min_K"].is_number());
}

#[test]
fn unknown_component_name_gets_suggestions() {
    let out = bin().args(["components", "tolune"]).output().unwrap();
    assert_error_output(&out, &["tolune", "toluene"]);
}

#[test]
fn demo_runs_the_invented_scenario() {
    let out = bin().arg("demo").output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    for needle in [
        "INVENTED",
        "preheater",
        "vaporiser",
        "Enthalpy table",
        "Duty:",
        "two-phase",
        "Warnings",
        "qualified, licensed engineer",
        "n-pentane",
        "toluene",
    ] {
        assert!(text.contains(needle), "demo lacks {needle}");
    }
    let v = json_args(&["demo"]);
    assert_eq!(v["invented"], true);
    let steps = v["steps"].as_array().unwrap();
    assert!(steps.len() >= 2);
    assert!(f(&steps[0]["result"], "duty_W") > 0.0);
    assert!((f(&steps[1]["result"]["outlet"], "vapour_fraction") - 0.4).abs() < 1e-9);
}

#[test]
fn help_states_the_contract_and_the_caution() {
    let out = bin().arg("--help").output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    for needle in [
        "flash",
        "bubble",
        "dew",
        "duty",
        "curve",
        "check",
        "components",
        "demo",
        "Exit codes",
        "estimates from ideal-mixture models",
        "qualified, licensed engineer",
        "vapour_fraction",
    ] {
        assert!(text.contains(needle), "--help lacks {needle}");
    }
    bin()
        .arg("--version")
        .assert()
        .success()
        .stdout(predicate::str::contains("flashduty"));
    bin()
        .args(["flash", "--help"])
        .assert()
        .success()
        .stdout(predicate::str::contains("--batch"));
}

// ---------------------------------------------------------------------------------------
// check

fn check_sheet_text() -> String {
    std::fs::read_to_string(repo("examples/check_sheet.csv")).unwrap()
}

#[test]
fn example_check_sheet_passes() {
    let out = bin()
        .arg("check")
        .arg(repo("examples/check_sheet.csv"))
        .output()
        .unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    assert_eq!(out.status.code(), Some(0), "{text}");
    let last = text.trim_end().lines().last().unwrap();
    let re_ok = last.ends_with(" passed, 0 failed") && last.split(' ').next().unwrap().parse::<usize>().is_ok();
    assert!(re_ok, "summary line: {last:?}");
    assert!(text.contains("bubble-water") && text.contains("pass"));
}

#[test]
fn altered_check_sheet_fails_and_names_the_row() {
    let dir = tempfile::tempdir().unwrap();
    let altered = check_sheet_text().replace(
        "bubble-toluene,bubble,toluene,1,,1 atm,,,,,,,,,,,383.78,",
        "bubble-toluene,bubble,toluene,1,,1 atm,,,,,,,,,,,385.78,",
    );
    assert_ne!(
        altered,
        check_sheet_text(),
        "the example sheet changed: update this test"
    );
    let line = altered.lines().position(|l| l.starts_with("bubble-toluene")).unwrap() + 1;
    let path = dir.path().join("altered.csv");
    std::fs::write(&path, &altered).unwrap();
    let junit = dir.path().join("junit.xml");
    let out = check_with_junit(&path, &junit);
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains(&format!("row {line} (bubble-toluene)")), "{text}");
    assert!(text.trim_end().ends_with("passed, 1 failed"), "{text}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    well_formed(&xml);
    assert!(xml.contains("failures=\"1\"") && xml.contains("<failure"));
}

#[test]
fn check_rows_of_every_command_and_output_keys() {
    let sheet = "\
id,command,components,z,K,T,P [kPa],vapour_fraction,flow,inlet.T [degC],inlet.P [atm],outlet.T [degC],outlet.P [atm],duty,expect.phase,expect.x.0,expect.y.n-hexane,expect.outlet.vapour_fraction,tol.outlet.vapour_fraction,expect.points.0.duty_W,tol.points.0.duty_W,expect.T_K [degC],tol.T_K [degC],expect.duty_W [kW],rtol.duty_W
k,flash,,0.5;0.5,2;0.5,,,,,,,,,,two-phase,0.3333333333333333,,,,,,,,,
b,bubble,n-hexane;n-heptane,0.5;0.5,,,101.325,,,,,,,,liquid,0.5,,,,,,80.6,0.1,,
d,duty,water,1,,,,,1,20,1,,1,26 kW,,,,0.49,0.02,,,,,26,1e-9
c,curve,water,1,,,,,,20,1,120,1,,,,,,,0,0,,,,
";
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sheet.csv");
    std::fs::write(&path, sheet).unwrap();
    let out = bin().arg("check").arg(&path).arg("--json").output().unwrap();
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(out.status.code(), Some(0), "{v:#}");
    assert_eq!(v["passed"], 4);
    assert_eq!(v["failed"], 0);
}

#[test]
fn malformed_rows_fail_without_stopping_the_others() {
    let sheet = "\
id,command,components,z,P,expect.T_K,tol.T_K
good,bubble,water,1,1 atm,373.12,0.25
typo,bubble,watter,1,1 atm,373.12,0.25
badunit,bubble,water,1,1 furlong,373.12,0.25
short,bubble,water
badcommand,boil,water,1,1 atm,373.12,0.25
nocommand,,water,1,1 atm,373.12,0.25
nokey,bubble,water,1,1 atm,373.12,0.25
";
    let sheet = sheet.replace(
        "nokey,bubble,water,1,1 atm,373.12,0.25",
        "good2,bubble,water,1,1 atm,373.12,0.25",
    );
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sheet.csv");
    std::fs::write(&path, &sheet).unwrap();
    let junit = dir.path().join("j.xml");
    let out = check_with_junit(&path, &junit);
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.trim_end().ends_with("2 passed, 5 failed"), "{text}");
    for needle in [
        "row 3 (typo)",
        "watter",
        "row 4 (badunit)",
        "furlong",
        "row 5 (short)",
        "row 6 (badcommand)",
        "row 7 (nocommand)",
    ] {
        assert!(text.contains(needle), "lacks {needle}: {text}");
    }
    well_formed(&std::fs::read_to_string(&junit).unwrap());
}

#[test]
fn check_compares_text_null_and_missing_keys() {
    let sheet = "\
command,components,z,T,P,expect.phase,expect.y,expect.nonsense,expect.x
flash,water,1,300,1 atm,LIQUID,null,,
flash,water,1,300,1 atm,liquid,,1,
flash,water,1,300,1 atm,liquid,,,0.5
";
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sheet.csv");
    std::fs::write(&path, sheet).unwrap();
    let out = bin().arg("check").arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("the output has no key 'nonsense'"), "{text}");
    assert!(text.contains("name one entry"), "{text}");
    assert!(text.trim_end().ends_with("1 passed, 2 failed"), "{text}");
}

#[test]
fn junit_escapes_markup() {
    let sheet = "id,command,components,z,P,expect.T_K\n\"a<b & \"\"c\"\"\",bubble,water,1,1 atm,1\n";
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sheet <&>.csv");
    std::fs::write(&path, sheet).unwrap();
    let junit = dir.path().join("j.xml");
    let out = check_with_junit(&path, &junit);
    assert_eq!(out.status.code(), Some(1));
    let xml = std::fs::read_to_string(&junit).unwrap();
    well_formed(&xml);
    assert!(xml.contains("a&lt;b &amp; &quot;c&quot;"), "{xml}");
}

#[test]
fn check_file_level_errors_exit_2() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        ("command,components,Temp\nflash,water,300\n", vec!["Temp", "'T'"]),
        ("components,z\nwater,1\n", vec!["command"]),
        ("command,tol.T_K\nflash,1\n", vec!["tol.T_K", "expect.T_K"]),
        ("", vec!["no header"]),
        ("command,T [degC\nflash,1\n", vec!["T [degC"]),
        ("command,z,z\nflash,1,1\n", vec!["repeats"]),
    ];
    for (i, (text, needles)) in cases.iter().enumerate() {
        let path = dir.path().join(format!("s{i}.csv"));
        std::fs::write(&path, text).unwrap();
        let out = bin().arg("check").arg(&path).output().unwrap();
        assert_error_output(&out, needles);
    }
    let out = bin().args(["check", "/no/such/sheet.csv"]).output().unwrap();
    assert_error_output(&out, &["/no/such/sheet.csv"]);
}

/// A small XML well-formedness check: one root, balanced tags, quoted attributes, and no
/// bare '<' or '&' in text or attributes.
fn well_formed(xml: &str) {
    let body = xml
        .strip_prefix("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n")
        .expect("XML declaration");
    let mut stack: Vec<String> = Vec::new();
    let mut rest = body;
    let mut roots = 0;
    let entity_ok = |s: &str| {
        let mut it = s.split('&').skip(1);
        it.all(|p| {
            ["amp;", "lt;", "gt;", "quot;", "apos;"]
                .iter()
                .any(|e| p.starts_with(e))
        })
    };
    while let Some(open) = rest.find('<') {
        let text = &rest[..open];
        assert!(entity_ok(text), "bad entity in text {text:?}");
        assert!(!text.contains('>') || stack.is_empty(), "bare '>' in text {text:?}");
        let close = rest[open..].find('>').expect("unclosed tag") + open;
        let tag = &rest[open + 1..close];
        assert!(!tag.contains('<'), "'<' inside a tag: {tag:?}");
        if let Some(name) = tag.strip_prefix('/') {
            assert_eq!(stack.pop().as_deref(), Some(name.trim()), "mismatched </{name}>");
        } else {
            let self_closing = tag.ends_with('/');
            let inner = tag.trim_end_matches('/');
            let name = inner.split_whitespace().next().expect("tag name").to_string();
            let attrs = &inner[name.len()..];
            assert_eq!(attrs.matches('"').count() % 2, 0, "unbalanced quotes in {tag:?}");
            assert!(entity_ok(attrs), "bad entity in attributes {attrs:?}");
            if stack.is_empty() {
                roots += 1;
            }
            if !self_closing {
                stack.push(name);
            }
        }
        rest = &rest[close + 1..];
    }
    assert!(stack.is_empty(), "unclosed {stack:?}");
    assert!(rest.trim().is_empty());
    assert_eq!(roots, 1, "one root element");
}

// ---------------------------------------------------------------------------------------
// batch

#[test]
fn batch_writes_every_row_in_order_with_errors() {
    let out = bin()
        .args(["flash", "--batch"])
        .arg(repo("examples/batch_flash.csv"))
        .output()
        .unwrap();
    // Some rows fail on purpose: every row is written, and the exit code is 1.
    assert_eq!(out.status.code(), Some(1), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let headers = reader.headers().unwrap().clone();
    for k in [
        "row",
        "id",
        "phase",
        "vapour_fraction",
        "T_K",
        "P_Pa",
        "x",
        "y",
        "K",
        "warnings",
        "error",
    ] {
        assert!(headers.iter().any(|h| h == k), "no column {k}");
    }
    let rows: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    let input_rows = std::fs::read_to_string(repo("examples/batch_flash.csv"))
        .unwrap()
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .count()
        - 1;
    assert_eq!(rows.len(), input_rows);
    let col = |name: &str| headers.iter().position(|h| h == name).unwrap();
    let ids: Vec<&str> = rows.iter().map(|r| &r[col("id")]).collect();
    assert_eq!(ids[0], "hx-70");
    assert_eq!(*ids.last().unwrap(), "typo-row");
    let last = rows.last().unwrap();
    assert!(last[col("error")].contains("n-hexan"));
    assert!(rows[3][col("error")].is_empty());
    assert_eq!(&rows[3][col("phase")], "two-phase");
}

#[test]
fn batch_json_lines_and_output_file() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("out.jsonl");
    bin()
        .args(["flash", "--json", "--batch"])
        .arg(repo("examples/batch_flash.csv"))
        .arg("--output")
        .arg(&path)
        .assert()
        .code(1)
        .stdout(predicate::str::is_empty());
    let text = std::fs::read_to_string(&path).unwrap();
    let lines: Vec<Value> = text.lines().map(|l| serde_json::from_str(l).unwrap()).collect();
    assert_eq!(lines.len(), 9);
    assert!(lines[0]["error"].is_null());
    assert!(lines[8]["error"].as_str().unwrap().contains("unknown component"));
    let rows: Vec<u64> = lines.iter().map(|l| l["row"].as_u64().unwrap()).collect();
    assert!(rows.windows(2).all(|w| w[0] < w[1]));
}

#[test]
fn duty_batch() {
    let sheet = "\
id,components,z,flow,inlet.T [degC],inlet.P,outlet.T [degC],outlet.P,duty
a,water,1,1,20,1 atm,95,1 atm,
b,water,1,1,20,1 atm,,1 atm,26 kW
c,water,1,1,20,1 atm,,,
";
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("duty.csv");
    std::fs::write(&path, sheet).unwrap();
    let out = bin().args(["duty", "--batch"]).arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(1), "row c fails");
    let text = String::from_utf8(out.stdout).unwrap();
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let headers = reader.headers().unwrap().clone();
    let rows: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 3);
    let col = |name: &str| headers.iter().position(|h| h == name).unwrap();
    assert!(rows[0][col("duty_W")].parse::<f64>().unwrap() > 0.0);
    assert_eq!(&rows[1][col("outlet.phase")], "two-phase");
    assert!(rows[2][col("error")].contains("outlet"));
}

// ---------------------------------------------------------------------------------------
// user components and fits

#[test]
fn user_component_file_extends_the_library() {
    let out = bin()
        .arg("--components")
        .arg(repo("examples/user_component.json"))
        .args(["bubble", "--json"])
        .arg(repo("examples/user_component_case.json"))
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["components"][0], "exampleane");
    // Without the file the component is unknown.
    let out = bin()
        .arg("bubble")
        .arg(repo("examples/user_component_case.json"))
        .output()
        .unwrap();
    assert_error_output(&out, &["exampleane"]);
    // A broken component file is named.
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad.json");
    std::fs::write(
        &bad,
        "{\"schema\": \"flashduty-components/1\", \"components\": [{\"name\": \"x\"}]}",
    )
    .unwrap();
    let out = bin().arg("--components").arg(&bad).arg("components").output().unwrap();
    assert_error_output(&out, &["bad.json"]);
}

#[test]
fn fit_vapour_pressure_and_heat_capacity() {
    let out = bin()
        .args(["fit", "--property", "vapour-pressure"])
        .arg(repo("examples/invented_vapour_pressure.csv"))
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Antoine") && text.contains("deviation") && text.contains("licensed engineer"));
    let v = json_args(&[
        "fit",
        "--property",
        "heat-capacity",
        "--degree",
        "1",
        repo("examples/invented_liquid_cp.csv").to_str().unwrap(),
    ]);
    let a = v["constants"]["a"].as_f64().unwrap();
    let b = v["constants"]["b"].as_f64().unwrap();
    // The invented data scatter about Cp = 150 + 0.15 T.
    assert!((a - 150.0).abs() < 2.0 && (b - 0.15).abs() < 0.01, "{v}");
    let v = json_args(&[
        "fit",
        "--property",
        "vapour-pressure",
        "--form",
        "extended",
        "--exponent",
        "2",
        repo("examples/invented_vapour_pressure.csv").to_str().unwrap(),
    ]);
    assert!(v["constants"]["E"].as_f64().unwrap() == 2.0);
}

#[test]
fn fit_component_sheet_writes_a_usable_component_file() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("exampleane-lab.json");
    let out = bin()
        .args(["fit", "--component"])
        .arg(repo("examples/component_sheet.toml"))
        .arg("--write")
        .arg(&file)
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Consistency checks") && text.contains("pass"), "{text}");
    let v = json_stdin(
        &["--components", file.to_str().unwrap(), "bubble"],
        &json!({"components": ["exampleane-lab"], "z": [1], "P": "1 atm"}),
    );
    // The invented data put the normal boiling point at 350 K.
    assert!((f(&v, "T_K") - 350.0).abs() < 0.5, "{v}");
}

#[test]
fn fit_errors_exit_2() {
    let out = bin()
        .args(["fit", "--property", "vapour-pressure", "/no/such.csv"])
        .output()
        .unwrap();
    assert_error_output(&out, &["/no/such.csv"]);
    let out = bin()
        .args(["fit", "--property", "vapour-pressure", "--form", "extended"])
        .arg(repo("examples/invented_vapour_pressure.csv"))
        .output()
        .unwrap();
    assert_error_output(&out, &["exponent"]);
    let dir = tempfile::tempdir().unwrap();
    let data = dir.path().join("d.csv");
    std::fs::write(&data, "T [K], P [Pa]\n300, 1000\n310, abc\n").unwrap();
    let out = bin()
        .args(["fit", "--property", "vapour-pressure"])
        .arg(&data)
        .output()
        .unwrap();
    assert_error_output(&out, &["abc"]);
    let sheet = dir.path().join("s.toml");
    std::fs::write(&sheet, "name = \"x\"\nnmae = \"y\"\n").unwrap();
    let out = bin().args(["fit", "--component"]).arg(&sheet).output().unwrap();
    assert_error_output(&out, &["nmae", "name"]);
}

// ---------------------------------------------------------------------------------------
// bad input: exit 2, one line naming the field and value, never a panic

#[test]
fn malformed_json() {
    fails("flash", "{\"components\": [\"water\"", &["malformed JSON", "line"]);
    fails("flash", "", &["empty"]);
    fails("flash", "[1, 2]", &["object"]);
    fails("flash", "\"water\"", &["object"]);
}

#[test]
fn unknown_component_with_suggestions() {
    fails(
        "flash",
        r#"{"components": ["benzene", "tolune"], "z": [0.5, 0.5], "T": 350, "P": 1e5}"#,
        &["components[1]", "tolune", "did you mean", "toluene"],
    );
}

#[test]
fn unknown_units() {
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": "300 degK", "P": 1e5}"#,
        &["T", "degK", "degC"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": "1 psig"}"#,
        &["P", "psig", "psia"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "flow": "3 furlongs/h"}"#,
        &["flow", "furlongs"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"P": 1e5}, "duty": "3 horsepower"}"#,
        &["duty", "horsepower"],
    );
}

#[test]
fn bad_mole_fractions() {
    fails(
        "flash",
        r#"{"components": ["water", "methanol"], "z": [-0.2, 1.2], "T": 300, "P": 1e5}"#,
        &["z[0]", "-0.2", "negative"],
    );
    fails(
        "flash",
        r#"{"components": ["water", "methanol"], "z": [0.5, 0.4], "T": 300, "P": 1e5}"#,
        &["z", "0.9", "sum"],
    );
    fails(
        "flash",
        r#"{"components": ["water", "methanol"], "z": [1.0], "T": 300, "P": 1e5}"#,
        &["z", "1 mole fractions", "2 components"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [0.5, 0.5], "T": 300, "P": 1e5}"#,
        &["z", "2 mole fractions"],
    );
    fails(
        "flash",
        r#"{"components": [], "z": [], "T": 300, "P": 1e5}"#,
        &["components", "empty"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [], "T": 300, "P": 1e5}"#,
        &["z", "empty"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": ["abc"], "T": 300, "P": 1e5}"#,
        &["z[0]", "abc"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "flows": [1], "T": 300, "P": 1e5}"#,
        &["z and flows"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "T": 300, "P": 1e5}"#,
        &["z", "missing"],
    );
    fails("flash", r#"{"z": [1], "T": 300, "P": 1e5}"#, &["components", "missing"]);
    fails(
        "flash",
        r#"{"components": ["water", "H2O"], "z": [0.5, 0.5], "T": 300, "P": 1e5}"#,
        &["components[1]", "water"],
    );
    fails(
        "flash",
        r#"{"components": ["water", "methanol"], "flows": [-1, 2], "T": 300, "P": 1e5}"#,
        &["flows[0]", "negative"],
    );
    fails(
        "flash",
        r#"{"components": ["water", "methanol"], "flows": [0, 0], "T": 300, "P": 1e5}"#,
        &["flows", "zero"],
    );
    fails(
        "flash",
        r#"{"z": [0.5, 0.5], "K": [2, -1]}"#,
        &["K[1]", "-1", "negative"],
    );
    fails("flash", r#"{"z": [0.5, 0.5], "K": [2]}"#, &["K", "1 K-values"]);
    fails(
        "flash",
        r#"{"components": "water", "z": [1], "T": 300, "P": 1e5}"#,
        &["components", "list"],
    );
}

#[test]
fn bad_pressures_and_temperatures() {
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 0}"#,
        &["P", "0", "zero"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": "-2 bar"}"#,
        &["P", "-2 bar"],
    );
    fails(
        "bubble",
        r#"{"components": ["water"], "z": [1], "P": "-1 atm"}"#,
        &["P", "-1 atm"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": -5, "P": 1e5}"#,
        &["T", "-5", "absolute zero"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": "-300 degC", "P": 1e5}"#,
        &["T", "-300 degC"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": "NaN", "P": 1e5}"#,
        &["T", "NaN"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": "inf Pa"}"#,
        &["P", "not finite"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 1e300, "P": 1e5}"#,
        &["T", "1e300"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e300}"#,
        &["P", "1e300"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": "abc", "P": 1e5}"#,
        &["T", "abc"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": true, "P": 1e5}"#,
        &["T", "true"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": ["NaN"], "T": 300, "P": 1e5}"#,
        &["z[0]", "NaN"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "flow": 0}"#,
        &["flow", "0"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "flow": "1e400 mol/s"}"#,
        &["flow"],
    );
    // TOML admits nan and inf literals.
    let out = bin()
        .args(["flash", "-"])
        .write_stdin("components = [\"water\"]\nz = [1]\nT = nan\nP = 1e5\n")
        .output()
        .unwrap();
    assert_error_output(&out, &["T", "NaN"]);
}

#[test]
fn bad_vapour_fractions() {
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "vapour_fraction": 1.5}"#,
        &["vapour_fraction", "1.5", "[0, 1]"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "P": 1e5, "vapour_fraction": -0.1}"#,
        &["vapour_fraction", "-0.1"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"P": 1e5, "vapour_fraction": 2}, "outlet": {"T": 400, "P": 1e5}}"#,
        &["inlet.vapour_fraction", "2"],
    );
}

#[test]
fn unknown_and_unused_keys() {
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "temperature": 3}"#,
        &["temperature", "did you mean 'T'"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "vapor_fraction": 3}"#,
        &["vapor_fraction", "vapour_fraction"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5, "Pressure": 2}, "outlet": {"T": 400, "P": 1e5}}"#,
        &["inlet.Pressure", "inlet.P"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"T": 400, "P": 1e5}, "reference": {"phase": "liquid", "temp": 300}}"#,
        &["reference.temp"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "duty": 5}"#,
        &["duty", "not used by the flash command"],
    );
    fails(
        "bubble",
        r#"{"components": ["water"], "z": [1], "P": 1e5, "vapour_fraction": 0.5}"#,
        &["vapour_fraction", "bubble"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "T": 300}"#,
        &["T", "inlet.T"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "points": 5}"#,
        &["points"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"T": 400, "P": 1e5}, "path": "scenic"}"#,
        &["path", "scenic", "boiling-point"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"T": 400, "P": 1e5}, "reference": {"phase": "plasma"}}"#,
        &["reference.phase", "plasma"],
    );
}

#[test]
fn missing_or_contradictory_specifications() {
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300}"#,
        &["two of T, P and vapour_fraction"],
    );
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "vapour_fraction": 0.5}"#,
        &["two of"],
    );
    fails("bubble", r#"{"components": ["water"], "z": [1]}"#, &["give T or P"]);
    fails(
        "dew",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5}"#,
        &["not both"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "outlet": {"T": 400, "P": 1e5}}"#,
        &["inlet", "missing"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}}"#,
        &["outlet", "missing"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"T": 400, "P": 1e5}, "duty": "1 kW"}"#,
        &["outlet", "outlet.P only"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"P": 1e5}, "duty": "1e30 W"}"#,
        &["duty", "cannot be reached"],
    );
    fails(
        "flash",
        r#"{"z": [0.5, 0.5], "K": [2, 0.5], "vapour_fraction": 0.5}"#,
        &["vapour_fraction", "K"],
    );
    fails(
        "curve",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"T": 400, "P": 1e5}, "points": 1}"#,
        &["points", "1"],
    );
}

#[test]
fn missing_files_and_bad_arguments() {
    let out = bin().args(["flash", "/no/such/case.json"]).output().unwrap();
    assert_error_output(&out, &["/no/such/case.json"]);
    let out = bin().args(["flash", "--batch", "/no/such/rows.csv"]).output().unwrap();
    assert_error_output(&out, &["/no/such/rows.csv"]);
    let out = bin().arg("flash").output().unwrap();
    assert_error_output(&out, &["CASE"]);
    let out = bin().arg("frobnicate").output().unwrap();
    assert_error_output(&out, &["frobnicate"]);
    let out = bin().output().unwrap();
    assert_error_output(&out, &["command"]);
    let out = bin()
        .args(["curve", "--points", "0"])
        .arg(repo("examples/curve.json"))
        .output()
        .unwrap();
    assert_error_output(&out, &["--points", "0"]);
    let out = bin().args(["flash", "--bogus", "x.json"]).output().unwrap();
    assert_error_output(&out, &["--bogus"]);
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("case.json");
    std::fs::write(&bad, [0xff, 0xfe, 0x00]).unwrap();
    let out = bin().arg("flash").arg(&bad).output().unwrap();
    assert_error_output(&out, &["UTF-8"]);
    let out = bin()
        .args(["curve", "--svg", "/no/such/dir/c.svg"])
        .arg(repo("examples/curve.json"))
        .output()
        .unwrap();
    assert_error_output(&out, &["/no/such/dir/c.svg"]);
}

#[test]
fn every_example_case_runs() {
    for (command, file) in [
        ("flash", "examples/flash_tp.json"),
        ("flash", "examples/flash_tp.toml"),
        ("flash", "examples/flash_p_vapour_fraction.json"),
        ("flash", "examples/flash_t_vapour_fraction.json"),
        ("flash", "examples/flash_given_k.json"),
        ("bubble", "examples/bubble.json"),
        ("bubble", "examples/bubble_t.json"),
        ("dew", "examples/dew.json"),
        ("duty", "examples/duty.json"),
        ("duty", "examples/duty_given.json"),
        ("curve", "examples/curve.json"),
    ] {
        let text = std::fs::read_to_string(repo(file)).unwrap();
        assert!(text.contains("INVENTED"), "{file} is not marked as invented");
        let v = json_args(&[command, repo(file).to_str().unwrap()]);
        assert_eq!(v["command"], command, "{file}");
    }
}

/// A flow unit that is neither molar nor mass is refused with both lists of accepted units,
/// for the total flow and for a component flow alike; a mass flow is accepted for both.
#[test]
fn unknown_flow_units_name_both_unit_lists() {
    let total = r#"{"components": ["n-hexane", "toluene"], "z": [0.6, 0.4], "flow": "1200 furlongs/h",
        "inlet": {"T": "25 degC", "P": "1.5 bar"}, "outlet": {"T": "95 degC", "P": "1.5 bar"}}"#;
    fails("duty", total, &["flow", "furlongs/h", "molar: mol/s", "mass: kg/s"]);
    let component = r#"{"components": ["n-hexane", "toluene"], "flows": ["3 furlongs/h", "1 kmol/h"],
        "inlet": {"T": "25 degC", "P": "1.5 bar"}, "outlet": {"T": "95 degC", "P": "1.5 bar"}}"#;
    fails(
        "duty",
        component,
        &["flows", "furlongs/h", "molar: mol/s", "mass: kg/s"],
    );
    let mass = json!({"components": ["n-hexane", "toluene"], "flows": ["300 kg/h", "1 kmol/h"],
        "inlet": {"T": "25 degC", "P": "1.5 bar"}, "outlet": {"T": "95 degC", "P": "1.5 bar"}});
    let v = json_stdin(&["duty"], &mass);
    // n-hexane, M = 86.18 g/mol (CRC Handbook, from memory): 300 kg/h is 0.967 mol/s.
    let expected = 300.0 / 3600.0 / 0.08618 + 1000.0 / 3600.0;
    assert!((f(&v, "flow_mol_s") - expected).abs() < 1e-3, "{v}");
}

// ---------------------------------------------------------------------------------------
// vapour model

fn steam_case(extra: Value) -> Value {
    let mut c = json!({"components": ["water"], "z": [1],
        "inlet": {"T": "105 degC", "P": "1 atm"}, "outlet": {"T": "150 degC", "P": "1 atm"}});
    if let (Value::Object(m), Value::Object(e)) = (&mut c, extra) {
        m.extend(e);
    }
    c
}

/// `vapour_model` is read by the duty and curve commands, used, and echoed in their JSON;
/// the table's departure column adds up with the rest to the duty, and the text report
/// shows it only under the second virial. Steam 105 → 150 °C at 1 atm: IAPWS-IF97 gives
/// 1631.8 J/mol (tests/fixtures/iapws_water_1atm.csv); the second virial comes within 4 %.
#[test]
fn vapour_model_is_used_and_echoed() {
    let ideal = json_stdin(&["duty"], &steam_case(json!({})));
    let real = json_stdin(&["duty"], &steam_case(json!({"vapour_model": "second-virial"})));
    assert_eq!(ideal["vapour_model"], "ideal-gas");
    assert_eq!(real["vapour_model"], "second-virial");
    assert!((f(&real, "duty_W") / 1631.8 - 1.0).abs() < 0.04, "{}", real["duty_W"]);
    assert!(f(&real, "duty_W") > f(&ideal, "duty_W"));
    let mut sum = 0.0;
    for row in real["table"].as_array().unwrap() {
        let parts = f(row, "liquid_sensible_J_per_mol")
            + f(row, "latent_J_per_mol")
            + f(row, "vapour_sensible_J_per_mol")
            + f(row, "vapour_departure_J_per_mol");
        assert!((parts - f(row, "h_J_per_mol")).abs() < 1e-6 * f(row, "h_J_per_mol").abs().max(1.0));
        assert!(f(row, "vapour_departure_J_per_mol") != 0.0);
        sum += if row["state"] == "outlet" { 1.0 } else { -1.0 } * f(row, "enthalpy_flow_W");
    }
    assert!((sum - f(&real, "duty_W")).abs() < 1e-6 * f(&real, "duty_W"));
    for row in ideal["table"].as_array().unwrap() {
        assert_eq!(f(row, "vapour_departure_J_per_mol"), 0.0);
    }
    // TOML, and the curve command.
    let toml = "components = [\"water\"]\nz = [1]\nvapour_model = \"second-virial\"\n\
                inlet = { T = \"105 degC\", P = \"1 atm\" }\noutlet = { T = \"150 degC\", P = \"1 atm\" }\n";
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("steam.toml");
    std::fs::write(&path, toml).unwrap();
    let t = json_args(&["duty", path.to_str().unwrap()]);
    assert_eq!(f(&t, "duty_W"), f(&real, "duty_W"));
    let curve = json_stdin(&["curve"], &steam_case(json!({"vapour_model": "second-virial"})));
    assert_eq!(curve["vapour_model"], "second-virial");
    assert!((f(&curve, "duty_W") - f(&real, "duty_W")).abs() < 1e-9 * f(&real, "duty_W"));
    // Human-readable reports.
    let text = |case: &Value| {
        let out = bin()
            .args(["duty", "-"])
            .write_stdin(case.to_string())
            .output()
            .unwrap();
        assert!(out.status.success());
        String::from_utf8(out.stdout).unwrap()
    };
    let t_real = text(&steam_case(json!({"vapour_model": "second-virial"})));
    assert!(
        t_real.contains("vap. departure") && t_real.contains("vapour: second virial"),
        "{t_real}"
    );
    let t_ideal = text(&steam_case(json!({})));
    assert!(
        !t_ideal.contains("vap. departure") && t_ideal.contains("vapour: ideal gas"),
        "{t_ideal}"
    );
}

/// A bad `vapour_model` is refused with exit 2 and one line naming the field, the value and
/// the choices; a command that does not take it says so.
#[test]
fn bad_vapour_model_is_refused() {
    let bad = steam_case(json!({"vapour_model": "real-gas"})).to_string();
    fails(
        "duty",
        &bad,
        &["vapour_model", "'real-gas'", "ideal-gas", "second-virial"],
    );
    let number = steam_case(json!({"vapour_model": 2})).to_string();
    fails("curve", &number, &["vapour_model", "2", "is not one of"]);
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "vapour_model": "second-virial"}"#,
        &["vapour_model", "not used by the flash command"],
    );
}

/// A spreadsheet column `vapour_model` chooses the model row by row in a batch.
#[test]
fn vapour_model_column_in_a_batch() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("steam.csv");
    std::fs::write(
        &path,
        "command,id,components,z,inlet.T [degC],inlet.P [atm],outlet.T [degC],outlet.P [atm],vapour_model\n\
         duty,ideal,water,1,105,1,150,1,ideal-gas\n\
         duty,real,water,1,105,1,150,1,second-virial\n\
         duty,bad,water,1,105,1,150,1,virial\n",
    )
    .unwrap();
    let out = bin().args(["duty", "--batch"]).arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(1), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let headers = reader.headers().unwrap().clone();
    let col = |name: &str| headers.iter().position(|h| h == name).unwrap();
    let rows: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    let duty = |r: &csv::StringRecord| r[col("duty_W")].parse::<f64>().unwrap();
    assert!(duty(&rows[1]) > duty(&rows[0]));
    assert!(
        rows[2][col("error")].contains("vapour_model: 'virial'"),
        "{:?}",
        rows[2]
    );
}

/// The keys `--help` and docs/CLI.md list are those of the library's one case schema
/// (`flashduty::case::TOP_KEYS`), in both directions for the help.
#[test]
fn help_and_contract_list_the_schema_keys() {
    let out = bin().arg("--help").output().unwrap();
    let help = String::from_utf8(out.stdout).unwrap();
    let section: Vec<&str> = help
        .lines()
        .skip_while(|l| !l.starts_with("A case file is"))
        .skip(1)
        .take_while(|l| !l.starts_with("Unknown keys"))
        .collect();
    let mut listed: Vec<String> = Vec::new();
    for line in &section {
        let Some(head) = line.strip_prefix("  ") else { continue };
        if head.starts_with(' ') {
            continue;
        }
        let names = head.split("  ").next().unwrap_or("");
        for name in names.split([',', '|']) {
            listed.push(name.trim().to_string());
        }
    }
    let schema: Vec<String> = flashduty::case::TOP_KEYS.iter().map(|k| k.to_string()).collect();
    for key in &schema {
        assert!(listed.contains(key), "--help does not list '{key}': {listed:?}");
    }
    for key in &listed {
        assert!(
            schema.contains(key),
            "--help lists '{key}', which the schema does not have"
        );
    }
    let contract = std::fs::read_to_string(repo("docs/CLI.md")).unwrap();
    for key in &schema {
        assert!(
            contract.contains(&format!("`{key}`")),
            "docs/CLI.md does not name `{key}`"
        );
    }
}

/// `water_phase` through the tool: a wet toluene bubble point with two liquids, the
/// example condenser curve with both dew points, and bad values refused with exit 2 and one
/// line naming the field. Boiling point of the water–toluene heterogeneous azeotrope at
/// 1 atm: 84.1 °C (CRC azeotrope table, from memory).
#[test]
fn water_phase_through_the_tool() {
    let case = json!({"components": ["water", "toluene"], "z": [0.3, 0.7], "P": "1 atm", "water_phase": "immiscible"});
    let v = json_stdin(&["bubble"], &case);
    assert!((f(&v, "T_K") - 273.15 - 84.1).abs() < 1.0, "{v}");
    assert_eq!(v["phase_set"], "organic+aqueous");
    let v = json_args(&["curve", repo("examples/water_toluene_condenser.json").to_str().unwrap()]);
    assert!(v["water_dew_T_K"].as_f64().unwrap() > v["organic_dew_T_K"].as_f64().unwrap());
    let text = bin()
        .args(["curve", repo("examples/water_toluene_condenser.json").to_str().unwrap()])
        .output()
        .unwrap();
    let text = String::from_utf8(text.stdout).unwrap();
    assert!(text.contains("water-dew") && text.contains("organic-dew"), "{text}");
    fails(
        "bubble",
        r#"{"components": ["water", "toluene"], "z": [0.3, 0.7], "P": 1e5, "water_phase": "two-liquids"}"#,
        &["water_phase", "'two-liquids'", "immiscible"],
    );
    fails(
        "bubble",
        r#"{"components": ["benzene", "toluene"], "z": [0.3, 0.7], "P": 1e5, "water_phase": "immiscible"}"#,
        &["water_phase", "no water"],
    );
    fails(
        "flash",
        r#"{"components": ["water", "methanol"], "z": [0.3, 0.7], "T": 330, "P": 1e5, "water_phase": "immiscible"}"#,
        &["water_phase", "'methanol'", "miscible"],
    );
    fails(
        "bubble",
        r#"{"components": ["water", "toluene"], "z": [0.3, 0.7], "P": 1e5, "water_phase": {"model": "immiscible", "water_in_organic": 2}}"#,
        &["water_phase.water_in_organic", "2"],
    );
}

/// `--batch` writes every row and exits 1 when any row failed; a `check` sheet with no rows
/// is an error; with `--json` an error is one JSON object on stderr with kind, field and
/// message.
#[test]
fn batch_failures_exit_1_and_json_errors() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("rows.csv");
    std::fs::write(
        &path,
        "command,components,z,T,P\nflash,water,1,300,1e5\nflash,unobtainium,1,300,1e5\n",
    )
    .unwrap();
    let out = bin().args(["flash", "--batch"]).arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8(out.stdout).unwrap();
    assert_eq!(text.lines().count(), 3, "{text}");
    assert!(text.contains("unknown component 'unobtainium'"));
    std::fs::write(&path, "command,components,z,T,P\nflash,water,1,300,1e5\n").unwrap();
    let out = bin().args(["flash", "--batch"]).arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    std::fs::write(&path, "command,components,z,P,expect.T_K\n").unwrap();
    let out = bin().arg("check").arg(&path).output().unwrap();
    assert_error_output(&out, &["no rows"]);
    let out = bin()
        .args(["flash", "--json", "-"])
        .write_stdin(r#"{"components": ["water"], "z": [1], "T": "hot", "P": 1e5}"#)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8(out.stderr).unwrap();
    assert_eq!(stderr.trim_end().lines().count(), 1, "{stderr}");
    let v: Value = serde_json::from_str(stderr.trim()).unwrap();
    assert_eq!(v["error"]["kind"], "not-a-number");
    assert_eq!(v["error"]["field"], "T");
    assert!(v["error"]["message"].as_str().unwrap().contains("'hot'"));
    let out = bin().args(["flash", "--json", "--bogus"]).output().unwrap();
    let v: Value = serde_json::from_str(String::from_utf8(out.stderr).unwrap().trim()).unwrap();
    assert_eq!(v["error"]["kind"], "invalid-arguments");
}

/// A key given twice in a JSON case is refused naming the key (serde_json alone would keep
/// the last one silently); TOML refuses it already.
#[test]
fn duplicated_json_keys_are_refused() {
    fails(
        "flash",
        r#"{"components": ["water"], "z": [1], "T": 300, "P": 1e5, "T": 400}"#,
        &["key 'T' is given twice", "line 1"],
    );
    fails(
        "duty",
        r#"{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5, "P": 2e5}, "outlet": {"T": 400, "P": 1e5}}"#,
        &["key 'P' is given twice"],
    );
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("case.json");
    std::fs::write(
        &path,
        "{\"components\": [\"water\"],\n \"z\": [1],\n \"z\": [1], \"T\": 300, \"P\": 1e5}",
    )
    .unwrap();
    let out = bin().args(["flash", "--json"]).arg(&path).output().unwrap();
    let v: Value = serde_json::from_str(String::from_utf8(out.stderr).unwrap().trim()).unwrap();
    assert_eq!(v["error"]["kind"], "duplicate-key");
    assert_eq!(v["error"]["field"], "z");
    assert!(v["error"]["message"].as_str().unwrap().contains("line 3"), "{v}");
}

/// Multi-megabyte names, units, keys and sheet headers: one short line, quickly (no
/// did-you-mean search over them, the echoed value cut to its start and length).
#[test]
fn long_inputs_give_short_errors() {
    let long = "x".repeat(2_000_000);
    let cases = [
        json!({"components": [long.clone()], "z": [1], "T": 300, "P": 1e5}),
        json!({"components": ["water"], "z": [1], "T": format!("300 {long}"), "P": 1e5}),
        json!({"components": ["water"], "z": [1], "T": 300, "P": 1e5, long.clone(): 1}),
    ];
    for case in cases {
        let out = bin()
            .args(["flash", "-"])
            .write_stdin(case.to_string())
            .output()
            .unwrap();
        assert_error_output(&out, &["(2000000 characters)"]);
        assert!(out.stderr.len() < 1_000, "{} bytes", out.stderr.len());
    }
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("sheet.csv");
    std::fs::write(&path, format!("command,{long},z\nflash,1,1\n")).unwrap();
    let out = bin().args(["flash", "--batch"]).arg(&path).output().unwrap();
    assert_error_output(&out, &["(2000000 characters)"]);
    assert!(out.stderr.len() < 1_000, "{} bytes", out.stderr.len());
}

/// Spreadsheets read as they are: an .ods workbook (a sheet chosen by name), an .xlsx
/// workbook, semicolon-separated CSV with decimal commas, and a workbook written with the
/// results beside the inputs. The check sheet's expected values name their sources in
/// examples/check_sheet.csv.
#[test]
fn workbooks_and_european_csv() {
    // .ods (tests/fixtures/check_sheet.ods, made by tools/make_ods_fixture.py).
    let ods = repo("tests/fixtures/check_sheet.ods");
    let out = bin()
        .arg("check")
        .arg(&ods)
        .args(["--sheet", "checks"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stderr));
    assert!(String::from_utf8(out.stdout).unwrap().contains("23 passed, 0 failed"));
    let out = bin().arg("check").arg(&ods).args(["--sheet", "nope"]).output().unwrap();
    assert_error_output(&out, &["--sheet", "'nope'", "notes, checks"]);

    // .xlsx written here from the same rows (numbers as number cells).
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(repo("examples/check_sheet.csv")).unwrap();
    let mut book = rust_xlsxwriter::Workbook::new();
    let ws = book.add_worksheet();
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .comment(Some(b'#'))
        .from_reader(text.as_bytes());
    for (r, rec) in reader.records().enumerate() {
        for (c, cell) in rec.unwrap().iter().enumerate() {
            match cell.parse::<f64>() {
                Ok(x) => ws.write_number(r as u32, c as u16, x).unwrap(),
                Err(_) if cell.is_empty() => ws,
                Err(_) => ws.write_string(r as u32, c as u16, cell).unwrap(),
            };
        }
    }
    let xlsx = dir.path().join("checks.xlsx");
    book.save(&xlsx).unwrap();
    let out = bin().arg("check").arg(&xlsx).output().unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stderr));
    assert!(String::from_utf8(out.stdout).unwrap().contains("23 passed, 0 failed"));

    // Semicolon-separated CSV with decimal commas gives the comma file's numbers.
    let comma = "command,id,components,z,T [degC],P [bar]\nflash,a,benzene;toluene,0.4;0.6,95.5,1.01325\n";
    let semi = "command;id;components;z;T [degC];P [bar]\r\nflash;a;\"benzene;toluene\";\"0,4;0,6\";95,5;1,01325\r\n";
    let run = |body: &str, file: &str| {
        let p = dir.path().join(file);
        std::fs::write(&p, body).unwrap();
        let out = bin().args(["flash", "--batch"]).arg(&p).output().unwrap();
        assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stderr));
        String::from_utf8(out.stdout).unwrap()
    };
    let (a, b) = (run(comma, "comma.csv"), run(semi, "semi.csv"));
    assert_eq!(a, b);
    assert!(a.contains("two-phase"), "{a}");

    // A workbook out: the input columns, then the results.
    let out_path = dir.path().join("results.xlsx");
    let out = bin()
        .args(["flash", "--batch"])
        .arg(repo("examples/batch_flash.csv"))
        .arg("--output")
        .arg(&out_path)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1), "some rows of the example fail on purpose");
    use calamine::Reader;
    let mut book: calamine::Xlsx<_> = calamine::open_workbook(&out_path).unwrap();
    let range = book.worksheet_range("flash").unwrap();
    let header: Vec<String> = range.rows().next().unwrap().iter().map(|d| d.to_string()).collect();
    assert_eq!(header[0], "row");
    assert!(header.contains(&"components".to_string()) && header.contains(&"vapour_fraction".to_string()));
    assert!(header.iter().position(|h| h == "components") < header.iter().position(|h| h == "vapour_fraction"));
    assert_eq!(range.rows().count(), 10, "header and nine rows");
}

/// Row numbers are the file's line numbers, with CRLF line ends and comment lines between
/// rows.
#[test]
fn row_numbers_are_line_numbers() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("rows.csv");
    std::fs::write(
        &path,
        "# a comment\r\ncommand,components,z,T,P\r\nflash,water,1,300,1e5\r\n# another\r\n# and another\r\nflash,unobtainium,1,300,1e5\r\n",
    )
    .unwrap();
    let out = bin().args(["flash", "--json", "--batch"]).arg(&path).output().unwrap();
    let rows: Vec<Value> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(rows[0]["row"], 3);
    assert_eq!(rows[1]["row"], 6);
}

/// A batch longer than one chunk (4,096 rows) comes out whole and in input order, each row
/// the Rachford–Rice split of its own z and K (checked against the library's solver).
#[test]
fn long_batches_stream_in_order() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("k.csv");
    let mut text = String::from("command,id,z,K\n# rows below are invented given-K cases\n");
    let rows = 10_000;
    for i in 0..rows {
        let k1 = 1.2 + (i % 97) as f64 / 10.0;
        text.push_str(&format!("flash,r{i},0.5;0.5,{k1};0.3\n"));
    }
    std::fs::write(&path, text).unwrap();
    let out = bin().args(["flash", "--json", "--batch"]).arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    let lines: Vec<Value> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(lines.len(), rows);
    for (i, v) in lines.iter().enumerate() {
        assert_eq!(v["id"], format!("r{i}"));
        assert_eq!(v["row"], i + 3);
        if i % 997 == 0 {
            let k1 = 1.2 + (i % 97) as f64 / 10.0;
            let s = flashduty::rachford_rice::rachford_rice(&[0.5, 0.5], &[k1, 0.3]).unwrap();
            assert_eq!(v["vapour_fraction"].as_f64().unwrap(), s.vapour_fraction);
        }
    }
}

/// A check whose expected column names a unit shows computed, expected, deviation and
/// allowed in that unit, in the text, JSON and JUnit reports. Water boils at 99.97 °C at
/// 1 atm (IAPWS-IF97); the second row expects 99 °C and fails by about 1 K.
#[test]
fn check_reports_in_the_headers_unit() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("c.csv");
    std::fs::write(
        &path,
        "command,components,z,P,expect.T_K [degF],tol.T_K [degC]\nbubble,water,1,1 atm,211.95,0.25\nbubble,water,1,1 atm,210.2,0.25\n",
    )
    .unwrap();
    let junit = dir.path().join("j.xml");
    let out = bin()
        .arg("check")
        .arg(&path)
        .arg("--junit")
        .arg(&junit)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("211.95 degF") && text.contains("0.450 degF"), "{text}");
    let xml = std::fs::read_to_string(&junit).unwrap();
    assert!(xml.contains("expected 210.2 degF"), "{xml}");
    let out = bin().args(["check", "--json"]).arg(&path).output().unwrap();
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let c = &v["rows"][1]["checks"][0];
    assert_eq!(c["unit"], "degF");
    let computed = c["computed"].as_f64().unwrap();
    assert!((computed - 211.95).abs() < 0.5, "{c}");
    assert!((c["allowed"].as_f64().unwrap() - 0.45).abs() < 1e-9);
}

/// Outputs engineers expect: each phase's molar and mass flow, molar mass and component
/// flows, and the enthalpy table's component flows in the unit the input's flow was given
/// in. Checked by the balances they must close (common practice) and the molar masses of the
/// library.
#[test]
fn phase_flows_and_the_inputs_unit() {
    let v = json_args(&["duty", repo("examples/duty.json").to_str().unwrap()]);
    let out = &v["outlet"]["phases"];
    let (l, g) = (&out["liquid"], &out["vapour"]);
    let total_kg_h = (f(l, "mass_flow_kg_s") + f(g, "mass_flow_kg_s")) * 3600.0;
    assert!((total_kg_h - 1200.0).abs() < 1e-9, "{total_kg_h}"); // the case's "1200 kg/h"
    let mol = f(l, "flow_mol_s") + f(g, "flow_mol_s");
    assert!((mol - f(&v, "flow_mol_s")).abs() < 1e-12);
    // Molar mass of the liquid from its composition and the library's molar masses.
    let x: Vec<f64> = serde_json::from_value(v["outlet"]["x"].clone()).unwrap();
    let names: Vec<String> = serde_json::from_value(v["components"].clone()).unwrap();
    let lib = flashduty::library::Library::builtin();
    let m: f64 = names
        .iter()
        .zip(&x)
        .map(|(n, xi)| xi * lib.get(n).unwrap().molar_mass_g_per_mol())
        .sum();
    assert!((f(l, "molar_mass_g_per_mol") - m).abs() < 1e-12);
    let comp: Vec<f64> = serde_json::from_value(l["component_flows_mol_s"].clone()).unwrap();
    assert!((comp.iter().sum::<f64>() - f(l, "flow_mol_s")).abs() < 1e-12);
    // The table's flows in kg/h add up to the 1200 kg/h given, at the inlet and the outlet.
    for state in ["inlet", "outlet"] {
        let sum: f64 = v["table"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|r| r["state"] == state)
            .map(|r| {
                assert_eq!(r["flow_unit"], "kg/h");
                r["flow_in_unit"].as_f64().unwrap()
            })
            .sum();
        assert!((sum - 1200.0).abs() < 1e-9, "{state}: {sum}");
    }
    let text = String::from_utf8(
        bin()
            .arg("duty")
            .arg(repo("examples/duty.json"))
            .output()
            .unwrap()
            .stdout,
    )
    .unwrap();
    assert!(text.contains("flow [kg/h]") && text.contains("molar mass"), "{text}");
}

/// `--output-units field` (or a units file) for the human report and the JSON: the JSON keeps its
/// SI keys and adds the same values in the chosen units. Conversions: NIST SP 811 (212 °F at
/// 373.15 K; 1 Btu/h = 0.293071 W).
#[test]
fn output_units() {
    let out = bin()
        .args(["--output-units", "field", "duty"])
        .arg(repo("examples/duty.json"))
        .output()
        .unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("Btu/h") && text.contains("degF") && text.contains("lbmol/h") && text.contains("P [psia]"),
        "{text}"
    );
    let v = json_args(&[
        "--output-units",
        "field",
        "duty",
        repo("examples/duty.json").to_str().unwrap(),
    ]);
    let (w, btu) = (f(&v, "duty_W"), f(&v, "duty_Btu_per_h"));
    assert!((btu * 0.293_071_070_172 - w).abs() < 1e-6 * w.abs());
    let (t_k, t_f) = (f(&v["outlet"], "T_K"), f(&v["outlet"], "T_degF"));
    assert!((t_f - (t_k * 1.8 - 459.67)).abs() < 1e-9);
    let dir = tempfile::tempdir().unwrap();
    let units = dir.path().join("units.toml");
    std::fs::write(&units, "temperature = \"degC\"\npressure = \"bar\"\npower = \"kW\"\n").unwrap();
    let v = json_args(&[
        "--output-units",
        units.to_str().unwrap(),
        "bubble",
        repo("examples/bubble.json").to_str().unwrap(),
    ]);
    assert!((f(&v, "T_degC") - (f(&v, "T_K") - 273.15)).abs() < 1e-9);
    assert!((f(&v, "P_bar") - f(&v, "P_Pa") / 1e5).abs() < 1e-12);
    std::fs::write(&units, "temperature = \"furlongs\"\n").unwrap();
    let out = bin()
        .args(["--output-units", units.to_str().unwrap(), "bubble"])
        .arg(repo("examples/bubble.json"))
        .output()
        .unwrap();
    assert_error_output(&out, &["--output-units", "furlongs"]);
    let out = bin()
        .args(["--output-units", "imperial", "bubble"])
        .arg(repo("examples/bubble.json"))
        .output()
        .unwrap();
    assert_error_output(&out, &["--output-units", "'imperial'", "si, field"]);
}
