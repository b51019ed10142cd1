//! The week's game review for one team: its offensive snaps in each
//! late-game preset, each with EPA and WPA and where they stand in the
//! league's distribution for the same state (EPA: same down, distance band
//! and field zone; WPA: same preset window), and its win probability
//! through the game from its own side. The league's distributions are
//! computed once per league (`LeagueStates`).

use super::metrics::{cell, SnapValues, CELLS};
use super::snaps::{snap_at, Snap};
use crate::playfile::Kind;
use crate::plays::Plays;
use crate::situation::Preset;
use serde::Serialize;
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};

#[derive(Debug, Clone, Serialize)]
pub struct ReviewSnap {
    #[serde(flatten)]
    pub snap: Snap,
    /// Share of league snaps in the same down × distance × field-zone
    /// state with a lower EPA (ties count half), 0-100.
    pub epa_pct: Option<f64>,
    /// Share of league snaps in the same preset window with a lower WPA.
    pub wpa_pct: Option<f64>,
}

#[derive(Debug, Clone, Serialize)]
pub struct ReviewSection {
    pub preset: &'static str,
    pub label: &'static str,
    pub snaps: Vec<ReviewSnap>,
}

#[derive(Debug, Clone, Serialize)]
pub struct GameReview {
    pub game: String,
    pub team: String,
    pub opponent: String,
    pub home: bool,
    /// Final score, team first.
    pub score: (i32, i32),
    pub sections: Vec<ReviewSection>,
    /// (seconds elapsed, team's win probability) before each snap, then the
    /// result.
    pub wp_path: Vec<(f64, f64)>,
}

/// Offensive plays from scrimmage (what a coach reviews snap by snap).
fn scrimmage(k: Kind) -> bool {
    matches!(k, Kind::Pass | Kind::Sack | Kind::Scramble | Kind::Run | Kind::Kneel | Kind::Spike)
}

/// Seconds since kickoff (overtime periods are 10 minutes).
pub fn elapsed(period: i32, clock: i32) -> f64 {
    if period <= 4 {
        ((period - 1) * 900 + (900 - clock)) as f64
    } else {
        (3600 + (period - 5) * 600 + (600 - clock.min(600))) as f64
    }
}

/// Percentile (0-100, ties counted half) of `x` in ascending `sorted`.
pub fn mid_rank_pct(sorted: &[f64], x: f64) -> Option<f64> {
    if sorted.is_empty() || !x.is_finite() {
        return None;
    }
    let below = sorted.partition_point(|&v| v < x);
    let not_above = sorted.partition_point(|&v| v <= x);
    Some(100.0 * (below as f64 + 0.5 * (not_above - below) as f64) / sorted.len() as f64)
}

fn sorted(mut v: Vec<f64>) -> Vec<f64> {
    v.retain(|x| x.is_finite());
    v.sort_by(f64::total_cmp);
    v
}

/// The league's distributions a review ranks a team's snaps in: EPA by
/// state cell over every scrimmage snap, and WPA in each preset window.
/// Each is computed on first use and kept: hold one per loaded league.
#[derive(Default)]
pub struct LeagueStates {
    by_cell: OnceLock<Vec<Vec<f64>>>,
    windows: Mutex<HashMap<(&'static str, i32), Arc<Vec<f64>>>>,
}

impl LeagueStates {
    pub fn new() -> LeagueStates {
        LeagueStates::default()
    }

    fn by_cell(&self, p: &Plays, v: &SnapValues) -> &[Vec<f64>] {
        self.by_cell.get_or_init(|| {
            let mut by_cell: Vec<Vec<f64>> = vec![Vec::new(); CELLS];
            for i in 0..p.len() {
                if scrimmage(p.kind[i]) && (1..=4).contains(&p.down[i]) {
                    by_cell[cell(p, i)].push(v.epa.get(i).copied().unwrap_or(f64::NAN));
                }
            }
            by_cell.into_iter().map(sorted).collect()
        })
    }

