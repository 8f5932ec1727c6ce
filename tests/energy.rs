//! Heater duty, the duty-specified flash and heating curves: against IAPWS-IF97 and
//! handbook latent heats, and as a state function.

mod common;

use common::{fixture, num};
use flashduty::energy::{
    DutyOptions, EnergyError, EnthalpyModel, ReferencePhase, ReferenceState, Stream, StreamState, VaporisationPath,
    VapourModel, heater_duty, heating_curve, outlet_for_duty,
};
use flashduty::equilibrium::{FlashSpec, Raoult, flash};
use flashduty::library::Library;
use flashduty::properties::{HeatCapacity, LatentHeat, PitzerCurlVirial, VapourPressure};
use flashduty::rachford_rice::Phase;
use flashduty::units::{MassFlow, MolarFlow, Power, Pressure, Temperature};
use flashduty::warnings::Warning;
use proptest::prelude::*;

const ATM: f64 = 101_325.0;

fn tp(t: f64, p: f64) -> StreamState {
    StreamState::TemperaturePressure {
        temperature: Temperature::new("T", t).unwrap(),
        pressure: Pressure::new("P", p).unwrap(),
    }
}

fn stream(names: &[&str], z: &[f64]) -> Stream {
    Stream::from_names(names, z, MolarFlow::new("flow", 1.0).unwrap()).unwrap()
}

/// IAPWS-IF97 enthalpy of water at 101.325 kPa (tests/fixtures/iapws_water_1atm.csv, made by
/// tools/make_iapws_water.py with iapws 1.5.5), J/mol, at a tabulated temperature.
fn iapws_h(t: f64) -> f64 {
    fixture("iapws_water_1atm.csv")
        .iter()
        .find(|r| (num(r, "T_K") - t).abs() < 1e-9 && !r["phase"].starts_with("saturated"))
        .map(|r| num(r, "h_J_per_mol"))
        .unwrap_or_else(|| panic!("no IAPWS row at {t} K"))
}

/// Water heated from 20 °C to 150 °C at 1 atm: within 1.5 % of IAPWS-IF97; liquid-only
/// heating (20 → 95 °C) within 2 %. Vapour-only heating is an ideal-gas calculation against
/// real steam. Superheated well clear of saturation (150 → 300 °C) it is within the 4 %
/// aim. Just above saturation (105 → 150 °C) IAPWS-IF97 steam at 1 atm has a heat capacity
/// several per cent above the ideal-gas value, which no ideal-gas model can give: the
/// measured deviation, about −5.3 %, is asserted within 6 % and reported in the README; the
/// 4 % aim is not met there, for that physical reason.
#[test]
fn water_duty_against_iapws() {
    let s = stream(&["water"], &[1.0]);
    let o = DutyOptions::default();
    let cases = [
        ("20 -> 150 degC", 293.15, 423.15, 0.015),
        ("liquid 20 -> 95 degC", 293.15, 368.15, 0.02),
        ("vapour 105 -> 150 degC", 378.15, 423.15, 0.06),
        ("vapour 150 -> 300 degC", 423.15, 573.15, 0.04),
    ];
    for (what, t1, t2, tol) in cases {
        let r = heater_duty(&s, tp(t1, ATM), tp(t2, ATM), o).unwrap();
        let reference = iapws_h(t2) - iapws_h(t1);
        let dev = r.duty_w / reference - 1.0;
        println!(
            "water {what}: {:.1} W vs IAPWS-IF97 {reference:.1} W ({:+.2} %)",
            r.duty_w,
            100.0 * dev
        );
        assert!(dev.abs() < tol, "{what}: {dev}");
    }
}

/// The latent heat at the normal boiling point, read as the duty across Tb ± 0.01 K at
/// 1 atm, within 3 % of the CRC Handbook value (tests/fixtures/handbook_latent_heat_tb.csv,
/// CRC 97th ed. "Enthalpy of Vaporization", from memory) for every library component.
#[test]
fn latent_heat_read_as_duty_matches_handbook() {
    let rows = fixture("handbook_latent_heat_tb.csv");
    assert!(rows.len() >= 31);
    let mut worst = (0.0f64, String::new());
    for row in rows {
        let name = row["name"].as_str();
        let s = stream(&[name], &[1.0]);
        let model = Raoult::from_names(&[name]).unwrap();
        let p = Pressure::new("P", ATM).unwrap();
        let tb = flash(&model, &[1.0], FlashSpec::BubbleTemperature { pressure: p })
            .unwrap()
            .temperature_k;
        let r = heater_duty(&s, tp(tb - 0.01, ATM), tp(tb + 0.01, ATM), DutyOptions::default()).unwrap();
        let reference = num(&row, "latent_heat_J_per_mol");
        let dev = r.duty_w / reference - 1.0;
        assert!(dev.abs() < 0.03, "{name}: {} vs {reference} J/mol", r.duty_w);
        if dev.abs() > worst.0.abs() {
            worst = (dev, name.to_string());
        }
    }
    println!(
        "worst latent heat at Tb vs CRC: {:+.2} % ({})",
        100.0 * worst.0,
        worst.1
    );
}

fn mixtures() -> impl Strategy<Value = (Vec<String>, Vec<f64>)> {
    common::mixtures(1, 5)
}

fn options_with(phase: bool, t_ref: f64, path: VaporisationPath, vapour_model: VapourModel) -> DutyOptions {
    DutyOptions {
        reference: ReferenceState {
            phase: if phase {
                ReferencePhase::Vapour
            } else {
                ReferencePhase::Liquid
            },
            temperature_k: t_ref,
        },
        path,
        vapour_model,
    }
}

/// The second-virial vapour model with the default reference state and path.
fn virial() -> DutyOptions {
    DutyOptions {
        vapour_model: VapourModel::SecondVirial,
        ..DutyOptions::default()
    }
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / a.abs().max(b.abs()).max(1e-300)
}

