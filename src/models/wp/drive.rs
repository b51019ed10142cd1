//! A drive-level Markov model of the 4th period, fed to the win-probability
//! fit as one more input. From the fit's own snaps it reads, for each field
//! zone a possession starts in, what the drive led to: the change in the
//! margin up to the next possession (a touchdown with its try, a field
//! goal, nothing, a return score), who has the ball next and where, and the
//! game-clock seconds it took (in buckets). Drives of an offense trailing in
//! the final 5:00 (hurry-up), of one leading there (running the clock) and
//! of one level in the final 2:00 are counted apart, shrunk toward the
//! other drives when few; those late drives are split again by the
//! trailing side's timeouts, 0-1 or 2-3 (the offense's when it trails or
//! is level, the defense's when it leads: they stop the clock), and
//! every drive carries the timeouts each side used up to the next
//! possession. Backward induction over margin −30..+30 × time left in 5 s
//! steps (0 to 15:00) × zone × each side's timeouts (0-3) then gives P(the
//! team with the ball wins), ties ½ at 0:00 (an overtime is a coin flip).
//! The team without the ball is the same table from the other side (1 − V
//! at the negated margin, timeouts swapped), so the grid needs no
//! possession axis.

pub mod overtime;
pub mod snap;

use crate::plays::Plays;
use overtime::OvertimeTable;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::sync::{Arc, OnceLock};

/// Lower bounds of the field zones (`ball_on`, yards from the offense's own
/// goal line) a possession starts in, and the yard line each zone stands
/// for when values are interpolated between zones.
pub const ZONE_FROM: [i32; 5] = [0, 20, 30, 50, 70];
pub const ZONE_AT: [f64; 5] = [12.0, 25.0, 40.0, 60.0, 82.0];
pub const NZ: usize = ZONE_FROM.len();
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
/// The window in which an offense level on the scoreboard plays for the
/// last score (counted apart as the other late modes). Held out by season,
/// it took the mean squared distance to the oracle from 0.00719 / 0.00675 /
/// 0.00673 to 0.00718 / 0.00674 / 0.00672 (seeds 7 / 101 / 202); a
/// leading offense's window widened to 12:00 or a trailing one's to 9:00
/// when two scores down did no better.
pub const TIE_MODE_SECS: i32 = 120;
/// The timeouts class a late drive is counted in by the trailing (or
/// level) side's timeouts: 0-1 or 2-3. One class per count (0-3) did as
/// well on the oracle distance with noisier shares (gain over the baseline
/// 10.9% / 11.6% / 9.1% against 10.8% / 11.6% / 9.1%, distance 0.00720 /
/// 0.00675 / 0.00673 against 0.00719 / 0.00675 / 0.00673).
const TO_CLASS: [usize; NTO] = [0, 0, 1, 1];
/// Drives a late mode's own counts weigh as much as (shrinkage toward all
/// the zone's drives). Held out by season (seeds 101 / 202 / 7), 10 or 200
/// in place of 40 moved the late-and-close gain by at most 0.1 point.
const SHRINK_DRIVES: f64 = 40.0;
/// Largest margin change one possession is counted with (beyond: clamped).
const MAX_SWING: i32 = 9;
/// Timeouts a side can hold on the grid (0-3).
pub const NTO: usize = 4;

/// How the offense plays: the rest of the game, hurrying while trailing
/// late, running the clock while leading late, playing for the last score
/// while level in the final 2:00.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Mode {
    Other = 0,
    Trail = 1,
    Lead = 2,
    Tie = 3,
}
const NMODE: usize = 4;

