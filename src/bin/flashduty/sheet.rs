//! Spreadsheet CSV: one row per case, a column per case field.
//!
//! * Column names are case keys, dotted for nested ones (`inlet.T`, `reference.phase`).
//! * A unit may follow a column name in brackets, `T [degC]`; it applies to every number in
//!   the column that has no unit of its own (a unit in the cell wins).
//! * Lists (`components`, `z`, `flows`, `K`) are separated by `;` within one cell.
//! * An empty cell means the field is absent for that row.
//! * `command` names the command of the row; `id` labels it; `expect.<key>`, `tol.<key>`
//!   and `rtol.<key>` hold expected outputs and their tolerances (used by `check`).
//! * Lines starting with `#` are comments. Rows are numbered by their line in the file.

use crate::case::{LIST_KEYS, REFERENCE_KEYS, STATE_KEYS, TOP_KEYS, suggest_key};
use crate::error::{CliError, CliResult, bail};
use flashduty::units::clip;
use serde_json::{Map, Value};
use std::io::{BufRead, Read};

/// What a column holds.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Role {
    /// The row's command.
    Command,
    /// A label for the row.
    Id,
    /// A case field, by its dotted path.
    Field(Vec<String>),
    /// An expected output, by its dotted output key.
    Expect(String),
    /// An absolute tolerance for an output key.
    Tol(String),
    /// A relative tolerance for an output key.
    Rtol(String),
}

/// One column.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Column {
    /// The header cell as written.
    pub header: String,
    /// The name without the unit.
    pub name: String,
    /// The unit in brackets, if any.
    pub unit: Option<String>,
    /// What it holds.
    pub role: Role,
}

/// One data row.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    /// The line of the file it starts on (the header is usually line 1).
    pub line: u64,
    /// Its cells (as many as could be read).
    pub cells: Vec<String>,
    /// Why the row cannot be used, if it cannot (e.g. a wrong number of cells).
    pub error: Option<String>,
}

impl Row {
    /// The non-empty cell of the first column with `role`, if the row has it.
    pub fn cell<'a>(&'a self, columns: &[Column], role: &Role) -> Option<&'a str> {
        columns
            .iter()
            .zip(&self.cells)
            .find(|(c, v)| &c.role == role && !v.trim().is_empty())
            .map(|(_, v)| v.trim())
    }
}

/// A read spreadsheet.
#[derive(Debug, Clone, PartialEq)]
pub struct Sheet {
    /// The columns.
    pub columns: Vec<Column>,
    /// The rows.
    pub rows: Vec<Row>,
}

/// Splits `T [degC]` into `("T", Some("degC"))`.
pub fn split_header(cell: &str) -> CliResult<(String, Option<String>)> {
    let cell = cell.trim();
    // Messages echo at most the start of a very long header.
    let shown = flashduty::units::clip(cell);
    match cell.find('[') {
        None => {
            if cell.contains(']') {
                bail!("column '{shown}': ']' without '['");
            }
            Ok((cell.to_string(), None))
        }
        Some(open) => {
            let rest = &cell[open + 1..];
            let Some(close) = rest.find(']') else {
                bail!("column '{shown}': '[' without ']' (write units as 'T [degC]')");
            };
            if !rest[close + 1..].trim().is_empty() {
                bail!("column '{shown}': text after the unit (write units as 'T [degC]')");
            }
            let unit = rest[..close].trim();
            if unit.is_empty() {
                bail!("column '{shown}': empty unit in brackets");
            }
            Ok((cell[..open].trim().to_string(), Some(unit.to_string())))
        }
    }
}

