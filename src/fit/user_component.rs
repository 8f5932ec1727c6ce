//! [`UserComponentBuilder`] and [`UserComponent`]: a fitted correlation and the user's
//! values made into a checked component in the library's schema.

use super::antoine::{AntoineFit, published_constants};
use super::cp::CpFit;
use super::error::{FitError, FitWarning};
use super::extended::ExtendedFit;
use super::report::FitReport;
use crate::library::ComponentFileOut;
use crate::library::{Library, SCHEMA};
use crate::properties::component::{
    ComponentRecord, HeatCapacityRecord, LatentHeatRecord, ProvenanceFields, VapourPressureRecord,
};
use crate::properties::{Antoine, AntoineForm, Component, ComponentChecks, ValidityRange, VapourPressure};
use crate::properties::{ComponentKind, Sourced};
use serde_json::Value;
use std::collections::BTreeMap;
use std::fmt;

impl ComponentChecks {
    /// The failed checks as warnings.
    pub fn failures(&self) -> Vec<FitWarning> {
        let mut out = Vec::new();
        if !self.boiling_point_passed() {
            out.push(FitWarning::BoilingPointPressure {
                normal_boiling_point_k: self.normal_boiling_point_k,
                psat_pa: self.psat_at_boiling_point_pa,
                relative_deviation: self.psat_relative_deviation,
                tolerance: self.psat_tolerance,
            });
        }
        if !self.latent_heat_passed() {
            out.push(FitWarning::LatentHeatConsistency {
                normal_boiling_point_k: self.normal_boiling_point_k,
                clausius_clapeyron_j_per_mol: self.clausius_clapeyron_latent_heat_j_per_mol,
                latent_heat_j_per_mol: self.latent_heat_at_boiling_point_j_per_mol,
                relative_deviation: self.latent_heat_relative_deviation,
                tolerance: self.latent_heat_tolerance,
            });
        }
        out
    }
}

#[derive(Debug, Clone)]
pub(super) enum VapourPressureEntry {
    Antoine {
        antoine: Antoine,
        note: Option<String>,
    },
    Extended {
        constants: [f64; 5],
        range: ValidityRange,
        note: Option<String>,
    },
}

#[derive(Debug, Clone)]
pub(super) enum HeatCapacityEntry {
    Polynomial {
        coefficients: Vec<f64>,
        range: ValidityRange,
        note: Option<String>,
    },
    Constant {
        value: f64,
        range: ValidityRange,
    },
}

#[derive(Debug, Clone)]
pub(super) struct Citation {
    source: String,
    from_memory: bool,
    note: Option<String>,
}

/// The schema field names a value can be cited for.
pub(super) const CITABLE_FIELDS: &[&str] = &[
    "molar_mass_g_per_mol",
    "critical_temperature_K",
    "critical_pressure_Pa",
    "acentric_factor",
    "normal_boiling_point_K",
    "vapour_pressure",
    "liquid_heat_capacity",
    "vapour_heat_capacity",
    "latent_heat",
];

pub(super) fn fit_note(r: &FitReport) -> String {
    format!(
        "fitted to {} points, {}-{} K; max |dev| {:.3} %, RMS {:.3} %",
        r.residuals.len(),
        r.validity.min_k,
        r.validity.max_k,
        100.0 * r.max_abs_relative_deviation,
        100.0 * r.rms_relative_deviation
    )
}

