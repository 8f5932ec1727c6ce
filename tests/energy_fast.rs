//! The hot-loop `DutyCalculator`: the same numbers as `heater_duty` and `outlet_for_duty`
//! (a consistency check), the same numbers against IAPWS-IF97 water and the CRC Handbook
//! latent heats (checks against something outside the project), and every error it can
//! return.

mod common;

use common::{fixture, num};
use flashduty::energy::{
    DutyCalculator, DutyOptions, DutyResult, DutySummary, EnergyError, ReferencePhase, ReferenceState, Stream,
    StreamState, VaporisationPath, VapourModel, heater_duty, outlet_for_duty,
};
use flashduty::equilibrium::{FlashError, FlashResult, FlashSpec, Raoult, flash};
use flashduty::rachford_rice::Phase;
use flashduty::units::{MolarFlow, Power, Pressure, Temperature, UnitError};
use proptest::prelude::*;

const ATM: f64 = 101_325.0;

fn tp(t: f64, p: f64) -> StreamState {
    StreamState::TemperaturePressure {
        temperature: Temperature::new("T", t).unwrap(),
        pressure: Pressure::new("P", p).unwrap(),
    }
}

fn pb(p: f64, beta: f64) -> StreamState {
    StreamState::PressureVapourFraction {
        pressure: Pressure::new("P", p).unwrap(),
        vapour_fraction: beta,
    }
}

fn stream(names: &[&str], z: &[f64], flow: f64) -> Stream {
    Stream::from_names(names, z, MolarFlow::new("flow", flow).unwrap()).unwrap()
}

fn calculator(s: &Stream) -> DutyCalculator {
    DutyCalculator::new(s, DutyOptions::default()).unwrap()
}

/// IAPWS-IF97 enthalpy of water at 101.325 kPa, J/mol, at a fixture row
/// (tests/fixtures/iapws_water_1atm.csv, made by tools/make_iapws_water.py with iapws
/// 1.5.5): `phase` is `liquid`, `vapour`, `saturated-liquid` or `saturated-vapour`.
fn iapws(phase: &str, t: Option<f64>) -> (f64, f64) {
    fixture("iapws_water_1atm.csv")
        .iter()
        .find(|r| r["phase"] == phase && t.is_none_or(|t| (num(r, "T_K") - t).abs() < 1e-9))
        .map(|r| (num(r, "T_K"), num(r, "h_J_per_mol")))
        .unwrap_or_else(|| panic!("no IAPWS row {phase} {t:?}"))
}

/// Relative closeness for the fast-versus-full comparisons: equal, or within `rel` of the
/// larger magnitude.
fn close(a: f64, b: f64, rel: f64) -> bool {
    a == b || (a - b).abs() <= rel * a.abs().max(b.abs())
}

fn close_slices(a: Option<&[f64]>, b: Option<&[f64]>) -> bool {
    match (a, b) {
        (None, None) => true,
        (Some(a), Some(b)) => a.len() == b.len() && a.iter().zip(b).all(|(x, y)| close(*x, *y, 1e-12)),
        _ => false,
    }
}

/// The summary and the calculator's compositions agree with the full result to 1e-12.
fn agrees(s: &DutySummary, calc: &DutyCalculator, full: &DutyResult) -> Result<(), String> {
    let states = [
        ("inlet", s.inlet, &full.inlet, calc.inlet_liquid(), calc.inlet_vapour()),
        (
            "outlet",
            s.outlet,
            &full.outlet,
            calc.outlet_liquid(),
            calc.outlet_vapour(),
        ),
    ];
    for (name, fast, slow, x, y) in states {
        let slow: &FlashResult = slow;
        let same = fast.phase == slow.phase
            && close(fast.temperature_k, slow.temperature_k, 1e-12)
            && close(fast.pressure_pa, slow.pressure_pa, 1e-12)
            && close(fast.vapour_fraction, slow.vapour_fraction, 1e-12)
            && close(fast.liquid_fraction, slow.liquid_fraction, 1e-12)
            && close_slices(x, slow.liquid.as_deref())
            && close_slices(y, slow.vapour.as_deref());
        if !same {
            return Err(format!("{name}: {fast:?} vs {slow:?}"));
        }
    }
    let slope = match (s.dduty_dt_out_w_per_k, full.dduty_dt_out_w_per_k) {
        (None, None) => true,
        (Some(a), Some(b)) => close(a, b, 1e-12),
        _ => false,
    };
    if !(close(s.duty_w, full.duty_w, 1e-12)
        && close(s.inlet_enthalpy_j_per_mol, full.inlet_enthalpy_j_per_mol, 1e-12)
        && close(s.outlet_enthalpy_j_per_mol, full.outlet_enthalpy_j_per_mol, 1e-12)
        && slope)
    {
        return Err(format!(
            "{s:?} vs duty {} slope {:?}",
            full.duty_w, full.dduty_dt_out_w_per_k
        ));
    }
    Ok(())
}

