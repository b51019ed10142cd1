//! The split engine: for a situation, every passer's metrics against the
//! league in the same spots, with a state-mix adjusted baseline,
//! empirical-Bayes estimates and intervals, percentiles, z-scores and
//! season-to-season stability; the passer profile; the snaps behind a number.
//! Pages, JSON, CSV and the PDF report are all views of these values.

pub mod metrics;
pub mod review;
mod snaps;

pub use metrics::{metric_index, MetricDef, SnapValues, Stat, Unit, METRICS};
pub use snaps::{coach_spot, down_distance, game_snaps, play_list, quarter, result_text, snap_at, Snap};

use crate::plays::{Plays, NO_PASSER};
use crate::situation::{Preset, Situation};
use crate::stats;
use metrics::{cell, contributions, CELLS};
use serde::Serialize;
use std::collections::{BTreeMap, HashMap};

/// Running sums for one metric.
#[derive(Debug, Clone, Copy, Default)]
struct Acc {
    n: f64,
    sum: f64,
    sumsq: f64,
}

impl Acc {
    fn add(&mut self, x: f64) {
        self.n += 1.0;
        self.sum += x;
        self.sumsq += x * x;
    }
    fn mean(&self) -> Option<f64> {
        (self.n > 0.0).then(|| self.sum / self.n)
    }
}

type Accs = Vec<Acc>;

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
struct IntHasher(u64);
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
type IntMap<K, V> = HashMap<K, V, std::hash::BuildHasherDefault<IntHasher>>;

/// One pass over the league for a situation.
struct Sums {
    passers: BTreeMap<u32, PasserSums>,
    league: Accs,
    /// League sums per state cell (CELLS × metrics).
    league_cells: Vec<Acc>,
    /// Per (passer, season), ignoring the situation's season filter.
    by_season: IntMap<(u32, i32), Accs>,
    league_by_season: BTreeMap<i32, Accs>,
}

struct PasserSums {
    accs: Accs,
    /// The passer's count of snaps per state cell, per metric.
    cells: Vec<f64>,
    team: u16,
}

/// The pass over the league, in two halves on two threads, merged.
fn accumulate(p: &Plays, v: &SnapValues, s: &Situation) -> Sums {
    let n = p.len();
    let mid = n / 2;
    let (first, second) = std::thread::scope(|scope| {
        let later = scope.spawn(|| accumulate_range(p, v, s, mid..n));
        let first = accumulate_range(p, v, s, 0..mid);
        (first, later.join())
    });
    match second {
        Ok(second) => merge(first, second),
        Err(_) => accumulate_range(p, v, s, 0..n),
    }
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
            }
        }
    }
    out
}

