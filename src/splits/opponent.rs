//! Opponent-adjusted EPA per dropback: the situation's snaps summed per
//! (passer-season, defense-season), a crossed passer + defense model fitted
//! on those sums (`stats::crossed`), and each passer's raw value with the
//! average effect of the defenses he faced taken out. Memoised per situation
//! in the split index.

use super::index::{memo_key, Col, Plan, SplitIndex};
use super::metrics::{metric_index, SnapValues};
use crate::plays::Plays;
use crate::situation::Situation;
use crate::stats::crossed::{CrossedCell, CrossedFit};
use crate::stats::multilevel::normal_interval;
use crate::stats::INTERVAL_LEVEL;
use std::collections::HashMap;
use std::sync::Arc;

/// The metric adjusted (one, on purpose: the page explains one number).
pub const ADJUSTED_METRIC: &str = "epa";

/// What the adjusted number is, in a coach's words (pages print it).
pub const OPPONENT_WORDS: &str = "Against an average defense: his EPA per dropback here with the defenses he faced taken out. \
Each defense's effect in this situation, season by season, comes from every passer who threw against it (shrunk toward average when it saw few snaps); \
his number is his raw EPA per dropback minus the average effect of the defenses he met, with a 90% interval.";

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

/// The value metric `j` contributes at row `r` of the index (`None` outside its unit).
fn value_at(ix: &SplitIndex, j: usize, r: usize) -> Option<f64> {
    let lay = &ix.layout;
    if ix.units[r] >> lay.unit_of[j] & 1 == 0 {
        return None;
    }
    Some(match lay.col_of[j] {
        Col::One => 1.0,
        Col::Bit(k) => f64::from(ix.bits[r] >> k & 1),
        Col::Int(k) => ix.ints[r * lay.ints + k] as f64,
        Col::Real(k) => ix.reals[r * lay.reals + k],
    })
}

/// Per (passer-season, defense) sums of metric `j` over the rows `s` keeps
/// (its passer filter aside: the model is the league's, not his).
fn cells(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, j: usize) -> Vec<CrossedCell> {
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
            let Some(x) = value_at(ix, j, r) else { continue };
            let defense = p.defense[ix.snap[r] as usize] as usize;
            let e = &mut sums[ps as usize * n_teams + defense];
            e.0 += 1.0;
            e.1 += x;
            e.2 += x * x;
        }
    }
    let mut out: Vec<CrossedCell> = sums
        .into_iter()
        .enumerate()
        .filter(|(_, c)| c.0 > 0.0)
        .map(|(k, (n, sum, sumsq))| {
            let (ps, defense) = (k / n_teams, k % n_teams);
            let season = ix.ps_key[ps].1 as u32;
            CrossedCell { block: season, unit: ps as u32, group: season * n_teams as u32 + defense as u32, n, sum, sumsq }
        })
        .collect();
    out.sort_by_key(|c| (c.block, c.unit, c.group));
    out
}

/// Fit metric `j` in situation `s` (seasons as `s` says) and adjust every
/// passer. `None` when the model cannot be fitted (too few passers or
/// defenses). Not memoised: see `opponent_fit`.
pub fn fit_metric(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, j: usize) -> Option<OpponentFit> {
    let cells = cells(ix, p, v, s, j);
    let fit = CrossedFit::fit(&cells, true).ok()?;
    // Per passer: his snaps per defense-season, over his passer-seasons.
    let mut per: HashMap<u32, (f64, f64, Vec<(u32, f64)>)> = HashMap::new();
    for c in &cells {
        let who = ix.ps_key[c.unit as usize].0;
        let e = per.entry(who).or_insert((0.0, 0.0, Vec::new()));
        e.0 += c.n;
        e.1 += c.sum;
        e.2.push((c.group, c.n));
    }
    let s2 = fit.sd_resid * fit.sd_resid;
    let passers = per
        .into_iter()
        .filter_map(|(who, (n, sum, groups))| {
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
    Some(OpponentFit { passers, sd_passer: fit.sd_unit, sd_defense: fit.sd_group, sd_snap: fit.sd_resid })
}

/// The opponent fit of `ADJUSTED_METRIC` for `s`, memoised in the index by
/// the situation's pass key and seasons.
pub fn opponent_fit(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation) -> Option<Arc<OpponentFit>> {
    let j = metric_index(ADJUSTED_METRIC)?;
    let key = format!("opponent {ADJUSTED_METRIC} {:?} {}", s.seasons, memo_key(s));
    if let Some(hit) = ix.extra.lock().ok().and_then(|m| m.get(&key).cloned()) {
        return hit.downcast::<Option<Arc<OpponentFit>>>().ok().and_then(|a| (*a).clone());
    }
    let fit = fit_metric(ix, p, v, s, j).map(Arc::new);
    if let Ok(mut m) = ix.extra.lock() {
        if m.len() >= super::index::MEMO_SIZE {
            m.clear();
        }
        m.insert(key, Arc::new(fit.clone()));
    }
    fit
}

impl OpponentFit {
    /// The adjustment of the passer named `name`, if he has one here.
    pub fn of(&self, p: &Plays, name: &str) -> Option<Adjusted> {
        self.passers.get(&p.passer_index(name)?).copied()
    }
}