/// Q(A→B) + Q(B→C) = Q(A→C) to 1e-9; for paths (a) and (b) the duty does not depend on
/// the reference temperature or phase.
#[allow(clippy::too_many_arguments)]
fn check_state_function(
    names: &[String],
    z: &[f64],
    (ta, tb, tc): (f64, f64, f64),
    (pa, pb, pc): (f64, f64, f64),
    t_ref: f64,
    vapour_ref: bool,
    path_index: usize,
    vapour_model: VapourModel,
) -> Result<(), TestCaseError> {
    let s = Stream::from_names(names, z, MolarFlow::new("flow", 3.0).unwrap()).unwrap();
    let path = VaporisationPath::ALL[path_index];
    let o = options_with(vapour_ref, t_ref, path, vapour_model);
    let (a, b, c) = (tp(ta, pa), tp(tb, pb), tp(tc, pc));
    let ab = heater_duty(&s, a, b, o).unwrap().duty_w;
    let bc = heater_duty(&s, b, c, o).unwrap().duty_w;
    let ac = heater_duty(&s, a, c, o).unwrap().duty_w;
    let scale = ab.abs().max(bc.abs()).max(ac.abs()).max(1.0);
    prop_assert!((ab + bc - ac).abs() <= 1e-9 * scale, "{ab} + {bc} != {ac}");
    if path != VaporisationPath::ReferenceTemperature {
        let base_options = DutyOptions {
            path,
            vapour_model,
            ..DutyOptions::default()
        };
        let base = heater_duty(&s, a, c, base_options).unwrap().duty_w;
        prop_assert!(
            (ac - base).abs() <= 1e-9 * base.abs().max(1.0),
            "{ac} vs {base} ({o:?})"
        );
    }
    Ok(())
}

/// The duty-specified flash inverts the heater duty: outlet T within 1e-6 K and vapour
/// fraction within 1e-9, including pure components across their boiling point.
/// The outlet of the inversion tests: subcooled (mode 0), two-phase on β (1: pure
/// components are covered) or superheated (2); and the dew temperature.
fn outlet_of(names: &[String], z: &[f64], p: Pressure, beta_out: f64, mode: u8) -> (StreamState, f64) {
    let model = Raoult::from_names(names).unwrap();
    let bub = flash(&model, z, FlashSpec::BubbleTemperature { pressure: p })
        .unwrap()
        .temperature_k;
    let dew = flash(&model, z, FlashSpec::DewTemperature { pressure: p })
        .unwrap()
        .temperature_k;
    let outlet = match mode {
        0 => tp(bub - 5.0 - 40.0 * beta_out, p.pascal()),
        1 => StreamState::PressureVapourFraction {
            pressure: p,
            vapour_fraction: beta_out,
        },
        _ => tp(dew + 5.0 + 40.0 * beta_out, p.pascal()),
    };
    (outlet, dew)
}

fn check_inversion(
    names: &[String],
    z: &[f64],
    t_in: f64,
    p: Pressure,
    beta_out: f64,
    mode: u8,
    o: DutyOptions,
) -> Result<(), TestCaseError> {
    let s = Stream::from_names(names, z, MolarFlow::new("flow", 2.0).unwrap()).unwrap();
    let (outlet, _) = outlet_of(names, z, p, beta_out, mode);
    let inlet = tp(t_in, p.pascal());
    let forward = heater_duty(&s, inlet, outlet, o).unwrap();
    let back = outlet_for_duty(&s, inlet, Power::new("duty", forward.duty_w).unwrap(), p, o).unwrap();
    prop_assert!(
        (back.outlet.temperature_k - forward.outlet.temperature_k).abs() < 1e-6,
        "T {} vs {}",
        back.outlet.temperature_k,
        forward.outlet.temperature_k
    );
    prop_assert!(
        (back.outlet.vapour_fraction - forward.outlet.vapour_fraction).abs() < 1e-9,
        "beta {} vs {}",
        back.outlet.vapour_fraction,
        forward.outlet.vapour_fraction
    );
    Ok(())
}

