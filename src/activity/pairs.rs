//! Binary parameters of the activity models: the built-in set (`data/binary_pairs.json`,
//! embedded) and the user's own, from a case or a parameter file (JSON or TOML, one schema).

use super::error::ActivityError;
use super::model::LiquidModel;
use crate::units::GAS_CONSTANT;
use serde::Deserialize;
use serde_json::Value;
use std::collections::BTreeMap;
use std::sync::OnceLock;

/// The built-in parameter file, embedded at compile time.
pub const BUILTIN_PAIRS_JSON: &str = include_str!("../../data/binary_pairs.json");

/// The schema tag of a parameter file.
pub const PAIRS_SCHEMA: &str = "flashduty-binary-parameters/1";

/// The largest parameter file read, bytes (a file of thousands of pairs is far smaller).
const MAX_FILE_BYTES: u64 = 4 << 20;

/// Thermochemical calorie, J (common practice: the calorie of the DECHEMA tables).
const CALORIE_J: f64 = 4.184;

pub(crate) fn key(s: &str) -> String {
    s.trim().to_lowercase()
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    #[serde(default)]
    schema: Option<String>,
    #[serde(default)]
    sources: BTreeMap<String, String>,
    #[serde(default)]
    uniquac_components: BTreeMap<String, RawSize>,
    #[serde(default)]
    pairs: Vec<RawPair>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSize {
    r: f64,
    q: f64,
    #[serde(default)]
    source: Option<String>,
    #[serde(default)]
    from_memory: bool,
    #[serde(default)]
    note: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPair {
    components: Vec<String>,
    #[serde(default)]
    wilson: Option<RawWilson>,
    #[serde(default)]
    nrtl: Option<RawNrtl>,
    #[serde(default)]
    uniquac: Option<RawUniquac>,
    #[serde(default, rename = "T_min_K")]
    t_min_k: Option<f64>,
    #[serde(default, rename = "T_max_K")]
    t_max_k: Option<f64>,
    #[serde(default)]
    source: Option<String>,
    #[serde(default)]
    from_memory: bool,
    #[serde(default)]
    note: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawWilson {
    a12: Value,
    a21: Value,
    #[serde(rename = "V1_cm3_per_mol")]
    v1: f64,
    #[serde(rename = "V2_cm3_per_mol")]
    v2: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawNrtl {
    b12: Value,
    b21: Value,
    alpha: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawUniquac {
    u12: Value,
    u21: Value,
}

/// Where a pair's or a component's parameters come from.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PairSource {
    /// The citation (the bibliography entry the file's key names, or the text given).
    pub citation: String,
    /// Whether the values were typed from memory of that source.
    pub from_memory: bool,
    /// How the values were taken or derived.
    pub note: Option<String>,
}

/// The parameters of one binary pair, checked, with the energies over R in kelvin.
#[derive(Debug, Clone, PartialEq)]
pub struct PairRecord {
    /// The two components as the file names them (component 1, component 2).
    pub components: [String; 2],
    /// Wilson a₁₂/R, a₂₁/R (K) and the molar volumes V₁, V₂ (cm³/mol).
    pub wilson: Option<(f64, f64, f64, f64)>,
    /// NRTL b₁₂/R, b₂₁/R (K) and α.
    pub nrtl: Option<(f64, f64, f64)>,
    /// UNIQUAC u₁₂/R, u₂₁/R (K).
    pub uniquac: Option<(f64, f64)>,
    /// The temperature range of the data the parameters were fitted to, K.
    pub range: Option<(f64, f64)>,
    /// The source key or text.
    pub source: String,
    /// The source in full.
    pub provenance: PairSource,
}

impl PairRecord {
    /// Whether the pair has parameters for `kind`.
    pub fn has(&self, kind: LiquidModel) -> bool {
        match kind {
            LiquidModel::Wilson => self.wilson.is_some(),
            LiquidModel::Nrtl => self.nrtl.is_some(),
            LiquidModel::Uniquac => self.uniquac.is_some(),
            LiquidModel::Ideal => false,
        }
    }

    /// (e₁₂, e₂₁, extra): the two energies over R (K) and, for Wilson, the volumes, for
    /// NRTL, (α, α).
    pub(crate) fn energies(&self, kind: LiquidModel) -> (f64, f64, Option<(f64, f64)>) {
        match kind {
            LiquidModel::Wilson => self
                .wilson
                .map_or((0.0, 0.0, None), |(a, b, v1, v2)| (a, b, Some((v1, v2)))),
            LiquidModel::Nrtl => self.nrtl.map_or((0.0, 0.0, None), |(a, b, al)| (a, b, Some((al, al)))),
            LiquidModel::Uniquac => self.uniquac.map_or((0.0, 0.0, None), |(a, b)| (a, b, None)),
            LiquidModel::Ideal => (0.0, 0.0, None),
        }
    }

    /// The fitted temperature range, K.
    pub fn range_k(&self) -> Option<(f64, f64)> {
        self.range
    }
}

/// The UNIQUAC volume and area parameters r and q of a component.
#[derive(Debug, Clone, PartialEq)]
pub struct SizeParameters {
    /// r, the relative van der Waals volume.
    pub r: f64,
    /// q, the relative van der Waals surface area.
    pub q: f64,
    /// Where they come from.
    pub provenance: PairSource,
}

/// A set of binary parameters: the built-in set, to which a case's or a file's are added
/// (a later pair replaces an earlier one of the same two components).
///
/// ```
/// use flashduty::activity::BinaryParameters;
/// let mut set = BinaryParameters::builtin().clone();
/// let added = set.add_json("mine.json", r#"{"pairs": [{"components": ["benzene", "toluene"],
///     "nrtl": {"b12": "120 cal/mol", "b21": "-60 cal/mol", "alpha": 0.3}, "source": "invented"}]}"#).unwrap();
/// assert_eq!(added, 1);
/// let bad = set.add_json("mine.json", r#"{"pairs": [{"components": ["benzene", "toluene"],
///     "nrtl": {"b12": 1, "b21": 1, "alpha": 1.5}}]}"#).unwrap_err();
/// assert_eq!(bad.kind(), "invalid-parameter");
/// assert!(bad.to_string().starts_with("mine.json pairs[0].nrtl.alpha: 1.5"));
/// ```
#[derive(Debug, Clone, Default)]
pub struct BinaryParameters {
    records: Vec<PairRecord>,
    sizes: BTreeMap<String, SizeParameters>,
    /// The index of the first record the user added.
    user_from: usize,
}

impl BinaryParameters {
    /// The built-in set (parsed once). Should the embedded file fail to load (the tests
    /// check it does not), this is empty rather than a panic.
    pub fn builtin() -> &'static BinaryParameters {
        static SET: OnceLock<BinaryParameters> = OnceLock::new();
        SET.get_or_init(|| {
            let mut set = BinaryParameters::default();
            if set.add_json("<built-in>", BUILTIN_PAIRS_JSON).is_err() {
                set = BinaryParameters::default();
            }
            set.user_from = set.records.len();
            set
        })
    }

    /// The built-in set, reporting any error in it.
    ///
    /// # Errors
    /// As [`add_json`](Self::add_json).
    pub fn try_builtin() -> Result<BinaryParameters, ActivityError> {
        let mut set = BinaryParameters::default();
        set.add_json("<built-in>", BUILTIN_PAIRS_JSON)?;
        set.user_from = set.records.len();
        Ok(set)
    }

    /// All pairs, built-in first.
    pub fn records(&self) -> &[PairRecord] {
        &self.records
    }

    /// The pairs added after the built-in set.
    pub fn user_records(&self) -> &[PairRecord] {
        &self.records[self.user_from.min(self.records.len())..]
    }

    /// The UNIQUAC r and q of a component (by lower-cased name, synonym or CAS number).
    pub fn size(&self, key_name: &str) -> Option<&SizeParameters> {
        self.sizes.get(&key(key_name))
    }

    /// Adds the pairs and sizes of a parameter file's JSON text; returns how many pairs.
    ///
    /// # Errors
    /// [`ActivityError::Parse`] for bad syntax, an unknown key or a wrong schema tag;
    /// [`ActivityError::InvalidValue`] for a value that is not finite or out of range.
    pub fn add_json(&mut self, file: &str, text: &str) -> Result<usize, ActivityError> {
        let raw: RawFile = serde_json::from_str(text).map_err(|e| ActivityError::Parse {
            file: file.to_string(),
            message: e.to_string(),
        })?;
        self.add_raw(file, &format!("{file} "), raw)
    }

    /// As [`add_json`](Self::add_json) for TOML text.
    ///
    /// # Errors
    /// As [`add_json`](Self::add_json).
    pub fn add_toml(&mut self, file: &str, text: &str) -> Result<usize, ActivityError> {
        let raw: RawFile = toml::from_str(text).map_err(|e| ActivityError::Parse {
            file: file.to_string(),
            message: e.to_string().replace('\n', " "),
        })?;
        self.add_raw(file, &format!("{file} "), raw)
    }

    /// As [`add_json`](Self::add_json) for a JSON value (a case's `binary_parameters`).
    ///
    /// # Errors
    /// As [`add_json`](Self::add_json).
    pub fn add_value(&mut self, field: &str, value: &Value) -> Result<usize, ActivityError> {
        let raw: RawFile = serde_json::from_value(value.clone()).map_err(|e| ActivityError::Parse {
            file: field.to_string(),
            message: e.to_string(),
        })?;
        self.add_raw(field, &format!("{field}."), raw)
    }

    /// Reads a parameter file (`.toml` as TOML, anything else as JSON) and adds it.
    ///
    /// # Errors
    /// [`ActivityError::Parse`] if it cannot be read, else as [`add_json`](Self::add_json).
    pub fn add_path(&mut self, path: &std::path::Path) -> Result<usize, ActivityError> {
        use std::io::Read;
        let name = crate::units::clip(&path.display().to_string()).into_owned();
        let fail = |message: String| ActivityError::Parse {
            file: name.clone(),
            message,
        };
        // Only a regular file of a sane size: a case may name any path, and a device or a
        // pipe (/dev/zero, /dev/stdin) must not hang the reader.
        let meta = std::fs::metadata(path).map_err(|e| fail(e.to_string()))?;
        if !meta.is_file() {
            return Err(fail("not a regular file".into()));
        }
        if meta.len() > MAX_FILE_BYTES {
            return Err(fail(format!(
                "larger than {MAX_FILE_BYTES} bytes; not a parameter file"
            )));
        }
        let mut text = String::new();
        std::fs::File::open(path)
            .and_then(|f| f.take(MAX_FILE_BYTES).read_to_string(&mut text))
            .map_err(|e| fail(e.to_string()))?;
        if path.extension().is_some_and(|e| e.eq_ignore_ascii_case("toml")) {
            self.add_toml(&name, &text)
        } else {
            self.add_json(&name, &text)
        }
    }

    /// Refuses a user pair naming a component that `is_in_case` does not know.
    ///
    /// # Errors
    /// [`ActivityError::PairNotInCase`] naming the pair's field.
    pub fn check_user_pairs(&self, is_in_case: impl Fn(&str) -> bool) -> Result<(), ActivityError> {
        for (i, rec) in self.user_records().iter().enumerate() {
            for (k, name) in rec.components.iter().enumerate() {
                if !is_in_case(name) {
                    return Err(ActivityError::PairNotInCase {
                        field: format!("binary_parameters.pairs[{i}].components[{k}]"),
                        name: crate::units::clip(name).into_owned(),
                    });
                }
            }
        }
        Ok(())
    }

    fn add_raw(&mut self, file: &str, prefix: &str, raw: RawFile) -> Result<usize, ActivityError> {
        if let Some(s) = &raw.schema
            && s != PAIRS_SCHEMA
        {
            return Err(ActivityError::Parse {
                file: file.to_string(),
                message: format!("schema is '{}', expected '{PAIRS_SCHEMA}'", crate::units::clip(s)),
            });
        }
        let cite = |source: &Option<String>, from_memory: bool, note: &Option<String>| PairSource {
            citation: source
                .as_ref()
                .map(|s| raw.sources.get(s).cloned().unwrap_or_else(|| s.clone()))
                .unwrap_or_default(),
            from_memory,
            note: note.clone(),
        };
        let invalid = |field: String, value: f64, reason: &'static str| ActivityError::InvalidValue {
            field: format!("{prefix}{field}"),
            value: value.to_string(),
            reason,
        };
        let mut sizes = Vec::new();
        for (name, s) in &raw.uniquac_components {
            for (what, v) in [("r", s.r), ("q", s.q)] {
                if !(v.is_finite() && v > 0.0) {
                    return Err(invalid(
                        format!("uniquac_components.{}.{what}", crate::units::clip(name)),
                        v,
                        "is not a positive finite number",
                    ));
                }
            }
            sizes.push((
                key(name),
                SizeParameters {
                    r: s.r,
                    q: s.q,
                    provenance: cite(&s.source, s.from_memory, &s.note),
                },
            ));
        }
        let mut records = Vec::new();
        for (i, p) in raw.pairs.iter().enumerate() {
            let at = |f: &str| format!("pairs[{i}].{f}");
            let [first, second] = p.components.as_slice() else {
                return Err(ActivityError::Parse {
                    file: file.to_string(),
                    message: format!("{}: give exactly two component names", at("components")),
                });
            };
            if key(first) == key(second) || first.trim().is_empty() || second.trim().is_empty() {
                return Err(ActivityError::Parse {
                    file: file.to_string(),
                    message: format!("{}: give two different component names", at("components")),
                });
            }
            let energy = |f: String, v: &Value| -> Result<f64, ActivityError> {
                energy_over_r(v).map_err(|reason| ActivityError::InvalidValue {
                    field: format!("{prefix}{f}"),
                    value: crate::units::clip(&v.to_string()).into_owned(),
                    reason,
                })
            };
            let wilson = match &p.wilson {
                Some(w) => {
                    for (f, v) in [("wilson.V1_cm3_per_mol", w.v1), ("wilson.V2_cm3_per_mol", w.v2)] {
                        if !(v.is_finite() && v > 0.0) {
                            return Err(invalid(at(f), v, "is not a positive finite molar volume"));
                        }
                    }
                    Some((
                        energy(at("wilson.a12"), &w.a12)?,
                        energy(at("wilson.a21"), &w.a21)?,
                        w.v1,
                        w.v2,
                    ))
                }
                None => None,
            };
            let nrtl = match &p.nrtl {
                Some(n) => {
                    if !(n.alpha > 0.0 && n.alpha <= 1.0) {
                        return Err(invalid(at("nrtl.alpha"), n.alpha, "is outside (0, 1]"));
                    }
                    Some((
                        energy(at("nrtl.b12"), &n.b12)?,
                        energy(at("nrtl.b21"), &n.b21)?,
                        n.alpha,
                    ))
                }
                None => None,
            };
            let uniquac = match &p.uniquac {
                Some(u) => Some((energy(at("uniquac.u12"), &u.u12)?, energy(at("uniquac.u21"), &u.u21)?)),
                None => None,
            };
            let range = match (p.t_min_k, p.t_max_k) {
                (Some(lo), Some(hi)) if lo.is_finite() && hi.is_finite() && lo > 0.0 && hi >= lo => Some((lo, hi)),
                (None, None) => None,
                (lo, hi) => {
                    return Err(invalid(
                        at("T_min_K"),
                        lo.or(hi).unwrap_or(f64::NAN),
                        "with T_max_K: give both, positive, T_min_K <= T_max_K",
                    ));
                }
            };
            records.push(PairRecord {
                components: [first.clone(), second.clone()],
                wilson,
                nrtl,
                uniquac,
                range,
                source: p.source.clone().unwrap_or_else(|| file.to_string()),
                provenance: cite(&p.source, p.from_memory, &p.note),
            });
        }
        let added = records.len();
        self.records.extend(records);
        self.sizes.extend(sizes);
        Ok(added)
    }
}

/// An interaction energy as given (a number in J/mol, or text with J/mol, kJ/mol, cal/mol
/// or K) over R, in kelvin.
fn energy_over_r(v: &Value) -> Result<f64, &'static str> {
    let value = match v {
        Value::Number(n) => n.as_f64().ok_or("is not a number")? / GAS_CONSTANT,
        Value::String(s) => {
            let s = s.trim();
            let split = s
                .find(|c: char| c.is_ascii_alphabetic() && c != 'e' && c != 'E')
                .unwrap_or(s.len());
            let (number, unit) = s.split_at(split);
            let number: f64 = number
                .trim()
                .parse()
                .map_err(|_| "is not a number with a unit (J/mol, kJ/mol, cal/mol or K)")?;
            match unit.trim() {
                "J/mol" | "" => number / GAS_CONSTANT,
                "kJ/mol" => number * 1e3 / GAS_CONSTANT,
                "cal/mol" => number * CALORIE_J / GAS_CONSTANT,
                "K" => number,
                _ => return Err("has a unit that is not J/mol, kJ/mol, cal/mol or K"),
            }
        }
        _ => return Err("is not a number or a number with a unit"),
    };
    if value.is_finite() {
        Ok(value)
    } else {
        Err("is not finite (τ would not be finite)")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn energies_in_every_unit() {
        // 1 cal = 4.184 J (thermochemical calorie; common practice).
        let k = energy_over_r(&Value::String("100 cal/mol".into())).unwrap();
        assert!((k - 418.4 / GAS_CONSTANT).abs() < 1e-12);
        assert_eq!(energy_over_r(&Value::String("50 K".into())).unwrap(), 50.0);
        assert!((energy_over_r(&serde_json::json!(831.4462618)).unwrap() - 100.0).abs() < 1e-9);
        assert!((energy_over_r(&Value::String("-1.5e0 kJ/mol".into())).unwrap() + 1500.0 / GAS_CONSTANT).abs() < 1e-9);
        assert!(energy_over_r(&Value::String("5 furlongs".into())).is_err());
        assert!(energy_over_r(&Value::String("inf K".into())).is_err());
        assert!(energy_over_r(&Value::Bool(true)).is_err());
    }

    #[test]
    fn builtin_set_loads() {
        let set = BinaryParameters::try_builtin().unwrap();
        assert!(set.records().len() >= 11);
        assert!(set.user_records().is_empty());
        for rec in set.records() {
            assert!(
                !rec.provenance.citation.is_empty(),
                "{:?} has no citation",
                rec.components
            );
            assert!(rec.range.is_some(), "{:?} has no range", rec.components);
        }
    }
}
