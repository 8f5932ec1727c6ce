//! The immiscible water phase: the flash specifications with up to three phases, checked
//! against handbook azeotrope data, IAPWS-IF97 and the material balance.

mod common;

use common::{fixture, num};
use flashduty::equilibrium::{FlashSpec, Raoult, WaterPhase, flash, flash_with_water};
use flashduty::rachford_rice::{Phase, PhaseSet};
use flashduty::units::{Pressure, Temperature};
use flashduty::warnings::Warning;
use proptest::prelude::*;

fn atm() -> Pressure {
    Pressure::new("P", 101_325.0).unwrap()
}

fn model(names: &[&str]) -> (Raoult, WaterPhase) {
    let m = Raoult::from_names(names).unwrap();
    let w = WaterPhase::immiscible(m.components()).unwrap();
    (m, w)
}

/// Boiling points at 1 atm of the heterogeneous azeotropes of water with hydrocarbons, °C.
/// Source: CRC Handbook of Chemistry and Physics, "Azeotropic Data for Binary Mixtures"
/// (from memory). With both liquids present the boiling point does not depend on the
/// overall composition, so an equimolar feed is used.
const HETEROAZEOTROPES_C: [(&str, f64); 6] = [
    ("benzene", 69.25),
    ("toluene", 84.1),
    ("n-hexane", 61.6),
    ("n-heptane", 79.2),
    ("n-octane", 89.6),
    ("cyclohexane", 69.5),
];

#[test]
fn heteroazeotrope_boiling_points_within_1_k() {
    for (organic, t_c) in HETEROAZEOTROPES_C {
        let (m, w) = model(&["water", organic]);
        for z_water in [0.2, 0.5, 0.8] {
            let z = [z_water, 1.0 - z_water];
            let r = flash_with_water(&m, &w, &z, FlashSpec::BubbleTemperature { pressure: atm() }).unwrap();
            let t = r.temperature_k - 273.15;
            println!("water–{organic} z_w = {z_water}: bubble {t:.2} °C (handbook {t_c} °C)");
            assert!((t - t_c).abs() < 1.0, "water–{organic}: {t:.2} °C against {t_c} °C");
            let split = r.water_phase.as_ref().unwrap();
            assert_eq!(split.phase_set, PhaseSet::OrganicAqueous);
            assert_eq!(r.phase, Phase::Liquid);
        }
    }
}

/// ln psat of water at T from the IAPWS-IF97 table (linear in 1/T between rows).
fn iapws_psat(t: f64) -> f64 {
    let rows = fixture("iapws_water_saturation.csv");
    let pts: Vec<(f64, f64)> = rows.iter().map(|r| (num(r, "T_K"), num(r, "psat_Pa"))).collect();
    let i = pts.windows(2).position(|w| w[0].0 <= t && t <= w[1].0).unwrap();
    let ((t0, p0), (t1, p1)) = (pts[i], pts[i + 1]);
    let f = (1.0 / t - 1.0 / t0) / (1.0 / t1 - 1.0 / t0);
    (p0.ln() + f * (p1.ln() - p0.ln())).exp()
}

#[test]
fn steam_distillation_rule_against_iapws() {
    // The classical rule: with a water layer present, the vapour's water mole fraction is
    // the water vapour pressure over P. IAPWS-IF97 (tests/fixtures) for the vapour pressure;
    // 0.5 % covers the library's water vapour-pressure correlation against IF97.
    for organic in ["toluene", "n-octane", "o-xylene", "n-decane"] {
        for p_pa in [50_000.0, 101_325.0, 200_000.0] {
            let (m, w) = model(&["water", organic]);
            let p = Pressure::new("P", p_pa).unwrap();
            let r = flash_with_water(&m, &w, &[0.5, 0.5], FlashSpec::BubbleTemperature { pressure: p }).unwrap();
            let y_water = r.vapour.as_ref().unwrap()[0];
            let rule = iapws_psat(r.temperature_k) / p_pa;
            assert!(
                (y_water / rule - 1.0).abs() < 0.005,
                "{organic} at {p_pa} Pa: y_water {y_water} against IAPWS {rule}"
            );
        }
    }
}