fn mode(secs: i32, margin: i32) -> Mode {
    if secs > LATE_MODE_SECS {
        return Mode::Other;
    }
    match margin.signum() {
        -1 => Mode::Trail,
        1 => Mode::Lead,
        _ if secs <= TIE_MODE_SECS => Mode::Tie,
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
    /// Timeouts the team with the ball and the other one used up to the
    /// next possession.
    #[serde(default)]
    pub off_used: u8,
    #[serde(default)]
    pub def_used: u8,
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
    /// Timeouts the offense and the defense held at the drive's start.
    off_to: usize,
    def_to: usize,
    off_used: u8,
    def_used: u8,
}

impl Drive {
    /// What followed snap `i` up to the next possession's first snap `j`
    /// (of the same half): `i` a possession's first snap for the drive
    /// model, any snap for the rest of a drive (`snap`).
    fn between(plays: &Plays, i: usize, j: usize) -> Drive {
        let keep = plays.offense[j] == plays.offense[i];
        let after = if keep { plays.margin[j] } else { -plays.margin[j] };
        let (off_next, def_next) = if keep {
            (plays.off_timeouts[j], plays.def_timeouts[j])
        } else {
            (plays.def_timeouts[j], plays.off_timeouts[j])
        };
        let (off_to, def_to) = (plays.off_timeouts[i].clamp(0, 3), plays.def_timeouts[i].clamp(0, 3));
        Drive {
            off_to: off_to as usize,
            def_to: def_to as usize,
            off_used: (off_to - off_next).clamp(0, 3) as u8,
            def_used: (def_to - def_next).clamp(0, 3) as u8,
            mode: mode(plays.secs_game[i], plays.margin[i]),
            zone: zone(plays.ball_on[i]),
            swing: (after - plays.margin[i]).clamp(-MAX_SWING, MAX_SWING),
            keep,
            next_zone: zone(plays.ball_on[j]),
            secs: (plays.secs_game[i] - plays.secs_game[j]).max(0),
        }
    }
}

/// The trailing side's timeouts a late drive is split by (the offense's
/// when it trails, the defense's when it leads; none otherwise).
fn to_class(mode: Mode, off_to: usize, def_to: usize) -> usize {
    let class = |t: usize| TO_CLASS[t.min(NTO - 1)];
    match mode {
        Mode::Other => 0,
        Mode::Trail | Mode::Tie => class(off_to),
        Mode::Lead => class(def_to),
    }
}

/// Index of the (mode, zone, timeouts class) cell.
fn cell_of(mode: Mode, zone: usize, class: usize) -> usize {
    (mode as usize * NZ + zone) * NTO + class
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
            out.push(Drive::between(plays, i, j));
        }
    }
    out
}

/// Shares of the outcomes of (mode, zone, timeouts class) cells, estimated
/// from drives.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct DriveParams {
    /// Indexed `(mode * zones + zone) * NTO + class` (`cell_of`); the rest
    /// of the game has one class, kept at 0 and copied to the others.
    pub cells: Vec<Vec<Outcome>>,
    /// Drives counted.
    pub drives: usize,
    /// The rest of a drive from each kind of snap (`snap`).
    #[serde(default)]
    pub snaps: snap::SnapParams,
}

/// (swing, keep, next zone, duration bucket, timeouts used by the offense,
/// by the defense).
type Key = (i32, bool, u8, usize, u8, u8);
/// Shares of each key with the seconds taken, summed over drives and
/// divided by their count (a distribution).
type Shares = BTreeMap<Key, (f64, f64)>;

/// The outcome shares of some drives, with their count.
fn count<'a>(ds: impl Iterator<Item = &'a Drive>) -> (Shares, f64) {
    let mut m: Shares = BTreeMap::new();
    let mut n = 0.0;
    for d in ds {
        let b = DURATION_TO.iter().position(|&t| d.secs < t).unwrap_or(DURATION_TO.len());
        let e = m.entry((d.swing, d.keep, d.next_zone as u8, b, d.off_used, d.def_used)).or_default();
        e.0 += 1.0;
        e.1 += d.secs as f64;
        n += 1.0;
    }
    if n > 0.0 {
        for e in m.values_mut() {
            e.0 /= n;
            e.1 /= n;
        }
    }
    (m, n)
}

