//! Linear least squares by Householder QR on column-scaled matrices (never the normal
//! equations).

use ndarray::{Array1, Array2};

/// Solves min ‖A x − y‖₂ by Householder QR of the column-scaled A. Returns `None` when a
/// column is zero or A is numerically rank deficient.
pub(super) fn least_squares(mut a: Array2<f64>, mut y: Array1<f64>) -> Option<Array1<f64>> {
    let (m, n) = a.dim();
    if n == 0 || m < n || y.len() != m {
        return None;
    }
    // Column scaling: every column to unit 2-norm.
    let mut scale = vec![0.0; n];
    for (j, sj) in scale.iter_mut().enumerate() {
        let mut col = a.column_mut(j);
        let big = col.iter().fold(0.0f64, |acc, v| acc.max(v.abs()));
        if !(big.is_finite() && big > 0.0) {
            return None;
        }
        let norm = big * col.iter().map(|v| (v / big) * (v / big)).sum::<f64>().sqrt();
        col.mapv_inplace(|v| v / norm);
        *sj = norm;
    }
    // Householder triangularisation, applying each reflector to y as well.
    let mut v = vec![0.0; m];
    for k in 0..n {
        // (The `s!` slicing macro cannot be used: it expands to code the crate forbids.)
        let len = m - k;
        for (vi, xi) in v[..len].iter_mut().zip(a.column(k).iter().skip(k)) {
            *vi = *xi;
        }
        let norm = v[..len].iter().map(|t| t * t).sum::<f64>().sqrt();
        if norm == 0.0 {
            return None;
        }
        let alpha = if v[0] > 0.0 { -norm } else { norm };
        v[0] -= alpha;
        let vtv: f64 = v[..len].iter().map(|t| t * t).sum();
        if vtv > 0.0 {
            for j in k..n {
                let dot: f64 = (0..len).map(|i| v[i] * a[[k + i, j]]).sum();
                let f = 2.0 * dot / vtv;
                for i in 0..len {
                    a[[k + i, j]] -= f * v[i];
                }
            }
            let dot: f64 = (0..len).map(|i| v[i] * y[k + i]).sum();
            let f = 2.0 * dot / vtv;
            for i in 0..len {
                y[k + i] -= f * v[i];
            }
        }
    }
    // Rank check on R's diagonal (the columns have unit norm, so |R_kk| <= 1).
    let rmax = (0..n).fold(0.0f64, |acc, k| acc.max(a[[k, k]].abs()));
    if (0..n).any(|k| a[[k, k]].abs() <= 1e-13 * rmax) {
        return None;
    }
    // Back substitution R z = (Qᵀ y)[..n], then undo the scaling.
    let mut z = Array1::<f64>::zeros(n);
    for k in (0..n).rev() {
        let mut sum = y[k];
        for j in k + 1..n {
            sum -= a[[k, j]] * z[j];
        }
        z[k] = sum / a[[k, k]];
    }
    for (zk, sk) in z.iter_mut().zip(&scale) {
        *zk /= sk;
    }
    z.iter().all(|v| v.is_finite()).then_some(z)
}

// ---------------------------------------------------------------------------------------
// Antoine
