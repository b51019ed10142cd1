//! Hand-made play rows for small fixture leagues: one plain throw that
//! each test changes where its story needs (`PlayRow { .., ..throw(..) }`),
//! and the rows as `Plays` with their source rows numbered from 1.

use lategame::playfile::{Kind, PlayRow};
use lategame::plays::{Plays, Source};

/// A 1st-and-10 throw from the own 30 at 13:20 of the 1st, tied, both
/// sides with three timeouts, by `passer` of `offense` (the home team)
/// against `defense`, season 2020 week 1: caught for 5 yards, 5 in the air.
pub fn throw(game: &str, seq: i32, offense: &str, defense: &str, passer: &str) -> PlayRow {
    PlayRow {
        game: game.into(),
        season: 2020,
        week: 1,
        home: offense.into(),
        away: defense.into(),
        seq,
        period: 1,
        clock: 800,
        offense: offense.into(),
        defense: defense.into(),
        off_score: 0,
        def_score: 0,
        off_timeouts: 3,
        def_timeouts: 3,
        down: Some(1),
        to_go: Some(10),
        ball_on: 30,
        kind: Kind::Pass,
        passer: Some(passer.into()),
        complete: Some(true),
        intercepted: Some(false),
        air_yards: Some(5),
        gain: Some(5),
        fumble_lost: Some(false),
        touchback: None,
        points: 0,
        home_line: Some(0.0),
    }
}

/// The row moved to 5:00 of the 4th (end of game while tied).
pub fn late(row: PlayRow) -> PlayRow {
    PlayRow { period: 4, clock: 300, ..row }
}

/// The rows as `Plays`, from a file named `file`.
pub fn plays(file: &str, rows: &[PlayRow]) -> Plays {
    let sources = (0..rows.len()).map(|i| Source { file: 0, row: i as u32 + 1 }).collect();
    Plays::from_rows(vec![file.into()], rows, sources)
}