/// `n` drives' own shares shrunk toward `prior` (weight n / (n + SHRINK_DRIVES)).
fn shrink(own: &Shares, n: f64, prior: &Shares) -> Shares {
    let w = n / (n + SHRINK_DRIVES);
    let mut merged = Shares::new();
    for (k, &(c, s)) in own {
        let e = merged.entry(*k).or_default();
        e.0 += w * c;
        e.1 += w * s;
    }
    for (k, &(c, s)) in prior {
        let e = merged.entry(*k).or_default();
        e.0 += (1.0 - w) * c;
        e.1 += (1.0 - w) * s;
    }
    merged
}

fn outcomes(m: &Shares) -> Vec<Outcome> {
    m.iter()
        .map(|(&(swing, keep, zone, _, off_used, def_used), &(share, secs))| Outcome {
            swing,
            keep,
            zone,
            steps: ((secs / share / STEP_SECS as f64).round() as u16).max(1),
            off_used,
            def_used,
            share,
        })
        .collect()
}

impl DriveParams {
    /// The outcomes of a possession starting in `zone` outside the late
    /// modes (what the overtime model plays drives with).
    pub fn plain(&self, zone: usize) -> &[Outcome] {
        &self.cells[cell_of(Mode::Other, zone.min(NZ - 1), 0)]
    }

    /// Estimated from the drives among `rows`; `None` when a zone has no
    /// drive at all to learn from.
    pub fn estimate(plays: &Plays, rows: &[u32]) -> Option<DriveParams> {
        let all = drives(plays, rows);
        let mut cells = vec![Vec::new(); NMODE * NZ * NTO];
        for z in 0..NZ {
            let (base, nb) = count(all.iter().filter(|d| d.zone == z));
            if nb == 0.0 {
                return None;
            }
            // The rest of the game: its own drives (all of the zone's when
            // it has none), one class.
            let (rest, nr) = count(all.iter().filter(|d| d.zone == z && d.mode == Mode::Other));
            let other = outcomes(if nr > 0.0 { &rest } else { &base });
            for c in 0..NTO {
                cells[cell_of(Mode::Other, z, c)] = other.clone();
            }
            for md in [Mode::Trail, Mode::Lead, Mode::Tie] {
                // A late mode's own drives shrunk toward all of the zone's,
                // then each timeouts class's toward that.
                let (own, n) = count(all.iter().filter(|d| d.zone == z && d.mode == md));
                let pooled = shrink(&own, n, &base);
                for c in 0..NTO {
                    let (own_c, n_c) = count(
                        all.iter()
                            .filter(|d| d.zone == z && d.mode == md && to_class(md, d.off_to, d.def_to) == c),
                    );
                    cells[cell_of(md, z, c)] = outcomes(&shrink(&own_c, n_c, &pooled));
                }
            }
        }
        Some(DriveParams { cells, drives: all.len(), snaps: snap::SnapParams::estimate(plays, rows) })
    }

    /// Backward induction over the grid, each step's margins on rayon's threads.
    pub fn solve(&self) -> DriveTable {
        self.solve_on(true)
    }

    /// `solve` on the calling thread alone (the same table): for a solve
    /// run beside other work, which 180 steps of fork and join would
    /// otherwise keep waiting on.
    pub fn solve_serial(&self) -> DriveTable {
        self.solve_on(false)
    }

