//! Loading a play file or folder: list the files, read them, parse every
//! cell, check every game, build `Plays`. Strict mode refuses a file with
//! errors; lenient mode skips the bad rows and keeps every valid one. A file
//! in another layout is read through a `Mapping`.

use super::cells::parse_rows;
use super::games::check_games;
use super::mapping::Mapping;
use super::read::{fingerprint, list_files, read_frame, read_table, RawTable};
use super::report::{Issue, IssueKind, LoadError, LoadOptions, LoadReport};
use super::PlayRow;
use crate::plays::{Plays, Source, Tags};
use std::path::Path;

/// A loaded, validated league.
pub struct Loaded {
    pub plays: Plays,
    pub report: LoadReport,
    pub fingerprint: String,
}

/// Load and validate a play file or folder in our layout.
pub fn load(path: &Path, opts: &LoadOptions) -> Result<Loaded, LoadError> {
    load_mapped(path, opts, None)
}

/// Load and validate a play file or folder, read through `mapping` when
/// it is in another layout (the mapping's text joins the fingerprint).
pub fn load_mapped(path: &Path, opts: &LoadOptions, mapping: Option<&Mapping>) -> Result<Loaded, LoadError> {
    let mut report = LoadReport::default();
    let files = match list_files(path) {
        Ok(f) => f,
        Err(issue) => {
            report.push(issue);
            report.fatal = true;
            return Err(LoadError { report });
        }
    };
    let mut contents = Vec::new();
    for f in &files {
        let name = f.file_name().map(|n| n.to_string_lossy().to_string()).unwrap_or_else(|| f.display().to_string());
        match std::fs::read(f) {
            Ok(bytes) => contents.push((name, f.clone(), bytes)),
            Err(e) => {
                report.push(Issue::named(&name, IssueKind::Unreadable, format!("cannot read: {e}")));
                report.fatal = true;
            }
        }
    }
    if report.fatal {
        return Err(LoadError { report });
    }
    let mut fp_input: Vec<(String, Vec<u8>)> = contents.iter().map(|(n, _, b)| (n.clone(), b.clone())).collect();
    if let Some(m) = mapping {
        fp_input.push(("mapping".to_string(), m.text.clone().into_bytes()));
    }
    let fingerprint = fingerprint(&fp_input);
    drop(fp_input);
    let mut tables = Vec::new();
    for (name, path, bytes) in &contents {
        let table = match mapping {
            None => read_table(name, path, bytes),
            Some(m) => read_frame(name, path, bytes).and_then(|df| super::mapping_apply::translate(m, name, &df)),
        };
        match table {
            Ok(t) => tables.push(t),
            Err(issues) => {
                for i in issues {
                    report.push(i);
                }
                report.fatal = true;
            }
        }
    }
    drop(contents);
    if report.fatal {
        report.files = files.iter().map(|f| f.display().to_string()).collect();
        return Err(LoadError { report });
    }
    let loaded = load_with(tables, opts, report)?;
    Ok(Loaded { fingerprint, ..loaded })
}

/// Validate already-read tables (one per file).
pub fn load_with(tables: Vec<RawTable>, opts: &LoadOptions, mut report: LoadReport) -> Result<Loaded, LoadError> {
    report.files = tables.iter().map(|t| t.file.clone()).collect();
    let mut rows: Vec<(PlayRow, Source)> = Vec::new();
    for (fi, t) in tables.iter().enumerate() {
        report.rows_read += t.height;
        if t.height == 0 {
            report.push(Issue::named(&t.file, IssueKind::Empty, "the file has a header but no rows; expected one row per snap".into()));
            continue;
        }
        // Rows are independent here: parse the two halves on rayon's
        // threads, then keep file order.
        let mid = t.height / 2;
        let (first, second) = rayon::join(|| parse_rows(t, fi, 0..mid), || parse_rows(t, fi, mid..t.height));
        for (ok, issues) in [first, second] {
            rows.extend(ok);
            for i in issues {
                report.push(i);
            }
        }
    }
    let rows = check_games(rows, &tables, &mut report);
    report.rows_kept = rows.len();
    report.rows_skipped = report.rows_read - rows.len();
    if rows.is_empty() && report.issue_count == 0 {
        report.push(Issue::named(report.files.first().map(String::as_str).unwrap_or("input"), IssueKind::Empty, "no snaps to load".into()));
    }
    if (report.has_errors() && !opts.lenient) || rows.is_empty() {
        if rows.is_empty() {
            report.fatal = true;
        }
        return Err(LoadError { report });
    }
    let (rows, sources): (Vec<PlayRow>, Vec<Source>) = rows.into_iter().unzip();
    let mut plays = Plays::from_rows(report.files.clone(), &rows, sources);
    plays.tags = gather_tags(&tables, &plays.source);
    report.games = plays.games.len();
    Ok(Loaded { plays, report, fingerprint: String::new() })
}

/// The staff's tag columns of every file, per kept snap (a tag one file
/// lacks is empty on its snaps).
fn gather_tags(tables: &[RawTable], sources: &[Source]) -> Tags {
    let mut names: Vec<String> = Vec::new();
    for t in tables {
        for (n, _) in &t.tags {
            if !names.contains(n) {
                names.push(n.clone());
            }
        }
    }
    let cells = names
        .iter()
        .map(|n| {
            let cols: Vec<Option<&polars::prelude::StringChunked>> = tables.iter().map(|t| t.tags.iter().find(|(x, _)| x == n).map(|(_, c)| c)).collect();
            sources
                .iter()
                .map(|s| {
                    let c = cols.get(s.file as usize).copied().flatten()?;
                    let v = c.get((s.row as usize).checked_sub(1)?)?.trim();
                    (!v.is_empty()).then_some(v)
                })
                .collect::<Vec<Option<&str>>>()
        })
        .collect::<Vec<_>>();
    Tags::build(&names, &cells)
}
