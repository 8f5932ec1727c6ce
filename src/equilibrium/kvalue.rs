//! K-value models: the ratio Kᵢ = yᵢ / xᵢ at equilibrium.

use crate::difference::stencil;
use crate::library::{Library, UnknownComponent};
use crate::properties::{Component, VapourPressure};
use crate::warnings::{RAOULT_PRESSURE_LIMIT_PA, Warning, push_unique};
use std::sync::Arc;

/// K-values and their derivatives at one state, in caller-owned buffers.
///
/// ```
/// use flashduty::equilibrium::KValues;
/// let kv = KValues::new(3);
/// assert_eq!(kv.k.len(), 3);
/// ```
#[derive(Debug, Clone, Default, PartialEq)]
pub struct KValues {
    /// Kᵢ.
    pub k: Vec<f64>,
    /// ∂ln Kᵢ / ∂T at constant P and composition, 1/K.
    pub dln_k_dt: Vec<f64>,
    /// ∂ln Kᵢ / ∂P at constant T and composition, 1/Pa.
    pub dln_k_dp: Vec<f64>,
}

impl KValues {
    /// Zeroed buffers for `n` components.
    pub fn new(n: usize) -> Self {
        Self {
            k: vec![0.0; n],
            dln_k_dt: vec![0.0; n],
            dln_k_dp: vec![0.0; n],
        }
    }
}

/// A K-value model: Kᵢ from temperature, pressure and (for non-ideal models) the phase
/// compositions, with ∂ln K/∂T and ∂ln K/∂P.
///
/// Two methods are required: [`component_count`](Self::component_count) and
/// [`k_values`](Self::k_values). A model whose K-values depend on composition (a modified
/// Raoult's law with activity coefficients, say) returns `true` from
/// [`is_composition_dependent`](Self::is_composition_dependent); the flash code then wraps
/// each specification in an outer successive-substitution loop on the phase compositions,
/// so no flash code changes when such a model is added.
///
/// ```
/// use flashduty::equilibrium::{KValueModel, KValues, flash, FlashSpec};
/// use flashduty::units::{Temperature, Pressure};
/// /// Invented K-values that halve as pressure doubles and rise 3 % per kelvin.
/// struct Chart;
/// impl KValueModel for Chart {
///     fn component_count(&self) -> usize { 2 }
///     fn k_values(&self, t: f64, p: f64, _x: &[f64], _y: &[f64], out: &mut KValues) {
///         for (i, k0) in [4.0, 0.25].into_iter().enumerate() {
///             out.k[i] = k0 * (0.03 * (t - 300.0)).exp() * 1e5 / p;
///             out.dln_k_dt[i] = 0.03;
///             out.dln_k_dp[i] = -1.0 / p;
///         }
///     }
/// }
/// let spec = FlashSpec::TemperaturePressure {
///     temperature: Temperature::new("T", 300.0).unwrap(),
///     pressure: Pressure::new("P", 1e5).unwrap(),
/// };
/// let r = flash(&Chart, &[0.5, 0.5], spec).unwrap();
/// assert!((r.vapour_fraction - 0.5).abs() < 1e-12);
/// ```
pub trait KValueModel {
    /// The number of components the model describes.
    fn component_count(&self) -> usize;

    /// Writes Kᵢ, ∂ln Kᵢ/∂T and ∂ln Kᵢ/∂P at `t_k`, `p_pa` for the given liquid and vapour
    /// compositions into `out`, whose vectors have
    /// [`component_count`](Self::component_count) entries. Composition-independent models
    /// are handed empty composition slices.
    fn k_values(&self, t_k: f64, p_pa: f64, liquid: &[f64], vapour: &[f64], out: &mut KValues);

    /// Whether K depends on the phase compositions. Default: no.
    fn is_composition_dependent(&self) -> bool {
        false
    }

    /// Adds the model's warnings at this state (extrapolated correlations, supercritical
    /// components, pressure too high for the model). Default: none.
    fn warnings(&self, _t_k: f64, _p_pa: f64, _out: &mut Vec<Warning>) {}

    /// Adds warnings about the feed `z` itself to `out` (Raoult's law warns that water and a
    /// water-immiscible component in one liquid likely form two). Default: none.
    fn feed_warnings(&self, _z: &[f64], _out: &mut Vec<Warning>) {}

