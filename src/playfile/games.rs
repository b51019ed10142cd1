//! Game checks: rows of one game compared across the file (same teams and
//! line on every row, `seq` increasing, periods in order, the clock not
//! running backwards, scores never going down). A row that breaks one is dropped.

use super::read::RawTable;
use super::report::{Issue, IssueKind, LoadReport};
use crate::numfmt::thousands as group;
use super::{format_clock, PlayRow, COLUMNS};
use crate::plays::Source;
use std::collections::HashMap;

/// Cross-row checks per game (in file order). A row that breaks one is
/// reported and dropped; later rows are compared with the last kept row.
/// Returns the kept rows sorted by season, week, game key and seq.
pub(super) fn check_games(rows: Vec<(PlayRow, Source)>, tables: &[RawTable], report: &mut LoadReport) -> Vec<(PlayRow, Source)> {
    // Group rows by game, keeping file order within a game. Rows of a game
    // usually come together, so the map is consulted only when the key changes.
    let mut index: HashMap<String, usize> = HashMap::new();
    let mut groups: Vec<Vec<(PlayRow, Source)>> = Vec::new();
    let mut last: Option<usize> = None;
    for (row, src) in rows {
        let g = match last {
            Some(g) if groups[g][0].0.game == row.game => g,
            _ => match index.get(&row.game) {
                Some(&g) => g,
                None => {
                    index.insert(row.game.clone(), groups.len());
                    groups.push(Vec::new());
                    groups.len() - 1
                }
            },
        };
        groups[g].push((row, src));
        last = Some(g);
    }
    let mut kept_games: Vec<Vec<(PlayRow, Source)>> = Vec::with_capacity(groups.len());
    for rows in groups {
        let mut kept: Vec<(PlayRow, Source)> = Vec::with_capacity(rows.len());
        for (row, src) in rows {
            let issue = kept.last().map(|(prev, psrc)| compare(&kept[0].0, &kept[0].1, prev, psrc, &row, src.file, tables)).unwrap_or(None);
            match issue {
                Some((kind, col, msg)) => {
                    let t = &tables[src.file as usize];
                    // Through a mapping, the message names their column.
                    let (column, message) = match t.mapped.as_ref().and_then(|m| COLUMNS.iter().position(|c| c.name == col).and_then(|ci| m.labels.get(ci))) {
                        Some(theirs) => (theirs.clone(), msg.replacen(&format!("column {col}"), &format!("their column {theirs}"), 1)),
                        None => (col.to_string(), msg),
                    };
                    report.push(Issue { file: t.file.clone(), row: Some(src.row as usize), column: Some(column), kind, message })
                }
                None => kept.push((row, src)),
            }
        }
        if !kept.is_empty() {
            kept_games.push(kept);
        }
    }
    kept_games.sort_by(|a, b| {
        let (x, y) = (&a[0].0, &b[0].0);
        (x.season, x.week, &x.game).cmp(&(y.season, y.week, &y.game))
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

fn home_scores(r: &PlayRow) -> (i32, i32) {
    if r.offense == r.home {
        (r.off_score, r.def_score)
    } else {
        (r.def_score, r.off_score)
    }
}

fn compare(
    first: &PlayRow,
    fsrc: &Source,
    prev: &PlayRow,
    psrc: &Source,
    row: &PlayRow,
    cur_file: u16,
    tables: &[RawTable],
) -> Option<(IssueKind, &'static str, String)> {
    let g = &row.game;
    let differs: Option<(&'static str, String, String)> = if first.season != row.season {
        Some(("season", first.season.to_string(), row.season.to_string()))
    } else if first.week != row.week {
        Some(("week", first.week.to_string(), row.week.to_string()))
    } else if first.home != row.home {
        Some(("home", first.home.clone(), row.home.clone()))
    } else if first.away != row.away {
        Some(("away", first.away.clone(), row.away.clone()))
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
