//! Fuzz-like tests of the command-line tool as a whole (proptest stands in for `cargo fuzz`,
//! which needs a nightly toolchain): arbitrary text as a case on standard input and arbitrary
//! bytes as a spreadsheet must give exit code 0 (or 1 for a check with failures) or 2 with
//! one line on stderr, never a panic. The parser and the spreadsheet reader are fuzzed far
//! harder, in process, by the tool's own unit tests (src/bin/flashduty/fuzz_tests.rs); this
//! file checks the process boundary: exit codes, stderr, no abort.
#![cfg(feature = "cli")]

use assert_cmd::Command;
use proptest::prelude::*;

fn bin() -> Command {
    Command::cargo_bin("flashduty").expect("the flashduty binary is built for the tests")
}

fn assert_clean_exit(out: &std::process::Output, allowed: &[i32], input: &str) {
    let stderr = String::from_utf8_lossy(&out.stderr);
    let code = out.status.code();
    assert!(
        code.is_some_and(|c| allowed.contains(&c)),
        "exit {code:?} for input {input:?}; stderr: {stderr}"
    );
    assert!(!stderr.contains("panicked"), "panic for input {input:?}: {stderr}");
    if code == Some(2) {
        assert_eq!(
            stderr.trim_end().lines().count(),
            1,
            "not one line for {input:?}: {stderr:?}"
        );
    }
}

/// Text that is often almost a case.
fn case_like() -> impl Strategy<Value = String> {
    prop_oneof![
        any::<String>(),
        "\\{(\"(components|z|flows|K|T|P|vapour_fraction|flow|duty|points|note|Temp)\": ?(-?[0-9.e]{1,7}|\"[0-9 .a-zA-Z/]{0,12}\"|\\[(\"[a-z-]{1,9}\"|[0-9.]{1,4})(, ?(\"[a-z-]{1,9}\"|[0-9.]{1,4})){0,3}\\]|null|true), ?){0,7}\\}",
        "(components = \\[\"water\"\\]\n)?(z = \\[1\\]\n)?(T = (300|nan|inf|\"1 atm\")\n)?(P = (1e5|-1|\"2 bar\")\n)?",
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn any_case_text_on_stdin(text in case_like(), command in prop::sample::select(vec!["flash", "bubble", "dew", "duty", "curve"])) {
        let out = bin().args([command, "-"]).write_stdin(text.clone()).output().unwrap();
        assert_clean_exit(&out, &[0, 2], &text);
    }

    #[test]
    fn any_bytes_as_a_sheet(bytes in prop::collection::vec(any::<u8>(), 0..300)) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("sheet.csv");
        std::fs::write(&path, &bytes).unwrap();
        let input = String::from_utf8_lossy(&bytes).into_owned();
        let out = bin().arg("check").arg(&path).output().unwrap();
        assert_clean_exit(&out, &[0, 1, 2], &input);
        let out = bin().args(["flash", "--batch"]).arg(&path).output().unwrap();
        assert_clean_exit(&out, &[0, 2], &input);
    }
}

/// Inputs kept from earlier runs and hand-picked edge cases.
#[test]
fn regressions() {
    for text in [
        "",
        "{}",
        "[]",
        "\"water\"",
        "T = nan",
        "{\"components\": [\"water\"], \"z\": [1], \"T\": 1e-320, \"P\": 1e5}",
        "{\"components\": [\"water\"], \"z\": [1e-320], \"T\": 300, \"P\": 1e5}",
        "{\"z\": [1e-320, 1], \"K\": [1e308, 0]}",
        "{\"z\": [0.5, 0.5], \"K\": [1, 1]}",
        "{\"z\": [1], \"K\": [0]}",
        "{\"components\": [\"water\"], \"flows\": [\"1e-300 kmol/h\"], \"T\": 300, \"P\": 1e5}",
    ] {
        for command in ["flash", "bubble", "dew", "duty", "curve"] {
            let out = bin().args([command, "-"]).write_stdin(text).output().unwrap();
            assert_clean_exit(&out, &[0, 2], text);
        }
    }
}
