//! The flashduty command-line tool (being written).
fn main() {}
