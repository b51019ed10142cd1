//! A two-level normal model fitted on sufficient statistics: each passer's
//! level on his other snaps (prior mean a line in his volume), the
//! situation's effect, and his own shift in the situation (the lift).
//! Between-passer SDs are integrated over a grid, never set to zero.
//!
//! For one metric and one situation, passer `i` gives two observed means with
//! known sampling variances: `y'_i` (his other snaps, variance `v'_i`) and `y_i`
//! (the situation, `v_i`). The model:
//!
//! ```text
//! y'_i = θ_i + e'_i,            θ_i ~ N(β₀ + β₁·x_i, τ²)     (his level elsewhere)
//! y_i  = θ_i + δ + λ_i + e_i,   λ_i ~ N(0, ω²)               (δ: the situation's effect)
//! ```
//!
//! The lift is `δ + λ_i` (his situation value minus his level elsewhere): the
//! passer × situation part is shrunk toward 0, so the lift is pulled toward the
//! league's lift `δ`. The hyperparameters come from the marginals:
//! `y'_i ~ N(xβ, τ² + v'_i)` (REML in β) and `d_i = y_i − y'_i ~ N(δ, ω² + v_i + v'_i)`
//! (REML in δ; θ cancels). Each SD gets the boundary-avoiding prior
//! `p(sd) ∝ sd` (the gamma(2, λ→0) penalty of Chung, Rabe-Hesketh, Dorie, Gelman
//! & Liu 2013, "A nondegenerate penalized likelihood estimator for variance
//! parameters in multilevel models", Psychometrika 78(4)), used here as a prior
//! and integrated over a grid rather than maximised: the posterior of an SD is
//! 0 at 0, so no interval collapses. Given the hyperparameters the passer's
//! `(θ_i, λ_i)` posterior is bivariate normal (closed form); the reported mean
//! and variance average over the grid and add the uncertainty of `β` and `δ`
//! (the total-variance correction of Kass & Steffey 1989, "Approximate Bayesian
//! inference in conditionally independent hierarchical models", JASA 84(407),
//! in the spirit of Morris 1983, "Parametric empirical Bayes inference", JASA
//! 78(381)). Intervals are normal on that mean and variance.

use statrs::distribution::{ContinuousCDF, Normal};

/// Points on each SD grid (midpoints of equal steps from 0 to the upper end).
const GRID: usize = 40;
/// Pairs of grid points (level SD × lift SD) whose joint posterior weight is
/// below this share of the total are left out when passers are scored (the
/// rest renormalised). Left out, they move no estimate or interval end by as
/// much as 1e-4 of the interval's width (`tests.rs` checks it against the
/// whole grid; 5.2e-5 at most there, 6.1e-6 at 1e-7, which kept the split
/// table about 15% slower on 25 seasons).
pub const PRUNE: f64 = 1e-6;

/// One observed mean with its sampling variance and volume covariate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Obs {
    pub y: f64,
    pub v: f64,
}

/// One grid point of a fitted random-intercept model: the between-unit
/// variance, its posterior weight, and the GLS coefficients with their
/// covariance at that variance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GridPoint {
    pub var: f64,
    pub weight: f64,
    pub beta: [f64; 2],
    pub cov: [[f64; 2]; 2],
}

/// The grid posterior of a between-unit variance, with coefficients.
#[derive(Debug, Clone, PartialEq)]
pub struct VarFit {
    pub points: Vec<GridPoint>,
    /// Whether the prior mean has a slope on the covariate.
    pub slope: bool,
}

impl VarFit {
    /// Posterior mean of the between-unit variance.
    pub fn mean_var(&self) -> f64 {
        self.points.iter().map(|g| g.weight * g.var).sum()
    }
    /// Prior mean at covariate `x`, averaged over the grid.
    pub fn mean_at(&self, x: f64) -> f64 {
        self.points.iter().map(|g| g.weight * (g.beta[0] + if self.slope { g.beta[1] * x } else { 0.0 })).sum()
    }
}

fn finite(xs: &[f64]) -> bool {
    xs.iter().all(|x| x.is_finite())
}

