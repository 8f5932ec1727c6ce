//! A pure component: identity, critical constants, normal boiling point and correlations,
//! every value with its source. Read from the component-file schema (JSON or TOML) and
//! checked on the way in.

use super::heat_capacity::{ConstantCp, HeatCapacity, HeatCapacityModel, PolynomialCp, ShomateCp};
use super::latent_heat::{Dippr106, LatentHeat, LatentHeatModel, Watson};
use super::range::ValidityRange;
use super::vapour_pressure::{Antoine, AntoineForm, ExtendedAntoine, VapourPressure, VapourPressureModel};
use serde::{Deserialize, Serialize};

/// An error in a component's data, naming the component and the field.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ComponentError {
    /// A value is missing, not finite, or outside its physical range.
    #[error("component '{component}': field '{field}' = {value}: {why}")]
    InvalidValue {
        /// The component's name.
        component: String,
        /// The field, as named in the component-file schema.
        field: String,
        /// The value given, as text.
        value: String,
        /// What is wrong with it.
        why: String,
    },
    /// A source key that the file's bibliography does not define.
    #[error(
        "component '{component}': field '{field}' cites source '{source_key}', which the file's 'sources' does not define"
    )]
    UnknownSource {
        /// The component's name.
        component: String,
        /// The field.
        field: String,
        /// The undefined key.
        source_key: String,
    },
    /// The file could not be parsed (syntax, a missing required field, a wrong type).
    #[error("component file {file}: {message}")]
    Parse {
        /// The file name, or `<built-in>`.
        file: String,
        /// The parser's message, which names the field and position.
        message: String,
    },
    /// The component's name or CAS number is already taken.
    #[error("component '{component}': name or CAS number '{key}' is already used by '{other}'")]
    Duplicate {
        /// The component being added.
        component: String,
        /// The clashing name or CAS number.
        key: String,
        /// The component that already has it.
        other: String,
    },
}

impl ComponentError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::properties::ComponentError;
    /// assert_eq!(ComponentError::UnknownSource { component: "x".into(), field: "tc".into(), source_key: "y".into() }.kind(), "unknown-source");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            ComponentError::InvalidValue { .. } => "invalid-value",
            ComponentError::UnknownSource { .. } => "unknown-source",
            ComponentError::Parse { .. } => "parse",
            ComponentError::Duplicate { .. } => "duplicate",
        }
    }
}

/// Where a value came from: a key into the file's bibliography, and whether it was typed
/// from memory rather than copied from the source in hand.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Provenance {
    /// The source key, resolving to an entry of the file's `sources`.
    pub source: String,
    /// True where the value was typed from memory and should be checked against the source.
    #[serde(default)]
    pub from_memory: bool,
    /// An optional note (conversion made, table number).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub note: Option<String>,
}

/// A number with its provenance.
///
/// ```
/// use flashduty::properties::Sourced;
/// let v: Sourced = serde_json::from_str(r#"{"value": 647.096, "source": "iapws-95"}"#).unwrap();
/// assert_eq!(v.value, 647.096);
/// assert!(!v.from_memory);
/// ```
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Sourced {
    /// The value, in the unit the field's name states.
    pub value: f64,
    /// The source key.
    pub source: String,
    /// True where typed from memory.
    #[serde(default)]
    pub from_memory: bool,
    /// An optional note.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub note: Option<String>,
}

impl Sourced {
    fn provenance(&self) -> Provenance {
        Provenance {
            source: self.source.clone(),
            from_memory: self.from_memory,
            note: self.note.clone(),
        }
    }
}

/// The vapour-pressure entry of the component-file schema.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "form", rename_all = "kebab-case")]
pub(crate) enum VapourPressureRecord {
    /// log P = A − B/(T + C) in the stated unit convention.
    Antoine {
        units: AntoineForm,
        #[serde(rename = "A")]
        a: f64,
        #[serde(rename = "B")]
        b: f64,
        #[serde(rename = "C")]
        c: f64,
        #[serde(rename = "T_min_K")]
        t_min_k: f64,
        #[serde(rename = "T_max_K")]
        t_max_k: f64,
        #[serde(flatten)]
        provenance: ProvenanceFields,
    },
    /// ln(P/Pa) = A + B/T + C ln T + D T^E.
    Extended {
        #[serde(rename = "A")]
        a: f64,
        #[serde(rename = "B")]
        b: f64,
        #[serde(rename = "C")]
        c: f64,
        #[serde(rename = "D")]
        d: f64,
        #[serde(rename = "E")]
        e: f64,
        #[serde(rename = "T_min_K")]
        t_min_k: f64,
        #[serde(rename = "T_max_K")]
        t_max_k: f64,
        #[serde(flatten)]
        provenance: ProvenanceFields,
    },
}