#[test]
fn three_phase_flash_balances_and_its_phases_sum() {
    // Invented wet hydrocarbon stream between its bubble and dew points.
    let (m, w) = model(&["water", "n-hexane", "toluene", "n-decane"]);
    let z = [0.6, 0.15, 0.1, 0.15];
    let spec = FlashSpec::TemperaturePressure {
        temperature: Temperature::parse("T", "80 degC").unwrap(),
        pressure: atm(),
    };
    let r = flash_with_water(&m, &w, &z, spec).unwrap();
    let s = r.water_phase.clone().unwrap();
    assert_eq!(s.phase_set, PhaseSet::VapourOrganicAqueous);
    let (x, y, xa) = (r.liquid.unwrap(), r.vapour.unwrap(), s.aqueous.unwrap());
    for (name, v) in [("x", &x), ("y", &y), ("x_aqueous", &xa)] {
        assert!((v.iter().sum::<f64>() - 1.0).abs() < 1e-14, "{name}: {v:?}");
    }
    assert!(
        (xa[0] - 1.0).abs() < 1e-15 && xa[1..].iter().all(|&v| v == 0.0),
        "{xa:?}"
    );
    assert!((r.vapour_fraction + s.organic_fraction + s.aqueous_fraction - 1.0).abs() < 1e-15);
    assert!((r.liquid_fraction - s.organic_fraction - s.aqueous_fraction).abs() < 1e-15);
    // The vapour holds water at its K (Raoult's law over the water layer).
    assert!((y[0] / r.k_values[0] - 1.0).abs() < 1e-13);
    // Organic K-values hold between vapour and organic liquid.
    for i in 1..4 {
        assert!((y[i] / x[i] / r.k_values[i] - 1.0).abs() < 1e-12);
    }
    assert!(r.sensitivity.unwrap().dvapour_fraction_dt_per_k > 0.0);
}

#[test]
fn bubble_and_dew_points_bound_the_vapour_fraction() {
    let (m, w) = model(&["water", "n-heptane", "p-xylene"]);
    let z = [0.25, 0.45, 0.3];
    let bubble = flash_with_water(&m, &w, &z, FlashSpec::BubbleTemperature { pressure: atm() }).unwrap();
    let dew = flash_with_water(&m, &w, &z, FlashSpec::DewTemperature { pressure: atm() }).unwrap();
    assert!(bubble.temperature_k < dew.temperature_k);
    assert_eq!(dew.phase, Phase::Vapour);
    assert_eq!(bubble.water_phase.as_ref().unwrap().phase_set, PhaseSet::OrganicAqueous);
    // The incipient vapour adds up to 1.
    assert!((bubble.vapour.as_ref().unwrap().iter().sum::<f64>() - 1.0).abs() < 1e-10);
    let mut last = 0.0;
    for k in 1..10 {
        let beta = k as f64 / 10.0;
        let r = flash_with_water(
            &m,
            &w,
            &z,
            FlashSpec::PressureVapourFraction {
                pressure: atm(),
                vapour_fraction: beta,
            },
        )
        .unwrap();
        assert!((r.vapour_fraction - beta).abs() < 1e-9, "{beta}: {}", r.vapour_fraction);
        assert!(r.temperature_k >= last && r.temperature_k > bubble.temperature_k - 1e-9);
        assert!(r.temperature_k < dew.temperature_k + 1e-9);
        last = r.temperature_k;
        // The T–P flash at that temperature gives the same vapour fraction.
        let tp = flash_with_water(
            &m,
            &w,
            &z,
            FlashSpec::TemperaturePressure {
                temperature: Temperature::new("T", r.temperature_k).unwrap(),
                pressure: atm(),
            },
        )
        .unwrap();
        assert!(
            (tp.vapour_fraction - beta).abs() < 1e-7,
            "{beta}: {}",
            tp.vapour_fraction
        );
    }
    // Pressure specifications return to the same states.
    let t = Temperature::new("T", bubble.temperature_k).unwrap();
    let bp = flash_with_water(&m, &w, &z, FlashSpec::BubblePressure { temperature: t }).unwrap();
    assert!((bp.pressure_pa / 101_325.0 - 1.0).abs() < 1e-9, "{}", bp.pressure_pa);
    let t = Temperature::new("T", dew.temperature_k).unwrap();
    let dp = flash_with_water(&m, &w, &z, FlashSpec::DewPressure { temperature: t }).unwrap();
    assert!((dp.pressure_pa / 101_325.0 - 1.0).abs() < 1e-9, "{}", dp.pressure_pa);
    let tb = flash_with_water(
        &m,
        &w,
        &z,
        FlashSpec::TemperatureVapourFraction {
            temperature: Temperature::new("T", last).unwrap(),
            vapour_fraction: 0.9,
        },
    )
    .unwrap();
    assert!((tb.pressure_pa / 101_325.0 - 1.0).abs() < 1e-8, "{}", tb.pressure_pa);
}

