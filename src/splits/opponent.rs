//! Opponent-adjusted EPA per dropback: a crossed passer + defense model
//! (`stats::crossed`) fitted on every snap's sums per (passer-season,
//! defense-season) of the chosen seasons, then in a situation each passer's
//! raw value with the average effect of the defenses he faced there taken
//! out. The fit is kept per season list, the adjustment per situation, in
//! the split index.

use super::index::SplitIndex;
use super::memo::MEMO_SIZE;
use super::plan::{memo_key, Plan};
use super::scan::memo;
use super::metrics::{metric_index, SnapValues};
use crate::plays::Plays;
use crate::situation::{Group, Situation};
use crate::stats::crossed::{CrossedCell, CrossedFit};
use crate::stats::multilevel::normal_interval;
use crate::stats::INTERVAL_LEVEL;
use std::collections::HashMap;
use std::sync::{Arc, Mutex};

pub use super::metrics::ADJUSTED_METRIC;

/// What the adjusted number is, in a coach's words (pages print it).
pub const OPPONENT_WORDS: &str = "Against an average defense: his EPA per dropback here with the defenses he faced here taken out. \
Each defense's strength, season by season, comes from every dropback it faced (shrunk toward average); \
his number is his raw EPA per dropback minus the average strength of the defenses he met, with a 90% interval.";

/// One passer's opponent adjustment in a situation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Adjusted {
    /// His raw mean over the situation's snaps.
    pub raw: f64,
    /// The snap-weighted mean effect of the defenses he faced (negative:
    /// tougher than the league's average defense here).
    pub faced: f64,
    /// `raw − faced`, with its 90% interval.
    pub value: f64,
    pub lo: f64,
    pub hi: f64,
}

/// The fit for a situation: per passer his adjustment; the model's SDs.
#[derive(Debug, Clone)]
pub struct OpponentFit {
    pub passers: HashMap<u32, Adjusted>,
    pub sd_passer: f64,
    pub sd_defense: f64,
    pub sd_snap: f64,
}

/// Rank of each id by its name, so a fit does not depend on the order in
/// which a load met the names (the same file through a mapping gives the
/// same numbers, bit for bit).
fn ranks(names: &[String]) -> Vec<u32> {
    let mut order: Vec<usize> = (0..names.len()).collect();
    order.sort_by(|&a, &b| names[a].cmp(&names[b]).then(a.cmp(&b)));
    let mut rank = vec![0u32; names.len()];
    for (r, &i) in order.iter().enumerate() {
        rank[i] = r as u32;
    }
    rank
}

/// Per (passer-season, defense) sums of metric `j` over the rows `s` keeps
/// (its passer filter aside: the model is the league's, not his). Units are
/// `passer rank × seasons + season`, groups `season × teams + team rank`.
pub(super) fn cells(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, j: usize) -> Vec<CrossedCell> {
    let plan = Plan::new(ix, s);
    let chosen: Vec<bool> = ix.seasons.iter().map(|y| s.seasons.as_ref().is_none_or(|ss| ss.contains(y))).collect();
    let n_teams = p.teams.len();
    // Dense (passer-season × defense) sums: a few MB at most.
    let mut sums = vec![(0.0f64, 0.0f64, 0.0f64); ix.ps_key.len() * n_teams];
    for (k, rows) in plan.ranges.iter().enumerate() {
        for r in rows.clone() {
            let ps = ix.ps[r];
            let season = ix.ps_key[ps as usize].1 as u32;
            if !chosen[season as usize] || !plan.keeps(ix, p, v, k, r) {
                continue;
            }
            let Some(x) = ix.value_at(j, r) else { continue };
            // The defense from the row's own column (the league's rows lie far apart).
            let defense = ix.ts_key[ix.ts_def[r] as usize].0 as usize;
            let e = &mut sums[ps as usize * n_teams + defense];
            e.0 += 1.0;
            e.1 += x;
            e.2 += x * x;
        }
    }
    crossed_cells(ix, p, sums.into_iter().enumerate().filter(|(_, c)| c.0 > 0.0))
}

