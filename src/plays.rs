//! The validated league in columns: one entry per snap, sorted by game and
//! `seq`, with team, passer and game names interned, plus everything later
//! stages derive from the raw columns (clock left in half and game, margin,
//! drive, dropback, next score in the half, each game's result).
//! Built only by `playfile::load`; read by every later stage, never changed.

use crate::layout::{Kind, PlayRow};
use serde::Serialize;

/// Marker for "no passer on this snap" in `Plays::passer`.
pub const NO_PASSER: u32 = u32::MAX;

/// Seconds in a regulation period.
pub const PERIOD_SECS: i32 = 900;

/// The next score in the same half, from the offense's side of a snap
/// (the label the expected-points model is fit on).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
pub enum NextScore {
    OwnTouchdown,
    OwnFieldGoal,
    OwnSafety,
    OppTouchdown,
    OppFieldGoal,
    OppSafety,
    NoScore,
}

impl NextScore {
    pub const ALL: [NextScore; 7] = [
        NextScore::OwnTouchdown,
        NextScore::OwnFieldGoal,
        NextScore::OwnSafety,
        NextScore::OppTouchdown,
        NextScore::OppFieldGoal,
        NextScore::OppSafety,
        NextScore::NoScore,
    ];
    pub fn index(self) -> usize {
        self as usize
    }
    /// Points of this outcome from the offense's side, with a touchdown worth
    /// `td_value` (six plus the league's average try).
    pub fn points(self, td_value: f64) -> f64 {
        match self {
            NextScore::OwnTouchdown => td_value,
            NextScore::OwnFieldGoal => 3.0,
            NextScore::OwnSafety => 2.0,
            NextScore::OppTouchdown => -td_value,
            NextScore::OppFieldGoal => -3.0,
            NextScore::OppSafety => -2.0,
            NextScore::NoScore => 0.0,
        }
    }
}

/// One game: names, teams and result.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Game {
    pub key: String,
    pub season: i32,
    pub week: i32,
    pub home: u16,
    pub away: u16,
    /// Pregame expected home margin, when the file carries it.
    pub home_line: Option<f64>,
    pub home_final: i32,
    pub away_final: i32,
    /// Index of the game's first snap in `Plays`; its snaps are `start..end`.
    pub start: usize,
    pub end: usize,
}

impl Game {
    /// 1.0 home win, 0.0 away win, 0.5 tie.
    pub fn home_result(&self) -> f64 {
        match self.home_final.cmp(&self.away_final) {
            std::cmp::Ordering::Greater => 1.0,
            std::cmp::Ordering::Less => 0.0,
            std::cmp::Ordering::Equal => 0.5,
        }
    }
}

/// Where a snap came from, for messages and the cut-up.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Source {
    pub file: u16,
    /// 1-based data row within that file.
    pub row: u32,
}

/// Marker for "no name" in a `Snap`'s name fields.
pub const NO_NAME: u32 = u32::MAX;

/// One validated snap as `Plays::from_snaps` takes it: its game, teams and
/// passer as indices into a list of names (`NO_NAME` for no passer), and
/// its values as `Plays` keeps them (0 for no down or gain, false for an
/// empty flag).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Snap {
    pub game: u32,
    pub home: u32,
    pub away: u32,
    pub offense: u32,
    pub defense: u32,
    pub passer: u32,
    pub season: i32,
    pub week: i32,
    pub seq: i32,
    pub period: i32,
    pub clock: i32,
    pub off_score: i32,
    pub def_score: i32,
    pub off_timeouts: i32,
    pub def_timeouts: i32,
    pub down: i32,
    pub to_go: i32,
    pub ball_on: i32,
    pub gain: i32,
    pub points: i32,
    pub air_yards: Option<i32>,
    pub home_line: Option<f64>,
    pub kind: Kind,
    pub complete: bool,
    pub intercepted: bool,
    pub fumble_lost: bool,
    pub touchback: bool,
    pub source: Source,
}

impl Snap {
    /// A placeholder (a row not yet parsed, or refused).
    pub const EMPTY: Snap = Snap {
        game: NO_NAME,
        home: NO_NAME,
        away: NO_NAME,
        offense: NO_NAME,
        defense: NO_NAME,
        passer: NO_NAME,
        season: 0,
        week: 0,
        seq: 0,
        period: 0,
        clock: 0,
        off_score: 0,
        def_score: 0,
        off_timeouts: 0,
        def_timeouts: 0,
        down: 0,
        to_go: 0,
        ball_on: 0,
        gain: 0,
        points: 0,
        air_yards: None,
        home_line: None,
        kind: Kind::Pass,
        complete: false,
        intercepted: false,
        fumble_lost: false,
        touchback: false,
        source: Source { file: 0, row: 0 },
    };
}

