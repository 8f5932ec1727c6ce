//! [`CaseError`]: one readable line naming the field and the value, with a stable kind.

use std::fmt;

/// A case that cannot be read, checked or run: one line that starts with the field
/// (`z[2]: mole fraction -0.1 is negative`), and a stable machine-readable kind.
///
/// ```
/// use flashduty::case::{parse_case, Command};
/// let e = parse_case(&serde_json::json!({"components": ["water"], "z": [1], "T": "hot"}), Command::Flash).unwrap_err();
/// assert_eq!(e.field(), Some("T"));
/// assert_eq!(e.kind(), "not-a-number");
/// assert!(e.to_string().starts_with("T: "));
/// let e = parse_case(&serde_json::json!({"components": ["water"], "z": [1], "T": 300, "colour": 1}), Command::Flash).unwrap_err();
/// assert_eq!((e.kind(), e.field()), ("unknown-key", Some("colour")));
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CaseError {
    kind: &'static str,
    message: String,
    /// The field, where the message does not start with it.
    field: Option<String>,
}

impl CaseError {
    /// An error of kind `invalid-case` with this message (runs of whitespace, newlines
    /// included, are folded into one space).
    pub fn new(message: impl Into<String>) -> Self {
        Self::with_kind("invalid-case", message)
    }

    /// An error of the given kind.
    pub fn with_kind(kind: &'static str, message: impl Into<String>) -> Self {
        let message: String = message.into();
        Self {
            kind,
            message: message.split_whitespace().collect::<Vec<_>>().join(" "),
            field: None,
        }
    }

    /// This error naming `field`, for a message that does not start with it.
    pub fn with_field(mut self, field: impl Into<String>) -> Self {
        self.field = Some(field.into());
        self
    }

    /// This error with `context` put in front: `"{context}: {message}"`.
    pub fn context(self, context: impl fmt::Display) -> Self {
        let field = self.field.clone();
        let mut e = Self::with_kind(self.kind, format!("{context}: {}", self.message));
        e.field = field;
        e
    }

    /// The stable kind: `invalid-case` for a key or value the case schema refuses, else
    /// the kind of the library error behind it (`unknown-unit`, `no-dew-point`, ...).
    pub fn kind(&self) -> &'static str {
        self.kind
    }

    /// The message.
    pub fn message(&self) -> &str {
        &self.message
    }

    /// The field the error names: the one given by [`with_field`](Self::with_field), else
    /// the message's text before the first `": "`, where that is a field name (no blanks).
    pub fn field(&self) -> Option<&str> {
        if let Some(f) = &self.field {
            return Some(f);
        }
        let (head, _) = self.message.split_once(": ")?;
        (!head.is_empty() && !head.contains(' ')).then_some(head)
    }
}

impl fmt::Display for CaseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for CaseError {}

/// `Result` with [`CaseError`].
pub type CaseResult<T> = Result<T, CaseError>;

macro_rules! from_library_error {
    ($($t:ty),* $(,)?) => {
        $(impl From<$t> for CaseError {
            fn from(e: $t) -> Self {
                CaseError::with_kind(e.kind(), e.to_string())
            }
        })*
    };
}

from_library_error!(
    crate::units::UnitError,
    crate::equilibrium::FlashError,
    crate::energy::EnergyError,
    crate::rachford_rice::RachfordRiceError,
    crate::properties::ComponentError,
    crate::fit::FitError,
    crate::library::UnknownComponent,
    crate::activity::ActivityError,
);

/// Shorthand: `bail!("field: ...")` returns a [`CaseError`].
macro_rules! bail {
    ($($arg:tt)*) => {
        return Err($crate::case::error::CaseError::new(format!($($arg)*)))
    };
}
pub(crate) use bail;
