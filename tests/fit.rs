//! Fitting correlations to data: refits of published correlations, a fit to IAPWS-IF97 water
//! vapour pressures, heat-capacity polynomials, data errors, warnings, CSV reading, and user
//! components written and read back through the library.

use flashduty::fit::{
    ComponentChecks, DataKind, DataPoint, FitError, FitWarning, UserComponentBuilder, fit_antoine, fit_cp_polynomial,
    fit_extended, read_points_csv,
};
use flashduty::library::Library;
use flashduty::properties::{
    Antoine, AntoineForm, ComponentError, HeatCapacity, LatentHeat, ValidityRange, VapourPressure,
};

// ---------------------------------------------------------------------------------------
// Reference correlations

/// Benzene, NIST Chemistry WebBook Antoine constants, log10(P/bar) = A − B/(T + C),
/// 287.7–354.07 K (from memory).
fn benzene_nist() -> Antoine {
    Antoine::from_published(
        AntoineForm::Log10BarKelvin,
        4.01814,
        1203.835,
        -53.226,
        ValidityRange::new(287.7, 354.07).unwrap(),
    )
    .unwrap()
}

/// Toluene, NIST Chemistry WebBook Antoine constants, log10(P/bar) = A − B/(T + C),
/// 308.52–384.66 K (from memory).
fn toluene_nist() -> Antoine {
    Antoine::from_published(
        AntoineForm::Log10BarKelvin,
        4.07827,
        1343.943,
        -53.773,
        ValidityRange::new(308.52, 384.66).unwrap(),
    )
    .unwrap()
}

/// Water liquid heat capacity, DIPPR-100 constants of Perry's Chemical Engineers' Handbook,
/// 7th ed., Table 2-153 (J/kmol/K divided by 1000), 273.16–533.15 K (from memory).
const WATER_LIQ_CP: [f64; 5] = [276.37, -2.0901, 8.125e-3, -1.4116e-5, 9.3701e-9];

/// Benzene liquid heat capacity, same table (from memory).
const BENZENE_LIQ_CP: [f64; 3] = [129.44, -0.1695, 6.4781e-4];

fn poly(c: &[f64], t: f64) -> f64 {
    c.iter().rev().fold(0.0, |acc, ci| acc * t + ci)
}

fn linspace(a: f64, b: f64, n: usize) -> impl Iterator<Item = f64> {
    (0..n).map(move |i| a + (b - a) * i as f64 / (n - 1) as f64)
}

/// Points on a curve, `n` evenly spaced over [a, b].
fn sample(a: f64, b: f64, n: usize, f: impl Fn(f64) -> f64) -> Vec<DataPoint> {
    linspace(a, b, n).map(|t| DataPoint::new(t, f(t))).collect()
}

/// Largest relative deviation of `fitted` from `truth` on a fine grid over [a, b].
fn max_rel_dev(a: f64, b: f64, fitted: impl Fn(f64) -> f64, truth: impl Fn(f64) -> f64) -> f64 {
    linspace(a, b, 1001)
        .map(|t| (fitted(t) / truth(t) - 1.0).abs())
        .fold(0.0, f64::max)
}

/// Deterministic standard normal deviates: SplitMix64 (S. Vigna, 2015, common practice)
/// feeding the Box–Muller transform.
struct Noise(u64);

impl Noise {
    fn uniform(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^= z >> 31;
        // 53 random bits in (0, 1].
        ((z >> 11) as f64 + 1.0) / (1u64 << 53) as f64
    }

    fn normal(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
    }
}

// ---------------------------------------------------------------------------------------
// Antoine refits

#[test]
fn antoine_refit_recovers_published_curves() {
    for (name, truth) in [("benzene", benzene_nist()), ("toluene", toluene_nist())] {
        let r = truth.validity();
        let pts = sample(r.min_k, r.max_k, 25, |t| truth.psat_pa(t));
        let fit = fit_antoine(&pts).unwrap();
        let dev = max_rel_dev(r.min_k, r.max_k, |t| fit.antoine.psat_pa(t), |t| truth.psat_pa(t));
        println!(
            "{name}: exact-data refit, max deviation {:.2e} over the range; constants {:?}",
            dev,
            fit.constants(AntoineForm::Log10BarKelvin)
        );
        assert!(dev < 1e-3, "{name}: {dev}");
        assert!(
            dev < 1e-8,
            "{name}: exact data should be recovered essentially exactly: {dev}"
        );
        let (a, b, c) = fit.constants(AntoineForm::Log10BarKelvin);
        let (a0, b0, c0) = flashduty::fit::published_constants(&truth, AntoineForm::Log10BarKelvin);
        assert!(
            (a - a0).abs() < 1e-6 && (b / b0 - 1.0).abs() < 1e-6 && (c - c0).abs() < 1e-4,
            "{a} {b} {c}"
        );
        assert_eq!(fit.report.validity, r);
        assert!(fit.report.warnings.is_empty(), "{:?}", fit.report.warnings);
        assert!(fit.report.rms_relative_deviation <= fit.report.max_abs_relative_deviation);
        assert_eq!(fit.report.residuals.len(), 25);
    }
}

