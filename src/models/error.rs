//! What can go wrong fitting, calibrating and caching the models, as typed
//! errors the command line and pages turn into messages.

use super::logit::LogitError;
use std::path::PathBuf;

#[derive(Debug, thiserror::Error)]
pub enum ModelError {
    #[error("no snaps to fit the models on")]
    NoSnaps,
    /// One logistic fit failed: which model, on how many rows, and why.
    #[error("{model} on {rows} {what}: {source}")]
    Fit {
        model: &'static str,
        rows: usize,
        what: &'static str,
        #[source]
        source: LogitError,
    },
    #[error("calibration needs at least one game; the league is empty")]
    EmptyLeague,
    #[error("calibration needs at least two games; the league has {0}")]
    TooFewGames(usize),
    /// The league was replaced before its calibration finished.
    #[error("calibration cancelled")]
    Cancelled,
    #[error("model cache {}: {source}", path.display())]
    CacheIo {
        path: PathBuf,
        #[source]
        source: std::io::Error,
    },
    #[error("model cache {}: not a cache entry: {source}", path.display())]
    CacheEntry {
        path: PathBuf,
        #[source]
        source: serde_json::Error,
    },
    #[error("serializing the fitted models: {0}")]
    Serialize(#[source] serde_json::Error),
    #[error("building the scored frame: {0}")]
    Frame(String),
}

pub type Result<T> = std::result::Result<T, ModelError>;
