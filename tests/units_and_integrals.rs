//! Unit round trips and error paths; closed-form heat-capacity integrals against quadrature
//! over every library correlation's validity range.

use flashduty::library::Library;
use flashduty::properties::HeatCapacity;
use flashduty::units::{
    MassFlow, MolarEnthalpy, MolarFlow, Power, Pressure, QuantityKind, Temperature, UnitError, from_si, to_si,
};
use proptest::prelude::*;

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(1e-300)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    /// degF → K → degF, psia → Pa → psia, lbmol/h → mol/s → lbmol/h, and the other units,
    /// exact to 1e-12 relative.
    #[test]
    fn round_trips(v in 1e-3f64..1e4) {
        for (kind, unit) in [
            (QuantityKind::Temperature, "degF"), (QuantityKind::Temperature, "degC"), (QuantityKind::Temperature, "degR"),
            (QuantityKind::Pressure, "psia"), (QuantityKind::Pressure, "mmHg"), (QuantityKind::Pressure, "atm"), (QuantityKind::Pressure, "bar"),
            (QuantityKind::MolarFlow, "lbmol/h"), (QuantityKind::MolarFlow, "kmol/h"), (QuantityKind::MolarFlow, "mol/min"),
            (QuantityKind::MassFlow, "lb/h"), (QuantityKind::MassFlow, "kg/h"),
            (QuantityKind::Power, "Btu/h"), (QuantityKind::Power, "kJ/h"), (QuantityKind::Power, "MW"),
            (QuantityKind::MolarEnthalpy, "Btu/lbmol"), (QuantityKind::MolarEnthalpy, "kJ/mol"),
        ] {
            let si = to_si(kind, "x", v, unit).unwrap();
            let back = from_si(kind, "x", si, unit).unwrap();
            prop_assert!(rel(back, v) < 1e-12, "{unit}: {v} -> {si} -> {back}");
        }
    }

    /// Closed-form ∫Cp dT and ∫Cp/T dT of every library correlation agree with composite
    /// Simpson quadrature (an independent numerical reference) to 1e-10 relative over the
    /// correlation's validity range.
    #[test]
    fn closed_form_integrals_match_quadrature(a in 0.0f64..1.0, b in 0.0f64..1.0, pick in 0usize..1000) {
        let lib = Library::builtin();
        let comps: Vec<_> = lib.components().collect();
        let c = comps[pick % comps.len()];
        for model in [c.liquid_heat_capacity(), c.vapour_heat_capacity()] {
            let r = model.validity();
            let (t1, t2) = (r.min_k + a * (r.max_k - r.min_k), r.min_k + b * (r.max_k - r.min_k));
            prop_assume!((t2 - t1).abs() > 1e-3 * r.max_k);
            let n = 4000;
            let h = (t2 - t1) / n as f64;
            let (mut s1, mut s2) = (0.0, 0.0);
            for i in 0..=n {
                let t = t1 + i as f64 * h;
                let w = if i == 0 || i == n { 1.0 } else if i % 2 == 1 { 4.0 } else { 2.0 };
                s1 += w * model.cp(t);
                s2 += w * model.cp(t) / t;
            }
            let (q1, q2) = (s1 * h / 3.0, s2 * h / 3.0);
            prop_assert!(rel(model.enthalpy_change(t1, t2), q1) < 1e-10, "{}: {} vs {q1}", c.name(), model.enthalpy_change(t1, t2));
            prop_assert!(rel(model.entropy_change(t1, t2), q2) < 1e-10, "{}: {} vs {q2}", c.name(), model.entropy_change(t1, t2));
        }
    }
}

/// Exact conversion factors (NIST SP 811, 2008, Appendix B): 1 psi = 6894.757 Pa,
/// 1 lbmol/h = 0.1259979 mol/s, 1 Btu/h = 0.2930711 W, 1 Btu/lbmol = 2.326 J/mol (exact).
#[test]
fn conversion_factors() {
    assert!(rel(Pressure::parse("P", "1 psia").unwrap().pascal(), 6_894.757_293_168) < 1e-12);
    assert!(
        rel(
            MolarFlow::parse("F", "1 lbmol/h").unwrap().mol_per_s(),
            0.453_592_37 * 1000.0 / 3600.0
        ) < 1e-15
    );
    assert!(rel(Power::parse("Q", "1 Btu/h").unwrap().watts(), 1_055.055_852_62 / 3600.0) < 1e-15);
    assert!(rel(MolarEnthalpy::parse("h", "1 Btu/lbmol").unwrap().joule_per_mol(), 2.326) < 1e-15);
    assert!(rel(Temperature::parse("T", "32 degF").unwrap().kelvin(), 273.15) < 1e-15);
    assert!(rel(Temperature::parse("T", "491.67 degR").unwrap().kelvin(), 273.15) < 1e-15);
    assert!(rel(Pressure::parse("P", "760 mmHg").unwrap().pascal(), 101_325.0) < 1e-6);
    assert!(
        rel(
            MassFlow::parse("m", "1 lb/h").unwrap().kg_per_s(),
            0.453_592_37 / 3600.0
        ) < 1e-15
    );
    assert_eq!(Pressure::parse("P", "1.01325 bar").unwrap().pascal(), 101_325.0);
    assert_eq!(
        Temperature::parse("T", "300 K").unwrap().in_unit("degC").unwrap(),
        300.0 - 273.15
    );
}

