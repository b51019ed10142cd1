//! A league scored: models from the cache or fitted, every snap scored,
//! the calibration from the cache or started in the background; and the
//! scored league as one frame.

use super::error::{ModelError, Result};
use super::{cache, fit, CalibOptions, Calibration, CalibrationCell, Models, Scores};
use crate::playfile::{rows_frame, PlayRow};
use crate::plays::Plays;
use polars::prelude::{Column, DataFrame};
use std::sync::Arc;

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

/// Hold out seasons (see `calib::Plan`) and measure how well models fit on
/// the rest predict them.
pub fn calibrate(plays: &Plays) -> Result<Calibration> {
    super::calibrate_with(plays, &CalibOptions::default())
}

/// Models from the cache when an entry for `fingerprint` exists (unless
/// `refit`), else fitted and stored; then every snap scored. The
/// calibration comes from the same entry, or is computed on a background
/// thread once the snaps are scored and then stored beside the models. A
/// cache that cannot be read or written is logged and otherwise ignored.
pub fn fit_and_score(plays: Plays, fingerprint: &str, refit: bool) -> Result<Scored> {
    let dir = cache::cache_dir();
    fit_and_score_in(plays, fingerprint, refit, dir.as_deref())
}

/// `fit_and_score` with an explicit cache folder (`None`: no cache).
pub fn fit_and_score_in(
    plays: Plays,
    fingerprint: &str,
    refit: bool,
    dir: Option<&std::path::Path>,
) -> Result<Scored> {
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
pub fn scored_frame(scored: &Scored) -> Result<DataFrame> {
    let plays = &scored.plays;
    let rows: Vec<PlayRow> = (0..plays.len()).map(|i| plays.row(i)).collect();
    let mut df = rows_frame(&rows).map_err(|e| ModelError::Frame(e.to_string()))?;
    let s = &scored.scores;
    let cp: Vec<Option<f64>> = s.cp.iter().map(|&v| v.is_finite().then_some(v)).collect();
    let extra = vec![
        Column::new("ep_before".into(), s.ep.clone()),
        Column::new("epa".into(), s.epa.clone()),
        Column::new("wp_before".into(), s.wp.clone()),
        Column::new("wpa".into(), s.wpa.clone()),
        Column::new("completion_prob".into(), cp),
    ];
    df.hstack_mut(&extra).map_err(|e| ModelError::Frame(format!("adding the score columns: {e}")))?;
    Ok(df)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::models::{calibrate_with, cp, testkit, Plan};

    fn small() -> Plays {
        testkit::league(600, 3, 42)
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
}
