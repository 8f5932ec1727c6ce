//! Shared helpers for the integration tests: reading the committed fixture tables.
#![allow(dead_code)]

use flashduty::energy::StreamState;
use flashduty::library::Library;
use flashduty::units::{Pressure, Temperature};
use proptest::prelude::*;
use std::collections::HashMap;

/// Rows of a fixture CSV in `tests/fixtures/`, `#` lines skipped, keyed by the header.
pub fn fixture(name: &str) -> Vec<HashMap<String, String>> {
    let path = format!("{}/tests/fixtures/{name}", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    let mut lines = text.lines().filter(|l| !l.trim().is_empty() && !l.starts_with('#'));
    let header: Vec<String> = lines
        .next()
        .expect("header")
        .split(',')
        .map(|s| s.trim().to_string())
        .collect();
    lines
        .map(|l| {
            header
                .iter()
                .cloned()
                .zip(l.splitn(header.len(), ',').map(|s| s.trim().to_string()))
                .collect()
        })
        .collect()
}

/// A numeric column of a fixture row.
pub fn num(row: &HashMap<String, String>, col: &str) -> f64 {
    row[col]
        .parse()
        .unwrap_or_else(|e| panic!("{col} = {:?}: {e}", row[col]))
}

/// Random mixtures of `min..=max` distinct library components with mole fractions of at
/// least a few per cent each, normalised.
pub fn mixtures(min: usize, max: usize) -> impl Strategy<Value = (Vec<String>, Vec<f64>)> {
    let names: Vec<String> = Library::builtin().components().map(|c| c.name().to_string()).collect();
    (min..=max)
        .prop_flat_map(move |n| {
            (
                proptest::sample::subsequence(names.clone(), n),
                proptest::collection::vec(0.05f64..1.0, n),
            )
        })
        .prop_map(|(names, w)| {
            let s: f64 = w.iter().sum();
            (names, w.iter().map(|v| v / s).collect())
        })
}

/// The stream state the energy tests draw: `kind` 0 or 1 a T–P state (twice as often), 2 a
/// P–β state, else a T–β state, from `t_k`, `p_pa` and `beta`.
pub fn stream_state(kind: usize, t_k: f64, p_pa: f64, beta: f64) -> StreamState {
    let (t, p) = (Temperature::new("T", t_k).unwrap(), Pressure::new("P", p_pa).unwrap());
    match kind {
        0 | 1 => StreamState::TemperaturePressure {
            temperature: t,
            pressure: p,
        },
        2 => StreamState::PressureVapourFraction {
            pressure: p,
            vapour_fraction: beta,
        },
        _ => StreamState::TemperatureVapourFraction {
            temperature: t,
            vapour_fraction: beta,
        },
    }
}
