//! Fitting every model on a set of snaps, and scoring every snap with them:
//! EP, EPA, WP, WPA and completion probability from the offense's side.

use super::error::{ModelError, Result};
use super::{cp, ep, logit, wp, ModelReport, MODEL_VERSION};
use crate::plays::Plays;
use serde::{Deserialize, Serialize};

/// Everything fitted from one league.
#[derive(Debug, Serialize, Deserialize, Clone, PartialEq)]
pub struct Models {
    pub version: String,
    pub ep: ep::EpModel,
    pub wp: wp::WpModel,
    /// Margin-and-time win probability, for comparison only.
    pub baseline: wp::WpModel,
    /// `None` when the file carries no air yards.
    pub cp: Option<cp::CpModel>,
    pub report: FitReport,
}

/// How each fit went.
#[derive(Debug, Serialize, Deserialize, Clone, PartialEq)]
pub struct FitReport {
    pub snaps: usize,
    pub ep: ModelReport,
    pub wp: ModelReport,
    pub baseline: ModelReport,
    pub cp: Option<ModelReport>,
    /// Wall time of the whole fit.
    pub seconds: f64,
}

/// Per-snap values, each `plays.len()` long, all from the offense's side.
#[derive(Debug, Clone, PartialEq)]
pub struct Scores {
    /// EP before the snap.
    pub ep: Vec<f64>,
    pub epa: Vec<f64>,
    /// WP before the snap.
    pub wp: Vec<f64>,
    pub wpa: Vec<f64>,
    /// Completion probability; NaN where no completion model value (not a
    /// pass with air yards, or no completion model).
    pub cp: Vec<f64>,
}

fn options() -> logit::FitOptions {
    logit::FitOptions::default()
}

/// Fit every model on all snaps.
pub fn fit(plays: &Plays) -> Result<Models> {
    let all: Vec<u32> = (0..plays.len() as u32).collect();
    fit_rows(plays, &all)
}

/// Fit every model on the snaps `rows` (indices into `plays`).
pub fn fit_rows(plays: &Plays, rows: &[u32]) -> Result<Models> {
    fit_rows_from(plays, rows, None)
}

/// `fit_rows` with Newton started from `init`'s coefficients (same answer,
/// fewer iterations when `init` was fit on overlapping rows).
pub fn fit_rows_from(plays: &Plays, rows: &[u32], init: Option<&Models>) -> Result<Models> {
    let started = std::time::Instant::now();
    if rows.is_empty() {
        return Err(ModelError::NoSnaps);
    }
    let opts = options();
    // CP reads no EP; the two WP fits read EP and not each other: each
    // fit runs beside the others it does not need (the same fits as one
    // after another; errors in the same order).
    // The drive model reads no EP either: it is estimated and solved (on
    // one thread) beside the EP fit, off the way to the WP fit.
    let (ep_wp, cp) = rayon::join(
        || -> Result<_> {
            let (ep, drive) = rayon::join(|| ep::fit(plays, rows, &opts, init.map(|m| &m.ep)), || wp::drive_model(plays, rows));
            let ep = ep?;
            let ep_all = ep.score_all_blind(plays);
            let (wp, baseline) = rayon::join(
                // The final seconds' chances are the EP model's, read from
                // the same rows.
                || wp::fit_with(plays, &ep_all, rows, wp::WpKind::Full, &opts, init.map(|m| &m.wp), drive, ep.finish.clone()),
                || wp::fit(plays, &ep_all, rows, wp::WpKind::Baseline, &opts, init.map(|m| &m.baseline)),
            );
            Ok((ep, wp?, baseline?))
        },
        || cp::fit(plays, rows, &opts, init.and_then(|m| m.cp.as_ref())),
    );
    let (ep, wp, baseline) = ep_wp?;
    let cp = cp?;
    for (name, s) in [("ep", &ep.fit.stats), ("wp", &wp.fit.stats), ("baseline", &baseline.fit.stats)].into_iter().chain(cp.as_ref().map(|c| ("cp", &c.fit.stats))) {
        tracing::debug!(rows = s.rows, warm = s.warm_iterations, full = s.iterations, converged = s.converged, "{name} fitted in {:.2} s", s.seconds);
    }
    let report = FitReport {
        snaps: rows.len(),
        ep: ep.fit.stats.clone(),
        wp: wp.fit.stats.clone(),
        baseline: baseline.fit.stats.clone(),
        cp: cp.as_ref().map(|c| c.fit.stats.clone()),
        seconds: started.elapsed().as_secs_f64(),
    };
    Ok(Models {
        version: MODEL_VERSION.to_string(),
        ep,
        wp,
        baseline,
        cp,
        report,
    })
}

