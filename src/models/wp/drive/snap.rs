//! The rest of a drive from one snap: the drive table values a possession
//! at its start, which cannot tell 1st & 10 from 4th & 12 at the same yard
//! line. From the fit's own snaps this reads, per (how the offense plays,
//! 10-yard field zone, down and distance class, trailing side's timeouts
//! class), how the possession the snap belongs to ended — the same
//! outcomes the drive model counts (margin change up to the next
//! possession, who has the ball next and where, clock taken, timeouts
//! used) — and values a snap as the drive table one possession on.

use super::{
    count, mode, outcomes, shrink, to_class, DriveTable, Mode, Outcome, NMODE, NTO, STEP_SECS, ZONE_AT,
};
use super::overtime::{OvertimeTable, Phase};
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Lower bounds of the 10-yard zones a snap is counted in.
const SNAP_ZONES: usize = 10;
/// Down and distance classes: 1st; 2nd and 1-5, 6+; 3rd and 1-2, 3-6, 7+;
/// 4th and 1-2, 3+.
const NDOWN: usize = 8;
/// Snaps a late mode's own counts weigh as much as (shrinkage toward all
/// the cell's snaps).
const SHRINK_SNAPS: f64 = 100.0;

fn down_class(down: i32, to_go: i32) -> Option<usize> {
    Some(match (down, to_go) {
        (1, _) => 0,
        (2, ..=5) => 1,
        (2, _) => 2,
        (3, ..=2) => 3,
        (3, 3..=6) => 4,
        (3, _) => 5,
        (4, ..=2) => 6,
        (4, _) => 7,
        _ => return None,
    })
}

fn snap_zone(ball_on: i32) -> usize {
    (ball_on.max(0) / 10).min(SNAP_ZONES as i32 - 1) as usize
}

fn cell(mode: Mode, zone: usize, down: usize, class: usize) -> usize {
    ((mode as usize * SNAP_ZONES + zone) * NDOWN + down) * NTO + class
}

/// A snap as `SnapParams::value` reads it, from the offense's side.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Snap {
    pub margin: f64,
    /// Seconds left in regulation.
    pub secs: f64,
    pub ball_on: i32,
    pub down: i32,
    pub to_go: i32,
    pub off_to: i32,
    pub def_to: i32,
}

/// Outcome shares of (mode, zone, down class, timeouts class) cells.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct SnapParams {
    pub cells: Vec<Vec<Outcome>>,
    /// Snaps counted.
    pub snaps: usize,
}

/// One snap's rest of the drive (before counting), as `super::Drive`.
fn rests(plays: &Plays, rows: &[u32]) -> Vec<(usize, usize, super::Drive)> {
    let mut in_rows = vec![false; plays.len()];
    for &r in rows {
        in_rows[r as usize] = true;
    }
    let mut out = Vec::new();
    for g in &plays.games {
        // The next possession's first snap with a down, walking backward.
        let mut next: Option<usize> = None;
        let mut cur_start: Option<usize> = None;
        for i in (g.start..g.end).rev() {
            if plays.down[i] <= 0 {
                continue;
            }
            if let Some(s) = cur_start {
                if plays.drive[s] != plays.drive[i] {
                    next = Some(s);
                }
            }
            cur_start = Some(i);
            let Some(j) = next else { continue };
            if !in_rows[i] || !in_rows[j] || plays.period[j] > 4 || plays.half(i) != plays.half(j) {
                continue;
            }
            let Some(dc) = down_class(plays.down[i], plays.to_go[i]) else { continue };
            out.push((snap_zone(plays.ball_on[i]), dc, super::Drive::between(plays, i, j)));
        }
    }
    out
}

impl SnapParams {
    /// Estimated from the snaps among `rows` whose possession another of
    /// the same half follows.
    pub fn estimate(plays: &Plays, rows: &[u32]) -> SnapParams {
        let all = rests(plays, rows);
        let mut cells = vec![Vec::new(); NMODE * SNAP_ZONES * NDOWN * NTO];
        for z in 0..SNAP_ZONES {
            for dc in 0..NDOWN {
                let here = || all.iter().filter(|r| r.0 == z && r.1 == dc).map(|r| &r.2);
                let (base, nb) = count(here());
                if nb == 0.0 {
                    continue;
                }
                let (rest, nr) = count(here().filter(|d| d.mode == Mode::Other));
                let other = outcomes(if nr > 0.0 { &rest } else { &base });
                for c in 0..NTO {
                    cells[cell(Mode::Other, z, dc, c)] = other.clone();
                }
                for md in [Mode::Trail, Mode::Lead, Mode::Tie] {
                    let (own, n) = count(here().filter(|d| d.mode == md));
                    let pooled = shrink_by(&own, n, &base);
                    for c in 0..NTO {
                        let (own_c, n_c) =
                            count(here().filter(|d| d.mode == md && to_class(md, d.off_to, d.def_to) == c));
                        cells[cell(md, z, dc, c)] = outcomes(&shrink_by(&own_c, n_c, &pooled));
                    }
                }
            }
        }
        SnapParams { cells, snaps: all.len() }
    }

