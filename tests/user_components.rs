//! User components read from JSON and TOML text in the component-file schema, and the
//! errors a bad file gives. Each error must name the component (where there is one) and
//! the field.
//!
//! The component used here, "examplane", is invented for these tests: its numbers are
//! made up to be self-consistent (its Antoine line passes through 1 atm at 350 K) and are not
//! data for any real substance. Its bibliography entry says so.

use flashduty::library::Library;
use flashduty::properties::{ComponentError, HeatCapacity, LatentHeat, VapourPressure};
use serde_json::{Value, json};

const SCHEMA: &str = "flashduty-components/1";

/// An invented, valid component file with one component.
fn valid_file() -> Value {
    json!({
        "schema": SCHEMA,
        "sources": {
            "invented": "Invented values for a unit test of the component loader; not physical data."
        },
        "components": [valid_component()]
    })
}

fn valid_component() -> Value {
    json!({
        "name": "examplane",
        "synonyms": ["Example Liquid", "EXL"],
        "cas": "99999-99-9",
        "formula": "C6H14",
        "molar_mass_g_per_mol": {"value": 86.0, "source": "invented"},
        "critical_temperature_K": {"value": 520.0, "source": "invented"},
        "critical_pressure_Pa": {"value": 3.0e6, "source": "invented"},
        "acentric_factor": {"value": 0.3, "source": "invented"},
        "normal_boiling_point_K": {"value": 350.0, "source": "invented"},
        // ln(P/Pa) = A - B/(T + C) with C = 0: through 101325 Pa at 350 K by construction
        // (A = ln 101325 + B/350 = 11.526088 + 10.0).
        "vapour_pressure": {"form": "antoine", "units": "ln-Pa-K", "A": 21.526_088_451, "B": 3500.0, "C": 0.0,
                             "T_min_K": 250.0, "T_max_K": 450.0, "source": "invented"},
        "liquid_heat_capacity": {"form": "constant", "value": 200.0, "T_min_K": 200.0, "T_max_K": 400.0,
                                 "source": "invented", "from_memory": false},
        "vapour_heat_capacity": {"form": "polynomial", "coefficients": [20.0, 0.4], "T_min_K": 200.0,
                                 "T_max_K": 1000.0, "source": "invented", "note": "made up"},
        "latent_heat": {"form": "watson", "T_anchor_K": 350.0, "value_J_per_mol": 29000.0, "source": "invented"}
    })
}

/// The same component as TOML text.
const VALID_TOML: &str = r#"
schema = "flashduty-components/1"

[sources]
invented = "Invented values for a unit test of the component loader; not physical data."

[[components]]
name = "examplane"
synonyms = ["Example Liquid", "EXL"]
cas = "99999-99-9"
formula = "C6H14"
molar_mass_g_per_mol = { value = 86.0, source = "invented" }
critical_temperature_K = { value = 520.0, source = "invented" }
critical_pressure_Pa = { value = 3.0e6, source = "invented" }
acentric_factor = { value = 0.3, source = "invented" }
normal_boiling_point_K = { value = 350.0, source = "invented" }
vapour_pressure = { form = "antoine", units = "ln-Pa-K", A = 21.526088451, B = 3500.0, C = 0.0, T_min_K = 250.0, T_max_K = 450.0, source = "invented" }
liquid_heat_capacity = { form = "constant", value = 200.0, T_min_K = 200.0, T_max_K = 400.0, source = "invented" }
vapour_heat_capacity = { form = "polynomial", coefficients = [20.0, 0.4], T_min_K = 200.0, T_max_K = 1000.0, source = "invented" }
latent_heat = { form = "watson", T_anchor_K = 350.0, value_J_per_mol = 29000.0, source = "invented" }
"#;

/// Sets `pointer` (JSON pointer into the first component) to `v`.
fn with(pointer: &str, v: Value) -> String {
    let mut f = valid_file();
    *f.pointer_mut(&format!("/components/0{pointer}"))
        .unwrap_or_else(|| panic!("no {pointer}")) = v;
    f.to_string()
}

