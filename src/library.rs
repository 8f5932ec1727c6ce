//! The component library: the built-in set in `data/components.json`, embedded in the
//! binary, and user components read from files in the same schema.
//!
//! The file holds a bibliography (`sources`: key → citation) and a list of components; every
//! number in a component names a key of that bibliography and says whether it was typed
//! from memory. See DEVELOPERS.md for the schema and how to add a component.
//!
//! ```
//! use flashduty::library::Library;
//! let lib = Library::builtin();
//! assert!(lib.len() >= 31);
//! assert_eq!(lib.get("Benzene").unwrap().name(), "benzene");
//! assert_eq!(lib.get("108-88-3").unwrap().name(), "toluene");
//! let err = lib.get("tolune").unwrap_err();
//! assert!(err.to_string().contains("toluene"));
//! ```

use crate::properties::component::ComponentRecord;
use crate::properties::{Component, ComponentError, ComponentKind, Gas};
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::path::Path;
use std::sync::{Arc, OnceLock};

/// The built-in component file, embedded at compile time.
pub const BUILTIN_JSON: &str = include_str!("../data/components.json");

/// The schema tag every component file carries.
pub const SCHEMA: &str = "flashduty-components/1";

/// A look-up that found nothing.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("unknown component '{}'{}", crate::units::clip(.name), suggestion_text(.suggestions))]
pub struct UnknownComponent {
    /// The name or CAS number asked for.
    pub name: String,
    /// The nearest known names, best first.
    pub suggestions: Vec<String>,
}

impl UnknownComponent {
    /// The error's stable machine-readable name: `"unknown-component"`.
    ///
    /// ```
    /// use flashduty::library::Library;
    /// assert_eq!(Library::builtin().get("unobtanium").unwrap_err().kind(), "unknown-component");
    /// ```
    pub fn kind(&self) -> &'static str {
        "unknown-component"
    }
}

fn suggestion_text(s: &[String]) -> String {
    if s.is_empty() {
        String::new()
    } else {
        format!(" (did you mean {}?)", s.join(", "))
    }
}

#[derive(Debug, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct ComponentFile {
    schema: String,
    #[serde(default)]
    sources: BTreeMap<String, String>,
    /// Parsed one by one, so that an error can name the component it is in.
    components: Vec<serde_json::Value>,
}

/// A component file as written: the same schema that [`Library::add_json`] reads, through
/// the same serde types.
#[derive(Debug, Serialize)]
pub(crate) struct ComponentFileOut<'a> {
    pub schema: &'a str,
    pub sources: &'a BTreeMap<String, String>,
    pub components: Vec<&'a ComponentRecord>,
}

impl ComponentFileOut<'_> {
    /// The file as JSON.
    pub fn to_json(&self) -> serde_json::Value {
        serde_json::to_value(self).unwrap_or(serde_json::Value::Null)
    }
}

/// A set of components with look-up by name, synonym or CAS number.
#[derive(Debug, Clone, Default)]
pub struct Library {
    components: Vec<Arc<Component>>,
    sources: BTreeMap<String, String>,
    index: BTreeMap<String, usize>,
    /// Components of kind gas (`"kind": "gas"`), looked up apart: they have no vapour
    /// pressure, so the K-value models of the condensable components cannot take them.
    gases: Vec<Arc<Gas>>,
}

fn key(s: &str) -> String {
    s.trim().to_lowercase()
}

