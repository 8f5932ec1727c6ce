//! The Rachford–Rice solver: properties on random feeds, edge cases, closed forms, errors and
//! the batch API.
//!
//! Sources of the check values:
//! * the Rachford–Rice equation, x = z/(1 + β(K−1)), y = Kx, Σx = Σy = 1 and the phase test
//!   by the signs of F(0) = Σz(K−1) and F(1) = Σz(K−1)/K (Rachford & Rice, 1952; common
//!   practice);
//! * the Leibovici–Neoschil window, from xᵢ ≤ 1 and yᵢ ≤ 1 (Leibovici & Neoschil, 1992);
//! * the binary closed form β = −(z₁t₁ + z₂t₂)/((z₁+z₂)t₁t₂), t = K − 1 (common practice:
//!   clear the two denominators of F(β) = 0), evaluated here in 200-bit arithmetic
//!   (`dashu_float`) so the check does not inherit f64 cancellation;
//! * small closed forms derived by hand in the tests where they are used;
//! * one published worked example, a four-component hydrocarbon flash (Seader, Henley &
//!   Roper, *Separation Process Principles*, Wiley, chapter 4; from memory, see the test).
//!
//! Round-off allowances: ε = 2⁻⁵² (IEEE 754 double). The absolute error of β is bounded by
//! about ε·A/D, A = Σ|zᵢ(Kᵢ−1)/dᵢ|, D = |F'(β)| (first-order perturbation of a simple root,
//! common practice); it is what limits β near 0 and 1, where F(0) or F(1) is a cancelling sum.

use dashu_float::FBig;
use dashu_float::round::mode::HalfEven;
use flashduty::rachford_rice::{
    BatchOutput, BatchShapeError, MOLE_FRACTION_SUM_TOLERANCE, Options, Phase, PhaseSplit, RachfordRiceError,
    SplitSummary, rachford_rice, rachford_rice_with, solve_batch, solve_batch_with, solve_into, validate,
};
use ndarray::{Array2, ShapeBuilder, s};
use proptest::prelude::*;

const EPS: f64 = f64::EPSILON;
/// The module documentation: at most 50 safeguarded Halley or Newton steps, then at most 64
/// bisections on the float ordering (plus the evaluation that ends the loop), then at most 3
/// polishing steps in double-double arithmetic.
const MAX_ITERATIONS: u32 = 50 + 64 + 1 + 3;

// ---------------------------------------------------------------------------------------
// Helpers
// ---------------------------------------------------------------------------------------

/// Neumaier's compensated sum (common practice), so the test's own sums add no round-off
/// worth mentioning.
fn sum(values: impl IntoIterator<Item = f64>) -> f64 {
    let (mut s, mut c) = (0.0_f64, 0.0_f64);
    for v in values {
        let t = s + v;
        c += if s.abs() >= v.abs() { (s - t) + v } else { (v - t) + s };
        s = t;
    }
    s + c
}

fn normalised(z: &[f64]) -> Vec<f64> {
    let total = sum(z.iter().copied());
    z.iter().map(|v| v / total).collect()
}

fn xs(split: &PhaseSplit) -> &[f64] {
    split.liquid.as_deref().expect("liquid composition")
}

fn ys(split: &PhaseSplit) -> &[f64] {
    split.vapour.as_deref().expect("vapour composition")
}

type Big = FBig<HalfEven>;

fn big(v: f64) -> Big {
    Big::try_from(v).expect("finite").with_precision(200).value()
}

/// The binary closed form (common practice) in 200-bit arithmetic: (β, 1 − β).
fn binary_closed_form(z: [f64; 2], k: [f64; 2]) -> (f64, f64) {
    let one = big(1.0);
    let (z1, z2) = (big(z[0]), big(z[1]));
    let (t1, t2) = (big(k[0]) - &one, big(k[1]) - &one);
    let beta = -(&z1 * &t1 + &z2 * &t2) / ((&z1 + &z2) * &t1 * &t2);
    let gamma = &one - &beta;
    (beta.to_f64().value(), gamma.to_f64().value())
}

/// A/D at β for the normalised feed: the absolute error scale of β per unit round-off.
fn conditioning(z: &[f64], k: &[f64], beta: f64) -> f64 {
    let zn = normalised(z);
    let (mut a, mut d) = (0.0, 0.0);
    for i in 0..z.len() {
        if zn[i] == 0.0 {
            continue;
        }
        let t = k[i] - 1.0;
        let r = t / (1.0 + beta * t);
        a += (zn[i] * r).abs();
        d += zn[i] * r * r;
    }
    a / d
}

/// The signs of F(0) and F(1) where they are clear of f64 round-off: (Some(sign) or None).
fn phase_test_signs(zn: &[f64], k: &[f64]) -> (Option<bool>, Option<bool>) {
    let n = zn.len() as f64;
    let mut t0 = Vec::new();
    let mut t1 = Vec::new();
    let mut nonvolatile = false;
    for i in 0..zn.len() {
        if zn[i] == 0.0 {
            continue;
        }
        t0.push(zn[i] * (k[i] - 1.0));
        if k[i] == 0.0 {
            nonvolatile = true;
        } else {
            t1.push(zn[i] * (k[i] - 1.0) / k[i]);
        }
    }
    let clear = |terms: &[f64]| {
        let f = sum(terms.iter().copied());
        let scale = sum(terms.iter().map(|v| v.abs()));
        (f.abs() > 4.0 * (n + 4.0) * EPS * scale).then_some(f > 0.0)
    };
    let f1 = if nonvolatile { Some(false) } else { clear(&t1) };
    (clear(&t0), f1)
}

