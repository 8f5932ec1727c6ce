#![allow(missing_docs, dead_code, unused_imports)]
#[path = "/tmp/rr_trace.rs"]
mod rr;
fn main() {
    let args: Vec<String> = std::env::args().collect();
    let txt = std::fs::read_to_string(&args[1]).unwrap();
    let mut lines = txt.lines();
    let parse = |l: &str| -> Vec<f64> { l.split(|c| c == '[' || c == ']' || c == ',').filter_map(|t| t.trim().parse().ok()).collect() };
    let z = parse(lines.next().unwrap());
    let k = parse(lines.next().unwrap());
    let s = rr::rachford_rice(&z, &k).unwrap();
    println!("beta {:e} lf {:e} it {} ev {}", s.vapour_fraction, s.liquid_fraction, s.iterations, s.evaluations);
}
