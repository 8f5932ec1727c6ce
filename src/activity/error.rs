//! [`ActivityError`]: what goes wrong building an activity model or reading its parameters.

/// What goes wrong building an activity model or reading its parameters. Each variant
/// names the field.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum ActivityError {
    /// `liquid_model` is not one of the known names.
    #[error("liquid_model: '{value}' is not a liquid model (give ideal, wilson, nrtl or uniquac)")]
    UnknownModel {
        /// What was given.
        value: String,
    },
    /// A parameter file or parameter object that cannot be read.
    #[error("{file}: {message}")]
    Parse {
        /// The file (or `binary_parameters` for parameters in a case).
        file: String,
        /// What is wrong.
        message: String,
    },
    /// A parameter value that is not finite or outside its range.
    #[error("{field}: {value} {reason}")]
    InvalidValue {
        /// The field, e.g. `binary_parameters[0].nrtl.alpha`.
        field: String,
        /// The value as given.
        value: String,
        /// Why it is refused.
        reason: &'static str,
    },
    /// Parameters given for a pair with a component that is not in the case.
    #[error("{field}: '{name}' is not a component of the case (parameters given for a pair not in the case)")]
    PairNotInCase {
        /// The field naming the component.
        field: String,
        /// The component named.
        name: String,
    },
    /// UNIQUAC without the volume and area parameters r and q of a component.
    #[error("uniquac_components.{component}: UNIQUAC needs r and q for '{component}'; none are given or built in")]
    MissingSize {
        /// The component.
        component: String,
    },
}

impl ActivityError {
    /// The stable machine-readable kind.
    ///
    /// ```
    /// use flashduty::activity::LiquidModel;
    /// assert_eq!("x".parse::<LiquidModel>().unwrap_err().kind(), "unknown-liquid-model");
    /// ```
    pub fn kind(&self) -> &'static str {
        match self {
            Self::UnknownModel { .. } => "unknown-liquid-model",
            Self::Parse { .. } => "parameter-file",
            Self::InvalidValue { .. } => "invalid-parameter",
            Self::PairNotInCase { .. } => "pair-not-in-case",
            Self::MissingSize { .. } => "missing-uniquac-size",
        }
    }
}
