//! The batch form over `ndarray` rows, serial and (feature `rayon`) parallel.

use super::api::{Options, Phase, RachfordRiceError, SplitSummary, solve_into};

#[cfg(feature = "rayon")]
use ndarray::Axis;
use ndarray::{Array1, Array2, ArrayView1, ArrayView2, ArrayViewMut1, ArrayViewMut2};

/// Preallocated outputs of [`solve_batch`]: entry or row `r` belongs to feed `r`.
///
/// A row that fails validation keeps zeros in every numeric output, `None` as its phase
/// and its error in [`errors`](Self::errors); the other rows are unaffected. For a solved
/// row, x and y are as written by [`solve_into`] (for a single-phase feed one of them is the
/// incipient phase, not normalised).
///
/// ```
/// use flashduty::rachford_rice::{solve_batch, BatchOutput, Phase};
/// use ndarray::array;
/// let z = array![[0.5, 0.5], [0.5, 0.5]];
/// let k = array![[2.0, 0.5], [0.5, 0.2]];
/// let mut out = BatchOutput::new(2, 2);
/// assert_eq!(solve_batch(z.view(), k.view(), &mut out), Ok(0));
/// assert_eq!(out.phase, vec![Some(Phase::TwoPhase), Some(Phase::Liquid)]);
/// assert!((out.vapour_fraction[0] - 0.5).abs() < 1e-15);
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct BatchOutput {
    /// β per row (0 for a failed row).
    pub vapour_fraction: Array1<f64>,
    /// 1 − β per row, computed without cancellation (0 for a failed row).
    pub liquid_fraction: Array1<f64>,
    /// Liquid mole fractions, one row per feed.
    pub x: Array2<f64>,
    /// Vapour mole fractions, one row per feed.
    pub y: Array2<f64>,
    /// The phase per row; `None` for a failed row.
    pub phase: Vec<Option<Phase>>,
    /// Iterations per row (see [`SplitSummary::iterations`]).
    pub iterations: Array1<u32>,
    /// The validation error per row; `None` for a solved row.
    pub errors: Vec<Option<RachfordRiceError>>,
}

impl BatchOutput {
    /// Outputs for `rows` feeds of `n` components, zero-filled.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchOutput;
    /// let out = BatchOutput::new(3, 4);
    /// assert_eq!(out.x.dim(), (3, 4));
    /// assert_eq!(out.errors.len(), 3);
    /// ```
    pub fn new(rows: usize, n: usize) -> Self {
        Self {
            vapour_fraction: Array1::zeros(rows),
            liquid_fraction: Array1::zeros(rows),
            x: Array2::zeros((rows, n)),
            y: Array2::zeros((rows, n)),
            phase: vec![None; rows],
            iterations: Array1::zeros(rows),
            errors: vec![None; rows],
        }
    }

    /// The number of feeds (rows) these outputs hold.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchOutput;
    /// assert_eq!(BatchOutput::new(3, 4).rows(), 3);
    /// ```
    pub fn rows(&self) -> usize {
        self.x.nrows()
    }

    /// The number of components (columns) these outputs hold.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchOutput;
    /// assert_eq!(BatchOutput::new(3, 4).components(), 4);
    /// ```
    pub fn components(&self) -> usize {
        self.x.ncols()
    }

