//! One pass over the league for a situation, on the split index: running
//! sums per passer, per state cell, per season and for the league (`Sums`),
//! and the raw value of a metric from sums.

use super::index::{memo_key, Layout, Memo, Plan, SplitIndex, MEMO_SIZE};
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
    pub(super) passers: BTreeMap<u32, PasserSums>,
    pub(super) league: Accs,
    /// League sums per state cell (CELLS × metrics).
    pub(super) league_cells: Vec<Acc>,
    /// Per (passer, season), ignoring the situation's season filter.
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
    pub(super) team: u16,
}

/// One row's values (its unit flags, 0/1 flags, whole numbers and other
/// numbers) into the base sums `base` (see `Layout`).
#[inline]
fn add_values(lay: &Layout, units: u16, bits: u32, ints: &[i32], reals: &[f64], base: &mut [f64]) {
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

fn add_into(a: &mut [f64], b: &[f64]) {
    for (x, y) in a.iter_mut().zip(b) {
        *x += y;
    }
}

/// Passer-seasons per piece of work when the groups are summed.
const PS_BLOCK: usize = 64;
/// Rows gathered at a time before they are added.
const GATHER: usize = 64;

/// The pass for `s` (its seasons and passer aside): the rows it keeps
/// (checked in pieces on rayon's threads, kept in row order), grouped by
/// passer-season × state cell with a stable counting sort, each group summed
/// in row order; passer-season and season × cell sums are then summed from
/// the groups in key order. The order of every addition is fixed by the rows
/// alone, so the sums are the same on every machine, however many threads.
fn pass(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Memo {
    let plan = Plan::new(ix, s);
    let kept: Vec<u32> = plan
        .pieces()
        .par_iter()
        .map(|piece| {
            let mut out = Vec::new();
            for (k, rows) in piece {
                out.extend(rows.clone().filter(|&r| plan.keeps(ix, p, v, *k, r)).map(|r| r as u32));
            }
            out
        })
        .collect::<Vec<_>>()
        .concat();
    // Rows are summed per unit-season of the grouping (passer-, offense- or
    // defense-season).
    let u = ix.units_of(s.group);
    let (w, n_ps) = (ix.layout.width(), u.key.len());
    let key = |r: u32| u.id[r as usize] as usize * CELLS + ix.cell[r as usize] as usize;
    // Counting sort by key: group k's rows are sorted[start[k]..start[k + 1]].
    let mut start = vec![0u32; n_ps * CELLS + 1];
    for &r in &kept {
        start[key(r) + 1] += 1;
    }
    for k in 0..n_ps * CELLS {
        start[k + 1] += start[k];
    }
    let mut sorted = vec![0u32; kept.len()];
    let mut fill = start.clone();
    for &r in &kept {
        let k = key(r);
        sorted[fill[k] as usize] = r;
        fill[k] += 1;
    }
    drop((kept, fill));
    // Groups summed in fixed blocks of passer-seasons (in key order). Each
    // block's rows are gathered `GATHER` at a time before they are added
    // (the rows sit far apart in the index; loads that do not wait on each
    // other overlap), then added to their group in order.
    let lay = &ix.layout;
    let (ni, nr) = (lay.ints, lay.reals);
    let blocks: Vec<(Vec<u32>, Vec<f64>, Vec<(u32, u16)>)> = (0..n_ps.div_ceil(PS_BLOCK))
        .into_par_iter()
        .map(|b| {
            let (first, end_ps) = (b * PS_BLOCK, ((b + 1) * PS_BLOCK).min(n_ps));
            let keys: Vec<u32> = (first * CELLS..end_ps * CELLS).filter(|&k| start[k + 1] > start[k]).map(|k| k as u32).collect();
            let mut sums = vec![0.0; keys.len() * w];
            let mut last = vec![(0u32, 0u16); end_ps - first];
            let (a, z) = (start[first * CELLS] as usize, start[end_ps * CELLS] as usize);
            let (mut gi, mut gr) = (vec![0i32; GATHER * ni], vec![0.0f64; GATHER * nr]);
            let (mut gu, mut gb, mut gs, mut gt) = ([0u16; GATHER], [0u32; GATHER], [0u32; GATHER], [0u16; GATHER]);
            let mut g = 0;
            let mut at = a;
            while at < z {
                let chunk = &sorted[at..(at + GATHER).min(z)];
                for (q, &r) in chunk.iter().enumerate() {
                    let r = r as usize;
                    (gu[q], gb[q], gs[q], gt[q]) = (ix.units[r], ix.bits[r], ix.snap[r], ix.team[r]);
                    gi[q * ni..][..ni].copy_from_slice(&ix.ints[r * ni..][..ni]);
                    gr[q * nr..][..nr].copy_from_slice(&ix.reals[r * nr..][..nr]);
                }
                for q in 0..chunk.len() {
                    while start[keys[g] as usize + 1] as usize <= at + q {
                        g += 1;
                    }
                    add_values(lay, gu[q], gb[q], &gi[q * ni..][..ni], &gr[q * nr..][..nr], &mut sums[g * w..][..w]);
                    let end = &mut last[keys[g] as usize / CELLS - first];
                    if gs[q] + 1 > end.0 {
                        *end = (gs[q] + 1, gt[q]);
                    }
                }
                at += chunk.len();
            }
            (keys, sums, last)
        })
        .collect();
    let mut m = Memo {
        width: w,
        ps: vec![0.0; n_ps * w],
        season_cells: vec![0.0; ix.seasons.len() * CELLS * w],
        ps_cell_keys: Vec::new(),
        ps_cell_sums: Vec::new(),
        last: Vec::with_capacity(n_ps),
        derived: Default::default(),
    };
    for (keys, sums, last) in blocks {
        for (&k, b) in keys.iter().zip(sums.chunks(w)) {
            let (ps, c) = (k as usize / CELLS, k as usize % CELLS);
            let season = u.key[ps].1 as usize;
            add_into(&mut m.ps[ps * w..][..w], b);
            add_into(&mut m.season_cells[(season * CELLS + c) * w..][..w], b);
        }
        m.ps_cell_keys.extend(keys);
        m.ps_cell_sums.extend(sums);
        m.last.extend(last);
    }
    m
}

/// The pass for `s` (its seasons and passer aside), memoised in the index.
pub(super) fn memo(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Arc<Memo> {
    let key = memo_key(s);
    if let Some(m) = ix.memo.lock().ok().and_then(|c| c.get(&key).cloned()) {
        return m;
    }
    let m = Arc::new(pass(ix, p, v, s));
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
/// and passer), then its season filter on passer-seasons. The passer
/// filter picks the rows shown, not the league they are measured against,
/// so it is left to the caller. `ix` must be built from `p` and `v`.
pub(super) fn accumulate(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    debug_assert!(ix.fits(p), "the split index was built from another league");
    let s = &s.without_row_pick();
    from_memo(ix, &memo(ix, p, v, s), s, true)
}

/// The per-passer and league sums of a memoised pass over the seasons of
/// `s`, without the per-cell and per-season sums (`league_cells` zero,
/// `by_season` and `league_by_season` empty, no passer's cells).
pub(super) fn totals(ix: &SplitIndex, m: &Memo, s: &Situation) -> Sums {
    from_memo(ix, m, s, false)
}

fn from_memo(ix: &SplitIndex, m: &Memo, s: &Situation, full: bool) -> Sums {
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
    // Per passer: sums over the chosen seasons, the team of the last snap.
    let mut mine: Vec<Option<(Vec<f64>, (u32, u16))>> = vec![None; u.n_who];
    for (k, &(who, season)) in u.key.iter().enumerate() {
        let base = &m.ps[k * w..][..w];
        if base[0] == 0.0 {
            continue;
        }
        if full {
            sums.by_season.insert((who, ix.seasons[season as usize]), expand(lay, base));
        }
        if !chosen[season as usize] {
            continue;
        }
        let slot = mine[who as usize].get_or_insert_with(|| (vec![0.0; w], (0, 0)));
        add_into(&mut slot.0, base);
        if m.last[k].0 > slot.1 .0 {
            slot.1 = m.last[k];
        }
    }
    // Per passer: base sums per cell over the chosen seasons.
    let mut cells: Vec<Vec<f64>> = vec![Vec::new(); u.n_who];
    for (k, &key) in m.ps_cell_keys.iter().enumerate().filter(|_| full) {
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
        // A team row's team is the team itself.
        let team = if s.group == Group::Passer { last_offense } else { who as u16 };
        let cb = &cells[who];
        let (mut pc, mut cs) = if full { (vec![0.0; CELLS * nm], vec![0.0; CELLS * nm]) } else { (Vec::new(), Vec::new()) };
        if !cb.is_empty() {
            for c in (0..CELLS).filter(|&c| cb[c * w] > 0.0) {
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
    for (y, &season) in ix.seasons.iter().enumerate().filter(|_| full) {
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
