//! The final seconds of a half and of regulation, from the clock and the
//! kicking game rather than from the fits. Two facts a staff knows:
//!
//! - **A kick now is always there.** The offense can kick on any down,
//!   so its WP is at least what a kick now is worth: the make's share of
//!   the game after a kickoff to the other side, the miss's share of the
//!   other side's ball at the spot of the kick (both valued as
//!   possessions by the drive table, `wp::drive::DriveTable`).
//! - **The last snap.** When less time is left than a snap takes even
//!   when the clock stops after it, no snap follows this one: WP is the
//!   better of a kick and a shot at the end zone, each worth its chance of
//!   success times the result it leaves (a level game goes on at ½), and
//!   a try's is the better try's. EP there is the points of the play a
//!   staff runs: at the end of the 4th period the one WP prefers (a
//!   leader kneels), elsewhere the one worth more points.
//! - **The final snaps at the goal line.** Inside the final 0:40 near the
//!   goal line the snaps left are few and counted: on each down a kick
//!   now or a shot at the end zone, a miss stopping the clock or not
//!   (`Finish::final_snaps`). The fitted WP read 0.92 behind by 3 at the
//!   3 with 14 s and no timeouts (the oracle 0.53). EP there is the
//!   points those snaps score (`Finish::final_points`).
//!
//! Held out by season, the fitted WP alone valued a field goal try with a
//! second left, behind by 2 at the opponent's 18, at 0.18 (the oracle
//! 0.96), and behind by 3 at the 1 with 2 s left at 0.87 (oracle 0.48).
//!
//! The chances come from the file: a field goal's make by yards to the
//! goal line, a touchdown on a dropback in a half's final seconds by yards
//! to go, the tries' success. The seconds a snap and a kick take are read
//! from its clock.

use crate::playfile::Kind;
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Seconds left in regulation from which a kick now is a floor. It holds
/// at any time, but valued by the drive table alone it is no better than
/// the fit before the final minutes: held out by season (seeds 7 / 101 /
/// 202), the mean squared distance to the oracle was 0.00591 / 0.00598 /
/// 0.00548 from the final 2:00, 0.00592 / 0.00600 / 0.00548 over the whole
/// 4th period (without the rules, 0.00599 / 0.00613 / 0.00576).
const FLOOR_SECS: f64 = 120.0;
/// Seconds before `FLOOR_SECS` over which the floor comes in (a share of
/// what it adds), so WP takes no step where it starts.
const FLOOR_IN_SECS: f64 = 30.0;
/// Seconds over which the last-snap value takes over from the fitted WP
/// (with its kick-now floor) above `Finish::one_snap_secs`: no step in WP
/// at that second.
const LAST_IN_SECS: f64 = 5.0;
/// A dropback counts as a shot at the end zone in this many final seconds
/// of the 2nd or 4th period.
const SHOT_SECS: i32 = 10;
/// Yards to the goal line a shot is counted from at most.
const SHOT_YARDS: i32 = 50;
/// Fewer shots than this: every dropback's touchdowns are read instead.
const MIN_SHOTS: usize = 100;
/// Fewer field goal tries than this: no final-seconds rules (`estimate`).
const MIN_KICKS: usize = 30;
/// Where a missed field goal leaves the ball: the other side's at the spot
/// of the kick, seven yards behind the line (common practice, no source),
/// but at its own 20 at least.
const HOLD_YARDS: i32 = 7;
const MISS_AT_LEAST: i32 = 20;
/// The clock defaults when the file has no clean pairs: seconds a snap
/// takes when an incomplete pass stops the clock, and a field goal.
const DEFAULT_SNAP_SECS: f64 = 4.0;
const DEFAULT_KICK_SECS: f64 = 5.0;
/// League try values when the file has none of a kind (from memory).
const DEFAULT_EXTRA_POINT: f64 = 0.94;
const DEFAULT_TWO_POINT: f64 = 0.48;
/// The final snaps at the goal line (`Finish::final_snaps`): from 0:40 left
/// they come in, all of them from 0:30; and from the opponent's 25 in, all
/// of them from the 15.
const SNAPS_FROM_SECS: f64 = 40.0;
const SNAPS_FULL_SECS: f64 = 30.0;
const SNAPS_FROM_BALL_ON: f64 = 75.0;
const SNAPS_FULL_BALL_ON: f64 = 85.0;
/// The dropbacks the final snaps' outcomes are read from: in a half's
/// final 2:00 from the opponent's 30 in (of an offense behind or level in
/// the 4th period).
const SNAPS_READ_SECS: i32 = 120;
const SNAPS_READ_BALL_ON: i32 = 70;
/// Fewer such dropbacks, or clock gaps, than this: the defaults below.
const MIN_SNAP_READS: usize = 30;
/// Defaults for a file without enough of them (from memory): of the
/// dropbacks that do not score, the share incomplete and intercepted; the
/// seconds to the next snap after one that keeps the clock running,
/// without a timeout and with one.
const DEFAULT_INCOMPLETE: f64 = 0.4;
const DEFAULT_INTERCEPTED: f64 = 0.03;
const DEFAULT_RUN_SECS: f64 = 16.0;
const DEFAULT_STOP_SECS: f64 = 9.0;
/// The timeouts EP's final snaps assume without such snaps to read them
/// from (EP reads no timeouts; from memory).
const DEFAULT_EP_TIMEOUTS: i32 = 1;