#[test]
fn antoine_fit_with_one_percent_noise_stays_close() {
    for (name, truth, seed) in [("benzene", benzene_nist(), 17), ("toluene", toluene_nist(), 2026)] {
        let r = truth.validity();
        let mut noise = Noise(seed);
        let pts: Vec<DataPoint> = linspace(r.min_k, r.max_k, 30)
            .map(|t| DataPoint::new(t, truth.psat_pa(t) * (1.0 + 0.01 * noise.normal())))
            .collect();
        let fit = fit_antoine(&pts).unwrap();
        let dev = max_rel_dev(r.min_k, r.max_k, |t| fit.antoine.psat_pa(t), |t| truth.psat_pa(t));
        println!(
            "{name}: 1 % noise, fit within {:.3} % of the true curve (RMS residual {:.3} %)",
            100.0 * dev,
            100.0 * fit.report.rms_relative_deviation
        );
        assert!(dev < 0.015, "{name}: {dev}");
        // The residuals reflect the noise.
        assert!(fit.report.rms_relative_deviation > 0.005 && fit.report.rms_relative_deviation < 0.02);
    }
}

/// The IAPWS-IF97 saturation table (tools/make_iapws_water.py, iapws 1.5.5), 300–450 K.
fn iapws_points() -> Vec<DataPoint> {
    let text = include_str!("fixtures/iapws_water_saturation.csv");
    let pts = read_points_csv(text, DataKind::VapourPressure).unwrap();
    assert_eq!(pts.len(), 38);
    pts.into_iter().filter(|p| (300.0..=450.0).contains(&p.t_k)).collect()
}

#[test]
fn water_fit_to_iapws_if97() {
    let pts = iapws_points();
    assert_eq!(pts.len(), 31);
    let fit = fit_antoine(&pts).unwrap();
    let (a, b, c) = fit.constants(AntoineForm::Log10BarKelvin);
    println!(
        "water, Antoine fit to IAPWS-IF97 300-450 K: log10(P/bar) = {a:.5} - {b:.3}/(T + {c:.3}); \
         max deviation {:.3} % (data row {}), RMS {:.3} %",
        100.0 * fit.report.max_abs_relative_deviation,
        fit.report.max_deviation_row,
        100.0 * fit.report.rms_relative_deviation
    );
    assert!(fit.report.max_abs_relative_deviation < 0.005);
    assert!(fit.report.warnings.is_empty(), "{:?}", fit.report.warnings);
    // The IAPWS points at 1 atm: Tsat(101325 Pa) = 373.1243 K (IAPWS-IF97, as in the
    // fixture tests/fixtures/iapws_water_1atm.csv).
    assert!((fit.antoine.psat_pa(373.1243) / 101_325.0 - 1.0).abs() < 0.005);

    for e in [2.0, 6.0] {
        let ext = fit_extended(&pts, e).unwrap();
        println!(
            "water, extended fit (E = {e}) to IAPWS-IF97 300-450 K: max deviation {:.4} %, RMS {:.4} %; constants {:?}",
            100.0 * ext.report.max_abs_relative_deviation,
            100.0 * ext.report.rms_relative_deviation,
            ext.constants
        );
        assert!(ext.report.max_abs_relative_deviation < 0.005);
        assert!(ext.report.max_abs_relative_deviation < fit.report.max_abs_relative_deviation);
        assert_eq!(ext.constants[4], e);
    }
}

#[test]
fn extended_refit_recovers_perry_water() {
    // Water, Perry's Chemical Engineers' Handbook 7th ed. Table 2-6 (DIPPR-101), from memory.
    let truth = |t: f64| (73.649 - 7258.2 / t - 7.3037 * t.ln() + 4.1653e-6 * t * t).exp();
    let pts = sample(280.0, 600.0, 33, truth);
    let fit = fit_extended(&pts, 2.0).unwrap();
    let dev = max_rel_dev(280.0, 600.0, |t| fit.model.psat_pa(t), truth);
    println!(
        "water, extended refit: max deviation {dev:.2e}; constants {:?}",
        fit.constants
    );
    assert!(dev < 1e-9, "{dev}");
    let want = [73.649, -7258.2, -7.3037, 4.1653e-6];
    for (got, want) in fit.constants.iter().zip(want) {
        assert!((got / want - 1.0).abs() < 1e-6, "{got} vs {want}");
    }
}

// ---------------------------------------------------------------------------------------
// Heat-capacity polynomials

