//! `check`: runs every row of a design spreadsheet and compares the outputs with the
//! expected values in its `expect.<key>` columns.
//!
//! Output keys are the JSON keys of the command's `--json` output, dotted for nested ones
//! (`outlet.vapour_fraction`, `path_spread.spread_W`). A list entry is named by its index
//! from 0 (`x.0`, `points.3.T_K`) or, for the per-component lists, by the component's name
//! (`x.benzene`, `outlet.y.toluene`).
//!
//! A check passes when |computed − expected| ≤ tol + rtol·|expected|, with `tol.<key>`
//! (absolute, in the output key's unit, 0 when absent) and `rtol.<key>` (relative, 0 when
//! absent); when neither is given, rtol is [`DEFAULT_RTOL`]. Text outputs (`phase`) are
//! compared ignoring case; an expected `null` passes when the output is null.

use crate::case::{Command, parse_case};
use crate::compute;
use crate::error::{CliError, CliResult, bail};
use crate::sheet::{self, Column, Role, Sheet};
use crate::text::{Align, Table, num};
use flashduty::library::Library;
use flashduty::units::{QuantityKind, from_si, parse_si, to_si};
use rayon::prelude::*;
use serde_json::{Value, json};
use std::fmt::Write;

/// The relative tolerance used when a row gives neither `tol.<key>` nor `rtol.<key>`.
pub const DEFAULT_RTOL: f64 = 1e-6;

/// One comparison.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    /// The output key.
    pub key: String,
    /// The computed value, as shown.
    pub computed: String,
    /// The computed value as the output holds it (null when the key is missing).
    pub computed_value: Value,
    /// The expected value, as shown.
    pub expected: String,
    /// computed − expected (numbers only).
    pub deviation: Option<f64>,
    /// The allowed |deviation| (numbers only).
    pub allowed: Option<f64>,
    /// Passed?
    pub pass: bool,
    /// Why it failed, when it could not be compared.
    pub note: Option<String>,
    /// The unit the numbers are shown in: the expected column's header unit, where it
    /// names one (computed, expected, deviation and allowed are then all in it); else the
    /// output's own SI unit.
    pub unit: Option<String>,
}

impl Comparison {
    /// A number of this comparison as shown, with its unit where it is shown in the header's.
    pub fn shown(&self, value: &str) -> String {
        match &self.unit {
            Some(u) if value != "-" => format!("{value} {u}"),
            _ => value.to_string(),
        }
    }
}

/// One row's result.
#[derive(Debug, Clone, PartialEq)]
pub struct RowResult {
    /// Line in the file.
    pub line: u64,
    /// The row's id, if any.
    pub id: Option<String>,
    /// The command, if it could be read.
    pub command: Option<String>,
    /// The comparisons made.
    pub comparisons: Vec<Comparison>,
    /// Why the row could not be run, if it could not.
    pub error: Option<String>,
}

impl RowResult {
    /// Whether every comparison passed and the row ran.
    pub fn passed(&self) -> bool {
        self.error.is_none() && self.comparisons.iter().all(|c| c.pass)
    }

    /// "row 5 (hexane-bubble)".
    pub fn label(&self) -> String {
        match &self.id {
            Some(id) => format!("row {} ({id})", self.line),
            None => format!("row {}", self.line),
        }
    }
}

/// The unit kind of an output key, from its suffix.
pub fn key_kind(key: &str) -> Option<QuantityKind> {
    let last = key.rsplit('.').next().unwrap_or(key);
    if last.contains("_per_K") || last.contains("_per_Pa") {
        return None;
    }
    if last.ends_with("_J_per_mol") {
        Some(QuantityKind::MolarEnthalpy)
    } else if last.ends_with("_mol_s") {
        Some(QuantityKind::MolarFlow)
    } else if last.ends_with("_K") {
        Some(QuantityKind::Temperature)
    } else if last.ends_with("_Pa") {
        Some(QuantityKind::Pressure)
    } else if last.ends_with("_W") {
        Some(QuantityKind::Power)
    } else {
        None
    }
}

