//! [`LiquidModel`] (the case key) and [`ActivityModel`] (a model over a list of components).

use super::error::ActivityError;
use super::pairs::{self, BinaryParameters};
use super::{nrtl, uniquac, wilson};
use crate::units::GAS_CONSTANT;
use std::cell::RefCell;
use std::fmt;
use std::str::FromStr;

thread_local! {
    /// Working storage of [`ActivityModel::ln_gamma`] (the clipped, normalised composition
    /// and the formulas' matrices), so that K-value evaluations in a flash do not allocate.
    static SCRATCH: RefCell<(Vec<f64>, Vec<f64>)> = const { RefCell::new((Vec::new(), Vec::new())) };
}

/// Which liquid model a case uses: the case key `"liquid_model"`.
///
/// ```
/// use flashduty::activity::LiquidModel;
/// let m: LiquidModel = "NRTL".parse().unwrap();
/// assert_eq!(m, LiquidModel::Nrtl);
/// assert_eq!(m.to_string(), "nrtl");
/// assert!("margules".parse::<LiquidModel>().is_err());
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum LiquidModel {
    /// An ideal liquid: Raoult's law (the default).
    #[default]
    Ideal,
    /// The Wilson equation.
    Wilson,
    /// The NRTL equation.
    Nrtl,
    /// The UNIQUAC equation.
    Uniquac,
}

impl LiquidModel {
    /// The name as the case key spells it.
    pub fn name(self) -> &'static str {
        match self {
            Self::Ideal => "ideal",
            Self::Wilson => "wilson",
            Self::Nrtl => "nrtl",
            Self::Uniquac => "uniquac",
        }
    }
}

impl LiquidModel {
    /// How a report names the model and its source.
    ///
    /// ```
    /// assert!(flashduty::activity::LiquidModel::Nrtl.description().contains("Renon"));
    /// ```
    pub fn description(self) -> &'static str {
        match self {
            Self::Ideal => "ideal liquid (Raoult's law)",
            Self::Wilson => "Wilson activity model (Wilson 1964), modified Raoult's law K = γ Psat / P",
            Self::Nrtl => "NRTL activity model (Renon and Prausnitz 1968), modified Raoult's law K = γ Psat / P",
            Self::Uniquac => "UNIQUAC activity model (Abrams and Prausnitz 1975), modified Raoult's law K = γ Psat / P",
        }
    }
}

impl fmt::Display for LiquidModel {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for LiquidModel {
    type Err = ActivityError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "ideal" | "raoult" => Ok(Self::Ideal),
            "wilson" => Ok(Self::Wilson),
            "nrtl" => Ok(Self::Nrtl),
            "uniquac" => Ok(Self::Uniquac),
            _ => Err(ActivityError::UnknownModel {
                value: crate::units::clip(s).into_owned(),
            }),
        }
    }
}

/// The parameters of one pair inside a model, for warnings.
#[derive(Debug, Clone, PartialEq)]
pub struct PairInModel {
    /// The two components' indices in the model.
    pub indices: (usize, usize),
    /// The temperature range of the data the parameters were fitted to, K.
    pub range_k: Option<(f64, f64)>,
    /// The citation key or note of where the parameters come from.
    pub source: String,
}

/// A Wilson, NRTL or UNIQUAC model over a list of components, its pair parameters taken
/// from a [`BinaryParameters`] set. A pair without parameters is ideal (zero interaction
/// energies); [`missing_pairs`](Self::missing_pairs) lists them for a warning.
///
/// ```
/// use flashduty::activity::{ActivityModel, BinaryParameters, LiquidModel};
/// let m = ActivityModel::new(LiquidModel::Wilson, &["methanol", "water"], BinaryParameters::builtin()).unwrap();
/// // Gibbs–Helmholtz: Hᴱ = −RT² ∂(Gᴱ/RT)/∂T, checked against a central difference.
/// let x = [0.4, 0.6];
/// let h = m.excess_enthalpy_j_per_mol(330.0, &x);
/// let d = (m.excess_gibbs_over_rt(330.01, &x) - m.excess_gibbs_over_rt(329.99, &x)) / 0.02;
/// assert!((h + 8.314462618 * 330.0 * 330.0 * d).abs() < 1e-6 * h.abs().max(1.0));
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct ActivityModel {
    kind: LiquidModel,
    names: Vec<String>,
    /// The interaction energies over R, K, row-major n × n (zero on the diagonal).
    energy_k: Vec<f64>,
    /// Wilson: ln(Vⱼ/Vᵢ); NRTL: αᵢⱼ; UNIQUAC: unused.
    second: Vec<f64>,
    r: Vec<f64>,
    q: Vec<f64>,
    pairs: Vec<PairInModel>,
    missing: Vec<(usize, usize)>,
}

