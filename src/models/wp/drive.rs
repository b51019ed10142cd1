//! A drive-level Markov model of the 4th period, fed to the win-probability
//! fit as one more input. From the fit's own snaps it reads, for each field
//! zone a possession starts in, what the drive led to: the change in the
//! margin up to the next possession (a touchdown with its try, a field
//! goal, nothing, a return score), who has the ball next and where, and the
//! game-clock seconds it took (in buckets). Drives of an offense trailing in
//! the final 5:00 (hurry-up) and of one leading there (running the clock)
//! are counted apart, shrunk toward the other drives when few. Backward
//! induction over margin −30..+30 × time left in 5 s steps (0 to 15:00) ×
//! zone then gives P(the team with the ball wins), ties ½ at 0:00 (an
//! overtime is a coin flip). The team without the ball is the same table
//! from the other side (1 − V at the negated margin), so the grid needs no
//! possession axis.

use crate::plays::Plays;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::sync::{Arc, OnceLock};

/// Lower bounds of the field zones (`ball_on`, yards from the offense's own
/// goal line) a possession starts in, and the yard line each zone stands
/// for when values are interpolated between zones.
pub const ZONE_FROM: [i32; 5] = [0, 20, 30, 50, 70];
const ZONE_AT: [f64; 5] = [12.0, 25.0, 40.0, 60.0, 82.0];
const NZ: usize = ZONE_FROM.len();
/// Grid step and span of the time axis (seconds left in regulation).
pub const STEP_SECS: i32 = 5;
pub const SPAN_SECS: i32 = 900;
const NT: usize = (SPAN_SECS / STEP_SECS) as usize + 1;
/// Margins on the grid: −MAX..MAX (beyond: clamped).
pub const MAX_MARGIN: i32 = 30;
const NM: usize = 2 * MAX_MARGIN as usize + 1;
/// Upper bounds (seconds) of the drive-duration buckets; the last is open.
const DURATION_TO: [i32; 5] = [60, 120, 180, 240, 330];
/// The window in which a trailing offense hurries and a leading one runs
/// the clock (seconds left in regulation).
pub const LATE_MODE_SECS: i32 = 300;
/// Drives a late mode's own counts weigh as much as (shrinkage toward all
/// the zone's drives). Held out by season (seeds 101 / 202 / 7), 10 or 200
/// in place of 40 moved the late-and-close gain by at most 0.1 point.
const SHRINK_DRIVES: f64 = 40.0;
/// Largest margin change one possession is counted with (beyond: clamped).
const MAX_SWING: i32 = 9;

/// How the offense plays: the rest of the game, hurrying while trailing
/// late, running the clock while leading late.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Mode {
    Other = 0,
    Trail = 1,
    Lead = 2,
}
const NMODE: usize = 3;

fn mode(secs: i32, margin: i32) -> Mode {
    match (secs <= LATE_MODE_SECS, margin.signum()) {
        (true, -1) => Mode::Trail,
        (true, 1) => Mode::Lead,
        _ => Mode::Other,
    }
}

/// The zone of a yard line.
pub fn zone(ball_on: i32) -> usize {
    ZONE_FROM.iter().rposition(|&z| ball_on >= z).unwrap_or(0)
}

/// One way a possession ends, with its share of the drives.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Outcome {
    /// Change in the margin, from the side of the team that had the ball,
    /// up to the next possession (its try and any return score included).
    pub swing: i32,
    /// The same team has the ball next (after a return touchdown the other
    /// side scored and kicked off).
    pub keep: bool,
    /// Zone of the next possession, from its offense's side.
    pub zone: u8,
    /// Grid steps of game clock the possession took (mean of its bucket).
    pub steps: u16,
    pub share: f64,
}

/// What one drive did (before counting).
#[derive(Debug, Clone, Copy)]
struct Drive {
    mode: Mode,
    zone: usize,
    swing: i32,
    keep: bool,
    next_zone: usize,
    secs: i32,
}

