//! Speed of the flash specifications and the energy layer, as ratios against baselines
//! measured in the same run:
//! - the T–P flash against the Rachford–Rice solve it contains (the K-value cost is the rest);
//! - the bubble temperature against a plain bisection on the bubble sum in T, to the same
//!   tolerance, written here;
//! - the heater duty against two T–P flashes (the enthalpy table and path spread are the rest);
//! - the duty-specified flash against the heater duty;
//! - the hot-loop `DutyCalculator` (the duty and states only: no table, path spread or
//!   warnings, no allocation) against the full functions, which return all of them;
//! - the `DutyCalculator` with the second-virial vapour against the same with the default
//!   ideal-gas vapour.
//!
//! - the flash, bubble point and heater duty of a non-ideal liquid (NRTL, modified Raoult's
//!   law with the excess enthalpy; methanol–ethanol–water) against the same calls under
//!   Raoult's law on the same feed.
//!
//! The mixture is n = 10 library hydrocarbons (an invented feed); the activity-model group
//! an invented methanol–ethanol–water feed.

use criterion::{Criterion, criterion_group, criterion_main};
use flashduty::energy::{DutyCalculator, DutyOptions, Stream, StreamState, VapourModel, heater_duty, outlet_for_duty};
use flashduty::equilibrium::{FlashSpec, KValueModel, KValues, Raoult, TpFlasher, flash};
use flashduty::fit::{DataPoint, fit_antoine};
use flashduty::properties::{Antoine, VapourPressure};
use flashduty::rachford_rice::{Options, solve_into};
use flashduty::units::{MolarFlow, Power, Pressure, Temperature};
use std::hint::black_box;
use std::time::Duration;

const NAMES: [&str; 10] = [
    "propane",
    "n-butane",
    "isopentane",
    "n-pentane",
    "n-hexane",
    "benzene",
    "n-heptane",
    "toluene",
    "n-octane",
    "o-xylene",
];
const Z: [f64; 10] = [0.05, 0.08, 0.07, 0.1, 0.15, 0.1, 0.15, 0.12, 0.1, 0.08];

