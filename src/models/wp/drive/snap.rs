//! The rest of a drive from one snap: the drive table values a possession
//! at its start, which cannot tell 2nd & 2 from 4th & 12 at the same yard
//! line. From the fit's own snaps this reads, per (how the offense plays,
//! 10-yard field zone, down and distance class, trailing side's timeouts
//! class), how the possession the snap belongs to ended — the margin
//! change up to the next possession, who has the ball next and in which
//! zone, with the mean clock taken and timeouts used — and values a snap
//! as the drive table (or in overtime the season's overtime table) one
//! possession on.

use super::{mode, to_class, Drive, DriveTable, Mode, Outcome, LATE_MODE_SECS, MAX_SWING, NMODE, NTO, NZ, STEP_SECS, TIE_MODE_SECS, TO_CLASS};
use super::overtime::{OvertimeTable, Phase};
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Lower bounds of the 10-yard zones a snap is counted in.
const SNAP_ZONES: usize = 10;
/// Down and distance classes: 2nd and 1-5, 6+; 3rd and 1-2, 3-6, 7+;
/// 4th and 1-2, 3+; any 1st down. A first down once kept the value of a
/// possession starting there (a first down is mostly what a throw leaves,
/// so it cost pricing time, and held out by season the distance to the
/// oracle was the same), but that value, read from possessions starting
/// in the zone, came out below the 2nd down's at the same spot: 1st & goal
/// at the 8, level with 60 s left, 0.70 against 0.81 for 2nd & goal, and
/// in 235 of 2,480 states by more than 0.01. With a class of its own, 92
/// (the worst 0.039), the distance 0.00600 / 0.00613 / 0.00575 (seeds 7 /
/// 101 / 202) from 0.00601 / 0.00614 / 0.00577.
const NDOWN: usize = 8;
/// Seconds left in regulation from which the rest of a drive takes over
/// from a possession's start (`weight`): none of it before 10:00, all of
/// it from 9:00. Held out by season (seeds 101 / 202), the rest of a drive
/// over the whole 4th period and from 10:00 or 7:30 on gave the same
/// distance to the oracle (0.00637 / 0.00643), and the snaps and the
/// states a throw leaves before 10:00 are a third of those it would value.
pub const FROM_SECS: f64 = 600.0;
pub const FULL_SECS: f64 = 540.0;

/// The rest of a drive's weight against the possession-start value at
/// `secs` left in regulation (0 to 1).
pub fn weight(secs: f64) -> f64 {
    ((FROM_SECS - secs) / (FROM_SECS - FULL_SECS)).clamp(0.0, 1.0)
}

/// Seconds over which a late mode's cells take over from the mode before.
const MODE_IN_SECS: f64 = 30.0;

/// Snaps a late mode's own counts weigh as much as (shrinkage toward all
/// the cell's snaps).
const SHRINK_SNAPS: f64 = 100.0;

fn down_class(down: i32, to_go: i32) -> Option<usize> {
    Some(match (down, to_go) {
        (2, ..=5) => 0,
        (2, _) => 1,
        (3, ..=2) => 2,
        (3, 3..=6) => 3,
        (3, _) => 4,
        (4, ..=2) => 5,
        (4, _) => 6,
        (1, _) => 7,
        _ => return None,
    })
}

/// The yards to go each class stands for (its snaps' usual distance):
/// between two classes of a down the value is interpolated by the yards to
/// go, so a yard more to go never steps the value at a class's edge.
const CLASS_TO_GO: [f64; NDOWN] = [3.0, 10.0, 1.5, 4.5, 10.0, 1.5, 6.0, 10.0];

/// The classes of `down`: the first and how many.
fn classes_of(down: i32) -> Option<(usize, usize)> {
    match down {
        1 => Some((7, 1)),
        2 => Some((0, 2)),
        3 => Some((2, 3)),
        4 => Some((5, 2)),
        _ => None,
    }
}