#[test]
fn the_water_dew_point_is_where_water_saturates_the_vapour() {
    // A vapour rich in water: water condenses first, where z_w P = psat_w(T).
    let (m, w) = model(&["water", "n-hexane"]);
    let z = [0.7, 0.3];
    let dew = flash_with_water(&m, &w, &z, FlashSpec::DewTemperature { pressure: atm() }).unwrap();
    let incipient = dew.water_phase.as_ref().unwrap().aqueous.as_ref().unwrap();
    assert!(
        (incipient[0] - 1.0).abs() < 1e-15 && incipient[1] == 0.0,
        "{incipient:?}"
    );
    // IAPWS-IF97 vapour pressure at that temperature (0.5 % for the library's correlation).
    assert!((iapws_psat(dew.temperature_k) / (0.7 * 101_325.0) - 1.0).abs() < 0.005);
}

#[test]
fn solubilities_move_components_between_liquids() {
    // CRC Handbook: water dissolves in benzene to about 2.7e-3 mole fraction at 25 °C and
    // benzene in water to about 4.1e-4 (from memory); here only the direction is checked.
    let (m, w) = model(&["water", "benzene"]);
    let w = w
        .with_water_in_organic(2.7e-3)
        .unwrap()
        .with_solubility_in_water(1, 4.1e-4)
        .unwrap();
    let spec = FlashSpec::TemperaturePressure {
        temperature: Temperature::parse("T", "40 degC").unwrap(),
        pressure: atm(),
    };
    let r = flash_with_water(&m, &w, &[0.5, 0.5], spec).unwrap();
    let s = r.water_phase.unwrap();
    assert_eq!(s.phase_set, PhaseSet::OrganicAqueous);
    let x = r.liquid.unwrap();
    let xa = s.aqueous.unwrap();
    assert!((x[0] / 2.7e-3 - 1.0).abs() < 0.01, "{x:?}");
    assert!((xa[1] / 4.1e-4 - 1.0).abs() < 0.01, "{xa:?}");
}

#[test]
fn errors_name_the_field() {
    let m = Raoult::from_names(&["toluene", "benzene"]).unwrap();
    let e = WaterPhase::immiscible(m.components()).unwrap_err();
    assert_eq!(e.kind(), "no-water");
    assert!(e.to_string().starts_with("water_phase:"), "{e}");
    let m = Raoult::from_names(&["water", "toluene", "methanol"]).unwrap();
    let e = WaterPhase::immiscible(m.components()).unwrap_err();
    assert_eq!(e.kind(), "miscible-with-water");
    assert!(e.to_string().contains("'methanol'"), "{e}");
    let (m, w) = model(&["water", "toluene"]);
    let e = w.clone().with_water_in_organic(-0.1).unwrap_err();
    assert_eq!(e.kind(), "solubility-out-of-range");
    assert!(e.to_string().starts_with("water_phase.water_in_organic: -0.1"), "{e}");
    let e = w.clone().with_solubility_in_water(0, 1e-3).unwrap_err();
    assert!(e.to_string().starts_with("water_phase.organic_in_water[0]"), "{e}");
    let e = w.clone().with_solubility_in_water(1, f64::NAN).unwrap_err();
    assert_eq!(e.kind(), "solubility-out-of-range");
    let _ = m;
}

