//! The play file's column layout: the columns in file order (`COLUMNS`), one
//! snap as the file holds it (`PlayRow`), what happened on it (`Kind`), and
//! the clock's spelling. The bottom layer: imports nothing from the crate.

use serde::{Deserialize, Serialize};

/// What happened on a snap. The spelling in the file is `Kind::as_str`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, PartialOrd, Ord)]
#[serde(rename_all = "snake_case")]
pub enum Kind {
    Pass,
    Sack,
    Scramble,
    Run,
    Punt,
    FieldGoal,
    Kickoff,
    ExtraPoint,
    TwoPoint,
    Kneel,
    Spike,
    Penalty,
}

impl Kind {
    pub const ALL: [Kind; 12] = [
        Kind::Pass,
        Kind::Sack,
        Kind::Scramble,
        Kind::Run,
        Kind::Punt,
        Kind::FieldGoal,
        Kind::Kickoff,
        Kind::ExtraPoint,
        Kind::TwoPoint,
        Kind::Kneel,
        Kind::Spike,
        Kind::Penalty,
    ];

    pub fn as_str(self) -> &'static str {
        match self {
            Kind::Pass => "pass",
            Kind::Sack => "sack",
            Kind::Scramble => "scramble",
            Kind::Run => "run",
            Kind::Punt => "punt",
            Kind::FieldGoal => "field_goal",
            Kind::Kickoff => "kickoff",
            Kind::ExtraPoint => "extra_point",
            Kind::TwoPoint => "two_point",
            Kind::Kneel => "kneel",
            Kind::Spike => "spike",
            Kind::Penalty => "penalty",
        }
    }

    pub fn parse(s: &str) -> Option<Kind> {
        Kind::ALL.iter().copied().find(|k| k.as_str() == s)
    }

    /// Pass, sack or scramble: the passer dropped back.
    pub fn is_dropback(self) -> bool {
        matches!(self, Kind::Pass | Kind::Sack | Kind::Scramble)
    }

    /// Snaps that carry no down: kickoffs and tries.
    pub fn is_downless(self) -> bool {
        matches!(self, Kind::Kickoff | Kind::ExtraPoint | Kind::TwoPoint)
    }

    pub fn is_try(self) -> bool {
        matches!(self, Kind::ExtraPoint | Kind::TwoPoint)
    }

    /// Kinds that must name a passer.
    pub fn needs_passer(self) -> bool {
        matches!(self, Kind::Pass | Kind::Sack | Kind::Scramble | Kind::Spike)
    }
}

/// The columns of the play file, in the order we write them.
/// `required` columns must be present in every file; optional ones may be
/// absent entirely (then every row reads as empty).
pub struct ColumnSpec {
    pub name: &'static str,
    pub required: bool,
}

pub const COLUMNS: &[ColumnSpec] = &[
    ColumnSpec { name: "game", required: true },
    ColumnSpec { name: "season", required: true },
    ColumnSpec { name: "week", required: true },
    ColumnSpec { name: "home", required: true },
    ColumnSpec { name: "away", required: true },
    ColumnSpec { name: "seq", required: true },
    ColumnSpec { name: "period", required: true },
    ColumnSpec { name: "clock", required: true },
    ColumnSpec { name: "offense", required: true },
    ColumnSpec { name: "defense", required: true },
    ColumnSpec { name: "off_score", required: true },
    ColumnSpec { name: "def_score", required: true },
    ColumnSpec { name: "off_timeouts", required: true },
    ColumnSpec { name: "def_timeouts", required: true },
    ColumnSpec { name: "down", required: true },
    ColumnSpec { name: "to_go", required: true },
    ColumnSpec { name: "ball_on", required: true },
    ColumnSpec { name: "kind", required: true },
    ColumnSpec { name: "passer", required: true },
    ColumnSpec { name: "complete", required: true },
    ColumnSpec { name: "intercepted", required: true },
    ColumnSpec { name: "air_yards", required: false },
    ColumnSpec { name: "gain", required: true },
    ColumnSpec { name: "fumble_lost", required: false },
    ColumnSpec { name: "touchback", required: false },
    ColumnSpec { name: "points", required: true },
    ColumnSpec { name: "home_line", required: false },
];

/// One snap exactly as the file holds it (after parsing). The simulator
/// produces these and `write_rows` writes them; the loader turns files into
/// the columnar `Plays`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PlayRow {
    pub game: String,
    pub season: i32,
    pub week: i32,
    pub home: String,
    pub away: String,
    pub seq: i32,
    pub period: i32,
    /// Seconds left in the period at the snap.
    pub clock: i32,
    pub offense: String,
    pub defense: String,
    pub off_score: i32,
    pub def_score: i32,
    pub off_timeouts: i32,
    pub def_timeouts: i32,
    pub down: Option<i32>,
    pub to_go: Option<i32>,
    pub ball_on: i32,
    pub kind: Kind,
    pub passer: Option<String>,
    pub complete: Option<bool>,
    pub intercepted: Option<bool>,
    pub air_yards: Option<i32>,
    pub gain: Option<i32>,
    pub fumble_lost: Option<bool>,
    pub touchback: Option<bool>,
    pub points: i32,
    pub home_line: Option<f64>,
}

/// `M:SS` for a number of seconds.
pub fn format_clock(secs: i32) -> String {
    format!("{}:{:02}", secs / 60, secs % 60)
}