    fn window(&self, p: &Plays, v: &SnapValues, preset: Preset, one_score: i32) -> Arc<Vec<f64>> {
        let key = (preset.key(), one_score);
        if let Some(w) = self.windows.lock().ok().and_then(|m| m.get(&key).cloned()) {
            return w;
        }
        let s = preset.situation(one_score);
        let w = Arc::new(sorted((0..p.len()).filter(|&i| scrimmage(p.kind[i]) && s.matches(p, v.wp, i)).map(|i| v.wpa.get(i).copied().unwrap_or(f64::NAN)).collect()));
        if let Ok(mut m) = self.windows.lock() {
            m.insert(key, w.clone());
        }
        w
    }
}

/// The review of `game` for `team` (an index into `p.teams`); `None` when
/// the team did not play in it.
pub fn game_review(p: &Plays, v: &SnapValues, game: usize, team: u16, one_score: i32) -> Option<GameReview> {
    game_review_with(&LeagueStates::new(), p, v, game, team, one_score)
}

/// `game_review` with the league's distributions from `states` (built from
/// the same `p` and `v`; kept between reviews).
pub fn game_review_with(states: &LeagueStates, p: &Plays, v: &SnapValues, game: usize, team: u16, one_score: i32) -> Option<GameReview> {
    let g = p.games.get(game)?;
    if g.home != team && g.away != team {
        return None;
    }
    let home = g.home == team;
    let opponent = if home { g.away } else { g.home };
    let mut sections = Vec::new();
    for preset in Preset::situations() {
        let s = preset.situation(one_score);
        let ours: Vec<usize> = (g.start..g.end).filter(|&i| p.offense[i] == team && scrimmage(p.kind[i]) && s.matches(p, v.wp, i)).collect();
        if ours.is_empty() {
            sections.push(ReviewSection { preset: preset.key(), label: preset.label(), snaps: Vec::new() });
            continue;
        }
        let by_cell = states.by_cell(p, v);
        let window = states.window(p, v, preset, one_score);
        let snaps = ours
            .into_iter()
            .map(|i| ReviewSnap {
                snap: snap_at(p, v, i),
                epa_pct: if (1..=4).contains(&p.down[i]) { mid_rank_pct(&by_cell[cell(p, i)], v.epa.get(i).copied().unwrap_or(f64::NAN)) } else { None },
                wpa_pct: mid_rank_pct(&window, v.wpa.get(i).copied().unwrap_or(f64::NAN)),
            })
            .collect();
        sections.push(ReviewSection { preset: preset.key(), label: preset.label(), snaps });
    }
    let mut wp_path: Vec<(f64, f64)> = (g.start..g.end)
        .map(|i| {
            let w = v.wp.get(i).copied().unwrap_or(f64::NAN);
            (elapsed(p.period[i], p.clock[i]), if p.offense[i] == team { w } else { 1.0 - w })
        })
        .collect();
    let result = if home { g.home_result() } else { 1.0 - g.home_result() };
    if let Some(last) = wp_path.last().copied() {
        wp_path.push((last.0 + 1.0, result));
    }
    let score = if home { (g.home_final, g.away_final) } else { (g.away_final, g.home_final) };
    Some(GameReview { game: g.key.clone(), team: p.teams[team as usize].clone(), opponent: p.teams[opponent as usize].clone(), home, score, sections, wp_path })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mid_rank_percentiles_by_hand() {
        let s = [1.0, 2.0, 2.0, 3.0];
        // 2.0: one below, two tied -> (1 + 0.5*2)/4 = 50%.
        assert_eq!(mid_rank_pct(&s, 2.0), Some(50.0));
        assert_eq!(mid_rank_pct(&s, 0.0), Some(0.0));
        assert_eq!(mid_rank_pct(&s, 9.0), Some(100.0));
        // 3.0: three below, one tied -> 3.5/4.
        assert_eq!(mid_rank_pct(&s, 3.0), Some(87.5));
        assert_eq!(mid_rank_pct(&[], 1.0), None);
        assert_eq!(mid_rank_pct(&s, f64::NAN), None);
    }

    #[test]
    fn clock_to_elapsed_seconds() {
        assert_eq!(elapsed(1, 900), 0.0);
        assert_eq!(elapsed(4, 0), 3600.0);
        assert_eq!(elapsed(5, 600), 3600.0);
        assert_eq!(elapsed(5, 0), 4200.0);
    }

    #[test]
    fn review_covers_only_the_teams_snaps_and_ends_at_the_result() {
        let p = crate::models::testkit::league(12, 1, 5);
        let n = p.len();
        let zeros = vec![0.0; n];
        let half = vec![0.5; n];
        let v = SnapValues { epa: &zeros, wp: &half, wpa: &zeros, cp: &half, choice: &[], execution: &[], league_sticks: &[] };
        let g = &p.games[2];
        let r = game_review(&p, &v, 2, g.away, 8).expect("the away team played");
        assert!(!r.home);
        let all: Vec<&ReviewSnap> = r.sections.iter().flat_map(|s| &s.snaps).collect();
        assert!(all.iter().all(|s| s.snap.offense == p.teams[g.away as usize]));
        let last = r.wp_path.last().unwrap().1;
        assert_eq!(last, 1.0 - g.home_result());
        let other = (0..p.teams.len() as u16).find(|t| *t != g.home && *t != g.away).unwrap();
        assert!(game_review(&p, &v, 2, other, 8).is_none());
    }
}