/// Provenance fields flattened into correlation records.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub(crate) struct ProvenanceFields {
    pub(crate) source: String,
    #[serde(default)]
    pub(crate) from_memory: bool,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub(crate) note: Option<String>,
}

impl From<&ProvenanceFields> for Provenance {
    fn from(p: &ProvenanceFields) -> Self {
        Provenance {
            source: p.source.clone(),
            from_memory: p.from_memory,
            note: p.note.clone(),
        }
    }
}

/// A heat-capacity entry of the component-file schema (J/(mol·K), K).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "form", rename_all = "kebab-case")]
pub(crate) enum HeatCapacityRecord {
    /// Cp = a + bT + cT² + dT³ + eT⁴; one to five coefficients.
    Polynomial {
        coefficients: Vec<f64>,
        #[serde(rename = "T_min_K")]
        t_min_k: f64,
        #[serde(rename = "T_max_K")]
        t_max_k: f64,
        #[serde(flatten)]
        provenance: ProvenanceFields,
    },
    /// NIST Shomate A..E (t = T/1000).
    Shomate {
        #[serde(rename = "A")]
        a: f64,
        #[serde(rename = "B")]
        b: f64,
        #[serde(rename = "C")]
        c: f64,
        #[serde(rename = "D")]
        d: f64,
        #[serde(rename = "E")]
        e: f64,
        #[serde(rename = "T_min_K")]
        t_min_k: f64,
        #[serde(rename = "T_max_K")]
        t_max_k: f64,
        #[serde(flatten)]
        provenance: ProvenanceFields,
    },
    /// A constant.
    Constant {
        value: f64,
        #[serde(rename = "T_min_K")]
        t_min_k: f64,
        #[serde(rename = "T_max_K")]
        t_max_k: f64,
        #[serde(flatten)]
        provenance: ProvenanceFields,
    },
}

/// A latent-heat entry of the component-file schema (J/mol, K).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "form", rename_all = "kebab-case")]
pub(crate) enum LatentHeatRecord {
    /// Watson from one point.
    Watson {
        #[serde(rename = "T_anchor_K")]
        t_anchor_k: f64,
        #[serde(rename = "value_J_per_mol")]
        value_j_per_mol: f64,
        #[serde(default)]
        exponent: Option<f64>,
        #[serde(flatten)]
        provenance: ProvenanceFields,
    },
    /// DIPPR-106 with A in J/mol.
    Dippr106 {
        #[serde(rename = "A_J_per_mol")]
        a_j_per_mol: f64,
        #[serde(rename = "B")]
        b: f64,
        #[serde(rename = "C", default)]
        c: f64,
        #[serde(rename = "D", default)]
        d: f64,
        #[serde(rename = "E", default)]
        e: f64,
        /// The Tc the fit was made with, if it differs from the component's.
        #[serde(rename = "Tc_K", default)]
        tc_k: Option<f64>,
        #[serde(rename = "T_min_K")]
        t_min_k: f64,
        #[serde(rename = "T_max_K")]
        t_max_k: f64,
        #[serde(flatten)]
        provenance: ProvenanceFields,
    },
}

/// What a component is: a condensable component (a vapour pressure, liquid heat capacity,
/// latent heat and normal boiling point) or a gas, which has none of them and is described
/// by what a dissolved gas needs: molar mass, critical constants, acentric factor and
/// ideal-gas heat capacity. The schema key `kind`; absent means condensable.
///
/// ```
/// use flashduty::properties::ComponentKind;
/// assert_eq!(ComponentKind::default(), ComponentKind::Condensable);
/// assert_eq!(serde_json::to_string(&ComponentKind::Gas).unwrap(), "\"gas\"");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
#[non_exhaustive]
pub enum ComponentKind {
    /// Vapour pressure, liquid heat capacity, latent heat and normal boiling point given.
    #[default]
    Condensable,
    /// None of those: a permanent gas or light end, for Henry's law.
    Gas,
}

