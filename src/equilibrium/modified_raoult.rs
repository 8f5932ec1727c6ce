//! [`ModifiedRaoult`]: Kᵢ = γᵢ(T, x) Psatᵢ(T) / P, Raoult's law with an activity model of
//! the liquid.

use super::kvalue::{KValueModel, KValues, Raoult};
use crate::activity::{ActivityError, ActivityModel, BinaryParameters, LiquidModel};
use crate::properties::Component;
use crate::warnings::{Warning, push_unique};
use std::cell::RefCell;
use std::sync::{Arc, OnceLock};

thread_local! {
    /// ln γ and ∂ln γ/∂T of one K-value evaluation, so that it does not allocate.
    static GAMMA: RefCell<(Vec<f64>, Vec<f64>)> = const { RefCell::new((Vec::new(), Vec::new())) };
}

/// The modified Raoult's law Kᵢ = γᵢ(T, x) Psatᵢ(T) / P: an ideal-gas vapour over a
/// non-ideal liquid described by a Wilson, NRTL or UNIQUAC model
/// ([`ActivityModel`]). ∂ln Kᵢ/∂T = dln Psatᵢ/dT + ∂ln γᵢ/∂T (analytic), ∂ln Kᵢ/∂P = −1/P.
/// K depends on the liquid composition, so the flash runs its outer loop on it.
///
/// ```
/// use flashduty::activity::{BinaryParameters, LiquidModel};
/// use flashduty::equilibrium::{flash, FlashSpec, ModifiedRaoult};
/// use flashduty::library::Library;
/// use flashduty::units::Pressure;
/// let c = Library::builtin().get_all(&["ethanol", "water"]).unwrap();
/// let m = ModifiedRaoult::new(c, LiquidModel::Nrtl, BinaryParameters::builtin()).unwrap();
/// let p = Pressure::parse("P", "1 atm").unwrap();
/// let r = flash(&m, &[0.1, 0.9], FlashSpec::BubbleTemperature { pressure: p }).unwrap();
/// // Perry's ethanol–water table at 1 atm (from memory): x = 0.0966, T = 86.7 °C; x = 0.1238, 85.3 °C.
/// assert!((r.temperature_k - 273.15 - 86.5).abs() < 1.0);
/// ```
#[derive(Debug, Clone)]
pub struct ModifiedRaoult {
    raoult: Raoult,
    activity: ActivityModel,
}

impl ModifiedRaoult {
    /// The `kind` model over `components`, its pair parameters from `set` (matched by each
    /// component's name, synonyms or CAS number).
    ///
    /// # Errors
    /// As [`ActivityModel::new`].
    pub fn new(
        components: Vec<Arc<Component>>,
        kind: LiquidModel,
        set: &BinaryParameters,
    ) -> Result<Self, ActivityError> {
        let names: Vec<&str> = components.iter().map(|c| c.name()).collect();
        let activity = ActivityModel::with_keys(kind, &names, &component_keys(&components), set)?;
        Ok(Self {
            raoult: Raoult::new(components),
            activity,
        })
    }

    /// The model over `components` with a ready activity model (of as many components).
    ///
    /// ```
    /// use flashduty::activity::{ActivityModel, BinaryParameters, LiquidModel};
    /// use flashduty::equilibrium::{KValueModel, ModifiedRaoult};
    /// use flashduty::library::Library;
    /// let a = ActivityModel::new(LiquidModel::Nrtl, &["ethanol", "water"], BinaryParameters::builtin()).unwrap();
    /// let m = ModifiedRaoult::from_parts(Library::builtin().get_all(&["ethanol", "water"]).unwrap(), a);
    /// assert_eq!(m.component_count(), 2);
    /// ```
    pub fn from_parts(components: Vec<Arc<Component>>, activity: ActivityModel) -> Self {
        Self {
            raoult: Raoult::new(components),
            activity,
        }
    }

    /// The activity model.
    pub fn activity(&self) -> &ActivityModel {
        &self.activity
    }

    /// The components.
    pub fn components(&self) -> &[Arc<Component>] {
        self.raoult.components()
    }
}

