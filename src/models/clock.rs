//! Clock-kill states, from the clock rules rather than from a fit: the
//! leader has the ball late and can kneel until the game ends, whatever the
//! defense does with its timeouts. The seconds a kneel and the play clock
//! take are read from the file's own kneel-downs.

use crate::playfile::Kind;
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Play clock plus the kneel's own seconds used when a file has too few
/// clean kneel-to-snap pairs to tell (the professional play clock is 40 s;
/// from memory).
pub const DEFAULT_RUNOFF: f64 = 40.0;
/// Clean kneel-to-snap pairs needed before the file's own runoff is used.
const MIN_PAIRS: usize = 20;
/// Seconds a kneel is assumed to use: at least one (a snap that ends at
/// 0:01 still ends with time on the clock; one second is the least a snap
/// can take). Used for the last kneel and for kneels after a timeout.
pub const KNEEL_SECS: f64 = 1.0;
/// The two-minute warning (seconds left in the 2nd and 4th periods).
const WARNING_SECS: i32 = 120;

/// What the file implies about the clock between snaps.
#[derive(Debug, Clone, Copy, Serialize, Deserialize, PartialEq)]
pub struct ClockRules {
    /// Seconds from a kneel's snap to the next snap when nobody stops the
    /// clock: the kneel plus the play clock the offense lets run. The 10th
    /// percentile over the file's clean pairs (conservative: a leader is
    /// assumed to burn no more than nine in ten kneels did).
    pub runoff: f64,
    /// Clean kneel-to-snap pairs it was read from (0: `DEFAULT_RUNOFF`).
    pub pairs: usize,
}

impl Default for ClockRules {
    fn default() -> Self {
        ClockRules {
            runoff: DEFAULT_RUNOFF,
            pairs: 0,
        }
    }
}

impl ClockRules {
    /// Read from the kneels among `rows`: a kneel followed in the same game
    /// and period by a snap of the same offense with a down, neither side's
    /// timeouts used in between, not across the two-minute warning.
    pub fn from_plays(plays: &Plays, rows: &[u32]) -> ClockRules {
        let mut drops: Vec<f64> = rows
            .iter()
            .map(|&i| i as usize)
            .filter(|&i| {
                let j = i + 1;
                plays.kind[i] == Kind::Kneel
                    && j < plays.len()
                    && plays.game[j] == plays.game[i]
                    && plays.period[j] == plays.period[i]
                    && plays.offense[j] == plays.offense[i]
                    && plays.down[j] > 0
                    && plays.off_timeouts[j] == plays.off_timeouts[i]
                    && plays.def_timeouts[j] == plays.def_timeouts[i]
                    && plays.clock[j] > 0
                    && !(plays.clock[i] > WARNING_SECS && plays.clock[j] <= WARNING_SECS)
            })
            .map(|i| (plays.clock[i] - plays.clock[i + 1]) as f64)
            .filter(|&d| d > 0.0)
            .collect();
        if drops.len() < MIN_PAIRS {
            return ClockRules::default();
        }
        drops.sort_by(f64::total_cmp);
        ClockRules {
            runoff: drops[drops.len() / 10],
            pairs: drops.len(),
        }
    }

    /// Seconds the offense can surely burn by kneeling from `down` (1-4) on,
    /// against a defense with `def_timeouts` (each stops the clock after a
    /// kneel); in the 4th period above 2:00 the two-minute warning counts as
    /// one more stop.
    pub fn burnable(&self, down: i32, def_timeouts: i32, period: i32, clock: i32) -> f64 {
        let snaps = (5 - down).clamp(1, 4);
        let stops = def_timeouts.max(0) + i32::from(period >= 4 && clock > WARNING_SECS);
        let running = (snaps - 1 - stops).max(0);
        let stopped = snaps - 1 - running;
        running as f64 * self.runoff + stopped as f64 * KNEEL_SECS + KNEEL_SECS
    }

    /// The offense leads, has the ball on a down in the 4th period or
    /// overtime, and can kneel until the clock runs out (and a kneel cannot
    /// give up a safety that would matter: it leads by more than two or is
    /// outside its own 3).
    pub fn kneel_out(&self, s: &KillState) -> bool {
        s.period >= 4
            && s.down >= 1
            && s.margin > 0
            && (s.margin > 2 || s.ball_on >= 3)
            && (s.clock as f64) <= self.burnable(s.down, s.def_timeouts, s.period, s.clock)
    }

    /// Seconds beyond what the leader can burn (`clock - burnable`), or
    /// `None` when the offense does not lead with the ball in the 4th period
    /// or overtime.
    pub fn excess(&self, s: &KillState) -> Option<f64> {
        (s.period >= 4 && s.down >= 1 && s.margin > 0)
            .then(|| s.clock as f64 - self.burnable(s.down, s.def_timeouts, s.period, s.clock))
    }
}

/// The few facts a clock-kill decision needs, from the offense's side.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KillState {
    pub period: i32,
    /// Seconds left in the period.
    pub clock: i32,
    /// 0 on kickoffs and tries.
    pub down: i32,
    pub margin: i32,
    pub ball_on: i32,
    pub def_timeouts: i32,
}

#[cfg(test)]
mod tests {
    use super::*;

    fn st(clock: i32, down: i32, def_timeouts: i32) -> KillState {
        KillState {
            period: 4,
            clock,
            down,
            margin: 3,
            ball_on: 40,
            def_timeouts,
        }
    }

    /// Worked by hand with a 41-second runoff: 1st down, no timeouts: three
    /// running gaps and the last kneel, 3 × 41 + 1 = 124 s, but above 2:00 the
    /// warning stops one gap: 2 × 41 + 1 + 1 = 84 s, so 2:04 is not a
    /// kneel-out while 2:00 is. 2nd down, no timeouts: 2 × 41 + 1 = 83 s.
    #[test]
    fn burnable_by_hand() {
        let r = ClockRules {
            runoff: 41.0,
            pairs: 100,
        };
        assert_eq!(r.burnable(1, 0, 4, 100), 124.0);
        assert_eq!(r.burnable(1, 0, 4, 124), 84.0);
        assert!(r.kneel_out(&st(120, 1, 0)));
        assert!(!r.kneel_out(&st(124, 1, 0)));
        assert!(!r.kneel_out(&st(120, 1, 3)));
        assert!(r.kneel_out(&st(83, 2, 0)));
        assert!(!r.kneel_out(&st(84, 2, 0)));
        // Three timeouts stop every gap after a 1st-down kneel: 4 s.
        assert_eq!(r.burnable(1, 3, 4, 60), 4.0);
        // 4th down: one kneel, one second.
        assert!(r.kneel_out(&st(1, 4, 3)));
        assert!(!r.kneel_out(&st(2, 4, 0)));
        // 2nd down, one timeout: one running gap (41) and two kneels.
        assert_eq!(r.burnable(2, 1, 4, 60), 43.0);
        // Not the leader, not late, no down, a risky safety: never.
        assert!(!r.kneel_out(&KillState { margin: 0, ..st(10, 1, 0) }));
        assert!(!r.kneel_out(&KillState { period: 2, ..st(10, 1, 0) }));
        assert!(!r.kneel_out(&KillState { down: 0, ..st(10, 1, 0) }));
        assert!(!r.kneel_out(&KillState { margin: 2, ball_on: 1, ..st(10, 1, 0) }));
        assert!(r.kneel_out(&KillState { margin: 3, ball_on: 1, ..st(10, 1, 0) }));
    }
}
