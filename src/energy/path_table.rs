//! [`PathTable`]: the temperature-independent parts of the pure-component enthalpies for
//! one reference state, vaporisation path and vapour model, so that an enthalpy at T is one
//! closed-form Cp integral (along path (b), a latent heat as well).

use super::departure::{Departures, VirialConstants};
use super::ideal::EnthalpySplit;
use super::reference::{ReferencePhase, ReferenceState, VaporisationPath, VapourModel};
use crate::properties::{Component, HeatCapacity, LatentHeat};
use crate::rachford_rice::Phase;
use std::sync::Arc;

/// The ideal-gas parts of an [`EnthalpySplit`], which the hot paths work in (the
/// second-virial departure is added apart, where there is one).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
struct Parts {
    liquid_sensible: f64,
    latent: f64,
    vapour_sensible: f64,
}

impl Parts {
    /// The sum of the three parts, J/mol.
    fn total(&self) -> f64 {
        self.liquid_sensible + self.latent + self.vapour_sensible
    }

    fn minus(self, o: Parts) -> Parts {
        Parts {
            liquid_sensible: self.liquid_sensible - o.liquid_sensible,
            latent: self.latent - o.latent,
            vapour_sensible: self.vapour_sensible - o.vapour_sensible,
        }
    }
}

impl From<Parts> for EnthalpySplit {
    fn from(p: Parts) -> Self {
        EnthalpySplit {
            liquid_sensible_j_per_mol: p.liquid_sensible,
            latent_j_per_mol: p.latent,
            vapour_sensible_j_per_mol: p.vapour_sensible,
            vapour_departure_j_per_mol: 0.0,
        }
    }
}

pub(crate) fn liquid_sensible(c: &Component, t_ref: f64, t_k: f64) -> f64 {
    c.liquid_heat_capacity().enthalpy_change(t_ref, t_k)
}

/// The temperature at which the vaporisation path takes a component from liquid (at the
/// reference temperature) to vapour at `t_k`: (a) its normal boiling point, (b) `t_k`, the
/// stream temperature, (c) the reference temperature.
pub(crate) fn vaporisation_temperature(
    c: &Component,
    t_k: f64,
    reference: ReferenceState,
    path: VaporisationPath,
) -> f64 {
    match path {
        VaporisationPath::BoilingPoint => c.normal_boiling_point_k(),
        VaporisationPath::StreamTemperature => t_k,
        VaporisationPath::ReferenceTemperature => reference.temperature_k,
    }
}

/// The temperature-independent parts of the pure-component enthalpies of a list of
/// components, for one reference state and vaporisation path. Its methods take the same
/// components it was built for.
#[derive(Debug, Clone)]
pub(crate) struct PathTable {
    t_ref: f64,
    pure: Vec<PureConstants>,
    /// Under [`VapourModel::SecondVirial`], each component's virial constants.
    virial: Option<Vec<VirialConstants>>,
}

/// One component's constants.
#[derive(Debug, Clone, Copy)]
struct PureConstants {
    /// Paths (a) and (c): the vaporisation temperature Ts, and the liquid sensible heat
    /// from the reference temperature to Ts and the latent heat at Ts. Path (b): `None`,
    /// the liquid is vaporised at the stream temperature.
    fixed_vaporisation: Option<(f64, f64, f64)>,
    /// Subtracted from every enthalpy: zero for a liquid reference; for a vapour reference,
    /// the vapour's enthalpy at the reference temperature measured from the liquid there
    /// along the same path.
    shift: Parts,
}

impl PureConstants {
    fn new(c: &Component, reference: ReferenceState, path: VaporisationPath) -> Self {
        let t_ref = reference.temperature_k;
        let mut k = Self {
            fixed_vaporisation: None,
            shift: Parts::default(),
        };
        if path != VaporisationPath::StreamTemperature {
            let ts = vaporisation_temperature(c, t_ref, reference, path);
            k.fixed_vaporisation = Some((ts, liquid_sensible(c, t_ref, ts), c.latent_heat().latent_heat(ts)));
        }
        if reference.phase == ReferencePhase::Vapour {
            k.shift = k.measured_from_liquid(c, t_ref, Phase::Vapour, t_ref);
        }
        k
    }

    /// The split measured from pure liquid at the reference temperature `t_ref`.
    #[inline]
    fn measured_from_liquid(&self, c: &Component, t_ref: f64, phase: Phase, t_k: f64) -> Parts {
        self.measured_given(c, phase, t_k, || liquid_sensible(c, t_ref, t_k))
    }

