//! Fuzz-like property tests (proptest stands in for `cargo fuzz`, which needs a nightly
//! toolchain): the case parser, the spreadsheet reader and every command, fed arbitrary text
//! and arbitrary (often nonsensical) case objects, must return a result or a one-line error,
//! never panic. Inputs that once crashed are kept below as plain regression tests.

use crate::case::{Command, parse_case, parse_text};
use crate::compute::{self, Outcome};
use crate::{check, plot, sheet, text};
use flashduty::library::Library;
use proptest::prelude::*;
use serde_json::{Map, Value, json};

/// Runs every command on a case object; any error must be one line.
fn run_everything(v: &Value) {
    let lib = Library::builtin();
    for command in Command::ALL {
        let Ok(case) = parse_case(v, command) else {
            continue;
        };
        match compute::run(lib, command, &case, None) {
            Ok(outcome) => {
                let _ = outcome.to_json().to_string();
                let _ = text::report(&outcome, Some("fuzz"));
                if let Outcome::Curve(c) = &outcome {
                    let _ = plot::svg_text(c);
                    let _ = plot::csv_text(c);
                }
            }
            Err(e) => assert!(!e.message().contains('\n'), "{e}"),
        }
    }
}

/// Parses text as a case and runs it.
fn run_text(name: &str, text: &str) {
    match parse_text(name, text) {
        Ok(v) => run_everything(&v),
        Err(e) => assert!(!e.message().contains('\n'), "{e}"),
    }
}

/// Reads bytes as a spreadsheet, checks it and runs it as a batch of every command.
fn run_sheet(bytes: &[u8]) {
    let lib = Library::builtin();
    match check::run(lib, "fuzz.csv", bytes, None) {
        Ok(results) => {
            let _ = check::report("fuzz.csv", &results);
            let _ = check::junit("fuzz.csv", &results);
        }
        Err(e) => assert!(!e.message().contains('\n'), "{e}"),
    }
    for command in [Command::Flash, Command::Duty] {
        for format in [crate::batch::Format::Csv, crate::batch::Format::Workbook] {
            if let Err(e) = crate::batch::run(lib, command, "fuzz.csv", Box::new(bytes), None, format, &mut Vec::new())
            {
                assert!(!e.message().contains('\n'), "{e}");
            }
        }
    }
    // The same bytes as a workbook: refused with one line, never a panic.
    for name in ["fuzz.xlsx", "fuzz.ods"] {
        if let Err(e) = sheet::read(name, bytes, None) {
            assert!(!e.message().contains('\n'), "{e}");
        }
    }
    if let Ok(s) = sheet::read("fuzz.csv", bytes, None) {
        for row in &s.rows {
            let _ = sheet::case_value(&s.columns, &row.cells);
        }
    }
}

fn number() -> BoxedStrategy<Value> {
    prop_oneof![
        any::<f64>().prop_filter_map("finite", |x| serde_json::Number::from_f64(x).map(Value::Number)),
        (-2.0f64..2.0).prop_map(|x| json!(x)),
        (0.0f64..1.0).prop_map(|x| json!(x)),
        (1.0f64..2000.0).prop_map(|x| json!(x)),
        (1e2f64..1e7).prop_map(|x| json!(x)),
        prop::sample::select(vec![
            json!(0),
            json!(1),
            json!(-1),
            json!(2),
            json!(1e308),
            json!(-1e308),
            json!(5e-324),
            json!(1e-300),
            json!(u64::MAX),
            json!(i64::MIN),
            json!(0.5),
            json!(1e9),
            json!(1e-3),
        ]),
    ]
    .boxed()
}

fn quantity_text() -> BoxedStrategy<Value> {
    (
        "-?[0-9]{0,5}(\\.[0-9]{0,4})?(e-?[0-9]{1,3})?",
        prop::sample::select(vec![
            "", " K", " degC", " degF", " degR", " atm", " bar", " kPa", " MPa", " psia", " mmHg", " Pa", " kW", " W",
            " MW", " MMBtu/h", " kmol/h", " mol/s", " kg/h", " t/h", " lb/h", " furlong", "NaN", " inf",
        ]),
    )
        .prop_map(|(n, u)| Value::String(format!("{n}{u}")))
        .boxed()
}

