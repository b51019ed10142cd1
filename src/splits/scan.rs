//! One pass over the league for a situation, on the split index: running
//! sums per passer, per state cell, per season and for the league (`Sums`),
//! and the raw value of a metric from sums.

use super::index::{Layout, SplitIndex};
use super::memo::Memo;
use super::plan::{memo_key, Plan};
use super::metrics::{metric_index, SnapValues, Stat, ADJUSTED_METRIC, CELLS, METRICS};
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
    /// Per (passer, season), ignoring the situation's season filter (only
    /// when asked for: `seasons`).
    pub(super) by_season: IntMap<(u32, i32), Accs>,
    pub(super) league_by_season: BTreeMap<i32, Accs>,
    /// The pass the per-cell sums are read from (`cells_of`), and the
    /// seasons chosen (by dense id); `None` when the sums have no cells.
    cells: Option<(Arc<Memo>, Vec<bool>)>,
}

pub(super) struct PasserSums {
    pub(super) accs: Accs,
    /// Where his unit-seasons' state cells lie in the pass's per-cell keys
    /// (`Memo::ps_cell_keys`): one run, as his unit-seasons are numbered
    /// one after another. Read through `Sums::cells_of`.
    pub(super) cell_span: std::ops::Range<u32>,
    pub(super) team: u16,
}

/// A passer's cell sums per state cell over the chosen seasons (CELLS ×
/// `Layout::cell_width`) and which cells hold a snap (bit c: cell c); rows
/// of cells without snaps hold stale numbers. Kept by the caller across
/// passers so no passer allocates.
#[derive(Default)]
pub(super) struct CellSums {
    pub(super) base: Vec<f64>,
    pub(super) mask: u64,
    pub(super) width: usize,
}

impl Sums {
    /// No sums yet (the reference pass fills them row by row).
    #[cfg(test)]
    pub(super) fn empty() -> Sums {
        Sums {
            passers: BTreeMap::new(),
            league: new_accs(),
            league_cells: vec![Acc::default(); CELLS * METRICS.len()],
            by_season: IntMap::default(),
            league_by_season: BTreeMap::new(),
            cells: None,
        }
    }

    /// Merge the state cells of `ps` over the chosen seasons into `out`
    /// (in key order, so the sums are the same on every call). `false`
    /// when these sums carry no cells.
    pub(super) fn cells_of(&self, ix: &SplitIndex, group: Group, ps: &PasserSums, out: &mut CellSums) -> bool {
        let Some((m, chosen)) = &self.cells else { return false };
        let (w, key) = (m.cell_width, ix.units_of(group).key);
        if out.base.len() != CELLS * w {
            out.base = vec![0.0; CELLS * w];
        }
        out.width = w;
        out.mask = 0;
        for k in ps.cell_span.start as usize..ps.cell_span.end as usize {
            let code = m.ps_cell_keys[k] as usize;
            let (unit, c) = (code / CELLS, code % CELLS);
            if !chosen[key[unit].1 as usize] {
                continue;
            }
            let (src, dst) = (&m.ps_cell_sums[k * w..][..w], &mut out.base[c * w..][..w]);
            if out.mask >> c & 1 == 0 {
                // A copy (plus 0.0, which changes no sum: a plain copy of a
                // run of unknown length would be a call to memcpy).
                for (d, &x) in dst.iter_mut().zip(src) {
                    *d = x + 0.0;
                }
                out.mask |= 1 << c;
            } else {
                add_into(dst, src);
            }
        }
        true
    }
}

/// One row's values (its unit flags, 0/1 flags, and its whole numbers then
/// other numbers, as `f64`) into the base sums `base` (see `Layout`).
#[inline]
fn add_values(lay: &Layout, units: u16, bits: u32, vals: &[f64], base: &mut [f64]) {
    base[0] += 1.0;
    for u in 0..lay.units {
        base[1 + u] += f64::from(units >> u & 1);
    }
    let o = 1 + lay.units;
    for k in 0..lay.bits {
        base[o + k] += f64::from(bits >> k & 1);
    }
    let o = o + lay.bits;
    for (k, &x) in vals.iter().enumerate() {
        base[o + 2 * k] += x;
        base[o + 2 * k + 1] += x * x;
    }
}

