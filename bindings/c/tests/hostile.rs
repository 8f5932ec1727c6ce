//! The hostile inputs of the command-line tool's fuzz-like tests (`tests/cli_fuzz.rs`: text
//! that is often almost a case) through the C interface: every call returns `Ok`, `Input`
//! or `Utf8` with a one-line message, never `Internal` (a caught panic).

use flashduty_c::*;
use proptest::prelude::*;
use std::ffi::{CString, c_char};

/// Text that is often almost a case (the same strategy as the tool's tests).
fn case_like() -> impl Strategy<Value = String> {
    prop_oneof![
        any::<String>(),
        "\\{(\"(components|z|flows|K|T|P|vapour_fraction|flow|duty|points|note|Temp|water_phase)\": ?(-?[0-9.e]{1,7}|\"[0-9 .a-zA-Z/]{0,12}\"|\\[(\"[a-z-]{1,9}\"|[0-9.]{1,4})(, ?(\"[a-z-]{1,9}\"|[0-9.]{1,4})){0,3}\\]|null|true), ?){0,7}\\}",
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 300, failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn any_case_text(text in case_like(), command in prop::sample::select(vec!["flash", "bubble", "dew", "duty", "curve"])) {
        let lib = fd_library_new();
        let cmd = CString::new(command).unwrap();
        // Interior NULs cannot cross a C string: cut there, as a C caller's string would end.
        let body = CString::new(text.split('\0').next().unwrap_or_default()).unwrap();
        let mut out: *mut c_char = std::ptr::null_mut();
        let status = unsafe { fd_run_case(lib, cmd.as_ptr(), body.as_ptr(), &mut out) };
        prop_assert!(matches!(status, FdStatus::Ok | FdStatus::Input | FdStatus::Utf8), "{status:?} for {text:?}");
        if status != FdStatus::Ok {
            let mut buf = vec![0 as c_char; 4096];
            let n = unsafe { fd_library_error(lib, FdErrorPart::Message, buf.as_mut_ptr(), buf.len()) };
            prop_assert!(n > 0);
            let msg = unsafe { std::ffi::CStr::from_ptr(buf.as_ptr()) }.to_string_lossy().into_owned();
            prop_assert!(!msg.contains('\n'), "{msg:?}");
        }
        unsafe { fd_string_free(out) };
        unsafe { fd_library_free(lib) };
    }

    #[test]
    fn any_numbers_in_the_hot_loop(t in any::<f64>(), p in any::<f64>(), beta in any::<f64>(), q in any::<f64>()) {
        let lib = fd_library_new();
        let names = [CString::new("n-hexane").unwrap(), CString::new("n-heptane").unwrap()];
        let ptrs: Vec<*const c_char> = names.iter().map(|n| n.as_ptr()).collect();
        let calc = unsafe { fd_calculator_new(lib, ptrs.as_ptr(), [0.5, 0.5].as_ptr(), 2, 1.0, std::ptr::null()) };
        prop_assert!(!calc.is_null());
        let mut split = FdSplit { phase: FdPhase::Liquid, vapour_fraction: 0.0, liquid_fraction: 0.0, iterations: 0 };
        let (mut x, mut y) = ([0.0; 2], [0.0; 2]);
        let s = unsafe { fd_calculator_tp_flash(calc, t, p, &mut split, x.as_mut_ptr(), y.as_mut_ptr(), 2) };
        prop_assert!(matches!(s, FdStatus::Ok | FdStatus::Input));
        if s == FdStatus::Ok {
            prop_assert!(split.vapour_fraction.is_finite() && x.iter().chain(&y).all(|v| v.is_finite()));
        }
        let state = FdState { spec: FdStateSpec::PressureVapourFraction, temperature_k: t, pressure_pa: p, vapour_fraction: beta };
        let inlet = FdState { spec: FdStateSpec::TemperaturePressure, temperature_k: 300.0, pressure_pa: 1e5, vapour_fraction: 0.0 };
        let mut d = unsafe { std::mem::zeroed::<FdDuty>() };
        let s = unsafe { fd_calculator_duty(calc, inlet, state, &mut d) };
        prop_assert!(matches!(s, FdStatus::Ok | FdStatus::Input));
        if s == FdStatus::Ok {
            prop_assert!(d.duty_w.is_finite());
        }
        let s = unsafe { fd_calculator_outlet_for_duty(calc, inlet, q, p, &mut d) };
        prop_assert!(matches!(s, FdStatus::Ok | FdStatus::Input));
        if s == FdStatus::Ok {
            prop_assert!(d.outlet.temperature_k.is_finite());
        }
        unsafe { fd_calculator_free(calc) };
        unsafe { fd_library_free(lib) };
    }
}
