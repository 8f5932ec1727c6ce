//! [`ValidityRange`]: the temperatures over which a correlation was fitted.

use serde::{Deserialize, Serialize};

/// The temperature range over which a correlation was fitted, in kelvin.
///
/// ```
/// use flashduty::properties::ValidityRange;
/// let r = ValidityRange::new(280.0, 450.0).unwrap();
/// assert!(r.contains(300.0));
/// assert!(!r.contains(500.0));
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ValidityRange {
    /// Lowest temperature of the fitted data, K.
    pub min_k: f64,
    /// Highest temperature of the fitted data, K.
    pub max_k: f64,
}

impl ValidityRange {
    /// A range from `min_k` to `max_k`; `None` unless both are finite, positive and
    /// `min_k <= max_k`.
    pub fn new(min_k: f64, max_k: f64) -> Option<Self> {
        (min_k.is_finite() && max_k.is_finite() && min_k > 0.0 && min_k <= max_k).then_some(Self { min_k, max_k })
    }

    /// A range that contains every positive temperature (for models with no stated limit).
    pub const UNBOUNDED: Self = Self {
        min_k: 0.0,
        max_k: f64::INFINITY,
    };

    /// Whether `t_k` lies within the range, ends included.
    pub fn contains(&self, t_k: f64) -> bool {
        t_k >= self.min_k && t_k <= self.max_k
    }
}

#[cfg(test)]
mod tests {
    use super::ValidityRange;

    #[test]
    fn range_checks() {
        assert!(ValidityRange::new(300.0, 200.0).is_none());
        assert!(ValidityRange::new(f64::NAN, 200.0).is_none());
        assert!(ValidityRange::UNBOUNDED.contains(1e9));
    }
}