// A passer's state cells are a bit mask.
const _: () = assert!(CELLS <= 64);

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
/// in row order straight into the pass's per-cell sums (blocks of
/// passer-seasons on rayon's threads, each writing its own part, with its
/// passer-seasons' sums from its groups in key order); the season × cell
/// sums are then summed from the groups in key order. The order of every
/// addition is fixed by the rows alone, so the sums are the same on every
/// machine, however many threads.
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
    // Passer rows: the opponent model's sums, from the same rows, beside
    // the counting sort below.
    let opp = || if s.group == Group::Passer { opponent_sums(ix, p.teams.len(), &kept) } else { (Vec::new(), Vec::new()) };
    let ((opp_keys, opp_sums), (start, sorted, last)) = rayon::join(opp, || counting_sort(ix, &u, &kept));
    drop(kept);
    // The groups with rows, in key order, and where each block of
    // passer-seasons starts among them.
    let keys: Vec<u32> = (0..n_ps * CELLS).filter(|&k| start[k + 1] > start[k]).map(|k| k as u32).collect();
    let n_blocks = n_ps.div_ceil(PS_BLOCK);
    let block_at: Vec<usize> = (0..=n_blocks).map(|b| keys.partition_point(|&k| (k as usize) < (b * PS_BLOCK).min(n_ps) * CELLS)).collect();
    let cw = ix.layout.cell_width();
    let mut m = Memo {
        width: w,
        cell_width: cw,
        ps: vec![0.0; n_ps * w],
        season_cells: vec![0.0; ix.seasons.len() * CELLS * w],
        ps_cell_keys: Vec::new(),
        ps_cell_sums: vec![0.0; keys.len() * cw],
        last,
        opp_keys,
        opp_sums,
        derived: Default::default(),
    };
    // Each block's part of the per-cell sums and of the unit-season sums.
    let mut parts: Vec<(usize, &mut [f64], &mut [f64])> = Vec::with_capacity(n_blocks);
    let (mut cell_rest, mut ps_rest) = (m.ps_cell_sums.as_mut_slice(), m.ps.as_mut_slice());
    for b in 0..n_blocks {
        let n_ps_b = ((b + 1) * PS_BLOCK).min(n_ps) - b * PS_BLOCK;
        let (c, cr) = std::mem::take(&mut cell_rest).split_at_mut((block_at[b + 1] - block_at[b]) * cw);
        let (q, qr) = std::mem::take(&mut ps_rest).split_at_mut(n_ps_b * w);
        parts.push((b, c, q));
        (cell_rest, ps_rest) = (cr, qr);
    }
    // Groups summed in fixed blocks of passer-seasons (in key order). Each
    // block's rows are gathered `GATHER` at a time before they are added
    // (the rows sit far apart in the index; loads that do not wait on each
    // other overlap), then added to their group in order.
    let lay = &ix.layout;
    let st = lay.stride();
    let full: Vec<Vec<f64>> = parts.into_par_iter().map(|(b, out, ps)| {
        let first = b * PS_BLOCK;
        // Summed in a buffer of the block's own, then its cell sums copied
        // to its part (the whole sums go on to the season × cell sums).
        let keys = &keys[block_at[b]..block_at[b + 1]];
        let mut sums = vec![0.0f64; keys.len() * w];
        let (Some(&k0), Some(&kz)) = (keys.first(), keys.last()) else { return sums };
        let (a, z) = (start[k0 as usize] as usize, start[kz as usize + 1] as usize);
        // Each row's record gathered: its flags and its values.
        let nv = st - 1;
        let mut gv = vec![0.0f64; GATHER * nv];
        let (mut gu, mut gb) = ([0u16; GATHER], [0u32; GATHER]);
        let mut g = 0;
        let mut at = a;
        while at < z {
            let chunk = &sorted[at..(at + GATHER).min(z)];
            for (q, &r) in chunk.iter().enumerate() {
                let r = r as usize;
                let rec = &ix.rec[r * st..][..st];
                let meta = rec[0] as u64;
                (gu[q], gb[q]) = ((meta >> 32) as u16, meta as u32);
                // Plus 0.0, which changes no sum: a plain copy of a run
                // of unknown length would be a call to memcpy per row.
                for (o, &x) in gv[q * nv..][..nv].iter_mut().zip(&rec[1..]) {
                    *o = x + 0.0;
                }
            }
            for q in 0..chunk.len() {
                while start[keys[g] as usize + 1] as usize <= at + q {
                    g += 1;
                }
                add_values(lay, gu[q], gb[q], &gv[q * nv..][..nv], &mut sums[g * w..][..w]);
            }
            at += chunk.len();
        }
        for ((&k, s), o) in keys.iter().zip(sums.chunks(w)).zip(out.chunks_mut(cw)) {
            add_into(&mut ps[(k as usize / CELLS - first) * w..][..w], s);
            lay.to_cell(s, o);
        }
        sums
    }).collect();
    for (&k, b) in keys.iter().zip(full.iter().flat_map(|s| s.chunks(w))) {
        let (ps, c) = (k as usize / CELLS, k as usize % CELLS);
        let season = u.key[ps].1 as usize;
        add_into(&mut m.season_cells[(season * CELLS + c) * w..][..w], b);
    }
    m.ps_cell_keys = keys;
    m
}

