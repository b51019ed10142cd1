//! Overtime rule sets and which seasons play which (the staff's config,
//! `config`). A rule set says what ends an overtime, how long its period
//! is, and whether a period that ends level is a tie. The WP model solves
//! each set backward (`models::wp::drive::overtime`) and the simulator
//! plays it; seasons the config does not list play the default: a
//! touchdown on the first possession wins, a field goal gets one answer,
//! 10:00, a level period a tie.

pub mod config;

pub use config::{OvertimeConfig, OvertimeConfigError, SeasonRules};

use serde::{Deserialize, Serialize};

/// What decides an overtime.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Rule {
    /// A touchdown on the first possession wins; a field goal there gives
    /// the other side one possession to answer; then the next score wins.
    /// A defensive score ends it.
    TouchdownOrAnswer,
    /// The first score of any kind wins.
    FirstScoreWins,
    /// Both sides get a possession whatever the first one does (a
    /// touchdown too: it is followed by its try); then the next score wins.
    /// A defensive score ends it.
    BothPossess,
}

impl Rule {
    pub const ALL: [Rule; 3] = [Rule::TouchdownOrAnswer, Rule::FirstScoreWins, Rule::BothPossess];

    /// The name a config file uses.
    pub fn name(self) -> &'static str {
        match self {
            Rule::TouchdownOrAnswer => "touchdown-or-answer",
            Rule::FirstScoreWins => "first-score-wins",
            Rule::BothPossess => "both-possess",
        }
    }

    /// One line for pages and the report.
    pub fn describe(self) -> &'static str {
        match self {
            Rule::TouchdownOrAnswer => "a touchdown on the first possession wins, a field goal gets one answer, then the next score wins",
            Rule::FirstScoreWins => "the first score of any kind wins",
            Rule::BothPossess => "both sides get a possession, then the next score wins",
        }
    }

    pub fn from_name(s: &str) -> Option<Rule> {
        Rule::ALL.into_iter().find(|r| r.name() == s)
    }
}

/// Seconds of the default overtime period (10:00).
pub const DEFAULT_PERIOD_SECS: i32 = 600;
/// Bounds of a period (a play file's clock runs 0:00 to 15:00) and the step
/// it is counted in (the WP grid's 5 s).
pub const MIN_PERIOD_SECS: i32 = 60;
pub const MAX_PERIOD_SECS: i32 = 900;
pub const PERIOD_STEP_SECS: i32 = 5;

/// One overtime rule set.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
pub struct Rules {
    pub rule: Rule,
    /// Seconds of an overtime period.
    pub period_secs: i32,
    /// A period that ends level is a tie (else another period is played;
    /// a period that ends with one side ahead always ends the game).
    pub ties: bool,
}

impl Default for Rules {
    fn default() -> Rules {
        Rules { rule: Rule::TouchdownOrAnswer, period_secs: DEFAULT_PERIOD_SECS, ties: true }
    }
}

impl Rules {
    /// "first-score-wins, 15:00, level is a tie".
    pub fn label(&self) -> String {
        let (m, s) = (self.period_secs / 60, self.period_secs % 60);
        let end = if self.ties { "a level period is a tie" } else { "a level period is followed by another" };
        format!("{}, {m}:{s:02}, {end}", self.rule.name())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip_and_the_default_is_todays_set() {
        for r in Rule::ALL {
            assert_eq!(Rule::from_name(r.name()), Some(r));
        }
        assert_eq!(Rule::from_name("sudden"), None);
        let d = Rules::default();
        assert_eq!((d.rule, d.period_secs, d.ties), (Rule::TouchdownOrAnswer, 600, true));
        assert_eq!(d.label(), "touchdown-or-answer, 10:00, a level period is a tie");
    }
}