/// Water heated from 20 °C at 1 atm, through the calculator: the same checks against
/// IAPWS-IF97 as the full heater duty in tests/energy.rs (1.5 % to 150 °C, 2 % for the
/// liquid to 95 °C).
#[test]
fn water_duty_against_iapws() {
    let s = stream(&["water"], &[1.0], 1.0);
    let mut calc = calculator(&s);
    let (t1, h1) = iapws("liquid", Some(293.15));
    for (what, phase, t2, tol) in [
        ("20 -> 150 degC", "vapour", 423.15, 0.015),
        ("liquid 20 -> 95 degC", "liquid", 368.15, 0.02),
    ] {
        let (_, h2) = iapws(phase, Some(t2));
        let d = calc.duty(tp(t1, ATM), tp(t2, ATM)).unwrap();
        let dev = d.duty_w / (h2 - h1) - 1.0;
        println!(
            "calculator, water {what}: {:.1} W vs IAPWS-IF97 {:.1} W ({:+.2} %)",
            d.duty_w,
            h2 - h1,
            100.0 * dev
        );
        assert!(dev.abs() < tol, "{what}: {dev}");
    }
}

/// Steam through the calculator with the second-virial vapour, against IAPWS-IF97
/// (tests/fixtures/iapws_water_1atm.csv): 105 → 150 °C at 1 atm within the 4 % aim, and the
/// duty-specified flash given the IAPWS-IF97 duty from 20 °C to steam at 150 °C ends within
/// the 3 K of the ideal-gas check (`water_duty_specified_flash_against_iapws`, −1.3 K there).
/// It ends further off, about −2.5 K: the second virial's duty for the whole change is
/// +0.18 % from IAPWS-IF97 (the ideal gas's +0.09 %), about 88 J/mol, which a steam Cp near
/// 35 J/(mol·K) turns into that; the correction improves the vapour's sensible heat, and the
/// whole change is dominated by the latent heat. Both equal the full functions.
#[test]
fn water_with_second_virial_through_the_calculator() {
    let s = stream(&["water"], &[1.0], 1.0);
    let o = DutyOptions {
        vapour_model: VapourModel::SecondVirial,
        ..DutyOptions::default()
    };
    let mut calc = DutyCalculator::new(&s, o).unwrap();
    let (t1, h1) = iapws("vapour", Some(378.15));
    let (t2, h2) = iapws("vapour", Some(423.15));
    let d = calc.duty(tp(t1, ATM), tp(t2, ATM)).unwrap();
    let dev = d.duty_w / (h2 - h1) - 1.0;
    println!(
        "calculator, second virial, steam 105 -> 150 degC: {:+.2} % from IAPWS-IF97",
        100.0 * dev
    );
    assert!(dev.abs() < 0.04, "{dev}");
    agrees(&d, &calc, &heater_duty(&s, tp(t1, ATM), tp(t2, ATM), o).unwrap()).unwrap();
    let (t0, h0) = iapws("liquid", Some(293.15));
    let q = Power::new("duty", h2 - h0).unwrap();
    let p = Pressure::new("P", ATM).unwrap();
    let r = calc.outlet_for_duty(tp(t0, ATM), q, p).unwrap();
    println!(
        "calculator, second virial, water to steam: T {:.3} K for the IAPWS-IF97 duty to {t2} K",
        r.outlet.temperature_k
    );
    assert!((r.outlet.temperature_k - t2).abs() < 3.0);
    agrees(&r, &calc, &outlet_for_duty(&s, tp(t0, ATM), q, p, o).unwrap()).unwrap();
}

