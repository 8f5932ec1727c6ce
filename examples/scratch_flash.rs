use flashduty::energy::*;
use flashduty::units::*;
fn main() {
    let s = Stream::from_names(&["water"], &[1.0], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    let p = Pressure::parse("P", "1 atm").unwrap();
    let at = |t: f64| StreamState::TemperaturePressure { temperature: Temperature::new("T", t).unwrap(), pressure: p };
    for path in VaporisationPath::ALL {
        let o = DutyOptions { path, ..Default::default() };
        let r = heater_duty(&s, at(293.15), at(423.15), o).unwrap();
        let l = heater_duty(&s, at(293.15), at(368.15), o).unwrap();
        let v = heater_duty(&s, at(378.15), at(423.15), o).unwrap();
        println!("{path:?}: total {:.1} liquid {:.1} vapour {:.1} dq {:?} spread {:?}", r.duty_w, l.duty_w, v.duty_w, r.dduty_dt_out_w_per_k, r.path_spread.relative);
        let back = outlet_for_duty(&s, at(293.15), Power::new("q", r.duty_w).unwrap(), p, o).unwrap();
        println!("  back T {:.9} beta {}", back.outlet.temperature_k, back.outlet.vapour_fraction);
        let half = outlet_for_duty(&s, at(293.15), Power::new("q", 30000.0).unwrap(), p, o).unwrap();
        println!("  30kW T {:.6} beta {:.12} {:?}", half.outlet.temperature_k, half.outlet.vapour_fraction, half.outlet.phase);
    }
    let b = Stream::from_names(&["benzene","toluene"], &[0.5,0.5], MolarFlow::new("flow", 1.0).unwrap()).unwrap();
    let c = heating_curve(&b, at(300.0), at(400.0), 6, DutyOptions::default()).unwrap();
    for pt in &c.points { println!("{:.3} {:.1} {:.4} {}", pt.temperature_k, pt.duty_w, pt.vapour_fraction, pt.breakpoint); }
    for w in &c.warnings { println!("{w}"); }
}
