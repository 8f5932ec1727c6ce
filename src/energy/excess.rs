//! [`ExcessEnthalpyModel`]: ideal mixing plus the excess enthalpy of an activity model's
//! liquid.

use super::ideal::EnthalpyModel;
use super::phase_enthalpy::PhaseEnthalpyModel;
use crate::activity::ActivityModel;
use crate::rachford_rice::Phase;

/// The phase enthalpy of a non-ideal liquid: the ideal-mixing [`EnthalpyModel`] plus the
/// excess enthalpy Hᴱ = −RT² Σ xᵢ ∂ln γᵢ/∂T of the [`ActivityModel`] (Gibbs–Helmholtz) in
/// the liquid; the vapour is as in the base model. Its partial molar enthalpies add
/// h̄ᴱᵢ = −RT² ∂ln γᵢ/∂T (analytic). The temperature slope of Hᴱ (the excess heat capacity)
/// is a central difference of Hᴱ with a step of 1e-5 T.
///
/// Take it with [`ModifiedRaoult`](crate::equilibrium::ModifiedRaoult) of the same activity
/// model, so that the energy balance and the phase split describe one liquid.
///
/// ```
/// use flashduty::activity::{ActivityModel, BinaryParameters, LiquidModel};
/// use flashduty::energy::{EnthalpyModel, ExcessEnthalpyModel, PhaseEnthalpyModel, ReferenceState, VaporisationPath};
/// use flashduty::library::Library;
/// use flashduty::rachford_rice::Phase;
/// let c = Library::builtin().get_all(&["acetone", "chloroform"]).unwrap();
/// let ideal = EnthalpyModel::new(c, ReferenceState::default(), VaporisationPath::default());
/// let activity = ActivityModel::new(LiquidModel::Nrtl, &["acetone", "chloroform"], BinaryParameters::builtin()).unwrap();
/// let m = ExcessEnthalpyModel::new(ideal.clone(), activity).unwrap();
/// let x = [0.5, 0.5];
/// let (h, _) = m.phase_enthalpy(Phase::Liquid, &x, 330.0, 1e5);
/// let (h0, _) = PhaseEnthalpyModel::phase_enthalpy(&ideal, Phase::Liquid, &x, 330.0, 1e5);
/// // Acetone and chloroform mix with heat given out (a hydrogen bond forms): Hᴱ < 0.
/// assert!(h < h0);
/// ```
#[derive(Debug, Clone)]
pub struct ExcessEnthalpyModel {
    base: EnthalpyModel,
    activity: ActivityModel,
}

impl ExcessEnthalpyModel {
    /// The base model plus the activity model's excess enthalpy.
    ///
    /// Returns `None` where the two describe different numbers of components.
    pub fn new(base: EnthalpyModel, activity: ActivityModel) -> Option<Self> {
        (base.components().len() == activity.component_count()).then_some(Self { base, activity })
    }

    /// The activity model.
    pub fn activity(&self) -> &ActivityModel {
        &self.activity
    }
}

impl PhaseEnthalpyModel for ExcessEnthalpyModel {
    fn component_count(&self) -> usize {
        self.activity.component_count()
    }

    fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> (f64, f64) {
        let (h, slope) = PhaseEnthalpyModel::phase_enthalpy(&self.base, phase, fractions, t_k, p_pa);
        if phase == Phase::Vapour {
            return (h, slope);
        }
        let step = 1e-5 * t_k;
        let excess = self.activity.excess_enthalpy_j_per_mol(t_k, fractions);
        let excess_slope = (self.activity.excess_enthalpy_j_per_mol(t_k + step, fractions)
            - self.activity.excess_enthalpy_j_per_mol(t_k - step, fractions))
            / (2.0 * step);
        (h + excess, slope + excess_slope)
    }

    fn partial_molar_enthalpies(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64, out: &mut [f64]) {
        self.base.partial_molar_enthalpies(phase, fractions, t_k, p_pa, out);
        if phase == Phase::Vapour {
            return;
        }
        let mut excess = vec![0.0; fractions.len()];
        self.activity.partial_excess_enthalpies(t_k, fractions, &mut excess);
        out.iter_mut().zip(&excess).for_each(|(o, e)| *o += e);
    }

    fn ideal_base(&self) -> Option<&EnthalpyModel> {
        Some(&self.base)
    }
}