#[test]
fn cp_polynomial_recovers_dippr_coefficients() {
    let pts = sample(273.16, 533.15, 27, |t| poly(&WATER_LIQ_CP, t));
    let fit = fit_cp_polynomial(&pts, 4).unwrap();
    for (got, want) in fit.coefficients.iter().zip(WATER_LIQ_CP) {
        let rel = (got / want - 1.0).abs();
        println!("water liquid Cp coefficient: fitted {got:e}, Perry's {want:e}, relative difference {rel:.1e}");
        assert!(rel < 1e-9, "{got} vs {want}");
    }
    assert!(fit.report.max_abs_relative_deviation < 1e-12);

    let pts = sample(279.0, 500.0, 12, |t| poly(&BENZENE_LIQ_CP, t));
    let fit = fit_cp_polynomial(&pts, 2).unwrap();
    assert_eq!(fit.coefficients.len(), 3);
    for (got, want) in fit.coefficients.iter().zip(BENZENE_LIQ_CP) {
        assert!((got / want - 1.0).abs() < 1e-9, "{got} vs {want}");
    }
    assert_eq!(fit.polynomial.coefficients()[3..], [0.0, 0.0]);
}

#[test]
fn cp_polynomial_of_degree_four_over_ten_kelvin_is_stable() {
    // The Vandermonde matrix in T over 300–310 K has a condition number near 1e17 (its
    // normal equations near 1e34): in the centred, scaled variable it is about 10.
    let pts = sample(300.0, 310.0, 11, |t| poly(&WATER_LIQ_CP, t));
    let fit = fit_cp_polynomial(&pts, 4).unwrap();
    let dev = max_rel_dev(300.0, 310.0, |t| fit.polynomial.cp(t), |t| poly(&WATER_LIQ_CP, t));
    let coeff_dev = fit
        .coefficients
        .iter()
        .zip(WATER_LIQ_CP)
        .map(|(g, w)| (g / w - 1.0).abs())
        .fold(0.0, f64::max);
    println!(
        "degree 4 over 300-310 K: curve within {dev:.1e}, coefficients within {coeff_dev:.1e}; warnings {:?}",
        fit.report.warnings
    );
    assert!(dev < 1e-9, "{dev}");
    assert!(fit.report.max_abs_relative_deviation < 1e-9);
    assert!(coeff_dev < 1e-3, "{coeff_dev}");
    assert!(
        fit.report
            .warnings
            .iter()
            .any(|w| matches!(w, FitWarning::NarrowRange { span_k, .. } if *span_k == 10.0))
    );
}

#[test]
fn cp_polynomial_least_squares_and_constant() {
    // Degree 0 is the mean.
    let pts = [
        DataPoint::new(300.0, 70.0),
        DataPoint::new(320.0, 74.0),
        DataPoint::new(340.0, 75.0),
    ];
    let fit = fit_cp_polynomial(&pts, 0).unwrap();
    assert!((fit.coefficients[0] - 73.0).abs() < 1e-12);
    // A straight line through scattered points: residuals sum to zero and are orthogonal
    // to T (the least-squares conditions).
    let pts: Vec<_> = [
        (300.0, 75.1),
        (310.0, 75.6),
        (320.0, 75.5),
        (330.0, 76.4),
        (340.0, 76.6),
    ]
    .iter()
    .map(|&(t, v)| DataPoint::new(t, v))
    .collect();
    let fit = fit_cp_polynomial(&pts, 1).unwrap();
    let r: Vec<f64> = fit.report.residuals.iter().map(|r| r.fitted - r.measured).collect();
    assert!(r.iter().sum::<f64>().abs() < 1e-10);
    assert!(
        r.iter()
            .zip(&pts)
            .map(|(ri, p)| ri * (p.t_k - 320.0))
            .sum::<f64>()
            .abs()
            < 1e-8
    );
}

// ---------------------------------------------------------------------------------------
// Data errors: one test per variant

fn vp_points() -> Vec<DataPoint> {
    let b = benzene_nist();
    sample(290.0, 350.0, 8, |t| b.psat_pa(t))
}

#[test]
fn error_too_few_points() {
    let pts = &vp_points()[..2];
    let e = fit_antoine(pts).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::TooFewPoints {
                points: 2,
                constants: 3,
                model: "antoine"
            }
        ),
        "{e:?}"
    );
    assert!(e.to_string().contains("2 given"), "{e}");
    let e = fit_extended(&vp_points()[..3], 2.0).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::TooFewPoints {
                points: 3,
                constants: 4,
                ..
            }
        ),
        "{e:?}"
    );
    let e = fit_cp_polynomial(&[], 0).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::TooFewPoints {
                points: 0,
                constants: 1,
                ..
            }
        ),
        "{e:?}"
    );
}

#[test]
fn error_not_finite_names_row() {
    let mut pts = vp_points();
    pts[4].value = f64::NAN;
    let e = fit_antoine(&pts).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::NotFinite {
                row: 5,
                column: "vapour pressure",
                ..
            }
        ),
        "{e:?}"
    );
    assert!(
        e.to_string().contains("data row 5") && e.to_string().contains("NaN"),
        "{e}"
    );
    let mut pts = vp_points();
    pts[1].t_k = f64::INFINITY;
    let e = fit_antoine(&pts).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::NotFinite {
                row: 2,
                column: "temperature",
                ..
            }
        ),
        "{e:?}"
    );
}