/// Builds a user component from fitted correlations and given values, checks it, and writes
/// it as a component file.
///
/// Every value cites the user's source (key `user-data` unless set with
/// [`source_key`](Self::source_key)), whose citation is the text given to [`new`](Self::new),
/// with `from_memory: false`; [`cite`](Self::cite) lets a value cite another source instead.
///
/// [`build`](Self::build) runs the library's checks ([`Component`] schema checks), then the
/// consistency checks at the normal boiling point ([`ComponentChecks`]): Psat(Tb) within
/// 1.5 % of 101.325 kPa and the Clausius–Clapeyron latent heat within 8 % of the latent heat
/// given. Failed checks are warnings, or errors after [`strict`](Self::strict).
///
/// ```
/// use flashduty::fit::{fit_antoine, DataPoint, UserComponentBuilder};
/// use flashduty::library::Library;
/// // Points from the NIST WebBook Antoine constants for benzene (from memory).
/// let psat = |t: f64| 1e5 * 10f64.powf(4.01814 - 1203.835 / (t - 53.226));
/// let pts: Vec<_> = (0..14).map(|i| { let t = 290.0 + 5.0 * i as f64; DataPoint::new(t, psat(t)) }).collect();
/// let vp = fit_antoine(&pts).unwrap();
/// // Benzene constants: CRC Handbook (M, Tb, ΔHvap) and Poling–Prausnitz–O'Connell
/// // (Tc, Pc, ω), from memory; the name and CAS number are made up for the example.
/// let user = UserComponentBuilder::new("benzene-plant", "0000-00-0", "C6H6", "plant laboratory, 2026-03, sample 17")
///     .molar_mass_g_per_mol(78.112)
///     .critical_temperature_k(562.05)
///     .critical_pressure_pa(4.895e6)
///     .acentric_factor(0.210)
///     .normal_boiling_point_k(353.24)
///     .vapour_pressure_antoine(&vp)
///     .liquid_cp_constant(136.0, 280.0, 360.0)
///     .vapour_cp_constant(82.4, 280.0, 600.0)
///     .latent_heat_watson(353.24, 30_720.0, None)
///     .build()
///     .unwrap();
/// assert!(user.warnings().is_empty(), "{:?}", user.warnings());
/// let mut lib = Library::default();
/// lib.add_json("mine.json", &user.to_file_string()).unwrap();
/// assert_eq!(lib.get("benzene-plant").unwrap().cas(), "0000-00-0");
/// ```
#[derive(Debug, Clone)]
pub struct UserComponentBuilder {
    name: String,
    cas: String,
    formula: String,
    synonyms: Vec<String>,
    source_key: String,
    citation: String,
    extra_sources: BTreeMap<String, String>,
    citations: BTreeMap<String, Citation>,
    molar_mass: Option<f64>,
    tc: Option<f64>,
    pc: Option<f64>,
    omega: Option<f64>,
    tb: Option<f64>,
    vapour_pressure: Option<VapourPressureEntry>,
    antoine_form: AntoineForm,
    liquid_cp: Option<HeatCapacityEntry>,
    vapour_cp: Option<HeatCapacityEntry>,
    latent_heat: Option<(f64, f64, Option<f64>)>,
    strict: bool,
}

impl UserComponentBuilder {
    /// Starts a component with its name, CAS number and formula; `citation` is the full text
    /// of the user's source (e.g. "plant laboratory, 2026-03, sample 17").
    pub fn new(
        name: impl Into<String>,
        cas: impl Into<String>,
        formula: impl Into<String>,
        citation: impl Into<String>,
    ) -> Self {
        Self {
            name: name.into(),
            cas: cas.into(),
            formula: formula.into(),
            synonyms: Vec::new(),
            source_key: "user-data".to_string(),
            citation: citation.into(),
            extra_sources: BTreeMap::new(),
            citations: BTreeMap::new(),
            molar_mass: None,
            tc: None,
            pc: None,
            omega: None,
            tb: None,
            vapour_pressure: None,
            antoine_form: AntoineForm::LnPascalKelvin,
            liquid_cp: None,
            vapour_cp: None,
            latent_heat: None,
            strict: false,
        }
    }

    /// The bibliography key of the user's source (default `user-data`).
    pub fn source_key(mut self, key: impl Into<String>) -> Self {
        self.source_key = key.into();
        self
    }

    /// Other accepted names.
    pub fn synonyms<S: Into<String>>(mut self, names: impl IntoIterator<Item = S>) -> Self {
        self.synonyms = names.into_iter().map(Into::into).collect();
        self
    }

    /// Adds a bibliography entry for values that come from elsewhere (see [`cite`](Self::cite)).
    /// A key of the built-in library may be cited without adding it; its citation is copied.
    pub fn source(mut self, key: impl Into<String>, citation: impl Into<String>) -> Self {
        self.extra_sources.insert(key.into(), citation.into());
        self
    }