/// Marker for "empty" in `Tags::codes`.
pub const NO_TAG: u32 = u32::MAX;

/// Most distinct values a tag may have to be offered as a list; beyond it
/// the tag is searchable text.
pub const TAG_LIST_MAX: usize = 50;

/// The staff's own columns (tags): per tag its name as the query language
/// writes it (`tag.NAME`), its header in the file, its distinct values
/// (sorted) and, per snap, the index of its value (`NO_TAG` when empty).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Tags {
    pub names: Vec<String>,
    pub headers: Vec<String>,
    pub values: Vec<Vec<String>>,
    pub codes: Vec<Vec<u32>>,
}

impl Tags {
    /// Intern `cells[t][snap]` for each tag header `headers[t]`.
    pub fn build(headers: &[String], cells: &[Vec<Option<&str>>]) -> Tags {
        let mut tags = Tags::default();
        for (h, col) in headers.iter().zip(cells) {
            let mut values: Vec<String> = col.iter().flatten().map(|v| v.to_string()).collect();
            values.sort();
            values.dedup();
            let codes = col.iter().map(|v| v.and_then(|v| values.binary_search_by(|x| x.as_str().cmp(v)).ok()).map_or(NO_TAG, |c| c as u32)).collect();
            let mut name = tag_key(h);
            let base = name.clone();
            let mut k = 2;
            while tags.names.contains(&name) {
                name = format!("{base}_{k}");
                k += 1;
            }
            tags.names.push(name);
            tags.headers.push(h.clone());
            tags.values.push(values);
            tags.codes.push(codes);
        }
        tags
    }
    pub fn is_empty(&self) -> bool {
        self.names.is_empty()
    }
    /// The tag called `name` (without regard to case).
    pub fn index(&self, name: &str) -> Option<usize> {
        self.names.iter().position(|n| n.eq_ignore_ascii_case(name))
    }
    /// Tag `t`'s value on snap `i`.
    pub fn value(&self, t: usize, i: usize) -> Option<&str> {
        let c = *self.codes.get(t)?.get(i)?;
        (c != NO_TAG).then(|| self.values[t][c as usize].as_str())
    }
    /// Few enough values to offer as a list.
    pub fn is_list(&self, t: usize) -> bool {
        self.values.get(t).is_some_and(|v| v.len() <= TAG_LIST_MAX)
    }
}

/// A header as the query language writes it: lower case, letters, digits
/// and `_` (`Coverage Shell` → `coverage_shell`).
pub fn tag_key(header: &str) -> String {
    let mut s = String::new();
    for ch in header.trim().chars().flat_map(char::to_lowercase) {
        if ch.is_ascii_alphanumeric() {
            s.push(ch);
        } else if !s.ends_with('_') && !s.is_empty() {
            s.push('_');
        }
    }
    let s = s.trim_end_matches('_').to_string();
    if s.is_empty() {
        "tag".to_string()
    } else {
        s
    }
}

/// The league, one vector per column, all of equal length `len()`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Plays {
    pub files: Vec<String>,
    pub teams: Vec<String>,
    pub passers: Vec<String>,
    pub games: Vec<Game>,

    // ---- as read ----
    pub game: Vec<u32>,
    pub seq: Vec<i32>,
    pub season: Vec<i32>,
    pub week: Vec<i32>,
    pub period: Vec<i32>,
    /// Seconds left in the period.
    pub clock: Vec<i32>,
    pub offense: Vec<u16>,
    pub defense: Vec<u16>,
    pub off_score: Vec<i32>,
    pub def_score: Vec<i32>,
    pub off_timeouts: Vec<i32>,
    pub def_timeouts: Vec<i32>,
    /// 0 when the snap carries no down (kickoffs, tries).
    pub down: Vec<i32>,
    /// 0 when the snap carries no down.
    pub to_go: Vec<i32>,
    pub ball_on: Vec<i32>,
    pub kind: Vec<Kind>,
    /// Index into `passers`, or `NO_PASSER`.
    pub passer: Vec<u32>,
    pub complete: Vec<bool>,
    pub intercepted: Vec<bool>,
    pub air_yards: Vec<Option<i32>>,
    pub gain: Vec<i32>,
    pub fumble_lost: Vec<bool>,
    pub touchback: Vec<bool>,
    pub points: Vec<i32>,
    pub source: Vec<Source>,
    /// The staff's own columns beyond ours.
    pub tags: Tags,

    // ---- derived ----
    /// Seconds left in the half (overtime: in the period).
    pub secs_half: Vec<i32>,
    /// Seconds left in regulation (overtime: in the period).
    pub secs_game: Vec<i32>,
    /// off_score - def_score.
    pub margin: Vec<i32>,
    /// Drive number within the game, from 1; a new drive starts when the
    /// offense changes or a period 1/3/5+ begins.
    pub drive: Vec<i32>,
    pub dropback: Vec<bool>,
    pub next_score: Vec<NextScore>,
    /// True when the offense is the home team.
    pub off_home: Vec<bool>,

    // ---- the staff's settings ----
    /// Which overtime rules each season played (`crate::overtime`; the
    /// file cannot say): what the WP model solves overtime under.
    pub overtime: crate::overtime::OvertimeConfig,
}