/// The kept rows grouped by unit-season × state cell (a stable counting
/// sort): group k's rows are `sorted[start[k]..start[k + 1]]`; and each
/// unit-season's (last snap + 1, its team), read here in row order, where
/// the rows lie close together.
#[allow(clippy::type_complexity)]
fn counting_sort(ix: &SplitIndex, u: &super::index::Units<'_>, kept: &[u32]) -> (Vec<u32>, Vec<u32>, Vec<(u32, u16)>) {
    let n_ps = u.key.len();
    let key = |r: u32| u.id[r as usize] as usize * CELLS + ix.cell[r as usize] as usize;
    let mut start = vec![0u32; n_ps * CELLS + 1];
    let mut last = vec![(0u32, 0u16); n_ps];
    for &r in kept {
        start[key(r) + 1] += 1;
        let (end, snap) = (&mut last[u.id[r as usize] as usize], ix.snap[r as usize]);
        if snap + 1 > end.0 {
            *end = (snap + 1, ix.team[r as usize]);
        }
    }
    for k in 0..n_ps * CELLS {
        start[k + 1] += start[k];
    }
    let mut sorted = vec![0u32; kept.len()];
    let mut fill = start.clone();
    for &r in kept {
        let k = key(r);
        sorted[fill[k] as usize] = r;
        fill[k] += 1;
    }
    (start, sorted, last)
}

/// Per (passer-season × teams + defense), the count, sum and sum of
/// squares of `ADJUSTED_METRIC` over the rows `kept` (in row order, as the
/// opponent model's own pass adds them): the nonzero keys ascending and
/// their sums.
fn opponent_sums(ix: &SplitIndex, n_teams: usize, kept: &[u32]) -> (Vec<u32>, Vec<(f64, f64, f64)>) {
    let Some(j) = metric_index(ADJUSTED_METRIC) else { return (Vec::new(), Vec::new()) };
    let mut sums = vec![(0.0f64, 0.0f64, 0.0f64); ix.ps_key.len() * n_teams];
    for &r in kept {
        let r = r as usize;
        let Some(x) = ix.value_at(j, r) else { continue };
        let defense = ix.ts_key[ix.ts_def[r] as usize].0 as usize;
        let e = &mut sums[ix.ps[r] as usize * n_teams + defense];
        e.0 += 1.0;
        e.1 += x;
        e.2 += x * x;
    }
    sums.into_iter().enumerate().filter(|(_, c)| c.0 > 0.0).map(|(k, c)| (k as u32, c)).unzip()
}

