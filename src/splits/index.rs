//! The split index, built once per loaded league: its dropbacks with a
//! passer in compact columns, ordered by period and clock left in the half
//! (so clock windows are ranges of rows), dense passer-season and
//! team-season ids (the unit a table's rows are summed over), and each
//! snap's metric contributions folded into a few distinct columns. The
//! pass over a situation (`pass`) reads it; filters it does not cover fall
//! back to `Situation::matches` on each candidate row.

use super::memo::{memo_map, Memo, MemoMap};
use super::metrics::{cell, contributions, SnapValues, METRICS};
use crate::plays::{Plays, NO_PASSER};
use crate::situation::{Group, OT};
use rayon::prelude::*;
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};

/// Rows per piece of work handed to rayon (fixed, so the pieces and hence
/// the sums are the same on every machine).
pub(super) const CHUNK: usize = 32_768;

/// How a metric's per-snap value is kept.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Col {
    /// Always 1 on the metric's snaps: its sum is its unit's count.
    One,
    /// 0 or 1: bit `k` of the row's flags.
    Bit(usize),
    /// A whole number: `ints[row * n_ints + k]`.
    Int(usize),
    /// Any other number: `reals[row * n_reals + k]`.
    Real(usize),
}

/// Where each metric's running sums live in a base vector: `[rows, unit
/// counts.., bit sums.., (int sum, int sum of squares).., (real sum, real
/// sum of squares)..]`.
#[derive(Debug, Clone)]
pub(super) struct Layout {
    pub(super) units: usize,
    pub(super) unit_of: Vec<usize>,
    pub(super) col_of: Vec<Col>,
    pub(super) bits: usize,
    pub(super) ints: usize,
    pub(super) reals: usize,
}

impl Layout {
    /// Values per row of the index's records (`SplitIndex::rec`): the
    /// row's unit flags and 0/1 flags, then its whole numbers and its other
    /// numbers, as `f64`.
    pub(super) fn stride(&self) -> usize {
        1 + self.ints + self.reals
    }
    pub(super) fn width(&self) -> usize {
        1 + self.units + self.bits + 2 * self.ints + 2 * self.reals
    }
    /// Width of a state cell's sums: the base vector without the sums of
    /// squares (`[rows, unit counts.., bit sums.., int sums.., real
    /// sums..]`; the state-mix baselines read counts and sums only).
    pub(super) fn cell_width(&self) -> usize {
        1 + self.units + self.bits + self.ints + self.reals
    }
    /// A base vector's cell sums (`cell_width` of them) into `out`.
    #[inline]
    pub(super) fn to_cell(&self, b: &[f64], out: &mut [f64]) {
        let o = 1 + self.units + self.bits;
        out[..o].copy_from_slice(&b[..o]);
        for (i, x) in out[o..].iter_mut().enumerate() {
            *x = b[o + 2 * i];
        }
    }
    /// (count, sum) of metric `j` in cell sums `b` (see `cell_width`).
    pub(super) fn cell_acc(&self, b: &[f64], j: usize) -> (f64, f64) {
        let n = b[1 + self.unit_of[j]];
        let o_bit = 1 + self.units;
        let o_val = o_bit + self.bits;
        match self.col_of[j] {
            Col::One => (n, n),
            Col::Bit(k) => (n, b[o_bit + k]),
            Col::Int(k) => (n, b[o_val + k]),
            Col::Real(k) => (n, b[o_val + self.ints + k]),
        }
    }
    /// (count, sum, sum of squares) of metric `j` in base vector `b`.
    pub(super) fn acc(&self, b: &[f64], j: usize) -> (f64, f64, f64) {
        let n = b[1 + self.unit_of[j]];
        let o_bit = 1 + self.units;
        let o_int = o_bit + self.bits;
        let o_real = o_int + 2 * self.ints;
        match self.col_of[j] {
            Col::One => (n, n, n),
            Col::Bit(k) => (n, b[o_bit + k], b[o_bit + k]),
            Col::Int(k) => (n, b[o_int + 2 * k], b[o_int + 2 * k + 1]),
            Col::Real(k) => (n, b[o_real + 2 * k], b[o_real + 2 * k + 1]),
        }
    }
}

