//! Crossed random effects fitted on per-(unit, group) sums: each value is an
//! intercept per block plus a unit effect plus a group effect plus noise
//! (here a passer-season, a defense-season, and a season). Variances by
//! penalized REML; group effects and their covariance for opponent adjustment.
//!
//! The model, for snap `k` of unit `i` against group `j` in block `s` (each
//! unit and each group belongs to one block):
//!
//! ```text
//! y = μ_s + a_i + b_j + e,   a_i ~ N(0, σa²),  b_j ~ N(0, σb²),  e ~ N(0, σe²)
//! ```
//!
//! With `γa = σa²/σe²`, `γb = σb²/σe²`, the restricted log-likelihood is
//! evaluated through Henderson's mixed-model equations on the sums (counts,
//! sums, sums of squares per cell): per block, the unit effects are absorbed
//! (their block of the equations is diagonal), leaving a system of one
//! intercept plus the block's groups, solved by Cholesky. Then
//! `−2ℓ_R = Σ_s [P_s log γa + D_s log γb + Σ_i log(n_i + 1/γa) + log|A_s|]
//! + (N − S) log σe² + Q/σe²`, `Q = yᵀy − θ̂ᵀ(right-hand side)` (Henderson 1984,
//! "Applications of linear models in animal breeding", ch. 5; Harville 1977,
//! JASA 72(358), for REML). Blocks are independent given the variances, so the
//! work per evaluation is linear in the cells plus one small Cholesky per block.
//!
//! Each SD carries the boundary-avoiding penalty `log σ` (the gamma(2, λ→0)
//! prior of Chung, Rabe-Hesketh, Dorie, Gelman & Liu 2013, Psychometrika
//! 78(4)), maximised jointly with the likelihood (their penalized estimate,
//! not a grid average): neither SD is ever exactly 0. `σe²` profiles out in
//! closed form, `Q/(N − S − 2)` with the penalty; the two ratios are found
//! by Nelder–Mead on their logs. Without the penalty the estimate is plain
//! REML (checked against statsmodels' MixedLM in the tests).

use nalgebra::{DMatrix, DVector};
use std::collections::HashMap;

/// The sums of one (unit, group) cell in a block.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CrossedCell {
    pub block: u32,
    pub unit: u32,
    pub group: u32,
    pub n: f64,
    pub sum: f64,
    pub sumsq: f64,
}

/// Why a crossed model could not be fitted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CrossedError {
    #[error("too little data: {units} units, {groups} groups and {snaps} values (need 2 units, 2 groups and more values than blocks + 2)")]
    TooLittle { units: usize, groups: usize, snaps: f64 },
    #[error("a cell has a non-finite sum or a count below 1")]
    BadCell,
    #[error("{what} {id} appears in blocks {a} and {b}; each must belong to one block")]
    TwoBlocks { what: &'static str, id: u32, a: u32, b: u32 },
    #[error("the fit did not converge to a finite likelihood")]
    NoFit,
}

/// One block's data with dense local ids.
#[derive(Debug, Clone)]
struct Block {
    id: u32,
    groups: Vec<u32>,
    n: f64,
    sum: f64,
    sumsq: f64,
    /// Per local group: count and sum.
    group_n: Vec<f64>,
    group_sum: Vec<f64>,
    /// Per unit: its id, count, sum, and its cells (local group, count).
    units: Vec<(u32, f64, f64, Vec<(usize, f64)>)>,
}

/// What one evaluation at `(γa, γb)` gives for a block.
struct Solved {
    /// Log-determinant terms (without the σe² term).
    logdet: f64,
    q: f64,
    theta: DVector<f64>,
    chol: nalgebra::Cholesky<f64, nalgebra::Dyn>,
}