/// dQ/dT_out at `p_pa`, analytic, agrees with a central difference.
fn check_slope(
    names: &[String],
    z: &[f64],
    beta: f64,
    side: u8,
    p_pa: f64,
    o: DutyOptions,
) -> Result<(), TestCaseError> {
    let s = Stream::from_names(names, z, MolarFlow::new("flow", 1.5).unwrap()).unwrap();
    let p = Pressure::new("P", p_pa).unwrap();
    let model = Raoult::from_names(names).unwrap();
    // Inside the two-phase region the slope is finite only where it has a width.
    let width = flash(&model, z, FlashSpec::DewTemperature { pressure: p })
        .unwrap()
        .temperature_k
        - flash(&model, z, FlashSpec::BubbleTemperature { pressure: p })
            .unwrap()
            .temperature_k;
    prop_assume!(side != 1 || width > 0.5);
    let t_out = match side {
        0 => {
            flash(&model, z, FlashSpec::BubbleTemperature { pressure: p })
                .unwrap()
                .temperature_k
                - 10.0
        }
        1 => {
            flash(
                &model,
                z,
                FlashSpec::PressureVapourFraction {
                    pressure: p,
                    vapour_fraction: beta,
                },
            )
            .unwrap()
            .temperature_k
        }
        _ => {
            flash(&model, z, FlashSpec::DewTemperature { pressure: p })
                .unwrap()
                .temperature_k
                + 10.0
        }
    };
    let inlet = tp(300.0, p_pa);
    let r = heater_duty(&s, inlet, tp(t_out, p_pa), o).unwrap();
    let slope = r.dduty_dt_out_w_per_k.unwrap();
    let h = if side == 1 { 1e-6 } else { 1e-3 };
    let up = heater_duty(&s, inlet, tp(t_out + h, p_pa), o).unwrap().duty_w;
    let down = heater_duty(&s, inlet, tp(t_out - h, p_pa), o).unwrap().duty_w;
    let fd = (up - down) / (2.0 * h);
    prop_assert!(rel(fd, slope) < 1e-4, "fd {fd} vs analytic {slope}");
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Q(A→B) + Q(B→C) = Q(A→C) to 1e-9; for paths (a) and (b) the duty does not depend on
    /// the reference temperature or phase.
    #[test]
    fn duty_is_a_state_function(
        (names, z) in mixtures(),
        ta in 250.0f64..550.0, tb in 250.0f64..550.0, tc in 250.0f64..550.0,
        pa in 2e4f64..5e5, pb in 2e4f64..5e5, pc in 2e4f64..5e5,
        t_ref in 250.0f64..350.0, vapour_ref in any::<bool>(),
        path_index in 0usize..3,
    ) {
        check_state_function(&names, &z, (ta, tb, tc), (pa, pb, pc), t_ref, vapour_ref, path_index, VapourModel::IdealGas)?;
    }

    /// The same with the second-virial vapour, whose enthalpy depends on pressure: still a
    /// state function, and still independent of the reference along paths (a) and (b).
    #[test]
    fn duty_is_a_state_function_with_second_virial(
        (names, z) in mixtures(),
        ta in 250.0f64..550.0, tb in 250.0f64..550.0, tc in 250.0f64..550.0,
        pa in 2e4f64..5e5, pb in 2e4f64..5e5, pc in 2e4f64..5e5,
        t_ref in 250.0f64..350.0, vapour_ref in any::<bool>(),
        path_index in 0usize..3,
    ) {
        check_state_function(&names, &z, (ta, tb, tc), (pa, pb, pc), t_ref, vapour_ref, path_index, VapourModel::SecondVirial)?;
    }

    /// The duty-specified flash inverts the heater duty: outlet T within 1e-6 K and vapour
    /// fraction within 1e-9, including pure components across their boiling point.
    #[test]
    fn duty_specified_flash_inverts_heater_duty(
        (names, z) in mixtures(),
        t_in in 260.0f64..400.0,
        log_p in (3e4f64).ln()..(4e5f64).ln(),
        beta_out in 0.0f64..1.0,
        mode in 0u8..3,
    ) {
        let p = Pressure::new("P", log_p.exp()).unwrap();
        check_inversion(&names, &z, t_in, p, beta_out, mode, DutyOptions::default())?;
    }

    /// The same with the second-virial vapour, over reference states and paths (a) and (c).
    /// Path (b) has its own test below: near a component's Tc its enthalpy falls with
    /// temperature (the latent heat at T drops to zero faster than the liquid's Cp rises),
    /// with either vapour model, so a duty can have several outlets.
    #[test]
    fn duty_specified_flash_inverts_heater_duty_with_second_virial(
        (names, z) in mixtures(),
        t_in in 260.0f64..400.0,
        log_p in (3e4f64).ln()..(4e5f64).ln(),
        beta_out in 0.0f64..1.0,
        mode in 0u8..3,
        t_ref in 250.0f64..350.0, vapour_ref in any::<bool>(), path_c in any::<bool>(),
    ) {
        let p = Pressure::new("P", log_p.exp()).unwrap();
        let path = if path_c { VaporisationPath::ReferenceTemperature } else { VaporisationPath::BoilingPoint };
        let o = options_with(vapour_ref, t_ref, path, VapourModel::SecondVirial);
        check_inversion(&names, &z, t_in, p, beta_out, mode, o)?;
    }

    /// Along path (b), where one duty can have several outlets, the duty-specified flash
    /// either inverts the heater duty or says so: an `outlet-not-unique` warning lists the
    /// heater duty's outlet temperature among the others (within 1e-6 K). Outlets subcooled,
    /// two-phase (where the enthalpy dips if a component's Tc lies between the bubble and
    /// dew points) and superheated.
    #[test]
    fn duty_specified_flash_on_path_b_inverts_or_warns(
        (names, z) in mixtures(),
        t_in in 260.0f64..400.0,
        log_p in (3e4f64).ln()..(4e5f64).ln(),
        beta_out in 0.0f64..1.0,
        mode in 0u8..3,
        virial in any::<bool>(),
    ) {
        let p = Pressure::new("P", log_p.exp()).unwrap();
        let vapour_model = if virial { VapourModel::SecondVirial } else { VapourModel::IdealGas };
        let o = DutyOptions { path: VaporisationPath::StreamTemperature, vapour_model, ..DutyOptions::default() };
        if let Err(TestCaseError::Fail(why)) = check_inversion(&names, &z, t_in, p, beta_out, mode, o) {
            let (t_out, _) = outlet_of(&names, &z, p, beta_out, mode);
            let s = Stream::from_names(&names, &z, MolarFlow::new("flow", 2.0).unwrap()).unwrap();
            let inlet = tp(t_in, p.pascal());
            let forward = heater_duty(&s, inlet, t_out, o).unwrap();
            let back = outlet_for_duty(&s, inlet, Power::new("duty", forward.duty_w).unwrap(), p, o).unwrap();
            let listed = back.warnings.iter().any(|w| matches!(w,
                Warning::OutletNotUnique { other_outlet_temperatures_k, .. }
                    if other_outlet_temperatures_k.iter().any(|t| (t - forward.outlet.temperature_k).abs() < 1e-6)));
            prop_assert!(listed, "{why}; warnings {:?}", back.warnings);
        }
    }

    /// dQ/dT_out, analytic, agrees with a central difference.
    #[test]
    fn duty_slope_matches_finite_difference((names, z) in mixtures(), beta in 0.05f64..0.95, side in 0u8..3) {
        check_slope(&names, &z, beta, side, ATM, DutyOptions::default())?;
    }

    /// The same with the second-virial vapour (whose slope has the residual's −P T d²B/dT²
    /// and, along path (b), the saturation term), at pressures up to 5 bar, over every path.
    #[test]
    fn duty_slope_matches_finite_difference_with_second_virial(
        (names, z) in mixtures(), beta in 0.05f64..0.95, side in 0u8..3,
        log_p in (5e4f64).ln()..(5e5f64).ln(),
        t_ref in 250.0f64..350.0, vapour_ref in any::<bool>(), path_index in 0usize..3,
    ) {
        let o = options_with(vapour_ref, t_ref, VaporisationPath::ALL[path_index], VapourModel::SecondVirial);
        check_slope(&names, &z, beta, side, log_p.exp(), o)?;
    }
}