fn field_role(name: &str, header: &str) -> CliResult<Role> {
    // Messages echo at most the start of a very long header (no case key is that long).
    let header = &*flashduty::units::clip(header);
    let name = &*flashduty::units::clip(name);
    let parts: Vec<String> = name.split('.').map(|s| s.trim().to_string()).collect();
    let top = parts[0].as_str();
    let check_nested = |known: &[&str]| -> CliResult<()> {
        if parts.len() != 2 {
            bail!("column '{header}': give '{top}.<key>' with one of {}", known.join(", "));
        }
        if !known.contains(&parts[1].as_str()) {
            let hint = suggest_key(&parts[1], known)
                .map(|k| format!(" (did you mean '{top}.{k}'?)"))
                .unwrap_or_default();
            bail!(
                "column '{header}': unknown key '{name}'{hint}; known keys of '{top}': {}",
                known.join(", ")
            );
        }
        Ok(())
    };
    match top {
        "inlet" | "outlet" => check_nested(STATE_KEYS)?,
        "reference" => check_nested(REFERENCE_KEYS)?,
        _ if TOP_KEYS.contains(&top) => {
            if parts.len() != 1 {
                bail!("column '{header}': '{top}' has no nested keys");
            }
        }
        _ => {
            let mut known: Vec<&str> = TOP_KEYS.to_vec();
            known.extend(["command", "id"]);
            let hint = suggest_key(top, &known)
                .map(|k| format!(" (did you mean '{k}'?)"))
                .unwrap_or_default();
            bail!(
                "column '{header}': unknown case field '{name}'{hint}; expected case keys (dotted for nested ones), command, id, expect.<key>, tol.<key> or rtol.<key>"
            );
        }
    }
    Ok(Role::Field(parts))
}

fn column(header: &str) -> CliResult<Column> {
    let (name, unit) = split_header(header)?;
    if name.is_empty() {
        bail!("column '{header}': empty column name");
    }
    let output_key = |prefix: &str| -> CliResult<String> {
        let key = name[prefix.len()..].trim().to_string();
        if key.is_empty() || key.split('.').any(|s| s.trim().is_empty()) {
            bail!("column '{header}': give the output key after '{prefix}', e.g. '{prefix}vapour_fraction'");
        }
        Ok(key)
    };
    let role = if name == "command" {
        Role::Command
    } else if name == "id" {
        Role::Id
    } else if name.starts_with("expect.") {
        Role::Expect(output_key("expect.")?)
    } else if name.starts_with("tol.") {
        Role::Tol(output_key("tol.")?)
    } else if name.starts_with("rtol.") {
        if unit.is_some() {
            bail!("column '{header}': a relative tolerance has no unit");
        }
        Role::Rtol(output_key("rtol.")?)
    } else {
        field_role(&name, header)?
    };
    if unit.is_some() && matches!(role, Role::Command | Role::Id) {
        bail!("column '{header}': this column takes no unit");
    }
    Ok(Column {
        header: header.trim().to_string(),
        name,
        unit,
        role,
    })
}

/// One row of a grid read from a file: its line (CSV) or row number (workbook), its cells,
/// and why it cannot be used, if it cannot.
struct GridRow {
    line: u64,
    cells: Vec<String>,
    error: Option<String>,
}

/// Whether the file name is a workbook calamine reads (by extension).
pub fn is_workbook(name: &str) -> bool {
    let lower = name.to_ascii_lowercase();
    [".xlsx", ".xlsm", ".xlsb", ".xls", ".ods"]
        .iter()
        .any(|e| lower.ends_with(e))
}

/// Reads a spreadsheet: a workbook (`.xlsx`, `.xlsm`, `.xlsb`, `.xls`, `.ods`; the sheet
/// named `sheet`, else the first) or CSV (comma-separated, or semicolon-separated with
/// decimal commas, as many European exports are: detected from the header line). `name` is
/// used in messages. Row numbers are the file's line numbers (CSV; CRLF and comment lines
/// counted) or the workbook's row numbers.
///
/// # Errors
/// A file-level problem: no header, a bad or repeated column name, an unreadable workbook
/// or a sheet that is not there. A row that cannot be read is kept as a [`Row`] with an
/// error, so the other rows still run.
pub fn read(name: &str, bytes: &[u8], sheet: Option<&str>) -> CliResult<Sheet> {
    let stream = stream(name, Box::new(bytes), sheet)?;
    Ok(Sheet {
        rows: stream.rows.collect(),
        columns: stream.columns,
    })
}

