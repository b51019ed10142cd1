//! Tests of the logistic and multinomial logistic fits: known coefficients
//! recovered from synthetic data, the optimality condition, statsmodels
//! cross-checks.

use super::*;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

pub(super) fn synth(n: usize, p: usize, seed: u64) -> DenseDesign {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut data = Vec::with_capacity(n * p);
    for _ in 0..n {
        data.push(1.0);
        for _ in 1..p {
            data.push(rng.random_range(-1.0..1.0) * 2.0);
        }
    }
    DenseDesign { n, p, data }
}

/// A class for each row of `d`, drawn from the softmax of `truth` (one
/// coefficient row per class 1, 2, ...; class 0 the reference).
pub(super) fn draw_classes(d: &DenseDesign, truth: &[Vec<f64>], seed: u64) -> Vec<u8> {
    let k = truth.len();
    let free: Vec<usize> = (1..=k).collect();
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let (mut x, mut q) = (vec![0.0; d.p], vec![0.0; k + 1]);
    (0..d.n)
        .map(|i| {
            d.fill(i, &mut x);
            softmax_row(truth, &free, 0, &x, &mut q);
            let mut u: f64 = rng.random();
            let mut c = 0;
            while c < k && u >= q[c] {
                u -= q[c];
                c += 1;
            }
            c as u8
        })
        .collect()
}

#[test]
fn binary_recovers_known_coefficients() {
    let truth = [-0.5, 1.0, -2.0, 0.25];
    let d = synth(200_000, 4, 7);
    let mut rng = ChaCha8Rng::seed_from_u64(8);
    let mut x = vec![0.0; 4];
    let y: Vec<f64> = (0..d.n)
        .map(|i| {
            d.fill(i, &mut x);
            let pr = sigmoid(dot(&truth, &x));
            if rng.random::<f64>() < pr {
                1.0
            } else {
                0.0
            }
        })
        .collect();
    let opts = FitOptions {
        l2: 0.0,
        warm_rows: 20_000,
        hess_rows: 50_000,
        ..Default::default()
    };
    let f = fit(&d, Labels::Binary(&y), None, &opts).expect("fit");
    assert!(f.stats.converged, "{:?}", f.stats);
    for (b, t) in f.coef[0].iter().zip(truth) {
        assert!((b - t).abs() < 0.03, "{b} vs {t}");
    }
    assert!(f.stats.warm_iterations > 0);
}

#[test]
fn multinomial_recovers_known_coefficients() {
    let truth = [vec![0.3, 1.0, -0.5], vec![-0.2, -1.0, 0.8]]; // classes 1 and 2 vs reference 0
    let d = synth(120_000, 3, 11);
    let mut rng = ChaCha8Rng::seed_from_u64(12);
    let mut x = vec![0.0; 3];
    let mut q = vec![0.0; 3];
    let y: Vec<u8> = (0..d.n)
        .map(|i| {
            d.fill(i, &mut x);
            softmax_row(&truth, &[1, 2], 0, &x, &mut q);
            let u: f64 = rng.random();
            if u < q[0] {
                0
            } else if u < q[0] + q[1] {
                1
            } else {
                2
            }
        })
        .collect();
    let f = fit(
        &d,
        Labels::Classes {
            y: &y,
            classes: 3,
            reference: 0,
        },
        None,
        &FitOptions {
            l2: 0.0,
            ..Default::default()
        },
    )
    .expect("fit");
    assert!(f.stats.converged);
    for j in 0..2 {
        for a in 0..3 {
            assert!((f.coef[j][a] - truth[j][a]).abs() < 0.04, "{:?}", f.coef);
        }
    }
}

