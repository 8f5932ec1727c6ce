//! The activity models through the energy layer: material and energy balances, the duty as
//! a state function, dQ/dT, the duty-specified flash, and the excess enthalpy in the duty.
//! These are identities the models must satisfy (no outside values); the outside checks
//! are in `activity_reference.rs`.

use flashduty::activity::{ActivityModel, BinaryParameters, LiquidModel};
use flashduty::energy::{
    DutyOptions, EnthalpyModel, ExcessEnthalpyModel, Stream, StreamState, heater_duty, heater_duty_with,
    heating_curve_with, outlet_for_duty_with,
};
use flashduty::equilibrium::{FlashSpec, KValueModel, KValues, ModifiedRaoult, flash};
use flashduty::library::Library;
use flashduty::rachford_rice::Phase;
use flashduty::units::{MolarFlow, Power, Pressure, Temperature};
use proptest::prelude::*;

const ATM: f64 = 101_325.0;
const NAMES: [&str; 3] = ["methanol", "ethanol", "water"];

fn models(kind: LiquidModel, names: &[&str]) -> (Stream, ModifiedRaoult, ExcessEnthalpyModel, Vec<f64>) {
    let c = Library::builtin().get_all(names).unwrap();
    let z: Vec<f64> = match names.len() {
        2 => vec![0.3, 0.7],
        _ => vec![0.2, 0.3, 0.5],
    };
    let stream = Stream::new(c.clone(), &z, MolarFlow::new("flow", 2.0).unwrap()).unwrap();
    let k = ModifiedRaoult::new(c.clone(), kind, BinaryParameters::builtin()).unwrap();
    let h = ExcessEnthalpyModel::new(
        EnthalpyModel::from_options(c, DutyOptions::default()),
        k.activity().clone(),
    )
    .unwrap();
    (stream, k, h, z)
}

fn tp(t: f64, p: f64) -> StreamState {
    StreamState::TemperaturePressure {
        temperature: Temperature::new("T", t).unwrap(),
        pressure: Pressure::new("P", p).unwrap(),
    }
}