impl ComponentKind {
    fn is_condensable(&self) -> bool {
        *self == ComponentKind::Condensable
    }
}

/// The schema fields a condensable component needs and a gas does not take.
const CONDENSABLE_ONLY: [&str; 4] = [
    "normal_boiling_point_K",
    "vapour_pressure",
    "liquid_heat_capacity",
    "latent_heat",
];

/// One component as written in a component file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct ComponentRecord {
    pub name: String,
    #[serde(default, skip_serializing_if = "ComponentKind::is_condensable")]
    pub kind: ComponentKind,
    #[serde(default)]
    pub synonyms: Vec<String>,
    pub cas: String,
    pub formula: String,
    pub molar_mass_g_per_mol: Sourced,
    #[serde(rename = "critical_temperature_K")]
    pub critical_temperature_k: Sourced,
    #[serde(rename = "critical_pressure_Pa")]
    pub critical_pressure_pa: Sourced,
    pub acentric_factor: Sourced,
    #[serde(rename = "normal_boiling_point_K", default, skip_serializing_if = "Option::is_none")]
    pub normal_boiling_point_k: Option<Sourced>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub vapour_pressure: Option<VapourPressureRecord>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub liquid_heat_capacity: Option<HeatCapacityRecord>,
    pub vapour_heat_capacity: HeatCapacityRecord,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub latent_heat: Option<LatentHeatRecord>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub water_miscibility: Option<WaterMiscibilityRecord>,
}

/// How a component mixes with liquid water, as the library records it.
///
/// ```
/// use flashduty::library::Library;
/// use flashduty::properties::WaterMiscibility;
/// let lib = Library::builtin();
/// assert_eq!(lib.get("toluene").unwrap().water_miscibility(), Some(WaterMiscibility::Immiscible));
/// assert_eq!(lib.get("ethanol").unwrap().water_miscibility(), Some(WaterMiscibility::Miscible));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum WaterMiscibility {
    /// Below 2 mass % soluble in water at 25 °C (common practice for "insoluble"): forms a
    /// liquid of its own beside water.
    Immiscible,
    /// Soluble in water to a few tens of mass % but not in all proportions.
    PartiallyMiscible,
    /// Mixes with water in all proportions.
    Miscible,
}

impl WaterMiscibility {
    /// The name in component files and reports.
    pub fn name(self) -> &'static str {
        match self {
            WaterMiscibility::Immiscible => "immiscible",
            WaterMiscibility::PartiallyMiscible => "partially-miscible",
            WaterMiscibility::Miscible => "miscible",
        }
    }
}

/// The `water_miscibility` entry of the component-file schema: the class and, where known,
/// the solubility in water at 25 °C in mass %.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub(crate) struct WaterMiscibilityRecord {
    pub class: WaterMiscibility,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub solubility_in_water_mass_percent: Option<f64>,
    #[serde(flatten)]
    pub provenance: ProvenanceFields,
}

impl ComponentRecord {
    /// Whether the condensable-only fields are all given (a condensable component) or all
    /// absent (a gas); the message names the first field that is not, in the words of the
    /// file parser's own errors.
    pub(crate) fn check_kind(&self) -> Result<(), String> {
        let given = [
            self.normal_boiling_point_k.is_some(),
            self.vapour_pressure.is_some(),
            self.liquid_heat_capacity.is_some(),
            self.latent_heat.is_some(),
        ];
        match self.kind {
            ComponentKind::Condensable => match given.iter().position(|g| !g) {
                Some(i) => Err(format!(
                    "missing field `{}` (a condensable component needs {}; a gas says \"kind\": \"gas\")",
                    CONDENSABLE_ONLY[i],
                    CONDENSABLE_ONLY.join(", ")
                )),
                None => Ok(()),
            },
            ComponentKind::Gas => match given.iter().position(|g| *g) {
                Some(i) => Err(format!(
                    "field `{}` is not taken by a gas (\"kind\": \"gas\" has no vapour pressure, liquid heat \
                     capacity, latent heat or normal boiling point)",
                    CONDENSABLE_ONLY[i]
                )),
                None => Ok(()),
            },
        }
    }
}

