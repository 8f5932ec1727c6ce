//! Pure-component and phase enthalpies relative to a reference state, along a chosen
//! vaporisation path, with an ideal-gas vapour or one corrected by the second virial
//! coefficient.

use super::DutyOptions;
use crate::properties::{Component, HeatCapacity, LatentHeat, PitzerCurlVirial, ValidityRange, VapourPressure};
use crate::rachford_rice::Phase;
use crate::units::ATM_PA;
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
    /// Pure ideal-gas vapour at the reference temperature (under
    /// [`VapourModel::SecondVirial`] too: the real vapour at zero pressure).
    Vapour,
}

/// The reference state: every enthalpy is zero for each pure component in this phase at
/// this temperature. The liquid is incompressible and a vapour reference is the ideal gas
/// (the vapour at zero pressure), so no reference pressure is needed under either
/// [`VapourModel`].
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

/// How the vapour's enthalpy depends on pressure. Chosen in
/// [`DutyOptions::vapour_model`](crate::energy::DutyOptions::vapour_model); the liquid is
/// incompressible under both.
///
/// ```
/// use flashduty::energy::{DutyOptions, VapourModel};
/// assert_eq!(DutyOptions::default().vapour_model, VapourModel::IdealGas);
/// assert_eq!(VapourModel::SecondVirial.name(), "second-virial");
/// assert_eq!(serde_json::to_string(&VapourModel::IdealGas).unwrap(), "\"ideal-gas\"");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
pub enum VapourModel {
    /// The ideal gas: pressure does not enter the vapour's enthalpy. The default, and the
    /// usual hand calculation; good at low reduced pressure away from saturation.
    ///
    /// ```
    /// use flashduty::energy::VapourModel;
    /// assert_eq!(VapourModel::default(), VapourModel::IdealGas);
    /// ```
    #[default]
    #[serde(rename = "ideal-gas")]
    IdealGas,
    /// The ideal gas plus each component's residual enthalpy H^R = P (B − T dB/dT) from the
    /// virial equation truncated after the second coefficient, B from the Pitzer–Curl
    /// correlation ([`PitzerCurlVirial`]). A mixture's residual is the mole-fraction-weighted
    /// sum of the pure ones: the linear mixing rule Bᵢⱼ = (Bᵢᵢ + Bⱼⱼ)/2, consistent with the
    /// ideal mixing of the rest of the model.
    ///
    /// The library's latent heat is the real ΔHvap, between saturated liquid and *real*
    /// saturated vapour; so where a path vaporises a component at T_v (path (a): Tb at
    /// 101 325 Pa; (b): the stream temperature at Psat(T); (c): the reference temperature at
    /// Psat(T_ref)) the vapour's enthalpy at (T, P) is the ideal-gas path's value plus
    /// H^R(T, P) − H^R(T_v, P_v). The saturation pressure P_v is capped at Pc: at and above
    /// Tc there is no latent heat and no saturated vapour, and the cap keeps the enthalpy
    /// continuous there (the correlation is far outside its range, and a
    /// [`Warning::VirialOutOfRange`] says so). A vapour at its own saturation pressure on path
    /// (b) thus gets exactly the library latent heat, and the duty stays a state function,
    /// independent of the reference state along paths (a) and (b).
    ///
    /// Where Pr > Tr/2 (common practice) the truncated virial equation is unreliable and a
    /// [`Warning::VirialOutOfRange`] is given with the result.
    ///
    /// ```
    /// use flashduty::energy::{heater_duty, DutyOptions, Stream, StreamState, VapourModel};
    /// use flashduty::units::{MolarFlow, Pressure, Temperature};
    /// // Steam from 105 °C to 150 °C at 1 atm: IAPWS-IF97 gives about 1.64 kJ/mol
    /// // (tests/fixtures/iapws_water_1atm.csv); the ideal gas falls about 5 % short.
    /// let s = Stream::from_names(&["water"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    /// let p = Pressure::parse("P", "1 atm").unwrap();
    /// let at = |t: &str| StreamState::TemperaturePressure { temperature: Temperature::parse("T", t).unwrap(), pressure: p };
    /// let o = DutyOptions { vapour_model: VapourModel::SecondVirial, ..DutyOptions::default() };
    /// let real = heater_duty(&s, at("105 degC"), at("150 degC"), o).unwrap();
    /// let ideal = heater_duty(&s, at("105 degC"), at("150 degC"), DutyOptions::default()).unwrap();
    /// assert!(real.duty_w > ideal.duty_w);
    /// // The residual shows in its own column of the enthalpy table: H^R(T, 1 atm) less
    /// // H^R of the saturated vapour at Tb, which rises towards zero as the steam warms.
    /// let d: Vec<f64> = real.table.iter().map(|row| row.vapour_departure_j_per_mol).collect();
    /// assert!(d.len() == 2 && 0.0 < d[0] && d[0] < d[1], "{d:?}");
    /// ```
    ///
    /// [`Warning::VirialOutOfRange`]: crate::warnings::Warning::VirialOutOfRange
    #[serde(rename = "second-virial")]
    SecondVirial,
}

