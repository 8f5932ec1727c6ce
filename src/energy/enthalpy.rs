//! Pure-component and phase enthalpies relative to a reference state, along a chosen
//! vaporisation path.

use crate::properties::{Component, HeatCapacity, LatentHeat, ValidityRange};
use crate::rachford_rice::Phase;
use crate::warnings::{Warning, push_unique};
use serde::{Deserialize, Serialize};
use std::sync::Arc;

/// The phase of the reference state.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum ReferencePhase {
    /// Pure liquid at the reference temperature (the usual hand-calculation choice).
    #[default]
    Liquid,
    /// Pure ideal-gas vapour at the reference temperature.
    Vapour,
}

/// The reference state: every enthalpy is zero for each pure component in this phase at
/// this temperature. Pressure effects on enthalpy are neglected (ideal gas, incompressible
/// liquid), so no reference pressure is needed.
///
/// ```
/// use flashduty::energy::{ReferencePhase, ReferenceState};
/// let r = ReferenceState::default();
/// assert_eq!(r.temperature_k, 298.15);
/// assert_eq!(r.phase, ReferencePhase::Liquid);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ReferenceState {
    /// Reference phase.
    pub phase: ReferencePhase,
    /// Reference temperature, K (default 298.15 K).
    pub temperature_k: f64,
}

impl Default for ReferenceState {
    fn default() -> Self {
        Self {
            phase: ReferencePhase::Liquid,
            temperature_k: 298.15,
        }
    }
}

/// Where a component is taken from liquid to vapour on its way from the reference state.
///
/// The three paths give the same duty only when a component's liquid Cp, vapour Cp and
/// latent-heat data obey Kirchhoff's relation dΔH/dT = Cp,vap − Cp,liq; the spread between
/// them is a data-consistency indicator ([`crate::energy::path_spread`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
pub enum VaporisationPath {
    /// (a) Heat the liquid to the normal boiling point, vaporise there with the latent heat
    /// at Tb, heat the vapour. The default: it uses the latent heat where it is best known
    /// (every library latent heat is anchored at or fitted through Tb), ideal-gas Cp data
    /// (the best-measured Cp) for all vapour sensible heat, and liquid Cp only below Tb,
    /// where it was measured. For a pure component at 1 atm it is the real physical path.
    #[default]
    #[serde(rename = "boiling-point")]
    BoilingPoint,
    /// (b) Heat the liquid to the stream temperature and vaporise there with the
    /// Watson-corrected (or DIPPR-106) latent heat.
    #[serde(rename = "stream-temperature")]
    StreamTemperature,
    /// (c) Vaporise at the reference temperature and heat the vapour. The duty of a stream
    /// that changes phase then depends on the reference temperature.
    #[serde(rename = "reference-temperature")]
    ReferenceTemperature,
}

impl VaporisationPath {
    /// All three paths.
    pub const ALL: [VaporisationPath; 3] = [
        VaporisationPath::BoilingPoint,
        VaporisationPath::StreamTemperature,
        VaporisationPath::ReferenceTemperature,
    ];

    /// The path's name as used in case files.
    pub fn name(self) -> &'static str {
        match self {
            VaporisationPath::BoilingPoint => "boiling-point",
            VaporisationPath::StreamTemperature => "stream-temperature",
            VaporisationPath::ReferenceTemperature => "reference-temperature",
        }
    }
}

/// A pure-component molar enthalpy relative to the reference state, split into the
/// heats of its path.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct EnthalpySplit {
    /// Liquid sensible heat, J/mol.
    pub liquid_sensible_j_per_mol: f64,
    /// Latent heat (negative where the path condenses), J/mol.
    pub latent_j_per_mol: f64,
    /// Vapour sensible heat, J/mol.
    pub vapour_sensible_j_per_mol: f64,
}

impl EnthalpySplit {
    /// The sum of the three parts, J/mol.
    pub fn total_j_per_mol(&self) -> f64 {
        self.liquid_sensible_j_per_mol + self.latent_j_per_mol + self.vapour_sensible_j_per_mol
    }

    fn minus(self, o: EnthalpySplit) -> EnthalpySplit {
        EnthalpySplit {
            liquid_sensible_j_per_mol: self.liquid_sensible_j_per_mol - o.liquid_sensible_j_per_mol,
            latent_j_per_mol: self.latent_j_per_mol - o.latent_j_per_mol,
            vapour_sensible_j_per_mol: self.vapour_sensible_j_per_mol - o.vapour_sensible_j_per_mol,
        }
    }
}

