//! A passer across every preset with a season trend (`profile`), and the
//! EPA distribution of a passer's dropbacks beside the league's.

use super::metrics::{metric_index, SnapValues, METRICS};
use super::index::SplitIndex;
use super::scan::{accumulate_seasons, matching_snaps, raw_value};
use super::table::{split_table_in, MetricInfo, PasserRow, SplitTable};
use std::sync::Arc;
use crate::plays::Plays;
use crate::situation::{Preset, Situation};
use rayon::prelude::*;
use serde::Serialize;

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
    /// The league's raw lift here (its value here minus on its other snaps).
    pub league_lift: Vec<Option<f64>>,
    pub league_dropbacks: u32,
    pub qualified_passers: usize,
    /// None when the passer has no dropback in the preset.
    pub row: Option<PasserRow>,
}

/// The profile of `passer`. `base` carries the seasons and one-score bound;
/// `trend` is the situation of the season trend.
pub fn profile(p: &Plays, v: &SnapValues, passer: &str, base: &Situation, trend: &Situation, min_dropbacks: u32) -> Option<Profile> {
    profile_in(&SplitIndex::build(p, v), p, v, passer, base, trend, min_dropbacks)
}

/// `profile` on a league already indexed (`ix` built from `p`, `v`).
pub fn profile_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, passer: &str, base: &Situation, trend: &Situation, min_dropbacks: u32) -> Option<Profile> {
    let table = |s: &Situation| Arc::new(split_table_in(ix, p, v, s, min_dropbacks, Some(passer)));
    profile_with(ix, p, v, passer, base, trend, &table)
}

/// `profile_in` with each preset's table (focused on `passer`) from
/// `table`, e.g. a cache of tables already computed. The every-snap table
/// comes first (its pass is every table's "his normal", and the opponent
/// model's fit is on every snap: made once), then the other presets side
/// by side, then the season trend.
pub fn profile_with(
    ix: &SplitIndex,
    p: &Plays,
    v: &SnapValues,
    passer: &str,
    base: &Situation,
    trend: &Situation,
    table: &(dyn Fn(&Situation) -> Arc<SplitTable> + Sync),
) -> Option<Profile> {
    let who = p.passer_index(passer)?;
    let mut metrics = Vec::new();
    let mut presets = Vec::new();
    let mut team = None;
    let situation = |preset: Preset| Situation { seasons: base.seasons.clone(), ..preset.situation(base.one_score) };
    let every = table(&situation(Preset::EverySnap));
    let tables: Vec<(Situation, Arc<SplitTable>)> = Preset::ALL
        .par_iter()
        .map(|&preset| {
            let s = situation(preset);
            let t = if preset == Preset::EverySnap { every.clone() } else { table(&s) };
            (s, t)
        })
        .collect();
    // After the tables: the trend's situation is usually one of them, and
    // its pass is kept by now.
    let sums = accumulate_seasons(ix, p, v, &trend.with_seasons(None));
    for (preset, (s, t)) in Preset::ALL.into_iter().zip(tables) {
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
            league_lift: t.league_lift.clone(),
            league_dropbacks: t.league_dropbacks,
            qualified_passers: t.qualified().count(),
            row,
        });
    }
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
    epa_distribution_in(&SplitIndex::build(p, v), p, v, s, passer)
}

/// `epa_distribution` on a league already indexed (`ix` built from `p`, `v`).
pub fn epa_distribution_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, passer: &str) -> EpaDistribution {
    let (lo, hi, width) = (-4.0, 4.0, 0.5);
    let bins = ((hi - lo) / width) as usize;
    let edges: Vec<f64> = (0..=bins).map(|k| lo + k as f64 * width).collect();
    let (mut mine, mut all) = (vec![0.0; bins], vec![0.0; bins]);
    let (mut nm, mut na) = (0usize, 0usize);
    let who = p.passer_index(passer);
    let only = s.passer.as_deref();
    for i in matching_snaps(ix, p, v, s) {
        if only.is_some_and(|name| p.passer_name(i) != Some(name)) {
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
