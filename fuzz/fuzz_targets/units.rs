//! Fuzz target: quantity text ("65 degC", "3.6 kmol/h", ...) through the unit parser of
//! every kind of quantity: a value or a one-line error, never a panic or NaN.
#![no_main]

use flashduty::units::{QuantityKind, parse_si};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    for kind in [
        QuantityKind::Temperature,
        QuantityKind::Pressure,
        QuantityKind::MolarFlow,
        QuantityKind::MassFlow,
        QuantityKind::Power,
        QuantityKind::MolarEnthalpy,
    ] {
        match parse_si(kind, "field", text) {
            Ok(x) => assert!(x.is_finite(), "{text:?} gave {x}"),
            Err(e) => assert!(!e.to_string().contains('\n'), "{e}"),
        }
    }
});
