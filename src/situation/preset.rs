//! The named windows a staff starts from (keys, labels, the filters each
//! stands for), in the order the pages list them.

use super::{Range, Situation, OT};
use serde::Serialize;

/// The named presets, in the order the pages list them.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Preset {
    /// 4th quarter with 7:30 or less, or overtime; within one score.
    EndOfGame,
    /// Last 2:00 of either half, tied or behind by up to one score.
    TwoMinuteDrill,
    /// 4th quarter with 4:00 or less, ahead.
    FourMinuteLead,
    /// End of game, 3rd and 4th downs.
    EndOfGameLateDowns,
    /// End of game, ball inside the opponent's 20.
    EndOfGameRedZone,
    /// End of game, ball at or inside the own 10.
    EndOfGameBackedUp,
    /// No restriction.
    EverySnap,
}

impl Preset {
    pub const ALL: [Preset; 7] = [
        Preset::EndOfGame,
        Preset::TwoMinuteDrill,
        Preset::FourMinuteLead,
        Preset::EndOfGameLateDowns,
        Preset::EndOfGameRedZone,
        Preset::EndOfGameBackedUp,
        Preset::EverySnap,
    ];

    /// The preset a page opens on when nothing is asked for.
    pub const DEFAULT: Preset = Preset::EndOfGame;
    /// The game-on-the-line situations: every preset but "every snap" (the
    /// baseline a passer's normal is taken over).
    pub fn situations() -> impl Iterator<Item = Preset> {
        Preset::ALL.into_iter().filter(|p| *p != Preset::EverySnap)
    }

    /// The key in links (`preset=end-of-game`).
    pub fn key(self) -> &'static str {
        match self {
            Preset::EndOfGame => "end-of-game",
            Preset::TwoMinuteDrill => "two-minute-drill",
            Preset::FourMinuteLead => "four-minute-lead",
            Preset::EndOfGameLateDowns => "end-of-game-3rd-4th",
            Preset::EndOfGameRedZone => "end-of-game-red-zone",
            Preset::EndOfGameBackedUp => "end-of-game-backed-up",
            Preset::EverySnap => "every-snap",
        }
    }

    /// The name on buttons, headings and the report.
    pub fn label(self) -> &'static str {
        match self {
            Preset::EndOfGame => "End of game, one score",
            Preset::TwoMinuteDrill => "Two-minute, tied or behind",
            Preset::FourMinuteLead => "Four-minute offense, ahead",
            Preset::EndOfGameLateDowns => "End of game, 3rd/4th down",
            Preset::EndOfGameRedZone => "End of game, red zone",
            Preset::EndOfGameBackedUp => "End of game, backed up",
            Preset::EverySnap => "Every snap",
        }
    }

    /// Does the one-score bound change this preset's window?
    pub fn uses_one_score(self) -> bool {
        !matches!(self, Preset::EverySnap | Preset::FourMinuteLead)
    }

    pub fn parse(s: &str) -> Option<Preset> {
        let s = s.trim();
        Preset::ALL.iter().copied().find(|p| p.key().eq_ignore_ascii_case(s))
    }

    /// Every key, comma-separated (for help text and errors).
    pub fn keys() -> String {
        Preset::ALL.iter().map(|p| p.key()).collect::<Vec<_>>().join(", ")
    }

    /// The filters this preset stands for, with `one_score` as the
    /// one-score bound (8 by default; 7 is the other common choice).
    pub fn situation(self, one_score: i32) -> Situation {
        let os = one_score as f64;
        let end = Situation {
            periods: Some(vec![4, OT]),
            game_secs: Some(Range::new(None, Some(450.0))),
            margin: Some(Range::new(Some(-os), Some(os))),
            ..Situation::default()
        };
        let mut s = match self {
            Preset::EndOfGame => end,
            Preset::TwoMinuteDrill => Situation {
                periods: Some(vec![2, 4]),
                half_secs: Some(Range::new(None, Some(120.0))),
                margin: Some(Range::new(Some(-os), Some(0.0))),
                ..Situation::default()
            },
            Preset::FourMinuteLead => Situation {
                periods: Some(vec![4]),
                game_secs: Some(Range::new(None, Some(240.0))),
                margin: Some(Range::new(Some(1.0), None)),
                ..Situation::default()
            },
            Preset::EndOfGameLateDowns => Situation { downs: Some(vec![3, 4]), ..end },
            Preset::EndOfGameRedZone => Situation { ball_on: Some(Range::new(Some(80.0), Some(99.0))), ..end },
            Preset::EndOfGameBackedUp => Situation { ball_on: Some(Range::new(Some(1.0), Some(10.0))), ..end },
            Preset::EverySnap => Situation::default(),
        };
        s.preset = Some(self);
        s.one_score = one_score;
        s
    }
}