/// The possessions among `rows` that another possession of the same half
/// follows (a drive cut off by the end of a half or the game says nothing
/// about where it was going): from each drive's first snap with a down to
/// the next drive's.
fn drives(plays: &Plays, rows: &[u32]) -> Vec<Drive> {
    let mut in_rows = vec![false; plays.len()];
    for &r in rows {
        in_rows[r as usize] = true;
    }
    let mut starts: Vec<usize> = Vec::new();
    let mut out = Vec::new();
    for g in &plays.games {
        starts.clear();
        for i in g.start..g.end {
            if plays.down[i] > 0 && starts.last().is_none_or(|&s| plays.drive[s] != plays.drive[i]) {
                starts.push(i);
            }
        }
        for w in starts.windows(2) {
            let (i, j) = (w[0], w[1]);
            if !in_rows[i] || !in_rows[j] || plays.period[j] > 4 || plays.half(i) != plays.half(j) {
                continue;
            }
            let keep = plays.offense[j] == plays.offense[i];
            let after = if keep { plays.margin[j] } else { -plays.margin[j] };
            out.push(Drive {
                mode: mode(plays.secs_game[i], plays.margin[i]),
                zone: zone(plays.ball_on[i]),
                swing: (after - plays.margin[i]).clamp(-MAX_SWING, MAX_SWING),
                keep,
                next_zone: zone(plays.ball_on[j]),
                secs: (plays.secs_game[i] - plays.secs_game[j]).max(0),
            });
        }
    }
    out
}

/// Shares of the outcomes of (mode, zone) cells, estimated from drives.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct DriveParams {
    /// Indexed `mode * zones + zone`.
    pub cells: Vec<Vec<Outcome>>,
    /// Drives counted.
    pub drives: usize,
}

type Key = (i32, bool, u8, usize);

/// Counts of (swing, keep, next zone, duration bucket) with the seconds
/// summed, for one cell.
fn count<'a>(ds: impl Iterator<Item = &'a Drive>) -> (BTreeMap<Key, (f64, f64)>, f64) {
    let mut m: BTreeMap<Key, (f64, f64)> = BTreeMap::new();
    let mut n = 0.0;
    for d in ds {
        let b = DURATION_TO.iter().position(|&t| d.secs < t).unwrap_or(DURATION_TO.len());
        let e = m.entry((d.swing, d.keep, d.next_zone as u8, b)).or_default();
        e.0 += 1.0;
        e.1 += d.secs as f64;
        n += 1.0;
    }
    (m, n)
}

impl DriveParams {
    /// Estimated from the drives among `rows`; `None` when a zone has no
    /// drive at all to learn from.
    pub fn estimate(plays: &Plays, rows: &[u32]) -> Option<DriveParams> {
        let all = drives(plays, rows);
        let mut cells = vec![Vec::new(); NMODE * NZ];
        for z in 0..NZ {
            let (base, nb) = count(all.iter().filter(|d| d.zone == z));
            if nb == 0.0 {
                return None;
            }
            let (rest, nr) = count(all.iter().filter(|d| d.zone == z && d.mode == Mode::Other));
            for md in [Mode::Other, Mode::Trail, Mode::Lead] {
                // A late mode's own drives, shrunk toward all of the zone's;
                // the rest of the game is its own drives (all of the zone's
                // when it has none).
                let (own, n) = match md {
                    Mode::Other => (BTreeMap::new(), 0.0),
                    _ => count(all.iter().filter(|d| d.zone == z && d.mode == md)),
                };
                let (prior, np) = if md == Mode::Other && nr > 0.0 { (&rest, nr) } else { (&base, nb) };
                let w_own = n / (n + SHRINK_DRIVES);
                let mut merged: BTreeMap<Key, (f64, f64)> = BTreeMap::new();
                for (k, &(c, s)) in own.iter() {
                    let e = merged.entry(*k).or_default();
                    e.0 += w_own * c / n;
                    e.1 += w_own * s / n;
                }
                for (k, &(c, s)) in prior.iter() {
                    let e = merged.entry(*k).or_default();
                    e.0 += (1.0 - w_own) * c / np;
                    e.1 += (1.0 - w_own) * s / np;
                }
                cells[md as usize * NZ + z] = merged
                    .into_iter()
                    .map(|((swing, keep, zone, _), (share, secs))| Outcome {
                        swing,
                        keep,
                        zone,
                        steps: ((secs / share / STEP_SECS as f64).round() as u16).max(1),
                        share,
                    })
                    .collect();
            }
        }
        Some(DriveParams { cells, drives: all.len() })
    }