/// The league's dropbacks with a passer, for the split engine.
pub struct SplitIndex {
    pub(super) layout: Layout,
    /// Snaps in the league it was built from (a check that it still fits).
    pub(super) n_snaps: usize,
    /// Dense season id → season, ascending.
    pub(super) seasons: Vec<i32>,
    /// Dense passer-season id → (passer, dense season id), ascending.
    pub(super) ps_key: Vec<(u32, u16)>,
    pub(super) n_passers: usize,
    /// Dense team-season id → (team, dense season id), ascending: every
    /// team that is the offense or the defense of a row.
    pub(super) ts_key: Vec<(u32, u16)>,
    pub(super) n_teams: usize,
    /// Row ranges per period group (`period.min(OT)`), rows within a group
    /// ascending by seconds left in the half, then by snap.
    pub(super) blocks: Vec<(i32, std::ops::Range<usize>)>,
    /// Per block: seconds left in regulation minus in the half, when it is
    /// the same on every row of the block (then a game-clock window is a
    /// half-clock window).
    pub(super) game_offset: Vec<Option<i32>>,
    // ---- per row ----
    pub(super) snap: Vec<u32>,
    pub(super) ps: Vec<u32>,
    pub(super) team: Vec<u16>,
    /// The offense's and the defense's team-season ids.
    pub(super) ts_off: Vec<u32>,
    pub(super) ts_def: Vec<u32>,
    pub(super) cell: Vec<u8>,
    pub(super) secs_half: Vec<i32>,
    pub(super) secs_game: Vec<i32>,
    pub(super) margin: Vec<i32>,
    pub(super) down: Vec<i32>,
    pub(super) to_go: Vec<i32>,
    pub(super) ball_on: Vec<i32>,
    /// Each row's metric values as one record of `Layout::stride` values
    /// (read by `units_at`, `bits_at`, `values_at`): a pass gathers rows
    /// that lie far apart, and one record is two or three cache lines
    /// where four columns were four or five.
    pub(super) rec: Vec<f64>,
    /// The every-snap pass per grouping (passer, offense, defense: see
    /// `group_slot`), which depends on no situation: the passers' made with
    /// the index (`SplitIndex::build`), the teams' when first asked; kept
    /// for the index's life, outside the memo and `forget`.
    pub(super) every: [OnceLock<Arc<Memo>>; 3],
    /// Pass results per situation without its season and passer filters,
    /// bounded by count and by bytes (`MemoMap`).
    pub(super) memo: Mutex<MemoMap>,
    /// Other per-situation results kept by the engine's estimators (the
    /// opponent adjustment), by a key of their own; `forget` clears them.
    pub(super) extra: Mutex<HashMap<String, Arc<dyn std::any::Any + Send + Sync>>>,
    /// League-level fits per season list (the opponent model on every
    /// snap): part of the index like its columns, kept by `forget`.
    pub(super) league_fits: Mutex<HashMap<String, Arc<dyn std::any::Any + Send + Sync>>>,
}

/// The unit a grouping sums over: per row its dense id, per id (who,
/// dense season id), and how many `who` there are.
pub(super) struct Units<'a> {
    pub(super) id: &'a [u32],
    pub(super) key: &'a [(u32, u16)],
    pub(super) n_who: usize,
}

/// What the classification pass learns about each metric's values.
#[derive(Clone)]
struct Seen {
    one: Vec<bool>,
    bit: Vec<bool>,
    int: Vec<bool>,
    /// Bit k: metric k (earlier, same unit) had the same value on every row.
    same: Vec<u64>,
}