/// A spreadsheet read row by row: the columns, and the rows as they are parsed (CSV is
/// parsed lazily, so a batch holds only the rows it is computing; a workbook is in memory
/// already).
pub struct SheetStream<'a> {
    /// The columns.
    pub columns: Vec<Column>,
    /// The rows, in file order.
    pub rows: Box<dyn Iterator<Item = Row> + 'a>,
}

/// [`read`], row by row, from a reader: CSV is read as it is parsed, so neither the file nor
/// its rows are held whole (a workbook is read whole, as the workbook reader needs).
///
/// # Errors
/// As [`read`], for the file-level problems (found before any row).
pub fn stream<'a>(name: &str, mut input: Box<dyn BufRead + 'a>, sheet: Option<&str>) -> CliResult<SheetStream<'a>> {
    let (header, grid): (Vec<String>, Box<dyn Iterator<Item = GridRow> + 'a>) = if is_workbook(name) {
        let mut bytes = Vec::new();
        input
            .read_to_end(&mut bytes)
            .map_err(|e| CliError::new(format!("{name}: cannot read it ({e})")))?;
        let (h, rows) = workbook_grid(name, &bytes, sheet)?;
        (h, Box::new(rows.into_iter()))
    } else {
        if sheet.is_some() {
            bail!("--sheet: '{name}' is CSV, which has one sheet; --sheet is for workbooks (.xlsx, .ods)");
        }
        csv_grid(name, input)?
    };
    let mut columns: Vec<Column> = Vec::with_capacity(header.len());
    for text in &header {
        let c = column(text).map_err(|e| e.context(name))?;
        if let Some(prev) = columns.iter().find(|p| p.name == c.name) {
            bail!("{name}: column '{}' repeats column '{}'", c.header, prev.header);
        }
        columns.push(c);
    }
    let width = columns.len();
    let rows = grid.map(move |GridRow { line, cells, mut error }| {
        if error.is_none() && cells.len() != width {
            error = Some(format!("{} cells, but the header has {width} columns", cells.len()));
        }
        Row { line, cells, error }
    });
    Ok(SheetStream {
        columns,
        rows: Box::new(rows),
    })
}

const NO_HEADER: &str = "no header line (expected column names such as 'command,components,z,T [degC],P [bar]')";

/// The header and the rows (parsed lazily, as the input is read) of CSV.
fn csv_grid<'a>(
    name: &str,
    mut input: Box<dyn BufRead + 'a>,
) -> CliResult<(Vec<String>, Box<dyn Iterator<Item = GridRow> + 'a>)> {
    let read_error = |e: std::io::Error| CliError::new(format!("{name}: cannot read it ({e})"));
    // A byte-order mark, and the delimiter from the first line (in the first buffer).
    let first = input.fill_buf().map_err(read_error)?;
    let bom = first.starts_with(b"\xEF\xBB\xBF");
    let semicolons = semicolon_separated(if bom { &first[3..] } else { first });
    if bom {
        input.consume(3);
    }
    let starts = std::rc::Rc::new(std::cell::RefCell::new(std::collections::VecDeque::new()));
    let filtered = RecordLines {
        inner: input,
        buf: Vec::new(),
        pos: 0,
        line: 0,
        quoted: false,
        starts: std::rc::Rc::clone(&starts),
    };
    let reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .delimiter(if semicolons { b';' } else { b',' })
        .trim(csv::Trim::All)
        .from_reader(filtered);
    let next_line = move || starts.borrow_mut().pop_front().unwrap_or(0);
    let mut records = reader.into_byte_records();
    let header = loop {
        match records.next() {
            None => bail!("{name}: {NO_HEADER}"),
            Some(Err(e)) => bail!("{name}: cannot read the header: {e}"),
            Some(Ok(r)) => {
                next_line();
                if !r.iter().all(|c| c.is_empty()) {
                    break r;
                }
            }
        }
    };
    let mut head = Vec::with_capacity(header.len());
    for cell in header.iter() {
        let text =
            std::str::from_utf8(cell).map_err(|_| CliError::new(format!("{name}: the header is not UTF-8 text")))?;
        head.push(text.to_string());
    }
    if !semicolons && head.len() == 1 && head[0].contains(';') {
        bail!(
            "{name}: the header is one column holding ';': if the file is semicolon-separated, every header cell must be separated by ';' (and decimals may use commas)"
        );
    }
    let names = head.clone();
    let rows = records.filter_map(move |rec| {
        let line = next_line();
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                return Some(GridRow {
                    line,
                    cells: Vec::new(),
                    error: Some(format!("cannot read the row: {e}")),
                });
            }
        };
        if rec.iter().all(|c| c.is_empty()) {
            return None;
        }
        let mut error = None;
        let mut cells = Vec::with_capacity(rec.len());
        for (i, c) in rec.iter().enumerate() {
            match String::from_utf8(c.to_vec()) {
                Ok(s) => cells.push(if semicolons { decimal_points(&s) } else { s }),
                Err(e) => {
                    let column = names.get(i).map_or_else(|| format!("#{}", i + 1), Clone::clone);
                    error.get_or_insert(format!("column '{}': the cell is not UTF-8 text", clip(&column)));
                    cells.push(String::from_utf8_lossy(e.as_bytes()).into_owned());
                }
            }
        }
        Some(GridRow { line, cells, error })
    });
    Ok((head, Box::new(rows)))
}

