//! A T–P flash, bubble and dew points of an invented naphtha-cut feed at 1.5 bar.
//!
//! Run with `cargo run --example flash`. Invented numbers: not a real plant stream.
//! Results are estimates from ideal-mixture models; equipment design follows local codes and
//! the judgement of a qualified, licensed engineer.

use flashduty::equilibrium::{FlashSpec, Raoult, flash};
use flashduty::units::{Pressure, Temperature};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let names = ["n-pentane", "n-hexane", "n-heptane", "n-octane"];
    let z = [0.15, 0.35, 0.30, 0.20];
    let model = Raoult::from_names(&names)?;
    let p = Pressure::parse("P", "1.5 bar")?;
    let bubble = flash(&model, &z, FlashSpec::BubbleTemperature { pressure: p })?;
    let dew = flash(&model, &z, FlashSpec::DewTemperature { pressure: p })?;
    println!(
        "bubble point {:.2} K, dew point {:.2} K",
        bubble.temperature_k, dew.temperature_k
    );
    let t = Temperature::new("T", 0.5 * (bubble.temperature_k + dew.temperature_k))?;
    let r = flash(
        &model,
        &z,
        FlashSpec::TemperaturePressure {
            temperature: t,
            pressure: p,
        },
    )?;
    println!("at {:.2} K: vapour fraction {:.4}", t.kelvin(), r.vapour_fraction);
    let (x, y) = (r.liquid.as_deref().unwrap_or(&[]), r.vapour.as_deref().unwrap_or(&[]));
    for (i, name) in names.iter().enumerate() {
        println!("  {name:<10} x {:.4}  y {:.4}  K {:.4}", x[i], y[i], r.k_values[i]);
    }
    // The material balance closes: z = (1 − β) x + β y.
    for i in 0..names.len() {
        let back = r.liquid_fraction * x[i] + r.vapour_fraction * y[i];
        assert!((back - z[i]).abs() < 1e-12);
    }
    Ok(())
}