/// REML log-likelihood of `y_i ~ N(β₀ + β₁x_i, var + v_i)` at one variance, with
/// the GLS coefficients and their covariance, in one pass over the units:
/// `y` is taken less `shift` (their mean, so the sums stay well scaled), and
/// the weighted residual sum of squares is `yᵀWy − β̂ᵀXᵀWy` at the GLS
/// solution. `None` when the design is singular.
fn reml(units: &[(Obs, f64)], shift: f64, var: f64, slope: bool) -> Option<(f64, [f64; 2], [[f64; 2]; 2])> {
    let (mut a00, mut a01, mut a11, mut b0, mut b1, mut syy, mut logdet) = (0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
    for (o, x) in units {
        let t = var + o.v;
        let w = 1.0 / t;
        let y = o.y - shift;
        logdet += t.ln();
        a00 += w;
        b0 += w * y;
        syy += w * y * y;
        if slope {
            a01 += w * x;
            a11 += w * x * x;
            b1 += w * x * y;
        }
    }
    let (beta, cov, det) = if slope {
        let det = a00 * a11 - a01 * a01;
        if det <= 1e-12 * a00 * a11.max(1e-300) || !det.is_finite() {
            return None;
        }
        let inv = [[a11 / det, -a01 / det], [-a01 / det, a00 / det]];
        ([inv[0][0] * b0 + inv[0][1] * b1, inv[1][0] * b0 + inv[1][1] * b1], inv, det)
    } else {
        if a00 <= 0.0 {
            return None;
        }
        ([b0 / a00, 0.0], [[1.0 / a00, 0.0], [0.0, 0.0]], a00)
    };
    let rss = (syy - beta[0] * b0 - beta[1] * b1).max(0.0);
    Some((-0.5 * logdet - 0.5 * det.ln() - 0.5 * rss, [beta[0] + shift, beta[1]], cov))
}

/// Fit `y_i ~ N(β₀ + β₁x_i, σ² + v_i)` over a grid of the between-unit SD `σ`
/// with prior `p(σ) ∝ σ` (Chung et al. 2013's boundary-avoiding gamma(2, λ→0)),
/// flat priors on β (REML). `units` are `(observation, covariate)`; with
/// `slope` false the covariate is ignored. The grid's upper end starts at
/// `max(2.5·SD(y), √median(v))` and doubles (up to three times) while the top
/// point still carries a thousandth of the largest weight; with very few units
/// the third doubling stays (the prior is then bounded there). `None` with
/// fewer than `2 + slope` units, a non-finite value or a non-positive sampling
/// variance.
pub fn fit_variance(units: &[(Obs, f64)], slope: bool) -> Option<VarFit> {
    let need = if slope { 3 } else { 2 };
    if units.len() < need || units.iter().any(|(o, x)| !finite(&[o.y, o.v, *x]) || o.v <= 0.0) {
        return None;
    }
    let k = units.len() as f64;
    let mean_y = units.iter().map(|(o, _)| o.y).sum::<f64>() / k;
    let var_y = units.iter().map(|(o, _)| (o.y - mean_y).powi(2)).sum::<f64>() / (k - 1.0);
    let mut vs: Vec<f64> = units.iter().map(|(o, _)| o.v).collect();
    vs.sort_by(|a, b| a.total_cmp(b));
    let median_v = vs[vs.len() / 2];
    let mut upper = (2.5 * var_y.sqrt()).max(median_v.sqrt());
    for round in 0..4 {
        let step = upper / GRID as f64;
        let mut pts = Vec::with_capacity(GRID);
        for g in 0..GRID {
            let sd = (g as f64 + 0.5) * step;
            let (ll, beta, cov) = reml(units, mean_y, sd * sd, slope)?;
            // prior ∝ sd; equal steps in sd, so no Jacobian.
            pts.push((sd * sd, sd.ln() + ll, beta, cov));
        }
        let top = pts.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
        if !top.is_finite() {
            return None;
        }
        let mut points: Vec<GridPoint> =
            pts.iter().map(|&(var, lw, beta, cov)| GridPoint { var, weight: (lw - top).exp(), beta, cov }).collect();
        let total: f64 = points.iter().map(|g| g.weight).sum();
        points.iter_mut().for_each(|g| g.weight /= total);
        let last = points.last().map(|g| g.weight).unwrap_or(0.0);
        let most = points.iter().map(|g| g.weight).fold(0.0, f64::max);
        // With few units the posterior's tail falls slowly (∝ sd^(2−K)): the
        // last round keeps its end, so the prior is p(sd) ∝ sd on [0, 8 × first end].
        if last < 1e-3 * most || round == 3 {
            return Some(VarFit { points, slope });
        }
        upper *= 2.0;
    }
    None
}

/// What one passer's posterior says, as means and total variances (already
/// averaged over both grids, with the coefficient uncertainty added).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PasserPost {
    /// His true value in the situation, `θ + δ + λ`.
    pub value: (f64, f64),
    /// His level on his other snaps, `θ`.
    pub level: (f64, f64),
    /// His lift, `δ + λ`; `None` without the lift model.
    pub lift: Option<(f64, f64)>,
    /// Share of the variance of his raw difference that is true lift,
    /// `E[ω²] / (E[ω²] + v + v')`.
    pub lift_signal: Option<f64>,
    /// Share of the variance of his raw situation value that is true
    /// difference between passers, `E[τ² + ω²] / (E[τ² + ω²] + v)`.
    pub signal: f64,
    /// `E[τ² + ω²]`: the between-passer variance of situation values.
    pub prior_var: f64,
    /// `v`: the sampling variance of his raw situation value (0 without snaps).
    pub here_var: f64,
    /// `E[ω²]`: the between-passer variance of lifts (0 without the lift model).
    pub lift_prior_var: f64,
    /// `v + v'`: the sampling variance of his raw difference.
    pub raw_diff_var: f64,
}

