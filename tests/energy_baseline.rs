//! The energy layer's numbers for ideal mixtures, to the last bit, against a fixture
//! (`tests/fixtures/energy_baseline.txt`, made by this test with `FLASHDUTY_WRITE_BASELINE=1`).
//!
//! History of the fixture: first written on the commit before the energy layer was made
//! generic over the K-value and phase-enthalpy models, which then changed no bit. Rewritten
//! once, when the duty-specified flash's search on the vapour fraction (narrow two-phase
//! regions) moved from Brent's method in the `roots` crate to the crate's one bracketed
//! solver: 20 of the 400 cases moved, all in that search, by at most 1.2e-15 relative in the
//! outlet, 5.8e-16 in `DutyCalculator` and 4.4e-14 in a curve point's vapour fraction (the
//! search's tolerance on β is 1e-13); no heater duty, table or flash moved. Rewritten a
//! second time (2026-12-03) when the warning that water and a water-immiscible component in
//! one liquid likely form two (`second-liquid-likely`) was added: 33 cases with water and a
//! hydrocarbon gained that warning, so their warning counts moved; none of the 140 tokens
//! that changed is a number (every float is the same to the bit, checked token by token).
//! Rewritten a third time (2026-12-03) for two fixes: dQ/dT is no longer reported at a
//! duty-specified outlet inside a pure component's two-phase region, where the duty rises at
//! constant temperature (12 values in 6 cases became `none`: six of them 1e29 to 7e32 W/K,
//! the others 18 to 7,105 W/K from the same undefined slope); and a pure-component feed no
//! longer carries the high-pressure doubt about Raoult's law (warning counts in 22 cases).
//! No other token changed. Rewritten a fourth time (2026-12-03) when Raoult's law began to
//! warn (`non-ideal-liquid`) for a feed holding a pair the library knows to be strongly
//! non-ideal (ethanol and water, acetone and chloroform, ...): warning counts in 26 cases, 100
//! tokens, each a count (checked token by token); no float changed. Rewritten a fifth time
//! (2026-12-03) when every result with acetic acid began to say that its vapour dimerises
//! (`vapour-associates`): warning counts in 31 cases, 164 tokens, each a count; no float
//! changed.
//!
//! The cases are drawn as the energy property tests draw theirs (random library mixtures of
//! one to five components, T–P, P–β and T–β states, both reference phases, every path, both
//! vapour models), from a fixed seed, so the same cases are run every time. Every number is
//! compared by its bits: heater duty, stream enthalpies, dQ/dT, the path spread, the
//! enthalpy table, both flash results with their sensitivities, the duty-specified flash,
//! the heating curve and `DutyCalculator`. Errors are compared by their messages.
//!
//! This is a regression check, not a check of the science: the science is checked against
//! outside references in `energy.rs` and `energy_fast.rs`.

mod common;

#[path = "common/rng.rs"]
mod rng;

use flashduty::energy::{
    DutyCalculator, DutyOptions, ReferencePhase, ReferenceState, Stream, StreamState, VaporisationPath, VapourModel,
    heater_duty, heating_curve, outlet_for_duty,
};
use flashduty::equilibrium::FlashResult;
use flashduty::library::Library;
use flashduty::units::{MolarFlow, Power, Pressure};
use rng::Rng;
use std::fmt::Write;

const CASES: usize = 400;

fn bits(out: &mut String, x: f64) {
    let _ = write!(out, " {:016x}", x.to_bits());
}

fn opt_bits(out: &mut String, x: Option<f64>) {
    match x {
        Some(x) => bits(out, x),
        None => out.push_str(" none"),
    }
}

fn flash_bits(out: &mut String, r: &FlashResult) {
    let _ = write!(out, " {:?}", r.phase);
    for x in [r.temperature_k, r.pressure_pa, r.vapour_fraction, r.liquid_fraction] {
        bits(out, x);
    }
    for v in [&r.liquid, &r.vapour].into_iter().flatten() {
        v.iter().for_each(|x| bits(out, *x));
    }
    r.k_values.iter().for_each(|x| bits(out, *x));
    let _ = write!(out, " {}", r.warnings.len());
    if let Some(s) = r.sensitivity {
        bits(out, s.dvapour_fraction_dt_per_k);
        bits(out, s.dvapour_fraction_dp_per_pa);
    }
}

fn state(rng: &mut Rng) -> StreamState {
    let (t, p, beta) = (250.0 + 300.0 * rng.uniform(), rng.log_uniform(2e4, 5e5), rng.uniform());
    common::stream_state(rng.range(0, 3), t, p, beta)
}

