//! A league scored: models from the cache or fitted, every snap scored (or
//! its scores read back from the cache beside the models), the calibration
//! from the cache or started in the background; and the scored league as
//! one frame.

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
    /// True when the per-snap scores were read back from the cache rather
    /// than computed (the same numbers, bit for bit).
    pub scores_from_cache: bool,
}

/// The cache part holding the per-snap scores, and its columns in order.
pub const SCORES_PART: &str = "scores";
pub const SCORE_COLUMNS: [&str; 5] = ["ep", "epa", "wp", "wpa", "cp"];

fn scores_key<'a>(fingerprint: &'a str, models: &'a str) -> cache::ColumnsKey<'a> {
    cache::ColumnsKey { part: SCORES_PART, fingerprint, models, names: &SCORE_COLUMNS }
}

/// The scores of `rows` snaps kept in `dir` for these models, if any (a
/// miss is logged and is `None`).
fn restore_scores(dir: &std::path::Path, fingerprint: &str, models_digest: &str, rows: usize) -> Option<Scores> {
    match cache::load_columns(dir, &scores_key(fingerprint, models_digest), rows) {
        Ok(cols) => {
            let mut it = cols.into_iter();
            let mut next = || it.next().unwrap_or_default();
            Some(Scores { ep: next(), epa: next(), wp: next(), wpa: next(), cp: next() })
        }
        Err(cache::Miss::Missing) => None,
        Err(e) => {
            tracing::warn!("scoring every snap again: the cached scores were not used ({e})");
            None
        }
    }
}

fn store_scores(dir: &std::path::Path, fingerprint: &str, models_digest: &str, s: &Scores) {
    let cols: [&[f64]; 5] = [&s.ep, &s.epa, &s.wp, &s.wpa, &s.cp];
    cache::store_columns_behind(dir, &scores_key(fingerprint, models_digest), &cols, "scores");
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
/// `refit`), else fitted and stored; then every snap scored, or its scores
/// read back from the cache when the models came from it and the scores
/// kept there were made with the same coefficients (else they are scored
/// and stored). The
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
    fit_and_score_beside(plays, fingerprint, refit, dir, |_| (), |_, ()| ()).map(|(s, ())| s)
}

/// `fit_and_score_in`, with `beside` run on the same snaps at the same
/// time (`rayon::join`): a model that needs none of these scores (the
/// throw-value fit) is fitted while EP/WP/CP are fitted and score every
/// snap; then `then` gets the scored league and what `beside` returned
/// (the throw values priced with the scores). The calibration's refits
/// wait until `then` is done, so they do not share the cores with it.
pub fn fit_and_score_beside<T: Send, U>(
    plays: Plays,
    fingerprint: &str,
    refit: bool,
    dir: Option<&std::path::Path>,
    beside: impl FnOnce(&Plays) -> T + Send,
    then: impl FnOnce(&Scored, T) -> U,
) -> Result<(Scored, U)> {
    // The models' cache key carries the overtime config (`cache::model_key`).
    let key = cache::model_key(fingerprint, &plays.overtime);
    let (ready, other) = rayon::join(|| models_and_scores(&plays, &key, refit, dir), || beside(&plays));
    let Ready { models, calibration, from_cache, scores, scores_from_cache } = ready?;
    let plays = Arc::new(plays);
    let (calibration, hold) = match calibration {
        Some(c) => (CalibrationCell::ready(c), None),
        None => {
            let store = dir.map(|d| (d.to_path_buf(), key.clone()));
            let (cell, hold) = CalibrationCell::spawn_held(plays.clone(), models.clone(), store);
            (cell, Some(hold))
        }
    };
    let scored = Scored {
        plays,
        scores,
        models,
        calibration,
        fingerprint: fingerprint.to_string(),
        from_cache,
        scores_from_cache,
    };
    let after = then(&scored, other);
    if let Some(h) = hold {
        h.open();
    }
    Ok((scored, after))
}

/// The models and every snap's scores, from the cache or computed.
struct Ready {
    models: Models,
    calibration: Option<Calibration>,
    from_cache: bool,
    scores: Scores,
    scores_from_cache: bool,
}

