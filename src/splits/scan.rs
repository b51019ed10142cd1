//! One pass over the league for a situation, on the split index: running
//! sums per row of the table (passer, offense or defense, by the
//! situation's grouping), per state cell, per season and for the league
//! (`Sums`), and the raw value of a metric from sums.

use super::index::{memo_key, Layout, Memo, Plan, SplitIndex, Units, MEMO_SIZE};
use super::metrics::{metric_index, SnapValues, Stat, CELLS, METRICS};
use crate::plays::Plays;
use crate::situation::{Group, Situation};
use crate::stats;
use rayon::prelude::*;
use std::collections::{BTreeMap, HashMap};
use std::sync::Arc;

/// Running sums for one metric.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct Acc {
    pub(super) n: f64,
    pub(super) sum: f64,
    pub(super) sumsq: f64,
}

impl Acc {
    #[cfg_attr(not(test), allow(dead_code))]
    pub(super) fn add(&mut self, x: f64) {
        self.n += 1.0;
        self.sum += x;
        self.sumsq += x * x;
    }
    pub(super) fn mean(&self) -> Option<f64> {
        (self.n > 0.0).then(|| self.sum / self.n)
    }
}

pub(super) type Accs = Vec<Acc>;

fn new_accs() -> Accs {
    vec![Acc::default(); METRICS.len()]
}

/// A multiply-rotate hasher for the small integer keys of the per-season
/// sums (the standard hasher's DoS resistance is not needed for them).
#[derive(Default, Clone, Copy)]
pub(super) struct IntHasher(u64);
impl std::hash::Hasher for IntHasher {
    fn finish(&self) -> u64 {
        self.0
    }
    fn write(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.write_u64(b as u64);
        }
    }
    fn write_u32(&mut self, n: u32) {
        self.write_u64(n as u64);
    }
    fn write_i32(&mut self, n: i32) {
        self.write_u64(n as u32 as u64);
    }
    fn write_u64(&mut self, n: u64) {
        self.0 = (self.0.rotate_left(5) ^ n).wrapping_mul(0x51_7c_c1_b7_27_22_0a_95);
    }
}
pub(super) type IntMap<K, V> = HashMap<K, V, std::hash::BuildHasherDefault<IntHasher>>;

/// One pass over the league for a situation.
pub(super) struct Sums {
    /// Per row of the table: keyed by passer id, or by team id when the
    /// situation groups by offense or defense.
    pub(super) passers: BTreeMap<u32, PasserSums>,
    pub(super) league: Accs,
    /// League sums per state cell (CELLS × metrics).
    pub(super) league_cells: Vec<Acc>,
    /// Per (row, season), ignoring the situation's season filter.
    pub(super) by_season: IntMap<(u32, i32), Accs>,
    pub(super) league_by_season: BTreeMap<i32, Accs>,
}

pub(super) struct PasserSums {
    pub(super) accs: Accs,
    /// The passer's count of snaps per state cell, per metric.
    pub(super) cells: Vec<f64>,
    /// The passer's sum of values per state cell, per metric (to leave his
    /// own snaps out of the league's cell values).
    pub(super) cell_sums: Vec<f64>,
    /// The offense of his last snap; for a team row, the team itself.
    pub(super) team: u16,
}

/// One piece's running sums while the pass is made.
struct Partial {
    ps: Vec<f64>,
    season_cells: Vec<f64>,
    ps_cells: Vec<f64>,
    last: Vec<(u32, u16)>,
}

impl Partial {
    fn new(ix: &SplitIndex, u: &Units) -> Partial {
        let w = ix.layout.width();
        let n_ps = u.key.len();
        Partial {
            ps: vec![0.0; n_ps * w],
            season_cells: vec![0.0; ix.seasons.len() * CELLS * w],
            ps_cells: vec![0.0; n_ps * CELLS * w],
            last: vec![(0, 0); n_ps],
        }
    }

    /// Row `r` of the index, into its unit-season and its season's cell.
    #[inline]
    fn add(&mut self, ix: &SplitIndex, u: &Units, r: usize) {
        let lay = &ix.layout;
        let w = lay.width();
        let ps = u.id[r] as usize;
        let c = ix.cell[r] as usize;
        let season = u.key[ps].1 as usize;
        let snap = ix.snap[r] + 1;
        if snap > self.last[ps].0 {
            self.last[ps] = (snap, ix.team[r]);
        }
        let units = ix.units[r];
        let ints = &ix.ints[r * lay.ints..][..lay.ints];
        let reals = &ix.reals[r * lay.reals..][..lay.reals];
        let bits = ix.bits[r];
        let sc = (season * CELLS + c) * w;
        let pc = (ps * CELLS + c) * w;
        for base in [&mut self.ps[ps * w..][..w], &mut self.season_cells[sc..][..w], &mut self.ps_cells[pc..][..w]] {
            base[0] += 1.0;
            for u in 0..lay.units {
                base[1 + u] += f64::from(units >> u & 1);
            }
            let o = 1 + lay.units;
            for k in 0..lay.bits {
                base[o + k] += f64::from(bits >> k & 1);
            }
            let o = o + lay.bits;
            for (k, &x) in ints.iter().enumerate() {
                let x = x as f64;
                base[o + 2 * k] += x;
                base[o + 2 * k + 1] += x * x;
            }
            let o = o + 2 * lay.ints;
            for (k, &x) in reals.iter().enumerate() {
                base[o + 2 * k] += x;
                base[o + 2 * k + 1] += x * x;
            }
        }
    }