fn leaf() -> BoxedStrategy<Value> {
    prop_oneof![
        4 => number(),
        3 => quantity_text(),
        1 => any::<String>().prop_map(Value::String),
        1 => any::<bool>().prop_map(Value::Bool),
        1 => Just(Value::Null),
    ]
    .boxed()
}

fn names() -> BoxedStrategy<Value> {
    prop::collection::vec(
        prop::sample::select(vec![
            "water",
            "benzene",
            "toluene",
            "n-hexane",
            "n-heptane",
            "methanol",
            "propane",
            "n-decane",
            "acetic acid",
            "108-88-3",
            "H2O",
            "tolune",
            "",
        ]),
        0..5,
    )
    .prop_map(|v| json!(v))
    .boxed()
}

/// Mole fractions: normalised (usually) or raw.
fn fractions() -> BoxedStrategy<Value> {
    prop_oneof![
        3 => prop::collection::vec(0.0f64..1.0, 1..5).prop_map(|v| {
            let s: f64 = v.iter().sum();
            if s > 0.0 { json!(v.iter().map(|x| x / s).collect::<Vec<_>>()) } else { json!(v) }
        }),
        1 => prop::collection::vec(leaf(), 0..5).prop_map(Value::Array),
        1 => leaf(),
    ]
    .boxed()
}

fn temperature() -> BoxedStrategy<Value> {
    prop_oneof![
        3 => (150.0f64..700.0).prop_map(|t| json!(t)),
        1 => (-100.0f64..300.0).prop_map(|t| json!(format!("{t} degC"))),
        1 => leaf(),
    ]
    .boxed()
}

fn pressure() -> BoxedStrategy<Value> {
    prop_oneof![
        3 => (1e2f64..3e6).prop_map(|p| json!(p)),
        1 => (0.01f64..50.0).prop_map(|p| json!(format!("{p} bar"))),
        1 => leaf(),
    ]
    .boxed()
}

fn state() -> BoxedStrategy<Value> {
    (
        prop::option::of(temperature()),
        prop::option::of(pressure()),
        prop::option::of(prop_oneof![3 => (0.0f64..1.0).prop_map(|b| json!(b)), 1 => leaf()]),
        prop::option::of(leaf()),
    )
        .prop_map(|(t, p, b, junk)| {
            let mut m = Map::new();
            if let Some(t) = t {
                m.insert("T".into(), t);
            }
            if let Some(p) = p {
                m.insert("P".into(), p);
            }
            if let Some(b) = b {
                m.insert("vapour_fraction".into(), b);
            }
            if let Some(j) = junk {
                m.insert("Temp".into(), j);
            }
            Value::Object(m)
        })
        .boxed()
}

fn case() -> BoxedStrategy<Value> {
    let a = (
        prop::option::of(prop_oneof![4 => names(), 1 => leaf()]),
        prop::option::of(fractions()),
        prop::option::of(fractions()),
        prop::option::of(prop_oneof![
            prop::collection::vec(0.0f64..20.0, 1..5).prop_map(|v| json!(v)),
            leaf()
        ]),
        prop::option::of(temperature()),
        prop::option::of(pressure()),
        prop::option::of(prop_oneof![(0.0f64..1.0).prop_map(|b| json!(b)), leaf()]),
    );
    let b = (
        prop::option::of(leaf()),
        prop::option::of(state()),
        prop::option::of(state()),
        prop::option::of(prop_oneof![(-1e6f64..1e6).prop_map(|q| json!(q)), leaf()]),
        prop::option::of(prop_oneof![
            Just(json!({"phase": "vapour", "T": "0 degC"})),
            Just(json!({"phase": "liquid"})),
            leaf()
        ]),
        prop::option::of(prop_oneof![
            Just(json!("stream-temperature")),
            Just(json!("reference-temperature")),
            leaf()
        ]),
        prop::option::of(prop_oneof![(0u32..40).prop_map(|n| json!(n)), leaf()]),
        prop::option::of(prop_oneof![
            Just(json!("second-virial")),
            Just(json!("ideal-gas")),
            leaf()
        ]),
    );
    (a, b)
        .prop_map(
            |((components, z, flows, k, t, p, beta), (flow, inlet, outlet, duty, reference, path, points, vapour))| {
                let mut m = Map::new();
                let mut put = |key: &str, v: Option<Value>| {
                    if let Some(v) = v {
                        m.insert(key.to_string(), v);
                    }
                };
                put("components", components);
                put("z", z);
                put("flows", flows);
                put("K", k);
                put("T", t);
                put("P", p);
                put("vapour_fraction", beta);
                put("flow", flow);
                put("inlet", inlet);
                put("outlet", outlet);
                put("duty", duty);
                put("reference", reference);
                put("path", path);
                put("points", points);
                put("vapour_model", vapour);
                Value::Object(m)
            },
        )
        .boxed()
}