    /// Makes `field` (a schema field name such as `critical_temperature_K` or
    /// `latent_heat`) cite `source_key` instead of the user's source.
    pub fn cite(mut self, field: &str, source_key: impl Into<String>, from_memory: bool, note: Option<String>) -> Self {
        self.citations.insert(
            field.to_string(),
            Citation {
                source: source_key.into(),
                from_memory,
                note,
            },
        );
        self
    }

    /// Molar mass, g/mol.
    pub fn molar_mass_g_per_mol(mut self, v: f64) -> Self {
        self.molar_mass = Some(v);
        self
    }
    /// Critical temperature, K.
    pub fn critical_temperature_k(mut self, v: f64) -> Self {
        self.tc = Some(v);
        self
    }
    /// Critical pressure, Pa.
    pub fn critical_pressure_pa(mut self, v: f64) -> Self {
        self.pc = Some(v);
        self
    }
    /// Acentric factor.
    pub fn acentric_factor(mut self, v: f64) -> Self {
        self.omega = Some(v);
        self
    }
    /// Normal boiling point, K.
    pub fn normal_boiling_point_k(mut self, v: f64) -> Self {
        self.tb = Some(v);
        self
    }

    /// The vapour pressure from an Antoine fit (its note records the fit's statistics).
    pub fn vapour_pressure_antoine(mut self, fit: &AntoineFit) -> Self {
        self.vapour_pressure = Some(VapourPressureEntry::Antoine {
            antoine: fit.antoine,
            note: Some(fit_note(&fit.report)),
        });
        self
    }

    /// The vapour pressure from given Antoine constants.
    pub fn antoine(mut self, antoine: Antoine) -> Self {
        self.vapour_pressure = Some(VapourPressureEntry::Antoine { antoine, note: None });
        self
    }

    /// The unit convention the Antoine constants are written in (default `ln-Pa-K`, which
    /// writes the fitted constants without conversion).
    pub fn antoine_units(mut self, form: AntoineForm) -> Self {
        self.antoine_form = form;
        self
    }

    /// The vapour pressure from an extended-form fit.
    pub fn vapour_pressure_extended(mut self, fit: &ExtendedFit) -> Self {
        self.vapour_pressure = Some(VapourPressureEntry::Extended {
            constants: fit.constants,
            range: fit.report.validity,
            note: Some(fit_note(&fit.report)),
        });
        self
    }

    /// The liquid heat capacity from a polynomial fit.
    pub fn liquid_cp_fit(mut self, fit: &CpFit) -> Self {
        self.liquid_cp = Some(cp_entry(fit));
        self
    }

    /// A constant liquid heat capacity, J/(mol·K), valid from `t_min_k` to `t_max_k`.
    pub fn liquid_cp_constant(mut self, value: f64, t_min_k: f64, t_max_k: f64) -> Self {
        self.liquid_cp = Some(constant_entry(value, t_min_k, t_max_k));
        self
    }

    /// The ideal-gas heat capacity from a polynomial fit.
    pub fn vapour_cp_fit(mut self, fit: &CpFit) -> Self {
        self.vapour_cp = Some(cp_entry(fit));
        self
    }

    /// A constant ideal-gas heat capacity, J/(mol·K), valid from `t_min_k` to `t_max_k`.
    pub fn vapour_cp_constant(mut self, value: f64, t_min_k: f64, t_max_k: f64) -> Self {
        self.vapour_cp = Some(constant_entry(value, t_min_k, t_max_k));
        self
    }

    /// The latent heat by Watson's correlation from one known value, J/mol at `t_anchor_k`
    /// (usually the normal boiling point); exponent 0.38 unless given.
    pub fn latent_heat_watson(mut self, t_anchor_k: f64, value_j_per_mol: f64, exponent: Option<f64>) -> Self {
        self.latent_heat = Some((t_anchor_k, value_j_per_mol, exponent));
        self
    }

    /// Makes failed consistency checks errors rather than warnings.
    pub fn strict(mut self, strict: bool) -> Self {
        self.strict = strict;
        self
    }

    /// The provenance of `field`: its citation, else the user's source; `note` (a fit's
    /// report) where the citation gives none.
    fn provenance(&self, field: &str, note: Option<&String>) -> ProvenanceFields {
        let (source, from_memory, cited_note) = match self.citations.get(field) {
            Some(c) => (c.source.clone(), c.from_memory, c.note.clone()),
            None => (self.source_key.clone(), false, None),
        };
        ProvenanceFields {
            source,
            from_memory,
            note: cited_note.or_else(|| note.cloned()),
        }
    }

