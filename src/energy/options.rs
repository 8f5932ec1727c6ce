//! [`DutyOptions`]: the reference state, vaporisation path and vapour model of the
//! energy layer's default enthalpy model.

use super::reference::{ReferenceState, VaporisationPath, VapourModel};
use serde::Serialize;

/// Options for the energy calculations.
///
/// ```
/// use flashduty::energy::{DutyOptions, VaporisationPath, VapourModel};
/// let o = DutyOptions { vapour_model: VapourModel::SecondVirial, ..DutyOptions::default() };
/// assert_eq!(o.path, VaporisationPath::BoilingPoint);
/// let json = serde_json::to_value(o).unwrap();
/// assert_eq!(json["vapour_model"], "second-virial");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct DutyOptions {
    /// The reference state (default: liquid at 298.15 K).
    pub reference: ReferenceState,
    /// The vaporisation path (default: via the normal boiling point).
    pub path: VaporisationPath,
    /// How the vapour's enthalpy depends on pressure (default: the ideal gas, where it does
    /// not).
    pub vapour_model: VapourModel,
}
