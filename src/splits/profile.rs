//! A passer across every preset with a season trend (`profile`), and the
//! EPA distribution of a passer's dropbacks beside the league's.

use super::metrics::{metric_index, SnapValues, METRICS};
use super::index::SplitIndex;
use super::scan::{accumulate_seasons, matching_snaps, memo, raw_value};
use super::snaps::play_indices;
use std::sync::Arc;
use super::table::{row_in, MetricInfo, PasserRow, SplitRow};
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

/// `profile` on a league already indexed (`ix` built from `p`, `v`): his
/// row of each preset's table (`split_row_in`: his estimates alone, ranked
/// among the qualified passers' estimates the index keeps per preset, so
/// no whole table is built), the presets side by side, then the season
/// trend. The every-snap pass, every row's "his normal", was made with
/// the index; the opponent model's every-snap fit is made once per season
/// list (first, when the index holds none yet: every row reads it).
pub fn profile_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, passer: &str, base: &Situation, trend: &Situation, min_dropbacks: u32) -> Option<Profile> {
    let who = p.passer_index(passer)?;
    let mut metrics = Vec::new();
    let mut presets = Vec::new();
    let mut team = None;
    let situation = |preset: Preset| Situation { seasons: base.seasons.clone(), ..preset.situation(base.one_score) };
    // The profile's metric headings come from the first preset: only its
    // row carries the stability (each preset's own costs season pairs'
    // correlations no one reads).
    let row = |s: &Situation, first: bool| row_in(ix, p, v, s, min_dropbacks, passer, first);
    if !super::opponent::league_fit_kept(ix, &base.seasons) {
        drop(super::opponent::opponent_fit(ix, p, v, &situation(Preset::EverySnap)));
    }
    let rows: Vec<(Situation, SplitRow)> = Preset::ALL
        .par_iter()
        .map(|&preset| {
            let s = situation(preset);
            let r = row(&s, preset == Preset::ALL[0]);
            (s, r)
        })
        .collect();
    // After the rows: the trend's situation is usually one of them, and
    // its pass is kept by now.
    let sums = accumulate_seasons(ix, p, v, &trend.with_seasons(None));
    for (preset, (s, t)) in Preset::ALL.into_iter().zip(rows) {
        if team.is_none() {
            team = t.row.as_ref().map(|r| r.team.clone());
        }
        if preset == Preset::ALL[0] {
            metrics = t.metrics;
        }
        presets.push(ProfileLine {
            preset: preset.key(),
            label: preset.label(),
            query: s.to_query(),
            league: t.league,
            league_lift: t.league_lift,
            league_dropbacks: t.league_dropbacks,
            qualified_passers: t.qualified,
            row: t.row,
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

/// `epa_distribution` on a league already indexed (`ix` built from `p`,
/// `v`). The league's histogram is kept beside the situation's pass (per
/// season list); the passer's comes from his own snaps (one pass over the
/// passer column, the situation's filters on those only).
pub fn epa_distribution_in(ix: &SplitIndex, p: &Plays, v: &SnapValues, s: &Situation, passer: &str) -> EpaDistribution {
    let edges: Vec<f64> = (0..=BINS).map(|k| LO + k as f64 * WIDTH).collect();
    let league = if s.passer.is_none() {
        let m = memo(ix, p, v, s);
        m.derived(&format!("epa histogram {:?}", s.seasons), || histogram(p, v, s, &matching_snaps(ix, p, v, s)))
    } else {
        Arc::new(histogram(p, v, s, &matching_snaps(ix, p, v, s)))
    };
    let (mine, passer_n) = histogram(p, v, s, &play_indices(p, v, s, Some(passer), None));
    EpaDistribution { edges, passer: mine, league: league.0.clone(), passer_n, league_n: league.1 }
}

const LO: f64 = -4.0;
const HI: f64 = 4.0;
const WIDTH: f64 = 0.5;
const BINS: usize = ((HI - LO) / WIDTH) as usize;

/// Shares of the snaps `rows` per bin of EPA (ends collect the tails), and
/// how many they are; with a passer filter in `s`, only his.
fn histogram(p: &Plays, v: &SnapValues, s: &Situation, rows: &[usize]) -> (Vec<f64>, usize) {
    let mut h = vec![0.0; BINS];
    let mut n = 0usize;
    let only = s.passer.as_deref();
    for &i in rows {
        if only.is_some_and(|name| p.passer_name(i) != Some(name)) {
            continue;
        }
        let e = v.epa.get(i).copied().unwrap_or(0.0);
        let b = (((e - LO) / WIDTH).floor().max(0.0) as usize).min(BINS - 1);
        h[b] += 1.0;
        n += 1;
    }
    if n > 0 {
        h.iter_mut().for_each(|x| *x /= n as f64);
    }
    (h, n)
}
