//! `--batch FILE.csv`: every row of a spreadsheet computed in parallel, written as CSV
//! (default) or JSON lines, in input order, with an `error` column for rows that fail.

use crate::case::{Command, parse_case};
use crate::check::lookup;
use crate::compute;
use crate::error::{CliError, CliResult};
use crate::sheet::{self, Role, Sheet};
use flashduty::library::Library;
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use rayon::prelude::*;
use serde_json::{Value, json};
use std::io::IsTerminal;

/// Rows above which a progress bar is shown (when stderr is a terminal).
const PROGRESS_ROWS: usize = 200;

/// The CSV columns of each command's batch output (output keys, dotted).
fn columns(command: Command) -> &'static [&'static str] {
    match command {
        Command::Flash | Command::Bubble | Command::Dew => &[
            "phase",
            "vapour_fraction",
            "liquid_fraction",
            "T_K",
            "P_Pa",
            "components",
            "z",
            "x",
            "y",
            "K",
            "flow_mol_s",
            "iterations",
            "sensitivity.dvapour_fraction_dT_per_K",
            "sensitivity.dvapour_fraction_dP_per_Pa",
        ],
        Command::Duty => &[
            "duty_W",
            "flow_mol_s",
            "inlet.T_K",
            "inlet.P_Pa",
            "inlet.phase",
            "inlet.vapour_fraction",
            "outlet.T_K",
            "outlet.P_Pa",
            "outlet.phase",
            "outlet.vapour_fraction",
            "components",
            "z",
            "outlet.x",
            "outlet.y",
            "dduty_dT_out_W_per_K",
            "path_spread.spread_W",
            "path_spread.relative",
        ],
        Command::Curve => &["duty_W", "bubble_T_K", "dew_T_K", "P_Pa"],
    }
}

/// A JSON value as one CSV cell: numbers in full precision, lists joined by `;`.
fn cell(v: Option<&Value>) -> String {
    match v {
        None | Some(Value::Null) => String::new(),
        Some(Value::String(s)) => s.clone(),
        Some(Value::Number(n)) => n.to_string(),
        Some(Value::Bool(b)) => b.to_string(),
        Some(Value::Array(items)) => items.iter().map(|i| cell(Some(i))).collect::<Vec<_>>().join(";"),
        Some(other) => other.to_string(),
    }
}

fn warnings_cell(v: &Value) -> String {
    v.get("warnings")
        .and_then(Value::as_array)
        .map(|ws| {
            ws.iter()
                .filter_map(|w| w.get("message").and_then(Value::as_str))
                .collect::<Vec<_>>()
                .join(" | ")
        })
        .unwrap_or_default()
}

fn run_row(
    lib: &Library,
    sheet: &Sheet,
    command: Command,
    row: &sheet::Row,
) -> (Option<String>, Result<Value, String>) {
    let id = row.cell(&sheet.columns, &Role::Id).map(str::to_string);
    if let Some(e) = &row.error {
        return (id, Err(e.clone()));
    }
    let cells = &row.cells;
    if let Some(c) = row.cell(&sheet.columns, &Role::Command)
        && Command::from_name(c) != Some(command)
    {
        return (
            id,
            Err(format!(
                "command: '{c}' in a {} batch (leave the cell empty or write {})",
                command.name(),
                command.name()
            )),
        );
    }
    let out = sheet::case_value(&sheet.columns, cells)
        .and_then(|v| Ok(parse_case(&v, command)?))
        .and_then(|case| Ok(compute::run(lib, command, &case, None)?))
        .map(|o| o.to_json())
        .map_err(|e| e.to_string());
    (id, out)
}

/// What a batch writes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// CSV: row, id, the command's output columns, warnings, error.
    Csv,
    /// One JSON object a row.
    JsonLines,
    /// An .xlsx workbook: the input columns, then the output columns, warnings and error.
    Workbook,
}