/// Reads an expected value or tolerance cell into the key's SI unit. `difference` converts a
/// temperature difference (no offset).
fn cell_number(field: &str, key: &str, text: &str, header_unit: Option<&str>, difference: bool) -> CliResult<f64> {
    let text = text.trim();
    let kind = key_kind(key);
    let convert = |value: f64, unit: &str| -> CliResult<f64> {
        let Some(kind) = kind else {
            bail!("{field}: '{text}' has a unit, but output '{key}' has none (give a plain number)");
        };
        let si = to_si(kind, field, value, unit)?;
        Ok(if difference {
            si - to_si(kind, field, 0.0, unit)?
        } else {
            si
        })
    };
    if let Ok(x) = text.parse::<f64>() {
        if !x.is_finite() {
            bail!("{field}: value {x} is not finite");
        }
        return match header_unit {
            Some(u) => convert(x, u),
            None => Ok(x),
        };
    }
    match kind {
        Some(k) => {
            if difference {
                // Split the number from its unit through the unit parser, then convert.
                let si = parse_si(k, field, text)?;
                let unit = text
                    .trim_start_matches(|c: char| c.is_ascii_digit() || "+-.eE".contains(c))
                    .trim();
                Ok(si - to_si(k, field, 0.0, unit)?)
            } else {
                Ok(parse_si(k, field, text)?)
            }
        }
        None => bail!("{field}: '{text}' is not a number"),
    }
}

/// Finds `key` (dotted) in `v`; list entries by index or by component name.
pub fn lookup<'a>(v: &'a Value, key: &str) -> Option<&'a Value> {
    let mut cur = v;
    let mut names: Option<&Vec<Value>> = v.get("components").and_then(Value::as_array);
    for seg in key.split('.') {
        let seg = seg.trim();
        cur = match cur {
            Value::Object(m) => {
                let next = m.get(seg)?;
                if let Some(n) = next.get("components").and_then(Value::as_array) {
                    names = Some(n);
                }
                next
            }
            Value::Array(items) => match seg.parse::<usize>() {
                Ok(i) => items.get(i)?,
                Err(_) => {
                    let i = names?
                        .iter()
                        .position(|n| n.as_str().is_some_and(|n| n.eq_ignore_ascii_case(seg)))?;
                    items.get(i)?
                }
            },
            _ => return None,
        };
    }
    Some(cur)
}

fn show_value(v: &Value) -> String {
    match v {
        Value::Number(n) => n.as_f64().map_or_else(|| n.to_string(), |x| num(x, 10)),
        Value::String(s) => s.clone(),
        Value::Null => "null".into(),
        other => {
            let s = other.to_string();
            if s.chars().count() > 40 {
                format!("{}...", s.chars().take(37).collect::<String>())
            } else {
                s
            }
        }
    }
}

