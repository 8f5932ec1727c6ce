//! Case files as the tool reads them: the schema, the parser and the checks live in the
//! library ([`flashduty::case`]); here only the reading of a file or standard input.

pub use flashduty::case::parse::*;

use crate::error::{CliError, CliResult};
use std::io::Read;

/// Reads a case's text: a file, or standard input for `-`. Returns the text and a name
/// for messages.
pub fn read_case_text(arg: &str) -> CliResult<(String, String)> {
    if arg == "-" {
        let mut bytes = Vec::new();
        std::io::stdin()
            .read_to_end(&mut bytes)
            .map_err(|e| CliError::new(format!("standard input: cannot read it ({e})")))?;
        let text = String::from_utf8(bytes).map_err(|_| CliError::new("standard input: not UTF-8 text"))?;
        return Ok((text, "<stdin>".to_string()));
    }
    let bytes = std::fs::read(arg).map_err(|e| CliError::new(format!("case file '{arg}': cannot read it ({e})")))?;
    let text = String::from_utf8(bytes).map_err(|_| CliError::new(format!("case file '{arg}': not UTF-8 text")))?;
    Ok((text, arg.to_string()))
}

/// Reads and checks a case file (or `-` for standard input) for `command`.
pub fn load(arg: &str, command: Command) -> CliResult<(String, Case)> {
    let (text, name) = read_case_text(arg)?;
    let value = parse_text(&name, &text)?;
    let case = parse_case(&value, command).map_err(|e| CliError::from(e).context(&name))?;
    Ok((name, case))
}