impl VapourModel {
    /// Both models.
    ///
    /// ```
    /// use flashduty::energy::VapourModel;
    /// assert_eq!(VapourModel::ALL.len(), 2);
    /// ```
    pub const ALL: [VapourModel; 2] = [VapourModel::IdealGas, VapourModel::SecondVirial];

    /// The model's name as used in case files and serialised options.
    ///
    /// ```
    /// use flashduty::energy::VapourModel;
    /// assert_eq!(VapourModel::IdealGas.name(), "ideal-gas");
    /// ```
    pub fn name(self) -> &'static str {
        match self {
            VapourModel::IdealGas => "ideal-gas",
            VapourModel::SecondVirial => "second-virial",
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
}

/// The bit of [`enthalpy_warnings`]'s `warned` that stands for the virial range.
const VIRIAL_WARNED: u8 = 8;

/// Adds a warning for every correlation that the enthalpy of `c` in `phase` at `t_k` and
/// `p_pa` (from `reference` along `path`, with `vapour_model`) evaluates outside its range.
/// `warned` holds a bit for each correlation already reported for this component in `out`
/// (the caller keeps one per component, zero to start), so that repeated rows do not search
/// `out` again.
pub(crate) fn enthalpy_warnings(
    c: &Component,
    options: DutyOptions,
    phase: Phase,
    t_k: f64,
    p_pa: f64,
    warned: &mut u8,
    out: &mut Vec<Warning>,
) {
    virial_warnings(c, options, phase, t_k, p_pa, warned, out);
    let (reference, path) = (options.reference, options.path);
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

/// Under [`VapourModel::SecondVirial`], adds a [`Warning::VirialOutOfRange`] for `c` when
/// its enthalpy in `phase` at `t_k` and `p_pa` uses the truncated virial equation outside
/// Pr ≤ Tr/2: at the state itself (a vapour), where its path vaporises it (a vapour), or
/// where the path to a vapour reference does (any phase). `warned` as in
/// [`enthalpy_warnings`].
pub(crate) fn virial_warnings(
    c: &Component,
    options: DutyOptions,
    phase: Phase,
    t_k: f64,
    p_pa: f64,
    warned: &mut u8,
    out: &mut Vec<Warning>,
) {
    if options.vapour_model != VapourModel::SecondVirial || *warned & VIRIAL_WARNED != 0 {
        return;
    }
    let (reference, path) = (options.reference, options.path);
    let b = PitzerCurlVirial::for_component(c);
    let mut points = [None; 3];
    if phase == Phase::Vapour {
        points[0] = Some((t_k, p_pa));
        points[1] = Some(saturation_point(c, switch_temperature(c, t_k, reference, path), path));
    }
    if reference.phase == ReferencePhase::Vapour {
        let t_ref = reference.temperature_k;
        points[2] = Some(saturation_point(c, switch_temperature(c, t_ref, reference, path), path));
    }
    let Some((t, p)) = points.into_iter().flatten().find(|&(t, p)| !b.is_within_range(t, p)) else {
        return;
    };
    *warned |= VIRIAL_WARNED;
    let (reduced_temperature, reduced_pressure) = b.reduced(t, p);
    push_unique(
        out,
        Warning::VirialOutOfRange {
            component: c.name().to_string(),
            temperature_k: t,
            pressure_pa: p,
            reduced_temperature,
            reduced_pressure,
        },
    );
}

/// Where a component's path vaporises it at `t_v`: (`t_v`, the saturation pressure there),
/// the normal boiling point at 101 325 Pa on path (a), else Psat(`t_v`) from the
/// component's vapour pressure; capped at Pc (at and above Tc there is no saturated
/// vapour, and the latent heat is zero).
fn saturation_point(c: &Component, t_v: f64, path: VaporisationPath) -> (f64, f64) {
    match path {
        VaporisationPath::BoilingPoint => (t_v, ATM_PA.min(c.critical_pressure_pa())),
        _ => (t_v, saturation_pressure_with_slope(c, t_v).0),
    }
}

/// The capped saturation pressure of [`saturation_point`] at `t_k` (paths (b) and (c)) and
/// its temperature derivative, Pa and Pa/K.
#[inline]
fn saturation_pressure_with_slope(c: &Component, t_k: f64) -> (f64, f64) {
    let (ln_psat, slope) = c.vapour_pressure().ln_psat_with_slope(t_k);
    let psat = ln_psat.exp();
    let pc = c.critical_pressure_pa();
    if psat < pc { (psat, psat * slope) } else { (pc, 0.0) }
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
    /// Under [`VapourModel::SecondVirial`], each component's virial constants.
    virial: Option<Vec<VirialConstants>>,
}

/// One component's constants for the second-virial vapour correction.
#[derive(Debug, Clone, Copy)]
struct VirialConstants {
    correlation: PitzerCurlVirial,
    /// Paths (a) and (c): H^R of the saturated vapour where the path vaporises, J/mol.
    /// Path (b): `None`, it is vaporised at the stream temperature.
    saturation: Option<f64>,
    /// Added to the component's enthalpy in either phase: zero for a liquid reference; for
    /// a vapour reference (the ideal gas), H^R of the saturated vapour where the path to
    /// the reference vaporises it.
    reference: f64,
}

impl VirialConstants {
    fn new(c: &Component, reference: ReferenceState, path: VaporisationPath) -> Self {
        let correlation = PitzerCurlVirial::for_component(c);
        let at_saturation = |t_v: f64| {
            let (t, p) = saturation_point(c, t_v, path);
            correlation.residual_enthalpy_j_per_mol(t, p)
        };
        let t_ref = reference.temperature_k;
        let saturation = (path != VaporisationPath::StreamTemperature)
            .then(|| at_saturation(switch_temperature(c, t_ref, reference, path)));
        let reference = if reference.phase == ReferencePhase::Vapour {
            saturation.unwrap_or_else(|| at_saturation(t_ref))
        } else {
            0.0
        };
        Self {
            correlation,
            saturation,
            reference,
        }
    }

    /// The vapour's departure at (`t_k`, `p_pa`) measured from the liquid at the reference
    /// temperature, H^R(T, P) − H^R at the vaporisation point, J/mol, and its slope at
    /// constant pressure, J/(mol·K).
    #[inline]
    fn vapour(&self, c: &Component, t_k: f64, p_pa: f64) -> (f64, f64) {
        let (g, dg) = self.correlation.residual_enthalpy_per_pa(t_k);
        match self.saturation {
            Some(h_sat) => (p_pa * g - h_sat, p_pa * dg),
            None => {
                // Vaporised at T itself: H^R(T, P) − H^R(T, Pv(T)) = (P − Pv) (B − T dB/dT).
                let (pv, dpv) = saturation_pressure_with_slope(c, t_k);
                ((p_pa - pv) * g, (p_pa - pv) * dg - dpv * g)
            }
        }
    }
}

/// The second-virial departures of a [`PathTable`]'s components: what
/// [`VapourModel::SecondVirial`] adds to the ideal-gas enthalpies.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Departures<'a> {
    constants: &'a [VirialConstants],
    components: &'a [Arc<Component>],
}

impl Departures<'_> {
    /// Component `i`'s departure in the liquid, J/mol (a constant: nonzero for a vapour
    /// reference only); zero for an index out of range.
    #[inline]
    pub fn liquid(&self, i: usize) -> f64 {
        self.constants.get(i).map_or(0.0, |k| k.reference)
    }

