//! Logistic regression by Newton's method: binary (fractional labels allowed)
//! and multinomial (softmax against one reference class), optional row
//! weights, L2 penalty on every coefficient but the intercept (column 0).

use nalgebra::{DMatrix, DVector};
use serde::{Deserialize, Serialize};

mod design;
mod newton;
mod pass;
mod sums;
mod warm;

pub use design::{DenseDesign, Design, FnDesign};
use newton::*;
use pass::*;

/// What the fit is told: how hard to penalize and when to stop.
#[derive(Debug, Clone, Copy)]
pub struct FitOptions {
    /// L2 penalty `l2/2 * sum(beta^2)` over all coefficients except column 0,
    /// on the scale of the (weighted) summed log-likelihood.
    pub l2: f64,
    pub max_iter: usize,
    /// Stop when the Newton decrement `g' H^-1 g` (about twice the distance
    /// to the optimum in log-likelihood) falls below `tol` times the total
    /// weight of the rows. The default, 1e-10, moves no fitted
    /// probability by 1e-4 against a rule a thousand times tighter (on the
    /// 25-season league's EP fit by at most 8.2e-5; 1e-9 would save that
    /// fit a pass over every snap but moved a probability by 4.8e-4).
    pub tol: f64,
    /// Above twice this many rows, first fit on evenly spaced subsamples of
    /// about an eighth of this size and then this size, and start the full
    /// Newton iterations from there.
    pub warm_rows: usize,
    /// Above twice this many rows, sum the Hessian over an evenly spaced
    /// subsample of about this size (gradient and likelihood stay exact).
    pub hess_rows: usize,
    /// 1: the row loop runs on the calling thread; otherwise on rayon's
    /// threads in fixed chunks (the sums, and so the fit, are the same).
    pub threads: usize,
}

impl Default for FitOptions {
    fn default() -> Self {
        FitOptions {
            l2: 1.0,
            max_iter: 50,
            tol: 1e-10,
            warm_rows: 100_000,
            hess_rows: 200_000,
            threads: 0,
        }
    }
}

/// Labels: a probability per row for binary fits, a class per row for
/// multinomial fits.
#[derive(Clone, Copy)]
pub enum Labels<'a> {
    /// Target probability of the event (0, 1, or in between, e.g. 0.5 for a tie).
    Binary(&'a [f64]),
    /// Class index per row in `0..classes`.
    Classes {
        y: &'a [u8],
        classes: usize,
        reference: usize,
    },
}

impl Labels<'_> {
    fn n_classes(&self) -> usize {
        match self {
            Labels::Binary(_) => 2,
            Labels::Classes { classes, .. } => *classes,
        }
    }
    fn reference(&self) -> usize {
        match self {
            Labels::Binary(_) => 0,
            Labels::Classes { reference, .. } => *reference,
        }
    }
}

/// How a fit went.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct FitStats {
    pub rows: usize,
    pub features: usize,
    /// Newton iterations on the full data (warm-start iterations not counted).
    pub iterations: usize,
    pub warm_iterations: usize,
    pub converged: bool,
    /// Euclidean norm of the gradient of the penalized log-likelihood at the end.
    pub grad_norm: f64,
    /// Unpenalized (weighted) log-likelihood at the end.
    pub log_lik: f64,
    pub seconds: f64,
}

/// Fitted coefficients: one row per free class (every class seen in the
/// labels except the reference; binary: one row, the event).
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct Fit {
    pub classes: usize,
    pub reference: usize,
    /// The class of each coefficient row. Classes never seen in the labels
    /// have no row and probability 0.
    pub free: Vec<usize>,
    /// `free.len() x features`.
    pub coef: Vec<Vec<f64>>,
    pub stats: FitStats,
}

impl Fit {
    /// Class probabilities for one feature row, written into `out` (length `classes`).
    pub fn probs(&self, x: &[f64], out: &mut [f64]) {
        softmax_row(&self.coef, &self.free, self.reference, x, out);
    }
    /// Event probability of a binary fit.
    pub fn prob(&self, x: &[f64]) -> f64 {
        match self.coef.first() {
            Some(c) => sigmoid(dot(c, x)),
            None => 0.0,
        }
    }
}

