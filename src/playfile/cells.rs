//! Cell parsing: every cell of a row against its column's rule, with a
//! coach-readable message for each bad one. Turns a row into a `Snap` when
//! every cell is valid. A typed Parquet cell is read as it is; its text (for
//! a message) is made only when it is bad.

use super::at::*;
use super::names::{Names, NAME_MAX_CHARS};
use super::read::{Cell, RawTable};
use super::report::{Issue, IssueKind};
use super::{Kind, COLUMNS};
use crate::plays::{Snap, Source, NO_NAME};

/// Parse the rows of `out` (table `fi`'s rows from `first` on) into it:
/// each valid row's snap, `Snap::EMPTY` and `false` in `ok` for the
/// others. Returns every issue found, in row order.
pub(super) fn parse_rows(t: &RawTable, fi: usize, names: &Names, first: usize, out: &mut [Snap], ok: &mut [bool]) -> Vec<Issue> {
    let mut all = Vec::new();
    // What a mapping could not read in these rows, reported in row order.
    let pre: &[Issue] = t.mapped.as_ref().map(|m| m.issues.as_slice()).unwrap_or(&[]);
    let mut next_pre = pre.partition_point(|i| i.row.is_some_and(|x| x <= first));
    let mut issues = Vec::new();
    for (k, (slot, good)) in out.iter_mut().zip(ok.iter_mut()).enumerate() {
        let r = first + k;
        let mut skip = false;
        while next_pre < pre.len() && pre[next_pre].row == Some(r + 1) {
            issues.push(pre[next_pre].clone());
            next_pre += 1;
            skip = true;
        }
        let snap = parse_row(t, fi, names, r, &mut issues);
        *good = false;
        if let Some(snap) = snap {
            if issues.is_empty() && !skip {
                *slot = snap;
                *good = true;
            }
        }
        all.append(&mut issues);
    }
    all
}

struct Cells<'a> {
    t: &'a RawTable,
    names: &'a Names,
    fi: usize,
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
    /// `bad` with the cell's own text.
    fn bad_cell(&mut self, col: usize, expected: &str) {
        let v = self.t.text(col, self.row).map(|v| v.into_owned()).unwrap_or_default();
        self.bad(col, &v, expected);
    }
    fn value(&self, col: usize) -> Option<Cell<'a>> {
        let t: &'a RawTable = self.t;
        t.value(col, self.row)
    }
    /// A name (game, team, passer): its index in `Names`, `None` when empty
    /// (an error too if `required`) or too long.
    fn name(&mut self, k: usize, col: usize, required: bool) -> Option<u32> {
        let code = self.names.code(self.fi, k, self.row);
        if code == NO_NAME {
            if required {
                self.bad(col, "", "a value");
            }
            return None;
        }
        let names: &'a Names = self.names;
        if names.too_long.get(code as usize).copied().unwrap_or(false) {
            let v = names.name(code);
            self.bad(col, v, &format!("text of at most {NAME_MAX_CHARS} characters"));
            return None;
        }
        Some(code)
    }
    /// An integer in lo..=hi; `None` when empty (an error too if `required`).
    fn int(&mut self, col: usize, lo: i64, hi: i64, required: bool, expected: &str) -> Option<i32> {
        let Some(v) = self.value(col) else {
            if required {
                self.bad(col, "", expected);
            }
            return None;
        };
        match whole(v) {
            Some(x) if x >= lo && x <= hi => Some(x as i32),
            _ => {
                self.bad_cell(col, expected);
                None
            }
        }
    }
    fn boolean(&mut self, col: usize, required: bool, expected: &str) -> Option<bool> {
        let Some(v) = self.value(col) else {
            if required {
                self.bad(col, "", expected);
            }
            return None;
        };
        const TRUE: [&str; 5] = ["true", "t", "1", "yes", "y"];
        const FALSE: [&str; 5] = ["false", "f", "0", "no", "n"];
        match v {
            Cell::Bool(b) => Some(b),
            Cell::Text(v) if TRUE.iter().any(|w| v.eq_ignore_ascii_case(w)) => Some(true),
            Cell::Text(v) if FALSE.iter().any(|w| v.eq_ignore_ascii_case(w)) => Some(false),
            Cell::Int(1) => Some(true),
            Cell::Int(0) => Some(false),
            _ => {
                self.bad_cell(col, expected);
                None
            }
        }
    }
}

/// A cell as a whole number: an integer, or a decimal with nothing after
/// the point ("7.0", as Parquet float columns read); `None` otherwise.
fn whole(v: Cell) -> Option<i64> {
    match v {
        Cell::Int(x) => Some(x),
        Cell::Float(f) => whole_float(f),
        Cell::Text(v) => parse_int(v),
        Cell::Bool(_) => None,
    }
}