/// The chances and clock the final seconds are valued with.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Finish {
    /// Logit of a field goal's make on `[1, y / 10, (y / 10)²]`, `y` the
    /// yards from the line of scrimmage to the goal line.
    pub kick: [f64; 3],
    /// Logit of a touchdown on a dropback on `[1, y]` (read from dropbacks
    /// within `SHOT_YARDS`). On the demo league's 224 shots, `[1, ln y]`
    /// put a shot from the 1 at 0.63, where those from the 5 or nearer
    /// scored 6 times in 18; `[1, y]`, 0.41.
    pub shot: [f64; 2],
    /// Seconds a snap takes when the clock stops after it (the 10th
    /// percentile of incomplete passes followed by a snap of the same
    /// offense): with no more left, no snap follows.
    pub one_snap_secs: f64,
    /// Seconds a field goal try takes (the median).
    pub kick_secs: f64,
    /// Success of an extra point and of a two-point try.
    pub extra_point: f64,
    pub two_point: f64,
    /// Of the dropbacks at the goal line late that do not score
    /// (`SNAPS_READ_*`), the share incomplete (the clock stops) and
    /// intercepted; the rest keep the clock running.
    #[serde(default = "default_incomplete")]
    pub incomplete: f64,
    #[serde(default = "default_intercepted")]
    pub intercepted: f64,
    /// Seconds from such a dropback that keeps the clock running to the
    /// next snap (the median), when the offense has no timeout left and
    /// when it has one (it is taken).
    #[serde(default = "default_run_secs")]
    pub run_secs: f64,
    #[serde(default = "default_stop_secs")]
    pub stop_secs: f64,
    /// The timeouts EP's final snaps assume (`final_points`; EP reads
    /// none): the median an offense held at the snaps the final snaps
    /// value, in the file.
    #[serde(default = "default_ep_timeouts")]
    pub ep_timeouts: i32,
}

fn default_ep_timeouts() -> i32 {
    DEFAULT_EP_TIMEOUTS
}

fn default_incomplete() -> f64 {
    DEFAULT_INCOMPLETE
}
fn default_intercepted() -> f64 {
    DEFAULT_INTERCEPTED
}
fn default_run_secs() -> f64 {
    DEFAULT_RUN_SECS
}
fn default_stop_secs() -> f64 {
    DEFAULT_STOP_SECS
}

/// A snap as the final-seconds rules read it, from the offense's side.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Late {
    /// Before the try, for a try.
    pub margin: f64,
    /// Seconds left in regulation.
    pub secs: f64,
    pub ball_on: i32,
    pub is_try: bool,
}

/// What the final snaps' outcomes are worth, to `Finish::best_of_snaps`:
/// the game's (or the half's) end, a kick with `secs` left, a touchdown
/// with `secs` left after it, the other side's ball with `secs` left.
struct Worth<K, S, O> {
    end: f64,
    kick: K,
    scored: S,
    over: O,
}