impl Block {
    fn solve(&self, ga: f64, gb: f64) -> Option<Solved> {
        let d = self.groups.len();
        let mut a = DMatrix::<f64>::zeros(d + 1, d + 1);
        let mut r = DVector::<f64>::zeros(d + 1);
        a[(0, 0)] = self.n;
        r[0] = self.sum;
        for j in 0..d {
            a[(0, j + 1)] = self.group_n[j];
            a[(j + 1, 0)] = self.group_n[j];
            a[(j + 1, j + 1)] = self.group_n[j] + 1.0 / gb;
            r[j + 1] = self.group_sum[j];
        }
        let mut logdet = self.units.len() as f64 * ga.ln() + d as f64 * gb.ln();
        // Absorb each unit: A −= u uᵀ / (n_i + 1/γa), r −= u S_i / (n_i + 1/γa),
        // u = (n_i, n_i1, …, n_iD).
        let mut u: Vec<(usize, f64)> = Vec::new();
        for (_, ni, si, cells) in &self.units {
            let di = ni + 1.0 / ga;
            logdet += di.ln();
            u.clear();
            u.push((0, *ni));
            u.extend(cells.iter().map(|&(j, n)| (j + 1, n)));
            let m = d + 1;
            let cols = a.as_mut_slice();
            for &(p, x) in &u {
                r[p] -= x * si / di;
                let xd = x / di;
                for &(q, y) in &u {
                    cols[q * m + p] -= xd * y;
                }
            }
        }
        let chol = a.cholesky()?;
        let theta = chol.solve(&r);
        logdet += 2.0 * chol.l().diagonal().iter().map(|x| x.ln()).sum::<f64>();
        // Q = yᵀy − θ̂ᵀ r_full: the intercept and groups, then each unit's â_i S_i.
        let mut q = self.sumsq - theta[0] * self.sum - (0..d).map(|j| theta[j + 1] * self.group_sum[j]).sum::<f64>();
        for (_, ni, si, cells) in &self.units {
            let fit = theta[0] * ni + cells.iter().map(|&(j, n)| theta[j + 1] * n).sum::<f64>();
            q -= (si - fit) / (ni + 1.0 / ga) * si;
        }
        (logdet.is_finite() && q.is_finite()).then_some(Solved { logdet, q, theta, chol })
    }
}

/// A fitted crossed model.
#[derive(Debug, Clone)]
pub struct CrossedFit {
    pub sd_unit: f64,
    pub sd_group: f64,
    pub sd_resid: f64,
    /// Per block: its intercept.
    pub intercepts: Vec<(u32, f64)>,
    /// Group → (block number, local index).
    where_group: HashMap<u32, (usize, usize)>,
    /// Per block: group effects (conditional modes) and their posterior
    /// covariance (the REML variances taken as known; intercept integrated).
    effects: Vec<DVector<f64>>,
    cov: Vec<DMatrix<f64>>,
}

/// −2 × the (penalized) restricted log-likelihood at log ratios `lg`, with σe².
fn objective(blocks: &[Block], lg: [f64; 2], n: f64, penalty: bool) -> Option<(f64, f64)> {
    let (ga, gb) = (lg[0].exp(), lg[1].exp());
    let (mut det, mut q) = (0.0, 0.0);
    for b in blocks {
        let s = b.solve(ga, gb)?;
        det += s.logdet;
        q += s.q;
    }
    let k = n - blocks.len() as f64 - if penalty { 2.0 } else { 0.0 };
    if q <= 0.0 || k <= 0.0 {
        return None;
    }
    let s2 = q / k;
    let pen = if penalty { lg[0] + lg[1] } else { 0.0 };
    Some((det + k * s2.ln() + q / s2 - pen, s2))
}

/// Bounds on the log variance ratios searched.
const LOG_LO: f64 = -30.0;
const LOG_HI: f64 = 8.0;