/// With an L2 penalty the optimum satisfies grad(loglik) = l2 * beta
/// (intercept excluded); check that directly on the returned coefficients.
#[test]
fn penalized_fit_meets_its_optimality_condition() {
    let d = synth(5_000, 5, 3);
    let mut rng = ChaCha8Rng::seed_from_u64(4);
    let y: Vec<f64> = (0..d.n)
        .map(|_| if rng.random::<f64>() < 0.3 { 1.0 } else { 0.5 })
        .collect();
    let w: Vec<f64> = (0..d.n).map(|_| rng.random_range(0.5..2.0)).collect();
    let opts = FitOptions {
        l2: 50.0,
        tol: 1e-20,
        ..Default::default()
    };
    let f = fit(&d, Labels::Binary(&y), Some(&w), &opts).expect("fit");
    let rows: Vec<usize> = (0..d.n).collect();
    let pr = Problem {
        design: &d,
        labels: Labels::Binary(&y),
        weights: Some(&w),
        free: &[1],
        reference: 0,
        classes: 2,
    };
    let acc = accumulate(pr, &f.coef, &rows, false);
    assert!(acc.grad[0].abs() < 1e-6);
    for a in 1..5 {
        assert!((acc.grad[a] - 50.0 * f.coef[0][a]).abs() < 1e-6, "{a}");
    }
    assert!(f.stats.grad_norm < 1e-6);
}

#[test]
fn threads_agree_with_one_thread() {
    let d = synth(30_000, 4, 5);
    let mut rng = ChaCha8Rng::seed_from_u64(6);
    let y: Vec<f64> = (0..d.n)
        .map(|_| if rng.random::<f64>() < 0.4 { 1.0 } else { 0.0 })
        .collect();
    let one = fit(
        &d,
        Labels::Binary(&y),
        None,
        &FitOptions {
            threads: 1,
            ..Default::default()
        },
    )
    .expect("fit");
    let two = fit(
        &d,
        Labels::Binary(&y),
        None,
        &FitOptions {
            threads: 2,
            ..Default::default()
        },
    )
    .expect("fit");
    for (a, b) in one.coef[0].iter().zip(&two.coef[0]) {
        assert!((a - b).abs() < 1e-9);
    }
}

#[test]
fn bad_labels_are_errors() {
    let d = synth(10, 2, 1);
    let y = vec![2.0; 10];
    assert!(matches!(
        fit(&d, Labels::Binary(&y), None, &FitOptions::default()),
        Err(LogitError::BadLabel { .. })
    ));
}