fn whole_float(f: f64) -> Option<i64> {
    (f.is_finite() && f.fract() == 0.0 && f.abs() < 1e15).then_some(f as i64)
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
    v.parse::<f64>().ok().and_then(whole_float)
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

fn parse_row(t: &RawTable, fi: usize, names: &Names, r: usize, issues: &mut Vec<Issue>) -> Option<Snap> {
    let mut c = Cells { t, names, fi, row: r, issues };
    let game = c.name(0, C_GAME, true);
    let season = c.int(C_SEASON, 1, 9999, true, "a season year 1-9999");
    let week = c.int(C_WEEK, 1, 30, true, "a week 1-30");
    let home = c.name(1, C_HOME, true);
    let away = c.name(2, C_AWAY, true);
    let seq = c.int(C_SEQ, 0, 1_000_000, true, "a snap number 0-1,000,000");
    let period = c.int(C_PERIOD, 1, 9, true, "a period 1-9 (5 and up is overtime)");
    const CLOCK: &str = "M:SS or whole seconds 0-900";
    let clock = match c.value(C_CLOCK) {
        None => {
            c.bad(C_CLOCK, "", CLOCK);
            None
        }
        Some(v) => match clock_secs(v) {
            Some(s) if (0..=900).contains(&s) => Some(s as i32),
            _ => {
                c.bad_cell(C_CLOCK, CLOCK);
                None
            }
        },
    };
    let offense = c.name(3, C_OFFENSE, true);
    let defense = c.name(4, C_DEFENSE, true);
    let off_score = c.int(C_OFF_SCORE, 0, 300, true, "points 0-300");
    let def_score = c.int(C_DEF_SCORE, 0, 300, true, "points 0-300");
    let off_timeouts = c.int(C_OFF_TO, 0, 3, true, "0-3");
    let def_timeouts = c.int(C_DEF_TO, 0, 3, true, "0-3");
    let kind = match c.value(C_KIND) {
        Some(Cell::Text(k)) => Kind::ALL.iter().copied().find(|x| x.as_str().eq_ignore_ascii_case(k)),
        _ => None,
    };
    if kind.is_none() {
        c.bad_cell(C_KIND, "one of pass, sack, scramble, run, punt, field_goal, kickoff, extra_point, two_point, kneel, spike, penalty");
    }
    let downless = kind.map(|k| k.is_downless()).unwrap_or(false);
    let down = if downless {
        match c.value(C_DOWN) {
            None => None,
            Some(v) if whole(v) == Some(0) => None,
            Some(_) => {
                let k = kind.map(|k| k.as_str()).unwrap_or("");
                c.bad_cell(C_DOWN, &format!("empty on a {k} snap"));
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
    let passer = c.name(5, C_PASSER, false);
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
    let home_line = match c.value(C_LINE) {
        None => None,
        Some(v) => match real(v) {
            Some(x) if x.is_finite() && x.abs() <= 80.0 => Some(x),
            _ => {
                c.bad_cell(C_LINE, "a number of points -80 to 80 or empty");
                None
            }
        },
    };
    // Team consistency within the row.
    if let (Some(h), Some(a)) = (home, away) {
        let name = |x: u32| names.name(x);
        if h == a {
            c.bad(C_AWAY, name(a), "a team other than the home team");
        }
        if let Some(o) = offense {
            if o != h && o != a {
                c.bad(C_OFFENSE, name(o), &format!("the home team {} or the away team {}", name(h), name(a)));
            } else if let Some(d) = defense {
                let other = if o == h { a } else { h };
                if d != other {
                    c.bad(C_DEFENSE, name(d), &format!("{}, the team not on offense", name(other)));
                }
            }
        }
    }
    let kind = kind?;
    Some(Snap {
        game: game?,
        home: home?,
        away: away?,
        offense: offense?,
        defense: defense?,
        passer: if kind.needs_passer() { passer.unwrap_or(NO_NAME) } else { NO_NAME },
        season: season?,
        week: week?,
        seq: seq?,
        period: period?,
        clock: clock?,
        off_score: off_score?,
        def_score: def_score?,
        off_timeouts: off_timeouts?,
        def_timeouts: def_timeouts?,
        down: down.unwrap_or(0),
        to_go: to_go.unwrap_or(0),
        ball_on: ball_on?,
        gain: gain.unwrap_or(0),
        points: points?,
        air_yards: if is_pass { air_yards } else { None },
        home_line,
        kind,
        complete: is_pass && complete == Some(true),
        intercepted: is_pass && intercepted == Some(true),
        fumble_lost: fumble_lost.unwrap_or(false),
        touchback: touchback.unwrap_or(false),
        source: Source { file: fi as u16, row: (r + 1) as u32 },
    })
}

/// A clock cell in seconds: `M:SS` text, or whole seconds.
fn clock_secs(v: Cell) -> Option<i64> {
    match v {
        Cell::Text(t) => parse_clock(t),
        other => whole(other),
    }
}

/// A cell as any number.
fn real(v: Cell) -> Option<f64> {
    match v {
        Cell::Float(x) => Some(x),
        Cell::Int(x) => Some(x as f64),
        Cell::Text(t) => t.parse::<f64>().ok(),
        Cell::Bool(_) => None,
    }
}