/// The value at `to_go` from the values of `down`'s classes (`None`: no
/// snaps): first made to fall as the distance grows (adjacent classes out
/// of order are pooled to their mean, pool-adjacent-violators with equal
/// weights: a class counted from other snaps can come out ahead of a
/// shorter one by chance or by who faces it, but a yard more to go is
/// never worth more), then interpolated between the classes' distances.
/// Before, WP stepped by up to 0.08 from one yard to the next at a class's
/// edge, and in 88 of 6,048 states rose with a yard more to go (by up to
/// 0.055).
fn by_distance(down: i32, to_go: i32, value: impl Fn(usize) -> Option<f64>) -> Option<f64> {
    let (first, n) = classes_of(down)?;
    // Present classes in order of distance: yards, value (no allocation:
    // this runs for every state a throw leaves late).
    let (mut at, mut v, mut np) = ([0.0f64; 3], [0.0f64; 3], 0);
    for k in first..first + n {
        if let Some(x) = value(k) {
            (at[np], v[np]) = (CLASS_TO_GO[k], x);
            np += 1;
        }
    }
    if np == 0 {
        return None;
    }
    // Pool adjacent violators (equal weights): blocks of (mean, count).
    let (mut mean, mut count, mut nb) = ([0.0f64; 3], [0usize; 3], 0);
    for &x in &v[..np] {
        (mean[nb], count[nb]) = (x, 1);
        nb += 1;
        while nb > 1 && mean[nb - 2] < mean[nb - 1] {
            let (m1, c1) = (mean[nb - 1], count[nb - 1]);
            let (m0, c0) = (mean[nb - 2], count[nb - 2]);
            mean[nb - 2] = (m0 * c0 as f64 + m1 * c1 as f64) / (c0 + c1) as f64;
            count[nb - 2] = c0 + c1;
            nb -= 1;
        }
    }
    let mut i = 0;
    for b in 0..nb {
        for _ in 0..count[b] {
            v[i] = mean[b];
            i += 1;
        }
    }
    let t = f64::from(to_go);
    if t <= at[0] {
        return Some(v[0]);
    }
    if t >= at[np - 1] {
        return Some(v[np - 1]);
    }
    let k = (1..np).find(|&k| at[k] > t).expect("t below the last class");
    Some(v[k - 1] + (v[k] - v[k - 1]) * (t - at[k - 1]) / (at[k] - at[k - 1]))
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

/// Calls `f` with each snap among `rows` whose possession another of the
/// same half follows: its zone, down class and rest of the drive.
fn each_rest(plays: &Plays, rows: &[u32], mut f: impl FnMut(usize, usize, &Drive)) {
    let mut in_rows = vec![false; plays.len()];
    for &r in rows {
        in_rows[r as usize] = true;
    }
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
            f(snap_zone(plays.ball_on[i]), dc, &Drive::between(plays, i, j));
        }
    }
}

/// Outcomes a snap's rest of the drive is counted by: (swing, keep, next
/// zone). One clock taken per outcome (the mean of its snaps') and one
/// count of timeouts used each side (the mean, rounded): a 25-season
/// league's cells hold 28 outcomes on average, where the drive model's
/// keys (clock buckets and timeouts used apart) give 217, and every one is
/// summed for each snap valued, the states a throw leaves too. Held out
/// by season (seeds 101 / 202), the distance to the oracle 0.00636 /
/// 0.00644 against 0.00636 / 0.00641 with the drive model's keys.
const NKEY: usize = (2 * MAX_SWING as usize + 1) * 2 * NZ;

fn key(d: &Drive) -> usize {
    ((d.swing.clamp(-MAX_SWING, MAX_SWING) + MAX_SWING) as usize * 2 + d.keep as usize) * NZ + d.next_zone.min(NZ - 1)
}

/// Per key: snaps, seconds taken, timeouts used by the offense and by the
/// defense, summed (or per snap, after `shares`).
type Sums = Vec<[f64; 4]>;

/// Sums over some snaps, with their count.
#[derive(Clone)]
struct Tally {
    sums: Sums,
    n: f64,
}

impl Tally {
    fn new() -> Tally {
        Tally { sums: vec![[0.0; 4]; NKEY], n: 0.0 }
    }

    fn add(&mut self, d: &Drive) {
        let e = &mut self.sums[key(d)];
        e[0] += 1.0;
        e[1] += f64::from(d.secs);
        e[2] += f64::from(d.off_used);
        e[3] += f64::from(d.def_used);
        self.n += 1.0;
    }

