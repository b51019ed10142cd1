//! The play file: reading it with polars (CSV or Parquet, a file or a
//! folder), validating it cell by cell and game by game, and writing rows
//! back out, in the column layout of `crate::layout`; a file in another
//! layout through a mapping (`mapping*.rs`). Produces `Plays`; knows
//! nothing about models, situations or HTTP.

mod at;
mod cells;
mod games;
mod load;
mod mapping;
mod mapping_apply;
mod mapping_draft;
mod mapping_values;
mod names;
mod read;
mod report;
mod write;

pub use load::{load, load_mapped, load_with, Loaded};
pub use mapping::{Mapping, MappingError, OffenseForm};
pub use mapping_draft::draft_mapping;
pub use mapping_values::{ClockForm, YardForm};
pub use read::{fingerprint, list_files, read_frame, read_table, Cell, Mapped, RawColumn, RawTable};
pub use report::{Issue, IssueKind, LoadError, LoadOptions, LoadReport, KEPT_ISSUES, LISTED_ISSUES};
pub use write::{rows_frame, write_frame, write_rows, FileFormat, WriteError};

// The column layout lives at the bottom of the crate (`plays` reads it too);
// these names keep their old paths.
pub use crate::layout::{format_clock, ColumnSpec, Kind, PlayRow, COLUMNS};
