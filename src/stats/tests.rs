//! Tests of the statistics: published values, hand-worked fixtures, scipy
//! cross-checks and simulations against a known truth.

use super::*;

fn close(got: f64, want: f64, tol: f64) -> bool {
    (got - want).abs() <= tol
}

fn round1(x: f64) -> f64 {
    (x * 10.0).round() / 10.0
}

// source: the professional league's official passer rating formula as printed
// in its annual record book (a perfect line rates 158.3).
#[test]
fn passer_rating_perfect_line_is_158_3() {
    // 20/25, 400 yds, 5 TD, 0 INT: every component reaches the 2.375 cap,
    // 4 × 2.375 / 6 × 100 = 158.333…
    let r = passer_rating(25.0, 20.0, 400.0, 5.0, 0.0).expect("rating");
    assert_eq!(round1(r), 158.3);
    assert!(close(r, 475.0 / 3.0, 1e-9), "{r}");
}

#[test]
fn passer_rating_hand_worked_examples() {
    // 30 att, 20 comp, 250 yds, 2 TD, 1 INT (no cap reached):
    //   a = (20/30 − 0.3)·5   = (0.6667 − 0.3)·5 = 11/6  = 1.8333
    //   b = (250/30 − 3)·0.25 = (8.3333 − 3)/4   = 4/3   = 1.3333
    //   c = 2/30·20                              = 4/3   = 1.3333
    //   d = 2.375 − 1/30·25   = 2.375 − 0.8333   = 37/24 = 1.5417
    //   (a+b+c+d)/6·100 = (145/24)/6·100 = 100.694… → 100.7
    let r = passer_rating(30.0, 20.0, 250.0, 2.0, 1.0).expect("rating");
    assert!(close(r, 14500.0 / 144.0, 1e-9), "{r}");
    assert_eq!(round1(r), 100.7);

    // 10 att, 9 comp, 150 yds, 1 TD, 2 INT (caps at both ends):
    //   a = (0.9 − 0.3)·5  = 3.0    → capped to 2.375
    //   b = (15 − 3)·0.25  = 3.0    → capped to 2.375
    //   c = 0.1·20         = 2.0
    //   d = 2.375 − 0.2·25 = −2.625 → floored to 0
    //   (2.375 + 2.375 + 2.0 + 0)/6·100 = 6.75/6·100 = 112.5
    let r = passer_rating(10.0, 9.0, 150.0, 1.0, 2.0).expect("rating");
    assert!(close(r, 112.5, 1e-9), "{r}");

    // 20 att, 5 comp, 40 yds, 0 TD, 3 INT (every component floored):
    //   a = (0.25 − 0.3)·5 = −0.25 → 0;  b = (2 − 3)·0.25 = −0.25 → 0
    //   c = 0;  d = 2.375 − 0.15·25 = −1.375 → 0;  rating 0.0
    let r = passer_rating(20.0, 5.0, 40.0, 0.0, 3.0).expect("rating");
    assert_eq!(r, 0.0);
}

#[test]
fn passer_rating_needs_attempts() {
    assert_eq!(passer_rating(0.0, 0.0, 0.0, 0.0, 0.0), None);
    assert_eq!(passer_rating(10.0, f64::NAN, 0.0, 0.0, 0.0), None);
}

// Weights 20 per TD and −45 per INT, source: Carroll, Palmer & Thorn, The
// Hidden Game of Football, 1988. Sacks and sack yards in the net variant:
// common practice, no source.
#[test]
fn any_a_worked_example() {
    // 35 att, 280 yds, 2 TD, 1 INT, 3 sacks for 18 yds:
    //   (280 + 20·2 − 45·1 − 18) / (35 + 3) = 257 / 38 = 6.7632
    let v = any_a(35.0, 280.0, 2.0, 1.0, 3.0, 18.0).expect("any/a");
    assert!(close(v, 257.0 / 38.0, 1e-12), "{v}");
    assert_eq!(any_a(0.0, 0.0, 0.0, 0.0, 0.0, 0.0), None);
    // Only sacks: still a dropback denominator.
    assert_eq!(any_a(0.0, 0.0, 0.0, 0.0, 2.0, 14.0), Some(-7.0));
}