    /// The components' names, for messages. Default: "component 1", "component 2", ...
    fn component_name(&self, index: usize) -> String {
        format!("component {}", index + 1)
    }

    /// A first guess at the temperatures (K) between which the bubble and dew points at
    /// `p_pa` lie; searches widen it as needed. Default: none.
    fn temperature_hint(&self, _p_pa: f64) -> Option<(f64, f64)> {
        None
    }

    /// The composition derivatives of ln K at `t_k`, `p_pa`, `liquid`, `vapour`, row-major
    /// n × n: `dln_k_dx[i * n + j]` = ∂ln Kᵢ/∂xⱼ and `dln_k_dy[i * n + j]` = ∂ln Kᵢ/∂yⱼ, each
    /// mole fraction taken as an independent variable. Only composition-dependent models
    /// are asked (for dβ/dT, dβ/dP and dQ/dT of a two-phase state).
    ///
    /// Default: central differences of [`k_values`](Self::k_values) with a step of 1e-6
    /// (a three-point one-sided difference for a mole fraction below the step, from the
    /// K-values at the given compositions, evaluated once), which is
    /// accurate to about 1e-9 relative for smooth models. A model with analytic
    /// derivatives overrides it.
    ///
    /// ```
    /// use flashduty::equilibrium::{GivenK, KValueModel};
    /// let (mut dx, mut dy) = (vec![1.0; 4], vec![1.0; 4]);
    /// GivenK::new(vec![2.0, 0.5]).composition_derivatives(300.0, 1e5, &[0.5, 0.5], &[0.8, 0.2], &mut dx, &mut dy);
    /// assert_eq!((dx, dy), (vec![0.0; 4], vec![0.0; 4]));
    /// ```
    fn composition_derivatives(
        &self,
        t_k: f64,
        p_pa: f64,
        liquid: &[f64],
        vapour: &[f64],
        dln_k_dx: &mut [f64],
        dln_k_dy: &mut [f64],
    ) {
        let n = self.component_count();
        dln_k_dx.iter_mut().for_each(|d| *d = 0.0);
        dln_k_dy.iter_mut().for_each(|d| *d = 0.0);
        if !self.is_composition_dependent() || liquid.len() != n || vapour.len() != n {
            return;
        }
        let mut kv = KValues::new(n);
        let mut ln_k = |x: &[f64], y: &[f64], out: &mut Vec<f64>| {
            self.k_values(t_k, p_pa, x, y, &mut kv);
            out.clear();
            out.extend(kv.k.iter().map(|k| k.ln()));
        };
        let (mut x, mut y) = (liquid.to_vec(), vapour.to_vec());
        let (mut at_start, mut shifted) = (Vec::new(), Vec::new());
        ln_k(&x, &y, &mut at_start);
        for (which, out) in [(0, &mut *dln_k_dx), (1, &mut *dln_k_dy)] {
            for j in 0..n {
                let v0 = if which == 0 { x[j] } else { y[j] };
                for (offset, weight) in stencil(v0) {
                    if weight == 0.0 {
                        continue;
                    }
                    let values = if offset == 0.0 {
                        &at_start
                    } else {
                        let v = if which == 0 { &mut x[j] } else { &mut y[j] };
                        *v = v0 + offset;
                        ln_k(&x, &y, &mut shifted);
                        &shifted
                    };
                    for i in 0..n {
                        out[i * n + j] += weight * values[i];
                    }
                }
                if which == 0 {
                    x[j] = v0;
                } else {
                    y[j] = v0;
                }
            }
        }
    }
}

