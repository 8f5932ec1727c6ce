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
use serde_json::{Map, Value};

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

/// Reads a spreadsheet from CSV bytes. `name` is used in messages.
///
/// # Errors
/// A file-level problem: no header, a bad or repeated column name. A row that cannot be
/// read is kept as a [`Row`] with an error, so the other rows still run.
pub fn read(name: &str, bytes: &[u8]) -> CliResult<Sheet> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF".as_slice()).unwrap_or(bytes);
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .from_reader(bytes);
    let mut records = reader.byte_records();
    let header = loop {
        match records.next() {
            None => {
                bail!("{name}: no header line (expected column names such as 'command,components,z,T [degC],P [bar]')")
            }
            Some(Err(e)) => bail!("{name}: cannot read the header: {e}"),
            Some(Ok(r)) if r.iter().all(|c| c.is_empty()) => continue,
            Some(Ok(r)) => break r,
        }
    };
    let mut columns: Vec<Column> = Vec::with_capacity(header.len());
    for cell in header.iter() {
        let text =
            std::str::from_utf8(cell).map_err(|_| CliError::new(format!("{name}: the header is not UTF-8 text")))?;
        let c = column(text).map_err(|e| e.context(name))?;
        if let Some(prev) = columns.iter().find(|p| p.name == c.name) {
            bail!("{name}: column '{}' repeats column '{}'", c.header, prev.header);
        }
        columns.push(c);
    }
    let mut rows = Vec::new();
    for rec in records {
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                let line = e.position().map_or(0, csv::Position::line);
                rows.push(Row {
                    line,
                    cells: Vec::new(),
                    error: Some(format!("cannot read the row: {e}")),
                });
                continue;
            }
        };
        let line = rec.position().map_or(0, csv::Position::line);
        if rec.iter().all(|c| c.is_empty()) {
            continue;
        }
        let mut error = None;
        let mut cells = Vec::with_capacity(rec.len());
        for (i, c) in rec.iter().enumerate() {
            match String::from_utf8(c.to_vec()) {
                Ok(s) => cells.push(s),
                Err(e) => {
                    let column = columns
                        .get(i)
                        .map_or_else(|| format!("#{}", i + 1), |c| c.header.clone());
                    error.get_or_insert(format!("column '{column}': the cell is not UTF-8 text"));
                    cells.push(String::from_utf8_lossy(e.as_bytes()).into_owned());
                }
            }
        }
        if rec.len() != columns.len() {
            error = Some(format!(
                "{} cells, but the header has {} columns",
                rec.len(),
                columns.len()
            ));
        }
        rows.push(Row { line, cells, error });
    }
    Ok(Sheet { columns, rows })
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
        let sheet = read("t.csv", text.as_bytes()).unwrap();
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
        let sheet = read("t.csv", text.as_bytes()).unwrap();
        assert_eq!(sheet.rows.len(), 2);
        assert!(sheet.rows[1].error.is_some());
    }
}
