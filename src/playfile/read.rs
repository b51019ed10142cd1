//! Reading one play file (CSV or Parquet) into our columns with polars,
//! after header checks (missing, duplicated columns) and a UTF-8 check that
//! can name the row: a Parquet column of a number or true/false type as it
//! is, every other column as text. Listing the files of a folder; the data
//! fingerprint. Columns beyond ours are kept as the staff's tags.

use super::report::{Issue, IssueKind};
use crate::numfmt::thousands as group;
use super::{FileFormat, COLUMNS};
use polars::prelude::*;
use sha2::{Digest, Sha256};
use std::io::Cursor;
use std::path::{Path, PathBuf};

/// One file's columns in `COLUMNS` order (`None` when an optional column
/// is absent from the file): text, or a Parquet column already of a number
/// or true/false type, kept as read (no text in between).
pub struct RawTable {
    pub file: String,
    pub height: usize,
    pub columns: Vec<Option<RawColumn>>,
    /// Columns beyond ours (the staff's tags): their header name and text.
    pub tags: Vec<(String, StringChunked)>,
    /// Read through a mapping: what the messages call each of our columns
    /// (their column's name) and what the mapping could not read.
    pub mapped: Option<Mapped>,
}

/// One of our columns as read.
pub enum RawColumn {
    /// CSV, a name column, a mapped layout, any type not read directly.
    Text(StringChunked),
    Int32(Int32Chunked),
    Int64(Int64Chunked),
    Float64(Float64Chunked),
    Bool(BooleanChunked),
}

impl From<StringChunked> for RawColumn {
    fn from(c: StringChunked) -> RawColumn {
        RawColumn::Text(c)
    }
}

/// One non-empty cell as read (text trimmed).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Cell<'a> {
    Text(&'a str),
    Int(i64),
    Float(f64),
    Bool(bool),
}

/// What reading through a mapping adds to a table.
#[derive(Default)]
pub struct Mapped {
    /// Their name for each of our columns, in `COLUMNS` order.
    pub labels: Vec<String>,
    /// Cells the mapping could not read, in row order (already reported:
    /// the cell checks stay quiet about them).
    pub issues: Vec<Issue>,
    pub failed: std::collections::HashSet<(usize, usize)>,
}

impl RawTable {
    /// The cell at (`row`, column index into `COLUMNS`); `None` when empty
    /// or null. Text is trimmed.
    #[inline]
    pub fn value(&self, col: usize, row: usize) -> Option<Cell<'_>> {
        match self.columns.get(col)?.as_ref()? {
            RawColumn::Text(c) => {
                let v = c.get(row)?.trim();
                (!v.is_empty()).then_some(Cell::Text(v))
            }
            RawColumn::Int32(c) => c.get(row).map(|x| Cell::Int(x.into())),
            RawColumn::Int64(c) => c.get(row).map(Cell::Int),
            RawColumn::Float64(c) => c.get(row).map(Cell::Float),
            RawColumn::Bool(c) => c.get(row).map(Cell::Bool),
        }
    }
    /// The cell as text, trimmed, as it reads when the column is cast to
    /// text (numbers as polars writes them); `None` when empty or null.
    pub fn text(&self, col: usize, row: usize) -> Option<std::borrow::Cow<'_, str>> {
        use std::borrow::Cow;
        Some(match self.value(col, row)? {
            Cell::Text(v) => Cow::Borrowed(v),
            Cell::Int(x) => Cow::Owned(x.to_string()),
            Cell::Bool(b) => Cow::Borrowed(if b { "true" } else { "false" }),
            Cell::Float(x) => {
                let one = match self.columns[col].as_ref() {
                    Some(RawColumn::Float64(c)) => c.slice(row as i64, 1).cast(&DataType::String).ok(),
                    _ => None,
                };
                let text = one.as_ref().and_then(|s| s.str().ok()).and_then(|s| s.get(0)).map(|v| v.trim().to_string());
                Cow::Owned(text.unwrap_or_else(|| x.to_string()))
            }
        })
    }
    /// What messages call column `col`: `column ball_on`, or through a
    /// mapping `their column YardLn`.
    pub fn label(&self, col: usize) -> String {
        match self.mapped.as_ref().and_then(|m| m.labels.get(col)) {
            Some(l) => format!("their column {l}"),
            None => format!("column {}", COLUMNS[col].name),
        }
    }
    /// Did the mapping already report this cell?
    pub fn failed(&self, col: usize, row: usize) -> bool {
        self.mapped.as_ref().is_some_and(|m| m.failed.contains(&(row, col)))
    }
}

