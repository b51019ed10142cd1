//! Statistics for the split engine: passer rating, net adjusted yards per attempt,
//! empirical-Bayes shrinkage (beta-binomial, normal-normal, James–Stein), ranks,
//! correlation and direct standardization. Pure functions over plain `f64`.

pub mod crossed;
pub mod multilevel;

use serde::Serialize;
use statrs::distribution::{Beta, ContinuousCDF, Normal};
use statrs::function::gamma::ln_gamma;
use std::collections::HashMap;
use std::hash::Hash;

/// Two-sided level of every interval this module returns.
pub const INTERVAL_LEVEL: f64 = 0.90;
const LO_Q: f64 = (1.0 - INTERVAL_LEVEL) / 2.0;
const HI_Q: f64 = 1.0 - LO_Q;

/// Search range for a fitted beta prior's concentration `alpha + beta`. The lower
/// end keeps a prior no flatter than one try's worth of data; the upper end (a
/// prior worth 100,000 tries: every unit at the league rate) stays where statrs'
/// beta quantiles agree with scipy to 1e-9.
pub const MIN_CONCENTRATION: f64 = 1.0;
pub const MAX_CONCENTRATION: f64 = 1e5;

/// Power of the hyperprior `p(alpha, beta) ∝ (alpha + beta)^(-5/2)` once written in
/// mean and concentration: `p(m, s) ∝ s^(-3/2)`.
const HYPERPRIOR_POWER: f64 = 1.5;

/// Beta prior for a success rate, with its mean and between-unit variance.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct BetaPrior {
    pub alpha: f64,
    pub beta: f64,
    /// `alpha / (alpha + beta)`: the pooled league rate.
    pub mean: f64,
    /// Variance of true rates under the prior, `mean(1 − mean)/(alpha + beta + 1)`.
    pub tau2: f64,
}

/// Normal prior for per-dropback means.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct NormalPrior {
    pub mu: f64,
    /// Between-unit variance of true means; 0 when the fit found none.
    pub tau2: f64,
}

/// A shrunk estimate with its 90% interval.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Posterior {
    pub estimate: f64,
    pub lo: f64,
    pub hi: f64,
    /// Share of the observed spread that is signal, `tau2 / (tau2 + sampling variance)`:
    /// 0 means the estimate is all prior, 1 all data.
    pub signal_share: f64,
}

fn finite(xs: &[f64]) -> bool {
    xs.iter().all(|x| x.is_finite())
}

/// Passer rating by the professional league's official passer rating formula as
/// printed in its annual record book: four components, each capped to [0, 2.375],
/// averaged and scaled by 100. Unrounded (the record book shows one decimal).
/// `None` when `att` is not positive or any input is not finite.
pub fn passer_rating(att: f64, comp: f64, yds: f64, td: f64, int: f64) -> Option<f64> {
    if !finite(&[att, comp, yds, td, int]) || att <= 0.0 {
        return None;
    }
    let cap = |v: f64| v.clamp(0.0, 2.375);
    let a = cap((comp / att - 0.3) * 5.0);
    let b = cap((yds / att - 3.0) * 0.25);
    let c = cap(td / att * 20.0);
    let d = cap(2.375 - int / att * 25.0);
    Some((a + b + c + d) / 6.0 * 100.0)
}

/// Net adjusted yards per attempt: `(yds + 20·td − 45·int − sack_yds) / (att + sacks)`,
/// with `sack_yds` the yards lost to sacks as a positive number.
/// `None` when `att + sacks` is not positive or any input is not finite.
pub fn any_a(att: f64, yds: f64, td: f64, int: f64, sacks: f64, sack_yds: f64) -> Option<f64> {
    if !finite(&[att, yds, td, int, sacks, sack_yds]) || att + sacks <= 0.0 {
        return None;
    }
    Some((yds + 20.0 * td - 45.0 * int - sack_yds) / (att + sacks))
}