fn sigmoid(x: f64) -> f64 {
    1.0 / (1.0 + (-x).exp())
}

/// The offense's result when the game ends at `margin`: 1, ½ or 0.
fn end(margin: i32) -> f64 {
    match margin {
        m if m > 0 => 1.0,
        0 => 0.5,
        _ => 0.0,
    }
}

impl Finish {
    /// P(a field goal try from `y` yards to the goal line is good).
    pub fn kick_prob(&self, y: f64) -> f64 {
        let x = y / 10.0;
        sigmoid(self.kick[0] + self.kick[1] * x + self.kick[2] * x * x)
    }

    /// P(one dropback from `y` yards to the goal line scores a touchdown).
    pub fn shot_prob(&self, y: f64) -> f64 {
        sigmoid(self.shot[0] + self.shot[1] * y)
    }

    /// The offense's result when a touchdown on the last snap leaves it
    /// `margin` before the try, with no time left: the better try.
    fn after_touchdown(&self, margin: i32) -> f64 {
        let (one, two) = (end(margin + 1), end(margin + 2));
        let miss = end(margin);
        (self.extra_point * one + (1.0 - self.extra_point) * miss).max(self.two_point * two + (1.0 - self.two_point) * miss)
    }

    /// WP when no snap follows this one: the better of a kick and a shot.
    /// A staff behind by 3 at the 1 may kick to level where a shot would
    /// be worth more; the better value keeps WP from rising as the margin
    /// falls (with a shot likelier than ½ of a kick, behind by 4 would
    /// otherwise be worth more than behind by 3).
    pub fn last_snap(&self, margin: i32, ball_on: i32) -> f64 {
        let (kick, shot) = self.last_options(margin, f64::from((100 - ball_on).max(1)));
        kick.max(shot)
    }

    /// WP after a kick and after a shot on the last snap, `margin` as it
    /// stands, `y` yards out.
    fn last_options(&self, margin: i32, y: f64) -> (f64, f64) {
        let (p, q) = (self.kick_prob(y), self.shot_prob(y));
        let kick = p * end(margin + 3) + (1.0 - p) * end(margin);
        let shot = q * self.after_touchdown(margin + 6) + (1.0 - q) * end(margin);
        (kick, shot)
    }

    /// Seconds left from which the last snap's value starts to take over.
    pub fn last_from_secs(&self) -> f64 {
        self.one_snap_secs + LAST_IN_SECS
    }

    /// How far the last snap's value has taken over at `secs` left (0 to
    /// 1): all of it in the final `one_snap_secs`, none `LAST_IN_SECS`
    /// before them.
    pub fn last_weight(&self, secs: f64) -> f64 {
        ((self.one_snap_secs + LAST_IN_SECS - secs) / LAST_IN_SECS).clamp(0.0, 1.0)
    }

    /// The points a last snap at `ball_on` is expected to score, for a
    /// touchdown worth `td_value` with its try, the offense `margin` ahead
    /// in `period`. At the end of regulation (the 4th period) the play WP
    /// prefers (`last_snap`'s; a leader kneels: 0; behind by more than 3, a
    /// shot); at the end of the 1st
    /// half, in overtime and where the score is not told (EP's neutral
    /// score and period, the 1st), the play worth more points: a kick, a
    /// shot or a kneel.
    pub fn last_points(&self, period: i32, margin: i32, ball_on: i32, td_value: f64) -> f64 {
        let y = f64::from((100 - ball_on).max(1));
        let (kick, shot) = (3.0 * self.kick_prob(y), td_value * self.shot_prob(y));
        if period != 4 {
            return kick.max(shot).max(0.0);
        }
        if margin > 0 {
            return 0.0;
        }
        // Behind by more than a kick makes up, a shot, even when nothing
        // helps (the demo league's offenses behind by 9 or more threw on
        // their last snap in every case in the opponent's 40-21).
        let (kick_wp, shot_wp) = self.last_options(margin, y);
        if margin >= -3 && kick_wp >= shot_wp {
            kick
        } else {
            shot
        }
    }