impl Plays {
    pub fn len(&self) -> usize {
        self.game.len()
    }
    pub fn is_empty(&self) -> bool {
        self.game.is_empty()
    }
    pub fn is_overtime(&self, i: usize) -> bool {
        self.period[i] >= 5
    }
    /// Half index: 1 (periods 1-2), 2 (periods 3-4), 3 and up for each
    /// overtime period.
    pub fn half(&self, i: usize) -> i32 {
        half_of(self.period[i])
    }
    pub fn seasons(&self) -> Vec<i32> {
        let mut s: Vec<i32> = self.games.iter().map(|g| g.season).collect();
        s.sort_unstable();
        s.dedup();
        s
    }
    pub fn passer_name(&self, i: usize) -> Option<&str> {
        let p = self.passer[i];
        (p != NO_PASSER).then(|| self.passers[p as usize].as_str())
    }
    pub fn team_index(&self, code: &str) -> Option<u16> {
        self.teams.iter().position(|t| t == code).map(|p| p as u16)
    }
    pub fn passer_index(&self, name: &str) -> Option<u32> {
        self.passers.iter().position(|t| t == name).map(|p| p as u32)
    }
    /// Offense's final result: 1 win, 0 loss, 0.5 tie.
    pub fn offense_result(&self, i: usize) -> f64 {
        let g = &self.games[self.game[i] as usize];
        let home = g.home_result();
        if self.off_home[i] {
            home
        } else {
            1.0 - home
        }
    }

    /// Snap `i` back as a play-file row (`complete`/`intercepted` empty on
    /// snaps that are not passes unless true).
    pub fn row(&self, i: usize) -> PlayRow {
        let g = &self.games[self.game[i] as usize];
        let has_down = self.down[i] > 0;
        let pass = self.kind[i] == Kind::Pass;
        PlayRow {
            game: g.key.clone(),
            season: self.season[i],
            week: self.week[i],
            home: self.teams[g.home as usize].clone(),
            away: self.teams[g.away as usize].clone(),
            seq: self.seq[i],
            period: self.period[i],
            clock: self.clock[i],
            offense: self.teams[self.offense[i] as usize].clone(),
            defense: self.teams[self.defense[i] as usize].clone(),
            off_score: self.off_score[i],
            def_score: self.def_score[i],
            off_timeouts: self.off_timeouts[i],
            def_timeouts: self.def_timeouts[i],
            down: has_down.then_some(self.down[i]),
            to_go: has_down.then_some(self.to_go[i]),
            ball_on: self.ball_on[i],
            kind: self.kind[i],
            passer: self.passer_name(i).map(str::to_string),
            complete: (pass || self.complete[i]).then_some(self.complete[i]),
            intercepted: (pass || self.intercepted[i]).then_some(self.intercepted[i]),
            air_yards: self.air_yards[i],
            gain: Some(self.gain[i]),
            fumble_lost: Some(self.fumble_lost[i]),
            touchback: Some(self.touchback[i]),
            points: self.points[i],
            home_line: g.home_line,
        }
    }