/// Each component's look-up keys: name, synonyms and CAS number, lower-cased.
pub(crate) fn component_keys(components: &[Arc<Component>]) -> Vec<Vec<String>> {
    components
        .iter()
        .map(|c| {
            std::iter::once(c.name())
                .chain(c.synonyms().iter().map(String::as_str))
                .chain(std::iter::once(c.cas()))
                .map(|s| s.trim().to_lowercase())
                .collect()
        })
        .collect()
}

impl KValueModel for ModifiedRaoult {
    fn component_count(&self) -> usize {
        self.raoult.component_count()
    }

    fn k_values(&self, t_k: f64, p_pa: f64, liquid: &[f64], vapour: &[f64], out: &mut KValues) {
        self.raoult.k_values(t_k, p_pa, liquid, vapour, out);
        let n = self.component_count();
        if liquid.len() != n {
            return;
        }
        GAMMA.with_borrow_mut(|(ln_gamma, slope)| {
            ln_gamma.resize(n, 0.0);
            slope.resize(n, 0.0);
            self.activity.ln_gamma(t_k, liquid, ln_gamma, slope);
            for i in 0..n {
                out.k[i] *= ln_gamma[i].exp();
                out.dln_k_dt[i] += slope[i];
            }
        });
    }

    fn is_composition_dependent(&self) -> bool {
        true
    }

    fn warnings(&self, t_k: f64, p_pa: f64, out: &mut Vec<Warning>) {
        self.raoult.warnings(t_k, p_pa, out);
        for pair in self.activity.pairs() {
            if let Some((lo, hi)) = pair.range_k
                && !(lo..=hi).contains(&t_k)
            {
                push_unique(
                    out,
                    Warning::PairParametersExtrapolated {
                        first: self.raoult.component_name(pair.indices.0),
                        second: self.raoult.component_name(pair.indices.1),
                        range_min_k: lo,
                        range_max_k: hi,
                        temperature_k: t_k,
                    },
                );
            }
        }
    }

    fn feed_warnings(&self, z: &[f64], out: &mut Vec<Warning>) {
        // The second-liquid warning of Raoult's law stands: these models are used here for
        // one liquid.
        self.raoult.second_liquid_warning(z, out);
        let has = |i: usize| z.get(i).is_some_and(|&v| v > 0.0);
        for &(i, j) in self.activity.missing_pairs() {
            if has(i) && has(j) {
                push_unique(
                    out,
                    Warning::PairWithoutParameters {
                        model: self.activity.kind().name(),
                        first: self.raoult.component_name(i),
                        second: self.raoult.component_name(j),
                    },
                );
            }
        }
    }

    fn component_name(&self, index: usize) -> String {
        self.raoult.component_name(index)
    }

    fn temperature_hint(&self, p_pa: f64) -> Option<(f64, f64)> {
        self.raoult.temperature_hint(p_pa)
    }
}

/// The built-in pairs whose liquids are strongly non-ideal, as pairs of look-up keys: the
/// built-in NRTL parameters give γ∞ above 1.5 or below 1/1.5 for either component at
/// 298.15 K (a ±50 % departure from Raoult's law; the threshold is this project's choice).
pub(crate) fn strongly_non_ideal_pairs() -> &'static [(String, String)] {
    static PAIRS: OnceLock<Vec<(String, String)>> = OnceLock::new();
    PAIRS.get_or_init(|| {
        let set = BinaryParameters::builtin();
        set.records()
            .iter()
            .filter(|rec| {
                let Ok(m) = ActivityModel::new(LiquidModel::Nrtl, &rec.components, set) else {
                    return false;
                };
                let (mut g, mut s) = ([0.0; 2], [0.0; 2]);
                [[1.0, 0.0], [0.0, 1.0]].iter().any(|x| {
                    m.ln_gamma(298.15, x, &mut g, &mut s);
                    g.iter().any(|v| v.abs() > 1.5f64.ln())
                })
            })
            .map(|rec| (rec.components[0].to_lowercase(), rec.components[1].to_lowercase()))
            .collect()
    })
}
