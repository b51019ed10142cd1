//! Opening a league: load and validate the play file, fit (or restore from
//! the cache) the models, score every snap. The result is what the split
//! engine, pages, API and report read; `SnapValues` is the per-snap view of
//! the scores the split engine takes.

use crate::models::throw::{ThrowModel, ThrowScores};
use crate::models::{self, Scored};
use crate::playfile::{self, LoadError, LoadOptions, LoadReport};
use std::path::{Path, PathBuf};

/// Per-snap values the models add, borrowed from the scored league: what
/// the split engine reads beside `Plays`.
#[derive(Clone, Copy)]
pub struct SnapValues<'a> {
    pub epa: &'a [f64],
    pub wp: &'a [f64],
    pub wpa: &'a [f64],
    pub cp: &'a [f64],
    /// Throw choice and execution values (`models::throw`); NaN where none.
    pub choice: &'a [f64],
    pub execution: &'a [f64],
    /// The league's share of throws past the line to gain in the snap's
    /// state (`models::throw::sticks_share`); NaN where none.
    pub league_sticks: &'a [f64],
}

/// Where a league comes from and how it is opened.
#[derive(Debug, Clone)]
pub struct LeagueConfig {
    /// The play file or folder.
    pub path: PathBuf,
    pub load: LoadOptions,
    /// Fit the models again even when cached coefficients exist.
    pub refit: bool,
    /// Where fitted models are cached; `None`: fit every time, store nothing.
    pub cache_dir: Option<PathBuf>,
    /// How to read a file in another layout (`None`: ours).
    pub mapping: Option<playfile::Mapping>,
    /// Which overtime rules each season played (`crate::overtime`; default:
    /// every season touchdown-or-answer, 10:00, a level period a tie). It
    /// changes WP values and is part of the model cache key.
    pub overtime: crate::overtime::OvertimeConfig,
}

impl LeagueConfig {
    /// `path`, strict, models cached in the user's cache folder
    /// (`models::cache::cache_dir`, which `LATEGAME_CACHE_DIR` overrides).
    pub fn new(path: impl Into<PathBuf>) -> LeagueConfig {
        LeagueConfig { path: path.into(), load: LoadOptions::default(), refit: false, cache_dir: models::cache::cache_dir(), mapping: None, overtime: Default::default() }
    }
}

/// Why a league could not be opened.
#[derive(Debug, thiserror::Error)]
pub enum LeagueError {
    /// The file was refused; the report says why.
    #[error(transparent)]
    Load(#[from] LoadError),
    #[error("fitting the models: {0}")]
    Models(String),
}

/// A scored league and how it was loaded.
pub struct League {
    pub source: PathBuf,
    pub report: LoadReport,
    pub scored: Scored,
    /// The throw-value model (`None` without air yards) and its per-snap values.
    pub throw_model: Option<ThrowModel>,
    pub throw: ThrowScores,
}

impl League {
    /// Load, fit (or restore from `cfg.cache_dir`) and score.
    pub fn open_with(cfg: &LeagueConfig) -> Result<League, LeagueError> {
        let path = &cfg.path;
        let started = std::time::Instant::now();
        let secs = |t: std::time::Instant| t.elapsed().as_secs_f64();
        let mut loaded = playfile::load_mapped(path, &cfg.load, cfg.mapping.as_ref())?;
        loaded.plays.overtime = cfg.overtime.clone();
        let load_seconds = secs(started);
        tracing::info!(
            snaps = loaded.plays.len(),
            games = loaded.plays.games.len(),
            skipped = loaded.report.rows_skipped,
            "loaded {} in {load_seconds:.2} s",
            path.display()
        );
        let t = std::time::Instant::now();
        let (dir, fingerprint) = (cfg.cache_dir.as_deref(), loaded.fingerprint.clone());
        // The throw-value fit reads only the snaps: it runs beside EP/WP/CP;
        // the passes are priced with their scores before the calibration
        // starts.
        let mut throw_seconds = 0.0;
        let (scored, thrown) = models::fit_and_score_beside(
            loaded.plays,
            &fingerprint,
            cfg.refit,
            dir,
            |p| models::throw::fit_cached(p, &fingerprint, dir, cfg.refit),
            |scored, restored| {
                let t = std::time::Instant::now();
                let out = restored.map(|r| throw_scores(scored, r, dir));
                throw_seconds = secs(t);
                out
            },
        )
        .map_err(|e| LeagueError::Models(format!("{e:#}")))?;
        let (throw_model, throw) = thrown.map_err(|e| LeagueError::Models(e.to_string()))?;
        let score_seconds = secs(t) - throw_seconds;
        tracing::info!(
            load_seconds,
            models_and_scores_seconds = score_seconds,
            throw_scoring_seconds = throw_seconds,
            models_from_cache = scored.from_cache,
            scores_from_cache = scored.scores_from_cache,
            "league open in {:.2} s",
            secs(started)
        );
        Ok(League { source: path.clone(), report: loaded.report, scored, throw_model, throw })
    }

