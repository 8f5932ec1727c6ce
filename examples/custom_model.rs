//! A user's own K-value model and phase-enthalpy model through the energy layer: an
//! invented two-suffix Margules liquid (G^E/RT = A x₁x₂, A = 0.3 + 120 K / T) with its
//! excess enthalpy H^E = R · 120 K · x₁x₂ (Gibbs–Helmholtz), for a benzene–toluene feed.
//!
//! Run with `cargo run --example custom_model`. The parameters are invented, not fitted to
//! data. Results are estimates; equipment design follows local codes and the judgement of a
//! qualified, licensed engineer.

use flashduty::energy::{
    DutyCalculator, DutyOptions, EnthalpyModel, PhaseEnthalpyModel, Stream, StreamState, heater_duty_with,
};
use flashduty::equilibrium::{KValueModel, KValues, Raoult};
use flashduty::rachford_rice::Phase;
use flashduty::units::{GAS_CONSTANT, MolarFlow, Pressure, Temperature};

const A0: f64 = 0.3;
const A1_K: f64 = 120.0;

struct Margules(Raoult);

impl KValueModel for Margules {
    fn component_count(&self) -> usize {
        2
    }
    fn k_values(&self, t: f64, p: f64, x: &[f64], y: &[f64], out: &mut KValues) {
        self.0.k_values(t, p, x, y, out);
        let (a, da_dt) = (A0 + A1_K / t, -A1_K / (t * t));
        for (i, other) in [(0, 1), (1, 0)] {
            out.k[i] *= (a * x[other] * x[other]).exp();
            out.dln_k_dt[i] += da_dt * x[other] * x[other];
        }
    }
    fn is_composition_dependent(&self) -> bool {
        true
    }
    fn temperature_hint(&self, p: f64) -> Option<(f64, f64)> {
        self.0.temperature_hint(p)
    }
}

struct WithExcess(EnthalpyModel);

impl PhaseEnthalpyModel for WithExcess {
    fn component_count(&self) -> usize {
        2
    }
    fn phase_enthalpy(&self, phase: Phase, x: &[f64], t: f64, p: f64) -> (f64, f64) {
        let (h, slope) = PhaseEnthalpyModel::phase_enthalpy(&self.0, phase, x, t, p);
        let excess = if phase == Phase::Vapour {
            0.0
        } else {
            GAS_CONSTANT * A1_K * x[0] * x[1]
        };
        (h + excess, slope)
    }
    fn ideal_base(&self) -> Option<&EnthalpyModel> {
        Some(&self.0)
    }
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let raoult = Raoult::from_names(&["benzene", "toluene"])?;
    let components = raoult.components().to_vec();
    let stream = Stream::new(components.clone(), &[0.4, 0.6], MolarFlow::new("flow", 1.0)?)?;
    let k = Margules(raoult);
    let h = WithExcess(EnthalpyModel::from_options(components, DutyOptions::default()));
    let p = Pressure::parse("P", "1 atm")?;
    let at = |t: f64| -> Result<StreamState, flashduty::units::UnitError> {
        Ok(StreamState::TemperaturePressure {
            temperature: Temperature::new("T", t)?,
            pressure: p,
        })
    };
    let r = heater_duty_with(&stream, &k, &h, at(300.0)?, at(368.0)?)?;
    println!(
        "duty {:.1} W, outlet vapour fraction {:.4}, dQ/dT {:.1} W/K",
        r.duty_w,
        r.outlet.vapour_fraction,
        r.dduty_dt_out_w_per_k.unwrap_or(f64::NAN)
    );
    // dQ/dT is the derivative of the duty, composition dependence included.
    let q = |t: f64| heater_duty_with(&stream, &k, &h, at(300.0).unwrap(), at(t).unwrap()).map(|r| r.duty_w);
    let fd = (q(368.001)? - q(367.999)?) / 0.002;
    println!("central difference of the duty: {fd:.1} W/K");
    assert!((r.dduty_dt_out_w_per_k.unwrap_or(0.0) / fd - 1.0).abs() < 1e-4);
    // The hot-loop calculator takes the same models.
    let mut calc = DutyCalculator::with_models(&stream, &k, &h)?;
    assert_eq!(calc.duty(at(300.0)?, at(368.0)?)?.duty_w, r.duty_w);
    Ok(())
}
