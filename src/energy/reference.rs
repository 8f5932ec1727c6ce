//! The reference state, the vaporisation path and the vapour model: the choices that fix
//! what an enthalpy is measured from and how a component gets from liquid to vapour.

use serde::{Deserialize, Serialize};

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
#[non_exhaustive]
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
#[non_exhaustive]
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
    /// correlation ([`PitzerCurlVirial`](crate::properties::PitzerCurlVirial)). A mixture's residual is the mole-fraction-weighted
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

    /// The model in the words of a report.
    ///
    /// ```
    /// use flashduty::energy::VapourModel;
    /// assert_eq!(VapourModel::IdealGas.description(), "ideal gas");
    /// ```
    pub fn description(self) -> &'static str {
        match self {
            VapourModel::IdealGas => "ideal gas",
            VapourModel::SecondVirial => "second virial (Pitzer–Curl B; real-gas residual enthalpy)",
        }
    }
}