    /// What a field goal try now is worth: the other side's possession
    /// after it valued by `other` (its WP from its margin, the seconds left
    /// and where it starts: the `receive_at` line after a make's kickoff,
    /// the spot of the kick after a miss), or the result with no time left.
    pub fn kick_now(&self, s: &Late, receive_at: f64, other: impl Fn(f64, f64, f64) -> f64) -> f64 {
        let m = s.margin.round() as i32;
        let p = self.kick_prob(f64::from((100 - s.ball_on).max(1)));
        let after = s.secs - self.kick_secs;
        let (make, miss) = if after <= 0.0 {
            (end(m + 3), end(m))
        } else {
            let spot = (100 - s.ball_on + HOLD_YARDS).clamp(MISS_AT_LEAST, 99);
            (
                1.0 - other(-f64::from(m + 3), after, receive_at),
                1.0 - other(-f64::from(m), after, f64::from(spot)),
            )
        };
        p * make + (1.0 - p) * miss
    }

    /// What the better try is worth (a try takes no time): its chance
    /// times the game after it, the other side receiving the kickoff
    /// (valued by `other`, as in `kick_now`), or its result with no time
    /// left. `margin` is the offense's before the try.
    pub fn try_now(&self, s: &Late, receive_at: f64, other: impl Fn(f64, f64, f64) -> f64) -> f64 {
        let m = s.margin.round() as i32;
        let after = |x: i32| if s.secs <= 0.0 { end(x) } else { 1.0 - other(-f64::from(x), s.secs, receive_at) };
        let miss = after(m);
        let one = self.extra_point * after(m + 1) + (1.0 - self.extra_point) * miss;
        let two = self.two_point * after(m + 2) + (1.0 - self.two_point) * miss;
        one.max(two)
    }

    /// How far the final snaps' value has taken over at `secs` left and
    /// `ball_on` (0 to 1): none before 0:40 or outside the opponent's 25.
    pub fn snaps_weight(&self, secs: f64, ball_on: i32) -> f64 {
        let t = ((SNAPS_FROM_SECS - secs) / (SNAPS_FROM_SECS - SNAPS_FULL_SECS)).clamp(0.0, 1.0);
        let z = ((f64::from(ball_on) - SNAPS_FROM_BALL_ON) / (SNAPS_FULL_BALL_ON - SNAPS_FROM_BALL_ON)).clamp(0.0, 1.0);
        t * z
    }

    /// How far EP's final snaps (`final_points`) have taken over for an
    /// offense `margin` ahead in `period`: at the end of the 1st half, and
    /// at the end of regulation behind or level (a leader runs the clock:
    /// the fit's score terms), as `snaps_weight`; 0 elsewhere.
    pub fn points_weight(&self, period: i32, margin: i32, secs: f64, ball_on: i32) -> f64 {
        if period == 2 || (period == 4 && margin <= 0) {
            self.snaps_weight(secs, ball_on)
        } else {
            0.0
        }
    }

    /// WP from the final snaps at the goal line, by backward induction:
    /// on each down a kick now or a shot at the end zone, whichever is
    /// worth more. A shot scores with `shot_prob` (then the better try
    /// with the time left); else it is incomplete (the clock stops, a snap
    /// later the next down), intercepted (the other side's ball at the
    /// spot), or it keeps the clock running (a timeout taken if one is
    /// left, `stop_secs`; else `run_secs`). A 4th down that fails hands
    /// the other side the ball at the spot. The ball stays where it is (a
    /// short gain is no touchdown). `other` values the other side's
    /// possessions, as in `kick_now`; `timeouts` are the offense's.
    pub fn final_snaps(&self, s: &Late, down: i32, timeouts: i32, receive_at: f64, other: &impl Fn(f64, f64, f64) -> f64) -> f64 {
        let m = s.margin.round() as i32;
        // Yards to the goal line, and the other side's own yard line when
        // it takes the ball here.
        let y = f64::from((100 - s.ball_on).max(1));
        let worth = Worth {
            end: end(m),
            kick: |secs: f64| self.kick_now(&Late { secs, ..*s }, receive_at, other),
            scored: |after: f64| {
                let at = Late { margin: f64::from(m + 6), secs: after.max(0.0), ball_on: s.ball_on, is_try: true };
                self.try_now(&at, receive_at, other)
            },
            over: |secs: f64| if secs <= 0.0 { end(m) } else { 1.0 - other(-f64::from(m), secs, y) },
        };
        self.best_of_snaps(&worth, self.shot_prob(y), down, timeouts, s.secs)
    }