    /// Build from rows already sorted by (game, seq) and already validated.
    /// `sources` gives each row's origin. Derives every derived column.
    pub fn from_rows(files: Vec<String>, rows: &[PlayRow], sources: Vec<Source>) -> Plays {
        fn intern<'r>(names: &mut Vec<&'r str>, ids: &mut std::collections::HashMap<&'r str, u32>, s: &'r str) -> u32 {
            *ids.entry(s).or_insert_with(|| {
                names.push(s);
                names.len() as u32 - 1
            })
        }
        let mut names: Vec<&str> = Vec::new();
        let mut ids = std::collections::HashMap::new();
        let mut snaps = Vec::with_capacity(rows.len());
        for (r, source) in rows.iter().zip(sources) {
            let mut code = |s| intern(&mut names, &mut ids, s);
            let passer = match r.passer.as_deref() {
                Some(name) if !name.is_empty() => code(name),
                _ => NO_NAME,
            };
            snaps.push(Snap {
                game: code(&r.game),
                home: code(&r.home),
                away: code(&r.away),
                offense: code(&r.offense),
                defense: code(&r.defense),
                passer,
                season: r.season,
                week: r.week,
                seq: r.seq,
                period: r.period,
                clock: r.clock,
                off_score: r.off_score,
                def_score: r.def_score,
                off_timeouts: r.off_timeouts,
                def_timeouts: r.def_timeouts,
                down: r.down.unwrap_or(0),
                to_go: if r.down.is_some() { r.to_go.unwrap_or(0) } else { 0 },
                ball_on: r.ball_on,
                gain: r.gain.unwrap_or(0),
                points: r.points,
                air_yards: r.air_yards,
                home_line: r.home_line,
                kind: r.kind,
                complete: r.complete.unwrap_or(false),
                intercepted: r.intercepted.unwrap_or(false),
                fumble_lost: r.fumble_lost.unwrap_or(false),
                touchback: r.touchback.unwrap_or(false),
                source,
            });
        }
        let order: Vec<u32> = (0..snaps.len() as u32).collect();
        Plays::from_snaps(files, &names, &snaps, &order)
    }

    /// Build from the snaps `rows[order[0]], rows[order[1]], ...`, already
    /// sorted by (game, seq) and validated; their names index `names`.
    /// Teams and passers are numbered in order of first appearance (a
    /// game's home and away team, then each snap's offense and defense).
    /// Derives every derived column.
    pub fn from_snaps(files: Vec<String>, names: &[&str], rows: &[Snap], order: &[u32]) -> Plays {
        let n = order.len();
        let mut p = Plays { files, ..Plays::default() };
        p.game.reserve_exact(n);
        p.seq.reserve_exact(n);
        p.season.reserve_exact(n);
        p.week.reserve_exact(n);
        p.period.reserve_exact(n);
        p.clock.reserve_exact(n);
        p.offense.reserve_exact(n);
        p.defense.reserve_exact(n);
        p.off_score.reserve_exact(n);
        p.def_score.reserve_exact(n);
        p.off_timeouts.reserve_exact(n);
        p.def_timeouts.reserve_exact(n);
        p.down.reserve_exact(n);
        p.to_go.reserve_exact(n);
        p.ball_on.reserve_exact(n);
        p.kind.reserve_exact(n);
        p.passer.reserve_exact(n);
        p.complete.reserve_exact(n);
        p.intercepted.reserve_exact(n);
        p.air_yards.reserve_exact(n);
        p.gain.reserve_exact(n);
        p.fumble_lost.reserve_exact(n);
        p.touchback.reserve_exact(n);
        p.points.reserve_exact(n);
        p.source.reserve_exact(n);
        p.off_home.reserve_exact(n);
        // Name index → team or passer id (u32::MAX: not seen yet).
        let mut team_of = vec![u32::MAX; names.len()];
        let mut passer_of = vec![u32::MAX; names.len()];
        let mut team = |p: &mut Plays, c: u32| -> u16 {
            let slot = &mut team_of[c as usize];
            if *slot == u32::MAX {
                *slot = p.teams.len() as u32;
                p.teams.push(names[c as usize].to_string());
            }
            *slot as u16
        };
        for (i, &k) in order.iter().enumerate() {
            let r = &rows[k as usize];
            let new_game = i == 0 || rows[order[i - 1] as usize].game != r.game;
            if new_game {
                if let Some(g) = p.games.last_mut() {
                    g.end = i;
                }
                let home = team(&mut p, r.home);
                let away = team(&mut p, r.away);
                p.games.push(Game {
                    key: names[r.game as usize].to_string(),
                    season: r.season,
                    week: r.week,
                    home,
                    away,
                    home_line: r.home_line,
                    home_final: 0,
                    away_final: 0,
                    start: i,
                    end: i,
                });
            }
            let gi = p.games.len() as u32 - 1;
            let offense = team(&mut p, r.offense);
            let defense = team(&mut p, r.defense);
            let passer = if r.passer == NO_NAME {
                NO_PASSER
            } else {
                let slot = &mut passer_of[r.passer as usize];
                if *slot == u32::MAX {
                    *slot = p.passers.len() as u32;
                    p.passers.push(names[r.passer as usize].to_string());
                }
                *slot
            };
            p.game.push(gi);
            p.seq.push(r.seq);
            p.season.push(r.season);
            p.week.push(r.week);
            p.period.push(r.period);
            p.clock.push(r.clock);
            p.offense.push(offense);
            p.defense.push(defense);
            p.off_score.push(r.off_score);
            p.def_score.push(r.def_score);
            p.off_timeouts.push(r.off_timeouts);
            p.def_timeouts.push(r.def_timeouts);
            p.down.push(r.down);
            p.to_go.push(r.to_go);
            p.ball_on.push(r.ball_on);
            p.kind.push(r.kind);
            p.passer.push(passer);
            p.complete.push(r.complete);
            p.intercepted.push(r.intercepted);
            p.air_yards.push(r.air_yards);
            p.gain.push(r.gain);
            p.fumble_lost.push(r.fumble_lost);
            p.touchback.push(r.touchback);
            p.points.push(r.points);
            p.source.push(r.source);
            p.off_home.push(r.offense == r.home);
        }
        if let Some(g) = p.games.last_mut() {
            g.end = n;
        }
        p.derive();
        p
    }

    fn derive(&mut self) {
        let n = self.len();
        self.secs_half = (0..n).map(|i| secs_left_half(self.period[i], self.clock[i])).collect();
        self.secs_game = (0..n).map(|i| secs_left_game(self.period[i], self.clock[i])).collect();
        self.margin = (0..n).map(|i| self.off_score[i] - self.def_score[i]).collect();
        self.dropback = self.kind.iter().map(|k| k.is_dropback()).collect();
        self.drive = vec![0; n];
        self.next_score = vec![NextScore::NoScore; n];
        for gi in 0..self.games.len() {
            let (start, end) = (self.games[gi].start, self.games[gi].end);
            // drives
            let mut drive = 0;
            for i in start..end {
                let new_period_start = i == start
                    || (self.period[i] != self.period[i - 1] && self.period[i] != 2 && self.period[i] != 4);
                if new_period_start || self.offense[i] != self.offense[i - 1] {
                    drive += 1;
                }
                self.drive[i] = drive;
            }
            // next score in the half, scanning backwards
            let mut next: Option<(i32, u16, NextScore)> = None; // (half, scoring team, kind for scorer)
            for i in (start..end).rev() {
                let half = half_of(self.period[i]);
                if let Some((h, _, _)) = next {
                    if h != half {
                        next = None;
                    }
                }
                if self.points[i] != 0 && !self.kind[i].is_try() {
                    let (scorer, what) = if self.points[i] > 0 {
                        let w = if self.points[i] >= 6 {
                            NextScore::OwnTouchdown
                        } else if self.points[i] == 3 {
                            NextScore::OwnFieldGoal
                        } else {
                            NextScore::OwnSafety
                        };
                        (self.offense[i], w)
                    } else {
                        let w = if self.points[i] <= -6 {
                            NextScore::OwnTouchdown
                        } else if self.points[i] == -3 {
                            NextScore::OwnFieldGoal
                        } else {
                            NextScore::OwnSafety
                        };
                        (self.defense[i], w)
                    };
                    next = Some((half, scorer, what));
                }
                self.next_score[i] = match next {
                    None => NextScore::NoScore,
                    Some((_, scorer, what)) if scorer == self.offense[i] => what,
                    Some((_, _, what)) => match what {
                        NextScore::OwnTouchdown => NextScore::OppTouchdown,
                        NextScore::OwnFieldGoal => NextScore::OppFieldGoal,
                        _ => NextScore::OppSafety,
                    },
                };
            }
            // final score
            let last = end - 1;
            let (mut off, mut def) = (self.off_score[last], self.def_score[last]);
            if self.points[last] > 0 {
                off += self.points[last];
            } else {
                def -= self.points[last];
            }
            let (hf, af) = if self.off_home[last] { (off, def) } else { (def, off) };
            self.games[gi].home_final = hf;
            self.games[gi].away_final = af;
        }
    }
}

pub fn half_of(period: i32) -> i32 {
    match period {
        1 | 2 => 1,
        3 | 4 => 2,
        p => p - 2,
    }
}

/// Seconds left in the half at a snap (in overtime: in the period).
pub fn secs_left_half(period: i32, clock: i32) -> i32 {
    match period {
        1 | 3 => clock + PERIOD_SECS,
        _ => clock,
    }
}

/// Seconds left in regulation (in overtime: in the period).
pub fn secs_left_game(period: i32, clock: i32) -> i32 {
    if period >= 5 {
        clock
    } else {
        (4 - period) * PERIOD_SECS + clock
    }
}