/// Enthalpies of the pure components and ideal mixtures of them.
///
/// A phase's molar enthalpy is the mole-fraction-weighted sum of the pure-component
/// enthalpies (ideal mixing: no heat of mixing). What does not depend on temperature (for
/// path (a), the liquid's sensible heat from the reference temperature to the normal
/// boiling point and the latent heat there; the shift to a vapour reference) is computed
/// once, when the model is built, so an enthalpy at T costs one closed-form Cp integral
/// (along path (b), a latent heat as well).
///
/// ```
/// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath};
/// use flashduty::library::Library;
/// use flashduty::rachford_rice::Phase;
/// let water = Library::builtin().get("water").unwrap().clone();
/// let h = EnthalpyModel::new(vec![water], ReferenceState::default(), VaporisationPath::default());
/// // Heating liquid water from 25 °C to 75 °C takes about 50 K × 75.3 J/(mol·K): the mean
/// // liquid Cp there (IAPWS-IF97, from tests/fixtures/iapws_water_1atm.csv).
/// let dh = h.pure(0, Phase::Liquid, 348.15).total_j_per_mol();
/// assert!((dh / (50.0 * 75.3) - 1.0).abs() < 0.02);
/// ```
#[derive(Debug, Clone)]
pub struct EnthalpyModel {
    components: Vec<Arc<Component>>,
    reference: ReferenceState,
    path: VaporisationPath,
    table: PathTable,
}

impl EnthalpyModel {
    /// A model over `components`.
    pub fn new(components: Vec<Arc<Component>>, reference: ReferenceState, path: VaporisationPath) -> Self {
        let table = PathTable::new(&components, reference, path);
        Self {
            components,
            reference,
            path,
            table,
        }
    }

    /// The components.
    pub fn components(&self) -> &[Arc<Component>] {
        &self.components
    }

    /// The reference state.
    pub fn reference(&self) -> ReferenceState {
        self.reference
    }

    /// The vaporisation path.
    pub fn path(&self) -> VaporisationPath {
        self.path
    }

    /// The molar enthalpy of pure component `index` in `phase` (`Liquid` or `Vapour`;
    /// `TwoPhase` is read as liquid) at `t_k`, relative to the reference state. An index out
    /// of range gives zero.
    pub fn pure(&self, index: usize, phase: Phase, t_k: f64) -> EnthalpySplit {
        self.table.split(&self.components, index, phase, t_k)
    }

    /// d h / dT of pure component `index` in `phase` at `t_k`, J/(mol·K).
    pub fn pure_slope(&self, index: usize, phase: Phase, t_k: f64) -> f64 {
        self.table.slope(&self.components, index, phase, t_k)
    }

    /// The molar enthalpy of a phase of composition `fractions` at `t_k`, J/mol.
    pub fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64) -> f64 {
        self.table.phase_enthalpy(&self.components, phase, fractions, t_k)
    }
}

/// Adds a warning for every correlation that the enthalpy of `c` in `phase` at `t_k`
/// (from `reference` along `path`) evaluates outside its range. `warned` holds a bit for
/// each correlation already reported for this component in `out` (the caller keeps one per
/// component, zero to start), so that repeated rows do not search `out` again.
pub(crate) fn enthalpy_warnings(
    c: &Component,
    reference: ReferenceState,
    path: VaporisationPath,
    phase: Phase,
    t_k: f64,
    warned: &mut u8,
    out: &mut Vec<Warning>,
) {
    let t_ref = reference.temperature_k;
    let mut check = |bit: u8, name: &'static str, range: ValidityRange, t: f64| {
        if range.contains(t) || *warned & bit != 0 {
            return;
        }
        *warned |= bit;
        let known = out.iter().any(|w| {
            matches!(w, Warning::CorrelationExtrapolated { component, correlation, .. }
                if *correlation == name && component == c.name())
        });
        if !known {
            push_unique(
                out,
                Warning::CorrelationExtrapolated {
                    component: c.name().to_string(),
                    correlation: name,
                    range_min_k: range.min_k,
                    range_max_k: range.max_k,
                    temperature_k: t,
                },
            );
        }
    };
    let ts = switch_temperature(c, t_k, reference, path);
    let liquid_to = if phase == Phase::Vapour { ts } else { t_k };
    for t in [t_ref.min(liquid_to), t_ref.max(liquid_to)] {
        check(1, "liquid_heat_capacity", c.liquid_heat_capacity().validity(), t);
    }
    let vapour_needed = phase == Phase::Vapour || reference.phase == ReferencePhase::Vapour;
    if vapour_needed {
        check(2, "latent_heat", c.latent_heat().validity(), ts);
        let (a, b) = if phase == Phase::Vapour { (ts, t_k) } else { (ts, t_ref) };
        for t in [a.min(b), a.max(b)] {
            check(4, "vapour_heat_capacity", c.vapour_heat_capacity().validity(), t);
        }
    }
}

