//! Quantities and units: parsing `"65 degC"`, `"1 atm"`, `"3.6 kmol/h"`; SI inside.
//!
//! Every quantity is held in SI (K, Pa, mol/s, kg/s, W, J/mol) in a small newtype, so
//! a temperature cannot be passed where a pressure is wanted. Text is parsed as a number,
//! optionally followed by a unit; a bare number is SI. Conversion factors are the exact
//! definitions of the units (international pound 0.45359237 kg, standard gravity
//! 9.80665 m/s², international inch 0.0254 m, IT British thermal unit 1055.05585262 J,
//! standard atmosphere 101 325 Pa, conventional millimetre of mercury 133.322387415 Pa;
//! NIST Special Publication 811, 2008 edition, Appendix B).
//!
//! ```
//! use flashduty::units::{Temperature, Pressure};
//! let t = Temperature::parse("T", "65 degC").unwrap();
//! assert!((t.kelvin() - 338.15).abs() < 1e-12);
//! let p = Pressure::parse("P", "1 atm").unwrap();
//! assert_eq!(p.pascal(), 101_325.0);
//! // A bare number is SI.
//! assert_eq!(Pressure::parse("P", "2e5").unwrap().pascal(), 2e5);
//! ```

use std::fmt;

/// An error in a quantity given by the caller. Each variant names the field and the value.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum UnitError {
    /// The text does not start with a number.
    #[error("{field}: '{}' is not a number (expected e.g. '{example}')", clip(.text))]
    NotANumber {
        /// The field being read.
        field: String,
        /// The text given.
        text: String,
        /// An example of a valid entry for this field.
        example: &'static str,
    },
    /// The unit is not one this quantity accepts.
    #[error("{field}: unknown {kind} unit '{}' (accepted: {accepted})", clip(.unit))]
    UnknownUnit {
        /// The field being read.
        field: String,
        /// The kind of quantity expected.
        kind: QuantityKind,
        /// The unit given.
        unit: String,
        /// The units that are accepted, comma separated.
        accepted: String,
    },
    /// A gauge pressure unit: the flash needs an absolute pressure, and a gauge reading
    /// needs the local atmosphere to become one.
    #[error(
        "{field}: '{}' is a gauge pressure (relative to the local atmosphere); the flash needs an absolute pressure, so add the local atmospheric pressure (101.325 kPa at sea level) and give it in an absolute unit (bara, psia, kPa, atm)",
        clip(.unit)
    )]
    GaugePressure {
        /// The field being read.
        field: String,
        /// The unit given.
        unit: String,
    },
    /// The value is NaN or infinite.
    #[error("{field}: value {value} is not finite")]
    NotFinite {
        /// The field being read.
        field: String,
        /// The value given.
        value: f64,
    },
    /// The value is outside the physically meaningful range (for example a temperature at
    /// or below absolute zero, or a pressure at or below zero).
    #[error("{field}: {value} {unit} is {why}")]
    OutOfRange {
        /// The field being read.
        field: String,
        /// The value, in the unit it was given in.
        value: f64,
        /// The unit it was given in.
        unit: String,
        /// What is wrong with it, e.g. "at or below absolute zero".
        why: &'static str,
    },
}

impl UnitError {
    /// A short, stable, machine-readable name of the error (kebab-case), the same in the
    /// command-line tool's JSON errors and every binding. Wrapped errors give their own.
    ///
    /// ```
    /// use flashduty::units::Temperature;
    /// assert_eq!(Temperature::parse("T", "65 furlongs").unwrap_err().kind(), "unknown-unit");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            UnitError::NotANumber { .. } => "not-a-number",
            UnitError::UnknownUnit { .. } => "unknown-unit",
            UnitError::GaugePressure { .. } => "gauge-pressure",
            UnitError::NotFinite { .. } => "not-finite",
            UnitError::OutOfRange { .. } => "out-of-range",
        }
    }
}

/// The kinds of quantity this crate parses.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum QuantityKind {
    /// Temperature (SI: K).
    Temperature,
    /// Absolute pressure (SI: Pa).
    Pressure,
    /// Molar flow (SI: mol/s).
    MolarFlow,
    /// Mass flow (SI: kg/s).
    MassFlow,
    /// Energy rate, i.e. heat duty (SI: W).
    Power,
    /// Molar enthalpy (SI: J/mol).
    MolarEnthalpy,
}