/// Runs the batch and returns the output bytes and the number of rows that failed.
pub fn run(
    lib: &Library,
    command: Command,
    name: &str,
    bytes: &[u8],
    sheet_name: Option<&str>,
    format: Format,
) -> CliResult<(Vec<u8>, usize)> {
    let json_lines = format == Format::JsonLines;
    let sheet = sheet::read(name, bytes, sheet_name)?;
    let n = sheet.rows.len();
    let bar = if n >= PROGRESS_ROWS && std::io::stderr().is_terminal() {
        let b = ProgressBar::with_draw_target(Some(n as u64), ProgressDrawTarget::stderr());
        if let Ok(style) = ProgressStyle::with_template("{bar:40} {pos}/{len} rows ({eta} left)") {
            b.set_style(style);
        }
        b
    } else {
        ProgressBar::hidden()
    };
    let results: Vec<(Option<String>, Result<Value, String>)> = sheet
        .rows
        .par_iter()
        .map(|r| {
            let out = run_row(lib, &sheet, command, r);
            bar.inc(1);
            out
        })
        .collect();
    bar.finish_and_clear();
    let failed = results.iter().filter(|(_, r)| r.is_err()).count();

    if json_lines {
        let mut out = String::new();
        for (row, (id, r)) in sheet.rows.iter().zip(results) {
            let mut v = match r {
                Ok(v) => v,
                Err(e) => json!({"command": command.name(), "error": e}),
            };
            if let Value::Object(m) = &mut v {
                m.insert("row".into(), json!(row.line));
                m.insert("id".into(), json!(id));
                m.entry("error").or_insert(Value::Null);
                m.remove("caution");
            }
            out.push_str(&v.to_string());
            out.push('\n');
        }
        return Ok((out.into_bytes(), failed));
    }
    if format == Format::Workbook {
        return Ok((workbook(command, &sheet, results)?, failed));
    }

    let mut w = csv::WriterBuilder::new().from_writer(Vec::new());
    let keys = columns(command);
    let mut header = vec!["row", "id"];
    header.extend_from_slice(keys);
    header.extend_from_slice(&["warnings", "error"]);
    let io = |e: csv::Error| CliError::new(format!("batch output: {e}"));
    w.write_record(&header).map_err(io)?;
    for (row, (id, r)) in sheet.rows.iter().zip(results) {
        let mut record = vec![row.line.to_string(), id.unwrap_or_default()];
        match r {
            Ok(v) => {
                record.extend(keys.iter().map(|k| cell(lookup(&v, k))));
                record.push(warnings_cell(&v));
                record.push(String::new());
            }
            Err(e) => {
                record.extend(keys.iter().map(|_| String::new()));
                record.push(String::new());
                record.push(e);
            }
        }
        w.write_record(&record).map_err(io)?;
    }
    let bytes = w
        .into_inner()
        .map_err(|e| CliError::new(format!("batch output: {e}")))?;
    Ok((bytes, failed))
}

/// The batch as an .xlsx workbook: each row's input cells, then its results (numbers as
/// numbers), warnings and error, under the input header and the output keys.
fn workbook(
    command: Command,
    sheet: &Sheet,
    results: Vec<(Option<String>, Result<Value, String>)>,
) -> CliResult<Vec<u8>> {
    use rust_xlsxwriter::{Format as CellFormat, Workbook};
    let xl = |e: rust_xlsxwriter::XlsxError| CliError::new(format!("--output workbook: {e}"));
    let mut book = Workbook::new();
    let ws = book.add_worksheet();
    ws.set_name(command.name()).map_err(xl)?;
    let bold = CellFormat::new().set_bold();
    let keys = columns(command);
    let inputs = sheet.columns.len();
    let mut col = 0u16;
    ws.write_string_with_format(0, col, "row", &bold).map_err(xl)?;
    for c in &sheet.columns {
        col += 1;
        ws.write_string_with_format(0, col, &c.header, &bold).map_err(xl)?;
    }
    for k in keys.iter().chain(&["warnings", "error"]) {
        col += 1;
        ws.write_string_with_format(0, col, *k, &bold).map_err(xl)?;
    }
    for (i, (row, (_, r))) in sheet.rows.iter().zip(results).enumerate() {
        let at = u32::try_from(i + 1).map_err(|_| CliError::new("--output workbook: too many rows"))?;
        ws.write_number(at, 0, row.line as f64).map_err(xl)?;
        for (j, cell) in row.cells.iter().take(inputs).enumerate() {
            let c = u16::try_from(j + 1).map_err(|_| CliError::new("--output workbook: too many columns"))?;
            match cell.trim().parse::<f64>() {
                Ok(x) if x.is_finite() => ws.write_number(at, c, x).map_err(xl)?,
                _ => ws.write_string(at, c, cell).map_err(xl)?,
            };
        }
        let first = u16::try_from(inputs + 1).map_err(|_| CliError::new("--output workbook: too many columns"))?;
        match r {
            Ok(v) => {
                for (k, key) in keys.iter().enumerate() {
                    let c = first + k as u16;
                    match lookup(&v, key) {
                        Some(Value::Number(n)) => {
                            ws.write_number(at, c, n.as_f64().unwrap_or(f64::NAN)).map_err(xl)?;
                        }
                        other => {
                            let text = cell(other);
                            if !text.is_empty() {
                                ws.write_string(at, c, &text).map_err(xl)?;
                            }
                        }
                    }
                }
                let w = warnings_cell(&v);
                if !w.is_empty() {
                    ws.write_string(at, first + keys.len() as u16, &w).map_err(xl)?;
                }
            }
            Err(e) => {
                ws.write_string(at, first + keys.len() as u16 + 1, &e).map_err(xl)?;
            }
        }
    }
    book.save_to_buffer().map_err(xl)
}