/// Pure components: the duty-specified flash across the boiling point, where temperature is
/// flat, solved on the vapour fraction; and zero duty (adiabatic) returns the inlet.
#[test]
fn pure_component_through_its_boiling_point() {
    let s = stream(&["n-heptane"], &[1.0]);
    let p = Pressure::new("P", ATM).unwrap();
    let o = DutyOptions::default();
    let sat_l = StreamState::PressureVapourFraction {
        pressure: p,
        vapour_fraction: 0.0,
    };
    let sat_v = StreamState::PressureVapourFraction {
        pressure: p,
        vapour_fraction: 1.0,
    };
    let latent = heater_duty(&s, sat_l, sat_v, o).unwrap().duty_w;
    for frac in [0.0, 1e-6, 0.25, 0.5, 0.999_999, 1.0] {
        let r = outlet_for_duty(&s, sat_l, Power::new("duty", frac * latent).unwrap(), p, o).unwrap();
        assert!(
            (r.outlet.vapour_fraction - frac).abs() < 1e-9,
            "{frac}: {}",
            r.outlet.vapour_fraction
        );
    }
    let zero = outlet_for_duty(&s, tp(330.0, ATM), Power::new("duty", 0.0).unwrap(), p, o).unwrap();
    assert!((zero.outlet.temperature_k - 330.0).abs() < 1e-9);
    assert_eq!(zero.outlet.phase, Phase::Liquid);
}

/// A worked example of our own invention: a hydrocarbon preheater. 3.6 kmol/h (1 mol/s) of
/// n-hexane/n-heptane/n-octane 30/40/30 mol % is heated from 25 °C to 80 °C at 2 bar (all
/// liquid). Hand check: with a liquid reference at 25 °C the inlet enthalpies are zero, and
/// each outlet row is ∫Cp,liq dT from 298.15 K to 353.15 K, which is checked here by
/// Simpson's rule on the library's Cp (independent of the closed-form integrals), times the
/// component flow.
#[test]
fn worked_example_hydrocarbon_preheater() {
    let names = ["n-hexane", "n-heptane", "n-octane"];
    let z = [0.3, 0.4, 0.3];
    let s = Stream::from_names(&names, &z, MolarFlow::parse("flow", "3.6 kmol/h").unwrap()).unwrap();
    let r = heater_duty(&s, tp(298.15, 2e5), tp(353.15, 2e5), DutyOptions::default()).unwrap();
    assert_eq!(r.outlet.phase, Phase::Liquid);
    let lib = Library::builtin();
    let mut hand = 0.0;
    for (name, zi) in names.iter().zip(z) {
        let cp = lib.get(name).unwrap().liquid_heat_capacity();
        let n = 1000;
        let h = (353.15 - 298.15) / n as f64;
        let mut acc = cp.cp(298.15) + cp.cp(353.15);
        for i in 1..n {
            acc += if i % 2 == 1 { 4.0 } else { 2.0 } * cp.cp(298.15 + i as f64 * h);
        }
        let dh = acc * h / 3.0;
        let row = r
            .table
            .iter()
            .find(|row| row.state == "outlet" && row.component == *name)
            .unwrap();
        assert!((row.enthalpy_j_per_mol - dh).abs() < 1e-6 * dh, "{name}");
        assert!((row.flow_mol_s - zi).abs() < 1e-12);
        hand += zi * dh;
    }
    assert!((r.duty_w - hand).abs() < 1e-6 * hand);
    for row in r.table.iter().filter(|row| row.state == "inlet") {
        assert!(row.enthalpy_j_per_mol.abs() < 1e-9);
    }
    println!("preheater duty {:.1} W", r.duty_w);
}

/// The enthalpy table is the audit trail: its rows add up to the duty, each row's split
/// adds up to its enthalpy, and a vaporising row shows liquid sensible, latent and vapour
/// sensible heat along the path. With path (a) the latent part is ΔHvap at Tb.
#[test]
fn enthalpy_table_adds_up() {
    let s = stream(&["benzene", "toluene", "o-xylene"], &[0.3, 0.4, 0.3]);
    let r = heater_duty(&s, tp(300.0, ATM), tp(390.0, ATM), DutyOptions::default()).unwrap();
    assert_eq!(r.outlet.phase, Phase::TwoPhase);
    let total: f64 = r.table.iter().map(|row| row.sign() * row.enthalpy_flow_w).sum();
    assert!((total - r.duty_w).abs() < 1e-9 * r.duty_w.abs());
    for row in &r.table {
        let split = row.liquid_sensible_j_per_mol + row.latent_j_per_mol + row.vapour_sensible_j_per_mol;
        assert!((split - row.enthalpy_j_per_mol).abs() < 1e-9 * row.enthalpy_j_per_mol.abs().max(1.0));
        if row.phase == Phase::Vapour {
            let c = Library::builtin().get(&row.component).unwrap();
            let at_tb = c.latent_heat().latent_heat(c.normal_boiling_point_k());
            assert_eq!(row.latent_j_per_mol, at_tb);
        }
    }
    // Both phases of every component appear at the two-phase outlet.
    assert_eq!(r.table.iter().filter(|row| row.state == "outlet").count(), 6);
}

#[test]
fn path_spread_is_reported() {
    let s = stream(&["water"], &[1.0]);
    let r = heater_duty(&s, tp(293.15, ATM), tp(423.15, ATM), DutyOptions::default()).unwrap();
    let ps = r.path_spread;
    assert_eq!(ps.boiling_point_w, r.duty_w);
    assert!(ps.spread_w >= 0.0 && ps.relative < 0.05, "{ps:?}");
    println!(
        "water 20 -> 150 degC path spread: {:.1} W ({:.2} %)",
        ps.spread_w,
        100.0 * ps.relative
    );
}