impl fmt::Display for QuantityKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            QuantityKind::Temperature => "temperature",
            QuantityKind::Pressure => "pressure",
            QuantityKind::MolarFlow => "molar flow",
            QuantityKind::MassFlow => "mass flow",
            QuantityKind::Power => "energy rate",
            QuantityKind::MolarEnthalpy => "molar enthalpy",
        })
    }
}

/// One unit: its spellings, and `si = (value + offset) * scale`.
struct UnitDef {
    names: &'static [&'static str],
    scale: f64,
    offset: f64,
}

const fn unit(names: &'static [&'static str], scale: f64) -> UnitDef {
    UnitDef {
        names,
        scale,
        offset: 0.0,
    }
}

/// International pound in kg (exact; NIST SP 811 B.8).
pub const POUND_KG: f64 = 0.453_592_37;
/// Pound-force per square inch in Pa (exact: 0.45359237 kg × 9.80665 m/s² / 0.0254² m²).
pub const PSI_PA: f64 = POUND_KG * 9.806_65 / (0.0254 * 0.0254);
/// Standard atmosphere in Pa (exact; NIST SP 811 B.8).
pub const ATM_PA: f64 = 101_325.0;

/// The longest text an error message echoes whole, in characters.
pub const ECHO_MAX_CHARS: usize = 60;

/// `text` as error messages echo it: control characters (a line break, say) escaped, so
/// the message stays one line, and whole up to [`ECHO_MAX_CHARS`] characters, else its start
/// and its length, so that a multi-megabyte value gives a short message.
///
/// ```
/// use flashduty::units::clip;
/// assert_eq!(clip("toluene"), "toluene");
/// assert_eq!(clip("2#\n/h"), "2#\\n/h");
/// let long = "x".repeat(1_000_000);
/// assert_eq!(clip(&long), format!("{}... (1000000 characters)", "x".repeat(57)));
/// ```
pub fn clip(text: &str) -> std::borrow::Cow<'_, str> {
    let plain = !text.chars().any(char::is_control);
    if plain && (text.len() <= ECHO_MAX_CHARS || text.chars().count() <= ECHO_MAX_CHARS) {
        return std::borrow::Cow::Borrowed(text);
    }
    let escaped: String = text
        .chars()
        .take(4 * ECHO_MAX_CHARS)
        .flat_map(|c| {
            if c.is_control() {
                c.escape_default().collect::<Vec<char>>()
            } else {
                vec![c]
            }
        })
        .collect();
    let count = text.chars().count();
    if count <= ECHO_MAX_CHARS && escaped.chars().count() <= 4 * ECHO_MAX_CHARS {
        return std::borrow::Cow::Owned(escaped);
    }
    let start: String = escaped.chars().take(ECHO_MAX_CHARS - 3).collect();
    std::borrow::Cow::Owned(format!("{start}... ({count} characters)"))
}
/// Molar gas constant, J/(mol·K) (CODATA 2018; exact since the 2019 SI redefinition): the
/// one definition the crate uses.
pub const GAS_CONSTANT: f64 = 8.314_462_618;
/// Conventional millimetre of mercury in Pa (NIST SP 811 B.8).
pub const MMHG_PA: f64 = 133.322_387_415;
/// International Table British thermal unit in J (exact; NIST SP 811 B.8).
pub const BTU_J: f64 = 1_055.055_852_62;
/// International Table calorie in J (exact; NIST SP 811 B.8), the calorie of process heat
/// duties in kcal/h and Gcal/h.
pub const CALORIE_IT_J: f64 = 4.1868;
/// Cubic foot in m³ (exact: 0.3048³; NIST SP 811 B.8).
pub const CUBIC_FOOT_M3: f64 = 0.3048 * 0.3048 * 0.3048;
/// Moles of ideal gas in one normal cubic metre (0 °C, 101.325 kPa; DIN 1343), mol.
pub const NORMAL_M3_MOL: f64 = ATM_PA / (GAS_CONSTANT * 273.15);
/// Moles of ideal gas in one standard cubic metre (15 °C, 101.325 kPa; ISO 13443), mol.
pub const STANDARD_M3_MOL: f64 = ATM_PA / (GAS_CONSTANT * 288.15);
/// Moles of ideal gas in one standard cubic foot (60 °F, 14.696 psia; the US gas-industry
/// convention, common practice), mol: about 379.5 scf per lbmol.
pub const STANDARD_FT3_MOL: f64 = 14.696 * PSI_PA * CUBIC_FOOT_M3 / (GAS_CONSTANT * (60.0 + 459.67) * 5.0 / 9.0);