/// The raw value of metric `j` from sums, in display units.
fn raw_value(accs: &[Acc], j: usize) -> Option<f64> {
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
fn rating_from(accs: &[Acc]) -> Option<f64> {
    stats::passer_rating(
        sum_of(accs, "attempts"),
        sum_of(accs, "completions"),
        sum_of(accs, "yards"),
        sum_of(accs, "td"),
        sum_of(accs, "int"),
    )
}

/// One number in the table, with everything said about it.
#[derive(Debug, Clone, Serialize, Default)]
pub struct Cell {
    pub key: &'static str,
    /// The passer's raw value (display units: percentages ×100).
    pub value: Option<f64>,
    /// Snaps it is taken over.
    pub n: f64,
    /// League value in the same situation and seasons.
    pub league: Option<f64>,
    pub diff: Option<f64>,
    /// League value re-weighted to this passer's down × distance × field
    /// zone mix (direct standardization).
    pub adjusted_league: Option<f64>,
    pub adjusted_diff: Option<f64>,
    /// Empirical-Bayes estimate and 90% interval.
    pub estimate: Option<f64>,
    pub lo: Option<f64>,
    pub hi: Option<f64>,
    /// τ² / (τ² + σ²/n): the share of the spread in such numbers that is
    /// real difference between passers rather than sampling noise.
    pub signal: Option<f64>,
    /// Among qualified passers, 100 = best (on the estimate).
    pub percentile: Option<f64>,
    /// (raw − mean of qualified passers) / their standard deviation.
    pub z: Option<f64>,
}

#[derive(Debug, Clone, Serialize)]
pub struct PasserRow {
    pub passer: String,
    pub team: String,
    pub qualified: bool,
    pub dropbacks: u32,
    pub cells: Vec<Cell>,
}

impl PasserRow {
    pub fn cell(&self, key: &str) -> Option<&Cell> {
        self.cells.iter().find(|c| c.key == key)
    }
}

#[derive(Debug, Clone, Serialize)]
pub struct MetricInfo {
    pub key: &'static str,
    pub label: &'static str,
    pub short: &'static str,
    pub unit: &'static str,
    pub stat: Stat,
    pub higher_is_better: bool,
    pub decimals: usize,
    pub projector: bool,
    pub decision: bool,
    /// Season-to-season correlation among passers qualified in both
    /// seasons of a consecutive pair, pooled over pairs.
    pub stability: Option<f64>,
    pub stability_pairs: usize,
}

#[derive(Debug, Clone, Serialize)]
pub struct SplitTable {
    pub situation: String,
    pub query: Vec<(String, String)>,
    pub seasons: Vec<i32>,
    pub min_dropbacks: u32,
    pub metrics: Vec<MetricInfo>,
    /// League values (counts are league totals).
    pub league: Vec<Option<f64>>,
    pub league_dropbacks: u32,
    /// Every passer with a dropback in the situation; `qualified` marks
    /// those at or above the minimum.
    pub rows: Vec<PasserRow>,
}

impl SplitTable {
    pub fn row(&self, passer: &str) -> Option<&PasserRow> {
        self.rows.iter().find(|r| r.passer == passer)
    }
    pub fn qualified(&self) -> impl Iterator<Item = &PasserRow> {
        self.rows.iter().filter(|r| r.qualified)
    }
    /// Sort rows by a metric's raw value or estimate; missing values last.
    pub fn sort(&mut self, key: &str, by: SortBy, descending: bool) {
        let Some(j) = metric_index(key) else {
            if key == "passer" {
                self.rows.sort_by(|a, b| if descending { b.passer.cmp(&a.passer) } else { a.passer.cmp(&b.passer) });
            } else if key == "team" {
                self.rows.sort_by(|a, b| {
                    let o = a.team.cmp(&b.team).then(a.passer.cmp(&b.passer));
                    if descending { o.reverse() } else { o }
                });
            }
            return;
        };
        let pick = |r: &PasserRow| -> Option<f64> {
            let c = &r.cells[j];
            match by {
                SortBy::Value => c.value,
                SortBy::Estimate => c.estimate.or(c.value),
            }
        };
        self.rows.sort_by(|a, b| match (pick(a), pick(b)) {
            (Some(x), Some(y)) => {
                let o = x.partial_cmp(&y).unwrap_or(std::cmp::Ordering::Equal);
                let o = if descending { o.reverse() } else { o };
                o.then_with(|| a.passer.cmp(&b.passer))
            }
            (Some(_), None) => std::cmp::Ordering::Less,
            (None, Some(_)) => std::cmp::Ordering::Greater,
            (None, None) => a.passer.cmp(&b.passer),
        });
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum SortBy {
    Value,
    Estimate,
}

/// Default minimum dropbacks to qualify.
pub const DEFAULT_MIN_DROPBACKS: u32 = 20;

/// The split table for a situation.
pub fn split_table(p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32) -> SplitTable {
    split_table_for(p, v, s, min_dropbacks, None)
}

/// The split table, with estimates and intervals also for `focus` (our
/// passer) when he falls short of the minimum. Other unqualified passers get
/// raw numbers only.
pub fn split_table_for(p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32, focus: Option<&str>) -> SplitTable {
    let sums = accumulate(p, v, s);
    build_table(p, &sums, s, min_dropbacks, focus)
}

fn build_table(p: &Plays, sums: &Sums, s: &Situation, min_dropbacks: u32, focus: Option<&str>) -> SplitTable {
    let nm = METRICS.len();
    let db = metric_index("dropbacks").unwrap_or(0);
    let league: Vec<Option<f64>> = (0..nm).map(|j| raw_value(&sums.league, j)).collect();
    // Within-passer variance of per-snap values, pooled (for mean metrics).
    let mut within = vec![0.0f64; nm];
    let mut within_df = vec![0.0f64; nm];
    for ps in sums.passers.values() {
        for j in 0..nm {
            let a = &ps.accs[j];
            if a.n >= 2.0 {
                within[j] += a.sumsq - a.sum * a.sum / a.n;
                within_df[j] += a.n - 1.0;
            }
        }
    }
    let sigma2: Vec<f64> = (0..nm).map(|j| if within_df[j] > 0.0 { within[j] / within_df[j] } else { f64::NAN }).collect();

    let mut rows: Vec<PasserRow> = sums
        .passers
        .iter()
        .map(|(&who, ps)| {
            let dropbacks = ps.accs[db].n as u32;
            let cells = (0..nm)
                .map(|j| {
                    let m = &METRICS[j];
                    let value = raw_value(&ps.accs, j);
                    let lg = league[j];
                    let mut c = Cell { key: m.key, value, n: ps.accs[j].n, ..Cell::default() };
                    if m.stat != Stat::Count {
                        c.league = lg;
                        c.diff = value.zip(lg).map(|(a, b)| a - b);
                        c.adjusted_league = adjusted(sums, ps, j).map(|x| x * m.scale);
                        c.adjusted_diff = value.zip(c.adjusted_league).map(|(a, b)| a - b);
                    }
                    c
                })
                .collect();
            PasserRow {
                passer: p.passers[who as usize].clone(),
                team: p.teams[ps.team as usize].clone(),
                qualified: dropbacks >= min_dropbacks.max(1),
                dropbacks,
                cells,
            }
        })
        .collect();

    // Empirical Bayes per metric, priors from the qualified passers; the
    // metrics are independent, so two threads share them.
    let wanted: Vec<bool> = rows.iter().map(|r| r.qualified || focus == Some(r.passer.as_str()) || s.passer.as_deref() == Some(r.passer.as_str())).collect();
    let jobs: Vec<usize> = (0..nm).filter(|&j| METRICS[j].stat != Stat::Count).collect();
    let run = |js: &[usize]| js.iter().map(|&j| (j, shrink(sums, j, &sigma2, &wanted, min_dropbacks))).collect::<Vec<_>>();
    let results: Vec<(usize, Vec<Option<stats::Posterior>>)> = std::thread::scope(|scope| {
        let (a, b) = jobs.split_at(jobs.len() / 2);
        let other = scope.spawn(|| run(b));
        let mut mine = run(a);
        mine.extend(other.join().unwrap_or_default());
        mine
    });
    for (j, post) in results {
        let m = &METRICS[j];
        for (row, post) in rows.iter_mut().zip(post) {
            let Some(post) = post else { continue };
            let c = &mut row.cells[j];
            let clamp = |x: f64| if m.key == "rating" { x.clamp(0.0, 158.3) } else { x };
            c.estimate = Some(clamp(post.estimate) * m.scale);
            c.lo = Some(clamp(post.lo) * m.scale);
            c.hi = Some(clamp(post.hi) * m.scale);
            c.signal = Some(post.signal_share);
        }
        // Percentile (on the estimate) and z (on the raw value), qualified only.
        let ests: Vec<f64> = rows.iter().filter(|r| r.qualified).filter_map(|r| r.cells[j].estimate).collect();
        let raws: Vec<f64> = rows.iter().filter(|r| r.qualified).filter_map(|r| r.cells[j].value).collect();
        let spread = stats::mean_sd(&raws);
        for row in rows.iter_mut() {
            let c = &mut row.cells[j];
            if let Some(pr) = c.estimate.and_then(|e| stats::percentile_rank(&ests, e)) {
                c.percentile = Some(if m.higher_is_better { pr } else { 100.0 - pr });
            }
            if let (Some(x), Some((mean, sd))) = (c.value, spread) {
                c.z = stats::z_score(x, mean, sd);
            }
        }
    }

    if let Some(only) = &s.passer {
        rows.retain(|r| &r.passer == only);
    }
    rows.sort_by(|a, b| b.dropbacks.cmp(&a.dropbacks).then(a.passer.cmp(&b.passer)));
    let metrics = (0..nm)
        .map(|j| {
            let m = &METRICS[j];
            let (r, pairs) = if m.stat == Stat::Count { (None, 0) } else { stability(sums, j, min_dropbacks) };
            MetricInfo {
                key: m.key,
                label: m.label,
                short: m.short,
                unit: m.unit.label(),
                stat: m.stat,
                higher_is_better: m.higher_is_better,
                decimals: m.decimals,
                projector: m.projector,
                decision: m.decision,
                stability: r,
                stability_pairs: pairs,
            }
        })
        .collect();
    let seasons = match &s.seasons {
        Some(v) => v.clone(),
        None => p.seasons(),
    };
    SplitTable {
        situation: s.describe(),
        query: s.to_query(),
        seasons,
        min_dropbacks,
        metrics,
        league_dropbacks: sums.league[db].n as u32,
        league,
        rows,
    }
}

/// Posteriors of metric `j` for every passer (in `sums.passers` order) that
/// is `wanted`; the prior is fitted to the qualified passers.
fn shrink(sums: &Sums, j: usize, sigma2: &[f64], wanted: &[bool], min_dropbacks: u32) -> Vec<Option<stats::Posterior>> {
    let db = metric_index("dropbacks").unwrap_or(0);
    let none = || vec![None; sums.passers.len()];
    let qual: Vec<(f64, f64)> = sums
        .passers
        .values()
        .filter(|ps| ps.accs[db].n as u32 >= min_dropbacks.max(1) && ps.accs[j].n > 0.0)
        .map(|ps| (ps.accs[j].sum, ps.accs[j].n))
        .collect();
    if qual.len() < 3 {
        return none();
    }
    let per = sums.passers.values().zip(wanted);
    match METRICS[j].stat {
        Stat::Rate => {
            let Some(prior) = stats::fit_beta_prior(&qual) else { return none() };
            per.map(|(ps, &w)| if w { stats::beta_posterior(&prior, ps.accs[j].sum, ps.accs[j].n) } else { None }).collect()
        }
        _ => {
            let s2 = sigma2[j];
            if !s2.is_finite() || s2 <= 0.0 {
                return none();
            }
            let means: Vec<(f64, f64)> = qual.iter().map(|(sum, n)| (sum / n, s2 / n)).collect();
            let Some(prior) = stats::fit_normal_prior(&means) else { return none() };
            per.map(|(ps, &w)| {
                let a = &ps.accs[j];
                if w && a.n > 0.0 {
                    stats::normal_posterior(&prior, a.sum / a.n, s2 / a.n)
                } else {
                    None
                }
            })
            .collect()
        }
    }
}

/// Direct standardization: the league's value in each state cell, weighted
/// by this passer's own count of snaps there. A cell the league never saw
/// (impossible in practice: the passer's own snaps are league snaps) falls
/// back to the overall league value.
fn adjusted(sums: &Sums, ps: &PasserSums, j: usize) -> Option<f64> {
    let nm = METRICS.len();
    let overall = sums.league[j].mean()?;
    let (mut num, mut den) = (0.0, 0.0);
    for c in 0..CELLS {
        let w = ps.cells[c * nm + j];
        if w == 0.0 {
            continue;
        }
        let lv = sums.league_cells[c * nm + j].mean().unwrap_or(overall);
        num += w * lv;
        den += w;
    }
    if METRICS[j].key == "rating" {
        // The rating baseline is the capped league rating shifted by the
        // mix effect on the linear per-attempt form.
        let lin_overall = overall;
        let base = rating_from(&sums.league)?;
        return (den > 0.0).then(|| base + (num / den - lin_overall));
    }
    (den > 0.0).then(|| num / den)
}

/// Pooled season-to-season correlation of a metric's raw value among
/// passers qualified in both seasons of each consecutive pair.
fn stability(sums: &Sums, j: usize, min_dropbacks: u32) -> (Option<f64>, usize) {
    let db = metric_index("dropbacks").unwrap_or(0);
    let (mut xs, mut ys) = (Vec::new(), Vec::new());
    for (&(who, season), accs) in &sums.by_season {
        if (accs[db].n as u32) < min_dropbacks.max(1) {
            continue;
        }
        let Some(next) = sums.by_season.get(&(who, season + 1)) else { continue };
        if (next[db].n as u32) < min_dropbacks.max(1) {
            continue;
        }
        if let (Some(a), Some(b)) = (raw_value(accs, j), raw_value(next, j)) {
            xs.push(a);
            ys.push(b);
        }
    }
    (stats::pearson(&xs, &ys), xs.len())
}

/// One passer's numbers in each season (raw), beside the league's.
#[derive(Debug, Clone, Serialize)]
pub struct SeasonLine {
    pub season: i32,
    pub dropbacks: u32,
    pub values: Vec<Option<f64>>,
    pub league: Vec<Option<f64>>,
}

/// A passer across every preset, beside the league, plus a season trend
/// in `trend_situation`.
#[derive(Debug, Clone, Serialize)]
pub struct Profile {
    pub passer: String,
    pub team: Option<String>,
    pub metrics: Vec<MetricInfo>,
    pub presets: Vec<ProfileLine>,
    pub trend_situation: String,
    pub trend: Vec<SeasonLine>,
}

#[derive(Debug, Clone, Serialize)]
pub struct ProfileLine {
    pub preset: &'static str,
    pub label: &'static str,
    pub query: Vec<(String, String)>,
    pub league: Vec<Option<f64>>,
    pub league_dropbacks: u32,
    pub qualified_passers: usize,
    /// None when the passer has no dropback in the preset.
    pub row: Option<PasserRow>,
}

/// The profile of `passer`. `base` carries the seasons and one-score bound;
/// `trend` is the situation of the season trend.
pub fn profile(p: &Plays, v: &SnapValues, passer: &str, base: &Situation, trend: &Situation, min_dropbacks: u32) -> Option<Profile> {
    let who = p.passer_index(passer)?;
    let mut metrics = Vec::new();
    let mut presets = Vec::new();
    let mut team = None;
    for preset in Preset::ALL {
        let mut s = preset.situation(base.one_score);
        s.seasons = base.seasons.clone();
        let t = split_table_for(p, v, &s, min_dropbacks, Some(passer));
        let row = t.row(passer).cloned();
        if team.is_none() {
            team = row.as_ref().map(|r| r.team.clone());
        }
        if metrics.is_empty() {
            metrics = t.metrics.clone();
        }
        presets.push(ProfileLine {
            preset: preset.key(),
            label: preset.label(),
            query: s.to_query(),
            league: t.league.clone(),
            league_dropbacks: t.league_dropbacks,
            qualified_passers: t.qualified().count(),
            row,
        });
    }
    let sums = accumulate(p, v, &trend.with_seasons(None));
    let nm = METRICS.len();
    let db = metric_index("dropbacks").unwrap_or(0);
    let trend_lines = sums
        .league_by_season
        .iter()
        .filter_map(|(&season, league)| {
            let mine = sums.by_season.get(&(who, season))?;
            Some(SeasonLine {
                season,
                dropbacks: mine[db].n as u32,
                values: (0..nm).map(|j| raw_value(mine, j)).collect(),
                league: (0..nm).map(|j| raw_value(league, j)).collect(),
            })
        })
        .collect();
    Some(Profile {
        passer: passer.to_string(),
        team,
        metrics,
        presets,
        trend_situation: trend.describe(),
        trend: trend_lines,
    })
}

/// Histogram of per-dropback EPA for a passer and for the league in a
/// situation: shares of dropbacks per bin of `width` from `lo` to `hi`
/// (ends collect the tails).
#[derive(Debug, Clone, Serialize)]
pub struct EpaDistribution {
    pub edges: Vec<f64>,
    pub passer: Vec<f64>,
    pub league: Vec<f64>,
    pub passer_n: usize,
    pub league_n: usize,
}

pub fn epa_distribution(p: &Plays, v: &SnapValues, s: &Situation, passer: &str) -> EpaDistribution {
    let (lo, hi, width) = (-4.0, 4.0, 0.5);
    let bins = ((hi - lo) / width) as usize;
    let edges: Vec<f64> = (0..=bins).map(|k| lo + k as f64 * width).collect();
    let (mut mine, mut all) = (vec![0.0; bins], vec![0.0; bins]);
    let (mut nm, mut na) = (0usize, 0usize);
    let who = p.passer_index(passer);
    for i in 0..p.len() {
        if !p.dropback[i] || p.passer[i] == NO_PASSER || !s.matches(p, v.wp, i) {
            continue;
        }
        let e = v.epa.get(i).copied().unwrap_or(0.0);
        let b = (((e - lo) / width).floor().max(0.0) as usize).min(bins - 1);
        all[b] += 1.0;
        na += 1;
        if Some(p.passer[i]) == who {
            mine[b] += 1.0;
            nm += 1;
        }
    }
    let norm = |v: &mut Vec<f64>, n: usize| {
        if n > 0 {
            v.iter_mut().for_each(|x| *x /= n as f64);
        }
    };
    norm(&mut mine, nm);
    norm(&mut all, na);
    EpaDistribution { edges, passer: mine, league: all, passer_n: nm, league_n: na }
}
