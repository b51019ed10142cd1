//! Models fitted from the league itself: expected points, win probability,
//! completion probability, their calibration, the on-disk coefficient cache,
//! and the scored frame (every snap with EP, EPA, WP, WPA, completion prob).

pub mod cache;
pub mod calib;
pub mod clock;
pub mod cp;
pub mod ep;
pub mod logit;
pub mod pending;
pub mod score;
pub mod strata;
#[cfg(test)]
pub(crate) mod testkit;
pub mod wp;

pub use calib::{calibrate_with, CalibOptions, Calibration, Plan};
pub use logit::FitStats as ModelReport;
pub use pending::{CalibStatus, CalibrationCell};

use crate::playfile::{rows_frame, PlayRow};
use crate::plays::Plays;
use anyhow::Context;
use polars::prelude::{Column, DataFrame};
use serde::{Deserialize, Serialize};
use std::sync::Arc;

/// Bumped whenever features, labels or conventions change; part of the cache key.
pub const MODEL_VERSION: &str = "lategame-models-4";

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

/// A league with its scores and the models and calibration behind them.
pub struct Scored {
    /// Shared with the background calibration while it runs.
    pub plays: Arc<Plays>,
    pub scores: Scores,
    pub models: Models,
    /// Ready when cached; else computed in the background (`pending`).
    pub calibration: CalibrationCell,
    pub fingerprint: String,
    /// True when the models came from the cache.
    pub from_cache: bool,
}

impl Drop for Scored {
    /// A league no longer served stops calibrating.
    fn drop(&mut self) {
        self.calibration.cancel();
    }
}

fn options() -> logit::FitOptions {
    logit::FitOptions::default()
}

/// Fit every model on all snaps.
pub fn fit(plays: &Plays) -> anyhow::Result<Models> {
    let all: Vec<u32> = (0..plays.len() as u32).collect();
    fit_rows(plays, &all)
}

/// Fit every model on the snaps `rows` (indices into `plays`).
pub fn fit_rows(plays: &Plays, rows: &[u32]) -> anyhow::Result<Models> {
    fit_rows_from(plays, rows, None)
}

/// `fit_rows` with Newton started from `init`'s coefficients (same answer,
/// fewer iterations when `init` was fit on overlapping rows).
pub fn fit_rows_from(plays: &Plays, rows: &[u32], init: Option<&Models>) -> anyhow::Result<Models> {
    let started = std::time::Instant::now();
    if rows.is_empty() {
        anyhow::bail!("no snaps to fit the models on");
    }
    let opts = options();
    let ep = ep::fit(plays, rows, &opts, init.map(|m| &m.ep))?;
    let ep_all = ep.score_all_blind(plays);
    let wp = wp::fit(
        plays,
        &ep_all,
        rows,
        wp::WpKind::Full,
        &opts,
        init.map(|m| &m.wp),
    )?;
    let baseline = wp::fit(
        plays,
        &ep_all,
        rows,
        wp::WpKind::Baseline,
        &opts,
        init.map(|m| &m.baseline),
    )?;
    let cp = cp::fit(plays, rows, &opts, init.and_then(|m| m.cp.as_ref()))?;
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
    pub fn score(&self, plays: &Plays) -> Scores {
        let ep = self.ep.score_all(plays);
        let epa = ep::epa(plays, &ep);
        let wp = self.wp.score_all(plays, &self.ep.score_all_blind(plays));
        let wpa = wp::wpa(plays, &wp);
        let cp = match &self.cp {
            Some(m) => m.score_all(plays),
            None => vec![f64::NAN; plays.len()],
        };
        Scores {
            ep,
            epa,
            wp,
            wpa,
            cp,
        }
    }
}

/// Hold out seasons (see `calib::Plan`) and measure how well models fit on
/// the rest predict them.
pub fn calibrate(plays: &Plays) -> anyhow::Result<Calibration> {
    calibrate_with(plays, &CalibOptions::default())
}

/// Models from the cache when an entry for `fingerprint` exists (unless
/// `refit`), else fitted and stored; then every snap scored. The
/// calibration comes from the same entry, or is computed on a background
/// thread once the snaps are scored and then stored beside the models. A
/// cache that cannot be read or written is logged and otherwise ignored.
pub fn fit_and_score(plays: Plays, fingerprint: &str, refit: bool) -> anyhow::Result<Scored> {
    let dir = cache::cache_dir();
    fit_and_score_in(plays, fingerprint, refit, dir.as_deref())
}