#[test]
fn error_non_positive_pressure_names_row() {
    let mut pts = vp_points();
    pts[2].value = -1500.0;
    let e = fit_antoine(&pts).unwrap_err();
    assert_eq!(
        e,
        FitError::NonPositivePressure {
            row: 3,
            pressure_pa: -1500.0
        }
    );
    assert!(
        e.to_string().contains("data row 3") && e.to_string().contains("-1500"),
        "{e}"
    );
    pts[2].value = 0.0;
    assert!(matches!(
        fit_extended(&pts, 2.0),
        Err(FitError::NonPositivePressure { row: 3, .. })
    ));
}

#[test]
fn error_non_positive_temperature_names_row() {
    let mut pts = vp_points();
    pts[7].t_k = -10.0;
    let e = fit_antoine(&pts).unwrap_err();
    assert_eq!(e, FitError::NonPositiveTemperature { row: 8, t_k: -10.0 });
    assert!(
        e.to_string().contains("data row 8") && e.to_string().contains("-10 K"),
        "{e}"
    );
}

#[test]
fn error_non_positive_heat_capacity_names_row() {
    let pts = [
        DataPoint::new(300.0, 75.0),
        DataPoint::new(310.0, -75.5),
        DataPoint::new(320.0, 76.0),
    ];
    let e = fit_cp_polynomial(&pts, 1).unwrap_err();
    assert_eq!(
        e,
        FitError::NonPositiveHeatCapacity {
            row: 2,
            cp_j_per_mol_k: -75.5
        }
    );
    assert!(
        e.to_string().contains("data row 2") && e.to_string().contains("-75.5"),
        "{e}"
    );
}

#[test]
fn error_duplicate_temperature_names_both_rows() {
    let mut pts = vp_points();
    pts[6].t_k = pts[1].t_k;
    let e = fit_antoine(&pts).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::DuplicateTemperature {
                row: 7,
                first_row: 2,
                ..
            }
        ),
        "{e:?}"
    );
    let msg = e.to_string();
    assert!(msg.contains("data row 7") && msg.contains("data row 2"), "{msg}");
}

#[test]
fn error_invalid_degree() {
    let pts = sample(300.0, 400.0, 10, |t| poly(&BENZENE_LIQ_CP, t));
    let e = fit_cp_polynomial(&pts, 5).unwrap_err();
    assert_eq!(e, FitError::InvalidDegree { degree: 5 });
    assert!(e.to_string().contains("degree 5"), "{e}");
}

#[test]
fn error_invalid_exponent() {
    for bad in [0.0, -1.0, f64::NAN] {
        let e = fit_extended(&vp_points(), bad).unwrap_err();
        assert!(matches!(e, FitError::InvalidExponent { .. }), "{e:?}");
        assert!(e.to_string().contains("E = "), "{e}");
    }
}

#[test]
fn error_degenerate_when_pressure_falls() {
    // Pressures falling with temperature (a column swap, say): the best Antoine curve falls too.
    let b = benzene_nist();
    let pts: Vec<_> = linspace(290.0, 350.0, 8)
        .map(|t| DataPoint::new(t, b.psat_pa(640.0 - t)))
        .collect();
    let e = fit_antoine(&pts).unwrap_err();
    assert!(matches!(e, FitError::Degenerate { model: "antoine", .. }), "{e:?}");
    assert!(e.to_string().contains("does not rise"), "{e}");
}

// ---------------------------------------------------------------------------------------
// Warnings

