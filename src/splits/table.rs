//! The split table: every passer's (or offense's, or defense's, by the
//! situation's grouping) cells (raw value, league, state-mix
//! baseline, estimate, lift and their intervals, percentile, chance of beating
//! the league) for a situation, and the metric descriptions that travel with it.

pub use super::cell::{Cell, PasserRow};
use super::estimates::{estimates, fill, ranks_key, ranks_of, Ranks, Shown};
use super::index::SplitIndex;
use super::memo::Memo;
use super::metrics::{higher_is_better, is_style, metric_index, SnapValues, Stat, METRICS};
use super::normal::every_snap;
use super::scan::{accumulate, memo, rating_from, raw_value, seasons_of, Acc, CellSums, Sums};
use super::shrink::{adjusted, stability};
use crate::stats::multilevel::normal_interval;
use crate::plays::Plays;
use crate::situation::{Group, Situation};
use crate::stats;
use rayon::prelude::*;
use serde::Serialize;
use std::sync::Arc;

#[derive(Debug, Clone, Serialize)]
pub struct MetricInfo {
    pub key: &'static str,
    pub label: &'static str,
    pub short: &'static str,
    pub unit: &'static str,
    pub stat: Stat,
    /// For the table's grouping: flipped for a defense (`metrics::higher_is_better`).
    pub higher_is_better: bool,
    pub decimals: usize,
    pub projector: bool,
    pub decision: bool,
    /// Season-to-season correlation among passers qualified in both
    /// seasons of a consecutive pair, each season centred, pooled over pairs.
    pub stability: Option<f64>,
    /// Its 90% interval (Fisher's z).
    pub stability_lo: Option<f64>,
    pub stability_hi: Option<f64>,
    pub stability_pairs: usize,
}

#[derive(Debug, Clone, Serialize)]
pub struct SplitTable {
    pub situation: String,
    /// What the rows are: passers, offenses or defenses.
    pub group: Group,
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
    /// The league's raw lift: its value here minus its value on every other
    /// snap of the same seasons (`None` for counts and when there are no
    /// other snaps; the rating's from totals, capped).
    pub league_lift: Vec<Option<f64>>,
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
                SortBy::Lift => c.lift,
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
    /// The lift (his value here minus his normal).
    Lift,
}

/// Default minimum dropbacks to qualify.
pub const DEFAULT_MIN_DROPBACKS: u32 = 20;

/// Default minimum for passers against one defense (`opponent=`, rows per
/// passer): a passer meets one opponent once or twice a season, a handful
/// of late dropbacks each time (demo league, end of game: at most 7-27 per
/// defense in a season, 12 typically), so 20 ranked nobody.
pub const DEFAULT_MIN_VS_ONE_DEFENSE: u32 = 5;

/// The minimum dropbacks to qualify when none is asked for.
pub fn default_min_dropbacks(s: &Situation) -> u32 {
    if s.group == Group::Passer && s.opponent.is_some() {
        DEFAULT_MIN_VS_ONE_DEFENSE
    } else {
        DEFAULT_MIN_DROPBACKS
    }
}

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
    let (sums, opp) = sums_and_opponent(ix, p, v, s);
    table_of(ix, p, v, s, &sums, opp, min_dropbacks, focus, None, true)
}

/// One row of a split table and the league line beside it.
#[derive(Debug, Clone)]
pub struct SplitRow {
    pub metrics: Vec<MetricInfo>,
    /// League values (counts are league totals), as `SplitTable::league`.
    pub league: Vec<Option<f64>>,
    pub league_lift: Vec<Option<f64>>,
    pub league_dropbacks: u32,
    /// How many rows of the whole table are qualified.
    pub qualified: usize,
    /// The row (with its estimates even when short of the minimum); `None`
    /// when it has no dropback in the situation.
    pub row: Option<PasserRow>,
}

/// The row of `name` (a passer, or a team by the grouping) as
/// `split_table_in(ix, p, v, s, min_dropbacks, Some(name))` gives it, with
/// the league line, without estimating anyone else: the percentiles rank
/// him among the qualified passers' estimates, kept per situation, seasons
/// and minimum in the index's memo (made once, by the first row or table
/// asked).
pub fn split_row_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32, name: &str) -> SplitRow {
    row_in(ix, p, v, s, min_dropbacks, name, true)
}