impl ActivityModel {
    /// The `kind` model over `components` (names, synonyms or CAS numbers as the pair set
    /// spells them), with the pairs of `set` that are among them.
    ///
    /// # Errors
    /// [`ActivityError::UnknownModel`] for [`LiquidModel::Ideal`] (there is nothing to
    /// build); [`ActivityError::MissingSize`] for UNIQUAC without r and q of a component.
    pub fn new<S: AsRef<str>>(
        kind: LiquidModel,
        components: &[S],
        set: &BinaryParameters,
    ) -> Result<Self, ActivityError> {
        let keys: Vec<Vec<String>> = components.iter().map(|c| vec![pairs::key(c.as_ref())]).collect();
        Self::with_keys(kind, components, &keys, set)
    }

    /// As [`new`](Self::new), each component known by several keys (name, synonyms, CAS).
    pub(crate) fn with_keys<S: AsRef<str>>(
        kind: LiquidModel,
        components: &[S],
        keys: &[Vec<String>],
        set: &BinaryParameters,
    ) -> Result<Self, ActivityError> {
        if kind == LiquidModel::Ideal {
            return Err(ActivityError::UnknownModel {
                value: "ideal (an ideal liquid has no activity model)".into(),
            });
        }
        let n = components.len();
        let mut model = Self {
            kind,
            names: components.iter().map(|c| c.as_ref().to_string()).collect(),
            energy_k: vec![0.0; n * n],
            second: vec![0.0; n * n],
            r: vec![1.0; n],
            q: vec![1.0; n],
            pairs: Vec::new(),
            missing: Vec::new(),
        };
        if kind == LiquidModel::Nrtl {
            // Any α gives an ideal pair where both τ are zero; 0.3 keeps G finite.
            model.second.iter_mut().for_each(|a| *a = 0.3);
        }
        let find = |name: &str| keys.iter().position(|k| k.iter().any(|k| *k == pairs::key(name)));
        for i in 0..n {
            for j in i + 1..n {
                let found = set.records().iter().rev().find_map(|rec| {
                    let (a, b) = (find(&rec.components[0])?, find(&rec.components[1])?);
                    if (a, b) == (i, j) {
                        Some((rec, false))
                    } else if (a, b) == (j, i) {
                        Some((rec, true))
                    } else {
                        None
                    }
                });
                let Some((rec, swapped)) = found.filter(|(rec, _)| rec.has(kind)) else {
                    model.missing.push((i, j));
                    continue;
                };
                let (first, second) = if swapped { (j, i) } else { (i, j) };
                let (e12, e21, extra) = rec.energies(kind);
                model.energy_k[first * n + second] = e12;
                model.energy_k[second * n + first] = e21;
                match (kind, extra) {
                    (LiquidModel::Wilson, Some((v1, v2))) => {
                        model.second[first * n + second] = (v2 / v1).ln();
                        model.second[second * n + first] = (v1 / v2).ln();
                    }
                    (LiquidModel::Nrtl, Some((alpha, _))) => {
                        model.second[first * n + second] = alpha;
                        model.second[second * n + first] = alpha;
                    }
                    _ => {}
                }
                model.pairs.push(PairInModel {
                    indices: (i, j),
                    range_k: rec.range_k(),
                    source: rec.source.clone(),
                });
            }
        }
        if kind == LiquidModel::Uniquac {
            for (i, k) in keys.iter().enumerate() {
                let size = k
                    .iter()
                    .find_map(|k| set.size(k))
                    .ok_or_else(|| ActivityError::MissingSize {
                        component: model.names[i].clone(),
                    })?;
                model.r[i] = size.r;
                model.q[i] = size.q;
            }
        }
        Ok(model)
    }

