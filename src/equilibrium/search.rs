//! The searches behind every flash specification: bubble and dew temperatures and
//! pressures, and the T–β and P–β flashes, each Newton's method inside a bracket
//! ([`crate::solve`]) on a sum that is nearly linear in its variable.

use super::flash::{SolvedFlash, SolvedState};
use super::kvalue::KValueModel;
use super::spec::{FlashError, FlashSpec, SEARCH_MAX_TEMPERATURE_K, SEARCH_MIN_TEMPERATURE_K};
use crate::rachford_rice::{self, Options, Phase};
use crate::solve::{Root, bracketed_newton, expand_bracket};

/// Relative tolerance on temperature and pressure in the searches.
const RELATIVE_TOLERANCE: f64 = 1e-13;

/// Divides `v` by its sum where that is positive (the arithmetic of [`normalised`]).
pub(super) fn normalise_in_place(v: &mut [f64]) {
    let s: f64 = v.iter().sum();
    if s > 0.0 {
        v.iter_mut().for_each(|x| *x /= s);
    }
}

pub(super) fn normalised(v: &[f64]) -> Vec<f64> {
    let s: f64 = v.iter().sum();
    if s > 0.0 {
        v.iter().map(|x| x / s).collect()
    } else {
        v.to_vec()
    }
}

pub(super) fn max_change(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(a, b)| (a - b).abs()).fold(0.0, f64::max)
}

pub(super) struct Solver<'a, M: ?Sized> {
    pub(super) model: &'a M,
    pub(super) z: &'a [f64],
    /// K-values and compositions; a solved state's x and y are written here.
    pub(super) buffers: &'a mut SolvedFlash,
    pub(super) liquid: Vec<f64>,
    pub(super) vapour: Vec<f64>,
    pub(super) evaluations: u32,
    pub(super) iterations: u32,
    pub(super) t_bracket: Option<(f64, f64)>,
    /// The (T, P) at which `kv` was last evaluated.
    pub(super) last_state: Option<(f64, f64)>,
}

/// v = −1000/T: the bubble and dew sums are nearly linear in it.
fn v_of_t(t: f64) -> f64 {
    -1000.0 / t
}
fn t_of_v(v: f64) -> f64 {
    -1000.0 / v
}