/// Every invariant of a result of the default solver, for a feed z (not necessarily
/// normalised) and K.
fn check_split(z: &[f64], k: &[f64], s: &PhaseSplit) {
    let n = z.len();
    let zn = normalised(z);
    let (beta, gamma) = (s.vapour_fraction, s.liquid_fraction);
    // Never NaN, fractions in range, 1 − β consistent with β.
    assert!(beta.is_finite() && gamma.is_finite(), "β = {beta}, 1 − β = {gamma}");
    assert!(
        (0.0..=1.0).contains(&beta) && (0.0..=1.0).contains(&gamma),
        "β = {beta}, 1 − β = {gamma}"
    );
    assert!((beta + gamma - 1.0).abs() <= EPS, "β + (1 − β) = {}", beta + gamma);
    assert!(s.iterations <= MAX_ITERATIONS, "{} iterations", s.iterations);
    assert!(s.evaluations >= s.iterations);

    // The phase label against the signs of F(0) and F(1) (common practice).
    let (f0_positive, f1_positive) = phase_test_signs(&zn, k);
    match s.phase {
        Phase::Liquid => {
            assert_ne!(f0_positive, Some(true), "liquid with F(0) > 0");
            assert_eq!((beta, gamma), (0.0, 1.0));
            assert_eq!(s.iterations, 0);
            let x = xs(s);
            for i in 0..n {
                assert!(
                    (x[i] - zn[i]).abs() <= 4.0 * EPS * zn[i],
                    "x[{i}] = {} for z = {}",
                    x[i],
                    zn[i]
                );
            }
            assert!(s.vapour.is_none());
        }
        Phase::Vapour => {
            assert_ne!(f1_positive, Some(false), "vapour with F(1) < 0");
            assert_eq!((beta, gamma), (1.0, 0.0));
            assert_eq!(s.iterations, 0);
            let y = ys(s);
            for i in 0..n {
                assert!(
                    (y[i] - zn[i]).abs() <= 4.0 * EPS * zn[i],
                    "y[{i}] = {} for z = {}",
                    y[i],
                    zn[i]
                );
            }
            assert!(s.liquid.is_none());
        }
        Phase::TwoPhase => {
            assert_ne!(f0_positive, Some(false), "two-phase with F(0) < 0");
            assert_ne!(f1_positive, Some(true), "two-phase with F(1) > 0");
            let (x, y) = (xs(s), ys(s));
            assert!(
                x.iter().chain(y).all(|v| v.is_finite() && *v >= 0.0),
                "x = {x:?}, y = {y:?}"
            );
            // Σx = Σy = 1.
            assert!(
                (sum(x.iter().copied()) - 1.0).abs() <= 1e-14,
                "Σx − 1 = {:e}",
                sum(x.iter().copied()) - 1.0
            );
            assert!(
                (sum(y.iter().copied()) - 1.0).abs() <= 1e-14,
                "Σy − 1 = {:e}",
                sum(y.iter().copied()) - 1.0
            );
            for i in 0..n {
                // y = Kx.
                assert!(
                    (y[i] - k[i] * x[i]).abs() <= EPS * y[i],
                    "y[{i}] = {} ≠ K x = {}",
                    y[i],
                    k[i] * x[i]
                );
                // Material balance z = (1 − β)x + βy, 1e-14 relative.
                let back = gamma * x[i] + beta * y[i];
                assert!(
                    (back - zn[i]).abs() <= 1e-14 * zn[i],
                    "component {i}: (1−β)x + βy = {back:e}, z = {:e}",
                    zn[i]
                );
                // Leibovici–Neoschil window: x ≤ 1, y ≤ 1, and the bounds on β they give.
                assert!(
                    x[i] <= 1.0 + 1e-14 && y[i] <= 1.0 + 1e-14,
                    "x[{i}] = {}, y[{i}] = {}",
                    x[i],
                    y[i]
                );
                if zn[i] == 0.0 {
                    assert_eq!((x[i], y[i]), (0.0, 0.0));
                    continue;
                }
                let u = 4.0 * (n as f64 + 4.0) * EPS;
                if k[i] > 1.0 {
                    let lower = (k[i] * zn[i] - 1.0) / (k[i] - 1.0);
                    assert!(
                        beta >= lower - u * (1.0 + k[i] * zn[i]) / (k[i] - 1.0),
                        "β = {beta:e} below the window {lower:e}"
                    );
                } else if k[i] < 1.0 {
                    let upper = (1.0 - zn[i]) / (1.0 - k[i]);
                    assert!(
                        beta <= upper + u * (1.0 + zn[i]) / (1.0 - k[i]),
                        "β = {beta:e} above the window {upper:e}"
                    );
                }
            }
        }
    }
}

/// The feed as a proptest strategy: n in 1..=30, z from a Dirichlet-like draw with zeros and
/// trace components (1e-15..1e-8, and exactly 1e-15), K by one of four modes.
fn feed() -> impl Strategy<Value = (Vec<f64>, Vec<f64>)> {
    let component = (0u8..20, 1e-300f64..1.0, 0u8..20, 0.0f64..1.0);
    (0u8..4, prop::collection::vec(component, 1..=30)).prop_map(|(mode, parts)| {
        let mut z = Vec::with_capacity(parts.len());
        let mut k = Vec::with_capacity(parts.len());
        for (zsel, zu, ksel, ku) in parts {
            z.push(match zsel {
                0 | 1 => 0.0,
                2 => 1e-15,
                3 => 10f64.powf(-15.0 + 7.0 * zu),
                _ => -zu.ln(),
            });
            let near_one = 1.0 + if ksel % 2 == 0 { 1.0 } else { -1.0 } * 10f64.powf(-12.0 + 11.0 * ku);
            k.push(match (ksel, mode) {
                (0, _) => 0.0,
                (1, _) => 1.0,
                (_, 0) => 10f64.powf(-15.0 + 30.0 * ku),
                (_, 1) => near_one,
                (_, 2) => 10f64.powf(-2.0 + 4.0 * ku),
                (2..=5, _) => near_one,
                _ => 10f64.powf(-15.0 + 30.0 * ku),
            });
        }
        if z.iter().all(|&v| v == 0.0) {
            z[0] = 1.0;
        }
        let total: f64 = z.iter().sum();
        z.iter_mut().for_each(|v| *v /= total);
        (z, k)
    })
}

/// A two-phase binary: z₁ in (0, 1), K₁ > 1 > K₂, log-uniform over 1e-15..1e15.
fn two_phase_binary() -> impl Strategy<Value = ([f64; 2], [f64; 2])> {
    (0.001f64..0.999, -15.0f64..15.0, -15.0f64..15.0).prop_filter_map("two-phase", |(z1, e1, e2)| {
        let (k1, k2) = (10f64.powf(e1.max(e2)), 10f64.powf(e1.min(e2)));
        let z = [z1, 1.0 - z1];
        let f0 = z[0] * (k1 - 1.0) + z[1] * (k2 - 1.0);
        let f1 = z[0] * (k1 - 1.0) / k1 + z[1] * (k2 - 1.0) / k2;
        (k1 > 1.0 && k2 < 1.0 && f0 > 0.0 && f1 < 0.0).then_some((z, [k1, k2]))
    })
}

// ---------------------------------------------------------------------------------------
// Properties
// ---------------------------------------------------------------------------------------

proptest! {
    #![proptest_config(ProptestConfig::with_cases(3000))]

    /// Σx = Σy = 1, the material balance, y = Kx, β in [0, 1] and in the window, the phase
    /// label against the signs of F(0) and F(1), no NaN, bounded iterations.
    #[test]
    fn random_feeds_satisfy_the_invariants((z, k) in feed()) {
        let s = rachford_rice(&z, &k).expect("valid feed");
        check_split(&z, &k, &s);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(1500))]

    /// Two-phase binaries against the closed form (common practice) to round-off: the error
    /// of β within 8ε(A/D + β), of 1 − β within 8ε(A/D + 1 − β).
    #[test]
    fn binaries_match_the_closed_form((z, k) in two_phase_binary()) {
        let s = rachford_rice(&z, &k).expect("valid feed");
        prop_assert_eq!(s.phase, Phase::TwoPhase);
        let (beta, gamma) = binary_closed_form(z, k);
        let kappa = conditioning(&z, &k, beta);
        prop_assert!((s.vapour_fraction - beta).abs() <= 8.0 * EPS * (kappa + beta),
            "β = {:e}, closed form {:e}, A/D = {:e}", s.vapour_fraction, beta, kappa);
        prop_assert!((s.liquid_fraction - gamma).abs() <= 8.0 * EPS * (kappa + gamma),
            "1 − β = {:e}, closed form {:e}, A/D = {:e}", s.liquid_fraction, gamma, kappa);
        check_split(&z, &k, &s);
    }

    /// The negative flash on random feeds: two-phase feeds are unchanged; single-phase feeds
    /// with K on both sides of 1 get the root of F inside the pole window (Whitson &
    /// Michelsen, 1989), with Σx = Σy = 1 and the material balance; others stay single-phase.
    #[test]
    fn negative_flash_on_random_feeds((z, k) in feed()) {
        let plain = rachford_rice(&z, &k).expect("valid feed");
        let s = rachford_rice_with(&z, &k, Options { negative_flash: true }).expect("valid feed");
        prop_assert!(s.vapour_fraction.is_finite() && s.liquid_fraction.is_finite());
        prop_assert!(s.iterations <= MAX_ITERATIONS);
        if plain.phase == Phase::TwoPhase {
            prop_assert_eq!(&s, &plain);
            return Ok(());
        }
        prop_assert_eq!(s.phase, plain.phase);
        let zn = normalised(&z);
        let live: Vec<usize> = (0..z.len()).filter(|&i| zn[i] > 0.0).collect();
        let k_max = live.iter().map(|&i| k[i]).fold(f64::NEG_INFINITY, f64::max);
        let k_min = live.iter().map(|&i| k[i]).fold(f64::INFINITY, f64::min);
        let (beta, gamma) = (s.vapour_fraction, s.liquid_fraction);
        if !(k_max > 1.0 && k_min < 1.0) {
            prop_assert_eq!((beta, gamma), (plain.vapour_fraction, plain.liquid_fraction));
            return Ok(());
        }
        // Pole window (β₋, β₊) = (1/(1 − K_max), 1/(1 − K_min)).
        let (pole_lo, pole_hi) = (1.0 / (1.0 - k_max), 1.0 / (1.0 - k_min));
        match s.phase {
            Phase::Liquid => prop_assert!(beta <= 0.0 && beta >= pole_lo, "β = {beta:e} outside ({pole_lo:e}, 0]"),
            Phase::Vapour => prop_assert!(beta >= 1.0 && beta <= pole_hi, "β = {beta:e} outside [1, {pole_hi:e})"),
            Phase::TwoPhase => unreachable!(),
        }
        prop_assert!((beta + gamma - 1.0).abs() <= EPS * (1.0 + beta.abs()));
        let (x, y) = (xs(&s), ys(&s));
        prop_assert!(x.iter().chain(y).all(|v| v.is_finite() && *v >= 0.0));
        let size = 1.0 + beta.abs();
        prop_assert!((sum(x.iter().copied()) - 1.0).abs() <= 1e-12 * size, "Σx − 1 = {:e}", sum(x.iter().copied()) - 1.0);
        prop_assert!((sum(y.iter().copied()) - 1.0).abs() <= 1e-12 * size, "Σy − 1 = {:e}", sum(y.iter().copied()) - 1.0);
        for &i in &live {
            let back = gamma * x[i] + beta * y[i];
            let scale = gamma.abs() * x[i] + beta.abs() * y[i];
            prop_assert!((back - zn[i]).abs() <= 1e-13 * scale, "component {i}: {back:e} vs {:e}", zn[i]);
        }
    }
}