    /// Backward induction over the grid.
    pub fn solve(&self) -> DriveTable {
        let mut v = vec![0.0; NT * NM * NZ];
        let at = |k: usize, m: i32, z: usize| (k * NM + (m + MAX_MARGIN) as usize) * NZ + z;
        let end = |m: i32| match m.signum() {
            1 => 1.0,
            -1 => 0.0,
            _ => 0.5,
        };
        for m in -MAX_MARGIN..=MAX_MARGIN {
            for z in 0..NZ {
                v[at(0, m, z)] = end(m);
            }
        }
        for k in 1..NT {
            let secs = k as i32 * STEP_SECS;
            for m in -MAX_MARGIN..=MAX_MARGIN {
                let cell = mode(secs, m) as usize * NZ;
                for z in 0..NZ {
                    let mut p = 0.0;
                    for o in &self.cells[cell + z] {
                        let after = (m + o.swing).clamp(-MAX_MARGIN, MAX_MARGIN);
                        let steps = o.steps as usize;
                        p += o.share
                            * if steps > k {
                                // The clock runs out first: the drive gets the
                                // share of its outcome its time allows (none
                                // of it: 0.1 point worse on seed 202, the
                                // oracle distance up 0.3-0.7% on all three).
                                let f = k as f64 / steps as f64;
                                f * end(after) + (1.0 - f) * end(m)
                            } else if o.keep {
                                v[at(k - steps, after, o.zone as usize)]
                            } else {
                                1.0 - v[at(k - steps, -after, o.zone as usize)]
                            };
                    }
                    v[at(k, m, z)] = p.clamp(0.0, 1.0);
                }
            }
            // A bigger lead is never worse: the late modes switch at a tie,
            // which could otherwise break the order by a hair.
            for z in 0..NZ {
                for m in -MAX_MARGIN + 1..=MAX_MARGIN {
                    let (lo, hi) = (at(k, m - 1, z), at(k, m, z));
                    if v[hi] < v[lo] {
                        v[hi] = v[lo];
                    }
                }
            }
        }
        DriveTable { v }
    }
}

/// P(the team with the ball wins) over the grid.
#[derive(Debug, Clone, PartialEq)]
pub struct DriveTable {
    v: Vec<f64>,
}

impl DriveTable {
    fn get(&self, k: usize, m: i32, z: usize) -> f64 {
        self.v[(k * NM + (m.clamp(-MAX_MARGIN, MAX_MARGIN) + MAX_MARGIN) as usize) * NZ + z]
    }

    /// P(the team with the ball at `ball_on` wins) with `margin` (may be
    /// fractional) and `secs` left in regulation (0-900), interpolated
    /// linearly in all three.
    pub fn value(&self, margin: f64, secs: f64, ball_on: f64) -> f64 {
        let t = (secs / STEP_SECS as f64).clamp(0.0, (NT - 1) as f64);
        let (k0, ft) = (t.floor() as usize, t.fract());
        let k1 = (k0 + 1).min(NT - 1);
        let m = margin.clamp(-(MAX_MARGIN as f64), MAX_MARGIN as f64);
        let (m0, fm) = (m.floor() as i32, m - m.floor());
        let b = ball_on.clamp(ZONE_AT[0], ZONE_AT[NZ - 1]);
        let z0 = ZONE_AT.iter().rposition(|&c| b >= c).unwrap_or(0).min(NZ - 2);
        let fz = ((b - ZONE_AT[z0]) / (ZONE_AT[z0 + 1] - ZONE_AT[z0])).clamp(0.0, 1.0);
        let mut p = 0.0;
        for (k, wk) in [(k0, 1.0 - ft), (k1, ft)] {
            for (mm, wm) in [(m0, 1.0 - fm), (m0 + 1, fm)] {
                for (z, wz) in [(z0, 1.0 - fz), (z0 + 1, fz)] {
                    let w = wk * wm * wz;
                    if w > 0.0 {
                        p += w * self.get(k, mm, z);
                    }
                }
            }
        }
        p
    }
}

/// The drive model as the WP model keeps it: the estimated shares (stored
/// in the coefficient cache) and the table solved from them on first use
/// (after a fit or a cache load alike; about a million grid cells).
#[derive(Debug, Clone, Default, Serialize, Deserialize)]
pub struct DriveModel {
    pub params: DriveParams,
    #[serde(skip)]
    table: OnceLock<Arc<DriveTable>>,
}

impl PartialEq for DriveModel {
    /// The table follows from the shares.
    fn eq(&self, other: &Self) -> bool {
        self.params == other.params
    }
}

impl DriveModel {
    pub fn new(params: DriveParams) -> DriveModel {
        DriveModel { params, table: OnceLock::new() }
    }

    /// The solved table (solved now if not yet).
    pub fn table(&self) -> &DriveTable {
        self.table.get_or_init(|| Arc::new(self.params.solve()))
    }
}

#[cfg(test)]
mod tests;
