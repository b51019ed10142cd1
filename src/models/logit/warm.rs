//! The rows of a warm-start level: an evenly spaced subsample; in a
//! multinomial fit with rare classes, every row of a rare class as well,
//! the subsampled rest weighted up to stand for all of it.
//!
//! Why: on an evenly spaced tenth, a class with a few tenths of a percent
//! of the rows (a safety among next scores) has a few hundred rows, and its
//! coefficients are far from the whole league's; the full-data Newton
//! iterations then start outside the quadratic region. On the 25-season
//! league (seed 7) the EP fit's full iterations took the Newton decrement
//! 1,015 → 150 → 40 → 7.4 → 0.36 → 4e-4 from the plain tenth (6 passes over
//! every snap), and 615 → 2.6 → 0.025 → 8e-4 from the tenth with every
//! safety kept (3 passes to the same stopping rule).

use super::Labels;

/// Classes with less than this share of the total weight are rare.
pub(super) const RARE_SHARE: f64 = 0.05;

/// A warm level's rows, their weights (`None`: the fit's own) and the L2
/// penalty that goes with them.
pub(super) struct WarmLevel {
    pub(super) rows: Vec<usize>,
    pub(super) weights: Option<Vec<f64>>,
    pub(super) l2: f64,
}

/// About `level` evenly spaced rows of `n`; with `stratify`, every row of a
/// rare class of `labels` too (`totals`: each class's weight), the others
/// weighted by their total weight over the sampled ones' weight, so the
/// level's sums estimate the whole data's. The L2 penalty is scaled to the
/// level's share of the weight.
pub(super) fn level(
    n: usize,
    level: usize,
    labels: Labels,
    weights: Option<&[f64]>,
    totals: &[f64],
    l2: f64,
    stratify: bool,
) -> WarmLevel {
    let step = (n / level.max(1)).max(1);
    let even = || (0..n).step_by(step);
    let total: f64 = totals.iter().sum();
    let rare: Vec<bool> = totals.iter().map(|&t| t < RARE_SHARE * total).collect();
    let Labels::Classes { y, .. } = labels else {
        return plain(even().collect(), n, l2);
    };
    if !stratify || !rare.iter().any(|&r| r) {
        return plain(even().collect(), n, l2);
    }
    let w = |i: usize| weights.map_or(1.0, |w| w[i]);
    let is_rare = |i: usize| rare[y[i] as usize];
    let common_total: f64 = totals.iter().zip(&rare).filter(|(_, r)| !**r).map(|(t, _)| t).sum();
    let common_sampled: f64 = even().filter(|&i| !is_rare(i)).map(w).sum();
    let up = if common_sampled > 0.0 { common_total / common_sampled } else { 1.0 };
    let mut rows = Vec::new();
    let mut wv = vec![0.0; n];
    for i in 0..n {
        if is_rare(i) {
            wv[i] = w(i);
            rows.push(i);
        } else if i % step == 0 {
            wv[i] = w(i) * up;
            rows.push(i);
        }
    }
    let level_weight: f64 = rows.iter().map(|&i| wv[i]).sum();
    WarmLevel { rows, weights: Some(wv), l2: l2 * level_weight / total.max(f64::MIN_POSITIVE) }
}

fn plain(rows: Vec<usize>, n: usize, l2: f64) -> WarmLevel {
    let l2 = l2 * rows.len() as f64 / n as f64;
    WarmLevel { rows, weights: None, l2 }
}

#[cfg(test)]
mod tests {
    use super::super::tests::{draw_classes, synth};
    use super::super::*;
    use super::*;

    /// Four classes, the last about 0.4% of the rows.
    fn rare_problem(n: usize) -> (DenseDesign, Vec<u8>) {
        let d = synth(n, 5, 61);
        let truth = [vec![0.3, 0.5, -0.4, 0.2, 0.0], vec![-0.2, -0.3, 0.6, 0.0, 0.4], vec![-5.5, 0.0, 0.8, -0.7, 0.5]];
        let y = draw_classes(&d, &truth, 62);
        (d, y)
    }

    #[test]
    fn a_level_keeps_every_rare_row_and_stands_for_all_the_weight() {
        let n = 60_000;
        let (_, y) = rare_problem(n);
        let labels = Labels::Classes { y: &y, classes: 4, reference: 0 };
        let mut totals = vec![0.0; 4];
        for &c in &y {
            totals[c as usize] += 1.0;
        }
        let rare = totals[3];
        assert!(rare > 50.0 && rare < 0.01 * n as f64, "{totals:?}");
        let lv = level(n, 5_000, labels, None, &totals, 2.0, true);
        let w = lv.weights.as_deref().expect("weights with a rare class");
        // Every row of the rare class, at weight 1.
        let kept = lv.rows.iter().filter(|&&i| y[i] == 3).count();
        assert_eq!(kept as f64, rare);
        assert!(lv.rows.iter().all(|&i| y[i] != 3 || w[i] == 1.0));
        // The evenly spaced rest, weighted up to the rest's total.
        let step = n / 5_000;
        assert!(lv.rows.iter().all(|&i| y[i] == 3 || i % step == 0));
        let sum: f64 = lv.rows.iter().map(|&i| w[i]).sum();
        assert!((sum - n as f64).abs() < 1e-6 * n as f64, "{sum}");
        assert!((lv.l2 - 2.0).abs() < 1e-9, "{}", lv.l2);
        // Unweighted rows outside the level weigh nothing.
        assert_eq!(lv.rows.len(), w.iter().filter(|&&v| v > 0.0).count());
        // Without a rare class, or asked not to: the plain subsample.
        let plain = level(n, 5_000, labels, None, &totals, 2.0, false);
        assert!(plain.weights.is_none() && plain.rows.len() == n.div_ceil(step));
        assert!((plain.l2 - 2.0 * plain.rows.len() as f64 / n as f64).abs() < 1e-12);
        let yb: Vec<f64> = y.iter().map(|&c| (c == 3) as i32 as f64).collect();
        let bin = level(n, 5_000, Labels::Binary(&yb), None, &[n as f64 - rare, rare], 2.0, true);
        assert!(bin.weights.is_none(), "binary fits keep the plain subsample");
    }

    /// Started from the level with every rare row, the fit reaches the
    /// optimum of the fit on all rows from the intercept-only start.
    #[test]
    fn the_stratified_start_reaches_the_same_optimum() {
        let (d, y) = rare_problem(60_000);
        let labels = Labels::Classes { y: &y, classes: 4, reference: 0 };
        let tight = FitOptions { tol: 1e-14, ..Default::default() };
        let exact = fit(&d, labels, None, &FitOptions { warm_rows: 0, hess_rows: 0, ..tight }).expect("fit");
        let warm = fit(&d, labels, None, &FitOptions { warm_rows: 5_000, hess_rows: 5_000, ..tight }).expect("fit");
        assert!(warm.stats.converged && warm.stats.warm_iterations > 0);
        for (a, b) in exact.coef.iter().flatten().zip(warm.coef.iter().flatten()) {
            assert!((a - b).abs() < 1e-6, "{a} vs {b}");
        }
    }
}