impl Library {
    /// The built-in library (parsed once, then shared).
    ///
    /// The embedded file is checked by the test suite; should it ever fail to load, this
    /// returns an empty library rather than panic, and [`Library::try_builtin`] gives the
    /// reason.
    pub fn builtin() -> &'static Library {
        static LIB: OnceLock<Library> = OnceLock::new();
        LIB.get_or_init(|| Self::try_builtin().unwrap_or_default())
    }

    /// Parses the built-in library, reporting any error in it.
    ///
    /// # Errors
    /// A [`ComponentError`] naming the component and field.
    pub fn try_builtin() -> Result<Library, ComponentError> {
        let mut lib = Library::default();
        lib.add_json("<built-in>", BUILTIN_JSON)?;
        Ok(lib)
    }

    /// Adds the components of a JSON component file's text.
    ///
    /// # Errors
    /// [`ComponentError::Parse`] for bad syntax, a wrong schema tag or a missing field;
    /// [`ComponentError::InvalidValue`], [`ComponentError::UnknownSource`] or
    /// [`ComponentError::Duplicate`] for bad data.
    ///
    /// ```
    /// use flashduty::library::Library;
    /// let mut lib = Library::builtin().clone();
    /// let bad = r#"{"schema": "flashduty-components/1", "components": [{"name": "x"}]}"#;
    /// let err = lib.add_json("mine.json", bad).unwrap_err();
    /// assert!(err.to_string().contains("mine.json"));
    /// ```
    pub fn add_json(&mut self, file: &str, text: &str) -> Result<usize, ComponentError> {
        let parsed: ComponentFile = serde_json::from_str(text).map_err(|e| ComponentError::Parse {
            file: file.to_string(),
            message: e.to_string(),
        })?;
        self.add_file(file, parsed)
    }

    /// Adds the components of a TOML component file's text (same schema as JSON).
    ///
    /// # Errors
    /// As [`Library::add_json`].
    pub fn add_toml(&mut self, file: &str, text: &str) -> Result<usize, ComponentError> {
        let parsed: ComponentFile = toml::from_str(text).map_err(|e| ComponentError::Parse {
            file: file.to_string(),
            message: e.to_string().replace('\n', " "),
        })?;
        self.add_file(file, parsed)
    }

    /// Reads a component file (`.toml` as TOML, anything else as JSON) and adds its
    /// components; returns how many were added.
    ///
    /// # Errors
    /// [`ComponentError::Parse`] if the file cannot be read, else as [`Library::add_json`].
    pub fn add_path(&mut self, path: &Path) -> Result<usize, ComponentError> {
        let name = path.display().to_string();
        let text = std::fs::read_to_string(path).map_err(|e| ComponentError::Parse {
            file: name.clone(),
            message: e.to_string(),
        })?;
        if path.extension().is_some_and(|e| e.eq_ignore_ascii_case("toml")) {
            self.add_toml(&name, &text)
        } else {
            self.add_json(&name, &text)
        }
    }

    fn add_file(&mut self, file: &str, parsed: ComponentFile) -> Result<usize, ComponentError> {
        if parsed.schema != SCHEMA {
            return Err(ComponentError::Parse {
                file: file.to_string(),
                message: format!("schema is '{}', expected '{SCHEMA}'", parsed.schema),
            });
        }
        // Sources of this file, plus those already known (user files may cite built-ins).
        let mut sources = self.sources.clone();
        sources.extend(parsed.sources.clone());
        let mut built = Vec::with_capacity(parsed.components.len());
        let mut gases = Vec::new();
        for (i, value) in parsed.components.into_iter().enumerate() {
            let name = value
                .get("name")
                .and_then(|n| n.as_str())
                .map_or_else(|| format!("#{}", i + 1), str::to_string);
            let parse = |message: String| ComponentError::Parse {
                file: file.to_string(),
                message: format!("component '{name}': {message}"),
            };
            let record: ComponentRecord = serde_json::from_value(value).map_err(|e| parse(e.to_string()))?;
            record.check_kind().map_err(parse)?;
            match record.kind {
                ComponentKind::Gas => gases.push(Gas::from_record(record, &sources)?),
                _ => built.push(Component::from_record(record, &sources)?),
            }
        }
        let count = built.len() + gases.len();
        let mut next = self.clone();
        next.sources = sources;
        for c in built {
            next.insert(c)?;
        }
        for g in gases {
            next.insert_gas(g)?;
        }
        *self = next;
        Ok(count)
    }

    /// Adds one checked component.
    ///
    /// # Errors
    /// [`ComponentError::Duplicate`] when its name, a synonym or its CAS number is taken.
    pub fn insert(&mut self, component: Component) -> Result<(), ComponentError> {
        let keys = self.free_keys(component.name(), component.synonyms(), component.cas())?;
        let i = self.components.len();
        self.components.push(Arc::new(component));
        for k in keys {
            self.index.insert(k, i);
        }
        Ok(())
    }

    /// The look-up keys of a new component or gas (its name, synonyms and CAS number),
    /// each checked free among the components and gases already held.
    fn free_keys(&self, name: &str, synonyms: &[String], cas: &str) -> Result<Vec<String>, ComponentError> {
        let keys: Vec<String> = std::iter::once(name)
            .chain(synonyms.iter().map(String::as_str))
            .chain(std::iter::once(cas))
            .map(key)
            .collect();
        for k in &keys {
            let other = self
                .index
                .get(k)
                .map(|&i| self.components[i].name())
                .or_else(|| self.find_gas(k).map(|g| g.name()));
            if let Some(other) = other {
                return Err(ComponentError::Duplicate {
                    component: name.to_string(),
                    key: k.clone(),
                    other: other.to_string(),
                });
            }
        }
        Ok(keys)
    }

    /// Adds one checked gas.
    ///
    /// # Errors
    /// [`ComponentError::Duplicate`] when its name, a synonym or its CAS number is taken by a
    /// component or another gas.
    fn insert_gas(&mut self, gas: Gas) -> Result<(), ComponentError> {
        self.free_keys(gas.name(), gas.synonyms(), gas.cas())?;
        self.gases.push(Arc::new(gas));
        Ok(())
    }

    /// The gas with look-up key `k` (already lower-cased and trimmed).
    fn find_gas(&self, k: &str) -> Option<&Arc<Gas>> {
        self.gases
            .iter()
            .find(|g| key(g.name()) == k || key(g.cas()) == k || g.synonyms().iter().any(|s| key(s) == k))
    }

    /// Looks a gas (a component of kind gas) up by name, synonym or CAS number, ignoring
    /// case.
    ///
    /// # Errors
    /// [`UnknownComponent`] (with no suggestions) when no gas has that name.
    pub fn gas(&self, name: &str) -> Result<&Arc<Gas>, UnknownComponent> {
        self.find_gas(&key(name)).ok_or_else(|| UnknownComponent {
            name: name.to_string(),
            suggestions: Vec::new(),
        })
    }

    /// Every gas, in file order.
    pub fn gases(&self) -> impl Iterator<Item = &Arc<Gas>> {
        self.gases.iter()
    }

    /// Looks a component up by name, synonym or CAS number, ignoring case.
    ///
    /// # Errors
    /// [`UnknownComponent`] with the nearest names as suggestions.
    pub fn get(&self, name: &str) -> Result<&Arc<Component>, UnknownComponent> {
        self.index
            .get(&key(name))
            .map(|&i| &self.components[i])
            .ok_or_else(|| UnknownComponent {
                name: name.to_string(),
                suggestions: self.suggest(name),
            })
    }

    /// Looks up several components at once, in order.
    ///
    /// # Errors
    /// The first [`UnknownComponent`].
    pub fn get_all<S: AsRef<str>>(&self, names: &[S]) -> Result<Vec<Arc<Component>>, UnknownComponent> {
        names.iter().map(|n| self.get(n.as_ref()).cloned()).collect()
    }

    /// Names longer than this get no suggestions: no library name is near them, and the edit
    /// distance to a multi-megabyte text would take seconds.
    pub const SUGGEST_MAX_CHARS: usize = 64;

    /// The nearest known names to `name` (edit distance), at most three; none for a name of
    /// more than [`Self::SUGGEST_MAX_CHARS`] characters.
    pub fn suggest(&self, name: &str) -> Vec<String> {
        if name.len() > 4 * Self::SUGGEST_MAX_CHARS || name.chars().count() > Self::SUGGEST_MAX_CHARS {
            return Vec::new();
        }
        let k = key(name);
        // (rank, edit distance, name): a known name that contains what was typed ranks as
        // distance 1, and the true edit distance breaks ties.
        let mut scored: Vec<(usize, usize, &str)> = self
            .index
            .iter()
            .map(|(known, &i)| {
                let d = edit_distance(&k, known);
                let rank = if !k.is_empty() && known.contains(&k) {
                    d.min(1)
                } else {
                    d
                };
                (rank, d, self.components[i].name())
            })
            .collect();
        scored.sort();
        let limit = (k.chars().count() / 3).max(2);
        let mut out: Vec<String> = Vec::new();
        for (rank, _, n) in scored {
            if rank <= limit && !out.iter().any(|o| o == n) {
                out.push(n.to_string());
            }
            if out.len() == 3 {
                break;
            }
        }
        out
    }

    /// Every component, in file order.
    pub fn components(&self) -> impl Iterator<Item = &Arc<Component>> {
        self.components.iter()
    }

    /// Number of components.
    pub fn len(&self) -> usize {
        self.components.len()
    }

    /// True when there are no components.
    pub fn is_empty(&self) -> bool {
        self.components.is_empty()
    }

    /// The bibliography: source key → full citation.
    pub fn sources(&self) -> &BTreeMap<String, String> {
        &self.sources
    }
}

/// The Levenshtein edit distance between two strings, counted in characters: the fewest
/// insertions, deletions and substitutions that turn `a` into `b`. Used for "did you mean"
/// suggestions.
///
/// ```
/// assert_eq!(flashduty::library::edit_distance("tolune", "toluene"), 1);
/// ```
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    let mut cur = vec![0; b.len() + 1];
    for (i, ca) in a.chars().enumerate() {
        cur[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur[j + 1] = sub.min(prev[j + 1] + 1).min(cur[j] + 1);
        }
        std::mem::swap(&mut prev, &mut cur);
    }
    prev[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edit_distances() {
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("toluene", "toluene"), 0);
    }
}
