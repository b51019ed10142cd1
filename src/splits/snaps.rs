//! The snaps behind a number: the play list for a situation (and passer,
//! and metric), each snap written the way a coach reads it.

use super::metrics::{in_unit, is_td_pass, MetricDef, SnapValues};
use crate::playfile::{format_clock, Kind};
use crate::plays::Plays;
use crate::situation::Situation;
use serde::Serialize;

#[derive(Debug, Clone, Serialize)]
pub struct Snap {
    /// Position in the league (stable for a loaded file).
    pub index: usize,
    pub game: String,
    pub season: i32,
    pub week: i32,
    pub seq: i32,
    pub period: i32,
    /// "Q4", "OT" (a second overtime "OT2").
    pub quarter: String,
    pub clock: String,
    pub offense: String,
    pub defense: String,
    /// Offense score – defense score before the snap.
    pub score: String,
    pub down_distance: String,
    /// Down and yards to go (none on kickoffs and tries).
    pub down: Option<i32>,
    pub to_go: Option<i32>,
    /// Drive number within the game, and the snap's place in the drive (from 1).
    pub drive: i32,
    pub play_in_drive: i32,
    /// Ball spot in coaching notation: own side −35, opponent side +20.
    pub spot: String,
    pub kind: &'static str,
    pub passer: Option<String>,
    pub result: String,
    pub epa: f64,
    pub wp: f64,
    pub wpa: f64,
    /// Throw choice and execution values in WPA (`models::throw`); NaN
    /// (null in JSON) where the snap is not a pass with air yards.
    pub choice: f64,
    pub execution: f64,
    /// The staff's tags on this snap: (tag name, value; empty when none),
    /// every tag of the file in its order.
    pub tags: Vec<(String, String)>,
}

/// "Q4", "OT" (a second overtime "OT2").
pub fn quarter(period: i32) -> String {
    match period {
        p if p <= 4 => format!("Q{p}"),
        5 => "OT".to_string(),
        p => format!("OT{}", p - 4),
    }
}

/// Own 35 → "-35", opponent 20 → "+20", midfield → "50".
pub fn coach_spot(ball_on: i32) -> String {
    crate::situation::values::show_yard_line(ball_on as f64)
}

/// "3rd & 7", "1st & goal"; empty on kickoffs and tries.
pub fn down_distance(down: i32, to_go: i32, ball_on: i32) -> String {
    let d = match down {
        1 => "1st",
        2 => "2nd",
        3 => "3rd",
        4 => "4th",
        _ => return String::new(),
    };
    if to_go >= 100 - ball_on {
        format!("{d} & goal")
    } else {
        format!("{d} & {to_go}")
    }
}

/// What happened, in words.
pub fn result_text(p: &Plays, i: usize) -> String {
    let g = p.gain[i];
    let mut s = match p.kind[i] {
        Kind::Pass if p.intercepted[i] => "intercepted".to_string(),
        Kind::Pass if p.complete[i] => format!("complete, {g} yds"),
        Kind::Pass => "incomplete".to_string(),
        Kind::Sack => format!("sacked, {g} yds"),
        Kind::Scramble => format!("scramble, {g} yds"),
        Kind::Run => format!("run, {g} yds"),
        Kind::Punt => if p.touchback[i] { "punt, touchback".to_string() } else { "punt".to_string() },
        Kind::FieldGoal => if p.points[i] == 3 { "field goal good".to_string() } else { "field goal missed".to_string() },
        Kind::Kickoff => if p.touchback[i] { "kickoff, touchback".to_string() } else { "kickoff".to_string() },
        Kind::ExtraPoint => if p.points[i] == 1 { "extra point good".to_string() } else { "extra point no good".to_string() },
        Kind::TwoPoint => if p.points[i] == 2 { "two-point try good".to_string() } else { "two-point try failed".to_string() },
        Kind::Kneel => "kneel".to_string(),
        Kind::Spike => "spike".to_string(),
        Kind::Penalty => format!("penalty, {g} yds"),
    };
    if p.fumble_lost[i] {
        s.push_str(", fumble lost");
    }
    if p.points[i] == 6 && (is_td_pass(p, i) || !p.kind[i].is_try()) {
        s.push_str(", TOUCHDOWN");
    } else if p.points[i] == -6 {
        s.push_str(", returned for a touchdown");
    } else if p.points[i] == -2 {
        s.push_str(", safety");
    }
    s
}