fn bench(c: &mut Criterion) {
    let model = Raoult::from_names(&NAMES).expect("library names");
    let p = Pressure::new("P", 3e5).expect("pressure");
    let t = Temperature::new("T", 380.0).expect("temperature");
    let mut g = c.benchmark_group("flash n=10");
    g.measurement_time(Duration::from_secs(2))
        .warm_up_time(Duration::from_millis(500));

    let mut kv = KValues::new(10);
    model.k_values(380.0, 3e5, &[], &[], &mut kv);
    let (mut x, mut y) = ([0.0; 10], [0.0; 10]);
    g.bench_function("baseline: Rachford-Rice alone", |b| {
        b.iter(|| solve_into(black_box(&Z), black_box(&kv.k), Options::default(), &mut x, &mut y))
    });
    g.bench_function("T-P flash (Raoult, library vapour pressures)", |b| {
        b.iter(|| {
            flash(
                &model,
                black_box(&Z),
                FlashSpec::TemperaturePressure {
                    temperature: t,
                    pressure: p,
                },
            )
        })
    });
    // Raoult's law with Antoine K-values: Antoine constants fitted (by the library's own
    // fitter) to each component's library vapour pressure from Tb − 60 K to Tb + 40 K.
    let antoine = AntoineK(
        model
            .components()
            .iter()
            .map(|c| {
                let tb = c.normal_boiling_point_k();
                let points: Vec<DataPoint> = (0..=20)
                    .map(|i| {
                        let t = tb - 60.0 + 5.0 * i as f64;
                        DataPoint::new(t, c.vapour_pressure().psat_pa(t))
                    })
                    .collect();
                fit_antoine(&points).expect("Antoine fit").antoine
            })
            .collect(),
    );
    let mut antoine_flasher = TpFlasher::new(&antoine).expect("composition-independent");
    g.bench_function("T-P flash, Antoine K-values, reusable buffers (TpFlasher)", |b| {
        b.iter(|| antoine_flasher.flash(black_box(&Z), t, p).map(|s| s.vapour_fraction))
    });
    let mut flasher = TpFlasher::new(&model).expect("Raoult's law is composition-independent");
    g.bench_function(
        "T-P flash, library vapour pressures, reusable buffers (TpFlasher)",
        |b| b.iter(|| flasher.flash(black_box(&Z), t, p).map(|s| s.vapour_fraction)),
    );
    g.bench_function("bubble temperature", |b| {
        b.iter(|| flash(&model, black_box(&Z), FlashSpec::BubbleTemperature { pressure: p }))
    });
    let comps = model.components().to_vec();
    g.bench_function("baseline: bubble T by bisection", |b| {
        b.iter(|| {
            let (mut lo, mut hi) = (150.0f64, 600.0f64);
            while hi - lo > 1e-13 * hi {
                let mid = 0.5 * (lo + hi);
                let s: f64 = comps
                    .iter()
                    .zip(&Z)
                    .map(|(c, z)| z * c.vapour_pressure().psat_pa(mid))
                    .sum();
                if s > 3e5 { hi = mid } else { lo = mid }
            }
            black_box(lo)
        })
    });
    g.finish();

    let stream = Stream::from_names(&NAMES, &Z, MolarFlow::new("flow", 10.0).expect("flow")).expect("stream");
    let inlet = StreamState::TemperaturePressure {
        temperature: Temperature::new("T", 300.0).expect("T"),
        pressure: p,
    };
    let outlet = StreamState::TemperaturePressure {
        temperature: t,
        pressure: p,
    };
    let o = DutyOptions::default();
    let duty = heater_duty(&stream, inlet, outlet, o).expect("duty").duty_w;
    let mut g = c.benchmark_group("duty n=10");
    g.measurement_time(Duration::from_secs(2))
        .warm_up_time(Duration::from_millis(500));
    g.bench_function("baseline: two T-P flashes", |b| {
        b.iter(|| {
            let a = flash(
                &model,
                &Z,
                FlashSpec::TemperaturePressure {
                    temperature: Temperature::new("T", 300.0).expect("T"),
                    pressure: p,
                },
            );
            let b2 = flash(
                &model,
                &Z,
                FlashSpec::TemperaturePressure {
                    temperature: t,
                    pressure: p,
                },
            );
            black_box((a, b2))
        })
    });
    g.bench_function(
        "heater duty (T-P to T-P), full result with table and path spread",
        |b| b.iter(|| heater_duty(&stream, black_box(inlet), outlet, o)),
    );
    let mut calc = DutyCalculator::new(&stream, o).expect("calculator");
    g.bench_function("heater duty (T-P to T-P), duty and states only (DutyCalculator)", |b| {
        b.iter(|| calc.duty(black_box(inlet), outlet).map(|s| s.duty_w))
    });
    let q = Power::new("duty", duty).expect("duty");
    g.bench_function("duty-specified flash, full result with table and path spread", |b| {
        b.iter(|| outlet_for_duty(&stream, black_box(inlet), q, p, o))
    });
    g.bench_function("duty-specified flash, outlet state only (DutyCalculator)", |b| {
        b.iter(|| {
            calc.outlet_for_duty(black_box(inlet), q, p)
                .map(|s| s.outlet.temperature_k)
        })
    });
    let virial = DutyOptions {
        vapour_model: VapourModel::SecondVirial,
        ..o
    };
    let mut calc_virial = DutyCalculator::new(&stream, virial).expect("calculator");
    g.bench_function("heater duty (T-P to T-P), DutyCalculator, second-virial vapour", |b| {
        b.iter(|| calc_virial.duty(black_box(inlet), outlet).map(|s| s.duty_w))
    });
    let q_virial = Power::new(
        "duty",
        heater_duty(&stream, inlet, outlet, virial).expect("duty").duty_w,
    )
    .expect("duty");
    g.bench_function("duty-specified flash, DutyCalculator, second-virial vapour", |b| {
        b.iter(|| {
            calc_virial
                .outlet_for_duty(black_box(inlet), q_virial, p)
                .map(|s| s.outlet.temperature_k)
        })
    });
    g.finish();
}