    /// `open_with` with the user's cache folder.
    pub fn open(path: &Path, opts: &LoadOptions, refit: bool) -> Result<League, LeagueError> {
        League::open_with(&LeagueConfig { load: *opts, refit, ..LeagueConfig::new(path) })
    }

    pub fn values(&self) -> SnapValues<'_> {
        let s = &self.scored.scores;
        SnapValues { epa: &s.epa, wp: &s.wp, wpa: &s.wpa, cp: &s.cp, choice: &self.throw.choice, execution: &self.throw.execution, league_sticks: &self.throw.league_sticks }
    }

    pub fn plays(&self) -> &crate::plays::Plays {
        &self.scored.plays
    }
}

/// Fit the throw-value model on every snap and score the passes (no cache).
pub fn throw_values(scored: &Scored) -> Result<(Option<ThrowModel>, ThrowScores), models::ModelError> {
    throw_values_cached(scored, None, true)
}

/// The throw-value model from the cache folder `dir` (unless `refit`), else
/// fitted on every snap and stored there; then the passes scored, or their
/// values read back from `dir` when the model came from it
/// (`models::throw::scores_cached`).
pub fn throw_values_cached(scored: &Scored, dir: Option<&Path>, refit: bool) -> Result<(Option<ThrowModel>, ThrowScores), models::ModelError> {
    let restored = models::throw::fit_cached(&scored.plays, &scored.fingerprint, dir, refit)?;
    Ok(throw_scores(scored, restored, dir))
}

/// The passes scored with a throw-value model from `fit_cached` (NaN
/// everywhere without one), or their values read back from `dir` when the
/// model came from it (`models::throw::scores_cached`).
fn throw_scores(scored: &Scored, restored: models::throw::Restored, dir: Option<&Path>) -> (Option<ThrowModel>, ThrowScores) {
    let started = std::time::Instant::now();
    let p = &scored.plays;
    let Some(model) = restored.model else {
        let nan = vec![f64::NAN; p.len()];
        return (None, ThrowScores { chosen: nan.clone(), league: nan.clone(), choice: nan.clone(), execution: nan.clone(), league_sticks: nan });
    };
    let s = &scored.scores;
    let cache = models::throw::ScoresCache { dir, fingerprint: &scored.fingerprint, read: restored.from_cache };
    let (values, values_from_cache) = models::throw::scores_cached(&model, &scored.models, p, &s.ep, &s.wp, &s.wpa, &cache);
    tracing::info!(
        from_cache = restored.from_cache,
        values_from_cache,
        fit_seconds = restored.seconds,
        seconds = started.elapsed().as_secs_f64(),
        "throw-value model ready and passes scored"
    );
    (Some(model), values)
}

/// The bundled demo league (used when no file is given).
pub fn demo_path() -> PathBuf {
    let here = PathBuf::from("demo-data/league.parquet");
    if here.exists() {
        return here;
    }
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("demo-data/league.parquet")
}
