//! Overtime solved backward from the drive model's possessions
//! (`drive::DriveParams::plain`: outcome, next zone and clock of a
//! possession by start zone), under one of the rule sets of
//! `crate::overtime` (`Rules`):
//!
//! - touchdown-or-answer: a touchdown on the first possession wins; a field
//!   goal there gives the other side one possession to answer (outscoring
//!   it wins, matching it goes on as sudden death, anything else loses);
//! - first-score-wins: the first score of any kind wins;
//! - both-possess: the first possession's score, a touchdown too, gets one
//!   answer as above; a scoreless first possession hands over to sudden death.
//!
//! Under every set a defensive score ends it and, once both had the ball
//! (or the first possession came up empty), the next score wins. A period
//! ending with one side ahead ends the game; ending level it is a tie (½)
//! or, when the set has no ties, another period follows from where play
//! stands (solved as a fixed point). The value is P(the team with the ball
//! wins) by phase × 5 s of period left × zone.

use super::{DriveParams, Outcome, NZ, STEP_SECS, ZONE_AT};
use crate::overtime::{Rule, Rules};
use std::sync::Arc;

/// Seconds of the default overtime period.
pub const OT_SPAN_SECS: i32 = crate::overtime::DEFAULT_PERIOD_SECS;
/// Largest deficit an answering possession is counted with (a possession's
/// swing is clamped to 9).
pub const MAX_ANSWER: i32 = 9;
/// A possession that gains this many points or more is a touchdown.
const TOUCHDOWN: i32 = 6;
/// Passes of the no-ties fixed point at most, and the change that ends it.
const FIXED_POINT_PASSES: usize = 200;
const FIXED_POINT_TOL: f64 = 1e-12;

/// The largest deficit an answering possession faces under `rule` (0: no
/// answer phase): a field goal's 3 plus slack under touchdown-or-answer,
/// a touchdown with a two-point try under both-possess.
pub fn max_answer(rule: Rule) -> i32 {
    match rule {
        Rule::TouchdownOrAnswer => 5,
        Rule::FirstScoreWins => 0,
        Rule::BothPossess => MAX_ANSWER,
    }
}

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

/// The phase's value if the period ends now and that ends the game.
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

fn next(rule: Rule, p: Phase, o: &Outcome) -> Next {
    let s = o.swing;
    match (rule, p) {
        (Rule::TouchdownOrAnswer, Phase::First) if s >= TOUCHDOWN => Next::Decided(1.0),
        (Rule::TouchdownOrAnswer | Rule::BothPossess, Phase::First) if s > 0 => {
            if o.keep {
                // A score and the ball kept: only a return score against
                // does that; count it as the lead held to the end.
                Next::Decided(1.0)
            } else {
                Next::Goes(Phase::Answer(s.min(max_answer(rule))), false)
            }
        }
        (_, Phase::Answer(d)) if s > d => Next::Decided(1.0),
        (_, Phase::Answer(d)) if s == d => Next::Goes(Phase::Sudden, o.keep),
        (_, Phase::Answer(_)) => Next::Decided(0.0),
        _ if s > 0 => Next::Decided(1.0),
        _ if s < 0 => Next::Decided(0.0),
        // Under first-score-wins a scoreless first possession changes
        // nothing: the next score wins either way.
        _ => Next::Goes(Phase::Sudden, o.keep),
    }
}

/// P(the team with the ball wins) over phase × time × zone, for one rule set.
#[derive(Debug, Clone, PartialEq)]
pub struct OvertimeTable {
    v: Vec<f64>,
    nt: usize,
    pub rules: Rules,
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

/// One backward pass with `end[ph * NZ + z]` the value when the period
/// runs out in that phase and zone.
fn pass(params: &DriveParams, rule: Rule, nt: usize, end: &[f64]) -> Vec<f64> {
    let e = |p: Phase, z: usize| end[ph(p) * NZ + z];
    let mut v = vec![0.0; nt * NPH * NZ];
    for p in PHASES {
        for z in 0..NZ {
            v[idx(0, ph(p), z)] = e(p, z);
        }
    }
    for k in 1..nt {
        for p in PHASES {
            for z in 0..NZ {
                let mut val = 0.0;
                for o in params.plain(z) {
                    let steps = o.steps as usize;
                    let oz = o.zone as usize;
                    val += o.share
                        * match next(rule, p, o) {
                            // The clock runs out first: the possession
                            // gets the share of its outcome its time allows.
                            Next::Decided(r) if steps > k => {
                                let f = k as f64 / steps as f64;
                                f * r + (1.0 - f) * e(p, z)
                            }
                            Next::Goes(q, keep) if steps > k => {
                                let f = k as f64 / steps as f64;
                                let later = if keep { e(q, oz) } else { 1.0 - e(q, oz) };
                                f * later + (1.0 - f) * e(p, z)
                            }
                            Next::Decided(r) => r,
                            Next::Goes(q, keep) => {
                                let w = v[idx(k - steps, ph(q), oz)];
                                if keep { w } else { 1.0 - w }
                            }
                        };
                }
                v[idx(k, ph(p), z)] = val.clamp(0.0, 1.0);
            }
        }
    }
    v
}

impl OvertimeTable {
    /// The default rule set (`Rules::default`).
    pub fn solve(params: &DriveParams) -> OvertimeTable {
        OvertimeTable::solve_rules(params, &Rules::default())
    }