    /// `self` then `b` (later rows).
    fn merge(mut self, b: Partial) -> Partial {
        add_into(&mut self.ps, &b.ps);
        add_into(&mut self.season_cells, &b.season_cells);
        add_into(&mut self.ps_cells, &b.ps_cells);
        for (x, y) in self.last.iter_mut().zip(&b.last) {
            if y.0 > x.0 {
                *x = *y;
            }
        }
        self
    }
}

fn add_into(a: &mut [f64], b: &[f64]) {
    for (x, y) in a.iter_mut().zip(b) {
        *x += y;
    }
}

/// The pass for `s` (its seasons and passer aside), memoised in the index.
fn memo(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Arc<Memo> {
    let key = memo_key(s);
    if let Some(m) = ix.memo.lock().ok().and_then(|c| c.get(&key).cloned()) {
        return m;
    }
    let plan = Plan::new(ix, s);
    let pieces = plan.pieces();
    let u = ix.units_of(s.group);
    // In pieces on rayon's threads, merged in row order (the same pieces on
    // every machine, so the same sums). A panic in a piece reaches the caller.
    // Pieces go out `AT_ONCE` at a time, so only a few partial sums are
    // alive at once.
    const AT_ONCE: usize = 4;
    let mut all: Option<Partial> = None;
    for batch in pieces.chunks(AT_ONCE) {
        let parts: Vec<Partial> = batch
            .par_iter()
            .map(|piece| {
                let mut part = Partial::new(ix, &u);
                for (k, rows) in piece {
                    for r in rows.clone() {
                        if plan.keeps(ix, p, v, *k, r) {
                            part.add(ix, &u, r);
                        }
                    }
                }
                part
            })
            .collect();
        for part in parts {
            all = Some(match all {
                None => part,
                Some(a) => a.merge(part),
            });
        }
    }
    let all = all.unwrap_or_else(|| Partial::new(ix, &u));
    let w = ix.layout.width();
    let (mut keys, mut cell_sums) = (Vec::new(), Vec::new());
    for (k, b) in all.ps_cells.chunks(w).enumerate() {
        if b[0] > 0.0 {
            keys.push(k as u32);
            cell_sums.extend_from_slice(b);
        }
    }
    let m = Arc::new(Memo {
        width: ix.layout.width(),
        ps: all.ps,
        season_cells: all.season_cells,
        ps_cell_keys: keys,
        ps_cell_sums: cell_sums,
        last: all.last,
    });
    if let Ok(mut c) = ix.memo.lock() {
        if c.len() >= MEMO_SIZE {
            c.clear();
        }
        c.insert(key, m.clone());
    }
    m
}

fn expand(lay: &Layout, base: &[f64]) -> Accs {
    (0..METRICS.len())
        .map(|j| {
            let (n, sum, sumsq) = lay.acc(base, j);
            Acc { n, sum, sumsq }
        })
        .collect()
}

/// The sums for a situation: the memoised pass (situation without seasons
/// and the filter that picks its row), then its season filter on
/// unit-seasons. The row's filter (`Situation::row_pick`: the passer, or
/// the offense or defense when grouped by team) picks the rows shown, not
/// the league they are measured against, so it is left to the caller.
/// `ix` must be built from `p` and `v`.
pub(super) fn accumulate(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    debug_assert!(ix.fits(p), "the split index was built from another league");
    let s = &s.without_row_pick();
    let m = memo(ix, p, v, s);
    let u = ix.units_of(s.group);
    let lay = &ix.layout;
    let (w, nm) = (m.width, METRICS.len());
    let chosen: Vec<bool> = ix.seasons.iter().map(|y| s.seasons.as_ref().is_none_or(|ss| ss.contains(y))).collect();
    let mut sums = Sums {
        passers: BTreeMap::new(),
        league: new_accs(),
        league_cells: vec![Acc::default(); CELLS * nm],
        by_season: IntMap::default(),
        league_by_season: BTreeMap::new(),
    };
    // Per row: sums over the chosen seasons, the team of the last snap.
    let mut mine: Vec<Option<(Vec<f64>, (u32, u16))>> = vec![None; u.n_who];
    for (k, &(who, season)) in u.key.iter().enumerate() {
        let base = &m.ps[k * w..][..w];
        if base[0] == 0.0 {
            continue;
        }
        sums.by_season.insert((who, ix.seasons[season as usize]), expand(lay, base));
        if !chosen[season as usize] {
            continue;
        }
        let slot = mine[who as usize].get_or_insert_with(|| (vec![0.0; w], (0, 0)));
        add_into(&mut slot.0, base);
        if m.last[k].0 > slot.1 .0 {
            slot.1 = m.last[k];
        }
    }
    // Per row: base sums per cell over the chosen seasons.
    let mut cells: Vec<Vec<f64>> = vec![Vec::new(); u.n_who];
    for (k, &key) in m.ps_cell_keys.iter().enumerate() {
        let (ps, c) = (key as usize / CELLS, key as usize % CELLS);
        let (who, season) = u.key[ps];
        if !chosen[season as usize] {
            continue;
        }
        let mc = &mut cells[who as usize];
        if mc.is_empty() {
            mc.resize(CELLS * w, 0.0);
        }
        add_into(&mut mc[c * w..][..w], &m.ps_cell_sums[k * w..][..w]);
    }
    for (who, slot) in mine.into_iter().enumerate() {
        let Some((base, (_, last_offense))) = slot else { continue };
        let team = if s.group == Group::Passer { last_offense } else { who as u16 };
        let cb = &cells[who];
        let (mut pc, mut cs) = (vec![0.0; CELLS * nm], vec![0.0; CELLS * nm]);
        if !cb.is_empty() {
            for c in 0..CELLS {
                for j in 0..nm {
                    let (n, sum, _) = lay.acc(&cb[c * w..][..w], j);
                    pc[c * nm + j] = n;
                    cs[c * nm + j] = sum;
                }
            }
        }
        sums.passers.insert(who as u32, PasserSums { accs: expand(lay, &base), cells: pc, cell_sums: cs, team });
    }
    // The league: per cell over the chosen seasons; per season over cells.
    let mut league = vec![0.0; w];
    for c in 0..CELLS {
        let mut cb = vec![0.0; w];
        for (y, &on) in chosen.iter().enumerate() {
            if on {
                add_into(&mut cb, &m.season_cells[(y * CELLS + c) * w..][..w]);
            }
        }
        add_into(&mut league, &cb);
        for (j, a) in expand(lay, &cb).into_iter().enumerate() {
            sums.league_cells[c * nm + j] = a;
        }
    }
    sums.league = expand(lay, &league);
    for (y, &season) in ix.seasons.iter().enumerate() {
        let mut sb = vec![0.0; w];
        for c in 0..CELLS {
            add_into(&mut sb, &m.season_cells[(y * CELLS + c) * w..][..w]);
        }
        if sb[0] > 0.0 {
            sums.league_by_season.insert(season, expand(lay, &sb));
        }
    }
    sums
}

/// The rows of the index a situation keeps (its passer filter aside), as
/// snap positions in the league, in no particular order.
pub(super) fn matching_snaps(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Vec<usize> {
    let plan = Plan::new(ix, s);
    let chosen: Vec<bool> = ix.seasons.iter().map(|y| s.seasons.as_ref().is_none_or(|ss| ss.contains(y))).collect();
    let mut out = Vec::new();
    for (k, rows) in plan.ranges.iter().enumerate() {
        for r in rows.clone() {
            if chosen[ix.ps_key[ix.ps[r] as usize].1 as usize] && plan.keeps(ix, p, v, k, r) {
                out.push(ix.snap[r] as usize);
            }
        }
    }
    out
}

/// The raw value of metric `j` from sums, in display units.
pub(super) fn raw_value(accs: &[Acc], j: usize) -> Option<f64> {
    let m = &METRICS[j];
    let a = &accs[j];
    let v = match m.stat {
        Stat::Count => Some(a.sum),
        _ if m.key == "rating" => rating_from(accs),
        _ => a.mean(),
    }?;
    Some(v * m.scale)
}

fn sum_of(accs: &[Acc], key: &str) -> f64 {
    metric_index(key).map(|j| accs[j].sum).unwrap_or(0.0)
}

/// Passer rating from totals, with the official per-component caps.
pub(super) fn rating_from(accs: &[Acc]) -> Option<f64> {
    stats::passer_rating(
        sum_of(accs, "attempts"),
        sum_of(accs, "completions"),
        sum_of(accs, "yards"),
        sum_of(accs, "td"),
        sum_of(accs, "int"),
    )
}