    fn solve_on(&self, parallel: bool) -> DriveTable {
        let per_k = NM * NZ * NTO * NTO;
        let mut v = vec![0.0; NT * per_k];
        for m in -MAX_MARGIN..=MAX_MARGIN {
            for z in 0..NZ {
                for ab in 0..NTO * NTO {
                    v[at(0, m, z, ab / NTO, ab % NTO)] = end(f64::from(m));
                }
            }
        }
        for k in 1..NT {
            let (done, now) = v.split_at_mut(k * per_k);
            let now = &mut now[..per_k];
            // Each margin's row of the step depends only on earlier steps.
            let done: &[f64] = done;
            let row = |(mi, row): (usize, &mut [f64])| self.step_row(k, mi as i32 - MAX_MARGIN, done, row);
            if parallel {
                now.par_chunks_mut(NZ * NTO * NTO).enumerate().for_each(row);
            } else {
                now.chunks_mut(NZ * NTO * NTO).enumerate().for_each(row);
            }
            // A bigger lead is never worse: the late modes switch at a tie,
            // which could otherwise break the order by a hair.
            for z in 0..NZ {
                for ab in 0..NTO * NTO {
                    let (a, b) = (ab / NTO, ab % NTO);
                    for m in -MAX_MARGIN + 1..=MAX_MARGIN {
                        let (lo, hi) = (at(0, m - 1, z, a, b), at(0, m, z, a, b));
                        if now[hi] < now[lo] {
                            now[hi] = now[lo];
                        }
                    }
                }
            }
        }
        DriveTable::from_grid(v)
    }

    /// Margin `m`'s row of time step `k` (zone × both sides' timeouts)
    /// from the earlier steps `done`. Each outcome's landing cell is worked
    /// out once for all the timeouts pairs its list serves, whose sums are
    /// kept side by side: each cell still adds its outcomes in list order,
    /// the same values bit for bit as one cell at a time.
    fn step_row(&self, k: usize, m: i32, done: &[f64], row: &mut [f64]) {
        let md = mode(k as i32 * STEP_SECS, m);
        for z in 0..NZ {
            let mut p = [0.0f64; NTO * NTO];
            for class in 0..NTO {
                let mut pairs = [0usize; NTO * NTO];
                let mut np = 0;
                for ab in 0..NTO * NTO {
                    if to_class(md, ab / NTO, ab % NTO) == class {
                        pairs[np] = ab;
                        np += 1;
                    }
                }
                let pairs = &pairs[..np];
                if pairs.is_empty() {
                    continue;
                }
                for o in &self.cells[cell_of(md, z, class)] {
                    let after = (m + o.swing).clamp(-MAX_MARGIN, MAX_MARGIN);
                    let steps = o.steps as usize;
                    let (ou, du) = (o.off_used as usize, o.def_used as usize);
                    if steps > k {
                        // The clock runs out first: the drive gets the
                        // share of its outcome its time allows (none of
                        // it: 0.1 point worse on seed 202, the oracle
                        // distance up 0.3-0.7% on all three).
                        let f = k as f64 / steps as f64;
                        let v = f * end(f64::from(after)) + (1.0 - f) * end(f64::from(m));
                        for &ab in pairs {
                            p[ab] += o.share * v;
                        }
                    } else if o.keep {
                        let base = at(k - steps, after, o.zone as usize, 0, 0);
                        for &ab in pairs {
                            let (a2, b2) = ((ab / NTO).saturating_sub(ou), (ab % NTO).saturating_sub(du));
                            p[ab] += o.share * done[base + a2 * NTO + b2];
                        }
                    } else {
                        let base = at(k - steps, -after, o.zone as usize, 0, 0);
                        for &ab in pairs {
                            let (a2, b2) = ((ab / NTO).saturating_sub(ou), (ab % NTO).saturating_sub(du));
                            p[ab] += o.share * (1.0 - done[base + b2 * NTO + a2]);
                        }
                    }
                }
            }
            for (ab, v) in p.iter().enumerate() {
                row[z * NTO * NTO + ab] = v.clamp(0.0, 1.0);
            }
        }
    }
}

/// The team with the ball's result when the game ends at `margin`: a win,
/// a loss, ½ level.
fn end(margin: f64) -> f64 {
    if margin > 0.0 {
        1.0
    } else if margin < 0.0 {
        0.0
    } else {
        0.5
    }
}

