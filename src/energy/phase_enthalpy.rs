//! [`PhaseEnthalpyModel`]: the molar enthalpy of a phase of given composition, the seam
//! through which the energy layer takes any enthalpy model.

use super::ideal::EnthalpyModel;
use crate::difference::stencil;
use crate::rachford_rice::Phase;

/// A mixture-level phase-enthalpy model: the molar enthalpy of a liquid or vapour of given
/// composition at T and P, relative to the model's reference state, and its temperature
/// slope.
///
/// Two methods are required, [`component_count`](Self::component_count) and
/// [`phase_enthalpy`](Self::phase_enthalpy), as for
/// [`KValueModel`](crate::equilibrium::KValueModel). The partial molar enthalpies, which the
/// energy layer needs for dQ/dT of a two-phase state and for the enthalpy table, default to
/// central differences of `phase_enthalpy`; a model with an excess enthalpy or an
/// enthalpy of solution overrides them with its analytic form.
///
/// The library's [`EnthalpyModel`] (ideal mixing of the pure-component enthalpies along a
/// vaporisation path) implements it, and is what [`heater_duty`](super::heater_duty) and
/// the other functions use; the `_with` functions
/// ([`heater_duty_with`](super::heater_duty_with), ...) and
/// [`DutyCalculator::with_models`](super::DutyCalculator::with_models) take any model.
///
/// ```
/// use flashduty::energy::{EnthalpyModel, PhaseEnthalpyModel, ReferenceState, VaporisationPath};
/// use flashduty::library::Library;
/// use flashduty::rachford_rice::Phase;
/// /// Invented: the ideal model plus a symmetric heat of mixing of the liquid,
/// /// Hᴱ = a x₁ x₂ with a = −800 J/mol.
/// struct Mixing(EnthalpyModel);
/// impl PhaseEnthalpyModel for Mixing {
///     fn component_count(&self) -> usize { 2 }
///     fn phase_enthalpy(&self, phase: Phase, x: &[f64], t_k: f64, p_pa: f64) -> (f64, f64) {
///         let (h, slope) = PhaseEnthalpyModel::phase_enthalpy(&self.0, phase, x, t_k, p_pa);
///         let excess = if phase == Phase::Vapour { 0.0 } else { -800.0 * x[0] * x[1] };
///         (h + excess, slope)
///     }
///     fn ideal_base(&self) -> Option<&EnthalpyModel> { Some(&self.0) }
/// }
/// let c = Library::builtin().get_all(&["benzene", "toluene"]).unwrap();
/// let m = Mixing(EnthalpyModel::new(c, ReferenceState::default(), VaporisationPath::default()));
/// let mut h_bar = [0.0; 2];
/// m.partial_molar_enthalpies(Phase::Liquid, &[0.5, 0.5], 330.0, 1e5, &mut h_bar);
/// // Euler: the mole-fraction-weighted partial molar enthalpies add up to the enthalpy.
/// let (h, _) = m.phase_enthalpy(Phase::Liquid, &[0.5, 0.5], 330.0, 1e5);
/// assert!((0.5 * h_bar[0] + 0.5 * h_bar[1] - h).abs() < 1e-6 * h.abs());
/// ```
pub trait PhaseEnthalpyModel {
    /// The number of components the model describes.
    fn component_count(&self) -> usize;

    /// The molar enthalpy of `phase` (`Liquid` or `Vapour`) of composition `fractions` at
    /// `t_k` and `p_pa`, J/mol relative to the model's reference state, and its derivative
    /// with respect to temperature at constant pressure and composition, J/(mol·K).
    fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> (f64, f64);

    /// The partial molar enthalpies h̄ᵢ = ∂(n h)/∂nᵢ of `phase` of composition `fractions`
    /// at `t_k` and `p_pa`, J/mol, into `out` (one entry per component). Σ xᵢ h̄ᵢ = h.
    ///
    /// Default: h̄ᵢ = h + ∂h/∂xᵢ − Σₖ xₖ ∂h/∂xₖ, with each ∂h/∂xᵢ from a central difference of
    /// step 1e-6 (one-sided below it) of [`phase_enthalpy`](Self::phase_enthalpy).
    fn partial_molar_enthalpies(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64, out: &mut [f64]) {
        let (h, _) = self.phase_enthalpy(phase, fractions, t_k, p_pa);
        let mut x = fractions.to_vec();
        for (j, o) in out.iter_mut().enumerate().take(fractions.len()) {
            let v = fractions[j];
            *o = 0.0;
            for (offset, weight) in stencil(v) {
                if weight == 0.0 {
                    continue;
                }
                let at = if offset == 0.0 {
                    h
                } else {
                    x[j] = v + offset;
                    self.phase_enthalpy(phase, &x, t_k, p_pa).0
                };
                *o += weight * at;
            }
            x[j] = v;
        }
        let weighted: f64 = fractions.iter().zip(out.iter()).map(|(x, d)| x * d).sum();
        for o in out.iter_mut().take(fractions.len()) {
            *o += h - weighted;
        }
    }

    /// The ideal-mixing model this one is built on, where there is one: the energy layer
    /// reads the enthalpy table's per-path columns, the correlations' range warnings, the
    /// critical temperatures and the duty along the other vaporisation paths from it
    /// (whatever the model adds to it must not depend on the vaporisation path). Default:
    /// none, and then the table rows carry only the partial molar enthalpy and the path
    /// spread is zero.
    fn ideal_base(&self) -> Option<&EnthalpyModel> {
        None
    }

    /// Whether the model *is* its [`ideal_base`](Self::ideal_base), with nothing added: the
    /// energy layer then sums the pure-component enthalpies component by component, as
    /// hand calculations do. Default: no.
    fn is_ideal_mixing(&self) -> bool {
        false
    }
}

impl<H: PhaseEnthalpyModel + ?Sized> PhaseEnthalpyModel for &H {
    fn component_count(&self) -> usize {
        (**self).component_count()
    }
    fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> (f64, f64) {
        (**self).phase_enthalpy(phase, fractions, t_k, p_pa)
    }
    fn partial_molar_enthalpies(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64, out: &mut [f64]) {
        (**self).partial_molar_enthalpies(phase, fractions, t_k, p_pa, out)
    }
    fn ideal_base(&self) -> Option<&EnthalpyModel> {
        (**self).ideal_base()
    }
    fn is_ideal_mixing(&self) -> bool {
        (**self).is_ideal_mixing()
    }
}

impl PhaseEnthalpyModel for EnthalpyModel {
    fn component_count(&self) -> usize {
        self.components().len()
    }

    fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> (f64, f64) {
        (
            self.phase_enthalpy_at(phase, fractions, t_k, p_pa),
            self.phase_slope_at(phase, fractions, t_k, p_pa),
        )
    }

    /// Ideal mixing: each partial molar enthalpy is the pure component's.
    fn partial_molar_enthalpies(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64, out: &mut [f64]) {
        for (i, o) in out.iter_mut().enumerate().take(fractions.len()) {
            *o = self.pure_at(i, phase, t_k, p_pa).total_j_per_mol();
        }
    }

    fn ideal_base(&self) -> Option<&EnthalpyModel> {
        Some(self)
    }

    fn is_ideal_mixing(&self) -> bool {
        true
    }
}
