//! Validation of play files: every cell against its column's rule, then every
//! game across its rows. Strict mode refuses a file with errors; lenient mode
//! skips the bad rows and keeps every valid one. Builds the `Plays`.

use super::read::{group, list_files, read_table, RawTable};
use super::{Kind, PlayRow, COLUMNS};
use crate::plays::{Plays, Source};
use serde::Serialize;
use std::collections::{BTreeMap, HashMap};
use std::fmt;
use std::path::Path;

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
/// e.g. `week7.csv row 1,204: column down is 6; expected 1-4 or empty`.
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
    fn push(&mut self, issue: Issue) {
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
        let mut s = format!(
            "{} file(s), {} rows read, {} games, {} rows kept",
            self.files.len(),
            group(self.rows_read),
            group(self.games),
            group(self.rows_kept)
        );
        if self.issue_count == 0 {
            s.push_str("; no problems found\n");
            return s;
        }
        if lenient && !self.fatal {
            s.push_str(&format!("; {} rows skipped\n", group(self.rows_skipped)));
        } else {
            s.push_str(&format!("; refused: {} problem(s)\n", group(self.issue_count)));
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

/// A loaded, validated league.
pub struct Loaded {
    pub plays: Plays,
    pub report: LoadReport,
    pub fingerprint: String,
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

/// Load and validate a play file or folder.
pub fn load(path: &Path, opts: &LoadOptions) -> Result<Loaded, LoadError> {
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
    let fp_input: Vec<(String, Vec<u8>)> = contents.iter().map(|(n, _, b)| (n.clone(), b.clone())).collect();
    let fingerprint = super::read::fingerprint(&fp_input);
    drop(fp_input);
    let mut tables = Vec::new();
    for (name, path, bytes) in &contents {
        match read_table(name, path, bytes) {
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
        // Rows are independent here: parse the two halves on two threads,
        // then keep file order.
        let mid = t.height / 2;
        let (first, second) = std::thread::scope(|scope| {
            let later = scope.spawn(|| parse_rows(t, fi, mid..t.height));
            (parse_rows(t, fi, 0..mid), later.join())
        });
        let second = second.unwrap_or_else(|_| parse_rows(t, fi, mid..t.height));
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
    let plays = Plays::from_rows(report.files.clone(), &rows, sources);
    report.games = plays.games.len();
    Ok(Loaded { plays, report, fingerprint: String::new() })
}

// ---------------------------------------------------------------- cells

/// Parse rows `range` of one table: the valid rows, and every issue found.
fn parse_rows(t: &RawTable, fi: usize, range: std::ops::Range<usize>) -> (Vec<(PlayRow, Source)>, Vec<Issue>) {
    let mut rows = Vec::with_capacity(range.len());
    let mut all = Vec::new();
    for r in range {
        let mut issues = Vec::new();
        if let Some(row) = parse_row(t, r, &mut issues) {
            if issues.is_empty() {
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
        let name = COLUMNS[col].name;
        self.issues.push(Issue {
            file: self.t.file.clone(),
            row: Some(self.row + 1),
            column: Some(name.to_string()),
            kind: IssueKind::BadValue,
            message: format!("column {name} is {}; expected {expected}", show(value)),
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
        c.int(C_DOWN, 1, 4, kind.is_some(), "1-4 or empty")
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

// ---------------------------------------------------------------- games

/// Cross-row checks per game (in file order). A row that breaks one is
/// reported and dropped; later rows are compared with the last kept row.
/// Returns the kept rows sorted by season, week, game key and seq.
fn check_games(rows: Vec<(PlayRow, Source)>, tables: &[RawTable], report: &mut LoadReport) -> Vec<(PlayRow, Source)> {
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
                Some((kind, col, msg)) => report.push(Issue {
                    file: tables[src.file as usize].file.clone(),
                    row: Some(src.row as usize),
                    column: Some(col.to_string()),
                    kind,
                    message: msg,
                }),
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
                super::format_clock(row.clock),
                super::format_clock(prev.clock),
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
