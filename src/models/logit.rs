//! Logistic regression by Newton's method: binary (fractional labels allowed)
//! and multinomial (softmax against one reference class), optional row
//! weights, L2 penalty on every coefficient but the intercept (column 0).

use nalgebra::{DMatrix, DVector};
use serde::{Deserialize, Serialize};

/// A design matrix that fills one row at a time, so a million-row fit never
/// holds the whole matrix. Column 0 must be the intercept (always 1).
pub trait Design: Sync {
    fn rows(&self) -> usize;
    fn cols(&self) -> usize;
    /// Write row `i` into `out` (length `cols()`).
    fn fill(&self, i: usize, out: &mut [f64]);
}

/// A design held densely, row-major (tests and small fits).
pub struct DenseDesign {
    pub n: usize,
    pub p: usize,
    pub data: Vec<f64>,
}

impl Design for DenseDesign {
    fn rows(&self) -> usize {
        self.n
    }
    fn cols(&self) -> usize {
        self.p
    }
    fn fill(&self, i: usize, out: &mut [f64]) {
        out.copy_from_slice(&self.data[i * self.p..(i + 1) * self.p]);
    }
}

/// A design built from a feature function over a list of source rows.
pub struct FnDesign<'a, F: Fn(usize, &mut [f64]) + Sync> {
    pub rows: &'a [u32],
    pub p: usize,
    pub f: F,
}

impl<F: Fn(usize, &mut [f64]) + Sync> Design for FnDesign<'_, F> {
    fn rows(&self) -> usize {
        self.rows.len()
    }
    fn cols(&self) -> usize {
        self.p
    }
    fn fill(&self, i: usize, out: &mut [f64]) {
        (self.f)(self.rows[i] as usize, out)
    }
}

/// What the fit is told: how hard to penalize and when to stop.
#[derive(Debug, Clone, Copy)]
pub struct FitOptions {
    /// L2 penalty `l2/2 * sum(beta^2)` over all coefficients except column 0,
    /// on the scale of the (weighted) summed log-likelihood.
    pub l2: f64,
    pub max_iter: usize,
    /// Stop when the Newton decrement `g' H^-1 g` (about twice the distance
    /// to the optimum in log-likelihood) falls below `tol` times the total
    /// weight of the rows.
    pub tol: f64,
    /// Above this many rows, first fit on an evenly spaced subsample of about
    /// this size and start the full Newton iterations from there.
    pub warm_rows: usize,
    /// Above twice this many rows, sum the Hessian over an evenly spaced
    /// subsample of about this size (gradient and likelihood stay exact).
    pub hess_rows: usize,
    /// Worker threads for the row loop (0 = available cores).
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

#[inline]
fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Softmax over the reference (linear predictor 0) and the free classes;
/// every other class gets 0.
fn softmax_row(coef: &[Vec<f64>], free: &[usize], reference: usize, x: &[f64], out: &mut [f64]) {
    for v in out.iter_mut() {
        *v = 0.0;
    }
    let mut max = 0.0f64;
    let mut eta = [0.0f64; 16];
    for (j, c) in coef.iter().enumerate() {
        eta[j] = dot(c, x);
        max = max.max(eta[j]);
    }
    let mut sum = (-max).exp();
    out[reference] = sum;
    for (j, &c) in free.iter().enumerate() {
        let e = (eta[j] - max).exp();
        out[c] = e;
        sum += e;
    }
    for v in out.iter_mut() {
        *v /= sum;
    }
}

/// Most classes a multinomial fit takes.
pub const MAX_CLASSES: usize = 16;

/// Sums over rows: log-likelihood, gradient, and (optionally) Hessian pieces.
struct Acc {
    weight: f64,
    ll: f64,
    grad: Vec<f64>, // m * p, class-major
    /// For each feature pair (a <= b, row-major upper triangle), the
    /// free-class pairs (j <= l) of sum w q_j (delta_jl - q_l) x_a x_b.
    hess: Vec<f64>,
}

fn tri_len(p: usize) -> usize {
    p * (p + 1) / 2
}

/// What one pass needs to know about the problem.
#[derive(Clone, Copy)]
struct Problem<'a> {
    design: &'a dyn Design,
    labels: Labels<'a>,
    weights: Option<&'a [f64]>,
    free: &'a [usize],
    reference: usize,
    classes: usize,
}

