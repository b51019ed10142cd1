//! Game checks: rows of one game compared across the file (same teams and
//! line on every row, `seq` increasing, periods in order, the clock not
//! running backwards, scores never going down). A row that breaks one is dropped.

use super::names::Names;
use super::read::RawTable;
use super::report::{Issue, IssueKind, LoadReport};
use crate::numfmt::thousands as group;
use super::{format_clock, COLUMNS};
use crate::plays::{Snap, Source};

/// Cross-row checks per game (in file order) over the rows of `rows` that
/// are `ok`. A row that breaks one is reported and dropped; later rows are
/// compared with the last kept row. Returns the kept rows (indices into
/// `rows`) sorted by season, week, game key and seq.
pub(super) fn check_games(rows: &[Snap], ok: &[bool], names: &Names, tables: &[RawTable], report: &mut LoadReport) -> Vec<u32> {
    // Group rows by game, keeping file order within a game.
    let mut group_of = vec![u32::MAX; names.list.len()];
    let mut groups: Vec<Vec<u32>> = Vec::new();
    for (i, row) in rows.iter().enumerate() {
        if !ok[i] {
            continue;
        }
        let Some(slot) = group_of.get_mut(row.game as usize) else { continue };
        if *slot == u32::MAX {
            *slot = groups.len() as u32;
            groups.push(Vec::new());
        }
        groups[*slot as usize].push(i as u32);
    }
    let mut kept_games: Vec<Vec<u32>> = Vec::with_capacity(groups.len());
    for members in groups {
        let mut kept: Vec<u32> = Vec::with_capacity(members.len());
        for i in members {
            let row = &rows[i as usize];
            let issue = kept.last().and_then(|&prev| compare(&rows[kept[0] as usize], &rows[prev as usize], row, names, tables));
            match issue {
                Some((kind, col, msg)) => {
                    let t = &tables[row.source.file as usize];
                    // Through a mapping, the message names their column.
                    let (column, message) = match t.mapped.as_ref().and_then(|m| COLUMNS.iter().position(|c| c.name == col).and_then(|ci| m.labels.get(ci))) {
                        Some(theirs) => (theirs.clone(), msg.replacen(&format!("column {col}"), &format!("their column {theirs}"), 1)),
                        None => (col.to_string(), msg),
                    };
                    report.push(Issue { file: t.file.clone(), row: Some(row.source.row as usize), column: Some(column), kind, message })
                }
                None => kept.push(i),
            }
        }
        if !kept.is_empty() {
            kept_games.push(kept);
        }
    }
    kept_games.sort_by(|a, b| {
        let (x, y) = (&rows[a[0] as usize], &rows[b[0] as usize]);
        (x.season, x.week, names.name(x.game)).cmp(&(y.season, y.week, names.name(y.game)))
    });
    kept_games.into_iter().flatten().collect()
}

fn where_(src: &Source, tables: &[RawTable], cur_file: u16) -> String {
    if src.file == cur_file {
        format!("row {}", group(src.row as usize))
    } else {
        format!("{} row {}", tables[src.file as usize].file, group(src.row as usize))
    }
}

fn home_scores(r: &Snap) -> (i32, i32) {
    if r.offense == r.home {
        (r.off_score, r.def_score)
    } else {
        (r.def_score, r.off_score)
    }
}

fn compare(first: &Snap, prev: &Snap, row: &Snap, names: &Names, tables: &[RawTable]) -> Option<(IssueKind, &'static str, String)> {
    let (fsrc, psrc, cur_file) = (&first.source, &prev.source, row.source.file);
    let g = names.name(row.game);
    let differs: Option<(&'static str, String, String)> = if first.season != row.season {
        Some(("season", first.season.to_string(), row.season.to_string()))
    } else if first.week != row.week {
        Some(("week", first.week.to_string(), row.week.to_string()))
    } else if first.home != row.home {
        Some(("home", names.name(first.home).to_string(), names.name(row.home).to_string()))
    } else if first.away != row.away {
        Some(("away", names.name(first.away).to_string(), names.name(row.away).to_string()))
    } else if first.home_line != row.home_line {
        let show = |v: Option<f64>| v.map(|x| x.to_string()).unwrap_or_else(|| "empty".into());
        Some(("home_line", show(first.home_line), show(row.home_line)))
    } else {
        None
    };
    if let Some((col, a, b)) = differs {
        return Some((
            IssueKind::GameMismatch,
            col,
            format!("column {col} is {b} but game {g} has {a} on {}; expected the same on every row of a game", where_(fsrc, tables, cur_file)),
        ));
    }
    if row.seq <= prev.seq {
        return Some((
            IssueKind::SeqNotIncreasing,
            "seq",
            format!("column seq is {} after {} on {}; expected seq to increase within game {g}", row.seq, prev.seq, where_(psrc, tables, cur_file)),
        ));
    }
    if row.period < prev.period {
        return Some((
            IssueKind::PeriodBackwards,
            "period",
            format!("column period is {} after {} on {}; expected periods in order within game {g}", row.period, prev.period, where_(psrc, tables, cur_file)),
        ));
    }
    if row.period == prev.period && row.clock > prev.clock {
        return Some((
            IssueKind::ClockBackwards,
            "clock",
            format!(
                "column clock is {} after {} on {}; expected the clock not to run backwards within period {}",
                format_clock(row.clock),
                format_clock(prev.clock),
                where_(psrc, tables, cur_file),
                row.period
            ),
        ));
    }
    let (ph, pa) = home_scores(prev);
    let (h, a) = home_scores(row);
    if h < ph || a < pa {
        let (col, now, before) = if (row.offense == row.home) == (h < ph) {
            ("off_score", row.off_score, if row.offense == prev.offense { prev.off_score } else { prev.def_score })
        } else {
            ("def_score", row.def_score, if row.defense == prev.defense { prev.def_score } else { prev.off_score })
        };
        return Some((
            IssueKind::ScoreWentDown,
            col,
            format!("column {col} is {now} but that team had {before} on {}; expected scores never to go down within game {g}", where_(psrc, tables, cur_file)),
        ));
    }
    None
}