/// The play files a path stands for: the file itself, or every `.csv` and
/// `.parquet` file directly inside a folder, sorted by name.
pub fn list_files(path: &Path) -> Result<Vec<PathBuf>, Issue> {
    let meta = std::fs::metadata(path).map_err(|e| {
        Issue::file(path, IssueKind::Unreadable, format!("cannot open: {e}"))
    })?;
    if !meta.is_dir() {
        return Ok(vec![path.to_path_buf()]);
    }
    let entries = std::fs::read_dir(path)
        .map_err(|e| Issue::file(path, IssueKind::Unreadable, format!("cannot list folder: {e}")))?;
    let mut files: Vec<PathBuf> = entries
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.is_file() && FileFormat::from_path(p).is_ok())
        .collect();
    files.sort();
    if files.is_empty() {
        return Err(Issue::file(
            path,
            IssueKind::Unreadable,
            "folder holds no .csv or .parquet file".to_string(),
        ));
    }
    Ok(files)
}

/// Hex SHA-256 over each file's name and bytes (first 16 hex digits): the
/// key for cached models and what the pages show as the data fingerprint.
pub fn fingerprint(files: &[(String, Vec<u8>)]) -> String {
    let mut h = Sha256::new();
    for (name, bytes) in files {
        h.update(name.as_bytes());
        h.update((bytes.len() as u64).to_le_bytes());
        h.update(bytes);
    }
    let digest = h.finalize();
    digest.iter().take(8).map(|b| format!("{b:02x}")).collect()
}

/// Parse the bytes of one file. `name` is what messages call it.
pub fn read_table(name: &str, path: &Path, bytes: &[u8]) -> Result<RawTable, Vec<Issue>> {
    let format = FileFormat::from_path(path).map_err(|e| vec![Issue::named(name, IssueKind::Unreadable, e.to_string())])?;
    // polars is well behaved on our inputs, but a reader must never take the
    // server down: a panic inside it becomes a file error.
    let result = std::panic::catch_unwind(|| match format {
        FileFormat::Csv => read_csv(name, bytes),
        FileFormat::Parquet => read_parquet(name, bytes),
    });
    match result {
        Ok(r) => r,
        Err(_) => Err(vec![Issue::named(
            name,
            IssueKind::Unreadable,
            "the file could not be parsed (reader failed)".to_string(),
        )]),
    }
}

/// Parse the bytes of one file into a frame of text columns, every column
/// kept (for reading through a mapping); header names checked for duplicates.
pub fn read_frame(name: &str, path: &Path, bytes: &[u8]) -> Result<DataFrame, Vec<Issue>> {
    let format = FileFormat::from_path(path).map_err(|e| vec![Issue::named(name, IssueKind::Unreadable, e.to_string())])?;
    let result = std::panic::catch_unwind(|| match format {
        FileFormat::Csv => csv_frame(name, bytes),
        FileFormat::Parquet => parquet_frame(name, bytes),
    });
    match result {
        Ok(r) => r,
        Err(_) => Err(vec![Issue::named(name, IssueKind::Unreadable, "the file could not be parsed (reader failed)".to_string())]),
    }
}

fn read_csv(name: &str, bytes: &[u8]) -> Result<RawTable, Vec<Issue>> {
    let df = csv_frame(name, bytes)?;
    let header: Vec<String> = df.get_column_names().iter().map(|s| s.to_string()).collect();
    check_required(name, &header)?;
    to_table(name, df)
}

fn csv_frame(name: &str, bytes: &[u8]) -> Result<DataFrame, Vec<Issue>> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    if let Err(e) = std::str::from_utf8(bytes) {
        let at = e.valid_up_to();
        let line = bytes[..at].iter().filter(|&&b| b == b'\n').count();
        let msg = if line == 0 {
            "the header is not valid UTF-8 text".to_string()
        } else {
            format!("row {}: not valid UTF-8 text (byte {}); expected a UTF-8 CSV file", group(line), at)
        };
        return Err(vec![Issue::named(name, IssueKind::Unreadable, msg)]);
    }
    let text = std::str::from_utf8(bytes).unwrap_or_default();
    let header_line = text.lines().next().unwrap_or("");
    if header_line.trim().is_empty() {
        return Err(vec![Issue::named(name, IssueKind::Empty, "the file is empty; expected a header row naming the columns".into())]);
    }
    let header: Vec<String> = split_header(header_line);
    check_duplicates(name, &header)?;
    let opts = CsvReadOptions::default()
        .with_has_header(true)
        .with_infer_schema_length(Some(0))
        .with_raise_if_empty(false);
    let df = opts
        .into_reader_with_file_handle(Cursor::new(bytes.to_vec()))
        .finish()
        .map_err(|e| vec![Issue::named(name, IssueKind::Unreadable, format!("not a readable CSV file: {}", first_line(&e.to_string())))])?;
    Ok(df)
}

