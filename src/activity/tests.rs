//! Checks of the activity models against their defining identities and published values.

use super::*;
use crate::test_rng::Rng;
use crate::units::GAS_CONSTANT;

fn models() -> Vec<ActivityModel> {
    let set = BinaryParameters::builtin();
    let names = ["ethanol", "water", "benzene", "methanol"];
    vec![
        ActivityModel::new(LiquidModel::Wilson, &names, set).unwrap(),
        ActivityModel::new(LiquidModel::Nrtl, &names, set).unwrap(),
        ActivityModel::new(LiquidModel::Uniquac, &names, set).unwrap(),
    ]
}

fn random_x(rng: &mut Rng, n: usize) -> Vec<f64> {
    let mut x: Vec<f64> = (0..n).map(|_| 0.01 + 0.99 * rng.uniform()).collect();
    let s: f64 = x.iter().sum();
    x.iter_mut().for_each(|v| *v /= s);
    x
}

/// Gibbs–Duhem at constant T: Σ xᵢ dln γᵢ = 0 along any composition change that keeps Σx = 1
/// (a consequence of ln γᵢ being the partial molar Gᴱ/RT; checked by central differences).
#[test]
fn gibbs_duhem_holds() {
    let mut rng = Rng(16);
    for m in models() {
        let n = m.component_count();
        for _ in 0..200 {
            let x = random_x(&mut rng, n);
            let t = 300.0 + 80.0 * rng.uniform();
            let (from, to) = (rng.range(0, n - 1), rng.range(0, n - 1));
            if from == to {
                continue;
            }
            let h = 1e-6;
            let mut up = x.clone();
            up[from] -= h;
            up[to] += h;
            let mut down = x.clone();
            down[from] += h;
            down[to] -= h;
            let (mut gu, mut gd, mut s) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
            m.ln_gamma(t, &up, &mut gu, &mut s);
            m.ln_gamma(t, &down, &mut gd, &mut s);
            let sum: f64 = (0..n).map(|i| x[i] * (gu[i] - gd[i]) / (2.0 * h)).sum();
            let scale: f64 = (0..n)
                .map(|i| (x[i] * (gu[i] - gd[i]) / (2.0 * h)).abs())
                .sum::<f64>()
                .max(1.0);
            assert!(sum.abs() < 1e-7 * scale, "{:?}: Σ x dlnγ = {sum:e} at {x:?}", m.kind());
        }
    }
}

/// The analytic ∂ln γᵢ/∂T against a central difference, and Hᴱ against Gibbs–Helmholtz.
#[test]
fn temperature_slopes_match_differences() {
    let mut rng = Rng(17);
    for m in models() {
        let n = m.component_count();
        for _ in 0..200 {
            let x = random_x(&mut rng, n);
            let t = 280.0 + 140.0 * rng.uniform();
            let (mut g, mut s) = (vec![0.0; n], vec![0.0; n]);
            m.ln_gamma(t, &x, &mut g, &mut s);
            let (mut gu, mut gd, mut junk) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
            let h = 1e-3;
            m.ln_gamma(t + h, &x, &mut gu, &mut junk);
            m.ln_gamma(t - h, &x, &mut gd, &mut junk);
            for i in 0..n {
                let fd = (gu[i] - gd[i]) / (2.0 * h);
                assert!(
                    (fd - s[i]).abs() < 1e-7 * (1.0 + s[i].abs()),
                    "{:?} i={i}: {fd} vs {}",
                    m.kind(),
                    s[i]
                );
            }
            let he = m.excess_enthalpy_j_per_mol(t, &x);
            let d = (m.excess_gibbs_over_rt(t + h, &x) - m.excess_gibbs_over_rt(t - h, &x)) / (2.0 * h);
            assert!((he + GAS_CONSTANT * t * t * d).abs() < 1e-6 * (1.0 + he.abs()));
            let mut partial = vec![0.0; n];
            m.partial_excess_enthalpies(t, &x, &mut partial);
            let sum: f64 = x.iter().zip(&partial).map(|(x, h)| x * h).sum();
            assert!((sum - he).abs() < 1e-9 * (1.0 + he.abs()));
        }
    }
}

