//! Baselines from the sums: the state-mix league baseline (leaving the
//! passer out) and season-to-season stability.

use super::metrics::{metric_index, CELLS, METRICS};
use super::scan::{rating_from, raw_value, PasserSums, Sums};
use crate::stats;

/// Pseudo-snaps at the leave-out league value added to every state cell, so
/// a thin cell leans on the league's overall value (a full one barely moves).
pub(super) const CELL_PRIOR_SNAPS: f64 = 10.0;

/// The state-mix baseline: its value and the variance of that value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Baseline {
    pub value: f64,
    pub var: f64,
}

/// Direct standardization, leaving the passer out: the league's value in each
/// down × distance × field zone cell without his own snaps, smoothed toward the
/// league's overall value without him (`CELL_PRIOR_SNAPS` pseudo-snaps), weighted
/// by his own count of snaps there. `snap_var` is the per-snap variance
/// (`p(1 − p)` for a share); the baseline's variance is
/// `Σ (w_c / W)² · snap_var / (n_c + CELL_PRIOR_SNAPS)`. The rating's baseline is
/// the capped league rating shifted by the mix effect on its linear form.
pub(super) fn adjusted(sums: &Sums, ps: &PasserSums, j: usize, snap_var: f64) -> Option<Baseline> {
    let nm = METRICS.len();
    let (lg, mine) = (&sums.league[j], &ps.accs[j]);
    let overall = if lg.n - mine.n >= 0.5 { (lg.sum - mine.sum) / (lg.n - mine.n) } else { lg.mean()? };
    let (mut num, mut den, mut var) = (0.0, 0.0, 0.0);
    for c in 0..CELLS {
        let w = ps.cells[c * nm + j];
        if w == 0.0 {
            continue;
        }
        let cell = &sums.league_cells[c * nm + j];
        let n = (cell.n - w).max(0.0);
        let sum = cell.sum - ps.cell_sums[c * nm + j];
        let lv = (sum + CELL_PRIOR_SNAPS * overall) / (n + CELL_PRIOR_SNAPS);
        num += w * lv;
        den += w;
        var += w * w * snap_var / (n + CELL_PRIOR_SNAPS);
    }
    if den <= 0.0 {
        return None;
    }
    let var = var / (den * den);
    if METRICS[j].key == "rating" {
        let base = rating_from(&sums.league)?;
        return Some(Baseline { value: base + (num / den - lg.mean()?), var });
    }
    Some(Baseline { value: num / den, var })
}

/// Season-to-season stability of a metric's raw value: among passers
/// qualified in both seasons of each consecutive pair, each season's values
/// centred on that pair's mean for the season (so league-wide drift between
/// seasons does not count as carry-over), pooled over pairs; with its 90%
/// interval by Fisher's z (`atanh r ± 1.645/√(n − 3)`; Fisher 1921, "On the
/// probable error of a coefficient of correlation deduced from a small sample").
pub(super) struct Stability {
    pub r: Option<f64>,
    pub lo: Option<f64>,
    pub hi: Option<f64>,
    pub pairs: usize,
}

pub(super) fn stability(sums: &Sums, j: usize, min_dropbacks: u32) -> Stability {
    let db = metric_index("dropbacks").unwrap_or(0);
    let mut by_pair: std::collections::BTreeMap<i32, Vec<(f64, f64)>> = std::collections::BTreeMap::new();
    for (&(who, season), accs) in &sums.by_season {
        if (accs[db].n as u32) < min_dropbacks.max(1) {
            continue;
        }
        let Some(next) = sums.by_season.get(&(who, season + 1)) else { continue };
        if (next[db].n as u32) < min_dropbacks.max(1) {
            continue;
        }
        if let (Some(a), Some(b)) = (raw_value(accs, j), raw_value(next, j)) {
            by_pair.entry(season).or_default().push((a, b));
        }
    }
    let (mut xs, mut ys) = (Vec::new(), Vec::new());
    for pairs in by_pair.values() {
        let n = pairs.len() as f64;
        let (mx, my) = (pairs.iter().map(|p| p.0).sum::<f64>() / n, pairs.iter().map(|p| p.1).sum::<f64>() / n);
        for (a, b) in pairs {
            xs.push(a - mx);
            ys.push(b - my);
        }
    }
    let r = stats::pearson(&xs, &ys);
    let n = xs.len();
    let (lo, hi) = match r {
        Some(r) if n > 3 => {
            let z = r.clamp(-0.999_999, 0.999_999).atanh();
            let half = 1.644_853_6 / ((n - 3) as f64).sqrt();
            (Some((z - half).tanh()), Some((z + half).tanh()))
        }
        _ => (None, None),
    };
    Stability { r, lo, hi, pairs: n }
}