/// A checked pure component, ready for calculation.
///
/// Obtain one from the built-in library ([`crate::library::Library::builtin`]) or from a
/// component file. All temperatures are in K, pressures in Pa, molar quantities per mol.
///
/// ```
/// use flashduty::library::Library;
/// use flashduty::properties::VapourPressure;
/// let lib = Library::builtin();
/// let water = lib.get("water").unwrap();
/// assert_eq!(water.cas(), "7732-18-5");
/// let p = water.vapour_pressure().psat_pa(water.normal_boiling_point_k());
/// assert!((p / 101_325.0 - 1.0).abs() < 0.015);
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct Component {
    name: String,
    synonyms: Vec<String>,
    cas: String,
    formula: String,
    molar_mass_g_per_mol: f64,
    critical_temperature_k: f64,
    critical_pressure_pa: f64,
    acentric_factor: f64,
    normal_boiling_point_k: f64,
    vapour_pressure: VapourPressureModel,
    liquid_cp: HeatCapacityModel,
    vapour_cp: HeatCapacityModel,
    latent_heat: LatentHeatModel,
    provenance: Vec<(String, Provenance)>,
    record: ComponentRecord,
}

fn range(component: &str, field: &str, min: f64, max: f64) -> Result<ValidityRange, ComponentError> {
    ValidityRange::new(min, max).ok_or_else(|| ComponentError::InvalidValue {
        component: component.to_string(),
        field: field.to_string(),
        value: format!("[{min}, {max}]"),
        why: "range must be finite and positive with min <= max".to_string(),
    })
}

fn invalid(component: &str, field: &str, value: impl std::fmt::Display, why: &str) -> ComponentError {
    ComponentError::InvalidValue {
        component: component.to_string(),
        field: field.to_string(),
        value: value.to_string(),
        why: why.to_string(),
    }
}

fn heat_capacity(component: &str, field: &str, r: &HeatCapacityRecord) -> Result<HeatCapacityModel, ComponentError> {
    Ok(match r {
        HeatCapacityRecord::Polynomial {
            coefficients,
            t_min_k,
            t_max_k,
            ..
        } => {
            if coefficients.is_empty() || coefficients.len() > 5 {
                return Err(invalid(
                    component,
                    &format!("{field}.coefficients"),
                    format!("{coefficients:?}"),
                    "give one to five coefficients a, b, c, d, e",
                ));
            }
            let mut c = [0.0; 5];
            c[..coefficients.len()].copy_from_slice(coefficients);
            let rng = range(component, &format!("{field}.T_min_K/T_max_K"), *t_min_k, *t_max_k)?;
            HeatCapacityModel::Polynomial(PolynomialCp::new(c, rng).ok_or_else(|| {
                invalid(
                    component,
                    &format!("{field}.coefficients"),
                    format!("{coefficients:?}"),
                    "not finite",
                )
            })?)
        }
        HeatCapacityRecord::Shomate {
            a,
            b,
            c,
            d,
            e,
            t_min_k,
            t_max_k,
            ..
        } => {
            let rng = range(component, &format!("{field}.T_min_K/T_max_K"), *t_min_k, *t_max_k)?;
            HeatCapacityModel::Shomate(
                ShomateCp::new([*a, *b, *c, *d, *e], rng)
                    .ok_or_else(|| invalid(component, field, format!("{:?}", [a, b, c, d, e]), "not finite"))?,
            )
        }
        HeatCapacityRecord::Constant {
            value,
            t_min_k,
            t_max_k,
            ..
        } => {
            let rng = range(component, &format!("{field}.T_min_K/T_max_K"), *t_min_k, *t_max_k)?;
            HeatCapacityModel::Constant(
                ConstantCp::new(*value, rng)
                    .ok_or_else(|| invalid(component, &format!("{field}.value"), value, "must be positive"))?,
            )
        }
    })
}

fn heat_capacity_provenance(r: &HeatCapacityRecord) -> &ProvenanceFields {
    match r {
        HeatCapacityRecord::Polynomial { provenance, .. }
        | HeatCapacityRecord::Shomate { provenance, .. }
        | HeatCapacityRecord::Constant { provenance, .. } => provenance,
    }
}

/// A finite, positive value of a record's field.
fn positive(component: &str, field: &str, s: &Sourced) -> Result<f64, ComponentError> {
    if s.value.is_finite() && s.value > 0.0 {
        Ok(s.value)
    } else {
        Err(invalid(component, field, s.value, "must be finite and positive"))
    }
}

