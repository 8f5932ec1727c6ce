//! Whether a duty-specified outlet is the only state with its enthalpy: along the
//! stream-temperature path the enthalpy dips at each component's critical temperature, so
//! one duty can have several outlets.

use super::calc::{Calc, WIDE_TWO_PHASE_K};
use super::phase_enthalpy::PhaseEnthalpyModel;
use super::reference::VaporisationPath;
use crate::equilibrium::SolvedFlash;
use crate::equilibrium::{KValueModel, SEARCH_MAX_TEMPERATURE_K};
use crate::rachford_rice::Phase;
use crate::solve::bracketed_newton;
use crate::units::Pressure;
use crate::warnings::Warning;

impl<K: KValueModel, H: PhaseEnthalpyModel> Calc<'_, K, H> {
    /// A [`Warning::OutletNotUnique`] where the duty-specified outlet at `t_out` (enthalpy
    /// `target` J/mol, pressure `p`) is not the only state with that enthalpy; `scratch`
    /// holds the flashes of the search.
    ///
    /// Only the stream-temperature path can have several: its vapour enthalpy carries the
    /// latent heat at T, which falls to zero at Tc with an unbounded slope, so a vapour's
    /// enthalpy has a cusp-shaped minimum at every component's Tc, and so has a two-phase
    /// mixture's where that Tc lies between the bubble and dew points. (Along the other
    /// paths the latent heat is taken at a fixed temperature.) The two-phase region
    /// (`t_bub` to `t_dew`, wider than [`WIDE_TWO_PHASE_K`]) and the vapour branch above
    /// `t_dew` are searched, each cut at the critical temperatures inside it
    /// ([`crossings`]); the liquid's enthalpy rises with T. Nothing is searched unless the
    /// enthalpy at some Tc is below the target (every case with more than one outlet has
    /// such a dip: a two-phase enthalpy that falls into the dew point keeps falling above
    /// it, into the cusp of the Tc that makes it fall).
    pub fn outlet_uniqueness(
        &self,
        target: f64,
        t_out: f64,
        (t_bub, t_dew): (f64, f64),
        p: Pressure,
        scratch: &mut SolvedFlash,
    ) -> Option<Warning> {
        let base = self.base()?;
        if base.path() != VaporisationPath::StreamTemperature {
            return None;
        }
        let (z, p_pa) = (self.z(), p.pascal());
        let mut cusps: Vec<(f64, usize)> = base
            .components()
            .iter()
            .enumerate()
            .filter(|&(i, _)| z[i] > 0.0)
            .map(|(i, c)| (c.critical_temperature_k(), i))
            .filter(|&(tc, _)| tc > t_bub && tc < SEARCH_MAX_TEMPERATURE_K)
            .collect();
        cusps.sort_by(|a, b| a.0.total_cmp(&b.0));
        let (inside, above) = cusps.split_at(cusps.partition_point(|c| c.0 <= t_dew));
        // A narrow two-phase region is solved on β, not searched on T.
        let wide = t_dew - t_bub > WIDE_TWO_PHASE_K;
        let inside = if wide { inside } else { &[] };
        let mut failed = false;
        let mut mixture = |t: f64| match self.tp_into(t, p, scratch) {
            Ok(()) => {
                let (h, slope) = self.enthalpy_and_slope(scratch);
                (h - target, slope)
            }
            Err(_) => {
                failed = true;
                (f64::NAN, f64::NAN)
            }
        };
        let mut vapour = |t: f64| {
            let (h, slope) = self.phase_enthalpy_and_slope(Phase::Vapour, z, t, p_pa);
            (h - target, slope)
        };
        // The first critical temperature where the enthalpy falls below the target.
        let dip = inside
            .iter()
            .find(|c| mixture(c.0).0 < 0.0)
            .or_else(|| above.iter().find(|c| vapour(c.0).0 < 0.0))
            .copied();
        let (tc, index) = dip?;
        let mut outlets = Vec::new();
        // The two-phase region is searched whenever there is a dip anywhere, with or without
        // a critical temperature inside it: a Tc just above the dew point makes the
        // two-phase enthalpy peak and fall into the dew point (the dew-point corner), so a
        // duty met in the vapour above the dip may also be met twice below the dew point.
        if wide {
            let cuts: Vec<f64> = inside.iter().map(|c| c.0).collect();
            crossings(&mut mixture, t_bub, t_dew, &cuts, &mut outlets);
        }
        let cuts: Vec<f64> = above.iter().map(|c| c.0).collect();
        crossings(&mut vapour, t_dew, SEARCH_MAX_TEMPERATURE_K, &cuts, &mut outlets);
        if failed {
            return None;
        }
        let others: Vec<f64> = outlets.into_iter().filter(|t| (t - t_out).abs() > 1e-6).collect();
        if others.is_empty() {
            return None;
        }
        Some(Warning::OutletNotUnique {
            component: base.components()[index].name().to_string(),
            critical_temperature_k: tc,
            outlet_temperature_k: t_out,
            other_outlet_temperatures_k: others,
        })
    }
}

/// Adds to `out` the temperatures in (`lo`, `hi`) where `f` (value and slope in T) crosses
/// zero, for an `f` that between consecutive `cusps` (ascending, inside the interval) rises
/// to one peak and falls into the next cusp: each piece's peak is found by the bracketed
/// search on the slope (just below a cusp the slope is unbounded below), and each rise and
/// fall through zero is solved by bracketed Newton. A NaN value finds nothing.
fn crossings(f: &mut impl FnMut(f64) -> (f64, f64), lo: f64, hi: f64, cusps: &[f64], out: &mut Vec<f64>) {
    const TOLERANCE_K: f64 = 1e-10;
    let mut a = lo;
    for &b in cusps.iter().chain([&hi]) {
        let top = if b == hi { b } else { b * (1.0 - 1e-12) };
        let peak = if f(top).1 >= 0.0 {
            top
        } else if f(a).1 <= 0.0 {
            a
        } else {
            // Where the slope falls through zero: the bracketed search on minus the slope,
            // with secant steps (no second derivative is at hand).
            bracketed_newton(|t| (-f(t).1, f64::NAN), a, top, 0.5 * (a + top), 1e-9 * top).x
        };
        if f(peak).0 > 0.0 {
            if f(a).0 < 0.0 {
                out.push(bracketed_newton(&mut *f, a, peak, 0.5 * (a + peak), TOLERANCE_K).x);
            }
            if f(b).0 < 0.0 {
                out.push(
                    bracketed_newton(
                        |t| {
                            let (v, d) = f(t);
                            (-v, -d)
                        },
                        peak,
                        b,
                        0.5 * (peak + b),
                        TOLERANCE_K,
                    )
                    .x,
                );
            }
        }
        a = b;
    }
}