/// Nelder–Mead on a function of two variables (standard coefficients:
/// reflection 1, expansion 2, contraction ½, shrink ½), within `LOG_LO..LOG_HI`.
fn nelder_mead(f: &dyn Fn([f64; 2]) -> f64, start: [f64; 2], step: f64) -> [f64; 2] {
    let clamp = |x: [f64; 2]| [x[0].clamp(LOG_LO, LOG_HI), x[1].clamp(LOG_LO, LOG_HI)];
    let mut s: Vec<([f64; 2], f64)> =
        [start, [start[0] + step, start[1]], [start[0], start[1] + step]].into_iter().map(|x| (clamp(x), f(clamp(x)))).collect();
    for _ in 0..400 {
        s.sort_by(|a, b| a.1.total_cmp(&b.1));
        let spread = (s[2].1 - s[0].1).abs();
        let size = s.iter().map(|p| (p.0[0] - s[0].0[0]).abs().max((p.0[1] - s[0].0[1]).abs())).fold(0.0, f64::max);
        if spread < 1e-7 && size < 1e-3 {
            break;
        }
        let c = [(s[0].0[0] + s[1].0[0]) / 2.0, (s[0].0[1] + s[1].0[1]) / 2.0];
        let worst = s[2].0;
        let at = |t: f64| clamp([c[0] + t * (worst[0] - c[0]), c[1] + t * (worst[1] - c[1])]);
        let xr = at(-1.0);
        let fr = f(xr);
        if fr < s[0].1 {
            let xe = at(-2.0);
            let fe = f(xe);
            s[2] = if fe < fr { (xe, fe) } else { (xr, fr) };
        } else if fr < s[1].1 {
            s[2] = (xr, fr);
        } else {
            let xc = if fr < s[2].1 { at(-0.5) } else { at(0.5) };
            let fc = f(xc);
            if fc < s[2].1.min(fr) {
                s[2] = (xc, fc);
            } else {
                let best = s[0].0;
                for p in s.iter_mut().skip(1) {
                    p.0 = [(p.0[0] + best[0]) / 2.0, (p.0[1] + best[1]) / 2.0];
                    p.1 = f(p.0);
                }
            }
        }
    }
    s.sort_by(|a, b| a.1.total_cmp(&b.1));
    s[0].0
}

fn blocks_of(cells: &[CrossedCell]) -> Result<Vec<Block>, CrossedError> {
    let mut unit_block: HashMap<u32, u32> = HashMap::new();
    let mut group_block: HashMap<u32, u32> = HashMap::new();
    for c in cells {
        if !(c.n >= 1.0 && c.sum.is_finite() && c.sumsq.is_finite()) {
            return Err(CrossedError::BadCell);
        }
        for (what, id, map) in [("unit", c.unit, &mut unit_block), ("group", c.group, &mut group_block)] {
            let b = *map.entry(id).or_insert(c.block);
            if b != c.block {
                return Err(CrossedError::TwoBlocks { what, id, a: b, b: c.block });
            }
        }
    }
    let mut sorted: Vec<&CrossedCell> = cells.iter().collect();
    sorted.sort_by_key(|c| (c.block, c.unit, c.group));
    let mut blocks: Vec<Block> = Vec::new();
    for c in sorted {
        if blocks.last().is_none_or(|b| b.id != c.block) {
            let mut groups: Vec<u32> = cells.iter().filter(|x| x.block == c.block).map(|x| x.group).collect();
            groups.sort_unstable();
            groups.dedup();
            let d = groups.len();
            blocks.push(Block { id: c.block, groups, n: 0.0, sum: 0.0, sumsq: 0.0, group_n: vec![0.0; d], group_sum: vec![0.0; d], units: Vec::new() });
        }
        let b = blocks.last_mut().ok_or(CrossedError::BadCell)?;
        let j = b.groups.binary_search(&c.group).map_err(|_| CrossedError::BadCell)?;
        b.n += c.n;
        b.sum += c.sum;
        b.sumsq += c.sumsq;
        b.group_n[j] += c.n;
        b.group_sum[j] += c.sum;
        // Cells arrive sorted by unit within a block.
        match b.units.last_mut() {
            Some(u) if u.0 == c.unit => {
                u.1 += c.n;
                u.2 += c.sum;
                u.3.push((j, c.n));
            }
            _ => b.units.push((c.unit, c.n, c.sum, vec![(j, c.n)])),
        }
    }
    Ok(blocks)
}