/// `fit_and_score` with an explicit cache folder (`None`: no cache).
pub fn fit_and_score_in(
    plays: Plays,
    fingerprint: &str,
    refit: bool,
    dir: Option<&std::path::Path>,
) -> anyhow::Result<Scored> {
    let cached = match (dir, refit) {
        (Some(d), false) => match cache::load(d, fingerprint) {
            Ok(e) => e,
            Err(e) => {
                tracing::warn!("ignoring the model cache: {e:#}");
                None
            }
        },
        _ => None,
    };
    let (models, calibration, from_cache) = match cached {
        Some(e) => (e.models, e.calibration, true),
        None => {
            let models = fit(&plays)?;
            if let Some(d) = dir {
                match cache::store(d, fingerprint, &models, None) {
                    Ok(p) => tracing::info!("fitted models cached in {}", p.display()),
                    Err(e) => tracing::warn!("could not cache the fitted models: {e:#}"),
                }
            }
            (models, None, false)
        }
    };
    let scores = models.score(&plays);
    let plays = Arc::new(plays);
    let calibration = match calibration {
        Some(c) => CalibrationCell::ready(c),
        None => {
            let store = dir.map(|d| (d.to_path_buf(), fingerprint.to_string()));
            CalibrationCell::spawn(plays.clone(), models.clone(), store)
        }
    };
    Ok(Scored {
        plays,
        scores,
        models,
        calibration,
        fingerprint: fingerprint.to_string(),
        from_cache,
    })
}

/// The scored league as one frame: every column of the play file (same
/// names and layout as `playfile::rows_frame`; `complete`/`intercepted`
/// empty on snaps that are not passes unless true), then
///
/// - `ep_before`: expected points before the snap, offense's side;
/// - `epa`: expected points added by the snap (see `ep::epa`);
/// - `wp_before`: offense's win probability before the snap;
/// - `wpa`: win probability added (see `wp::wpa`);
/// - `completion_prob`: probability the pass is caught; empty where the
///   completion model does not apply.
pub fn scored_frame(scored: &Scored) -> anyhow::Result<DataFrame> {
    let plays = &scored.plays;
    let rows: Vec<PlayRow> = (0..plays.len()).map(|i| plays.row(i)).collect();
    let mut df = rows_frame(&rows)?;
    let s = &scored.scores;
    let cp: Vec<Option<f64>> = s.cp.iter().map(|&v| v.is_finite().then_some(v)).collect();
    let extra = vec![
        Column::new("ep_before".into(), s.ep.clone()),
        Column::new("epa".into(), s.epa.clone()),
        Column::new("wp_before".into(), s.wp.clone()),
        Column::new("wpa".into(), s.wpa.clone()),
        Column::new("completion_prob".into(), cp),
    ];
    df.hstack_mut(&extra).context("adding the score columns")?;
    Ok(df)
}

#[cfg(test)]
mod tests {
    use super::*;
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