/// The duty-specified flash given IAPWS-IF97 duties for 1 mol/s of water from 20 °C at
/// 1 atm. (1) Up to the saturated liquid plus half the latent heat: the outlet is at the
/// IAPWS-IF97 saturation temperature within 0.5 K (the handbook boiling-point limit of
/// tests/flash_specs.rs) with a vapour fraction of 0.5 within 0.02 (the water latent-heat
/// limit of 2 % in tests/library_data.rs, as a fraction of the latent heat). (2) Up to steam
/// at 150 °C: the outlet is within 3 K of 150 °C. The model's duty for that change is
/// +0.09 % from IAPWS-IF97 (README), about 45 J/mol, which an ideal-gas steam Cp near
/// 34 J/(mol·K) turns into about −1.3 K; 3 K leaves room for that and no more.
#[test]
fn water_duty_specified_flash_against_iapws() {
    let s = stream(&["water"], &[1.0], 1.0);
    let mut calc = calculator(&s);
    let (t1, h1) = iapws("liquid", Some(293.15));
    let (t_sat, h_f) = iapws("saturated-liquid", None);
    let (_, h_g) = iapws("saturated-vapour", None);
    let p = Pressure::new("P", ATM).unwrap();
    let half = Power::new("duty", h_f - h1 + 0.5 * (h_g - h_f)).unwrap();
    let r = calc.outlet_for_duty(tp(t1, ATM), half, p).unwrap();
    println!(
        "calculator, water half vaporised: T {:.3} K (IAPWS-IF97 Tsat {t_sat:.3} K), vapour fraction {:.4}",
        r.outlet.temperature_k, r.outlet.vapour_fraction
    );
    assert_eq!(r.outlet.phase, Phase::TwoPhase);
    assert!((r.outlet.temperature_k - t_sat).abs() < 0.5);
    assert!((r.outlet.vapour_fraction - 0.5).abs() < 0.02);
    let (t2, h2) = iapws("vapour", Some(423.15));
    let r = calc
        .outlet_for_duty(tp(t1, ATM), Power::new("duty", h2 - h1).unwrap(), p)
        .unwrap();
    println!(
        "calculator, water to steam: T {:.3} K for the IAPWS-IF97 duty to {t2} K",
        r.outlet.temperature_k
    );
    assert_eq!(r.outlet.phase, Phase::Vapour);
    assert!((r.outlet.temperature_k - t2).abs() < 3.0);
    // The full function returns the same outlet.
    let full = outlet_for_duty(
        &s,
        tp(t1, ATM),
        Power::new("duty", h2 - h1).unwrap(),
        p,
        DutyOptions::default(),
    )
    .unwrap();
    agrees(&r, &calc, &full).unwrap();
}

/// The latent heat at the normal boiling point, read through the calculator as the duty
/// across Tb ± 0.01 K at 1 atm, within 3 % of the CRC Handbook value
/// (tests/fixtures/handbook_latent_heat_tb.csv, CRC 97th ed., from memory) for every library
/// component; and the duty-specified flash given that latent heat from the saturated
/// liquid ends at the saturated vapour.
#[test]
fn latent_heat_through_the_calculator_matches_handbook() {
    let rows = fixture("handbook_latent_heat_tb.csv");
    assert!(rows.len() >= 31);
    let p = Pressure::new("P", ATM).unwrap();
    for row in rows {
        let name = row["name"].as_str();
        let s = stream(&[name], &[1.0], 1.0);
        let mut calc = calculator(&s);
        let tb = flash(
            &Raoult::from_names(&[name]).unwrap(),
            &[1.0],
            FlashSpec::BubbleTemperature { pressure: p },
        )
        .unwrap()
        .temperature_k;
        let d = calc.duty(tp(tb - 0.01, ATM), tp(tb + 0.01, ATM)).unwrap();
        let reference = num(&row, "latent_heat_J_per_mol");
        assert!(
            (d.duty_w / reference - 1.0).abs() < 0.03,
            "{name}: {} vs {reference} J/mol",
            d.duty_w
        );
        let latent = calc.duty(pb(ATM, 0.0), pb(ATM, 1.0)).unwrap().duty_w;
        let back = calc
            .outlet_for_duty(pb(ATM, 0.0), Power::new("duty", latent).unwrap(), p)
            .unwrap();
        assert!((back.outlet.vapour_fraction - 1.0).abs() < 1e-9, "{name}: {back:?}");
    }
}