impl<M: KValueModel + ?Sized> KValueModel for &M {
    fn component_count(&self) -> usize {
        (**self).component_count()
    }
    fn k_values(&self, t_k: f64, p_pa: f64, liquid: &[f64], vapour: &[f64], out: &mut KValues) {
        (**self).k_values(t_k, p_pa, liquid, vapour, out)
    }
    fn is_composition_dependent(&self) -> bool {
        (**self).is_composition_dependent()
    }
    fn warnings(&self, t_k: f64, p_pa: f64, out: &mut Vec<Warning>) {
        (**self).warnings(t_k, p_pa, out)
    }
    fn feed_warnings(&self, z: &[f64], out: &mut Vec<Warning>) {
        (**self).feed_warnings(z, out)
    }
    fn component_name(&self, index: usize) -> String {
        (**self).component_name(index)
    }
    fn temperature_hint(&self, p_pa: f64) -> Option<(f64, f64)> {
        (**self).temperature_hint(p_pa)
    }
    fn composition_derivatives(
        &self,
        t_k: f64,
        p_pa: f64,
        liquid: &[f64],
        vapour: &[f64],
        dln_k_dx: &mut [f64],
        dln_k_dy: &mut [f64],
    ) {
        (**self).composition_derivatives(t_k, p_pa, liquid, vapour, dln_k_dx, dln_k_dy)
    }
}

/// Raoult's law: Kᵢ = Psatᵢ(T) / P, for ideal liquid and ideal-gas vapour.
///
/// Pros: needs only vapour pressures; exact for ideal mixtures at low pressure. Cons: wrong
/// for mixtures with strong liquid non-ideality (alcohol–water, for example) and at
/// pressures above a few bar; a component above its critical temperature is extrapolated.
///
/// ```
/// use flashduty::equilibrium::{KValueModel, KValues, Raoult};
/// let m = Raoult::from_names(&["benzene", "toluene"]).unwrap();
/// let mut kv = KValues::new(2);
/// m.k_values(360.0, 101_325.0, &[], &[], &mut kv);
/// assert!(kv.k[0] > 1.0 && kv.k[1] < 1.0);
/// ```
#[derive(Debug, Clone)]
pub struct Raoult {
    components: Vec<Arc<Component>>,
}

impl Raoult {
    /// A model over the given components.
    pub fn new(components: Vec<Arc<Component>>) -> Self {
        Self { components }
    }

    /// A model over built-in components looked up by name, synonym or CAS number.
    ///
    /// # Errors
    /// [`UnknownComponent`] with suggestions.
    pub fn from_names<S: AsRef<str>>(names: &[S]) -> Result<Self, UnknownComponent> {
        Self::from_library(Library::builtin(), names)
    }

    /// A model over components looked up in `library`.
    ///
    /// # Errors
    /// [`UnknownComponent`] with suggestions.
    pub fn from_library<S: AsRef<str>>(library: &Library, names: &[S]) -> Result<Self, UnknownComponent> {
        Ok(Self::new(library.get_all(names)?))
    }

    /// The components.
    pub fn components(&self) -> &[Arc<Component>] {
        &self.components
    }

    /// The warning that water and a water-immiscible component in one liquid likely form two.
    pub(crate) fn second_liquid_warning(&self, z: &[f64], out: &mut Vec<Warning>) {
        let has = |i: usize| z.get(i).is_some_and(|&v| v > 0.0);
        let Some(water) = self
            .components
            .iter()
            .position(|c| c.cas() == crate::equilibrium::WATER_CAS)
        else {
            return;
        };
        if !has(water) {
            return;
        }
        let immiscible: Vec<String> = (0..self.components.len())
            .filter(|&i| {
                has(i)
                    && self.components[i].water_miscibility() == Some(crate::properties::WaterMiscibility::Immiscible)
            })
            .map(|i| self.components[i].name().to_string())
            .collect();
        if !immiscible.is_empty() {
            push_unique(out, Warning::SecondLiquidLikely { components: immiscible });
        }
    }
}

impl KValueModel for Raoult {
    fn component_count(&self) -> usize {
        self.components.len()
    }

    #[inline]
    fn k_values(&self, t_k: f64, p_pa: f64, _liquid: &[f64], _vapour: &[f64], out: &mut KValues) {
        let ln_p = p_pa.ln();
        let dln_k_dp = -1.0 / p_pa;
        for (i, c) in self.components.iter().enumerate() {
            let (ln_psat, slope) = c.vapour_pressure().ln_psat_with_slope(t_k);
            out.k[i] = (ln_psat - ln_p).exp();
            out.dln_k_dt[i] = slope;
            out.dln_k_dp[i] = dln_k_dp;
        }
    }