/// Removes field `key` from the first component.
fn without(key: &str) -> String {
    let mut f = valid_file();
    f["components"][0]
        .as_object_mut()
        .unwrap()
        .remove(key)
        .expect("field present");
    f.to_string()
}

fn add_json_err(text: &str) -> ComponentError {
    let mut lib = Library::builtin().clone();
    let before = lib.len();
    let err = lib.add_json("user.json", text).expect_err("should fail");
    assert_eq!(lib.len(), before, "a failed add must leave the library unchanged");
    err
}

fn assert_invalid(err: &ComponentError, field_part: &str) {
    match err {
        ComponentError::InvalidValue { component, field, .. } => {
            assert_eq!(component, "examplane");
            assert!(
                field.contains(field_part),
                "field {field:?} does not name {field_part:?}"
            );
        }
        other => panic!("expected InvalidValue for {field_part}, got {other:?}"),
    }
    let msg = err.to_string();
    assert!(msg.contains("examplane") && msg.contains(field_part), "message: {msg}");
}

#[test]
fn valid_json_component_loads_and_is_found_by_name_synonym_and_cas() {
    let mut lib = Library::builtin().clone();
    let before = lib.len();
    assert_eq!(lib.add_json("user.json", &valid_file().to_string()).unwrap(), 1);
    assert_eq!(lib.len(), before + 1);
    for key in [
        "examplane",
        "EXAMPLANE",
        "  Examplane ",
        "example liquid",
        "exl",
        "99999-99-9",
    ] {
        assert_eq!(
            lib.get(key).unwrap_or_else(|e| panic!("{key}: {e}")).name(),
            "examplane",
            "{key}"
        );
    }
    // Built-ins are still there, and the user component computes.
    assert_eq!(lib.get("toluene").unwrap().name(), "toluene");
    let c = lib.get("examplane").unwrap();
    assert!((c.vapour_pressure().psat_pa(350.0) / 101_325.0 - 1.0).abs() < 1e-6);
    assert_eq!(c.liquid_heat_capacity().cp(300.0), 200.0);
    assert!((c.vapour_heat_capacity().cp(300.0) - 140.0).abs() < 1e-9);
    assert_eq!(c.latent_heat().latent_heat(350.0), 29_000.0);
    assert!(lib.sources().contains_key("invented"));
    // The built-in library itself is not changed by adding to a clone.
    assert!(Library::builtin().get("examplane").is_err());
}

#[test]
fn valid_toml_component_loads_like_json() {
    let mut lib = Library::default();
    assert_eq!(lib.add_toml("user.toml", VALID_TOML).unwrap(), 1);
    let mut from_json = Library::default();
    from_json.add_json("user.json", &valid_file().to_string()).unwrap();
    let (a, b) = (lib.get("EXL").unwrap(), from_json.get("exl").unwrap());
    assert_eq!(a.name(), b.name());
    assert_eq!(a.critical_temperature_k(), b.critical_temperature_k());
    assert_eq!(a.vapour_pressure().psat_pa(320.0), b.vapour_pressure().psat_pa(320.0));
    assert_eq!(lib.get("99999-99-9").unwrap().name(), "examplane");
}

#[test]
fn user_file_may_cite_builtin_sources() {
    let mut f = valid_file();
    f["components"][0]["critical_temperature_K"]["source"] = json!("crc-97");
    let mut lib = Library::builtin().clone();
    lib.add_json("user.json", &f.to_string()).unwrap();
    // An empty library knows no such key.
    let err = Library::default().add_json("user.json", &f.to_string()).unwrap_err();
    assert!(matches!(err, ComponentError::UnknownSource { .. }), "{err:?}");
}

#[test]
fn component_round_trips_through_to_json() {
    let lib = Library::builtin();
    let toluene = lib.get("toluene").unwrap();
    let file = json!({"schema": SCHEMA, "sources": lib.sources(), "components": [toluene.to_json()]});
    let mut fresh = Library::default();
    fresh.add_json("roundtrip.json", &file.to_string()).unwrap();
    let t = fresh.get("toluol").unwrap();
    assert_eq!(
        t.vapour_pressure().psat_pa(383.0),
        toluene.vapour_pressure().psat_pa(383.0)
    );
    assert_eq!(
        t.latent_heat().latent_heat(400.0),
        toluene.latent_heat().latent_heat(400.0)
    );
}