const TEMPERATURE_UNITS: &[UnitDef] = &[
    unit(&["K", "kelvin"], 1.0),
    UnitDef {
        names: &["degC", "°C", "C", "celsius", "deg C"],
        scale: 1.0,
        offset: 273.15,
    },
    UnitDef {
        names: &["degF", "°F", "F", "fahrenheit", "deg F"],
        scale: 5.0 / 9.0,
        offset: 459.67,
    },
    unit(&["degR", "°R", "R", "rankine", "deg R"], 5.0 / 9.0),
];

const PRESSURE_UNITS: &[UnitDef] = &[
    unit(&["Pa"], 1.0),
    unit(&["kPa"], 1e3),
    unit(&["MPa"], 1e6),
    unit(&["bar", "bara"], 1e5),
    unit(&["mbar"], 1e2),
    unit(&["atm"], ATM_PA),
    // Plain "psi" and gauge units are refused: a gauge reading needs the local
    // atmosphere, and the flash needs an absolute pressure.
    unit(&["psia"], PSI_PA),
    unit(&["mmHg"], MMHG_PA),
    // 1 torr = 101325/760 Pa exactly, about 1.4e-7 below the conventional mmHg.
    unit(&["torr", "Torr"], ATM_PA / 760.0),
];

const MOLAR_FLOW_UNITS: &[UnitDef] = &[
    unit(&["mol/s"], 1.0),
    unit(&["mol/min"], 1.0 / 60.0),
    unit(&["mol/h", "mol/hr"], 1.0 / 3600.0),
    unit(&["kmol/s", "kgmol/s"], 1e3),
    unit(&["kmol/min", "kgmol/min"], 1e3 / 60.0),
    unit(&["kmol/h", "kmol/hr", "kgmol/h", "kgmol/hr"], 1e3 / 3600.0),
    unit(&["kmol/d", "kmol/day", "kgmol/d"], 1e3 / 86_400.0),
    unit(&["lbmol/h", "lbmol/hr"], POUND_KG * 1e3 / 3600.0),
    unit(&["lbmol/s"], POUND_KG * 1e3),
    // Standard volumetric gas flows, as ideal gas at the stated standard conditions.
    unit(&["Nm3/h", "Nm3/hr", "Nm³/h"], NORMAL_M3_MOL / 3600.0),
    unit(&["Nm3/d", "Nm3/day"], NORMAL_M3_MOL / 86_400.0),
    unit(&["Sm3/h", "Sm3/hr", "Sm³/h"], STANDARD_M3_MOL / 3600.0),
    unit(&["Sm3/d", "Sm3/day"], STANDARD_M3_MOL / 86_400.0),
    unit(&["scfm", "SCFM"], STANDARD_FT3_MOL / 60.0),
    unit(&["scfh", "SCFH"], STANDARD_FT3_MOL / 3600.0),
    unit(&["scfd", "SCFD"], STANDARD_FT3_MOL / 86_400.0),
    unit(&["MMSCFD", "MMscfd", "MMscf/d"], STANDARD_FT3_MOL * 1e6 / 86_400.0),
];

const MASS_FLOW_UNITS: &[UnitDef] = &[
    unit(&["kg/s"], 1.0),
    unit(&["kg/min"], 1.0 / 60.0),
    unit(&["kg/h", "kg/hr"], 1.0 / 3600.0),
    unit(&["g/s"], 1e-3),
    unit(&["t/h", "tonne/h", "t/hr"], 1e3 / 3600.0),
    unit(&["t/d", "tonne/d", "t/day", "tpd"], 1e3 / 86_400.0),
    unit(&["lb/h", "lb/hr"], POUND_KG / 3600.0),
    unit(&["lb/s"], POUND_KG),
];