/// A two-phase outlet: the calculator's compositions close the material balance
/// z = (1 − β) x + β y (common practice) and its dQ/dT agrees with a central difference of
/// its own duty.
#[test]
fn compositions_and_slope() {
    let z = [0.3, 0.4, 0.3];
    let s = stream(&["benzene", "toluene", "o-xylene"], &z, 2.0);
    let mut calc = calculator(&s);
    let d = calc.duty(tp(300.0, ATM), tp(390.0, ATM)).unwrap();
    assert_eq!(d.outlet.phase, Phase::TwoPhase);
    let (x, y) = (
        calc.outlet_liquid().unwrap().to_vec(),
        calc.outlet_vapour().unwrap().to_vec(),
    );
    for i in 0..3 {
        let back = d.outlet.liquid_fraction * x[i] + d.outlet.vapour_fraction * y[i];
        assert!((back - z[i]).abs() < 1e-14, "{i}: {back}");
    }
    let h = 1e-5;
    let up = calc.duty(tp(300.0, ATM), tp(390.0 + h, ATM)).unwrap().duty_w;
    let down = calc.duty(tp(300.0, ATM), tp(390.0 - h, ATM)).unwrap().duty_w;
    let fd = (up - down) / (2.0 * h);
    let slope = d.dduty_dt_out_w_per_k.unwrap();
    assert!(((fd - slope) / slope).abs() < 1e-5, "fd {fd} vs analytic {slope}");
}

/// Whether an error is of the kind a case expects.
type IsKind = fn(&EnergyError) -> bool;

#[test]
fn every_error_the_calculator_returns() {
    let s = stream(&["benzene", "toluene"], &[0.5, 0.5], 1.0);
    let p = Pressure::new("P", ATM).unwrap();
    let o = DutyOptions::default();
    // new: a reference temperature that is not a temperature.
    for t_ref in [f64::NAN, 0.0, -5.0] {
        let bad = DutyOptions {
            reference: ReferenceState {
                temperature_k: t_ref,
                ..ReferenceState::default()
            },
            ..o
        };
        let e = DutyCalculator::new(&s, bad).unwrap_err();
        assert!(
            matches!(e, EnergyError::Unit(_)) && e.to_string().contains("reference.temperature_k"),
            "{e}"
        );
        // The full functions refuse it the same way (compared as text: NaN is not NaN).
        let full = heater_duty(&s, tp(300.0, ATM), tp(310.0, ATM), bad).unwrap_err();
        assert_eq!(full.to_string(), e.to_string());
    }
    let mut calc = calculator(&s);
    calc.duty(tp(300.0, ATM), tp(370.0, ATM)).unwrap();
    assert!(calc.outlet_liquid().is_some());
    // Each error, from the calculator and from the full function, with the same message;
    // after it no compositions can be read.
    let cases: Vec<(StreamState, StreamState, IsKind, &str)> = vec![
        (
            tp(20_000.0, ATM),
            tp(300.0, ATM),
            |e| matches!(e, EnergyError::Unit(UnitError::OutOfRange { .. })),
            "inlet.temperature",
        ),
        (
            tp(300.0, ATM),
            tp(0.5, ATM),
            |e| matches!(e, EnergyError::Unit(UnitError::OutOfRange { .. })),
            "outlet.temperature",
        ),
        (
            tp(300.0, ATM),
            pb(ATM, 2.0),
            |e| matches!(e, EnergyError::Flash(FlashError::VapourFractionOutOfRange { .. })),
            "vapour_fraction",
        ),
        (
            tp(300.0, ATM),
            pb(1e300, 0.5),
            |e| matches!(e, EnergyError::Flash(FlashError::NoSolution { .. })),
            "no temperature",
        ),
    ];
    for (inlet, outlet, kind, text) in cases {
        let e = calc.duty(inlet, outlet).unwrap_err();
        assert!(kind(&e) && e.to_string().contains(text), "{e}");
        assert_eq!(heater_duty(&s, inlet, outlet, o).unwrap_err(), e);
        assert!(calc.inlet_liquid().is_none() && calc.outlet_liquid().is_none() && calc.outlet_vapour().is_none());
    }
    // The duty-specified flash: the same input errors, and a duty out of reach.
    let q = |w: f64| Power::new("duty", w).unwrap();
    let spec_cases: Vec<(StreamState, Power, Pressure, IsKind, &str)> = vec![
        (
            tp(300.0, ATM),
            q(1e12),
            p,
            |e| matches!(e, EnergyError::DutyOutOfReach { .. }),
            "duty",
        ),
        (
            tp(300.0, ATM),
            q(-1e12),
            p,
            |e| matches!(e, EnergyError::DutyOutOfReach { .. }),
            "duty",
        ),
        (
            tp(1e5, ATM),
            q(0.0),
            p,
            |e| matches!(e, EnergyError::Unit(UnitError::OutOfRange { .. })),
            "inlet.temperature",
        ),
        (
            pb(ATM, -0.5),
            q(0.0),
            p,
            |e| matches!(e, EnergyError::Flash(FlashError::VapourFractionOutOfRange { .. })),
            "vapour_fraction",
        ),
        (
            tp(300.0, ATM),
            q(0.0),
            Pressure::new("P", 1e300).unwrap(),
            |e| matches!(e, EnergyError::Flash(FlashError::NoSolution { .. })),
            "bubble temperature",
        ),
    ];
    for (inlet, duty, pressure, kind, text) in spec_cases {
        let e = calc.outlet_for_duty(inlet, duty, pressure).unwrap_err();
        assert!(kind(&e) && e.to_string().contains(text), "{e}");
        assert_eq!(outlet_for_duty(&s, inlet, duty, pressure, o).unwrap_err(), e);
        assert!(calc.inlet_liquid().is_none() && calc.outlet_vapour().is_none());
    }
    // And it recovers.
    assert!(calc.duty(tp(300.0, ATM), tp(310.0, ATM)).is_ok() && calc.inlet_liquid().is_some());
}

