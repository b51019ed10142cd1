//! Loading a play file or folder: list the files, read them, parse every
//! cell, check every game, build `Plays`. Strict mode refuses a file with
//! errors; lenient mode skips the bad rows and keeps every valid one. A file
//! in another layout is read through a `Mapping`.

use super::cells::parse_rows;
use super::games::check_games;
use super::mapping::Mapping;
use super::names::Names;
use super::read::{fingerprint, list_files, read_frame, read_table, RawTable};
use super::report::{Issue, IssueKind, LoadError, LoadOptions, LoadReport};
use crate::plays::{Plays, Snap, Source, Tags};
use rayon::prelude::*;
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
    let started = std::time::Instant::now();
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
    tracing::debug!("files read in {:.0} ms", started.elapsed().as_secs_f64() * 1000.0);
    if report.fatal {
        report.files = files.iter().map(|f| f.display().to_string()).collect();
        return Err(LoadError { report });
    }
    let loaded = load_with(tables, opts, report)?;
    Ok(Loaded { fingerprint, ..loaded })
}

/// Rows per piece of cell parsing handed to rayon (fixed, so the work is
/// cut the same way on every machine).
const PARSE_CHUNK: usize = 16_384;

/// Validate already-read tables (one per file).
pub fn load_with(mut tables: Vec<RawTable>, opts: &LoadOptions, mut report: LoadReport) -> Result<Loaded, LoadError> {
    let started = std::time::Instant::now();
    let ms = |t: std::time::Instant| t.elapsed().as_secs_f64() * 1000.0;
    report.files = tables.iter().map(|t| t.file.clone()).collect();
    let names = Names::build(&mut tables);
    tracing::debug!(names = names.list.len(), "names numbered in {:.0} ms", ms(started));
    let total: usize = tables.iter().map(|t| t.height).sum();
    let mut rows = vec![Snap::EMPTY; total];
    let mut ok = vec![false; total];
    let (mut rows_left, mut ok_left) = (rows.as_mut_slice(), ok.as_mut_slice());
    for (fi, t) in tables.iter().enumerate() {
        report.rows_read += t.height;
        let (rows_here, rest) = std::mem::take(&mut rows_left).split_at_mut(t.height);
        let (ok_here, ok_rest) = std::mem::take(&mut ok_left).split_at_mut(t.height);
        (rows_left, ok_left) = (rest, ok_rest);
        if t.height == 0 {
            report.push(Issue::named(&t.file, IssueKind::Empty, "the file has a header but no rows; expected one row per snap".into()));
            continue;
        }
        // Rows are independent here: parse pieces on rayon's threads, then
        // report in file order.
        let issues: Vec<Vec<Issue>> = rows_here
            .par_chunks_mut(PARSE_CHUNK)
            .zip(ok_here.par_chunks_mut(PARSE_CHUNK))
            .enumerate()
            .map(|(k, (out, good))| parse_rows(t, fi, &names, k * PARSE_CHUNK, out, good))
            .collect();
        for i in issues.into_iter().flatten() {
            report.push(i);
        }
    }
    tracing::debug!("cells checked in {:.0} ms", ms(started));
    let order = check_games(&rows, &ok, &names, &tables, &mut report);
    tracing::debug!("games checked in {:.0} ms", ms(started));
    drop(ok);
    report.rows_kept = order.len();
    report.rows_skipped = report.rows_read - order.len();
    if order.is_empty() && report.issue_count == 0 {
        report.push(Issue::named(report.files.first().map(String::as_str).unwrap_or("input"), IssueKind::Empty, "no snaps to load".into()));
    }
    if (report.has_errors() && !opts.lenient) || order.is_empty() {
        if order.is_empty() {
            report.fatal = true;
        }
        return Err(LoadError { report });
    }
    let tags = gather_tags(&tables, order.iter().map(|&i| &rows[i as usize].source));
    // The file's columns are no longer needed.
    drop(tables);
    let name_refs: Vec<&str> = names.list.iter().map(String::as_str).collect();
    let mut plays = Plays::from_snaps(report.files.clone(), &name_refs, &rows, &order);
    drop(rows);
    plays.tags = tags;
    report.games = plays.games.len();
    tracing::debug!("plays built in {:.0} ms", ms(started));
    Ok(Loaded { plays, report, fingerprint: String::new() })
}

/// The staff's tag columns of every file, per kept snap (a tag one file
/// lacks is empty on its snaps).
fn gather_tags<'s>(tables: &[RawTable], sources: impl Iterator<Item = &'s Source> + Clone) -> Tags {
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
                .clone()
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

#[cfg(test)]
mod tests;
