//! Flash specifications against handbook data and against each other.

mod common;

use common::{fixture, num};
use flashduty::equilibrium::{FlashError, FlashSpec, GivenK, KValueModel, KValues, Raoult, flash};
use flashduty::rachford_rice::{Phase, RachfordRiceError};
use flashduty::units::{Pressure, Temperature};
use flashduty::warnings::Warning;
use proptest::prelude::*;

const ATM: f64 = 101_325.0;

fn t(k: f64) -> Temperature {
    Temperature::new("T", k).unwrap()
}
fn p(pa: f64) -> Pressure {
    Pressure::new("P", pa).unwrap()
}

/// Every library component alone boils at its CRC Handbook normal boiling point
/// (tests/fixtures/handbook_boiling_points.csv, CRC 97th ed., from memory) within 0.5 K.
#[test]
fn pure_bubble_temperature_is_the_handbook_boiling_point() {
    let rows = fixture("handbook_boiling_points.csv");
    assert!(rows.len() >= 31);
    let mut worst = (0.0f64, String::new());
    for row in &rows {
        let name = &row["name"];
        let tb = num(row, "Tb_K");
        let m = Raoult::from_names(&[name]).unwrap();
        let r = flash(&m, &[1.0], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap();
        let d = flash(&m, &[1.0], FlashSpec::DewTemperature { pressure: p(ATM) }).unwrap();
        let dev = r.temperature_k - tb;
        assert!(dev.abs() < 0.5, "{name}: bubble T {} K vs CRC {tb} K", r.temperature_k);
        assert!(
            (d.temperature_k - r.temperature_k).abs() < 1e-9,
            "{name}: pure dew T differs"
        );
        if dev.abs() > worst.0.abs() {
            worst = (dev, name.clone());
        }
    }
    println!(
        "worst pure bubble T deviation from CRC: {:+.3} K ({})",
        worst.0, worst.1
    );
}

/// Benzene–toluene at 101.325 kPa follows Raoult's law closely: bubble and dew temperatures
/// within 1 K of the handbook T–x–y table (tests/fixtures/vle_benzene_toluene_1atm.csv,
/// Perry's / Geankoplis Table 11.1-1, from memory).
#[test]
fn benzene_toluene_txy_within_one_kelvin() {
    let m = Raoult::from_names(&["benzene", "toluene"]).unwrap();
    let mut worst = 0.0f64;
    for row in fixture("vle_benzene_toluene_1atm.csv") {
        let (x, y, tk) = (num(&row, "x_benzene"), num(&row, "y_benzene"), num(&row, "T_K"));
        let b = flash(&m, &[x, 1.0 - x], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap();
        let d = flash(&m, &[y, 1.0 - y], FlashSpec::DewTemperature { pressure: p(ATM) }).unwrap();
        for (what, got) in [("bubble", b.temperature_k), ("dew", d.temperature_k)] {
            assert!((got - tk).abs() < 1.0, "x={x} y={y}: {what} T {got} vs {tk}");
            worst = worst.max((got - tk).abs());
        }
        // The incipient vapour at the bubble point is the table's y.
        let y_calc = b.vapour.as_ref().unwrap()[0];
        assert!((y_calc - y).abs() < 0.02, "x={x}: y {y_calc} vs {y}");
    }
    println!("benzene-toluene worst |ΔT| = {worst:.3} K");
}

/// An honest failure: ethanol–water is far from ideal and has a minimum-boiling azeotrope at
/// x = 0.8943, 351.30 K (tests/fixtures/vle_ethanol_water_1atm.csv, Perry's, from memory).
/// Raoult's law cannot describe it: it predicts no azeotrope, a bubble point several kelvin
/// too high in the dilute region, and a vapour far from the measured one. The deviations are
/// recorded here (and in the README) rather than hidden.
#[test]
fn ethanol_water_deviation_is_documented() {
    let m = Raoult::from_names(&["ethanol", "water"]).unwrap();
    let mut worst = (0.0f64, 0.0f64);
    println!("x_ethanol  T_data  T_Raoult  dT    y_data  y_Raoult");
    for row in fixture("vle_ethanol_water_1atm.csv") {
        let (x, y, tk) = (num(&row, "x_ethanol"), num(&row, "y_ethanol"), num(&row, "T_K"));
        let b = flash(&m, &[x, 1.0 - x], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap();
        let yc = b.vapour.as_ref().unwrap()[0];
        println!(
            "{x:.4}  {tk:.2}  {:.2}  {:+.2}  {y:.4}  {yc:.4}",
            b.temperature_k,
            b.temperature_k - tk
        );
        if (b.temperature_k - tk).abs() > worst.0.abs() {
            worst = (b.temperature_k - tk, x);
        }
    }
    println!("worst bubble-T deviation {:+.2} K at x = {}", worst.0, worst.1);
    // Measured with the library data: about +8 K in the dilute-ethanol region.
    assert!(
        worst.0 > 4.0,
        "Raoult's law unexpectedly good for ethanol-water: {worst:?}"
    );
    // At the azeotrope the data have y = x; Raoult's law gives a vapour richer in ethanol
    // and a bubble point above the azeotrope temperature.
    let az = flash(&m, &[0.8943, 0.1057], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap();
    assert!(az.vapour.as_ref().unwrap()[0] > 0.8943 + 0.01);
    assert!(az.temperature_k > 351.30);
}

fn mixtures() -> impl Strategy<Value = (Vec<String>, Vec<f64>)> {
    common::mixtures(2, 6)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Bubble T < T(P, β = ½) < dew T; T–P flashes at the bubble and dew points give β = 0
    /// and 1 within 1e-9; the T–β and P–β flashes invert the T–P flash to 1e-9.
    ///
    /// Where the two-phase region is only a few millikelvin wide or less (two components whose
    /// Raoult's-law vapour pressures cross near the given pressure, methanol–n-hexane around
    /// 49 kPa, say), a temperature known to round-off, 16 ε T, still moves β by |dβ/dT|·16 ε T,
    /// which can exceed 1e-9: the β checks then allow that conditioning limit, from the
    /// analytic dβ/dT of the flash itself.
    #[test]
    fn specifications_are_consistent((names, z) in mixtures(), log_p in (2e4f64).ln()..(5e5f64).ln(), beta in 0.02f64..0.98) {
        let m = Raoult::from_names(&names).unwrap();
        let pp = p(log_p.exp());
        let bub = flash(&m, &z, FlashSpec::BubbleTemperature { pressure: pp }).unwrap();
        let dew = flash(&m, &z, FlashSpec::DewTemperature { pressure: pp }).unwrap();
        let half = flash(&m, &z, FlashSpec::PressureVapourFraction { pressure: pp, vapour_fraction: 0.5 }).unwrap();
        prop_assert!(bub.temperature_k < half.temperature_k && half.temperature_k < dew.temperature_k);

        let tolerance = |r: &flashduty::equilibrium::FlashResult| {
            1e-9 + r.sensitivity.map_or(0.0, |s| s.dvapour_fraction_dt_per_k.abs()) * 16.0 * f64::EPSILON * r.temperature_k
        };
        let at_bub = flash(&m, &z, FlashSpec::TemperaturePressure { temperature: t(bub.temperature_k), pressure: pp }).unwrap();
        prop_assert!(at_bub.vapour_fraction.abs() < tolerance(&at_bub), "{}", at_bub.vapour_fraction);
        let at_dew = flash(&m, &z, FlashSpec::TemperaturePressure { temperature: t(dew.temperature_k), pressure: pp }).unwrap();
        prop_assert!((at_dew.vapour_fraction - 1.0).abs() < tolerance(&at_dew), "{}", at_dew.vapour_fraction);

        // P–β → T, then T–P gives β back; T–β gives P back.
        let pb = flash(&m, &z, FlashSpec::PressureVapourFraction { pressure: pp, vapour_fraction: beta }).unwrap();
        let tp = flash(&m, &z, FlashSpec::TemperaturePressure { temperature: t(pb.temperature_k), pressure: pp }).unwrap();
        prop_assert!((tp.vapour_fraction - beta).abs() < tolerance(&tp), "{} vs {beta}", tp.vapour_fraction);
        let tb = flash(&m, &z, FlashSpec::TemperatureVapourFraction { temperature: t(pb.temperature_k), vapour_fraction: beta }).unwrap();
        prop_assert!((tb.pressure_pa / pp.pascal() - 1.0).abs() < 1e-9, "{} vs {}", tb.pressure_pa, pp.pascal());
        // Compositions agree too.
        let x_tolerance = tolerance(&tp);
        for (a, b) in tp.liquid.unwrap().iter().zip(pb.liquid.as_ref().unwrap()) {
            prop_assert!((a - b).abs() < x_tolerance);
        }
        // β = 0 and 1 are the bubble and dew points.
        let b0 = flash(&m, &z, FlashSpec::PressureVapourFraction { pressure: pp, vapour_fraction: 0.0 }).unwrap();
        prop_assert_eq!(b0.temperature_k, bub.temperature_k);
        let p1 = flash(&m, &z, FlashSpec::TemperatureVapourFraction { temperature: t(dew.temperature_k), vapour_fraction: 1.0 }).unwrap();
        prop_assert!((p1.pressure_pa / pp.pascal() - 1.0).abs() < 1e-9);
        // Bubble and dew pressures at the bubble and dew temperatures give P back.
        let bp = flash(&m, &z, FlashSpec::BubblePressure { temperature: t(bub.temperature_k) }).unwrap();
        prop_assert!((bp.pressure_pa / pp.pascal() - 1.0).abs() < 1e-9);
        let dp = flash(&m, &z, FlashSpec::DewPressure { temperature: t(dew.temperature_k) }).unwrap();
        prop_assert!((dp.pressure_pa / pp.pascal() - 1.0).abs() < 1e-9);
    }

    /// dβ/dT and dβ/dP from the implicit-function theorem agree with central differences.
    #[test]
    fn sensitivities_match_finite_differences((names, z) in mixtures(), beta in 0.1f64..0.9) {
        let m = Raoult::from_names(&names).unwrap();
        let pp = p(ATM);
        let st = flash(&m, &z, FlashSpec::PressureVapourFraction { pressure: pp, vapour_fraction: beta }).unwrap();
        let tk = st.temperature_k;
        let r = flash(&m, &z, FlashSpec::TemperaturePressure { temperature: t(tk), pressure: pp }).unwrap();
        let s = r.sensitivity.unwrap();
        let beta_at = |tk: f64, pa: f64| flash(&m, &z, FlashSpec::TemperaturePressure { temperature: t(tk), pressure: p(pa) }).unwrap().vapour_fraction;
        // Small steps: narrow-boiling pairs have dβ/dT of order 50 per kelvin. Some
        // (1-butanol with acetic acid) boil over 1e-4 K, which is a third of a pascal at
        // 1 atm: the pressure step is scaled down with the width of the two-phase region.
        // (The temperature step stays at 1e-6 K: much smaller, and T ± h is rounded to a
        // noticeable fraction of h.)
        let bubble = flash(&m, &z, FlashSpec::BubbleTemperature { pressure: pp }).unwrap().temperature_k;
        let dew = flash(&m, &z, FlashSpec::DewTemperature { pressure: pp }).unwrap().temperature_k;
        let scale = (100.0 * (dew - bubble)).min(1.0);
        let (h_t, h_p) = (1e-6, 1e-6 * ATM * scale);
        let fd_t = (beta_at(tk + h_t, ATM) - beta_at(tk - h_t, ATM)) / (2.0 * h_t);
        let fd_p = (beta_at(tk, ATM + h_p) - beta_at(tk, ATM - h_p)) / (2.0 * h_p);
        prop_assert!((fd_t - s.dvapour_fraction_dt_per_k).abs() < 1e-4 * fd_t.abs().max(1e-3), "{fd_t} vs {}", s.dvapour_fraction_dt_per_k);
        prop_assert!((fd_p - s.dvapour_fraction_dp_per_pa).abs() < 1e-4 * fd_p.abs().max(1e-9), "{fd_p} vs {}", s.dvapour_fraction_dp_per_pa);
    }
}

#[test]
fn bubble_and_dew_points_report_the_incipient_phase() {
    let m = Raoult::from_names(&["n-pentane", "n-hexane", "n-heptane"]).unwrap();
    let z = [0.2, 0.5, 0.3];
    let b = flash(&m, &z, FlashSpec::BubblePressure { temperature: t(350.0) }).unwrap();
    assert_eq!(b.phase, Phase::Liquid);
    assert_eq!(b.vapour_fraction, 0.0);
    let y = b.vapour.as_ref().unwrap();
    assert!((y.iter().sum::<f64>() - 1.0).abs() < 1e-14);
    // Raoult's law: bubble pressure = Σ z Psat exactly.
    let explicit: f64 = m
        .components()
        .iter()
        .zip(&z)
        .map(|(c, z)| {
            use flashduty::properties::VapourPressure;
            z * c.vapour_pressure().psat_pa(350.0)
        })
        .sum();
    assert!((b.pressure_pa / explicit - 1.0).abs() < 1e-13);
    let d = flash(&m, &z, FlashSpec::DewPressure { temperature: t(350.0) }).unwrap();
    assert_eq!(d.phase, Phase::Vapour);
    let explicit_dew = 1.0
        / m.components()
            .iter()
            .zip(&z)
            .map(|(c, z)| {
                use flashduty::properties::VapourPressure;
                z / c.vapour_pressure().psat_pa(350.0)
            })
            .sum::<f64>();
    assert!((d.pressure_pa / explicit_dew - 1.0).abs() < 1e-13);
    assert!((d.liquid.as_ref().unwrap().iter().sum::<f64>() - 1.0).abs() < 1e-14);
}

#[test]
fn warnings_are_machine_readable() {
    let m = Raoult::from_names(&["propane", "n-decane"]).unwrap();
    let r = flash(
        &m,
        &[0.5, 0.5],
        FlashSpec::TemperaturePressure {
            temperature: t(400.0),
            pressure: p(1e6),
        },
    )
    .unwrap();
    assert!(
        r.warnings
            .iter()
            .any(|w| matches!(w, Warning::Supercritical { component, .. } if component == "propane"))
    );
    assert!(r.warnings.iter().any(|w| matches!(w, Warning::HighPressure { .. })));
    assert!(r.warnings.iter().any(|w| matches!(
        w,
        Warning::CorrelationExtrapolated {
            correlation: "vapour_pressure",
            ..
        }
    )));
    let json = serde_json::to_value(&r.warnings).unwrap();
    assert!(json.as_array().unwrap().iter().all(|w| w.get("kind").is_some()));
    // Acetic acid's vapour dimerises (its Clausius–Clapeyron latent heat from the library's
    // vapour pressure is 65 % above the calorimetric one, CRC from memory: library_data.rs):
    // every result with it says so.
    let acid = flash(
        &Raoult::from_names(&["acetic acid", "water"]).unwrap(),
        &[0.3, 0.7],
        FlashSpec::BubbleTemperature { pressure: p(101_325.0) },
    )
    .unwrap();
    assert!(
        acid.warnings
            .iter()
            .any(|w| matches!(w, Warning::VapourAssociates { component } if component == "acetic acid")),
        "{:?}",
        acid.warnings
    );
    let quiet = flash(
        &Raoult::from_names(&["benzene", "toluene"]).unwrap(),
        &[0.5, 0.5],
        FlashSpec::TemperaturePressure {
            temperature: t(300.0),
            pressure: p(ATM),
        },
    )
    .unwrap();
    assert!(quiet.warnings.is_empty(), "{:?}", quiet.warnings);
}

#[test]
fn every_error_variant_names_the_field() {
    let m = Raoult::from_names(&["benzene", "toluene"]).unwrap();
    let e = flash(
        &m,
        &[0.5, 0.5],
        FlashSpec::PressureVapourFraction {
            pressure: p(ATM),
            vapour_fraction: 1.5,
        },
    )
    .unwrap_err();
    assert!(
        matches!(e, FlashError::VapourFractionOutOfRange { .. }) && e.to_string().contains("1.5"),
        "{e}"
    );
    let e = flash(
        &m,
        &[0.5, 0.5],
        FlashSpec::TemperatureVapourFraction {
            temperature: t(300.0),
            vapour_fraction: f64::NAN,
        },
    )
    .unwrap_err();
    assert!(matches!(e, FlashError::VapourFractionOutOfRange { .. }));
    let e = flash(&m, &[1.0], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap_err();
    assert!(
        matches!(e, FlashError::ComponentCount { components: 2, z: 1 }) && e.to_string().contains("z"),
        "{e}"
    );
    let e = flash(&m, &[0.7, 0.7], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap_err();
    assert!(
        matches!(e, FlashError::Feed(RachfordRiceError::MoleFractionSum { .. })),
        "{e}"
    );
    let e = flash(&m, &[-0.1, 1.1], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap_err();
    assert!(e.to_string().contains("z[0]"), "{e}");
    // A non-volatile component: no dew point.
    let nv = GivenK::new(vec![3.0, 0.0]);
    let e = flash(&nv, &[0.5, 0.5], FlashSpec::DewTemperature { pressure: p(ATM) }).unwrap_err();
    assert!(
        matches!(e, FlashError::NoDewPoint { .. }) && e.to_string().contains("component 2"),
        "{e}"
    );
    let e = flash(&nv, &[0.5, 0.5], FlashSpec::DewPressure { temperature: t(300.0) }).unwrap_err();
    assert!(matches!(e, FlashError::NoDewPoint { .. }), "{e}");
    // K-values that never reach the bubble condition.
    let low = GivenK::new(vec![0.5, 0.1]);
    let e = flash(&low, &[0.5, 0.5], FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap_err();
    assert!(
        matches!(e, FlashError::NoSolution { .. }) && e.to_string().contains("bubble temperature"),
        "{e}"
    );
    // Unknown component, with a suggestion.
    let e = Raoult::from_names(&["benzene", "toluen"]).unwrap_err();
    assert!(e.to_string().contains("toluene"), "{e}");
    // A composition loop that cannot settle.
    let e = flash(
        &Flipper,
        &[0.5, 0.5],
        FlashSpec::TemperaturePressure {
            temperature: t(300.0),
            pressure: p(ATM),
        },
    )
    .unwrap_err();
    assert!(matches!(e, FlashError::NotConverged { .. }), "{e}");
    // The error names the state it was asked for.
    assert!(e.to_string().contains("T = 300 K, P = 101325 Pa"), "{e}");
}

/// An invented composition-dependent model whose K-values swap whenever the vapour turns
/// rich in component 1: successive substitution can only oscillate.
struct Flipper;
impl KValueModel for Flipper {
    fn component_count(&self) -> usize {
        2
    }
    fn k_values(&self, _t: f64, _p: f64, _x: &[f64], y: &[f64], out: &mut KValues) {
        let k = if y[0] <= 0.5 { [3.0, 0.2] } else { [0.2, 3.0] };
        out.k.copy_from_slice(&k);
    }
    fn is_composition_dependent(&self) -> bool {
        true
    }
}

/// A modified Raoult's law with two-suffix Margules activity coefficients,
/// ln γ₁ = A x₂², ln γ₂ = A x₁² (common practice), plugged in through the K-value trait:
/// the flash code's outer loop handles it without change.
struct Margules {
    raoult: Raoult,
    a: f64,
}
impl KValueModel for Margules {
    fn component_count(&self) -> usize {
        2
    }
    fn k_values(&self, t: f64, p: f64, x: &[f64], y: &[f64], out: &mut KValues) {
        self.raoult.k_values(t, p, x, y, out);
        let g = [(self.a * x[1] * x[1]).exp(), (self.a * x[0] * x[0]).exp()];
        out.k[0] *= g[0];
        out.k[1] *= g[1];
    }
    fn is_composition_dependent(&self) -> bool {
        true
    }
    fn temperature_hint(&self, p: f64) -> Option<(f64, f64)> {
        self.raoult.temperature_hint(p)
    }
}

#[test]
fn composition_dependent_models_plug_in() {
    use flashduty::properties::VapourPressure;
    let raoult = Raoult::from_names(&["benzene", "cyclohexane"]).unwrap();
    let m = Margules {
        raoult: raoult.clone(),
        a: 0.5,
    };
    let z = [0.5, 0.5];
    let b = flash(&m, &z, FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap();
    let b0 = flash(&raoult, &z, FlashSpec::BubbleTemperature { pressure: p(ATM) }).unwrap();
    assert!(
        b.temperature_k < b0.temperature_k,
        "positive deviation lowers the bubble point"
    );
    // Check the bubble condition Σ γ x Psat = P by hand at the result.
    let g = [(0.5f64 * 0.25).exp(), (0.5f64 * 0.25).exp()];
    let sum: f64 = (0..2)
        .map(|i| g[i] * z[i] * raoult.components()[i].vapour_pressure().psat_pa(b.temperature_k))
        .sum();
    assert!((sum / ATM - 1.0).abs() < 1e-10, "{sum}");
    let d = flash(&m, &z, FlashSpec::DewTemperature { pressure: p(ATM) }).unwrap();
    let tp = flash(
        &m,
        &z,
        FlashSpec::TemperaturePressure {
            temperature: t(0.5 * (b.temperature_k + d.temperature_k)),
            pressure: p(ATM),
        },
    )
    .unwrap();
    assert_eq!(tp.phase, Phase::TwoPhase);
    // At the converged split, y = γ(x) x Psat / P.
    let x = tp.liquid.as_ref().unwrap();
    let y = tp.vapour.as_ref().unwrap();
    let gx = [(0.5 * x[1] * x[1]).exp(), (0.5 * x[0] * x[0]).exp()];
    for i in 0..2 {
        let psat = raoult.components()[i].vapour_pressure().psat_pa(tp.temperature_k);
        assert!((y[i] - gx[i] * x[i] * psat / ATM).abs() < 1e-9, "{i}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// The allocation-free flasher gives exactly the phase split of `flash`.
    #[test]
    fn reusable_flasher_matches_flash((names, z) in mixtures(), tk in 250.0f64..500.0, log_p in (2e4f64).ln()..(5e5f64).ln()) {
        use flashduty::equilibrium::TpFlasher;
        let m = Raoult::from_names(&names).unwrap();
        let (temperature, pressure) = (t(tk), p(log_p.exp()));
        let mut flasher = TpFlasher::new(&m).unwrap();
        let s = flasher.flash(&z, temperature, pressure).unwrap();
        let r = flash(&m, &z, FlashSpec::TemperaturePressure { temperature, pressure }).unwrap();
        // Equal to round-off: `flash` normalises z before the solve, the flasher inside it.
        let close = |a: &[f64], b: &[f64]| a.iter().zip(b).all(|(a, b)| (a - b).abs() <= 1e-14 * a.abs().max(b.abs()) + 1e-15);
        prop_assert_eq!(s.phase, r.phase);
        prop_assert!(close(&[s.vapour_fraction, s.liquid_fraction], &[r.vapour_fraction, r.liquid_fraction]));
        prop_assert_eq!(flasher.k_values(), r.k_values.as_slice());
        if let Some(x) = &r.liquid {
            prop_assert!(close(flasher.liquid(), x), "{:?} vs {:?}", flasher.liquid(), x);
        }
        if let Some(y) = &r.vapour {
            prop_assert!(close(flasher.vapour(), y), "{:?} vs {:?}", flasher.vapour(), y);
        }
    }
}

#[test]
fn reusable_flasher_errors() {
    use flashduty::equilibrium::TpFlasher;
    let m = Raoult::from_names(&["benzene", "toluene"]).unwrap();
    let mut flasher = TpFlasher::new(&m).unwrap();
    let e = flasher.flash(&[1.0], t(300.0), p(ATM)).unwrap_err();
    assert!(matches!(e, FlashError::ComponentCount { components: 2, z: 1 }), "{e}");
    let e = flasher.flash(&[0.2, 0.2], t(300.0), p(ATM)).unwrap_err();
    assert!(
        matches!(e, FlashError::Feed(RachfordRiceError::MoleFractionSum { .. })),
        "{e}"
    );
    let margules = Margules {
        raoult: m.clone(),
        a: 0.5,
    };
    let e = TpFlasher::new(&margules).unwrap_err();
    assert!(e.to_string().contains("composition-dependent"), "{e}");
}