fn compare(
    output: &Value,
    key: &str,
    expected: &str,
    expect_col: &Column,
    tol: Option<(&str, &Column)>,
    rtol: Option<(&str, &Column)>,
) -> Comparison {
    let mut c = Comparison {
        key: key.to_string(),
        computed: String::new(),
        computed_value: Value::Null,
        expected: expected.trim().to_string(),
        deviation: None,
        allowed: None,
        pass: false,
        note: None,
        unit: None,
    };
    let Some(value) = lookup(output, key) else {
        c.computed = "-".into();
        c.note = Some(format!("the output has no key '{key}'"));
        return c;
    };
    c.computed = show_value(value);
    c.computed_value = value.clone();
    let exp = expected.trim();
    if exp.eq_ignore_ascii_case("null") || exp.eq_ignore_ascii_case("none") {
        c.pass = value.is_null();
        return c;
    }
    match value {
        Value::String(s) => {
            c.pass = s.trim().eq_ignore_ascii_case(exp);
        }
        Value::Bool(b) => {
            c.pass = exp.eq_ignore_ascii_case(if *b { "true" } else { "false" });
        }
        Value::Number(n) => {
            let computed = n.as_f64().unwrap_or(f64::NAN);
            let result = (|| -> CliResult<(f64, f64)> {
                let e = cell_number(&expect_col.header, key, exp, expect_col.unit.as_deref(), false)?;
                let mut allowed = 0.0;
                let mut any = false;
                if let Some((text, col)) = tol {
                    let t = cell_number(&col.header, key, text, col.unit.as_deref(), true)?;
                    if t < 0.0 {
                        bail!("{}: tolerance {t} is negative", col.header);
                    }
                    allowed += t;
                    any = true;
                }
                if let Some((text, col)) = rtol {
                    let r = text
                        .trim()
                        .parse::<f64>()
                        .ok()
                        .filter(|r| r.is_finite() && *r >= 0.0)
                        .ok_or_else(|| {
                            CliError::new(format!("{}: '{}' is not a relative tolerance", col.header, text.trim()))
                        })?;
                    allowed += r * e.abs();
                    any = true;
                }
                if !any {
                    allowed = DEFAULT_RTOL * e.abs();
                }
                Ok((e, allowed))
            })();
            match result {
                Ok((e, allowed)) => {
                    let dev = computed - e;
                    c.deviation = Some(dev);
                    c.allowed = Some(allowed);
                    c.pass = dev.abs() <= allowed;
                    // Shown in the header's unit, where it names one: the pass/fail above
                    // is decided in SI, the numbers a reader compares are in one unit.
                    if let (Some(u), Some(kind)) = (expect_col.unit.as_deref(), key_kind(key)) {
                        let field = &expect_col.header;
                        let shown = (|| -> CliResult<(f64, f64, f64)> {
                            let zero = from_si(kind, field, 0.0, u)?;
                            Ok((
                                from_si(kind, field, computed, u)?,
                                from_si(kind, field, e, u)?,
                                from_si(kind, field, allowed, u)? - zero,
                            ))
                        })();
                        if let Ok((computed_u, expected_u, allowed_u)) = shown {
                            c.computed = format!("{computed_u}");
                            c.expected = format!("{expected_u}");
                            c.computed_value = json!(computed_u);
                            c.deviation = Some(computed_u - expected_u);
                            c.allowed = Some(allowed_u.abs());
                            c.unit = Some(u.to_string());
                        }
                    }
                }
                Err(err) => c.note = Some(err.to_string()),
            }
        }
        Value::Null => c.note = Some("the computed value is null".into()),
        _ => {
            c.note = Some(format!(
                "output '{key}' is a list or object; name one entry, e.g. '{key}.0'"
            ))
        }
    }
    c
}

/// Runs one row.
fn run_row(lib: &Library, sheet: &Sheet, row: &sheet::Row) -> RowResult {
    let mut result = RowResult {
        line: row.line,
        id: None,
        command: None,
        comparisons: Vec::new(),
        error: None,
    };
    let cells = &row.cells;
    let cell_of = |role: &Role| -> Option<(&str, &Column)> {
        sheet
            .columns
            .iter()
            .zip(cells)
            .find(|(c, v)| &c.role == role && !v.trim().is_empty())
            .map(|(c, v)| (v.as_str(), c))
    };
    result.id = row.cell(&sheet.columns, &Role::Id).map(str::to_string);
    if let Some(e) = &row.error {
        result.error = Some(e.clone());
        return result;
    }
    let command = match cell_of(&Role::Command) {
        None => {
            result.error = Some("command: empty (give flash, bubble, dew, duty or curve)".into());
            return result;
        }
        Some((v, _)) => match Command::from_name(v) {
            Some(c) => c,
            None => {
                result.error = Some(format!(
                    "command: '{}' is not one of flash, bubble, dew, duty, curve",
                    v.trim()
                ));
                return result;
            }
        },
    };
    result.command = Some(command.name().to_string());
    let output = sheet::case_value(&sheet.columns, cells)
        .and_then(|v| Ok(parse_case(&v, command)?))
        .and_then(|case| Ok(compute::run(lib, command, &case, None)?))
        .map(|o| o.to_json());
    let output = match output {
        Ok(o) => o,
        Err(e) => {
            result.error = Some(e.to_string());
            return result;
        }
    };
    for (col, cell) in sheet.columns.iter().zip(cells) {
        let Role::Expect(key) = &col.role else {
            continue;
        };
        if cell.trim().is_empty() {
            continue;
        }
        let tol = cell_of(&Role::Tol(key.clone()));
        let rtol = cell_of(&Role::Rtol(key.clone()));
        result.comparisons.push(compare(&output, key, cell, col, tol, rtol));
    }
    result
}