pub fn sigmoid(z: f64) -> f64 {
    if z >= 0.0 {
        1.0 / (1.0 + (-z).exp())
    } else {
        let e = z.exp();
        e / (1.0 + e)
    }
}


/// Most classes a multinomial fit takes.
pub const MAX_CLASSES: usize = 16;

/// Errors a fit can end in.
#[derive(Debug, thiserror::Error)]
pub enum LogitError {
    #[error("no rows to fit")]
    Empty,
    #[error("labels: {0} rows, design: {1} rows")]
    Length(usize, usize),
    #[error("label {value} on row {row} is outside {what}")]
    BadLabel {
        row: usize,
        value: f64,
        what: &'static str,
    },
    #[error("no row has the reference class {0}")]
    NoReference(usize),
    #[error("the Hessian is not positive definite even after a ridge of {0:e}")]
    Singular(f64),
    #[error("coefficients went non-finite at iteration {0}")]
    NonFinite(usize),
}

/// Check labels and weights; return the total weight of each class.
fn check_labels(
    design: &dyn Design,
    labels: Labels,
    weights: Option<&[f64]>,
) -> Result<Vec<f64>, LogitError> {
    let n = design.rows();
    if n == 0 {
        return Err(LogitError::Empty);
    }
    let len = match labels {
        Labels::Binary(y) => y.len(),
        Labels::Classes { y, .. } => y.len(),
    };
    if len != n {
        return Err(LogitError::Length(len, n));
    }
    if let Some(w) = weights {
        if w.len() != n {
            return Err(LogitError::Length(w.len(), n));
        }
        if let Some((row, &v)) = w
            .iter()
            .enumerate()
            .find(|(_, v)| !(v.is_finite() && **v >= 0.0))
        {
            return Err(LogitError::BadLabel {
                row,
                value: v,
                what: "weights >= 0",
            });
        }
    }
    let wt = |i: usize| weights.map_or(1.0, |w| w[i]);
    match labels {
        Labels::Binary(y) => {
            if let Some((row, &v)) = y
                .iter()
                .enumerate()
                .find(|(_, v)| !(**v >= 0.0 && **v <= 1.0))
            {
                return Err(LogitError::BadLabel {
                    row,
                    value: v,
                    what: "[0, 1]",
                });
            }
            let mut tot = vec![0.0; 2];
            for (i, &v) in y.iter().enumerate() {
                tot[1] += wt(i) * v;
                tot[0] += wt(i) * (1.0 - v);
            }
            Ok(tot)
        }
        Labels::Classes {
            y,
            classes,
            reference,
        } => {
            if reference >= classes || !(2..=MAX_CLASSES).contains(&classes) {
                return Err(LogitError::BadLabel {
                    row: 0,
                    value: reference as f64,
                    what: "the class list",
                });
            }
            let mut tot = vec![0.0; classes];
            for (row, &v) in y.iter().enumerate() {
                if v as usize >= classes {
                    return Err(LogitError::BadLabel {
                        row,
                        value: v as f64,
                        what: "the class list",
                    });
                }
                tot[v as usize] += wt(row);
            }
            Ok(tot)
        }
    }
}

/// Fit by Newton's method with step halving. Binary labels give a fit with
/// `classes == 2`, reference 0 and one coefficient row (the event).
///
/// Large fits: Newton on an evenly spaced subsample of `warm_rows` first;
/// then on all rows, with the exact gradient and log-likelihood every
/// iteration and the Hessian summed over an evenly spaced subsample of
/// `hess_rows` (scaled to the full weight), a subsampled Newton method whose
/// fixed point is the exact maximum. `grad_norm` is exact.
pub fn fit(
    design: &dyn Design,
    labels: Labels,
    weights: Option<&[f64]>,
    opts: &FitOptions,
) -> Result<Fit, LogitError> {
    fit_from(design, labels, weights, opts, None)
}