/// A heat capacity that is positive inside its range (tested at its middle, the top of the
/// range capped at 2 Tc).
fn positive_cp(component: &str, field: &str, model: &HeatCapacityModel, tc: f64) -> Result<(), ComponentError> {
    let mid = 0.5 * (model.validity().min_k + model.validity().max_k.min(2.0 * tc));
    if model.cp(mid).partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
        return Err(invalid(
            component,
            field,
            mid,
            "heat capacity is not positive inside its range",
        ));
    }
    Ok(())
}

/// Every source key of `provenance` must be in the file's bibliography.
fn check_sources(
    component: &str,
    provenance: &[(String, Provenance)],
    sources: &std::collections::BTreeMap<String, String>,
) -> Result<(), ComponentError> {
    for (field, p) in provenance {
        if !sources.contains_key(&p.source) {
            return Err(ComponentError::UnknownSource {
                component: component.to_string(),
                field: field.clone(),
                source_key: p.source.clone(),
            });
        }
    }
    Ok(())
}

/// What every kind of component has, checked: identity, molar mass, critical constants,
/// acentric factor and the ideal-gas heat capacity, with their provenance in schema order.
struct Identity {
    name: String,
    synonyms: Vec<String>,
    cas: String,
    formula: String,
    molar_mass: f64,
    tc: f64,
    pc: f64,
    omega: f64,
    vapour_cp: HeatCapacityModel,
    provenance: Vec<(String, Provenance)>,
}

impl Identity {
    fn of(record: &ComponentRecord) -> Result<Self, ComponentError> {
        let name = record.name.trim().to_string();
        if name.is_empty() {
            return Err(invalid("<unnamed>", "name", "\"\"", "must not be empty"));
        }
        let n = name.as_str();
        let molar_mass = positive(n, "molar_mass_g_per_mol", &record.molar_mass_g_per_mol)?;
        let tc = positive(n, "critical_temperature_K", &record.critical_temperature_k)?;
        let pc = positive(n, "critical_pressure_Pa", &record.critical_pressure_pa)?;
        let omega = record.acentric_factor.value;
        if !(omega.is_finite() && (-1.0..=2.0).contains(&omega)) {
            return Err(invalid(n, "acentric_factor", omega, "must lie in [-1, 2]"));
        }
        if record.cas.trim().is_empty() {
            return Err(invalid(n, "cas", "\"\"", "must not be empty"));
        }
        let vapour_cp = heat_capacity(n, "vapour_heat_capacity", &record.vapour_heat_capacity)?;
        positive_cp(n, "vapour_heat_capacity", &vapour_cp, tc)?;
        let provenance = vec![
            (
                "molar_mass_g_per_mol".to_string(),
                record.molar_mass_g_per_mol.provenance(),
            ),
            (
                "critical_temperature_K".to_string(),
                record.critical_temperature_k.provenance(),
            ),
            (
                "critical_pressure_Pa".to_string(),
                record.critical_pressure_pa.provenance(),
            ),
            ("acentric_factor".to_string(), record.acentric_factor.provenance()),
            (
                "vapour_heat_capacity".to_string(),
                heat_capacity_provenance(&record.vapour_heat_capacity).into(),
            ),
        ];
        Ok(Self {
            synonyms: record.synonyms.iter().map(|s| s.trim().to_string()).collect(),
            cas: record.cas.trim().to_string(),
            formula: record.formula.clone(),
            name,
            molar_mass,
            tc,
            pc,
            omega,
            vapour_cp,
            provenance,
        })
    }
}