#[test]
fn partly_miscible_components_are_warned_about() {
    let (m, w) = model(&["water", "ethyl acetate"]);
    let r = flash_with_water(&m, &w, &[0.5, 0.5], FlashSpec::BubbleTemperature { pressure: atm() }).unwrap();
    assert!(
        r.warnings
            .iter()
            .any(|w| matches!(w, Warning::PartlyMiscibleWithWater { component, .. } if component == "ethyl acetate"))
    );
}

#[test]
fn without_the_option_a_wet_hydrocarbon_is_warned_about() {
    let m = Raoult::from_names(&["water", "toluene"]).unwrap();
    let r = flash(&m, &[0.5, 0.5], FlashSpec::BubbleTemperature { pressure: atm() }).unwrap();
    assert!(
        r.warnings
            .iter()
            .any(|w| matches!(w, Warning::SecondLiquidLikely { components } if components == &["toluene".to_string()])),
        "{:?}",
        r.warnings
    );
    // A miscible pair is not warned about.
    let m = Raoult::from_names(&["water", "ethanol"]).unwrap();
    let r = flash(&m, &[0.5, 0.5], FlashSpec::BubbleTemperature { pressure: atm() }).unwrap();
    assert!(
        !r.warnings
            .iter()
            .any(|w| matches!(w, Warning::SecondLiquidLikely { .. }))
    );
}