/// A passer's data: other snaps (`None` when he has none), the situation
/// (`None` likewise), and his covariate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PasserData {
    pub other: Option<Obs>,
    pub here: Option<Obs>,
    pub x: f64,
}

/// A level grid point as passers are scored: the prior precision `1/τ²` and
/// the prior mean's coefficients with their covariance `[c00, c01, c11]`.
#[derive(Debug, Clone, Copy, PartialEq)]
struct LevelPt {
    prec: f64,
    beta: [f64; 2],
    cov: [f64; 3],
}

/// A lift grid point: the precision `1/ω²`, `δ` and its variance.
#[derive(Debug, Clone, Copy, PartialEq)]
struct LiftPt {
    prec: f64,
    delta: f64,
    var_delta: f64,
}

/// The fitted model for one metric in one situation: the level fit (other
/// snaps) and, when the situation has other snaps to compare with, the lift
/// fit, as the pairs of grid points passers are scored over.
#[derive(Debug, Clone, PartialEq)]
pub struct Model {
    level: Vec<LevelPt>,
    slope: bool,
    lift: Option<Vec<LiftPt>>,
    /// (level point, lift point, joint weight); the weights sum to 1.
    pairs: Vec<(u16, u16, f64)>,
    /// The pairs again, as passers are scored with a lift model: runs of
    /// one level point (point, start, end) over flat per-pair columns of
    /// the lift point's precision, `δ`, its variance and the joint weight.
    runs: Vec<(u16, u32, u32)>,
    pair_prec: Vec<f64>,
    pair_delta: Vec<f64>,
    pair_var_delta: Vec<f64>,
    pair_weight: Vec<f64>,
    mean_level_var: f64,
    mean_lift_var: f64,
}

/// What one level point gives a passer's pairs: the prior mean's variance
/// at his covariate, the precision of θ, the prior precision `1/τ²`, the
/// known part of θ's precision-weighted sum, and his `1/v` and `y`.
#[derive(Clone, Copy)]
struct LevelTerms {
    var_mu: f64,
    p00: f64,
    pt: f64,
    known: f64,
    ph: f64,
    yh: f64,
}

/// Pairs of grid points scored side by side (independent sums, added up in
/// a fixed order at the end, so a passer's numbers are the same on every call).
const LANES: usize = 4;

impl Model {
    /// `level` fitted on the passers' other snaps, `lift` on their raw
    /// differences (intercept only). Without `lift`, the situation value is
    /// the level itself (use this when the level was fitted on the situation).
    /// Pairs of grid points below `PRUNE` of the weight are left out.
    pub fn new(level: &VarFit, lift: Option<&VarFit>) -> Model {
        Model::pruned_at(level, lift, PRUNE)
    }