/// Valid component names with matching mole fractions (or component flows).
fn feed() -> BoxedStrategy<Value> {
    (1usize..5)
        .prop_flat_map(|n| {
            (
                prop::sample::subsequence(
                    vec![
                        "water", "benzene", "toluene", "n-pentane", "n-hexane", "n-heptane", "methanol", "ethanol",
                        "propane", "n-butane", "n-decane", "acetone", "acetic acid", "styrene", "o-xylene",
                    ],
                    n,
                ),
                prop::collection::vec(0.0f64..1.0, n),
                any::<bool>(),
            )
        })
        .prop_map(|(names, w, as_flows)| {
            let s: f64 = w.iter().sum();
            if as_flows {
                json!({"components": names, "flows": w.iter().map(|x| format!("{} kmol/h", 100.0 * x)).collect::<Vec<_>>()})
            } else {
                let z: Vec<f64> = if s > 0.0 { w.iter().map(|x| x / s).collect() } else { w };
                json!({"components": names, "z": z})
            }
        })
        .boxed()
}

fn merge(mut a: Value, b: Value) -> Value {
    if let (Value::Object(m), Value::Object(e)) = (&mut a, b) {
        m.extend(e);
    }
    a
}

/// A state given by two of T, P and vapour fraction, with plausible values.
fn good_state() -> BoxedStrategy<Value> {
    (250.0f64..600.0, 1e3f64..1e6, 0.0f64..1.0, 0u8..3)
        .prop_map(|(t, p, b, which)| match which {
            0 => json!({"T": t, "P": p}),
            1 => json!({"P": p, "vapour_fraction": b}),
            _ => json!({"T": t, "vapour_fraction": b}),
        })
        .boxed()
}

/// A case aimed at one command: its keys only, with plausible values most of the time.
fn command_case() -> BoxedStrategy<Value> {
    let beta = || prop_oneof![4 => (0.0f64..1.0).prop_map(|b| json!(b)), 1 => Just(json!(0.0)), 1 => Just(json!(1.0))];
    let flash = (feed(), temperature(), pressure(), beta(), 0u8..3).prop_map(|(f, t, p, b, which)| {
        merge(
            f,
            match which {
                0 => json!({"T": t, "P": p}),
                1 => json!({"T": t, "vapour_fraction": b}),
                _ => json!({"P": p, "vapour_fraction": b}),
            },
        )
    });
    let given_k = prop::collection::vec((0.0f64..1.0, 0.0f64..5.0), 1..6).prop_map(|v| {
        let s: f64 = v.iter().map(|p| p.0).sum();
        let z: Vec<f64> = v.iter().map(|p| if s > 0.0 { p.0 / s } else { p.0 }).collect();
        json!({"z": z, "K": v.iter().map(|p| p.1).collect::<Vec<_>>()})
    });
    let saturation = (feed(), temperature(), pressure(), any::<bool>())
        .prop_map(|(f, t, p, by_t)| merge(f, if by_t { json!({"T": t}) } else { json!({"P": p}) }));
    let duty = (
        feed(),
        prop_oneof![4 => good_state(), 1 => state()],
        prop_oneof![4 => good_state(), 1 => state()],
        prop::option::of(prop_oneof![(-2e5f64..2e5).prop_map(|q| json!(q)), leaf()]),
        prop::option::of(pressure()),
        prop::option::of(prop_oneof![(2u32..30).prop_map(|n| json!(n)), leaf()]),
        prop::option::of(prop_oneof![
            Just(json!("stream-temperature")),
            Just(json!("reference-temperature"))
        ]),
        prop::option::of(prop_oneof![Just(json!("36 kmol/h")), Just(json!("1200 kg/h")), leaf()]),
        prop::option::of(Just(json!("second-virial"))),
    )
        .prop_map(|(f, inlet, outlet, duty, p_out, points, path, flow, vapour)| {
            let mut extra = json!({"inlet": inlet, "outlet": outlet});
            if let Some(q) = duty {
                extra["duty"] = q;
                extra["outlet"] = json!({"P": p_out.unwrap_or(json!("1 atm"))});
            }
            if let Some(n) = points {
                extra["points"] = n;
            }
            if let Some(p) = path {
                extra["path"] = p;
            }
            if let Some(v) = vapour {
                extra["vapour_model"] = v;
            }
            if let Some(fl) = flow
                && f.get("z").is_some()
            {
                extra["flow"] = fl;
            }
            merge(f, extra)
        });
    prop_oneof![flash, given_k, saturation, duty].boxed()
}