    /// [`measured_from_liquid`](Self::measured_from_liquid), with the liquid's sensible
    /// heat from the reference temperature to `t_k` given by `liquid_to_t` where needed.
    #[inline]
    fn measured_given(&self, c: &Component, phase: Phase, t_k: f64, liquid_to_t: impl FnOnce() -> f64) -> Parts {
        match (phase, self.fixed_vaporisation) {
            (Phase::Vapour, Some((ts, liquid_sensible, latent))) => Parts {
                liquid_sensible,
                latent,
                vapour_sensible: c.vapour_heat_capacity().enthalpy_change(ts, t_k),
            },
            (Phase::Vapour, None) => Parts {
                liquid_sensible: liquid_to_t(),
                latent: c.latent_heat().latent_heat(t_k),
                vapour_sensible: c.vapour_heat_capacity().enthalpy_change(t_k, t_k),
            },
            _ => Parts {
                liquid_sensible: liquid_to_t(),
                ..Parts::default()
            },
        }
    }

    #[inline]
    fn slope(&self, c: &Component, phase: Phase, t_k: f64) -> f64 {
        match (phase, self.fixed_vaporisation) {
            (Phase::Vapour, Some(_)) => c.vapour_heat_capacity().cp(t_k),
            (Phase::Vapour, None) => {
                let (_, dl) = c.latent_heat().latent_heat_with_slope(t_k);
                c.liquid_heat_capacity().cp(t_k) + dl
            }
            _ => c.liquid_heat_capacity().cp(t_k),
        }
    }
}

/// One component of a [`PathTable`], looked up once for several evaluations.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Pure<'a> {
    constants: &'a PureConstants,
    component: &'a Component,
    t_ref: f64,
}

impl Pure<'_> {
    /// The ideal-gas parts in `phase` at `t_k`, relative to the reference state.
    #[inline]
    fn parts(&self, phase: Phase, t_k: f64) -> Parts {
        let k = self.constants;
        k.measured_from_liquid(self.component, self.t_ref, phase, t_k)
            .minus(k.shift)
    }

    /// The split in `phase` at `t_k`, relative to the reference state, without the
    /// departure of a second-virial vapour (which comes from [`PathTable::virial`]).
    #[inline]
    pub fn split(&self, phase: Phase, t_k: f64) -> EnthalpySplit {
        self.parts(phase, t_k).into()
    }

    /// The molar enthalpy in `phase` at `t_k`, J/mol (the ideal-gas parts: the departure
    /// of a second-virial vapour comes from [`PathTable::virial`]).
    #[inline]
    pub fn total(&self, phase: Phase, t_k: f64) -> f64 {
        self.parts(phase, t_k).total()
    }

    /// d h / dT in `phase` at `t_k`, J/(mol·K).
    #[inline]
    pub fn slope(&self, phase: Phase, t_k: f64) -> f64 {
        self.constants.slope(self.component, phase, t_k)
    }

    /// The liquid's sensible heat from the reference temperature to `t_k`, J/mol: the same
    /// for every path of one reference temperature.
    #[inline]
    pub fn liquid_sensible(&self, t_k: f64) -> f64 {
        liquid_sensible(self.component, self.t_ref, t_k)
    }

    /// [`total`](Self::total) with the liquid sensible heat to `t_k` given, where needed,
    /// by `liquid_to_t` (for example [`liquid_sensible`](Self::liquid_sensible) of a table
    /// with the same reference temperature, computed once); the same number.
    #[inline]
    pub fn total_given(&self, phase: Phase, t_k: f64, liquid_to_t: impl FnOnce() -> f64) -> f64 {
        let k = self.constants;
        k.measured_given(self.component, phase, t_k, liquid_to_t)
            .minus(k.shift)
            .total()
    }
}

impl PathTable {
    /// The table for `components`.
    pub fn new(
        components: &[Arc<Component>],
        reference: ReferenceState,
        path: VaporisationPath,
        vapour_model: VapourModel,
    ) -> Self {
        Self {
            t_ref: reference.temperature_k,
            pure: components
                .iter()
                .map(|c| PureConstants::new(c, reference, path))
                .collect(),
            virial: (vapour_model == VapourModel::SecondVirial).then(|| {
                components
                    .iter()
                    .map(|c| VirialConstants::new(c, reference, path))
                    .collect()
            }),
        }
    }

    /// The vapour model the table was built for.
    pub fn vapour_model(&self) -> VapourModel {
        if self.virial.is_some() {
            VapourModel::SecondVirial
        } else {
            VapourModel::IdealGas
        }
    }