    fn warnings(&self, t_k: f64, p_pa: f64, out: &mut Vec<Warning>) {
        for c in &self.components {
            let vp = c.vapour_pressure();
            if vp.is_extrapolated(t_k) {
                let r = vp.validity();
                push_unique(
                    out,
                    Warning::CorrelationExtrapolated {
                        component: c.name().to_string(),
                        correlation: "vapour_pressure",
                        range_min_k: r.min_k,
                        range_max_k: r.max_k,
                        temperature_k: t_k,
                    },
                );
            }
            if t_k > c.critical_temperature_k() {
                push_unique(
                    out,
                    Warning::Supercritical {
                        component: c.name().to_string(),
                        critical_temperature_k: c.critical_temperature_k(),
                        temperature_k: t_k,
                    },
                );
            }
        }
        for c in &self.components {
            if crate::warnings::ASSOCIATING_VAPOUR_CAS.contains(&c.cas()) {
                push_unique(
                    out,
                    Warning::VapourAssociates {
                        component: c.name().to_string(),
                    },
                );
            }
        }
        if p_pa > RAOULT_PRESSURE_LIMIT_PA {
            push_unique(
                out,
                Warning::HighPressure {
                    pressure_pa: p_pa,
                    limit_pa: RAOULT_PRESSURE_LIMIT_PA,
                },
            );
        }
    }

    /// The second-liquid warning (water with immiscible components) and, for a pair the
    /// library knows to be strongly non-ideal, the non-ideal-liquid warning.
    fn feed_warnings(&self, z: &[f64], out: &mut Vec<Warning>) {
        self.second_liquid_warning(z, out);
        let has = |i: usize| z.get(i).is_some_and(|&v| v > 0.0);
        let find = |name: &str| self.components.iter().position(|c| c.name().eq_ignore_ascii_case(name));
        for (a, b) in super::modified_raoult::strongly_non_ideal_pairs() {
            if let (Some(i), Some(j)) = (find(a), find(b))
                && has(i)
                && has(j)
            {
                push_unique(
                    out,
                    Warning::NonIdealLiquid {
                        first: self.components[i].name().to_string(),
                        second: self.components[j].name().to_string(),
                    },
                );
            }
        }
    }

    fn component_name(&self, index: usize) -> String {
        self.components
            .get(index)
            .map_or_else(|| format!("component {}", index + 1), |c| c.name().to_string())
    }

    /// Each component's saturation temperature at `p_pa` from the Clausius–Clapeyron line
    /// through its normal boiling point; the bubble and dew points lie between the lowest
    /// and the highest.
    fn temperature_hint(&self, p_pa: f64) -> Option<(f64, f64)> {
        let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
        for c in &self.components {
            let tb = c.normal_boiling_point_k();
            let (ln_pb, slope) = c.vapour_pressure().ln_psat_with_slope(tb);
            let b = slope * tb * tb;
            let inv = 1.0 / tb - (p_pa.ln() - ln_pb) / b;
            let t = if inv > 0.0 {
                1.0 / inv
            } else {
                10.0 * c.critical_temperature_k()
            };
            if t.is_finite() && t > 0.0 {
                lo = lo.min(t);
                hi = hi.max(t);
            }
        }
        (lo.is_finite() && hi > 0.0).then_some((lo, hi))
    }
}

/// Fixed K-values given by the caller (plant data, charts): the same at every T and P.
///
/// ```
/// use flashduty::equilibrium::{GivenK, KValueModel, KValues};
/// let m = GivenK::new(vec![2.0, 0.5]);
/// let mut kv = KValues::new(2);
/// m.k_values(300.0, 1e5, &[], &[], &mut kv);
/// assert_eq!(kv.k, vec![2.0, 0.5]);
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct GivenK {
    k: Vec<f64>,
}

impl GivenK {
    /// K-values, one per component.
    pub fn new(k: Vec<f64>) -> Self {
        Self { k }
    }
}

impl KValueModel for GivenK {
    fn component_count(&self) -> usize {
        self.k.len()
    }
    fn k_values(&self, _t_k: f64, _p_pa: f64, _liquid: &[f64], _vapour: &[f64], out: &mut KValues) {
        out.k.copy_from_slice(&self.k);
        out.dln_k_dt.iter_mut().for_each(|d| *d = 0.0);
        out.dln_k_dp.iter_mut().for_each(|d| *d = 0.0);
    }
}
