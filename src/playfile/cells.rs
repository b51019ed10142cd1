//! Cell parsing: every cell of a row against its column's rule, with a
//! coach-readable message for each bad one. Turns a row of text into a
//! `PlayRow` when every cell is valid.

use super::read::RawTable;
use super::report::{Issue, IssueKind};
use super::{Kind, PlayRow, COLUMNS};
use crate::plays::Source;

/// Parse rows `range` of one table: the valid rows, and every issue found.
pub(super) fn parse_rows(t: &RawTable, fi: usize, range: std::ops::Range<usize>) -> (Vec<(PlayRow, Source)>, Vec<Issue>) {
    let mut rows = Vec::with_capacity(range.len());
    let mut all = Vec::new();
    // What a mapping could not read in these rows, reported in row order.
    let pre: &[Issue] = t.mapped.as_ref().map(|m| m.issues.as_slice()).unwrap_or(&[]);
    let mut next_pre = pre.partition_point(|i| i.row.is_some_and(|x| x <= range.start));
    for r in range {
        let mut issues = Vec::new();
        let mut skip = false;
        while next_pre < pre.len() && pre[next_pre].row == Some(r + 1) {
            issues.push(pre[next_pre].clone());
            next_pre += 1;
            skip = true;
        }
        if let Some(row) = parse_row(t, r, &mut issues) {
            if issues.is_empty() && !skip {
                rows.push((row, Source { file: fi as u16, row: (r + 1) as u32 }));
            }
        }
        all.append(&mut issues);
    }
    (rows, all)
}

const C_GAME: usize = 0;
const C_SEASON: usize = 1;
const C_WEEK: usize = 2;
const C_HOME: usize = 3;
const C_AWAY: usize = 4;
const C_SEQ: usize = 5;
const C_PERIOD: usize = 6;
const C_CLOCK: usize = 7;
const C_OFFENSE: usize = 8;
const C_DEFENSE: usize = 9;
const C_OFF_SCORE: usize = 10;
const C_DEF_SCORE: usize = 11;
const C_OFF_TO: usize = 12;
const C_DEF_TO: usize = 13;
const C_DOWN: usize = 14;
const C_TO_GO: usize = 15;
const C_BALL_ON: usize = 16;
const C_KIND: usize = 17;
const C_PASSER: usize = 18;
const C_COMPLETE: usize = 19;
const C_INTERCEPTED: usize = 20;
const C_AIR: usize = 21;
const C_GAIN: usize = 22;
const C_FUMBLE: usize = 23;
const C_TOUCHBACK: usize = 24;
const C_POINTS: usize = 25;
const C_LINE: usize = 26;

struct Cells<'a> {
    t: &'a RawTable,
    row: usize,
    issues: &'a mut Vec<Issue>,
}

impl<'a> Cells<'a> {
    fn bad(&mut self, col: usize, value: &str, expected: &str) {
        if self.t.failed(col, self.row) {
            return;
        }
        let name = match self.t.mapped.as_ref().and_then(|m| m.labels.get(col)) {
            Some(theirs) => theirs.clone(),
            None => COLUMNS[col].name.to_string(),
        };
        self.issues.push(Issue {
            file: self.t.file.clone(),
            row: Some(self.row + 1),
            column: Some(name),
            kind: IssueKind::BadValue,
            message: format!("{} is {}; expected {expected}", self.t.label(col), show(value)),
        });
    }
    fn raw(&self, col: usize) -> Option<&'a str> {
        let t: &'a RawTable = self.t;
        t.cell(col, self.row)
    }
    fn text(&mut self, col: usize, required: bool) -> Option<String> {
        match self.raw(col) {
            Some(v) if v.chars().count() <= 200 => Some(v.to_string()),
            Some(v) => {
                let v = v.to_string();
                self.bad(col, &v, "text of at most 200 characters");
                None
            }
            None => {
                if required {
                    self.bad(col, "", "a value");
                }
                None
            }
        }
    }
    /// An integer in lo..=hi; `None` when empty (an error too if `required`).
    fn int(&mut self, col: usize, lo: i64, hi: i64, required: bool, expected: &str) -> Option<i32> {
        let Some(v) = self.raw(col) else {
            if required {
                self.bad(col, "", expected);
            }
            return None;
        };
        match parse_int(v) {
            Some(x) if x >= lo && x <= hi => Some(x as i32),
            _ => {
                self.bad(col, v, expected);
                None
            }
        }
    }
    fn boolean(&mut self, col: usize, required: bool, expected: &str) -> Option<bool> {
        let Some(v) = self.raw(col) else {
            if required {
                self.bad(col, "", expected);
            }
            return None;
        };
        const TRUE: [&str; 5] = ["true", "t", "1", "yes", "y"];
        const FALSE: [&str; 5] = ["false", "f", "0", "no", "n"];
        if TRUE.iter().any(|w| v.eq_ignore_ascii_case(w)) {
            Some(true)
        } else if FALSE.iter().any(|w| v.eq_ignore_ascii_case(w)) {
            Some(false)
        } else {
            self.bad(col, v, expected);
            None
        }
    }
}