    /// The second-virial departures of `components` (the list the table was built for);
    /// `None` for an ideal-gas vapour, whose enthalpies are the rest of the table's alone.
    #[inline]
    pub fn virial<'a>(&'a self, components: &'a [Arc<Component>]) -> Option<Departures<'a>> {
        self.virial
            .as_deref()
            .map(|constants| Departures { constants, components })
    }

    /// [`split`](Self::split) at pressure `p_pa`, with the vapour departure filled in.
    pub fn split_at(
        &self,
        components: &[Arc<Component>],
        index: usize,
        phase: Phase,
        t_k: f64,
        p_pa: f64,
    ) -> EnthalpySplit {
        let mut split = self.split(components, index, phase, t_k);
        if let Some(v) = self.virial(components) {
            split.vapour_departure_j_per_mol = v.pure(index, phase, t_k, p_pa);
        }
        split
    }

    /// Component `index` of `components` (the list the table was built for), `None` for an
    /// index out of range.
    #[inline]
    pub fn pure<'a>(&'a self, components: &'a [Arc<Component>], index: usize) -> Option<Pure<'a>> {
        match (self.pure.get(index), components.get(index)) {
            (Some(constants), Some(component)) => Some(Pure {
                constants,
                component,
                t_ref: self.t_ref,
            }),
            _ => None,
        }
    }

    /// The split of pure component `index` of `components` in `phase` at `t_k`, relative
    /// to the reference state; zero for an index out of range.
    #[inline]
    pub fn split(&self, components: &[Arc<Component>], index: usize, phase: Phase, t_k: f64) -> EnthalpySplit {
        self.pure(components, index)
            .map_or_else(EnthalpySplit::default, |p| p.split(phase, t_k))
    }

    /// The molar enthalpy of pure component `index` in `phase` at `t_k` (ideal-gas parts),
    /// J/mol.
    #[inline]
    pub fn total(&self, components: &[Arc<Component>], index: usize, phase: Phase, t_k: f64) -> f64 {
        self.pure(components, index).map_or(0.0, |p| p.total(phase, t_k))
    }

    /// d h / dT of pure component `index` in `phase` at `t_k`, J/(mol·K); zero for an index
    /// out of range.
    #[inline]
    pub fn slope(&self, components: &[Arc<Component>], index: usize, phase: Phase, t_k: f64) -> f64 {
        self.pure(components, index).map_or(0.0, |p| p.slope(phase, t_k))
    }

    /// The molar enthalpy of a phase of composition `fractions` at `t_k`, J/mol.
    pub fn phase_enthalpy(&self, components: &[Arc<Component>], phase: Phase, fractions: &[f64], t_k: f64) -> f64 {
        fractions
            .iter()
            .enumerate()
            .filter(|(_, f)| **f != 0.0)
            .map(|(i, f)| f * self.total(components, i, phase, t_k))
            .sum()
    }

    /// d/dT of [`phase_enthalpy`](Self::phase_enthalpy), J/(mol·K).
    pub fn phase_slope(&self, components: &[Arc<Component>], phase: Phase, fractions: &[f64], t_k: f64) -> f64 {
        (0..fractions.len())
            .map(|i| fractions[i] * self.slope(components, i, phase, t_k))
            .sum()
    }

    /// [`slope`](Self::slope) at constant pressure `p_pa`, with the vapour departure's slope.
    pub fn slope_at(&self, components: &[Arc<Component>], index: usize, phase: Phase, t_k: f64, p_pa: f64) -> f64 {
        let ideal = self.slope(components, index, phase, t_k);
        match self.virial(components) {
            Some(v) if phase == Phase::Vapour => ideal + v.vapour(index, t_k, p_pa).1,
            _ => ideal,
        }
    }

    /// [`phase_enthalpy`](Self::phase_enthalpy) at pressure `p_pa`, with the departures.
    pub fn phase_enthalpy_at(
        &self,
        components: &[Arc<Component>],
        phase: Phase,
        fractions: &[f64],
        t_k: f64,
        p_pa: f64,
    ) -> f64 {
        let ideal = self.phase_enthalpy(components, phase, fractions, t_k);
        match self.virial(components) {
            Some(v) => ideal + v.phase_enthalpy(phase, fractions, t_k, p_pa),
            None => ideal,
        }
    }

    /// [`phase_slope`](Self::phase_slope) at constant pressure `p_pa`, with the departures'.
    pub fn phase_slope_at(
        &self,
        components: &[Arc<Component>],
        phase: Phase,
        fractions: &[f64],
        t_k: f64,
        p_pa: f64,
    ) -> f64 {
        let ideal = self.phase_slope(components, phase, fractions, t_k);
        match self.virial(components) {
            Some(v) => ideal + v.phase_slope(phase, fractions, t_k, p_pa),
            None => ideal,
        }
    }
}