    /// The sums per snap (a distribution, with its means), zero without snaps.
    fn shares(&self) -> Sums {
        let n = self.n.max(1.0);
        self.sums.iter().map(|e| e.map(|x| x / n)).collect()
    }

    /// These snaps' shares shrunk toward `prior` (weight n / (n + SHRINK_SNAPS)).
    fn shrunk(&self, prior: &Sums) -> Sums {
        let w = self.n / (self.n + SHRINK_SNAPS);
        self.shares().iter().zip(prior).map(|(o, p)| std::array::from_fn(|k| w * o[k] + (1.0 - w) * p[k])).collect()
    }
}

/// The outcomes of a distribution, in key order.
fn outcomes(sh: &Sums) -> Vec<Outcome> {
    sh.iter()
        .enumerate()
        .filter(|(_, e)| e[0] > 0.0)
        .map(|(k, e)| Outcome {
            swing: (k / NZ / 2) as i32 - MAX_SWING,
            keep: (k / NZ) % 2 == 1,
            zone: (k % NZ) as u8,
            steps: ((e[1] / e[0] / f64::from(STEP_SECS)).round() as u16).max(1),
            off_used: (e[2] / e[0]).round() as u8,
            def_used: (e[3] / e[0]).round() as u8,
            share: e[0],
        })
        .collect()
}

impl SnapParams {
    /// Estimated from the snaps among `rows` whose possession another of
    /// the same half follows.
    pub fn estimate(plays: &Plays, rows: &[u32]) -> SnapParams {
        // Per (zone, down class): every snap; the rest of the game's; each
        // late mode's; each late mode's by timeouts class.
        let nc = SNAP_ZONES * NDOWN;
        let (mut all, mut other) = (vec![Tally::new(); nc], vec![Tally::new(); nc]);
        let mut late = vec![Tally::new(); nc * 3];
        let mut late_class = vec![Tally::new(); nc * 3 * NTO];
        let mut snaps = 0;
        each_rest(plays, rows, |z, dc, d| {
            let c = z * NDOWN + dc;
            all[c].add(d);
            snaps += 1;
            if d.mode == Mode::Other {
                other[c].add(d);
            } else {
                let md = d.mode as usize - 1;
                late[c * 3 + md].add(d);
                late_class[(c * 3 + md) * NTO + to_class(d.mode, d.off_to, d.def_to)].add(d);
            }
        });
        let mut cells = vec![Vec::new(); NMODE * SNAP_ZONES * NDOWN * NTO];
        for z in 0..SNAP_ZONES {
            for dc in 0..NDOWN {
                let c = z * NDOWN + dc;
                if all[c].n == 0.0 {
                    continue;
                }
                let base = all[c].shares();
                // The rest of the game has no timeouts classes (`to_class`
                // reads its cells at class 0 alone).
                let rest = if other[c].n > 0.0 { outcomes(&other[c].shares()) } else { outcomes(&base) };
                cells[cell(Mode::Other, z, dc, 0)] = rest;
                // A late mode's own snaps shrunk toward all of the cell's,
                // then each timeouts class's toward that.
                for (k, md) in [Mode::Trail, Mode::Lead, Mode::Tie].into_iter().enumerate() {
                    let pooled = late[c * 3 + k].shrunk(&base);
                    for class in 0..=TO_CLASS[NTO - 1] {
                        cells[cell(md, z, dc, class)] = outcomes(&late_class[(c * 3 + k) * NTO + class].shrunk(&pooled));
                    }
                }
            }
        }
        SnapParams { cells, snaps }
    }