/// Runs tests/ref/logit_ref.py (statsmodels) on `csv` and returns its
/// coefficient rows. Fails, not skips, when Python or statsmodels is
/// missing, unless LATEGAME_SKIP_PY=1.
fn reference(csv: &std::path::Path, mode: &str) -> Option<Vec<Vec<f64>>> {
    if std::env::var("LATEGAME_SKIP_PY").as_deref() == Ok("1") {
        eprintln!("LATEGAME_SKIP_PY=1: skipping the statsmodels comparison");
        return None;
    }
    let script =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/ref/logit_ref.py");
    let out = std::process::Command::new("python3")
        .arg(&script)
        .arg(csv)
        .arg(mode)
        .output();
    let out = match out {
        Ok(o) => o,
        Err(e) => panic!("cannot run python3 for the reference fit ({e}); install Python 3 with statsmodels, or set LATEGAME_SKIP_PY=1"),
    };
    assert!(
        out.status.success(),
        "reference fit failed (is statsmodels installed? `pip install statsmodels`, or set LATEGAME_SKIP_PY=1): {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value =
        serde_json::from_slice(&out.stdout).expect("reference output is JSON");
    let rows = v["coef"].as_array().expect("coef array");
    Some(
        rows.iter()
            .map(|r| {
                r.as_array()
                    .expect("row")
                    .iter()
                    .map(|x| x.as_f64().expect("number"))
                    .collect()
            })
            .collect(),
    )
}

fn write_csv(path: &std::path::Path, d: &DenseDesign, y: &[f64], w: &[f64]) {
    use std::fmt::Write;
    let mut s = String::from("y,w");
    for a in 0..d.p {
        write!(s, ",x{a}").expect("string");
    }
    s.push('\n');
    for i in 0..d.n {
        write!(s, "{},{}", y[i], w[i]).expect("string");
        for a in 0..d.p {
            write!(s, ",{}", d.data[i * d.p + a]).expect("string");
        }
        s.push('\n');
    }
    std::fs::write(path, s).expect("writing the reference CSV");
}

fn temp_csv(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("lategame-logit-ref-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    dir.join(name)
}

/// Outside check: our unpenalized Newton fit equals statsmodels
/// (GLM Binomial with freq_weights; MNLogit) on the same design,
/// within 1e-4. Source: tests/ref/logit_ref.py.
#[test]
fn binary_matches_statsmodels() {
    let d = synth(5_000, 6, 21);
    let truth = [0.2, 0.8, -0.6, 0.3, 0.0, -1.1];
    let mut rng = ChaCha8Rng::seed_from_u64(22);
    let mut x = vec![0.0; 6];
    let y: Vec<f64> = (0..d.n)
        .map(|i| {
            d.fill(i, &mut x);
            let u: f64 = rng.random();
            if u < 0.05 {
                0.5
            } else if u < sigmoid(dot(&truth, &x)) {
                1.0
            } else {
                0.0
            }
        })
        .collect();
    let w: Vec<f64> = (0..d.n).map(|_| rng.random_range(1..4) as f64).collect();
    let path = temp_csv("binary.csv");
    write_csv(&path, &d, &y, &w);
    let Some(want) = reference(&path, "binary") else {
        return;
    };
    let f = fit(
        &d,
        Labels::Binary(&y),
        Some(&w),
        &FitOptions {
            l2: 0.0,
            tol: 1e-12,
            ..Default::default()
        },
    )
    .expect("fit");
    assert!(f.stats.converged);
    for (a, (b, r)) in f.coef[0].iter().zip(&want[0]).enumerate() {
        assert!(
            (b - r).abs() < 1e-4,
            "coefficient {a}: ours {b}, statsmodels {r}"
        );
    }
    eprintln!(
        "binary max |diff| = {:e}",
        f.coef[0]
            .iter()
            .zip(&want[0])
            .map(|(a, b)| (a - b).abs())
            .fold(0.0, f64::max)
    );
}

#[test]
fn multinomial_matches_statsmodels() {
    let d = synth(5_000, 6, 31);
    let truth = [
        vec![0.1, 0.5, -0.4, 0.2, 0.0, 0.3],
        vec![-0.3, -0.2, 0.6, 0.0, 0.4, -0.5],
        vec![0.4, 0.0, 0.1, -0.7, 0.2, 0.2],
    ];
    let y = draw_classes(&d, &truth, 32);
    let yf: Vec<f64> = y.iter().map(|&c| c as f64).collect();
    let path = temp_csv("multinomial.csv");
    write_csv(&path, &d, &yf, &vec![1.0; d.n]);
    let Some(want) = reference(&path, "multinomial") else {
        return;
    };
    let f = fit(
        &d,
        Labels::Classes {
            y: &y,
            classes: 4,
            reference: 0,
        },
        None,
        &FitOptions {
            l2: 0.0,
            tol: 1e-12,
            ..Default::default()
        },
    )
    .expect("fit");
    assert!(f.stats.converged);
    let mut worst = 0.0f64;
    for j in 0..3 {
        for a in 0..6 {
            let (b, r) = (f.coef[j][a], want[j][a]);
            worst = worst.max((b - r).abs());
            assert!(
                (b - r).abs() < 1e-4,
                "class {} coefficient {a}: ours {b}, statsmodels {r}",
                j + 1
            );
        }
    }
    eprintln!("multinomial max |diff| = {worst:e}");
}

/// A class no row has gets no coefficients and probability 0, and the
/// others fit as if it did not exist.
#[test]
fn unseen_class_gets_probability_zero() {
    let d = synth(20_000, 3, 41);
    let mut rng = ChaCha8Rng::seed_from_u64(42);
    let y: Vec<u8> = (0..d.n)
        .map(|_| if rng.random::<f64>() < 0.3 { 2 } else { 0 })
        .collect();
    let f = fit(
        &d,
        Labels::Classes {
            y: &y,
            classes: 4,
            reference: 0,
        },
        None,
        &FitOptions::default(),
    )
    .expect("fit");
    assert_eq!(f.free, vec![2]);
    assert!(
        f.stats.converged && f.stats.iterations < 10,
        "{:?}",
        f.stats
    );
    let mut q = [0.0; 4];
    f.probs(&[1.0, 0.0, 0.0], &mut q);
    assert_eq!(q[1], 0.0);
    assert_eq!(q[3], 0.0);
    assert!((q[2] - 0.3).abs() < 0.02, "{q:?}");
}

/// The subsampled Hessian changes the path, not the answer (to a tight
/// stopping rule).
#[test]
fn subsampled_hessian_reaches_the_same_optimum() {
    let d = synth(60_000, 5, 51);
    let mut rng = ChaCha8Rng::seed_from_u64(52);
    let mut x = vec![0.0; 5];
    let truth = [0.1, -0.5, 0.7, 0.0, 0.3];
    let y: Vec<f64> = (0..d.n)
        .map(|i| {
            d.fill(i, &mut x);
            (rng.random::<f64>() < sigmoid(dot(&truth, &x))) as i32 as f64
        })
        .collect();
    let exact = fit(
        &d,
        Labels::Binary(&y),
        None,
        &FitOptions {
            warm_rows: 0,
            hess_rows: 0,
            tol: 1e-12,
            ..Default::default()
        },
    )
    .expect("fit");
    let sub = fit(
        &d,
        Labels::Binary(&y),
        None,
        &FitOptions {
            warm_rows: 5_000,
            hess_rows: 5_000,
            tol: 1e-12,
            ..Default::default()
        },
    )
    .expect("fit");
    assert!(sub.stats.converged && sub.stats.warm_iterations > 0);
    for (a, b) in exact.coef[0].iter().zip(&sub.coef[0]) {
        assert!((a - b).abs() < 1e-6, "{a} vs {b}");
    }
}

/// The softmax before the class rows were interleaved: one `dot` per row.
fn softmax_one_row_at_a_time(coef: &[Vec<f64>], free: &[usize], reference: usize, x: &[f64], out: &mut [f64]) {
    out.iter_mut().for_each(|v| *v = 0.0);
    let eta: Vec<f64> = coef.iter().map(|c| pass::dot(c, x)).collect();
    let max = eta.iter().fold(0.0f64, |m, &e| m.max(e));
    let mut sum = (-max).exp();
    out[reference] = sum;
    for (j, &c) in free.iter().enumerate() {
        out[c] = (eta[j] - max).exp();
        sum += out[c];
    }
    out.iter_mut().for_each(|v| *v /= sum);
}

#[test]
fn interleaved_rows_give_the_same_bits_as_one_dot_per_row() {
    let mut rng = ChaCha8Rng::seed_from_u64(11);
    let mut checked = 0;
    for m in 1..=9 {
        for p in [1, 2, 5, 16, 25, 40] {
            for _ in 0..50 {
                let coef: Vec<Vec<f64>> = (0..m).map(|_| (0..p).map(|_| rng.random_range(-3.0..3.0) * 10f64.powi(rng.random_range(-8..3))).collect()).collect();
                // Zeros of both signs, as dummies and empty features give.
                let x: Vec<f64> = (0..p)
                    .map(|_| match rng.random_range(0..4) {
                        0 => 0.0,
                        1 => -0.0,
                        _ => rng.random_range(-50.0..50.0),
                    })
                    .collect();
                let mut eta = [0.0; 16];
                pass::linear_predictors(&coef, &x, &mut eta);
                for j in 0..m {
                    assert_eq!(eta[j].to_bits(), pass::dot(&coef[j], &x).to_bits(), "m {m}, p {p}, row {j}");
                }
                let classes = m + 1;
                let reference = rng.random_range(0..classes);
                let free: Vec<usize> = (0..classes).filter(|&c| c != reference).collect();
                let (mut a, mut b) = (vec![0.0; classes], vec![0.0; classes]);
                pass::softmax_row(&coef, &free, reference, &x, &mut a);
                softmax_one_row_at_a_time(&coef, &free, reference, &x, &mut b);
                assert_eq!(a.iter().map(|v| v.to_bits()).collect::<Vec<_>>(), b.iter().map(|v| v.to_bits()).collect::<Vec<_>>());
                assert!((a.iter().sum::<f64>() - 1.0).abs() < 1e-12);
                checked += 1;
            }
        }
    }
    assert_eq!(checked, 9 * 6 * 50);
    // All products -0.0: the sum is -0.0, as `Sum` gives.
    let mut eta = [0.0; 16];
    pass::linear_predictors(&[vec![1.0, 2.0], vec![-1.0, 3.0], vec![0.0, 1.0]], &[-0.0, -0.0], &mut eta);
    assert_eq!(eta[0].to_bits(), pass::dot(&[1.0, 2.0], &[-0.0, -0.0]).to_bits());
}

