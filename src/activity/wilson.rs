//! The Wilson equation (G. M. Wilson, J. Am. Chem. Soc. 86 (1964) 127–130).
//!
//! ln γᵢ = 1 − ln Σⱼ xⱼ Λᵢⱼ − Σₖ xₖ Λₖᵢ / Σⱼ xⱼ Λₖⱼ, with Λᵢⱼ = (Vⱼ / Vᵢ) exp(−aᵢⱼ / RT),
//! Λᵢᵢ = 1, aᵢⱼ = λᵢⱼ − λᵢᵢ an energy held here in kelvin (aᵢⱼ / R).
//!
//! Pros: two parameters a pair, multicomponent from binaries alone, good for alcohols with
//! hydrocarbons. Cons: it cannot give two liquid phases (it never predicts a split, so it
//! must not be used where one forms).

// The sums are written with indices as the papers write them (i, j, k over components).
#![allow(clippy::needless_range_loop)]

/// ln γᵢ and ∂ln γᵢ/∂T of the Wilson equation at `t_k` and `x` into `ln_gamma` and `slope`.
/// `a_k[i * n + j]` = aᵢⱼ / R (K), `ln_v[i * n + j]` = ln(Vⱼ / Vᵢ).
pub(crate) fn ln_gamma(
    t_k: f64,
    x: &[f64],
    a_k: &[f64],
    ln_v: &[f64],
    ln_gamma: &mut [f64],
    slope: &mut [f64],
    scratch: &mut Vec<f64>,
) {
    let n = x.len();
    scratch.clear();
    scratch.resize(2 * n * n + 2 * n, 0.0);
    let (lambda, rest) = scratch.split_at_mut(n * n);
    let (dlambda, rest) = rest.split_at_mut(n * n);
    let (s, ds) = rest.split_at_mut(n);
    // Λᵢⱼ and dΛᵢⱼ/dT = Λᵢⱼ aᵢⱼ / T².
    for idx in 0..n * n {
        lambda[idx] = (ln_v[idx] - a_k[idx] / t_k).exp();
        dlambda[idx] = lambda[idx] * a_k[idx] / (t_k * t_k);
    }
    // Sᵢ = Σⱼ xⱼ Λᵢⱼ, S'ᵢ = Σⱼ xⱼ Λ'ᵢⱼ.
    for i in 0..n {
        for j in 0..n {
            s[i] += x[j] * lambda[i * n + j];
            ds[i] += x[j] * dlambda[i * n + j];
        }
    }
    for i in 0..n {
        let mut sum = 0.0;
        let mut dsum = 0.0;
        for k in 0..n {
            sum += x[k] * lambda[k * n + i] / s[k];
            dsum += x[k] * (dlambda[k * n + i] * s[k] - lambda[k * n + i] * ds[k]) / (s[k] * s[k]);
        }
        ln_gamma[i] = 1.0 - s[i].ln() - sum;
        slope[i] = -ds[i] / s[i] - dsum;
    }
}