// ---- InvalidValue ----

#[test]
fn critical_temperature_at_or_below_boiling_point_is_rejected() {
    for tc in [350.0, 300.0] {
        let err = add_json_err(&with("/critical_temperature_K/value", json!(tc)));
        assert_invalid(&err, "critical_temperature_K");
    }
}

#[test]
fn negative_molar_mass_is_rejected() {
    let err = add_json_err(&with("/molar_mass_g_per_mol/value", json!(-86.0)));
    assert_invalid(&err, "molar_mass_g_per_mol");
    assert!(err.to_string().contains("-86"), "{err}");
}

#[test]
fn non_positive_critical_pressure_and_boiling_point_are_rejected() {
    assert_invalid(
        &add_json_err(&with("/critical_pressure_Pa/value", json!(0.0))),
        "critical_pressure_Pa",
    );
    assert_invalid(
        &add_json_err(&with("/normal_boiling_point_K/value", json!(-1.0))),
        "normal_boiling_point_K",
    );
}

#[test]
fn acentric_factor_out_of_range_is_rejected() {
    assert_invalid(
        &add_json_err(&with("/acentric_factor/value", json!(5.0))),
        "acentric_factor",
    );
}

#[test]
fn range_with_min_above_max_is_rejected() {
    let err = add_json_err(&with("/vapour_pressure/T_min_K", json!(500.0)));
    assert_invalid(&err, "vapour_pressure.T_min_K");
    let err = add_json_err(&with("/liquid_heat_capacity/T_max_K", json!(100.0)));
    assert_invalid(&err, "liquid_heat_capacity");
    let err = add_json_err(&with("/vapour_heat_capacity/T_min_K", json!(2000.0)));
    assert_invalid(&err, "vapour_heat_capacity");
}

#[test]
fn bad_correlations_are_rejected() {
    // Antoine B must be positive.
    assert_invalid(
        &add_json_err(&with("/vapour_pressure/B", json!(-3500.0))),
        "vapour_pressure",
    );
    // Six polynomial coefficients are too many.
    assert_invalid(
        &add_json_err(&with(
            "/vapour_heat_capacity/coefficients",
            json!([1.0, 0.0, 0.0, 0.0, 0.0, 0.0]),
        )),
        "vapour_heat_capacity.coefficients",
    );
    // A negative constant heat capacity.
    assert_invalid(
        &add_json_err(&with("/liquid_heat_capacity/value", json!(-5.0))),
        "liquid_heat_capacity",
    );
    // A Watson anchor above Tc.
    assert_invalid(
        &add_json_err(&with("/latent_heat/T_anchor_K", json!(600.0))),
        "latent_heat",
    );
}

#[test]
fn empty_name_or_cas_is_rejected() {
    let err = add_json_err(&with("/cas", json!("  ")));
    assert_invalid(&err, "cas");
    let err = add_json_err(&with("/name", json!("")));
    assert!(
        matches!(&err, ComponentError::InvalidValue { field, .. } if field == "name"),
        "{err:?}"
    );
}

// ---- UnknownSource ----

#[test]
fn unknown_source_key_is_rejected() {
    let err = add_json_err(&with("/critical_pressure_Pa/source", json!("my-notebook")));
    match &err {
        ComponentError::UnknownSource {
            component,
            field,
            source_key,
        } => {
            assert_eq!(component, "examplane");
            assert_eq!(field, "critical_pressure_Pa");
            assert_eq!(source_key, "my-notebook");
        }
        other => panic!("expected UnknownSource, got {other:?}"),
    }
    let msg = err.to_string();
    assert!(
        msg.contains("examplane") && msg.contains("critical_pressure_Pa") && msg.contains("my-notebook"),
        "{msg}"
    );
    // Also inside a correlation.
    let err = add_json_err(&with("/latent_heat/source", json!("nowhere")));
    assert!(
        matches!(&err, ComponentError::UnknownSource { field, .. } if field == "latent_heat"),
        "{err:?}"
    );
}