#[test]
fn warnings_for_thin_narrow_and_non_monotonic_data() {
    let b = benzene_nist();
    // Four points over 9 K: few and narrow.
    let pts = sample(320.0, 329.0, 4, |t| b.psat_pa(t));
    let fit = fit_antoine(&pts).unwrap();
    let w = &fit.report.warnings;
    assert!(
        w.contains(&FitWarning::FewPoints {
            points: 4,
            constants: 3,
            recommended: 6
        }),
        "{w:?}"
    );
    assert!(w.iter().any(|w| matches!(w, FitWarning::NarrowRange { .. })), "{w:?}");

    // A pressure that fails to rise, and two temperatures 5 mK apart.
    let mut pts = sample(290.0, 350.0, 10, |t| b.psat_pa(t));
    pts[5].value = pts[4].value * 0.99;
    pts.push(DataPoint::new(pts[8].t_k + 0.005, pts[8].value * 1.0002));
    let fit = fit_antoine(&pts).unwrap();
    let w = &fit.report.warnings;
    assert!(
        w.iter().any(|w| matches!(
            w,
            FitWarning::NotMonotonic {
                row: 6,
                previous_row: 5,
                ..
            }
        )),
        "{w:?}"
    );
    assert!(
        w.iter().any(|w| matches!(
            w,
            FitWarning::NearDuplicateTemperature {
                row: 11,
                other_row: 9,
                ..
            }
        )),
        "{w:?}"
    );
    // The report names the worst point, and serialises its warnings with a kind tag.
    assert_eq!(fit.report.max_deviation_row, 6);
    let json = serde_json::to_value(&fit.report).unwrap();
    let kinds: Vec<&str> = json["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["kind"].as_str().unwrap())
        .collect();
    assert!(
        kinds.contains(&"not-monotonic") && kinds.contains(&"near-duplicate-temperature"),
        "{kinds:?}"
    );
    assert_eq!(json["residuals"].as_array().unwrap().len(), 11);
    assert_eq!(json["constants"][1]["name"], "B");
    assert_eq!(json["constants"][1]["value"], fit.antoine.internal_constants().1);
    println!("{}", fit.report);
}

#[test]
fn warning_when_c_runs_to_the_edge_of_the_search() {
    // Invented curve with its pole far below the data (C = +800 K, beyond the search's
    // +2 T_min): the fit keeps to the edge and says so.
    let pts = sample(300.0, 360.0, 12, |t| (22.0 - 9000.0 / (t + 800.0)).exp());
    let fit = fit_antoine(&pts).unwrap();
    assert!(
        fit.report
            .warnings
            .iter()
            .any(|w| matches!(w, FitWarning::ConstantAtSearchBound { constant: "C", .. })),
        "{:?}",
        fit.report.warnings
    );
    // Such a curve is almost a Clausius–Clapeyron line: the fit is still close.
    assert!(fit.report.max_abs_relative_deviation < 1e-3, "{}", fit.report);
}

// ---------------------------------------------------------------------------------------
// CSV

#[test]
fn csv_with_units_in_the_header() {
    let text = include_str!("fixtures/fit_benzene_vapour_pressure.csv");
    let pts = read_points_csv(text, DataKind::VapourPressure).unwrap();
    assert_eq!(pts.len(), 15);
    assert!((pts[0].t_k - 288.15).abs() < 1e-12 && (pts[0].value - 7830.3).abs() < 1e-9);
    let fit = fit_antoine(&pts).unwrap();
    let dev = max_rel_dev(
        288.15,
        354.05,
        |t| fit.antoine.psat_pa(t),
        |t| benzene_nist().psat_pa(t),
    );
    println!(
        "benzene from the CSV fixture (5 significant figures): within {:.1e} of the NIST curve",
        dev
    );
    assert!(dev < 1e-4, "{dev}");

    let text = include_str!("fixtures/fit_benzene_liquid_cp.csv");
    let pts = read_points_csv(text, DataKind::HeatCapacity).unwrap();
    assert_eq!(pts.len(), 13);
    assert!((pts[0].value - 134.766).abs() < 1e-12);
    let fit = fit_cp_polynomial(&pts, 2).unwrap();
    assert!(fit.report.max_abs_relative_deviation < 1e-5);
    for (got, want) in fit.coefficients.iter().zip(BENZENE_LIQ_CP) {
        assert!((got / want - 1.0).abs() < 2e-3, "{got} vs {want}");
    }

    // Other spellings: no units (SI), suffix units, comments, blank lines, CRLF.
    let text = "# comment\r\n\r\nTemperature,Psat_bar\r\n300,0.138\r\n# mid comment\r\n310 , 0.2\r\n";
    let pts = read_points_csv(text, DataKind::VapourPressure).unwrap();
    assert_eq!(pts.len(), 2);
    assert_eq!((pts[0].t_k, pts[1].t_k), (300.0, 310.0));
    assert!((pts[0].value - 13_800.0).abs() < 1e-9 && (pts[1].value - 20_000.0).abs() < 1e-9);
    let pts = read_points_csv("cp [cal/mol/K],T [degF]\n18,212\n", DataKind::HeatCapacity).unwrap();
    assert!((pts[0].value - 18.0 * 4.184).abs() < 1e-12 && (pts[0].t_k - 373.15).abs() < 1e-9);
}

#[test]
fn csv_bad_values_reach_the_fit_with_their_row() {
    let text = "T [K], P [kPa]\n300, 13.8\n310, nan\n320, 30\n330, 43\n";
    let pts = read_points_csv(text, DataKind::VapourPressure).unwrap();
    let e = fit_antoine(&pts).unwrap_err();
    assert!(matches!(e, FitError::NotFinite { row: 2, .. }), "{e:?}");
    let text = "T [degC], P [kPa]\n20, 10\n-300, 13.8\n40, 24\n";
    let e = fit_antoine(&read_points_csv(text, DataKind::VapourPressure).unwrap()).unwrap_err();
    assert!(matches!(e, FitError::NonPositiveTemperature { row: 2, .. }), "{e:?}");
}

#[test]
fn csv_error_no_header() {
    let e = read_points_csv("# only a comment\n\n", DataKind::VapourPressure).unwrap_err();
    assert!(matches!(e, FitError::CsvNoHeader { .. }), "{e:?}");
    assert!(e.to_string().contains("T [degC], P [kPa]"), "{e}");
}

#[test]
fn csv_error_missing_column() {
    let e = read_points_csv("T [K], Cp [J/mol/K]\n300, 75\n", DataKind::VapourPressure).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::CsvMissingColumn {
                line: 1,
                column: "vapour pressure",
                ..
            }
        ),
        "{e:?}"
    );
    assert!(e.to_string().contains("Cp [J/mol/K]"), "{e}");
    let e = read_points_csv("x, P\n1, 2\n", DataKind::VapourPressure).unwrap_err();
    assert!(
        matches!(
            e,
            FitError::CsvMissingColumn {
                column: "temperature",
                ..
            }
        ),
        "{e:?}"
    );
    // Non-ASCII header cells are matched safely (the dotted capital I lower-cases to a
    // longer string).
    let e = read_points_csv("\u{130}\u{130}_x_K, P\n1, 2\n", DataKind::VapourPressure).unwrap_err();
    assert!(matches!(e, FitError::CsvMissingColumn { line: 1, .. }), "{e:?}");
    let pts = read_points_csv("T_\u{b0}C, P_kPa\n25, 3.2\n", DataKind::VapourPressure).unwrap();
    assert!((pts[0].t_k - 298.15).abs() < 1e-12 && (pts[0].value - 3200.0).abs() < 1e-9);
}