    /// P(the offense wins) from `snap`: its cell's outcomes, each valued by
    /// `table` at the next possession; `None` when its cell has no snaps.
    pub fn value(&self, table: &DriveTable, snap: &Snap) -> Option<f64> {
        let Snap { margin, secs, ball_on, down, to_go, off_to, def_to } = *snap;
        let dc = down_class(down, to_go)?;
        let (a, b) = (off_to.clamp(0, 3), def_to.clamp(0, 3));
        let md = mode(secs.round() as i32, margin.round() as i32);
        let c = to_class(md, a as usize, b as usize);
        // Between the centres of the two nearest zones (5, 15, .. 95):
        // held out by season (seeds 101 / 202), the distance to the oracle
        // 0.00639 / 0.00645 with one zone's value, 0.00636 / 0.00641.
        let (z0, f) = zones(ball_on);
        let v0 = list_value(table, &self.cells[cell(md, z0, dc, c)], margin, secs, a, b)?;
        let v1 = list_value(table, &self.cells[cell(md, z0 + 1, dc, c)], margin, secs, a, b).unwrap_or(v0);
        Some((1.0 - f) * v0 + f * v1)
    }

    /// P(the offense wins) in overtime from a snap with `secs` left in the
    /// period, in `phase` under `table`'s rules: the cell of the rest of
    /// the game (the overtime table plays possessions as those), each
    /// outcome played on by the table; `None` when the cell has no snaps.
    pub fn overtime_value(&self, table: &OvertimeTable, phase: Phase, secs: f64, snap: &Snap) -> Option<f64> {
        let dc = down_class(snap.down, snap.to_go)?;
        let (z0, f) = zones(snap.ball_on);
        let on = f64::from(snap.ball_on);
        let list = |z: usize| {
            let l = &self.cells[cell(Mode::Other, z, dc, 0)];
            (!l.is_empty()).then(|| table.after(phase, secs, on, l))
        };
        let v0 = list(z0)?;
        let v1 = list(z0 + 1).unwrap_or(v0);
        Some((1.0 - f) * v0 + f * v1)
    }
}

/// The zone whose centre (5, 15, .. 95) is at or before `ball_on`, and
/// how far `ball_on` is toward the next one's (0-1).
fn zones(ball_on: i32) -> (usize, f64) {
    let x = ((f64::from(ball_on) - 5.0) / 10.0).clamp(0.0, (SNAP_ZONES - 1) as f64);
    let z0 = (x.floor() as usize).min(SNAP_ZONES - 2);
    (z0, x - z0 as f64)
}

/// P(the offense wins) over one cell's outcomes `list` (`None` if empty)
/// with `margin`, `secs` left and the timeouts `a` and `b` of the offense
/// and the defense.
fn list_value(table: &DriveTable, list: &[Outcome], margin: f64, secs: f64, a: i32, b: i32) -> Option<f64> {
    if list.is_empty() {
        return None;
    }
    let end = |m: f64| {
        if m > 0.0 {
            1.0
        } else if m < 0.0 {
            0.0
        } else {
            0.5
        }
    };
    let mut p = 0.0;
    for o in list {
        let after = margin + f64::from(o.swing);
        let took = f64::from(o.steps) * f64::from(STEP_SECS);
        let (a2, b2) = ((a - i32::from(o.off_used)).max(0), (b - i32::from(o.def_used)).max(0));
        let at = ZONE_AT[o.zone as usize];
        let v = if took > secs {
            let f = secs / took;
            f * end(after) + (1.0 - f) * end(margin)
        } else if o.keep {
            table.value(after, secs - took, at, a2, b2)
        } else {
            1.0 - table.value(-after, secs - took, at, b2, a2)
        };
        p += o.share * v;
    }
    Some(p.clamp(0.0, 1.0))
}

/// `shrink` with the snaps' own weight.
fn shrink_by(own: &super::Shares, n: f64, prior: &super::Shares) -> super::Shares {
    shrink(own, n * super::SHRINK_DRIVES / SHRINK_SNAPS, prior)
}


#[cfg(test)]
mod tests;
