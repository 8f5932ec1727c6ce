//! Machine-readable warnings that travel with every result: what an engineer needs to know
//! before trusting a number.

use serde::Serialize;
use std::fmt;

/// The pressure above which Raoult's law is commonly doubted, Pa (about 5 bar; common
/// practice, no source).
pub const RAOULT_PRESSURE_LIMIT_PA: f64 = 5e5;

/// CAS numbers of the library's components whose vapour associates (acetic acid, 64-19-7:
/// carboxylic acids form hydrogen-bonded dimers in the vapour; common knowledge).
pub const ASSOCIATING_VAPOUR_CAS: &[&str] = &["64-19-7"];

/// One warning attached to a result.
///
/// ```
/// use flashduty::warnings::Warning;
/// let w = Warning::HighPressure { pressure_pa: 8e5, limit_pa: 5e5 };
/// assert!(w.to_string().contains("Raoult"));
/// let json = serde_json::to_string(&w).unwrap();
/// assert!(json.contains("\"kind\":\"high-pressure\""));
/// ```
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
#[non_exhaustive]
pub enum Warning {
    /// A correlation was evaluated outside the temperature range it was fitted over.
    CorrelationExtrapolated {
        /// The component.
        component: String,
        /// Which correlation: `vapour_pressure`, `liquid_heat_capacity`,
        /// `vapour_heat_capacity` or `latent_heat`.
        correlation: &'static str,
        /// Low end of the fitted range, K.
        range_min_k: f64,
        /// High end of the fitted range, K.
        range_max_k: f64,
        /// The temperature it was evaluated at, K.
        temperature_k: f64,
    },
    /// A component is above its critical temperature: as a liquid it is hypothetical, and
    /// Raoult's law is then a rough extrapolation.
    Supercritical {
        /// The component.
        component: String,
        /// Its critical temperature, K.
        critical_temperature_k: f64,
        /// The temperature, K.
        temperature_k: f64,
    },
    /// The pressure is above about 5 bar, where Raoult's law is commonly doubted.
    HighPressure {
        /// The pressure, Pa.
        pressure_pa: f64,
        /// The limit used, Pa.
        limit_pa: f64,
    },
    /// The paths from the reference state disagree: the liquid Cp, vapour Cp and latent
    /// heat data of a component are not consistent with each other.
    PathSpread {
        /// The component.
        component: String,
        /// Largest spread between vaporisation paths, J/mol.
        spread_j_per_mol: f64,
        /// The spread relative to the latent heat.
        relative: f64,
    },
    /// The second-virial vapour correction was used at a reduced pressure above half the
    /// reduced temperature (Pr > Tr/2, common practice), where the truncated virial
    /// equation is unreliable: at high pressure, or for a saturated vapour near its critical
    /// point. The vapour enthalpy there is rough.
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::VirialOutOfRange {
    ///     component: "water".into(), temperature_k: 600.0, pressure_pa: 12e6,
    ///     reduced_temperature: 0.927, reduced_pressure: 0.544,
    /// };
    /// assert!(w.to_string().starts_with("water: the second-virial vapour correction"));
    /// assert!(serde_json::to_string(&w).unwrap().contains("\"kind\":\"virial-out-of-range\""));
    /// ```
    VirialOutOfRange {
        /// The component.
        component: String,
        /// The temperature, K.
        temperature_k: f64,
        /// The pressure, Pa.
        pressure_pa: f64,
        /// T/Tc.
        reduced_temperature: f64,
        /// P/Pc.
        reduced_pressure: f64,
    },
    /// The duty-specified outlet is not the only state with the outlet's enthalpy at the
    /// outlet pressure: the same duty is also met at the other temperatures listed.
    ///
    /// Along the stream-temperature vaporisation path a vapour's enthalpy is the liquid's
    /// plus the latent heat at T, and the latent heat falls to zero at a component's
    /// critical temperature with an unbounded slope (Watson), so the enthalpy of a vapour,
    /// or of a two-phase mixture whose bubble and dew points straddle that Tc, dips just
    /// below it. A duty that lands in a dip has more than one outlet, and the search returns
    /// one of them. The boiling-point path (the default) and the reference-temperature path
    /// have no dips.
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::OutletNotUnique {
    ///     component: "propane".into(), critical_temperature_k: 369.83,
    ///     outlet_temperature_k: 318.0, other_outlet_temperatures_k: vec![353.3, 372.1],
    /// };
    /// assert!(w.to_string().contains("also met at 353.30 K and 372.10 K"));
    /// assert!(serde_json::to_string(&w).unwrap().contains("\"kind\":\"outlet-not-unique\""));
    /// ```
    OutletNotUnique {
        /// The component whose critical temperature makes the dip.
        component: String,
        /// Its critical temperature, K.
        critical_temperature_k: f64,
        /// The outlet returned, K.
        outlet_temperature_k: f64,
        /// The other outlet temperatures found with the same enthalpy, K, ascending.
        other_outlet_temperatures_k: Vec<f64>,
    },
    /// The mole fractions given summed to within 1e-3 of 1 but not to 1 (as 0.3333 three
    /// times does), and were normalised. Further off, they are refused.
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::CompositionNormalised { sum: 0.9999 };
    /// assert!(w.to_string().contains("0.9999"));
    /// ```
    CompositionNormalised {
        /// The sum of the mole fractions as given.
        sum: f64,
    },
    /// The feed holds water and components the library marks as immiscible with it, and
    /// the flash has one liquid: a second liquid phase is likely, and bubble points, dew
    /// points and duties can be wrong by tens of kelvin and by the latent heat that goes
    /// with them. The immiscible water phase (`water_phase`) models it.
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::SecondLiquidLikely { components: vec!["toluene".into()] };
    /// assert!(w.to_string().contains("water_phase"));
    /// assert!(serde_json::to_string(&w).unwrap().contains("\"kind\":\"second-liquid-likely\""));
    /// ```
    SecondLiquidLikely {
        /// The components immiscible with water.
        components: Vec<String>,
    },
    /// A component put in the water-immiscible organic liquid dissolves in water to a few
    /// per cent (or its miscibility is not recorded): the immiscible water phase is rough
    /// for it.
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::PartlyMiscibleWithWater { component: "ethyl acetate".into(), solubility_mass_percent: Some(8.0) };
    /// assert!(w.to_string().contains("8.0 mass %"));
    /// ```
    PartlyMiscibleWithWater {
        /// The component.
        component: String,
        /// Its solubility in water at 25 °C, mass %, where recorded.
        solubility_mass_percent: Option<f64>,
    },
    /// The feed holds a pair whose liquid the library knows to be strongly non-ideal (its
    /// built-in NRTL parameters give an activity coefficient at infinite dilution above 1.5
    /// or below 1/1.5 at 25 °C, or an azeotrope), and the result takes the liquid as ideal.
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::NonIdealLiquid { first: "ethanol".into(), second: "water".into() };
    /// assert!(w.to_string().contains("liquid_model"));
    /// assert!(serde_json::to_string(&w).unwrap().contains("\"kind\":\"non-ideal-liquid\""));
    /// ```
    NonIdealLiquid {
        /// One component of the pair.
        first: String,
        /// The other.
        second: String,
    },
    /// An activity model has no parameters for a pair of the feed: the pair is taken as
    /// ideal (zero interaction energies).
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::PairWithoutParameters { model: "nrtl", first: "benzene".into(), second: "toluene".into() };
    /// assert!(w.to_string().contains("benzene–toluene"));
    /// ```
    PairWithoutParameters {
        /// The liquid model.
        model: &'static str,
        /// One component of the pair.
        first: String,
        /// The other.
        second: String,
    },
    /// A component whose vapour associates (acetic acid: hydrogen-bonded dimers) is in the
    /// mixture: the ideal-gas vapour, which counts every molecule as a monomer, misstates its
    /// K-value and its vapour enthalpy. The library's own data show the size of it: for
    /// acetic acid the Clausius–Clapeyron latent heat from its vapour pressure exceeds the
    /// calorimetric one by 65 % (`tests/library_data.rs`).
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::VapourAssociates { component: "acetic acid".into() };
    /// assert!(w.to_string().contains("dimers"));
    /// assert!(serde_json::to_string(&w).unwrap().contains("\"kind\":\"vapour-associates\""));
    /// ```
    VapourAssociates {
        /// The component.
        component: String,
    },
    /// A pair's activity-model parameters are used outside the temperature range of the
    /// data they were fitted to.
    ///
    /// ```
    /// use flashduty::warnings::Warning;
    /// let w = Warning::PairParametersExtrapolated { first: "ethanol".into(), second: "water".into(),
    ///     range_min_k: 351.3, range_max_k: 373.2, temperature_k: 300.0 };
    /// assert!(w.to_string().contains("351.3"));
    /// ```
    PairParametersExtrapolated {
        /// One component of the pair.
        first: String,
        /// The other.
        second: String,
        /// Low end of the data's range, K.
        range_min_k: f64,
        /// High end of the data's range, K.
        range_max_k: f64,
        /// The temperature they were used at, K.
        temperature_k: f64,
    },
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Warning::CorrelationExtrapolated {
                component,
                correlation,
                range_min_k,
                range_max_k,
                temperature_k,
            } => write!(
                f,
                "{component}: {correlation} used at {temperature_k:.2} K, outside its range {range_min_k:.2}–{range_max_k:.2} K (extrapolated)"
            ),
            Warning::Supercritical {
                component,
                critical_temperature_k,
                temperature_k,
            } => write!(
                f,
                "{component}: {temperature_k:.2} K is above its critical temperature {critical_temperature_k:.2} K; Raoult's law is a rough extrapolation here"
            ),
            Warning::HighPressure { pressure_pa, limit_pa } => write!(
                f,
                "pressure {:.1} kPa is above {:.0} kPa, where Raoult's law is commonly doubted",
                pressure_pa / 1e3,
                limit_pa / 1e3
            ),
            Warning::PathSpread {
                component,
                spread_j_per_mol,
                relative,
            } => write!(
                f,
                "{component}: enthalpy paths differ by {spread_j_per_mol:.0} J/mol ({:.1} % of the latent heat); its Cp and latent-heat data disagree",
                100.0 * relative
            ),
            Warning::VirialOutOfRange {
                component,
                temperature_k,
                pressure_pa,
                reduced_temperature,
                reduced_pressure,
            } => write!(
                f,
                "{component}: the second-virial vapour correction is used at {temperature_k:.2} K and {:.1} kPa (Pr {reduced_pressure:.3} above Tr/2 = {:.3}), where the truncated virial equation is unreliable; the vapour enthalpy there is rough",
                pressure_pa / 1e3,
                crate::properties::VIRIAL_REDUCED_PRESSURE_PER_REDUCED_TEMPERATURE * reduced_temperature
            ),
            Warning::OutletNotUnique {
                component,
                critical_temperature_k,
                outlet_temperature_k,
                other_outlet_temperatures_k,
            } => {
                let mut others: Vec<String> = other_outlet_temperatures_k
                    .iter()
                    .map(|t| format!("{t:.2} K"))
                    .collect();
                let last = others.pop().unwrap_or_default();
                let others = if others.is_empty() {
                    last
                } else {
                    format!("{} and {last}", others.join(", "))
                };
                write!(
                    f,
                    "the outlet at {outlet_temperature_k:.2} K is not the only one: along the stream-temperature path the enthalpy dips below the outlet's just under the critical temperature of {component} ({critical_temperature_k:.2} K), and the same duty is also met at {}; specify the outlet temperature, or use the boiling-point path",
                    others
                )
            }
            Warning::CompositionNormalised { sum } => write!(
                f,
                "z: the mole fractions given sum to {sum}, not 1; they were normalised to sum to 1"
            ),
            Warning::SecondLiquidLikely { components } => write!(
                f,
                "water and {} do not mix as liquids: a second liquid phase is likely, which this one-liquid result ignores (bubble and dew points and duties can be far off); set water_phase to \"immiscible\"",
                components.join(", ")
            ),
            Warning::PartlyMiscibleWithWater {
                component,
                solubility_mass_percent,
            } => match solubility_mass_percent {
                Some(s) => write!(
                    f,
                    "{component} dissolves in water ({s:.1} mass % at 25 °C) but is put in the water-immiscible organic liquid; the water phase is rough for it (give its solubility in water_phase.organic_in_water)"
                ),
                None => write!(
                    f,
                    "{component}: its miscibility with water is not recorded; it is put in the water-immiscible organic liquid"
                ),
            },
            Warning::NonIdealLiquid { first, second } => write!(
                f,
                "{first} and {second} form a strongly non-ideal liquid, which Raoult's law (an ideal liquid) misses: bubble and dew points can be off by several kelvin and azeotropes are not found; set \"liquid_model\": \"nrtl\" (or wilson, uniquac)"
            ),
            Warning::VapourAssociates { component } => write!(
                f,
                "{component}: its vapour is largely hydrogen-bonded dimers near its boiling point, which the ideal-gas vapour ignores; its K-value and vapour enthalpy are rough (the library's Clausius–Clapeyron latent heat for it is 65 % off for this reason)"
            ),
            Warning::PairWithoutParameters { model, first, second } => write!(
                f,
                "{model}: no parameters for the pair {first}–{second}; it is taken as ideal (give them in binary_parameters)"
            ),
            Warning::PairParametersExtrapolated {
                first,
                second,
                range_min_k,
                range_max_k,
                temperature_k,
            } => write!(
                f,
                "the {first}–{second} parameters were fitted to data from {range_min_k:.1} K to {range_max_k:.1} K and are used at {temperature_k:.2} K (extrapolated)"
            ),
        }
    }
}