/// Index of a grid cell: time step, margin, zone, timeouts of the team with
/// the ball and of the other.
fn at(k: usize, m: i32, z: usize, a: usize, b: usize) -> usize {
    ((((k * NM) + (m.clamp(-MAX_MARGIN, MAX_MARGIN) + MAX_MARGIN) as usize) * NZ + z) * NTO + a) * NTO + b
}

/// P(the team with the ball wins) over the grid.
#[derive(Debug, Clone, PartialEq)]
pub struct DriveTable {
    v: Vec<f64>,
    /// The same values by timeouts pair, zone, time step, margin
    /// (`at_by_timeouts`): the outcome sums (`after_outcomes`) read one
    /// timeouts pair's 441 KB at a time, which stays in a core's cache,
    /// where the grid's order spreads it over all 7 MB.
    by_timeouts: Vec<f64>,
}

/// Index of a cell in `DriveTable::by_timeouts`.
fn at_by_timeouts(k: usize, m: i32, z: usize, a: usize, b: usize) -> usize {
    ((((a * NTO + b) * NZ + z) * NT + k) * NM) + (m.clamp(-MAX_MARGIN, MAX_MARGIN) + MAX_MARGIN) as usize
}

impl DriveTable {
    /// From the solved grid (`at` order).
    fn from_grid(v: Vec<f64>) -> DriveTable {
        let mut by_timeouts = vec![0.0; v.len()];
        for k in 0..NT {
            for m in -MAX_MARGIN..=MAX_MARGIN {
                for z in 0..NZ {
                    for a in 0..NTO {
                        for b in 0..NTO {
                            by_timeouts[at_by_timeouts(k, m, z, a, b)] = v[at(k, m, z, a, b)];
                        }
                    }
                }
            }
        }
        DriveTable { v, by_timeouts }
    }

    fn get(&self, k: usize, m: i32, z: usize, a: usize, b: usize) -> f64 {
        self.v[at(k, m, z, a, b)]
    }

    /// P(the team with the ball at `ball_on` wins) with `margin` (may be
    /// fractional), `secs` left in regulation (0-900) and the timeouts
    /// the team with the ball and the other hold (clamped to 0-3),
    /// interpolated linearly in the first three.
    pub fn value(&self, margin: f64, secs: f64, ball_on: f64, off_to: i32, def_to: i32) -> f64 {
        let t = (secs / STEP_SECS as f64).clamp(0.0, (NT - 1) as f64);
        let (k0, ft) = (t.floor() as usize, t.fract());
        let k1 = (k0 + 1).min(NT - 1);
        let m = margin.clamp(-(MAX_MARGIN as f64), MAX_MARGIN as f64);
        let (m0, fm) = (m.floor() as i32, m - m.floor());
        let b = ball_on.clamp(ZONE_AT[0], ZONE_AT[NZ - 1]);
        let z0 = ZONE_AT.iter().rposition(|&c| b >= c).unwrap_or(0).min(NZ - 2);
        let fz = ((b - ZONE_AT[z0]) / (ZONE_AT[z0 + 1] - ZONE_AT[z0])).clamp(0.0, 1.0);
        let (ta, tb) = (off_to.clamp(0, 3) as usize, def_to.clamp(0, 3) as usize);
        let mut p = 0.0;
        for (k, wk) in [(k0, 1.0 - ft), (k1, ft)] {
            for (mm, wm) in [(m0, 1.0 - fm), (m0 + 1, fm)] {
                for (z, wz) in [(z0, 1.0 - fz), (z0 + 1, fz)] {
                    let w = wk * wm * wz;
                    if w > 0.0 {
                        p += w * self.get(k, mm, z, ta, tb);
                    }
                }
            }
        }
        p
    }

