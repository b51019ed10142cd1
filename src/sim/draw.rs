//! Random draws the simulator needs (uniform, normal, exponential, weighted
//! pick, shuffle) on the one seeded generator type, plus the logistic link.

use rand::Rng;
use rand_chacha::ChaCha8Rng;

pub(crate) type SimRng = ChaCha8Rng;

/// Uniform in [0, 1).
#[inline]
pub(crate) fn unit(rng: &mut SimRng) -> f64 {
    rng.random::<f64>()
}

#[inline]
pub(crate) fn chance(rng: &mut SimRng, p: f64) -> bool {
    unit(rng) < p
}

/// Uniform integer in `lo..=hi`.
#[inline]
pub(crate) fn int_in(rng: &mut SimRng, lo: i32, hi: i32) -> i32 {
    if hi <= lo {
        lo
    } else {
        rng.random_range(lo..=hi)
    }
}

/// Standard normal (Box-Muller, one value per call).
#[inline]
pub(crate) fn normal(rng: &mut SimRng) -> f64 {
    let u1 = 1.0 - unit(rng); // (0, 1]
    let u2 = unit(rng);
    (-2.0 * u1.ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
}

/// Exponential with the given mean.
#[inline]
pub(crate) fn exp_mean(rng: &mut SimRng, mean: f64) -> f64 {
    -mean * (1.0 - unit(rng)).ln()
}

#[inline]
pub(crate) fn logistic(x: f64) -> f64 {
    1.0 / (1.0 + (-x).exp())
}

/// Index drawn with probability proportional to `weights` (all ≥ 0, sum > 0).
pub(crate) fn pick(rng: &mut SimRng, weights: &[f64]) -> usize {
    let total: f64 = weights.iter().sum();
    let mut u = unit(rng) * total;
    for (i, w) in weights.iter().enumerate() {
        if u < *w {
            return i;
        }
        u -= w;
    }
    weights.iter().rposition(|w| *w > 0.0).unwrap_or(0)
}

/// Fisher-Yates shuffle.
pub(crate) fn shuffle<T>(rng: &mut SimRng, v: &mut [T]) {
    for i in (1..v.len()).rev() {
        let j = rng.random_range(0..=i);
        v.swap(i, j);
    }
}
