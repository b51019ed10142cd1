//! Newton iterations with step halving, the L2 penalty, and the solve.

use super::pass::{accumulate_par, Acc, Problem};
use super::*;
use nalgebra::{Cholesky, Dyn};

pub(super) fn penalty(coef: &[Vec<f64>], l2: f64) -> f64 {
    coef.iter()
        .map(|r| r[1..].iter().map(|b| b * b).sum::<f64>())
        .sum::<f64>()
        * l2
        / 2.0
}

pub(super) struct NewtonOut {
    pub(super) coef: Vec<Vec<f64>>,
    pub(super) iterations: usize,
    pub(super) converged: bool,
    pub(super) grad_norm: f64,
    pub(super) log_lik: f64,
}

/// Newton iterations with step halving on `rows`; the Hessian is summed over
/// `hess_rows` (a subset of `rows`, or all of them) and scaled up.
#[allow(clippy::too_many_arguments)]
pub(super) fn newton(
    pr: Problem,
    rows: &[usize],
    hess_rows: &[usize],
    mut coef: Vec<Vec<f64>>,
    l2: f64,
    max_iter: usize,
    tol: f64,
    threads: usize,
) -> Result<NewtonOut, LogitError> {
    let p = pr.design.cols();
    let m = coef.len();
    // The Hessian is the costly part of a pass; it is summed again unless
    // the last step was a full one and cut the Newton decrement below
    // `REUSE_RATE` times the one before (Newton's fast phase, where the
    // Hessian hardly changes). A kept Hessian changes the path, not the
    // fixed point, and the stopping rule is the same.
    let mut acc = accumulate_par(pr, &coef, rows, false, threads);
    let mut iterations = 0;
    let mut converged = false;
    let tol = tol * acc.weight.max(1.0);
    let penalized_grad = |acc: &Acc, coef: &[Vec<f64>]| -> DVector<f64> {
        let mut g = DVector::from_column_slice(&acc.grad);
        for j in 0..m {
            for a in 1..p {
                g[j * p + a] -= l2 * coef[j][a];
            }
        }
        g
    };
    let mut chol: Option<Cholesky<f64, Dyn>> = None;
    // The factor given up for a fresh one, and whether the last step was a
    // full one from a decrement within NEAR_END of the stopping rule.
    let mut kept: Option<Cholesky<f64, Dyn>> = None;
    let mut near_end = false;
    // 0: the first step's Hessian is not reused for the second.
    let mut last_decrement = 0.0;
    loop {
        let g = penalized_grad(&acc, &coef);
        if iterations >= max_iter {
            break;
        }
        let fresh = chol.is_none();
        if fresh {
            // Near the end, the Hessian kept from the last full step
            // measures the decrement well enough to stop on (it cut the
            // decrement to a small fraction last step): a fresh one is
            // summed only to step again.
            if let Some(old) = kept.as_ref().filter(|_| near_end) {
                let d = g.dot(&old.solve(&g));
                if d.abs() < tol {
                    tracing::debug!(rows = rows.len(), iterations, decrement = d, "newton stops on the kept Hessian");
                    converged = true;
                    break;
                }
            }
            let h_acc = accumulate_par(pr, &coef, hess_rows, true, threads);
            let scale = if h_acc.weight > 0.0 { acc.weight / h_acc.weight } else { 1.0 };
            chol = Some(factor_spd(assemble(&h_acc.hess, scale, p, m, l2))?);
        }
        let step = match &chol {
            Some(c) => c.solve(&g),
            None => return Err(LogitError::Singular(0.0)),
        };
        let decrement = g.dot(&step);
        tracing::debug!(rows = rows.len(), iterations, decrement, fresh, "newton step");
        if decrement.abs() < tol {
            converged = true;
            break;
        }
        let obj = acc.ll - penalty(&coef, l2);
        let mut t = 1.0;
        let mut accepted = None;
        for _ in 0..40 {
            let trial: Vec<Vec<f64>> = (0..m)
                .map(|j| (0..p).map(|a| coef[j][a] + t * step[j * p + a]).collect())
                .collect();
            if trial.iter().flatten().any(|v| !v.is_finite()) {
                return Err(LogitError::NonFinite(iterations));
            }
            let trial_acc = accumulate_par(pr, &trial, rows, false, threads);
            let trial_obj = trial_acc.ll - penalty(&trial, l2);
            if trial_obj >= obj - 1e-12 * obj.abs() {
                coef = trial;
                accepted = Some(trial_acc);
                break;
            }
            t *= 0.5;
        }
        iterations += 1;
        tracing::debug!(rows = rows.len(), iterations, t, "newton step taken");
        let Some(next) = accepted else {
            if !fresh {
                // Try again with the Hessian at this point.
                chol = None;
                near_end = false;
                continue;
            }
            // No step improves the objective: at the optimum to rounding error.
            converged = decrement.abs() < tol.max(1e-6);
            break;
        };
        // The trial pass already summed the gradient and likelihood here.
        acc = next;
        near_end = t == 1.0 && decrement < NEAR_END * tol;
        if t < 1.0 || decrement > REUSE_RATE * last_decrement {
            kept = chol.take();
        }
        last_decrement = decrement;
    }
    let g = penalized_grad(&acc, &coef);
    Ok(NewtonOut {
        coef,
        iterations,
        converged,
        grad_norm: g.norm(),
        log_lik: acc.ll,
    })
}

/// A Hessian given up after a full step from a decrement below this many
/// times the stopping rule may still end the iterations (`newton`).
const NEAR_END: f64 = 1e3;

/// A reused Hessian must have cut the Newton decrement at least this much
/// per step; otherwise it is summed again.
const REUSE_RATE: f64 = 0.01;

/// The Hessian of the negative penalized log-likelihood from a pass's
/// triangle of sums (scaled by `scale` to the full weight) and the L2 term.
fn assemble(hess: &[f64], scale: f64, p: usize, m: usize, l2: f64) -> DMatrix<f64> {
    let dim = m * p;
    let np = m * (m + 1) / 2;
    let mut h = DMatrix::<f64>::zeros(dim, dim);
    for a in 0..p {
        for b in a..p {
            let at = triangle_index(p, a, b) * np;
            let mut pi = 0;
            for j in 0..m {
                for l in j..m {
                    let v = hess[at + pi] * scale;
                    pi += 1;
                    h[(j * p + a, l * p + b)] = v;
                    h[(j * p + b, l * p + a)] = v;
                    h[(l * p + a, j * p + b)] = v;
                    h[(l * p + b, j * p + a)] = v;
                }
            }
        }
    }
    for j in 0..m {
        for a in 1..p {
            h[(j * p + a, j * p + a)] += l2;
        }
    }
    h
}

/// Cholesky factor of symmetric positive definite `h`, adding a growing
/// ridge if rounding makes it indefinite.
pub(super) fn factor_spd(h: DMatrix<f64>) -> Result<Cholesky<f64, Dyn>, LogitError> {
    let dim = h.nrows();
    let scale = (0..dim)
        .map(|i| h[(i, i)].abs())
        .fold(0.0, f64::max)
        .max(1e-300);
    let mut ridge = 0.0;
    for _ in 0..12 {
        let mut hr = h.clone();
        for i in 0..dim {
            hr[(i, i)] += ridge;
        }
        if let Some(ch) = hr.cholesky() {
            return Ok(ch);
        }
        ridge = if ridge == 0.0 {
            scale * 1e-12
        } else {
            ridge * 100.0
        };
    }
    Err(LogitError::Singular(ridge))
}