fn mixtures() -> impl Strategy<Value = (Vec<String>, Vec<f64>)> {
    common::mixtures(1, 5)
}

fn options(vapour_ref: bool, t_ref: f64, path_index: usize) -> DutyOptions {
    options_with(vapour_ref, t_ref, path_index, VapourModel::IdealGas)
}

fn options_with(vapour_ref: bool, t_ref: f64, path_index: usize, vapour_model: VapourModel) -> DutyOptions {
    DutyOptions {
        reference: ReferenceState {
            phase: if vapour_ref {
                ReferencePhase::Vapour
            } else {
                ReferencePhase::Liquid
            },
            temperature_k: t_ref,
        },
        path: VaporisationPath::ALL[path_index],
        vapour_model,
    }
}

/// The calculator's duty, states, enthalpies, dQ/dT and compositions equal the full heater
/// duty's to 1e-12 relative; where the full function fails, the calculator fails with the
/// same error.
fn check_calculator_duty(
    s: &Stream,
    inlet: StreamState,
    outlet: StreamState,
    o: DutyOptions,
) -> Result<(), TestCaseError> {
    let mut calc = DutyCalculator::new(s, o).unwrap();
    match (heater_duty(s, inlet, outlet, o), calc.duty(inlet, outlet)) {
        (Ok(full), Ok(fast)) => {
            prop_assert!(fast.duty_w.is_finite());
            if let Err(why) = agrees(&fast, &calc, &full) {
                prop_assert!(false, "{}", why);
            }
        }
        (Err(a), Err(b)) => prop_assert_eq!(a, b),
        (a, b) => prop_assert!(false, "full {:?} vs calculator {:?}", a.err(), b.err()),
    }
    Ok(())
}

/// The calculator's duty-specified flash equals the full one to 1e-12 relative, and reports
/// the duty asked for.
fn check_calculator_outlet(
    s: &Stream,
    inlet: StreamState,
    q: Power,
    p: Pressure,
    o: DutyOptions,
) -> Result<(), TestCaseError> {
    let mut calc = DutyCalculator::new(s, o).unwrap();
    match (outlet_for_duty(s, inlet, q, p, o), calc.outlet_for_duty(inlet, q, p)) {
        (Ok(full), Ok(fast)) => {
            prop_assert_eq!(fast.duty_w, q.watts());
            if let Err(why) = agrees(&fast, &calc, &full) {
                prop_assert!(false, "{}", why);
            }
        }
        (Err(a), Err(b)) => prop_assert_eq!(a, b),
        (a, b) => prop_assert!(false, "full {:?} vs calculator {:?}", a.err(), b.err()),
    }
    Ok(())
}