#[test]
fn beta_prior_pooled_mean_and_consistent_shapes() {
    // Rates .2, .5, .8 on 10 tries each: pooled mean 15/30 = .5, and by
    // symmetry alpha = beta.
    let p = fit_beta_prior(&[(2.0, 10.0), (5.0, 10.0), (8.0, 10.0)]).expect("prior");
    assert!(close(p.mean, 0.5, 1e-12));
    assert!(close(p.alpha, p.beta, 1e-9), "{p:?}");
    let s = p.alpha + p.beta;
    assert!(
        (MIN_CONCENTRATION..=MAX_CONCENTRATION).contains(&s),
        "{p:?}"
    );
    assert!(close(p.tau2, 0.25 / (s + 1.0), 1e-15));
}

#[test]
fn beta_prior_without_spread_stays_proper() {
    // Identical rates: no between-unit spread in the data, yet the prior stays
    // finite and every interval keeps a width.
    let few = fit_beta_prior(&[(5.0, 10.0), (5.0, 10.0), (6.0, 12.0)]).expect("prior");
    let many = fit_beta_prior(&[(5.0, 10.0); 40]).expect("prior");
    for p in [few, many] {
        assert!(
            p.tau2 > 0.0 && p.alpha + p.beta < MAX_CONCENTRATION,
            "{p:?}"
        );
        let post = beta_posterior(&p, 10.0, 10.0).expect("posterior");
        assert!(
            post.lo < post.estimate && post.estimate < post.hi,
            "{post:?}"
        );
        assert!(post.estimate > 0.5, "{post:?}");
    }
    // Three units say little about the spread, so little is shrunk; forty
    // identical units say it is small, so most is.
    let share = |p: &BetaPrior| {
        beta_posterior(p, 10.0, 10.0)
            .expect("posterior")
            .signal_share
    };
    eprintln!("no spread: 3 units {few:?}, 40 units {many:?}");
    assert!(
        share(&few) > 0.5 && share(&many) < 0.5,
        "{} {}",
        share(&few),
        share(&many)
    );
}

#[test]
fn beta_prior_rejects_bad_input() {
    assert_eq!(fit_beta_prior(&[]), None);
    assert_eq!(fit_beta_prior(&[(3.0, 10.0)]), None);
    assert_eq!(fit_beta_prior(&[(3.0, 10.0), (11.0, 10.0)]), None);
    assert_eq!(fit_beta_prior(&[(0.0, 10.0), (0.0, 10.0)]), None);
    assert_eq!(fit_beta_prior(&[(3.0, 10.0), (f64::NAN, 10.0)]), None);
    // Units without data are skipped, not rejected.
    assert!(fit_beta_prior(&[(2.0, 10.0), (0.0, 0.0), (8.0, 10.0)]).is_some());
}

#[test]
fn beta_prior_recovers_known_prior() {
    // 4,000 units from Beta(20, 80) with 50 tries each.
    let units: Vec<(f64, f64)> = simulate(7, 4000, 50, 50)
        .iter()
        .map(|&(_, k, n)| (k, n))
        .collect();
    let prior = fit_beta_prior(&units).expect("prior");
    eprintln!("recovered prior: {prior:?}");
    assert!(close(prior.mean, 0.2, 0.005), "{prior:?}");
    let s = prior.alpha + prior.beta;
    assert!((70.0..=140.0).contains(&s), "alpha+beta {s}");
}

#[test]
fn beta_posterior_shape() {
    let prior = BetaPrior {
        alpha: 20.0,
        beta: 80.0,
        mean: 0.2,
        tau2: 0.16 / 101.0,
    };
    let none = beta_posterior(&prior, 0.0, 0.0).expect("posterior");
    assert!(close(none.estimate, 0.2, 1e-12));
    assert_eq!(none.signal_share, 0.0);
    let post = beta_posterior(&prior, 12.0, 40.0).expect("posterior");
    // (20 + 12) / (100 + 40)
    assert!(close(post.estimate, 32.0 / 140.0, 1e-12));
    assert!(post.lo < post.estimate && post.estimate < post.hi);
    // τ²/(τ² + m(1−m)/n) = (1/101)/(1/101 + 1/40) = 40/141
    assert!(close(post.signal_share, 40.0 / 141.0, 1e-12), "{post:?}");
    assert_eq!(beta_posterior(&prior, 5.0, 4.0), None);
}