fn organic_feed() -> impl Strategy<Value = (Vec<&'static str>, Vec<f64>, f64, f64)> {
    let organics = [
        "benzene",
        "toluene",
        "n-hexane",
        "n-heptane",
        "n-octane",
        "n-decane",
        "cyclohexane",
        "p-xylene",
        "n-pentane",
    ];
    (
        proptest::sample::subsequence(organics.to_vec(), 1..=4),
        proptest::collection::vec(0.02f64..1.0, 5),
        0.01f64..0.95,
        280.0f64..460.0,
    )
        .prop_map(|(names, raw, water, t)| {
            let mut all = vec!["water"];
            all.extend(names);
            let mut z: Vec<f64> = raw[..all.len()].to_vec();
            z[0] = 0.0;
            let s: f64 = z.iter().sum();
            for v in z.iter_mut().skip(1) {
                *v *= (1.0 - water) / s;
            }
            z[0] = water;
            (all, z, t, 0.0)
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Material balance over three phases to round-off, fractions in [0, 1], each phase's
    /// mole fractions adding up to 1.
    #[test]
    fn material_balance_over_three_phases((names, z, t, _) in organic_feed(), p_bar in 0.3f64..8.0) {
        let (m, w) = model(&names);
        let spec = FlashSpec::TemperaturePressure {
            temperature: Temperature::new("T", t).unwrap(),
            pressure: Pressure::new("P", p_bar * 1e5).unwrap(),
        };
        let r = flash_with_water(&m, &w, &z, spec).unwrap();
        let s = r.water_phase.clone().unwrap();
        for f in [r.vapour_fraction, s.organic_fraction, s.aqueous_fraction, r.liquid_fraction] {
            prop_assert!((0.0..=1.0).contains(&f), "{f}");
        }
        prop_assert!((r.vapour_fraction + s.organic_fraction + s.aqueous_fraction - 1.0).abs() < 1e-14);
        let zero = vec![0.0; z.len()];
        let (x, y, xa) = (
            r.liquid.clone().unwrap_or(zero.clone()),
            r.vapour.clone().unwrap_or(zero.clone()),
            s.aqueous.clone().unwrap_or(zero),
        );
        for i in 0..z.len() {
            let back = s.organic_fraction * x[i] + s.aqueous_fraction * xa[i] + r.vapour_fraction * y[i];
            prop_assert!((back - z[i]).abs() <= 1e-15 + 4e-16 * z[i], "{i}: {back} vs {}", z[i]);
        }
        for (present, v) in [(s.phase_set.has_vapour(), &y), (s.phase_set.has_organic(), &x), (s.phase_set.has_aqueous(), &xa)] {
            if present {
                prop_assert!((v.iter().sum::<f64>() - 1.0).abs() < 1e-13, "{v:?}");
            }
        }
    }

    /// With no water in the feed there is no water phase: the result is the two-phase
    /// flash's, bit for bit.
    #[test]
    fn no_water_in_the_feed_is_the_two_phase_flash_to_the_bit((names, z, t, _) in organic_feed(), beta in 0.0f64..=1.0) {
        let mut z = z;
        z[0] = 0.0;
        let (m, w) = model(&names);
        let specs = [
            FlashSpec::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: atm() },
            FlashSpec::BubbleTemperature { pressure: atm() },
            FlashSpec::DewTemperature { pressure: atm() },
            FlashSpec::PressureVapourFraction { pressure: atm(), vapour_fraction: beta },
        ];
        for spec in specs {
            let a = flash(&m, &z, spec);
            let b = flash_with_water(&m, &w, &z, spec);
            prop_assert_eq!(format!("{a:?}"), format!("{b:?}"));
        }
    }
}

// ---------------------------------------------------------------------------------------
// Energy: duty, duty-specified flash and curves with the water phase.

use flashduty::energy::StreamState;
use flashduty::energy::{DutyOptions, Stream, heater_duty, heating_curve, outlet_for_duty};
use flashduty::units::{MolarFlow, Power};

fn tp(t_k: f64, p: Pressure) -> StreamState {
    StreamState::TemperaturePressure {
        temperature: Temperature::new("T", t_k).unwrap(),
        pressure: p,
    }
}

/// Water–toluene vapour (invented: 60 % water, 36 kmol/h) cooled at 1 atm from 110 °C to
/// 40 °C, checked by hand: the water dew point is where 0.6 atm is water's vapour pressure
/// (IAPWS-IF97, tests/fixtures); the hydrocarbon dew point and the plateau are at the
/// three-phase temperature, within 1 K of the handbook azeotrope (84.1 °C, CRC, from
/// memory); along the plateau the vapour keeps y_water = psat_water(T*)/P, so the
/// plateau starts at vapour fraction z_toluene / (1 − y_water) and ends at 0.
#[test]
fn water_toluene_condenser_cooling_curve_by_hand() {
    let stream = Stream::from_names(
        &["water", "toluene"],
        &[0.6, 0.4],
        MolarFlow::parse("flow", "36 kmol/h").unwrap(),
    )
    .unwrap()
    .with_immiscible_water()
    .unwrap();
    let c = heating_curve(
        &stream,
        tp(383.15, atm()),
        tp(313.15, atm()),
        41,
        DutyOptions::default(),
    )
    .unwrap();
    let water_dew = c.water_dew_temperature_k.unwrap();
    let organic_dew = c.organic_dew_temperature_k.unwrap();
    let psat_ratio = iapws_psat(water_dew) / (0.6 * 101_325.0);
    assert!(
        (psat_ratio - 1.0).abs() < 0.005,
        "water dew {water_dew} K: psat ratio {psat_ratio}"
    );
    assert!((c.dew_temperature_k.unwrap() - water_dew).abs() < 1e-9);
    assert!(
        (organic_dew - c.bubble_temperature_k).abs() < 1e-6,
        "{organic_dew} vs {}",
        c.bubble_temperature_k
    );
    assert!((organic_dew - 273.15 - 84.1).abs() < 1.0);
    let y_water = iapws_psat(organic_dew) / 101_325.0;
    let plateau_start = 0.4 / (1.0 - y_water);
    let marks: Vec<&str> = c
        .points
        .iter()
        .map(|p| p.breakpoint)
        .filter(|b| !b.is_empty())
        .collect();
    assert_eq!(marks, vec!["water-dew", "organic-dew", "bubble"]);
    let organic = c.points.iter().find(|p| p.breakpoint == "organic-dew").unwrap();
    assert!(
        (organic.vapour_fraction - plateau_start).abs() < 0.005,
        "{} vs {plateau_start}",
        organic.vapour_fraction
    );
    // Between the organic dew point and the bubble point the temperature is flat.
    for p in &c.points {
        if p.vapour_fraction < organic.vapour_fraction && p.vapour_fraction > 0.0 {
            assert!((p.temperature_k - organic_dew).abs() < 1e-6, "{p:?}");
        }
    }
    // Cooling: duty and temperature fall together, vapour fraction never rises.
    for w in c.points.windows(2) {
        assert!(
            w[1].duty_w <= w[0].duty_w && w[1].temperature_k <= w[0].temperature_k + 1e-9,
            "{w:?}"
        );
        assert!(w[1].vapour_fraction <= w[0].vapour_fraction + 1e-12, "{w:?}");
    }
    // The plateau's duty is the two latent heats of what condenses there, about
    // (0.6 − 0.556 × 0.902) × 40.7 kJ/mol for water plus 0.4 × 33.2 kJ/mol for toluene
    // per mole (CRC latent heats at the normal boiling points, from memory, within 10 %).
    let bubble = c.points.iter().find(|p| p.breakpoint == "bubble").unwrap();
    let plateau_kw = (organic.duty_w - bubble.duty_w) / 1e3;
    let flow = 36_000.0 / 3600.0;
    let by_hand = flow * (plateau_start * y_water * 41_000.0 + 0.4 * 33_500.0) / 1e3;
    assert!(
        (plateau_kw / by_hand - 1.0).abs() < 0.1,
        "{plateau_kw} kW vs {by_hand} kW by hand"
    );
}

#[test]
fn duty_given_lands_on_the_plateau_and_back() {
    let stream = Stream::from_names(&["water", "toluene"], &[0.5, 0.5], MolarFlow::new("flow", 1.0).unwrap())
        .unwrap()
        .with_immiscible_water()
        .unwrap();
    let inlet = tp(300.0, atm());
    // Both liquids boil off at the three-phase temperature until the water is gone, at
    // vapour fraction 0.5 / y_water ≈ 0.90.
    for beta in [0.05, 0.3, 0.7, 0.85] {
        let outlet = StreamState::PressureVapourFraction {
            pressure: atm(),
            vapour_fraction: beta,
        };
        let d = heater_duty(&stream, inlet, outlet, DutyOptions::default()).unwrap();
        assert_eq!(
            d.outlet.water_phase.as_ref().unwrap().phase_set,
            PhaseSet::VapourOrganicAqueous
        );
        let back = outlet_for_duty(
            &stream,
            inlet,
            Power::new("duty", d.duty_w).unwrap(),
            atm(),
            DutyOptions::default(),
        )
        .unwrap();
        assert!(
            (back.outlet.vapour_fraction - beta).abs() < 1e-9,
            "{beta}: {}",
            back.outlet.vapour_fraction
        );
        assert!((back.outlet.temperature_k - d.outlet.temperature_k).abs() < 1e-6);
        // At the three-phase temperature the duty jumps at constant T: no dQ/dT.
        assert!(d.dduty_dt_out_w_per_k.is_none());
    }
}

fn wet_stream(names: &[&str], z: &[f64]) -> Stream {
    Stream::from_names(names, z, MolarFlow::new("flow", 2.0).unwrap())
        .unwrap()
        .with_immiscible_water()
        .unwrap()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(60))]

    /// The duty is a state function: A→B plus B→C is A→C, and the duty-specified flash
    /// finds the outlet again.
    #[test]
    fn duty_is_a_state_function_with_water((names, z, _, _) in organic_feed(), ts in proptest::collection::vec(280.0f64..480.0, 3)) {
        let s = wet_stream(&names, &z);
        let o = DutyOptions::default();
        let ab = heater_duty(&s, tp(ts[0], atm()), tp(ts[1], atm()), o).unwrap().duty_w;
        let bc = heater_duty(&s, tp(ts[1], atm()), tp(ts[2], atm()), o).unwrap().duty_w;
        let ac = heater_duty(&s, tp(ts[0], atm()), tp(ts[2], atm()), o).unwrap();
        prop_assert!((ab + bc - ac.duty_w).abs() <= 1e-9 * (ab.abs() + bc.abs()).max(1.0), "{ab} + {bc} vs {}", ac.duty_w);
        // The enthalpy table adds up to the duty.
        let table: f64 = ac.table.iter().map(|r| r.sign() * r.enthalpy_flow_w).sum();
        prop_assert!((table - ac.duty_w).abs() <= 1e-9 * ac.duty_w.abs().max(1.0));
        let back = outlet_for_duty(&s, tp(ts[0], atm()), Power::new("duty", ac.duty_w).unwrap(), atm(), o).unwrap();
        let h_back = back.outlet_enthalpy_j_per_mol;
        prop_assert!((h_back - ac.outlet_enthalpy_j_per_mol).abs() <= 1e-7 * ac.outlet_enthalpy_j_per_mol.abs().max(1e3), "{h_back} vs {}", ac.outlet_enthalpy_j_per_mol);
        // dQ/dT by central differences where the outlet is not at a three-phase temperature.
        if let Some(dq) = ac.dduty_dt_out_w_per_k {
            let h = 1e-4;
            let up = heater_duty(&s, tp(ts[0], atm()), tp(ts[2] + h, atm()), o).unwrap().duty_w;
            let down = heater_duty(&s, tp(ts[0], atm()), tp(ts[2] - h, atm()), o).unwrap().duty_w;
            let fd = (up - down) / (2.0 * h);
            // Skip states within the step of a phase boundary (the slope jumps there).
            let same_phases = |x: &flashduty::energy::DutyResult| x.outlet.water_phase.as_ref().map(|w| w.phase_set);
            let a = heater_duty(&s, tp(ts[0], atm()), tp(ts[2] + h, atm()), o).unwrap();
            let b = heater_duty(&s, tp(ts[0], atm()), tp(ts[2] - h, atm()), o).unwrap();
            if same_phases(&a) == same_phases(&b) {
                prop_assert!((fd - dq).abs() <= 1e-4 * dq.abs().max(1.0), "fd {fd} vs {dq}");
            }
        }
    }
}

