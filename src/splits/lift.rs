//! Estimates from sums with the two-level model (`stats::multilevel`): each
//! passer's situation snaps against his other snaps (every-snap sums minus
//! the situation's), giving his value centred on his own level, his lift and
//! their intervals. The passer rating is put together from its shrunk parts.

use super::metrics::{metric_index, Stat, METRICS};
use super::scan::{Acc, Accs, Sums};
use crate::stats::multilevel::{fit_variance, Model, Obs, PasserData, PasserPost};
use crate::stats::passer_rating;

/// The index of the dropbacks count.
fn db() -> usize {
    metric_index("dropbacks").unwrap_or(0)
}

fn minus(a: &Acc, b: &Acc) -> Acc {
    Acc { n: (a.n - b.n).max(0.0), sum: a.sum - b.sum, sumsq: (a.sumsq - b.sumsq).max(0.0) }
}

/// Sampling variance of one snap: for a share, `p(1 − p)` at the pooled rate
/// (with half a success added, so a rate of 0 still has a variance); for a
/// mean, the within-passer variance pooled over passers.
fn snap_var(rate: bool, league: &Acc, passers: &[Acc]) -> Option<f64> {
    let v = if rate {
        let p = (league.sum + 0.5) / (league.n + 1.0);
        p * (1.0 - p)
    } else {
        let (mut ss, mut df) = (0.0, 0.0);
        for a in passers.iter().filter(|a| a.n >= 2.0) {
            ss += (a.sumsq - a.sum * a.sum / a.n).max(0.0);
            df += a.n - 1.0;
        }
        if df <= 0.0 {
            return None;
        }
        ss / df
    };
    (v.is_finite() && v > 0.0).then_some(v)
}

fn obs(a: &Acc, var: f64) -> Option<Obs> {
    (a.n >= 0.5).then(|| Obs { y: a.sum / a.n, v: var / a.n })
}

/// The model fitted for one metric over every passer of a situation: it
/// depends on the situation and its seasons only (not on the minimum, the
/// focus or the passer filter), so the table memoises it beside the pass.
#[derive(Debug, Clone)]
pub(super) struct Fit {
    model: Model,
    /// Per-snap sampling variance on other snaps; `None`: one level, fitted
    /// on the situation itself.
    other_var: Option<f64>,
    /// Per-snap sampling variance in the situation.
    here_var: f64,
    /// The mean log dropbacks the volume covariate is centred on.
    centre: f64,
}

fn volume(normal: &Sums, who: u32) -> f64 {
    normal.passers.get(&who).map(|ps| ps.accs[db()].n).unwrap_or(0.0).max(1.0).ln()
}

fn other_of(sums: &Sums, normal: &Sums, who: u32, j: usize) -> Acc {
    let all = normal.passers.get(&who).map(|ps| ps.accs[j]).unwrap_or_default();
    match sums.passers.get(&who) {
        Some(ps) => minus(&all, &ps.accs[j]),
        None => all,
    }
}

/// Fit the model for the metric at `j` (its per-snap shares or means) on
/// every passer. `normal` holds the every-snap sums over the same seasons.
/// The level's prior mean is a line in log dropbacks. When the situation
/// leaves too few passers with other snaps (every snap, say) the model has
/// one level, fitted on the situation itself. `None` when neither fits.
pub(super) fn fit(sums: &Sums, normal: &Sums, j: usize) -> Option<Fit> {
    let rate = METRICS[j].stat != Stat::Mean;
    let centre = {
        let xs: Vec<f64> = normal.passers.keys().map(|&w| volume(normal, w)).collect();
        if xs.is_empty() { 0.0 } else { xs.iter().sum::<f64>() / xs.len() as f64 }
    };
    let x_of = |who: u32| volume(normal, who) - centre;
    let here_accs: Vec<Acc> = sums.passers.values().map(|ps| ps.accs[j]).collect();
    let other_accs: Vec<(u32, Acc)> = normal.passers.keys().map(|&w| (w, other_of(sums, normal, w, j))).collect();
    let other_league = minus(&normal.league[j], &sums.league[j]);
    let here_var = snap_var(rate, &sums.league[j], &here_accs)?;
    let other_var = snap_var(rate, &other_league, &other_accs.iter().map(|x| x.1).collect::<Vec<_>>());

    let two_level = other_var.and_then(|ov| {
        let level: Vec<(Obs, f64)> = other_accs.iter().filter_map(|(w, a)| Some((obs(a, ov)?, x_of(*w)))).collect();
        let diffs: Vec<(Obs, f64)> = sums
            .passers
            .iter()
            .filter_map(|(&w, ps)| {
                let (h, o) = (obs(&ps.accs[j], here_var)?, obs(&other_of(sums, normal, w, j), ov)?);
                Some((Obs { y: h.y - o.y, v: h.v + o.v }, 0.0))
            })
            .collect();
        let level = fit_variance(&level, true).or_else(|| fit_variance(&level, false))?;
        let lift = fit_variance(&diffs, false)?;
        Some(Fit { model: Model::new(&level, Some(&lift)), other_var: Some(ov), here_var, centre })
    });
    two_level.or_else(|| {
        let units: Vec<(Obs, f64)> = sums.passers.iter().filter_map(|(&w, ps)| Some((obs(&ps.accs[j], here_var)?, x_of(w)))).collect();
        let fit = fit_variance(&units, true).or_else(|| fit_variance(&units, false))?;
        Some(Fit { model: Model::new(&fit, None), other_var: None, here_var, centre })
    })
}