/// The pass for `s` (its seasons and passer aside), memoised in the index.
/// A grouping's every-snap pass is kept by the index for its life
/// (`SplitIndex::every`), made when first asked.
pub(super) fn memo(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Arc<Memo> {
    let key = memo_key(s);
    if key == memo_key(&Situation { group: s.group, ..Situation::default() }) {
        return ix.every[SplitIndex::group_slot(s.group)].get_or_init(|| Arc::new(pass(ix, p, v, s))).clone();
    }
    if let Some(m) = ix.memo.lock().ok().and_then(|mut c| c.get(&key)) {
        return m;
    }
    let m = Arc::new(pass(ix, p, v, s));
    if let Ok(mut c) = ix.memo.lock() {
        // Bounded by count and bytes, least recently used out: every
        // table reads an every-snap pass for "his normal", so those stay.
        c.insert(key, m.clone(), m.bytes());
        tracing::debug!(kept = c.len(), bytes = c.bytes(), "split index memo");
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
/// and passer), then its season filter on passer-seasons, with each
/// passer's state cells (`Sums::cells_of`); no per-season sums. The passer
/// filter picks the rows shown, not the league they are measured against,
/// so it is left to the caller. `ix` must be built from `p` and `v`.
pub(super) fn accumulate(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    debug_assert!(ix.fits(p), "the split index was built from another league");
    let s = &s.without_row_pick();
    from_memo(ix, &memo(ix, p, v, s), s, true, false)
}

/// `accumulate` with the per-season sums too (`by_season`,
/// `league_by_season`: every season, whatever the season filter).
pub(super) fn accumulate_seasons(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    let s = &s.without_row_pick();
    from_memo(ix, &memo(ix, p, v, s), s, true, true)
}

/// The per-season sums of a memoised pass only (passer and league totals
/// over the seasons of `s` too, no cells).
pub(super) fn seasons_of(ix: &SplitIndex, m: &Arc<Memo>, s: &Situation) -> Sums {
    from_memo(ix, m, s, false, true)
}

/// The per-passer and league sums of a memoised pass over the seasons of
/// `s`, without the per-season sums (`by_season` and `league_by_season`
/// empty) and the passers' cells. (It holds no reference to the pass, so
/// the pass may keep it.)
pub(super) fn totals(ix: &SplitIndex, m: &Memo, s: &Situation) -> Sums {
    from_memo_in(ix, m, None, s, false)
}

fn from_memo(ix: &SplitIndex, m: &Arc<Memo>, s: &Situation, cells: bool, seasons: bool) -> Sums {
    from_memo_in(ix, m, cells.then_some(m), s, seasons)
}

/// The sums of pass `m`; with `cells` (the same pass) each passer's state
/// cells can be read back (`Sums::cells_of`).
fn from_memo_in(ix: &SplitIndex, m: &Memo, cells: Option<&Arc<Memo>>, s: &Situation, seasons: bool) -> Sums {
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
        cells: None,
    };
    // Per passer (his unit-seasons are numbered one after another): sums
    // over the chosen seasons, the team of the last snap, and the run of
    // his cells in the pass's per-cell keys.
    let mut base = vec![0.0; w];
    let mut k = 0;
    let mut at = 0usize;
    while k < u.key.len() {
        let who = u.key[k].0;
        debug_assert!((who as usize) < u.n_who);
        let first = k;
        while k < u.key.len() && u.key[k].0 == who {
            k += 1;
        }
        // His cells: keys from first × CELLS up to k × CELLS.
        let from = at;
        while at < m.ps_cell_keys.len() && (m.ps_cell_keys[at] as usize) < k * CELLS {
            at += 1;
        }
        base.iter_mut().for_each(|x| *x = 0.0);
        let (mut any, mut last) = (false, (0u32, 0u16));
        for q in first..k {
            let b = &m.ps[q * w..][..w];
            if b[0] == 0.0 {
                continue;
            }
            let season = u.key[q].1 as usize;
            if seasons {
                sums.by_season.insert((who, ix.seasons[season]), expand(lay, b));
            }
            if !chosen[season] {
                continue;
            }
            any = true;
            add_into(&mut base, b);
            if m.last[q].0 > last.0 {
                last = m.last[q];
            }
        }
        if !any {
            continue;
        }
        // A team row's team is the team itself.
        let team = if s.group == Group::Passer { last.1 } else { who as u16 };
        sums.passers.insert(who, PasserSums { accs: expand(lay, &base), cell_span: from as u32..at as u32, team });
    }
    // The league: per cell over the chosen seasons; per season over cells.
    let mut league = vec![0.0; w];
    let mut cb = vec![0.0; w];
    for c in 0..CELLS {
        cb.iter_mut().for_each(|x| *x = 0.0);
        for (y, &on) in chosen.iter().enumerate() {
            if on {
                add_into(&mut cb, &m.season_cells[(y * CELLS + c) * w..][..w]);
            }
        }
        add_into(&mut league, &cb);
        for j in 0..nm {
            let (n, sum, sumsq) = lay.acc(&cb, j);
            sums.league_cells[c * nm + j] = Acc { n, sum, sumsq };
        }
    }
    sums.league = expand(lay, &league);
    for (y, &season) in ix.seasons.iter().enumerate().filter(|_| seasons) {
        let mut sb = vec![0.0; w];
        for c in 0..CELLS {
            add_into(&mut sb, &m.season_cells[(y * CELLS + c) * w..][..w]);
        }
        if sb[0] > 0.0 {
            sums.league_by_season.insert(season, expand(lay, &sb));
        }
    }
    sums.cells = cells.map(|m| (m.clone(), chosen));
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