#[test]
fn heating_and_cooling_curves_have_breakpoints() {
    let s = stream(&["n-pentane", "n-hexane", "n-heptane"], &[0.3, 0.4, 0.3]);
    let c = heating_curve(&s, tp(290.0, ATM), tp(400.0, ATM), 21, DutyOptions::default()).unwrap();
    assert_eq!(c.points.len(), 23);
    let names: Vec<_> = c
        .points
        .iter()
        .map(|p| p.breakpoint)
        .filter(|b| !b.is_empty())
        .collect();
    assert_eq!(names, ["bubble", "dew"]);
    for w in c.points.windows(2) {
        assert!(w[1].duty_w >= w[0].duty_w && w[1].temperature_k >= w[0].temperature_k - 1e-9);
        assert!(w[1].vapour_fraction >= w[0].vapour_fraction - 1e-12);
    }
    let bubble = c.points.iter().find(|p| p.breakpoint == "bubble").unwrap();
    assert_eq!(bubble.temperature_k, c.bubble_temperature_k);
    let cooling = heating_curve(&s, tp(400.0, ATM), tp(290.0, ATM), 5, DutyOptions::default()).unwrap();
    assert!(cooling.duty_w < 0.0);
    assert!(
        cooling
            .points
            .windows(2)
            .all(|w| w[1].temperature_k <= w[0].temperature_k + 1e-9)
    );
    assert!((cooling.duty_w + c.duty_w).abs() < 1e-9 * c.duty_w);
}

#[test]
fn mass_flow_and_component_flows() {
    let s = stream(&["water"], &[1.0])
        .with_mass_flow(MassFlow::parse("flow", "18.015268 kg/h").unwrap())
        .unwrap();
    assert!((s.flow().mol_per_s() - 1000.0 / 3600.0).abs() < 1e-12);
    let f = Stream::from_component_flows_names(&["benzene", "toluene"], &[2.0, 6.0]).unwrap();
    assert_eq!(f.z(), &[0.25, 0.75]);
}

#[test]
fn every_error_variant_is_reachable() {
    let s = stream(&["benzene", "toluene"], &[0.5, 0.5]);
    let e = heating_curve(&s, tp(300.0, ATM), tp(400.0, ATM), 1, DutyOptions::default()).unwrap_err();
    assert!(
        matches!(e, EnergyError::TooFewPoints { value: 1 }) && e.to_string().contains("points"),
        "{e}"
    );
    let e = Stream::from_component_flows_names(&["benzene", "toluene"], &[1.0, -1.0]).unwrap_err();
    assert!(
        matches!(e, EnergyError::BadFlow { index: 1, .. }) && e.to_string().contains("flows[1]"),
        "{e}"
    );
    let e = Stream::from_component_flows_names(&["benzene", "toluene"], &[0.0, 0.0]).unwrap_err();
    assert!(matches!(e, EnergyError::BadFlow { .. }), "{e}");
    let e = Stream::from_names(
        &["benzene", "tolune"],
        &[0.5, 0.5],
        MolarFlow::new("flow", 1.0).unwrap(),
    )
    .unwrap_err();
    assert!(
        matches!(e, EnergyError::UnknownComponent(_)) && e.to_string().contains("toluene"),
        "{e}"
    );
    let e = Stream::from_names(&["benzene"], &[0.5, 0.5], MolarFlow::new("flow", 1.0).unwrap()).unwrap_err();
    assert!(matches!(e, EnergyError::Flash(_)), "{e}");
    let e = outlet_for_duty(
        &s,
        tp(300.0, ATM),
        Power::new("duty", 1e12).unwrap(),
        Pressure::new("P", ATM).unwrap(),
        DutyOptions::default(),
    )
    .unwrap_err();
    assert!(
        matches!(e, EnergyError::DutyOutOfReach { .. }) && e.to_string().contains("duty"),
        "{e}"
    );
    let e = heater_duty(
        &s,
        tp(300.0, ATM),
        StreamState::PressureVapourFraction {
            pressure: Pressure::new("P", ATM).unwrap(),
            vapour_fraction: 2.0,
        },
        DutyOptions::default(),
    )
    .unwrap_err();
    assert!(e.to_string().contains("vapour_fraction"), "{e}");
    let e = MassFlow::parse("flow", "-3 kg/h")
        .map_err(EnergyError::from)
        .unwrap_err();
    assert!(matches!(e, EnergyError::Unit(_)), "{e}");
}

// ---------------------------------------------------------------------------------------
// The second-virial vapour model

/// An IAPWS-IF97 row of a water fixture made by tools/make_iapws_water.py with iapws 1.5.5
/// (`iapws_water_1atm.csv` at 101.325 kPa, `iapws_water_1mpa.csv` at 1 MPa): (T in K,
/// h in J/mol) of `phase` (`liquid`, `vapour`, `saturated-liquid`, `saturated-vapour`) at
/// `t`, or at the saturation temperature when `t` is `None`.
fn iapws_row(file: &str, phase: &str, t: Option<f64>) -> (f64, f64) {
    fixture(file)
        .iter()
        .find(|r| r["phase"] == phase && t.is_none_or(|t| (num(r, "T_K") - t).abs() < 1e-9))
        .map(|r| (num(r, "T_K"), num(r, "h_J_per_mol")))
        .unwrap_or_else(|| panic!("no IAPWS row {phase} {t:?} in {file}"))
}

fn pv(p: f64, beta: f64) -> StreamState {
    StreamState::PressureVapourFraction {
        pressure: Pressure::new("P", p).unwrap(),
        vapour_fraction: beta,
    }
}