// ---- Duplicate ----

#[test]
fn duplicate_name_synonym_or_cas_is_rejected() {
    for (pointer, v, key) in [
        ("/name", json!("Toluene"), "toluene"),
        ("/synonyms", json!(["MEK"]), "mek"),
        ("/cas", json!("108-88-3"), "108-88-3"),
    ] {
        let err = add_json_err(&with(pointer, v));
        match &err {
            ComponentError::Duplicate { key: k, other, .. } => {
                assert_eq!(k, key);
                assert!(!other.is_empty());
            }
            other => panic!("expected Duplicate for {pointer}, got {other:?}"),
        }
        assert!(err.to_string().contains(key), "{err}");
    }
    // Adding the same file twice.
    let mut lib = Library::default();
    lib.add_json("a.json", &valid_file().to_string()).unwrap();
    let err = lib.add_json("b.json", &valid_file().to_string()).unwrap_err();
    match &err {
        ComponentError::Duplicate { component, other, .. } => {
            assert_eq!(component, "examplane");
            assert_eq!(other, "examplane");
        }
        other => panic!("expected Duplicate, got {other:?}"),
    }
    assert_eq!(lib.len(), 1);
}

#[test]
fn duplicate_within_one_file_adds_nothing() {
    let mut f = valid_file();
    let second = f["components"][0].clone();
    f["components"].as_array_mut().unwrap().push(second);
    let mut lib = Library::default();
    let err = lib.add_json("twice.json", &f.to_string()).unwrap_err();
    assert!(matches!(err, ComponentError::Duplicate { .. }), "{err:?}");
    assert!(lib.is_empty(), "a file that fails must add none of its components");
}

// ---- Parse ----

fn assert_parse(err: &ComponentError, file: &str, parts: &[&str]) {
    match err {
        ComponentError::Parse { file: f, message } => {
            assert_eq!(f, file);
            for p in parts {
                assert!(message.contains(p), "message {message:?} does not mention {p:?}");
            }
        }
        other => panic!("expected Parse, got {other:?}"),
    }
    assert!(err.to_string().contains(file), "{err}");
}

#[test]
fn missing_required_field_is_a_parse_error_naming_the_field() {
    for field in ["cas", "critical_temperature_K", "vapour_pressure", "latent_heat"] {
        let err = add_json_err(&without(field));
        assert_parse(&err, "user.json", &[field]);
    }
    // Inside a correlation.
    let mut f = valid_file();
    f["components"][0]["vapour_pressure"]
        .as_object_mut()
        .unwrap()
        .remove("T_max_K");
    assert_parse(&add_json_err(&f.to_string()), "user.json", &["T_max_K"]);
}

/// The message of a missing-field error should also name the component. The file parser
/// reports only the field and the position today; this test records the wanted behaviour.
#[test]
fn missing_required_field_error_names_the_component() {
    let err = add_json_err(&without("cas"));
    assert!(err.to_string().contains("examplane"), "{err}");
}

#[test]
fn unknown_field_is_a_parse_error_naming_it() {
    let mut f = valid_file();
    f["components"][0]["boiling_point"] = json!(350.0);
    assert_parse(&add_json_err(&f.to_string()), "user.json", &["boiling_point"]);
}

#[test]
fn wrong_schema_tag_is_rejected() {
    let mut f = valid_file();
    f["schema"] = json!("flashduty-components/0");
    assert_parse(
        &add_json_err(&f.to_string()),
        "user.json",
        &["schema", "flashduty-components/0", SCHEMA],
    );
    let toml = VALID_TOML.replace(SCHEMA, "something-else/1");
    let err = Library::default().add_toml("user.toml", &toml).unwrap_err();
    assert_parse(&err, "user.toml", &["schema", "something-else/1"]);
}

#[test]
fn unknown_correlation_form_or_unit_is_rejected() {
    assert_parse(
        &add_json_err(&with("/vapour_pressure/form", json!("clapeyron"))),
        "user.json",
        &["clapeyron"],
    );
    assert_parse(
        &add_json_err(&with("/vapour_pressure/units", json!("log10-psi-degF"))),
        "user.json",
        &["log10-psi-degF"],
    );
}

