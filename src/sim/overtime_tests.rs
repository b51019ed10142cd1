//! The simulator plays each season's overtime rules (`crate::overtime`).

use super::*;
use crate::overtime::{OvertimeConfig, Rule, Rules, SeasonRules};
use crate::playfile::Kind;

/// One game's overtime: its snaps, and the final score, home first.
struct Ot<'a> {
    snaps: Vec<&'a PlayRow>,
    home: i32,
    away: i32,
}

/// Each game that went to overtime, by season.
fn overtimes(rows: &[PlayRow], season: i32) -> Vec<Ot<'_>> {
    let mut out: Vec<Ot> = Vec::new();
    let mut i = 0;
    while i < rows.len() {
        let j = (i..rows.len()).find(|&j| rows[j].game != rows[i].game).unwrap_or(rows.len());
        let g = &rows[i..j];
        if g[0].season == season && g.iter().any(|r| r.period >= 5) {
            let last = &g[g.len() - 1];
            let (mut off, mut def) = (last.off_score, last.def_score);
            if last.points > 0 {
                off += last.points;
            } else {
                def -= last.points;
            }
            let (home, away) = if last.offense == last.home { (off, def) } else { (def, off) };
            out.push(Ot { snaps: g.iter().filter(|r| r.period >= 5).collect(), home, away });
        }
        i = j;
    }
    out
}

#[test]
fn each_season_plays_its_overtime_rules() {
    let set = |from, to, rule, period_secs, ties| SeasonRules { from, to, rules: Rules { rule, period_secs, ties } };
    let cfg = OvertimeConfig {
        sets: vec![set(2020, 2021, Rule::FirstScoreWins, 900, true), set(2022, 2023, Rule::BothPossess, 600, false)],
    };
    let out = simulate_with_overtime(&SimConfig { seasons: 5, seed: 4, first_season: 2020 }, &LateShifts::default(), DefenseSpread::default(), &cfg, &|_, _| {});
    let rows = &out.rows;
    // First score wins, 15:00: the period starts at 15:00 and the first
    // score ends it (no two overtime scores, none but the last snap).
    let first: Vec<Ot> = (2020..=2021).flat_map(|s| overtimes(rows, s)).collect();
    assert!(first.len() >= 10, "{} overtimes", first.len());
    let mut fg_first = 0;
    for g in &first {
        assert_eq!(g.snaps[0].clock, 900);
        let scores: Vec<usize> = (0..g.snaps.len()).filter(|&k| g.snaps[k].points != 0).collect();
        assert!(scores.len() <= 1 && scores.iter().all(|&k| k == g.snaps.len() - 1));
        // A field goal by the side that had the ball first ends it too.
        let opener = g.snaps.iter().find(|r| r.down.is_some()).map(|r| r.offense.clone());
        if scores.len() == 1 && g.snaps[scores[0]].kind == Kind::FieldGoal && Some(&g.snaps[scores[0]].offense) == opener.as_ref() {
            let other_had_it = g.snaps.iter().any(|r| r.down.is_some() && Some(&r.offense) != opener.as_ref());
            fg_first += usize::from(!other_had_it);
        }
    }
    assert!(fg_first >= 1, "no first-possession field goal won a game");
    // Both possess, no ties: no game ends level; a side leading at the end
    // that had the ball first saw the other side have it (or won on a
    // defensive score); a first-possession touchdown is followed by a try.
    let both: Vec<Ot> = (2022..=2023).flat_map(|s| overtimes(rows, s)).collect();
    assert!(both.len() >= 10, "{} overtimes", both.len());
    let mut answered_td = 0;
    for g in &both {
        assert_ne!(g.home, g.away, "a tie under no ties");
        assert_eq!(g.snaps[0].clock, 600);
        let Some(opener) = g.snaps.iter().find(|r| r.down.is_some()).map(|r| r.offense.clone()) else { continue };
        let other_had_it = g.snaps.iter().any(|r| r.down.is_some() && r.offense != opener);
        let opener_home = opener == g.snaps[0].home;
        let opener_won = (g.home > g.away) == opener_home;
        let defensive_end = g.snaps.last().is_some_and(|r| r.points < 0);
        assert!(!opener_won || other_had_it || defensive_end, "the opener won without the other side's possession");
        if let Some(k) = g.snaps.iter().position(|r| r.points >= 6) {
            if g.snaps[k].offense == opener && !other_had_it {
                assert!(g.snaps.get(k + 1).is_some_and(|r| r.kind.is_try()), "no try after a first-possession touchdown");
            }
            answered_td += usize::from(g.snaps[k].offense == opener && other_had_it && g.snaps.iter().skip(k + 1).any(|r| r.down.is_some() && r.offense != opener));
        }
    }
    assert!(answered_td >= 1, "no first-possession touchdown was answered");
    // The default: 10:00, no try after an overtime touchdown, ties allowed.
    for g in overtimes(rows, 2024) {
        assert_eq!(g.snaps[0].clock, 600);
        assert!(g.snaps.iter().all(|r| !r.kind.is_try()));
        assert!(g.snaps.iter().all(|r| r.period == 5));
    }
}

#[test]
fn the_default_config_plays_as_before() {
    let cfg = SimConfig { seasons: 1, seed: 12, first_season: 2020 };
    let plain = simulate(&cfg);
    let spelled = OvertimeConfig { sets: vec![SeasonRules { from: 2000, to: 2030, rules: Rules::default() }] };
    let with = simulate_with_overtime(&cfg, &LateShifts::default(), DefenseSpread::default(), &spelled, &|_, _| {});
    assert!(plain.rows == with.rows);
}