#[test]
fn normal_prior_and_posterior_by_hand() {
    // Means 0, 2, 4 with se² 1: fixed mean 2, Q = 8, df 2,
    // Σw − Σw²/Σw = 3 − 1 = 2, τ² = (8 − 2)/2 = 3, mu = 2.
    let prior = fit_normal_prior(&[(0.0, 1.0), (2.0, 1.0), (4.0, 1.0)]).expect("prior");
    assert!(
        close(prior.mu, 2.0, 1e-12) && close(prior.tau2, 3.0, 1e-12),
        "{prior:?}"
    );
    // Unit at 4 with se² 1: share 3/4, estimate 2 + .75·2 = 3.5,
    // posterior sd √.75, 90% half-width 1.6448536·0.8660254 = 1.4244850.
    let post = normal_posterior(&prior, 4.0, 1.0).expect("posterior");
    assert!(close(post.estimate, 3.5, 1e-12));
    assert!(close(post.signal_share, 0.75, 1e-12));
    assert!(
        close(post.hi - post.estimate, 1.424_485_0, 1e-6),
        "{post:?}"
    );
    assert!(
        close(post.estimate - post.lo, 1.424_485_0, 1e-6),
        "{post:?}"
    );
}

#[test]
fn normal_prior_floors_at_zero() {
    let prior = fit_normal_prior(&[(1.0, 1.0), (1.1, 1.0), (0.9, 1.0)]).expect("prior");
    assert_eq!(prior.tau2, 0.0);
    assert!(close(prior.mu, 1.0, 1e-12));
    let post = normal_posterior(&prior, 3.0, 0.5).expect("posterior");
    assert_eq!(
        (post.estimate, post.lo, post.hi, post.signal_share),
        (1.0, 1.0, 1.0, 0.0)
    );
    assert_eq!(fit_normal_prior(&[(1.0, 1.0), (2.0, 0.0)]), None);
    assert_eq!(fit_normal_prior(&[(1.0, 1.0)]), None);
}

// source: Efron & Morris (1975), JASA — 18 players' hits in their first 45
// at-bats, grand mean ≈ .265 and shrinkage factor ≈ .212 (hit counts and
// both figures from memory).
#[test]
fn james_stein_efron_morris_batting() {
    let hits = [
        18, 17, 16, 15, 14, 14, 13, 12, 11, 11, 10, 10, 10, 10, 10, 9, 8, 7,
    ];
    let avg: Vec<f64> = hits.iter().map(|&h| h as f64 / 45.0).collect();
    let pbar = avg.iter().sum::<f64>() / avg.len() as f64;
    let sigma2 = pbar * (1.0 - pbar) / 45.0;
    let (grand, c, est) = james_stein(&avg, sigma2).expect("james-stein");
    eprintln!(
        "James–Stein: grand mean {grand:.6}, factor {c:.6}, top {:.4}",
        est[0]
    );
    assert!(close(grand, 0.265, 0.005), "grand mean {grand}");
    assert!(close(c, 0.212, 0.02), "shrinkage factor {c}");
    // Order is kept and every estimate moves toward the grand mean.
    for (y, z) in avg.iter().zip(&est) {
        assert!((z - grand).abs() <= (y - grand).abs());
    }
}

#[test]
fn james_stein_edges() {
    assert!(james_stein(&[0.1, 0.2, 0.3], 0.01).is_none());
    let (_, c, est) = james_stein(&[0.3; 5], 0.01).expect("js");
    assert_eq!(c, 0.0);
    assert!(est.iter().all(|&e| close(e, 0.3, 1e-12)));
    // Spread smaller than the noise: positive part keeps c at 0.
    let (_, c, _) = james_stein(&[0.30, 0.31, 0.29, 0.30], 1.0).expect("js");
    assert_eq!(c, 0.0);
}

