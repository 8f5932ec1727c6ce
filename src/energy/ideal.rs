//! [`EnthalpyModel`]: ideal mixing of the pure-component enthalpies along a vaporisation
//! path, the energy layer's default phase-enthalpy model, and [`EnthalpySplit`], a
//! pure-component enthalpy split into the heats of its path.

use super::options::DutyOptions;
use super::path_table::PathTable;
use super::reference::{ReferenceState, VaporisationPath, VapourModel};
use crate::properties::Component;
use crate::rachford_rice::Phase;
use serde::Serialize;
use std::sync::Arc;

/// A pure-component molar enthalpy relative to the reference state, split into the
/// heats of its path.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct EnthalpySplit {
    /// Liquid sensible heat, J/mol.
    pub liquid_sensible_j_per_mol: f64,
    /// Latent heat (negative where the path condenses), J/mol.
    pub latent_j_per_mol: f64,
    /// Vapour sensible heat (ideal gas), J/mol.
    pub vapour_sensible_j_per_mol: f64,
    /// The vapour's departure from the ideal gas, J/mol: under
    /// [`VapourModel::SecondVirial`], H^R(T, P) − H^R at the point where the path vaporises
    /// (and, for a vapour reference, plus H^R at the reference's vaporisation point, also in
    /// liquid rows); zero under [`VapourModel::IdealGas`].
    ///
    /// ```
    /// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath, VapourModel};
    /// use flashduty::library::Library;
    /// use flashduty::rachford_rice::Phase;
    /// let water = Library::builtin().get("water").unwrap().clone();
    /// let h = EnthalpyModel::new(vec![water], ReferenceState::default(), VaporisationPath::default())
    ///     .with_vapour_model(VapourModel::SecondVirial);
    /// // Steam at 150 °C and 1 atm lies below the ideal gas, but less far than the saturated
    /// // vapour at 100 °C, which the latent heat describes.
    /// let d = h.pure_at(0, Phase::Vapour, 423.15, 101_325.0).vapour_departure_j_per_mol;
    /// assert!(d > 0.0 && d < 100.0, "{d}");
    /// ```
    pub vapour_departure_j_per_mol: f64,
}