/// One snap, written the way a coach reads it.
pub fn snap_at(p: &Plays, v: &SnapValues, i: usize) -> Snap {
    let g = &p.games[p.game[i] as usize];
    Snap {
        index: i,
        game: g.key.clone(),
        season: p.season[i],
        week: p.week[i],
        seq: p.seq[i],
        period: p.period[i],
        quarter: quarter(p.period[i]),
        clock: format_clock(p.clock[i]),
        offense: p.teams[p.offense[i] as usize].clone(),
        defense: p.teams[p.defense[i] as usize].clone(),
        score: format!("{}-{}", p.off_score[i], p.def_score[i]),
        down_distance: down_distance(p.down[i], p.to_go[i], p.ball_on[i]),
        down: (1..=4).contains(&p.down[i]).then_some(p.down[i]),
        to_go: (1..=4).contains(&p.down[i]).then_some(p.to_go[i]),
        drive: p.drive[i],
        play_in_drive: {
            let start = p.games[p.game[i] as usize].start;
            (start..=i).rev().take_while(|&j| p.drive[j] == p.drive[i]).count() as i32
        },
        spot: coach_spot(p.ball_on[i]),
        kind: p.kind[i].as_str(),
        passer: p.passer_name(i).map(str::to_string),
        result: result_text(p, i),
        epa: v.epa.get(i).copied().unwrap_or(f64::NAN),
        wp: v.wp.get(i).copied().unwrap_or(f64::NAN),
        wpa: v.wpa.get(i).copied().unwrap_or(f64::NAN),
        choice: v.choice.get(i).copied().unwrap_or(f64::NAN),
        execution: v.execution.get(i).copied().unwrap_or(f64::NAN),
        tags: p.tags.names.iter().enumerate().map(|(t, n)| (n.clone(), p.tags.value(t, i).unwrap_or("").to_string())).collect(),
    }
}

/// The dropbacks behind a split: in situation `s`, by `passer` (any when
/// None), counted by `metric` (every dropback when None), in game order.
pub fn play_list(p: &Plays, v: &SnapValues, s: &Situation, passer: Option<&str>, metric: Option<&MetricDef>) -> Vec<Snap> {
    play_indices(p, v, s, passer, metric).into_iter().map(|i| snap_at(p, v, i)).collect()
}

/// The positions of `play_list`'s snaps (ascending), without writing them
/// out: a page of a long list writes only its own snaps.
pub fn play_indices(p: &Plays, v: &SnapValues, s: &Situation, passer: Option<&str>, metric: Option<&MetricDef>) -> Vec<usize> {
    let keep = |i: usize| p.dropback[i] && metric.is_none_or(|m| in_unit(p, v, m.unit, i)) && s.matches(p, v.wp, i);
    match passer {
        // His snaps first (one pass over a column of ids), then the filters
        // on those few.
        Some(name) => match p.passer_index(name) {
            Some(w) => p.passer.iter().enumerate().filter(|&(_, &x)| x == w).map(|(i, _)| i).filter(|&i| keep(i)).collect(),
            None => Vec::new(),
        },
        None => (0..p.len()).filter(|&i| keep(i)).collect(),
    }
}

/// Every snap of one game, in order (for the game-flow page).
pub fn game_snaps(p: &Plays, v: &SnapValues, game: usize) -> Vec<Snap> {
    let g = &p.games[game];
    (g.start..g.end).map(|i| snap_at(p, v, i)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spots_in_coaching_notation() {
        assert_eq!(coach_spot(35), "-35");
        assert_eq!(coach_spot(80), "+20");
        assert_eq!(coach_spot(50), "50");
        assert_eq!(coach_spot(1), "-1");
        assert_eq!(coach_spot(99), "+1");
    }

    #[test]
    fn quarters_spell_overtime() {
        assert_eq!(quarter(4), "Q4");
        assert_eq!(quarter(5), "OT");
        assert_eq!(quarter(6), "OT2");
    }

    #[test]
    fn down_and_distance() {
        assert_eq!(down_distance(3, 7, 40), "3rd & 7");
        assert_eq!(down_distance(1, 5, 95), "1st & goal");
        assert_eq!(down_distance(0, 0, 35), "");
    }
}
