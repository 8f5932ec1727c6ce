//! Fuzz target: case text (JSON, TOML, and standard input's either) through the case
//! schema's parser and checks for every command. Any input must give a case or one-line
//! error, never a panic.
#![no_main]

use flashduty::case::{Command, parse_case, parse_text};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    for name in ["case.json", "case.toml", "<stdin>"] {
        match parse_text(name, text) {
            Ok(value) => {
                for command in Command::ALL {
                    if let Err(e) = parse_case(&value, command) {
                        assert!(!e.to_string().contains('\n'), "{e}");
                    }
                }
            }
            Err(e) => assert!(!e.to_string().contains('\n'), "{e}"),
        }
    }
});
