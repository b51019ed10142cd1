//! The split index, built once per loaded league: its dropbacks with a
//! passer in compact columns, ordered by period and clock left in the half
//! (so clock windows are ranges of rows), dense passer-season and
//! team-season ids (the unit a table's rows are summed over), and each
//! snap's metric contributions folded into a few distinct columns. The
//! pass over a situation (`pass`) reads it; filters it does not cover fall
//! back to `Situation::matches` on each candidate row.

use super::metrics::{cell, contributions, SnapValues, METRICS};
use crate::plays::{Plays, NO_PASSER};
use crate::situation::{Group, Range, Situation, OT};
use rayon::prelude::*;
use std::any::Any;
use std::collections::HashMap;
use std::sync::{Arc, Mutex};

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
    blocks: Vec<(i32, std::ops::Range<usize>)>,
    /// Per block: seconds left in regulation minus in the half, when it is
    /// the same on every row of the block (then a game-clock window is a
    /// half-clock window).
    game_offset: Vec<Option<i32>>,
    // ---- per row ----
    pub(super) snap: Vec<u32>,
    pub(super) ps: Vec<u32>,
    pub(super) team: Vec<u16>,
    /// The offense's and the defense's team-season ids.
    pub(super) ts_off: Vec<u32>,
    pub(super) ts_def: Vec<u32>,
    pub(super) cell: Vec<u8>,
    secs_half: Vec<i32>,
    secs_game: Vec<i32>,
    margin: Vec<i32>,
    down: Vec<i32>,
    to_go: Vec<i32>,
    ball_on: Vec<i32>,
    /// Each row's metric values as one record of `Layout::stride` values
    /// (read by `units_at`, `bits_at`, `values_at`): a pass gathers rows
    /// that lie far apart, and one record is two or three cache lines
    /// where four columns were four or five.
    pub(super) rec: Vec<f64>,
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

/// A situation's pass over the index, its season filter aside: base sums
/// (see `Layout`) per unit-season (passer-, offense- or defense-season by
/// the grouping; "ps" below), per season × state cell and per
/// passer-season × state cell, and each passer-season's last snap.
pub(crate) struct Memo {
    pub(super) width: usize,
    /// `Layout::cell_width`: the width of `ps_cell_sums`' rows.
    pub(super) cell_width: usize,
    /// n_ps × width.
    pub(super) ps: Vec<f64>,
    /// n_seasons × CELLS × width.
    pub(super) season_cells: Vec<f64>,
    /// Nonzero (passer-season × CELLS + cell) keys, ascending, and their
    /// cell sums (`cell_width` each, `Layout::to_cell`): unit counts for
    /// the state-mix weights, sums for leaving a passer's own snaps out of
    /// the league's cell values.
    pub(super) ps_cell_keys: Vec<u32>,
    pub(super) ps_cell_sums: Vec<f64>,
    /// Per passer-season: (last snap + 1, its offense); 0 when none.
    pub(super) last: Vec<(u32, u16)>,
    /// What the estimates derive from this pass and one more thing (a
    /// season list, a minimum), under keys their modules choose.
    pub(super) derived: Mutex<HashMap<String, Arc<dyn Any + Send + Sync>>>,
}

/// How many derived results one pass keeps before it starts over.
const DERIVED_SIZE: usize = 16;

impl Memo {
    /// The result under `key`, made by `make` when it is not kept yet (two
    /// callers at once may both make it; they make the same thing).
    pub(super) fn derived<T: Any + Send + Sync>(&self, key: &str, make: impl FnOnce() -> T) -> Arc<T> {
        if let Some(x) = self.derived.lock().ok().and_then(|d| d.get(key).cloned()).and_then(|a| a.downcast::<T>().ok()) {
            return x;
        }
        let x = Arc::new(make());
        if let Ok(mut d) = self.derived.lock() {
            if d.len() >= DERIVED_SIZE {
                d.clear();
            }
            d.insert(key.to_string(), x.clone());
        }
        x
    }
}

impl Memo {
    /// Bytes its pass results hold (what it derives later is not counted).
    pub(super) fn bytes(&self) -> usize {
        use std::mem::size_of;
        size_of::<Memo>()
            + size_of::<f64>() * (self.ps.capacity() + self.season_cells.capacity() + self.ps_cell_sums.capacity())
            + size_of::<u32>() * self.ps_cell_keys.capacity()
            + size_of::<(u32, u16)>() * self.last.capacity()
    }
}