const POWER_UNITS: &[UnitDef] = &[
    unit(&["W", "J/s"], 1.0),
    unit(&["kW"], 1e3),
    unit(&["MW"], 1e6),
    unit(&["kJ/h"], 1e3 / 3600.0),
    unit(&["MJ/h"], 1e6 / 3600.0),
    unit(&["GJ/h"], 1e9 / 3600.0),
    unit(&["Btu/h", "Btu/hr", "BTU/h", "BTU/hr"], BTU_J / 3600.0),
    unit(&["MMBtu/h", "MMBtu/hr", "MMBTU/h", "MMBTU/hr"], BTU_J * 1e6 / 3600.0),
    unit(&["kcal/h", "kcal/hr"], CALORIE_IT_J * 1e3 / 3600.0),
    unit(&["Mcal/h", "Mcal/hr"], CALORIE_IT_J * 1e6 / 3600.0),
    unit(&["Gcal/h", "Gcal/hr"], CALORIE_IT_J * 1e9 / 3600.0),
];

const MOLAR_ENTHALPY_UNITS: &[UnitDef] = &[
    unit(&["J/mol", "kJ/kmol"], 1.0),
    unit(&["kJ/mol", "MJ/kmol"], 1e3),
    // Btu/lbmol: 1055.05585262 J / 0.45359237 mol·1e3 = 2.326 J/mol exactly.
    unit(&["Btu/lbmol"], BTU_J / (POUND_KG * 1e3)),
];

fn table(kind: QuantityKind) -> &'static [UnitDef] {
    match kind {
        QuantityKind::Temperature => TEMPERATURE_UNITS,
        QuantityKind::Pressure => PRESSURE_UNITS,
        QuantityKind::MolarFlow => MOLAR_FLOW_UNITS,
        QuantityKind::MassFlow => MASS_FLOW_UNITS,
        QuantityKind::Power => POWER_UNITS,
        QuantityKind::MolarEnthalpy => MOLAR_ENTHALPY_UNITS,
    }
}

fn example(kind: QuantityKind) -> &'static str {
    match kind {
        QuantityKind::Temperature => "65 degC",
        QuantityKind::Pressure => "1 atm",
        QuantityKind::MolarFlow => "3.6 kmol/h",
        QuantityKind::MassFlow => "1200 kg/h",
        QuantityKind::Power => "250 kW",
        QuantityKind::MolarEnthalpy => "40.7 kJ/mol",
    }
}

fn accepted(kind: QuantityKind) -> String {
    table(kind).iter().map(|u| u.names[0]).collect::<Vec<_>>().join(", ")
}

/// Gauge pressure units, refused with the reason.
const GAUGE_UNITS: &[&str] = &[
    "psig", "psi", "barg", "kPag", "kpag", "kPa(g)", "bar(g)", "psi(g)", "MPag", "kg/cm2g",
];

fn find_unit(kind: QuantityKind, field: &str, name: &str) -> Result<&'static UnitDef, UnitError> {
    let name = name.trim();
    if kind == QuantityKind::Pressure && GAUGE_UNITS.iter().any(|g| g.eq_ignore_ascii_case(name)) {
        return Err(UnitError::GaugePressure {
            field: field.to_string(),
            unit: name.to_string(),
        });
    }
    let defs = table(kind);
    // Exact spelling first (so "mbar" and "MPa" keep their case), then case-insensitive.
    defs.iter()
        .find(|u| u.names.contains(&name))
        .or_else(|| {
            defs.iter()
                .find(|u| u.names.iter().any(|n| n.eq_ignore_ascii_case(name)))
                .filter(|u| {
                    // Case-insensitive matching must not read "mpa" (milli?) as MPa.
                    u.names[0] != "MPa"
                })
        })
        .ok_or_else(|| UnitError::UnknownUnit {
            field: field.to_string(),
            kind,
            unit: name.to_string(),
            accepted: accepted(kind),
        })
}

/// Converts `value` in `unit_name` to SI.
///
/// # Errors
/// [`UnitError::UnknownUnit`] when the unit is not one of `kind`'s, and
/// [`UnitError::NotFinite`] for NaN or infinity. No range check is made here.
///
/// ```
/// use flashduty::units::{to_si, QuantityKind};
/// assert_eq!(to_si(QuantityKind::Power, "T", 3.6, "kJ/h").unwrap(), 1.0);
/// ```
pub fn to_si(kind: QuantityKind, field: &str, value: f64, unit_name: &str) -> Result<f64, UnitError> {
    finite(field, value)?;
    let u = find_unit(kind, field, unit_name)?;
    Ok((value + u.offset) * u.scale)
}

