//! Pure-component and phase enthalpies relative to a reference state, along a chosen
//! vaporisation path.

use crate::properties::{Component, HeatCapacity, LatentHeat};
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
/// enthalpies (ideal mixing: no heat of mixing).
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
}

impl EnthalpyModel {
    /// A model over `components`.
    pub fn new(components: Vec<Arc<Component>>, reference: ReferenceState, path: VaporisationPath) -> Self {
        Self {
            components,
            reference,
            path,
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

    fn switch_temperature(&self, c: &Component, t_k: f64) -> f64 {
        switch_temperature(c, t_k, self.reference, self.path)
    }

    /// The molar enthalpy of pure component `index` in `phase` (`Liquid` or `Vapour`;
    /// `TwoPhase` is read as liquid) at `t_k`, relative to the reference state. An index out
    /// of range gives zero.
    pub fn pure(&self, index: usize, phase: Phase, t_k: f64) -> EnthalpySplit {
        self.components.get(index).map_or_else(EnthalpySplit::default, |c| {
            pure_enthalpy(c, phase, t_k, self.reference, self.path)
        })
    }

    /// d h / dT of pure component `index` in `phase` at `t_k`, J/(mol·K).
    pub fn pure_slope(&self, index: usize, phase: Phase, t_k: f64) -> f64 {
        let Some(c) = self.components.get(index) else {
            return 0.0;
        };
        match phase {
            Phase::Vapour => match self.path {
                VaporisationPath::StreamTemperature => {
                    let (_, dl) = c.latent_heat().latent_heat_with_slope(t_k);
                    c.liquid_heat_capacity().cp(t_k) + dl
                }
                _ => c.vapour_heat_capacity().cp(t_k),
            },
            _ => c.liquid_heat_capacity().cp(t_k),
        }
    }

    /// The molar enthalpy of a phase of composition `fractions` at `t_k`, J/mol.
    pub fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64) -> f64 {
        fractions
            .iter()
            .enumerate()
            .filter(|(_, f)| **f != 0.0)
            .map(|(i, f)| f * self.pure(i, phase, t_k).total_j_per_mol())
            .sum()
    }

    /// Adds a warning for every correlation this model evaluates outside its range for a
    /// component present in `phase` at `t_k`.
    pub(crate) fn warnings(&self, index: usize, phase: Phase, t_k: f64, out: &mut Vec<Warning>) {
        let Some(c) = self.components.get(index) else {
            return;
        };
        let t_ref = self.reference.temperature_k;
        let mut check = |name: &'static str, range: crate::properties::ValidityRange, t: f64| {
            if range.contains(t) {
                return;
            }
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
        let liquid_to = if phase == Phase::Vapour {
            self.switch_temperature(c, t_k)
        } else {
            t_k
        };
        for t in [t_ref.min(liquid_to), t_ref.max(liquid_to)] {
            check("liquid_heat_capacity", c.liquid_heat_capacity().validity(), t);
        }
        let vapour_needed = phase == Phase::Vapour || self.reference.phase == ReferencePhase::Vapour;
        if vapour_needed {
            let ts = self.switch_temperature(c, t_k);
            check("latent_heat", c.latent_heat().validity(), ts);
            let (a, b) = if phase == Phase::Vapour { (ts, t_k) } else { (ts, t_ref) };
            for t in [a.min(b), a.max(b)] {
                check("vapour_heat_capacity", c.vapour_heat_capacity().validity(), t);
            }
        }
    }
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

/// The split measured from pure liquid at the reference temperature.
fn from_liquid(
    c: &Component,
    phase: Phase,
    t_k: f64,
    reference: ReferenceState,
    path: VaporisationPath,
) -> EnthalpySplit {
    let t_ref = reference.temperature_k;
    match phase {
        Phase::Vapour => {
            let ts = switch_temperature(c, t_k, reference, path);
            EnthalpySplit {
                liquid_sensible_j_per_mol: c.liquid_heat_capacity().enthalpy_change(t_ref, ts),
                latent_j_per_mol: c.latent_heat().latent_heat(ts),
                vapour_sensible_j_per_mol: c.vapour_heat_capacity().enthalpy_change(ts, t_k),
            }
        }
        _ => EnthalpySplit {
            liquid_sensible_j_per_mol: c.liquid_heat_capacity().enthalpy_change(t_ref, t_k),
            ..EnthalpySplit::default()
        },
    }
}

/// The molar enthalpy of pure `c` in `phase` at `t_k` relative to `reference`, along `path`.
///
/// With a vapour reference every enthalpy is shifted by the same amount, the enthalpy of the
/// vapour at the reference temperature measured from the liquid there along the same path,
/// so duties along paths (a) and (b) do not depend on the reference state.
pub(crate) fn pure_enthalpy(
    c: &Component,
    phase: Phase,
    t_k: f64,
    reference: ReferenceState,
    path: VaporisationPath,
) -> EnthalpySplit {
    let split = from_liquid(c, phase, t_k, reference, path);
    match reference.phase {
        ReferencePhase::Liquid => split,
        ReferencePhase::Vapour => split.minus(from_liquid(c, Phase::Vapour, reference.temperature_k, reference, path)),
    }
}