impl Seen {
    fn new(unit_of: &[usize]) -> Seen {
        let nm = unit_of.len();
        let same = (0..nm).map(|j| (0..j).filter(|&k| unit_of[k] == unit_of[j]).fold(0u64, |m, k| m | (1 << k))).collect();
        Seen { one: vec![true; nm], bit: vec![true; nm], int: vec![true; nm], same }
    }
    fn see(&mut self, vals: &[f64], mask: u64) {
        for j in 0..vals.len() {
            if mask & (1 << j) == 0 {
                continue;
            }
            let x = vals[j];
            self.one[j] &= x == 1.0;
            self.bit[j] &= x == 0.0 || x == 1.0;
            self.int[j] &= x.is_finite() && x.fract() == 0.0 && x.abs() < 2e9;
            let mut s = self.same[j];
            while s != 0 {
                let k = s.trailing_zeros() as usize;
                s &= s - 1;
                if vals[k] != x || x.is_nan() {
                    self.same[j] &= !(1 << k);
                }
            }
        }
    }
    fn merge(mut self, o: &Seen) -> Seen {
        for j in 0..self.one.len() {
            self.one[j] &= o.one[j];
            self.bit[j] &= o.bit[j];
            self.int[j] &= o.int[j];
            self.same[j] &= o.same[j];
        }
        self
    }
}

/// Every metric's contribution of snap `i`, zero outside its unit.
fn row_values(p: &Plays, v: &SnapValues, i: usize, vals: &mut [f64]) -> u64 {
    let mask = contributions(p, v, i, vals);
    for (j, x) in vals.iter_mut().enumerate() {
        if mask & (1 << j) == 0 {
            *x = 0.0;
        }
    }
    mask
}

fn layout_from(seen: &Seen, unit_of: Vec<usize>) -> Layout {
    let nm = unit_of.len();
    let units = unit_of.iter().max().map_or(0, |u| u + 1);
    let (mut bits, mut ints, mut reals) = (0, 0, 0);
    let mut col_of: Vec<Col> = Vec::with_capacity(nm);
    for j in 0..nm {
        let col = if seen.same[j] != 0 {
            col_of[seen.same[j].trailing_zeros() as usize]
        } else if seen.one[j] {
            Col::One
        } else if seen.bit[j] && bits < 32 {
            bits += 1;
            Col::Bit(bits - 1)
        } else if seen.int[j] {
            ints += 1;
            Col::Int(ints - 1)
        } else {
            reals += 1;
            Col::Real(reals - 1)
        };
        col_of.push(col);
    }
    Layout { units, unit_of, col_of, bits, ints, reals }
}

/// A row's unit flags and 0/1 flags in one `f64` (exact: below 2^48).
fn meta(units: u16, bits: u32) -> f64 {
    ((u64::from(units) << 32) | u64::from(bits)) as f64
}

/// Rows per piece of the build handed to rayon: a power of two, so a row's
/// piece and place in it are a shift and a mask.
const BUILD_SHIFT: u32 = 15;
const BUILD_CHUNK: usize = 1 << BUILD_SHIFT;

/// One piece of the index's per-row columns, in snap order (the build reads
/// the league's columns in the order they lie in memory, then puts the rows
/// in the index's order with `gather`).
#[derive(Default)]
struct Piece {
    ps: Vec<u32>,
    team: Vec<u16>,
    ts_off: Vec<u32>,
    ts_def: Vec<u32>,
    cell: Vec<u8>,
    secs_half: Vec<i32>,
    secs_game: Vec<i32>,
    margin: Vec<i32>,
    down: Vec<i32>,
    to_go: Vec<i32>,
    ball_on: Vec<i32>,
    rec: Vec<f64>,
}

/// One column of every piece (`w` values per row), put in the index's row
/// order: row `r` takes the values of snap-order row `order[r]`. The pieces
/// are freed as the column is made.
fn gather<T: Copy + Default + Send + Sync>(pieces: Vec<Vec<T>>, w: usize, order: &[u32]) -> Vec<T> {
    if w == 0 {
        return Vec::new();
    }
    let mask = BUILD_CHUNK - 1;
    let mut out = vec![T::default(); order.len() * w];
    out.par_chunks_mut(w * BUILD_CHUNK).zip(order.par_chunks(BUILD_CHUNK)).for_each(|(o, ks)| {
        for (j, &k) in ks.iter().enumerate() {
            let (piece, at) = ((k >> BUILD_SHIFT) as usize, k as usize & mask);
            o[j * w..(j + 1) * w].copy_from_slice(&pieces[piece][at * w..(at + 1) * w]);
        }
    });
    out
}

