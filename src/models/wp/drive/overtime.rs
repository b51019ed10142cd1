//! Overtime under modified sudden death, solved backward from the drive
//! model's possessions (`drive::DriveParams::plain`: outcome, next zone and
//! clock of a possession by start zone): a touchdown on the first
//! possession wins; a field goal there gives the other side one possession
//! to answer (a touchdown wins it, a field goal ties and play goes on as
//! sudden death, anything else loses); after a first possession without a
//! score, or a tie answered, the next score wins; a defensive score ends
//! it; a period of `OT_SPAN_SECS` ending level is a tie (½). The value is
//! P(the team with the ball wins) by phase × 5 s of period left × zone.

use super::{DriveParams, Outcome, NZ, STEP_SECS, ZONE_AT};

/// Seconds of an overtime period on the grid (beyond: clamped).
pub const OT_SPAN_SECS: i32 = 600;
const NT: usize = (OT_SPAN_SECS / STEP_SECS) as usize + 1;
/// Largest deficit a team answering a first-possession score can face
/// (a field goal is 3; a first-possession touchdown ends the game).
pub const MAX_ANSWER: i32 = 5;
/// A possession that gains this many points or more is a touchdown.
const TOUCHDOWN: i32 = 6;

/// Where an overtime stands for the team with the ball.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Phase {
    /// Level, and the other side has not had the ball.
    First,
    /// Trailing by 1..=MAX_ANSWER after the other side's first possession:
    /// this possession answers.
    Answer(i32),
    /// Level after both had the ball (or a scoreless first possession):
    /// the next score wins.
    Sudden,
}

const NPH: usize = 2 + MAX_ANSWER as usize;

fn ph(p: Phase) -> usize {
    match p {
        Phase::First => 0,
        Phase::Sudden => 1,
        Phase::Answer(d) => 1 + d.clamp(1, MAX_ANSWER) as usize,
    }
}

/// The phase's value if the period ends now.
fn at_end(p: Phase) -> f64 {
    match p {
        Phase::Answer(_) => 0.0,
        _ => 0.5,
    }
}

/// What a possession with margin change `swing` leads to: the game
/// decided (1 or 0 for the team that had the ball), or the phase of the
/// next possession's team, and whether that is the same team.
enum Next {
    Decided(f64),
    Goes(Phase, bool),
}

fn next(p: Phase, o: &Outcome) -> Next {
    let s = o.swing;
    match p {
        Phase::First if s >= TOUCHDOWN => Next::Decided(1.0),
        Phase::First if s > 0 => {
            if o.keep {
                // A score and the ball kept: only a return score against
                // does that; count it as the lead held to the end.
                Next::Decided(1.0)
            } else {
                Next::Goes(Phase::Answer(s.min(MAX_ANSWER)), false)
            }
        }
        Phase::Answer(d) if s > d => Next::Decided(1.0),
        Phase::Answer(d) if s == d => Next::Goes(Phase::Sudden, o.keep),
        Phase::Answer(_) => Next::Decided(0.0),
        _ if s > 0 => Next::Decided(1.0),
        _ if s < 0 => Next::Decided(0.0),
        _ => Next::Goes(Phase::Sudden, o.keep),
    }
}

/// P(the team with the ball wins) over phase × time × zone.
#[derive(Debug, Clone, PartialEq)]
pub struct OvertimeTable {
    v: Vec<f64>,
}

fn idx(k: usize, p: usize, z: usize) -> usize {
    (k * NPH + p) * NZ + z
}

const PHASES: [Phase; NPH] = {
    let mut a = [Phase::First; NPH];
    a[1] = Phase::Sudden;
    let mut d = 1;
    while d <= MAX_ANSWER {
        a[1 + d as usize] = Phase::Answer(d);
        d += 1;
    }
    a
};

impl OvertimeTable {
    pub fn solve(params: &DriveParams) -> OvertimeTable {
        let mut v = vec![0.0; NT * NPH * NZ];
        for p in PHASES {
            for z in 0..NZ {
                v[idx(0, ph(p), z)] = at_end(p);
            }
        }
        for k in 1..NT {
            for p in PHASES {
                for z in 0..NZ {
                    let mut val = 0.0;
                    for o in params.plain(z) {
                        let steps = o.steps as usize;
                        let later = |q: Phase, keep: bool, k2: usize| {
                            let w = v[idx(k2, ph(q), o.zone as usize)];
                            if keep { w } else { 1.0 - w }
                        };
                        val += o.share
                            * match next(p, o) {
                                // The clock runs out first: the possession
                                // gets the share of its outcome its time allows.
                                Next::Decided(r) if steps > k => {
                                    let f = k as f64 / steps as f64;
                                    f * r + (1.0 - f) * at_end(p)
                                }
                                Next::Goes(q, keep) if steps > k => {
                                    let f = k as f64 / steps as f64;
                                    let e = if keep { at_end(q) } else { 1.0 - at_end(q) };
                                    f * e + (1.0 - f) * at_end(p)
                                }
                                Next::Decided(r) => r,
                                Next::Goes(q, keep) => later(q, keep, k - steps),
                            };
                    }
                    v[idx(k, ph(p), z)] = val.clamp(0.0, 1.0);
                }
            }
        }
        OvertimeTable { v }
    }

    fn get(&self, k: usize, p: Phase, z: usize) -> f64 {
        self.v[idx(k, ph(p), z)]
    }

    /// P(the team with the ball at `ball_on` wins) in `phase` with `secs`
    /// left in the period, interpolated linearly in time and field.
    pub fn value(&self, phase: Phase, secs: f64, ball_on: f64) -> f64 {
        let t = (secs / STEP_SECS as f64).clamp(0.0, (NT - 1) as f64);
        let (k0, ft) = (t.floor() as usize, t.fract());
        let k1 = (k0 + 1).min(NT - 1);
        let b = ball_on.clamp(ZONE_AT[0], ZONE_AT[NZ - 1]);
        let z0 = ZONE_AT.iter().rposition(|&c| b >= c).unwrap_or(0).min(NZ - 2);
        let fz = ((b - ZONE_AT[z0]) / (ZONE_AT[z0 + 1] - ZONE_AT[z0])).clamp(0.0, 1.0);
        let mut p = 0.0;
        for (k, wk) in [(k0, 1.0 - ft), (k1, ft)] {
            for (z, wz) in [(z0, 1.0 - fz), (z0 + 1, fz)] {
                p += wk * wz * self.get(k, phase, z);
            }
        }
        p
    }
}

#[cfg(test)]
mod tests;