/// Each passer of `sums.passers` (in its order) with his every-snap sums
/// in `normal` and the log of his every-snap dropbacks (what the
/// posteriors read per passer, looked up once per table).
pub(super) fn normals<'a>(sums: &Sums, normal: &'a Sums) -> Vec<(Option<&'a Accs>, f64)> {
    sums.passers.keys().map(|w| (normal.passers.get(w).map(|ps| &ps.accs), volume(normal, *w))).collect()
}

/// Posteriors of the metric at `j` from its `fit`, for every passer in
/// `sums.passers` order that is `wanted` (`None` for the others); `normals`
/// from `normals(sums, normal)`.
pub(super) fn posteriors(fit: Option<&Fit>, sums: &Sums, normals: &[(Option<&Accs>, f64)], j: usize, wanted: &[bool]) -> Vec<Option<PasserPost>> {
    let Some(f) = fit else { return vec![None; sums.passers.len()] };
    sums.passers
        .values()
        .zip(wanted)
        .zip(normals)
        .map(|((ps, &want), &(all, vol))| {
            if !want {
                return None;
            }
            let x = vol - f.centre;
            let here = obs(&ps.accs[j], f.here_var);
            let other = f.other_var.and_then(|ov| {
                let all = all.map(|a| a[j]).unwrap_or_default();
                obs(&minus(&all, &ps.accs[j]), ov)
            });
            f.model.passer(&PasserData { other, here, x })
        })
        .collect()
}

/// The passer rating's parts, in the order of the linear form's terms.
pub(super) const RATING_PARTS: [&str; 4] = ["comp_pct", "ypa", "td", "int_rate"];

/// Weights of the parts in the rating's linear form (per-attempt shares and
/// yards): `100/6 · (5c + 0.25y + 20t − 25i) + const`.
const RATING_WEIGHTS: [f64; 4] = [500.0 / 6.0, 25.0 / 6.0, 2000.0 / 6.0, -2500.0 / 6.0];

/// A derived estimate: mean and variance of the value, the lift, and signal shares.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Derived {
    pub value: (f64, f64),
    pub level: (f64, f64),
    pub lift: Option<(f64, f64)>,
    pub lift_signal: Option<f64>,
    pub signal: f64,
}

fn rating_of(parts: [f64; 4]) -> f64 {
    passer_rating(1.0, parts[0], parts[1], parts[2], parts[3]).unwrap_or(f64::NAN)
}

/// The passer rating from its shrunk parts, through the capped formula. The
/// variance is that of the uncapped linear form (the parts taken as
/// independent); the signal shares weigh the parts' between-passer and
/// sampling variances by the squared weights.
pub(super) fn rating(parts: [&PasserPost; 4]) -> Derived {
    let wsum = |f: &dyn Fn(&PasserPost) -> f64| parts.iter().zip(RATING_WEIGHTS).map(|(p, w)| w * w * f(p)).sum::<f64>();
    let value = (rating_of(parts.map(|p| p.value.0)), wsum(&|p| p.value.1));
    let level = (rating_of(parts.map(|p| p.level.0)), wsum(&|p| p.level.1));
    let lift = parts
        .iter()
        .all(|p| p.lift.is_some())
        .then(|| (value.0 - level.0, wsum(&|p| p.lift.map(|l| l.1).unwrap_or(0.0))));
    let prior = wsum(&|p| p.prior_var);
    let lift_signal = lift.map(|_| {
        let w = wsum(&|p| p.lift_prior_var);
        w / (w + wsum(&|p| p.raw_diff_var))
    });
    Derived { value, level, lift, lift_signal, signal: prior / (prior + wsum(&|p| p.here_var)) }
}

impl From<&PasserPost> for Derived {
    fn from(p: &PasserPost) -> Derived {
        Derived { value: p.value, level: p.level, lift: p.lift, lift_signal: p.lift_signal, signal: p.signal }
    }
}