/// How many situations' passes the index keeps: past it, the pass used
/// least recently is let go.
pub(super) const MEMO_SIZE: usize = 16;

/// How many bytes of passes the index keeps: past it, the passes used
/// least recently are let go. (On 25 seasons the every-snap pass holds
/// about 27 MB, a late-game window 1-13 MB: a passer's profile reads every
/// preset's pass, 61 MB together, so the bound leaves room for them and a
/// few more views.)
pub(super) const MEMO_BYTES: usize = 96 << 20;

/// The index's memo of passes by key, bounded by `MEMO_SIZE` and by
/// `MEMO_BYTES` (the passes used least recently go first; the one just
/// added always stays; each pass weighs `Memo::bytes`).
pub(crate) type MemoMap = crate::bounded::Bounded<Arc<Memo>>;

/// An empty memo with the index's bounds.
pub(super) fn memo_map() -> MemoMap {
    MemoMap::new(MEMO_SIZE, MEMO_BYTES)
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
    /// Index the league `p` with its model values `v` (once per load). The
    /// league's columns are read in snap order (as they lie in memory), in
    /// pieces on rayon's threads; the rows are then put in the index's
    /// order one column at a time.
    pub fn build(p: &Plays, v: &SnapValues) -> SplitIndex {
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

    /// Forget every memoised pass and per-situation result (tests time the
    /// pass itself with it); the league-level fits stay.
    pub fn forget(&self) {
        if let Ok(mut m) = self.memo.lock() {
            m.clear();
        }
        if let Ok(mut m) = self.extra.lock() {
            m.clear();
        }
    }
}

/// The rows a situation (its season and passer filters aside) keeps: row
/// ranges from the clock windows, the filters the index holds checked on
/// its columns, and `Situation::matches` on what is left over.
pub(super) struct Plan {
    pub(super) ranges: Vec<std::ops::Range<usize>>,
    margin: Option<Range>,
    downs: Option<Vec<i32>>,
    to_go: Option<Range>,
    ball_on: Option<Range>,
    game_secs: Vec<Option<Range>>,
    /// The filters the index does not hold; None when there are none.
    rest: Option<Situation>,
}

/// `s` without the filters the index holds (and without seasons and
/// passer, which the pass leaves to its caller).
fn leftover(s: &Situation) -> Situation {
    Situation {
        preset: None,
        one_score: 8,
        periods: None,
        half_secs: None,
        game_secs: None,
        margin: None,
        downs: None,
        to_go: None,
        ball_on: None,
        seasons: None,
        passer: passer_filter(s),
        group: Group::Passer,
        ..s.clone()
    }
}

/// The passer filter as a filter on snaps: none when the rows are passers
/// (it picks the row shown, left to the caller); kept when they are teams
/// (a defense's numbers against one passer).
fn passer_filter(s: &Situation) -> Option<String> {
    if s.group == Group::Passer {
        None
    } else {
        s.passer.clone()
    }
}

/// The key of a situation's pass: everything but seasons and (when the
/// rows are passers) the passer; the grouping is part of it (its sums are
/// per unit of the grouping).
pub(super) fn memo_key(s: &Situation) -> String {
    format!("{:?}", Situation { preset: None, one_score: 8, seasons: None, passer: passer_filter(s), ..s.clone() })
}

impl Plan {
    pub(super) fn new(ix: &SplitIndex, s: &Situation) -> Plan {
        let rest = leftover(s);
        let rest = (rest != Situation::default()).then_some(rest);
        let mut ranges = Vec::new();
        let mut game_secs = Vec::new();
        for (b, (g, rows)) in ix.blocks.iter().enumerate() {
            if s.periods.as_ref().is_some_and(|ps| !ps.contains(g)) {
                continue;
            }
            // Seconds left in the half: a range of rows.
            let mut lo = s.half_secs.and_then(|r| r.lo).map_or(f64::NEG_INFINITY, |x| x);
            let mut hi = s.half_secs.and_then(|r| r.hi).map_or(f64::INFINITY, |x| x);
            let mut check_game = None;
            if *g < OT {
                if let Some(r) = s.game_secs {
                    match ix.game_offset[b] {
                        Some(off) => {
                            lo = lo.max(r.lo.map_or(f64::NEG_INFINITY, |x| x - off as f64));
                            hi = hi.min(r.hi.map_or(f64::INFINITY, |x| x - off as f64));
                        }
                        None => check_game = Some(r),
                    }
                }
            }
            let secs = &ix.secs_half[rows.clone()];
            let a = rows.start + secs.partition_point(|&x| (x as f64) < lo);
            let z = rows.start + secs.partition_point(|&x| (x as f64) <= hi);
            if a < z {
                ranges.push(a..z);
                game_secs.push(check_game);
            }
        }
        Plan { ranges, margin: s.margin, downs: s.downs.clone(), to_go: s.to_go, ball_on: s.ball_on, game_secs, rest }
    }

    /// Does row `r` of range number `k` belong?
    #[inline]
    pub(super) fn keeps(&self, ix: &SplitIndex, p: &Plays, v: &SnapValues, k: usize, r: usize) -> bool {
        let within = |range: &Option<Range>, x: i32| range.as_ref().is_none_or(|q| q.contains(x as f64));
        within(&self.game_secs[k], ix.secs_game[r])
            && within(&self.margin, ix.margin[r])
            && self.downs.as_ref().is_none_or(|d| d.contains(&ix.down[r]))
            && (self.to_go.is_none() || (ix.down[r] != 0 && within(&self.to_go, ix.to_go[r])))
            && within(&self.ball_on, ix.ball_on[r])
            && self.rest.as_ref().is_none_or(|s| s.matches(p, v.wp, ix.snap[r] as usize))
    }

    /// The ranges cut into pieces of at most `CHUNK` rows, in row order.
    pub(super) fn pieces(&self) -> Vec<Vec<(usize, std::ops::Range<usize>)>> {
        let mut out = vec![Vec::new()];
        let mut room = CHUNK;
        for (k, r) in self.ranges.iter().enumerate() {
            let mut a = r.start;
            while a < r.end {
                if room == 0 {
                    out.push(Vec::new());
                    room = CHUNK;
                }
                let z = (a + room).min(r.end);
                if let Some(last) = out.last_mut() {
                    last.push((k, a..z));
                }
                room -= z - a;
                a = z;
            }
        }
        out
    }
}

#[cfg(test)]
mod memo_tests {
    use super::*;

    /// A pass holding about `mb` MiB.
    fn pass_of(mb: usize) -> Arc<Memo> {
        Arc::new(Memo {
            width: 1,
            cell_width: 1,
            ps: vec![0.0; mb << 17],
            season_cells: Vec::new(),
            ps_cell_keys: Vec::new(),
            ps_cell_sums: Vec::new(),
            last: Vec::new(),
            derived: Default::default(),
        })
    }

    #[test]
    fn the_memo_lets_the_least_recently_used_passes_go_past_its_bytes() {
        let mut m = memo_map();
        // Three fit (a MiB left for each pass's own few bytes).
        let each = MEMO_BYTES / (3 << 20) - 1;
        for k in ["a", "b", "c"] {
            let p = pass_of(each);
            m.insert(k.to_string(), p.clone(), p.bytes());
        }
        assert_eq!(m.len(), 3);
        assert!(m.bytes() <= MEMO_BYTES);
        let _ = m.get("a");
        let p = pass_of(each);
        m.insert("d".to_string(), p.clone(), p.bytes());
        // "b" was used least recently; "a" was just read.
        assert!(m.get("b").is_none());
        assert!(m.get("a").is_some() && m.get("c").is_some() && m.get("d").is_some());
        assert!(m.bytes() <= MEMO_BYTES, "{} > {MEMO_BYTES}", m.bytes());
        assert_eq!(m.bytes(), ["a", "c", "d"].iter().map(|k| m.get(k).map_or(0, |p| p.bytes())).sum::<usize>());
        // A pass bigger than the whole budget stays alone; replacing a key
        // counts its bytes once.
        let p = pass_of(2 * MEMO_BYTES >> 20);
        m.insert("huge".to_string(), p.clone(), p.bytes());
        assert_eq!(m.len(), 1);
        let p = pass_of(1);
        m.insert("huge".to_string(), p.clone(), p.bytes());
        assert_eq!(m.bytes(), m.get("huge").map_or(0, |p| p.bytes()));
        m.clear();
        assert_eq!((m.len(), m.bytes()), (0, 0));
        // Past MEMO_SIZE passes the least recently used goes: pass 0 is
        // read along the way (as every table reads the every-snap pass), so
        // pass 1 goes first.
        for k in 0..=MEMO_SIZE {
            m.insert(k.to_string(), pass_of(0), 0);
            let _ = m.get("0");
        }
        assert_eq!(m.len(), MEMO_SIZE);
        assert!(m.get("0").is_some() && m.get("1").is_none() && m.get(&MEMO_SIZE.to_string()).is_some());
    }

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
