//! Sensitivities of a two-phase T–P flash: dβ/dT, dβ/dP and the slopes of each
//! component's vapour amount, from the implicit-function theorem.
//!
//! For composition-independent K-values the Rachford–Rice equation alone gives them in
//! closed form. Where K depends on the phase compositions, the equilibrium conditions
//! gᵢ = ln yᵢ − ln xᵢ − ln Kᵢ(T, P, x, y) = 0 in the vapour amounts vᵢ (per mole of feed)
//! are differentiated in full: J dv/dT = ∂ln K/∂T and J dv/dP = ∂ln K/∂P, with
//! Jᵢⱼ = δᵢⱼ (1/vᵢ + 1/lᵢ) − 1/β − 1/(1 − β) − Σₖ ∂ln Kᵢ/∂xₖ ∂xₖ/∂vⱼ − Σₖ ∂ln Kᵢ/∂yₖ ∂yₖ/∂vⱼ,
//! ∂xₖ/∂vⱼ = (xₖ − δₖⱼ)/(1 − β), ∂yₖ/∂vⱼ = (δₖⱼ − yₖ)/β, solved by Gaussian elimination with
//! partial pivoting (n is small). Both reduce to the same numbers when K does not depend on
//! composition.

use super::flash::SolvedFlash;
use super::kvalue::{KValueModel, KValues};
use super::spec::Sensitivity;
use crate::rachford_rice::Phase;

/// dβ/dT and dβ/dP of a two-phase state with vapour fraction `beta` (`liquid_fraction`
/// = 1 − β) and K-values `kv`, from the implicit-function theorem on the Rachford–Rice
/// equation; `None` where a derivative overflows (pressures near the smallest float).
pub(crate) fn sensitivity(z: &[f64], kv: &KValues, beta: f64, liquid_fraction: f64) -> Option<Sensitivity> {
    let (mut f_beta, mut f_t, mut f_p) = (0.0, 0.0, 0.0);
    for (i, &zi) in z.iter().enumerate() {
        let k = kv.k[i];
        let d = liquid_fraction + beta * k;
        // zᵢ/dᵢ² times (Kᵢ − 1)² or Kᵢ, written with ratios to d so that huge K cannot
        // overflow.
        let (zd, q, kd) = (zi / d, (k - 1.0) / d, k / d);
        f_beta -= zd * d * q * q;
        f_t += zd * kd * kv.dln_k_dt[i];
        f_p += zd * kd * kv.dln_k_dp[i];
    }
    let s = Sensitivity {
        dvapour_fraction_dt_per_k: if f_beta < 0.0 { -f_t / f_beta } else { 0.0 },
        dvapour_fraction_dp_per_pa: if f_beta < 0.0 { -f_p / f_beta } else { 0.0 },
    };
    (s.dvapour_fraction_dt_per_k.is_finite() && s.dvapour_fraction_dp_per_pa.is_finite()).then_some(s)
}

/// dβ/dT and dβ/dP of a two-phase state solved by [`super::flash_into`] for `model`, with
/// the K-values and compositions in `solved`: the closed form for composition-independent
/// models, the full linear system otherwise. `None` unless two-phase, or where a derivative
/// is not finite.
pub(crate) fn state_sensitivity<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    solved: &SolvedFlash,
) -> Option<Sensitivity> {
    let state = &solved.state;
    if state.phase != Phase::TwoPhase {
        return None;
    }
    if !model.is_composition_dependent() {
        return sensitivity(z, &solved.kv, state.beta, state.liquid_fraction);
    }
    let n = z.len();
    let (mut dv_dt, mut dv_dp) = (vec![0.0; n], vec![0.0; n]);
    if !amount_slopes(model, z, solved, &mut dv_dt, &mut dv_dp) {
        return None;
    }
    let s = Sensitivity {
        dvapour_fraction_dt_per_k: dv_dt.iter().sum(),
        dvapour_fraction_dp_per_pa: dv_dp.iter().sum(),
    };
    (s.dvapour_fraction_dt_per_k.is_finite() && s.dvapour_fraction_dp_per_pa.is_finite()).then_some(s)
}

/// Writes dvᵢ/dT (1/K) and dvᵢ/dP (1/Pa) of a two-phase state into `dv_dt` and `dv_dp`,
/// vᵢ = β yᵢ being component i's vapour per mole of feed; returns `false` (slopes zeroed)
/// where they cannot be formed (a singular system, a slope that is not finite). The closed
/// form for composition-independent models; the linear system of the module docs otherwise.
pub(crate) fn amount_slopes<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    solved: &SolvedFlash,
    dv_dt: &mut [f64],
    dv_dp: &mut [f64],
) -> bool {
    let state = &solved.state;
    dv_dt.iter_mut().for_each(|d| *d = 0.0);
    dv_dp.iter_mut().for_each(|d| *d = 0.0);
    if state.phase != Phase::TwoPhase {
        return true;
    }
    let (beta, lf, kv) = (state.beta, state.liquid_fraction, &solved.kv);
    let ok = if model.is_composition_dependent() {
        coupled_slopes(model, z, solved, dv_dt, dv_dp)
    } else {
        let Some(s) = sensitivity(z, kv, beta, lf) else {
            return false;
        };
        for (i, &zi) in z.iter().enumerate() {
            let k = kv.k[i];
            let d = lf + beta * k;
            let w = (zi / d) * (k / d);
            dv_dt[i] = w * (s.dvapour_fraction_dt_per_k + beta * lf * kv.dln_k_dt[i]);
            dv_dp[i] = w * (s.dvapour_fraction_dp_per_pa + beta * lf * kv.dln_k_dp[i]);
        }
        true
    };
    let ok = ok && dv_dt.iter().chain(dv_dp.iter()).all(|d| d.is_finite());
    if !ok {
        dv_dt.iter_mut().for_each(|d| *d = 0.0);
        dv_dp.iter_mut().for_each(|d| *d = 0.0);
    }
    ok
}