/// Converts an SI value to `unit_name`.
///
/// # Errors
/// [`UnitError::UnknownUnit`] when the unit is not one of `kind`'s.
///
/// ```
/// use flashduty::units::{from_si, QuantityKind};
/// let f = from_si(QuantityKind::Temperature, "T", 373.15, "degF").unwrap();
/// assert!((f - 212.0).abs() < 1e-9);
/// ```
pub fn from_si(kind: QuantityKind, field: &str, si: f64, unit_name: &str) -> Result<f64, UnitError> {
    let u = find_unit(kind, field, unit_name)?;
    Ok(si / u.scale - u.offset)
}

fn finite(field: &str, value: f64) -> Result<f64, UnitError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(UnitError::NotFinite {
            field: field.to_string(),
            value,
        })
    }
}

/// Splits `"65 degC"` into `(65.0, "degC")`; the unit is empty for a bare number.
fn split_number(kind: QuantityKind, field: &str, text: &str) -> Result<(f64, String), UnitError> {
    let text = text.trim();
    let not_a_number = || UnitError::NotANumber {
        field: field.to_string(),
        text: text.to_string(),
        example: example(kind),
    };
    // The longest prefix that parses as a number.
    let mut end = 0;
    for (i, c) in text.char_indices() {
        if c.is_ascii_digit() || matches!(c, '.' | '+' | '-' | 'e' | 'E') {
            end = i + c.len_utf8();
        } else {
            break;
        }
    }
    // Back off over a trailing exponent marker that belongs to the unit (e.g. "5E" is not).
    let mut number = &text[..end];
    while !number.is_empty() && number.parse::<f64>().is_err() {
        number = &number[..number.len() - 1];
    }
    if number.is_empty() {
        // "NaN", "inf" and friends: parse them so the error says "not finite".
        let word = text.split_whitespace().next().unwrap_or("");
        if let Ok(v) = word.parse::<f64>() {
            finite(field, v)?;
        }
        return Err(not_a_number());
    }
    let value: f64 = number.parse().map_err(|_| not_a_number())?;
    let unit = text[number.len()..].trim().to_string();
    Ok((finite(field, value)?, unit))
}

/// Parses `"<number> [unit]"` of the given kind into SI. A bare number is SI.
///
/// # Errors
/// [`UnitError::NotANumber`], [`UnitError::UnknownUnit`], [`UnitError::NotFinite`].
/// No range check is made here; the typed constructors add those.
///
/// ```
/// use flashduty::units::{parse_si, QuantityKind};
/// let w = parse_si(QuantityKind::Power, "duty", "1 MMBtu/h").unwrap();
/// assert!((w - 293_071.07017).abs() < 1e-3);
/// ```
pub fn parse_si(kind: QuantityKind, field: &str, text: &str) -> Result<f64, UnitError> {
    let (value, unit_name) = split_number(kind, field, text)?;
    if unit_name.is_empty() {
        return Ok(value);
    }
    to_si(kind, field, value, &unit_name)
}