    /// The points the final snaps at the goal line are expected to score
    /// (as `final_snaps`, each down the kick or the shot worth more points,
    /// a touchdown worth `td_value`; an interception or a failed 4th down
    /// scores nothing), for an offense holding `ep_timeouts`. EP's value
    /// there at the end of the 1st half, and at the end of regulation for
    /// an offense behind or level.
    pub fn final_points(&self, ball_on: i32, secs: f64, down: i32, td_value: f64) -> f64 {
        let y = f64::from((100 - ball_on).max(1));
        let kick = 3.0 * self.kick_prob(y);
        let worth = Worth { end: 0.0, kick: |_: f64| kick, scored: |_: f64| td_value, over: |_: f64| 0.0 };
        self.best_of_snaps(&worth, self.shot_prob(y), down, self.ep_timeouts, secs)
    }

    /// The backward induction of `final_snaps` and `final_points` from
    /// `down` with `timeouts` and `secs` left, a shot scoring with `p`,
    /// each outcome worth what `worth` says.
    fn best_of_snaps<K, S, O>(&self, worth: &Worth<K, S, O>, p: f64, down: i32, timeouts: i32, secs: f64) -> f64
    where
        K: Fn(f64) -> f64,
        S: Fn(f64) -> f64,
        O: Fn(f64) -> f64,
    {
        if secs <= 0.0 {
            return worth.end;
        }
        let next = |t: f64, to: i32| {
            if down >= 4 {
                (worth.over)(t)
            } else if t <= 0.0 {
                worth.end
            } else {
                self.best_of_snaps(worth, p, down + 1, to, t)
            }
        };
        let after = secs - self.one_snap_secs;
        let running = if timeouts > 0 { next(secs - self.stop_secs, timeouts - 1) } else { next(secs - self.run_secs, 0) };
        let missed = self.incomplete * next(after, timeouts)
            + self.intercepted * (worth.over)(after)
            + (1.0 - self.incomplete - self.intercepted) * running;
        (worth.kick)(secs).max(p * (worth.scored)(after) + (1.0 - p) * missed)
    }

    /// `wp` (the fitted WP of a snap in the 4th period of regulation)
    /// with the final seconds' rules: no lower than a kick now in the
    /// final `FLOOR_SECS` (coming in over `FLOOR_IN_SECS` before them); in
    /// the final `one_snap_secs` the last snap's value, or a try's (each
    /// coming in over `LAST_IN_SECS` before them). Every piece rises with
    /// the margin, so WP still does.
    pub fn apply(&self, s: &Late, receive_at: f64, other: impl Fn(f64, f64, f64) -> f64, wp: f64) -> f64 {
        let w = self.last_weight(s.secs);
        if s.is_try {
            return if w == 0.0 { wp } else { w * self.try_now(s, receive_at, other) + (1.0 - w) * wp };
        }
        let f = ((FLOOR_SECS + FLOOR_IN_SECS - s.secs) / FLOOR_IN_SECS).clamp(0.0, 1.0);
        if f == 0.0 {
            return wp;
        }
        let held = wp + f * (self.kick_now(s, receive_at, other) - wp).max(0.0);
        if w == 0.0 {
            return held;
        }
        w * self.last_snap(s.margin.round() as i32, s.ball_on) + (1.0 - w) * held
    }