    /// The failed rows with their errors, in row order.
    ///
    /// ```
    /// use flashduty::rachford_rice::{solve_batch, BatchOutput, RachfordRiceError};
    /// use ndarray::array;
    /// let z = array![[0.5, 0.5], [0.5, -0.5]];
    /// let k = array![[2.0, 0.5], [2.0, 0.5]];
    /// let mut out = BatchOutput::new(2, 2);
    /// assert_eq!(solve_batch(z.view(), k.view(), &mut out), Ok(1));
    /// let failures: Vec<_> = out.failures().collect();
    /// assert_eq!(failures.len(), 1);
    /// assert_eq!(failures[0].0, 1);
    /// assert!(matches!(failures[0].1, RachfordRiceError::NegativeMoleFraction { index: 1, .. }));
    /// ```
    pub fn failures(&self) -> impl Iterator<Item = (usize, &RachfordRiceError)> + '_ {
        self.errors
            .iter()
            .enumerate()
            .filter_map(|(row, e)| e.as_ref().map(|e| (row, e)))
    }

    pub(super) fn rows_mut(&mut self) -> BatchRows<'_> {
        BatchRows {
            vapour_fraction: self.vapour_fraction.view_mut(),
            liquid_fraction: self.liquid_fraction.view_mut(),
            x: self.x.view_mut(),
            y: self.y.view_mut(),
            phase: &mut self.phase,
            iterations: self.iterations.view_mut(),
            errors: &mut self.errors,
        }
    }

    pub(super) fn check_shape(&self, rows: usize, n: usize) -> Result<(), BatchShapeError> {
        for (field, found) in [("out.x", self.x.dim()), ("out.y", self.y.dim())] {
            if found != (rows, n) {
                return Err(BatchShapeError::Matrix {
                    field,
                    rows,
                    columns: n,
                    found_rows: found.0,
                    found_columns: found.1,
                });
            }
        }
        for (field, found) in [
            ("out.vapour_fraction", self.vapour_fraction.len()),
            ("out.liquid_fraction", self.liquid_fraction.len()),
            ("out.phase", self.phase.len()),
            ("out.iterations", self.iterations.len()),
            ("out.errors", self.errors.len()),
        ] {
            if found != rows {
                return Err(BatchShapeError::Rows { field, rows, found });
            }
        }
        Ok(())
    }
}

/// Arrays of mismatched shape given to [`solve_batch`]: nothing was solved.
///
/// ```
/// use flashduty::rachford_rice::{solve_batch, BatchOutput, BatchShapeError};
/// use ndarray::array;
/// let z = array![[0.5, 0.5]];
/// let k = array![[2.0, 0.5, 0.1]];
/// let err = solve_batch(z.view(), k.view(), &mut BatchOutput::new(1, 2)).unwrap_err();
/// assert!(matches!(err, BatchShapeError::Matrix { field: "K", .. }));
/// assert_eq!(err.to_string(), "K: shape 1×3, expected 1×2 (the shape of z)");
/// ```
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum BatchShapeError {
    /// K, `out.x` or `out.y` is not shaped like z.
    #[error("{field}: shape {found_rows}×{found_columns}, expected {rows}×{columns} (the shape of z)")]
    Matrix {
        /// "K", "out.x" or "out.y".
        field: &'static str,
        /// Rows of z.
        rows: usize,
        /// Columns (components) of z.
        columns: usize,
        /// Rows found.
        found_rows: usize,
        /// Columns found.
        found_columns: usize,
    },
    /// A per-row output is not as long as z has rows.
    #[error("{field}: length {found}, expected {rows} (one per row of z)")]
    Rows {
        /// The output field, e.g. "out.phase".
        field: &'static str,
        /// Rows of z.
        rows: usize,
        /// Length found.
        found: usize,
    },
}

impl BatchShapeError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::rachford_rice::BatchShapeError;
    /// assert_eq!(BatchShapeError::Rows { field: "out.phase", rows: 2, found: 3 }.kind(), "rows");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            BatchShapeError::Matrix { .. } => "matrix",
            BatchShapeError::Rows { .. } => "rows",
        }
    }
}

/// Solves the Rachford–Rice equation for every row of `z` (feeds) with the K-values in the
/// same row of `k`, writing into the preallocated `out` without allocating per row.
///
/// Every row is solved exactly as [`solve_into`] would solve it. A row that fails
/// validation is reported in `out.errors` and zero-filled; the other rows are solved.
/// Returns the number of failed rows.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`; then `out` is untouched.
///
/// ```
/// use flashduty::rachford_rice::{solve_batch, BatchOutput, Phase};
/// use ndarray::array;
/// let z = array![[0.3, 0.4, 0.3], [0.3, 0.4, 0.3]];
/// let k = array![[3.0, 1.2, 0.2], [3.0, f64::NAN, 0.2]];
/// let mut out = BatchOutput::new(2, 3);
/// assert_eq!(solve_batch(z.view(), k.view(), &mut out), Ok(1));
/// assert_eq!(out.phase[0], Some(Phase::TwoPhase));
/// assert!(out.errors[1].is_some());
/// assert_eq!(out.vapour_fraction[1], 0.0);
/// ```
pub fn solve_batch(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    solve_batch_with(z, k, Options::default(), out)
}