#[test]
fn csv_error_unknown_unit() {
    let e = read_points_csv("# c\nT [furlong], P [kPa]\n300, 1\n", DataKind::VapourPressure).unwrap_err();
    assert!(matches!(e, FitError::CsvUnit { line: 2, .. }), "{e:?}");
    assert!(e.to_string().contains("furlong"), "{e}");
    let e = read_points_csv("T [K], P [psig]\n300, 1\n", DataKind::VapourPressure).unwrap_err();
    assert!(matches!(e, FitError::CsvUnit { line: 1, .. }), "{e:?}");
}

#[test]
fn csv_error_unknown_heat_capacity_unit() {
    let e = read_points_csv("T [K], Cp [J/g/K]\n300, 4.18\n", DataKind::HeatCapacity).unwrap_err();
    assert!(matches!(e, FitError::CsvHeatCapacityUnit { line: 1, .. }), "{e:?}");
    assert!(e.to_string().contains("J/g/K"), "{e}");
}

#[test]
fn csv_error_field_count() {
    let e = read_points_csv("T [K], P [Pa]\n300, 1\n# x\n310, 2, 3\n", DataKind::VapourPressure).unwrap_err();
    assert_eq!(
        e,
        FitError::CsvFieldCount {
            line: 4,
            row: 2,
            found: 3,
            expected: 2
        }
    );
}

#[test]
fn csv_error_not_a_number() {
    let e = read_points_csv("T [K], P [Pa]\n300, 1\n310, 2,5\n", DataKind::VapourPressure).unwrap_err();
    assert!(matches!(e, FitError::CsvFieldCount { line: 3, row: 2, .. }), "{e:?}");
    let e = read_points_csv("T [K], P [Pa]\n300, 1\n310, 2.5kPa\n", DataKind::VapourPressure).unwrap_err();
    assert!(matches!(e, FitError::CsvNumber { line: 3, row: 2, .. }), "{e:?}");
    assert!(
        e.to_string().contains("'2.5kPa'") && e.to_string().contains("P [Pa]"),
        "{e}"
    );
}

// ---------------------------------------------------------------------------------------
// User components

const CITATION: &str = "plant laboratory, 2026-03, sample 17";

/// A benzene-like user component from fitted data. Given values: molar mass 78.112 g/mol,
/// Tb 353.24 K and ΔHvap(Tb) 30.72 kJ/mol (CRC Handbook, from memory); Tc 562.05 K,
/// Pc 4.895 MPa, ω 0.210 (Poling–Prausnitz–O'Connell, 5th ed., Appendix A, from memory);
/// ideal-gas Cp 82.4 J/(mol·K) at 298 K (NIST Chemistry WebBook, from memory). The name
/// and CAS number are invented so as not to clash with the built-in benzene.
fn builder() -> UserComponentBuilder {
    let vp = fit_antoine(
        &read_points_csv(
            include_str!("fixtures/fit_benzene_vapour_pressure.csv"),
            DataKind::VapourPressure,
        )
        .unwrap(),
    )
    .unwrap();
    let cp = fit_cp_polynomial(
        &read_points_csv(
            include_str!("fixtures/fit_benzene_liquid_cp.csv"),
            DataKind::HeatCapacity,
        )
        .unwrap(),
        2,
    )
    .unwrap();
    UserComponentBuilder::new("benzene (plant sample 17)", "0-00-17", "C6H6", CITATION)
        .source_key("plant-lab-2026-03")
        .synonyms(["plant benzene"])
        .molar_mass_g_per_mol(78.112)
        .critical_temperature_k(562.05)
        .critical_pressure_pa(4.895e6)
        .acentric_factor(0.210)
        .normal_boiling_point_k(353.24)
        .vapour_pressure_antoine(&vp)
        .liquid_cp_fit(&cp)
        .vapour_cp_constant(82.4, 298.15, 600.0)
        .latent_heat_watson(353.24, 30_720.0, None)
        .source(
            "crc-handbook",
            "CRC Handbook of Chemistry and Physics (edition as used by the plant)",
        )
        .cite("molar_mass_g_per_mol", "crc-handbook", true, None)
        .cite("critical_temperature_K", "ppo-5", true, None)
}

