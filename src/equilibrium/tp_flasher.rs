//! [`TpFlasher`]: the isothermal flash for hot loops, without allocation.

use super::kvalue::{KValueModel, KValues};
use super::spec::FlashError;
use crate::rachford_rice::{self, Options};
use crate::units::{Pressure, Temperature};

/// A reusable isothermal flash for hot loops: the K-values and phase compositions live in
/// buffers owned by the flasher, so a flash allocates nothing. It gives the phase split
/// only; for warnings, sensitivities and the other specifications use [`flash`](super::flash).
///
/// A composition-dependent model is refused here ([`FlashError::NotConverged`] is never
/// returned by this type): use [`flash`](super::flash), whose outer loop handles it.
///
/// ```
/// use flashduty::equilibrium::{Raoult, TpFlasher};
/// use flashduty::rachford_rice::Phase;
/// use flashduty::units::{Pressure, Temperature};
/// let model = Raoult::from_names(&["n-hexane", "n-heptane"]).unwrap();
/// let mut flasher = TpFlasher::new(&model).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// for t in [340.0, 360.0, 380.0] {
///     let split = flasher.flash(&[0.5, 0.5], Temperature::new("T", t).unwrap(), p).unwrap();
///     if split.phase == Phase::TwoPhase {
///         assert!(flasher.liquid()[0] < 0.5 && flasher.vapour()[0] > 0.5);
///     }
/// }
/// ```
pub struct TpFlasher<'a, M: KValueModel + ?Sized> {
    model: &'a M,
    kv: KValues,
    x: Vec<f64>,
    y: Vec<f64>,
}

impl<M: KValueModel + ?Sized> std::fmt::Debug for TpFlasher<'_, M> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("TpFlasher")
            .field("components", &self.x.len())
            .field("k_values", &self.kv.k)
            .finish_non_exhaustive()
    }
}

impl<'a, M: KValueModel + ?Sized> TpFlasher<'a, M> {
    /// A flasher for `model`, with buffers for its components.
    ///
    /// # Errors
    /// [`FlashError::NoSolution`] for a composition-dependent model (use [`flash`](super::flash)).
    pub fn new(model: &'a M) -> Result<Self, FlashError> {
        if model.is_composition_dependent() {
            return Err(FlashError::NoSolution {
                what: "T-P flash",
                detail: "a composition-dependent K-value model needs flash(), which iterates on the compositions"
                    .to_string(),
            });
        }
        let n = model.component_count();
        Ok(Self {
            model,
            kv: KValues::new(n),
            x: vec![0.0; n],
            y: vec![0.0; n],
        })
    }

    /// The phase split of feed `z` at `temperature` and `pressure`; the compositions are then
    /// in [`liquid`](Self::liquid) and [`vapour`](Self::vapour), with the conventions of
    /// [`rachford_rice::solve_into`] for a single-phase feed.
    ///
    /// # Errors
    /// [`FlashError::ComponentCount`] when z does not match the model, and
    /// [`FlashError::Feed`] for a refused feed.
    pub fn flash(
        &mut self,
        z: &[f64],
        temperature: Temperature,
        pressure: Pressure,
    ) -> Result<rachford_rice::SplitSummary, FlashError> {
        tp_flash_into(
            self.model,
            z,
            temperature,
            pressure,
            &mut self.kv,
            &mut self.x,
            &mut self.y,
        )
    }

    /// Liquid mole fractions of the last flash.
    pub fn liquid(&self) -> &[f64] {
        &self.x
    }

    /// Vapour mole fractions of the last flash.
    pub fn vapour(&self) -> &[f64] {
        &self.y
    }

    /// K-values of the last flash.
    pub fn k_values(&self) -> &[f64] {
        &self.kv.k
    }
}

/// The flash of [`TpFlasher::flash`] into buffers the caller owns (K-values, liquid and
/// vapour mole fractions, each sized for the model), for callers that keep the model and
/// the buffers in one place of their own (the C interface's calculator handle, say).
///
/// # Errors
/// [`FlashError::ComponentCount`] when z or a buffer does not match the model, and
/// [`FlashError::Feed`] for a refused feed.
///
/// ```
/// use flashduty::equilibrium::{tp_flash_into, KValues, Raoult};
/// use flashduty::units::{Pressure, Temperature};
/// let model = Raoult::from_names(&["n-hexane", "n-heptane"]).unwrap();
/// let (mut kv, mut x, mut y) = (KValues::new(2), [0.0; 2], [0.0; 2]);
/// let t = Temperature::parse("T", "85 degC").unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let s = tp_flash_into(&model, &[0.5, 0.5], t, p, &mut kv, &mut x, &mut y).unwrap();
/// assert!(s.vapour_fraction > 0.0 && x[0] < y[0]);
/// ```
pub fn tp_flash_into<M: KValueModel + ?Sized>(
    model: &M,
    z: &[f64],
    temperature: Temperature,
    pressure: Pressure,
    kv: &mut KValues,
    x: &mut [f64],
    y: &mut [f64],
) -> Result<rachford_rice::SplitSummary, FlashError> {
    let n = model.component_count();
    for len in [z.len(), kv.k.len(), x.len(), y.len()] {
        if len != n {
            return Err(FlashError::ComponentCount { components: n, z: len });
        }
    }
    if model.is_composition_dependent() {
        return Err(FlashError::NoSolution {
            what: "T-P flash",
            detail: "a composition-dependent K-value model needs flash(), which iterates on the compositions"
                .to_string(),
        });
    }
    model.k_values(temperature.kelvin(), pressure.pascal(), &[], &[], kv);
    Ok(rachford_rice::solve_into(z, &kv.k, Options::default(), x, y)?)
}
