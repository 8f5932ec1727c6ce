//! The Rachford–Rice solver against plain bisection and Brent's method (`roots` crate).
//!
//! Feeds: 1000 deterministic random two-phase feeds per size n = 2, 5, 10, 20, 50 (z from a
//! flat Dirichlet draw, K log-uniform in 0.01..100, redrawn until F(0) > 0 > F(1)). Each
//! benchmark iteration solves the next feed of the set, so criterion's per-iteration time
//! is the time of one solve averaged over the set. All three write x and y into
//! preallocated buffers; only ours validates and normalises its input.
//!
//! Tolerances: ours stops when its step is below 2ε relative, when G is down to round-off,
//! or when the observed convergence rate puts the error after the step below ε/4 relative;
//! bisection stops when its bracket is below 2ε relative to the midpoint; Brent stops when
//! its bracket is below 2ε relative (plus 1e-300 absolute).
//!
//! After the runs a table of per-solve medians (criterion's median estimate) and ratios is
//! printed, read back from criterion's `estimates.json` files.
//!
//! Columns: "our it" is [`SplitSummary::iterations`] (evaluations after the set-up pass,
//! whose values at β = ½ also supply the first Halley step),
//! "our evals" counts every evaluation of F or G, phase tests included
//! ([`SplitSummary::evaluations`]; F(0), F(½) and F(1) are made in the one set-up pass);
//! bisection and Brent count evaluations of F (the `roots` implementation re-evaluates F at
//! the bracket ends on every iteration).
//!
//! Run: `cargo bench --bench rachford_rice` (about a minute).
//!
//! [`SplitSummary::iterations`]: flashduty::rachford_rice::SplitSummary::iterations
//! [`SplitSummary::evaluations`]: flashduty::rachford_rice::SplitSummary::evaluations

use std::hint::black_box;
use std::path::PathBuf;
use std::time::Duration;

use criterion::Criterion;
use flashduty::rachford_rice::{Options, solve_into, three_phase_split};
use roots::{Convergency, find_root_brent};

#[path = "../tests/common/rng.rs"]
mod rng;
use rng::Rng;

const FEEDS: usize = 1000;
const SIZES: [usize; 5] = [2, 5, 10, 20, 50];
const METHODS: [&str; 3] = ["ours", "bisection", "brent"];

struct Feed {
    z: Vec<f64>,
    k: Vec<f64>,
}

fn feeds(n: usize, seed: u64) -> Vec<Feed> {
    let mut rng = Rng(seed);
    let mut out = Vec::with_capacity(FEEDS);
    while out.len() < FEEDS {
        let mut z: Vec<f64> = (0..n).map(|_| -(1.0 - rng.uniform()).ln() + 1e-300).collect();
        let sum: f64 = z.iter().sum();
        z.iter_mut().for_each(|v| *v /= sum);
        let k: Vec<f64> = (0..n)
            .map(|_| (rng.uniform() * 2.0 - 1.0) * 2.0)
            .map(|e| 10f64.powf(e))
            .collect();
        let f0: f64 = z.iter().zip(&k).map(|(z, k)| z * (k - 1.0)).sum();
        let f1: f64 = z.iter().zip(&k).map(|(z, k)| z * (k - 1.0) / k).sum();
        if f0 > 0.0 && f1 < 0.0 {
            out.push(Feed { z, k });
        }
    }
    out
}

/// F(β) = Σ zᵢ(Kᵢ − 1)/(1 + β(Kᵢ − 1)).
#[inline]
fn rr(z: &[f64], k: &[f64], beta: f64) -> f64 {
    let mut f = 0.0;
    for i in 0..z.len() {
        let t = k[i] - 1.0;
        f += z[i] * t / (1.0 + beta * t);
    }
    f
}

fn write(z: &[f64], k: &[f64], beta: f64, x: &mut [f64], y: &mut [f64]) {
    for i in 0..z.len() {
        x[i] = z[i] / (1.0 + beta * (k[i] - 1.0));
        y[i] = k[i] * x[i];
    }
}