// ---------------------------------------------------------------------------------------
// Edge cases
// ---------------------------------------------------------------------------------------

/// A published worked example: the multicomponent isothermal flash of chapter 4 of Seader,
/// Henley & Roper, *Separation Process Principles* (Wiley). Typed from memory, and the
/// example's number is not recalled: 100 kmol/h of 10, 20, 30 and 40 mol% propane, n-butane,
/// n-pentane and n-hexane at 100 psia and 200 °F, with K-values read from a chart as 4.2,
/// 1.75, 0.74 and 0.34, flashes to V/F = 0.1219 (printed to four places). Only β is
/// checked against the book; the compositions are checked by the material balance and
/// y = Kx, which are exact relations.
#[test]
fn published_four_component_hydrocarbon_flash() {
    let z = [0.1, 0.2, 0.3, 0.4];
    let k = [4.2, 1.75, 0.74, 0.34];
    let s = rachford_rice(&z, &k).unwrap();
    assert_eq!(s.phase, Phase::TwoPhase);
    assert!((s.vapour_fraction - 0.1219).abs() <= 0.00005, "{}", s.vapour_fraction);
    check_split(&z, &k, &s);
}

#[test]
fn one_component() {
    // A pure component is vapour above K = 1 and liquid at or below it (phase test, common practice).
    let s = rachford_rice(&[1.0], &[2.0]).unwrap();
    assert_eq!(
        (s.phase, s.vapour_fraction, s.liquid_fraction),
        (Phase::Vapour, 1.0, 0.0)
    );
    assert_eq!(ys(&s), &[1.0]);
    let s = rachford_rice(&[1.0], &[0.5]).unwrap();
    assert_eq!(
        (s.phase, s.vapour_fraction, s.liquid_fraction),
        (Phase::Liquid, 0.0, 1.0)
    );
    assert_eq!(xs(&s), &[1.0]);
    // K = 1: F(0) = 0, at the bubble point, reported liquid.
    let s = rachford_rice(&[1.0], &[1.0]).unwrap();
    assert_eq!((s.phase, s.vapour_fraction), (Phase::Liquid, 0.0));
    // Pure non-volatile component.
    let s = rachford_rice(&[1.0], &[0.0]).unwrap();
    assert_eq!(s.phase, Phase::Liquid);
}

#[test]
fn zero_feed_components_change_nothing_and_get_zero_fractions() {
    // A component absent from the feed does not enter F (each term carries zᵢ): the split of
    // (0.4, 0.6) with K = (2.5, 0.3) is the binary closed form (common practice).
    let base = rachford_rice(&[0.4, 0.6], &[2.5, 0.3]).unwrap();
    let (beta, _) = binary_closed_form([0.4, 0.6], [2.5, 0.3]);
    assert!((base.vapour_fraction - beta).abs() <= 4.0 * EPS);
    for extra_k in [0.0, 1e-15, 1.0, 7.0, 1e15] {
        let s = rachford_rice(&[0.0, 0.4, 0.0, 0.6], &[extra_k, 2.5, 3.0, 0.3]).unwrap();
        assert_eq!(s.phase, Phase::TwoPhase);
        assert!(
            (s.vapour_fraction - beta).abs() <= 4.0 * EPS,
            "K = {extra_k}: {}",
            s.vapour_fraction
        );
        for (x, y) in [(xs(&s)[0], ys(&s)[0]), (xs(&s)[2], ys(&s)[2])] {
            assert_eq!((x, y), (0.0, 0.0));
        }
        check_split(&[0.0, 0.4, 0.0, 0.6], &[extra_k, 2.5, 3.0, 0.3], &s);
    }
    // Also in single-phase feeds, including a zero-feed component with K = 0 in a vapour
    // (where x = y/K would be 0/0).
    let s = rachford_rice_with(&[0.5, 0.5, 0.0], &[3.0, 2.0, 0.0], Options::default()).unwrap();
    assert_eq!(s.phase, Phase::Vapour);
    let (mut x, mut y) = ([9.0; 3], [9.0; 3]);
    solve_into(&[0.5, 0.5, 0.0], &[3.0, 2.0, 0.0], Options::default(), &mut x, &mut y).unwrap();
    assert_eq!((x[2], y[2]), (0.0, 0.0));
    assert!(x.iter().chain(&y).all(|v| v.is_finite()));
    let s = rachford_rice(&[0.5, 0.5, 0.0], &[0.3, 0.2, 1e15]).unwrap();
    assert_eq!((s.phase, xs(&s)[2]), (Phase::Liquid, 0.0));
}

#[test]
fn k_exactly_one() {
    // z = (0.3, 0.4, 0.3), K = (2, 1, 0.5): F(β) = 0.3/(1 + β) − 0.15/(1 − β/2); F = 0 gives
    // 0.3 − 0.15β = 0.15 + 0.15β, β = 1/2 (derived by hand). The K = 1 component has
    // x = y = z.
    let s = rachford_rice(&[0.3, 0.4, 0.3], &[2.0, 1.0, 0.5]).unwrap();
    assert_eq!(s.phase, Phase::TwoPhase);
    assert!((s.vapour_fraction - 0.5).abs() <= 4.0 * EPS, "{}", s.vapour_fraction);
    assert!((xs(&s)[1] - 0.4).abs() <= 4.0 * EPS && xs(&s)[1] == ys(&s)[1]);
    check_split(&[0.3, 0.4, 0.3], &[2.0, 1.0, 0.5], &s);
    // A K = 1 component makes no term of F: the split is the binary closed form of the other
    // two with their own z (the form is homogeneous in z).
    let z = [0.25, 0.5, 0.25];
    let k = [3.0, 1.0, 0.1];
    let s = rachford_rice(&z, &k).unwrap();
    let (beta, gamma) = binary_closed_form([0.25, 0.25], [3.0, 0.1]);
    assert!((s.vapour_fraction - beta).abs() <= 4.0 * EPS && (s.liquid_fraction - gamma).abs() <= 4.0 * EPS);
    assert_eq!(xs(&s)[1], ys(&s)[1]);
}