    fn invalid(&self, field: &str, value: impl fmt::Display, why: &str) -> FitError {
        FitError::InvalidValue {
            component: self.name.clone(),
            field: field.to_string(),
            value: value.to_string(),
            why: why.to_string(),
        }
    }

    /// Checks the component and returns it with its checks and file text.
    ///
    /// # Errors
    /// [`FitError::MissingField`] or [`FitError::InvalidValue`] for a missing or non-finite
    /// value or an unknown cited field; [`FitError::Component`] when the library's checks
    /// reject it (naming the field); [`FitError::ChecksFailed`] in strict mode.
    pub fn build(&self) -> Result<UserComponent, FitError> {
        let missing = |field: &'static str| FitError::MissingField {
            component: self.name.clone(),
            field,
        };
        let given = |field: &'static str, v: Option<f64>| -> Result<Sourced, FitError> {
            let value = v.ok_or_else(|| missing(field))?;
            if !value.is_finite() {
                return Err(self.invalid(field, value, "must be a finite number"));
            }
            let p = self.provenance(field, None);
            Ok(Sourced {
                value,
                source: p.source,
                from_memory: p.from_memory,
                note: p.note,
            })
        };
        for field in self.citations.keys() {
            if !CITABLE_FIELDS.contains(&field.as_str()) {
                return Err(self.invalid(
                    "cite",
                    field,
                    &format!("not a citable field; use one of {}", CITABLE_FIELDS.join(", ")),
                ));
            }
        }
        let molar_mass = given("molar_mass_g_per_mol", self.molar_mass)?;
        let tc = given("critical_temperature_K", self.tc)?;
        let pc = given("critical_pressure_Pa", self.pc)?;
        let omega = given("acentric_factor", self.omega)?;
        let tb = given("normal_boiling_point_K", self.tb)?;

        let vapour_pressure = match self
            .vapour_pressure
            .as_ref()
            .ok_or_else(|| missing("vapour_pressure"))?
        {
            VapourPressureEntry::Antoine { antoine, note } => {
                let (a, b, c) = published_constants(antoine, self.antoine_form);
                let r = antoine.validity();
                VapourPressureRecord::Antoine {
                    units: self.antoine_form,
                    a,
                    b,
                    c,
                    t_min_k: r.min_k,
                    t_max_k: r.max_k,
                    provenance: self.provenance("vapour_pressure", note.as_ref()),
                }
            }
            VapourPressureEntry::Extended { constants, range, note } => {
                let [a, b, c, d, e] = *constants;
                VapourPressureRecord::Extended {
                    a,
                    b,
                    c,
                    d,
                    e,
                    t_min_k: range.min_k,
                    t_max_k: range.max_k,
                    provenance: self.provenance("vapour_pressure", note.as_ref()),
                }
            }
        };
        let cp = |field: &'static str, e: &Option<HeatCapacityEntry>| -> Result<HeatCapacityRecord, FitError> {
            Ok(match e.as_ref().ok_or_else(|| missing(field))? {
                HeatCapacityEntry::Polynomial {
                    coefficients,
                    range,
                    note,
                } => HeatCapacityRecord::Polynomial {
                    coefficients: coefficients.clone(),
                    t_min_k: range.min_k,
                    t_max_k: range.max_k,
                    provenance: self.provenance(field, note.as_ref()),
                },
                HeatCapacityEntry::Constant { value, range } => {
                    if !value.is_finite() {
                        return Err(self.invalid(field, value, "must be a finite number"));
                    }
                    HeatCapacityRecord::Constant {
                        value: *value,
                        t_min_k: range.min_k,
                        t_max_k: range.max_k,
                        provenance: self.provenance(field, None),
                    }
                }
            })
        };
        let liquid_cp = cp("liquid_heat_capacity", &self.liquid_cp)?;
        let vapour_cp = cp("vapour_heat_capacity", &self.vapour_cp)?;
        let (t_anchor, dh, exponent) = self.latent_heat.ok_or_else(|| missing("latent_heat"))?;
        for (what, v) in [("T_anchor_K", t_anchor), ("value_J_per_mol", dh)] {
            if !v.is_finite() {
                return Err(self.invalid(&format!("latent_heat.{what}"), v, "must be a finite number"));
            }
        }
        if let Some(n) = exponent
            && !n.is_finite()
        {
            return Err(self.invalid("latent_heat.exponent", n, "must be a finite number"));
        }
        let latent = LatentHeatRecord::Watson {
            t_anchor_k: t_anchor,
            value_j_per_mol: dh,
            exponent,
            provenance: self.provenance("latent_heat", None),
        };

        let record = ComponentRecord {
            name: self.name.clone(),
            kind: ComponentKind::Condensable,
            synonyms: self.synonyms.clone(),
            cas: self.cas.clone(),
            formula: self.formula.clone(),
            molar_mass_g_per_mol: molar_mass,
            critical_temperature_k: tc,
            critical_pressure_pa: pc,
            acentric_factor: omega,
            normal_boiling_point_k: Some(tb),
            vapour_pressure: Some(vapour_pressure),
            liquid_heat_capacity: Some(liquid_cp),
            vapour_heat_capacity: vapour_cp,
            latent_heat: Some(latent),
            water_miscibility: None,
        };

        // The bibliography: the user's source, added sources, and built-in keys cited.
        let mut sources = BTreeMap::new();
        sources.insert(self.source_key.clone(), self.citation.clone());
        sources.extend(self.extra_sources.clone());
        let builtin = Library::builtin().sources();
        for c in self.citations.values() {
            if !sources.contains_key(&c.source)
                && let Some(text) = builtin.get(&c.source)
            {
                sources.insert(c.source.clone(), text.clone());
            }
        }
        let component = Component::from_record(record, &sources)?;

        let checks = ComponentChecks::of(&component);
        let failed = checks.failures();
        if self.strict && !failed.is_empty() {
            return Err(FitError::ChecksFailed {
                component: self.name.clone(),
                failed,
            });
        }
        let mut warnings = failed;
        let range = component.vapour_pressure().validity();
        let tb_k = component.normal_boiling_point_k();
        if !range.contains(tb_k) {
            warnings.insert(
                0,
                FitWarning::BoilingPointOutsideFit {
                    normal_boiling_point_k: tb_k,
                    min_k: range.min_k,
                    max_k: range.max_k,
                },
            );
        }
        Ok(UserComponent {
            component,
            checks,
            warnings,
            sources,
        })
    }
}