impl Models {
    /// Score every snap of `plays`.
    /// The three passes are independent: they run side by side on rayon's
    /// threads (each value is computed as alone, so the scores are the same).
    pub fn score(&self, plays: &Plays) -> Scores {
        let ((ep, wp), cp) = rayon::join(
            || {
                let (ep, blind) = self.ep.score_all_and_blind(plays);
                (ep, self.wp.score_all(plays, &blind))
            },
            || match &self.cp {
                Some(m) => m.score_all(plays),
                None => vec![f64::NAN; plays.len()],
            },
        );
        let epa = ep::epa(plays, &ep);
        let wpa = wp::wpa(plays, &wp);
        Scores {
            ep,
            epa,
            wp,
            wpa,
            cp,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::models::{cache, calib, fit_and_score_in, testkit, CalibOptions};
    use crate::playfile::Kind;

    fn small() -> Plays {
        testkit::league(600, 3, 42)
    }

    #[test]
    fn synthetic_league_fits_and_scores() {
        let plays = small();
        let models = fit(&plays).expect("fit");
        assert!(models.report.ep.converged, "{:?}", models.report.ep);
        assert!(models.report.wp.converged, "{:?}", models.report.wp);
        let s = models.score(&plays);
        let n = plays.len();
        for v in [&s.ep, &s.epa, &s.wp, &s.wpa] {
            assert_eq!(v.len(), n);
            assert!(v.iter().all(|x| x.is_finite()));
        }
        assert!(s.wp.iter().all(|&p| (0.0..=1.0).contains(&p)));
        // EP rises with field position on 1st and 10.
        let ep: Vec<f64> = (1..10)
            .map(|k| models.ep.situation(1, 10, k * 10, 1500))
            .collect();
        assert!(ep.windows(2).all(|w| w[1] > w[0]), "{ep:?}");
        // The completion model is defined exactly on passes with air yards.
        for i in 0..n {
            assert_eq!(s.cp[i].is_finite(), cp::applies(&plays, i));
        }
        // WPA telescopes within a game: WP before the first snap plus all
        // WPA from a fixed team's side ends at that team's result.
        for g in plays.games.iter().take(50) {
            let home = g.home;
            let mut wp = if plays.offense[g.start] == home {
                s.wp[g.start]
            } else {
                1.0 - s.wp[g.start]
            };
            for i in g.start..g.end {
                wp += if plays.offense[i] == home {
                    s.wpa[i]
                } else {
                    -s.wpa[i]
                };
            }
            assert!((wp - g.home_result()).abs() < 1e-9);
        }
    }

    #[test]
    fn epa_follows_its_convention() {
        let plays = small();
        let models = fit(&plays).expect("fit");
        let s = models.score(&plays);
        let try_mean = models.ep.try_mean;
        for i in 0..plays.len() {
            let same_half = i + 1 < plays.len()
                && plays.game[i + 1] == plays.game[i]
                && plays.half(i + 1) == plays.half(i);
            let next_try = same_half && plays.kind[i + 1].is_try();
            if plays.kind[i].is_try() {
                assert_eq!(s.ep[i], try_mean);
                assert!((s.epa[i] - (plays.points[i] as f64 - try_mean)).abs() < 1e-12);
            } else if plays.points[i] >= 6 {
                // A touchdown earns 6 + the expected try (when one follows).
                let want = 6.0 + if next_try { try_mean } else { 0.0 } - s.ep[i];
                assert!((s.epa[i] - want).abs() < 1e-12, "snap {i}");
            } else if plays.points[i] == 3 {
                assert!((s.epa[i] - (3.0 - s.ep[i])).abs() < 1e-12);
            } else if plays.points[i] == 0 && same_half && plays.kind[i + 1] != Kind::Kickoff {
                let after = if plays.offense[i + 1] == plays.offense[i] {
                    s.ep[i + 1]
                } else {
                    -s.ep[i + 1]
                };
                assert!((s.epa[i] - (after - s.ep[i])).abs() < 1e-12);
            } else if !same_half {
                assert!((s.epa[i] - (plays.points[i] as f64 - s.ep[i])).abs() < 1e-12);
            }
        }
        // Every drive adds up to its points, the handoff and the kickoff term.
        let mut start = 0;
        for i in 1..=plays.len() {
            if i == plays.len() || plays.game[i] != plays.game[start] || plays.drive[i] != plays.drive[start] {
                let t = ep::DriveTerms::of(&plays, &s.ep, start, i);
                let sum: f64 = s.epa[start..i].iter().sum();
                assert!((sum - t.total()).abs() < 1e-9, "drive at {start}: {sum} vs {t:?}");
                start = i;
            }
        }
        assert!((0..plays.len()).all(|i| plays.kind[i] != Kind::Kickoff
            || ep::is_free_kick(&plays, i)
            || s.ep[i] == models.ep.kickoff(plays.secs_half[i], ep::ScoreClock::of_snap(&plays, i))));
    }

    /// Touchdown + try (+ kickoff) and safety + free kick sequences,
    /// checked against the values worked from the EP before each snap.
    #[test]
    fn touchdowns_tries_and_safeties_by_hand() {
        let plays = small();
        let models = fit(&plays).expect("fit");
        let s = models.score(&plays);
        let t = models.ep.try_mean;
        let mut seen = false;
        for i in 0..plays.len().saturating_sub(2) {
            if plays.points[i] == 6 && plays.kind[i + 1].is_try() && plays.kind[i + 2] == Kind::Kickoff {
                // TD + try + kickoff: 6 + try points − EP before, kickoff aside.
                let sum = s.epa[i] + s.epa[i + 1];
                let want = 6.0 + plays.points[i + 1] as f64 - s.ep[i];
                assert!((sum - want).abs() < 1e-12);
                assert!(s.ep[i] >= 6.0 + t || s.epa[i] > 0.0);
                seen = true;
            }
            if ep::is_safety(&plays, i) && ep::is_free_kick(&plays, i + 1) {
                let fk = models.ep.free_kick(plays.secs_half[i + 1], ep::ScoreClock::of_snap(&plays, i + 1));
                assert!((s.epa[i] - (-2.0 + fk - s.ep[i])).abs() < 1e-12);
            }
        }
        assert!(seen, "no touchdown with a try in the synthetic league");
    }

    /// Timing on a league of about 1.2M snaps: run with
    /// `cargo test --release --lib models::tests::timing -- --ignored --nocapture`.
    #[test]
    #[ignore]
    fn timing_on_a_million_snaps() {
        let t = std::time::Instant::now();
        let plays = testkit::league(10_300, 6, 7);
        eprintln!(
            "synthetic league: {} snaps in {:.1}s",
            plays.len(),
            t.elapsed().as_secs_f64()
        );
        let dir =
            std::env::temp_dir().join(format!("lategame-models-timing-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        let t = std::time::Instant::now();
        let models = fit(&plays).expect("fit");
        let fit_s = t.elapsed().as_secs_f64();
        let t = std::time::Instant::now();
        let scores = models.score(&plays);
        let score_s = t.elapsed().as_secs_f64();
        eprintln!("fit EP+WP+baseline+CP: {fit_s:.2}s; score all snaps: {score_s:.2}s");
        for (name, r) in [
            ("ep", &models.report.ep),
            ("wp", &models.report.wp),
            ("baseline", &models.report.baseline),
        ] {
            eprintln!(
                "  {name}: {} rows x {} features, {} warm + {} full iterations, converged {}, |grad| {:.2e}, {:.2}s",
                r.rows, r.features, r.warm_iterations, r.iterations, r.converged, r.grad_norm, r.seconds
            );
        }
        if let Some(r) = &models.report.cp {
            eprintln!(
                "  cp: {} rows, {} + {} iterations, {:.2}s",
                r.rows, r.warm_iterations, r.iterations, r.seconds
            );
        }
        let t = std::time::Instant::now();
        let cal = calib::calibrate_from(&plays, &CalibOptions::default(), Some(&models))
            .expect("calibrate");
        eprintln!(
            "calibration (refit without the last season): {:.2}s; Brier {:.4} vs baseline {:.4}",
            t.elapsed().as_secs_f64(),
            cal.wp.brier,
            cal.baseline.brier
        );
        cache::store(&dir, "timing", &models, Some(&cal)).expect("store");
        let t = std::time::Instant::now();
        let warm = fit_and_score_in(plays, "timing", false, Some(&dir)).expect("warm");
        eprintln!(
            "warm start from cache (load + score): {:.2}s, from_cache {}",
            t.elapsed().as_secs_f64(),
            warm.from_cache
        );
        assert!(warm.from_cache);
        assert_eq!(scores.ep.len(), warm.scores.ep.len());
        let _ = std::fs::remove_dir_all(&dir);
    }

    /// EP and the blind EP worked out together are each the same bits as alone.
    #[test]
    fn ep_and_blind_ep_together_match_each_alone() {
        let plays = small();
        let models = fit(&plays).expect("fit");
        let (ep, blind) = models.ep.score_all_and_blind(&plays);
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        assert_eq!(bits(&ep), bits(&models.ep.score_all(&plays)));
        assert_eq!(bits(&blind), bits(&models.ep.score_all_blind(&plays)));
        // The late-game terms do change some snaps.
        assert!(ep.iter().zip(&blind).filter(|(a, b)| a != b).count() > 100);
    }

    /// The default stopping rule (decrement below 1e-10 per unit of weight)
    /// against one a thousand times tighter, on the EP fit of a synthetic
    /// league with warm levels and a subsampled Hessian as on a big league:
    /// no class probability of any snap moves by 1e-4.
    #[test]
    fn default_stopping_rule_moves_no_probability_by_1e_4() {
        use crate::models::logit::FitOptions;
        let plays = crate::models::testkit::league(300, 2, 17);
        let rows: Vec<u32> = (0..plays.len() as u32).collect();
        let base = FitOptions { warm_rows: 8_000, hess_rows: 16_000, ..Default::default() };
        assert_eq!(base.tol, 1e-10);
        let loose = ep::fit(&plays, &rows, &base, None).expect("fit");
        let tight = ep::fit(&plays, &rows, &FitOptions { tol: 1e-13, ..base }, None).expect("fit");
        assert!(loose.fit.stats.converged && tight.fit.stats.converged);
        assert!(loose.fit.stats.warm_iterations > 0, "the warm levels must run");
        assert!(tight.fit.stats.iterations > loose.fit.stats.iterations, "the tighter rule must take more steps");
        let mut worst = 0.0f64;
        let mut x = vec![0.0; ep::FEATURES.len()];
        let (mut a, mut b) = ([0.0; 7], [0.0; 7]);
        for i in 0..plays.len() {
            if plays.down[i] == 0 {
                continue;
            }
            ep::features(plays.down[i], plays.to_go[i], plays.ball_on[i], plays.secs_half[i], ep::ScoreClock::of_snap(&plays, i), &mut x);
            loose.fit.probs(&x, &mut a);
            tight.fit.probs(&x, &mut b);
            worst = a.iter().zip(&b).map(|(p, q)| (p - q).abs()).fold(worst, f64::max);
        }
        eprintln!("largest |dp| {worst:e} over {} snaps", plays.len());
        assert!(worst < 1e-4, "largest |dp| {worst:e}");
    }

    /// A league restored from the cache must score exactly as the fit it
    /// was written from: every coefficient reads back bit for bit.
    #[test]
    fn cached_coefficients_read_back_bit_for_bit() {
        let plays = testkit::league(120, 2, 9);
        let models = fit(&plays).expect("fit");
        let dir = std::env::temp_dir().join(format!("lategame-cache-test-{}", std::process::id()));
        cache::store(&dir, "fp-roundtrip", &models, None).expect("store");
        let back = cache::load(&dir, "fp-roundtrip").expect("load").expect("an entry");
        let _ = std::fs::remove_dir_all(&dir);
        let bits = |m: &Models| crate::models::testkit::json_bits(m);
        let (a, b) = (bits(&models), bits(&back.models));
        assert!(a.len() > 50, "only {} numbers: the test would prove little", a.len());
        assert_eq!(a, b);
    }
}