#[test]
fn ranks_and_moments() {
    let v = [1.0, 2.0, 2.0, 3.0];
    assert_eq!(percentile_rank(&v, 2.0), Some(50.0)); // (1 + 0.5·2)/4
    assert_eq!(percentile_rank(&v, 0.0), Some(0.0));
    assert_eq!(percentile_rank(&v, 3.5), Some(100.0));
    assert_eq!(percentile_rank(&v, 3.0), Some(87.5)); // (3 + 0.5)/4
    assert_eq!(percentile_rank(&[], 1.0), None);
    assert_eq!(percentile_rank(&[f64::NAN, 1.0], 1.0), Some(50.0));

    assert_eq!(z_score(7.0, 5.0, 2.0), Some(1.0));
    assert_eq!(z_score(7.0, 5.0, 0.0), None);

    // 2,4,4,4,5,5,7,9: mean 5, Σ(x−5)² = 32, sample sd √(32/7).
    let (m, sd) = mean_sd(&[2.0, 4.0, 4.0, 4.0, 5.0, 5.0, 7.0, 9.0]).expect("mean_sd");
    assert!(close(m, 5.0, 1e-12) && close(sd, (32.0f64 / 7.0).sqrt(), 1e-12));
    assert_eq!(mean_sd(&[1.0]), None);

    // x = 1,2,3, y = 1,3,2: Σdxdy = 1, Σdx² = Σdy² = 2, r = .5.
    assert!(close(
        pearson(&[1.0, 2.0, 3.0], &[1.0, 3.0, 2.0]).expect("r"),
        0.5,
        1e-12
    ));
    assert!(close(
        pearson(&[1.0, 2.0, 3.0], &[6.0, 4.0, 2.0]).expect("r"),
        -1.0,
        1e-12
    ));
    assert_eq!(pearson(&[1.0, 2.0], &[1.0, 2.0]), None);
    assert_eq!(pearson(&[1.0, 1.0, 1.0], &[1.0, 2.0, 3.0]), None);
    assert_eq!(pearson(&[1.0, 2.0, 3.0], &[1.0, 2.0]), None);

    assert_eq!(weighted_mean(&[(1.0, 1.0), (4.0, 2.0)]), Some(3.0));
    assert_eq!(weighted_mean(&[(1.0, 0.0)]), None);
    assert_eq!(weighted_mean(&[(1.0, -1.0), (2.0, 3.0)]), None);
}

#[test]
fn standardize_reweights_to_passer_mix() {
    // League: cell A value .70 on 100 snaps, B .40 on 300; overall .475.
    let league = [("A", 0.70, 100.0), ("B", 0.40, 300.0), ("C", 0.9, 0.0)];
    // Passer with 30 in A and 10 in B: (30·.70 + 10·.40)/40 = .625.
    let v = standardize(&league, &[("A", 30.0), ("B", 10.0)]).expect("value");
    assert!(close(v, 0.625, 1e-12), "{v}");
    // C (no league snaps) and D (absent) fall back to .475:
    // (10·.70 + 5·.475 + 5·.475)/20 = .5875.
    let v = standardize(&league, &[("A", 10.0), ("C", 5.0), ("D", 5.0)]).expect("value");
    assert!(close(v, 0.5875, 1e-12), "{v}");
    assert_eq!(standardize(&league, &[("A", 0.0)]), None);
    assert_eq!(standardize::<&str>(&[], &[("A", 1.0)]), None);
}

#[test]
fn results_serialize() {
    let post = Posterior {
        estimate: 0.25,
        lo: 0.2,
        hi: 0.3,
        signal_share: 0.5,
    };
    let v = serde_json::to_value(post).expect("json");
    assert_eq!(v["signal_share"], 0.5);
    let prior = BetaPrior {
        alpha: 2.0,
        beta: 6.0,
        mean: 0.25,
        tau2: 0.02,
    };
    assert_eq!(serde_json::to_value(prior).expect("json")["alpha"], 2.0);
    let prior = NormalPrior {
        mu: 0.1,
        tau2: 0.01,
    };
    assert_eq!(serde_json::to_value(prior).expect("json")["mu"], 0.1);
}