/// The model's cells from nonzero (passer-season × teams + defense, (n,
/// sum, sum of squares)) in ascending key order. Units are `passer rank ×
/// seasons + season`, groups `season × teams + team rank`.
fn crossed_cells(ix: &SplitIndex, p: &Plays, sums: impl Iterator<Item = (usize, (f64, f64, f64))>) -> Vec<CrossedCell> {
    let n_teams = p.teams.len();
    let (passer_rank, team_rank) = (ranks(&p.passers), ranks(&p.teams));
    let n_seasons = ix.seasons.len() as u32;
    let mut out: Vec<CrossedCell> = sums
        .map(|(k, (n, sum, sumsq))| {
            let (ps, defense) = (k / n_teams, k % n_teams);
            let (who, season) = ix.ps_key[ps];
            let season = season as u32;
            let unit = passer_rank[who as usize] * n_seasons + season;
            CrossedCell { block: season, unit, group: season * n_teams as u32 + team_rank[defense], n, sum, sumsq }
        })
        .collect();
    out.sort_by_key(|c| (c.block, c.unit, c.group));
    out
}

/// `cells` of `ADJUSTED_METRIC` from the situation's pass (its per
/// passer-season × defense sums, `Memo::opp_keys`), over the seasons of
/// `s`: the same cells, bit for bit, without going over the rows again.
pub(super) fn memo_cells(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Vec<CrossedCell> {
    // A pass of team rows sums no passer's cells.
    if s.group != Group::Passer {
        return metric_index(ADJUSTED_METRIC).map_or_else(Vec::new, |j| cells(ix, p, v, s, j));
    }
    let m = memo(ix, p, v, &s.without_row_pick());
    let chosen: Vec<bool> = ix.seasons.iter().map(|y| s.seasons.as_ref().is_none_or(|ss| ss.contains(y))).collect();
    let n_teams = p.teams.len().max(1);
    let kept = m.opp_keys.iter().zip(&m.opp_sums).filter(|(&k, _)| chosen[ix.ps_key[k as usize / n_teams].1 as usize]);
    crossed_cells(ix, p, kept.map(|(&k, &c)| (k as usize, c)))
}

/// The league's fit of metric `j` on every snap of the seasons of `s`:
/// season intercepts, passer-season and defense-season effects. A defense's
/// strength is taken from all its snaps: its snaps in a late-game window
/// alone are too few to tell defenses apart (fitted on the demo league's
/// end-of-game window, the defense SD is a few hundredths of an EPA against
/// a per-snap SD near 1.4, so every effect would be shrunk to about 0).
fn league_fit(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, j: usize) -> Option<CrossedFit> {
    let every = Situation { seasons: s.seasons.clone(), ..Situation::default() };
    CrossedFit::fit(&cells(ix, p, v, &every, j), true).ok()
}

/// Every passer in situation `s`: his raw mean minus the snap-weighted
/// effects (from `fit`) of the defense-seasons he faced in `s`.
fn adjust(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, j: usize, fit: &CrossedFit) -> OpponentFit {
    adjust_cells(ix, p, &cells(ix, p, v, s, j), fit)
}

/// `adjust` on the situation's per (passer-season, defense) sums.
fn adjust_cells(ix: &SplitIndex, p: &Plays, cells: &[CrossedCell], fit: &CrossedFit) -> OpponentFit {
    // Passer by rank (units are passer rank × seasons + season).
    let n_seasons = ix.seasons.len().max(1) as u32;
    let mut by_rank = vec![0u32; p.passers.len()];
    for (who, r) in ranks(&p.passers).into_iter().enumerate() {
        by_rank[r as usize] = who as u32;
    }
    // Per passer (in name order, so sums run in the same order on every
    // load): his snaps per defense-season, over his passer-seasons.
    let mut per: std::collections::BTreeMap<u32, (f64, f64, f64, Vec<(u32, f64)>)> = Default::default();
    for c in cells {
        let e = per.entry(c.unit / n_seasons).or_insert((0.0, 0.0, 0.0, Vec::new()));
        e.0 += c.n;
        e.1 += c.sum;
        e.2 += c.sumsq;
        e.3.push((c.group, c.n));
    }
    // The situation's per-snap variance, pooled within passers.
    let (ss, df) = per.values().fold((0.0, 0.0), |(ss, df), (n, sum, sumsq, _)| (ss + (sumsq - sum * sum / n).max(0.0), df + n - 1.0));
    let s2 = if df > 0.0 { ss / df } else { fit.sd_resid * fit.sd_resid };
    let passers = per
        .into_iter()
        .filter_map(|(rank, (n, sum, _, groups))| {
            let who = by_rank[rank as usize];
            let w: Vec<(u32, f64)> = groups.iter().map(|&(g, k)| (g, k / n)).collect();
            let (faced, faced_var) = fit.weighted(&w)?;
            let raw = sum / n;
            let value = raw - faced;
            // His own sampling noise plus the uncertainty of the defenses'
            // effects (their covariance with his noise is left out: a
            // slightly wide interval).
            let (lo, hi) = normal_interval(value, s2 / n + faced_var, INTERVAL_LEVEL)?;
            Some((who, Adjusted { raw, faced, value, lo, hi }))
        })
        .collect();
    OpponentFit { passers, sd_passer: fit.sd_unit, sd_defense: fit.sd_group, sd_snap: fit.sd_resid }
}

/// Adjust metric `j` in situation `s` (seasons as `s` says) with the
/// defense effects of the every-snap fit over the same seasons. `None`
/// when the model cannot be fitted (too few passers or defenses). Not
/// memoised: see `opponent_fit`.
pub fn fit_metric(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, j: usize) -> Option<OpponentFit> {
    Some(adjust(ix, p, v, s, j, &league_fit(ix, p, v, s, j)?))
}

/// A bounded memo: cleared when full.
fn remember<T: std::any::Any + Send + Sync>(memo: &Mutex<HashMap<String, Arc<dyn std::any::Any + Send + Sync>>>, key: String, value: T) {
    if let Ok(mut m) = memo.lock() {
        if m.len() >= MEMO_SIZE {
            m.clear();
        }
        m.insert(key, Arc::new(value));
    }
}

fn recall<T: std::any::Any + Send + Sync + Clone>(memo: &Mutex<HashMap<String, Arc<dyn std::any::Any + Send + Sync>>>, key: &str) -> Option<T> {
    let hit = memo.lock().ok()?.get(key).cloned()?;
    hit.downcast::<T>().ok().map(|a| (*a).clone())
}

/// Does the index hold the every-snap fit for these seasons yet?
pub(super) fn league_fit_kept(ix: &SplitIndex, seasons: &Option<Vec<i32>>) -> bool {
    ix.league_fits.lock().is_ok_and(|m| m.contains_key(&format!("opponent {ADJUSTED_METRIC} {seasons:?}")))
}

/// The opponent adjustment of `ADJUSTED_METRIC` in `s`. The every-snap fit
/// and the every-snap adjustment are kept per season list in the index's
/// `league_fits` (like its columns, they survive `forget`); another
/// situation's adjustment in its `extra` memo.
pub fn opponent_fit(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Option<Arc<OpponentFit>> {
    metric_index(ADJUSTED_METRIC)?;
    let key = format!("opponent {ADJUSTED_METRIC} {:?} {}", s.seasons, memo_key(s));
    if let Some(hit) = recall::<Option<Arc<OpponentFit>>>(&ix.extra, &key) {
        return hit;
    }
    // The fit on every snap and the adjustment of every snap come from
    // the same sums: both are kept per season list, like the index's
    // columns (every preset's profile asks for the every-snap table).
    let fit_key = format!("opponent {ADJUSTED_METRIC} {:?}", s.seasons);
    let every_key = format!("opponent {ADJUSTED_METRIC} every snap {:?}", s.seasons);
    let every = Situation { seasons: s.seasons.clone(), ..Situation::default() };
    let is_every = memo_key(s) == memo_key(&every);
    if is_every {
        if let Some(hit) = recall::<Option<Arc<OpponentFit>>>(&ix.league_fits, &every_key) {
            return hit;
        }
    }
    let (fit, every_fit) = match recall::<Option<Arc<CrossedFit>>>(&ix.league_fits, &fit_key) {
        Some(f) => (f, None),
        None => {
            let cells = memo_cells(ix, p, v, &every);
            let f = CrossedFit::fit(&cells, true).ok().map(Arc::new);
            let e = f.as_ref().map(|f| Arc::new(adjust_cells(ix, p, &cells, f)));
            remember(&ix.league_fits, fit_key, f.clone());
            remember(&ix.league_fits, every_key.clone(), e.clone());
            (f, Some(e))
        }
    };
    if is_every {
        let out = match every_fit {
            Some(e) => e,
            None => {
                let e = fit.map(|f| Arc::new(adjust_cells(ix, p, &memo_cells(ix, p, v, s), &f)));
                remember(&ix.league_fits, every_key, e.clone());
                e
            }
        };
        return out;
    }
    let out = fit.map(|f| Arc::new(adjust_cells(ix, p, &memo_cells(ix, p, v, s), &f)));
    remember(&ix.extra, key, out.clone());
    out
}

impl OpponentFit {
    /// The adjustment of the passer named `name`, if he has one here.
    pub fn of(&self, p: &Plays, name: &str) -> Option<Adjusted> {
        self.passers.get(&p.passer_index(name)?).copied()
    }
}