fn models_and_scores(plays: &Plays, fingerprint: &str, refit: bool, dir: Option<&std::path::Path>) -> Result<Ready> {
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
            let models = fit(plays)?;
            if let Some(d) = dir {
                match cache::store(d, fingerprint, &models, None) {
                    Ok(p) => tracing::info!("fitted models cached in {}", p.display()),
                    Err(e) => tracing::warn!("could not cache the fitted models: {e:#}"),
                }
            }
            (models, None, false)
        }
    };
    let t = std::time::Instant::now();
    // A digest of the coefficients ties the kept scores to them.
    let digest = match dir.map(|_| cache::digest(&models)).transpose() {
        Ok(d) => d,
        Err(e) => {
            tracing::warn!("not caching the scores: {e:#}");
            None
        }
    };
    let restored = match (dir, &digest, from_cache) {
        (Some(d), Some(m), true) => restore_scores(d, fingerprint, m, plays.len()),
        _ => None,
    };
    let scores_from_cache = restored.is_some();
    let scores = match restored {
        Some(s) => s,
        None => {
            let s = models.score(plays);
            tracing::debug!("every snap scored in {:.0} ms", t.elapsed().as_secs_f64() * 1000.0);
            if let (Some(d), Some(m)) = (dir, &digest) {
                store_scores(d, fingerprint, m, &s);
            }
            s
        }
    };
    tracing::info!(models_from_cache = from_cache, scores_from_cache, "snaps scored in {:.0} ms", t.elapsed().as_secs_f64() * 1000.0);
    Ok(Ready { models, calibration, from_cache, scores, scores_from_cache })
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

    fn assert_same_scores(a: &Scores, b: &Scores) {
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        for (name, x, y) in [("ep", &a.ep, &b.ep), ("epa", &a.epa, &b.epa), ("wp", &a.wp, &b.wp), ("wpa", &a.wpa, &b.wpa), ("cp", &a.cp, &b.cp)] {
            assert!(x.len() > 1000, "{name}: only {} snaps", x.len());
            assert!(bits(x) == bits(y), "{name} differs");
        }
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
        // The scores were read back, not computed: the same as scoring
        // with the restored coefficients, and as the first opening's, bit
        // for bit (NaN included).
        assert!(!first.scores_from_cache);
        assert!(second.scores_from_cache);
        let fresh = second.models.score(&small());
        assert_same_scores(&second.scores, &fresh);
        assert_same_scores(&second.scores, &first.scores);
        assert_eq!(
            first.models.report.ep.iterations,
            second.models.report.ep.iterations
        );
        assert!((cal1.wp.brier - cal2.wp.brier).abs() < 1e-12);
        let forced = fit_and_score_in(small(), "synthetic-42", true, Some(&dir)).expect("refit");
        assert!(!forced.from_cache && !forced.scores_from_cache, "a refit scores again");
        forced.calibration.wait().expect("calibration");
        let other = fit_and_score_in(small(), "another-file", false, Some(&dir)).expect("other");
        assert!(!other.from_cache && !other.scores_from_cache);
        other.calibration.wait().expect("calibration");
        // Damaged or cut-short score columns are a miss: scored again (the
        // same numbers), and written again for the next opening.
        // (Columns are written behind: wait for them before touching the file.)
        cache::finish_writes();
        let cols = dir.join(cache::columns_file_name(SCORES_PART, "synthetic-42"));
        let bytes = std::fs::read(&cols).expect("the scores were cached");
        for broken in [bytes[..bytes.len() / 2].to_vec(), bytes[..40].to_vec(), Vec::new(), {
            let mut b = bytes.clone();
            let k = b.len() - 100;
            b[k] ^= 1;
            b
        }] {
            cache::finish_writes();
            std::fs::write(&cols, &broken).expect("write");
            let again = fit_and_score_in(small(), "synthetic-42", false, Some(&dir)).expect("damaged scores");
            assert!(again.from_cache && !again.scores_from_cache);
            assert_same_scores(&again.scores, &fresh);
        }
        let healed = fit_and_score_in(small(), "synthetic-42", false, Some(&dir)).expect("healed");
        assert!(healed.scores_from_cache, "the damaged file was written again");
        // Scores kept for other coefficients are a miss.
        let mut changed = healed.models.clone();
        changed.ep.try_mean += 1e-9;
        let d2 = cache::digest(&changed).expect("digest");
        assert!(restore_scores(&dir, "synthetic-42", &d2, small().len()).is_none());
        drop(healed);
        // A corrupt entry is a miss, not an error.
        std::fs::write(dir.join(cache::file_name("synthetic-42")), "{not json").expect("write");
        let again =
            fit_and_score_in(small(), "synthetic-42", false, Some(&dir)).expect("corrupt cache");
        assert!(!again.from_cache);
        drop(again);
        let _ = std::fs::remove_dir_all(&dir);
    }

    #[test]
    fn another_overtime_config_never_reads_the_old_models_or_scores() {
        use crate::overtime::{OvertimeConfig, Rule, Rules, SeasonRules};
        let dir = std::env::temp_dir().join(format!("lategame-models-cache-ot-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        let first = fit_and_score_in(small(), "synthetic-ot", false, Some(&dir)).expect("default");
        assert!(!first.from_cache);
        first.calibration.wait().expect("calibration");
        let other = OvertimeConfig { sets: vec![SeasonRules { from: 2001, to: 2002, rules: Rules { rule: Rule::FirstScoreWins, period_secs: 900, ties: true } }] };
        let mut plays = small();
        plays.overtime = other.clone();
        let second = fit_and_score_in(plays, "synthetic-ot", false, Some(&dir)).expect("other config");
        assert!(!second.from_cache && !second.scores_from_cache, "read what was fitted under the default");
        assert_eq!(second.fingerprint, "synthetic-ot", "the data fingerprint is the data's");
        second.calibration.wait().expect("calibration");
        assert!(dir.join(cache::file_name(&cache::model_key("synthetic-ot", &other))).exists());
        // Each config finds its own entry again; the default's key is the
        // plain fingerprint (the caches written before stay valid).
        assert_eq!(cache::model_key("synthetic-ot", &OvertimeConfig::default()), "synthetic-ot");
        let again = fit_and_score_in(small(), "synthetic-ot", false, Some(&dir)).expect("default again");
        assert!(again.from_cache && again.scores_from_cache);
        let mut plays = small();
        plays.overtime = other;
        let back = fit_and_score_in(plays, "synthetic-ot", false, Some(&dir)).expect("other again");
        assert!(back.from_cache && back.scores_from_cache);
        drop((first, second, again, back));
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