    /// `Model::new` leaving out the pairs of grid points below `prune` of
    /// the total weight (0: the whole grid).
    pub fn pruned_at(level: &VarFit, lift: Option<&VarFit>, prune: f64) -> Model {
        let lw: Vec<f64> = level.points.iter().map(|g| g.weight).collect();
        let kw: Vec<f64> = lift.map_or(vec![1.0], |f| f.points.iter().map(|g| g.weight).collect());
        let total = lw.iter().sum::<f64>() * kw.iter().sum::<f64>();
        let (mut used_l, mut used_k) = (vec![u16::MAX; lw.len()], vec![u16::MAX; kw.len()]);
        let (mut lpts, mut kpts, mut pairs) = (Vec::new(), Vec::new(), Vec::new());
        for (i, &a) in lw.iter().enumerate() {
            for (k, &b) in kw.iter().enumerate() {
                let w = a * b;
                if !(w > 0.0 && w >= prune * total) {
                    continue;
                }
                if used_l[i] == u16::MAX {
                    used_l[i] = lpts.len() as u16;
                    let g = &level.points[i];
                    lpts.push(LevelPt { prec: 1.0 / g.var, beta: g.beta, cov: [g.cov[0][0], g.cov[0][1], g.cov[1][1]] });
                }
                if used_k[k] == u16::MAX {
                    used_k[k] = kpts.len() as u16;
                    kpts.push(match lift {
                        Some(f) => LiftPt { prec: 1.0 / f.points[k].var, delta: f.points[k].beta[0], var_delta: f.points[k].cov[0][0] },
                        None => LiftPt { prec: f64::INFINITY, delta: 0.0, var_delta: 0.0 },
                    });
                }
                pairs.push((used_l[i], used_k[k], w));
            }
        }
        let kept: f64 = pairs.iter().map(|p| p.2).sum();
        pairs.iter_mut().for_each(|p| p.2 /= kept);
        let mut runs: Vec<(u16, u32, u32)> = Vec::new();
        for (q, &(i, _, _)) in pairs.iter().enumerate() {
            match runs.last_mut() {
                Some(r) if r.0 == i => r.2 = q as u32 + 1,
                _ => runs.push((i, q as u32, q as u32 + 1)),
            }
        }
        let column = |f: &dyn Fn(&LiftPt) -> f64| pairs.iter().map(|&(_, k, _)| f(&kpts[k as usize])).collect::<Vec<f64>>();
        let (pair_prec, pair_delta, pair_var_delta) = (column(&|k| k.prec), column(&|k| k.delta), column(&|k| k.var_delta));
        let pair_weight = pairs.iter().map(|p| p.2).collect();
        Model {
            level: lpts,
            slope: level.slope,
            lift: lift.map(|_| kpts),
            pairs,
            runs,
            pair_prec,
            pair_delta,
            pair_var_delta,
            pair_weight,
            mean_level_var: level.mean_var(),
            mean_lift_var: lift.map(|f| f.mean_var()).unwrap_or(0.0),
        }
    }

    /// How many pairs of grid points a passer is scored over.
    pub fn pairs(&self) -> usize {
        self.pairs.len()
    }