impl CrossedFit {
    /// Fit the model on `cells`; `penalty` adds Chung et al.'s `log σ` for
    /// both SDs (use it; without it, plain REML, which may put an SD at 0).
    pub fn fit(cells: &[CrossedCell], penalty: bool) -> Result<CrossedFit, CrossedError> {
        let blocks = blocks_of(cells)?;
        let units: usize = blocks.iter().map(|b| b.units.len()).sum();
        let groups: usize = blocks.iter().map(|b| b.groups.len()).sum();
        let n: f64 = blocks.iter().map(|b| b.n).sum();
        if units < 2 || groups < 2 || n <= blocks.len() as f64 + 2.0 {
            return Err(CrossedError::TooLittle { units, groups, snaps: n });
        }
        let f = |lg: [f64; 2]| objective(&blocks, lg, n, penalty).map_or(f64::INFINITY, |x| x.0);
        // Start from a coarse grid of ratios (e^-9 .. e^-1), then refine.
        let mut start = ([0.0f64; 2], f64::INFINITY);
        for a in [-9.0, -5.0, -1.0] {
            for b in [-9.0, -5.0, -1.0] {
                let v = f([a, b]);
                if v < start.1 {
                    start = ([a, b], v);
                }
            }
        }
        if !start.1.is_finite() {
            return Err(CrossedError::NoFit);
        }
        let lg = nelder_mead(&f, start.0, 1.5);
        let (_, s2) = objective(&blocks, lg, n, penalty).ok_or(CrossedError::NoFit)?;
        let (ga, gb) = (lg[0].exp(), lg[1].exp());
        let mut fit = CrossedFit {
            sd_unit: (ga * s2).sqrt(),
            sd_group: (gb * s2).sqrt(),
            sd_resid: s2.sqrt(),
            intercepts: Vec::new(),
            where_group: HashMap::new(),
            effects: Vec::new(),
            cov: Vec::new(),
        };
        for (k, b) in blocks.iter().enumerate() {
            let s = b.solve(ga, gb).ok_or(CrossedError::NoFit)?;
            let d = b.groups.len();
            // Posterior covariance of (μ, b): σe² A⁻¹; keep the groups' part.
            let inv = s.chol.inverse() * s2;
            fit.intercepts.push((b.id, s.theta[0]));
            fit.effects.push(s.theta.rows(1, d).into_owned());
            fit.cov.push(inv.view((1, 1), (d, d)).into_owned());
            for (j, &g) in b.groups.iter().enumerate() {
                fit.where_group.insert(g, (k, j));
            }
        }
        Ok(fit)
    }

    /// The conditional mode of group `g`'s effect.
    pub fn group_effect(&self, g: u32) -> Option<f64> {
        let &(k, j) = self.where_group.get(&g)?;
        Some(self.effects[k][j])
    }

    /// The weighted sum `Σ w_g b_g` of group effects and its posterior
    /// variance (groups in different blocks are independent). `None` when a
    /// group is unknown.
    pub fn weighted(&self, weights: &[(u32, f64)]) -> Option<(f64, f64)> {
        let mut per: std::collections::BTreeMap<usize, Vec<(usize, f64)>> = Default::default();
        let mut mean = 0.0;
        for &(g, w) in weights {
            let &(k, j) = self.where_group.get(&g)?;
            mean += w * self.effects[k][j];
            per.entry(k).or_default().push((j, w));
        }
        let mut var = 0.0;
        for (k, ws) in per {
            let c = &self.cov[k];
            for &(i, wi) in &ws {
                for &(j, wj) in &ws {
                    var += wi * wj * c[(i, j)];
                }
            }
        }
        Some((mean, var.max(0.0)))
    }
}

#[cfg(test)]
mod tests;