/// Raoult's law with one Antoine equation per component.
struct AntoineK(Vec<Antoine>);

impl KValueModel for AntoineK {
    fn component_count(&self) -> usize {
        self.0.len()
    }
    fn k_values(&self, t_k: f64, p_pa: f64, _x: &[f64], _y: &[f64], out: &mut KValues) {
        let ln_p = p_pa.ln();
        for (i, a) in self.0.iter().enumerate() {
            let (ln_psat, slope) = a.ln_psat_with_slope(t_k);
            out.k[i] = (ln_psat - ln_p).exp();
            out.dln_k_dt[i] = slope;
            out.dln_k_dp[i] = -1.0 / p_pa;
        }
    }
}

/// The NRTL liquid against Raoult's law, on one invented methanol–ethanol–water feed.
fn bench_activity(c: &mut Criterion) {
    use flashduty::activity::{BinaryParameters, LiquidModel};
    use flashduty::energy::{EnthalpyModel, ExcessEnthalpyModel, heater_duty_with};
    use flashduty::equilibrium::ModifiedRaoult;
    use flashduty::library::Library;
    let names = ["methanol", "ethanol", "water"];
    let z = [0.2, 0.3, 0.5];
    let comps = Library::builtin().get_all(&names).expect("library names");
    let ideal = Raoult::new(comps.clone());
    let nrtl = ModifiedRaoult::new(comps.clone(), LiquidModel::Nrtl, BinaryParameters::builtin()).expect("pairs");
    let h_ideal = EnthalpyModel::from_options(comps.clone(), DutyOptions::default());
    let h_nrtl = ExcessEnthalpyModel::new(h_ideal.clone(), nrtl.activity().clone()).expect("same components");
    let stream = Stream::new(comps, &z, MolarFlow::new("flow", 1.0).expect("flow")).expect("stream");
    let p = Pressure::new("P", 101_325.0).expect("pressure");
    let t = Temperature::new("T", 358.0).expect("temperature");
    let tp = FlashSpec::TemperaturePressure {
        temperature: t,
        pressure: p,
    };
    let at = |t: f64| StreamState::TemperaturePressure {
        temperature: Temperature::new("T", t).expect("temperature"),
        pressure: p,
    };
    let mut g = c.benchmark_group("activity n=3");
    g.measurement_time(Duration::from_secs(2))
        .warm_up_time(Duration::from_millis(500));
    g.bench_function("baseline: T-P flash, Raoult", |b| {
        b.iter(|| flash(&ideal, black_box(&z), tp))
    });
    g.bench_function("T-P flash, NRTL", |b| b.iter(|| flash(&nrtl, black_box(&z), tp)));
    let bubble = FlashSpec::BubbleTemperature { pressure: p };
    g.bench_function("baseline: bubble temperature, Raoult", |b| {
        b.iter(|| flash(&ideal, black_box(&z), bubble))
    });
    g.bench_function("bubble temperature, NRTL", |b| {
        b.iter(|| flash(&nrtl, black_box(&z), bubble))
    });
    g.bench_function("baseline: heater duty 300 K to 358 K, Raoult", |b| {
        b.iter(|| heater_duty_with(&stream, &ideal, &h_ideal, at(300.0), black_box(at(358.0))))
    });
    g.bench_function("heater duty 300 K to 358 K, NRTL with excess enthalpy", |b| {
        b.iter(|| heater_duty_with(&stream, &nrtl, &h_nrtl, at(300.0), black_box(at(358.0))))
    });
    g.finish();
}

criterion_group!(benches, bench, bench_activity);
criterion_main!(benches);