impl SplitIndex {
    /// The index's columns of the league `p` with its model values `v`
    /// (`SplitIndex::build` adds the every-snap pass). The league's columns
    /// are read in snap order (as they lie in memory), in pieces on rayon's
    /// threads; the rows are then put in the index's order one column at a
    /// time.
    pub(super) fn columns(p: &Plays, v: &SnapValues) -> SplitIndex {
        let nm = METRICS.len();
        assert!(nm <= 64, "the per-snap metric mask holds 64 metrics");
        let unit_of: Vec<usize> = METRICS.iter().map(|m| m.unit as usize).collect();
        let group = |i: usize| p.period[i].min(OT);
        // The dropbacks with a passer, in snap order.
        let dro: Vec<u32> = (0..p.len() as u32).filter(|&i| p.dropback[i as usize] && p.passer[i as usize] != NO_PASSER).collect();
        // Sort keys packed in one word (period group, seconds left in the
        // half, place in `dro`, which orders as the snap does).
        let mut keys: Vec<u64> = dro
            .iter()
            .enumerate()
            .map(|(k, &i)| {
                let i = i as usize;
                let g = (group(i).clamp(-1, 14) + 1) as u64;
                let secs = (p.secs_half[i].clamp(-32_768, 32_767) + 32_768) as u64;
                g << 48 | secs << 32 | k as u64
            })
            .collect();
        keys.par_sort_unstable();
        // Per index row, its place in `dro`, and its snap.
        let order: Vec<u32> = keys.iter().map(|&k| k as u32).collect();
        drop(keys);
        let snaps: Vec<u32> = order.iter().map(|&k| dro[k as usize]).collect();

        // Pass 1: which metrics are constant, 0/1, whole numbers, or equal
        // (what it finds does not depend on the order of the rows).
        let seen = dro
            .par_chunks(BUILD_CHUNK)
            .map(|rows| {
                let mut seen = Seen::new(&unit_of);
                let mut vals = vec![0.0; nm];
                for &i in rows {
                    let mask = row_values(p, v, i as usize, &mut vals);
                    seen.see(&vals, mask);
                }
                seen
            })
            .collect::<Vec<_>>()
            .into_iter()
            .fold(Seen::new(&unit_of), |a, b| a.merge(&b));
        let layout = layout_from(&seen, unit_of);

        // Dense seasons, passer-seasons and team-seasons.
        let mut seasons: Vec<i32> = dro.iter().map(|&i| p.season[i as usize]).collect();
        seasons.par_sort_unstable();
        seasons.dedup();
        let season_id = |s: i32| seasons.binary_search(&s).unwrap_or(0) as u16;
        let mut ps_key: Vec<(u32, u16)> = dro.iter().map(|&i| (p.passer[i as usize], season_id(p.season[i as usize]))).collect();
        ps_key.par_sort_unstable();
        ps_key.dedup();
        let mut ts_key: Vec<(u32, u16)> = dro
            .iter()
            .flat_map(|&i| {
                let (i, y) = (i as usize, season_id(p.season[i as usize]));
                [(p.offense[i] as u32, y), (p.defense[i] as u32, y)]
            })
            .collect();
        ts_key.par_sort_unstable();
        ts_key.dedup();
        let ts_id = |team: u16, y: u16| ts_key.binary_search(&(team as u32, y)).unwrap_or(0) as u32;

        // Pass 2: the columns, piece by piece in snap order.
        let lay = &layout;
        let pieces: Vec<Piece> = dro
            .par_chunks(BUILD_CHUNK)
            .map(|rows| {
                let n = rows.len();
                let mut vals = vec![0.0; nm];
                let mut c = Piece {
                    ps: Vec::with_capacity(n),
                    team: Vec::with_capacity(n),
                    ts_off: Vec::with_capacity(n),
                    ts_def: Vec::with_capacity(n),
                    cell: Vec::with_capacity(n),
                    secs_half: Vec::with_capacity(n),
                    secs_game: Vec::with_capacity(n),
                    margin: Vec::with_capacity(n),
                    down: Vec::with_capacity(n),
                    to_go: Vec::with_capacity(n),
                    ball_on: Vec::with_capacity(n),
                    rec: vec![0.0; n * lay.stride()],
                };
                let (st, ni) = (lay.stride(), lay.ints);
                for (r, &i) in rows.iter().enumerate() {
                    let i = i as usize;
                    let mask = row_values(p, v, i, &mut vals);
                    let y = season_id(p.season[i]);
                    c.ps.push(ps_key.binary_search(&(p.passer[i], y)).unwrap_or(0) as u32);
                    let (mut u, mut b) = (0u16, 0u32);
                    for j in 0..nm {
                        if mask & (1 << j) == 0 {
                            continue;
                        }
                        u |= 1 << lay.unit_of[j];
                        match lay.col_of[j] {
                            Col::One => {}
                            Col::Bit(k) => b |= u32::from(vals[j] == 1.0) << k,
                            Col::Int(k) => c.rec[r * st + 1 + k] = f64::from(vals[j] as i32),
                            Col::Real(k) => c.rec[r * st + 1 + ni + k] = vals[j],
                        }
                    }
                    c.rec[r * st] = meta(u, b);
                    c.team.push(p.offense[i]);
                    c.ts_off.push(ts_id(p.offense[i], y));
                    c.ts_def.push(ts_id(p.defense[i], y));
                    c.cell.push(cell(p, i) as u8);
                    c.secs_half.push(p.secs_half[i]);
                    c.secs_game.push(p.secs_game[i]);
                    c.margin.push(p.margin[i]);
                    c.down.push(p.down[i]);
                    c.to_go.push(p.to_go[i]);
                    c.ball_on.push(p.ball_on[i]);
                }
                c
            })
            .collect();
        drop(dro);
        let mut pieces = pieces;
        macro_rules! column {
            ($f:ident, $w:expr) => {
                gather(pieces.iter_mut().map(|c| std::mem::take(&mut c.$f)).collect(), $w, &order)
            };
        }
        let n = snaps.len();
        let stride = layout.stride();
        let mut ix = SplitIndex {
            n_snaps: p.len(),
            n_passers: p.passers.len(),
            n_teams: p.teams.len(),
            blocks: Vec::new(),
            game_offset: Vec::new(),
            ps: column!(ps, 1),
            team: column!(team, 1),
            ts_off: column!(ts_off, 1),
            ts_def: column!(ts_def, 1),
            cell: column!(cell, 1),
            secs_half: column!(secs_half, 1),
            secs_game: column!(secs_game, 1),
            margin: column!(margin, 1),
            down: column!(down, 1),
            to_go: column!(to_go, 1),
            ball_on: column!(ball_on, 1),
            rec: column!(rec, stride),
            snap: snaps,
            every: Default::default(),
            memo: Mutex::new(memo_map()),
            extra: Mutex::new(HashMap::new()),
            league_fits: Mutex::new(HashMap::new()),
            seasons,
            ps_key,
            ts_key,
            layout,
        };
        drop(pieces);
        drop(order);
        let mut start = 0;
        while start < n {
            let g = group(ix.snap[start] as usize);
            let end = start + ix.snap[start..].partition_point(|&i| group(i as usize) == g);
            let off = ix.secs_game[start] - ix.secs_half[start];
            let same = (start..end).all(|r| ix.secs_game[r] - ix.secs_half[r] == off);
            ix.blocks.push((g, start..end));
            ix.game_offset.push(same.then_some(off));
            start = end;
        }
        ix
    }