/// ∫ Cp,liq dT of `c` from `t_ref` to `t_k`: the liquid's sensible heat, the same on every
/// path.
#[inline]
fn liquid_sensible(c: &Component, t_ref: f64, t_k: f64) -> f64 {
    c.liquid_heat_capacity().enthalpy_change(t_ref, t_k)
}

/// The temperature at which a component is vaporised on the path to vapour at `t_k`,
/// starting from liquid at the reference temperature.
fn switch_temperature(c: &Component, t_k: f64, reference: ReferenceState, path: VaporisationPath) -> f64 {
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
}

/// One component's constants.
#[derive(Debug, Clone, Copy)]
struct PureConstants {
    /// Paths (a) and (c): the vaporisation temperature Ts, and the liquid sensible heat
    /// from the reference temperature to Ts and the latent heat at Ts. Path (b): `None`,
    /// the liquid is vaporised at the stream temperature.
    fixed: Option<(f64, f64, f64)>,
    /// Subtracted from every enthalpy: zero for a liquid reference; for a vapour reference,
    /// the vapour's enthalpy at the reference temperature measured from the liquid there
    /// along the same path.
    shift: EnthalpySplit,
}

impl PureConstants {
    fn new(c: &Component, reference: ReferenceState, path: VaporisationPath) -> Self {
        let t_ref = reference.temperature_k;
        let mut k = Self {
            fixed: None,
            shift: EnthalpySplit::default(),
        };
        if path != VaporisationPath::StreamTemperature {
            let ts = switch_temperature(c, t_ref, reference, path);
            k.fixed = Some((ts, liquid_sensible(c, t_ref, ts), c.latent_heat().latent_heat(ts)));
        }
        if reference.phase == ReferencePhase::Vapour {
            k.shift = k.measured_from_liquid(c, t_ref, Phase::Vapour, t_ref);
        }
        k
    }

    /// The split measured from pure liquid at the reference temperature `t_ref`.
    #[inline]
    fn measured_from_liquid(&self, c: &Component, t_ref: f64, phase: Phase, t_k: f64) -> EnthalpySplit {
        self.measured_given(c, phase, t_k, || liquid_sensible(c, t_ref, t_k))
    }

    /// [`measured_from_liquid`](Self::measured_from_liquid), with the liquid's sensible
    /// heat from the reference temperature to `t_k` given by `liquid_to_t` where needed.
    #[inline]
    fn measured_given(
        &self,
        c: &Component,
        phase: Phase,
        t_k: f64,
        liquid_to_t: impl FnOnce() -> f64,
    ) -> EnthalpySplit {
        match (phase, self.fixed) {
            (Phase::Vapour, Some((ts, liquid_sensible, latent))) => EnthalpySplit {
                liquid_sensible_j_per_mol: liquid_sensible,
                latent_j_per_mol: latent,
                vapour_sensible_j_per_mol: c.vapour_heat_capacity().enthalpy_change(ts, t_k),
            },
            (Phase::Vapour, None) => EnthalpySplit {
                liquid_sensible_j_per_mol: liquid_to_t(),
                latent_j_per_mol: c.latent_heat().latent_heat(t_k),
                vapour_sensible_j_per_mol: c.vapour_heat_capacity().enthalpy_change(t_k, t_k),
            },
            _ => EnthalpySplit {
                liquid_sensible_j_per_mol: liquid_to_t(),
                ..EnthalpySplit::default()
            },
        }
    }

    #[inline]
    fn slope(&self, c: &Component, phase: Phase, t_k: f64) -> f64 {
        match (phase, self.fixed) {
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
    /// The split in `phase` at `t_k`, relative to the reference state.
    #[inline]
    pub fn split(&self, phase: Phase, t_k: f64) -> EnthalpySplit {
        let k = self.constants;
        k.measured_from_liquid(self.component, self.t_ref, phase, t_k)
            .minus(k.shift)
    }

    /// The molar enthalpy in `phase` at `t_k`, J/mol.
    #[inline]
    pub fn total(&self, phase: Phase, t_k: f64) -> f64 {
        self.split(phase, t_k).total_j_per_mol()
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
            .total_j_per_mol()
    }
}

impl PathTable {
    /// The table for `components`.
    pub fn new(components: &[Arc<Component>], reference: ReferenceState, path: VaporisationPath) -> Self {
        Self {
            t_ref: reference.temperature_k,
            pure: components
                .iter()
                .map(|c| PureConstants::new(c, reference, path))
                .collect(),
        }
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

    /// The molar enthalpy of pure component `index` in `phase` at `t_k`, J/mol.
    #[inline]
    pub fn total(&self, components: &[Arc<Component>], index: usize, phase: Phase, t_k: f64) -> f64 {
        self.split(components, index, phase, t_k).total_j_per_mol()
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
}