    /// The posterior for one passer. `None` when he has no data at all, or
    /// the lift model is missing while he has situation snaps besides other
    /// snaps (then use a model fitted on the situation alone).
    pub fn passer(&self, d: &PasserData) -> Option<PasserPost> {
        if d.other.is_none() && d.here.is_none() {
            return None;
        }
        let (pv, yv) = d.other.map(|o| (1.0 / o.v, o.y)).unwrap_or((0.0, 0.0));
        let (ph, yh) = d.here.map(|o| (1.0 / o.v, o.y)).unwrap_or((0.0, 0.0));
        // Per level point: the prior mean at his covariate, its variance,
        // and the precision of θ from the prior and both observations.
        let mut stack = [[0.0f64; 3]; GRID];
        let mut heap = Vec::new();
        let per: &mut [[f64; 3]] = if self.level.len() <= GRID {
            &mut stack[..self.level.len()]
        } else {
            heap.resize(self.level.len(), [0.0; 3]);
            &mut heap
        };
        for (out, lp) in per.iter_mut().zip(&self.level) {
            let (mu, var_mu) = if self.slope {
                (lp.beta[0] + lp.beta[1] * d.x, lp.cov[0] + 2.0 * d.x * lp.cov[1] + d.x * d.x * lp.cov[2])
            } else {
                (lp.beta[0], lp.cov[0])
            };
            *out = [mu, var_mu, lp.prec + pv + ph];
        }
        // Moments accumulated over the grid: E[m] and E[var + m²] of the
        // value, the level and the lift.
        let two_level = self.lift.is_some();
        let acc = if two_level { self.two_level_moments(per, [pv, yv, ph, yh]) } else { self.one_level_moments(per, [pv, yv, ph, yh]) };
        let mv = |m: f64, s: f64| (m, (s - m * m).max(0.0));
        let (value, level, lift) = (mv(acc[0], acc[1]), mv(acc[2], acc[3]), mv(acc[4], acc[5]));
        let has_lift = two_level && d.other.is_some() && d.here.is_some();
        let raw_diff_var = d.other.map(|o| o.v).unwrap_or(0.0) + d.here.map(|o| o.v).unwrap_or(0.0);
        let between = self.mean_level_var + self.mean_lift_var;
        let signal = match d.here {
            Some(h) => between / (between + h.v),
            None => 0.0,
        };
        Some(PasserPost {
            value,
            level,
            lift: has_lift.then_some(lift),
            lift_signal: has_lift.then(|| self.mean_lift_var / (self.mean_lift_var + raw_diff_var)),
            signal,
            prior_var: between,
            here_var: d.here.map(|o| o.v).unwrap_or(0.0),
            lift_prior_var: self.mean_lift_var,
            raw_diff_var,
        })
    }
}

impl Model {
    /// The grid moments of a passer with the lift model: over each run of
    /// pairs sharing a level point, `LANES` pairs at a time in separate
    /// sums. `per`: per level point the prior mean at his covariate, its
    /// variance and the precision of θ; `d`: `[1/v', y', 1/v, y]`. Returns
    /// E[m] and E[var + m²] of the value, the level and the lift.
    fn two_level_moments(&self, per: &[[f64; 3]], d: [f64; 4]) -> [f64; 6] {
        let [pv, yv, ph, yh] = d;
        let mut lanes = [[0.0f64; LANES]; 6];
        debug_assert_eq!(LANES, 4);
        for &(i, a, z) in &self.runs {
            let [mu, var_mu, p00] = per[i as usize];
            let pt = self.level[i as usize].prec;
            let known = mu * pt + yv * pv;
            let lv = LevelTerms { var_mu, p00, pt, known, ph, yh };
            let (a, z) = (a as usize, z as usize);
            let mut q = a;
            while q + LANES <= z {
                let terms = [self.pair_terms(q, &lv), self.pair_terms(q + 1, &lv), self.pair_terms(q + 2, &lv), self.pair_terms(q + 3, &lv)];
                for (t, lane) in lanes.iter_mut().enumerate() {
                    for l in 0..LANES {
                        lane[l] += terms[l][t];
                    }
                }
                q += LANES;
            }
            for q in q..z {
                let terms = self.pair_terms(q, &lv);
                for (t, lane) in lanes.iter_mut().enumerate() {
                    lane[0] += terms[t];
                }
            }
        }
        lanes.map(|lane| lane.iter().sum())
    }

    /// One pair of grid points (number `q`) for a passer at a level point:
    /// its six weighted terms (see `two_level_moments`).
    #[inline(always)]
    fn pair_terms(&self, q: usize, lv: &LevelTerms) -> [f64; 6] {
        let LevelTerms { var_mu, p00, pt, known, ph, yh } = *lv;
        let (kprec, delta, var_delta, w) = (self.pair_prec[q], self.pair_delta[q], self.pair_var_delta[q], self.pair_weight[q]);
        // Posterior covariance of (θ, λ): the inverse of the precision
        // [[1/τ² + 1/v' + 1/v, 1/v], [1/v, 1/ω² + 1/v]].
        let p11 = kprec + ph;
        let inv = 1.0 / (p00 * p11 - ph * ph);
        let (s00, s01, s11) = (p11 * inv, -ph * inv, p00 * inv);
        let r = yh - delta;
        let (b0, b1) = (known + r * ph, r * ph);
        let (m0, m1) = (s00 * b0 + s01 * b1, s01 * b0 + s11 * b1);
        // Sensitivities to δ and μ (for their estimation variance).
        let (dd0, dd1) = (-(s00 + s01) * ph, -(s01 + s11) * ph);
        let (dm0, dm1) = (s00 * pt, s01 * pt);
        let lift_m = delta + m1;
        let lift_v = s11 + (1.0 + dd1) * (1.0 + dd1) * var_delta + dm1 * dm1 * var_mu;
        let val_m = m0 + delta + m1;
        let val_v = s00 + 2.0 * s01 + s11 + (1.0 + dd0 + dd1) * (1.0 + dd0 + dd1) * var_delta + (dm0 + dm1) * (dm0 + dm1) * var_mu;
        let lev_v = s00 + dd0 * dd0 * var_delta + dm0 * dm0 * var_mu;
        [w * val_m, w * (val_v + val_m * val_m), w * m0, w * (lev_v + m0 * m0), w * lift_m, w * (lift_v + lift_m * lift_m)]
    }

