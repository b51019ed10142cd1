//! Design matrices: rows filled on demand, so a million-row fit never holds
//! the whole matrix.

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