/// The CSV text with comment lines (starting with '#') and empty lines left out between
/// records, as the csv reader would skip them, noting the file line on which each record
/// starts (a quoted field may span lines): the csv crate's own positions skip those lines,
/// so rows are numbered by this. Reads a line at a time.
struct RecordLines<'a> {
    inner: Box<dyn BufRead + 'a>,
    buf: Vec<u8>,
    pos: usize,
    /// File lines read so far.
    line: u64,
    /// Whether the text read so far ends inside a quoted field.
    quoted: bool,
    /// The file line of each record start not yet taken.
    starts: std::rc::Rc<std::cell::RefCell<std::collections::VecDeque<u64>>>,
}

impl Read for RecordLines<'_> {
    fn read(&mut self, out: &mut [u8]) -> std::io::Result<usize> {
        while self.pos >= self.buf.len() {
            self.buf.clear();
            self.pos = 0;
            if self.inner.read_until(b'\n', &mut self.buf)? == 0 {
                return Ok(0);
            }
            self.line += 1;
            if !self.quoted {
                let content = self.buf.strip_suffix(b"\n").unwrap_or(&self.buf);
                let content = content.strip_suffix(b"\r").unwrap_or(content);
                if content.is_empty() || content[0] == b'#' {
                    self.buf.clear();
                    continue;
                }
                self.starts.borrow_mut().push_back(self.line);
            }
            let quotes = self.buf.iter().filter(|&&b| b == b'"').count();
            if quotes % 2 == 1 {
                self.quoted = !self.quoted;
            }
        }
        let n = out.len().min(self.buf.len() - self.pos);
        out[..n].copy_from_slice(&self.buf[self.pos..self.pos + n]);
        self.pos += n;
        Ok(n)
    }
}

/// Whether CSV bytes are semicolon-separated: the first line that is not blank or a comment
/// holds more semicolons than commas (outside quotes).
fn semicolon_separated(bytes: &[u8]) -> bool {
    let text = String::from_utf8_lossy(&bytes[..bytes.len().min(64 * 1024)]);
    let Some(line) = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
    else {
        return false;
    };
    let (mut semi, mut comma, mut quoted) = (0, 0, false);
    for ch in line.chars() {
        match ch {
            '"' => quoted = !quoted,
            ';' if !quoted => semi += 1,
            ',' if !quoted => comma += 1,
            _ => {}
        }
    }
    semi > comma
}

