//! The throw-value model of a whole league from the coefficient cache when
//! it holds one for this file and model version, else fitted on every snap
//! and stored there (`cache::store_part`, part `throw`); and its per-pass
//! values, read back from the columns kept beside it when they were scored
//! with the same coefficients, else scored and kept (`scores_cached`).

use super::{fit, score_all, ThrowModel, ThrowScores};
use crate::models::error::ModelError;
use crate::models::{cache, Models};
use crate::plays::Plays;
use std::path::Path;

/// The cache part the throw-value coefficients are kept under.
pub const PART: &str = "throw";

/// A league's throw-value model and where it came from.
#[derive(Debug, Clone)]
pub struct Restored {
    /// `None` when the file has no passes with air yards.
    pub model: Option<ThrowModel>,
    pub from_cache: bool,
    /// Wall time of the fit or of the read.
    pub seconds: f64,
}

/// The model from `dir` (unless `refit`), else fitted on every snap and
/// stored in `dir`. A cache that cannot be read or written is logged and
/// otherwise ignored.
pub fn fit_cached(p: &Plays, fingerprint: &str, dir: Option<&Path>, refit: bool) -> Result<Restored, ModelError> {
    let started = std::time::Instant::now();
    if let (Some(d), false) = (dir, refit) {
        match cache::load_part::<ThrowModel>(d, PART, fingerprint) {
            Ok(Some(model)) => return Ok(Restored { model: Some(model), from_cache: true, seconds: started.elapsed().as_secs_f64() }),
            Ok(None) => {}
            Err(e) => tracing::warn!("ignoring the cached throw-value model: {e:#}"),
        }
    }
    let rows: Vec<u32> = (0..p.len() as u32).collect();
    let model = fit(p, &rows, &Default::default())?;
    if let (Some(d), Some(m)) = (dir, &model) {
        match cache::store_part(d, PART, fingerprint, m) {
            Ok(path) => tracing::info!("throw-value model cached in {}", path.display()),
            Err(e) => tracing::warn!("could not cache the throw-value model: {e:#}"),
        }
    }
    Ok(Restored { model, from_cache: false, seconds: started.elapsed().as_secs_f64() })
}

/// The cache part holding the throw values per snap, and its columns.
pub const SCORES_PART: &str = "throw-scores";
pub const SCORE_COLUMNS: [&str; 5] = ["chosen", "league", "choice", "execution", "league_sticks"];

fn columns_key<'a>(fingerprint: &'a str, models: &'a str) -> cache::ColumnsKey<'a> {
    cache::ColumnsKey { part: SCORES_PART, fingerprint, models, names: &SCORE_COLUMNS }
}

/// Where the throw values per snap are kept and whether they may be read
/// back (not after a refit).
pub struct ScoresCache<'a> {
    pub dir: Option<&'a Path>,
    pub fingerprint: &'a str,
    pub read: bool,
}

/// Every pass's throw values (`score_all`), read back from `cache` when it
/// holds them for these coefficients (`model` and `models`), else scored
/// and stored there. True when they were read back. A columns file that
/// cannot be read or written is logged and otherwise ignored.
pub fn scores_cached(model: &ThrowModel, models: &Models, p: &Plays, ep: &[f64], wp: &[f64], wpa: &[f64], cache: &ScoresCache) -> (ThrowScores, bool) {
    let digest = match cache.dir.map(|_| cache::digest(&(model, models))).transpose() {
        Ok(d) => d,
        Err(e) => {
            tracing::warn!("not caching the throw values: {e:#}");
            None
        }
    };
    if let (Some(d), Some(m), true) = (cache.dir, &digest, cache.read) {
        match cache::load_columns(d, &columns_key(cache.fingerprint, m), p.len()) {
            Ok(cols) => {
                let mut it = cols.into_iter();
                let mut next = || it.next().unwrap_or_default();
                let s = ThrowScores { chosen: next(), league: next(), choice: next(), execution: next(), league_sticks: next() };
                return (s, true);
            }
            Err(cache::Miss::Missing) => {}
            Err(e) => tracing::warn!("scoring every pass again: the cached throw values were not used ({e})"),
        }
    }
    let t = std::time::Instant::now();
    let s = score_all(model, models, p, ep, wp, wpa);
    tracing::debug!("every pass priced in {:.0} ms", t.elapsed().as_secs_f64() * 1000.0);
    if let (Some(d), Some(m)) = (cache.dir, &digest) {
        let cols: [&[f64]; 5] = [&s.chosen, &s.league, &s.choice, &s.execution, &s.league_sticks];
        cache::store_columns_behind(d, &columns_key(cache.fingerprint, m), &cols, "throw values");
    }
    (s, false)
}
