//! Estimates from the sums: empirical-Bayes posteriors per passer, the
//! state-mix adjusted league baseline, and season-to-season stability.

use super::metrics::{metric_index, Stat, CELLS, METRICS};
use super::scan::{rating_from, raw_value, PasserSums, Sums};
use crate::stats;

/// Posteriors of metric `j` for every passer (in `sums.passers` order) that
/// is `wanted`; the prior is fitted to the qualified passers.
pub(super) fn shrink(sums: &Sums, j: usize, sigma2: &[f64], wanted: &[bool], min_dropbacks: u32) -> Vec<Option<stats::Posterior>> {
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
pub(super) fn adjusted(sums: &Sums, ps: &PasserSums, j: usize) -> Option<f64> {
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
pub(super) fn stability(sums: &Sums, j: usize, min_dropbacks: u32) -> (Option<f64>, usize) {
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