fn read_parquet(name: &str, bytes: &[u8]) -> Result<RawTable, Vec<Issue>> {
    let df = parquet_frame(name, bytes)?;
    let header: Vec<String> = df.get_column_names().iter().map(|s| s.to_string()).collect();
    check_required(name, &header)?;
    to_table(name, df)
}

fn parquet_frame(name: &str, bytes: &[u8]) -> Result<DataFrame, Vec<Issue>> {
    let df = ParquetReader::new(Cursor::new(bytes.to_vec()))
        .finish()
        .map_err(|e| vec![Issue::named(name, IssueKind::Unreadable, format!("not a readable Parquet file: {}", first_line(&e.to_string())))])?;
    let header: Vec<String> = df.get_column_names().iter().map(|s| s.to_string()).collect();
    check_duplicates(name, &header)?;
    Ok(df)
}

fn first_line(s: &str) -> &str {
    s.lines().next().unwrap_or(s)
}

/// Split a CSV header line on commas, honouring double quotes.
fn split_header(line: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quoted = false;
    for ch in line.trim_end_matches('\r').chars() {
        match ch {
            '"' => quoted = !quoted,
            ',' if !quoted => out.push(std::mem::take(&mut cur)),
            c => cur.push(c),
        }
    }
    out.push(cur);
    out.into_iter().map(|s| s.trim().to_string()).collect()
}

fn check_duplicates(name: &str, header: &[String]) -> Result<(), Vec<Issue>> {
    let mut issues = Vec::new();
    let mut seen = std::collections::HashSet::new();
    for h in header {
        if !seen.insert(h.as_str()) {
            issues.push(Issue::column(name, h, IssueKind::DuplicateColumn, format!("column {h} appears more than once; expected each column once")));
        }
    }
    if issues.is_empty() {
        Ok(())
    } else {
        Err(issues)
    }
}

fn check_required(name: &str, header: &[String]) -> Result<(), Vec<Issue>> {
    let mut issues = Vec::new();
    for spec in COLUMNS.iter().filter(|c| c.required) {
        if !header.iter().any(|h| h == spec.name) {
            issues.push(Issue::column(name, spec.name, IssueKind::MissingColumn, format!("column {} is missing; expected it in the header", spec.name)));
        }
    }
    if issues.is_empty() {
        Ok(())
    } else {
        Err(issues)
    }
}

/// Our columns always read as text: names, the kind of snap.
const TEXT_COLUMNS: [&str; 7] = ["game", "home", "away", "offense", "defense", "kind", "passer"];

fn to_table(name: &str, df: DataFrame) -> Result<RawTable, Vec<Issue>> {
    let height = df.height();
    let mut columns = Vec::with_capacity(COLUMNS.len());
    for spec in COLUMNS {
        let Ok(col) = df.column(spec.name) else {
            columns.push(None);
            continue;
        };
        columns.push(Some(raw_column(name, spec.name, col)?));
    }
    let mut tags = Vec::new();
    for col in df.columns() {
        if COLUMNS.iter().any(|c| c.name == col.name().as_str()) {
            continue;
        }
        tags.push((col.name().to_string(), text_of(name, col)?));
    }
    Ok(RawTable { file: name.to_string(), height, columns, tags, mapped: None })
}

/// Our column `ours` as read: a number or true/false column of a Parquet
/// file as it is (the cell checks read its values directly), anything else
/// as text.
fn raw_column(name: &str, ours: &str, col: &Column) -> Result<RawColumn, Vec<Issue>> {
    // Kept in the reader's chunks (one per row group): a copy in one piece
    // would double the file's memory while the frame is alive.
    let as_is = match col.dtype() {
        DataType::String => col.str().ok().map(|c| RawColumn::Text(c.clone())),
        _ if TEXT_COLUMNS.contains(&ours) => None,
        DataType::Int32 => col.i32().ok().map(|c| RawColumn::Int32(c.clone())),
        DataType::Int64 => col.i64().ok().map(|c| RawColumn::Int64(c.clone())),
        DataType::Float64 => col.f64().ok().map(|c| RawColumn::Float64(c.clone())),
        DataType::Boolean => col.bool().ok().map(|c| RawColumn::Bool(c.clone())),
        _ => None,
    };
    match as_is {
        Some(c) => Ok(c),
        None => text_of(name, col).map(RawColumn::Text),
    }
}

/// A column as text (numbers written as polars writes them).
pub fn text_of(name: &str, col: &Column) -> Result<StringChunked, Vec<Issue>> {
    col.cast(&DataType::String)
        .and_then(|c| c.str().map(|s| s.rechunk().into_owned()))
        .map_err(|e| vec![Issue::column(name, col.name().as_str(), IssueKind::BadValue, format!("column {} cannot be read as text: {}", col.name(), first_line(&e.to_string())))])
}
