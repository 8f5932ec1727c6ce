//! The tool's one error type: a single readable line naming the field and the value.

use std::fmt;

/// Bad input, or a calculation that cannot be done. Shown as one line on stderr; the tool
/// then exits with code 2.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CliError {
    message: String,
    /// The stable kind (the library's, or `invalid-input` for the tool's own checks).
    kind: &'static str,
    /// The field, where the message does not start with it.
    field: Option<String>,
}

impl CliError {
    /// An error with this message (newlines and runs of blanks are folded into one space,
    /// so that the message is always a single line), of kind `invalid-input`.
    pub fn new(message: impl Into<String>) -> Self {
        Self::with_kind("invalid-input", message)
    }

    /// An error of the given kind.
    pub fn with_kind(kind: &'static str, message: impl Into<String>) -> Self {
        Self {
            message: one_line(&message.into()),
            kind,
            field: None,
        }
    }

    /// This error with `context` put in front: `"{context}: {message}"`.
    pub fn context(self, context: impl fmt::Display) -> Self {
        let field = self
            .field
            .clone()
            .or_else(|| self.field_in_message().map(str::to_string));
        Self {
            message: one_line(&format!("{context}: {}", self.message)),
            kind: self.kind,
            field,
        }
    }

    /// The message.
    #[cfg_attr(not(test), allow(dead_code))]
    pub fn message(&self) -> &str {
        &self.message
    }

    /// The field named at the start of the message (`T: ...`), where there is one.
    fn field_in_message(&self) -> Option<&str> {
        let (head, _) = self.message.split_once(": ")?;
        (!head.is_empty() && !head.contains(' ')).then_some(head)
    }

    /// The error as the one JSON object `--json` prints on stderr:
    /// `{"error": {"kind", "field", "message"}}`.
    pub fn to_json(&self) -> serde_json::Value {
        let field = self.field.as_deref().or_else(|| self.field_in_message());
        serde_json::json!({"error": {"kind": self.kind, "field": field, "message": self.message}})
    }
}

impl fmt::Display for CliError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

/// Folds every run of whitespace (newlines included) into one space and trims the ends.
pub fn one_line(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// `Result` with [`CliError`].
pub type CliResult<T> = Result<T, CliError>;

macro_rules! from_library_error {
    ($($t:ty),* $(,)?) => {
        $(impl From<$t> for CliError {
            fn from(e: $t) -> Self {
                CliError::with_kind(e.kind(), e.to_string())
            }
        })*
    };
}

impl From<flashduty::case::CaseError> for CliError {
    fn from(e: flashduty::case::CaseError) -> Self {
        let mut c = CliError::with_kind(e.kind(), e.message());
        c.field = e.field().map(str::to_string);
        c
    }
}

from_library_error!(
    flashduty::units::UnitError,
    flashduty::equilibrium::FlashError,
    flashduty::energy::EnergyError,
    flashduty::rachford_rice::RachfordRiceError,
    flashduty::properties::ComponentError,
    flashduty::fit::FitError,
);

/// Shorthand: `bail!("field: ...")` returns a [`CliError`].
macro_rules! bail {
    ($($arg:tt)*) => {
        return Err($crate::error::CliError::new(format!($($arg)*)))
    };
}
pub(crate) use bail;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn messages_are_one_line() {
        let e = CliError::new("a\n  b\r\n\tc ");
        assert_eq!(e.message(), "a b c");
        assert_eq!(e.context("file.json").message(), "file.json: a b c");
    }
}