/// Beta prior for rates `k / n`. The mean is the pooled rate `m = Σk / Σn`; the
/// concentration `s = alpha + beta` is the posterior mode of the beta-binomial
/// marginal likelihood under the hyperprior `p(alpha, beta) ∝ (alpha + beta)^(-5/2)`
/// (source: Gelman et al., Bayesian Data Analysis, rat-tumour example; from memory),
/// i.e. it maximises
/// `Σ_i [ln B(ms + k_i, (1−m)s + n_i − k_i) − ln B(ms, (1−m)s)] − 1.5 ln s`
/// over `s` in [`MIN_CONCENTRATION`, `MAX_CONCENTRATION`]. `tau2 = m(1−m)/(s + 1)` is
/// the prior's variance of true rates.
///
/// Why not the moment estimator: in simulated leagues of 60 passers with 10-60
/// snaps each, its between-unit variance came out at 0 in about one league in
/// fifteen, and the point-mass prior that follows gives zero-width intervals that
/// miss every truth. The hyperprior keeps `s` finite, so no interval collapses;
/// with few units it leans toward little shrinkage.
///
/// Units with `n = 0` are skipped. `None` when any pair is not finite or has
/// `k < 0` or `k > n`, when fewer than two units have data, or when the pooled rate
/// is 0 or 1 (no beta prior has that mean).
pub fn fit_beta_prior(units: &[(f64, f64)]) -> Option<BetaPrior> {
    if units
        .iter()
        .any(|&(k, n)| !finite(&[k, n]) || k < 0.0 || k > n)
    {
        return None;
    }
    let units: Vec<(f64, f64)> = units.iter().copied().filter(|&(_, n)| n > 0.0).collect();
    if units.len() < 2 {
        return None;
    }
    let m = units.iter().map(|u| u.0).sum::<f64>() / units.iter().map(|u| u.1).sum::<f64>();
    if m <= 0.0 || m >= 1.0 {
        return None;
    }
    let s = argmax_log(
        |s| beta_binomial_log_lik(&units, m, s) - HYPERPRIOR_POWER * s.ln(),
        MIN_CONCENTRATION,
        MAX_CONCENTRATION,
    );
    Some(BetaPrior {
        alpha: m * s,
        beta: (1.0 - m) * s,
        mean: m,
        tau2: m * (1.0 - m) / (s + 1.0),
    })
}

/// Log marginal likelihood of `(k, n)` pairs under Beta(ms, (1−m)s), dropping the
/// binomial coefficients (they do not depend on `s`).
fn beta_binomial_log_lik(units: &[(f64, f64)], m: f64, s: f64) -> f64 {
    let (a, b) = (m * s, (1.0 - m) * s);
    let base = ln_gamma(s) - ln_gamma(a) - ln_gamma(b);
    units
        .iter()
        .map(|&(k, n)| base + ln_gamma(a + k) + ln_gamma(b + n - k) - ln_gamma(s + n))
        .sum()
}

/// Maximiser of `f` over `[lo, hi]` searched on a log scale: a grid of 100 steps,
/// then golden-section search between the best grid point's neighbours.
fn argmax_log(f: impl Fn(f64) -> f64, lo: f64, hi: f64) -> f64 {
    const STEPS: usize = 100;
    let (ulo, uhi) = (lo.ln(), hi.ln());
    let g = |u: f64| f(u.exp());
    let at = |i: usize| ulo + (uhi - ulo) * i as f64 / STEPS as f64;
    let best = (0..=STEPS)
        .map(|i| (i, g(at(i))))
        .fold(
            (0, f64::NEG_INFINITY),
            |acc, x| if x.1 > acc.1 { x } else { acc },
        )
        .0;
    let (mut a, mut b) = (at(best.saturating_sub(1)), at((best + 1).min(STEPS)));
    let ratio = (5f64.sqrt() - 1.0) / 2.0;
    let (mut c, mut d) = (b - ratio * (b - a), a + ratio * (b - a));
    let (mut gc, mut gd) = (g(c), g(d));
    while b - a > 1e-10 {
        if gc >= gd {
            b = d;
            (d, gd) = (c, gc);
            c = b - ratio * (b - a);
            gc = g(c);
        } else {
            a = c;
            (c, gc) = (d, gd);
            d = a + ratio * (b - a);
            gd = g(d);
        }
    }
    let u = (a + b) / 2.0;
    // The grid point itself wins when the maximum sits at an end of the range.
    if g(at(best)) > g(u) {
        at(best).exp()
    } else {
        u.exp()
    }
}

/// Posterior for one unit's rate: the mean of Beta(alpha + k, beta + n − k) with
/// its 5% and 95% quantiles, and signal share `τ² / (τ² + m(1−m)/n)` (0 when n = 0).
/// `None` when `k`, `n` are not finite, `k < 0`, `k > n`, or the prior is not a
/// valid beta.
pub fn beta_posterior(prior: &BetaPrior, k: f64, n: f64) -> Option<Posterior> {
    if !finite(&[k, n]) || k < 0.0 || k > n {
        return None;
    }
    let a = prior.alpha + k;
    let b = prior.beta + n - k;
    let post = Beta::new(a, b).ok()?;
    let sampling = prior.mean * (1.0 - prior.mean);
    let signal_share = if n > 0.0 && prior.tau2 > 0.0 {
        prior.tau2 / (prior.tau2 + sampling / n)
    } else {
        0.0
    };
    Some(Posterior {
        estimate: a / (a + b),
        lo: post.inverse_cdf(LO_Q),
        hi: post.inverse_cdf(HI_Q),
        signal_share,
    })
}

