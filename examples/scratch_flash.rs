use flashduty::equilibrium::{flash, FlashSpec, Raoult};
use flashduty::units::{Pressure, Temperature};
fn main() {
    let m = Raoult::from_names(&["benzene", "toluene"]).unwrap_or_else(|e| { eprintln!("{e}"); std::process::exit(1) });
    let p = Pressure::parse("P", "1 atm").unwrap();
    for z0 in [0.0, 0.1, 0.5, 0.9, 1.0] {
        let z = [z0, 1.0 - z0];
        let b = flash(&m, &z, FlashSpec::BubbleTemperature { pressure: p }).unwrap();
        let d = flash(&m, &z, FlashSpec::DewTemperature { pressure: p }).unwrap();
        let h = flash(&m, &z, FlashSpec::PressureVapourFraction { pressure: p, vapour_fraction: 0.5 }).unwrap();
        let tp = flash(&m, &z, FlashSpec::TemperaturePressure { temperature: Temperature::new("T", h.temperature_k).unwrap(), pressure: p }).unwrap();
        println!("z={z0} bub={:.4} ({} it, {} ev) dew={:.4} ({} it {} ev) half={:.4} tp_beta={:.12} {:?} w={:?}", b.temperature_k, b.iterations, b.evaluations, d.temperature_k, d.iterations, d.evaluations, h.temperature_k, tp.vapour_fraction, tp.sensitivity, b.warnings.len());
    }
}