    /// The grid moments without a lift model (λ fixed at 0): one pair per
    /// level point. As `two_level_moments`.
    fn one_level_moments(&self, per: &[[f64; 3]], d: [f64; 4]) -> [f64; 6] {
        let [pv, yv, ph, yh] = d;
        let mut acc = [0.0f64; 6];
        for &(i, _, w) in &self.pairs {
            let [mu, var_mu, p00] = per[i as usize];
            let pt = self.level[i as usize].prec;
            let (delta, var_delta) = (0.0, 0.0);
            let (s00, s01, s11) = (1.0 / p00, 0.0, 0.0);
            let r = yh - delta;
            let (b0, b1) = (mu * pt + yv * pv + r * ph, r * ph);
            let (m0, m1) = (s00 * b0 + s01 * b1, s01 * b0 + s11 * b1);
            let (dd0, dd1) = (-(s00 + s01) * ph, -(s01 + s11) * ph);
            let (dm0, dm1) = (s00 * pt, s01 * pt);
            let lift_m = delta + m1;
            let lift_v = s11 + (1.0 + dd1).powi(2) * var_delta + dm1 * dm1 * var_mu;
            let val_m = m0 + delta + m1;
            let val_v = s00 + 2.0 * s01 + s11 + (1.0 + dd0 + dd1).powi(2) * var_delta + (dm0 + dm1).powi(2) * var_mu;
            let lev_v = s00 + dd0 * dd0 * var_delta + dm0 * dm0 * var_mu;
            acc[0] += w * val_m;
            acc[1] += w * (val_v + val_m * val_m);
            acc[2] += w * m0;
            acc[3] += w * (lev_v + m0 * m0);
            acc[4] += w * lift_m;
            acc[5] += w * (lift_v + lift_m * lift_m);
        }
        acc
    }
}

/// The standard normal quantile `z` with `P(|Z| < z) = level`; the last
/// level asked on this thread is remembered (tables ask one level thousands
/// of times).
fn z_for(level: f64) -> Option<f64> {
    thread_local!(static LAST: std::cell::Cell<(f64, f64)> = const { std::cell::Cell::new((f64::NAN, f64::NAN)) });
    let (l, z) = LAST.with(|c| c.get());
    if l == level {
        return Some(z);
    }
    let z = Normal::new(0.0, 1.0).ok()?.inverse_cdf(0.5 + level / 2.0);
    LAST.with(|c| c.set((level, z)));
    Some(z)
}

/// Two-sided normal interval at `level` (e.g. 0.90) around `mean` with
/// variance `var`; `None` when the variance is not positive or not finite.
pub fn normal_interval(mean: f64, var: f64, level: f64) -> Option<(f64, f64)> {
    if !finite(&[mean, var]) || var <= 0.0 {
        return None;
    }
    let z = z_for(level)?;
    let sd = var.sqrt();
    Some((mean - z * sd, mean + z * sd))
}

/// `P(X > threshold)` for `X ~ N(mean, var)`; `None` when the variance is not
/// positive or an input is not finite.
pub fn prob_above(mean: f64, var: f64, threshold: f64) -> Option<f64> {
    if !finite(&[mean, var, threshold]) || var <= 0.0 {
        return None;
    }
    Some(1.0 - Normal::new(mean, var.sqrt()).ok()?.cdf(threshold))
}

#[cfg(test)]
mod tests;