/// Every error path of the units layer names the field and the value.
#[test]
fn unit_errors() {
    let cases: Vec<(Result<f64, UnitError>, &str)> = vec![
        (Temperature::parse("inlet.T", "hot").map(|t| t.kelvin()), "hot"),
        (
            Temperature::parse("inlet.T", "0 K").map(|t| t.kelvin()),
            "absolute zero",
        ),
        (
            Temperature::parse("inlet.T", "-500 degF").map(|t| t.kelvin()),
            "-500 degF",
        ),
        (Pressure::parse("P", "-1 bar").map(|p| p.pascal()), "-1 bar"),
        (Pressure::parse("P", "0").map(|p| p.pascal()), "at or below zero"),
        (Pressure::parse("P", "3 psig").map(|p| p.pascal()), "psig"),
        (Pressure::parse("P", "3 psi").map(|p| p.pascal()), "psi"),
        (Pressure::parse("P", "NaN").map(|p| p.pascal()), "not finite"),
        (Pressure::parse("P", "1e999 Pa").map(|p| p.pascal()), "not finite"),
        (MolarFlow::parse("flow", "3 kg/h").map(|f| f.mol_per_s()), "kg/h"),
        (MolarFlow::parse("flow", "0 mol/s").map(|f| f.mol_per_s()), "0 mol/s"),
        (Power::parse("duty", "5 furlongs").map(|q| q.watts()), "furlongs"),
        (Power::new("duty", f64::INFINITY).map(|q| q.watts()), "not finite"),
        (Temperature::new("T", 300.0).unwrap().in_unit("bar"), "bar"),
    ];
    for (r, needle) in cases {
        let e = r.unwrap_err();
        let msg = e.to_string();
        assert!(msg.contains(needle), "{msg} lacks {needle}");
        assert!(
            msg.starts_with("inlet.T")
                || msg.starts_with('P')
                || msg.starts_with("flow")
                || msg.starts_with("duty")
                || msg.starts_with("unit"),
            "{msg}"
        );
    }
}

/// The spellings engineers type, against published conversions: the normal molar volume of
/// an ideal gas, 22.413 969 L/mol at 0 °C and 101.325 kPa (CODATA 2018); 379.5 standard
/// cubic feet per lbmol at 60 °F and 14.696 psia (GPSA Engineering Data Book, from memory);
/// 1 kcal(IT) = 4186.8 J and 1 Btu(IT) = 1055.055 852 62 J (NIST SP 811 B.8).
#[test]
fn engineering_unit_spellings() {
    use flashduty::units::{MassFlow, MolarFlow, Power, Pressure};
    let molar = |t: &str| MolarFlow::parse("flow", t).unwrap().mol_per_s();
    assert!((molar("3.6 kmol/hr") - 1.0).abs() < 1e-15);
    assert!((molar("3.6 kgmol/h") - 1.0).abs() < 1e-15);
    assert!((molar("7.936641438 lbmol/hr") - 1.0).abs() < 1e-9);
    assert!((molar("3600 Nm3/h") / (1000.0 / 22.413_969_54) - 1.0).abs() < 1e-8);
    let scf_per_lbmol = 453.592_37 / (molar("1 scfm") * 60.0);
    assert!((scf_per_lbmol - 379.5).abs() < 0.1, "{scf_per_lbmol}");
    assert!((molar("1 MMSCFD") / (molar("1 scfd") * 1e6) - 1.0).abs() < 1e-12);
    let mass = |t: &str| MassFlow::parse("flow", t).unwrap().kg_per_s();
    assert!((mass("3.6 t/h") - 1.0).abs() < 1e-15);
    assert!((mass("86.4 t/d") - 1.0).abs() < 1e-15);
    assert!((mass("7936.641438 lb/hr") - 1.0).abs() < 1e-9);
    let power = |t: &str| Power::parse("duty", t).unwrap().watts();
    assert!((power("1 MW") - 1e6).abs() < 1e-9);
    assert!((power("3600 kcal/h") - 4186.8).abs() < 1e-9);
    assert!((power("1 Gcal/h") - 4.1868e9 / 3600.0).abs() < 1e-6);
    assert!((power("3600 Btu/hr") - 1_055.055_852_62).abs() < 1e-9);
    assert!((power("1 MMBtu/hr") - power("1 MMBtu/h")).abs() == 0.0);
    // Gauge pressures are refused with the reason.
    for g in ["2 barg", "30 psig", "30 psi", "100 kPag"] {
        let e = Pressure::parse("P", g).unwrap_err();
        assert_eq!(e.kind(), "gauge-pressure", "{g}");
        assert!(e.to_string().contains("absolute pressure"), "{e}");
    }
}