#[test]
fn user_component_round_trip_through_the_library() {
    let user = builder().strict(true).build().unwrap();
    let checks = user.checks();
    println!("user component checks: {checks:?}");
    assert!(checks.boiling_point_passed() && checks.latent_heat_passed());
    assert!(checks.psat_relative_deviation.abs() < 0.002, "{checks:?}");
    // R Tb² dlnP/dT runs a few per cent above the measured latent heat at 1 atm.
    assert!(checks.latent_heat_relative_deviation > 0.0 && checks.latent_heat_relative_deviation < 0.08);
    assert!(user.warnings().is_empty(), "{:?}", user.warnings());

    // Written as a component file, and read back by the library.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("plant_components.json");
    std::fs::write(&path, user.to_file_string()).unwrap();
    let text = std::fs::read_to_string(&path).unwrap();
    let file: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(file["schema"], flashduty::library::SCHEMA);
    assert_eq!(file["sources"]["plant-lab-2026-03"], CITATION);
    // A cited built-in key is copied into the file so that it stands alone.
    assert!(file["sources"]["ppo-5"].as_str().unwrap().contains("Poling"));
    let rec = &file["components"][0];
    assert_eq!(rec["vapour_pressure"]["source"], "plant-lab-2026-03");
    assert_eq!(rec["vapour_pressure"]["from_memory"], false);
    assert!(
        rec["vapour_pressure"]["note"]
            .as_str()
            .unwrap()
            .contains("fitted to 15 points")
    );
    assert_eq!(rec["molar_mass_g_per_mol"]["source"], "crc-handbook");
    assert_eq!(rec["molar_mass_g_per_mol"]["from_memory"], true);

    let mut lib = Library::builtin().clone();
    let before = lib.len();
    assert_eq!(lib.add_path(&path).unwrap(), 1);
    assert_eq!(lib.len(), before + 1);
    let back = lib.get("Plant Benzene").unwrap();
    assert_eq!(back.name(), "benzene (plant sample 17)");
    assert_eq!(lib.get("0-00-17").unwrap().name(), back.name());
    assert_eq!(lib.sources()["plant-lab-2026-03"], CITATION);
    let made = user.component();
    // serde_json (without its `float_roundtrip` feature) may read a number back one unit in
    // the last place off, so the curves agree to rounding rather than bit for bit.
    let same = |x: f64, y: f64| (x / y - 1.0).abs() < 1e-13;
    for t in [290.0, 320.0, 353.24, 400.0] {
        assert!(same(
            back.vapour_pressure().psat_pa(t),
            made.vapour_pressure().psat_pa(t)
        ));
        assert!(same(
            back.liquid_heat_capacity().cp(t),
            made.liquid_heat_capacity().cp(t)
        ));
        assert!(same(
            back.vapour_heat_capacity().cp(t),
            made.vapour_heat_capacity().cp(t)
        ));
        assert!(same(
            back.latent_heat().latent_heat(t),
            made.latent_heat().latent_heat(t)
        ));
    }
    assert_eq!(back.provenance(), made.provenance());
    let again = ComponentChecks::of(back);
    assert!(same(again.psat_at_boiling_point_pa, checks.psat_at_boiling_point_pa));
    assert!(same(
        again.clausius_clapeyron_latent_heat_j_per_mol,
        checks.clausius_clapeyron_latent_heat_j_per_mol
    ));
    // Adding the same file twice is a duplicate.
    assert!(matches!(lib.add_path(&path), Err(ComponentError::Duplicate { .. })));
}

#[test]
fn user_component_with_extended_form_and_published_units() {
    let ext = fit_extended(&iapws_points(), 2.0).unwrap();
    // Water: M 18.015268 g/mol, Tc 647.096 K, Pc 22.064 MPa (IAPWS, from memory), ω 0.345
    // (Poling–Prausnitz–O'Connell, from memory), Tb 373.1243 K and ΔHvap(Tb) 40 657 J/mol
    // (IAPWS-IF97, tests/fixtures/iapws_water_1atm.csv).
    let user = UserComponentBuilder::new("plant water", "0-00-18", "H2O", "IAPWS-IF97 points, refitted")
        .molar_mass_g_per_mol(18.015268)
        .critical_temperature_k(647.096)
        .critical_pressure_pa(22.064e6)
        .acentric_factor(0.345)
        .normal_boiling_point_k(373.1243)
        .vapour_pressure_extended(&ext)
        .liquid_cp_constant(75.4, 273.16, 373.15)
        .vapour_cp_constant(33.6, 298.15, 500.0)
        .latent_heat_watson(373.1243, 40_657.0, None)
        .build()
        .unwrap();
    let c = user.checks();
    println!("plant water checks: {c:?}");
    assert!(
        c.boiling_point_passed() && c.psat_relative_deviation.abs() < 1e-4,
        "{c:?}"
    );
    assert!(c.latent_heat_passed(), "{c:?}");
    let mut lib = Library::default();
    lib.add_json("water.json", &user.to_file_string()).unwrap();
    let w = lib.get("plant water").unwrap();
    assert!((w.vapour_pressure().psat_pa(400.0) / ext.model.psat_pa(400.0) - 1.0).abs() < 1e-13);

    // Antoine constants written in a published convention read back to the same curve.
    let vp = fit_antoine(&iapws_points()).unwrap();
    let b = UserComponentBuilder::new("plant water 2", "0-00-19", "H2O", "IAPWS-IF97 points, refitted")
        .molar_mass_g_per_mol(18.015268)
        .critical_temperature_k(647.096)
        .critical_pressure_pa(22.064e6)
        .acentric_factor(0.345)
        .normal_boiling_point_k(373.1243)
        .vapour_pressure_antoine(&vp)
        .antoine_units(AntoineForm::Log10MmHgCelsius)
        .liquid_cp_constant(75.4, 273.16, 373.15)
        .vapour_cp_constant(33.6, 298.15, 500.0)
        .latent_heat_watson(373.1243, 40_657.0, None);
    let user = b.build().unwrap();
    assert_eq!(
        user.component().to_json()["vapour_pressure"]["units"],
        "log10-mmHg-degC"
    );
    let mut lib = Library::default();
    lib.add_json("water2.json", &user.to_file_string()).unwrap();
    let p = lib.get("plant water 2").unwrap().vapour_pressure().psat_pa(350.0);
    assert!((p / vp.antoine.psat_pa(350.0) - 1.0).abs() < 1e-12);
}