    /// Σ share × P(the team with the ball wins) after each of `list`'s
    /// outcomes, from `margin` with `secs` left and timeouts `a` and `b`
    /// (the team with the ball's and the other's): each outcome as `value`
    /// would price it at the next possession's zone (the other side's
    /// table when the ball changes hands; a possession longer than the time
    /// left gets that share of its outcome), without `value`'s search for
    /// the zone: an outcome's zone is a grid zone.
    pub fn after_outcomes(&self, list: &[Outcome], margin: f64, secs: f64, a: i32, b: i32) -> f64 {
        // An outcome's clock is whole grid steps, so every outcome shares
        // the time weights: worked out once, as the margin's.
        let t = (secs / f64::from(STEP_SECS)).max(0.0);
        let (ks, ft) = (t.floor(), t - t.floor());
        let top = (NT - 1) as f64;
        let (mf, fm) = (margin.floor(), margin - margin.floor());
        let mut p = 0.0;
        for o in list {
            let steps = f64::from(o.steps);
            if steps > t {
                let after = margin + f64::from(o.swing);
                let f = secs / (steps * f64::from(STEP_SECS));
                p += o.share * (f * end(after) + (1.0 - f) * end(margin));
                continue;
            }
            let (k0, wt) = if ks - steps >= top { (NT - 1, 0.0) } else { ((ks - steps) as usize, ft) };
            let (a2, b2) = ((a - i32::from(o.off_used)).max(0) as usize, (b - i32::from(o.def_used)).max(0) as usize);
            // The next possession's team: its margin (whole part and
            // fraction, on the grid) and timeouts.
            let whole = mf as i32 + o.swing;
            let (m0, w1, ta, tb) = match (o.keep, fm > 0.0) {
                (true, _) => (whole, fm, a2, b2),
                (false, false) => (-whole, 0.0, b2, a2),
                (false, true) => (-whole - 1, 1.0 - fm, b2, a2),
            };
            let (m0, w1) = if m0 < -MAX_MARGIN {
                (-MAX_MARGIN, 0.0)
            } else if m0 >= MAX_MARGIN {
                (MAX_MARGIN, 0.0)
            } else {
                (m0, w1)
            };
            let z = o.zone as usize;
            let g = &self.by_timeouts;
            let at_k = |k: usize| {
                let i = at_by_timeouts(k, m0, z, ta, tb);
                if w1 > 0.0 {
                    (1.0 - w1) * g[i] + w1 * g[i + 1]
                } else {
                    g[i]
                }
            };
            let mut v = at_k(k0);
            if wt > 0.0 {
                v = (1.0 - wt) * v + wt * at_k((k0 + 1).min(NT - 1));
            }
            p += o.share * if o.keep { v } else { 1.0 - v };
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
    #[serde(skip)]
    ot: OnceLock<Arc<OvertimeTable>>,
    /// Tables of the other overtime rule sets, solved on first use
    /// (`overtime::RuleTables`).
    #[serde(skip)]
    ot_rules: overtime::RuleTables,
}

impl PartialEq for DriveModel {
    /// The table follows from the shares.
    fn eq(&self, other: &Self) -> bool {
        self.params == other.params
    }
}

impl DriveModel {
    pub fn new(params: DriveParams) -> DriveModel {
        DriveModel { params, table: OnceLock::new(), ot: OnceLock::new(), ot_rules: Default::default() }
    }

    /// With its table solved now, on the calling thread (`solve_serial`).
    pub fn solved_serially(params: DriveParams) -> DriveModel {
        let m = DriveModel::new(params);
        let _ = m.table.set(Arc::new(m.params.solve_serial()));
        m
    }

    /// The solved table (solved now if not yet).
    pub fn table(&self) -> &DriveTable {
        self.table.get_or_init(|| Arc::new(self.params.solve()))
    }

    /// The overtime table from the same possessions (solved now if not yet).
    pub fn overtime(&self) -> &OvertimeTable {
        self.ot.get_or_init(|| Arc::new(OvertimeTable::solve(&self.params)))
    }
}

#[cfg(test)]
mod tests;
