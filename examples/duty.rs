//! The duty of an invented preheater and partial vaporiser, and the outlet for a given duty.
//!
//! Run with `cargo run --example duty`. Invented numbers: not a real plant stream.
//! Results are estimates from ideal-mixture models; equipment design follows local codes and
//! the judgement of a qualified, licensed engineer.

use flashduty::energy::{DutyOptions, Stream, StreamState, heater_duty, outlet_for_duty};
use flashduty::units::{MolarFlow, Power, Pressure, Temperature};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let stream = Stream::from_names(
        &["benzene", "toluene"],
        &[0.4, 0.6],
        MolarFlow::parse("flow", "36 kmol/h")?,
    )?;
    let p = Pressure::parse("P", "1 atm")?;
    let at = |t: &str| -> Result<StreamState, flashduty::units::UnitError> {
        Ok(StreamState::TemperaturePressure {
            temperature: Temperature::parse("T", t)?,
            pressure: p,
        })
    };
    let r = heater_duty(&stream, at("25 degC")?, at("100 degC")?, DutyOptions::default())?;
    println!(
        "duty {:.1} kW; outlet vapour fraction {:.3}; path spread {:.2} %",
        r.duty_w / 1e3,
        r.outlet.vapour_fraction,
        100.0 * r.path_spread.relative
    );
    for row in &r.table {
        println!(
            "  {:<6} {:<8} {:?}: {:>10.1} J/mol × {:.4} mol/s",
            row.state, row.component, row.phase, row.enthalpy_j_per_mol, row.flow_mol_s
        );
    }
    // Back again: the outlet for that duty is the outlet we asked for.
    let back = outlet_for_duty(
        &stream,
        at("25 degC")?,
        Power::new("duty", r.duty_w)?,
        p,
        DutyOptions::default(),
    )?;
    println!(
        "outlet for {:.1} kW: {:.3} K",
        r.duty_w / 1e3,
        back.outlet.temperature_k
    );
    assert!((back.outlet.temperature_k - 373.15).abs() < 1e-6);
    Ok(())
}
