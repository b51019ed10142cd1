//! Writing play rows (and scored frames) to CSV or Parquet with polars.

use super::{format_clock, PlayRow};
use polars::prelude::{Column, CsvWriter, DataFrame, ParquetCompression, ParquetWriter, SerWriter};
use std::path::Path;

/// Why rows or a frame could not be written.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    #[error("{0}: expected a .csv or .parquet file name")]
    Format(String),
    #[error("creating {path}: {source}")]
    Create { path: String, source: std::io::Error },
    #[error("building the play frame: {0}")]
    Frame(String),
    #[error("writing {path}: {message}")]
    Write { path: String, message: String },
}

type Result<T> = std::result::Result<T, WriteError>;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileFormat {
    Csv,
    Parquet,
}

impl FileFormat {
    /// From a path's extension: `.csv` or `.parquet` (anything else is an error).
    pub fn from_path(path: &Path) -> Result<FileFormat> {
        match path.extension().and_then(|e| e.to_str()).map(|e| e.to_ascii_lowercase()) {
            Some(e) if e == "csv" => Ok(FileFormat::Csv),
            Some(e) if e == "parquet" => Ok(FileFormat::Parquet),
            _ => Err(WriteError::Format(path.display().to_string())),
        }
    }
}

/// The rows as a polars frame with our column names, `clock` as `M:SS`.
pub fn rows_frame(rows: &[PlayRow]) -> Result<DataFrame> {
    fn s<T, F: Fn(&PlayRow) -> T>(rows: &[PlayRow], f: F) -> Vec<T> {
        rows.iter().map(f).collect()
    }
    let cols: Vec<Column> = vec![
        Column::new("game".into(), s(rows, |r| r.game.clone())),
        Column::new("season".into(), s(rows, |r| r.season)),
        Column::new("week".into(), s(rows, |r| r.week)),
        Column::new("home".into(), s(rows, |r| r.home.clone())),
        Column::new("away".into(), s(rows, |r| r.away.clone())),
        Column::new("seq".into(), s(rows, |r| r.seq)),
        Column::new("period".into(), s(rows, |r| r.period)),
        Column::new("clock".into(), s(rows, |r| format_clock(r.clock))),
        Column::new("offense".into(), s(rows, |r| r.offense.clone())),
        Column::new("defense".into(), s(rows, |r| r.defense.clone())),
        Column::new("off_score".into(), s(rows, |r| r.off_score)),
        Column::new("def_score".into(), s(rows, |r| r.def_score)),
        Column::new("off_timeouts".into(), s(rows, |r| r.off_timeouts)),
        Column::new("def_timeouts".into(), s(rows, |r| r.def_timeouts)),
        Column::new("down".into(), s(rows, |r| r.down)),
        Column::new("to_go".into(), s(rows, |r| r.to_go)),
        Column::new("ball_on".into(), s(rows, |r| r.ball_on)),
        Column::new("kind".into(), s(rows, |r| r.kind.as_str())),
        Column::new("passer".into(), s(rows, |r| r.passer.clone())),
        Column::new("complete".into(), s(rows, |r| r.complete)),
        Column::new("intercepted".into(), s(rows, |r| r.intercepted)),
        Column::new("air_yards".into(), s(rows, |r| r.air_yards)),
        Column::new("gain".into(), s(rows, |r| r.gain)),
        Column::new("fumble_lost".into(), s(rows, |r| r.fumble_lost)),
        Column::new("touchback".into(), s(rows, |r| r.touchback)),
        Column::new("points".into(), s(rows, |r| r.points)),
        Column::new("home_line".into(), s(rows, |r| r.home_line)),
    ];
    DataFrame::new(rows.len(), cols).map_err(|e| WriteError::Frame(e.to_string()))
}

/// Write rows to `path` (format from the extension). Never overwrites the
/// file the league was loaded from: callers pass an output path.
pub fn write_rows(rows: &[PlayRow], path: &Path) -> Result<()> {
    let mut df = rows_frame(rows)?;
    write_frame(&mut df, path)
}

pub fn write_frame(df: &mut DataFrame, path: &Path) -> Result<()> {
    let format = FileFormat::from_path(path)?;
    if let Some(dir) = path.parent() {
        if !dir.as_os_str().is_empty() {
            std::fs::create_dir_all(dir).map_err(|source| WriteError::Create { path: dir.display().to_string(), source })?;
        }
    }
    let file = std::fs::File::create(path).map_err(|source| WriteError::Create { path: path.display().to_string(), source })?;
    let failed = |e: polars::prelude::PolarsError| WriteError::Write { path: path.display().to_string(), message: e.to_string() };
    match format {
        FileFormat::Csv => {
            CsvWriter::new(file)
                .include_header(true)
                .finish(df)
                .map_err(failed)?;
        }
        FileFormat::Parquet => {
            ParquetWriter::new(file)
                .with_compression(ParquetCompression::Zstd(None))
                .finish(df)
                .map_err(failed)?;
        }
    }
    Ok(())
}