// ---------------------------------------------------------------------------------------
// The case key `water_phase`.

use flashduty::case::{Command, Outcome, parse_case, run};
use flashduty::library::Library;

fn case_error(value: serde_json::Value, command: Command) -> String {
    let lib = Library::builtin();
    match parse_case(&value, command).and_then(|c| run(lib, command, &c, None)) {
        Ok(_) => panic!("accepted: {value}"),
        Err(e) => e.to_string(),
    }
}

#[test]
fn case_key_runs_every_command_and_reports_the_phases() {
    let lib = Library::builtin();
    let case = serde_json::json!({
        "components": ["water", "toluene"], "z": [0.3, 0.7], "P": "1 atm",
        "water_phase": "immiscible", "flow": "1 mol/s"
    });
    let c = parse_case(&case, Command::Bubble).unwrap();
    let out = run(lib, Command::Bubble, &c, None).unwrap();
    let j = out.to_json();
    assert_eq!(j["phase_set"], "organic+aqueous");
    assert_eq!(j["aqueous_fraction"], 0.3);
    assert!((j["T_K"].as_f64().unwrap() - 273.15 - 84.1).abs() < 1.0);
    assert_eq!(j["aqueous_flow_mol_s"], 0.3);
    let case = serde_json::json!({
        "components": ["water", "toluene"], "z": [0.3, 0.7],
        "water_phase": {"model": "immiscible", "water_in_organic": 0.0025, "organic_in_water": {"toluene": 1e-4}},
        "inlet": {"T": "25 degC", "P": "1 atm"}, "outlet": {"T": "95 degC", "P": "1 atm"}
    });
    for command in [Command::Duty, Command::Curve] {
        let c = parse_case(&case, command).unwrap();
        let out = run(lib, command, &c, None).unwrap();
        let j = out.to_json();
        match out {
            Outcome::Duty(_) => assert_eq!(j["outlet"]["phase_set"], "vapour+organic"),
            Outcome::Curve(_) => assert!(j["organic_dew_T_K"].as_f64().is_some()),
            _ => unreachable!(),
        }
    }
    // Without the option the same feed warns.
    let case = serde_json::json!({"components": ["water", "toluene"], "z": [0.3, 0.7], "P": "1 atm"});
    let c = parse_case(&case, Command::Bubble).unwrap();
    let j = run(lib, Command::Bubble, &c, None).unwrap().to_json();
    assert_eq!(j["warnings"][0]["kind"], "second-liquid-likely");
    assert!(j.get("phase_set").is_none());
}