    /// Component `i`'s departure in the vapour at (`t_k`, `p_pa`), J/mol, and its slope at
    /// constant pressure, J/(mol·K); zero for an index out of range.
    #[inline]
    pub fn vapour(&self, i: usize, t_k: f64, p_pa: f64) -> (f64, f64) {
        match (self.constants.get(i), self.components.get(i)) {
            (Some(k), Some(c)) => {
                let (h, slope) = k.vapour(c, t_k, p_pa);
                (h + k.reference, slope)
            }
            _ => (0.0, 0.0),
        }
    }

    /// Component `i`'s departure in `phase` at (`t_k`, `p_pa`), J/mol.
    #[inline]
    pub fn pure(&self, i: usize, phase: Phase, t_k: f64, p_pa: f64) -> f64 {
        if phase == Phase::Vapour {
            self.vapour(i, t_k, p_pa).0
        } else {
            self.liquid(i)
        }
    }

    /// The departure of a phase of composition `fractions` at (`t_k`, `p_pa`), J/mol.
    pub fn phase_enthalpy(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        fractions
            .iter()
            .enumerate()
            .filter(|(_, f)| **f != 0.0)
            .map(|(i, f)| f * self.pure(i, phase, t_k, p_pa))
            .sum()
    }

    /// d/dT at constant pressure of [`phase_enthalpy`](Self::phase_enthalpy), J/(mol·K).
    pub fn phase_slope(&self, phase: Phase, fractions: &[f64], t_k: f64, p_pa: f64) -> f64 {
        if phase != Phase::Vapour {
            return 0.0;
        }
        fractions
            .iter()
            .enumerate()
            .filter(|(_, f)| **f != 0.0)
            .map(|(i, f)| f * self.vapour(i, t_k, p_pa).1)
            .sum()
    }
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
    shift: Parts,
}

impl PureConstants {
    fn new(c: &Component, reference: ReferenceState, path: VaporisationPath) -> Self {
        let t_ref = reference.temperature_k;
        let mut k = Self {
            fixed: None,
            shift: Parts::default(),
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
    fn measured_from_liquid(&self, c: &Component, t_ref: f64, phase: Phase, t_k: f64) -> Parts {
        self.measured_given(c, phase, t_k, || liquid_sensible(c, t_ref, t_k))
    }

    /// [`measured_from_liquid`](Self::measured_from_liquid), with the liquid's sensible
    /// heat from the reference temperature to `t_k` given by `liquid_to_t` where needed.
    #[inline]
    fn measured_given(&self, c: &Component, phase: Phase, t_k: f64, liquid_to_t: impl FnOnce() -> f64) -> Parts {
        match (phase, self.fixed) {
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