    /// Row `r`'s unit flags (bit `u`: the row counts in unit `u`).
    #[inline]
    pub(super) fn units_at(&self, r: usize) -> u16 {
        (self.rec[r * self.layout.stride()] as u64 >> 32) as u16
    }
    /// Row `r`'s 0/1 flags (`Col::Bit`).
    #[inline]
    pub(super) fn bits_at(&self, r: usize) -> u32 {
        self.rec[r * self.layout.stride()] as u64 as u32
    }
    /// Row `r`'s whole numbers then other numbers (`Col::Int`, `Col::Real`).
    #[inline]
    pub(super) fn values_at(&self, r: usize) -> &[f64] {
        let st = self.layout.stride();
        &self.rec[r * st + 1..][..st - 1]
    }

    /// The value metric `j` contributes at row `r` (`None` outside its unit).
    #[inline]
    pub(super) fn value_at(&self, j: usize, r: usize) -> Option<f64> {
        let lay = &self.layout;
        if self.units_at(r) >> lay.unit_of[j] & 1 == 0 {
            return None;
        }
        Some(match lay.col_of[j] {
            Col::One => 1.0,
            Col::Bit(k) => f64::from(self.bits_at(r) >> k & 1),
            Col::Int(k) => self.values_at(r)[k],
            Col::Real(k) => self.values_at(r)[lay.ints + k],
        })
    }