/// One pass over `rows` at coefficients `coef`.
fn accumulate(pr: Problem, coef: &[Vec<f64>], rows: &[usize], with_hess: bool) -> Acc {
    let p = pr.design.cols();
    let k = pr.classes;
    let m = pr.free.len();
    let tl = tri_len(p);
    let np = m * (m + 1) / 2;
    let starts: Vec<usize> = (0..p).map(|a| triangle_index(p, a, a)).collect();
    let mut acc = Acc {
        weight: 0.0,
        ll: 0.0,
        grad: vec![0.0; m * p],
        hess: if with_hess {
            vec![0.0; np * tl]
        } else {
            Vec::new()
        },
    };
    let mut x = vec![0.0; p];
    let mut q = vec![0.0; k];
    let mut t = vec![0.0; k];
    let mut wq = vec![0.0; np];
    let mut nz: Vec<usize> = Vec::with_capacity(p);
    for &i in rows {
        let w = pr.weights.map_or(1.0, |w| w[i]);
        if w == 0.0 {
            continue;
        }
        acc.weight += w;
        pr.design.fill(i, &mut x);
        softmax_row(coef, pr.free, pr.reference, &x, &mut q);
        for v in t.iter_mut() {
            *v = 0.0;
        }
        match pr.labels {
            Labels::Binary(y) => {
                t[1] = y[i];
                t[0] = 1.0 - y[i];
            }
            Labels::Classes { y, .. } => t[y[i] as usize] = 1.0,
        }
        for c in 0..k {
            if t[c] != 0.0 {
                acc.ll += w * t[c] * q[c].max(1e-300).ln();
            }
        }
        for (j, &c) in pr.free.iter().enumerate() {
            let r = w * (t[c] - q[c]);
            let g = &mut acc.grad[j * p..(j + 1) * p];
            for a in 0..p {
                g[a] += r * x[a];
            }
        }
        if with_hess {
            let mut pi = 0;
            for (j, &cj) in pr.free.iter().enumerate() {
                for &cl in &pr.free[j..] {
                    let d = if cj == cl { 1.0 } else { 0.0 };
                    wq[pi] = w * q[cj] * (d - q[cl]);
                    pi += 1;
                }
            }
            nz.clear();
            nz.extend((0..p).filter(|&a| x[a] != 0.0));
            for (ia, &a) in nz.iter().enumerate() {
                let xa = x[a];
                let base = starts[a];
                for &b in &nz[ia..] {
                    let v = xa * x[b];
                    let at = (base + b - a) * np;
                    let dst = &mut acc.hess[at..at + np];
                    for (h, s) in dst.iter_mut().zip(&wq) {
                        *h += v * s;
                    }
                }
            }
        }
    }
    acc
}

/// Position of (a, b), a <= b, in the row-major upper triangle of a p x p matrix.
fn triangle_index(p: usize, a: usize, b: usize) -> usize {
    a * p - a * (a + 1) / 2 + a + (b - a)
}

/// `accumulate` split across threads, sums combined.
fn accumulate_par(
    pr: Problem,
    coef: &[Vec<f64>],
    rows: &[usize],
    with_hess: bool,
    threads: usize,
) -> Acc {
    let threads = threads.max(1).min(rows.len() / 2000 + 1);
    if threads == 1 {
        return accumulate(pr, coef, rows, with_hess);
    }
    let chunk = rows.len().div_ceil(threads);
    let parts: Vec<Acc> = std::thread::scope(|s| {
        let handles: Vec<_> = rows
            .chunks(chunk)
            .map(|part| s.spawn(move || accumulate(pr, coef, part, with_hess)))
            .collect();
        handles
            .into_iter()
            .map(|h| h.join().expect("logit worker panicked"))
            .collect()
    });
    let mut it = parts.into_iter();
    let mut total = it.next().expect("at least one part");
    for a in it {
        total.weight += a.weight;
        total.ll += a.ll;
        for (x, y) in total.grad.iter_mut().zip(&a.grad) {
            *x += y;
        }
        for (x, y) in total.hess.iter_mut().zip(&a.hess) {
            *x += y;
        }
    }
    total
}

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
        let sub: Vec<usize> = (0..n).step_by(n / opts.warm_rows).collect();
        let l2 = opts.l2 * sub.len() as f64 / n as f64;
        let r = newton(
            pr,
            &sub,
            &sub,
            coef,
            l2,
            opts.max_iter,
            opts.tol * 1e3,
            threads,
        )?;
        coef = r.coef;
        warm_iterations = r.iterations;
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

fn penalty(coef: &[Vec<f64>], l2: f64) -> f64 {
    coef.iter()
        .map(|r| r[1..].iter().map(|b| b * b).sum::<f64>())
        .sum::<f64>()
        * l2
        / 2.0
}

struct NewtonOut {
    coef: Vec<Vec<f64>>,
    iterations: usize,
    converged: bool,
    grad_norm: f64,
    log_lik: f64,
}

/// Newton iterations with step halving on `rows`; the Hessian is summed over
/// `hess_rows` (a subset of `rows`, or all of them) and scaled up.
#[allow(clippy::too_many_arguments)]
fn newton(
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
fn solve_spd(h: DMatrix<f64>, g: &DVector<f64>) -> Result<DVector<f64>, LogitError> {
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

#[cfg(test)]
mod tests;