    /// Read from the snaps among `rows`; `None` with fewer than
    /// `MIN_KICKS` field goal tries.
    pub fn estimate(plays: &Plays, rows: &[u32]) -> Option<Finish> {
        let yards = |i: usize| f64::from((100 - plays.ball_on[i]).max(1));
        let kicks: Vec<u32> = rows.iter().copied().filter(|&i| plays.kind[i as usize] == Kind::FieldGoal).collect();
        if kicks.len() < MIN_KICKS {
            return None;
        }
        let made: Vec<f64> = kicks.iter().map(|&i| f64::from(u8::from(plays.points[i as usize] == 3))).collect();
        let kick = fit_small(&kicks, &made, 3, |i, out| {
            let x = yards(i) / 10.0;
            out.copy_from_slice(&[1.0, x, x * x]);
        })?;
        let dropback = |i: usize| plays.dropback[i] && plays.down[i] > 0 && (100 - SHOT_YARDS..100).contains(&plays.ball_on[i]);
        let late = |i: usize| matches!(plays.period[i], 2 | 4) && plays.clock[i] <= SHOT_SECS;
        let mut shots: Vec<u32> = rows.iter().copied().filter(|&i| dropback(i as usize) && late(i as usize)).collect();
        if shots.len() < MIN_SHOTS {
            shots = rows.iter().copied().filter(|&i| dropback(i as usize)).collect();
        }
        let scored: Vec<f64> = shots.iter().map(|&i| f64::from(u8::from(plays.points[i as usize] == 6))).collect();
        let shot = fit_small(&shots, &scored, 2, |i, out| out.copy_from_slice(&[1.0, yards(i)]))?;
        let share = |kind: Kind, points: i32, default: f64| {
            let (mut n, mut good) = (0usize, 0usize);
            for &i in rows {
                if plays.kind[i as usize] == kind {
                    n += 1;
                    good += usize::from(plays.points[i as usize] == points);
                }
            }
            if n == 0 {
                default
            } else {
                good as f64 / n as f64
            }
        };
        let (one_snap_secs, kick_secs) = clock_of(plays, rows);
        let (incomplete, intercepted, run_secs, stop_secs) = goal_line_of(plays, rows);
        let ep_timeouts = ep_timeouts_of(plays, rows);
        Some(Finish {
            kick: [kick[0], kick[1], kick[2]],
            shot: [shot[0], shot[1]],
            one_snap_secs,
            kick_secs,
            extra_point: share(Kind::ExtraPoint, 1, DEFAULT_EXTRA_POINT),
            two_point: share(Kind::TwoPoint, 2, DEFAULT_TWO_POINT),
            incomplete,
            intercepted,
            run_secs,
            stop_secs,
            ep_timeouts,
        })
    }
}

/// The median timeouts an offense held at the snaps among `rows` the
/// final snaps value (the final 0:40 of the 2nd period or of the 4th,
/// behind or level, from the opponent's 25 in); `DEFAULT_EP_TIMEOUTS`
/// where fewer than `MIN_SNAP_READS`.
fn ep_timeouts_of(plays: &Plays, rows: &[u32]) -> i32 {
    let mut held: Vec<f64> = rows
        .iter()
        .map(|&r| r as usize)
        .filter(|&i| {
            plays.down[i] > 0
                && f64::from(plays.clock[i]) <= SNAPS_FROM_SECS
                && f64::from(plays.ball_on[i]) >= SNAPS_FROM_BALL_ON
                && (plays.period[i] == 2 || (plays.period[i] == 4 && plays.margin[i] <= 0))
        })
        .map(|i| f64::from(plays.off_timeouts[i].clamp(0, 3)))
        .collect();
    if held.len() < MIN_SNAP_READS {
        return DEFAULT_EP_TIMEOUTS;
    }
    quantile(&mut held, 0.5).map_or(DEFAULT_EP_TIMEOUTS, |x| x.round() as i32)
}