/// A pure component has γ = 1; a pair without parameters is ideal under Wilson and NRTL.
#[test]
fn limits() {
    for m in models() {
        let n = m.component_count();
        for i in 0..n {
            let mut x = vec![0.0; n];
            x[i] = 1.0;
            let (mut g, mut s) = (vec![0.0; n], vec![0.0; n]);
            m.ln_gamma(340.0, &x, &mut g, &mut s);
            assert!(g[i].abs() < 1e-12 && s[i].abs() < 1e-12, "{:?}", m.kind());
        }
    }
    let m = ActivityModel::new(LiquidModel::Nrtl, &["benzene", "toluene"], BinaryParameters::builtin()).unwrap();
    assert_eq!(m.missing_pairs(), &[(0, 1)]);
    let (mut g, mut s) = ([1.0; 2], [1.0; 2]);
    m.ln_gamma(350.0, &[0.3, 0.7], &mut g, &mut s);
    assert_eq!((g, s), ([0.0; 2], [0.0; 2]));
}

/// Renon and Prausnitz's binary form of NRTL (AIChE J. 14 (1968) 135, eq. for a binary,
/// from memory): ln γ₁ = x₂²[τ₂₁ (G₂₁/(x₁ + x₂G₂₁))² + τ₁₂ G₁₂/(x₂ + x₁G₁₂)²], against the
/// multicomponent code.
#[test]
fn nrtl_matches_the_binary_form() {
    let mut set = BinaryParameters::default();
    set.add_json(
        "t",
        r#"{"pairs": [{"components": ["a", "b"], "nrtl": {"b12": "400 K", "b21": "-150 K", "alpha": 0.35}}]}"#,
    )
    .unwrap();
    let m = ActivityModel::new(LiquidModel::Nrtl, &["a", "b"], &set).unwrap();
    let (t, x1) = (330.0, 0.27);
    let x2 = 1.0 - x1;
    let (t12, t21): (f64, f64) = (400.0 / t, -150.0 / t);
    let (g12, g21): (f64, f64) = ((-0.35 * t12).exp(), (-0.35 * t21).exp());
    let expected = x2 * x2 * (t21 * (g21 / (x1 + x2 * g21)).powi(2) + t12 * g12 / (x2 + x1 * g12).powi(2));
    let (mut g, mut s) = ([0.0; 2], [0.0; 2]);
    m.ln_gamma(t, &[x1, x2], &mut g, &mut s);
    assert!((g[0] - expected).abs() < 1e-14);
}

