//! Shared helpers for the integration tests: reading the committed fixture tables.
#![allow(dead_code)]

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
