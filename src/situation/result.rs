//! Play results a situation can be narrowed to (`result=interception`), so a
//! number's link opens exactly the snaps it counts.

use crate::playfile::Kind;
use crate::plays::Plays;
use serde::Serialize;

/// What a snap ended in. A snap may be several (a touchdown pass is a
/// completion too); a filter with several results keeps a snap that is any.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
pub enum PlayResult {
    Completion,
    Incompletion,
    Interception,
    Sack,
    Scramble,
    TouchdownPass,
    Touchdown,
    FirstDown,
    FumbleLost,
}

/// Each result: its key, what it means, and the count metrics (by key) whose
/// snaps are exactly the dropbacks with this result.
pub const RESULTS: &[(PlayResult, &str, &str, &[&str])] = &[
    (PlayResult::Completion, "completion", "a caught pass", &["completions"]),
    (PlayResult::Incompletion, "incompletion", "a pass not caught (interceptions excluded)", &[]),
    (PlayResult::Interception, "interception", "a pass intercepted", &["int"]),
    (PlayResult::Sack, "sack", "the passer sacked", &["sacks"]),
    (PlayResult::Scramble, "scramble", "the passer ran on a called pass", &["scrambles"]),
    (PlayResult::TouchdownPass, "touchdown-pass", "a caught pass that scored", &["td"]),
    (PlayResult::Touchdown, "touchdown", "any offensive touchdown", &[]),
    (PlayResult::FirstDown, "first-down", "gained the line to gain or scored, without a turnover (penalties aside)", &[]),
    (PlayResult::FumbleLost, "fumble-lost", "a fumble the defense recovered", &[]),
];

impl PlayResult {
    pub fn key(self) -> &'static str {
        RESULTS.iter().find(|r| r.0 == self).map(|r| r.1).unwrap_or("")
    }

    pub fn parse(s: &str) -> Option<PlayResult> {
        let s = s.trim();
        RESULTS.iter().find(|r| r.1.eq_ignore_ascii_case(s)).map(|r| r.0)
    }

    /// The result whose snaps a count metric counts, if there is one.
    pub fn counted_by(metric_key: &str) -> Option<PlayResult> {
        RESULTS.iter().find(|r| r.3.contains(&metric_key)).map(|r| r.0)
    }

    /// Every key, comma-separated (help text and errors).
    pub fn keys() -> String {
        RESULTS.iter().map(|r| r.1).collect::<Vec<_>>().join(", ")
    }

    /// Did snap `i` end this way?
    pub fn of(self, p: &Plays, i: usize) -> bool {
        let k = p.kind[i];
        let caught = k == Kind::Pass && p.complete[i] && !p.intercepted[i];
        match self {
            PlayResult::Completion => k == Kind::Pass && p.complete[i],
            PlayResult::Incompletion => k == Kind::Pass && !p.complete[i] && !p.intercepted[i],
            PlayResult::Interception => k == Kind::Pass && p.intercepted[i],
            PlayResult::Sack => k == Kind::Sack,
            PlayResult::Scramble => k == Kind::Scramble,
            PlayResult::TouchdownPass => k == Kind::Pass && p.complete[i] && p.points[i] == 6,
            PlayResult::Touchdown => p.points[i] == 6 && !k.is_try(),
            PlayResult::FirstDown => {
                let gained = matches!(k, Kind::Run | Kind::Scramble) || caught;
                (1..=4).contains(&p.down[i])
                    && !p.intercepted[i]
                    && !p.fumble_lost[i]
                    && gained
                    && (p.points[i] == 6 || p.gain[i] >= p.to_go[i])
            }
            PlayResult::FumbleLost => p.fumble_lost[i],
        }
    }
}