impl Component {
    /// Checks a record and builds the component. `sources` is the file's bibliography.
    pub(crate) fn from_record(
        record: ComponentRecord,
        sources: &std::collections::BTreeMap<String, String>,
    ) -> Result<Self, ComponentError> {
        let id = Identity::of(&record)?;
        let (molar_mass, tc, pc, omega) = (id.molar_mass, id.tc, id.pc, id.omega);
        let name = id.name.clone();
        let n = name.as_str();
        let (Some(tb_record), Some(vp_record), Some(liquid_cp_record), Some(latent_record)) = (
            &record.normal_boiling_point_k,
            &record.vapour_pressure,
            &record.liquid_heat_capacity,
            &record.latent_heat,
        ) else {
            let why = record.check_kind().err().unwrap_or_default();
            return Err(invalid(
                n,
                "kind",
                "gas",
                &format!("not a condensable component: {why}"),
            ));
        };
        let tb = positive(n, "normal_boiling_point_K", tb_record)?;
        if tc <= tb {
            return Err(invalid(
                n,
                "critical_temperature_K",
                tc,
                &format!("must exceed the normal boiling point {tb} K"),
            ));
        }
        let vapour_pressure = match vp_record {
            VapourPressureRecord::Antoine {
                units,
                a,
                b,
                c,
                t_min_k,
                t_max_k,
                ..
            } => {
                let rng = range(n, "vapour_pressure.T_min_K/T_max_K", *t_min_k, *t_max_k)?;
                VapourPressureModel::Antoine(Antoine::from_published(*units, *a, *b, *c, rng).ok_or_else(|| {
                    invalid(
                        n,
                        "vapour_pressure",
                        format!("A={a}, B={b}, C={c}"),
                        "constants must be finite, B positive, and T + C positive over the range",
                    )
                })?)
            }
            VapourPressureRecord::Extended {
                a,
                b,
                c,
                d,
                e,
                t_min_k,
                t_max_k,
                ..
            } => {
                let rng = range(n, "vapour_pressure.T_min_K/T_max_K", *t_min_k, *t_max_k)?;
                VapourPressureModel::Extended(
                    ExtendedAntoine::new(*a, *b, *c, *d, *e, rng)
                        .ok_or_else(|| invalid(n, "vapour_pressure", format!("{:?}", [a, b, c, d, e]), "not finite"))?,
                )
            }
        };
        // The vapour pressure must rise with temperature at the boiling point.
        if !(vapour_pressure.dln_psat_dt(tb) > 0.0 && vapour_pressure.psat_pa(tb).is_finite()) {
            return Err(invalid(
                n,
                "vapour_pressure",
                tb,
                "does not rise with temperature at the boiling point",
            ));
        }
        let liquid_cp = heat_capacity(n, "liquid_heat_capacity", liquid_cp_record)?;
        let vapour_cp = id.vapour_cp;
        let latent_heat = match latent_record {
            LatentHeatRecord::Watson {
                t_anchor_k,
                value_j_per_mol,
                exponent,
                ..
            } => LatentHeatModel::Watson(Watson::new(*t_anchor_k, *value_j_per_mol, tc, *exponent).ok_or_else(
                || {
                    invalid(
                        n,
                        "latent_heat",
                        format!("T_anchor_K={t_anchor_k}, value_J_per_mol={value_j_per_mol}, exponent={exponent:?}"),
                        "anchor must lie below Tc with a positive value; exponent in (0, 1]",
                    )
                },
            )?),
            LatentHeatRecord::Dippr106 {
                a_j_per_mol,
                b,
                c,
                d,
                e,
                tc_k,
                t_min_k,
                t_max_k,
                ..
            } => {
                let rng = range(n, "latent_heat.T_min_K/T_max_K", *t_min_k, *t_max_k)?;
                // The reduced temperature uses the component's own Tc, so the latent heat
                // is zero exactly there; a fit's Tc (`Tc_K`) differs from it by a few
                // hundredths of a kelvin at most and is kept for the record only.
                if let Some(t) = tc_k
                    && !(t.is_finite() && (t - tc).abs() <= 1.0)
                {
                    return Err(invalid(
                        n,
                        "latent_heat.Tc_K",
                        t,
                        "must lie within 1 K of the component's Tc",
                    ));
                }
                let tc_fit = tc;
                LatentHeatModel::Dippr106(Dippr106::new([*a_j_per_mol, *b, *c, *d, *e], tc_fit, rng).ok_or_else(
                    || {
                        invalid(
                            n,
                            "latent_heat",
                            format!("A={a_j_per_mol}"),
                            "constants must be finite, A positive",
                        )
                    },
                )?)
            }
        };
        positive_cp(n, "liquid_heat_capacity", &liquid_cp, tc)?;
        if latent_heat.latent_heat(tb).partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
            return Err(invalid(
                n,
                "latent_heat",
                tb,
                "latent heat is not positive at the boiling point",
            ));
        }