#[test]
fn malformed_json_is_rejected() {
    let text = valid_file().to_string();
    let broken = &text[..text.len() / 2];
    assert_parse(&add_json_err(broken), "user.json", &["line"]);
    assert_parse(
        &add_json_err("{\"schema\": \"flashduty-components/1\", \"components\": [,]}"),
        "user.json",
        &[],
    );
    assert_parse(&add_json_err(""), "user.json", &[]);
    // A wrong type: a number given as text.
    assert_parse(
        &add_json_err(&with("/critical_temperature_K/value", json!("520"))),
        "user.json",
        &["520"],
    );
}

#[test]
fn malformed_toml_is_rejected() {
    let mut lib = Library::builtin().clone();
    let before = lib.len();
    let err = lib
        .add_toml(
            "user.toml",
            "schema = \"flashduty-components/1\"\n[[components]\nname = ",
        )
        .unwrap_err();
    assert_parse(&err, "user.toml", &[]);
    let err = lib
        .add_toml("user.toml", &VALID_TOML.replace("cas = \"99999-99-9\"\n", ""))
        .unwrap_err();
    assert_parse(&err, "user.toml", &["cas"]);
    assert_eq!(lib.len(), before);
}

#[test]
fn unreadable_path_is_a_parse_error_naming_the_file() {
    let dir = tempfile::tempdir().unwrap();
    let missing = dir.path().join("no-such-file.json");
    let err = Library::default().add_path(&missing).unwrap_err();
    assert!(matches!(err, ComponentError::Parse { .. }), "{err:?}");
    assert!(err.to_string().contains("no-such-file.json"), "{err}");
    // And a real file in TOML is read by extension.
    let p = dir.path().join("mine.TOML");
    std::fs::write(&p, VALID_TOML).unwrap();
    let mut lib = Library::default();
    assert_eq!(lib.add_path(&p).unwrap(), 1);
    assert!(lib.get("examplane").is_ok());
}

// ---- look-up ----

#[test]
fn unknown_name_gives_suggestions() {
    let lib = Library::builtin();
    for (typo, want) in [
        ("tolune", "toluene"),
        ("benzen", "benzene"),
        ("Methanl", "methanol"),
        ("cyclohexan", "cyclohexane"),
        ("isopropanl", "2-propanol"),
    ] {
        let err = lib.get(typo).unwrap_err();
        assert_eq!(err.name, typo);
        assert!(
            err.suggestions.iter().any(|s| s == want),
            "{typo}: {:?}",
            err.suggestions
        );
        assert!(err.suggestions.len() <= 3);
        let msg = err.to_string();
        assert!(msg.contains(typo) && msg.contains(want), "{msg}");
    }
    // Nothing close: no suggestions, and the message still names what was asked for.
    let err = lib.get("unobtainium-42-zzzz").unwrap_err();
    assert!(err.suggestions.is_empty(), "{:?}", err.suggestions);
    assert!(err.to_string().contains("unobtainium-42-zzzz"));
}

#[test]
fn get_all_returns_in_order_or_first_error() {
    let lib = Library::builtin();
    let got = lib.get_all(&["toluene", "Benzene", "71-43-2"]).unwrap();
    let names: Vec<&str> = got.iter().map(|c| c.name()).collect();
    assert_eq!(names, ["toluene", "benzene", "benzene"]);
    let err = lib.get_all(&["toluene", "benzen", "xyzzy"]).unwrap_err();
    assert_eq!(err.name, "benzen");
}

