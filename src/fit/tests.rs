//! Unit tests of the fits.

use super::cp::binomial;
use super::csv::{CP_NAMES, TEMPERATURE_NAMES, cp_unit_factor, match_header};
use super::least_squares::least_squares;
use crate::units::{self, QuantityKind};
use ndarray::{Array1, Array2};

#[test]
fn qr_solves_a_consistent_system_exactly() {
    // y = 2 − 3x + 0.5x² at five points.
    let xs = [-2.0, -1.0, 0.0, 1.5, 3.0];
    let mut a = Array2::zeros((5, 3));
    let mut y = Array1::zeros(5);
    for (i, &x) in xs.iter().enumerate() {
        a[[i, 0]] = 1.0;
        a[[i, 1]] = x;
        a[[i, 2]] = x * x;
        y[i] = 2.0 - 3.0 * x + 0.5 * x * x;
    }
    let z = least_squares(a, y).unwrap();
    assert!((z[0] - 2.0).abs() < 1e-14 && (z[1] + 3.0).abs() < 1e-14 && (z[2] - 0.5).abs() < 1e-14);
}

#[test]
fn qr_least_squares_matches_closed_form_line() {
    // Straight line through noisy points: compare with the centred closed form.
    let pts = [(0.0, 1.1), (1.0, 2.9), (2.0, 5.2), (3.0, 6.8), (4.0, 9.1)];
    let mut a = Array2::zeros((5, 2));
    let mut y = Array1::zeros(5);
    for (i, &(x, v)) in pts.iter().enumerate() {
        a[[i, 0]] = 1.0;
        a[[i, 1]] = x;
        y[i] = v;
    }
    let z = least_squares(a, y).unwrap();
    let xm = 2.0;
    let ym = pts.iter().map(|p| p.1).sum::<f64>() / 5.0;
    let sxy: f64 = pts.iter().map(|p| (p.0 - xm) * (p.1 - ym)).sum();
    let sxx: f64 = pts.iter().map(|p| (p.0 - xm) * (p.0 - xm)).sum();
    let slope = sxy / sxx;
    assert!((z[1] - slope).abs() < 1e-13);
    assert!((z[0] - (ym - slope * xm)).abs() < 1e-13);
}

#[test]
fn qr_detects_rank_deficiency() {
    let mut a = Array2::zeros((4, 2));
    for i in 0..4 {
        a[[i, 0]] = i as f64 + 1.0;
        a[[i, 1]] = 2.0 * (i as f64 + 1.0);
    }
    assert!(least_squares(a, Array1::ones(4)).is_none());
    assert!(least_squares(Array2::zeros((3, 1)), Array1::ones(3)).is_none());
    assert!(least_squares(Array2::ones((1, 2)), Array1::ones(1)).is_none());
}

#[test]
fn heat_capacity_units() {
    for u in [
        "J/mol/K",
        "J/(mol K)",
        "J/(mol·K)",
        "J/mol-K",
        "J_per_mol_K",
        "kJ/kmol/K",
        "J/mol/degC",
    ] {
        assert_eq!(cp_unit_factor(u), Some(1.0), "{u}");
    }
    assert_eq!(cp_unit_factor("J/kmol/K"), Some(1e-3));
    assert_eq!(cp_unit_factor("kJ/(mol K)"), Some(1e3));
    assert_eq!(cp_unit_factor("cal/mol/K"), Some(4.184));
    // 1 Btu_IT/(lb·°F) = 4.1868 kJ/(kg·K) exactly (NIST SP 811, B.8, from memory).
    let btu = cp_unit_factor("Btu/lbmol/degF").unwrap();
    assert!((btu - 4.1868).abs() < 1e-12, "{btu}");
    assert_eq!(cp_unit_factor("J/g/K"), None);
    assert_eq!(cp_unit_factor("furlong"), None);
}

#[test]
fn header_cells() {
    let t_ok = |u: &str| units::to_si(QuantityKind::Temperature, "", 1.0, u).is_ok();
    assert_eq!(
        match_header("T [degC]", TEMPERATURE_NAMES, t_ok),
        Some(Some("degC".into()))
    );
    assert_eq!(match_header("T_K", TEMPERATURE_NAMES, t_ok), Some(Some("K".into())));
    assert_eq!(match_header("Temperature", TEMPERATURE_NAMES, t_ok), Some(None));
    assert_eq!(match_header("h_liquid_J_per_mol", TEMPERATURE_NAMES, t_ok), None);
    assert_eq!(match_header("Tc [K]", TEMPERATURE_NAMES, t_ok), None);
    let cp_ok = |u: &str| cp_unit_factor(u).is_some();
    assert_eq!(
        match_header("Cp_J_per_mol_K", CP_NAMES, cp_ok),
        Some(Some("J_per_mol_K".into()))
    );
}

#[test]
fn binomial_expansion_round_trips() {
    // Σ β_k ((T − m)/h)^k expanded in T must give the same values.
    let beta = [3.0, -1.5, 0.25, 0.75, -0.125];
    let (m, h): (f64, f64) = (305.0, 5.0);
    let coeff: Vec<f64> = (0..5)
        .map(|j| {
            (j..5)
                .map(|k| beta[k] / f64::powi(h, k as i32) * binomial(k, j) * (-m).powi((k - j) as i32))
                .sum()
        })
        .collect();
    for t in [300.0, 303.0, 307.5, 310.0] {
        let x: f64 = (t - m) / h;
        let direct: f64 = beta.iter().enumerate().map(|(k, b)| b * x.powi(k as i32)).sum();
        let expanded: f64 = coeff.iter().enumerate().map(|(k, c)| c * f64::powi(t, k as i32)).sum();
        assert!(
            (direct - expanded).abs() < 1e-6 * direct.abs().max(1.0),
            "{t}: {direct} vs {expanded}"
        );
    }
}