#[test]
fn all_k_equal() {
    let z = [0.2, 0.3, 0.5];
    // All above 1: F(1) = (c − 1)/c > 0, vapour, x = z/c.
    let s = rachford_rice(&z, &[3.0; 3]).unwrap();
    assert_eq!((s.phase, s.vapour_fraction), (Phase::Vapour, 1.0));
    let (mut x, mut y) = ([0.0; 3], [0.0; 3]);
    solve_into(&z, &[3.0; 3], Options::default(), &mut x, &mut y).unwrap();
    for i in 0..3 {
        assert!((x[i] - z[i] / 3.0).abs() <= 2.0 * EPS * x[i]);
    }
    // All below 1: F(0) = c − 1 < 0, liquid, incipient vapour y = cz.
    let s = rachford_rice(&z, &[0.3; 3]).unwrap();
    assert_eq!((s.phase, s.vapour_fraction), (Phase::Liquid, 0.0));
    solve_into(&z, &[0.3; 3], Options::default(), &mut x, &mut y).unwrap();
    for i in 0..3 {
        assert!((y[i] - 0.3 * z[i]).abs() <= 2.0 * EPS * y[i]);
    }
    // All equal to 1: F ≡ 0, every β is a root; the solver reports the bubble point, x = y = z.
    let s = rachford_rice(&z, &[1.0; 3]).unwrap();
    assert_eq!((s.phase, s.vapour_fraction), (Phase::Liquid, 0.0));
    solve_into(&z, &[1.0; 3], Options::default(), &mut x, &mut y).unwrap();
    assert_eq!(x, y);
    // And with the negative flash: no pole on either side, the single-phase result.
    for c in [3.0, 0.3, 1.0] {
        let s = rachford_rice_with(&z, &[c; 3], Options { negative_flash: true }).unwrap();
        assert_eq!(s.vapour_fraction, if c > 1.0 { 1.0 } else { 0.0 });
    }
}

#[test]
fn non_volatile_component_is_never_all_vapour() {
    // K = 0 makes F(1) = −∞: a trace of a non-volatile component keeps a liquid. With
    // z = (z₀, 1 − z₀), K = (0, 10): F = 0 gives 9(1 − z₀)(1 − β) = z₀(1 + 9β), so
    // 1 − β = 10z₀/9 exactly (derived by hand).
    for z0 in [0.5, 1e-3, 1e-9, 1e-12, 1e-15] {
        let z = [z0, 1.0 - z0];
        let s = rachford_rice(&z, &[0.0, 10.0]).unwrap();
        assert_eq!(s.phase, Phase::TwoPhase, "z₀ = {z0}");
        let gamma = 10.0 * normalised(&z)[0] / 9.0;
        assert!(
            (s.liquid_fraction - gamma).abs() <= 8.0 * EPS * gamma,
            "z₀ = {z0}: 1 − β = {:e}, expected {gamma:e}",
            s.liquid_fraction
        );
        assert_eq!(ys(&s)[0], 0.0);
        assert!(xs(&s)[0] <= 1.0 + 1e-15);
        check_split(&z, &[0.0, 10.0], &s);
    }
    // Many volatile components and one non-volatile trace.
    let z = [1e-12, 0.3, 0.3, 0.4 - 1e-12];
    let k = [0.0, 50.0, 20.0, 5.0];
    let s = rachford_rice(&z, &k).unwrap();
    assert_eq!(s.phase, Phase::TwoPhase);
    assert!(s.liquid_fraction > 0.0 && s.liquid_fraction < 1e-11);
    check_split(&z, &k, &s);
}

#[test]
fn k_spanning_thirty_decades() {
    // Binaries at the extremes against the closed form (common practice, 200-bit).
    for (z, k) in [
        ([0.5, 0.5], [1e15, 1e-15]),
        ([1e-6, 1.0 - 1e-6], [1e15, 1e-15]),
        ([0.999, 0.001], [1e15, 1e-15]),
    ] {
        let s = rachford_rice(&z, &k).unwrap();
        let (beta, gamma) = binary_closed_form(z, k);
        let kappa = conditioning(&z, &k, beta);
        assert!(
            (s.vapour_fraction - beta).abs() <= 8.0 * EPS * (kappa + beta),
            "{z:?}: β = {:e} vs {beta:e}",
            s.vapour_fraction
        );
        assert!(
            (s.liquid_fraction - gamma).abs() <= 8.0 * EPS * (kappa + gamma),
            "{z:?}: 1 − β = {:e} vs {gamma:e}",
            s.liquid_fraction
        );
        check_split(&z, &k, &s);
    }
    // A spread of K over 1e-15..1e15.
    let k: Vec<f64> = (0..31).map(|i| 10f64.powi(i - 15)).collect();
    let z = vec![1.0 / 31.0; 31];
    let s = rachford_rice(&z, &k).unwrap();
    assert_eq!(s.phase, Phase::TwoPhase);
    check_split(&z, &k, &s);
    // The most volatile component is almost all in the vapour, the least in the liquid.
    assert!(ys(&s)[30] > xs(&s)[30] * 1e14 && xs(&s)[0] > ys(&s)[0] * 1e14);
}

#[test]
fn trace_components_at_1e_minus_15() {
    // A binary with a trace third component: β moves by O(1e-15) from the binary closed form,
    // and the trace's x and y satisfy x(1 + β(K − 1)) = z and y = Kx to round-off.
    let z = [0.5, 0.5 - 1e-15, 1e-15];
    for k_trace in [1e-15, 1e-3, 1.0, 1e3, 1e15] {
        let k = [2.0, 0.5, k_trace];
        let s = rachford_rice(&z, &k).unwrap();
        let (beta, _) = binary_closed_form([0.5, 0.5], [2.0, 0.5]);
        assert!(
            (s.vapour_fraction - beta).abs() <= 1e-14,
            "K = {k_trace}: β = {}",
            s.vapour_fraction
        );
        let zn = normalised(&z);
        let (x, y) = (xs(&s)[2], ys(&s)[2]);
        assert!(x > 0.0 && y > 0.0);
        let back = x * (s.liquid_fraction + s.vapour_fraction * k_trace);
        assert!(
            (back - zn[2]).abs() <= 8.0 * EPS * zn[2],
            "K = {k_trace}: {back:e} vs {:e}",
            zn[2]
        );
        check_split(&z, &k, &s);
    }
}