/// Removes the warnings that do not apply to a pure-component feed (one component with a
/// mole fraction above zero): Raoult's law is then exact at saturation, so the
/// high-pressure doubt about it does not arise.
pub(crate) fn drop_for_pure_feed(z: &[f64], list: &mut Vec<Warning>) {
    if z.iter().filter(|&&v| v > 0.0).count() == 1 {
        list.retain(|w| !matches!(w, Warning::HighPressure { .. }));
    }
}

/// Adds `w` to `list` unless an equal warning for the same component and correlation is
/// already there (the first occurrence is kept).
pub(crate) fn push_unique(list: &mut Vec<Warning>, w: Warning) {
    let same = |a: &Warning| match (a, &w) {
        (
            Warning::CorrelationExtrapolated {
                component: c1,
                correlation: k1,
                ..
            },
            Warning::CorrelationExtrapolated {
                component: c2,
                correlation: k2,
                ..
            },
        ) => c1 == c2 && k1 == k2,
        (Warning::Supercritical { component: c1, .. }, Warning::Supercritical { component: c2, .. }) => c1 == c2,
        (Warning::HighPressure { .. }, Warning::HighPressure { .. }) => true,
        (Warning::PathSpread { component: c1, .. }, Warning::PathSpread { component: c2, .. }) => c1 == c2,
        (Warning::VirialOutOfRange { component: c1, .. }, Warning::VirialOutOfRange { component: c2, .. }) => c1 == c2,
        (Warning::SecondLiquidLikely { .. }, Warning::SecondLiquidLikely { .. }) => true,
        (Warning::VapourAssociates { component: c1 }, Warning::VapourAssociates { component: c2 }) => c1 == c2,
        (
            Warning::PartlyMiscibleWithWater { component: c1, .. },
            Warning::PartlyMiscibleWithWater { component: c2, .. },
        ) => c1 == c2,
        (Warning::NonIdealLiquid { first: a1, second: b1 }, Warning::NonIdealLiquid { first: a2, second: b2 })
        | (
            Warning::PairWithoutParameters {
                first: a1, second: b1, ..
            },
            Warning::PairWithoutParameters {
                first: a2, second: b2, ..
            },
        )
        | (
            Warning::PairParametersExtrapolated {
                first: a1, second: b1, ..
            },
            Warning::PairParametersExtrapolated {
                first: a2, second: b2, ..
            },
        ) => a1 == a2 && b1 == b2,
        _ => false,
    };
    if !list.iter().any(same) {
        list.push(w);
    }
}