/// One line per case.
fn lines() -> Vec<String> {
    let names: Vec<String> = Library::builtin().components().map(|c| c.name().to_string()).collect();
    let mut rng = Rng(20261202);
    let mut out = Vec::with_capacity(CASES);
    for case in 0..CASES {
        let n = rng.range(1, 5);
        let mut chosen: Vec<String> = Vec::new();
        while chosen.len() < n {
            let c = &names[rng.range(0, names.len() - 1)];
            if !chosen.contains(c) {
                chosen.push(c.clone());
            }
        }
        let w: Vec<f64> = (0..n).map(|_| 0.05 + rng.uniform()).collect();
        let sum: f64 = w.iter().sum();
        let z: Vec<f64> = w.iter().map(|v| v / sum).collect();
        let flow = rng.log_uniform(0.01, 100.0);
        let options = DutyOptions {
            reference: ReferenceState {
                phase: if rng.chance(0.5) {
                    ReferencePhase::Vapour
                } else {
                    ReferencePhase::Liquid
                },
                temperature_k: 250.0 + 100.0 * rng.uniform(),
            },
            path: VaporisationPath::ALL[rng.range(0, 2)],
            vapour_model: if rng.chance(0.3) {
                VapourModel::SecondVirial
            } else {
                VapourModel::IdealGas
            },
        };
        let (inlet, outlet) = (state(&mut rng), state(&mut rng));
        let q = Power::new("duty", (rng.uniform() - 0.3) * 1e5 * flow).unwrap();
        let p_out = Pressure::new("P", rng.log_uniform(2e4, 5e5)).unwrap();
        let stream = Stream::from_names(&chosen, &z, MolarFlow::new("flow", flow).unwrap()).unwrap();
        let mut line = format!("{case}");
        match heater_duty(&stream, inlet, outlet, options) {
            Ok(r) => {
                for x in [r.duty_w, r.inlet_enthalpy_j_per_mol, r.outlet_enthalpy_j_per_mol] {
                    bits(&mut line, x);
                }
                opt_bits(&mut line, r.dduty_dt_out_w_per_k);
                let s = r.path_spread;
                for x in [
                    s.boiling_point_w,
                    s.stream_temperature_w,
                    s.reference_temperature_w,
                    s.spread_w,
                ] {
                    bits(&mut line, x);
                }
                for row in &r.table {
                    for x in [
                        row.flow_mol_s,
                        row.enthalpy_j_per_mol,
                        row.liquid_sensible_j_per_mol,
                        row.latent_j_per_mol,
                        row.vapour_sensible_j_per_mol,
                        row.vapour_departure_j_per_mol,
                        row.enthalpy_flow_w,
                    ] {
                        bits(&mut line, x);
                    }
                }
                flash_bits(&mut line, &r.inlet);
                flash_bits(&mut line, &r.outlet);
                let _ = write!(line, " w{}", r.warnings.len());
            }
            Err(e) => {
                let _ = write!(line, " error {e}");
            }
        }
        line.push_str(" |");
        match outlet_for_duty(&stream, inlet, q, p_out, options) {
            Ok(r) => {
                flash_bits(&mut line, &r.outlet);
                bits(&mut line, r.outlet_enthalpy_j_per_mol);
                opt_bits(&mut line, r.dduty_dt_out_w_per_k);
                let _ = write!(line, " w{}", r.warnings.len());
            }
            Err(e) => {
                let _ = write!(line, " error {e}");
            }
        }
        line.push_str(" |");
        if case % 4 == 0 {
            match heating_curve(&stream, inlet, outlet, 7, options) {
                Ok(c) => {
                    for pt in &c.points {
                        bits(&mut line, pt.temperature_k);
                        bits(&mut line, pt.duty_w);
                        bits(&mut line, pt.vapour_fraction);
                    }
                    bits(&mut line, c.bubble_temperature_k);
                    opt_bits(&mut line, c.dew_temperature_k);
                    let _ = write!(line, " w{}", c.warnings.len());
                }
                Err(e) => {
                    let _ = write!(line, " error {e}");
                }
            }
        }
        line.push_str(" |");
        let mut calc = DutyCalculator::new(&stream, options).unwrap();
        match calc.duty(inlet, outlet) {
            Ok(s) => {
                bits(&mut line, s.duty_w);
                opt_bits(&mut line, s.dduty_dt_out_w_per_k);
            }
            Err(e) => {
                let _ = write!(line, " error {e}");
            }
        }
        match calc.outlet_for_duty(inlet, q, p_out) {
            Ok(s) => {
                bits(&mut line, s.outlet.temperature_k);
                bits(&mut line, s.outlet.vapour_fraction);
                opt_bits(&mut line, s.dduty_dt_out_w_per_k);
            }
            Err(e) => {
                let _ = write!(line, " error {e}");
            }
        }
        out.push(line);
    }
    out
}

#[test]
fn ideal_mixture_numbers_are_unchanged_to_the_bit() {
    let path = format!("{}/tests/fixtures/energy_baseline.txt", env!("CARGO_MANIFEST_DIR"));
    let now = lines();
    if std::env::var_os("FLASHDUTY_WRITE_BASELINE").is_some() {
        let mut text = String::from(
            "# flashduty energy-layer results by bit pattern, one line per case of tests/energy_baseline.rs.\n\
             # Written by that test (FLASHDUTY_WRITE_BASELINE=1); its module docs give the history.\n",
        );
        for l in &now {
            text.push_str(l);
            text.push('\n');
        }
        std::fs::write(&path, text).unwrap();
        return;
    }
    let text = std::fs::read_to_string(&path).unwrap();
    let before: Vec<&str> = text.lines().filter(|l| !l.starts_with('#')).collect();
    assert_eq!(before.len(), now.len());
    let mut differ = 0;
    for (a, b) in before.iter().zip(&now) {
        if *a != b.as_str() {
            differ += 1;
            if differ <= 3 {
                eprintln!("before: {a}\nnow:    {b}");
            }
        }
    }
    let errors = now.iter().filter(|l| l.contains("error")).count();
    println!(
        "energy baseline: {} cases, {errors} with an error path, {differ} differ",
        now.len()
    );
    assert_eq!(differ, 0, "{differ} of {} cases changed", now.len());
}