        // Every source key must resolve.
        let mut provenance = id.provenance.clone();
        provenance.insert(4, ("normal_boiling_point_K".to_string(), tb_record.provenance()));
        let vp = match vp_record {
            VapourPressureRecord::Antoine { provenance, .. } | VapourPressureRecord::Extended { provenance, .. } => {
                provenance
            }
        };
        provenance.insert(5, ("vapour_pressure".to_string(), vp.into()));
        provenance.insert(
            6,
            (
                "liquid_heat_capacity".to_string(),
                heat_capacity_provenance(liquid_cp_record).into(),
            ),
        );
        let lh = match latent_record {
            LatentHeatRecord::Watson { provenance, .. } | LatentHeatRecord::Dippr106 { provenance, .. } => provenance,
        };
        provenance.push(("latent_heat".to_string(), lh.into()));
        if let Some(w) = &record.water_miscibility {
            if let Some(s) = w.solubility_in_water_mass_percent
                && !(s.is_finite() && (0.0..=100.0).contains(&s))
            {
                return Err(invalid(
                    n,
                    "water_miscibility.solubility_in_water_mass_percent",
                    s,
                    "must lie in [0, 100]",
                ));
            }
            provenance.push(("water_miscibility".to_string(), (&w.provenance).into()));
        }
        check_sources(n, &provenance, sources)?;

        Ok(Self {
            synonyms: id.synonyms,
            cas: id.cas,
            formula: id.formula,
            name,
            molar_mass_g_per_mol: molar_mass,
            critical_temperature_k: tc,
            critical_pressure_pa: pc,
            acentric_factor: omega,
            normal_boiling_point_k: tb,
            vapour_pressure,
            liquid_cp,
            vapour_cp,
            latent_heat,
            provenance,
            record,
        })
    }

    /// How the component mixes with liquid water (`None`: not recorded, as in most user
    /// components).
    pub fn water_miscibility(&self) -> Option<WaterMiscibility> {
        self.record.water_miscibility.as_ref().map(|w| w.class)
    }

    /// The solubility in water at 25 °C, mass %, where the library records it.
    pub fn water_solubility_mass_percent(&self) -> Option<f64> {
        self.record
            .water_miscibility
            .as_ref()
            .and_then(|w| w.solubility_in_water_mass_percent)
    }

    /// The component's name as the library spells it.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Other accepted names.
    pub fn synonyms(&self) -> &[String] {
        &self.synonyms
    }
    /// CAS registry number.
    pub fn cas(&self) -> &str {
        &self.cas
    }
    /// Molecular formula.
    pub fn formula(&self) -> &str {
        &self.formula
    }
    /// Molar mass, g/mol (numerically kg/kmol).
    pub fn molar_mass_g_per_mol(&self) -> f64 {
        self.molar_mass_g_per_mol
    }
    /// Critical temperature, K.
    pub fn critical_temperature_k(&self) -> f64 {
        self.critical_temperature_k
    }
    /// Critical pressure, Pa.
    pub fn critical_pressure_pa(&self) -> f64 {
        self.critical_pressure_pa
    }
    /// Acentric factor (dimensionless).
    pub fn acentric_factor(&self) -> f64 {
        self.acentric_factor
    }
    /// Normal boiling point (at 101.325 kPa), K.
    pub fn normal_boiling_point_k(&self) -> f64 {
        self.normal_boiling_point_k
    }
    /// The vapour-pressure correlation.
    pub fn vapour_pressure(&self) -> &VapourPressureModel {
        &self.vapour_pressure
    }
    /// The liquid heat-capacity correlation, J/(mol·K).
    pub fn liquid_heat_capacity(&self) -> &HeatCapacityModel {
        &self.liquid_cp
    }
    /// The ideal-gas heat-capacity correlation, J/(mol·K).
    pub fn vapour_heat_capacity(&self) -> &HeatCapacityModel {
        &self.vapour_cp
    }
    /// The latent-heat correlation, J/mol.
    pub fn latent_heat(&self) -> &LatentHeatModel {
        &self.latent_heat
    }
    /// Each field's provenance, in schema order: `(field name, provenance)`.
    pub fn provenance(&self) -> &[(String, Provenance)] {
        &self.provenance
    }
    /// The record the component was built from (the component-file schema).
    pub(crate) fn record(&self) -> &ComponentRecord {
        &self.record
    }

    /// The component written back in the component-file schema, as JSON.
    pub fn to_json(&self) -> serde_json::Value {
        serde_json::to_value(&self.record).unwrap_or(serde_json::Value::Null)
    }
}