pub(super) fn cp_entry(fit: &CpFit) -> HeatCapacityEntry {
    HeatCapacityEntry::Polynomial {
        coefficients: fit.coefficients.clone(),
        range: fit.report.validity,
        note: Some(fit_note(&fit.report)),
    }
}

pub(super) fn constant_entry(value: f64, t_min_k: f64, t_max_k: f64) -> HeatCapacityEntry {
    HeatCapacityEntry::Constant {
        value,
        // An unusable range is caught by the library's checks when built.
        range: ValidityRange {
            min_k: t_min_k,
            max_k: t_max_k,
        },
    }
}

/// A checked user component, its consistency checks, and its component-file text.
#[derive(Debug, Clone)]
pub struct UserComponent {
    component: Component,
    checks: ComponentChecks,
    warnings: Vec<FitWarning>,
    sources: BTreeMap<String, String>,
}

impl UserComponent {
    /// The checked component.
    pub fn component(&self) -> &Component {
        &self.component
    }

    /// The component, consumed.
    pub fn into_component(self) -> Component {
        self.component
    }

    /// The consistency checks at the normal boiling point, with their values.
    pub fn checks(&self) -> &ComponentChecks {
        &self.checks
    }

    /// Failed checks, and a normal boiling point outside the vapour-pressure data.
    pub fn warnings(&self) -> &[FitWarning] {
        &self.warnings
    }

    /// The component file: `schema`, the `sources` it cites, and the component.
    pub fn to_file_json(&self) -> Value {
        ComponentFileOut {
            schema: SCHEMA,
            sources: &self.sources,
            components: vec![self.component.record()],
        }
        .to_json()
    }

    /// The component file as pretty-printed JSON text, for [`Library::add_json`].
    pub fn to_file_string(&self) -> String {
        format!("{:#}\n", self.to_file_json())
    }
}