impl EnthalpySplit {
    /// The sum of the parts, J/mol.
    pub fn total_j_per_mol(&self) -> f64 {
        let sum = self.liquid_sensible_j_per_mol + self.latent_j_per_mol + self.vapour_sensible_j_per_mol;
        // Added only where there is one, so that the ideal-gas sums are the same to the bit
        // (a negative zero stays negative).
        if self.vapour_departure_j_per_mol == 0.0 {
            sum
        } else {
            sum + self.vapour_departure_j_per_mol
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
///
/// Under [`VapourModel::SecondVirial`] ([`with_vapour_model`](Self::with_vapour_model)) the
/// vapour's enthalpy depends on pressure: the `_at` methods take it, and the others give the
/// vapour at zero pressure (the ideal-gas state). Under the default
/// [`VapourModel::IdealGas`] both give the same numbers.
#[derive(Debug, Clone)]
pub struct EnthalpyModel {
    components: Vec<Arc<Component>>,
    reference: ReferenceState,
    path: VaporisationPath,
    table: PathTable,
}

impl EnthalpyModel {
    /// The model of `options` (reference state, vaporisation path and vapour model) over
    /// `components`: the one [`heater_duty`](super::heater_duty) builds.
    ///
    /// ```
    /// use flashduty::energy::{DutyOptions, EnthalpyModel, VapourModel};
    /// use flashduty::library::Library;
    /// let c = Library::builtin().get_all(&["benzene"]).unwrap();
    /// let o = DutyOptions { vapour_model: VapourModel::SecondVirial, ..DutyOptions::default() };
    /// assert_eq!(EnthalpyModel::from_options(c, o).options(), o);
    /// ```
    pub fn from_options(components: Vec<Arc<Component>>, options: DutyOptions) -> Self {
        let table = PathTable::new(&components, options.reference, options.path, options.vapour_model);
        Self {
            components,
            reference: options.reference,
            path: options.path,
            table,
        }
    }

    /// The reference state, vaporisation path and vapour model.
    ///
    /// ```
    /// use flashduty::energy::{DutyOptions, EnthalpyModel, ReferenceState, VaporisationPath};
    /// let h = EnthalpyModel::new(vec![], ReferenceState::default(), VaporisationPath::StreamTemperature);
    /// assert_eq!(h.options().path, VaporisationPath::StreamTemperature);
    /// ```
    pub fn options(&self) -> DutyOptions {
        DutyOptions {
            reference: self.reference,
            path: self.path,
            vapour_model: self.vapour_model(),
        }
    }

    /// The per-component constants.
    #[inline]
    pub(crate) fn table(&self) -> &PathTable {
        &self.table
    }

    /// A model over `components`, with an ideal-gas vapour.
    pub fn new(components: Vec<Arc<Component>>, reference: ReferenceState, path: VaporisationPath) -> Self {
        let table = PathTable::new(&components, reference, path, VapourModel::IdealGas);
        Self {
            components,
            reference,
            path,
            table,
        }
    }

    /// The model with the vapour described by `vapour_model`.
    ///
    /// ```
    /// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath, VapourModel};
    /// use flashduty::library::Library;
    /// let benzene = Library::builtin().get("benzene").unwrap().clone();
    /// let h = EnthalpyModel::new(vec![benzene], ReferenceState::default(), VaporisationPath::default())
    ///     .with_vapour_model(VapourModel::SecondVirial);
    /// assert_eq!(h.vapour_model(), VapourModel::SecondVirial);
    /// ```
    pub fn with_vapour_model(mut self, vapour_model: VapourModel) -> Self {
        self.table = PathTable::new(&self.components, self.reference, self.path, vapour_model);
        self
    }

    /// The vapour model.
    ///
    /// ```
    /// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath, VapourModel};
    /// let h = EnthalpyModel::new(vec![], ReferenceState::default(), VaporisationPath::default());
    /// assert_eq!(h.vapour_model(), VapourModel::IdealGas);
    /// ```
    pub fn vapour_model(&self) -> VapourModel {
        self.table.vapour_model()
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
    /// of range gives zero. A vapour is taken at zero pressure (see
    /// [`pure_at`](Self::pure_at)).
    pub fn pure(&self, index: usize, phase: Phase, t_k: f64) -> EnthalpySplit {
        self.pure_at(index, phase, t_k, 0.0)
    }

    /// [`pure`](Self::pure) at pressure `p_pa`, which enters the vapour's
    /// [`vapour_departure_j_per_mol`](EnthalpySplit::vapour_departure_j_per_mol) under
    /// [`VapourModel::SecondVirial`].
    ///
    /// ```
    /// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath, VapourModel};
    /// use flashduty::library::Library;
    /// use flashduty::rachford_rice::Phase;
    /// let water = Library::builtin().get("water").unwrap().clone();
    /// let ideal = EnthalpyModel::new(vec![water], ReferenceState::default(), VaporisationPath::default());
    /// let real = ideal.clone().with_vapour_model(VapourModel::SecondVirial);
    /// // Saturated steam at its normal boiling point and 1 atm: the same enthalpy under both
    /// // models, the library's latent heat.
    /// let tb = 373.124;
    /// let (a, b) = (ideal.pure_at(0, Phase::Vapour, tb, 101_325.0), real.pure_at(0, Phase::Vapour, tb, 101_325.0));
    /// assert!((a.total_j_per_mol() - b.total_j_per_mol()).abs() < 1e-9);
    /// // At 10 bar the real vapour lies lower.
    /// assert!(real.pure_at(0, Phase::Vapour, 473.15, 1e6).total_j_per_mol()
    ///     < ideal.pure_at(0, Phase::Vapour, 473.15, 1e6).total_j_per_mol());
    /// ```
    pub fn pure_at(&self, index: usize, phase: Phase, t_k: f64, p_pa: f64) -> EnthalpySplit {
        self.table.split_at(&self.components, index, phase, t_k, p_pa)
    }

    /// d h / dT of pure component `index` in `phase` at `t_k`, J/(mol·K); a vapour at zero
    /// pressure.
    pub fn pure_slope(&self, index: usize, phase: Phase, t_k: f64) -> f64 {
        self.pure_slope_at(index, phase, t_k, 0.0)
    }

    /// [`pure_slope`](Self::pure_slope) at constant pressure `p_pa`, J/(mol·K).
    ///
    /// ```
    /// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath, VapourModel};
    /// use flashduty::library::Library;
    /// use flashduty::rachford_rice::Phase;
    /// let water = Library::builtin().get("water").unwrap().clone();
    /// let h = EnthalpyModel::new(vec![water], ReferenceState::default(), VaporisationPath::default())
    ///     .with_vapour_model(VapourModel::SecondVirial);
    /// let (t, p, dt) = (473.15, 1e6, 1e-3);
    /// let fd = (h.pure_at(0, Phase::Vapour, t + dt, p).total_j_per_mol()
    ///     - h.pure_at(0, Phase::Vapour, t - dt, p).total_j_per_mol()) / (2.0 * dt);
    /// assert!((h.pure_slope_at(0, Phase::Vapour, t, p) / fd - 1.0).abs() < 1e-6);
    /// ```
    pub fn pure_slope_at(&self, index: usize, phase: Phase, t_k: f64, p_pa: f64) -> f64 {
        self.table.slope_at(&self.components, index, phase, t_k, p_pa)
    }

    /// The molar enthalpy of a phase of composition `fractions` at `t_k`, J/mol; a vapour
    /// at zero pressure.
    pub fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64) -> f64 {
        self.phase_enthalpy_at(phase, fractions, t_k, 0.0)
    }

    /// [`phase_enthalpy`](Self::phase_enthalpy) at pressure `p_pa`, J/mol.
    ///
    /// ```
    /// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath, VapourModel};
    /// use flashduty::library::Library;
    /// use flashduty::rachford_rice::Phase;
    /// let c = Library::builtin().get_all(&["benzene", "toluene"]).unwrap();
    /// let h = EnthalpyModel::new(c, ReferenceState::default(), VaporisationPath::default())
    ///     .with_vapour_model(VapourModel::SecondVirial);
    /// let mix = h.phase_enthalpy_at(Phase::Vapour, &[0.5, 0.5], 450.0, 2e5);
    /// let pure = 0.5 * h.pure_at(0, Phase::Vapour, 450.0, 2e5).total_j_per_mol()
    ///     + 0.5 * h.pure_at(1, Phase::Vapour, 450.0, 2e5).total_j_per_mol();
    /// assert!((mix - pure).abs() < 1e-9 * pure.abs());
    /// ```
    pub fn phase_enthalpy_at(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        self.table
            .phase_enthalpy_at(&self.components, phase, fractions, t_k, p_pa)
    }

    /// d/dT at constant pressure and composition of
    /// [`phase_enthalpy_at`](Self::phase_enthalpy_at), J/(mol·K).
    ///
    /// ```
    /// use flashduty::energy::{EnthalpyModel, ReferenceState, VaporisationPath};
    /// use flashduty::library::Library;
    /// use flashduty::rachford_rice::Phase;
    /// let c = Library::builtin().get_all(&["benzene", "toluene"]).unwrap();
    /// let h = EnthalpyModel::new(c, ReferenceState::default(), VaporisationPath::default());
    /// let (x, t, dt) = ([0.3, 0.7], 330.0, 1e-3);
    /// let fd = (h.phase_enthalpy_at(Phase::Liquid, &x, t + dt, 1e5) - h.phase_enthalpy_at(Phase::Liquid, &x, t - dt, 1e5)) / (2.0 * dt);
    /// assert!((h.phase_slope_at(Phase::Liquid, &x, t, 1e5) / fd - 1.0).abs() < 1e-6);
    /// ```
    pub fn phase_slope_at(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        self.table.phase_slope_at(&self.components, phase, fractions, t_k, p_pa)
    }
}
