//! One pass over the league for a situation: running sums per passer, per
//! state cell, per season and for the league (`Sums`), and the raw value of
//! a metric from sums.

use super::metrics::{cell, contributions, metric_index, SnapValues, Stat, CELLS, METRICS};
use crate::plays::{Plays, NO_PASSER};
use crate::situation::Situation;
use crate::stats;
use std::collections::{BTreeMap, HashMap};

/// Running sums for one metric.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct Acc {
    pub(super) n: f64,
    pub(super) sum: f64,
    pub(super) sumsq: f64,
}

impl Acc {
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

fn add_masked(accs: &mut [Acc], vals: &[f64], mask: u64) {
    for (j, a) in accs.iter_mut().enumerate() {
        if mask & (1 << j) != 0 {
            a.add(vals[j]);
        }
    }
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

/// The pass over the league, in two halves on rayon's threads, merged in
/// snap order (the same halves on every machine, so the same sums). A panic
/// in either half reaches the caller.
pub(super) fn accumulate(p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    let n = p.len();
    let mid = n / 2;
    let (first, second) = rayon::join(|| accumulate_range(p, v, s, 0..mid), || accumulate_range(p, v, s, mid..n));
    merge(first, second)
}

fn merge_accs(a: &mut [Acc], b: &[Acc]) {
    for (x, y) in a.iter_mut().zip(b) {
        x.n += y.n;
        x.sum += y.sum;
        x.sumsq += y.sumsq;
    }
}

/// `a` then `b` (b's snaps come later, so its team wins).
fn merge(mut a: Sums, b: Sums) -> Sums {
    for (who, ps) in b.passers {
        match a.passers.get_mut(&who) {
            Some(mine) => {
                merge_accs(&mut mine.accs, &ps.accs);
                for (x, y) in mine.cells.iter_mut().zip(&ps.cells) {
                    *x += y;
                }
                for (x, y) in mine.cell_sums.iter_mut().zip(&ps.cell_sums) {
                    *x += y;
                }
                mine.team = ps.team;
            }
            None => {
                a.passers.insert(who, ps);
            }
        }
    }
    merge_accs(&mut a.league, &b.league);
    merge_accs(&mut a.league_cells, &b.league_cells);
    for (k, accs) in b.by_season {
        merge_accs(a.by_season.entry(k).or_insert_with(new_accs), &accs);
    }
    for (k, accs) in b.league_by_season {
        merge_accs(a.league_by_season.entry(k).or_insert_with(new_accs), &accs);
    }
    a
}

fn accumulate_range(p: &Plays, v: &SnapValues, s: &Situation, range: std::ops::Range<usize>) -> Sums {
    // The passer filter picks the rows shown, not the league they are
    // measured against: match on the situation without it.
    let unseasoned = Situation { passer: None, ..s.with_seasons(None) };
    let seasons = s.seasons.as_deref();
    let mut out = Sums {
        passers: BTreeMap::new(),
        league: new_accs(),
        league_cells: vec![Acc::default(); CELLS * METRICS.len()],
        by_season: IntMap::default(),
        league_by_season: BTreeMap::new(),
    };
    let mut vals = vec![0.0f64; METRICS.len()];
    for i in range {
        if !p.dropback[i] || p.passer[i] == NO_PASSER || !unseasoned.matches(p, v.wp, i) {
            continue;
        }
        let who = p.passer[i];
        let season = p.season[i];
        let mask = contributions(p, v, i, &mut vals);
        add_masked(out.by_season.entry((who, season)).or_insert_with(new_accs), &vals, mask);
        add_masked(out.league_by_season.entry(season).or_insert_with(new_accs), &vals, mask);
        if seasons.is_some_and(|ss| !ss.contains(&season)) {
            continue;
        }
        let c = cell(p, i);
        let ps = out.passers.entry(who).or_insert_with(|| PasserSums {
            accs: new_accs(),
            cells: vec![0.0; CELLS * METRICS.len()],
            cell_sums: vec![0.0; CELLS * METRICS.len()],
            team: p.offense[i],
        });
        ps.team = p.offense[i];
        let nm = METRICS.len();
        for j in 0..nm {
            if mask & (1 << j) != 0 {
                let x = vals[j];
                ps.accs[j].add(x);
                out.league[j].add(x);
                out.league_cells[c * nm + j].add(x);
                ps.cells[c * nm + j] += 1.0;
                ps.cell_sums[c * nm + j] += x;
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