/// `fit` starting from the coefficients of `init` (a fit of the same model
/// on related rows) when its classes and columns match; the subsample warm
/// start is then skipped.
pub fn fit_from(
    design: &dyn Design,
    labels: Labels,
    weights: Option<&[f64]>,
    opts: &FitOptions,
    init: Option<&Fit>,
) -> Result<Fit, LogitError> {
    let started = std::time::Instant::now();
    let totals = check_labels(design, labels, weights)?;
    let n = design.rows();
    let p = design.cols();
    let k = labels.n_classes();
    let reference = labels.reference();
    if totals[reference] <= 0.0 {
        return Err(LogitError::NoReference(reference));
    }
    let free: Vec<usize> = (0..k)
        .filter(|&c| c != reference && totals[c] > 0.0)
        .collect();
    let pr = Problem {
        design,
        labels,
        weights,
        free: &free,
        reference,
        classes: k,
    };
    let threads = if opts.threads == 0 {
        std::thread::available_parallelism().map_or(1, |t| t.get())
    } else {
        opts.threads
    };
    // Start at the intercept-only optimum: log odds of each class against the reference.
    let mut coef: Vec<Vec<f64>> = free
        .iter()
        .map(|&c| {
            let mut row = vec![0.0; p];
            row[0] = (totals[c] / totals[reference]).ln();
            row
        })
        .collect();
    let mut warm_iterations = 0;
    let usable = init.filter(|f| {
        f.free == free && f.reference == reference && f.coef.iter().all(|r| r.len() == p)
    });
    if let Some(f) = usable {
        coef = f.coef.clone();
    } else if !free.is_empty() && opts.warm_rows > 0 && n > 2 * opts.warm_rows {
        // Two warm levels: an eighth of `warm_rows` from the intercept-only
        // start (the many early Newton steps are cheap there), then
        // `warm_rows` (with every row of a rare class) from its answer. The small level only proposes a
        // start: if it fails (a rare class missing from it, say), the next
        // level starts where it would have.
        let sub = |level: usize| -> Vec<usize> { (0..n).step_by(n / level).collect() };
        let small = sub(opts.warm_rows / 8);
        if opts.warm_rows / 8 >= 1000 {
            let l2 = opts.l2 * small.len() as f64 / n as f64;
            if let Ok(r) = newton(pr, &small, &small, coef.clone(), l2, opts.max_iter, opts.tol * 1e3, threads) {
                if r.converged {
                    coef = r.coef;
                    warm_iterations += r.iterations;
                }
            }
        }
        // The larger level keeps every row of a rare class (`warm`).
        let lv = warm::level(n, opts.warm_rows, labels, weights, &totals, opts.l2, true);
        let warm_pr = Problem { weights: lv.weights.as_deref().or(weights), ..pr };
        let r = newton(
            warm_pr,
            &lv.rows,
            &lv.rows,
            coef,
            lv.l2,
            opts.max_iter,
            opts.tol * 1e3,
            threads,
        )?;
        coef = r.coef;
        warm_iterations += r.iterations;
    }
    let all: Vec<usize> = (0..n).collect();
    let hess_rows: Vec<usize> = if opts.hess_rows > 0 && n > 2 * opts.hess_rows {
        (0..n).step_by(n / opts.hess_rows).collect()
    } else {
        all.clone()
    };
    let r = if free.is_empty() {
        let acc = accumulate_par(pr, &coef, &all, false, threads);
        NewtonOut {
            coef,
            iterations: 0,
            converged: true,
            grad_norm: 0.0,
            log_lik: acc.ll,
        }
    } else {
        newton(
            pr,
            &all,
            &hess_rows,
            coef,
            opts.l2,
            opts.max_iter,
            opts.tol,
            threads,
        )?
    };
    Ok(Fit {
        classes: k,
        reference,
        free: free.clone(),
        coef: r.coef,
        stats: FitStats {
            rows: n,
            features: p,
            iterations: r.iterations,
            warm_iterations,
            converged: r.converged,
            grad_norm: r.grad_norm,
            log_lik: r.log_lik,
            seconds: started.elapsed().as_secs_f64(),
        },
    })
}

#[cfg(test)]
mod tests;
