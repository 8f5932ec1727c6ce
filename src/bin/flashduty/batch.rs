//! `--batch FILE.csv`: every row of a spreadsheet computed in parallel, written as CSV
//! (default) or JSON lines, in input order, with an `error` column for rows that fail.

use crate::case::{Command, parse_case};
use crate::check::lookup;
use crate::compute;
use crate::error::{CliError, CliResult};
use crate::sheet::{self, Column, Role};
use flashduty::library::Library;
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use rayon::prelude::*;
use serde_json::{Value, json};
use std::io::{IsTerminal, Write};

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
        Command::Azeotropes => &["count", "azeotrope_T_K", "azeotrope_P_Pa", "azeotrope_x1"],
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

fn run_row(lib: &Library, columns: &[Column], command: Command, row: &sheet::Row) -> RowResult {
    let id = row.cell(columns, &Role::Id).map(str::to_string);
    if let Some(e) = &row.error {
        return (id, Err(e.clone()));
    }
    let cells = &row.cells;
    if let Some(c) = row.cell(columns, &Role::Command)
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
    let out = sheet::case_value(columns, cells)
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

/// A row's id and its outcome's JSON (or why it failed).
type RowResult = (Option<String>, Result<Value, String>);

/// Rows computed at a time: each chunk is run in parallel and written before the next is
/// read, so memory stays flat whatever the number of rows.
const CHUNK_ROWS: usize = 4096;

/// A write error: `None` for a closed pipe (`| head`), which ends the output quietly.
fn io_error(e: &std::io::Error) -> Option<CliError> {
    (e.kind() != std::io::ErrorKind::BrokenPipe).then(|| CliError::new(format!("batch output: {e}")))
}

fn xlsx_error(e: rust_xlsxwriter::XlsxError) -> CliError {
    CliError::new(format!("--output workbook: {e}"))
}

/// Runs the batch, writing rows in input order to `out` as they are computed (a chunk of
/// [`CHUNK_ROWS`] at a time, in parallel; a workbook is written whole at the end), and
/// returns the number of rows that failed.
pub fn run(
    lib: &Library,
    command: Command,
    name: &str,
    input: Box<dyn std::io::BufRead + '_>,
    sheet_name: Option<&str>,
    format: Format,
    out: &mut dyn Write,
) -> CliResult<usize> {
    let stream = sheet::stream(name, input, sheet_name)?;
    let cols = stream.columns;
    let mut rows = stream.rows;
    let bar = if std::io::stderr().is_terminal() {
        let b = ProgressBar::with_draw_target(None, ProgressDrawTarget::stderr());
        if let Ok(style) = ProgressStyle::with_template("{spinner} {pos} rows ({per_sec})") {
            b.set_style(style);
        }
        b
    } else {
        ProgressBar::hidden()
    };
    let keys = columns(command);
    let mut book = match format {
        Format::Workbook => Some(workbook_start(command, &cols, keys)?),
        _ => None,
    };
    let emit = |out: &mut dyn Write, bytes: &[u8]| -> Result<(), Option<CliError>> {
        out.write_all(bytes).map_err(|e| io_error(&e))
    };
    let header = if format == Format::Csv {
        let mut header = vec!["row", "id"];
        header.extend_from_slice(keys);
        header.extend_from_slice(&["warnings", "error"]);
        csv_line(&header)
    } else {
        Vec::new()
    };
    let fast = (format == Format::Csv).then(|| GivenK::plan(command, &cols)).flatten();
    let mut failed = 0;
    let mut done = 0;
    let mut written = emit(out, &header);
    // Each row is computed and, for text output, formatted in parallel; the rows are then
    // written in input order. The next chunk is read while this one is computed.
    let has_book = book.is_some();
    let compute = |chunk: &[sheet::Row]| -> Vec<(bool, Result<Vec<u8>, RowResult>)> {
        let line = |row: &sheet::Row, result: RowResult| match format {
            Format::JsonLines => json_line(command, row, result),
            _ => csv_row(keys, row, result),
        };
        chunk
            .par_iter()
            .map(|r| {
                // Plain given-K rows take the fast path; it gives the same line or declines.
                if let (Some(plan), false) = (&fast, has_book)
                    && let Some(line) = plan.line(&cols, r)
                {
                    return (false, Ok(line));
                }
                let result = run_row(lib, &cols, command, r);
                let failed = result.1.is_err();
                // A workbook is filled on this thread; text is formatted here, in parallel.
                (failed, if has_book { Err(result) } else { Ok(line(r, result)) })
            })
            .collect()
    };
    let mut chunk: Vec<sheet::Row> = rows.by_ref().take(CHUNK_ROWS).collect();
    while written.is_ok() && !chunk.is_empty() {
        let (computed, next) = std::thread::scope(|scope| {
            let worker = scope.spawn(|| compute(&chunk));
            let next: Vec<sheet::Row> = rows.by_ref().take(CHUNK_ROWS).collect();
            (worker.join(), next)
        });
        let computed = computed.map_err(|_| CliError::new("batch: a worker thread failed"))?;
        done += chunk.len();
        if done >= PROGRESS_ROWS {
            bar.set_position(done as u64);
        }
        failed += computed.iter().filter(|(f, _)| *f).count();
        written = match &mut book {
            Some(b) => {
                let results = computed.into_iter().filter_map(|(_, r)| r.err()).collect();
                workbook_rows(b, keys, cols.len(), &chunk, results).map_err(Some)
            }
            None => {
                let mut text = Vec::with_capacity(computed.iter().map(|(_, r)| r.as_ref().map_or(0, Vec::len)).sum());
                for line in computed.into_iter().filter_map(|(_, r)| r.ok()) {
                    text.extend_from_slice(&line);
                }
                emit(out, &text)
            }
        };
        chunk = next;
    }
    bar.finish_and_clear();
    if written.is_ok()
        && let Some(mut b) = book
    {
        let bytes = b.book.save_to_buffer().map_err(xlsx_error)?;
        written = emit(out, &bytes);
    }
    if written.is_ok() {
        written = out.flush().map_err(|e| io_error(&e));
    }
    match written {
        Err(Some(e)) => Err(e),
        _ => Ok(failed),
    }
}

/// One CSV line of `cells`.
fn csv_line(cells: &[&str]) -> Vec<u8> {
    let mut w = csv::WriterBuilder::new().from_writer(Vec::new());
    let _ = w.write_record(cells);
    w.into_inner().unwrap_or_default()
}

/// The fast path of a flash batch whose only case fields are `z` and `K` (given
/// K-values, no units): a row is parsed, split by the Rachford–Rice solver and formatted
/// without building a case or its JSON. It gives exactly the line the general path gives
/// (a test compares them), and declines any row that is not plain (a cell that is not a
/// list of finite non-negative numbers, lengths that differ, mole fractions that do not sum
/// to 1 within round-off, any error): the general path then runs it, with its messages and
/// warnings.
struct GivenK {
    z: usize,
    k: usize,
}

impl GivenK {
    fn plan(command: Command, cols: &[Column]) -> Option<Self> {
        if command != Command::Flash {
            return None;
        }
        let (mut z, mut k) = (None, None);
        for (i, c) in cols.iter().enumerate() {
            match &c.role {
                Role::Field(path) if c.unit.is_none() && path.len() == 1 && path[0] == "z" => z = Some(i),
                Role::Field(path) if c.unit.is_none() && path.len() == 1 && path[0] == "K" => k = Some(i),
                Role::Field(_) => return None,
                _ => {}
            }
        }
        Some(Self { z: z?, k: k? })
    }

    fn list(cell: &str) -> Option<Vec<f64>> {
        cell.split(';')
            .map(|t| t.trim().parse::<f64>().ok().filter(|x| x.is_finite() && *x >= 0.0))
            .collect()
    }

    fn line(&self, cols: &[Column], row: &sheet::Row) -> Option<Vec<u8>> {
        if row.error.is_some() {
            return None;
        }
        if let Some(c) = row.cell(cols, &Role::Command)
            && Command::from_name(c) != Some(Command::Flash)
        {
            return None;
        }
        let z = Self::list(row.cells.get(self.z)?)?;
        let k = Self::list(row.cells.get(self.k)?)?;
        if z.is_empty() || z.len() != k.len() {
            return None;
        }
        // The case schema's own normalisation of typed mole fractions, and its warning.
        let mut warnings = Vec::new();
        let z = flashduty::case::typed_z(&z, &mut warnings).ok()?;
        let warning = warnings.first().map(ToString::to_string).unwrap_or_default();
        let s = flashduty::rachford_rice::rachford_rice(&z, &k).ok()?;
        // The line is written straight into one buffer; numbers as serde_json prints them
        // (the general path's cells), lists joined by ';', text quoted as the csv writer
        // would quote it.
        use std::fmt::Write as _;
        let mut line = String::with_capacity(64 + 24 * 4 * z.len());
        let number = |line: &mut String, x: f64| {
            if let Some(n) = serde_json::Number::from_f64(x) {
                let _ = write!(line, "{n}");
            }
        };
        let list = |line: &mut String, v: &[f64]| {
            for (i, &x) in v.iter().enumerate() {
                if i > 0 {
                    line.push(';');
                }
                number(line, x);
            }
        };
        let _ = write!(line, "{},", row.line);
        push_text(&mut line, row.cell(cols, &Role::Id).unwrap_or_default());
        let _ = write!(line, ",{},", s.phase);
        number(&mut line, s.vapour_fraction);
        line.push(',');
        number(&mut line, s.liquid_fraction);
        line.push_str(",,,,");
        list(&mut line, &z);
        line.push(',');
        if let Some(x) = &s.liquid {
            list(&mut line, x);
        }
        line.push(',');
        if let Some(y) = &s.vapour {
            list(&mut line, y);
        }
        line.push(',');
        list(&mut line, &k);
        let _ = write!(line, ",,{},,,", s.iterations);
        push_text(&mut line, &warning);
        line.push_str(",\n");
        Some(line.into_bytes())
    }
}

/// Text as one CSV field: quoted (quotes doubled) where it holds a comma, a quote or a line
/// break, as the csv writer's default does.
fn push_text(line: &mut String, text: &str) {
    if text.contains([',', '"', '\n', '\r']) {
        line.push('"');
        line.push_str(&text.replace('"', "\"\""));
        line.push('"');
    } else {
        line.push_str(text);
    }
}

/// One row as a CSV line.
fn csv_row(keys: &[&str], row: &sheet::Row, (id, r): RowResult) -> Vec<u8> {
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
    let mut w = csv::WriterBuilder::new().buffer_capacity(256).from_writer(Vec::new());
    let _ = w.write_record(&record);
    w.into_inner().unwrap_or_default()
}

/// One row as a JSON line.
fn json_line(command: Command, row: &sheet::Row, (id, r): RowResult) -> Vec<u8> {
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
    let mut line = v.to_string().into_bytes();
    line.push(b'\n');
    line
}

/// An .xlsx workbook being filled chunk by chunk (rust_xlsxwriter keeps it in memory until
/// it is saved).
struct Book {
    book: rust_xlsxwriter::Workbook,
    next_row: u32,
}

/// The workbook's header: `row`, the input columns as given, the output keys, `warnings`
/// and `error`, in a sheet named after the command.
fn workbook_start(command: Command, cols: &[Column], keys: &[&str]) -> CliResult<Book> {
    use rust_xlsxwriter::{Format as CellFormat, Workbook};
    let mut book = Workbook::new();
    let ws = book.add_worksheet();
    ws.set_name(command.name()).map_err(xlsx_error)?;
    let bold = CellFormat::new().set_bold();
    let heads: Vec<&str> = std::iter::once("row")
        .chain(cols.iter().map(|c| c.header.as_str()))
        .chain(keys.iter().copied())
        .chain(["warnings", "error"])
        .collect();
    for (c, h) in heads.iter().enumerate() {
        let c = u16::try_from(c).map_err(|_| CliError::new("--output workbook: too many columns"))?;
        ws.write_string_with_format(0, c, *h, &bold).map_err(xlsx_error)?;
    }
    Ok(Book { book, next_row: 1 })
}

/// A chunk of rows into the workbook: each row's input cells (numbers as numbers), then
/// its results, warnings and error.
fn workbook_rows(
    b: &mut Book,
    keys: &[&str],
    inputs: usize,
    chunk: &[sheet::Row],
    results: Vec<RowResult>,
) -> CliResult<()> {
    let too_many = || CliError::new("--output workbook: more rows or columns than a worksheet holds");
    let ws = b.book.worksheet_from_index(0).map_err(xlsx_error)?;
    let first = u16::try_from(inputs + 1).map_err(|_| too_many())?;
    let key_count = u16::try_from(keys.len()).map_err(|_| too_many())?;
    for (row, (_, r)) in chunk.iter().zip(results) {
        let at = b.next_row;
        b.next_row = b.next_row.checked_add(1).ok_or_else(too_many)?;
        ws.write_number(at, 0, row.line as f64).map_err(xlsx_error)?;
        for (j, text) in row.cells.iter().take(inputs).enumerate() {
            let c = u16::try_from(j + 1).map_err(|_| too_many())?;
            match text.trim().parse::<f64>() {
                Ok(x) if x.is_finite() => ws.write_number(at, c, x).map_err(xlsx_error)?,
                _ => ws.write_string(at, c, text).map_err(xlsx_error)?,
            };
        }
        match r {
            Ok(v) => {
                for (k, key) in keys.iter().enumerate() {
                    let c = first + k as u16;
                    match lookup(&v, key) {
                        Some(Value::Number(n)) => {
                            if let Some(x) = n.as_f64() {
                                ws.write_number(at, c, x).map_err(xlsx_error)?;
                            }
                        }
                        other => {
                            let text = cell(other);
                            if !text.is_empty() {
                                ws.write_string(at, c, &text).map_err(xlsx_error)?;
                            }
                        }
                    }
                }
                let w = warnings_cell(&v);
                if !w.is_empty() {
                    ws.write_string(at, first + key_count, &w).map_err(xlsx_error)?;
                }
            }
            Err(e) => {
                ws.write_string(at, first + key_count + 1, &e).map_err(xlsx_error)?;
            }
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// The given-K fast path gives, byte for byte, the line of the general path (case
    /// schema, library, JSON, csv writer), for feeds whose mole fractions sum to 1 exactly
    /// or within 1e-3 (normalised with the warning), single- and two-phase, K from 1e-6 to
    /// 1e6, with ids that need quoting; and it declines what the general path refuses.
    #[test]
    fn fast_path_lines_are_the_general_paths() {
        let lib = Library::builtin();
        let text = "command,id,z,K\n";
        let cols = sheet::read("t.csv", text.as_bytes(), None).unwrap().columns;
        let plan = GivenK::plan(Command::Flash, &cols).unwrap();
        let keys = columns(Command::Flash);
        let mut runner = proptest::test_runner::TestRunner::default();
        let strategy = (
            proptest::collection::vec((0.01f64..1.0, -6.0f64..6.0), 2..12),
            prop_oneof![Just(0.0), -1e-4f64..1e-4, -1e-9f64..1e-9],
            prop_oneof![
                Just("a".to_string()),
                Just("row, \"quoted\"".to_string()),
                "[a-z0-9 ]{0,8}"
            ],
        );
        runner
            .run(&strategy, |(parts, off, id)| {
                let sum: f64 = parts.iter().map(|p| p.0).sum();
                let z: Vec<String> = parts.iter().map(|p| format!("{}", p.0 / sum * (1.0 + off))).collect();
                let k: Vec<String> = parts.iter().map(|p| format!("{}", 10f64.powf(p.1))).collect();
                let row = sheet::Row {
                    line: 7,
                    cells: vec!["flash".into(), id, z.join(";"), k.join(";")],
                    error: None,
                };
                let general = csv_row(keys, &row, run_row(lib, &cols, Command::Flash, &row));
                match plan.line(&cols, &row) {
                    Some(fast) => {
                        prop_assert_eq!(String::from_utf8(fast).unwrap(), String::from_utf8(general).unwrap())
                    }
                    None => prop_assert!(
                        String::from_utf8(general)
                            .unwrap()
                            .trim_end()
                            .ends_with(|c: char| c != ','),
                        "declined a row the general path ran"
                    ),
                }
                Ok(())
            })
            .unwrap();
        // Declined: a negative mole fraction, lengths that differ, text.
        for (z, k) in [("0.5;-0.5", "2;0.5"), ("0.5;0.5", "2"), ("half;half", "2;0.5")] {
            let row = sheet::Row {
                line: 2,
                cells: vec!["flash".into(), String::new(), z.into(), k.into()],
                error: None,
            };
            assert!(plan.line(&cols, &row).is_none(), "{z} {k}");
        }
        // Other case fields, or another command: no fast path.
        let other = sheet::read("t.csv", b"command,z,K,T\n", None).unwrap().columns;
        assert!(GivenK::plan(Command::Flash, &other).is_none());
        assert!(GivenK::plan(Command::Bubble, &cols).is_none());
    }
}