/// `split_row_in`, with the metrics' stability left out (`None`) when
/// `stability` is false: a caller that shows no stability (the profile's
/// other presets) does not pay for it (each season pair's correlations).
pub(super) fn row_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, min_dropbacks: u32, name: &str, stability: bool) -> SplitRow {
    let (sums, opp) = sums_and_opponent(ix, p, v, s);
    let names = |who: u32| match s.group {
        Group::Passer => p.passers.get(who as usize),
        Group::Offense | Group::Defense => p.teams.get(who as usize),
    };
    let who = sums.passers.keys().copied().find(|&w| names(w).is_some_and(|n| n == name));
    let qualified = sums.passers.values().filter(|ps| ps.accs[metric_index("dropbacks").unwrap_or(0)].n as u32 >= min_dropbacks.max(1)).count();
    let t = table_of(ix, p, v, s, &sums, opp, min_dropbacks, Some(name), Some(who.unwrap_or(u32::MAX)), stability);
    SplitRow { qualified, row: t.rows.into_iter().next(), metrics: t.metrics, league: t.league, league_lift: t.league_lift, league_dropbacks: t.league_dropbacks }
}

/// The situation's sums and, beside its pass (`rayon::join`: it reads
/// the index on its own and fills the pass's serial steps), EPA per
/// dropback against an average defense (`splits::opponent`), for passer
/// rows only (a team row has no single passer to adjust).
fn sums_and_opponent(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> (Sums, Option<Arc<super::opponent::OpponentFit>>) {
    // The pass first: the opponent model reads its sums too.
    drop(memo(ix, p, v, &s.without_row_pick()));
    rayon::join(|| accumulate(ix, p, v, s), || if s.group == Group::Passer { super::opponent::opponent_fit(ix, p, v, s) } else { None })
}

/// The table from the situation's sums and its opponent adjustment:
/// every row, or only the row of `only` (a passer or team id).
#[allow(clippy::too_many_arguments)]
fn table_of(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, sums: &Sums, opp: Option<Arc<super::opponent::OpponentFit>>, min_dropbacks: u32, focus: Option<&str>, only: Option<u32>, stability: bool) -> SplitTable {
    let normal = every_snap(ix, p, v, s);
    let memo = memo(ix, p, v, &s.without_row_pick());
    let (mut table, whos) = build_table(ix, p, sums, &normal, s, min_dropbacks, focus, only, &memo, stability);
    if let Some(fit) = opp {
        for (row, who) in table.rows.iter_mut().zip(whos) {
            if let Some(a) = fit.passers.get(&who) {
                (row.epa_opp_adj, row.epa_opp_adj_lo, row.epa_opp_adj_hi, row.epa_opp_faced) = (Some(a.value), Some(a.lo), Some(a.hi), Some(a.faced));
            }
        }
    }
    table
}

/// The table from the sums, and each row's id (passer or team, by the
/// grouping); with `only`, that id's row alone (none when it has no
/// snap), ranked among the qualified rows' estimates kept in `memo`. The
/// model fits (per season list), the ranks (per season list and minimum)
/// and the stability (per minimum) are kept beside the situation's pass in
/// `memo`: they depend on nothing else.
#[allow(clippy::too_many_arguments)]
pub(super) fn build_table(ix: &SplitIndex, p: &Plays, sums: &Sums, normal: &Sums, s: &Situation, min_dropbacks: u32, focus: Option<&str>, only: Option<u32>, memo: &Arc<Memo>, with_stability: bool) -> (SplitTable, Vec<u32>) {
    let nm = METRICS.len();
    let db = metric_index("dropbacks").unwrap_or(0);
    let group = s.group;
    let better_up: Vec<bool> = METRICS.iter().map(|m| higher_is_better(m, group) || is_style(m.key)).collect();
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
    // Per-snap variance: p(1 − p) at the league rate for shares, the pooled
    // within-passer variance for means (the baselines' intervals).
    let snap_var: Vec<f64> = (0..nm)
        .map(|j| match METRICS[j].stat {
            Stat::Mean => if within_df[j] > 0.0 { within[j] / within_df[j] } else { f64::NAN },
            _ => sums.league[j].mean().map(|p| p * (1.0 - p)).unwrap_or(f64::NAN),
        })
        .collect();

    let name_of = |who: u32| match group {
        Group::Passer => &p.passers[who as usize],
        Group::Offense | Group::Defense => &p.teams[who as usize],
    };
    let qualified: Vec<bool> = sums.passers.values().map(|ps| ps.accs[db].n as u32 >= min_dropbacks.max(1)).collect();
    // The rows built: every one, or `only`'s (positions in `sums.passers`).
    let kept: Vec<usize> = match only {
        None => (0..sums.passers.len()).collect(),
        Some(w) => sums.passers.keys().position(|&k| k == w).into_iter().collect(),
    };
    // The rows' raw numbers and baselines, side by side with the posteriors
    // below (neither needs the other).
    let build_rows = || -> Vec<PasserRow> {
        let mut scratch = CellSums::default();
        let mut baselines = vec![None; nm];
        let league_rating = rating_from(&sums.league);
        sums
            .passers
            .iter()
            .enumerate()
            .filter(|(i, _)| kept.binary_search(i).is_ok())
            .map(|(_, (&who, ps))| {
                let dropbacks = ps.accs[db].n as u32;
                if sums.cells_of(ix, group, ps, &mut scratch) {
                    adjusted(&ix.layout, sums, &ps.accs, &scratch, &snap_var, league_rating, &mut baselines);
                } else {
                    baselines.iter_mut().for_each(|b| *b = None);
                }
                let cells = (0..nm)
                    .map(|j| {
                        let m = &METRICS[j];
                        let value = raw_value(&ps.accs, j);
                        let lg = league[j];
                        let mut c = Cell { key: m.key, value, n: ps.accs[j].n, ..Cell::default() };
                        if m.stat != Stat::Count {
                            c.league = lg;
                            c.diff = value.zip(lg).map(|(a, b)| a - b);
                            if let Some(b) = baselines[j] {
                                c.adjusted_league = Some(b.value * m.scale);
                                c.adjusted_diff = value.map(|a| a - b.value * m.scale);
                                let var = (snap_var[j] / ps.accs[j].n.max(1.0) + b.var) * m.scale * m.scale;
                                if let Some((lo, hi)) = c.adjusted_diff.and_then(|d| normal_interval(d, var, stats::INTERVAL_LEVEL)) {
                                    (c.adjusted_diff_lo, c.adjusted_diff_hi) = (Some(lo), Some(hi));
                                }
                            }
                        }
                        c
                    })
                    .collect();
                PasserRow {
                    passer: name_of(who).clone(),
                    team: p.teams[ps.team as usize].clone(),
                    qualified: dropbacks >= min_dropbacks.max(1),
                    dropbacks,
                    cells,
                    epa_opp_adj: None,
                    epa_opp_adj_lo: None,
                    epa_opp_adj_hi: None,
                    epa_opp_faced: None,
                }
            })
            .collect()
    };

    // The two-level model per metric for the wanted rows: the qualified
    // ones, our passer and the picked row (or `only`'s alone).
    let pick = s.row_pick();
    let picked = |name: &str| pick.is_some_and(|x| if group == Group::Passer { x == name } else { x.eq_ignore_ascii_case(name) });
    let wanted: Vec<bool> = sums
        .passers
        .keys()
        .zip(&qualified)
        .map(|(&who, &q)| match only {
            Some(w) => who == w,
            None => q || focus == Some(name_of(who).as_str()) || picked(name_of(who)),
        })
        .collect();
    let (mut rows, derived) = rayon::join(build_rows, || estimates(sums, normal, s, &wanted, memo));
    let rating_j = metric_index("rating");
    for (j, est) in derived.iter().enumerate() {
        let Some(est) = est else { continue };
        let (shown, league_raw) = (Shown::of(j, rating_j), league[j].map(|x| x / METRICS[j].scale));
        for (row, &i) in rows.iter_mut().zip(&kept) {
            if let Some(d) = &est[i] {
                fill(&mut row.cells[j], d, shown, league_raw, better_up[j]);
            }
        }
    }
    // Percentiles on the estimate, among qualified passers: from these
    // rows when they are every row, else from the qualified rows'
    // estimates made once and kept.
    let ranks: Arc<Vec<Option<Ranks>>> = match only {
        None => {
            let mine = ranks_of(&derived, &qualified);
            memo.derived(&ranks_key(s, min_dropbacks), || mine)
        }
        Some(_) => memo.derived(&ranks_key(s, min_dropbacks), || ranks_of(&estimates(sums, normal, s, &qualified, memo), &qualified)),
    };
    for (j, r) in ranks.iter().enumerate() {
        let Some(r) = r else { continue };
        for row in rows.iter_mut() {
            let c = &mut row.cells[j];
            if let Some(pr) = c.estimate.and_then(|e| r.percentile(e)) {
                c.percentile = Some(if better_up[j] { pr } else { 100.0 - pr });
            }
        }
    }

    let whos: Vec<u32> = sums.passers.keys().copied().collect();
    let mut rows: Vec<(PasserRow, u32)> = rows.into_iter().zip(kept.iter().map(|&i| whos[i])).collect();
    if pick.is_some() {
        rows.retain(|r| picked(&r.0.passer));
    }
    rows.sort_by(|(a, _), (b, _)| b.dropbacks.cmp(&a.dropbacks).then(a.passer.cmp(&b.passer)));
    let (rows, whos): (Vec<PasserRow>, Vec<u32>) = rows.into_iter().unzip();
    let stab = if with_stability {
        memo.derived(&format!("stability {min_dropbacks}"), || {
            let by_season = seasons_of(ix, memo, &s.without_row_pick());
            (0..nm).into_par_iter().map(|j| (METRICS[j].stat != Stat::Count).then(|| stability(&by_season, j, min_dropbacks))).collect::<Vec<_>>()
        })
    } else {
        Arc::new((0..nm).map(|_| None).collect())
    };
    let metrics = (0..nm)
        .map(|j| {
            let m = &METRICS[j];
            let st = &stab[j];
            let (label, short) = super::metrics::headings(m, group);
            MetricInfo {
                key: m.key,
                label,
                short,
                unit: m.unit.label(),
                stat: m.stat,
                higher_is_better: higher_is_better(m, group),
                decimals: m.decimals,
                projector: m.projector,
                decision: m.decision,
                stability: st.as_ref().and_then(|x| x.r),
                stability_lo: st.as_ref().and_then(|x| x.lo),
                stability_hi: st.as_ref().and_then(|x| x.hi),
                stability_pairs: st.as_ref().map(|x| x.pairs).unwrap_or(0),
            }
        })
        .collect();
    let seasons = match &s.seasons {
        Some(v) => v.clone(),
        None => p.seasons(),
    };
    let table = SplitTable {
        group,
        situation: s.describe(),
        query: s.to_query(),
        seasons,
        min_dropbacks,
        metrics,
        league_dropbacks: sums.league[db].n as u32,
        league_row: league_row(&league),
        league_lift: (0..nm)
            .map(|j| {
                let m = &METRICS[j];
                if m.stat == Stat::Count {
                    return None;
                }
                if Some(j) == rating_j {
                    let other: Vec<Acc> = normal.league.iter().zip(&sums.league).map(|(a, h)| Acc { n: a.n - h.n, sum: a.sum - h.sum, sumsq: a.sumsq - h.sumsq }).collect();
                    return rating_from(&sums.league).zip(rating_from(&other)).map(|(h, o)| h - o);
                }
                let (here, all) = (&sums.league[j], &normal.league[j]);
                let other_n = all.n - here.n;
                (other_n >= 0.5 && here.n > 0.0).then(|| (here.sum / here.n - (all.sum - here.sum) / other_n) * m.scale)
            })
            .collect(),
        league,
        rows,
    };
    (table, whos)
}
