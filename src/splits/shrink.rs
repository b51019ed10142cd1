//! Baselines from the sums: the state-mix league baseline (leaving the
//! passer out) and season-to-season stability.

use super::metrics::{metric_index, Stat, METRICS};
use super::index::Layout;
use super::scan::{raw_value, Accs, CellSums, Sums};
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
/// by his own count of snaps there (`mine`: his sums, `cells`: his state
/// cells, `Sums::cells_of`). `snap_var` is the per-snap variance per metric
/// (`p(1 − p)` for a share); the baseline's variance is
/// `Σ (w_c / W)² · snap_var / (n_c + CELL_PRIOR_SNAPS)`. The rating's baseline is
/// the capped league rating shifted by the mix effect on its linear form.
/// Every metric that is not a count, in one sweep over his cells (`out[j]`;
/// counts `None`); `league_rating` is `rating_from(&sums.league)`.
pub(super) fn adjusted(lay: &Layout, sums: &Sums, mine: &Accs, cells: &CellSums, snap_var: &[f64], league_rating: Option<f64>, out: &mut [Option<Baseline>]) {
    let (nm, rating) = (METRICS.len(), metric_index("rating"));
    debug_assert!(nm <= 64);
    // Per metric: its league value without him (None: no baseline), and
    // the running sums (Σ w·value, Σ w, Σ w²·var).
    let mut overall = [f64::NAN; 64];
    let mut acc = [(0.0f64, 0.0f64, 0.0f64); 64];
    let mut on = 0u64;
    for j in 0..nm {
        if METRICS[j].stat == Stat::Count {
            continue;
        }
        let (lg, me) = (&sums.league[j], &mine[j]);
        let o = if lg.n - me.n >= 0.5 { Some((lg.sum - me.sum) / (lg.n - me.n)) } else { lg.mean() };
        if let Some(o) = o {
            overall[j] = o;
            on |= 1 << j;
        }
    }
    let mut mask = cells.mask;
    while mask != 0 {
        let c = mask.trailing_zeros() as usize;
        mask &= mask - 1;
        let row = &cells.base[c * cells.width..][..cells.width];
        let mut js = on;
        while js != 0 {
            let j = js.trailing_zeros() as usize;
            js &= js - 1;
            let (w, his_sum) = lay.cell_acc(row, j);
            if w == 0.0 {
                continue;
            }
            let cell = &sums.league_cells[c * nm + j];
            let n = (cell.n - w).max(0.0);
            let sum = cell.sum - his_sum;
            let lv = (sum + CELL_PRIOR_SNAPS * overall[j]) / (n + CELL_PRIOR_SNAPS);
            let a = &mut acc[j];
            a.0 += w * lv;
            a.1 += w;
            a.2 += w * w * snap_var[j] / (n + CELL_PRIOR_SNAPS);
        }
    }
    for j in 0..nm {
        out[j] = None;
        let (num, den, var) = acc[j];
        if on >> j & 1 == 0 || den <= 0.0 {
            continue;
        }
        let var = var / (den * den);
        out[j] = if Some(j) == rating {
            league_rating.zip(sums.league[j].mean()).map(|(base, lg)| Baseline { value: base + (num / den - lg), var })
        } else {
            Some(Baseline { value: num / den, var })
        };
    }
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