fn show(v: &str) -> String {
    if v.is_empty() {
        "empty".to_string()
    } else {
        let short: String = v.chars().take(40).collect();
        if short.len() < v.len() {
            format!("{short}…")
        } else {
            short
        }
    }
}

fn parse_int(v: &str) -> Option<i64> {
    if let Ok(x) = v.parse::<i64>() {
        return Some(x);
    }
    // Parquet float columns read as "7.0".
    match v.parse::<f64>() {
        Ok(f) if f.is_finite() && f.fract() == 0.0 && f.abs() < 1e15 => Some(f as i64),
        _ => None,
    }
}

/// `M:SS` or whole seconds.
fn parse_clock(v: &str) -> Option<i64> {
    if let Some((m, s)) = v.split_once(':') {
        let m: i64 = m.trim().parse().ok()?;
        let s: i64 = s.trim().parse().ok()?;
        if (0..60).contains(&s) && (0..=15).contains(&m) {
            return Some(m * 60 + s);
        }
        return None;
    }
    parse_int(v)
}

fn parse_row(t: &RawTable, r: usize, issues: &mut Vec<Issue>) -> Option<PlayRow> {
    let mut c = Cells { t, row: r, issues };
    let game = c.text(C_GAME, true);
    let season = c.int(C_SEASON, 1, 9999, true, "a season year 1-9999");
    let week = c.int(C_WEEK, 1, 30, true, "a week 1-30");
    let home = c.text(C_HOME, true);
    let away = c.text(C_AWAY, true);
    let seq = c.int(C_SEQ, 0, 1_000_000, true, "a snap number 0-1,000,000");
    let period = c.int(C_PERIOD, 1, 9, true, "a period 1-9 (5 and up is overtime)");
    let clock = match c.raw(C_CLOCK).map(str::to_string) {
        None => {
            c.bad(C_CLOCK, "", "M:SS or whole seconds 0-900");
            None
        }
        Some(v) => match parse_clock(&v) {
            Some(s) if (0..=900).contains(&s) => Some(s as i32),
            _ => {
                c.bad(C_CLOCK, &v, "M:SS or whole seconds 0-900");
                None
            }
        },
    };
    let offense = c.text(C_OFFENSE, true);
    let defense = c.text(C_DEFENSE, true);
    let off_score = c.int(C_OFF_SCORE, 0, 300, true, "points 0-300");
    let def_score = c.int(C_DEF_SCORE, 0, 300, true, "points 0-300");
    let off_timeouts = c.int(C_OFF_TO, 0, 3, true, "0-3");
    let def_timeouts = c.int(C_DEF_TO, 0, 3, true, "0-3");
    let kind_raw = c.raw(C_KIND).map(str::to_string);
    let kind = match kind_raw.as_deref().and_then(|k| Kind::parse(&k.to_ascii_lowercase())) {
        Some(k) => Some(k),
        None => {
            let v = kind_raw.clone().unwrap_or_default();
            c.bad(C_KIND, &v, "one of pass, sack, scramble, run, punt, field_goal, kickoff, extra_point, two_point, kneel, spike, penalty");
            None
        }
    };
    let downless = kind.map(|k| k.is_downless()).unwrap_or(false);
    let down = if downless {
        match c.raw(C_DOWN).map(str::to_string) {
            None => None,
            Some(v) if parse_int(&v) == Some(0) => None,
            Some(v) => {
                let k = kind.map(|k| k.as_str()).unwrap_or("");
                c.bad(C_DOWN, &v, &format!("empty on a {k} snap"));
                None
            }
        }
    } else {
        // A pass, run, sack... needs a down; an unknown kind is reported on
        // its own, so its down may be empty. Whole-number decimals ("2.0",
        // as Parquet float columns read) count as that down; "2.5" does not.
        match kind {
            Some(k) => c.int(C_DOWN, 1, 4, true, &format!("1-4 on a {} snap", k.as_str())),
            None => c.int(C_DOWN, 1, 4, false, "1-4 or empty"),
        }
    };
    let ball_on = c.int(C_BALL_ON, 1, 99, true, "1-99 (yards from the offense's own goal line)");
    let to_go = if down.is_some() {
        let to_go = c.int(C_TO_GO, 1, 99, true, "yards to go 1-99 with a down");
        match (to_go, ball_on) {
            (Some(tg), Some(b)) if tg > 100 - b => {
                let v = tg.to_string();
                c.bad(C_TO_GO, &v, &format!("at most {} (the distance to the goal line from ball_on {b})", 100 - b));
                None
            }
            (tg, _) => tg,
        }
    } else {
        None
    };
    let passer = c.text(C_PASSER, false);
    if let Some(k) = kind {
        if k.needs_passer() && passer.is_none() {
            c.bad(C_PASSER, "", &format!("a passer name on a {} snap", k.as_str()));
        }
    }
    let is_pass = kind == Some(Kind::Pass);
    let complete = c.boolean(C_COMPLETE, is_pass, "true or false on a pass");
    let intercepted = c.boolean(C_INTERCEPTED, is_pass, "true or false on a pass");
    if complete == Some(true) && intercepted == Some(true) {
        c.bad(C_INTERCEPTED, "true", "false when complete is true");
    }
    let air_yards = c.int(C_AIR, -30, 99, false, "whole yards -30-99 or empty");
    let needs_gain = matches!(kind, Some(Kind::Pass | Kind::Sack | Kind::Scramble | Kind::Run));
    let gain = c.int(C_GAIN, -99, 99, needs_gain, "net yards -99-99");
    let fumble_lost = c.boolean(C_FUMBLE, false, "true, false or empty");
    let touchback = c.boolean(C_TOUCHBACK, false, "true, false or empty");
    let points = c.int(C_POINTS, -6, 6, true, "one of -6, -2, 0, 1, 2, 3, 6");
    if let (Some(p), Some(k)) = (points, kind) {
        let ok = match p {
            0 | -2 => true,
            3 => k == Kind::FieldGoal,
            1 => k == Kind::ExtraPoint,
            2 => k == Kind::TwoPoint,
            6 | -6 => !k.is_try(),
            _ => false,
        };
        if !ok {
            let what = match p {
                3 => "3 only on a field_goal".to_string(),
                1 => "1 only on an extra_point".to_string(),
                2 => "2 only on a two_point try".to_string(),
                6 | -6 => format!("no touchdown on a {} try", k.as_str()),
                _ => "one of -6, -2, 0, 1, 2, 3, 6".to_string(),
            };
            c.bad(C_POINTS, &p.to_string(), &what);
        }
    }
    let home_line = match c.raw(C_LINE).map(str::to_string) {
        None => None,
        Some(v) => match v.parse::<f64>() {
            Ok(x) if x.is_finite() && x.abs() <= 80.0 => Some(x),
            _ => {
                c.bad(C_LINE, &v, "a number of points -80 to 80 or empty");
                None
            }
        },
    };
    // Team consistency within the row.
    if let (Some(h), Some(a)) = (&home, &away) {
        if h == a {
            c.bad(C_AWAY, a, "a team other than the home team");
        }
        if let Some(o) = &offense {
            if o != h && o != a {
                c.bad(C_OFFENSE, o, &format!("the home team {h} or the away team {a}"));
            } else if let Some(d) = &defense {
                let other = if o == h { a } else { h };
                if d != other {
                    c.bad(C_DEFENSE, d, &format!("{other}, the team not on offense"));
                }
            }
        }
    }
    Some(PlayRow {
        game: game?,
        season: season?,
        week: week?,
        home: home?,
        away: away?,
        seq: seq?,
        period: period?,
        clock: clock?,
        offense: offense?,
        defense: defense?,
        off_score: off_score?,
        def_score: def_score?,
        off_timeouts: off_timeouts?,
        def_timeouts: def_timeouts?,
        down,
        to_go,
        ball_on: ball_on?,
        kind: kind?,
        passer: if kind?.needs_passer() { passer } else { None },
        complete: if is_pass { complete } else { None },
        intercepted: if is_pass { intercepted } else { None },
        air_yards: if is_pass { air_yards } else { None },
        gain,
        fumble_lost,
        touchback,
        points: points?,
        home_line,
    })
}