/// Runs tests/ref/dist_ref.py on `cases`; `None` when LATEGAME_SKIP_PY=1.
fn scipy_reference(cases: &serde_json::Value) -> Option<serde_json::Value> {
    use std::io::Write;
    use std::process::{Command, Stdio};
    if std::env::var("LATEGAME_SKIP_PY").as_deref() == Ok("1") {
        eprintln!("LATEGAME_SKIP_PY=1: skipping the scipy cross-check");
        return None;
    }
    let script = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/ref/dist_ref.py");
    let advice = "the scipy cross-check needs python3 with scipy (pip install scipy); \
                  set LATEGAME_SKIP_PY=1 to skip it";
    let mut child = Command::new("python3")
        .arg(&script)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap_or_else(|e| panic!("could not run python3 ({e}); {advice}"));
    child
        .stdin
        .take()
        .expect("stdin piped")
        .write_all(cases.to_string().as_bytes())
        .expect("write cases to python3");
    let out = child.wait_with_output().expect("wait for python3");
    assert!(
        out.status.success(),
        "{} failed ({}): {}; {advice}",
        script.display(),
        out.status,
        String::from_utf8_lossy(&out.stderr).trim()
    );
    Some(serde_json::from_slice(&out.stdout).expect("dist_ref.py prints JSON"))
}

fn rel_err(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(f64::MIN_POSITIVE)
}

// source: scipy.stats (beta.ppf, norm.cdf, norm.ppf) as the reference library.
#[test]
fn distributions_agree_with_scipy() {
    let mut beta_cases = Vec::new();
    for &(a, b) in &[
        (20.0, 80.0),
        (32.0, 108.0),
        (0.5, 0.5),
        (1.230_769_230_769_231, 1.230_769_230_769_231),
        (2.0, 3.0),
        (3.7, 140.2),
        (200.0, 20.0),
        (20_000.0, 80_000.0),
        (20_010.0, 80_030.0),
        (65_000.0, 35_000.0),
        (2_000.0, 98_000.0),
    ] {
        for &p in &[0.001, 0.05, 0.5, 0.95, 0.999] {
            beta_cases.push((a, b, p));
        }
    }
    // Posteriors through this module: (alpha, beta, k, n).
    let post_cases = [
        (20.0, 80.0, 12.0, 40.0),
        (1.5, 4.5, 0.0, 10.0),
        (60.0, 40.0, 55.0, 55.0),
    ];
    for &(a, b, k, n) in &post_cases {
        beta_cases.push((a + k, b + n - k, LO_Q));
        beta_cases.push((a + k, b + n - k, HI_Q));
    }
    let mut norm_cdf = Vec::new();
    for &(mu, sd) in &[(0.0, 1.0), (3.5, 0.75f64.sqrt()), (-0.12, 0.04)] {
        for &z in &[-3.0, -1.645, -0.3, 0.0, 0.7, 2.2, 3.0] {
            norm_cdf.push((mu, sd, mu + z * sd));
        }
    }
    let norm_ppf: Vec<(f64, f64, f64)> = [(0.0, 1.0), (3.5, 0.75f64.sqrt()), (0.08, 0.3)]
        .iter()
        .flat_map(|&(mu, sd)| [0.001, LO_Q, 0.3, HI_Q, 0.999].map(|p| (mu, sd, p)))
        .collect();
    let cases = serde_json::json!({
        "beta_ppf": beta_cases, "norm_cdf": norm_cdf, "norm_ppf": norm_ppf,
    });
    let Some(reference) = scipy_reference(&cases) else {
        return;
    };
    let column = |name: &str| -> Vec<f64> {
        reference[name]
            .as_array()
            .unwrap_or_else(|| panic!("reference lacks {name}"))
            .iter()
            .map(|v| v.as_f64().expect("number"))
            .collect()
    };

    let beta_got: Vec<f64> = beta_cases
        .iter()
        .map(|&(a, b, p)| Beta::new(a, b).expect("beta").inverse_cdf(p))
        .collect();
    let want = column("beta_ppf");
    assert_agrees("beta.ppf", &beta_cases, &beta_got, &want);
    // The same quantiles as beta_posterior reports them.
    let n_plain = beta_cases.len() - 2 * post_cases.len();
    for (i, &(a, b, k, n)) in post_cases.iter().enumerate() {
        let prior = BetaPrior {
            alpha: a,
            beta: b,
            mean: a / (a + b),
            tau2: 0.01,
        };
        let post = beta_posterior(&prior, k, n).expect("posterior");
        let (lo, hi) = (want[n_plain + 2 * i], want[n_plain + 2 * i + 1]);
        assert!(
            rel_err(post.lo, lo) <= 1e-9 && rel_err(post.hi, hi) <= 1e-9,
            "{post:?} vs {lo} {hi}"
        );
    }
    let got: Vec<f64> = norm_cdf
        .iter()
        .map(|&(mu, sd, x)| Normal::new(mu, sd).expect("normal").cdf(x))
        .collect();
    assert_agrees("norm.cdf", &norm_cdf, &got, &column("norm_cdf"));
    let got: Vec<f64> = norm_ppf
        .iter()
        .map(|&(mu, sd, p)| Normal::new(mu, sd).expect("normal").inverse_cdf(p))
        .collect();
    assert_agrees("norm.ppf", &norm_ppf, &got, &column("norm_ppf"));
}

