//! What loading found: each problem (`Issue`, `IssueKind`) with its file,
//! row and column, the totals and per-kind counts (`LoadReport`), the
//! coach-facing summary, and the error that carries a refused file's report.

use serde::Serialize;
use std::collections::BTreeMap;
use std::fmt;
use std::path::Path;
use crate::numfmt::thousands as group;

/// What sort of problem an issue is; the report counts issues per kind.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
pub enum IssueKind {
    Unreadable,
    Empty,
    MissingColumn,
    DuplicateColumn,
    BadValue,
    SeqNotIncreasing,
    PeriodBackwards,
    ClockBackwards,
    ScoreWentDown,
    GameMismatch,
}

impl IssueKind {
    pub fn label(self) -> &'static str {
        match self {
            IssueKind::Unreadable => "unreadable file",
            IssueKind::Empty => "empty file",
            IssueKind::MissingColumn => "missing column",
            IssueKind::DuplicateColumn => "duplicated column",
            IssueKind::BadValue => "bad value",
            IssueKind::SeqNotIncreasing => "seq not increasing",
            IssueKind::PeriodBackwards => "period going backwards",
            IssueKind::ClockBackwards => "clock running backwards",
            IssueKind::ScoreWentDown => "score going down",
            IssueKind::GameMismatch => "game details disagree",
        }
    }
}

/// One problem, with where it is. `Display` gives the coach-facing line,
/// e.g. `week7.csv row 1,204: column down is 6; expected 1-4 on a run snap`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Issue {
    pub file: String,
    /// 1-based data row (the header is not counted).
    pub row: Option<usize>,
    pub column: Option<String>,
    pub kind: IssueKind,
    pub message: String,
}

impl Issue {
    pub fn named(file: &str, kind: IssueKind, message: String) -> Issue {
        Issue { file: file.to_string(), row: None, column: None, kind, message }
    }
    pub fn file(path: &Path, kind: IssueKind, message: String) -> Issue {
        Issue::named(&path.display().to_string(), kind, message)
    }
    pub fn column(file: &str, column: &str, kind: IssueKind, message: String) -> Issue {
        Issue { file: file.to_string(), row: None, column: Some(column.to_string()), kind, message }
    }
}

impl fmt::Display for Issue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.row {
            Some(r) => write!(f, "{} row {}: {}", self.file, group(r), self.message),
            None => write!(f, "{}: {}", self.file, self.message),
        }
    }
}

#[derive(Debug, Clone, Copy)]
pub struct LoadOptions {
    /// Skip bad rows instead of refusing the file.
    pub lenient: bool,
}

impl Default for LoadOptions {
    fn default() -> Self {
        LoadOptions { lenient: false }
    }
}

/// How many issues a report keeps in full (all are counted).
pub const KEPT_ISSUES: usize = 1000;
/// How many a summary prints.
pub const LISTED_ISSUES: usize = 20;

/// What validation found.
#[derive(Debug, Clone, Default, Serialize)]
pub struct LoadReport {
    pub files: Vec<String>,
    pub rows_read: usize,
    pub rows_kept: usize,
    pub rows_skipped: usize,
    pub games: usize,
    /// The first `KEPT_ISSUES` issues in file order.
    pub issues: Vec<Issue>,
    pub issue_count: usize,
    /// Issue count per kind label.
    pub counts: BTreeMap<String, usize>,
    /// A file-level problem (unreadable, missing columns): nothing could load.
    pub fatal: bool,
}

impl LoadReport {
    pub(super) fn push(&mut self, issue: Issue) {
        *self.counts.entry(issue.kind.label().to_string()).or_default() += 1;
        self.issue_count += 1;
        if self.issues.len() < KEPT_ISSUES {
            self.issues.push(issue);
        }
    }
    pub fn has_errors(&self) -> bool {
        self.issue_count > 0
    }
    /// The printed report: totals, the first 20 issues, counts per kind.
    pub fn summary(&self, lenient: bool) -> String {
        let files = match self.files.len() {
            1 => "1 file".to_string(),
            n => format!("{n} files"),
        };
        let mut s = if self.issue_count > 0 && !(lenient && !self.fatal) {
            // Refused: no games were built, so say what was read and what was wrong.
            format!(
                "{files}, {} rows read; refused: {} problem(s); {} of the rows are fine{}\n",
                group(self.rows_read),
                group(self.issue_count),
                group(self.rows_kept),
                if self.fatal { "" } else { " (--lenient skips the others)" }
            )
        } else {
            format!("{files}, {} rows read, {} games, {} rows kept", group(self.rows_read), group(self.games), group(self.rows_kept))
        };
        if self.issue_count == 0 {
            s.push_str("; no problems found\n");
            return s;
        }
        if lenient && !self.fatal {
            s.push_str(&format!("; {} rows skipped\n", group(self.rows_skipped)));
        }
        for issue in self.issues.iter().take(LISTED_ISSUES) {
            s.push_str(&format!("  {issue}\n"));
        }
        if self.issue_count > LISTED_ISSUES {
            s.push_str(&format!("  ... and {} more\n", group(self.issue_count - LISTED_ISSUES)));
        }
        s.push_str("problems by kind:\n");
        for (k, n) in &self.counts {
            s.push_str(&format!("  {k}: {}\n", group(*n)));
        }
        s
    }
}


/// Loading failed: the report says why (print `report.summary`).
#[derive(Debug)]
pub struct LoadError {
    pub report: LoadReport,
}

impl fmt::Display for LoadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.report.summary(false))
    }
}
impl std::error::Error for LoadError {}
