//! Linear predictors of a row: dense (`dot`, `linear_predictors`), and, for
//! softmax rows, over the row's nonzero features only
//! (`linear_predictors_nonzero`), the same bit for bit: each class's
//! products are still added first feature to last from -0.0, and a skipped
//! product is ±0, which leaves a sum unchanged (or only changes the sign of
//! a zero sum, which no exponential or comparison downstream tells apart).
//! Coefficients are finite, so no skipped product would have been NaN. An
//! EP row has about 12 nonzero features of 28 (one down, the field
//! position's knots behind the ball, no late-game terms), and its six class
//! sums run side by side in registers.

/// One row's linear predictor.
#[inline]
pub(super) fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// `eta[j] = dot(coef[j], x)` for every class row, up to four rows at a
/// time: each row's products are added in the same order as `dot` (first to
/// last feature, from -0.0 as `Sum` does), so every value is the same bit
/// for bit; only the rows' independent sums are interleaved, which the
/// compiler can keep in one vector register.
#[inline]
pub(super) fn linear_predictors(coef: &[Vec<f64>], x: &[f64], eta: &mut [f64]) {
    let mut j = 0;
    let m = coef.len();
    while j < m {
        match m - j {
            1 => {
                eta[j] = dot(&coef[j], x);
                j += 1;
            }
            k => {
                let n = k.min(4);
                let rows = &coef[j..j + n];
                let p = x.len().min(rows[0].len());
                if rows.iter().any(|c| c.len().min(x.len()) != p) {
                    for (e, c) in eta[j..j + n].iter_mut().zip(rows) {
                        *e = dot(c, x);
                    }
                } else {
                    // Fewer than four rows left: the last is repeated and its copies dropped.
                    let r = |t: usize| &rows[t.min(n - 1)][..p];
                    let (c0, c1, c2, c3) = (r(0), r(1), r(2), r(3));
                    let mut s = [-0.0f64; 4];
                    for a in 0..p {
                        let xa = x[a];
                        s[0] += c0[a] * xa;
                        s[1] += c1[a] * xa;
                        s[2] += c2[a] * xa;
                        s[3] += c3[a] * xa;
                    }
                    eta[j..j + n].copy_from_slice(&s[..n]);
                }
                j += n;
            }
        }
    }
}

/// Rows up to this many features gather their nonzero positions on the stack.
const MAX_GATHER: usize = 64;

/// Positions of the nonzero entries of `x` (NaN counts as nonzero) written
/// to the front of `idx`; their count. `x.len() <= MAX_GATHER`.
#[inline]
fn gather(x: &[f64], idx: &mut [u8; MAX_GATHER]) -> usize {
    let mut n = 0;
    for (a, &v) in x.iter().enumerate() {
        idx[n] = a as u8;
        n += (v != 0.0) as usize;
    }
    n
}

/// `dot(c, x)` over the nonzero entries of `x` (for a single row the
/// dense sum is as quick: the gather costs what the skipped adds save).
#[cfg(test)]
#[inline]
pub(super) fn dot_nonzero(c: &[f64], x: &[f64]) -> f64 {
    let p = c.len().min(x.len());
    if p > MAX_GATHER {
        return dot(c, x);
    }
    let (c, x) = (&c[..p], &x[..p]);
    let mut idx = [0u8; MAX_GATHER];
    let n = gather(x, &mut idx);
    let mut s = -0.0f64;
    for &a in &idx[..n] {
        let a = a as usize;
        s += c[a] * x[a];
    }
    s
}

/// `linear_predictors(coef, x, eta)` over the nonzero entries of `x`.
#[inline]
pub(super) fn linear_predictors_nonzero(coef: &[Vec<f64>], x: &[f64], eta: &mut [f64]) {
    let p = x.len();
    if p > MAX_GATHER || coef.iter().any(|c| c.len() != p) {
        return linear_predictors(coef, x, eta);
    }
    match coef.len() {
        2 => sums::<2>(coef, x, eta),
        3 => sums::<3>(coef, x, eta),
        4 => sums::<4>(coef, x, eta),
        5 => sums::<5>(coef, x, eta),
        6 => sums::<6>(coef, x, eta),
        7 => sums::<7>(coef, x, eta),
        8 => sums::<8>(coef, x, eta),
        _ => linear_predictors(coef, x, eta),
    }
}

/// The `M` class rows' sums side by side (kept in registers), over the
/// nonzero entries of `x`; every row as long as `x`.
#[inline(always)]
fn sums<const M: usize>(coef: &[Vec<f64>], x: &[f64], eta: &mut [f64]) {
    let p = x.len();
    let rows: [&[f64]; M] = std::array::from_fn(|j| &coef[j][..p]);
    let mut idx = [0u8; MAX_GATHER];
    let n = gather(x, &mut idx);
    let mut s = [-0.0f64; M];
    for &a in &idx[..n] {
        let a = (a as usize).min(p - 1);
        let xa = x[a];
        for j in 0..M {
            s[j] += rows[j][a] * xa;
        }
    }
    eta[..M].copy_from_slice(&s);
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Rows with zeros, negative zeros, NaN and exact cancellations: the
    /// nonzero sums equal the dense ones bit for bit.
    #[test]
    fn nonzero_sums_match_dense_bit_for_bit() {
        let mut seed = 12345u64;
        let mut next = || {
            seed = seed.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        for p in [1usize, 3, 16, 28, 39, 64, 70] {
            for m in [1usize, 2, 3, 4, 5, 6, 9] {
                for _ in 0..200 {
                    let coef: Vec<Vec<f64>> = (0..m).map(|_| (0..p).map(|_| (next() - 0.5) * 8.0).collect()).collect();
                    let x: Vec<f64> = (0..p)
                        .map(|_| match (next() * 5.0) as u32 {
                            0 | 1 => 0.0,
                            2 => -0.0,
                            _ => (next() - 0.5) * 3.0,
                        })
                        .collect();
                    let (mut dense, mut sparse) = ([0.0; super::super::MAX_CLASSES], [0.0; super::super::MAX_CLASSES]);
                    linear_predictors(&coef, &x, &mut dense);
                    linear_predictors_nonzero(&coef, &x, &mut sparse);
                    for j in 0..m {
                        assert_eq!(dense[j], sparse[j], "p {p} m {m} class {j}");
                        assert_eq!(dot(&coef[j], &x), dot_nonzero(&coef[j], &x));
                    }
                }
            }
        }
        // A sum that cancels to zero, and a row of zeros.
        let c = vec![1.5, -1.5, 2.0];
        assert_eq!(dot(&c, &[1.0, 1.0, 0.0]), dot_nonzero(&c, &[1.0, 1.0, 0.0]));
        assert_eq!(dot(&c, &[0.0, -0.0, 0.0]), dot_nonzero(&c, &[0.0, -0.0, 0.0]));
        assert!(dot_nonzero(&c, &[f64::NAN, 0.0, 0.0]).is_nan());
        // The dense form's value is what is being matched.
        assert_eq!(dot_nonzero(&c, &[2.0, 0.0, 1.0]), 5.0);
    }
}