/// Every statrs value within 1e-9 relative of scipy's.
fn assert_agrees(what: &str, cases: &[(f64, f64, f64)], got: &[f64], want: &[f64]) {
    assert_eq!(
        want.len(),
        cases.len(),
        "{what}: scipy returned a different count"
    );
    let mut worst = 0.0f64;
    for ((case, &g), &w) in cases.iter().zip(got).zip(want) {
        worst = worst.max(rel_err(g, w));
        assert!(
            rel_err(g, w) <= 1e-9,
            "{what}{case:?}: statrs {g}, scipy {w}"
        );
    }
    eprintln!(
        "{what} worst relative error {worst:.2e} over {} cases",
        cases.len()
    );
}

// source: scipy.special.betaln and scipy.optimize.minimize_scalar as the
// reference for the prior's fitted concentration.
#[test]
fn beta_prior_fit_agrees_with_scipy() {
    let league: Vec<(f64, f64)> = simulate(11, 60, 10, 60)
        .iter()
        .map(|&(_, k, n)| (k, n))
        .collect();
    let datasets: Vec<Vec<(f64, f64)>> = vec![
        vec![(2.0, 10.0), (5.0, 10.0), (8.0, 10.0)],
        vec![(5.0, 10.0), (5.0, 10.0), (6.0, 12.0)],
        vec![(1.0, 40.0), (0.0, 25.0), (3.0, 60.0), (2.0, 33.0)],
        league,
    ];
    let cases: Vec<serde_json::Value> = datasets
        .iter()
        .map(|d| {
            serde_json::json!({
                "k": d.iter().map(|u| u.0).collect::<Vec<_>>(),
                "n": d.iter().map(|u| u.1).collect::<Vec<_>>(),
                "lo": MIN_CONCENTRATION, "hi": MAX_CONCENTRATION,
            })
        })
        .collect();
    let Some(reference) = scipy_reference(&serde_json::json!({ "beta_prior_mode": cases }))
    else {
        return;
    };
    let want = reference["beta_prior_mode"]
        .as_array()
        .expect("beta_prior_mode");
    assert_eq!(want.len(), datasets.len());
    for (d, w) in datasets.iter().zip(want) {
        let w = w.as_f64().expect("number");
        let p = fit_beta_prior(d).expect("prior");
        let got = p.alpha + p.beta;
        eprintln!(
            "alpha+beta: ours {got:.9}, scipy {w:.9} (rel {:.1e})",
            rel_err(got, w)
        );
        assert!(rel_err(got, w) <= 1e-6, "alpha+beta {got} vs scipy {w}");
    }
}