    #[test]
    fn cache_round_trip_gives_identical_scores() {
        let dir =
            std::env::temp_dir().join(format!("lategame-models-cache-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        let first = fit_and_score_in(small(), "synthetic-42", false, Some(&dir)).expect("first");
        assert!(!first.from_cache);
        // The calibration is computed in the background, then cached.
        let cal1 = first.calibration.wait().expect("calibration");
        let second = fit_and_score_in(small(), "synthetic-42", false, Some(&dir)).expect("second");
        assert!(second.from_cache);
        let cal2 = second.calibration.get().expect("the calibration came from the cache");
        // JSON keeps coefficients to the last bit or so (serde_json's
        // default float parser may differ by one unit in the last place).
        let close = |a: &[f64], b: &[f64]| {
            a.iter()
                .zip(b)
                .all(|(x, y)| (x - y).abs() <= 1e-12 * (1.0 + x.abs()))
        };
        assert!(close(&first.scores.ep, &second.scores.ep));
        assert!(close(&first.scores.epa, &second.scores.epa));
        assert!(close(&first.scores.wp, &second.scores.wp));
        assert!(close(&first.scores.wpa, &second.scores.wpa));
        assert_eq!(
            first.models.report.ep.iterations,
            second.models.report.ep.iterations
        );
        assert!((cal1.wp.brier - cal2.wp.brier).abs() < 1e-12);
        let forced = fit_and_score_in(small(), "synthetic-42", true, Some(&dir)).expect("refit");
        assert!(!forced.from_cache);
        forced.calibration.wait().expect("calibration");
        let other = fit_and_score_in(small(), "another-file", false, Some(&dir)).expect("other");
        assert!(!other.from_cache);
        other.calibration.wait().expect("calibration");
        // A corrupt entry is a miss, not an error.
        std::fs::write(dir.join(cache::file_name("synthetic-42")), "{not json").expect("write");
        let again =
            fit_and_score_in(small(), "synthetic-42", false, Some(&dir)).expect("corrupt cache");
        assert!(!again.from_cache);
        drop(again);
        let _ = std::fs::remove_dir_all(&dir);
    }

    #[test]
    fn scored_frame_has_inputs_and_scores() {
        let plays = small();
        let n = plays.len();
        let scored = fit_and_score_in(plays, "frame", true, None).expect("score");
        let df = scored_frame(&scored).expect("frame");
        assert_eq!(df.height(), n);
        for c in crate::playfile::COLUMNS {
            assert!(df.column(c.name).is_ok(), "missing {}", c.name);
        }
        for c in ["ep_before", "epa", "wp_before", "wpa", "completion_prob"] {
            assert!(df.column(c).is_ok(), "missing {c}");
        }
        let cp = df.column("completion_prob").expect("cp");
        let passes = (0..n).filter(|&i| cp::applies(&scored.plays, i)).count();
        assert_eq!(n - cp.null_count(), passes);
    }

    #[test]
    fn calibration_holds_out_every_season() {
        let plays = small();
        let c = calibrate(&plays).expect("calibrate");
        assert_eq!(c.plan, Plan::LeaveOneSeasonOut);
        assert_eq!(c.by_season.len(), 3);
        assert_eq!(c.test_snaps, plays.len());
        assert_eq!(c.reliability.iter().map(|b| b.n).sum::<usize>(), c.test_snaps);
        assert!(c.wp.brier < c.constant.brier);
        assert_eq!(c.strata.len(), 3);
        let late = &c.strata[0];
        assert_eq!(late.bins.iter().map(|b| b.n).sum::<usize>(), late.wp.n);
        for b in &late.bins {
            assert!(b.observed.lo <= b.observed.value && b.observed.value <= b.observed.hi);
        }
        assert!(late.brier_gain.lo <= late.brier_gain.value && late.brier_gain.value <= late.brier_gain.hi);
        assert_eq!(c.ep_by_down.len(), 4);
        assert_eq!(c.ep_by_zone.iter().map(|g| g.n).sum::<usize>(), (0..plays.len()).filter(|&i| plays.down[i] > 0).count());
        let json = serde_json::to_string(&c).expect("json");
        let back: Calibration = serde_json::from_str(&json).expect("parse");
        assert_eq!(back.reliability.len(), c.reliability.len());
        assert!((back.wp.brier - c.wp.brier).abs() < 1e-12);
        let last = calibrate_with(&plays, &CalibOptions { plan: Some(Plan::LastSeason) }).expect("last");
        assert_eq!(last.holdout_season, Some(2002));
        assert_eq!(last.train_snaps + last.test_snaps, plays.len());
        // Many seasons: only the latest MAX_HELDOUT_SEASONS are held out.
        let many = testkit::league(160, 8, 3);
        let c = calibrate(&many).expect("eight seasons");
        assert_eq!(c.plan, Plan::LeaveOneSeasonOut);
        let held: Vec<i32> = c.by_season.iter().map(|s| s.season).collect();
        assert_eq!(held, (2002..=2007).collect::<Vec<_>>());
        assert!(c.holdout.starts_with("each of the last 6 of the 8 seasons in turn (2002-2007)"), "{}", c.holdout);
        assert!(c.holdout.contains("seasons 2000-2001 are only trained on"), "{}", c.holdout);
        assert_eq!(c.test_snaps, (0..many.len()).filter(|&i| many.season[i] >= 2002).count());
        // One season: the last fifth of games, said plainly.
        let one = testkit::league(60, 1, 9);
        let c = calibrate(&one).expect("one season");
        assert_eq!(c.plan, Plan::LastGames);
        assert!(c.holdout.starts_with("the last 12 of the 60 games"), "{}", c.holdout);
        assert_eq!(c.test_games, 12);
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
}