/// The linear system of the module docs, for a composition-dependent model.
fn coupled_slopes<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    solved: &SolvedFlash,
    dv_dt: &mut [f64],
    dv_dp: &mut [f64],
) -> bool {
    let (n, state) = (z.len(), &solved.state);
    let (beta, lf) = (state.beta, state.liquid_fraction);
    let (x, y, kv): (&[f64], &[f64], &KValues) = (&solved.x, &solved.y, &solved.kv);
    let (mut dx, mut dy) = (vec![0.0; n * n], vec![0.0; n * n]);
    model.composition_derivatives(state.t, state.p, x, y, &mut dx, &mut dy);
    // Components present in both phases; the others' amounts do not move.
    let active: Vec<usize> = (0..n)
        .filter(|&i| {
            z[i] > 0.0
                && x[i] > 0.0
                && y[i] > 0.0
                && (1.0 / (beta * y[i])).is_finite()
                && (1.0 / (lf * x[i])).is_finite()
        })
        .collect();
    let m = active.len();
    if m == 0 {
        return true;
    }
    // Σₖ ∂ln Kᵢ/∂xₖ xₖ and Σₖ ∂ln Kᵢ/∂yₖ yₖ.
    let sx: Vec<f64> = (0..n).map(|i| (0..n).map(|k| dx[i * n + k] * x[k]).sum()).collect();
    let sy: Vec<f64> = (0..n).map(|i| (0..n).map(|k| dy[i * n + k] * y[k]).sum()).collect();
    let mut a = vec![0.0; m * m];
    let mut b = vec![0.0; m * 2];
    for (r, &i) in active.iter().enumerate() {
        for (c, &j) in active.iter().enumerate() {
            let mut v = -1.0 / beta - 1.0 / lf - sx[i] / lf + dx[i * n + j] / lf - dy[i * n + j] / beta + sy[i] / beta;
            if i == j {
                v += 1.0 / (beta * y[i]) + 1.0 / (lf * x[i]);
            }
            a[r * m + c] = v;
        }
        b[r * 2] = kv.dln_k_dt[i];
        b[r * 2 + 1] = kv.dln_k_dp[i];
    }
    if !solve_dense(&mut a, &mut b, m, 2) {
        return false;
    }
    for (r, &i) in active.iter().enumerate() {
        dv_dt[i] = b[r * 2];
        dv_dp[i] = b[r * 2 + 1];
    }
    true
}

/// Solves A X = B in place (A is m × m, B is m × r, both row-major; X overwrites B) by
/// Gaussian elimination with partial pivoting; `false` for a singular or non-finite A.
fn solve_dense(a: &mut [f64], b: &mut [f64], m: usize, r: usize) -> bool {
    for col in 0..m {
        let pivot = (col..m)
            .max_by(|&p, &q| a[p * m + col].abs().total_cmp(&a[q * m + col].abs()))
            .unwrap_or(col);
        let pv = a[pivot * m + col];
        if pv == 0.0 || !pv.is_finite() {
            return false;
        }
        if pivot != col {
            for k in 0..m {
                a.swap(col * m + k, pivot * m + k);
            }
            for k in 0..r {
                b.swap(col * r + k, pivot * r + k);
            }
        }
        for row in col + 1..m {
            let f = a[row * m + col] / pv;
            if f == 0.0 {
                continue;
            }
            for k in col..m {
                a[row * m + k] -= f * a[col * m + k];
            }
            for k in 0..r {
                b[row * r + k] -= f * b[col * r + k];
            }
        }
    }
    for col in (0..m).rev() {
        for k in 0..r {
            let mut v = b[col * r + k];
            for j in col + 1..m {
                v -= a[col * m + j] * b[j * r + k];
            }
            b[col * r + k] = v / a[col * m + col];
        }
    }
    b.iter().all(|v| v.is_finite())
}

#[cfg(test)]
mod tests {
    use super::solve_dense;

    #[test]
    fn dense_solve_with_pivoting() {
        // [[0, 2], [1, 1]] x = [[4, 2], [3, 1]]: x = [[1, 0], [2, 1]] (checked by hand).
        let mut a = vec![0.0, 2.0, 1.0, 1.0];
        let mut b = vec![4.0, 2.0, 3.0, 1.0];
        assert!(solve_dense(&mut a, &mut b, 2, 2));
        assert_eq!(b, vec![1.0, 0.0, 2.0, 1.0]);
        let mut singular = vec![1.0, 1.0, 1.0, 1.0];
        assert!(!solve_dense(&mut singular, &mut [1.0, 2.0], 2, 1));
    }
}