/// Normal prior for unit means `y_i` with sampling variances `se2_i`, by the
/// DerSimonian–Laird moment estimator: with weights `w = 1/se2`, `Q = Σ w (y − ȳ_w)²`,
/// `τ² = max(0, (Q − (K−1)) / (Σw − Σw²/Σw))` — the precision-weighted spread of the
/// means less their sampling variance — and `mu` the mean re-weighted by
/// `1/(se2 + τ²)`.
///
/// When `τ²` is floored at 0 every posterior is `mu` with a zero-width interval.
/// Each `se2` must be positive (for a unit with few dropbacks, use a pooled
/// within-unit variance over its count). `None` when any value is not finite, any
/// `se2` is not positive, or there are fewer than two units.
pub fn fit_normal_prior(units: &[(f64, f64)]) -> Option<NormalPrior> {
    if units.len() < 2 || units.iter().any(|&(y, s)| !finite(&[y, s]) || s <= 0.0) {
        return None;
    }
    let sum_w: f64 = units.iter().map(|(_, s)| 1.0 / s).sum();
    let sum_w2: f64 = units.iter().map(|(_, s)| 1.0 / (s * s)).sum();
    let fixed = units.iter().map(|(y, s)| y / s).sum::<f64>() / sum_w;
    let q: f64 = units.iter().map(|(y, s)| (y - fixed).powi(2) / s).sum();
    let df = (units.len() - 1) as f64;
    let tau2 = ((q - df) / (sum_w - sum_w2 / sum_w)).max(0.0);
    let mu = weighted_mean(
        &units
            .iter()
            .map(|&(y, s)| (y, 1.0 / (s + tau2)))
            .collect::<Vec<_>>(),
    )?;
    Some(NormalPrior { mu, tau2 })
}

/// Posterior for one unit's mean: `mu + share·(mean − mu)` with
/// `share = τ² / (τ² + se2)` and posterior variance `share·se2`, with its 5% and 95%
/// normal quantiles. With `se2 = 0` the observed mean is exact (share 1); with
/// `τ² = 0` the estimate is `mu` and the interval collapses to it.
/// `None` when an input is not finite or a variance is negative.
pub fn normal_posterior(prior: &NormalPrior, mean: f64, se2: f64) -> Option<Posterior> {
    if !finite(&[prior.mu, prior.tau2, mean, se2]) || se2 < 0.0 || prior.tau2 < 0.0 {
        return None;
    }
    let share = if se2 == 0.0 {
        1.0
    } else {
        prior.tau2 / (prior.tau2 + se2)
    };
    let estimate = prior.mu + share * (mean - prior.mu);
    let var = share * se2;
    let (lo, hi) = if var > 0.0 {
        let post = Normal::new(estimate, var.sqrt()).ok()?;
        (post.inverse_cdf(LO_Q), post.inverse_cdf(HI_Q))
    } else {
        (estimate, estimate)
    };
    Some(Posterior {
        estimate,
        lo,
        hi,
        signal_share: share,
    })
}

/// James–Stein estimates in the Efron & Morris form, shrinking toward the grand
/// mean: `c = 1 − (k−3)σ²/Σ(y−ȳ)²`, estimates `ȳ + c(y − ȳ)`. Returns
/// `(grand_mean, c, estimates)`. `c` is kept in [0, 1] (the positive-part rule):
/// 0 when the values do not vary, 1 when `sigma2` is 0.
/// `None` for fewer than four values, a non-finite value, or a negative `sigma2`.
pub fn james_stein(values: &[f64], sigma2: f64) -> Option<(f64, f64, Vec<f64>)> {
    if values.len() < 4 || !finite(values) || !sigma2.is_finite() || sigma2 < 0.0 {
        return None;
    }
    let k = values.len() as f64;
    let grand = values.iter().sum::<f64>() / k;
    let ss: f64 = values.iter().map(|y| (y - grand).powi(2)).sum();
    let c = if sigma2 == 0.0 {
        1.0
    } else if ss == 0.0 {
        0.0
    } else {
        (1.0 - (k - 3.0) * sigma2 / ss).clamp(0.0, 1.0)
    };
    let estimates = values.iter().map(|y| grand + c * (y - grand)).collect();
    Some((grand, c, estimates))
}