/// Checks every row of the sheet (in parallel; results in row order).
pub fn run(lib: &Library, name: &str, bytes: &[u8], sheet_name: Option<&str>) -> CliResult<Vec<RowResult>> {
    let sheet = sheet::read(name, bytes, sheet_name)?;
    if sheet.rows.is_empty() {
        bail!("{name}: the sheet has no rows to check (a check of nothing is not a pass)");
    }
    if !sheet.columns.iter().any(|c| c.role == Role::Command) {
        bail!("{name}: no 'command' column (each row names its command: flash, bubble, dew, duty or curve)");
    }
    for c in &sheet.columns {
        if let Role::Tol(k) | Role::Rtol(k) = &c.role
            && !sheet.columns.iter().any(|e| e.role == Role::Expect(k.clone()))
        {
            bail!("{name}: column '{}' has no matching 'expect.{k}' column", c.header);
        }
    }
    Ok(sheet.rows.par_iter().map(|r| run_row(lib, &sheet, r)).collect())
}

/// The per-row report and the summary line.
pub fn report(name: &str, results: &[RowResult]) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "Checking {name}: {} rows", results.len());
    let mut t = Table::new(&[
        ("row", Align::Right),
        ("id", Align::Left),
        ("command", Align::Left),
        ("key", Align::Left),
        ("computed", Align::Right),
        ("expected", Align::Right),
        ("deviation", Align::Right),
        ("allowed", Align::Right),
        ("result", Align::Left),
    ]);
    for r in results {
        let id = r.id.clone().unwrap_or_default();
        let cmd = r.command.clone().unwrap_or_else(|| "-".into());
        if r.error.is_some() {
            t.row(vec![
                r.line.to_string(),
                id.clone(),
                cmd.clone(),
                "-".into(),
                "error".into(),
                "-".into(),
                "-".into(),
                "-".into(),
                "FAIL".into(),
            ]);
            continue;
        }
        if r.comparisons.is_empty() {
            t.row(vec![
                r.line.to_string(),
                id.clone(),
                cmd.clone(),
                "(no expected values)".into(),
                "ran".into(),
                "-".into(),
                "-".into(),
                "-".into(),
                "pass".into(),
            ]);
        }
        for c in &r.comparisons {
            t.row(vec![
                r.line.to_string(),
                id.clone(),
                cmd.clone(),
                c.key.clone(),
                c.shown(&c.computed),
                c.shown(&c.expected),
                c.deviation.map_or("-".into(), |d| {
                    c.shown(&format!("{}{}", if d >= 0.0 { "+" } else { "" }, num(d, 3)))
                }),
                c.allowed.map_or("-".into(), |a| c.shown(&num(a, 3))),
                if c.pass { "pass".into() } else { "FAIL".into() },
            ]);
        }
    }
    out.push_str(&t.render(0));
    let failures: Vec<&RowResult> = results.iter().filter(|r| !r.passed()).collect();
    if !failures.is_empty() {
        let _ = writeln!(out, "\nFailures:");
        for r in &failures {
            if let Some(e) = &r.error {
                let _ = writeln!(out, "  {}: error: {e}", r.label());
            }
            for c in r.comparisons.iter().filter(|c| !c.pass) {
                let why = c.note.clone().unwrap_or_else(|| match (c.deviation, c.allowed) {
                    (Some(d), Some(a)) => format!("deviation {} exceeds the allowed {}", num(d, 4), num(a, 4)),
                    _ => "values differ".into(),
                });
                let _ = writeln!(
                    out,
                    "  {}: {}: computed {}, expected {}: {why}",
                    r.label(),
                    c.key,
                    c.shown(&c.computed),
                    c.shown(&c.expected)
                );
            }
        }
    }
    let passed = results.len() - failures.len();
    let _ = writeln!(out, "\n{}", crate::compute::CAUTION);
    let _ = writeln!(out, "{passed} passed, {} failed", failures.len());
    out
}

/// The results as one JSON object.
pub fn to_json(name: &str, results: &[RowResult]) -> Value {
    let rows: Vec<Value> = results
        .iter()
        .map(|r| {
            json!({
                "row": r.line,
                "id": r.id,
                "command": r.command,
                "passed": r.passed(),
                "error": r.error,
                "checks": r.comparisons.iter().map(|c| json!({
                    "key": c.key,
                    "computed": c.computed_value,
                    "expected": c.expected,
                    "deviation": c.deviation,
                    "allowed": c.allowed,
                    "unit": c.unit,
                    "passed": c.pass,
                    "note": c.note,
                })).collect::<Vec<_>>(),
            })
        })
        .collect();
    let failed = results.iter().filter(|r| !r.passed()).count();
    json!({
        "file": name,
        "rows": rows,
        "passed": results.len() - failed,
        "failed": failed,
        "caution": crate::compute::CAUTION,
    })
}

