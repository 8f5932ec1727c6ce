//! The case schema, defined once for every front end: the keys of a case, their units,
//! ranges and aliases ([`parse`]), one [`run`](run::run) from a checked case to an
//! outcome, and one outcome-to-JSON ([`Outcome::to_json`](run::Outcome::to_json)). The
//! command-line tool, a C interface and a Python module call this code, so they cannot
//! drift apart.
//!
//! A case is a JSON object (or TOML, or a spreadsheet row, read into the same tree):
//! quantities as numbers in SI or as text with a unit (`"65 degC"`, `"1 atm"`,
//! `"3.6 kmol/h"`). Every error names the field (`inlet.T`, `z[2]`) and the value.
//!
//! ```
//! use flashduty::case::{parse_case, run, Command};
//! use flashduty::library::Library;
//! let case = parse_case(&serde_json::json!({
//!     "components": ["benzene", "toluene"], "z": [0.5, 0.5], "T": "95 degC", "P": "1 atm"
//! }), Command::Flash).unwrap();
//! let outcome = run(Library::builtin(), Command::Flash, &case, None).unwrap();
//! let json = outcome.to_json();
//! assert_eq!(json["phase"], "two-phase");
//! ```
//!
//! Files: `error.rs` ([`CaseError`]), `parse.rs` (the schema and the checks), `run.rs`
//! (running a case, and the outcome as JSON).

pub(crate) mod error;
pub mod parse;
pub mod run;

pub use error::{CaseError, CaseResult};
pub use parse::{BinaryParametersInput, Case, Command, TOP_KEYS, parse_case, parse_text};
pub use run::{CAUTION, Outcome, TYPED_SUM_TOLERANCE, components, run, typed_z};
