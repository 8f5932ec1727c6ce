//! The NRTL equation (H. Renon and J. M. Prausnitz, AIChE J. 14 (1968) 135–144).
//!
//! ln γᵢ = Σⱼ τⱼᵢ Gⱼᵢ xⱼ / Σₖ Gₖᵢ xₖ + Σⱼ [xⱼ Gᵢⱼ / Σₖ Gₖⱼ xₖ] (τᵢⱼ − Σₘ xₘ τₘⱼ Gₘⱼ / Σₖ Gₖⱼ xₖ),
//! with τᵢⱼ = bᵢⱼ / RT (bᵢⱼ = gᵢⱼ − gⱼⱼ, held here in kelvin as bᵢⱼ / R), Gᵢⱼ = exp(−αᵢⱼ τᵢⱼ),
//! τᵢᵢ = 0, αᵢⱼ = αⱼᵢ.
//!
//! Pros: fits strongly non-ideal and partly miscible systems (water with alcohols, ketones,
//! esters); three parameters a pair. Cons: the third (α) is usually fixed by rule (0.3 is
//! common practice), and the fitted b's are correlated.

// The sums are written with indices as the papers write them (i, j, k over components).
#![allow(clippy::needless_range_loop)]

/// ln γᵢ and ∂ln γᵢ/∂T of NRTL at `t_k` and `x` into `ln_gamma` and `slope`.
/// `b_k[i * n + j]` = bᵢⱼ / R (K), `alpha[i * n + j]` = αᵢⱼ.
pub(crate) fn ln_gamma(
    t_k: f64,
    x: &[f64],
    b_k: &[f64],
    alpha: &[f64],
    ln_gamma: &mut [f64],
    slope: &mut [f64],
    scratch: &mut Vec<f64>,
) {
    let n = x.len();
    scratch.clear();
    scratch.resize(4 * n * n + 4 * n, 0.0);
    let (tau, rest) = scratch.split_at_mut(n * n);
    let (dtau, rest) = rest.split_at_mut(n * n);
    let (g, rest) = rest.split_at_mut(n * n);
    let (dg, rest) = rest.split_at_mut(n * n);
    let (d, rest) = rest.split_at_mut(n);
    let (dd, rest) = rest.split_at_mut(n);
    let (num, dnum) = rest.split_at_mut(n);
    for idx in 0..n * n {
        tau[idx] = b_k[idx] / t_k;
        dtau[idx] = -b_k[idx] / (t_k * t_k);
        g[idx] = (-alpha[idx] * tau[idx]).exp();
        dg[idx] = -alpha[idx] * dtau[idx] * g[idx];
    }
    // For each j: Dⱼ = Σₖ Gₖⱼ xₖ, Nⱼ = Σₘ xₘ τₘⱼ Gₘⱼ, and their T-derivatives.
    for j in 0..n {
        for k in 0..n {
            let kj = k * n + j;
            d[j] += g[kj] * x[k];
            dd[j] += dg[kj] * x[k];
            num[j] += x[k] * tau[kj] * g[kj];
            dnum[j] += x[k] * (dtau[kj] * g[kj] + tau[kj] * dg[kj]);
        }
    }
    for i in 0..n {
        let mut value = num[i] / d[i];
        let mut derivative = (dnum[i] * d[i] - num[i] * dd[i]) / (d[i] * d[i]);
        for j in 0..n {
            let ij = i * n + j;
            let ratio = g[ij] / d[j];
            let dratio = (dg[ij] * d[j] - g[ij] * dd[j]) / (d[j] * d[j]);
            let mean = num[j] / d[j];
            let dmean = (dnum[j] * d[j] - num[j] * dd[j]) / (d[j] * d[j]);
            value += x[j] * ratio * (tau[ij] - mean);
            derivative += x[j] * (dratio * (tau[ij] - mean) + ratio * (dtau[ij] - dmean));
        }
        ln_gamma[i] = value;
        slope[i] = derivative;
    }
}
