//! Robustness of the public API at the edges of what input can reach: no panic, no NaN, and
//! every failure a typed error, for states far outside the correlations' ranges.

use flashduty::energy::{DutyOptions, Stream, StreamState, heater_duty, heating_curve, outlet_for_duty};
use flashduty::equilibrium::{FlashResult, FlashSpec, Raoult, flash};
use flashduty::library::Library;
use flashduty::units::{MolarFlow, Power, Pressure, Temperature};
use proptest::prelude::*;

fn mixtures() -> impl Strategy<Value = (Vec<String>, Vec<f64>)> {
    let names: Vec<String> = Library::builtin().components().map(|c| c.name().to_string()).collect();
    (1usize..=8)
        .prop_flat_map(move |n| {
            (
                proptest::sample::subsequence(names.clone(), n),
                proptest::collection::vec(prop_oneof![Just(0.0), 1e-15f64..1e-6, 1e-3f64..1.0], n),
            )
        })
        .prop_filter_map("all zero", |(names, w)| {
            let s: f64 = w.iter().sum();
            (s > 0.0).then(|| (names, w.iter().map(|v| v / s).collect()))
        })
}

fn finite(r: &FlashResult) -> bool {
    let vecs = [r.liquid.as_deref(), r.vapour.as_deref(), Some(r.k_values.as_slice())];
    [r.temperature_k, r.pressure_pa, r.vapour_fraction, r.liquid_fraction]
        .iter()
        .all(|v| v.is_finite())
        && vecs.iter().flatten().all(|v| v.iter().all(|x| x.is_finite()))
        && r.sensitivity
            .is_none_or(|s| s.dvapour_fraction_dt_per_k.is_finite() && s.dvapour_fraction_dp_per_pa.is_finite())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    /// Every specification at any temperature from 1 K to 10 000 K and any pressure from
    /// 1 mPa to 1 GPa either succeeds with finite numbers or returns an error.
    #[test]
    fn flashes_never_panic_or_return_nan(
        (names, z) in mixtures(),
        log_t in (1f64).ln()..(1e4f64).ln(),
        log_p in (1e-3f64).ln()..(1e9f64).ln(),
        beta in 0.0f64..=1.0,
    ) {
        let m = Raoult::from_names(&names).unwrap();
        let t = Temperature::new("T", log_t.exp()).unwrap();
        let p = Pressure::new("P", log_p.exp()).unwrap();
        let specs = [
            FlashSpec::TemperaturePressure { temperature: t, pressure: p },
            FlashSpec::BubbleTemperature { pressure: p },
            FlashSpec::DewTemperature { pressure: p },
            FlashSpec::BubblePressure { temperature: t },
            FlashSpec::DewPressure { temperature: t },
            FlashSpec::TemperatureVapourFraction { temperature: t, vapour_fraction: beta },
            FlashSpec::PressureVapourFraction { pressure: p, vapour_fraction: beta },
        ];
        for spec in specs {
            if let Ok(r) = flash(&m, &z, spec) {
                prop_assert!(finite(&r), "{spec:?}: {r:?}");
                prop_assert!((0.0..=1.0).contains(&r.vapour_fraction));
            }
        }
    }

    /// Heater duty, duty-specified flash and curves at extreme states: a result with finite
    /// numbers or an error.
    #[test]
    fn energy_never_panics_or_returns_nan(
        (names, z) in mixtures(),
        t1 in 50.0f64..3000.0, t2 in 50.0f64..3000.0,
        log_p in (1.0f64).ln()..(1e8f64).ln(),
        duty in -1e7f64..1e7,
    ) {
        let s = Stream::from_names(&names, &z, MolarFlow::new("flow", 1.0).unwrap()).unwrap();
        let p = Pressure::new("P", log_p.exp()).unwrap();
        let at = |t: f64| StreamState::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: p };
        if let Ok(r) = heater_duty(&s, at(t1), at(t2), DutyOptions::default()) {
            prop_assert!(r.duty_w.is_finite() && finite(&r.inlet) && finite(&r.outlet));
            prop_assert!(r.table.iter().all(|row| row.enthalpy_flow_w.is_finite()));
            prop_assert!(r.dduty_dt_out_w_per_k.is_none_or(f64::is_finite));
        }
        if let Ok(r) = outlet_for_duty(&s, at(t1), Power::new("duty", duty).unwrap(), p, DutyOptions::default()) {
            prop_assert!(finite(&r.outlet), "{:?}", r.outlet);
        }
        if let Ok(c) = heating_curve(&s, at(t1), at(t2), 5, DutyOptions::default()) {
            prop_assert!(c.points.iter().all(|pt| pt.temperature_k.is_finite() && pt.duty_w.is_finite() && pt.vapour_fraction.is_finite()));
        }
    }
}