/// A cell of a semicolon-separated file with its decimal commas made points: each item (a
/// list cell's items are separated by ';' inside quotes) that is a number with a decimal
/// comma, alone or followed by a unit ("65,5 degC"). Text such as "1,3-butadiene" is left.
fn decimal_points(cell: &str) -> String {
    cell.split(';').map(decimal_point).collect::<Vec<_>>().join(";")
}

fn decimal_point(item: &str) -> String {
    let t = item.trim();
    let end = t.find(char::is_whitespace).unwrap_or(t.len());
    let (number, rest) = t.split_at(end);
    if number.matches(',').count() == 1 && !number.contains('.') {
        let candidate = number.replacen(',', ".", 1);
        let digits_around = number.split(',').all(|part| {
            part.trim_start_matches(['-', '+'])
                .chars()
                .next()
                .is_some_and(|c| c.is_ascii_digit())
        });
        if digits_around && candidate.parse::<f64>().is_ok() {
            return format!("{candidate}{rest}");
        }
    }
    item.to_string()
}

/// The header and rows of a workbook's sheet.
fn workbook_grid(name: &str, bytes: &[u8], sheet: Option<&str>) -> CliResult<(Vec<String>, Vec<GridRow>)> {
    use calamine::{Data, Reader};
    let mut book = calamine::open_workbook_auto_from_rs(std::io::Cursor::new(bytes.to_vec()))
        .map_err(|e| CliError::new(format!("{name}: cannot read the workbook: {e}")))?;
    let names = book.sheet_names();
    let chosen = match sheet {
        Some(s) => names
            .iter()
            .find(|n| n.as_str() == s)
            .or_else(|| names.iter().find(|n| n.eq_ignore_ascii_case(s)))
            .cloned()
            .ok_or_else(|| {
                CliError::new(format!(
                    "--sheet: '{}' is not a sheet of {name} (its sheets: {})",
                    clip(s),
                    names.join(", ")
                ))
            })?,
        None => names
            .first()
            .cloned()
            .ok_or_else(|| CliError::new(format!("{name}: the workbook has no sheets")))?,
    };
    let range = book
        .worksheet_range(&chosen)
        .map_err(|e| CliError::new(format!("{name}: sheet '{chosen}': {e}")))?;
    let first_row = range.start().map_or(0, |(r, _)| u64::from(r));
    let first_col = range.start().map_or(0, |(_, c)| c as usize);
    let text = |d: &Data| -> Result<String, String> {
        Ok(match d {
            Data::Empty => String::new(),
            Data::String(s) => s.clone(),
            Data::Float(f) => format!("{f}"),
            Data::Int(i) => i.to_string(),
            Data::Bool(b) => b.to_string(),
            Data::DateTimeIso(s) | Data::DurationIso(s) => s.clone(),
            Data::DateTime(d) => format!("{}", d.as_f64()),
            Data::Error(e) => return Err(format!("the cell holds the spreadsheet error {e}")),
        })
    };
    let mut header: Option<Vec<String>> = None;
    let mut rows = Vec::new();
    for (i, row) in range.rows().enumerate() {
        let line = first_row + i as u64 + 1;
        let mut cells = vec![String::new(); first_col];
        let mut error = None;
        for (j, d) in row.iter().enumerate() {
            match text(d) {
                Ok(s) => cells.push(s.trim().to_string()),
                Err(e) => {
                    error.get_or_insert(format!("column #{}: {e}", first_col + j + 1));
                    cells.push(String::new());
                }
            }
        }
        // Trailing empty cells are not columns.
        while cells.last().is_some_and(String::is_empty) {
            cells.pop();
        }
        if cells.is_empty() || cells[0].starts_with('#') {
            continue;
        }
        match &header {
            None => {
                if let Some(e) = error {
                    bail!("{name}: sheet '{chosen}': the header row {line}: {e}");
                }
                header = Some(cells);
            }
            Some(h) => {
                // Cells past the header's columns that are empty were trimmed above; pad the
                // others out to the header's width.
                if cells.len() < h.len() {
                    cells.resize(h.len(), String::new());
                }
                rows.push(GridRow { line, cells, error });
            }
        }
    }
    let header = header.ok_or_else(|| CliError::new(format!("{name}: sheet '{chosen}': {NO_HEADER}")))?;
    Ok((header, rows))
}