fn kinds() -> impl Strategy<Value = LiquidModel> {
    prop_oneof![
        Just(LiquidModel::Wilson),
        Just(LiquidModel::Nrtl),
        Just(LiquidModel::Uniquac)
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    /// The flash closes the material balance to round-off, and its phases are in
    /// equilibrium under the model at the compositions it reports.
    #[test]
    fn flash_balances_and_is_in_equilibrium(kind in kinds(), t in 330.0f64..380.0, p in 0.5e5f64..2e5) {
        let (_, k, _, z) = models(kind, &NAMES);
        let spec = FlashSpec::TemperaturePressure {
            temperature: Temperature::new("T", t).unwrap(),
            pressure: Pressure::new("P", p).unwrap(),
        };
        let r = flash(&k, &z, spec).unwrap();
        prop_assert!(r.vapour_fraction.is_finite());
        if r.phase == Phase::TwoPhase {
            let (x, y) = (r.liquid.as_ref().unwrap(), r.vapour.as_ref().unwrap());
            let mut kv = KValues::new(3);
            k.k_values(t, p, x, y, &mut kv);
            for i in 0..3 {
                let closure = r.liquid_fraction * x[i] + r.vapour_fraction * y[i] - z[i];
                prop_assert!(closure.abs() < 1e-12, "balance {closure:e}");
                prop_assert!((y[i] / (kv.k[i] * x[i]) - 1.0).abs() < 1e-9, "equilibrium of {i}");
            }
        }
    }

    /// The duty is a state function: A→B plus B→C is A→C, and the table adds up to it.
    #[test]
    fn duty_is_a_state_function(kind in kinds(), t_a in 300.0f64..390.0, t_b in 300.0f64..390.0, t_c in 300.0f64..390.0) {
        let (s, k, h, _) = models(kind, &NAMES);
        let q = |a: f64, b: f64| heater_duty_with(&s, &k, &h, tp(a, ATM), tp(b, ATM)).unwrap();
        let (ab, bc, ac) = (q(t_a, t_b), q(t_b, t_c), q(t_a, t_c));
        let scale = ab.duty_w.abs() + bc.duty_w.abs() + 1.0;
        prop_assert!((ab.duty_w + bc.duty_w - ac.duty_w).abs() < 1e-9 * scale);
        let table: f64 = ac.table.iter().map(|row| row.sign() * row.enthalpy_flow_w).sum();
        prop_assert!((table - ac.duty_w).abs() < 1e-9 * (ac.duty_w.abs() + 1.0));
    }

    /// dQ/dT of the outlet against a central difference of the duty, in every region.
    #[test]
    fn dq_dt_is_the_derivative(kind in kinds(), t_out in 320.0f64..385.0) {
        let (s, k, h, _) = models(kind, &["ethanol", "water"]);
        let q = |t: f64| heater_duty_with(&s, &k, &h, tp(300.0, ATM), tp(t, ATM)).unwrap();
        let r = q(t_out);
        let Some(analytic) = r.dduty_dt_out_w_per_k else { return Ok(()) };
        let dt = 1e-3;
        let fd = (q(t_out + dt).duty_w - q(t_out - dt).duty_w) / (2.0 * dt);
        prop_assert!((analytic / fd - 1.0).abs() < 1e-5, "{analytic} vs {fd}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// Bubble and dew points stay ordered and meet at the azeotrope, where x = y: across
    /// the ethanol–water azeotrope (x = 0.894 at 1 atm) the bubble temperature never exceeds
    /// the dew temperature, and a T–P flash between them is two-phase with its balance closed.
    #[test]
    fn bubble_and_dew_are_robust_across_the_azeotrope(x in 0.80f64..0.99, kind in prop_oneof![Just(LiquidModel::Nrtl), Just(LiquidModel::Uniquac)]) {
        let (_, k, _, _) = models(kind, &["ethanol", "water"]);
        let z = [x, 1.0 - x];
        let pressure = Pressure::new("P", ATM).unwrap();
        let b = flash(&k, &z, FlashSpec::BubbleTemperature { pressure }).unwrap();
        let d = flash(&k, &z, FlashSpec::DewTemperature { pressure }).unwrap();
        prop_assert!(b.temperature_k <= d.temperature_k + 1e-9, "{} > {}", b.temperature_k, d.temperature_k);
        prop_assert!(d.temperature_k - b.temperature_k < 0.5);
        if d.temperature_k - b.temperature_k > 1e-6 {
            let t = 0.5 * (b.temperature_k + d.temperature_k);
            let spec = FlashSpec::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure };
            let r = flash(&k, &z, spec).unwrap();
            prop_assert_eq!(r.phase, Phase::TwoPhase);
            let (lx, vy) = (r.liquid.unwrap(), r.vapour.unwrap());
            prop_assert!((r.liquid_fraction * lx[0] + r.vapour_fraction * vy[0] - z[0]).abs() < 1e-12);
        }
    }
}

/// Heating a liquid that stays liquid: the duty differs from the ideal model's by exactly
/// the change of the excess enthalpy (same pure-component paths), flow × ΔHᴱ.
#[test]
fn excess_enthalpy_enters_the_duty() {
    for kind in [LiquidModel::Wilson, LiquidModel::Nrtl, LiquidModel::Uniquac] {
        let (s, k, h, z) = models(kind, &NAMES);
        let nonideal = heater_duty_with(&s, &k, &h, tp(290.0, ATM), tp(320.0, ATM)).unwrap();
        let ideal = heater_duty(&s, tp(290.0, ATM), tp(320.0, ATM), DutyOptions::default()).unwrap();
        assert_eq!(nonideal.outlet.phase, Phase::Liquid);
        let a = ActivityModel::new(kind, &NAMES, BinaryParameters::builtin()).unwrap();
        let expected = 2.0 * (a.excess_enthalpy_j_per_mol(320.0, &z) - a.excess_enthalpy_j_per_mol(290.0, &z));
        let diff = nonideal.duty_w - ideal.duty_w;
        assert!(
            (diff - expected).abs() < 1e-8 * ideal.duty_w.abs(),
            "{kind}: {diff} vs {expected}"
        );
    }
}

/// The duty-specified flash inverts the duty, and the curve's points lie on the duty.
#[test]
fn duty_specified_flash_and_curve() {
    for kind in [LiquidModel::Wilson, LiquidModel::Nrtl, LiquidModel::Uniquac] {
        let (s, k, h, _) = models(kind, &["ethanol", "water"]);
        let p = Pressure::new("P", ATM).unwrap();
        for t_out in [330.0, 355.0, 360.0, 372.0, 390.0] {
            let q = heater_duty_with(&s, &k, &h, tp(300.0, ATM), tp(t_out, ATM))
                .unwrap()
                .duty_w;
            let r = outlet_for_duty_with(&s, &k, &h, tp(300.0, ATM), Power::new("duty", q).unwrap(), p).unwrap();
            assert!(
                (r.outlet.temperature_k - t_out).abs() < 1e-6,
                "{kind}: {} vs {t_out}",
                r.outlet.temperature_k
            );
        }
        let c = heating_curve_with(&s, &k, &h, tp(300.0, ATM), tp(390.0, ATM), 12).unwrap();
        for pt in &c.points {
            let q = heater_duty_with(&s, &k, &h, tp(300.0, ATM), tp(pt.temperature_k, ATM))
                .unwrap()
                .duty_w;
            assert!((q - pt.duty_w).abs() < 1e-6 * c.duty_w.abs(), "{kind}: {pt:?} vs {q}");
        }
    }
}