    /// The unit-season ids a grouping sums over.
    pub(super) fn units_of(&self, g: Group) -> Units<'_> {
        match g {
            Group::Passer => Units { id: &self.ps, key: &self.ps_key, n_who: self.n_passers },
            Group::Offense => Units { id: &self.ts_off, key: &self.ts_key, n_who: self.n_teams },
            Group::Defense => Units { id: &self.ts_def, key: &self.ts_key, n_who: self.n_teams },
        }
    }

    /// Rows in the index.
    pub fn len(&self) -> usize {
        self.snap.len()
    }

    pub fn is_empty(&self) -> bool {
        self.snap.is_empty()
    }

    /// Was it built from a league of this many snaps?
    pub fn fits(&self, p: &Plays) -> bool {
        self.n_snaps == p.len()
    }

    /// Which of `every` holds a grouping's every-snap pass.
    pub(super) fn group_slot(g: Group) -> usize {
        match g {
            Group::Passer => 0,
            Group::Offense => 1,
            Group::Defense => 2,
        }
    }

    /// Bytes the every-snap passes made so far hold (what is derived from
    /// them aside).
    pub fn every_bytes(&self) -> usize {
        self.every.iter().filter_map(|m| m.get()).map(|m| m.bytes()).sum()
    }

    /// Bytes the memo's passes hold now (`Memo::bytes`).
    pub fn memo_bytes(&self) -> usize {
        self.memo.lock().map_or(0, |m| m.bytes())
    }

    /// Forget every memoised pass and per-situation result (tests time the
    /// pass itself with it); the league-level fits, the every-snap passes
    /// and their totals per season list stay (they depend on no situation),
    /// what else was derived from them goes.
    pub fn forget(&self) {
        if let Ok(mut m) = self.memo.lock() {
            m.clear();
        }
        for m in self.every.iter().filter_map(|m| m.get()) {
            m.forget_derived(|k| k.starts_with(super::memo::TOTALS));
        }
        if let Ok(mut m) = self.extra.lock() {
            m.clear();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A row's flags come back whole from its record's first value, at
    /// the largest flags a row can have.
    #[test]
    fn a_rows_flags_survive_the_record() {
        for (u, b) in [(0u16, 0u32), (1, 1), (u16::MAX, u32::MAX), (0x5a5a, 0xdead_beef), (1 << 15, 1 << 31)] {
            let m = meta(u, b) as u64;
            assert_eq!(((m >> 32) as u16, m as u32), (u, b));
        }
    }

    /// A state cell's (count, sum) is the base vector's, for every metric.
    #[test]
    fn cell_sums_keep_each_metrics_count_and_sum() {
        let lay = Layout { units: 2, unit_of: vec![0, 1, 0, 1], col_of: vec![Col::One, Col::Bit(0), Col::Int(0), Col::Real(0)], bits: 1, ints: 1, reals: 1 };
        // [rows, unit 0, unit 1, bit 0, int sum, int sumsq, real sum, real sumsq]
        let base = [7.0, 5.0, 3.0, 2.0, 11.0, 41.0, -1.5, 2.25];
        let mut cell = vec![0.0; lay.cell_width()];
        lay.to_cell(&base, &mut cell);
        assert_eq!(cell, vec![7.0, 5.0, 3.0, 2.0, 11.0, -1.5]);
        for j in 0..4 {
            let (n, sum, _) = lay.acc(&base, j);
            assert_eq!(lay.cell_acc(&cell, j), (n, sum));
        }
    }
}
