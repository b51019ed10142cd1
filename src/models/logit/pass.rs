//! One pass over the rows at given coefficients: log-likelihood, gradient
//! and Hessian pieces, summed over fixed chunks of rows on rayon's threads
//! (the same chunks and the same order of sums on every machine).

use super::*;

pub(super) use super::sums::dot;
#[cfg(test)]
pub(super) use super::sums::linear_predictors;

/// Softmax over the reference (linear predictor 0) and the free classes;
/// every other class gets 0.
pub(super) fn softmax_row(coef: &[Vec<f64>], free: &[usize], reference: usize, x: &[f64], out: &mut [f64]) {
    for v in out.iter_mut() {
        *v = 0.0;
    }
    let mut eta = [0.0f64; 16];
    super::sums::linear_predictors_nonzero(coef, x, &mut eta);
    let mut max = 0.0f64;
    for &e in &eta[..coef.len()] {
        max = max.max(e);
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

/// Sums over rows: log-likelihood, gradient, and (optionally) Hessian pieces.
pub(super) struct Acc {
    pub(super) weight: f64,
    pub(super) ll: f64,
    pub(super) grad: Vec<f64>, // m * p, class-major
    /// For each feature pair (a <= b, row-major upper triangle), the
    /// free-class pairs (j <= l) of sum w q_j (delta_jl - q_l) x_a x_b.
    pub(super) hess: Vec<f64>,
}

pub(super) fn tri_len(p: usize) -> usize {
    p * (p + 1) / 2
}

/// What one pass needs to know about the problem.
#[derive(Clone, Copy)]
pub(super) struct Problem<'a> {
    pub(super) design: &'a dyn Design,
    pub(super) labels: Labels<'a>,
    pub(super) weights: Option<&'a [f64]>,
    pub(super) free: &'a [usize],
    pub(super) reference: usize,
    pub(super) classes: usize,
}

/// One pass over `rows` at coefficients `coef`.
pub(super) fn accumulate(pr: Problem, coef: &[Vec<f64>], rows: &[usize], with_hess: bool) -> Acc {
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
        // The row's nonzero features: the Hessian's pairs, and the
        // gradient of a softmax (several class rows) where a zero feature
        // would add ±0, which leaves a sum as it was (a sum that starts at
        // +0 never turns -0), so skipping it changes no bit.
        let sparse = with_hess || m > 1;
        if sparse {
            nz.clear();
            nz.extend((0..p).filter(|&a| x[a] != 0.0));
        }
        for (j, &c) in pr.free.iter().enumerate() {
            let r = w * (t[c] - q[c]);
            let g = &mut acc.grad[j * p..(j + 1) * p];
            if sparse && r.is_finite() {
                for &a in &nz {
                    g[a] += r * x[a];
                }
            } else {
                for a in 0..p {
                    g[a] += r * x[a];
                }
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
pub(super) fn triangle_index(p: usize, a: usize, b: usize) -> usize {
    a * p - a * (a + 1) / 2 + a + (b - a)
}

/// Rows per piece of work: fixed, so the pieces, and the order their sums
/// are added in, are the same whatever the number of threads.
pub(super) const CHUNK_ROWS: usize = 8192;

/// `accumulate` over fixed chunks of `rows` (on rayon's threads unless
/// `threads == 1`), the chunks' sums added in chunk order: the result is the
/// same, bit for bit, with any number of threads.
pub(super) fn accumulate_par(
    pr: Problem,
    coef: &[Vec<f64>],
    rows: &[usize],
    with_hess: bool,
    threads: usize,
) -> Acc {
    use rayon::prelude::*;
    let parts: Vec<Acc> = if threads == 1 || rows.len() <= CHUNK_ROWS {
        rows.chunks(CHUNK_ROWS)
            .map(|part| accumulate(pr, coef, part, with_hess))
            .collect()
    } else {
        rows.par_chunks(CHUNK_ROWS)
            .map(|part| accumulate(pr, coef, part, with_hess))
            .collect()
    };
    let mut it = parts.into_iter();
    let Some(mut total) = it.next() else {
        return accumulate(pr, coef, rows, with_hess);
    };
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
