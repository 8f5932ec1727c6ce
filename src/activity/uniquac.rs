//! The UNIQUAC equation (D. S. Abrams and J. M. Prausnitz, AIChE J. 21 (1975) 116–128).
//!
//! ln γᵢ = ln γᵢᶜ + ln γᵢᴿ, with the combinatorial part
//! ln γᵢᶜ = ln(Φᵢ/xᵢ) + (z/2) qᵢ ln(θᵢ/Φᵢ) + lᵢ − (Φᵢ/xᵢ) Σⱼ xⱼ lⱼ and the residual part
//! ln γᵢᴿ = qᵢ [1 − ln Σⱼ θⱼ τⱼᵢ − Σⱼ θⱼ τᵢⱼ / Σₖ θₖ τₖⱼ],
//! where Φᵢ = rᵢxᵢ / Σ rⱼxⱼ, θᵢ = qᵢxᵢ / Σ qⱼxⱼ, lᵢ = (z/2)(rᵢ − qᵢ) − (rᵢ − 1), z = 10,
//! τᵢⱼ = exp(−uᵢⱼ / RT) with uᵢⱼ = Uᵢⱼ − Uⱼⱼ held here in kelvin (uᵢⱼ / R).
//!
//! Pros: two parameters a pair with a size-and-shape part from the pure components (r, q),
//! so fewer data fit it; liquid–liquid capable. Cons: needs r and q for every component.

// The sums are written with indices as the papers write them (i, j, k over components).
#![allow(clippy::needless_range_loop)]

/// The lattice coordination number z of the combinatorial part (Abrams–Prausnitz).
const COORDINATION: f64 = 10.0;

/// ln γᵢ and ∂ln γᵢ/∂T of UNIQUAC at `t_k` and `x` into `ln_gamma` and `slope`.
/// `u_k[i * n + j]` = uᵢⱼ / R (K); `r`, `q` the volume and area parameters.
#[allow(clippy::too_many_arguments)]
pub(crate) fn ln_gamma(
    t_k: f64,
    x: &[f64],
    u_k: &[f64],
    r: &[f64],
    q: &[f64],
    ln_gamma: &mut [f64],
    slope: &mut [f64],
    scratch: &mut Vec<f64>,
) {
    let n = x.len();
    scratch.clear();
    scratch.resize(2 * n * n + 4 * n, 0.0);
    let (tau, rest) = scratch.split_at_mut(n * n);
    let (dtau, rest) = rest.split_at_mut(n * n);
    let (l, rest) = rest.split_at_mut(n);
    let (theta, rest) = rest.split_at_mut(n);
    let (s, ds) = rest.split_at_mut(n);
    let half_z = COORDINATION / 2.0;
    let sum_r: f64 = x.iter().zip(r).map(|(x, r)| x * r).sum();
    let sum_q: f64 = x.iter().zip(q).map(|(x, q)| x * q).sum();
    for i in 0..n {
        l[i] = half_z * (r[i] - q[i]) - (r[i] - 1.0);
    }
    let sum_xl: f64 = x.iter().zip(l.iter()).map(|(x, l)| x * l).sum();
    for i in 0..n {
        theta[i] = q[i] * x[i] / sum_q;
    }
    for idx in 0..n * n {
        tau[idx] = (-u_k[idx] / t_k).exp();
        dtau[idx] = tau[idx] * u_k[idx] / (t_k * t_k);
    }
    // Sⱼ = Σₖ θₖ τₖⱼ and S'ⱼ.
    for j in 0..n {
        for k in 0..n {
            s[j] += theta[k] * tau[k * n + j];
            ds[j] += theta[k] * dtau[k * n + j];
        }
    }
    for i in 0..n {
        // Φᵢ/xᵢ and θᵢ/Φᵢ without dividing by xᵢ (finite at xᵢ = 0).
        let phi_over_x = r[i] / sum_r;
        let theta_over_phi = q[i] * sum_r / (r[i] * sum_q);
        let combinatorial = phi_over_x.ln() + half_z * q[i] * theta_over_phi.ln() + l[i] - phi_over_x * sum_xl;
        let (mut sum, mut dsum) = (0.0, 0.0);
        for j in 0..n {
            let ij = i * n + j;
            sum += theta[j] * tau[ij] / s[j];
            dsum += theta[j] * (dtau[ij] * s[j] - tau[ij] * ds[j]) / (s[j] * s[j]);
        }
        ln_gamma[i] = combinatorial + q[i] * (1.0 - s[i].ln() - sum);
        slope[i] = q[i] * (-ds[i] / s[i] - dsum);
    }
}