/// Every error variant.
#[test]
fn errors_name_the_field() {
    let mut set = BinaryParameters::default();
    let e = set
        .add_json(
            "f.json",
            r#"{"pairs": [{"components": ["a", "b"], "nrtl": {"b12": "1e400 K", "b21": 1, "alpha": 0.3}}]}"#,
        )
        .unwrap_err();
    assert_eq!(e.kind(), "invalid-parameter");
    assert!(e.to_string().contains("pairs[0].nrtl.b12"), "{e}");
    let e = set
        .add_json(
            "f.json",
            r#"{"pairs": [{"components": ["a", "b"], "nrtl": {"b12": 1, "b21": 1, "alpha": 0}}]}"#,
        )
        .unwrap_err();
    assert!(e.to_string().contains("alpha: 0 is outside (0, 1]"), "{e}");
    let e = set
        .add_json("f.json", r#"{"pairs": [{"components": ["a"]}]}"#)
        .unwrap_err();
    assert_eq!(e.kind(), "parameter-file");
    let e = set.add_json("f.json", r#"{"pairs": [], "colour": 1}"#).unwrap_err();
    assert!(e.to_string().contains("colour"), "{e}");
    let e = set
        .add_json("f.json", r#"{"uniquac_components": {"a": {"r": -1, "q": 1}}}"#)
        .unwrap_err();
    assert!(e.to_string().contains("uniquac_components.a.r"), "{e}");
    set.add_json(
        "f.json",
        r#"{"pairs": [{"components": ["a", "zz"], "uniquac": {"u12": 1, "u21": 1}}]}"#,
    )
    .unwrap();
    let e = set.check_user_pairs(|n| n == "a").unwrap_err();
    assert_eq!(e.kind(), "pair-not-in-case");
    assert!(e.to_string().contains("'zz'"), "{e}");
    let e = ActivityModel::new(LiquidModel::Uniquac, &["a", "zz"], &set).unwrap_err();
    assert_eq!(e.kind(), "missing-uniquac-size");
    assert!(e.to_string().starts_with("uniquac_components.a"), "{e}");
    let e = ActivityModel::new(LiquidModel::Ideal, &["a", "zz"], &set).unwrap_err();
    assert_eq!(e.kind(), "unknown-liquid-model");
    let e = set
        .add_json("f.json", r#"{"schema": "other/1", "pairs": []}"#)
        .unwrap_err();
    assert!(e.to_string().contains("schema"), "{e}");
    let e = set.add_toml("f.toml", "pairs = 3").unwrap_err();
    assert_eq!(e.kind(), "parameter-file");
}

/// A published worked example of a Wilson bubble point: M. B. Cutlip and M. Shacham,
/// *Problem Solving in Chemical Engineering with Numerical Methods*, 2nd ed., Prentice Hall,
/// the problem "bubble point of a non-ideal mixture, ethanol (1)–n-hexane (2), Wilson
/// equation": x₁ = 0.332112 at 760 mmHg, constant Λ₁₂ = 0.07858889 and Λ₂₁ = 0.30175355,
/// Antoine log₁₀(P/mmHg) = A − B/(t/°C + C) with ethanol 8.04494, 1554.3, 222.65 and
/// n-hexane 6.87776, 1171.53, 224.366. Its solution: T = 58.70 °C, γ₁ = 2.29250,
/// γ₂ = 1.38602, y₁ = 0.33211 (the point is the azeotrope). Run here through the crate's
/// Wilson code and its bubble-temperature search.
#[test]
fn wilson_bubble_point_worked_example() {
    use crate::equilibrium::{FlashSpec, KValueModel, KValues, flash};
    use crate::properties::{Antoine, AntoineForm, ValidityRange, VapourPressure};
    use crate::units::Pressure;
    struct Example {
        activity: ActivityModel,
        antoine: [Antoine; 2],
    }
    impl KValueModel for Example {
        fn component_count(&self) -> usize {
            2
        }
        fn k_values(&self, t: f64, p: f64, x: &[f64], _y: &[f64], out: &mut KValues) {
            let (mut g, mut s) = ([0.0; 2], [0.0; 2]);
            self.activity.ln_gamma(t, x, &mut g, &mut s);
            for i in 0..2 {
                let (ln_psat, slope) = self.antoine[i].ln_psat_with_slope(t);
                out.k[i] = (ln_psat + g[i]).exp() / p;
                out.dln_k_dt[i] = slope + s[i];
                out.dln_k_dp[i] = -1.0 / p;
            }
        }
        fn is_composition_dependent(&self) -> bool {
            true
        }
    }
    let range = ValidityRange::new(250.0, 400.0).unwrap();
    let antoine = |a, b, c| Antoine::from_published(AntoineForm::Log10MmHgCelsius, a, b, c, range).unwrap();
    // Constant Λ: zero energies, ln Λ given directly.
    let activity = ActivityModel::binary(
        LiquidModel::Wilson,
        (0.0, 0.0),
        (0.07858889f64.ln(), 0.30175355f64.ln()),
        [(1.0, 1.0); 2],
    );
    let x = [0.332112, 0.667888];
    let (mut g, mut s) = ([0.0; 2], [0.0; 2]);
    activity.ln_gamma(331.85, &x, &mut g, &mut s);
    assert!(
        (g[0].exp() - 2.2924985789).abs() < 1e-8 && (g[1].exp() - 1.3860231871).abs() < 1e-8,
        "{g:?}"
    );
    let model = Example {
        activity,
        antoine: [antoine(8.04494, 1554.3, 222.65), antoine(6.87776, 1171.53, 224.366)],
    };
    let p = Pressure::new("P", 760.0 * crate::units::MMHG_PA).unwrap();
    let r = flash(&model, &x, FlashSpec::BubbleTemperature { pressure: p }).unwrap();
    // Agreement to 2.5e-6 K (the mmHg-to-pascal factor and the two solvers' stopping rules).
    assert!(
        (r.temperature_k - 273.15 - 58.70000239).abs() < 1e-5,
        "{}",
        r.temperature_k - 273.15
    );
    assert!((r.vapour.unwrap()[0] - 0.33211183).abs() < 1e-6);
}
