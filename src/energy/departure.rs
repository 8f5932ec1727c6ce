//! The second-virial vapour's departure from the ideal gas, kept consistent with the
//! library's real latent heats: what [`VapourModel::SecondVirial`](super::VapourModel::SecondVirial) adds to the ideal-gas
//! enthalpies.

use super::path_table::vaporisation_temperature;
use super::reference::{ReferencePhase, ReferenceState, VaporisationPath};
use crate::properties::{Component, PitzerCurlVirial, VapourPressure};
use crate::rachford_rice::Phase;
use crate::units::ATM_PA;
use std::sync::Arc;

/// One component's constants for the second-virial vapour correction.
#[derive(Debug, Clone, Copy)]
pub(crate) struct VirialConstants {
    correlation: PitzerCurlVirial,
    /// Paths (a) and (c): H^R of the saturated vapour where the path vaporises, J/mol.
    /// Path (b): `None`, it is vaporised at the stream temperature.
    saturation: Option<f64>,
    /// Added to the component's enthalpy in either phase: zero for a liquid reference; for
    /// a vapour reference (the ideal gas), H^R of the saturated vapour where the path to
    /// the reference vaporises it.
    reference: f64,
}

impl VirialConstants {
    pub(crate) fn new(c: &Component, reference: ReferenceState, path: VaporisationPath) -> Self {
        let correlation = PitzerCurlVirial::for_component(c);
        let at_saturation = |t_v: f64| {
            let (t, p) = saturation_point(c, t_v, path);
            correlation.residual_enthalpy_j_per_mol(t, p)
        };
        let t_ref = reference.temperature_k;
        let saturation = (path != VaporisationPath::StreamTemperature)
            .then(|| at_saturation(vaporisation_temperature(c, t_ref, reference, path)));
        let reference = if reference.phase == ReferencePhase::Vapour {
            saturation.unwrap_or_else(|| at_saturation(t_ref))
        } else {
            0.0
        };
        Self {
            correlation,
            saturation,
            reference,
        }
    }

    /// The vapour's departure at (`t_k`, `p_pa`) measured from the liquid at the reference
    /// temperature, H^R(T, P) − H^R at the vaporisation point, J/mol, and its slope at
    /// constant pressure, J/(mol·K).
    #[inline]
    fn vapour(&self, c: &Component, t_k: f64, p_pa: f64) -> (f64, f64) {
        let (g, dg) = self.correlation.residual_enthalpy_per_pa(t_k);
        match self.saturation {
            Some(h_sat) => (p_pa * g - h_sat, p_pa * dg),
            None => {
                // Vaporised at T itself: H^R(T, P) − H^R(T, Pv(T)) = (P − Pv) (B − T dB/dT).
                let (pv, dpv) = saturation_pressure_with_slope(c, t_k);
                ((p_pa - pv) * g, (p_pa - pv) * dg - dpv * g)
            }
        }
    }
}

/// The second-virial departures of a [`PathTable`]'s components: what
/// [`VapourModel::SecondVirial`] adds to the ideal-gas enthalpies.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Departures<'a> {
    pub(crate) constants: &'a [VirialConstants],
    pub(crate) components: &'a [Arc<Component>],
}

impl Departures<'_> {
    /// Component `i`'s departure in the liquid, J/mol (a constant: nonzero for a vapour
    /// reference only); zero for an index out of range.
    #[inline]
    pub fn liquid(&self, i: usize) -> f64 {
        self.constants.get(i).map_or(0.0, |k| k.reference)
    }

    /// Component `i`'s departure in the vapour at (`t_k`, `p_pa`), J/mol, and its slope at
    /// constant pressure, J/(mol·K); zero for an index out of range.
    #[inline]
    pub fn vapour(&self, i: usize, t_k: f64, p_pa: f64) -> (f64, f64) {
        match (self.constants.get(i), self.components.get(i)) {
            (Some(k), Some(c)) => {
                let (h, slope) = k.vapour(c, t_k, p_pa);
                (h + k.reference, slope)
            }
            _ => (0.0, 0.0),
        }
    }

    /// Component `i`'s departure in `phase` at (`t_k`, `p_pa`), J/mol.
    #[inline]
    pub fn pure(&self, i: usize, phase: Phase, t_k: f64, p_pa: f64) -> f64 {
        if phase == Phase::Vapour {
            self.vapour(i, t_k, p_pa).0
        } else {
            self.liquid(i)
        }
    }

    /// The departure of a phase of composition `fractions` at (`t_k`, `p_pa`), J/mol.
    pub fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        fractions
            .iter()
            .enumerate()
            .filter(|(_, f)| **f != 0.0)
            .map(|(i, f)| f * self.pure(i, phase, t_k, p_pa))
            .sum()
    }

    /// d/dT at constant pressure of [`phase_enthalpy`](Self::phase_enthalpy), J/(mol·K).
    pub fn phase_slope(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        if phase != Phase::Vapour {
            return 0.0;
        }
        fractions
            .iter()
            .enumerate()
            .filter(|(_, f)| **f != 0.0)
            .map(|(i, f)| f * self.vapour(i, t_k, p_pa).1)
            .sum()
    }
}

/// Where a component's path vaporises it at `t_v`: (`t_v`, the saturation pressure there),
/// the normal boiling point at 101 325 Pa on path (a), else Psat(`t_v`) from the
/// component's vapour pressure; capped at Pc (at and above Tc there is no saturated
/// vapour, and the latent heat is zero).
pub(crate) fn saturation_point(c: &Component, t_v: f64, path: VaporisationPath) -> (f64, f64) {
    match path {
        VaporisationPath::BoilingPoint => (t_v, ATM_PA.min(c.critical_pressure_pa())),
        _ => (t_v, saturation_pressure_with_slope(c, t_v).0),
    }
}

/// The capped saturation pressure of [`saturation_point`] at `t_k` (paths (b) and (c)) and
/// its temperature derivative, Pa and Pa/K.
#[inline]
fn saturation_pressure_with_slope(c: &Component, t_k: f64) -> (f64, f64) {
    let (ln_psat, slope) = c.vapour_pressure().ln_psat_with_slope(t_k);
    let psat = ln_psat.exp();
    let pc = c.critical_pressure_pa();
    if psat < pc { (psat, psat * slope) } else { (pc, 0.0) }
}
