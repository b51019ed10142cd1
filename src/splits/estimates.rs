//! A table's two-level estimates (`lift`) turned into cells: each wanted
//! passer's derived estimate per metric (the rating from its shrunk parts),
//! written into his cells, and the percentile ranks among qualified
//! passers (kept per situation, seasons and minimum, so one passer's row
//! is ranked without the whole table).

use super::memo::Memo;
use super::lift::{self, fit, normals, posteriors, Derived, Fit, RATING_PARTS};
use super::metrics::{metric_index, Stat, METRICS};
use super::scan::Sums;
use super::cell::Cell;
use crate::situation::Situation;
use crate::stats;
use crate::stats::multilevel::{normal_interval, prob_above, PasserPost};
use rayon::prelude::*;

/// Percentile ranks among a set of values, as `stats::percentile_rank`
/// gives them (the share below plus half the share equal, NaN left out), by
/// binary search in the sorted values.
#[derive(Debug, Clone)]
pub(super) struct Ranks(Vec<f64>);

impl Ranks {
    pub(super) fn new(values: impl Iterator<Item = f64>) -> Ranks {
        let mut v: Vec<f64> = values.filter(|x| !x.is_nan()).collect();
        v.sort_by(|a, b| a.total_cmp(b));
        Ranks(v)
    }
    pub(super) fn percentile(&self, x: f64) -> Option<f64> {
        if x.is_nan() || self.0.is_empty() {
            return None;
        }
        let below = self.0.partition_point(|&v| v < x);
        let equal = self.0.partition_point(|&v| v <= x) - below;
        Some((below as f64 + 0.5 * equal as f64) / self.0.len() as f64 * 100.0)
    }
}

/// Per metric (`None`: a count, or no model), each passer's derived
/// estimate in `sums.passers` order, `None` where not `wanted`. The model
/// fits (per season list) are kept in `memo`; the metrics are independent,
/// so rayon's threads share them (results in metric order). The rating is
/// put together from its shrunk parts afterwards.
pub(super) fn estimates(sums: &Sums, normal: &Sums, s: &Situation, wanted: &[bool], memo: &Memo) -> Vec<Option<Vec<Option<Derived>>>> {
    let nm = METRICS.len();
    let rating_j = metric_index("rating");
    let parts: Vec<usize> = RATING_PARTS.iter().filter_map(|k| metric_index(k)).collect();
    let jobs: Vec<usize> = (0..nm).filter(|&j| (METRICS[j].stat != Stat::Count && Some(j) != rating_j) || parts.contains(&j)).collect();
    let fits = memo.derived(&format!("fits {:?}", s.seasons), || {
        let mut fits: Vec<Option<Fit>> = vec![None; nm];
        for (j, f) in jobs.par_iter().map(|&j| (j, fit(sums, normal, j))).collect::<Vec<_>>() {
            fits[j] = f;
        }
        fits
    });
    let mut posts: Vec<Option<Vec<Option<PasserPost>>>> = vec![None; nm];
    let normals = normals(sums, normal);
    let results: Vec<(usize, Vec<Option<PasserPost>>)> = jobs.par_iter().map(|&j| (j, posteriors(fits[j].as_ref(), sums, &normals, j, wanted))).collect();
    for (j, post) in results {
        posts[j] = Some(post);
    }
    let mut derived: Vec<Option<Vec<Option<Derived>>>> =
        posts.iter().enumerate().map(|(j, p)| (METRICS[j].stat != Stat::Count).then(|| p.as_ref().map(|v| v.iter().map(|x| x.as_ref().map(Derived::from)).collect())).flatten()).collect();
    if let (Some(rj), [a, b, c, d]) = (rating_j, parts.as_slice()) {
        if let (Some(pa), Some(pb), Some(pc), Some(pd)) = (&posts[*a], &posts[*b], &posts[*c], &posts[*d]) {
            derived[rj] = Some((0..sums.passers.len()).map(|i| Some(lift::rating([pa[i].as_ref()?, pb[i].as_ref()?, pc[i].as_ref()?, pd[i].as_ref()?]))).collect());
        }
    }
    derived
}

/// How metric `j`'s estimates are shown: bounded (a share to [0, 1], the
/// rating to [0, 158.3]) and scaled to display units.
#[derive(Clone, Copy)]
pub(super) struct Shown {
    rate: bool,
    rating: bool,
    scale: f64,
}

impl Shown {
    pub(super) fn of(j: usize, rating_j: Option<usize>) -> Shown {
        Shown { rate: METRICS[j].stat == Stat::Rate, rating: Some(j) == rating_j, scale: METRICS[j].scale }
    }
    fn bound(self, x: f64) -> f64 {
        if self.rate {
            x.clamp(0.0, 1.0)
        } else if self.rating {
            x.clamp(0.0, 158.3)
        } else {
            x
        }
    }
    /// The estimate as its cell shows it (what percentiles rank).
    pub(super) fn estimate(self, d: &Derived) -> f64 {
        self.bound(d.value.0) * self.scale
    }
}

/// Write the derived estimate `d` into cell `c`: estimate and interval,
/// signal, normal, lift and its interval, and the chance of beating
/// `league_raw` (the league value in model units), flipped when lower is
/// better (`better_up` false).
pub(super) fn fill(c: &mut Cell, d: &Derived, shown: Shown, league_raw: Option<f64>, better_up: bool) {
    let scale = shown.scale;
    c.estimate = Some(shown.estimate(d));
    if let Some((lo, hi)) = normal_interval(d.value.0, d.value.1, stats::INTERVAL_LEVEL) {
        (c.lo, c.hi) = (Some(shown.bound(lo) * scale), Some(shown.bound(hi) * scale));
    }
    c.signal = Some(d.signal);
    c.normal = Some(shown.bound(d.level.0) * scale);
    if let Some((l, lv)) = d.lift {
        c.lift = Some(l * scale);
        if let Some((lo, hi)) = normal_interval(l, lv, stats::INTERVAL_LEVEL) {
            (c.lift_lo, c.lift_hi) = (Some(lo * scale), Some(hi * scale));
        }
        c.lift_signal = d.lift_signal;
    }
    c.p_better = league_raw.and_then(|lg| prob_above(d.value.0, d.value.1, lg)).map(|pa| if better_up { pa } else { 1.0 - pa });
}

/// Per metric, the ranks of the qualified passers' shown estimates
/// (`qualified` in `sums.passers` order), from `derived` (`estimates`
/// with every qualified passer wanted).
pub(super) fn ranks_of(derived: &[Option<Vec<Option<Derived>>>], qualified: &[bool]) -> Vec<Option<Ranks>> {
    let rating_j = metric_index("rating");
    derived
        .iter()
        .enumerate()
        .map(|(j, est)| {
            let shown = Shown::of(j, rating_j);
            est.as_ref().map(|e| Ranks::new(e.iter().zip(qualified).filter(|(_, &q)| q).filter_map(|(d, _)| d.as_ref().map(|d| shown.estimate(d)))))
        })
        .collect()
}

/// The memo key of the ranks for a season list and a minimum.
pub(super) fn ranks_key(s: &Situation, min_dropbacks: u32) -> String {
    format!("ranks {:?} {}", s.seasons, min_dropbacks.max(1))
}
