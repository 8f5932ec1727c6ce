//! The tool's one error type: a single readable line naming the field and the value.

use std::fmt;

/// Bad input, or a calculation that cannot be done. Shown as one line on stderr; the tool
/// then exits with code 2.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CliError(String);

impl CliError {
    /// An error with this message (newlines and runs of blanks are folded into one space,
    /// so that the message is always a single line).
    pub fn new(message: impl Into<String>) -> Self {
        Self(one_line(&message.into()))
    }

    /// This error with `context` put in front: `"{context}: {message}"`.
    pub fn context(self, context: impl fmt::Display) -> Self {
        Self::new(format!("{context}: {}", self.0))
    }

    /// The message.
    #[cfg_attr(not(test), allow(dead_code))]
    pub fn message(&self) -> &str {
        &self.0
    }
}

impl fmt::Display for CliError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
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
                CliError::new(e.to_string())
            }
        })*
    };
}

impl From<flashduty::case::CaseError> for CliError {
    fn from(e: flashduty::case::CaseError) -> Self {
        CliError::new(e.message())
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