    /// A binary model from its parts: the energies over R (K) e₁₂, e₂₁; the second
    /// parameters (Wilson: ln(V₂/V₁), ln(V₁/V₂); NRTL: α, α); UNIQUAC's (r, q) of each.
    pub(crate) fn binary(
        kind: LiquidModel,
        energies_k: (f64, f64),
        second: (f64, f64),
        sizes: [(f64, f64); 2],
    ) -> Self {
        Self {
            kind,
            names: vec!["component 1".into(), "component 2".into()],
            energy_k: vec![0.0, energies_k.0, energies_k.1, 0.0],
            second: vec![
                if kind == LiquidModel::Nrtl { second.0 } else { 0.0 },
                second.0,
                second.1,
                if kind == LiquidModel::Nrtl { second.0 } else { 0.0 },
            ],
            r: vec![sizes[0].0, sizes[1].0],
            q: vec![sizes[0].1, sizes[1].1],
            pairs: Vec::new(),
            missing: Vec::new(),
        }
    }

    /// The model's kind.
    pub fn kind(&self) -> LiquidModel {
        self.kind
    }

    /// The number of components.
    pub fn component_count(&self) -> usize {
        self.names.len()
    }

    /// The components' names as given.
    pub fn names(&self) -> &[String] {
        &self.names
    }

    /// The pairs with parameters.
    pub fn pairs(&self) -> &[PairInModel] {
        &self.pairs
    }

    /// The pairs without parameters (treated as ideal), as index pairs.
    pub fn missing_pairs(&self) -> &[(usize, usize)] {
        &self.missing
    }

    /// ln γᵢ and ∂ln γᵢ/∂T (1/K, at constant composition) at `t_k` and liquid mole fractions
    /// `x` into `ln_gamma` and `slope` (each of the model's length). `x` should sum to 1;
    /// negative entries are read as zero.
    pub fn ln_gamma(&self, t_k: f64, x: &[f64], ln_gamma: &mut [f64], slope: &mut [f64]) {
        let n = self.names.len();
        if x.len() != n || ln_gamma.len() != n || slope.len() != n {
            ln_gamma.iter_mut().chain(slope.iter_mut()).for_each(|v| *v = 0.0);
            return;
        }
        SCRATCH.with_borrow_mut(|(clean, scratch)| {
            clean.clear();
            clean.extend(x.iter().map(|v| v.max(0.0)));
            let sum: f64 = clean.iter().sum();
            if sum > 0.0 && sum.is_finite() {
                clean.iter_mut().for_each(|v| *v /= sum);
            } else {
                clean.iter_mut().for_each(|v| *v = 1.0 / n as f64);
            }
            match self.kind {
                LiquidModel::Wilson => {
                    wilson::ln_gamma(t_k, clean, &self.energy_k, &self.second, ln_gamma, slope, scratch)
                }
                LiquidModel::Nrtl => nrtl::ln_gamma(t_k, clean, &self.energy_k, &self.second, ln_gamma, slope, scratch),
                LiquidModel::Uniquac => {
                    uniquac::ln_gamma(t_k, clean, &self.energy_k, &self.r, &self.q, ln_gamma, slope, scratch)
                }
                LiquidModel::Ideal => ln_gamma.iter_mut().chain(slope.iter_mut()).for_each(|v| *v = 0.0),
            }
        });
    }

    /// Gᴱ/RT = Σ xᵢ ln γᵢ at `t_k` and `x`.
    pub fn excess_gibbs_over_rt(&self, t_k: f64, x: &[f64]) -> f64 {
        let n = self.names.len();
        let (mut g, mut s) = (vec![0.0; n], vec![0.0; n]);
        self.ln_gamma(t_k, x, &mut g, &mut s);
        x.iter().zip(&g).map(|(x, g)| x * g).sum()
    }

    /// The excess enthalpy Hᴱ = −RT² Σ xᵢ ∂ln γᵢ/∂T, J/mol, at `t_k` and `x`.
    pub fn excess_enthalpy_j_per_mol(&self, t_k: f64, x: &[f64]) -> f64 {
        let n = self.names.len();
        let (mut g, mut s) = (vec![0.0; n], vec![0.0; n]);
        self.ln_gamma(t_k, x, &mut g, &mut s);
        -GAS_CONSTANT * t_k * t_k * x.iter().zip(&s).map(|(x, s)| x * s).sum::<f64>()
    }

    /// The partial molar excess enthalpies h̄ᴱᵢ = −RT² ∂ln γᵢ/∂T, J/mol, into `out`.
    pub fn partial_excess_enthalpies(&self, t_k: f64, x: &[f64], out: &mut [f64]) {
        let n = self.names.len();
        let mut g = vec![0.0; n];
        self.ln_gamma(t_k, x, &mut g, out);
        out.iter_mut().for_each(|s| *s *= -GAS_CONSTANT * t_k * t_k);
    }
}