/// [`solve_batch`] with options.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`.
///
/// ```
/// use flashduty::rachford_rice::{solve_batch_with, BatchOutput, Options};
/// use ndarray::array;
/// let z = array![[0.5, 0.5]];
/// let k = array![[1.5, 0.2]];
/// let mut out = BatchOutput::new(1, 2);
/// solve_batch_with(z.view(), k.view(), Options { negative_flash: true }, &mut out).unwrap();
/// assert!(out.vapour_fraction[0] < 0.0);
/// ```
pub fn solve_batch_with(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    options: Options,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    check_batch_shapes(z, k, out)?;
    Ok(solve_rows(z, k, options, out.rows_mut()))
}

/// [`solve_batch`] with the rows shared among the threads of the current rayon pool. The
/// results are identical to [`solve_batch`]'s.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`.
///
/// ```
/// use flashduty::rachford_rice::{par_solve_batch, solve_batch, BatchOutput};
/// use ndarray::Array2;
/// let z = Array2::from_shape_fn((500, 2), |(r, c)| if c == 0 { r as f64 / 500.0 } else { 1.0 - r as f64 / 500.0 });
/// let k = Array2::from_shape_fn((500, 2), |(_, c)| if c == 0 { 2.0 } else { 0.5 });
/// let (mut a, mut b) = (BatchOutput::new(500, 2), BatchOutput::new(500, 2));
/// par_solve_batch(z.view(), k.view(), &mut a).unwrap();
/// solve_batch(z.view(), k.view(), &mut b).unwrap();
/// assert_eq!(a, b);
/// ```
#[cfg(feature = "rayon")]
pub fn par_solve_batch(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    par_solve_batch_with(z, k, Options::default(), out)
}

/// [`par_solve_batch`] with options.
///
/// # Errors
/// [`BatchShapeError`] when `k` or `out` is not shaped like `z`.
///
/// ```
/// use flashduty::rachford_rice::{par_solve_batch_with, BatchOutput, Options};
/// use ndarray::array;
/// let z = array![[0.5, 0.5]];
/// let k = array![[1.5, 0.2]];
/// let mut out = BatchOutput::new(1, 2);
/// par_solve_batch_with(z.view(), k.view(), Options { negative_flash: true }, &mut out).unwrap();
/// assert!(out.vapour_fraction[0] < 0.0);
/// ```
#[cfg(feature = "rayon")]
pub fn par_solve_batch_with(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    options: Options,
    out: &mut BatchOutput,
) -> Result<usize, BatchShapeError> {
    check_batch_shapes(z, k, out)?;
    Ok(par_solve_rows(z, k, options, out.rows_mut()))
}

pub(super) fn check_batch_shapes(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    out: &BatchOutput,
) -> Result<(), BatchShapeError> {
    let (rows, n) = z.dim();
    if k.dim() != (rows, n) {
        return Err(BatchShapeError::Matrix {
            field: "K",
            rows,
            columns: n,
            found_rows: k.nrows(),
            found_columns: k.ncols(),
        });
    }
    out.check_shape(rows, n)
}

/// Rows below this many are solved on one thread.
#[cfg(feature = "rayon")]
pub(super) const PARALLEL_GRAIN: usize = 64;

#[cfg(feature = "rayon")]
pub(super) fn par_solve_rows(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    options: Options,
    out: BatchRows<'_>,
) -> usize {
    let rows = z.nrows();
    if rows <= PARALLEL_GRAIN {
        return solve_rows(z, k, options, out);
    }
    let mid = rows / 2;
    let (z_a, z_b) = z.split_at(Axis(0), mid);
    let (k_a, k_b) = k.split_at(Axis(0), mid);
    let (out_a, out_b) = out.split_at(mid);
    let (a, b) = rayon::join(
        || par_solve_rows(z_a, k_a, options, out_a),
        || par_solve_rows(z_b, k_b, options, out_b),
    );
    a + b
}

/// Mutable views of a band of rows of a [`BatchOutput`].
pub(super) struct BatchRows<'a> {
    pub(super) vapour_fraction: ArrayViewMut1<'a, f64>,
    pub(super) liquid_fraction: ArrayViewMut1<'a, f64>,
    pub(super) x: ArrayViewMut2<'a, f64>,
    pub(super) y: ArrayViewMut2<'a, f64>,
    pub(super) phase: &'a mut [Option<Phase>],
    pub(super) iterations: ArrayViewMut1<'a, u32>,
    pub(super) errors: &'a mut [Option<RachfordRiceError>],
}