/// Small seeded generator (SplitMix64) so the simulations need no extra crate.
struct SplitMix(u64);

impl SplitMix {
    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform on (0, 1).
    fn unit(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    fn range(&mut self, lo: u64, hi: u64) -> u64 {
        lo + self.next_u64() % (hi - lo + 1)
    }
    fn binomial(&mut self, n: u64, p: f64) -> u64 {
        (0..n).filter(|_| self.unit() < p).count() as u64
    }
}

/// `units` true rates from Beta(20, 80), each with `n_lo..=n_hi` tries:
/// `(true rate, successes, tries)`.
fn simulate(seed: u64, units: usize, n_lo: u64, n_hi: u64) -> Vec<(f64, f64, f64)> {
    let mut rng = SplitMix(seed);
    let truth = Beta::new(20.0, 80.0).expect("beta");
    (0..units)
        .map(|_| {
            let p = truth.inverse_cdf(rng.unit());
            let n = rng.range(n_lo, n_hi);
            (p, rng.binomial(n, p) as f64, n as f64)
        })
        .collect()
}

/// One simulated league: (raw RMSE, shrunk RMSE, interval coverage).
fn shrinkage_run(seed: u64) -> (f64, f64, f64) {
    let units = simulate(seed, 60, 10, 60);
    let counts: Vec<(f64, f64)> = units.iter().map(|&(_, k, n)| (k, n)).collect();
    let prior = fit_beta_prior(&counts).expect("prior");
    let (mut se_raw, mut se_shrunk, mut covered) = (0.0, 0.0, 0);
    for &(p, k, n) in &units {
        let post = beta_posterior(&prior, k, n).expect("posterior");
        se_raw += (k / n - p).powi(2);
        se_shrunk += (post.estimate - p).powi(2);
        covered += usize::from(post.lo <= p && p <= post.hi);
    }
    let m = units.len() as f64;
    (
        (se_raw / m).sqrt(),
        (se_shrunk / m).sqrt(),
        covered as f64 / m,
    )
}

// Property check by simulation (common practice, no source): 60 units with
// true rates from Beta(20, 80) and 10-60 tries each.
#[test]
fn shrinkage_beats_raw_rates_and_intervals_cover() {
    let (raw, shrunk, cover) = shrinkage_run(2024);
    eprintln!("seed 2024: raw RMSE {raw:.4}, shrunk {shrunk:.4}, coverage {cover:.3}");
    assert!(shrunk <= 0.75 * raw, "shrunk RMSE {shrunk} vs raw {raw}");
    assert!((0.80..=0.97).contains(&cover), "coverage {cover}");

    // Across many leagues: every one gains at least 25%, and coverage
    // averages near the nominal 90%.
    let reps = 200;
    let (mut total_cover, mut worst_ratio, mut lo_cover, mut hi_cover) =
        (0.0, 0.0f64, 1.0f64, 0.0f64);
    let mut outside_band = 0;
    for seed in 0..reps {
        let (raw, shrunk, cover) = shrinkage_run(seed);
        worst_ratio = worst_ratio.max(shrunk / raw);
        total_cover += cover;
        lo_cover = lo_cover.min(cover);
        hi_cover = hi_cover.max(cover);
        outside_band += usize::from(!(0.80..=0.97).contains(&cover));
    }
    let mean_cover = total_cover / reps as f64;
    eprintln!(
        "{reps} leagues: worst shrunk/raw RMSE {worst_ratio:.3}, coverage mean {mean_cover:.3} \
         (range {lo_cover:.3}-{hi_cover:.3}, {outside_band} leagues outside 80-97%)"
    );
    assert!(
        worst_ratio <= 0.75,
        "worst shrunk/raw RMSE ratio {worst_ratio}"
    );
    assert!(
        (0.86..=0.94).contains(&mean_cover),
        "mean coverage {mean_cover}"
    );
}
