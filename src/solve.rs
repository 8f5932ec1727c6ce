//! One-dimensional root finding, the one bracketed solver of the crate (the flash searches,
//! the duty-specified flash, the peaks and crossings of the uniqueness check): Newton's method
//! inside a bracket, the secant through the last two points where the function gives no
//! slope, bisection whenever a step would leave the bracket, and a hard cap. (The
//! Rachford–Rice solver has its own specialised Halley iteration; the Antoine fit minimises,
//! with argmin's Brent optimiser.)

/// What a bracketed search found.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Root {
    /// The root.
    pub x: f64,
    /// Steps taken.
    pub iterations: u32,
    /// Function evaluations.
    pub evaluations: u32,
}

/// The hard cap on steps. With bisection on every step that Newton cannot take, 200 steps
/// shrink any finite bracket below the spacing of floats.
const MAX_STEPS: u32 = 200;

/// Finds the root of an increasing function `f` (returning value and slope) in
/// `[lo, hi]`, given `f(lo) <= 0 <= f(hi)`, starting from `x0`. Stops when the step is
/// below `x_tol` or the bracket is narrower than `x_tol`. Always terminates.
///
/// A slope of NaN means "not known": the step is then the secant's through the last two
/// points evaluated (from the second evaluation on; the first step bisects), under the same
/// safeguards. A function that gives its slope is solved exactly as by plain Newton.
pub(crate) fn bracketed_newton(
    mut f: impl FnMut(f64) -> (f64, f64),
    mut lo: f64,
    mut hi: f64,
    x0: f64,
    x_tol: f64,
) -> Root {
    let mut x = if x0 > lo && x0 < hi { x0 } else { 0.5 * (lo + hi) };
    let mut iterations = 0;
    let mut evaluations = 0;
    let mut previous: Option<(f64, f64)> = None;
    while iterations < MAX_STEPS {
        let (v, mut dv) = f(x);
        evaluations += 1;
        iterations += 1;
        if v == 0.0 {
            break;
        }
        if dv.is_nan() {
            dv = previous.map_or(f64::NAN, |(px, pv)| (v - pv) / (x - px));
            previous = Some((x, v));
        }
        if v < 0.0 {
            lo = x;
        } else {
            hi = x;
        }
        let newton = x - v / dv;
        let usable = dv > 0.0 && newton.is_finite();
        if usable && (newton - x).abs() <= x_tol {
            // Converged; the step may round onto the bracket end just moved to x.
            x = newton.clamp(lo, hi);
            break;
        }
        let next = if usable && newton > lo && newton < hi {
            newton
        } else {
            0.5 * (lo + hi)
        };
        if hi - lo <= x_tol || next <= lo || next >= hi {
            x = next.clamp(lo, hi);
            break;
        }
        x = next;
    }
    Root {
        x,
        iterations,
        evaluations,
    }
}

/// A sign-change bracket of an increasing function, with its values at the ends.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Bracket {
    /// Low end, where f <= 0.
    pub lo: f64,
    /// High end, where f >= 0.
    pub hi: f64,
    /// f(lo).
    pub f_lo: f64,
    /// f(hi).
    pub f_hi: f64,
}

impl Bracket {
    /// The root of the straight line through the two ends (the midpoint where that is not
    /// defined): a good first guess for a function that is nearly linear in its variable.
    pub fn secant(&self) -> f64 {
        let x = self.lo - self.f_lo * (self.hi - self.lo) / (self.f_hi - self.f_lo);
        if x.is_finite() && x > self.lo && x < self.hi {
            x
        } else {
            0.5 * (self.lo + self.hi)
        }
    }
}

/// Widens `[lo, hi]` geometrically (factor `grow` on each side's distance from the
/// other) until `f(lo) <= 0 <= f(hi)` for an increasing `f`, keeping inside
/// `[min, max]`. Returns the bracket, or `None` if `f` does not change sign within
/// `[min, max]`.
pub(crate) fn expand_bracket(
    mut f: impl FnMut(f64) -> f64,
    mut lo: f64,
    mut hi: f64,
    min: f64,
    max: f64,
) -> Option<Bracket> {
    lo = lo.clamp(min, max);
    hi = hi.clamp(min, max);
    if lo > hi {
        std::mem::swap(&mut lo, &mut hi);
    }
    let mut f_lo = f(lo);
    let mut f_hi = f(hi);
    for _ in 0..100 {
        if f_lo.is_nan() || f_hi.is_nan() {
            return None;
        }
        if f_lo <= 0.0 && f_hi >= 0.0 {
            return Some(Bracket { lo, hi, f_lo, f_hi });
        }
        let width = (hi - lo).max(1e-3 * hi.abs().max(1.0));
        if f_lo > 0.0 {
            if lo <= min {
                return None;
            }
            hi = lo;
            f_hi = f_lo;
            lo = (lo - width).max(min);
            f_lo = f(lo);
        } else {
            if hi >= max {
                return None;
            }
            lo = hi;
            f_lo = f_hi;
            hi = (hi + width).min(max);
            f_hi = f(hi);
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_cube_root() {
        let r = bracketed_newton(|x| (x * x * x - 2.0, 3.0 * x * x), 0.0, 2.0, 1.0, 1e-14);
        assert!((r.x - 2f64.cbrt()).abs() < 1e-14);
        assert!(r.iterations < 10);
    }

    #[test]
    fn without_a_slope_it_takes_secant_steps() {
        let cube = |x: f64| (x * x * x - 2.0, f64::NAN);
        let r = bracketed_newton(cube, 0.0, 2.0, 1.0, 1e-14);
        assert!((r.x - 2f64.cbrt()).abs() < 1e-13, "{}", r.x);
        assert!(r.iterations < 15, "{}", r.iterations);
        // A jump: the secant steps leave the bracket and bisection takes over.
        let r = bracketed_newton(|x| (if x < 0.3 { -1.0 } else { 1.0 }, f64::NAN), 0.0, 1.0, 0.9, 1e-12);
        assert!((r.x - 0.3).abs() < 1e-11, "{}", r.x);
    }

    #[test]
    fn survives_a_flat_function() {
        // Zero slope everywhere but a jump: bisection must still converge.
        let r = bracketed_newton(|x| (if x < 0.3 { -1.0 } else { 1.0 }, 0.0), 0.0, 1.0, 0.9, 1e-12);
        assert!((r.x - 0.3).abs() < 1e-11, "{}", r.x);
    }

    #[test]
    fn expands_and_gives_up() {
        let b = expand_bracket(|x| x - 10.0, 0.0, 1.0, -100.0, 100.0).unwrap();
        assert!(b.lo <= 10.0 && b.hi >= 10.0);
        assert!(b.secant() >= b.lo && b.secant() <= b.hi);
        let line = Bracket {
            lo: 0.0,
            hi: 4.0,
            f_lo: -1.0,
            f_hi: 3.0,
        };
        assert_eq!(line.secant(), 1.0);
        let flat = Bracket {
            lo: 0.0,
            hi: 4.0,
            f_lo: 0.0,
            f_hi: 0.0,
        };
        assert_eq!(flat.secant(), 2.0);
        assert!(expand_bracket(|x| x - 1000.0, 0.0, 1.0, -100.0, 100.0).is_none());
        assert!(expand_bracket(|_| f64::NAN, 0.0, 1.0, -100.0, 100.0).is_none());
    }
}
