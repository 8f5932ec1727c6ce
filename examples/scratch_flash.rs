use flashduty::equilibrium::*;
use flashduty::units::*;
use flashduty::properties::VapourPressure;
fn main() {
    let m = Raoult::from_names(&["n-pentane", "n-hexane", "n-heptane"]).unwrap();
    let z = [0.2, 0.5, 0.3];
    let b = flash(&m, &z, FlashSpec::BubblePressure { temperature: Temperature::new("T", 350.0).unwrap() }).unwrap();
    let explicit: f64 = m.components().iter().zip(&z).map(|(c, z)| z * c.vapour_pressure().psat_pa(350.0)).sum();
    println!("{} {} {} it {} ev {}", b.pressure_pa, explicit, b.pressure_pa/explicit-1.0, b.iterations, b.evaluations);
}