/// The final snaps' outcomes (`Finish::final_snaps`) from the dropbacks
/// among `rows` in a half's final 2:00 from the opponent's 30 in that did
/// not score, of an offense behind or level in the 4th period: the shares
/// incomplete and intercepted, and the seconds from one that kept the
/// clock running to the offense's next snap, without a timeout and with
/// one (medians). Defaults where fewer than `MIN_SNAP_READS`.
fn goal_line_of(plays: &Plays, rows: &[u32]) -> (f64, f64, f64, f64) {
    let (mut n, mut inc, mut int) = (0usize, 0usize, 0usize);
    let (mut run, mut stop) = (Vec::new(), Vec::new());
    for &r in rows {
        let i = r as usize;
        let read = plays.dropback[i]
            && plays.down[i] > 0
            && matches!(plays.period[i], 2 | 4)
            && plays.clock[i] <= SNAPS_READ_SECS
            && plays.ball_on[i] >= SNAPS_READ_BALL_ON
            && plays.points[i] != 6
            && (plays.period[i] == 2 || plays.margin[i] <= 0);
        if !read {
            continue;
        }
        n += 1;
        if plays.intercepted[i] {
            int += 1;
            continue;
        }
        if plays.kind[i] == Kind::Pass && !plays.complete[i] {
            inc += 1;
            continue;
        }
        // The offense's next snap in the same period: the clock it took.
        let j = i + 1;
        let same = j < plays.len()
            && plays.game[j] == plays.game[i]
            && plays.period[j] == plays.period[i]
            && plays.offense[j] == plays.offense[i]
            && plays.down[j] > 0;
        let took = if same { f64::from(plays.clock[i] - plays.clock[j]) } else { -1.0 };
        if took < 0.0 {
            continue;
        }
        if plays.off_timeouts[i] > 0 {
            stop.push(took);
        } else {
            run.push(took);
        }
    }
    let (incomplete, intercepted) = if n >= MIN_SNAP_READS {
        (inc as f64 / n as f64, int as f64 / n as f64)
    } else {
        (DEFAULT_INCOMPLETE, DEFAULT_INTERCEPTED)
    };
    let median = |v: &mut Vec<f64>, default: f64| if v.len() >= MIN_SNAP_READS { quantile(v, 0.5).unwrap_or(default) } else { default };
    (incomplete, intercepted, median(&mut run, DEFAULT_RUN_SECS), median(&mut stop, DEFAULT_STOP_SECS))
}

/// A small logistic fit (next to no penalty) of `y` on the `p` columns
/// `fill` writes for each of `rows`; `None` if it fails.
fn fit_small(rows: &[u32], y: &[f64], p: usize, fill: impl Fn(usize, &mut [f64]) + Sync) -> Option<Vec<f64>> {
    use super::logit::{fit_from, FitOptions, FnDesign, Labels};
    let design = FnDesign { rows, p, f: fill };
    let opts = FitOptions { l2: 1e-6, threads: 1, ..FitOptions::default() };
    fit_from(&design, Labels::Binary(y), None, &opts, None).ok().and_then(|f| f.coef.first().cloned())
}

/// The clock of `rows`: seconds from an incomplete pass to the next snap
/// of the same offense in the same period (10th percentile), and from a
/// field goal try to the next snap in the same period (median).
fn clock_of(plays: &Plays, rows: &[u32]) -> (f64, f64) {
    let mut snap = Vec::new();
    let mut kick = Vec::new();
    for &r in rows {
        let i = r as usize;
        let j = i + 1;
        if j >= plays.len() || plays.game[j] != plays.game[i] || plays.period[j] != plays.period[i] {
            continue;
        }
        let took = f64::from(plays.clock[i] - plays.clock[j]);
        if took < 0.0 {
            continue;
        }
        match plays.kind[i] {
            Kind::Pass if !plays.complete[i] && !plays.intercepted[i] && plays.offense[j] == plays.offense[i] && plays.down[j] > 0 => {
                snap.push(took)
            }
            Kind::FieldGoal => kick.push(took),
            _ => {}
        }
    }
    (quantile(&mut snap, 0.1).unwrap_or(DEFAULT_SNAP_SECS), quantile(&mut kick, 0.5).unwrap_or(DEFAULT_KICK_SECS))
}

/// The `q` quantile of `v` (the order statistic at `q` of the way), `None` if empty.
fn quantile(v: &mut [f64], q: f64) -> Option<f64> {
    if v.is_empty() {
        return None;
    }
    v.sort_by(f64::total_cmp);
    Some(v[((v.len() - 1) as f64 * q).round() as usize])
}

#[cfg(test)]
mod tests;