/// Escapes text for XML content and attribute values; drops characters XML 1.0 forbids.
pub fn xml_escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            '\t' | '\n' | '\r' => out.push(c),
            c if (c as u32) < 0x20 || c == '\u{FFFE}' || c == '\u{FFFF}' => out.push('\u{FFFD}'),
            c => out.push(c),
        }
    }
    out
}

/// JUnit XML: one test case per row.
pub fn junit(name: &str, results: &[RowResult]) -> String {
    let failed = results.iter().filter(|r| !r.passed()).count();
    let mut out = String::new();
    out.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    let suite = xml_escape(&format!("flashduty check {name}"));
    let _ = writeln!(
        out,
        "<testsuites name=\"{suite}\" tests=\"{}\" failures=\"{failed}\" errors=\"0\">",
        results.len()
    );
    let _ = writeln!(
        out,
        "  <testsuite name=\"{suite}\" tests=\"{}\" failures=\"{failed}\" errors=\"0\" skipped=\"0\">",
        results.len()
    );
    for r in results {
        let case_name = [Some(format!("row {}", r.line)), r.command.clone(), r.id.clone()]
            .into_iter()
            .flatten()
            .collect::<Vec<_>>()
            .join(" ");
        let _ = write!(
            out,
            "    <testcase classname=\"{}\" name=\"{}\"",
            xml_escape(name),
            xml_escape(&case_name)
        );
        if r.passed() {
            out.push_str("/>\n");
            continue;
        }
        out.push_str(">\n");
        let mut lines = Vec::new();
        if let Some(e) = &r.error {
            lines.push(format!("error: {e}"));
        }
        for c in r.comparisons.iter().filter(|c| !c.pass) {
            lines.push(format!(
                "{}: computed {}, expected {}{}",
                c.key,
                c.shown(&c.computed),
                c.shown(&c.expected),
                c.note.as_ref().map(|n| format!(" ({n})")).unwrap_or_default()
            ));
        }
        let message = lines.first().cloned().unwrap_or_default();
        let _ = writeln!(
            out,
            "      <failure message=\"{}\" type=\"{}\">{}</failure>",
            xml_escape(&message),
            if r.error.is_some() {
                "row-error"
            } else {
                "outside-tolerance"
            },
            xml_escape(&lines.join("\n"))
        );
        out.push_str("    </testcase>\n");
    }
    out.push_str("  </testsuite>\n</testsuites>\n");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lookup_by_index_and_name() {
        let v = json!({"components": ["benzene", "toluene"], "x": [0.3, 0.7],
                       "outlet": {"components": ["a", "b"], "y": [0.1, 0.9]}});
        assert_eq!(lookup(&v, "x.1"), Some(&json!(0.7)));
        assert_eq!(lookup(&v, "x.Benzene"), Some(&json!(0.3)));
        assert_eq!(lookup(&v, "outlet.y.b"), Some(&json!(0.9)));
        assert_eq!(lookup(&v, "x.2"), None);
        assert_eq!(lookup(&v, "nope"), None);
    }

    #[test]
    fn kinds_and_units() {
        assert_eq!(key_kind("T_K"), Some(QuantityKind::Temperature));
        assert_eq!(key_kind("outlet.P_Pa"), Some(QuantityKind::Pressure));
        assert_eq!(key_kind("dduty_dT_out_W_per_K"), None);
        assert_eq!(key_kind("table.0.h_J_per_mol"), Some(QuantityKind::MolarEnthalpy));
        let t = cell_number("e", "T_K", "80 degC", None, false).unwrap();
        assert!((t - 353.15).abs() < 1e-9);
        let d = cell_number("t", "T_K", "0.5", Some("degC"), true).unwrap();
        assert!((d - 0.5).abs() < 1e-9);
        let d = cell_number("t", "T_K", "0.9 degF", None, true).unwrap();
        assert!((d - 0.5).abs() < 1e-9);
        assert!(cell_number("e", "x.0", "1 bar", None, false).is_err());
    }

    #[test]
    fn escaping() {
        assert_eq!(
            xml_escape("a<b & \"c\" 'd'>\u{1}"),
            "a&lt;b &amp; &quot;c&quot; &apos;d&apos;&gt;\u{FFFD}"
        );
    }
}