macro_rules! quantity {
    (
        $(#[$doc:meta])*
        $name:ident, $kind:expr, $si:ident, $si_unit:literal, positive: $positive:expr,
        example: $ex_text:literal => $ex_si:expr
    ) => {
        $(#[$doc])*
        #[derive(Debug, Clone, Copy, PartialEq, PartialOrd, serde::Serialize)]
        #[serde(transparent)]
        pub struct $name(f64);

        impl $name {
            #[doc = concat!("The SI unit this quantity is held in: ", $si_unit, ".")]
            pub const SI_UNIT: &'static str = $si_unit;

            #[doc = concat!("A value in ", $si_unit, ", checked finite (and above zero where the quantity must be).")]
            ///
            /// # Errors
            /// [`UnitError::NotFinite`] or [`UnitError::OutOfRange`], naming `field`.
            ///
            /// ```
            #[doc = concat!("use flashduty::units::", stringify!($name), ";")]
            #[doc = concat!("let q = ", stringify!($name), "::new(\"field\", ", stringify!($ex_si), ").unwrap();")]
            #[doc = concat!("assert_eq!(q.", stringify!($si), "(), ", stringify!($ex_si), ");")]
            /// ```
            pub fn new(field: &str, si: f64) -> Result<Self, UnitError> {
                Self::checked(field, si, si, $si_unit)
            }

            fn checked(field: &str, si: f64, given: f64, given_unit: &str) -> Result<Self, UnitError> {
                finite(field, si)?;
                if $positive && si <= 0.0 {
                    return Err(UnitError::OutOfRange {
                        field: field.to_string(),
                        value: given,
                        unit: given_unit.to_string(),
                        why: if $kind == QuantityKind::Temperature {
                            "at or below absolute zero"
                        } else {
                            "at or below zero"
                        },
                    });
                }
                Ok(Self(si))
            }

            /// Parses text such as
            #[doc = concat!("`\"", $ex_text, "\"`;")]
            /// a bare number is SI.
            ///
            /// # Errors
            /// [`UnitError`] naming `field`: not a number, unknown unit, not finite, or
            /// out of range.
            ///
            /// ```
            #[doc = concat!("use flashduty::units::", stringify!($name), ";")]
            #[doc = concat!("let q = ", stringify!($name), "::parse(\"field\", \"", $ex_text, "\").unwrap();")]
            #[doc = concat!("assert!((q.", stringify!($si), "() - ", stringify!($ex_si), ").abs() < 1e-9 * ", stringify!($ex_si), ");")]
            /// ```
            pub fn parse(field: &str, text: &str) -> Result<Self, UnitError> {
                let (value, unit_name) = split_number($kind, field, text)?;
                if unit_name.is_empty() {
                    return Self::checked(field, value, value, $si_unit);
                }
                let si = to_si($kind, field, value, &unit_name)?;
                Self::checked(field, si, value, &unit_name)
            }

            /// A value given as a number and a unit name.
            ///
            /// # Errors
            /// As [`Self::parse`].
            pub fn from_unit(field: &str, value: f64, unit_name: &str) -> Result<Self, UnitError> {
                let si = to_si($kind, field, value, unit_name)?;
                Self::checked(field, si, value, unit_name)
            }

            #[doc = concat!("The value in ", $si_unit, ".")]
            pub fn $si(self) -> f64 {
                self.0
            }

            /// The value in another unit of the same kind.
            ///
            /// # Errors
            /// [`UnitError::UnknownUnit`].
            pub fn in_unit(self, unit_name: &str) -> Result<f64, UnitError> {
                from_si($kind, "unit", self.0, unit_name)
            }
        }

        impl fmt::Display for $name {
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                write!(f, "{} {}", self.0, $si_unit)
            }
        }
    };
}

quantity!(
    /// An absolute temperature, held in kelvin.
    Temperature, QuantityKind::Temperature, kelvin, "K", positive: true,
    example: "65 degC" => 338.15
);
quantity!(
    /// An absolute pressure, held in pascal. Gauge pressures are not accepted.
    Pressure, QuantityKind::Pressure, pascal, "Pa", positive: true,
    example: "1 atm" => 101325.0
);
quantity!(
    /// A molar flow, held in mol/s.
    MolarFlow, QuantityKind::MolarFlow, mol_per_s, "mol/s", positive: true,
    example: "3.6 kmol/h" => 1.0
);
quantity!(
    /// A mass flow, held in kg/s.
    MassFlow, QuantityKind::MassFlow, kg_per_s, "kg/s", positive: true,
    example: "3.6 t/h" => 1.0
);
quantity!(
    /// An energy rate (a heat duty), held in watts. Positive is heat into the stream.
    Power, QuantityKind::Power, watts, "W", positive: false,
    example: "3.6 MJ/h" => 1000.0
);
quantity!(
    /// A molar enthalpy, held in J/mol.
    MolarEnthalpy, QuantityKind::MolarEnthalpy, joule_per_mol, "J/mol", positive: false,
    example: "40.7 kJ/mol" => 40700.0
);

impl Temperature {
    /// The temperature in degrees Celsius.
    ///
    /// ```
    /// use flashduty::units::Temperature;
    /// assert!((Temperature::new("T", 373.15).unwrap().celsius() - 100.0).abs() < 1e-12);
    /// ```
    pub fn celsius(self) -> f64 {
        self.0 - 273.15
    }
}

impl MassFlow {
    /// The molar flow of this mass flow for a mixture of molar mass `molar_mass_kg_per_mol`.
    ///
    /// # Errors
    /// [`UnitError::OutOfRange`] if the molar mass is not positive and finite.
    ///
    /// ```
    /// use flashduty::units::MassFlow;
    /// let m = MassFlow::parse("flow", "18.015 kg/h").unwrap();
    /// let n = m.to_molar(0.018015).unwrap();
    /// assert!((n.mol_per_s() - 1000.0 / 3600.0).abs() < 1e-12);
    /// ```
    pub fn to_molar(self, molar_mass_kg_per_mol: f64) -> Result<MolarFlow, UnitError> {
        if !(molar_mass_kg_per_mol.is_finite() && molar_mass_kg_per_mol > 0.0) {
            return Err(UnitError::OutOfRange {
                field: "molar_mass".into(),
                value: molar_mass_kg_per_mol,
                unit: "kg/mol".into(),
                why: "not a positive molar mass",
            });
        }
        MolarFlow::new("flow", self.0 / molar_mass_kg_per_mol)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spellings_and_case() {
        assert_eq!(Pressure::parse("P", "1 MPa").unwrap().pascal(), 1e6);
        assert_eq!(Pressure::parse("P", "1 mbar").unwrap().pascal(), 100.0);
        assert_eq!(Pressure::parse("P", "1 KPA").unwrap().pascal(), 1e3);
        assert!(Pressure::parse("P", "1 mpa").is_err());
        assert_eq!(Pressure::parse("P", "760 mmHg").unwrap().pascal(), 760.0 * MMHG_PA);
        assert!((Temperature::parse("T", "-40 degF").unwrap().celsius() + 40.0).abs() < 1e-12);
        assert!((Temperature::parse("T", "25°C").unwrap().kelvin() - 298.15).abs() < 1e-12);
        assert_eq!(Temperature::parse("T", " 300 ").unwrap().kelvin(), 300.0);
        assert_eq!(Power::parse("duty", "-2.5 kW").unwrap().watts(), -2500.0);
        assert_eq!(Power::parse("duty", "1e3").unwrap().watts(), 1000.0);
    }

    #[test]
    fn errors_name_field_and_value() {
        let e = Temperature::parse("inlet.T", "abc").unwrap_err();
        assert!(e.to_string().contains("inlet.T") && e.to_string().contains("abc"));
        let e = Temperature::parse("T", "-300 degC").unwrap_err();
        assert!(matches!(e, UnitError::OutOfRange { .. }), "{e}");
        assert!(e.to_string().contains("-300 degC"), "{e}");
        let e = Pressure::parse("P", "0 bar").unwrap_err();
        assert!(matches!(e, UnitError::OutOfRange { .. }));
        let e = Pressure::parse("P", "3 furlongs").unwrap_err();
        assert!(
            e.to_string().contains("furlongs") && e.to_string().contains("kPa"),
            "{e}"
        );
        assert!(matches!(
            Pressure::parse("P", "NaN bar").unwrap_err(),
            UnitError::NotFinite { .. }
        ));
        assert!(matches!(
            Pressure::parse("P", "inf").unwrap_err(),
            UnitError::NotFinite { .. }
        ));
        assert!(matches!(
            Pressure::new("P", f64::NAN).unwrap_err(),
            UnitError::NotFinite { .. }
        ));
        assert!(matches!(
            Pressure::parse("P", "").unwrap_err(),
            UnitError::NotANumber { .. }
        ));
        assert!(matches!(
            MassFlow::parse("flow", "1 kg/h").unwrap().to_molar(0.0).unwrap_err(),
            UnitError::OutOfRange { .. }
        ));
    }
}

#[cfg(test)]
mod fuzz_regressions {
    use super::*;

    /// Found by the `units` fuzz target (cargo fuzz, 2026-12-03): a line break in the text
    /// was echoed into the message, which must stay one line.
    #[test]
    fn messages_stay_one_line() {
        let text = "(\u{0}\u{0}\n2#/h\u{0}\u{0}";
        for kind in [QuantityKind::Temperature, QuantityKind::MolarFlow, QuantityKind::Power] {
            let e = parse_si(kind, "field", text).unwrap_err();
            assert!(!e.to_string().contains('\n'), "{e}");
        }
        let e = parse_si(QuantityKind::Pressure, "P", "5 bar\nx").unwrap_err();
        assert!(!e.to_string().contains('\n'), "{e}");
    }
}