/// 512 cases, or `PROPTEST_CASES` for a longer hunt.
fn cases() -> u32 {
    std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(512)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn arbitrary_text_never_panics(text in any::<String>()) {
        run_text("<stdin>", &text);
        run_text("case.json", &text);
        run_text("case.toml", &text);
    }

    #[test]
    fn json_like_text_never_panics(text in "\\{(\"[a-zA-Z_.]{0,12}\": ?(-?[0-9.e]{1,8}|\"[^\"]{0,12}\"|\\[[0-9., ]{0,12}\\]|\\{\\}|null|true), ?){0,6}\\}") {
        run_text("<stdin>", &text);
    }

    #[test]
    fn arbitrary_cases_never_panic(v in case()) {
        run_everything(&v);
    }

    #[test]
    fn plausible_cases_of_each_command_never_panic(v in command_case()) {
        run_everything(&v);
    }

    #[test]
    fn arbitrary_bytes_as_a_sheet_never_panic(bytes in prop::collection::vec(any::<u8>(), 0..400)) {
        run_sheet(&bytes);
    }

    #[test]
    fn sheet_like_text_never_panics(
        header in prop::collection::vec(
            prop::sample::select(vec![
                "command", "id", "components", "z", "flows", "K", "T", "T [degC]", "P", "P [bar]",
                "vapour_fraction", "flow", "inlet.T", "inlet.P [atm]", "outlet.T [K]", "outlet.P",
                "outlet.vapour_fraction", "duty", "points", "expect.T_K", "tol.T_K", "expect.x.0",
                "rtol.duty_W", "expect.duty_W [kW]", "expect.phase", "reference.phase", "path", "Temp",
            ]),
            1..8,
        ),
        rows in prop::collection::vec(
            prop::collection::vec(
                prop_oneof![
                    Just(String::new()),
                    prop::sample::select(vec!["flash", "bubble", "dew", "duty", "curve", "water", "benzene;toluene",
                        "0.5;0.5", "1", "300", "1 atm", "2;0.5", "0.3", "liquid", "NaN", ";", "1e308", "-1"])
                        .prop_map(str::to_string),
                    "[ -~]{0,10}",
                ],
                0..9,
            ),
            0..6,
        ),
    ) {
        let mut text = header.join(",");
        text.push('\n');
        for r in rows {
            text.push_str(&r.join(","));
            text.push('\n');
        }
        run_sheet(text.as_bytes());
    }
}

// Regression tests: inputs that broke something once.

#[test]
fn regression_empty_and_odd_texts() {
    for text in [
        "",
        " ",
        "{",
        "}",
        "[]",
        "null",
        "0",
        "\"\"",
        "nan",
        "T = nan",
        "\u{feff}",
        "a = 1\na = 2",
    ] {
        run_text("<stdin>", text);
        run_text("c.toml", text);
    }
}

#[test]
fn regression_odd_sheets() {
    for text in [
        "",
        "\n\n",
        "command\n",
        "command\nflash\n",
        "\u{feff}command,z\nflash,;\n",
        "\"\n",
        "command,expect.\n",
    ] {
        run_sheet(text.as_bytes());
    }
}