/// Water at 1 atm with the second-virial vapour, against IAPWS-IF97
/// (tests/fixtures/iapws_water_1atm.csv): steam 105 → 150 °C and saturated vapour → 150 °C
/// within the 4 % aim the ideal gas misses (−5.3 %, `water_duty_against_iapws`); 20 → 150 °C
/// within 1.5 % and 150 → 300 °C within 4 %, the ideal-gas limits. Both models' deviations
/// are printed.
#[test]
fn water_duty_with_second_virial_against_iapws() {
    let s = stream(&["water"], &[1.0]);
    let file = "iapws_water_1atm.csv";
    let (_, h_sat_vapour) = iapws_row(file, "saturated-vapour", None);
    let cases = [
        ("vapour 105 -> 150 degC", tp(378.15, ATM), 423.15, iapws_h(378.15), 0.04),
        ("saturated vapour -> 150 degC", pv(ATM, 1.0), 423.15, h_sat_vapour, 0.04),
        ("20 -> 150 degC", tp(293.15, ATM), 423.15, iapws_h(293.15), 0.015),
        ("vapour 150 -> 300 degC", tp(423.15, ATM), 573.15, iapws_h(423.15), 0.04),
    ];
    for (what, inlet, t2, h1, tol) in cases {
        let reference = iapws_h(t2) - h1;
        let ideal = heater_duty(&s, inlet, tp(t2, ATM), DutyOptions::default()).unwrap();
        let real = heater_duty(&s, inlet, tp(t2, ATM), virial()).unwrap();
        let (dev_ideal, dev_real) = (ideal.duty_w / reference - 1.0, real.duty_w / reference - 1.0);
        println!(
            "water {what}: IAPWS-IF97 {reference:.1} W; ideal gas {:.1} W ({:+.2} %), second virial {:.1} W ({:+.2} %)",
            ideal.duty_w,
            100.0 * dev_ideal,
            real.duty_w,
            100.0 * dev_real
        );
        assert!(dev_real.abs() < tol, "{what}: {dev_real}");
        assert!(
            real.warnings
                .iter()
                .all(|w| !matches!(w, Warning::VirialOutOfRange { .. }))
        );
    }
}

/// Superheated steam at 1 MPa, where the real-gas correction matters more, against
/// IAPWS-IF97 (tests/fixtures/iapws_water_1mpa.csv): 200 → 300 °C, saturated vapour → 300 °C,
/// and the latent heat at 1 MPa (saturated liquid → saturated vapour). The ideal gas is
/// printed beside the second virial; the second virial must be the closer for the vapour
/// rows, and within the limits below (set from the measured deviations: the truncated
/// virial equation and the Pitzer–Curl B, which has no polar term, leave part of real
/// steam's residual enthalpy out).
#[test]
fn steam_at_one_megapascal_against_iapws() {
    let s = stream(&["water"], &[1.0]);
    let file = "iapws_water_1mpa.csv";
    let p = 1e6;
    let (_, h200) = iapws_row(file, "vapour", Some(473.15));
    let (_, h300) = iapws_row(file, "vapour", Some(573.15));
    let (_, h_f) = iapws_row(file, "saturated-liquid", None);
    let (_, h_g) = iapws_row(file, "saturated-vapour", None);
    let cases = [
        (
            "vapour 200 -> 300 degC",
            tp(473.15, p),
            tp(573.15, p),
            h300 - h200,
            0.07,
        ),
        (
            "saturated vapour -> 300 degC",
            pv(p, 1.0),
            tp(573.15, p),
            h300 - h_g,
            0.07,
        ),
        ("latent heat at 1 MPa", pv(p, 0.0), pv(p, 1.0), h_g - h_f, 0.03),
    ];
    for (what, inlet, outlet, reference, tol) in cases {
        let ideal = heater_duty(&s, inlet, outlet, DutyOptions::default()).unwrap();
        let real = heater_duty(&s, inlet, outlet, virial()).unwrap();
        let (dev_ideal, dev_real) = (ideal.duty_w / reference - 1.0, real.duty_w / reference - 1.0);
        println!(
            "water at 1 MPa, {what}: IAPWS-IF97 {reference:.1} W; ideal gas {:.1} W ({:+.2} %), second virial {:.1} W ({:+.2} %)",
            ideal.duty_w,
            100.0 * dev_ideal,
            real.duty_w,
            100.0 * dev_real
        );
        assert!(dev_real.abs() < tol, "{what}: {dev_real}");
        if what.starts_with("vapour") || what.starts_with("saturated") {
            assert!(dev_real.abs() < dev_ideal.abs(), "{what}");
        }
    }
}

/// The Pitzer–Curl B of water against IAPWS-95's second virial coefficient
/// (tests/fixtures/iapws_water_second_virial.csv, iapws 1.5.5). The correlation has no
/// polar term and underestimates |B| of water at low temperature: from 375 K to 700 K the
/// measured deviation (−19 % at 375 K, within ±7 % above 450 K) is asserted within 20 %;
/// below, where it grows (−43 % at 300 K), only the sign is. Propane, non-polar, at 300 K:
/// −390 cm³/mol
/// (J. H. Dymond and E. B. Smith, *The Virial Coefficients of Pure Gases and Mixtures*,
/// 1980; from memory), within 5 %.
#[test]
fn second_virial_coefficient_against_published_values() {
    let lib = Library::builtin();
    let water = PitzerCurlVirial::for_component(lib.get("water").unwrap());
    let mut worst = 0.0f64;
    for row in fixture("iapws_water_second_virial.csv") {
        let t = num(&row, "T_K");
        let reference = num(&row, "B_m3_per_mol");
        let b = water.second_virial_m3_per_mol(t);
        let dev = b / reference - 1.0;
        println!(
            "water B at {t} K: {:.1} cm3/mol vs IAPWS-95 {:.1} cm3/mol ({:+.1} %)",
            b * 1e6,
            reference * 1e6,
            100.0 * dev
        );
        assert!(b < 0.0, "{t}: {b} vs {reference}");
        if t >= 375.0 {
            assert!(dev.abs() < 0.2, "{t}: {b} vs {reference}");
            worst = worst.max(dev.abs());
        }
    }
    println!("worst |deviation| of water's B from 375 K: {:.1} %", 100.0 * worst);
    let propane = PitzerCurlVirial::for_component(lib.get("propane").unwrap());
    let b = propane.second_virial_m3_per_mol(300.0) * 1e6;
    println!("propane B at 300 K: {b:.1} cm3/mol vs -390 (from memory)");
    assert!((b / -390.0 - 1.0).abs() < 0.05, "{b}");
}