#[test]
fn user_component_checks_warn_or_fail_when_strict() {
    // A normal boiling point 5 K too high: Psat there is well above 1 atm.
    let b = builder()
        .normal_boiling_point_k(358.24)
        .latent_heat_watson(358.24, 30_300.0, None);
    let user = b.clone().build().unwrap();
    let w = user.warnings();
    assert!(
        w.iter().any(
            |w| matches!(w, FitWarning::BoilingPointPressure { relative_deviation, .. } if *relative_deviation > 0.1)
        ),
        "{w:?}"
    );
    assert!(
        w.iter().any(|w| matches!(w, FitWarning::BoilingPointOutsideFit { .. })),
        "{w:?}"
    );
    let e = b.strict(true).build().unwrap_err();
    assert!(
        matches!(&e, FitError::ChecksFailed { failed, .. } if failed.len() == 1),
        "{e:?}"
    );
    assert!(e.to_string().contains("101325 Pa"), "{e}");

    // A latent heat 20 % too low against the vapour-pressure slope.
    let e = builder()
        .latent_heat_watson(353.24, 25_000.0, None)
        .strict(true)
        .build()
        .unwrap_err();
    let FitError::ChecksFailed { failed, .. } = &e else {
        panic!("{e:?}")
    };
    assert!(
        matches!(failed[0], FitWarning::LatentHeatConsistency { relative_deviation, .. } if relative_deviation > 0.2)
    );
    assert!(e.to_string().contains("Clausius-Clapeyron"), "{e}");
}

#[test]
fn user_component_errors_name_the_field() {
    // A value not given.
    let e = UserComponentBuilder::new("x", "0-00-20", "C", "lab")
        .build()
        .unwrap_err();
    assert_eq!(
        e,
        FitError::MissingField {
            component: "x".into(),
            field: "molar_mass_g_per_mol"
        }
    );
    // A value not finite.
    let e = builder().acentric_factor(f64::NAN).build().unwrap_err();
    assert!(
        matches!(&e, FitError::InvalidValue { field, .. } if field == "acentric_factor"),
        "{e:?}"
    );
    // A field that cannot be cited.
    let e = builder()
        .cite("boiling_point", "crc-handbook", true, None)
        .build()
        .unwrap_err();
    assert!(e.to_string().contains("boiling_point"), "{e}");
    // The library's own checks: Tc below Tb.
    let e = builder().critical_temperature_k(300.0).build().unwrap_err();
    assert!(
        matches!(&e, FitError::Component(ComponentError::InvalidValue { field, .. }) if field == "critical_temperature_K"),
        "{e:?}"
    );
    // A cited source that no bibliography defines.
    let e = builder()
        .cite("acentric_factor", "nowhere", false, None)
        .build()
        .unwrap_err();
    assert!(
        matches!(&e, FitError::Component(ComponentError::UnknownSource { .. })),
        "{e:?}"
    );
}

#[test]
fn example_inputs_fit_cleanly() {
    let pts = read_points_csv(
        include_str!("../examples/fit_vapour_pressure.csv"),
        DataKind::VapourPressure,
    )
    .unwrap();
    let fit = fit_antoine(&pts).unwrap();
    let dev = max_rel_dev(
        313.15,
        383.15,
        |t| fit.antoine.psat_pa(t),
        |t| toluene_nist().psat_pa(t),
    );
    println!("{}toluene example: within {:.1e} of the NIST curve", fit.report, dev);
    assert!(fit.report.warnings.is_empty() && dev < 5e-4, "{dev}");
    let pts = read_points_csv(include_str!("../examples/fit_liquid_cp.csv"), DataKind::HeatCapacity).unwrap();
    let fit = fit_cp_polynomial(&pts, 2).unwrap();
    println!("{}", fit.report);
    assert!(fit.report.warnings.is_empty() && fit.report.max_abs_relative_deviation < 5e-4);
}
