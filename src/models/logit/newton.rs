//! Newton iterations with step halving, the L2 penalty, and the solve.

use super::pass::{accumulate_par, Acc, Problem};
use super::*;

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
    let dim = m * p;
    let np = m * (m + 1) / 2;
    let same = rows.len() == hess_rows.len();
    let pass = |coef: &[Vec<f64>]| -> (Acc, Acc) {
        let full = accumulate_par(pr, coef, rows, same, threads);
        if same {
            let h = Acc {
                weight: full.weight,
                ll: 0.0,
                grad: Vec::new(),
                hess: full.hess.clone(),
            };
            (full, h)
        } else {
            let h = accumulate_par(pr, coef, hess_rows, true, threads);
            (full, h)
        }
    };
    let (mut acc, mut hacc) = pass(&coef);
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
    loop {
        let g = penalized_grad(&acc, &coef);
        if iterations >= max_iter {
            break;
        }
        // Hessian of the negative penalized log-likelihood.
        let scale = if hacc.weight > 0.0 {
            acc.weight / hacc.weight
        } else {
            1.0
        };
        let mut h = DMatrix::<f64>::zeros(dim, dim);
        for a in 0..p {
            for b in a..p {
                let at = triangle_index(p, a, b) * np;
                let mut pi = 0;
                for j in 0..m {
                    for l in j..m {
                        let v = hacc.hess[at + pi] * scale;
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
        let step = solve_spd(h, &g)?;
        let decrement = g.dot(&step);
        if decrement.abs() < tol {
            converged = true;
            break;
        }
        let obj = acc.ll - penalty(&coef, l2);
        let mut t = 1.0;
        let mut accepted = false;
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
                accepted = true;
                break;
            }
            t *= 0.5;
        }
        iterations += 1;
        if !accepted {
            // No step improves the objective: at the optimum to rounding error.
            converged = decrement.abs() < tol.max(1e-6);
            break;
        }
        (acc, hacc) = pass(&coef);
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

/// Solve `h x = g` for symmetric positive definite `h` by Cholesky, adding a
/// growing ridge if rounding makes it indefinite.
pub(super) fn solve_spd(h: DMatrix<f64>, g: &DVector<f64>) -> Result<DVector<f64>, LogitError> {
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
            return Ok(ch.solve(g));
        }
        ridge = if ridge == 0.0 {
            scale * 1e-12
        } else {
            ridge * 100.0
        };
    }
    Err(LogitError::Singular(ridge))
}