    /// P(the offense wins) from `snap`: its cell's outcomes, each valued by
    /// `table` at the next possession; `None` when its cell has no snaps.
    pub fn value(&self, table: &DriveTable, snap: &Snap) -> Option<f64> {
        let Snap { margin, secs, ball_on, off_to, def_to, .. } = *snap;
        let (a, b) = (off_to.clamp(0, 3), def_to.clamp(0, 3));
        // Between the centres of the two nearest zones (5, 15, .. 95):
        // held out by season (seeds 101 / 202, with the drive model's
        // outcome keys), the distance to the oracle 0.00639 / 0.00645 with
        // one zone's value, 0.00636 / 0.00641.
        // A zone with no snaps gives way to the other one: falling back
        // to the possession-start value there made WP step by up to 0.044
        // across one yard (4th & 2, own 14 to own 15, level at 5:00).
        let (z0, f) = zones(ball_on);
        let in_mode = |md: Mode| self.value_in(table, md, z0, f, snap, a, b);
        let m = margin.round() as i32;
        let md = mode(secs.round() as i32, m);
        let v = in_mode(md);
        // A late mode takes over from the mode before it over
        // `MODE_IN_SECS`: switched at once, a first down stepped WP by
        // 0.006 in the second the 5:00 mark passed.
        let start = match md {
            Mode::Trail | Mode::Lead => LATE_MODE_SECS,
            Mode::Tie => TIE_MODE_SECS,
            Mode::Other => return v,
        };
        let w = (f64::from(start) - secs) / MODE_IN_SECS;
        if w >= 1.0 {
            return v;
        }
        let before = in_mode(mode(start + 1, m));
        match (v, before) {
            (Some(v), Some(u)) => Some(w.max(0.0) * v + (1.0 - w.max(0.0)) * u),
            (v, u) => v.or(u),
        }
    }

    /// `value` with the cells of mode `md`, between zones `z0` and `z0 + 1`
    /// (`f` of the way), timeouts `a` and `b` clamped.
    ///
    /// A side can always play as if it held fewer timeouts, so the cells of
    /// the timeouts class below are a bound: the offense's value is never
    /// below them when the class is its own timeouts', nor above them when
    /// it is the defense's. Counted apart, the classes' drives differ by
    /// chance too: behind by 4 at the opponent's 15 with 30 s left, a 2nd
    /// down was worth 0.019 less with two timeouts than with one. Bounded
    /// in the final 2:00, where a timeout is worth most (over the whole of
    /// the late modes, a first start on 25 seasons took 0.3 s more).
    #[allow(clippy::too_many_arguments)]
    #[inline]
    fn value_in(&self, table: &DriveTable, md: Mode, z0: usize, f: f64, snap: &Snap, a: i32, b: i32) -> Option<f64> {
        let in_class = |c: usize| {
            let at = |z: usize, dc: usize| list_value(table, &self.cells[cell(md, z, dc, c)], snap.margin, snap.secs, a, b);
            by_distance(snap.down, snap.to_go, |dc| between(at(z0, dc), at(z0 + 1, dc), f))
        };
        let c = to_class(md, a as usize, b as usize);
        let v = in_class(c);
        if c == 0 || snap.secs > f64::from(TIE_MODE_SECS) {
            return v;
        }
        match (v, in_class(c - 1)) {
            (Some(v), Some(fewer)) if md == Mode::Lead => Some(v.min(fewer)),
            (Some(v), Some(fewer)) => Some(v.max(fewer)),
            (v, fewer) => v.or(fewer),
        }
    }

    /// P(the offense wins) in overtime from a snap with `secs` left in the
    /// period, in `phase` under `table`'s rules: the cell of the rest of
    /// the game (the overtime table plays possessions as those), each
    /// outcome played on by the table; `None` when the cell has no snaps.
    pub fn overtime_value(&self, table: &OvertimeTable, phase: Phase, secs: f64, snap: &Snap) -> Option<f64> {
        let (z0, f) = zones(snap.ball_on);
        let on = f64::from(snap.ball_on);
        let list = |z: usize, dc: usize| {
            let l = &self.cells[cell(Mode::Other, z, dc, 0)];
            (!l.is_empty()).then(|| table.after(phase, secs, on, l))
        };
        by_distance(snap.down, snap.to_go, |dc| between(list(z0, dc), list(z0 + 1, dc), f))
    }
}

/// `f` of the way from `v0` to `v1`; either alone when the other zone has
/// no snaps.
fn between(v0: Option<f64>, v1: Option<f64>, f: f64) -> Option<f64> {
    match (v0, v1) {
        (Some(v0), Some(v1)) => Some((1.0 - f) * v0 + f * v1),
        (v0, v1) => v0.or(v1),
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
    (!list.is_empty()).then(|| table.after_outcomes(list, margin, secs, a, b).clamp(0.0, 1.0))
}

#[cfg(test)]
mod tests;