/// A deterministic pseudo-random feed (splitmix64; constants from memory, as in common use).
fn pseudo_random_feed(n: usize, seed: u64) -> (Vec<f64>, Vec<f64>) {
    let mut state = seed;
    let mut next = move || {
        state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut v = state;
        v = (v ^ (v >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        v = (v ^ (v >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        ((v ^ (v >> 31)) >> 11) as f64 / (1u64 << 53) as f64
    };
    let mut z: Vec<f64> = (0..n).map(|_| -(1.0 - next()).ln()).collect();
    let total: f64 = z.iter().sum();
    z.iter_mut().for_each(|v| *v /= total);
    let k = (0..n).map(|_| 10f64.powf(4.0 * next() - 2.0)).collect();
    (z, k)
}

#[test]
fn hundreds_and_a_thousand_components() {
    for (n, seed) in [(100, 1), (250, 2), (1000, 3)] {
        let (z, k) = pseudo_random_feed(n, seed);
        let s = rachford_rice(&z, &k).unwrap();
        assert_eq!(s.phase, Phase::TwoPhase);
        // Σx and Σy carry n terms: allow their round-off.
        let (sx, sy) = (sum(xs(&s).iter().copied()), sum(ys(&s).iter().copied()));
        assert!(
            (sx - 1.0).abs() <= 1e-14 && (sy - 1.0).abs() <= 1e-14,
            "n = {n}: Σx − 1 = {:e}, Σy − 1 = {:e}",
            sx - 1.0,
            sy - 1.0
        );
        // F changes sign across β ± 1e-12 (F decreasing; common practice), in compensated sums.
        let f = |b: f64| sum((0..n).map(|i| z[i] * (k[i] - 1.0) / (1.0 + b * (k[i] - 1.0))));
        assert!(
            f(s.vapour_fraction - 1e-12) > 0.0 && f(s.vapour_fraction + 1e-12) < 0.0,
            "n = {n}"
        );
        let zn = normalised(&z);
        for (i, &zi) in zn.iter().enumerate() {
            let back = s.liquid_fraction * xs(&s)[i] + s.vapour_fraction * ys(&s)[i];
            assert!((back - zi).abs() <= 1e-14 * zi);
        }
        assert!(s.iterations <= 10, "n = {n}: {} iterations", s.iterations);
    }
}

/// The binary K = (2, ½): t = (1, −½), and the closed form (common practice) is
/// β = (z₁ − z₂/2)/(½(z₁+z₂)) = 3z₁ − 1 for z₁ + z₂ = 1. With z₁ = m·2⁻⁵³ both z₁ and
/// z₂ = 1 − z₁ are exact, and so are β = (3m − 2⁵³)·2⁻⁵³ and 1 − β = (2⁵⁴ − 3m)·2⁻⁵³.
fn exact_binary(beta_target: f64) -> ([f64; 2], f64, f64) {
    let scale = (1u64 << 53) as f64;
    let m = ((1.0 + beta_target) / 3.0 * scale).round() as i64;
    let z1 = m as f64 / scale;
    let beta = (3 * m - (1i64 << 53)) as f64 / scale;
    let gamma = ((1i64 << 54) - 3 * m) as f64 / scale;
    ([z1, 1.0 - z1], beta, gamma)
}

#[test]
fn beta_within_1e_minus_12_of_zero_and_of_one() {
    let k = [2.0, 0.5];
    for target in [
        1e-12,
        3e-12,
        1e-9,
        1e-6,
        1.0 - 1e-6,
        1.0 - 1e-9,
        1.0 - 3e-12,
        1.0 - 1e-12,
    ] {
        let (z, beta, gamma) = exact_binary(target);
        assert_eq!(z[0] + z[1], 1.0);
        let s = rachford_rice(&z, &k).unwrap();
        assert_eq!(s.phase, Phase::TwoPhase, "target {target}");
        // F(0) = z₁ − z₂/2 is a cancelling sum of O(1) terms, so β is known to a few ε
        // absolute, not relative (A/D ≈ 1 here): the absolute error is the claim.
        let kappa = conditioning(&z, &k, beta);
        assert!(
            (s.vapour_fraction - beta).abs() <= 4.0 * EPS * (kappa + beta),
            "β = {:e}, exact {beta:e}",
            s.vapour_fraction
        );
        assert!(
            (s.liquid_fraction - gamma).abs() <= 4.0 * EPS * (kappa + gamma),
            "1 − β = {:e}, exact {gamma:e}",
            s.liquid_fraction
        );
        check_split(&z, &k, &s);
    }
    // Where the root near a boundary is well conditioned, it has full relative precision:
    // K = (0, 10) puts 1 − β = 10z₀/9 (derived in `non_volatile_component_is_never_all_vapour`).
    let z = [9e-13, 1.0 - 9e-13];
    let s = rachford_rice(&z, &[0.0, 10.0]).unwrap();
    let gamma = 10.0 * normalised(&z)[0] / 9.0;
    assert!((s.liquid_fraction - gamma).abs() <= 8.0 * EPS * gamma);
    // A well-conditioned tiny β: a trace of a very volatile component over a heavy one with
    // K just below 1. F(0) = 1e-27(1e15 − 1) − 1e-13 ≈ 9e-13 has no cancellation worth
    // mentioning; the volatile term saturates (1 + 1e15β), giving β ≈ 9e-15, known to full
    // relative precision (A/D ≈ 2e-14). The closed form (common practice) is evaluated in
    // 200-bit arithmetic.
    let z = [1e-27, 1.0];
    let k = [1e15, 1.0 - 1e-13];
    let s = rachford_rice(&z, &k).unwrap();
    let (beta, gamma) = binary_closed_form(z, k);
    assert_eq!(s.phase, Phase::TwoPhase);
    assert!(beta > 1e-15 && beta < 1e-14, "{beta:e}");
    assert!(
        (s.vapour_fraction - beta).abs() <= 8.0 * EPS * beta,
        "β = {:e}, closed form {beta:e}",
        s.vapour_fraction
    );
    assert!((s.liquid_fraction - gamma).abs() <= EPS);
    check_split(&z, &k, &s);
}

#[test]
fn negative_flash_against_the_binary_closed_form() {
    let nf = Options { negative_flash: true };
    // Subcooled: z = (½, ½), K = (1.5, 0.2), t = (½, −0.8): β = −(0.25 − 0.4)/(−0.4) = −0.375,
    // inside the pole window (1/(1 − 1.5), 1/(1 − 0.2)) = (−2, 1.25) (common practice).
    let s = rachford_rice_with(&[0.5, 0.5], &[1.5, 0.2], nf).unwrap();
    assert_eq!(s.phase, Phase::Liquid);
    assert!((s.vapour_fraction + 0.375).abs() <= 4.0 * EPS, "{}", s.vapour_fraction);
    assert!((s.liquid_fraction - 1.375).abs() <= 4.0 * EPS);
    // Superheated: z = (½, ½), K = (5, 0.9), t = (4, −0.1): β = −(2 − 0.05)/(−0.4) = 4.875, in
    // (−0.25, 10).
    let s = rachford_rice_with(&[0.5, 0.5], &[5.0, 0.9], nf).unwrap();
    assert_eq!(s.phase, Phase::Vapour);
    assert!((s.vapour_fraction - 4.875).abs() <= 16.0 * EPS, "{}", s.vapour_fraction);
    assert!((s.liquid_fraction + 3.875).abs() <= 16.0 * EPS);
    let (x, y) = (xs(&s), ys(&s));
    for i in 0..2 {
        assert!((s.liquid_fraction * x[i] + s.vapour_fraction * y[i] - 0.5).abs() <= 1e-14);
    }
    // Random binaries on both sides, against the 200-bit closed form.
    for (z, k) in [
        ([0.3, 0.7], [1.2, 0.01]),
        ([0.9, 0.1], [3.0, 0.99]),
        ([0.01, 0.99], [1e6, 1e-6]),
        ([0.5, 0.5], [1e15, 0.5]),
        // Superheated, the root (β ≈ 6e8) far from the pole (β₊ ≈ 1e12): found by a random
        // run, when the denominators were written from the pole and cancelled there.
        (
            [0.9993832121965781, 0.000616787803421836],
            [0.999999999999, 203601381.1750209],
        ),
    ] {
        let plain = rachford_rice(&z, &k).unwrap();
        let s = rachford_rice_with(&z, &k, nf).unwrap();
        let (beta, gamma) = binary_closed_form(z, k);
        if plain.phase == Phase::TwoPhase {
            assert_eq!(s, plain);
            continue;
        }
        let kappa = conditioning(&z, &k, beta);
        assert!(
            (s.vapour_fraction - beta).abs() <= 16.0 * EPS * (kappa + beta.abs()),
            "{z:?} {k:?}: β = {:e} vs {beta:e}",
            s.vapour_fraction
        );
        assert!(
            (s.liquid_fraction - gamma).abs() <= 16.0 * EPS * (kappa + gamma.abs()),
            "{z:?} {k:?}: 1 − β = {:e} vs {gamma:e}",
            s.liquid_fraction
        );
        // The material balance, relative to the size of its terms.
        let (x, y) = (xs(&s), ys(&s));
        let zn = normalised(&z);
        for i in 0..2 {
            let back = s.liquid_fraction * x[i] + s.vapour_fraction * y[i];
            let size = s.liquid_fraction.abs() * x[i] + s.vapour_fraction.abs() * y[i];
            assert!(
                (back - zn[i]).abs() <= 1e-13 * size,
                "{z:?} {k:?}: component {i}: {back:e} vs {:e}",
                zn[i]
            );
        }
    }
    // All K on one side of 1: no root in the pole window, the single-phase result.
    let s = rachford_rice_with(&[0.5, 0.5], &[3.0, 2.0], nf).unwrap();
    assert_eq!(
        (s.phase, s.vapour_fraction, s.liquid_fraction),
        (Phase::Vapour, 1.0, 0.0)
    );
    let s = rachford_rice_with(&[0.5, 0.5], &[0.5, 0.2], nf).unwrap();
    assert_eq!(
        (s.phase, s.vapour_fraction, s.liquid_fraction),
        (Phase::Liquid, 0.0, 1.0)
    );
    // A two-phase feed is unaffected by the option.
    assert_eq!(
        rachford_rice_with(&[0.5, 0.5], &[2.0, 0.5], nf).unwrap(),
        rachford_rice(&[0.5, 0.5], &[2.0, 0.5]).unwrap()
    );
}

// ---------------------------------------------------------------------------------------
// Closed forms ("published" values: only what can be cited honestly)
// ---------------------------------------------------------------------------------------

#[test]
fn symmetric_binary_splits_in_half() {
    // z = (½, ½), K = (c, 1/c): F(½) = (c − 1)/(c + 1) + (1 − c)/(1 + c) = 0, so β = ½ exactly
    // (derived by hand from the Rachford–Rice equation) where 1/c is exact in f64.
    for c in [2.0, 4.0, 1024.0, 2f64.powi(40)] {
        let s = rachford_rice(&[0.5, 0.5], &[c, 1.0 / c]).unwrap();
        assert!(
            (s.vapour_fraction - 0.5).abs() <= 2.0 * EPS,
            "c = {c}: {}",
            s.vapour_fraction
        );
        assert!((s.liquid_fraction - 0.5).abs() <= 2.0 * EPS);
    }
    // Elsewhere 1/c is rounded, and near c = 1 that moves the root by ε/(c − 1)² (the
    // equation's own conditioning): compare with the closed form of the rounded inputs.
    for c in [1.001, 1.5, 10.0, 1e3, 1e8, 1e15] {
        let k = [c, 1.0 / c];
        let s = rachford_rice(&[0.5, 0.5], &k).unwrap();
        let (beta, _) = binary_closed_form([0.5, 0.5], k);
        let kappa = conditioning(&[0.5, 0.5], &k, beta);
        assert!(
            (s.vapour_fraction - beta).abs() <= 8.0 * EPS * (kappa + beta),
            "c = {c}: {} vs {beta}",
            s.vapour_fraction
        );
        assert!((beta - 0.5).abs() <= 1e-10, "c = {c}: closed form {beta}");
    }
}

#[test]
fn binary_closed_form_table() {
    // Hand-picked binaries (common practice closed form, 200-bit), including the solver's
    // own module example values.
    let cases = [
        ([0.4, 0.6], [2.5, 0.3]),
        ([0.5, 0.5], [2.0, 0.5]),
        ([0.1, 0.9], [20.0, 0.8]),
        ([0.9, 0.1], [1.2, 0.01]),
        ([0.51, 0.49], [1.05, 0.95]),
        ([0.5004, 0.4996], [1.001, 0.999]),
    ];
    for (z, k) in cases {
        let s = rachford_rice(&z, &k).unwrap();
        assert_eq!(s.phase, Phase::TwoPhase, "{z:?} {k:?}");
        let (beta, gamma) = binary_closed_form(z, k);
        let kappa = conditioning(&z, &k, beta);
        assert!(
            (s.vapour_fraction - beta).abs() <= 8.0 * EPS * (kappa + beta),
            "{z:?} {k:?}: {:e} vs {beta:e}",
            s.vapour_fraction
        );
        assert!((s.liquid_fraction - gamma).abs() <= 8.0 * EPS * (kappa + gamma));
        check_split(&z, &k, &s);
    }
}

// ---------------------------------------------------------------------------------------
// Errors: one test per variant, each message naming the field and the value
// ---------------------------------------------------------------------------------------

#[test]
fn error_empty() {
    let e = rachford_rice(&[], &[]).unwrap_err();
    assert_eq!(e, RachfordRiceError::Empty);
    assert!(e.to_string().starts_with("z:"), "{e}");
}

#[test]
fn error_length_mismatch() {
    let e = rachford_rice(&[0.5, 0.5], &[2.0]).unwrap_err();
    assert_eq!(e, RachfordRiceError::LengthMismatch { z_len: 2, k_len: 1 });
    let m = e.to_string();
    assert!(m.starts_with("K:") && m.contains('1') && m.contains('2'), "{m}");
    // Output buffers of the wrong length in solve_into.
    let (mut x, mut y) = ([0.0; 1], [0.0; 2]);
    let e = solve_into(&[0.5, 0.5], &[2.0, 0.5], Options::default(), &mut x, &mut y).unwrap_err();
    assert!(
        matches!(e, RachfordRiceError::LengthMismatch { z_len: 2, k_len: 1 }),
        "{e:?}"
    );
}

#[test]
fn error_not_finite_in_z() {
    let e = rachford_rice(&[0.5, f64::NAN], &[2.0, 0.5]).unwrap_err();
    assert!(
        matches!(e, RachfordRiceError::NotFinite { field: "z", index: 1, value } if value.is_nan()),
        "{e:?}"
    );
    assert_eq!(e.to_string(), "z[1]: value NaN is not finite");
    let e = rachford_rice(&[f64::INFINITY, 0.5], &[2.0, 0.5]).unwrap_err();
    assert_eq!(e.to_string(), "z[0]: value inf is not finite");
}

#[test]
fn error_not_finite_in_k() {
    let e = rachford_rice(&[0.5, 0.5], &[2.0, f64::INFINITY]).unwrap_err();
    assert_eq!(
        e,
        RachfordRiceError::NotFinite {
            field: "K",
            index: 1,
            value: f64::INFINITY
        }
    );
    assert_eq!(e.to_string(), "K[1]: value inf is not finite");
    let e = rachford_rice(&[0.5, 0.5], &[f64::NEG_INFINITY, 0.5]).unwrap_err();
    assert_eq!(e.to_string(), "K[0]: value -inf is not finite");
}

#[test]
fn error_negative_mole_fraction() {
    let e = rachford_rice(&[0.6, -0.1, 0.5], &[2.0, 1.0, 0.5]).unwrap_err();
    assert_eq!(e, RachfordRiceError::NegativeMoleFraction { index: 1, value: -0.1 });
    assert_eq!(e.to_string(), "z[1]: mole fraction -0.1 is negative");
}

#[test]
fn error_mole_fraction_sum() {
    let e = rachford_rice(&[0.5, 0.6], &[2.0, 0.5]).unwrap_err();
    assert!(
        matches!(e, RachfordRiceError::MoleFractionSum { sum } if (sum - 1.1).abs() < 1e-15),
        "{e:?}"
    );
    let m = e.to_string();
    assert!(m.starts_with("z:") && m.contains("1.1"), "{m}");
    // Just outside the tolerance is refused too; all zeros sum to 0.
    assert!(rachford_rice(&[0.5, 0.5 + 2e-6], &[2.0, 0.5]).is_err());
    assert!(
        matches!(rachford_rice(&[0.0, 0.0], &[2.0, 0.5]), Err(RachfordRiceError::MoleFractionSum { sum }) if sum == 0.0)
    );
}

#[test]
fn error_negative_k_value() {
    let e = rachford_rice(&[0.5, 0.5], &[2.0, -0.5]).unwrap_err();
    assert_eq!(e, RachfordRiceError::NegativeKValue { index: 1, value: -0.5 });
    assert_eq!(e.to_string(), "K[1]: K-value -0.5 is negative");
}

#[test]
fn sums_within_tolerance_are_normalised() {
    // Σz = 1 + 5e-7 is within 1e-6: the split is that of z/Σz.
    assert_eq!(MOLE_FRACTION_SUM_TOLERANCE, 1e-6);
    let z = [0.3 + 5e-7, 0.4, 0.3];
    let k = [3.0, 1.2, 0.2];
    let total = validate(&z, &k).unwrap();
    assert!((total - (1.0 + 5e-7)).abs() < 1e-15);
    let s = rachford_rice(&z, &k).unwrap();
    let zn = normalised(&z);
    let t = rachford_rice(&zn, &k).unwrap();
    assert!((s.vapour_fraction - t.vapour_fraction).abs() <= 8.0 * EPS);
    for i in 0..3 {
        assert!((xs(&s)[i] - xs(&t)[i]).abs() <= 8.0 * EPS * xs(&t)[i]);
    }
    check_split(&z, &k, &s);
    // Σz = 1 − 9e-7 as well.
    let z = [0.3 - 9e-7, 0.4, 0.3];
    check_split(&z, &k, &rachford_rice(&z, &k).unwrap());
}

// ---------------------------------------------------------------------------------------
// Batch API
// ---------------------------------------------------------------------------------------

/// Rows of random feeds (n = 7), some single-phase, with zero-feed and K = 0 components, and
/// with bad rows at known places.
fn batch_inputs(rows: usize) -> (Array2<f64>, Array2<f64>, Vec<usize>) {
    let n = 7;
    let mut z = Array2::zeros((rows, n));
    let mut k = Array2::zeros((rows, n));
    for r in 0..rows {
        let (zr, kr) = pseudo_random_feed(n, 1000 + r as u64);
        for c in 0..n {
            z[[r, c]] = zr[c];
            k[[r, c]] = kr[c];
        }
        if r % 11 == 3 {
            // A zero-feed component with K = 0, and a non-volatile one.
            let moved = z[[r, 0]];
            z[[r, 0]] = 0.0;
            z[[r, 1]] += moved;
            k[[r, 0]] = 0.0;
            k[[r, 2]] = 0.0;
        }
    }
    let bad = vec![5, 17, 18, rows - 1];
    z[[5, 2]] = f64::NAN;
    k[[17, 6]] = -1.0;
    z[[18, 0]] += 0.5;
    z[[rows - 1, 3]] = -z[[rows - 1, 3]];
    (z, k, bad)
}

/// Field-by-field equality of two batch outputs, with errors compared through Debug (NaN).
fn assert_same(a: &BatchOutput, b: &BatchOutput) {
    assert_eq!(
        a.vapour_fraction.iter().map(|v| v.to_bits()).collect::<Vec<_>>(),
        b.vapour_fraction.iter().map(|v| v.to_bits()).collect::<Vec<_>>()
    );
    assert_eq!(
        a.liquid_fraction.iter().map(|v| v.to_bits()).collect::<Vec<_>>(),
        b.liquid_fraction.iter().map(|v| v.to_bits()).collect::<Vec<_>>()
    );
    assert_eq!(a.x, b.x);
    assert_eq!(a.y, b.y);
    assert_eq!(a.phase, b.phase);
    assert_eq!(a.iterations, b.iterations);
    assert_eq!(format!("{:?}", a.errors), format!("{:?}", b.errors));
}

/// One row solved alone: the summary or error, x and y.
type RowResult = (Result<SplitSummary, RachfordRiceError>, Vec<f64>, Vec<f64>);

fn one_by_one(z: &Array2<f64>, k: &Array2<f64>, options: Options) -> Vec<RowResult> {
    (0..z.nrows())
        .map(|r| {
            let zr = z.row(r).to_vec();
            let kr = k.row(r).to_vec();
            let (mut x, mut y) = (vec![0.0; zr.len()], vec![0.0; zr.len()]);
            let s = solve_into(&zr, &kr, options, &mut x, &mut y);
            (s, x, y)
        })
        .collect()
}

fn assert_batch_matches(out: &BatchOutput, expected: &[RowResult]) {
    for (r, (s, x, y)) in expected.iter().enumerate() {
        match s {
            Ok(s) => {
                assert_eq!(out.errors[r], None, "row {r}");
                assert_eq!(out.phase[r], Some(s.phase), "row {r}");
                assert_eq!(out.vapour_fraction[r].to_bits(), s.vapour_fraction.to_bits(), "row {r}");
                assert_eq!(out.liquid_fraction[r].to_bits(), s.liquid_fraction.to_bits(), "row {r}");
                assert_eq!(out.iterations[r], s.iterations, "row {r}");
                assert_eq!(out.x.row(r).to_vec(), *x, "row {r}");
                assert_eq!(out.y.row(r).to_vec(), *y, "row {r}");
            }
            Err(e) => {
                // Compared through Debug: a NotFinite error may carry NaN, which is not equal to itself.
                assert_eq!(format!("{:?}", out.errors[r]), format!("{:?}", Some(e)), "row {r}");
                assert_eq!(out.phase[r], None);
                assert_eq!(
                    (out.vapour_fraction[r], out.liquid_fraction[r], out.iterations[r]),
                    (0.0, 0.0, 0)
                );
                assert!(
                    out.x.row(r).iter().chain(out.y.row(r).iter()).all(|v| *v == 0.0),
                    "row {r}"
                );
            }
        }
    }
    assert!(
        out.x
            .iter()
            .chain(out.y.iter())
            .chain(out.vapour_fraction.iter())
            .all(|v| v.is_finite())
    );
}

#[test]
fn batch_equals_one_by_one_and_reports_bad_rows() {
    let (z, k, bad) = batch_inputs(200);
    let mut out = BatchOutput::new(200, 7);
    let failed = solve_batch(z.view(), k.view(), &mut out).unwrap();
    assert_eq!(failed, bad.len());
    assert_eq!(out.failures().map(|(r, _)| r).collect::<Vec<_>>(), bad);
    let expected = one_by_one(&z, &k, Options::default());
    assert_batch_matches(&out, &expected);
    assert!(matches!(
        out.errors[5],
        Some(RachfordRiceError::NotFinite {
            field: "z",
            index: 2,
            ..
        })
    ));
    assert!(matches!(
        out.errors[17],
        Some(RachfordRiceError::NegativeKValue { index: 6, .. })
    ));
    assert!(matches!(
        out.errors[18],
        Some(RachfordRiceError::MoleFractionSum { .. })
    ));
    assert!(matches!(
        out.errors[199],
        Some(RachfordRiceError::NegativeMoleFraction { index: 3, .. })
    ));
    // Several phases occur.
    for phase in [Phase::TwoPhase, Phase::Liquid, Phase::Vapour] {
        assert!(out.phase.contains(&Some(phase)), "{phase:?} missing from the batch");
    }
    // With the negative flash.
    let failed = solve_batch_with(z.view(), k.view(), Options { negative_flash: true }, &mut out).unwrap();
    assert_eq!(failed, bad.len());
    assert_batch_matches(&out, &one_by_one(&z, &k, Options { negative_flash: true }));
}

#[test]
fn batch_output_is_reused_cleanly() {
    let (z, k, _) = batch_inputs(40);
    let mut out = BatchOutput::new(40, 7);
    solve_batch(z.view(), k.view(), &mut out).unwrap();
    // Repair the bad rows and solve again into the same outputs: no stale errors remain.
    let (mut z2, k2) = (z.clone(), k.map(|v| v.abs()));
    for r in 0..40 {
        let (zr, _) = pseudo_random_feed(7, 1000 + r as u64);
        for c in 0..7 {
            z2[[r, c]] = zr[c];
        }
    }
    assert_eq!(solve_batch(z2.view(), k2.view(), &mut out).unwrap(), 0);
    assert!(out.errors.iter().all(Option::is_none) && out.phase.iter().all(Option::is_some));
    assert_batch_matches(&out, &one_by_one(&z2, &k2, Options::default()));
}

#[test]
fn batch_accepts_strided_and_column_major_views() {
    let (z, k, _) = batch_inputs(60);
    let mut reference = BatchOutput::new(60, 7);
    solve_batch(z.view(), k.view(), &mut reference).unwrap();
    // Column-major copies.
    let zf = {
        let mut a = Array2::zeros((60, 7).f());
        a.assign(&z);
        a
    };
    let kf = {
        let mut a = Array2::zeros((60, 7).f());
        a.assign(&k);
        a
    };
    let mut out = BatchOutput::new(60, 7);
    solve_batch(zf.view(), kf.view(), &mut out).unwrap();
    assert_same(&out, &reference);
    // Every other column of a wider array.
    let mut wide_z = Array2::from_elem((60, 14), 7.0);
    let mut wide_k = Array2::from_elem((60, 14), -7.0);
    wide_z.slice_mut(s![.., ..;2]).assign(&z);
    wide_k.slice_mut(s![.., ..;2]).assign(&k);
    let mut out = BatchOutput::new(60, 7);
    solve_batch(wide_z.slice(s![.., ..;2]), wide_k.slice(s![.., ..;2]), &mut out).unwrap();
    assert_same(&out, &reference);
    // Column-major outputs.
    let mut out = BatchOutput::new(60, 7);
    out.x = Array2::zeros((60, 7).f());
    out.y = Array2::zeros((60, 7).f());
    solve_batch(z.view(), k.view(), &mut out).unwrap();
    assert_same(&out, &reference);
}

#[test]
fn batch_shape_errors_leave_outputs_untouched() {
    let (z, k, _) = batch_inputs(30);
    let mut out = BatchOutput::new(30, 7);
    let before = format!("{out:?}");
    let e = solve_batch(z.view(), k.slice(s![.., ..6]), &mut out).unwrap_err();
    assert_eq!(
        e,
        BatchShapeError::Matrix {
            field: "K",
            rows: 30,
            columns: 7,
            found_rows: 30,
            found_columns: 6
        }
    );
    assert_eq!(e.to_string(), "K: shape 30×6, expected 30×7 (the shape of z)");
    let e = solve_batch(z.view(), k.view(), &mut BatchOutput::new(29, 7)).unwrap_err();
    assert!(
        matches!(
            e,
            BatchShapeError::Matrix {
                field: "out.x",
                found_rows: 29,
                ..
            }
        ),
        "{e:?}"
    );
    let mut short = BatchOutput::new(30, 7);
    short.phase.pop();
    let e = solve_batch(z.view(), k.view(), &mut short).unwrap_err();
    assert_eq!(
        e,
        BatchShapeError::Rows {
            field: "out.phase",
            rows: 30,
            found: 29
        }
    );
    assert_eq!(e.to_string(), "out.phase: length 29, expected 30 (one per row of z)");
    assert_eq!(format!("{out:?}"), before);
}

#[test]
fn batch_with_no_rows_or_no_components() {
    let z = Array2::<f64>::zeros((0, 4));
    let mut out = BatchOutput::new(0, 4);
    assert_eq!(solve_batch(z.view(), z.view(), &mut out), Ok(0));
    let z = Array2::<f64>::zeros((3, 0));
    let mut out = BatchOutput::new(3, 0);
    assert_eq!(solve_batch(z.view(), z.view(), &mut out), Ok(3));
    assert!(out.errors.iter().all(|e| *e == Some(RachfordRiceError::Empty)));
}

#[cfg(feature = "rayon")]
#[test]
fn parallel_batch_equals_serial_batch() {
    use flashduty::rachford_rice::{par_solve_batch, par_solve_batch_with};
    let (z, k, bad) = batch_inputs(1000);
    let mut serial = BatchOutput::new(1000, 7);
    let mut parallel = BatchOutput::new(1000, 7);
    assert_eq!(solve_batch(z.view(), k.view(), &mut serial), Ok(bad.len()));
    assert_eq!(par_solve_batch(z.view(), k.view(), &mut parallel), Ok(bad.len()));
    assert_same(&parallel, &serial);
    assert_batch_matches(&parallel, &one_by_one(&z, &k, Options::default()));
    let nf = Options { negative_flash: true };
    assert_eq!(solve_batch_with(z.view(), k.view(), nf, &mut serial), Ok(bad.len()));
    assert_eq!(
        par_solve_batch_with(z.view(), k.view(), nf, &mut parallel),
        Ok(bad.len())
    );
    assert_same(&parallel, &serial);
    // Strided inputs in parallel as well.
    let mut wide_z = Array2::from_elem((1000, 14), 7.0);
    let mut wide_k = Array2::from_elem((1000, 14), -7.0);
    wide_z.slice_mut(s![.., ..;2]).assign(&z);
    wide_k.slice_mut(s![.., ..;2]).assign(&k);
    assert_eq!(
        par_solve_batch_with(
            wide_z.slice(s![.., ..;2]),
            wide_k.slice(s![.., ..;2]),
            nf,
            &mut parallel
        ),
        Ok(bad.len())
    );
    assert_same(&parallel, &serial);
    assert!(par_solve_batch(z.view(), k.view(), &mut BatchOutput::new(999, 7)).is_err());
}

/// K-values near the top of the f64 range (1e307 and 1.7e308) and near its bottom (1e-307)
/// still give the closed-form root of a binary: no intermediate overflows. Closed form as
/// in `binary_closed_form` (common practice), in 200-bit arithmetic.
#[test]
fn k_values_at_the_ends_of_the_f64_range() {
    for (z, k) in [
        ([1e-300, 1.0 - 1e-300], [1e307, 0.5]),
        ([0.3, 0.7], [1.7e308, 1e-307]),
        ([0.5, 0.5], [1.7e308, 0.25]),
    ] {
        let s = rachford_rice(&z, &k).unwrap();
        check_split(&z, &k, &s);
        if s.phase == Phase::TwoPhase {
            let (beta, gamma) = binary_closed_form(z, k);
            assert!(
                (s.vapour_fraction - beta).abs() <= 16.0 * EPS * beta,
                "{z:?} {k:?}: {} vs {beta}",
                s.vapour_fraction
            );
            assert!(
                (s.liquid_fraction - gamma).abs() <= 16.0 * EPS * gamma,
                "{z:?} {k:?}: {} vs {gamma}",
                s.liquid_fraction
            );
        }
    }
}
