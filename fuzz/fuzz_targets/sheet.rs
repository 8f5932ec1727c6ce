//! Fuzz target: spreadsheet bytes through the tool's sheet reader, as CSV (comma- and
//! semicolon-separated) and as workbooks (.xlsx, .ods), and each row into a case. The
//! reader is the tool's own source file, compiled here with the two modules it uses.
#![no_main]
#![allow(dead_code)]

use libfuzzer_sys::fuzz_target;

mod case {
    pub use flashduty::case::parse::*;
}
#[path = "../../src/bin/flashduty/error.rs"]
mod error;
#[path = "../../src/bin/flashduty/sheet.rs"]
mod sheet;

fuzz_target!(|data: &[u8]| {
    for name in ["fuzz.csv", "fuzz.xlsx", "fuzz.ods"] {
        match sheet::read(name, data, None) {
            Ok(s) => {
                for row in &s.rows {
                    if let Err(e) = sheet::case_value(&s.columns, &row.cells) {
                        assert!(!e.message().contains('\n'), "{e}");
                    }
                }
            }
            Err(e) => assert!(!e.message().contains('\n'), "{e}"),
        }
    }
});