    pub fn solve_rules(params: &DriveParams, rules: &Rules) -> OvertimeTable {
        let nt = (rules.period_secs.max(STEP_SECS) / STEP_SECS) as usize + 1;
        let mut end = vec![0.0; NPH * NZ];
        for p in PHASES {
            for z in 0..NZ {
                end[ph(p) * NZ + z] = at_end(p);
            }
        }
        let mut v = pass(params, rules.rule, nt, &end);
        if !rules.ties {
            // Level at the end of a period: the next period goes on from
            // there, so the end value is the full period's value.
            for _ in 0..FIXED_POINT_PASSES {
                let mut change: f64 = 0.0;
                for p in [Phase::First, Phase::Sudden] {
                    for z in 0..NZ {
                        let full = v[idx(nt - 1, ph(p), z)];
                        change = change.max((end[ph(p) * NZ + z] - full).abs());
                        end[ph(p) * NZ + z] = full;
                    }
                }
                if change < FIXED_POINT_TOL {
                    break;
                }
                v = pass(params, rules.rule, nt, &end);
            }
        }
        OvertimeTable { v, nt, rules: *rules }
    }

    fn get(&self, k: usize, p: Phase, z: usize) -> f64 {
        self.v[idx(k, ph(p), z)]
    }

    /// P(the team with the ball at `ball_on` wins) in `phase` with `secs`
    /// left in the period, interpolated linearly in time and field.
    pub fn value(&self, phase: Phase, secs: f64, ball_on: f64) -> f64 {
        let nt = self.nt;
        let t = (secs / STEP_SECS as f64).clamp(0.0, (nt - 1) as f64);
        let (k0, ft) = (t.floor() as usize, t.fract());
        let k1 = (k0 + 1).min(nt - 1);
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

    /// P(the team with the ball at `ball_on` wins) in `phase` with `secs`
    /// left in the period when its possession ends by one of `list`'s
    /// outcomes (the rest of a drive from a snap: `super::snap`), each
    /// played on as the backward pass does.
    pub fn after(&self, phase: Phase, secs: f64, ball_on: f64, list: &[Outcome]) -> f64 {
        // The table's first step holds the value when the period ends.
        let ends = |p: Phase, b: f64| self.value(p, 0.0, b);
        let mut v = 0.0;
        for o in list {
            let took = f64::from(o.steps) * f64::from(STEP_SECS);
            let at = ZONE_AT[o.zone as usize];
            v += o.share
                * match next(self.rules.rule, phase, o) {
                    Next::Decided(r) if took > secs => {
                        let f = secs / took;
                        f * r + (1.0 - f) * ends(phase, ball_on)
                    }
                    Next::Goes(q, keep) if took > secs => {
                        let f = secs / took;
                        let later = if keep { ends(q, at) } else { 1.0 - ends(q, at) };
                        f * later + (1.0 - f) * ends(phase, ball_on)
                    }
                    Next::Decided(r) => r,
                    Next::Goes(q, keep) => {
                        let w = self.value(q, secs - took, at);
                        if keep {
                            w
                        } else {
                            1.0 - w
                        }
                    }
                };
        }
        v.clamp(0.0, 1.0)
    }
}

/// Overtime tables solved for rule sets other than the default, kept
/// beside the drive model (a handful at most: one per set a config names).
#[derive(Debug, Default)]
pub struct RuleTables(std::sync::Mutex<Vec<Arc<OvertimeTable>>>);

impl Clone for RuleTables {
    fn clone(&self) -> RuleTables {
        RuleTables(std::sync::Mutex::new(self.0.lock().map(|v| v.clone()).unwrap_or_default()))
    }
}

impl super::DriveModel {
    /// The overtime table of `rules` from the same possessions (the default
    /// set is `overtime()`; another is solved on first use and kept).
    pub fn overtime_for(&self, rules: &Rules) -> Arc<OvertimeTable> {
        if *rules == Rules::default() {
            return self.ot.get_or_init(|| Arc::new(OvertimeTable::solve(&self.params))).clone();
        }
        let mut kept = match self.ot_rules.0.lock() {
            Ok(g) => g,
            Err(poisoned) => poisoned.into_inner(),
        };
        if let Some(t) = kept.iter().find(|t| t.rules == *rules) {
            return t.clone();
        }
        let t = Arc::new(OvertimeTable::solve_rules(&self.params, rules));
        kept.push(t.clone());
        t
    }
}

#[cfg(test)]
mod tests;
