//! The split table: every passer's cells (raw value, league, state-mix
//! baseline, estimate and interval, percentile, z) for a situation, and the
//! metric descriptions that travel with it.

use super::metrics::{metric_index, SnapValues, Stat, METRICS};
use super::index::SplitIndex;
use super::scan::{accumulate, raw_value, Sums};
use super::shrink::{adjusted, shrink, stability};
use crate::plays::Plays;
use crate::situation::Situation;
use crate::stats;
use rayon::prelude::*;
use serde::Serialize;

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
    /// League values (counts are league totals); in JSON `league_totals`.
    #[serde(rename = "league_totals")]
    pub league: Vec<Option<f64>>,
    /// The league row as pages, JSON (`league`) and CSV show it: per-passer
    /// quantities only, so counts (league-wide sums) are `None`.
    #[serde(rename = "league")]
    pub league_row: Vec<Option<f64>>,
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

/// The league row's per-passer quantities: rates and means; counts blank.
pub fn league_row(league: &[Option<f64>]) -> Vec<Option<f64>> {
    METRICS.iter().zip(league).map(|(m, v)| if m.stat == Stat::Count { None } else { *v }).collect()
}

/// The split table for a situation (indexes the league first: callers that
/// ask for more than one table keep a `SplitIndex` and call `split_table_in`).
pub fn split_table(p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32) -> SplitTable {
    split_table_for(p, v, s, min_dropbacks, None)
}

/// The split table, with estimates and intervals also for `focus` (our
/// passer) when he falls short of the minimum. Other unqualified passers get
/// raw numbers only.
pub fn split_table_for(p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32, focus: Option<&str>) -> SplitTable {
    split_table_in(&SplitIndex::build(p, v), p, v, s, min_dropbacks, focus)
}

/// `split_table_for` on a league already indexed (`ix` built from `p`, `v`).
pub fn split_table_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32, focus: Option<&str>) -> SplitTable {
    let sums = accumulate(ix, p, v, s);
    build_table(p, &sums, s, min_dropbacks, focus)
}

pub(super) fn build_table(p: &Plays, sums: &Sums, s: &Situation, min_dropbacks: u32, focus: Option<&str>) -> SplitTable {
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
    // metrics are independent, so rayon's threads share them (results in
    // metric order; a panic in one reaches the caller).
    let wanted: Vec<bool> = rows.iter().map(|r| r.qualified || focus == Some(r.passer.as_str()) || s.passer.as_deref() == Some(r.passer.as_str())).collect();
    let jobs: Vec<usize> = (0..nm).filter(|&j| METRICS[j].stat != Stat::Count).collect();
    let results: Vec<(usize, Vec<Option<stats::Posterior>>)> =
        jobs.par_iter().map(|&j| (j, shrink(sums, j, &sigma2, &wanted, min_dropbacks))).collect();
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
        league_row: league_row(&league),
        league,
        rows,
    }
}
