//! The enthalpy correlations' range warnings: which correlation an enthalpy evaluates
//! outside its fitted range, and where the second-virial vapour is stretched.

use super::departure::saturation_point;
use super::options::DutyOptions;
use super::path_table::vaporisation_temperature;
use super::reference::{ReferencePhase, VapourModel};
use crate::properties::{Component, HeatCapacity, LatentHeat, PitzerCurlVirial, ValidityRange};
use crate::rachford_rice::Phase;
use crate::warnings::{Warning, push_unique};

/// The bit of [`enthalpy_warnings`]'s `warned` that stands for the virial range.
const VIRIAL_WARNED: u8 = 8;

/// Adds a warning for every correlation that the enthalpy of `c` in `phase` at `t_k` and
/// `p_pa` (from `reference` along `path`, with `vapour_model`) evaluates outside its range.
/// `warned` holds a bit for each correlation already reported for this component in `out`
/// (the caller keeps one per component, zero to start), so that repeated rows do not search
/// `out` again.
pub(crate) fn enthalpy_warnings(
    c: &Component,
    options: DutyOptions,
    phase: Phase,
    t_k: f64,
    p_pa: f64,
    warned: &mut u8,
    out: &mut Vec<Warning>,
) {
    virial_warnings(c, options, phase, t_k, p_pa, warned, out);
    let (reference, path) = (options.reference, options.path);
    let t_ref = reference.temperature_k;
    let mut check = |bit: u8, name: &'static str, range: ValidityRange, t: f64| {
        if range.contains(t) || *warned & bit != 0 {
            return;
        }
        *warned |= bit;
        let known = out.iter().any(|w| {
            matches!(w, Warning::CorrelationExtrapolated { component, correlation, .. }
                if *correlation == name && component == c.name())
        });
        if !known {
            push_unique(
                out,
                Warning::CorrelationExtrapolated {
                    component: c.name().to_string(),
                    correlation: name,
                    range_min_k: range.min_k,
                    range_max_k: range.max_k,
                    temperature_k: t,
                },
            );
        }
    };
    let ts = vaporisation_temperature(c, t_k, reference, path);
    let liquid_to = if phase == Phase::Vapour { ts } else { t_k };
    for t in [t_ref.min(liquid_to), t_ref.max(liquid_to)] {
        check(1, "liquid_heat_capacity", c.liquid_heat_capacity().validity(), t);
    }
    let vapour_needed = phase == Phase::Vapour || reference.phase == ReferencePhase::Vapour;
    if vapour_needed {
        check(2, "latent_heat", c.latent_heat().validity(), ts);
        let (a, b) = if phase == Phase::Vapour { (ts, t_k) } else { (ts, t_ref) };
        for t in [a.min(b), a.max(b)] {
            check(4, "vapour_heat_capacity", c.vapour_heat_capacity().validity(), t);
        }
    }
}

/// Under [`VapourModel::SecondVirial`], adds a [`Warning::VirialOutOfRange`] for `c` when
/// its enthalpy in `phase` at `t_k` and `p_pa` uses the truncated virial equation outside
/// Pr ≤ Tr/2: at the state itself (a vapour), where its path vaporises it (a vapour), or
/// where the path to a vapour reference does (any phase). `warned` as in
/// [`enthalpy_warnings`].
pub(crate) fn virial_warnings(
    c: &Component,
    options: DutyOptions,
    phase: Phase,
    t_k: f64,
    p_pa: f64,
    warned: &mut u8,
    out: &mut Vec<Warning>,
) {
    if options.vapour_model != VapourModel::SecondVirial || *warned & VIRIAL_WARNED != 0 {
        return;
    }
    let (reference, path) = (options.reference, options.path);
    let b = PitzerCurlVirial::for_component(c);
    let mut points = [None; 3];
    if phase == Phase::Vapour {
        points[0] = Some((t_k, p_pa));
        points[1] = Some(saturation_point(
            c,
            vaporisation_temperature(c, t_k, reference, path),
            path,
        ));
    }
    if reference.phase == ReferencePhase::Vapour {
        let t_ref = reference.temperature_k;
        points[2] = Some(saturation_point(
            c,
            vaporisation_temperature(c, t_ref, reference, path),
            path,
        ));
    }
    let Some((t, p)) = points.into_iter().flatten().find(|&(t, p)| !b.is_within_range(t, p)) else {
        return;
    };
    *warned |= VIRIAL_WARNED;
    let (reduced_temperature, reduced_pressure) = b.reduced(t, p);
    push_unique(
        out,
        Warning::VirialOutOfRange {
            component: c.name().to_string(),
            temperature_k: t,
            pressure_pa: p,
            reduced_temperature,
            reduced_pressure,
        },
    );
}