impl<M: KValueModel + ?Sized> Solver<'_, M> {
    fn k_at(&mut self, t: f64, p: f64) {
        self.model
            .k_values(t, p, &self.liquid, &self.vapour, &mut self.buffers.kv);
        self.evaluations += 1;
        self.last_state = Some((t, p));
    }

    /// K at (t, p), reusing the last evaluation when it was made there.
    fn k_at_cached(&mut self, t: f64, p: f64) {
        if self.last_state != Some((t, p)) {
            self.k_at(t, p);
        }
    }

    /// ln Σ zK and its derivatives with respect to T and ln P.
    fn bubble_sum(&mut self, t: f64, p: f64) -> (f64, f64, f64) {
        self.k_at(t, p);
        let (mut s, mut st, mut sp) = (0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            let w = self.z[i] * self.buffers.kv.k[i];
            s += w;
            st += w * self.buffers.kv.dln_k_dt[i];
            sp += w * self.buffers.kv.dln_k_dp[i] * p;
        }
        (s.ln(), st / s, sp / s)
    }

    /// −ln Σ z/K and its derivatives with respect to T and ln P.
    fn dew_sum(&mut self, t: f64, p: f64) -> (f64, f64, f64) {
        self.k_at(t, p);
        let (mut s, mut st, mut sp) = (0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            if self.z[i] == 0.0 {
                continue;
            }
            let w = self.z[i] / self.buffers.kv.k[i];
            s += w;
            st += w * self.buffers.kv.dln_k_dt[i];
            sp += w * self.buffers.kv.dln_k_dp[i] * p;
        }
        (-s.ln(), st / s, sp / s)
    }

    /// F(β) of Rachford–Rice at fixed β, and its derivatives with respect to T and ln P.
    fn rr_at(&mut self, beta: f64, t: f64, p: f64) -> (f64, f64, f64) {
        self.k_at(t, p);
        let (mut f, mut ft, mut fp) = (0.0, 0.0, 0.0);
        for i in 0..self.z.len() {
            let k = self.buffers.kv.k[i];
            let d = (1.0 - beta) + beta * k;
            let zi = self.z[i];
            f += zi * (k - 1.0) / d;
            let dk = zi / (d * d) * k;
            ft += dk * self.buffers.kv.dln_k_dt[i];
            fp += dk * self.buffers.kv.dln_k_dp[i] * p;
        }
        (f, ft, fp)
    }

    fn no_dew_point(&mut self, t: f64, p: f64, what: &'static str) -> FlashError {
        self.k_at(t, p);
        match (0..self.z.len()).find(|&i| self.z[i] > 0.0 && self.buffers.kv.k[i] == 0.0) {
            Some(i) => FlashError::NoDewPoint {
                component: self.model.component_name(i),
            },
            None => FlashError::NoSolution {
                what,
                detail: format!(
                    "no temperature between {SEARCH_MIN_TEMPERATURE_K} and {SEARCH_MAX_TEMPERATURE_K} K at {p} Pa"
                ),
            },
        }
    }

    /// Solves an increasing h(v) = 0 in v = −1000/T at pressure p.
    fn search_temperature(
        &mut self,
        p: f64,
        what: &'static str,
        mut h: impl FnMut(&mut Self, f64) -> (f64, f64),
    ) -> Result<f64, FlashError> {
        let (t_lo, t_hi) = self.model.temperature_hint(p).unwrap_or((250.0, 450.0));
        let clamp = |t: f64| t.clamp(SEARCH_MIN_TEMPERATURE_K, SEARCH_MAX_TEMPERATURE_K);
        let (v_min, v_max) = (v_of_t(SEARCH_MIN_TEMPERATURE_K), v_of_t(SEARCH_MAX_TEMPERATURE_K));
        let (v_lo, v_hi) = (v_of_t(clamp(0.99 * t_lo)), v_of_t(clamp(1.01 * t_hi)));
        let bracket = expand_bracket(|v| h(self, v).0, v_lo, v_hi, v_min, v_max);
        let Some(bracket) = bracket else {
            return Err(if what.starts_with("dew") {
                self.no_dew_point(SEARCH_MAX_TEMPERATURE_K, p, what)
            } else {
                FlashError::NoSolution {
                    what,
                    detail: format!(
                        "no temperature between {SEARCH_MIN_TEMPERATURE_K} and {SEARCH_MAX_TEMPERATURE_K} K at {p} Pa"
                    ),
                }
            });
        };
        // The sums are nearly linear in v, so the secant through the bracket's ends is close.
        let root: Root = bracketed_newton(
            |v| h(self, v),
            bracket.lo,
            bracket.hi,
            bracket.secant(),
            RELATIVE_TOLERANCE * bracket.hi.abs(),
        );
        self.iterations += root.iterations;
        Ok(t_of_v(root.x))
    }

    /// Solves an increasing h(ln P) = 0 at temperature t.
    fn search_pressure(
        &mut self,
        what: &'static str,
        guess_ln_p: f64,
        mut h: impl FnMut(&mut Self, f64) -> (f64, f64),
    ) -> Result<f64, FlashError> {
        let (lmin, lmax) = (f64::MIN_POSITIVE.ln(), f64::MAX.ln());
        // One Newton step from the guess lands on the root when h is linear in ln P.
        let (h0, s0) = h(self, guess_ln_p);
        let start = if h0.is_finite() && s0 > 0.0 {
            (guess_ln_p - h0 / s0).clamp(lmin, lmax)
        } else {
            guess_ln_p
        };
        let Some(bracket) = expand_bracket(|l| h(self, l).0, start - 1e-3, start + 1e-3, lmin, lmax) else {
            return Err(FlashError::NoSolution {
                what,
                detail: "no positive pressure satisfies it (is any component volatile?)".to_string(),
            });
        };
        let root = bracketed_newton(
            |l| h(self, l),
            bracket.lo,
            bracket.hi,
            start,
            RELATIVE_TOLERANCE * start.abs().max(1.0),
        );
        self.iterations += root.iterations;
        Ok(root.x.exp())
    }

    pub(super) fn bubble_t(&mut self, p: f64) -> Result<f64, FlashError> {
        self.search_temperature(p, "bubble temperature", |s, v| {
            let t = t_of_v(v);
            let (f, ft, _) = s.bubble_sum(t, p);
            (f, ft * t * t / 1000.0)
        })
    }

    pub(super) fn dew_t(&mut self, p: f64) -> Result<f64, FlashError> {
        self.search_temperature(p, "dew temperature", |s, v| {
            let t = t_of_v(v);
            let (f, ft, _) = s.dew_sum(t, p);
            (f, ft * t * t / 1000.0)
        })
    }

    fn bubble_p(&mut self, t: f64) -> Result<f64, FlashError> {
        self.search_pressure("bubble pressure", 1e5f64.ln(), |s, l| {
            let (f, _, fp) = s.bubble_sum(t, l.exp());
            (-f, -fp)
        })
    }

    fn dew_p(&mut self, t: f64) -> Result<f64, FlashError> {
        let p = self.search_pressure("dew pressure", 1e5f64.ln(), |s, l| {
            let (f, _, fp) = s.dew_sum(t, l.exp());
            (-f, -fp)
        });
        match p {
            Err(FlashError::NoSolution { .. }) => Err(self.no_dew_point(t, 1e5, "dew pressure")),
            other => other,
        }
    }

    /// The incipient vapour at a bubble point (x = z) or liquid at a dew point (y = z).
    fn saturated(&mut self, t: f64, p: f64, bubble: bool) -> SolvedState {
        self.k_at(t, p);
        let z = self.z;
        let b = &mut *self.buffers;
        let (copy, incipient) = if bubble {
            (&mut b.x, &mut b.y)
        } else {
            (&mut b.y, &mut b.x)
        };
        copy.copy_from_slice(z);
        for ((w, z), k) in incipient.iter_mut().zip(z).zip(&b.kv.k) {
            *w = if bubble {
                z * k
            } else if *z == 0.0 {
                0.0
            } else {
                z / k
            };
        }
        normalise_in_place(incipient);
        let (phase, beta, liquid_fraction) = if bubble {
            (Phase::Liquid, 0.0, 1.0)
        } else {
            (Phase::Vapour, 1.0, 0.0)
        };
        SolvedState {
            t,
            p,
            phase,
            beta,
            liquid_fraction,
            has_liquid: true,
            has_vapour: true,
            ..SolvedState::UNSET
        }
    }

    fn split_at(&mut self, t: f64, p: f64) -> Result<SolvedState, FlashError> {
        self.k_at(t, p);
        let b = &mut *self.buffers;
        let s = rachford_rice::solve_into(self.z, &b.kv.k, Options::default(), &mut b.x, &mut b.y)?;
        self.iterations += s.iterations;
        Ok(SolvedState {
            t,
            p,
            phase: s.phase,
            beta: s.vapour_fraction,
            liquid_fraction: s.liquid_fraction,
            has_liquid: s.phase != Phase::Vapour,
            has_vapour: s.phase != Phase::Liquid,
            ..SolvedState::UNSET
        })
    }

    /// The two-phase state at a given β, T and P (K evaluated there).
    fn at_fraction(&mut self, beta: f64, t: f64, p: f64) -> SolvedState {
        self.k_at(t, p);
        let liquid_fraction = 1.0 - beta;
        let b = &mut *self.buffers;
        for (((x, y), z), k) in b.x.iter_mut().zip(b.y.iter_mut()).zip(self.z).zip(&b.kv.k) {
            *x = z / (liquid_fraction + beta * k);
            *y = k * *x;
        }
        SolvedState {
            t,
            p,
            phase: Phase::TwoPhase,
            beta,
            liquid_fraction,
            has_liquid: true,
            has_vapour: true,
            ..SolvedState::UNSET
        }
    }

    pub(super) fn solve_frozen(&mut self, spec: FlashSpec) -> Result<SolvedState, FlashError> {
        match spec {
            FlashSpec::TemperaturePressure { temperature, pressure } => {
                self.split_at(temperature.kelvin(), pressure.pascal())
            }
            FlashSpec::BubbleTemperature { pressure } => {
                let p = pressure.pascal();
                let t = self.bubble_t(p)?;
                Ok(self.saturated(t, p, true))
            }
            FlashSpec::DewTemperature { pressure } => {
                let p = pressure.pascal();
                let t = self.dew_t(p)?;
                Ok(self.saturated(t, p, false))
            }
            FlashSpec::BubblePressure { temperature } => {
                let t = temperature.kelvin();
                let p = self.bubble_p(t)?;
                Ok(self.saturated(t, p, true))
            }
            FlashSpec::DewPressure { temperature } => {
                let t = temperature.kelvin();
                let p = self.dew_p(t)?;
                Ok(self.saturated(t, p, false))
            }
            FlashSpec::TemperatureVapourFraction {
                temperature,
                vapour_fraction: beta,
            } => {
                let t = temperature.kelvin();
                if beta == 0.0 {
                    return self.solve_frozen(FlashSpec::BubblePressure { temperature });
                }
                if beta == 1.0 {
                    return self.solve_frozen(FlashSpec::DewPressure { temperature });
                }
                let (p_dew, p_bub) = (self.dew_p(t)?, self.bubble_p(t)?);
                let guess = (1.0 - beta) * p_bub.ln() + beta * p_dew.ln();
                let (lo, hi) = (p_dew.ln(), p_bub.ln());
                let root = bracketed_newton(
                    |l| {
                        let (f, _, fp) = self.rr_at(beta, t, l.exp());
                        (-f, -fp)
                    },
                    lo.min(hi),
                    hi.max(lo),
                    guess,
                    RELATIVE_TOLERANCE * guess.abs().max(1.0),
                );
                self.iterations += root.iterations;
                Ok(self.at_fraction(beta, t, root.x.exp()))
            }
            FlashSpec::PressureVapourFraction {
                pressure,
                vapour_fraction: beta,
            } => {
                let p = pressure.pascal();
                if beta == 0.0 {
                    return self.solve_frozen(FlashSpec::BubbleTemperature { pressure });
                }
                if beta == 1.0 {
                    return self.solve_frozen(FlashSpec::DewTemperature { pressure });
                }
                let (t_bub, t_dew) = match self.t_bracket {
                    Some(b) if !self.model.is_composition_dependent() => b,
                    _ => (self.bubble_t(p)?, self.dew_t(p)?),
                };
                let (lo, hi) = (v_of_t(t_bub), v_of_t(t_dew));
                let guess = (1.0 - beta) * lo + beta * hi;
                let root = bracketed_newton(
                    |v| {
                        let t = t_of_v(v);
                        let (f, ft, _) = self.rr_at(beta, t, p);
                        (f, ft * t * t / 1000.0)
                    },
                    lo.min(hi),
                    hi.max(lo),
                    guess,
                    RELATIVE_TOLERANCE * guess.abs(),
                );
                self.iterations += root.iterations;
                Ok(self.at_fraction(beta, t_of_v(root.x), p))
            }
        }
    }

    /// Stores the state, with the search's counts, in the buffers, and the K-values at it.
    pub(super) fn done(&mut self, state: SolvedState) {
        self.k_at_cached(state.t, state.p);
        self.buffers.state = SolvedState {
            iterations: self.iterations,
            evaluations: self.evaluations,
            ..state
        };
    }
}