/// Keys whose cells are always text.
const TEXT_KEYS: &[&str] = &["note", "components", "path", "phase", "vapour_model"];

/// One cell item as a JSON value: a number where it is one (with the column's unit
/// appended when there is one), text otherwise.
fn item(text: &str, unit: Option<&str>, as_text: bool) -> Value {
    let text = text.trim();
    if as_text {
        return Value::String(text.to_string());
    }
    match text.parse::<f64>() {
        Ok(x) if x.is_finite() => match unit {
            Some(u) => Value::String(format!("{text} {u}")),
            None => serde_json::Number::from_f64(x).map_or_else(|| Value::String(text.to_string()), Value::Number),
        },
        // Text, a unit of its own, or NaN: left as text for the case parser to judge.
        _ => Value::String(text.to_string()),
    }
}

/// The case object of a row: every field column with a non-empty cell.
pub fn case_value(columns: &[Column], cells: &[String]) -> CliResult<Value> {
    let mut root = Map::new();
    for (col, cell) in columns.iter().zip(cells) {
        let Role::Field(path) = &col.role else {
            continue;
        };
        if cell.trim().is_empty() {
            continue;
        }
        let last = path.last().map_or("", String::as_str);
        let as_text = TEXT_KEYS.contains(&last);
        let value = if path.len() == 1 && LIST_KEYS.contains(&last) {
            let mut items = Vec::new();
            for (i, part) in cell.split(';').enumerate() {
                if part.trim().is_empty() {
                    bail!(
                        "{}[{i}]: empty list item in '{cell}' (separate items with ';')",
                        col.name
                    );
                }
                items.push(item(part, col.unit.as_deref(), as_text));
            }
            Value::Array(items)
        } else {
            item(cell, col.unit.as_deref(), as_text)
        };
        let mut map = &mut root;
        for seg in &path[..path.len() - 1] {
            let entry = map.entry(seg.clone()).or_insert_with(|| Value::Object(Map::new()));
            map = match entry {
                Value::Object(m) => m,
                _ => bail!(
                    "column '{}': '{seg}' is given both as a value and as an object",
                    col.header
                ),
            };
        }
        map.insert(last.to_string(), value);
    }
    Ok(Value::Object(root))
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn headers() {
        assert_eq!(
            split_header(" T [degC] ").unwrap(),
            ("T".to_string(), Some("degC".to_string()))
        );
        assert_eq!(split_header("z").unwrap(), ("z".to_string(), None));
        assert!(split_header("T [degC").is_err());
        assert!(column("inlet.Temp").unwrap_err().message().contains("inlet.T"));
        assert!(column("Temp").unwrap_err().message().contains("'T'"));
        assert_eq!(
            column("expect.x.benzene").unwrap().role,
            Role::Expect("x.benzene".into())
        );
    }

    #[test]
    fn rows_become_cases() {
        let text =
            "# invented\ncommand,components,z,T [degC],inlet.P [bar],note\nflash,benzene;toluene,0.5;0.5,80,1,12\n";
        let sheet = read("t.csv", text.as_bytes(), None).unwrap();
        assert_eq!(sheet.rows.len(), 1);
        assert_eq!(sheet.rows[0].line, 3);
        let v = case_value(&sheet.columns, &sheet.rows[0].cells).unwrap();
        assert_eq!(
            v,
            json!({"components": ["benzene", "toluene"], "z": [0.5, 0.5], "T": "80 degC",
                   "inlet": {"P": "1 bar"}, "note": "12"})
        );
    }

    #[test]
    fn bad_rows_are_kept() {
        let text = "command,z\nflash,1\nflash,1,2\n";
        let sheet = read("t.csv", text.as_bytes(), None).unwrap();
        assert_eq!(sheet.rows.len(), 2);
        assert!(sheet.rows[1].error.is_some());
    }
}