#[test]
fn case_key_errors_name_the_field() {
    let base = |water_phase: serde_json::Value, z: [f64; 2], names: [&str; 2]| serde_json::json!({"components": names, "z": z, "P": "1 atm", "water_phase": water_phase});
    let e = case_error(base("maybe".into(), [0.5, 0.5], ["water", "toluene"]), Command::Bubble);
    assert_eq!(e, "water_phase: 'maybe' is not one of one-liquid, immiscible");
    let e = case_error(
        base("immiscible".into(), [0.0, 1.0], ["water", "toluene"]),
        Command::Bubble,
    );
    assert!(e.starts_with("water_phase: the feed holds no water"), "{e}");
    let e = case_error(
        base("immiscible".into(), [0.5, 0.5], ["benzene", "toluene"]),
        Command::Bubble,
    );
    assert!(e.starts_with("water_phase: the feed holds no water"), "{e}");
    let e = case_error(
        base("immiscible".into(), [0.5, 0.5], ["water", "acetone"]),
        Command::Bubble,
    );
    assert!(e.contains("'acetone' is miscible with water"), "{e}");
    let e = case_error(
        base(
            serde_json::json!({"model": "immiscible", "water_in_organic": 1.5}),
            [0.5, 0.5],
            ["water", "toluene"],
        ),
        Command::Bubble,
    );
    assert_eq!(
        e,
        "water_phase.water_in_organic: 1.5 is refused: a solubility is a mole fraction in [0, 1)"
    );
    let e = case_error(
        base(
            serde_json::json!({"model": "immiscible", "organic_in_water": {"toluene": -0.1}}),
            [0.5, 0.5],
            ["water", "toluene"],
        ),
        Command::Bubble,
    );
    assert!(
        e.starts_with("water_phase.organic_in_water.toluene: -0.1 is refused"),
        "{e}"
    );
    let e = case_error(
        base(
            serde_json::json!({"model": "immiscible", "organic_in_water": {"benzene": 1e-4}}),
            [0.5, 0.5],
            ["water", "toluene"],
        ),
        Command::Bubble,
    );
    assert_eq!(
        e,
        "water_phase.organic_in_water.benzene: 'benzene' is not a component of the feed"
    );
    let e = case_error(
        base(
            serde_json::json!({"model": "immiscible", "solubility": 1e-4}),
            [0.5, 0.5],
            ["water", "toluene"],
        ),
        Command::Bubble,
    );
    assert!(e.starts_with("unknown key 'water_phase.solubility'"), "{e}");
    let e = case_error(
        base(
            serde_json::json!({"water_in_organic": 1e-3}),
            [0.5, 0.5],
            ["water", "toluene"],
        ),
        Command::Bubble,
    );
    assert!(e.starts_with("water_phase.model: missing"), "{e}");
}