/// Plain bisection on F over (0, 1); returns β and the number of evaluations.
fn bisection(z: &[f64], k: &[f64], x: &mut [f64], y: &mut [f64]) -> (f64, u32) {
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    let mut evaluations = 0;
    loop {
        let mid = 0.5 * (lo + hi);
        if hi - lo <= 2.0 * f64::EPSILON * mid {
            break;
        }
        let f = rr(z, k, mid);
        evaluations += 1;
        if f > 0.0 {
            lo = mid;
        } else if f < 0.0 {
            hi = mid;
        } else {
            lo = mid;
            hi = mid;
        }
    }
    let beta = 0.5 * (lo + hi);
    write(z, k, beta, x, y);
    (beta, evaluations)
}

/// Brent's stopping rule matched to ours: bracket below 2ε relative.
struct Relative;

impl Convergency<f64> for Relative {
    fn is_root_found(&mut self, y: f64) -> bool {
        y == 0.0
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 2.0 * f64::EPSILON * x1.abs().max(x2.abs()) + 1e-300
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= 200
    }
}

/// Brent's method from the `roots` crate on F over [0, 1]; returns β and the evaluations.
fn brent(z: &[f64], k: &[f64], x: &mut [f64], y: &mut [f64]) -> (f64, u32) {
    let mut evaluations = 0;
    let beta = find_root_brent(
        0.0,
        1.0,
        |b| {
            evaluations += 1;
            rr(z, k, b)
        },
        &mut Relative,
    )
    .unwrap_or(f64::NAN);
    write(z, k, beta, x, y);
    (beta, evaluations)
}

fn mean(v: impl Iterator<Item = f64>) -> f64 {
    let (s, n) = v.fold((0.0, 0usize), |(s, n), x| (s + x, n + 1));
    s / n as f64
}

/// The directory criterion writes to: `target/criterion` beside this executable
/// (target/release/deps/rachford_rice-…).
fn criterion_dir() -> PathBuf {
    if let Some(home) = std::env::var_os("CRITERION_HOME") {
        return PathBuf::from(home);
    }
    let exe = std::env::current_exe().unwrap_or_default();
    exe.ancestors()
        .nth(3)
        .map(|t| t.join("criterion"))
        .unwrap_or_else(|| PathBuf::from("target/criterion"))
}

/// Criterion's median estimate (ns per iteration, here per solve) for one benchmark.
fn median_ns(group: &str, method: &str) -> Option<f64> {
    let path = criterion_dir()
        .join(group)
        .join(method)
        .join("new")
        .join("estimates.json");
    let text = std::fs::read_to_string(path).ok()?;
    let v: serde_json::Value = serde_json::from_str(&text).ok()?;
    v["median"]["point_estimate"].as_f64()
}