/// An invented gas in the component-file schema (`"kind": "gas"`): no vapour pressure,
/// liquid heat capacity, latent heat or normal boiling point.
fn gas_file() -> Value {
    json!({
        "schema": SCHEMA,
        "sources": {
            "invented": "Invented values for a unit test of the component loader; not physical data."
        },
        "components": [{
            "name": "examplogen",
            "kind": "gas",
            "synonyms": ["X2"],
            "cas": "0000-00-1",
            "formula": "X2",
            "molar_mass_g_per_mol": {"value": 30.0, "source": "invented"},
            "critical_temperature_K": {"value": 150.0, "source": "invented"},
            "critical_pressure_Pa": {"value": 4.0e6, "source": "invented"},
            "acentric_factor": {"value": 0.03, "source": "invented"},
            "vapour_heat_capacity": {"form": "constant", "value": 29.1, "T_min_K": 200.0, "T_max_K": 1000.0,
                "source": "invented", "from_memory": false}
        }]
    })
}

#[test]
fn the_schema_describes_a_gas_which_loads_apart_and_round_trips() {
    let mut lib = Library::builtin().clone();
    let before = lib.len();
    assert_eq!(lib.add_json("gas.json", &gas_file().to_string()).unwrap(), 1);
    assert_eq!(lib.len(), before, "a gas is not a condensable component");
    let g = lib.gas("x2").unwrap().clone();
    assert_eq!(
        (g.name(), g.cas(), g.molar_mass_g_per_mol()),
        ("examplogen", "0000-00-1", 30.0)
    );
    assert_eq!(
        (
            g.critical_temperature_k(),
            g.critical_pressure_pa(),
            g.acentric_factor()
        ),
        (150.0, 4.0e6, 0.03)
    );
    assert_eq!(g.vapour_heat_capacity().cp(300.0), 29.1);
    assert_eq!(g.provenance().len(), 5);
    // Not usable where a vapour pressure is needed.
    assert!(lib.get("examplogen").is_err());
    // Written back through the same serde types, and read again to the same gas.
    let mut file = gas_file();
    file["components"][0] = g.to_json();
    let mut again = Library::default();
    again.add_json("again.json", &file.to_string()).unwrap();
    assert_eq!(again.gas("examplogen").unwrap().as_ref(), g.as_ref());
    // A condensable component's record says nothing of its kind.
    assert!(lib.get("benzene").unwrap().to_json().get("kind").is_none());
}

#[test]
fn a_gas_with_condensable_data_or_bad_values_is_refused_naming_the_field() {
    for (field, value) in [
        ("vapour_pressure", valid_component()["vapour_pressure"].clone()),
        ("latent_heat", valid_component()["latent_heat"].clone()),
        (
            "liquid_heat_capacity",
            valid_component()["liquid_heat_capacity"].clone(),
        ),
        ("normal_boiling_point_K", json!({"value": 100.0, "source": "invented"})),
    ] {
        let mut f = gas_file();
        f["components"][0][field] = value;
        assert_parse(&add_json_err(&f.to_string()), "user.json", &[field, "gas"]);
    }
    let mut f = gas_file();
    f["components"][0]["kind"] = json!("plasma");
    assert_parse(&add_json_err(&f.to_string()), "user.json", &["plasma"]);
    let invalid = |pointer: &str, value: Value, field_part: &str| {
        let mut f = gas_file();
        *f.pointer_mut(pointer).unwrap() = value;
        match add_json_err(&f.to_string()) {
            ComponentError::InvalidValue { component, field, .. } => {
                assert_eq!(component, "examplogen");
                assert!(field.contains(field_part), "{field}");
            }
            other => panic!("expected InvalidValue for {field_part}, got {other:?}"),
        }
    };
    invalid(
        "/components/0/vapour_heat_capacity/value",
        json!(-1.0),
        "vapour_heat_capacity",
    );
    invalid(
        "/components/0/critical_pressure_Pa/value",
        json!(0.0),
        "critical_pressure_Pa",
    );
    let mut f = gas_file();
    f["components"][0]["molar_mass_g_per_mol"]["source"] = json!("nowhere");
    assert!(matches!(
        add_json_err(&f.to_string()),
        ComponentError::UnknownSource { .. }
    ));
    // A gas may not take a name the library already has, nor the reverse.
    let mut f = gas_file();
    f["components"][0]["synonyms"] = json!(["benzene"]);
    assert!(matches!(add_json_err(&f.to_string()), ComponentError::Duplicate { .. }));
}