/// Along path (b) a vapour at its own saturation pressure gets exactly the library's latent
/// heat over its liquid (the departure is zero there), for every library component at
/// 0.8 Tc; and along path (a) the saturated vapour at Tb and 1 atm likewise (common
/// practice: the latent heat is the real ΔHvap between the saturated phases).
#[test]
fn saturated_vapour_gets_the_library_latent_heat() {
    let lib = Library::builtin();
    for c in lib.components() {
        let components = vec![lib.get(c.name()).unwrap().clone()];
        let b = EnthalpyModel::new(
            components.clone(),
            ReferenceState::default(),
            VaporisationPath::StreamTemperature,
        )
        .with_vapour_model(VapourModel::SecondVirial);
        let t = 0.8 * c.critical_temperature_k();
        let psat = c.vapour_pressure().psat_pa(t);
        let vapour = b.pure_at(0, Phase::Vapour, t, psat);
        let liquid = b.pure_at(0, Phase::Liquid, t, psat);
        assert_eq!(vapour.vapour_departure_j_per_mol, 0.0, "{}", c.name());
        let latent = c.latent_heat().latent_heat(t);
        let diff = vapour.total_j_per_mol() - liquid.total_j_per_mol();
        assert!(
            (diff - latent).abs() < 1e-9 * latent,
            "{}: {diff} vs {latent}",
            c.name()
        );
        let a = EnthalpyModel::new(components, ReferenceState::default(), VaporisationPath::BoilingPoint)
            .with_vapour_model(VapourModel::SecondVirial);
        let tb = c.normal_boiling_point_k();
        assert_eq!(
            a.pure_at(0, Phase::Vapour, tb, ATM).vapour_departure_j_per_mol,
            0.0,
            "{}",
            c.name()
        );
    }
}

/// Along path (b) the vapour's enthalpy is continuous across the critical temperature,
/// where the latent heat reaches zero and the saturation pressure in the correction is held
/// at Pc: the step across Tc ± 1e-7 K is a few J/mol (the Watson form's steep approach to
/// zero), not the thousands of J/mol of H^R at the critical point.
#[test]
fn path_b_vapour_is_continuous_across_the_critical_temperature() {
    let lib = Library::builtin();
    for name in ["propane", "water", "benzene"] {
        let c = lib.get(name).unwrap();
        let m = EnthalpyModel::new(
            vec![c.clone()],
            ReferenceState::default(),
            VaporisationPath::StreamTemperature,
        )
        .with_vapour_model(VapourModel::SecondVirial);
        let tc = c.critical_temperature_k();
        let h = |t: f64| m.pure_at(0, Phase::Vapour, t, 2e5).total_j_per_mol();
        let step = (h(tc + 1e-7) - h(tc - 1e-7)).abs();
        let critical = PitzerCurlVirial::for_component(c)
            .residual_enthalpy_j_per_mol(tc, c.critical_pressure_pa())
            .abs();
        println!("{name}: step across Tc {step:.3} J/mol; |H^R(Tc, Pc)| {critical:.0} J/mol");
        assert!(step < 20.0 && critical > 1000.0, "{name}: {step}");
    }
}

/// With the second-virial vapour the enthalpy table still adds up to the duty, each row's
/// parts (now with the vapour departure) add up to its enthalpy, the latent part is still
/// ΔHvap at Tb along path (a), and the departure column is zero under the ideal gas.
#[test]
fn enthalpy_table_adds_up_with_second_virial() {
    let s = stream(&["benzene", "toluene", "o-xylene"], &[0.3, 0.4, 0.3]);
    let ideal = heater_duty(&s, tp(300.0, 3e5), tp(500.0, 3e5), DutyOptions::default()).unwrap();
    assert!(ideal.table.iter().all(|row| row.vapour_departure_j_per_mol == 0.0));
    for vapour_ref in [false, true] {
        let o = options_with(
            vapour_ref,
            298.15,
            VaporisationPath::BoilingPoint,
            VapourModel::SecondVirial,
        );
        for outlet in [tp(420.0, 3e5), tp(500.0, 3e5)] {
            let r = heater_duty(&s, tp(300.0, 3e5), outlet, o).unwrap();
            assert_eq!(r.options, o);
            let total: f64 = r.table.iter().map(|row| row.sign() * row.enthalpy_flow_w).sum();
            assert!((total - r.duty_w).abs() < 1e-9 * r.duty_w.abs());
            for row in &r.table {
                let parts = row.liquid_sensible_j_per_mol
                    + row.latent_j_per_mol
                    + row.vapour_sensible_j_per_mol
                    + row.vapour_departure_j_per_mol;
                assert!((parts - row.enthalpy_j_per_mol).abs() < 1e-9 * row.enthalpy_j_per_mol.abs().max(1.0));
                if row.phase == Phase::Vapour {
                    assert!(row.vapour_departure_j_per_mol != 0.0);
                    if !vapour_ref {
                        let c = Library::builtin().get(&row.component).unwrap();
                        let at_tb = c.latent_heat().latent_heat(c.normal_boiling_point_k());
                        assert_eq!(row.latent_j_per_mol, at_tb);
                    }
                }
            }
        }
    }
}