/// Percentile rank of `x` among `values`, 0-100: the share of values below `x`
/// plus half the share equal to it (mid-rank for ties). NaN values are ignored.
/// `None` when `x` is NaN or no values remain.
pub fn percentile_rank(values: &[f64], x: f64) -> Option<f64> {
    if x.is_nan() {
        return None;
    }
    let (mut below, mut equal, mut total) = (0usize, 0usize, 0usize);
    for &v in values.iter().filter(|v| !v.is_nan()) {
        total += 1;
        if v < x {
            below += 1;
        } else if v == x {
            equal += 1;
        }
    }
    if total == 0 {
        return None;
    }
    Some((below as f64 + 0.5 * equal as f64) / total as f64 * 100.0)
}

/// `(x − mean) / sd`; `None` when `sd` is not positive or an input is not finite.
pub fn z_score(x: f64, mean: f64, sd: f64) -> Option<f64> {
    if !finite(&[x, mean, sd]) || sd <= 0.0 {
        return None;
    }
    Some((x - mean) / sd)
}

/// Mean and sample standard deviation (divisor n − 1).
/// `None` for fewer than two values or a non-finite value.
pub fn mean_sd(values: &[f64]) -> Option<(f64, f64)> {
    if values.len() < 2 || !finite(values) {
        return None;
    }
    let n = values.len() as f64;
    let mean = values.iter().sum::<f64>() / n;
    let ss: f64 = values.iter().map(|v| (v - mean).powi(2)).sum();
    Some((mean, (ss / (n - 1.0)).sqrt()))
}

/// Pearson correlation. `None` when the lengths differ, n < 3, a value is not
/// finite, or either side has zero variance.
pub fn pearson(xs: &[f64], ys: &[f64]) -> Option<f64> {
    if xs.len() != ys.len() || xs.len() < 3 || !finite(xs) || !finite(ys) {
        return None;
    }
    let n = xs.len() as f64;
    let mx = xs.iter().sum::<f64>() / n;
    let my = ys.iter().sum::<f64>() / n;
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (x, y) in xs.iter().zip(ys) {
        let (dx, dy) = (x - mx, y - my);
        sxy += dx * dy;
        sxx += dx * dx;
        syy += dy * dy;
    }
    if sxx == 0.0 || syy == 0.0 {
        return None;
    }
    Some((sxy / (sxx * syy).sqrt()).clamp(-1.0, 1.0))
}

/// Mean of `(value, weight)` pairs. `None` when a pair is not finite, a weight is
/// negative, or the weights sum to 0.
pub fn weighted_mean(pairs: &[(f64, f64)]) -> Option<f64> {
    let (mut num, mut den) = (0.0, 0.0);
    for &(v, w) in pairs {
        if !finite(&[v, w]) || w < 0.0 {
            return None;
        }
        num += v * w;
        den += w;
    }
    (den > 0.0).then(|| num / den)
}

/// Direct standardization: the league's value re-weighted by a passer's own mix
/// over situation cells (e.g. down × distance bucket × field zone), i.e. what the
/// league would have produced on the passer's snaps. `cells_league` holds
/// `(cell, league_value, league_n)`; `passer_mix` holds `(cell, passer_n)`.
/// A passer cell the league has no data for (absent or `league_n = 0`) takes the
/// overall league value (the n-weighted mean over all cells). Repeated league cells
/// are pooled by n; repeated passer cells add up.
/// `None` when an input is not finite or negative where a count is expected, the
/// league has no data, or the passer's counts sum to 0.
pub fn standardize<K: Eq + Hash>(
    cells_league: &[(K, f64, f64)],
    passer_mix: &[(K, f64)],
) -> Option<f64> {
    let mut league: HashMap<&K, (f64, f64)> = HashMap::with_capacity(cells_league.len());
    for (key, value, n) in cells_league {
        if !finite(&[*value, *n]) || *n < 0.0 {
            return None;
        }
        let cell = league.entry(key).or_insert((0.0, 0.0));
        cell.0 += value * n;
        cell.1 += n;
    }
    let (sum_vn, sum_n) = league
        .values()
        .fold((0.0, 0.0), |(a, b), &(s, n)| (a + s, b + n));
    if sum_n <= 0.0 {
        return None;
    }
    let overall = sum_vn / sum_n;
    let mut pairs = Vec::with_capacity(passer_mix.len());
    for (key, n) in passer_mix {
        let value = match league.get(key) {
            Some(&(s, ln)) if ln > 0.0 => s / ln,
            _ => overall,
        };
        pairs.push((value, *n));
    }
    weighted_mean(&pairs)
}

#[cfg(test)]
mod tests;