/// A state given by T and P, P and β, or T and β.
fn state() -> impl Strategy<Value = StreamState> {
    (0u8..4, 250.0f64..550.0, (2e4f64).ln()..(5e5f64).ln(), 0.0f64..=1.0)
        .prop_map(|(kind, t, log_p, beta)| common::stream_state(usize::from(kind), t, log_p.exp(), beta))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(1000))]

    /// The calculator's duty, states, enthalpies, dQ/dT and compositions equal the full
    /// heater duty's to 1e-12 relative, over random mixtures, states, reference states and
    /// paths; where the full function fails, the calculator fails with the same error.
    #[test]
    fn calculator_duty_equals_full_duty(
        (names, z) in mixtures(),
        inlet in state(), outlet in state(),
        flow in 0.01f64..100.0,
        vapour_ref in any::<bool>(), t_ref in 250.0f64..350.0, path_index in 0usize..3,
    ) {
        let s = Stream::from_names(&names, &z, MolarFlow::new("flow", flow).unwrap()).unwrap();
        check_calculator_duty(&s, inlet, outlet, options(vapour_ref, t_ref, path_index))?;
    }

    /// The same with the second-virial vapour.
    #[test]
    fn calculator_duty_equals_full_duty_with_second_virial(
        (names, z) in mixtures(),
        inlet in state(), outlet in state(),
        flow in 0.01f64..100.0,
        vapour_ref in any::<bool>(), t_ref in 250.0f64..350.0, path_index in 0usize..3,
    ) {
        let s = Stream::from_names(&names, &z, MolarFlow::new("flow", flow).unwrap()).unwrap();
        check_calculator_duty(&s, inlet, outlet, options_with(vapour_ref, t_ref, path_index, VapourModel::SecondVirial))?;
    }

    /// The calculator's duty-specified flash equals the full one to 1e-12 relative, and
    /// reports the duty asked for.
    #[test]
    fn calculator_duty_specified_flash_equals_full(
        (names, z) in mixtures(),
        inlet in state(),
        duty_per_mol in -8e4f64..8e4,
        log_p in (3e4f64).ln()..(4e5f64).ln(),
        vapour_ref in any::<bool>(), t_ref in 250.0f64..350.0, path_index in 0usize..3,
    ) {
        let s = Stream::from_names(&names, &z, MolarFlow::new("flow", 2.0).unwrap()).unwrap();
        let (q, p) = (Power::new("duty", 2.0 * duty_per_mol).unwrap(), Pressure::new("P", log_p.exp()).unwrap());
        check_calculator_outlet(&s, inlet, q, p, options(vapour_ref, t_ref, path_index))?;
    }

    /// The same with the second-virial vapour.
    #[test]
    fn calculator_duty_specified_flash_equals_full_with_second_virial(
        (names, z) in mixtures(),
        inlet in state(),
        duty_per_mol in -8e4f64..8e4,
        log_p in (3e4f64).ln()..(4e5f64).ln(),
        vapour_ref in any::<bool>(), t_ref in 250.0f64..350.0, path_index in 0usize..3,
    ) {
        let s = Stream::from_names(&names, &z, MolarFlow::new("flow", 2.0).unwrap()).unwrap();
        let (q, p) = (Power::new("duty", 2.0 * duty_per_mol).unwrap(), Pressure::new("P", log_p.exp()).unwrap());
        let o = options_with(vapour_ref, t_ref, path_index, VapourModel::SecondVirial);
        check_calculator_outlet(&s, inlet, q, p, o)?;
    }

    /// At extreme states (as tests/robustness.rs does for the full functions): finite
    /// numbers or an error, never a panic, from both methods.
    #[test]
    fn calculator_never_panics_or_returns_nan(
        (names, z) in mixtures(),
        t1 in 50.0f64..3000.0, t2 in 50.0f64..3000.0,
        log_p in (1.0f64).ln()..(1e8f64).ln(),
        duty in -1e7f64..1e7,
        vapour_model in proptest::sample::select(VapourModel::ALL.to_vec()),
    ) {
        let s = Stream::from_names(&names, &z, MolarFlow::new("flow", 1.0).unwrap()).unwrap();
        let o = DutyOptions { vapour_model, ..DutyOptions::default() };
        let mut calc = DutyCalculator::new(&s, o).unwrap();
        let p = log_p.exp();
        let summaries = [
            calc.duty(tp(t1, p), tp(t2, p)),
            calc.outlet_for_duty(tp(t1, p), Power::new("duty", duty).unwrap(), Pressure::new("P", p).unwrap()),
        ];
        for summary in summaries.into_iter().flatten() {
            let states = [summary.inlet, summary.outlet];
            let numbers = [summary.duty_w, summary.inlet_enthalpy_j_per_mol, summary.outlet_enthalpy_j_per_mol];
            prop_assert!(numbers.iter().all(|v| v.is_finite()), "{summary:?}");
            prop_assert!(states.iter().all(|st| st.temperature_k.is_finite() && (0.0..=1.0).contains(&st.vapour_fraction)));
            prop_assert!(summary.dduty_dt_out_w_per_k.is_none_or(f64::is_finite));
        }
    }
}