/// The adiabatic flash of a wet stream (zero duty, a pressure let-down) keeps its enthalpy,
/// through the full functions and through `DutyCalculator`, which agree with each other.
#[test]
fn adiabatic_let_down_of_a_wet_stream() {
    use flashduty::energy::DutyCalculator;
    // Invented: hot wet naphtha-like feed let down from 5 bar to 1 atm.
    let s = wet_stream(&["water", "n-hexane", "n-heptane", "toluene"], &[0.3, 0.3, 0.2, 0.2]);
    let inlet = tp(420.0, Pressure::new("P", 5e5).unwrap());
    let zero = Power::new("duty", 0.0).unwrap();
    let r = outlet_for_duty(&s, inlet, zero, atm(), DutyOptions::default()).unwrap();
    assert!((r.outlet_enthalpy_j_per_mol - r.inlet_enthalpy_j_per_mol).abs() < 1e-6);
    assert!(r.outlet.temperature_k < 420.0);
    assert!(r.outlet.water_phase.is_some());
    let mut calc = DutyCalculator::new(&s, DutyOptions::default()).unwrap();
    let fast = calc.outlet_for_duty(inlet, zero, atm()).unwrap();
    assert!((fast.outlet.temperature_k - r.outlet.temperature_k).abs() < 1e-9);
    assert!((fast.outlet.vapour_fraction - r.outlet.vapour_fraction).abs() < 1e-12);
    // And the calculator's duty between T–P states is the full function's.
    let outlet = tp(330.0, atm());
    let d = calc.duty(inlet, outlet).unwrap();
    let full = heater_duty(&s, inlet, outlet, DutyOptions::default()).unwrap();
    assert_eq!(d.duty_w, full.duty_w);
}