/// A checked gas: a component with no vapour pressure, liquid heat capacity or latent heat,
/// described by what a gas dissolved in a liquid needs (molar mass, critical constants,
/// acentric factor, ideal-gas heat capacity), from a component-file record with
/// `"kind": "gas"`. The built-in library holds none yet; a user's component file may.
///
/// ```
/// use flashduty::library::Library;
/// let file = r#"{"schema": "flashduty-components/1",
///   "sources": {"invented": "Invented for this example, not data."},
///   "components": [{"name": "examplogen", "kind": "gas", "cas": "0-00-0", "formula": "X2",
///     "molar_mass_g_per_mol": {"value": 30.0, "source": "invented"},
///     "critical_temperature_K": {"value": 150.0, "source": "invented"},
///     "critical_pressure_Pa": {"value": 4.0e6, "source": "invented"},
///     "acentric_factor": {"value": 0.03, "source": "invented"},
///     "vapour_heat_capacity": {"form": "constant", "value": 29.1, "T_min_K": 200, "T_max_K": 1000,
///       "source": "invented"}}]}"#;
/// let mut lib = Library::default();
/// assert_eq!(lib.add_json("gas.json", file).unwrap(), 1);
/// let gas = lib.gas("examplogen").unwrap();
/// assert_eq!(gas.critical_temperature_k(), 150.0);
/// // A gas is not a condensable component: Raoult's law cannot take it.
/// assert!(lib.get("examplogen").is_err());
/// // It is written back through the same schema.
/// assert_eq!(gas.to_json()["kind"], "gas");
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct Gas {
    name: String,
    synonyms: Vec<String>,
    cas: String,
    formula: String,
    molar_mass_g_per_mol: f64,
    critical_temperature_k: f64,
    critical_pressure_pa: f64,
    acentric_factor: f64,
    vapour_cp: HeatCapacityModel,
    provenance: Vec<(String, Provenance)>,
    record: ComponentRecord,
}

impl Gas {
    /// Checks a record of kind gas and builds it. `sources` is the file's bibliography.
    pub(crate) fn from_record(
        record: ComponentRecord,
        sources: &std::collections::BTreeMap<String, String>,
    ) -> Result<Self, ComponentError> {
        let id = Identity::of(&record)?;
        if let Err(why) = record.check_kind() {
            return Err(invalid(&id.name, "kind", "gas", &why));
        }
        check_sources(&id.name, &id.provenance, sources)?;
        Ok(Self {
            name: id.name,
            synonyms: id.synonyms,
            cas: id.cas,
            formula: id.formula,
            molar_mass_g_per_mol: id.molar_mass,
            critical_temperature_k: id.tc,
            critical_pressure_pa: id.pc,
            acentric_factor: id.omega,
            vapour_cp: id.vapour_cp,
            provenance: id.provenance,
            record,
        })
    }

    /// The gas's name as the library spells it.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Other accepted names.
    pub fn synonyms(&self) -> &[String] {
        &self.synonyms
    }
    /// CAS registry number.
    pub fn cas(&self) -> &str {
        &self.cas
    }
    /// Molecular formula.
    pub fn formula(&self) -> &str {
        &self.formula
    }
    /// Molar mass, g/mol.
    pub fn molar_mass_g_per_mol(&self) -> f64 {
        self.molar_mass_g_per_mol
    }
    /// Critical temperature, K.
    pub fn critical_temperature_k(&self) -> f64 {
        self.critical_temperature_k
    }
    /// Critical pressure, Pa.
    pub fn critical_pressure_pa(&self) -> f64 {
        self.critical_pressure_pa
    }
    /// Acentric factor (dimensionless).
    pub fn acentric_factor(&self) -> f64 {
        self.acentric_factor
    }
    /// The ideal-gas heat-capacity correlation, J/(mol·K).
    pub fn vapour_heat_capacity(&self) -> &HeatCapacityModel {
        &self.vapour_cp
    }
    /// Each field's provenance, in schema order: `(field name, provenance)`.
    pub fn provenance(&self) -> &[(String, Provenance)] {
        &self.provenance
    }
    /// The gas written back in the component-file schema, as JSON.
    pub fn to_json(&self) -> serde_json::Value {
        serde_json::to_value(&self.record).unwrap_or(serde_json::Value::Null)
    }
}