impl<'a> BatchRows<'a> {
    #[cfg(feature = "rayon")]
    pub(super) fn split_at(self, mid: usize) -> (Self, Self) {
        let (vf_a, vf_b) = self.vapour_fraction.split_at(Axis(0), mid);
        let (lf_a, lf_b) = self.liquid_fraction.split_at(Axis(0), mid);
        let (x_a, x_b) = self.x.split_at(Axis(0), mid);
        let (y_a, y_b) = self.y.split_at(Axis(0), mid);
        let (ph_a, ph_b) = self.phase.split_at_mut(mid);
        let (it_a, it_b) = self.iterations.split_at(Axis(0), mid);
        let (er_a, er_b) = self.errors.split_at_mut(mid);
        (
            BatchRows {
                vapour_fraction: vf_a,
                liquid_fraction: lf_a,
                x: x_a,
                y: y_a,
                phase: ph_a,
                iterations: it_a,
                errors: er_a,
            },
            BatchRows {
                vapour_fraction: vf_b,
                liquid_fraction: lf_b,
                x: x_b,
                y: y_b,
                phase: ph_b,
                iterations: it_b,
                errors: er_b,
            },
        )
    }
}

/// Copies of one row, used only when a row of the inputs or outputs is not contiguous.
pub(super) struct RowScratch {
    pub(super) z: Vec<f64>,
    pub(super) k: Vec<f64>,
    pub(super) x: Vec<f64>,
    pub(super) y: Vec<f64>,
}

/// Solves the rows one after another; returns the number of failed rows.
pub(super) fn solve_rows(
    z: ArrayView2<'_, f64>,
    k: ArrayView2<'_, f64>,
    options: Options,
    mut out: BatchRows<'_>,
) -> usize {
    let mut scratch: Option<RowScratch> = None;
    let mut failed = 0;
    for r in 0..z.nrows() {
        let x = out.x.row_mut(r);
        let y = out.y.row_mut(r);
        match solve_row(z.row(r), k.row(r), options, x, y, &mut scratch) {
            Ok(s) => {
                out.vapour_fraction[r] = s.vapour_fraction;
                out.liquid_fraction[r] = s.liquid_fraction;
                out.phase[r] = Some(s.phase);
                out.iterations[r] = s.iterations;
                out.errors[r] = None;
            }
            Err(e) => {
                out.x.row_mut(r).fill(0.0);
                out.y.row_mut(r).fill(0.0);
                out.vapour_fraction[r] = 0.0;
                out.liquid_fraction[r] = 0.0;
                out.phase[r] = None;
                out.iterations[r] = 0;
                out.errors[r] = Some(e);
                failed += 1;
            }
        }
    }
    failed
}

pub(super) fn solve_row(
    z: ArrayView1<'_, f64>,
    k: ArrayView1<'_, f64>,
    options: Options,
    mut x: ArrayViewMut1<'_, f64>,
    mut y: ArrayViewMut1<'_, f64>,
    scratch: &mut Option<RowScratch>,
) -> Result<SplitSummary, RachfordRiceError> {
    if let (Some(zs), Some(ks)) = (z.as_slice(), k.as_slice())
        && let (Some(xs), Some(ys)) = (x.as_slice_mut(), y.as_slice_mut())
    {
        return solve_into(zs, ks, options, xs, ys);
    }
    // A strided row: solve on contiguous copies (allocated once per batch, not per row).
    let n = z.len();
    let s = scratch.get_or_insert_with(|| RowScratch {
        z: vec![0.0; n],
        k: vec![0.0; n],
        x: vec![0.0; n],
        y: vec![0.0; n],
    });
    for (dst, src) in s.z.iter_mut().zip(z.iter()) {
        *dst = *src;
    }
    for (dst, src) in s.k.iter_mut().zip(k.iter()) {
        *dst = *src;
    }
    let summary = solve_into(&s.z, &s.k, options, &mut s.x, &mut s.y)?;
    for (dst, src) in x.iter_mut().zip(&s.x) {
        *dst = *src;
    }
    for (dst, src) in y.iter_mut().zip(&s.y) {
        *dst = *src;
    }
    Ok(summary)
}