/// The real-gas correction changes the duty but not the phase split, and the
/// duty-specified flash, the heating curve and the path spread all use it.
#[test]
fn second_virial_reaches_every_entry_point() {
    let s = stream(&["n-pentane", "n-hexane"], &[0.5, 0.5]);
    let p = 3e5;
    let (a, b) = (tp(300.0, p), tp(420.0, p));
    let ideal = heater_duty(&s, a, b, DutyOptions::default()).unwrap();
    let real = heater_duty(&s, a, b, virial()).unwrap();
    assert_eq!(ideal.outlet.vapour_fraction, real.outlet.vapour_fraction);
    assert!(real.duty_w != ideal.duty_w);
    let back = outlet_for_duty(
        &s,
        a,
        Power::new("duty", real.duty_w).unwrap(),
        Pressure::new("P", p).unwrap(),
        virial(),
    )
    .unwrap();
    assert!((back.outlet.temperature_k - 420.0).abs() < 1e-6);
    let curve = heating_curve(&s, a, b, 5, virial()).unwrap();
    assert!((curve.duty_w - real.duty_w).abs() < 1e-9 * real.duty_w);
    let ps = real.path_spread;
    assert_eq!(ps.boiling_point_w, real.duty_w);
    let stream_t = heater_duty(
        &s,
        a,
        b,
        DutyOptions {
            path: VaporisationPath::StreamTemperature,
            ..virial()
        },
    )
    .unwrap();
    assert!((ps.stream_temperature_w - stream_t.duty_w).abs() < 1e-9 * stream_t.duty_w);
}

/// The range warning: steam at 11 MPa and 600 K (Pr 0.50 > Tr/2 = 0.46) gets
/// `VirialOutOfRange` from the heater duty and the heating curve under the second virial,
/// and nothing of the kind under the ideal gas or at 1 atm. Along path (b) a saturated vapour
/// near Tc is flagged too (its correction is evaluated at Psat).
#[test]
fn virial_range_warning() {
    let s = stream(&["water"], &[1.0]);
    let p = 11e6;
    let (a, b) = (tp(600.0, p), tp(650.0, p));
    let is_virial = |w: &Warning| matches!(w, Warning::VirialOutOfRange { component, .. } if component == "water");
    let r = heater_duty(&s, a, b, virial()).unwrap();
    assert_eq!(r.inlet.phase, Phase::Vapour);
    let w = r.warnings.iter().find(|w| is_virial(w)).expect("a virial warning");
    assert!(
        w.to_string().contains("second-virial") && w.to_string().contains("Tr/2"),
        "{w}"
    );
    assert_eq!(r.warnings.iter().filter(|w| is_virial(w)).count(), 1);
    let c = heating_curve(&s, a, b, 3, virial()).unwrap();
    assert!(c.warnings.iter().any(is_virial), "{:?}", c.warnings);
    let ideal = heater_duty(&s, a, b, DutyOptions::default()).unwrap();
    assert!(!ideal.warnings.iter().any(is_virial));
    let low = heater_duty(&s, tp(400.0, ATM), tp(500.0, ATM), virial()).unwrap();
    assert!(!low.warnings.iter().any(is_virial));
    // Path (b): vapour at 1 atm and 640 K is fine itself, but its correction subtracts the
    // saturated vapour's at 640 K, close to Tc.
    let o = DutyOptions {
        path: VaporisationPath::StreamTemperature,
        ..virial()
    };
    let r = heater_duty(&s, tp(500.0, ATM), tp(640.0, ATM), o).unwrap();
    let w = r.warnings.iter().find(|w| is_virial(w)).expect("a virial warning");
    assert!(
        matches!(w, Warning::VirialOutOfRange { temperature_k, .. } if *temperature_k == 640.0),
        "{w}"
    );
}

/// Along the stream-temperature path (b) the vapour enthalpy carries the latent heat at T,
/// which falls to zero at Tc with an unbounded slope, so it dips below each component's Tc
/// and one duty can have several outlets. Propane/1-propanol 95/5 at 245 kPa (propane's Tc
/// 369.8 K): heating from 260 K to 353.3 K and asking for that duty back gives a two-phase
/// outlet near 317 K, with a warning that names 353.3 K (and one above Tc, near 433 K)
/// among the other outlets, each of which gives the same duty forward (the check is the
/// model's own consistency: every listed outlet is a state with the target enthalpy). The
/// boiling-point path (a) has no dip: the duty comes back as 353.3 K, with no such warning.
#[test]
fn stream_temperature_path_warns_of_other_outlets() {
    let s = stream(&["propane", "1-propanol"], &[0.95, 0.05]);
    let p = Pressure::new("P", 245e3).unwrap();
    let b = DutyOptions {
        path: VaporisationPath::StreamTemperature,
        ..DutyOptions::default()
    };
    let inlet = tp(260.0, p.pascal());
    let forward = heater_duty(&s, inlet, tp(353.3, p.pascal()), b).unwrap();
    let duty = Power::new("duty", forward.duty_w).unwrap();
    let back = outlet_for_duty(&s, inlet, duty, p, b).unwrap();
    let others = back
        .warnings
        .iter()
        .find_map(|w| match w {
            Warning::OutletNotUnique {
                component,
                critical_temperature_k,
                outlet_temperature_k,
                other_outlet_temperatures_k,
            } => {
                assert_eq!(component, "propane");
                assert!(*critical_temperature_k > 353.3, "{critical_temperature_k}");
                assert_eq!(*outlet_temperature_k, back.outlet.temperature_k);
                Some(other_outlet_temperatures_k.clone())
            }
            _ => None,
        })
        .unwrap_or_else(|| panic!("no outlet-not-unique warning: {:?}", back.warnings));
    assert!(back.outlet.temperature_k < 353.0, "{}", back.outlet.temperature_k);
    assert!(
        others.iter().any(|t| (t - 353.3).abs() < 1e-6),
        "{others:?} should list 353.3 K"
    );
    for &t in &others {
        let again = heater_duty(&s, inlet, tp(t, p.pascal()), b).unwrap();
        assert!(
            (again.duty_w - forward.duty_w).abs() <= 1e-8 * forward.duty_w.abs(),
            "{t} K: {} vs {} W",
            again.duty_w,
            forward.duty_w
        );
    }
    let a = DutyOptions::default();
    let forward_a = heater_duty(&s, inlet, tp(353.3, p.pascal()), a).unwrap();
    let back_a = outlet_for_duty(&s, inlet, Power::new("duty", forward_a.duty_w).unwrap(), p, a).unwrap();
    assert!((back_a.outlet.temperature_k - 353.3).abs() < 1e-6);
    assert!(
        !back_a
            .warnings
            .iter()
            .any(|w| matches!(w, Warning::OutletNotUnique { .. }))
    );
}