fn main() {
    let mut c = Criterion::default()
        .output_directory(&criterion_dir())
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2))
        .sample_size(50)
        .configure_from_args();
    let mut stats = Vec::new();
    for (si, &n) in SIZES.iter().enumerate() {
        let set = feeds(n, 0xBE4C_0000 + si as u64);
        let (mut x, mut y) = (vec![0.0; n], vec![0.0; n]);

        // Iteration counts and agreement, outside the timing.
        let mut ours_it = Vec::new();
        let mut ours_ev = Vec::new();
        let mut bis_ev = Vec::new();
        let mut brent_ev = Vec::new();
        let mut worst_diff: f64 = 0.0;
        for f in &set {
            let s = solve_into(&f.z, &f.k, Options::default(), &mut x, &mut y).expect("valid feed");
            ours_it.push(f64::from(s.iterations));
            ours_ev.push(f64::from(s.evaluations));
            let (b1, e1) = bisection(&f.z, &f.k, &mut x, &mut y);
            let (b2, e2) = brent(&f.z, &f.k, &mut x, &mut y);
            bis_ev.push(f64::from(e1));
            brent_ev.push(f64::from(e2));
            worst_diff = worst_diff
                .max((s.vapour_fraction - b1).abs())
                .max((s.vapour_fraction - b2).abs());
        }
        stats.push((
            n,
            mean(ours_it.iter().copied()),
            ours_it.iter().copied().fold(0.0, f64::max),
            mean(ours_ev.into_iter()),
            mean(bis_ev.into_iter()),
            mean(brent_ev.into_iter()),
            worst_diff,
        ));

        let mut group = c.benchmark_group(format!("rachford_rice_n{n}"));
        let mut i = 0;
        group.bench_function("ours", |b| {
            b.iter(|| {
                i = (i + 1) % FEEDS;
                let f = &set[i];
                black_box(solve_into(black_box(&f.z), black_box(&f.k), Options::default(), &mut x, &mut y).ok())
            })
        });
        group.bench_function("bisection", |b| {
            b.iter(|| {
                i = (i + 1) % FEEDS;
                let f = &set[i];
                black_box(bisection(black_box(&f.z), black_box(&f.k), &mut x, &mut y))
            })
        });
        group.bench_function("brent", |b| {
            b.iter(|| {
                i = (i + 1) % FEEDS;
                let f = &set[i];
                black_box(brent(black_box(&f.z), black_box(&f.k), &mut x, &mut y))
            })
        });
        group.finish();
    }
    // The three-phase split against the two-phase solver on the same feeds (n = 10): the
    // first component is taken as water (absent from the organic liquid, the only member
    // of the aqueous one), the rest as insoluble organics.
    let set = feeds(10, 0xBE4C_3000);
    let three: Vec<(Vec<f64>, Vec<f64>)> = set
        .iter()
        .map(|f| {
            let mut ko = f.k.clone();
            ko[0] = f64::INFINITY;
            let mut ka = vec![f64::INFINITY; f.k.len()];
            ka[0] = f.k[0];
            (ko, ka)
        })
        .collect();
    let (mut x, mut y) = (vec![0.0; 10], vec![0.0; 10]);
    let mut group = c.benchmark_group("three_phase_n10");
    let mut i = 0;
    group.bench_function("two_phase", |b| {
        b.iter(|| {
            i = (i + 1) % FEEDS;
            let f = &set[i];
            black_box(solve_into(black_box(&f.z), black_box(&f.k), Options::default(), &mut x, &mut y).ok())
        })
    });
    group.bench_function("three_phase", |b| {
        b.iter(|| {
            i = (i + 1) % FEEDS;
            let (ko, ka) = &three[i];
            black_box(three_phase_split(black_box(&set[i].z), black_box(ko), black_box(ka)).ok())
        })
    });
    group.finish();
    c.final_summary();
    if let (Some(two), Some(three)) = (
        median_ns("three_phase_n10", "two_phase"),
        median_ns("three_phase_n10", "three_phase"),
    ) {
        println!(
            "three-phase split, n = 10: {three:.1} ns against {two:.1} ns for the two-phase solver ({:.1}x)",
            three / two
        );
    }

    println!();
    println!("Per-solve medians over {FEEDS} two-phase feeds (K log-uniform in 0.01..100):");
    println!(
        "{:>4} {:>10} {:>12} {:>10} {:>9} {:>9} | {:>8} {:>8} {:>9} {:>11} {:>11} {:>10}",
        "n",
        "ours ns",
        "bisection ns",
        "brent ns",
        "bis/ours",
        "brent/ours",
        "our it",
        "max it",
        "our evals",
        "bis. evals",
        "brent evals",
        "max |Δβ|"
    );
    for (n, it, max_it, ev, bis, br, diff) in stats {
        let group = format!("rachford_rice_n{n}");
        let m: Vec<Option<f64>> = METHODS.iter().map(|m| median_ns(&group, m)).collect();
        let show = |v: Option<f64>| v.map_or("-".to_string(), |v| format!("{v:.1}"));
        let ratio = |a: Option<f64>, b: Option<f64>| match (a, b) {
            (Some(a), Some(b)) => format!("{:.2}", a / b),
            _ => "-".to_string(),
        };
        println!(
            "{:>4} {:>10} {:>12} {:>10} {:>9} {:>9} | {:>8.2} {:>8} {:>9.2} {:>11.1} {:>11.1} {:>10.1e}",
            n,
            show(m[0]),
            show(m[1]),
            show(m[2]),
            ratio(m[1], m[0]),
            ratio(m[2], m[0]),
            it,
            max_it,
            ev,
            bis,
            br,
            diff
        );
    }
}
